"""Block (short-shoe) brakes against the textbook lever equation, each
through the whole pipeline: sketch -> DXF -> read -> topology -> statics.
The published block-brake examples (book 764 Example 12.4, Sarkar's
Illustration 3, the exam paper's single block) are in ``tests/validation/``.

The lever equation for a block brake pivoted at O, effort P at arm l, normal
force N at arm x, friction line offset a from O:

    P·l = N·(x ∓ μ·a)

minus where friction helps P (self-energising), plus otherwise; the brake
self-locks when x ≤ μ·a.  Source: R. S. Khurmi and J. K. Gupta, *Theory of
Machines*, chapter on brakes (section number from memory); the same equation
appears in many course notes.
"""

from __future__ import annotations

import pytest
from common import block_brake

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
