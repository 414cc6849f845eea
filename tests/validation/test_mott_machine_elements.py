"""R. L. Mott, *Machine Elements in Mechanical Design*, 4th ed., Pearson
Prentice Hall, 2004, §22-15 (band brakes), Example Problem 22-10
(../shared/REFERENCES.md [seen]): r = 6 in, wrap 225°, band width b = 2 in,
p_max = 25 psi, μ = 0.25 -> T1 = p_max·b·r = 300 lb, T2 = 112 lb,
T = 1128 lb·in (1125.6 unrounded).  Drawn in inches with
``common.simple_band``, read, solved and compared with the printed answers.

Directions.  The figure's drum direction was not re-read (from memory); it
follows from the physics.  A band's tight end is the one the drum surface
moves away from.  The simple band's lever carries the slack end only
(W = T2·a/L, §22-15), so the anchor O (the wrap's left end, at the lever's
fulcrum) must be tight: a clockwise drum moves its top right, away from O.
Counter-clockwise the lever end A is tight, and W·L = T1·a holds there
instead.  Each straight piece pulls its pin along itself, towards the point
where it leaves the drum; the braking torque opposes the drum in both
directions.
"""

from __future__ import annotations

import math

import pytest
from common import simple_band
from handcalc import simple_band_effort

import dxfcheck
from dxfcheck.core.units import LBF_N

LBF_IN_NM = LBF_N * 0.0254


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "b.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def test_example_problem_22_10(tmp_path):
    """Example Problem 22-10: T1 = 300 lb, T2 = 112 lb, T = 1128 lb·in
    (1125.6 unrounded), the effort set for T1 = 300 lb in the direction where
    the anchored end is tight (module docstring)."""
    w, t2 = simple_band_effort(300.0, 0.25, 225, 6.0, 4.0, 20.0)
    sk = simple_band(r=6, wrap_deg=225, anchor_run=4, arm=20, effort=f"{w!r} lbf", units="inch")
    sol = _solve(tmp_path, sk, 0.25)
    assert sol.mechanism.drawing.units == "inch"
    assert sol.mechanism.family == "simple band brake"
    (band,) = sol.case("cw").bands
    assert band.tight_pin == "O" and band.wrap_deg == pytest.approx(225)
    assert band.tight_N / LBF_N == pytest.approx(300.0, rel=1e-9)
    assert band.slack_N / LBF_N == pytest.approx(112, abs=0.5)  # printed as a whole number
    assert band.slack_N == pytest.approx(t2 * LBF_N, rel=1e-9)
    assert band.torque_Nm / LBF_IN_NM == pytest.approx(1125.6, rel=1e-4)
    # p_max = T1/(b·r) at the tight end
    assert band.peak_line_load_N_per_mm / (2 * 25.4) / (LBF_N / 25.4**2) == pytest.approx(25.0, rel=1e-9)
    # the other direction: the lever end is tight, W·L = T1·a
    (other,) = sol.case("ccw").bands
    assert other.tight_pin == "A"
    assert other.tight_N == pytest.approx(band.slack_N, rel=1e-9)
    # both cases brake: the torque opposes the drum's motion
    assert sol.case("cw").torque_Nm > 0 and sol.case("ccw").torque_Nm > 0
    # each piece pulls its pin towards where it leaves the drum, with its tension
    for case in sol.cases:
        (b,) = case.bands
        assert {e.pin for e in b.ends if e.tight} == {b.tight_pin}
        for end in b.ends:
            pin = case.pin(end.pin)
            dx, dy = end.tangent_mm[0] - pin.x_mm, end.tangent_mm[1] - pin.y_mm
            length = math.hypot(dx, dy)
            expected = (end.tension_N * dx / length, end.tension_N * dy / length)
            assert end.pull_N == pytest.approx(expected, rel=1e-9, abs=1e-9 * end.tension_N)
