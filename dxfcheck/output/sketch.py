"""Write brake skeleton drawings in dxfcheck's layer convention.

Used to make the demo drawings and the test drawings, and handy for scripting
a parametric study.  A :class:`Sketch` records the skeleton as plain data, so
that the same brake can be written moved, turned, mirrored, scaled to other
units, or wrapped in (nested) block references::

    from dxfcheck.output.sketch import Sketch
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(-250, 200, 20, label="O")
    sk.link((-250, 200), (400, 200), label="lever")
    ...
    sk.save("brake.dxf")

All coordinates are in the sketch's drawing units (``units``, default mm).
"""

from __future__ import annotations

import math
import os
from dataclasses import dataclass, field
from typing import Any

from dxfcheck.core.geometry import Affine, Point
from dxfcheck.core.records import record

__all__ = ["BlockWrap", "Sketch"]

_INSUNITS = {"mm": 4, "cm": 5, "m": 6, "inch": 1, "in": 1, "ft": 2, "foot": 2, None: 0}
_ROLES = ("pivot", "pin", "link", "drum", "shoe", "load", "label", "band", "spring")  # layers made, in this order
_BLOCK_PREFIX = "SKEL"  # wrap blocks are SKEL0 (outermost), SKEL1, ...
_TEXT_HEIGHT = 6.0  # [drawing units] before the transform's scale


@record(frozen=True)
class BlockWrap:
    """Place the sketch's entities inside a block referenced by an INSERT
    with these attributes (the outermost wrap comes first in a list)."""

    insert: Point = (0.0, 0.0)
    rotation_deg: float = 0.0
    xscale: float = 1.0
    yscale: float = 1.0
    base: Point = (0.0, 0.0)

    def affine(self) -> Affine:
        return (
            Affine.translation(*self.insert)
            @ Affine.rotation(self.rotation_deg)
            @ Affine.scaling(self.xscale, self.yscale)
            @ Affine.translation(-self.base[0], -self.base[1])
        )


@dataclass
class Sketch:
    """A brake skeleton being drawn.

    Parameters
    ----------
    units : str or None
        Drawing unit written to ``$INSUNITS`` (``None`` leaves it unset).
    layers : dict, optional
        Role -> layer name, for drawings that use a project's own names.
    """

    units: str | None = "mm"
    layers: dict[str, str] = field(default_factory=dict)
    items: list[tuple[Any, ...]] = field(default_factory=list)

    def _layer(self, role: str) -> str:
        return self.layers.get(role, role.upper())

    def pivot(self, x: float, y: float, d: float = 20.0, label: str | None = None) -> Sketch:
        """A frame pivot of diameter ``d`` at ``(x, y)``."""
        self.items.append(("circle", "pivot", (x, y), d / 2))
        if label:
            self.label(label, x, y)
        return self

    def pin(self, x: float, y: float, d: float = 16.0, label: str | None = None) -> Sketch:
        """A pin of diameter ``d`` joining moving parts at ``(x, y)``."""
        self.items.append(("circle", "pin", (x, y), d / 2))
        if label:
            self.label(label, x, y)
        return self

    def drum(self, x: float, y: float, r: float) -> Sketch:
        """The drum's braking surface, radius ``r``."""
        self.items.append(("circle", "drum", (x, y), r))
        return self

    def link(self, *points: Point, label: str | None = None, label_at: Point | None = None) -> Sketch:
        """A centreline piece through ``points`` (a LINE for two points,
        else an LWPOLYLINE)."""
        self.items.append(("path", "link", tuple(points)))
        if label:
            if label_at is None:
                (x0, y0), (x1, y1) = points[0], points[1]
                label_at = ((x0 + x1) / 2, (y0 + y1) / 2)
            self.label(label, *label_at)
        return self

    def shoe(self, x: float, y: float, r: float, start_deg: float, end_deg: float, label: str | None = None) -> Sketch:
        """A lining contact arc, counter-clockwise from ``start_deg`` to
        ``end_deg``."""
        self.items.append(("arc", "shoe", (x, y), r, start_deg, end_deg))
        if label:
            # just inside the lining, a quarter of the way along it, so the
            # label is nearer the arc than the part that ends at its middle
            span = (end_deg - start_deg) % 360
            at = math.radians(start_deg + span / 4)
            rr = r - min(0.02 * r, 0.2 * r * math.radians(span))
            self.label(label, x + rr * math.cos(at), y + rr * math.sin(at))
        return self

    def load(self, x: float, y: float, dx: float, dy: float, text: str | None = None, length: float = 60.0) -> Sketch:
        """A load applied at ``(x, y)`` along ``(dx, dy)``, drawn ``length``
        long, with its magnitude ``text`` beside the arrow's tail."""
        n = math.hypot(dx, dy)
        ux, uy = dx / n, dy / n
        end = (x + length * ux, y + length * uy)
        self.items.append(("path", "load", ((x, y), end)))
        if text:
            self.items.append(("text", "load", text, (x + 1.1 * length * ux, y + 1.1 * length * uy)))
        return self

    def band(
        self,
        x: float,
        y: float,
        r: float,
        start_deg: float,
        end_deg: float,
        start_pin: Point,
        end_pin: Point,
    ) -> Sketch:
        """A band wrapped counter-clockwise from ``start_deg`` to ``end_deg``
        on the drum circle, its straight pieces running from the wrap's ends
        to the pins at ``start_pin`` and ``end_pin``."""
        self.items.append(("arc", "band", (x, y), r, start_deg, end_deg))
        for deg, pin in ((start_deg, start_pin), (end_deg, end_pin)):
            t = math.radians(deg)
            self.items.append(("path", "band", ((x + r * math.cos(t), y + r * math.sin(t)), pin)))
        return self

    def spring(self, a: Point, b: Point, text: str | None) -> Sketch:
        """A spring from ``a`` to ``b`` with its force text (e.g. ``"4.2 kN C"``)
        beside its middle."""
        self.items.append(("path", "spring", (a, b)))
        if text:
            mid = ((a[0] + b[0]) / 2, (a[1] + b[1]) / 2)
            self.items.append(("text", "spring", text, (mid[0], mid[1] + 8.0)))
        return self

    def label(self, text: str, x: float, y: float) -> Sketch:
        """A label text centred at ``(x, y)``."""
        self.items.append(("text", "label", text, (x, y)))
        return self

    # -- writing -------------------------------------------------------------
    def to_doc(
        self,
        transform: Affine | None = None,
        wraps: tuple[BlockWrap, ...] = (),
        dxfversion: str = "R2010",
    ) -> Any:
        """Build an ezdxf document.

        ``transform`` (a similarity) is applied to the geometry; each entry of
        ``wraps`` puts everything inside one more block level, the entities
        being written in the block's own coordinates so that the drawing looks
        the same as without wraps.
        """
        doc = self._new_doc(dxfversion)
        to_local = _to_local(transform, wraps)
        target = _block_target(doc, wraps)
        mirrored = to_local.mirrors
        scale = math.sqrt(abs(to_local.det))
        for it in self.items:
            kind, role = it[0], it[1]
            attribs = {"layer": self._layer(role)}
            if kind == "circle":
                _write_circle(target, it, to_local, scale, attribs)
            elif kind == "arc":
                _write_arc(target, it, to_local, scale, mirrored, attribs)
            elif kind == "path":
                _write_path(target, it, to_local, dxfversion, attribs)
            elif kind == "text":
                _write_text(target, it, to_local, scale, attribs)
        return doc

    def _new_doc(self, dxfversion: str) -> Any:
        """An empty ezdxf document in the sketch's units with every role's
        layer."""
        from ezdxf.filemanagement import new

        doc = new(dxfversion, units=_INSUNITS.get(self.units, 0))
        if self.units is None:
            doc.header["$INSUNITS"] = 0
            if "$MEASUREMENT" in doc.header:
                del doc.header["$MEASUREMENT"]
        for role in _ROLES:
            name = self._layer(role)
            if name not in doc.layers:
                doc.layers.add(name)
        return doc

    def save(
        self,
        path: str | os.PathLike[str],
        transform: Affine | None = None,
        wraps: tuple[BlockWrap, ...] = (),
        dxfversion: str = "R2010",
    ) -> None:
        """Write the sketch as a DXF file (see :meth:`to_doc`)."""
        self.to_doc(transform, wraps, dxfversion).saveas(os.fspath(path))


def _to_local(transform: Affine | None, wraps: tuple[BlockWrap, ...]) -> Affine:
    """Drawing coordinates -> the innermost block's frame, where the
    geometry is written: ``transform`` then the inverse of every wrap."""
    m = transform or Affine()
    inner = Affine()
    for w in wraps:
        inner = inner @ w.affine()
    return _inverse(inner) @ m


def _block_target(doc: Any, wraps: tuple[BlockWrap, ...]) -> Any:
    """The layout the entities go into: the modelspace, or the innermost of
    the nested blocks made for ``wraps``, each referenced by an INSERT in the
    level above."""
    target: Any = doc.modelspace()
    for depth, w in enumerate(wraps):
        blk = doc.blocks.new(f"{_BLOCK_PREFIX}{depth}")
        target.add_blockref(
            blk.name,
            w.insert,
            dxfattribs={
                "rotation": w.rotation_deg,
                "xscale": w.xscale,
                "yscale": w.yscale,
                "layer": "0",
            },
        )
        if blk.block is not None:
            blk.block.dxf.base_point = (w.base[0], w.base[1], 0.0)
        target = blk
    return target


def _write_circle(target: Any, it: tuple[Any, ...], to_local: Affine, scale: float, attribs: dict[str, str]) -> None:
    """A ``("circle", role, centre, radius)`` item as a CIRCLE."""
    c = to_local.apply(it[2])
    target.add_circle(c, it[3] * scale, dxfattribs=attribs)


def _write_arc(
    target: Any, it: tuple[Any, ...], to_local: Affine, scale: float, mirrored: bool, attribs: dict[str, str]
) -> None:
    """A ``("arc", role, centre, radius, start_deg, end_deg)`` item as an
    ARC, its end angles taken from the transformed end points (swapped when
    the transform mirrors, so the arc stays counter-clockwise)."""
    (cx, cy), r, a0, a1 = it[2], it[3], it[4], it[5]
    c = to_local.apply((cx, cy))
    pts = [to_local.apply((cx + r * math.cos(math.radians(a)), cy + r * math.sin(math.radians(a)))) for a in (a0, a1)]
    s0 = math.degrees(math.atan2(pts[0][1] - c[1], pts[0][0] - c[0]))
    s1 = math.degrees(math.atan2(pts[1][1] - c[1], pts[1][0] - c[0]))
    if mirrored:
        s0, s1 = s1, s0
    target.add_arc(c, r * scale, s0, s1, dxfattribs=attribs)


def _write_path(target: Any, it: tuple[Any, ...], to_local: Affine, dxfversion: str, attribs: dict[str, str]) -> None:
    """A ``("path", role, points)`` item as a LINE (two points) or a
    polyline."""
    pts = [to_local.apply(p) for p in it[2]]
    if len(pts) == 2:
        target.add_line(pts[0], pts[1], dxfattribs=attribs)
    elif dxfversion == "R12":  # R12 has no LWPOLYLINE
        target.add_polyline2d(pts, dxfattribs=attribs)
    else:
        target.add_lwpolyline(pts, dxfattribs=attribs)


def _write_text(target: Any, it: tuple[Any, ...], to_local: Affine, scale: float, attribs: dict[str, str]) -> None:
    """A ``("text", role, text, at)`` item as a TEXT centred at ``at``."""
    from ezdxf.enums import TextEntityAlignment

    p = to_local.apply(it[3])
    t = target.add_text(it[2], height=_TEXT_HEIGHT * scale, dxfattribs=attribs)
    t.set_placement(p, align=TextEntityAlignment.MIDDLE_CENTER)


def _inverse(m: Affine) -> Affine:
    det = m.det
    a, b, d, e = m.e / det, -m.b / det, -m.d / det, m.a / det
    return Affine(a, b, -(a * m.c + b * m.f), d, e, -(d * m.c + e * m.f))
