"""Internal forces of the parts and the drum shaft's load.

* A lever pinned at one end, pushed by the drum in between and loaded at the
  other end is a simply supported beam with a point load: M_max = W·a·b/L
  under the load (Beer & Johnston, *Mechanics of Materials*, 7th ed., ch. 5,
  shear and bending-moment diagrams; Shigley's MED 10th ed., Table A-9,
  simple supports, intermediate load; table number from memory).
* Invariants on every catalogue drawing: dM/ds = −V along a segment between
  the points where forces act (the beam relation, with our sign convention:
  M is the moment of the forces beyond the section, V the shear turned 90°
  counter-clockwise from the segment), and the drum shaft's load recomputed
  from the loads, springs and frame pivots (the whole brake's balance).
"""

from __future__ import annotations

import math
from itertools import pairwise

import pytest
from common import CATALOGUE, block_brake, winch_two_shoe

import dxfcheck


def _analyse(tmp_path, sketch, mu):
    path = tmp_path / "s.dxf"
    sketch.save(path)
    return dxfcheck.analyse(path, mu=mu)


def test_simply_supported_lever(tmp_path):
    """Block brake with a = 0: lever from the pivot O(-200, 200) through the
    block's contact C(0, 200) to the load P = 1 kN down at E(300, 200).  The
    lever's moment balance about O gives N·200 = P·500, N = 2500 N (the
    friction μN runs along the lever, a = 0).  As a beam: supports O and E
    (reaction P), span L = 500, load W = N at a = 200, b = 300:

        M(C) = W·a·b/L = 2500·200·300/500 = 300 000 N·mm,

    sagging; in our convention (moment of the forces beyond C, towards E)
    P's clockwise moment about C: −300 000 N·mm.  Shear: R_y = N − P =
    1500 N between O and C, −P = −1000 N between C and E.  Axial: the drum
    drags the block along its surface's motion, +x for a clockwise drum (its
    top moves right), so O–C is in tension μN = 750 N (compression for
    counter-clockwise)."""
    sol = _analyse(tmp_path, block_brake(r=200, l=500, x=200, a=0, effort="1 kN"), 0.3)
    for case in sol.cases:
        lever = case.part("lever")
        assert lever.tree
        at_c = [st for st in lever.stations if st.at_mm == pytest.approx((0.0, 200.0), abs=1e-9)]
        assert at_c
        for st in at_c:
            assert st.moment_Nmm == pytest.approx(-2500 * 200 * 300 / 500, rel=1e-9)
        worst = lever.worst
        assert abs(worst.moment_Nmm) == pytest.approx(300_000, rel=1e-9)
        left = [st for st in lever.stations if st.at_mm[0] < 0 or st.end_mm[0] <= 0.0]
        right = [st for st in lever.stations if st.start_mm[0] >= 0.0]
        tension = 750 if case.direction == "cw" else -750
        for st in left:
            assert st.shear_N == pytest.approx(1500, rel=1e-9)
            assert st.axial_N == pytest.approx(tension, rel=1e-9)
        for st in right:
            assert st.shear_N == pytest.approx(-1000, rel=1e-9)
            assert st.axial_N == pytest.approx(0, abs=1e-9)
        # the pivot and the free end carry no moment
        ends = [st for st in lever.stations if st.at_mm[0] in (-200.0, 300.0)]
        assert all(st.moment_Nmm == pytest.approx(0, abs=1e-6) for st in ends)


def test_single_block_loads_the_shaft_down_and_against_the_drag(tmp_path):
    """The block presses the drum down with N = 2500 N and drags it against
    its motion with μN = 750 N: a clockwise drum's top moves right, so the
    friction on the drum points left."""
    sol = _analyse(tmp_path, block_brake(r=200, l=500, x=200, a=0, effort="1 kN"), 0.3)
    assert sol.case("cw").drum_load_N == pytest.approx((-750, -2500), rel=1e-9)
    assert sol.case("ccw").drum_load_N == pytest.approx((750, -2500), rel=1e-9)


def test_winch_lever_moment_at_the_shoe_pin(tmp_path):
    """Winch: the floating crank's moment balance about T2 gives the tie rod
    force T = 1800·330/100 = 5940 N, whatever the shoes do.  The rod pulls
    the left lever's top T1(-250, 520) towards C, +x.  On the segment from
    S1(-250, 0) up to T1 the only force beyond S1 is that pull, 520 above:
    M = (0, 520) × (5940, 0) = −520·5940 N·mm, no axial force."""
    sol = _analyse(tmp_path, winch_two_shoe(), 0.35)
    for case in sol.cases:
        lever = case.part("left lever")
        up = [st for st in lever.stations if st.start_mm == pytest.approx((-250.0, 0.0)) and st.at_mm[1] == 0.0]
        assert up
        for st in up:
            assert st.moment_Nmm == pytest.approx(-520 * 5940, rel=1e-9)
            assert st.axial_N == pytest.approx(0, abs=1e-6)
            # the shear axis is the segment's direction (0, 1) turned 90° counter-clockwise: (−1, 0)
            assert st.shear_N == pytest.approx(-5940, rel=1e-9)


@pytest.fixture(scope="module")
def catalogue(tmp_path_factory):
    folder = tmp_path_factory.mktemp("strength")
    out = {}
    for k, (name, (build, mu)) in enumerate(CATALOGUE.items()):
        path = folder / f"c{k}.dxf"
        build().save(path)
        out[name] = dxfcheck.analyse(path, mu=mu)
    return out


@pytest.mark.parametrize("name", list(CATALOGUE))
def test_moment_slope_is_minus_the_shear(catalogue, name):
    sol = catalogue[name]
    for case in sol.cases:
        for d in case.parts:
            assert d.tree, d.part
            st = d.stations
            scale = max([1.0, *(abs(s.moment_Nmm) for s in st)])
            for a, b in pairwise(st):
                if a.segment != b.segment:
                    continue
                ex, ey = b.end_mm[0] - b.start_mm[0], b.end_mm[1] - b.start_mm[1]
                length = math.hypot(ex, ey)
                ds = ((b.at_mm[0] - a.at_mm[0]) * ex + (b.at_mm[1] - a.at_mm[1]) * ey) / length
                if ds <= 0:
                    continue  # both sides of one point: the jump a force makes
                assert b.moment_Nmm - a.moment_Nmm == pytest.approx(-a.shear_N * ds, abs=1e-9 * scale)
                assert b.shear_N == pytest.approx(a.shear_N, abs=1e-9 * scale)


@pytest.mark.parametrize("name", list(CATALOGUE))
def test_shaft_load_from_the_whole_brake(catalogue, name):
    """The whole brake in balance: the drum's load = the loads + the springs'
    forces on parts − the pins' forces on the frame (each pin's balance
    passes the band pulls on)."""
    sol = catalogue[name]
    for case in sol.cases:
        fx = sum(ld.fx_N for ld in case.loads) + sum(e.force_N[0] for sp in case.springs for e in sp.ends if e.part)
        fy = sum(ld.fy_N for ld in case.loads) + sum(e.force_N[1] for sp in case.springs for e in sp.ends if e.part)
        for p in case.pins:
            for a in p.attachments:
                if a.body == "frame":  # the pin's force on the frame
                    fx -= a.fx_N
                    fy -= a.fy_N
        scale = max(1.0, math.hypot(fx, fy), *(p.max_force_N for p in case.pins))
        assert case.drum_load_N == pytest.approx((fx, fy), abs=1e-8 * scale)
