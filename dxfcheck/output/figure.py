"""The record's picture: the mechanism's skeleton and the solved forces of
one drum direction as an SVG element, drawn from the model and the results
alone (never from the drawing's entities, so a block full of clutter shows
only its skeleton).

* Black skeleton on white: drum, parts' centrelines, pins (frame pivots
  with a ground mark), linings, bands, springs; the drum's direction of
  rotation as an arc arrow.
* Every force in one colour, as an arrow with its tail at the point of
  application, pointing the way the solver's vector points: the drum's
  normal and friction forces on each shoe (both start on the lining and run
  outward or along the tangent, so they lie outside the lining), each pin's
  force on the first part it joins, the loads, each spring's force on its
  ends, each band's pull on its pins.  One length scale for all forces
  (stated under the picture); an arrow that would be shorter than
  :data:`MIN_ARROW_FRACTION` of the mechanism is drawn at that length and
  its label marked ``*`` (its value is in the label).
* Arrows that would coincide (the same point of application and the same
  direction, within :data:`COINCIDENT_PX` and :data:`COINCIDENT_DEG`: at a
  band's pin, the band's pull and the pin's force) are staggered, each
  still along its own vector and on its line of action: the first is drawn
  *from* its point (tail there), the second *onto* it (head there), any
  further ones beside the pair, :data:`STAGGER_PX` apart, pushing and
  pulling in turn (``data-drawn`` on each arrow: ``from``, ``onto``,
  ``beside``; ``data-at``: the point of application [px]).
* Labels placed by a greedy search over candidate positions around each
  anchor (rings of candidates at growing distance, leader lines when
  displaced), minimising overlaps with the other labels (never allowed),
  the lines and the pins.  Each label's box is an SVG ``rect`` so that a
  test can check the boxes.
* A title line: drawing number, revision, direction, μ, braking torque and
  the verdict.

The output only draws result fields (``normal_force_N``, ``friction_at_mm``,
``attachments``, ``pull_N``...): no physics is computed here.
"""

from __future__ import annotations

import itertools
import math
import xml.etree.ElementTree as ET
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field

from dxfcheck.core.geometry import Point
from dxfcheck.core.records import record
from dxfcheck.core.textsafe import printable, xml_text
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.statics import CaseSolution, Station

__all__ = [
    "FONT_PX",
    "MIN_ARROW_FRACTION",
    "Arrow",
    "Figure",
    "force_polygon",
    "force_text",
    "moment_diagram",
    "plan_figure",
    "stagger",
    "svg_element",
]


def _safe(text: str) -> str:
    """A drawing's text for HTML/SVG: control characters and bidirectional
    overrides as visible escapes (the serializer escapes ``<&"``)."""
    return xml_text(printable(text))


#: Width the skeleton is fitted to [px].
CANVAS_PX = 900.0
#: Label font size [px]; a character is taken as :data:`CHAR_EM` of it wide.
FONT_PX = 13.0
CHAR_EM = 0.62
#: The largest force's arrow, as a fraction of the mechanism's size [-].
MAX_ARROW_FRACTION = 0.30
#: The shortest arrow drawn, as a fraction of the mechanism's size [-].
MIN_ARROW_FRACTION = 0.07
#: Rings of label candidates tried, and their spacing [px].
LABEL_RINGS = 60
RING_STEP_PX = 16.0
#: Cost of a label box crossing a line or covering a pin, in rings [-].
CROSSING_COST = 30.0
#: Clear space kept between a label and the lines and pins [px].
CLEARANCE_PX = 3.0
#: Rings searched for a box that crosses nothing before settling [-].
CLEAR_RINGS = 14
#: A label further than this from its anchor gets a leader line [px].
LEADER_MIN_PX = 8.0
#: Colour of every force (the skeleton is black).
FORCE_COLOUR = "#c0001a"
#: Two arrows whose tails are closer than this [px] and whose directions
#: differ by less than :data:`COINCIDENT_DEG` [degrees] would be drawn over
#: each other; they are staggered.
#: (6 px: a little over twice an arrow's stroke, 2.2 px, so that two arrows
#: closer than that would read as one.)
COINCIDENT_PX = 6.0
COINCIDENT_DEG = 3.0
#: Spacing of the third and later coincident arrows beside the first pair [px].
STAGGER_PX = 9.0
#: Forces below this fraction of the largest are not drawn (they are zero
#: up to round-off) [-].
ZERO_FORCE_FRACTION = 1e-9


def force_text(f_N: float) -> str:
    """A force for a label: kN above 1 kN, else N, 3 significant figures."""
    return f"{f_N / 1000:.3g} kN" if abs(f_N) >= 1000 else f"{f_N:.3g} N"


@record(frozen=True)
class Arrow:
    """One force arrow: ``ref`` names the result field it draws
    (``shoe/NAME/normal``, ``shoe/NAME/friction``, ``pin/NAME``,
    ``load/NAME``, ``spring/NAME/END``, ``band/NAME/END``, ``guide/NAME``); ``at_mm`` the
    point of application [mm], ``force_N`` the solver's vector [N],
    ``length_mm`` the drawn length [mm]."""

    ref: str
    label: str
    at_mm: Point
    force_N: Point
    length_mm: float
    clipped: bool

    @property
    def tip_mm(self) -> Point:
        f = math.hypot(*self.force_N)
        return (
            self.at_mm[0] + self.length_mm * self.force_N[0] / f,
            self.at_mm[1] + self.length_mm * self.force_N[1] / f,
        )


@dataclass
class Figure:
    """A planned picture, in px (y down)."""

    title: str
    scale_note: str
    lines: list[tuple[Point, Point, float]] = field(default_factory=list)  # skeleton: a, b, width
    circles: list[tuple[Point, float, bool]] = field(default_factory=list)  # centre, radius, filled
    arrows: list[tuple[Arrow, Point, Point]] = field(default_factory=list)  # arrow, tail px, tip px
    #: each arrow's point of application [px] and how it is drawn there
    #: (``from``, ``onto``, ``beside``), in the order of :attr:`arrows`
    applied: list[tuple[Point, str]] = field(default_factory=list)
    rotation: list[Point] = field(default_factory=list)  # the drum's direction arc, px
    labels: list[tuple[str, Point, tuple[float, float, float, float], bool]] = field(default_factory=list)
    grounds: list[Point] = field(default_factory=list)


def _arrows(mech: Mechanism, case: CaseSolution, size_mm: float) -> tuple[list[Arrow], float]:
    """Every force of ``case`` as an arrow, and the scale [mm per N]."""
    raw: list[tuple[str, str, Point, Point]] = []
    for s in case.shoes:
        raw.append((f"shoe/{s.name}/normal", f"N {s.name}", s.normal_at_mm, s.normal_force_N))
        raw.append((f"shoe/{s.name}/friction", f"μN {s.name}", s.friction_at_mm, s.friction_force_N))
    for p in case.pins:
        on = p.attachments[0].body if p.attachments else "?"
        raw.append((f"pin/{p.name}", f"{p.name} on {on}", (p.x_mm, p.y_mm), (p.fx_N, p.fy_N)))
    for ld in case.loads:
        raw.append((f"load/{ld.name}", f"load {ld.name}", (ld.x_mm, ld.y_mm), (ld.fx_N, ld.fy_N)))
    for sp in case.springs:
        for i, e in enumerate(sp.ends):
            raw.append((f"spring/{sp.name}/{i}", f"spring {sp.name}", e.at_mm, e.force_N))
    for g in case.guides:
        raw.append((f"guide/{g.name}", f"{g.name} on {g.rod}", g.at_mm, g.force_N))
    pins = {p.name: p.center for p in mech.pins}
    for b in case.bands:
        for i, be in enumerate(b.ends):
            side = "T1" if be.tight else "T2"
            raw.append((f"band/{b.name}/{i}", f"{side} {b.name}", pins.get(be.pin, be.tangent_mm), be.pull_N))
    biggest = max((math.hypot(*f) for *_, f in raw), default=0.0)
    if biggest <= 0:
        return [], 0.0
    k = MAX_ARROW_FRACTION * size_mm / biggest
    shortest = MIN_ARROW_FRACTION * size_mm
    out = []
    for ref, label, at, f in raw:
        mag = math.hypot(*f)
        if mag <= ZERO_FORCE_FRACTION * biggest:
            continue
        length = max(k * mag, shortest)
        clipped = k * mag < shortest
        out.append(Arrow(ref, f"{label} {force_text(mag)}{' *' if clipped else ''}", at, f, length, clipped))
    return out, k


def _skeleton_mm(mech: Mechanism, case: CaseSolution) -> tuple[list[tuple[Point, Point, float]], list[Point]]:
    """The skeleton's lines [mm] (with a weight) and the points it covers."""
    lines: list[tuple[Point, Point, float]] = []
    for part in mech.parts:
        lines += [(a, b, 2.0) for a, b in part.segments]
    for s in mech.shoes:
        lines += _arc_lines(s.arc.center, s.arc.radius_mm, s.arc.start_deg, s.arc.end_deg, 5.0)
    for band in mech.bands:
        lines += _arc_lines(band.center, band.radius_mm, band.start_deg, band.end_deg, 3.0)
    pins = {p.name: p.center for p in mech.pins}
    for b in case.bands:
        lines += [(e.tangent_mm, pins[e.pin], 3.0) for e in b.ends if e.pin in pins]
    for sp in mech.springs:
        lines += _zigzag(*sp.ends)
    if mech.drum is not None:
        d = mech.drum
        lines += _arc_lines(d.center, d.radius_mm, 0.0, 360.0, 1.5)
    pts = [q for a, b, _ in lines for q in (a, b)] + [p.center for p in mech.pins]
    return lines, pts


def _arc_lines(c: Point, r: float, a0: float, a1: float, w: float, n: int = 48) -> list[tuple[Point, Point, float]]:
    span = (a1 - a0) % 360.0 or 360.0
    pts = [
        (c[0] + r * math.cos(math.radians(a0 + span * i / n)), c[1] + r * math.sin(math.radians(a0 + span * i / n)))
        for i in range(n + 1)
    ]
    return [(pts[i], pts[i + 1], w) for i in range(n)]


def _zigzag(a: Point, b: Point, turns: int = 6) -> list[tuple[Point, Point, float]]:
    length = math.dist(a, b)
    if length <= 0:
        return []
    ux, uy = (b[0] - a[0]) / length, (b[1] - a[1]) / length
    amp = 0.06 * length
    pts = [a]
    for i in range(1, 2 * turns):
        t = (i / (2 * turns)) * 0.8 + 0.1
        side = amp if i % 2 else -amp
        pts.append((a[0] + ux * length * t - uy * side, a[1] + uy * length * t + ux * side))
    pts.append(b)
    return [(pts[i], pts[i + 1], 1.5) for i in range(len(pts) - 1)]


def _rotation_mm(mech: Mechanism, case: CaseSolution) -> list[Point]:
    """The drum's direction as points on an arc inside the drum [mm], in
    the direction of rotation (the last point is the arrow's tip)."""
    if mech.drum is None:
        return []
    c, r = mech.drum.center, 0.55 * mech.drum.radius_mm
    sense = -1.0 if str(case.direction) == "cw" else 1.0
    start = 120.0 if sense < 0 else 60.0
    return [
        (
            c[0] + r * math.cos(math.radians(start + sense * 60 * i / 24)),
            c[1] + r * math.sin(math.radians(start + sense * 60 * i / 24)),
        )
        for i in range(25)
    ]


@record(frozen=True)
class _Frame:
    """Model [mm] to picture [px]: x right, y down."""

    x0: float
    y1: float
    s: float

    def px(self, p: Point) -> Point:
        return ((p[0] - self.x0) * self.s, (self.y1 - p[1]) * self.s)


def plan_figure(mech: Mechanism, case: CaseSolution, title: str) -> Figure:
    """Lay out the picture of ``case``: skeleton, arrows, labels."""
    lines_mm, pts = _skeleton_mm(mech, case)
    size = mech.length_scale_mm or max(1.0, max((math.dist(pts[0], q) for q in pts), default=1.0))
    arrows, k = _arrows(mech, case, size)
    allp = pts + [a.tip_mm for a in arrows] + [a.at_mm for a in arrows]
    xs, ys = [p[0] for p in allp] or [0.0], [p[1] for p in allp] or [0.0]
    width = max(max(xs) - min(xs), max(ys) - min(ys), 1e-9)
    fr = _Frame(min(xs), max(ys), CANVAS_PX / width)
    note = (
        f"arrows: 1 kN = {1000 * k * fr.s:.3g} px ({1000 * k:.3g} mm of drawing); "
        f"* drawn at the shortest length ({MIN_ARROW_FRACTION * size * fr.s:.3g} px), not to scale"
        if k
        else "no forces"
    )
    fig = Figure(title, note)
    fig.lines = [(fr.px(a), fr.px(b), w) for a, b, w in lines_mm]
    for p in mech.pins:
        fig.circles.append((fr.px(p.center), max(3.0, 0.5 * p.diameter_mm * fr.s), p.grounded))
        if p.grounded:
            fig.grounds.append(fr.px(p.center))
    if mech.drum is not None:
        fig.circles.append((fr.px(mech.drum.center), 3.0, True))
    fig.arrows, fig.applied = stagger([(a, fr.px(a.at_mm), fr.px(a.tip_mm)) for a in arrows])
    if any(how != "from" for _, how in fig.applied):
        fig.scale_note += "; two forces at one point the same way: one drawn from the point, the other onto it"
    fig.rotation = [fr.px(p) for p in _rotation_mm(mech, case)]
    _place_labels(fig, mech, case, fr)
    return fig


def _coincide(a: tuple[Point, Point], b: tuple[Point, Point]) -> bool:
    """Whether two arrows (tail, tip) [px] start at one point the same way."""
    if math.dist(a[0], b[0]) > COINCIDENT_PX:
        return False
    ta = math.atan2(a[1][1] - a[0][1], a[1][0] - a[0][0])
    tb = math.atan2(b[1][1] - b[0][1], b[1][0] - b[0][0])
    return abs(math.degrees(math.remainder(ta - tb, math.tau))) < COINCIDENT_DEG


def _staggered(tail: Point, tip: Point, k: int) -> tuple[Point, Point, str]:
    """The ``k``-th arrow (from 0) of a group that start at one point the
    same way: 0 from the point, 1 onto it; from the third on, beside the
    pair, :data:`STAGGER_PX` apart on alternate sides (1, -1, 2, -2 ...
    spacings), pulling and pushing in turn."""
    dx, dy = tip[0] - tail[0], tip[1] - tail[1]
    if k == 0:
        return tail, tip, "from"
    if k == 1:
        return (tail[0] - dx, tail[1] - dy), tail, "onto"
    m = k - 2
    side = STAGGER_PX * (m // 2 + 1) * (1 if m % 2 == 0 else -1)
    n = math.hypot(dx, dy) or 1.0
    t0 = (tail[0] - dy / n * side, tail[1] + dx / n * side)
    if m % 2 == 1:  # pushing: the head beside the point
        t0 = (t0[0] - dx, t0[1] - dy)
    return t0, (t0[0] + dx, t0[1] + dy), "beside"


def stagger(
    arrows: list[tuple[Arrow, Point, Point]],
) -> tuple[list[tuple[Arrow, Point, Point]], list[tuple[Point, str]]]:
    """The arrows (arrow, tail, tip [px]) with coincident ones staggered
    (:func:`_staggered`), and each one's point of application [px] with how
    it is drawn there.  Every arrow keeps its length and direction."""
    out: list[tuple[Arrow, Point, Point]] = []
    applied: list[tuple[Point, str]] = []
    groups: list[list[tuple[Point, Point]]] = []
    for arrow, tail, tip in arrows:
        group = next((g for g in groups if _coincide(g[0], (tail, tip))), None)
        if group is None:
            group = []
            groups.append(group)
        group.append((tail, tip))
        t0, t1, how = _staggered(tail, tip, len(group) - 1)
        out.append((arrow, t0, t1))
        applied.append((tail, how))
    return out, applied


# --- label placement ---------------------------------------------------------

Box = tuple[float, float, float, float]  # x, y, width, height [px]


def _box_size(text: str) -> tuple[float, float]:
    return CHAR_EM * FONT_PX * len(text) + 6.0, 1.35 * FONT_PX


def boxes_overlap(a: Box, b: Box) -> bool:
    """True when two boxes share more than their edges."""
    return a[0] < b[0] + b[2] and b[0] < a[0] + a[2] and a[1] < b[1] + b[3] and b[1] < a[1] + a[3]


def _crosses(a: Point, b: Point, box: Box) -> bool:
    """Whether segment a-b meets the box (Liang-Barsky clipping)."""
    x0, y0 = a
    dx, dy = b[0] - a[0], b[1] - a[1]
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, x0 - box[0]), (dx, box[0] + box[2] - x0), (-dy, y0 - box[1]), (dy, box[1] + box[3] - y0)):
        if p == 0:
            if q < 0:
                return False
            continue
        t = q / p
        if p < 0:
            t0 = max(t0, t)
        else:
            t1 = min(t1, t)
        if t0 > t1:
            return False
    return True


def _candidates(anchor: Point, w: float, h: float, ring: int) -> Iterable[Box]:
    d = 4.0 + ring * RING_STEP_PX
    n = 8 if ring < 2 else 16
    for i in range(n):
        t = 2 * math.pi * i / n
        cx = anchor[0] + math.cos(t) * (d + w / 2)
        cy = anchor[1] - math.sin(t) * (d + h / 2)
        yield (cx - w / 2, cy - h / 2, w, h)


def _cost(box: Box, placed: list[Box], segs: list[tuple[Point, Point]], dots: list[Box], ring: int) -> float:
    """Lines crossed and pins covered (:data:`CROSSING_COST` each) plus the
    ring; infinite when the box overlaps a placed label."""
    if any(boxes_overlap(box, p) for p in placed):
        return math.inf
    m = CLEARANCE_PX
    grown = (box[0] - m, box[1] - m, box[2] + 2 * m, box[3] + 2 * m)
    crossing = sum(1 for a, b in segs if _crosses(a, b, grown))
    covered = sum(1 for d in dots if boxes_overlap(grown, d))
    return CROSSING_COST * (crossing + covered) + ring


def _place(anchor: Point, text: str, placed: list[Box], segs: list[tuple[Point, Point]], dots: list[Box]) -> Box:
    """The best candidate box for a label: the first ring that gives a box
    crossing nothing wins; past :data:`CLEAR_RINGS` rings any box free of
    the other labels does."""
    w, h = _box_size(text)
    best: tuple[float, Box] | None = None
    for ring in range(LABEL_RINGS):
        for box in _candidates(anchor, w, h, ring):
            c = _cost(box, placed, segs, dots, ring)
            if best is None or c < best[0]:
                best = (c, box)
        if best is not None and (best[0] < CROSSING_COST or (ring >= CLEAR_RINGS and math.isfinite(best[0]))):
            break
    assert best is not None and math.isfinite(best[0]), "no free place for a label"  # the outer rings are empty
    return best[1]


def _place_labels(fig: Figure, mech: Mechanism, case: CaseSolution, fr: _Frame) -> None:
    segs = [(a, b) for a, b, _ in fig.lines] + [(t, p) for _, t, p in fig.arrows]
    if len(fig.rotation) > 1:
        segs += list(zip(fig.rotation[:-1], fig.rotation[1:], strict=True))
    dots = [(c[0] - r, c[1] - r, 2 * r, 2 * r) for c, r, _ in fig.circles]
    placed: list[Box] = []
    items: list[tuple[str, Point]] = [(a.label, tip) for a, _, tip in fig.arrows]
    for p in mech.pins:
        items.append((p.name, fr.px(p.center)))
    for m in case.members:
        part = next((q for q in mech.parts if q.name == m.name), None)
        if part is not None and part.segments:
            a, b = part.segments[len(part.segments) // 2]
            mid = fr.px(((a[0] + b[0]) / 2, (a[1] + b[1]) / 2))
            items.append((f"{m.name} {force_text(abs(m.axial_N))} {m.state}", mid))
    if fig.rotation:
        items.append((f"drum {case.direction}", fig.rotation[len(fig.rotation) // 2]))
    for text, anchor in items:
        box = _place(anchor, text, placed, segs, dots)
        placed.append(box)
        far = math.dist(anchor, _nearest(anchor, box)) > LEADER_MIN_PX
        fig.labels.append((text, anchor, box, far))
        if far:
            segs.append((anchor, _nearest(anchor, box)))


def _nearest(p: Point, box: Box) -> Point:
    return (min(max(p[0], box[0]), box[0] + box[2]), min(max(p[1], box[1]), box[1] + box[3]))


# --- SVG -----------------------------------------------------------------------


def _f(x: float) -> str:
    return f"{x:.2f}"


def _bounds(fig: Figure) -> Box:
    xs: list[float] = []
    ys: list[float] = []
    for a, b, _ in fig.lines:
        xs += [a[0], b[0]]
        ys += [a[1], b[1]]
    for _, t, p in fig.arrows:
        xs += [t[0], p[0]]
        ys += [t[1], p[1]]
    for _, _, box, _ in fig.labels:
        xs += [box[0], box[0] + box[2]]
        ys += [box[1], box[1] + box[3]]
    for c, r, _ in fig.circles:
        xs += [c[0] - r, c[0] + r]
        ys += [c[1] - r, c[1] + r + 14]
    if not xs:
        return (0.0, 0.0, 100.0, 100.0)
    return (min(xs), min(ys), max(xs) - min(xs), max(ys) - min(ys))


def _arrow_head(tail: Point, tip: Point, size: float = 10.0) -> str:
    d = math.dist(tail, tip) or 1.0
    ux, uy = (tip[0] - tail[0]) / d, (tip[1] - tail[1]) / d
    bx, by = tip[0] - ux * size, tip[1] - uy * size
    pts = [tip, (bx - uy * size * 0.4, by + ux * size * 0.4), (bx + uy * size * 0.4, by - ux * size * 0.4)]
    return " ".join(f"{_f(x)},{_f(y)}" for x, y in pts)


def _el(parent: ET.Element, tag: str, **attrs: str | float) -> ET.Element:
    """A child element; float attributes with two decimals."""
    return ET.SubElement(
        parent, tag, {k.replace("_", "-"): _f(v) if isinstance(v, float) else v for k, v in attrs.items()}
    )


def _skeleton_svg(svg: ET.Element, fig: Figure) -> None:
    sk = _el(svg, "g", **{"class": "skeleton"}, stroke="black", fill="none", stroke_linecap="round")
    for a, b, wt in fig.lines:
        _el(sk, "line", x1=a[0], y1=a[1], x2=b[0], y2=b[1], stroke_width=wt)
    for c, r, filled in fig.circles:
        _el(sk, "circle", cx=c[0], cy=c[1], r=r, fill="black" if filled else "white", stroke_width=1.5)
    for g in fig.grounds:
        _el(sk, "path", d=f"M{_f(g[0] - 9)},{_f(g[1] + 12)} h18 M{_f(g[0] - 6)},{_f(g[1] + 15)} h12", stroke_width=1.5)
    if len(fig.rotation) > 1:
        rot = _el(svg, "g", **{"class": "rotation"}, stroke="black", fill="none")
        _el(rot, "polyline", points=" ".join(f"{_f(p[0])},{_f(p[1])}" for p in fig.rotation), stroke_width=1.5)
        _el(rot, "polygon", points=_arrow_head(fig.rotation[-2], fig.rotation[-1], 9.0), fill="black")


def _forces_svg(svg: ET.Element, fig: Figure) -> None:
    forces = _el(svg, "g", **{"class": "forces"}, stroke=FORCE_COLOUR, fill=FORCE_COLOUR)
    for (arrow, tail, tip), (at, how) in zip(fig.arrows, fig.applied, strict=True):
        attrs = {
            "class": "force",
            "data-ref": _safe(arrow.ref),
            "data-at": f"{_f(at[0])},{_f(at[1])}",
            "data-drawn": how,
        }
        g = _el(forces, "g", **attrs)
        _el(g, "line", x1=tail[0], y1=tail[1], x2=tip[0], y2=tip[1], stroke_width=2.2)
        _el(g, "polygon", points=_arrow_head(tail, tip), stroke="none")


def _labels_svg(svg: ET.Element, fig: Figure) -> None:
    labels = _el(svg, "g", **{"class": "labels"})
    for text, anchor, box, leader in fig.labels:
        g = _el(labels, "g", **{"class": "label"})
        if leader:
            n = _nearest(anchor, box)
            _el(g, "line", x1=anchor[0], y1=anchor[1], x2=n[0], y2=n[1], stroke="#666", stroke_width=0.8)
        _el(g, "rect", x=box[0], y=box[1], width=box[2], height=box[3], fill="white", fill_opacity=0.85)
        _el(g, "text", x=box[0] + 3, y=box[1] + box[3] - 0.35 * FONT_PX).text = _safe(text)


def svg_element(fig: Figure) -> ET.Element:
    """The picture as an ``<svg>`` element (inline, no external resource)."""
    x, y, w, h = _bounds(fig)
    pad, head = 20.0, 3 * FONT_PX
    vb = (x - pad, y - pad - head, w + 2 * pad, h + 2 * pad + head + 2 * FONT_PX)
    svg = ET.Element("svg", {"xmlns": "http://www.w3.org/2000/svg", "viewBox": " ".join(_f(v) for v in vb)})
    svg.set("class", "figure")
    svg.set("role", "img")
    svg.set("font-family", "DejaVu Sans, Arial, sans-serif")
    svg.set("font-size", _f(FONT_PX))
    ET.SubElement(svg, "title").text = _safe(fig.title)
    _el(svg, "rect", x=vb[0], y=vb[1], width=vb[2], height=vb[3], fill="white")
    title = _el(svg, "text", x=vb[0] + pad, y=vb[1] + 1.6 * FONT_PX, font_weight="bold", **{"class": "title"})
    title.text = _safe(fig.title)
    _skeleton_svg(svg, fig)
    _forces_svg(svg, fig)
    _labels_svg(svg, fig)
    note = _el(
        svg, "text", x=vb[0] + pad, y=vb[1] + vb[3] - 0.6 * FONT_PX, font_size=0.85 * FONT_PX, **{"class": "scale"}
    )
    note.text = fig.scale_note
    return svg


#: Size of a force polygon's drawing [px].
POLYGON_PX = 170.0


def force_polygon(forces: list[tuple[str, Point]]) -> ET.Element:
    """The force polygon of one part: its forces ``(name, vector [N])``
    drawn tip to tail in the order given (numbered as listed), from a ring
    at the start.  Balanced forces close on the ring; the picture draws the
    solver's vectors, it does not check them."""
    pts = [(0.0, 0.0)]
    for _, f in forces:
        pts.append((pts[-1][0] + f[0], pts[-1][1] + f[1]))
    span = max(max(p[0] for p in pts) - min(p[0] for p in pts), max(p[1] for p in pts) - min(p[1] for p in pts))
    s = POLYGON_PX / span if span > 0 else 1.0
    x0, y1 = min(p[0] for p in pts), max(p[1] for p in pts)
    px = [((p[0] - x0) * s, (y1 - p[1]) * s) for p in pts]
    pad = 14.0
    svg = ET.Element("svg", {"xmlns": "http://www.w3.org/2000/svg"})
    svg.set("viewBox", f"{_f(-pad)} {_f(-pad)} {_f(POLYGON_PX + 2 * pad)} {_f(POLYGON_PX + 2 * pad)}")
    svg.set("class", "polygon")
    svg.set("font-family", "DejaVu Sans, Arial, sans-serif")
    svg.set("font-size", "10.00")
    ET.SubElement(svg, "title").text = "force polygon"
    _el(svg, "circle", cx=px[0][0], cy=px[0][1], r=4.0, fill="none", stroke="black", stroke_width=1.0)
    g = _el(svg, "g", stroke=FORCE_COLOUR, fill=FORCE_COLOUR)
    for k, (tail, tip) in enumerate(itertools.pairwise(px)):
        if math.dist(tail, tip) < 1e-9:
            continue
        a = _el(g, "g", **{"class": "force", "data-ref": _safe(forces[k][0])})
        _el(a, "line", x1=tail[0], y1=tail[1], x2=tip[0], y2=tip[1], stroke_width=1.6)
        _el(a, "polygon", points=_arrow_head(tail, tip, 7.0), stroke="none")
        mid = ((tail[0] + tip[0]) / 2, (tail[1] + tip[1]) / 2)
        _el(svg, "text", x=mid[0] + 3, y=mid[1] - 3, fill="black").text = str(k + 1)
    return svg


#: Size of a part's bending moment diagram: width and height [px].
MOMENT_W_PX = 360.0
MOMENT_H_PX = 110.0


def moment_diagram(part: str, stations: Sequence[Station]) -> ET.Element:
    """A part's bending moment along its centreline, drawn from the solve's
    stations: the segments side by side in their order (each as long as it
    is drawn, at one scale), the moment at each station plotted up when
    counter-clockwise positive (the result's sign), joined by straight lines
    (the moment is linear between stations), over a zero line; the largest
    moment labelled.  No value is computed here but where to draw it."""
    segs: dict[int, list[Station]] = {}
    for st in stations:
        segs.setdefault(st.segment, []).append(st)
    lengths = {k: math.dist(sts[0].start_mm, sts[0].end_mm) for k, sts in segs.items()}
    total = sum(lengths.values()) or 1.0
    biggest = max((abs(st.moment_Nmm) for st in stations), default=0.0)
    sx = MOMENT_W_PX / total
    sy = 0.5 * MOMENT_H_PX / biggest if biggest > 0 else 0.0
    zero = 0.5 * MOMENT_H_PX
    pad = 16.0
    svg = ET.Element("svg", {"xmlns": "http://www.w3.org/2000/svg"})
    svg.set("viewBox", f"{_f(-pad)} {_f(-pad)} {_f(MOMENT_W_PX + 2 * pad)} {_f(MOMENT_H_PX + 2.6 * pad)}")
    svg.set("class", "moment")
    svg.set("font-family", "DejaVu Sans, Arial, sans-serif")
    svg.set("font-size", "9.00")
    ET.SubElement(svg, "title").text = _safe(f"bending moment, {part}")
    _el(svg, "line", x1=0.0, y1=zero, x2=MOMENT_W_PX, y2=zero, stroke="black", stroke_width=0.8, **{"class": "zero"})
    x0 = 0.0
    peak: tuple[float, Point] | None = None
    for k, sts in segs.items():
        pts = [(x0 + math.dist(st.start_mm, st.at_mm) * sx, zero - st.moment_Nmm * sy) for st in sts]
        ring = [(pts[0][0], zero), *pts, (pts[-1][0], zero)]
        _el(svg, "polygon", points=" ".join(f"{_f(x)},{_f(y)}" for x, y in ring), fill="#f3c7cd", stroke="none")
        line = _el(svg, "polyline", points=" ".join(f"{_f(x)},{_f(y)}" for x, y in pts), fill="none")
        line.set("stroke", FORCE_COLOUR)
        line.set("stroke-width", "1.40")
        line.set("class", "moment-line")
        line.set("data-segment", str(k))
        _el(svg, "line", x1=x0, y1=zero - 4, x2=x0, y2=zero + 4, stroke="#666", stroke_width=0.8)
        _el(svg, "text", x=x0 + 2, y=MOMENT_H_PX + 1.6 * pad, fill="#444").text = f"s{k}"
        for st, p in zip(sts, pts, strict=True):
            if peak is None or abs(st.moment_Nmm) > abs(peak[0]):
                peak = (st.moment_Nmm, p)
        x0 += lengths[k] * sx
    if peak is not None:
        m, p = peak
        y = p[1] - 4 if m >= 0 else p[1] + 11
        label = _el(svg, "text", x=min(p[0], MOMENT_W_PX - 70), y=y, fill="black")
        label.text = f"M = {m / 1000:.4g} N·m"
    return svg
