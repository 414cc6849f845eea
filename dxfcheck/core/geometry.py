"""Plane geometry helpers: points, affine maps, distances.

Points are ``(x, y)`` tuples in [mm].  The affine map is written out by hand
(rather than taken from a block-flattening routine) so that nested, rotated,
mirrored and non-uniformly scaled block references compose exactly.
"""

from __future__ import annotations

import math

from dxfcheck.core.records import record

__all__ = [
    "Affine",
    "Point",
    "angle_in_arc",
    "cross",
    "dist",
    "point_segment_distance",
    "segment_parameter",
    "unit",
]

Point = tuple[float, float]


@record(frozen=True)
class Affine:
    """The plane map ``(x, y) -> (a·x + b·y + c, d·x + e·y + f)``."""

    a: float = 1.0
    b: float = 0.0
    c: float = 0.0
    d: float = 0.0
    e: float = 1.0
    f: float = 0.0

    @staticmethod
    def translation(dx: float, dy: float) -> Affine:
        return Affine(1.0, 0.0, dx, 0.0, 1.0, dy)

    @staticmethod
    def rotation(deg: float) -> Affine:
        t = math.radians(deg)
        c, s = math.cos(t), math.sin(t)
        # exact quarter turns keep test geometry exact
        if deg % 90 == 0:
            c, s = round(c), round(s)
        return Affine(c, -s, 0.0, s, c, 0.0)

    @staticmethod
    def scaling(sx: float, sy: float) -> Affine:
        return Affine(sx, 0.0, 0.0, 0.0, sy, 0.0)

    def __matmul__(self, o: Affine) -> Affine:
        """``self @ o`` applies ``o`` first, then ``self``."""
        return Affine(
            self.a * o.a + self.b * o.d,
            self.a * o.b + self.b * o.e,
            self.a * o.c + self.b * o.f + self.c,
            self.d * o.a + self.e * o.d,
            self.d * o.b + self.e * o.e,
            self.d * o.c + self.e * o.f + self.f,
        )

    def apply(self, p: Point) -> Point:
        x, y = p
        return (self.a * x + self.b * y + self.c, self.d * x + self.e * y + self.f)

    def apply_vector(self, v: Point) -> Point:
        x, y = v
        return (self.a * x + self.b * y, self.d * x + self.e * y)

    @property
    def det(self) -> float:
        return self.a * self.e - self.b * self.d

    @property
    def mirrors(self) -> bool:
        """True when the map reverses the sense of rotation."""
        return self.det < 0

    def similarity_scale(self, rel_tol: float) -> float | None:
        """The scale factor if the map is a similarity (keeps circles
        circular), else None."""
        s1 = math.hypot(self.a, self.d)
        s2 = math.hypot(self.b, self.e)
        dot = self.a * self.b + self.d * self.e
        if abs(s1 - s2) <= rel_tol * max(s1, s2) and abs(dot) <= rel_tol * s1 * s2:
            return 0.5 * (s1 + s2)
        return None


def dist(p: Point, q: Point) -> float:
    """Distance between two points [mm]."""
    return math.hypot(q[0] - p[0], q[1] - p[1])


def cross(u: Point, v: Point) -> float:
    """z component of the cross product ``u × v``."""
    return u[0] * v[1] - u[1] * v[0]


def unit(v: Point) -> Point:
    """``v`` scaled to length 1 (``v`` must not be zero)."""
    n = math.hypot(v[0], v[1])
    return (v[0] / n, v[1] / n)


def segment_parameter(p: Point, a: Point, b: Point) -> float:
    """Parameter ``t`` in [0, 1] of the point of segment ``ab`` nearest ``p``."""
    dx, dy = b[0] - a[0], b[1] - a[1]
    ll = dx * dx + dy * dy
    if ll == 0.0:
        return 0.0
    t = ((p[0] - a[0]) * dx + (p[1] - a[1]) * dy) / ll
    return min(1.0, max(0.0, t))


def point_segment_distance(p: Point, a: Point, b: Point) -> float:
    """Distance from ``p`` to the segment ``ab`` [mm]."""
    t = segment_parameter(p, a, b)
    q = (a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1]))
    return dist(p, q)


def angle_in_arc(angle_deg: float, start_deg: float, end_deg: float, slack_deg: float = 0.0) -> bool:
    """True when ``angle_deg`` lies on the counter-clockwise arc from
    ``start_deg`` to ``end_deg``, widened by ``slack_deg`` at both ends."""
    span = (end_deg - start_deg) % 360.0
    off = (angle_deg - start_deg + slack_deg) % 360.0
    return off <= span + 2 * slack_deg
