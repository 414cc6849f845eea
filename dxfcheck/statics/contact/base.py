"""The contact-model interface shared by every shoe model.

A contact model describes the drum's action on one shoe as a sum of *basis
wrenches*, each multiplied by one unknown of the statics: the normal force
[N] for the short-shoe models, the peak line load ``q = p·b`` [N/mm] for the
hinged long shoe, the two coefficients of ``q = A·cos + B·sin`` [N/mm] for
the pivoted long shoe.  The statics stays linear in these unknowns.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from typing import Protocol

from dxfcheck.core.directions import Direction
from dxfcheck.core.errors import ConfigError
from dxfcheck.core.findings import Finding
from dxfcheck.core.geometry import Point
from dxfcheck.core.records import record
from dxfcheck.mechanism.model import Shoe

__all__ = [
    "DEFAULT_MU",
    "ContactModel",
    "ContactModelName",
    "ContactOptions",
    "ContactWrench",
    "Direction",
    "ShoeModelChoice",
    "WholeLining",
    "combine",
    "contact_options",
    "line_of_action_point",
    "moment_about_center",
    "surface_tangent",
]


class ShoeModelChoice(enum.StrEnum):
    """Which shoe theory to use."""

    SHORT = "short"
    LONG = "long"
    AUTO = "auto"


class ContactModelName(enum.StrEnum):
    """The contact models' names, as the results and the JSON spell them."""

    SHORT_FIXED = "short-fixed"
    SHORT_PIVOTED = "short-pivoted"
    LONG_HINGED = "long-hinged"
    LONG_PIVOTED = "long-pivoted"

    @property
    def is_long(self) -> bool:
        """Whether the model is one of long-shoe theory."""
        return self in (ContactModelName.LONG_HINGED, ContactModelName.LONG_PIVOTED)


#: Contact angle above which ``auto`` takes long-shoe theory [degrees].
#: Published thresholds range from 40° to 60°; 60° is common practice.
LONG_SHOE_THRESHOLD_DEG = 60.0


@record(frozen=True)
class ContactOptions:
    """How shoes are modelled.

    Attributes
    ----------
    model : ShoeModelChoice
        ``short``, ``long`` or ``auto``.
    long_threshold_deg : float
        Contact angle above which ``auto`` takes long-shoe theory [degrees].
    """

    model: ShoeModelChoice = ShoeModelChoice.AUTO
    long_threshold_deg: float = LONG_SHOE_THRESHOLD_DEG


#: Friction coefficient used when none is given [-]: the dry value for a
#: rigid non-asbestos lining in Neale (ed.), *Tribology Handbook*, section
#: B8, Table 8.10.
DEFAULT_MU = 0.35


def contact_options(shoe_model: ShoeModelChoice | str, long_threshold_deg: float) -> ContactOptions:
    """Checked :class:`ContactOptions`.

    Raises
    ------
    ConfigError
        On an unknown model name or a threshold outside 0°..360°.
    """
    try:
        choice = ShoeModelChoice(shoe_model)
    except ValueError:
        raise ConfigError(f"shoe model must be short, long or auto, got {shoe_model!r}") from None
    if not 0.0 <= long_threshold_deg <= 360.0:
        raise ConfigError(f"long-shoe threshold must be between 0 and 360 degrees, got {long_threshold_deg:g}")
    return ContactOptions(choice, long_threshold_deg)


def surface_tangent(angle_rad: float, direction: Direction) -> Point:
    """Unit vector of the drum surface's motion at polar angle ``angle_rad``
    [rad] for a drum turning in ``direction``."""
    s = direction.sign
    return (-s * math.sin(angle_rad), s * math.cos(angle_rad))


@record(frozen=True)
class ContactWrench:
    """The drum's action on a shoe per unit of one of the shoe's unknowns.

    Attributes
    ----------
    model : ContactModelName
        Name of the contact model.
    point : Point
        A point on the resultant's line of action [mm] (for short shoes the
        contact point; for long shoes where the line meets the drum surface
        nearest the lining's middle).
    force : Point
        Resultant force on the shoe's part per unit unknown.
    normal : Point
        Unit normal of the drum surface at ``point``, towards the shoe.
    tangent : Point
        Unit vector of the drum surface's motion at ``point``.
    normal_force, friction_force : Point
        Resultants of the normal and the friction forces per unit unknown.
    normal_per_unit, friction_per_unit : float
        Their magnitudes (kept for the short-shoe reports).
    torque_per_unit_Nmm : float
        Braking torque on the drum per unit unknown [N·mm], positive against
        the drum's motion.
    line_load : tuple of (float, float)
        Samples ``(polar angle [degrees], line load p·b [N/mm])`` per unit
        unknown along the lining.
    findings : tuple of Finding
    """

    model: ContactModelName
    point: Point
    force: Point
    normal: Point
    tangent: Point
    normal_per_unit: float
    friction_per_unit: float
    torque_per_unit_Nmm: float
    findings: tuple[Finding, ...] = ()
    normal_force: Point = (0.0, 0.0)
    friction_force: Point = (0.0, 0.0)
    line_load: tuple[tuple[float, float], ...] = ()

    def moment_about(self, ref: Point) -> float:
        """Moment of the unit force about ``ref`` [N·mm], counter-clockwise
        positive."""
        rx, ry = self.point[0] - ref[0], self.point[1] - ref[1]
        return rx * self.force[1] - ry * self.force[0]


class ContactModel(Protocol):
    """What the statics asks of a contact model."""

    @property
    def name(self) -> ContactModelName:
        """Name of the model, e.g. ``"short-fixed"``."""
        ...

    @property
    def shoe(self) -> Shoe:
        """The shoe the model describes."""
        ...

    @property
    def partial(self) -> bool:
        """Whether the contact patch is trimmed to part of the lining."""
        ...

    @property
    def on_edge(self) -> bool:
        """Whether the contact patch has shrunk to the lining's edge, where
        no pressure law holds (the statics refuses the solve)."""
        ...

    @property
    def contact_pin(self) -> Point | None:
        """The pin the drum's resultant passes through, which places the
        contact point (it moves with the pin) [mm]; None when the contact
        does not follow a pin's position."""
        ...

    def basis(self, mu: float, direction: Direction) -> tuple[ContactWrench, ...]:
        """One wrench per unknown at friction coefficient ``mu`` [-] with the
        drum turning in ``direction``."""
        ...

    def refine(self, coeffs: Sequence[float], mu: float, direction: Direction) -> bool:
        """Update the contact patch from a solution; True when it changed
        (the statics then solves again)."""
        ...

    def peak(self, coeffs: Sequence[float]) -> tuple[float, float]:
        """Peak line load [N/mm] and the polar angle where it acts [degrees]."""
        ...

    def notes(self) -> tuple[Finding, ...]:
        """Findings about the model's choice or validity."""
        ...

    def offset_deg(self, coeffs: Sequence[float]) -> float | None:
        """The pressure law's offset from the lining's middle [degrees], for
        a model whose law has one; else None."""
        ...

    def patch_deg(self) -> tuple[float, float]:
        """The contact patch's polar angles, from and to [degrees, 0..360)."""
        ...


class WholeLining:
    """What a contact model whose patch is the whole lining, never moved by
    the statics, answers of its patch (short shoes and the hinged long shoe;
    a model placed by a pin overrides :attr:`contact_pin`)."""

    shoe: Shoe

    @property
    def partial(self) -> bool:
        """The patch is never trimmed."""
        return False

    @property
    def on_edge(self) -> bool:
        """The patch never shrinks to an edge."""
        return False

    @property
    def contact_pin(self) -> Point | None:
        """No pin places the contact."""
        return None

    def offset_deg(self, coeffs: Sequence[float]) -> float | None:
        """No pressure law offset."""
        return None

    def patch_deg(self) -> tuple[float, float]:
        """The whole lining as drawn [degrees]."""
        return self.shoe.arc.start_deg, self.shoe.arc.end_deg


def line_of_action_point(center: Point, radius: float, force: Point, moment_o: float, near_deg: float) -> Point:
    """A point on the line of action of ``force`` whose moment about
    ``center`` is ``moment_o``: where the line meets the circle of
    ``radius`` nearest the polar angle ``near_deg``, or, when it misses the
    circle, the line's point nearest the centre."""
    fx, fy = force
    f2 = fx * fx + fy * fy
    if f2 == 0.0:
        t = math.radians(near_deg)
        return (center[0] + radius * math.cos(t), center[1] + radius * math.sin(t))
    # foot of the perpendicular from the centre: moment = cross(foot, F)
    foot = (moment_o * fy / f2, -moment_o * fx / f2)
    d2 = foot[0] ** 2 + foot[1] ** 2
    if d2 > radius * radius:
        return (center[0] + foot[0], center[1] + foot[1])
    half = math.sqrt(radius * radius - d2)
    f = math.sqrt(f2)
    ux, uy = fx / f, fy / f
    best: Point | None = None
    best_off = math.inf
    for s in (-1.0, 1.0):
        px, py = foot[0] + s * half * ux, foot[1] + s * half * uy
        off = abs(math.remainder(math.atan2(py, px) - math.radians(near_deg), 2 * math.pi))
        if off < best_off:
            best, best_off = (center[0] + px, center[1] + py), off
    assert best is not None
    return best


def combine(ws: Sequence[ContactWrench], coeffs: Sequence[float]) -> tuple[Point, Point, Point, float]:
    """Resultant force, normal and friction resultants [N] and braking torque
    [N·mm] of ``Σ coeffs[i]·ws[i]``."""
    fx = sum(c * w.force[0] for c, w in zip(coeffs, ws, strict=True))
    fy = sum(c * w.force[1] for c, w in zip(coeffs, ws, strict=True))
    nx = sum(c * w.normal_force[0] for c, w in zip(coeffs, ws, strict=True))
    ny = sum(c * w.normal_force[1] for c, w in zip(coeffs, ws, strict=True))
    tx = sum(c * w.friction_force[0] for c, w in zip(coeffs, ws, strict=True))
    ty = sum(c * w.friction_force[1] for c, w in zip(coeffs, ws, strict=True))
    torque = sum(c * w.torque_per_unit_Nmm for c, w in zip(coeffs, ws, strict=True))
    return (fx, fy), (nx, ny), (tx, ty), torque


def moment_about_center(ws: Sequence[ContactWrench], coeffs: Sequence[float], center: Point) -> float:
    """Moment of the combined resultant about ``center`` [N·mm]."""
    return sum(c * w.moment_about(center) for c, w in zip(coeffs, ws, strict=True))
