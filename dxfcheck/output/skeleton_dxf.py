"""Write the skeleton dxfcheck read (from the role layers or inferred from
the geometry) as a drawing on the role layers, so that a user can confirm
it, correct it in CAD and use it from then on (``dxfcheck skeleton``).

Alone, the skeleton is written in a new drawing in millimetres with the
loads, springs, bands and labels.  ``over`` writes it over a faded copy of
the original (every layer of the original turned grey, colour 8), where
the loads, springs, bands and labels already are; coordinates go back to
the drawing's unit (a skeleton read from the role layers is there already,
and only the labels are added).  Pins whose names dxfcheck made up get a
label at their centre.  Nothing here computes: the skeleton is the drawing's, the names the
mechanism's.
"""

from __future__ import annotations

import os
from typing import Any

from dxfcheck.core.config import Config, Role
from dxfcheck.core.files import check_target
from dxfcheck.core.geometry import Affine
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.output.markup import save_copy
from dxfcheck.output.picture import render_svg
from dxfcheck.output.sketch import Sketch, _write_arc, _write_circle, _write_path, _write_text
from dxfcheck.read.drawing import load_document

__all__ = ["FADED_COLOR", "skeleton_document", "skeleton_sketch", "write_skeleton"]

#: ACI colour of the original's layers under the skeleton (grey).
FADED_COLOR = 8
_KEPT = (Role.LOAD, Role.LABEL, Role.BAND, Role.SPRING)


def skeleton_sketch(mech: Mechanism, config: Config, *, kept: bool = True) -> Sketch:
    """The mechanism's skeleton as a :class:`Sketch` in [mm] on the layers
    of ``config`` (each role's first name); with ``kept``, also the loads,
    springs, bands and labels."""
    d = mech.drawing
    sk = Sketch(units="mm", layers={r.value: config.layers[r][0] for r in Role if config.layers.get(r)})
    for c in d.circles:
        if c.role is Role.DRUM:
            sk.items.append(("circle", "drum", c.center, c.radius_mm))
        elif c.role in (Role.PIVOT, Role.PIN):
            sk.items.append(("circle", c.role.value, c.center, c.radius_mm))
    for a in d.arcs:
        if a.role is Role.SHOE or (kept and a.role is Role.BAND):
            sk.items.append(("arc", a.role.value, a.center, a.radius_mm, a.start_deg, a.end_deg))
    for p in d.paths:
        if p.role is Role.LINK or (kept and p.role in _KEPT):
            sk.items.append(("path", p.role.value, p.points))
    if kept:
        for t in d.texts:
            if t.role in _KEPT:
                sk.items.append(("text", t.role.value, t.text, t.position))
    for pin in mech.pins:
        if pin.name not in mech.labelled_names:
            sk.label(pin.name, *pin.center)
    return sk


def skeleton_document(mech: Mechanism, config: Config, *, over: bool) -> Any:
    """The ezdxf document: the skeleton alone, or over a faded copy."""
    if not over:
        return skeleton_sketch(mech, config).to_doc()
    from pathlib import Path

    doc, _ = load_document(Path(mech.drawing.path))
    for layer in doc.layers:
        layer.color = FADED_COLOR
    sk = skeleton_sketch(mech, config, kept=False)
    if mech.drawing.skeleton_source == "layers":  # the skeleton is in the copy already: only the new labels
        sk.items = [it for it in sk.items if it[1] == "label"]
    for role in ("pivot", "pin", "link", "drum", "shoe", "label"):
        name = sk.layers.get(role, role.upper())
        if name not in doc.layers:
            doc.layers.add(name)
    k = 1.0 / mech.drawing.mm_per_unit
    to_local = Affine.scaling(k, k)
    msp = doc.modelspace()
    for it in sk.items:
        attribs = {"layer": sk.layers.get(it[1], it[1].upper())}
        if it[0] == "circle":
            _write_circle(msp, it, to_local, k, attribs)
        elif it[0] == "arc":
            _write_arc(msp, it, to_local, k, False, attribs)
        elif it[0] == "path":
            _write_path(msp, it, to_local, str(doc.dxfversion), attribs)
        else:
            _write_text(msp, it, to_local, k, attribs)
    return doc


def write_skeleton(
    mech: Mechanism,
    out: str | os.PathLike[str],
    *,
    config: Config,
    over: bool = False,
    svg: str | os.PathLike[str] | None = None,
    force: bool = False,
) -> list[str]:
    """Write the skeleton drawing (and its SVG picture); returns what was
    written.  Every target is checked before anything is written."""

    source = mech.drawing.path
    check_target(out, force=force, protect=(source,))
    if svg is not None:
        check_target(svg, force=force, protect=(source, out), text=True)
    doc = skeleton_document(mech, config, over=over)
    save_copy(doc, out, source=source, force=force)
    written = [os.fspath(out)]
    if svg is not None:
        title = f"dxfcheck skeleton of {os.path.basename(source)} ({mech.drawing.skeleton_source})"
        render_svg(doc, svg, [], title=title, config=config, force=force, protect=(source, out))
        written.append(os.fspath(svg))
    return written
