"""Long-shoe theory through the full pipeline, against published worked
examples (../shared/REFERENCES.md) and closed forms."""

from __future__ import annotations

import math

import pytest
from common import internal_hinged_shoe, pivoted_long_shoes
from hypothesis import given, settings
from hypothesis import strategies as st

import dxfcheck
from dxfcheck.core.findings import Code
from dxfcheck.output.sketch import Sketch
from dxfcheck.statics.contact import Direction
from dxfcheck.statics.contact.long_shoe import LongHingedShoe, equivalent_mu, pivot_distance


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "long.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def _symmetric_N(pa, b, r, semi):
    """N = Rx = pa·b·r·(2θ2 + sin 2θ2)/2 (Shigley's MED, symmetric pivoted shoe)."""
    return pa * b * r * (2 * semi + math.sin(2 * semi)) / 2


# --- symmetric pivoted shoes ---------------------------------------------------

PIVOTED = [
    # FOSSEE book 764 (probably Bhandari), Example 12.7 [seen]: 2θ = 100°,
    # D = 500, b = 100, μ = 0.2, pa = 0.5 MPa -> a = 280.59, T = 957.56 N·m per
    # shoe, Rx = 17063 N, Ry = 3413 N.  Printed to 5 figures.
    pytest.param(
        dict(semi_deg=50, r=250, b=100, mu=0.2, pa=0.5, pair=False),
        dict(a=280.59, torque=957.56, rx=17063, ry=3413),
        id="book764-ex12.7",
    ),
    # U. C. Jindal, *Machine Design*, Example 23-3 [seen]: θ2 = 60°, r = 160,
    # b = 40, μ = 0.3, pa = 0.9 MPa -> a = 187.22, T = 957.75 N·m for two
    # shoes, Rx = 8526 N.
    pytest.param(
        dict(semi_deg=60, r=160, b=40, mu=0.3, pa=0.9, pair=True),
        dict(a=187.22, torque=957.75, rx=8526, ry=None),
        id="jindal-ex23.3",
    ),
]


@pytest.mark.parametrize(("given_", "published"), PIVOTED)
@pytest.mark.parametrize("direction", ["cw", "ccw"])
def test_symmetric_pivoted_shoe(tmp_path, given_, published, direction):
    semi = math.radians(given_["semi_deg"])
    r, b, mu, pa = given_["r"], given_["b"], given_["mu"], given_["pa"]
    a = pivot_distance(r, semi)
    assert a == pytest.approx(published["a"], rel=2e-5)
    # effort that makes the pin push the shoe with Rx (lever ratio 2:1)
    effort = _symmetric_N(pa, b, r, semi) / 2
    sol = _solve(
        tmp_path, pivoted_long_shoes(r=r, semi_deg=given_["semi_deg"], a=a, effort_N=effort, pair=given_["pair"]), mu
    )
    case = sol.case(direction)
    for s in case.shoes:
        assert s.model == "long-pivoted"
        assert s.pressure_offset_deg == pytest.approx(0.0, abs=1e-7)  # ψ = 0 at the ideal pin distance
        assert s.peak_line_load_N_per_mm / b == pytest.approx(pa, rel=1e-9)
        assert s.normal_N == pytest.approx(published["rx"], rel=5e-5)
        assert s.friction_resultant_N == pytest.approx(mu * s.normal_N, rel=1e-9)  # Ry = μN
        if published["ry"] is not None:
            assert s.friction_resultant_N == pytest.approx(published["ry"], rel=2e-4)
        # the friction summed over the lining is T/r = (a/r)·μN, larger than the resultant Ry
        assert s.friction_lining_N == pytest.approx(a / r * mu * s.normal_N, rel=1e-9)
        assert s.friction_lining_N * r / 1000 == pytest.approx(s.torque_Nm, rel=1e-12)
        # T = a·μ·N = 2μ·pa·b·r²·sinθ2 per shoe
        assert s.torque_Nm == pytest.approx(2 * mu * pa * b * r**2 * math.sin(semi) / 1000, rel=1e-9)
        assert s.torque_Nm == pytest.approx(a * mu * s.normal_N / 1000, rel=1e-9)
        # the pin reaction on the shoe is the drum's resultant (two-force body)
        pin = case.pin(next(x.pin for x in sol.mechanism.shoes if x.name == s.name))
        on_shoe = next(att for att in pin.attachments if att.body == s.part)
        assert math.hypot(on_shoe.fx_N, on_shoe.fy_N) == pytest.approx(math.hypot(*s.force_N), rel=1e-9)
    assert case.torque_Nm == pytest.approx(published["torque"], rel=2e-5)


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


def _closed_form(pa, b, r, a, mu, t1, t2):
    """Shigley's MED (10th ed., §16-3; from memory for the equation numbers):
    MN, Mf about the hinge and T for p = pa·sinθ/sinθa."""
    ta = math.pi / 2 if t1 <= math.pi / 2 <= t2 else (t2 if t2 < math.pi / 2 else t1)
    sa = math.sin(ta)
    mn = pa * b * r * a / sa * ((t2 - t1) / 2 - (math.sin(2 * t2) - math.sin(2 * t1)) / 4)
    mf = mu * pa * b * r / sa * (r * (math.cos(t1) - math.cos(t2)) - a / 2 * (math.sin(t2) ** 2 - math.sin(t1) ** 2))
    t = mu * pa * b * r * r * (math.cos(t1) - math.cos(t2)) / sa
    return mn, mf, t


def shigley_16_1() -> Sketch:
    """Shigley's MED 10th ed., Problem 16-1 geometry: r = 150, hinge a = 125
    from the axis (both shoes on one hinge pin, below the axis), linings from
    θ = 0 to 120° measured from the hinge line, actuating forces 2.2 kN at
    an arm c = 216.5 about the hinge (horizontal, 91.5 above the axis)."""
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(0, -125, 12, label="H")
    internal_hinged_shoe(
        sk,
        r=150,
        hinge=(0, -125),
        phi_from=-90,
        phi_to=30,
        act=(20, 91.5),
        push=(1, 0),
        effort="2.2 kN",
        name="right",
        hinge_drawn=False,
    )
    internal_hinged_shoe(
        sk,
        r=150,
        hinge=(0, -125),
        phi_from=150,
        phi_to=270,
        act=(-20, 91.5),
        push=(-1, 0),
        effort="2.2 kN",
        name="left",
        hinge_drawn=False,
    )
    return sk


def test_shigley_problem_16_1(tmp_path):
    """Shigley's MED 10th ed., Problem 16-1 (published answers, [seen]):
    right shoe pa = 734.5 kPa, T = 277.6 N·m; left shoe T = 144.4 N·m;
    total 422 N·m.  b = 40 mm, μ = 0.28."""
    b, mu, r, a, c, F = 40.0, 0.28, 150.0, 125.0, 216.5, 2200.0
    sol = _solve(tmp_path, shigley_16_1(), mu)
    mn, mf, t_unit = _closed_form(1.0, b, r, a, mu, 0.0, math.radians(120))
    for case in sol.cases:
        shoes = sorted(case.shoes, key=lambda s: -s.torque_Nm)
        energising, other = shoes
        assert {s.model for s in shoes} == {"long-hinged"}
        pa_e = energising.peak_line_load_N_per_mm / b
        pa_o = other.peak_line_load_N_per_mm / b
        # closed forms: F·c = MN − Mf (self-energising), MN + Mf (other)
        assert pa_e == pytest.approx(F * c / (mn - mf), rel=1e-9)
        assert pa_o == pytest.approx(F * c / (mn + mf), rel=1e-9)
        assert energising.torque_Nm == pytest.approx(pa_e * t_unit / 1000, rel=1e-9)
        # published answers, 4 figures
        assert pa_e == pytest.approx(0.7345, rel=5e-4)
        assert energising.torque_Nm == pytest.approx(277.6, rel=5e-4)
        assert other.torque_Nm == pytest.approx(144.4, rel=5e-4)
        assert case.torque_Nm == pytest.approx(422, rel=1.5e-3)
        # peak pressure at θa = 90° from the hinge line
        assert energising.peak_at_deg % 360 in (pytest.approx(0.0, abs=1e-9), pytest.approx(180.0, abs=1e-9))


def book764_ex12_8() -> Sketch:
    """FOSSEE book 764, Example 12.8 geometry: r = 125, hinges at
    (86.6, ±50) (a = 100), linings θ = 0..120° from the hinge line, the
    actuating force P at arm c = 187.5 about each hinge."""
    sk = Sketch()
    sk.drum(0, 0, 125)
    internal_hinged_shoe(
        sk,
        r=125,
        hinge=(86.6, 50),
        phi_from=30,
        phi_to=150,
        act=(-100.9, 20),
        push=(0, 1),
        effort="2089.8 N",
        name="upper",
    )
    internal_hinged_shoe(
        sk,
        r=125,
        hinge=(86.6, -50),
        phi_from=210,
        phi_to=330,
        act=(-100.9, -20),
        push=(0, -1),
        effort="2089.8 N",
        name="lower",
    )
    return sk


def test_book764_example_12_8(tmp_path):
    """FOSSEE book 764, Example 12.8 (published solution code, [seen]):
    b = 40, pa = 1 MPa on the self-energising shoe, μ = 0.32 -> P = 2089.8 N,
    total T = 434.8 N·m.  Run here with P = 2089.8 N."""
    sol = _solve(tmp_path, book764_ex12_8(), 0.32)
    for case in sol.cases:
        energising = max(case.shoes, key=lambda s: s.torque_Nm)
        assert energising.peak_line_load_N_per_mm / 40 == pytest.approx(1.0, rel=2e-4)
        assert case.torque_Nm == pytest.approx(434.8, rel=3e-4)


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
    mn, mf, t = _closed_form(1.0, 1.0, r, a, mu, math.radians(t1), math.radians(t2))
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


def test_equivalent_mu_beside_the_model(tmp_path):
    """μ' = 4μ·sinθ/(2θ + sin 2θ) (Khurmi & Gupta): μ = 0.35 over 90° gives
    0.385 (the exam example in REFERENCES.md)."""
    assert equivalent_mu(0.35, 90) == pytest.approx(0.385, abs=5e-4)
    sol = _solve(tmp_path, pivoted_long_shoes(r=250, semi_deg=45, a=300, effort_N=1000, pair=False), 0.35)
    assert sol.case("cw").shoes[0].mu_equivalent == pytest.approx(equivalent_mu(0.35, 90), rel=1e-12)


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
