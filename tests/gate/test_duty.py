"""The duty of a stop and the heat it puts into the drum, through the whole
pipeline on a drawn block brake: the stop duty against the brake's torque at
mu_min, the drum's peak and steady temperatures against their limits, each at
its boundary by a hand calculation, and the pV rule's rubbing speed.

Sources: Budynas & Nisbett, *Shigley's Mechanical Engineering Design*, 10th
ed., ch. 16: §16-8 (energy of a stop), §16-9 (ΔT = E/(C·m); C = 500 J/(kg·°C)
for steel or cast iron; Newton's cooling); section numbers and C from memory.
Khurmi & Gupta, *Theory of Machines*, brakes: the lever equation P·l = N(x ∓ μa),
T = μNr (from memory).  The defaults (h = 10 W/(m²·K) in still air, 40 °C
ambient) are named in dxfcheck.gate.duty with their sources.
"""

from __future__ import annotations

import math

import pytest
from common import block_brake

from dxfcheck.core.errors import ConfigError
from dxfcheck.gate.rules import Verdict
from dxfcheck.pipeline import check

R, L, X, A, P, MU = 200.0, 500.0, 200.0, 50.0, 1000.0, 0.35
G = 9.80665  # m/s², standard gravity (defined)


def lever_N(mu: float, energising: bool) -> float:
    """P·l = N(x ∓ μa) (Khurmi & Gupta, *Theory of Machines*, brakes; from memory)."""
    return P * L / (X - mu * A if energising else X + mu * A)


T_WEAK = MU * lever_N(MU, False) * R / 1000  # N·m, T = μNr in the weaker direction

# The stop of these tests: load at v = 1 m/s, drum at n = 60 rpm (ω = 2π rad/s),
# stopped in t = 0.5 s: the load sinks h = v·t/2 = 0.25 m, the drum turns θ = ω·t/2 = π/2.
V, N_RPM, T_STOP = 1.0, 60.0, 0.5
THETA = 2 * math.pi * N_RPM / 60 * T_STOP / 2
STOP = {"mu": MU, "rope_speed": f"{V} m/s", "drum_speed": f"{N_RPM} rpm", "stop_time": f"{T_STOP} s"}


def torque_per_kg(sense: float) -> float:
    """T/m = (½v² + sense·g·v·t/2)/θ [N·m/kg]: sense +1 lowered, 0 level, −1 rising."""
    return (0.5 * V * V + sense * G * V * T_STOP / 2) / THETA


@pytest.fixture
def brake(tmp_path):
    path = tmp_path / "block.dxf"
    block_brake(r=R, l=L, x=X, a=A, effort=f"{P} N").save(path)
    return path


def rules_of(path, **spec):
    j = check(path, overrides=[(k, str(v)) for k, v in spec.items()])
    return {r.rule: r for r in j.rules}


def test_stop_duty_boundary_against_the_brake_at_mu_min(brake):
    """T = E/θ = m(½v² + g·v·t/2)/θ for a lowered load; the mass is set so
    that the stop needs just less, then just more, than the brake's weaker
    torque T = μNr."""
    m_edge = T_WEAK / torque_per_kg(1.0)
    ok = rules_of(brake, load_mass=f"{m_edge * 0.9999!r} kg", lowering="yes", **STOP)
    bad = rules_of(brake, load_mass=f"{m_edge * 1.0001!r} kg", lowering="yes", **STOP)
    weak = min(("cw", "ccw"), key=lambda d: ok[f"torque.{d}"].value)
    assert ok[f"torque.{weak}"].value == pytest.approx(T_WEAK, rel=1e-9)
    assert ok[f"torque.{weak}"].limit == pytest.approx(T_WEAK * 0.9999, rel=1e-9)
    assert (ok[f"torque.{weak}"].verdict, bad[f"torque.{weak}"].verdict) == (Verdict.PASS, Verdict.FAIL)
    r = ok[f"torque.{weak}"]
    assert r.inputs["governs"] == "stop duty"
    assert "E/θ" in r.source and "command line" in r.inputs["duties"][0]["source"]
    assert "T = E/θ" in r.inputs["duties"][0]["basis"]


HOT = {"drum_mass": "1 kg", "drum_peak_temperature_max": "500 °C"}


def test_lowering_adds_and_hoisting_subtracts(brake):
    """Direction: the torque a stop needs is m·(½v² ± g·v·t/2)/θ, lowered
    above level; a rising load whose stop gravity alone does (½v² = 0.5 <
    g·v·t/2 = 2.45 J/kg) still needs the holding torque m·g·v/ω once it
    hangs (power balance m·g·v = T·ω)."""
    limits = {
        motion: rules_of(brake, load_mass="10 kg", lowering=motion, **STOP)["torque.cw"].limit
        for motion in ("hoisting", "no", "yes")
    }
    m = 10.0
    hold = m * G * V / (2 * math.pi * N_RPM / 60)
    assert limits["yes"] == pytest.approx(m * torque_per_kg(1.0), rel=1e-12)
    assert limits["no"] == pytest.approx(m * torque_per_kg(0.0), rel=1e-12)
    assert limits["hoisting"] == pytest.approx(hold, rel=1e-12)
    assert limits["no"] < limits["yes"] and hold < limits["yes"]
    # the energy into the drum ranks rising < level < lowered (heat.peak's rise per stop)
    rises = {
        motion: rules_of(brake, load_mass="10 kg", lowering=motion, **HOT, **STOP)["heat.peak"]
        for motion in ("hoisting", "no", "yes")
    }
    assert rises["hoisting"].inputs["potential_J"] < 0 < rises["yes"].inputs["potential_J"]
    assert rises["no"].inputs["potential_J"] == 0
    assert rises["hoisting"].inputs["energy_per_stop_J"] == 0  # gravity took it all: nothing into the drum
    assert 0 < rises["no"].inputs["rise_per_stop_K"] < rises["yes"].inputs["rise_per_stop_K"]


def test_rising_load_with_little_gravity_share_subtracts(brake):
    """A fast rising load (v = 3 m/s, t = 0.1 s): ½v² = 4.5 > g·v·t/2 = 1.47,
    so the brake still works: T = m(½v² − g·v·t/2)/θ, θ = ω·t/2."""
    spec = dict(STOP, rope_speed="3 m/s", stop_time="0.1 s")
    theta = 2 * math.pi * N_RPM / 60 * 0.1 / 2
    up = rules_of(brake, load_mass="10 kg", lowering="hoisting", **spec)["torque.cw"].limit
    down = rules_of(brake, load_mass="10 kg", lowering="yes", **spec)["torque.cw"].limit
    assert up == pytest.approx(10 * (0.5 * 9 - G * 3 * 0.1 / 2) / theta, rel=1e-12)
    assert down == pytest.approx(10 * (0.5 * 9 + G * 3 * 0.1 / 2) / theta, rel=1e-12)
    assert 0 < up < down


def test_deceleration_gives_the_same_stop_as_its_time(brake):
    """t = v/a: 1 m/s at 2 m/s² is the 0.5 s stop."""
    by_time = rules_of(brake, load_mass="10 kg", **STOP)["torque.cw"].limit
    spec = {k: v for k, v in STOP.items() if k != "stop_time"}
    by_decel = rules_of(brake, load_mass="10 kg", deceleration="2 m/s2", **spec)["torque.cw"].limit
    assert by_decel == pytest.approx(by_time, rel=1e-12)


def test_inertia_and_load_speed_from_the_drum(brake):
    """Without rope_speed the load moves with the drum's surface, v = πDn/60
    = π·0.4·60/60 m/s; the inertia adds ½Jω²: T = (½mv² + ½Jω² + m·g·v·t/2)/θ."""
    v = math.pi * 2 * R / 1000 * N_RPM / 60
    omega = 2 * math.pi * N_RPM / 60
    spec = {k: v for k, v in STOP.items() if k != "rope_speed"}
    limit = rules_of(brake, load_mass="10 kg", inertia="2 kg*m2", **spec)["torque.cw"].limit
    energy = 0.5 * 10 * v * v + 0.5 * 2 * omega**2 + 10 * G * v * T_STOP / 2
    assert limit == pytest.approx(energy / THETA, rel=1e-12)


def verdict_of(path, **spec):
    return check(path, overrides=[(k, str(v)) for k, v in spec.items()]).verdict


def needs(rule):
    """The keys an incomplete rule names (its inputs' ``missing``)."""
    assert rule.verdict is Verdict.FAIL and rule.value is None and rule.message.startswith("incomplete"), rule
    return rule.inputs["missing"]


def test_a_stop_begun_but_not_finished_stops_the_release(brake):
    """A spec that begins a stop but cannot finish it never passes quietly:
    the stop duty fails as incomplete naming exactly what it lacks, and the
    gate's verdict is FAIL, however well the rest passes."""
    # no drum_speed: the energy is known (the heat rules judge it), the torque E/θ, θ = ω·t/2, is not
    spec = dict(load_mass="10 kg", rope_speed="1 m/s", stop_time="0.5 s", mu=MU, **HOT)
    rules = rules_of(brake, **spec)
    assert needs(rules["stop.duty"]) == "drum_speed"
    assert "stop_time" not in rules["stop.duty"].message
    assert rules["heat.peak"].verdict is Verdict.PASS
    assert verdict_of(brake, **spec) is Verdict.FAIL
    # no stop_time: neither the lowered load's m·g·h (h = v·t/2) nor the torque can be found
    spec = dict(load_mass="10 kg", drum_speed="60 rpm", mu=MU, **HOT)
    rules = rules_of(brake, **spec)
    assert needs(rules["stop.duty"]) == "stop_time (or deceleration)"
    assert needs(rules["heat.peak"]) == "stop_time (or deceleration)"  # drum_mass begins it
    assert rules["heat.steady"].verdict is Verdict.SKIP  # nothing of it stated
    assert verdict_of(brake, **spec) is Verdict.FAIL
    # a deceleration on a rotating mass alone acts on the rim speed πDn/60: it needs drum_speed, not rope_speed
    rules = rules_of(brake, inertia="2 kg*m2", rope_speed="1 m/s", deceleration="2 m/s2", mu=MU)
    assert "drum_speed" in needs(rules["stop.duty"]) and "rope_speed" not in needs(rules["stop.duty"])
    # a spec that says nothing of a stop or of heat: the rules skip quietly, as before
    rules = rules_of(brake, mu=MU)
    assert "stop.duty" not in rules
    assert rules["heat.peak"].verdict is Verdict.SKIP and "load_mass or inertia" in rules["heat.peak"].message
    assert rules["heat.steady"].verdict is Verdict.SKIP
    assert verdict_of(brake, mu=MU) is Verdict.PASS


def test_a_heat_rule_begun_but_not_finished_fails_naming_its_keys(brake):
    """stops_per_hour alone begins the steady temperature (E·n = 3600·h·A·ΔT
    needs A and a limit); many stops without a cooling area cannot give the
    settled peak, and one stop from ambient would understate it."""
    rules = rules_of(brake, **dict(HEAT, stops_per_hour="360", drum_peak_temperature_max="400 °C"))
    assert needs(rules["heat.steady"]) == "cooling_area, drum_temperature_max"
    assert needs(rules["heat.peak"]) == "cooling_area"
    assert "360 stops per hour" in rules["heat.peak"].message
    rules = rules_of(brake, **dict(HEAT, stops_per_hour="1", drum_peak_temperature_max="400 °C"))
    assert rules["heat.peak"].verdict is Verdict.PASS  # one stop an hour: one stop from ambient
    rules = rules_of(brake, **dict(HEAT, drum_mass="1 kg"))  # drum_mass without a limit
    assert needs(rules["heat.peak"]) == "drum_peak_temperature_max"


def test_a_larger_required_torque_still_governs(brake):
    rules = rules_of(brake, load_mass="10 kg", required_torque="500 N*m", **STOP)
    r = rules["torque.cw"]
    assert r.inputs["governs"] == "required_torque" and r.limit == 500.0
    assert {d["duty"] for d in r.inputs["duties"]} == {"required_torque", "stop duty"}


# Heat: a level stop of 100 kg at 2 m/s with a 5 kg·m² inertia at 60 rpm:
# E = ½·100·4 + ½·5·(2π)² = 200 + 98.696 = 298.696 J per stop.
HEAT = {
    "mu": MU,
    "load_mass": "100 kg",
    "rope_speed": "2 m/s",
    "inertia": "5 kg*m2",
    "drum_speed": f"{N_RPM} rpm",
    "stop_time": "1 s",
    "lowering": "no",
    "drum_mass": "0.05 kg",
}
E_STOP = 0.5 * 100 * 4 + 0.5 * 5 * (2 * math.pi) ** 2


def test_peak_temperature_boundary_single_stop(brake):
    """One stop from ambient: T = T∞ + E/(C·m), C = 500 J/(kg·K) (Shigley,
    steel or cast iron, from memory), T∞ = 40 °C (default): 298.696/(500·0.05)
    = 11.95 K above ambient."""
    peak = 40.0 + E_STOP / (500.0 * 0.05)
    ok = rules_of(brake, drum_peak_temperature_max=f"{peak + 0.001!r} °C", **HEAT)["heat.peak"]
    bad = rules_of(brake, drum_peak_temperature_max=f"{peak - 0.001!r} °C", **HEAT)["heat.peak"]
    assert ok.value == pytest.approx(peak, rel=1e-12)
    assert (ok.verdict, bad.verdict) == (Verdict.PASS, Verdict.FAIL)
    assert ok.inputs["rise_per_stop_K"] == pytest.approx(E_STOP / 25.0) and ok.inputs["rise_per_stop_K"] > 0
    assert "Shigley" in ok.inputs["specific_heat_source"] and "still air" in ok.inputs["heat_transfer_source"]
    assert "40 °C" in ok.inputs["ambient_source"]


def test_peak_temperature_settled_over_stops(brake):
    """Settled peak T∞ + ΔT/(1 − e^(−β·3600/n)), β = hA/(mC): with 120
    stops/h, A = 0.01 m², h = 10 W/(m²·K) and a 20 °C ambient given."""
    spec = dict(HEAT, stops_per_hour=120, cooling_area="0.01 m2", ambient_temperature="20 °C")
    rise = E_STOP / (500.0 * 0.05)
    beta = 10 * 0.01 / (0.05 * 500)
    peak = 20 + rise / (1 - math.exp(-beta * 30))
    r = rules_of(brake, drum_peak_temperature_max="500 °C", **spec)["heat.peak"]
    assert r.value == pytest.approx(peak, rel=1e-12)
    assert r.value > 20 + rise  # repeated stops run hotter than one


def test_steady_temperature_boundary(brake):
    """E·n = 3600·h·A·(T − T∞): 298.696 J × 120 /h = 9.956 W over
    h·A = 10·0.01 W/K: 99.56 K above the 40 °C default ambient."""
    spec = dict(HEAT, stops_per_hour=120, cooling_area="0.01 m2")
    steady = 40 + E_STOP * 120 / 3600 / (10 * 0.01)
    ok = rules_of(brake, drum_temperature_max=f"{steady + 0.001!r} °C", **spec)["heat.steady"]
    bad = rules_of(brake, drum_temperature_max=f"{steady - 0.001!r} °C", **spec)["heat.steady"]
    assert ok.value == pytest.approx(steady, rel=1e-12)
    assert (ok.verdict, bad.verdict) == (Verdict.PASS, Verdict.FAIL)
    # margin on the rise above ambient, not on °C
    assert ok.margin == pytest.approx((steady + 0.001 - 40) / (steady - 40), rel=1e-12)
    cooler = rules_of(brake, drum_temperature_max="500 °C", heat_transfer_coefficient="20 W/(m2*K)", **spec)
    assert cooler["heat.steady"].value == pytest.approx(40 + (steady - 40) / 2, rel=1e-12)


def test_lowered_load_heats_more(brake):
    """Direction: the same stop lowered adds m·g·h = 100·g·(2·1/2) J."""
    spec = dict(HEAT, drum_peak_temperature_max="500 °C")
    level = rules_of(brake, **spec)["heat.peak"]
    lowered = rules_of(brake, **dict(spec, lowering="yes"))["heat.peak"]
    assert lowered.value - level.value == pytest.approx(100 * G * 1.0 / 25.0, rel=1e-9)


def test_pv_uses_the_mean_rubbing_speed_over_a_stop(brake):
    """pV with v = πDn/60 while rubbing continuously, v/2 (the mean over a
    uniform stop) when the spec states a stop."""
    b = 60.0
    p = lever_N(MU, True) / (b * 2 * R * math.sin(math.radians(20.0) / 2))  # short shoe, 20° contact
    v = math.pi * 2 * R * N_RPM / 60 / 1000
    common = {"mu": MU, "lining_width": f"{b} mm", "drum_speed": f"{N_RPM} rpm", "pv_max": "100 MPa*m/s"}
    steady = rules_of(brake, **common)["lining.pv.block"]
    stop = rules_of(brake, stop_time="0.5 s", **common)["lining.pv.block"]
    assert steady.value == pytest.approx(p * v, rel=1e-9) and "drum speed" in steady.message
    assert stop.value == pytest.approx(p * v / 2, rel=1e-9) and "mean rubbing speed" in stop.message


def test_a_light_duty_on_a_heavy_drum_is_no_units_slip(brake):
    """A margin far above 1000 on the drum's temperature is a light duty, not
    a units slip: no S312 (the plausibility ranges, common practice)."""
    spec = dict(HEAT, drum_mass="2 t", drum_peak_temperature_max="500 °C")
    j = check(brake, overrides=[(k, str(v)) for k, v in spec.items()])
    peak = next(r for r in j.rules if r.rule == "heat.peak")
    assert peak.margin > 1e3 and peak.verdict is Verdict.PASS
    assert not [f for f in j.nominal.findings if f.code.id == "S312"]


def test_a_stop_from_the_project_file_and_from_python(brake):
    """The same lowered stop of 2 t at 0.5 m/s in 1 s with the drum at 60 rpm,
    written in a project file and given from Python as typed values:
    T = m(½v² + g·v·t/2)/θ, θ = 2π·1/2 = π rad."""
    expected = 2000 * (0.5 * 0.25 + G * 0.5 * 1.0 / 2) / math.pi
    (brake.parent / "dxfcheck.toml").write_text(
        '[spec]\nload_mass = "2 t"\nrope_speed = "30 m/min"\ndrum_speed = "60 rpm"\n'
        'stop_time = "1 s"\nlowering = "yes"\nstops_per_hour = 30\n'
    )
    j = check(brake, overrides=[("mu", str(MU))])
    r = next(r for r in j.rules if r.rule == "torque.cw")
    assert r.limit == pytest.approx(expected, rel=1e-12)
    assert "dxfcheck.toml [spec]" in r.inputs["duties"][0]["source"]
    (brake.parent / "dxfcheck.toml").unlink()
    typed = {
        "load_mass": (2, "t"),
        "rope_speed": (0.5, "m/s"),
        "drum_speed": (60, "rpm"),
        "stop_time": (1, "s"),
        "mu": MU,
    }
    j = check(brake, spec=typed)
    r = next(r for r in j.rules if r.rule == "torque.cw")
    assert r.limit == pytest.approx(expected, rel=1e-12)  # lowering not stated: taken as lowered
    assert "taken as lowered" in r.message


# Values that would divide by zero are refused where they enter (exit 2 at
# the command line), naming the key and its source: E/(C·m) with m = 0,
# β = h·A/(m·C) with A = 0 or h = 0, θ = ω·t/2 with t = 0, t = v/a with a = 0.
@pytest.mark.parametrize(
    ("key", "value"),
    [
        ("drum_mass", "0 kg"),
        ("cooling_area", "0 m2"),
        ("stop_time", "0 s"),
        ("deceleration", "0 m/s2"),
        ("specific_heat", "0 J/(kg*K)"),
        ("heat_transfer_coefficient", "0 W/(m2*K)"),
    ],
)
def test_a_zero_that_divides_is_refused_naming_key_and_source(brake, key, value):
    spec = dict(HEAT, stops_per_hour="30", cooling_area="1 m2", drum_peak_temperature_max="400 °C")
    spec.pop("stop_time") if key == "deceleration" else None
    spec[key] = value
    with pytest.raises(ConfigError, match=rf"command line: {key} must be above 0 "):
        check(brake, overrides=[(k, str(v)) for k, v in spec.items()])


def test_ambient_below_freezing_is_read_within_its_stated_range(brake):
    """An arctic site at −30 °C: one level stop from ambient gives
    T = T∞ + E/(C·m) (Shigley §16-9), C = 500 J/(kg·K) of cast iron."""
    spec = dict(HEAT, ambient_temperature="-30 °C", drum_peak_temperature_max="500 °C", drum_material="cast-iron")
    peak = rules_of(brake, **spec)["heat.peak"]
    assert peak.inputs["ambient_C"] == -30.0
    assert peak.value == pytest.approx(-30.0 + E_STOP / (500 * 0.05), rel=1e-12)
    assert "drum_material = cast iron" in peak.inputs["specific_heat_source"]
    for spelling in ("cast_iron", "cast iron"):
        same = rules_of(brake, **dict(spec, drum_material=spelling))["heat.peak"]
        assert same.value == peak.value
    for outside in ("-61 °C", "61 °C"):
        with pytest.raises(ConfigError, match=r"command line: ambient_temperature must be from -60 to 60 °C"):
            rules_of(brake, **dict(spec, ambient_temperature=outside))
    with pytest.raises(ConfigError, match=r"drum_peak_temperature_max must not be negative"):
        rules_of(brake, **dict(spec, drum_peak_temperature_max="-5 °C"))


def test_stop_time_and_deceleration_must_agree(brake):
    """Both given: t = v/a must hold within STOP_AGREEMENT_REL (1 %):
    v = 1 m/s at a = 2 m/s² is the 0.5 s stop; 2.01 m/s² (t = 0.4975 s,
    0.5 % off) is accepted on stop_time; 2.1 m/s² (t = 0.476 s, 4.8 % off)
    is refused naming both and the drawing."""
    base = rules_of(brake, load_mass="10 kg", **STOP)["torque.cw"].limit
    same = rules_of(brake, load_mass="10 kg", deceleration="2.01 m/s2", **STOP)["torque.cw"]
    assert same.limit == base and "the deceleration agrees" in same.message
    with pytest.raises(ConfigError, match=r"stop_time = 0.5 s .*deceleration = 2.1 m/s2 .*disagree.* 0.4762 s") as exc:
        rules_of(brake, load_mass="10 kg", deceleration="2.1 m/s2", **STOP)
    assert exc.value.path == str(brake)


def test_a_rising_load_stopped_by_gravity_says_so_with_the_numbers_used(brake):
    """Hoisting 10 kg at 1 m/s stopped in 0.5 s: ½mv² = 5 J < m·g·h =
    10·g·0.25 = 24.52 J, so E = −19.52 J: the brake absorbs nothing (the
    heat rules take 0 J) and the torque is the holding torque m·g·v/ω =
    10·g/(2π) = 15.61 N·m (power balance m·g·v = T·ω)."""
    hold = 10 * G * V / (2 * math.pi * N_RPM / 60)
    rules = rules_of(brake, load_mass="10 kg", lowering="hoisting", **HOT, **STOP)
    torque, peak = rules["torque.cw"], rules["heat.peak"]
    assert torque.limit == pytest.approx(hold, rel=1e-12)
    assert peak.inputs["energy_per_stop_J"] == 0 and peak.value == peak.inputs["ambient_C"]
    for said in (torque.message, peak.inputs["stop"]):
        assert f"= {5 - 10 * G * 0.25:.4g} J" in said  # the balance, negative
        assert "exceeds its kinetic energy" in said and "absorbs no energy (0 J, clamped)" in said
        assert f"holding torque m·g·v/ω (m·g·r on the drum) = {hold:.4g} N·m governs" in said
        assert "E/θ" not in said  # E/θ < 0 is not used and not shown as if it were


def test_a_rising_load_the_brake_slows_below_its_holding_torque(brake):
    """Hoisting 10 kg at 1.5 m/s stopped in 0.1 s (g < a = 15 < 2g m/s²):
    E = 10·(½·1.5² − g·1.5·0.05) = 3.896 J > 0, E/θ = E/(ω·t/2) = 12.40 N·m,
    below the holding torque 10·g·1.5/(2π) = 23.41 N·m, which governs."""
    spec = dict(STOP, rope_speed="1.5 m/s", stop_time="0.1 s")
    energy = 10 * (0.5 * 1.5**2 - G * 1.5 * 0.1 / 2)
    e_theta = energy / (2 * math.pi * N_RPM / 60 * 0.1 / 2)
    hold = 10 * G * 1.5 / (2 * math.pi * N_RPM / 60)
    r = rules_of(brake, load_mass="10 kg", lowering="hoisting", **spec)["torque.cw"]
    assert 0 < e_theta < hold and r.limit == pytest.approx(hold, rel=1e-12)
    assert f"T = E/θ = {e_theta:.4g} N·m is below the holding torque" in r.message
    assert f"which governs: T = {hold:.4g} N·m" in r.message


def test_a_temperature_limit_below_ambient_fails_with_margin_zero(brake):
    """A 30 °C limit under the default 40 °C ambient: no drum can stay under
    it; the margin (allowed rise / rise) would be negative, it is reported 0."""
    rules = rules_of(brake, **dict(HEAT, drum_peak_temperature_max="30 °C"))
    peak = rules["heat.peak"]
    assert peak.verdict is Verdict.FAIL and peak.margin == 0.0
    assert "the limit is below the ambient" in peak.message
    spec = dict(
        HEAT, stops_per_hour="10", cooling_area="1 m2", drum_temperature_max="35 °C", ambient_temperature="40 °C"
    )
    steady = rules_of(brake, **spec)["heat.steady"]
    assert steady.verdict is Verdict.FAIL and steady.margin == 0.0


def test_a_linings_limits_alone_do_not_begin_the_heat_rules(brake):
    """lining = non-asbestos-rigid fills both temperature limits (Tribology
    Handbook Table 8.10: 225 °C operating, 500 °C maximum); they do not begin
    the heat rules, which skip naming drum_mass; drum_mass begins heat.peak,
    judged against the lining's 500 °C."""
    rules = rules_of(brake, load_mass="10 kg", lining="non-asbestos-rigid", **STOP)
    assert rules["heat.peak"].verdict is Verdict.SKIP and "drum_mass" in rules["heat.peak"].message
    assert rules["heat.steady"].verdict is Verdict.SKIP
    rules = rules_of(brake, load_mass="10 kg", lining="non-asbestos-rigid", drum_mass="1 kg", **STOP)
    assert rules["heat.peak"].verdict is Verdict.PASS and rules["heat.peak"].limit == 500.0
