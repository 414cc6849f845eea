"""Read a layered DXF drawing into plane geometry in [mm].

This is the first stage of the pipeline.  It keeps only the entities on the
layers that carry the brake's skeleton (see :class:`dxfcheck.config.Role`),
including entities placed through block references, and converts them to
world coordinates in millimetres.

Block references are resolved here with affine maps composed by hand,
outermost first: ``M = M_parent @ OCS @ T(insert) @ R(rotation) @ S(sx, sy)
@ T(-base)``.  Entities on layer ``0`` inside a block take the layer of the
reference that placed them, as in every CAD program.

Drawing units come from ``$INSUNITS``; where it is 0 or missing,
``$MEASUREMENT`` (0 imperial -> inch, 1 metric -> mm); else millimetres.
Both fallbacks are reported as finding ``D101``.
"""

from __future__ import annotations

import itertools
import math
import os
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from dxfcheck.config import Config, Role
from dxfcheck.errors import DrawingReadError
from dxfcheck.findings import Code, Finding
from dxfcheck.geometry import Affine, Point
from dxfcheck.units import INSUNITS_MM, UnitError, length_unit_factor

__all__ = [
    "ROLE_KINDS",
    "ArcGeom",
    "CircleGeom",
    "Drawing",
    "LooseCircle",
    "PathGeom",
    "Source",
    "TextGeom",
    "load_document",
    "raw_header_values",
    "read_drawing",
]

#: Relative tolerance for "this block map keeps circles circular".
SIMILARITY_RTOL = 1e-9
#: Block references nested deeper than this are reported and not followed.
MAX_BLOCK_DEPTH = 32
#: |z| of an extrusion vector below which it counts as lying along the z axis.
PLANAR_EXTRUSION_TOL = 1e-9
#: Largest coordinate magnitude accepted [drawing units]; beyond it a value
#: is treated as garbage rather than geometry.
MAX_COORDINATE = 1e12
#: Largest input file read [bytes] unless raised (``--max-size``).
MAX_INPUT_BYTES = 200_000_000
#: Files this large [bytes] and larger go through the fast reader
#: (:mod:`dxfcheck.fastread`) unless asked otherwise.
FAST_READER_MIN_BYTES = 2_000_000
#: Most entities on the skeleton layers: more means the layer map names a
#: clutter layer (a brake skeleton has dozens).
MAX_SKELETON_ENTITIES = 2000
#: A recovered document with no entities from a file larger than this
#: [bytes] is taken as damaged beyond repair.
EMPTY_RECOVERY_BYTES = 2000
#: At most this many repair messages are kept as findings.
MAX_REPAIR_FINDINGS = 20
#: First bytes of a binary DXF file.
BINARY_SENTINEL = b"AutoCAD Binary DXF"
#: Entity kinds whose layers are listed even when the layer has no role
#: (the kinds a skeleton layer can hold), to name layer near misses.
LISTED_KINDS = frozenset({"CIRCLE", "ARC", "LINE", "LWPOLYLINE", "POLYLINE", "TEXT", "MTEXT"})
#: Circles kept per layer that has no role, in each container (model space,
#: each block), counted on the entity's own layer: enough to recognise a pin
#: or drum layer, bounded on a vendor sheet with thousands of holes.
MAX_LOOSE_CIRCLES_PER_LAYER = 200

_SKELETON_TYPES: dict[Role, set[str]] = {
    Role.PIVOT: {"CIRCLE"},
    Role.PIN: {"CIRCLE"},
    Role.DRUM: {"CIRCLE"},
    Role.SHOE: {"ARC"},
    Role.LINK: {"LINE", "LWPOLYLINE", "POLYLINE"},
    Role.LOAD: {"LINE", "LWPOLYLINE", "POLYLINE", "TEXT", "MTEXT"},
    Role.LABEL: {"TEXT", "MTEXT"},
    Role.BAND: {"ARC", "LINE", "LWPOLYLINE"},
    Role.SPRING: {"LINE", "TEXT", "MTEXT"},
}
#: The entity kinds each role's layers hold (read-only).
ROLE_KINDS: dict[Role, frozenset[str]] = {role: frozenset(kinds) for role, kinds in _SKELETON_TYPES.items()}
_IGNORED_ANYWHERE = {"ATTDEF", "ATTRIB", "DIMENSION", "HATCH", "VIEWPORT", "POINT"}


@dataclass(frozen=True)
class Source:
    """Where a piece of geometry came from.

    Attributes
    ----------
    handle : str
        The DXF handle of the entity.
    layer : str
        Its effective layer (after layer-0 inheritance in blocks).
    via : tuple of str
        Handles of the INSERTs that placed it, outermost first.
    """

    handle: str
    layer: str
    via: tuple[str, ...] = ()

    @property
    def ref(self) -> str:
        """``"H"`` or, inside blocks, ``"H@I1/I2"``."""
        return self.handle if not self.via else f"{self.handle}@{'/'.join(self.via)}"


@dataclass(frozen=True)
class CircleGeom:
    """A circle: ``center`` [mm], ``radius_mm`` [mm]."""

    role: Role
    center: Point
    radius_mm: float
    source: Source


@dataclass(frozen=True)
class LooseCircle:
    """A circle on a layer that has no role: not skeleton, kept only to
    recognise a layer near miss (pins drawn on ``PINS``, the drum on
    ``BRK-DRUM``; see :mod:`dxfcheck.layers`).  ``center`` [mm],
    ``radius_mm`` [mm]."""

    center: Point
    radius_mm: float
    source: Source


@dataclass(frozen=True)
class ArcGeom:
    """A circular arc running counter-clockwise from ``start_deg`` to
    ``end_deg`` [degrees, world frame] about ``center`` [mm]."""

    role: Role
    center: Point
    radius_mm: float
    start_deg: float
    end_deg: float
    source: Source

    @property
    def span_deg(self) -> float:
        """Angle the arc subtends [degrees]."""
        span = (self.end_deg - self.start_deg) % 360.0
        return 360.0 if span == 0.0 else span

    @property
    def mid_deg(self) -> float:
        """Angle of the arc's midpoint [degrees]."""
        return (self.start_deg + 0.5 * self.span_deg) % 360.0

    def point_at(self, deg: float) -> Point:
        t = math.radians(deg)
        return (self.center[0] + self.radius_mm * math.cos(t), self.center[1] + self.radius_mm * math.sin(t))


@dataclass(frozen=True)
class PathGeom:
    """A chain of straight segments through ``points`` [mm]."""

    role: Role
    points: tuple[Point, ...]
    source: Source

    def segments(self) -> Iterator[tuple[Point, Point]]:
        for i in range(len(self.points) - 1):
            yield self.points[i], self.points[i + 1]


@dataclass(frozen=True)
class TextGeom:
    """A text string and its insertion point [mm]."""

    role: Role
    text: str
    position: Point
    source: Source


@dataclass(frozen=True)
class Drawing:
    """The skeleton geometry of one drawing, in world [mm].

    Attributes
    ----------
    path : str
        The file read.
    units : str
        Name of the drawing unit (``mm``, ``inch``...).
    mm_per_unit : float
        Size of one drawing unit [mm].
    units_source : str
        Where the unit came from: ``$INSUNITS``, ``$MEASUREMENT``,
        ``default``, ``option`` (``--units``) or ``spec`` (the spec key
        ``units``, applied by :func:`dxfcheck.analysis.check`).
    dxfversion : str
        The file's DXF version (``AC1009`` for R12 ...).
    circles, arcs, paths, texts : tuple
        Skeleton geometry by kind; each item has a ``role``.
    findings : tuple of Finding
        Problems met while reading.
    custom_properties : tuple of (str, str)
        The header's custom properties (``$CUSTOMPROPERTYTAG`` /
        ``$CUSTOMPROPERTY`` pairs, R2004 and later).
    layer_map : tuple of (Role, tuple of str)
        The layers searched for each role (upper case), as the
        configuration gave them.
    layer_map_source : str or None
        The project file the map came from; None for the built-in names.
    other_layers : tuple of (str, tuple of str)
        Layers with no role that hold entities of the kinds a skeleton
        layer can hold (:data:`LISTED_KINDS`): the name as first met and
        the kinds, sorted by upper-case name.
    loose_circles : tuple of LooseCircle
        Circles on those layers (at most :data:`MAX_LOOSE_CIRCLES_PER_LAYER`
        per layer and container).
    """

    path: str
    units: str
    mm_per_unit: float
    units_source: str
    dxfversion: str
    circles: tuple[CircleGeom, ...] = ()
    arcs: tuple[ArcGeom, ...] = ()
    paths: tuple[PathGeom, ...] = ()
    texts: tuple[TextGeom, ...] = ()
    findings: tuple[Finding, ...] = ()
    custom_properties: tuple[tuple[str, str], ...] = ()
    layer_map: tuple[tuple[Role, tuple[str, ...]], ...] = ()
    layer_map_source: str | None = None
    other_layers: tuple[tuple[str, tuple[str, ...]], ...] = ()
    loose_circles: tuple[LooseCircle, ...] = ()

    def circles_of(self, role: Role) -> tuple[CircleGeom, ...]:
        return tuple(c for c in self.circles if c.role is role)

    def paths_of(self, role: Role) -> tuple[PathGeom, ...]:
        return tuple(p for p in self.paths if p.role is role)

    def texts_of(self, role: Role) -> tuple[TextGeom, ...]:
        return tuple(t for t in self.texts if t.role is role)

    def extent_mm(self) -> float:
        """Diagonal of the skeleton's bounding box [mm] (at least 1 mm)."""
        xs: list[float] = []
        ys: list[float] = []
        for c in self.circles:
            xs += [c.center[0] - c.radius_mm, c.center[0] + c.radius_mm]
            ys += [c.center[1] - c.radius_mm, c.center[1] + c.radius_mm]
        for a in self.arcs:
            xs.append(a.center[0])
            ys.append(a.center[1])
        for p in self.paths:
            xs += [q[0] for q in p.points]
            ys += [q[1] for q in p.points]
        if not xs:
            return 1.0
        return max(1.0, math.hypot(max(xs) - min(xs), max(ys) - min(ys)))


def _ocs_affine(extrusion: Any) -> Affine | None:
    """Map from an entity's OCS to the world XY plane, or None if the
    entity's plane is tilted."""
    x, y, z = float(extrusion[0]), float(extrusion[1]), float(extrusion[2])
    if abs(x) > PLANAR_EXTRUSION_TOL or abs(y) > PLANAR_EXTRUSION_TOL:
        return None
    # Arbitrary axis algorithm (DXF Reference): for Az = (0, 0, -1) the OCS
    # x axis is world -X and the y axis world +Y.
    return Affine() if z > 0 else Affine(-1.0, 0.0, 0.0, 0.0, 1.0, 0.0)


@dataclass
class _Collector:
    path: str
    roles: dict[str, Role]
    circles: list[CircleGeom] = field(default_factory=list)
    arcs: list[ArcGeom] = field(default_factory=list)
    paths: list[PathGeom] = field(default_factory=list)
    texts: list[TextGeom] = field(default_factory=list)
    findings: list[Finding] = field(default_factory=list)
    _seen: set[tuple[Any, ...]] = field(default_factory=set)
    #: upper-case name -> (name as first met, kinds) of layers with no role
    other: dict[str, tuple[str, set[str]]] = field(default_factory=dict)
    loose: list[LooseCircle] = field(default_factory=list)
    _loose_seen: set[tuple[float, ...]] = field(default_factory=set)

    def note_other(self, layer: str, dxftype: str) -> None:
        """Remember that a layer with no role holds a ``dxftype``."""
        self.other.setdefault(layer.upper(), (layer, set()))[1].add(dxftype)

    def finding(self, code: Code, message: str, src: Source, at: Point | None = None) -> None:
        self.findings.append(Finding(code, message, (src.ref,), (src.layer,), at))

    def duplicate(self, key: tuple[Any, ...], src: Source, at: Point) -> bool:
        if key in self._seen:
            self.finding(Code.DUPLICATE_ENTITY, "entity drawn twice; the copy is ignored", src, at)
            return True
        self._seen.add(key)
        return False


def _finite(*values: float) -> bool:
    return all(math.isfinite(v) and abs(v) <= MAX_COORDINATE for v in values)


def _key(*values: float) -> tuple[float, ...]:
    return tuple(round(v, 6) for v in values)


def _walk(
    col: _Collector,
    doc: Any,
    entities: Iterable[Any],
    m: Affine,
    parent_layer: str | None,
    via: tuple[str, ...],
    depth: int,
) -> None:
    loose_count: dict[str, int] = {}  # circles met per own layer with no role, in this container
    for e in entities:
        try:
            dxftype = str(e.dxftype())
            layer = str(e.dxf.get("layer", "0"))
            handle = str(e.dxf.get("handle", "?"))
        except Exception:  # an entity kind ezdxf keeps only as raw tags: not skeleton
            continue
        own = layer
        if parent_layer is not None and layer == "0":
            layer = parent_layer
        src = Source(handle=handle, layer=layer, via=via)
        if dxftype == "INSERT":
            try:
                _walk_insert(col, doc, e, m, layer, via, depth)
            except RecursionError:
                raise
            except Exception as exc:  # a damaged block reference: report it, go on
                col.finding(Code.DEGENERATE_ENTITY, f"INSERT could not be read ({type(exc).__name__}: {exc})", src)
            continue
        role = col.roles.get(layer.upper())
        if role is None:
            if dxftype in LISTED_KINDS:
                col.note_other(layer, dxftype)
                if dxftype == "CIRCLE" and _loose_quota(loose_count, own, parent_layer is not None):
                    _take_loose(col, e, m, Source(handle=handle, layer=layer, via=via))
            continue
        if dxftype in _IGNORED_ANYWHERE:
            continue
        if dxftype not in _SKELETON_TYPES[role]:
            col.finding(
                Code.UNSUPPORTED_ENTITY,
                f"{dxftype} is not used on a {role} layer and is ignored",
                src,
            )
            continue
        try:
            _take(col, e, dxftype, role, m, src)
        except Exception as exc:  # damaged entity data of any kind: report it, go on
            col.finding(Code.DEGENERATE_ENTITY, f"{dxftype} could not be read ({type(exc).__name__}: {exc})", src)


def _loose_quota(count: dict[str, int], own_layer: str, in_block: bool) -> bool:
    """Whether a circle on a layer with no role is kept: the first
    :data:`MAX_LOOSE_CIRCLES_PER_LAYER` of each own layer in a container.
    Layer-0 circles inside blocks are not counted (the fast reader keeps
    them whole anyway)."""
    if in_block and own_layer == "0":
        return True
    n = count.get(own_layer, 0)
    count[own_layer] = n + 1
    return n < MAX_LOOSE_CIRCLES_PER_LAYER


def _take_loose(col: _Collector, e: Any, m: Affine, src: Source) -> None:
    """Keep a circle on a layer with no role, silently: what cannot be read
    is no finding, since the layer is not the skeleton's."""
    try:
        ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
        c = e.dxf.center
        r = float(e.dxf.radius)
        if ocs is None or not _finite(float(c[0]), float(c[1]), r) or r <= 0.0:
            return
        mm = m @ ocs
        scale = mm.similarity_scale(SIMILARITY_RTOL)
        if scale is None:
            return
        center = mm.apply((float(c[0]), float(c[1])))
    except Exception:  # damaged data on a layer that is not the skeleton's: not our concern
        return
    radius = r * scale
    key = _key(*center, radius)
    if key in col._loose_seen:
        return
    col._loose_seen.add(key)
    col.loose.append(LooseCircle(center, radius, src))


def _walk_insert(col: _Collector, doc: Any, e: Any, m: Affine, layer: str, via: tuple[str, ...], depth: int) -> None:
    src = Source(handle=str(e.dxf.get("handle", "?")), layer=layer, via=via)
    name = e.dxf.get("name", "")
    block = doc.blocks.get(name)
    if block is None:
        col.finding(Code.UNSUPPORTED_ENTITY, f"INSERT names a missing block {name!r}", src)
        return
    if depth >= MAX_BLOCK_DEPTH:
        col.finding(
            Code.UNSUPPORTED_ENTITY,
            f"block references nested deeper than {MAX_BLOCK_DEPTH} (a block that inserts itself?)",
            src,
        )
        return
    ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
    if ocs is None:
        col.finding(Code.OUT_OF_PLANE, "INSERT is not in the XY plane; ignored", src)
        return
    ins = e.dxf.get("insert", (0.0, 0.0, 0.0))
    base = block.block.dxf.get("base_point", (0.0, 0.0, 0.0)) if block.block else (0.0, 0.0, 0.0)
    sx = float(e.dxf.get("xscale", 1.0))
    sy = float(e.dxf.get("yscale", 1.0))
    rot = float(e.dxf.get("rotation", 0.0))
    if not _finite(float(ins[0]), float(ins[1]), sx, sy, rot, float(base[0]), float(base[1])):
        col.finding(Code.BAD_COORDINATE, "INSERT has a non-finite or huge value", src)
        return
    if sx == 0.0 or sy == 0.0:
        col.finding(Code.DEGENERATE_ENTITY, "INSERT has a zero scale factor; ignored", src)
        return
    rows = max(1, int(e.dxf.get("row_count", 1)))
    cols = max(1, int(e.dxf.get("column_count", 1)))
    row_sp = float(e.dxf.get("row_spacing", 0.0))
    col_sp = float(e.dxf.get("column_spacing", 0.0))
    inner = Affine.scaling(sx, sy) @ Affine.translation(-float(base[0]), -float(base[1]))
    head = m @ ocs @ Affine.translation(float(ins[0]), float(ins[1])) @ Affine.rotation(rot)
    handle = src.handle
    for r in range(rows):
        for c in range(cols):
            cell = head @ Affine.translation(c * col_sp, r * row_sp) @ inner
            _walk(col, doc, block, cell, layer, (*via, handle), depth + 1)


def _take(col: _Collector, e: Any, dxftype: str, role: Role, m: Affine, src: Source) -> None:
    if dxftype in ("CIRCLE", "ARC"):
        ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
        if ocs is None:
            col.finding(Code.OUT_OF_PLANE, f"{dxftype} is not in the XY plane; ignored", src)
            return
        mm = m @ ocs
        c = e.dxf.center
        r = float(e.dxf.radius)
        if not _finite(float(c[0]), float(c[1]), r):
            col.finding(Code.BAD_COORDINATE, f"{dxftype} has a non-finite or huge coordinate", src)
            return
        center = mm.apply((float(c[0]), float(c[1])))
        if r <= 0.0:
            col.finding(Code.DEGENERATE_ENTITY, f"{dxftype} has zero radius; ignored", src, center)
            return
        scale = mm.similarity_scale(SIMILARITY_RTOL)
        if scale is None:
            scale = math.sqrt(abs(mm.det))
            col.finding(
                Code.DISTORTED_CIRCLE,
                f"{dxftype} is stretched into an ellipse by a block's non-uniform scale; its mean radius is used",
                src,
                center,
            )
        radius = r * scale
        if dxftype == "CIRCLE":
            if col.duplicate((role, *_key(*center, radius)), src, center):
                return
            col.circles.append(CircleGeom(role, center, radius, src))
            return
        a0 = math.radians(float(e.dxf.start_angle))
        a1 = math.radians(float(e.dxf.end_angle))
        span = (a1 - a0) % (2 * math.pi) or 2 * math.pi
        pts = [mm.apply((float(c[0]) + r * math.cos(t), float(c[1]) + r * math.sin(t))) for t in (a0, a0 + span)]
        s_deg = math.degrees(math.atan2(pts[0][1] - center[1], pts[0][0] - center[0])) % 360
        e_deg = math.degrees(math.atan2(pts[1][1] - center[1], pts[1][0] - center[0])) % 360
        if mm.mirrors:
            s_deg, e_deg = e_deg, s_deg
        if col.duplicate((role, *_key(*center, radius, s_deg, e_deg)), src, center):
            return
        col.arcs.append(ArcGeom(role, center, radius, s_deg, e_deg, src))
        return
    if dxftype in ("TEXT", "MTEXT"):
        _take_text(col, e, dxftype, role, m, src)
        return
    _take_path(col, e, dxftype, role, m, src)


def _take_text(col: _Collector, e: Any, dxftype: str, role: Role, m: Affine, src: Source) -> None:
    ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0))) or Affine()
    if dxftype == "TEXT":
        p = e.dxf.get("insert", (0.0, 0.0, 0.0))
        if e.dxf.get("halign", 0) or e.dxf.get("valign", 0):
            p = e.dxf.get("align_point", p)
        text = e.plain_text()
        where = m @ ocs
    else:
        p = e.dxf.get("insert", (0.0, 0.0, 0.0))
        text = e.plain_text()
        where = m  # MTEXT insert is in WCS
    if not _finite(float(p[0]), float(p[1])):
        col.finding(Code.BAD_COORDINATE, f"{dxftype} has a non-finite or huge position", src)
        return
    pos = where.apply((float(p[0]), float(p[1])))
    text = " ".join(str(text).split())
    if text:
        col.texts.append(TextGeom(role, text, pos, src))


def _take_path(col: _Collector, e: Any, dxftype: str, role: Role, m: Affine, src: Source) -> None:
    closed = False
    bulged = False
    if role is Role.BAND and dxftype == "LWPOLYLINE":
        _take_band_polyline(col, e, m, src)
        return
    if dxftype == "LINE":
        s, t = e.dxf.start, e.dxf.end
        raw: list[tuple[float, float]] = [(float(s[0]), float(s[1])), (float(t[0]), float(t[1]))]
        mm = m
    elif dxftype == "LWPOLYLINE":
        ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
        if ocs is None:
            col.finding(Code.OUT_OF_PLANE, "LWPOLYLINE is not in the XY plane; ignored", src)
            return
        mm = m @ ocs
        pts = list(e.get_points("xyb"))
        raw = [(float(x), float(y)) for x, y, _ in pts]
        bulged = any(abs(float(b)) > 0.0 for _, _, b in pts[: None if e.closed else -1])
        closed = bool(e.closed)
    else:  # POLYLINE
        if e.get_mode() != "AcDb2dPolyline":
            col.finding(Code.UNSUPPORTED_ENTITY, "only 2D POLYLINEs are used; ignored", src)
            return
        ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
        if ocs is None:
            col.finding(Code.OUT_OF_PLANE, "POLYLINE is not in the XY plane; ignored", src)
            return
        mm = m @ ocs
        raw = [(float(v.dxf.location[0]), float(v.dxf.location[1])) for v in e.vertices]
        bulged = any(abs(float(v.dxf.get("bulge", 0.0))) > 0.0 for v in e.vertices)
        closed = bool(e.is_closed)
    if not _finite(*(c for p in raw for c in p)):
        col.finding(Code.BAD_COORDINATE, f"{dxftype} has a non-finite or huge coordinate", src)
        return
    pts_w = [mm.apply(p) for p in raw]
    # drop repeated vertices
    clean: list[Point] = []
    for p in pts_w:
        if not clean or p != clean[-1]:
            clean.append(p)
    if closed and len(clean) > 2 and clean[0] != clean[-1]:
        clean.append(clean[0])
    if len(clean) < 2:
        col.finding(Code.DEGENERATE_ENTITY, f"{dxftype} has zero length; ignored", src, pts_w[0] if pts_w else None)
        return
    if bulged:
        col.finding(
            Code.CURVED_LINK,
            f"{dxftype} has arc segments; its straight chords are used as the centreline",
            src,
            clean[0],
        )
    if col.duplicate((role, *_key(*(c for p in clean for c in p))), src, clean[0]):
        return
    col.paths.append(PathGeom(role, tuple(clean), src))


def _take_band_polyline(col: _Collector, e: Any, m: Affine, src: Source) -> None:
    """A band drawn as one polyline: its arc segments (bulges) become band
    arcs, its straight segments band pieces."""
    from ezdxf.math import bulge_to_arc

    ocs = _ocs_affine(e.dxf.get("extrusion", (0.0, 0.0, 1.0)))
    if ocs is None:
        col.finding(Code.OUT_OF_PLANE, "LWPOLYLINE is not in the XY plane; ignored", src)
        return
    mm = m @ ocs
    pts = [(float(x), float(y), float(b)) for x, y, b in e.get_points("xyb")]
    if not _finite(*(c for p in pts for c in p)):
        col.finding(Code.BAD_COORDINATE, "LWPOLYLINE has a non-finite or huge coordinate", src)
        return
    scale = mm.similarity_scale(SIMILARITY_RTOL) or math.sqrt(abs(mm.det))
    for (x0, y0, b), (x1, y1, _) in itertools.pairwise(pts):
        p0, p1 = mm.apply((x0, y0)), mm.apply((x1, y1))
        if p0 == p1:
            continue
        if b == 0.0:
            col.paths.append(PathGeom(Role.BAND, (p0, p1), src))
            continue
        center, a0, a1, radius = bulge_to_arc((x0, y0), (x1, y1), b)
        c = mm.apply((float(center[0]), float(center[1])))
        s_pt = mm.apply((float(center[0]) + radius * math.cos(a0), float(center[1]) + radius * math.sin(a0)))
        e_pt = mm.apply((float(center[0]) + radius * math.cos(a1), float(center[1]) + radius * math.sin(a1)))
        s_deg = math.degrees(math.atan2(s_pt[1] - c[1], s_pt[0] - c[0])) % 360
        e_deg = math.degrees(math.atan2(e_pt[1] - c[1], e_pt[0] - c[0])) % 360
        if mm.mirrors:
            s_deg, e_deg = e_deg, s_deg
        col.arcs.append(ArcGeom(Role.BAND, c, radius * scale, s_deg, e_deg, src))


#: How a user confirms an assumed drawing unit (``check`` fails until then).
_CONFIRM_UNITS = (
    "Set $INSUNITS in the drawing (4 mm, 1 inch, 6 m), pass --units, or give the spec key units "
    '(e.g. units = "mm"); `check` fails its units rule until the unit is confirmed'
)


def _units(doc: Any, override: str | None, path: str) -> tuple[str, float, str, list[Finding]]:
    """The drawing unit: (name, [mm] per unit, where it came from, D101
    findings).  ``--units`` wins; then ``$INSUNITS``; where that is 0 or
    unknown, ``$MEASUREMENT`` (0 inch, 1 mm); else millimetres.  Both
    fallbacks are assumptions (D101) that ``check`` does not pass until the
    unit is confirmed (see :mod:`dxfcheck.plausibility`)."""
    findings: list[Finding] = []
    if override is not None:
        try:
            return override, length_unit_factor(override), "option", findings
        except UnitError as exc:
            from dxfcheck.errors import ConfigError

            raise ConfigError(f"--units: {exc}") from exc
    insunits = int(doc.header.get("$INSUNITS", 0) or 0)
    if insunits in INSUNITS_MM:
        name, factor = INSUNITS_MM[insunits]
        return name, factor, "$INSUNITS", findings
    measurement = doc.header.get("$MEASUREMENT", None)
    if measurement is not None and int(measurement) in (0, 1):
        name, factor = ("inch", 25.4) if int(measurement) == 0 else ("mm", 1.0)
        findings.append(
            Finding(
                Code.UNITS_ASSUMED,
                f"$INSUNITS is unset; {name} assumed from $MEASUREMENT = {int(measurement)}. {_CONFIRM_UNITS}",
            )
        )
        return name, factor, "$MEASUREMENT", findings
    findings.append(
        Finding(
            Code.UNITS_ASSUMED,
            f"$INSUNITS and $MEASUREMENT are unset; millimetres assumed. {_CONFIRM_UNITS}",
        )
    )
    return "mm", 1.0, "default", findings


def _sniff(path: Path, head: bytes, tail: bytes) -> None:
    """Refuse what is plainly not a complete DXF file, with what it looks like."""
    spath = str(path)
    if not head.strip():
        raise DrawingReadError("is empty; it is not a DXF drawing", path=spath)
    looks = {
        b"AC10": "a DWG file; save it as DXF from the CAD program",
        b"AC1.": "a DWG file; save it as DXF from the CAD program",
        b"%PDF": "a PDF document, not a drawing in DXF",
        b"PK\x03\x04": "a ZIP archive (DWFx, DOCX...), not DXF; unpack or re-export it",
        b"\x89PNG": "a PNG image, not DXF",
        b"\xff\xd8\xff": "a JPEG image, not DXF",
        b"<?xml": "an XML file, not DXF",
        b"{": "a JSON file, not DXF",
    }
    for magic, what in looks.items():
        if head.startswith(magic):
            raise DrawingReadError(f"looks like {what}", path=spath)
    binary = head.startswith(BINARY_SENTINEL)
    if not binary and b"\x00" in head:
        raise DrawingReadError("is a binary file that is not DXF; export the drawing as DXF", path=spath)
    first = head.lstrip(b"\xef\xbb\xbf").split(None, 1)[0] if not binary else b"0"
    if not first.isdigit():  # described, never quoted: the file may be anything (a secret behind a link)
        kind = "text" if first.isascii() and first.decode("ascii").isprintable() else "binary data"
        more = "+" if head.endswith(first) and len(head) >= 64 else ""
        raise DrawingReadError(
            f"is not a DXF file: a DXF file starts with a group code (a number), this one with {len(first)}{more} "
            f"bytes of {kind} (not shown)",
            path=spath,
        )
    ended = b"EOF\x00" in tail if binary else tail.rstrip().endswith(b"EOF")
    if not ended:
        raise DrawingReadError(
            "ends before the DXF end-of-file marker: it is cut off or still being written; "
            "wait for the save to finish or export it again",
            path=spath,
        )


def precheck(path: Path, max_bytes: int | None = None) -> int:
    """Refuse a missing, unreadable, over-large, cut-off or non-DXF file with
    one clear message; returns its size [bytes].

    Raises
    ------
    DrawingReadError
    """
    spath = str(path)
    if not path.exists():
        raise DrawingReadError("no such file; check the path", path=spath)
    if path.is_dir():
        raise DrawingReadError("is a folder, not a drawing; name a .dxf file", path=spath)
    if not os.access(path, os.R_OK):
        raise DrawingReadError("cannot be read (permission denied); check the file's permissions", path=spath)
    limit = MAX_INPUT_BYTES if max_bytes is None else max_bytes
    size = path.stat().st_size
    if size > limit:
        raise DrawingReadError(
            f"is {size / 1e6:.1f} MB, over the {limit / 1e6:.0f} MB limit; raise it with --max-size", path=spath
        )
    try:
        with open(path, "rb") as fh:
            head = fh.read(64)
            fh.seek(max(0, size - 64))
            tail = fh.read(64)
    except OSError as exc:
        raise DrawingReadError(f"cannot be read ({exc.strerror})", path=spath) from exc
    _sniff(path, head, tail)
    return size


def load_document(
    path: Path, *, max_bytes: int | None = None, checked_size: int | None = None
) -> tuple[Any, list[Finding]]:
    """Open a DXF file with ezdxf, falling back to its recover mode for a
    damaged file; returns the document and what the recovery repaired (as
    findings).

    Parameters
    ----------
    path : Path
    max_bytes : int, optional
        Refuse files larger than this (default :data:`MAX_INPUT_BYTES`).
    checked_size : int, optional
        The size :func:`precheck` already found [bytes]; the checks are not
        run again.

    Raises
    ------
    DrawingReadError
        When the file is missing, a folder, unreadable, empty, too large,
        DWG or another format, cut off, or damaged beyond repair.
    """
    from ezdxf import recover
    from ezdxf.filemanagement import readfile

    spath = str(path)
    size = precheck(path, max_bytes) if checked_size is None else checked_size
    findings: list[Finding] = []
    try:
        doc = readfile(spath)
    except Exception:  # any failure of the strict parser: try the recovering one
        try:
            doc, auditor = recover.readfile(spath)
        except Exception as exc:  # beyond both of ezdxf's readers
            raise DrawingReadError(
                f"is not a readable DXF drawing ({type(exc).__name__}: {exc}); open and re-save it in the CAD program",
                path=spath,
            ) from exc
        if len(doc.modelspace()) == 0 and size > EMPTY_RECOVERY_BYTES:
            raise DrawingReadError(
                "is damaged beyond repair: nothing could be recovered from it; re-export the drawing", path=spath
            ) from None
        findings.append(
            Finding(
                Code.REPAIRED,
                f"the file is damaged; ezdxf's recover mode read it ({len(auditor.errors)} "
                f"errors, {len(auditor.fixes)} fixes): check the results against the drawing",
            )
        )
        for err in list(auditor.errors)[:MAX_REPAIR_FINDINGS]:
            findings.append(Finding(Code.REPAIRED, f"repaired on reading: {err.message}"))
    return doc, findings


def _open(path: Path, config: Config, max_bytes: int | None, reader: str) -> tuple[Any, list[Finding]]:
    """The full reader, or the fast one for big ASCII files (``reader``:
    ``auto``, ``fast`` or ``full``); the fast one falls back to the full one
    on anything it does not follow."""
    if reader not in ("auto", "fast", "full"):
        raise ValueError(f"reader must be auto, fast or full, got {reader!r}")
    size = precheck(path, max_bytes)
    if reader == "fast" or (reader == "auto" and size >= FAST_READER_MIN_BYTES):
        from dxfcheck.fastread import load_fast

        try:
            return load_fast(path, config.role_of_layer()), []
        except Exception:  # anything the fast reader does not follow: the full reader decides
            pass
    return load_document(path, max_bytes=max_bytes, checked_size=size)


def read_drawing(
    path: str | os.PathLike[str],
    config: Config | None = None,
    *,
    units: str | None = None,
    max_bytes: int | None = None,
    reader: str = "auto",
) -> Drawing:
    """Read the skeleton geometry of a DXF drawing.

    Parameters
    ----------
    path : path-like
        The DXF file (ASCII or binary).  It is only read, never written.
    config : Config, optional
        Layer roles; defaults to the built-in layer names.
    units : str, optional
        Override the drawing unit (``"mm"``, ``"inch"``...).
    max_bytes : int, optional
        Refuse larger files [bytes].
    reader : str
        ``auto`` (the fast reader for files of 2 MB and more), ``fast`` or
        ``full``.

    Returns
    -------
    Drawing
        Geometry in world [mm] with the findings met while reading.

    Raises
    ------
    DrawingReadError
        When the file is missing, unreadable or not DXF.
    """
    p = Path(path)
    config = config or Config()
    doc, findings = _open(p, config, max_bytes, reader)
    unit_name, factor, unit_src, unit_findings = _units(doc, units, str(p))
    col = _Collector(path=str(p), roles=config.role_of_layer())
    _walk(col, doc, doc.modelspace(), Affine.scaling(factor, factor), None, (), 0)
    n = len(col.circles) + len(col.arcs) + len(col.paths) + len(col.texts)
    if n > MAX_SKELETON_ENTITIES:
        raise DrawingReadError(
            f"has {n} entities on the skeleton layers (more than {MAX_SKELETON_ENTITIES}): the layer map probably "
            "names a layer of outlines or hatching; check the [layers] table of dxfcheck.toml",
            path=str(p),
        )
    return Drawing(
        path=str(p),
        units=unit_name,
        mm_per_unit=factor,
        units_source=unit_src,
        dxfversion=str(doc.dxfversion),
        circles=tuple(col.circles),
        arcs=tuple(col.arcs),
        paths=tuple(col.paths),
        texts=tuple(col.texts),
        findings=tuple(findings + unit_findings + col.findings),
        custom_properties=_custom_properties(doc),
        layer_map=tuple((role, tuple(config.layers.get(role, ()))) for role in Role),
        layer_map_source=config.path,
        other_layers=tuple((name, tuple(sorted(kinds))) for _, (name, kinds) in sorted(col.other.items())),
        loose_circles=tuple(col.loose),
    )


#: Header variables ezdxf resets on loading that a faithful copy restores.
CREATION_STAMPS = ("$TDCREATE", "$TDUCREATE")


def raw_header_values(path: Path, names: tuple[str, ...] = CREATION_STAMPS) -> dict[str, float]:
    """Numeric header variables read straight from an ASCII DXF file's
    HEADER section (binary files give an empty dict)."""
    out: dict[str, float] = {}
    try:
        with open(path, "rb") as fh:
            if fh.read(22).startswith(b"AutoCAD Binary DXF"):
                return out
            fh.seek(0)
            want: str | None = None
            code: str | None = None
            for raw in fh:
                line = raw.decode("latin-1").strip()
                if code is None:
                    code = line
                    continue
                value, code_now = line, code
                code = None
                if code_now == "0" and value == "ENDSEC":
                    break
                if code_now == "9":
                    want = value if value in names else None
                elif want is not None and code_now == "40":
                    out[want] = float(value)
                    want = None
    except (OSError, ValueError):
        return {}
    return out


def _custom_properties(doc: Any) -> tuple[tuple[str, str], ...]:
    try:
        return tuple((str(k), str(v)) for k, v in doc.header.custom_vars)
    except (AttributeError, TypeError, ValueError):
        return ()
