"""R. A. Serway and C. Vuille, *College Physics*, 11th ed., Cengage, 2018,
ch. 11 (energy in thermal processes), Problem 24, as the publisher's
solution page states it: "When a driver brakes an automobile, the friction
between the brake drums and the brake shoes converts the car's kinetic
energy to thermal energy.  If a 1 500-kg automobile traveling at 30 m/s
comes to a halt, how much does the temperature rise in each of the four
8.0-kg iron brake drums?  (The specific heat of iron is 448 J/kg·°C.)"
The answer is worked here from the statement (the book's printed answer
was not seen): ΔKE = ½·1500·30² = 6.75·10⁵ J, shared by four drums,
ΔT = 6.75·10⁵/(4·8.0·448) = 47.1 °C.  A variant of the same problem with a
published worked answer (1450 kg at 36 m/s: 9.4·10⁵ J and ΔT = 66 °C, two
figures) is checked too.

The first published worked example behind the heat rules' two closed
forms, E = ½mv² for a stop and ΔT = E/(m·C) (``dxfcheck.gate.heat``; the
rules cite Shigley's MED 10th ed., §16-8 and §16-9).  Tolerance: half a
unit of the last printed figure.

Directions.  The car loses its kinetic energy (ΔKE < 0 in the book's sign)
and the drums gain it as heat: the energy the brakes absorb is positive
and the drums' temperature rises; a heavier drum rises less, a faster car
more (with the square of its speed).
"""

from __future__ import annotations

import pytest

from dxfcheck.gate import heat

IRON_J_KG_K = 448.0  # the problem's specific heat of iron
DRUMS = 4
DRUM_KG = 8.0


def _rise_per_drum_K(car_kg: float, speed_m_s: float) -> float:
    """Each drum's share of the car's kinetic energy as its temperature rise [K]."""
    energy = heat.kinetic_energy_translation_J(car_kg, speed_m_s)
    return heat.temperature_rise_K(energy / DRUMS, DRUM_KG, IRON_J_KG_K)


def test_problem_24_kinetic_energy_becomes_heat_in_the_drums():
    energy = heat.kinetic_energy_translation_J(1500.0, 30.0)
    assert energy == pytest.approx(6.75e5, abs=0.005e5)  # printed to three figures
    assert energy > 0  # absorbed by the brakes: the car's loss, with the opposite sign
    assert _rise_per_drum_K(1500.0, 30.0) == pytest.approx(47.1, abs=0.05)


def test_the_variant_with_a_published_worked_answer():
    """1450 kg at 36 m/s: Ek = 9.4·10⁵ J, ΔT = 66 °C (two figures each)."""
    assert heat.kinetic_energy_translation_J(1450.0, 36.0) == pytest.approx(9.4e5, abs=0.05e5)
    assert _rise_per_drum_K(1450.0, 36.0) == pytest.approx(66.0, abs=0.5)


def test_directions_heavier_drums_rise_less_faster_cars_with_the_square():
    base = _rise_per_drum_K(1500.0, 30.0)
    assert base > 0
    energy = heat.kinetic_energy_translation_J(1500.0, 30.0) / DRUMS
    assert heat.temperature_rise_K(energy, 2 * DRUM_KG, IRON_J_KG_K) == pytest.approx(base / 2)
    assert _rise_per_drum_K(1500.0, 60.0) == pytest.approx(4 * base)
