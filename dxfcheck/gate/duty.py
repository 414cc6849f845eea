"""The duty of a stop and the heat it puts into the drum: the stop duty (the
torque that stops the moving masses in the stated time), the drum's peak and
steady temperatures against their limits, and the rubbing speed the pV rules
use.

The formulas are in :mod:`dxfcheck.gate.heat` (Shigley's MED 10th ed.,
ch. 16, energy and temperature rise; Newton's law of cooling).  The spec
keys: ``load_mass`` with ``rope_speed`` (or, without it, the load taken to
hang from the brake drum's own surface), ``inertia`` at ``drum_speed``,
``lowering``, ``stop_time`` or ``deceleration``, ``stops_per_hour``,
``drum_mass``, ``drum_material`` or ``specific_heat``, ``cooling_area``,
``heat_transfer_coefficient``, ``ambient_temperature``,
``drum_temperature_max`` and ``drum_peak_temperature_max`` (or a
``lining``'s).

Defaults (each named in the rules' inputs when used):

* specific heat 500 J/(kg·K) for steel or cast iron: Shigley's MED 10th
  ed., §16-9 (from memory);
* heat-transfer coefficient 10 W/(m²·K), still air (no forced airspeed):
  Shigley's chart of the combined convection and radiation coefficient h_CR
  in still air reads about 2 Btu/(h·ft²·°F) (11 W/(m²·K)) at small
  temperature rises (from memory), rounded down to the conservative side;
* ambient 40 °C: the site ambient up to which IEC 60034-1 rates electrical
  machines (from memory), the warmer of the usual 20 °C and 40 °C and so the
  conservative one for a temperature limit;
* a load whose motion is not stated is taken as lowered (the stop that
  needs the most torque and energy).

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering
   Design*, 10th ed., McGraw-Hill, 2015, ch. 16, §16-8 and §16-9 (section
   and figure numbers from memory).
.. [2] IEC 60034-1, Rotating electrical machines - Rating and performance:
   the site conditions (ambient up to 40 °C; from memory).
"""

from __future__ import annotations

import math
from typing import Any

from dxfcheck.core.errors import ConfigError
from dxfcheck.core.records import record
from dxfcheck.gate import heat
from dxfcheck.gate.spec import Spec, SpecValue
from dxfcheck.gate.verdicts import RuleResult, Verdict, incomplete, missing, skip

__all__ = [
    "AMBIENT_C",
    "HEAT_TRANSFER_W_M2_K",
    "PEAK_KEYS",
    "SPECIFIC_HEAT_J_KG_K",
    "SRC_PEAK",
    "SRC_STEADY",
    "SRC_STOP",
    "STEADY_KEYS",
    "STOP_AGREEMENT_REL",
    "STOP_KEYS",
    "Stop",
    "heat_rules",
    "rubbing_speed",
    "stop_of",
]

#: Specific heat of the drum by material [J/(kg·K)], with its source.
SPECIFIC_HEAT_J_KG_K: dict[str, tuple[float, str]] = {
    "steel": (500.0, "Shigley's MED 10th ed., §16-9: 500 J/(kg·°C) for steel or cast iron (from memory)"),
    "cast iron": (500.0, "Shigley's MED 10th ed., §16-9: 500 J/(kg·°C) for steel or cast iron (from memory)"),
}

#: Default heat-transfer coefficient [W/(m²·K)] and its source.
HEAT_TRANSFER_W_M2_K = (
    10.0,
    "still air, no forced airspeed: Shigley's MED 10th ed., §16-9, chart of h_CR in still air, about "
    "2 Btu/(h·ft²·°F) = 11 W/(m²·K) at small rises, rounded down (from memory)",
)

#: Default ambient temperature [°C] and why.
AMBIENT_C = (
    40.0,
    "40 °C, the site ambient IEC 60034-1 rates machines for (from memory): the warmer usual choice, conservative",
)

#: The keys of the peak and the steady temperature rules; the spec begins a
#: rule by setting any of them itself (a lining's limits do not begin it).
PEAK_KEYS = ("drum_mass", "drum_peak_temperature_max")
STEADY_KEYS = ("stops_per_hour", "cooling_area", "drum_temperature_max")

#: The keys that describe a stop; any of them asks for the stop duty.
STOP_KEYS = ("load_mass", "rope_speed", "inertia", "stop_time", "deceleration")

SRC_STOP = (
    "stop duty T = E/θ, θ = ω·t/2 over a uniform stop, E = ½mv² + ½Jω² ± m·g·h "
    "(Shigley's MED 10th ed., §16-8 energy considerations; from memory)"
)
SRC_PEAK = (
    "temperature rise ΔT = E/(C·m) per stop (Shigley's MED 10th ed., §16-9); settled peak "
    "T∞ + ΔT/(1 − e^(−β·3600/n)), β = hA/(mC), Newton's cooling between stops (from memory)"
)
SRC_STEADY = (
    "heat balance E·n = 3600·h·A·(T − T∞), Newton's law of cooling (Shigley's MED 10th ed., §16-9; from memory)"
)


#: Relative difference between ``stop_time`` and v/a from ``deceleration``
#: accepted when both are given [-]: values written to three figures
#: (common practice, no single source).
STOP_AGREEMENT_REL = 0.01


@record(frozen=True)
class Stop:
    """One stop of the duty as the spec describes it.

    Attributes
    ----------
    energy_J : float
        Energy balance of the stop [J]: kinetic + potential (negative
        potential for a rising load); negative when gravity alone stops the
        load, and then the brake absorbs none (:attr:`absorbed_J` is 0).
    kinetic_load_J, kinetic_rotation_J, potential_J : float
        Its parts [J].
    load_speed_m_s : float or None
        The load's speed when the stop begins [m/s] (None without a load).
    drop_m : float
        How far the load sinks over the stop [m] (negative: rises).
    time_s : float or None
        Time of the stop [s].
    torque_Nm : float or None
        Torque the stop needs [N·m]: the larger of T = E/θ, the torque that
        absorbs ``absorbed_J`` over the stop, and the torque m·g·v/ω that
        holds a hanging load once stopped (None without ``drum_speed`` or the
        time).
    energy_torque_Nm : float or None
        E/θ [N·m] as computed (negative when gravity stops the load).
    holding_torque_Nm : float
        m·g·v/ω [N·m] of a hanging load (0 for a level one or without a load).
    notes : tuple of str
        How each value was found (speed basis, defaults taken).
    sources : tuple of str
        Where the spec values came from.
    """

    energy_J: float
    kinetic_load_J: float
    kinetic_rotation_J: float
    potential_J: float
    load_speed_m_s: float | None
    drop_m: float
    time_s: float | None
    torque_Nm: float | None
    notes: tuple[str, ...]
    sources: tuple[str, ...]
    energy_torque_Nm: float | None = None
    holding_torque_Nm: float = 0.0

    @property
    def absorbed_J(self) -> float:
        """Energy the brake absorbs [J]: the balance, or 0 when gravity stops the load."""
        return max(self.energy_J, 0.0)

    def basis(self) -> str:
        """The energy and torque of the stop in words, for the report: the
        numbers shown are the ones the rules use."""
        kinetic = self.kinetic_load_J + self.kinetic_rotation_J
        parts = (
            f"E = ½mv² {self.kinetic_load_J:.4g} J + ½Jω² {self.kinetic_rotation_J:.4g} J"
            f" {'+' if self.potential_J >= 0 else '−'} m·g·h {abs(self.potential_J):.4g} J = {self.energy_J:.4g} J"
        )
        if self.time_s is not None:
            parts += f" in t = {self.time_s:.4g} s"
        said = [parts]
        if self.energy_J < 0:
            said.append(
                f"the rising load's potential energy m·g·h {-self.potential_J:.4g} J exceeds its kinetic energy "
                f"{kinetic:.4g} J: gravity stops it and the brake absorbs no energy (0 J, clamped)"
            )
        if self.torque_Nm is not None and self.energy_torque_Nm is not None:
            said.append(self._torque_words())
        return "; ".join([*said, *self.notes])

    def _torque_words(self) -> str:
        e_theta = max(self.energy_torque_Nm or 0.0, 0.0)
        hold = f"the holding torque m·g·v/ω (m·g·r on the drum) = {self.holding_torque_Nm:.4g} N·m"
        if self.holding_torque_Nm <= e_theta:
            return f"T = E/θ = {e_theta:.4g} N·m"
        if self.energy_J < 0:
            return f"T = {hold} governs"
        return f"T = E/θ = {e_theta:.4g} N·m is below {hold}, which governs: T = {self.torque_Nm:.4g} N·m"


def _load_speed(spec: Spec, radius_mm: float | None) -> tuple[float | None, str]:
    """The load's speed [m/s] and how it was found, or None and the keys it needs."""
    v = spec.num("rope_speed")
    if v is not None:
        return v, ""
    n = spec.num("drum_speed")
    if n is None:
        return None, "rope_speed (or drum_speed)"
    if radius_mm is None:
        return None, "rope_speed (no drum in the drawing gives the load's speed)"
    return heat.rubbing_speed_m_s(2 * radius_mm, n), "load speed = the brake drum's surface speed πDn/60"


def _stop_time(spec: Spec, v_ref: float | None, v_keys: str) -> tuple[float | None, str]:
    """Time of the stop [s] and how it was found, or None and the keys it
    needs; ``v_ref`` is the speed the deceleration acts on [m/s], found from
    ``v_keys``.

    Raises
    ------
    ConfigError
        When ``stop_time`` and ``deceleration`` are both given and disagree
        (or the speed that relates them is unknown).
    """
    t_v, a_v = spec.get("stop_time"), spec.get("deceleration")
    if a_v is None:
        return (None, "stop_time (or deceleration)") if t_v is None else (float(t_v.value), "")
    a = float(a_v.value)
    if v_ref is None or v_ref <= 0:
        if t_v is None:
            return None, f"{v_keys} (the speed the deceleration acts on; or stop_time)"
        _disagree(t_v, a_v, None)
    t_a = heat.stop_time_s(v_ref or 0.0, a)
    if t_v is None:
        return t_a, f"t = v/a = {v_ref:.4g}/{a:.4g} s"
    if abs(t_a - float(t_v.value)) > STOP_AGREEMENT_REL * float(t_v.value):
        _disagree(t_v, a_v, (v_ref or 0.0, t_a))
    return float(t_v.value), f"the deceleration agrees: v/a = {v_ref:.4g}/{a:.4g} = {t_a:.4g} s"


def _disagree(t_v: SpecValue, a_v: SpecValue, found: tuple[float, float] | None) -> None:
    both = f"stop_time = {t_v.text} (from {t_v.source}) and deceleration = {a_v.text} (from {a_v.source})"
    if found is None:
        raise ConfigError(f"{both} are both given, but no load speed relates them (t = v/a): give one of them")
    v, t_a = found
    raise ConfigError(
        f"{both} disagree: t = v/a = {v:.4g} m/s / {float(a_v.value):.4g} m/s² = {t_a:.4g} s, not "
        f"{float(t_v.value):.4g} s (within {STOP_AGREEMENT_REL:.0%}); give one of them, or both alike"
    )


def _speeds(spec: Spec, radius_mm: float | None) -> tuple[float | None, float | None, list[str], list[str]]:
    """The load's speed [m/s], the rim's [m/s], the keys still needed and the notes."""
    m, j, n = spec.num("load_mass"), spec.num("inertia"), spec.num("drum_speed")
    need: list[str] = []
    notes: list[str] = []
    if m is None and j is None:
        need.append("load_mass or inertia")
    v = None
    if m is not None:
        v, how = _load_speed(spec, radius_mm)
        (need if v is None else notes).append(how)
    if j is not None and n is None:
        need.append("drum_speed (for the inertia)")
    if n is not None and n <= 0:
        need.append("drum_speed above 0 (the drum turns when a stop begins)")
    rim = heat.rubbing_speed_m_s(2 * radius_mm, n) if n and radius_mm is not None else None
    return v, rim, need, notes


def stop_of(spec: Spec, radius_mm: float | None) -> tuple[Stop | None, list[str]]:
    """The stop the spec describes and the keys it still needs: (None, []) when
    the spec says nothing of a stop; (None, keys) when the energy cannot be
    found; a :class:`Stop` (its torque None, and the keys it lacks) otherwise.

    ``radius_mm`` is the brake drum's radius [mm]: without ``rope_speed`` the
    load is taken to move with the drum's surface.

    Raises
    ------
    ConfigError
        When ``stop_time`` and ``deceleration`` disagree.
    """
    if not any(spec.get(k) is not None for k in STOP_KEYS):
        return None, []
    m, j, n = spec.num("load_mass"), spec.num("inertia"), spec.num("drum_speed")
    v, rim, need, notes = _speeds(spec, radius_mm)
    v_keys = "rope_speed (or drum_speed)" if m is not None else "drum_speed"
    t, how_t = _stop_time(spec, v if m is not None else rim, v_keys)
    motion = spec.get("lowering")
    sense = {"yes": 1.0, "no": 0.0, "hoisting": -1.0}[str(motion.value) if motion else "yes"]
    if m is not None and motion is None:
        notes.append("lowering not stated: taken as lowered (the conservative stop)")
    if m is not None and sense != 0.0 and t is None and not (v is None and how_t.startswith(v_keys)):
        need.append(how_t)
    if need:
        return None, list(dict.fromkeys(x for x in need if x))
    drop = sense * heat.stop_distance_m(v or 0.0, t or 0.0) if m is not None else 0.0
    ek = heat.kinetic_energy_translation_J(m or 0.0, v or 0.0)
    er = heat.kinetic_energy_rotation_J(j or 0.0, n or 0.0)
    ep = heat.potential_energy_J(m or 0.0, drop)
    energy = ek + er + ep
    lacking = [k for k, val in (("drum_speed", n), (how_t, t)) if val is None]
    e_theta = heat.stopping_torque_Nm(energy, n, t) if n and t else None
    hold = heat.holding_torque_Nm(m or 0.0, v or 0.0, n) if n and sense != 0.0 else 0.0
    torque = None if e_theta is None else max(e_theta, hold, 0.0)
    notes += [how_t] if how_t and t is not None else []
    keys = ("load_mass", "rope_speed", "inertia", "drum_speed", "lowering", "stop_time", "deceleration")
    sources = tuple(dict.fromkeys(sv.source for sv in (spec.get(k) for k in keys) if sv is not None))
    shown = tuple(x for x in notes if x)
    stop = Stop(energy, ek, er, ep, v, drop, t, torque, shown, sources, e_theta, hold)
    return stop, lacking if torque is None else []


def rubbing_speed(spec: Spec, radius_mm: float) -> tuple[float, str]:
    """The rubbing speed [m/s] the pV rules use, and which one it is: the
    mean over a uniform stop (half of πDn/60) when the spec states a stop
    (``stop_time`` or ``deceleration``), else the drum speed πDn/60."""
    v0 = heat.rubbing_speed_m_s(2 * radius_mm, spec.num("drum_speed") or 0.0)
    if spec.get("stop_time") is not None or spec.get("deceleration") is not None:
        return heat.mean_rubbing_speed_m_s(v0), "mean rubbing speed over the stop, v/2 with v = πDn/60"
    return v0, "drum speed v = πDn/60 (no stop stated: continuous rubbing)"


def _specific_heat(spec: Spec) -> tuple[float, str]:
    c = spec.get("specific_heat")
    if c is not None:
        return float(c.value), f"specific_heat from {c.source}"
    mat = spec.get("drum_material")
    name = str(mat.value) if mat is not None else "steel"
    value, src = SPECIFIC_HEAT_J_KG_K[name]
    said = f"drum_material = {name}" if mat is not None else "drum_material not stated: steel or cast iron"
    return value, f"{said}: {src}"


def _with_default(spec: Spec, key: str, default: tuple[float, str]) -> tuple[float, str]:
    v = spec.get(key)
    return (float(v.value), f"{key} from {v.source}") if v is not None else (default[0], f"default {default[1]}")


def _temperature_rule(
    rule: str, title: str, value_C: float, limit_C: float, ambient_C: float, source: str, inputs: dict[str, Any]
) -> RuleResult:
    """A temperature against its limit; margin = allowed rise over the rise
    above ambient (a ratio of Celsius temperatures means nothing); 0 when the
    limit is below the ambient (no rise is allowed, the rule fails)."""
    rise, allowed = value_C - ambient_C, limit_C - ambient_C
    margin = 0.0 if allowed < 0 else (allowed / rise if rise > 0 else math.inf)
    verdict = Verdict.PASS if value_C <= limit_C else Verdict.FAIL
    msg = f"{value_C:.4g} °C ({rise:.4g} K above the {ambient_C:.4g} °C ambient) against {limit_C:.4g} °C"
    if allowed < 0:
        msg += f"; the limit is below the ambient ({allowed:.4g} K): no drum can stay under it (margin 0)"
    return RuleResult(rule, title, verdict, value_C, limit_C, "°C", margin, inputs, source, msg)


def _heat_inputs(spec: Spec, stop: Stop) -> dict[str, Any]:
    c, c_src = _specific_heat(spec)
    h, h_src = _with_default(spec, "heat_transfer_coefficient", HEAT_TRANSFER_W_M2_K)
    amb, amb_src = _with_default(spec, "ambient_temperature", AMBIENT_C)
    return {
        "energy_per_stop_J": stop.absorbed_J,
        "kinetic_load_J": stop.kinetic_load_J,
        "kinetic_rotation_J": stop.kinetic_rotation_J,
        "potential_J": stop.potential_J,
        "stop": stop.basis(),
        "specific_heat_J_kg_K": c,
        "specific_heat_source": c_src,
        "heat_transfer_W_m2_K": h,
        "heat_transfer_source": h_src,
        "ambient_C": amb,
        "ambient_source": amb_src,
    }


def _stated(spec: Spec, keys: tuple[str, ...]) -> list[str]:
    """The keys of ``keys`` the spec sets itself (not filled by its lining)."""
    return [k for k in keys if (v := spec.get(k)) is not None and not v.from_lining]


def _begun_or_skip(
    spec: Spec, rule: str, title: str, keys: tuple[str, ...], source: str, stop_needs: list[str] | None = None
) -> RuleResult | None:
    """None when the rule has all it needs; else its verdict: FAIL naming the
    missing keys when the spec begins it (sets any of ``keys`` itself), a
    skip naming them when it does not.  ``stop_needs`` are the keys the
    stop's energy still lacks."""
    miss = [*(stop_needs or []), *missing(spec, keys)]
    if not miss:
        return None
    if _stated(spec, keys):
        return incomplete(rule, title, miss, source)
    return skip(rule, title, f"needs {', '.join(miss)}", source)


def _peak(spec: Spec, stop: Stop, inputs: dict[str, Any]) -> RuleResult:
    rule, title = "heat.peak", "drum temperature after a stop"
    not_ready = _begun_or_skip(spec, rule, title, PEAK_KEYS, SRC_PEAK)
    if not_ready is not None:
        return not_ready
    m = spec.num("drum_mass") or 0.0
    c, h, amb = inputs["specific_heat_J_kg_K"], inputs["heat_transfer_W_m2_K"], inputs["ambient_C"]
    rise = heat.temperature_rise_K(inputs["energy_per_stop_J"], m, c)
    n, area = spec.num("stops_per_hour"), spec.num("cooling_area")
    ins = dict(inputs, drum_mass_kg=m, rise_per_stop_K=rise)
    if n is not None and n > 1 and area is None:
        why = (
            f"{n:g} stops per hour heat the drum stop upon stop: the settled peak needs cooling_area "
            "(one stop from ambient would not be conservative)"
        )
        return incomplete(rule, title, ["cooling_area"], SRC_PEAK, why)
    if n is None or area is None:
        peak = amb + rise
        ins["basis"] = "one stop from ambient (stops_per_hour and cooling_area give the settled peak)"
    else:
        peak = heat.cyclic_peak_temperature_C(rise, n, h, area * 1e-6, m, c, amb)
        ins.update(basis="settled peak over repeated stops", stops_per_hour=n, cooling_area_m2=area * 1e-6)
    limit = spec.num("drum_peak_temperature_max") or 0.0
    return _temperature_rule(rule, title, peak, limit, amb, SRC_PEAK, ins)


def _steady(spec: Spec, stop: Stop, inputs: dict[str, Any]) -> RuleResult:
    rule, title = "heat.steady", "steady drum temperature"
    not_ready = _begun_or_skip(spec, rule, title, STEADY_KEYS, SRC_STEADY)
    if not_ready is not None:
        return not_ready
    n, area = spec.num("stops_per_hour") or 0.0, (spec.num("cooling_area") or 0.0) * 1e-6
    h, amb = inputs["heat_transfer_W_m2_K"], inputs["ambient_C"]
    t = heat.steady_temperature_C(inputs["energy_per_stop_J"], n, h, area, amb)
    ins = dict(inputs, stops_per_hour=n, cooling_area_m2=area, energy_per_hour_J=inputs["energy_per_stop_J"] * n)
    return _temperature_rule(rule, title, t, spec.num("drum_temperature_max") or 0.0, amb, SRC_STEADY, ins)


def heat_rules(spec: Spec, radius_mm: float | None) -> list[RuleResult]:
    """The stop's rules: ``stop.duty`` failing as incomplete, naming what the
    stop duty lacks, when the spec begins a stop but cannot finish it; the
    peak and the steady drum temperature against their limits (failing as
    incomplete, naming the missing keys, when the spec begins them; skipped,
    naming them, when it says nothing of them).

    Raises
    ------
    ConfigError
        When ``stop_time`` and ``deceleration`` disagree.
    """
    stop, lacking = stop_of(spec, radius_mm)
    out: list[RuleResult] = []
    if lacking:
        out.append(incomplete("stop.duty", "stop duty", lacking, SRC_STOP, "the stop duty cannot be found"))
    if stop is None:
        needs = lacking or ["load_mass or inertia (the moving masses)"]
        for rule, title, keys, src in (
            ("heat.peak", "drum temperature after a stop", PEAK_KEYS, SRC_PEAK),
            ("heat.steady", "steady drum temperature", STEADY_KEYS, SRC_STEADY),
        ):
            out.append(_begun_or_skip(spec, rule, title, keys, src, needs) or skip(rule, title, "", src))
        return out
    inputs = _heat_inputs(spec, stop)
    return [*out, _peak(spec, stop, inputs), _steady(spec, stop, inputs)]
