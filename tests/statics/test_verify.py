"""Every solve checks its own answer, and the checks catch backwards physics.

Invariants rather than matched numbers, over every brake in the catalogue
(``common.CATALOGUE``), both shoe theories and both drum directions:

* equilibrium of every part and pin from the reported forces (Beer &
  Johnston, *Vector Mechanics for Engineers: Statics*, 11th ed., ch. 4);
* the braking torque recomputed as the moment, about the drum axis, of the
  forces the shoes and bands put on the drum, opposing the drum's motion;
* friction on a shoe acts along the drum surface's motion (Coulomb: it
  opposes the slip of the lining over the drum), so on the drum against it;
* a band is tightest where the drum surface moves away from it: along the
  motion dT/dφ = −μT (belt friction, Beer & Johnston ch. 8.10).

This file also feeds the checker reversed bands and shoes and sees it
refuse them, and checks that the marked-up arrows are the solver's vectors.
"""

from __future__ import annotations

import dataclasses
import math
import re

import pytest
from common import CATALOGUE, capstan_band, conveyor_block, winch_two_shoe
from schema_check import output_json

import dxfcheck
from dxfcheck import cli
from dxfcheck.core.errors import VerificationError
from dxfcheck.core.findings import Severity
from dxfcheck.output.markup import plan_markup
from dxfcheck.statics.contact import Direction, surface_tangent
from dxfcheck.statics.verify import drum_moment_Nmm, verify_case

MODELS = ("short", "long")


@pytest.fixture(scope="module")
def solved(tmp_path_factory):
    """name -> shoe model -> Solution, each catalogue brake solved once."""
    out = {}
    folder = tmp_path_factory.mktemp("catalogue")
    for k, (name, (build, mu)) in enumerate(CATALOGUE.items()):
        path = folder / f"b{k}.dxf"
        build().save(path)
        out[name] = {m: dxfcheck.analyse(path, mu=mu, shoe_model=m) for m in MODELS}
    return out


def _braking(case):
    return not any(f.severity is Severity.ERROR for f in case.findings)


def _cross(r, f):
    return r[0] * f[1] - r[1] * f[0]


@pytest.mark.parametrize("model", MODELS)
@pytest.mark.parametrize("name", list(CATALOGUE))
def test_torque_is_the_moment_of_the_forces_on_the_drum(solved, name, model):
    sol = solved[name][model]
    c = sol.mechanism.drum.center
    for case in sol.cases:
        assert _braking(case), case.findings
        # shoes: minus the drum's normal and friction resultants on the shoe;
        # bands: each end pulls the drum from its tangent point towards its pin
        m = 0.0
        for s in case.shoes:
            for at, f in ((s.normal_at_mm, s.normal_force_N), (s.friction_at_mm, s.friction_force_N)):
                m -= _cross((at[0] - c[0], at[1] - c[1]), f)
        for b in case.bands:
            for e in b.ends:
                m += _cross((e.tangent_mm[0] - c[0], e.tangent_mm[1] - c[1]), (-e.pull_N[0], -e.pull_N[1]))
        assert m == pytest.approx(drum_moment_Nmm(sol.mechanism, case), rel=1e-12)
        # counter-clockwise positive: a braking torque turns against the drum
        assert m / 1000 == pytest.approx(-case.direction.sign * case.torque_Nm, rel=1e-9)
        assert case.torque_Nm > 0
        assert math.copysign(1, m) == -case.direction.sign


@pytest.mark.parametrize("model", MODELS)
@pytest.mark.parametrize("name", list(CATALOGUE))
def test_friction_and_tight_end_follow_the_drum(solved, name, model):
    sol = solved[name][model]
    cx, cy = sol.mechanism.drum.center
    for case in sol.cases:
        for s in case.shoes:
            assert s.normal_N > 0
            # on the shoe, friction points along the surface's motion at the lining
            mid = math.radians(
                0.5 * (s.contact_from_deg + s.contact_to_deg + (360 if s.contact_to_deg < s.contact_from_deg else 0))
            )
            v = surface_tangent(mid, case.direction)
            assert s.friction_force_N[0] * v[0] + s.friction_force_N[1] * v[1] > 0
            # the normal resultant runs through the drum axis; the friction
            # line lies at r (short shoe) or beyond it (long shoe)
            assert _cross((s.normal_at_mm[0] - cx, s.normal_at_mm[1] - cy), s.normal_force_N) == pytest.approx(
                0, abs=1e-9 * abs(s.normal_N) * sol.mechanism.drum.radius_mm
            )
            d = math.hypot(s.friction_at_mm[0] - cx, s.friction_at_mm[1] - cy)
            assert d >= sol.mechanism.drum.radius_mm * (1 - 1e-9)
            assert s.friction_lining_N * sol.mechanism.drum.radius_mm / 1000 == pytest.approx(s.torque_Nm, rel=1e-12)
            assert s.friction_lining_N >= s.friction_resultant_N * (1 - 1e-12)
        for b in case.bands:
            assert b.tight_N > b.slack_N > 0
            for e in b.ends:
                v = surface_tangent(math.atan2(e.tangent_mm[1] - cy, e.tangent_mm[0] - cx), case.direction)
                leaving = (-e.pull_N[0], -e.pull_N[1])  # from the drum towards the pin
                # the surface moves away from the tight end: against the band's way out
                moves_away = v[0] * leaving[0] + v[1] * leaving[1] < 0
                assert moves_away == e.tight
                assert e.pin == (b.tight_pin if e.tight else b.slack_pin)


@pytest.mark.parametrize("model", MODELS)
@pytest.mark.parametrize("name", list(CATALOGUE))
def test_arrows_are_the_solved_vectors(solved, name, model):
    """The marked-up copy draws the solver's vectors at their points of
    application, for every contact model; its labels name their magnitudes."""
    sol = solved[name][model]
    for case in sol.cases:
        mk = plan_markup(sol, case.direction)
        arrows = {(a.kind, a.name, a.tail): a for a in mk.arrows}
        expected = []
        for s in case.shoes:
            expected.append(("normal", s.name, s.normal_at_mm, s.normal_force_N, s.normal_N))
            expected.append(("friction", s.name, s.friction_at_mm, s.friction_force_N, s.friction_resultant_N))
        for b in case.bands:
            for e in b.ends:
                expected.append(("band", b.name, sol.mechanism.pin(e.pin).center, e.pull_N, e.tension_N))
        for sp in case.springs:
            for e in sp.ends:
                if e.part is not None:
                    expected.append(("spring", sp.name, e.at_mm, e.force_N, sp.force_N))
        for p in case.pins:
            expected.append(("pin", p.name, (p.x_mm, p.y_mm), (p.fx_N, p.fy_N), p.force_N))
        for kind, nm, tail, force, size in expected:
            a = arrows[(kind, nm, tail)]
            assert a.force == force
            drawn = (a.head[0] - a.tail[0], a.head[1] - a.tail[1])
            assert math.hypot(*drawn) == pytest.approx(mk.mm_per_N * math.hypot(*force), rel=1e-12)
            assert _cross(drawn, force) == pytest.approx(0, abs=1e-9 * math.hypot(*force) * math.hypot(*drawn))
            assert drawn[0] * force[0] + drawn[1] * force[1] >= 0
            assert math.hypot(*force) == pytest.approx(abs(size), rel=1e-12)
        assert len(arrows) == len(expected) + len(case.loads)


def test_long_shoe_arrows_match_their_labels(tmp_path):
    """The winch demo's long pivoted shoes: the friction arrow is as long as
    its label says (the resultant), and the lining's friction sum is
    reported beside it."""
    path = tmp_path / "w.dxf"
    winch_two_shoe().save(path)
    sol = dxfcheck.analyse(path, mu=0.35)
    mk = plan_markup(sol, "cw")
    for s in sol.case("cw").shoes:
        (fr,) = [a for a in mk.arrows if a.kind == "friction" and a.name == s.name]
        assert fr.force_N == pytest.approx(s.friction_resultant_N, rel=1e-12)
        label_kN = float(fr.label.split()[-2]) if fr.label.endswith("kN") else float(fr.label.split()[-2]) / 1000
        assert label_kN * 1000 == pytest.approx(fr.force_N, rel=5e-3)
        assert s.friction_lining_N > s.friction_resultant_N  # 70° of lining


# --- the checker refuses backwards physics ------------------------------------


def _capstan(tmp_path):
    path = tmp_path / "capstan.dxf"
    capstan_band().save(path)
    return path


def _old_band_direction(monkeypatch):
    """The band model as it was: the tight end exchanged."""
    from dxfcheck.statics import equations, solver

    for module in (equations, solver):
        monkeypatch.setattr(module, "tight_at_end", lambda d: d is Direction.CCW)


def test_checker_refuses_a_band_with_its_ends_exchanged(tmp_path):
    """Swap which end is reported tight (keeping the tensions where they act):
    the check on the tight end refuses it."""
    sol = dxfcheck.analyse(_capstan(tmp_path), mu=0.35)
    case = sol.case("cw")
    (band,) = case.bands
    ends = tuple(dataclasses.replace(e, tight=not e.tight) for e in band.ends)
    bad = dataclasses.replace(case, bands=(dataclasses.replace(band, ends=ends),))
    with pytest.raises(VerificationError, match="band tight end"):
        verify_case(sol.mechanism, bad)


def test_solver_with_the_old_band_direction_is_refused(tmp_path, monkeypatch):
    """The band model as it was (tight end exchanged): its result speeds the
    drum up, and the solve refuses to report it."""
    _old_band_direction(monkeypatch)
    with pytest.raises(VerificationError, match="drum torque"):
        dxfcheck.analyse(_capstan(tmp_path), mu=0.35)


def _reverse_short(monkeypatch):
    from dxfcheck.statics.contact import short_shoe

    monkeypatch.setattr(short_shoe, "surface_tangent", lambda a, d: surface_tangent(a, d.mirrored()))


def _reverse_long(monkeypatch):
    from dxfcheck.statics.contact import long_shoe

    original = long_shoe._integrate

    def backwards(name, shoe, drum, phi0, phi1, shape, mu, direction, full, findings=()):
        return original(name, shoe, drum, phi0, phi1, shape, mu, direction.mirrored(), full, findings)

    monkeypatch.setattr(long_shoe, "_integrate", backwards)


@pytest.mark.parametrize(
    ("reverse", "build", "model"),
    [
        (_reverse_short, conveyor_block, "short"),
        (_reverse_short, winch_two_shoe, "short"),
        (_reverse_long, winch_two_shoe, "long"),
        (_reverse_long, lambda: CATALOGUE["internal hinged pair"][0](), "long"),
    ],
)
def test_solver_with_friction_reversed_is_refused(tmp_path, monkeypatch, reverse, build, model):
    """Friction on the shoe along the drum's motion instead of against it
    (backwards): the solve refuses to report it, for short fixed, short
    pivoted, long pivoted and long hinged shoes."""
    reverse(monkeypatch)
    path = tmp_path / "w.dxf"
    build().save(path)
    with pytest.raises((VerificationError, dxfcheck.SolveError)) as info:
        dxfcheck.analyse(path, mu=0.3, shoe_model=model)
    # a pivoted short shoe reversed cannot even be placed (its contact point
    # is set by the friction): a refusal too; every other one is the check's
    if info.type is dxfcheck.SolveError:
        assert build is winch_two_shoe and model == "short"
    else:
        assert re.search("drum torque|shoe friction", str(info.value))


def test_checker_refuses_an_unbalanced_part(tmp_path):
    path = tmp_path / "w.dxf"
    winch_two_shoe().save(path)
    sol = dxfcheck.analyse(path, mu=0.35)
    case = sol.case("ccw")
    s = case.shoes[0]
    shifted = dataclasses.replace(s, normal_force_N=(s.normal_force_N[0] * 1.001, s.normal_force_N[1] * 1.001))
    with pytest.raises(VerificationError, match="part balance"):
        verify_case(sol.mechanism, dataclasses.replace(case, shoes=(shifted, *case.shoes[1:])))


def test_cli_reports_a_failed_check_as_an_internal_error(tmp_path, monkeypatch, capsys):
    _old_band_direction(monkeypatch)
    code = cli.main(["solve", str(_capstan(tmp_path)), "--json"])
    out, err = capsys.readouterr()
    assert code == cli.EXIT_INTERNAL == 3
    doc = output_json(out)  # one JSON document, without a result
    assert doc["error"]["kind"] == "internal" and "cases" not in doc and "drum torque" in doc["error"]["message"]
    assert "internal error" in err and "drum torque" in err and "capstan.dxf" in err


def _offset_winch(sy1, sy2, mid1, half1, mid2, half2):
    """The winch's linkage with its shoe pins and linings moved (found by a
    random sweep of such drawings, where the check first caught a long
    pivoted shoe whose contact had shrunk to its lining's edge)."""
    from dxfcheck.output.sketch import Sketch

    sk = Sketch()
    sk.drum(0, 0, 200)
    for x, sy, mid, half, tag in ((-250, sy1, mid1, half1, "1"), (250, sy2, mid2, half2, "2")):
        top = 520 if x < 0 else 420
        sk.pivot(x, -320, 30, label=f"O{tag}")
        sk.pin(x, sy, 24, label=f"S{tag}")
        sk.pin(x, top, 20, label=f"T{tag}")
        sk.link((x, -320), (x, sy), (x, top))
        t = math.radians(mid)
        sk.link((x, sy), (200 * math.cos(t), 200 * math.sin(t)))
        sk.shoe(0, 0, 200, mid - half, mid + half)
    sk.pin(250, 520, 20, label="C")
    sk.link((250, 520), (250, 420), (580, 420))
    sk.link((-250, 520), (250, 520))
    sk.load(580, 420, 1, 0, "1.8 kN", length=90)
    return sk


def test_contact_on_the_lining_edge_is_refused_not_reported(tmp_path):
    """Where no contact patch with positive pressure balances the loads (here
    the right shoe's patch shrinks to its lining's edge), the solve refuses
    with S313 naming the shoe, instead of a result with a line load of
    ~10^17 N/mm that would fail its own balance."""
    from dxfcheck.core.findings import Code

    path = tmp_path / "edge.dxf"
    _offset_winch(-120.895, 112.553, 146.281, 12.714, 5.137, 59.728).save(path)
    with pytest.raises(dxfcheck.SolveError) as info:
        dxfcheck.analyse(path, mu=0.62, shoe_model="long")
    (f,) = [f for f in info.value.findings if f.code is Code.CONTACT_UNSETTLED]
    assert f.handles and f.layers == ("SHOE",)


def test_moved_pins_and_linings_never_give_an_unchecked_answer(tmp_path):
    """A derandomised sweep of 24 winch linkages with their shoe pins and
    linings moved, at random μ, short and long theory: each either solves
    (and so passed every check of its own answer) or is refused with coded
    findings; none ends in an internal error."""
    import random

    rng = random.Random(11)
    outcomes = {"solved": 0, "refused": 0}
    for k in range(24):
        sk = _offset_winch(
            rng.uniform(-150, 150),
            rng.uniform(-150, 150),
            180 + rng.uniform(-40, 40),
            rng.uniform(3, 120),
            rng.uniform(-40, 40),
            rng.uniform(3, 120),
        )
        path = tmp_path / f"s{k}.dxf"
        sk.save(path)
        for model in ("short", "long"):
            try:
                dxfcheck.analyse(path, mu=rng.uniform(0.05, 0.8), shoe_model=model)
                outcomes["solved"] += 1
            except dxfcheck.SolveError as exc:
                assert exc.findings or "singular" in str(exc)
                outcomes["refused"] += 1
    assert outcomes["solved"] > 12 and outcomes["refused"] > 0
