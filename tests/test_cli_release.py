"""`dxfcheck check` with the release and strength keys, the real command on
the demo winch drawing (drawings/winch_two_shoe.dxf and its spec in
drawings/dxfcheck.toml).

Hand values (plain lever kinematics and statics, Beer & Johnston, *Vector
Mechanics for Engineers: Statics*, 11th ed., ch. 4 and 10; derived in
tests/statics/test_kinematics.py and test_strength.py): 16.29375 mm of
stroke per mm of equal lift, the tie rod's 5940 N = 1800·330/100, the left
lever's moment at its shoe pin 5940 × 520 N·mm.
"""

from __future__ import annotations

import math
import subprocess
import sys

import pytest
from common import ROOT
from schema_check import output_json

DEMO = ROOT / "drawings" / "winch_two_shoe.dxf"
STROKE_PER_LIFT = 3.3 * (840 + 740) / 320


def run(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=120
    )


def test_check_release_and_strength_keys():
    sets = [
        "shoe_clearance=0.8mm",
        "actuator_stroke=20mm",
        "actuator_force=2.5kN",
        "wear_allowance=1mm",
        "shaft_load_max=40kN",
        "parts.left lever.part_width=20mm",
        "parts.left lever.part_height=80mm",
        "parts.left lever.part_stress_allow=200MPa",
    ]
    r = run("check", DEMO, "--json", *[a for s in sets for a in ("--set", s)])
    assert r.returncode in (0, 1), r.stderr
    doc = output_json(r.stdout)
    rules = {x["rule"]: x for x in doc["rules"]}
    stroke = rules["release.stroke"]
    assert stroke["value"] == pytest.approx(0.8 * STROKE_PER_LIFT, rel=1e-9)
    assert stroke["verdict"] == "pass"
    wear = rules["release.wear"]
    assert wear["value"] == pytest.approx(20 / STROKE_PER_LIFT - 0.8, rel=1e-9)
    assert wear["verdict"] == "fail"  # 0.43 mm of wear taken up, 1 mm wanted
    assert rules["release.force"]["value"] == pytest.approx(1800 * 1.2, rel=1e-9)
    bending = rules["part.bending.left lever"]
    assert abs(bending["inputs"]["moment_Nmm"]) == pytest.approx(5940 * 520, rel=1e-9)
    assert "part.bending.right lever" in rules and rules["part.bending.right lever"]["verdict"] == "skip"
    shaft = rules["shaft.load"]
    nominal = max(math.hypot(*c["drum_load_N"]) for c in doc["cases"])
    assert shaft["value"] >= nominal * (1 - 1e-12)
    # the solve document's new fields
    case = doc["cases"][0]
    lever = next(p for p in case["parts"] if p["part"] == "left lever")
    assert lever["tree"] and lever["stations"]


def test_check_unknown_part_exit_2():
    r = run("check", DEMO, "--set", "parts.left levr.part_diameter=30mm")
    assert r.returncode == 2
    assert "did you mean 'left lever'" in r.stderr
