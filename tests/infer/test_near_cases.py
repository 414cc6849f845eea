"""Inference against hand-labelled drawings: the near cases of issue 16.

Each drawing is drafted here entity by entity (ezdxf), and the expected role
of every circle and arc is written down by hand from the drafting rules in
the README ("Drafted drawings"); no published source is involved.

The base drawing: a drum of radius 100 at the origin, a lever drawn as a
centre line from the pivot P(-200, 150) to the pin Q(300, 150), the shoe's
centre line from (0, 150) down to the lining face at (0, 100), the lining an
arc from 75° to 105° on the drum, and an arm from Q up to (300, 400).
"""

from __future__ import annotations

import ezdxf
import pytest

from dxfcheck.core.config import Config, InferSettings, Role
from dxfcheck.core.findings import Code
from dxfcheck.pipeline import read_skeleton

P, Q = (-200.0, 150.0), (300.0, 150.0)


def _doc():
    doc = ezdxf.new("R2010", units=4)
    doc.linetypes.add("CENTER", pattern=[50.0, 32.0, -6.0, 6.0, -6.0])
    doc.linetypes.add("HIDDEN", pattern=[9.0, 6.0, -3.0])
    doc.layers.add("CL", linetype="CENTER")
    doc.layers.add("HID", linetype="HIDDEN")
    return doc


def _base(doc, *, frame=True, lining=True):
    msp = doc.modelspace()
    msp.add_circle((0, 0), 100)
    msp.add_line(P, Q, dxfattribs={"layer": "CL"})
    msp.add_line((0, 150), (0, 100), dxfattribs={"layer": "CL"})
    msp.add_line(Q, (300, 400), dxfattribs={"layer": "CL"})
    if lining:
        msp.add_arc((0, 0), 100, 75, 105)
    msp.add_circle(P, 10)
    msp.add_circle(Q, 8)
    if frame:
        h = msp.add_hatch()
        h.paths.add_polyline_path([(-240, 120), (-160, 120), (-160, 140), (-240, 140)], is_closed=True)
    return msp


def _read(tmp_path, doc, **infer):
    path = tmp_path / "near.dxf"
    doc.saveas(path)
    return read_skeleton(path, Config(infer=InferSettings(**infer)))


def _roles(d, role):
    return [(c.center, round(c.radius_mm, 9)) for c in d.circles_of(role)]


def test_base_drawing(tmp_path):
    doc = _doc()
    _base(doc)
    d = _read(tmp_path, doc)
    assert _roles(d, Role.DRUM) == [((0.0, 0.0), 100.0)]
    assert _roles(d, Role.PIVOT) == [(P, 10.0)]
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    (shoe,) = [a for a in d.arcs if a.role is Role.SHOE]
    assert (shoe.radius_mm, shoe.start_deg, shoe.end_deg) == pytest.approx((100, 75, 105))
    assert len(d.paths_of(Role.LINK)) == 3


def test_pin_inside_a_boss_circle_is_the_pin(tmp_path):
    """Q drawn as a hole of radius 8 inside a boss of radius 16: the pin is
    the hole (diameter 16), the boss is no pin and no finding."""
    doc = _doc()
    _base(doc).add_circle(Q, 16)
    d = _read(tmp_path, doc)
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    assert Code.HOLE_SIZES_DIFFER not in {f.code for f in d.findings}


def test_holes_of_slightly_different_diameters_are_one_pin(tmp_path):
    """Q drawn as 16 mm in the lever and 16.6 mm in the arm: one pin, the
    smaller diameter, with M235 naming both."""
    doc = _doc()
    _base(doc).add_circle(Q, 8.3)
    d = _read(tmp_path, doc)
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    (f,) = [f for f in d.findings if f.code is Code.HOLE_SIZES_DIFFER]
    assert "16, 16.6" in f.message


def test_lining_and_backing_plate_arcs(tmp_path):
    """The lining drawn as two concentric arcs (face at r = 100, backing plate
    at 108) with its ends: only the face is the shoe's contact arc."""
    doc = _doc()
    msp = _base(doc)
    msp.add_arc((0, 0), 108, 75, 105)
    d = _read(tmp_path, doc)
    shoes = [a for a in d.arcs if a.role is Role.SHOE]
    assert [(a.radius_mm, a.start_deg, a.end_deg) for a in shoes] == [pytest.approx((100, 75, 105))]


def test_drum_with_hub_and_shaft_circles(tmp_path):
    """Hub (r 40) and shaft (r 20) circles concentric with the drum, and a
    centre mark across the drum: one drum, no pins there, no extra part."""
    doc = _doc()
    msp = _base(doc)
    msp.add_circle((0, 0), 40)
    msp.add_circle((0, 0), 20)
    msp.add_line((-115, 0), (115, 0), dxfattribs={"layer": "CL"})
    msp.add_line((0, -115), (0, 115), dxfattribs={"layer": "CL"})
    d = _read(tmp_path, doc)
    assert _roles(d, Role.DRUM) == [((0.0, 0.0), 100.0)]
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    assert len(d.paths_of(Role.LINK)) == 3


def test_two_circles_that_might_be_the_drum(tmp_path):
    """A second circle (r 50 at (600, 0)) with an arc on it: M231 names both;
    the larger of two equally supported candidates is taken."""
    doc = _doc()
    msp = _base(doc)
    msp.add_circle((600, 0), 50)
    msp.add_arc((600, 0), 50, 10, 40)
    d = _read(tmp_path, doc)
    assert _roles(d, Role.DRUM) == [((0.0, 0.0), 100.0)]
    (f,) = [f for f in d.findings if f.code is Code.DRUM_AMBIGUOUS]
    assert "r 100" in f.message and "r 50" in f.message


def test_no_lining_arc_no_drum(tmp_path):
    doc = _doc()
    _base(doc, lining=False)
    d = _read(tmp_path, doc)
    assert d.circles_of(Role.DRUM) == ()
    assert Code.NO_LINING_CIRCLE in {f.code for f in d.findings}


def test_no_frame_drawn_pivot_guessed_and_hidden_lines_ignored(tmp_path):
    """Without any frame geometry, the hole one part alone reaches (P) is
    taken as a pivot with M233; a hidden line through P is no second part."""
    doc = _doc()
    msp = _base(doc, frame=False)
    msp.add_line((-260, 150), (-140, 150), dxfattribs={"layer": "HID"})
    d = _read(tmp_path, doc)
    assert _roles(d, Role.PIVOT) == [(P, 10.0)]
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    (f,) = [f for f in d.findings if f.code is Code.PIVOT_GUESSED]
    assert "(-200, 150)" in f.message


def test_frame_named_by_layer(tmp_path):
    """A frame bracket outline on a layer named in [infer] frame_layers
    makes the hole it touches a pivot (no hatch)."""
    doc = _doc()
    msp = _base(doc, frame=False)
    msp.add_lwpolyline([(-240, 100), (-160, 100), (-160, 140), (-240, 140)], close=True, dxfattribs={"layer": "BASE"})
    d = _read(tmp_path, doc, frame_layers=("BASE",))
    assert _roles(d, Role.PIVOT) == [(P, 10.0)]
    assert Code.PIVOT_GUESSED not in {f.code for f in d.findings}


def test_centre_layer_named_in_the_project_file(tmp_path):
    """Continuous lines on a layer named in [infer] centre_layers are centre
    lines."""
    doc = ezdxf.new("R2010", units=4)
    msp = doc.modelspace()
    msp.add_circle((0, 0), 100)
    msp.add_arc((0, 0), 100, 75, 105)
    msp.add_line(P, Q, dxfattribs={"layer": "AXIS"})
    msp.add_line((0, 150), (0, 100), dxfattribs={"layer": "AXIS"})
    msp.add_circle(P, 10)
    d = _read(tmp_path, doc, centre_layers=("AXIS",))
    assert len(d.paths_of(Role.LINK)) == 2
    assert _roles(d, Role.PIVOT) == [(P, 10.0)]


# --- style 2: outlines with holes ---------------------------------------------

R = (300.0, 450.0)


def _bracket(msp, c, half=20.0, hatched=True, layer="0"):
    pts = [
        (c[0] - half, c[1] - half),
        (c[0] + half, c[1] - half),
        (c[0] + half, c[1] + half),
        (c[0] - half, c[1] + half),
    ]
    msp.add_lwpolyline(pts, close=True, dxfattribs={"layer": layer})
    if hatched:
        msp.add_hatch().paths.add_polyline_path(pts, is_closed=True)


def _outlined(doc, *, frame=True):
    """The lever with its shoe web as one closed polyline holding P and Q;
    the tie rod Q-R as two parallel lines with an eye arc at each end; P and
    R also in frame brackets; a border round the whole sheet."""
    msp = doc.modelspace()
    msp.add_circle((0, 0), 100)
    msp.add_arc((0, 0), 100, 75, 105)
    lever = [(-220, 165), (-220, 135), (-15, 135), (-15, 100), (15, 100), (15, 135), (320, 135), (320, 165)]
    msp.add_lwpolyline(lever, close=True)
    msp.add_line((286, 150), (286, 450))
    msp.add_line((314, 150), (314, 450))
    msp.add_arc(Q, 14, 180, 360)
    msp.add_arc(R, 14, 0, 180)
    for c, r, n in ((P, 10, 2), (Q, 8, 2), (R, 8, 2)):
        for _ in range(n):
            msp.add_circle(c, r)
    if frame:
        _bracket(msp, P)
        _bracket(msp, R)
    msp.add_lwpolyline([(-400, -300), (600, -300), (600, 700), (-400, 700)], close=True, dxfattribs={"layer": "BORDER"})
    return msp


def test_outlines_tie_rod_with_eyes_and_frame_brackets(tmp_path):
    """Hand-labelled: P and R pivots (in a part and a hatched bracket), Q a
    pin joining the lever and the tie rod (drawn as two lines and two eye
    arcs), the border no part; two parts, so two centreline pieces; the
    lever's piece ends on the lining arc's middle (0, 100)."""
    doc = _doc()
    _outlined(doc)
    d = _read(tmp_path, doc)
    assert d.skeleton_source == "geometry (outlines)"
    assert _roles(d, Role.DRUM) == [((0.0, 0.0), 100.0)]
    assert _roles(d, Role.PIVOT) == [(P, 10.0), (R, 8.0)]
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    links = d.paths_of(Role.LINK)
    assert len(links) == 2
    lever, rod = links
    assert set(lever.points[:2]) == {P, Q}
    assert lever.points[2] == pytest.approx((0.0, 100.0), abs=1e-9)
    assert len(lever.points) == 3
    assert set(rod.points) == {Q, R}
    assert Code.TWO_FORCE_OR_LEVER not in {f.code for f in d.findings}  # a rod is a bar between its pins


def test_outlines_broad_two_pin_part_may_be_a_lever(tmp_path):
    """A plate instead of the tie rod, holding Q and R at its left edge and
    reaching 300 mm to the right: solved as a two-force member between Q and
    R, with M238 saying it may be a lever (most of it is off the bar)."""
    doc = _doc()
    msp = _outlined(doc)
    for e in list(msp.query("LINE")) + [a for a in msp.query("ARC") if a.dxf.radius == 14]:
        msp.delete_entity(e)
    msp.add_lwpolyline([(286, 136), (600, 136), (600, 464), (286, 464)], close=True)
    d = _read(tmp_path, doc)
    (f,) = [f for f in d.findings if f.code is Code.TWO_FORCE_OR_LEVER]
    assert "(300, 150)" in f.message and "(300, 450)" in f.message


def test_outlines_hole_in_one_part_only(tmp_path):
    """A hole in the lever alone, with a frame drawn elsewhere: loose or a
    pivot whose bracket is missing; M236, and it is no pin."""
    doc = _doc()
    _outlined(doc).add_circle((100, 150), 5)
    d = _read(tmp_path, doc)
    assert (100.0, 150.0) not in [c.center for c in d.circles]
    (f,) = [f for f in d.findings if f.code is Code.HOLE_ONE_PART]
    assert "(100, 150)" in f.message


def test_outlines_without_a_frame_guess_the_pivots(tmp_path):
    """No bracket at all: the holes in one part only (P in the lever, R in
    the rod) are taken as pivots, with M233 naming them."""
    doc = _doc()
    _outlined(doc, frame=False)
    d = _read(tmp_path, doc)
    assert _roles(d, Role.PIVOT) == [(P, 10.0), (R, 8.0)]
    (f,) = [f for f in d.findings if f.code is Code.PIVOT_GUESSED]
    assert "(-200, 150)" in f.message and "(300, 450)" in f.message


def test_outlines_frame_named_by_layer_not_hatched(tmp_path):
    """Brackets on a layer named in [infer] frame_layers, not hatched, hold
    the pivots just as well."""
    doc = _doc()
    msp = _outlined(doc, frame=False)
    _bracket(msp, P, hatched=False, layer="BASE")
    _bracket(msp, R, hatched=False, layer="BASE")
    d = _read(tmp_path, doc, frame_layers=("BASE",))
    assert _roles(d, Role.PIVOT) == [(P, 10.0), (R, 8.0)]
    assert Code.PIVOT_GUESSED not in {f.code for f in d.findings}


# --- style 1: parts as blocks -------------------------------------------------


def test_blocks_holes_belong_to_the_part_that_draws_them(tmp_path):
    """Hand-labelled: a lever block (outline holding P and Q, a hole at each)
    inserted mirrored, and an arm block inserted turned 90° at Q (local
    (x, y) -> world Q + (-y, x)), whose wide outline covers P's hole without
    drawing one there.  Q is a pin (both blocks draw a hole there); P is the
    lever's alone, held by the hatched frame block under it (no hole of its
    own): a pivot; the arm does not join P although it covers it."""
    doc = _doc()
    msp = doc.modelspace()
    msp.add_circle((0, 0), 100)
    msp.add_arc((0, 0), 100, 75, 105)
    lever = doc.blocks.new("LEVER")  # drawn mirrored: local x = -world x
    pts = [(220, 165), (220, 135), (15, 135), (15, 100), (-15, 100), (-15, 135), (-320, 135), (-320, 165)]
    lever.add_lwpolyline(pts, close=True)
    lever.add_circle((200, 150), 10)
    lever.add_circle((-300, 150), 8)
    msp.add_blockref("LEVER", (0, 0), dxfattribs={"xscale": -1})
    arm = doc.blocks.new("ARM")  # along local x from Q; turned 90°: up from Q, with a wide foot over P
    arm.add_lwpolyline([(-20, -20), (300, -20), (300, 520), (-20, 520)], close=True)
    arm.add_circle((0, 0), 8)
    arm.add_circle((250, 0), 8)
    msp.add_blockref("ARM", Q, dxfattribs={"rotation": 90})
    frame = doc.blocks.new("BASE")
    _bracket(frame, P)
    msp.add_blockref("BASE", (0, 0))
    msp.add_line((300, 400), (360, 400), dxfattribs={"layer": "LOAD"})  # the effort at the arm's eye
    msp.add_text("500 N", dxfattribs={"layer": "LOAD"}).set_placement((370, 400))
    d = _read(tmp_path, doc)
    assert d.skeleton_source == "geometry (blocks)"
    pivots, pins = _roles(d, Role.PIVOT), _roles(d, Role.PIN)
    assert [(pytest.approx(c), r) for c, r in pivots] == [(P, 10.0)]
    assert [(pytest.approx(c), r) for c, r in pins] == [(Q, 8.0)]
    lever_link, arm_link = d.paths_of(Role.LINK)
    assert len(lever_link.points) == 3  # P, Q and the lining's middle
    assert {tuple(round(v, 9) for v in q) for q in arm_link.points} == {Q, (300.0, 400.0)}  # Q and the load
    assert Code.HOLE_ONE_PART in {f.code for f in d.findings}  # the arm's eye is in the arm alone


def _rounded_bracket(msp, c, *, clockwise, half=20.0):
    """A frame bracket round the hole at ``c``: a 2·half wide block under a
    half-circle of radius ``half`` centred on the hole, drawn as a closed
    polyline (bulge 1 over the top) and hatched by an edge path of lines and
    one arc edge.  With ``clockwise`` the hatch's boundary runs up the left
    side, over the top from 180° to 0° (a clockwise arc edge) and down the
    right side; otherwise the other way round (a counter-clockwise arc edge,
    0° to 180°)."""
    x, y = c
    bl, br, tr, tl = (x - half, y - half), (x + half, y - half), (x + half, y), (x - half, y)
    msp.add_lwpolyline([(*bl, 0), (*br, 0), (*tr, 1.0), (*tl, 0)], format="xyb", close=True)
    edges = msp.add_hatch().paths.add_edge_path()
    if clockwise:
        edges.add_line(bl, tl)
        edges.add_arc(c, half, 0.0, 180.0, ccw=False)  # ezdxf: angles in ccw order, run from 180° to 0°
        edges.add_line(tr, br)
        edges.add_line(br, bl)
    else:
        edges.add_line(bl, br)
        edges.add_line(br, tr)
        edges.add_arc(c, half, 0.0, 180.0, ccw=True)
        edges.add_line(tl, bl)


def _hatch_arc_flags(path):
    """The (72 edge type, 73 flag) of every arc edge in the file's HATCH
    entities, read from the group codes as written (DXF Reference, HATCH
    boundary path data: edge type 72 = 2 for an arc, whose group 73 is the
    "is counterclockwise flag")."""
    lines = path.read_text().splitlines()
    pairs = [(a.strip(), b.strip()) for a, b in zip(lines[::2], lines[1::2], strict=False)]
    flags, in_hatch, arc = [], False, False
    for code, value in pairs:
        if code == "0":
            in_hatch, arc = value == "HATCH", False
        elif in_hatch and code == "72":
            arc = value == "2"
        elif in_hatch and arc and code == "73":
            flags.append(int(value))
            arc = False
    return flags


@pytest.mark.parametrize("clockwise", [True, False])
def test_hatch_boundary_arc_runs_in_its_own_direction(tmp_path, clockwise):
    """The hatch boundary of a rounded bracket is read in its own order: the
    arc edge starts where the edge before it ends (a clockwise edge at its
    end angle), so the boundary is a simple polygon whose area is the
    block's plus the inscribed half-circle's.  Hand calculation: the block
    40 × 20 = 800 mm²; the half circle in n = 180°/5° = 36 chords of 5°
    (ARC_CHORD_DEG), each a triangle of ½ r² sin 5° with r = 20:
    36 · ½ · 400 · sin 5° = 627.52 mm² (area of an inscribed polygon,
    elementary geometry)."""
    import math

    from shapely import Polygon

    from dxfcheck.infer.linework import ARC_CHORD_DEG, read_linework

    doc = _doc()
    _rounded_bracket(doc.modelspace(), R, clockwise=clockwise)
    path = tmp_path / "bracket.dxf"
    doc.saveas(path)
    assert _hatch_arc_flags(path) == [0 if clockwise else 1]
    lw = read_linework(ezdxf.readfile(path), 1.0, str(path))
    (boundary,) = [p for p in lw.paths if p.hatch]
    n = round(180.0 / ARC_CHORD_DEG)
    want = 40.0 * 20.0 + n * 0.5 * 20.0**2 * math.sin(math.radians(ARC_CHORD_DEG))
    poly = Polygon(boundary.points)
    assert poly.is_valid and poly.exterior.is_simple
    assert poly.area == pytest.approx(want, rel=1e-9)
    assert boundary.closed and len(boundary.points) == n + 3 + 1  # 36 chords, 3 line starts, closed
    # the boundary keeps its drawn order: clockwise overall when the arc edge is
    assert poly.exterior.is_ccw is (not clockwise)
    top = max(boundary.points, key=lambda p: p[1])
    assert top == pytest.approx((R[0], R[1] + 20.0), abs=1e-9)


def test_frame_bracket_hatched_with_a_clockwise_arc_holds_its_pivot(tmp_path):
    """The outlined drawing with R's square bracket replaced by a rounded
    one whose hatch boundary has a clockwise arc edge: R is still a pivot
    (a hole the hatched frame holds), as in the hand-labelled drawing."""
    doc = _doc()
    msp = _outlined(doc, frame=False)
    _bracket(msp, P)
    _rounded_bracket(msp, R, clockwise=True)
    d = _read(tmp_path, doc)
    assert d.skeleton_source == "geometry (outlines)"
    assert _roles(d, Role.PIVOT) == [(P, 10.0), (R, 8.0)]
    assert _roles(d, Role.PIN) == [(Q, 8.0)]
    assert Code.HOLE_ONE_PART not in {f.code for f in d.findings}
