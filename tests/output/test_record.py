"""The calculation record: `dxfcheck check DRAWING --record OUT.html`.

The record's numbers are read back from the HTML and compared with the JSON
document of the same run; its pictures' arrows with the solver's vectors; its
free-body tables against equilibrium (every part's forces sum to zero and
their moments about any point too: equilibrium of a rigid body, Beer,
Johnston et al., *Vector Mechanics for Engineers: Statics*, 11th ed., ch. 4, from memory); the
friction on each shoe against Coulomb's law (the drum drags the lining the
way its surface moves: Shigley's MED 10th ed., §16-2, from memory).  The
structure tests (sections, escaping, no external resource, label boxes) check
the project's own conventions (no published source).
"""

from __future__ import annotations

import math
import re
import subprocess
import sys
from html.parser import HTMLParser
from pathlib import Path

import ezdxf
import pytest
from common import CATALOGUE, ROOT, TITLES, block_brake
from schema_check import output_json

from dxfcheck import cli
from dxfcheck.core.files import is_dxfcheck_output
from dxfcheck.output.figure import boxes_overlap, plan_figure, svg_element
from dxfcheck.output.record import SECTIONS
from dxfcheck.output.text import CAUTION
from dxfcheck.pipeline import analyse

DEMOS = sorted(p for p in (ROOT / "drawings").glob("*.dxf") if not is_dxfcheck_output(p))  # not a marked-up copy
#: Relative tolerance of a balance read back from the record's tables [-]
#: (the solver's own check is tighter; the cells keep the exact values).
BALANCE_RTOL = 1e-7
#: Largest angle between an arrow and the solver's vector [degrees] (the SVG
#: keeps two decimals of a px).
ARROW_ANGLE_DEG = 1.0


class _Record(HTMLParser):
    """What the tests read from a record: sections, tables (cells with text
    and data-value), force arrows, label boxes, every attribute."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.sections: list[str] = []
        self.tables: list[tuple[str, list[list[tuple[str, float | None]]]]] = []
        self.arrows: list[list[tuple[str, list[tuple[float, float, float, float]]]]] = []
        self.labels: list[list[tuple[float, float, float, float]]] = []
        self.attrs: list[tuple[str, str, str]] = []
        self.text: list[str] = []
        self._cell: list[str] | None = None
        self._value: float | None = None
        self._ref: str | None = None
        self._in_label = False
        self._figure = False
        self.polygons: list[dict] = []
        self.moments: list[dict] = []  # bending moment diagrams: zero line y, polylines (segment, points)
        self._svg = ""

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.attrs += [(tag, k, v or "") for k, v in attrs]
        if tag == "section":
            self.sections.append(a.get("id", ""))
        elif tag == "table":
            self.tables.append((a.get("class", ""), []))
        elif tag == "tr" and self.tables:
            self.tables[-1][1].append([])
        elif tag in ("td", "th"):
            self._cell, self._value = [], (float(a["data-value"]) if "data-value" in a else None)
        elif tag == "svg" and a.get("class") == "figure":
            self.arrows.append([])
            self.labels.append([])
            self._figure = True
        elif tag == "svg" and a.get("class") == "polygon":
            self._figure, self._svg = False, "polygon"
            self.polygons.append({"ring": None, "lines": []})
        elif tag == "svg" and a.get("class") == "moment":
            self._figure, self._svg = False, "moment"
            self.moments.append({"zero": None, "lines": []})
        elif self._svg == "moment" and tag == "line" and a.get("class") == "zero":
            self.moments[-1]["zero"] = float(a["y1"])
        elif self._svg == "moment" and tag == "polyline":
            pts = [tuple(float(v) for v in q.split(",")) for q in a["points"].split()]
            self.moments[-1]["lines"].append((int(a["data-segment"]), pts))
        elif tag == "circle" and self._svg == "polygon" and self.polygons[-1]["ring"] is None:
            self.polygons[-1]["ring"] = (float(a["cx"]), float(a["cy"]))
        elif tag == "line" and self._svg == "polygon":
            self.polygons[-1]["lines"].append(tuple(float(a[k]) for k in ("x1", "y1", "x2", "y2")))
        elif tag == "g" and a.get("class") == "force" and self._figure:
            self._ref = a["data-ref"]
        elif tag == "line" and self._ref is not None:
            self.arrows[-1].append((self._ref, [tuple(float(a[k]) for k in ("x1", "y1", "x2", "y2"))]))
        elif tag == "g" and a.get("class") == "label":
            self._in_label = True
        elif tag == "rect" and self._in_label:
            self.labels[-1].append(tuple(float(a[k]) for k in ("x", "y", "width", "height")))

    def handle_endtag(self, tag):
        if tag == "svg":
            self._svg = ""
        if tag in ("td", "th") and self._cell is not None and self.tables:
            self.tables[-1][1][-1].append(("".join(self._cell).strip(), self._value))
            self._cell = None
        elif tag == "g":
            self._ref = None
            self._in_label = False

    def handle_data(self, data):
        self.text.append(data)
        if self._cell is not None:
            self._cell.append(data)

    def table(self, cls: str) -> list[list[tuple[str, float | None]]]:
        return next(rows[1:] for c, rows in self.tables if cls in c.split())

    def all_tables(self, cls: str) -> list[list[list[tuple[str, float | None]]]]:
        return [rows[1:] for c, rows in self.tables if cls in c.split()]


def _read(path: Path) -> _Record:
    rec = _Record()
    rec.feed(path.read_text(encoding="utf-8"))
    rec.close()
    return rec


def _run_check(drawing: Path, record: Path, *extra: str) -> tuple[int, dict, str]:
    """The real command in a subprocess: the record and the JSON of one run."""
    proc = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "check", str(drawing), "--record", str(record), "--json", *extra],
        capture_output=True,
        text=True,
        timeout=300,
        cwd=ROOT,
    )
    assert proc.returncode in (0, 1), proc.stderr
    return proc.returncode, output_json(proc.stdout), proc.stderr


def _failing(tmp_path: Path) -> Path:
    """A single-block brake whose required torque is far above what it gives."""
    path = tmp_path / "weak_block.dxf"
    block_brake(r=150, l=600, x=250, a=40, effort="650 N").save(path)
    (tmp_path / "weak_block.toml").write_text(
        '[spec]\nrequired_torque = "5000 N*m"\nmu = 0.35\nmu_min = 0.3\nmu_max = 0.4\n', encoding="utf-8"
    )
    return path


def _self_locking(tmp_path: Path) -> Path:
    """A single-lever block brake, P·l = N(x ∓ μa): with x = 200 mm and
    |a| = 250 mm it self-locks in one direction once μ ≥ x/|a| = 0.8
    (Khurmi & Gupta, *Theory of Machines*, block brakes; from memory), so
    at μ = 0.9 one direction does not brake."""
    path = tmp_path / "locking_block.dxf"
    block_brake(r=200, l=500, x=200, a=-250, effort="1 kN").save(path)
    (tmp_path / "locking_block.toml").write_text(
        '[spec]\nrequired_torque = "100 N*m"\nmu = 0.9\nmu_min = 0.9\nmu_max = 0.9\n', encoding="utf-8"
    )
    return path


@pytest.fixture(scope="module")
def records(tmp_path_factory):
    """Every demo, a failing drawing and one that self-locks in one
    direction: (record, JSON, exit code, record path)."""
    tmp = tmp_path_factory.mktemp("records")
    out = {}
    for drawing in [*DEMOS, _failing(tmp), _self_locking(tmp)]:
        path = tmp / f"{drawing.stem}.html"
        rc, doc, _ = _run_check(drawing, path)
        out[drawing.stem] = (_read(path), doc, rc, path)
    return out


def _cases(doc):
    return {c["direction"]: c for c in doc["cases"]}


def test_every_section_is_there(records):
    assert set(records) >= {"winch_two_shoe", "conveyor_block", "capstan_band", "weak_block"}
    for name, (rec, doc, rc, path) in records.items():
        assert rec.sections == list(SECTIONS), name
        text = " ".join(rec.text)
        assert CAUTION in text
        identity = {row[0][0]: row[1][0] for row in rec.table("identity")}
        assert identity["file"] == f"{name}.dxf"
        import hashlib

        source = next(p for p in [*DEMOS, path.parent / f"{name}.dxf"] if p.stem == name)
        assert identity["SHA-256 of the file's bytes"] == hashlib.sha256(source.read_bytes()).hexdigest()
        assert identity["SHA-256 of the file's bytes"] == doc["drawing_sha256"]  # the JSON carries it too
        assert doc["run_at"].endswith("+00:00")
        assert identity["dxfcheck version"] == doc["tool"]["version"]
        for key in ("drawing number", "title", "revision", "date of the check"):
            assert key in identity
        if name in TITLES:  # the demos' title blocks (drawings/build.py)
            number, title, revision = TITLES[name]
            assert (identity["drawing number"], identity["title"], identity["revision"]) == (number, title, revision)
        verdict = [t for t in rec.text if t.strip().upper() in ("PASS", "WARN", "FAIL")]
        assert verdict and verdict[0].strip() == doc["verdict"].upper()
        assert (rc == 1) == (doc["verdict"] == "fail")
        signoff = [row[0][0] for row in rec.table("signature")]
        assert signoff == ["prepared", "checked", "approved"]
    assert records["weak_block"][1]["verdict"] == "fail"
    locking = records["locking_block"][1]
    assert [c["torque_Nm"] is None for c in locking["cases"]].count(True) == 1  # one direction does not brake
    assert "Does not brake: S304" in " ".join(records["locking_block"][0].text)


def test_numbers_equal_the_json(records):
    for name, (rec, doc, _, _) in records.items():
        cases = _cases(doc)
        for d in ("cw", "ccw"):
            [[(text, value)]] = rec.table(f"torque-{d}")
            assert value == cases[d]["torque_Nm"], (name, d, text)
        friction = rec.table("friction")[0]
        assert [v for _, v in friction] == [doc["friction"][k] for k in ("mu_min", "mu", "mu_max")]
        # the rules, duty first, with the JSON's value, limit and margin
        rows = rec.table("rules")
        by_rule = {r["rule"]: r for r in doc["rules"]}
        assert sorted(row[1][0] for row in rows) == sorted(by_rule)
        duty = [row[1][0].startswith(("torque.", "hoist.", "effort.")) for row in rows]
        assert duty == sorted(duty, reverse=True)  # the duty first
        for row in rows:
            r = by_rule[row[1][0]]
            assert row[0][0] == r["verdict"].upper()
            shown = [None if v is not None and math.isinf(v) else v for v in (row[5][1], row[6][1], row[7][1])]
            assert shown == [r["value"], r["limit"], r["margin"]], r["rule"]  # JSON writes infinity as null
            assert row[3][0] == (r["formula"] or "–")
        # shoes, bands, members per direction (the direction sections come in order cw, ccw)
        for k, d in enumerate(("cw", "ccw")):
            c = cases[d]
            if c["shoes"]:
                shoes = rec.all_tables("shoes")[k]
                assert [row[2][1] for row in shoes] == [s["normal_N"] for s in c["shoes"]]
                assert [row[4][1] for row in shoes] == [s["torque_Nm"] for s in c["shoes"]]
            if c["bands"]:
                bands = rec.all_tables("bands")[k]
                assert [(row[2][1], row[3][1]) for row in bands] == [(b["tight_N"], b["slack_N"]) for b in c["bands"]]
            if c["members"]:
                members = rec.all_tables("members")[k]
                assert [row[2][1] for row in members] == [m["axial_N"] for m in c["members"]]


def _free_bodies(rec: _Record, part_names: list[str]) -> list[dict[str, list]]:
    """Per direction, part -> rows of (force, x, y, fx, fy)."""
    tables = rec.all_tables("free-body")
    n = len(part_names)
    assert len(tables) % n == 0
    out = []
    for k in range(len(tables) // n):
        chunk = tables[k * n : (k + 1) * n]
        out.append(
            {
                p: [(row[1][0], row[2][1], row[3][1], row[4][1], row[5][1]) for row in rows]
                for p, rows in zip(part_names, chunk, strict=True)
            }
        )
    return out


def test_free_body_tables_balance_and_match_the_json(records):
    """Each part's forces, read back from the record, sum to zero in x, y
    and moment about the origin (a rigid body at rest); the pin rows equal
    the JSON's force of the pin on that part, the shoe rows its normal and
    friction vectors."""
    for name, (rec, doc, _, _) in records.items():
        parts = [p["name"] for p in doc["mechanism"]["parts"]]
        for fb, d in zip(_free_bodies(rec, parts), ("cw", "ccw"), strict=True):
            c = _cases(doc)[d]
            if c["torque_Nm"] is None:
                continue
            scale = max(abs(v) for rows in fb.values() for row in rows for v in row[3:])
            for part, rows in fb.items():
                fx = sum(r[3] for r in rows)
                fy = sum(r[4] for r in rows)
                mz = sum(r[1] * r[4] - r[2] * r[3] for r in rows)
                assert abs(fx) <= BALANCE_RTOL * scale and abs(fy) <= BALANCE_RTOL * scale, (name, d, part)
                assert abs(mz) <= BALANCE_RTOL * scale * 1e4, (name, d, part, mz)
                for p in c["pins"]:
                    for on in p["on_parts"]:
                        if on["part"] == part:
                            assert (f"pin {p['name']}", p["x_mm"], p["y_mm"], on["fx_N"], on["fy_N"]) in rows
                for s in c["shoes"]:
                    if s["part"] == part:
                        normal = (f"drum on {s['name']}: normal", *s["normal_at_mm"], *s["normal_force_N"])
                        assert normal in rows


def test_force_polygons_close_and_follow_the_forces(records):
    """Each part's force polygon (drawn from the solved vectors, tip to
    tail) ends on its starting ring, since the part is in balance, and its
    sides point the way the free-body table's forces point."""
    for name, (rec, doc, _, _) in records.items():
        parts = [p["name"] for p in doc["mechanism"]["parts"]]
        tables = [rows for fb in _free_bodies(rec, parts) for rows in fb.values() if rows]
        assert len(rec.polygons) == len(tables), name
        for poly, rows in zip(rec.polygons, tables, strict=True):
            lines = poly["lines"]
            nonzero = [r for r in rows if math.hypot(r[3], r[4]) > 0]
            assert len(lines) == len(nonzero), (name, rows)
            for (x1, y1, x2, y2), r in zip(lines, nonzero, strict=True):
                assert _angle_deg((x2 - x1, -(y2 - y1)), (r[3], r[4])) < ARROW_ANGLE_DEG, (name, r)
            end = (lines[-1][2], lines[-1][3])
            assert math.dist(end, poly["ring"]) < 0.05, (name, end, poly["ring"])  # px, of a 170 px drawing


def test_internal_forces_equal_the_json_and_are_drawn_their_way(records):
    """Each part's stations in the record (table) are the JSON's per-case
    ``parts`` stations, number for number (at_mm, axial_N, shear_N,
    moment_Nmm); its bending moment diagram plots each station's moment up
    when counter-clockwise positive, at one scale for the whole part
    (zero line - y = k·M with one k > 0), the stations of a segment left to
    right in their order along it."""
    checked = 0
    for name, (rec, doc, _, _) in records.items():
        tables, moments = rec.all_tables("stations"), rec.moments
        want = [d for c in sorted(doc["cases"], key=lambda c: ("cw", "ccw").index(c["direction"])) for d in c["parts"]]
        drawn = [d for d in want if d["tree"] and d["stations"]]
        assert len(tables) == len(moments) == len(drawn), name
        for d, rows, diagram in zip(drawn, tables, moments, strict=True):
            got = [(row[2][1], row[3][1], row[4][1], row[5][1], row[6][1]) for row in rows]
            assert got == [(*s["at_mm"], s["axial_N"], s["shear_N"], s["moment_Nmm"]) for s in d["stations"]], name
            assert [row[1][0] for row in rows] == [f"s{s['segment']}" for s in d["stations"]]
            plotted = [(seg, p) for seg, pts in diagram["lines"] for p in pts]
            assert [seg for seg, _ in plotted] == [s["segment"] for s in d["stations"]]
            heights = [diagram["zero"] - p[1] for _, p in plotted]
            ms = [s["moment_Nmm"] for s in d["stations"]]
            big = max(range(len(ms)), key=lambda i: abs(ms[i]))
            if ms[big] == 0:
                assert all(abs(h) < 0.01 for h in heights)
                continue
            k = heights[big] / ms[big]
            assert k > 0, (name, d["part"])  # counter-clockwise (positive) moments are drawn up
            for h, m in zip(heights, ms, strict=True):
                assert abs(h - k * m) <= 0.02, (name, d["part"], h, m)  # the SVG keeps two decimals of a px
            for _, pts in diagram["lines"]:
                xs = [p[0] for p in pts]
                assert xs == sorted(xs)
            checked += 1
    assert checked >= 10


def test_block_lever_moment_in_the_record(tmp_path):
    """A single-lever block brake with the lever through the contact point
    (a = 0): the effort P at arm l from the pivot O, the drum's normal and
    friction at arm x.  The part of the lever beyond the contact carries only
    P, so the largest bending moment in the lever is at the contact,
    |M| = P·(l − x) (method of sections, Beer & Johnston, *Vector Mechanics
    for Engineers: Statics*, 11th ed., ch. 7): 1000 N × (500 − 200) mm =
    300 000 N·mm.  Its sign: P pushes down on the far end, to the right of
    the section, so it turns clockwise about it: M < 0 (counter-clockwise
    positive), drawn below the zero line."""
    path = tmp_path / "block0.dxf"
    block_brake(r=200, l=500, x=200, a=0, effort="1 kN").save(path)
    out = tmp_path / "block0.html"
    _run_check(path, out)
    rec = _read(out)
    lever = [
        (rows, diagram)
        for rows, diagram in zip(rec.all_tables("stations"), rec.moments, strict=True)
        if any(abs(abs(row[6][1]) - 1000 * (500 - 200)) < 1e-6 * 3e5 for row in rows)
    ]
    assert len(lever) == 2  # cw and ccw: the effort is the same, so is the lever's moment there
    for rows, diagram in lever:
        worst = max(rows, key=lambda row: abs(row[6][1]))
        assert worst[6][1] == pytest.approx(-1000 * (500 - 200), rel=1e-9)
        assert worst[4][1] == pytest.approx(0.0, abs=1e-6)  # the effort is across the lever: no axial force
        assert max(diagram["zero"] - p[1] for _, pts in diagram["lines"] for p in pts) <= 0.01  # drawn below


def _arrow_vectors(c: dict) -> dict[str, tuple[float, float]]:
    """The solver's vector of every arrow ref, from the JSON."""
    out = {}
    for s in c["shoes"]:
        out[f"shoe/{s['name']}/normal"] = tuple(s["normal_force_N"])
        out[f"shoe/{s['name']}/friction"] = tuple(s["friction_force_N"])
    for p in c["pins"]:
        out[f"pin/{p['name']}"] = (p["fx_N"], p["fy_N"])
    for ld in c["loads"]:
        out[f"load/{ld['name']}"] = (ld["fx_N"], ld["fy_N"])
    for sp in c["springs"]:
        for i, e in enumerate(sp["ends"]):
            out[f"spring/{sp['name']}/{i}"] = tuple(e["force_N"])
    for b in c["bands"]:
        for i, e in enumerate(b["ends"]):
            out[f"band/{b['name']}/{i}"] = tuple(e["pull_N"])
    return {k: v for k, v in out.items() if math.hypot(*v) > 0}


def _angle_deg(u, v) -> float:
    cross = u[0] * v[1] - u[1] * v[0]
    dot = u[0] * v[0] + u[1] * v[1]
    return abs(math.degrees(math.atan2(cross, dot)))


def test_arrows_point_the_way_the_solver_vectors_point(records):
    """Every nonzero force of the JSON has one arrow in its direction's
    picture, pointing its way (positive dot product, within 1°; the SVG's y
    runs down)."""
    for name, (rec, doc, _, _) in records.items():
        for svg_arrows, d in zip(rec.arrows, ("cw", "ccw"), strict=True):
            want = _arrow_vectors(_cases(doc)[d])
            got = {ref: lines[0] for ref, lines in svg_arrows}
            assert set(got) == set(want), (name, d)
            for ref, (x1, y1, x2, y2) in got.items():
                drawn = (x2 - x1, -(y2 - y1))
                f = want[ref]
                assert drawn[0] * f[0] + drawn[1] * f[1] > 0, (name, d, ref)
                assert _angle_deg(drawn, f) < ARROW_ANGLE_DEG, (name, d, ref, drawn, f)


def test_friction_on_each_shoe_follows_the_drum_surface(records):
    """Coulomb: the drum drags each lining the way its surface moves, so the
    friction on the shoe has a positive dot product with the surface velocity
    ω × r at its point (ω = -k for cw, +k for ccw).  Read from the picture."""
    for name, (rec, doc, _, _) in records.items():
        drum = doc["mechanism"]["drum"]
        for svg_arrows, d in zip(rec.arrows, ("cw", "ccw"), strict=True):
            c = _cases(doc)[d]
            if c["torque_Nm"] is None:  # no brake (self-locks: the normal force would have to pull)
                continue
            for s in c["shoes"]:
                [(x1, y1, x2, y2)] = [lines[0] for ref, lines in svg_arrows if ref == f"shoe/{s['name']}/friction"]
                rx, ry = s["friction_at_mm"][0] - drum["x_mm"], s["friction_at_mm"][1] - drum["y_mm"]
                w = -1.0 if d == "cw" else 1.0
                surface = (-w * ry, w * rx)
                assert (x2 - x1) * surface[0] + (-(y2 - y1)) * surface[1] > 0, (name, d, s["name"])


def test_label_boxes_never_overlap_on_every_drawing(tmp_path):
    """Every drawing of the catalogue and the demos, both directions: no two
    label boxes of a picture overlap."""
    for name, (build, mu) in CATALOGUE.items():
        path = tmp_path / f"{len(list(tmp_path.iterdir()))}.dxf"
        build().save(path)
        sol = analyse(path, mu=mu)
        for c in sol.cases:
            fig = plan_figure(sol.mechanism, c, name)
            boxes = [b for _, _, b, _ in fig.labels]
            assert len(boxes) >= len(fig.arrows)
            for i, a in enumerate(boxes):
                for b in boxes[i + 1 :]:
                    assert not boxes_overlap(a, b), (name, c.direction, a, b)
            svg_element(fig)  # serialises


#: Two arrows closer than this at the tail [px] and this in direction
#: [degrees] would be drawn over each other (an arrow's stroke is 2.2 px).
SAME_TAIL_PX = 5.0
SAME_WAY_DEG = 3.0


def _heading_deg(tail, tip) -> float:
    return math.degrees(math.atan2(tip[1] - tail[1], tip[0] - tail[0]))


def test_no_two_arrows_coincide_on_every_drawing(tmp_path):
    """Every drawing of the catalogue, both directions: no two arrows of a
    picture start at one place the same way (at a band's pin the band's
    pull and the pin's force are equal vectors at one point, so one is
    drawn from the point and the other onto it).  Each arrow still points
    along its solver vector (the picture's y runs down), keeps its length,
    and its line runs through its point of application: the tail there
    (drawn from) or the head (drawn onto).  The points of application are
    the model's points under one similarity (px = s·(x, -y) + offset, the
    same s for every arrow), and a pin's arrow starts or ends on the pin's
    circle."""
    staggered = 0
    for name, (build, mu) in CATALOGUE.items():
        path = tmp_path / f"{len(list(tmp_path.iterdir()))}.dxf"
        build().save(path)
        sol = analyse(path, mu=mu)
        for c in sol.cases:
            fig = plan_figure(sol.mechanism, c, name)
            arrows = fig.arrows
            for i, (a, ta, pa) in enumerate(arrows):
                for b, tb, pb in arrows[i + 1 :]:
                    same_way = abs(math.remainder(_heading_deg(ta, pa) - _heading_deg(tb, pb), 360.0)) < SAME_WAY_DEG
                    assert not (math.dist(ta, tb) < SAME_TAIL_PX and same_way), (name, c.direction, a.ref, b.ref)
            at0_mm, (at0_px, _) = arrows[0][0].at_mm, fig.applied[0]
            scales = []
            for (a, tail, tip), (at_px, how) in zip(arrows, fig.applied, strict=True):
                drawn = (tip[0] - tail[0], -(tip[1] - tail[1]))
                assert _angle_deg(drawn, a.force_N) < ARROW_ANGLE_DEG, (name, a.ref)
                assert drawn[0] * a.force_N[0] + drawn[1] * a.force_N[1] > 0
                assert how in ("from", "onto"), (name, a.ref)  # no drawing has three at one point
                on = tail if how == "from" else tip
                assert math.dist(on, at_px) < 1e-9, (name, a.ref, how)
                staggered += how == "onto"
                dmm = (a.at_mm[0] - at0_mm[0], a.at_mm[1] - at0_mm[1])
                dpx = (at_px[0] - at0_px[0], -(at_px[1] - at0_px[1]))
                if math.hypot(*dmm) > 1.0:
                    scales.append((dpx[0] / math.hypot(*dmm), dpx[1] / math.hypot(*dmm), dmm))
                if a.ref.startswith("pin/"):
                    pin = next(p for p in sol.mechanism.pins if p.name == a.ref[4:])
                    assert math.dist(pin.center, a.at_mm) < 1e-9
            s = [math.hypot(sx, sy) for sx, sy, _ in scales]
            assert max(s) - min(s) < 1e-6 * max(s), name
            for sx, sy, dmm in scales:  # the same direction in px as in mm
                n = math.hypot(*dmm)
                assert abs(sx - s[0] * dmm[0] / n) < 1e-6 * s[0] and abs(sy - s[0] * dmm[1] / n) < 1e-6 * s[0]
    assert staggered >= 6  # the three band brakes, both directions: pin A (and C on the differential band)


def test_stagger_keeps_each_arrow_on_its_line():
    """Four equal vectors at one point: drawn from it, onto it, then beside
    the pair on alternate sides (STAGGER_PX apart), none over another, each
    with the vector's direction and length."""
    from dxfcheck.output.figure import STAGGER_PX, Arrow, stagger

    arrow = Arrow("pin/A", "A", (0.0, 0.0), (3.0, 4.0), 50.0, False)
    tail, tip = (100.0, 100.0), (130.0, 60.0)  # px, y down: the vector (3, 4) up and right
    out, applied = stagger([(arrow, tail, tip)] * 4 + [(arrow, tail, (70.0, 140.0))])
    assert [how for _, how in applied] == ["from", "onto", "beside", "beside", "from"]  # the last points the other way
    assert all(at == tail for at, _ in applied)
    for _, t, p in out:
        assert math.dist(t, p) == pytest.approx(50.0)
        assert _angle_deg((p[0] - t[0], -(p[1] - t[1])), (3.0, 4.0)) < 1e-9 or t == tail
    (_, t0, _), (_, t1, p1), (_, t2, _), (_, t3, p3) = out[:4]
    assert t0 == tail and p1 == pytest.approx(tail) and t1 == pytest.approx((70.0, 140.0))
    u = (0.6, -0.8)  # the unit direction in px

    def side(q):  # signed distance of q from the line through the point
        return (q[0] - tail[0]) * -u[1] + (q[1] - tail[1]) * u[0]

    assert side(t2) == pytest.approx(STAGGER_PX) and side(t3) == pytest.approx(-STAGGER_PX)
    assert math.dist(p3, tail) == pytest.approx(STAGGER_PX)  # the fourth pushes: its head beside the point
    for i, (_, a, b) in enumerate(out):
        for _, c, d in out[i + 1 :]:
            assert (a, b) != (c, d)


def test_record_label_boxes_do_not_overlap(records):
    for name, (rec, *_) in records.items():
        for boxes in rec.labels:
            assert boxes
            for i, a in enumerate(boxes):
                for b in boxes[i + 1 :]:
                    assert not boxes_overlap(a, b), (name, a, b)


EXTERNAL = re.compile(r"^\s*(https?:|//|ftp:|file:)", re.I)


def test_no_external_resource(records):
    for name, (rec, _, _, path) in records.items():
        for tag, key, value in rec.attrs:
            if key in ("src", "href", "xlink:href", "action", "data", "poster"):
                assert not EXTERNAL.match(value), (name, tag, key, value)
        text = path.read_text(encoding="utf-8")
        assert "@import" not in text and not re.search(r"url\(", text), name
        assert "<script" not in text.lower() and "<link" not in text.lower() and "<img" not in text.lower()


HOSTILE = {
    "O": "\x1b[31mO1<&>",
    "lever": "[/]lev\x07er [bold red]x",
    "block": "blk\x1b]0;pwned\x07 \u202e:warning: &amp;",
}
RAW_CONTROLS = ("\x1b", "\x07", "\u202e")


def _with_title_block(path: Path, attribs: dict[str, str], properties: dict[str, str] | None = None) -> None:
    doc = ezdxf.readfile(path)
    block = doc.blocks.new("TITLEBLOCK")
    for k, tag in enumerate(attribs):
        block.add_attdef(tag, (0, -20 * k), dxfattribs={"height": 5})
    ref = doc.modelspace().add_blockref("TITLEBLOCK", (0, -900), dxfattribs={"layer": "TITLE"})
    ref.add_auto_attribs(attribs)
    for k, v in (properties or {}).items():
        doc.header.custom_vars.append(k, v)
    doc.saveas(path)


def test_hostile_texts_are_escaped(tmp_path, capsys):
    """Labels with ESC sequences, a bell, a bidi override, rich markup and
    < & >, and a title block whose fields carry a script tag: the record is
    well-formed, nothing in it is markup of the drawing's making, no raw
    control character, the texts readable."""
    path = tmp_path / "hostile.dxf"
    sk = block_brake(r=150, l=600, x=250, a=40, effort="650 N")
    sk.items = [("text", "label", HOSTILE[it[2]], it[3]) if it[:2] == ("text", "label") else it for it in sk.items]
    sk.save(path)
    _with_title_block(path, {"DWG_NO": "<script>alert(1)</script>", "TITLE": 'x" onload="y', "REV": "\x1b[2JB"})
    out = tmp_path / "hostile.html"
    rc = cli.main(["check", str(path), "--record", str(out), "--signoff", "checked_by=<b>me</b>"])
    capsys.readouterr()
    assert rc in (0, 1)
    text = out.read_text(encoding="utf-8")
    assert not any(c in text for c in RAW_CONTROLS)
    assert "<script" not in text and "<b>me" not in text
    rec = _read(out)
    assert not any(key.startswith("on") for _, key, _ in rec.attrs)  # the quote did not open an attribute
    joined = " ".join(rec.text)
    assert "<script>alert(1)</script>" in joined  # shown as text
    assert "\\x1b[31mO1<&>" in joined and "<b>me</b>" in joined
    identity = {row[0][0]: (row[1][0], row[2][0]) for row in rec.table("identity")}
    assert identity["revision"][0] == "\\x1b[2JB"
    assert identity["drawing number"][1].startswith("block attribute: block TITLEBLOCK, tag DWG_NO")


def test_title_block_from_custom_properties(tmp_path, capsys):
    """Without block attributes the header's custom properties give the
    identity, and the record says so; a block attribute wins over one."""
    path = tmp_path / "props.dxf"
    block_brake(r=150, l=600, x=250, a=40, effort="650 N").save(path)
    doc = ezdxf.readfile(path)
    doc.header.custom_vars.append("Drawing No", "TQ-X1-BR-001")
    doc.header.custom_vars.append("Revision", "C")
    doc.saveas(path)
    out = tmp_path / "props.html"
    assert cli.main(["check", str(path), "--record", str(out)]) in (0, 1)
    identity = {row[0][0]: (row[1][0], row[2][0]) for row in _read(out).table("identity")}
    assert identity["drawing number"] == ("TQ-X1-BR-001", "custom property: header custom property Drawing No")
    assert identity["revision"][0] == "C" and identity["title"][0] == "not found"
    _with_title_block(path, {"REVISION": "D"})
    assert cli.main(["check", str(path), "--record", str(out), "--force"]) in (0, 1)
    identity = {row[0][0]: (row[1][0], row[2][0]) for row in _read(out).table("identity")}
    assert identity["revision"][0] == "D" and identity["revision"][1].startswith("block attribute")
    assert identity["drawing number"][0] == "TQ-X1-BR-001"
    capsys.readouterr()


def test_record_refuses_to_overwrite(tmp_path, capsys):
    """An existing record needs --force; the drawing itself is never a target."""
    path = tmp_path / "b.dxf"
    block_brake(r=150, l=600, x=250, a=40, effort="650 N").save(path)
    before = path.read_bytes()
    out = tmp_path / "b.html"
    out.write_text("keep", encoding="utf-8")
    assert cli.main(["check", str(path), "--record", str(out)]) == 2
    assert out.read_text(encoding="utf-8") == "keep"
    assert cli.main(["check", str(path), "--record", str(path), "--force"]) == 2
    assert path.read_bytes() == before
    assert cli.main(["check", str(path), "--record", str(out), "--signoff", "nobody=1"]) == 2
    capsys.readouterr()


# --- the PDF and the rendered HTML -------------------------------------------------------------


def _figures(doc) -> list[str]:
    """Texts the printed record must show: each braking torque (as the
    record prints it, 4 significant figures), each rule's id, the caution."""
    out = [f"{c['torque_Nm']:.4g} N·m" for c in doc["cases"] if c["torque_Nm"] is not None]
    return out + [r["rule"] for r in doc["rules"]]


def _squash(text: str) -> str:
    """Extracted PDF text without line breaks and spaces (a table cell may
    wrap anywhere; the browser's font sets "ff", "fi" as ligatures)."""
    import unicodedata

    return re.sub(r"\s+", "", unicodedata.normalize("NFKC", text))


def test_pdf_record_holds_the_same_figures(tmp_path):
    """`--record OUT.pdf`: the PDF's text (extracted with pypdf) holds every
    section heading, the torques, every rule with its verdict and the caution."""
    pypdf = pytest.importorskip("pypdf")
    pytest.importorskip("fpdf")
    drawing = ROOT / "drawings" / "winch_two_shoe.dxf"
    out = tmp_path / "winch.pdf"
    _, doc, _ = _run_check(drawing, out)
    reader = pypdf.PdfReader(out)
    text = _squash(" ".join(page.extract_text() for page in reader.pages))
    for heading in ("Drawing", "Verdict", "Spec", "Method", "Drumcwat", "Drumccwat", "Rules", "Findings", "Sign-off"):
        assert heading in text, heading
    for figure in _figures(doc):
        assert _squash(figure) in text, figure
    for r in doc["rules"]:
        assert _squash(f"{r['verdict'].upper()}{r['rule']}") in text, r["rule"]
    assert _squash(CAUTION) in text
    assert hashlib_of(drawing) in text


def hashlib_of(path: Path) -> str:
    import hashlib

    return hashlib.sha256(path.read_bytes()).hexdigest()


def _browser() -> str | None:
    import shutil

    return next((b for b in ("chromium", "chromium-headless-shell", "chromium-browser") if shutil.which(b)), None)


class _Proxy:
    """A proxy that only counts the connections made to it: the browser is
    told to send every web request through it, so any request the record
    makes shows up here."""

    def __enter__(self):
        import socket
        import threading

        self.count = 0
        self.sock = socket.socket()
        self.sock.bind(("127.0.0.1", 0))
        self.sock.listen(8)
        self.sock.settimeout(0.2)
        self.done = False

        def serve():
            while not self.done:
                try:
                    conn, _ = self.sock.accept()
                except OSError:
                    continue
                self.count += 1
                conn.close()

        self.thread = threading.Thread(target=serve, daemon=True)
        self.thread.start()
        return self

    @property
    def port(self) -> int:
        return self.sock.getsockname()[1]

    def __exit__(self, *exc):
        self.done = True
        self.thread.join(timeout=5)
        self.sock.close()


def _print(browser: str, port: int, page: Path, pdf: Path) -> subprocess.CompletedProcess:
    return subprocess.run(
        [
            browser,
            "--headless",
            "--no-sandbox",
            "--disable-gpu",
            f"--proxy-server=http://127.0.0.1:{port}",
            "--proxy-bypass-list=<-loopback>",
            "--no-pdf-header-footer",
            f"--print-to-pdf={pdf}",
            page.as_uri(),
        ],
        capture_output=True,
        text=True,
        timeout=120,
    )


def test_record_in_a_real_browser(records, tmp_path):
    """The HTML record printed by headless Chromium (Debian's package, as
    .ci/run installs it): the rendered text holds every section, the torques,
    each rule's verdict and the caution; the browser made no request while
    loading it."""
    browser = _browser()
    if browser is None:
        pytest.skip("no headless Chromium on this machine (.ci/run installs chromium-headless-shell)")
    pypdf = pytest.importorskip("pypdf")
    _, doc, _, path = records["winch_two_shoe"]
    pdf = tmp_path / "printed.pdf"
    control = tmp_path / "control.html"  # shows that a request would be seen
    control.write_text('<html><body><img src="http://example.invalid/x.png">x</body></html>', encoding="utf-8")
    for page, want in ((control, True), (path, False)):
        with _Proxy() as proxy:
            proc = _print(browser, proxy.port, page, pdf)
        assert proc.returncode == 0 and pdf.is_file(), proc.stderr[-2000:]
        assert (proxy.count > 0) is want, page
    pages = pypdf.PdfReader(pdf).pages
    text = _squash(" ".join(p.extract_text() for p in pages))
    assert len(pages) >= len(SECTIONS) - 1  # a page per section from the spec on (print style sheet)
    for figure in _figures(doc):
        assert _squash(figure) in text, figure
    for r in doc["rules"]:
        assert _squash(f"{r['verdict'].upper()}{r['rule']}") in text, r["rule"]
    assert _squash(CAUTION) in text


def test_pdf_without_dejavu_spells_symbols_in_ascii(tmp_path, monkeypatch):
    """Where no DejaVu Sans is found the PDF is set in Helvetica, with μ, ·,
    ° and Ø spelt in ASCII instead of failing on them."""
    pypdf = pytest.importorskip("pypdf")
    pytest.importorskip("fpdf")
    from dxfcheck.output import record_pdf
    from dxfcheck.output.record import write_record
    from dxfcheck.pipeline import check

    monkeypatch.setattr(record_pdf, "_font_path", lambda: None)
    j = check(ROOT / "drawings" / "conveyor_block.dxf")
    out = write_record(j, tmp_path / "ascii.pdf")
    text = " ".join(p.extract_text() for p in pypdf.PdfReader(out).pages)
    assert "Drum cw at mu = 0.35" in text and "μ" not in text
    assert _squash(CAUTION) in _squash(text)


def test_batch_writes_a_record_per_drawing_and_an_index(tmp_path):
    """`batch --records DIR`: one record per drawing checked and an index page
    linking each (local links only); a rerun from the cache keeps them."""
    import shutil

    demos = tmp_path / "demos"
    demos.mkdir()
    for p in [*DEMOS, ROOT / "drawings" / "dxfcheck.toml"]:
        shutil.copy(p, demos / p.name)
    out = tmp_path / "records"
    cmd = [sys.executable, "-m", "dxfcheck", "batch", str(demos), "--records", str(out), "--jobs", "1", "--json"]
    cmd += ["--cache-dir", str(tmp_path / "cache")]
    for _ in range(2):  # checked, then from the cache
        proc = subprocess.run(cmd, capture_output=True, text=True, timeout=300, cwd=ROOT)
        assert proc.returncode == 1, proc.stderr  # the winch fails its gate
        results = output_json(proc.stdout)["results"]
        index = _read(out / "index.html")
        links = [v for tag, key, v in index.attrs if tag == "a" and key == "href"]
        assert len(links) == len(DEMOS) == len(results)
        rows = {row[0][0]: row for row in index.table("index")}
        for r in results:
            assert rows[r["drawing"]][1][0] == r["status"].upper()
            assert rows[r["drawing"]][2][1] == r["torque_cw_Nm"]
        for link in links:
            assert "/" not in link and (out / link).is_file()
            assert _read(out / link).sections == list(SECTIONS)
    assert all(r["cached"] for r in results)
