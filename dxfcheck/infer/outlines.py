"""Style 2: parts drawn as closed outlines with their holes (and style 1,
parts as blocks, whose outlines arrive here placed in the world).

* A **contour** is a closed polyline, or lines, arcs and open polylines
  that close (shapely's ``polygonize`` after their ends are snapped within
  the tolerance); hatch boundaries, centre lines and hidden lines are none.
  A contour that holds two or more others whole is a border or a view's
  frame, not a part.
* The **frame** is every contour that is hatched (a hatch covers a point
  inside it), lies on a layer of ``[infer] frame_layers``, or was drawn in a
  block of ``[infer] frame_blocks``; every other contour is a **part**.
* A **hole** (concentric circles, :func:`dxfcheck.infer.roles.holes`) joins
  every part whose contour holds its centre; a band or spring end at it
  counts as one more member.  Held by the frame too, it is a **pivot**;
  else, joining two or more members, a **pin**.  A hole in one part only is
  loose (M236, ignored) when the drawing shows a frame, and a pivot (M233)
  when it shows none.
* Each part becomes one centreline piece through its **key points**: its
  holes, the start of each load and the end of each spring it holds (each
  point given to the part that holds it deepest), and the middle of each
  lining arc on its outline, placed last; in the shortest order (every
  order is tried up to :data:`MAX_ORDERED_POINTS` points, else nearest
  neighbour), so an L-shaped crank reads as its two arms.
* Separately drawn outlines are never joined rigidly.  Where a piece would
  end on another part's piece away from a hole (a pull rod through a lever,
  the spring's end on the lever where the rod crosses it), the piece runs on
  through that point, straight, to its own outline's edge: the two pieces
  cross there, as a skeleton draws a rod through a lever, and crossing
  pieces do not join (:mod:`dxfcheck.mechanism.topology`; the springs step
  gives that spring end to the lever).
* A part with two pins and nothing else is a two-force member in the
  statics; when most of its outline lies off the bar between the pins
  (:data:`BROAD_PART_FRACTION`), it may be a lever whose other attachment
  is not drawn (M238).
"""

from __future__ import annotations

import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any

from dxfcheck.core.config import InferSettings, Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, dist
from dxfcheck.core.records import record
from dxfcheck.infer.centrelines import Inferred, hole_sizes, is_centre
from dxfcheck.infer.linework import ARC_CHORD_DEG, Ink, Linework, RawArc
from dxfcheck.infer.roles import (
    Hole,
    PointIndex,
    drum_of,
    fmt,
    holes,
    infer_finding,
    shoe_arcs,
    tolerance_of,
)
from dxfcheck.read.drawing import CircleGeom, Drawing, PathGeom

__all__ = [
    "BAR_WIDTH_FACTOR",
    "BROAD_PART_FRACTION",
    "MAX_ORDERED_POINTS",
    "Contour",
    "contours",
    "drop_containers",
    "infer_from_parts",
    "infer_outlines",
    "linework_tolerance",
]

#: Parts with at most this many key points have them ordered by trying
#: every order (7! = 5040).
MAX_ORDERED_POINTS = 7
#: A two-pin part's bar: this many times the larger hole's outer radius to
#: each side of the line between the pins.
BAR_WIDTH_FACTOR = 2.5
#: More of a two-pin part's outline than this fraction outside its bar
#: makes it look like a lever (M238).
BROAD_PART_FRACTION = 0.5


@record(frozen=True)
class Contour:
    """A closed outline: its ``polygon`` (shapely), the ``ink`` of its first
    entity, whether it is ``frame``; ``placement``: for a part inserted as a
    block (style 1), the INSERTs that placed it, whose circles are its holes
    whatever the geometry (empty: the holes it holds are its own)."""

    polygon: Any
    ink: Ink
    frame: bool
    placement: str = ""


def _arc_chain(a: RawArc) -> list[Point]:
    span = (a.end_deg - a.start_deg) % 360.0 or 360.0
    n = max(1, math.ceil(span / ARC_CHORD_DEG))
    return [
        (
            a.center[0] + a.radius_mm * math.cos(math.radians(a.start_deg + span * k / n)),
            a.center[1] + a.radius_mm * math.sin(math.radians(a.start_deg + span * k / n)),
        )
        for k in range(n + 1)
    ]


def _snap(chains: list[tuple[list[Point], Ink]], tol: float) -> list[tuple[list[Point], Ink]]:
    """Chains with their ends moved onto one another within ``tol``."""
    ends = [c[0][i] for c in chains for i in (0, -1)]
    rep: list[Point] = []
    for k, (p, near) in enumerate(zip(ends, PointIndex(ends).near_all(ends, tol), strict=True)):
        rep.append(ends[near[0]] if near and near[0] < k else p)
    return [([rep[2 * i], *pts[1:-1], rep[2 * i + 1]], ink) for i, (pts, ink) in enumerate(chains)]


def contours(lw: Linework, settings: InferSettings, tol: float) -> list[Contour]:
    """The closed outlines of the linework, in drawing order (of each
    one's first entity), without containers."""
    import shapely

    solid = [p for p in lw.paths if not p.hatch and not is_centre(p.ink, settings) and _outline_layer(p.ink, settings)]
    polys: list[tuple[Any, Ink]] = []
    for p in solid:
        if p.closed and len(p.points) >= 4:
            poly = shapely.Polygon(p.points)
            polys.append((poly if poly.is_valid else poly.buffer(0), p.ink))
    pieces = [(list(p.points), p.ink) for p in solid if not p.closed]
    pieces += [(_arc_chain(a), a.ink) for a in lw.arcs if not is_centre(a.ink, settings)]
    pieces = _snap(pieces, tol) if pieces else []
    if pieces:
        lines = [shapely.LineString(pts) for pts, _ in pieces]
        tree = shapely.STRtree(lines)
        for poly in shapely.get_parts(shapely.polygonize(lines)):
            hits = tree.query(poly.exterior, predicate="covers")
            inks = [pieces[int(i)][1] for i in hits] or [pieces[0][1]]
            polys.append((shapely.Polygon(poly.exterior), min(inks, key=lambda k: k.seq)))
    polys.sort(key=lambda pi: pi[1].seq)  # drawing order of each outline's first entity
    hatched = [shapely.Polygon(p.points) for p in lw.paths if p.hatch and len(p.points) >= 4]
    hatch_tree = shapely.STRtree(hatched) if hatched else None
    out = []
    for poly, ink in polys:
        frame = ink.layer in settings.frame_layers or (ink.block or "") in settings.frame_blocks
        if not frame and hatch_tree is not None:
            frame = len(hatch_tree.query(poly.representative_point(), predicate="within")) > 0
        out.append(Contour(poly, ink, frame))
    return drop_containers(out)


def _outline_layer(ink: Ink, settings: InferSettings) -> bool:
    return not settings.outline_layers or ink.layer in settings.outline_layers or ink.layer in settings.frame_layers


def drop_containers(cons: Sequence[Contour]) -> list[Contour]:
    """Drop the contours that hold two or more others whole (a border, a
    view's frame)."""
    import shapely

    if not cons:
        return []
    tree = shapely.STRtree([c.polygon for c in cons])
    out = []
    for i, c in enumerate(cons):
        inside = [int(j) for j in tree.query(c.polygon, predicate="contains_properly") if int(j) != i]
        if len(inside) < 2:
            out.append(c)
    return out


def _member_ends(drawing: Drawing) -> list[Point]:
    return [q for p in drawing.paths if p.role in (Role.BAND, Role.SPRING) for q in (p.points[0], p.points[-1])]


def _force_points(drawing: Drawing) -> list[Point]:
    """Where loads start and springs end: each must lie on its part."""
    starts = [p.points[0] for p in drawing.paths if p.role is Role.LOAD]
    return starts + [q for p in drawing.paths if p.role is Role.SPRING for q in (p.points[0], p.points[-1])]


def _deepest(parts: Sequence[Contour], tree: Any, p: Point, tol: float) -> int | None:
    """The part that holds ``p`` deepest (within ``tol`` of its outline)."""
    import shapely

    pt = shapely.Point(p)
    hits = [int(i) for i in tree.query(pt, predicate="dwithin", distance=tol)]
    if not hits:
        return None
    return max(hits, key=lambda i: (parts[i].polygon.contains(pt), parts[i].polygon.boundary.distance(pt), -i))


def _order(points: list[Point], last: list[Point]) -> list[Point]:
    """``points`` in the shortest order, then ``last`` (each after the
    point nearest it... in the order given)."""
    if len(points) <= 1:
        return [*points, *last]
    if len(points) <= MAX_ORDERED_POINTS:
        best = min(itertools.permutations(points), key=lambda seq: _length([*seq, *last[:1]]))
        return [*best, *last]
    start = min(points)
    seq, rest = [start], [q for q in points if q != start]
    while rest:
        nxt = min(rest, key=lambda q: dist(seq[-1], q))
        seq.append(nxt)
        rest.remove(nxt)
    return [*seq, *last]


def _length(seq: Sequence[Point]) -> float:
    return sum(dist(a, b) for a, b in itertools.pairwise(seq))


@dataclass
class _Members:
    """Per part index: its holes, force points and lining-arc middles."""

    holes: dict[int, list[Hole]]
    points: dict[int, list[Point]]
    arcs: dict[int, list[Point]]


def linework_tolerance(lw: Linework, settings: InferSettings) -> float:
    """The inference tolerance of a drawing of outlines [mm]."""
    circles = [c for c in lw.circles if not is_centre(c.ink, settings)]
    return tolerance_of([q for p in lw.paths for q in p.points[:1]] + [c.center for c in circles])


def infer_outlines(lw: Linework, drawing: Drawing, settings: InferSettings) -> Inferred:
    """The skeleton of a drawing whose parts are closed outlines with holes."""
    tol = linework_tolerance(lw, settings)
    cons = contours(lw, settings, tol)
    return infer_from_parts(lw, drawing, settings, "outlines", cons)


def infer_from_parts(
    lw: Linework, drawing: Drawing, settings: InferSettings, style: str, cons: Sequence[Contour]
) -> Inferred:
    """The skeleton, once the parts and the frame are known as contours."""
    import shapely

    circles = [c for c in lw.circles if not is_centre(c.ink, settings)]
    arcs = [a for a in lw.arcs if not is_centre(a.ink, settings)]
    tol = linework_tolerance(lw, settings)
    band_arcs = [(a.center, a.radius_mm) for a in drawing.arcs if a.role is Role.BAND]
    drum, findings = drum_of(circles, [(a.center, a.radius_mm) for a in arcs] + band_arcs, tol)
    shoes = shoe_arcs(drum, arcs, tol) if drum is not None else ()
    parts = [c for c in cons if not c.frame]
    frames = [c for c in cons if c.frame]
    part_tree = shapely.STRtree([c.polygon for c in parts])
    frame_tree = shapely.STRtree([c.polygon for c in frames])
    members = _Members({}, {}, {})
    for p in _force_points(drawing):
        gi = _deepest(parts, part_tree, p, tol)
        if gi is not None:
            members.points.setdefault(gi, []).append(p)
    for arc in shoes:
        gi = _deepest(parts, part_tree, arc.point_at(arc.mid_deg), tol)
        if gi is not None:
            members.arcs.setdefault(gi, []).append(arc.point_at(arc.mid_deg))
    ends = PointIndex(_member_ends(drawing))
    owners = _Owners(
        {c.placement: i for i, c in enumerate(parts) if c.placement},
        {c.placement for c in frames if c.placement},
        part_tree,
        frame_tree,
        [not c.placement for c in parts],
        [True for _ in frames],  # a frame holds what it covers, drawn in a block or not
    )
    pivots, pins, more = _classify(holes(circles, drum, tol), owners, bool(frames), ends, members, tol)
    findings += more
    out_circles = (
        *((CircleGeom(Role.DRUM, drum.center, drum.radius_mm, drum.ink.source),) if drum else ()),
        *(h.geom(Role.PIVOT) for h in pivots),
        *(h.geom(Role.PIN) for h in pins),
    )
    links = _links(parts, members, [h.center for h in (*pivots, *pins)], tol)
    findings += _broad_two_pin_parts(parts, members)
    return Inferred(style, out_circles, tuple(shoes), links, tuple(findings))


def _broad_two_pin_parts(parts: Sequence[Contour], members: _Members) -> list[Finding]:
    """M238 for each part with two pins and nothing else on it whose
    outline is much more than a bar between them: it is solved as a
    two-force member, but its shape says it may be a lever whose other
    attachment is not drawn."""
    import shapely

    out = []
    for gi, part in enumerate(parts):
        got = members.holes.get(gi, [])
        if len(got) != 2 or members.points.get(gi) or members.arcs.get(gi):
            continue
        a, b = got
        width = BAR_WIDTH_FACTOR * max(a.outer_mm, b.outer_mm)
        bar = shapely.LineString([a.center, b.center]).buffer(width)
        extra = part.polygon.difference(bar).area
        if extra <= BROAD_PART_FRACTION * part.polygon.area:
            continue
        msg = (
            f"the part with holes at {fmt(a.center)} and {fmt(b.center)} and nothing else on it is solved as a "
            f"two-force member (its force along the line between them), but {100 * extra / part.polygon.area:.0f} % "
            "of its outline lies off that line: if it is a lever, draw its other pin, load or spring"
        )
        out.append(infer_finding(Code.TWO_FORCE_OR_LEVER, msg, [part.ink.source], a.center))
    return out


@record(frozen=True)
class _Owners:
    """Who holds a hole: block-placed parts by their own circles, other
    parts by containment; the frame by its own circles or by containment."""

    part_of: dict[str, int]
    frame_placements: set[str]
    part_tree: Any
    frame_tree: Any
    part_by_shape: list[bool]
    frame_by_shape: list[bool]

    def parts(self, hole: Hole) -> list[int]:
        import shapely

        pt = shapely.Point(hole.center)
        found = {int(i) for i in self.part_tree.query(pt, predicate="intersects") if self.part_by_shape[int(i)]}
        found |= {self.part_of[c.ink.placement] for c in hole.circles if c.ink.placement in self.part_of}
        return sorted(found)

    def frame(self, hole: Hole) -> bool:
        import shapely

        if any(c.ink.placement in self.frame_placements for c in hole.circles):
            return True
        hits = self.frame_tree.query(shapely.Point(hole.center), predicate="intersects")
        return any(self.frame_by_shape[int(i)] for i in hits)


def _classify(
    found: Sequence[Hole],
    owners: _Owners,
    has_frame: bool,
    ends: PointIndex,
    members: _Members,
    tol: float,
) -> tuple[list[Hole], list[Hole], list[Finding]]:
    """Pivots, pins and the findings on the holes."""
    pivots: list[Hole] = []
    pins: list[Hole] = []
    findings: list[Finding] = []
    guessed: list[Hole] = []
    for hole in found:
        in_parts = owners.parts(hole)
        held = owners.frame(hole)
        n = len(in_parts) + len(ends.near(hole.center, tol))
        if n == 0:
            if not held:
                findings.append(_note(Code.HOLE_UNUSED, hole, "lies in no part; not a pin (ignored)"))
            continue
        if not held and n == 1:
            if has_frame:
                msg = (
                    "lies in one part only and not in the frame: a loose hole or a pivot whose bracket is not drawn "
                    "(ignored). Hatch the frame there, or name its layer in [infer] frame_layers"
                )
                findings.append(_note(Code.HOLE_ONE_PART, hole, msg))
                continue
            guessed.append(hole)
            held = True
        findings += hole_sizes(hole, tol)
        for gi in in_parts:
            members.holes.setdefault(gi, []).append(hole)
        (pivots if held else pins).append(hole)
    if guessed:
        where = ", ".join(fmt(h.center) for h in guessed)
        findings.append(
            infer_finding(
                Code.PIVOT_GUESSED,
                f"the drawing shows no frame (no hatched outline, nothing on a frame layer), so the holes in one part "
                f"only are taken as pivots: {where}. Hatch the frame or name its layer in [infer] frame_layers",
                [h.circles[0].ink.source for h in guessed],
                guessed[0].center,
            )
        )
    return pivots, pins, findings


def _note(code: Code, hole: Hole, what: str) -> Finding:
    c = hole.circles[0]
    return infer_finding(code, f"hole of diameter {2 * c.radius_mm:.6g} mm at {fmt(c.center)} {what}", [c.ink.source])


def _links(parts: Sequence[Contour], members: _Members, pins: Sequence[Point], tol: float) -> tuple[PathGeom, ...]:
    """One centreline piece per part through its key points, each run on
    through an end that lies on another part's piece (:func:`_crossing`)."""
    pieces: list[tuple[int, list[Point]]] = []
    for gi in range(len(parts)):
        pts = list(dict.fromkeys([h.center for h in members.holes.get(gi, [])] + members.points.get(gi, [])))
        seq = _order(pts, members.arcs.get(gi, []))
        if len(seq) >= 2:
            pieces.append((gi, seq))
    crossing = _Crossing(pieces, PointIndex(pins), tol)
    return tuple(
        PathGeom(Role.LINK, tuple(crossing.through(k, parts[gi].polygon)), parts[gi].ink.source)
        for k, (gi, _) in enumerate(pieces)
    )


class _Crossing:
    """The pieces as first ordered, in an STRtree, to tell where one would
    end on another away from a pin."""

    def __init__(self, pieces: Sequence[tuple[int, list[Point]]], pins: PointIndex, tol: float) -> None:
        import shapely

        self.seqs = [seq for _, seq in pieces]
        self.pins, self.tol = pins, tol
        self.tree = shapely.STRtree([shapely.LineString(seq) for seq in self.seqs])

    def on_other(self, k: int, p: Point) -> bool:
        """Whether ``p`` lies within the tolerance of a piece other than
        ``k``."""
        import shapely

        hits = self.tree.query(shapely.Point(p), predicate="dwithin", distance=self.tol)
        return any(int(j) != k for j in hits)

    def through(self, k: int, polygon: Any) -> list[Point]:
        """Piece ``k``, run on at each end that lies on another piece away
        from a pin: straight on to its outline's edge (unchanged where the
        edge is no farther than the tolerance, or that end would lie on
        another piece too)."""
        seq = list(self.seqs[k])
        for first in (True, False):
            end, prev = (seq[0], seq[1]) if first else (seq[-1], seq[-2])
            if self.pins.near(end, self.tol) or not self.on_other(k, end):
                continue
            beyond = _edge_beyond(end, prev, polygon, self.tol)
            if beyond is None or self.on_other(k, beyond):
                continue
            seq = [beyond, *seq] if first else [*seq, beyond]
        return seq


def _edge_beyond(end: Point, prev: Point, polygon: Any, tol: float) -> Point | None:
    """Where the line from ``prev`` through ``end``, run on past ``end``,
    leaves ``polygon`` (the edge of the stretch inside it that starts at
    ``end``); None when there is no such stretch longer than ``tol`` [mm]."""
    import shapely

    length = dist(prev, end)
    if length <= tol:
        return None
    x0, y0, x1, y1 = polygon.bounds
    reach = math.hypot(x1 - x0, y1 - y0)
    u = ((end[0] - prev[0]) / length, (end[1] - prev[1]) / length)
    ray = shapely.LineString([end, (end[0] + reach * u[0], end[1] + reach * u[1])])
    start = shapely.Point(end)
    for piece in shapely.get_parts(ray.intersection(polygon)):
        if piece.geom_type != "LineString" or piece.distance(start) > tol:
            continue
        far = max(((float(x), float(y)) for x, y in piece.coords), key=lambda q: dist(q, end))
        return far if dist(far, end) > tol else None
    return None
