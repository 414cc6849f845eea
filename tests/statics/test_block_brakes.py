"""Block (short-shoe) brakes against the textbook lever equation and worked
examples, each through the whole pipeline: sketch -> DXF -> read -> topology
-> statics.

The lever equation for a block brake pivoted at O, effort P at arm l, normal
force N at arm x, friction line offset a from O:

    P·l = N·(x ∓ μ·a)

minus where friction helps P (self-energising), plus otherwise; the brake
self-locks when x ≤ μ·a.  Source: R. S. Khurmi and J. K. Gupta, *Theory of
Machines*, chapter on brakes (section number from memory); the same equation
appears in many course notes.
"""

from __future__ import annotations

import math

import pytest
from common import block_brake, double_block_spring_pair

import dxfcheck
from dxfcheck.core.findings import Code


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "brake.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


# (l, x, a, mu) sets; the formula must hold for each in both directions
LEVER_CASES = [
    pytest.param(500.0, 200.0, 50.0, 0.35, id="ex12.4-geometry"),
    pytest.param(450.0, 200.0, 50.0, 0.385, id="exam-mu-prime"),
    pytest.param(800.0, 300.0, 120.0, 0.25, id="long-lever"),
    pytest.param(600.0, 250.0, 0.0, 0.4, id="a-zero"),
]


@pytest.mark.parametrize(("l", "x", "a", "mu"), LEVER_CASES)
def test_lever_equation_both_directions(tmp_path, l, x, a, mu):
    """P·l = N(x ∓ μa) (Khurmi & Gupta, brakes chapter, from memory)."""
    P = 1000.0
    sol = _solve(tmp_path, block_brake(r=200, l=l, x=x, a=a, effort=f"{P} N"), mu)
    normals = sorted(c.shoes[0].normal_N for c in sol.cases)
    expected = sorted([P * l / (x - mu * a), P * l / (x + mu * a)])
    assert normals == pytest.approx(expected, rel=1e-9)
    for c in sol.cases:
        s = c.shoes[0]
        assert s.friction_resultant_N == pytest.approx(mu * s.normal_N, rel=1e-12)
        assert s.friction_lining_N == pytest.approx(s.friction_resultant_N, rel=1e-12)  # a short shoe
        assert c.torque_Nm == pytest.approx(mu * s.normal_N * 200 / 1000, rel=1e-12)  # T = μ·N·r
    if a == 0:
        # with the friction line through the pivot both directions are equal
        assert normals[0] == pytest.approx(normals[1], rel=1e-12)
        assert normals[0] == pytest.approx(P * l / x, rel=1e-12)


def test_bhandari_example_12_4(tmp_path):
    """FOSSEE Scilab Textbook Companion, book 764 (probably Bhandari, *Design
    of Machine Elements*, ch. 12; identity not confirmed), Example 12.4:
    T = 250 N·m, μ = 0.35, r = 200, l = 500, x = 200, a = 50 give
    N = 3571.4 N and P = 1303.57 N in one drum direction, 1553.57 N in the
    other.  Printed answers are rounded to 5-6 figures."""
    found = {}
    for P in (1303.57, 1553.57):
        sol = _solve(tmp_path, block_brake(r=200, l=500, x=200, a=50, effort=f"{P} N"), 0.35)
        # the published P holds the required torque in exactly one direction
        hits = [c for c in sol.cases if c.torque_Nm == pytest.approx(250.0, rel=2e-5)]
        assert len(hits) == 1
        assert hits[0].shoes[0].normal_N == pytest.approx(3571.4, rel=2e-5)
        found[P] = hits[0].direction
    assert found[1303.57] != found[1553.57]


def test_self_locking_block(tmp_path):
    """Self-locking when x ≤ μa (Khurmi & Gupta, from memory): x = 200,
    a = 250 gives the critical μ = x/a = 0.8 in the energising direction and
    none in the other."""
    sk = block_brake(r=200, l=500, x=200, a=250, effort="500 N")
    sol = _solve(tmp_path, sk, 0.5)
    crit = sorted((c.critical_mu is None, c.critical_mu) for c in sol.cases)
    assert crit[0][1] == pytest.approx(0.8, abs=1e-9)
    assert crit[1] == (True, None)
    assert not any(f.code is Code.SELF_LOCKING for f in sol.findings)
    locked = _solve(tmp_path, sk, 0.9)
    codes = [f.code for f in locked.findings]
    assert codes.count(Code.SELF_LOCKING) == 1
    # the energising direction at μ > x/a: equilibrium needs a negative normal force
    energising = next(c for c in locked.cases if c.critical_mu is not None)
    assert energising.shoes[0].normal_N < 0


def test_exam_single_block_with_equivalent_mu(tmp_path):
    """Single-block example printed in an exam paper (REFERENCES.md, "Long
    shoes"): drum Ø250, 2θ = 90°, μ = 0.35 -> μ' = 4μ·sinθ/(2θ + sin2θ) =
    0.385; P = 700 N at 450, x = 200, a = 50, friction aiding P:
    N = 1742.7 N, Ft = 671.0 N, T = 83.87 N·m (the paper's option 83.75 is a
    rounding slip).  The short-shoe model run with μ' reproduces it."""
    theta = math.radians(45)
    mu_eq = 4 * 0.35 * math.sin(theta) / (2 * theta + math.sin(2 * theta))
    assert mu_eq == pytest.approx(0.385, abs=5e-4)
    sk = block_brake(r=125, l=450, x=200, a=50, effort="700 N", contact_deg=90)
    sol = _solve(tmp_path, sk, mu_eq, shoe_model="short")
    aiding = max(sol.cases, key=lambda c: c.shoes[0].normal_N)
    assert aiding.shoes[0].normal_N == pytest.approx(1742.7, rel=3e-4)
    assert aiding.shoes[0].friction_lining_N == pytest.approx(671.0, rel=3e-4)
    assert aiding.torque_Nm == pytest.approx(83.87, rel=3e-4)


def test_sarkar_double_block(tmp_path):
    """B. K. Sarkar, *Theory of Machines*, ch. 10, Illustration 3, p. 270
    (published solution code): spring force S = 3500 N at l = 450 on each of
    two levers, x = 200, a = 140, drum Ø360, μ' = 0.4489 used as the
    coefficient.  Ft1 = μ'Sl/(x + μ'a) = 2690 N, Ft2 = μ'Sl/(x − μ'a) =
    5156 N, T = (Ft1 + Ft2)·r = 1412.2 N·m.  Printed to 4 figures."""
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
