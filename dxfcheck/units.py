"""Units: drawing units from the DXF header and quantities written as text.

Inside dxfcheck every length is in [mm], every force in [N], every torque in
[N·m], pressure and stress in [MPa] (= N/mm²), speed in [rpm], power in [W].
Conversion factors are exact by definition (the international inch is
25.4 mm; the pound-force is 4.448 221 615 260 5 N; the kilogram-force is
9.806 65 N), so they are written out here rather than taken from ezdxf,
whose factors carry a rounding error in the 12th figure.

References
----------
.. [1] NIST Special Publication 811 (2008 ed.), "Guide for the Use of the
   International System of Units", Appendix B.8 (conversion factors).
.. [2] Autodesk, DXF Reference, HEADER section: ``$INSUNITS`` and
   ``$MEASUREMENT``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

__all__ = [
    "FORCE_N",
    "INSUNITS_MM",
    "LENGTH_MM",
    "Quantity",
    "UnitError",
    "length_unit_factor",
    "parse_quantity",
]

INCH_MM = 25.4
LBF_N = 4.4482216152605
KGF_N = 9.80665

#: Length units by name -> [mm].
LENGTH_MM: dict[str, float] = {
    "mm": 1.0,
    "cm": 10.0,
    "dm": 100.0,
    "m": 1000.0,
    "km": 1.0e6,
    "um": 1.0e-3,
    "micron": 1.0e-3,
    "in": INCH_MM,
    "inch": INCH_MM,
    '"': INCH_MM,
    "ft": 12 * INCH_MM,
    "foot": 12 * INCH_MM,
    "feet": 12 * INCH_MM,
    "yd": 36 * INCH_MM,
    "mil": INCH_MM / 1000,
}

#: ``$INSUNITS`` codes -> (name, [mm]).  DXF Reference, HEADER, $INSUNITS.
INSUNITS_MM: dict[int, tuple[str, float]] = {
    1: ("inch", INCH_MM),
    2: ("foot", 12 * INCH_MM),
    3: ("mile", 63360 * INCH_MM),
    4: ("mm", 1.0),
    5: ("cm", 10.0),
    6: ("m", 1000.0),
    7: ("km", 1.0e6),
    8: ("microinch", INCH_MM * 1e-6),
    9: ("mil", INCH_MM * 1e-3),
    10: ("yard", 36 * INCH_MM),
    11: ("angstrom", 1.0e-7),
    12: ("nm", 1.0e-6),
    13: ("micron", 1.0e-3),
    14: ("dm", 100.0),
    15: ("dam", 1.0e4),
    16: ("hm", 1.0e5),
    17: ("Gm", 1.0e12),
    18: ("au", 1.495978707e14),
    19: ("light year", 9.4607304725808e18),
    20: ("parsec", 3.0856775814913673e19),
    21: ("US survey foot", 1200.0 / 3937.0 * 1000.0),
    22: ("US survey inch", 100.0 / 3937.0 * 1000.0),
    23: ("US survey yard", 3600.0 / 3937.0 * 1000.0),
    24: ("US survey mile", 6336000.0 / 3937.0 * 1000.0),
}

#: Force units -> [N].
FORCE_N: dict[str, float] = {
    "n": 1.0,
    "kn": 1.0e3,
    "mn": 1.0e6,
    "dan": 10.0,
    "lbf": LBF_N,
    "lb": LBF_N,
    "kip": 1000 * LBF_N,
    "kgf": KGF_N,
    "kp": KGF_N,
    "tf": 1000 * KGF_N,
}

#: Torque units -> [N·m].
TORQUE_NM: dict[str, float] = {
    "n*m": 1.0,
    "nm": 1.0,
    "kn*m": 1.0e3,
    "knm": 1.0e3,
    "n*mm": 1.0e-3,
    "nmm": 1.0e-3,
    "lbf*ft": LBF_N * 12 * INCH_MM / 1000,
    "lbf*in": LBF_N * INCH_MM / 1000,
    "lb*ft": LBF_N * 12 * INCH_MM / 1000,
    "lb*in": LBF_N * INCH_MM / 1000,
    "kgf*m": KGF_N,
}

#: Pressure and stress units -> [MPa].
PRESSURE_MPA: dict[str, float] = {
    "pa": 1.0e-6,
    "kpa": 1.0e-3,
    "mpa": 1.0,
    "gpa": 1.0e3,
    "n/mm2": 1.0,
    "n/mm^2": 1.0,
    "bar": 0.1,
    "psi": LBF_N / INCH_MM**2,
    "ksi": 1000 * LBF_N / INCH_MM**2,
}

#: Rotational speed -> [rpm].
SPEED_RPM: dict[str, float] = {"rpm": 1.0, "1/min": 1.0, "rps": 60.0, "rad/s": 60 / (2 * math.pi)}

#: Power -> [W].
POWER_W: dict[str, float] = {"w": 1.0, "kw": 1.0e3, "mw": 1.0e6, "hp": 745.69987158227022}

#: Area -> [mm²].
AREA_MM2: dict[str, float] = {
    "mm2": 1.0,
    "mm^2": 1.0,
    "cm2": 100.0,
    "cm^2": 100.0,
    "in2": INCH_MM**2,
    "in^2": INCH_MM**2,
}

#: pV (pressure × rubbing speed) -> [MPa·m/s].
PV_MPA_M_S: dict[str, float] = {"mpa*m/s": 1.0, "n/mm2*m/s": 1.0, "psi*ft/min": LBF_N / INCH_MM**2 * 0.3048 / 60}

#: Dimension name -> (table, internal unit name).
DIMENSIONS: dict[str, tuple[dict[str, float], str]] = {
    "length": ({k.lower(): v for k, v in LENGTH_MM.items()}, "mm"),
    "force": (FORCE_N, "N"),
    "torque": (TORQUE_NM, "N*m"),
    "pressure": (PRESSURE_MPA, "MPa"),
    "speed": (SPEED_RPM, "rpm"),
    "power": (POWER_W, "W"),
    "area": (AREA_MM2, "mm2"),
    "pv": (PV_MPA_M_S, "MPa*m/s"),
}

_NUMBER = r"[-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?"
_QUANTITY = re.compile(rf"^\s*(?P<num>{_NUMBER})\s*(?P<unit>[^\s\d].*?)?\s*$")


class UnitError(ValueError):
    """A text could not be read as a quantity of the expected dimension."""


@dataclass(frozen=True)
class Quantity:
    """A value converted to dxfcheck's internal unit of its dimension.

    Attributes
    ----------
    value : float
        The value in the internal unit (``unit``).
    unit : str
        The internal unit: ``mm``, ``N``, ``N*m``, ``MPa``, ``rpm``, ``W``...
    text : str
        The text it was read from.
    """

    value: float
    unit: str
    text: str


def _normalise_unit(unit: str) -> str:
    u = unit.strip().lower().replace("·", "*").replace("⋅", "*").replace(" ", "")
    u = u.replace("²", "2").replace("**", "^")
    return u


def length_unit_factor(name: str) -> float:
    """Return the size of the length unit ``name`` in [mm].

    Raises
    ------
    UnitError
        When the name is not a known length unit.
    """
    key = _normalise_unit(name)
    table = DIMENSIONS["length"][0]
    if key in ("millimeter", "millimetre"):
        key = "mm"
    elif key in ("meter", "metre"):
        key = "m"
    elif key in ("centimeter", "centimetre"):
        key = "cm"
    elif key in ("inches",):
        key = "inch"
    if key not in table:
        known = ", ".join(sorted(k for k in LENGTH_MM if k.isalpha()))
        raise UnitError(f"unknown length unit {name!r} (known: {known})")
    return table[key]


def parse_quantity(text: str, dimension: str, *, default_unit: str | None = None) -> Quantity:
    """Read a number with a unit, e.g. ``"1.2 kN"`` or ``"450 N*m"``.

    Parameters
    ----------
    text : str
        The text.  A decimal comma is accepted (``"1,2 kN"``).
    dimension : str
        One of ``length``, ``force``, ``torque``, ``pressure``, ``speed``,
        ``power``, ``area``, ``pv``.
    default_unit : str, optional
        Unit assumed when the text has none; without it a bare number is an
        error.

    Returns
    -------
    Quantity
        The value in the internal unit of the dimension.

    Raises
    ------
    UnitError
        When the text is not a number, has no unit and no default is given,
        or its unit belongs to another dimension.
    """
    table, internal = DIMENSIONS[dimension]
    m = _QUANTITY.match(text)
    if m is None:
        raise UnitError(f"{text!r} is not a number with a unit")
    num = float(m.group("num").replace(",", "."))
    unit = m.group("unit")
    if not unit:
        if default_unit is None:
            raise UnitError(f"{text!r} has no unit; write e.g. '{text.strip()} {internal}'")
        unit = default_unit
    key = _normalise_unit(unit)
    if key not in table:
        known = ", ".join(sorted(table))
        raise UnitError(f"{text!r}: {unit!r} is not a {dimension} unit (known: {known})")
    value = num * table[key]
    if not math.isfinite(value):
        raise UnitError(f"{text!r} is not a finite number")
    return Quantity(value=value, unit=internal, text=text.strip())
