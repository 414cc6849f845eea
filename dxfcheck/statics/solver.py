"""Planar rigid-body statics of the whole brake linkage, with Coulomb
friction at the shoes.

The method is the general one of planar statics (the "method of members" for
frames and machines): every moving part contributes three equilibrium
equations (two force sums and one moment sum); every pin is a massless
particle with two equations; the unknowns are the components of the force
each pin exerts on each body it joins (the frame included for pivots) and
one scalar per shoe, the shoe's normal force.  Two-force and three-force
members are not special-cased: they come out of the one linear solve.

Before solving, the equations are examined by singular-value decomposition:

* a left null vector (an equation combination the unknowns cannot reach)
  is a *free motion* of the linkage; if the loads do work on it, the drawing
  shows a mechanism, not a brake, and the parts that move are named;
* a right null vector is a *self-stress*: the linkage is statically
  indeterminate (redundant) and its pin forces are not fixed by statics.

The self-locking limit is the friction coefficient at which the equations
become singular with every shoe pressing on the drum: there the drum holds
the shoes on with no effort at all.

References
----------
.. [1] F. P. Beer, E. R. Johnston et al., *Vector Mechanics for Engineers:
   Statics*, 11th ed., McGraw-Hill, 2016, ch. 4 (equilibrium of rigid
   bodies, statical indeterminacy) and ch. 6.3 (frames and machines).
.. [2] G. Strang, *Linear Algebra and Its Applications*, 4th ed., 2006,
   §6.3 (singular value decomposition: rank and the four subspaces).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import replace
from typing import TYPE_CHECKING

import numpy as np

from dxfcheck.core.errors import SolveError
from dxfcheck.core.findings import Code, Finding, Severity, has_errors
from dxfcheck.core.geometry import Point, dist
from dxfcheck.mechanism import Band, Mechanism, Shoe
from dxfcheck.statics.contact import (
    ContactModel,
    ContactModelName,
    ContactOptions,
    ContactWrench,
    Direction,
    ShoeModelChoice,
    combine,
    line_of_action_point,
    moment_about_center,
)
from dxfcheck.statics.contact.long_shoe import equivalent_mu
from dxfcheck.statics.diagnosis import CONDITION_WARN, diagnose
from dxfcheck.statics.equations import (
    DEFAULT_OPTIONS,
    Axis,
    ColumnKind,
    System,
    assemble,
    band_ratio,
    coefficients,
    contact_models,
    solve_system,
    tight_at_end,
)
from dxfcheck.statics.locking import critical_mu
from dxfcheck.statics.results import (
    Attachment,
    BandEnd,
    BandResult,
    CaseSolution,
    GuideResult,
    LoadResult,
    MemberResult,
    PinResult,
    ShoeResult,
    Solution,
    SpringEnd,
    SpringResult,
)
from dxfcheck.statics.strength import drum_load, part_diagrams
from dxfcheck.statics.verify import verify_case

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = ["solve", "solve_case", "solve_for_torque"]

#: Largest relative equilibrium residual accepted.
RESIDUAL_LIMIT = 1e-8
#: A normal force below minus this fraction of the largest force means the
#: shoe would have to pull on the drum.
LIFT_RTOL = 1e-9
#: μ this close (relative) to the self-locking limit counts as at the limit.
AT_LIMIT_RTOL = 1e-6
#: Most re-solves while pivoted long shoes settle their contact patches.
PATCH_ITERATIONS = 30
#: N·mm per N·m.
NMM_PER_NM = 1000.0
#: Stands in for the largest force when there is none [N] (no division by 0).
TINY_FORCE_N = 1e-300
#: A guide's force at most this fraction of the largest other force on its
#: rod is no force point: the rod stays a two-force member (a spring on the
#: rod's axis leaves the guide nothing to carry but rounding) [-].
GUIDE_IDLE_RTOL = 1e-9


def _settle_contact(
    mech: Mechanism, models: dict[str, ContactModel], sys_: System, mu: float, direction: Direction
) -> tuple[System, NDArray[np.float64]]:
    """Solve, then trim each pivoted long shoe's contact patch to where the
    pressure is not negative and solve again, until no patch changes.

    Raises
    ------
    SolveError
        With S313 when the patches do not settle, or the equations become
        singular on a trimmed patch: no contact with positive pressure
        everywhere balances the loads.
    """
    changed: list[str] = []
    for k in range(PATCH_ITERATIONS + 1):
        try:
            x = solve_system(sys_)
        except np.linalg.LinAlgError:
            if k == 0:
                raise SolveError(
                    f"{direction}: the equilibrium equations are singular", path=mech.drawing.path
                ) from None
            break
        changed = [s.name for s in mech.shoes if models[s.name].refine(coefficients(sys_, x, s.name), mu, direction)]
        edge = [s.name for s in mech.shoes if models[s.name].on_edge]
        if edge:
            changed = edge
            break
        if not changed:
            return sys_, x
        sys_ = assemble(mech, models, mu, direction)
    names = changed or [s.name for s in mech.shoes if models[s.name].partial]
    raise _unsettled(mech, direction, names)


def _unsettled(mech: Mechanism, direction: Direction, names: list[str]) -> SolveError:
    """The refusal (S313) of contact patches that do not settle, naming the
    shoes ``names`` (every shoe when none is named)."""
    shoes = [s for s in mech.shoes if s.name in names] or list(mech.shoes)
    return SolveError(
        f"{direction}: the shoes' contact cannot be settled",
        path=mech.drawing.path,
        findings=[
            Finding(
                Code.CONTACT_UNSETTLED,
                f"{direction}: shoe {s.name}: no contact patch with a positive pressure everywhere balances the "
                "loads (the patch keeps moving, shrinks to the lining's edge, or the linkage locks on it); check the "
                "shoe pin's position against the lining, and the lining's extent",
                (s.arc.source.ref,),
                (s.arc.source.layer,),
                s.arc.point_at(s.arc.mid_deg),
            )
            for s in shoes
        ],
    )


def solve_case(
    mech: Mechanism,
    mu: float,
    direction: Direction | str,
    options: ContactOptions = DEFAULT_OPTIONS,
    *,
    locking: bool = True,
) -> CaseSolution:
    """Solve the statics of one drum direction.

    Parameters
    ----------
    mech : Mechanism
        A mechanism without error findings.
    mu : float
        Coefficient of friction between lining and drum [-].
    direction : Direction or str
        ``"cw"`` or ``"ccw"``, as seen in the drawing.
    options : ContactOptions
        Shoe theory (short, long or auto) and the auto threshold.
    locking : bool
        Search for the self-locking limit (``critical_mu``); False skips the
        search and reports none.

    Returns
    -------
    CaseSolution

    Raises
    ------
    SolveError
        When the linkage has a free motion the loads drive, or is redundant;
        the error carries the findings that name the parts and pins.
    """
    try:
        return _solve_case(mech, mu, Direction(direction), options, locking)
    except SolveError as exc:
        raise _with_warnings(mech, exc) from None


def _with_warnings(mech: Mechanism, exc: SolveError) -> SolveError:
    """``exc`` with the mechanism's warnings after its errors: a refusal
    shows the reading and topology findings that may explain it (an open
    end, a one-part pin) even though they are only warnings."""
    errors = list(exc.findings)
    warnings = [f for f in mech.findings if f.severity is Severity.WARNING and f not in errors]
    # warnings on the entities an error names first
    named = {h for f in errors for h in f.handles}
    warnings.sort(key=lambda f: not (set(f.handles) & named))
    return SolveError(exc.message, path=exc.path, findings=[*errors, *warnings])


def _solve_case(
    mech: Mechanism, mu: float, direction: Direction, options: ContactOptions, locking: bool, *, strength: bool = True
) -> CaseSolution:
    """One drum direction: the checks that refuse a solve, the contact
    settled, the residual, the results, and their verification; with
    ``strength`` False, without the parts' force diagrams and the drum's
    shaft load (a solve whose torque alone is wanted)."""
    _refuse_bad_input(mech, mu)
    models, notes = contact_models(mech, options)
    sys_ = assemble(mech, models, mu, direction)
    if has_errors(sys_.findings):  # a contact model that cannot place its force explains the rest
        raise SolveError(
            f"{direction}: a shoe's contact cannot be placed",
            path=mech.drawing.path,
            findings=[f for f in sys_.findings if f.severity is Severity.ERROR],
        )
    findings, cond = diagnose(mech, sys_, direction)
    if has_errors(findings) or cond > CONDITION_WARN:
        _refuse_at_limit(mech, mu, direction, options)
    if has_errors(findings):
        raise SolveError(
            f"{direction}: the linkage cannot be solved",
            path=mech.drawing.path,
            findings=[f for f in findings if f.severity is Severity.ERROR],
        )
    sys_, x = _settle_contact(mech, models, sys_, mu, direction)
    findings = list(dict.fromkeys([*notes, *sys_.findings, *findings]))
    fscale = max(float(np.abs(x).max(initial=0.0)), float(np.abs(sys_.b).max(initial=0.0)), TINY_FORCE_N)
    residual = float(np.abs(sys_.a @ x - sys_.b).max(initial=0.0)) / fscale
    if residual > RESIDUAL_LIMIT:
        findings.append(Finding(Code.RESIDUAL, f"{direction}: equilibrium residual {residual:.3g} is too large"))
    case = _results(mech, models, sys_, x, mu, direction, residual, cond, findings, options if locking else None)
    verify_case(mech, case)
    if not strength:
        return case
    return replace(case, parts=part_diagrams(mech, case), drum_load_N=drum_load(case))


def _refuse_bad_input(mech: Mechanism, mu: float) -> None:
    """Refuse a mechanism with errors and a friction coefficient that is not
    a non-negative number."""
    if has_errors(list(mech.findings)):
        raise SolveError(
            "the mechanism has errors; fix the drawing first",
            path=mech.drawing.path,
            findings=[f for f in mech.findings if f.severity is Severity.ERROR],
        )
    if not math.isfinite(mu) or mu < 0:
        raise SolveError(f"friction coefficient must be a non-negative number, got {mu}")


def _refuse_at_limit(mech: Mechanism, mu: float, direction: Direction, options: ContactOptions) -> None:
    """Refuse singular or ill-conditioned equations at the self-locking
    limit itself, where any effort or none holds the brake."""
    mu_c = critical_mu(mech, direction, options)
    if mu_c is not None and abs(mu - mu_c) <= AT_LIMIT_RTOL * max(1.0, mu_c):
        raise SolveError(
            f"{direction}: μ = {mu:g} is at the self-locking limit",
            path=mech.drawing.path,
            findings=[
                Finding(
                    Code.SELF_LOCKING,
                    f"{direction}: μ = {mu:g} is at the self-locking limit (critical μ = {mu_c:.6g}): the "
                    "equations are singular there, any effort or none holds the brake; move away from it",
                )
            ],
        )


def _shoe_result(
    mech: Mechanism, s: Shoe, model: ContactModel, ws: tuple[ContactWrench, ...], coeffs: list[float], mu: float
) -> ShoeResult:
    """Shoe ``s``'s forces, torque, line load and contact patch from its
    basis wrenches ``ws`` and their coefficients."""
    force, normal, friction, torque = combine(ws, coeffs)
    assert mech.drum is not None
    center, radius = mech.drum.center, mech.drum.radius_mm
    m_o = moment_about_center(ws, coeffs, center)
    point = line_of_action_point(center, radius, force, m_o, s.arc.mid_deg)
    total = sum(c * w.torque_per_unit_Nmm for c, w in zip(coeffs, ws, strict=True))
    sign = 1.0 if total >= 0 else -1.0
    if mu == 0.0:  # no torque to tell: the drum pushes a pressing shoe away from it
        at = line_of_action_point(center, radius, normal, 0.0, s.arc.mid_deg)
        away = (at[0] - center[0]) * normal[0] + (at[1] - center[1]) * normal[1]
        sign = 1.0 if (away < 0) == s.internal else -1.0
    peak, peak_deg = model.peak(coeffs)
    patch = model.patch_deg()
    return ShoeResult(
        name=s.name,
        part=s.part,
        model=str(model.name),
        mounting=str(s.mounting),
        contact_angle_deg=s.contact_angle_deg,
        normal_N=sign * math.hypot(*normal),
        friction_resultant_N=sign * math.hypot(*friction),
        friction_lining_N=torque / radius,
        torque_Nm=torque / NMM_PER_NM,
        contact_mm=point,
        force_N=force,
        normal_force_N=normal,
        # the normal forces are radial: their resultant runs through the axis
        # and the whole moment about the axis is the friction's
        normal_at_mm=line_of_action_point(center, radius, normal, 0.0, s.arc.mid_deg),
        friction_force_N=friction,
        friction_at_mm=_foot_of_line(center, friction, m_o, point),
        internal=s.internal,
        peak_line_load_N_per_mm=peak,
        peak_at_deg=peak_deg,
        mu_equivalent=equivalent_mu(mu, s.contact_angle_deg),
        pressure_offset_deg=model.offset_deg(coeffs),
        contact_from_deg=patch[0],
        contact_to_deg=patch[1],
        line_load=_line_load(ws, coeffs),
    )


def _line_load(ws: tuple[ContactWrench, ...], coeffs: list[float]) -> tuple[tuple[float, float], ...]:
    """The line load's samples ``(polar angle [degrees], q [N/mm])`` of
    ``Σ coeffs[i]·ws[i]``."""
    angles = [deg for deg, _ in ws[0].line_load]
    q = [0.0] * len(angles)  # summed in the wrenches' order: the same floats as sum(c·q) per sample
    for c, w in zip(coeffs, ws, strict=True):
        q = [acc + c * qk for acc, (_, qk) in zip(q, w.line_load, strict=True)]
    return tuple(zip(angles, q, strict=True))


def _foot_of_line(center: Point, force: Point, moment: float, fallback: Point) -> Point:
    """The foot of the perpendicular from ``center`` to the line of action of
    ``force`` [N] whose moment about ``center`` is ``moment`` [N·mm]."""
    f2 = force[0] ** 2 + force[1] ** 2
    if f2 == 0.0:
        return fallback
    return (center[0] + moment * force[1] / f2, center[1] - moment * force[0] / f2)


def _band_result(band: Band, slack: float, mu: float, direction: Direction) -> BandResult:
    tight = slack * band_ratio(band, mu)
    at_end = tight_at_end(direction)
    ends = []
    for pin, u, deg, is_tight in (
        (band.start_pin, band.start_dir, band.start_deg, not at_end),
        (band.end_pin, band.end_dir, band.end_deg, at_end),
    ):
        t = tight if is_tight else slack
        tangent = (
            band.center[0] + band.radius_mm * math.cos(math.radians(deg)),
            band.center[1] + band.radius_mm * math.sin(math.radians(deg)),
        )
        ends.append(BandEnd(pin, is_tight, t, tangent, (t * u[0], t * u[1])))
    return BandResult(
        name=band.name,
        kind=band.kind,
        tight_N=tight,
        slack_N=slack,
        tight_pin=band.end_pin if at_end else band.start_pin,
        slack_pin=band.start_pin if at_end else band.end_pin,
        wrap_deg=band.wrap_deg,
        torque_Nm=(tight - slack) * band.radius_mm / NMM_PER_NM,
        peak_line_load_N_per_mm=tight / band.radius_mm,
        ends=tuple(ends),
    )


def _results(
    mech: Mechanism,
    models: dict[str, ContactModel],
    sys_: System,
    x: NDArray[np.float64],
    mu: float,
    direction: Direction,
    residual: float,
    cond: float,
    findings: list[Finding],
    options: ContactOptions | None,
) -> CaseSolution:
    """The results of one solve; ``options`` None skips the self-locking
    search."""
    att = _attachments(sys_, x)
    guides = _guide_results(mech, sys_, x)
    shoes = tuple(
        _shoe_result(mech, s, models[s.name], sys_.bases[s.name], coefficients(sys_, x, s.name), mu) for s in mech.shoes
    )
    loads = _load_results(mech)
    bands = _band_results(mech, sys_, x, mu, direction)
    mu_c = critical_mu(mech, direction, options) if options is not None else None
    findings.extend(_case_findings(mech, shoes, bands, loads, mu, mu_c, direction))
    return CaseSolution(
        direction=direction,
        mu=mu,
        torque_Nm=sum(s.torque_Nm for s in shoes) + sum(b.torque_Nm for b in bands),
        shoes=shoes,
        pins=_pin_results(mech, att),
        members=_member_results(mech, att, guides),
        loads=loads,
        critical_mu=mu_c,
        residual=residual,
        condition=cond,
        findings=tuple(findings),
        bands=bands,
        springs=_spring_results(mech),
        guides=guides,
    )


def _guide_results(mech: Mechanism, sys_: System, x: NDArray[np.float64]) -> tuple[GuideResult, ...]:
    """Each guide's force on its rod: its unknown along the guide's normal."""
    guides = {g.name: g for g in mech.guides}
    out = []
    for j, o in sys_.columns(ColumnKind.GUIDE):
        g = guides[o.name]
        force = float(x[j]) * g.normal[0] + 0.0, float(x[j]) * g.normal[1] + 0.0  # + 0.0: no negative zero
        out.append(GuideResult(g.name, g.rod, g.part, g.at_mm, force))
    return tuple(out)


def _attachments(sys_: System, x: NDArray[np.float64]) -> dict[str, list[Attachment]]:
    """Each pin's force on each body it joins, by pin, in column order."""
    att: dict[str, list[Attachment]] = {}
    for j, o in sys_.columns(ColumnKind.PIN):
        if o.axis is Axis.X:
            jy = sys_.column_index[o._replace(axis=Axis.Y)]
            att.setdefault(o.name, []).append(Attachment(o.body, float(x[j]), float(x[jy])))
    return att


def _pin_results(mech: Mechanism, att: dict[str, list[Attachment]]) -> tuple[PinResult, ...]:
    """Every pin: its force on its first body and the largest on any."""
    pins: list[PinResult] = []
    for p in mech.pins:
        lst = att[p.name]
        first = lst[0]
        pins.append(
            PinResult(
                name=p.name,
                x_mm=p.center[0],
                y_mm=p.center[1],
                diameter_mm=p.diameter_mm,
                grounded=p.grounded,
                parts=p.bodies,
                fx_N=first.fx_N,
                fy_N=first.fy_N,
                force_N=first.force_N,
                max_force_N=max(a.force_N for a in lst),
                attachments=tuple(lst),
            )
        )
    return tuple(pins)


def _member_results(
    mech: Mechanism, att: dict[str, list[Attachment]], guides: tuple[GuideResult, ...] = ()
) -> tuple[MemberResult, ...]:
    """The two-force members (no shoe, exactly two points where forces act:
    two pins, or a pin and a spring's end or a load, such as a pull rod with
    the setting spring on its nut, a guide that carries a force counting as
    a third): their axial force, positive in tension."""
    shoe_parts = {s.part for s in mech.shoes}
    members: list[MemberResult] = []
    for part in mech.parts:
        if part.name in shoe_parts:
            continue
        points = _force_points(mech, att, part.name)
        largest = max((math.hypot(*f) for _, _, f in points), default=0.0)
        carried = [
            g for g in guides if part.name in (g.rod, g.part) and math.hypot(*g.force_N) > GUIDE_IDLE_RTOL * largest
        ]
        if len(points) + len(carried) != 2:
            continue
        (na, pa, _), (nb, pb, fb) = points
        length = dist(pa, pb)
        if length <= mech.tolerance_mm:
            continue
        ux, uy = (pb[0] - pa[0]) / length, (pb[1] - pa[1]) / length
        members.append(MemberResult(part.name, (na, nb), fb[0] * ux + fb[1] * uy, length, (pa, pb)))
    return tuple(members)


def _force_points(mech: Mechanism, att: dict[str, list[Attachment]], part: str) -> list[tuple[str, Point, Point]]:
    """Every point where a force acts on ``part``: (the pin's, spring's or
    load's name, the point [mm], the force on the part there [N]); pins first."""
    out: list[tuple[str, Point, Point]] = []
    for name in mech.part(part).pins:
        a = next(x for x in att[name] if x.body == part)
        out.append((name, mech.pin(name).center, (a.fx_N, a.fy_N)))
    for sp in mech.springs:
        out += [(sp.name, sp.ends[k], sp.force_on(k)) for k in (0, 1) if sp.parts[k] == part]
    out += [(ld.name, ld.point, ld.force) for ld in mech.loads if ld.part == part]
    return out


def _load_results(mech: Mechanism) -> tuple[LoadResult, ...]:
    """Every load that acts on a part."""
    return tuple(LoadResult(ld.name, ld.part, ld.point[0], ld.point[1], *ld.force) for ld in mech.loads if ld.part)


def _band_results(
    mech: Mechanism, sys_: System, x: NDArray[np.float64], mu: float, direction: Direction
) -> tuple[BandResult, ...]:
    """Every band from its solved slack tension."""
    bands = {b.name: b for b in mech.bands}
    return tuple(_band_result(bands[o.name], float(x[j]), mu, direction) for j, o in sys_.columns(ColumnKind.BAND))


def _spring_results(mech: Mechanism) -> tuple[SpringResult, ...]:
    """Every spring's force and its pull or push on each end."""
    return tuple(
        SpringResult(
            sp.name,
            sp.force_N or 0.0,
            "tension" if sp.tension else "compression",
            tuple(SpringEnd(sp.parts[k], sp.ends[k], sp.force_on(k)) for k in (0, 1)),
        )
        for sp in mech.springs
    )


def _case_findings(
    mech: Mechanism,
    shoes: tuple[ShoeResult, ...],
    bands: tuple[BandResult, ...],
    loads: tuple[LoadResult, ...],
    mu: float,
    mu_c: float | None,
    direction: Direction,
) -> list[Finding]:
    """The case's own findings: self-locking at ``mu`` ≥ the limit ``mu_c``;
    else bands that would push and shoes that would pull on the drum."""
    if mu_c is not None and mu >= mu_c:
        return [
            Finding(
                Code.SELF_LOCKING,
                f"{direction}: the brake self-locks at μ = {mu:g} (critical μ = {mu_c:.4g}): the drum drags "
                "the shoes on with no effort, and the effort would have to pull them off",
            )
        ]
    fmax = max(
        [abs(s.normal_N) for s in shoes]
        + [abs(b.tight_N) for b in bands]
        + [ld.force_N for ld in loads]
        + [TINY_FORCE_N]
    )
    return _slack_bands(mech, bands, fmax, direction) + _lifting_shoes(mech, shoes, fmax, direction)


def _slack_bands(mech: Mechanism, bands: tuple[BandResult, ...], fmax: float, direction: Direction) -> list[Finding]:
    """Bands whose slack tension is negative beyond round-off of ``fmax`` [N]."""
    by_name = {b.name: b for b in mech.bands}
    return [
        Finding(
            Code.BAND_SLACK,
            f"{direction}: {br.name} would have to push (tension {br.slack_N:.4g} N): under these "
            "loads the band goes slack",
            tuple(s.ref for s in by_name[br.name].sources),
            tuple(s.layer for s in by_name[br.name].sources),
        )
        for br in bands
        if br.slack_N < -LIFT_RTOL * fmax
    ]


def _lifting_shoes(mech: Mechanism, shoes: tuple[ShoeResult, ...], fmax: float, direction: Direction) -> list[Finding]:
    """Shoes whose normal force is negative beyond round-off of ``fmax``
    [N], the first with a hint when every shoe lifts while springs set the
    brake."""
    lifts = [sr.normal_N < -LIFT_RTOL * fmax for sr in shoes]
    all_lift = bool(shoes) and all(lifts)
    spring_hint = (
        "; every shoe lifts while a spring sets the brake: is the spring's sense reversed? ('C' pushes its "
        "ends apart, 'T' pulls them together)"
        if all_lift and mech.springs
        else ""
    )
    by_name = {s.name: s for s in mech.shoes}
    return [
        Finding(
            Code.SHOE_LIFTS,
            f"{direction}: shoe {sr.name} would have to pull on the drum (normal force "
            f"{sr.normal_N:.4g} N): under these loads it lifts off" + (spring_hint if k == 0 else ""),
            (by_name[sr.name].arc.source.ref,),
            (by_name[sr.name].arc.source.layer,),
            sr.contact_mm,
        )
        for k, (sr, lift) in enumerate(zip(shoes, lifts, strict=True))
        if lift
    ]


def solve(
    mech: Mechanism,
    mu: float,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    options: ContactOptions = DEFAULT_OPTIONS,
) -> Solution:
    """Solve every requested drum direction.

    Raises
    ------
    SolveError
        As :func:`solve_case`.
    """
    cases = tuple(_beside_short(mech, solve_case(mech, mu, d, options), options) for d in directions)
    return _solution(mech, cases, options)


def _beside_short(mech: Mechanism, case: CaseSolution, options: ContactOptions) -> CaseSolution:
    """``case`` with the short-shoe torque of the same drawing beside it,
    where any of its shoes was solved by long-shoe theory."""
    if not any(ContactModelName(s.model).is_long for s in case.shoes):
        return case
    short = ContactOptions(ShoeModelChoice.SHORT, options.long_threshold_deg)
    try:
        # only its torque is kept: no force diagrams (a fifth of a solve)
        other = _solve_case(mech, case.mu, Direction(case.direction), short, False, strength=False)
    except SolveError:
        return case
    return replace(case, short_shoe_torque_Nm=other.torque_Nm)


def _solution(mech: Mechanism, cases: tuple[CaseSolution, ...], options: ContactOptions) -> Solution:
    findings = list(mech.findings)
    for c in cases:
        findings += [f for f in c.findings if f not in findings]
    return Solution(mechanism=mech, cases=cases, findings=tuple(findings), options=options)


def solve_for_torque(
    mech: Mechanism,
    torque_Nm: float,
    mu: float,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    options: ContactOptions = DEFAULT_OPTIONS,
) -> Solution:
    """The inverse question: the efforts that give ``torque_Nm`` [N·m] of
    braking torque in each direction, and the forces that result.

    For a given μ the statics is linear in the loads, so one solve with the
    drawing's loads (their ratios kept) gives the torque per unit of them,
    and a second at the exact scale gives the forces; no search.  Each case's
    ``effort_scale`` is the factor applied to the drawing's loads and springs.

    Raises
    ------
    SolveError
        As :func:`solve_case`, or when the loads give no positive torque in a
        direction (the brake would self-lock or the efforts release it).
    """
    if not math.isfinite(torque_Nm) or torque_Nm <= 0:
        raise SolveError(f"the required torque must be positive, got {torque_Nm:g} N·m")
    cases: list[CaseSolution] = []
    for d in directions:
        base = solve_case(mech, mu, d, options)
        if base.torque_Nm <= 0 or any(f.code is Code.SELF_LOCKING for f in base.findings):
            raise SolveError(
                f"{Direction(d)}: the drawing's efforts give {base.torque_Nm:.4g} N·m of braking torque "
                "(the brake self-locks or the efforts release it); no effort gives the required torque",
                path=mech.drawing.path,
            )
        k = torque_Nm / base.torque_Nm
        case = _beside_short(mech.scaled(k), solve_case(mech.scaled(k), mu, d, options), options)
        cases.append(replace(case, effort_scale=k))
    return _solution(mech.scaled(1.0), tuple(cases), options)
