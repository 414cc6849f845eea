"""Labels and names: a label names the nearest pin, part or shoe; what no
label names gets a generated name (``part1``, ``O1``, ``P2``, ``shoe1``)
that no label uses."""

from __future__ import annotations

import enum
from collections.abc import Mapping

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import dist
from dxfcheck.mechanism.topology import Topology, arc_distance, finding
from dxfcheck.read.drawing import Drawing, TextGeom

__all__ = ["LABEL_REACH_RTOL", "Namer", "Target", "read_labels"]

#: A label farther than this fraction of the drawing size from everything
#: names nothing.
LABEL_REACH_RTOL = 0.1


class Target(enum.StrEnum):
    """What a label may name."""

    PIN = "pin"
    PART = "part"
    SHOE = "shoe"


#: A thing a label may name: its kind and its index (into the topology's
#: pin circles, parts or shoe arcs).
Named = tuple[Target, int]


def _label_distance(topo: Topology, t: TextGeom, target: Named) -> float:
    """How far label ``t`` is from the thing ``target`` [mm]; negative inside
    a pin circle (a label written in a pin names the pin)."""
    kind, idx = target
    if kind is Target.PIN:
        g = topo.pin_geoms[idx]
        return dist(t.position, g.center) - g.radius_mm
    if kind is Target.PART:
        return topo.distance_to_part(t.position, idx)
    return arc_distance(t.position, topo.shoe_arcs[idx])


def _targets(topo: Topology) -> list[Named]:
    """Everything a label may name: pins, then parts, then shoes."""
    return (
        [(Target.PIN, i) for i in range(len(topo.pin_geoms))]
        + [(Target.PART, i) for i in range(len(topo.groups))]
        + [(Target.SHOE, i) for i in range(len(topo.shoe_arcs))]
    )


def _place(
    t: TextGeom, topo: Topology, targets: list[Named], reach: float, named: dict[Named, tuple[float, TextGeom]]
) -> Finding | None:
    """Give label ``t`` to the nearest target within ``reach`` [mm] unless a
    nearer label has it; M-findings LABEL_UNUSED and LABEL_CLASH."""
    best = min(targets, key=lambda k: _label_distance(topo, t, k))
    d = _label_distance(topo, t, best)
    if d > reach:
        return finding(Code.LABEL_UNUSED, f"label {t.text!r} is near nothing it could name", [t.source], t.position)
    if best not in named:
        named[best] = (d, t)
        return None
    prev_d, prev = named[best]
    loser = t if d >= prev_d else prev
    if d < prev_d:
        named[best] = (d, t)
    return finding(
        Code.LABEL_CLASH,
        f"labels {prev.text!r} and {t.text!r} name the same {best[0]}; {loser.text!r} is ignored",
        [prev.source, t.source],
        t.position,
    )


def read_labels(drawing: Drawing, topo: Topology) -> tuple[dict[Named, TextGeom], tuple[Finding, ...]]:
    """Which label names which pin, part or shoe, and the labels that name
    nothing or clash."""
    reach = LABEL_REACH_RTOL * drawing.extent_mm()
    targets = _targets(topo)
    named: dict[Named, tuple[float, TextGeom]] = {}
    findings: list[Finding] = []
    for t in drawing.texts_of(Role.LABEL):
        if not targets:
            break
        f = _place(t, topo, targets, reach, named)
        if f is not None:
            findings.append(f)
    return {k: t for k, (_, t) in named.items()}, tuple(findings)


class Namer:
    """Hands out names: a thing's label, or the next free ``prefix`` + number
    (a generated name never repeats a label or an earlier name)."""

    def __init__(self, named: Mapping[Named, TextGeom]) -> None:
        self._named = dict(named)
        self._used = {t.text for t in named.values()}
        self._counters: dict[str, int] = {}

    @property
    def labelled_names(self) -> frozenset[str]:
        """The names the drawing's labels give."""
        return frozenset(t.text for t in self._named.values())

    def label(self, kind: Target, idx: int) -> TextGeom | None:
        """The label that names the thing, if any."""
        return self._named.get((kind, idx))

    def fresh(self, prefix: str) -> str:
        """The next unused ``prefix`` + number."""
        while True:
            self._counters[prefix] = self._counters.get(prefix, 0) + 1
            cand = f"{prefix}{self._counters[prefix]}"
            if cand not in self._used:
                self._used.add(cand)
                return cand

    def name_of(self, kind: Target, idx: int, prefix: str) -> str:
        """The thing's label, or a fresh name with ``prefix``."""
        hit = self.label(kind, idx)
        return hit.text if hit else self.fresh(prefix)
