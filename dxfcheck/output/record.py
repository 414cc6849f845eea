"""The calculation record: one self-contained HTML file a checker files with
the drawing (``dxfcheck check DRAWING --record OUT.html``).

It holds the drawing's identity (file name, SHA-256 of its bytes, drawing
number, title and revision from the title block, the date of the check,
dxfcheck's version), the spec with the source of every value and the
friction range, the method (the theory of each shoe, the short-shoe figure
beside a long-shoe one, the band law, the references), per drum direction
the picture of the forces, the braking torque and a free-body table of
every part, the shoes, bands, springs and two-force members; every rule
with its formula, the values put in, the result, the limit, the margin and
the verdict (the duty first); the findings, the verdict, a sign-off block
and the caution.

Built with :mod:`xml.etree.ElementTree`, so that every text from the
drawing (names, labels, title block fields) is escaped by the serializer;
control characters are shown as escapes (:func:`dxfcheck.core.textsafe.xml_text`).
Nothing is fetched: the style sheet is inline and the pictures are inline
SVG.  Every number shown is a result field (the cell keeps the exact value
in ``data-value``); nothing here computes physics.
"""

from __future__ import annotations

import datetime as dt
import hashlib
import math
import os
import xml.etree.ElementTree as ET
from collections.abc import Iterable, Sequence
from pathlib import Path
from typing import Protocol

from dxfcheck.core.files import write_atomic
from dxfcheck.core.records import record
from dxfcheck.core.textsafe import printable, xml_text
from dxfcheck.core.version import __version__
from dxfcheck.gate.rules import Judgement, RuleResult
from dxfcheck.gate.verdicts import figures
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.output.figure import force_polygon, moment_diagram, plan_figure, svg_element
from dxfcheck.output.json import file_sha256
from dxfcheck.output.record_pdf import pdf_bytes
from dxfcheck.output.text import CAUTION
from dxfcheck.read.titleblock import TitleBlock, read_title_block
from dxfcheck.statics import CaseSolution, PartDiagram

__all__ = [
    "SECTIONS",
    "Signoff",
    "free_body",
    "ordered_rules",
    "record_html",
    "record_name",
    "record_tree",
    "write_index",
    "write_record",
]


def _safe(text: str) -> str:
    """A drawing's text for HTML/SVG: control characters and bidirectional
    overrides as visible escapes (the serializer escapes ``<&"``)."""
    return xml_text(printable(text))


#: The record's sections, by ``id``, in order.
SECTIONS = (
    "identity",
    "verdict",
    "spec",
    "method",
    "direction-cw",
    "direction-ccw",
    "rules",
    "findings",
    "signoff",
    "caution",
)
#: Rule id prefixes read first: the duty.
DUTY_FIRST = ("torque.", "hoist.", "effort.")

_CSS = """
body { font-family: "DejaVu Sans", Arial, sans-serif; font-size: 10.5pt; color: #000; background: #fff;
  max-width: 60em; margin: 1.5em auto; padding: 0 1em; }
h1 { font-size: 16pt; margin-bottom: 0.2em; } h2 { font-size: 13pt; border-bottom: 1px solid #000; }
h3 { font-size: 11pt; margin-bottom: 0.2em; }
table { border-collapse: collapse; margin: 0.4em 0 0.8em 0; width: 100%; }
th, td { border: 1px solid #888; padding: 2px 5px; text-align: left; vertical-align: top; }
th { background: #eee; } td.num { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; }
.verdict-pass { color: #0a6b0a; font-weight: bold; } .verdict-warn { color: #8a5a00; font-weight: bold; }
.verdict-fail { color: #b00000; font-weight: bold; } .verdict-skip { color: #555; }
.big { font-size: 15pt; } .caution { border: 2px solid #000; padding: 0.5em; font-weight: bold; }
svg.figure { width: 100%; height: auto; max-height: 24cm; border: 1px solid #ccc; }
.part { display: flex; gap: 1em; align-items: flex-start; } .part table { flex: 1; }
svg.polygon { width: 4.5cm; height: 4.5cm; flex: none; }
svg.moment { width: 9cm; height: auto; flex: none; } .internal { flex-direction: column; }
.signature td { height: 2.2em; } code { font-size: 9.5pt; }
@page { size: A4; margin: 15mm; }
@media print {
  body { max-width: none; margin: 0; padding: 0; font-size: 9.5pt; }
  section { page-break-before: always; break-before: page; }
  section#identity, section#verdict { page-break-before: auto; break-before: auto; }
  svg.figure { max-height: 20cm; page-break-inside: avoid; break-inside: avoid; }
  tr, .part { page-break-inside: avoid; break-inside: avoid; }
}
"""


@record(frozen=True)
class Signoff:
    """Names and dates of the sign-off block; blank ones are filled by hand."""

    prepared_by: str = ""
    prepared_on: str = ""
    checked_by: str = ""
    checked_on: str = ""
    approved_by: str = ""
    approved_on: str = ""


@record(frozen=True)
class _Num:
    """A number cell: the exact value kept in ``data-value``."""

    value: float | None
    unit: str = ""
    fmt: str = ".4g"


Cell = str | _Num


def _text(parent: ET.Element, tag: str, text: str, **attrs: str) -> ET.Element:
    el = ET.SubElement(parent, tag, attrs)
    el.text = _safe(text)
    return el


def _table(parent: ET.Element, head: Sequence[str], rows: Iterable[Sequence[Cell]], cls: str = "") -> ET.Element:
    table = ET.SubElement(parent, "table", {"class": cls} if cls else {})
    tr = ET.SubElement(ET.SubElement(table, "thead"), "tr")
    for h in head:
        _text(tr, "th", h)
    body = ET.SubElement(table, "tbody")
    for row in rows:
        tr = ET.SubElement(body, "tr")
        for cell in row:
            _cell(tr, cell)
    return table


#: Above this magnitude a ``.4g`` number is shown whole, not in e-notation.
WHOLE_FROM = 1e4
WHOLE_TO = 1e9


def _shown(v: float, fmt: str) -> str:
    if math.isinf(v):
        return "∞" if v > 0 else "-∞"
    if fmt == ".4g" and WHOLE_FROM <= abs(v) < WHOLE_TO:
        return f"{v:.0f}"
    return format(v, fmt)


def _cell(tr: ET.Element, cell: Cell) -> None:
    if isinstance(cell, _Num):
        v = cell.value
        if v is None or v != v:
            _text(tr, "td", "–", **{"class": "num"})
            return
        shown = _shown(v, cell.fmt)
        text = f"{shown} {cell.unit}".strip()
        _text(tr, "td", text, **{"class": "num", "data-value": repr(float(v))})
    elif cell.startswith("verdict:"):
        verdict = cell.removeprefix("verdict:")
        _text(tr, "td", verdict.upper(), **{"class": f"verdict-{verdict}"})
    else:
        _text(tr, "td", cell)


def _section(body: ET.Element, sid: str, title: str) -> ET.Element:
    sec = ET.SubElement(body, "section", {"id": sid})
    _text(sec, "h2", title)
    return sec


def _field(tb: TitleBlock, name: str) -> tuple[str, str]:
    f = dict(tb.fields())[name]
    return ("not found", tb.note) if f is None else (f.value, f"{f.source}: {f.where}")


def _identity(body: ET.Element, j: Judgement, tb: TitleBlock, sha: str, when: dt.datetime) -> None:
    d = j.mechanism.drawing
    sec = _section(body, "identity", "Drawing")
    rows: list[Sequence[Cell]] = [
        ("file", Path(d.path).name, ""),
        ("SHA-256 of the file's bytes", sha, ""),
    ]
    for k, name in enumerate(("drawing number", "title", "revision")):
        value, where = _field(tb, name)
        rows.append((name, value, where if k == 0 or value != "not found" else "as above"))
    rows += [
        ("date of the check", when.strftime("%Y-%m-%d %H:%M:%S UTC"), ""),
        ("dxfcheck version", __version__, ""),
        ("drawing unit", f"{d.units} (1 unit = {d.mm_per_unit:g} mm)", d.units_source),
        ("project file", d.config_path or "none", ""),
        ("spec beside the drawing", d.sidecar_path or "none", ""),
        ("mechanism", j.mechanism.family, ""),
    ]
    _table(sec, ("item", "value", "read from"), rows, "identity")


def _verdict(body: ET.Element, j: Judgement) -> None:
    sec = _section(body, "verdict", "Verdict")
    p = ET.SubElement(sec, "p", {"class": "big"})
    _text(p, "span", "Verdict: ")
    _text(p, "span", str(j.verdict).upper(), **{"class": f"verdict-{j.verdict}", "id": "verdict-value"})
    counts = ", ".join(f"{n} {v}" for v, n in j.counts().items())
    _text(sec, "p", f"Rules: {counts}.")
    torques = [(c.direction, c) for c in j.nominal.cases]
    _table(
        sec,
        ("direction", f"braking torque at μ = {j.mu:g}", "braking torque at μ_min"),
        [
            (str(d), _Num(c.braking_torque_Nm, "N·m"), _Num(j.solutions[j.mu_min].case(d).torque_Nm, "N·m"))
            for d, c in torques
        ],
    )


def _spec(body: ET.Element, j: Judgement) -> None:
    sec = _section(body, "spec", "Spec")
    _text(
        sec,
        "p",
        "Every value with the place it came from (lowest precedence first: defaults, project file, "
        "drawing header, the drawing's own file, the command line).",
    )
    rows: list[Sequence[Cell]] = [(v.key, v.text, v.unit, v.source) for v in j.spec.all_values()]
    _table(sec, ("key", "value", "internal unit", "source"), rows, "spec")
    _text(sec, "h3", "Friction range")
    _table(
        sec,
        ("μ_min", "μ (nominal)", "μ_max"),
        [(_Num(j.mu_min, fmt="g"), _Num(j.mu, fmt="g"), _Num(j.mu_max, fmt="g"))],
        "friction",
    )
    _text(
        sec,
        "p",
        "Torque rules at μ_min, self-locking against μ_max, strength rules over the envelope of "
        "μ_min, μ and μ_max in both drum directions.",
    )


def _method(body: ET.Element, j: Judgement) -> None:
    sec = _section(body, "method", "Method")
    nominal = j.nominal
    rows: list[Sequence[Cell]] = []
    for c in nominal.cases:
        for s in c.shoes:
            theory = (
                "short-shoe (resultant at the lining's middle)"
                if s.model.startswith("short")
                else "long-shoe (integrated pressure law)"
            )
            rows.append(
                (
                    str(c.direction),
                    s.name,
                    s.model,
                    theory,
                    _Num(s.contact_angle_deg, "°", ".3g"),
                    _Num(s.torque_Nm, "N·m"),
                    _Num(s.mu_equivalent, "", ".4g"),
                )
            )
    if rows:
        _text(sec, "h3", "Shoes")
        _table(
            sec,
            ("direction", "shoe", "model", "theory", "contact angle", "torque", "μ' (long-shoe correction)"),
            rows,
            "method-shoes",
        )
        short = [
            (str(c.direction), _Num(c.torque_Nm, "N·m"), _Num(c.short_shoe_torque_Nm, "N·m")) for c in nominal.cases
        ]
        _text(
            sec,
            "p",
            "Beside a long-shoe result, the braking torque of the same drawing with short-shoe theory on "
            "every shoe (– where every shoe is short).",
        )
        _table(sec, ("direction", "braking torque as solved", "short-shoe figure"), short, "short-shoe")
    if any(c.bands for c in nominal.cases):
        _text(sec, "h3", "Bands")
        _text(
            sec,
            "p",
            "Band law: T1/T2 = e^(μθ) over the angle of wrap θ, braking torque (T1 − T2)·r, "
            "peak pressure T1/(b·r) at the tight end.",
        )
    _text(sec, "h3", "Statics")
    _text(
        sec,
        "p",
        "Each drum direction is solved as a rigid-body equilibrium of every part with Coulomb friction at "
        "the linings (friction against the drum's motion); every solution is checked for part balance, pin "
        "balance and the drum's moment before it is reported.",
    )
    _text(sec, "h3", "References")
    ul = ET.SubElement(sec, "ul", {"class": "references"})
    for src in dict.fromkeys(r.source for r in j.rules if r.source):
        _text(ul, "li", src)


def free_body(
    mech: Mechanism, c: CaseSolution
) -> dict[str, list[tuple[str, tuple[float, float], tuple[float, float]]]]:
    """Every force on every part of case ``c``, from the result fields:
    (what, point of application [mm], force [N]) per part name; the same
    forces the solver's part-balance check sums."""
    out: dict[str, list[tuple[str, tuple[float, float], tuple[float, float]]]] = {p.name: [] for p in mech.parts}

    def add(part: str | None, what: str, at: tuple[float, float], f: tuple[float, float]) -> None:
        if part in out:
            out[part].append((what, at, f))

    for p in c.pins:
        for a in p.attachments:
            add(a.body, f"pin {p.name}", (p.x_mm, p.y_mm), (a.fx_N, a.fy_N))
    for s in c.shoes:
        add(s.part, f"drum on {s.name}: normal", s.normal_at_mm, s.normal_force_N)
        add(s.part, f"drum on {s.name}: friction", s.friction_at_mm, s.friction_force_N)
    for ld in c.loads:
        add(ld.part, f"load {ld.name}", (ld.x_mm, ld.y_mm), (ld.fx_N, ld.fy_N))
    for sp in c.springs:
        for e in sp.ends:
            add(e.part, f"spring {sp.name}", e.at_mm, e.force_N)
    for g in c.guides:
        (rod, on_rod), (part, on_part) = g.on_parts()
        add(rod, f"guide {g.name} ({part})", g.at_mm, on_rod)
        add(part, f"guide {g.name} ({rod})", g.at_mm, on_part)
    return out


def _direction(body: ET.Element, j: Judgement, c: CaseSolution, tb: TitleBlock) -> None:
    d = c.direction
    sec = _section(body, f"direction-{d}", f"Drum {d} at μ = {c.mu:g}")
    torque = c.braking_torque_Nm
    _table(sec, ("braking torque",), [(_Num(torque, "N·m"),)], f"torque torque-{d}")
    if torque is None:
        _text(sec, "p", f"Does not brake: {c.why_not_braking}")
    number = dict(tb.fields())["drawing number"]
    rev = dict(tb.fields())["revision"]
    title = (
        f"{number.value if number else Path(j.mechanism.drawing.path).name}"
        f" rev {rev.value if rev else '–'} · drum {d} · μ = {c.mu:g} · "
        f"T = {'no brake' if torque is None else format(torque, '.4g') + ' N·m'} · verdict {str(j.verdict).upper()}"
    )
    sec.append(svg_element(plan_figure(j.mechanism, c, title)))
    _free_bodies(sec, j.mechanism, c)
    _results(sec, c)


def _free_bodies(sec: ET.Element, mech: Mechanism, c: CaseSolution) -> None:
    _text(sec, "h3", "Free-body tables (forces on each part) and force polygons")
    _text(
        sec,
        "p",
        "Each part's forces as solved, numbered; beside them the same forces drawn tip to tail from the ring "
        "(a part in balance closes its polygon on the ring).  Below them its internal forces along the "
        "centreline at the solve's stations: the forces the part beyond each section (towards the segment's "
        "end) passes through it, axial N (tension +), shear V (along the segment turned 90° counter-clockwise) "
        "and bending moment M (counter-clockwise +, drawn up), segment by segment.",
    )
    for part, forces in free_body(mech, c).items():
        _text(sec, "h4", part)
        div = ET.SubElement(sec, "div", {"class": "part"})
        rows = [
            (
                str(k + 1),
                what,
                _Num(at[0], "mm", ".5g"),
                _Num(at[1], "mm", ".5g"),
                _Num(f[0], "N"),
                _Num(f[1], "N"),
                _Num(math.hypot(*f), "N"),
            )
            for k, (what, at, f) in enumerate(forces)
        ]
        _table(div, ("#", "force", "x", "y", "Fx", "Fy", "|F|"), rows, "free-body")
        if forces:
            div.append(force_polygon([(what, f) for what, _, f in forces]))
        _internal_forces(sec, part, next((d for d in c.parts if d.part == part), None))


def _internal_forces(sec: ET.Element, part: str, d: PartDiagram | None) -> None:
    """A part's stations (table) and bending moment diagram (SVG), as solved."""
    if d is None:
        return
    if not d.tree:
        _text(sec, "p", f"{part}: internal forces not given (its centreline closes a loop: statics does not fix them).")
        return
    if not d.stations:
        return
    div = ET.SubElement(sec, "div", {"class": "part internal"})
    rows = [
        (
            str(k + 1),
            f"s{st.segment}",
            _Num(st.at_mm[0], "mm", ".5g"),
            _Num(st.at_mm[1], "mm", ".5g"),
            _Num(st.axial_N, "N"),
            _Num(st.shear_N, "N"),
            _Num(st.moment_Nmm, "N·mm"),
        )
        for k, st in enumerate(d.stations)
    ]
    _table(div, ("#", "segment", "x", "y", "axial N", "shear V", "moment M"), rows, "stations")
    div.append(moment_diagram(part, d.stations))


def _results(sec: ET.Element, c: CaseSolution) -> None:
    rows: list[Sequence[Cell]] = []
    if c.shoes:
        _text(sec, "h3", "Shoes")
        rows = [
            (
                s.name,
                s.model,
                _Num(s.normal_N, "N"),
                _Num(s.friction_resultant_N, "N"),
                _Num(s.torque_Nm, "N·m"),
                _Num(s.peak_line_load_N_per_mm, "N/mm"),
            )
            for s in c.shoes
        ]
        _table(sec, ("shoe", "model", "normal", "friction", "torque", "peak line load"), rows, "shoes")
    if c.bands:
        _text(sec, "h3", "Bands")
        rows = [
            (
                b.name,
                b.kind,
                _Num(b.tight_N, "N"),
                _Num(b.slack_N, "N"),
                _Num(b.wrap_deg, "°", ".4g"),
                _Num(b.torque_Nm, "N·m"),
            )
            for b in c.bands
        ]
        _table(sec, ("band", "kind", "tight T1", "slack T2", "wrap", "torque"), rows, "bands")
    if c.springs:
        _text(sec, "h3", "Springs")
        _table(
            sec, ("spring", "force", "state"), [(s.name, _Num(s.force_N, "N"), s.state) for s in c.springs], "springs"
        )
    if c.members:
        _text(sec, "h3", "Two-force members")
        rows = [
            (m.name, f"{m.ends[0]}–{m.ends[1]}", _Num(m.axial_N, "N"), m.state, _Num(m.length_mm, "mm"))
            for m in c.members
        ]
        _table(sec, ("member", "pins", "axial force (tension +)", "state", "length"), rows, "members")
    _text(sec, "h3", "Pins")
    rows = [
        (p.name, "frame pivot" if p.grounded else "pin", ", ".join(p.parts), _Num(p.max_force_N, "N")) for p in c.pins
    ]
    _table(sec, ("pin", "kind", "parts", "largest force on a part"), rows, "pins")


def ordered_rules(rules: Sequence[RuleResult]) -> list[RuleResult]:
    """The rules in the order a checker reads them: the duty first, then the
    rest as judged."""
    duty = [r for r in rules if r.rule.startswith(DUTY_FIRST)]
    return duty + [r for r in rules if r not in duty]


def _rules(body: ET.Element, j: Judgement) -> None:
    sec = _section(body, "rules", "Rules")
    rows = [
        (
            f"verdict:{r.verdict}",
            r.rule,
            r.title,
            r.formula or "–",
            r.substituted or r.message or "–",
            _Num(r.value, r.unit, f".{figures(r.value, r.limit)}g"),
            _Num(r.limit, r.unit, f".{figures(r.value, r.limit)}g"),
            _Num(r.margin, "", ".3g"),
            r.source,
        )
        for r in ordered_rules(j.rules)
    ]
    _table(sec, ("verdict", "rule", "title", "formula", "values", "result", "limit", "margin", "source"), rows, "rules")
    notes = [(r.rule, r.message) for r in ordered_rules(j.rules) if r.message]
    if notes:
        _text(sec, "h3", "Notes")
        _table(sec, ("rule", "note"), notes, "rule-notes")


def _findings(body: ET.Element, j: Judgement) -> None:
    sec = _section(body, "findings", "Findings")
    fs = list(dict.fromkeys([*j.mechanism.findings, *j.nominal.findings]))
    if not fs:
        _text(sec, "p", "None.")
        return
    rows = [(f.code.id, str(f.severity), f.message, ", ".join(f.handles), ", ".join(f.layers)) for f in fs]
    _table(sec, ("code", "severity", "message", "handles", "layers"), rows, "findings")


def _signoff(body: ET.Element, s: Signoff) -> None:
    sec = _section(body, "signoff", "Sign-off")
    rows = [
        ("prepared", s.prepared_by, s.prepared_on, ""),
        ("checked", s.checked_by, s.checked_on, ""),
        ("approved", s.approved_by, s.approved_on, ""),
    ]
    _table(sec, ("", "name", "date", "signature"), rows, "signature")


def record_tree(
    j: Judgement,
    *,
    title_block: TitleBlock,
    sha256: str,
    checked_at: dt.datetime,
    signoff: Signoff = Signoff(),
) -> ET.Element:
    """The record as an ``<html>`` element tree (the HTML and the PDF are
    both laid out from it)."""
    html = ET.Element("html", {"lang": "en"})
    head = ET.SubElement(html, "head")
    ET.SubElement(head, "meta", {"charset": "utf-8"})
    _text(head, "title", f"dxfcheck calculation record: {Path(j.mechanism.drawing.path).name}")
    ET.SubElement(head, "style").text = _CSS
    body = ET.SubElement(html, "body")
    _text(body, "h1", f"Calculation record: {Path(j.mechanism.drawing.path).name}")
    _text(body, "p", CAUTION, **{"class": "caution"})
    _identity(body, j, title_block, sha256, checked_at)
    _verdict(body, j)
    _spec(body, j)
    _method(body, j)
    for c in j.nominal.cases:
        _direction(body, j, c, title_block)
    _rules(body, j)
    _findings(body, j)
    _signoff(body, signoff)
    sec = _section(body, "caution", "Caution")
    _text(sec, "p", CAUTION, **{"class": "caution"})
    return html


def record_html(html: ET.Element) -> str:
    """The record tree as one HTML document (text)."""
    return "<!DOCTYPE html>\n" + ET.tostring(html, encoding="unicode", method="html") + "\n"


def write_record(
    j: Judgement,
    out: str | os.PathLike[str],
    *,
    signoff: Signoff = Signoff(),
    force: bool = False,
    now: dt.datetime | None = None,
) -> Path:
    """Write the record of ``j`` to ``out`` atomically: PDF when ``out``
    ends in ``.pdf`` (:mod:`dxfcheck.output.record_pdf`, the ``pdf``
    extra), else HTML.  The input drawing is never written.

    Raises
    ------
    ConfigError
        When a PDF is asked for and fpdf2 is not installed.
    """
    source = j.mechanism.drawing.path
    tb = read_title_block(source, j.mechanism.drawing.custom_properties)
    when = now or dt.datetime.now(dt.UTC)
    tree = record_tree(
        j, title_block=tb, sha256=file_sha256(source) or "not readable", checked_at=when, signoff=signoff
    )
    if str(out).lower().endswith(".pdf"):
        return write_atomic(out, pdf_bytes(tree), force=force, protect=(source,))
    return write_atomic(out, record_html(tree), force=force, protect=(source,))


# --- a folder of records (batch --records) ----------------------------------------

#: Hex digits of the drawing path's hash in a record's file name.
NAME_HASH_CHARS = 10


def record_name(drawing: str | os.PathLike[str]) -> str:
    """The record's file name for a drawing in a folder of records: its stem
    and a hash of its absolute path (two drawings of one name in different
    folders get two records)."""
    p = Path(drawing)
    digest = hashlib.sha256(os.path.abspath(p).encode("utf-8", "surrogateescape")).hexdigest()
    return f"{p.stem}-{digest[:NAME_HASH_CHARS]}.html"


class BatchRow(Protocol):
    """What the index needs of one batch result (``batch.DrawingResult``)."""

    @property
    def drawing(self) -> str: ...
    @property
    def status(self) -> str: ...
    @property
    def torque_cw_Nm(self) -> float | None: ...
    @property
    def torque_ccw_Nm(self) -> float | None: ...
    @property
    def message(self) -> str: ...
    @property
    def cached(self) -> bool: ...


def write_index(results: Sequence[BatchRow], folder: str | os.PathLike[str]) -> Path:
    """Write ``index.html`` in ``folder``: every drawing of a batch with its
    status, torques and a link to its record (where one is in the folder)."""
    html = ET.Element("html", {"lang": "en"})
    head = ET.SubElement(html, "head")
    ET.SubElement(head, "meta", {"charset": "utf-8"})
    _text(head, "title", "dxfcheck calculation records")
    ET.SubElement(head, "style").text = _CSS
    body = ET.SubElement(html, "body")
    _text(body, "h1", "Calculation records")
    _text(body, "p", CAUTION, **{"class": "caution"})
    table = _table(body, ("drawing", "verdict", "torque cw", "torque ccw", "record", "note"), [], "index")
    tbody = table.find("tbody")
    assert tbody is not None
    for r in results:
        tr = ET.SubElement(tbody, "tr")
        _cell(tr, r.drawing)
        _cell(tr, f"verdict:{r.status}")
        _cell(tr, _Num(r.torque_cw_Nm, "N·m"))
        _cell(tr, _Num(r.torque_ccw_Nm, "N·m"))
        name = record_name(r.drawing)
        td = ET.SubElement(tr, "td")
        if (Path(folder) / name).is_file():
            _text(td, "a", name, href=name)
        else:
            td.text = "none (not checked in this run)" if r.cached else "none"
        _cell(tr, r.message)
    return write_atomic(Path(folder) / "index.html", record_html(html), force=True)
