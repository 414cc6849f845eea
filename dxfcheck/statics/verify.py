"""Every solve proves its own answer before anything is reported.

The checks use only the reported results (pin forces, the drum's force
vectors on each shoe with their lines of action, band end pulls at their
tangent points, loads and spring ends) and the drawing's geometry, never the
contact models' own bookkeeping:

``part balance``
    every moving part is in force and moment equilibrium under the reported
    pin forces, the drum's forces on its shoes, its loads and spring ends;
``pin balance``
    every pin (a massless particle) passes on exactly the band pulls it
    carries: the forces it exerts on its bodies sum to those pulls;
``drum torque``
    the moment about the drum axis of the forces the shoes and bands apply
    to the drum equals the reported braking torque, and in a braking case
    (no error finding) it opposes the drum's motion;
``shoe friction``
    each shoe's normal resultant runs through the drum axis; a shoe whose
    pressure distribution is positive is reported as pressing, and its
    friction acts on the drum against the drum's motion with the shoe's
    reported torque;
``shoe pressure``
    a pressing lining's pressure is nowhere negative (a lining only pushes);
``band tight end``
    each taut band is tightest at the end the drum surface moves away from,
    and tighter there than at the other end.

A failed check raises :class:`VerificationError`: the result is an internal
error naming the check, never printed as an answer.

References
----------
.. [1] F. P. Beer, E. R. Johnston et al., *Vector Mechanics for Engineers:
   Statics*, 11th ed., McGraw-Hill, 2016, ch. 4 (equilibrium of rigid
   bodies) and ch. 8 (friction; belt friction, dT/dθ = μT).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from dxfcheck.core.errors import VerificationError
from dxfcheck.core.findings import Severity
from dxfcheck.core.geometry import Point
from dxfcheck.statics.contact.base import surface_tangent

if TYPE_CHECKING:
    from dxfcheck.mechanism import Mechanism
    from dxfcheck.statics import CaseSolution, ShoeResult

__all__ = ["VERIFY_RTOL", "drum_moment_Nmm", "verify_case"]

#: Largest force or moment imbalance accepted, relative to the largest force
#: (moments: × the linkage's length scale) [-].
VERIFY_RTOL = 1e-7


def _cross(r: Point, f: Point) -> float:
    return r[0] * f[1] - r[1] * f[0]


def _moment(point: Point, force: Point, about: Point) -> float:
    """Moment [N·mm] of ``force`` [N] acting at ``point`` [mm] about ``about``,
    counter-clockwise positive."""
    return _cross((point[0] - about[0], point[1] - about[1]), force)


def _force_scale(case: CaseSolution) -> float:
    fs = [p.max_force_N for p in case.pins]
    fs += [math.hypot(*s.force_N) for s in case.shoes] + [ld.force_N for ld in case.loads]
    fs += [abs(b.tight_N) for b in case.bands] + [abs(sp.force_N) for sp in case.springs]
    return max([*fs, 1e-300])


def drum_moment_Nmm(mech: Mechanism, case: CaseSolution) -> float:
    """Moment about the drum axis [N·mm], counter-clockwise positive, of the
    forces every shoe and band applies to the drum: minus the drum's normal
    and friction resultants on each shoe along their lines of action, and
    each band end's pull from its tangent point towards its pin."""
    assert mech.drum is not None
    c = mech.drum.center
    m = 0.0
    for s in case.shoes:
        m -= _moment(s.normal_at_mm, s.normal_force_N, c) + _moment(s.friction_at_mm, s.friction_force_N, c)
    for b in case.bands:
        for end in b.ends:
            m += _moment(end.tangent_mm, (-end.pull_N[0], -end.pull_N[1]), c)
    return m


def _fail(mech: Mechanism, case: CaseSolution, check: str, detail: str) -> VerificationError:
    return VerificationError(
        f"{case.direction}: the solution failed its own check '{check}': {detail}; no result is reported",
        path=mech.drawing.path,
    )


def _check_parts(mech: Mechanism, case: CaseSolution, ftol: float, mtol: float) -> None:
    origin = mech.drum.center if mech.drum is not None else (0.0, 0.0)
    acc: dict[str, list[float]] = {p.name: [0.0, 0.0, 0.0] for p in mech.parts}

    def add(body: str | None, point: Point, force: Point) -> None:
        if body is None or body not in acc:
            return
        a = acc[body]
        a[0] += force[0]
        a[1] += force[1]
        a[2] += _moment(point, force, origin)

    for p in case.pins:
        for at in p.attachments:
            add(at.body, (p.x_mm, p.y_mm), (at.fx_N, at.fy_N))
    for s in case.shoes:
        add(s.part, s.normal_at_mm, s.normal_force_N)
        add(s.part, s.friction_at_mm, s.friction_force_N)
    for ld in case.loads:
        add(ld.part, (ld.x_mm, ld.y_mm), (ld.fx_N, ld.fy_N))
    for sp in case.springs:
        for e in sp.ends:
            add(e.part, e.at_mm, e.force_N)
    for g in case.guides:
        for body, f in g.on_parts():
            add(body, g.at_mm, f)
    for name, (fx, fy, mz) in acc.items():
        if math.hypot(fx, fy) > ftol or abs(mz) > mtol or not all(map(math.isfinite, (fx, fy, mz))):
            raise _fail(
                mech, case, "part balance", f"part {name} is out of balance by ({fx:.4g}, {fy:.4g}) N, {mz:.4g} N·mm"
            )


def _check_pins(mech: Mechanism, case: CaseSolution, ftol: float) -> None:
    pulls: dict[str, list[float]] = {}
    for b in case.bands:
        for end in b.ends:
            acc = pulls.setdefault(end.pin, [0.0, 0.0])
            acc[0] += end.pull_N[0]
            acc[1] += end.pull_N[1]
    for p in case.pins:
        px, py = pulls.get(p.name, [0.0, 0.0])
        fx = sum(a.fx_N for a in p.attachments) - px
        fy = sum(a.fy_N for a in p.attachments) - py
        if math.hypot(fx, fy) > ftol:
            raise _fail(mech, case, "pin balance", f"pin {p.name} is out of balance by ({fx:.4g}, {fy:.4g}) N")


def _braking(case: CaseSolution) -> bool:
    """A case that is reported as a brake: no error finding."""
    return not any(f.severity is Severity.ERROR for f in case.findings)


def _check_drum(mech: Mechanism, case: CaseSolution, mtol: float) -> None:
    m = drum_moment_Nmm(mech, case)
    # a braking torque opposes the drum's rotation: its sign is minus the rotation's
    reported = -case.direction.sign * case.torque_Nm * 1000.0
    if abs(m - reported) > mtol or not math.isfinite(m):
        raise _fail(
            mech,
            case,
            "drum torque",
            f"the forces on the drum turn it with {m / 1000:.6g} N·m (counter-clockwise positive), "
            f"the reported braking torque is {case.torque_Nm:.6g} N·m against a {case.direction} drum",
        )
    if _braking(case) and m * case.direction.sign > mtol:
        raise _fail(mech, case, "drum torque", f"the torque {m / 1000:.6g} N·m turns the drum with its motion")


def _presses(s: ShoeResult, c: Point) -> bool:
    """Whether the lining presses on the drum: its line load (the pressure
    distribution) is positive, or, without samples, the drum pushes an
    external shoe outwards and an internal one inwards."""
    if s.line_load:
        return sum(q for _, q in s.line_load) > 0
    outward = (s.normal_at_mm[0] - c[0]) * s.normal_force_N[0] + (s.normal_at_mm[1] - c[1]) * s.normal_force_N[1]
    return (outward < 0) if s.internal else (outward > 0)


def _check_pressure(mech: Mechanism, case: CaseSolution, s: ShoeResult) -> None:
    """A lining can only push: where it presses, its line load is nowhere
    negative."""
    q = [v for _, v in s.line_load]
    if q and min(q) < -VERIFY_RTOL * max(abs(v) for v in q):
        raise _fail(
            mech,
            case,
            "shoe pressure",
            f"shoe {s.name}: the lining would pull on the drum somewhere (line load {min(q):.4g} N/mm)",
        )


def _check_shoes(mech: Mechanism, case: CaseSolution, ftol: float, mtol: float) -> None:
    assert mech.drum is not None
    c = mech.drum.center
    for s in case.shoes:
        if abs(_moment(s.normal_at_mm, s.normal_force_N, c)) > mtol:
            raise _fail(mech, case, "shoe friction", f"shoe {s.name}: the normal resultant misses the drum axis")
        if math.hypot(*s.normal_force_N) <= ftol:
            continue
        presses = _presses(s, c)
        if presses != (s.normal_N > 0):
            raise _fail(
                mech,
                case,
                "shoe friction",
                f"shoe {s.name}: its normal force {'presses on' if presses else 'pulls from'} the drum, "
                f"but its torque {s.torque_Nm:.6g} N·m says otherwise: friction and motion disagree",
            )
        if not presses:
            continue
        _check_pressure(mech, case, s)
        on_drum = -_moment(s.friction_at_mm, s.friction_force_N, c)
        # at μ = 0 there is no friction to oppose the motion (the release kinematics solve there)
        against = on_drum * case.direction.sign < 0 or case.mu == 0.0
        if not against or abs(on_drum + case.direction.sign * s.torque_Nm * 1000) > mtol:
            raise _fail(
                mech,
                case,
                "shoe friction",
                f"shoe {s.name}: its friction turns the drum with {on_drum / 1000:.6g} N·m (counter-clockwise "
                f"positive), not against the {case.direction} motion with its torque {s.torque_Nm:.6g} N·m",
            )


def _check_bands(mech: Mechanism, case: CaseSolution, ftol: float) -> None:
    assert mech.drum is not None
    cx, cy = mech.drum.center
    for b in case.bands:
        if b.slack_N <= ftol:
            continue
        for end in b.ends:
            v = surface_tangent(math.atan2(end.tangent_mm[1] - cy, end.tangent_mm[0] - cx), case.direction)
            # the pull on the pin points from the pin to the drum: along it, the
            # surface carries the band into the wrap (away from a tight end)
            into_wrap = v[0] * end.pull_N[0] + v[1] * end.pull_N[1] > 0
            if into_wrap != end.tight:
                where = "moves away from" if into_wrap else "moves towards"
                raise _fail(
                    mech,
                    case,
                    "band tight end",
                    f"{b.name}: the drum surface {where} the end at pin {end.pin}, which is reported "
                    f"{'tight' if end.tight else 'slack'}",
                )
        if b.tight_N < b.slack_N:
            raise _fail(mech, case, "band tight end", f"{b.name}: tight {b.tight_N:.6g} N < slack {b.slack_N:.6g} N")


def verify_case(mech: Mechanism, case: CaseSolution) -> None:
    """Check one solved case against the laws it must obey.

    Raises
    ------
    VerificationError
        Naming the check that failed (see the module's docstring).
    """
    fscale = _force_scale(case)
    ftol = VERIFY_RTOL * fscale
    mtol = ftol * mech.length_scale_mm
    _check_parts(mech, case, ftol, mtol)
    _check_pins(mech, case, ftol)
    if mech.drum is None:
        return
    _check_drum(mech, case, mtol)
    _check_shoes(mech, case, ftol, mtol)
    _check_bands(mech, case, ftol)
