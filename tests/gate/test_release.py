"""The release rules at their boundaries, each against a hand calculation.

Kinematics by hand (plain lever kinematics, Beer & Johnston, *Vector
Mechanics for Engineers: Statics*, 11th ed., ch. 10: a lever turning by θ
about its pivot moves a point at arm d by d·θ); the clearance 0.5-1.5 mm is
common practice (/work/shared/REFERENCES.md).
"""

from __future__ import annotations

import math

import pytest
from common import capstan_band, conveyor_block, double_block_spring_pair, winch_two_shoe

from dxfcheck.core.errors import ConfigError
from dxfcheck.gate.rules import Verdict
from dxfcheck.pipeline import check

#: Conveyor block (drawings/build.py): pivot O(-260, 210), effort F1 = 420 N
#: down at E(520, 210), block on the 150 mm drum at (0, 150) carried from the
#: lever at (0, 210).  E rising by s turns the lever by θ = s/780; the block
#: point moves by θ × ((0, 150) − O) = θ·(60, 260): it lifts 260·θ.  So the
#: stroke per mm of lift is 780/260 = 3.
CONVEYOR_STROKE_PER_LIFT = 780 / 260


def _rule(j, rule):
    return next(r for r in j.rules if r.rule == rule)


def _check(tmp_path, sketch, **spec):
    path = tmp_path / "r.dxf"
    sketch.save(path)
    return check(path, overrides=[(k, v) for k, v in spec.items()])


@pytest.mark.parametrize(("stroke_mm", "verdict"), [(3.003, Verdict.PASS), (2.997, Verdict.FAIL)])
def test_stroke_for_the_clearance(tmp_path, stroke_mm, verdict):
    """1 mm of clearance needs 1 × 3 = 3 mm of stroke."""
    j = _check(tmp_path, conveyor_block(), shoe_clearance="1 mm", actuator_stroke=f"{stroke_mm:.4f} mm")
    r = _rule(j, "release.stroke")
    assert r.value == pytest.approx(1.0 * CONVEYOR_STROKE_PER_LIFT, rel=1e-9)
    assert r.verdict is verdict
    assert r.inputs["actuator"] == "F1"


@pytest.mark.parametrize(("stroke_mm", "verdict"), [(9.03, Verdict.PASS), (8.97, Verdict.FAIL)])
def test_wear_the_stroke_takes_up(tmp_path, stroke_mm, verdict):
    """Wear w closes the gap: the stroke S takes up w = S/3 − c; with c =
    1 mm and S = 9 mm, w = 2 mm against a 2 mm allowance."""
    j = _check(
        tmp_path,
        conveyor_block(),
        shoe_clearance="1 mm",
        actuator_stroke=f"{stroke_mm} mm",
        wear_allowance="2 mm",
    )
    r = _rule(j, "release.wear")
    assert r.value == pytest.approx(stroke_mm / CONVEYOR_STROKE_PER_LIFT - 1.0, rel=1e-9)
    assert r.inputs["stroke_left_for_wear_mm"] == pytest.approx(stroke_mm - 3.0, rel=1e-9)
    assert r.verdict is verdict


@pytest.mark.parametrize(("force_N", "verdict"), [(505, Verdict.PASS), (503, Verdict.FAIL)])
def test_release_force(tmp_path, force_N, verdict):
    """The actuator lifts the set weight itself (velocity ratio 1): 420 N ×
    the default margin 1.2 = 504 N."""
    j = _check(tmp_path, conveyor_block(), actuator_force=f"{force_N} N")
    r = _rule(j, "release.force")
    assert r.value == pytest.approx(420 * 1.2, rel=1e-9)
    assert r.verdict is verdict


def test_release_force_through_the_linkage(tmp_path):
    """Double block with two set loads F1, F2 (3500 N each, on separate
    levers): lifting both shoes alike moves both load points alike (the
    levers are mirror images), so the actuator at F1 also carries F2:
    (3500 + 3500) × 1.2 = 8400 N."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring="3500 N")
    j = _check(tmp_path, sk, actuator="F1", actuator_force="8500 N", release_margin="1.2")
    r = _rule(j, "release.force")
    assert r.value == pytest.approx(7000 * 1.2, rel=1e-9)
    assert r.verdict is Verdict.PASS


@pytest.mark.parametrize(("thick_mm", "verdict"), [(2.01, Verdict.PASS), (1.99, Verdict.FAIL)])
def test_wear_allowance_within_the_lining(tmp_path, thick_mm, verdict):
    j = _check(tmp_path, conveyor_block(), wear_allowance="2 mm", lining_thickness=f"{thick_mm} mm")
    assert _rule(j, "release.lining").verdict is verdict


def test_floating_crank_stroke(tmp_path):
    """Winch: 16.29375 mm of stroke per mm of equal lift (derived in
    tests/statics/test_kinematics.py); 0.8 mm of clearance needs 13.035 mm."""
    j = _check(tmp_path, winch_two_shoe(), shoe_clearance="0.8 mm", actuator_stroke="13.1 mm")
    r = _rule(j, "release.stroke")
    assert r.value == pytest.approx(0.8 * 3.3 * 1580 / 320, rel=1e-9)
    assert r.verdict is Verdict.PASS
    shares = {s["name"]: s["share"] for s in r.inputs["shares"]}
    assert shares["left shoe"] == pytest.approx(840 / 1580, rel=1e-9)


def _capstan_hand(mu: float, spring_N: float) -> tuple[float, float, float]:
    """The capstan band brake (drawings/build.py) by hand: r = 125, wrap
    θ = 250° from −35° to 215°; the wrap's end (215°) anchored at the fulcrum
    O = pe + 90·(its outward tangent); the start piece runs from the tangent
    point ps at −35° along u = (sin(−35°), −cos(−35°)) to A on the lever; the
    compression spring pushes the lever's tail down at 520 from O.

    Moments about O (Mott, *Machine Elements in Mechanical Design*, 4th ed.,
    §22-15, simple band): the start end's tension × its arm a (the distance
    from O to the start piece's line) = 520·F.  A clockwise drum makes the
    anchored end tight: T2 = 520F/a, torque (e^(μθ) − 1)·T2·r; a
    counter-clockwise drum the start end: T1 = 520F/a, torque T1(1 −
    e^(−μθ))·r.  Kinematics: the lever's turn φ slackens the band by a·φ
    and lifts it by a·φ/θ while the spring shortens by 520·φ: 520θ/a of
    spring stroke per mm of lift.

    Returns (cw torque [N·m], ccw torque [N·m], spring stroke per mm of lift)."""
    r, wrap = 125.0, math.radians(250.0)
    e, s = math.radians(215.0), math.radians(-35.0)
    pe, ps = (r * math.cos(e), r * math.sin(e)), (r * math.cos(s), r * math.sin(s))
    o = (pe[0] - 90 * math.sin(e), pe[1] + 90 * math.cos(e))
    u = (math.sin(s), -math.cos(s))
    a = abs((o[0] - ps[0]) * u[1] - (o[1] - ps[1]) * u[0])
    t = 520 * spring_N / a
    k = math.exp(mu * wrap)
    return (k - 1) * t * r / 1000, t * (1 - 1 / k) * r / 1000, 520 * wrap / a


@pytest.mark.parametrize(("factor", "verdict"), [(0.999, Verdict.PASS), (1.001, Verdict.FAIL)])
def test_duty_at_the_weakest_spring(tmp_path, factor, verdict):
    """Spring 500 N at −10 % and relaxed by 20 N/mm × 0.5 mm of wear × its
    stroke per mm of lift: F = 450 − 10·(520θ/a); the counter-clockwise
    torque at mu_min = 0.3 with it, the duty just below and just above."""
    _, _, per_lift = _capstan_hand(0.3, 1.0)
    weak = 500 * 0.9 - 20 * 0.5 * per_lift
    cw, ccw, _ = _capstan_hand(0.3, weak)
    assert ccw < cw
    j = _check(
        tmp_path,
        capstan_band(),
        mu="0.35",
        mu_min="0.3",
        spring_rate="20 N/mm",
        spring_preload_tolerance="0.1",
        wear_allowance="0.5 mm",
        required_torque=f"{ccw * factor} N*m",
    )
    r_ccw, r_cw = _rule(j, "spring.torque.ccw"), _rule(j, "spring.torque.cw")
    assert r_ccw.value == pytest.approx(ccw, rel=1e-9)
    assert r_cw.value == pytest.approx(cw, rel=1e-9)
    assert r_ccw.verdict is verdict
    assert r_cw.verdict is Verdict.PASS
    assert r_ccw.inputs["springs"][0]["weakest_force_N"] == pytest.approx(weak, rel=1e-9)
    assert r_ccw.inputs["springs"][0]["stroke_per_lift"] == pytest.approx(per_lift, rel=1e-9)


def test_spring_stiffens_the_release_force(tmp_path):
    """Release force at full stroke: the spring at +10 % plus 20 N/mm × its
    deflection over the 40 mm stroke (the spring is the actuator: stroke per
    stroke 1): (550 + 800) × 1.2 = 1620 N."""
    j = _check(
        tmp_path,
        capstan_band(),
        actuator_stroke="40 mm",
        actuator_force="1.7 kN",
        spring_rate="20 N/mm",
        spring_preload_tolerance="0.1",
    )
    r = _rule(j, "release.force")
    assert r.value == pytest.approx((550 + 800) * 1.2, rel=1e-9)
    assert r.verdict is Verdict.PASS


def test_no_release_keys_no_rules(tmp_path):
    j = _check(tmp_path, conveyor_block())
    assert not [r for r in j.rules if r.rule.startswith(("release.", "spring."))]


def test_unknown_actuator_is_a_config_error(tmp_path):
    with pytest.raises(ConfigError, match="actuator = 'F7' names no load or spring"):
        _check(tmp_path, conveyor_block(), actuator="F7", shoe_clearance="1 mm")


def test_two_efforts_need_the_actuator_named(tmp_path):
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring="3500 N")
    j = _check(tmp_path, sk, shoe_clearance="1 mm", actuator_stroke="5 mm")
    r = _rule(j, "release.stroke")
    assert r.verdict is Verdict.SKIP
    assert "needs actuator" in r.message


#: Winch: 3.3·(840 + 740)/320 = 16.29375 mm of actuator stroke per mm of
#: equal lift (derived in tests/statics/test_kinematics.py).
WINCH_STROKE_PER_LIFT = 3.3 * (840 + 740) / 320


def test_a_stroke_short_of_the_clearance_takes_up_no_wear(tmp_path):
    """c = 1 mm needs 1 × 3 = 3 mm of stroke; 2 mm lifts the block only
    2/3 mm: w = 2/3 − 1 = −1/3 mm, which fails even a zero allowance, and the
    message says the clearance is not reached (not "takes up −0.33 mm")."""
    j = _check(tmp_path, conveyor_block(), shoe_clearance="1 mm", actuator_stroke="2 mm", wear_allowance="0 mm")
    r = _rule(j, "release.wear")
    assert r.value == pytest.approx(2 / CONVEYOR_STROKE_PER_LIFT - 1.0, rel=1e-9)
    assert r.value < 0
    assert r.verdict is Verdict.FAIL
    assert r.margin is None
    assert "does not reach the clearance" in r.message
    assert "0.6667 mm" in r.message and "takes up" not in r.message


def test_a_stroke_exactly_at_the_clearance_meets_a_zero_allowance(tmp_path):
    """S = 3 mm exactly lifts the block by 3/3 = 1 mm = c: w = 0 (to
    rounding, relative to the clearance), which meets a zero allowance."""
    j = _check(tmp_path, conveyor_block(), shoe_clearance="1 mm", actuator_stroke="3 mm", wear_allowance="0 mm")
    r = _rule(j, "release.wear")
    assert r.value == pytest.approx(0.0, abs=1e-12)
    assert r.verdict is Verdict.PASS


def test_limits_met_exactly_pass(tmp_path):
    """The rules read s ≤ actuator_stroke and w ≥ wear_allowance: a stroke
    of exactly c × 16.29375 mm, and the wear exactly 0.5 mm taken up by
    S = (c + 0.5) × 16.29375 mm, pass (the linkage's arithmetic carries a few
    ulps: 16.293750000000006 mm, 0.49999999999999933 mm)."""
    j = _check(tmp_path, winch_two_shoe(), shoe_clearance="1 mm", actuator_stroke="16.29375 mm")
    r = _rule(j, "release.stroke")
    assert r.value == pytest.approx(WINCH_STROKE_PER_LIFT, rel=1e-12)
    assert (r.verdict, r.margin) == (Verdict.PASS, 1.0)
    stroke = 1.5 * WINCH_STROKE_PER_LIFT
    j = _check(
        tmp_path, winch_two_shoe(), shoe_clearance="1 mm", actuator_stroke=f"{stroke!r} mm", wear_allowance="0.5 mm"
    )
    r = _rule(j, "release.wear")
    assert r.value == pytest.approx(0.5, rel=1e-12)
    assert (r.verdict, r.margin) == (Verdict.PASS, 1.0)


def test_a_near_miss_shows_the_figures_that_fail_it(tmp_path):
    """A stroke 1 ppm short of the 16.29375 mm needed fails (beyond
    rounding), and the message, the JUnit text and the terminal table show
    value and limit to enough figures to tell them apart (16.2938 against
    16.2937), not 16.29 against 16.29."""
    from dxfcheck.output.junit import junit_xml

    short = WINCH_STROKE_PER_LIFT * (1 - 1e-6)
    j = _check(tmp_path, winch_two_shoe(), shoe_clearance="1 mm", actuator_stroke=f"{short!r} mm")
    r = _rule(j, "release.stroke")
    assert r.verdict is Verdict.FAIL
    assert "16.2938 mm" in r.message
    assert "value 16.2938 mm, limit 16.2937 mm" in junit_xml(j)


@pytest.mark.parametrize(
    "keys",
    [
        {"spring_rate": "20 N/mm"},
        {"spring_preload_tolerance": "0.1"},
        {"spring_rate": "20 N/mm", "spring_preload_tolerance": "0.1"},
    ],
)
def test_spring_keys_on_a_drawing_without_a_spring_are_said_unused(tmp_path, keys):
    """The winch is set by a weight (F1), not a spring: the spring keys do
    nothing, and the spring rule says so in each direction rather than
    vanish."""
    j = _check(tmp_path, winch_two_shoe(), required_torque="100 N*m", **keys)
    assert not j.mechanism.springs
    for d in ("cw", "ccw"):
        r = _rule(j, f"spring.torque.{d}")
        assert r.verdict is Verdict.SKIP
        assert "has no spring" in r.message
        assert all(f"{k} (from" in r.message for k in keys)
