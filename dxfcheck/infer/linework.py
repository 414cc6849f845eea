"""The raw linework of a drafted drawing, in world [mm].

Where :func:`dxfcheck.read.drawing.read_drawing` keeps only the entities on
the skeleton's role layers, this walk keeps every line, arc, circle,
polyline and hatch boundary of model space and of the blocks it places
(rotated, scaled, mirrored, nested, arrayed), each with its effective layer
and linetype (``BYLAYER`` resolved through the layer table, ``BYBLOCK``
through the reference), and the block it was drawn in.  Entities on layer
``0`` inside a block take the reference's layer, as in the role reader.
The block maps are the role reader's (:func:`_insert_map`, the same
composition ``M = M_parent @ OCS @ T(insert) @ R(rotation) @ S(sx, sy) @
T(-base)``), and the same limits on block fan-out apply.
"""

from __future__ import annotations

import math
from collections.abc import Iterable
from dataclasses import dataclass, field
from typing import Any

from dxfcheck.core import deadline
from dxfcheck.core.errors import DrawingReadError
from dxfcheck.core.geometry import Affine, Point
from dxfcheck.core.records import record
from dxfcheck.read.drawing import (
    MAX_BLOCK_DEPTH,
    MAX_BLOCK_VISITS,
    SIMILARITY_RTOL,
    Source,
    _check_expansion,
    _damaged,
    _finite,
    _ocs_affine,
)

__all__ = ["ARC_CHORD_DEG", "Ink", "Linework", "RawArc", "RawCircle", "RawPath", "read_linework"]

#: Largest angle [degrees] one chord of a polyline's arc segment or a hatch
#: boundary's arc edge stands for when it becomes a polygon.
ARC_CHORD_DEG = 5.0


@record(frozen=True)
class Ink:
    """How a piece of linework was drawn: its effective ``layer`` and
    ``linetype`` (upper case), the ``block`` it was drawn in (None: model
    space), its entity (``source``), ``seq`` its place in drawing order,
    and ``placement``, the handles of the INSERTs that placed it joined by
    ``/`` (the identity of one inserted part)."""

    layer: str
    linetype: str
    block: str | None
    source: Source
    seq: int = 0

    @property
    def placement(self) -> str:
        return "/".join(self.source.via)


@record(frozen=True)
class RawCircle:
    """A circle: ``center`` [mm], ``radius_mm``."""

    center: Point
    radius_mm: float
    ink: Ink

    @property
    def source_ref(self) -> str:
        return self.ink.source.ref


@record(frozen=True)
class RawArc:
    """An arc counter-clockwise from ``start_deg`` to ``end_deg`` [degrees,
    world frame] about ``center`` [mm]."""

    center: Point
    radius_mm: float
    start_deg: float
    end_deg: float
    ink: Ink


@record(frozen=True)
class RawPath:
    """A line or polyline through ``points`` [mm]; ``closed`` when its last
    point joins its first; ``bulged`` when arc segments were replaced by
    chords (:data:`ARC_CHORD_DEG`); ``hatch`` for a hatch boundary."""

    points: tuple[Point, ...]
    closed: bool
    ink: Ink
    bulged: bool = False
    hatch: bool = False


@record(frozen=True)
class Linework:
    """Every piece of linework of a drawing, in drawing order."""

    circles: tuple[RawCircle, ...] = ()
    arcs: tuple[RawArc, ...] = ()
    paths: tuple[RawPath, ...] = ()

    def count(self) -> int:
        return len(self.circles) + len(self.arcs) + len(self.paths)


@dataclass
class _Walk:
    doc: Any
    path: str
    skip_layers: frozenset[str]
    circles: list[RawCircle] = field(default_factory=list)
    arcs: list[RawArc] = field(default_factory=list)
    paths: list[RawPath] = field(default_factory=list)
    visits: int = 0
    layer_types: dict[str, str] = field(default_factory=dict)

    def linetype_of_layer(self, layer: str) -> str:
        key = layer.upper()
        if key not in self.layer_types:
            lt = "CONTINUOUS"
            if self.doc.layers.has_entry(layer):
                lt = str(self.doc.layers.get(layer).dxf.get("linetype", "CONTINUOUS")).upper()
            self.layer_types[key] = lt
        return self.layer_types[key]

    def visit(self) -> None:
        self.visits += 1
        if self.visits > MAX_BLOCK_VISITS:
            raise DrawingReadError(f"places more than {MAX_BLOCK_VISITS:,} entities through blocks", path=self.path)
        if self.visits % 1024 == 0:
            deadline.check("reading the drawing's linework")


def read_linework(doc: Any, mm_per_unit: float, path: str, skip_layers: Iterable[str] = ()) -> Linework:
    """Walk model space and the blocks it places; keep every line, arc,
    circle, polyline and hatch boundary in world [mm], except those on
    ``skip_layers`` (upper case: the role layers the role reader read).

    Raises
    ------
    DrawingReadError
        When blocks fan out beyond :data:`MAX_BLOCK_VISITS` placements.
    """
    _check_expansion(doc, path)
    w = _Walk(doc, path, frozenset(s.upper() for s in skip_layers))
    _walk(w, doc.modelspace(), Affine.scaling(mm_per_unit, mm_per_unit), None, (), (), 0)
    return Linework(tuple(w.circles), tuple(w.arcs), tuple(w.paths))


def _walk(
    w: _Walk,
    entities: Iterable[Any],
    m: Affine,
    parent: tuple[str, str] | None,
    blocks: tuple[str, ...],
    via: tuple[str, ...],
    depth: int,
) -> None:
    """``parent``: the placing reference's (layer, linetype); ``blocks``:
    the names of the blocks being walked, outermost first."""
    for e in entities:
        w.visit()
        try:
            ink = _ink(w, e, parent, blocks[-1] if blocks else None, via)
            kind = str(e.dxftype())
            if kind == "INSERT":
                _insert(w, e, m, ink, blocks, depth)
            elif ink.layer.upper() not in w.skip_layers:
                _take(w, e, kind, m, ink)
        except _damaged():  # damaged linework is not the skeleton's business: the role reader reports entities
            continue


def _ink(w: _Walk, e: Any, parent: tuple[str, str] | None, block: str | None, via: tuple[str, ...]) -> Ink:
    layer = str(e.dxf.get("layer", "0"))
    if parent is not None and layer == "0":
        layer = parent[0]
    lt = str(e.dxf.get("linetype", "BYLAYER")).upper()
    if lt == "BYBLOCK":
        lt = parent[1] if parent is not None else "CONTINUOUS"
    if lt == "BYLAYER":
        lt = w.linetype_of_layer(layer)
    return Ink(layer.upper(), lt, block, Source(str(e.dxf.get("handle", "?")), layer, via), w.visits)


def _insert(w: _Walk, e: Any, m: Affine, ink: Ink, blocks: tuple[str, ...], depth: int) -> None:
    """Walk the block a reference places (each cell of an array); a block
    inside itself and references nested deeper than :data:`MAX_BLOCK_DEPTH`
    are not followed (the role reader reports them)."""
    block = w.doc.blocks.get(e.dxf.get("name", ""))
    if block is None or depth >= MAX_BLOCK_DEPTH or str(block.name).upper() in blocks:
        return
    ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
    ins = e.dxf.get("insert", (0.0, 0.0, 0.0))
    base = block.block.dxf.get("base_point", (0.0, 0.0, 0.0)) if block.block else (0.0, 0.0, 0.0)
    sx, sy = float(e.dxf.get("xscale", 1.0)), float(e.dxf.get("yscale", 1.0))
    rot = float(e.dxf.get("rotation", 0.0))
    if ocs is None or sx == 0.0 or sy == 0.0 or not _finite(float(ins[0]), float(ins[1]), sx, sy, rot):
        return
    inner = Affine.scaling(sx, sy) @ Affine.translation(-float(base[0]), -float(base[1]))
    head = m @ ocs @ Affine.translation(float(ins[0]), float(ins[1])) @ Affine.rotation(rot)
    rows, cols = max(1, int(e.dxf.get("row_count", 1))), max(1, int(e.dxf.get("column_count", 1)))
    row_sp, col_sp = float(e.dxf.get("row_spacing", 0.0)), float(e.dxf.get("column_spacing", 0.0))
    handle, via = ink.source.handle, ink.source.via
    for r in range(rows):
        for c in range(cols):
            cell = head @ Affine.translation(c * col_sp, r * row_sp) @ inner
            here = handle if rows * cols == 1 else f"{handle}[{r},{c}]"
            inner_blocks = (*blocks, str(block.name).upper())
            _walk(w, block, cell, (ink.source.layer, ink.linetype), inner_blocks, (*via, here), depth + 1)


def _take(w: _Walk, e: Any, kind: str, m: Affine, ink: Ink) -> None:
    if kind in ("CIRCLE", "ARC"):
        _take_round(w, e, kind, m, ink)
    elif kind == "LINE":
        s, t = e.dxf.start, e.dxf.end
        pts = (m.apply((float(s[0]), float(s[1]))), m.apply((float(t[0]), float(t[1]))))
        if _finite(*pts[0], *pts[1]) and pts[0] != pts[1]:
            w.paths.append(RawPath(pts, False, ink))
    elif kind == "LWPOLYLINE":
        ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
        if ocs is not None:
            verts = [(float(x), float(y), float(b)) for x, y, b in e.get_points("xyb")]
            _add_polyline(w, verts, bool(e.closed), m @ ocs, ink)
    elif kind == "POLYLINE" and e.get_mode() == "AcDb2dPolyline":
        ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
        if ocs is not None:
            verts = [
                (float(v.dxf.location[0]), float(v.dxf.location[1]), float(v.dxf.get("bulge", 0.0))) for v in e.vertices
            ]
            _add_polyline(w, verts, bool(e.is_closed), m @ ocs, ink)
    elif kind == "HATCH":
        _take_hatch(w, e, m, ink)


def _take_round(w: _Walk, e: Any, kind: str, m: Affine, ink: Ink) -> None:
    ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
    if ocs is None:
        return
    mm = m @ ocs
    c, r = e.dxf.center, float(e.dxf.radius)
    scale = mm.similarity_scale(SIMILARITY_RTOL) or math.sqrt(abs(mm.det))
    if not _finite(float(c[0]), float(c[1]), r) or r <= 0.0:
        return
    center = mm.apply((float(c[0]), float(c[1])))
    if kind == "CIRCLE":
        w.circles.append(RawCircle(center, r * scale, ink))
        return
    a0, a1 = math.radians(float(e.dxf.start_angle)), math.radians(float(e.dxf.end_angle))
    span = (a1 - a0) % (2 * math.pi) or 2 * math.pi
    ends = [mm.apply((float(c[0]) + r * math.cos(t), float(c[1]) + r * math.sin(t))) for t in (a0, a0 + span)]
    s_deg, e_deg = (math.degrees(math.atan2(p[1] - center[1], p[0] - center[0])) % 360 for p in ends)
    if mm.mirrors:
        s_deg, e_deg = e_deg, s_deg
    w.arcs.append(RawArc(center, r * scale, s_deg, e_deg, ink))


def _bulge_points(p0: Point, p1: Point, bulge: float) -> list[Point]:
    """Points after ``p0`` up to ``p1`` along a polyline segment with
    ``bulge`` (tan of a quarter of its angle), chords of at most
    :data:`ARC_CHORD_DEG`."""
    if bulge == 0.0:
        return [p1]
    theta = 4.0 * math.atan(bulge)
    n = max(1, math.ceil(abs(math.degrees(theta)) / ARC_CHORD_DEG))
    dx, dy = p1[0] - p0[0], p1[1] - p0[1]
    chord = math.hypot(dx, dy)
    if chord == 0.0:
        return [p1]
    radius = chord / (2.0 * math.sin(theta / 2.0))
    mx, my = (p0[0] + p1[0]) / 2, (p0[1] + p1[1]) / 2
    h = radius * math.cos(theta / 2.0)  # signed distance from the chord's midpoint to the centre
    cx, cy = mx - h * dy / chord, my + h * dx / chord
    a0 = math.atan2(p0[1] - cy, p0[0] - cx)
    r = abs(radius)
    out = [(cx + r * math.cos(a0 + theta * k / n), cy + r * math.sin(a0 + theta * k / n)) for k in range(1, n)]
    return [*out, p1]


def _add_polyline(
    w: _Walk, verts: list[tuple[float, float, float]], closed: bool, m: Affine, ink: Ink, *, arcs: bool = True
) -> None:
    """A polyline as a path of chords (:func:`_bulge_points`); with
    ``arcs``, its arc segments also as arcs."""
    if len(verts) < 2 or not _finite(*(c for v in verts for c in v)):
        return
    local: list[Point] = [(verts[0][0], verts[0][1])]
    last = len(verts) if closed else len(verts) - 1
    for i in range(last):
        p0, p1 = verts[i], verts[(i + 1) % len(verts)]
        local += _bulge_points((p0[0], p0[1]), (p1[0], p1[1]), p0[2])
    bulged = any(v[2] != 0.0 for v in verts[:last])
    if bulged and arcs:
        _bulge_arcs(w, verts, last, m, ink)
    pts: list[Point] = []
    for p in (m.apply(q) for q in local):
        if not pts or p != pts[-1]:
            pts.append(p)
    if closed and len(pts) > 2 and pts[0] != pts[-1]:
        pts.append(pts[0])
    if len(pts) >= 2:
        w.paths.append(RawPath(tuple(pts), closed or (len(pts) > 3 and pts[0] == pts[-1]), ink, bulged))


def _bulge_arcs(w: _Walk, verts: list[tuple[float, float, float]], last: int, m: Affine, ink: Ink) -> None:
    """Each arc segment of a polyline also as an arc (a lining face drawn
    in a part's outline is a lining arc)."""
    scale = m.similarity_scale(SIMILARITY_RTOL)
    if scale is None:
        return
    for i in range(last):
        x0, y0, b = verts[i]
        x1, y1, _ = verts[(i + 1) % len(verts)]
        if b == 0.0 or (x0, y0) == (x1, y1):
            continue
        theta = 4.0 * math.atan(b)
        chord = math.hypot(x1 - x0, y1 - y0)
        radius = chord / (2.0 * math.sin(theta / 2.0))
        h = radius * math.cos(theta / 2.0)
        cx, cy = (x0 + x1) / 2 - h * (y1 - y0) / chord, (y0 + y1) / 2 + h * (x1 - x0) / chord
        c = m.apply((cx, cy))
        ends = [m.apply(p) for p in ((x0, y0), (x1, y1))]
        a0, a1 = (math.degrees(math.atan2(p[1] - c[1], p[0] - c[0])) % 360 for p in ends)
        if (theta < 0) != m.mirrors:  # clockwise in the world: the arc runs from the far end
            a0, a1 = a1, a0
        w.arcs.append(RawArc(c, abs(radius) * scale, a0, a1, ink))


def _arc_edge_points(edge: Any) -> list[tuple[float, float, float]]:
    """A hatch boundary's arc edge as points in the boundary's order, from
    its real start up to (not including) its real end, chords of at most
    :data:`ARC_CHORD_DEG`.

    ezdxf keeps an arc edge's angles in counter-clockwise order whatever its
    direction; the edge runs from ``start_angle`` to ``end_angle`` when its
    ``ccw`` flag is set (DXF group code 73, "is counterclockwise flag"),
    else from ``end_angle`` back to ``start_angle``."""
    c, r = edge.center, float(edge.radius)
    a0, a1 = float(edge.start_angle), float(edge.end_angle)
    span = (a1 - a0) % 360.0 or 360.0
    start, sweep = (a0, span) if getattr(edge, "ccw", True) else (a1, -span)
    n = max(1, math.ceil(span / ARC_CHORD_DEG))
    out = []
    for k in range(n):
        t = math.radians(start + sweep * k / n)
        out.append((float(c[0]) + r * math.cos(t), float(c[1]) + r * math.sin(t), 0.0))
    return out


def _take_hatch(w: _Walk, e: Any, m: Affine, ink: Ink) -> None:
    """Each boundary path of a hatch as a closed path (polyline paths with
    their bulges; edge paths of lines and arcs)."""
    ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
    if ocs is None:
        return
    mm = m @ ocs
    for bp in e.paths:
        verts: list[tuple[float, float, float]] = []
        if hasattr(bp, "vertices"):
            verts = [(float(v[0]), float(v[1]), float(v[2]) if len(v) > 2 else 0.0) for v in bp.vertices]
        else:
            for edge in bp.edges:
                if hasattr(edge, "start") and hasattr(edge, "end") and not hasattr(edge, "radius"):
                    verts.append((float(edge.start[0]), float(edge.start[1]), 0.0))
                elif hasattr(edge, "radius"):
                    verts += _arc_edge_points(edge)
        if len(verts) >= 3:
            before = len(w.paths)
            _add_polyline(w, verts, True, mm, ink, arcs=False)
            if len(w.paths) > before:
                last = w.paths[-1]
                w.paths[-1] = RawPath(last.points, True, ink, last.bulged, hatch=True)
