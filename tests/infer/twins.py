"""Compare a drafted drawing's solution with its skeleton twin's.

The check is an invariant of the project's own design (no published
source): a brake drafted without role layers and the same brake drawn as a
skeleton must be the same mechanism, so every answer must agree, vectors
component by component (so directions too), to a relative 1e-9 of the
largest force.
"""

from __future__ import annotations

import math

from dxfcheck.statics import Solution

__all__ = ["REL", "assert_same_mechanism", "assert_same_solution"]

#: Relative agreement required of every number (of the largest force for
#: forces, of the drum radius for points).
REL = 1e-9


def _close(a: float, b: float, scale: float, what: str) -> None:
    assert math.isclose(a, b, rel_tol=REL, abs_tol=REL * scale), f"{what}: {a!r} != {b!r}"


def _vec(a: tuple[float, float], b: tuple[float, float], scale: float, what: str) -> None:
    _close(a[0], b[0], scale, f"{what} x")
    _close(a[1], b[1], scale, f"{what} y")


def assert_same_mechanism(a: Solution, b: Solution, *, same_centrelines: bool = True) -> None:
    """Same pins (place, diameter, pivot or not, parts joined), parts (their
    pins and, with ``same_centrelines``, their centreline segments: a part
    read from an outline gets a centreline of its own through its pins,
    loads and lining), shoes (mounting, arc) and loads."""
    ma, mb = a.mechanism, b.mechanism
    size = ma.drum.radius_mm if ma.drum else 1.0
    assert (ma.drum is None) == (mb.drum is None)
    if ma.drum and mb.drum:
        _vec(ma.drum.center, mb.drum.center, size, "drum centre")
        _close(ma.drum.radius_mm, mb.drum.radius_mm, size, "drum radius")
    assert [p.name for p in ma.pins] == [p.name for p in mb.pins]
    for p, q in zip(ma.pins, mb.pins, strict=True):
        _vec(p.center, q.center, size, f"pin {p.name}")
        _close(p.diameter_mm, q.diameter_mm, size, f"pin {p.name} diameter")
        assert (p.grounded, p.parts) == (q.grounded, q.parts), p.name
    assert [(p.name, p.pins) for p in ma.parts] == [(p.name, p.pins) for p in mb.parts]
    for p, q in zip(ma.parts if same_centrelines else (), mb.parts, strict=False):
        assert len(p.segments) == len(q.segments), p.name
        for (s0, s1), (t0, t1) in zip(p.segments, q.segments, strict=True):
            _vec(s0, t0, size, f"part {p.name}")
            _vec(s1, t1, size, f"part {p.name}")
    assert [(s.name, s.mounting, s.pin, s.part) for s in ma.shoes] == [
        (s.name, s.mounting, s.pin, s.part) for s in mb.shoes
    ]
    for s, t in zip(ma.shoes, mb.shoes, strict=True):
        _close(s.contact_angle_deg, t.contact_angle_deg, 360.0, f"shoe {s.name} span")
    assert [(ld.name, ld.part, ld.direction, ld.magnitude_N) for ld in ma.loads] == [
        (ld.name, ld.part, ld.direction, ld.magnitude_N) for ld in mb.loads
    ]
    for la, lb in zip(ma.loads, mb.loads, strict=True):
        _vec(la.point, lb.point, size, f"load {la.name}")


def assert_same_solution(a: Solution, b: Solution) -> None:
    """Per drum direction: the braking torque, every pin's force on every
    body it joins, every shoe's normal and friction resultants with their
    lines of action, every member's axial force."""
    assert [c.direction for c in a.cases] == [c.direction for c in b.cases]
    for ca, cb in zip(a.cases, b.cases, strict=True):
        scale = max([1.0] + [p.max_force_N for p in ca.pins] + [abs(s.normal_N) for s in ca.shoes])
        d = str(ca.direction)
        _close(ca.torque_Nm, cb.torque_Nm, abs(ca.torque_Nm), f"{d} torque")
        assert [p.name for p in ca.pins] == [p.name for p in cb.pins]
        for p, q in zip(ca.pins, cb.pins, strict=True):
            assert [t.body for t in p.attachments] == [t.body for t in q.attachments]
            for s, t in zip(p.attachments, q.attachments, strict=True):
                _vec((s.fx_N, s.fy_N), (t.fx_N, t.fy_N), scale, f"{d} pin {p.name} on {s.body}")
        for s, t in zip(ca.shoes, cb.shoes, strict=True):
            for field in ("force_N", "normal_force_N", "friction_force_N"):
                _vec(getattr(s, field), getattr(t, field), scale, f"{d} shoe {s.name} {field}")
            for field in ("contact_mm", "normal_at_mm", "friction_at_mm"):
                _vec(getattr(s, field), getattr(t, field), 1000.0, f"{d} shoe {s.name} {field}")
            _close(s.torque_Nm, t.torque_Nm, abs(ca.torque_Nm), f"{d} shoe {s.name} torque")
        for m, n in zip(ca.members, cb.members, strict=True):
            assert m.name == n.name
            _close(m.axial_N, n.axial_N, scale, f"{d} member {m.name}")
        for m, n in zip(ca.bands, cb.bands, strict=True):
            assert (m.name, m.tight_pin, m.slack_pin) == (n.name, n.tight_pin, n.slack_pin)
            _close(m.tight_N, n.tight_N, scale, f"{d} band {m.name} T1")
            _close(m.slack_N, n.slack_N, scale, f"{d} band {m.name} T2")
        assert len(ca.bands) == len(cb.bands) and len(ca.members) == len(cb.members)
