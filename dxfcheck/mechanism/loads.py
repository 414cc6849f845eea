"""Loads: a load acts on the part whose centreline passes through the start
of its line, along the line, with the magnitude of the nearest text on the
load layer (or the one the caller gives)."""

from __future__ import annotations

from collections.abc import Sequence

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import dist, point_segment_distance, unit
from dxfcheck.mechanism.layers import missing_role_note, searched
from dxfcheck.mechanism.model import Load, Pin
from dxfcheck.mechanism.texts import Magnitudes, TextForce, no_magnitude, text_force
from dxfcheck.mechanism.topology import Topology, finding, fmt_point
from dxfcheck.read.drawing import Drawing, PathGeom, TextGeom

__all__ = ["build_loads"]


def _texts_for(texts: Sequence[TextGeom], paths: Sequence[PathGeom]) -> dict[int, TextGeom]:
    """For each load line (by index), the nearest of the texts that lie
    nearest to it."""
    text_for: dict[int, TextGeom] = {}
    text_dist: dict[int, float] = {}
    for t in texts:
        if not paths:
            break
        dists = [min(point_segment_distance(t.position, a, b) for a, b in lp.segments()) for lp in paths]
        j = min(range(len(paths)), key=lambda i: dists[i])
        if j not in text_for or dists[j] < text_dist[j]:
            text_for[j] = t
            text_dist[j] = dists[j]
    return text_for


def _place_findings(name: str, lp: PathGeom, part: str | None, pins: Sequence[Pin], tol: float) -> list[Finding]:
    """LOAD_OFF_PART when the load's start is on no part, LOAD_AT_PIVOT when
    it is on a pivot."""
    start = lp.points[0]
    if part is None:
        msg = f"load {name} starts at {fmt_point(start)}, on no part's centreline"
        return [finding(Code.LOAD_OFF_PART, msg, [lp.source], start)]
    at_pivot = [p for p in pins if p.grounded and dist(p.center, start) <= tol]
    if at_pivot:
        msg = f"load {name} acts at pivot {at_pivot[0].name} and goes straight into the frame"
        return [finding(Code.LOAD_AT_PIVOT, msg, [lp.source], start)]
    return []


def _magnitude(
    name: str, lp: PathGeom, t: TextGeom | None, forces: Magnitudes
) -> tuple[float | None, str | None, list[Finding]]:
    """The load's magnitude [N] and the text it came from, with the findings
    on its text and LOAD_NO_MAGNITUDE when there is none."""
    findings: list[Finding] = []
    magnitude: float | None = None
    text: str | None = None
    read: TextForce | None = None
    if t is not None:
        text = t.text
        read = text_force(f"load {name}", t, used=forces.texts_used)
        magnitude = read.force_N
        findings += [read.finding] if read.finding else []
    if forces.effort_N is not None:
        magnitude, text = forces.effort_N, None
    if magnitude is None and forces.default_N is not None:
        magnitude = forces.default_N
    if magnitude is None and not (read and read.ambiguous):  # an ambiguous text is its own error, M222
        msg = no_magnitude(f"load {name}", read, "1.2 kN")
        findings.append(finding(Code.LOAD_NO_MAGNITUDE, msg, [lp.source], lp.points[0]))
    return magnitude, text, findings


def _load(
    j: int,
    lp: PathGeom,
    t: TextGeom | None,
    topo: Topology,
    part_names: Sequence[str],
    pins: Sequence[Pin],
    forces: Magnitudes,
) -> tuple[Load | None, list[Finding]]:
    """Load line ``j`` as a load (None when it has no length), with its
    findings."""
    start, end = lp.points[0], lp.points[-1]
    name = f"F{j + 1}"
    if dist(start, end) <= topo.tol:
        return None, [finding(Code.LOAD_OFF_PART, f"load {name} has no length, so no direction", [lp.source], start)]
    direction = unit((end[0] - start[0], end[1] - start[1]))
    on = topo.parts_at(start)
    part = part_names[on[0]] if on else None
    findings = _place_findings(name, lp, part, pins, topo.tol)
    magnitude, text, more = _magnitude(name, lp, t, forces)
    return Load(name, part, start, direction, magnitude, text, lp.source), findings + more


def build_loads(
    drawing: Drawing, topo: Topology, part_names: Sequence[str], pins: Sequence[Pin], forces: Magnitudes
) -> tuple[tuple[Load, ...], tuple[Finding, ...]]:
    """The loads and their findings; NO_LOAD when the drawing has neither a
    load line nor a spring."""
    paths = drawing.paths_of(Role.LOAD)
    text_for = _texts_for(list(drawing.texts_of(Role.LOAD)), paths)
    loads: list[Load] = []
    findings: list[Finding] = []
    for j, lp in enumerate(paths):
        load, found = _load(j, lp, text_for.get(j), topo, part_names, pins, forces)
        findings += found
        if load is not None:
            loads.append(load)
    if not paths and not drawing.paths_of(Role.SPRING):
        msg = (
            f"no load line on the {searched(drawing, Role.LOAD)} and no spring; draw the effort as a line "
            "from its point of application" + missing_role_note(drawing, Role.LOAD, topo.tol)
        )
        findings.append(finding(Code.NO_LOAD, msg))
    return tuple(loads), tuple(findings)
