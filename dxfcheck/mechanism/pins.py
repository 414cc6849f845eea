"""Pins and pivots: a pin or pivot attaches to every part whose centreline
passes through its centre; a pivot also attaches to the frame."""

from __future__ import annotations

from collections.abc import Sequence

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, dist
from dxfcheck.mechanism.model import Pin
from dxfcheck.mechanism.naming import Namer, Target
from dxfcheck.mechanism.topology import Topology, finding, near_miss, on_path, path_ends
from dxfcheck.read.drawing import CircleGeom, Drawing

__all__ = ["build_pins"]


def _touches(g: CircleGeom, ends: Sequence[Point], tol: float) -> bool:
    """Whether one of ``ends`` lies on the pin's centre."""
    return any(dist(end, g.center) <= tol for end in ends)


def _pin(
    g: CircleGeom, name: str, on: list[int], topo: Topology, part_names: Sequence[str], ends: tuple[list[Point], ...]
) -> Pin | Finding | None:
    """The pin circle ``g`` as a pin, a finding (ORPHAN_PIN, LONELY_PIN), or
    None for a frame bracket that only anchors a spring."""
    band_ends, spring_ends = ends
    grounded = g.role is Role.PIVOT
    pin = Pin(name, g.center, 2 * g.radius_mm, grounded, tuple(part_names[i] for i in on), g.source)
    if grounded and not on and _touches(g, spring_ends, topo.tol):
        return None  # a frame bracket for a spring: the frame takes the spring's reaction
    if _touches(g, band_ends, topo.tol) and (on or grounded):
        return pin  # a band end: the pin passes the band's tension to its part(s) or the frame
    if not on:
        return finding(
            Code.ORPHAN_PIN,
            f"{'pivot' if grounded else 'pin'} {name} lies on no part's centreline"
            + near_miss(g.center, [], topo.links, topo.tol),
            [g.source],
            g.center,
        )
    if len(on) == 1 and not grounded:
        elsewhere = [q for q in topo.links if not on_path(g.center, q, topo.tol)]
        return finding(
            Code.LONELY_PIN,
            f"pin {name} lies on one part only ({part_names[on[0]]}); it joins nothing and is left out"
            + near_miss(g.center, [], elsewhere, topo.tol),
            [g.source],
            g.center,
        )
    return pin


def build_pins(
    drawing: Drawing, topo: Topology, namer: Namer, part_names: Sequence[str]
) -> tuple[tuple[Pin, ...], dict[int, str], tuple[Finding, ...]]:
    """The pins, the name given to each pin circle (by its index in the
    topology's ``pin_geoms``), and the pins left out."""
    ends = (
        [e for bp in drawing.paths_of(Role.BAND) for e in path_ends(bp)],
        [e for sp in drawing.paths_of(Role.SPRING) for e in path_ends(sp)],
    )
    on_parts = [topo.parts_at(g.center) for g in topo.pin_geoms]
    pins: list[Pin] = []
    names: dict[int, str] = {}
    findings: list[Finding] = []
    for k, g in enumerate(topo.pin_geoms):
        names[k] = namer.name_of(Target.PIN, k, "O" if g.role is Role.PIVOT else "P")
        got = _pin(g, names[k], on_parts[k], topo, part_names, ends)
        if isinstance(got, Pin):
            pins.append(got)
        elif got is not None:
            findings.append(got)
    return tuple(pins), names, tuple(findings)
