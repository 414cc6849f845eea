"""The reader: block transforms, layer inheritance, units, entity kinds."""

from __future__ import annotations

import ezdxf
import pytest
from common import conveyor_block, winch_two_shoe

import dxfcheck
from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code


def test_rotated_insert_nested_in_non_uniform_scale(tmp_path):
    """A block rotated 90° inside a block scaled (2, 1): the inner rotation
    applies first, then the outer non-uniform scale (DXF Reference, INSERT:
    block coordinates are scaled, rotated, then moved to the insertion
    point; nested references compose).  Worked by hand:

        inner (0,0)-(10,0) -> R90 -> (0,0)-(0,10) -> +(5,0) -> (5,0)-(5,10)
        outer S(2,1) -> (10,0)-(10,10) -> +(100,100) -> (110,100)-(110,110)

    Applying the scale before the rotation would give (110,100)-(110,120).
    """
    doc = ezdxf.new("R2010", units=4)
    doc.layers.add("LINK")
    doc.layers.add("PIN")
    inner = doc.blocks.new("INNER")
    inner.add_line((0, 0), (10, 0), dxfattribs={"layer": "0"})
    inner.add_circle((10, 0), 1.0, dxfattribs={"layer": "PIN"})
    outer = doc.blocks.new("OUTER")
    outer.add_blockref("INNER", (5, 0), dxfattribs={"rotation": 90, "layer": "0"})
    doc.modelspace().add_blockref("OUTER", (100, 100), dxfattribs={"xscale": 2, "yscale": 1, "layer": "LINK"})
    path = tmp_path / "nested.dxf"
    doc.saveas(path)
    d = dxfcheck.read_drawing(path)
    (line,) = d.paths_of(Role.LINK)  # layer 0 in the blocks -> LINK of the outer reference
    assert line.points[0] == pytest.approx((110.0, 100.0), abs=1e-9)
    assert line.points[1] == pytest.approx((110.0, 110.0), abs=1e-9)
    (pin,) = d.circles_of(Role.PIN)
    assert pin.center == pytest.approx((110.0, 110.0), abs=1e-9)
    # the circle is stretched by the non-uniform scale: reported, not hidden
    assert any(f.code is Code.DISTORTED_CIRCLE for f in d.findings)
    assert line.source.via and len(line.source.via) == 2


def test_minsert_grid(tmp_path):
    """MINSERT copies a block on a rows × columns grid in the reference's
    rotated frame (DXF Reference, INSERT group codes 70/71/44/45)."""
    doc = ezdxf.new("R2010", units=4)
    blk = doc.blocks.new("P")
    blk.add_circle((0, 0), 5, dxfattribs={"layer": "PIN"})
    ref = doc.modelspace().add_blockref("P", (10, 0), dxfattribs={"rotation": 90})
    ref.grid(size=(2, 3), spacing=(20, 30))
    path = tmp_path / "grid.dxf"
    doc.saveas(path)
    centers = sorted(c.center for c in dxfcheck.read_drawing(path).circles_of(Role.PIN))
    # columns along the rotated x axis (world +y), rows along world -x
    expected = sorted((10 - 20 * r, 30 * c) for r in range(2) for c in range(3))
    assert len(centers) == len(expected)
    for got, want in zip(centers, expected, strict=True):
        assert got == pytest.approx(want, abs=1e-9)


@pytest.mark.parametrize(
    ("insunits", "measurement", "unit", "source"),
    [
        (1, None, "inch", "$INSUNITS"),
        (6, None, "m", "$INSUNITS"),
        (0, 0, "inch", "$MEASUREMENT"),
        (0, 1, "mm", "$MEASUREMENT"),
        (0, None, "mm", "default"),
    ],
)
def test_units_from_header(tmp_path, insunits, measurement, unit, source):
    """$INSUNITS, then $MEASUREMENT, then millimetres (DXF Reference, HEADER
    section); the fallbacks are reported as D101."""
    doc = conveyor_block().to_doc()
    doc.header["$INSUNITS"] = insunits
    if measurement is None:
        del doc.header["$MEASUREMENT"]
    else:
        doc.header["$MEASUREMENT"] = measurement
    path = tmp_path / "u.dxf"
    doc.saveas(path)
    d = dxfcheck.read_drawing(path)
    assert (d.units, d.units_source) == (unit, source)
    assert any(f.code is Code.UNITS_ASSUMED for f in d.findings) == (source != "$INSUNITS")
    size = {"inch": 25.4, "m": 1000.0, "mm": 1.0}[unit]
    assert d.mm_per_unit == size
    (drum,) = d.circles_of(Role.DRUM)
    assert drum.radius_mm == pytest.approx(150 * size)


def test_units_option_overrides(tmp_path):
    path = tmp_path / "c.dxf"
    conveyor_block().save(path)
    d = dxfcheck.read_drawing(path, units="cm")
    assert (d.units, d.units_source, d.mm_per_unit) == ("cm", "option", 10.0)


def test_r12_drawing_solves_like_r2010(tmp_path):
    """R12 has no LWPOLYLINE: the sketch writes 2D POLYLINEs, which the
    reader takes as centrelines."""
    p12, p10 = tmp_path / "r12.dxf", tmp_path / "r2010.dxf"
    winch_two_shoe().save(p12, dxfversion="R12")
    winch_two_shoe().save(p10)
    a, b = dxfcheck.analyse(p12, mu=0.3), dxfcheck.analyse(p10, mu=0.3)
    assert a.mechanism.drawing.dxfversion == "AC1009"
    for ca, cb in zip(a.cases, b.cases, strict=True):
        assert ca.torque_Nm == pytest.approx(cb.torque_Nm, rel=1e-12)


def test_input_is_never_modified(tmp_path):
    path = tmp_path / "w.dxf"
    winch_two_shoe().save(path)
    before = path.read_bytes()
    dxfcheck.analyse(path, mu=0.3)
    assert path.read_bytes() == before


@pytest.mark.parametrize(
    ("content", "words"),
    [
        (None, "no such file"),
        (b"", "empty"),
        (b"AC1032\x00\x00binary dwg", "DWG"),
        (b"hello, this is not a drawing\n", "not a DXF file"),
        (b"  0\nSECTION\n  2\nHEADER\n", "cut off or still being written"),
        (b"%PDF-1.7 ...", "PDF"),
    ],
)
def test_unreadable_files(tmp_path, content, words):
    path = tmp_path / "bad.dxf"
    if content is not None:
        path.write_bytes(content)
    with pytest.raises(dxfcheck.DrawingReadError) as info:
        dxfcheck.read_drawing(path)
    assert words in str(info.value)
    assert str(path) in str(info.value)


def test_folder_is_refused(tmp_path):
    with pytest.raises(dxfcheck.DrawingReadError, match="folder"):
        dxfcheck.read_drawing(tmp_path)
