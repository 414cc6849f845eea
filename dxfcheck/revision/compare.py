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
a torque drop or a force rise into a failure; without one given, the stated
defaults :data:`DEFAULT_MAX_TORQUE_DROP` and :data:`DEFAULT_MAX_FORCE_RISE`
apply.  The geometry is compared too: pins moved, parts whose pins moved
apart or whose centreline changed, loads moved, turned or changed in
magnitude, spring ends moved, linings and bands re-drawn, the drum changed.

Two drawings that share too little to be revisions of one brake (fewer than
half of the smaller one's pins or parts matched) are refused
(:class:`RevisionMismatch`) rather than compared.

References
----------
.. [1] W. Kabsch, "A solution for the best rotation to relate two sets of
   vectors", *Acta Crystallographica* A32 (1976), 922-923.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import field
from typing import Any

from dxfcheck.core.errors import ConfigError, DxfcheckError
from dxfcheck.core.geometry import Affine, Point, dist, point_segment_distance
from dxfcheck.core.records import record
from dxfcheck.core.textsafe import xml_text
from dxfcheck.gate.rules import Judgement, Verdict
from dxfcheck.gate.spec import Spec
from dxfcheck.mechanism import Load, Mechanism, Part, Spring
from dxfcheck.statics import CaseSolution

__all__ = [
    "DEFAULT_MAX_FORCE_RISE",
    "DEFAULT_MAX_TORQUE_DROP",
    "GEOMETRY_KINDS",
    "MATCH_RTOL",
    "Change",
    "Comparison",
    "RevisionMismatch",
    "Thresholds",
    "compare_judgements",
    "format_cell",
    "history_svg",
    "parse_fraction",
    "required_torque",
    "resolve_thresholds",
    "rigid_motion",
    "trend_svg",
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
#: A load's direction or a lining's position that turned by less than this
#: is unchanged [degrees].
ANGLE_TOL_DEG = 0.01
#: Points sampled along each centreline segment when comparing shapes.
SHAPE_SAMPLES = 16
#: Revisions match when at least this fraction of the smaller revision's
#: pins, and of its parts, are matched.
MIN_MATCHED_FRACTION = 0.5

#: Default limit on a revision's braking-torque drop [fraction]: 5 %
#: (common practice for a design-review gate: a drop within the scatter of
#: the friction coefficient passes, a larger one is looked at).
DEFAULT_MAX_TORQUE_DROP = 0.05
#: Default limit on a revision's rise of any pin, member, shoe or band force
#: [fraction]: 10 % (common practice, in the order of the margins left by the
#: usual safety factors on pins and links).
DEFAULT_MAX_FORCE_RISE = 0.10
#: Where the defaults come from, as the report says.
DEFAULT_SOURCE = "default, common practice"


class RevisionMismatch(DxfcheckError):
    """The drawings share too little to be revisions of one brake."""


@record(frozen=True)
class Thresholds:
    """Limits on a revision [fractions]: ``max_torque_drop`` (0.05 is 5 %),
    ``max_force_rise`` for pins, members, shoes and bands; None switches a
    limit off.  The defaults are :data:`DEFAULT_MAX_TORQUE_DROP` and
    :data:`DEFAULT_MAX_FORCE_RISE`; ``*_source`` say where each came from."""

    max_torque_drop: float | None = DEFAULT_MAX_TORQUE_DROP
    max_force_rise: float | None = DEFAULT_MAX_FORCE_RISE
    torque_drop_source: str = DEFAULT_SOURCE
    force_rise_source: str = DEFAULT_SOURCE

    def describe(self) -> str:
        """One line for the report."""

        def one(what: str, v: float | None, src: str) -> str:
            return f"{what} {'off' if v is None else f'{100 * v:g} %'} ({src})"

        return (
            f"thresholds: {one('torque drop', self.max_torque_drop, self.torque_drop_source)}, "
            f"{one('force rise', self.max_force_rise, self.force_rise_source)}"
        )


#: Option texts that switch a threshold off.
OFF_WORDS = ("none", "off")


def parse_fraction(text: str, what: str) -> float | None:
    """``"5%"`` or ``"0.05"`` -> 0.05; ``"none"``/``"off"`` -> None.

    Raises
    ------
    ConfigError
        Naming ``what`` (the option) and the text.
    """
    t = text.strip()
    if t.lower() in OFF_WORDS:
        return None
    try:
        value = float(t[:-1]) / 100 if t.endswith("%") else float(t)
    except ValueError:
        raise ConfigError(f"{what}: {text!r} is not a fraction or a percentage such as 5% (or 'none')") from None
    if not 0 <= value < math.inf:
        raise ConfigError(f"{what}: {text!r} must be a finite fraction, not negative")
    return value


def resolve_thresholds(torque_drop: str | None, force_rise: str | None, spec: Spec) -> Thresholds:
    """The thresholds of a compare run: the option text, else the newest
    revision's spec key (``max_torque_drop``, ``max_force_rise``), else the
    stated default; each with its source."""

    def pick(text: str | None, option: str, key: str, default: float) -> tuple[float | None, str]:
        if text is not None:
            return parse_fraction(text, option), option
        v = spec.get(key)
        if v is not None:
            return float(v.value), f"spec key {key}, {v.source}"
        return default, DEFAULT_SOURCE

    drop, drop_src = pick(torque_drop, "--max-torque-drop", "max_torque_drop", DEFAULT_MAX_TORQUE_DROP)
    rise, rise_src = pick(force_rise, "--max-force-rise", "max_force_rise", DEFAULT_MAX_FORCE_RISE)
    return Thresholds(drop, rise, drop_src, rise_src)


@record(frozen=True)
class Change:
    """One quantity's change between revisions.

    Attributes
    ----------
    kind : str
        Forces per direction: ``torque``, ``pin``, ``member``, ``shoe``,
        ``band``; ``rule``; geometry: ``moved`` (a pin), ``diameter`` (a
        pin's), ``part`` (a span between two of its pins, its centreline
        length or shape), ``load`` (point, direction, force), ``spring``
        (an end, its length, force, sense), ``lining`` (a shoe's contact
        angle or position), ``wrap`` (a band's), ``drum``; ``added``,
        ``removed``.
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
    at_mm : Point or None
        Where the change is in the newer revision [mm] (a geometry change's
        pin, load point, spring end, lining middle...), for the mark-up.
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
    at_mm: Point | None = None


@record(frozen=True)
class Comparison:
    """The changes from ``old`` to ``new``."""

    old: Judgement
    new: Judgement
    motion: Affine
    motion_source: str
    pin_map: dict[str, str]
    changes: tuple[Change, ...] = field(default=())
    thresholds: Thresholds = field(default_factory=Thresholds)
    part_map: dict[str, str] = field(default_factory=dict)

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
    """Match two solved revisions and list what changed.

    Raises
    ------
    RevisionMismatch
        When fewer than half of the smaller revision's pins, or of its
        parts, can be matched: the drawings are not revisions of one brake.
    """
    mo, mn = old.mechanism, new.mechanism
    motion, how = rigid_motion(mo, mn)
    pin_map = _match_pins(mo, mn, motion)
    part_map = _match_named(
        [p.name for p in mo.parts],
        [p.name for p in mn.parts],
        {p.name: frozenset(p.pins) for p in mo.parts},
        {p.name: frozenset(p.pins) for p in mn.parts},
        pin_map,
        mo.labelled_names & mn.labelled_names,
    )
    _require_related(mo, mn, pin_map, part_map, how)
    changes: list[Change] = []
    changes += _geometry_changes(mo, mn, motion, pin_map)
    changes += [Change("removed", p.name, "", "part", None, "") for p in mo.parts if p.name not in part_map]
    changes += [Change("added", p.name, "", None, "part", "") for p in mn.parts if p.name not in part_map.values()]
    tol = max(mo.tolerance_mm, mn.tolerance_mm)
    changes += _part_changes(mo, mn, motion, pin_map, part_map, tol)
    changes += _load_changes(mo, mn, motion, part_map, tol)
    changes += _spring_changes(mo, mn, motion, part_map, tol)
    changes += _drum_changes(mo, mn, motion, part_map, tol)
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
    return Comparison(old, new, motion, how, pin_map, tuple(kept), thresholds, part_map)


def _require_related(mo: Mechanism, mn: Mechanism, pin_map: dict[str, str], part_map: dict[str, str], how: str) -> None:
    """Refuse two drawings that share too little to be one brake's
    revisions (nothing would be compared but added and removed items)."""
    short: list[str] = []
    for what, n_old, n_new, n_matched in (
        ("pins", len(mo.pins), len(mn.pins), len(pin_map)),
        ("parts", len(mo.parts), len(mn.parts), len(part_map)),
    ):
        smaller = min(n_old, n_new)
        if n_matched < MIN_MATCHED_FRACTION * smaller or (smaller and not n_matched):
            short.append(f"{n_matched} of {n_old} {what} matched ({n_new} in the newer)")
    if not short:
        return
    old_pins = ", ".join(p.name for p in mo.pins) or "none"
    new_pins = ", ".join(p.name for p in mn.pins) or "none"
    raise RevisionMismatch(
        f"{mo.drawing.path} and {mn.drawing.path} do not look like revisions of one brake: "
        f"{'; '.join(short)}, by label or by position after the rigid motion ({how}); "
        f"pins {old_pins} against {new_pins}. Compare revisions of one drawing, or label the pins and parts "
        f"alike in both (at least {100 * MIN_MATCHED_FRACTION:g} % of the smaller revision's must match)",
        path=mn.drawing.path,
    )


def _geometry_changes(mo: Mechanism, mn: Mechanism, motion: Affine, pin_map: dict[str, str]) -> list[Change]:
    """Each pin moved (after the rigid motion) or resized; the pins removed
    and added."""
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
            out.append(_moved("moved", q.name, moved, f"{p.name} moved {moved:.4g} mm", q.center))
        if abs(q.diameter_mm - p.diameter_mm) > mn.tolerance_mm:
            out.append(_resized("diameter", q.name, p.diameter_mm, q.diameter_mm, "mm", "", q.center))
    matched = set(pin_map.values())
    out += [
        Change("added", q.name, "", None, "pivot" if q.grounded else "pin", "")
        for q in mn.pins
        if q.name not in matched
    ]
    return out


def _mid(a: Point, b: Point) -> Point:
    return (0.5 * (a[0] + b[0]), 0.5 * (a[1] + b[1]))


def _far_end(part: Part) -> Point:
    """A point to mark a part by: its centreline point farthest from its
    first point (the other end, for a straight lever)."""
    pts = part.points
    return max(pts, key=lambda q: dist(q, pts[0]))


def _part_length(part: Part) -> float:
    return sum(dist(a, b) for a, b in part.segments)


def _samples(segments: Sequence[tuple[Point, Point]]) -> list[Point]:
    n = SHAPE_SAMPLES
    return [(a[0] + (b[0] - a[0]) * k / n, a[1] + (b[1] - a[1]) * k / n) for a, b in segments for k in range(n + 1)]


def _shape_distance(a: Sequence[tuple[Point, Point]], b: Sequence[tuple[Point, Point]]) -> float:
    """How far two centrelines lie apart: the larger of the two one-sided
    largest distances (Hausdorff distance), from points sampled along each
    segment [mm]."""

    def one_way(src: Sequence[tuple[Point, Point]], dst: Sequence[tuple[Point, Point]]) -> float:
        return max(min(point_segment_distance(p, u, v) for u, v in dst) for p in _samples(src))

    return max(one_way(a, b), one_way(b, a))


def _moved(kind: str, label: str, d: float, note: str, at: Point) -> Change:
    """A point that moved ``d`` [mm] (after the rigid motion)."""
    return Change(kind, label, "", 0.0, d, "mm", d, None, note=note, at_mm=at)


def _resized(kind: str, label: str, old: float, new: float, unit: str, note: str, at: Point | None) -> Change:
    """A size (a length, a force) that changed from ``old`` to ``new``."""
    return Change(kind, label, "", old, new, unit, new - old, _rel(old, new), note=note, at_mm=at)


def _force_differs(fo: float, fn: float) -> bool:
    """Two forces [N] differ beyond rounding."""
    return abs(fn - fo) > UNCHANGED_RTOL * max(abs(fo), abs(fn))


def _renamed(old: str, new: str) -> str:
    """A matched item's name in the newer revision, with its old one if it changed."""
    return new if old == new else f"{new} (was {old})"


def _unpaired(what: str, olds: Sequence[Any], news: Sequence[Any], pairs: list[tuple[Any, Any]]) -> list[Change]:
    """The old items left unpaired (removed), then the new ones (added)."""
    paired_old = {id(a) for a, _ in pairs}
    paired_new = {id(b) for _, b in pairs}
    out = [Change("removed", x.name, "", what, None, "") for x in olds if id(x) not in paired_old]
    out += [Change("added", x.name, "", None, what, "") for x in news if id(x) not in paired_new]
    return out


def _part_changes(
    mo: Mechanism, mn: Mechanism, motion: Affine, pin_map: dict[str, str], part_map: dict[str, str], tol: float
) -> list[Change]:
    """Per matched part: the span between each two of its matched pins, its
    centreline length, and, when neither changed, its centreline's shape or
    place (the largest distance between the old one, moved by the rigid
    motion, and the new one)."""
    out: list[Change] = []
    pins = ({p.name: p.center for p in mo.pins}, {p.name: p.center for p in mn.pins})
    for po in mo.parts:
        name = part_map.get(po.name)
        if name is None:
            continue
        pn = mn.part(name)
        found = _span_changes(name, po, pn, pin_map, pins, tol)
        l_old, l_new = _part_length(po), _part_length(pn)
        if abs(l_new - l_old) > tol:
            note = f"{name}: centreline {l_old:.4g} -> {l_new:.4g} mm long"
            found.append(_resized("part", f"{name} length", l_old, l_new, "mm", note, _far_end(pn)))
        if not found:
            found = _centreline_changes(name, po, pn, motion, tol)
        out += found
    return out


def _span_changes(
    name: str,
    po: Part,
    pn: Part,
    pin_map: dict[str, str],
    pins: tuple[dict[str, Point], dict[str, Point]],
    tol: float,
) -> list[Change]:
    """The span between each two of a part's matched pins (``pins``: the old
    and new pin centres by name [mm])."""
    old_pins, new_pins = pins
    found: list[Change] = []
    mapped = [(a, pin_map[a]) for a in po.pins if a in pin_map and pin_map[a] in pn.pins]
    for i, (a, a2) in enumerate(mapped):
        for b, b2 in mapped[i + 1 :]:
            d_old = dist(old_pins[a], old_pins[b])
            d_new = dist(new_pins[a2], new_pins[b2])
            if abs(d_new - d_old) > tol:
                note = f"{name}: {a2} to {b2} {d_old:.4g} -> {d_new:.4g} mm"
                at = _mid(new_pins[a2], new_pins[b2])
                found.append(_resized("part", f"{name} {a2}–{b2}", d_old, d_new, "mm", note, at))
    return found


def _centreline_changes(name: str, po: Part, pn: Part, motion: Affine, tol: float) -> list[Change]:
    """A part's centreline moved or re-shaped: the largest distance between
    the old one, moved by the rigid motion, and the new one [mm]."""
    moved = [(motion.apply(a), motion.apply(b)) for a, b in po.segments]
    h = _shape_distance(moved, pn.segments)
    if h <= tol:
        return []
    return [
        _moved(
            "part", f"{name} centreline", h, f"{name}: centreline moved or re-shaped, up to {h:.4g} mm", _far_end(pn)
        )
    ]


def _angle_deg(v: Point) -> float:
    return math.degrees(math.atan2(v[1], v[0]))


def _turn_deg(u: Point, v: Point) -> float:
    """Signed angle from ``u`` to ``v`` [degrees], counter-clockwise positive."""
    return math.degrees(math.atan2(u[0] * v[1] - u[1] * v[0], u[0] * v[0] + u[1] * v[1]))


def _pair_up(
    olds: Sequence[Any], news: Sequence[Any], key: Any, where_old: Any, where_new: Any, reach: float
) -> list[tuple[Any, Any]]:
    """Pairs of old and new items: same ``key`` first (nearest first), then
    the nearest of the rest within ``reach`` [mm]."""
    cands = []
    for i, a in enumerate(olds):
        for j, b in enumerate(news):
            d = dist(where_old(a), where_new(b))
            same = key(a) is not None and key(a) == key(b, new=True)
            if same or d <= reach:
                cands.append((0 if same else 1, d, i, j))
    pairs: list[tuple[Any, Any]] = []
    used_i: set[int] = set()
    used_j: set[int] = set()
    for _, _, i, j in sorted(cands):
        if i not in used_i and j not in used_j:
            pairs.append((olds[i], news[j]))
            used_i.add(i)
            used_j.add(j)
    return pairs


def _load_changes(mo: Mechanism, mn: Mechanism, motion: Affine, part_map: dict[str, str], tol: float) -> list[Change]:
    """Loads matched by their part, then by place: point moved, direction
    turned, magnitude changed, part changed; the rest added or removed."""

    def key(ld: Load, new: bool = False) -> str | None:
        return ld.part if new else part_map.get(ld.part or "")

    pairs = _pair_up(
        mo.loads, mn.loads, key, lambda ld: motion.apply(ld.point), lambda ld: ld.point, MATCH_RTOL * mn.length_scale_mm
    )
    out: list[Change] = []
    for lo, ln in pairs:
        name = _renamed(lo.name, ln.name)
        out += _load_place_changes(name, lo, ln, motion, tol)
        fo, fn = lo.magnitude_N, ln.magnitude_N
        if fo is not None and fn is not None and _force_differs(fo, fn):
            out.append(_resized("load", f"{name} force", fo, fn, "N", f"{name}: {lo.text} -> {ln.text}", ln.point))
        if key(lo) != ln.part:
            out.append(
                Change(
                    "load",
                    f"{name} part",
                    "",
                    lo.part,
                    ln.part,
                    "",
                    note=f"{name}: now acts on {ln.part}",
                    at_mm=ln.point,
                )
            )
    return out + _unpaired("load", mo.loads, mn.loads, pairs)


def _load_place_changes(name: str, lo: Load, ln: Load, motion: Affine, tol: float) -> list[Change]:
    """A matched load's point moved [mm] and its direction turned
    [degrees, counter-clockwise positive], after the rigid motion."""
    out: list[Change] = []
    d = dist(motion.apply(lo.point), ln.point)
    if d > tol:
        x, y = ln.point
        out.append(_moved("load", f"{name} point", d, f"{name}: moved {d:.4g} mm to ({x:.6g}, {y:.6g})", ln.point))
    was = motion.apply_vector(lo.direction)
    turn = _turn_deg(was, ln.direction)
    if abs(turn) > ANGLE_TOL_DEG:
        out.append(
            Change(
                "load",
                f"{name} direction",
                "",
                _angle_deg(was),
                _angle_deg(ln.direction),
                "deg",
                turn,
                None,
                note=f"{name}: turned {turn:+.4g}° (counter-clockwise positive)",
                at_mm=ln.point,
            )
        )
    return out


def _spring_changes(mo: Mechanism, mn: Mechanism, motion: Affine, part_map: dict[str, str], tol: float) -> list[Change]:
    """Springs matched by the parts they join, then by place: each end
    moved, the drawn length, the force and the sense; the rest added or
    removed."""

    def key(sp: Spring, new: bool = False) -> frozenset[str] | None:
        names = [p or "frame" for p in sp.parts] if new else [part_map.get(p, "?") if p else "frame" for p in sp.parts]
        return frozenset(names)

    pairs = _pair_up(
        mo.springs,
        mn.springs,
        key,
        lambda sp: motion.apply(_mid(*sp.ends)),
        lambda sp: _mid(*sp.ends),
        MATCH_RTOL * mn.length_scale_mm,
    )
    out: list[Change] = []
    for so, sn in pairs:
        name = _renamed(so.name, sn.name)
        out += _spring_end_changes(name, so, sn, motion, tol)
        out += _spring_size_changes(name, so, sn, tol)
    return out + _unpaired("spring", mo.springs, mn.springs, pairs)


def _spring_end_changes(name: str, so: Spring, sn: Spring, motion: Affine, tol: float) -> list[Change]:
    """Each end of a matched spring that moved [mm], after the rigid motion;
    the old ends are paired with the new ones the nearer way round."""
    a, b = (motion.apply(q) for q in so.ends)
    ends = (a, b) if dist(a, sn.ends[0]) + dist(b, sn.ends[1]) <= dist(a, sn.ends[1]) + dist(b, sn.ends[0]) else (b, a)
    out: list[Change] = []
    for k in range(2):
        d = dist(ends[k], sn.ends[k])
        if d > tol:
            on = sn.parts[k] or "frame"
            x, y = sn.ends[k]
            note = f"{name}: its end on {on} moved {d:.4g} mm to ({x:.6g}, {y:.6g})"
            out.append(_moved("spring", f"{name} end on {on}", d, note, sn.ends[k]))
    return out


#: A spring's sense by its ``tension`` flag.
_SENSE = {True: "tension", False: "compression"}


def _spring_size_changes(name: str, so: Spring, sn: Spring, tol: float) -> list[Change]:
    """A matched spring's drawn length [mm], force [N] and sense."""
    out: list[Change] = []
    at = _mid(*sn.ends)
    l_old, l_new = dist(*so.ends), dist(*sn.ends)
    if abs(l_new - l_old) > tol:
        out.append(
            _resized(
                "spring", f"{name} length", l_old, l_new, "mm", f"{name}: drawn {l_old:.4g} -> {l_new:.4g} mm long", at
            )
        )
    fo, fn = so.force_N, sn.force_N
    if fo is not None and fn is not None and _force_differs(fo, fn):
        out.append(_resized("spring", f"{name} force", fo, fn, "N", f"{name}: {so.text} -> {sn.text}", at))
    if so.tension != sn.tension:
        sense_old, sense_new = _SENSE[so.tension], _SENSE[sn.tension]
        out.append(
            Change("spring", f"{name} sense", "", sense_old, sense_new, "", note=f"{name}: sense changed", at_mm=at)
        )
    return out


def _drum_changes(mo: Mechanism, mn: Mechanism, motion: Affine, part_map: dict[str, str], tol: float) -> list[Change]:
    """The drum's radius and axis, each shoe's contact angle and position on
    the drum, each band's wrap."""
    out: list[Change] = []
    if mo.drum is not None and mn.drum is not None:
        ro, rn, at = mo.drum.radius_mm, mn.drum.radius_mm, mn.drum.center
        if abs(rn - ro) > tol:
            out.append(Change("drum", "drum radius", "", ro, rn, "mm", rn - ro, _rel(ro, rn), at_mm=at))
        d = dist(motion.apply(mo.drum.center), at)
        if d > tol:
            out.append(
                Change("drum", "drum axis", "", 0.0, d, "mm", d, None, note=f"drum axis moved {d:.4g} mm", at_mm=at)
            )
    out += _lining_changes(mo, mn, motion, part_map)
    new_bands = {b.name: b for b in mn.bands}
    for bo in mo.bands:
        bn = new_bands.get(bo.name)
        if bn is not None and abs(bn.wrap_deg - bo.wrap_deg) > ANGLE_TOL_DEG:
            w_old, w_new = bo.wrap_deg, bn.wrap_deg
            out.append(Change("wrap", f"{bn.name} wrap", "", w_old, w_new, "deg", w_new - w_old, _rel(w_old, w_new)))
    return out


def _lining_changes(mo: Mechanism, mn: Mechanism, motion: Affine, part_map: dict[str, str]) -> list[Change]:
    """Each matched shoe's contact angle, and where its lining's middle sits
    on the drum (after the rigid motion's turn) [degrees]."""
    out: list[Change] = []
    turn = _angle_deg(motion.apply_vector((1.0, 0.0)))
    for so in mo.shoes:
        sn = next((t for t in mn.shoes if part_map.get(so.part) == t.part), None)
        if sn is None:
            continue
        at = sn.arc.point_at(sn.arc.mid_deg)
        a_old, a_new = so.contact_angle_deg, sn.contact_angle_deg
        if abs(a_new - a_old) > ANGLE_TOL_DEG:
            name = f"{sn.name} contact angle"
            out.append(Change("lining", name, "", a_old, a_new, "deg", a_new - a_old, _rel(a_old, a_new), at_mm=at))
        shift = (sn.arc.mid_deg - (so.arc.mid_deg + turn) + 180.0) % 360.0 - 180.0
        if abs(shift) > ANGLE_TOL_DEG:
            note = f"{sn.name}: lining's middle turned {shift:+.4g}° about the drum axis"
            out.append(Change("lining", f"{sn.name} position", "", 0.0, shift, "deg", shift, None, note=note, at_mm=at))
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


def format_cell(v: object) -> str:
    """A value as a change lists it: 5 figures, ``-`` for none."""
    return f"{v:.5g}" if isinstance(v, float) else "-" if v is None else str(v)


def _m(x: float | None) -> str:
    if x is None:
        return "-"
    return "∞" if x == math.inf else f"{x:.3g}"


#: Kinds of geometry change: the causes, listed before the forces they change.
GEOMETRY_KINDS = ("moved", "diameter", "part", "load", "spring", "lining", "wrap", "drum")


def _order(c: Change) -> tuple[int, float]:
    """Threshold crossings and verdict changes first, then what was added or
    removed, then the geometry changes, then the rest by relative change."""
    if c.crossed or c.note == "verdict changed":
        return (0, 0.0)
    if c.kind in ("added", "removed"):
        return (1, 0.0)
    if c.kind in GEOMETRY_KINDS:
        return (2, 0.0)
    r = abs(c.rel_change) if c.rel_change is not None and math.isfinite(c.rel_change) else 0.0
    return (3, -r)


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
        "at_mm": None if c.at_mm is None else [c.at_mm[0], c.at_mm[1]],
    }


#: Estimated advance width of a character in the plot's sans-serif font
#: [em]: wider than Arial's digits (0.556 em) and most of its letters, so a
#: text's estimated box holds the drawn one (from memory; common practice).
CHAR_EM = 0.7
#: Ascent and descent of the font [em] for the same estimate.
ASCENT_EM, DESCENT_EM = 0.8, 0.25
#: The value axis is broken (drawn from a round value below the data, with a
#: break mark above zero) when the smallest value is above this fraction of
#: the largest; otherwise it starts at zero.
BREAK_FRACTION = 0.5


def _nice_step(span: float, n: int = 5) -> float:
    raw = span / n if span > 0 else 1.0
    mag = 10.0 ** math.floor(math.log10(raw))
    return next(m * mag for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * mag >= raw)


def _ticks(lo: float, hi: float) -> list[float]:
    step = _nice_step(hi - lo)
    first = math.floor(lo / step) * step
    out = [first]
    while out[-1] < hi - 1e-9 * step:
        out.append(first + len(out) * step)
    return out


def _text_width(text: str, size: float) -> float:
    return CHAR_EM * size * len(text)


def _esc(text: str) -> str:
    from xml.sax.saxutils import escape

    return escape(xml_text(text), {'"': "&quot;"})  # file names and labels: < & " escaped, controls shown


#: Font sizes of the plot's texts [px]: ticks, step names, legend, title.
FS_TICK, FS_NAME, FS_LEGEND, FS_TITLE = 12.0, 11.0, 11.0, 13.0
#: Widest plot area before step names are thinned out [px].
MAX_PLOT_W = 960.0
#: Colours of the plotted series, in turn.
COLOURS = ("#1f4e9c", "#b3261e", "#1e7b34", "#7a4fa0", "#a86b00")


@record(frozen=True)
class _Frame:
    """The plot's layout [px]: margins, plot area, value range, steps."""

    left: float
    top: float
    plot_w: float
    plot_h: float
    gap: float  # height of the axis break (0 without one)
    width: float
    height: float
    lo: float
    hi: float
    steps: int

    def x(self, i: int) -> float:
        return self.left + (self.plot_w * i / (self.steps - 1) if self.steps > 1 else self.plot_w / 2)

    def y(self, v: float) -> float:
        return self.top + self.plot_h * (self.hi - v) / (self.hi - self.lo)

    @property
    def axis_y(self) -> float:
        """The x axis, below the break when there is one."""
        return self.top + self.plot_h + self.gap


def _frame(names: Sequence[str], ticks: list[float], legend: list[str], title: str, broken: bool) -> tuple[_Frame, int]:
    """The layout that holds every text, and every how-many-th step name is
    written (names that would overlap are thinned out)."""
    name_w = [_text_width(n, FS_NAME) for n in names] or [0.0]
    gaps = max(len(names) - 1, 1)
    step_x = max(70.0, max(name_w) + 14.0)
    every = max(1, math.ceil(step_x * gaps / MAX_PLOT_W))
    plot_w = min(max(420.0, step_x * gaps), MAX_PLOT_W)
    left = max(20.0 + max(_text_width(f"{t:.6g}", FS_TICK) for t in ticks), name_w[0] / 2 + 8.0)
    right = max(56.0 + max((_text_width(t, FS_LEGEND) for t in legend), default=0.0), name_w[-1] / 2 + 8.0)
    top, plot_h, gap = 32.0 + FS_TITLE, 240.0, (18.0 if broken else 0.0)
    bottom = 20.0 + (ASCENT_EM + DESCENT_EM) * FS_NAME
    width = max(left + plot_w + right, left + _text_width(title, FS_TITLE) + 8.0)
    lo, hi = ticks[0], ticks[-1] if ticks[-1] > ticks[0] else ticks[0] + 1.0
    return _Frame(left, top, plot_w, plot_h, gap, width, top + plot_h + gap + bottom, lo, hi, len(names)), every


def _axes(f: _Frame, ticks: list[float], broken: bool) -> list[str]:
    """Both axes, the value ticks with their grid lines, and the break mark
    above a zero tick when the scale does not start at zero."""
    r, ax = f.left + f.plot_w, f.axis_y
    out = [
        f'<line class="x-axis" x1="{f.left:.1f}" y1="{ax:.1f}" x2="{r:.1f}" y2="{ax:.1f}" stroke="black"/>',
        f'<line class="y-axis" x1="{f.left:.1f}" y1="{f.top:.1f}" x2="{f.left:.1f}" y2="{ax:.1f}" stroke="black"/>',
    ]
    for t in ticks:
        y = f.y(t)
        out.append(f'<line x1="{f.left - 4:.1f}" y1="{y:.1f}" x2="{f.left:.1f}" y2="{y:.1f}" stroke="black"/>')
        out.append(f'<line x1="{f.left:.1f}" y1="{y:.1f}" x2="{r:.1f}" y2="{y:.1f}" stroke="#dddddd"/>')
        out.append(_tick_text(f.left, y, f"{t:.6g}"))
    if broken:
        yb = f.top + f.plot_h + f.gap / 2
        zig = " ".join(f"{f.left + dx:.1f},{yb + dy:.1f}" for dx, dy in ((-6, 5), (6, 1), (-6, -1), (6, -5)))
        out.append(f'<rect x="{f.left - 7:.1f}" y="{yb - 4:.1f}" width="14" height="8" fill="white"/>')
        out.append(f'<polyline class="axis-break" points="{zig}" fill="none" stroke="black"/>')
        out.append(_tick_text(f.left, f.axis_y, "0"))
    return out


def _tick_text(left: float, y: float, text: str) -> str:
    return (
        f'<text class="tick" x="{left - 6:.1f}" y="{y + 0.35 * FS_TICK:.1f}" font-size="{FS_TICK:g}" '
        f'text-anchor="end">{text}</text>'
    )


def _required_line(f: _Frame, req: list[float | None]) -> str:
    """The required value: one horizontal line when it is the same for every
    step, else a line through each step's value."""
    pts_v = [(f.x(i), v) for i, v in enumerate(req) if v is not None and math.isfinite(v)]
    if len(pts_v) == f.steps and len({round(v, 9) for _, v in pts_v}) == 1:
        y = f.y(pts_v[0][1])
        pts = f"{f.left:.2f},{y:.2f} {f.left + f.plot_w:.2f},{y:.2f}"
    else:
        pts = " ".join(f"{x:.2f},{f.y(v):.2f}" for x, v in pts_v)
    return f'<polyline class="required" points="{pts}" fill="none" stroke="black" stroke-dasharray="6 4"/>'


def history_svg(
    names: Sequence[str],
    series: dict[str, list[float]],
    unit: str,
    *,
    required: Sequence[float | None] | float | None = None,
    title: str = "braking torque",
) -> str:
    """A line plot of quantities over labelled steps (revisions, or μ
    values), as SVG text.

    The value axis starts at zero, or, when every value lies far above zero
    (:data:`BREAK_FRACTION`), at a round value below them with a break mark
    on the axis above a zero tick.  ``required`` (one value, or one per
    step) is drawn as a dashed line.  The size of the picture follows its
    texts, estimated at :data:`CHAR_EM` per character, so that no label is
    clipped.
    """
    req = list(required) if isinstance(required, Sequence) else [required] * len(names)
    req_vals = [v for v in req if v is not None and math.isfinite(v)]
    values = [v for vs in series.values() for v in vs if math.isfinite(v)] + req_vals
    hi_data, lo_data = max(values, default=1.0), min(values, default=0.0)
    broken = lo_data > 0 and lo_data > BREAK_FRACTION * hi_data
    ticks = _ticks(lo_data if broken else min(0.0, lo_data), max(hi_data, lo_data + 1e-12))
    legend = [f"{k} ({unit})" for k in series]
    if req_vals:
        same = max(req_vals) - min(req_vals) <= 1e-9 * max(abs(v) for v in req_vals)
        legend.append(f"required {req_vals[0]:.5g} {unit}" if same else f"required ({unit})")
    heading = f"{title} [{unit}]"
    f, every = _frame(names, ticks, legend, heading, broken)
    desc = "; ".join(f"{k}: " + ", ".join(f"{v:.6g}" for v in vs) for k, vs in series.items())
    if req_vals:
        desc += "; required: " + ", ".join("-" if v is None else f"{v:.6g}" for v in req)
    parts = [
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{f.width:.1f}" height="{f.height:.1f}" '
        f'viewBox="0 0 {f.width:.1f} {f.height:.1f}" font-family="sans-serif">',
        f"<title>dxfcheck: {_esc(title)} ({_esc(unit)})</title>",
        f"<desc>{_esc(desc)}</desc>",
        f'<rect width="{f.width:.1f}" height="{f.height:.1f}" fill="white"/>',
        f'<text x="{f.left:.1f}" y="24.0" font-size="{FS_TITLE:g}">{_esc(heading)}</text>',
        *_axes(f, ticks, broken),
    ]
    y_name = f.axis_y + 10 + ASCENT_EM * FS_NAME
    parts += [
        f'<text class="name" x="{f.x(i):.1f}" y="{y_name:.1f}" font-size="{FS_NAME:g}" '
        f'text-anchor="middle">{_esc(name)}</text>'
        for i, name in enumerate(names)
        if i % every == 0 or i == len(names) - 1
    ]
    lx = f.left + f.plot_w + 20.0
    for k, vs in enumerate(series.values()):
        col = COLOURS[k % len(COLOURS)]
        pts = " ".join(f"{f.x(i):.2f},{f.y(v):.2f}" for i, v in enumerate(vs) if math.isfinite(v))
        parts.append(f'<polyline class="series" points="{pts}" fill="none" stroke="{col}" stroke-width="2"/>')
        parts += _legend_entry(lx, f.top + 6 + 18 * k, legend[k], col, "")
    if req_vals:
        parts.append(_required_line(f, req))
        parts += _legend_entry(lx, f.top + 6 + 18 * len(series), legend[-1], "black", ' stroke-dasharray="6 4"')
    parts.append("</svg>")
    return "\n".join(parts) + "\n"


def _legend_entry(x: float, y: float, text: str, colour: str, dash: str) -> list[str]:
    return [
        f'<line x1="{x:.1f}" y1="{y:.1f}" x2="{x + 20:.1f}" y2="{y:.1f}" stroke="{colour}" stroke-width="2"{dash}/>',
        f'<text class="legend" x="{x + 26:.1f}" y="{y + 0.35 * FS_LEGEND:.1f}" font-size="{FS_LEGEND:g}" '
        f'fill="{colour}">{_esc(text)}</text>',
    ]


def required_torque(j: Judgement) -> float | None:
    """The torque the revision's spec requires [N·m]: the largest limit of
    its torque and hoist rules, None when the spec sets none."""
    limits = [
        r.limit
        for r in j.rules
        if r.rule.startswith(("torque.cw", "torque.ccw", "hoist."))
        and r.limit is not None
        and r.verdict is not Verdict.SKIP
    ]
    return max(limits, default=None)


def trend_svg(comps: Sequence[Comparison]) -> str:
    """The braking torque of each revision, per direction, with the required
    torque, as SVG text."""
    from pathlib import Path

    judgements = [comps[0].old, *(c.new for c in comps)] if comps else []
    names = [Path(j.mechanism.drawing.path).stem for j in judgements]
    series: dict[str, list[float]] = {}
    for j in judgements:
        for c in j.nominal.cases:
            series.setdefault(f"torque {c.direction}", []).append(c.torque_Nm)
    req = [required_torque(j) for j in judgements]
    return history_svg(names, series, "N·m", required=req, title="braking torque across revisions")
