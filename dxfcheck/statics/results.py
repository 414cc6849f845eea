"""The statics' results: per drum direction, every pin, shoe, band, member,
spring and load as solved, in N, mm and N·m; vectors carry the unit in their
docstrings.  Built by :mod:`dxfcheck.statics.solver`.
"""

from __future__ import annotations

import math
from dataclasses import field

from dxfcheck.core.directions import Direction
from dxfcheck.core.findings import Finding, Severity
from dxfcheck.core.geometry import Point
from dxfcheck.core.records import record
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.statics.contact.base import ContactOptions

__all__ = [
    "Attachment",
    "BandEnd",
    "BandResult",
    "CaseSolution",
    "GuideResult",
    "LoadResult",
    "MemberResult",
    "PartDiagram",
    "PinResult",
    "ShoeResult",
    "Solution",
    "SpringEnd",
    "SpringResult",
    "Station",
]


@record(frozen=True)
class Attachment:
    """Force [N] a pin exerts on one body it joins."""

    body: str
    fx_N: float
    fy_N: float

    @property
    def force_N(self) -> float:
        return math.hypot(self.fx_N, self.fy_N)


@record(frozen=True)
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


@record(frozen=True)
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
    contact_mm : Point
        Where the resultant's line of action meets the drum surface [mm].
    force_N : Point
        Resultant force of the drum on the shoe [N].
    normal_force_N, normal_at_mm : Point
        The normal resultant [N] and a point of its line of action [mm] on
        the drum surface (the line runs through the drum axis).
    friction_force_N, friction_at_mm : Point
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
    contact_mm: Point
    force_N: Point
    normal_force_N: Point
    normal_at_mm: Point
    friction_force_N: Point
    friction_at_mm: Point
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


@record(frozen=True)
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
    tangent_mm : Point
        Where the band leaves the drum [mm].
    pull_N : Point
        The band's force on the pin [N], along the straight piece towards the
        drum; the band's force on the drum at ``tangent_mm`` is its opposite.
    """

    pin: str
    tight: bool
    tension_N: float
    tangent_mm: Point
    pull_N: Point


@record(frozen=True)
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


@record(frozen=True)
class SpringEnd:
    """The force ``force_N`` [N] a spring exerts at ``at_mm`` [mm] on ``part``
    (None: the frame)."""

    part: str | None
    at_mm: Point
    force_N: Point


@record(frozen=True)
class SpringResult:
    """A spring's force ``force_N`` [N] as used; ``state`` is tension or
    compression; ``ends`` the force at each end as applied."""

    name: str
    force_N: float
    state: str
    ends: tuple[SpringEnd, ...] = ()


@record(frozen=True)
class GuideResult:
    """A guide's force (:class:`dxfcheck.mechanism.model.Guide`): the part
    with the hole pushes the rod with ``force_N`` [N] at ``at_mm`` [mm],
    across the rod (normal to its axis); the rod pushes the part with the
    opposite force."""

    name: str
    rod: str
    part: str
    at_mm: Point
    force_N: Point

    def on_parts(self) -> tuple[tuple[str, Point], tuple[str, Point]]:
        """(part name, force on it [N]) for the rod and for the part with
        the hole: the guide's force, and its opposite."""
        return (self.rod, self.force_N), (self.part, (-self.force_N[0], -self.force_N[1]))


@record(frozen=True)
class MemberResult:
    """A two-force member's axial force ``axial_N`` [N], tension positive,
    between ``ends`` (two pins, or a pin and a spring or load that acts on
    the member's other end), at ``ends_mm`` [mm]; ``length_mm`` [mm] between
    them."""

    name: str
    ends: tuple[str, str]
    axial_N: float
    length_mm: float
    ends_mm: tuple[Point, Point] | None = None

    @property
    def state(self) -> str:
        return "tension" if self.axial_N >= 0 else "compression"


@record(frozen=True)
class Station:
    """The internal forces at one section of a part's centreline.

    ``at_mm`` [mm] is the section's point on the segment from ``start_mm``
    to ``end_mm`` [mm] of the part's ``segment``; the forces are those the
    part beyond the section (towards ``end_mm``) passes through it:
    ``axial_N`` [N] along the segment (tension positive), ``shear_N`` [N]
    across it (along the segment's direction turned 90° counter-clockwise)
    and ``moment_Nmm`` [N·mm], the moment about the section of every force
    on the part beyond it, counter-clockwise positive.
    """

    segment: int
    start_mm: Point
    end_mm: Point
    at_mm: Point
    axial_N: float
    shear_N: float
    moment_Nmm: float


@record(frozen=True)
class PartDiagram:
    """A part's axial force, shear and bending moment along its centreline
    (its segments split where another segment or a force meets them), from
    the solved pin, contact, load and spring forces on it.  ``stations``
    holds both sides of every point where a force acts; ``tree`` is False
    for a part whose centreline closes a loop (its internal forces are then
    not fixed by statics, and no stations are given)."""

    part: str
    tree: bool
    stations: tuple[Station, ...]

    @property
    def worst(self) -> Station | None:
        """The station of the largest bending moment, if any."""
        return max(self.stations, key=lambda s: abs(s.moment_Nmm), default=None)


@record(frozen=True)
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


@record(frozen=True)
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
    #: Each part's internal forces along its centreline.
    parts: tuple[PartDiagram, ...] = ()
    #: The resultant [N] of every force the shoes and bands put on the drum
    #: (the drum shaft's load; its bearings take the opposite).
    drum_load_N: Point | None = None
    #: Each guide's force on its rod (a rod through a lever's hole).
    guides: tuple[GuideResult, ...] = ()

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

    def part(self, name: str) -> PartDiagram:
        return next(p for p in self.parts if p.part == name)


@record(frozen=True)
class Solution:
    """Every solved case of a mechanism and all findings so far."""

    mechanism: Mechanism
    cases: tuple[CaseSolution, ...]
    findings: tuple[Finding, ...] = field(default=())
    options: ContactOptions = field(default_factory=ContactOptions)

    def case(self, direction: Direction | str) -> CaseSolution:
        d = Direction(direction)
        return next(c for c in self.cases if c.direction is d)
