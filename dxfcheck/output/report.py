"""Output: the terminal report, the JSON document and error lines.

Every command prints through this module.  Rich is imported only when a
terminal report is drawn, so that ``--json`` runs stay light.
"""

from __future__ import annotations

import contextlib
import json
import math
import sys
import time
from collections.abc import Callable, Iterator
from typing import IO, TYPE_CHECKING, Any

from dxfcheck.core.errors import DxfcheckError
from dxfcheck.core.findings import Finding, Severity
from dxfcheck.core.textsafe import markup as _esc
from dxfcheck.core.textsafe import one_line, report_console, xml_text
from dxfcheck.core.version import __version__
from dxfcheck.gate.rules import Judgement, RuleResult, Verdict
from dxfcheck.mechanism.layers import layers_json, searched_line
from dxfcheck.output.text import CAUTION
from dxfcheck.revision.compare import Thresholds, change_to_dict, required_torque
from dxfcheck.statics import CaseSolution, Solution

if TYPE_CHECKING:
    from dxfcheck.gate.rules import Judgement, RuleResult

__all__ = [
    "CAUTION",
    "CHECK_SCHEMA",
    "COMPARE_SCHEMA",
    "SOLVE_SCHEMA",
    "batch_progress",
    "comparisons_to_dict",
    "error_document",
    "judgement_to_dict",
    "junit_xml",
    "print_batch",
    "print_comparisons",
    "print_error",
    "print_judgement",
    "print_solution",
    "solution_to_dict",
    "write_json",
]


#: Versioned name of the ``solve --json`` document.
SOLVE_SCHEMA = "dxfcheck.solve/2"


#: Width of the report when the output is not a terminal [characters].
REPORT_WIDTH = 120


def _console(out: IO[str] | None) -> Any:
    stream = out or sys.stdout
    width = None if stream.isatty() else REPORT_WIDTH
    return report_console(stream, width)  # control characters in drawing texts shown as escapes


def case_to_dict(c: CaseSolution) -> dict[str, Any]:
    """The JSON form of one solved direction."""
    return {
        "direction": str(c.direction),
        "mu": c.mu,
        "torque_Nm": c.braking_torque_Nm,
        "not_braking": c.why_not_braking,
        "short_shoe_torque_Nm": c.short_shoe_torque_Nm,
        "critical_mu": c.critical_mu,
        "residual": c.residual,
        "condition": c.condition,
        "shoes": [
            {
                "name": s.name,
                "part": s.part,
                "model": s.model,
                "mounting": s.mounting,
                "contact_angle_deg": s.contact_angle_deg,
                "normal_N": s.normal_N,
                "friction_resultant_N": s.friction_resultant_N,
                "friction_lining_N": s.friction_lining_N,
                "torque_Nm": s.torque_Nm,
                "contact_mm": list(s.contact),
                "force_N": list(s.force),
                "normal_force_N": list(s.normal_force),
                "normal_at_mm": list(s.normal_at),
                "friction_force_N": list(s.friction_force),
                "friction_at_mm": list(s.friction_at),
                "peak_line_load_N_per_mm": s.peak_line_load_N_per_mm,
                "peak_at_deg": s.peak_at_deg,
                "mu_equivalent": s.mu_equivalent,
                "pressure_offset_deg": s.pressure_offset_deg,
                "contact_from_deg": s.contact_from_deg,
                "contact_to_deg": s.contact_to_deg,
            }
            for s in c.shoes
        ],
        "pins": [
            {
                "name": p.name,
                "x_mm": p.x_mm,
                "y_mm": p.y_mm,
                "diameter_mm": p.diameter_mm,
                "pivot": p.grounded,
                "fx_N": p.fx_N,
                "fy_N": p.fy_N,
                "force_N": p.force_N,
                "max_force_N": p.max_force_N,
                "parts": list(p.parts),
                "on_parts": [{"part": a.body, "fx_N": a.fx_N, "fy_N": a.fy_N} for a in p.attachments],
            }
            for p in c.pins
        ],
        "members": [
            {"name": m.name, "ends": list(m.ends), "axial_N": m.axial_N, "state": m.state, "length_mm": m.length_mm}
            for m in c.members
        ],
        "bands": [
            {
                "name": b.name,
                "kind": b.kind,
                "tight_N": b.tight_N,
                "slack_N": b.slack_N,
                "tight_pin": b.tight_pin,
                "slack_pin": b.slack_pin,
                "wrap_deg": b.wrap_deg,
                "torque_Nm": b.torque_Nm,
                "peak_line_load_N_per_mm": b.peak_line_load_N_per_mm,
                "ends": [
                    {
                        "pin": e.pin,
                        "tight": e.tight,
                        "tension_N": e.tension_N,
                        "tangent_mm": list(e.tangent),
                        "pull_N": list(e.pull),
                    }
                    for e in b.ends
                ],
            }
            for b in c.bands
        ],
        "springs": [
            {
                "name": s.name,
                "force_N": s.force_N,
                "state": s.state,
                "ends": [{"part": e.part, "at_mm": list(e.point), "force_N": list(e.force)} for e in s.ends],
            }
            for s in c.springs
        ],
        "effort_scale": c.effort_scale,
        "loads": [
            {
                "name": ld.name,
                "part": ld.part,
                "x_mm": ld.x_mm,
                "y_mm": ld.y_mm,
                "fx_N": ld.fx_N,
                "fy_N": ld.fy_N,
                "force_N": ld.force_N,
            }
            for ld in c.loads
        ],
    }


def solution_to_dict(sol: Solution) -> dict[str, Any]:
    """The ``dxfcheck.solve/2`` JSON document (schema in the README)."""

    mech = sol.mechanism
    d = mech.drawing
    return {
        "schema": SOLVE_SCHEMA,
        "tool": {"name": "dxfcheck", "version": __version__},
        "drawing": d.path,
        "config": d.config_path,
        "sidecar": d.sidecar_path,
        "units": {"name": d.units, "mm_per_unit": d.mm_per_unit, "source": d.units_source},
        "layers": layers_json(d),
        "tolerance_mm": mech.tolerance_mm,
        "family": mech.family,
        "mechanism": {
            "drum": None
            if mech.drum is None
            else {"x_mm": mech.drum.center[0], "y_mm": mech.drum.center[1], "radius_mm": mech.drum.radius_mm},
            "parts": [{"name": p.name, "pins": list(p.pins)} for p in mech.parts],
            "pins": [
                {
                    "name": p.name,
                    "x_mm": p.center[0],
                    "y_mm": p.center[1],
                    "diameter_mm": p.diameter_mm,
                    "pivot": p.grounded,
                    "parts": list(p.bodies),
                }
                for p in mech.pins
            ],
            "shoes": [
                {
                    "name": s.name,
                    "part": s.part,
                    "mounting": str(s.mounting),
                    "pin": s.pin,
                    "internal": s.internal,
                    "start_deg": s.arc.start_deg,
                    "end_deg": s.arc.end_deg,
                    "contact_angle_deg": s.contact_angle_deg,
                }
                for s in mech.shoes
            ],
            "loads": [
                {
                    "name": ld.name,
                    "part": ld.part,
                    "x_mm": ld.point[0],
                    "y_mm": ld.point[1],
                    "direction": list(ld.direction),
                    "force_N": ld.magnitude_N,
                    "text": ld.text,
                }
                for ld in mech.loads
            ],
        },
        "cases": [case_to_dict(c) for c in sol.cases],
        "findings": [f.as_dict() for f in sol.findings],
        "caution": CAUTION,
    }


def write_json(doc: dict[str, Any], out: IO[str] | None = None) -> None:
    """Write one JSON document followed by a newline."""
    out = out or sys.stdout
    json.dump(doc, out, indent=2, allow_nan=False, default=str)
    out.write("\n")


def _severity_style(sev: Severity) -> str:
    return {"error": "bold red", "warning": "yellow", "info": "cyan"}[str(sev)]


def print_findings(console: Any, findings: tuple[Finding, ...] | list[Finding]) -> None:
    """The findings table (words carry the meaning; colour only helps)."""
    from rich.markup import escape
    from rich.table import Table

    if not findings:
        console.print("Findings: none")
        return
    t = Table(title="Findings", title_justify="left", show_lines=False)
    for col in ("code", "severity", "message", "where"):
        t.add_column(col)
    for f in findings:
        t.add_row(f.code.id, f"[{_severity_style(f.severity)}]{f.severity}[/]", escape(f.message), escape(f.where()))
    console.print(t)


def print_solution(sol: Solution, out: IO[str] | None = None, *, notes: tuple[str, ...] = ()) -> None:
    """The terminal report of ``dxfcheck solve``."""
    from rich.table import Table

    console = _console(out)
    mech = sol.mechanism
    d = mech.drawing
    console.print(f"[bold]dxfcheck solve[/]  {_esc(d.path)}")
    console.print(
        f"units: {d.units} (from {d.units_source}); tolerance {mech.tolerance_mm:.3g} mm; "
        f"drum radius {mech.drum.radius_mm:.6g} mm"
        if mech.drum
        else f"units: {d.units}"
    )
    console.print(searched_line(d), markup=False)
    console.print(
        f"inferred: {mech.family}: {len(mech.parts)} parts, {len(mech.pins)} pins "
        f"({sum(p.grounded for p in mech.pins)} pivots), {len(mech.shoes)} shoes, {len(mech.bands)} bands, "
        f"{len(mech.springs)} springs, {len(mech.loads)} loads"
    )
    for s in mech.shoes:
        console.print(
            f"  shoe {_esc(s.name)}: {s.mounting} on {_esc(s.pin or s.part)}, lining {s.contact_angle_deg:.1f}°"
            + (" (internal)" if s.internal else "")
        )
    for n in notes:
        console.print(n)
    for c in sol.cases:
        console.print()
        crit = f"{c.critical_mu:.4g}" if c.critical_mu is not None else "none below 1"
        torque = (
            f"braking torque [bold]{c.torque_Nm:.1f} N·m[/]"
            if c.brakes
            else "[bold red]does not brake[/] (see the errors below)"
        )
        console.print(
            f"[bold]drum {c.direction}[/]  μ = {c.mu:g}   {torque}   self-locking μ: {crit}   residual {c.residual:.1e}"
        )
        if not c.brakes:
            from rich.markup import escape

            console.print(f"  no braking torque is reported for drum {c.direction}: {escape(c.why_not_braking or '')}")
        if c.short_shoe_torque_Nm is not None:
            console.print(
                f"  beside it, short-shoe theory on every shoe: {c.short_shoe_torque_Nm:.1f} N·m "
                "(the torque above uses long-shoe theory where the shoes table says long)"
            )
        ts = Table(
            title=(
                "shoes (N, F: resultants of the normal and friction forces; F lining: friction summed over the "
                "lining, × r = torque; peak p·b: peak pressure × lining width; μ': equivalent μ, a cross-check)"
            ),
            title_justify="left",
        )
        cols = ("shoe", "model", "N N", "F N", "F lining N", "torque N·m", "peak p·b N/mm", "at °", "μ'")
        for col in cols:
            ts.add_column(col, justify="left" if col in ("shoe", "model") else "right")
        for sr in c.shoes:
            ts.add_row(
                sr.name,
                sr.model,
                f"{sr.normal_N:.1f}",
                f"{sr.friction_resultant_N:.1f}",
                f"{sr.friction_lining_N:.1f}",
                f"{sr.torque_Nm:.2f}",
                f"{sr.peak_line_load_N_per_mm:.2f}",
                f"{sr.peak_at_deg:.1f}",
                f"{sr.mu_equivalent:.4f}",
            )
        if c.shoes:
            console.print(ts)
        if c.effort_scale is not None:
            efforts = ", ".join(f"{_esc(ld.name)} {ld.force_N:.1f} N" for ld in c.loads)
            springs = ", ".join(f"{_esc(s.name)} {s.force_N:.1f} N {s.state}" for s in c.springs)
            console.print(
                f"effort for {c.torque_Nm:.1f} N·m: {', '.join(x for x in (efforts, springs) if x)} "
                f"(the drawing's efforts × {c.effort_scale:.6g})"
            )
        if c.bands:
            tb = Table(title="bands (T1/T2 = e^(μθ))", title_justify="left")
            for col in ("band", "kind", "wrap °", "tight N", "slack N", "torque N·m", "peak p·b N/mm"):
                tb.add_column(col, justify="left" if col in ("band", "kind") else "right")
            for b in c.bands:
                tb.add_row(
                    _esc(b.name),
                    b.kind,
                    f"{b.wrap_deg:.1f}",
                    f"{b.tight_N:.1f} ({_esc(b.tight_pin)})",
                    f"{b.slack_N:.1f} ({_esc(b.slack_pin)})",
                    f"{b.torque_Nm:.2f}",
                    f"{b.peak_line_load_N_per_mm:.2f}",
                )
            console.print(tb)
        if c.springs and c.effort_scale is None:
            console.print("springs: " + ", ".join(f"{_esc(s.name)} {s.force_N:.1f} N {s.state}" for s in c.springs))
        tp = Table(title="pins (force on the first part listed)", title_justify="left")
        for col in ("pin", "x mm", "y mm", "Fx N", "Fy N", "|F| N", "joins"):
            tp.add_column(col, justify="left" if col in ("pin", "joins") else "right")
        for p in c.pins:
            tp.add_row(
                _esc(p.name) + (" (pivot)" if p.grounded else ""),
                f"{p.x_mm:.1f}",
                f"{p.y_mm:.1f}",
                f"{p.fx_N:.1f}",
                f"{p.fy_N:.1f}",
                f"{p.max_force_N:.1f}",
                _esc(", ".join(p.parts)),
            )
        console.print(tp)
        if c.members:
            tm = Table(title="two-force members", title_justify="left")
            for col in ("member", "between", "axial N", "state"):
                tm.add_column(col, justify="right" if col == "axial N" else "left")
            for m in c.members:
                tm.add_row(_esc(m.name), _esc(" - ".join(m.ends)), f"{abs(m.axial_N):.1f}", m.state)
            console.print(tm)
    console.print()
    print_findings(console, sol.findings)
    console.print()
    console.print(CAUTION)


def error_document(exc: DxfcheckError, schema: str, drawing: str | None, *, internal: bool = False) -> dict[str, Any]:
    """The JSON document of a refusal (exit 2) or an internal error (exit
    3): the command's schema, the drawing, ``"error"`` and every finding, so
    that ``--json`` always prints one document."""

    return {
        "schema": schema,
        "tool": {"name": "dxfcheck", "version": __version__},
        "drawing": exc.path or drawing,
        "error": {"kind": "internal" if internal else "unusable", "message": exc.message},
        "findings": [f.as_dict() for f in exc.findings],
        "caution": CAUTION,
    }


def print_error(exc: DxfcheckError, err: IO[str] | None = None) -> None:
    """One line per problem on stderr, each naming file, entity, layer and
    place."""
    err = err or sys.stderr
    path = one_line(exc.path or "")  # drawing texts and names: control characters shown as escapes
    prefix = f"dxfcheck: {path}: " if path else "dxfcheck: "
    err.write(f"{prefix}error: {one_line(exc.message)}\n")
    for f in exc.findings:
        err.write(f"{prefix}{one_line(f.line())}\n")


def _theory_lines(j: Judgement) -> list[str]:
    """Which shoe theory the gate used, and the short-shoe torque beside a
    long-shoe one (at ``mu_min``, where the torque rule is judged)."""
    low = j.solutions[j.mu_min]
    if not low.cases or not low.cases[0].shoes:
        return []
    opts = low.options
    models = ", ".join(f"{s.name} {s.model}" for s in low.cases[0].shoes)
    how = f"{opts.model}" + (f", long above {opts.long_threshold_deg:g}°" if str(opts.model) == "auto" else "")
    out = [f"shoe theory ({how}): {models}; the rules use it"]
    short = [c for c in low.cases if c.short_shoe_torque_Nm is not None]
    if short:
        beside = ", ".join(f"{c.direction} {c.short_shoe_torque_Nm:.1f} N·m (chosen {c.torque_Nm:.1f})" for c in short)
        out.append(f"short-shoe theory at μ = {j.mu_min:g} would give: {beside}")
    return out


#: Versioned name of the ``check --json`` document.
CHECK_SCHEMA = "dxfcheck.check/2"


def _num(x: float | None) -> float | None:
    if x is None or x != x:
        return None
    if x in (float("inf"), float("-inf")):
        return None
    return x


def rule_to_dict(r: RuleResult) -> dict[str, Any]:
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
    doc["spec"] = [
        {
            "key": v.key,
            "value": list(v.value) if isinstance(v.value, tuple) else v.value,
            "unit": v.unit,
            "text": v.text,
            "source": v.source,
        }
        for v in j.spec.all_values()
    ]
    doc["caution"] = CAUTION
    return doc


def _fmt(x: float | None, unit: str = "") -> str:
    if x is None:
        return "-"
    if x == float("inf"):
        return "∞"
    return f"{x:.4g}" + (f" {unit}" if unit else "")


def print_judgement(j: Judgement, out: IO[str] | None = None, *, strict: bool = False) -> None:
    """The terminal report of ``dxfcheck check``: verdict line, rules,
    findings, spec sources, caution."""
    from rich.table import Table

    console = _console(out)
    counts = j.counts()
    verdict = j.verdict
    if strict and verdict is Verdict.WARN:
        verdict = Verdict.FAIL
    style = {"pass": "bold green", "warn": "bold yellow", "fail": "bold red"}[str(verdict)]
    console.print(
        f"[{style}]{str(verdict).upper()}[/]  {_esc(j.mechanism.drawing.path)}: "
        f"{counts['pass']} passed, {counts['fail']} failed, {counts['warn']} warnings, {counts['skip']} skipped"
        + (" (strict: warnings fail)" if strict else "")
    )
    console.print(f"μ = {j.mu:g} (range {j.mu_min:g} to {j.mu_max:g})")
    console.print(searched_line(j.mechanism.drawing), markup=False)
    for line in _theory_lines(j):
        console.print(line, markup=False)
    t = Table(title="rules", title_justify="left")
    for col in ("verdict", "rule", "value", "limit", "margin", "note"):
        t.add_column(col, justify="right" if col in ("value", "limit", "margin") else "left")
    for r in j.rules:
        vs = {"pass": "green", "warn": "yellow", "fail": "red", "skip": "dim"}[str(r.verdict)]
        t.add_row(
            f"[{vs}]{r.verdict}[/]",
            _esc(r.title),
            _fmt(r.value, r.unit),
            _fmt(r.limit, r.unit),
            _fmt(r.margin),
            _esc(r.message or str(r.inputs.get("case", ""))),
        )
    console.print(t)
    print_findings(console, j.nominal.findings)
    ts = Table(title="spec values and where they came from", title_justify="left")
    for col in ("key", "value", "source"):
        ts.add_column(col)
    for v in j.spec.all_values():
        ts.add_row(_esc(v.key), _esc(v.text), _esc(v.source))
    console.print(ts)
    console.print()
    console.print(CAUTION)


def junit_xml(j: Judgement, *, strict: bool = False) -> str:
    """JUnit XML with one test case per rule (fail -> failure, skip ->
    skipped; warnings are failures under ``strict``)."""
    import xml.etree.ElementTree as ET
    from pathlib import Path

    name = Path(j.mechanism.drawing.path).name
    failing = {Verdict.FAIL, Verdict.WARN} if strict else {Verdict.FAIL}
    suites = ET.Element("testsuites", name="dxfcheck check")
    suite = ET.SubElement(
        suites,
        "testsuite",
        name=f"dxfcheck check {name}",
        tests=str(len(j.rules)),
        failures=str(sum(r.verdict in failing for r in j.rules)),
        skipped=str(sum(r.verdict is Verdict.SKIP for r in j.rules)),
        errors="0",
    )
    for r in j.rules:
        case = ET.SubElement(suite, "testcase", classname=f"dxfcheck.{name}", name=f"{r.rule}: {r.title}")
        text = (
            f"value {_fmt(r.value, r.unit)}, limit {_fmt(r.limit, r.unit)}, margin {_fmt(r.margin)}; "
            f"{r.message} [{r.source}]"
        )
        if r.verdict in failing:
            ET.SubElement(case, "failure", message=f"{r.verdict}: {r.title}").text = text
        elif r.verdict is Verdict.SKIP:
            ET.SubElement(case, "skipped", message=r.message)
        else:
            ET.SubElement(case, "system-out").text = f"{r.verdict}: {text}"
    ET.SubElement(suite, "system-out").text = CAUTION
    # ElementTree escapes < & and quotes; characters XML 1.0 forbids (from drawing texts) become visible escapes
    return '<?xml version="1.0" encoding="UTF-8"?>\n' + xml_text(ET.tostring(suites, encoding="unicode")) + "\n"


#: Versioned name of the ``compare --json`` document.
COMPARE_SCHEMA = "dxfcheck.revision.compare/2"


def comparisons_to_dict(comps: list[Any], names: list[str]) -> dict[str, Any]:
    """The ``dxfcheck.revision.compare/2`` JSON document."""

    th = comps[0].thresholds if comps else Thresholds()
    return {
        "schema": COMPARE_SCHEMA,
        "drawings": names,
        "failed": any(c.failed for c in comps),
        "thresholds": {
            "max_torque_drop": th.max_torque_drop,
            "max_torque_drop_source": th.torque_drop_source,
            "max_force_rise": th.max_force_rise,
            "max_force_rise_source": th.force_rise_source,
        },
        "steps": [
            {
                "old": c.old.mechanism.drawing.path,
                "new": c.new.mechanism.drawing.path,
                "rigid_motion": {
                    "a": c.motion.a,
                    "b": c.motion.b,
                    "c": c.motion.c,
                    "d": c.motion.d,
                    "e": c.motion.e,
                    "f": c.motion.f,
                    "found_from": c.motion_source,
                },
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
            for c in comps
        ],
        "trend": _trend(comps),
        "caution": CAUTION,
    }


def _trend(comps: list[Any]) -> list[dict[str, Any]]:

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


def _cell(v: object) -> str:
    if isinstance(v, float):
        return f"{v:.5g}"
    return "-" if v is None else str(v)


def print_comparisons(comps: list[Any], out: IO[str] | None = None) -> None:
    """The terminal report of ``dxfcheck compare``."""
    from rich.table import Table

    console = _console(out)
    failed = any(c.failed for c in comps)
    console.print(
        f"[{'bold red' if failed else 'bold green'}]{'FAIL' if failed else 'OK'}[/]  "
        f"{len(comps)} revision step{'s' if len(comps) != 1 else ''}"
        + (": a threshold is crossed or a verdict went from pass to fail" if failed else "")
    )
    if comps:
        console.print(comps[0].thresholds.describe())
    for c in comps:
        console.print()
        console.print(f"[bold]{_esc(c.old.mechanism.drawing.path)}[/] -> [bold]{_esc(c.new.mechanism.drawing.path)}[/]")
        mo, mn = c.old.mechanism, c.new.mechanism
        console.print(
            f"rigid motion found from {c.motion_source}; {len(c.pin_map)} of {len(mo.pins)} pins "
            f"({len(mn.pins)} in the newer) and {len(c.part_map)} of {len(mo.parts)} parts matched"
        )
        t = Table(title="changes (threshold crossings and verdict changes first)", title_justify="left")
        for col in ("flag", "what", "name", "dir", "old", "new", "change", "rel"):
            t.add_column(col, justify="right" if col in ("old", "new", "change", "rel") else "left")
        for x in c.changes:
            rel = (
                "-"
                if x.rel_change is None
                else ("∞" if not math.isfinite(x.rel_change) else f"{100 * x.rel_change:+.2f}%")
            )
            t.add_row(
                "CROSSED" if x.crossed else "",
                x.kind,
                _esc(x.name),
                x.direction,
                _esc(_cell(x.old)),
                _esc(_cell(x.new)),
                "-" if x.abs_change is None else f"{x.abs_change:+.5g} {x.unit}",
                rel,
            )
        console.print(t)
    trend = _trend(comps)
    if len(trend) > 2:
        tt = Table(title="trend", title_justify="left")
        cols = list(trend[0])
        for col in cols:
            tt.add_column(col)
        for row in trend:
            tt.add_row(*[f"{row[k]:.5g}" if isinstance(row[k], float) else _esc(str(row[k])) for k in cols])
        console.print(tt)
    console.print()
    console.print(CAUTION)


@contextlib.contextmanager
def batch_progress(total: int, *, enabled: bool = True) -> Iterator[Callable[[Any], None]]:
    """A rich progress bar on stderr for a batch: drawings done, failures so
    far, rate and time left.  Yields the per-result callback."""
    if not enabled:
        yield lambda _r: None
        return
    from rich.console import Console
    from rich.progress import BarColumn, MofNCompleteColumn, Progress, TextColumn, TimeRemainingColumn

    failures = {"n": 0}
    started = time.perf_counter()
    with Progress(
        TextColumn("checking"),
        BarColumn(),
        MofNCompleteColumn(),
        TextColumn("{task.fields[failures]} failed"),
        TextColumn("{task.fields[rate]}"),
        TimeRemainingColumn(),
        console=Console(file=sys.stderr),
        transient=False,
    ) as progress:
        task = progress.add_task("batch", total=total, failures=0, rate="")

        def on_result(r: Any) -> None:
            if r.status in ("fail", "error", "timeout"):
                failures["n"] += 1
            done = progress.tasks[0].completed + 1
            rate = done / max(time.perf_counter() - started, 1e-9)
            progress.update(task, advance=1, failures=failures["n"], rate=f"{rate:.1f}/s")

        yield on_result


def print_batch(batch: Any, out: IO[str] | None = None) -> None:
    """The summary table of ``dxfcheck batch``."""
    from rich.table import Table

    console = _console(out)
    console.print(f"{batch.worst().upper()}  {batch.summary()}")
    t = Table(title="drawings", title_justify="left")
    for col in ("status", "drawing", "torque cw N·m", "torque ccw N·m", "failed rules / error", "s"):
        t.add_column(col, justify="right" if col in ("torque cw N·m", "torque ccw N·m", "s") else "left")
    for r in batch.results:
        t.add_row(
            r.status,
            _esc(r.drawing),
            "-" if r.torque_cw_Nm is None else f"{r.torque_cw_Nm:.1f}",
            "-" if r.torque_ccw_Nm is None else f"{r.torque_ccw_Nm:.1f}",
            _esc(r.message if r.status in ("error", "timeout") else ", ".join(r.failed_rules)),
            "cached" if r.cached else f"{r.seconds:.2f}",
        )
    console.print(t)
    console.print(CAUTION)


#: Versioned name of the ``solve --samples --json`` document.
SENSITIVITY_SCHEMA = "dxfcheck.statics.sampling/1"


def sensitivity_to_dict(res: Any, drawing: str) -> dict[str, Any]:
    return {
        "schema": SENSITIVITY_SCHEMA,
        "drawing": drawing,
        "samples": res.samples,
        "seed": res.seed,
        "mu_range": list(res.mu_range),
        "pin_tolerance_mm": res.pin_tolerance_mm,
        "required_torque_Nm": res.required_torque_Nm,
        "seconds": res.seconds,
        "directions": [
            {
                "direction": d.direction,
                "torque_Nm": d.torque_Nm,
                "max_pin_force_N": d.max_pin_force_N,
                "governing_pin": d.governing_pin,
                "p_below_required": d.p_below_required,
            }
            for d in res.directions
        ],
        "torque_vs_mu": {d: [[m, t] for m, t in c] for d, c in res.curve.items()},
        "caution": CAUTION,
    }


def print_sensitivity(res: Any, drawing: str, out: IO[str] | None = None) -> None:
    from rich.table import Table

    console = _console(out)
    console.print(
        f"[bold]dxfcheck sensitivity[/]  {_esc(drawing)}: {res.samples} samples, μ {res.mu_range[0]:g} to "
        f"{res.mu_range[1]:g}, pins ± {res.pin_tolerance_mm:g} mm, seed {res.seed} ({res.seconds:.2f} s)"
    )
    keys = ["min", "p1", "p5", "p50", "mean", "p95", "p99", "max"]
    t = Table(title="distributions", title_justify="left")
    t.add_column("quantity")
    for k in keys:
        t.add_column(k, justify="right")
    for d in res.directions:
        t.add_row(f"torque {d.direction} N·m", *[f"{d.torque_Nm[k]:.1f}" for k in keys])
        t.add_row(f"pin {_esc(d.governing_pin)} {d.direction} N", *[f"{d.max_pin_force_N[k]:.1f}" for k in keys])
    console.print(t)
    for d in res.directions:
        if d.p_below_required is not None:
            console.print(f"{d.direction}: P(torque < {res.required_torque_Nm:.1f} N·m) = {d.p_below_required:.4f}")
    console.print(CAUTION)
