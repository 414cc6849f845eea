"""The energy and heat formulas of a stop (dxfcheck.gate.heat), each against
a closed form worked by hand or recomputed another way (the equation of
motion instead of the energy balance, a time integral instead of a closed
sum), with the direction of every quantity checked.

Sources: Budynas & Nisbett, *Shigley's Mechanical Engineering Design*,
10th ed., ch. 16, §16-8 energy considerations and §16-9 temperature rise
(ΔT = E/(C·m), Newton's cooling; section numbers from memory); Beer &
Johnston, *Vector Mechanics for Engineers: Dynamics*, 11th ed., ch. 11
(uniform deceleration) and ch. 17 (kinetic energy ½Iω²), chapters from
memory; NIST SP 811 (2008), Appendix B.8 for the unit factors.
"""

from __future__ import annotations

import itertools
import math

import pytest

from dxfcheck.core.units import parse_quantity
from dxfcheck.gate import heat

G = 9.80665  # standard gravity, m/s² (defined, NIST SP 330)


def test_kinetic_energies_closed_form():
    """½mv² and ½Jω² (Beer & Johnston, Dynamics, ch. 13 and 17; from memory)."""
    assert heat.kinetic_energy_translation_J(2000.0, 0.5) == pytest.approx(0.5 * 2000 * 0.25)  # 250 J
    # ω = 100 rad/s at n = 3000/π rpm: ½·1.5·100² = 7500 J
    assert heat.kinetic_energy_rotation_J(1.5, 3000 / math.pi) == pytest.approx(7500.0, rel=1e-12)
    # direction: energy is positive whichever way the load or the drum moves
    assert heat.kinetic_energy_translation_J(10.0, -2.0) == pytest.approx(20.0)
    assert heat.kinetic_energy_rotation_J(1.0, -60.0) > 0


def test_uniform_stop_distance_and_mean_speed_by_integration():
    """h = v·t/2 and the mean rubbing speed v/2 over a uniform stop
    (Beer & Johnston, Dynamics, ch. 11: s = (v0 + v)t/2), recomputed as the
    time integral of v(t) = v0(1 − t/T) by the trapezoid rule."""
    v0, t_stop, steps = 1.6, 0.8, 20000
    dt = t_stop / steps
    speeds = [v0 * (1 - k * dt / t_stop) for k in range(steps + 1)]
    distance = sum((a + b) / 2 * dt for a, b in itertools.pairwise(speeds))
    assert heat.stop_distance_m(v0, t_stop) == pytest.approx(distance, rel=1e-9)
    assert heat.mean_rubbing_speed_m_s(v0) == pytest.approx(distance / t_stop, rel=1e-9)
    assert heat.stop_time_s(v0, 2.0) == pytest.approx(0.8)  # t = v/a
    # the drum angle is the same integral for ω: θ = ω·t/2
    assert heat.stop_angle_rad(60 / (2 * math.pi) * 4.0, 1.0) == pytest.approx(2.0)


def test_potential_energy_direction():
    """m·g·h: a lowered load releases energy the brake must absorb (positive),
    a rising load gives energy back to gravity (negative)."""
    assert heat.potential_energy_J(1000.0, 0.5) == pytest.approx(1000 * G * 0.5)  # 4903.325 J
    assert heat.potential_energy_J(1000.0, 0.5) > 0
    assert heat.potential_energy_J(1000.0, -0.5) < 0


def test_stopping_torque_energy_balance_equals_equation_of_motion():
    """T = E/θ from the energy balance equals J_eq·ω/t ± m·g·r from Newton's
    second law on the drum (J_eq = J + m·r², the load on a drum of radius
    r).  Hand numbers: m = 1000 kg, v = 1 m/s, r = 0.25 m (ω = 4 rad/s),
    J = 2 kg·m², t = 1 s:
    lowering E = 500 + ½·2·16 + 1000·g·0.5 = 5419.325 J, θ = 2 rad,
    T = 2709.66 N·m = (2 + 62.5)·4 + 1000·g·0.25."""
    m, v, r, j, t = 1000.0, 1.0, 0.25, 2.0, 1.0
    omega = v / r
    n_rpm = omega * 60 / (2 * math.pi)
    e_kin = heat.kinetic_energy_translation_J(m, v) + heat.kinetic_energy_rotation_J(j, n_rpm)
    h = heat.stop_distance_m(v, t)
    lowering = heat.stopping_torque_Nm(e_kin + heat.potential_energy_J(m, h), n_rpm, t)
    hoisting = heat.stopping_torque_Nm(e_kin + heat.potential_energy_J(m, -h), n_rpm, t)
    level = heat.stopping_torque_Nm(e_kin, n_rpm, t)
    j_eq = j + m * r * r
    assert lowering == pytest.approx(j_eq * omega / t + m * G * r, rel=1e-12)
    assert lowering == pytest.approx(2709.66, abs=0.01)
    assert hoisting == pytest.approx(j_eq * omega / t - m * G * r, rel=1e-12)
    assert level == pytest.approx(j_eq * omega / t, rel=1e-12)
    # direction: a lowered load adds to the torque, a rising one takes from it;
    # a lowered load needs more than the static holding torque m·g·r
    assert hoisting < level < lowering
    assert lowering > m * G * r
    # a shorter stop needs more torque
    assert heat.stopping_torque_Nm(e_kin, n_rpm, t / 2) == pytest.approx(2 * level)


def test_holding_torque_is_the_load_reduced_to_the_drum():
    """m·g·v/ω = m·g·r for a rope on a drum of radius r (v = ω·r): 1000 kg on
    r = 0.25 m is 2451.66 N·m; the energy form agrees, T·θ = m·g·h over the
    same motion (θ = h/r)."""
    r, v = 0.25, 1.0
    n_rpm = v / r * 60 / (2 * math.pi)
    assert heat.holding_torque_Nm(1000.0, v, n_rpm) == pytest.approx(1000 * G * r, rel=1e-12)
    assert heat.holding_torque_Nm(1000.0, v, n_rpm) * (0.5 / r) == pytest.approx(heat.potential_energy_J(1000.0, 0.5))


def test_temperature_rise_per_stop():
    """ΔT = E/(C·m) (Shigley's MED 10th ed., §16-9; from memory): 100 kJ into
    20 kg of steel at C = 500 J/(kg·K) is 10 K; more energy, a higher rise."""
    assert heat.temperature_rise_K(100e3, 20.0, 500.0) == pytest.approx(10.0)
    assert heat.temperature_rise_K(200e3, 20.0, 500.0) > heat.temperature_rise_K(100e3, 20.0, 500.0) > 0


def test_steady_temperature_heat_balance():
    """E·n = 3600·h·A·(T − T∞) (Newton's law of cooling): 36 kJ per stop at
    100 stops/h is 1000 W; h = 10 W/(m²·K), A = 1 m² sheds it at 100 K above
    a 40 °C ambient: 140 °C."""
    assert heat.steady_temperature_C(36e3, 100.0, 10.0, 1.0, 40.0) == pytest.approx(140.0)
    assert heat.steady_temperature_C(36e3, 200.0, 10.0, 1.0, 40.0) > 140.0  # more stops: hotter
    assert heat.steady_temperature_C(36e3, 100.0, 20.0, 1.0, 40.0) < 140.0  # better cooling: cooler


def _simulate_peak(rise, n, h, area, m, c, ambient, stops=5000):
    """Peak after each stop, stepping stop by stop: add ΔT, then cool for
    3600/n s as T − T∞ ∝ exp(−hA/(mC)·t) (Newton's cooling)."""
    decay = math.exp(-h * area / (m * c) * 3600 / n)
    before = ambient
    for _ in range(stops):
        after = before + rise
        before = ambient + (after - ambient) * decay
    return after


def test_cyclic_peak_settles_to_the_closed_form_and_its_mean_is_the_heat_balance():
    """The settled peak T∞ + ΔT/(1 − e^(−βt_c)) equals stepping the stops one
    by one; the cycle's time average equals the heat-balance temperature
    (the same energy per hour leaves by the same law)."""
    rise, n, h, area, m, c, amb = 8.0, 60.0, 10.0, 0.5, 40.0, 500.0, 40.0
    peak = heat.cyclic_peak_temperature_C(rise, n, h, area, m, c, amb)
    assert peak == pytest.approx(_simulate_peak(rise, n, h, area, m, c, amb), rel=1e-9)
    beta, cycle = h * area / (m * c), 3600 / n
    # time average of (peak − T∞)·e^(−βt) over one cycle, by the midpoint rule
    steps = 20000
    avg = sum(math.exp(-beta * (k + 0.5) * cycle / steps) for k in range(steps)) / steps
    mean = amb + (peak - amb) * avg
    energy = rise * m * c  # J per stop
    assert mean == pytest.approx(heat.steady_temperature_C(energy, n, h, area, amb), rel=1e-7)
    # direction and bounds: the peak lies above the mean and at most ΔT above the trough
    assert peak > mean > amb
    assert peak - rise < mean
    # a single stop with long pauses: the drum cools fully, the peak is T∞ + ΔT
    assert heat.cyclic_peak_temperature_C(rise, 1e-3, h, area, m, c, amb) == pytest.approx(amb + rise, rel=1e-9)


@pytest.mark.parametrize(
    ("text", "dimension", "expected", "rel"),
    [
        # exact by definition: 1 Btu_IT/(lb·°F) = 1 cal_IT/(g·°C) = 4186.8 J/(kg·K)
        ("1 Btu/(lb*°F)", "specific_heat", 4186.8, 1e-12),
        # NIST SP 811, B.8: 5.678 263 W/(m²·K) (printed to 7 figures; from memory)
        ("1 Btu/(h*ft2*°F)", "heat_transfer", 5.678263, 1e-6),
        # NIST SP 811, B.8: 4.214 011 E-02 kg·m² (from memory)
        ("1 lb*ft2", "inertia", 4.214011e-2, 1e-6),
        ("1 ft/min", "velocity", 0.00508, 1e-12),
        ("90 m/min", "velocity", 1.5, 1e-12),
        ("1 t", "mass", 1000.0, 0),
        ("1 lb", "mass", 0.45359237, 0),
        ("2 min", "time", 120.0, 0),
        ("0.5 m2", "area", 0.5e6, 0),  # internal mm²
        ("40 °C", "temperature", 40.0, 0),
        ("1 kWh", "energy", 3.6e6, 0),
        ("3 kg·m²", "inertia", 3.0, 0),
        ("500 J/(kg·K)", "specific_heat", 500.0, 0),
        ("12 W/(m²·K)", "heat_transfer", 12.0, 0),
    ],
)
def test_new_units_exact_factors(text, dimension, expected, rel):
    assert parse_quantity(text, dimension).value == pytest.approx(expected, rel=rel, abs=0)
