"""DWG intake (:mod:`dxfcheck.read.dwg`): a DWG and its DXF twin read alike.

The twins are public drawings saved both as DWG and as DXF by the program
that made them (ACadSharp's samples, R2000-R2018, and its dynamic-block
drawings; ezdwg's own fixtures), and our synthetic drawing of nested,
rotated, scaled and mirrored blocks written as DWG by an independent DXF-to-DWG
converter (provenance and licences in ``tests/references.md``).  Two
references decide agreement, neither of them our adapter:

* ezdxf's own block expansion (``Insert.virtual_entities()``) of the DXF twin
  and of the document the adapter built: every line, circle, arc, polyline
  and text in world coordinates, kind and layer alike, coordinates within
  1e-9 of the drawing's size;
* dxfcheck's DXF reader on the twin (the full one): the same skeleton items
  with the same handles and layers, the same findings.

The small twins are kept gzipped in ``tests/data/dwg``; ACadSharp's full
samples (1 MB DWG, 2.6 MB DXF each): R14, R2000 and R2018 with their twins
are in the repository (gzipped, MIT, provenance in tests/references.md); the
other versions are read from the shared sample folder when it is there
(``DXFCHECK_DWG_SAMPLES`` or ``../shared/dwg-samples`` above the clone) and
skipped otherwise.
"""

from __future__ import annotations

import gzip
import math
import os
import shutil
import subprocess
import sys
from collections import Counter
from pathlib import Path
from typing import Any

import pytest

from dxfcheck.core.config import Config, Role
from dxfcheck.core.errors import DrawingReadError
from dxfcheck.core.findings import Code, Severity
from dxfcheck.read import dwg
from dxfcheck.read.drawing import Drawing, _load_dwg, read_drawing

ezdwg = pytest.importorskip("ezdwg")
ezdxf = pytest.importorskip("ezdxf")

DATA = Path(__file__).resolve().parent.parent / "data" / "dwg"
ROOT = Path(__file__).resolve().parents[2]
#: Agreement of coordinates, relative to the drawing's size (the issue's bound).
REL_TOL = 1e-9

#: (DWG, DXF twin, version code) kept in the repository.
SMALL = [
    ("synth_lr_r2000.dwg", "synth.dxf", "AC1015"),
    ("mtext_2000.dwg", "mtext_2000.dxf", "AC1015"),
    ("text_2004.dwg", "text_2004.dxf", "AC1018"),
    ("arc_2007.dwg", "arc_2007.dxf", "AC1021"),
    ("circle_2010.dwg", "circle_2010.dxf", "AC1024"),
    ("line_2013.dwg", "line_2013.dxf", "AC1027"),
    ("BLOCKFLIPPARAMETER.dwg", "BLOCKFLIPPARAMETER.dxf", "AC1032"),
    ("BLOCKROTATIONPARAMETER.dwg", "BLOCKROTATIONPARAMETER.dxf", "AC1032"),
    ("BLOCKXYPARAMETER.dwg", "BLOCKXYPARAMETER.dxf", "AC1032"),
]
#: ACadSharp's samples: one drawing saved in every version from R2000 to R2018.
ACADSHARP = [
    (f"sample_{v}.dwg", f"sample_{v}_ascii.dxf", v)
    for v in ("AC1015", "AC1018", "AC1021", "AC1024", "AC1027", "AC1032")
]
#: Entity kinds compared (what the adapter carries as geometry); ELLIPSE is an
#: arc or circle under a non-uniform block scale.
#: Entity kinds ezdwg does not decode at all (R2004 and later objects):
#: never skeleton, so a DWG lacks only the twin's notes that they are ignored
#: on a role layer (D102).
NOT_DECODED = ("MESH", "WIPEOUT", "ACAD_TABLE", "MULTILEADER", "IMAGE", "PDFUNDERLAY")
COMPARED = {"LINE", "CIRCLE", "ARC", "ELLIPSE", "LWPOLYLINE", "POLYLINE", "TEXT", "MTEXT"}


def _shared() -> Path | None:
    env = os.environ.get("DXFCHECK_DWG_SAMPLES")
    if env:
        return Path(env) if Path(env).is_dir() else None
    return next((p / "shared" / "dwg-samples" for p in ROOT.parents if (p / "shared" / "dwg-samples").is_dir()), None)


@pytest.fixture(scope="session")
def samples(tmp_path_factory: pytest.TempPathFactory) -> Path:
    """The small twins, unpacked."""
    out = tmp_path_factory.mktemp("dwg-samples")
    for gz in DATA.glob("*.gz"):
        (out / gz.stem).write_bytes(gzip.decompress(gz.read_bytes()))
    return out


def _pair(samples: Path, name: str) -> Path:
    if name.startswith("sample_"):
        return _acadsharp(samples, name)
    return samples / name


def _acadsharp(samples: Path, name: str) -> Path:
    """One of ACadSharp's samples: from the repository's test data (R14,
    R2000 and R2018 with their twins, gzipped), else from the shared sample
    folder (every version), else skipped."""
    if (samples / name).is_file():
        return samples / name
    shared = _shared()
    if shared is None:
        pytest.skip(f"{name}: only R14, R2000 and R2018 of ACadSharp's samples are in the repository")
    return shared / "acadsharp" / name


# ---------------------------------------------------------------- references


def _p2(v: Any) -> tuple[float, float]:
    return (float(v[0]), float(v[1]))


def _signature(e: Any) -> tuple[float, ...]:
    """World geometry of one (virtual) entity as numbers."""
    kind = e.dxftype()
    if kind == "LINE":
        return (*_p2(e.dxf.start), *_p2(e.dxf.end))
    if kind == "CIRCLE":
        return (*_p2(e.dxf.center), float(e.dxf.radius))
    if kind == "ARC":
        ends = sorted([_p2(e.start_point), _p2(e.end_point)])
        return (*_p2(e.dxf.center), float(e.dxf.radius), *ends[0], *ends[1])
    if kind == "ELLIPSE":
        return (*_p2(e.dxf.center), *_p2(e.dxf.major_axis), float(e.dxf.ratio))
    if kind == "LWPOLYLINE":
        return tuple(float(v) for p in e.get_points("xyb") for v in p)
    if kind == "POLYLINE":
        return tuple(v for p in e.points() for v in _p2(p))
    return _p2(e.dxf.insert)


def _flat(doc: Any) -> list[tuple[str, str, tuple[float, ...]]]:
    """Model space with every block reference expanded by ezdxf itself
    (layer 0 inside a block takes the reference's layer)."""
    out: list[tuple[str, str, tuple[float, ...]]] = []

    def walk(entities: Any, layer0: str | None, depth: int) -> None:
        for e in entities:
            kind = e.dxftype()
            layer = e.dxf.layer if e.dxf.layer != "0" or layer0 is None else layer0
            if kind == "INSERT" and depth < 16:
                walk(e.virtual_entities(), layer, depth + 1)
            elif kind in COMPARED and (kind != "POLYLINE" or e.get_mode() == "AcDb2dPolyline"):
                if e.dxf.get("invisible", 0) and kind not in ("TEXT", "MTEXT"):
                    continue
                out.append((kind, layer.upper(), _signature(e)))

    walk(doc.modelspace(), None, 0)
    return sorted(out, key=lambda r: (r[0], r[1], [round(v, 3) for v in r[2]]))


def _size(rows: list[tuple[str, str, tuple[float, ...]]]) -> float:
    values = [abs(v) for _, _, sig in rows for v in sig]
    return max([1.0, *values])


def _assert_same(a: list[Any], b: list[Any]) -> float:
    """Entity for entity: kinds and layers equal, coordinates within
    REL_TOL of the drawing's size; returns the largest difference."""
    assert Counter((k, layer) for k, layer, _ in a) == Counter((k, layer) for k, layer, _ in b)
    tol = REL_TOL * _size(b)
    worst = 0.0
    for x, y in zip(a, b, strict=True):
        assert x[:2] == y[:2]
        assert len(x[2]) == len(y[2]), (x, y)
        d = max((abs(p - q) for p, q in zip(x[2], y[2], strict=True)), default=0.0)
        assert d <= tol, (x, y)
        worst = max(worst, d)
    return worst


# ---------------------------------------------------------------- agreement


@pytest.mark.parametrize(("dwg_name", "dxf_name", "version"), SMALL + ACADSHARP, ids=lambda v: str(v))
def test_twin_geometry_agrees(samples: Path, dwg_name: str, dxf_name: str, version: str) -> None:
    """The document built from the DWG and the DXF twin, both expanded by
    ezdxf: the same entities on the same layers, inserts placed alike."""
    dd = _load_dwg(_pair(samples, dwg_name), Config(), None)
    assert dd.version == version
    twin = ezdxf.readfile(str(_pair(samples, dxf_name)))
    mine, theirs = _flat(dd.doc), _flat(twin)
    assert theirs, "the twin holds geometry"
    _assert_same(mine, theirs)


@pytest.mark.parametrize(("dwg_name", "dxf_name", "version"), SMALL + ACADSHARP, ids=lambda v: str(v))
def test_twin_units_agree(samples: Path, dwg_name: str, dxf_name: str, version: str) -> None:
    """The unit comes from the DWG header's $INSUNITS, as from the twin's;
    where the header cannot be decoded (the independent converter's file)
    the unit is unknown and said so (D121, then the assumed unit D101)."""
    a = read_drawing(_pair(samples, dwg_name))
    b = read_drawing(_pair(samples, dxf_name), reader="full")
    codes = {f.code for f in a.findings}
    if dwg_name.startswith("synth_"):
        assert Code.DWG_HEADER_UNREAD in codes and Code.UNITS_ASSUMED in codes
        assert a.units_source == "default"
        return
    assert (a.units, a.mm_per_unit, a.units_source) == (b.units, b.mm_per_unit, b.units_source)
    assert a.dxfversion == version == b.dxfversion


@pytest.mark.parametrize("role", [Role.PIVOT, Role.SHOE, Role.LINK, Role.LABEL], ids=lambda r: r.value)
@pytest.mark.parametrize(
    ("dwg_name", "dxf_name"),
    [(a, b) for a, b, _ in SMALL if a.startswith(("synth", "BLOCK"))] + [x[:2] for x in ACADSHARP[:2]],
    ids=lambda v: str(v),
)
def test_twin_drawing_agrees(samples: Path, dwg_name: str, dxf_name: str, role: Role) -> None:
    """dxfcheck's reading of the DWG and of the twin, with every layer of
    the drawing given one role: the same skeleton items (handle, layer,
    geometry) and the same findings but for the unit's (D120/D121/D101) and
    the notes on kinds ezdwg does not decode (:data:`NOT_DECODED`)."""
    twin_path = _pair(samples, dxf_name)
    names = tuple(layer.dxf.name.upper() for layer in ezdxf.readfile(str(twin_path)).layers)
    cfg = Config(layers={role: names})
    a = read_drawing(_pair(samples, dwg_name), cfg)
    b = read_drawing(twin_path, cfg, reader="full")
    assert _items(a) == _items(b)
    unit_codes = {Code.DWG_HEADER_UNREAD, Code.UNITS_ASSUMED, Code.DWG_OLD_VERSION}
    assert _findings(a, unit_codes) == _findings(b, unit_codes)
    assert a.other_layers == b.other_layers
    assert sorted((c.source.ref, round(c.radius_mm, 9)) for c in a.loose_circles) == sorted(
        (c.source.ref, round(c.radius_mm, 9)) for c in b.loose_circles
    )


def _items(d: Drawing) -> list[tuple[Any, ...]]:
    size = d.extent_mm()

    def r(v: float) -> float:
        return round(v / size, 9)

    rows: list[tuple[Any, ...]] = []
    rows += [("c", c.source.ref, c.source.layer, r(c.center[0]), r(c.center[1]), r(c.radius_mm)) for c in d.circles]
    rows += [("a", a.source.ref, a.source.layer, r(a.center[0]), r(a.center[1]), r(a.radius_mm)) for a in d.arcs]
    rows += [("p", p.source.ref, p.source.layer, *(r(v) for q in p.points for v in q)) for p in d.paths]
    rows += [("t", t.source.ref, t.source.layer, t.text, r(t.position[0]), r(t.position[1])) for t in d.texts]
    return sorted(rows, key=str)


def _findings(d: Drawing, skip: set[Code]) -> Counter[tuple[str, str, tuple[str, ...]]]:
    return Counter(
        (f.code.value[0], f.message, f.handles)
        for f in d.findings
        if f.code not in skip and not (f.code is Code.UNSUPPORTED_ENTITY and f.message.startswith(NOT_DECODED))
    )


def test_2d_polyline_with_a_bulge(tmp_path: Path) -> None:
    """A legacy 2D POLYLINE (vertices, a bulge, closed) written as DWG by
    ezdwg's writer and as DXF by ezdxf: the same centreline path and the
    same curved-link finding (D107) from both."""
    pts = [(0.0, 0.0), (100.0, 0.0), (100.0, 40.0)]
    out = ezdwg.new()
    out.header["insunits"] = 4
    out.layers["LINK"] = {"color_index": 1}
    out.modelspace().add_polyline2d(pts, bulges=[0.0, 0.5, 0.0], closed=True, layer="LINK")
    out.save(str(tmp_path / "poly.dwg"))
    doc = ezdxf.new("R2000", units=4)
    doc.layers.add("LINK")
    poly = doc.modelspace().add_polyline2d(pts, close=True, dxfattribs={"layer": "LINK"})
    poly.vertices[1].dxf.bulge = 0.5
    doc.saveas(tmp_path / "poly.dxf")
    cfg = Config(layers={Role.LINK: ("LINK",)})
    a, b = read_drawing(tmp_path / "poly.dwg", cfg), read_drawing(tmp_path / "poly.dxf", cfg)
    assert [p.points for p in a.paths] == [p.points for p in b.paths]
    assert a.paths[0].points == ((0.0, 0.0), (100.0, 0.0), (100.0, 40.0), (0.0, 0.0))
    assert [
        f.code for f in a.findings if f.code is not Code.UNITS_ASSUMED and f.code is not Code.DWG_HEADER_UNREAD
    ] == [Code.CURVED_LINK]


def test_aligned_text_and_mtext(tmp_path: Path) -> None:
    """A TEXT aligned by its second point (halign 1, valign 2: the DXF
    Reference places such a text at its alignment point) and an MTEXT with
    a paragraph break, written as DWG and as DXF: the same label texts at
    the same places."""
    out = ezdwg.new()
    out.header["insunits"] = 4
    out.layers["LABEL"] = {"color_index": 1}
    msp = out.modelspace()
    msp.add_text("O1", (10.0, 10.0, 0.0), 5.0, halign=1, valign=2, align_point=(20.0, 30.0, 0.0), layer="LABEL")
    msp.add_mtext("S2\\Pright shoe", (50.0, 60.0, 0.0), 5.0, layer="LABEL")
    out.save(str(tmp_path / "t.dwg"))
    doc = ezdxf.new("R2000", units=4)
    doc.layers.add("LABEL")
    dmsp = doc.modelspace()
    dmsp.add_text(
        "O1", dxfattribs={"insert": (10, 10), "halign": 1, "valign": 2, "align_point": (20, 30), "layer": "LABEL"}
    )
    dmsp.add_mtext("S2\\Pright shoe", dxfattribs={"insert": (50, 60), "char_height": 5.0, "layer": "LABEL"})
    doc.saveas(tmp_path / "t.dxf")
    cfg = Config(layers={Role.LABEL: ("LABEL",)})
    a, b = read_drawing(tmp_path / "t.dwg", cfg), read_drawing(tmp_path / "t.dxf", cfg)
    assert sorted((t.text, t.position) for t in a.texts) == sorted((t.text, t.position) for t in b.texts)
    assert ("O1", (20.0, 30.0)) in [(t.text, t.position) for t in a.texts]


def test_arc_ends_agree_under_mirroring(samples: Path) -> None:
    """Direction before number: an arc placed by a mirroring insert runs
    counter-clockwise from the same start angle in both readings (the
    synthetic drawing mirrors by a negative scale and by a -Z extrusion)."""
    cfg = Config(layers={Role.SHOE: ("JOINTS", "PARTS", "MEMBERS", "0")})
    a = read_drawing(samples / "synth_lr_r2000.dwg", cfg)
    b = read_drawing(samples / "synth.dxf", cfg, reader="full")
    key = {x.source.ref: (x.start_deg, x.end_deg) for x in b.arcs}
    assert len(a.arcs) == len(b.arcs) > 10
    for arc in a.arcs:
        s, e = key[arc.source.ref]
        assert math.isclose(arc.start_deg, s, abs_tol=1e-7) and math.isclose(arc.end_deg, e, abs_tol=1e-7)


def test_a_file_changed_at_the_same_path_is_read_anew(samples: Path, tmp_path: Path) -> None:
    """ezdwg keeps decoded tables by path; the adapter clears them after
    each reading, so a drawing saved again under its name is read as it is
    now (before the fix: the second reading mixed both files' tables)."""
    p = tmp_path / "same.dwg"
    cfg = Config(layers={Role.PIVOT: ("JOINTS", "0")})
    shutil.copy(samples / "synth_lr_r2000.dwg", p)
    first = read_drawing(p, cfg)
    shutil.copy(samples / "BLOCKXYPARAMETER.dwg", p)
    second = read_drawing(p, cfg)
    assert _items(second) == _items(read_drawing(samples / "BLOCKXYPARAMETER.dwg", cfg))
    assert _items(first) != _items(second)


@pytest.mark.parametrize(("code", "unit", "mm"), [(4, "mm", 1.0), (1, "inch", 25.4), (6, "m", 1000.0)])
def test_units_from_the_dwg_header(tmp_path: Path, code: int, unit: str, mm: float) -> None:
    """$INSUNITS written into a DWG header (ezdwg's writer) is the unit read:
    4 mm, 1 inch, 6 m (DXF Reference, HEADER section); a circle of radius 1
    drawing unit is then ``mm`` millimetres."""
    from read.dwg_writer import write_dwg

    dxf = tmp_path / "one.dxf"
    doc = ezdxf.new("R2000")
    doc.layers.add("PIVOT")
    doc.modelspace().add_circle((0, 0), 1.0, dxfattribs={"layer": "PIVOT"})
    doc.saveas(dxf)
    write_dwg(dxf, tmp_path / "one.dwg", insunits=code)
    d = read_drawing(tmp_path / "one.dwg", Config(layers={Role.PIVOT: ("PIVOT",)}))
    assert (d.units_source, d.mm_per_unit) == ("$INSUNITS", mm) and d.units.startswith(unit[:2])
    assert [c.radius_mm for c in d.circles] == [mm]
    assert not d.findings


def test_unitless_dwg_says_the_unit_is_unknown(tmp_path: Path) -> None:
    """$INSUNITS = 0: a DXF reading would fall back on $MEASUREMENT, which
    is not read from DWG; D121 says so and D101 assumes millimetres."""
    from read.dwg_writer import write_dwg

    write_dwg(ROOT / "drawings" / "winch_two_shoe.dxf", tmp_path / "w.dwg", insunits=0)
    d = read_drawing(tmp_path / "w.dwg")
    codes = [f.code for f in d.findings]
    assert Code.DWG_HEADER_UNREAD in codes and Code.UNITS_ASSUMED in codes
    assert "$MEASUREMENT" in next(f.message for f in d.findings if f.code is Code.DWG_HEADER_UNREAD)
    assert d.units_source == "default"


# ---------------------------------------------------------------- R14 and R13


def test_r14_acadsharp_agrees_but_for_layer_names(samples: Path) -> None:
    """ACadSharp's R14 sample against the R2000 twin: the same geometry;
    layer names follow R14's rules (no spaces or '@': the CAD program wrote
    '0 @ 1' as '0___1'), the unit is assumed (no $INSUNITS in R14) and D120
    says what may be missing."""
    r14 = _acadsharp(samples, "sample_AC1014.dwg")
    dd = _load_dwg(r14, Config(), None)
    assert dd.version == "AC1014"
    assert [f.code for f in dd.findings][:1] == [Code.DWG_OLD_VERSION]
    twin = ezdxf.readfile(str(_acadsharp(samples, "sample_AC1015_ascii.dxf")))
    mine = [(k, "", s) for k, _, s in _flat(dd.doc)]
    theirs = [(k, "", s) for k, _, s in _flat(twin)]
    _assert_same(
        sorted(mine, key=lambda r: (r[0], [round(v, 3) for v in r[2]])),
        sorted(theirs, key=lambda r: (r[0], [round(v, 3) for v in r[2]])),
    )
    d = read_drawing(r14)
    assert d.units_source == "default" and Code.UNITS_ASSUMED in {f.code for f in d.findings}


def test_r14_converter_names_every_insert_it_cannot_place(samples: Path) -> None:
    """The independent converter's R14 file: the reader does not decode the
    block names of model-space references.  Each such INSERT is a D122
    finding with its handle (never a quiet loss), D120 comes first, and
    everything outside those references agrees with the twin."""
    d = read_drawing(samples / "synth_lr_r14.dwg")
    codes = [f.code for f in d.findings]
    assert codes[0] is Code.DWG_OLD_VERSION
    twin = ezdxf.readfile(str(samples / "synth.dxf"))
    model_inserts = {e.dxf.handle for e in twin.modelspace() if e.dxftype() == "INSERT"}
    named = {h for f in d.findings if f.code is Code.DWG_NOT_CARRIED for h in f.handles}
    assert named == model_inserts and len(named) == 11
    # no role layer anywhere (default map): what is lost cannot be skeleton, a warning
    assert {f.severity for f in d.findings if f.code is Code.DWG_NOT_CARRIED} == {Severity.WARNING}
    # JOINTS as pivots: the blocks hold them, so a lost reference may hold skeleton,
    # an error: the mechanism is not solved with part of the drawing missing
    joints = read_drawing(samples / "synth_lr_r14.dwg", Config(layers={Role.PIVOT: ("JOINTS",)}))
    lost = [f for f in joints.findings if f.code is Code.DWG_NOT_CARRIED]
    assert len(lost) == 11 and {f.severity for f in lost} == {Severity.ERROR}
    assert "not solved" in lost[0].message
    dd = _load_dwg(samples / "synth_lr_r14.dwg", Config(), None)
    loose = [(k, layer, s) for k, layer, s in _flat(twin) if k != "INSERT"]
    direct = {e.dxf.handle for e in twin.modelspace() if e.dxftype() != "INSERT"}
    theirs = sorted(
        [(e.dxftype(), e.dxf.layer.upper(), _signature(e)) for e in twin.modelspace() if e.dxf.handle in direct],
        key=lambda r: (r[0], r[1], [round(v, 3) for v in r[2]]),
    )
    assert loose  # the twin has geometry beyond the inserts
    _assert_same(_flat(dd.doc), theirs)


def test_r13_without_role_layers_is_refused(samples: Path, monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    """R13's layer names are not decoded: an R13 file in which no role layer
    is found is refused, naming the file and the cause.  (No public R13
    file is at hand: an R2000 file is taken for R13 by the version check,
    so what is tested is the refusal, not R13 decoding.)"""
    p = tmp_path / "old.dwg"
    p.write_bytes((samples / "synth_lr_r2000.dwg").read_bytes())
    monkeypatch.setattr(dwg, "check_head", lambda path, head: "AC1012")
    with pytest.raises(DrawingReadError) as err:
        read_drawing(p)
    assert "R13" in str(err.value) and err.value.path == str(p)
    cfg = Config(layers={Role.PIVOT: ("JOINTS",)})
    d = read_drawing(p, cfg)
    assert d.findings[0].code is Code.DWG_OLD_VERSION and "R13" in d.findings[0].message
    assert len(d.circles) == 18


# ---------------------------------------------------------------- bad input


def _refused(path: Path) -> str:
    with pytest.raises(DrawingReadError) as err:
        read_drawing(path)
    assert err.value.path == str(path)
    return str(err.value)


@pytest.mark.parametrize("keep", [0.0, 0.01, 0.1, 0.5, 0.9, 0.999])
@pytest.mark.parametrize("name", ["synth_lr_r2000.dwg", "text_2004.dwg", "BLOCKXYPARAMETER.dwg"])
def test_truncated_dwg_is_refused_or_read_whole(samples: Path, tmp_path: Path, name: str, keep: float) -> None:
    """A DWG cut short is refused with one clear message, or (when only
    trailing bytes the reader does not need were cut) read in full: never
    another exception, never part of the drawing quietly."""
    data = (samples / name).read_bytes()
    p = tmp_path / name
    p.write_bytes(data[: max(6, int(len(data) * keep))] if keep else b"")
    try:
        d = read_drawing(p, Config(layers={Role.PIVOT: ("JOINTS", "0")}))
    except DrawingReadError as exc:
        assert exc.path == str(p)
        assert "empty" in str(exc) or "damaged" in str(exc) or "not a DWG" in str(exc)
        return
    whole = read_drawing(samples / name, Config(layers={Role.PIVOT: ("JOINTS", "0")}))
    assert _items(d) == _items(whole)


@pytest.mark.parametrize(
    ("head", "words"),
    [
        (b"AC1099", "unknown version (AC1099)"),
        (b"AC1040", "unknown version (AC1040)"),
        (b"AC1009", "R11/R12"),
        (b"AC1006", "R10"),
        (b"AC2.10", "R2.10"),
        (b"MC0.0\x00", "R1.0"),
    ],
)
def test_unknown_and_old_versions_are_refused(samples: Path, tmp_path: Path, head: bytes, words: str) -> None:
    p = tmp_path / "x.dwg"
    p.write_bytes(head + (samples / "text_2004.dwg").read_bytes()[6:])
    assert words in _refused(p)


def test_wrong_names_are_refused(samples: Path, tmp_path: Path) -> None:
    """A DWG named .dxf and a DXF named .dwg: refused, saying which it is."""
    a = tmp_path / "drawing.dxf"
    a.write_bytes((samples / "text_2004.dwg").read_bytes())
    assert "DWG file not named .dwg" in _refused(a)
    b = tmp_path / "drawing.dwg"
    b.write_bytes((samples / "text_2004.dxf").read_bytes())
    assert "DXF file named .dwg" in _refused(b)
    c = tmp_path / "notes.dwg"
    c.write_bytes(b"%PDF-1.7 not a drawing at all")
    assert "not a DWG file" in _refused(c)


def test_bit_flips_are_refused_or_read(samples: Path, tmp_path: Path) -> None:
    """Flipped bits: a clear refusal or a reading, never a crash."""
    import random

    rng = random.Random(17)
    data = (samples / "BLOCKXYPARAMETER.dwg").read_bytes()
    outcomes = Counter[str]()
    for i in range(12):
        buf = bytearray(data)
        for _ in range(40):
            k = rng.randrange(6, len(buf))
            buf[k] ^= 1 << rng.randrange(8)
        p = tmp_path / f"flip{i}.dwg"
        p.write_bytes(bytes(buf))
        try:
            read_drawing(p)
            outcomes["read"] += 1
        except DrawingReadError as exc:
            assert exc.path == str(p)
            outcomes["refused"] += 1
    assert sum(outcomes.values()) == 12


def test_blocks_that_fan_out_are_refused_in_bounded_time(tmp_path: Path) -> None:
    """The DXF reader's bounds hold for a DWG: twelve levels of blocks with
    ten references each (10^12 placements, written as DWG by ezdwg's
    writer) are refused naming the blocks, before any is walked."""
    import time

    out = ezdwg.new()
    out.layers["PIVOT"] = {"color_index": 1}
    prev = None
    for i in range(12):
        block = out.blocks.new(f"B{i}")
        if prev is None:
            block.add_circle((0.0, 0.0, 0.0), 1.0, layer="PIVOT")
        for k in range(10 if prev else 0):
            block.add_blockref(prev, (3.0 * k, 0.0, 0.0), layer="0")
        prev = f"B{i}"
    out.modelspace().add_blockref(prev, (0.0, 0.0, 0.0), layer="0")
    p = tmp_path / "fan.dwg"
    out.save(str(p))
    t = time.perf_counter()
    assert "'B11' places" in _refused(p)
    assert time.perf_counter() - t < 30


def test_a_section_marked_encrypted_is_refused(samples: Path, tmp_path: Path) -> None:
    """One bit at byte 37316 of the dynamic-block sample marks a section as
    encrypted, which ezdwg does not decode (NotImplementedError, found by
    fuzzing: it was an internal error); refused with the cause."""
    data = bytearray((samples / "BLOCKXYPARAMETER.dwg").read_bytes())
    assert data[37316] == 0x05
    data[37316] = 0x04
    p = tmp_path / "locked.dwg"
    p.write_bytes(bytes(data))
    assert "encrypted" in _refused(p) and "not support" in _refused(p)


def test_without_the_extra_a_dwg_names_the_install(samples: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setitem(sys.modules, "ezdwg", None)  # import ezdwg raises ImportError
    msg = _refused(samples / "text_2004.dwg")
    assert dwg.INSTALL_HINT in msg


def test_without_the_extra_the_command_exits_2(samples: Path) -> None:
    """The real command, with ezdwg hidden: exit 2 and the instruction;
    a DXF drawing still reads (ezdwg is imported only for a DWG)."""
    code = "import sys; sys.modules['ezdwg'] = None\nfrom dxfcheck.cli import main\nsys.exit(main(sys.argv[1:]))\n"
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    r = subprocess.run(
        [sys.executable, "-c", code, "solve", str(samples / "text_2004.dwg")],
        capture_output=True,
        text=True,
        timeout=120,
        env=env,
    )
    assert r.returncode == 2, r.stderr
    assert "pip install dxfcheck[dwg]" in r.stderr and "text_2004.dwg" in r.stderr
    r = subprocess.run(
        [sys.executable, "-c", code, "solve", str(ROOT / "drawings" / "winch_two_shoe.dxf")],
        capture_output=True,
        text=True,
        timeout=120,
        env=env,
    )
    assert r.returncode == 0, r.stderr


def test_ezdwg_is_imported_only_for_a_dwg() -> None:
    code = (
        "import sys\n"
        "from dxfcheck.read.drawing import read_drawing\n"
        f"read_drawing({str(ROOT / 'drawings' / 'winch_two_shoe.dxf')!r})\n"
        "print('ezdwg' in sys.modules)\n"
    )
    r = subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        timeout=120,
        env={**os.environ, "PYTHONPATH": str(ROOT)},
    )
    assert r.stdout.strip() == "False", r.stderr


def test_copy_data_matches_shared(samples: Path) -> None:
    """The gzipped copies are byte-exact copies of the shared samples."""
    shared = _shared()
    if shared is None:
        pytest.skip("the shared sample folder is not here")
    for p in samples.iterdir():
        match = list(shared.glob(f"*/{p.name}"))
        assert len(match) == 1 and match[0].read_bytes() == p.read_bytes(), p.name


# ---------------------------------------------------------------- block attributes (the title block)


def _attrib_text(a: Any) -> str:
    """An attribute's value; a multi-line one (R2018) keeps it in an
    embedded MTEXT, which ezdxf reads separately from ``text``."""
    return str(a.plain_mtext()) if a.has_embedded_mtext_entity else str(a.dxf.text)


def _attributes(doc: Any) -> tuple[list[tuple[Any, ...]], list[tuple[Any, ...]]]:
    """The ATTRIBs of model space's block references (block, tag, text,
    insert, layer) and the ATTDEFs of every block (block, tag, insert)."""
    attribs = [
        (e.dxf.name, a.dxf.tag, _attrib_text(a), tuple(round(v, 6) for v in a.dxf.insert), a.dxf.layer)
        for e in doc.modelspace().query("INSERT")
        for a in e.attribs
    ]
    attdefs = [
        (b.name, a.dxf.tag, tuple(round(v, 6) for v in a.dxf.insert))
        for b in doc.blocks
        if not b.name.startswith("*")
        for a in b.query("ATTDEF")
    ]
    return sorted(attribs), sorted(attdefs)


def test_block_attributes_are_carried(tmp_path: Path) -> None:
    """The demo's title block written as DWG (ATTDEFs in the block, ATTRIBs
    on its reference) comes out of the adapter as the DXF holds it: the
    same tags, values, places and layers."""
    from read.dwg_writer import write_dwg

    src = ROOT / "drawings" / "winch_two_shoe.dxf"
    write_dwg(src, tmp_path / "w.dwg")
    dd = _load_dwg(tmp_path / "w.dwg", Config(), None)
    mine, theirs = _attributes(dd.doc), _attributes(ezdxf.readfile(str(src)))
    assert mine == theirs
    attribs, attdefs = mine
    assert [t for _, t, _, _, _ in attribs] == ["DRAWING_NO", "REV", "TITLE"]  # not an empty comparison
    assert [t for _, t, _ in attdefs] == ["DRAWING_NO", "REV", "TITLE"]


def test_title_block_of_a_dwg_names_the_dwg_handle(tmp_path: Path) -> None:
    """The title block reader finds the DWG's drawing number, title and
    revision, and names the block reference by the DWG's own handle (the
    owner handle ezdwg gives each ATTRIB)."""
    import ezdwg
    from common import TITLES
    from read.dwg_writer import write_dwg

    from dxfcheck.read.titleblock import read_title_block

    write_dwg(ROOT / "drawings" / "winch_two_shoe.dxf", tmp_path / "w.dwg")
    tb = read_title_block(tmp_path / "w.dwg")
    assert tb.number is not None and tb.title is not None and tb.revision is not None, tb.note
    assert (tb.number.value, tb.title.value, tb.revision.value) == TITLES["winch_two_shoe"]
    owners = {int(a.dxf["owner_handle"]) for a in ezdwg.read(str(tmp_path / "w.dwg")).entities().query("ATTRIB")}
    assert len(owners) == 1
    (owner,) = owners
    assert tb.number.source == "block attribute"
    assert f"handle {owner:X}," in tb.number.where and "tag DRAWING_NO" in tb.number.where
    assert "layer TITLE" in tb.number.where and "block DXFCHECK_DEMO_TITLE" in tb.number.where


@pytest.mark.parametrize(("dwg_name", "dxf_name", "version"), ACADSHARP, ids=[v for _, _, v in ACADSHARP])
def test_block_attributes_agree_with_the_twin(samples: Path, dwg_name: str, dxf_name: str, version: str) -> None:
    """ACadSharp's samples, written by another program as DWG and as DXF:
    the block attributes the adapter carries are the twin's (tags, values,
    places, layers; the ATTDEFs of every block), the multi-line one of R2018
    included."""
    dwg_path = _pair(samples, dwg_name)
    dd = _load_dwg(dwg_path, Config(), None)
    mine, theirs = _attributes(dd.doc), _attributes(ezdxf.readfile(str(dwg_path.with_name(dxf_name))))
    assert mine == theirs
    assert len(mine[0]) >= 4 and len(mine[1]) >= 5  # the sample's block references carry attributes
