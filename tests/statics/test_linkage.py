"""The two-shoe winch demo's linkage: pivoted-shoe law, equilibrium of every
part, two-force members, and an independent cross-check with sympy."""

from __future__ import annotations

import math

import pytest
import sympy as sp
from common import frame_bellcrank_two_shoe, winch_two_shoe

import dxfcheck
from dxfcheck.core.findings import Code

MU = 0.35


@pytest.fixture(scope="module")
def winch(tmp_path_factory):
    path = tmp_path_factory.mktemp("winch") / "winch.dxf"
    winch_two_shoe().save(path)
    return dxfcheck.analyse(path, mu=MU, shoe_model="short")


@pytest.mark.parametrize("direction", ["cw", "ccw"])
def test_pivoted_shoe_resultant(winch, direction):
    """Short pivoted shoe: the drum's resultant passes through the shoe pin
    and is inclined at the friction angle atan(μ) to the normal at its
    contact point (Shigley's MED, 10th ed., ch. 16, short-shoe assumption;
    friction circle of radius r·sin φ: Khurmi & Gupta, friction chapter,
    from memory)."""
    mech = winch.mechanism
    case = winch.case(direction)
    for s in case.shoes:
        shoe = next(x for x in mech.shoes if x.name == s.name)
        pin = mech.pin(shoe.pin).center
        c, f = s.contact_mm, s.force_N
        n = ((c[0] - mech.drum.center[0]) / mech.drum.radius_mm, (c[1] - mech.drum.center[1]) / mech.drum.radius_mm)
        angle = math.atan2(abs(n[0] * f[1] - n[1] * f[0]), n[0] * f[0] + n[1] * f[1])
        assert angle == pytest.approx(math.atan(MU), abs=1e-10)
        rel = (pin[0] - c[0], pin[1] - c[1])
        miss = abs(rel[0] * f[1] - rel[1] * f[0]) / math.hypot(*f)
        assert miss == pytest.approx(0.0, abs=1e-9)
        # distance from the drum axis to the line of action: r·sin φ
        arm = abs(n[0] * mech.drum.radius_mm * f[1] - n[1] * mech.drum.radius_mm * f[0]) / math.hypot(*f)
        assert arm == pytest.approx(mech.drum.radius_mm * math.sin(math.atan(MU)), rel=1e-10)


@pytest.mark.parametrize("direction", ["cw", "ccw"])
def test_every_part_in_equilibrium(winch, direction):
    """ΣF = 0 and ΣM = 0 on every part, summed from the reported forces alone
    (Beer & Johnston, *Vector Mechanics for Engineers: Statics*, ch. 4)."""
    case = winch.case(direction)
    sums: dict[str, list[float]] = {p.name: [0.0, 0.0, 0.0] for p in winch.mechanism.parts}

    def add(part, at, f):
        s = sums[part]
        s[0] += f[0]
        s[1] += f[1]
        s[2] += at[0] * f[1] - at[1] * f[0]

    for p in case.pins:
        for a in p.attachments:
            if a.body != "frame":
                add(a.body, (p.x_mm, p.y_mm), (a.fx_N, a.fy_N))
    for s in case.shoes:
        add(s.part, s.contact_mm, s.force_N)
    for ld in case.loads:
        add(ld.part, (ld.x_mm, ld.y_mm), (ld.fx_N, ld.fy_N))
    scale = max(s.normal_N for s in case.shoes)
    for fx, fy, m in sums.values():
        assert abs(fx) < 1e-9 * scale
        assert abs(fy) < 1e-9 * scale
        assert abs(m) < 1e-9 * scale * 1000
    # every pin is in equilibrium too (massless pin)
    for p in case.pins:
        assert abs(sum(a.fx_N for a in p.attachments)) < 1e-9 * scale
        assert abs(sum(a.fy_N for a in p.attachments)) < 1e-9 * scale


def test_two_force_member_along_its_line(winch):
    """A two-force member carries its load along the line joining its pins
    (Beer & Johnston, Statics, 11th ed., two-force members; section from memory)."""
    for case in winch.cases:
        (rod,) = case.members
        assert rod.name == "tie rod"
        a, b = (case.pin(n) for n in rod.ends)
        ux, uy = (b.x_mm - a.x_mm) / rod.length_mm, (b.y_mm - a.y_mm) / rod.length_mm
        on_rod = next(x for x in b.attachments if x.body == "tie rod")
        assert abs(on_rod.fx_N * uy - on_rod.fy_N * ux) < 1e-9 * abs(rod.axial_N)
        assert rod.state == "tension"


def _sympy_winch(direction: str):
    """The winch brake written out by hand as free-body equations and solved
    by sympy, independently of dxfcheck's assembly.

    Geometry (drawings/build.py): drum r = 200 at O; left lever O1(-250,-320)
    S1(-250,0) T1(-250,520); right lever O2(250,-320) S2(250,0) T2(250,420);
    bell crank floating on T2 with pins C(250,520) and effort P = 1800 N down
    at W(580,420); tie rod T1-C.

    Each pivoted shoe is a two-force body: the drum's resultant R acts at a
    contact point K on the drum and points from K towards the shoe pin; at K
    it makes the friction angle φ with the outward radius, tilted towards the
    drum surface's motion.  K is found from that angle condition with
    sympy.nsolve; then the linear equilibrium of lever, lever and bell crank
    is solved with sympy.linsolve.
    """
    r, P, mu = 200, 1800, sp.Rational(35, 100)
    phi = sp.atan(mu)
    s = 1 if direction == "ccw" else -1
    unknowns = sp.symbols("R1 R2 O1x O1y O2x O2y T Bx By")
    R1, R2, O1x, O1y, O2x, O2y, T, Bx, By = unknowns
    dirs = {}
    for name, (px, py), guess in (("1", (-250, 0), math.pi), ("2", (250, 0), 0.0)):
        al = sp.Symbol("al")
        kx, ky = r * sp.cos(al), r * sp.sin(al)
        vx, vy = px - kx, py - ky  # from contact point to pin
        ux, uy = sp.cos(al), sp.sin(al)  # outward radius
        tx, ty = -s * sp.sin(al), s * sp.cos(al)  # surface motion
        # angle between radius and resultant equals phi, on the motion side
        cond = (vx * tx + vy * ty) - sp.tan(phi) * (vx * ux + vy * uy)
        a = float(sp.nsolve(cond, al, guess))
        dx, dy = float(vx.subs(al, a)), float(vy.subs(al, a))
        n = math.hypot(dx, dy)
        dirs[name] = (dx / n, dy / n)
    (d1x, d1y), (d2x, d2y) = dirs["1"], dirs["2"]
    eqs = [
        # bell crank about T2: rod pulls C towards T1 (-x), P down at W
        -T + Bx,
        By - P,
        100 * T - 330 * P,
        # left lever: shoe pushes on S1 along the resultant, rod pulls T1 +x
        O1x + R1 * d1x + T,
        O1y + R1 * d1y,
        -320 * R1 * d1x - 840 * T,  # moments about O1: S1 is 320 above, T1 840
        # right lever: bell crank's reaction on T2 is (-Bx, -By)
        O2x + R2 * d2x - Bx,
        O2y + R2 * d2y - By,
        -320 * R2 * d2x + 740 * Bx,  # moments about O2: S2 320 above, T2 740
    ]
    (sol,) = sp.linsolve(eqs, unknowns)
    vals = dict(zip(unknowns, (float(v) for v in sol), strict=True))
    vals["N1"] = vals[R1] * math.cos(math.atan(0.35))
    vals["N2"] = vals[R2] * math.cos(math.atan(0.35))
    return vals


@pytest.mark.parametrize("direction", ["cw", "ccw"])
def test_winch_against_sympy(winch, direction):
    """Cross-check of one full linkage against hand-written equations solved
    with sympy (a general-purpose reference library from the registry)."""
    ref = _sympy_winch(direction)
    case = winch.case(direction)
    _, _, O1x, O1y, O2x, O2y, T, _, _ = sp.symbols("R1 R2 O1x O1y O2x O2y T Bx By")
    assert case.shoe("left shoe").normal_N == pytest.approx(ref["N1"], rel=1e-9)
    assert case.shoe("right shoe").normal_N == pytest.approx(ref["N2"], rel=1e-9)
    assert case.member("tie rod").axial_N == pytest.approx(ref[T], rel=1e-9)
    o1 = case.pin("O1").attachments
    on_lever = next(a for a in o1 if a.body == "left lever")
    assert on_lever.fx_N == pytest.approx(ref[O1x], rel=1e-9)
    assert on_lever.fy_N == pytest.approx(ref[O1y], abs=1e-6 * abs(ref[O1x]))
    on_lever2 = next(a for a in case.pin("O2").attachments if a.body == "right lever")
    assert on_lever2.fx_N == pytest.approx(ref[O2x], rel=1e-9)
    assert on_lever2.fy_N == pytest.approx(ref[O2y], rel=1e-9)


def test_frame_pivoted_bell_crank_is_redundant(tmp_path):
    """Two shoes set by a linkage with one degree of freedom are statically
    indeterminate (Grübler count 3·7 − 2·9 − 2 = 1 against two free shoe
    rockings; Beer & Johnston, Statics, improper and redundant supports; section from memory)."""
    path = tmp_path / "bc.dxf"
    frame_bellcrank_two_shoe().save(path)
    with pytest.raises(dxfcheck.SolveError) as info:
        dxfcheck.analyse(path, mu=MU)
    codes = {f.code for f in info.value.findings}
    assert codes == {Code.REDUNDANT}
