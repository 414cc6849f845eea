"""Band brakes, spring-set actuation and the inverse question (the effort
for a torque), through the full pipeline."""

from __future__ import annotations

import math
import subprocess
import sys

import pytest
from common import block_brake, differential_band, double_block_spring_pair, simple_band
from schema_check import output_json

import dxfcheck
from dxfcheck.core.findings import Code
from dxfcheck.core.units import LBF_N
from dxfcheck.output.sketch import Sketch

LBF_IN_NM = LBF_N * 0.0254


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "b.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def _simple_band_effort(t1, mu, wrap_deg, r, anchor_run, arm):
    """W = T2·a/L for the simple band, a the arm of the slack piece about O
    worked out from the builder's geometry (Mott 4th ed., §22-15)."""
    t2 = t1 / math.exp(mu * math.radians(wrap_deg))
    s = math.radians(90 - wrap_deg / 2)
    e = math.radians(90 + wrap_deg / 2)
    pe = (r * math.cos(e), r * math.sin(e))
    o = (pe[0] - anchor_run * math.sin(e), pe[1] + anchor_run * math.cos(e))
    ps = (r * math.cos(s), r * math.sin(s))
    u = (math.sin(s), -math.cos(s))  # slack piece, leaving the drum
    t = (o[1] - ps[1]) / u[1]
    a_pin = (ps[0] + t * u[0], o[1])
    pull = (-u[0], -u[1])  # the band pulls the pin towards the drum
    arm_a = abs((a_pin[0] - o[0]) * pull[1] - (a_pin[1] - o[1]) * pull[0])
    return t2 * arm_a / arm, t2


def test_mott_example_22_10(tmp_path):
    """Mott, *Machine Elements in Mechanical Design*, 4th ed., Example
    Problem 22-10 [seen]: r = 6 in, wrap 225°, b = 2 in, p_max = 25 psi,
    μ = 0.25 -> T1 = p_max·b·r = 300 lb, T2 = 112 lb, T = 1128 lb·in
    (1125.6 unrounded).  Drawn in inches; the effort is set for T1 = 300 lb
    in the direction where the anchored end is tight.

    Direction: the simple band's lever carries the slack end only (W = T2·a/L,
    Mott §22-15), so the anchor O must be the tight end.  The figure's drum
    direction was not re-read (from memory); it follows from the physics.
    The anchor is at the wrap's left end; a clockwise drum's top surface
    moves right, away from O, dragging the band away from it: O is tight in
    the clockwise case, A (the lever end) in the counter-clockwise one."""
    w, t2 = _simple_band_effort(300.0, 0.25, 225, 6.0, 4.0, 20.0)
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


def test_jindal_example_23_2(tmp_path):
    """U. C. Jindal, *Machine Design*, Example 23-2 [seen]: T1 = 9600 N,
    μ = 0.22, wrap 225°, r = 200 -> T2 = 4046.4 N, T = 1110.72 N·m."""
    w, _ = _simple_band_effort(9600.0, 0.22, 225, 200.0, 150.0, 700.0)
    sk = simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort=f"{w!r} N")
    # the anchored end O tight: the clockwise drum (see the Mott test above)
    (band,) = _solve(tmp_path, sk, 0.22).case("cw").bands
    assert band.tight_pin == "O"
    assert band.tight_N == pytest.approx(9600, rel=1e-9)
    assert band.slack_N == pytest.approx(4046.4, rel=2e-5)
    assert band.torque_Nm == pytest.approx(1110.72, rel=2e-5)


def test_book764_differential_band_example_12_10(tmp_path):
    """FOSSEE book 764, Example 12.10 (published solution code, [seen]):
    T1 = 15000 N, μ = 0.25, r = 300, wrap 240°, a = 200, c = 50, L = 950 ->
    T2 = 5263.8 N, W = 318.69 N, T = 2920.86 N·m; not self-locking.
    Differential band W·L = T2·a − T1·c; self-locks when a/c ≤ e^(μθ)
    (Mott 4th ed., §22-15).

    Direction: the formula has the tight end on the short arm c (pin C, the
    wrap's left end), whose pull helps the effort.  The drum surface moves
    away from C when the drum turns clockwise (its top moves right): the
    clockwise case.  Counter-clockwise, A is tight and the brake is weaker."""
    mu, theta = 0.25, math.radians(240)
    t1 = 15000.0
    t2 = t1 / math.exp(mu * theta)
    w = (t2 * 200 - t1 * 50) / 950
    assert w == pytest.approx(318.69, rel=2e-5)
    sol = _solve(tmp_path, differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort=f"{w!r} N"), mu)
    assert sol.mechanism.family == "differential band brake"
    case = sol.case("cw")
    (band,) = case.bands
    assert (band.tight_pin, band.slack_pin) == ("C", "A")
    assert band.tight_N == pytest.approx(t1, rel=1e-9)
    assert band.slack_N == pytest.approx(5263.8, rel=2e-5)
    assert case.torque_Nm == pytest.approx(2920.86, rel=2e-5)
    assert case.critical_mu == pytest.approx(math.log(200 / 50) / theta, rel=1e-9)
    assert not any(f.code is Code.SELF_LOCKING for f in sol.findings)


def test_self_locking_differential_band(tmp_path):
    """a/c = 2 < e^(0.25·240°) = 2.85: the band self-locks in the direction
    whose tight end has the short arm; critical μ = ln(a/c)/θ (Mott §22-15).
    The short arm c is at pin C, the wrap's left end, tight when the drum
    turns clockwise (its surface moves away from C): the clockwise case
    locks, the counter-clockwise one (A tight, its pull against the effort)
    cannot."""
    theta = math.radians(240)
    sol = _solve(tmp_path, differential_band(r=300, wrap_deg=240, a=100, c=50, arm=950, effort="300 N"), 0.25)
    assert sol.case("cw").critical_mu == pytest.approx(math.log(2) / theta, rel=1e-9)
    assert sol.case("ccw").critical_mu is None
    locked = [f for f in sol.findings if f.code is Code.SELF_LOCKING]
    assert len(locked) == 1 and locked[0].message.startswith("cw:")


def test_spring_set_double_block(tmp_path):
    """B. K. Sarkar, *Theory of Machines*, ch. 10, Illustration 3, with the
    spring drawn as a spring between the lever tops (3500 N, tension):
    Ft1 = 2690 N, Ft2 = 5156 N, T = 1412.2 N·m (μ' = 0.4489)."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3500 N T")
    sol = _solve(tmp_path, sk, 0.4489)
    assert "spring-set" in sol.mechanism.family
    assert not [f for f in sol.findings if f.code is Code.OPEN_END]
    for c in sol.cases:
        ft = sorted(s.friction_lining_N for s in c.shoes)
        assert ft == [pytest.approx(2690, rel=5e-4), pytest.approx(5156, rel=5e-4)]
        assert c.torque_Nm == pytest.approx(1412.2, rel=2e-4)
        assert [(s.force_N, s.state) for s in c.springs] == [(3500.0, "tension")]


def test_compression_spring_pushes(tmp_path):
    """The same spring written as compression pushes the levers apart: the
    shoes would lift."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3.5 kN C")
    sol = _solve(tmp_path, sk, 0.4)
    assert any(f.code is Code.SHOE_LIFTS for f in sol.findings)
    # a result that is no brake is not printed as one: no torque, the reason,
    # and the question whether the spring's sense is reversed
    for c in sol.cases:
        assert not c.brakes and c.braking_torque_Nm is None
        assert "is the spring's sense reversed" in c.why_not_braking
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(tmp_path / "b.dxf"), "--mu", "0.4", "--json"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert r.returncode == 1  # solved, but no brake
    for c in output_json(r.stdout)["cases"]:
        assert c["torque_Nm"] is None and c["not_braking"].startswith("S303")
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(tmp_path / "b.dxf"), "--mu", "0.4"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    heads = [ln for ln in r.stdout.splitlines() if ln.startswith(("drum cw ", "drum ccw "))]
    assert len(heads) == 2 and all("does not brake" in ln and "braking torque" not in ln for ln in heads)


@pytest.mark.parametrize(("text", "code"), [("3500 N", Code.SPRING_NO_SENSE), ("lots T", Code.TEXT_UNREAD)])
def test_spring_text_faults(tmp_path, text, code):
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), text)
    path = tmp_path / "s.dxf"
    sk.save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    assert code in {f.code for f in mech.findings}


def test_band_faults(tmp_path):
    sk = Sketch()
    sk.drum(0, 0, 200)
    sk.pivot(-300, -300, 20)
    sk.link((-300, -300), (300, -300))
    sk.band(0, 0, 200, -30, 210, (150, -300), (-999, -999))
    sk.load(300, -300, 0, -1, "100 N")
    path = tmp_path / "bf.dxf"
    sk.save(path)
    codes = {f.code for f in dxfcheck.build_mechanism(dxfcheck.read_drawing(path)).findings}
    assert Code.BAND_END_OFF in codes


# --- the inverse question -----------------------------------------------------


def test_effort_for_torque_block_brake(tmp_path):
    """Book 764 Example 12.4 the other way round: for T = 250 N·m the effort
    is 1303.57 N in one direction and 1553.57 N in the other (printed to 6
    figures); P·l = N(x ∓ μa), N = T/(μr)."""
    sk = block_brake(r=200, l=500, x=200, a=50, effort=None)
    sol = _solve(tmp_path, sk, 0.35, torque_Nm=250.0)
    efforts = sorted(c.loads[0].force_N for c in sol.cases)
    assert efforts == [pytest.approx(1303.57, rel=5e-6), pytest.approx(1553.57, rel=5e-6)]
    for c in sol.cases:
        assert c.torque_Nm == pytest.approx(250.0, rel=1e-12)
        assert c.shoes[0].normal_N == pytest.approx(250e3 / (0.35 * 200), rel=1e-12)
        assert c.effort_scale == pytest.approx(c.loads[0].force_N, rel=1e-12)  # drawn as 1 N


def test_effort_for_torque_cli_keeps_load_ratios(tmp_path):
    """A drawing with two loads: both scale together (the statics is linear
    in the loads)."""
    sk = block_brake(r=200, l=500, x=200, a=50, effort="400 N")
    sk.load(100, 250, 0, -1, "200 N")
    path = tmp_path / "two.dxf"
    sk.save(path)
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(path), "--mu", "0.35", "--torque", "250 N*m", "--json"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert r.returncode == 0, r.stderr
    doc = output_json(r.stdout)
    for c in doc["cases"]:
        f = {ld["name"]: ld["force_N"] for ld in c["loads"]}
        assert f["F1"] == pytest.approx(2 * f["F2"], rel=1e-12)
        assert c["torque_Nm"] == pytest.approx(250.0, rel=1e-12)
        assert c["effort_scale"] == pytest.approx(f["F1"] / 400, rel=1e-12)


def test_effort_for_torque_refused_when_self_locking(tmp_path):
    sk = block_brake(r=200, l=500, x=200, a=250, effort="1 N")
    path = tmp_path / "lock.dxf"
    sk.save(path)
    with pytest.raises(dxfcheck.SolveError, match="self-locks"):
        dxfcheck.analyse(path, mu=0.9, torque_Nm=100.0)


def test_band_rules_and_effort_margin(tmp_path):
    """The gate on a band: p = T1/(b·r) against the limit (Mott §22-15), and
    the effort margin, effort × required torque / torque (linear statics)."""
    from dxfcheck.pipeline import check

    w, _ = _simple_band_effort(9600.0, 0.22, 225, 200.0, 150.0, 700.0)
    path = tmp_path / "band.dxf"
    simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort=f"{w!r} N").save(path)
    p = 9600.0 / (80 * 200)
    j = check(
        path,
        overrides=[
            ("mu", "0.22"),
            ("lining_width", "80 mm"),
            ("lining_pressure_max", f"{p * 1.0001} MPa"),
            ("required_torque", "1110.72 N*m"),
            ("directions", "cw"),  # the anchor O tight (see test_mott_example_22_10)
        ],
    )
    rules = {r.rule: r for r in j.rules}
    assert rules["band.pressure.band1"].value == pytest.approx(p, rel=1e-9)
    assert str(rules["band.pressure.band1"].verdict) == "pass"
    assert str(rules["band.taut.band1"].verdict) == "pass"
    eff = rules["effort.cw"]
    assert eff.limit == pytest.approx(w, rel=1e-12)
    assert eff.value == pytest.approx(w * 1110.72 / j.solutions[0.22].case("cw").torque_Nm, rel=1e-12)
    assert eff.margin == pytest.approx(1.0, rel=3e-5)


def test_marked_copy_shows_band_and_spring_forces(tmp_path):
    from dxfcheck.output.markup import plan_markup

    sol = _solve(tmp_path, differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort="300 N"), 0.25)
    kinds = {a.kind for a in plan_markup(sol, "cw").arrows}
    assert "band" in kinds
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3500 N T")
    sol = _solve(tmp_path, sk, 0.4)
    springs = [a for a in plan_markup(sol).arrows if a.kind == "spring"]
    assert len(springs) == 2 and all(a.force_N == pytest.approx(3500) for a in springs)
