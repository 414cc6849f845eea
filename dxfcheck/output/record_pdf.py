"""The calculation record as PDF, laid out with fpdf2 (pure Python, from the
package registry alone: ``pip install "dxfcheck[pdf]"``) from the same
element tree as the HTML record (:func:`dxfcheck.output.record.record_tree`),
so both hold the same sections, tables and pictures: A4 portrait, each
section from ``spec`` on a new page (as the HTML's print style sheet), the
pictures as vector graphics scaled to the page width.

Text is set in DejaVu Sans (found beside matplotlib or among the system's
fonts) so that μ, ·, ° and Ø print; without it, in Helvetica with those
symbols spelt in ASCII (:data:`dxfcheck.core.textsafe.ASCII_FALLBACK`).
"""

from __future__ import annotations

import copy
import importlib.util
import io
import xml.etree.ElementTree as ET
from pathlib import Path
from typing import Any, Literal

from dxfcheck.core.errors import ConfigError
from dxfcheck.core.textsafe import ASCII_FALLBACK

__all__ = ["FONT_CANDIDATES", "pdf_bytes"]

#: Where DejaVu Sans is looked for, after matplotlib's copy.
FONT_CANDIDATES = (
    Path("/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf"),
    Path("/usr/share/fonts/dejavu/DejaVuSans.ttf"),
)
#: Sections that share the first page.
FIRST_PAGE = ("identity", "verdict")
#: Sections set on landscape pages (wide tables).
LANDSCAPE = ("rules",)
#: Font sizes [pt].
SIZES = {"h1": 15.0, "h2": 12.5, "h3": 10.5, "h4": 9.5, "p": 9.0, "table": 7.5}
#: Width of a force polygon and of a bending moment diagram [mm].
POLYGON_MM = 40.0
MOMENT_MM = 90.0
#: Widest share of a table's width one column gets, in characters [-].
MAX_COLUMN_CHARS = 48
MIN_COLUMN_CHARS = 8


def _font_path() -> Path | None:
    spec = importlib.util.find_spec("matplotlib")
    candidates = list(FONT_CANDIDATES)
    if spec is not None and spec.origin:
        candidates.insert(0, Path(spec.origin).parent / "mpl-data" / "fonts" / "ttf" / "DejaVuSans.ttf")
    return next((p for p in candidates if p.is_file()), None)


class _Writer:
    """Walks the record tree and lays it out."""

    def __init__(self) -> None:
        from fpdf import FPDF

        self.pdf = FPDF(orientation="portrait", unit="mm", format="A4")
        self.pdf.set_auto_page_break(auto=True, margin=15)
        self.pdf.set_margins(15, 15, 15)
        font = _font_path()
        self.unicode = font is not None
        if font is not None:
            self.pdf.add_font("body", "", str(font))
            bold = font.with_name("DejaVuSans-Bold.ttf")
            self.pdf.add_font("body", "B", str(bold if bold.is_file() else font))
            self.family = "body"
        else:
            self.family = "helvetica"
        self.pdf.add_page()

    def text(self, s: str) -> str:
        if self.unicode:
            return s
        for k, v in ASCII_FALLBACK.items():
            s = s.replace(k, v)
        return s.encode("latin-1", "replace").decode("latin-1")

    def font(self, size: float, bold: bool = False) -> None:
        self.pdf.set_font(self.family, "B" if bold else "", size)

    def para(self, s: str, size: float, *, bold: bool = False, border: Literal[0, 1] = 0) -> None:
        self.font(size, bold)
        self.pdf.multi_cell(0, size * 0.5, self.text(s), border=border, new_x="LMARGIN", new_y="NEXT")
        self.pdf.ln(1.5)

    def heading(self, el: ET.Element) -> None:
        size = SIZES[el.tag]
        self.pdf.ln(1.0)
        self.para("".join(el.itertext()), size, bold=True)

    def table(self, el: ET.Element) -> None:
        rows = [[self.text("".join(td.itertext()).strip()) for td in tr] for tr in el.iter("tr")]
        if not rows or not rows[0]:
            return
        n = max(len(r) for r in rows)
        rows = [r + [""] * (n - len(r)) for r in rows]
        widths = [_column_chars([r[i] for r in rows]) for i in range(n)]
        self.font(SIZES["table"])
        with self.pdf.table(
            col_widths=tuple(widths),
            text_align="LEFT",
            line_height=SIZES["table"] * 0.45,
            first_row_as_headings=True,
            headings_style=_headings_style(self.family),
        ) as table:
            for r in rows:
                row = table.row()
                for cell in r:
                    row.cell(cell)
        self.pdf.ln(2)

    def picture(self, el: ET.Element) -> None:
        svg = copy.deepcopy(el)
        for t in svg.findall("title"):  # the accessible name: the PDF has it in the heading
            svg.remove(t)
        svg.set("font-family", self.family)  # the PDF's own font, so that every symbol prints
        data = self.text(ET.tostring(svg, encoding="unicode"))
        width = {"polygon": POLYGON_MM, "moment": MOMENT_MM}.get(el.get("class") or "")
        if width is None and self.pdf.get_y() > self.pdf.h / 2:
            self.pdf.add_page()
        self.pdf.image(io.BytesIO(data.encode("utf-8")), w=width or self.pdf.epw)
        self.pdf.ln(2)

    def walk(self, el: ET.Element) -> None:
        for child in el:
            tag = child.tag
            if tag == "section":
                if child.get("id") not in FIRST_PAGE:
                    self.pdf.add_page(orientation="L" if child.get("id") in LANDSCAPE else "P")
                self.walk(child)
            elif tag in ("h1", "h2", "h3", "h4"):
                self.heading(child)
            elif tag == "p":
                caution = child.get("class") == "caution"
                self.para("".join(child.itertext()), SIZES["p"], bold=caution, border=1 if caution else 0)
            elif tag == "ul":
                for li in child:
                    self.para("• " + "".join(li.itertext()), SIZES["p"])
            elif tag == "table":
                self.table(child)
            elif tag == "svg":
                self.picture(child)
            elif tag == "div":
                self.walk(child)


def _column_chars(cells: list[str]) -> float:
    """A column's share of the width [characters]: room for its longest word,
    and for most of its longest cell up to :data:`MAX_COLUMN_CHARS`."""
    word = max((len(w) for c in cells for w in c.split()), default=0) + 1
    return max(MIN_COLUMN_CHARS, word, 0.7 * min(MAX_COLUMN_CHARS, max(len(c) for c in cells)))


def _headings_style(family: str) -> Any:
    from fpdf.fonts import FontFace

    return FontFace(family=family, emphasis="BOLD", fill_color=(235, 235, 235))


def pdf_bytes(html: ET.Element) -> bytes:
    """The record tree laid out as a PDF document.

    Raises
    ------
    ConfigError
        When fpdf2 is not installed.
    """
    if importlib.util.find_spec("fpdf") is None:
        raise ConfigError('a PDF record needs fpdf2: pip install "dxfcheck[pdf]" (or write the record as .html)')
    w = _Writer()
    title = html.find("head/title")
    w.pdf.set_title(w.text("" if title is None else "".join(title.itertext())))
    w.pdf.set_creator("dxfcheck")
    body = html.find("body")
    if body is not None:
        w.walk(body)
    return bytes(w.pdf.output())
