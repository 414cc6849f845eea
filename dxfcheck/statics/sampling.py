"""Design sensitivity: the torque and the loads over the friction range,
the pins' positional tolerance and the springs' force tolerance, by Monte
Carlo sampling.

μ is drawn uniformly over its range, every pin's position uniformly within
its tolerance (a square of side 2 × tolerance about its drawn position),
every spring's force uniformly within ± its tolerance (a fraction; the
right-hand side is linear in each spring's force).  For
a given geometry the statics is linear in the unknowns, and every entry of
the equilibrium matrix is known in closed form from μ and the pin positions:
moment-row entries move with the pins; shoe columns are affine in μ (the
pressure laws do not depend on μ), band columns carry e^(μθ) on their tight
end, and a short pivoted shoe's contact point follows the friction-circle
construction from its (moved) pin.  So the matrices are assembled once as
parts and the samples are solved as stacked numpy systems, chunk by chunk.

Only a few rows move with the samples (the moment rows of parts with a pin,
the rows of shoes and band ends), so the solve is reduced to them: the fixed
rows F are solved once, every solution as x = x_p + N·z (x_p a particular
solution of F·x = b_F, N an orthonormal basis of F's null space, from one
SVD), and each sample only solves the k × k system (A_R(s)·N)·z = b_R −
A_R(s)·x_p of the k moving rows.  A_R(s) is linear in a handful of per-sample
coefficients (1, μ, e^(μθ), the pin offsets, a pivoted shoe's contact
column), so A_R(s)·N and A_R(s)·x_p are those coefficients times matrices
worked out once.  It is the same linear system, solved exactly; the full
stacked solve remains for a linkage where most rows move.

Part reference points for the moment equations stay where the drawing puts
them (equilibrium holds about any point).  Loads keep their points.  A long
pivoted shoe must be in full contact at the nominal geometry (the patch
trimming of partial contact is not sampled).
"""

from __future__ import annotations

import math
import os
import threading
import time
from collections.abc import Sequence
from concurrent.futures import ThreadPoolExecutor
from concurrent.futures import TimeoutError as FuturesTimeout
from dataclasses import field, replace
from typing import TYPE_CHECKING, NamedTuple

import numpy as np

from dxfcheck.core import deadline, progress
from dxfcheck.core.errors import ConfigError
from dxfcheck.core.geometry import Point
from dxfcheck.core.records import record
from dxfcheck.mechanism import FRAME, Drum, Mechanism, Shoe
from dxfcheck.statics.contact import ContactModel, ContactOptions, Direction
from dxfcheck.statics.contact.short_shoe import friction_circle_contact
from dxfcheck.statics.equations import (
    DEFAULT_OPTIONS,
    Axis,
    Balance,
    ColumnKind,
    RowKind,
    RowOwner,
    System,
    assemble,
    contact_models,
)

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = ["CHUNK", "MAX_SAMPLES", "DirectionStats", "SensitivityResult", "sample_design", "torque_curve"]

#: Samples solved at once (memory: CHUNK × n² × 8 bytes).
CHUNK = 4_000
#: Most samples of one run: the pin offsets alone take samples × pins × 16
#: bytes (a 12-pin linkage: 190 MB at this bound), and the percentiles of a
#: million samples are steady to far more digits than the inputs.
MAX_SAMPLES = 1_000_000
#: Percentiles reported.
PERCENTILES = (1.0, 5.0, 50.0, 95.0, 99.0)
#: The percentile of a pin's force that picks the governing pin.
GOVERNING_PERCENTILE = 95.0
#: Points of the torque-over-μ curve.
CURVE_POINTS = 41
#: N·mm per N·m.
NMM_PER_NM = 1000.0
#: The reduced system is solved when its moving rows are at most this share
#: of the system's (a k × k batched solve costs about (k/n)² of the full one).
REDUCED_SHARE = 0.75
#: Smallest over largest singular value of the fixed rows below which they are
#: taken as rank deficient (then the full stacked solve is used) [-].
RANK_TOLERANCE = 1e-12


class _Pivoted(NamedTuple):
    """A shoe column whose contact point follows a pin (friction circle)."""

    column: int
    shoe: Shoe
    pin_center: Point
    body: str


class _Reduced(NamedTuple):
    """The samples' system reduced to its k moving rows R (see the module
    docstring).  Q coefficients per sample, S = 1 + springs right-hand sides
    (the springless one, then each spring's share)."""

    null: NDArray[np.float64]  # n × k: orthonormal basis of the fixed rows' null space
    x_part: NDArray[np.float64]  # S × n: particular solutions of the fixed rows
    reduced: NDArray[np.float64]  # Q × k·k: each coefficient's share of A_R·N
    moved: NDArray[np.float64]  # Q × S·k: each coefficient's share of A_R·x_p
    b_rows: NDArray[np.float64]  # S × k: the right-hand sides of the moving rows


class _PinTerm(NamedTuple):
    """A moment-row entry that moves with a pin: ``-dy/L`` on the pin
    force's x column, ``+dx/L`` on its y column."""

    pin: int
    row: int
    column: int
    axis: Axis


@record(frozen=True)
class DirectionStats:
    """Distributions for one drum direction.

    ``torque_Nm`` and ``max_pin_force_N`` map a percentile (or ``min``,
    ``mean``, ``max``) to its value; ``p_below_required`` is the share of
    samples whose torque is below the required torque (None without one).
    """

    direction: str
    torque_Nm: dict[str, float]
    max_pin_force_N: dict[str, float]
    governing_pin: str
    p_below_required: float | None


@record(frozen=True)
class SensitivityResult:
    samples: int
    seed: int
    mu_range: tuple[float, float]
    pin_tolerance_mm: float
    required_torque_Nm: float | None
    directions: tuple[DirectionStats, ...]
    seconds: float
    curve: dict[str, list[tuple[float, float]]] = field(default_factory=dict)
    #: Each spring's force within ± this fraction of it [-].
    spring_tolerance: float = 0.0


def _stats(values: NDArray[np.float64]) -> dict[str, float]:
    out = {f"p{p:g}": float(np.percentile(values, p)) for p in PERCENTILES}
    out.update(min=float(values.min()), mean=float(values.mean()), max=float(values.max()))
    return out


class _Parts:
    """The equilibrium matrix of one direction, split into what is fixed,
    what scales with μ, with e^(μθ), and with the pin positions."""

    def __init__(self, mech: Mechanism, direction: Direction, options: ContactOptions) -> None:
        if mech.guides:
            g = mech.guides[0]
            raise ConfigError(
                f"sampling does not yet move a guide with the pins: {g.rod} through {g.part} at "
                f"({g.at_mm[0]:g}, {g.at_mm[1]:g}) (solve and check take the drawing as drawn)"
            )
        models, _ = contact_models(mech, options)  # fresh models: every lining in full contact
        s0 = assemble(mech, models, 0.0, direction)
        s1 = assemble(mech, models, 1.0, direction)
        self.keep = s0.kept
        if len(self.keep) != s0.a.shape[1]:
            raise ConfigError("sampling needs a statically determinate linkage")
        self.mech = mech
        self.direction = direction
        self.b = s0.b[self.keep]
        # the right-hand side without the springs, and each spring's share of it
        bare = assemble(replace(mech, springs=()), models, 0.0, direction).b[self.keep]
        self.b_springs = np.array(
            [assemble(replace(mech, springs=(sp,)), models, 0.0, direction).b[self.keep] - bare for sp in mech.springs]
        ).reshape(len(mech.springs), len(self.keep))
        self.b_bare = bare
        self.fixed = s0.a.copy()
        self.mu_part = np.zeros_like(s0.a)
        self.exp_part = np.zeros_like(s0.a)
        self.exp_theta: dict[int, float] = {}
        self.torque0 = np.zeros(s0.a.shape[1])
        self.torque_mu = np.zeros(s0.a.shape[1])
        self.torque_exp = np.zeros(s0.a.shape[1])
        self.pivoted: list[_Pivoted] = []
        self._shoe_columns(models, s0, s1)
        self._band_columns(s0, s1)
        self._pin_columns(s0)
        self.L = mech.length_scale_mm

    def _shoe_columns(self, models: dict[str, ContactModel], s0: System, s1: System) -> None:
        """Shoe columns: affine in μ, except where a pin places the contact
        (re-placed per sample)."""
        shoes = {s.name: s for s in self.mech.shoes}
        for j, o in s0.columns(ColumnKind.SHOE):
            w0, w1 = s0.bases[o.name][o.basis], s1.bases[o.name][o.basis]
            pin = models[o.name].contact_pin
            if pin is not None:
                self.pivoted.append(_Pivoted(j, shoes[o.name], pin, shoes[o.name].part))
                self.fixed[:, j] = 0.0
                self.torque_mu[j] = w1.torque_per_unit_Nmm  # μ·r per unit normal force
                continue
            self.mu_part[:, j] = s1.a[:, j] - s0.a[:, j]
            self.torque_mu[j] = w1.torque_per_unit_Nmm - w0.torque_per_unit_Nmm
            self.torque0[j] = w0.torque_per_unit_Nmm

    def _band_columns(self, s0: System, s1: System) -> None:
        """Band columns: the tight end's share scales with e^(μθ)."""
        bands = {b.name: b for b in self.mech.bands}
        for j, o in s0.columns(ColumnKind.BAND):
            band = bands[o.name]
            theta = math.radians(band.wrap_deg)
            tight = (s1.a[:, j] - s0.a[:, j]) / (math.exp(theta) - 1.0)
            self.exp_part[:, j] = tight
            self.fixed[:, j] = s0.a[:, j] - tight
            self.exp_theta[j] = theta
            self.torque_exp[j] = band.radius_mm  # (e^(μθ) − 1)·r per unit slack tension
            self.torque0[j] = -band.radius_mm

    def _pin_columns(self, s0: System) -> None:
        """Pin columns: the moment-row entries that move with a pin, and
        each pin's first column (its force on its first body)."""
        pin_index = {p.name: k for k, p in enumerate(self.mech.pins)}
        self.pin_terms: list[_PinTerm] = []
        self.pin_cols: list[tuple[int, int]] = []  # (pin index, x column) of the first body
        seen: set[str] = set()
        for c, o in s0.columns(ColumnKind.PIN):
            k = pin_index[o.name]
            if o.axis is Axis.X and o.name not in seen:
                seen.add(o.name)
                self.pin_cols.append((k, c))
            if o.body != FRAME:
                r = s0.row_index[RowOwner(RowKind.BODY, o.body, Balance.MOMENT)]
                self.pin_terms.append(_PinTerm(k, r, c, o.axis))
        self._rows = s0.row_index

    def prepare(self) -> None:
        """Keep only the rows that are solved, and the columns that vary;
        reduce the system to its moving rows where that pays."""
        rows = {orig: new for new, orig in enumerate(self.keep)}
        self.fixed_k = np.ascontiguousarray(self.fixed[self.keep])
        self.mu_cols = [j for j in range(self.fixed.shape[1]) if np.any(self.mu_part[:, j])]
        self.mu_k = {j: self.mu_part[self.keep, j] for j in self.mu_cols}
        self.exp_k = {j: self.exp_part[self.keep, j] for j in self.exp_theta}
        self.pin_terms_k = [t._replace(row=rows[t.row]) for t in self.pin_terms if t.row in rows]
        pin_index = {p.center: i for i, p in enumerate(self.mech.pins)}
        self.pivoted_k = [
            (
                pv,
                pin_index[pv.pin_center],
                rows[self._rows[RowOwner(RowKind.BODY, pv.body, Balance.FX)]],
                rows[self._rows[RowOwner(RowKind.BODY, pv.body, Balance.FY)]],
                rows.get(self._rows[RowOwner(RowKind.BODY, pv.body, Balance.MOMENT)]),
            )
            for pv in self.pivoted
        ]
        self._local = threading.local()  # one work buffer per thread
        self.reduced = _reduce(self.fixed_k, self._coefficient_matrices(), self.b_bare, self.b_springs)

    def _coefficient_matrices(self) -> NDArray[np.float64]:
        """The system as Q matrices (Q × n × n), in the order of
        :meth:`_coefficients`: A(s) = Σ_q c_q(s)·M_q."""
        n = self.fixed_k.shape[0]
        mats = [self.fixed_k]
        mu = np.zeros((n, n))
        for j in self.mu_cols:
            mu[:, j] = self.mu_k[j]
        mats.append(mu)
        for j in self.exp_theta:
            m = np.zeros((n, n))
            m[:, j] = self.exp_k[j]
            mats.append(m)
        for k in range(len(self.mech.pins)):
            dx, dy = np.zeros((n, n)), np.zeros((n, n))
            for t in self.pin_terms_k:
                if t.pin == k and t.axis is Axis.X:
                    dy[t.row, t.column] -= 1.0 / self.L
                elif t.pin == k:
                    dx[t.row, t.column] += 1.0 / self.L
            mats += [dx, dy]
        for pv, _, *pv_rows in self.pivoted_k:
            for r in pv_rows:
                if r is not None:
                    m = np.zeros((n, n))
                    m[r, pv.column] = 1.0
                    mats.append(m)
        return np.array(mats)

    def _coefficients(self, mu: NDArray[np.float64], dpin: NDArray[np.float64]) -> NDArray[np.float64]:
        """Each sample's coefficients (samples × Q): 1, μ, e^(μθ) per band
        column, each pin's offset (x, y) [mm], each pivoted shoe's contact
        column entries."""
        cols = [np.ones_like(mu), mu, *(np.exp(mu * theta) for theta in self.exp_theta.values())]
        cols += [dpin[:, k, a] for k in range(len(self.mech.pins)) for a in (0, 1)]
        for entries in self._pivoted_entries(mu, dpin):
            cols += [v for _, _, v in entries]
        return np.stack(cols, axis=1)

    def _pivoted_entries(
        self, mu: NDArray[np.float64], dpin: NDArray[np.float64]
    ) -> list[list[tuple[int, int, NDArray[np.float64]]]]:
        """Per pivoted shoe: its column's (row, column, values) in the Fx, Fy
        and (when kept) moment rows of its part, per sample."""
        assert self.mech.drum is not None
        out = []
        for pv, k, r0, r1, r2 in self.pivoted_k:
            fx, fy, px_c, py_c = _pivoted_contact(pv, self.mech.drum, mu, dpin[:, k, :], self.direction)
            entries = [(r0, pv.column, fx), (r1, pv.column, fy)]
            if r2 is not None:
                ref = self.mech.pins[k].center
                entries.append((r2, pv.column, ((px_c - ref[0]) * fy - (py_c - ref[1]) * fx) / self.L))
            out.append(entries)
        return out

    def solve(
        self, mu: NDArray[np.float64], dpin: NDArray[np.float64], springs: NDArray[np.float64] | None = None
    ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """Torque [N·m] and every pin's force [N] (on its first body) for each
        sample; ``springs`` (samples × springs) scales each spring's force."""
        if not hasattr(self, "fixed_k"):
            self.prepare()
        if self.reduced is not None:
            return self._results(mu, self.solve_reduced(mu, dpin, springs))
        return self._results(mu, self.solve_full(mu, dpin, springs))

    def solve_reduced(
        self, mu: NDArray[np.float64], dpin: NDArray[np.float64], springs: NDArray[np.float64] | None = None
    ) -> NDArray[np.float64]:
        """Every sample's unknowns (samples × n) from its k × k reduced
        system (needs :attr:`reduced`)."""
        red = self.reduced
        assert red is not None
        n, k = mu.shape[0], red.null.shape[1]
        c = self._coefficients(mu, dpin)
        sig = np.ones((n, red.x_part.shape[0]))
        if springs is not None:
            sig[:, 1:] = springs
        # numpy's own loops (einsum), not BLAS: a threaded BLAS spins on the
        # chunks' small products, which already run one per core
        m = np.einsum("nq,qm->nm", c, red.reduced).reshape(n, k, k)
        moved = np.einsum("nq,qm->nm", c, red.moved).reshape(n, sig.shape[1], k)
        rhs = np.einsum("ns,sk->nk", sig, red.b_rows) - np.einsum("ns,nsk->nk", sig, moved)
        z = np.linalg.solve(m, rhs[..., None])[..., 0]
        x: NDArray[np.float64] = np.einsum("ns,sc->nc", sig, red.x_part) + np.einsum("nk,ck->nc", z, red.null)
        return x

    def solve_full(
        self, mu: NDArray[np.float64], dpin: NDArray[np.float64], springs: NDArray[np.float64] | None = None
    ) -> NDArray[np.float64]:
        """Every sample's unknowns (samples × n) from its whole system,
        assembled and solved as a stack."""
        n = mu.shape[0]
        buf = getattr(self._local, "buf", None)
        if buf is None or buf.shape[0] < n:
            buf = self._local.buf = np.empty((n, *self.fixed_k.shape))
        a = buf[:n]
        a[:] = self.fixed_k
        for j in self.mu_cols:
            a[:, :, j] += mu[:, None] * self.mu_k[j]
        for j, theta in self.exp_theta.items():
            a[:, :, j] += np.exp(mu * theta)[:, None] * self.exp_k[j]
        for t in self.pin_terms_k:
            if t.axis is Axis.X:
                a[:, t.row, t.column] -= dpin[:, t.pin, 1] / self.L
            else:
                a[:, t.row, t.column] += dpin[:, t.pin, 0] / self.L
        for entries in self._pivoted_entries(mu, dpin):
            for r, j, v in entries:
                a[:, r, j] = v
        if springs is None:
            b = np.broadcast_to(self.b, (n, self.b.shape[0]))
        else:
            b = self.b_bare[None, :] + springs @ self.b_springs
        return np.asarray(np.linalg.solve(a, b[..., None])[..., 0])

    def _results(
        self, mu: NDArray[np.float64], x: NDArray[np.float64]
    ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """Torque [N·m] and every pin's force [N] from the unknowns."""
        torque = np.einsum("nc,c->n", x, self.torque0) + mu * np.einsum("nc,c->n", x, self.torque_mu)
        for j, theta in self.exp_theta.items():
            torque += x[:, j] * np.exp(mu * theta) * self.torque_exp[j]
        forces = np.stack([np.hypot(x[:, c], x[:, c + 1]) for _, c in self.pin_cols], axis=1)
        return torque / NMM_PER_NM, forces


def _reduce(
    fixed: NDArray[np.float64], mats: NDArray[np.float64], b_bare: NDArray[np.float64], b_springs: NDArray[np.float64]
) -> _Reduced | None:
    """The reduced system of the moving rows (rows where a coefficient other
    than the constant has an entry), or None where it does not pay or the
    fixed rows are rank deficient."""
    n = fixed.shape[0]
    moving = np.any(mats[1:] != 0.0, axis=(0, 2))
    r_rows, f_rows = np.flatnonzero(moving), np.flatnonzero(~moving)
    k = r_rows.size
    if k > REDUCED_SHARE * n or f_rows.size == 0:
        return None
    u, sv, vt = np.linalg.svd(fixed[f_rows])
    if sv[-1] <= RANK_TOLERANCE * sv[0]:
        return None
    null = vt[f_rows.size :].T
    b_all = np.vstack([b_bare[None, :], b_springs])
    x_part = (vt[: f_rows.size].T @ ((u.T @ b_all[:, f_rows].T) / sv[:, None])).T
    q = mats.shape[0]
    on_rows = mats[:, r_rows, :]
    return _Reduced(
        null=null,
        x_part=x_part,
        reduced=(on_rows @ null).reshape(q, k * k),
        moved=np.einsum("qrc,sc->qsr", on_rows, x_part).reshape(q, -1),
        b_rows=b_all[:, r_rows],
    )


def _pivoted_contact(
    pv: _Pivoted, drum: Drum, mu: NDArray[np.float64], dpin: NDArray[np.float64], direction: Direction
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """Per sample: the force per newton of normal force [N/N] and the contact
    point [mm] of a short pivoted shoe whose pin is moved by ``dpin`` [mm]
    (the contact law is :func:`friction_circle_contact`)."""
    cx, cy = drum.center
    r = drum.radius_mm
    alpha = friction_circle_contact(
        pv.pin_center[0] + dpin[:, 0] - cx,
        pv.pin_center[1] + dpin[:, 1] - cy,
        r,
        mu,
        direction,
        internal=pv.shoe.internal,
        mid_deg=pv.shoe.arc.mid_deg,
    )
    s = float(direction.sign)
    sgn = -1.0 if pv.shoe.internal else 1.0
    nx, ny = sgn * np.cos(alpha), sgn * np.sin(alpha)
    tx, ty = -s * np.sin(alpha), s * np.cos(alpha)
    return nx + mu * tx, ny + mu * ty, cx + r * np.cos(alpha), cy + r * np.sin(alpha)


def _chunk(
    parts: _Parts, mu: NDArray[np.float64], dpin: NDArray[np.float64], springs: NDArray[np.float64] | None
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    deadline.check("sampling")  # a chunk that starts after the deadline is not solved
    return parts.solve(mu, dpin, springs)


def _solve_chunks(
    parts: _Parts,
    mu_all: NDArray[np.float64],
    dpin_all: NDArray[np.float64],
    chunk: int,
    springs_all: NDArray[np.float64] | None = None,
) -> list[tuple[NDArray[np.float64], NDArray[np.float64]]]:
    """Every chunk of samples solved on a thread pool (numpy's batched
    solve releases the GIL: chunks run on every core), within the run's
    deadline: each result is waited for no longer than the time left, and
    on the deadline the chunks not started are cancelled and the pool is
    left without waiting for the one running."""
    pool = ThreadPoolExecutor(max_workers=os.cpu_count() or 1)
    done = False
    try:
        futures = [
            pool.submit(
                _chunk,
                parts,
                mu_all[i : i + chunk],
                dpin_all[i : i + chunk],
                None if springs_all is None else springs_all[i : i + chunk],
            )
            for i in range(0, len(mu_all), chunk)
        ]
        results = []
        with progress.task(f"sampling {parts.direction}", len(mu_all)) as bar:
            for f in futures:
                try:
                    results.append(f.result(timeout=deadline.remaining()))
                except FuturesTimeout:
                    raise deadline.TimeLimitExceeded(deadline.limit_seconds() or 0.0, "sampling") from None
                bar.advance(len(results[-1][0]))
        done = True
        return results
    finally:
        pool.shutdown(wait=done, cancel_futures=True)


def _check_inputs(
    mu_range: tuple[float, float], samples: int, pin_tolerance_mm: float, spring_tolerance: float
) -> None:
    """Refuse a range, sample count or tolerance the sampler cannot use."""
    lo, hi = mu_range
    if not 0.0 <= spring_tolerance < 1.0:
        raise ConfigError(f"the spring force tolerance must be a fraction from 0 to below 1, got {spring_tolerance:g}")
    if not (0 <= lo <= hi < math.inf) or not 1 <= samples <= MAX_SAMPLES or not 0 <= pin_tolerance_mm < math.inf:
        raise ConfigError(
            f"sampling needs 0 ≤ mu_min ≤ mu_max, 1 to {MAX_SAMPLES:,} samples and a tolerance ≥ 0 "
            f"(got μ {lo:g}..{hi:g}, {samples} samples, tolerance {pin_tolerance_mm:g} mm)"
        )


def _direction_stats(
    mech: Mechanism,
    direction: Direction,
    results: list[tuple[NDArray[np.float64], NDArray[np.float64]]],
    required_torque_Nm: float | None,
) -> DirectionStats:
    """The distributions of one direction's samples: torque [N·m], the
    governing pin's force [N] (highest 95th percentile), P(T < required)."""
    torque = np.concatenate([t for t, _ in results])
    force = np.concatenate([f for _, f in results])
    worst = int(np.argmax(np.percentile(force, GOVERNING_PERCENTILE, axis=0)))
    below = None if required_torque_Nm is None else float(np.mean(torque < required_torque_Nm))
    return DirectionStats(str(direction), _stats(torque), _stats(force[:, worst]), mech.pins[worst].name, below)


def sample_design(
    mech: Mechanism,
    mu_range: tuple[float, float],
    samples: int,
    *,
    pin_tolerance_mm: float = 0.0,
    seed: int = 0,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    options: ContactOptions = DEFAULT_OPTIONS,
    required_torque_Nm: float | None = None,
    chunk: int = CHUNK,
    spring_tolerance: float = 0.0,
) -> SensitivityResult:
    """Sample μ, the pin positions and the spring forces (each within ±
    ``spring_tolerance``, a fraction) and solve every sample exactly.

    Raises
    ------
    ConfigError
        On a bad range or sample count, or a linkage that cannot be sampled.
    """
    lo, hi = mu_range
    _check_inputs(mu_range, samples, pin_tolerance_mm, spring_tolerance)
    rng = np.random.default_rng(seed)
    t0 = time.perf_counter()
    stats = []
    curve: dict[str, list[tuple[float, float]]] = {}
    for d in directions:
        direction = Direction(d)
        parts = _Parts(mech, direction, options)
        parts.prepare()
        mu_all = rng.uniform(lo, hi, samples)
        dpin_all = rng.uniform(-pin_tolerance_mm, pin_tolerance_mm, (samples, len(mech.pins), 2))
        springs_all = None
        if spring_tolerance > 0 and mech.springs:  # drawn only then: a seed's other samples stay as they were
            springs_all = rng.uniform(1 - spring_tolerance, 1 + spring_tolerance, (samples, len(mech.springs)))
        results = _solve_chunks(parts, mu_all, dpin_all, chunk, springs_all)
        stats.append(_direction_stats(mech, direction, results, required_torque_Nm))
        grid = np.linspace(lo, hi, CURVE_POINTS)
        t_grid, _ = parts.solve(grid, np.zeros((grid.size, len(mech.pins), 2)))
        curve[str(direction)] = [(float(m), float(t)) for m, t in zip(grid, t_grid, strict=True)]
    return SensitivityResult(
        samples,
        seed,
        (lo, hi),
        pin_tolerance_mm,
        required_torque_Nm,
        tuple(stats),
        time.perf_counter() - t0,
        curve,
        spring_tolerance,
    )


def torque_curve(
    mech: Mechanism,
    mu_values: NDArray[np.float64],
    direction: Direction | str,
    options: ContactOptions = DEFAULT_OPTIONS,
) -> NDArray[np.float64]:
    """Braking torque [N·m] at each μ for the drawn geometry (vectorised)."""
    parts = _Parts(mech, Direction(direction), options)
    t, _ = parts.solve(np.asarray(mu_values, dtype=float), np.zeros((len(mu_values), len(mech.pins), 2)))
    return t
