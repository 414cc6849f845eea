"""Planar rigid-body statics of the whole brake linkage, with Coulomb
friction at the shoes.

The method is the general one of planar statics (the "method of members" for
frames and machines): every moving part contributes three equilibrium
equations (two force sums and one moment sum); every pin is a massless
particle with two equations; the unknowns are the components of the force
each pin exerts on each body it joins (the frame included for pivots) and
one scalar per shoe, the shoe's normal force.  Two-force and three-force
members are not special-cased: they come out of the one linear solve.

Before solving, the equations are examined by singular-value decomposition:

* a left null vector (an equation combination the unknowns cannot reach)
  is a *free motion* of the linkage; if the loads do work on it, the drawing
  shows a mechanism, not a brake, and the parts that move are named;
* a right null vector is a *self-stress*: the linkage is statically
  indeterminate (redundant) and its pin forces are not fixed by statics.

The self-locking limit is the friction coefficient at which the equations
become singular with every shoe pressing on the drum: there the drum holds
the shoes on with no effort at all.

References
----------
.. [1] F. P. Beer, E. R. Johnston et al., *Vector Mechanics for Engineers:
   Statics*, 11th ed., McGraw-Hill, 2016, ch. 4 (equilibrium of rigid
   bodies, statical indeterminacy) and ch. 6.3 (frames and machines).
.. [2] G. Strang, *Linear Algebra and Its Applications*, 4th ed., 2006,
   §6.3 (singular value decomposition: rank and the four subspaces).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field, replace

import numpy as np
from numpy.typing import NDArray

from dxfcheck.contact import (
    ContactModel,
    ContactOptions,
    ContactWrench,
    Direction,
    ShoeModelChoice,
    combine,
    line_of_action_point,
    moment_about_center,
    short_shoe_model,
)
from dxfcheck.contact.long_shoe import LongHingedShoe, LongPivotedShoe, equivalent_mu
from dxfcheck.errors import SolveError
from dxfcheck.findings import Code, Finding, Severity, has_errors
from dxfcheck.geometry import Point, dist
from dxfcheck.mechanism import FRAME, Band, Mechanism, Mounting, Part
from dxfcheck.verify import verify_case

__all__ = [
    "Attachment",
    "BandEnd",
    "BandResult",
    "CaseSolution",
    "LoadResult",
    "MemberResult",
    "PinResult",
    "ShoeResult",
    "Solution",
    "SpringEnd",
    "SpringResult",
    "critical_mu",
    "solve",
    "solve_case",
    "solve_for_torque",
]

#: Singular values below this fraction of the largest count as zero.
RANK_RTOL = 1e-10
#: A load whose share on a free motion exceeds this fraction of the loads'
#: size drives that motion.
EXCITATION_RTOL = 1e-8
#: A row whose coefficients are all below this fraction of the largest is an
#: identity (0 = 0) and is dropped.
ZERO_ROW_RTOL = 1e-12
#: Condition number above which the solution is reported as ill-conditioned.
CONDITION_WARN = 1e8
#: Largest relative equilibrium residual accepted.
RESIDUAL_LIMIT = 1e-8
#: Share of a mode above which a body or pin is named as taking part in it.
MODE_SHARE = 0.2
#: A normal force below minus this fraction of the largest force means the
#: shoe would have to pull on the drum.
LIFT_RTOL = 1e-9
#: Friction coefficients searched for the self-locking limit [-].
MU_SCAN_MAX = 1.0
MU_SCAN_STEPS = 100
#: Bisection on the self-locking limit stops at this width [-].
MU_TOL = 1e-12
#: μ this close (relative) to the self-locking limit counts as at the limit.
AT_LIMIT_RTOL = 1e-6
#: Most re-solves while pivoted long shoes settle their contact patches.
PATCH_ITERATIONS = 30
#: Default shoe theory: long-shoe theory above 60° of contact.
DEFAULT_OPTIONS = ContactOptions()


@dataclass(frozen=True)
class Attachment:
    """Force [N] a pin exerts on one body it joins."""

    body: str
    fx_N: float
    fy_N: float

    @property
    def force_N(self) -> float:
        return math.hypot(self.fx_N, self.fy_N)


@dataclass(frozen=True)
class PinResult:
    """Force through one pin.

    ``fx_N``, ``fy_N``, ``force_N`` [N] are the force the pin exerts on the
    first body in ``parts``; ``attachments`` gives it for every body, and
    ``max_force_N`` [N] is the largest of them.
    """

    name: str
    x_mm: float
    y_mm: float
    diameter_mm: float
    grounded: bool
    parts: tuple[str, ...]
    fx_N: float
    fy_N: float
    force_N: float
    max_force_N: float
    attachments: tuple[Attachment, ...]


@dataclass(frozen=True)
class ShoeResult:
    """One shoe's forces.

    Every vector is the drum's action on the shoe (the shoe's action on the
    drum is its opposite, along the same line).

    Attributes
    ----------
    model : str
        The contact model used (``short-fixed``, ``short-pivoted``,
        ``long-hinged``, ``long-pivoted``).
    normal_N : float
        Magnitude of the resultant of the normal forces between drum and
        lining [N] (negative when the shoe would have to pull).
    friction_resultant_N : float
        Magnitude of the resultant of the friction forces [N] (μ × the normal
        resultant; negative when the shoe would have to pull).
    friction_lining_N : float
        The friction force summed over the lining, ∫μ·p·b·r dφ [N]: its
        product with the drum radius is the shoe's torque.  For a short shoe
        it equals ``friction_resultant_N``; for a long shoe it is larger,
        since the friction along a curved lining does not all point one way.
    torque_Nm : float
        Braking torque the shoe puts on the drum [N·m], positive against the
        drum's motion.
    contact : Point
        Where the resultant's line of action meets the drum surface [mm].
    force : Point
        Resultant force of the drum on the shoe [N].
    normal_force, normal_at : Point
        The normal resultant [N] and a point of its line of action [mm] on
        the drum surface (the line runs through the drum axis).
    friction_force, friction_at : Point
        The friction resultant [N] and a point of its line of action [mm]:
        the foot of the perpendicular from the drum axis, at r for a short
        shoe and beyond r for a long one.
    peak_line_load_N_per_mm : float
        Largest lining pressure × width [N/mm]; divide by the width for the
        pressure.  Short shoes: N over the chord (uniform).
    peak_at_deg : float
        Polar angle where it acts [degrees].
    mu_equivalent : float
        μ' = 4μ·sinθ/(2θ + sin 2θ) for the contact semi-angle θ [-]: the
        quick long-shoe correction, shown beside the model's result.
    pressure_offset_deg : float or None
        Pivoted long shoe: the offset ψ of ``p0·cos(φ − φm − ψ)`` [degrees].
    contact_from_deg, contact_to_deg : float
        The loaded part of the lining [degrees].
    line_load : tuple of (float, float)
        Samples (polar angle [degrees], line load [N/mm]) along the lining.
    """

    name: str
    part: str
    model: str
    mounting: str
    contact_angle_deg: float
    normal_N: float
    friction_resultant_N: float
    friction_lining_N: float
    torque_Nm: float
    contact: Point
    force: Point
    normal_force: Point
    normal_at: Point
    friction_force: Point
    friction_at: Point
    internal: bool = False
    peak_line_load_N_per_mm: float = math.nan
    peak_at_deg: float = math.nan
    mu_equivalent: float = math.nan
    pressure_offset_deg: float | None = None
    contact_from_deg: float = math.nan
    contact_to_deg: float = math.nan
    line_load: tuple[tuple[float, float], ...] = ()

    def peak_pressure_MPa(self, width_mm: float) -> float:
        """Peak lining pressure [MPa] for a lining ``width_mm`` [mm] wide."""
        return self.peak_line_load_N_per_mm / width_mm


@dataclass(frozen=True)
class BandEnd:
    """One end of a band as solved.

    Attributes
    ----------
    pin : str
        The pin the end's straight piece runs to.
    tight : bool
        True at the tight end (where the drum surface moves away from it).
    tension_N : float
        Its tension [N].
    tangent : Point
        Where the band leaves the drum [mm].
    pull : Point
        The band's force on the pin [N], along the straight piece towards the
        drum; the band's force on the drum at ``tangent`` is its opposite.
    """

    pin: str
    tight: bool
    tension_N: float
    tangent: Point
    pull: Point


@dataclass(frozen=True)
class BandResult:
    """One band's tensions.

    Attributes
    ----------
    tight_N, slack_N : float
        Tight- and slack-side tension [N] (T1/T2 = e^(μθ)).
    tight_pin, slack_pin : str
        The pins at the tight and slack ends.
    wrap_deg : float
        Angle of wrap [degrees].
    torque_Nm : float
        Braking torque (T1 − T2)·r [N·m].
    peak_line_load_N_per_mm : float
        Largest pressure × band width, T1/r [N/mm], at the tight end.
    kind : str
        ``simple``, ``differential`` or ``two-lever``.
    ends : tuple of BandEnd
        The wrap's start end, then its end end, as solved.
    """

    name: str
    kind: str
    tight_N: float
    slack_N: float
    tight_pin: str
    slack_pin: str
    wrap_deg: float
    torque_Nm: float
    peak_line_load_N_per_mm: float
    ends: tuple[BandEnd, ...] = ()


@dataclass(frozen=True)
class SpringEnd:
    """The force ``force`` [N] a spring exerts at ``point`` [mm] on ``part``
    (None: the frame)."""

    part: str | None
    point: Point
    force: Point


@dataclass(frozen=True)
class SpringResult:
    """A spring's force ``force_N`` [N] as used; ``state`` is tension or
    compression; ``ends`` the force at each end as applied."""

    name: str
    force_N: float
    state: str
    ends: tuple[SpringEnd, ...] = ()


@dataclass(frozen=True)
class MemberResult:
    """A two-force member's axial force ``axial_N`` [N], tension positive,
    between pins ``ends``; ``length_mm`` [mm] between them."""

    name: str
    ends: tuple[str, str]
    axial_N: float
    length_mm: float

    @property
    def state(self) -> str:
        return "tension" if self.axial_N >= 0 else "compression"


@dataclass(frozen=True)
class LoadResult:
    """An applied load as used: point [mm] and components [N]."""

    name: str
    part: str
    x_mm: float
    y_mm: float
    fx_N: float
    fy_N: float

    @property
    def force_N(self) -> float:
        return math.hypot(self.fx_N, self.fy_N)


@dataclass(frozen=True)
class CaseSolution:
    """The statics of one drum direction at one friction coefficient.

    Attributes
    ----------
    direction : Direction
    mu : float
        Friction coefficient used [-].
    torque_Nm : float
        Braking torque on the drum [N·m].
    critical_mu : float or None
        Friction coefficient at which the brake self-locks in this direction
        [-], if one below 1 exists.
    residual : float
        Largest equilibrium residual relative to the largest force [-].
    condition : float
        Condition number of the equilibrium equations [-].
    findings : tuple of Finding
    effort_scale : float or None
        The factor applied to the drawing's efforts (the effort for a
        torque), else None.
    short_shoe_torque_Nm : float or None
        Where any shoe was solved by long-shoe theory: the braking torque of
        the same drawing and case with short-shoe theory on every shoe
        [N·m], for comparison; None otherwise (or when that solve fails).
    """

    direction: Direction
    mu: float
    torque_Nm: float
    shoes: tuple[ShoeResult, ...]
    pins: tuple[PinResult, ...]
    members: tuple[MemberResult, ...]
    loads: tuple[LoadResult, ...]
    critical_mu: float | None
    residual: float
    condition: float
    findings: tuple[Finding, ...] = ()
    bands: tuple[BandResult, ...] = ()
    springs: tuple[SpringResult, ...] = ()
    effort_scale: float | None = None
    short_shoe_torque_Nm: float | None = None

    @property
    def brakes(self) -> bool:
        """False when an error finding says this case is no brake (a shoe
        would pull, a band would push, the brake self-locks)."""
        return not any(f.severity is Severity.ERROR for f in self.findings)

    @property
    def braking_torque_Nm(self) -> float | None:
        """The braking torque [N·m] where the case brakes, else None: a
        number that is no brake's is never shown as one."""
        return self.torque_Nm if self.brakes else None

    @property
    def why_not_braking(self) -> str | None:
        """Why the case does not brake (its error findings), or None."""
        errors = [f"{f.code.id} {f.message}" for f in self.findings if f.severity is Severity.ERROR]
        return "; ".join(errors) if errors else None

    def shoe(self, name: str) -> ShoeResult:
        return next(s for s in self.shoes if s.name == name)

    def pin(self, name: str) -> PinResult:
        return next(p for p in self.pins if p.name == name)

    def member(self, name: str) -> MemberResult:
        return next(m for m in self.members if m.name == name)


@dataclass(frozen=True)
class Solution:
    """Every solved case of a mechanism and all findings so far."""

    mechanism: Mechanism
    cases: tuple[CaseSolution, ...]
    findings: tuple[Finding, ...] = field(default=())
    options: ContactOptions = field(default_factory=ContactOptions)

    def case(self, direction: Direction | str) -> CaseSolution:
        d = Direction(direction)
        return next(c for c in self.cases if c.direction is d)


@dataclass
class _System:
    a: NDArray[np.float64]
    b: NDArray[np.float64]
    row_owner: list[tuple[str, str]]  # ("body"|"pin", name)
    col_owner: list[tuple[str, str, str]]  # ("pin", pin, body) | ("shoe", shoe, basis index)
    bases: dict[str, tuple[ContactWrench, ...]]
    dropped: list[int]
    findings: list[Finding]


def band_ratio(band: Band, mu: float) -> float:
    """Tight over slack tension, T1/T2 = e^(μθ), θ the wrap [rad]
    (Euler–Eytelwein; Mott, *Machine Elements in Mechanical Design*, 4th ed.,
    §22-15)."""
    return math.exp(mu * math.radians(band.wrap_deg))


def tight_at_end(direction: Direction) -> bool:
    """Whether a band's tight end is the wrap's ``end`` (else its ``start``).

    Friction drags the band along with the drum surface, so along the
    surface's motion the band element's balance gives dT/dφ = −μT: the
    tension is highest where the surface *leaves* (moves away from) and
    lowest where it arrives.  The wrap runs counter-clockwise from ``start``
    to ``end``: a clockwise drum's surface moves from ``end`` towards
    ``start``, so ``end`` is tight; a counter-clockwise drum's, the other
    way round.  The tight end's pull then turns the drum against its motion.
    """
    return direction is Direction.CW


def _ref_point(mech: Mechanism, part: Part) -> Point:
    for s in mech.shoes:
        if s.part == part.name and s.mounting is Mounting.PIVOTED and s.pin is not None:
            return mech.pin(s.pin).center
    pts = part.points
    return (sum(p[0] for p in pts) / len(pts), sum(p[1] for p in pts) / len(pts))


def contact_models(
    mech: Mechanism, options: ContactOptions = DEFAULT_OPTIONS
) -> tuple[dict[str, ContactModel], list[Finding]]:
    """A fresh contact model for every shoe, and findings on the choices.

    ``auto`` takes long-shoe theory above ``options.long_threshold_deg``.
    A fixed shoe gets the hinged long-shoe model only when its lever turns
    about exactly one frame pivot; otherwise it falls back to short-shoe
    theory with a finding that says why.
    """
    out: dict[str, ContactModel] = {}
    notes: list[Finding] = []
    if mech.drum is None:
        return out, notes
    for s in mech.shoes:
        pin = mech.pin(s.pin).center if s.pin else None
        long = options.model is ShoeModelChoice.LONG or (
            options.model is ShoeModelChoice.AUTO and s.contact_angle_deg > options.long_threshold_deg
        )
        if not long:
            out[s.name] = short_shoe_model(s, mech.drum, pin)
            continue
        if s.mounting is Mounting.PIVOTED and pin is not None:
            out[s.name] = LongPivotedShoe(s, mech.drum, pin)
            continue
        pivots = [mech.pin(n) for n in mech.part(s.part).pins if mech.pin(n).grounded]
        if len(pivots) == 1:
            out[s.name] = LongHingedShoe(s, mech.drum, pivots[0].center)
            continue
        out[s.name] = short_shoe_model(s, mech.drum, pin)
        why = "turns about no frame pivot (a floating lever)" if not pivots else "has more than one frame pivot"
        notes.append(
            Finding(
                Code.SHORT_FALLBACK,
                f"shoe {s.name}: long-shoe theory needs a lever hinged to the frame, but {s.part} {why}; "
                "short-shoe theory is used",
                (s.arc.source.ref,),
                (s.arc.source.layer,),
            )
        )
    return out, notes


def _assemble(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> _System:
    L = mech.length_scale_mm
    bodies = [p.name for p in mech.parts]
    bidx = {n: i for i, n in enumerate(bodies)}
    refs = {p.name: _ref_point(mech, p) for p in mech.parts}
    pins = mech.pins
    n_rows = 3 * len(bodies) + 2 * len(pins)
    cols: list[tuple[str, str, str]] = []
    for p in pins:
        for body in p.bodies:
            cols.append(("pin", p.name, body))
    bases = {sh.name: models[sh.name].basis(mu, direction) for sh in mech.shoes}
    n_shoe_cols = sum(len(v) for v in bases.values())
    a = np.zeros((n_rows, 2 * len(cols) + n_shoe_cols + len(mech.bands)))
    b = np.zeros(n_rows)
    row_owner = [("body", n) for n in bodies for _ in range(3)] + [("pin", p.name) for p in pins for _ in range(2)]
    col_owner: list[tuple[str, str, str]] = []
    c = 0
    for k, p in enumerate(pins):
        prow = 3 * len(bodies) + 2 * k
        px, py = p.center
        for body in p.bodies:
            col_owner += [("pin", p.name, body), ("pin", p.name, body)]
            a[prow, c] = 1.0
            a[prow + 1, c + 1] = 1.0
            if body != FRAME:
                r = 3 * bidx[body]
                rx, ry = px - refs[body][0], py - refs[body][1]
                a[r, c] = 1.0
                a[r + 1, c + 1] = 1.0
                a[r + 2, c] = -ry / L
                a[r + 2, c + 1] = rx / L
            c += 2
    findings: list[Finding] = []
    for sh in mech.shoes:
        r = 3 * bidx[sh.part]
        for k, w in enumerate(bases[sh.name]):
            findings += w.findings
            a[r, c] = w.force[0]
            a[r + 1, c] = w.force[1]
            a[r + 2, c] = w.moment_about(refs[sh.part]) / L
            col_owner.append(("shoe", sh.name, str(k)))
            c += 1
    # bands: unknown slack-side tension; each end pulls its pin towards the drum
    pin_row = {p.name: 3 * len(bodies) + 2 * k for k, p in enumerate(pins)}
    at_end = tight_at_end(direction)
    for band in mech.bands:
        ratio = band_ratio(band, mu)
        for pin_name, u, tight in (
            (band.start_pin, band.start_dir, not at_end),
            (band.end_pin, band.end_dir, at_end),
        ):
            share = ratio if tight else 1.0
            r = pin_row[pin_name]
            # pin equilibrium: Σ (pin on bodies) − (band on pin) = 0
            a[r, c] -= share * u[0]
            a[r + 1, c] -= share * u[1]
        col_owner.append(("band", band.name, ""))
        c += 1
    applied: list[tuple[str, Point, Point]] = [(ld.part, ld.point, ld.force) for ld in mech.loads if ld.part]
    for sp in mech.springs:
        for end in (0, 1):
            part = sp.parts[end]
            if part is not None:
                applied.append((part, sp.ends[end], sp.force_on(end)))
    for part, point, (fx, fy) in applied:
        r = 3 * bidx[part]
        rx, ry = point[0] - refs[part][0], point[1] - refs[part][1]
        b[r] -= fx
        b[r + 1] -= fy
        b[r + 2] -= (rx * fy - ry * fx) / L
    # drop identities 0 = 0 (a pivoted shoe's moment about its own pin)
    scale = float(np.abs(a).max()) if a.size else 1.0
    dropped = [i for i in range(n_rows) if float(np.abs(a[i]).max(initial=0.0)) <= ZERO_ROW_RTOL * scale]
    return _System(a, b, row_owner, col_owner, bases, dropped, findings)


def _names_in(weights: Iterable[tuple[str, float]], share: float = MODE_SHARE) -> list[str]:
    """Names whose summed squared weights exceed ``share``² of the largest,
    the largest first."""
    acc: dict[str, float] = {}
    for name, w in weights:
        acc[name] = acc.get(name, 0.0) + w * w
    if not acc:
        return []
    top = max(acc.values())
    return sorted((n for n, v in acc.items() if v > share**2 * top), key=lambda n: -acc[n])


#: The parts named as moving in a free motion: those whose motion exceeds
#: this fraction of the largest.
MOVING_SHARE = 0.1
#: Findings that explain a free motion when they sit on a part or pin that
#: takes part in it.
CAUSE_CODES = (Code.OPEN_END, Code.LONELY_PIN, Code.ORPHAN_PIN, Code.LOAD_AT_PIVOT)


def _at_text(at: Point | None) -> str:
    return f" at ({at[0]:.6g}, {at[1]:.6g}) mm" if at is not None else ""


def _probable_causes(mech: Mechanism, null: NDArray[np.float64], owners: list[tuple[str, str]]) -> list[Finding]:
    """The reading and topology findings on any part or pin that takes part
    in any free motion (a column of ``null``, the left null space: the
    motions the equations allow), most likely first."""
    weight = np.sqrt(np.sum(null * null, axis=1))
    top = float(weight.max(initial=0.0)) or 1.0
    bodies = {name for i, (kind, name) in enumerate(owners) if kind == "body" and weight[i] > 1e-6 * top}
    pins = {name for i, (kind, name) in enumerate(owners) if kind == "pin" and weight[i] > 1e-6 * top}
    refs = {src.ref for p in mech.parts if p.name in bodies for src in p.sources}
    refs |= {p.source.ref for p in mech.pins if p.name in pins or set(p.bodies) & bodies}
    near = [f for f in mech.findings if f.code in CAUSE_CODES and set(f.handles) & refs]
    others = [f for f in mech.findings if f.code in CAUSE_CODES and f not in near]
    # a part left out of the linkage altogether (a lonely pin, an open end)
    # is named even when it is not a moving part's
    return near + [f for f in others if "near miss" in f.message]


def _pin_srcs(mech: Mechanism, names: Sequence[str]) -> tuple[tuple[str, ...], tuple[str, ...], Point | None]:
    pins = [mech.pin(n) for n in names if any(p.name == n for p in mech.pins)]
    return (
        tuple(p.source.ref for p in pins),
        tuple(p.source.layer for p in pins),
        pins[0].center if pins else None,
    )


def _part_srcs(mech: Mechanism, names: Sequence[str]) -> tuple[tuple[str, ...], tuple[str, ...], Point | None]:
    parts = [mech.part(n) for n in names if any(p.name == n for p in mech.parts)]
    srcs = [s for p in parts for s in p.sources]
    return (
        tuple(s.ref for s in srcs),
        tuple(s.layer for s in srcs),
        parts[0].segments[0][0] if parts else None,
    )


def _diagnose(mech: Mechanism, sys_: _System, direction: Direction) -> tuple[list[Finding], float]:
    """Free motions and redundancy by SVD; returns findings and the
    condition number."""
    findings: list[Finding] = []
    keep = [i for i in range(sys_.a.shape[0]) if i not in sys_.dropped]
    # rows dropped while the loads act on them: a part with nothing to hold it
    bscale = max(float(np.abs(sys_.b).max(initial=0.0)), 1.0)
    loose: list[str] = []
    for i in sys_.dropped:
        kind, name = sys_.row_owner[i]
        pivoted_moment = (
            kind == "body" and i % 3 == 2 and any(s.part == name and s.mounting is Mounting.PIVOTED for s in mech.shoes)
        )
        if pivoted_moment and abs(sys_.b[i]) <= EXCITATION_RTOL * bscale:
            continue
        if name not in loose:
            loose.append(name)
    for name in loose:
        h, lay, at = _part_srcs(mech, [name])
        excited = any(abs(sys_.b[i]) > EXCITATION_RTOL * bscale for i in sys_.dropped if sys_.row_owner[i][1] == name)
        findings.append(
            Finding(
                Code.FREE_MOTION,
                f"{direction}: part {name} is held by nothing (no pin or shoe reaches it)"
                + ("; its load cannot be carried" if excited else ""),
                h,
                lay,
                at,
                Severity.ERROR if excited else Severity.WARNING,
            )
        )
    a = sys_.a[keep]
    b = sys_.b[keep]
    owners = [sys_.row_owner[i] for i in keep]
    if a.size == 0:
        return findings, 1.0
    u, s, vt = np.linalg.svd(a)
    smax = float(s[0]) if s.size else 0.0
    rank = int(np.sum(s > RANK_RTOL * smax))
    m, n = a.shape
    cond = smax / float(s[rank - 1]) if rank > 0 else math.inf
    if rank < m:
        null = u[:, rank:]
        proj = null.T @ b
        bnorm = float(np.linalg.norm(b)) or 1.0
        excited = float(np.linalg.norm(proj)) > EXCITATION_RTOL * bnorm
        y = null @ proj if excited else null[:, 0]
        body_names = _names_in(
            ((name, float(y[i])) for i, (kind, name) in enumerate(owners) if kind == "body"), MOVING_SHARE
        )
        pin_names = _names_in((name, float(y[i])) for i, (kind, name) in enumerate(owners) if kind == "pin")
        moving = [nm for nm in body_names if nm not in loose]
        if moving or not excited:
            h, lay, at = _part_srcs(mech, moving)
            verb = "can move under the loads" if excited else "can move freely (the loads do not drive it)"
            around = f" (around pins {', '.join(pin_names)})" if pin_names else ""
            causes = _probable_causes(mech, null, owners)
            findings.append(
                Finding(
                    Code.FREE_MOTION,
                    f"{direction}: part{'s' if len(moving) != 1 else ''} {', '.join(moving) or '?'} {verb}{around}: "
                    f"the linkage has {m - rank} free motion{'s' if m - rank > 1 else ''}; "
                    + (
                        "probable cause: "
                        + ", ".join(f"{f.code.id} {f.code.slug}" + _at_text(f.at) for f in causes)
                        + " (listed below)"
                        if causes
                        else "add the pin or link that holds it"
                    ),
                    h,
                    lay,
                    at,
                    Severity.ERROR if excited else Severity.WARNING,
                )
            )
    if rank < n:
        v = vt[rank:].T
        weights = np.sqrt(np.sum(v * v, axis=1))
        pin_w = [(o[1], float(weights[j])) for j, o in enumerate(sys_.col_owner) if o[0] == "pin"]
        names = _names_in(pin_w)
        h, lay, at = _pin_srcs(mech, names)
        findings.append(
            Finding(
                Code.REDUNDANT,
                f"{direction}: the linkage is statically indeterminate ({n - rank} redundant "
                f"constraint{'s' if n - rank > 1 else ''}): the forces at pins {', '.join(names)} are not fixed "
                "by statics alone. A real brake needs a floating lever, an equaliser or a spring there",
                h,
                lay,
                at,
            )
        )
    elif rank == n and cond > CONDITION_WARN:
        weak = u[:, -1]
        names = _names_in((name, float(weak[i])) for i, (kind, name) in enumerate(owners) if kind == "body")
        findings.append(
            Finding(
                Code.ILL_CONDITIONED,
                f"{direction}: the equations are nearly singular (condition number {cond:.3g}); "
                f"results near {', '.join(names)} are very sensitive to the geometry",
            )
        )
    return findings, cond


def _square_det_sign(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> float:
    sys_ = _assemble(mech, models, mu, direction)
    keep = [i for i in range(sys_.a.shape[0]) if i not in sys_.dropped]
    a = sys_.a[keep]
    if a.shape[0] != a.shape[1]:
        return math.nan
    sign, _ = np.linalg.slogdet(a)
    return float(sign)


@functools.lru_cache(maxsize=64)
def critical_mu(
    mech: Mechanism,
    direction: Direction,
    options: ContactOptions = DEFAULT_OPTIONS,
    mu_max: float = MU_SCAN_MAX,
) -> float | None:
    """The friction coefficient at which the brake self-locks in
    ``direction`` [-], or None if there is none up to ``mu_max``.

    The equilibrium equations are linear in the unknown forces for a given
    μ; at the self-locking limit they become singular with a non-trivial
    solution under zero load, in which every shoe presses on the drum.  The
    limit is found by scanning the sign of the determinant and bisecting
    (with each lining in full contact).  It does not depend on the loads, so
    it is computed once per mechanism, direction and shoe model (cached).
    """
    models, _ = contact_models(mech, options)
    grid = [mu_max * k / MU_SCAN_STEPS for k in range(MU_SCAN_STEPS + 1)]
    signs = [_square_det_sign(mech, models, mu, direction) for mu in grid]
    if any(math.isnan(s) for s in signs):
        return None
    for k in range(MU_SCAN_STEPS):
        lo, hi, slo = grid[k], grid[k + 1], signs[k]
        if slo == 0.0:
            hi = lo
        elif slo * signs[k + 1] > 0:
            continue
        while hi - lo > MU_TOL:
            mid = 0.5 * (lo + hi)
            sm = _square_det_sign(mech, models, mid, direction)
            if sm * slo > 0:
                lo = mid
            else:
                hi = mid
        mu_c = 0.5 * (lo + hi)
        if _all_shoes_press(mech, models, mu_c, direction):
            return mu_c
    return None


def _shoe_loads(sys_: _System, v: NDArray[np.float64]) -> dict[str, float]:
    """Each shoe's total normal load Σ (unknown × ∫q·r dφ) for a vector of
    unknowns (the braking torque over μr: positive when it presses)."""
    out: dict[str, float] = {}
    for j, (kind, name, k) in enumerate(sys_.col_owner):
        if kind == "shoe":
            w = sys_.bases[name][int(k)]
            out[name] = out.get(name, 0.0) + float(v[j]) * w.torque_per_unit_Nmm
        elif kind == "band":
            out[name] = float(v[j])  # slack tension: positive when the band is taut
    return out


def _all_shoes_press(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> bool:
    sys_ = _assemble(mech, models, mu, direction)
    keep = [i for i in range(sys_.a.shape[0]) if i not in sys_.dropped]
    _, _, vt = np.linalg.svd(sys_.a[keep])
    loads = list(_shoe_loads(sys_, vt[-1]).values())
    if not loads:
        return False
    if sum(loads) < 0:
        loads = [-x for x in loads]
    top = max(abs(x) for x in loads)
    return top > 0 and all(x >= -1e-6 * top for x in loads) and max(loads) > MODE_SHARE * top


def _solve_system(sys_: _System) -> NDArray[np.float64]:
    keep = [i for i in range(sys_.a.shape[0]) if i not in sys_.dropped]
    a, b = sys_.a[keep], sys_.b[keep]
    return np.asarray(
        np.linalg.solve(a, b) if a.shape[0] == a.shape[1] else np.linalg.lstsq(a, b, rcond=None)[0],
        dtype=np.float64,
    )


def _settle_contact(
    mech: Mechanism, models: dict[str, ContactModel], sys_: _System, mu: float, direction: Direction
) -> tuple[_System, NDArray[np.float64]]:
    """Solve, then trim each pivoted long shoe's contact patch to where the
    pressure is not negative and solve again, until no patch changes.

    Raises
    ------
    SolveError
        With S313 when the patches do not settle, or the equations become
        singular on a trimmed patch: no contact with positive pressure
        everywhere balances the loads.
    """
    changed: list[str] = []
    for k in range(PATCH_ITERATIONS + 1):
        try:
            x = _solve_system(sys_)
        except np.linalg.LinAlgError:
            if k == 0:
                raise SolveError(
                    f"{direction}: the equilibrium equations are singular", path=mech.drawing.path
                ) from None
            break
        changed = [s.name for s in mech.shoes if models[s.name].refine(_coeffs(sys_, x, s.name), mu, direction)]
        edge = [s.name for s in mech.shoes if getattr(models[s.name], "on_edge", False)]
        if edge:
            changed = edge
            break
        if not changed:
            return sys_, x
        sys_ = _assemble(mech, models, mu, direction)
    names = changed or [s.name for s in mech.shoes if getattr(models[s.name], "partial", False)]
    shoes = [s for s in mech.shoes if s.name in names] or list(mech.shoes)
    raise SolveError(
        f"{direction}: the shoes' contact cannot be settled",
        path=mech.drawing.path,
        findings=[
            Finding(
                Code.CONTACT_UNSETTLED,
                f"{direction}: shoe {s.name}: no contact patch with a positive pressure everywhere balances the "
                "loads (the patch keeps moving, shrinks to the lining's edge, or the linkage locks on it); check the "
                "shoe pin's position against the lining, and the lining's extent",
                (s.arc.source.ref,),
                (s.arc.source.layer,),
                s.arc.point_at(s.arc.mid_deg),
            )
            for s in shoes
        ],
    )


def _coeffs(sys_: _System, x: NDArray[np.float64], shoe: str) -> list[float]:
    return [float(x[j]) for j, o in enumerate(sys_.col_owner) if o[0] == "shoe" and o[1] == shoe]


def solve_case(
    mech: Mechanism,
    mu: float,
    direction: Direction | str,
    options: ContactOptions = DEFAULT_OPTIONS,
    *,
    locking: bool = True,
) -> CaseSolution:
    """Solve the statics of one drum direction.

    Parameters
    ----------
    mech : Mechanism
        A mechanism without error findings.
    mu : float
        Coefficient of friction between lining and drum [-].
    direction : Direction or str
        ``"cw"`` or ``"ccw"``, as seen in the drawing.
    options : ContactOptions
        Shoe theory (short, long or auto) and the auto threshold.
    locking : bool
        Search for the self-locking limit (``critical_mu``); False skips the
        search and reports none.

    Returns
    -------
    CaseSolution

    Raises
    ------
    SolveError
        When the linkage has a free motion the loads drive, or is redundant;
        the error carries the findings that name the parts and pins.
    """
    try:
        return _solve_case(mech, mu, Direction(direction), options, locking)
    except SolveError as exc:
        raise _with_warnings(mech, exc) from None


def _with_warnings(mech: Mechanism, exc: SolveError) -> SolveError:
    """``exc`` with the mechanism's warnings after its errors: a refusal
    shows the reading and topology findings that may explain it (an open
    end, a one-part pin) even though they are only warnings."""
    errors = list(exc.findings)
    warnings = [f for f in mech.findings if f.severity is Severity.WARNING and f not in errors]
    # warnings on the entities an error names first
    named = {h for f in errors for h in f.handles}
    warnings.sort(key=lambda f: not (set(f.handles) & named))
    return SolveError(exc.message, path=exc.path, findings=[*errors, *warnings])


def _solve_case(
    mech: Mechanism, mu: float, direction: Direction, options: ContactOptions, locking: bool
) -> CaseSolution:
    if has_errors(list(mech.findings)):
        raise SolveError(
            "the mechanism has errors; fix the drawing first",
            path=mech.drawing.path,
            findings=[f for f in mech.findings if f.severity is Severity.ERROR],
        )
    if not math.isfinite(mu) or mu < 0:
        raise SolveError(f"friction coefficient must be a non-negative number, got {mu}")
    models, notes = contact_models(mech, options)
    sys_ = _assemble(mech, models, mu, direction)
    if has_errors(sys_.findings):  # a contact model that cannot place its force explains the rest
        raise SolveError(
            f"{direction}: a shoe's contact cannot be placed",
            path=mech.drawing.path,
            findings=[f for f in sys_.findings if f.severity is Severity.ERROR],
        )
    findings, cond = _diagnose(mech, sys_, direction)
    if has_errors(findings) or cond > CONDITION_WARN:
        mu_c = critical_mu(mech, direction, options)
        if mu_c is not None and abs(mu - mu_c) <= AT_LIMIT_RTOL * max(1.0, mu_c):
            raise SolveError(
                f"{direction}: μ = {mu:g} is at the self-locking limit",
                path=mech.drawing.path,
                findings=[
                    Finding(
                        Code.SELF_LOCKING,
                        f"{direction}: μ = {mu:g} is at the self-locking limit (critical μ = {mu_c:.6g}): the "
                        "equations are singular there, any effort or none holds the brake; move away from it",
                    )
                ],
            )
    if has_errors(findings):
        raise SolveError(
            f"{direction}: the linkage cannot be solved",
            path=mech.drawing.path,
            findings=[f for f in findings if f.severity is Severity.ERROR],
        )
    sys_, x = _settle_contact(mech, models, sys_, mu, direction)
    findings = list(dict.fromkeys([*notes, *sys_.findings, *findings]))
    fscale = max(float(np.abs(x).max(initial=0.0)), float(np.abs(sys_.b).max(initial=0.0)), 1e-300)
    residual = float(np.abs(sys_.a @ x - sys_.b).max(initial=0.0)) / fscale
    if residual > RESIDUAL_LIMIT:
        findings.append(Finding(Code.RESIDUAL, f"{direction}: equilibrium residual {residual:.3g} is too large"))
    case = _results(mech, models, sys_, x, mu, direction, residual, cond, findings, options if locking else None)
    verify_case(mech, case)
    return case


def _shoe_result(
    mech: Mechanism, model: ContactModel, ws: tuple[ContactWrench, ...], coeffs: list[float], mu: float
) -> ShoeResult:
    s = next(sh for sh in mech.shoes if sh.name == ws[0].model or sh is getattr(model, "shoe", None))
    force, normal, friction, torque = combine(ws, coeffs)
    assert mech.drum is not None
    center, radius = mech.drum.center, mech.drum.radius_mm
    m_o = moment_about_center(ws, coeffs, center)
    point = line_of_action_point(center, radius, force, m_o, s.arc.mid_deg)
    total = sum(c * w.torque_per_unit_Nmm for c, w in zip(coeffs, ws, strict=True))
    sign = 1.0 if total >= 0 else -1.0
    peak, peak_deg = model.peak(coeffs)
    load = tuple(
        (ws[0].line_load[k][0], sum(c * w.line_load[k][1] for c, w in zip(coeffs, ws, strict=True)))
        for k in range(len(ws[0].line_load))
    )
    offset = model.offset_deg(coeffs) if isinstance(model, LongPivotedShoe) else None
    patch = (
        (math.degrees(model.patch[0]) % 360, math.degrees(model.patch[1]) % 360)
        if isinstance(model, LongPivotedShoe)
        else (s.arc.start_deg, s.arc.end_deg)
    )
    # the normal forces are radial: their resultant runs through the axis and
    # the whole moment about the axis is the friction's
    normal_at = line_of_action_point(center, radius, normal, 0.0, s.arc.mid_deg)
    friction_at = _foot_of_line(center, friction, m_o, point)
    return ShoeResult(
        name=s.name,
        part=s.part,
        model=model.name,
        mounting=str(s.mounting),
        contact_angle_deg=s.contact_angle_deg,
        normal_N=sign * math.hypot(*normal),
        friction_resultant_N=sign * math.hypot(*friction),
        friction_lining_N=torque / radius,
        torque_Nm=torque / 1000.0,
        contact=point,
        force=force,
        normal_force=normal,
        normal_at=normal_at,
        friction_force=friction,
        friction_at=friction_at,
        internal=s.internal,
        peak_line_load_N_per_mm=peak,
        peak_at_deg=peak_deg,
        mu_equivalent=equivalent_mu(mu, s.contact_angle_deg),
        pressure_offset_deg=offset,
        contact_from_deg=patch[0],
        contact_to_deg=patch[1],
        line_load=load,
    )


def _foot_of_line(center: Point, force: Point, moment: float, fallback: Point) -> Point:
    """The foot of the perpendicular from ``center`` to the line of action of
    ``force`` [N] whose moment about ``center`` is ``moment`` [N·mm]."""
    f2 = force[0] ** 2 + force[1] ** 2
    if f2 == 0.0:
        return fallback
    return (center[0] + moment * force[1] / f2, center[1] - moment * force[0] / f2)


def _band_result(band: Band, slack: float, mu: float, direction: Direction) -> BandResult:
    tight = slack * band_ratio(band, mu)
    at_end = tight_at_end(direction)
    ends = []
    for pin, u, deg, is_tight in (
        (band.start_pin, band.start_dir, band.start_deg, not at_end),
        (band.end_pin, band.end_dir, band.end_deg, at_end),
    ):
        t = tight if is_tight else slack
        tangent = (
            band.center[0] + band.radius_mm * math.cos(math.radians(deg)),
            band.center[1] + band.radius_mm * math.sin(math.radians(deg)),
        )
        ends.append(BandEnd(pin, is_tight, t, tangent, (t * u[0], t * u[1])))
    return BandResult(
        name=band.name,
        kind=band.kind,
        tight_N=tight,
        slack_N=slack,
        tight_pin=band.end_pin if at_end else band.start_pin,
        slack_pin=band.start_pin if at_end else band.end_pin,
        wrap_deg=band.wrap_deg,
        torque_Nm=(tight - slack) * band.radius_mm / 1000.0,
        peak_line_load_N_per_mm=tight / band.radius_mm,
        ends=tuple(ends),
    )


def _results(
    mech: Mechanism,
    models: dict[str, ContactModel],
    sys_: _System,
    x: NDArray[np.float64],
    mu: float,
    direction: Direction,
    residual: float,
    cond: float,
    findings: list[Finding],
    options: ContactOptions | None,
) -> CaseSolution:
    """The results of one solve; ``options`` None skips the self-locking
    search."""
    att: dict[str, list[Attachment]] = {}
    j = 0
    while j < len(sys_.col_owner):
        kind, name, body = sys_.col_owner[j]
        if kind == "pin":
            att.setdefault(name, []).append(Attachment(body, float(x[j]), float(x[j + 1])))
            j += 2
        else:
            j += 1
    shoes = [_shoe_result(mech, models[s.name], sys_.bases[s.name], _coeffs(sys_, x, s.name), mu) for s in mech.shoes]
    pins: list[PinResult] = []
    for p in mech.pins:
        lst = att[p.name]
        first = lst[0]
        pins.append(
            PinResult(
                name=p.name,
                x_mm=p.center[0],
                y_mm=p.center[1],
                diameter_mm=p.diameter_mm,
                grounded=p.grounded,
                parts=p.bodies,
                fx_N=first.fx_N,
                fy_N=first.fy_N,
                force_N=first.force_N,
                max_force_N=max(a.force_N for a in lst),
                attachments=tuple(lst),
            )
        )
    shoe_parts = {s.part for s in mech.shoes}
    loaded = {ld.part for ld in mech.loads} | {p for sp in mech.springs for p in sp.parts if p}
    members: list[MemberResult] = []
    for part in mech.parts:
        if len(part.pins) != 2 or part.name in shoe_parts or part.name in loaded:
            continue
        pa, pb = mech.pin(part.pins[0]), mech.pin(part.pins[1])
        length = dist(pa.center, pb.center)
        if length <= mech.tolerance_mm:
            continue
        ux, uy = (pb.center[0] - pa.center[0]) / length, (pb.center[1] - pa.center[1]) / length
        fb = next(a for a in att[pb.name] if a.body == part.name)
        members.append(MemberResult(part.name, (pa.name, pb.name), fb.fx_N * ux + fb.fy_N * uy, length))
    loads = tuple(LoadResult(ld.name, ld.part, ld.point[0], ld.point[1], *ld.force) for ld in mech.loads if ld.part)
    bands: list[BandResult] = []
    for j, (kind, name, _) in enumerate(sys_.col_owner):
        if kind != "band":
            continue
        band = next(b for b in mech.bands if b.name == name)
        bands.append(_band_result(band, float(x[j]), mu, direction))
    torque = sum(s.torque_Nm for s in shoes) + sum(b.torque_Nm for b in bands)
    mu_c = critical_mu(mech, direction, options) if options is not None else None
    fmax = max(
        [abs(s.normal_N) for s in shoes] + [abs(b.tight_N) for b in bands] + [ld.force_N for ld in loads] + [1e-300]
    )
    locked = mu_c is not None and mu >= mu_c
    if locked:
        findings.append(
            Finding(
                Code.SELF_LOCKING,
                f"{direction}: the brake self-locks at μ = {mu:g} (critical μ = {mu_c:.4g}): the drum drags "
                "the shoes on with no effort, and the effort would have to pull them off",
            )
        )
    else:
        for br in bands:
            if br.slack_N < -LIFT_RTOL * fmax:
                band = next(b for b in mech.bands if b.name == br.name)
                findings.append(
                    Finding(
                        Code.BAND_SLACK,
                        f"{direction}: {br.name} would have to push (tension {br.slack_N:.4g} N): under these "
                        "loads the band goes slack",
                        tuple(s.ref for s in band.sources),
                        tuple(s.layer for s in band.sources),
                    )
                )
        all_lift = bool(shoes) and all(sr.normal_N < -LIFT_RTOL * fmax for sr in shoes)
        spring_hint = (
            "; every shoe lifts while a spring sets the brake: is the spring's sense reversed? ('C' pushes its "
            "ends apart, 'T' pulls them together)"
            if all_lift and mech.springs
            else ""
        )
        for sr in shoes:
            if sr.normal_N < -LIFT_RTOL * fmax:
                sh = next(x for x in mech.shoes if x.name == sr.name)
                findings.append(
                    Finding(
                        Code.SHOE_LIFTS,
                        f"{direction}: shoe {sr.name} would have to pull on the drum (normal force "
                        f"{sr.normal_N:.4g} N): under these loads it lifts off"
                        + (spring_hint if sr is shoes[0] else ""),
                        (sh.arc.source.ref,),
                        (sh.arc.source.layer,),
                        sr.contact,
                    )
                )
    return CaseSolution(
        direction=direction,
        mu=mu,
        torque_Nm=torque,
        shoes=tuple(shoes),
        pins=tuple(pins),
        members=tuple(members),
        loads=loads,
        critical_mu=mu_c,
        residual=residual,
        condition=cond,
        findings=tuple(findings),
        bands=tuple(bands),
        springs=tuple(
            SpringResult(
                sp.name,
                sp.force_N or 0.0,
                "tension" if sp.tension else "compression",
                tuple(SpringEnd(sp.parts[k], sp.ends[k], sp.force_on(k)) for k in (0, 1)),
            )
            for sp in mech.springs
        ),
    )


def solve(
    mech: Mechanism,
    mu: float,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    options: ContactOptions = DEFAULT_OPTIONS,
) -> Solution:
    """Solve every requested drum direction.

    Raises
    ------
    SolveError
        As :func:`solve_case`.
    """
    cases = tuple(_beside_short(mech, solve_case(mech, mu, d, options), options) for d in directions)
    return _solution(mech, cases, options)


def _beside_short(mech: Mechanism, case: CaseSolution, options: ContactOptions) -> CaseSolution:
    """``case`` with the short-shoe torque of the same drawing beside it,
    where any of its shoes was solved by long-shoe theory."""
    if not any(s.model.startswith("long") for s in case.shoes):
        return case
    short = ContactOptions(ShoeModelChoice.SHORT, options.long_threshold_deg)
    try:
        other = solve_case(mech, case.mu, case.direction, short, locking=False)
    except SolveError:
        return case
    return replace(case, short_shoe_torque_Nm=other.torque_Nm)


def _solution(mech: Mechanism, cases: tuple[CaseSolution, ...], options: ContactOptions) -> Solution:
    findings = list(mech.findings)
    for c in cases:
        findings += [f for f in c.findings if f not in findings]
    return Solution(mechanism=mech, cases=cases, findings=tuple(findings), options=options)


def solve_for_torque(
    mech: Mechanism,
    torque_Nm: float,
    mu: float,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    options: ContactOptions = DEFAULT_OPTIONS,
) -> Solution:
    """The inverse question: the efforts that give ``torque_Nm`` [N·m] of
    braking torque in each direction, and the forces that result.

    For a given μ the statics is linear in the loads, so one solve with the
    drawing's loads (their ratios kept) gives the torque per unit of them,
    and a second at the exact scale gives the forces; no search.  Each case's
    ``effort_scale`` is the factor applied to the drawing's loads and springs.

    Raises
    ------
    SolveError
        As :func:`solve_case`, or when the loads give no positive torque in a
        direction (the brake would self-lock or the efforts release it).
    """
    if not math.isfinite(torque_Nm) or torque_Nm <= 0:
        raise SolveError(f"the required torque must be positive, got {torque_Nm:g} N·m")
    cases: list[CaseSolution] = []
    for d in directions:
        base = solve_case(mech, mu, d, options)
        if base.torque_Nm <= 0 or any(f.code is Code.SELF_LOCKING for f in base.findings):
            raise SolveError(
                f"{Direction(d)}: the drawing's efforts give {base.torque_Nm:.4g} N·m of braking torque "
                "(the brake self-locks or the efforts release it); no effort gives the required torque",
                path=mech.drawing.path,
            )
        k = torque_Nm / base.torque_Nm
        case = _beside_short(mech.scaled(k), solve_case(mech.scaled(k), mu, d, options), options)
        cases.append(replace(case, effort_scale=k))
    return _solution(mech.scaled(1.0), tuple(cases), options)
