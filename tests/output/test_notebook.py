"""The results in a notebook (``dxfcheck/output/notebook.py``) and the
example notebook ``drawings/brake_review.ipynb``, executed headless by nbclient
in a kernel of this interpreter, so that it stays true.

The scenario is the demo conveyor brake (``drawings/build.py``,
``conveyor_block``): one lever on a frame pivot O at (−260, 210) mm, a block
fixed to it touching the top of a drum of r = 150 mm at (0, 150), the set
weight P acting down at x = 520 mm.  Its torque is worked by hand with the
lever equation of a single-block brake, P·l = N·(x ∓ μa) (Khurmi & Gupta,
*Theory of Machines*, chapter on brakes; from memory), and T = μ·N·r
(Shigley's MED 10th ed., §16-2), with l = 520 + 260 = 780 mm the weight's arm
about O, x = 260 mm the normal force's arm and a = 210 − 150 = 60 mm the
friction's arm (the contact lies a below the line through O).  Which sign
belongs to which direction is the physics of our drawing: turning clockwise,
the drum's top moves to +x and drags the block that way (friction on a shoe
runs along the drum surface's motion, Shigley §16-2); that force, a below O,
turns the lever counter-clockwise about O, the way the drum's push N does,
against the weight: clockwise is the de-energised direction, N = P·l/(x + μa);
counter-clockwise the energised one, N = P·l/(x − μa).  The display, the
escaping and the formatter registry are the project's own conventions (no
published source).
"""

from __future__ import annotations

import os
import types
import xml.etree.ElementTree as ET
from html.parser import HTMLParser

import pytest
from common import ROOT, block_brake

import dxfcheck
from dxfcheck.output import notebook
from dxfcheck.output.text import CAUTION

NOTEBOOK = ROOT / "drawings" / "brake_review.ipynb"
#: The notebook's scenario (its spec and the two set weights) [N·m, -, N].
REQUIRED_NM, MU, WEIGHT_A_N, WEIGHT_B_N = 60.0, 0.35, 420.0, 380.0
#: The conveyor demo's lever [mm]: the weight's arm, the normal's, the friction's; the drum radius.
L_MM, X_MM, A_MM, R_MM = 780.0, 260.0, 60.0, 150.0
#: Relative tolerance on a torque read back from a cell's exact value [-].
TORQUE_RTOL = 1e-9
#: Seconds the whole notebook may take (it runs in about 3 s).
RUN_TIMEOUT_S = 180


def block_torque_Nm(p_N: float, mu: float, energised: bool) -> float:
    """T = μ·N·r with P·l = N·(x ∓ μa) (Khurmi & Gupta; Shigley §16-2), in N·m."""
    n = p_N * L_MM / (X_MM - mu * A_MM if energised else X_MM + mu * A_MM)
    return mu * n * R_MM / 1000.0


class _Display(HTMLParser):
    """What a test reads from a display: tables (class -> rows of (text,
    data-value)), each figure's arrows (data-ref -> x1, y1, x2, y2), the
    texts, the attributes, the span classes."""

    def __init__(self, html: str) -> None:
        super().__init__(convert_charrefs=True)
        self.tables: dict[str, list[list[tuple[str, float | None]]]] = {}
        self.figures: list[dict[str, tuple[float, ...]]] = []
        self.text: list[str] = []
        self.attrs: list[tuple[str, str, str | None]] = []
        self.spans: dict[str, str] = {}
        self._table: str | None = None
        self._cell: list[str] | None = None
        self._value: float | None = None
        self._ref: str | None = None
        self._span: str | None = None
        self.feed(html)

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.attrs += [(tag, k, v) for k, v in attrs]
        if tag == "table":
            self._table = a.get("class", "")
            self.tables[self._table] = []
        elif tag == "tr" and self._table is not None:
            self.tables[self._table].append([])
        elif tag in ("td", "th") and self._table is not None:
            self._cell, self._value = [], float(a["data-value"]) if "data-value" in a else None
        elif tag == "svg" and "figure" in a.get("class", ""):
            self.figures.append({})
        elif tag == "g" and "data-ref" in a:
            self._ref = a["data-ref"]
        elif tag == "line" and self._ref is not None:
            self.figures[-1][self._ref] = tuple(float(a[k]) for k in ("x1", "y1", "x2", "y2"))
            self._ref = None
        elif tag == "span" and "id" in a:
            self._span = a["id"]

    def handle_endtag(self, tag):
        if tag in ("td", "th") and self._cell is not None and self._table is not None:
            self.tables[self._table][-1].append(("".join(self._cell), self._value))
            self._cell = None
        elif tag == "table":
            self._table = None
        elif tag == "span":
            self._span = None

    def handle_data(self, data):
        self.text.append(data)
        if self._cell is not None:
            self._cell.append(data)
        if self._span is not None:
            self.spans[self._span] = self.spans.get(self._span, "") + data

    def rows(self, table: str) -> dict[str, list[tuple[str, float | None]]]:
        """Body rows by their first cell's text."""
        return {row[0][0]: row for row in self.tables[table][1:]}


@pytest.fixture(scope="module")
def executed():
    """The example notebook run top to bottom in a fresh kernel (this
    interpreter, with this checkout on its path), from ``drawings/``: the
    outputs of each code cell."""
    import nbclient
    import nbformat

    nb = nbformat.read(NOTEBOOK, as_version=4)
    saved = os.environ.get("PYTHONPATH")
    os.environ["PYTHONPATH"] = os.pathsep.join(p for p in (str(ROOT), saved) if p)  # the kernel imports this checkout
    try:
        client = nbclient.NotebookClient(
            nb, timeout=RUN_TIMEOUT_S, kernel_name="python3", resources={"metadata": {"path": str(NOTEBOOK.parent)}}
        )
        client.execute()
    finally:
        if saved is None:
            del os.environ["PYTHONPATH"]
        else:
            os.environ["PYTHONPATH"] = saved
    return [c.outputs for c in nb.cells if c.cell_type == "code"]


def _results(outputs, kind="execute_result"):
    return [o["data"] for o in outputs if o["output_type"] == kind]


def test_the_notebook_runs_without_errors_or_stored_outputs(executed):
    """The notebook never calls ``enable``: ``import dxfcheck`` inside the
    kernel registered the displays, so every result shows as HTML, SVG and
    one plain line, under the caution."""
    import nbformat

    stored = nbformat.read(NOTEBOOK, as_version=4)
    assert all(not c.get("outputs") for c in stored.cells if c.cell_type == "code")  # shipped clean
    assert not [o for outs in executed for o in outs if o["output_type"] == "error"]
    shown = [d for outs in executed for d in _results(outs)]
    assert len(shown) == 4  # solution, judgement A, judgement B, comparison
    for data in shown:
        assert {"text/html", "image/svg+xml", "text/plain"} <= set(data)
        assert "\n" not in data["text/plain"] and data["text/plain"].startswith("<dxfcheck ")
        assert CAUTION in _Display(data["text/html"]).text


def test_the_solution_shows_the_hand_torque_both_ways(executed):
    """The torque cells hold the lever equation's torques: clockwise the
    de-energised direction (smaller), counter-clockwise the energised one."""
    [data] = _results(executed[1])
    shown = _Display(data["text/html"])
    rows = shown.rows("torque")
    cw, ccw = rows["cw"][2][1], rows["ccw"][2][1]
    expect_cw = block_torque_Nm(WEIGHT_A_N, MU, energised=False)  # 420·780/(260 + 21) = 1165.8 N; T = 61.21 N·m
    expect_ccw = block_torque_Nm(WEIGHT_A_N, MU, energised=True)  # 420·780/(260 − 21) = 1370.7 N; T = 71.96 N·m
    assert cw == pytest.approx(expect_cw, rel=TORQUE_RTOL) and ccw == pytest.approx(expect_ccw, rel=TORQUE_RTOL)
    assert cw < ccw
    assert rows["cw"][2][0] == "61.21 N·m" and rows["ccw"][2][0] == "71.96 N·m"
    assert "cw 61.21 N·m, ccw 71.96 N·m" in data["text/plain"]


def test_the_pictures_draw_the_drag_the_way_the_drum_turns(executed):
    """In each direction's picture (x right, y down on the page) the drum's
    friction on the block runs along the top's motion, +x clockwise and −x
    counter-clockwise, and its normal force pushes the block up, off the
    drum (Shigley §16-2)."""
    [data] = _results(executed[1])
    figures = _Display(data["text/html"]).figures
    assert len(figures) == 2  # cw, ccw in the solution's order
    for arrows, sign in zip(figures, (+1, -1), strict=True):
        x1, y1, x2, y2 = arrows["shoe/block/friction"]
        assert sign * (x2 - x1) > 0 and abs(y2 - y1) < 1e-6 * abs(x2 - x1) + 0.02
        x1, y1, x2, y2 = arrows["shoe/block/normal"]
        assert y2 < y1 and abs(x2 - x1) < 0.02
    svg = ET.fromstring(data["image/svg+xml"])  # the picture alone: well-formed, both directions
    assert len([e for e in svg if e.tag.endswith("svg")]) == 2


def _rule(shown: _Display, rule: str) -> str:
    return next(row[0][0] for row in shown.tables["rules"][1:] if row[1][0] == rule)


def test_the_gate_passes_a_and_fails_b_on_the_clockwise_torque(executed):
    """A: 61.21 N·m ≥ 60 both ways, PASS.  B: the torque is linear in the
    weight (linear statics), T_B = T_A·380/420 = 55.38 N·m < 60 clockwise
    (FAIL), 65.11 N·m ≥ 60 counter-clockwise."""
    [a], [b] = _results(executed[2]), _results(executed[3])
    shown_a, shown_b = _Display(a["text/html"]), _Display(b["text/html"])
    assert shown_a.spans["verdict-value"] == "PASS" and "PASS" in a["text/plain"]
    assert shown_b.spans["verdict-value"] == "FAIL" and "FAIL" in b["text/plain"]
    assert _rule(shown_a, "torque.cw") == _rule(shown_a, "torque.ccw") == "PASS"
    assert (_rule(shown_b, "torque.cw"), _rule(shown_b, "torque.ccw")) == ("FAIL", "PASS")
    torque_b = shown_b.rows("")  # the verdict's torque table has no class
    cw_b = torque_b["cw"][1][1]
    assert cw_b == pytest.approx(block_torque_Nm(WEIGHT_B_N, MU, energised=False), rel=TORQUE_RTOL)
    assert cw_b == pytest.approx(block_torque_Nm(WEIGHT_A_N, MU, False) * WEIGHT_B_N / WEIGHT_A_N, rel=TORQUE_RTOL)
    assert cw_b < REQUIRED_NM < torque_b["ccw"][1][1]


def test_the_comparison_flags_the_torque_drop(executed):
    """The change of the clockwise torque, (380 − 420)/420 = −9.52 %, is past
    the default 5 % drop (``revision.compare.DEFAULT_MAX_TORQUE_DROP``): the
    step FAILs, the row is flagged and listed first with the verdict change."""
    [data] = _results(executed[4])
    shown = _Display(data["text/html"])
    assert shown.spans["comparison-value"] == "FAIL" and "FAIL" in data["text/plain"]
    rows = shown.tables["changes"][1:]
    torque = {row[3][0]: row for row in rows if row[1][0] == "torque"}
    expect_rel = 100 * (WEIGHT_B_N - WEIGHT_A_N) / WEIGHT_A_N
    assert torque["cw"][7][1] == pytest.approx(expect_rel, rel=1e-9) and torque["cw"][0][0] == "FAIL"
    assert torque["ccw"][7][1] == pytest.approx(expect_rel, rel=1e-9)
    assert rows[0][0][0] == "FAIL"  # crossings first
    trend = ET.fromstring(data["image/svg+xml"])
    desc = next(e.text for e in trend if e.tag.endswith("desc"))
    cw_a, cw_b = (block_torque_Nm(w, MU, False) for w in (WEIGHT_A_N, WEIGHT_B_N))
    assert f"torque cw: {cw_a:.6g}, {cw_b:.6g}" in desc and "required: 60, 60" in desc
    assert 'class="trend"><svg' in data["text/html"]  # the picture sits inline in the HTML too
    [svg_only] = _results(executed[5], "display_data")
    assert set(svg_only) == {"image/svg+xml"} and svg_only["image/svg+xml"] == data["image/svg+xml"]


#: Labels as a hostile or careless drawing may carry them: ESC and OSC
#: sequences, a bell, a bidirectional override, HTML that would run, < & >.
HOSTILE = {
    "O": "\x1b[31mO1<&>",
    "lever": '</td></table><script>alert("lever")</script>',
    "block": "blk\x1b]0;pwned\x07 \u202e<img src=x onerror=y> &amp;",
}
RAW_CONTROLS = ("\x1b", "\x07", "\u202e")


def test_hostile_labels_are_shown_not_obeyed(tmp_path):
    """Every display of a drawing whose labels carry markup and control
    characters: no raw control character, no element or attribute of the
    drawing's making, the SVG well-formed, the labels readable as text."""
    path = tmp_path / "hostile <b>.dxf"
    sk = block_brake(r=150, l=600, x=250, a=40, effort="650 N")
    sk.items = [("text", "label", HOSTILE[it[2]], it[3]) if it[:2] == ("text", "label") else it for it in sk.items]
    sk.save(path)
    sol = dxfcheck.analyse(path, mu=0.35)
    j = dxfcheck.check(path, spec={"mu": 0.35, "required_torque": (50, "N*m")})
    comp = dxfcheck.compare_judgements(j, j)
    pages = [notebook.solution_html(sol), notebook.judgement_html(j), notebook.comparison_html(comp)]
    pictures = [notebook.solution_svg(sol), notebook.judgement_svg(j), notebook.comparison_svg(comp)]
    for text in [*pages, *pictures]:
        assert not any(c in text for c in RAW_CONTROLS)
    for svg in pictures:  # XML escapes "<" everywhere, attribute values too
        assert "<script" not in svg and "<img" not in svg and "<b>" not in svg
        ET.fromstring(svg)
    # HTML keeps a "<" inside a quoted attribute value (a data-ref naming a
    # shoe), where it opens nothing: the parser shows what is markup.
    for html in pages:
        shown = _Display(html)
        assert not {"script", "img", "b", "iframe", "object"} & {tag for tag, _, _ in shown.attrs}
        assert not any(k.startswith("on") for _, k, _ in shown.attrs)
    joined = " ".join(_Display(pages[0]).text)
    assert "\\x1b[31mO1<&>" in joined and '<script>alert("lever")</script>' in joined
    assert "hostile <b>.dxf" in joined


def test_enable_registers_every_display_with_a_shell():
    """``enable`` puts the three displays of each result class into the
    shell's formatter registry (IPython's ``DisplayFormatter``); without a
    shell it registers nothing and says so."""
    from IPython.core.formatters import DisplayFormatter

    sol = dxfcheck.analyse(ROOT / "drawings" / "conveyor_block.dxf", mu=MU)
    shell = types.SimpleNamespace(display_formatter=DisplayFormatter())
    before, _ = shell.display_formatter.format(sol)
    assert set(before) == {"text/plain"} and len(before["text/plain"]) > 1000  # the dataclass repr
    assert notebook.enable(shell) is True
    data, _ = shell.display_formatter.format(sol)
    assert set(data) == {"text/plain", "text/html", "image/svg+xml"}
    assert data["text/html"] == notebook.solution_html(sol)
    assert (
        data["text/plain"]
        == notebook.summary(sol)
        == "<dxfcheck Solution of conveyor_block.dxf: cw 61.21 N·m, ccw 71.96 N·m>"
    )
    other = types.SimpleNamespace(display_formatter=DisplayFormatter())
    notebook.load_ipython_extension(other)  # %load_ext dxfcheck.output.notebook
    assert set(other.display_formatter.format(sol)[0]) == set(data)
    assert notebook.enable(None) is False  # no IPython shell runs in pytest
    cw = _Display(data["text/html"]).rows("torque")["cw"][2][1]
    assert cw == pytest.approx(block_torque_Nm(WEIGHT_A_N, MU, energised=False), rel=TORQUE_RTOL)


def test_the_readme_points_to_the_notebook():
    assert NOTEBOOK.is_file() and "drawings/brake_review.ipynb" in (ROOT / "README.md").read_text(encoding="utf-8")
