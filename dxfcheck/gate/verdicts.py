"""The verdict of one rule of the release gate (:mod:`dxfcheck.gate.rules`
judges, :mod:`dxfcheck.gate.duty` adds the duty and heat rules): the
:class:`RuleResult` and the helpers every rule uses."""

from __future__ import annotations

import enum
import math
from collections.abc import Iterable
from dataclasses import field
from typing import Any

from dxfcheck.core.records import record
from dxfcheck.gate.spec import Spec

__all__ = [
    "FIGURES",
    "MAX_FIGURES",
    "RULE_RTOL",
    "RuleResult",
    "Verdict",
    "figures",
    "incomplete",
    "meets",
    "missing",
    "ratio_rule",
    "skip",
]

#: Relative tolerance of every rule's comparison [-]: a value that meets its
#: limit to rounding (within ``RULE_RTOL`` × the larger of the two, or of the
#: rule's ``scale``) passes.  The rules read ≤ and ≥; a value computed through
#: the linkage carries a few ulps of rounding (16.293750000000006 for an exact
#: 16.29375), which must not fail a limit set exactly at it.  1e-9 is far
#: below any drawing's or spec's precision and far above double rounding.
RULE_RTOL = 1e-9

#: Significant figures a rule's value and limit are shown with.
FIGURES = 4

#: The most significant figures shown when value and limit agree to
#: :data:`FIGURES` but differ beyond rounding.
MAX_FIGURES = 12


class Verdict(enum.StrEnum):
    PASS = "pass"
    WARN = "warn"
    FAIL = "fail"
    SKIP = "skip"


@record(frozen=True)
class RuleResult:
    """One rule's verdict.

    Attributes
    ----------
    rule : str
        Stable id, e.g. ``torque.cw`` or ``pin.shear.S1``.
    title : str
    verdict : Verdict
    value, limit : float or None
        Computed value and its limit, in ``unit``.
    unit : str
    margin : float or None
        Capacity over demand [-]; 1 or more passes.
    inputs : dict
        The inputs used, with units in their names.
    source : str
        The published method.
    message : str
        A sentence for the report (for skips: why).
    formula : str
        The rule's formula in symbols, e.g. ``τ = F/(n·πd²/4) ≤ τ_allow``
        (empty for a skip).
    substituted : str
        The same with the values used put in, units included, as the rule
        computed it (the record prints it; nothing recomputes it).
    """

    rule: str
    title: str
    verdict: Verdict
    value: float | None
    limit: float | None
    unit: str
    margin: float | None
    inputs: dict[str, Any] = field(default_factory=dict)
    source: str = ""
    message: str = ""
    formula: str = ""
    substituted: str = ""


def ratio_rule(
    rule: str,
    title: str,
    value: float,
    limit: float,
    unit: str,
    source: str,
    inputs: dict[str, Any],
    *,
    at_most: bool,
    message: str = "",
    formula: str = "",
    substituted: str = "",
    scale: float = 0.0,
) -> RuleResult:
    """A rule ``value ≤ limit`` (``at_most``) or ``value ≥ limit``, passing
    when met to rounding (:func:`meets`, relative to the larger of value,
    limit and ``scale``; ``scale`` [unit] is for a value that is a
    difference of larger numbers, whose rounding is relative to them).

    The margin is capacity over demand, at least 1 when the rule passes; a
    demand of zero or less gives an infinite margin when met and none when
    not (no ratio says by how much a negative capacity misses zero)."""
    capacity, demand = (limit, value) if at_most else (value, limit)
    ok = meets(capacity, demand, scale)
    margin = _margin(capacity, demand, ok)
    verdict = Verdict.PASS if ok else Verdict.FAIL
    return RuleResult(rule, title, verdict, value, limit, unit, margin, inputs, source, message, formula, substituted)


def _margin(capacity: float, demand: float, ok: bool) -> float | None:
    if demand <= 0:
        return math.inf if ok else None
    return max(capacity / demand, 1.0) if ok else capacity / demand


def meets(capacity: float, demand: float, scale: float = 0.0) -> bool:
    """``capacity ≥ demand`` to rounding: within :data:`RULE_RTOL` × the
    largest of |capacity|, |demand| and |scale|."""
    return capacity >= demand - RULE_RTOL * max(abs(capacity), abs(demand), abs(scale))


def figures(value: float | None, limit: float | None) -> int:
    """The significant figures that show ``value`` and ``limit`` apart:
    :data:`FIGURES`, or more (up to :data:`MAX_FIGURES`) when they agree to
    that many but differ by more than rounding (:data:`RULE_RTOL`), so that a
    near-boundary verdict shows why it failed (16.29 against 16.29 becomes
    16.2938 against 16.2937)."""
    if value is None or limit is None or not (math.isfinite(value) and math.isfinite(limit)):
        return FIGURES
    if abs(value - limit) <= RULE_RTOL * max(abs(value), abs(limit)):
        return FIGURES
    n = FIGURES
    while n < MAX_FIGURES and f"{value:.{n}g}" == f"{limit:.{n}g}":
        n += 1
    return n


def skip(rule: str, title: str, why: str, source: str = "") -> RuleResult:
    return RuleResult(rule, title, Verdict.SKIP, None, None, "", None, {}, source, why)


def incomplete(rule: str, title: str, keys: Iterable[str], source: str = "", why: str = "") -> RuleResult:
    """A rule the spec begins but does not finish: FAIL (it stops a
    release), naming exactly the keys it still needs, with no value."""
    need = ", ".join(keys)
    said = f"{why}; " if why else ""
    msg = f"incomplete: {said}the spec begins this rule but it needs {need} (give them, or remove the rule's keys)"
    return RuleResult(rule, title, Verdict.FAIL, None, None, "", None, {"missing": need}, source, msg)


def missing(spec: Spec, keys: Iterable[str], subject: str | None = None) -> list[str]:
    return [k for k in keys if spec.get(k, subject) is None]
