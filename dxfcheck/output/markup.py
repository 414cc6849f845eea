"""A marked-up copy of the drawing: the computed forces on layers of our own.

The copy keeps every original entity as it was (same handles, layers,
geometry and header; blocks and paper-space layouts untouched) and adds, on
two new layers,

* the force layer: an arrow for every pin force (the force on the first part
  the pin joins), each shoe's normal and friction resultants on their lines of action,
  each applied load, and a pair of arrowheads at the middle of each
  two-force member (pointing out for tension, in for compression);
* the note layer: a label with name and magnitude beside each arrow, each
  member's axial force written along it, and a summary block (torque per
  direction, μ, the efforts, the force scale, the verdict when a spec was
  judged, the caution).

Arrows are a LINE plus a filled SOLID head, labels are TEXT: entities every
DXF version (R12 included) and every viewer shows the same way.  Arrow
lengths are scaled so that the largest force is :data:`ARROW_FRACTION` of
the drum diameter, with a round scale stated in the summary.
"""

from __future__ import annotations

import itertools
import math
import os
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING, Any

from dxfcheck.core.config import Config
from dxfcheck.core.errors import ConfigError
from dxfcheck.core.files import MARKER, atomic_target
from dxfcheck.core.geometry import Point
from dxfcheck.core.records import record
from dxfcheck.core.textsafe import one_line
from dxfcheck.core.version import __version__
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.output.text import CAUTION
from dxfcheck.read.drawing import BINARY_SENTINEL, load_document, raw_header_values
from dxfcheck.statics import CaseSolution, Solution
from dxfcheck.statics.contact import Direction

if TYPE_CHECKING:
    from dxfcheck.gate.rules import Judgement

__all__ = [
    "ARROW_FRACTION",
    "Arrow",
    "Markup",
    "MemberNote",
    "add_markup",
    "marked_document",
    "plan_markup",
    "save_copy",
]

#: The largest force arrow is this fraction of the drum diameter.
ARROW_FRACTION = 0.5
#: Arrowhead length as a fraction of the drum diameter.
HEAD_FRACTION = 0.03
#: Arrowhead width over its length.
HEAD_ASPECT = 0.4
#: Label text height as a fraction of the drum diameter.
TEXT_FRACTION = 0.03
#: Smallest label height [mm].
TEXT_MIN_MM = 2.5
#: Approximate width of one character over the text height.
CHAR_ASPECT = 0.62
#: Turns from the arrow's direction tried when placing a label [degrees].
LABEL_TURNS_DEG = (0, 30, -30, 60, -60, 90, -90, 120, -120, 150, -150, 180)
#: The largest pressure curve stands this fraction of the drum diameter
#: off its base circle, which is this other fraction outside the drum.
CURVE_FRACTION = 0.12
CURVE_GAP_FRACTION = 0.03
#: Clear space kept between a label and any line, over the text height.
LABEL_PAD = 0.4
#: ACI colours and lineweights [1/100 mm] of the new layers.
FORCE_COLOR = 6
NOTE_COLOR = 5
FORCE_LINEWEIGHT = 50
NOTE_LINEWEIGHT = 25
#: Without a drum, the markup is scaled to the drawing's size over this.
DRUMLESS_SCALE_DIVISOR = 4
#: Floor of the largest force, so that a case without forces scales [N].
TINY_FORCE_N = 1e-300
#: Width of the caution's lines in the summary block [characters].
SUMMARY_WIDTH = 70
#: Spacing of the summary's lines over the text height.
LINE_SPACING = 1.6
#: Free lines kept between the drawing's top and the summary block.
SUMMARY_MARGIN_LINES = 2
#: A member's text stands off its line by this many text heights.
MEMBER_TEXT_OFFSET = 1.2
#: The DXF version string of R12 (no lineweights).
R12 = "AC1009"


@record(frozen=True)
class Arrow:
    """A force drawn as an arrow, in world [mm].

    Attributes
    ----------
    kind : str
        ``pin``, ``normal``, ``friction``, ``load``, ``band``, ``spring`` or ``guide``.
    name : str
        What it belongs to (pin, shoe or load name).
    tail, head : Point
        Ends of the arrow [mm]; the tail is the point of application.
    force : Point
        The force [N].
    label : str
    """

    kind: str
    name: str
    tail: Point
    head: Point
    force: Point
    label: str

    @property
    def force_N(self) -> float:
        return math.hypot(*self.force)


@record(frozen=True)
class MemberNote:
    """A two-force member's axial force written along it."""

    name: str
    ends: tuple[Point, Point]
    axial_N: float
    label: str


@record(frozen=True)
class Markup:
    """Everything a marked-up copy adds, in world [mm].

    Attributes
    ----------
    direction : Direction
    mm_per_N : float
        Arrow length per newton [mm/N].
    scale_text : str
    text_height_mm : float
    head_mm : float
        Arrowhead length [mm].
    arrows : tuple of Arrow
    members : tuple of MemberNote
    summary : tuple of str
    anchor : Point
        Top-left corner of the summary block [mm].
    curves : tuple of (str, tuple of Point)
        Each shoe's pressure distribution drawn outside the drum: the
        distance from the curve to the drum circle is proportional to the
        line load (label, points [mm]).
    """

    direction: Direction
    mm_per_N: float
    scale_text: str
    text_height_mm: float
    head_mm: float
    arrows: tuple[Arrow, ...]
    members: tuple[MemberNote, ...]
    summary: tuple[str, ...]
    anchor: Point
    curves: tuple[tuple[str, tuple[Point, ...]], ...] = ()


def _fmt_force(f: float) -> str:
    a = abs(f)
    if a >= 1000:
        return f"{a / 1000:.3g} kN"
    return f"{a:.3g} N"


def _nice_scale(mm_per_N: float) -> tuple[float, str]:
    """Round a scale down to 1, 2 or 5 × 10^k mm per kN."""
    per_kN = mm_per_N * 1000
    k = math.floor(math.log10(per_kN))
    for m in (5, 2, 1):
        if m * 10**k <= per_kN:
            nice = m * 10**k
            break
    else:  # pragma: no cover - per_kN >= 10**k always
        nice = 10**k
    return nice / 1000, f"force scale: {nice:g} mm = 1 kN"


def _governing(sol: Solution) -> Direction:
    """The direction with the lower braking torque (it sets the holding duty)."""
    return min(sol.cases, key=lambda c: c.torque_Nm).direction


def _solved_case(sol: Solution, direction: Direction | str | None) -> CaseSolution:
    """The solved case of ``direction`` (default: the governing one)."""
    d = Direction(direction) if direction is not None else _governing(sol)
    try:
        return sol.case(d)
    except StopIteration:
        raise ConfigError(f"direction {d} was not solved") from None


def _drum_diameter(mech: Mechanism) -> float:
    """The length the markup is scaled to [mm]: the drum's diameter, or a
    quarter of the drawing's size without a drum."""
    return 2 * mech.drum.radius_mm if mech.drum else mech.length_scale_mm / DRUMLESS_SCALE_DIVISOR


#: A force to draw: kind, owner's name, point of application [mm], force [N], label.
_Force = tuple[str, str, Point, Point, str]


def _pin_forces(case: CaseSolution) -> list[_Force]:
    """Each pin's force on the first part it joins, at the pin's centre."""
    return [("pin", p.name, (p.x_mm, p.y_mm), (p.fx_N, p.fy_N), f"{p.name} {_fmt_force(p.force_N)}") for p in case.pins]


def _shoe_forces(case: CaseSolution) -> list[_Force]:
    """The solver's normal and friction resultants on each shoe, each on its
    own line of action."""
    out: list[_Force] = []
    for s in case.shoes:
        out.append(("normal", s.name, s.normal_at_mm, s.normal_force_N, f"N {s.name} {_fmt_force(s.normal_N)}"))
        out.append(
            (
                "friction",
                s.name,
                s.friction_at_mm,
                s.friction_force_N,
                f"F {s.name} {_fmt_force(s.friction_resultant_N)}",
            )
        )
    return out


def _load_forces(case: CaseSolution) -> list[_Force]:
    """Each applied load (as solved) at its point of application."""
    return [
        ("load", ld.name, (ld.x_mm, ld.y_mm), (ld.fx_N, ld.fy_N), f"{ld.name} {_fmt_force(ld.force_N)}")
        for ld in case.loads
    ]


def _band_forces(case: CaseSolution, mech: Mechanism) -> list[_Force]:
    """Each band end's pull on its pin (T1 tight, T2 slack)."""
    out: list[_Force] = []
    for br in case.bands:
        for end in br.ends:
            side = "T1" if end.tight else "T2"
            at = mech.pin(end.pin).center
            out.append(("band", br.name, at, end.pull_N, f"{br.name} {side} {_fmt_force(end.tension_N)}"))
    return out


def _spring_forces(case: CaseSolution) -> list[_Force]:
    """Each spring's force on the parts its ends hold (not on the frame)."""
    out: list[_Force] = []
    for sr in case.springs:
        state = "T" if sr.state == "tension" else "C"
        for e in sr.ends:
            if e.part is not None:
                out.append(("spring", sr.name, e.at_mm, e.force_N, f"{sr.name} {_fmt_force(sr.force_N)} {state}"))
    return out


def _guide_forces(case: CaseSolution) -> list[_Force]:
    """Each guide's force on its rod (the part with the hole takes the
    opposite); a guide that carries nothing draws no arrow."""
    return [
        ("guide", g.name, g.at_mm, g.force_N, f"{g.name} on {g.rod} {_fmt_force(math.hypot(*g.force_N))}")
        for g in case.guides
        if g.force_N != (0.0, 0.0)
    ]


def _arrows(forces: list[_Force], drum_d: float) -> tuple[float, str, tuple[Arrow, ...]]:
    """The round scale [mm/N] that makes the largest force
    :data:`ARROW_FRACTION` of the drum diameter, its text, and the arrows."""
    fmax = max([math.hypot(*f[3]) for f in forces] + [TINY_FORCE_N])
    mm_per_N, scale_text = _nice_scale(ARROW_FRACTION * drum_d / fmax)
    arrows = tuple(
        Arrow(kind, name, tail, (tail[0] + mm_per_N * f[0], tail[1] + mm_per_N * f[1]), f, label)
        for kind, name, tail, f, label in forces
    )
    return mm_per_N, scale_text, arrows


def _member_notes(case: CaseSolution) -> tuple[MemberNote, ...]:
    """Each two-force member's axial force, written between its ends."""

    def at(pin: str) -> Point:
        p = case.pin(pin)
        return (p.x_mm, p.y_mm)

    return tuple(
        MemberNote(
            m.name,
            m.ends_mm if m.ends_mm is not None else (at(m.ends[0]), at(m.ends[1])),
            m.axial_N,
            f"{m.name}: {_fmt_force(m.axial_N)} {m.state}",
        )
        for m in case.members
    )


def _summary(sol: Solution, case: CaseSolution, scale_text: str, judgement: Judgement | None) -> list[str]:
    """The summary block: direction and μ, torques, efforts, scale, the
    gate's verdict when judged, the caution."""
    torques = ", ".join(
        f"{c.direction} {c.torque_Nm:.1f} N·m" if c.brakes else f"{c.direction} does not brake" for c in sol.cases
    )
    efforts = ", ".join(
        [f"{ld.name} {_fmt_force(ld.force_N)}" for ld in case.loads]
        + [f"{sp.name} {_fmt_force(sp.force_N)} {sp.state}" for sp in case.springs]
    )
    summary = [
        f"dxfcheck: forces for drum {case.direction} at mu = {case.mu:g} ({Path(sol.mechanism.drawing.path).name})",
        f"braking torque: {torques}",
        f"efforts: {efforts}",
        scale_text,
    ]
    if judgement is not None:
        counts = judgement.counts()
        summary.append(
            f"release gate: {str(judgement.verdict).upper()} ({counts['pass']} pass, {counts['fail']} fail, "
            f"{counts['warn']} warn, {counts['skip']} skipped)"
        )
    return summary + _wrap(CAUTION, SUMMARY_WIDTH)


def _anchor(arrows: tuple[Arrow, ...], mech: Mechanism, height: float, lines: int) -> Point:
    """Top-left corner of the summary block: left of everything drawn, and
    high enough above it for ``lines`` lines of text (plus a margin)."""
    xs = [a.tail[0] for a in arrows] + [a.head[0] for a in arrows]
    ys = [a.tail[1] for a in arrows] + [a.head[1] for a in arrows]
    for part in mech.parts:
        for seg in part.segments:
            xs += [seg[0][0], seg[1][0]]
            ys += [seg[0][1], seg[1][1]]
    if mech.drum is not None:
        xs += [mech.drum.center[0] - mech.drum.radius_mm, mech.drum.center[0] + mech.drum.radius_mm]
        ys += [mech.drum.center[1] + mech.drum.radius_mm]
    return (min(xs), max(ys) + height * (lines + SUMMARY_MARGIN_LINES) * LINE_SPACING)


def plan_markup(
    sol: Solution,
    direction: Direction | str | None = None,
    judgement: Judgement | None = None,
) -> Markup:
    """Lay out the arrows, labels and summary for one drum direction.

    Parameters
    ----------
    sol : Solution
    direction : Direction or str, optional
        Default: the direction with the lower braking torque.
    judgement : Judgement, optional
        Adds the release gate's verdict to the summary.
    """
    case = _solved_case(sol, direction)
    mech = sol.mechanism
    drum_d = _drum_diameter(mech)
    forces = [
        *_pin_forces(case),
        *_shoe_forces(case),
        *_load_forces(case),
        *_band_forces(case, mech),
        *_spring_forces(case),
        *_guide_forces(case),
    ]
    mm_per_N, scale_text, arrows = _arrows(forces, drum_d)
    curves = _pressure_curves(case, mech.drum, drum_d) if mech.drum is not None else ()
    summary = _summary(sol, case, scale_text, judgement)
    h = max(TEXT_MIN_MM, TEXT_FRACTION * drum_d)
    anchor = _anchor(arrows, mech, h, len(summary))
    return Markup(
        case.direction,
        mm_per_N,
        scale_text,
        h,
        HEAD_FRACTION * drum_d,
        arrows,
        _member_notes(case),
        tuple(summary),
        anchor,
        curves,
    )


def _pressure_curves(case: CaseSolution, drum: Any, drum_d: float) -> tuple[tuple[str, tuple[Point, ...]], ...]:
    qmax = max([q for s in case.shoes for _, q in s.line_load] + [0.0])
    if qmax <= 0:
        return ()
    k = CURVE_FRACTION * drum_d / qmax
    gap = CURVE_GAP_FRACTION * drum_d
    out = []
    for s in case.shoes:
        if not s.line_load:
            continue
        pts = []
        for deg, q in s.line_load:
            t = math.radians(deg)
            rad = drum.radius_mm + gap + k * max(q, 0.0)
            pts.append((drum.center[0] + rad * math.cos(t), drum.center[1] + rad * math.sin(t)))
        label = f"p·b {s.name}: peak {s.peak_line_load_N_per_mm:.3g} N/mm at {s.peak_at_deg:.0f}°"
        out.append((label, tuple(pts)))
    return tuple(out)


def _wrap(text: str, width: int) -> list[str]:
    lines: list[str] = []
    cur = ""
    for word in text.split():
        if cur and len(cur) + 1 + len(word) > width:
            lines.append(cur)
            cur = word
        else:
            cur = f"{cur} {word}".strip()
    if cur:
        lines.append(cur)
    return lines


@dataclass
class _Placer:
    """Greedy label placement: try spots around the anchor and keep the first
    that overlaps no label placed before and covers no line (lines are
    sampled as points); else the spot that is least in the way."""

    height: float
    boxes: list[tuple[float, float, float, float]]
    points: list[Point]

    @staticmethod
    def sample(segments: Sequence[tuple[Point, Point]], step: float) -> list[Point]:
        pts: list[Point] = []
        for (x0, y0), (x1, y1) in segments:
            n = max(1, int(math.hypot(x1 - x0, y1 - y0) / step))
            pts += [(x0 + (x1 - x0) * i / n, y0 + (y1 - y0) * i / n) for i in range(n + 1)]
        return pts

    def place(self, text: str, at: Point, away: Point) -> Point:
        w = CHAR_ASPECT * self.height * len(text)
        h = self.height
        ux, uy = away
        n = math.hypot(ux, uy) or 1.0
        ux, uy = ux / n, uy / n
        base = math.atan2(uy, ux)
        candidates: list[Point] = []
        for ring in (0.8, 2.0, 3.5):
            for off_deg in LABEL_TURNS_DEG:
                ang = base + math.radians(off_deg)
                cx, cy = at[0] + ring * h * math.cos(ang), at[1] + ring * h * math.sin(ang)
                # text grows to the right of its insertion point: shift it left when the spot is leftward
                if math.cos(ang) < -0.3:
                    cx -= w
                candidates.append((cx, cy - h / 2))
        best = candidates[0]
        best_overlap = math.inf
        for c in candidates:
            box = (c[0], c[1], c[0] + w, c[1] + h)
            overlap = sum(_overlap(box, b) for b in self.boxes)
            pad = LABEL_PAD * h
            overlap += (
                h
                * h
                * sum(
                    1
                    for q in self.points
                    if box[0] - pad <= q[0] <= box[2] + pad and box[1] - pad <= q[1] <= box[3] + pad
                )
            )
            if overlap < best_overlap:
                best, best_overlap = c, overlap
                if overlap == 0:
                    break
        self.boxes.append((best[0], best[1], best[0] + w, best[1] + h))
        return best


def _overlap(a: tuple[float, float, float, float], b: tuple[float, float, float, float]) -> float:
    dx = min(a[2], b[2]) - max(a[0], b[0])
    dy = min(a[3], b[3]) - max(a[1], b[1])
    return dx * dy if dx > 0 and dy > 0 else 0.0


def _head(tail: Point, head: Point, length: float) -> tuple[Point, Point, Point] | None:
    dx, dy = head[0] - tail[0], head[1] - tail[1]
    n = math.hypot(dx, dy)
    if n == 0:
        return None
    ux, uy = dx / n, dy / n
    length = min(length, n)
    bx, by = head[0] - length * ux, head[1] - length * uy
    hw = HEAD_ASPECT * length / 2
    return head, (bx - hw * uy, by + hw * ux), (bx + hw * uy, by - hw * ux)


@record(frozen=True)
class _Pen:
    """Where and how the markup draws: the modelspace, world [mm] to drawing
    units, the text height [mm], the two layers' attributes, the label placer."""

    msp: Any
    unit_per_mm: float
    height: float
    force: dict[str, Any]
    note: dict[str, Any]
    placer: _Placer

    def u(self, p: Point) -> tuple[float, float]:
        """A world point [mm] in drawing units."""
        return (p[0] * self.unit_per_mm, p[1] * self.unit_per_mm)

    def solid(self, tri: tuple[Point, Point, Point]) -> None:
        self.msp.add_solid([self.u(tri[0]), self.u(tri[1]), self.u(tri[2])], dxfattribs=self.force)

    def text(self, text: str, at: Point, rotation: float | None = None) -> None:
        extra = {} if rotation is None else {"rotation": rotation}
        self.msp.add_text(
            text, height=self.height * self.unit_per_mm, **extra, dxfattribs={**self.note, "insert": self.u(at)}
        )


def _add_layers(doc: Any, config: Config) -> None:
    """The force and note layers, with their colour (and lineweight after R12)."""
    for name, color, lw in (
        (config.force_layer, FORCE_COLOR, FORCE_LINEWEIGHT),
        (config.note_layer, NOTE_COLOR, NOTE_LINEWEIGHT),
    ):
        if name not in doc.layers:
            attribs: dict[str, Any] = {"color": color}
            if doc.dxfversion > R12:
                attribs["lineweight"] = lw
            doc.layers.add(name, **attribs)


def _draw_arrow(pen: _Pen, a: Arrow, head_mm: float) -> int:
    """A force arrow: a line, a filled head, its label; entities added."""
    if a.force_N == 0.0:
        return 0
    count = 0
    pen.msp.add_line(pen.u(a.tail), pen.u(a.head), dxfattribs=pen.force)
    tri = _head(a.tail, a.head, head_mm)
    if tri is not None:
        pen.solid(tri)
        count += 1
    pos = pen.placer.place(a.label, a.head, (a.head[0] - a.tail[0], a.head[1] - a.tail[1]))
    pen.text(a.label, pos)
    return count + 2


def _draw_member(pen: _Pen, m: MemberNote, head_mm: float) -> int:
    """A two-force member: a pair of heads at its middle (out for tension,
    in for compression) and its axial force written along it; entities added."""
    (x0, y0), (x1, y1) = m.ends
    mid = ((x0 + x1) / 2, (y0 + y1) / 2)
    ang = math.atan2(y1 - y0, x1 - x0)
    ux, uy = math.cos(ang), math.sin(ang)
    s = head_mm
    sign = 1.0 if m.axial_N >= 0 else -1.0
    count = 0
    for end in (1.0, -1.0):
        base = (mid[0] + end * 0.5 * s * ux, mid[1] + end * 0.5 * s * uy)
        tip = (base[0] + sign * end * s * ux, base[1] + sign * end * s * uy)
        tri = _head(base, tip, s)
        if tri is not None:
            pen.solid(tri)
            count += 1
    rot = math.degrees(ang)
    if rot > 90 or rot <= -90:
        rot += 180  # text reads left to right
    k, h = MEMBER_TEXT_OFFSET, pen.height
    upright = abs(rot - math.degrees(ang)) < 1e-9
    off = (-uy * k * h, ux * k * h) if upright else (uy * k * h, -ux * k * h)  # on the text's upper side
    pen.text(m.label, (mid[0] + off[0], mid[1] + off[1]), rotation=rot)
    return count + 1


def _draw_curve(pen: _Pen, label: str, pts: tuple[Point, ...]) -> int:
    """A shoe's pressure curve as lines, and its label; entities added."""
    count = 0
    for p0, p1 in itertools.pairwise(pts):
        pen.msp.add_line(pen.u(p0), pen.u(p1), dxfattribs=pen.force)
        count += 1
    top = max(pts, key=lambda q: math.hypot(q[0], q[1]))
    pos = pen.placer.place(label, top, (top[0] - pts[0][0] + 1e-9, top[1] - pts[0][1]))
    pen.text(label, pos)
    return count + 1


def _draw_summary(pen: _Pen, markup: Markup) -> int:
    """The summary block, one TEXT a line, down from the anchor; entities added."""
    x, y = markup.anchor
    for line in markup.summary:
        pen.text(line, (x, y))
        y -= LINE_SPACING * pen.height
    return len(markup.summary)


def add_markup(
    doc: Any,
    markup: Markup,
    mm_per_unit: float,
    config: Config | None = None,
    skeleton: Sequence[tuple[Point, Point]] = (),
) -> int:
    """Add the markup's entities to ``doc``'s modelspace on the force and
    note layers; returns the number of entities added.  ``skeleton`` are the
    centreline segments [mm] that labels should keep off."""
    config = config or Config()
    _add_layers(doc, config)
    h = markup.text_height_mm
    lines = [(a.tail, a.head) for a in markup.arrows] + [m.ends for m in markup.members]
    placer = _Placer(h, [], _Placer.sample([*lines, *skeleton], h / 2))
    pen = _Pen(
        doc.modelspace(), 1.0 / mm_per_unit, h, {"layer": config.force_layer}, {"layer": config.note_layer}, placer
    )
    count = sum(_draw_arrow(pen, a, markup.head_mm) for a in markup.arrows)
    count += sum(_draw_member(pen, m, markup.head_mm) for m in markup.members)
    count += sum(_draw_curve(pen, label, pts) for label, pts in markup.curves)
    return count + _draw_summary(pen, markup)


def marked_document(sol: Solution, markups: Sequence[Markup], config: Config | None = None) -> Any:
    """A fresh ezdxf document of the solved drawing with ``markups`` added.
    The drawing file is only read."""

    mech = sol.mechanism
    doc, _ = load_document(Path(mech.drawing.path), config=config)
    # ezdxf stamps a fresh creation date on loading: keep the drawing's own
    for name, value in raw_header_values(Path(mech.drawing.path)).items():
        doc.header[name] = value
    skeleton = [seg for part in mech.parts for seg in part.segments]
    before = {e.dxf.handle for e in doc.modelspace()}
    for m in markups:
        add_markup(doc, m, mech.drawing.mm_per_unit, config, skeleton)
    _printable_texts(doc, before)
    return doc


def _printable_texts(doc: Any, before: set[str]) -> None:
    """Labels are drawing texts: the control characters in the TEXT entities
    the markup added are written as visible escapes (a line break would cut
    a DXF value in two; an ESC sequence garbles viewers)."""

    for e in doc.modelspace().query("TEXT"):
        if e.dxf.handle not in before:
            text = one_line(e.dxf.text)
            if text != e.dxf.text:
                e.dxf.text = text


def _is_binary(path: str | os.PathLike[str]) -> bool:

    try:
        with open(path, "rb") as fh:
            return fh.read(len(BINARY_SENTINEL)) == BINARY_SENTINEL
    except OSError:
        return False


def save_copy(
    doc: Any,
    out: str | os.PathLike[str],
    *,
    source: str | os.PathLike[str],
    force: bool = False,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> None:
    """Write a marked-up ``doc`` to ``out`` atomically, in the format of
    ``source`` (a binary DXF stays binary, an ASCII one ASCII, the version
    is the document's), carrying the marker of dxfcheck's outputs
    (:data:`dxfcheck.core.files.MARKER`): an ASCII file starts with the comment
    ``999`` / ``DXFCHECK_OUTPUT <version>`` (DXF comments are ignored by
    readers); a binary one gets the header custom property
    ``DXFCHECK_OUTPUT`` (R2004 and later) or an APPID of that name (R12,
    R2000)."""

    binary = _is_binary(source)
    if binary and doc.dxfversion >= "AC1018":
        if not doc.header.custom_vars.has_tag(MARKER):
            doc.header.custom_vars.append(MARKER, __version__)
    elif binary and MARKER not in doc.appids:
        doc.appids.new(MARKER)
    with atomic_target(out, force=force, protect=(source, *protect)) as tmp:
        if binary:
            doc.saveas(tmp, fmt="bin")
        else:
            with open(tmp, "w", encoding=doc.output_encoding, errors="dxfreplace") as fp:
                fp.write(f"999\n{MARKER} {__version__}\n")
                doc.write(fp)
