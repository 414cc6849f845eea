"""The self-locking limit found through the affine form of the equations,
A(μ) = A0 + μ·A1 (shoes), or by setting only the band columns again at each
μ (bands, no shoes), is the one found by assembling the equations at every
step of the scan and the bisection (a quantity computed two ways; the
limit's value against a published example is checked in
tests/statics/test_block_brakes.py and test_bands_springs.py).  (The
project's own invariant; no published source.)"""

from __future__ import annotations

import math

import pytest
from common import CATALOGUE

import dxfcheck
from dxfcheck.statics import locking
from dxfcheck.statics.contact import Direction


@pytest.mark.parametrize("name", sorted(CATALOGUE))
def test_affine_scan_finds_the_same_limit(tmp_path, monkeypatch, name):
    make, _ = CATALOGUE[name]
    path = tmp_path / "d.dxf"
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    for direction in Direction:
        locking.critical_mu.cache_clear()
        fast = locking.critical_mu(mech, direction)
        with monkeypatch.context() as m:
            m.setattr(locking, "_det_sign", locking._assembled_scan)
            locking.critical_mu.cache_clear()
            slow = locking.critical_mu(mech, direction)
        locking.critical_mu.cache_clear()
        assert (fast is None) == (slow is None)
        if fast is not None and mech.shoes:
            assert fast == pytest.approx(slow, abs=1e-10)
        else:  # the band columns set again are the assembled matrix, entry for entry
            assert fast == slow


@pytest.mark.parametrize("name", ["simple band", "differential band"])
def test_band_scan_is_the_assembled_matrix_at_every_mu(tmp_path, name):
    """A band's tension ratio e^(μθ) is no affine function of μ; on a
    mechanism without shoes the band columns alone are set again at each μ,
    and the determinant's sign is the assembled equations' at every μ of
    the scan (the same matrix, so the same sign, exactly)."""
    make, _ = CATALOGUE[name]
    path = tmp_path / "band.dxf"
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    assert mech.bands and not mech.shoes
    models, _ = locking.contact_models(mech, locking.DEFAULT_OPTIONS)
    grid = [k / locking.MU_SCAN_STEPS for k in range(locking.MU_SCAN_STEPS + 1)] + [0.2773, math.log(2) / 4.19]
    for direction in Direction:
        base = locking.assemble(mech, models, 0.0, direction)
        for mu in grid:
            a = locking.with_band_columns(base, mech, mu, direction, base.row_index)
            assert (a == locking.assemble(mech, models, mu, direction).a).all()
        assert locking._det_sign(mech, models, direction)(grid) == locking._assembled_scan(mech, models, direction)(
            grid
        )


@pytest.mark.parametrize("name", ["simple band", "differential band", "capstan band (spring-set)"])
def test_band_stack_is_each_mu_matrix_bit_for_bit(tmp_path, monkeypatch, name):
    """The band scan builds all its matrices at once; each is the matrix
    with the band columns set at its μ (and so the assembled one), entry
    for entry, and the signs are those of the one-μ-at-a-time scan, also
    when the stack's identities 0 = 0 differ between the μ and it falls
    back to one μ at a time."""
    make, _ = CATALOGUE[name]
    path = tmp_path / "band.dxf"
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    models, _ = locking.contact_models(mech, locking.DEFAULT_OPTIONS)
    grid = [k / locking.MU_SCAN_STEPS for k in range(locking.MU_SCAN_STEPS + 1)] + [0.2773, 1.7]
    for direction in Direction:
        base = locking.assemble(mech, models, 0.0, direction)
        stack = locking.band_column_stack(base, mech, grid, direction, base.row_index)
        for k, mu in enumerate(grid):
            assert (stack[k] == locking.with_band_columns(base, mech, mu, direction, base.row_index)).all()
        if mech.shoes:
            continue
        scan = locking._det_sign(mech, models, direction)
        one_at_a_time = locking._assembled_scan(mech, models, direction)(grid)
        assert scan(grid) == one_at_a_time
        with monkeypatch.context() as m:
            m.setattr(locking, "_kept_rows", lambda stack: None)
            assert scan(grid) == one_at_a_time


def test_shoes_take_the_affine_scan(tmp_path):
    """Shoes' contact forces are affine in μ: the scan's signs from A0 + μ·A1
    in one call are those of the equations assembled at each μ."""
    make, _ = CATALOGUE["internal hinged pair"]
    path = tmp_path / "pair.dxf"
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    models, _ = locking.contact_models(mech, locking.DEFAULT_OPTIONS)
    grid = [k / locking.MU_SCAN_STEPS for k in range(locking.MU_SCAN_STEPS + 1)]
    for direction in Direction:
        assert locking._det_sign(mech, models, direction)(grid) == locking._assembled_scan(mech, models, direction)(
            grid
        )
