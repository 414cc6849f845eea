"""Release kinematics against hand calculations and against the statics.

* Closed forms, each derived by hand below from the drawing's geometry (plain
  lever kinematics: a rigid lever turning by a small angle θ about its pivot
  O moves a point P by θ × (P − O); Beer & Johnston, *Vector Mechanics for
  Engineers: Statics*, 11th ed., ch. 10, virtual displacements).
* The virtual-work identity (Beer & Johnston, ch. 10.1-10.5) on every drawing
  of ``common.CATALOGUE`` and ``drawings/*.dxf``: on every motion the joints
  allow, the efforts' work equals the work done against the drum's forces.
  At μ = 0, effort × its stroke (against it) = Σ shoe normal force × lift +
  Σ band end tension × travel; at the working μ the same holds with the
  drum's whole force (normal and friction) on each shoe.
"""

from __future__ import annotations

import math

import pytest
from common import CATALOGUE, ROOT, block_brake, winch_two_shoe

import dxfcheck
from dxfcheck.statics.kinematics import (
    Motion,
    effort_names,
    free_motions,
    lining_lift_mm,
    release,
    report,
)


def _analyse(tmp_path, sketch, mu, **kw):
    path = tmp_path / "k.dxf"
    sketch.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def test_single_lever_lift_is_stroke_times_arm_ratio(tmp_path):
    """Block brake, pivot O(-200, 250), load P down at E(300, 250) (arm
    l = 500), block touching the 200 mm drum at C(0, 200), lining 80°-100°.

    By hand: the load point moving up by s (against P) turns the lever
    counter-clockwise by θ = s/500.  C moves by θ × (C − O) = θ·(−(200 − 250),
    0 + 200) = θ·(50, 200): up (away from the drum: the lift) by 200θ =
    0.4·s and right by 50θ.  Lift = stroke × arm ratio x/l = 200/500, so the
    stroke per mm of lift is 2.5.  A lining point at polar angle φ on r = 200
    moves radially by θ·(250 cos φ + 200 sin φ) (no stationary point inside
    80°-100°, so the extremes are the ends): least at φ = 100°."""
    sol = _analyse(tmp_path, block_brake(r=200, l=500, x=200, a=50, effort="1 kN"), 0.3)
    mech = sol.mechanism
    rel = release(mech, "F1")
    assert rel.mobility == 1
    assert rel.stroke_per_lift == pytest.approx(500 / 200, rel=1e-9)
    theta = 1 / 500  # rad per mm of stroke
    lift = rel.per_mm.shoe("block")
    assert lift.mid_mm == pytest.approx(200 * theta, rel=1e-9)
    c100, s100 = math.cos(math.radians(100)), math.sin(math.radians(100))
    c80, s80 = math.cos(math.radians(80)), math.sin(math.radians(80))
    assert lift.least_mm == pytest.approx(theta * (250 * c100 + 200 * s100), rel=1e-6)
    assert lift.most_mm == pytest.approx(theta * (250 * c80 + 200 * s80), rel=1e-6)
    # directions: the contact point moves up and to the right, the pivot stays
    part = mech.shoes[0].part
    assert rel.motion.at(part, (0.0, 200.0)) == pytest.approx((50 * theta, 200 * theta), abs=1e-12)
    assert rel.motion.pin_shift("O") == pytest.approx((0.0, 0.0), abs=1e-12)
    assert rel.motion.at("lever", (300.0, 250.0)) == pytest.approx((0.0, 1.0), abs=1e-12)
    # the set force through the velocity ratio: the load itself, ratio 1
    assert rel.release_force_N == pytest.approx(1000.0, rel=1e-9)


def test_floating_crank_lifts_share_by_lever_ratios(tmp_path):
    """The winch brake (drawings/build.py): levers pivoted at O1(-250, -320)
    and O2(250, -320), shoe pins S1(-250, 0) and S2(250, 0), tie-rod pins
    T1(-250, 520) and T2(250, 420); a bell crank floating on T2, its arm up to
    C(250, 520) (tied to T1 by the horizontal rod) and its arm out to the load
    at E(580, 420), 330 from T2.

    By hand, with the levers' turns θ1, θ2 and the crank's θ3 (counter-
    clockwise): S1 moves θ1 × (0, 320) = (−320θ1, 0), lifting the left shoe
    (outward is −x there) by y1 = 320θ1; S2 moves (−320θ2, 0), lifting the
    right shoe (outward +x) by y2 = −320θ2.  T1 moves (−840θ1, 0), T2
    (−740θ2, 0), C = T2 + θ3 × (0, 100) moves by −740θ2 − 100θ3 along x; the
    rod keeps T1 and C moving alike along it: 100θ3 = 840θ1 − 740θ2.  The
    load point E rises by 330θ3, against the load: the stroke

        s = 3.3·(840·y1 + 740·y2)/320.

    So one shoe alone (the other held) takes 3.3·840/320 = 8.6625 mm of
    stroke per mm of lift on the left, 3.3·740/320 = 7.63125 on the right, and
    an equal lift of both 16.29375 mm per mm: the floating crank shares the
    stroke by the lever ratios 840:740."""
    sol = _analyse(tmp_path, winch_two_shoe(), 0.35)
    rel = release(sol.mechanism, "F1")
    assert rel.equal_lift
    assert rel.stroke_per_lift == pytest.approx(3.3 * (840 + 740) / 320, rel=1e-9)
    shares = {s.name: s for s in rel.shares}
    assert shares["left shoe"].stroke_per_lift == pytest.approx(3.3 * 840 / 320, rel=1e-9)
    assert shares["right shoe"].stroke_per_lift == pytest.approx(3.3 * 740 / 320, rel=1e-9)
    assert shares["left shoe"].share == pytest.approx(840 / 1580, rel=1e-9)
    y = 1 / rel.stroke_per_lift
    for name in ("left shoe", "right shoe"):
        assert rel.per_mm.shoe(name).mid_mm == pytest.approx(y, rel=1e-9)
    # directions: the left shoe pin moves left, the right one right, T1 left
    assert rel.motion.pin_shift("S1") == pytest.approx((-y, 0.0), abs=1e-12)
    assert rel.motion.pin_shift("S2") == pytest.approx((y, 0.0), abs=1e-12)
    assert rel.motion.pin_shift("T1") == pytest.approx((-840 * y / 320, 0.0), abs=1e-12)
    # a pivoted shoe that translates: its lining ends lift by y·cos 35°
    assert rel.per_mm.shoe("left shoe").least_mm == pytest.approx(y * math.cos(math.radians(35)), rel=1e-6)


def _drawings():
    """(id, build or path, μ) over the catalogue and the demo drawings."""
    out = [(name, build, mu) for name, (build, mu) in CATALOGUE.items()]
    out += [(p.name, p, 0.35) for p in sorted((ROOT / "drawings").glob("*.dxf"))]
    return out


def _solve(tmp_path, item, mu, model="auto"):
    _, src, _ = item
    if callable(src):
        path = tmp_path / "d.dxf"
        src().save(path)
    else:
        path = src
    return dxfcheck.analyse(path, mu=mu, shoe_model=model)


def _effort_work(mech, motion: Motion) -> float:
    """Σ effort force × its stroke against it [N·mm]."""
    return sum(e.force_N * e.stroke_mm for e in report(mech, motion).efforts)


@pytest.mark.parametrize("model", ["short", "auto"])
@pytest.mark.parametrize("item", _drawings(), ids=lambda i: i[0])
def test_virtual_work_at_zero_friction(tmp_path, item, model):
    sol = _solve(tmp_path, item, 0.0, model)
    mech = sol.mechanism
    shoes = {s.name: s for s in mech.shoes}
    case = sol.cases[0]
    basis = free_motions(mech)
    assert basis
    rel = release(mech, effort_names(mech)[0])
    motions = [*basis, rel.motion]
    for motion in motions:
        against = 0.0
        for s in case.shoes:
            lift = lining_lift_mm(mech, shoes[s.name], motion, s.normal_at_mm)
            # the drum pushes the shoe away from it: along the lift's sense
            cx, cy = mech.drum.center
            px, py = s.normal_at_mm
            r = math.hypot(px - cx, py - cy)
            away = ((px - cx) / r, (py - cy) / r) if not s.internal else ((cx - px) / r, (cy - py) / r)
            assert s.normal_force_N == pytest.approx((s.normal_N * away[0], s.normal_N * away[1]), abs=1e-6)
            assert s.normal_N > 0
            against += s.normal_N * lift
        for b in case.bands:
            assert b.tight_N == pytest.approx(b.slack_N)  # μ = 0: no friction on the band
            for end in b.ends:
                shift = motion.pin_shift(end.pin)
                against += end.pull_N[0] * shift[0] + end.pull_N[1] * shift[1]
        scale = max(1.0, abs(against))
        assert _effort_work(mech, motion) == pytest.approx(against, abs=1e-7 * scale)
    # the release moves every effort... against its force: positive work, shoes lift
    assert rel.stroke_per_lift is not None and rel.stroke_per_lift > 0
    assert rel.release_force_N == pytest.approx(_effort_work(mech, rel.motion), rel=1e-9)


@pytest.mark.parametrize("item", _drawings(), ids=lambda i: i[0])
def test_virtual_work_with_friction(tmp_path, item):
    """At the working μ the drum's friction is one more external force on
    the shoes: the efforts' work equals minus the work of the drum's whole
    force on the shoes and the bands' pulls on their pins."""
    sol = _solve(tmp_path, item, item[2])
    mech = sol.mechanism
    for motion in free_motions(mech):
        for case in sol.cases:
            drum = 0.0
            for s in case.shoes:
                for at, f in ((s.normal_at_mm, s.normal_force_N), (s.friction_at_mm, s.friction_force_N)):
                    u = motion.at(s.part, at)
                    drum += f[0] * u[0] + f[1] * u[1]
            for b in case.bands:
                for end in b.ends:
                    u = motion.pin_shift(end.pin)
                    drum += end.pull_N[0] * u[0] + end.pull_N[1] * u[1]
            # efforts' work = minus their work against: Σ F·stroke = drum work
            assert _effort_work(mech, motion) == pytest.approx(drum, abs=1e-7 * max(1.0, abs(drum)))


def test_shares_are_the_statics_force_ratios(tmp_path):
    """By virtual work at μ = 0, the stroke per mm of one shoe's lift alone
    is that shoe's normal force per newton of effort (winch: a force ratio
    the statics gives independently)."""
    sol = _analyse(tmp_path, winch_two_shoe(), 0.0, shoe_model="short")
    rel = release(sol.mechanism, "F1")
    for sh in rel.shares:
        n = sol.cases[0].shoe(sh.name).normal_N
        assert sh.stroke_per_lift == pytest.approx(n / 1800.0, rel=1e-9)


def test_unknown_actuator_is_refused(tmp_path):
    sol = _analyse(tmp_path, winch_two_shoe(), 0.35)
    with pytest.raises(ValueError, match="no load or spring named 'F9'"):
        release(sol.mechanism, "F9")
