"""The marked-up drawing and the picture: `dxfcheck annotate`."""

from __future__ import annotations

import hashlib
import math
import re
import subprocess
import sys

import ezdxf
import pytest
from common import ROOT, conveyor_block, winch_two_shoe

import dxfcheck
from dxfcheck.core.geometry import Affine
from dxfcheck.output.annotate import annotate
from dxfcheck.output.markup import plan_markup
from dxfcheck.output.sketch import BlockWrap

FORCE, NOTE = "DXFCHECK_FORCES", "DXFCHECK_NOTES"
#: Header variables every save rewrites (save stamps and the next free handle).
SAVE_STAMPS = {"$HANDSEED", "$TDUPDATE", "$TDUUPDATE", "$VERSIONGUID"}


def _entities(doc):
    """handle -> (type, layer, attributes) over modelspace, paper space and
    blocks.  R12 files store no owner handles (group code 330 came with
    R13), so ezdxf makes them up on loading; they are left out there."""
    drop = {"owner"} if doc.dxfversion == "AC1009" else set()
    out = {}
    for block in doc.blocks:
        for e in block:
            attribs = {k: v for k, v in e.dxfattribs().items() if k not in drop}
            out[e.dxf.handle] = (e.dxftype(), e.dxf.layer, attribs)
    for layout in doc.layouts:
        for e in layout:
            attribs = {k: v for k, v in e.dxfattribs().items() if k not in drop}
            out[e.dxf.handle] = (e.dxftype(), e.dxf.layer, attribs)
    return out


def _raw_header(path):
    """$VAR -> its group-code/value lines, straight from the file's HEADER
    section (what ezdxf would make up for a missing variable is not there)."""
    lines = path.read_text(errors="replace").splitlines()
    pairs = [(lines[i].strip(), lines[i + 1]) for i in range(0, len(lines) - 1, 2)]
    start = pairs.index(("2", "HEADER"))
    out, var = {}, None
    for code, value in pairs[start + 1 :]:
        if (code, value) == ("0", "ENDSEC"):
            break
        if code == "9":
            var = value
            out[var] = []
        else:
            out[var].append((code, value))
    return out


DRAWINGS = {
    "winch": lambda p: winch_two_shoe().save(p),
    "conveyor": lambda p: conveyor_block().save(p),
    "blocks": lambda p: winch_two_shoe().save(
        p, wraps=(BlockWrap((300, 40), 30, 2, 2, (5, 5)), BlockWrap((-10, 20), -75, 0.5, 0.5))
    ),
    "r12": lambda p: winch_two_shoe().save(p, dxfversion="R12"),
    "inch": lambda p: _inch(p),
}


def _inch(path):
    sk = winch_two_shoe()
    sk.units = "inch"
    sk.save(path, transform=Affine.scaling(1 / 25.4, 1 / 25.4))


@pytest.fixture(params=sorted(DRAWINGS))
def annotated(request, tmp_path):
    src = tmp_path / f"{request.param}.dxf"
    DRAWINGS[request.param](src)
    before = hashlib.sha256(src.read_bytes()).hexdigest()
    sol = dxfcheck.analyse(src, mu=0.35)
    out = tmp_path / "out.dxf"
    annotate(sol, out=out)
    assert hashlib.sha256(src.read_bytes()).hexdigest() == before  # the input is untouched
    return request.param, src, out, sol


def test_copy_preserves_every_original_entity(annotated):
    _, src, out, _ = annotated
    a, b = ezdxf.readfile(src), ezdxf.readfile(out)
    assert b.dxfversion == a.dxfversion
    ea, eb = _entities(a), _entities(b)
    assert set(ea) <= set(eb)
    for handle, value in ea.items():
        assert eb[handle] == value, handle
    added = {h: v for h, v in eb.items() if h not in ea}
    assert added and {layer for _, layer, _ in added.values()} == {FORCE, NOTE}
    assert {t for t, _, _ in added.values()} == {"LINE", "SOLID", "TEXT"}  # R12-safe entity kinds
    ha, hb = _raw_header(src), _raw_header(out)
    assert set(ha) == set(hb)
    for var in set(ha) - SAVE_STAMPS:
        assert hb[var] == ha[var], var
    assert [layout.name for layout in b.layouts] == [layout.name for layout in a.layouts]
    assert {blk.name for blk in b.blocks} == {blk.name for blk in a.blocks}


def test_output_passes_audit(annotated):
    _, _, out, _ = annotated
    auditor = ezdxf.readfile(out).audit()
    assert not auditor.has_errors


def test_arrows_match_solver_vectors(annotated):
    """Each pin arrow starts at its pin and points along the solved force,
    with length |F| × the stated scale (in drawing units)."""
    _, _, out, sol = annotated
    mm_per_unit = sol.mechanism.drawing.mm_per_unit
    markup = plan_markup(sol)
    case = sol.case(markup.direction)
    lines = [e for e in ezdxf.readfile(out).modelspace().query(f"LINE[layer=='{FORCE}']")]
    scale = float(re.search(r"([\d.]+) mm = 1 kN", markup.scale_text).group(1)) / 1000  # mm per N
    assert scale == pytest.approx(markup.mm_per_N)
    fmax = max(a.force_N for a in markup.arrows)
    drum_d = 2 * sol.mechanism.drum.radius_mm
    assert fmax * scale <= 0.5 * drum_d + 1e-9  # the largest arrow is at most half the drum diameter
    for p in case.pins:
        tail = (p.x_mm / mm_per_unit, p.y_mm / mm_per_unit)
        hits = [e for e in lines if math.dist((e.dxf.start.x, e.dxf.start.y), tail) < 1e-6 * drum_d]
        assert hits, p.name
        e = min(
            hits,
            key=lambda e: abs(
                math.atan2(e.dxf.end.y - e.dxf.start.y, e.dxf.end.x - e.dxf.start.x) - math.atan2(p.fy_N, p.fx_N)
            ),
        )
        dx, dy = e.dxf.end.x - e.dxf.start.x, e.dxf.end.y - e.dxf.start.y
        assert math.hypot(dx, dy) * mm_per_unit == pytest.approx(p.force_N * scale, rel=1e-9)
        assert (dx * p.fy_N - dy * p.fx_N) == pytest.approx(0.0, abs=1e-9 * p.force_N * math.hypot(dx, dy))
        assert dx * p.fx_N + dy * p.fy_N > 0


def test_independent_reader_sees_the_new_layers(annotated):
    """dxfgrabber (a separate DXF reader on PyPI) opens the copy."""
    dxfgrabber = pytest.importorskip("dxfgrabber")
    _, _, out, sol = annotated
    dwg = dxfgrabber.readfile(str(out))
    assert {FORCE, NOTE} <= {layer.name for layer in dwg.layers}
    on_force = [e for e in dwg.entities if e.layer == FORCE]
    markup = plan_markup(sol)
    curve_segments = sum(len(pts) - 1 for _, pts in markup.curves)
    assert curve_segments > 0  # each shoe's pressure distribution
    assert sum(e.dxftype == "LINE" for e in on_force) == sum(a.force_N > 0 for a in markup.arrows) + curve_segments
    texts = [e.text for e in dwg.entities if e.layer == NOTE and e.dxftype == "TEXT"]
    assert any("braking torque" in t for t in texts)
    assert any("qualified engineer" in t for t in texts)


def _cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=120
    )


def test_refuses_to_overwrite_unless_forced(tmp_path):
    src = tmp_path / "c.dxf"
    conveyor_block().save(src)
    out = tmp_path / "c-marked.dxf"
    out.write_text("keep me")
    r = _cli("annotate", src, "-o", out)
    assert r.returncode == 2 and "--force" in r.stderr
    assert out.read_text() == "keep me"
    r = _cli("annotate", src, "-o", out, "--force")
    assert r.returncode == 0, r.stderr
    assert ezdxf.readfile(out).layers.has_entry(FORCE)
    before = src.read_bytes()
    r = _cli("annotate", src, "-o", src, "--force")
    assert r.returncode == 2 and "input drawing" in r.stderr
    assert src.read_bytes() == before


def test_refused_output_writes_nothing_else(tmp_path):
    """All outputs are checked before any is written."""
    src = tmp_path / "c.dxf"
    conveyor_block().save(src)
    (tmp_path / "p.svg").write_text("old")
    r = _cli("annotate", src, "-o", tmp_path / "new.dxf", "--svg", tmp_path / "p.svg")
    assert r.returncode == 2
    assert not (tmp_path / "new.dxf").exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == ["c.dxf", "p.svg"]  # no temporary files left


def test_default_output_name_and_direction(tmp_path):
    src = tmp_path / "w.dxf"
    winch_two_shoe().save(src)
    r = _cli("annotate", src, "--direction", "cw")
    assert r.returncode == 0, r.stderr
    out = tmp_path / "w-forces.dxf"
    texts = [e.dxf.text for e in ezdxf.readfile(out).modelspace().query(f"TEXT[layer=='{NOTE}']")]
    assert any("drum cw" in t for t in texts)


def test_solve_and_check_annotate_shortcut(tmp_path):
    src = tmp_path / "c.dxf"
    conveyor_block().save(src)
    r = _cli("solve", src, "--annotate", tmp_path / "s.dxf")
    assert r.returncode == 0, r.stderr
    r = _cli("check", src, "--required-torque", "1 N*m", "--annotate", tmp_path / "k.dxf")
    assert r.returncode == 0, r.stderr
    texts = [e.dxf.text for e in ezdxf.readfile(tmp_path / "k.dxf").modelspace().query(f"TEXT[layer=='{NOTE}']")]
    assert any(t.startswith("release gate: PASS") for t in texts)


def test_svg_picture_content(tmp_path):
    """Render the demo and look inside the SVG: one filled arrowhead per
    non-zero force arrow plus two per member, in the force layer's colour
    (ACI 6, #ff00ff), and every label in the text alternative."""
    src = ROOT / "drawings" / "winch_two_shoe.dxf"
    sol = dxfcheck.analyse(src, mu=0.35)
    svg = tmp_path / "w.svg"
    annotate(sol, svg=svg)
    text = svg.read_text()
    classes = re.findall(r"\.(\w+) \{[^}]*fill: #ff00ff", text)
    assert classes
    heads = sum(len(re.findall(rf'class="{c}"', text)) for c in classes)
    markup = plan_markup(sol)
    assert heads == sum(a.force_N > 0 for a in markup.arrows) + 2 * len(markup.members)
    desc = re.search(r"<desc>(.*?)</desc>", text, re.S).group(1)
    for a in markup.arrows:
        assert a.label in desc
    assert "tie rod: 5.94 kN tension" in desc
    assert f"<title>dxfcheck: winch_two_shoe.dxf, drum {markup.direction}</title>" in text
    # the skeleton is drawn in black on white, the clutter layers are not
    assert "stroke: #000000" in text


def test_png_picture(tmp_path):
    pytest.importorskip("matplotlib")
    src = ROOT / "drawings" / "conveyor_block.dxf"
    sol = dxfcheck.analyse(src, mu=0.35)
    png = tmp_path / "c.png"
    annotate(sol, png=png)
    data = png.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 5000
