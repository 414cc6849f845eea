"""Plausibility of what was read (dxfcheck.mechanism.plausibility) and the units rule.

A drawing read in the wrong unit must never pass ``check``: the cases of
issue 13 run through the real command on real files; the ranges are tested
at their ends, each with its source beside it; and every demo drawing and
every test geometry must stay free of plausibility findings.
"""

from __future__ import annotations

import inspect
import math
import subprocess
import sys

import common
import ezdxf
import pytest
from common import ROOT, block_brake, simple_band, winch_two_shoe
from schema_check import output_json

import dxfcheck
from dxfcheck.core.errors import DxfcheckError
from dxfcheck.core.findings import Code
from dxfcheck.core.units import parse_quantity
from dxfcheck.mechanism import build_mechanism
from dxfcheck.mechanism import plausibility as pl
from dxfcheck.pipeline import check

PLAUSIBILITY_CODES = {Code.UNITS_IMPLAUSIBLE, Code.PROPORTION_IMPLAUSIBLE, Code.RESULT_IMPLAUSIBLE}
DEMOS = sorted((ROOT / "drawings").glob("*.dxf"))


def run(*args, cwd=None):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, cwd=cwd, timeout=120
    )


def check_json(*args):
    r = run("check", *args, "--json")
    assert r.returncode in (0, 1), r.stderr
    doc = output_json(r.stdout)
    return r.returncode, doc, {x["rule"]: x for x in doc["rules"]}, {f["code"] for f in doc["findings"]}


def drum_315(units):
    """A block brake on a Ø315 mm drum (DIN 15435 size, from memory), its
    numbers written in millimetres whatever ``units`` the header declares."""
    return block_brake(r=157.5, l=600, x=250, a=50, effort="1 kN", units=units)


@pytest.fixture
def metres_drawing(tmp_path):
    """The 315 mm drum saved with $INSUNITS = 6 (metres), as a library's
    defaults wrote it in issue 13."""
    path = tmp_path / "drum315.dxf"
    drum_315("m").save(path)
    return path


@pytest.fixture
def measurement_drawing(tmp_path):
    """The 315 mm drum with $INSUNITS = 0 and $MEASUREMENT = 0 (imperial):
    inches assumed (DXF Reference, HEADER, $MEASUREMENT)."""
    path = tmp_path / "drum315-imperial.dxf"
    doc = drum_315(None).to_doc()
    doc.header["$MEASUREMENT"] = 0
    doc.saveas(path)
    assert dxfcheck.read_drawing(path).units_source == "$MEASUREMENT"
    return path


# --- the cases of issue 13, through the real command ------------------------------


def test_metres_header_on_a_mm_drawing_fails_and_names_mm(metres_drawing):
    """Ø315 read in metres is outside 100-1250 mm (DIN 15435 series widened,
    from memory / common practice); as mm it is a DIN 15435 size."""
    rc, doc, rules, codes = check_json(metres_drawing)
    assert rc == 1
    assert Code.UNITS_IMPLAUSIBLE.id in codes
    d110 = next(f for f in doc["findings"] if f["code"] == "D110")
    assert "read as metres" in d110["message"] and "$INSUNITS = 6" in d110["message"]
    assert "as millimetres it would be Ø315 mm, a common size" in d110["message"]
    assert d110["layers"] == ["DRUM"] and d110["handles"]
    assert rules["drawing.units"]["verdict"] == "fail"
    assert run("check", metres_drawing, "--strict").returncode == 1


def test_measurement_fallback_fails_until_confirmed(measurement_drawing):
    """$MEASUREMENT = 0 makes the mm drawing an 8 m drum: D101 and D110, the
    units rule fails (range as above)."""
    rc, doc, rules, codes = check_json(measurement_drawing)
    assert rc == 1
    assert {"D101", "D110"} <= codes
    d110 = next(f for f in doc["findings"] if f["code"] == "D110")
    assert "inch (= 8001 mm)" in d110["message"] and "as millimetres it would be Ø315 mm" in d110["message"]
    assert rules["drawing.units"]["verdict"] == "fail"
    assert rules["drawing.units"]["inputs"]["plausible_units"] == ["mm"]


def test_units_option_confirms(measurement_drawing):
    rc, doc, rules, codes = check_json(measurement_drawing, "--units", "mm")
    assert rc == 0 and not codes & {"D101", "D110"}
    assert rules["drawing.units"]["verdict"] == "pass"
    assert doc["units"]["source"] == "option"
    assert run("check", measurement_drawing, "--units", "mm", "--strict").returncode == 0


def test_spec_units_key_confirms_and_reads_in_it(measurement_drawing, metres_drawing):
    """The spec key units (sidecar here) is the project's --units: check
    reads the drawing in it."""
    for path in (measurement_drawing, metres_drawing):
        path.with_suffix(".toml").write_text('[spec]\nunits = "mm"\n')
        rc, doc, rules, _ = check_json(path, "--strict")
        assert rc == 0, rules["drawing.units"]
        assert doc["units"] == {"name": "mm", "mm_per_unit": 1.0, "source": "spec"}
        assert doc["mechanism"]["drum"]["radius_mm"] == pytest.approx(157.5)
        assert rules["drawing.units"]["verdict"] == "pass"


def test_assumed_mm_that_is_plausible_still_fails_until_confirmed(tmp_path):
    """No $INSUNITS, no $MEASUREMENT: mm assumed (D101); the drum is
    plausible in mm but the unit is a guess, so check fails until confirmed."""
    path = tmp_path / "bare.dxf"
    drum_315(None).save(path)
    rc, _, rules, codes = check_json(path)
    assert rc == 1 and "D101" in codes and "D110" not in codes
    assert rules["drawing.units"]["verdict"] == "fail"
    assert "plausible as mm" in rules["drawing.units"]["message"]
    assert check_json(path, "--units", "mm")[0] == 0


def test_confirmed_implausible_unit_warns_and_strict_fails(metres_drawing):
    """--units counts as confirmation: no fail, but the drawing is still
    implausible, so the rule warns and --strict never passes it."""
    rc, _, rules, codes = check_json(metres_drawing, "--units", "m")
    assert rc == 0 and "D110" in codes
    assert rules["drawing.units"]["verdict"] == "warn"
    assert run("check", metres_drawing, "--units", "m", "--strict").returncode == 1


def test_solve_shows_the_findings_and_exits_0(metres_drawing):
    r = run("solve", metres_drawing, "--json")
    assert r.returncode == 0, r.stderr
    assert "D110" in {f["code"] for f in output_json(r.stdout)["findings"]}
    r = run("solve", metres_drawing)
    assert r.returncode == 0 and "D110" in r.stdout


def test_inch_drawing_with_insunits_1_is_clean(tmp_path):
    """Mott, *Machine Elements in Mechanical Design*, 4th ed., Example
    Problem 22-10 (from memory): a 12 in drum (r = 6 in), 225° wrap, drawn in
    inches with $INSUNITS = 1: Ø304.8 mm lies in 100-1250 mm."""
    path = tmp_path / "mott.dxf"
    simple_band(r=6, wrap_deg=225, anchor_run=4, arm=20, effort="120 lbf", units="inch").save(path)
    width = ("--set", "lining_width=2 in", "--set", "lining_pressure_max=1 MPa")  # Mott's 2 in band
    rc, _, rules, codes = check_json(path, "--mu", "0.25", *width)
    assert not codes & {c.id for c in PLAUSIBILITY_CODES}
    assert rules["drawing.units"]["verdict"] == "pass"
    assert rules["drawing.hygiene"]["verdict"] == "pass"
    assert rules["band.pressure.band1"]["verdict"] == "pass"
    assert rc == 0  # (a simple band is asymmetric by nature: --strict would fail on torque.asymmetry)


def test_judge_flags_margins_and_pressures_off_by_orders(tmp_path):
    """The demo winch drawn in metres with the demo's spec: pin shear margins
    of ~10⁶ and lining pressures below 0.001 MPa (ranges: rule margins
    0.001-1000, common practice; lining pressure 0.001-20 MPa, Shigley's MED
    10th ed., Table 16-3, from memory) are reported, naming the pins."""
    folder = tmp_path / "m"
    folder.mkdir()
    (folder / "dxfcheck.toml").write_text((ROOT / "drawings" / "dxfcheck.toml").read_text())
    sk = winch_two_shoe()
    sk.units = "m"
    sk.save(folder / "winch_two_shoe.dxf")
    rc, doc, _, codes = check_json(folder / "winch_two_shoe.dxf")
    assert rc == 1 and "S312" in codes
    msgs = [f for f in doc["findings"] if f["code"] == "S312"]
    margin = next(f for f in msgs if f["message"].startswith("margins"))
    assert "pin.shear.S1" in margin["message"] and "torque.cw" in margin["message"]
    assert "PIN" in margin["layers"]
    assert any(f["message"].startswith("lining.pressure.left shoe") for f in msgs)
    # the same drawing in mm: none of it
    assert not check_json(ROOT / "drawings" / "winch_two_shoe.dxf")[3] & {c.id for c in PLAUSIBILITY_CODES}


# --- the ranges at their ends --------------------------------------------------------


@pytest.mark.parametrize(
    ("diameter_mm", "plausible"),
    [(100.0, True), (99.9, False), (1250.0, True), (1250.1, False), (315.0, True)],
)
def test_drum_range_ends(diameter_mm, plausible):
    """100-1250 mm: DIN 15435 series 160-710 mm (from memory) widened by R10
    steps (common practice)."""
    assert pl.drum_plausible(diameter_mm) is plausible


def test_which_units_make_a_drum_plausible():
    """The unit factors are exact (NIST SP 811, App. B.8): 315 is plausible
    only as mm; 12 as cm (120 mm) and as inches (304.8 mm); 2 as feet
    (609.6 mm) only; 0.25 as m only, 0.4 as m or ft (121.9 mm)."""
    assert [u for u, _ in pl.plausible_units(315)] == ["mm"]
    assert [u for u, _ in pl.plausible_units(12)] == ["cm", "inch"]
    assert [u for u, _ in pl.plausible_units(2)] == ["ft"]
    assert [u for u, _ in pl.plausible_units(0.25)] == ["m"]
    assert [u for u, _ in pl.plausible_units(0.4)] == ["m", "ft"]
    assert dict(pl.plausible_units(12))["inch"] == pytest.approx(304.8)


def _mech(tmp_path, sk):
    path = tmp_path / "p.dxf"
    sk.save(path)
    return build_mechanism(dxfcheck.read_drawing(path))


@pytest.mark.parametrize(("pin_d", "flagged"), [(3.2, False), (3.1, True), (78.0, False), (79.5, True)])
def test_pin_against_drum_ends(tmp_path, pin_d, flagged):
    """Pin Ø 0.01-0.25 × drum Ø (catalogue brakes 0.05-0.1, DIN 15435 sizes,
    from memory; widened, common practice): on a Ø315 drum, 3.15-78.75 mm."""
    sk = drum_315("mm")
    sk.items = [it for it in sk.items if not (it[0] == "circle" and it[1] == "pivot")]
    sk.pivot(-250, 207.5, pin_d)  # still named by the label "O"
    found = pl.pin_diameters(_mech(tmp_path, sk))
    assert bool(found) is flagged
    if flagged:
        assert found[0].code is Code.PROPORTION_IMPLAUSIBLE and found[0].layers == ("PIVOT",)
        assert "pin O" in found[0].message


@pytest.mark.parametrize(("length", "flagged"), [(6000.0, False), (6400.0, True)])
def test_part_against_drum_end(tmp_path, length, flagged):
    """A part spans at most 20 drum diameters (levers span 1-5, common
    practice): on a Ø315 drum, 6300 mm."""
    sk = block_brake(r=157.5, l=length, x=250, a=50, effort="1 kN")
    found = pl.link_lengths(_mech(tmp_path, sk))
    assert bool(found) is flagged
    if flagged:
        assert "part lever" in found[0].message and found[0].layers == ("LINK",)


@pytest.mark.parametrize(("text", "flagged"), [("5 N", False), ("4.9 N", True), ("500 kN", False), ("510 kN", True)])
def test_load_range_ends(tmp_path, text, flagged):
    """Loads and springs 5 N-500 kN: hand efforts 50-400 N to set springs of
    some tens of kN, a decade beyond each (common practice)."""
    path = tmp_path / "load.dxf"
    drum_315("mm").save(path)
    sol = dxfcheck.analyse(path, effort_N=parse_quantity(text, "force").value)
    s312 = [f for f in sol.findings if f.code is Code.RESULT_IMPLAUSIBLE]
    assert bool(s312) is flagged
    if flagged:
        assert s312[0].layers == ("LOAD",) and s312[0].handles and "outside 5-500000 N" in s312[0].message


def test_pressure_and_margin_ends():
    """Lining pressure 0.001-20 MPa (Shigley's MED 10th ed., Table 16-3,
    from memory, two decades below and one above); margins 0.001-1000
    (common practice); asymmetry, self-locking and buckling margins exempt."""
    from dxfcheck.gate.rules import RuleResult, Verdict

    def rule(name, value, margin):
        return RuleResult(name, name, Verdict.PASS, value, 1.0, "MPa", margin)

    mech = build_mechanism(dxfcheck.read_drawing(ROOT / "drawings" / "conveyor_block.dxf"))
    rules = [
        rule("lining.pressure.block", 1.0e-3, 700.0),
        rule("band.pressure.band", 20.0, 0.05),
        rule("pin.shear.O", 1.0, 1.0e3),
        rule("pin.bearing.O", 1.0, 1.0e-3),
    ]
    assert pl.check_rules(mech, rules) == []
    rules = [
        rule("lining.pressure.block", 0.99e-3, 1.01e3),
        rule("pin.shear.O", 1.0, 1.01e3),
        rule("torque.asymmetry", 1.0, 1.0e6),
        rule("member.buckling.rod", 1.0, 1.0e6),
    ]
    found = pl.check_rules(mech, rules)
    assert [f.message.split(":")[0] for f in found] == [
        "lining.pressure.block",
        "margins orders of magnitude from 1 (outside 0.001-1000)",
    ]
    assert "pin.shear.O" in found[1].message and "asymmetry" not in found[1].message
    assert "lining.pressure.block" not in found[1].message  # reported once, as a pressure
    assert found[0].layers == ("SHOE",) and found[1].layers == ("PIVOT",)


def test_ranges_are_named_with_sources():
    for name in ("SRC_DRUM", "SRC_PIN", "SRC_PART", "SRC_LOAD", "SRC_PRESSURE", "SRC_MARGIN"):
        text = getattr(pl, name)
        assert "from memory" in text or "common practice" in text, name


# --- every demo and every test geometry stays clean ----------------------------------

#: Every geometry builder of tests/common.py, with arguments from the tests
#: that use them (published examples where they have one).
GEOMETRIES = {
    "winch_two_shoe": common.winch_two_shoe,
    "conveyor_block": common.conveyor_block,
    "capstan_band": common.capstan_band,
    "block_brake": lambda: block_brake(r=200, l=500, x=200, a=50, effort="1 kN"),
    "block_brake, 90° block": lambda: block_brake(r=125, l=450, x=200, a=50, effort="700 N", contact_deg=90),
    "double_block_spring_pair": lambda: common.double_block_spring_pair(r=180, l=450, x=200, a=140, spring="3500 N"),
    "frame_bellcrank_two_shoe": common.frame_bellcrank_two_shoe,
    "spring_rod_double_block": common.spring_rod_double_block,
    "push_rod_block": common.push_rod_block,
    "pivoted_long_shoes": lambda: common.pivoted_long_shoes(r=250, semi_deg=50, a=281, effort_N=8000, pair=True),
    "pivoted_long_shoes, far pin": lambda: common.pivoted_long_shoes(
        r=200, semi_deg=60, a=900, effort_N=2000, pair=False
    ),
    "internal_hinged_shoe": lambda: _internal(),
    "simple_band": lambda: simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort="500 N"),
    "simple_band, Mott in inches": lambda: simple_band(
        r=6, wrap_deg=225, anchor_run=4, arm=20, effort="120 lbf", units="inch"
    ),
    "differential_band": lambda: common.differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort="300 N"),
}


def _internal():
    """Shigley's MED 10th ed., Problem 16-1 geometry (r = 150, hinge 125
    below the axis), as tests/validation/test_shigley_10th.py draws it."""
    from dxfcheck.output.sketch import Sketch

    sk = Sketch()
    sk.drum(0, 0, 150)
    common.internal_hinged_shoe(
        sk, r=150, hinge=(0, -125), phi_from=-90, phi_to=30, act=(20, 91.5), push=(1, 0), effort="2.2 kN", name=""
    )
    return sk


def _builders():
    out = dict(GEOMETRIES)
    for name, entry in getattr(common, "CATALOGUE", {}).items():
        out[f"catalogue: {name}"] = entry[0]
    return out


def test_every_builder_of_common_is_covered():
    """A new geometry in tests/common.py joins GEOMETRIES (or CATALOGUE)."""
    names = {n for n in common.__all__ if inspect.isfunction(getattr(common, n))}
    covered = {k.split(",")[0] for k in GEOMETRIES}
    assert names <= covered, f"add {sorted(names - covered)} to GEOMETRIES in tests/test_plausibility.py"


@pytest.mark.parametrize("name", sorted(_builders()))
def test_test_geometries_are_plausible(tmp_path, name):
    path = tmp_path / "g.dxf"
    _builders()[name]().save(path)
    mech = build_mechanism(dxfcheck.read_drawing(path))
    assert pl.check_mechanism(mech) == []
    try:
        sol = dxfcheck.analyse(path)
    except DxfcheckError:  # a geometry made to be refused (redundant linkage...): its sizes were checked
        return
    assert not [f for f in sol.findings if f.code in PLAUSIBILITY_CODES]


@pytest.mark.parametrize("path", DEMOS, ids=lambda p: p.name)
def test_demos_are_plausible_and_their_units_pass(path):
    """The demos carry $INSUNITS = 4 and sizes of real brakes: no
    plausibility finding in solve or check, the units rule passes."""
    sol = dxfcheck.analyse(path)
    assert not [f for f in sol.findings if f.code in PLAUSIBILITY_CODES]
    j = check(path)
    assert not [f for f in j.nominal.findings if f.code in PLAUSIBILITY_CODES]
    units = next(r for r in j.rules if r.rule == "drawing.units")
    assert units.verdict.value == "pass" and units.value == pytest.approx(2 * sol.mechanism.drum.radius_mm)
    assert math.isfinite(units.value)


def test_demo_files_declare_millimetres():
    """The demo files carry $INSUNITS = 4 (mm; DXF Reference, HEADER)."""
    for path in DEMOS:
        doc = ezdxf.readfile(path)
        assert doc.header.get("$INSUNITS") == 4, path.name
