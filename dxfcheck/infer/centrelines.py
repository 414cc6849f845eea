"""Style 3: parts drawn as centre lines between pin circles.

A centre line is a line or polyline whose effective linetype is a centre
line (:func:`is_centre`: CENTER, CENTRE, DASHDOT, CHAIN, ISO long-dash-dot),
or any line on a layer the ``[infer]`` table names in ``centre_layers``.
Each centre line is one centreline piece of the skeleton (the LINK role),
except a centre *mark*: a straight centre line whose middle is a circle's
centre and which reaches at most :data:`CENTRE_MARK_FACTOR` times the
largest radius there beyond it (the cross drawn on every hole and on the
drum), which is dropped.  The drum, shoe arcs, holes and pivots follow
:mod:`dxfcheck.infer.roles`; a hole that no centre line, band end or spring
end reaches is no pin (M234).
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from dxfcheck.core.config import InferSettings, Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, dist
from dxfcheck.core.records import record
from dxfcheck.infer.linework import Ink, Linework, RawCircle, RawPath
from dxfcheck.infer.roles import (
    BOSS_RATIO,
    Hole,
    PointIndex,
    drum_of,
    fmt,
    frame_index,
    held_by_frame,
    holes,
    infer_finding,
    shoe_arcs,
    tolerance_of,
)
from dxfcheck.read.drawing import ArcGeom, CircleGeom, Drawing, PathGeom

__all__ = [
    "CENTRE_MARK_FACTOR",
    "Inferred",
    "hole_sizes",
    "infer_centrelines",
    "is_centre",
    "is_hidden",
    "part_centre_lines",
    "usable",
]

#: A centre line through a circle's centre reaching at most this many times
#: the largest radius there to each side is a centre mark.
CENTRE_MARK_FACTOR = 2.0
_CENTRE_WORDS = ("CENTER", "CENTRE", "DASHDOT", "CHAIN", "ACAD_ISO04W100", "ACAD_ISO08W100", "ACAD_ISO10W100")
_HIDDEN_WORDS = ("HIDDEN", "DASHED", "ACAD_ISO02W100", "ACAD_ISO03W100", "PHANTOM", "DOT")


def is_centre(ink: Ink, settings: InferSettings) -> bool:
    """Whether a piece of linework is a centre line."""
    return ink.layer in settings.centre_layers or any(w in ink.linetype for w in _CENTRE_WORDS)


def is_hidden(ink: Ink) -> bool:
    """Whether it is drawn as a hidden (dashed, dotted, phantom) line."""
    return not any(w in ink.linetype for w in _CENTRE_WORDS) and any(w in ink.linetype for w in _HIDDEN_WORDS)


def usable(lw: Linework, settings: InferSettings) -> Linework:
    """The linework without hidden lines and ignored layers."""

    def keep(ink: Ink) -> bool:
        return ink.layer not in settings.ignore_layers and not is_hidden(ink)

    return Linework(
        tuple(c for c in lw.circles if keep(c.ink)),
        tuple(a for a in lw.arcs if keep(a.ink)),
        tuple(p for p in lw.paths if keep(p.ink)),
    )


@record(frozen=True)
class Inferred:
    """A skeleton inferred from linework, in the role reader's terms."""

    style: str
    circles: tuple[CircleGeom, ...]
    arcs: tuple[ArcGeom, ...]
    links: tuple[PathGeom, ...]
    findings: tuple[Finding, ...]


def _frame(lw: Linework, settings: InferSettings) -> list[RawPath]:
    return [p for p in lw.paths if p.hatch or p.ink.layer in settings.frame_layers]


def _marks(centre: Sequence[RawPath], circles: Sequence[RawCircle], tol: float) -> set[int]:
    """Indices of the centre lines that are centre marks."""
    index = PointIndex([c.center for c in circles])
    mids = [((p.points[0][0] + p.points[-1][0]) / 2, (p.points[0][1] + p.points[-1][1]) / 2) for p in centre]
    out: set[int] = set()
    for i, (p, near) in enumerate(zip(centre, index.near_all(mids, tol), strict=True)):
        if len(p.points) != 2:
            continue
        a, b = p.points
        if near and dist(a, b) / 2 <= CENTRE_MARK_FACTOR * max(circles[j].radius_mm for j in near) + tol:
            out.add(i)
    return out


def _reach(found: Sequence[Hole], lines: Any, ends: PointIndex, tol: float) -> list[int]:
    """How many members reach each hole: centre lines through its centre
    plus band and spring ends at it."""
    import shapely

    n = [0] * len(found)
    if found:
        src, _ = lines.query(shapely.points([h.center for h in found]), predicate="dwithin", distance=tol)
        for i in src.tolist():
            n[i] += 1
    near = ends.near_all([h.center for h in found], tol)
    return [k + len(e) for k, e in zip(n, near, strict=True)]


def _member_ends(drawing: Drawing) -> list[Point]:
    """Band and spring ends: members that reach a pin without a centre line."""
    return [q for p in drawing.paths if p.role in (Role.BAND, Role.SPRING) for q in (p.points[0], p.points[-1])]


def part_centre_lines(lw: Linework, settings: InferSettings) -> list[RawPath]:
    """The centre lines that are not centre marks: the parts of style 3."""
    centre_all = [p for p in lw.paths if not p.hatch and is_centre(p.ink, settings)]
    solid_circles = [c for c in lw.circles if not is_centre(c.ink, settings)]
    tol = tolerance_of([q for p in centre_all for q in p.points] + [c.center for c in solid_circles])
    marks = _marks(centre_all, solid_circles, tol)
    return [p for i, p in enumerate(centre_all) if i not in marks]


def infer_centrelines(lw: Linework, drawing: Drawing, settings: InferSettings) -> Inferred:
    """The skeleton of a drawing whose parts are centre lines."""
    import shapely

    centre_all = [p for p in lw.paths if not p.hatch and is_centre(p.ink, settings)]
    solid_circles = [c for c in lw.circles if not is_centre(c.ink, settings)]
    solid_arcs = [a for a in lw.arcs if not is_centre(a.ink, settings)]
    tol = tolerance_of([q for p in centre_all for q in p.points] + [c.center for c in solid_circles])
    findings: list[Finding] = []
    band_arcs = [(a.center, a.radius_mm) for a in drawing.arcs if a.role is Role.BAND]
    drum, f = drum_of(solid_circles, [(a.center, a.radius_mm) for a in solid_arcs] + band_arcs, tol)
    findings += f
    marks = _marks(centre_all, solid_circles, tol)
    centre = [p for i, p in enumerate(centre_all) if i not in marks]
    lines = shapely.STRtree([shapely.LineString(p.points) for p in centre])
    ends = PointIndex(_member_ends(drawing))
    frame = frame_index(_frame(lw, settings))
    pins: list[Hole] = []
    pivots: list[Hole] = []
    one_part: list[Hole] = []
    found = holes(solid_circles, drum, tol)
    for hole, n in zip(found, _reach(found, lines, ends, tol), strict=True):
        if n == 0:
            findings.append(_unused(hole))
            continue
        findings += _sizes(hole, tol)
        grounded = held_by_frame(frame, hole, tol) if frame is not None else n == 1
        if frame is None and n == 1:
            one_part.append(hole)
        (pivots if grounded else pins).append(hole)
    if one_part:
        findings.append(_guessed(one_part))
    arcs = shoe_arcs(drum, solid_arcs, tol) if drum is not None else ()
    circles = (
        *((CircleGeom(Role.DRUM, drum.center, drum.radius_mm, drum.ink.source),) if drum else ()),
        *(h.geom(Role.PIVOT) for h in pivots),
        *(h.geom(Role.PIN) for h in pins),
    )
    links = tuple(PathGeom(Role.LINK, p.points, p.ink.source) for p in centre)
    return Inferred("centre lines", circles, arcs, links, tuple(findings))


def hole_sizes(hole: Hole, tol: float) -> list[Finding]:
    """M235 when the hole is drawn at slightly different diameters."""
    return _sizes(hole, tol)


def _unused(hole: Hole) -> Finding:
    c = hole.circles[0]
    return infer_finding(
        Code.HOLE_UNUSED,
        f"circle of diameter {2 * c.radius_mm:.6g} mm at {fmt(c.center)}: no centre line, band or spring reaches it; "
        "not a pin (ignored)",
        [c.ink.source],
        c.center,
    )


def _sizes(hole: Hole, tol: float) -> list[Finding]:
    """M235 when the hole is drawn at slightly different diameters."""
    same = hole.same_size(tol)
    if len(same) < 2:
        return []
    sizes = ", ".join(f"{2 * c.radius_mm:.6g}" for c in same)
    return [
        infer_finding(
            Code.HOLE_SIZES_DIFFER,
            f"the hole at {fmt(hole.center)} is drawn with diameters {sizes} mm (within a factor {BOSS_RATIO:g}); "
            f"the smallest, {2 * hole.radius_mm:.6g} mm, is the pin's",
            [c.ink.source for c in same],
            hole.center,
        )
    ]


def _guessed(one_part: Sequence[Hole]) -> Finding:
    where = ", ".join(fmt(h.center) for h in one_part)
    return infer_finding(
        Code.PIVOT_GUESSED,
        f"the drawing shows no frame (no hatch, nothing on a frame layer), so the holes that one part alone reaches "
        f"are taken as pivots: {where}. Hatch the frame at the pivots or name its layer in [infer] frame_layers",
        [h.circles[0].ink.source for h in one_part],
        one_part[0].center,
    )
