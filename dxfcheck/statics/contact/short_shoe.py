"""Short-shoe contact models (the contact force concentrated at one point).

Short-shoe theory treats the lining pressure as uniform over a small arc, so
the drum's action on the shoe reduces to a normal force ``N`` at one point of
the drum surface and a Coulomb friction force ``μN`` along the surface's
motion.  It is accurate for small contact angles (commonly quoted: below
about 45°–60°); the long-shoe models correct it for larger arcs.

* **Fixed shoe** (rigid on its lever): ``N`` acts radially at the midpoint of
  the lining arc, ``μN`` along the tangent there.
* **Pivoted shoe** (free to turn on a pin): the shoe aligns itself so that the
  drum's resultant passes through the pin.  The resultant is inclined at the
  friction angle ``φ = atan μ`` to the normal at its contact point, so its
  line is tangent to the *friction circle* of radius ``r·sin φ`` about the
  drum axis; the contact point is where that line meets the drum surface.

Friction on the shoe acts in the direction of the drum surface's motion.
Weights are neglected.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering
   Design*, 10th ed., McGraw-Hill, 2015, ch. 16, "Clutches, Brakes,
   Couplings, and Flywheels" (short-shoe assumption, self-energising shoes).
.. [2] R. S. Khurmi and J. K. Gupta, *Theory of Machines*, S. Chand, chapter
   on brakes (block brakes: P·l = N(x ∓ μa)); friction circle: chapter on
   friction.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np

from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, angle_in_arc, cross
from dxfcheck.core.records import record
from dxfcheck.mechanism import Drum, Mounting, Shoe
from dxfcheck.statics.contact.base import ContactModelName, ContactWrench, Direction, WholeLining, surface_tangent

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = ["ShortFixedShoe", "ShortPivotedShoe", "friction_circle_contact", "short_shoe_model"]

#: Samples of the line load along a lining (for reports and pictures).
LINE_LOAD_SAMPLES = 36
#: Slack allowed at the lining's ends before a contact point is reported as
#: outside the lining [degrees].
LINING_SLACK_DEG = 1e-6


def _wrench_at(
    model: ContactModelName, shoe: Shoe, drum: Drum, alpha: float, mu: float, direction: Direction
) -> ContactWrench:
    radial = (math.cos(alpha), math.sin(alpha))
    # the drum pushes an external shoe outward and an internal shoe inward
    n = (-radial[0], -radial[1]) if shoe.internal else radial
    t = surface_tangent(alpha, direction)
    point = (drum.center[0] + drum.radius_mm * radial[0], drum.center[1] + drum.radius_mm * radial[1])
    force = (n[0] + mu * t[0], n[1] + mu * t[1])
    # braking torque on the drum: minus the moment of the shoe's force about
    # the axis, counted positive against the drum's motion
    arm = (point[0] - drum.center[0], point[1] - drum.center[1])
    torque = direction.sign * cross(arm, force)
    findings: tuple[Finding, ...] = ()
    deg = math.degrees(alpha) % 360
    if not angle_in_arc(deg, shoe.arc.start_deg, shoe.arc.end_deg, LINING_SLACK_DEG):
        findings = (
            Finding(
                Code.CONTACT_OFF_LINING,
                f"shoe {shoe.name}: the drum's resultant meets the drum at {deg:.2f}°, outside the "
                f"lining ({shoe.arc.start_deg:.2f}° to {shoe.arc.end_deg:.2f}°); the shoe would tip",
                (shoe.arc.source.ref,),
                (shoe.arc.source.layer,),
                point,
            ),
        )
    # short shoe: the normal force spread evenly over the lining's chord
    chord = 2 * drum.radius_mm * math.sin(math.radians(shoe.arc.span_deg) / 2)
    q = 1.0 / chord if chord > 0 else 0.0
    start, span = shoe.arc.start_deg, shoe.arc.span_deg
    load = tuple((start + span * k / LINE_LOAD_SAMPLES, q) for k in range(LINE_LOAD_SAMPLES + 1))
    return ContactWrench(model, point, force, n, t, 1.0, mu, torque, findings, n, (mu * t[0], mu * t[1]), load)


def friction_circle_contact(
    pin_x_mm: NDArray[np.float64],
    pin_y_mm: NDArray[np.float64],
    radius_mm: float,
    mu: NDArray[np.float64],
    direction: Direction,
    *,
    internal: bool,
    mid_deg: float,
) -> NDArray[np.float64]:
    """Polar angle [rad] of a short pivoted shoe's contact point, for pins at
    ``(pin_x_mm, pin_y_mm)`` relative to the drum axis [mm] and friction
    coefficients ``mu`` [-] (arrays of one shape; NaN where no line through
    the pin meets the drum at the friction angle).

    The drum's resultant on the shoe is inclined at ``φs = ±atan μ`` (sign of
    the drum's direction) to the normal, so its line is tangent to the
    friction circle of radius ``r·sin φs``; with the pin at polar position
    ``(p, β)``, ``α = β − δ`` where ``p·sin(φs − δ) = r·sin φs`` for an
    external shoe and ``p·sin(φs + δ) = r·sin φs`` for an internal one.  Of
    the two roots, the one with the pin ahead of the contact point along the
    force, nearest the lining's middle ``mid_deg``, is taken.  The scalar
    model (:class:`ShortPivotedShoe`) and the sampler both use this.
    """
    p = np.hypot(pin_x_mm, pin_y_mm)
    beta = np.arctan2(pin_y_mm, pin_x_mm)
    s = float(direction.sign)
    phi_s = s * np.arctan(mu)
    with np.errstate(divide="ignore", invalid="ignore"):
        k = radius_mm * np.sin(phi_s) / p
    meets = np.abs(k) <= 1.0
    asn = np.arcsin(np.where(meets, k, 0.0))
    mid = math.radians(mid_deg)
    sgn = -1.0 if internal else 1.0
    best_alpha = np.full(np.shape(k), np.nan)
    best_off = np.full(np.shape(k), np.inf)
    for delta in (asn - phi_s, np.pi - asn - phi_s) if internal else (phi_s - asn, phi_s - np.pi + asn):
        alpha = beta - delta
        fx = sgn * np.cos(alpha) - mu * s * np.sin(alpha)  # normal + μ × the surface's motion
        fy = sgn * np.sin(alpha) + mu * s * np.cos(alpha)
        ahead = (pin_x_mm - radius_mm * np.cos(alpha)) * fx + (pin_y_mm - radius_mm * np.sin(alpha)) * fy > 0
        off = np.abs(np.remainder(alpha - mid + np.pi, 2 * np.pi) - np.pi)
        better = meets & ahead & (off < best_off)
        best_alpha = np.where(better, alpha, best_alpha)
        best_off = np.where(better, off, best_off)
    return best_alpha


class _ShortBase(WholeLining):
    """What both short-shoe models share: one unknown, the normal force."""

    shoe: Shoe
    drum: Drum

    def refine(self, coeffs: Sequence[float], mu: float, direction: Direction) -> bool:
        return False

    def peak(self, coeffs: Sequence[float]) -> tuple[float, float]:
        """Uniform line load N/chord [N/mm] at the lining's middle."""
        chord = 2 * self.drum.radius_mm * math.sin(math.radians(self.shoe.arc.span_deg) / 2)
        return (coeffs[0] / chord if chord > 0 else math.inf), self.shoe.arc.mid_deg

    def notes(self) -> tuple[Finding, ...]:
        return ()


@record(frozen=True)
class ShortFixedShoe(_ShortBase):
    """Short shoe fixed to its lever: ``N`` radial at the lining's midpoint.

    Parameters
    ----------
    shoe : Shoe
    drum : Drum
    """

    shoe: Shoe
    drum: Drum
    name: ContactModelName = ContactModelName.SHORT_FIXED

    def basis(self, mu: float, direction: Direction) -> tuple[ContactWrench, ...]:
        """Force on the shoe per newton of normal force [N/N]."""
        alpha = math.radians(self.shoe.arc.mid_deg)
        return (_wrench_at(self.name, self.shoe, self.drum, alpha, mu, direction),)


@record(frozen=True)
class ShortPivotedShoe(_ShortBase):
    """Short shoe on a pin: the resultant passes through the pin, tangent to
    the friction circle of radius ``r·sin(atan μ)``.

    Parameters
    ----------
    shoe : Shoe
    drum : Drum
    pin_center : Point
        The shoe pin's axis [mm].
    """

    shoe: Shoe
    drum: Drum
    pin_center: Point
    name: ContactModelName = ContactModelName.SHORT_PIVOTED

    @property
    def contact_pin(self) -> Point | None:
        """The shoe's pin: the drum's resultant passes through it [mm]."""
        return self.pin_center

    def basis(self, mu: float, direction: Direction) -> tuple[ContactWrench, ...]:
        return (self.wrench(mu, direction),)

    def wrench(self, mu: float, direction: Direction) -> ContactWrench:
        """Force on the shoe per newton of normal force [N/N], acting at the
        point of the drum surface whose resultant line passes through the
        pin (:func:`friction_circle_contact`)."""
        cx, cy = self.drum.center
        alpha = friction_circle_contact(
            np.array([self.pin_center[0] - cx]),
            np.array([self.pin_center[1] - cy]),
            self.drum.radius_mm,
            np.array([mu]),
            direction,
            internal=self.shoe.internal,
            mid_deg=self.shoe.arc.mid_deg,
        )[0]
        if math.isfinite(alpha):
            return _wrench_at(self.name, self.shoe, self.drum, float(alpha), mu, direction)
        mid = math.radians(self.shoe.arc.mid_deg)
        w = _wrench_at(self.name, self.shoe, self.drum, mid, mu, direction)
        miss = Finding(
            Code.NO_CONTACT_LINE,
            f"shoe {self.shoe.name}: no line through its pin meets the drum at the friction angle; "
            "the pin lies inside the friction circle",
            (self.shoe.arc.source.ref,),
            (self.shoe.arc.source.layer,),
            self.pin_center,
        )
        return replace(w, findings=(miss,))


def short_shoe_model(shoe: Shoe, drum: Drum, pin_center: Point | None) -> ShortFixedShoe | ShortPivotedShoe:
    """The short-shoe model that fits the shoe's mounting."""
    if shoe.mounting is Mounting.PIVOTED and pin_center is not None:
        return ShortPivotedShoe(shoe, drum, pin_center)
    return ShortFixedShoe(shoe, drum)
