"""Draft a brake as a designer would, from its skeleton (a :class:`Sketch`),
with no skeleton role layers: the test and demo drawings of
:mod:`dxfcheck.infer`.

Styles (see the README's "Drafted drawings" section):

* ``outlines`` (style 2): each part a closed outline around its
  centreline (a polyline; a straight rod between two pins as two parallel
  lines with an eye arc at each end), a hole circle in every part a pin
  joins, a centre mark on each pin; a shoe's outline takes in its lining,
  whose face is also drawn as an arc on layer ``LINING``; each pivot's hole
  also in a hatched frame bracket.
* ``blocks`` (style 1): each part a block (its outline, its holes, its
  lining face) inserted turned and, every other one, mirrored, its contents
  drawn on layer 0 so they take the reference's layer; a part that is the
  mirror image of an earlier one (about the drum's vertical axis) is that
  part's block inserted mirrored; the frame (hatched brackets with the
  pivots' holes) a block of its own; a pin block (a circle and its centre
  mark) at every pin that joins moving parts; the drum in model space.
* ``centrelines`` (style 3): each centreline piece a centre line (layer
  ``CL``, linetype CENTER by layer; every other piece on ``AXES`` with its
  own DASHDOT linetype); each pin a hole circle with a boss circle around it
  and a centre mark; each pivot also a hatched ground mark touching its
  boss; the drum its braking circle with hub and shaft circles and a centre
  mark; each shoe its lining face (an arc on the drum) with the backing
  plate's arc and the two ends.

Loads, springs, bands and labels stay on their role layers (a drawing
rarely shows them otherwise).  ``clutter`` adds what a real sheet carries:
a border and title text, a linear dimension, hidden lines through the
mechanism and a bolt hole in the title block.
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass
from typing import Any

from dxfcheck.core.geometry import Affine, Point
from dxfcheck.core.records import record
from dxfcheck.mechanism import build_mechanism
from dxfcheck.output.sketch import Sketch, _write_arc, _write_circle, _write_path, _write_text
from dxfcheck.read.drawing import read_drawing

__all__ = [
    "BACKING_FACTOR",
    "BOSS_FACTOR",
    "LINING_FRACTION",
    "PLAIN_HALF_WIDTH_MM",
    "STYLES",
    "draft",
    "save_drafted",
]

#: Boss circle around a hole: this many times the hole's radius.
BOSS_FACTOR = 1.8
#: Backing plate arc: this many times the drum radius.
BACKING_FACTOR = 1.06
#: The drafting styles :func:`draft` knows.
STYLES = ("centrelines", "outlines", "blocks")
#: Lining thickness: this fraction of the drum radius.
LINING_FRACTION = 0.06
#: Half width of a part without pins [mm].
PLAIN_HALF_WIDTH_MM = 12.0
#: Linetypes made: name -> ([total length, dash, gap, ...], description).
_LINETYPES = {
    "CENTER": ([50.0, 32.0, -6.0, 6.0, -6.0], "Center ____ _ ____ _"),
    "DASHDOT": ([25.0, 12.5, -6.0, 0.0, -6.0], "Dash dot __ . __ ."),
    "HIDDEN": ([9.0, 6.0, -3.0], "Hidden __ __ __"),
}
_KEPT = ("load", "label", "band", "spring")
_LAYERS = {"CL": "CENTER", "AXES": "CONTINUOUS", "PARTS": "CONTINUOUS", "HATCH": "CONTINUOUS", "HIDDEN": "HIDDEN"}


@dataclass
class _Sheet:
    doc: Any
    msp: Any
    sk: Sketch
    n_links: int = 0

    def layer(self, role: str) -> str:
        return self.sk.layers.get(role, role.upper())

    def circle(self, c: Point, r: float, layer: str = "PARTS") -> None:
        self.msp.add_circle(c, r, dxfattribs={"layer": layer})

    def line(self, a: Point, b: Point, layer: str, **more: str) -> None:
        self.msp.add_line(a, b, dxfattribs={"layer": layer, **more})

    def centre_mark(self, c: Point, half: float) -> None:
        self.line((c[0] - half, c[1]), (c[0] + half, c[1]), "CL")
        self.line((c[0], c[1] - half), (c[0], c[1] + half), "CL")


def _new_sheet(sk: Sketch) -> _Sheet:
    doc = sk._new_doc("R2010")
    for name, (pattern, text) in _LINETYPES.items():
        doc.linetypes.add(name, pattern=pattern, description=text)
    for name, lt_name in _LAYERS.items():
        doc.layers.add(name, linetype=lt_name)
    return _Sheet(doc, doc.modelspace(), sk)


def _pin(sh: _Sheet, c: Point, r: float, grounded: bool) -> None:
    boss = BOSS_FACTOR * r
    sh.circle(c, r)
    sh.circle(c, boss)
    sh.centre_mark(c, 1.3 * boss)
    if grounded:
        _ground(sh, c, boss)


def _ground(sh: _Sheet, c: Point, boss: float) -> None:
    """A hatched ground block touching the boss, on the side (down, up,
    left, right) farthest from every other hole."""
    others = [it[2] for it in sh.sk.items if it[0] == "circle" and it[1] in ("pin", "pivot") and it[2] != c]
    sides = ((0.0, -1.0), (0.0, 1.0), (-1.0, 0.0), (1.0, 0.0))

    def clearance(u: Point) -> float:
        mid = (c[0] + 1.4 * boss * u[0], c[1] + 1.4 * boss * u[1])
        return min((math.dist(mid, o) for o in others), default=math.inf)

    u = max(sides, key=clearance)
    v = (-u[1], u[0])
    near, far = boss, 1.8 * boss
    corners = [
        (c[0] + d * u[0] + w * v[0], c[1] + d * u[1] + w * v[1])
        for d, w in ((near, -2 * boss), (far, -2 * boss), (far, 2 * boss), (near, 2 * boss))
    ]
    hatch = sh.msp.add_hatch(color=8, dxfattribs={"layer": "HATCH"})
    hatch.set_pattern_fill("ANSI31", scale=0.5)
    hatch.paths.add_polyline_path(corners, is_closed=True)
    sh.line(corners[0], corners[3], "PARTS")


def _drum(sh: _Sheet, c: Point, r: float) -> None:
    sh.circle(c, r)
    sh.circle(c, 0.4 * r)  # hub
    sh.circle(c, 0.2 * r)  # shaft
    sh.centre_mark(c, 1.15 * r)


def _shoe(sh: _Sheet, c: Point, r: float, a0: float, a1: float) -> None:
    sh.msp.add_arc(c, r, a0, a1, dxfattribs={"layer": "PARTS"})
    rb = BACKING_FACTOR * r
    sh.msp.add_arc(c, rb, a0, a1, dxfattribs={"layer": "PARTS"})
    for a in (math.radians(a0), math.radians(a1)):
        u = (math.cos(a), math.sin(a))
        sh.line((c[0] + r * u[0], c[1] + r * u[1]), (c[0] + rb * u[0], c[1] + rb * u[1]), "PARTS")


def _link(sh: _Sheet, points: tuple[Point, ...]) -> None:
    """A centre line: on ``CL`` (CENTER by layer), or every other one on
    ``AXES`` with its own DASHDOT linetype."""
    attribs = {"layer": "CL"} if sh.n_links % 2 == 0 else {"layer": "AXES", "linetype": "DASHDOT"}
    sh.n_links += 1
    if len(points) == 2:
        sh.msp.add_line(points[0], points[1], dxfattribs=attribs)
    else:
        sh.msp.add_lwpolyline(points, dxfattribs=attribs)


def _clutter(sh: _Sheet) -> None:
    """Border, title, a dimension, hidden lines and a bolt hole."""
    from ezdxf.bbox import extents

    box = extents(sh.msp)
    (x0, y0), (x1, y1) = (box.extmin.x - 150, box.extmin.y - 250), (box.extmax.x + 150, box.extmax.y + 150)
    corners = [(x0, y0), (x1, y0), (x1, y1), (x0, y1)]
    sh.msp.add_lwpolyline(corners, close=True, dxfattribs={"layer": "BORDER"})
    sh.msp.add_text("TARNBECK QUARRY - BRAKE ASSEMBLY", height=12, dxfattribs={"layer": "TITLE"}).set_placement(
        (x0 + 20, y0 + 40)
    )
    sh.circle((x1 - 40, y0 + 40), 6.0, "TITLE")  # a bolt hole of the title block: no part reaches it
    sh.line((x0, y0 + 100), (x1, y0 + 100), "TITLE")
    circles = [it for it in sh.sk.items if it[0] == "circle" and it[1] in ("pin", "pivot")]
    if len(circles) >= 2:
        a, b = circles[0][2], circles[1][2]
        dim = sh.msp.add_linear_dim(base=(a[0], max(a[1], b[1]) + 60), p1=a, p2=b, dxfattribs={"layer": "DIM"})
        dim.render()
    if circles:  # a hidden edge through a pin's centre: ignored, though it would join parts
        c = circles[-1][2]
        sh.line((c[0] - 80, c[1] - 30), (c[0] + 80, c[1] + 30), "HIDDEN")
        sh.line((c[0] - 100, c[1]), (c[0] + 100, c[1]), "HIDDEN")


def draft(sk: Sketch, style: str = "centrelines", *, clutter: bool = True) -> Any:
    """An ezdxf document drafting ``sk`` in ``style`` (see :data:`STYLES`)."""
    if style not in STYLES:
        raise ValueError(f"style must be one of {STYLES}, got {style!r}")
    sh = _new_sheet(sk)
    if style == "blocks":
        _blocks(sh, sk)
        if clutter:
            _clutter(sh)
        return sh.doc
    if style == "outlines":
        _outlines(sh, sk)
        if clutter:
            _clutter(sh)
        return sh.doc
    grounded = [it[2] for it in sk.items if it[0] == "circle" and it[1] == "pivot"]
    for it in sk.items:
        kind, role = it[0], it[1]
        if role in _KEPT:
            _write_kept(sh, it)
        elif kind == "circle" and role == "drum":
            _drum(sh, it[2], it[3])
        elif kind == "circle":
            _pin(sh, it[2], it[3], it[2] in grounded)
        elif kind == "arc":
            _shoe(sh, it[2], it[3], it[4], it[5])
        elif kind == "path":
            _link(sh, tuple(it[2]))
    if clutter:
        _clutter(sh)
    return sh.doc


def _write_kept(sh: _Sheet, it: tuple[Any, ...]) -> None:
    """A load, label, band or spring item on its role layer, as the sketch
    writes it."""
    attribs = {"layer": sh.layer(it[1])}
    if it[0] == "arc":
        _write_arc(sh.msp, it, Affine(), 1.0, False, attribs)
    elif it[0] == "path":
        _write_path(sh.msp, it, Affine(), "R2010", attribs)
    elif it[0] == "text":
        _write_text(sh.msp, it, Affine(), 1.0, attribs)


def save_drafted(sk: Sketch, path: str | os.PathLike[str], style: str = "centrelines", *, clutter: bool = True) -> None:
    """Write :func:`draft`'s document to ``path``."""
    draft(sk, style, clutter=clutter).saveas(os.fspath(path))


# --- style 2: outlines ------------------------------------------------------


def _mechanism_of(sk: Sketch) -> Any:
    """The mechanism the sketch's skeleton reads as (which pin joins which
    part, which part carries which shoe)."""
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "skeleton.dxf"
        sk.save(path)
        return build_mechanism(read_drawing(path))


def _outlines(sh: _Sheet, sk: Sketch) -> None:
    """Holes (pin order), part outlines (part order), lining faces, frame
    brackets, then the kept roles."""
    mech = _mechanism_of(sk)
    if mech.drum is not None:
        _drum(sh, mech.drum.center, mech.drum.radius_mm)
    joins = {pin.center: len(pin.parts) for pin in mech.pins}
    holes = [(it[2], it[3], it[1] == "pivot") for it in sk.items if it[0] == "circle" and it[1] in ("pin", "pivot")]
    for c, r, _ in holes:  # one hole in each part the pin joins (in the frame only: a spring's anchor)
        for _ in range(max(1, joins.get(c, 1))):
            sh.circle(c, r)
        sh.centre_mark(c, 1.5 * r)
    radius = {p.name: p.diameter_mm / 2 for p in mech.pins}
    for part in mech.parts:
        half = BOSS_FACTOR * max((radius[n] for n in part.pins), default=PLAIN_HALF_WIDTH_MM / BOSS_FACTOR)
        shoe = next((s for s in mech.shoes if s.part == part.name), None)
        if shoe is None and len(part.segments) == 1 and len(part.pins) == 2:
            _rod(sh, part.segments[0], half)
            continue
        _outline(sh, part.segments, half, shoe)
    for s in mech.shoes:
        sh.msp.add_arc(s.arc.center, s.arc.radius_mm, s.arc.start_deg, s.arc.end_deg, dxfattribs={"layer": "LINING"})
    for c, r, grounded in holes:
        if grounded:
            _bracket(sh, c, 2.5 * r)
    for it in sk.items:
        if it[1] in _KEPT:
            _write_kept(sh, it)


def _outline(sh: _Sheet, segments: Any, half: float, shoe: Any) -> None:
    """A part's outline written as one closed polyline."""
    sh.msp.add_lwpolyline(_outline_points(segments, half, shoe), close=True, dxfattribs={"layer": "PARTS"})


def _outline_points(segments: Any, half: float, shoe: Any) -> list[Point]:
    """A part's outline: the union of its segments widened by ``half``
    and, for a shoe's part, its lining."""
    import shapely

    shapes = [shapely.LineString(seg).buffer(half, quad_segs=8) for seg in segments]
    if shoe is not None:
        shapes.append(_lining(shoe))
    poly = shapely.unary_union(shapes)
    if poly.geom_type != "Polygon":
        poly = poly.convex_hull
    return [(float(x), float(y)) for x, y in poly.exterior.coords[:-1]]


def _lining(shoe: Any) -> Any:
    """The lining and its plate as a polygon: between the drum radius and
    :data:`LINING_FRACTION` of it outward (inward for an internal shoe)."""
    import shapely

    a = shoe.arc
    r0 = a.radius_mm
    r1 = r0 * (1 - LINING_FRACTION) if shoe.internal else r0 * (1 + LINING_FRACTION)
    n = max(2, math.ceil(a.span_deg / 0.25))
    angles = [math.radians(a.start_deg + a.span_deg * k / n) for k in range(n + 1)]
    inner = [(a.center[0] + r0 * math.cos(t), a.center[1] + r0 * math.sin(t)) for t in angles]
    outer = [(a.center[0] + r1 * math.cos(t), a.center[1] + r1 * math.sin(t)) for t in reversed(angles)]
    return shapely.Polygon(inner + outer)


def _rod(sh: _Sheet, seg: tuple[Point, Point], half: float) -> None:
    """A straight rod between two pins: two parallel lines and an eye (a
    half circle of radius ``half``) round each pin."""
    (x0, y0), (x1, y1) = seg
    ang = math.degrees(math.atan2(y1 - y0, x1 - x0))
    nx, ny = -math.sin(math.radians(ang)) * half, math.cos(math.radians(ang)) * half
    sh.line((x0 + nx, y0 + ny), (x1 + nx, y1 + ny), "PARTS")
    sh.line((x0 - nx, y0 - ny), (x1 - nx, y1 - ny), "PARTS")
    sh.msp.add_arc((x1, y1), half, ang - 90, ang + 90, dxfattribs={"layer": "PARTS"})
    sh.msp.add_arc((x0, y0), half, ang + 90, ang + 270, dxfattribs={"layer": "PARTS"})


def _bracket(sh: _Sheet, c: Point, half: float) -> None:
    """A square frame bracket round a pivot's hole, hatched."""
    corners = [
        (c[0] - half, c[1] - half),
        (c[0] + half, c[1] - half),
        (c[0] + half, c[1] + half),
        (c[0] - half, c[1] + half),
    ]
    sh.msp.add_lwpolyline(corners, close=True, dxfattribs={"layer": "PARTS"})
    hatch = sh.msp.add_hatch(color=8, dxfattribs={"layer": "HATCH"})
    hatch.set_pattern_fill("ANSI31", scale=0.5)
    hatch.paths.add_polyline_path(corners, is_closed=True)


# --- style 1: blocks --------------------------------------------------------

#: Turn of the ``i``-th part's block reference: a base plus a step per part
#: [degrees] (any values: the parts must read the same however placed).
BLOCK_TURN_DEG = (17.0, 31.0)


@record(frozen=True)
class _PartDraft:
    """A part's world geometry: outline points, holes (centre, radius), the
    lining face arc (centre, radius, start, end) or None."""

    outline: tuple[Point, ...]
    holes: tuple[tuple[Point, float], ...]
    lining: tuple[Point, float, float, float] | None


def _part_drafts(mech: Any, sk: Sketch) -> list[_PartDraft]:
    radius = {p.name: p.diameter_mm / 2 for p in mech.pins}
    centre = {p.name: p.center for p in mech.pins}
    out = []
    for part in mech.parts:
        half = BOSS_FACTOR * max((radius[n] for n in part.pins), default=PLAIN_HALF_WIDTH_MM / BOSS_FACTOR)
        shoe = next((s for s in mech.shoes if s.part == part.name), None)
        lining = (shoe.arc.center, shoe.arc.radius_mm, shoe.arc.start_deg, shoe.arc.end_deg) if shoe else None
        holes = tuple((centre[n], radius[n]) for n in part.pins)
        out.append(_PartDraft(tuple(_outline_points(part.segments, half, shoe)), holes, lining))
    return out


def _mirror_of(a: _PartDraft, b: _PartDraft, axis_x: float) -> bool:
    """Whether ``a`` is ``b`` mirrored about the vertical line x = axis_x."""
    import shapely

    def m(p: Point) -> Point:
        return (2 * axis_x - p[0], p[1])

    pa, pb = shapely.Polygon(a.outline), shapely.Polygon([m(q) for q in b.outline])
    if pa.symmetric_difference(pb).area > 1e-9 * pa.area:
        return False
    key = sorted((round(c[0], 6), round(c[1], 6), round(r, 6)) for c, r in a.holes)
    if key != sorted((round(m(c)[0], 6), round(m(c)[1], 6), round(r, 6)) for c, r in b.holes):
        return False
    if (a.lining is None) != (b.lining is None):
        return False
    if a.lining and b.lining:
        la, lb = a.lining, b.lining
        span_a, span_b = (la[3] - la[2]) % 360, (lb[3] - lb[2]) % 360
        return abs(la[1] - lb[1]) < 1e-9 and abs(span_a - span_b) < 1e-9
    return True


def _blocks(sh: _Sheet, sk: Sketch) -> None:
    mech = _mechanism_of(sk)
    if mech.drum is not None:
        _drum(sh, mech.drum.center, mech.drum.radius_mm)
    axis_x = mech.drum.center[0] if mech.drum else 0.0
    drafts = _part_drafts(mech, sk)
    placed: list[tuple[str, Affine]] = []
    for i, d in enumerate(drafts):
        twin = next((j for j in range(i) if _mirror_of(d, drafts[j], axis_x)), None)
        if twin is not None:
            name, a = placed[twin]
            a = Affine.translation(2 * axis_x, 0.0) @ Affine.scaling(-1.0, 1.0) @ a
        else:
            name = f"PART{i + 1}"
            turn = BLOCK_TURN_DEG[0] + BLOCK_TURN_DEG[1] * i
            a = Affine.translation(*d.outline[0]) @ Affine.rotation(turn) @ Affine.scaling(-1.0 if i % 2 else 1.0, 1.0)
            _part_block(sh, name, d, _inverse(a))
        placed.append((name, a))
        _insert(sh, name, a, "PARTS")
    _frame_block(sh, sk)
    _pin_blocks(sh, mech)
    for it in sk.items:
        if it[1] in _KEPT:
            _write_kept(sh, it)


def _part_block(sh: _Sheet, name: str, d: _PartDraft, to_local: Affine) -> None:
    """The block of a part, in its own frame, on layer 0."""
    blk = sh.doc.blocks.new(name)
    attribs = {"layer": "0"}
    blk.add_lwpolyline([to_local.apply(p) for p in d.outline], close=True, dxfattribs=attribs)
    for c, r in d.holes:
        _write_circle(blk, ("circle", "", c, r), to_local, 1.0, attribs)
    if d.lining is not None:
        c, r, a0, a1 = d.lining
        _write_arc(blk, ("arc", "", c, r, a0, a1), to_local, 1.0, to_local.mirrors, attribs)


def _insert(sh: _Sheet, name: str, a: Affine, layer: str) -> None:
    """An INSERT whose map is the similarity ``a`` (a rotation, an optional
    mirror in x, a translation)."""
    sx = -1.0 if a.mirrors else 1.0
    rot = math.degrees(math.atan2(a.d * sx, a.a * sx))  # the first column is sx·(cos rot, sin rot)
    sh.msp.add_blockref(name, (a.c, a.f), dxfattribs={"rotation": rot, "xscale": sx, "yscale": 1.0, "layer": layer})


def _frame_block(sh: _Sheet, sk: Sketch) -> None:
    """The frame: a hatched bracket round every pivot, with its hole."""
    pivots = [(it[2], it[3]) for it in sk.items if it[0] == "circle" and it[1] == "pivot"]
    if not pivots:
        return
    blk = sh.doc.blocks.new("FRAME")
    for c, r in pivots:
        half = 2.5 * r
        corners = [
            (c[0] - half, c[1] - half),
            (c[0] + half, c[1] - half),
            (c[0] + half, c[1] + half),
            (c[0] - half, c[1] + half),
        ]
        blk.add_lwpolyline(corners, close=True, dxfattribs={"layer": "0"})
        hatch = blk.add_hatch(color=8, dxfattribs={"layer": "HATCH"})
        hatch.set_pattern_fill("ANSI31", scale=0.5)
        hatch.paths.add_polyline_path(corners, is_closed=True)
        blk.add_circle(c, r, dxfattribs={"layer": "0"})
    sh.msp.add_blockref("FRAME", (0.0, 0.0), dxfattribs={"layer": "PARTS"})


def _pin_blocks(sh: _Sheet, mech: Any) -> None:
    """A pin block (a circle and its centre mark) at each pin joining two
    or more parts, one block per diameter."""
    for pin in mech.pins:
        if pin.grounded or len(pin.parts) < 2:
            continue
        r = pin.diameter_mm / 2
        name = f"PIN{pin.diameter_mm:g}".replace(".", "_")
        if name not in sh.doc.blocks:
            blk = sh.doc.blocks.new(name)
            blk.add_circle((0.0, 0.0), r, dxfattribs={"layer": "0"})
            blk.add_line((-1.5 * r, 0.0), (1.5 * r, 0.0), dxfattribs={"layer": "CL"})
            blk.add_line((0.0, -1.5 * r), (0.0, 1.5 * r), dxfattribs={"layer": "CL"})
        sh.msp.add_blockref(name, pin.center, dxfattribs={"layer": "PARTS"})


def _inverse(m: Affine) -> Affine:
    det = m.det
    a, b, d, e = m.e / det, -m.b / det, -m.d / det, m.a / det
    return Affine(a, b, -(a * m.c + b * m.f), d, e, -(d * m.c + e * m.f))
