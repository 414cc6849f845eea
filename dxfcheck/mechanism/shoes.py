"""Shoes: a shoe is the part whose centreline ends on a SHOE arc; it is
*pivoted* when that part touches the rest of the linkage only through one
pin and carries no load, otherwise it is *fixed* to its lever."""

from __future__ import annotations

from collections.abc import Mapping, Sequence, Set

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import dist
from dxfcheck.core.records import record
from dxfcheck.mechanism.layers import missing_role_note, searched
from dxfcheck.mechanism.model import Drum, Mounting, Shoe
from dxfcheck.mechanism.naming import Namer, Target
from dxfcheck.mechanism.topology import Topology, finding
from dxfcheck.read.drawing import ArcGeom, Drawing

__all__ = ["ShoeParts", "build_shoes"]


@record(frozen=True)
class ShoeParts:
    """What the shoes step needs to know about the parts: their names (by
    topology index), the pins on each, and the parts a load or spring acts
    on."""

    names: tuple[str, ...]
    pins: Mapping[str, tuple[str, ...]]
    loaded: Set[str | None]


def _attachment(name: str, arc: ArcGeom, drum: Drum, topo: Topology) -> int | Finding:
    """The part (topology index) that carries the shoe arc, or the finding
    why there is none: SHOE_OFF_DRUM, SHOE_UNATTACHED, SHOE_MANY_PARTS."""
    mid = arc.point_at(arc.mid_deg)
    off_c = dist(arc.center, drum.center)
    off_r = abs(arc.radius_mm - drum.radius_mm)
    if off_c > topo.tol or off_r > topo.tol:
        return finding(
            Code.SHOE_OFF_DRUM,
            f"shoe arc {name} is not on the drum circle (centre off by {off_c:.4g} mm, "
            f"radius off by {off_r:.4g} mm; tolerance {topo.tol:.3g} mm)",
            [arc.source],
            mid,
        )
    on = topo.parts_ending_on(arc)
    if not on:
        return finding(Code.SHOE_UNATTACHED, f"no part's centreline ends on shoe arc {name}", [arc.source], mid)
    if len(on) > 1:
        msg = f"{len(on)} separate parts end on shoe arc {name}; join them or give each shoe its own arc"
        return finding(Code.SHOE_MANY_PARTS, msg, [arc.source], mid)
    return on[0]


def _is_internal(gi: int, drum: Drum, topo: Topology) -> bool:
    """An internal shoe: most of the part carrying it lies inside the drum."""
    pts = topo.part_points(gi)
    inside = sum(1 for q in pts if dist(q, drum.center) < drum.radius_mm - topo.tol)
    return inside > len(pts) / 2


def _shoe(
    k: int, arc: ArcGeom, drum: Drum, topo: Topology, parts: ShoeParts, namer: Namer, shoes: Sequence[Shoe]
) -> Shoe | Finding:
    """Shoe arc ``k`` as a shoe, or the finding why it is not one."""
    labelled = namer.label(Target.SHOE, k)
    sname = labelled.text if labelled else f"shoe{k + 1}"
    gi = _attachment(sname, arc, drum, topo)
    if isinstance(gi, Finding):
        return gi
    pname = parts.names[gi]
    mine = parts.pins[pname]
    mounting = Mounting.FIXED
    pin: str | None = None
    if len(mine) == 1 and pname not in parts.loaded:
        mounting, pin = Mounting.PIVOTED, mine[0]
    if labelled is None:
        # an unlabelled shoe is named after the part that carries it
        sname = pname if mounting is Mounting.PIVOTED else f"{pname} shoe"
        if any(s.name == sname for s in shoes):
            sname = namer.fresh("shoe")
    return Shoe(sname, pname, arc, mounting, pin, _is_internal(gi, drum, topo))


def build_shoes(
    drawing: Drawing, drum: Drum | None, topo: Topology, parts: ShoeParts, namer: Namer, *, has_bands: bool
) -> tuple[tuple[Shoe, ...], tuple[Finding, ...]]:
    """The shoes and their findings; NO_SHOE when a drum has neither a shoe
    arc nor a band."""
    if drum is None:
        return (), ()
    shoes: list[Shoe] = []
    findings: list[Finding] = []
    for k, arc in enumerate(topo.shoe_arcs):
        got = _shoe(k, arc, drum, topo, parts, namer, shoes)
        if isinstance(got, Shoe):
            shoes.append(got)
        else:
            findings.append(got)
    if not topo.shoe_arcs and not has_bands:
        msg = (
            f"no shoe arc on the {searched(drawing, Role.SHOE)} (and no band); draw each lining's contact arc"
            + missing_role_note(drawing, Role.SHOE, topo.tol)
        )
        findings.append(finding(Code.NO_SHOE, msg))
    return tuple(shoes), tuple(findings)
