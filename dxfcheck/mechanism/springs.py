"""Springs: a spring line joins the parts (or frame pivots) its ends lie
on; its text gives its force and whether it pushes (C) or pulls (T)."""

from __future__ import annotations

import re
from collections.abc import Sequence
from dataclasses import replace

from dxfcheck.core.config import Role
from dxfcheck.core.findings import Code, Finding
from dxfcheck.core.geometry import Point, dist, point_segment_distance
from dxfcheck.core.units import FORCE_N
from dxfcheck.mechanism.model import Spring
from dxfcheck.mechanism.texts import Magnitudes, TextForce, no_magnitude, text_force
from dxfcheck.mechanism.topology import Topology, finding, fmt_point
from dxfcheck.read.drawing import Drawing, PathGeom, TextGeom

__all__ = ["build_springs"]

#: Words that give a spring's sense: False pushes (compression), True pulls
#: (tension).
_SENSE_WORDS = {"c": False, "comp": False, "compression": False, "t": True, "tens": True, "tension": True}
#: A word of letters, not glued to a digit after it (``T1`` is a name).
_WORD = re.compile(r"(?<![^\W\d_])[^\W\d_]+(?!\w)")
#: Letters a spring's sense may be glued to its unit with (``1.2kNT``).
_SENSE_LETTERS = "ct"


def _sense(who: str, t: TextGeom) -> tuple[bool | None, Finding | None]:
    """Whether a spring's text says tension (True) or compression (False):
    a word C, T, compression, tension anywhere in it, or C/T glued to the
    unit (``1.2kNT``); None when it says neither, and an M222 finding when
    it says both."""
    said: dict[bool, str] = {}
    for m in _WORD.finditer(t.text):
        word = m[0].lower()
        if word in _SENSE_WORDS:
            said.setdefault(_SENSE_WORDS[word], m[0])
        elif word[-1] in _SENSE_LETTERS and word[:-1] in FORCE_N:
            said.setdefault(_SENSE_WORDS[word[-1]], m[0])
    if len(said) > 1:
        msg = (
            f"{who}: {t.text!r} says both compression ({said[False]!r}) and tension ({said[True]!r}); "
            "keep the one that applies"
        )
        return None, finding(Code.TEXT_AMBIGUOUS, msg, [t.source], t.position)
    return next(iter(said), None), None


def _texts_for(texts: Sequence[TextGeom], paths: Sequence[PathGeom]) -> dict[int, TextGeom]:
    """For each spring line (by index), the first text nearest to it."""
    text_for: dict[int, TextGeom] = {}
    for t in texts:
        if not paths:
            break
        j = min(
            range(len(paths)),
            key=lambda i: point_segment_distance(t.position, paths[i].points[0], paths[i].points[-1]),
        )
        text_for.setdefault(j, t)
    return text_for


def _ends(
    name: str, sp: PathGeom, topo: Topology, part_names: Sequence[str], pivots: Sequence[Point]
) -> tuple[list[str | None], list[Finding]]:
    """The part at each end (None: a frame pivot), and SPRING_END_OFF for an
    end on neither."""
    ends: list[str | None] = []
    findings: list[Finding] = []
    pair = (sp.points[0], sp.points[-1])
    for k, end in enumerate(pair):
        on = topo.parts_at(end)
        # a spring on a rod: the end where the rod crosses a lever acts on the
        # lever, not on the rod that also carries the spring's other end
        other = set(topo.parts_at(pair[1 - k]))
        on = [i for i in on if i not in other] + [i for i in on if i in other]
        if on:
            ends.append(part_names[on[0]])
        elif any(dist(c, end) <= topo.tol for c in pivots):
            ends.append(None)  # anchored to the frame
        else:
            msg = f"{name}: its end at {fmt_point(end)} is on no part and no pivot"
            findings.append(finding(Code.SPRING_END_OFF, msg, [sp.source], end))
    return ends, findings


def _no_sense(name: str, sp: PathGeom, text: str | None) -> Finding:
    """SPRING_NO_SENSE: the text does not say whether it pushes or pulls."""
    what = "it has no text" if text is None else f"its text {text!r} says neither"
    return finding(
        Code.SPRING_NO_SENSE,
        f"{name}: say whether it pushes or pulls ({what}): write C (compression) or T (tension) "
        "in its text, e.g. '4.2 kN C'",
        [sp.source],
        sp.points[0],
    )


def _spring(
    j: int, sp: PathGeom, t: TextGeom | None, topo: Topology, part_names: Sequence[str], forces: Magnitudes
) -> tuple[Spring | None, list[Finding]]:
    """Spring line ``j`` as a spring (None when it cannot be one), with its
    findings."""
    name = f"spring{j + 1}"
    a, b = sp.points[0], sp.points[-1]
    if dist(a, b) <= topo.tol:
        return None, [finding(Code.SPRING_END_OFF, f"{name} has no length", [sp.source], a)]
    pivots = [g.center for g in topo.pin_geoms if g.role is Role.PIVOT]
    ends, findings = _ends(name, sp, topo, part_names, pivots)
    if len(ends) != 2:
        return None, findings
    read: TextForce | None = None
    sense: bool | None = None
    if t is not None:
        read = text_force(name, t, used=forces.texts_used, glued="CTct")
        sense, both = _sense(name, t)
        findings += [f for f in (read.finding, both) if f is not None]
        if both is not None:
            return None, findings
    if sense is None:
        return None, [*findings, _no_sense(name, sp, t.text if t else None)]
    force = read.force_N if read else None
    if force is None and not forces.given and not (read and read.ambiguous):
        msg = no_magnitude(name, read, "4.2 kN C")
        findings.append(finding(Code.LOAD_NO_MAGNITUDE, msg, [sp.source], a))
    return Spring(name, (a, b), (ends[0], ends[1]), force, sense, t.text if t else None, sp.source), findings


def _with_forces(sp: Spring, forces: Magnitudes) -> Spring:
    """The spring with the caller's force: ``effort_N`` always,
    ``default_N`` where its text gave none."""
    if forces.effort_N is not None:
        return replace(sp, force_N=forces.effort_N)
    if forces.default_N is not None and sp.force_N is None:
        return replace(sp, force_N=forces.default_N)
    return sp


def build_springs(
    drawing: Drawing, topo: Topology, part_names: Sequence[str], forces: Magnitudes
) -> tuple[tuple[Spring, ...], tuple[Finding, ...]]:
    """The springs, with the caller's forces applied, and their findings."""
    paths = drawing.paths_of(Role.SPRING)
    text_for = _texts_for(list(drawing.texts_of(Role.SPRING)), paths)
    springs: list[Spring] = []
    findings: list[Finding] = []
    for j, sp in enumerate(paths):
        spring, found = _spring(j, sp, text_for.get(j), topo, part_names, forces)
        findings += found
        if spring is not None:
            springs.append(_with_forces(spring, forces))
    return tuple(springs), tuple(findings)
