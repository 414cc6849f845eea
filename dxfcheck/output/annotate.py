"""Write the marked-up copy of a drawing and its pictures: ``annotate`` for a
solution, ``mark_revision`` for the newest of two compared revisions."""

from __future__ import annotations

import os
from pathlib import Path

from dxfcheck.core.config import Config
from dxfcheck.core.directions import Direction
from dxfcheck.core.errors import ConfigError, DxfcheckError, OutputError
from dxfcheck.core.files import Target, check_targets
from dxfcheck.core.textsafe import one_line
from dxfcheck.gate.rules import Judgement
from dxfcheck.output.markup import TEXT_FRACTION, TEXT_MIN_MM, marked_document, plan_markup, save_copy
from dxfcheck.output.picture import render_png, render_svg
from dxfcheck.revision.compare import GEOMETRY_KINDS, Comparison, format_cell
from dxfcheck.statics import Solution

__all__ = ["annotate", "mark_revision"]


def annotate(
    sol: Solution,
    *,
    out: str | os.PathLike[str] | None = None,
    svg: str | os.PathLike[str] | None = None,
    png: str | os.PathLike[str] | None = None,
    direction: Direction | str | None = None,
    judgement: Judgement | None = None,
    config: Config | None = None,
    force: bool = False,
) -> list[Path]:
    """Write the marked-up copy (``out``, DXF in the input's version and
    format, see :func:`save_copy`) and the pictures (``svg``, ``png``; an
    SVG may go to standard output as ``-``) for one drum direction.

    Every output is checked before anything is written (so a refused output
    leaves no other half-done; two outputs to one file are refused), then
    written to a temporary file and moved into place.  The input drawing is
    never written.

    Raises
    ------
    ConfigError
        When an output exists and ``force`` is False, is the input drawing,
        or PNG output is asked for without its backend.
    """

    source = sol.mechanism.drawing.path
    if out is None and svg is None and png is None:
        raise ConfigError("nothing to write: give -o OUT.dxf, --svg OUT.svg or --png OUT.png")
    _refuse_dwg_name(out)
    check_targets((Target(out, force), Target(svg, force, text=True), Target(png, force)), protect=(source,))
    markup = plan_markup(sol, direction, judgement)
    title = f"dxfcheck: {Path(source).name}, drum {markup.direction}"
    written: list[Path] = []
    step = "add the forces to"
    try:
        doc = marked_document(sol, [markup], config)
        if out is not None:
            step = "write a copy of"
            save_copy(doc, out, source=source, force=force)
            written.append(Path(out))
        if svg is not None:
            step = "draw an SVG picture of"
            render_svg(doc, svg, [markup], title=title, config=config, force=force, protect=(source,))
            written.append(Path(svg))
        if png is not None:
            step = "draw a PNG picture of"
            render_png(doc, png, config=config, force=force, protect=(source,))
            written.append(Path(png))
    except DxfcheckError:
        raise
    except Exception as exc:  # ezdxf cannot write this (damaged) document: say so
        raise OutputError(
            f"the drawing was read, but ezdxf cannot {step} it ({type(exc).__name__}: {exc}); open and re-save it "
            "in the CAD program, then annotate again",
            path=source,
        ) from exc
    return written


def _refuse_dwg_name(out: str | os.PathLike[str] | None) -> None:
    """A marked-up copy is DXF, of a DWG drawing too (there is no DWG writer
    dxfcheck trusts): an output named ``.dwg`` would be a DXF in disguise."""
    if out is not None and str(out) != "-" and Path(out).suffix.lower() == ".dwg":
        raise ConfigError(
            "the marked-up copy is written as DXF (there is no DWG writer dxfcheck trusts); name it .dxf",
            path=str(out),
        )


def mark_revision(comp: Comparison, out: str | os.PathLike[str], config: Config, *, force: bool = False) -> None:
    """Write the newer revision marked up (as ``annotate`` does), plus a ring
    and a note at every geometry change that has a place (a pin moved, a
    part's span or length, a load or spring end moved...) and every pin force
    that crossed the threshold.  Neither revision's file is written."""

    _refuse_dwg_name(out)
    sol = comp.new.nominal
    mech = sol.mechanism
    doc = marked_document(sol, [plan_markup(sol)], config)
    k = 1.0 / mech.drawing.mm_per_unit
    h = max(TEXT_MIN_MM, TEXT_FRACTION * (2 * mech.drum.radius_mm if mech.drum else mech.length_scale_mm / 4))
    msp = doc.modelspace()
    pins = {p.name: p for p in mech.pins}
    for c in comp.changes:
        pin = pins.get(c.name)
        if c.kind == "pin" and c.crossed and pin is not None:
            at, ring = pin.center, 1.5 * pin.diameter_mm
            text = f"{c.name} {c.direction}: force {100 * (c.rel_change or 0):+.1f}%"
        elif c.kind in GEOMETRY_KINDS and c.at_mm is not None:
            at = c.at_mm
            ring = 1.5 * pin.diameter_mm if c.kind in ("moved", "diameter") and pin is not None else h
            text = c.note or f"{c.name}: {format_cell(c.old)} -> {format_cell(c.new)} {c.unit}"
        else:
            continue
        x, y = at
        msp.add_circle((x * k, y * k), ring * k, dxfattribs={"layer": config.note_layer})
        msp.add_text(
            one_line(text),  # names are drawing texts: control characters as visible escapes
            height=h * k,
            dxfattribs={"layer": config.note_layer, "insert": ((x + h) * k, (y - 2 * h) * k)},
        )
    save_copy(doc, out, source=mech.drawing.path, force=force, protect=(comp.old.mechanism.drawing.path,))
