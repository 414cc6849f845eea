"""The equilibrium equations of a linkage: one row per part's force and
moment balance and per pin, one column per unknown (each pin's force on each
body, each shoe's contact unknowns, each band's slack tension).

References: Beer & Johnston, *Vector Mechanics for Engineers: Statics*,
11th ed., ch. 4 and 6.3.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from dxfcheck.core.directions import Direction
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point
from dxfcheck.mechanism.model import FRAME, Band, Mechanism, Mounting, Part
from dxfcheck.statics.contact import ContactModel, ContactOptions, ContactWrench, ShoeModelChoice, short_shoe_model
from dxfcheck.statics.contact.long_shoe import LongHingedShoe, LongPivotedShoe

__all__ = [
    "DEFAULT_OPTIONS",
    "System",
    "assemble",
    "band_ratio",
    "coefficients",
    "contact_models",
    "solve_system",
    "tight_at_end",
]

#: Default shoe theory: long-shoe theory above 60° of contact.
DEFAULT_OPTIONS = ContactOptions()

#: A row whose coefficients are all below this fraction of the largest is an
#: identity (0 = 0) and is dropped.
ZERO_ROW_RTOL = 1e-12


@dataclass
class System:
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


def assemble(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> System:
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
    return System(a, b, row_owner, col_owner, bases, dropped, findings)


def solve_system(sys_: System) -> NDArray[np.float64]:
    keep = [i for i in range(sys_.a.shape[0]) if i not in sys_.dropped]
    a, b = sys_.a[keep], sys_.b[keep]
    return np.asarray(
        np.linalg.solve(a, b) if a.shape[0] == a.shape[1] else np.linalg.lstsq(a, b, rcond=None)[0],
        dtype=np.float64,
    )


def coefficients(sys_: System, x: NDArray[np.float64], shoe: str) -> list[float]:
    return [float(x[j]) for j, o in enumerate(sys_.col_owner) if o[0] == "shoe" and o[1] == shoe]
