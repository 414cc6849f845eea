"""Read a layered DXF drawing into plane geometry in [mm].

A DWG drawing (named ``.dwg``) is first made into an in-memory DXF
document by :mod:`dxfcheck.read.dwg` and then read the same way.

This is the first stage of the pipeline.  It keeps only the entities on the
layers that carry the brake's skeleton (see :class:`dxfcheck.core.config.Role`),
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

import contextlib
import itertools
import math
import os
import re
import stat
import sys
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

from dxfcheck.core import deadline
from dxfcheck.core.config import Config, Role
from dxfcheck.core.errors import ConfigError, DrawingReadError, DxfcheckError
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Affine, Point
from dxfcheck.core.imports import when_imported
from dxfcheck.core.records import record
from dxfcheck.core.units import INSUNITS_MM, UnitError, length_unit_factor
from dxfcheck.read import dwg, fast
from dxfcheck.read.fast import MAX_LOOSE_CIRCLES_PER_LAYER, FastReadUnsupported

if TYPE_CHECKING:  # loaded with ezdxf (_ezdxf_messages), not with the reader
    import logging

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
#: Most entities visited inside block references (each placement of a
#: block's entity counts once): blocks that insert each other many times
#: over multiply without limit (ten references per block, twelve levels
#: deep, are 10^12 placements), so the walk stops here and names the blocks.
MAX_BLOCK_VISITS = 2_000_000
#: Duplicate-entity findings kept one by one; more are counted in one.
MAX_DUPLICATE_FINDINGS = 50
#: Most skeleton entities drawn over one another: more means blocks place
#: the skeleton on itself many times over, and the drawing is refused.
MAX_DUPLICATES = 20_000
#: |z| of an extrusion vector below which it counts as lying along the z axis.
PLANAR_EXTRUSION_TOL = 1e-9
#: Largest coordinate magnitude accepted [drawing units]; beyond it a value
#: is treated as garbage rather than geometry.
MAX_COORDINATE = 1e12
#: Largest input file read [bytes] unless raised (``--max-size``).
MAX_INPUT_BYTES = 200_000_000
#: Files this large [bytes] and larger go through the fast reader
#: (:mod:`dxfcheck.read.fast`) unless asked otherwise: every ASCII file (the
#: fast reader follows small drawings as well, and spares loading ezdxf).
FAST_READER_MIN_BYTES = 0
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


@record(frozen=True)
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


@record(frozen=True)
class CircleGeom:
    """A circle: ``center`` [mm], ``radius_mm`` [mm]."""

    role: Role
    center: Point
    radius_mm: float
    source: Source


@record(frozen=True)
class LooseCircle:
    """A circle on a layer that has no role: not skeleton, kept only to
    recognise a layer near miss (pins drawn on ``PINS``, the drum on
    ``BRK-DRUM``; see :mod:`dxfcheck.mechanism.layers`).  ``center`` [mm],
    ``radius_mm`` [mm]."""

    center: Point
    radius_mm: float
    source: Source


@record(frozen=True)
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


@record(frozen=True)
class PathGeom:
    """A chain of straight segments through ``points`` [mm]."""

    role: Role
    points: tuple[Point, ...]
    source: Source

    def segments(self) -> Iterator[tuple[Point, Point]]:
        for i in range(len(self.points) - 1):
            yield self.points[i], self.points[i + 1]


@record(frozen=True)
class TextGeom:
    """A text string and its insertion point [mm]."""

    role: Role
    text: str
    position: Point
    source: Source


@record(frozen=True)
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
        ``units``, applied by :func:`dxfcheck.pipeline.check`).
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
    config_path : str or None
        The project file read (None: none was found or named).
    sidecar_path : str or None
        The drawing's own file ``NAME.toml`` read beside it, if any.
    skeleton_source : str
        Where the skeleton came from: ``layers`` (the role layers) or
        ``geometry (STYLE)`` when :mod:`dxfcheck.infer` inferred it.
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
    config_path: str | None = None
    sidecar_path: str | None = None
    skeleton_source: str = "layers"

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


def _finding(code: Code, message: str, src: Source | None = None, at: Point | None = None) -> Finding:
    """The one way this reader makes a finding: on an entity (``src``: its
    handle, with the INSERTs that placed it, and its effective layer; ``at``
    where it is [mm]) or, without ``src``, on the whole file."""
    if src is None:
        return Finding(code, message, at=at)
    return Finding(code, message, (src.ref,), (src.layer,), at)


@dataclass
class _Collector:
    """What one reading of a drawing gathers: the skeleton's geometry on the
    role layers, the findings, and the counts the limits are checked on."""

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
    #: entities visited inside block references, and placements per block
    visits: int = 0
    placed: dict[str, int] = field(default_factory=dict)
    #: names of the blocks being walked, outermost first (recursion check)
    chain: list[str] = field(default_factory=list)
    duplicates: int = 0
    #: skeleton items kept so far
    kept: int = 0

    def keep(self) -> None:
        """Count one skeleton item; refuse the drawing past
        :data:`MAX_SKELETON_ENTITIES` as soon as it is reached."""
        self.kept += 1
        if self.kept > MAX_SKELETON_ENTITIES:
            raise DrawingReadError(
                f"has more than {MAX_SKELETON_ENTITIES} entities on the skeleton layers: the layer map probably "
                "names a layer of outlines or hatching, or blocks place the skeleton many times over; check the "
                "[layers] table of dxfcheck.toml",
                path=self.path,
            )

    def visit(self, in_block: bool) -> None:
        """Count one entity visited (inside a block: against
        :data:`MAX_BLOCK_VISITS`); stop at the run's deadline."""
        if not in_block:
            return
        self.visits += 1
        if self.visits > MAX_BLOCK_VISITS:
            raise DrawingReadError(_fan_out_message(self.placed), path=self.path)
        if self.visits % 1024 == 0:
            deadline.check("reading the drawing's blocks")

    def note_other(self, layer: str, dxftype: str) -> None:
        """Remember that a layer with no role holds a ``dxftype``."""
        self.other.setdefault(layer.upper(), (layer, set()))[1].add(dxftype)

    def finding(self, code: Code, message: str, src: Source | None = None, at: Point | None = None) -> None:
        """Record a finding made by :func:`_finding`."""
        self.findings.append(_finding(code, message, src, at))

    def duplicate(self, key: tuple[Any, ...], src: Source, at: Point) -> bool:
        if key in self._seen:
            self.duplicates += 1
            if self.duplicates > MAX_DUPLICATES:
                raise DrawingReadError(
                    f"has more than {MAX_DUPLICATES:,} skeleton entities drawn over one another (blocks that place "
                    f"the skeleton many times on itself; placed most often: {_most_placed(self.placed)}); "
                    "purge the copies in the CAD program",
                    path=self.path,
                )
            if self.duplicates <= MAX_DUPLICATE_FINDINGS:
                self.finding(Code.DUPLICATE_ENTITY, "entity drawn twice; the copy is ignored", src, at)
            return True
        self._seen.add(key)
        return False

    def close(self) -> None:
        """Findings that sum up what was counted."""
        more = self.duplicates - MAX_DUPLICATE_FINDINGS
        if more > 0:
            self.finding(Code.DUPLICATE_ENTITY, f"{more} more entities drawn twice (not listed one by one); ignored")


def _cells(e: Any) -> int:
    """Placements of one INSERT (rows × columns of a MINSERT)."""
    try:
        return max(1, int(e.dxf.get("row_count", 1))) * max(1, int(e.dxf.get("column_count", 1)))
    except DxfcheckError:  # a refusal of ours is never a damaged entity
        raise
    except _damaged():
        return 1


@dataclass
class _Expansion:
    """How many entities the block references of a drawing place, counted
    over the block graph before any is walked (as :func:`_walk_insert`
    would: depth-limited, a block inside itself not followed)."""

    doc: Any
    contents: dict[str, tuple[int, list[tuple[str, int]]]] = field(default_factory=dict)
    memo: dict[tuple[str, int], int] = field(default_factory=dict)
    largest: dict[str, tuple[int, int]] = field(default_factory=dict)  # name -> (expansion, references inside)

    def _contents(self, name: str) -> tuple[int, list[tuple[str, int]]] | None:
        key = name.upper()
        if key not in self.contents:
            block = self.doc.blocks.get(name)
            if block is None:
                return None
            n, inserts = 0, []
            for e in block:
                n += 1
                if e.dxftype() == "INSERT":
                    inserts.append((str(e.dxf.get("name", "")), _cells(e)))
            self.contents[key] = (n, inserts)
        return self.contents[key]

    def expand(self, name: str, depth: int, stack: tuple[str, ...] = ()) -> int:
        """Entities visited for one placement of ``name`` from a container
        at ``depth`` (an exact integer: memoised, the depth is bounded)."""
        key = name.upper()
        if depth >= MAX_BLOCK_DEPTH or key in stack:
            return 0
        if (key, depth) in self.memo:
            return self.memo[(key, depth)]
        found = self._contents(name)
        if found is None:
            return 0
        n, inserts = found
        total = 1 + n
        for child, cells in inserts:
            total += cells * self.expand(child, depth + 1, (*stack, key))
        self.memo[(key, depth)] = total
        if total > self.largest.get(name, (0, 0))[0]:
            self.largest[name] = (total, len(inserts))
        return total


def _check_expansion(doc: Any, path: str) -> None:
    """Refuse a drawing whose block references would place more than
    :data:`MAX_BLOCK_VISITS` entities, before walking them, naming the
    blocks that fan out."""
    ex = _Expansion(doc)
    total = 0
    for e in doc.modelspace():
        try:
            if e.dxftype() == "INSERT":
                total += _cells(e) * ex.expand(str(e.dxf.get("name", "")), 0)
        except DxfcheckError:  # a refusal of ours is never a damaged entity
            raise
        except _damaged():  # reported when the walk meets it
            continue
        if total > MAX_BLOCK_VISITS:
            break
    if total > MAX_BLOCK_VISITS:
        top = sorted(ex.largest.items(), key=lambda kv: (-kv[1][0], kv[0]))[:4]
        named = ", ".join(f"{name!r} places {_count(size)} ({refs} references inside)" for name, (size, refs) in top)
        raise DrawingReadError(
            f"its block references would place more than {MAX_BLOCK_VISITS:,} entities: blocks insert each other "
            f"many times over ({named}); the drawing cannot be read in bounded time. Explode or purge those blocks "
            "in the CAD program",
            path=path,
        )


def _count(n: int) -> str:
    return f"{n:,}" if n < 10**7 else f"{float(n):.3g}" if n < 10**300 else "10^300+"


def _most_placed(placed: dict[str, int]) -> str:
    top = sorted(placed.items(), key=lambda kv: (-kv[1], kv[0]))[:5]
    return ", ".join(f"{name!r} {count:,} times" for name, count in top) or "none"


def _fan_out_message(placed: dict[str, int]) -> str:
    return (
        f"its block references place more than {MAX_BLOCK_VISITS:,} entities (blocks that insert each other many "
        f"times over; placed most often: {_most_placed(placed)}): the drawing cannot be read in bounded time. "
        "Explode or purge those blocks in the CAD program"
    )


#: What damaged entity data raises in our own reading.
_DATA_ERRORS: tuple[type[BaseException], ...] = (
    ValueError,
    TypeError,
    AttributeError,
    LookupError,
    ArithmeticError,
    UnicodeError,
)


def _damaged() -> tuple[type[BaseException], ...]:
    """What damaged entity data raises in ezdxf or in our own reading: the
    errors a finding stands for (never a time limit, memory or recursion).
    ezdxf's ``DXFError`` only once ezdxf is loaded (the fast reader does not
    load it, and nothing else can raise it)."""
    const = sys.modules.get("ezdxf.lldxf.const")
    error = getattr(const, "DXFError", None)
    return _DATA_ERRORS if error is None else (error, *_DATA_ERRORS)


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
        col.visit(parent_layer is not None)
        try:
            dxftype = str(e.dxftype())
            layer = str(e.dxf.get("layer", "0"))
            handle = str(e.dxf.get("handle", "?"))
        except DxfcheckError:  # a refusal of ours is never a damaged entity
            raise
        except _damaged():  # an entity kind ezdxf keeps only as raw tags: not skeleton
            continue
        own = layer
        if parent_layer is not None and layer == "0":
            layer = parent_layer
        src = Source(handle=handle, layer=layer, via=via)
        if dxftype == "INSERT":
            try:
                _walk_insert(col, doc, e, m, layer, via, depth)
            except DxfcheckError:  # a refusal of ours is never a damaged entity
                raise
            except _damaged() as exc:  # a damaged block reference: report it, go on
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
        except DxfcheckError:  # a refusal of ours is never a damaged entity
            raise
        except _damaged() as exc:  # damaged entity data: report it, go on
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
    except DxfcheckError:  # a refusal of ours is never a damaged entity
        raise
    except _damaged():  # damaged data on a layer that is not the skeleton's: not our concern
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
    bname = str(block.name)
    if bname.upper() in (b.upper() for b in col.chain):
        loop = " → ".join([*col.chain[next(i for i, b in enumerate(col.chain) if b.upper() == bname.upper()) :], bname])
        col.finding(
            Code.BLOCK_RECURSIVE,
            f"block {bname!r} inserts itself ({loop}): no CAD program can draw it; the inner reference is not "
            "followed. Remove the reference from the block",
            src,
        )
        return
    if depth >= MAX_BLOCK_DEPTH:
        col.finding(
            Code.UNSUPPORTED_ENTITY,
            f"block references nested deeper than {MAX_BLOCK_DEPTH}; the deeper ones are not followed",
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
    col.chain.append(bname)
    try:
        for r in range(rows):
            for c in range(cols):
                col.placed[bname] = col.placed.get(bname, 0) + 1
                col.visit(True)  # a placement counts, even of an empty block
                cell = head @ Affine.translation(c * col_sp, r * row_sp) @ inner
                _walk(col, doc, block, cell, layer, (*via, handle), depth + 1)
    finally:
        col.chain.pop()


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
            col.keep()
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
        col.keep()
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
        col.keep()
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
    col.keep()
    col.paths.append(PathGeom(role, tuple(clean), src))


def _take_band_polyline(col: _Collector, e: Any, m: Affine, src: Source) -> None:
    """A band drawn as one polyline: its arc segments (bulges) become band
    arcs, its straight segments band pieces."""
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
            col.keep()
            col.paths.append(PathGeom(Role.BAND, (p0, p1), src))
            continue
        from ezdxf.math import bulge_to_arc  # loaded for a drawing that has a bulge

        center, a0, a1, radius = bulge_to_arc((x0, y0), (x1, y1), b)
        c = mm.apply((float(center[0]), float(center[1])))
        s_pt = mm.apply((float(center[0]) + radius * math.cos(a0), float(center[1]) + radius * math.sin(a0)))
        e_pt = mm.apply((float(center[0]) + radius * math.cos(a1), float(center[1]) + radius * math.sin(a1)))
        s_deg = math.degrees(math.atan2(s_pt[1] - c[1], s_pt[0] - c[0])) % 360
        e_deg = math.degrees(math.atan2(e_pt[1] - c[1], e_pt[0] - c[0])) % 360
        if mm.mirrors:
            s_deg, e_deg = e_deg, s_deg
        col.keep()
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
    unit is confirmed (see :mod:`dxfcheck.mechanism.plausibility`)."""
    findings: list[Finding] = []
    if override is not None:
        try:
            return override, length_unit_factor(override), "option", findings
        except UnitError as exc:
            raise ConfigError(f"--units: {exc}") from exc
    insunits = int(doc.header.get("$INSUNITS", 0) or 0)
    if insunits in INSUNITS_MM:
        name, factor = INSUNITS_MM[insunits]
        return name, factor, "$INSUNITS", findings
    measurement = doc.header.get("$MEASUREMENT", None)
    if measurement is not None and int(measurement) in (0, 1):
        name, factor = ("inch", 25.4) if int(measurement) == 0 else ("mm", 1.0)
        findings.append(
            _finding(
                Code.UNITS_ASSUMED,
                f"$INSUNITS is unset; {name} assumed from $MEASUREMENT = {int(measurement)}. {_CONFIRM_UNITS}",
            )
        )
        return name, factor, "$MEASUREMENT", findings
    findings.append(
        _finding(Code.UNITS_ASSUMED, f"$INSUNITS and $MEASUREMENT are unset; millimetres assumed. {_CONFIRM_UNITS}")
    )
    return "mm", 1.0, "default", findings


#: What a file holding DWG bytes under another name is told.
_DWG_NAMED_OTHERWISE = (
    f"a DWG file not named .dwg; rename it to .dwg to read it as DWG (needs `{dwg.INSTALL_HINT}`) or save it as "
    "DXF from the CAD program"
)


def _sniff(path: Path, head: bytes, tail: bytes) -> bytes:
    """Refuse what is plainly not a complete DXF file, with what it looks
    like; returns what follows the end-of-file marker."""
    spath = str(path)
    if not head.strip():
        raise DrawingReadError("is empty; it is not a DXF drawing", path=spath)
    looks = {
        b"AC10": _DWG_NAMED_OTHERWISE,
        b"AC1.": _DWG_NAMED_OTHERWISE,
        b"AC2.": _DWG_NAMED_OTHERWISE,
        b"MC0.": _DWG_NAMED_OTHERWISE,
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
    after = (b"" if b"EOF\x00" in tail else None) if binary else _after_eof(tail)
    if after is None:
        raise DrawingReadError(
            "ends before the DXF end-of-file marker: it is cut off or still being written; "
            "wait for the save to finish or export it again",
            path=spath,
        )
    return after


#: The end-of-file marker of an ASCII DXF file: group code 0 and ``EOF`` on
#: lines of their own.
_EOF_MARKER = re.compile(rb"(?:^|\n)[ \t]*0[ \t]*\r?\n[ \t]*EOF[ \t]*(?:\r?\n|$)")
#: Bytes at the end of a file searched for the end-of-file marker: what
#: follows it must fit (a DOS ^Z, NUL padding to a sector, a line of text).
TAIL_BYTES = 4096
#: Bytes after the end-of-file marker that are padding, not text.
_PADDING = b"\x00\x1a \t\r\n"


def _after_eof(tail: bytes) -> bytes | None:
    """What follows the last end-of-file marker in the ``tail`` of an ASCII
    file (None without a marker)."""
    ends = [m.end() for m in _EOF_MARKER.finditer(tail)]
    return tail[ends[-1] :] if ends else None


def _after_eof_finding(after: bytes) -> Finding | None:
    """D112 for what follows a complete end-of-file marker (None for white
    space only)."""
    if not after.strip(b" \t\r\n"):
        return None
    if not after.strip(_PADDING):
        only_ctrl_z = after.strip(b" \t\r\n") == b"\x1a"
        what = "a DOS end-of-file byte (^Z)" if only_ctrl_z else f"{len(after)} bytes of padding (NUL, ^Z)"
        return _finding(Code.AFTER_EOF, f"{what} after the EOF marker, as old programs wrote; ignored")
    return _finding(
        Code.AFTER_EOF,
        f"{len(after)} bytes after the EOF marker (not shown); ignored: the drawing ends at the marker. "
        "If the file was joined from pieces, export it again",
    )


def precheck(path: Path, max_bytes: int | None = None) -> int:
    """Refuse a missing, unreadable, over-large, cut-off or non-DXF file with
    one clear message; returns its size [bytes].

    Raises
    ------
    DrawingReadError
    """
    return _precheck(path, max_bytes)[0]


def _precheck(path: Path, max_bytes: int | None) -> tuple[int, list[Finding]]:
    """:func:`precheck`, with the finding on what follows the end-of-file
    marker.  A FIFO, a device or a socket is refused before it is opened
    (a read of it may never end).  A file named ``.dwg`` is checked as DWG
    (its version string)."""
    size, head, tail = _file_ends(path, max_bytes)
    if dwg.is_dwg_name(path):
        dwg.check_head(str(path), head)
        return size, []
    after = _sniff(path, head, tail)
    finding = _after_eof_finding(after)
    return size, [] if finding is None else [finding]


def _file_ends(path: Path, max_bytes: int | None) -> tuple[int, bytes, bytes]:
    """Refuse a missing, unreadable, special or over-large file; returns
    its size [bytes], its first 64 bytes and its last :data:`TAIL_BYTES`."""
    spath = str(path)
    try:
        st = os.stat(path)
    except FileNotFoundError:
        raise DrawingReadError("no such file; check the path", path=spath) from None
    except OSError as exc:
        raise DrawingReadError(f"cannot be read ({exc.strerror})", path=spath) from exc
    if stat.S_ISDIR(st.st_mode):
        raise DrawingReadError("is a folder, not a drawing; name a .dxf file", path=spath)
    if not stat.S_ISREG(st.st_mode):
        raise DrawingReadError(
            "is not a regular file (a FIFO, a device or a socket), so it may never end; save the drawing to a file",
            path=spath,
        )
    if not os.access(path, os.R_OK):
        raise DrawingReadError("cannot be read (permission denied); check the file's permissions", path=spath)
    limit = MAX_INPUT_BYTES if max_bytes is None else max_bytes
    size = st.st_size
    if size > limit:
        raise DrawingReadError(
            f"is {size / 1e6:.1f} MB, over the {limit / 1e6:.0f} MB limit; raise it with --max-size", path=spath
        )
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))  # never blocks, should it become a FIFO
        with os.fdopen(fd, "rb") as fh:
            if not stat.S_ISREG(os.fstat(fh.fileno()).st_mode):
                raise DrawingReadError("is not a regular file (a FIFO, a device or a socket)", path=spath)
            head = fh.read(64)
            fh.seek(max(0, size - TAIL_BYTES))
            tail = fh.read(TAIL_BYTES)
    except OSError as exc:
        raise DrawingReadError(f"cannot be read ({exc.strerror})", path=spath) from exc
    return size, head, tail


def load_document(
    path: Path, *, max_bytes: int | None = None, checked_size: int | None = None, config: Config | None = None
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
    config : Config, optional
        The layer roles (for a DWG: an R13 file is refused when none of its
        layers has a role).  A ``.dwg`` gives the in-memory document of
        :mod:`dxfcheck.read.dwg`.

    Raises
    ------
    DrawingReadError
        When the file is missing, a folder, unreadable, empty, too large,
        DWG or another format, cut off, or damaged beyond repair.
    """
    from ezdxf.filemanagement import readfile

    spath = str(path)
    if dwg.is_dwg_name(path):
        dd = _load_dwg(path, config or Config(), max_bytes)
        return dd.doc, list(dd.findings)
    size = precheck(path, max_bytes) if checked_size is None else checked_size
    findings: list[Finding] = []
    try:
        doc = readfile(spath)
    except DxfcheckError:  # a refusal of ours is never a damaged entity
        raise
    except _unreadable():  # a failure of the strict parser: try the recovering one
        deadline.check("reading the drawing")
        doc = _recover(spath, size, findings)
    return doc, findings


def _recover(spath: str, size: int, findings: list[Finding]) -> Any:
    """The document as ezdxf's recover mode reads a damaged file, with a
    finding for what it repaired (appended to ``findings``)."""
    from ezdxf import recover

    try:
        doc, auditor = recover.readfile(spath)
    except DxfcheckError:  # a refusal of ours is never a damaged entity
        raise
    except _unreadable() as exc:  # beyond both of ezdxf's readers
        raise DrawingReadError(
            f"is not a readable DXF drawing ({type(exc).__name__}: {exc}); open and re-save it in the CAD program",
            path=spath,
        ) from exc
    if len(doc.modelspace()) == 0 and size > EMPTY_RECOVERY_BYTES:
        raise DrawingReadError(
            "is damaged beyond repair: nothing could be recovered from it; re-export the drawing", path=spath
        ) from None
    findings.append(
        _finding(
            Code.REPAIRED,
            f"the file is damaged; ezdxf's recover mode read it ({len(auditor.errors)} "
            f"errors, {len(auditor.fixes)} fixes): check the results against the drawing",
        )
    )
    for err in list(auditor.errors)[:MAX_REPAIR_FINDINGS]:
        findings.append(_finding(Code.REPAIRED, f"repaired on reading: {err.message}"))
    return doc


def _unreadable() -> tuple[type[BaseException], ...]:
    """What ezdxf's readers raise on a file they cannot read: damaged data,
    a wrong encoding, a cut-off binary record, an I/O error."""
    import struct

    return (*_damaged(), EOFError, OSError, struct.error)


#: ezdxf's log messages kept as findings while a drawing is read.
MAX_READER_MESSAGES = 20
#: Characters of one ezdxf log message kept in its finding.
MAX_READER_MESSAGE_CHARS = 300
_SAYS = "ezdxf says: "


class _ReaderMessages:
    """ezdxf's log records of level WARNING and above as D114 findings (the
    first :data:`MAX_READER_MESSAGES`, then a count); fed by a
    :class:`logging.Handler` while ezdxf reads (:func:`_ezdxf_messages`)."""

    def __init__(self) -> None:
        self.findings: list[Finding] = []
        self.more = 0

    def add(self, record: logging.LogRecord) -> None:
        if len(self.findings) >= MAX_READER_MESSAGES:
            self.more += 1
            return
        try:
            text = " ".join(record.getMessage().split())
        except (TypeError, ValueError):  # a record whose arguments do not fit its format
            text = str(record.msg)
        self.findings.append(_finding(Code.READER_MESSAGE, f"{_SAYS}{text[:MAX_READER_MESSAGE_CHARS]}"))

    def collected(self) -> list[Finding]:
        more = [_finding(Code.READER_MESSAGE, f"{self.more} more messages from ezdxf")] if self.more else []
        return [*self.findings, *more]


@contextlib.contextmanager
def _ezdxf_messages() -> Iterator[_ReaderMessages]:
    """Route ezdxf's log records into findings while the block runs (and
    nowhere else: they do not reach standard error in their own format).
    The route is laid when ezdxf is loaded (at once if it is already): a
    drawing the fast reader reads loads neither ezdxf nor ``logging``."""
    messages = _ReaderMessages()
    saved: list[tuple[list[logging.Handler], bool, int]] = []

    def lay() -> None:
        import logging

        class _ToFindings(logging.Handler):
            def emit(self, record: logging.LogRecord) -> None:
                messages.add(record)

        logger = logging.getLogger("ezdxf")
        saved.append((logger.handlers[:], logger.propagate, logger.level))
        logger.handlers = [_ToFindings(logging.WARNING)]
        logger.propagate = False
        if logger.level == logging.NOTSET or logger.level > logging.WARNING:
            logger.setLevel(logging.WARNING)

    cancel = when_imported("ezdxf", lay)
    try:
        yield messages
    finally:
        cancel()
        if saved:
            import logging

            logger = logging.getLogger("ezdxf")
            logger.handlers, logger.propagate = saved[0][0], saved[0][1]
            logger.setLevel(saved[0][2])


def _open(path: Path, config: Config, max_bytes: int | None, reader: str) -> tuple[Any, list[Finding]]:
    """The full reader, or the fast one for ASCII files (``reader``:
    ``auto``, ``fast`` or ``full``); the fast one falls back to the full one
    on what it does not follow.  ezdxf's log messages become findings."""
    if reader not in ("auto", "fast", "full"):
        raise ValueError(f"reader must be auto, fast or full, got {reader!r}")
    size, findings = _precheck(path, max_bytes)
    with _ezdxf_messages() as log:
        doc, more = _open_checked(path, config, max_bytes, reader, size)
    repaired = " ".join(f.message for f in more)  # what the recover mode reported is not said twice
    said = [f for f in log.collected() if f.message.removeprefix(_SAYS) not in repaired]
    return doc, [*findings, *more, *said]


def _open_checked(
    path: Path, config: Config, max_bytes: int | None, reader: str, size: int
) -> tuple[Any, list[Finding]]:
    if reader == "fast" or (reader == "auto" and size >= FAST_READER_MIN_BYTES):
        fallback: tuple[type[BaseException], ...] = (FastReadUnsupported, *_unreadable())
        try:
            return fast.load_fast(path, config.role_of_layer()), []
        except DxfcheckError:  # a refusal of ours is never a damaged entity
            raise
        except fallback:  # what the fast reader does not follow: the full one decides
            deadline.check("reading the drawing")
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
        ``auto`` (the fast reader for ASCII files, falling back to the full
        reader on what it does not follow), ``fast`` or ``full``.

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
    if dwg.is_dwg_name(p):
        return _read_dwg(p, config, units, max_bytes)
    doc, findings = _open(p, config, max_bytes, reader)
    unit = _units(doc, units, str(p))
    col = _collect(doc, config, unit[1], str(p))
    return _drawing(str(p), config, doc, unit, [*findings, *unit[3], *col.findings], col)


def _load_dwg(path: Path, config: Config, max_bytes: int | None) -> dwg.DwgDocument:
    """A DWG file as an in-memory ezdxf document (:mod:`dxfcheck.read.dwg`),
    after the same checks of the file as for DXF."""
    _, head, _ = _file_ends(path, max_bytes)
    with _ezdxf_messages() as log:
        dd = dwg.load_dwg(path, head, config.role_of_layer())
    dd.findings.extend(log.collected())  # what ezdxf said while the document was built (D114)
    return dd


def _read_dwg(p: Path, config: Config, units: str | None, max_bytes: int | None) -> Drawing:
    """:func:`read_drawing` for a DWG file: its in-memory document goes
    through the same walk as a DXF document; the handles are the DWG's."""
    dd = _load_dwg(p, config, max_bytes)
    unit = _units(dd.doc, units, str(p))
    col = _collect(dd.doc, config, unit[1], str(p))
    _rehandle(col, dd.handles)
    found = [*dd.findings, *unit[3], *col.findings]
    return replace(_drawing(str(p), config, dd.doc, unit, found, col), dxfversion=dd.version)


def _rehandle(col: _Collector, handles: dict[str, str]) -> None:
    """Name every entity the walk collected by its DWG handle (``handles``:
    the in-memory document's handle -> the DWG's)."""

    def one(h: str) -> str:
        return handles.get(h, h)

    def ref(r: str) -> str:
        head, _, via = r.partition("@")
        return one(head) + ("@" + "/".join(one(v) for v in via.split("/")) if via else "")

    def src(s: Source) -> Source:
        return Source(one(s.handle), s.layer, tuple(one(v) for v in s.via))

    col.circles = [replace(c, source=src(c.source)) for c in col.circles]
    col.arcs = [replace(a, source=src(a.source)) for a in col.arcs]
    col.paths = [replace(q, source=src(q.source)) for q in col.paths]
    col.texts = [replace(t, source=src(t.source)) for t in col.texts]
    col.loose = [replace(c, source=src(c.source)) for c in col.loose]
    col.findings = [replace(f, handles=tuple(ref(h) for h in f.handles)) for f in col.findings]


def _collect(doc: Any, config: Config, mm_per_unit: float, path: str) -> _Collector:
    """Walk model space and the blocks it places (refused first when they
    fan out too far), keeping the skeleton in world [mm]; refuse more than
    :data:`MAX_SKELETON_ENTITIES` skeleton items."""
    col = _Collector(path=path, roles=config.role_of_layer())
    _check_expansion(doc, path)
    _walk(col, doc, doc.modelspace(), Affine.scaling(mm_per_unit, mm_per_unit), None, (), 0)
    col.close()
    n = len(col.circles) + len(col.arcs) + len(col.paths) + len(col.texts)
    if n > MAX_SKELETON_ENTITIES:
        raise DrawingReadError(
            f"has {n} entities on the skeleton layers (more than {MAX_SKELETON_ENTITIES}): the layer map probably "
            "names a layer of outlines or hatching; check the [layers] table of dxfcheck.toml",
            path=path,
        )
    return col


def _drawing(
    path: str,
    config: Config,
    doc: Any,
    unit: tuple[str, float, str, list[Finding]],
    findings: list[Finding],
    col: _Collector,
) -> Drawing:
    """The :class:`Drawing`: what was collected, the unit (name, [mm] per
    unit, its source), the findings in reading order, the layer map."""
    unit_name, factor, unit_src, _ = unit
    return Drawing(
        path=path,
        units=unit_name,
        mm_per_unit=factor,
        units_source=unit_src,
        dxfversion=str(doc.dxfversion),
        circles=tuple(col.circles),
        arcs=tuple(col.arcs),
        paths=tuple(col.paths),
        texts=tuple(col.texts),
        findings=tuple(findings),
        custom_properties=_custom_properties(doc),
        layer_map=tuple((role, tuple(config.layers.get(role, ()))) for role in Role),
        layer_map_source=config.layers_source,
        other_layers=tuple((name, tuple(sorted(kinds))) for _, (name, kinds) in sorted(col.other.items())),
        loose_circles=tuple(col.loose),
        config_path=config.path,
        sidecar_path=config.sidecar,
    )


#: Header variables ezdxf resets on loading that a faithful copy restores.
CREATION_STAMPS = ("$TDCREATE", "$TDUCREATE")


def raw_header_values(path: Path, names: tuple[str, ...] = CREATION_STAMPS) -> dict[str, float]:
    """Numeric header variables read straight from an ASCII DXF file's
    HEADER section (binary files give an empty dict)."""
    out: dict[str, float] = {}
    if dwg.is_dwg_name(path):  # a DWG's stamps are not in DXF form; the copy is a new DXF
        return out
    try:
        with open(path, "rb") as fh:
            if fh.read(len(BINARY_SENTINEL)).startswith(BINARY_SENTINEL):
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
