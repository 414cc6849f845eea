"""B. K. Sarkar, *Theory of Machines*, Tata McGraw-Hill, ch. 10 (brakes),
Illustration 3, p. 270, checked against its published solution code
(../shared/REFERENCES.md [seen]): a double-block brake set by a spring,
S = 3500 N at arm l = 450 on each of two levers, x = 200, a = 140, drum
Ø360, contact angle 100°, μ = 0.4, used through the equivalent coefficient
μ' = 0.4489.  Answers: Ft1 = μ'S·l/(x + μ'a) = 2690 N,
Ft2 = μ'S·l/(x − μ'a) = 5156 N, T = (Ft1 + Ft2)·r = 1412.2 N·m.

Directions.  The printed solution names the two friction forces but we did
not see which block of the figure carries which; we check it from the
physics of our drawing (``common.double_block_spring_pair``): two vertical
levers pivoted below the drum at O = (∓(r + a), −x), their blocks at the
drum's left and right ends (y = 0), the spring pulling the lever tops
together.  A clockwise drum moves its surface up at the left block and down
at the right one, and friction on each block runs with the surface.  Left
lever, moments about O: the spring's pull (+S, 0) at height l turns it
clockwise (−S·l); the drum's normal push (−N, 0) at height x and the
friction (0, +μN) at arm a both turn it counter-clockwise (N·x + μN·a), so
N = S·l/(x + μa): the left block carries the smaller Ft1 = 2690 N.  On the
right lever the friction (0, −μN) turns it the spring's way, so
N = S·l/(x − μa): Ft2 = 5156 N.  Counter-clockwise the roles swap.  The
torque, (Ft1 + Ft2)·r, is the same both ways and opposes the drum.
"""

from __future__ import annotations

import pytest
from common import double_block_spring_pair

import dxfcheck
from dxfcheck.core.directions import Direction
from dxfcheck.core.findings import Code


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "brake.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def _check_directions(sol):
    """The module docstring's directions: which block carries Ft1, and which
    way the drum's normal and friction forces push each block."""
    for case in sol.cases:
        up_at_left = -Direction(case.direction).sign  # clockwise: the left end moves up
        small, large = ("left block", "right block") if up_at_left > 0 else ("right block", "left block")
        assert case.shoe(small).friction_lining_N == pytest.approx(2690, rel=5e-4)
        assert case.shoe(large).friction_lining_N == pytest.approx(5156, rel=5e-4)
        for name, side in (("left block", -1.0), ("right block", 1.0)):
            s = case.shoe(name)
            tol = 1e-9 * s.normal_N
            surface_y = up_at_left * -side  # the surface at x = side·r moves this way in y
            assert s.normal_force_N == pytest.approx((side * s.normal_N, 0.0), abs=tol)
            assert s.friction_force_N == pytest.approx((0.0, surface_y * s.friction_resultant_N), abs=tol)
        assert case.torque_Nm > 0


def test_illustration_3_double_block(tmp_path):
    """Illustration 3 with the spring's pull drawn as two loads on the lever
    tops.  Ft1 = 2690 N, Ft2 = 5156 N, T = 1412.2 N·m.  Printed to 4
    figures."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring="3500 N")
    sol = _solve(tmp_path, sk, 0.4489)
    for c in sol.cases:
        ft = sorted(s.friction_lining_N for s in c.shoes)
        assert ft[0] == pytest.approx(2690, rel=5e-4)
        assert ft[1] == pytest.approx(5156, rel=5e-4)
        assert c.torque_Nm == pytest.approx(1412.2, rel=2e-4)
    # the two directions swap the roles of the shoes
    cw, ccw = sol.case("cw"), sol.case("ccw")
    assert cw.shoe("left block").friction_lining_N == pytest.approx(
        ccw.shoe("right block").friction_lining_N, rel=1e-12
    )
    _check_directions(sol)


def test_illustration_3_spring_drawn(tmp_path):
    """Illustration 3 with the spring drawn as a spring between the lever
    tops (3500 N, tension): Ft1 = 2690 N, Ft2 = 5156 N, T = 1412.2 N·m
    (μ' = 0.4489)."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3500 N T")
    sol = _solve(tmp_path, sk, 0.4489)
    assert "spring-set" in sol.mechanism.family
    assert not [f for f in sol.findings if f.code is Code.OPEN_END]
    for c in sol.cases:
        ft = sorted(s.friction_lining_N for s in c.shoes)
        assert ft == [pytest.approx(2690, rel=5e-4), pytest.approx(5156, rel=5e-4)]
        assert c.torque_Nm == pytest.approx(1412.2, rel=2e-4)
        assert [(s.force_N, s.state) for s in c.springs] == [(3500.0, "tension")]
    _check_directions(sol)
    # a tension spring pulls the lever tops together: on the left lever's top
    # (x = −320) towards +x, on the right one's towards −x
    for c in sol.cases:
        (spring,) = c.springs
        pulls = {end.at_mm[0]: end.force_N for end in spring.ends}
        assert pulls[-320.0][0] == pytest.approx(3500.0) and pulls[320.0][0] == pytest.approx(-3500.0)
