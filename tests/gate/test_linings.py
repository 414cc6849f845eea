"""The lining library: its rows against the published table they cite, the
spec values a ``lining`` fills (each with its source, each overridable),
and ``dxfcheck linings``.

Source of the rows: M. J. Neale (ed.), *Tribology Handbook*, 2nd ed.,
Butterworth-Heinemann, 1995, section B8, Table 8.10 (dry μ; maximum and
maximum operating temperature; working and maximum pressure), as collected in
the project's shared reference notes [seen].  The μ range (±15 %) and the pV
limit (2 MPa·m/s, intermittent duty) are common practice, not from the table.
"""

from __future__ import annotations

import subprocess
import sys
import tomllib
from pathlib import Path

import pytest
from common import block_brake
from schema_check import output_json

from dxfcheck.core.errors import ConfigError
from dxfcheck.gate.linings import LININGS, MU_SPREAD
from dxfcheck.gate.spec import load_spec
from dxfcheck.pipeline import check

# Tribology Handbook, Table 8.10: material -> (μ, max °C, max operating °C, working p MPa, max p MPa).
TABLE_8_10 = {
    "woven cotton": (0.50, 150, 100, (0.07, 0.7), 1.5),
    "non-asbestos, flexible": (0.38, 350, 175, (0.07, 0.7), 2.1),
    "non-asbestos, semi-flexible": (0.35, 400, 200, (0.07, 0.7), 2.8),
    "non-asbestos, rigid": (0.35, 500, 225, (0.07, 0.7), 3.8),
    "resin pad": (0.32, 650, 300, (0.35, 1.75), 5.5),
    "sintered pad": (0.30, 650, 300, (0.35, 3.5), 5.5),
}


def test_rows_match_the_table_they_cite():
    by_material = {ln.material: ln for ln in LININGS.values()}
    assert set(by_material) == set(TABLE_8_10)
    for material, (mu, t_max, t_op, working, p_max) in TABLE_8_10.items():
        ln = by_material[material]
        assert (ln.mu, ln.temperature_max_C, ln.operating_temperature_max_C) == (mu, t_max, t_op)
        assert (ln.working_pressure_MPa, ln.pressure_max_MPa) == (working, p_max)
        assert "Tribology Handbook" in ln.source and "Table 8.10" in ln.source
        # what the table does not give is marked common practice
        assert set(ln.practice) == {"mu_range", "pv_max"}
        assert all("common practice" in v for v in ln.practice.values())
        # direction: the continuous limit lies below the short-time one; the range brackets μ
        assert ln.operating_temperature_max_C < ln.temperature_max_C
        assert ln.mu_min < ln.mu < ln.mu_max
        assert ln.mu_min == pytest.approx(ln.mu * (1 - MU_SPREAD))


def test_the_data_file_is_package_data():
    """A wheel without the file would fail at import: pyproject lists it."""
    pyproject = tomllib.loads((Path(__file__).parents[2] / "pyproject.toml").read_text())
    assert "linings.toml" in pyproject["tool"]["setuptools"]["package-data"]["dxfcheck.gate"]


def test_a_lining_fills_the_spec_with_its_sources(tmp_path):
    spec = load_spec(tmp_path / "a.dxf", overrides=[("lining", "non-asbestos-rigid")])
    got = {k: spec.get(k) for k in ("mu", "lining_pressure_max", "drum_temperature_max", "drum_peak_temperature_max")}
    assert got["mu"].value == 0.35 and got["lining_pressure_max"].value == 3.8
    assert got["drum_temperature_max"].value == 225 and got["drum_peak_temperature_max"].value == 500
    for v in got.values():
        assert "Table 8.10" in v.source and "command line" in v.source
    assert spec.num("mu_min") == pytest.approx(0.35 * 0.85) and spec.num("mu_max") == pytest.approx(0.35 * 1.15)
    assert "common practice" in spec.get("mu_min").source and "common practice" in spec.get("pv_max").source


def test_the_spec_overrides_the_lining_from_any_level(tmp_path):
    """A value the spec sets wins even from a lower level (project file)
    than the lining (command line); a spec μ centres the range on itself."""
    project = {"mu": 0.4, "lining_pressure_max": "1 MPa"}
    spec = load_spec(tmp_path / "a.dxf", project=project, overrides=[("lining", "non-asbestos-rigid")])
    assert spec.num("mu") == 0.4 and "dxfcheck.toml" in spec.get("mu").source
    assert spec.num("lining_pressure_max") == 1.0
    assert spec.num("mu_min") == pytest.approx(0.4 * 0.85) and spec.num("mu_max") == pytest.approx(0.4 * 1.15)
    assert "spec's own mu" in spec.get("mu_min").source
    assert spec.num("drum_temperature_max") == 225  # still from the lining


def test_an_unknown_lining_is_refused_with_the_names(tmp_path):
    with pytest.raises(ConfigError) as err:
        load_spec(tmp_path / "a.dxf", overrides=[("lining", "asbestos")])
    assert "lining" in str(err.value) and "non-asbestos-rigid" in str(err.value)


def test_the_linings_limit_judges_the_steady_temperature(tmp_path):
    """heat.steady against the lining's maximum operating temperature
    (woven cotton: 100 °C, Table 8.10)."""
    path = tmp_path / "block.dxf"
    block_brake(r=200.0, l=500.0, x=200.0, a=50.0, effort="1000 N").save(path)
    spec = {
        "lining": "woven-cotton",
        "inertia": "5 kg*m2",
        "drum_speed": "60 rpm",
        "stops_per_hour": "120",
        "cooling_area": "0.01 m2",
        "drum_mass": "10 kg",
    }
    rules = {r.rule: r for r in check(path, overrides=list(spec.items())).rules}
    assert rules["heat.steady"].limit == 100.0
    assert rules["heat.peak"].limit == 150.0


def cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *args], capture_output=True, text=True, timeout=120, check=False
    )


def test_cli_lists_the_library():
    r = cli("linings")
    assert r.returncode == 0, r.stderr
    for name in LININGS:
        assert name in r.stdout
    assert "Table 8.10" in r.stdout and "common practice" in r.stdout and "qualified engineer" in r.stdout
    r = cli("linings", "--json")
    doc = output_json(r.stdout)
    assert doc["schema"] == "dxfcheck.linings/1"
    rows = {x["material"]: x for x in doc["linings"]}
    for material, (mu, t_max, t_op, _, p_max) in TABLE_8_10.items():
        x = rows[material]
        assert (x["mu"], x["temperature_max_C"], x["operating_temperature_max_C"], x["pressure_max_MPa"]) == (
            mu,
            t_max,
            t_op,
            p_max,
        )
        assert "Table 8.10" in x["source"]


def test_cli_mu_range_is_not_narrower_than_the_one_used():
    """The listing's μ range holds the range the spec takes (μ ∓ 15 %,
    common practice): μ = 0.35 (Table 8.10, non-asbestos rigid) gives
    0.35·0.85 = 0.2975 and 0.35·1.15 = 0.4025, shown as such, not rounded
    inward to 0.297-0.402."""
    r = cli("linings")
    assert r.returncode == 0, r.stderr
    assert "0.2975-0.4025" in r.stdout
    for name, ln in LININGS.items():
        line = next(x for x in r.stdout.splitlines() if f" {name} " in x)
        low, high = (float(v) for v in line.split("│")[4].split("-"))
        assert low <= ln.mu_min * (1 + 1e-9) and high >= ln.mu_max * (1 - 1e-9), (name, low, high)
        assert low == pytest.approx(ln.mu * (1 - MU_SPREAD), abs=1e-4)
        assert high == pytest.approx(ln.mu * (1 + MU_SPREAD), abs=1e-4)
