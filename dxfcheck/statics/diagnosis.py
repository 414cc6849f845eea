"""Free motions and redundancy of a linkage, read from the singular value
decomposition of its equations, with the parts, pins and probable causes
named.

References: G. Strang, *Linear Algebra and Its Applications*, 4th ed.,
§6.3 (the four subspaces: the left null space holds the free motions, the
right null space the self-stresses).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from typing import TYPE_CHECKING

import numpy as np

from dxfcheck.core.directions import Direction
from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.geometry import Point
from dxfcheck.mechanism.model import Mechanism, Mounting
from dxfcheck.statics.equations import Balance, ColumnKind, RowKind, RowOwner, System

if TYPE_CHECKING:  # numpy.typing costs a tenth of numpy's import; annotations only
    from numpy.typing import NDArray

__all__ = ["CONDITION_WARN", "MODE_SHARE", "diagnose"]

#: Singular values below this fraction of the largest count as zero.
RANK_RTOL = 1e-10


#: A load whose share on a free motion exceeds this fraction of the loads'
#: size drives that motion.
EXCITATION_RTOL = 1e-8


#: Condition number above which the solution is reported as ill-conditioned.
CONDITION_WARN = 1e8


#: Share of a mode above which a body or pin is named as taking part in it.
MODE_SHARE = 0.2


def _names_in(weights: Iterable[tuple[str, float]], share: float = MODE_SHARE) -> list[str]:
    """Names whose summed squared weights exceed ``share``² of the largest,
    the largest first."""
    acc: dict[str, float] = {}
    for name, w in weights:
        acc[name] = acc.get(name, 0.0) + w * w
    if not acc:
        return []
    top = max(acc.values())
    return sorted((n for n, v in acc.items() if v > share**2 * top), key=lambda n: -acc[n])


#: The parts named as moving in a free motion: those whose motion exceeds
#: this fraction of the largest.
MOVING_SHARE = 0.1


#: Findings that explain a free motion when they sit on a part or pin that
#: takes part in it.
CAUSE_CODES = (Code.OPEN_END, Code.LONELY_PIN, Code.ORPHAN_PIN, Code.LOAD_AT_PIVOT)


def _at_text(at: Point | None) -> str:
    return f" at ({at[0]:.6g}, {at[1]:.6g}) mm" if at is not None else ""


#: A row whose weight in the free motions is below this fraction of the
#: largest takes no part in them.
TAKES_PART_RTOL = 1e-6


def _probable_causes(mech: Mechanism, null: NDArray[np.float64], owners: list[RowOwner]) -> list[Finding]:
    """The reading and topology findings on any part or pin that takes part
    in any free motion (a column of ``null``, the left null space: the
    motions the equations allow), most likely first."""
    weight = np.sqrt(np.sum(null * null, axis=1))
    top = float(weight.max(initial=0.0)) or 1.0
    moving = [o for i, o in enumerate(owners) if weight[i] > TAKES_PART_RTOL * top]
    bodies = {o.name for o in moving if o.kind is RowKind.BODY}
    pins = {o.name for o in moving if o.kind is RowKind.PIN}
    refs = {src.ref for p in mech.parts if p.name in bodies for src in p.sources}
    refs |= {p.source.ref for p in mech.pins if p.name in pins or set(p.bodies) & bodies}
    near = [f for f in mech.findings if f.code in CAUSE_CODES and set(f.handles) & refs]
    others = [f for f in mech.findings if f.code in CAUSE_CODES and f not in near]
    # a part left out of the linkage altogether (a lonely pin, an open end)
    # is named even when it is not a moving part's
    return near + [f for f in others if "near miss" in f.message]


def _pin_srcs(mech: Mechanism, names: Sequence[str]) -> tuple[tuple[str, ...], tuple[str, ...], Point | None]:
    pins = [mech.pin(n) for n in names if any(p.name == n for p in mech.pins)]
    return (
        tuple(p.source.ref for p in pins),
        tuple(p.source.layer for p in pins),
        pins[0].center if pins else None,
    )


def _part_srcs(mech: Mechanism, names: Sequence[str]) -> tuple[tuple[str, ...], tuple[str, ...], Point | None]:
    parts = [mech.part(n) for n in names if any(p.name == n for p in mech.parts)]
    srcs = [s for p in parts for s in p.sources]
    return (
        tuple(s.ref for s in srcs),
        tuple(s.layer for s in srcs),
        parts[0].segments[0][0] if parts else None,
    )


def diagnose(mech: Mechanism, sys_: System, direction: Direction) -> tuple[list[Finding], float]:
    """Free motions and redundancy by SVD; returns findings and the
    condition number.

    The steps: parts held by nothing (their rows were dropped as 0 = 0),
    then the decomposition of the rows that remain: free motions (left null
    space), redundancy (right null space), else ill-conditioning.
    """
    loose, findings = _loose_parts(mech, sys_, direction)
    keep = sys_.kept
    a = sys_.a[keep]
    b = sys_.b[keep]
    owners = [sys_.row_owner[i] for i in keep]
    if a.size == 0:
        return findings, 1.0
    u, s, vt = np.linalg.svd(a)
    smax = float(s[0]) if s.size else 0.0
    rank = int(np.sum(s > RANK_RTOL * smax))
    m, n = a.shape
    cond = smax / float(s[rank - 1]) if rank > 0 else math.inf
    if rank < m:
        findings += _free_motions(mech, u[:, rank:], b, owners, loose, direction)
    if rank < n:
        findings.append(_redundancy(mech, sys_, vt[rank:].T, direction))
    elif rank == n and cond > CONDITION_WARN:
        findings.append(_ill_conditioning(u[:, -1], owners, cond, direction))
    return findings, cond


def _loose_parts(mech: Mechanism, sys_: System, direction: Direction) -> tuple[list[str], list[Finding]]:
    """The parts whose rows were all dropped while loads may act on them:
    held by nothing.  A pivoted shoe's moment about its own pin is an
    identity, not a loose part, unless a load acts on it.  Returns the names
    and their findings (errors when a load cannot be carried)."""
    bscale = max(float(np.abs(sys_.b).max(initial=0.0)), 1.0)
    pivoted = {s.part for s in mech.shoes if s.mounting is Mounting.PIVOTED}
    loose: list[str] = []
    for i in sys_.dropped:
        owner = sys_.row_owner[i]
        pivoted_moment = owner.kind is RowKind.BODY and owner.balance is Balance.MOMENT and owner.name in pivoted
        if pivoted_moment and abs(sys_.b[i]) <= EXCITATION_RTOL * bscale:
            continue
        if owner.name not in loose:
            loose.append(owner.name)
    findings: list[Finding] = []
    for name in loose:
        h, lay, at = _part_srcs(mech, [name])
        excited = any(abs(sys_.b[i]) > EXCITATION_RTOL * bscale for i in sys_.dropped if sys_.row_owner[i].name == name)
        findings.append(
            Finding(
                Code.FREE_MOTION,
                f"{direction}: part {name} is held by nothing (no pin or shoe reaches it)"
                + ("; its load cannot be carried" if excited else ""),
                h,
                lay,
                at,
                Severity.ERROR if excited else Severity.WARNING,
            )
        )
    return loose, findings


def _free_motions(
    mech: Mechanism,
    null: NDArray[np.float64],
    b: NDArray[np.float64],
    owners: list[RowOwner],
    loose: list[str],
    direction: Direction,
) -> list[Finding]:
    """The free motions (``null``, the left null space of the kept rows
    ``owners`` with loads ``b``): the parts that move and the pins they
    turn about, an error when the loads drive them, with the probable
    causes.  No finding when only the loose parts move under the loads."""
    proj = null.T @ b
    bnorm = float(np.linalg.norm(b)) or 1.0
    excited = float(np.linalg.norm(proj)) > EXCITATION_RTOL * bnorm
    y = null @ proj if excited else null[:, 0]
    body_names = _names_in(
        ((o.name, float(y[i])) for i, o in enumerate(owners) if o.kind is RowKind.BODY), MOVING_SHARE
    )
    pin_names = _names_in((o.name, float(y[i])) for i, o in enumerate(owners) if o.kind is RowKind.PIN)
    moving = [nm for nm in body_names if nm not in loose]
    if not moving and excited:
        return []
    h, lay, at = _part_srcs(mech, moving)
    verb = "can move under the loads" if excited else "can move freely (the loads do not drive it)"
    around = f" (around pins {', '.join(pin_names)})" if pin_names else ""
    causes = _probable_causes(mech, null, owners)
    count = null.shape[1]
    return [
        Finding(
            Code.FREE_MOTION,
            f"{direction}: part{'s' if len(moving) != 1 else ''} {', '.join(moving) or '?'} {verb}{around}: "
            f"the linkage has {count} free motion{'s' if count > 1 else ''}; "
            + (
                "probable cause: "
                + ", ".join(f"{f.code.id} {f.code.slug}" + _at_text(f.at) for f in causes)
                + " (listed below)"
                if causes
                else "add the pin or link that holds it"
            ),
            h,
            lay,
            at,
            Severity.ERROR if excited else Severity.WARNING,
        )
    ]


def _redundancy(mech: Mechanism, sys_: System, v: NDArray[np.float64], direction: Direction) -> Finding:
    """The self-stresses (``v``, the right null space): the pins whose
    forces statics cannot fix."""
    weights = np.sqrt(np.sum(v * v, axis=1))
    names = _names_in((o.name, float(weights[j])) for j, o in sys_.columns(ColumnKind.PIN))
    h, lay, at = _pin_srcs(mech, names)
    count = v.shape[1]
    return Finding(
        Code.REDUNDANT,
        f"{direction}: the linkage is statically indeterminate ({count} redundant "
        f"constraint{'s' if count > 1 else ''}): the forces at pins {', '.join(names)} are not fixed "
        "by statics alone. A real brake needs a floating lever, an equaliser or a spring there",
        h,
        lay,
        at,
    )


def _ill_conditioning(weak: NDArray[np.float64], owners: list[RowOwner], cond: float, direction: Direction) -> Finding:
    """Nearly singular equations: the parts on the weakest equation
    combination ``weak`` (the last left singular vector)."""
    names = _names_in((o.name, float(weak[i])) for i, o in enumerate(owners) if o.kind is RowKind.BODY)
    return Finding(
        Code.ILL_CONDITIONED,
        f"{direction}: the equations are nearly singular (condition number {cond:.3g}); "
        f"results near {', '.join(names)} are very sensitive to the geometry",
    )
