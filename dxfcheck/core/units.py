"""Units: drawing units from the DXF header and quantities written as text.

Inside dxfcheck every length is in [mm], every force in [N], every torque in
[N·m], pressure and stress in [MPa] (= N/mm²), speed in [rpm], power in [W];
the duty and heat quantities in SI: mass [kg], energy [J], linear speed
[m/s], acceleration [m/s²], time [s], mass moment of inertia [kg·m²],
temperature [°C] (Celsius only: kelvin and Fahrenheit need an offset, which a
factor cannot carry), specific heat [J/(kg·K)] and heat-transfer coefficient
[W/(m²·K)].
Conversion factors are exact by definition (the international inch is
25.4 mm; the pound-force is 4.448 221 615 260 5 N; the kilogram-force is
9.806 65 N), so they are written out here rather than taken from ezdxf,
whose factors carry a rounding error in the 12th figure.

Numbers are always read here (decimal and thousands marks, words around the
number).  A unit the tables do not list, such as a compound ``daN*m``,
``ft*lbf``, ``kgf/cm^2`` or ``MPa*ft/min``, is read by pint [3]_ where it is
installed (the ``units`` extra): only the unit's text goes to pint, which
is imported on the first such text, and its answer must have the dimension
asked for (:func:`pint_factor`).  pint does not read the numbers: it takes
``1 200 N`` for 200 N, ``1,5 kN`` for 15 kN and ``1.200,5 N`` for 1.2005 N
(``tests/benchmarks/bench_units.py``).

References
----------
.. [1] NIST Special Publication 811 (2008 ed.), "Guide for the Use of the
   International System of Units", Appendix B.8 (conversion factors).
.. [2] Autodesk, DXF Reference, HEADER section: ``$INSUNITS`` and
   ``$MEASUREMENT``.
.. [3] pint, a Python package to define, operate and manipulate physical
   quantities (https://pint.readthedocs.io), its default unit definitions.
"""

from __future__ import annotations

import functools
import math
import re
from typing import Any

from dxfcheck.core.records import record

__all__ = [
    "FORCE_N",
    "INSUNITS_MM",
    "LENGTH_MM",
    "PINT_UNITS",
    "SPACES",
    "AmbiguousTextError",
    "Quantity",
    "UnitError",
    "length_unit_factor",
    "parse_quantity",
    "pint_factor",
    "quantity_in_text",
]

INCH_MM = 25.4
LBF_N = 4.4482216152605
KGF_N = 9.80665
#: The avoirdupois pound [kg] (exact by definition; NIST SP 811, B.8).
LB_KG = 0.45359237
#: The international table British thermal unit [J] (exact by definition; NIST SP 811, B.8).
BTU_J = 1055.05585262
#: Size of a degree Fahrenheit as a temperature difference [K] (exact).
DEG_F_K = 5.0 / 9.0

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

#: Spring rate (force per length) -> [N/mm] (issue 19: spring_rate).
STIFFNESS_N_PER_MM: dict[str, float] = {
    "n/mm": 1.0,
    "n/m": 1.0e-3,
    "kn/m": 1.0,
    "kn/mm": 1.0e3,
    "n/cm": 0.1,
    "lbf/in": LBF_N / INCH_MM,
    "lb/in": LBF_N / INCH_MM,
}

#: Section modulus (a length cubed) -> [mm³] (issue 19: part_section_modulus).
SECTION_MODULUS_MM3: dict[str, float] = {
    "mm3": 1.0,
    "mm^3": 1.0,
    "cm3": 1.0e3,
    "cm^3": 1.0e3,
    "in3": INCH_MM**3,
    "in^3": INCH_MM**3,
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
    "dm2": 1.0e4,
    "dm^2": 1.0e4,
    "m2": 1.0e6,
    "m^2": 1.0e6,
    "ft2": (12 * INCH_MM) ** 2,
    "ft^2": (12 * INCH_MM) ** 2,
}

#: pV (pressure × rubbing speed) -> [MPa·m/s].
PV_MPA_M_S: dict[str, float] = {"mpa*m/s": 1.0, "n/mm2*m/s": 1.0, "psi*ft/min": LBF_N / INCH_MM**2 * 0.3048 / 60}

#: Mass -> [kg].
MASS_KG: dict[str, float] = {"kg": 1.0, "g": 1.0e-3, "t": 1.0e3, "lb": LB_KG, "lbm": LB_KG}

#: Energy -> [J].
ENERGY_J: dict[str, float] = {"j": 1.0, "kj": 1.0e3, "wh": 3600.0, "kwh": 3.6e6, "btu": BTU_J}

#: Linear speed -> [m/s].
VELOCITY_M_S: dict[str, float] = {
    "m/s": 1.0,
    "m/min": 1.0 / 60.0,
    "km/h": 1.0 / 3.6,
    "ft/s": 12 * INCH_MM / 1000,
    "ft/min": 12 * INCH_MM / 1000 / 60,
}

#: Linear acceleration -> [m/s²].
ACCELERATION_M_S2: dict[str, float] = {
    "m/s2": 1.0,
    "m/s^2": 1.0,
    "ft/s2": 12 * INCH_MM / 1000,
    "ft/s^2": 12 * INCH_MM / 1000,
}

#: Time -> [s].
TIME_S: dict[str, float] = {"s": 1.0, "ms": 1.0e-3, "min": 60.0, "h": 3600.0}

#: Mass moment of inertia -> [kg·m²].
INERTIA_KG_M2: dict[str, float] = {
    "kg*m2": 1.0,
    "kg*m^2": 1.0,
    "kgm2": 1.0,
    "kg*cm2": 1.0e-4,
    "kg*cm^2": 1.0e-4,
    "kg*mm2": 1.0e-6,
    "kg*mm^2": 1.0e-6,
    "lb*ft2": LB_KG * (12 * INCH_MM / 1000) ** 2,
    "lb*ft^2": LB_KG * (12 * INCH_MM / 1000) ** 2,
}

#: Temperature (Celsius only) -> [°C].
TEMPERATURE_C: dict[str, float] = {"°c": 1.0, "degc": 1.0, "c": 1.0, "℃": 1.0}

#: Specific heat capacity -> [J/(kg·K)] (a kelvin and a degree Celsius are the same difference).
SPECIFIC_HEAT_J_KG_K: dict[str, float] = {
    "j/(kg*k)": 1.0,
    "j/(kg*°c)": 1.0,
    "j/(kg*degc)": 1.0,
    "j/kg/k": 1.0,
    "j/(kgk)": 1.0,
    "kj/(kg*k)": 1.0e3,
    "kj/(kg*°c)": 1.0e3,
    "btu/(lb*°f)": BTU_J / LB_KG / DEG_F_K,
    "btu/(lbm*°f)": BTU_J / LB_KG / DEG_F_K,
}

#: Heat-transfer coefficient -> [W/(m²·K)].
HEAT_TRANSFER_W_M2_K: dict[str, float] = {
    "w/(m2*k)": 1.0,
    "w/(m^2*k)": 1.0,
    "w/(m2*°c)": 1.0,
    "w/(m^2*°c)": 1.0,
    "w/m2/k": 1.0,
    "btu/(h*ft2*°f)": BTU_J / 3600.0 / (12 * INCH_MM / 1000) ** 2 / DEG_F_K,
    "btu/(h*ft^2*°f)": BTU_J / 3600.0 / (12 * INCH_MM / 1000) ** 2 / DEG_F_K,
}

#: Dimension name -> (table, internal unit name).
DIMENSIONS: dict[str, tuple[dict[str, float], str]] = {
    "length": ({k.lower(): v for k, v in LENGTH_MM.items()}, "mm"),
    "force": (FORCE_N, "N"),
    "stiffness": (STIFFNESS_N_PER_MM, "N/mm"),
    "section_modulus": (SECTION_MODULUS_MM3, "mm3"),
    "torque": (TORQUE_NM, "N*m"),
    "pressure": (PRESSURE_MPA, "MPa"),
    "speed": (SPEED_RPM, "rpm"),
    "power": (POWER_W, "W"),
    "area": (AREA_MM2, "mm2"),
    "pv": (PV_MPA_M_S, "MPa*m/s"),
    "mass": (MASS_KG, "kg"),
    "energy": (ENERGY_J, "J"),
    "velocity": (VELOCITY_M_S, "m/s"),
    "acceleration": (ACCELERATION_M_S2, "m/s2"),
    "time": (TIME_S, "s"),
    "inertia": (INERTIA_KG_M2, "kg*m2"),
    "temperature": (TEMPERATURE_C, "°C"),
    "specific_heat": (SPECIFIC_HEAT_J_KG_K, "J/(kg*K)"),
    "heat_transfer": (HEAT_TRANSFER_W_M2_K, "W/(m2*K)"),
}

#: Dimensions whose units pint may read where the tables lack them, with the
#: internal unit as pint writes it.  Not speed: pint's revolution is 2π
#: radians and a frequency has the same dimension, so ``Hz`` would pass.
PINT_UNITS: dict[str, str] = {
    "length": "mm",
    "force": "N",
    "torque": "N*m",
    "pressure": "MPa",
    "power": "W",
    "area": "mm**2",
    "pv": "MPa*m/s",
}
#: What a unit given to pint may look like: names joined by ``*``, ``/``,
#: ``·`` or a space, each with an exponent 2 or 3 (``cm^2``, ``cm2``, ``cm²``).
#: Nothing else reaches pint (no brackets, numbers or ``**``, which its
#: parser answers with assorted exceptions).
_PINT_TEXT = re.compile(r"^[A-Za-zµ]+(?:\^?[23²³])?(?:\s*[*/·⋅ ]\s*[A-Za-zµ]+(?:\^?[23²³])?)*$")
#: A word after a number in a drawing's text is given to pint only if it is
#: compound (a plain word is a name, ``12 coils``).
_COMPOUND = re.compile(r"[*/·⋅^]")

#: Spaces that may group a number's digits in threes: space, no-break space,
#: thin space, narrow no-break space, figure space.
SPACES = " \u00a0\u2009\u202f\u2007"
_SP = f"[{SPACES}]"
_MANTISSA = (
    rf"\d{{1,3}}(?:{_SP}\d{{3}})+(?!\d)(?:[.,]\d+)?"  # 1 200, 1 200,5: spaces group, the mark is decimal
    r"|\d{1,3}(?:,\d{3})+\.\d+"  # 1,200.5: both marks, the last one is decimal
    r"|\d{1,3}(?:\.\d{3})+,\d+"  # 1.200,5
    r"|\d{1,3}(?:,\d{3}){2,}(?![\d.,])"  # 1,200,000: a mark twice is no decimal mark
    r"|\d{1,3}(?:\.\d{3}){2,}(?![\d.,])"  # 1.200.000
    r"|\d+(?:[.,]\d*)?|[.,]\d+"  # one mark or none
)
_NUMBER = rf"(?P<sign>[-+\u2212])?(?P<mant>{_MANTISSA})(?P<exp>[eE][-+]?\d+)?"
_QUANTITY = re.compile(rf"^\s*{_NUMBER}\s*(?P<unit>[^\s\d].*?)?\s*$")
#: A single mark with one to three digits before it (not a lone 0) and
#: exactly three after it: a decimal mark or a thousands mark.
_AMBIGUOUS = re.compile(r"^(?P<int>[1-9]\d{0,2})(?P<mark>[.,])(?P<frac>\d{3})$")
#: In a text with words around: a number not glued to a word before it
#: (``F1``, ``M12`` are names), then perhaps the word after it.
_UNIT_CHARS = r"[^\s\d()\[\]{},;:=\-\u2013×*]"
_IN_TEXT = re.compile(rf"(?<![\w.,]){_NUMBER}(?:[{SPACES}]*(?P<unit>{_UNIT_CHARS}[^\s()\[\]{{}},;:=\-\u2013]*))?")
#: A character written as a DXF escape, ``\\U+2009`` (how DXF R2000 and older
#: files carry characters outside their code page).
_DXF_ESCAPE = re.compile(r"\\[Uu]\+([0-9A-Fa-f]{4})")
#: Words after a number that make it a factor or a range start (``2 x 600 N``,
#: ``1.2 to 1.5 kN``): the text does not say one force.
_FACTOR_WORDS = {"x", "×", "*", "to", "bis", "..."}


class UnitError(ValueError):
    """A text could not be read as a quantity of the expected dimension."""


class AmbiguousTextError(UnitError):
    """A text that could be read two ways: a number such as ``1,200`` (a
    decimal or a thousands mark), or a text holding more than one value."""


@record(frozen=True)
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


@functools.cache
def _registry() -> Any:
    """pint's default registry, built on the first text that needs it.

    Raises
    ------
    ImportError
        When pint is not installed.
    """
    import pint

    return pint.UnitRegistry()


def _pint_spelling(unit: str) -> str:
    """``kgf/cm²`` -> ``kgf/cm^2``; ``N·m`` -> ``N*m``; ``cm2`` -> ``cm^2``."""
    u = unit.strip().replace("·", "*").replace("⋅", "*").replace("²", "^2").replace("³", "^3")
    return re.sub(r"(?<=[A-Za-zµ])([23])\b", r"^\1", u)


def pint_factor(unit: str, dimension: str) -> float | None:
    """The size of ``unit`` in the internal unit of ``dimension``, read by
    pint; None where pint cannot say (not installed, a dimension it does not
    read for us, or a text that is not a unit expression).

    Raises
    ------
    UnitError
        When pint reads the unit as another dimension, does not know a name
        in it, or (for a torque) reads an energy unit such as ``J``.
    """
    target = PINT_UNITS.get(dimension)
    if target is None or not _PINT_TEXT.match(unit.strip()):
        return None
    try:
        ureg = _registry()
    except ImportError:
        return None
    import pint

    try:
        units = ureg.parse_units(_pint_spelling(unit))
        if dimension == "torque" and any(
            ureg.get_dimensionality(n) == ureg.get_dimensionality("J") for n in units._units
        ):
            raise UnitError(f"{unit!r} is an energy unit, not a torque; write e.g. 'N*m'")
        factor = float(ureg.Quantity(1.0, units).to(target).magnitude)
    except pint.errors.DimensionalityError:
        hint = " (pint reads lb as a mass: write lbf)" if re.search(r"\blb\b", unit) else ""
        raise UnitError(f"{unit!r} is not a {dimension} unit{hint}") from None
    except pint.errors.PintError as exc:
        raise UnitError(f"{unit!r} is not a unit pint knows ({exc})") from None
    return factor


def _pint_missing(dimension: str) -> bool:
    """Whether pint would read ``dimension``'s compound units but is not installed."""
    import importlib.util

    return dimension in PINT_UNITS and importlib.util.find_spec("pint") is None


def _factor(unit: str, dimension: str) -> float | None:
    """The size of ``unit`` in the internal unit of ``dimension``: from the
    tables, else from pint (:func:`pint_factor`); None when neither knows it.

    Raises
    ------
    UnitError
        From :func:`pint_factor`.
    """
    table = DIMENSIONS[dimension][0]
    key = _normalise_unit(unit)
    if key in table:
        return table[key]
    return pint_factor(unit, dimension)


#: A milli prefix before an upper-case unit symbol (``mN``, ``mPa``, ``mW``):
#: the tables are read without regard to case, where it would be mega.
_MILLI_SYMBOL = re.compile(r"^m[A-Z]")


def _normalise_unit(unit: str) -> str:
    """The unit as the tables spell it (lower case, ``*`` for products).

    Raises
    ------
    UnitError
        For a milli unit written with its case (``mN``, ``mPa``): read
        without case it would be the mega unit, 10⁹ times larger, so it is
        refused rather than guessed.
    """
    written = unit.strip()
    if _MILLI_SYMBOL.match(written) and any(written[1:].lower() in t for t, _ in DIMENSIONS.values()):
        raise UnitError(
            f"{written!r} is milli-{written[1:]}, which dxfcheck does not read (brakes are not built in them); "
            f"write the value in {written[1:]}, or 'M{written[1:]}' if mega was meant"
        )
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


def _unescape(text: str) -> str:
    """Decode DXF ``\\U+XXXX`` escapes: ``"1\\U+2009200 N"`` is 1, a thin
    space, 200 N."""
    return _DXF_ESCAPE.sub(lambda m: chr(int(m[1], 16)), text)


def _decimal_hint(int_part: str, mark: str, frac: str) -> str:
    """How to write the decimal reading of ``int_part mark frac`` unambiguously:
    trailing zeros dropped (``1,200`` -> ``1,2``), or a zero added when all
    three digits count (``1,234`` -> ``1,2340``)."""
    short = frac.rstrip("0")
    if not short:
        return int_part
    return f"{int_part}{mark}{short}" if len(short) < 3 else f"{int_part}{mark}{frac}0"


def _ambiguous(text: str, mant: str) -> AmbiguousTextError | None:
    """The error for a number whose single mark may be a decimal or a
    thousands mark, or None."""
    m = _AMBIGUOUS.match(mant)
    if m is None:
        return None
    dec = _decimal_hint(m["int"], m["mark"], m["frac"])
    thou = m["int"] + m["frac"]
    mark = "comma" if m["mark"] == "," else "point"
    as_dec, as_thou = (text.strip().replace(mant, alt, 1) for alt in (dec, thou))
    return AmbiguousTextError(
        f"{text.strip()!r} is ambiguous: in {mant!r} the {mark} may be a decimal mark ({dec}) or a "
        f"thousands mark ({thou}); write {as_dec!r} or {as_thou!r} (a space may group thousands: "
        f"{m['int']} {m['frac']})"
    )


def _number(text: str, sign: str | None, mant: str, exp: str | None) -> float:
    """The value of a number matched by ``_NUMBER``.

    Spaces group thousands (the mark left is decimal); with both a comma and
    a point the last one is the decimal mark; a mark that appears twice
    groups thousands; a single mark is decimal unless it has one to three
    digits (not a lone 0) before it and exactly three after it, which is
    refused as ambiguous.
    """
    if any(c in SPACES for c in mant):
        digits = "".join(c for c in mant if c not in SPACES).replace(",", ".")
    elif "," in mant and "." in mant:
        thousands = "," if mant.rindex(".") > mant.rindex(",") else "."
        digits = mant.replace(thousands, "").replace(",", ".")
    elif mant.count(",") > 1 or mant.count(".") > 1:
        digits = mant.replace(",", "").replace(".", "")
    else:
        err = _ambiguous(text, mant)
        if err is not None:
            raise err
        digits = mant.replace(",", ".")
    value = float(digits + (exp or ""))
    return -value if sign in ("-", "\u2212") else value


def parse_quantity(text: str, dimension: str, *, default_unit: str | None = None) -> Quantity:
    """Read a number with a unit, e.g. ``"1.2 kN"`` or ``"450 N*m"``.

    Parameters
    ----------
    text : str
        The text: the number and its unit only.  A decimal comma is accepted
        (``"1,2 kN"``), spaces may group thousands (``"1 200 N"``), and so may
        commas or points when the other mark is the decimal one
        (``"1,200.5 N"``, ``"1.200,5 N"``) or when they appear more than once
        (``"1,200,000 N"``).  A single comma or point with one to three
        digits before it (not a lone 0) and exactly three after it
        (``"1,200 N"``, ``"1.200 N"``) is refused as ambiguous;
        ``"0,250 kN"`` is a decimal.
    dimension : str
        One of ``length``, ``force``, ``torque``, ``pressure``, ``speed``,
        ``power``, ``area``, ``pv``, ``mass``, ``energy``, ``velocity``,
        ``acceleration``, ``time``, ``inertia``, ``temperature``,
        ``specific_heat``, ``heat_transfer``.
    default_unit : str, optional
        Unit assumed when the text has none; without it a bare number is an
        error.

    Returns
    -------
    Quantity
        The value in the internal unit of the dimension.

    Raises
    ------
    AmbiguousTextError
        When the number could be read two ways (see ``text``).
    UnitError
        When the text is not a number, has no unit and no default is given,
        or its unit belongs to another dimension.
    """
    table, internal = DIMENSIONS[dimension]
    text = _unescape(text)
    m = _QUANTITY.match(text)
    if m is None:
        raise UnitError(f"{text!r} is not a number with a unit")
    num = _number(text, m["sign"], m["mant"], m["exp"])
    unit = m.group("unit")
    if not unit:
        if default_unit is None:
            raise UnitError(f"{text!r} has no unit; write e.g. '{text.strip()} {internal}'")
        unit = default_unit
    try:
        factor = _factor(unit, dimension)
    except UnitError as exc:
        raise UnitError(f"{text!r}: {exc}") from None
    if factor is None:
        known = ", ".join(sorted(table))
        more = "; compound units such as daN*m need pint (extra 'units')" if _pint_missing(dimension) else ""
        raise UnitError(f"{text!r}: {unit!r} is not a {dimension} unit (known: {known}{more})")
    value = num * factor
    if not math.isfinite(value):
        raise UnitError(f"{text!r} is not a finite number")
    return Quantity(value=value, unit=internal, text=text.strip())


def _unit_of(word: str | None) -> str | None:
    """The dimension whose unit ``word`` is, ``"factor"`` for a multiplier
    or range word, ``"word"`` for any other word, None for no word."""
    if not word:
        return None
    if word.lower() in _FACTOR_WORDS or (word[0] in "xX×*" and word[1:2].isdigit()):
        return "factor"
    key = _normalise_unit(word)
    for name, (table, _) in DIMENSIONS.items():
        if key in table:
            return name
    return "word"


def quantity_in_text(text: str, dimension: str, *, glued: str = "") -> Quantity:
    """Read the one quantity of ``dimension`` in a short text with words
    around it: ``"F=1.2kN"``, ``"1.2 kN (set)"``, ``"PRELOAD 1.2 kN"``.

    Numbers are read as by :func:`parse_quantity`; a number glued to a word
    before it (``F1``, ``M12``) is part of a name and not read.  Numbers with
    units of other dimensions (``250 mm``) or followed by another word
    (``12 coils``) are passed over.

    Parameters
    ----------
    text : str
        The text.
    dimension : str
        As for :func:`parse_quantity`.
    glued : str, optional
        Letters that may follow a unit without a space and are not part of
        it (a spring's sense letter: ``"1.2kNT"`` with ``glued="CTct"``).

    Returns
    -------
    Quantity
        The value in the internal unit; its ``text`` is the quantity as
        written (``"1.2kN"``).

    Raises
    ------
    AmbiguousTextError
        When a number could be read two ways (``1,200``), the text holds two
        different quantities of the dimension, or a number without a unit, a
        factor or a range start besides the quantity (``2 x 600 N``,
        ``1.2-1.5 kN``): the text does not say one value.
    UnitError
        When the text holds no quantity of the dimension.
    """
    text = _unescape(text)
    found, loose = _quantities_in_text(text, dimension, glued)
    return _the_one_quantity(text, dimension, found, loose)


def _quantities_in_text(text: str, dimension: str, glued: str) -> tuple[list[Quantity], list[str]]:
    """Every number in ``text``: the quantities of ``dimension`` (value in
    the internal unit, text as written) and, as written, the loose ones (no
    unit, or a factor).  Numbers with units of other dimensions or followed
    by another word are left out."""
    table, internal = DIMENSIONS[dimension]
    found: list[Quantity] = []
    loose: list[str] = []
    for m in _IN_TEXT.finditer(text):
        num = _number(text, m["sign"], m["mant"], m["exp"])
        word = (m["unit"] or "").rstrip(".")
        if glued and len(word) > 1 and word[-1] in glued and _unit_of(word[:-1]) == dimension:
            word = word[:-1]
        kind = _unit_of(word)
        factor = table.get(_normalise_unit(word)) if kind == dimension else _compound_factor(word, dimension, kind)
        if factor is not None:
            value = num * factor
            if not math.isfinite(value):
                raise UnitError(f"{text.strip()!r}: {m[0].strip()!r} is not a finite number")
            written = text[m.start() : m.end() - len(m["unit"]) + len(word)]
            found.append(Quantity(value=value, unit=internal, text=written.strip()))
        elif kind in (None, "factor"):
            loose.append(m[0].strip())
    return found, loose


def _compound_factor(word: str, dimension: str, kind: str | None) -> float | None:
    """A compound unit after a number in a text (``45 daN*m``) read by pint,
    or None (a plain word, another dimension, no pint)."""
    if kind != "word" or not _COMPOUND.search(word):
        return None
    try:
        return pint_factor(word, dimension)
    except UnitError:
        return None  # another dimension's unit: passed over, as the tables' are


def _the_one_quantity(text: str, dimension: str, found: list[Quantity], loose: list[str]) -> Quantity:
    """The quantity ``text`` says, from what :func:`_quantities_in_text`
    found: exactly one value of ``dimension`` and no loose number, else
    :class:`AmbiguousTextError` or :class:`UnitError` naming what is there."""
    internal = DIMENSIONS[dimension][1]
    example = "1.2 kN" if dimension == "force" else f"1.2 {internal}"
    values = list(dict.fromkeys(q.value for q in found))
    if len(values) > 1:
        raise AmbiguousTextError(
            f"{text.strip()!r} holds {len(found)} different {dimension}s "
            f"({', '.join(repr(q.text) for q in found)}); write only the one that applies"
        )
    if found and loose:
        raise AmbiguousTextError(
            f"{text.strip()!r} holds {', '.join(repr(w) for w in loose)} besides the {dimension} "
            f"{found[0].text!r} (a factor, a range or a number without a unit); write the one value "
            f"that applies, e.g. {example!r}"
        )
    if not found:
        raise UnitError(f"{text.strip()!r} holds no {dimension}: write a number with its unit, e.g. {example!r}")
    return found[0]
