"""R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering
Design*, 10th ed., McGraw-Hill, 2015, ch. 16, Problem 16-1 (published
answers, ../shared/REFERENCES.md [seen]): an internal two-shoe brake,
r = 150 mm, both shoes hinged on one pin a = 125 below the drum axis,
linings from θ = 0 to 120° measured from the hinge line, b = 40 mm,
μ = 0.28, actuating forces F = 2.2 kN at an arm c = 216.5 about the hinge.
Answers: the right-hand shoe has pa = 734.5 kPa and T = 277.6 N·m, the
left-hand shoe T = 144.4 N·m, the total 422 N·m.  The closed forms
(§16-3: p = pa·sinθ/sinθa, MN, Mf, T) are in ``handcalc.hinged_shoe_closed_form``.

Directions.  The figure's arrow for the drum was not re-read (from memory);
the printed answers make the right-hand shoe the self-energising one
(F·c = MN − Mf gives its larger pa).  In our drawing (hinge H at (0, −125),
the right lining over polar angles −90°..30°, its actuating force (+F, 0) at
(20, 91.5)) the right shoe energises when the drum turns clockwise: F turns
the shoe clockwise about H (moment −216.5·F), and a clockwise drum's
friction on the lining at polar angle θ, along (sinθ, −cosθ), has the
moment −r·(r + 125·sinθ) about H, negative over the whole lining since
r = 150 > 125: the same sense, so friction helps F press the shoe out.
Counter-clockwise the left shoe, the mirror image, energises and carries the
printed right-hand values.  Both shoes brake in both directions.
"""

from __future__ import annotations

import math

import pytest
from common import internal_hinged_shoe
from handcalc import hinged_shoe_closed_form

import dxfcheck
from dxfcheck.output.sketch import Sketch


def _solve(tmp_path, sk, mu, **kw):
    path = tmp_path / "long.dxf"
    sk.save(path)
    return dxfcheck.analyse(path, mu=mu, **kw)


def problem_16_1() -> Sketch:
    """Problem 16-1 geometry: r = 150, hinge a = 125 from the axis (both
    shoes on one hinge pin, below the axis), linings from θ = 0 to 120°
    measured from the hinge line, actuating forces 2.2 kN at an arm
    c = 216.5 about the hinge (horizontal, 91.5 above the axis)."""
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(0, -125, 12, label="H")
    internal_hinged_shoe(
        sk,
        r=150,
        hinge=(0, -125),
        phi_from=-90,
        phi_to=30,
        act=(20, 91.5),
        push=(1, 0),
        effort="2.2 kN",
        name="right",
        hinge_drawn=False,
    )
    internal_hinged_shoe(
        sk,
        r=150,
        hinge=(0, -125),
        phi_from=150,
        phi_to=270,
        act=(-20, 91.5),
        push=(-1, 0),
        effort="2.2 kN",
        name="left",
        hinge_drawn=False,
    )
    return sk


def test_problem_16_1(tmp_path):
    """Problem 16-1: right shoe pa = 734.5 kPa, T = 277.6 N·m; left shoe
    T = 144.4 N·m; total 422 N·m.  b = 40 mm, μ = 0.28."""
    b, mu, r, a, c, F = 40.0, 0.28, 150.0, 125.0, 216.5, 2200.0
    sol = _solve(tmp_path, problem_16_1(), mu)
    mn, mf, t_unit = hinged_shoe_closed_form(1.0, b, r, a, mu, 0.0, math.radians(120))
    for case in sol.cases:
        shoes = sorted(case.shoes, key=lambda s: -s.torque_Nm)
        energising, other = shoes
        assert {s.model for s in shoes} == {"long-hinged"}
        pa_e = energising.peak_line_load_N_per_mm / b
        pa_o = other.peak_line_load_N_per_mm / b
        # closed forms: F·c = MN − Mf (self-energising), MN + Mf (other)
        assert pa_e == pytest.approx(F * c / (mn - mf), rel=1e-9)
        assert pa_o == pytest.approx(F * c / (mn + mf), rel=1e-9)
        assert energising.torque_Nm == pytest.approx(pa_e * t_unit / 1000, rel=1e-9)
        # published answers, 4 figures
        assert pa_e == pytest.approx(0.7345, rel=5e-4)
        assert energising.torque_Nm == pytest.approx(277.6, rel=5e-4)
        assert other.torque_Nm == pytest.approx(144.4, rel=5e-4)
        assert case.torque_Nm == pytest.approx(422, rel=1.5e-3)
        # peak pressure at θa = 90° from the hinge line
        assert energising.peak_at_deg % 360 in (pytest.approx(0.0, abs=1e-9), pytest.approx(180.0, abs=1e-9))
        # the right shoe energises clockwise, the left counter-clockwise (module docstring)
        assert energising.part == {"cw": "right shoe", "ccw": "left shoe"}[case.direction]
        assert other.torque_Nm > 0  # the other shoe brakes too
