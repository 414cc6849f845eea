"""Hand calculations by published methods, shared by the stage tests and the
validation modules (``tests/validation/``); each names its source.  Also the
check of the symmetrically loaded pivoted shoe, which the worked examples of
two sources (FOSSEE book 764, Example 12.7; Jindal, Example 23-3) run through.
"""

from __future__ import annotations

import math

import pytest
from common import block_brake, pivoted_long_shoes

import dxfcheck
from dxfcheck.core.directions import Direction
from dxfcheck.pipeline import check
from dxfcheck.statics.contact.long_shoe import pivot_distance

__all__ = [
    "BLOCK_A",
    "BLOCK_CONTACT_DEG",
    "BLOCK_L",
    "BLOCK_MU",
    "BLOCK_P",
    "BLOCK_R",
    "BLOCK_X",
    "block_lever_N",
    "check_symmetric_pivoted_shoe",
    "hinged_shoe_closed_form",
    "run_rules",
    "save_block_brake",
    "simple_band_effort",
    "symmetric_normal_N",
]

#: The gate tests' block brake: block_brake(r=200, l=500, x=200, a=50),
#: P = 1000 N, μ = 0.35, a 20° block [mm, N, -, degrees].
BLOCK_R, BLOCK_L, BLOCK_X, BLOCK_A, BLOCK_P, BLOCK_MU = 200.0, 500.0, 200.0, 50.0, 1000.0, 0.35
BLOCK_CONTACT_DEG = 20.0


def block_lever_N(mu: float, energising: bool) -> float:
    """P·l = N(x ∓ μa) (Khurmi & Gupta, *Theory of Machines*, brakes; from memory)."""
    return BLOCK_P * BLOCK_L / (BLOCK_X - mu * BLOCK_A if energising else BLOCK_X + mu * BLOCK_A)


def save_block_brake(path):
    """The gate tests' block brake drawn at ``path``."""
    block_brake(r=BLOCK_R, l=BLOCK_L, x=BLOCK_X, a=BLOCK_A, effort=f"{BLOCK_P} N", contact_deg=BLOCK_CONTACT_DEG).save(
        path
    )
    return path


def run_rules(path, **spec):
    """The judgement of ``path`` with ``spec`` given as command-line texts,
    and its rules by name."""
    overrides = [(k, str(v)) for k, v in spec.items()]
    j = check(path, overrides=overrides)
    return {r.rule: r for r in j.rules}, j


def simple_band_effort(t1, mu, wrap_deg, r, anchor_run, arm):
    """W = T2·a/L for the simple band, a the arm of the slack piece about O
    worked out from the builder's geometry (Mott 4th ed., §22-15)."""
    t2 = t1 / math.exp(mu * math.radians(wrap_deg))
    s = math.radians(90 - wrap_deg / 2)
    e = math.radians(90 + wrap_deg / 2)
    pe = (r * math.cos(e), r * math.sin(e))
    o = (pe[0] - anchor_run * math.sin(e), pe[1] + anchor_run * math.cos(e))
    ps = (r * math.cos(s), r * math.sin(s))
    u = (math.sin(s), -math.cos(s))  # slack piece, leaving the drum
    t = (o[1] - ps[1]) / u[1]
    a_pin = (ps[0] + t * u[0], o[1])
    pull = (-u[0], -u[1])  # the band pulls the pin towards the drum
    arm_a = abs((a_pin[0] - o[0]) * pull[1] - (a_pin[1] - o[1]) * pull[0])
    return t2 * arm_a / arm, t2


def hinged_shoe_closed_form(pa, b, r, a, mu, t1, t2):
    """Shigley's MED (10th ed., §16-3; from memory for the equation numbers):
    MN, Mf about the hinge and T for p = pa·sinθ/sinθa."""
    ta = math.pi / 2 if t1 <= math.pi / 2 <= t2 else (t2 if t2 < math.pi / 2 else t1)
    sa = math.sin(ta)
    mn = pa * b * r * a / sa * ((t2 - t1) / 2 - (math.sin(2 * t2) - math.sin(2 * t1)) / 4)
    mf = mu * pa * b * r / sa * (r * (math.cos(t1) - math.cos(t2)) - a / 2 * (math.sin(t2) ** 2 - math.sin(t1) ** 2))
    t = mu * pa * b * r * r * (math.cos(t1) - math.cos(t2)) / sa
    return mn, mf, t


def symmetric_normal_N(pa, b, r, semi):
    """N = Rx = pa·b·r·(2θ2 + sin 2θ2)/2 (Shigley's MED, symmetric pivoted shoe)."""
    return pa * b * r * (2 * semi + math.sin(2 * semi)) / 2


def _solve(tmp_path, sk, mu):
    path = tmp_path / "long.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu)


def check_symmetric_pivoted_shoe(tmp_path, given_, published, direction):
    """Draw the example with ``common.pivoted_long_shoes`` (pin at the ideal
    distance a = 4r·sinθ2/(2θ2 + sin 2θ2)), solve it and compare with the
    printed answers ``published`` (a, torque, rx, ry) in ``direction``.

    Directions: at the ideal distance the friction moment about the pin
    vanishes, so both drum directions give the printed answers.  On each
    shoe the drum's normal resultant points out of the drum along the
    shoe's centreline (the right shoe's centreline is at 0°, the left
    one's at 180°) and its friction resultant, Ry = μN, along the drum
    surface's motion at the centreline's end: a counter-clockwise drum moves
    its surface at polar angle c along (−sin c, cos c), up on the right
    and down on the left; clockwise the other way.  The pin holds the shoe
    with the opposite force (a two-force body)."""
    semi = math.radians(given_["semi_deg"])
    r, b, mu, pa = given_["r"], given_["b"], given_["mu"], given_["pa"]
    a = pivot_distance(r, semi)
    assert a == pytest.approx(published["a"], rel=2e-5)
    # effort that makes the pin push the shoe with Rx (lever ratio 2:1)
    effort = symmetric_normal_N(pa, b, r, semi) / 2
    sol = _solve(
        tmp_path, pivoted_long_shoes(r=r, semi_deg=given_["semi_deg"], a=a, effort_N=effort, pair=given_["pair"]), mu
    )
    case = sol.case(direction)
    for s in case.shoes:
        assert s.model == "long-pivoted"
        assert s.pressure_offset_deg == pytest.approx(0.0, abs=1e-7)  # ψ = 0 at the ideal pin distance
        assert s.peak_line_load_N_per_mm / b == pytest.approx(pa, rel=1e-9)
        assert s.normal_N == pytest.approx(published["rx"], rel=5e-5)
        assert s.friction_resultant_N == pytest.approx(mu * s.normal_N, rel=1e-9)  # Ry = μN
        if published["ry"] is not None:
            assert s.friction_resultant_N == pytest.approx(published["ry"], rel=2e-4)
        # the friction summed over the lining is T/r = (a/r)·μN, larger than the resultant Ry
        assert s.friction_lining_N == pytest.approx(a / r * mu * s.normal_N, rel=1e-9)
        assert s.friction_lining_N * r / 1000 == pytest.approx(s.torque_Nm, rel=1e-12)
        # T = a·μ·N = 2μ·pa·b·r²·sinθ2 per shoe
        assert s.torque_Nm == pytest.approx(2 * mu * pa * b * r**2 * math.sin(semi) / 1000, rel=1e-9)
        assert s.torque_Nm == pytest.approx(a * mu * s.normal_N / 1000, rel=1e-9)
        # the pin reaction on the shoe is the drum's resultant (two-force body)
        pin = case.pin(next(x.pin for x in sol.mechanism.shoes if x.name == s.name))
        on_shoe = next(att for att in pin.attachments if att.body == s.part)
        assert math.hypot(on_shoe.fx_N, on_shoe.fy_N) == pytest.approx(math.hypot(*s.force_N), rel=1e-9)
        # directions (see the docstring): the drawn pin's side gives the centreline
        side = 1.0 if pin.x_mm > 0 else -1.0  # +1: right shoe, centreline at 0°; -1: left, 180°
        surface_up = Direction(direction).sign * side  # +1 where the surface moves up at the centreline
        tol = 1e-6 * s.normal_N  # ψ is zero to 1e-7°
        assert s.normal_force_N == pytest.approx((side * s.normal_N, 0.0), abs=tol)
        assert s.friction_force_N == pytest.approx((0.0, surface_up * mu * s.normal_N), abs=tol)
        assert (on_shoe.fx_N, on_shoe.fy_N) == pytest.approx((-s.force_N[0], -s.force_N[1]), abs=tol)
        assert s.torque_Nm > 0  # against the drum's motion
    assert case.torque_Nm == pytest.approx(published["torque"], rel=2e-5)
