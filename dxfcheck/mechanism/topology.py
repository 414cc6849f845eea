"""The drawing's skeleton as rigid parts, and the geometry every build step
shares.

Centreline pieces whose end lies on another piece (end to end, or on a
segment's interior) at a point that holds no pin form one rigid part; pieces
that merely cross do not join.  :class:`Topology` holds the result and answers
the questions the later steps ask (``parts_at(point)``, the parts that end on
a shoe arc, a part's points).  :func:`finding` is the one way the mechanism
stage makes a finding.
"""

from __future__ import annotations

import functools
import itertools
import math
from collections.abc import Iterable, Sequence
from dataclasses import replace
from typing import Any

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.geometry import Point, angle_in_arc, dist, point_segment_distance
from dxfcheck.core.records import record
from dxfcheck.read.drawing import ArcGeom, CircleGeom, Drawing, PathGeom, Source

__all__ = [
    "ARC_SLACK_DEG",
    "INDEX_MIN_PIECES",
    "INDEX_SLACK",
    "LIES_ON_MIN_MM",
    "LIES_ON_RTOL",
    "NEAR_MISS_FACTOR",
    "LinkIndex",
    "Topology",
    "arc_distance",
    "default_tolerance",
    "finding",
    "fmt_point",
    "near_miss",
    "on_arc",
    "on_path",
    "path_ends",
    "rigid_parts",
]

#: Default "lies on" tolerance as a fraction of the skeleton's bounding-box
#: diagonal (0.1 mm on a 1 m drawing).
LIES_ON_RTOL = 1e-4
#: Floor of the "lies on" tolerance [mm].
LIES_ON_MIN_MM = 1e-6
#: Slack at each end of a shoe arc when deciding whether a point is on it
#: [degrees].
ARC_SLACK_DEG = 1e-6
#: A gap up to this many times the tolerance is reported as a near miss.
NEAR_MISS_FACTOR = 200.0

#: Slack on the spatial index's search distance, relative to the
#: tolerance: the index only proposes candidates, each then checked with
#: the exact test (:func:`on_path`), so the answers are those of a search
#: through every piece.
INDEX_SLACK = 1e-6
#: From this many centreline pieces on, :class:`LinkIndex` answers through
#: shapely STRtrees; below it, by the search through every piece, which is
#: faster there and leaves shapely unloaded.  Measured by
#: ``tests/benchmarks/bench_topology.py`` (the topology and a question per
#: piece end): the tree pays from about 28 pieces with shapely loaded, from
#: about 56 when the command must also import it (12 ms).
INDEX_MIN_PIECES = 48

#: A centreline with more points than this whose first point is its last is
#: a closed outline: its ends join nothing.
_OPEN_PATH_MAX_POINTS = 2

Segment = tuple[Point, Point]


def finding(
    code: Code,
    msg: str,
    srcs: Sequence[Source] = (),
    at: Point | None = None,
    *,
    severity: Severity | None = None,
) -> Finding:
    """A finding on the entities ``srcs`` (their handles and layers) at
    ``at`` [mm]; the code's own severity unless ``severity`` is given."""
    f = Finding(code, msg, tuple(s.ref for s in srcs), tuple(s.layer for s in srcs), at)
    return f if severity is None else replace(f, severity=severity)


def fmt_point(p: Point) -> str:
    """``(x, y)`` with six significant digits, for messages [mm]."""
    return f"({p[0]:.6g}, {p[1]:.6g})"


def default_tolerance(drawing: Drawing) -> float:
    """The default "lies on" tolerance for a drawing [mm]."""
    return max(LIES_ON_MIN_MM, LIES_ON_RTOL * drawing.extent_mm())


def on_path(p: Point, path: PathGeom, tol: float) -> bool:
    """Whether ``p`` lies within ``tol`` [mm] of the centreline ``path``."""
    return any(point_segment_distance(p, a, b) <= tol for a, b in path.segments())


def on_arc(p: Point, arc: ArcGeom, tol: float) -> bool:
    """Whether ``p`` lies within ``tol`` [mm] of the arc (its span, with a
    slack of :data:`ARC_SLACK_DEG` plus ``tol`` at each end)."""
    r = dist(p, arc.center)
    if abs(r - arc.radius_mm) > tol:
        return False
    ang = math.degrees(math.atan2(p[1] - arc.center[1], p[0] - arc.center[0])) % 360
    slack = ARC_SLACK_DEG + math.degrees(tol / max(arc.radius_mm, tol))
    return angle_in_arc(ang, arc.start_deg, arc.end_deg, slack)


def arc_distance(p: Point, arc: ArcGeom) -> float:
    """Distance from ``p`` to the arc (not the full circle) [mm]."""
    ang = math.degrees(math.atan2(p[1] - arc.center[1], p[0] - arc.center[0])) % 360
    if angle_in_arc(ang, arc.start_deg, arc.end_deg):
        return abs(dist(p, arc.center) - arc.radius_mm)
    return min(dist(p, arc.point_at(arc.start_deg)), dist(p, arc.point_at(arc.end_deg)))


def near_miss(at: Point, circles: Sequence[CircleGeom], paths: Sequence[PathGeom], tol: float) -> str:
    """``"; it is 0.50 mm from ..."``: the nearest pin circle or centreline
    within :data:`NEAR_MISS_FACTOR` × ``tol`` of ``at``, with the gap and
    the tolerance, or ``""``."""
    best: tuple[float, str] | None = None
    for g in circles:
        d = dist(at, g.center)
        if best is None or d < best[0]:
            best = (d, f"the pin circle at {fmt_point(g.center)} [entity {g.source.ref}]")
    for q in paths:
        d = min(point_segment_distance(at, a, b) for a, b in itertools.pairwise(q.points))
        if best is None or d < best[0]:
            best = (d, f"the centreline [entity {q.source.ref}; layer {q.source.layer}]")
    if best is None or best[0] > NEAR_MISS_FACTOR * tol:
        return ""
    return f"; it is {best[0]:.2f} mm from {best[1]} (tolerance {tol:.3g} mm): a near miss, close the gap"


def path_ends(path: PathGeom) -> tuple[Point, Point]:
    """The first and last point of a path [mm]."""
    return path.points[0], path.points[-1]


class LinkIndex:
    """Which centreline pieces pass within ``tol`` of a point, and whether a
    pin centre lies there.

    From :data:`INDEX_MIN_PIECES` pieces on, the pieces and pin centres sit
    in shapely STRtrees (about logarithmic time per question) and every
    candidate is checked exactly; below it, the search goes through every
    piece and pin with the same exact tests, which is faster there and
    leaves shapely unloaded (a small drawing's ``solve`` stays light).  Both
    give the same answers."""

    def __init__(self, links: Sequence[PathGeom], pins: Sequence[CircleGeom], tol: float) -> None:
        self.links, self.pins, self.tol = links, pins, tol
        self._reach = tol * (1.0 + INDEX_SLACK) + INDEX_SLACK * LIES_ON_MIN_MM
        self._links: Any = None
        self._pins: Any = None
        if len(links) >= INDEX_MIN_PIECES:
            import shapely

            self._links = shapely.STRtree([shapely.LineString(p.points) for p in links])
            self._pins = shapely.STRtree(shapely.points([g.center for g in pins])) if pins else None

    @property
    def uses_tree(self) -> bool:
        """Whether the questions go through the STRtrees."""
        return self._links is not None

    def _link_candidates(self, p: Point) -> Iterable[int]:
        if self._links is None:
            return range(len(self.links))
        import shapely

        return (int(i) for i in self._links.query(shapely.Point(p), predicate="dwithin", distance=self._reach))

    def _pin_candidates(self, p: Point) -> Iterable[int]:
        if self._links is None:
            return range(len(self.pins))
        if self._pins is None:
            return ()
        import shapely

        return (int(i) for i in self._pins.query(shapely.Point(p), predicate="dwithin", distance=self._reach))

    def links_at(self, p: Point) -> list[int]:
        """The pieces (indices) whose centreline passes within ``tol`` of
        ``p``, in drawing order."""
        return sorted(i for i in self._link_candidates(p) if on_path(p, self.links[i], self.tol))

    def pin_at(self, p: Point) -> bool:
        """Whether a pin centre lies within ``tol`` of ``p``."""
        return any(dist(p, self.pins[i].center) <= self.tol for i in self._pin_candidates(p))


@record(frozen=True)
class Topology:
    """The rigid parts the centrelines form, with the pin circles and shoe
    arcs they meet.

    Attributes
    ----------
    links : tuple of PathGeom
        The centreline pieces, in drawing order.
    groups : tuple of tuple of int
        For each part (in order of its first piece), the indices of its
        pieces in ``links``.
    pin_geoms : tuple of CircleGeom
        Pivot circles, then pin circles.
    shoe_arcs : tuple of ArcGeom
        The shoe arcs.
    tol : float
        The "lies on" tolerance [mm].
    """

    links: tuple[PathGeom, ...]
    groups: tuple[tuple[int, ...], ...]
    pin_geoms: tuple[CircleGeom, ...]
    shoe_arcs: tuple[ArcGeom, ...]
    tol: float

    @functools.cached_property
    def index(self) -> LinkIndex:
        """The spatial index of the pieces and pins (built once)."""
        return LinkIndex(self.links, self.pin_geoms, self.tol)

    @functools.cached_property
    def _group_of(self) -> dict[int, int]:
        return {i: gi for gi, members in enumerate(self.groups) for i in members}

    def parts_at(self, p: Point) -> list[int]:
        """The parts (indices into ``groups``) whose centreline passes
        through ``p``, sorted."""
        return sorted({self._group_of[i] for i in self.index.links_at(p)})

    def parts_ending_on(self, arc: ArcGeom) -> list[int]:
        """The parts with a centreline piece that ends on ``arc``, sorted."""
        return sorted(
            {
                gi
                for gi, members in enumerate(self.groups)
                for i in members
                for end in path_ends(self.links[i])
                if on_arc(end, arc, self.tol)
            }
        )

    def distance_to_part(self, p: Point, gi: int) -> float:
        """Distance from ``p`` to part ``gi``'s centreline [mm]."""
        return min(point_segment_distance(p, a, b) for a, b in self.part_segments(gi))

    def part_segments(self, gi: int) -> tuple[Segment, ...]:
        """Part ``gi``'s centreline segments [mm]."""
        return tuple(s for i in self.groups[gi] for s in self.links[i].segments())

    def part_points(self, gi: int) -> list[Point]:
        """Every point of part ``gi``'s centreline pieces [mm]."""
        return [q for i in self.groups[gi] for q in self.links[i].points]

    def part_sources(self, gi: int) -> tuple[Source, ...]:
        """The entities part ``gi`` was drawn with."""
        return tuple(self.links[i].source for i in self.groups[gi])


class _UnionFind:
    """Disjoint sets over ``0 .. n-1``; a set's root is its smallest member."""

    def __init__(self, n: int) -> None:
        self.parent = list(range(n))

    def find(self, i: int) -> int:
        while self.parent[i] != i:
            self.parent[i] = self.parent[self.parent[i]]
            i = self.parent[i]
        return i

    def union(self, i: int, j: int) -> None:
        ri, rj = self.find(i), self.find(j)
        if ri != rj:
            self.parent[max(ri, rj)] = min(ri, rj)


def _free_ends(drawing: Drawing) -> list[Point]:
    """Where a centreline may end without joining anything: the start of a
    load line and both ends of a spring [mm]."""
    starts = [lp.points[0] for lp in drawing.paths_of(Role.LOAD)]
    return starts + [q for sp in drawing.paths_of(Role.SPRING) for q in path_ends(sp)]


def _closed(path: PathGeom) -> bool:
    return len(path.points) > _OPEN_PATH_MAX_POINTS and path.points[0] == path.points[-1]


def _join_end(i: int, end: Point, partial: Topology, free_ends: Sequence[Point], uf: _UnionFind) -> Finding | None:
    """Join piece ``i`` to every piece its ``end`` lies on; M-finding
    OPEN_END when that end meets no pin, piece, shoe arc or load/spring."""
    tol, links = partial.tol, partial.links
    if partial.index.pin_at(end):
        return None  # a pin joint: the pins step attaches it
    joined = False
    for j in partial.index.links_at(end):
        if j != i:
            uf.union(i, j)
            joined = True
    if joined or any(on_arc(end, a, tol) for a in partial.shoe_arcs) or any(dist(end, s) <= tol for s in free_ends):
        return None
    others = [q for j, q in enumerate(links) if j != i]
    return finding(
        Code.OPEN_END,
        f"centreline end at {fmt_point(end)} meets no pin, part, shoe or load"
        + near_miss(end, partial.pin_geoms, others, tol),
        [links[i].source],
        end,
    )


def _groups(uf: _UnionFind, n: int) -> tuple[tuple[int, ...], ...]:
    """The sets, ordered by their smallest member."""
    groups: dict[int, list[int]] = {}
    for i in range(n):
        groups.setdefault(uf.find(i), []).append(i)
    return tuple(tuple(groups[k]) for k in sorted(groups))


def rigid_parts(drawing: Drawing, tol: float) -> tuple[Topology, tuple[Finding, ...]]:
    """The rigid parts the drawing's centrelines form, and a finding for
    each centreline end that meets nothing."""
    partial = Topology(
        links=tuple(drawing.paths_of(Role.LINK)),
        groups=(),
        pin_geoms=(*drawing.circles_of(Role.PIVOT), *drawing.circles_of(Role.PIN)),
        shoe_arcs=tuple(a for a in drawing.arcs if a.role is Role.SHOE),
        tol=tol,
    )
    free_ends = _free_ends(drawing)
    uf = _UnionFind(len(partial.links))
    findings: list[Finding] = []
    for i, path in enumerate(partial.links):
        if _closed(path):
            continue
        for end in path_ends(path):
            f = _join_end(i, end, partial, free_ends, uf)
            if f is not None:
                findings.append(f)
    topo = Topology(partial.links, _groups(uf, len(partial.links)), partial.pin_geoms, partial.shoe_arcs, tol)
    return topo, tuple(findings)
