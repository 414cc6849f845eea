"""Stage 5, Judgement × Judgement → Comparison: matching two revisions of a
drawing and listing what changed."""
