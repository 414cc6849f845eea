"""The mechanism as dxfcheck infers it from a drawing: the frozen model
(drum, pins, parts, shoes, loads, springs, bands) that the statics solves.

Built by :mod:`dxfcheck.mechanism.build`; every length in mm, every force in N.
"""

from __future__ import annotations

import enum
from dataclasses import field, replace

from dxfcheck.core.findings import Finding
from dxfcheck.core.geometry import Point, dist, point_segment_distance
from dxfcheck.core.records import record
from dxfcheck.read.drawing import ArcGeom, Drawing, Source

__all__ = [
    "FRAME",
    "Band",
    "BandKind",
    "Drum",
    "Guide",
    "Load",
    "Mechanism",
    "Mounting",
    "Part",
    "Pin",
    "Shoe",
    "Spring",
]

#: Name of the fixed body (the machine frame and the drum's bearings).
FRAME = "frame"


class Mounting(enum.StrEnum):
    """How a shoe is carried by its lever."""

    PIVOTED = "pivoted"
    FIXED = "fixed"


class BandKind(enum.StrEnum):
    """How a band's ends are held (its value is the trade's word)."""

    SIMPLE = "simple"  # an end anchored to a frame pivot
    DIFFERENTIAL = "differential"  # both ends on one lever
    TWO_LEVER = "two-lever"  # each end on its own lever


@record(frozen=True)
class Drum:
    """The brake drum: ``center`` [mm] (the drum axis, on the frame) and
    braking-surface radius ``radius_mm`` [mm]."""

    center: Point
    radius_mm: float
    source: Source


@record(frozen=True)
class Pin:
    """A pin joint.

    Attributes
    ----------
    name : str
    center : Point
        Pin axis [mm].
    diameter_mm : float
        Pin diameter [mm] (the drawn circle).
    grounded : bool
        True for a pivot: the pin is fixed to the frame.
    parts : tuple of str
        Names of the moving parts it joins (the frame not included).
    source : Source
    """

    name: str
    center: Point
    diameter_mm: float
    grounded: bool
    parts: tuple[str, ...]
    source: Source

    @property
    def bodies(self) -> tuple[str, ...]:
        """Everything the pin joins, the frame included for a pivot."""
        return (*self.parts, FRAME) if self.grounded else self.parts


@record(frozen=True)
class Part:
    """A rigid part: its centreline ``segments`` [mm] and the pins on it."""

    name: str
    segments: tuple[tuple[Point, Point], ...]
    pins: tuple[str, ...]
    sources: tuple[Source, ...]

    def distance_to(self, p: Point) -> float:
        """Distance from ``p`` to the centreline [mm]."""
        return min(point_segment_distance(p, a, b) for a, b in self.segments)

    @property
    def points(self) -> tuple[Point, ...]:
        return tuple(dict.fromkeys(q for s in self.segments for q in s))


@record(frozen=True)
class Shoe:
    """A brake shoe: the lining arc on the drum and the part that carries it.

    Attributes
    ----------
    name : str
    part : str
        The part whose centreline ends on the arc.
    arc : ArcGeom
        The lining's contact arc [mm, degrees].
    mounting : Mounting
    pin : str or None
        The pin a pivoted shoe turns on.
    internal : bool
        True for a shoe inside the drum pressing outward.
    """

    name: str
    part: str
    arc: ArcGeom
    mounting: Mounting
    pin: str | None
    internal: bool

    @property
    def contact_angle_deg(self) -> float:
        """Angle the lining subtends at the drum axis [degrees]."""
        return self.arc.span_deg


@record(frozen=True)
class Load:
    """An applied force.

    Attributes
    ----------
    name : str
    part : str or None
        The part it acts on (None when it lies on no part).
    point : Point
        Point of application [mm].
    direction : Point
        Unit vector along the force.
    magnitude_N : float or None
        Magnitude [N], None when neither the drawing nor the caller gives it.
    text : str or None
        The text the magnitude was read from.
    source : Source
    """

    name: str
    part: str | None
    point: Point
    direction: Point
    magnitude_N: float | None
    text: str | None
    source: Source

    @property
    def force(self) -> Point:
        """The force vector [N] (zero when the magnitude is unknown)."""
        m = self.magnitude_N or 0.0
        return (m * self.direction[0], m * self.direction[1])


@record(frozen=True)
class Spring:
    """A spring between two points: an internal pair of equal and opposite
    forces along its line.

    Attributes
    ----------
    name : str
    ends : (Point, Point)
        Its ends [mm].
    parts : (str or None, str or None)
        The part at each end (None: the frame).
    force_N : float or None
        Its force [N].
    tension : bool
        True when it pulls its ends together, False when it pushes them
        apart (compression).
    text : str or None
    source : Source
    """

    name: str
    ends: tuple[Point, Point]
    parts: tuple[str | None, str | None]
    force_N: float | None
    tension: bool
    text: str | None
    source: Source

    def force_on(self, end: int) -> Point:
        """The force [N] the spring exerts on the part at ``end`` (0 or 1)."""
        a, b = self.ends[end], self.ends[1 - end]
        d = dist(a, b)
        ux, uy = (b[0] - a[0]) / d, (b[1] - a[1]) / d
        s = (self.force_N or 0.0) * (1.0 if self.tension else -1.0)
        return (s * ux, s * uy)


@record(frozen=True)
class Guide:
    """A rod passing through a hole in another part, where a spring sits on
    that part (a pull rod through a lever, its setting spring seated on the
    lever): the part holds the rod across its axis and the rod slides along
    it, so the one force between them is normal to the rod, with no
    component along it and no moment (a frictionless sliding guide).

    Attributes
    ----------
    name : str
    rod, part : str
        The part that passes through, and the part with the hole.
    at_mm : Point
        Where the rod's centreline crosses the part [mm]: the spring's seat.
    axis : Point
        Unit vector along the rod there.
    spring : str
        The spring seated there.
    """

    name: str
    rod: str
    part: str
    at_mm: Point
    axis: Point
    spring: str

    @property
    def normal(self) -> Point:
        """Unit vector across the rod (its axis turned 90° counter-clockwise):
        the direction of a positive guide force on the rod."""
        return (-self.axis[1], self.axis[0])


@record(frozen=True)
class Band:
    """A flexible band wrapped on the drum.

    Attributes
    ----------
    name : str
    center : Point
        The drum axis [mm].
    radius_mm : float
    start_deg, end_deg : float
        The wrap, counter-clockwise [degrees].
    start_pin, end_pin : str
        Pins the band's straight pieces run to from the wrap's start and end.
    start_dir, end_dir : Point
        Unit vectors from each pin towards where the band leaves the drum:
        the direction of the band's pull on the pin.
    kind : BandKind
        ``simple`` (an end anchored to a frame pivot), ``differential``
        (both ends on one lever) or ``two-lever``.
    sources : tuple of Source
    """

    name: str
    center: Point
    radius_mm: float
    start_deg: float
    end_deg: float
    start_pin: str
    end_pin: str
    start_dir: Point
    end_dir: Point
    kind: BandKind
    sources: tuple[Source, ...]

    @property
    def wrap_deg(self) -> float:
        """Angle of wrap [degrees]."""
        span = (self.end_deg - self.start_deg) % 360.0
        return 360.0 if span == 0.0 else span


@record(frozen=True)
class Mechanism:
    """Everything the statics needs, inferred from one drawing.

    Attributes
    ----------
    drawing : Drawing
    tolerance_mm : float
        The "lies on" tolerance used [mm].
    length_scale_mm : float
        A representative size of the mechanism [mm] (skeleton diagonal).
    drum : Drum or None
    pins, parts, shoes, loads : tuple
    findings : tuple of Finding
        Reading and topology findings.
    springs, bands, guides : tuple
    labelled_names : frozenset of str
    """

    drawing: Drawing
    tolerance_mm: float
    length_scale_mm: float
    drum: Drum | None
    pins: tuple[Pin, ...]
    parts: tuple[Part, ...]
    shoes: tuple[Shoe, ...]
    loads: tuple[Load, ...]
    findings: tuple[Finding, ...] = field(default=())
    springs: tuple[Spring, ...] = field(default=())
    bands: tuple[Band, ...] = field(default=())
    labelled_names: frozenset[str] = field(default=frozenset())
    guides: tuple[Guide, ...] = field(default=())

    @property
    def family(self) -> str:
        """The kind of brake the drawing holds, in the trade's words."""
        out: list[str] = []
        if self.shoes:
            n = len(self.shoes)
            if all(s.internal for s in self.shoes):
                out.append(f"internal expanding shoe brake ({n} shoe{'s' if n > 1 else ''})")
            elif n == 1:
                out.append("single-block brake")
            else:
                out.append(f"{n}-shoe external drum brake")
        out += [f"{b.kind} band brake" for b in self.bands]
        if self.springs:
            out.append("spring-set")
        return ", ".join(out) or "unknown"

    def pin(self, name: str) -> Pin:
        return next(p for p in self.pins if p.name == name)

    def scaled(self, factor: float) -> Mechanism:
        """The same mechanism with every load and spring force × ``factor``."""
        return replace(
            self,
            loads=tuple(replace(ld, magnitude_N=(ld.magnitude_N or 0.0) * factor) for ld in self.loads),
            springs=tuple(replace(sp, force_N=(sp.force_N or 0.0) * factor) for sp in self.springs),
        )

    def part(self, name: str) -> Part:
        return next(p for p in self.parts if p.name == name)
