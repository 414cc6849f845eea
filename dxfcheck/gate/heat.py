"""Energy and heat of a stop: pure formulas, one function per published model.

A brake that stops a moving load turns the load's kinetic energy, and the
potential energy of a load lowered over the stop, into heat in the drum.
Each function below is one textbook relation; the duty and heat rules
(:mod:`dxfcheck.gate.duty`) chain them.  Every quantity is SI with its unit in
its name (``mass_kg``, ``speed_rpm``, ``energy_J``); temperatures in °C.

Models and their assumptions:

* **Energy of a stop** (work-energy principle): the brake absorbs the
  kinetic energy ½mv² of the load and ½Jω² of the rotating parts, plus the
  potential energy m·g·h of a load lowered by h over the stop (minus it for
  a rising load, which gravity helps to stop).  Shigley ch. 16, "energy
  considerations" [1].
* **Uniform deceleration**: over a stop of time t from speed v the load
  travels h = v·t/2 and the drum turns θ = ω·t/2 [2]; the mean rubbing speed
  is half the initial one, v/2.  The brake's torque T does the work T·θ, so
  T = E/θ: the torque needed to absorb E in the stop.
* **Temperature rise per stop**: ΔT = E/(C·m), all the heat into the drum's
  mass m of specific heat C before it has time to leave (lumped, the drum at
  one temperature).  Shigley ch. 16, "temperature rise" [1] (equation number
  from memory).
* **Cooling** by Newton's law: the drum sheds heat at h·A·(T − T∞), h the
  combined convection and radiation coefficient, A the cooling area.  Over
  an hour of stops the mean (steady) temperature balances the energy per hour
  against it: E·n = 3600·h·A·(T − T∞).  Between stops the drum cools as
  T − T∞ ∝ exp(−β·t), β = h·A/(m·C); after many stops the temperature right
  after a stop settles at T∞ + ΔT/(1 − exp(−β·t_c)), t_c = 3600/n the time
  between stops.  Shigley ch. 16, "temperature rise" and its heat-cycle
  figure [1] (from memory).

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering
   Design*, 10th ed., McGraw-Hill, 2015, ch. 16: §16-8 energy
   considerations, §16-9 temperature rise (ΔT = E/(C·m); Newton's cooling
   with the coefficient h_CR of its still-air chart and the ventilation
   factor of forced air; C = 500 J/(kg·°C) for steel or cast iron).  Section
   and figure numbers from memory.
.. [2] F. P. Beer, E. R. Johnston, *Vector Mechanics for Engineers:
   Dynamics*, 11th ed., McGraw-Hill, 2016, ch. 11 (uniformly accelerated
   motion: s = (v0 + v)·t/2) and ch. 17 (work-energy principle for rigid
   bodies, T = ½Iω²).  Chapters from memory.
.. [3] NIST Special Publication 330 (2019), the SI: standard acceleration of
   gravity g_n = 9.806 65 m/s² (a defined value).
"""

from __future__ import annotations

import math

__all__ = [
    "G_N_M_S2",
    "SECONDS_PER_HOUR",
    "angular_speed_rad_s",
    "cyclic_peak_temperature_C",
    "holding_torque_Nm",
    "kinetic_energy_rotation_J",
    "kinetic_energy_translation_J",
    "mean_rubbing_speed_m_s",
    "potential_energy_J",
    "rubbing_speed_m_s",
    "steady_temperature_C",
    "stop_angle_rad",
    "stop_distance_m",
    "stop_time_s",
    "stopping_torque_Nm",
    "temperature_rise_K",
]

#: Standard acceleration of gravity [m/s²] (defined; NIST SP 330).
G_N_M_S2 = 9.80665

SECONDS_PER_HOUR = 3600.0


def angular_speed_rad_s(speed_rpm: float) -> float:
    """ω = 2π·n/60 [rad/s] of a speed n [rpm]."""
    return 2.0 * math.pi * speed_rpm / 60.0


def rubbing_speed_m_s(diameter_mm: float, speed_rpm: float) -> float:
    """Surface speed v = π·D·n/60 [m/s] of a drum of diameter D [mm] at n [rpm]."""
    return math.pi * diameter_mm * speed_rpm / 60.0 / 1000.0


def mean_rubbing_speed_m_s(initial_speed_m_s: float) -> float:
    """Mean rubbing speed over a uniformly decelerated stop, v0/2 [m/s] (the
    time average of a speed falling linearly to zero)."""
    return initial_speed_m_s / 2.0


def kinetic_energy_translation_J(mass_kg: float, speed_m_s: float) -> float:
    """½·m·v² [J] of a mass moving at v (the load at rope speed)."""
    return 0.5 * mass_kg * speed_m_s**2


def kinetic_energy_rotation_J(inertia_kg_m2: float, speed_rpm: float) -> float:
    """½·J·ω² [J] of rotating parts of inertia J [kg·m²] at n [rpm] (reduced
    to the drum: J and n at the same shaft)."""
    return 0.5 * inertia_kg_m2 * angular_speed_rad_s(speed_rpm) ** 2


def stop_time_s(speed_m_s: float, deceleration_m_s2: float) -> float:
    """t = v/a [s]: a uniform deceleration a from v to rest."""
    return speed_m_s / deceleration_m_s2


def stop_distance_m(speed_m_s: float, time_s: float) -> float:
    """Distance over a uniformly decelerated stop, h = v·t/2 [m]."""
    return speed_m_s * time_s / 2.0


def stop_angle_rad(speed_rpm: float, time_s: float) -> float:
    """Drum angle over a uniformly decelerated stop, θ = ω·t/2 [rad]."""
    return angular_speed_rad_s(speed_rpm) * time_s / 2.0


def potential_energy_J(mass_kg: float, drop_m: float) -> float:
    """m·g·h [J] released by a load that sinks by h over the stop: positive
    for a lowered load (the brake must absorb it), negative for a rising one
    (gravity takes part of the kinetic energy)."""
    return mass_kg * G_N_M_S2 * drop_m


def stopping_torque_Nm(energy_J: float, speed_rpm: float, time_s: float) -> float:
    """Mean braking torque T = E/θ [N·m] that absorbs E over a uniformly
    decelerated stop of the drum from n [rpm] in t [s], θ = ω·t/2.

    With E = ½J_eq·ω² + m·g·v·t/2 this is J_eq·ω/t + m·g·v/ω: the torque
    that decelerates the reduced inertia plus the load's holding torque.
    """
    return energy_J / stop_angle_rad(speed_rpm, time_s)


def holding_torque_Nm(mass_kg: float, speed_m_s: float, speed_rpm: float) -> float:
    """Torque at the drum that holds a hanging load, m·g·v/ω [N·m]: the
    load's weight reduced to the drum by the speed ratio (power m·g·v = T·ω;
    m·g·r for a rope on a drum of radius r)."""
    return mass_kg * G_N_M_S2 * speed_m_s / angular_speed_rad_s(speed_rpm)


def temperature_rise_K(energy_J: float, mass_kg: float, specific_heat_J_kg_K: float) -> float:
    """ΔT = E/(C·m) [K] of a mass m [kg] of specific heat C that takes all of E."""
    return energy_J / (specific_heat_J_kg_K * mass_kg)


def steady_temperature_C(
    energy_per_stop_J: float,
    stops_per_hour: float,
    heat_transfer_W_m2_K: float,
    area_m2: float,
    ambient_C: float,
) -> float:
    """Mean drum temperature over repeated stops [°C]: the energy per hour
    E·n balanced by Newton's cooling h·A·(T − T∞) over 3600 s."""
    power_W = energy_per_stop_J * stops_per_hour / SECONDS_PER_HOUR
    return ambient_C + power_W / (heat_transfer_W_m2_K * area_m2)


def cyclic_peak_temperature_C(
    rise_K: float,
    stops_per_hour: float,
    heat_transfer_W_m2_K: float,
    area_m2: float,
    mass_kg: float,
    specific_heat_J_kg_K: float,
    ambient_C: float,
) -> float:
    """Drum temperature right after a stop once the stops have settled [°C].

    Each stop adds ``rise_K`` at once; between stops (t_c = 3600/n s) the drum
    cools by Newton's law, T − T∞ falling by exp(−β·t_c), β = h·A/(m·C).  The
    settled peak is T∞ + ΔT/(1 − exp(−β·t_c)), the sum of the geometric series
    of the stops' remainders.
    """
    beta_per_s = heat_transfer_W_m2_K * area_m2 / (mass_kg * specific_heat_J_kg_K)
    cycle_s = SECONDS_PER_HOUR / stops_per_hour
    return ambient_C + rise_K / -math.expm1(-beta_per_s * cycle_s)
