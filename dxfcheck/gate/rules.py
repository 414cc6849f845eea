"""The release gate: judge solved cases against the brake's spec.

Each rule turns the statics and the spec into a :class:`RuleResult` with a
verdict (pass, warn, fail, or skip when its inputs are missing), the computed
value, the limit, the margin as a ratio (capacity over demand: 1 or more
passes) and the published method it uses.

Friction is taken over its range: the torque rules at ``mu_min`` (the least
torque), the self-locking rule at ``mu_max``, and the strength rules (lining,
pins, members) over the envelope of ``mu_min``, ``mu`` and ``mu_max`` in both
drum directions.

References
----------
.. [1] R. G. Budynas and J. K. Nisbett, *Shigley's Mechanical Engineering
   Design*, 10th ed., McGraw-Hill, 2015: ch. 3 (direct shear τ = F/A,
   bearing stress), §4-11 (Euler columns P_cr = π²EI/l_e²), ch. 16
   (brakes: lining pressure, pV, self-energising shoes); section numbers
   from memory.
.. [2] OSHA 29 CFR 1910.179(f)(2): holding brakes of hoist motors, 125 % of
   the full-load hoisting torque with non-mechanical control braking, 100 %
   with mechanical control braking, 100 % each with two holding brakes
   (sub-item numbering from memory).
.. [3] M. J. Neale (ed.), *Tribology Handbook*, section B8: lining pressures
   and the pV limits of drum brakes.
"""

from __future__ import annotations

import difflib
import math
from collections.abc import Iterable
from dataclasses import replace
from typing import Any

from dxfcheck.core.errors import ConfigError
from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.records import record
from dxfcheck.core.units import length_unit_factor
from dxfcheck.gate.duty import SRC_STOP, heat_rules, rubbing_speed, stop_of
from dxfcheck.gate.spec import Spec, SpecValue
from dxfcheck.gate.verdicts import RuleResult, Verdict
from dxfcheck.gate.verdicts import missing as _missing
from dxfcheck.gate.verdicts import ratio_rule as _ratio_rule
from dxfcheck.gate.verdicts import skip as _skip
from dxfcheck.mechanism import Band, Mechanism
from dxfcheck.mechanism.plausibility import (
    DRUM_DIAMETER_MM,
    check_mechanism,
    check_rules,
    check_solution,
    drum_diameter,
    how_read,
    plausible_units,
)
from dxfcheck.statics import BandResult, CaseSolution, Solution, critical_mu, solve
from dxfcheck.statics.contact import DEFAULT_MU, LONG_SHOE_THRESHOLD_DEG, ContactOptions, Direction, contact_options

__all__ = ["Duty", "Judgement", "RuleResult", "Verdict", "check_subjects", "duties", "hoist_factor", "judge"]


@record(frozen=True)
class Judgement:
    """The release gate's result for one drawing."""

    mechanism: Mechanism
    spec: Spec
    nominal: Solution
    solutions: dict[float, Solution]
    rules: tuple[RuleResult, ...]
    mu: float
    mu_min: float
    mu_max: float

    @property
    def verdict(self) -> Verdict:
        verdicts = {r.verdict for r in self.rules}
        if Verdict.FAIL in verdicts:
            return Verdict.FAIL
        if Verdict.WARN in verdicts:
            return Verdict.WARN
        return Verdict.PASS

    def counts(self) -> dict[str, int]:
        out = {v.value: 0 for v in Verdict}
        for r in self.rules:
            out[r.verdict.value] += 1
        return out


#: Relative torque difference treated as none (round-off) [-].
ASYMMETRY_ZERO = 1e-12

SRC_SHEAR = "direct shear τ = F/(n·πd²/4) (Shigley's MED 10th ed., ch. 3; section from memory)"
SRC_BEARING = "projected-area bearing pressure p = F/(d·L) (Shigley's MED 10th ed., ch. 3; from memory)"
SRC_EULER = "Euler column P_cr = π²EI/(KL)², I = πd⁴/64 (Shigley's MED 10th ed., §4-11; section from memory)"
SRC_STRESS = "axial stress σ = F/A"
SRC_LINING = "short shoe, uniform pressure on the projected area p = N/(b·2r·sin(θ/2)) (Shigley's MED 10th ed., ch. 16)"
SRC_LONG_LINING = (
    "long shoe: peak of the integrated pressure law (hinged p = pa·sinθ/sinθa, pivoted p = p0·cos(φ − ψ)), "
    "Shigley's MED 10th ed., §16-3, 16-4"
)
SRC_BAND = "band: p_max = T1/(b·r) at the tight end, T1/T2 = e^(μθ) (Mott 4th ed., §22-15)"
SRC_EFFORT = "effort ∝ torque at a given μ (linear statics): effort needed = effort × required / torque"
SRC_PV = (
    "pV = p·v, v = πDn/60, or its mean v/2 over a stated stop "
    "(drum-brake pV limits: Tribology Handbook B8; 1-3 MPa·m/s common practice)"
)
SRC_TORQUE = "braking torque T = Σ μN·r at mu_min against the duty"
SRC_MOTOR = "duty from the motor: T = factor·P/ω, ω = 2πn/60"
SRC_HOIST = "OSHA 29 CFR 1910.179(f)(2): holding brake ≥ 125 % / 100 % of full-load hoisting torque"
SRC_SELF_LOCK = "critical μ where the equilibrium equations turn singular (self-locking limit) vs mu_max × margin"
SRC_UNITS = (
    "units from $INSUNITS, --units or the spec key units; drum Ø within the range of industrial drum brakes "
    "(dxfcheck.mechanism.plausibility.DRUM_DIAMETER_MM: DIN 15435 series widened, from memory / common practice)"
)
SRC_ASYM = "torque difference between drum directions (the weaker direction sets the holding duty)"


def hoist_factor(control_braking: str | None, holding_brakes: float | None) -> tuple[float, str]:
    """Holding-brake torque as a multiple of the full-load hoisting torque,
    after OSHA 29 CFR 1910.179(f)(2) (sub-item numbers from memory)."""
    if holding_brakes is not None and holding_brakes >= 2:
        return 1.0, "100 % each: two holding brakes"
    if control_braking == "mechanical":
        return 1.0, "100 %: mechanical control braking"
    if control_braking is None:
        return 1.25, "125 %: control braking not stated, taken as non-mechanical"
    return 1.25, "125 %: control braking other than mechanical"


def _g(x: float | None) -> str:
    """A number as the formulas show it (4 significant figures)."""
    return "?" if x is None else f"{x:.4g}"


def _valid_cases(solutions: dict[float, Solution]) -> list[CaseSolution]:
    """Cases whose forces mean something: no self-locking, no lift-off."""
    out = []
    for sol in solutions.values():
        for c in sol.cases:
            if not any(f.code in (Code.SELF_LOCKING, Code.SHOE_LIFTS) for f in c.findings):
                out.append(c)
    return out


def _where(c: CaseSolution) -> str:
    return f"{c.direction} at μ = {c.mu:g}"


def judge(mech: Mechanism, spec: Spec) -> Judgement:
    """Run every rule whose inputs are present.

    Raises
    ------
    ConfigError
        When the friction range is inconsistent.
    SolveError
        As :func:`dxfcheck.statics.solver`.
    """
    mu_v = spec.num("mu")
    mu = DEFAULT_MU if mu_v is None else mu_v
    mu_min = spec.num("mu_min")
    mu_max = spec.num("mu_max")
    mu_min = mu if mu_min is None else mu_min
    mu_max = mu if mu_max is None else mu_max
    if not mu_min <= mu <= mu_max:
        raise ConfigError(f"friction range must satisfy mu_min ≤ mu ≤ mu_max, got {mu_min:g}, {mu:g}, {mu_max:g}")
    try:  # a stop whose time and deceleration disagree is refused before any solve
        stop_of(spec, None if mech.drum is None else mech.drum.radius_mm)
    except ConfigError as exc:
        raise ConfigError(exc.message, path=mech.drawing.path) from None
    both = (Direction.CW, Direction.CCW)
    sm = spec.get("shoe_model")
    options = contact_options(
        "auto" if sm is None else str(sm.value), spec.num("long_shoe_threshold") or LONG_SHOE_THRESHOLD_DEG
    )
    solutions = {m: solve(mech, m, both, options) for m in sorted({mu_min, mu, mu_max})}
    nominal = solutions[mu]
    check_subjects(spec, mech, [m.name for m in nominal.cases[0].members] if nominal.cases else [])
    dirs_v = spec.get("directions")
    required = tuple(Direction(d) for d in (dirs_v.value if dirs_v else ("cw", "ccw")))
    rules: list[RuleResult] = []
    rules += _duty(spec, solutions[mu_min], required, mu_min)
    rules += _self_lock(spec, mech, mu_max, options)
    rules += _asymmetry(spec, nominal)
    valid = _valid_cases(solutions)
    rules += _shoe_contact(mech, solutions)
    rules += _lining(spec, mech, valid)
    rules += _bands(spec, mech, solutions, valid)
    rules += _pins(spec, mech, valid)
    rules += _members(spec, mech, valid)
    rules += heat_rules(spec, None if mech.drum is None else mech.drum.radius_mm)
    nominal = replace(nominal, findings=(*nominal.findings, *_implausible(mech, nominal, rules)))
    solutions[mu] = nominal
    head = _hygiene([f for sol in solutions.values() for f in sol.findings]) + _units(mech, spec)
    return Judgement(mech, spec, nominal, solutions, tuple(head + rules), mu, mu_min, mu_max)


def check_subjects(spec: Spec, mech: Mechanism, members: Iterable[str]) -> None:
    """Refuse per-pin and per-member spec values whose pin or member the
    drawing does not have (a value meant for it would otherwise be dropped
    and its rule judged on the general value, or skipped).

    Raises
    ------
    ConfigError
        Naming, for each such value, its source and key, the unknown name,
        the names that exist, and a close match when there is one.
    """
    pins = [p.name for p in mech.pins]
    member_names = list(members)
    problems: list[str] = []
    for name, values in spec.pins.items():
        if name not in pins:
            problems.append(_unknown_subject("pin", name, values, pins, "pins"))
    for name, values in spec.members.items():
        if name not in member_names:
            why = ""
            if name in {p.name for p in mech.parts}:
                why = (
                    f" ('{name}' is a part, but not a two-force member: a rod with forces at its two ends only, "
                    "two pins or a pin and a spring)"
                )
            problems.append(_unknown_subject("two-force member", name, values, member_names, "members", why))
    if problems:
        raise ConfigError("; ".join(problems), path=mech.drawing.path)


def _unknown_subject(
    what: str, name: str, values: dict[str, SpecValue], known: list[str], table: str, why: str = ""
) -> str:
    entries = ", ".join(f"{table}.{name}.{v.key} from {v.source}" for v in values.values())
    close = difflib.get_close_matches(name, known, n=1) or [k for k in known if k.lower() == name.lower()]
    hint = f"; did you mean {close[0]!r}?" if close else ""
    have = ", ".join(repr(k) for k in known) if known else "none"
    return (
        f"the spec names {what} {name!r}, which the drawing does not have{why}: {entries}; "
        f"the drawing's {what}s are {have}{hint}"
    )


def _implausible(mech: Mechanism, nominal: Solution, rules: list[RuleResult]) -> list[Finding]:
    """Plausibility findings not yet in the nominal solution: the sizes (when
    the mechanism came without them), the loads, pressures and margins."""
    found = [*check_mechanism(mech), *check_solution(nominal), *check_rules(mech, rules)]
    return [f for f in dict.fromkeys(found) if f not in nominal.findings]


def _units(mech: Mechanism, spec: Spec) -> list[RuleResult]:
    """The drawing's unit is confirmed or plausible.

    Fails while the unit is assumed (D101: ``$INSUNITS`` unset) or the drum
    read in it is implausible (D110), until ``--units`` or the spec key
    ``units`` confirms it; warns when a confirmed unit still gives an
    implausible drum.  A plausible ``$INSUNITS`` passes.
    """
    d = mech.drawing
    named = spec.get("units")
    spec_unit = None if named is None else str(named.value)
    spec_agrees = spec_unit is not None and math.isclose(length_unit_factor(spec_unit), d.mm_per_unit)
    confirmed = d.units_source in ("option", "spec") or spec_agrees
    assumed = d.units_source in ("$MEASUREMENT", "default")
    drum_d = 2.0 * mech.drum.radius_mm if mech.drum is not None else None
    bad = drum_diameter(mech)
    inputs: dict[str, Any] = {
        "units": d.units,
        "units_source": d.units_source,
        "mm_per_unit": d.mm_per_unit,
        "drum_diameter_mm": drum_d,
        "plausible_drum_mm": list(DRUM_DIAMETER_MM),
        "spec_units": spec_unit,
    }
    if drum_d is not None:
        inputs["plausible_units"] = [u for u, _ in plausible_units(drum_d / d.mm_per_unit)]
    if bad and confirmed:
        verdict, msg = Verdict.WARN, f"{d.units} confirmed ({how_read(d)}) but {bad[0].message}"
    elif bad:
        verdict, msg = Verdict.FAIL, bad[0].message
    elif assumed and not confirmed:
        verdict, msg = Verdict.FAIL, _assumed_message(mech, drum_d)
    elif spec_unit is not None and not confirmed:
        verdict = Verdict.FAIL
        msg = (
            f"the spec says units = {spec_unit!r} but the drawing was read in {d.units} ({d.units_source}); "
            f"pass --units {spec_unit} or set $INSUNITS to match"
        )
    else:
        verdict = Verdict.PASS
        how = "confirmed" if confirmed else "plausible"
        size = f": drum Ø{drum_d:.4g} mm" if drum_d is not None else ""
        msg = f"{d.units} {how_read(d)}, {how}{size}"
    return [
        RuleResult(
            "drawing.units",
            "drawing units",
            verdict,
            drum_d,
            None,
            "mm",
            None,
            inputs,
            SRC_UNITS,
            msg,
            f"D_drum within {DRUM_DIAMETER_MM[0]:g} … {DRUM_DIAMETER_MM[1]:g} mm, unit confirmed or plausible",
            f"D_drum = {_g(drum_d)} mm read in {d.units} ({d.units_source})",
        )
    ]


def _assumed_message(mech: Mechanism, drum_d: float | None) -> str:
    d = mech.drawing
    why = "from $MEASUREMENT ($INSUNITS unset)" if d.units_source == "$MEASUREMENT" else "($INSUNITS unset)"
    size = ""
    if drum_d is not None:
        alts = [u for u, _ in plausible_units(drum_d / d.mm_per_unit)]
        size = f"; drum Ø{drum_d:.4g} mm as {d.units}; plausible as {' or '.join(alts) or 'no common unit'}"
    return (
        f"{d.units} assumed {why}{size}. Confirm the unit: --units, the spec key units "
        '(e.g. units = "mm"), or $INSUNITS in the drawing'
    )


def _hygiene(findings: list[Finding]) -> list[RuleResult]:
    """Warnings from reading, topology and the solves (contact off the
    lining, partial contact, ill-conditioning...), each counted once."""
    warnings = list(dict.fromkeys(f for f in findings if f.severity is Severity.WARNING))
    codes = sorted({f.code.id for f in warnings})
    verdict = Verdict.WARN if warnings else Verdict.PASS
    msg = f"{len(warnings)} warning finding(s): {', '.join(codes)}" if warnings else "no warnings in the drawing"
    return [
        RuleResult(
            "drawing.hygiene",
            "drawing hygiene",
            verdict,
            float(len(warnings)),
            0.0,
            "findings",
            None,
            {"codes": codes},
            "the drawing's findings and the solves' warnings (README, finding codes)",
            msg,
            "warning findings = 0",
            f"{len(warnings)} warning finding(s)",
        )
    ]


@record(frozen=True)
class Duty:
    """One braking-torque duty the spec sets.

    Attributes
    ----------
    name : str
        ``required_torque`` or ``motor duty``.
    torque_Nm : float
        The torque the brake must hold [N·m].
    source : str
        Where its spec values came from.
    basis : str
        How it was found, for the report.
    """

    name: str
    torque_Nm: float
    source: str
    basis: str


MOTOR_KEYS = ("motor_power", "motor_speed", "torque_factor")


def duties(spec: Spec, drum_radius_mm: float | None = None) -> tuple[list[Duty], list[str]]:
    """The duties the spec sets (``required_torque``, the stop duty
    T = E/θ of :mod:`dxfcheck.gate.duty`, the motor duty T = factor·P/ω)
    and the motor keys missing when the motor duty is incomplete (empty
    when it is complete or not asked for at all)."""
    out: list[Duty] = []
    req = spec.get("required_torque")
    if req is not None:
        out.append(Duty("required_torque", float(req.value), req.source, f"required_torque = {req.text}"))
    stop = stop_of(spec, drum_radius_mm)[0]
    if stop is not None and stop.torque_Nm is not None:
        out.append(Duty("stop duty", stop.torque_Nm, "; ".join(stop.sources), stop.basis()))
    miss = _missing(spec, MOTOR_KEYS)
    if miss and len(miss) < len(MOTOR_KEYS):
        return out, miss
    if not miss:
        p_w = spec.num("motor_power") or 0.0
        n_rpm = spec.num("motor_speed") or 0.0
        factor = spec.num("torque_factor") or 0.0
        omega = 2 * math.pi * n_rpm / 60.0
        need = factor * p_w / omega if omega > 0 else math.inf
        vals = [v for v in (spec.get(k) for k in MOTOR_KEYS) if v is not None]
        sources = "; ".join(dict.fromkeys(v.source for v in vals))
        texts = ", ".join(f"{v.key} = {v.text}" for v in vals)
        out.append(Duty("motor duty", need, sources, f"factor·P/ω from {texts}"))
    return out, []


def _duty_inputs(found: list[Duty], governing: Duty, mu_min: float, spec: Spec) -> dict[str, Any]:
    inputs: dict[str, Any] = {"mu_min": mu_min, "required_torque_Nm": governing.torque_Nm, "governs": governing.name}
    inputs["duties"] = [
        {"duty": d.name, "torque_Nm": d.torque_Nm, "source": d.source, "basis": d.basis, "governs": d is governing}
        for d in found
    ]
    if any(d.name == "motor duty" for d in found):
        inputs.update(
            motor_power_W=spec.num("motor_power"),
            motor_speed_rpm=spec.num("motor_speed"),
            torque_factor=spec.num("torque_factor"),
        )
    return inputs


def _duty_message(found: list[Duty], governing: Duty, miss: list[str]) -> str:
    """Every duty with its source and which governs; for a single complete
    duty empty (the inputs carry it), or the stop's energy and torque."""
    parts = []
    if len(found) > 1:
        head = f"{governing.name} {governing.torque_Nm:.4g} N·m ({governing.basis}; {governing.source}) governs"
        others = [
            f"{d.name} {d.torque_Nm:.4g} N·m ({d.basis}; {d.source}) is "
            + ("smaller" if d.torque_Nm < governing.torque_Nm else "equal")
            for d in found
            if d is not governing
        ]
        count = "two" if len(found) == 2 else str(len(found))
        parts.append(f"{count} duties, the larger governs: " + "; ".join([head, *others]))
    elif governing.name == "stop duty":
        parts.append(governing.basis)
    if miss:
        parts.append(f"motor duty not used: it needs {', '.join(miss)}")
    return "; ".join(parts)


def _duty(spec: Spec, sol_min: Solution, required: tuple[Direction, ...], mu_min: float) -> list[RuleResult]:
    """Braking torque at mu_min against the duty: the larger of
    ``required_torque`` and the motor duty when both are given."""
    out: list[RuleResult] = []
    radius_mm = None if sol_min.mechanism.drum is None else sol_min.mechanism.drum.radius_mm
    found, miss = duties(spec, radius_mm)
    if not found:
        why = f"motor duty needs {', '.join(miss)}" if miss else "no required_torque or motor duty in the spec"
        lacking = stop_of(spec, radius_mm)[1]
        if lacking:
            why += f"; the stop duty is incomplete (stop.duty: needs {', '.join(lacking)})"
        out += [_skip(f"torque.{d}", f"braking torque, {d}", why) for d in required]
    else:
        governing = max(found, key=lambda d: d.torque_Nm)
        need = governing.torque_Nm
        inputs = _duty_inputs(found, governing, mu_min, spec)
        message = _duty_message(found, governing, miss)
        methods = {"motor duty": SRC_MOTOR, "stop duty": SRC_STOP}
        if len(found) > 1:
            source = "the larger duty: " + "; ".join(dict.fromkeys(methods.get(d.name, SRC_TORQUE) for d in found))
        else:
            source = methods.get(governing.name, SRC_TORQUE)
        for d in required:
            c = sol_min.case(d)
            out += _effort_rule(c, need, governing.name, mu_min)
            out.append(
                _ratio_rule(
                    f"torque.{d}",
                    f"braking torque, {d}",
                    c.torque_Nm,
                    need,
                    "N*m",
                    source,
                    dict(inputs, direction=str(d)),
                    at_most=False,
                    message=message,
                    formula="T(μ_min) = Σ T_shoe + Σ (T1 − T2)·r ≥ T_req",
                    substituted=f"T = {_g(c.torque_Nm)} N·m at μ_min = {mu_min:g}, {d}; T_req = {_g(need)} N·m "
                    f"({governing.basis})",
                )
            )
    return out + _hoist(spec, sol_min, required, mu_min)


def _hoist(spec: Spec, sol_min: Solution, required: tuple[Direction, ...], mu_min: float) -> list[RuleResult]:
    """Braking torque at mu_min against the hoist holding torque times the
    factor its control braking and brake count call for (:data:`SRC_HOIST`)."""
    hoist = spec.num("hoist_torque")
    if hoist is None:
        return []
    cb = spec.get("control_braking")
    factor, why = hoist_factor(None if cb is None else str(cb.value), spec.num("holding_brakes"))
    out = []
    for d in required:
        c = sol_min.case(d)
        out.append(
            _ratio_rule(
                f"hoist.{d}",
                f"hoist holding torque, {d}",
                c.torque_Nm,
                factor * hoist,
                "N*m",
                SRC_HOIST,
                {"hoist_torque_Nm": hoist, "factor": factor, "basis": why, "mu_min": mu_min, "direction": str(d)},
                at_most=False,
                formula="T(μ_min) ≥ k·T_hoist",
                substituted=f"T = {_g(c.torque_Nm)} N·m at μ_min = {mu_min:g}; limit {factor:g} × {_g(hoist)} N·m "
                f"= {_g(factor * hoist)} N·m",
            )
        )
    return out


def _effort_rule(c: CaseSolution, need: float, duty: str, mu_min: float) -> list[RuleResult]:
    d = c.direction
    efforts = [(ld.name, ld.force_N) for ld in c.loads] + [(s.name, s.force_N) for s in c.springs]
    if not efforts or c.torque_Nm <= 0:
        return []
    name, available = efforts[0]
    needed = available * need / c.torque_Nm
    return [
        _ratio_rule(
            f"effort.{d}",
            f"effort margin, {d}",
            needed,
            available,
            "N",
            SRC_EFFORT,
            {"effort": name, "required_torque_Nm": need, "duty": duty, "torque_Nm": c.torque_Nm, "mu_min": mu_min},
            at_most=True,
            message=f"{name} needs {needed:.4g} N for the duty at mu_min",
            formula="F_needed = F·T_req/T(μ_min) ≤ F",
            substituted=f"F_needed = {_g(available)} N × {_g(need)} N·m / {_g(c.torque_Nm)} N·m = {_g(needed)} N"
            f"; limit {_g(available)} N",
        )
    ]


def _self_lock(spec: Spec, mech: Mechanism, mu_max: float, options: ContactOptions) -> list[RuleResult]:
    margin_req = spec.num("self_lock_margin") or 1.0
    out = []
    for d in (Direction.CW, Direction.CCW):
        mu_c = critical_mu(mech, d, options)
        limit = mu_max * margin_req
        inputs = {"mu_max": mu_max, "self_lock_margin": margin_req, "direction": str(d)}
        if mu_c is None:
            out.append(
                RuleResult(
                    f"self_lock.{d}",
                    f"self-locking, {d}",
                    Verdict.PASS,
                    None,
                    limit,
                    "",
                    None,
                    inputs,
                    SRC_SELF_LOCK,
                    "does not self-lock for μ below 1",
                    "μ_crit ≥ μ_max × margin",
                    f"no μ_crit below 1; limit {mu_max:g} × {margin_req:g} = {limit:.4g}",
                )
            )
            continue
        out.append(
            _ratio_rule(
                f"self_lock.{d}",
                f"self-locking, {d}",
                mu_c,
                limit,
                "",
                SRC_SELF_LOCK,
                inputs,
                at_most=False,
                message=f"self-locks at μ = {mu_c:.4g}",
                formula="μ_crit ≥ μ_max × margin",
                substituted=f"μ_crit = {mu_c:.4g}; limit {mu_max:g} × {margin_req:g} = {limit:.4g}",
            )
        )
    return out


def _asymmetry(spec: Spec, nominal: Solution) -> list[RuleResult]:
    t = [c.torque_Nm for c in nominal.cases]
    hi = max(t)
    limit = spec.num("torque_asymmetry_max") or 0.30
    if hi <= 0:
        return [_skip("torque.asymmetry", "torque asymmetry", "no positive braking torque", SRC_ASYM)]
    value = (max(t) - min(t)) / hi
    if value <= ASYMMETRY_ZERO:
        value = 0.0  # symmetric up to round-off
    margin = limit / value if value > 0 else math.inf
    verdict = Verdict.PASS if value <= limit else Verdict.WARN
    return [
        RuleResult(
            "torque.asymmetry",
            "torque asymmetry",
            verdict,
            value,
            limit,
            "",
            margin,
            {
                "torque_cw_Nm": nominal.case("cw").torque_Nm,
                "torque_ccw_Nm": nominal.case("ccw").torque_Nm,
                "mu": nominal.cases[0].mu,
            },
            SRC_ASYM,
            "",
            "(T_max − T_min)/T_max ≤ limit",
            f"({_g(max(t))} − {_g(min(t))}) N·m / {_g(hi)} N·m = {value:.4g}; limit {limit:g}",
        )
    ]


def _stays_positive(
    rule: str, title: str, value_N: float, case: CaseSolution, symbol: str, source: str, if_not: str
) -> RuleResult:
    """A force that can only push or only pull [N]: its least value over
    every case (``case``: where it is least) must stay above zero."""
    return RuleResult(
        rule,
        title,
        Verdict.PASS if value_N > 0 else Verdict.FAIL,
        value_N,
        0.0,
        "N",
        None,
        {"case": _where(case)},
        source,
        "" if value_N > 0 else if_not,
        f"{symbol} > 0 in every case",
        f"least {symbol} = {_g(value_N)} N ({_where(case)}); needs > 0",
    )


def _shoe_contact(mech: Mechanism, solutions: dict[float, Solution]) -> list[RuleResult]:
    """Each shoe presses on the drum in every case: its least normal force is positive."""
    cases = [c for sol in solutions.values() for c in sol.cases]
    out = []
    for s in mech.shoes:
        worst = min(cases, key=lambda c: c.shoe(s.name).normal_N)
        out.append(
            _stays_positive(
                f"shoe.contact.{s.name}",
                f"shoe {s.name} presses on the drum",
                worst.shoe(s.name).normal_N,
                worst,
                "N",
                "normal force must be positive (a shoe cannot pull on the drum)",
                "the shoe lifts off or the brake self-locks in this case",
            )
        )
    return out


def _lining(spec: Spec, mech: Mechanism, cases: list[CaseSolution]) -> list[RuleResult]:
    out: list[RuleResult] = []
    drum = mech.drum
    if drum is None:
        return out
    b = spec.num("lining_width")
    for s in mech.shoes:
        rule = f"lining.pressure.{s.name}"
        title = f"lining pressure, {s.name}"
        if not cases:
            out.append(_skip(rule, title, "no case with every shoe pressing on the drum", SRC_LINING))
            continue
        worst = max(cases, key=lambda c: c.shoe(s.name).peak_line_load_N_per_mm)
        sr = worst.shoe(s.name)
        source = SRC_LINING if sr.model.startswith("short") else SRC_LONG_LINING
        miss = _missing(spec, ("lining_width", "lining_pressure_max"))
        p = sr.peak_line_load_N_per_mm / b if b else None
        if miss:
            out.append(_skip(rule, title, f"needs {', '.join(miss)}", source))
        else:
            assert p is not None
            inputs = {
                "model": sr.model,
                "normal_N": sr.normal_N,
                "peak_line_load_N_per_mm": sr.peak_line_load_N_per_mm,
                "peak_at_deg": sr.peak_at_deg,
                "lining_width_mm": b,
                "case": _where(worst),
            }
            limit = spec.num("lining_pressure_max") or 0.0
            out.append(
                _ratio_rule(
                    rule,
                    title,
                    p,
                    limit,
                    "MPa",
                    source,
                    inputs,
                    at_most=True,
                    formula="p = q_peak/b ≤ p_allow",
                    substituted=f"p = {_g(sr.peak_line_load_N_per_mm)} N/mm / {_g(b)} mm = {_g(p)} MPa"
                    f"; limit {_g(limit)} MPa ({_where(worst)})",
                )
            )
        out.append(_lining_pv(spec, s.name, 2 * drum.radius_mm, p, worst))
    return out


def _lining_pv(spec: Spec, shoe: str, drum_d: float, p: float | None, worst: CaseSolution) -> RuleResult:
    """pV of a shoe's lining (MPa·m/s) for the drum Ø ``drum_d`` [mm], at the
    rubbing speed :func:`~dxfcheck.gate.duty.rubbing_speed` gives (the drum
    speed πDn/60, or its mean over a stated stop). Source: :data:`SRC_PV`."""
    rule, title = f"lining.pv.{shoe}", f"pV, {shoe}"
    miss = _missing(spec, ("lining_width", "drum_speed", "pv_max"))
    if miss or p is None:
        return _skip(rule, title, f"needs {', '.join(miss)}", SRC_PV)
    n_rpm = spec.num("drum_speed") or 0.0
    v, v_basis = rubbing_speed(spec, drum_d / 2)
    return _ratio_rule(
        rule,
        title,
        p * v,
        spec.num("pv_max") or 0.0,
        "MPa*m/s",
        SRC_PV,
        {"pressure_MPa": p, "rubbing_speed_m_s": v, "drum_speed_rpm": n_rpm, "case": _where(worst)},
        at_most=True,
        message=f"rubbing speed {v:.4g} m/s: {v_basis}",
        formula="pV = p·v ≤ pV_allow",
        substituted=f"pV = {_g(p)} MPa × {_g(v)} m/s ({v_basis}; π × {_g(drum_d)} mm × {n_rpm:g} rpm / 60 = "
        f"{_g(math.pi * drum_d * n_rpm / 60000.0)} m/s) = {_g(p * v)} MPa·m/s; limit {_g(spec.num('pv_max'))} MPa·m/s",
    )


def _band_result(c: CaseSolution, name: str) -> BandResult:
    """The solved forces of band ``name`` in case ``c``."""
    return next(x for x in c.bands if x.name == name)


def _band_taut(band: Band, every: list[CaseSolution]) -> RuleResult:
    """The band stays taut: the least slack-side tension (N) over every case is positive.

    Source: a band can only pull (common practice).
    """
    worst = min(every, key=lambda c: _band_result(c, band.name).slack_N)
    return _stays_positive(
        f"band.taut.{band.name}",
        f"band {band.name} stays taut",
        _band_result(worst, band.name).slack_N,
        worst,
        "T2",
        "a band can only pull: slack-side tension must be positive",
        "the band goes slack or the brake self-locks in this case",
    )


def _band_pv(spec: Spec, band: Band, p: float, top: CaseSolution) -> list[RuleResult]:
    """pV of the band against ``pv_max``, rubbing speed v = π·2r·n/60 (m/s); none unless both are given.

    Source: :data:`SRC_PV` (Tribology Handbook B8; common practice).
    """
    if spec.get("drum_speed") is None or spec.get("pv_max") is None:
        return []
    v, v_basis = rubbing_speed(spec, band.radius_mm)
    return [
        _ratio_rule(
            f"band.pv.{band.name}",
            f"pV, {band.name}",
            p * v,
            spec.num("pv_max") or 0.0,
            "MPa*m/s",
            SRC_PV,
            {"pressure_MPa": p, "rubbing_speed_m_s": v, "case": _where(top)},
            at_most=True,
            message=f"rubbing speed {v:.4g} m/s: {v_basis}",
            formula="pV = p·v ≤ pV_allow",
            substituted=f"pV = {_g(p)} MPa × {_g(v)} m/s = {_g(p * v)} MPa·m/s; limit {_g(spec.num('pv_max'))} MPa·m/s",
        )
    ]


def _band_pressure(spec: Spec, band: Band, cases: list[CaseSolution]) -> list[RuleResult]:
    """Band pressure at the tight end p = T1/(b·r) (MPa) against ``lining_pressure_max``, then its pV.

    Taken in the case with the greatest tight-side tension among ``cases``
    (every band taut). Source: :data:`SRC_BAND` (Mott 4th ed., §22-15).
    """
    rule, title = f"band.pressure.{band.name}", f"band pressure, {band.name}"
    if not cases:
        return [_skip(rule, title, "no case with every band taut", SRC_BAND)]
    top = max(cases, key=lambda c: _band_result(c, band.name).tight_N)
    br = _band_result(top, band.name)
    miss = _missing(spec, ("lining_width", "lining_pressure_max"))
    if miss:
        return [_skip(rule, title, f"needs {', '.join(miss)} (the band's width)", SRC_BAND)]
    b = spec.num("lining_width")
    assert b is not None
    p = br.peak_line_load_N_per_mm / b
    pressure = _ratio_rule(
        rule,
        title,
        p,
        spec.num("lining_pressure_max") or 0.0,
        "MPa",
        SRC_BAND,
        {"tight_N": br.tight_N, "radius_mm": band.radius_mm, "width_mm": b, "case": _where(top)},
        at_most=True,
        formula="p = T1/(b·r) ≤ p_allow",
        substituted=f"p = {_g(br.tight_N)} N / ({_g(b)} mm × {_g(band.radius_mm)} mm) = {_g(p)} MPa"
        f"; limit {_g(spec.num('lining_pressure_max'))} MPa ({_where(top)})",
    )
    return [pressure, *_band_pv(spec, band, p, top)]


def _bands(
    spec: Spec, mech: Mechanism, solutions: dict[float, Solution], cases: list[CaseSolution]
) -> list[RuleResult]:
    """Per band: taut over every solved case; pressure p = T1/(b·r) and pV over ``cases``."""
    out: list[RuleResult] = []
    every = [c for sol in solutions.values() for c in sol.cases]
    for band in mech.bands:
        out.append(_band_taut(band, every))
        out += _band_pressure(spec, band, cases)
    return out


def _pins(spec: Spec, mech: Mechanism, cases: list[CaseSolution]) -> list[RuleResult]:
    out: list[RuleResult] = []
    for pin in mech.pins:
        if not cases:
            break
        worst = max(cases, key=lambda c: c.pin(pin.name).max_force_N)
        f = worst.pin(pin.name).max_force_N
        d = pin.diameter_mm
        planes = spec.num("pin_shear_planes", pin.name) or 1.0
        rule, title = f"pin.shear.{pin.name}", f"pin shear, {pin.name}"
        allow = spec.num("pin_shear_allow", pin.name)
        if allow is None:
            out.append(_skip(rule, title, "needs pin_shear_allow", SRC_SHEAR))
        else:
            tau = f / (planes * math.pi * d * d / 4)
            out.append(
                _ratio_rule(
                    rule,
                    title,
                    tau,
                    allow,
                    "MPa",
                    SRC_SHEAR,
                    {"force_N": f, "diameter_mm": d, "shear_planes": planes, "case": _where(worst)},
                    at_most=True,
                    formula="τ = F/(n·πd²/4) ≤ τ_allow",
                    substituted=f"τ = {_g(f)} N / ({planes:g} × π × {_g(d)}² mm² / 4) = {_g(tau)} MPa"
                    f"; limit {_g(allow)} MPa ({_where(worst)})",
                )
            )
        rule, title = f"pin.bearing.{pin.name}", f"pin bearing, {pin.name}"
        miss = _missing(spec, ("pin_length", "pin_bearing_allow"), pin.name)
        if miss:
            out.append(_skip(rule, title, f"needs {', '.join(miss)}", SRC_BEARING))
            continue
        length = spec.num("pin_length", pin.name) or 0.0
        p = f / (d * length)
        out.append(
            _ratio_rule(
                rule,
                title,
                p,
                spec.num("pin_bearing_allow", pin.name) or 0.0,
                "MPa",
                SRC_BEARING,
                {"force_N": f, "diameter_mm": d, "pin_length_mm": length, "case": _where(worst)},
                at_most=True,
                formula="p = F/(d·L) ≤ p_allow",
                substituted=f"p = {_g(f)} N / ({_g(d)} mm × {_g(length)} mm) = {_g(p)} MPa"
                f"; limit {_g(spec.num('pin_bearing_allow', pin.name))} MPa ({_where(worst)})",
            )
        )
    return out


def _rod_section(spec: Spec, name: str) -> tuple[float | None, float | None]:
    """The rod's cross-section area (mm²) and diameter (mm) from the spec.

    ``rod_area`` wins; otherwise the area of a solid round ``rod_diameter``, A = πd²/4.
    """
    area = spec.num("rod_area", name)
    dia = spec.num("rod_diameter", name)
    if area is None and dia is not None:
        area = math.pi * dia * dia / 4
    return area, dia


def _member_stress(spec: Spec, name: str, cases: list[CaseSolution], area: float | None) -> RuleResult:
    """Axial rod stress σ = F/A (MPa) in the case of greatest |axial force| against ``rod_stress_allow``.

    Source: :data:`SRC_STRESS`.
    """
    worst = max(cases, key=lambda c: abs(c.member(name).axial_N))
    f = abs(worst.member(name).axial_N)
    rule, title = f"member.stress.{name}", f"rod stress, {name}"
    allow = spec.num("rod_stress_allow", name)
    if area is None or allow is None:
        need = [k for k, v in (("rod_area or rod_diameter", area), ("rod_stress_allow", allow)) if v is None]
        return _skip(rule, title, f"needs {', '.join(need)}", SRC_STRESS)
    return _ratio_rule(
        rule,
        title,
        f / area,
        allow,
        "MPa",
        SRC_STRESS,
        {"axial_N": f, "area_mm2": area, "case": _where(worst)},
        at_most=True,
        formula="σ = |F|/A ≤ σ_allow",
        substituted=f"σ = {_g(f)} N / {_g(area)} mm² = {_g(f / area)} MPa; limit {_g(allow)} MPa ({_where(worst)})",
    )


def _euler_load(e_mod: float, d_eff: float, k: float, length: float) -> float:
    """Euler critical load P_cr = π²EI/(KL)² (N) of a solid round rod, I = πd⁴/64.

    E in MPa, d and L in mm, K the end factor. Source: :data:`SRC_EULER`
    (Shigley's MED 10th ed., §4-11; section from memory).
    """
    inertia = math.pi * d_eff**4 / 64
    return math.pi**2 * e_mod * inertia / (k * length) ** 2


def _member_buckling(
    spec: Spec, name: str, cases: list[CaseSolution], area: float | None, dia: float | None
) -> RuleResult:
    """Euler buckling of a rod in its case of greatest compression: P_cr/safety against the compression (N).

    A rod given only by area is taken as a solid round of that area.
    Source: :data:`SRC_EULER`.
    """
    rule, title = f"member.buckling.{name}", f"rod buckling, {name}"
    comp = [c for c in cases if c.member(name).axial_N < 0]
    if not comp:
        return _skip(rule, title, "always in tension", SRC_EULER)
    e_mod = spec.num("rod_modulus", name)
    if e_mod is None or (dia is None and area is None):
        return _skip(rule, title, "needs rod_modulus and rod_diameter (or rod_area)", SRC_EULER)
    d_eff = dia if dia is not None else math.sqrt(4 * (area or 0.0) / math.pi)
    k = spec.num("rod_end_factor", name) or 1.0
    sf = spec.num("buckling_safety", name) or 1.0
    worst_c = max(comp, key=lambda c: -c.member(name).axial_N)
    fc = -worst_c.member(name).axial_N
    length = worst_c.member(name).length_mm
    p_cr = _euler_load(e_mod, d_eff, k, length)
    margin = p_cr / (sf * fc)
    inputs = {
        "compression_N": fc,
        "euler_load_N": p_cr,
        "length_mm": length,
        "diameter_mm": d_eff,
        "modulus_MPa": e_mod,
        "end_factor": k,
        "safety": sf,
        "case": _where(worst_c),
        "solid_round": dia is None,
    }
    verdict = Verdict.PASS if margin >= 1 else Verdict.FAIL
    formula = "F_c ≤ P_cr/S, P_cr = π²EI/(KL)², I = πd⁴/64"
    substituted = (
        f"P_cr = π² × {_g(e_mod)} MPa × π × {_g(d_eff)}⁴ mm⁴ / 64 / ({k:g} × {_g(length)} mm)² = {_g(p_cr)} N; "
        f"F_c = {_g(fc)} N; limit {_g(p_cr)} N / {sf:g} = {_g(p_cr / sf)} N ({_where(worst_c)})"
    )
    return RuleResult(rule, title, verdict, fc, p_cr / sf, "N", margin, inputs, SRC_EULER, "", formula, substituted)


def _members(spec: Spec, mech: Mechanism, cases: list[CaseSolution]) -> list[RuleResult]:
    """Per two-force member (rod): axial stress and Euler buckling over ``cases``."""
    out: list[RuleResult] = []
    if not cases:
        return out
    for m in cases[0].members:
        area, dia = _rod_section(spec, m.name)
        out.append(_member_stress(spec, m.name, cases, area))
        out.append(_member_buckling(spec, m.name, cases, area, dia))
    return out
