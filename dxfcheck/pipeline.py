"""The whole solve pipeline in one call: drawing -> mechanism -> solution."""

from __future__ import annotations

import math
import os
from collections.abc import Mapping, Sequence
from dataclasses import replace
from pathlib import Path
from typing import TYPE_CHECKING, Any

from dxfcheck.core.config import Config, config_for_drawing
from dxfcheck.core.errors import ConfigError, MechanismError
from dxfcheck.core.findings import Severity, has_errors
from dxfcheck.infer.choice import infers_skeleton
from dxfcheck.mechanism import Mechanism, build_mechanism
from dxfcheck.read.drawing import Drawing, read_drawing
from dxfcheck.statics import Solution, solve, solve_for_torque
from dxfcheck.statics.contact import (
    DEFAULT_MU,
    LONG_SHOE_THRESHOLD_DEG,
    ContactOptions,
    Direction,
    ShoeModelChoice,
    contact_options,
)

if TYPE_CHECKING:
    from dxfcheck.gate.rules import Judgement
    from dxfcheck.gate.spec import Spec
    from dxfcheck.statics.sampling import SensitivityResult

__all__ = [
    "DEFAULT_MU",
    "analyse",
    "check",
    "contact_options",
    "read_mechanism",
    "read_skeleton",
    "resolve_config",
    "sensitivity",
]

_UNIT_LOAD_N = 1.0  # [N] a load without a magnitude, when solving for a torque


def _mechanism(
    drawing: Drawing,
    path: str | os.PathLike[str],
    *,
    tolerance_mm: float | None,
    effort_N: float | None,
    default_magnitude_N: float | None = None,
) -> Mechanism:
    """Build the mechanism, or raise :class:`MechanismError` with every error
    finding."""
    from dxfcheck.mechanism.plausibility import check_mechanism

    mech = build_mechanism(
        drawing, tolerance_mm=tolerance_mm, effort_N=effort_N, default_magnitude_N=default_magnitude_N
    )
    mech = replace(mech, findings=(*mech.findings, *check_mechanism(mech)))  # sizes against real brakes
    if has_errors(list(mech.findings)):
        errors = [f for f in mech.findings if f.severity is Severity.ERROR]
        warnings = [f for f in mech.findings if f.severity is Severity.WARNING]  # they may explain the errors
        raise MechanismError(
            f"no mechanism can be built ({len(errors)} error{'s' if len(errors) > 1 else ''} in the drawing)",
            path=str(path),
            findings=[*errors, *warnings],
        )
    return mech


def read_skeleton(
    path: str | os.PathLike[str], config: Config, *, units: str | None = None, max_bytes: int | None = None
) -> Drawing:
    """Read a drawing; its skeleton from the role layers, or inferred from
    the geometry when they hold none (``config.infer.skeleton_from``:
    :func:`dxfcheck.infer.skeleton.skeleton_drawing`, loaded only then)."""
    drawing = read_drawing(path, config, units=units, max_bytes=max_bytes)
    if not infers_skeleton(drawing, config):
        return drawing
    from dxfcheck.infer.skeleton import skeleton_drawing

    return skeleton_drawing(drawing, config, max_bytes=max_bytes)


def read_mechanism(
    path: str | os.PathLike[str],
    *,
    config: str | os.PathLike[str] | Config | None = None,
    units: str | None = None,
    tolerance_mm: float | None = None,
    max_bytes: int | None = None,
) -> Mechanism:
    """The mechanism a drawing shows, with its findings, errors included
    (nothing is solved): what ``dxfcheck skeleton`` writes."""
    drawing = read_skeleton(path, resolve_config(path, config), units=units, max_bytes=max_bytes)
    return build_mechanism(drawing, tolerance_mm=tolerance_mm)


def resolve_config(drawing: str | os.PathLike[str], config: str | os.PathLike[str] | Config | None) -> Config:
    """The project configuration for a drawing: ``config`` if given (a
    :class:`Config` or a path), else the nearest ``dxfcheck.toml``; with the
    drawing's own ``NAME.toml`` applied over a path or the found file
    (:func:`dxfcheck.core.config.config_for_drawing`)."""
    if isinstance(config, Config):
        return config
    return config_for_drawing(Path(drawing), None if config is None else Path(config))


def analyse(
    path: str | os.PathLike[str],
    *,
    mu: float = DEFAULT_MU,
    effort_N: float | None = None,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    config: str | os.PathLike[str] | Config | None = None,
    units: str | None = None,
    tolerance_mm: float | None = None,
    shoe_model: ShoeModelChoice | str = ShoeModelChoice.AUTO,
    long_threshold_deg: float = LONG_SHOE_THRESHOLD_DEG,
    torque_Nm: float | None = None,
    max_bytes: int | None = None,
) -> Solution:
    """Read a brake drawing, infer its mechanism and solve its statics.

    Parameters
    ----------
    path : path-like
        The DXF drawing (only read).
    mu : float
        Lining-drum friction coefficient [-].
    effort_N : float, optional
        Magnitude of every load [N], instead of the texts on the load layer.
    directions : sequence of Direction or str
        Drum directions to solve, as seen in the drawing.
    config : path-like or Config, optional
        Project file; default: the nearest ``dxfcheck.toml``.
    units : str, optional
        Override the drawing unit.
    tolerance_mm : float, optional
        "Lies on" tolerance [mm].
    shoe_model : str
        ``short``, ``long`` or ``auto`` (long-shoe theory above
        ``long_threshold_deg`` of contact).
    long_threshold_deg : float
        [degrees].
    max_bytes : int, optional
        Refuse larger files [bytes] (default 200 MB).
    torque_Nm : float, optional
        The inverse question: scale the drawing's loads and springs (their
        ratios kept; a load without a magnitude counts as 1 N) to give this
        braking torque [N·m] in each direction.

    Returns
    -------
    Solution

    Raises
    ------
    DrawingReadError, ConfigError, MechanismError, SolveError
        Each carries the findings that explain it.
    """
    drawing = read_skeleton(path, resolve_config(path, config), units=units, max_bytes=max_bytes)
    unit_load = _UNIT_LOAD_N if torque_Nm is not None else None
    mech = _mechanism(drawing, path, tolerance_mm=tolerance_mm, effort_N=effort_N, default_magnitude_N=unit_load)
    options = contact_options(shoe_model, long_threshold_deg)
    return _plausible(_solve(mech, mu, directions, options, torque_Nm))


def _solve(
    mech: Mechanism,
    mu: float,
    directions: Sequence[Direction | str],
    options: ContactOptions,
    torque_Nm: float | None,
) -> Solution:
    """The statics for the drawing's loads, or (``torque_Nm`` given) with
    the loads and springs scaled to give that braking torque [N·m]."""
    if torque_Nm is not None:
        return solve_for_torque(mech, torque_Nm, mu, directions, options)
    return solve(mech, mu, directions, options)


def _plausible(sol: Solution) -> Solution:
    """``sol`` with the findings of the loads as used, judged against real
    brakes (:func:`dxfcheck.mechanism.plausibility.check_solution`)."""
    from dxfcheck.mechanism.plausibility import check_solution

    return replace(sol, findings=(*sol.findings, *check_solution(sol)))


def check(
    path: str | os.PathLike[str],
    *,
    config: str | os.PathLike[str] | Config | None = None,
    spec: Mapping[str, Any] | None = None,
    overrides: Sequence[tuple[str, str]] = (),
    units: str | None = None,
    tolerance_mm: float | None = None,
    max_bytes: int | None = None,
) -> Judgement:
    """Solve a drawing and judge it against its spec (the release gate).

    Parameters
    ----------
    path : path-like
        The DXF drawing (only read).
    config : path-like or Config, optional
        Project file; default: the nearest ``dxfcheck.toml``.
    spec : mapping, optional
        Typed spec values, above the project file and the sidecar (source
        ``Python call``): ``{"required_torque": (450, "N*m"), "mu": 0.35,
        "directions": (Direction.CW,), "pins": {"A": {"pin_diameter":
        (20, "mm")}}}``; a quantity is ``(number, "unit")``, a
        :class:`~dxfcheck.core.units.Quantity` or a text with its unit.
    overrides : sequence of (str, str)
        ``KEY=VALUE`` texts as the command line gives them (``--set``),
        highest precedence.
    units, tolerance_mm
        As for :func:`analyse`.

    Returns
    -------
    Judgement

    Raises
    ------
    DrawingReadError, ConfigError, MechanismError, SolveError
    """
    from dxfcheck.gate.release import with_release
    from dxfcheck.gate.rules import judge
    from dxfcheck.gate.spec import load_spec
    from dxfcheck.gate.strength import with_strength

    cfg = resolve_config(path, config)
    drawing = read_skeleton(path, cfg, units=units, max_bytes=max_bytes)
    judged_spec = load_spec(
        path,
        project=cfg.spec,
        project_path=cfg.path,
        custom_properties=drawing.custom_properties,
        given=spec,
        overrides=overrides,
    )
    drawing = _spec_units(drawing, judged_spec, path, cfg, units=units, max_bytes=max_bytes)
    effort = judged_spec.num("effort")
    mech = _mechanism(drawing, path, tolerance_mm=tolerance_mm, effort_N=effort)
    return with_strength(with_release(judge(mech, judged_spec)))


def _spec_units(
    drawing: Drawing,
    spec: Spec,
    path: str | os.PathLike[str],
    cfg: Config,
    *,
    units: str | None,
    max_bytes: int | None,
) -> Drawing:
    """The drawing in the spec's ``units`` (source ``spec``) when the spec
    names one and ``--units`` does not; a header that agrees is kept."""
    from dxfcheck.core.units import length_unit_factor

    named = spec.get("units")
    if units is not None or named is None:
        return drawing
    unit = str(named.value)
    if drawing.units_source == "$INSUNITS" and math.isclose(length_unit_factor(unit), drawing.mm_per_unit):
        return drawing
    return replace(read_skeleton(path, cfg, units=unit, max_bytes=max_bytes), units_source="spec")


def sensitivity(
    path: str | os.PathLike[str],
    *,
    mu_range: tuple[float, float],
    samples: int,
    pin_tolerance_mm: float = 0.0,
    seed: int = 0,
    directions: Sequence[Direction | str] = (Direction.CW, Direction.CCW),
    config: str | os.PathLike[str] | Config | None = None,
    units: str | None = None,
    tolerance_mm: float | None = None,
    shoe_model: ShoeModelChoice | str = ShoeModelChoice.AUTO,
    long_threshold_deg: float = LONG_SHOE_THRESHOLD_DEG,
    effort_N: float | None = None,
    required_torque_Nm: float | None = None,
    max_bytes: int | None = None,
    spring_tolerance: float = 0.0,
) -> SensitivityResult:
    """Sample μ over ``mu_range``, every pin within ``pin_tolerance_mm``
    [mm] and every spring's force within ± ``spring_tolerance`` (a
    fraction); see :func:`dxfcheck.statics.sampling.sample_design`."""
    from dxfcheck.statics.sampling import sample_design

    cfg = resolve_config(path, config)
    drawing = read_skeleton(path, cfg, units=units, max_bytes=max_bytes)
    mech = _mechanism(drawing, path, tolerance_mm=tolerance_mm, effort_N=effort_N)
    options = contact_options(shoe_model, long_threshold_deg)
    from dxfcheck.core.findings import Code

    for mu in sorted(set(mu_range)):  # diagnose the linkage first (free motions, redundancy, contact)
        nominal = solve(mech, mu, directions, options)
        if any(f.code is Code.PARTIAL_CONTACT for f in nominal.findings):
            raise ConfigError(
                f"a long pivoted shoe is in partial contact at μ = {mu:g}; sampling assumes full contact",
                path=str(path),
            )
    return sample_design(
        mech,
        mu_range,
        samples,
        pin_tolerance_mm=pin_tolerance_mm,
        seed=seed,
        directions=directions,
        options=options,
        required_torque_Nm=required_torque_Nm,
        spring_tolerance=spring_tolerance,
    )
