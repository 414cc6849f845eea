"""Every judged rule states its formula and the values put into it (the
calculation record prints them and never recomputes).  The substituted
values are checked against the rule's own value and limit, and one rule of
each kind against its published formula worked by hand (sources beside)."""

from __future__ import annotations

import math

import pytest
from common import ROOT

from dxfcheck.gate.rules import Verdict
from dxfcheck.pipeline import check

DEMOS = sorted((ROOT / "drawings").glob("*.dxf"))
#: Rules whose value or limit the substituted text states in other words
#: (a count, a range, "needs > 0").
WORDED = ("drawing.", "shoe.contact.", "band.taut.", "self_lock.")


def _g(x: float) -> str:
    return f"{x:.4g}"


@pytest.fixture(scope="module")
def judgements():
    return {p.stem: check(p) for p in DEMOS}


def test_every_judged_rule_has_formula_and_values(judgements):
    seen = 0
    for name, j in judgements.items():
        for r in j.rules:
            if r.verdict is Verdict.SKIP:
                assert r.formula == "" and r.substituted == "", r.rule
                continue
            assert r.formula and r.substituted, (name, r.rule)
            if r.rule.startswith(WORDED):
                continue
            assert r.value is not None and _g(r.value) in r.substituted, (name, r.rule, r.substituted)
            assert r.limit is not None and _g(r.limit) in r.substituted, (name, r.rule, r.substituted)
            seen += 1
    assert seen >= 20


def test_pin_rules_substitute_the_published_formulas(judgements):
    """Shear τ = F/(n·πd²/4) and bearing p = F/(d·L) (Shigley's MED 10th
    ed., ch. 3; from memory), worked here from the rule's inputs."""
    j = judgements["winch_two_shoe"]
    rules = {r.rule: r for r in j.rules}
    shear, bearing = rules["pin.shear.S1"], rules["pin.bearing.S1"]
    f, d, n = shear.inputs["force_N"], shear.inputs["diameter_mm"], shear.inputs["shear_planes"]
    tau = f / (n * math.pi * d**2 / 4)
    assert math.isclose(shear.value, tau, rel_tol=1e-12)
    assert shear.substituted.startswith(f"τ = {_g(f)} N / ({n:g} × π × {_g(d)}² mm² / 4) = {_g(tau)} MPa")
    length = bearing.inputs["pin_length_mm"]
    p = f / (d * length)
    assert math.isclose(bearing.value, p, rel_tol=1e-12)
    assert bearing.substituted.startswith(f"p = {_g(f)} N / ({_g(d)} mm × {_g(length)} mm) = {_g(p)} MPa")
    assert bearing.verdict is (Verdict.PASS if p <= bearing.limit else Verdict.FAIL)


def test_torque_rule_substitutes_torque_and_duty(judgements):
    """T(μ_min) ≥ T_req: the torque at μ_min of the solve at μ_min, the duty
    from the spec (drawings/dxfcheck.toml: 1650 N·m)."""
    j = judgements["winch_two_shoe"]
    r = next(r for r in j.rules if r.rule == "torque.cw")
    t = j.solutions[j.mu_min].case("cw").torque_Nm
    assert r.substituted.startswith(f"T = {_g(t)} N·m at μ_min = {j.mu_min:g}, cw; T_req = 1650 N·m")
