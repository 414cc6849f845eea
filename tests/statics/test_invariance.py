"""Property tests (hypothesis): the statics does not depend on where or how
the brake is drawn.

Rigid motions and a change of drawing unit leave every force magnitude and
the torque unchanged; a mirror image swaps the drum directions; wrapping the
skeleton in rotated, scaled and nested block references changes nothing.
These follow from the invariance of the equilibrium equations under
Euclidean transformations (common practice; no single source).
"""

from __future__ import annotations

import math

import pytest
from common import winch_two_shoe
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import dxfcheck
from dxfcheck.core.geometry import Affine
from dxfcheck.output.sketch import BlockWrap

SETTINGS = settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.function_scoped_fixture])
angles = st.floats(min_value=-180, max_value=180, allow_nan=False)
offsets = st.floats(min_value=-5000, max_value=5000, allow_nan=False)


def _fingerprint(sol):
    """Direction -> (torque, shoe normals, pin force magnitudes, member forces)."""
    out = {}
    for c in sol.cases:
        out[str(c.direction)] = (
            c.torque_Nm,
            {s.name: s.normal_N for s in c.shoes},
            {p.name: p.max_force_N for p in c.pins},
            {m.name: m.axial_N for m in c.members},
        )
    return out


def _close(a, b, rel=1e-7):
    t1, s1, p1, m1 = a
    t2, s2, p2, m2 = b
    assert t1 == pytest.approx(t2, rel=rel)
    for d1, d2 in ((s1, s2), (p1, p2), (m1, m2)):
        assert d1.keys() == d2.keys()
        for k in d1:
            assert d1[k] == pytest.approx(d2[k], rel=rel, abs=1e-6)


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    path = tmp_path_factory.mktemp("ref") / "winch.dxf"
    winch_two_shoe().save(path)
    return _fingerprint(dxfcheck.analyse(path, mu=0.3))


@SETTINGS
@given(theta=angles, dx=offsets, dy=offsets)
def test_rigid_motion(tmp_path, reference, theta, dx, dy):
    path = tmp_path / "moved.dxf"
    winch_two_shoe().save(path, transform=Affine.translation(dx, dy) @ Affine.rotation(theta))
    got = _fingerprint(dxfcheck.analyse(path, mu=0.3))
    for d in ("cw", "ccw"):
        _close(got[d], reference[d])


@SETTINGS
@given(unit=st.sampled_from(["inch", "cm", "m", "ft"]), theta=angles)
def test_change_of_units(tmp_path, reference, unit, theta):
    """The same brake drawn in other units: coordinates divided by the unit's
    size in mm, $INSUNITS set accordingly."""
    size = {"inch": 25.4, "cm": 10.0, "m": 1000.0, "ft": 304.8}[unit]
    sk = winch_two_shoe()
    sk.units = unit
    path = tmp_path / "units.dxf"
    sk.save(path, transform=Affine.rotation(theta) @ Affine.scaling(1 / size, 1 / size))
    sol = dxfcheck.analyse(path, mu=0.3)
    assert sol.mechanism.drawing.units_source == "$INSUNITS"
    got = _fingerprint(sol)
    for d in ("cw", "ccw"):
        _close(got[d], reference[d])


@SETTINGS
@given(theta=angles, dx=offsets)
def test_mirror_swaps_directions(tmp_path, reference, theta, dx):
    path = tmp_path / "mirror.dxf"
    winch_two_shoe().save(path, transform=Affine.translation(dx, 0) @ Affine.rotation(theta) @ Affine.scaling(-1, 1))
    got = _fingerprint(dxfcheck.analyse(path, mu=0.3))
    _close(got["cw"], reference["ccw"])
    _close(got["ccw"], reference["cw"])


wraps = st.builds(
    BlockWrap,
    insert=st.tuples(offsets, offsets),
    rotation_deg=angles,
    xscale=st.sampled_from([0.5, 1.0, 2.0, 3.0, -1.0]),
    base=st.tuples(offsets, offsets),
)


@SETTINGS
@given(levels=st.lists(wraps, min_size=1, max_size=3))
def test_nested_blocks_change_nothing(tmp_path, reference, levels):
    """Uniform scales (xscale = yscale; -1 mirrors inside the block while the
    written geometry compensates) keep circles circular."""
    levels = [BlockWrap(w.insert, w.rotation_deg, w.xscale, abs(w.xscale), w.base) for w in levels]
    path = tmp_path / "nested.dxf"
    winch_two_shoe().save(path, wraps=tuple(levels))
    sol = dxfcheck.analyse(path, mu=0.3)
    assert all(p.source.via for p in sol.mechanism.pins)
    got = _fingerprint(sol)
    for d in ("cw", "ccw"):
        _close(got[d], reference[d])


def test_torque_scales_with_size(tmp_path, reference):
    """Doubling every length (same unit) leaves forces unchanged and doubles
    the torque, T = ΣμN·r (Khurmi & Gupta, brakes chapter, from memory)."""
    path = tmp_path / "big.dxf"
    winch_two_shoe().save(path, transform=Affine.scaling(2, 2))
    got = _fingerprint(dxfcheck.analyse(path, mu=0.3))
    for d in ("cw", "ccw"):
        t, s, p, m = got[d]
        _close((t / 2, s, p, m), reference[d])
    assert math.isfinite(got["cw"][0])
