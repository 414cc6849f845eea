"""Output: the JSON documents (every ``*_to_dict``) and writing them.

The solve, skeleton and error documents live in
:mod:`dxfcheck.output.solve_json` (which ``solve --json`` loads alone) and
are re-exported here; this module adds the release gate's, the linings', the
revision comparison's and the sampling's documents.  One function per result
kind, so that each JSON object's keys stand in one place.  The keys are the
published schemas' (``dxfcheck.solve/2``, ``dxfcheck.check/2``,
``dxfcheck.revision.compare/2``, ``dxfcheck.statics.sampling/1``; README):
this module only copies the results' fields, it never computes physics.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import Any

from dxfcheck.gate.linings import Lining
from dxfcheck.gate.rules import Judgement, RuleResult
from dxfcheck.gate.spec import SpecValue
from dxfcheck.output.solve_json import (
    CHECK_SCHEMA,
    COMPARE_SCHEMA,
    LININGS_SCHEMA,
    SENSITIVITY_SCHEMA,
    SKELETON_SCHEMA,
    SOLVE_SCHEMA,
    case_to_dict,
    error_document,
    file_sha256,
    provenance,
    skeleton_to_dict,
    solution_to_dict,
    tool_dict,
    write_json,
)
from dxfcheck.output.text import CAUTION
from dxfcheck.revision.compare import Comparison, Thresholds, change_to_dict, required_torque

__all__ = [
    "CHECK_SCHEMA",
    "COMPARE_SCHEMA",
    "LININGS_SCHEMA",
    "SENSITIVITY_SCHEMA",
    "SKELETON_SCHEMA",
    "SOLVE_SCHEMA",
    "case_to_dict",
    "comparisons_to_dict",
    "error_document",
    "file_sha256",
    "judgement_to_dict",
    "linings_to_dict",
    "provenance",
    "rule_to_dict",
    "sensitivity_to_dict",
    "skeleton_to_dict",
    "solution_to_dict",
    "trend_rows",
    "write_json",
]


# --- the release gate --------------------------------------------------------


def _num(x: float | None) -> float | None:
    """JSON has no NaN or infinity: both become ``null``."""
    if x is None or x != x:
        return None
    if x in (float("inf"), float("-inf")):
        return None
    return x


def rule_to_dict(r: RuleResult) -> dict[str, Any]:
    """One rule's verdict, value, limit and margin, with its inputs and source."""
    return {
        "rule": r.rule,
        "title": r.title,
        "verdict": str(r.verdict),
        "value": _num(r.value),
        "limit": _num(r.limit),
        "unit": r.unit,
        "margin": _num(r.margin),
        "inputs": {k: (_num(v) if isinstance(v, float) else v) for k, v in r.inputs.items()},
        "source": r.source,
        "message": r.message,
        "formula": r.formula,
        "substituted": r.substituted,
    }


def _spec_value(v: SpecValue) -> dict[str, Any]:
    """One spec value and where it came from."""
    return {
        "key": v.key,
        "value": list(v.value) if isinstance(v.value, tuple) else v.value,
        "unit": v.unit,
        "text": v.text,
        "source": v.source,
    }


def judgement_to_dict(j: Judgement) -> dict[str, Any]:
    """The ``dxfcheck.check/2`` JSON document: the solve document at the
    nominal μ plus the verdict, the rules and the spec with its sources."""
    doc = solution_to_dict(j.nominal)
    doc["schema"] = CHECK_SCHEMA
    doc["verdict"] = str(j.verdict)
    doc["counts"] = j.counts()
    doc["friction"] = {"mu": j.mu, "mu_min": j.mu_min, "mu_max": j.mu_max}
    doc["rules"] = [rule_to_dict(r) for r in j.rules]
    doc["spec"] = [_spec_value(v) for v in j.spec.all_values()]
    doc["caution"] = CAUTION
    return doc


# --- revisions ---------------------------------------------------------------


def linings_to_dict(linings: Iterable[Lining]) -> dict[str, Any]:
    """The lining library: every row with its values [units in the names]
    and its sources (the table's, and common practice where it fills in)."""
    rows = [
        {
            "name": ln.name,
            "material": ln.material,
            "mu": ln.mu,
            "mu_min": ln.mu_min,
            "mu_max": ln.mu_max,
            "working_pressure_MPa": list(ln.working_pressure_MPa),
            "pressure_max_MPa": ln.pressure_max_MPa,
            "pv_max_MPa_m_s": ln.pv_max_MPa_m_s,
            "operating_temperature_max_C": ln.operating_temperature_max_C,
            "temperature_max_C": ln.temperature_max_C,
            "source": ln.source,
            "practice": dict(ln.practice),
        }
        for ln in linings
    ]
    return {"schema": LININGS_SCHEMA, "tool": tool_dict(), "linings": rows, "caution": CAUTION}


def _thresholds(th: Thresholds) -> dict[str, Any]:
    return {
        "max_torque_drop": th.max_torque_drop,
        "max_torque_drop_source": th.torque_drop_source,
        "max_force_rise": th.max_force_rise,
        "max_force_rise_source": th.force_rise_source,
    }


def _step(c: Comparison) -> dict[str, Any]:
    """One revision step: the rigid motion found, the matches, the changes."""
    m = c.motion
    return {
        "old": c.old.mechanism.drawing.path,
        "new": c.new.mechanism.drawing.path,
        "rigid_motion": {"a": m.a, "b": m.b, "c": m.c, "d": m.d, "e": m.e, "f": m.f, "found_from": c.motion_source},
        "pin_map": c.pin_map,
        "part_map": c.part_map,
        "matched": {
            "pins": len(c.pin_map),
            "old_pins": len(c.old.mechanism.pins),
            "new_pins": len(c.new.mechanism.pins),
            "parts": len(c.part_map),
            "old_parts": len(c.old.mechanism.parts),
            "new_parts": len(c.new.mechanism.parts),
        },
        "failed": c.failed,
        "changes": [change_to_dict(x) for x in c.changes],
    }


def trend_rows(comps: list[Any]) -> list[dict[str, Any]]:
    """One row per revision (oldest first): verdict, required torque and,
    per drum direction, the torque [N·m] and the largest pin force [N]."""
    if not comps:
        return []
    judgements = [comps[0].old] + [c.new for c in comps]
    out = []
    for j in judgements:
        row: dict[str, Any] = {"drawing": j.mechanism.drawing.path, "verdict": str(j.verdict)}
        row["required_torque_Nm"] = required_torque(j)
        for c in j.nominal.cases:
            row[f"torque_{c.direction}_Nm"] = c.torque_Nm
            row[f"max_pin_force_{c.direction}_N"] = max((p.max_force_N for p in c.pins), default=0.0)
        out.append(row)
    return out


def comparisons_to_dict(comps: list[Any], names: list[str]) -> dict[str, Any]:
    """The ``dxfcheck.revision.compare/2`` JSON document."""
    th = comps[0].thresholds if comps else Thresholds()
    return {
        "schema": COMPARE_SCHEMA,
        "drawings": names,
        "drawings_sha256": [file_sha256(n) for n in names],
        "run_at": provenance(None)["run_at"],
        "failed": any(c.failed for c in comps),
        "thresholds": _thresholds(th),
        "steps": [_step(c) for c in comps],
        "trend": trend_rows(comps),
        "caution": CAUTION,
    }


# --- sampling ----------------------------------------------------------------


def _sampled_direction(d: Any) -> dict[str, Any]:
    return {
        "direction": d.direction,
        "torque_Nm": d.torque_Nm,
        "max_pin_force_N": d.max_pin_force_N,
        "governing_pin": d.governing_pin,
        "p_below_required": d.p_below_required,
    }


def sensitivity_to_dict(res: Any, drawing: str) -> dict[str, Any]:
    """The ``dxfcheck.statics.sampling/1`` JSON document of ``solve --samples``."""
    return {
        "schema": SENSITIVITY_SCHEMA,
        "drawing": drawing,
        **provenance(drawing),
        "samples": res.samples,
        "seed": res.seed,
        "mu_range": list(res.mu_range),
        "pin_tolerance_mm": res.pin_tolerance_mm,
        "spring_tolerance": res.spring_tolerance,
        "required_torque_Nm": res.required_torque_Nm,
        "seconds": res.seconds,
        "directions": [_sampled_direction(d) for d in res.directions],
        "torque_vs_mu": {d: [[m, t] for m, t in c] for d, c in res.curve.items()},
        "caution": CAUTION,
    }
