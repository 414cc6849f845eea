"""The verdict of one rule of the release gate (:mod:`dxfcheck.gate.rules`
judges, :mod:`dxfcheck.gate.duty` adds the duty and heat rules): the
:class:`RuleResult` and the helpers every rule uses."""

from __future__ import annotations

import enum
import math
from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any

from dxfcheck.gate.spec import Spec

__all__ = ["RuleResult", "Verdict", "incomplete", "missing", "ratio_rule", "skip"]


class Verdict(enum.StrEnum):
    PASS = "pass"
    WARN = "warn"
    FAIL = "fail"
    SKIP = "skip"


@dataclass(frozen=True)
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
) -> RuleResult:
    capacity, demand = (limit, value) if at_most else (value, limit)
    margin = capacity / demand if demand > 0 else math.inf
    verdict = Verdict.PASS if margin >= 1.0 else Verdict.FAIL
    return RuleResult(rule, title, verdict, value, limit, unit, margin, inputs, source, message, formula, substituted)


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
