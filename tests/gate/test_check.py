"""The release gate: each rule at its boundary against a hand calculation
from the published formula it uses, spec precedence and units, JUnit output
and exit codes."""

from __future__ import annotations

import math
import subprocess
import sys
import xml.etree.ElementTree as ET

import pytest
from common import block_brake, push_rod_block
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
from schema_check import output_json

import dxfcheck
from dxfcheck.gate.rules import Verdict
from dxfcheck.pipeline import check

# The test brake (handcalc.save_block_brake): r=200, l=500, x=200, a=50, P = 1000 N.
R, L, X, A, P, MU = BLOCK_R, BLOCK_L, BLOCK_X, BLOCK_A, BLOCK_P, BLOCK_MU
PIVOT_D = 20.0
CONTACT_DEG = BLOCK_CONTACT_DEG


lever_N = block_lever_N  # P·l = N(x ∓ μa) (Khurmi & Gupta, *Theory of Machines*, brakes; from memory)


def pivot_force(mu: float, energising: bool) -> float:
    """Pivot reaction by hand: minus the sum of effort (0, -P), normal (0, N)
    and friction (∓μN, 0) on the lever."""
    n = lever_N(mu, energising)
    return math.hypot(mu * n, n - P)


@pytest.fixture
def brake(tmp_path):
    return save_block_brake(tmp_path / "block.dxf")


def verdict_at(path, rule, key, limit_value, unit, **spec):
    rules, _ = run_rules(path, **{key: f"{limit_value!r} {unit}".strip()}, **spec)
    return rules[rule]


@pytest.mark.parametrize(("planes", "factor"), [(1, 1.0), (2, 0.5)])
def test_pin_shear_boundary(brake, planes, factor):
    """τ = F/(n·πd²/4), n shear planes (Shigley's MED 10th ed., ch. 3, direct
    shear; section from memory)."""
    tau = factor * pivot_force(MU, True) / (math.pi * PIVOT_D**2 / 4)
    common = {"mu": MU, "pin_shear_planes": planes}
    ok = verdict_at(brake, "pin.shear.O", "pin_shear_allow", tau * 1.0001, "MPa", **common)
    bad = verdict_at(brake, "pin.shear.O", "pin_shear_allow", tau * 0.9999, "MPa", **common)
    assert ok.value == pytest.approx(tau, rel=1e-9)
    assert (ok.verdict, bad.verdict) == (Verdict.PASS, Verdict.FAIL)
    assert bad.margin == pytest.approx(0.9999, rel=1e-9)


def test_pin_bearing_boundary(brake):
    """p = F/(d·L) on the projected area (Shigley's MED 10th ed., ch. 3; from memory)."""
    length = 25.0
    p = pivot_force(MU, True) / (PIVOT_D * length)
    common = {"mu": MU, "pin_length": f"{length} mm"}
    ok = verdict_at(brake, "pin.bearing.O", "pin_bearing_allow", p * 1.0001, "MPa", **common)
    bad = verdict_at(brake, "pin.bearing.O", "pin_bearing_allow", p * 0.9999, "MPa", **common)
    assert ok.value == pytest.approx(p, rel=1e-9)
    assert (ok.verdict, bad.verdict) == (Verdict.PASS, Verdict.FAIL)


def test_lining_pressure_and_pv_boundary(brake):
    """Short shoe: p = N/(b·2r·sin(θ/2)) (Shigley's MED 10th ed., ch. 16,
    uniform pressure on the projected area); pV with V = πDn/60 (Tribology
    Handbook B8, pV limits of drum brakes)."""
    b, n_rpm = 60.0, 90.0
    pressure = lever_N(MU, True) / (b * 2 * R * math.sin(math.radians(CONTACT_DEG) / 2))
    v = math.pi * 2 * R * n_rpm / 60 / 1000
    common = {"mu": MU, "lining_width": f"{b} mm", "drum_speed": f"{n_rpm} rpm"}
    ok = verdict_at(brake, "lining.pressure.block", "lining_pressure_max", pressure * 1.0001, "MPa", **common)
    bad = verdict_at(brake, "lining.pressure.block", "lining_pressure_max", pressure * 0.9999, "MPa", **common)
    assert ok.value == pytest.approx(pressure, rel=1e-9)
    assert (ok.verdict, bad.verdict) == (Verdict.PASS, Verdict.FAIL)
    ok = verdict_at(brake, "lining.pv.block", "pv_max", pressure * v * 1.0001, "MPa*m/s", **common)
    bad = verdict_at(brake, "lining.pv.block", "pv_max", pressure * v * 0.9999, "MPa*m/s", **common)
    assert ok.value == pytest.approx(pressure * v, rel=1e-9)
    assert (ok.verdict, bad.verdict) == (Verdict.PASS, Verdict.FAIL)


def test_torque_rule_uses_mu_min_and_the_weaker_direction(brake):
    """T = μ·N·r at mu_min (Khurmi & Gupta, from memory); the non-energising
    direction is the weaker one."""
    mu_min = 0.3
    t_weak = mu_min * lever_N(mu_min, False) * R / 1000
    t_strong = mu_min * lever_N(mu_min, True) * R / 1000
    spec = {"mu": MU, "mu_min": mu_min, "mu_max": 0.4}
    rules, _ = run_rules(brake, required_torque=f"{t_weak * 0.9999} N*m", **spec)
    assert {rules["torque.cw"].verdict, rules["torque.ccw"].verdict} == {Verdict.PASS}
    assert sorted(r.value for r in (rules["torque.cw"], rules["torque.ccw"])) == pytest.approx([t_weak, t_strong])
    rules, _ = run_rules(brake, required_torque=f"{t_weak * 1.0001} N*m", **spec)
    assert sorted(str(rules[k].verdict) for k in ("torque.cw", "torque.ccw")) == ["fail", "pass"]
    rules, _ = run_rules(brake, required_torque=f"{t_weak * 1.0001} N*m", directions="ccw", **spec)
    assert "torque.cw" not in rules


def test_motor_duty(brake):
    """Required torque from the motor: T = factor·P/ω with ω = 2πn/60 (rated
    torque of a motor: common practice, no single source).  7.5 kW at
    1450 rpm with factor 1.5 gives 74.09 N·m; the factor is then set so the
    duty sits just either side of the brake's weaker-direction torque."""
    motor = {"mu": MU, "motor_power": "7.5 kW", "motor_speed": "1450 rpm"}
    rules, _ = run_rules(brake, torque_factor=1.5, **motor)
    assert rules["torque.cw"].limit == pytest.approx(1.5 * 7500 / (2 * math.pi * 1450 / 60), rel=1e-12)
    assert rules["torque.cw"].limit == pytest.approx(74.09, abs=0.005)
    t_weak = MU * lever_N(MU, False) * R / 1000
    rated = 7500 / (2 * math.pi * 1450 / 60)
    rules, _ = run_rules(brake, torque_factor=t_weak / rated * 0.9999, **motor)
    assert {rules["torque.cw"].verdict, rules["torque.ccw"].verdict} == {Verdict.PASS}
    rules, _ = run_rules(brake, torque_factor=t_weak / rated * 1.0001, **motor)
    assert Verdict.FAIL in {rules["torque.cw"].verdict, rules["torque.ccw"].verdict}
    rules, _ = run_rules(brake, motor_power="7.5 kW", mu=MU)
    assert rules["torque.cw"].verdict is Verdict.SKIP and "motor_speed" in rules["torque.cw"].message


def test_self_lock_margin_boundary(tmp_path):
    """Self-locking at μ = x/a (Khurmi & Gupta, from memory): x = 200,
    a = 250 -> 0.8; with mu_max = 0.5 the margin factor 1.6 is the boundary."""
    path = tmp_path / "lock.dxf"
    block_brake(r=200, l=500, x=200, a=250, effort="500 N").save(path)
    spec = {"mu": 0.4, "mu_max": 0.5}
    rules, _ = run_rules(path, self_lock_margin=1.599, **spec)
    energising = next(r for r in rules.values() if r.rule.startswith("self_lock") and r.value is not None)
    assert energising.value == pytest.approx(0.8, abs=1e-9)
    assert energising.verdict is Verdict.PASS
    rules, _ = run_rules(path, self_lock_margin=1.601, **spec)
    assert rules[energising.rule].verdict is Verdict.FAIL


def test_self_locking_at_mu_max_fails_the_shoe(tmp_path):
    path = tmp_path / "lock.dxf"
    block_brake(r=200, l=500, x=200, a=250, effort="500 N").save(path)
    rules, j = run_rules(path, mu=0.4, mu_max=0.85)
    assert rules["shoe.contact.block"].verdict is Verdict.FAIL
    assert j.verdict is Verdict.FAIL


def test_torque_asymmetry_warns(brake):
    """T_ccw/T_cw = (x + μa)/(x − μa) for the block brake (lever equation)."""
    diff = 1 - (X - MU * A) / (X + MU * A)
    rules, _ = run_rules(brake, mu=MU, torque_asymmetry_max=diff * 1.0001)
    assert rules["torque.asymmetry"].value == pytest.approx(diff, rel=1e-9)
    assert rules["torque.asymmetry"].verdict is Verdict.PASS
    rules, j = run_rules(brake, mu=MU, torque_asymmetry_max=diff * 0.9999)
    assert rules["torque.asymmetry"].verdict is Verdict.WARN
    assert j.verdict is Verdict.WARN


@pytest.fixture
def pushrod(tmp_path):
    path = tmp_path / "push.dxf"
    push_rod_block(rod_d=16).save(path)
    return path


def test_rod_stress_and_euler_buckling_boundary(pushrod):
    """σ = F/A; Euler's column P_cr = π²EI/(KL)² with I = πd⁴/64 (Shigley's
    MED 10th ed., §4-11, section from memory).  The push rod carries F = P·200/100 = 1000 N in
    compression by the crank's moment balance about K."""
    f, d, length, e_mod, k = 1000.0, 12.0, 190.0, 210000.0, 1.0
    area = math.pi * d**2 / 4
    p_cr = math.pi**2 * e_mod * (math.pi * d**4 / 64) / (k * length) ** 2
    spec = {"mu": MU, "rod_diameter": f"{d} mm", "rod_modulus": f"{e_mod} MPa"}
    rules, _ = run_rules(
        pushrod, rod_stress_allow=f"{f / area * 1.0001} MPa", buckling_safety=p_cr / f * 0.9999, **spec
    )
    assert rules["member.stress.push rod"].value == pytest.approx(f / area, rel=1e-9)
    assert rules["member.stress.push rod"].verdict is Verdict.PASS
    buck = rules["member.buckling.push rod"]
    assert buck.inputs["euler_load_N"] == pytest.approx(p_cr, rel=1e-12)
    assert buck.inputs["compression_N"] == pytest.approx(f, rel=1e-9)
    assert buck.verdict is Verdict.PASS
    rules, _ = run_rules(
        pushrod, rod_stress_allow=f"{f / area * 0.9999} MPa", buckling_safety=p_cr / f * 1.0001, **spec
    )
    assert rules["member.stress.push rod"].verdict is Verdict.FAIL
    assert rules["member.buckling.push rod"].verdict is Verdict.FAIL


def test_rules_without_inputs_are_skipped_with_a_reason(brake):
    rules, _ = run_rules(brake, mu=MU)
    assert rules["pin.shear.O"].verdict is Verdict.SKIP and "pin_shear_allow" in rules["pin.shear.O"].message
    assert rules["torque.cw"].verdict is Verdict.SKIP
    assert rules["lining.pv.block"].verdict is Verdict.SKIP


# --- spec sources -------------------------------------------------------------


def test_spec_precedence(tmp_path):
    """defaults < dxfcheck.toml [spec] < [spec."NAME.dxf"] < header property
    < sidecar NAME.toml < command line."""
    import ezdxf

    path = tmp_path / "block.dxf"
    doc = block_brake(r=R, l=L, x=X, a=A, effort=f"{P} N").to_doc()
    doc.header.custom_vars.append("dxfcheck.pin_length", "30 mm")
    doc.header.custom_vars.append("dxfcheck.lining_width", "61 mm")
    doc.header.custom_vars.append("dxfcheck.pins.O.pin_shear_allow", "44 MPa")
    doc.saveas(path)
    assert ezdxf.readfile(path).header.custom_vars.has_tag("dxfcheck.pin_length")
    (tmp_path / "dxfcheck.toml").write_text(
        '[spec]\nmu = 0.3\npin_length = "10 mm"\nlining_width = "50 mm"\ndrum_speed = "100 rpm"\n'
        'pin_bearing_allow = "9 MPa"\n'
        '[spec."block.dxf"]\ndrum_speed = "120 rpm"\npin_length = "20 mm"\n'
    )
    (tmp_path / "block.toml").write_text('[spec]\nlining_width = "70 mm"\npv_max = "2 MPa*m/s"\n')
    j = check(path, overrides=[("pv_max", "3 MPa*m/s")])
    got = {v.key: (v.text, v.source) for v in j.spec.all_values()}
    assert got["mu"][1].endswith("dxfcheck.toml [spec]")
    assert got["drum_speed"][0] == "120 rpm" and '[spec."block.dxf"]' in got["drum_speed"][1]
    assert got["pin_length"][0] == "30 mm" and "header property" in got["pin_length"][1]
    assert got["lining_width"][0] == "70 mm" and "block.toml" in got["lining_width"][1]
    assert got["pv_max"] == ("3 MPa*m/s", "command line")
    assert got["pins.O.pin_shear_allow"][0] == "44 MPa"
    assert got["self_lock_margin"][1].startswith("default")
    assert j.mu == 0.3


@pytest.mark.parametrize(
    ("toml", "words"),
    [
        ("[spec]\nrequired_torque = 450\n", ["required_torque", "no unit", "dxfcheck.toml"]),
        ('[spec]\nrequired_torqe = "450 N*m"\n', ["required_torqe", "dxfcheck.toml", "required_torque"]),
        ('[spec]\nlining_width = "3 N"\n', ["lining_width", "length"]),
        ('[spec]\nmu = "high"\n', ["mu", "plain number"]),
        ('[spec.pins.O]\nrod_area = "3 mm2"\n', ["rod_area", "per pin"]),
    ],
)
def test_bad_spec_values_are_rejected(brake, toml, words):
    (brake.parent / "dxfcheck.toml").write_text(toml)
    with pytest.raises(dxfcheck.ConfigError) as info:
        check(brake)
    for w in words:
        assert w in str(info.value)


# --- outputs and exit codes ----------------------------------------------------


def cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=120
    )


def test_junit_parses_and_counts_rules(brake, tmp_path):
    out = tmp_path / "gate.xml"
    r = cli("check", brake, "--mu", MU, "--set", "pin_shear_allow=1MPa", "--junit", out, "--json")
    assert r.returncode == 1
    doc = output_json(r.stdout)
    assert doc["schema"] == "dxfcheck.check/2" and doc["verdict"] == "fail"
    suite = ET.parse(out).getroot().find("testsuite")
    cases = suite.findall("testcase")
    assert len(cases) == len(doc["rules"]) == int(suite.get("tests"))
    assert int(suite.get("failures")) == sum(r["verdict"] == "fail" for r in doc["rules"]) == 1
    assert int(suite.get("skipped")) == sum(r["verdict"] == "skip" for r in doc["rules"])
    for rule in doc["rules"]:
        assert set(rule) >= {"rule", "verdict", "value", "limit", "unit", "margin", "inputs", "source"}


def test_exit_codes(brake):
    assert cli("check", brake, "--mu", MU).returncode == 0
    assert cli("check", brake, "--mu", MU, "--set", "torque_asymmetry_max=0.01").returncode == 0
    assert cli("check", brake, "--mu", MU, "--set", "torque_asymmetry_max=0.01", "--strict").returncode == 1
    r = cli("check", brake, "--set", "pin_length=12")
    assert r.returncode == 2 and "pin_length" in r.stderr and "command line" in r.stderr
    r = cli("check", brake, "--mu-min", "0.5", "--mu", "0.3")
    assert r.returncode == 2 and "mu_min" in r.stderr


def test_terminal_report_words(brake):
    r = cli("check", brake, "--mu", MU, "--required-torque", "10 N*m")
    assert r.returncode == 0
    first = r.stdout.splitlines()[0]
    assert first.startswith("PASS") and "block.dxf" in first
    assert "where they came from" in r.stdout and "qualified engineer" in r.stdout


def test_pin_shear_met_to_rounding_passes(brake):
    """τ ≤ τ_allow with τ_allow equal to the hand τ = F/(πd²/4) to rounding
    (1e-12 below it) passes; 1 ppm below fails, and the JUnit text shows the
    figures that tell value and limit apart."""
    from dxfcheck.gate.verdicts import figures

    tau = pivot_force(MU, True) / (math.pi * PIVOT_D**2 / 4)
    ok = verdict_at(brake, "pin.shear.O", "pin_shear_allow", tau * (1 - 1e-12), "MPa", mu=MU)
    assert ok.verdict is Verdict.PASS and ok.margin == 1.0
    bad = verdict_at(brake, "pin.shear.O", "pin_shear_allow", tau * (1 - 1e-6), "MPa", mu=MU)
    assert bad.verdict is Verdict.FAIL
    n = figures(bad.value, bad.limit)
    assert n > 4 and f"{bad.value:.{n}g}" != f"{bad.limit:.{n}g}"
