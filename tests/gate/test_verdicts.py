"""The comparison every rule makes (:func:`dxfcheck.gate.verdicts.ratio_rule`):
≤ and ≥ met to rounding pass, a miss beyond rounding fails, and the figures
shown tell a near miss apart.  Plain arithmetic; RULE_RTOL = 1e-9 is our own
choice (far above the 2.2e-16 of a double, far below any drawing's precision)."""

from __future__ import annotations

import math

import pytest

from dxfcheck.gate.verdicts import RULE_RTOL, Verdict, figures, ratio_rule
from dxfcheck.output.terminal import format_value


def _rule(value, limit, *, at_most, scale=0.0):
    return ratio_rule("x", "x", value, limit, "mm", "", {}, at_most=at_most, scale=scale)


@pytest.mark.parametrize("at_most", [True, False])
def test_equal_to_rounding_passes_with_margin_one(at_most):
    limit = 16.29375
    value = math.nextafter(math.nextafter(limit, math.inf), math.inf) if at_most else limit * (1 - 1e-15)
    r = _rule(value, limit, at_most=at_most)
    assert r.verdict is Verdict.PASS
    assert r.margin == 1.0


@pytest.mark.parametrize("at_most", [True, False])
def test_beyond_rounding_fails(at_most):
    limit = 16.29375
    value = limit * (1 + 10 * RULE_RTOL) if at_most else limit * (1 - 10 * RULE_RTOL)
    r = _rule(value, limit, at_most=at_most)
    assert r.verdict is Verdict.FAIL
    assert r.margin is not None and r.margin < 1.0


def test_negative_value_at_least_zero_fails():
    """w ≥ 0 with w = −1/3: fails, with no ratio (not an infinite margin)."""
    r = _rule(-1 / 3, 0.0, at_most=False)
    assert (r.verdict, r.margin) == (Verdict.FAIL, None)
    r = _rule(0.0, 0.0, at_most=False)
    assert (r.verdict, r.margin) == (Verdict.PASS, math.inf)


def test_scale_sets_the_rounding_of_a_difference():
    """0.5 / 3 × 3 − 0.5 ≈ −1e-16 ≥ 0 to rounding only relative to the 0.5 it
    is the difference of."""
    tiny = -1.1e-16
    assert _rule(tiny, 0.0, at_most=False).verdict is Verdict.FAIL
    assert _rule(tiny, 0.0, at_most=False, scale=0.5).verdict is Verdict.PASS


def test_figures_tell_a_near_miss_apart():
    assert figures(1.234, 5.678) == 4
    assert figures(16.29375 * (1 + 1e-6), 16.29375) == 6
    assert figures(16.293750000000006, 16.29375) == 4  # equal to rounding: no noise digits
    assert figures(None, 1.0) == 4
    n = figures(0.5 * (1 - 2e-6), 0.5)
    assert format_value(0.5 * (1 - 2e-6), "mm", n) != format_value(0.5, "mm", n)
