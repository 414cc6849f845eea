"""Output: the ``solve --json`` document (and the skeleton and error
documents), with the helpers every JSON document shares.

This module imports only what the solve document holds (the mechanism, the
solution, the layer report), so that ``dxfcheck solve --json`` loads neither
the release gate nor the revision comparison; the other documents
(:mod:`dxfcheck.output.json`) build on it.  One function per result kind,
so that each JSON object's keys stand in one place; the keys are the
published schemas' (README).  It only copies the results' fields, it never
computes physics.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import json
import os
import stat
import sys
from typing import IO, Any

from dxfcheck.core.errors import DxfcheckError
from dxfcheck.core.version import __version__
from dxfcheck.mechanism.layers import inference_json, layers_json
from dxfcheck.mechanism.model import Drum, Load, Mechanism, Pin, Shoe
from dxfcheck.output.text import CAUTION
from dxfcheck.statics import (
    BandEnd,
    BandResult,
    CaseSolution,
    LoadResult,
    MemberResult,
    PartDiagram,
    PinResult,
    ShoeResult,
    Solution,
    SpringResult,
)

__all__ = [
    "CHECK_SCHEMA",
    "COMPARE_SCHEMA",
    "LININGS_SCHEMA",
    "SENSITIVITY_SCHEMA",
    "SKELETON_SCHEMA",
    "SOLVE_SCHEMA",
    "case_to_dict",
    "error_document",
    "file_sha256",
    "provenance",
    "skeleton_to_dict",
    "solution_to_dict",
    "tool_dict",
    "write_json",
]

#: Versioned name of the ``solve --json`` document.
SOLVE_SCHEMA = "dxfcheck.solve/2"
#: Schema of ``dxfcheck skeleton --json``.
SKELETON_SCHEMA = "dxfcheck.skeleton/1"
#: Versioned name of the ``check --json`` document.
CHECK_SCHEMA = "dxfcheck.check/2"
#: Versioned name of the ``compare --json`` document.
COMPARE_SCHEMA = "dxfcheck.revision.compare/2"
#: Versioned name of the ``linings --json`` document.
LININGS_SCHEMA = "dxfcheck.linings/1"
#: Versioned name of the ``solve --samples --json`` document.
SENSITIVITY_SCHEMA = "dxfcheck.statics.sampling/1"


def tool_dict() -> dict[str, str]:
    """The ``tool`` object of every document: name and version."""
    return {"name": "dxfcheck", "version": __version__}


#: Bytes read at a time while hashing a drawing.
_HASH_CHUNK = 1 << 20
#: Largest file hashed [bytes] (ten times the default size limit of a drawing).
HASH_MAX_BYTES = 2_000_000_000


def file_sha256(path: str | os.PathLike[str]) -> str | None:
    """SHA-256 of the file's bytes (hex), or None when it is no regular file
    (a FIFO or a device is never opened), is larger than
    :data:`HASH_MAX_BYTES` or cannot be read."""
    h = hashlib.sha256()
    try:
        st = os.stat(path)
        if not stat.S_ISREG(st.st_mode) or st.st_size > HASH_MAX_BYTES:
            return None
        with open(path, "rb") as f:
            for chunk in iter(lambda: f.read(_HASH_CHUNK), b""):
                h.update(chunk)
    except OSError:
        return None
    return h.hexdigest()


def provenance(path: str | os.PathLike[str] | None) -> dict[str, Any]:
    """What ties a stored document to its input: the drawing's SHA-256
    (None when there is no readable file) and the time of the run (UTC,
    ISO 8601)."""
    return {
        "drawing_sha256": None if path is None else file_sha256(path),
        "run_at": dt.datetime.now(dt.UTC).isoformat(timespec="seconds"),
    }


def write_json(doc: dict[str, Any], out: IO[str] | None = None) -> None:
    """Write one JSON document followed by a newline, in one write (not one
    per token, as :func:`json.dump` writes)."""
    out = out or sys.stdout
    out.write(json.dumps(doc, indent=2, allow_nan=False, default=str) + "\n")


# --- one solved direction: one function per result kind --------------------


def _shoe_result(s: ShoeResult) -> dict[str, Any]:
    """A shoe's resultants and their lines of action ([N], [mm], [deg])."""
    return {
        "name": s.name,
        "part": s.part,
        "model": s.model,
        "mounting": s.mounting,
        "contact_angle_deg": s.contact_angle_deg,
        "normal_N": s.normal_N,
        "friction_resultant_N": s.friction_resultant_N,
        "friction_lining_N": s.friction_lining_N,
        "torque_Nm": s.torque_Nm,
        "contact_mm": list(s.contact_mm),
        "force_N": list(s.force_N),
        "normal_force_N": list(s.normal_force_N),
        "normal_at_mm": list(s.normal_at_mm),
        "friction_force_N": list(s.friction_force_N),
        "friction_at_mm": list(s.friction_at_mm),
        "peak_line_load_N_per_mm": s.peak_line_load_N_per_mm,
        "peak_at_deg": s.peak_at_deg,
        "mu_equivalent": s.mu_equivalent,
        "pressure_offset_deg": s.pressure_offset_deg,
        "contact_from_deg": s.contact_from_deg,
        "contact_to_deg": s.contact_to_deg,
    }


def _pin_result(p: PinResult) -> dict[str, Any]:
    """A pin's force (on the first part listed) and its share on each part [N]."""
    return {
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


def _member_result(m: MemberResult) -> dict[str, Any]:
    """A two-force member's axial force [N] (sign as solved) and state."""
    return {"name": m.name, "ends": list(m.ends), "axial_N": m.axial_N, "state": m.state, "length_mm": m.length_mm}


def _band_end(e: BandEnd) -> dict[str, Any]:
    """One band end: its tension [N] and pull on the pin [N] along the tangent."""
    return {
        "pin": e.pin,
        "tight": e.tight,
        "tension_N": e.tension_N,
        "tangent_mm": list(e.tangent_mm),
        "pull_N": list(e.pull_N),
    }


def _band_result(b: BandResult) -> dict[str, Any]:
    """A band's tight and slack tensions [N], wrap [deg] and torque [N·m]."""
    return {
        "name": b.name,
        "kind": b.kind,
        "tight_N": b.tight_N,
        "slack_N": b.slack_N,
        "tight_pin": b.tight_pin,
        "slack_pin": b.slack_pin,
        "wrap_deg": b.wrap_deg,
        "torque_Nm": b.torque_Nm,
        "peak_line_load_N_per_mm": b.peak_line_load_N_per_mm,
        "ends": [_band_end(e) for e in b.ends],
    }


def _spring_result(s: SpringResult) -> dict[str, Any]:
    """A spring's force [N], state and the force on each end's part."""
    return {
        "name": s.name,
        "force_N": s.force_N,
        "state": s.state,
        "ends": [{"part": e.part, "at_mm": list(e.at_mm), "force_N": list(e.force_N)} for e in s.ends],
    }


def _load_result(ld: LoadResult) -> dict[str, Any]:
    """An applied load as solved (scaled when an effort was asked for) [N]."""
    return {
        "name": ld.name,
        "part": ld.part,
        "x_mm": ld.x_mm,
        "y_mm": ld.y_mm,
        "fx_N": ld.fx_N,
        "fy_N": ld.fy_N,
        "force_N": ld.force_N,
    }


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
        "shoes": [_shoe_result(s) for s in c.shoes],
        "pins": [_pin_result(p) for p in c.pins],
        "members": [_member_result(m) for m in c.members],
        "bands": [_band_result(b) for b in c.bands],
        "springs": [_spring_result(s) for s in c.springs],
        "guides": [
            {"name": g.name, "rod": g.rod, "part": g.part, "at_mm": _point(g.at_mm), "force_N": _point(g.force_N)}
            for g in c.guides
        ],
        "effort_scale": c.effort_scale,
        "loads": [_load_result(ld) for ld in c.loads],
        "drum_load_N": _point(c.drum_load_N),
        "parts": [_part_diagram(d) for d in c.parts],
    }


def _point(p: tuple[float, float] | None) -> list[float] | None:
    return None if p is None else [p[0], p[1]]


def _part_diagram(d: PartDiagram) -> dict[str, Any]:
    """A part's internal forces along its centreline (the solver's stations)."""
    return {
        "part": d.part,
        "tree": d.tree,
        "stations": [
            {
                "segment": st.segment,
                "start_mm": _point(st.start_mm),
                "end_mm": _point(st.end_mm),
                "at_mm": _point(st.at_mm),
                "axial_N": st.axial_N,
                "shear_N": st.shear_N,
                "moment_Nmm": st.moment_Nmm,
            }
            for st in d.stations
        ],
    }


# --- the mechanism as read: one function per element kind ------------------


def _drum(drum: Drum | None) -> dict[str, Any] | None:
    if drum is None:
        return None
    return {"x_mm": drum.center[0], "y_mm": drum.center[1], "radius_mm": drum.radius_mm}


def _pin(p: Pin) -> dict[str, Any]:
    return {
        "name": p.name,
        "x_mm": p.center[0],
        "y_mm": p.center[1],
        "diameter_mm": p.diameter_mm,
        "pivot": p.grounded,
        "parts": list(p.bodies),
    }


def _shoe(s: Shoe) -> dict[str, Any]:
    return {
        "name": s.name,
        "part": s.part,
        "mounting": str(s.mounting),
        "pin": s.pin,
        "internal": s.internal,
        "start_deg": s.arc.start_deg,
        "end_deg": s.arc.end_deg,
        "contact_angle_deg": s.contact_angle_deg,
    }


def _load(ld: Load) -> dict[str, Any]:
    return {
        "name": ld.name,
        "part": ld.part,
        "x_mm": ld.point[0],
        "y_mm": ld.point[1],
        "direction": list(ld.direction),
        "force_N": ld.magnitude_N,
        "text": ld.text,
    }


def _mechanism(mech: Mechanism) -> dict[str, Any]:
    """The mechanism as inferred from the drawing (before any solve)."""
    return {
        "drum": _drum(mech.drum),
        "parts": [{"name": p.name, "pins": list(p.pins)} for p in mech.parts],
        "pins": [_pin(p) for p in mech.pins],
        "shoes": [_shoe(s) for s in mech.shoes],
        "loads": [_load(ld) for ld in mech.loads],
    }


def skeleton_to_dict(mech: Mechanism, written: list[str]) -> dict[str, Any]:
    """The ``dxfcheck.skeleton/1`` JSON document: where the skeleton came
    from, the mechanism read, the files written, the findings."""
    d = mech.drawing
    return {
        "schema": SKELETON_SCHEMA,
        "tool": tool_dict(),
        "drawing": d.path,
        "skeleton": d.skeleton_source,
        "inference": inference_json(d),
        "mechanism": _mechanism(mech),
        "written": written,
        "findings": [f.as_dict() for f in mech.findings],
        "caution": CAUTION,
    }


def solution_to_dict(sol: Solution) -> dict[str, Any]:
    """The ``dxfcheck.solve/2`` JSON document (schema in the README)."""
    mech = sol.mechanism
    d = mech.drawing
    return {
        "schema": SOLVE_SCHEMA,
        "tool": tool_dict(),
        "drawing": d.path,
        **provenance(d.path),
        "config": d.config_path,
        "sidecar": d.sidecar_path,
        "units": {"name": d.units, "mm_per_unit": d.mm_per_unit, "source": d.units_source},
        "layers": layers_json(d),
        "skeleton": d.skeleton_source,
        "inference": inference_json(d),
        "tolerance_mm": mech.tolerance_mm,
        "family": mech.family,
        "mechanism": _mechanism(mech),
        "cases": [case_to_dict(c) for c in sol.cases],
        "findings": [f.as_dict() for f in sol.findings],
        "caution": CAUTION,
    }


def error_document(exc: DxfcheckError, schema: str, drawing: str | None, *, internal: bool = False) -> dict[str, Any]:
    """The JSON document of a refusal (exit 2) or an internal error (exit
    3): the command's schema, the drawing, ``"error"`` and every finding, so
    that ``--json`` always prints one document."""

    return {
        "schema": schema,
        "tool": tool_dict(),
        "drawing": exc.path or drawing,
        **provenance(exc.path or drawing),
        "error": {"kind": "internal" if internal else "unusable", "message": exc.message},
        "findings": [f.as_dict() for f in exc.findings],
        "caution": CAUTION,
    }
