"""The roles every drafting style shares: the drum, the shoe arcs, the pin
holes and which of them are pivots.

* The **drum** is the circle on which lining arcs lie (arcs concentric with
  it, at its radius).  Circles concentric with the drum at other radii are
  its hub, bore or shaft, and arcs at other radii a shoe's backing plate.
* A **shoe arc** is an arc at the drum's centre and radius.
* A **pin** is a place where a hole circle is shared: the circles whose
  centres coincide (within the tolerance) form one hole; the smallest is the
  pin's diameter and the larger ones bosses or eyes.
* A **pivot** is a pin that the frame holds: its outer circle touches frame
  geometry (a hatch, or anything on a frame layer of the ``[infer]`` table).

Spatial questions go through shapely's STRtree, so that a drawing of many
thousands of entities is read in about linear time.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, dist
from dxfcheck.core.records import record
from dxfcheck.infer.linework import RawArc, RawCircle, RawPath
from dxfcheck.read.drawing import ArcGeom, CircleGeom, Source

__all__ = [
    "BOSS_RATIO",
    "INFER_MIN_MM",
    "INFER_RTOL",
    "Hole",
    "PointIndex",
    "drum_of",
    "fmt",
    "frame_index",
    "held_by_frame",
    "holes",
    "infer_finding",
    "shoe_arcs",
    "tolerance_of",
]

#: Inference tolerance as a fraction of the linework's bounding-box diagonal.
INFER_RTOL = 1e-4
#: Floor of the inference tolerance [mm].
INFER_MIN_MM = 1e-6
#: Concentric circles whose radii differ by less than this factor are holes
#: of one pin drawn at slightly different sizes (M235); larger ones around a
#: hole are bosses or eyes.
BOSS_RATIO = 1.25


def infer_finding(code: Code, msg: str, srcs: Sequence[Source] = (), at: Point | None = None) -> Finding:
    """A finding of the inference on the entities ``srcs`` at ``at`` [mm]."""
    return Finding(code, msg, tuple(s.ref for s in srcs), tuple(s.layer for s in srcs), at)


def fmt(p: Point) -> str:
    return f"({p[0]:.6g}, {p[1]:.6g})"


def tolerance_of(points: Sequence[Point]) -> float:
    """The inference tolerance for linework spanning ``points`` [mm]."""
    if not points:
        return INFER_MIN_MM
    xs, ys = [p[0] for p in points], [p[1] for p in points]
    return max(INFER_MIN_MM, INFER_RTOL * math.hypot(max(xs) - min(xs), max(ys) - min(ys)))


class PointIndex:
    """Points in an STRtree: which lie within a distance of a point."""

    def __init__(self, points: Sequence[Point]) -> None:
        import shapely

        self._tree = shapely.STRtree(shapely.points(list(points)) if points else [])
        self._n = len(points)

    def near(self, p: Point, within: float) -> list[int]:
        """Indices of the points within ``within`` [mm] of ``p``, sorted."""
        import shapely

        if not self._n:
            return []
        hits = self._tree.query(shapely.Point(p), predicate="dwithin", distance=within)
        return sorted(int(i) for i in hits)

    def near_all(self, points: Sequence[Point], within: float) -> list[list[int]]:
        """:meth:`near` for every point, in one query of the tree."""
        import shapely

        out: list[list[int]] = [[] for _ in points]
        if not self._n or not points:
            return out
        src, hit = self._tree.query(shapely.points(list(points)), predicate="dwithin", distance=within)
        for i, j in zip(src.tolist(), hit.tolist(), strict=True):
            out[i].append(j)
        return [sorted(x) for x in out]


def drum_of(
    circles: Sequence[RawCircle], arcs: Sequence[tuple[Point, float]], tol: float
) -> tuple[RawCircle | None, list[Finding]]:
    """The drum: the circle with the most arcs (``arcs``: centre [mm],
    radius [mm]) concentric with it at its radius, then the largest; M231
    when several circles carry arcs, M232 when none does."""
    index = PointIndex([a[0] for a in arcs])
    scored: dict[tuple[float, float, float], tuple[int, RawCircle]] = {}
    for c, near in zip(circles, index.near_all([c.center for c in circles], tol), strict=True):
        n = sum(1 for i in near if abs(arcs[i][1] - c.radius_mm) <= tol)
        key = (round(c.center[0] / tol), round(c.center[1] / tol), round(c.radius_mm / tol))
        if n and key not in scored:
            scored[key] = (n, c)
    if not scored:
        big = sorted(circles, key=lambda c: -c.radius_mm)[:3]
        named = "; ".join(f"r {c.radius_mm:.6g} mm at {fmt(c.center)} [entity {c.source_ref}]" for c in big)
        msg = (
            "no circle carries a lining arc (an arc concentric with it at its radius), so no drum was found"
            + (f"; the largest circles: {named}" if named else "")
            + ". Draw the lining's face on the drum's radius, or put the drum on the DRUM layer"
        )
        return None, [infer_finding(Code.NO_LINING_CIRCLE, msg, [c.ink.source for c in big])]
    ranked = sorted(scored.values(), key=lambda nc: (-nc[0], -nc[1].radius_mm))
    drum = ranked[0][1]
    if len(ranked) == 1:
        return drum, []
    named = "; ".join(f"r {c.radius_mm:.6g} mm at {fmt(c.center)} ({n} arcs)" for n, c in ranked)
    msg = (
        f"{len(ranked)} circles carry lining arcs and might be the drum: {named}; the first is taken. "
        "Put the drum's braking surface on the DRUM layer to settle it"
    )
    return drum, [infer_finding(Code.DRUM_AMBIGUOUS, msg, [c.ink.source for _, c in ranked], drum.center)]


def shoe_arcs(drum: RawCircle, arcs: Sequence[RawArc], tol: float) -> tuple[ArcGeom, ...]:
    """The arcs at the drum's centre and radius (each span once), as SHOE
    arcs; arcs concentric at other radii (backing plates) are not."""
    out: list[ArcGeom] = []
    seen: set[tuple[int, int]] = set()
    for a in arcs:
        if dist(a.center, drum.center) > tol or abs(a.radius_mm - drum.radius_mm) > tol:
            continue
        key = (round(a.start_deg * 1e6), round(a.end_deg * 1e6))
        if key in seen:
            continue
        seen.add(key)
        out.append(ArcGeom(Role.SHOE, a.center, a.radius_mm, a.start_deg, a.end_deg, a.ink.source))
    return tuple(out)


@record(frozen=True)
class Hole:
    """Concentric circles at one place: ``circles`` smallest first (every
    circle drawn there, in whichever part or block)."""

    circles: tuple[RawCircle, ...]

    @property
    def center(self) -> Point:
        return self.circles[0].center

    @property
    def radius_mm(self) -> float:
        """The pin's radius: the smallest circle's [mm]."""
        return self.circles[0].radius_mm

    @property
    def outer_mm(self) -> float:
        """The largest circle's radius (boss, eye) [mm]."""
        return self.circles[-1].radius_mm

    def geom(self, role: Role) -> CircleGeom:
        return CircleGeom(role, self.center, self.radius_mm, self.circles[0].ink.source)

    def same_size(self, tol: float) -> list[RawCircle]:
        """The circles within :data:`BOSS_RATIO` of the smallest (the hole
        as drawn in each part), one per diameter (within ``tol``)."""
        return _unique([c for c in self.circles if c.radius_mm < BOSS_RATIO * self.radius_mm], tol)


def holes(circles: Sequence[RawCircle], drum: RawCircle | None, tol: float) -> list[Hole]:
    """The circles grouped by centre (within ``tol``), in drawing order of
    each group's first circle; circles concentric with the drum are left
    out (hub, bore, shaft)."""
    pool = [c for c in circles if drum is None or dist(c.center, drum.center) > tol]
    index = PointIndex([c.center for c in pool])
    near = index.near_all([c.center for c in pool], tol)
    taken = [False] * len(pool)
    out: list[Hole] = []
    for i in range(len(pool)):
        if taken[i]:
            continue
        group = [j for j in near[i] if not taken[j]]
        for j in group:
            taken[j] = True
        out.append(Hole(tuple(sorted((pool[j] for j in group), key=lambda q: q.radius_mm))))
    return out


def _unique(circles: Sequence[RawCircle], tol: float) -> list[RawCircle]:
    """One circle per radius (a circle drawn twice, or the same hole drawn
    in two parts exactly alike, counts once), smallest first (``circles``
    sorted by radius)."""
    out: list[RawCircle] = []
    for c in circles:
        if not out or c.radius_mm - out[-1].radius_mm > tol:
            out.append(c)
    return out


def frame_index(frame: Sequence[RawPath]) -> object | None:
    """An STRtree over the frame geometry (hatch boundaries and closed
    paths as polygons, open paths as lines), or None when there is none."""
    import shapely

    geoms = []
    for p in frame:
        if p.closed and len(p.points) >= 4:
            poly = shapely.Polygon(p.points)
            geoms.append(poly if poly.is_valid else poly.buffer(0))
        elif len(p.points) >= 2:
            geoms.append(shapely.LineString(p.points))
    return shapely.STRtree(geoms) if geoms else None


def held_by_frame(tree: object, hole: Hole, tol: float) -> bool:
    """Whether the hole's outer circle touches the frame geometry."""
    import shapely

    hits = tree.query(shapely.Point(hole.center), predicate="dwithin", distance=hole.outer_mm + tol)  # type: ignore[attr-defined]
    return len(hits) > 0
