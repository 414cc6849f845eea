"""Infer the mechanism (parts, pins, shoes, loads) from drawing geometry.

The second stage of the pipeline.  It applies the topology rules stated in
the README:

* centreline pieces whose end lies on another piece (end to end, or on a
  segment's interior) at a point that holds no pin form one rigid part;
  pieces that merely cross do not join;
* a pin or pivot attaches to every part whose centreline passes through its
  centre; a pivot also attaches to the frame;
* a shoe is the part whose centreline ends on a SHOE arc; it is *pivoted* when
  that part touches the rest of the linkage only through one pin and carries
  no load, otherwise it is *fixed* to its lever;
* a load acts on the part whose centreline passes through the start of its
  line, along the line, with the magnitude of the nearest text on the load
  layer (or the one given by the caller);
* a label names the nearest pin, part or shoe.

Every problem the user can fix in the drawing becomes a :class:`Finding`.
"""

from __future__ import annotations

import itertools
import math
import re
from collections.abc import Sequence
from dataclasses import dataclass, replace

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.geometry import Point, angle_in_arc, dist, point_segment_distance, unit
from dxfcheck.core.units import FORCE_N, AmbiguousTextError, UnitError, quantity_in_text
from dxfcheck.mechanism.layers import layer_findings, missing_role_note, searched
from dxfcheck.mechanism.model import Band, Drum, Load, Mechanism, Mounting, Part, Pin, Shoe, Spring
from dxfcheck.read.drawing import ArcGeom, CircleGeom, Drawing, PathGeom, Source, TextGeom

__all__ = ["LIES_ON_RTOL", "build_mechanism", "default_tolerance"]

#: Default "lies on" tolerance as a fraction of the skeleton's bounding-box
#: diagonal (0.1 mm on a 1 m drawing).
LIES_ON_RTOL = 1e-4
#: Floor of the "lies on" tolerance [mm].
LIES_ON_MIN_MM = 1e-6
#: A label farther than this fraction of the drawing size from everything
#: names nothing.
LABEL_REACH_RTOL = 0.1
#: Slack at each end of a shoe arc when deciding whether a point is on it
#: [degrees].
ARC_SLACK_DEG = 1e-6


#: A gap up to this many times the tolerance is reported as a near miss.
NEAR_MISS_FACTOR = 200.0


def _near_miss(at: Point, circles: Sequence[CircleGeom], paths: Sequence[PathGeom], tol: float) -> str:
    """``"; it is 0.50 mm from ..."``: the nearest pin circle or centreline
    within :data:`NEAR_MISS_FACTOR` × ``tol`` of ``at``, with the gap and
    the tolerance, or ``""``."""
    best: tuple[float, str] | None = None
    for g in circles:
        d = dist(at, g.center)
        if best is None or d < best[0]:
            best = (d, f"the pin circle at {_fmt(g.center)} [entity {g.source.ref}]")
    for q in paths:
        d = min(point_segment_distance(at, a, b) for a, b in itertools.pairwise(q.points))
        if best is None or d < best[0]:
            best = (d, f"the centreline [entity {q.source.ref}; layer {q.source.layer}]")
    if best is None or best[0] > NEAR_MISS_FACTOR * tol:
        return ""
    return f"; it is {best[0]:.2f} mm from {best[1]} (tolerance {tol:.3g} mm): a near miss, close the gap"


class _UnionFind:
    def __init__(self, n: int) -> None:
        self.parent = list(range(n))

    def find(self, i: int) -> int:
        while self.parent[i] != i:
            self.parent[i] = self.parent[self.parent[i]]
            i = self.parent[i]
        return i

    def union(self, i: int, j: int) -> None:
        ri, rj = self.find(i), self.find(j)
        if ri != rj:
            self.parent[max(ri, rj)] = min(ri, rj)


def default_tolerance(drawing: Drawing) -> float:
    """The default "lies on" tolerance for a drawing [mm]."""
    return max(LIES_ON_MIN_MM, LIES_ON_RTOL * drawing.extent_mm())


def _on_path(p: Point, path: PathGeom, tol: float) -> bool:
    return any(point_segment_distance(p, a, b) <= tol for a, b in path.segments())


def _on_arc(p: Point, arc: ArcGeom, tol: float) -> bool:
    r = dist(p, arc.center)
    if abs(r - arc.radius_mm) > tol:
        return False
    ang = math.degrees(math.atan2(p[1] - arc.center[1], p[0] - arc.center[0])) % 360
    slack = ARC_SLACK_DEG + math.degrees(tol / max(arc.radius_mm, tol))
    return angle_in_arc(ang, arc.start_deg, arc.end_deg, slack)


def _arc_distance(p: Point, arc: ArcGeom) -> float:
    """Distance from ``p`` to the arc (not the full circle) [mm]."""
    ang = math.degrees(math.atan2(p[1] - arc.center[1], p[0] - arc.center[0])) % 360
    if angle_in_arc(ang, arc.start_deg, arc.end_deg):
        return abs(dist(p, arc.center) - arc.radius_mm)
    return min(dist(p, arc.point_at(arc.start_deg)), dist(p, arc.point_at(arc.end_deg)))


def _f(code: Code, msg: str, srcs: Sequence[Source], at: Point | None = None) -> Finding:
    return Finding(code, msg, tuple(s.ref for s in srcs), tuple(s.layer for s in srcs), at)


def _fmt(p: Point) -> str:
    return f"({p[0]:.6g}, {p[1]:.6g})"


def build_mechanism(
    drawing: Drawing,
    *,
    tolerance_mm: float | None = None,
    effort_N: float | None = None,
    default_magnitude_N: float | None = None,
) -> Mechanism:
    """Build the mechanism a drawing shows.

    Parameters
    ----------
    drawing : Drawing
        Output of :func:`dxfcheck.read.drawing.read_drawing`.
    tolerance_mm : float, optional
        "Lies on" tolerance [mm]; default :func:`default_tolerance`.
    effort_N : float, optional
        Magnitude [N] for every load and spring, overriding the drawing's
        texts.
    default_magnitude_N : float, optional
        Magnitude [N] for loads and springs whose text gives none (the
        inverse question scales them anyway).

    Returns
    -------
    Mechanism
        With the findings; a mechanism with error findings cannot be solved.
    """
    tol = tolerance_mm if tolerance_mm is not None else default_tolerance(drawing)
    findings: list[Finding] = list(drawing.findings)

    # -- drum --------------------------------------------------------------
    drums = drawing.circles_of(Role.DRUM)
    drum: Drum | None = None
    if not drums:
        findings.append(
            Finding(
                Code.NO_DRUM,
                f"no drum circle found on the {searched(drawing, Role.DRUM)}; draw the drum's braking surface"
                + missing_role_note(drawing, Role.DRUM, tol),
            )
        )
    else:
        d0 = drums[0]
        drum = Drum(d0.center, d0.radius_mm, d0.source)
        if len(drums) > 1:
            findings.append(
                _f(
                    Code.MANY_DRUMS,
                    f"{len(drums)} drum circles; one drum per drawing",
                    [d.source for d in drums],
                    d0.center,
                )
            )

    pin_geoms: list[CircleGeom] = [*drawing.circles_of(Role.PIVOT), *drawing.circles_of(Role.PIN)]
    links = list(drawing.paths_of(Role.LINK))
    arcs = [a for a in drawing.arcs if a.role is Role.SHOE]
    load_paths = drawing.paths_of(Role.LOAD)
    load_starts = [lp.points[0] for lp in load_paths]
    load_starts += [q for sp in drawing.paths_of(Role.SPRING) for q in (sp.points[0], sp.points[-1])]

    # -- rigid parts ---------------------------------------------------------
    uf = _UnionFind(len(links))
    for i, path in enumerate(links):
        closed = len(path.points) > 2 and path.points[0] == path.points[-1]
        if closed:
            continue
        for end in (path.points[0], path.points[-1]):
            if any(dist(end, g.center) <= tol for g in pin_geoms):
                continue  # a pin joint, handled below
            joined = False
            for j, other in enumerate(links):
                if j != i and _on_path(end, other, tol):
                    uf.union(i, j)
                    joined = True
            if joined:
                continue
            if any(_on_arc(end, a, tol) for a in arcs):
                continue
            if any(dist(end, s) <= tol for s in load_starts):
                continue
            findings.append(
                _f(
                    Code.OPEN_END,
                    f"centreline end at {_fmt(end)} meets no pin, part, shoe or load"
                    + _near_miss(end, pin_geoms, [q for j, q in enumerate(links) if j != i], tol),
                    [path.source],
                    end,
                )
            )
    groups: dict[int, list[int]] = {}
    for i in range(len(links)):
        groups.setdefault(uf.find(i), []).append(i)
    group_list = [groups[k] for k in sorted(groups)]

    # -- labels ----------------------------------------------------------------
    labels = list(drawing.texts_of(Role.LABEL))
    reach = LABEL_REACH_RTOL * drawing.extent_mm()

    # objects a label may name: ("pin", idx), ("part", idx), ("shoe", idx)
    def label_distance(t: TextGeom, kind: str, idx: int) -> float:
        if kind == "pin":
            g = pin_geoms[idx]
            # negative inside the circle: a label written in a pin names the pin
            return dist(t.position, g.center) - g.radius_mm
        if kind == "part":
            return min(
                point_segment_distance(t.position, a, b) for i in group_list[idx] for a, b in links[i].segments()
            )
        return _arc_distance(t.position, arcs[idx])

    targets = (
        [("pin", i) for i in range(len(pin_geoms))]
        + [("part", i) for i in range(len(group_list))]
        + [("shoe", i) for i in range(len(arcs))]
    )
    named: dict[tuple[str, int], tuple[float, TextGeom]] = {}
    for t in labels:
        if not targets:
            break
        best = min(targets, key=lambda k: label_distance(t, *k))
        d = label_distance(t, *best)
        if d > reach:
            findings.append(
                _f(Code.LABEL_UNUSED, f"label {t.text!r} is near nothing it could name", [t.source], t.position)
            )
            continue
        if best in named:
            prev_d, prev = named[best]
            loser = t if d >= prev_d else prev
            findings.append(
                _f(
                    Code.LABEL_CLASH,
                    f"labels {prev.text!r} and {t.text!r} name the same {best[0]}; {loser.text!r} is ignored",
                    [prev.source, t.source],
                    t.position,
                )
            )
            if d >= prev_d:
                continue
        named[best] = (d, t)
    used_names = {t.text for _, t in named.values()}
    counters: dict[str, int] = {}

    def gen(prefix: str) -> str:
        while True:
            counters[prefix] = counters.get(prefix, 0) + 1
            cand = f"{prefix}{counters[prefix]}"
            if cand not in used_names:
                used_names.add(cand)
                return cand

    def name_of(kind: str, idx: int, prefix: str) -> str:
        hit = named.get((kind, idx))
        return hit[1].text if hit else gen(prefix)

    part_names = [name_of("part", i, "part") for i in range(len(group_list))]

    # -- pins ------------------------------------------------------------------
    pin_parts: list[list[int]] = []
    for g in pin_geoms:
        on = [gi for gi, members in enumerate(group_list) if any(_on_path(g.center, links[i], tol) for i in members)]
        pin_parts.append(on)
    pins: list[Pin] = []
    pin_name_of_geom: dict[int, str] = {}
    band_pieces = drawing.paths_of(Role.BAND)
    band_pin = [
        any(dist(end, g.center) <= tol for bp in band_pieces for end in (bp.points[0], bp.points[-1]))
        for g in pin_geoms
    ]
    for k, g in enumerate(pin_geoms):
        grounded = g.role is Role.PIVOT
        name = name_of("pin", k, "O" if grounded else "P")
        pin_name_of_geom[k] = name
        on = pin_parts[k]
        anchors_spring = grounded and any(
            dist(end, g.center) <= tol for sp in drawing.paths_of(Role.SPRING) for end in (sp.points[0], sp.points[-1])
        )
        if anchors_spring and not on:
            continue  # a frame bracket for a spring: the frame takes the spring's reaction
        if band_pin[k] and (on or grounded):
            # a band end: the pin passes the band's tension to its part(s) or the frame
            pins.append(Pin(name, g.center, 2 * g.radius_mm, grounded, tuple(part_names[i] for i in on), g.source))
            continue
        if not on:
            findings.append(
                _f(
                    Code.ORPHAN_PIN,
                    f"{'pivot' if grounded else 'pin'} {name} lies on no part's centreline"
                    + _near_miss(g.center, [], links, tol),
                    [g.source],
                    g.center,
                )
            )
            continue
        if len(on) == 1 and not grounded:
            findings.append(
                _f(
                    Code.LONELY_PIN,
                    f"pin {name} lies on one part only ({part_names[on[0]]}); it joins nothing and is left out"
                    + _near_miss(g.center, [], [q for q in links if not _on_path(g.center, q, tol)], tol),
                    [g.source],
                    g.center,
                )
            )
            continue
        pins.append(Pin(name, g.center, 2 * g.radius_mm, grounded, tuple(part_names[i] for i in on), g.source))

    # -- loads -----------------------------------------------------------------
    load_texts = list(drawing.texts_of(Role.LOAD))
    text_for: dict[int, TextGeom] = {}
    text_dist: dict[int, float] = {}
    for t in load_texts:
        if not load_paths:
            break
        dists = [min(point_segment_distance(t.position, a, b) for a, b in lp.segments()) for lp in load_paths]
        j = min(range(len(load_paths)), key=lambda i: dists[i])
        if j not in text_for or dists[j] < text_dist[j]:
            text_for[j] = t
            text_dist[j] = dists[j]
    loads: list[Load] = []
    part_pins: dict[str, list[str]] = {n: [] for n in part_names}
    for p in pins:
        for pn in p.parts:
            part_pins[pn].append(p.name)
    for j, lp in enumerate(load_paths):
        start, end = lp.points[0], lp.points[-1]
        name = f"F{j + 1}"
        if dist(start, end) <= tol:
            findings.append(_f(Code.LOAD_OFF_PART, f"load {name} has no length, so no direction", [lp.source], start))
            continue
        direction = unit((end[0] - start[0], end[1] - start[1]))
        on = [gi for gi, members in enumerate(group_list) if any(_on_path(start, links[i], tol) for i in members)]
        part: str | None = part_names[on[0]] if on else None
        if part is None:
            findings.append(
                _f(
                    Code.LOAD_OFF_PART,
                    f"load {name} starts at {_fmt(start)}, on no part's centreline",
                    [lp.source],
                    start,
                )
            )
        else:
            at_pivot = [p for p in pins if p.grounded and dist(p.center, start) <= tol]
            if at_pivot:
                findings.append(
                    _f(
                        Code.LOAD_AT_PIVOT,
                        f"load {name} acts at pivot {at_pivot[0].name} and goes straight into the frame",
                        [lp.source],
                        start,
                    )
                )
        magnitude: float | None = None
        text: str | None = None
        read: _TextForce | None = None
        if j in text_for:
            text = text_for[j].text
            read = _text_force(f"load {name}", text_for[j], findings, used=effort_N is None)
            magnitude = read.force_N
        if effort_N is not None:
            magnitude = effort_N
            text = None
        if magnitude is None and default_magnitude_N is not None:
            magnitude = default_magnitude_N
        if magnitude is None and not (read and read.ambiguous):  # an ambiguous text is its own error, M222
            msg = _no_magnitude(f"load {name}", read, "1.2 kN")
            findings.append(_f(Code.LOAD_NO_MAGNITUDE, msg, [lp.source], start))
        loads.append(Load(name, part, start, direction, magnitude, text, lp.source))
    if not load_paths and not drawing.paths_of(Role.SPRING):
        findings.append(
            Finding(
                Code.NO_LOAD,
                f"no load line on the {searched(drawing, Role.LOAD)} and no spring; draw the effort as a line "
                "from its point of application" + missing_role_note(drawing, Role.LOAD, tol),
            )
        )

    # -- springs -----------------------------------------------------------------
    given = effort_N if effort_N is not None else default_magnitude_N
    pivots = [g.center for g in pin_geoms if g.role is Role.PIVOT]
    springs = _springs(
        drawing, group_list, links, part_names, pivots, tol, findings, given is not None, text_used=effort_N is None
    )
    if effort_N is not None:
        springs = [replace(sp, force_N=effort_N) for sp in springs]
    elif default_magnitude_N is not None:
        springs = [sp if sp.force_N is not None else replace(sp, force_N=default_magnitude_N) for sp in springs]

    # -- bands -------------------------------------------------------------------
    bands = _bands(drawing, drum, pins, pin_geoms, pin_name_of_geom, tol, findings)

    # -- shoes -----------------------------------------------------------------
    shoes: list[Shoe] = []
    loaded_parts = {ld.part for ld in loads} | {p for sp in springs for p in sp.parts if p}
    for k, arc in enumerate(arcs):
        labelled = named.get(("shoe", k))
        sname = labelled[1].text if labelled else f"shoe{k + 1}"
        mid = arc.point_at(arc.mid_deg)
        if drum is None:
            continue
        off_c = dist(arc.center, drum.center)
        off_r = abs(arc.radius_mm - drum.radius_mm)
        if off_c > tol or off_r > tol:
            findings.append(
                _f(
                    Code.SHOE_OFF_DRUM,
                    f"shoe arc {sname} is not on the drum circle (centre off by {off_c:.4g} mm, "
                    f"radius off by {off_r:.4g} mm; tolerance {tol:.3g} mm)",
                    [arc.source],
                    mid,
                )
            )
            continue
        on = sorted(
            {
                gi
                for gi, members in enumerate(group_list)
                for i in members
                for end in (links[i].points[0], links[i].points[-1])
                if _on_arc(end, arc, tol)
            }
        )
        if not on:
            findings.append(
                _f(Code.SHOE_UNATTACHED, f"no part's centreline ends on shoe arc {sname}", [arc.source], mid)
            )
            continue
        if len(on) > 1:
            findings.append(
                _f(
                    Code.SHOE_MANY_PARTS,
                    f"{len(on)} separate parts end on shoe arc {sname}; join them or give each shoe its own arc",
                    [arc.source],
                    mid,
                )
            )
            continue
        pname = part_names[on[0]]
        mine = part_pins[pname]
        mounting = Mounting.FIXED
        pin: str | None = None
        if len(mine) == 1 and pname not in loaded_parts:
            mounting, pin = Mounting.PIVOTED, mine[0]
        # internal shoe: the part carrying it lies inside the drum
        members = group_list[on[0]]
        pts = [q for i in members for q in links[i].points]
        inside = sum(1 for q in pts if dist(q, drum.center) < drum.radius_mm - tol)
        internal = inside > len(pts) / 2
        if labelled is None:
            # an unlabelled shoe is named after the part that carries it
            sname = pname if mounting is Mounting.PIVOTED else f"{pname} shoe"
            if any(s.name == sname for s in shoes):
                sname = gen("shoe")
        shoes.append(Shoe(sname, pname, arc, mounting, pin, internal))
    if drum is not None and not arcs and not bands:
        findings.append(
            Finding(
                Code.NO_SHOE,
                f"no shoe arc on the {searched(drawing, Role.SHOE)} (and no band); draw each lining's contact arc"
                + missing_role_note(drawing, Role.SHOE, tol),
            )
        )

    parts = tuple(
        Part(
            part_names[gi],
            tuple(s for i in members for s in links[i].segments()),
            tuple(part_pins[part_names[gi]]),
            tuple(links[i].source for i in members),
        )
        for gi, members in enumerate(group_list)
    )
    mech = Mechanism(
        drawing=drawing,
        tolerance_mm=tol,
        length_scale_mm=drawing.extent_mm(),
        drum=drum,
        pins=tuple(pins),
        parts=parts,
        shoes=tuple(shoes),
        loads=tuple(loads),
        findings=tuple(findings),
        springs=tuple(springs),
        bands=tuple(bands),
        labelled_names=frozenset(t.text for _, t in named.values()),
    )
    return replace(mech, findings=(*mech.findings, *layer_findings(mech)))  # layers that look like a role's


#: Words that give a spring's sense: False pushes (compression), True pulls
#: (tension).
_SENSE_WORDS = {"c": False, "comp": False, "compression": False, "t": True, "tens": True, "tension": True}
#: A word of letters, not glued to a digit after it (``T1`` is a name).
_WORD = re.compile(r"(?<![^\W\d_])[^\W\d_]+(?!\w)")


def _text_finding(code: Code, msg: str, t: TextGeom, used: bool) -> Finding:
    """A finding on a text; an ambiguous text is an error only when its value
    is used (not replaced by ``--effort``)."""
    f = _f(code, msg, [t.source], t.position)
    if code is Code.TEXT_AMBIGUOUS and not used:
        return replace(f, severity=Severity.WARNING)
    return f


@dataclass(frozen=True)
class _TextForce:
    """What a load's or spring's text gave: the force [N], or why not."""

    force_N: float | None
    why_not: str | None = None
    ambiguous: bool = False


def _text_force(who: str, t: TextGeom, findings: list[Finding], *, used: bool, glued: str = "") -> _TextForce:
    """The force a load's or spring's text gives, or a finding that quotes
    the text: M222 when it could be read two ways, M216 when it holds no
    force or a signed one (the line gives the direction)."""
    try:
        q = quantity_in_text(t.text, "force", glued=glued)
    except AmbiguousTextError as exc:
        findings.append(_text_finding(Code.TEXT_AMBIGUOUS, f"{who}: {exc}", t, used))
        return _TextForce(None, str(exc), ambiguous=True)
    except UnitError as exc:
        findings.append(_text_finding(Code.TEXT_UNREAD, f"{who}: {exc}", t, used))
        return _TextForce(None, str(exc))
    if q.value < 0:
        why = (
            f"{t.text!r} gives a negative force {q.text!r}; the line gives the direction: "
            "write the magnitude without a sign and draw the line the way the force acts"
        )
        findings.append(_text_finding(Code.TEXT_UNREAD, f"{who}: {why}", t, used))
        return _TextForce(None, why)
    return _TextForce(q.value)


def _no_magnitude(who: str, read: _TextForce | None, example: str) -> str:
    """The M209 message, with why a text that was there gave no force."""
    if read is None:
        return f"{who} has no magnitude; put a text such as {example!r} beside it or pass --effort"
    return f"{who} has no magnitude: {read.why_not}; or pass --effort"


def _spring_sense(who: str, t: TextGeom, findings: list[Finding]) -> tuple[bool | None, bool]:
    """Whether a spring's text says tension (True) or compression (False):
    a word C, T, compression, tension anywhere in it, or C/T glued to the
    unit (``1.2kNT``); None when it says neither.  The second value is True
    when it says both (an M222 finding is added)."""
    said: dict[bool, str] = {}
    for m in _WORD.finditer(t.text):
        word = m[0].lower()
        if word in _SENSE_WORDS:
            said.setdefault(_SENSE_WORDS[word], m[0])
        elif word[-1] in "ct" and word[:-1] in FORCE_N:
            said.setdefault(_SENSE_WORDS[word[-1]], m[0])
    if len(said) > 1:
        findings.append(
            _f(
                Code.TEXT_AMBIGUOUS,
                f"{who}: {t.text!r} says both compression ({said[False]!r}) and tension ({said[True]!r}); "
                "keep the one that applies",
                [t.source],
                t.position,
            )
        )
        return None, True
    return next(iter(said), None), False


def _springs(
    drawing: Drawing,
    group_list: list[list[int]],
    links: list[PathGeom],
    part_names: list[str],
    pivots: list[Point],
    tol: float,
    findings: list[Finding],
    magnitude_given: bool,
    *,
    text_used: bool = True,
) -> list[Spring]:
    paths = drawing.paths_of(Role.SPRING)
    text_for: dict[int, TextGeom] = {}
    for t in drawing.texts_of(Role.SPRING):
        if not paths:
            break
        j = min(
            range(len(paths)),
            key=lambda i: point_segment_distance(t.position, paths[i].points[0], paths[i].points[-1]),
        )
        text_for.setdefault(j, t)
    out: list[Spring] = []
    for j, sp in enumerate(paths):
        name = f"spring{j + 1}"
        a, b = sp.points[0], sp.points[-1]
        if dist(a, b) <= tol:
            findings.append(_f(Code.SPRING_END_OFF, f"{name} has no length", [sp.source], a))
            continue
        ends: list[str | None] = []
        for end in (a, b):
            on = [gi for gi, members in enumerate(group_list) if any(_on_path(end, links[i], tol) for i in members)]
            if on:
                ends.append(part_names[on[0]])
            elif any(dist(c, end) <= tol for c in pivots):
                ends.append(None)  # anchored to the frame
            else:
                findings.append(
                    _f(
                        Code.SPRING_END_OFF,
                        f"{name}: its end at {_fmt(end)} is on no part and no pivot",
                        [sp.source],
                        end,
                    )
                )
        if len(ends) != 2:
            continue
        force: float | None = None
        sense: bool | None = None
        text: str | None = None
        read: _TextForce | None = None
        if j in text_for:
            t = text_for[j]
            text = t.text
            read = _text_force(name, t, findings, used=text_used, glued="CTct")
            force = read.force_N
            sense, both = _spring_sense(name, t, findings)
            if both:
                continue
        if sense is None:
            what = "it has no text" if text is None else f"its text {text!r} says neither"
            findings.append(
                _f(
                    Code.SPRING_NO_SENSE,
                    f"{name}: say whether it pushes or pulls ({what}): write C (compression) or T (tension) "
                    "in its text, e.g. '4.2 kN C'",
                    [sp.source],
                    a,
                )
            )
            continue
        if force is None and not magnitude_given and not (read and read.ambiguous):
            msg = _no_magnitude(name, read, "4.2 kN C")
            findings.append(_f(Code.LOAD_NO_MAGNITUDE, msg, [sp.source], a))
        out.append(Spring(name, (a, b), (ends[0], ends[1]), force, sense, text, sp.source))
    return out


def _bands(
    drawing: Drawing,
    drum: Drum | None,
    pins: list[Pin],
    pin_geoms: list[CircleGeom],
    pin_name_of_geom: dict[int, str],
    tol: float,
    findings: list[Finding],
) -> list[Band]:
    arcs = [a for a in drawing.arcs if a.role is Role.BAND]
    pieces = list(drawing.paths_of(Role.BAND))
    if not arcs:
        for bp in pieces:
            findings.append(_f(Code.BAND_OPEN, "band piece without a band arc on the drum", [bp.source], bp.points[0]))
        return []
    if drum is None:
        return []
    good: list[ArcGeom] = []
    for a in arcs:
        if dist(a.center, drum.center) > tol or abs(a.radius_mm - drum.radius_mm) > tol:
            findings.append(
                _f(Code.BAND_OFF_DRUM, "band arc is not on the drum circle", [a.source], a.point_at(a.mid_deg))
            )
        else:
            good.append(a)
    # arcs that continue each other make one wrap
    wraps: list[list[ArcGeom]] = []
    slack = math.degrees(tol / drum.radius_mm) + ARC_SLACK_DEG
    for a in sorted(good, key=lambda x: x.start_deg):
        for w in wraps:
            if abs(math.remainder(w[-1].end_deg - a.start_deg, 360.0)) <= slack:
                w.append(a)
                break
            if abs(math.remainder(a.end_deg - w[0].start_deg, 360.0)) <= slack:
                w.insert(0, a)
                break
        else:
            wraps.append([a])
    by_name = {p.name: p for p in pins}
    pin_at = {pin_name_of_geom[k]: g.center for k, g in enumerate(pin_geoms) if pin_name_of_geom.get(k) in by_name}
    out: list[Band] = []
    for n, w in enumerate(wraps):
        name = f"band{n + 1}"
        start, end = w[0].start_deg, w[-1].end_deg
        ends_found: list[tuple[str, Point]] = []
        srcs = [a.source for a in w]
        for deg in (start, end):
            tip = w[0].point_at(deg)
            hit: tuple[str, Point] | None = None
            for bp in pieces:
                for near, far in ((bp.points[0], bp.points[-1]), (bp.points[-1], bp.points[0])):
                    if dist(near, tip) > tol:
                        continue
                    pn = next((nm for nm, c in pin_at.items() if dist(c, far) <= tol), None)
                    if pn is None:
                        findings.append(
                            _f(
                                Code.BAND_END_OFF,
                                f"{name}: the band piece from {_fmt(tip)} ends at {_fmt(far)}, on no pin",
                                [bp.source],
                                far,
                            )
                        )
                    else:
                        d = dist(far, tip)
                        hit = (pn, ((tip[0] - far[0]) / d, (tip[1] - far[1]) / d))
                        srcs.append(bp.source)
            if hit is None:
                findings.append(
                    _f(
                        Code.BAND_OPEN,
                        f"{name}: no band piece runs from the wrap's end at {_fmt(tip)} to a pin",
                        [w[0].source],
                        tip,
                    )
                )
            else:
                ends_found.append(hit)
        if len(ends_found) != 2:
            continue
        (sp, sd), (ep, ed) = ends_found
        kind = _band_kind(by_name[sp], by_name[ep])
        out.append(Band(name, drum.center, drum.radius_mm, start, end, sp, ep, sd, ed, kind, tuple(srcs)))
    return out


def _band_kind(a: Pin, b: Pin) -> str:
    if a.grounded or b.grounded:
        return "simple"
    if set(a.parts) & set(b.parts):
        return "differential"
    return "two-lever"
