"""Release kinematics: the small motions the drawn linkage allows, and what
they do at the drum.

The equilibrium equations ``A·x = b`` (:func:`dxfcheck.statics.equations.assemble`)
have one row per part balance (force x, force y, moment / L about the part's
reference point) and per pin (force x, force y), one column per pin force on
a body.  Their transpose is the linkage's constraint Jacobian: for a vector
``q`` over the rows, read as each part's small displacement (its reference
point's shift [mm] and its turn × L [mm]) and minus each pin's shift [mm],
``(Aᵀq)`` at a pin column is the gap the motion opens in that pin joint
(the part's point at the pin moves by one amount, the pin by another).  The
motions the joints allow are the null space of the pin columns' transpose
(principle of virtual work: a force system in equilibrium does no work on a
motion the constraints allow, and the reverse).

With the drum contacts left free, the linkage has as many degrees of freedom
as the statics has contact unknowns (a determinate brake).  On that space:

* each shoe's *lift* is the radial displacement of its lining away from the
  drum (outward for an external shoe, inward for an internal one), at the
  lining's centre and along the lining;
* each band end's *travel* is its pin's displacement towards the drum along
  the band's straight piece (the band slackens); the band's radial clearance
  is the slack over the wrap, Δr = ΣΔ/θ (to first order the tangent lengths
  and the wrap change so that dL/dr = θ);
* each effort's *stroke* is its point's displacement against its force (a
  load's point against the load, a spring lengthened if it pulls, shortened
  if it pushes).

The *release motion* is the one in which every shoe and band lifts by the
same amount (at the lining's centre), at the least motion of the parts (a
pivoted shoe does not turn on its pin without need): on a floating linkage
(equaliser, floating lever) the lifts are not fixed by the stroke, and equal
clearance is what the adjustment aims at.  Each shoe's *share* is the stroke
that lifts it alone by 1 mm while every other shoe and band stays put.  By
virtual work at μ = 0 the shares are the force ratios of the statics: the
actuator stroke per mm of a shoe's lift is that shoe's normal force per
newton of effort.

References
----------
.. [1] F. P. Beer, E. R. Johnston et al., *Vector Mechanics for Engineers:
   Statics*, 11th ed., McGraw-Hill, 2016, ch. 10 (method of virtual work,
   virtual displacements of machines).
.. [2] G. Strang, *Linear Algebra and Its Applications*, 4th ed., 2006,
   §6.3 (the singular value decomposition: null spaces).
"""

from __future__ import annotations

import math
from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np

from dxfcheck.core.directions import Direction
from dxfcheck.core.geometry import Point, dist
from dxfcheck.core.records import record
from dxfcheck.mechanism.model import FRAME, Mechanism, Shoe
from dxfcheck.statics.equations import (
    Balance,
    ColumnKind,
    RowKind,
    RowOwner,
    assemble,
    contact_models,
    reference_points,
)

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = [
    "BandTravel",
    "EffortStroke",
    "LiftShare",
    "Motion",
    "MotionReport",
    "PartMotion",
    "PinMotion",
    "Release",
    "ShoeLift",
    "effort_names",
    "equal_lift_motion",
    "free_motions",
    "lining_lift_mm",
    "release",
    "report",
]

#: Singular values below this fraction of the largest count as zero: their
#: left singular vectors are motions the joints allow.
NULL_RTOL = 1e-10
#: Samples along a lining for its least and largest lift.
LIFT_SAMPLES = 33
#: Relative residual below which every shoe and band lifts equally (or one
#: alone lifts while the others stay put).
EQUAL_LIFT_RTOL = 1e-8
#: An actuator stroke below this fraction of the motion's size counts as
#: none: the actuator does not move when the shoes lift.
STROKE_RTOL = 1e-9


@record(frozen=True)
class PartMotion:
    """A part's small rigid motion: its reference point ``ref_mm`` [mm]
    shifts by ``shift_mm`` [mm] and it turns by ``turn_rad`` [rad],
    counter-clockwise positive."""

    name: str
    ref_mm: Point
    shift_mm: Point
    turn_rad: float


@record(frozen=True)
class PinMotion:
    """A pin's small shift ``shift_mm`` [mm]."""

    name: str
    shift_mm: Point


@record(frozen=True)
class Motion:
    """One small motion of the linkage, linear in its size: every part's
    rigid motion and every pin's shift."""

    parts: tuple[PartMotion, ...]
    pins: tuple[PinMotion, ...]

    def at(self, part: str | None, point: Point) -> Point:
        """The shift [mm] of the point ``point`` [mm] of ``part`` (None or
        the frame: none)."""
        if part is None or part == FRAME:
            return (0.0, 0.0)
        m = next(p for p in self.parts if p.name == part)
        rx, ry = point[0] - m.ref_mm[0], point[1] - m.ref_mm[1]
        return (m.shift_mm[0] - m.turn_rad * ry, m.shift_mm[1] + m.turn_rad * rx)

    def pin_shift(self, name: str) -> Point:
        """The shift [mm] of pin ``name``."""
        return next(p.shift_mm for p in self.pins if p.name == name)

    def scaled(self, factor: float) -> Motion:
        """The same motion × ``factor``."""
        return Motion(
            tuple(
                replace(p, shift_mm=(p.shift_mm[0] * factor, p.shift_mm[1] * factor), turn_rad=p.turn_rad * factor)
                for p in self.parts
            ),
            tuple(PinMotion(p.name, (p.shift_mm[0] * factor, p.shift_mm[1] * factor)) for p in self.pins),
        )


@record(frozen=True)
class ShoeLift:
    """A shoe's lift away from the drum [mm]: at the lining's centre
    ``mid_mm``, the least ``least_mm`` and largest ``most_mm`` along the
    lining (positive: the lining moves away from the drum surface)."""

    name: str
    part: str
    mid_mm: float
    least_mm: float
    most_mm: float


@record(frozen=True)
class BandTravel:
    """A band's slackening: each end's pin travel towards the drum along its
    straight piece, ``start_mm`` and ``end_mm`` [mm] (positive: the band
    slackens), their sum ``slack_mm`` [mm] and the radial clearance it gives,
    ``clearance_mm`` = slack / wrap [mm]."""

    name: str
    start_mm: float
    end_mm: float
    slack_mm: float
    clearance_mm: float


@record(frozen=True)
class EffortStroke:
    """An effort (a load or a spring) in a motion: its force ``force_N``
    [N], its ``stroke_mm`` [mm] against the force, and for a spring its
    change of length ``length_change_mm`` [mm] (None for a load)."""

    name: str
    kind: str
    force_N: float
    stroke_mm: float
    length_change_mm: float | None = None


@record(frozen=True)
class MotionReport:
    """What a motion does at the drum and at the efforts."""

    shoes: tuple[ShoeLift, ...]
    bands: tuple[BandTravel, ...]
    efforts: tuple[EffortStroke, ...]

    def shoe(self, name: str) -> ShoeLift:
        return next(s for s in self.shoes if s.name == name)

    def band(self, name: str) -> BandTravel:
        return next(b for b in self.bands if b.name == name)

    def effort(self, name: str) -> EffortStroke:
        return next(e for e in self.efforts if e.name == name)


@record(frozen=True)
class LiftShare:
    """How the actuator's stroke shares between the shoes and bands.

    ``stroke_per_lift`` [mm/mm] is the actuator stroke that lifts this shoe
    (``kind`` ``shoe``) or band alone by 1 mm at its lining's centre while
    every other one stays put (None when the linkage ties it to another);
    ``share`` [-] its fraction of the stroke of an equal lift of all.
    """

    name: str
    kind: str
    stroke_per_lift: float | None
    share: float | None


@record(frozen=True)
class Release:
    """The release of the brake by its actuator.

    Attributes
    ----------
    actuator : str
        The load or spring whose point the actuator moves, against its
        force.
    mobility : int
        Degrees of freedom of the linkage with the drum contacts free.
    stroke_per_lift : float or None
        Actuator stroke [mm] per mm of equal lift of every shoe and band;
        None when the actuator does not move against its force as they lift.
    equal_lift : bool
        Whether the linkage lets every shoe and band lift by the same amount
        (else the release motion is the nearest in least squares).
    per_mm : MotionReport or None
        The release motion at 1 mm of actuator stroke: the lifts [mm], band
        travels [mm] and every effort's stroke [mm].
    motion : Motion or None
        The same motion, part by part.
    shares : tuple of LiftShare
    release_force_N : float or None
        The force [N] at the actuator, along its line, that holds every
        effort in the release motion at μ = 0: Σ force × stroke over the
        efforts, per mm of actuator stroke (the set force through the
        linkage's velocity ratio).
    """

    actuator: str
    mobility: int
    stroke_per_lift: float | None
    equal_lift: bool
    per_mm: MotionReport | None
    motion: Motion | None
    shares: tuple[LiftShare, ...]
    release_force_N: float | None


def free_motions(mech: Mechanism) -> list[Motion]:
    """An orthonormal basis (over the equations' rows) of the small motions
    the pin joints and the guides allow, the drum contacts left free."""
    models, _ = contact_models(mech)
    sys_ = assemble(mech, models, 0.0, Direction.CW)
    pin_cols = [j for j, o in enumerate(sys_.col_owner) if o.kind in (ColumnKind.PIN, ColumnKind.GUIDE)]
    n = len(sys_.row_owner)
    if pin_cols:
        u, s, _ = np.linalg.svd(sys_.a[:, pin_cols], full_matrices=True)
        rank = int(np.sum(s > NULL_RTOL * float(s.max(initial=0.0))))
        z: NDArray[np.float64] = u[:, rank:]
    else:
        z = np.eye(n)
    index = sys_.row_index
    refs = reference_points(mech)
    return [_motion(mech, index, refs, z[:, k]) for k in range(z.shape[1])]


def _motion(mech: Mechanism, index: dict[RowOwner, int], refs: dict[str, Point], q: NDArray[np.float64]) -> Motion:
    """The motion ``q`` over the rows: a part's rows hold its reference
    point's shift and its turn × L, a pin's rows minus its shift (a pin row
    sums the pin forces on the bodies, the pin's own balance with the sign
    turned)."""
    L = mech.length_scale_mm
    parts = tuple(
        PartMotion(
            p.name,
            refs[p.name],
            (
                float(q[index[RowOwner(RowKind.BODY, p.name, Balance.FX)]]),
                float(q[index[RowOwner(RowKind.BODY, p.name, Balance.FY)]]),
            ),
            float(q[index[RowOwner(RowKind.BODY, p.name, Balance.MOMENT)]]) / L,
        )
        for p in mech.parts
    )
    pins = tuple(
        PinMotion(
            p.name,
            (
                -float(q[index[RowOwner(RowKind.PIN, p.name, Balance.FX)]]),
                -float(q[index[RowOwner(RowKind.PIN, p.name, Balance.FY)]]),
            ),
        )
        for p in mech.pins
    )
    return Motion(parts, pins)


def lining_lift_mm(mech: Mechanism, shoe: Shoe, motion: Motion, point: Point) -> float:
    """The lift [mm] away from the drum of the lining point ``point`` [mm]
    of ``shoe`` in ``motion``: its shift along the drum radius through it,
    outward for an external shoe, inward for an internal one."""
    assert mech.drum is not None
    cx, cy = mech.drum.center
    r = dist(point, (cx, cy))
    ex, ey = (point[0] - cx) / r, (point[1] - cy) / r
    ux, uy = motion.at(shoe.part, point)
    out = ux * ex + uy * ey
    return -out if shoe.internal else out


def _shoe_lift(mech: Mechanism, shoe: Shoe, motion: Motion) -> ShoeLift:
    arc = shoe.arc
    degs = [arc.start_deg + arc.span_deg * k / (LIFT_SAMPLES - 1) for k in range(LIFT_SAMPLES)]
    lifts = [lining_lift_mm(mech, shoe, motion, arc.point_at(d)) for d in degs]
    mid = lining_lift_mm(mech, shoe, motion, arc.point_at(arc.mid_deg))
    return ShoeLift(shoe.name, shoe.part, mid, min(lifts), max(lifts))


def report(mech: Mechanism, motion: Motion) -> MotionReport:
    """Every shoe's lift, band's travel and effort's stroke in ``motion``."""
    shoes = tuple(_shoe_lift(mech, s, motion) for s in mech.shoes) if mech.drum is not None else ()
    bands = []
    for b in mech.bands:
        ts = _dot(motion.pin_shift(b.start_pin), b.start_dir)
        te = _dot(motion.pin_shift(b.end_pin), b.end_dir)
        bands.append(BandTravel(b.name, ts, te, ts + te, (ts + te) / math.radians(b.wrap_deg)))
    efforts = [
        EffortStroke(ld.name, "load", ld.magnitude_N or 0.0, -_dot(motion.at(ld.part, ld.point), ld.direction))
        for ld in mech.loads
        if ld.part is not None
    ]
    for sp in mech.springs:
        p0, p1 = sp.ends
        d = dist(p0, p1)
        e = ((p1[0] - p0[0]) / d, (p1[1] - p0[1]) / d)
        ua, ub = motion.at(sp.parts[0], p0), motion.at(sp.parts[1], p1)
        change = _dot((ub[0] - ua[0], ub[1] - ua[1]), e)
        efforts.append(EffortStroke(sp.name, "spring", sp.force_N or 0.0, change if sp.tension else -change, change))
    return MotionReport(shoes, tuple(bands), tuple(efforts))


def _dot(a: Point, b: Point) -> float:
    return a[0] * b[0] + a[1] * b[1]


def effort_names(mech: Mechanism) -> list[str]:
    """The loads (on a part) and springs an actuator may be named by."""
    return [ld.name for ld in mech.loads if ld.part is not None] + [sp.name for sp in mech.springs]


def _outputs(mech: Mechanism, rep: MotionReport) -> list[float]:
    """The lifts a release equalises: each shoe's at its lining's centre,
    each band's radial clearance."""
    return [s.mid_mm for s in rep.shoes] + [b.clearance_mm for b in rep.bands]


def _combine(basis: list[Motion], alpha: NDArray[np.float64]) -> Motion:
    """Σ alpha[k]·basis[k]."""
    first = basis[0]
    parts = tuple(
        replace(
            p,
            shift_mm=(
                sum(float(a) * m.parts[i].shift_mm[0] for a, m in zip(alpha, basis, strict=True)),
                sum(float(a) * m.parts[i].shift_mm[1] for a, m in zip(alpha, basis, strict=True)),
            ),
            turn_rad=sum(float(a) * m.parts[i].turn_rad for a, m in zip(alpha, basis, strict=True)),
        )
        for i, p in enumerate(first.parts)
    )
    pins = tuple(
        PinMotion(
            p.name,
            (
                sum(float(a) * m.pins[i].shift_mm[0] for a, m in zip(alpha, basis, strict=True)),
                sum(float(a) * m.pins[i].shift_mm[1] for a, m in zip(alpha, basis, strict=True)),
            ),
        )
        for i, p in enumerate(first.pins)
    )
    return Motion(parts, pins)


def _solve_lifts(y: NDArray[np.float64], target: NDArray[np.float64]) -> tuple[NDArray[np.float64], bool]:
    """The least motion (in the orthonormal basis) whose lifts are
    ``target``, and whether it reaches them."""
    alpha = np.asarray(np.linalg.lstsq(y, target, rcond=None)[0], dtype=np.float64)
    miss = float(np.linalg.norm(y @ alpha - target))
    return alpha, miss <= EQUAL_LIFT_RTOL * max(1.0, float(np.linalg.norm(target)))


def equal_lift_motion(mech: Mechanism) -> Motion | None:
    """The least motion in which every shoe lifts by 1 mm at its lining's
    centre and every band by 1 mm of radial clearance (None when the drawing
    has no shoe or band, or the linkage does not let them lift alike)."""
    basis = free_motions(mech)
    m = len(mech.shoes) + len(mech.bands)
    if not basis or m == 0:
        return None
    y = np.array([_outputs(mech, report(mech, b)) for b in basis]).T
    alpha, equal = _solve_lifts(y, np.ones(m))
    return _combine(basis, alpha) if equal else None


def release(mech: Mechanism, actuator: str) -> Release:
    """The release of ``mech`` by moving the effort ``actuator`` (a load's
    or a spring's name) against its force.

    Raises
    ------
    ValueError
        When ``actuator`` names no load on a part and no spring.
    """
    if actuator not in effort_names(mech):
        raise ValueError(f"no load or spring named {actuator!r} (have: {', '.join(effort_names(mech)) or 'none'})")
    basis = free_motions(mech)
    reports = [report(mech, m) for m in basis]
    m = len(mech.shoes) + len(mech.bands)
    if not basis or m == 0:
        return Release(actuator, len(basis), None, False, None, None, (), None)
    y = np.array([_outputs(mech, r) for r in reports]).T
    stroke = np.array([r.effort(actuator).stroke_mm for r in reports])
    alpha, equal = _solve_lifts(y, np.ones(m))
    s0 = float(stroke @ alpha)
    if s0 <= STROKE_RTOL * float(np.linalg.norm(stroke)) * float(np.linalg.norm(alpha)) or s0 <= 0.0:
        return Release(actuator, len(basis), None, equal, None, None, (), None)
    motion = _combine(basis, alpha / s0)
    per_mm = report(mech, motion)
    names = [(s.name, "shoe") for s in mech.shoes] + [(b.name, "band") for b in mech.bands]
    shares = []
    for i, (name, kind) in enumerate(names):
        a_i, ok = _solve_lifts(y, np.eye(m)[i])
        s_i = float(stroke @ a_i)
        shares.append(LiftShare(name, kind, s_i if ok else None, s_i / s0 if ok else None))
    force = sum(e.force_N * e.stroke_mm for e in per_mm.efforts)
    return Release(actuator, len(basis), s0, equal, per_mm, motion, tuple(shares), force)
