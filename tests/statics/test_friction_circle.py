"""The friction-circle contact of a short pivoted shoe, as one law for the
scalar model and the sampler.

Source: the friction circle (Khurmi & Gupta, *Theory of Machines*, chapter on
friction; section from memory): a pivoted short shoe aligns so the drum's
resultant passes through its pin; the resultant is inclined at the friction
angle φ = atan μ to the normal at its contact point, with friction along the
drum surface's motion, so its line is tangent to the circle of radius
r·sin φ.  Checked here as properties on many pin positions, not one number:
the line of action passes through the pin, the angle to the normal is φ, the
friction component points the way the surface moves, and the pin lies ahead
of the contact point along the force (the shoe is pushed, not pulled).
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from dxfcheck.core.directions import Direction
from dxfcheck.statics.contact.short_shoe import friction_circle_contact

R = 200.0
#: Geometric agreement [mm] and angles [rad].
TOL = 1e-9


def _pins(internal: bool, n: int = 200) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(11)
    beta = rng.uniform(-0.5, 0.5, n) + math.pi / 2  # pins above the axis, around 90°
    # outside the friction circle: r·sin(atan 0.6) = 0.51 r < 0.6 r
    dist = rng.uniform(0.6 * R, 0.9 * R, n) if internal else rng.uniform(1.05 * R, 1.6 * R, n)
    mu = rng.uniform(0.1, 0.6, n)
    return dist * np.cos(beta), dist * np.sin(beta), mu


@pytest.mark.parametrize("internal", [False, True])
@pytest.mark.parametrize("direction", list(Direction))
def test_the_resultant_passes_through_the_pin_at_the_friction_angle(internal, direction):
    px, py, mu = _pins(internal)
    alpha = friction_circle_contact(px, py, R, mu, direction, internal=internal, mid_deg=90.0)
    assert np.all(np.isfinite(alpha))
    s = direction.sign
    n = (-1.0 if internal else 1.0) * np.stack([np.cos(alpha), np.sin(alpha)])  # the drum pushes the shoe
    t = s * np.stack([-np.sin(alpha), np.cos(alpha)])  # the surface's motion
    f = n + mu * t
    q = R * np.stack([np.cos(alpha), np.sin(alpha)])
    rel = np.stack([px, py]) - q
    # the line of action through the contact point passes through the pin
    assert np.allclose(rel[0] * f[1] - rel[1] * f[0], 0.0, atol=TOL * R * 10)
    # the pin is ahead along the force: the shoe is pushed onto its pin
    assert np.all(rel[0] * f[0] + rel[1] * f[1] > 0)
    # the angle between the resultant and the normal is atan μ, towards the motion
    cos_angle = (f[0] * n[0] + f[1] * n[1]) / np.hypot(f[0], f[1])
    assert np.allclose(np.arccos(np.clip(cos_angle, -1, 1)), np.arctan(mu), atol=1e-9)
    assert np.all((f[0] - n[0]) * t[0] + (f[1] - n[1]) * t[1] > 0)
    # the contact point is the one nearer the lining's middle (90°)
    assert np.all(np.abs(np.remainder(alpha - math.pi / 2 + math.pi, 2 * math.pi) - math.pi) < math.pi / 2)


def test_a_pin_inside_the_friction_circle_has_no_contact():
    """r·sin φ = 200 × sin(atan 0.5) = 89.4 mm: a pin 50 mm from the axis
    cannot carry the resultant; the law says so with NaN (the scalar model
    turns it into finding S308)."""
    alpha = friction_circle_contact(
        np.array([0.0]), np.array([50.0]), R, np.array([0.5]), Direction.CW, internal=True, mid_deg=90.0
    )
    assert np.isnan(alpha[0])
