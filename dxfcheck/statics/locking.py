"""The self-locking limit: the friction coefficient at which a linkage's
equations become singular with every shoe pressing on the drum, so that the
drum holds the shoes on with no effort at all."""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Sequence
from typing import TYPE_CHECKING

import numpy as np

from dxfcheck.core.directions import Direction
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.statics.contact import ContactModel, ContactOptions
from dxfcheck.statics.diagnosis import MODE_SHARE
from dxfcheck.statics.equations import (
    DEFAULT_OPTIONS,
    ZERO_ROW_RTOL,
    ColumnKind,
    System,
    assemble,
    band_column_stack,
    contact_models,
    with_band_columns,
    zero_rows,
)

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = ["critical_mu"]

#: Friction coefficients searched for the self-locking limit [-].
MU_SCAN_MAX = 1.0
#: Steps of the scan over 0..``MU_SCAN_MAX``.
MU_SCAN_STEPS = 100


#: Bisection on the self-locking limit stops at this width [-].
MU_TOL = 1e-12
#: A shoe load below minus this fraction of the largest pulls on the drum.
PRESS_RTOL = 1e-6


#: Friction coefficients [-] at which the kept equations are assembled to
#: check that they are affine in μ (away from the scan's grid points).
AFFINE_PROBES = (0.37, 0.81)
#: Relative tolerance of that check, against the largest entry.
AFFINE_RTOL = 1e-12


def _kept(
    mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction
) -> tuple[list[int], NDArray[np.float64]]:
    """The kept rows and their matrix at ``mu``."""
    sys_ = assemble(mech, models, mu, direction)
    kept = sys_.kept
    return kept, sys_.a[kept]


def _sign(a: NDArray[np.float64]) -> float:
    """The sign of a square matrix's determinant; NaN when it is not square."""
    if a.shape[0] != a.shape[1]:
        return math.nan
    sign, _ = np.linalg.slogdet(a)
    return float(sign)


def _square_det_sign(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> float:
    """The sign of the kept equations' determinant at ``mu``; NaN when they
    are not square."""
    return _sign(_kept(mech, models, mu, direction)[1])


#: The determinant's sign at each of a sequence of friction coefficients.
SignScan = Callable[[Sequence[float]], list[float]]


def _signs(stack: NDArray[np.float64]) -> list[float]:
    """The signs of a stack of square matrices' determinants (one LAPACK
    factorisation each, as :func:`_sign` makes them, in one call)."""
    signs, _ = np.linalg.slogdet(stack)
    return [float(x) for x in signs]


def _det_sign(mech: Mechanism, models: dict[str, ContactModel], direction: Direction) -> SignScan:
    """The determinant's sign as a function of μ (at each μ of a sequence).
    With every lining in full contact, each contact force is a normal part
    plus μ times a friction part, so the kept equations are usually affine
    in μ, A(μ) = A0 + μ·A1: checked at :data:`AFFINE_PROBES`, the signs then
    come from A0 and A1 without assembling the equations again (one
    assembly instead of one per step of the scan and the bisection, and the
    scan's determinants in one call).  A band's tight end grows as e^(μθ):
    on a mechanism without shoes only the band columns move with μ, and
    they alone are set again at each μ (:func:`_band_det_sign`); otherwise
    each μ is assembled."""
    if mech.bands and not mech.shoes:
        return _band_det_sign(mech, models, direction)
    slow = _assembled_scan(mech, models, direction)
    rows, a0 = _kept(mech, models, 0.0, direction)
    rows_1, at_1 = _kept(mech, models, 1.0, direction)
    if rows_1 != rows:
        return slow
    a1 = at_1 - a0
    scale = max(float(np.abs(a0).max(initial=0.0)), float(np.abs(a1).max(initial=0.0)), 1.0)
    for mu in AFFINE_PROBES:
        rows_mu, probe = _kept(mech, models, mu, direction)
        if rows_mu != rows or float(np.abs(probe - (a0 + mu * a1)).max(initial=0.0)) > AFFINE_RTOL * scale:
            return slow
    if a0.shape[0] != a0.shape[1]:
        return lambda mus: [math.nan for _ in mus]
    # a0 + μ·a1 entry for entry as at one μ: the same products and sums
    return lambda mus: _signs(a0 + np.asarray(mus, dtype=np.float64)[:, None, None] * a1)


def _assembled_scan(mech: Mechanism, models: dict[str, ContactModel], direction: Direction) -> SignScan:
    """The determinant's sign with the equations assembled at each μ (the
    reference the faster scans are checked against)."""
    return lambda mus: [_square_det_sign(mech, models, mu, direction) for mu in mus]


def _band_det_sign(mech: Mechanism, models: dict[str, ContactModel], direction: Direction) -> SignScan:
    """The determinant's sign at each μ of a sequence for a mechanism with
    bands and no shoes: the equations assembled once, their band columns
    set again at each μ (the very entries :func:`assemble` makes there)."""
    base = assemble(mech, models, 0.0, direction)
    index = base.row_index

    def sign(mu: float) -> float:
        a = with_band_columns(base, mech, mu, direction, index)
        dropped = zero_rows(a)
        return _sign(a[[i for i in range(a.shape[0]) if i not in dropped]])

    def signs(mus: Sequence[float]) -> list[float]:
        if not mus:
            return []
        stack = band_column_stack(base, mech, mus, direction, index)
        kept = _kept_rows(stack)
        if kept is None:  # the identities 0 = 0 differ between the μ: one at a time
            return [sign(mu) for mu in mus]
        if len(kept) != stack.shape[2]:
            return [math.nan for _ in mus]
        return _signs(stack[:, kept, :])

    return signs


def _kept_rows(stack: NDArray[np.float64]) -> list[int] | None:
    """The rows :func:`zero_rows` keeps in each matrix of a stack, if they
    are the same in all (None otherwise)."""
    size = stack.shape[1] * stack.shape[2]
    scale = np.abs(stack).max(axis=(1, 2)) if size else np.ones(stack.shape[0])
    zero = np.abs(stack).max(axis=2, initial=0.0) <= ZERO_ROW_RTOL * scale[:, np.newaxis]
    if (zero != zero[0]).any():
        return None
    return [i for i in range(stack.shape[1]) if not zero[0, i]]


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
    det_signs = _det_sign(mech, models, direction)
    grid = [mu_max * k / MU_SCAN_STEPS for k in range(MU_SCAN_STEPS + 1)]
    signs = det_signs(grid)
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
            (sm,) = det_signs([mid])
            if sm * slo > 0:
                lo = mid
            else:
                hi = mid
        mu_c = 0.5 * (lo + hi)
        if _all_shoes_press(mech, models, mu_c, direction):
            return mu_c
    return None


def _shoe_loads(sys_: System, v: NDArray[np.float64]) -> dict[str, float]:
    """Each shoe's total normal load Σ (unknown × ∫q·r dφ) for a vector of
    unknowns (the braking torque over μr: positive when it presses)."""
    out: dict[str, float] = {}
    for j, o in enumerate(sys_.col_owner):
        if o.kind is ColumnKind.SHOE:
            w = sys_.bases[o.name][o.basis]
            out[o.name] = out.get(o.name, 0.0) + float(v[j]) * w.torque_per_unit_Nmm
        elif o.kind is ColumnKind.BAND:
            out[o.name] = float(v[j])  # slack tension: positive when the band is taut
    return out


def _all_shoes_press(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> bool:
    """Whether the unloaded solution at ``mu`` (the last right singular
    vector) presses every shoe and band onto the drum."""
    sys_ = assemble(mech, models, mu, direction)
    _, _, vt = np.linalg.svd(sys_.a[sys_.kept])
    loads = list(_shoe_loads(sys_, vt[-1]).values())
    if not loads:
        return False
    if sum(loads) < 0:
        loads = [-x for x in loads]
    top = max(abs(x) for x in loads)
    return top > 0 and all(x >= -PRESS_RTOL * top for x in loads) and max(loads) > MODE_SHARE * top
