"""The real ``dxfcheck`` command on real drawings (subprocesses)."""

from __future__ import annotations

import subprocess
import sys

import pytest
from common import ROOT, conveyor_block, frame_bellcrank_two_shoe
from schema_check import output_json

DEMO = ROOT / "drawings" / "winch_two_shoe.dxf"


def run(*args, cwd=None):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, cwd=cwd, timeout=120
    )


def test_solve_demo_terminal():
    r = run("solve", DEMO, "--mu", "0.35")
    assert r.returncode == 0, r.stderr
    assert "winch_two_shoe.dxf" in r.stdout
    assert "drum cw" in r.stdout and "drum ccw" in r.stdout
    assert "tie rod" in r.stdout and "tension" in r.stdout
    assert "qualified engineer" in r.stdout


def test_solve_json_schema():
    r = run("solve", DEMO, "--mu", "0.35", "--json")
    assert r.returncode == 0, r.stderr
    doc = output_json(r.stdout)
    assert doc["schema"] == "dxfcheck.solve/2"
    assert doc["units"]["name"] == "mm"
    assert [c["direction"] for c in doc["cases"]] == ["cw", "ccw"]
    case = doc["cases"][0]
    assert case["mu"] == 0.35
    for key in ("name", "normal_N", "friction_resultant_N", "friction_lining_N", "torque_Nm", "friction_at_mm"):
        assert all(key in s for s in case["shoes"])
    for key in ("name", "x_mm", "y_mm", "fx_N", "fy_N", "force_N", "parts"):
        assert all(key in p for p in case["pins"])
    assert case["members"][0]["name"] == "tie rod" and case["members"][0]["axial_N"] > 0
    assert sum(s["torque_Nm"] for s in case["shoes"]) == pytest.approx(case["torque_Nm"])
    assert doc["findings"] == []
    assert "qualified engineer" in doc["caution"]


def test_direction_and_effort_options():
    r = run("solve", DEMO, "--mu", "0.3", "--direction", "ccw", "--effort", "3.6kN", "--json")
    base = run("solve", DEMO, "--mu", "0.3", "--direction", "ccw", "--json")
    a, b = output_json(r.stdout), output_json(base.stdout)
    assert [c["direction"] for c in a["cases"]] == ["ccw"]
    assert a["cases"][0]["torque_Nm"] == pytest.approx(2 * b["cases"][0]["torque_Nm"], rel=1e-9)


def test_fault_drawing_exit_2_names_entity(tmp_path):
    sk = conveyor_block()
    sk.pin(900, 900, 16)
    path = tmp_path / "orphan.dxf"
    sk.save(path)
    r = run("solve", path)
    assert r.returncode == 2
    assert r.stdout == ""
    line = next(x for x in r.stderr.splitlines() if "M205" in x)
    assert str(path) in line and "layer PIN" in line and "(900, 900)" in line and "entity" in line


def test_redundant_linkage_exit_2(tmp_path):
    path = tmp_path / "bc.dxf"
    frame_bellcrank_two_shoe().save(path)
    r = run("solve", path)
    assert r.returncode == 2
    assert "S302" in r.stderr and "statically indeterminate" in r.stderr
    assert "Traceback" not in r.stderr


@pytest.mark.parametrize(
    "args",
    [
        ("solve", "no/such/file.dxf"),
        ("solve", DEMO, "--effort", "12 parsecs"),
        ("solve", DEMO, "--units", "furlong"),
        ("solve", DEMO, "--direction", "up"),
        ("solve", DEMO, "--mu", "-1"),
    ],
)
def test_bad_input_exit_2_one_message(args):
    r = run(*args)
    assert r.returncode == 2
    assert "Traceback" not in r.stderr
    assert r.stderr.strip()


@pytest.mark.parametrize("mu", ["0", "-0.1", "2", "0.3..2"])
def test_solve_mu_out_of_range_says_so(mu):
    """A μ outside (0, 1.5] is a number out of range, not "not a number"
    (the same words as `check --mu`)."""
    r = run("solve", DEMO, "--mu", mu)
    assert r.returncode == 2
    assert "--mu must be above 0 and at most 1.5" in r.stderr
    assert "not a number" not in r.stderr
    assert "Traceback" not in r.stderr


@pytest.mark.parametrize("mu", ["abc", "0.3..x"])
def test_solve_mu_not_a_number(mu):
    r = run("solve", DEMO, "--mu", mu)
    assert r.returncode == 2
    assert "is not a number or a range" in r.stderr


def test_config_file_maps_layers(tmp_path):
    sk = conveyor_block()
    sk.layers = {"pivot": "BRK-FIXED", "link": "BRK-CL", "drum": "BRK-DRUM"}
    sk.save(tmp_path / "mapped.dxf")
    r = run("solve", tmp_path / "mapped.dxf", "--json")
    assert r.returncode == 2  # the default names find no drum
    (tmp_path / "dxfcheck.toml").write_text('[layers]\npivot = ["brk-fixed"]\nlink = ["BRK-CL"]\ndrum = ["BRK-DRUM"]\n')
    r = run("solve", tmp_path / "mapped.dxf", "--json")
    assert r.returncode == 0, r.stderr
    assert output_json(r.stdout)["mechanism"]["pins"][0]["pivot"] is True


def test_config_unknown_key_rejected(tmp_path):
    conveyor_block().save(tmp_path / "c.dxf")
    (tmp_path / "dxfcheck.toml").write_text('[layers]\npivots = ["X"]\n')
    r = run("solve", tmp_path / "c.dxf")
    assert r.returncode == 2
    assert "pivots" in r.stderr and "dxfcheck.toml" in r.stderr


def test_explicit_config_option(tmp_path):
    conveyor_block().save(tmp_path / "c.dxf")
    cfg = tmp_path / "other.toml"
    cfg.write_text("[paths]\n")
    r = run("solve", tmp_path / "c.dxf", "--config", cfg)
    assert r.returncode == 2 and "paths" in r.stderr and "other.toml" in r.stderr


def test_check_demo_fails_on_the_shoe_pins(tmp_path):
    """The demo spec (drawings/dxfcheck.toml) is set so that the shoe pins
    are over their bearing limit and, by long-shoe theory (the 70° linings
    are above the 60° threshold), the left lining's peak pressure is over
    0.7 MPa, which short-shoe theory's uniform 0.67 MPa would have passed:
    the gate must say so and exit 1."""
    junit = tmp_path / "gate.xml"
    r = run("check", DEMO, "--junit", junit, "--json")
    assert r.returncode == 1, r.stderr
    doc = output_json(r.stdout)
    failed = sorted(x["rule"] for x in doc["rules"] if x["verdict"] == "fail")
    assert failed == ["lining.pressure.left shoe", "pin.bearing.S1", "pin.bearing.S2"]
    short = run("check", DEMO, "--shoe-model", "short", "--json")
    failed_short = sorted(x["rule"] for x in output_json(short.stdout)["rules"] if x["verdict"] == "fail")
    assert failed_short == ["pin.bearing.S1", "pin.bearing.S2"]
    sources = {s["key"]: s["source"] for s in doc["spec"]}
    assert 'dxfcheck.toml [spec."winch_two_shoe.dxf"]' in sources["required_torque"]
    assert junit.read_text().count("<testcase") == len(doc["rules"])


@pytest.mark.parametrize("setting", ["drum_mass=0kg", "cooling_area=0m2", "stop_time=0s", "deceleration=0m/s2"])
def test_check_heat_duty_zero_that_divides_exits_2_naming_the_key(setting):
    """A zero drum mass, cooling area, stop time or deceleration would divide
    by zero in ΔT = E/(C·m), β = hA/(mC), θ = ωt/2, t = v/a: refused where it
    enters (exit 2, the key and its source), not an internal error (exit 3)."""
    stop = ["load_mass=1t", "rope_speed=0.5m/s", "drum_speed=30rpm", "drum_peak_temperature_max=400°C"]
    stop += ["stop_time=1s"] if not setting.startswith("deceleration") else []
    args = [a for s in [*stop, setting] for a in ("--set", s)]
    r = run("check", DEMO, "--mu", "0.35", *args)
    key = setting.split("=")[0]
    assert r.returncode == 2, r.stderr
    assert f"command line: {key} must be above 0" in r.stderr


def test_check_heat_duty_stop_time_and_deceleration_disagree_exits_2():
    """t = v/a: 0.5 m/s at 2 m/s² is 0.25 s, not the 1 s given: refused
    (exit 2) naming both keys with their source and the drawing."""
    sets = ["load_mass=1t", "rope_speed=0.5m/s", "drum_speed=30rpm", "stop_time=1s", "deceleration=2m/s2"]
    r = run("check", DEMO, "--mu", "0.35", *[a for s in sets for a in ("--set", s)])
    assert r.returncode == 2, r.stderr
    assert "winch_two_shoe.dxf" in r.stderr and "disagree" in r.stderr
    assert "stop_time = 1s (from command line)" in r.stderr and "deceleration = 2m/s2 (from command line)" in r.stderr


def test_check_heat_duty_incomplete_stop_fails_the_gate():
    """A lowered load without stop_time or deceleration: the stop duty is
    incomplete and fails the gate (exit 1) naming the missing key."""
    r = run("check", DEMO, "--mu", "0.35", "--json", "--set", "load_mass=1t", "--set", "drum_speed=30rpm")
    doc = output_json(r.stdout)
    stop = next(x for x in doc["rules"] if x["rule"] == "stop.duty")
    assert stop["verdict"] == "fail" and "needs stop_time (or deceleration)" in stop["message"]
    assert r.returncode == 1 and doc["verdict"] == "fail"


#: Loads the whole command as ``python -m dxfcheck`` does, then prints the
#: third-party packages that were imported.
_LOADED = (
    "import runpy, sys\n"
    "sys.argv = ['dxfcheck', 'solve', '--json', sys.argv[1]]\n"
    "try:\n"
    "    runpy.run_module('dxfcheck', run_name='__main__', alter_sys=True)\n"
    "except SystemExit:\n"
    "    pass\n"
    "heavy = ('ezdxf', 'rich', 'matplotlib', 'shapely', 'numpy.typing', 'logging', *HEAVY_STAGES)\n"
    "sys.stderr.write(' '.join(sorted(m for m in heavy if m in sys.modules)))\n"
)
#: The stages ``solve --json`` on a drawing drawn on the role layers never
#: needs: the release gate, the revision comparison, the skeleton inference,
#: the terminal tables, the release kinematics.
HEAVY_STAGES = (
    "dxfcheck.gate.rules",
    "dxfcheck.gate.spec",
    "dxfcheck.gate.linings",
    "dxfcheck.revision.compare",
    "dxfcheck.infer.skeleton",
    "dxfcheck.output.json",
    "dxfcheck.output.terminal",
    "dxfcheck.statics.kinematics",
)


@pytest.mark.parametrize("demo", sorted(p.name for p in (ROOT / "drawings").glob("*.dxf")))
def test_solve_json_loads_neither_ezdxf_nor_rich(demo):
    """A small ASCII drawing is read by the fast reader and printed as JSON:
    neither the DXF library nor the terminal tables are loaded (the
    project's own speed goal; no published source), nor the stages that
    solve does not print (:data:`HEAVY_STAGES`), nor numpy.typing (annotations only),
    nor ``logging`` (loaded with ezdxf, to route its messages)."""
    r = subprocess.run(
        [sys.executable, "-c", f"HEAVY_STAGES = {HEAVY_STAGES!r}\n" + _LOADED, str(ROOT / "drawings" / demo)],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert output_json(r.stdout)["drawing"].endswith(demo)
    assert r.stderr.strip() == ""


def test_help_lists_every_subcommand():
    """``dxfcheck --help`` names each sub-command with its line, although a
    command line builds only its own sub-command's options."""
    from dxfcheck.cli import _COMMANDS

    r = run("--help")
    assert r.returncode == 0, r.stderr
    text = " ".join(r.stdout.split())
    for name, (summary, _) in _COMMANDS.items():
        assert name in text and " ".join(summary.split()) in text


@pytest.mark.parametrize(
    "command", ["solve", "check", "annotate", "skeleton", "compare", "linings", "batch", "hook", "schema"]
)
def test_subcommand_help_shows_its_options(command):
    """Each sub-command's ``--help`` shows the options the full parser (every
    sub-command built) gives it: building only the chosen one loses none."""
    import argparse

    from dxfcheck.cli import _parser

    def options(parser: argparse.ArgumentParser) -> list[str]:
        sub = next(a for a in parser._actions if isinstance(a, argparse._SubParsersAction))
        return [o for a in sub.choices[command]._actions for o in a.option_strings or [a.dest]]

    full, lazy = options(_parser([])), options(_parser([command, "--help"]))
    assert lazy == full and "--help" in full
    r = run(command, "--help")
    assert r.returncode == 0, r.stderr
    assert f"usage: dxfcheck {command}" in r.stdout
    assert all(o in r.stdout for o in full if o.startswith("--"))
