"""Test geometries, defined once and shared by the test modules.

Each builder returns a :class:`dxfcheck.output.sketch.Sketch` in the project's layer
convention.  Geometry that comes from a published example says so.
"""

from __future__ import annotations

import math
import sys
from collections.abc import Callable
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "drawings"))

from build import TITLES, capstan_band, conveyor_block, winch_two_shoe  # noqa: E402

from dxfcheck.output.sketch import Sketch  # noqa: E402

__all__ = [
    "CATALOGUE",
    "ROOT",
    "TITLES",
    "block_brake",
    "capstan_band",
    "conveyor_block",
    "differential_band",
    "double_block_spring_pair",
    "frame_bellcrank_two_shoe",
    "internal_hinged_shoe",
    "pivoted_long_shoes",
    "push_rod_block",
    "simple_band",
    "spring_rod_double_block",
    "winch_two_shoe",
]


def block_brake(
    *,
    r: float,
    l: float,
    x: float,
    a: float,
    effort: str | None,
    contact_deg: float = 20.0,
    units: str | None = "mm",
) -> Sketch:
    """Single-lever block brake as in the lever equation P·l = N(x ∓ μa).

    The drum axis is at the origin and the block touches the drum at the top,
    (0, r).  The pivot O is at (-x, r + a): ``x`` is the arm of the normal
    force about O and ``a`` the offset of the friction line (the tangent at
    the contact point) from O.  The effort P acts downward at arm ``l`` from
    O, at the far end of the lever; the block is joined rigidly to the lever
    by a centreline from the lever down to the contact point.  For ``a = 0``
    the lever itself runs through the contact point, drawn as two pieces that
    meet there.
    """
    sk = Sketch(units=units)
    sk.drum(0, 0, r)
    y = r + a
    sk.pivot(-x, y, 20, label="O")
    end = -x + l
    if a == 0:
        sk.link((-x, y), (0.0, y), label="lever", label_at=(-x / 2, y + 15))
        sk.link((0.0, y), (end, y))
    else:
        sk.link((-x, y), (end, y), label="lever", label_at=(-x / 2, y + 15))
        sk.link((0.0, y), (0.0, r))
    sk.shoe(0, 0, r, 90 - contact_deg / 2, 90 + contact_deg / 2, label="block")
    sk.load(end, y, 0, -1, effort, length=60)
    return sk


def double_block_spring_pair(*, r: float, l: float, x: float, a: float, spring: str) -> Sketch:
    """Two levers with fixed blocks, pulled together at their tops.

    Geometry of B. K. Sarkar, *Theory of Machines*, ch. 10, Illustration 3:
    each lever is pivoted at O, carries a block at arm ``x`` from O whose
    friction line is offset ``a`` from O, and is pulled toward the drum by
    the spring force at arm ``l``.  The spring's equal and opposite pull on
    the two levers is drawn as two loads.
    """
    sk = Sketch()
    sk.drum(0, 0, r)
    for side, name in ((-1, "left"), (1, "right")):
        ox, oy = side * (r + a), -x
        sk.pivot(ox, oy, 20, label=f"O {name}")
        sk.link((ox, oy), (ox, oy + l), label=f"{name} lever", label_at=(ox + side * 15, oy + l / 2))
        sk.link((ox, 0.0), (side * r, 0.0))
        c = 180.0 if side < 0 else 0.0
        sk.shoe(0, 0, r, c - 20, c + 20, label=f"{name} block")
        sk.load(ox, oy + l, -side, 0, spring, length=50)
    return sk


def spring_rod_double_block(*, spring: str = "3500 N C", rod_first: bool = False, reverse: bool = False) -> Sketch:
    """The double-block geometry of :func:`double_block_spring_pair` (r = 180,
    l = 450, x = 200, a = 140) set the usual way: a pull rod pinned to the
    left lever's top T1(-320, 250) runs through the right lever (which
    crosses it and goes on to (320, 300): crossing lines do not join) to a
    nut at (400, 250); a compression spring on the rod between the right
    lever and the nut pushes the lever towards the drum and pulls the rod,
    and so the left lever, the other way.  ``rod_first`` draws the rod
    before the right lever, ``reverse`` the spring from the nut."""
    sk = Sketch()
    r = 180.0
    sk.drum(0, 0, r)
    for side, name in ((-1, "left"), (1, "right")):
        ox = side * 320.0
        sk.pivot(ox, -200, 20, label=f"O {name}")
        sk.link((ox, 0.0), (side * r, 0.0))
        c = 180.0 if side < 0 else 0.0
        sk.shoe(0, 0, r, c - 20, c + 20, label=f"{name} block")
    sk.link((-320, -200), (-320, 250), label="left lever", label_at=(-335, 100))
    sk.pin(-320, 250, 16, label="T1")
    rod = ((-320.0, 250.0), (400.0, 250.0))
    if rod_first:
        sk.link(*rod, label="pull rod", label_at=(0, 265))
    sk.link((320, -200), (320, 300), label="right lever", label_at=(335, 100))
    if not rod_first:
        sk.link(*rod, label="pull rod", label_at=(0, 265))
    ends = ((400.0, 250.0), (320.0, 250.0)) if reverse else ((320.0, 250.0), (400.0, 250.0))
    sk.spring(*ends, spring)
    return sk


def frame_bellcrank_two_shoe() -> Sketch:
    """The winch brake with its bell crank pivoted to the frame instead of
    floating on the right lever: with two shoes on a one-degree-of-freedom
    linkage, the linkage is statically indeterminate."""
    sk = Sketch()
    sk.drum(0, 0, 200)
    for side, tag in ((-1, "1"), (1, "2")):
        x = side * 250
        sk.pivot(x, -320, 30, label=f"O{tag}")
        sk.pin(x, 0, 24, label=f"S{tag}")
        top = 560 if side < 0 else 300
        sk.pin(x, top, 20, label=f"T{tag}")
        sk.link((x, -320), (x, 0), (x, top))
        sk.link((x, 0), (side * 200, 0))
        c = 180.0 if side < 0 else 0.0
        sk.shoe(0, 0, 200, c - 35, c + 35)
    sk.pivot(380, 420, 24, label="K")
    sk.pin(380, 560, 20, label="C")
    sk.pin(480, 420, 20, label="D")
    sk.link((380, 560), (380, 420), (680, 420), label="bell crank", label_at=(560, 435))
    sk.link((-250, 560), (380, 560), label="upper rod", label_at=(60, 575))
    sk.link((250, 300), (480, 420), label="lower rod", label_at=(365, 345))
    sk.load(680, 420, 0, -1, "1.5 kN")
    return sk


def push_rod_block(*, rod_d: float = 16.0) -> Sketch:
    """A block brake set through a push rod in compression.

    The conveyor lever (pivot O at (-260, 210), block on a 150 mm drum) is
    pushed down at its end E(520, 210) by a vertical rod from F(520, 400), the
    left arm of a bell crank pivoted to the frame at K(620, 400) whose right
    arm W(820, 400) takes an upward effort: rod force = P·200/100.
    """
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(-260, 210, 24, label="O")
    sk.pin(520, 210, rod_d, label="E")
    sk.link((-260, 210), (520, 210), label="lever", label_at=(300, 225))
    sk.link((0, 210), (0, 150))
    sk.shoe(0, 0, 150, 75, 105, label="block")
    sk.pin(520, 400, rod_d, label="F")
    sk.link((520, 210), (520, 400), label="push rod", label_at=(535, 300))
    sk.pivot(620, 400, 24, label="K")
    sk.link((520, 400), (620, 400), (820, 400), label="crank", label_at=(720, 415))
    sk.load(820, 400, 0, 1, "500 N")
    return sk


def pivoted_long_shoes(*, r: float, semi_deg: float, a: float, effort_N: float, pair: bool) -> Sketch:
    """Symmetric pivoted shoes, pin on the shoe's centreline at distance
    ``a`` from the drum axis (the geometry of Shigley's "symmetrically loaded
    pivoted shoe").  Each shoe pin sits in the middle of a vertical lever
    pivoted to the frame 300 below it; the effort ``effort_N`` pushes the
    lever's top, 300 above the pin, towards the drum, so the pin pushes the
    shoe with 2 × effort along the centreline.  ``pair`` adds the mirror
    image on the left."""
    sk = Sketch()
    sk.drum(0, 0, r)
    sides = ((1, "right"), (-1, "left")) if pair else ((1, "right"),)
    for side, name in sides:
        x = side * a
        sk.pivot(x, -300, 20, label=f"O {name}")
        sk.pin(x, 0, 20, label=f"S {name}" if a - r > 40 else None)
        sk.link((x, -300), (x, 0), (x, 300), label=f"{name} lever", label_at=(x + side * 20, 150))
        sk.link((x, 0), (side * r, 0), label=f"{name} shoe" if a - r > 40 else None, label_at=(side * (r + a) / 2, 8))
        c = 0.0 if side > 0 else 180.0
        sk.shoe(0, 0, r, c - semi_deg, c + semi_deg)
        sk.load(x, 300, -side, 0, f"{effort_N!r} N", length=40)
    return sk


def internal_hinged_shoe(
    sk: Sketch,
    *,
    r: float,
    hinge: tuple[float, float],
    phi_from: float,
    phi_to: float,
    act: tuple[float, float],
    push: tuple[float, float],
    effort: str,
    name: str,
    hinge_drawn: bool = True,
) -> None:
    """An internal (expanding) shoe fixed to a lever hinged at ``hinge``:
    the lining runs counter-clockwise from ``phi_from`` to ``phi_to``
    (degrees); the actuating force pushes at ``act`` along ``push``."""
    if hinge_drawn:
        sk.pivot(*hinge, 12, label=f"H {name}" if name else None)
    sk.link(hinge, act, label=f"{name} shoe", label_at=(0.7 * act[0] + 0.3 * hinge[0], 0.7 * act[1] + 0.3 * hinge[1]))
    mid = ((hinge[0] + act[0]) / 2, (hinge[1] + act[1]) / 2)
    m = math.radians((phi_from + phi_to) / 2)
    sk.link(mid, (r * math.cos(m), r * math.sin(m)))
    sk.shoe(0, 0, r, phi_from, phi_to)
    sk.load(*act, *push, effort, length=30)


def _tangent_point(r: float, deg: float) -> tuple[float, float]:
    t = math.radians(deg)
    return (r * math.cos(t), r * math.sin(t))


def differential_band(*, r: float, wrap_deg: float, a: float, c: float, arm: float, effort: str | None) -> Sketch:
    """A differential band brake: the wrap is symmetric about the top of the
    drum; the band leaves it tangentially at both ends; one lever, pivoted at
    a fulcrum O placed so that the perpendicular distance from O to the line
    of the wrap's start piece is ``a`` and to the end piece ``c``, with the
    two tensions turning the lever opposite ways (the geometry of the
    differential-band formula W·L = T2·a − T1·c, Mott §22-15); the effort
    pushes down at ``arm`` from O.  For a clockwise drum the wrap's end (the
    left side, pin C, arm ``c``) is the tight side: there the drum's top
    surface moves away from it, to the right, and drags the band away from C."""
    half = wrap_deg / 2
    s_deg, e_deg = 90 - half, 90 + half
    ps, pe = _tangent_point(r, s_deg), _tangent_point(r, e_deg)
    # unit vectors from the pins towards the tangent points (the band's pull)
    us = (-math.sin(math.radians(s_deg)), math.cos(math.radians(s_deg)))
    ue = (math.sin(math.radians(e_deg)), -math.cos(math.radians(e_deg)))
    # O at signed distances: cross(P - O, u) = a for the start piece, = -c for the end piece
    # cross(P, u) - cross(O, u) = k  ->  O·n = cross(P, u) - k with n = (u_y, -u_x)
    import numpy as np

    m = np.array([[us[1], -us[0]], [ue[1], -ue[0]]])
    rhs = np.array([ps[0] * us[1] - ps[1] * us[0] - a, pe[0] * ue[1] - pe[1] * ue[0] + c])
    ox, oy = (float(v) for v in np.linalg.solve(m, rhs))

    def foot(p: tuple[float, float], u: tuple[float, float]) -> tuple[float, float]:
        t = (ox - p[0]) * u[0] + (oy - p[1]) * u[1]
        return (p[0] + t * u[0], p[1] + t * u[1])

    fs, fe = foot(ps, us), foot(pe, ue)
    sk = Sketch()
    sk.drum(0, 0, r)
    sk.pivot(ox, oy, 20, label="O")
    sk.pin(*fs, 16, label="A")
    sk.pin(*fe, 16, label="C")
    sk.link(fs, (ox, oy), fe, label="lever", label_at=((fs[0] + ox) / 2 + 5, (fs[1] + oy) / 2 - 5))
    mid = ((fs[0] + ox) / 2, (fs[1] + oy) / 2)
    w = (ox + arm, mid[1])  # the arm's end: its moment arm about O is `arm`
    sk.link(mid, w)
    sk.band(0, 0, r, s_deg, e_deg, fs, fe)
    sk.load(w[0], w[1], 0, -1, effort, length=40)
    return sk


def simple_band(
    *, r: float, wrap_deg: float, anchor_run: float, arm: float, effort: str | None, units: str = "mm"
) -> Sketch:
    """A simple band brake: the wrap symmetric about the top of the drum,
    its end (left; tight for a clockwise drum, whose top surface moves right,
    away from it) anchored at the
    lever's fulcrum O, ``anchor_run`` down the band's line from the drum; the
    start piece runs to a pin A on the lever, which runs horizontally from O
    through A; the effort pushes down at ``arm`` from O."""
    half = wrap_deg / 2
    s_deg, e_deg = 90 - half, 90 + half
    ps, pe = _tangent_point(r, s_deg), _tangent_point(r, e_deg)
    ue_out = (-math.sin(math.radians(e_deg)), math.cos(math.radians(e_deg)))  # leaving the wrap's end
    o = (pe[0] + anchor_run * ue_out[0], pe[1] + anchor_run * ue_out[1])
    us_out = (math.sin(math.radians(s_deg)), -math.cos(math.radians(s_deg)))  # leaving the wrap's start
    t = (o[1] - ps[1]) / us_out[1]
    a_pin = (ps[0] + t * us_out[0], o[1])
    sk = Sketch(units=units)
    sk.drum(0, 0, r)
    sk.pivot(*o, r / 10, label="O")
    sk.pin(*a_pin, r / 12, label="A")
    end = (o[0] + arm, o[1])
    sk.link(o, end, label="lever", label_at=(o[0] + arm * 0.7, o[1] + r / 20))
    sk.band(0, 0, r, s_deg, e_deg, a_pin, o)
    sk.load(end[0], end[1], 0, -1, effort, length=r / 3)
    return sk


def _shigley_internal_pair() -> Sketch:
    """Two internal shoes on one hinge, the geometry of Shigley's MED 10th
    ed., Problem 16-1 (r = 150, hinge 125 below the axis, linings over 120°,
    2.2 kN actuating forces)."""
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(0, -125, 12, label="H")
    for phi_from, phi_to, x, side, name in ((-90, 30, 20, 1, "right"), (150, 270, -20, -1, "left")):
        internal_hinged_shoe(
            sk,
            r=150,
            hinge=(0, -125),
            phi_from=phi_from,
            phi_to=phi_to,
            act=(x, 91.5),
            push=(side, 0),
            effort="2.2 kN",
            name=name,
            hinge_drawn=False,
        )
    return sk


#: Every kind of brake the project solves, each with the friction
#: coefficient it is solved at: the property tests run over all of them.
CATALOGUE: dict[str, tuple[Callable[[], Sketch], float]] = {
    "winch two-shoe (pivoted shoes, floating crank)": (winch_two_shoe, 0.35),
    "conveyor block": (conveyor_block, 0.35),
    "capstan band (spring-set)": (capstan_band, 0.35),
    "block a>0": (lambda: block_brake(r=200, l=500, x=200, a=50, effort="1 kN"), 0.35),
    "block a<0": (lambda: block_brake(r=200, l=500, x=200, a=-50, effort="1 kN"), 0.35),
    "block a=0": (lambda: block_brake(r=200, l=500, x=200, a=0, effort="1 kN"), 0.35),
    "double block": (lambda: double_block_spring_pair(r=180, l=450, x=200, a=140, spring="3500 N"), 0.4),
    "double block, spring on a pull rod": (spring_rod_double_block, 0.4),
    "push rod block": (push_rod_block, 0.3),
    "pivoted long pair": (lambda: pivoted_long_shoes(r=250, semi_deg=50, a=280.59, effort_N=4000, pair=True), 0.2),
    "pivoted long, pin off the ideal": (
        lambda: pivoted_long_shoes(r=250, semi_deg=50, a=330, effort_N=4000, pair=True),
        0.3,
    ),
    "internal hinged pair": (_shigley_internal_pair, 0.28),
    "simple band": (lambda: simple_band(r=200, wrap_deg=225, anchor_run=150, arm=700, effort="2 kN"), 0.25),
    "differential band": (
        lambda: differential_band(r=300, wrap_deg=240, a=200, c=50, arm=950, effort="300 N"),
        0.25,
    ),
}
