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
from itertools import pairwise

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


def test_solve_stations_carry_their_segment():
    """Each station names its segment's ends, so its signs read from the JSON
    alone.  On every part, the section lies on its segment and dM/ds = −V
    between stations of one segment (method of sections: M of the forces
    beyond the section, V along (end − start) turned 90° counter-clockwise).
    By hand on the winch's left lever (pivot (−250, −320), shoe pin
    (−250, 0), the tie rod's 5940 N pulling its top, 840 mm above the pivot,
    towards +x): the shoe pin takes 5940·840/320 = 15592.5 N towards −x
    (moments about the pivot), so beyond a section below the shoe pin the
    net force is 5940 − 15592.5 = −9652.5 N in x, i.e. V = +9652.5 N along
    (0, 1) turned to (−1, 0); at the shoe pin M = −5940 × 520 N·mm (the
    rod pulling the top to the right turns clockwise about the section)."""
    r = run("solve", DEMO, "--json")
    assert r.returncode == 0, r.stderr
    doc = output_json(r.stdout)
    for case in doc["cases"]:
        for part in case["parts"]:
            st = part["stations"]
            for s in st:
                (x0, y0), (x1, y1), (px, py) = s["start_mm"], s["end_mm"], s["at_mm"]
                length2 = (x1 - x0) ** 2 + (y1 - y0) ** 2
                t = ((px - x0) * (x1 - x0) + (py - y0) * (y1 - y0)) / length2
                assert -1e-9 <= t <= 1 + 1e-9
                assert abs((px - x0) * (y1 - y0) - (py - y0) * (x1 - x0)) <= 1e-9 * length2
            scale = max([1.0, *(abs(s["moment_Nmm"]) for s in st)])
            for a, b in pairwise(st):
                if a["segment"] != b["segment"]:
                    continue
                (x0, y0), (x1, y1) = b["start_mm"], b["end_mm"]
                ds = ((b["at_mm"][0] - a["at_mm"][0]) * (x1 - x0) + (b["at_mm"][1] - a["at_mm"][1]) * (y1 - y0)) / (
                    math.hypot(x1 - x0, y1 - y0)
                )
                if ds > 0:
                    assert b["moment_Nmm"] - a["moment_Nmm"] == pytest.approx(-a["shear_N"] * ds, abs=1e-9 * scale)
        lever = next(p for p in case["parts"] if p["part"] == "left lever")
        below = next(s for s in lever["stations"] if s["at_mm"] == [-250.0, 0.0] and s["start_mm"] == [-250.0, -320.0])
        (x0, y0), (x1, y1) = below["start_mm"], below["end_mm"]
        ex, ey = (x1 - x0) / math.hypot(x1 - x0, y1 - y0), (y1 - y0) / math.hypot(x1 - x0, y1 - y0)
        fx = below["shear_N"] * -ey + below["axial_N"] * ex  # the force beyond, back in drawing axes
        assert fx == pytest.approx(5940 - 5940 * 840 / 320, rel=1e-9)
        assert below["moment_Nmm"] == pytest.approx(-5940 * 520, rel=1e-9)
