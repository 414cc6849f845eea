"""Compare revisions of a brake drawing: what a change did to the loads.

The two mechanisms are matched part by part: pins, pivots, parts and shoes by
label first, then by position after removing a rigid motion of the whole
mechanism (a revision re-drawn on a new sheet, or a re-placed block, is
shifted and turned as a whole).  The motion is found from the labelled pins
both revisions share (a least-squares fit of a rotation and a translation,
the Kabsch method), or, with fewer than two of them, from the drum axis and
the turn that brings the most pins onto pins of the same kind.  What cannot
be matched is reported as added or removed, never guessed.

Then, per drum direction, every comparable quantity (braking torque, pin
forces, member forces, shoe forces and peak line loads, band tensions, rule
verdicts and margins) is listed with its absolute and relative change, the
verdict changes first and then the largest relative change.  Thresholds turn
a torque drop or a force rise into a failure.

References
----------
.. [1] W. Kabsch, "A solution for the best rotation to relate two sets of
   vectors", *Acta Crystallographica* A32 (1976), 922-923.
"""

from __future__ import annotations

import math
import os
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

from dxfcheck.config import Config
from dxfcheck.geometry import Affine, Point, dist
from dxfcheck.mechanism import Mechanism
from dxfcheck.rules import Judgement, Verdict
from dxfcheck.statics import CaseSolution

__all__ = [
    "MATCH_RTOL",
    "Change",
    "Comparison",
    "Thresholds",
    "compare_judgements",
    "history_svg",
    "mark_revision",
    "rigid_motion",
]

#: Pins match by position when within this fraction of the drawing's size
#: (after the rigid motion), so that small moves still match.
MATCH_RTOL = 0.05
#: Pins within this many "lies on" tolerances of where the rigid motion
#: puts them agree with it.
INLIER_TOL_FACTOR = 10.0
#: Turns tried when no labelled pins fix the rigid motion [degrees].
TURN_STEP_DEG = 0.5
#: Relative changes below this are reported as unchanged.
UNCHANGED_RTOL = 1e-9


@dataclass(frozen=True)
class Thresholds:
    """Limits on a revision [fractions]: ``max_torque_drop`` (0.02 is 2 %),
    ``max_force_rise`` for pins, members, shoes and bands."""

    max_torque_drop: float | None = None
    max_force_rise: float | None = None


@dataclass(frozen=True)
class Change:
    """One quantity's change between revisions.

    Attributes
    ----------
    kind : str
        ``torque``, ``pin``, ``member``, ``shoe``, ``band``, ``rule``,
        ``moved``, ``diameter``, ``added``, ``removed``.
    name : str
    direction : str
        ``cw``, ``ccw`` or ``""`` for geometry.
    old, new : float or str or None
    unit : str
    abs_change, rel_change : float or None
    crossed : bool
        True when this change crosses a threshold or turns a verdict from
        pass to fail.
    note : str
    """

    kind: str
    name: str
    direction: str
    old: float | str | None
    new: float | str | None
    unit: str
    abs_change: float | None = None
    rel_change: float | None = None
    crossed: bool = False
    note: str = ""


@dataclass(frozen=True)
class Comparison:
    """The changes from ``old`` to ``new``."""

    old: Judgement
    new: Judgement
    motion: Affine
    motion_source: str
    pin_map: dict[str, str]
    changes: tuple[Change, ...] = field(default=())

    @property
    def failed(self) -> bool:
        return any(c.crossed for c in self.changes)


def _kabsch(src: Sequence[Point], dst: Sequence[Point]) -> Affine:
    n = len(src)
    sx = sum(p[0] for p in src) / n
    sy = sum(p[1] for p in src) / n
    dx = sum(p[0] for p in dst) / n
    dy = sum(p[1] for p in dst) / n
    # 2D: the best rotation angle from the summed cross and dot products
    c = sum((a[0] - sx) * (b[0] - dx) + (a[1] - sy) * (b[1] - dy) for a, b in zip(src, dst, strict=True))
    s = sum((a[0] - sx) * (b[1] - dy) - (a[1] - sy) * (b[0] - dx) for a, b in zip(src, dst, strict=True))
    t = math.atan2(s, c)
    cos, sin = math.cos(t), math.sin(t)
    return Affine(cos, -sin, dx - (cos * sx - sin * sy), sin, cos, dy - (sin * sx + cos * sy))


def _consensus(src: Sequence[Point], dst: Sequence[Point], tol: float) -> tuple[Affine, int]:
    """The rigid motion most pairs agree on: every pair of corresponding
    points proposes one, the one with most points within ``tol`` wins and is
    refitted on them, so that the pins a revision moved do not pull the
    frame along."""
    best: tuple[Affine, int] = (_kabsch(src, dst), -1)
    n = len(src)
    for i in range(n):
        for j in range(i + 1, n):
            m = _kabsch([src[i], src[j]], [dst[i], dst[j]])
            inliers = [k for k in range(n) if dist(m.apply(src[k]), dst[k]) <= tol]
            if len(inliers) >= 2 and len(inliers) > best[1]:
                best = (_kabsch([src[k] for k in inliers], [dst[k] for k in inliers]), len(inliers))
    return best


def rigid_motion(old: Mechanism, new: Mechanism) -> tuple[Affine, str]:
    """The rotation and translation that bring ``old`` onto ``new``, and how
    it was found."""
    shared = [p for p in old.pins if p.name in old.labelled_names and p.name in new.labelled_names]
    by_name = {p.name: p for p in new.pins}
    shared = [p for p in shared if p.name in by_name]
    tol = INLIER_TOL_FACTOR * max(old.tolerance_mm, new.tolerance_mm)
    if len(shared) >= 2:
        fit, agree = _consensus([p.center for p in shared], [by_name[p.name].center for p in shared], tol)
        return fit, f"labelled pins ({agree} of {len(shared)} agree)"
    if old.drum is None or new.drum is None:
        return Affine(), "none (no drum)"
    o, n = old.drum.center, new.drum.center
    tol = MATCH_RTOL * new.length_scale_mm / 10
    best = (Affine.translation(n[0] - o[0], n[1] - o[1]), -1, 0.0)
    steps = int(360 / TURN_STEP_DEG)
    for k in range(steps):
        deg = k * TURN_STEP_DEG
        m = Affine.translation(*n) @ Affine.rotation(deg) @ Affine.translation(-o[0], -o[1])
        hits = 0
        for p in old.pins:
            q = m.apply(p.center)
            if any(dist(q, r.center) <= tol and r.grounded == p.grounded for r in new.pins):
                hits += 1
        if hits > best[1]:
            best = (m, hits, deg)
    m, _, deg = best
    # refine with the pins it matched
    pairs = []
    for p in old.pins:
        q = m.apply(p.center)
        r = min(new.pins, key=lambda r: dist(q, r.center), default=None)
        if r is not None and dist(q, r.center) <= tol:
            pairs.append((p.center, r.center))
    if len(pairs) >= 2:
        m = _kabsch([a for a, _ in pairs], [b for _, b in pairs])
    return m, f"drum axis and pin positions (turned {deg:g}°)"


def _match_pins(old: Mechanism, new: Mechanism, motion: Affine) -> dict[str, str]:
    out: dict[str, str] = {}
    taken: set[str] = set()
    new_names = {p.name for p in new.pins}
    for p in old.pins:
        if p.name in old.labelled_names and p.name in new_names and p.name in new.labelled_names:
            out[p.name] = p.name
            taken.add(p.name)
    tol = MATCH_RTOL * new.length_scale_mm
    candidates = []
    for p in old.pins:
        if p.name in out:
            continue
        q = motion.apply(p.center)
        for r in new.pins:
            if r.name in taken or r.grounded != p.grounded:
                continue
            d = dist(q, r.center)
            if d <= tol:
                candidates.append((d, p.name, r.name))
    for _, a, b in sorted(candidates):
        if a not in out and b not in taken:
            out[a] = b
            taken.add(b)
    return out


def _match_named(
    old_names: Sequence[str],
    new_names: Sequence[str],
    old_pins: dict[str, frozenset[str]],
    new_pins: dict[str, frozenset[str]],
    pin_map: dict[str, str],
    labelled: frozenset[str],
) -> dict[str, str]:
    """Parts (or shoes) by label, else by the matched pins they carry."""
    out: dict[str, str] = {}
    for n in old_names:
        if n in labelled and n in new_names:
            out[n] = n
    for n in old_names:
        if n in out:
            continue
        mapped = frozenset(pin_map.get(p, "") for p in old_pins.get(n, frozenset()))
        for m in new_names:
            if m not in out.values() and mapped and new_pins.get(m) == mapped:
                out[n] = m
                break
    return out


def _rel(old: float, new: float) -> float | None:
    if old == 0:
        return None if new == 0 else math.inf
    return (new - old) / abs(old)


def compare_judgements(old: Judgement, new: Judgement, thresholds: Thresholds = Thresholds()) -> Comparison:
    """Match two solved revisions and list what changed."""
    mo, mn = old.mechanism, new.mechanism
    motion, how = rigid_motion(mo, mn)
    pin_map = _match_pins(mo, mn, motion)
    changes: list[Change] = []
    changes += _geometry_changes(mo, mn, motion, pin_map)
    part_map = _match_named(
        [p.name for p in mo.parts],
        [p.name for p in mn.parts],
        {p.name: frozenset(p.pins) for p in mo.parts},
        {p.name: frozenset(p.pins) for p in mn.parts},
        pin_map,
        mo.labelled_names & mn.labelled_names,
    )
    changes += [Change("removed", p.name, "", "part", None, "") for p in mo.parts if p.name not in part_map]
    changes += [Change("added", p.name, "", None, "part", "") for p in mn.parts if p.name not in part_map.values()]
    shoe_map = {s.name: t.name for s in mo.shoes for t in mn.shoes if part_map.get(s.part) == t.part}
    band_names = {b.name for b in mn.bands}
    for co in old.nominal.cases:
        changes += _force_changes(
            co, new.nominal.case(co.direction), pin_map, part_map, shoe_map, band_names, thresholds
        )
    changes += _rule_changes(old, new)
    kept = [
        c
        for c in changes
        if c.kind not in ("pin", "member", "shoe", "band", "torque")
        or c.rel_change is None
        or abs(c.rel_change) > UNCHANGED_RTOL
        or c.crossed
    ]
    kept.sort(key=_order)
    return Comparison(old, new, motion, how, pin_map, tuple(kept))


def _geometry_changes(mo: Mechanism, mn: Mechanism, motion: Affine, pin_map: dict[str, str]) -> list[Change]:
    out: list[Change] = []
    new_pins = {p.name: p for p in mn.pins}
    for p in mo.pins:
        kind = "pivot" if p.grounded else "pin"
        if p.name not in pin_map:
            out.append(Change("removed", p.name, "", kind, None, ""))
            continue
        q = new_pins[pin_map[p.name]]
        moved = dist(motion.apply(p.center), q.center)
        if moved > mn.tolerance_mm:
            out.append(
                Change("moved", q.name, "", 0.0, moved, "mm", moved, None, note=f"{p.name} moved {moved:.4g} mm")
            )
        if abs(q.diameter_mm - p.diameter_mm) > mn.tolerance_mm:
            out.append(
                Change(
                    "diameter",
                    q.name,
                    "",
                    p.diameter_mm,
                    q.diameter_mm,
                    "mm",
                    q.diameter_mm - p.diameter_mm,
                    _rel(p.diameter_mm, q.diameter_mm),
                )
            )
    matched = set(pin_map.values())
    out += [
        Change("added", q.name, "", None, "pivot" if q.grounded else "pin", "")
        for q in mn.pins
        if q.name not in matched
    ]
    return out


def _force_changes(
    co: CaseSolution,
    cn: CaseSolution,
    pin_map: dict[str, str],
    part_map: dict[str, str],
    shoe_map: dict[str, str],
    band_names: set[str],
    thresholds: Thresholds,
) -> list[Change]:
    d = str(co.direction)
    rel = _rel(co.torque_Nm, cn.torque_Nm)
    drop = thresholds.max_torque_drop
    out = [
        Change(
            "torque",
            "braking torque",
            d,
            co.torque_Nm,
            cn.torque_Nm,
            "N*m",
            cn.torque_Nm - co.torque_Nm,
            rel,
            drop is not None and rel is not None and rel < -drop,
        )
    ]
    pairs: list[tuple[str, str, float, float, str]] = []
    for pr in co.pins:
        if pr.name in pin_map:
            pairs.append(("pin", pin_map[pr.name], pr.max_force_N, cn.pin(pin_map[pr.name]).max_force_N, "N"))
    new_members = {m.name for m in cn.members}
    for mr in co.members:
        other = part_map.get(mr.name)
        if other is not None and other in new_members:
            pairs.append(("member", other, abs(mr.axial_N), abs(cn.member(other).axial_N), "N"))
    for sr in co.shoes:
        other = shoe_map.get(sr.name)
        if other is not None:
            t = cn.shoe(other)
            pairs.append(("shoe", f"{other} normal", sr.normal_N, t.normal_N, "N"))
            pairs.append(("shoe", f"{other} peak p·b", sr.peak_line_load_N_per_mm, t.peak_line_load_N_per_mm, "N/mm"))
    for br in co.bands:
        if br.name in band_names:
            nb = next(x for x in cn.bands if x.name == br.name)
            pairs.append(("band", f"{br.name} tight", br.tight_N, nb.tight_N, "N"))
    rise = thresholds.max_force_rise
    for kind, name, a, b, unit in pairs:
        r = _rel(a, b)
        out.append(Change(kind, name, d, a, b, unit, b - a, r, rise is not None and r is not None and r > rise))
    return out


def _rule_changes(old: Judgement, new: Judgement) -> list[Change]:
    out: list[Change] = []
    old_rules = {r.rule: r for r in old.rules}
    for r in new.rules:
        prev = old_rules.get(r.rule)
        if prev is None:
            continue
        if prev.verdict is r.verdict and prev.margin == r.margin:
            continue
        turned = prev.verdict is Verdict.PASS and r.verdict is Verdict.FAIL
        both = prev.margin is not None and r.margin is not None
        finite = both and math.isfinite(prev.margin or 0.0) and math.isfinite(r.margin or 0.0)
        rel = _rel(prev.margin or 0.0, r.margin or 0.0) if finite else None
        out.append(
            Change(
                "rule",
                r.rule,
                "",
                f"{prev.verdict} {_m(prev.margin)}",
                f"{r.verdict} {_m(r.margin)}",
                "margin",
                None,
                rel,
                turned,
                note="verdict changed" if prev.verdict is not r.verdict else "",
            )
        )
    return out


def _m(x: float | None) -> str:
    if x is None:
        return "-"
    return "∞" if x == math.inf else f"{x:.3g}"


def _order(c: Change) -> tuple[int, float]:
    if c.crossed or c.note == "verdict changed":
        return (0, 0.0)
    if c.kind in ("added", "removed"):
        return (1, 0.0)
    r = abs(c.rel_change) if c.rel_change is not None and math.isfinite(c.rel_change) else 0.0
    return (2, -r)


def change_to_dict(c: Change) -> dict[str, Any]:
    def num(x: Any) -> Any:
        return None if isinstance(x, float) and not math.isfinite(x) else x

    return {
        "kind": c.kind,
        "name": c.name,
        "direction": c.direction,
        "old": num(c.old),
        "new": num(c.new),
        "unit": c.unit,
        "abs_change": num(c.abs_change),
        "rel_change": num(c.rel_change),
        "crossed": c.crossed,
        "note": c.note,
    }


def history_svg(names: Sequence[str], series: dict[str, list[float]], unit: str) -> str:
    """A small line plot of quantities across revisions, as SVG text."""
    w, h, pad = 640, 320, 48
    values = [v for vs in series.values() for v in vs if math.isfinite(v)]
    lo, hi = (min(values), max(values)) if values else (0.0, 1.0)
    if hi == lo:
        hi = lo + 1.0
    n = max(len(names) - 1, 1)

    def xy(i: int, v: float) -> tuple[float, float]:
        return pad + (w - 2 * pad) * i / n, h - pad - (h - 2 * pad) * (v - lo) / (hi - lo)

    colours = ["#1f4e9c", "#b3261e", "#1e7b34", "#7a4fa0", "#a86b00"]
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{w}" height="{h}" viewBox="0 0 {w} {h}">',
        f"<title>dxfcheck revision history ({unit})</title>",
        f'<rect width="{w}" height="{h}" fill="white"/>',
        f'<line x1="{pad}" y1="{h - pad}" x2="{w - pad}" y2="{h - pad}" stroke="black"/>',
        f'<line x1="{pad}" y1="{pad}" x2="{pad}" y2="{h - pad}" stroke="black"/>',
        f'<text x="4" y="{pad - 8}" font-size="12">{hi:.4g} {unit}</text>',
        f'<text x="4" y="{h - pad + 4}" font-size="12">{lo:.4g}</text>',
    ]
    for i, name in enumerate(names):
        x, _ = xy(i, lo)
        parts.append(f'<text x="{x:.1f}" y="{h - pad + 18}" font-size="11" text-anchor="middle">{name}</text>')
    for k, (label, vs) in enumerate(series.items()):
        col = colours[k % len(colours)]
        pts = " ".join(f"{xy(i, v)[0]:.1f},{xy(i, v)[1]:.1f}" for i, v in enumerate(vs) if math.isfinite(v))
        parts.append(f'<polyline points="{pts}" fill="none" stroke="{col}" stroke-width="2"/>')
        parts.append(f'<text x="{w - pad + 4}" y="{pad + 14 * k}" font-size="11" fill="{col}">{label}</text>')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def mark_revision(comp: Comparison, out: str | os.PathLike[str], config: Config, *, force: bool = False) -> None:
    """Write the newer revision marked up (as ``annotate`` does), plus a ring
    and a note at every pin that moved and every pin force that crossed the
    threshold.  Neither revision's file is written."""
    from dxfcheck.files import atomic_target
    from dxfcheck.markup import TEXT_FRACTION, TEXT_MIN_MM, marked_document, plan_markup

    sol = comp.new.nominal
    mech = sol.mechanism
    doc = marked_document(sol, [plan_markup(sol)], config)
    k = 1.0 / mech.drawing.mm_per_unit
    h = max(TEXT_MIN_MM, TEXT_FRACTION * (2 * mech.drum.radius_mm if mech.drum else mech.length_scale_mm / 4))
    msp = doc.modelspace()
    pins = {p.name: p for p in mech.pins}
    for c in comp.changes:
        pin = pins.get(c.name)
        if pin is None or not (c.kind == "moved" or (c.kind == "pin" and c.crossed)):
            continue
        x, y = pin.center
        text = c.note if c.kind == "moved" else f"{c.name} {c.direction}: force {100 * (c.rel_change or 0):+.1f}%"
        msp.add_circle((x * k, y * k), 1.5 * pin.diameter_mm * k, dxfattribs={"layer": config.note_layer})
        msp.add_text(
            text, height=h * k, dxfattribs={"layer": config.note_layer, "insert": ((x + h) * k, (y - 2 * h) * k)}
        )
    with atomic_target(out, force=force, protect=(mech.drawing.path, comp.old.mechanism.drawing.path)) as tmp:
        doc.saveas(tmp)
