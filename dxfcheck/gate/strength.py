"""The strength rules of the parts and the drum shaft, from the internal
forces the solver reports (:mod:`dxfcheck.statics.strength`).

``part.bending.PART``
    the largest normal stress along the part's centreline, σ = |N|/A + |M|/Z
    (axial plus bending at the outer fibre; Beer & Johnston, *Mechanics of
    Materials*, 7th ed., ch. 4 (pure bending, σ = M/S) and §4.12
    (eccentric axial loading: the two added); section numbers from memory),
    over the cases of every friction value and drum direction in which the
    brake holds, against ``part_stress_allow``;
``part.hole.PART``
    the same on the net section at each pin hole of a rectangular part:
    A = w(h − d), Z = w(h³ − d³)/(6h) for a hole of the pin's diameter d on
    the centreline.  The stress is the nominal one: no stress-concentration
    factor is applied, so the allowed stress must cover it;
``shaft.load``
    the largest resultant of the shoes' and bands' forces on the drum against
    ``shaft_load_max``.

A part's section is a rectangle (``part_width`` across the drawing, the
plate's thickness, and ``part_height`` in its plane), a round
(``part_diameter``) or a ``part_section_modulus`` (bending only), set for
every part or per part in ``[spec.parts."NAME"]``.  The rules appear only
when the spec gives one of these keys.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import replace
from typing import Any

from dxfcheck.core.errors import ConfigError
from dxfcheck.core.findings import Code
from dxfcheck.core.geometry import dist
from dxfcheck.core.records import record
from dxfcheck.gate.rules import Judgement
from dxfcheck.gate.spec import Spec
from dxfcheck.gate.verdicts import RuleResult
from dxfcheck.gate.verdicts import ratio_rule as _ratio_rule
from dxfcheck.gate.verdicts import skip as _skip
from dxfcheck.mechanism import Mechanism, Part
from dxfcheck.statics import CaseSolution, Station

__all__ = ["PART_KEYS", "Section", "section_of", "strength_rules", "with_strength"]

#: The spec keys of a part's section and its allowed stress.
PART_KEYS = ("part_width", "part_height", "part_diameter", "part_section_modulus", "part_stress_allow")

SRC_BENDING = (
    "σ = |N|/A + |M|/Z at the outer fibre, N and M from the method of sections on the solved forces "
    "(Beer & Johnston, Mechanics of Materials, 7th ed., ch. 4; from memory)"
)
SRC_HOLE = (
    "net section at a pin hole on the centreline: A = w(h − d), Z = w(h³ − d³)/(6h); nominal stress, "
    "no stress-concentration factor (the allowed stress must cover it)"
)
SRC_SHAFT = "resultant of every force the shoes and bands put on the drum (its shaft's load)"


@record(frozen=True)
class Section:
    """A part's cross-section: area ``area_mm2`` [mm²] (None: unknown, the
    axial stress is left out), section modulus ``modulus_mm3`` [mm³], and
    for a rectangle its ``width_mm`` and ``height_mm`` [mm]."""

    area_mm2: float | None
    modulus_mm3: float
    width_mm: float | None = None
    height_mm: float | None = None

    def stress_MPa(self, st: Station) -> float:
        """|N|/A + |M|/Z [MPa] at station ``st``."""
        axial = abs(st.axial_N) / self.area_mm2 if self.area_mm2 else 0.0
        return axial + abs(st.moment_Nmm) / self.modulus_mm3

    def net(self, hole_mm: float) -> Section | None:
        """The net section at a hole of ``hole_mm`` [mm] on the centreline
        (rectangles only; None when nothing is left or the section is not a
        rectangle)."""
        w, h = self.width_mm, self.height_mm
        if w is None or h is None or hole_mm >= h:
            return None
        return Section(w * (h - hole_mm), w * (h**3 - hole_mm**3) / (6 * h), w, h)


def section_of(spec: Spec, part: str) -> tuple[Section | None, str]:
    """The section the spec gives part ``part``, or None and what is missing."""
    w, h = spec.num("part_width", part), spec.num("part_height", part)
    d, z = spec.num("part_diameter", part), spec.num("part_section_modulus", part)
    if w is not None and h is not None:
        return Section(w * h, w * h * h / 6, w, h), ""
    if d is not None:
        return Section(math.pi * d * d / 4, math.pi * d**3 / 32), ""
    if z is not None:
        return Section(None, z), ""
    return None, "needs part_width and part_height, part_diameter, or part_section_modulus"


def with_strength(j: Judgement) -> Judgement:
    """``j`` with the strength rules after its own (unchanged when the spec
    asks for none)."""
    extra = strength_rules(j)
    return replace(j, rules=(*j.rules, *extra)) if extra else j


def _cases(j: Judgement) -> list[CaseSolution]:
    """The cases whose forces mean something: no self-locking, no lift-off."""
    bad = (Code.SELF_LOCKING, Code.SHOE_LIFTS)
    return [c for sol in j.solutions.values() for c in sol.cases if not any(f.code in bad for f in c.findings)]


def _check_parts(spec: Spec, mech: Mechanism) -> None:
    names = [p.name for p in mech.parts]
    for name, values in spec.parts.items():
        if name not in names:
            close = difflib.get_close_matches(name, names, n=1)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            keys = ", ".join(f"parts.{name}.{v.key} from {v.source}" for v in values.values())
            raise ConfigError(
                f"the spec names part {name!r}, which the drawing does not have: {keys}; "
                f"the drawing's parts are {', '.join(repr(n) for n in names)}{hint}",
                path=mech.drawing.path,
            )


def strength_rules(j: Judgement) -> list[RuleResult]:
    """The part and shaft rules of ``j`` (none when the spec gives none of
    their keys)."""
    spec, mech = j.spec, j.mechanism
    _check_parts(spec, mech)
    cases = _cases(j)
    out: list[RuleResult] = []
    if spec.parts or any(spec.get(k) is not None for k in PART_KEYS):
        for part in mech.parts:
            out += _part_rules(spec, mech, part, cases)
    out += _shaft(spec, cases)
    return out


def _where(c: CaseSolution) -> str:
    return f"{c.direction} at μ = {c.mu:g}"


def _part_rules(spec: Spec, mech: Mechanism, part: Part, cases: list[CaseSolution]) -> list[RuleResult]:
    rule, title = f"part.bending.{part.name}", f"bending stress, {part.name}"
    sec, why = section_of(spec, part.name)
    allow = spec.num("part_stress_allow", part.name)
    if sec is None or allow is None:
        return [_skip(rule, title, why or "needs part_stress_allow", SRC_BENDING)]
    stations = [(c, st) for c in cases if c.parts for st in c.part(part.name).stations]
    if not stations:
        return [_skip(rule, title, "no case in which the brake holds, or the part closes a loop", SRC_BENDING)]
    case, worst = max(stations, key=lambda cs: sec.stress_MPa(cs[1]))
    inputs = _inputs(sec, worst, case)
    out = [_ratio_rule(rule, title, sec.stress_MPa(worst), allow, "MPa", SRC_BENDING, inputs, at_most=True)]
    out += _holes(mech, part, sec, allow, stations)
    return out


def _inputs(sec: Section, st: Station, c: CaseSolution) -> dict[str, Any]:
    return {
        "at_mm": list(st.at_mm),
        "axial_N": st.axial_N,
        "shear_N": st.shear_N,
        "moment_Nmm": st.moment_Nmm,
        "area_mm2": sec.area_mm2,
        "section_modulus_mm3": sec.modulus_mm3,
        "case": _where(c),
    }


def _holes(
    mech: Mechanism, part: Part, sec: Section, allow: float, stations: list[tuple[CaseSolution, Station]]
) -> list[RuleResult]:
    """The net section at the part's pin holes (rectangles only)."""
    if sec.width_mm is None:
        return []
    rule, title = f"part.hole.{part.name}", f"net section at the pin holes, {part.name}"
    worst: tuple[float, str, Section, CaseSolution, Station] | None = None
    for name in part.pins:
        pin = mech.pin(name)
        net = sec.net(pin.diameter_mm)
        for c, st in stations:
            if dist(st.at_mm, pin.center) > mech.tolerance_mm:
                continue
            stress = math.inf if net is None else net.stress_MPa(st)
            if worst is None or stress > worst[0]:
                worst = (stress, name, net or sec, c, st)
    if worst is None:
        return []
    stress, name, net, c, st = worst
    inputs = dict(_inputs(net, st, c), pin=name, hole_mm=mech.pin(name).diameter_mm)
    return [_ratio_rule(rule, title, stress, allow, "MPa", SRC_HOLE, inputs, at_most=True)]


def _shaft(spec: Spec, cases: list[CaseSolution]) -> list[RuleResult]:
    limit = spec.num("shaft_load_max")
    if limit is None:
        return []
    loaded = [c for c in cases if c.drum_load_N is not None]
    if not loaded:
        return [_skip("shaft.load", "drum shaft load", "no case in which the brake holds", SRC_SHAFT)]
    worst = max(loaded, key=lambda c: math.hypot(*(c.drum_load_N or (0.0, 0.0))))
    fx, fy = worst.drum_load_N or (0.0, 0.0)
    inputs = {"fx_N": fx, "fy_N": fy, "angle_deg": math.degrees(math.atan2(fy, fx)), "case": _where(worst)}
    return [
        _ratio_rule("shaft.load", "drum shaft load", math.hypot(fx, fy), limit, "N", SRC_SHAFT, inputs, at_most=True)
    ]
