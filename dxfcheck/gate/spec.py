"""The brake's spec: the duty and the limits a drawing is judged against.

Values come from five places, lowest to highest precedence:

1. built-in defaults (:data:`DEFAULTS`);
2. the project file ``dxfcheck.toml``: its ``[spec]`` table, then a
   ``[spec."NAME.dxf"]`` table for the one drawing (``NAME.dwg`` for a DWG);
3. the drawing's own header custom properties (R2004 and later) whose names
   start with ``dxfcheck.``, e.g. ``dxfcheck.required_torque = 450 N*m``;
4. the drawing's own file ``NAME.toml`` beside it (the sidecar), its
   ``[spec]`` table (its ``[layers]`` and ``[markup]`` are read by
   :func:`dxfcheck.core.config.config_for_drawing`; named with ``--config`` it is
   the project file, read once at level 2);
5. the command line (``--set KEY=VALUE`` and the named options);
6. then ``lining = "NAME"`` (from any level) fills the values its row of the
   lining library gives (:mod:`dxfcheck.gate.linings`) that no level set,
   each with the row's source.

Every value with a dimension carries its unit in the text (``"450 N*m"``,
``"0.3 MPa"``, ``"1450 rpm"``, ``"7.5 kW"``, ``"40 mm"``); a bare number is
rejected with a message naming the key and the file.  Per-pin and per-member
values go in ``pins.NAME`` and ``members.NAME`` sub-tables
(``[spec.pins.S1]``, ``dxfcheck.pins.S1.pin_length``,
``--set pins.S1.pin_length=40mm``); a name the drawing does not have is
refused once the mechanism is known (:func:`dxfcheck.gate.rules.check_subjects`).
"""

from __future__ import annotations

import enum
import math
import os
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from dxfcheck.core.config import read_toml, sidecar_of, table_name
from dxfcheck.core.errors import ConfigError
from dxfcheck.core.records import record
from dxfcheck.core.units import DIMENSIONS, Quantity, UnitError, parse_quantity
from dxfcheck.gate.linings import LININGS, lining_values

__all__ = [
    "AMBIENT_MAX_C",
    "AMBIENT_MIN_C",
    "DEFAULTS",
    "KEYS",
    "LINING_MARK",
    "MU_MAX",
    "QUANTITY_MAX",
    "Key",
    "Kind",
    "Spec",
    "SpecValue",
    "check_number",
    "check_quantity",
    "load_spec",
    "parse_assignment",
]

#: The words that end the source of a value the spec's lining filled.
LINING_MARK = "lining from "

#: Prefix of the drawing header's custom properties read as spec values.
PROPERTY_PREFIX = "dxfcheck."

#: Highest friction coefficient accepted [-].  Lining-drum pairs run from
#: about 0.1 to 0.6 (woven, moulded, sintered linings; dry); 1.5 leaves room
#: for a test value while refusing a slip such as 35 for 0.35 (common
#: practice, no single source).
MU_MAX = 1.5

#: Largest value of each dimension accepted anywhere a value enters (the
#: spec, the options) [internal unit]: far beyond any industrial drum brake
#: (the plausibility stage judges the realistic ranges), and small enough
#: that the statics stays finite in double precision (common practice).
QUANTITY_MAX: dict[str, float] = {
    "length": 1e6,  # mm: 1 km
    "force": 1e9,  # N
    "stiffness": 1e9,  # N/mm
    "section_modulus": 1e15,  # mm3
    "torque": 1e9,  # N*m
    "pressure": 1e6,  # MPa
    "speed": 1e6,  # rpm
    "power": 1e10,  # W
    "area": 1e12,  # mm2
    "pv": 1e6,  # MPa*m/s
    "mass": 1e7,  # kg
    "energy": 1e12,  # J
    "velocity": 1e3,  # m/s
    "acceleration": 1e4,  # m/s2
    "time": 1e7,  # s
    "inertia": 1e8,  # kg*m2
    "temperature": 5e3,  # °C
    "specific_heat": 1e5,  # J/(kg*K)
    "heat_transfer": 1e5,  # W/(m2*K)
}


#: Range of the ambient temperature accepted [°C]: from arctic sites to
#: the hottest machine rooms; the IEC 60034-1 site range runs from -15 °C to
#: 40 °C (from memory), and cranes are built for colder ports and warmer
#: foundries (common practice, no single source).
AMBIENT_MIN_C, AMBIENT_MAX_C = -60.0, 60.0


class Kind(enum.Enum):
    """How a spec value is written."""

    QUANTITY = "quantity"  # a number with a unit of a dimension
    NUMBER = "number"  # a dimensionless number
    DIRECTIONS = "directions"  # a list of "cw"/"ccw"
    CHOICE = "choice"  # one word from a list
    NAME = "name"  # the name of something in the drawing (a load, a spring)


@record(frozen=True)
class Key:
    """A spec key: how it is written and what it means."""

    kind: Kind
    doc: str
    dimension: str | None = None
    choices: tuple[str, ...] = ()
    per: str | None = None  # "pins", "members" or "parts" when it may be overridden per subject
    minimum: float | None = None
    maximum: float | None = None
    #: the value must be above ``minimum`` (not equal to it)
    above: bool = False
    #: other spellings of a choice and the choice they stand for
    aliases: tuple[tuple[str, str], ...] = ()


#: Every key the spec knows.
KEYS: dict[str, Key] = {
    # duty
    "required_torque": Key(Kind.QUANTITY, "braking torque the brake must hold", "torque"),
    "motor_power": Key(Kind.QUANTITY, "motor rated power", "power"),
    "motor_speed": Key(Kind.QUANTITY, "motor rated speed (at the brake drum)", "speed"),
    "torque_factor": Key(
        Kind.NUMBER, "brake torque / motor rated torque (set by the hoist code)", minimum=0.0, maximum=10.0, above=True
    ),
    "hoist_torque": Key(Kind.QUANTITY, "full-load hoisting torque at the brake", "torque"),
    "control_braking": Key(
        Kind.CHOICE, "hoist control braking: mechanical or other", choices=("mechanical", "non-mechanical")
    ),
    "holding_brakes": Key(Kind.NUMBER, "number of holding brakes on the hoist", minimum=1.0, maximum=16.0),
    "directions": Key(Kind.DIRECTIONS, "drum directions that must hold"),
    # friction
    "mu": Key(Kind.NUMBER, "nominal lining-drum friction coefficient", minimum=0.0, maximum=MU_MAX, above=True),
    "mu_min": Key(Kind.NUMBER, "lowest friction coefficient in service", minimum=0.0, maximum=MU_MAX, above=True),
    "mu_max": Key(Kind.NUMBER, "highest friction coefficient in service", minimum=0.0, maximum=MU_MAX, above=True),
    "self_lock_margin": Key(Kind.NUMBER, "critical μ must exceed mu_max by this factor", minimum=1.0, maximum=10.0),
    # lining
    "lining_width": Key(Kind.QUANTITY, "shoe face width", "length"),
    "lining_pressure_max": Key(Kind.QUANTITY, "allowed lining pressure", "pressure"),
    "drum_speed": Key(Kind.QUANTITY, "drum speed while braking", "speed"),
    "pv_max": Key(Kind.QUANTITY, "allowed pressure × rubbing speed", "pv"),
    # pins
    "pin_length": Key(Kind.QUANTITY, "pin bearing length", "length", per="pins"),
    "pin_shear_allow": Key(Kind.QUANTITY, "allowed pin shear stress", "pressure", per="pins"),
    "pin_bearing_allow": Key(Kind.QUANTITY, "allowed pin bearing pressure", "pressure", per="pins"),
    "pin_shear_planes": Key(Kind.NUMBER, "1 single shear, 2 double shear", per="pins", minimum=1.0, maximum=16.0),
    # two-force members
    "rod_area": Key(Kind.QUANTITY, "rod cross-section area", "area", per="members"),
    "rod_diameter": Key(Kind.QUANTITY, "solid round rod diameter", "length", per="members"),
    "rod_stress_allow": Key(Kind.QUANTITY, "allowed axial stress", "pressure", per="members"),
    "rod_modulus": Key(Kind.QUANTITY, "Young's modulus of the rod", "pressure", per="members"),
    "rod_end_factor": Key(
        Kind.NUMBER, "effective-length factor K (1 pinned-pinned)", per="members", minimum=0.0, maximum=10.0, above=True
    ),
    "buckling_safety": Key(Kind.NUMBER, "required Euler load / axial load", per="members", minimum=1.0, maximum=100.0),
    # effort
    "effort": Key(Kind.QUANTITY, "magnitude of every load", "force"),
    # release, wear and springs (issue 19: dxfcheck.gate.release, dxfcheck.statics.kinematics)
    "actuator": Key(Kind.NAME, "the load or spring the release actuator moves against its force (F1, spring1)"),
    "shoe_clearance": Key(Kind.QUANTITY, "radial lift of every shoe (and band) wanted at release", "length"),
    "actuator_stroke": Key(Kind.QUANTITY, "the actuator's working stroke", "length"),
    "actuator_force": Key(Kind.QUANTITY, "the actuator's force", "force"),
    "release_margin": Key(Kind.NUMBER, "actuator force / force needed to release", minimum=1.0, maximum=10.0),
    "lining_thickness": Key(Kind.QUANTITY, "lining thickness when new", "length"),
    "wear_allowance": Key(Kind.QUANTITY, "lining wear the stroke must take up before adjustment", "length"),
    "spring_rate": Key(Kind.QUANTITY, "rate of the setting spring(s)", "stiffness"),
    "spring_preload_tolerance": Key(
        Kind.NUMBER, "± tolerance of the spring force, a fraction (0.1 for ±10 %)", minimum=0.0, maximum=0.9
    ),
    # strength of parts and the drum shaft (issue 19: dxfcheck.statics.strength, dxfcheck.gate.strength)
    "part_width": Key(
        Kind.QUANTITY, "rectangular section: width across the drawing (plate thickness)", "length", per="parts"
    ),
    "part_height": Key(Kind.QUANTITY, "rectangular section: depth in the drawing's plane", "length", per="parts"),
    "part_diameter": Key(Kind.QUANTITY, "round section: diameter", "length", per="parts"),
    "part_section_modulus": Key(
        Kind.QUANTITY, "section modulus for bending in the drawing's plane", "section_modulus", per="parts"
    ),
    "part_stress_allow": Key(
        Kind.QUANTITY, "allowed normal stress in a part (bending + axial)", "pressure", per="parts"
    ),
    "shaft_load_max": Key(Kind.QUANTITY, "allowed resultant force of the shoes and bands on the drum shaft", "force"),
    # shoe theory
    "shoe_model": Key(Kind.CHOICE, "short, long or auto", choices=("short", "long", "auto")),
    "long_shoe_threshold": Key(
        Kind.NUMBER, "contact angle above which auto takes long theory [degrees]", minimum=0.0, maximum=360.0
    ),
    # duty and heat of a stop (dxfcheck.gate.duty, dxfcheck.gate.heat) and the lining library
    "load_mass": Key(Kind.QUANTITY, "mass of the load the brake stops (moving at rope_speed)", "mass"),
    "rope_speed": Key(
        Kind.QUANTITY, "load speed when a stop begins (default: the drum surface)", "velocity", minimum=0.0, above=True
    ),
    "inertia": Key(Kind.QUANTITY, "moment of inertia of the rotating parts reduced to the brake drum", "inertia"),
    "lowering": Key(
        Kind.CHOICE,
        "the stop: yes (load lowered, adds m·g·h), no (level), hoisting (load rising, gravity helps)",
        choices=("yes", "no", "hoisting"),
    ),
    "stop_time": Key(Kind.QUANTITY, "time of a stop, uniform deceleration", "time", minimum=0.0, above=True),
    "deceleration": Key(
        Kind.QUANTITY,
        "load deceleration over a stop, uniform (needs rope_speed)",
        "acceleration",
        minimum=0.0,
        above=True,
    ),
    "stops_per_hour": Key(Kind.NUMBER, "stops per hour in service", minimum=0.0, maximum=36000.0, above=True),
    "drum_mass": Key(Kind.QUANTITY, "mass of the drum that takes the heat of a stop", "mass", minimum=0.0, above=True),
    "drum_material": Key(
        Kind.CHOICE,
        "drum material (its specific heat); cast-iron and cast_iron read as cast iron",
        choices=("steel", "cast iron"),
        aliases=(("cast-iron", "cast iron"), ("cast_iron", "cast iron")),
    ),
    "specific_heat": Key(
        Kind.QUANTITY, "specific heat of the drum (overrides drum_material)", "specific_heat", minimum=0.0, above=True
    ),
    "cooling_area": Key(Kind.QUANTITY, "drum surface that sheds heat to the air", "area", minimum=0.0, above=True),
    "heat_transfer_coefficient": Key(
        Kind.QUANTITY,
        "combined convection and radiation coefficient of the drum",
        "heat_transfer",
        minimum=0.0,
        above=True,
    ),
    "ambient_temperature": Key(
        Kind.QUANTITY,
        f"air temperature around the brake, {AMBIENT_MIN_C:g} to {AMBIENT_MAX_C:g} °C",
        "temperature",
        minimum=AMBIENT_MIN_C,
        maximum=AMBIENT_MAX_C,
    ),
    "drum_temperature_max": Key(Kind.QUANTITY, "allowed steady (continuous) drum temperature", "temperature"),
    "drum_peak_temperature_max": Key(Kind.QUANTITY, "allowed drum temperature right after a stop", "temperature"),
    "lining": Key(
        Kind.CHOICE,
        "lining material from the library (dxfcheck linings): fills mu, its range, the pressure, pV and "
        "temperature limits; the spec may override each",
        choices=tuple(LININGS),
    ),
    # revision compare
    "max_torque_drop": Key(
        Kind.NUMBER, "compare: fail when torque drops by more than this fraction", minimum=0.0, maximum=1.0
    ),
    "max_force_rise": Key(
        Kind.NUMBER, "compare: fail when a force rises by more than this fraction", minimum=0.0, maximum=100.0
    ),
    # drawing
    "units": Key(
        Kind.CHOICE,
        "the drawing's unit, confirming or overriding $INSUNITS (check reads the drawing in it)",
        choices=("mm", "cm", "dm", "m", "inch", "in", "ft", "foot"),
    ),
    # report
    "torque_asymmetry_max": Key(
        Kind.NUMBER, "warn above this relative torque difference between directions", minimum=0.0, maximum=100.0
    ),
}

#: Built-in defaults: (value, note on where it comes from).
DEFAULTS: dict[str, tuple[Any, str]] = {
    "directions": (("cw", "ccw"), "both directions"),
    "self_lock_margin": (1.0, "no margin beyond mu_max"),
    "pin_shear_planes": (1.0, "single shear, the conservative case"),
    "rod_end_factor": (1.0, "pinned-pinned (Euler's fundamental case)"),
    "buckling_safety": (3.0, "common practice for machine links, no single source"),
    "release_margin": (1.2, "actuator 20 % above the force it must overcome: common practice, no single source"),
    "torque_asymmetry_max": (0.30, "the weaker direction usually sets the holding duty"),
    "shoe_model": ("auto", "long-shoe theory above the threshold"),
    "long_shoe_threshold": (60.0, "published thresholds range from 40° to 60°"),
}

_SUBTABLES = ("pins", "members", "parts")


@record(frozen=True)
class SpecValue:
    """One spec value in dxfcheck's internal unit of its dimension.

    Attributes
    ----------
    key : str
    value : Any
        float for quantities [internal unit] and numbers, tuple of str for
        directions, str for choices.
    unit : str
        Internal unit (``N*m``, ``MPa``, ``mm``...) or ``""``.
    text : str
        As written.
    source : str
        Where it came from (``default``, a file and table, ``drawing
        header``, ``command line``).
    """

    key: str
    value: Any
    unit: str
    text: str
    source: str

    @property
    def from_lining(self) -> bool:
        """Whether the spec's ``lining`` filled this value (no source set it)."""
        return self.source.endswith(")") and LINING_MARK in self.source


@record(frozen=True)
class Spec:
    """The merged spec of one drawing."""

    values: dict[str, SpecValue] = field(default_factory=dict)
    pins: dict[str, dict[str, SpecValue]] = field(default_factory=dict)
    members: dict[str, dict[str, SpecValue]] = field(default_factory=dict)
    parts: dict[str, dict[str, SpecValue]] = field(default_factory=dict)

    def get(self, key: str, subject: str | None = None) -> SpecValue | None:
        """The value for ``key``, a per-pin or per-member one first."""
        per = KEYS[key].per
        if subject is not None and per is not None:
            table = {"pins": self.pins, "members": self.members, "parts": self.parts}[per]
            hit = table.get(subject, {}).get(key)
            if hit is not None:
                return hit
        return self.values.get(key)

    def num(self, key: str, subject: str | None = None) -> float | None:
        v = self.get(key, subject)
        return None if v is None else float(v.value)

    def all_values(self) -> list[SpecValue]:
        """Every value, the per-subject ones named ``pins.NAME.key``."""
        out = list(self.values.values())
        for tname, table in (("pins", self.pins), ("members", self.members), ("parts", self.parts)):
            for subject, vals in table.items():
                out += [
                    SpecValue(f"{tname}.{subject}.{v.key}", v.value, v.unit, v.text, v.source) for v in vals.values()
                ]
        return out


def check_quantity(dimension: str, value: float, where: str) -> float:
    """``value`` [internal unit] if it is finite, not negative and at most
    :data:`QUANTITY_MAX` of its dimension.

    Raises
    ------
    ConfigError
        Naming ``where`` (the option or the key and its source).
    """
    top = QUANTITY_MAX[dimension]
    unit = DIMENSIONS[dimension][1]
    if not math.isfinite(value) or value < 0 or value > top:
        raise ConfigError(f"{where} must be a {dimension} from 0 to {top:g} {unit}, got {value:g} {unit}")
    return value


def check_number(key: str, value: float, where: str) -> float:
    """``value`` if it lies in the range of the spec key ``key`` (finite,
    within its minimum and maximum).

    Raises
    ------
    ConfigError
        Naming ``where`` and the range.
    """
    spec = KEYS[key]
    low, high = spec.minimum, spec.maximum
    ok = math.isfinite(value)
    ok = ok and (low is None or (value > low if spec.above else value >= low))
    ok = ok and (high is None or value <= high)
    if not ok:
        lo_text = "" if low is None else (f"above {low:g}" if spec.above else f"at least {low:g}")
        hi_text = "" if high is None else f"at most {high:g}"
        ranged = " and ".join(t for t in (lo_text, hi_text) if t) or "finite"
        raise ConfigError(f"{where} must be {ranged}, got {value:g}")
    return value


def _plain_number(raw: Any, where: str) -> float:
    """A TOML or text number as a float, refused when it is none or has no
    finite value (``inf``, ``nan``, an integer of thousands of digits)."""
    if isinstance(raw, bool) or not isinstance(raw, str | int | float):
        raise ConfigError(f"{where} must be a plain number, got {str(raw)[:40]!r}")
    try:
        value = float(raw)
    except (TypeError, ValueError, OverflowError):
        shown = f"an integer of {len(str(abs(raw)))} digits" if isinstance(raw, int) else repr(str(raw)[:40])
        raise ConfigError(f"{where} must be a plain number, got {shown}") from None
    if not math.isfinite(value):
        raise ConfigError(f"{where} must be a plain number and finite, got {str(raw)[:40]!r}")
    return value


def _parse_value(key: str, raw: Any, source: str) -> SpecValue:
    spec = KEYS[key]
    where = f"{source}: {key}"
    if spec.kind is Kind.QUANTITY:
        assert spec.dimension is not None
        raw = _typed_quantity(raw, where)
        if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
            raise ConfigError(f"{where} must be a number with a unit, e.g. '450 N*m'")
        if not isinstance(raw, str):
            shown = raw if isinstance(raw, float) or abs(raw) < 10**20 else "..."
            raise ConfigError(f'{where} = {shown!r} has no unit; write it as a text with its unit, e.g. "{shown} ..."')
        try:
            q = parse_quantity(raw, spec.dimension)
        except UnitError as exc:
            raise ConfigError(f"{where}: {exc}") from exc
        _check_range(spec, q.value, where)
        return SpecValue(key, q.value, q.unit, raw, source)
    if spec.kind is Kind.NUMBER:
        value = check_number(key, _plain_number(raw, where), where)
        return SpecValue(key, value, "", str(raw), source)
    if spec.kind is Kind.DIRECTIONS:
        items = [s.strip() for s in raw.split(",")] if isinstance(raw, str) else raw
        if isinstance(items, list | tuple):  # Direction members are str too
            items = [str(i) for i in items]
        if not isinstance(items, list | tuple) or not items or not all(i in ("cw", "ccw") for i in items):
            raise ConfigError(f"{where} must be a list of 'cw' and 'ccw', got {raw!r}")
        return SpecValue(key, tuple(dict.fromkeys(items)), "", str(raw), source)
    if spec.kind is Kind.NAME:
        if not isinstance(raw, str) or not raw.strip():
            raise ConfigError(f"{where} must be a name from the drawing, e.g. 'F1', got {str(raw)[:40]!r}")
        return SpecValue(key, raw.strip(), "", raw, source)
    raw = dict(spec.aliases).get(raw, raw) if isinstance(raw, str) else raw
    if not isinstance(raw, str) or raw not in spec.choices:
        raise ConfigError(f"{where} must be one of {', '.join(spec.choices)}, got {raw!r}")
    return SpecValue(key, raw, "", raw, source)


def _check_range(spec: Key, value: float, where: str) -> None:
    """A quantity within its key's range: not negative (or, for a key whose
    minimum is negative, from that minimum up to its maximum), within the
    dimension's largest value, and above a strictly positive key's zero (a
    value that divides: a stop time, a drum mass).

    Raises
    ------
    ConfigError
        Naming ``where`` (the key and its source) and the range.
    """
    assert spec.dimension is not None
    low, high = spec.minimum, spec.maximum
    if low is not None and low < 0 and high is not None:
        if not low <= value <= high:
            shown = DIMENSIONS[spec.dimension][1]
            raise ConfigError(f"{where} must be from {low:g} to {high:g} {shown}, got {value:g} {shown}")
        return
    if value < 0:
        raise ConfigError(f"{where} must not be negative")
    check_quantity(spec.dimension, value, where)
    if low is not None and (value <= low if spec.above else value < low):
        shown = DIMENSIONS[spec.dimension][1]
        bound = "above" if spec.above else "at least"
        raise ConfigError(f"{where} must be {bound} {low:g} {shown} (it divides), got {value:g} {shown}")


def _typed_quantity(raw: Any, where: str) -> Any:
    """A quantity given from Python as ``(value, "unit")`` or a
    :class:`~dxfcheck.core.units.Quantity`, as the text it stands for; any
    other value is returned as it is."""
    if isinstance(raw, Quantity):
        return f"{raw.value!r} {raw.unit}"
    if isinstance(raw, tuple):
        ok = len(raw) == 2 and isinstance(raw[1], str) and not isinstance(raw[0], bool)
        if not ok or not isinstance(raw[0], int | float):
            raise ConfigError(f"{where} must be (number, 'unit'), e.g. (450, 'N*m'); got {str(raw)[:40]!r}")
        value = _plain_number(raw[0], where)
        return f"{value!r} {raw[1]}"
    return raw


@dataclass
class _Builder:
    values: dict[str, SpecValue] = field(default_factory=dict)
    pins: dict[str, dict[str, SpecValue]] = field(default_factory=dict)
    members: dict[str, dict[str, SpecValue]] = field(default_factory=dict)
    parts: dict[str, dict[str, SpecValue]] = field(default_factory=dict)

    def put(self, key: str, raw: Any, source: str, subject: tuple[str, str] | None = None) -> None:
        if key not in KEYS:
            close = [k for k in KEYS if k.split("_")[0] == key.split("_")[0]]
            hint = f" (did you mean {', '.join(close)}?)" if close else ""
            raise ConfigError(f"{source}: unknown spec key {key!r}{hint}")
        v = _parse_value(key, raw, source)
        if subject is None:
            self.values[key] = v
            return
        table_name, name = subject
        if KEYS[key].per != table_name:
            raise ConfigError(f"{source}: {key!r} cannot be set per {table_name[:-1]}")
        table = {"pins": self.pins, "members": self.members, "parts": self.parts}[table_name]
        table.setdefault(name, {})[key] = v

    def table(self, data: Mapping[str, Any], source: str, *, skip: Iterable[str] = ()) -> None:
        skipped = set(skip)
        for key, raw in data.items():
            if key in skipped:
                continue
            if key in _SUBTABLES:
                if not isinstance(raw, dict):
                    raise ConfigError(f"{source}: {key} must be a table of names")
                for name, sub in raw.items():
                    if not isinstance(sub, dict):
                        raise ConfigError(f"{source}: {key}.{name} must be a table")
                    for k, r in sub.items():
                        self.put(k, r, source, (key, name))
                continue
            self.put(key, raw, source)

    def build(self) -> Spec:
        return Spec(dict(self.values), dict(self.pins), dict(self.members), dict(self.parts))


def parse_assignment(text: str) -> tuple[str, str]:
    """``"KEY=VALUE"`` -> ``(KEY, VALUE)``."""
    key, sep, value = text.partition("=")
    if not sep or not key.strip():
        raise ConfigError(f"--set {text!r}: write KEY=VALUE, e.g. required_torque=450N*m")
    return key.strip(), value.strip()


def _put_dotted(b: _Builder, dotted: str, raw: str, source: str) -> None:
    parts = dotted.split(".")
    if len(parts) == 3 and parts[0] in _SUBTABLES:
        b.put(parts[2], raw, source, (parts[0], parts[1]))
    elif len(parts) == 1:
        b.put(parts[0], raw, source)
    else:
        raise ConfigError(f"{source}: {dotted!r} is not a spec key (use KEY or pins.NAME.KEY)")


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def _sidecar(b: _Builder, drawing: Path, project_path: str | None) -> None:
    """Put the ``[spec]`` of the drawing's own file (``NAME.toml``), unless
    it is the project file itself."""
    sidecar = sidecar_of(drawing)
    if sidecar is None or (project_path and _same_file(sidecar, Path(project_path))):
        return
    data = read_toml(sidecar, "the drawing's own file (sidecar)")
    unknown = set(data) - {"spec", "layers", "markup"}  # the tables of a project file
    if unknown:
        raise ConfigError(
            f"unknown table {sorted(unknown)[0]!r} (a drawing's own file holds [layers], [markup], [spec])",
            path=str(sidecar),
        )
    spec_table = data.get("spec", {})
    if not isinstance(spec_table, dict):
        raise ConfigError("[spec] must be a table", path=str(sidecar))
    b.table(spec_table, f"{sidecar} [spec]")


def load_spec(
    drawing: str | os.PathLike[str],
    *,
    project: Mapping[str, Any] | None = None,
    project_path: str | None = None,
    custom_properties: Iterable[tuple[str, str]] = (),
    given: Mapping[str, Any] | None = None,
    overrides: Iterable[tuple[str, str]] = (),
) -> Spec:
    """Merge the spec of one drawing from all its sources.

    Parameters
    ----------
    drawing : path-like
        The drawing; its name selects ``[spec."NAME.dxf"]`` (a DWG's
        ``[spec."NAME.dwg"]``) and its sidecar ``NAME.toml``.
    project : mapping, optional
        The project file's raw ``[spec]`` table.
    project_path : str, optional
        The project file, for messages.
    custom_properties : iterable of (str, str)
        The drawing header's custom properties.
    given : mapping, optional
        Typed values from a Python caller, above the files and below the
        command line (source ``Python call``): a quantity as ``(450,
        "N*m")``, a :class:`~dxfcheck.core.units.Quantity` or a text with its
        unit; a number as a float; directions as :class:`Direction` members
        or ``"cw"``/``"ccw"``; ``{"pins": {NAME: {KEY: ...}}}`` per subject.
    overrides : iterable of (str, str)
        Command-line ``KEY=VALUE`` pairs (``pins.NAME.KEY`` allowed).

    Raises
    ------
    ConfigError
        On an unknown key, a value without its unit, or an unreadable file;
        the message names the key and the file.
    """
    p = Path(drawing)
    b = _Builder()
    for key, (value, note) in DEFAULTS.items():
        b.values[key] = SpecValue(key, value, "", str(value), f"default ({note})")
    if project:
        src = f"{project_path or 'dxfcheck.toml'} {table_name(project_path, 'spec')}"
        drawing_tables = [k for k, v in project.items() if k.lower().endswith((".dxf", ".dwg")) and isinstance(v, dict)]
        b.table(project, src, skip=drawing_tables)
        for k in drawing_tables:
            if k.lower() == p.name.lower():
                b.table(project[k], f'{project_path or "dxfcheck.toml"} {table_name(project_path, "spec")[:-1]}."{k}"]')
    for name, raw in custom_properties:
        if name.lower().startswith(PROPERTY_PREFIX):
            _put_dotted(b, name[len(PROPERTY_PREFIX) :], raw, f"{p} header property {name}")
    _sidecar(b, p, project_path)
    if given:
        b.table(given, "Python call")
    for key, raw in overrides:
        _put_dotted(b, key, raw, "command line")
    _fill_from_lining(b)
    return b.build()


def _fill_from_lining(b: _Builder) -> None:
    """The values of the spec's ``lining`` that no source of the spec set
    (a default yields), each with the library row's source."""
    chosen = b.values.get("lining")
    if chosen is None:
        return
    own_mu = b.values.get("mu")
    for v in lining_values(str(chosen.value), None if own_mu is None else float(own_mu.value)):
        mine = b.values.get(v.key)
        if mine is None or mine.source.startswith("default"):
            b.values[v.key] = SpecValue(v.key, v.value, v.unit, v.text, f"{v.source} ({LINING_MARK}{chosen.source})")
