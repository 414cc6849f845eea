"""The self-locking limit: the friction coefficient at which a linkage's
equations become singular with every shoe pressing on the drum, so that the
drum holds the shoes on with no effort at all."""

from __future__ import annotations

import functools
import math

import numpy as np
from numpy.typing import NDArray

from dxfcheck.core.directions import Direction
from dxfcheck.mechanism.model import Mechanism
from dxfcheck.statics.contact import ContactModel, ContactOptions
from dxfcheck.statics.diagnosis import MODE_SHARE
from dxfcheck.statics.equations import DEFAULT_OPTIONS, ColumnKind, System, assemble, contact_models

__all__ = ["critical_mu"]

#: Friction coefficients searched for the self-locking limit [-].
MU_SCAN_MAX = 1.0
#: Steps of the scan over 0..``MU_SCAN_MAX``.
MU_SCAN_STEPS = 100


#: Bisection on the self-locking limit stops at this width [-].
MU_TOL = 1e-12
#: A shoe load below minus this fraction of the largest pulls on the drum.
PRESS_RTOL = 1e-6


def _square_det_sign(mech: Mechanism, models: dict[str, ContactModel], mu: float, direction: Direction) -> float:
    """The sign of the kept equations' determinant at ``mu``; NaN when they
    are not square."""
    sys_ = assemble(mech, models, mu, direction)
    a = sys_.a[sys_.kept]
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
