"""Guides: a rod through a hole in another part, found where a spring sits.

The usual spring-set arrangement runs a pull rod from one lever's top
through a hole in the other lever to a nut, the setting spring on the rod
between that lever and the nut.  The drawing shows the rod's centreline
crossing the lever's, with the spring's end on the crossing: there the
lever holds the rod across its axis and the rod slides through
(:class:`dxfcheck.mechanism.model.Guide`).  Without the guide, the rod's
turn about its pin is a free motion nothing drives.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

from dxfcheck.core.geometry import Point, dist, point_segment_distance
from dxfcheck.mechanism.model import Guide, Part, Pin, Spring

__all__ = ["build_guides"]


def _axis_at(part: Part, at: Point) -> Point:
    """Unit vector along the part's centreline piece nearest to ``at``."""
    a, b = min(part.segments, key=lambda s: point_segment_distance(at, s[0], s[1]))
    length = dist(a, b)
    return ((b[0] - a[0]) / length, (b[1] - a[1]) / length)


def build_guides(
    springs: Sequence[Spring], parts: Sequence[Part], pins: Sequence[Pin], tol: float
) -> tuple[Guide, ...]:
    """A guide wherever a spring's end sits on one part (its seat) and on
    the centreline of the part that carries the spring's other end (the
    rod), with no pin there (a pin would join them fully)."""
    by_name = {p.name: p for p in parts}
    guides: list[Guide] = []
    for sp in springs:
        for k in (0, 1):
            seat, rod, at = sp.parts[k], sp.parts[1 - k], sp.ends[k]
            if seat is None or rod is None or seat == rod or rod not in by_name:
                continue
            if by_name[rod].distance_to(at) > tol or any(dist(p.center, at) <= tol for p in pins):
                continue
            axis = _axis_at(by_name[rod], at)
            if not all(map(math.isfinite, axis)):
                continue
            guides.append(Guide(f"G{len(guides) + 1}", rod, seat, at, axis, sp.name))
    return tuple(guides)
