"""Bands: band arcs on the drum that continue each other make one wrap;
a straight band piece runs from each end of the wrap to a pin, which takes
the band's tension."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, dist
from dxfcheck.core.records import record
from dxfcheck.mechanism.model import Band, BandKind, Drum, Pin
from dxfcheck.mechanism.topology import ARC_SLACK_DEG, Topology, finding, fmt_point
from dxfcheck.read.drawing import ArcGeom, Drawing, PathGeom, Source

__all__ = ["band_kind", "build_bands"]

#: Degrees in a full turn.
_FULL_TURN_DEG = 360.0


@record(frozen=True)
class _BandEnd:
    """Where a wrap's end goes: the pin and the unit vector from the pin
    towards the drum (the band's pull on the pin)."""

    pin: str
    direction: Point


def band_kind(a: Pin, b: Pin) -> BandKind:
    """The band's kind from the pins its ends run to."""
    if a.grounded or b.grounded:
        return BandKind.SIMPLE
    if set(a.parts) & set(b.parts):
        return BandKind.DIFFERENTIAL
    return BandKind.TWO_LEVER


def _on_drum(arcs: Sequence[ArcGeom], drum: Drum, tol: float) -> tuple[list[ArcGeom], list[Finding]]:
    """The band arcs on the drum circle, and BAND_OFF_DRUM for the others."""
    good: list[ArcGeom] = []
    findings: list[Finding] = []
    for a in arcs:
        if dist(a.center, drum.center) > tol or abs(a.radius_mm - drum.radius_mm) > tol:
            msg = "band arc is not on the drum circle"
            findings.append(finding(Code.BAND_OFF_DRUM, msg, [a.source], a.point_at(a.mid_deg)))
        else:
            good.append(a)
    return good, findings


def _wraps(arcs: Sequence[ArcGeom], drum: Drum, tol: float) -> list[list[ArcGeom]]:
    """Arcs that continue each other (end to start within ``tol`` [mm])
    make one wrap, counter-clockwise."""
    wraps: list[list[ArcGeom]] = []
    slack = math.degrees(tol / drum.radius_mm) + ARC_SLACK_DEG
    for a in sorted(arcs, key=lambda x: x.start_deg):
        for w in wraps:
            if abs(math.remainder(w[-1].end_deg - a.start_deg, _FULL_TURN_DEG)) <= slack:
                w.append(a)
                break
            if abs(math.remainder(a.end_deg - w[0].start_deg, _FULL_TURN_DEG)) <= slack:
                w.insert(0, a)
                break
        else:
            wraps.append([a])
    return wraps


def _wrap_end(
    name: str, tip: Point, pieces: Sequence[PathGeom], pin_at: Mapping[str, Point], tol: float
) -> tuple[_BandEnd | None, list[Source], list[Finding]]:
    """The pin a band piece runs to from the wrap's end ``tip`` [mm], the
    pieces used, and BAND_END_OFF for a piece that ends on no pin."""
    hit: _BandEnd | None = None
    used: list[Source] = []
    findings: list[Finding] = []
    for bp in pieces:
        for near, far in ((bp.points[0], bp.points[-1]), (bp.points[-1], bp.points[0])):
            if dist(near, tip) > tol:
                continue
            pn = next((nm for nm, c in pin_at.items() if dist(c, far) <= tol), None)
            if pn is None:
                msg = f"{name}: the band piece from {fmt_point(tip)} ends at {fmt_point(far)}, on no pin"
                findings.append(finding(Code.BAND_END_OFF, msg, [bp.source], far))
                continue
            d = dist(far, tip)
            hit = _BandEnd(pn, ((tip[0] - far[0]) / d, (tip[1] - far[1]) / d))
            used.append(bp.source)
    return hit, used, findings


def _band(
    n: int,
    w: list[ArcGeom],
    drum: Drum,
    pieces: Sequence[PathGeom],
    pins: Mapping[str, Pin],
    pin_at: Mapping[str, Point],
    tol: float,
) -> tuple[Band | None, list[Finding]]:
    """Wrap ``n`` as a band (None unless both its ends reach a pin), with
    its findings (BAND_OPEN for an end no piece leaves from)."""
    name = f"band{n + 1}"
    start, end = w[0].start_deg, w[-1].end_deg
    srcs = [a.source for a in w]
    ends: list[_BandEnd] = []
    findings: list[Finding] = []
    for deg in (start, end):
        tip = w[0].point_at(deg)
        hit, used, found = _wrap_end(name, tip, pieces, pin_at, tol)
        srcs += used
        findings += found
        if hit is None:
            msg = f"{name}: no band piece runs from the wrap's end at {fmt_point(tip)} to a pin"
            findings.append(finding(Code.BAND_OPEN, msg, [w[0].source], tip))
        else:
            ends.append(hit)
    if len(ends) != 2:
        return None, findings
    s, e = ends
    kind = band_kind(pins[s.pin], pins[e.pin])
    band = Band(
        name, drum.center, drum.radius_mm, start, end, s.pin, e.pin, s.direction, e.direction, kind, tuple(srcs)
    )
    return band, findings


def build_bands(
    drawing: Drawing, drum: Drum | None, pins: Sequence[Pin], pin_names: Mapping[int, str], topo: Topology
) -> tuple[tuple[Band, ...], tuple[Finding, ...]]:
    """The bands and their findings; ``pin_names`` names each of the
    topology's pin circles by index (a circle left out names no pin)."""
    arcs = [a for a in drawing.arcs if a.role is Role.BAND]
    pieces = list(drawing.paths_of(Role.BAND))
    if not arcs:
        msg = "band piece without a band arc on the drum"
        return (), tuple(finding(Code.BAND_OPEN, msg, [bp.source], bp.points[0]) for bp in pieces)
    if drum is None:
        return (), ()
    good, findings = _on_drum(arcs, drum, topo.tol)
    by_name = {p.name: p for p in pins}
    pin_at = {pin_names[k]: g.center for k, g in enumerate(topo.pin_geoms) if pin_names.get(k) in by_name}
    bands: list[Band] = []
    for n, w in enumerate(_wraps(good, drum, topo.tol)):
        band, found = _band(n, w, drum, pieces, by_name, pin_at, topo.tol)
        findings += found
        if band is not None:
            bands.append(band)
    return tuple(bands), tuple(findings)
