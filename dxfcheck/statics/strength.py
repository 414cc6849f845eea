"""Internal forces of every part and the load on the drum shaft, from a
solved case.

Each part is a rigid body in equilibrium under the forces the solve found
on it (its pins' forces, the drum's normal and friction resultants on its
shoe, its loads and spring ends).  Every force is moved to the nearest point
of the part's centreline with the moment of the move (an equivalent force
and couple).  A section through a segment of a part whose centreline is a
tree (no closed loop) cuts it in two; the forces on the piece beyond the
section give the section's axial force, shear and bending moment (the
method of sections for beams and frames).  Between the points where forces
act the moment is linear along a segment, so the stations at those points
(both sides) and at the segment's ends hold its extremes.

The drum shaft carries the resultant of every force the shoes and bands put
on the drum: minus the drum's force on each shoe, and each band pulls the
drum towards its pins.

References
----------
.. [1] F. P. Beer, E. R. Johnston et al., *Vector Mechanics for Engineers:
   Statics*, 11th ed., McGraw-Hill, 2016, ch. 7 (forces in beams: internal
   forces in members, shear and bending-moment diagrams) and ch. 3
   (equivalent force-couple systems).
"""

from __future__ import annotations

import math
from collections import deque
from itertools import pairwise

from dxfcheck.core.geometry import Point, dist
from dxfcheck.core.records import record
from dxfcheck.mechanism.model import Mechanism, Part
from dxfcheck.statics.results import CaseSolution, PartDiagram, Station

__all__ = ["drum_load", "part_diagrams"]


@record(frozen=True)
class _Force:
    """A force ``f`` [N] and couple ``m`` [N·mm] at ``at`` [mm] on the
    centreline: at node ``node``, or inside edge ``edge`` at ``t``."""

    node: int | None
    edge: int
    t: float
    at: Point
    f: Point
    m: float


def _cross(r: Point, f: Point) -> float:
    return r[0] * f[1] - r[1] * f[0]


def _edges(part: Part, tol: float) -> tuple[list[Point], list[tuple[int, int]]]:
    """The part's centreline as a graph: nodes (segment ends, merged within
    ``tol``) and edges, each segment split at every node lying inside it."""
    nodes: list[Point] = []

    def node(p: Point) -> int:
        for i, q in enumerate(nodes):
            if dist(p, q) <= tol:
                return i
        nodes.append(p)
        return len(nodes) - 1

    ends = [(node(a), node(b)) for a, b in part.segments]
    edges: list[tuple[int, int]] = []
    for i, j in ends:
        a, b = nodes[i], nodes[j]
        length = dist(a, b)
        if length <= tol:
            continue
        inside = []
        for k, p in enumerate(nodes):
            if k in (i, j):
                continue
            t = ((p[0] - a[0]) * (b[0] - a[0]) + (p[1] - a[1]) * (b[1] - a[1])) / length**2
            foot = (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))
            if 0.0 < t < 1.0 and dist(foot, p) <= tol:
                inside.append((t, k))
        chain = [i, *(k for _, k in sorted(inside)), j]
        edges += list(pairwise(chain))
    return nodes, list(dict.fromkeys(edges))


def _is_tree(n_nodes: int, edges: list[tuple[int, int]]) -> bool:
    if len(edges) != n_nodes - 1:
        return False
    return len(_reach(0, edges, -1)) == n_nodes


def _reach(start: int, edges: list[tuple[int, int]], without: int) -> set[int]:
    """The nodes reachable from ``start`` without crossing edge ``without``."""
    seen = {start}
    todo = deque([start])
    while todo:
        v = todo.popleft()
        for k, (a, b) in enumerate(edges):
            if k == without:
                continue
            for x, y in ((a, b), (b, a)):
                if x == v and y not in seen:
                    seen.add(y)
                    todo.append(y)
    return seen


def _forces_on(mech: Mechanism, case: CaseSolution, name: str) -> list[tuple[Point, Point]]:
    """Every force ``(point [mm], force [N])`` the solve found on part ``name``."""
    out: list[tuple[Point, Point]] = []
    for p in case.pins:
        out += [((p.x_mm, p.y_mm), (a.fx_N, a.fy_N)) for a in p.attachments if a.body == name]
    for s in case.shoes:
        if s.part == name:
            out += [(s.normal_at_mm, s.normal_force_N), (s.friction_at_mm, s.friction_force_N)]
    out += [((ld.x_mm, ld.y_mm), (ld.fx_N, ld.fy_N)) for ld in case.loads if ld.part == name]
    for sp in case.springs:
        out += [(e.at_mm, e.force_N) for e in sp.ends if e.part == name]
    for g in case.guides:
        out += [(g.at_mm, f) for body, f in g.on_parts() if body == name]
    return out


def _attach(nodes: list[Point], edges: list[tuple[int, int]], point: Point, force: Point, tol: float) -> _Force:
    """``force`` at ``point`` moved to the nearest centreline point (a node
    when it is within ``tol`` of one)."""
    best: tuple[float, int, float, Point] | None = None
    for k, (i, j) in enumerate(edges):
        a, b = nodes[i], nodes[j]
        length2 = (b[0] - a[0]) ** 2 + (b[1] - a[1]) ** 2
        t = ((point[0] - a[0]) * (b[0] - a[0]) + (point[1] - a[1]) * (b[1] - a[1])) / length2
        t = min(1.0, max(0.0, t))
        foot = (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))
        d = dist(foot, point)
        if best is None or d < best[0]:
            best = (d, k, t, foot)
    assert best is not None
    _, k, t, foot = best
    i, j = edges[k]
    node = i if dist(foot, nodes[i]) <= tol else j if dist(foot, nodes[j]) <= tol else None
    if node is not None:
        foot = nodes[node]
    return _Force(node, k, t, foot, force, _cross((point[0] - foot[0], point[1] - foot[1]), force))


def _far(f: _Force, k: int, t: float, beyond: set[int], edges: list[tuple[int, int]], *, at: bool) -> bool:
    """Whether force ``f`` acts beyond the section at ``t`` of edge ``k``
    (``at``: a force inside the edge at ``t`` itself counts as beyond)."""
    if f.node is not None:
        return f.node in beyond
    if f.edge == k:
        return f.t > t or (at and f.t == t)
    return edges[f.edge][0] in beyond


def _station(
    nodes: list[Point],
    edges: list[tuple[int, int]],
    forces: list[_Force],
    k: int,
    t: float,
    beyond: set[int],
    *,
    at: bool,
) -> Station:
    """The section at ``t`` of edge ``k``: what the forces beyond it pass
    through it."""
    a, b = nodes[edges[k][0]], nodes[edges[k][1]]
    p = (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))
    rx = ry = m = 0.0
    for f in forces:
        if _far(f, k, t, beyond, edges, at=at):
            rx += f.f[0]
            ry += f.f[1]
            m += f.m + _cross((f.at[0] - p[0], f.at[1] - p[1]), f.f)
    length = dist(a, b)
    ex, ey = (b[0] - a[0]) / length, (b[1] - a[1]) / length
    return Station(k, a, b, p, rx * ex + ry * ey, -rx * ey + ry * ex, m)


def _diagram(mech: Mechanism, case: CaseSolution, part: Part) -> PartDiagram:
    tol = mech.tolerance_mm
    nodes, edges = _edges(part, tol)
    if not edges or not _is_tree(len(nodes), edges):
        return PartDiagram(part.name, False, ())
    forces = [_attach(nodes, edges, pt, f, tol) for pt, f in _forces_on(mech, case, part.name)]
    stations: list[Station] = []
    for k, (_, j) in enumerate(edges):
        beyond = _reach(j, edges, k)
        inner = sorted({f.t for f in forces if f.node is None and f.edge == k})
        stations.append(_station(nodes, edges, forces, k, 0.0, beyond, at=False))
        for t in inner:
            stations.append(_station(nodes, edges, forces, k, t, beyond, at=True))
            stations.append(_station(nodes, edges, forces, k, t, beyond, at=False))
        stations.append(_station(nodes, edges, forces, k, 1.0, beyond, at=False))
    return PartDiagram(part.name, True, tuple(stations))


def part_diagrams(mech: Mechanism, case: CaseSolution) -> tuple[PartDiagram, ...]:
    """Every part's internal forces in ``case``."""
    return tuple(_diagram(mech, case, p) for p in mech.parts)


def drum_load(case: CaseSolution) -> Point:
    """The resultant [N] of the forces the shoes and bands put on the drum."""
    fx = -sum(s.force_N[0] for s in case.shoes) - sum(e.pull_N[0] for b in case.bands for e in b.ends)
    fy = -sum(s.force_N[1] for s in case.shoes) - sum(e.pull_N[1] for b in case.bands for e in b.ends)
    return (fx + 0.0, fy + 0.0) if math.isfinite(fx + fy) else (math.nan, math.nan)
