"""Stage 4, Solution + Spec → Judgement: the spec's sources and values, and
the rules of the release gate."""
