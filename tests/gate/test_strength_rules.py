"""The strength rules at their boundaries, each against a hand calculation.

The block brake with a = 0 (``common.block_brake``): the lever O(-200, 200)
- C(0, 200) - E(300, 200), P = 1 kN at E, N = P·500/200 = 2500 N at C, the
friction μN = 750 N along the lever (tension between O and C for a clockwise
drum, compression counter-clockwise).  Simply supported beam (Beer &
Johnston, *Mechanics of Materials*, 7th ed., ch. 5; from memory): M(C) =
N·a·b/L = 2500·200·300/500 = 300 000 N·mm.  Outer-fibre stress with axial
load: σ = |N|/A + |M|/Z (ch. 4, eccentric axial loading; from memory).
"""

from __future__ import annotations

import math

import pytest
from common import block_brake

from dxfcheck.core.errors import ConfigError
from dxfcheck.gate.rules import Verdict
from dxfcheck.pipeline import check


def _rule(j, rule):
    return next(r for r in j.rules if r.rule == rule)


def _check(tmp_path, **spec):
    path = tmp_path / "b.dxf"
    block_brake(r=200, l=500, x=200, a=0, effort="1 kN").save(path)
    return check(path, overrides=[("mu", "0.3"), *spec.items()])


#: Rectangle 10 × 40: A = 400 mm², Z = w·h²/6 = 10·1600/6 mm³.
BENDING_MPA = 750 / 400 + 300_000 / (10 * 40**2 / 6)  # 1.875 + 112.5


@pytest.mark.parametrize(("allow", "verdict"), [(114.4, Verdict.PASS), (114.3, Verdict.FAIL)])
def test_bending_stress_rectangle(tmp_path, allow, verdict):
    j = _check(
        tmp_path,
        **{"parts.lever.part_width": "10 mm", "parts.lever.part_height": "40 mm", "part_stress_allow": f"{allow} MPa"},
    )
    r = _rule(j, "part.bending.lever")
    assert r.value == pytest.approx(BENDING_MPA, rel=1e-9)
    assert r.inputs["at_mm"] == pytest.approx([0.0, 200.0])
    assert r.verdict is verdict


def test_bending_stress_round(tmp_path):
    """Round d = 30: A = π·900/4, Z = π·27000/32."""
    j = _check(tmp_path, part_diameter="30 mm", part_stress_allow="200 MPa")
    r = _rule(j, "part.bending.lever")
    assert r.value == pytest.approx(750 / (math.pi * 900 / 4) + 300_000 / (math.pi * 27_000 / 32), rel=1e-9)


@pytest.mark.parametrize(("allow", "verdict"), [(3.76, Verdict.PASS), (3.74, Verdict.FAIL)])
def test_net_section_at_the_pivot_hole(tmp_path, allow, verdict):
    """The lever's only pin is the pivot O (Ø20 drawn), where M = 0 and the
    axial force is μN = 750 N: σ = 750/(w·(h − d)) = 750/(10·20) = 3.75 MPa.
    The bending rule at the same allowed stress fails (114 MPa at C)."""
    j = _check(tmp_path, part_width="10 mm", part_height="40 mm", part_stress_allow=f"{allow} MPa")
    r = _rule(j, "part.hole.lever")
    assert r.value == pytest.approx(750 / (10 * (40 - 20)), rel=1e-9)
    assert r.inputs["pin"] == "O"
    assert r.verdict is verdict
    assert _rule(j, "part.bending.lever").verdict is Verdict.FAIL


@pytest.mark.parametrize(("limit", "verdict"), [(2611, Verdict.PASS), (2610, Verdict.FAIL)])
def test_shaft_load(tmp_path, limit, verdict):
    """|(∓750, −2500)| = √(750² + 2500²) = 2610.04 N in both directions."""
    j = _check(tmp_path, shaft_load_max=f"{limit} N")
    r = _rule(j, "shaft.load")
    assert r.value == pytest.approx(math.hypot(750, 2500), rel=1e-9)
    assert r.inputs["fy_N"] == pytest.approx(-2500, rel=1e-9)
    assert r.verdict is verdict


def test_unknown_part_is_refused(tmp_path):
    with pytest.raises(ConfigError, match=r"part 'levr'.*did you mean 'lever'"):
        _check(tmp_path, **{"parts.levr.part_diameter": "30 mm"})


def test_no_part_keys_no_rules(tmp_path):
    j = _check(tmp_path)
    assert not [r for r in j.rules if r.rule.startswith(("part.", "shaft."))]
