"""FOSSEE Scilab Textbook Companion, book 764: the published Scilab solution
code (FOSSEE project, IIT Bombay) for the worked examples of a machine-design
textbook, probably V. B. Bhandari, *Design of Machine Elements* (Tata
McGraw-Hill), ch. 12, brakes; the book's identity and edition are not
confirmed.  The examples give numbers, not drawings: each is drawn here in the
project's layer convention, read, solved and compared with the printed
answer at a tolerance matching its rounding (../shared/REFERENCES.md [seen]).

What each example says about directions, and what is checked:

* Example 12.4, single block brake (``common.block_brake``: block on top of
  the drum, lever pivoted at O to the left, O a = 50 above the friction line,
  effort pushing down at the lever's right end).  The printed answer gives
  P = 1303.57 N "in one drum direction and 1553.57 N in the other" without
  naming them.  In our drawing a clockwise drum moves its top surface right
  (+x) and drags the block with it; that friction, acting below O, turns
  the lever counter-clockwise, with the normal force and against the effort:
  P·l = N(x + μa), the larger 1553.57 N.  Counter-clockwise the friction
  points left and helps the effort: P·l = N(x − μa), 1303.57 N.  The
  drum pushes the block up, away from its axis, in both.
* Example 12.7, a symmetric pivoted shoe, pin at the ideal distance: both
  directions give the printed answers; the friction on the shoe runs with
  the drum surface at the shoe's middle (``handcalc.check_symmetric_pivoted_shoe``).
* Example 12.8, internal two-shoe brake, both hinges on the right at
  (86.6, ±50), actuating forces pushing the free ends (left) outward.  The
  upper shoe is self-energising when the drum turns clockwise: the actuating
  force (0, P) at (−100.9, 20) turns the shoe clockwise about its hinge
  (moment −187.5·P), and a clockwise drum's friction on the lining at polar
  angle θ, along (sinθ, −cosθ), has the moment r·(−125 + 100·cos(θ − 30°))
  about the hinge, negative over the lining's 30°-150°: the same sense.
  Counter-clockwise the lower shoe, its mirror image, is.  The printed
  pa = 1 MPa is on the self-energising shoe.
* Example 12.10, differential band: the formula W·L = T2·a − T1·c puts the
  tight end on the short arm c (pin C, the wrap's left end), tight when the
  drum surface moves away from C, i.e. clockwise; counter-clockwise A is
  tight, W·L = T1'·(a − c·e^(−μθ)), and the brake is much weaker.
"""

from __future__ import annotations

import math

import pytest
from common import block_brake, differential_band, internal_hinged_shoe
from handcalc import check_symmetric_pivoted_shoe

import dxfcheck
from dxfcheck.core.directions import Direction
from dxfcheck.core.findings import Code
from dxfcheck.output.sketch import Sketch


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "brake.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def _check_block_directions(case):
    """The block of ``block_brake`` sits on top of the drum: the drum pushes
    it up (+y) and drags it along its top surface, which moves right (+x)
    when the drum turns clockwise and left when counter-clockwise."""
    (block,) = case.shoes
    surface_x = -Direction(case.direction).sign  # +1 clockwise (sign is +1 for ccw)
    tol = 1e-9 * block.normal_N
    assert block.normal_force_N == pytest.approx((0.0, block.normal_N), abs=tol)
    assert block.friction_force_N == pytest.approx((surface_x * block.friction_resultant_N, 0.0), abs=tol)


# --- Example 12.4: single block brake --------------------------------------------


def test_example_12_4(tmp_path):
    """Example 12.4: T = 250 N·m, μ = 0.35, r = 200, l = 500, x = 200, a = 50
    give N = 3571.4 N and P = 1303.57 N in one drum direction, 1553.57 N in
    the other.  Printed answers are rounded to 5-6 figures."""
    found = {}
    for P in (1303.57, 1553.57):
        sol = _solve(tmp_path, block_brake(r=200, l=500, x=200, a=50, effort=f"{P} N"), 0.35)
        # the published P holds the required torque in exactly one direction
        hits = [c for c in sol.cases if c.torque_Nm == pytest.approx(250.0, rel=2e-5)]
        assert len(hits) == 1
        assert hits[0].shoes[0].normal_N == pytest.approx(3571.4, rel=2e-5)
        found[P] = hits[0].direction
        _check_block_directions(hits[0])
    assert found[1303.57] != found[1553.57]
    # friction helps the effort counter-clockwise: P = N(x − μa)/l = 1303.57 (module docstring)
    assert (found[1303.57], found[1553.57]) == (Direction.CCW, Direction.CW)


def test_example_12_4_effort_for_the_torque(tmp_path):
    """Example 12.4 the other way round: for T = 250 N·m the effort is
    1303.57 N in one direction and 1553.57 N in the other (printed to 6
    figures); P·l = N(x ∓ μa), N = T/(μr)."""
    sk = block_brake(r=200, l=500, x=200, a=50, effort=None)
    sol = _solve(tmp_path, sk, 0.35, torque_Nm=250.0)
    efforts = sorted(c.loads[0].force_N for c in sol.cases)
    assert efforts == [pytest.approx(1303.57, rel=5e-6), pytest.approx(1553.57, rel=5e-6)]
    for c in sol.cases:
        assert c.torque_Nm == pytest.approx(250.0, rel=1e-12)
        assert c.shoes[0].normal_N == pytest.approx(250e3 / (0.35 * 200), rel=1e-12)
        assert c.effort_scale == pytest.approx(c.loads[0].force_N, rel=1e-12)  # drawn as 1 N
        _check_block_directions(c)
        # the effort keeps the drawn direction, down at the lever's end
        assert (c.loads[0].fx_N, c.loads[0].fy_N) == pytest.approx((0.0, -c.loads[0].force_N), abs=1e-9)
    # the energising direction (counter-clockwise, module docstring) needs the smaller effort
    assert sol.case("ccw").loads[0].force_N == pytest.approx(1303.57, rel=5e-6)
    assert sol.case("cw").loads[0].force_N == pytest.approx(1553.57, rel=5e-6)


# --- Example 12.7: symmetric pivoted shoe ----------------------------------------


@pytest.mark.parametrize("direction", ["cw", "ccw"])
def test_example_12_7_pivoted_shoe(tmp_path, direction):
    """Example 12.7: 2θ = 100°, D = 500, b = 100, μ = 0.2, pa = 0.5 MPa ->
    a = 280.59, T = 957.56 N·m per shoe, Rx = 17063 N, Ry = 3413 N.
    Printed to 5 figures."""
    check_symmetric_pivoted_shoe(
        tmp_path,
        dict(semi_deg=50, r=250, b=100, mu=0.2, pa=0.5, pair=False),
        dict(a=280.59, torque=957.56, rx=17063, ry=3413),
        direction,
    )


# --- Example 12.8: internal two-shoe brake ----------------------------------------


def example_12_8() -> Sketch:
    """Example 12.8 geometry: r = 125, hinges at (86.6, ±50) (a = 100),
    linings θ = 0..120° from the hinge line, the actuating force P at arm
    c = 187.5 about each hinge."""
    sk = Sketch()
    sk.drum(0, 0, 125)
    internal_hinged_shoe(
        sk,
        r=125,
        hinge=(86.6, 50),
        phi_from=30,
        phi_to=150,
        act=(-100.9, 20),
        push=(0, 1),
        effort="2089.8 N",
        name="upper",
    )
    internal_hinged_shoe(
        sk,
        r=125,
        hinge=(86.6, -50),
        phi_from=210,
        phi_to=330,
        act=(-100.9, -20),
        push=(0, -1),
        effort="2089.8 N",
        name="lower",
    )
    return sk


def test_example_12_8(tmp_path):
    """Example 12.8: b = 40, pa = 1 MPa on the self-energising shoe,
    μ = 0.32 -> P = 2089.8 N, total T = 434.8 N·m.  Run here with
    P = 2089.8 N."""
    sol = _solve(tmp_path, example_12_8(), 0.32)
    for case in sol.cases:
        energising = max(case.shoes, key=lambda s: s.torque_Nm)
        assert energising.peak_line_load_N_per_mm / 40 == pytest.approx(1.0, rel=2e-4)
        assert case.torque_Nm == pytest.approx(434.8, rel=3e-4)
        # the upper shoe energises clockwise, the lower counter-clockwise (module docstring)
        assert energising.part == {"cw": "upper shoe", "ccw": "lower shoe"}[case.direction]
        assert all(s.torque_Nm > 0 for s in case.shoes)  # both shoes brake


# --- Example 12.10: differential band ---------------------------------------------


def test_example_12_10(tmp_path):
    """Example 12.10: T1 = 15000 N, μ = 0.25, r = 300, wrap 240°, a = 200,
    c = 50, L = 950 -> T2 = 5263.8 N, W = 318.69 N, T = 2920.86 N·m; not
    self-locking.  Differential band W·L = T2·a − T1·c; self-locks when
    a/c ≤ e^(μθ) (Mott 4th ed., §22-15).

    Direction: the formula has the tight end on the short arm c (pin C, the
    wrap's left end), whose pull helps the effort.  The drum surface moves
    away from C when the drum turns clockwise (its top moves right): the
    clockwise case.  Counter-clockwise, A is tight and the brake is weaker."""
    mu, theta = 0.25, math.radians(240)
    t1 = 15000.0
    t2 = t1 / math.exp(mu * theta)
    w = (t2 * 200 - t1 * 50) / 950
    assert w == pytest.approx(318.69, rel=2e-5)
    sol = _solve(tmp_path, differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort=f"{w!r} N"), mu)
    assert sol.mechanism.family == "differential band brake"
    case = sol.case("cw")
    (band,) = case.bands
    assert (band.tight_pin, band.slack_pin) == ("C", "A")
    assert band.tight_N == pytest.approx(t1, rel=1e-9)
    assert band.slack_N == pytest.approx(5263.8, rel=2e-5)
    assert case.torque_Nm == pytest.approx(2920.86, rel=2e-5)
    assert case.critical_mu == pytest.approx(math.log(200 / 50) / theta, rel=1e-9)
    assert not any(f.code is Code.SELF_LOCKING for f in sol.findings)
    # counter-clockwise: A tight, its pull against the effort:
    # W·L = T1'·a − T2'·c with T2' = T1'·e^(−μθ), T = (T1' − T2')·r
    other = sol.case("ccw")
    (band_ccw,) = other.bands
    assert (band_ccw.tight_pin, band_ccw.slack_pin) == ("A", "C")
    t1_ccw = w * 950 / (200 - 50 * math.exp(-mu * theta))
    assert band_ccw.tight_N == pytest.approx(t1_ccw, rel=1e-9)
    assert other.torque_Nm == pytest.approx(t1_ccw * (1 - math.exp(-mu * theta)) * 0.3, rel=1e-9)
    assert 0 < other.torque_Nm < case.torque_Nm
    assert other.critical_mu is None
