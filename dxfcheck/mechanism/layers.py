"""Layer near misses: a role's entities drawn on a layer that has no role.

Pins drawn on ``PINS`` where the project reads ``PIN`` are not an error a
reader can see by itself: the pieces that met at the pins join rigidly, a
pivoted shoe becomes a fixed one, and the brake solves to a confident wrong
answer.  This module names such layers, from three kinds of evidence:

* the **name**: case-insensitive, singular or plural, with qualifying
  tokens around it (``BRK-DRUM``, ``DRUM-CL``, ``PIN_2``) or one typing slip
  (two for names of six letters and more);
* **pin-like circles**: circles on the layer whose centres sit exactly (within
  the "lies on" tolerance) where centrelines meet or cross with no pin, at an
  open centreline end, or at a band end that meets no pin;
* a **drum-like circle**: when no drum was read, a big circle concentric with
  the shoe or band arcs.

Each finding (``M223``) says which layers the role was searched on, where the
map came from, and the line of the ``[layers]`` table that would read the
layer.  A fixed shoe whose part has a pin-like circle where its shoe link
meets the rest gets its own warning (``M224``): the shoe may be meant to
turn on a pin there.  The reader keeps, cheaply, what this needs: the names
and entity kinds of layers with no role and the circles on them
(:class:`dxfcheck.read.drawing.LooseCircle`).

A name alone is evidence only while the role's own layers hold nothing: a
``DRUM-OUTLINE`` layer beside a drum on ``DRUM`` is an outline, and a
layer of ``PIN``-like name beside pins on ``PIN`` is flagged only where its
circles sit where a pin is missing.  Clutter layers (``DIM``, ``TEXT``,
``HATCH``, ``CENTER``, ``HIDDEN``, ``0``, ``DEFPOINTS``...) are not close to
any role's name.
"""

from __future__ import annotations

import math
import re
from collections import Counter
from collections.abc import Iterable, Sequence

from dxfcheck.core.config import CONFIG_NAME, DEFAULT_LAYERS, Role, table_name, toml_layers_line
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, angle_in_arc, cross, dist, point_segment_distance
from dxfcheck.core.records import record
from dxfcheck.infer.choice import SKELETON_ROLES
from dxfcheck.mechanism.model import Mechanism, Mounting
from dxfcheck.mechanism.plausibility import PIN_TO_DRUM
from dxfcheck.read.drawing import ROLE_KINDS, ArcGeom, Drawing, LooseCircle, PathGeom

__all__ = [
    "AFFIX_MAX_LEN",
    "AFFIX_TOKENS",
    "DRUM_LIKE_MIN_RATIO",
    "PIN_LIKE_MAX_EXTENT",
    "TYPO_EXEMPT",
    "NearMiss",
    "inference_json",
    "inferred_style",
    "layer_findings",
    "layer_map",
    "layers_json",
    "missing_role_note",
    "near_misses",
    "searched",
    "searched_line",
    "similar_role",
    "typo_distance",
]

#: Tokens that qualify a layer name without changing what it holds
#: (``BRK-DRUM``, ``PIN-NEW``), common practice in CAD layer naming.
AFFIX_TOKENS = frozenset(
    {"BRK", "BRAKE", "SKEL", "SKELETON", "KIN", "MECH", "NEW", "OLD", "REV", "COPY", "TMP", "TEMP", "ALT"}
)
#: Tokens of at most this many letters are qualifiers too (``-CL``, ``_A``,
#: ``-L``); digits always are (``PIN_2``).
AFFIX_MAX_LEN = 2
#: Common layer names never read as a slip in typing a role's name
#: (``LINE`` is one letter from ``LINK``).
TYPO_EXEMPT = frozenset({"LINE", "LINES", "LEAD"})
#: Without a drum, a pin-like circle is at most this fraction of the
#: skeleton's size across (with a drum, :data:`dxfcheck.mechanism.plausibility.PIN_TO_DRUM`
#: bounds it).
PIN_LIKE_MAX_EXTENT = 0.1
#: A drum-like circle's radius is at least this fraction of the shoe or band
#: arcs' radius it is concentric with ("a big circle"): a hub or a bolt
#: circle is smaller, a braking surface or a drum outline is not.
DRUM_LIKE_MIN_RATIO = 0.5
#: Most places and handles a finding lists.
MAX_LISTED = 6

#: What the brake loses when a role's entities are not read.
_LOST = {
    Role.PIN: "where no pin is read, the pieces that meet there are joined rigidly (a pivoted shoe is read as fixed)",
    Role.PIVOT: "a part with no pivot is not held by the frame",
    Role.DRUM: "no drum is read",
}


@record(frozen=True)
class NearMiss:
    """A layer with no role that looks like ``role``'s.

    Attributes
    ----------
    layer : str
        The layer's name as the drawing writes it.
    role : Role
    reasons : tuple of str
        The evidence, as phrases.
    handles : tuple of str
        Entities that show it (circles), if any.
    at : Point or None
        Where [mm], if the evidence has a place.
    """

    layer: str
    role: Role
    reasons: tuple[str, ...]
    handles: tuple[str, ...] = ()
    at: Point | None = None


@record(frozen=True)
class _Spot:
    """A place where a pin or pivot would be expected but none was read."""

    at: Point
    role: Role
    what: str


# --- the layer map ------------------------------------------------------------


def layer_map(drawing: Drawing) -> dict[Role, tuple[str, ...]]:
    """Role -> the layers searched for it (the built-in names for a drawing
    read without a map)."""
    given = dict(drawing.layer_map)
    return {role: given.get(role, DEFAULT_LAYERS[role]) for role in Role}


def layers_json(drawing: Drawing) -> dict[str, list[str]]:
    """The ``layers`` object of the JSON reports: role -> layer names (for
    an inferred skeleton, only the roles still read from their layers; what
    the inference used is :func:`inference_json`)."""
    inferred = inferred_style(drawing) is not None
    return {
        role.value: list(names)
        for role, names in layer_map(drawing).items()
        if not (inferred and role in SKELETON_ROLES)
    }


def inferred_style(drawing: Drawing) -> str | None:
    """The drafting style the skeleton was inferred in (``outlines``,
    ``blocks``, ``centre lines``), or None when it came from the role
    layers."""
    src = drawing.skeleton_source
    if src == "layers":
        return None
    return src.removeprefix("geometry (").removesuffix(")")


def _inferred_from(drawing: Drawing) -> tuple[tuple[str, ...], Counter[Role]]:
    """The layers of the entities the inferred skeleton was built from
    (sorted), and the skeleton items inferred per role."""
    layers: set[str] = set()
    found: Counter[Role] = Counter()
    for group in (drawing.circles, drawing.arcs, drawing.paths):
        for g in group:
            if g.role in SKELETON_ROLES:
                layers.add(g.source.layer)
                found[g.role] += 1
    return tuple(sorted(layers)), found


def inference_json(drawing: Drawing) -> dict[str, object] | None:
    """The ``inference`` object of the JSON reports, the same as the
    header's layers line: the style, the layers the skeleton was inferred
    from and the items found per role; None for a skeleton read from the
    role layers."""
    style = inferred_style(drawing)
    if style is None:
        return None
    layers, found = _inferred_from(drawing)
    roles = [r for r in Role if r in SKELETON_ROLES]
    return {"style": style, "layers": list(layers), "found": {r.value: found[r] for r in roles}}


def _map_source(drawing: Drawing) -> str:
    return f"map from {drawing.layer_map_source}" if drawing.layer_map_source else "built-in names"


def _found(drawing: Drawing) -> Counter[Role]:
    """Entities read per role."""
    found: Counter[Role] = Counter()
    for group in (drawing.circles, drawing.arcs, drawing.paths, drawing.texts):
        found.update(g.role for g in group)
    return found


def searched(drawing: Drawing, role: Role) -> str:
    """``"drum layer DRUM (built-in names)"``: where a role was looked for."""
    names = layer_map(drawing)[role]
    word = "layer" if len(names) == 1 else "layers"
    return f"{role} {word} {', '.join(names) or '(none)'} ({_map_source(drawing)})"


def searched_line(drawing: Drawing) -> str:
    """The report header's line: each role, its layers and what was read on
    them, e.g. ``layers: pivot ← PIVOT (2), pin ← PIN (none), ...``."""
    found = _found(drawing)
    style = inferred_style(drawing)
    parts = [
        f"{role} ← {', '.join(names) or '-'} ({found[role] or 'none'})"
        for role, names in layer_map(drawing).items()
        if style is None or role not in SKELETON_ROLES
    ]
    if style is not None:
        layers, counts = _inferred_from(drawing)
        items = ", ".join(f"{r} {counts[r]}" for r in Role if r in SKELETON_ROLES)
        on = f"layers {', '.join(layers)}" if len(layers) != 1 else f"layer {layers[0]}"
        parts.insert(0, f"inferred from geometry (style: {style}) on {on or 'no layer'} ({items})")
    return f"layers: {', '.join(parts)}; {_map_source(drawing)}"


# --- names ----------------------------------------------------------------------


def typo_distance(a: str, b: str) -> int:
    """Edits between two strings: insertions, deletions, substitutions and
    swaps of neighbours (optimal string alignment distance)."""
    prev2: list[int] = []
    prev = list(range(len(b) + 1))
    for i in range(1, len(a) + 1):
        cur = [i] + [0] * len(b)
        for j in range(1, len(b) + 1):
            cost = 0 if a[i - 1] == b[j - 1] else 1
            cur[j] = min(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost)
            if i > 1 and j > 1 and a[i - 1] == b[j - 2] and a[i - 2] == b[j - 1]:
                cur[j] = min(cur[j], prev2[j - 2] + 1)
        prev2, prev = prev, cur
    return prev[-1]


def _tokens(name: str) -> list[str]:
    """Upper-case words of letters, singular (a trailing S of a word of four
    letters or more dropped); digits dropped."""
    words = re.findall(r"[A-Z]+", name.upper())
    return [w[:-1] if len(w) > 3 and w.endswith("S") else w for w in words]


def _is_affix(token: str) -> bool:
    return len(token) <= AFFIX_MAX_LEN or token in AFFIX_TOKENS


def _allowance(n: int) -> int:
    """Slips allowed in typing a name of ``n`` letters: none in three (``DIM``
    is two from ``PIN``), one in four or five, two from six."""
    return 0 if n <= 3 else 1 if n <= 5 else 2


def _close(layer: str, reference: str) -> bool:
    cand, ref = _tokens(layer), _tokens(reference)
    if not cand or not ref:
        return False
    core = [t for t in cand if not _is_affix(t)] or cand
    if ref in (cand, core):
        return True
    joined, want = "".join(core), "".join(ref)
    if layer.upper() in TYPO_EXEMPT or joined[0] != want[0]:
        return False
    return typo_distance(joined, want) <= _allowance(len(want))


def similar_role(layer: str, drawing: Drawing) -> tuple[Role, str] | None:
    """The role whose layer name ``layer`` is close to, with that name: the
    names searched for it and its built-in name count."""
    for role, names in layer_map(drawing).items():
        for ref in dict.fromkeys((*names, *DEFAULT_LAYERS[role])):
            if _close(layer, ref):
                return role, ref
    return None


# --- geometry -------------------------------------------------------------------


def _crossing(a: Point, b: Point, c: Point, d: Point, tol: float) -> Point | None:
    """Where segments ab and cd cross inside both (not within ``tol`` of an
    end), or None."""
    r = (b[0] - a[0], b[1] - a[1])
    s = (d[0] - c[0], d[1] - c[1])
    den = cross(r, s)
    if den == 0.0:
        return None
    q = (c[0] - a[0], c[1] - a[1])
    t, u = cross(q, s) / den, cross(q, r) / den
    p = (a[0] + t * r[0], a[1] + t * r[1])
    if not (0.0 < t < 1.0 and 0.0 < u < 1.0) or min(dist(p, e) for e in (a, b, c, d)) <= tol:
        return None
    return p


def _on_arc(p: Point, arc: ArcGeom, tol: float) -> bool:
    """``p`` on the arc (its circle within ``tol``, its angle within the arc's
    span widened by ``tol``)."""
    if abs(dist(p, arc.center) - arc.radius_mm) > tol:
        return False
    ang = math.degrees(math.atan2(p[1] - arc.center[1], p[0] - arc.center[0])) % 360.0
    return angle_in_arc(ang, arc.start_deg, arc.end_deg, math.degrees(tol / max(arc.radius_mm, tol)))


def _on(p: Point, path: PathGeom, tol: float) -> bool:
    return any(point_segment_distance(p, a, b) <= tol for a, b in path.segments())


def _joints(links: Sequence[PathGeom], pins: Sequence[Point], tol: float) -> list[Point]:
    """Where a centreline piece ends on another at no pin: a rigid joint."""
    out: list[Point] = []
    for i, path in enumerate(links):
        if len(path.points) > 2 and path.points[0] == path.points[-1]:
            continue
        for end in (path.points[0], path.points[-1]):
            if any(dist(end, c) <= tol for c in pins):
                continue
            if any(j != i and _on(end, other, tol) for j, other in enumerate(links)):
                out.append(end)
    return out


def _spots(drawing: Drawing, tol: float, extra: Iterable[_Spot]) -> list[_Spot]:
    """Where a pin or pivot would be expected and none was read."""
    links = drawing.paths_of(Role.LINK)
    pins = [c.center for c in (*drawing.circles_of(Role.PIN), *drawing.circles_of(Role.PIVOT))]
    out = [_Spot(p, Role.PIN, "where centrelines meet with no pin") for p in _joints(links, pins, tol)]
    segs = [(i, s) for i, path in enumerate(links) for s in path.segments()]
    for k, (i, (a, b)) in enumerate(segs):
        for j, (c, d) in segs[k + 1 :]:
            p = None if i == j else _crossing(a, b, c, d, tol)
            if p is not None and not any(dist(p, q) <= tol for q in pins):
                out.append(_Spot(p, Role.PIN, "where centrelines cross with no pin"))
    return [*out, *extra]


def _pin_sized(c: LooseCircle, drawing: Drawing, drum: tuple[Point, float] | None) -> bool:
    if drum is None:
        return 2.0 * c.radius_mm <= PIN_LIKE_MAX_EXTENT * drawing.extent_mm()
    lo, hi = PIN_TO_DRUM
    return lo <= c.radius_mm / drum[1] <= hi


def _pin_like(
    circles: Sequence[LooseCircle],
    spots: Sequence[_Spot],
    drawing: Drawing,
    drum: tuple[Point, float] | None,
    tol: float,
) -> dict[Role, list[tuple[_Spot, LooseCircle]]]:
    out: dict[Role, list[tuple[_Spot, LooseCircle]]] = {}
    for c in circles:
        if (drum is not None and dist(c.center, drum[0]) <= tol) or not _pin_sized(c, drawing, drum):
            continue
        spot = next((s for s in spots if dist(s.at, c.center) <= tol), None)
        if spot is not None:
            out.setdefault(spot.role, []).append((spot, c))
    return out


def _drum_like(circles: Sequence[LooseCircle], drawing: Drawing, tol: float) -> list[LooseCircle]:
    """Circles concentric with the shoe or band arcs and at least
    :data:`DRUM_LIKE_MIN_RATIO` of their radius, nearest that radius first."""
    arcs = [a for a in drawing.arcs if a.role in (Role.SHOE, Role.BAND)]
    hits: list[tuple[float, LooseCircle]] = []
    for c in circles:
        for a in arcs:
            if dist(c.center, a.center) <= tol and c.radius_mm >= DRUM_LIKE_MIN_RATIO * a.radius_mm:
                hits.append((abs(c.radius_mm - a.radius_mm), c))
                break
    return [c for _, c in sorted(hits, key=lambda h: h[0])]


# --- near misses ------------------------------------------------------------------


def _fmt(p: Point) -> str:
    return f"({p[0]:.6g}, {p[1]:.6g})"


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def _pin_reason(hits: Sequence[tuple[_Spot, LooseCircle]], of: int) -> str:
    whats = list(dict.fromkeys(s.what for s, _ in hits))
    places = ", ".join(_fmt(s.at) for s, _ in hits[:MAX_LISTED])
    n = len(hits)
    sit = "sits" if n == 1 else "sit"
    return f"{n} of its {_plural(of, 'circle')} {sit} {' or '.join(whats)} (at {places})"


def _drum_reason(hits: Sequence[LooseCircle]) -> str:
    c = hits[0]
    return (
        f"{_plural(len(hits), 'circle')} concentric with the shoe or band arcs "
        f"(Ø{2 * c.radius_mm:.6g} mm at {_fmt(c.center)})"
    )


def near_misses(
    drawing: Drawing,
    tol: float,
    *,
    drum: tuple[Point, float] | None = None,
    extra_spots: Iterable[_Spot] = (),
) -> list[NearMiss]:
    """Every layer with no role that looks like a role's layer.

    Parameters
    ----------
    drawing : Drawing
    tol : float
        The "lies on" tolerance [mm].
    drum : (Point, float) or None
        The drum read (centre [mm], radius [mm]); None when none was.
    extra_spots : iterable
        Places from the topology where a pin or pivot would be expected
        (open ends, band ends on no pin).
    """
    found = _found(drawing)
    spots = _spots(drawing, tol, extra_spots)
    circles: dict[str, list[LooseCircle]] = {}
    for c in drawing.loose_circles:
        circles.setdefault(c.source.layer.upper(), []).append(c)
    out: list[NearMiss] = []
    for layer, kinds in drawing.other_layers:
        mine = circles.get(layer.upper(), [])
        named = similar_role(layer, drawing)
        pins = _pin_like(mine, spots, drawing, drum, tol)
        drums = _drum_like(mine, drawing, tol) if drum is None else []
        roles = dict.fromkeys([*pins, *([Role.DRUM] if drums else [])])
        if named is not None and set(kinds) & ROLE_KINDS[named[0]] and not found[named[0]]:
            roles = dict.fromkeys([named[0], *roles])
        for role in roles:
            reasons: list[str] = []
            shown: list[LooseCircle] = []
            if named is not None and named[0] is role:
                reasons.append(f"its name is close to {named[1]}")
            if role in pins:
                reasons.append(_pin_reason(pins[role], len(mine)))
                shown += [c for _, c in pins[role]]
            if role is Role.DRUM and drums:
                reasons.append(_drum_reason(drums))
                shown += drums
            at = pins[role][0][0].at if role in pins else (drums[0].center if role is Role.DRUM and drums else None)
            handles = tuple(dict.fromkeys(c.source.ref for c in shown))[:MAX_LISTED]
            out.append(NearMiss(layer, role, tuple(reasons), handles, at))
    return out


def _mapping(drawing: Drawing, role: Role, layer: str) -> str:
    """``"the [layers] table of FILE: pin = ["PIN", "PINS"]"``."""
    names = (*layer_map(drawing)[role], layer)
    where = drawing.layer_map_source or f"a {CONFIG_NAME} beside the drawing"
    return f"the {table_name(drawing.layer_map_source, 'layers')} table of {where}: {toml_layers_line(role, names)}"


def _fix(drawing: Drawing, miss: NearMiss) -> str:
    return f"to read it, put in {_mapping(drawing, miss.role, miss.layer)}"


def _sentence(drawing: Drawing, miss: NearMiss) -> str:
    return f"layer {miss.layer} has no role but looks like a {miss.role} layer: {'; '.join(miss.reasons)}"


def missing_role_note(drawing: Drawing, role: Role, tol: float) -> str:
    """For a finding that a role's layers hold nothing (M201, M211, M212):
    the layers that look like its own, each with the ``[layers]`` line that
    would read it (``""`` when none does)."""
    misses = [m for m in near_misses(drawing, tol) if m.role is role]
    return "".join(f"; {_sentence(drawing, m)}: {_fix(drawing, m)}" for m in misses)


def _miss_finding(drawing: Drawing, miss: NearMiss) -> Finding:
    lost = _LOST.get(miss.role, f"its {miss.role} entities are not read")
    msg = (
        f"{_sentence(drawing, miss)}. The {miss.role} role reads the {searched(drawing, miss.role)} only, "
        f"so {lost}; {_fix(drawing, miss)} (or move the entities to a {miss.role} layer)"
    )
    return Finding(Code.LAYER_NEAR_MISS, msg, miss.handles, (miss.layer,), miss.at)


def _topology_spots(mech: Mechanism) -> list[_Spot]:
    """Open ends (a pivot or pin may be missing) and band ends on no pin."""
    out: list[_Spot] = []
    for f in mech.findings:
        if f.at is None:
            continue
        if f.code is Code.OPEN_END:
            out.append(_Spot(f.at, Role.PIVOT, "at an open centreline end"))
        elif f.code is Code.BAND_END_OFF:
            out.append(_Spot(f.at, Role.PIN, "at a band end that meets no pin"))
    return out


def _shoe_findings(mech: Mechanism) -> list[Finding]:
    """A fixed shoe whose shoe link meets the rest of its part, with no pin,
    where a loose circle sits: it may be meant to turn on a pin there."""
    d = mech.drawing
    tol = mech.tolerance_mm
    links = d.paths_of(Role.LINK)
    pins = [c.center for c in (*d.circles_of(Role.PIN), *d.circles_of(Role.PIVOT))]
    joints = _joints(links, pins, tol)
    drum = (mech.drum.center, mech.drum.radius_mm) if mech.drum else None
    out: list[Finding] = []
    for shoe in mech.shoes:
        if shoe.mounting is not Mounting.FIXED:
            continue
        refs = {s.ref for s in mech.part(shoe.part).sources}
        shoe_links = [
            p
            for p in links
            if p.source.ref in refs and any(_on_arc(e, shoe.arc, tol) for e in (p.points[0], p.points[-1]))
        ]
        here = [j for j in joints if any(_on(j, p, tol) for p in shoe_links)]
        for j in here:
            c = next(
                (c for c in d.loose_circles if dist(c.center, j) <= tol and _pin_sized(c, d, drum)),
                None,
            )
            if c is None:
                continue
            out.append(
                Finding(
                    Code.SHOE_MAYBE_PIVOTED,
                    f"shoe {shoe.name} is read as fixed to {shoe.part}: its shoe link meets the rest at {_fmt(j)} "
                    f"with no pin, but a circle on layer {c.source.layer} (Ø{2 * c.radius_mm:.6g} mm) sits there. "
                    f"If the shoe turns on a pin there, put the circle on a pin layer, or map its layer in "
                    f"{_mapping(d, Role.PIN, c.source.layer)}; "
                    "as drawn it is solved as a fixed shoe",
                    (c.source.ref, shoe.arc.source.ref),
                    (c.source.layer, shoe.arc.source.layer),
                    j,
                )
            )
            break
    return out


def layer_findings(mech: Mechanism) -> list[Finding]:
    """M223 for every layer near miss not already named by a finding that the
    role's layers hold nothing (M201, M211, M212), and M224 for fixed shoes
    that may be meant to turn on a pin."""
    d = mech.drawing
    named_by = {Code.NO_DRUM: Role.DRUM, Code.NO_SHOE: Role.SHOE, Code.NO_LOAD: Role.LOAD}
    told = {named_by[f.code] for f in mech.findings if f.code in named_by}
    drum = (mech.drum.center, mech.drum.radius_mm) if mech.drum else None
    misses = near_misses(d, mech.tolerance_mm, drum=drum, extra_spots=_topology_spots(mech))
    out = [_miss_finding(d, m) for m in misses if m.role not in told]
    return out + _shoe_findings(mech)
