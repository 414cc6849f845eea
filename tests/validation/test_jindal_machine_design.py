"""U. C. Jindal, *Machine Design*, Pearson Education (India), 2010, the
chapter on brakes: Examples 23-2 and 23-3 (../shared/REFERENCES.md [seen]).
The examples give numbers, not drawings: each is drawn here in the project's
layer convention, read, solved and compared with the printed answer.

What each example says about directions, and what is checked:

* Example 23-2, band brake: T1 = 9600 N is the tight side.  We draw it as a
  simple band (``common.simple_band``: the wrap's left end anchored at the
  lever's fulcrum O, the right end at pin A on the lever).  The tight end is
  the one the drum surface moves away from: a clockwise drum moves its top
  right, away from O, so O is tight clockwise, which the simple-band formula
  W = T2·a/L (the lever carries the slack end) needs; counter-clockwise A is
  tight.  Only A's piece has an arm about O (O's piece runs through it), so
  A's tension is W·L/a in both directions: the slack tension of the
  clockwise case is the tight tension of the counter-clockwise one.
* Example 23-3, two symmetric pivoted shoes, pins at the ideal distance:
  both directions give the printed answers; on each shoe the friction runs
  with the drum surface at the shoe's middle, up on the right shoe and down
  on the left one for a counter-clockwise drum
  (``handcalc.check_symmetric_pivoted_shoe``).
"""

from __future__ import annotations

import pytest
from common import simple_band
from handcalc import check_symmetric_pivoted_shoe, simple_band_effort

import dxfcheck


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "b.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def test_example_23_2(tmp_path):
    """Example 23-2: T1 = 9600 N, μ = 0.22, wrap 225°, r = 200 ->
    T2 = 4046.4 N, T = 1110.72 N·m."""
    w, _ = simple_band_effort(9600.0, 0.22, 225, 200.0, 150.0, 700.0)
    sk = simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort=f"{w!r} N")
    # the anchored end O tight: the clockwise drum (module docstring)
    sol = _solve(tmp_path, sk, 0.22)
    (band,) = sol.case("cw").bands
    assert band.tight_pin == "O"
    assert band.tight_N == pytest.approx(9600, rel=1e-9)
    assert band.slack_N == pytest.approx(4046.4, rel=2e-5)
    assert band.torque_Nm == pytest.approx(1110.72, rel=2e-5)
    # counter-clockwise the lever end A is tight and carries W·L/a as before
    (other,) = sol.case("ccw").bands
    assert (other.tight_pin, other.slack_pin) == ("A", "O")
    assert other.tight_N == pytest.approx(band.slack_N, rel=1e-9)
    # both directions brake: the torque opposes the drum's motion
    assert sol.case("cw").torque_Nm > 0 and sol.case("ccw").torque_Nm > 0


@pytest.mark.parametrize("direction", ["cw", "ccw"])
def test_example_23_3_pivoted_shoes(tmp_path, direction):
    """Example 23-3: θ2 = 60°, r = 160, b = 40, μ = 0.3, pa = 0.9 MPa ->
    a = 187.22, T = 957.75 N·m for two shoes, Rx = 8526 N."""
    check_symmetric_pivoted_shoe(
        tmp_path,
        dict(semi_deg=60, r=160, b=40, mu=0.3, pa=0.9, pair=True),
        dict(a=187.22, torque=957.75, rx=8526, ry=None),
        direction,
    )
