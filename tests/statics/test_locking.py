"""The self-locking limit found through the affine form of the equations,
A(μ) = A0 + μ·A1, is the one found by assembling the equations at every
step of the scan and the bisection (a quantity computed two ways; the
limit's value against a published example is checked in
tests/statics/test_block_brakes.py and test_bands_springs.py).  (The
project's own invariant; no published source.)"""

from __future__ import annotations

import functools

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
            m.setattr(
                locking,
                "_det_sign",
                lambda mech, models, d: functools.partial(locking._square_det_sign, mech, models, direction=d),
            )
            locking.critical_mu.cache_clear()
            slow = locking.critical_mu(mech, direction)
        locking.critical_mu.cache_clear()
        assert (fast is None) == (slow is None)
        if fast is not None:
            assert fast == pytest.approx(slow, abs=1e-10)


def test_bands_are_not_affine_in_mu_and_are_assembled_at_every_step(tmp_path):
    """A band's tension ratio e^(μθ) is no affine function of μ: the check
    must see it and fall back to assembling each μ."""
    make, _ = CATALOGUE["simple band"]
    path = tmp_path / "band.dxf"
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    models, _ = locking.contact_models(mech, locking.DEFAULT_OPTIONS)
    assert isinstance(locking._det_sign(mech, models, Direction("cw")), functools.partial)
    make, _ = CATALOGUE["internal hinged pair"]
    make().save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    models, _ = locking.contact_models(mech, locking.DEFAULT_OPTIONS)
    assert not isinstance(locking._det_sign(mech, models, Direction("cw")), functools.partial)
