"""The contact-model interface shared by every shoe model."""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass
from typing import Protocol

from dxfcheck.findings import Finding
from dxfcheck.geometry import Point

__all__ = ["ContactModel", "ContactWrench", "Direction", "surface_tangent"]


class Direction(enum.StrEnum):
    """Sense of the drum's rotation as seen in the drawing."""

    CW = "cw"
    CCW = "ccw"

    @property
    def sign(self) -> int:
        """+1 for counter-clockwise, -1 for clockwise."""
        return 1 if self is Direction.CCW else -1

    def mirrored(self) -> Direction:
        return Direction.CW if self is Direction.CCW else Direction.CCW


def surface_tangent(angle_rad: float, direction: Direction) -> Point:
    """Unit vector of the drum surface's motion at polar angle ``angle_rad``
    [rad] for a drum turning in ``direction``."""
    s = direction.sign
    return (-s * math.sin(angle_rad), s * math.cos(angle_rad))


@dataclass(frozen=True)
class ContactWrench:
    """The drum's action on a shoe per unit of the shoe's unknown.

    The unknown is the shoe's normal force [N] for the short-shoe models.

    Attributes
    ----------
    model : str
        Name of the contact model.
    point : Point
        Point on the line of action of the resultant [mm] (the contact
        point for the short-shoe models).
    force : Point
        Force on the shoe's part per unit unknown [N/N].
    normal : Point
        Unit inward-to-shoe normal at ``point``.
    tangent : Point
        Unit vector of the friction force on the shoe.
    normal_per_unit : float
        Normal force per unit unknown [N/N].
    friction_per_unit : float
        Friction force per unit unknown [N/N].
    torque_per_unit_Nmm : float
        Braking torque on the drum per unit unknown [N·mm/N], positive when
        it opposes the drum's motion.
    findings : tuple of Finding
    """

    model: str
    point: Point
    force: Point
    normal: Point
    tangent: Point
    normal_per_unit: float
    friction_per_unit: float
    torque_per_unit_Nmm: float
    findings: tuple[Finding, ...] = ()

    def moment_about(self, ref: Point) -> float:
        """Moment of the unit force about ``ref`` [N·mm/N], counter-clockwise
        positive."""
        rx, ry = self.point[0] - ref[0], self.point[1] - ref[1]
        return rx * self.force[1] - ry * self.force[0]


class ContactModel(Protocol):
    """What the statics asks of a contact model."""

    @property
    def name(self) -> str:
        """Name of the model, e.g. ``"short-fixed"``."""
        ...

    def wrench(self, mu: float, direction: Direction) -> ContactWrench:
        """The drum's action per unit unknown at friction coefficient ``mu``
        [-] with the drum turning in ``direction``."""
        ...
