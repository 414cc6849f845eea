"""A single-block brake example printed in an examination paper (paper not
identified further; the example as collected in ../shared/REFERENCES.md,
"Long shoes", [seen]): drum Ø250, contact angle 2θ = 90°, μ = 0.35,
effort P = 700 N at arm 450, x = 200, a = 50, friction aiding P.  With the
equivalent coefficient μ' = 4μ·sinθ/(2θ + sin 2θ) (Khurmi & Gupta,
*Theory of Machines*, brakes; from memory for the section) = 0.385:
N = 1742.7 N, Ft = 671.0 N, T = 83.87 N·m (the paper's option 83.75 is a
rounding slip).

Directions.  The paper states that friction aids the effort.  In our drawing
(``common.block_brake``: block on top of the drum, lever pivoted at O to the
left, a = 50 above the friction line, P pushing down at the right end) that
is the counter-clockwise drum: its top surface moves left (−x) and drags
the block left; that force, below O, turns the lever clockwise with P, so
P·l = N(x − μ'a) and N is the larger of the two directions.  The drum
pushes the block up, away from its axis.  μ' itself is a coefficient and
has no direction.
"""

from __future__ import annotations

import math

import pytest
from common import block_brake, pivoted_long_shoes

import dxfcheck
from dxfcheck.core.directions import Direction
from dxfcheck.statics.contact.long_shoe import equivalent_mu


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "brake.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def test_single_block_with_equivalent_mu(tmp_path):
    """The short-shoe model run with μ' reproduces the paper's answers:
    μ' = 0.385, N = 1742.7 N, Ft = 671.0 N, T = 83.87 N·m."""
    theta = math.radians(45)
    mu_eq = 4 * 0.35 * math.sin(theta) / (2 * theta + math.sin(2 * theta))
    assert mu_eq == pytest.approx(0.385, abs=5e-4)
    sk = block_brake(r=125, l=450, x=200, a=50, effort="700 N", contact_deg=90)
    sol = _solve(tmp_path, sk, mu_eq, shoe_model="short")
    aiding = max(sol.cases, key=lambda c: c.shoes[0].normal_N)
    assert aiding.shoes[0].normal_N == pytest.approx(1742.7, rel=3e-4)
    assert aiding.shoes[0].friction_lining_N == pytest.approx(671.0, rel=3e-4)
    assert aiding.torque_Nm == pytest.approx(83.87, rel=3e-4)
    # friction aids P in the counter-clockwise case, and points left on the block (module docstring)
    assert aiding.direction is Direction.CCW
    block = aiding.shoes[0]
    tol = 1e-9 * block.normal_N
    assert block.friction_force_N == pytest.approx((-block.friction_resultant_N, 0.0), abs=tol)
    assert block.normal_force_N == pytest.approx((0.0, block.normal_N), abs=tol)
    assert aiding.torque_Nm > 0


def test_equivalent_mu_beside_the_model(tmp_path):
    """μ' = 4μ·sinθ/(2θ + sin 2θ) (Khurmi & Gupta): μ = 0.35 over 90° gives
    0.385 (the paper's value), and each shoe's result carries it."""
    assert equivalent_mu(0.35, 90) == pytest.approx(0.385, abs=5e-4)
    sol = _solve(tmp_path, pivoted_long_shoes(r=250, semi_deg=45, a=300, effort_N=1000, pair=False), 0.35)
    assert sol.case("cw").shoes[0].mu_equivalent == pytest.approx(equivalent_mu(0.35, 90), rel=1e-12)
