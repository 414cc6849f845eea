"""The fast reader gives the same geometry as the full reader, drawing by
drawing, on every kind of test drawing."""

from __future__ import annotations

import ezdxf
import pytest
from common import (
    CATALOGUE,
    ROOT,
    block_brake,
    conveyor_block,
    differential_band,
    double_block_spring_pair,
    frame_bellcrank_two_shoe,
    pivoted_long_shoes,
    push_rod_block,
    simple_band,
    spring_rod_double_block,
    winch_two_shoe,
)

import dxfcheck
from dxfcheck.core.geometry import Affine
from dxfcheck.output.sketch import BlockWrap


def _on_layers(sk, **layers):
    sk.layers = dict(layers)
    return sk


SKETCHES = {
    "winch": winch_two_shoe,
    "conveyor": conveyor_block,
    "block": lambda: block_brake(r=200, l=500, x=200, a=50, effort="1 kN"),
    "double-block": lambda: double_block_spring_pair(r=180, l=450, x=200, a=140, spring="3500 N"),
    "bell-crank": frame_bellcrank_two_shoe,
    "push-rod": push_rod_block,
    "pivoted-long": lambda: pivoted_long_shoes(r=250, semi_deg=50, a=281, effort_N=8000, pair=True),
    "simple-band": lambda: simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort="500 N"),
    "differential-band": lambda: differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort="300 N"),
    "spring-on-rod": spring_rod_double_block,
    # layer near misses: circles and entities on layers with no role
    "pins-on-PINS": lambda: _on_layers(
        pivoted_long_shoes(r=250, semi_deg=50, a=330, effort_N=4000, pair=True), pin="PINS"
    ),
    "drum-on-BRK-DRUM": lambda: _on_layers(winch_two_shoe(), drum="BRK-DRUM", label="Labels"),
}
VARIANTS = {
    "plain": {},
    "r12": {"dxfversion": "R12"},
    "r2000": {"dxfversion": "R2000"},
    "moved": {"transform": Affine.translation(1234.5, -77) @ Affine.rotation(33) @ Affine.scaling(-1, 1)},
    "blocks": {"wraps": (BlockWrap((300, 40), 30, 2, 2, (5, 5)), BlockWrap((-10, 20), -75, -0.5, 0.5))},
}


def _same(path):
    full = dxfcheck.read_drawing(path, reader="full")
    fast = dxfcheck.read_drawing(path, reader="fast")
    assert fast == full


#: The byte scan's ways through a file: the regular expressions alone (a
#: small file), the arrays of lines (a big one), and either in chunks far
#: smaller than a structure, so that structures and polylines run across
#: chunks: (chunk size [bytes], smallest file for the arrays [bytes]).
SCANS = {"regex": (1 << 20, 1 << 40), "arrays": (1 << 20, 0), "regex-tiny": (300, 1 << 40), "arrays-tiny": (700, 0)}
#: Every test drawing: the catalogue (as drawn, in R12, in nested blocks) and
#: the demos.
DRAWINGS = sorted(
    [(f"catalogue:{name}", variant) for name in CATALOGUE for variant in ("plain", "r12", "blocks")]
    + [(f"demo:{p.name}", "file") for p in (ROOT / "drawings").glob("*.dxf")]
)


@pytest.mark.parametrize("scan", sorted(SCANS))
@pytest.mark.parametrize(("drawing", "variant"), DRAWINGS)
def test_fast_reader_matches_full_reader_on_every_test_drawing(tmp_path, monkeypatch, drawing, variant, scan):
    import dxfcheck.read.fast as fastread

    kind, name = drawing.split(":", 1)
    if kind == "demo":
        path = ROOT / "drawings" / name
    else:
        path = tmp_path / "d.dxf"
        CATALOGUE[name][0]().save(path, **VARIANTS[variant])
    chunk, arrays_from = SCANS[scan]
    monkeypatch.setattr(fastread, "CHUNK_BYTES", chunk)
    monkeypatch.setattr(fastread, "NUMPY_SCAN_MIN_BYTES", arrays_from)
    _same(path)


@pytest.mark.parametrize("variant", sorted(VARIANTS))
@pytest.mark.parametrize("name", sorted(SKETCHES))
def test_fast_reader_matches_full_reader(tmp_path, name, variant):
    path = tmp_path / f"{name}-{variant}.dxf"
    SKETCHES[name]().save(path, **VARIANTS[variant])
    _same(path)


@pytest.mark.parametrize("scan", sorted(SCANS))
def test_fast_reader_on_hand_made_entities(tmp_path, monkeypatch, scan):
    """Entities the sketches do not write: MTEXT, MINSERT grids, nested
    non-uniform scales, a mirrored extrusion, a band polyline with bulges,
    2D POLYLINEs (on a role layer, on clutter layers, in paper space),
    header custom properties, clutter on other layers, entities of paper
    space, INSERTs with attributes; and the same file with CR LF line ends
    and with integers right-aligned in six characters."""
    import dxfcheck.read.fast as fastread

    chunk, arrays_from = SCANS[scan]
    monkeypatch.setattr(fastread, "CHUNK_BYTES", chunk)
    monkeypatch.setattr(fastread, "NUMPY_SCAN_MIN_BYTES", arrays_from)
    doc = ezdxf.new("R2010", units=4)
    for layer in ("PIN", "LINK", "LABEL", "BAND", "CLUTTER"):
        doc.layers.add(layer)
    doc.header.custom_vars.append("dxfcheck.required_torque", "450 N*m")
    msp = doc.modelspace()
    msp.add_mtext("{\\fArial|b1;left} lever\\Pnow", dxfattribs={"layer": "LABEL", "insert": (3, 4)})
    inner = doc.blocks.new("INNER")
    inner.add_line((0, 0), (10, 0), dxfattribs={"layer": "0"})
    inner.add_circle((10, 0), 1.0, dxfattribs={"layer": "PIN"})
    inner.add_attdef("TAG", (0, 0))
    outer = doc.blocks.new("OUTER")
    outer.add_blockref("INNER", (5, 0), dxfattribs={"rotation": 90, "layer": "0"})
    ref = msp.add_blockref("OUTER", (100, 100), dxfattribs={"xscale": 2, "yscale": 1, "layer": "LINK"})
    ref.add_auto_attribs({"TAG": "x"})
    grid = msp.add_blockref("INNER", (10, 0), dxfattribs={"rotation": 90, "layer": "LINK"})
    grid.grid(size=(2, 3), spacing=(20, 30))
    msp.add_circle((5, 5), 3, dxfattribs={"layer": "PIN", "extrusion": (0, 0, -1)})
    msp.add_lwpolyline([(0, 0, 0.5), (50, 0, 0), (80, 20, 0)], format="xyb", dxfattribs={"layer": "BAND"})
    msp.add_polyline2d([(0, 0), (10, 10), (20, 0)], close=True, dxfattribs={"layer": "LINK"})
    for k in range(200):
        msp.add_line((k, 0), (k, 1), dxfattribs={"layer": "CLUTTER"})
        msp.add_circle((k, 5), 0.5, dxfattribs={"layer": "CLUTTER" if k % 3 else "HOLES"})
    for k in range(5):
        msp.add_polyline2d([(k, 0), (k, 10), (k + 5, 0)], dxfattribs={"layer": "CLUTTER"})
    psp = doc.paperspace()
    psp.add_circle((1, 1), 5, dxfattribs={"layer": "PIN"})
    psp.add_polyline2d([(0, 0), (3, 3)], dxfattribs={"layer": "LINK"})
    psp.add_line((0, 0), (3, 3), dxfattribs={"layer": "PAPER-ONLY"})
    path = tmp_path / "hand.dxf"
    doc.saveas(path)
    _same(path)
    crlf = tmp_path / "hand-crlf.dxf"
    crlf.write_bytes(path.read_bytes().replace(b"\n", b"\r\n"))
    _same(crlf)
    wide = tmp_path / "hand-wide.dxf"  # integers right-aligned in six characters, as some programs write them
    wide.write_bytes(path.read_bytes().replace(b" 67\n1\n", b" 67\n     1\n").replace(b" 70\n0\n", b" 70\n     0\n"))
    assert b"     1\n" in wide.read_bytes()
    _same(wide)
    full = dxfcheck.read_drawing(path, reader="full")
    assert full.custom_properties == (("dxfcheck.required_torque", "450 N*m"),)
    assert any(t.text == "left lever now" for t in full.texts)


def test_auto_uses_the_fast_reader_for_big_files_and_falls_back(tmp_path, monkeypatch):
    import dxfcheck.read.drawing as drawing
    import dxfcheck.read.fast as fastread

    path = tmp_path / "w.dxf"
    winch_two_shoe().save(path)
    calls = []
    real = fastread.load_fast
    monkeypatch.setattr(fastread, "load_fast", lambda p, r: calls.append(p) or real(p, r))
    monkeypatch.setattr(drawing, "FAST_READER_MIN_BYTES", 1)
    dxfcheck.read_drawing(path)
    assert calls == [path]
    # a binary file is not for the fast reader: the full reader reads it
    doc = ezdxf.readfile(path)
    doc.saveas(tmp_path / "w-bin.dxf", fmt="bin")
    assert dxfcheck.read_drawing(tmp_path / "w-bin.dxf") == dxfcheck.read_drawing(tmp_path / "w-bin.dxf", reader="full")
