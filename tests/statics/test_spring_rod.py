"""The usual spring-set arrangement: a pull rod pinned to one lever's top,
through the other lever, the setting spring on the rod between that lever
and a nut.  The rod's force is solved and it is a two-force member (pin and
spring at its ends), so the rod rules apply.

B. K. Sarkar, *Theory of Machines*, ch. 10, Illustration 3, p. 270
(published solution code): S = 3500 N on each lever at l = 450, x = 200,
a = 140, drum Ø360, μ' = 0.4489: Ft1 = μ'Sl/(x + μ'a) = 2690 N, Ft2 =
μ'Sl/(x − μ'a) = 5156 N, T = 1412.2 N·m.  Printed to 4 figures.
"""

from __future__ import annotations

import pytest
from common import spring_rod_double_block

import dxfcheck
from dxfcheck.gate.rules import Verdict
from dxfcheck.pipeline import check


@pytest.mark.parametrize("rod_first", [False, True])
@pytest.mark.parametrize("reverse", [False, True])
def test_spring_on_a_pull_rod(tmp_path, rod_first, reverse):
    path = tmp_path / "rod.dxf"
    spring_rod_double_block(rod_first=rod_first, reverse=reverse).save(path)
    sol = dxfcheck.analyse(path, mu=0.4489)
    sp = sol.mechanism.springs[0]
    # the end where the rod crosses the right lever acts on the lever, the nut's on the rod
    on = dict(zip(sp.ends, sp.parts, strict=True))
    assert on[(320.0, 250.0)] == "right lever"
    assert on[(400.0, 250.0)] == "pull rod"
    for c in sol.cases:
        ft = sorted(s.friction_lining_N for s in c.shoes)
        assert ft == [pytest.approx(2690, rel=5e-4), pytest.approx(5156, rel=5e-4)]
        assert c.torque_Nm == pytest.approx(1412.2, rel=2e-4)
        # the nut's balance: the rod carries the spring's 3500 N, in tension
        rod = c.member("pull rod")
        assert rod.ends == ("T1", "spring1")
        assert rod.axial_N == pytest.approx(3500.0, rel=1e-9)
        assert rod.length_mm == pytest.approx(720.0)
        # the rod pulls the left lever's top towards the drum (+x)
        t1 = next(a for a in c.pin("T1").attachments if a.body == "left lever")
        assert (t1.fx_N, t1.fy_N) == pytest.approx((3500.0, 0.0), abs=1e-6)


@pytest.mark.parametrize(("allow", "verdict"), [(11.15, Verdict.PASS), (11.13, Verdict.FAIL)])
def test_rod_rules_apply(tmp_path, allow, verdict):
    """σ = F/A = 3500/(π·20²/4) = 11.14 MPa (axial stress, Shigley's MED
    10th ed., ch. 3); the rod is always in tension, so no buckling check."""
    path = tmp_path / "rod.dxf"
    spring_rod_double_block().save(path)
    j = check(path, overrides=[("mu", "0.4"), ("rod_diameter", "20 mm"), ("rod_stress_allow", f"{allow} MPa")])
    r = next(r for r in j.rules if r.rule == "member.stress.pull rod")
    assert r.value == pytest.approx(3500 / (3.141592653589793 * 400 / 4), rel=1e-9)
    assert r.verdict is verdict
    assert next(r for r in j.rules if r.rule == "member.buckling.pull rod").verdict is Verdict.SKIP


def test_the_lever_guides_the_rod_across_its_axis(tmp_path):
    """The rod passes through the right lever's hole at the spring's seat
    (320, 250): a guide (G1) that holds it across its axis and lets it
    slide along it.  With the spring on the rod's axis nothing pushes the
    rod across, so the guide's force is zero and the brake's forces are
    those above; the rod no longer turns freely about T1 (no S301).  (The
    project's own model of the rod's guide; the statics by hand.)"""
    path = tmp_path / "rod.dxf"
    spring_rod_double_block().save(path)
    sol = dxfcheck.analyse(path, mu=0.4489)
    (g,) = sol.mechanism.guides
    assert (g.rod, g.part, g.at_mm, g.spring) == ("pull rod", "right lever", (320.0, 250.0), "spring1")
    assert g.axis == pytest.approx((1.0, 0.0)) or g.axis == pytest.approx((-1.0, 0.0))
    assert not [f for f in sol.findings if f.code.id == "S301"]
    for c in sol.cases:
        (gr,) = c.guides
        assert gr.force_N == (0.0, 0.0)
        assert c.torque_Nm == pytest.approx(1412.2, rel=2e-4)


def test_a_load_across_the_rod_is_carried_by_the_guide_and_the_pin(tmp_path):
    """500 N down on the rod halfway between T1 (-320, 250) and the guide
    (320, 250).  The rod's moments about T1: 320 × 500 = 640 × g, so the
    lever pushes the rod up with g = 250 N at the guide and the pin T1 takes
    the other 250 N (up on the rod); the lever is pushed down with 250 N.
    Both tops are straight above their pivots, so the vertical forces turn
    neither lever and the braking torque stays Sarkar's 1412.2 N·m.  (Rod
    statics by hand; the torque: B. K. Sarkar, as above; every force below
    was also worked independently from the statement alone, by a second
    hand, and agreed to the printed digits.)"""
    path = tmp_path / "rod.dxf"
    sk = spring_rod_double_block()
    sk.load(0.0, 250.0, 0.0, -1.0, "500 N")
    sk.save(path)
    sol = dxfcheck.analyse(path, mu=0.4489)
    for c in sol.cases:
        (gr,) = c.guides
        assert gr.force_N[0] == pytest.approx(0.0, abs=1e-9)
        assert gr.force_N[1] == pytest.approx(250.0, rel=1e-9)  # up on the rod: the direction checked
        t1 = next(p for p in c.pins if p.name == "T1")
        on_rod = next(a for a in t1.attachments if a.body == "pull rod")
        assert (on_rod.fx_N, on_rod.fy_N) == (pytest.approx(-3500.0, rel=1e-9), pytest.approx(250.0, rel=1e-9))
        assert c.torque_Nm == pytest.approx(1412.06, abs=0.01)
        # the levers' pivots, worked independently by hand (moments about each pivot, then force balance):
        # clockwise O left (+2492.10, -2439.85), O right (-7983.44, +5404.92); counter-clockwise swapped
        pivots = {p.name: next(a for a in p.attachments if a.body != "frame") for p in c.pins if p.name.startswith("O")}
        cw = {"O left": (2492.10, -2439.85), "O right": (-7983.44, 5404.92)}
        ccw = {"O left": (7983.44, 5404.92), "O right": (-2492.10, -2439.85)}
        for name, (fx, fy) in (cw if str(c.direction) == "cw" else ccw).items():
            assert (pivots[name].fx_N, pivots[name].fy_N) == (pytest.approx(fx, abs=0.01), pytest.approx(fy, abs=0.01))
    # the record's free-body tables hold the guide's push on both parts, and balance
    from dxfcheck.output.record import free_body

    c = sol.cases[0]
    tables = free_body(sol.mechanism, c)
    assert ("guide G1 (right lever)", (320.0, 250.0)) in [(w, at) for w, at, _ in tables["pull rod"]]
    lever = {w: f for w, _, f in tables["right lever"]}
    assert lever["guide G1 (pull rod)"][1] == pytest.approx(-250.0, rel=1e-9)  # the rod pushes the lever down
    for part, forces in tables.items():
        fx = sum(f[0] for _, _, f in forces)
        fy = sum(f[1] for _, _, f in forces)
        m = sum(at[0] * f[1] - at[1] * f[0] for _, at, f in forces)
        assert abs(fx) < 1e-6 and abs(fy) < 1e-6 and abs(m) < 1e-3, part
    # the marked-up copy and the record's picture draw it: on the rod, upwards
    from dxfcheck.output.figure import plan_figure
    from dxfcheck.output.markup import plan_markup

    arrows = [a for a in plan_markup(sol, c.direction).arrows if a.kind == "guide"]
    assert len(arrows) == 1 and arrows[0].head[1] > arrows[0].tail[1]
    (drawn,) = [a for a, _, _ in plan_figure(sol.mechanism, c, "guide").arrows if a.ref == "guide/G1"]
    assert drawn.force_N[1] > 0 and drawn.at_mm == (320.0, 250.0)


def test_sampling_refuses_a_guide_with_its_reason(tmp_path, capsys):
    from dxfcheck import cli

    path = tmp_path / "rod.dxf"
    spring_rod_double_block().save(path)
    rc = cli.main(["solve", str(path), "--mu", "0.35..0.45", "--samples", "100", "--pin-tolerance", "0.2mm"])
    err = capsys.readouterr().err
    assert rc == 2 and "does not yet move a guide with the pins: pull rod through right lever at (320, 250)" in err


def test_the_json_lists_each_cases_guides(tmp_path, capsys):
    """``solve --json`` writes each case's guides, valid against the schema."""
    from schema_check import output_json

    from dxfcheck import cli

    path = tmp_path / "rod.dxf"
    sk = spring_rod_double_block()
    sk.load(0.0, 250.0, 0.0, -1.0, "500 N")
    sk.save(path)
    assert cli.main(["solve", str(path), "--json", "--mu", "0.4489"]) == 0
    doc = output_json(capsys.readouterr().out)
    for case in doc["cases"]:
        (g,) = case["guides"]
        assert (g["name"], g["rod"], g["part"], g["at_mm"]) == ("G1", "pull rod", "right lever", [320.0, 250.0])
        assert g["force_N"][1] == pytest.approx(250.0, rel=1e-9)
