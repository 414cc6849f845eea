"""The release rules: can the actuator lift the shoes clear, keep doing so as
the linings wear, and does the spring still hold the duty at its worst?

From the drawn linkage's small-displacement kinematics
(:mod:`dxfcheck.statics.kinematics`) and the spec:

``release.stroke``
    the actuator stroke needed for ``shoe_clearance`` at every shoe's lining
    centre (and every band's radial clearance), s = c × stroke per mm of
    equal lift, against ``actuator_stroke``;
``release.wear``
    the lining wear the rest of the stroke takes up before adjustment,
    w = actuator_stroke / (stroke per mm of lift) − c (wear closes the
    clearance one for one), against ``wear_allowance``;
``release.lining``
    ``wear_allowance`` within ``lining_thickness``;
``release.force``
    the force the actuator needs at the end of its stroke: by virtual work at
    μ = 0, Σ effort × its stroke per mm of actuator stroke (the set force
    through the linkage's velocity ratio), springs at the top of their
    tolerance and stiffened by rate × their extra deflection, × ``release_margin``,
    against ``actuator_force``;
``spring.torque.DIR``
    the braking torque at ``mu_min`` with every spring at the bottom of its
    tolerance and relaxed by the wear: a spring extends as the linings wear
    (the linkage moves back by the wear), its force falling by rate × its
    change of length.  On a drawing with no spring (set by a weight or a
    load) a given ``spring_rate`` or ``spring_preload_tolerance`` skips the
    rule, saying the keys are not used.

The rules appear only when the spec gives one of their keys.  They judge a
finished :class:`~dxfcheck.gate.rules.Judgement` (:func:`with_release`), so
that this module imports the rules module and not the other way round.

References
----------
.. [1] F. P. Beer, E. R. Johnston et al., *Vector Mechanics for Engineers:
   Statics*, 11th ed., McGraw-Hill, 2016, ch. 10 (virtual work; the
   mechanical advantage of a machine as a ratio of virtual displacements).
.. [2] Radial shoe clearance 0.5-1.5 mm at release: common practice
   (/work/shared/REFERENCES.md, "Pins and clearance").
"""

from __future__ import annotations

from dataclasses import replace
from typing import Any

from dxfcheck.core.errors import ConfigError
from dxfcheck.gate.rules import Judgement, duties
from dxfcheck.gate.spec import Spec
from dxfcheck.gate.verdicts import RuleResult, Verdict, figures
from dxfcheck.gate.verdicts import ratio_rule as _ratio_rule
from dxfcheck.gate.verdicts import skip as _skip
from dxfcheck.mechanism import Mechanism, Spring
from dxfcheck.statics import solve
from dxfcheck.statics.contact import Direction
from dxfcheck.statics.kinematics import Release, effort_names, equal_lift_motion, release, report

__all__ = ["RELEASE_KEYS", "actuator_of", "release_rules", "with_release"]

#: The spec keys that ask for the release rules.
RELEASE_KEYS = (
    "actuator",
    "shoe_clearance",
    "actuator_stroke",
    "actuator_force",
    "lining_thickness",
    "wear_allowance",
    "spring_rate",
    "spring_preload_tolerance",
)

SRC_KIN = (
    "small-displacement kinematics of the drawn linkage "
    "(virtual displacements, Beer & Johnston, Statics 11th ed., ch. 10)"
)
SRC_STROKE = (
    f"stroke = clearance × actuator stroke per mm of equal lift; {SRC_KIN}; clearance 0.5-1.5 mm common practice"
)
SRC_WEAR = f"wear taken up w = stroke / (stroke per mm of lift) − clearance; {SRC_KIN}"
SRC_LINING = "the wear allowance must lie within the lining (common practice)"
SRC_FORCE = (
    "virtual work at μ = 0: F = Σ effort × its stroke per mm of actuator stroke (springs at +tolerance, "
    f"+ rate × extra deflection at full stroke), × release_margin; {SRC_KIN}"
)
SRC_SPRING = "braking torque at mu_min, springs at −tolerance and relaxed by rate × their extension over the wear"


def with_release(j: Judgement) -> Judgement:
    """``j`` with the release rules after its own (unchanged when the spec
    asks for none)."""
    extra = release_rules(j)
    return replace(j, rules=(*j.rules, *extra)) if extra else j


def actuator_of(spec: Spec, mech: Mechanism) -> tuple[str | None, str]:
    """The actuator's effort name, or None and why: the spec's ``actuator``,
    else the drawing's only load or spring.

    Raises
    ------
    ConfigError
        When ``actuator`` names no load or spring of the drawing.
    """
    names = effort_names(mech)
    named = spec.get("actuator")
    if named is not None:
        if str(named.value) not in names:
            raise ConfigError(
                f"{named.source}: actuator = {named.value!r} names no load or spring of the drawing; "
                f"its loads and springs are {', '.join(repr(n) for n in names) or 'none'}",
                path=mech.drawing.path,
            )
        return str(named.value), ""
    if len(names) == 1:
        return names[0], ""
    return None, f"needs actuator (the load or spring it moves; the drawing has {', '.join(names) or 'none'})"


def release_rules(j: Judgement) -> list[RuleResult]:
    """Every release rule of ``j``'s spec and mechanism (none when the spec
    gives none of :data:`RELEASE_KEYS`)."""
    spec, mech = j.spec, j.mechanism
    if not any(spec.get(k) is not None for k in RELEASE_KEYS):
        return []
    name, why = actuator_of(spec, mech)
    out: list[RuleResult] = []
    if name is None:
        out += [
            _skip("release.stroke", "release stroke", why, SRC_STROKE),
            _skip("release.wear", "wear taken up by the stroke", why, SRC_WEAR),
            _skip("release.force", "release force", why, SRC_FORCE),
        ]
    else:
        rel = release(mech, name)
        out += [_stroke(spec, rel), _wear(spec, rel), _force(spec, mech, rel)]
    out += _lining(spec)
    out += _spring_torque(j)
    return out


def _no_release(rule: str, title: str, rel: Release, source: str) -> RuleResult:
    return RuleResult(
        rule,
        title,
        Verdict.FAIL,
        None,
        None,
        "mm",
        None,
        {"actuator": rel.actuator, "mobility": rel.mobility},
        source,
        f"{rel.actuator} does not move against its force when the shoes lift: it cannot release them",
    )


def _kin_inputs(rel: Release) -> dict[str, Any]:
    assert rel.per_mm is not None
    return {
        "actuator": rel.actuator,
        "mobility": rel.mobility,
        "stroke_per_lift": rel.stroke_per_lift,
        "equal_lift": rel.equal_lift,
        "shares": [
            {"name": s.name, "kind": s.kind, "stroke_per_lift": s.stroke_per_lift, "share": s.share} for s in rel.shares
        ],
        "lift_per_stroke": [
            {"shoe": s.name, "mid": s.mid_mm, "least": s.least_mm, "most": s.most_mm} for s in rel.per_mm.shoes
        ]
        + [{"band": b.name, "clearance": b.clearance_mm, "slack": b.slack_mm} for b in rel.per_mm.bands],
    }


def _stroke(spec: Spec, rel: Release) -> RuleResult:
    """The stroke needed for the clearance against ``actuator_stroke``."""
    rule, title = "release.stroke", "release stroke"
    if rel.stroke_per_lift is None:
        return _no_release(rule, title, rel, SRC_STROKE)
    c, stroke = spec.num("shoe_clearance"), spec.num("actuator_stroke")
    if c is None or stroke is None:
        miss = [k for k, v in (("shoe_clearance", c), ("actuator_stroke", stroke)) if v is None]
        return _skip(rule, title, f"needs {', '.join(miss)}", SRC_STROKE)
    need = c * rel.stroke_per_lift
    inputs = dict(_kin_inputs(rel), shoe_clearance_mm=c, actuator_stroke_mm=stroke)
    msg = f"{rel.actuator} strokes {need:.{figures(need, stroke)}g} mm for {c:g} mm at every lining centre"
    return _ratio_rule(rule, title, need, stroke, "mm", SRC_STROKE, inputs, at_most=True, message=msg)


def _wear(spec: Spec, rel: Release) -> RuleResult:
    """The lining wear the stroke beyond the clearance takes up, against
    ``wear_allowance``."""
    rule, title = "release.wear", "wear taken up by the stroke"
    if rel.stroke_per_lift is None:
        return _no_release(rule, title, rel, SRC_WEAR)
    c, stroke, allow = spec.num("shoe_clearance"), spec.num("actuator_stroke"), spec.num("wear_allowance")
    if c is None or stroke is None or allow is None:
        miss = [
            k for k, v in (("shoe_clearance", c), ("actuator_stroke", stroke), ("wear_allowance", allow)) if v is None
        ]
        return _skip(rule, title, f"needs {', '.join(miss)}", SRC_WEAR)
    taken = stroke / rel.stroke_per_lift - c
    inputs = {
        "actuator": rel.actuator,
        "stroke_per_lift": rel.stroke_per_lift,
        "shoe_clearance_mm": c,
        "actuator_stroke_mm": stroke,
        "stroke_left_for_wear_mm": stroke - c * rel.stroke_per_lift,
        "wear_allowance_mm": allow,
    }
    n = figures(taken, allow)
    msg = f"the stroke takes up {taken:.{n}g} mm of lining wear before adjustment"
    # w is a difference of the lift and the clearance: its rounding is relative to them
    out = _ratio_rule(rule, title, taken, allow, "mm", SRC_WEAR, inputs, at_most=False, message=msg, scale=c)
    if out.verdict is Verdict.FAIL and taken < 0:
        lift = stroke / rel.stroke_per_lift
        short = (
            f"the stroke does not reach the clearance: {stroke:g} mm of stroke lifts the linings "
            f"{lift:.{figures(lift, c)}g} mm, short of the {c:g} mm clearance (which needs "
            f"{c * rel.stroke_per_lift:.{figures(c * rel.stroke_per_lift, stroke)}g} mm of stroke); "
            "no wear is taken up"
        )
        out = replace(out, message=short)
    return out


def _lining(spec: Spec) -> list[RuleResult]:
    allow, thick = spec.num("wear_allowance"), spec.num("lining_thickness")
    if allow is None or thick is None:
        return []
    inputs = {"wear_allowance_mm": allow, "lining_thickness_mm": thick}
    return [
        _ratio_rule(
            "release.lining", "wear allowance within the lining", allow, thick, "mm", SRC_LINING, inputs, at_most=True
        )
    ]


def _force(spec: Spec, mech: Mechanism, rel: Release) -> RuleResult:
    """The actuator force needed at the end of its stroke against
    ``actuator_force``."""
    rule, title = "release.force", "release force"
    if rel.stroke_per_lift is None or rel.per_mm is None:
        return _no_release(rule, title, rel, SRC_FORCE)
    available = spec.num("actuator_force")
    if available is None:
        return _skip(rule, title, "needs actuator_force", SRC_FORCE)
    tol = spec.num("spring_preload_tolerance") or 0.0
    rate = spec.num("spring_rate") or 0.0
    full = spec.num("actuator_stroke") or 0.0
    margin = spec.num("release_margin") or 1.0
    held = 0.0
    for e in rel.per_mm.efforts:
        force = e.force_N
        if e.kind == "spring":
            force = force * (1.0 + tol) + rate * e.stroke_mm * full
        held += force * e.stroke_mm
    need = held * margin
    inputs = {
        "actuator": rel.actuator,
        "set_force_through_linkage_N": rel.release_force_N,
        "force_at_full_stroke_N": held,
        "release_margin": margin,
        "spring_preload_tolerance": tol,
        "spring_rate_N_per_mm": rate,
        "actuator_stroke_mm": full,
        "efforts": [
            {"name": e.name, "force_N": e.force_N, "stroke_per_stroke": e.stroke_mm} for e in rel.per_mm.efforts
        ],
    }
    msg = f"{rel.actuator} must push {need:.4g} N ({held:.4g} N × margin {margin:g})"
    return _ratio_rule(rule, title, need, available, "N", SRC_FORCE, inputs, at_most=True, message=msg)


def _weak_springs(spec: Spec, mech: Mechanism) -> tuple[tuple[Spring, ...], dict[str, Any]]:
    """Every spring at its weakest: the bottom of its tolerance, less rate ×
    its extension over the wear (its stroke per mm of equal lift × the wear),
    and the inputs that say so."""
    tol = spec.num("spring_preload_tolerance") or 0.0
    rate = spec.num("spring_rate") or 0.0
    wear = spec.num("wear_allowance") or 0.0
    lift = equal_lift_motion(mech)
    per_lift = {e.name: e.stroke_mm for e in report(mech, lift).efforts} if lift is not None else {}
    weak = tuple(
        replace(sp, force_N=(sp.force_N or 0.0) * (1.0 - tol) - rate * wear * per_lift.get(sp.name, 0.0))
        for sp in mech.springs
    )
    inputs: dict[str, Any] = {
        "spring_preload_tolerance": tol,
        "spring_rate_N_per_mm": rate,
        "wear_mm": wear,
        "springs": [
            {
                "name": sp.name,
                "set_force_N": sp.force_N,
                "weakest_force_N": w.force_N,
                "stroke_per_lift": per_lift.get(sp.name),
            }
            for sp, w in zip(mech.springs, weak, strict=True)
        ],
    }
    return weak, inputs


def _spring_torque(j: Judgement) -> list[RuleResult]:
    """The duty at ``mu_min`` with every spring at its weakest."""
    spec, mech = j.spec, j.mechanism
    given = [v for v in (spec.get("spring_rate"), spec.get("spring_preload_tolerance")) if v is not None]
    if not given:
        return []
    dirs_v = spec.get("directions")
    required = tuple(Direction(d) for d in (dirs_v.value if dirs_v else ("cw", "ccw")))
    title = "torque at the weakest spring, {}"
    if not mech.springs:
        keys = ", ".join(f"{v.key} (from {v.source})" for v in given)
        why = (
            f"the drawing has no spring (its set force is a load): {keys} {'is' if len(given) == 1 else 'are'} not used"
        )
        return [_skip(f"spring.torque.{d}", title.format(d), why, SRC_SPRING) for d in required]
    found, _ = duties(spec)
    if not found:
        return [_skip(f"spring.torque.{d}", title.format(d), "needs a duty", SRC_SPRING) for d in required]
    need = max(d.torque_Nm for d in found)
    weak, inputs = _weak_springs(spec, mech)
    inputs.update(mu_min=j.mu_min, required_torque_Nm=need)
    if any((w.force_N or 0.0) <= 0.0 for w in weak):
        spent = "a spring is spent: its force falls to zero or below"
        return [
            RuleResult(
                f"spring.torque.{d}", title.format(d), Verdict.FAIL, None, need, "N*m", None, inputs, SRC_SPRING, spent
            )
            for d in required
        ]
    sol = solve(replace(mech, springs=weak), j.mu_min, required, j.nominal.options)
    return [
        _ratio_rule(
            f"spring.torque.{d}",
            title.format(d),
            sol.case(d).torque_Nm,
            need,
            "N*m",
            SRC_SPRING,
            dict(inputs, direction=str(d)),
            at_most=False,
        )
        for d in required
    ]
