"""Plausibility of what was read: is this the size of a drum brake?

A drawing read in the wrong unit solves as well as a right one: a 315 mm
drum saved with ``$INSUNITS = 6`` becomes a 315 m drum whose torque is a
thousand times too large and whose pins are sheared at a millionth of their
strength.  Every number then passes every rule.  This stage compares what
was read with the sizes real drum brakes have and reports what lies outside,
with the range used, where the range comes from, and which drawing unit
would have made the drawing plausible.

It runs twice:

* after the mechanism is built (:func:`check_mechanism`): the drum's
  diameter (finding ``D110``, the units question), pins and parts against
  the drum (``D111``, proportions, unit-free);
* after the solve (:func:`check_solution`, the loads and springs as used)
  and after the rules (:func:`check_rules`, lining and band pressures and
  the rules' margins), finding ``S312``.

The ranges are deliberately wide: a value inside is not thereby right, but a
value outside is far more often a units slip (a factor of 10, 25.4 or 1000)
than a design.  Each range is a named constant with its source; "common
practice" marks a range for which no single published source exists, "from
memory" a source not re-read.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING, Protocol

from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.units import length_unit_factor

if TYPE_CHECKING:
    from dxfcheck.mechanism.model import Mechanism
    from dxfcheck.read.drawing import Drawing
    from dxfcheck.statics import Solution

__all__ = [
    "CANDIDATE_UNITS",
    "DRUM_DIAMETER_MM",
    "LINING_PRESSURE_MPA",
    "LOAD_N",
    "PART_TO_DRUM_MAX",
    "PIN_TO_DRUM",
    "RULE_MARGIN",
    "STANDARD_DRUM_DIAMETERS_MM",
    "check_mechanism",
    "check_rules",
    "check_solution",
    "drum_diameter",
    "drum_plausible",
    "how_read",
    "insunits_code",
    "link_lengths",
    "loads",
    "long_name",
    "margins",
    "pin_diameters",
    "plausible_units",
    "pressures",
    "unit_hint",
]

#: Plausible drum diameters of industrial drum brakes [mm].  The standard
#: series of DIN 15435 (drum brakes for cranes and conveyors) runs from
#: 160 mm to 710 mm (from memory); the range adds two steps of the R10
#: preferred numbers below (125, 100 mm: small catalogue brakes) and three
#: above (800, 1000, 1250 mm: heavy crane and winch brakes) -- common
#: practice.  Its ends are less than 25.4 apart, so a drawing plausible in
#: millimetres is implausible read in inches, and one plausible in inches is
#: implausible read in millimetres.
DRUM_DIAMETER_MM = (100.0, 1250.0)
SRC_DRUM = (
    "industrial drum brakes, drum Ø 100-1250 mm: the DIN 15435 series 160-710 mm (from memory) "
    "widened by R10 steps, common practice"
)

#: Drum diameters of the DIN 15435 series [mm] (R10 preferred numbers, from
#: memory): a diameter within :data:`STANDARD_MATCH_RTOL` of one is called
#: "a common size".
STANDARD_DRUM_DIAMETERS_MM = (160.0, 200.0, 250.0, 315.0, 400.0, 500.0, 630.0, 710.0)
STANDARD_MATCH_RTOL = 0.01

#: Pin diameter over drum diameter [-].  Catalogue drum brakes have pins of
#: about 0.05-0.1 of the drum's diameter (DIN 15435 sizes, from memory);
#: the range reaches a decade below (a hand brake's small clevis pin) and
#: 2.5 times above (a heavy frame pivot) -- common practice.  A circle far
#: smaller is usually a marker, not the pin's size.
PIN_TO_DRUM = (0.01, 0.25)
SRC_PIN = "pin Ø 0.01-0.25 × drum Ø: catalogue brakes 0.05-0.1 (DIN 15435 sizes, from memory), widened, common practice"

#: Longest span of one part over the drum diameter [-].  Levers of drum
#: brakes span one to five drum diameters (thruster brakes about two to
#: three, hand levers of band brakes up to about five: common practice); a
#: part twenty times the drum is drawn at another scale or is not a part.
PART_TO_DRUM_MAX = 20.0
SRC_PART = "part span ≤ 20 × drum Ø: levers span 1-5 drum diameters, common practice"

#: Plausible magnitude of a load or spring force [N].  Hand efforts are
#: 50-400 N and the set springs and thrusters of heavy crane brakes some
#: tens of kN (common practice); the range reaches a decade beyond each end.
LOAD_N = (5.0, 500_000.0)
SRC_LOAD = "loads and springs 5 N-500 kN: hand efforts 50-400 N to springs of some tens of kN, common practice"

#: Plausible peak lining pressure [MPa].  Published limits of drum-brake
#: linings lie between about 0.35 and 2 MPa (Shigley's MED 10th ed.,
#: Table 16-3, from memory; Neale, *Tribology Handbook*, B8, from memory)
#: and hoist brakes work at 0.1-0.5 MPa (common practice); outside two
#: decades below and a decade above, the pressure is a units slip.
LINING_PRESSURE_MPA = (1.0e-3, 20.0)
SRC_PRESSURE = (
    "lining pressure 0.001-20 MPa: published lining limits 0.35-2 MPa (Shigley's MED 10th ed., Table 16-3; "
    "Tribology Handbook B8; from memory) two decades below, one above"
)

#: Plausible margin (capacity over demand) of a rule [-].  A designed brake
#: sits within a decade or so of its limits (common practice); a margin three
#: decades away is what a factor of 25.4² or 1000 in the lengths gives.
RULE_MARGIN = (1.0e-3, 1.0e3)
SRC_MARGIN = "rule margins 0.001-1000: a design sits within a decade or so of its limits, common practice"

#: Rules whose margin is not a capacity over a demand the drawing's units
#: scale (asymmetry: a ratio of torques; self-locking: bounded by μ < 1;
#: Euler buckling: legitimately huge for a stubby rod; the drum's temperatures:
#: a ratio of temperature rises, huge for a light duty on a heavy drum).
MARGIN_EXEMPT_PREFIXES = ("torque.asymmetry", "self_lock.", "member.buckling.", "heat.")

#: Units tried when saying which one would make a drawing plausible.
CANDIDATE_UNITS = ("mm", "cm", "m", "inch", "ft")

_LONG_NAMES = {
    "mm": "millimetres",
    "cm": "centimetres",
    "dm": "decimetres",
    "m": "metres",
    "inch": "inches",
    "in": "inches",
    "foot": "feet",
    "ft": "feet",
}

#: ``$INSUNITS`` code of each candidate unit (DXF Reference, HEADER).
_INSUNITS_CODE = {"mm": 4, "cm": 5, "m": 6, "inch": 1, "ft": 2}


class _Rated(Protocol):
    """What :func:`margins` and :func:`pressures` read of a rule result."""

    @property
    def rule(self) -> str: ...
    @property
    def value(self) -> float | None: ...
    @property
    def unit(self) -> str: ...
    @property
    def margin(self) -> float | None: ...


def long_name(unit: str) -> str:
    """``"m"`` -> ``"metres"``; other names as they are."""
    return _LONG_NAMES.get(unit, unit)


def insunits_code(unit: str) -> int | None:
    """The ``$INSUNITS`` code that declares ``unit``, if it is a candidate."""
    return _INSUNITS_CODE.get(unit)


def _in(value: float, bounds: tuple[float, float]) -> bool:
    return bounds[0] <= value <= bounds[1]


def _range(bounds: tuple[float, float], unit: str) -> str:
    return f"{bounds[0]:g}-{bounds[1]:g} {unit}".rstrip()


def _size(mm: float) -> str:
    """A length [mm] in words a reader takes in at once (m above 10 m)."""
    return f"{mm / 1000:.4g} m" if mm >= 10_000 else f"{mm:.4g} mm"


def drum_plausible(diameter_mm: float) -> bool:
    """Whether a drum diameter [mm] lies in :data:`DRUM_DIAMETER_MM`."""
    return _in(diameter_mm, DRUM_DIAMETER_MM)


def plausible_units(diameter_in_units: float) -> tuple[tuple[str, float], ...]:
    """The candidate units in which a drum diameter written as
    ``diameter_in_units`` (a number in the drawing's own unit) is plausible,
    each with the diameter it gives [mm]."""
    out = []
    for unit in CANDIDATE_UNITS:
        mm = diameter_in_units * length_unit_factor(unit)
        if drum_plausible(mm):
            out.append((unit, mm))
    return tuple(out)


def _common(mm: float) -> str:
    hit = any(abs(mm - s) <= STANDARD_MATCH_RTOL * s for s in STANDARD_DRUM_DIAMETERS_MM)
    return "a common size" if hit else "a plausible size"


def unit_hint(drawing: Drawing, diameter_mm: float) -> str:
    """Which unit would make a drum of ``diameter_mm`` [mm as read]
    plausible, as a phrase: ``"as millimetres it would be Ø315 mm, a common
    size"`` (empty when no candidate unit other than the one read does)."""
    number = diameter_mm / drawing.mm_per_unit
    alts = [(u, mm) for u, mm in plausible_units(number) if not math.isclose(mm, diameter_mm, rel_tol=1e-9)]
    if not alts:
        return ""
    words = [f"as {long_name(u)} it would be Ø{mm:.4g} mm, {_common(mm)}" for u, mm in alts]
    return "; or ".join(words)


def how_read(drawing: Drawing) -> str:
    """Where the drawing's unit came from, in words."""
    src = drawing.units_source
    if src == "option":
        return "as --units says"
    if src == "spec":
        return "as the spec's units key says"
    if src == "$INSUNITS":
        code = insunits_code(drawing.units)
        return f"from $INSUNITS = {code}" if code is not None else "from $INSUNITS"
    if src == "$MEASUREMENT":
        return "assumed from $MEASUREMENT ($INSUNITS unset)"
    return "assumed ($INSUNITS and $MEASUREMENT unset)"


def drum_diameter(mech: Mechanism) -> list[Finding]:
    """``D110`` when the drum's diameter is outside :data:`DRUM_DIAMETER_MM`,
    naming the units that would make it plausible."""
    drum = mech.drum
    if drum is None:
        return []
    d_mm = 2.0 * drum.radius_mm
    if drum_plausible(d_mm):
        return []
    drawing = mech.drawing
    number = d_mm / drawing.mm_per_unit
    hint = unit_hint(drawing, d_mm)
    shown = _size(d_mm)
    also = "" if shown == f"{number:.4g} {drawing.units}" else f" (= {shown})"
    fix = f"; {hint}" if hint else "; no common drawing unit makes it plausible: check the drawing's scale"
    msg = (
        f"read as {long_name(drawing.units)} ({how_read(drawing)}): drum Ø{number:.4g} {drawing.units}{also}, "
        f"outside the {_range(DRUM_DIAMETER_MM, 'mm')} of industrial drum brakes{fix}. "
        "Set $INSUNITS in the drawing or confirm the unit with --units or the spec key units "
        f"(range: {SRC_DRUM})"
    )
    src = drum.source
    return [Finding(Code.UNITS_IMPLAUSIBLE, msg, (src.ref,), (src.layer,), drum.center)]


def pin_diameters(mech: Mechanism) -> list[Finding]:
    """``D111`` for each pin whose diameter is out of proportion to the
    drum's (:data:`PIN_TO_DRUM`)."""
    drum = mech.drum
    if drum is None:
        return []
    d_drum = 2.0 * drum.radius_mm
    out = []
    for pin in mech.pins:
        ratio = pin.diameter_mm / d_drum
        if _in(ratio, PIN_TO_DRUM):
            continue
        what = "a marker rather than the pin's size?" if ratio < PIN_TO_DRUM[0] else "a boss or a hub, not the pin?"
        msg = (
            f"pin {pin.name} is Ø{pin.diameter_mm:.4g} mm, {ratio:.3g} × the drum's Ø{d_drum:.4g} mm, outside "
            f"{_range(PIN_TO_DRUM, '×')}: is the circle {what} The pin rules use this diameter "
            f"(range: {SRC_PIN})"
        )
        src = pin.source
        out.append(Finding(Code.PROPORTION_IMPLAUSIBLE, msg, (src.ref,), (src.layer,), pin.center))
    return out


def _span_mm(segments: Sequence[tuple[tuple[float, float], tuple[float, float]]]) -> float:
    pts = [p for s in segments for p in s]
    return max((math.dist(a, b) for a in pts for b in pts), default=0.0)


def link_lengths(mech: Mechanism) -> list[Finding]:
    """``D111`` for each part that spans more than
    :data:`PART_TO_DRUM_MAX` drum diameters."""
    drum = mech.drum
    if drum is None:
        return []
    d_drum = 2.0 * drum.radius_mm
    out = []
    for part in mech.parts:
        span = _span_mm(part.segments)
        if span <= PART_TO_DRUM_MAX * d_drum:
            continue
        msg = (
            f"part {part.name} spans {_size(span)}, {span / d_drum:.3g} × the drum's Ø{d_drum:.4g} mm (more than "
            f"{PART_TO_DRUM_MAX:g}): is it drawn at another scale, or a line that is not a part? "
            f"(range: {SRC_PART})"
        )
        srcs = part.sources
        at = part.segments[0][0] if part.segments else None
        out.append(
            Finding(
                Code.PROPORTION_IMPLAUSIBLE,
                msg,
                tuple(s.ref for s in srcs),
                tuple(dict.fromkeys(s.layer for s in srcs)),
                at,
            )
        )
    return out


def check_mechanism(mech: Mechanism) -> list[Finding]:
    """Every size check of a built mechanism."""
    return [*drum_diameter(mech), *pin_diameters(mech), *link_lengths(mech)]


def loads(sol: Solution) -> list[Finding]:
    """``S312`` for each load or spring whose force as used is outside
    :data:`LOAD_N` (in any solved case; one finding per load)."""
    mech = sol.mechanism
    worst: dict[str, float] = {}
    for case in sol.cases:
        forces = [(ld.name, ld.force_N) for ld in case.loads] + [(sp.name, abs(sp.force_N)) for sp in case.springs]
        for name, f in forces:
            if not _in(f, LOAD_N) and math.isfinite(f):
                worst.setdefault(name, f)
    out = []
    sources = {ld.name: (ld.source, ld.point, ld.text) for ld in mech.loads}
    sources.update({sp.name: (sp.source, sp.ends[0], sp.text) for sp in mech.springs})
    for name, f in worst.items():
        src, at, text = sources.get(name, (None, None, None))
        written = f" (text {text!r})" if text else ""
        msg = (
            f"{name} is {f:.4g} N{written}, outside {_range(LOAD_N, 'N')} for a brake's effort or spring: "
            "check the text's number and unit (range: " + SRC_LOAD + ")"
        )
        handles = (src.ref,) if src is not None else ()
        layers = (src.layer,) if src is not None else ()
        out.append(Finding(Code.RESULT_IMPLAUSIBLE, msg, handles, layers, at))
    return out


def check_solution(sol: Solution) -> list[Finding]:
    """Every check of a solution's loads."""
    return loads(sol)


def _subject(mech: Mechanism, rule: str) -> tuple[tuple[str, ...], tuple[str, ...], tuple[float, float] | None]:
    """Handles, layers and place of what a rule is about (its last name)."""
    name = rule.split(".", 2)[-1] if rule.count(".") >= 2 else ""
    for pin in mech.pins:
        if rule.startswith("pin.") and pin.name == name:
            return (pin.source.ref,), (pin.source.layer,), pin.center
    for shoe in mech.shoes:
        if rule.startswith("lining.") and shoe.name == name:
            src = shoe.arc.source
            return (src.ref,), (src.layer,), shoe.arc.point_at(shoe.arc.mid_deg)
    for band in mech.bands:
        if rule.startswith("band.") and band.name == name:
            return tuple(s.ref for s in band.sources), tuple(dict.fromkeys(s.layer for s in band.sources)), None
    if mech.drum is not None:
        src = mech.drum.source
        return (src.ref,), (src.layer,), mech.drum.center
    return (), (), None


def pressures(mech: Mechanism, rules: Iterable[_Rated]) -> list[Finding]:
    """``S312`` for each lining or band pressure rule whose value is outside
    :data:`LINING_PRESSURE_MPA`."""
    out = []
    for r in rules:
        if not r.rule.startswith(("lining.pressure.", "band.pressure.")) or r.value is None:
            continue
        if _in(r.value, LINING_PRESSURE_MPA) or not math.isfinite(r.value):
            continue
        handles, layers, at = _subject(mech, r.rule)
        msg = (
            f"{r.rule}: peak pressure {r.value:.3g} MPa is outside {_range(LINING_PRESSURE_MPA, 'MPa')}; "
            f"with the drawing read in {long_name(mech.drawing.units)} ({how_read(mech.drawing)}) this is far more "
            "likely a units slip (drawing unit, lining_width) than a design (range: " + SRC_PRESSURE + ")"
        )
        out.append(Finding(Code.RESULT_IMPLAUSIBLE, msg, handles, layers, at))
    return out


def margins(mech: Mechanism, rules: Iterable[_Rated], skip: Iterable[str] = ()) -> list[Finding]:
    """One ``S312`` naming every rule whose margin is outside
    :data:`RULE_MARGIN` (rules in ``skip`` and
    :data:`MARGIN_EXEMPT_PREFIXES` aside), with the entities they are about."""
    skipped = set(skip)
    off: list[tuple[str, float]] = []
    handles: list[str] = []
    layers: list[str] = []
    at: tuple[float, float] | None = None
    for r in rules:
        m = r.margin
        if m is None or r.rule in skipped or r.rule.startswith(MARGIN_EXEMPT_PREFIXES):
            continue
        if _in(m, RULE_MARGIN) or not math.isfinite(m) or m <= 0:
            continue
        off.append((r.rule, m))
        h, la, where = _subject(mech, r.rule)
        handles += h
        layers += la
        at = at or where
    if not off:
        return []
    listed = ", ".join(f"{rule} {m:.3g}" for rule, m in off)
    msg = (
        f"margins orders of magnitude from 1 (outside {_range(RULE_MARGIN, '')}): {listed}; with the drawing read "
        f"in {long_name(mech.drawing.units)} ({how_read(mech.drawing)}) a units slip (drawing unit or a spec "
        "value's unit) is far more likely than a design (range: " + SRC_MARGIN + ")"
    )
    return [Finding(Code.RESULT_IMPLAUSIBLE, msg, tuple(dict.fromkeys(handles)), tuple(dict.fromkeys(layers)), at)]


def check_rules(mech: Mechanism, rules: Sequence[_Rated]) -> list[Finding]:
    """Pressures and margins of a judgement's rules (a pressure reported
    once, not again as a margin)."""
    found = pressures(mech, rules)
    flagged = {r.rule for r in rules if any(f.message.startswith(f"{r.rule}:") for f in found)}
    return [*found, *margins(mech, rules, skip=flagged)]
