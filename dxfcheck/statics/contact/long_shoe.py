"""Long-shoe contact models: the lining pressure integrated over the drawn arc.

**Shoe fixed to a lever hinged to the frame** (external or internal).  A
rigid shoe turning about its hinge H presses the lining into the drum in
proportion to the normal component of its displacement, so

    p = pa·sin θ / sin θa,

with θ measured at the drum axis from the line joining the axis to the hinge,
θa the angle of the largest pressure on the lining (90° if the lining spans
it, else its end nearer 90°).  The normal and friction forces (``μp`` along
the drum surface's motion) and their moments are integrated over the arc the
drawing shows (θ1..θ2), not over a symmetric idealisation.  Lining beyond the
hinge line (θ < 0 or θ > 180°) would have to pull and carries no pressure.
The model holds only when the lever turns about a frame pivot.

**Pivoted shoe**: the shoe turns on its own pin, so the pressure takes the
form ``p = p0·cos(φ − φm − ψ)`` (φm the lining's middle); written as
``q = A·cos(φ − φm) + B·sin(φ − φm)`` it is linear in ``A`` and ``B``, and
the offset ``ψ = atan2(B, A)`` follows from the shoe's moment balance about
its pin in the general solve.  For a symmetric shoe with its pin on the
centreline at ``a = 4r·sin θ2/(2θ2 + sin 2θ2)`` this gives ψ = 0 and no
friction moment about the pin.  Where the balance needs a negative pressure
over part of the arc, the shoe is in partial contact: the patch is trimmed to
where ``p ≥ 0`` and the statics solved again.

Both work with the line load ``q = p·b`` [N/mm] so that the statics does not
need the lining width; pressure = q / b.  The integrals use Gauss–Legendre
quadrature (exact to round-off for these smooth integrands).

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering
   Design*, 10th ed., McGraw-Hill, 2015, §16-3 "Internal expanding rim
   clutches and brakes", §16-4 "External contracting rim clutches and
   brakes" (pressure law p = pa·sinθ/sinθa, moments MN and Mf), and
   "Symmetrically loaded pivoted shoes" (equation numbers from memory).
.. [2] R. S. Khurmi and J. K. Gupta, *Theory of Machines*: equivalent
   coefficient of friction μ' = 4μ·sinθ/(2θ + sin 2θ) for long shoes.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import numpy as np

from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point
from dxfcheck.core.records import record
from dxfcheck.mechanism import Drum, Shoe
from dxfcheck.statics.contact.base import (
    ContactModelName,
    ContactWrench,
    Direction,
    WholeLining,
    line_of_action_point,
    surface_tangent,
)

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = ["LongHingedShoe", "LongPivotedShoe", "equivalent_mu", "pivot_distance"]

#: Gauss–Legendre nodes per lining.
QUADRATURE_NODES = 64
#: Samples of the line load along a lining (for reports and pictures).
LINE_LOAD_SAMPLES = 72
#: A contact patch that changes by less than this between iterations has
#: converged [rad].
PATCH_TOL_RAD = 1e-12
#: A contact patch narrower than this means the shoe bears on its lining's
#: edge only, where no pressure law holds [rad] (0.5°, common practice for
#: "a line contact", not a published limit).
EDGE_PATCH_RAD = math.radians(0.5)


#: Newton steps on the Legendre polynomial's roots stop below this step [-].
GAUSS_NODE_TOL = 1e-15
#: At most this many Newton steps (they converge in about five).
GAUSS_MAX_STEPS = 50


def _legendre(x: NDArray[np.float64], n: int) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """P_n(x) and P_n'(x) by the three-term recurrence
    k·P_k = (2k - 1)·x·P_(k-1) - (k - 1)·P_(k-2) and
    P_n' = n·(x·P_n - P_(n-1))/(x² - 1)."""
    p_prev, p = np.ones_like(x), x.copy()
    for k in range(2, n + 1):
        p_prev, p = p, ((2 * k - 1) * x * p - (k - 1) * p_prev) / k
    return p, n * (x * p - p_prev) / (x * x - 1.0)


@functools.cache
def _gauss(n: int = QUADRATURE_NODES) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Gauss-Legendre nodes (ascending) and weights on [-1, 1]: the roots x
    of the Legendre polynomial P_n by Newton's method from the estimates
    cos(π(i - 1/4)/(n + 1/2)), and the weights w = 2/((1 - x²)·P_n'(x)²)
    (Abramowitz & Stegun, *Handbook of Mathematical Functions*, 25.4.29;
    from memory).  numpy's ``leggauss`` gives the same to rounding (a test
    compares them) but costs a tenth of a small drawing's whole run."""
    x = np.cos(np.pi * (np.arange(1, n + 1) - 0.25) / (n + 0.5))
    for _ in range(GAUSS_MAX_STEPS):
        p, dp = _legendre(x, n)
        step = p / dp
        x = x - step
        if float(np.max(np.abs(step))) < GAUSS_NODE_TOL:
            break
    _, dp = _legendre(x, n)
    weights = 2.0 / ((1.0 - x * x) * dp * dp)
    return x[::-1].copy(), weights[::-1].copy()


def equivalent_mu(mu: float, contact_angle_deg: float) -> float:
    """Equivalent coefficient μ' = 4μ·sinθ/(2θ + sin 2θ), θ the semi-angle
    of contact (Khurmi & Gupta, *Theory of Machines*, brakes)."""
    th = math.radians(contact_angle_deg) / 2
    if th <= 0:
        return mu
    return 4 * mu * math.sin(th) / (2 * th + math.sin(2 * th))


def pivot_distance(r: float, semi_angle_rad: float) -> float:
    """Distance from the drum axis at which a symmetric pivoted shoe's pin
    makes the friction moment vanish [mm]: a = 4r·sinθ2/(2θ2 + sin 2θ2)
    (Shigley's MED, symmetrically loaded pivoted shoes)."""
    t = semi_angle_rad
    return 4 * r * math.sin(t) / (2 * t + math.sin(2 * t))


def _wrap(a: float) -> float:
    """Angle in (-π, π]."""
    return math.remainder(a, 2 * math.pi)


@record(frozen=True)
class _CosLaw:
    """q(φ) = cos(φ − φm) [per unit of A]: a pivoted long shoe's first basis load."""

    mid: float

    def __call__(self, phi: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.cos(phi - self.mid)


@record(frozen=True)
class _SinLaw:
    """q(φ) = sin(φ − φm) [per unit of B]: a pivoted long shoe's second basis load."""

    mid: float

    def __call__(self, phi: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.sin(phi - self.mid)


@record(frozen=True)
class _HingeLaw:
    """q(φ) = max(0, sin θ)/sin θa with θ = s·(φ − β) [per unit of qa]: a
    hinged long shoe's load (negative where the lining would pull: none)."""

    sense: float
    beta: float
    sin_a: float

    def __call__(self, phi: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.maximum(0.0, np.sin(self.sense * (phi - self.beta))) / self.sin_a


@record(frozen=True)
class _NoLoad:
    """q(φ) = 0: a lining with nothing left to press."""

    def __call__(self, phi: NDArray[np.float64]) -> NDArray[np.float64]:
        return np.zeros_like(phi)


#: A basis line load as a value (so that its quadrature can be cached).
LoadLaw = _CosLaw | _SinLaw | _HingeLaw | _NoLoad

#: Line loads whose quadrature is kept ((law, lining, patch) each): a check
#: solves at up to three μ, both directions, and scans for self-locking, all
#: on the same few patches.
QUADRATURE_CACHE = 256


@functools.lru_cache(maxsize=QUADRATURE_CACHE)
def _line_load(
    law: LoadLaw, radius_mm: float, phi0: float, phi1: float, full: tuple[float, float]
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], float, tuple[tuple[float, float], ...]]:
    """The part of a line load's quadrature that depends neither on μ nor on
    the drum's direction: the force on each Gauss–Legendre element [N per
    unit], cos φ and sin φ at the nodes, their sum, and the samples of the
    load along the lining (degrees, value) for reports.  Read only."""
    half = 0.5 * (phi1 - phi0)
    mid = 0.5 * (phi1 + phi0)
    nodes, weights = _gauss()
    phi = mid + half * nodes
    dq = law(phi) * (radius_mm * half) * weights  # force on each element [N per unit]
    c, s_ = np.cos(phi), np.sin(phi)
    total = float(np.sum(dq)) if half > 0 else 0.0
    grid = full[0] + (full[1] - full[0]) * np.arange(LINE_LOAD_SAMPLES + 1) / LINE_LOAD_SAMPLES
    inside = (grid >= phi0 - 1e-12) & (grid <= phi1 + 1e-12)
    values = np.where(inside, law(grid), 0.0) if half > 0 else np.zeros_like(grid)
    samples = tuple(zip((np.degrees(grid) % 360).tolist(), values.tolist(), strict=True))
    for a in (dq, c, s_):
        a.flags.writeable = False
    return dq, c, s_, total, samples


def _integrate(
    name: ContactModelName,
    shoe: Shoe,
    drum: Drum,
    phi0: float,
    phi1: float,
    law: LoadLaw,
    mu: float,
    direction: Direction,
    full: tuple[float, float],
    findings: tuple[Finding, ...] = (),
) -> ContactWrench:
    """Wrench of the line load ``q(φ) = law(φ)`` [N/mm per unit] over the
    polar angles φ0..φ1 [rad, φ0 < φ1], by Gauss–Legendre quadrature (the
    μ- and direction-free part from :func:`_line_load`)."""
    r = drum.radius_mm
    sgn_n = -1.0 if shoe.internal else 1.0
    sd = float(direction.sign)
    half = 0.5 * (phi1 - phi0)
    dq, c, s_, total, samples = _line_load(law, r, phi0, phi1, full)
    # normal n = sgn_n·e_r, surface motion t = sd·(-sin, cos)
    nx, ny = float(np.sum(dq * sgn_n * c)), float(np.sum(dq * sgn_n * s_))
    tx, ty = float(np.sum(dq * mu * -sd * s_)), float(np.sum(dq * mu * sd * c))
    if half <= 0:
        nx = ny = tx = ty = 0.0
    fx, fy = nx + tx, ny + ty
    # about the drum axis only friction has a moment: r·μq·(e_r × t) = sd·μ·q·r
    m_o = sd * mu * r * total
    torque = mu * r * total  # braking torque, positive against the motion
    near = math.degrees(0.5 * (full[0] + full[1]))
    point = line_of_action_point(drum.center, r, (fx, fy), m_o, near)
    at = math.radians(near)
    normal = (sgn_n * math.cos(at), sgn_n * math.sin(at))
    tangent = surface_tangent(at, direction)
    return ContactWrench(
        name,
        point,
        (fx, fy),
        normal,
        tangent,
        math.hypot(nx, ny),
        math.hypot(tx, ty),
        torque,
        findings,
        (nx, ny),
        (tx, ty),
        samples,
    )


def _arc_span(shoe: Shoe) -> tuple[float, float]:
    """Polar angles of the lining's ends, counter-clockwise, radians."""
    a0 = math.radians(shoe.arc.start_deg)
    return a0, a0 + math.radians(shoe.arc.span_deg)


@record(frozen=True)
class LongHingedShoe(WholeLining):
    """Long shoe fixed to a lever that turns about a frame pivot ``hinge``:
    ``p = pa·sinθ/sinθa``; the unknown is the peak line load ``qa = pa·b``
    [N/mm].

    Parameters
    ----------
    shoe : Shoe
    drum : Drum
    hinge : Point
        The lever's frame pivot [mm].
    """

    shoe: Shoe
    drum: Drum
    hinge: Point
    name: ContactModelName = ContactModelName.LONG_HINGED

    def _theta(self) -> tuple[float, float, float, float, tuple[Finding, ...]]:
        """(β, s, θ1, θ2, findings): hinge-line angle β, sense s (θ = s·(φ − β)),
        the active θ range and partial-contact findings."""
        cx, cy = self.drum.center
        beta = math.atan2(self.hinge[1] - cy, self.hinge[0] - cx)
        p0, p1 = _arc_span(self.shoe)
        tm = _wrap(0.5 * (p0 + p1) - beta)  # signed θ of the lining's middle
        s = 1.0 if tm >= 0 else -1.0  # measure θ so that the middle has θ > 0
        half = 0.5 * (p1 - p0)
        t1, t2 = s * tm - half, s * tm + half
        findings: tuple[Finding, ...] = ()
        lo, hi = max(t1, 0.0), min(t2, math.pi)
        if lo > t1 or hi < t2:
            findings = (
                Finding(
                    Code.PARTIAL_CONTACT,
                    f"shoe {self.shoe.name}: part of the lining lies beyond the line through the drum axis "
                    "and the hinge and would have to pull; it carries no pressure",
                    (self.shoe.arc.source.ref,),
                    (self.shoe.arc.source.layer,),
                ),
            )
        return beta, s, lo, hi, findings

    def theta_range_deg(self) -> tuple[float, float, float]:
        """(θ1, θ2, θa) of the loaded lining [degrees], θ from the hinge line."""
        _, _, lo, hi, _ = self._theta()
        return math.degrees(lo), math.degrees(hi), math.degrees(_theta_a(lo, hi))

    def basis(self, mu: float, direction: Direction) -> tuple[ContactWrench, ...]:
        beta, s, lo, hi, findings = self._theta()
        if hi <= lo:
            return (
                _integrate(
                    self.name,
                    self.shoe,
                    self.drum,
                    0.0,
                    0.0,
                    _NoLoad(),
                    mu,
                    direction,
                    _arc_span(self.shoe),
                    findings,
                ),
            )
        law = _HingeLaw(s, beta, math.sin(_theta_a(lo, hi)))
        # polar angles of the loaded part: φ = β + s·θ
        ends = sorted((beta + s * lo, beta + s * hi))
        full = _arc_span(self.shoe)
        # bring the loaded range next to the drawn arc
        shift = 2 * math.pi * round((0.5 * (full[0] + full[1]) - 0.5 * (ends[0] + ends[1])) / (2 * math.pi))
        return (
            _integrate(
                self.name, self.shoe, self.drum, ends[0] + shift, ends[1] + shift, law, mu, direction, full, findings
            ),
        )

    def refine(self, coeffs: Sequence[float], mu: float, direction: Direction) -> bool:
        return False

    def peak(self, coeffs: Sequence[float]) -> tuple[float, float]:
        beta, s, lo, hi, _ = self._theta()
        ta = _theta_a(lo, hi)
        return coeffs[0], math.degrees(beta + s * ta) % 360

    def notes(self) -> tuple[Finding, ...]:
        return self._theta()[4]


def _theta_a(lo: float, hi: float) -> float:
    """Angle of the largest sin θ on [lo, hi]."""
    if lo <= math.pi / 2 <= hi:
        return math.pi / 2
    return hi if hi < math.pi / 2 else lo


@dataclass
class LongPivotedShoe:
    """Long shoe on its own pin: ``q = A·cos(φ − φm) + B·sin(φ − φm)``
    [N/mm] over the contact patch; unknowns A and B.

    The patch starts as the whole lining and is trimmed by :meth:`refine`
    to where the solved pressure is not negative.
    """

    shoe: Shoe
    drum: Drum
    pin: Point
    name: ContactModelName = ContactModelName.LONG_PIVOTED
    patch: tuple[float, float] = field(default=(0.0, 0.0))
    partial: bool = False
    on_edge: bool = False

    def __post_init__(self) -> None:
        self.patch = _arc_span(self.shoe)

    @property
    def mid(self) -> float:
        p0, p1 = _arc_span(self.shoe)
        return 0.5 * (p0 + p1)

    def basis(self, mu: float, direction: Direction) -> tuple[ContactWrench, ...]:
        m = self.mid
        full = _arc_span(self.shoe)
        notes = self.notes()
        return (
            _integrate(self.name, self.shoe, self.drum, *self.patch, _CosLaw(m), mu, direction, full, notes),
            _integrate(self.name, self.shoe, self.drum, *self.patch, _SinLaw(m), mu, direction, full, ()),
        )

    def refine(self, coeffs: Sequence[float], mu: float, direction: Direction) -> bool:
        a, b = coeffs[0], coeffs[1]
        full = _arc_span(self.shoe)
        if math.hypot(a, b) == 0.0:
            return False
        psi = math.atan2(b, a)
        lo = max(full[0], self.mid + psi - math.pi / 2)
        hi = min(full[1], self.mid + psi + math.pi / 2)
        if hi - lo < 0.0:
            return False  # no contact left: the shoe lifts (reported by the statics)
        if hi - lo < EDGE_PATCH_RAD:
            self.on_edge = True  # the shoe bears on its lining's edge only (the statics refuses it)
            return False
        new = (lo, hi)
        changed = abs(new[0] - self.patch[0]) > PATCH_TOL_RAD or abs(new[1] - self.patch[1]) > PATCH_TOL_RAD
        self.patch = new
        self.partial = new != full
        return changed

    def peak(self, coeffs: Sequence[float]) -> tuple[float, float]:
        a, b = coeffs[0], coeffs[1]
        psi = math.atan2(b, a)
        at = min(max(self.mid + psi, self.patch[0]), self.patch[1])
        q = a * math.cos(at - self.mid) + b * math.sin(at - self.mid)
        return q, math.degrees(at) % 360

    def offset_deg(self, coeffs: Sequence[float]) -> float | None:
        """The pressure law's offset ψ from the lining's middle [degrees]."""
        return math.degrees(math.atan2(coeffs[1], coeffs[0]))

    def patch_deg(self) -> tuple[float, float]:
        """The contact patch as solved [degrees, 0..360)."""
        return math.degrees(self.patch[0]) % 360, math.degrees(self.patch[1]) % 360

    @property
    def contact_pin(self) -> Point | None:
        """The pressure law's offset, not the contact's place, follows the
        pin (the patch is the lining's)."""
        return None

    def notes(self) -> tuple[Finding, ...]:
        if not self.partial:
            return ()
        return (
            Finding(
                Code.PARTIAL_CONTACT,
                f"shoe {self.shoe.name}: the pin's position needs a negative pressure over part of the lining; "
                f"solved with the contact patch that remains ({math.degrees(self.patch[0]) % 360:.1f}° to "
                f"{math.degrees(self.patch[1]) % 360:.1f}°)",
                (self.shoe.arc.source.ref,),
                (self.shoe.arc.source.layer,),
            ),
        )
