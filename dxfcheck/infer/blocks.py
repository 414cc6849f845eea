"""Style 1: parts drawn as blocks, each inserted once or several times,
rotated or mirrored.

Every placement of a block (the INSERTs that placed it) that draws lines,
arcs or polylines making one outline is one part (a placement whose
outlines are separate is a whole sheet placed as a block, and the drawing
is read as style 2), its region the outlines it draws (or, with
none closed, the hull of its linework); its circles are its holes, wherever
they fall, so that parts stacked on one another at a pin are told apart by
what they draw, not by where.  A placement of a block named in ``[infer]
frame_blocks``, on a layer of ``frame_layers``, or holding a hatch is the
frame.  A placement that draws only circles (and centre marks) is a pin
block: its circle adds nothing to the hole it marks.  Outlines in model
space are read as in style 2 (:mod:`dxfcheck.infer.outlines`), so a frame
drawn there holds the pivots as well.
"""

from __future__ import annotations

from collections.abc import Sequence
from typing import Any

from dxfcheck.core.config import InferSettings
from dxfcheck.infer.centrelines import Inferred, is_centre
from dxfcheck.infer.linework import Ink, Linework
from dxfcheck.infer.outlines import Contour, contours, drop_containers, infer_from_parts, linework_tolerance
from dxfcheck.read.drawing import Drawing

__all__ = ["block_parts", "infer_blocks"]


def _sub(lw: Linework, placement: str) -> Linework:
    return Linework(
        tuple(c for c in lw.circles if c.ink.placement == placement),
        tuple(a for a in lw.arcs if a.ink.placement == placement),
        tuple(p for p in lw.paths if p.ink.placement == placement),
    )


def block_parts(lw: Linework, settings: InferSettings, tol: float) -> list[Contour]:
    """One contour per block placement that draws outlines (frame or part),
    in drawing order."""

    order: dict[str, int] = {}
    inks: list[Ink] = [c.ink for c in lw.circles] + [a.ink for a in lw.arcs] + [p.ink for p in lw.paths]
    for ink in inks:
        if ink.placement:
            order[ink.placement] = min(order.get(ink.placement, ink.seq), ink.seq)
    out: list[Contour] = []
    for key in sorted(order, key=order.__getitem__):
        sub = _sub(lw, key)
        lines = [p for p in sub.paths if not p.hatch and not is_centre(p.ink, settings)]
        if not lines and not [a for a in sub.arcs if not is_centre(a.ink, settings)]:
            continue  # a pin block: circles and centre marks only
        polygon = _region(sub, settings, tol)
        first = min([p.ink for p in sub.paths] + [a.ink for a in sub.arcs], key=lambda k: k.seq)
        frame = (
            any(p.hatch for p in sub.paths)
            or (first.block or "") in settings.frame_blocks
            or first.layer in settings.frame_layers
        )
        out.append(Contour(polygon, first, frame, key))
    return out


def _region(sub: Linework, settings: InferSettings, tol: float) -> Any:
    """The union of a placement's closed outlines, else the hull of all it
    draws."""
    import shapely

    cons = contours(Linework(sub.circles, sub.arcs, tuple(p for p in sub.paths if not p.hatch)), settings, tol)
    if cons:
        return shapely.unary_union([c.polygon for c in cons])
    pts: list[Any] = [shapely.Point(q) for p in sub.paths for q in p.points]
    pts += [shapely.Point(c.center).buffer(c.radius_mm) for c in sub.circles]
    return shapely.unary_union(pts).convex_hull


def infer_blocks(lw: Linework, drawing: Drawing, settings: InferSettings) -> Inferred | None:
    """The skeleton of a drawing whose parts are blocks, or None when no
    placement draws a part, or one draws separate outlines (a whole sheet
    placed as a block is read as outlines)."""
    tol = linework_tolerance(lw, settings)
    placed = block_parts(lw, settings, tol)
    moving = [c for c in placed if not c.frame]
    if not moving or any(c.polygon.geom_type != "Polygon" for c in moving):
        return None
    model = Linework(
        tuple(c for c in lw.circles if not c.ink.placement),
        tuple(a for a in lw.arcs if not a.ink.placement),
        tuple(p for p in lw.paths if not p.ink.placement),
    )
    cons: Sequence[Contour] = drop_containers([*placed, *contours(model, settings, tol)])
    return infer_from_parts(lw, drawing, settings, "blocks", cons)
