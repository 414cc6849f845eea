"""``[tool.dxfcheck]`` in ``pyproject.toml``: found like ``dxfcheck.toml``,
the same keys, and the precedence the README gives (in one folder
``dxfcheck.toml`` wins; the drawing's own file and the command line sit
above either).  The project's own convention, after the way linters and
test runners read ``[tool.NAME]`` (PEP 518 reserves the ``tool`` table for
them); no published source for the rest."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

import pytest
from common import winch_two_shoe
from schema_check import output_json

from dxfcheck.core.config import PYPROJECT_NAME, Role, config_for_drawing, find_config, load_config
from dxfcheck.core.errors import ConfigError

VENDOR_LAYERS = {"pin": "V-PIN", "pivot": "V-PIV", "link": "V-CL"}
TOOL_LAYERS = '[tool.dxfcheck.layers]\npin = ["V-PIN"]\npivot = ["V-PIV"]\nlink = ["V-CL"]\n'
PLAIN_LAYERS = '[layers]\npin = ["V-PIN"]\npivot = ["V-PIV"]\nlink = ["V-CL"]\n'


def run(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=120
    )


def _repo(tmp_path: Path, pyproject: str | None = None, dxfcheck_toml: str | None = None) -> Path:
    """A repository (``.git``) with a vendor drawing on its own layers."""
    repo = tmp_path / "repo"
    (repo / ".git").mkdir(parents=True)
    if pyproject is not None:
        (repo / PYPROJECT_NAME).write_text('[project]\nname = "brakes"\n\n' + pyproject)
    if dxfcheck_toml is not None:
        (repo / "dxfcheck.toml").write_text(dxfcheck_toml)
    sk = winch_two_shoe()
    sk.layers = dict(VENDOR_LAYERS)
    (repo / "drawings").mkdir()
    drawing = repo / "drawings" / "brake.dxf"
    sk.save(drawing)
    return drawing


def test_the_tool_table_is_found_and_read_like_dxfcheck_toml(tmp_path):
    drawing = _repo(tmp_path, TOOL_LAYERS + '\n[tool.dxfcheck.spec]\nrequired_torque = "1 kN*m"\n')
    pyproject = drawing.parent.parent / PYPROJECT_NAME
    assert find_config(drawing) == pyproject.resolve()
    cfg = config_for_drawing(drawing)
    assert cfg.layers[Role.PIN] == ("V-PIN",) and cfg.spec == {"required_torque": "1 kN*m"}
    r = run("check", drawing, "--json")
    doc = output_json(r.stdout)
    assert r.returncode in (0, 1), r.stderr
    assert doc["config"] == str(pyproject.resolve()) and len(doc["mechanism"]["pins"]) == 7
    torque = next(v for v in doc["spec"] if v["key"] == "required_torque")
    assert torque["value"] == pytest.approx(1000.0) and torque["source"].endswith("pyproject.toml [tool.dxfcheck.spec]")


def test_without_the_table_the_pyproject_only_ends_the_search(tmp_path):
    """A Python project's pyproject.toml without [tool.dxfcheck] is not a
    project file, and a dxfcheck.toml above it is not read (as before)."""
    (tmp_path / "dxfcheck.toml").write_text(PLAIN_LAYERS)
    drawing = _repo(tmp_path, "[tool.ruff]\nline-length = 100\n")
    assert find_config(drawing) is None
    r = run("solve", drawing, "--json")
    assert r.returncode == 2 and output_json(r.stdout)["error"]  # the vendor layers are not mapped


def test_dxfcheck_toml_wins_over_the_tool_table_in_one_folder(tmp_path):
    drawing = _repo(tmp_path, '[tool.dxfcheck.layers]\npin = ["NOT-USED"]\n', dxfcheck_toml=PLAIN_LAYERS)
    found = find_config(drawing)
    assert found is not None and found.name == "dxfcheck.toml"
    r = run("solve", drawing, "--json")
    assert r.returncode == 0, r.stderr
    assert output_json(r.stdout)["config"] == str(found)


def test_the_nearest_folder_wins(tmp_path):
    """A pyproject.toml with the table in the drawing's folder is nearer
    than a dxfcheck.toml at the repository root."""
    drawing = _repo(tmp_path, dxfcheck_toml='[layers]\npin = ["NOT-USED"]\n')
    (drawing.parent / PYPROJECT_NAME).write_text(TOOL_LAYERS)
    assert find_config(drawing) == (drawing.parent / PYPROJECT_NAME).resolve()


def test_sidecar_and_command_line_sit_above_the_tool_table(tmp_path):
    drawing = _repo(
        tmp_path,
        TOOL_LAYERS + '\n[tool.dxfcheck.spec]\nrequired_torque = "1 kN*m"\npin_shear_allow = "40 MPa"\n',
    )
    drawing.with_suffix(".toml").write_text('[spec]\nrequired_torque = "1.2 kN*m"\n')
    r = run("check", drawing, "--json", "--set", "pin_shear_allow=60MPa")
    spec = {v["key"]: v for v in output_json(r.stdout)["spec"]}
    assert spec["required_torque"]["value"] == pytest.approx(1200.0)
    assert spec["required_torque"]["source"].startswith(str(drawing.with_suffix(".toml")))
    assert spec["pin_shear_allow"]["value"] == pytest.approx(60.0)
    assert spec["pin_shear_allow"]["source"] == "command line"
    # the sidecar's [layers] replace the table's roles for this drawing
    drawing.with_suffix(".toml").write_text('[layers]\npin = ["OTHER"]\n')
    assert config_for_drawing(drawing).layers[Role.PIN] == ("OTHER",)
    assert config_for_drawing(drawing).layers[Role.PIVOT] == ("V-PIV",)


def test_config_option_names_a_pyproject(tmp_path):
    drawing = _repo(tmp_path)
    named = tmp_path / PYPROJECT_NAME
    named.write_text(TOOL_LAYERS)
    assert load_config(named).layers[Role.LINK] == ("V-CL",)
    r = run("solve", drawing, "--config", named, "--json")
    assert r.returncode == 0 and output_json(r.stdout)["config"] == str(named)


@pytest.mark.parametrize(
    ("text", "phrase"),
    [
        ("[project]\nname = 'x'\n", "has no [tool.dxfcheck] table"),
        ("[tool.dxfcheck]\nlayer = 1\n", "unknown table or key 'layer' in [tool.dxfcheck]"),
        ('[tool.dxfcheck.layers]\nrod = ["X"]\n', "[tool.dxfcheck.layers] has an unknown role 'rod'"),
        ("[tool.dxfcheck.markup]\ncolour = 'red'\n", "[tool.dxfcheck.markup] has an unknown key 'colour'"),
        ("[tool]\ndxfcheck = 3\n", "[tool.dxfcheck] must be a table"),
    ],
)
def test_a_bad_tool_table_is_refused_naming_file_and_table(tmp_path, text, phrase):
    named = tmp_path / PYPROJECT_NAME
    named.write_text(text)
    with pytest.raises(ConfigError) as info:
        load_config(named)
    assert phrase in info.value.message and info.value.path == str(named)


def test_a_broken_pyproject_on_the_search_path_is_refused(tmp_path):
    """It may hold the layer map: refused naming it, never skipped."""
    drawing = _repo(tmp_path, "[tool.dxfcheck\n")
    r = run("solve", drawing)
    assert r.returncode == 2 and "pyproject.toml" in r.stderr and "not valid TOML" in r.stderr


def test_a_drawing_named_pyproject_has_no_own_file(tmp_path):
    """pyproject.dxf beside a pyproject.toml without [tool.dxfcheck]: the
    TOML is the Python project's file, never read as the drawing's own file
    (its [project] table would be refused as an unknown table)."""
    repo = tmp_path / "repo"
    (repo / ".git").mkdir(parents=True)
    (repo / PYPROJECT_NAME).write_text('[project]\nname = "brakes"\n')
    named = repo / "pyproject.dxf"
    winch_two_shoe().save(named)
    cfg = config_for_drawing(named)
    assert cfg.sidecar is None and cfg.path is None
    r = run("solve", named, "--json")
    assert r.returncode == 0, r.stderr
    assert output_json(r.stdout)["sidecar"] is None
