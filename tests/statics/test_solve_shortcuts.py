"""The shortcuts a warm batch worker's solves take give the same answers.

A case solved by long-shoe theory carries the torque of the same drawing by
short-shoe theory beside it; that second solve now skips the parts' force
diagrams (only its torque is kept), and a shoe's line load is summed wrench
by wrench.  The statics is linear in the unknowns (Beer & Johnston, *Vector
Mechanics for Engineers: Statics*, 11th ed., ch. 4: the equilibrium
equations are linear in the loads), so a shoe's line load is the sum of its
basis wrenches' line loads times their coefficients, sample by sample; the
checks below hold to the last bit (==), not to a tolerance.
"""

from __future__ import annotations

from dataclasses import replace

import numpy as np
import pytest
from common import capstan_band, conveyor_block, winch_two_shoe

import dxfcheck
from dxfcheck.pipeline import contact_options
from dxfcheck.statics.contact import Direction
from dxfcheck.statics.equations import assemble, coefficients, contact_models, solve_system
from dxfcheck.statics.solver import _line_load, _solve_case, solve_case


def _mech(tmp_path, maker):
    path = tmp_path / "d.dxf"
    maker().save(path)
    return dxfcheck.build_mechanism(dxfcheck.read_drawing(path))


@pytest.mark.parametrize("mu", [0.3, 0.35, 0.45])
def test_short_torque_beside_equals_a_whole_short_solve(tmp_path, mu):
    mech = _mech(tmp_path, winch_two_shoe)
    sol = dxfcheck.solve(mech, mu)
    short = contact_options("short", 60)
    for case in sol.cases:
        assert all(s.model == "long-pivoted" for s in case.shoes)
        whole = solve_case(mech, mu, case.direction, short, locking=False)
        assert case.short_shoe_torque_Nm == whole.torque_Nm  # to the last bit
        # sign: both theories brake the drum (against its motion)
        assert whole.torque_Nm > 0 and case.torque_Nm > 0


@pytest.mark.parametrize("maker", [winch_two_shoe, conveyor_block, capstan_band])
def test_a_solve_without_diagrams_is_the_same_case(tmp_path, maker):
    mech = _mech(tmp_path, maker)
    opts = contact_options("auto", 60)
    for d in (Direction.CW, Direction.CCW):
        whole = _solve_case(mech, 0.35, d, opts, False)
        bare = _solve_case(mech, 0.35, d, opts, False, strength=False)
        assert whole.parts and not bare.parts
        assert replace(whole, parts=(), drum_load_N=bare.drum_load_N) == bare


@pytest.mark.parametrize("model", ["long", "short"])
def test_line_load_is_the_sum_of_the_basis_line_loads(tmp_path, model):
    mech = _mech(tmp_path, winch_two_shoe)
    models, _ = contact_models(mech, contact_options(model, 60))
    for d in (Direction.CW, Direction.CCW):
        sys_ = assemble(mech, models, 0.35, d)
        x = solve_system(sys_)
        for s in mech.shoes:
            ws, cs = sys_.bases[s.name], coefficients(sys_, x, s.name)
            got = _line_load(ws, cs)
            want = tuple(
                (ws[0].line_load[k][0], sum(c * w.line_load[k][1] for c, w in zip(cs, ws, strict=True)))
                for k in range(len(ws[0].line_load))
            )
            assert got == want
            if model == "long":  # a pressing lining: the line load is nowhere negative and somewhere positive
                assert len(got) > 2 and min(q for _, q in got) >= 0 and max(q for _, q in got) > 0


@pytest.mark.parametrize("maker", [winch_two_shoe, capstan_band])
def test_the_frame_kept_between_assemblies_is_the_mechanisms_own(tmp_path, maker):
    """assemble keeps the last mechanism's frame (rows, pin columns, loads);
    a moved mechanism in between gets its own, and every system is the one
    assembled from nothing, to the last bit."""
    from dxfcheck.statics import equations

    mech = _mech(tmp_path, maker)
    moved = replace(mech, pins=tuple(replace(p, center=(p.center[0] + 3.0, p.center[1] - 2.0)) for p in mech.pins))
    models, _ = contact_models(mech)
    moved_models, _ = contact_models(moved)

    def fresh(m, mdl, mu, d):
        equations._LAST_FRAME.clear()
        return assemble(m, mdl, mu, d)

    for m, mdl in ((mech, models), (moved, moved_models), (mech, models)):
        for mu, d in ((0.3, Direction.CW), (0.45, Direction.CCW)):
            kept = assemble(m, mdl, mu, d)
            ref = fresh(m, mdl, mu, d)
            assert np.array_equal(kept.a, ref.a) and np.array_equal(kept.b, ref.b)
            assert kept.row_owner == ref.row_owner and kept.col_owner == ref.col_owner
            assert kept.dropped == ref.dropped
    # the moved pins moved the moment arms: the two mechanisms' systems differ
    assert not np.array_equal(
        assemble(mech, models, 0.3, Direction.CW).a, assemble(moved, moved_models, 0.3, Direction.CW).a
    )
