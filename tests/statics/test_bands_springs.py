"""Band brakes, spring-set actuation and the inverse question (the effort
for a torque), through the full pipeline.  The published band and
double-block examples (Mott, Jindal, book 764, Sarkar) are in
``tests/validation/``."""

from __future__ import annotations

import math
import subprocess
import sys

import pytest
from common import block_brake, differential_band, double_block_spring_pair, simple_band
from handcalc import simple_band_effort
from schema_check import output_json

import dxfcheck
from dxfcheck.core.findings import Code
from dxfcheck.output.sketch import Sketch


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "b.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def test_self_locking_differential_band(tmp_path):
    """a/c = 2 < e^(0.25·240°) = 2.85: the band self-locks in the direction
    whose tight end has the short arm; critical μ = ln(a/c)/θ (Mott §22-15).
    The short arm c is at pin C, the wrap's left end, tight when the drum
    turns clockwise (its surface moves away from C): the clockwise case
    locks, the counter-clockwise one (A tight, its pull against the effort)
    cannot."""
    theta = math.radians(240)
    sol = _solve(tmp_path, differential_band(r=300, wrap_deg=240, a=100, c=50, arm=950, effort="300 N"), 0.25)
    assert sol.case("cw").critical_mu == pytest.approx(math.log(2) / theta, rel=1e-9)
    assert sol.case("ccw").critical_mu is None
    locked = [f for f in sol.findings if f.code is Code.SELF_LOCKING]
    assert len(locked) == 1 and locked[0].message.startswith("cw:")


def test_compression_spring_pushes(tmp_path):
    """The same spring written as compression pushes the levers apart: the
    shoes would lift."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3.5 kN C")
    sol = _solve(tmp_path, sk, 0.4)
    assert any(f.code is Code.SHOE_LIFTS for f in sol.findings)
    # a result that is no brake is not printed as one: no torque, the reason,
    # and the question whether the spring's sense is reversed
    for c in sol.cases:
        assert not c.brakes and c.braking_torque_Nm is None
        assert "is the spring's sense reversed" in c.why_not_braking
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(tmp_path / "b.dxf"), "--mu", "0.4", "--json"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert r.returncode == 1  # solved, but no brake
    for c in output_json(r.stdout)["cases"]:
        assert c["torque_Nm"] is None and c["not_braking"].startswith("S303")
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(tmp_path / "b.dxf"), "--mu", "0.4"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    heads = [ln for ln in r.stdout.splitlines() if ln.startswith(("drum cw ", "drum ccw "))]
    assert len(heads) == 2 and all("does not brake" in ln and "braking torque" not in ln for ln in heads)


@pytest.mark.parametrize(("text", "code"), [("3500 N", Code.SPRING_NO_SENSE), ("lots T", Code.TEXT_UNREAD)])
def test_spring_text_faults(tmp_path, text, code):
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), text)
    path = tmp_path / "s.dxf"
    sk.save(path)
    mech = dxfcheck.build_mechanism(dxfcheck.read_drawing(path))
    assert code in {f.code for f in mech.findings}


def test_band_faults(tmp_path):
    sk = Sketch()
    sk.drum(0, 0, 200)
    sk.pivot(-300, -300, 20)
    sk.link((-300, -300), (300, -300))
    sk.band(0, 0, 200, -30, 210, (150, -300), (-999, -999))
    sk.load(300, -300, 0, -1, "100 N")
    path = tmp_path / "bf.dxf"
    sk.save(path)
    codes = {f.code for f in dxfcheck.build_mechanism(dxfcheck.read_drawing(path)).findings}
    assert Code.BAND_END_OFF in codes


# --- the inverse question -----------------------------------------------------


def test_effort_for_torque_cli_keeps_load_ratios(tmp_path):
    """A drawing with two loads: both scale together (the statics is linear
    in the loads)."""
    sk = block_brake(r=200, l=500, x=200, a=50, effort="400 N")
    sk.load(100, 250, 0, -1, "200 N")
    path = tmp_path / "two.dxf"
    sk.save(path)
    r = subprocess.run(
        [sys.executable, "-m", "dxfcheck", "solve", str(path), "--mu", "0.35", "--torque", "250 N*m", "--json"],
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert r.returncode == 0, r.stderr
    doc = output_json(r.stdout)
    for c in doc["cases"]:
        f = {ld["name"]: ld["force_N"] for ld in c["loads"]}
        assert f["F1"] == pytest.approx(2 * f["F2"], rel=1e-12)
        assert c["torque_Nm"] == pytest.approx(250.0, rel=1e-12)
        assert c["effort_scale"] == pytest.approx(f["F1"] / 400, rel=1e-12)


def test_effort_for_torque_refused_when_self_locking(tmp_path):
    sk = block_brake(r=200, l=500, x=200, a=250, effort="1 N")
    path = tmp_path / "lock.dxf"
    sk.save(path)
    with pytest.raises(dxfcheck.SolveError, match="self-locks"):
        dxfcheck.analyse(path, mu=0.9, torque_Nm=100.0)


def test_band_rules_and_effort_margin(tmp_path):
    """The gate on a band: p = T1/(b·r) against the limit (Mott §22-15), and
    the effort margin, effort × required torque / torque (linear statics)."""
    from dxfcheck.pipeline import check

    w, _ = simple_band_effort(9600.0, 0.22, 225, 200.0, 150.0, 700.0)
    path = tmp_path / "band.dxf"
    simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort=f"{w!r} N").save(path)
    p = 9600.0 / (80 * 200)
    j = check(
        path,
        overrides=[
            ("mu", "0.22"),
            ("lining_width", "80 mm"),
            ("lining_pressure_max", f"{p * 1.0001} MPa"),
            ("required_torque", "1110.72 N*m"),
            ("directions", "cw"),  # the anchor O tight (tests/validation/test_mott_machine_elements.py)
        ],
    )
    rules = {r.rule: r for r in j.rules}
    assert rules["band.pressure.band1"].value == pytest.approx(p, rel=1e-9)
    assert str(rules["band.pressure.band1"].verdict) == "pass"
    assert str(rules["band.taut.band1"].verdict) == "pass"
    eff = rules["effort.cw"]
    assert eff.limit == pytest.approx(w, rel=1e-12)
    assert eff.value == pytest.approx(w * 1110.72 / j.solutions[0.22].case("cw").torque_Nm, rel=1e-12)
    assert eff.margin == pytest.approx(1.0, rel=3e-5)


def test_marked_copy_shows_band_and_spring_forces(tmp_path):
    from dxfcheck.output.markup import plan_markup

    sol = _solve(tmp_path, differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort="300 N"), 0.25)
    kinds = {a.kind for a in plan_markup(sol, "cw").arrows}
    assert "band" in kinds
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), "3500 N T")
    sol = _solve(tmp_path, sk, 0.4)
    springs = [a for a in plan_markup(sol).arrows if a.kind == "spring"]
    assert len(springs) == 2 and all(a.force_N == pytest.approx(3500) for a in springs)
