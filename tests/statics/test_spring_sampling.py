"""`solve --samples` samples each spring's force within its tolerance.

The statics is linear in the applied forces (Beer & Johnston, *Vector
Mechanics for Engineers: Statics*, 11th ed., ch. 4: the equilibrium
equations are linear in the loads), so at a fixed μ and geometry the torque
of a brake set by one spring alone is proportional to the spring's force:
samples within ±10 % of it give torques within ±10 % of the torque at the
drawn force, spread over that whole band.
"""

from __future__ import annotations

import math
from dataclasses import replace

import numpy as np
import pytest
from common import capstan_band, double_block_spring_pair
from schema_check import output_json

import dxfcheck
from dxfcheck import cli
from dxfcheck.pipeline import contact_options
from dxfcheck.statics.contact import Direction
from dxfcheck.statics.sampling import _Parts, sample_design


def _mech(tmp_path, maker):
    path = tmp_path / "d.dxf"
    maker().save(path)
    return dxfcheck.build_mechanism(dxfcheck.read_drawing(path))


def _capstan_ccw_Nm(mu: float, spring_N: float) -> float:
    """The capstan band brake (drawings/build.py) by hand, counter-clockwise
    drum: the start end is tight, T1·a = 520·F about the fulcrum O (Mott,
    *Machine Elements in Mechanical Design*, 4th ed., §22-15), a the distance
    from O to the start piece's line; torque T1(1 − e^(−μθ))·r, r = 125,
    θ = 250° (the geometry as in tests/gate/test_release.py)."""
    r, wrap = 125.0, math.radians(250.0)
    e, s = math.radians(215.0), math.radians(-35.0)
    pe, ps = (r * math.cos(e), r * math.sin(e)), (r * math.cos(s), r * math.sin(s))
    o = (pe[0] - 90 * math.sin(e), pe[1] + 90 * math.cos(e))
    u = (math.sin(s), -math.cos(s))
    a = abs((o[0] - ps[0]) * u[1] - (o[1] - ps[1]) * u[0])
    return 520 * spring_N / a * (1 - math.exp(-mu * wrap)) * r / 1000


def test_spring_force_band(tmp_path):
    mech = _mech(tmp_path, capstan_band)
    t0 = _capstan_ccw_Nm(0.3, 500.0)
    res = sample_design(mech, (0.3, 0.3), 4000, spring_tolerance=0.1, seed=4, directions=("ccw",))
    t = res.directions[0].torque_Nm
    assert res.spring_tolerance == 0.1
    assert t["min"] >= 0.9 * t0 * (1 - 1e-9) and t["max"] <= 1.1 * t0 * (1 + 1e-9)
    assert t["min"] < 0.905 * t0 and t["max"] > 1.095 * t0
    assert t["p50"] == pytest.approx(t0, rel=0.01)
    # without the tolerance every sample is the drawn force
    flat = sample_design(mech, (0.3, 0.3), 50, seed=4, directions=("ccw",)).directions[0].torque_Nm
    assert flat["min"] == pytest.approx(t0, rel=1e-9) and flat["max"] == pytest.approx(t0, rel=1e-9)


def _spring_between_tops():
    """Sarkar's double block with the spring drawn between the lever tops
    (as tests/statics/test_bands_springs.py draws it)."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3500 N T")
    return sk


@pytest.mark.parametrize("maker", [capstan_band, _spring_between_tops])
def test_a_sample_equals_a_solve_with_the_spring_scaled(tmp_path, maker):
    mech = _mech(tmp_path, maker)
    opts = contact_options("auto", 60)
    parts = _Parts(mech, Direction.CW, opts)
    factors = np.array([[0.93], [1.07]])
    torque, forces = parts.solve(np.array([0.35, 0.35]), np.zeros((2, len(mech.pins), 2)), factors)
    for k, f in enumerate(factors[:, 0]):
        scaled = replace(mech, springs=tuple(replace(sp, force_N=sp.force_N * f) for sp in mech.springs))
        ref = dxfcheck.solve(scaled, 0.35, ["cw"], opts).cases[0]
        assert torque[k] == pytest.approx(ref.torque_Nm, rel=1e-10)
        assert forces[k] == pytest.approx([p.force_N for p in ref.pins], rel=1e-9)


def test_cli_spring_tolerance(tmp_path, capsys):
    path = tmp_path / "k.dxf"
    capstan_band().save(path)
    rc = cli.main(["solve", str(path), "--mu", "0.3..0.4", "--samples", "500", "--spring-tolerance", "0.1", "--json"])
    assert rc == 0
    doc = output_json(capsys.readouterr().out)
    assert doc["spring_tolerance"] == 0.1
