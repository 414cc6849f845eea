"""The lining library: friction and limits of brake lining materials, each
row with its source (the package's ``linings.toml``).

``lining = "NAME"`` in the spec fills ``mu``, ``mu_min``, ``mu_max``,
``lining_pressure_max``, ``pv_max``, ``drum_temperature_max`` (the lining's
maximum operating temperature) and ``drum_peak_temperature_max`` (its
maximum temperature) from the row, each value showing the row's source;
a value the spec sets itself wins (:func:`dxfcheck.gate.spec.load_spec`).

References
----------
.. [1] M. J. Neale (ed.), *Tribology Handbook*, 2nd ed., Butterworth-
   Heinemann, 1995, section B8, Table 8.10: dry μ, maximum and maximum
   operating temperatures, working and maximum pressures of brake linings.
   Values the table does not give (the μ range, pV) are common practice
   and marked so in the file.
"""

from __future__ import annotations

import tomllib
from importlib import resources
from typing import Any

from dxfcheck.core.records import record

__all__ = ["LININGS", "LINING_FILE", "MU_SPREAD", "Lining", "LiningValue", "lining_values", "load_linings"]

#: The data file, in this package.
LINING_FILE = "linings.toml"

#: Spread of μ in service either side of the table's value [-]: mu_min =
#: μ·(1 − spread), mu_max = μ·(1 + spread) (common practice, no single source).
MU_SPREAD = 0.15


@record(frozen=True)
class Lining:
    """One lining material (one row of the library).

    Attributes
    ----------
    name : str
        The library's name for it (what ``lining = "NAME"`` takes).
    material : str
        As the source table words it.
    mu : float
        Dry friction coefficient [-].
    temperature_max_C, operating_temperature_max_C : float
        Maximum (short-time) and maximum operating (continuous) temperature [°C].
    working_pressure_MPa : tuple of float
        Working pressure range [MPa].
    pressure_max_MPa : float
        Maximum pressure [MPa].
    pv_max_MPa_m_s : float
        pV limit [MPa·m/s].
    source : str
        Full citation of the row.
    practice : dict
        The values set by common practice rather than by the source
        (``mu_range``, ``pv_max``), each with the rule used.
    """

    name: str
    material: str
    mu: float
    temperature_max_C: float
    operating_temperature_max_C: float
    working_pressure_MPa: tuple[float, float]
    pressure_max_MPa: float
    pv_max_MPa_m_s: float
    source: str
    practice: dict[str, str]

    @property
    def mu_min(self) -> float:
        return self.mu * (1.0 - MU_SPREAD)

    @property
    def mu_max(self) -> float:
        return self.mu * (1.0 + MU_SPREAD)


@record(frozen=True)
class LiningValue:
    """A spec value a lining gives: key, value [internal unit], unit, the
    text shown, and its source."""

    key: str
    value: float
    unit: str
    text: str
    source: str


def _row(name: str, raw: dict[str, Any], sources: dict[str, str], practice: dict[str, str]) -> Lining:
    low, high = (float(x) for x in raw["working_pressure_MPa"])
    return Lining(
        name=name,
        material=str(raw["material"]),
        mu=float(raw["mu"]),
        temperature_max_C=float(raw["temperature_max_C"]),
        operating_temperature_max_C=float(raw["operating_temperature_max_C"]),
        working_pressure_MPa=(low, high),
        pressure_max_MPa=float(raw["pressure_max_MPa"]),
        pv_max_MPa_m_s=float(raw["pv_max_MPa_m_s"]),
        source=sources[raw["source"]],
        practice={str(k): practice[k] for k in raw.get("practice", ())},
    )


def load_linings() -> dict[str, Lining]:
    """Every row of the package's lining file, by name.

    Raises
    ------
    KeyError
        When a row lacks a field or names a source the file does not list
        (a damaged installation; the tests read every row).
    """
    text = resources.files("dxfcheck.gate").joinpath(LINING_FILE).read_text(encoding="utf-8")
    data = tomllib.loads(text)
    sources = {str(k): str(v) for k, v in data["sources"].items()}
    practice = {str(k): str(v) for k, v in data["practice"].items()}
    return {name: _row(name, raw, sources, practice) for name, raw in data["linings"].items()}


#: The library, read once.
LININGS: dict[str, Lining] = load_linings()


def lining_values(name: str, mu: float | None = None) -> list[LiningValue]:
    """The spec values lining ``name`` gives, each with its source.

    ``mu``, when the spec sets its own nominal μ, centres the range
    ``mu_min``, ``mu_max`` on it instead of on the table's μ.
    """
    ln = LININGS[name]
    table = f"lining {name} ({ln.material}): {ln.source}"
    mu_src = f"lining {name}: {ln.practice['mu_range']}" if "mu_range" in ln.practice else table
    pv_src = f"lining {name}: {ln.practice['pv_max']}" if "pv_max" in ln.practice else table
    low, high = ln.mu_min, ln.mu_max
    if mu is not None:
        low, high = mu * (1.0 - MU_SPREAD), mu * (1.0 + MU_SPREAD)
        mu_src = f"lining {name}: ±{MU_SPREAD:.0%} of the spec's own mu (common practice, no single source)"
    return [
        LiningValue("mu", ln.mu, "", f"{ln.mu:g}", table),
        LiningValue("mu_min", low, "", f"{low:.4g}", mu_src),
        LiningValue("mu_max", high, "", f"{high:.4g}", mu_src),
        LiningValue("lining_pressure_max", ln.pressure_max_MPa, "MPa", f"{ln.pressure_max_MPa:g} MPa", table),
        LiningValue("pv_max", ln.pv_max_MPa_m_s, "MPa*m/s", f"{ln.pv_max_MPa_m_s:g} MPa*m/s", pv_src),
        LiningValue(
            "drum_temperature_max",
            ln.operating_temperature_max_C,
            "°C",
            f"{ln.operating_temperature_max_C:g} °C (maximum operating temperature)",
            table,
        ),
        LiningValue(
            "drum_peak_temperature_max",
            ln.temperature_max_C,
            "°C",
            f"{ln.temperature_max_C:g} °C (maximum temperature)",
            table,
        ),
    ]
