"""Long-shoe theory through the full pipeline, against closed forms; the
published worked examples (Shigley 16-1, book 764 Examples 12.7 and 12.8,
Jindal 23-3) are in ``tests/validation/``."""

from __future__ import annotations

import math

import pytest
from common import pivoted_long_shoes
from handcalc import hinged_shoe_closed_form
from hypothesis import given, settings
from hypothesis import strategies as st

import dxfcheck
from dxfcheck.core.findings import Code
from dxfcheck.output.sketch import Sketch
from dxfcheck.statics.contact import Direction
from dxfcheck.statics.contact.long_shoe import LongHingedShoe, pivot_distance


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "long.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def test_pivot_off_ideal_distance_tilts_the_pressure(tmp_path):
    """With the pin farther out than the ideal distance the pressure peak
    moves off the centreline.  Moment balance about the pin, worked by hand
    for q = A·cosφ + B·sinφ over ±α (φ from the centreline, pin at p):
    μ·A·(2r·sinα − p(α + sinα·cosα)) = s·B·p·(α − sinα·cosα), s the drum's
    sense; so tan ψ = B/A follows in closed form (derivation: common
    practice, from the friction and normal moments of Shigley's §16-4)."""
    r, semi, p, mu = 200.0, math.radians(35), 250.0, 0.35
    sol = _solve(tmp_path, pivoted_long_shoes(r=r, semi_deg=35, a=p, effort_N=2000, pair=False), mu)
    for d in ("cw", "ccw"):
        s = sol.case(d).shoes[0]
        tan_psi = (
            mu
            * (2 * r * math.sin(semi) - p * (semi + math.sin(semi) * math.cos(semi)))
            / (p * (semi - math.sin(semi) * math.cos(semi)))
        )
        sense = 1 if d == "ccw" else -1
        assert math.tan(math.radians(s.pressure_offset_deg)) == pytest.approx(sense * tan_psi, rel=1e-9)
        assert not any(f.code is Code.PARTIAL_CONTACT for f in sol.findings)


def test_partial_contact_is_reported(tmp_path):
    """A pin far from the ideal distance asks for negative pressure over part
    of the lining (by the closed form above, tan ψ ≈ −1.1 for a = 900,
    r = 200, ±60°, μ = 0.6: |ψ| > 90° − 60°): the shoe is solved on the
    patch that remains, and the pressure is zero at the patch's free end."""
    sol = _solve(tmp_path, pivoted_long_shoes(r=200, semi_deg=60, a=900, effort_N=2000, pair=False), 0.6)
    assert any(f.code is Code.PARTIAL_CONTACT for f in sol.findings)
    for c in sol.cases:
        s = c.shoes[0]
        span = (s.contact_to_deg - s.contact_from_deg) % 360
        assert 0 < span < 120 - 1e-6
        assert s.torque_Nm > 0
        assert c.residual < 1e-9
        assert min(q for _, q in s.line_load) >= -1e-9 * s.peak_line_load_N_per_mm


# --- hinged internal shoes -----------------------------------------------------


settings_ = settings(max_examples=40, deadline=None)


@settings_
@given(
    t1=st.floats(min_value=0, max_value=80),
    span=st.floats(min_value=10, max_value=170),
    a_frac=st.floats(min_value=0.3, max_value=1.6),
    mu=st.floats(min_value=0.05, max_value=0.6),
    internal=st.booleans(),
)
def test_hinged_integration_matches_closed_forms(t1, span, a_frac, mu, internal):
    """The quadrature of p = pa·sinθ/sinθa reproduces Shigley's closed-form
    MN, Mf and T (§16-3, 16-4) for arbitrary arcs: the hinge moments in the
    two drum directions are MN − Mf and MN + Mf."""
    t2 = min(t1 + span, 179.0)  # stay on the loaded side of the hinge line
    r = 150.0
    a = a_frac * r
    hinge = (a, 0.0)
    src = dxfcheck.read.drawing.Source("1F", "SHOE")
    drum = dxfcheck.mechanism.Drum((0.0, 0.0), r, src)
    arc = dxfcheck.read.drawing.ArcGeom(dxfcheck.Role.SHOE, (0.0, 0.0), r, t1, t2, src)
    shoe = dxfcheck.mechanism.Shoe("s", "p", arc, dxfcheck.mechanism.Mounting.FIXED, None, internal)
    model = LongHingedShoe(shoe, drum, hinge)
    mn, mf, t = hinged_shoe_closed_form(1.0, 1.0, r, a, mu, math.radians(t1), math.radians(t2))
    moments = []
    for d in (Direction.CW, Direction.CCW):
        (w,) = model.basis(mu, d)
        moments.append(abs(w.moment_about(hinge)))
        assert w.torque_per_unit_Nmm == pytest.approx(t, rel=1e-9, abs=1e-9 * r * r)
    scale = abs(mn) + abs(mf) + 1e-9
    assert 0.5 * (moments[0] + moments[1]) == pytest.approx(max(abs(mn), abs(mf)), abs=1e-8 * scale)
    assert 0.5 * abs(moments[0] - moments[1]) == pytest.approx(min(abs(mn), abs(mf)), abs=1e-8 * scale)


@pytest.mark.parametrize("kind", ["pivoted", "hinged"])
def test_long_theory_converges_to_short_for_small_arcs(tmp_path, kind):
    """As the contact angle shrinks, long-shoe theory tends to short-shoe
    theory; the difference falls like the square of the angle (μ' − μ ≈ μθ²/6
    for the symmetric case, from the series of 4 sinθ/(2θ + sin 2θ)).  The
    pivoted shoe keeps its pin at the ideal distance, where the short-shoe
    contact point stays on the lining."""
    diffs = []
    for semi in (16.0, 8.0, 4.0):
        if kind == "pivoted":
            a = pivot_distance(200, math.radians(semi))
            sk = pivoted_long_shoes(r=200, semi_deg=semi, a=a, effort_N=1000, pair=False)
        else:
            from common import block_brake

            sk = block_brake(r=200, l=500, x=200, a=50, effort="1000 N", contact_deg=2 * semi)
        t_long = _solve(tmp_path, sk, 0.3, shoe_model="long").case("ccw").torque_Nm
        t_short = _solve(tmp_path, sk, 0.3, shoe_model="short").case("ccw").torque_Nm
        diffs.append(abs(t_long / t_short - 1))
    assert diffs[0] > diffs[1] > diffs[2]
    assert diffs[2] < 5e-3
    assert diffs[1] / diffs[2] == pytest.approx(4, rel=0.25)  # halving the angle quarters the difference


def test_auto_threshold_and_floating_lever_fallback(tmp_path):
    """auto takes long theory above the threshold; a fixed shoe on a lever
    with no frame pivot falls back to short theory with a finding."""
    sk = pivoted_long_shoes(r=250, semi_deg=25, a=300, effort_N=1000, pair=False)  # 50° of contact
    assert _solve(tmp_path, sk, 0.3).cases[0].shoes[0].model == "short-pivoted"
    assert _solve(tmp_path, sk, 0.3, long_threshold_deg=40).cases[0].shoes[0].model == "long-pivoted"
    # a fixed shoe on a floating lever hung from the frame by two rods
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pin(-200, 210, 20, label="P1")
    sk.pin(300, 210, 20, label="P2")
    sk.link((-200, 210), (400, 210), label="lever", label_at=(100, 225))
    sk.link((0, 210), (0, 150))
    sk.shoe(0, 0, 150, 50, 130)
    sk.pivot(-200, -100, 20, label="G1")
    sk.link((-200, 210), (-200, -100), label="rod 1", label_at=(-215, 50))
    sk.pivot(450, 400, 20, label="G2")
    sk.link((300, 210), (450, 400), label="rod 2", label_at=(390, 300))
    sk.load(400, 210, 0, -1, "500 N")
    sol = _solve(tmp_path, sk, 0.3, shoe_model="long")
    s = sol.cases[0].shoes[0]
    assert s.model == "short-fixed"
    assert any(f.code is Code.SHORT_FALLBACK for f in sol.findings)


def test_short_shoe_torque_beside_long(tmp_path):
    """Where long-shoe theory is chosen, each case also carries the torque of
    the same drawing with short-shoe theory on every shoe (the same solve
    with shoe_model="short"); where short theory is chosen, none."""
    from common import winch_two_shoe

    path = tmp_path / "w.dxf"
    winch_two_shoe().save(path)
    auto = dxfcheck.analyse(path, mu=0.35)
    short = dxfcheck.analyse(path, mu=0.35, shoe_model="short")
    for d in ("cw", "ccw"):
        assert all(s.model == "long-pivoted" for s in auto.case(d).shoes)
        assert auto.case(d).short_shoe_torque_Nm == pytest.approx(short.case(d).torque_Nm, rel=1e-12)
        assert short.case(d).short_shoe_torque_Nm is None
        # 70° pivoted linings: the long-shoe torque is the larger (μ' > μ, Khurmi & Gupta)
        assert auto.case(d).torque_Nm > auto.case(d).short_shoe_torque_Nm > 0


def test_check_says_which_theory(tmp_path):
    import subprocess
    import sys

    from common import ROOT

    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "check", str(ROOT / "drawings" / "winch_two_shoe.dxf")],
        capture_output=True,
        text=True,
        timeout=120,
        cwd=tmp_path,
    )
    assert "shoe theory (auto, long above 60°): left shoe long-pivoted, right shoe long-pivoted" in r.stdout
    assert "short-shoe theory at μ = 0.3 would give: cw" in r.stdout
