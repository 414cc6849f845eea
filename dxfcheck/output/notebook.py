"""The results in a notebook: a solve's :class:`Solution`, the gate's
:class:`Judgement` and a revision :class:`Comparison` display as tables and
pictures in Jupyter (or any IPython front end).

The result classes live in the stages below ``output`` and cannot import it,
so the display is attached from here, through IPython's formatter registry
(``shell.display_formatter.formatters[MIME].for_type(cls, function)``), not
as methods on the classes:

* ``text/html``: the tables of the calculation record
  (:mod:`dxfcheck.output.record`: the verdict, the rules, the findings, the
  per-direction results) with the record's pictures inline
  (:mod:`dxfcheck.output.figure`), under the caution;
* ``image/svg+xml``: the picture alone (a solution's and a judgement's forces
  in each drum direction side by side; a comparison's braking torque of both
  revisions, :func:`dxfcheck.revision.compare.trend_svg`);
* ``text/plain``: one line (the dataclasses' own repr prints the whole
  mechanism).

``import dxfcheck`` calls :func:`enable` when it runs inside an IPython
shell; ``%load_ext dxfcheck.output.notebook`` or
``dxfcheck.output.notebook.enable()`` does it by hand (for a shell started
after the import).  IPython is not a dependency: without a shell nothing is
registered.

Every number shown is a result field; nothing here computes physics.  Texts
from the drawing (names, labels, file names) go through the record's
builders, which escape them (``xml.etree`` and
:func:`dxfcheck.core.textsafe.xml_text`), so a label never becomes markup.
"""

from __future__ import annotations

import sys
import xml.etree.ElementTree as ET
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from dxfcheck.gate.rules import Judgement
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.output.figure import plan_figure, svg_element
from dxfcheck.output.record import (
    Cell,
    _findings,
    _Num,
    _results,
    _rules,
    _table,
    _text,
    _verdict,
)
from dxfcheck.output.text import CAUTION
from dxfcheck.revision.compare import Comparison, format_cell, trend_svg
from dxfcheck.statics import CaseSolution, Solution

__all__ = [
    "CSS",
    "FORMATTERS",
    "SVG_SCALE",
    "comparison_html",
    "comparison_svg",
    "enable",
    "judgement_html",
    "judgement_svg",
    "load_ipython_extension",
    "solution_html",
    "solution_svg",
    "summary",
]

#: The style of a result's display, scoped to its ``div.dxfcheck`` so that it
#: never restyles the notebook around it.
CSS = """
div.dxfcheck h2 { font-size: 1.15em; margin: 0.8em 0 0.3em 0; }
div.dxfcheck h3 { font-size: 1.05em; margin: 0.6em 0 0.3em 0; }
div.dxfcheck section { overflow-x: auto; }
div.dxfcheck table { border-collapse: collapse; margin: 0.3em 0 0.8em 0; }
div.dxfcheck th, div.dxfcheck td { border: 1px solid #bbb; padding: 2px 6px; text-align: left; }
div.dxfcheck td.num { text-align: right; font-variant-numeric: tabular-nums; }
div.dxfcheck .verdict-pass { color: #0a6b0a; font-weight: bold; }
div.dxfcheck .verdict-warn { color: #8a5a00; font-weight: bold; }
div.dxfcheck .verdict-fail { color: #b00000; font-weight: bold; }
div.dxfcheck .verdict-skip { color: #555; }
div.dxfcheck .caution { font-style: italic; }
div.dxfcheck .figures { display: flex; flex-wrap: wrap; gap: 1em; }
div.dxfcheck .figures svg { width: 32em; max-width: 100%; height: auto; border: 1px solid #ddd; }
div.dxfcheck div.trend svg { max-width: 100%; height: auto; }
"""


#: Size of the side-by-side pictures on the page against the record's [-]
#: (two record pictures at full size are wider than a notebook's column).
SVG_SCALE = 0.5


def _box(title: str) -> ET.Element:
    div = ET.Element("div", {"class": "dxfcheck"})
    ET.SubElement(div, "style").text = CSS
    _text(div, "h3", title)
    _text(div, "p", CAUTION, **{"class": "caution"})
    return div


def _html(div: ET.Element) -> str:
    return ET.tostring(div, encoding="unicode", method="html")


def _name(mech: Mechanism) -> str:
    return Path(mech.drawing.path).name


def _torque_text(c: CaseSolution) -> str:
    t = c.braking_torque_Nm
    return "no brake" if t is None else f"{t:.4g} N·m"


def _figures(parent: ET.Element, mech: Mechanism, sol: Solution, verdict: str = "") -> ET.Element:
    """The record's picture of each drum direction, side by side."""
    row = ET.SubElement(parent, "div", {"class": "figures"})
    for c in sol.cases:
        title = f"{_name(mech)} · drum {c.direction} · μ = {c.mu:g} · T = {_torque_text(c)}{verdict}"
        row.append(svg_element(plan_figure(mech, c, title)))
    return row


def _torques(parent: ET.Element, sol: Solution) -> None:
    rows: list[Sequence[Cell]] = [
        (str(c.direction), _Num(c.mu, fmt="g"), _Num(c.braking_torque_Nm, "N·m"), c.why_not_braking or "")
        for c in sol.cases
    ]
    _table(parent, ("direction", "μ", "braking torque", "note"), rows, "torque")


def solution_html(sol: Solution) -> str:
    """A solve's display: the braking torque per drum direction, the
    pictures, then each direction's shoes, bands, springs, members and pins."""
    mech = sol.mechanism
    div = _box(f"dxfcheck solution: {_name(mech)} ({mech.family})")
    _torques(div, sol)
    _figures(div, mech, sol)
    for c in sol.cases:
        details = ET.SubElement(div, "details")
        _text(details, "summary", f"Drum {c.direction} at μ = {c.mu:g}: forces")
        _results(details, c)
    return _html(div)


def judgement_html(j: Judgement) -> str:
    """The gate's display: the verdict and the torques, the rules (the duty
    first, with formula and values), the findings, the pictures."""
    div = _box(f"dxfcheck check: {_name(j.mechanism)} ({j.mechanism.family})")
    _verdict(div, j)
    _rules(div, j)
    _findings(div, j)
    details = ET.SubElement(div, "details")
    _text(details, "summary", f"Forces at μ = {j.mu:g}")
    _figures(details, j.mechanism, j.nominal, f" · verdict {str(j.verdict).upper()}")
    return _html(div)


def _change_rows(comp: Comparison) -> list[Sequence[Cell]]:
    def change(x: float | None, unit: str) -> Cell:
        return "–" if x is None else f"{x:+.5g} {unit}".strip()

    return [
        (
            "verdict:fail" if x.crossed else "",
            x.kind,
            x.name,
            x.direction,
            format_cell(x.old),
            format_cell(x.new),
            change(x.abs_change, x.unit),
            _Num(None if x.rel_change is None else 100 * x.rel_change, "%", "+.3g"),
            x.note,
        )
        for x in comp.changes
    ]


def comparison_html(comp: Comparison) -> str:
    """A revision step's display: OK or FAIL, the thresholds, how the two
    drawings were matched, the torque of both revisions (the trend picture)
    and every change (threshold crossings and verdict changes first)."""
    old, new = comp.old.mechanism, comp.new.mechanism
    div = _box(f"dxfcheck compare: {_name(old)} → {_name(new)}")
    p = ET.SubElement(div, "p")
    verdict = "fail" if comp.failed else "pass"
    _text(p, "span", "FAIL" if comp.failed else "OK", **{"class": f"verdict-{verdict}", "id": "comparison-value"})
    _text(p, "span", ": a threshold is crossed or a verdict went from pass to fail" if comp.failed else "")
    _text(div, "p", comp.thresholds.describe())
    _text(
        div,
        "p",
        f"rigid motion found from {comp.motion_source}; {len(comp.pin_map)} of {len(old.pins)} pins "
        f"({len(new.pins)} in the newer) and {len(comp.part_map)} of {len(old.parts)} parts matched",
    )
    ET.SubElement(div, "div", {"class": "trend"})
    head = ("crossed", "what", "name", "dir", "old", "new", "change", "rel", "note")
    _table(div, head, _change_rows(comp), "changes")
    # The trend picture is SVG text: put in its empty box (a drawing's text
    # cannot spell the box's tag, the serializer escapes its "<").
    return _html(div).replace(_TREND_BOX, f'<div class="trend">{comparison_svg(comp)}</div>', 1)


#: The trend picture's empty box as serialized.
_TREND_BOX = '<div class="trend"></div>'


def _side_by_side(svgs: list[ET.Element]) -> str:
    """Pictures with a ``viewBox`` each, placed in a row in one SVG."""
    outer = ET.Element("svg", {"xmlns": "http://www.w3.org/2000/svg"})
    x_at, height = 0.0, 0.0
    for svg in svgs:
        *_, w, h = (float(v) for v in svg.get("viewBox", "0 0 0 0").split())
        svg.attrib.pop("xmlns", None)
        svg.set("x", f"{x_at:.2f}")
        svg.set("width", f"{w:.2f}")
        svg.set("height", f"{h:.2f}")
        outer.append(svg)
        x_at, height = x_at + w, max(height, h)
    outer.set("width", f"{x_at * SVG_SCALE:.2f}")
    outer.set("height", f"{height * SVG_SCALE:.2f}")
    outer.set("viewBox", f"0 0 {x_at:.2f} {height:.2f}")
    return ET.tostring(outer, encoding="unicode")


def solution_svg(sol: Solution) -> str:
    """The forces in each drum direction, side by side."""
    return _side_by_side(list(_figures(ET.Element("div"), sol.mechanism, sol)))


def judgement_svg(j: Judgement) -> str:
    """The forces at the nominal μ in each drum direction, with the verdict."""
    return _side_by_side(list(_figures(ET.Element("div"), j.mechanism, j.nominal, f" · verdict {j.verdict}")))


def comparison_svg(comp: Comparison) -> str:
    """The braking torque of both revisions per direction, with the required torque."""
    return trend_svg([comp])


def summary(obj: Solution | Judgement | Comparison) -> str:
    """One line for ``text/plain``."""
    if isinstance(obj, Solution):
        torques = ", ".join(f"{c.direction} {_torque_text(c)}" for c in obj.cases)
        return f"<dxfcheck Solution of {_name(obj.mechanism)}: {torques}>"
    if isinstance(obj, Judgement):
        return f"<dxfcheck Judgement of {_name(obj.mechanism)}: {str(obj.verdict).upper()}>"
    status = "FAIL" if obj.failed else "OK"
    return f"<dxfcheck Comparison {_name(obj.old.mechanism)} -> {_name(obj.new.mechanism)}: {status}>"


def _pretty(obj: Solution | Judgement | Comparison, p: Any, cycle: bool) -> None:
    p.text(summary(obj))


#: (result class, MIME type) -> the function that shows it.
FORMATTERS: dict[tuple[type, str], Callable[..., Any]] = {
    (Solution, "text/html"): solution_html,
    (Solution, "image/svg+xml"): solution_svg,
    (Solution, "text/plain"): _pretty,
    (Judgement, "text/html"): judgement_html,
    (Judgement, "image/svg+xml"): judgement_svg,
    (Judgement, "text/plain"): _pretty,
    (Comparison, "text/html"): comparison_html,
    (Comparison, "image/svg+xml"): comparison_svg,
    (Comparison, "text/plain"): _pretty,
}


def enable(shell: Any = None) -> bool:
    """Register the displays with ``shell`` (the running IPython shell when
    None).  Returns False when there is no shell (plain Python)."""
    if shell is None:
        ipython = sys.modules.get("IPython")
        get = getattr(ipython, "get_ipython", None)
        shell = get() if get is not None else None
    formatters = getattr(getattr(shell, "display_formatter", None), "formatters", None)
    if not formatters:
        return False
    for (cls, mime), show in FORMATTERS.items():
        formatters[mime].for_type(cls, show)
    return True


def load_ipython_extension(ipython: Any) -> None:
    """``%load_ext dxfcheck.output.notebook``."""
    enable(ipython)
