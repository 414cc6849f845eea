"""OSHA, 29 CFR 1910.179, Overhead and gantry cranes, paragraph (f)(2),
hoisting equipment brakes (U.S. Occupational Safety and Health
Administration; ../shared/REFERENCES.md [seen], sub-item numbers from
memory): a holding brake must have at least 125 % of the full-load hoisting
torque at the point where it is applied when the control braking is not
mechanical, 100 % when it is mechanical, and 100 % each where there are two
holding brakes.  The gate's ``hoist`` rule applies it.

Directions.  The regulation has no figure; it asks for the torque that holds
the load, and a drawing does not say which way the load turns the drum, so
the rule judges both drum directions and the weaker one decides.  On the
test brake (``common.block_brake``: block on top of the drum, lever pivoted
at O to the left, O a = 50 above the friction line, the effort pushing down
at the lever's right end) the weaker direction is clockwise: the drum's top
surface moves right and drags the block right, below O, which turns the
lever counter-clockwise against the effort, so P·l = N(x + μa) (Khurmi &
Gupta, *Theory of Machines*, brakes; from memory) and N, hence T = μNr, is
the smaller.  Just above the 125 % boundary the clockwise case fails and
the counter-clockwise one passes.
"""

from __future__ import annotations

import pytest
from handcalc import (
    BLOCK_A,
    BLOCK_CONTACT_DEG,
    BLOCK_L,
    BLOCK_MU,
    BLOCK_P,
    BLOCK_R,
    BLOCK_X,
    block_lever_N,
    run_rules,
    save_block_brake,
)

from dxfcheck.gate.rules import Verdict, hoist_factor

# The test brake (handcalc.save_block_brake): r=200, l=500, x=200, a=50, P = 1000 N.
R, L, X, A, P, MU = BLOCK_R, BLOCK_L, BLOCK_X, BLOCK_A, BLOCK_P, BLOCK_MU
CONTACT_DEG = BLOCK_CONTACT_DEG


lever_N = block_lever_N  # P·l = N(x ∓ μa) (Khurmi & Gupta, *Theory of Machines*, brakes; from memory)


@pytest.fixture
def brake(tmp_path):
    return save_block_brake(tmp_path / "block.dxf")


@pytest.mark.parametrize(
    ("control", "brakes", "factor"),
    [("non-mechanical", 1, 1.25), ("mechanical", 1, 1.0), ("non-mechanical", 2, 1.0), (None, None, 1.25)],
)
def test_hoist_holding_brake_percentages(control, brakes, factor):
    """OSHA 29 CFR 1910.179(f)(2): a holding brake needs 125 % of the
    full-load hoisting torque when control braking is not mechanical, 100 %
    when it is mechanical, 100 % each with two holding brakes (REFERENCES.md,
    seen; sub-item numbers from memory).  Unstated control braking is taken
    as the stricter 125 %."""
    assert hoist_factor(control, brakes)[0] == factor


def test_hoist_rule_boundary(brake):
    """The weaker direction's torque, T = μ·N·r with N = P·l/(x + μa), holds
    a hoisting torque of T/1.25 and no more (non-mechanical control braking)."""
    t_weak = MU * lever_N(MU, False) * R / 1000
    hoist = t_weak / 1.25  # exactly at the OSHA 125 % boundary
    rules, _ = run_rules(brake, mu=MU, hoist_torque=f"{hoist * 0.9999} N*m", control_braking="non-mechanical")
    assert {rules["hoist.cw"].verdict, rules["hoist.ccw"].verdict} == {Verdict.PASS}
    rules, _ = run_rules(brake, mu=MU, hoist_torque=f"{hoist * 1.0001} N*m", control_braking="non-mechanical")
    assert sorted(str(rules[k].verdict) for k in ("hoist.cw", "hoist.ccw")) == ["fail", "pass"]
    # the weaker direction is clockwise (module docstring)
    assert (rules["hoist.cw"].verdict, rules["hoist.ccw"].verdict) == (Verdict.FAIL, Verdict.PASS)
