"""The long shoe's Gauss-Legendre rule (its own Newton iteration) against
numpy's ``leggauss`` (a general-purpose reference library) and against the
rule's defining property: n nodes integrate every polynomial of degree up
to 2n - 1 exactly (Abramowitz & Stegun, *Handbook of Mathematical
Functions*, 25.4.29; from memory)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from dxfcheck.statics.contact import long_shoe


@pytest.mark.parametrize("n", [1, 2, 3, 8, 64, 65])
def test_nodes_and_weights_are_numpys(n):
    x, w = long_shoe._gauss(n)
    ref_x, ref_w = np.polynomial.legendre.leggauss(n)
    assert np.all(np.diff(x) > 0)  # ascending, as leggauss gives them
    np.testing.assert_allclose(x, ref_x, rtol=0, atol=1e-14)
    np.testing.assert_allclose(w, ref_w, rtol=0, atol=1e-14)


@pytest.mark.parametrize("degree", [0, 1, 2, 7, 126, 127])
def test_polynomials_up_to_degree_2n_minus_1_are_exact(degree):
    x, w = long_shoe._gauss(64)
    exact = 0.0 if degree % 2 else 2.0 / (degree + 1)  # ∫_-1^1 x^d dx
    assert float(np.sum(w * x**degree)) == pytest.approx(exact, abs=1e-14)


def test_a_cosine_over_a_lining():
    """∫ cos φ dφ over 20°..110° = sin 110° - sin 20°, mapped onto the nodes
    as the long shoe maps them."""
    lo, hi = math.radians(20), math.radians(110)
    x, w = long_shoe._gauss()
    half, mid = 0.5 * (hi - lo), 0.5 * (hi + lo)
    got = float(np.sum(np.cos(mid + half * x) * w) * half)
    assert got == pytest.approx(math.sin(hi) - math.sin(lo), rel=1e-14)


@pytest.mark.parametrize("name", ["winch two-shoe (pivoted shoes, floating crank)", "internal hinged pair"])
def test_the_kept_quadrature_gives_what_a_fresh_one_gives(tmp_path, name):
    """The μ- and direction-free part of a line load's quadrature is kept
    between solves; a solve with it kept equals, number for number, a solve
    that computes every quadrature afresh (both directions, two μ).  (The
    project's own invariant; no published source.)"""
    from common import CATALOGUE

    import dxfcheck

    make, _ = CATALOGUE[name]
    path = tmp_path / "long.dxf"
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    for mu in (0.3, 0.42):
        long_shoe._line_load.cache_clear()
        fresh = dxfcheck.solve(mech, mu)
        assert long_shoe._line_load.cache_info().misses > 0
        kept = dxfcheck.solve(mech, mu)
        assert long_shoe._line_load.cache_info().hits > 0
        assert kept == fresh
        assert [c.torque_Nm for c in kept.cases] == [c.torque_Nm for c in fresh.cases]
