"""The equilibrium equations of a linkage: one row per part's force and
moment balance and per pin, one column per unknown (each pin's force on each
body, each shoe's contact unknowns, each band's slack tension).

References: Beer & Johnston, *Vector Mechanics for Engineers: Statics*,
11th ed., ch. 4 and 6.3.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from dataclasses import dataclass
from functools import cached_property
from typing import TYPE_CHECKING, NamedTuple

import numpy as np

from dxfcheck.core.directions import Direction
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point
from dxfcheck.mechanism.model import FRAME, Band, Mechanism, Mounting, Part
from dxfcheck.statics.contact import ContactModel, ContactOptions, ContactWrench, ShoeModelChoice, short_shoe_model
from dxfcheck.statics.contact.long_shoe import LongHingedShoe, LongPivotedShoe

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = [
    "DEFAULT_OPTIONS",
    "Axis",
    "Balance",
    "ColumnKind",
    "ColumnOwner",
    "RowKind",
    "RowOwner",
    "System",
    "assemble",
    "band_column_stack",
    "band_ratio",
    "coefficients",
    "column_owners",
    "contact_models",
    "reference_points",
    "row_owners",
    "solve_system",
    "tight_at_end",
    "with_band_columns",
    "zero_rows",
]

#: Default shoe theory: long-shoe theory above 60° of contact.
DEFAULT_OPTIONS = ContactOptions()

#: A row whose coefficients are all below this fraction of the largest is an
#: identity (0 = 0) and is dropped.
ZERO_ROW_RTOL = 1e-12


class RowKind(enum.StrEnum):
    """What an equation balances: a moving part (three rows) or a pin (two)."""

    BODY = "body"
    PIN = "pin"


class Balance(enum.IntEnum):
    """Which sum a row writes: the forces along x and y, the moment."""

    FX = 0
    FY = 1
    MOMENT = 2


#: The rows of a pin: its two force sums (a pin is a particle).
PIN_BALANCES = (Balance.FX, Balance.FY)


class RowOwner(NamedTuple):
    """Whose equation a row is."""

    kind: RowKind
    name: str
    balance: Balance


class ColumnKind(enum.StrEnum):
    """What an unknown is: a pin's force on a body, a shoe's contact
    coefficient, a band's slack tension, a guide's force across its rod."""

    PIN = "pin"
    SHOE = "shoe"
    BAND = "band"
    GUIDE = "guide"


class Axis(enum.IntEnum):
    """The component of a pin force an unknown is."""

    X = 0
    Y = 1


class ColumnOwner(NamedTuple):
    """Whose unknown a column is.

    ``body`` and ``axis`` belong to pin columns (the force of pin ``name`` on
    ``body``, component ``axis``), ``basis`` to shoe columns (the index of
    the shoe's basis wrench).
    """

    kind: ColumnKind
    name: str
    body: str = ""
    axis: Axis = Axis.X
    basis: int = 0


@dataclass
class System:
    """The equilibrium equations ``a·x = b`` of one drum direction and μ,
    with each row's and column's owner, the shoes' basis wrenches, the rows
    dropped as identities (0 = 0) and the contact models' findings."""

    a: NDArray[np.float64]
    b: NDArray[np.float64]
    row_owner: list[RowOwner]
    col_owner: list[ColumnOwner]
    bases: dict[str, tuple[ContactWrench, ...]]
    dropped: list[int]
    findings: list[Finding]

    @property
    def kept(self) -> list[int]:
        """The rows that are solved (every row not dropped)."""
        return [i for i in range(self.a.shape[0]) if i not in self.dropped]

    @cached_property
    def row_index(self) -> dict[RowOwner, int]:
        """Each row's index by its owner."""
        return {o: i for i, o in enumerate(self.row_owner)}

    @cached_property
    def column_index(self) -> dict[ColumnOwner, int]:
        """Each column's index by its owner."""
        return {o: j for j, o in enumerate(self.col_owner)}

    def columns(self, kind: ColumnKind) -> list[tuple[int, ColumnOwner]]:
        """The columns of one kind with their indices, in order."""
        return [(j, o) for j, o in enumerate(self.col_owner) if o.kind is kind]


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


def reference_points(mech: Mechanism) -> dict[str, Point]:
    """Each part's reference point [mm]: the point its moment row is taken
    about and its motion is given at (a pivoted shoe's pin, else the mean of
    its centreline's points)."""
    return {p.name: _ref_point(mech, p) for p in mech.parts}


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


class _Frame(NamedTuple):
    """What the equations take from the mechanism alone (not from μ, the
    direction or the contact models): the rows, the reference points, the
    pin, band and guide columns, the pin and guide columns' entries, the
    right-hand side."""

    rows: list[RowOwner]
    row_index: dict[RowOwner, int]
    refs: dict[str, Point]
    pin_cols: list[ColumnOwner]
    band_cols: list[ColumnOwner]
    pin_block: NDArray[np.float64]
    b: NDArray[np.float64]
    guide_cols: list[ColumnOwner]
    guide_block: NDArray[np.float64]


#: The last mechanism's frame, by identity (the model is frozen): the solves
#: of one drawing (each μ, each direction, the self-locking scan) assemble
#: the same mechanism again and again.
_LAST_FRAME: list[tuple[Mechanism, _Frame]] = []


def _frame(mech: Mechanism) -> _Frame:
    """The mechanism's frame, computed once per mechanism object."""
    last = _LAST_FRAME[0] if _LAST_FRAME else None
    if last is not None and last[0] is mech:
        return last[1]
    rows = row_owners(mech)
    index = {o: i for i, o in enumerate(rows)}
    refs = reference_points(mech)
    pin_cols = [
        ColumnOwner(ColumnKind.PIN, p.name, body, axis) for p in mech.pins for body in p.bodies for axis in Axis
    ]
    pin_block = np.zeros((len(rows), len(pin_cols)))
    _pin_columns(mech, pin_block, pin_cols, index, refs)
    band_cols = [ColumnOwner(ColumnKind.BAND, band.name) for band in mech.bands]
    guide_cols = [ColumnOwner(ColumnKind.GUIDE, g.name) for g in mech.guides]
    guide_block = _guide_block(mech, len(rows), index, refs)
    applied = _applied(mech, len(rows), index, refs)
    frame = _Frame(rows, index, refs, pin_cols, band_cols, pin_block, applied, guide_cols, guide_block)
    _LAST_FRAME[:] = [(mech, frame)]
    return frame


def assemble(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> System:
    """The equilibrium equations of ``mech`` at friction coefficient ``mu``
    with the drum turning in ``direction``: the moment rows are divided by
    the mechanism's length scale so that every row is in newtons."""
    fr = _frame(mech)
    rows, index, refs = fr.rows, fr.row_index, fr.refs
    bases = {sh.name: models[sh.name].basis(mu, direction) for sh in mech.shoes}
    shoe_cols = [ColumnOwner(ColumnKind.SHOE, s.name, basis=k) for s in mech.shoes for k in range(len(bases[s.name]))]
    cols = fr.pin_cols + shoe_cols + fr.band_cols + fr.guide_cols  # the order of column_owners
    a = np.zeros((len(rows), len(cols)))
    a[:, : len(fr.pin_cols)] = fr.pin_block
    a[:, len(cols) - len(fr.guide_cols) :] = fr.guide_block
    findings = _shoe_columns(mech, a, cols, index, refs, bases)
    _band_columns(mech, a, cols, index, mu, direction)
    b = fr.b.copy()
    return System(a, b, list(rows), cols, bases, zero_rows(a), findings)


def zero_rows(a: NDArray[np.float64]) -> list[int]:
    """The rows of ``a`` that are identities 0 = 0 (a pivoted shoe's moment
    about its own pin): dropped from the solve."""
    scale = float(np.abs(a).max()) if a.size else 1.0
    row_max = np.abs(a).max(axis=1, initial=0.0)
    return [int(i) for i in np.flatnonzero(row_max <= ZERO_ROW_RTOL * scale)]


def with_band_columns(
    sys_: System, mech: Mechanism, mu: float, direction: Direction, index: dict[RowOwner, int]
) -> NDArray[np.float64]:
    """``sys_``'s matrix with its band columns set as :func:`assemble` sets
    them at ``mu`` (``index``: ``sys_.row_index``).  On a mechanism without
    shoes they are the only entries that move with μ, so this is the matrix
    :func:`assemble` makes at ``mu``, entry for entry, without assembling
    the rest again."""
    a = sys_.a.copy()
    for j, _ in sys_.columns(ColumnKind.BAND):
        a[:, j] = 0.0
    _band_columns(mech, a, sys_.col_owner, index, mu, direction)
    return a


def band_column_stack(
    sys_: System, mech: Mechanism, mus: Sequence[float], direction: Direction, index: dict[RowOwner, int]
) -> NDArray[np.float64]:
    """:func:`with_band_columns` at each μ of ``mus``, as one stack of
    matrices (shape ``(len(mus), rows, columns)``): the same entries, each
    made by the same operations in the same order (each tension ratio by
    :func:`band_ratio`), so the stack's matrix at each μ is
    :func:`with_band_columns`'s, bit for bit."""
    stack = np.repeat(sys_.a[np.newaxis], len(mus), axis=0)
    for j, _ in sys_.columns(ColumnKind.BAND):
        stack[:, :, j] = 0.0
    ones = np.ones(len(mus))
    for band, row_x, row_y, c, u, tight in _band_entries(mech, sys_.col_owner, index, direction):
        share = np.array([band_ratio(band, mu) for mu in mus]) if tight else ones
        stack[:, row_x, c] -= share * u[0]
        stack[:, row_y, c] -= share * u[1]
    return stack


def row_owners(mech: Mechanism) -> list[RowOwner]:
    """Every part's three balances, then every pin's two."""
    return [RowOwner(RowKind.BODY, p.name, bal) for p in mech.parts for bal in Balance] + [
        RowOwner(RowKind.PIN, p.name, bal) for p in mech.pins for bal in PIN_BALANCES
    ]


def column_owners(mech: Mechanism, bases: dict[str, tuple[ContactWrench, ...]]) -> list[ColumnOwner]:
    """Every pin's force on each body it joins (x, y), then every shoe's
    contact coefficients, then every band's slack tension, then every
    guide's force across its rod."""
    return (
        [ColumnOwner(ColumnKind.PIN, p.name, body, axis) for p in mech.pins for body in p.bodies for axis in Axis]
        + [ColumnOwner(ColumnKind.SHOE, s.name, basis=k) for s in mech.shoes for k in range(len(bases[s.name]))]
        + [ColumnOwner(ColumnKind.BAND, band.name) for band in mech.bands]
        + [ColumnOwner(ColumnKind.GUIDE, g.name) for g in mech.guides]
    )


def _pin_columns(
    mech: Mechanism,
    a: NDArray[np.float64],
    cols: list[ColumnOwner],
    index: dict[RowOwner, int],
    refs: dict[str, Point],
) -> None:
    """Each pin force: on the pin (its own force balance) and on the body
    (force and moment balance about the body's reference point)."""
    L = mech.length_scale_mm
    centers = {p.name: p.center for p in mech.pins}
    for c, o in enumerate(cols):
        if o.kind is not ColumnKind.PIN:
            continue
        bal = Balance(o.axis)
        a[index[RowOwner(RowKind.PIN, o.name, bal)], c] = 1.0
        if o.body == FRAME:
            continue
        px, py = centers[o.name]
        rx, ry = px - refs[o.body][0], py - refs[o.body][1]
        a[index[RowOwner(RowKind.BODY, o.body, bal)], c] = 1.0
        a[index[RowOwner(RowKind.BODY, o.body, Balance.MOMENT)], c] = -ry / L if o.axis is Axis.X else rx / L


def _body_rows(index: dict[RowOwner, int], body: str) -> tuple[int, int, int]:
    """The force and moment rows of a body."""
    return (
        index[RowOwner(RowKind.BODY, body, Balance.FX)],
        index[RowOwner(RowKind.BODY, body, Balance.FY)],
        index[RowOwner(RowKind.BODY, body, Balance.MOMENT)],
    )


def _shoe_columns(
    mech: Mechanism,
    a: NDArray[np.float64],
    cols: list[ColumnOwner],
    index: dict[RowOwner, int],
    refs: dict[str, Point],
    bases: dict[str, tuple[ContactWrench, ...]],
) -> list[Finding]:
    """Each shoe's basis wrenches on its part's balances; returns the
    wrenches' findings."""
    L = mech.length_scale_mm
    part_of = {s.name: s.part for s in mech.shoes}
    findings: list[Finding] = []
    for c, o in enumerate(cols):
        if o.kind is not ColumnKind.SHOE:
            continue
        w = bases[o.name][o.basis]
        part = part_of[o.name]
        findings += w.findings
        rx, ry, rm = _body_rows(index, part)
        a[rx, c] = w.force[0]
        a[ry, c] = w.force[1]
        a[rm, c] = w.moment_about(refs[part]) / L
    return findings


def _guide_block(
    mech: Mechanism, n_rows: int, index: dict[RowOwner, int], refs: dict[str, Point]
) -> NDArray[np.float64]:
    """Each guide's force across its rod, one unknown: along the guide's
    normal on the rod, the opposite on the part with the hole, both at the
    crossing (force and moment balance of each, moments about each body's
    reference point, divided by the length scale)."""
    L = mech.length_scale_mm
    block = np.zeros((n_rows, len(mech.guides)))
    for c, g in enumerate(mech.guides):
        nx, ny = g.normal
        for body, sign in ((g.rod, 1.0), (g.part, -1.0)):
            if body == FRAME:
                continue
            fx, fy = sign * nx, sign * ny
            rx, ry = g.at_mm[0] - refs[body][0], g.at_mm[1] - refs[body][1]
            block[index[RowOwner(RowKind.BODY, body, Balance.FX)], c] = fx
            block[index[RowOwner(RowKind.BODY, body, Balance.FY)], c] = fy
            block[index[RowOwner(RowKind.BODY, body, Balance.MOMENT)], c] = (rx * fy - ry * fx) / L
    return block


def _band_columns(
    mech: Mechanism,
    a: NDArray[np.float64],
    cols: list[ColumnOwner],
    index: dict[RowOwner, int],
    mu: float,
    direction: Direction,
) -> None:
    """Each band's unknown slack-side tension: each end pulls its pin
    towards the drum, the tight end e^(μθ) times harder."""
    for band, row_x, row_y, c, u, tight in _band_entries(mech, cols, index, direction):
        share = band_ratio(band, mu) if tight else 1.0
        # pin equilibrium: Σ (pin on bodies) − (band on pin) = 0
        a[row_x, c] -= share * u[0]
        a[row_y, c] -= share * u[1]


def _band_entries(
    mech: Mechanism, cols: list[ColumnOwner], index: dict[RowOwner, int], direction: Direction
) -> list[tuple[Band, int, int, int, Point, bool]]:
    """Where each band end enters the equations, in the order they are
    entered: (band, its pin's x and y rows, the band's column, the end's
    unit pull direction, whether it is the tight end)."""
    at_end = tight_at_end(direction)
    bands = {band.name: band for band in mech.bands}
    out: list[tuple[Band, int, int, int, Point, bool]] = []
    for c, o in enumerate(cols):
        if o.kind is not ColumnKind.BAND:
            continue
        band = bands[o.name]
        for pin_name, u, tight in (
            (band.start_pin, band.start_dir, not at_end),
            (band.end_pin, band.end_dir, at_end),
        ):
            row_x = index[RowOwner(RowKind.PIN, pin_name, Balance.FX)]
            row_y = index[RowOwner(RowKind.PIN, pin_name, Balance.FY)]
            out.append((band, row_x, row_y, c, u, tight))
    return out


def _applied(mech: Mechanism, n_rows: int, index: dict[RowOwner, int], refs: dict[str, Point]) -> NDArray[np.float64]:
    """The right-hand side: minus the loads' and springs' forces and moments
    on their parts."""
    L = mech.length_scale_mm
    b = np.zeros(n_rows)
    applied: list[tuple[str, Point, Point]] = [(ld.part, ld.point, ld.force) for ld in mech.loads if ld.part]
    for sp in mech.springs:
        for end in (0, 1):
            part = sp.parts[end]
            if part is not None:
                applied.append((part, sp.ends[end], sp.force_on(end)))
    for part, point, (fx, fy) in applied:
        rx_row, ry_row, rm_row = _body_rows(index, part)
        rx, ry = point[0] - refs[part][0], point[1] - refs[part][1]
        b[rx_row] -= fx
        b[ry_row] -= fy
        b[rm_row] -= (rx * fy - ry * fx) / L
    return b


def solve_system(sys_: System) -> NDArray[np.float64]:
    """The unknowns: an exact solve of the kept rows when they are square,
    else least squares."""
    keep = sys_.kept
    a, b = sys_.a[keep], sys_.b[keep]
    return np.asarray(
        np.linalg.solve(a, b) if a.shape[0] == a.shape[1] else np.linalg.lstsq(a, b, rcond=None)[0],
        dtype=np.float64,
    )


def coefficients(sys_: System, x: NDArray[np.float64], shoe: str) -> list[float]:
    """A shoe's contact coefficients in the solution ``x``, in basis order."""
    return [float(x[j]) for j, o in sys_.columns(ColumnKind.SHOE) if o.name == shoe]
