"""Spec values go where they are meant.

A per-pin or per-member value that names a pin or member the drawing does not
have is refused (exit 2) with its source, the unknown name and the names that
exist, instead of being dropped while its rule quietly uses the general value.
With both ``required_torque`` and a motor duty, the torque rule uses the
larger and the report shows both, with their sources.
"""

from __future__ import annotations

import math
import subprocess
import sys

import ezdxf
import pytest
from common import block_brake, winch_two_shoe
from schema_check import output_json

import dxfcheck
from dxfcheck.pipeline import check

WINCH_PINS = ("O1", "O2", "S1", "T1", "S2", "T2", "C")


@pytest.fixture
def winch(tmp_path):
    path = tmp_path / "winch.dxf"
    winch_two_shoe().save(path)
    return path


def cli(*args, cwd=None):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=120, cwd=cwd
    )


def _refusal(path, **kw) -> str:
    with pytest.raises(dxfcheck.ConfigError) as info:
        check(path, **kw)
    return str(info.value)


# --- per-pin and per-member values name what the drawing has ------------------


def _with_header_property(path, name, value):
    doc = ezdxf.readfile(path)
    doc.header.custom_vars.append(name, value)
    doc.saveas(path)


@pytest.mark.parametrize(
    "where",
    ["project [spec]", "project [spec.NAME]", "header property", "sidecar", "command line"],
)
def test_unknown_pin_is_refused_from_every_source(winch, where):
    """Every spec source that can hold per-pin values (README, "Where spec
    values come from") is checked; the message names the source and the key,
    the unknown pin, and every pin the drawing has."""
    folder = winch.parent
    overrides = []
    if where == "project [spec]":
        (folder / "dxfcheck.toml").write_text('[spec.pins.S9]\npin_length = "40 mm"\n')
        source = "dxfcheck.toml [spec]"
    elif where == "project [spec.NAME]":
        (folder / "dxfcheck.toml").write_text('[spec."winch.dxf".pins.S9]\npin_length = "40 mm"\n')
        source = 'dxfcheck.toml [spec."winch.dxf"]'
    elif where == "header property":
        _with_header_property(winch, "dxfcheck.pins.S9.pin_length", "40 mm")
        source = "header property dxfcheck.pins.S9.pin_length"
    elif where == "sidecar":
        (folder / "winch.toml").write_text('[spec.pins.S9]\npin_length = "40 mm"\n')
        source = "winch.toml [spec]"
    else:
        overrides = [("pins.S9.pin_length", "40 mm")]
        source = "command line"
    msg = _refusal(winch, overrides=overrides)
    assert "'S9'" in msg and "pins.S9.pin_length" in msg and source in msg
    assert "does not have" in msg
    for name in WINCH_PINS:
        assert repr(name) in msg


def test_unknown_member_and_a_part_that_is_no_member(winch):
    """The winch's only two-force member is the tie rod (pinned at T1 and C,
    nothing else on it); the levers carry three pins each."""
    msg = _refusal(winch, overrides=[("members.rod.rod_diameter", "20 mm")])
    assert "'rod'" in msg and "members.rod.rod_diameter" in msg and "'tie rod'" in msg
    msg = _refusal(winch, overrides=[("members.left lever.rod_diameter", "20 mm")])
    assert "'left lever' is a part, but not a two-force member" in msg and "'tie rod'" in msg


@pytest.mark.parametrize(("written", "meant"), [("tierod", "tie rod"), ("s1", "S1")])
def test_a_near_name_is_suggested(winch, written, meant):
    table = "members" if meant == "tie rod" else "pins"
    key = "rod_diameter" if table == "members" else "pin_length"
    msg = _refusal(winch, overrides=[(f"{table}.{written}.{key}", "20 mm")])
    assert f"did you mean {meant!r}?" in msg


def test_every_unknown_entry_is_named_at_once(winch):
    msg = _refusal(
        winch,
        overrides=[("pins.X1.pin_length", "40 mm"), ("pins.X2.pin_length", "40 mm"), ("members.R.rod_area", "3 mm2")],
    )
    assert all(f"'{n}'" in msg for n in ("X1", "X2", "R"))


def test_known_names_still_take_their_values(winch):
    """Per-subject values that name real pins and members override the
    general one: single shear at O1 (n = 1), double elsewhere (n = 2); the
    tie rod's own diameter (τ = F/(n·πd²/4), σ = F/A: Shigley's MED 10th ed.,
    ch. 3, from memory)."""
    (winch.parent / "dxfcheck.toml").write_text(
        '[spec."winch.dxf"]\npin_shear_allow = "50 MPa"\npin_shear_planes = 2\n'
        'rod_stress_allow = "100 MPa"\nrod_diameter = "30 mm"\n'
        '[spec."winch.dxf".pins.O1]\npin_shear_planes = 1\n'
        '[spec."winch.dxf".members."tie rod"]\nrod_diameter = "20 mm"\n'
    )
    j = check(winch)
    rules = {r.rule: r for r in j.rules}
    assert rules["pin.shear.O1"].inputs["shear_planes"] == 1.0
    assert rules["pin.shear.O2"].inputs["shear_planes"] == 2.0
    assert rules["member.stress.tie rod"].inputs["area_mm2"] == pytest.approx(math.pi * 20**2 / 4, rel=1e-12)


def test_cli_refuses_with_exit_2_and_names_the_source(winch):
    (winch.parent / "dxfcheck.toml").write_text('[spec."winch.dxf".pins.S3]\npin_length = "40 mm"\n')
    r = cli("check", winch)
    assert r.returncode == 2, r.stdout + r.stderr
    assert "winch.dxf" in r.stderr and "pins.S3.pin_length" in r.stderr and "dxfcheck.toml" in r.stderr
    assert "'S1'" in r.stderr and "Traceback" not in r.stderr
    assert r.stdout == ""


# --- two duties: the larger governs --------------------------------------------

# The test brake of test_check.py: block_brake(r=200, l=500, x=200, a=50), P = 1000 N.
R, L, X, A, P, MU = 200.0, 500.0, 200.0, 50.0, 1000.0, 0.35
#: 7.5 kW at 1450 rpm with factor 1.5: T = factor·P/ω, ω = 2πn/60 (rated
#: torque of a motor: common practice, no single source) = 74.09 N·m.
MOTOR = {"motor_power": "7.5 kW", "motor_speed": "1450 rpm", "torque_factor": "1.5"}
MOTOR_NM = 1.5 * 7500 / (2 * math.pi * 1450 / 60)


def lever_N(mu: float, energising: bool) -> float:
    """P·l = N(x ∓ μa) (Khurmi & Gupta, *Theory of Machines*, brakes; from memory)."""
    return P * L / (X - mu * A if energising else X + mu * A)


@pytest.fixture
def brake(tmp_path):
    path = tmp_path / "block.dxf"
    block_brake(r=R, l=L, x=X, a=A, effort=f"{P} N").save(path)
    (tmp_path / "dxfcheck.toml").write_text(
        '[spec]\nmotor_power = "7.5 kW"\nmotor_speed = "1450 rpm"\ntorque_factor = 1.5\n'
    )
    return path


@pytest.mark.parametrize(("required", "governs"), [(100.0, "required_torque"), (50.0, "motor duty")])
def test_the_larger_duty_governs_and_both_are_shown(brake, required, governs):
    assert pytest.approx(74.09, abs=0.005) == MOTOR_NM
    j = check(brake, overrides=[("mu", str(MU)), ("required_torque", f"{required} N*m")])
    rules = {r.rule: r for r in j.rules}
    need = max(required, MOTOR_NM)
    t_weak = MU * lever_N(MU, False) * R / 1000  # T = μNr, the non-energising direction
    for d in ("cw", "ccw"):
        r = rules[f"torque.{d}"]
        assert r.limit == pytest.approx(need, rel=1e-12)
        assert r.value > 0  # a braking torque opposes the drum's motion
        assert r.inputs["governs"] == governs
        shown = {x["duty"]: x for x in r.inputs["duties"]}
        assert shown["required_torque"]["torque_Nm"] == pytest.approx(required)
        assert shown["required_torque"]["source"] == "command line"
        assert shown["motor duty"]["torque_Nm"] == pytest.approx(MOTOR_NM, rel=1e-12)
        assert "dxfcheck.toml [spec]" in shown["motor duty"]["source"]
        assert [x["duty"] for x in r.inputs["duties"] if x["governs"]] == [governs]
        assert f"{governs} {need:.4g} N·m" in r.message and "governs" in r.message
        # the effort rule answers the same duty: effort needed = P × duty / torque
        e = rules[f"effort.{d}"]
        assert e.value == pytest.approx(P * need / r.value, rel=1e-9)
    assert min(rules["torque.cw"].value, rules["torque.ccw"].value) == pytest.approx(t_weak, rel=1e-9)


def test_incomplete_motor_duty_beside_required_torque_is_said(tmp_path):
    path = tmp_path / "block.dxf"
    block_brake(r=R, l=L, x=X, a=A, effort=f"{P} N").save(path)
    j = check(path, overrides=[("required_torque", "60 N*m"), ("motor_power", "7.5 kW")])
    r = next(r for r in j.rules if r.rule == "torque.cw")
    assert r.limit == 60.0 and r.inputs["governs"] == "required_torque"
    assert "motor duty not used" in r.message and "motor_speed" in r.message and "torque_factor" in r.message


def test_cli_report_shows_both_duties(brake):
    r = cli("check", brake, "--mu", MU, "--set", "required_torque=50 N*m")
    assert r.returncode in (0, 1), r.stderr
    text = " ".join(r.stdout.replace("│", " ").split())  # the note column wraps inside the table
    assert "governs" in text and "74.09" in text and "50 N·m" in text
    r = cli("check", brake, "--mu", MU, "--set", "required_torque=50 N*m", "--json")
    doc = output_json(r.stdout)
    rule = next(x for x in doc["rules"] if x["rule"] == "torque.cw")
    assert rule["limit"] == pytest.approx(MOTOR_NM, rel=1e-12)
    assert {x["duty"] for x in rule["inputs"]["duties"]} == {"required_torque", "motor duty"}
