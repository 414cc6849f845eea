"""Use the role layers when they hold a skeleton, else infer it from the
drawing's geometry; ``--skeleton-from`` (or ``[infer] skeleton_from``)
forces either.

The inferred skeleton replaces the drawing's skeleton roles (pivot, pin,
link, drum, shoe) in a :class:`~dxfcheck.read.drawing.Drawing` of the same
form the role reader makes, so that every later stage is unchanged; loads,
springs, bands and labels still come from their layers.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from dxfcheck.core.config import Config, Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.infer.blocks import infer_blocks
from dxfcheck.infer.centrelines import Inferred, infer_centrelines, part_centre_lines, usable
from dxfcheck.infer.choice import KEPT_ROLES, SKELETON_ROLES, has_role_skeleton, infers_skeleton
from dxfcheck.infer.linework import Linework, read_linework
from dxfcheck.infer.outlines import infer_outlines
from dxfcheck.infer.roles import infer_finding
from dxfcheck.read.drawing import Drawing, load_document

__all__ = ["KEPT_ROLES", "SKELETON_ROLES", "has_role_skeleton", "infer_from_linework", "skeleton_drawing"]


def skeleton_drawing(
    drawing: Drawing, config: Config, *, skeleton_from: str | None = None, max_bytes: int | None = None
) -> Drawing:
    """``drawing`` as read from the role layers, or with its skeleton
    inferred from the geometry (``skeleton_from``: ``auto``, ``layers``,
    ``geometry``; default the project file's ``[infer] skeleton_from``).

    Raises
    ------
    ConfigError
        For an unknown ``skeleton_from``.
    DrawingReadError
        When the file cannot be read again for its linework.
    """
    if not infers_skeleton(drawing, config, skeleton_from):
        return drawing
    doc, _ = load_document(Path(drawing.path), max_bytes=max_bytes)  # its repairs were reported by the first read
    kept = [name for role in KEPT_ROLES for name in config.layers.get(role, ())]
    lw = read_linework(doc, drawing.mm_per_unit, drawing.path, kept)
    return infer_from_linework(drawing, lw, config)


def infer_from_linework(drawing: Drawing, lw: Linework, config: Config) -> Drawing:
    """``drawing`` with its skeleton roles replaced by what ``lw`` shows."""
    settings = config.infer
    lw = usable(lw, settings)
    if part_centre_lines(lw, settings):
        got = infer_centrelines(lw, drawing, settings)
    elif lw.paths:
        got = infer_blocks(lw, drawing, settings) or infer_outlines(lw, drawing, settings)
        if not got.links:
            got = Inferred("none", (), (), (), (_nothing(),))
    else:
        got = Inferred("none", (), (), (), (_nothing(),))
    return _replace_skeleton(drawing, got)


def _nothing() -> Finding:
    return infer_finding(
        Code.NO_PART_GEOMETRY,
        "the drawing has no skeleton layers and no part geometry dxfcheck can read (centre lines between pin "
        "circles, or closed part outlines holding their holes); draw the parts' centre lines with a centre "
        "linetype or name their layer in [infer] centre_layers, close the outlines, or put the skeleton on the "
        "role layers",
    )


def _replace_skeleton(drawing: Drawing, got: Inferred) -> Drawing:
    n_piv = sum(1 for c in got.circles if c.role is Role.PIVOT)
    n_pin = sum(1 for c in got.circles if c.role is Role.PIN)
    summary = infer_finding(
        Code.SKELETON_INFERRED,
        f"no skeleton on the role layers: inferred from the geometry ({got.style}): "
        f"{sum(1 for c in got.circles if c.role is Role.DRUM)} drum, {n_piv} pivots, {n_pin} pins, "
        f"{len(got.links)} centreline pieces, {len(got.arcs)} shoe arcs. Not confirmed: check it with "
        "`dxfcheck skeleton DRAWING -o OUT.dxf` and use that drawing (or put the skeleton on the role layers)",
    )
    return replace(
        drawing,
        circles=(*got.circles, *(c for c in drawing.circles if c.role in KEPT_ROLES)),
        arcs=(*got.arcs, *(a for a in drawing.arcs if a.role in KEPT_ROLES)),
        paths=(*got.links, *(p for p in drawing.paths if p.role in KEPT_ROLES)),
        findings=(*drawing.findings, summary, *got.findings),
        other_layers=(),
        loose_circles=(),
        skeleton_source=f"geometry ({got.style})",
    )
