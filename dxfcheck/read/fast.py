"""A reader that reads only what the skeleton needs, for every ASCII drawing.

Vendor assembly drawings hold hundreds of thousands of entities of clutter
(hatches, dimensions, title blocks) around a few dozen skeleton entities.
Building every one of them as an ezdxf object costs most of the time and
memory of reading such a file, and loading ezdxf at all costs more than
solving a small drawing.  This reader works in two steps:

1. A byte scan (:func:`_scan`) reads the file in chunks of
   :data:`CHUNK_BYTES` and keeps, as whole lines, only the structures the
   skeleton may use: the header, the section and block bounds, INSERTs, the
   entities on the mapped layers (and on layer 0 inside blocks), the first
   circles of each other layer (up to :data:`MAX_LOOSE_CIRCLES_PER_LAYER`
   per layer and container) and the first entity of each kind on each other
   layer, which name a layer near miss (:mod:`dxfcheck.mechanism.layers`).
   Paper space and everything else is skipped as bytes.  Files of
   :data:`NUMPY_SCAN_MIN_BYTES` and more are scanned as arrays of lines
   (:class:`_LineScan`, numpy); small files, and chunks in a format the
   arrays do not read, by compiled regular expressions (:class:`_Scan`).
2. The line walk (:func:`_groups`, :class:`_Loader`) splits what was kept
   into tags, keeps the header variables it needs and builds light
   stand-ins.  The scan drops a structure only where the walk would drop it
   without a trace, so the walk's result is the one it gives on the whole
   file.

The stand-ins offer the small part of the ezdxf entity interface that
:mod:`dxfcheck.read.drawing` uses, so both readers go through the same
geometry code and give the same results (a test compares them on every test
drawing, through every way of the scan).  ezdxf itself is loaded only for a
text with formatting codes.

Binary DXF, or anything this reader does not understand, falls back to the
full reader (and that to ezdxf's recover mode).
"""

from __future__ import annotations

import functools
import io
import os
import re
from collections.abc import Callable, Iterator
from pathlib import Path
from typing import Any

from dxfcheck.core import deadline, progress

__all__ = [
    "CHUNK_BYTES",
    "MAX_LOOSE_CIRCLES_PER_LAYER",
    "NUMPY_SCAN_MIN_BYTES",
    "FastDocument",
    "FastReadUnsupported",
    "load_fast",
]

#: Circles kept per layer that has no role, in each container (model space,
#: each block), counted on the entity's own layer: enough to recognise a pin
#: or drum layer, bounded on a vendor sheet with thousands of holes.
MAX_LOOSE_CIRCLES_PER_LAYER = 200
#: Polyline flag bits (group code 70; DXF Reference, POLYLINE and
#: LWPOLYLINE; from memory): closed, 3D polyline, polygon mesh, polyface mesh.
_CLOSED = 1
_POLY_3D = 8
_POLY_MESH = 16
_POLY_FACE = 64

_KEEP = {"CIRCLE", "ARC", "LINE", "LWPOLYLINE", "POLYLINE", "TEXT", "MTEXT", "INSERT"}


#: A text with no formatting code: no MTEXT command or group (``\\``,
#: ``{``, ``}``), no special character (``%%``), no caret notation (``^``),
#: no control character.  It is its own plain text.
_PLAIN = re.compile(r"[^\\{}%^\x00-\x1f\x7f]*")


class FastReadUnsupported(Exception):
    """The file is not one the fast reader handles; use the full reader."""


class _Attribs:
    """``entity.dxf``: attribute access by ezdxf's names."""

    def __init__(self, values: dict[str, Any]) -> None:
        self._v = values

    def get(self, name: str, default: Any = None) -> Any:
        return self._v.get(name, default)

    def __getattr__(self, name: str) -> Any:
        try:
            return self._v[name]
        except KeyError:
            raise AttributeError(name) from None


class _Vertex:
    def __init__(self, location: tuple[float, float, float], bulge: float) -> None:
        self.dxf = _Attribs({"location": location, "bulge": bulge})


class FastEntity:
    """A stand-in for an ezdxf entity, from its raw tags."""

    def __init__(self, dxftype: str, values: dict[str, Any], extra: dict[str, Any] | None = None) -> None:
        self._type = dxftype
        self.dxf = _Attribs(values)
        self._extra = extra or {}

    def dxftype(self) -> str:
        return self._type

    # TEXT / MTEXT
    def plain_text(self) -> str:
        """The text without its formatting codes: ezdxf's ``plain_text`` or
        ``plain_mtext``, loaded only for a text that has codes."""
        raw = str(self.dxf.get("text", ""))
        if _PLAIN.fullmatch(raw):
            return raw
        from ezdxf.tools.text import plain_mtext, plain_text

        if self._type == "MTEXT":
            return str(plain_mtext(raw, split=False))
        return str(plain_text(raw))

    # LWPOLYLINE
    def get_points(self, fmt: str = "xyb") -> list[tuple[float, float, float]]:
        return list(self._extra.get("points", []))

    @property
    def closed(self) -> bool:
        return bool(int(self.dxf.get("flags", 0)) & _CLOSED)

    # POLYLINE
    def get_mode(self) -> str:
        flags = int(self.dxf.get("flags", 0))
        if flags & _POLY_MESH:
            return "AcDbPolygonMesh"
        if flags & _POLY_FACE:
            return "AcDbPolyFaceMesh"
        if flags & _POLY_3D:
            return "AcDb3dPolyline"
        return "AcDb2dPolyline"

    @property
    def vertices(self) -> list[_Vertex]:
        return list(self._extra.get("vertices", []))

    @property
    def is_closed(self) -> bool:
        return self.closed


class _Block:
    def __init__(self, name: str, base: tuple[float, float, float]) -> None:
        self.name = name
        self.block = FastEntity("BLOCK", {"base_point": base})
        self.entities: list[FastEntity] = []

    def __iter__(self) -> Iterator[FastEntity]:
        return iter(self.entities)


class _Blocks:
    def __init__(self) -> None:
        self._by_name: dict[str, _Block] = {}

    def get(self, name: str) -> _Block | None:
        return self._by_name.get(name) or self._by_name.get(name.upper())

    def add(self, block: _Block) -> None:
        self._by_name[block.name] = block
        self._by_name.setdefault(block.name.upper(), block)


class _Header:
    def __init__(self) -> None:
        self.vars: dict[str, Any] = {}
        self.custom_vars: list[tuple[str, str]] = []

    def get(self, name: str, default: Any = None) -> Any:
        return self.vars.get(name, default)


class FastDocument:
    """The parts of an ezdxf document the skeleton reader uses."""

    def __init__(self) -> None:
        self.header = _Header()
        self.blocks = _Blocks()
        self._msp: list[FastEntity] = []

    @property
    def dxfversion(self) -> str:
        return str(self.header.get("$ACADVER", "AC1009"))

    def modelspace(self) -> list[FastEntity]:
        return self._msp


# DXF group codes (AutoCAD DXF Reference, "Group codes in numerical order"
# and the entity sections' group-code tables; from memory).
#: Entity type, or the SECTION/ENDSEC/BLOCK/EOF structure markers.
GC_TYPE = 0
#: Primary text value (a TEXT's string, an MTEXT's last chunk).
GC_TEXT = 1
#: Name: a section's, a block's, the block an INSERT places.
GC_NAME = 2
#: More text: an MTEXT's chunks of 250 characters before the last one.
GC_TEXT_MORE = 3
#: Entity handle.
GC_HANDLE = 5
#: Layer name.
GC_LAYER = 8
#: Header variable name (HEADER section).
GC_HEADER_VAR = 9
#: Primary point X (10), Y (20), Z (30); other points X at 11-18, Y at 21-28, Z at 31-38.
GC_X = 10
GC_Y = 20
GC_Z = 30
#: Last point X code of the point range (18; Y 28, Z 38).
GC_X_LAST = 18
#: Floating-point value: a circle's or arc's radius, a text's height.
GC_SIZE = 40
#: An INSERT's X scale factor.
GC_XSCALE = 41
#: An INSERT's Y scale factor; an LWPOLYLINE's or VERTEX's bulge.
GC_YSCALE_OR_BULGE = 42
#: An INSERT's (MINSERT's) column and row spacing.
GC_COLUMN_SPACING = 44
GC_ROW_SPACING = 45
#: Angle: an arc's start angle, a text's or INSERT's rotation [degrees].
GC_ANGLE = 50
#: An arc's end angle [degrees].
GC_END_ANGLE = 51
#: "Entities follow" flag of an INSERT (its ATTRIBs, then SEQEND).
GC_ATTRIBS_FOLLOW = 66
#: Space: 1 for paper space, absent or 0 for model space.
GC_SPACE = 67
#: Integer flags (polylines: closed, 3D, mesh); an INSERT's column count.
GC_FLAGS = 70
#: An INSERT's row count.
GC_ROW_COUNT = 71
#: A TEXT's horizontal and vertical alignment.
GC_HALIGN = 72
GC_VALIGN = 73
#: Extrusion direction X, Y, Z.
GC_EXTRUSION_X = 210
GC_EXTRUSION_Y = 220
GC_EXTRUSION_Z = 230
#: The group codes above as they stand on their line of the file.
_TYPE, _NAME, _LAYER, _SPACE = str(GC_TYPE), str(GC_NAME), str(GC_LAYER), str(GC_SPACE)
#: Value of a flag that is set (paper space, attributes follow).
_FLAG_SET = "1"

#: The point each point group code names, per entity kind (GC_X + k).
_POINT_NAMES: dict[str, dict[int, str]] = {
    "CIRCLE": {GC_X: "center"},
    "ARC": {GC_X: "center"},
    "LINE": {GC_X: "start", GC_X + 1: "end"},
    "TEXT": {GC_X: "insert", GC_X + 1: "align_point"},
    "MTEXT": {GC_X: "insert"},
    "INSERT": {GC_X: "insert"},
    "POLYLINE": {GC_X: "elevation_point"},
}
#: Structures the group walk keeps besides the entities of :data:`_KEEP`.
_STRUCTURE = frozenset({"SECTION", "BLOCK", "ENDBLK", "VERTEX", "SEQEND"})
#: The sections the group walk reads.
_READ_SECTIONS = frozenset({"HEADER", "BLOCKS", "ENTITIES"})
#: The container number of model space (blocks count from 0).
_MODEL_SPACE = -1


def _float(v: str) -> float:
    return float(v)


def _is_point_code(code: int) -> bool:
    """A coordinate of a point (X, Y or Z of 10-18) or of the extrusion."""
    return (GC_X <= code <= GC_Z + 8 and code % 10 <= 8) or code in (GC_EXTRUSION_X, GC_EXTRUSION_Y, GC_EXTRUSION_Z)


@functools.cache
def _attributes(dxftype: str) -> dict[int, tuple[str, Callable[[str], Any]]]:
    """Group code -> (ezdxf's attribute name, conversion) of the single
    values one entity kind keeps (points are read by :func:`_point`)."""
    table: dict[int, tuple[str, Callable[[str], Any]]] = {
        GC_HANDLE: ("handle", str),
        GC_LAYER: ("layer", str),
        GC_SIZE: ("radius" if dxftype in ("CIRCLE", "ARC") else "height", _float),
        GC_ANGLE: ("start_angle" if dxftype == "ARC" else "rotation", _float),
        GC_FLAGS: ("flags", int),
    }
    if dxftype != "MTEXT":  # an MTEXT's text is its chunks joined
        table[GC_TEXT] = ("text", str)
    if dxftype == "ARC":
        table[GC_END_ANGLE] = ("end_angle", _float)
    if dxftype == "INSERT":
        table[GC_NAME] = ("name", str)
        table[GC_XSCALE] = ("xscale", _float)
        table[GC_YSCALE_OR_BULGE] = ("yscale", _float)
        table[GC_COLUMN_SPACING] = ("column_spacing", _float)
        table[GC_ROW_SPACING] = ("row_spacing", _float)
        table[GC_FLAGS] = ("column_count", int)
        table[GC_ROW_COUNT] = ("row_count", int)
    if dxftype == "TEXT":
        table[GC_HALIGN] = ("halign", int)
        table[GC_VALIGN] = ("valign", int)
    return table


def _point(points: dict[int, list[float]], code: int, value: str) -> None:
    """One coordinate of a point, kept under its X code (the extrusion under
    :data:`GC_EXTRUSION_X`, (0, 0, 1) until given)."""
    if code >= GC_EXTRUSION_X:
        points.setdefault(GC_EXTRUSION_X, [0.0, 0.0, 1.0])[(code - GC_EXTRUSION_X) // 10] = _float(value)
        return
    base, axis = GC_X + code % 10, code // 10 - 1  # x, y, z of point 10 + k
    points.setdefault(base, [0.0, 0.0, 0.0])[axis] = _float(value)


def _lw_vertex(vertices: list[list[float]], code: int, value: str) -> None:
    """An LWPOLYLINE's vertex: X starts one, Y and the bulge complete it."""
    if code == GC_X:
        vertices.append([_float(value), 0.0, 0.0])
    elif vertices:
        vertices[-1][1 if code == GC_Y else 2] = _float(value)


def _entity(dxftype: str, tags: list[tuple[int, str]]) -> FastEntity:
    """Build the stand-in from one entity's tags (group code, value)."""
    values: dict[str, Any] = {}
    points: dict[int, list[float]] = {}
    lw_vertices: list[list[float]] = []
    mtext_chunks: list[str] = []  # the code-3 chunks, then the last one (code 1)
    attributes = _attributes(dxftype)
    lw = dxftype == "LWPOLYLINE"
    for code, value in tags:
        if lw and code in (GC_X, GC_Y, GC_YSCALE_OR_BULGE):
            _lw_vertex(lw_vertices, code, value)
        elif _is_point_code(code):
            _point(points, code, value)
        elif dxftype == "MTEXT" and code in (GC_TEXT, GC_TEXT_MORE):
            mtext_chunks.append(value)
        elif code in attributes:
            name, convert = attributes[code]
            values[name] = convert(value)
    names = _POINT_NAMES.get(dxftype, {})
    for base, xyz in points.items():
        if base == GC_EXTRUSION_X:
            values["extrusion"] = tuple(xyz)
        elif base in names:
            values[names[base]] = tuple(xyz)
    extra: dict[str, Any] = {}
    if dxftype == "MTEXT":
        values["text"] = "".join(mtext_chunks)
    if lw:
        extra["points"] = [(p[0], p[1], p[2]) for p in lw_vertices]
    return FastEntity(dxftype, values, extra)


def _header(doc: FastDocument, body: list[tuple[int, str]]) -> None:
    """The header variables the skeleton reader asks for."""
    current: str | None = None
    pending: str | None = None
    for code, value in body:
        if code == GC_HEADER_VAR:
            current = value
            continue
        if current in ("$INSUNITS", "$MEASUREMENT"):
            doc.header.vars[current] = int(value)
        elif current == "$ACADVER":
            doc.header.vars[current] = value
        elif current == "$CUSTOMPROPERTYTAG":
            pending = value
        elif current == "$CUSTOMPROPERTY" and pending is not None:
            doc.header.custom_vars.append((pending, value))
            pending = None


class _GroupWalk:
    """The state of :func:`_groups` between group codes 0: the structure
    being read, its tags, the section and container it is in, and the
    layers met without a role."""

    def __init__(self, roles: dict[str, Any]) -> None:
        self.roles = roles
        self.name: str | None = None
        self.body: list[tuple[int, str]] = []
        self.keeping = True
        self.stub = False
        self.paper = False  # an entity of paper space (group code 67 = 1): not model space
        self.section = ""
        self.want_section = False
        self.container = _MODEL_SPACE  # else the block's number
        self.loose: dict[tuple[int, str], int] = {}  # circles kept per (container, layer)
        self.listed: set[tuple[int, str, str]] = set()  # (container, layer, kind) yielded

    def pending(self) -> bool:
        """The structure read so far is yielded (kept, or a stub)."""
        return self.name is not None and (self.keeping or self.stub)

    def start(self, value: str) -> bool:
        """A group code 0 opens the next structure; False at the EOF marker
        (what follows it is not read, see ``drawing.TAIL_BYTES``)."""
        name = self.name = value.strip()
        self.body = []
        self.keeping = True
        self.stub = False
        self.paper = False
        if name == "EOF":
            return False
        if name == "SECTION":
            self.want_section = True
        elif name == "ENDSEC":
            self.section = ""
        elif name == "BLOCK":
            self.container += 1
        return True

    def layer_tag(self, value: str) -> bool:
        """The layer tag of an entity the skeleton may hold: False when the
        entity is dropped here (paper space; a layer with no role, past its
        circle quota or already listed for the kind; a stub keeps the tag)."""
        if self.paper and self.section == "ENTITIES":
            self.keeping = False
            return False
        layer = value.strip()
        if layer.upper() in self.roles or (self.section == "BLOCKS" and layer == "0"):
            return True
        where = self.container if self.section == "BLOCKS" else _MODEL_SPACE
        if self.name == "CIRCLE":
            n = self.loose.get((where, value), 0)
            self.loose[(where, value)] = n + 1
            self.keeping = n < MAX_LOOSE_CIRCLES_PER_LAYER
        else:
            key = (where, value, str(self.name))
            self.keeping, self.stub = False, key not in self.listed
            self.listed.add(key)
        if self.keeping:
            return True
        if self.stub:
            self.body.append((GC_LAYER, value))
        return False

    def wanted(self) -> bool:
        """The current structure is read on (a section, or what the reader
        builds inside the read sections); else it is dropped."""
        if self.section not in _READ_SECTIONS:
            self.keeping = self.name == "SECTION"
            return self.keeping
        if self.name not in _KEEP and self.name not in _STRUCTURE and self.section != "HEADER":
            self.keeping = False
            return False
        return True

    def group(self) -> tuple[str, str, list[tuple[int, str]]]:
        return str(self.name), self.section, self.body


def _groups(lines: Iterator[str], roles: dict[str, Any]) -> Iterator[tuple[str, str, list[tuple[int, str]]]]:
    """(structure name, section, tags) at every group code 0, reading the
    file's line pairs directly.  The tags of an entity on a layer that does
    not matter are not kept past its layer tag, but for the first circles of
    each such layer in a container (they may name a layer near miss), and the
    first entity of each kind on it is yielded with its tags up to the layer
    tag, so that the layer's kinds can be listed."""
    w = _GroupWalk(roles)
    for code_line in lines:
        value = next(lines, None)
        if value is None:
            break
        code = code_line.strip()
        value = value.rstrip("\r\n")
        if code == _TYPE:
            if w.pending():
                yield w.group()
            if not w.start(value):
                return
            continue
        if w.want_section and code == _NAME:
            w.section = value.strip()
            w.want_section = False
        if not w.keeping:
            continue
        if code == _SPACE and value.strip() == _FLAG_SET:
            w.paper = True
        if code == _LAYER and w.name in _KEEP and w.name not in ("INSERT", "POLYLINE") and not w.layer_tag(value):
            continue
        if w.wanted():
            w.body.append((_checked(int(code), value), value))
    if w.pending():
        yield w.group()


#: Group code ranges of integer values and of floating-point values (DXF
#: Reference, "Group code value types"; from memory).
_INTEGER_CODES = ((60, 99), (170, 179), (270, 299), (370, 389), (400, 409), (420, 429), (440, 459), (1060, 1071))
_FLOAT_CODES = ((10, 59), (110, 149), (210, 239), (460, 469), (1010, 1059))


@functools.cache
def _value_type(code: int) -> type | None:
    """int or float for a group code of numbers, None for the others."""
    if any(lo <= code <= hi for lo, hi in _INTEGER_CODES):
        return int
    if any(lo <= code <= hi for lo, hi in _FLOAT_CODES):
        return float
    return None


def _checked(code: int, value: str) -> int:
    """The group code, once its value is checked to be a number where the
    code wants one: else ValueError, and the full reader decides (ezdxf
    repairs such a value and says so, a finding D114)."""
    kind = _value_type(code)
    if kind is not None:
        kind(value)
    return code


def _xyz(body: list[tuple[int, str]]) -> tuple[float, float, float]:
    """The primary point (group codes 10, 20, 30) of a structure's tags."""
    xyz = [0.0, 0.0, 0.0]
    for c, val in body:
        if c in (GC_X, GC_Y, GC_Z):
            xyz[(c - GC_X) // 10] = float(val)
    return xyz[0], xyz[1], xyz[2]


def _vertex(body: list[tuple[int, str]]) -> _Vertex:
    """A polyline's VERTEX: its location and bulge."""
    bulge = 0.0
    for c, val in body:
        if c == GC_YSCALE_OR_BULGE:
            bulge = float(val)
    return _Vertex(_xyz(body), bulge)


def _flag_set(body: list[tuple[int, str]], code: int) -> bool:
    return any(c == code and v.strip() == _FLAG_SET for c, v in body)


class _Loader:
    """Builds a :class:`FastDocument` from the structures :func:`_groups`
    yields: the header, the blocks, the entities with their vertices."""

    def __init__(self, roles: dict[str, Any]) -> None:
        self.roles = roles
        self.doc = FastDocument()
        self.block: _Block | None = None
        self.poly: FastEntity | None = None
        self.skip_attribs = False
        self.listed: set[tuple[int, str, str]] = set()  # (container, layer, kind) already listed

    def take(self, name: str, section: str, body: list[tuple[int, str]]) -> None:
        """One structure: section, block bounds, vertex, or entity."""
        if name == "SECTION":
            if section == "HEADER":
                _header(self.doc, body)
            return
        if name in ("ENDSEC", "EOF"):
            return
        if section == "BLOCKS" and name in ("BLOCK", "ENDBLK"):
            self.block = self._block(body) if name == "BLOCK" else None
            return
        target = self._target(section)
        if target is not None:
            self._in_container(name, section, body, target)

    def _block(self, body: list[tuple[int, str]]) -> _Block:
        """A BLOCK opens: its name and base point."""
        block = _Block(next((v for c, v in body if c == GC_NAME), ""), _xyz(body))
        self.doc.blocks.add(block)
        return block

    def _target(self, section: str) -> list[FastEntity] | None:
        """The entity list of model space or of the open block."""
        if section == "ENTITIES":
            return self.doc._msp
        if section == "BLOCKS" and self.block is not None:
            return self.block.entities
        return None

    def _in_container(self, name: str, section: str, body: list[tuple[int, str]], target: list[FastEntity]) -> None:
        """A structure inside model space or a block: a polyline's VERTEX
        (they follow until SEQEND), an INSERT's ATTRIB, or an entity."""
        if name == "VERTEX" and self.poly is not None:
            self.poly._extra.setdefault("vertices", []).append(_vertex(body))
            return
        if name == "SEQEND":
            self.poly = None
            self.skip_attribs = False
            return
        if (self.skip_attribs and name == "ATTRIB") or name not in _KEEP:
            return
        if section == "ENTITIES" and _flag_set(body, GC_SPACE):
            if name == "POLYLINE":
                self.poly = FastEntity("POLYLINE", {})  # paper space: swallow its vertices
            return
        layer = next((v for c, v in body if c == GC_LAYER), "0")
        if name == "INSERT" or layer.upper() in self.roles or (section == "BLOCKS" and layer == "0"):
            self._entity(name, body, target)
        else:
            self._no_role(name, layer, body, target)

    def _entity(self, name: str, body: list[tuple[int, str]], target: list[FastEntity]) -> None:
        """An entity the skeleton may use, built in full."""
        ent = _entity(name, body)
        target.append(ent)
        if name == "POLYLINE":
            self.poly = ent
        if name == "INSERT" and _flag_set(body, GC_ATTRIBS_FOLLOW):
            self.skip_attribs = True

    def _no_role(self, name: str, layer: str, body: list[tuple[int, str]], target: list[FastEntity]) -> None:
        """An entity on a layer with no role: a circle within its layer's
        quota (see :func:`_groups`), else one token per layer and kind."""
        if name == "POLYLINE":
            self.poly = FastEntity("POLYLINE", {})  # swallow its vertices
        if name == "CIRCLE":
            target.append(_entity(name, body))
        elif (id(target), layer, name) not in self.listed:  # one token lists the layer's kind
            self.listed.add((id(target), layer, name))
            target.append(FastEntity(name, {"layer": layer}))


#: The first bytes of a binary DXF file.
_BINARY_SENTINEL = b"AutoCAD Binary DXF"
#: The byte-order mark some programs put before a UTF-8 file.
_BOM = b"\xef\xbb\xbf"
#: Bytes read from the file at a time [bytes]: the scan's memory is about
#: twice this, whatever the size of the file.
CHUNK_BYTES = 1 << 20
#: Most bytes one structure (a polyline with its vertices) may span across
#: chunks before the reader gives up and the full reader decides [bytes].
MAX_CARRY_BYTES = 1 << 26
#: A group-code-0 line: ``\n``, the code, the line end (the structure name
#: follows on the next line, and never starts with a digit).
_ZERO = re.compile(rb"\n[ \t]*0[ \t]*\r?\n(?=[ \t]*[A-Za-z_])")
#: A group-code-0 tag the scan looks at: a structure marker (group 1), or an
#: entity the skeleton may use (group 2) with the tags before its layer tag
#: (group 3) and its layer (group 4) when it has one.  A group code 0 or 8
#: never sits among the tags before the layer tag, so the match never runs
#: into the next structure.
_MARKER = re.compile(
    rb"\n[ \t]*0[ \t]*\r?\n[ \t]*"
    rb"(?:(SECTION|ENDSEC|BLOCK|ENDBLK|EOF)[ \t]*\r?(?=\n)"
    rb"|(CIRCLE|ARC|LINE|LWPOLYLINE|POLYLINE|TEXT|MTEXT|INSERT)[ \t]*\r?(?=\n)"
    rb"(?:\n((?:[ \t]*(?:[1-79]|[0-9]{2,4})[ \t]*\r?\n[^\n]*\n)*?)[ \t]*8[ \t]*\r?\n([^\r\n]*))?)"
)
#: A section's name tag right after its SECTION marker.
_SECTION_NAME = re.compile(rb"\n[ \t]*2[ \t]*\r?\n[ \t]*([^\r\n]*?)[ \t]*\r?\n")
#: The SEQEND that closes a polyline's vertices.
_SEQEND = re.compile(rb"\n[ \t]*0[ \t]*\r?\n[ \t]*SEQEND[ \t]*\r?(?=\n)")
#: A header variable with its first value: name (group 1), value (group 2).
_HEADER_VAR = re.compile(
    rb"\n[ \t]*9[ \t]*\r?\n[ \t]*(\$ACADVER|\$DWGCODEPAGE)[ \t]*\r?\n[ \t]*[0-9]+[ \t]*\r?\n([^\r\n]*)"
)
#: DXF code pages (``$DWGCODEPAGE``, ``ANSI_1252``...) by their last digits,
#: and Python's codec for each (as ezdxf's ``toencoding`` maps them).
_CODEPAGES = {
    "874": "cp874",
    "932": "cp932",
    "936": "gbk",
    "949": "cp949",
    "950": "cp950",
    "1250": "cp1250",
    "1251": "cp1251",
    "1252": "cp1252",
    "1253": "cp1253",
    "1254": "cp1254",
    "1255": "cp1255",
    "1256": "cp1256",
    "1257": "cp1257",
    "1258": "cp1258",
}
#: The first DXF version written in UTF-8 (R2007).
_UTF8_FROM = "AC1021"
_HEADER, _BLOCKS, _ENTITIES = b"HEADER", b"BLOCKS", b"ENTITIES"


def _encoding(head: bytes) -> str:
    """The text encoding of an ASCII DXF file from its HEADER section (the
    start of ``head``): UTF-8 from R2007 on, else ``$DWGCODEPAGE``, else
    cp1252."""
    m = re.match(rb"\n[ \t]*0[ \t]*\r?\n[ \t]*SECTION[ \t]*\r?" + _SECTION_NAME.pattern, head)
    if m is None or m.group(1) != _HEADER:
        return "cp1252"
    end = _ZERO.search(head, m.end())
    found = {
        k.decode(): v.decode("ascii", "replace").strip()
        for k, v in _HEADER_VAR.findall(head, 0, end.start() if end else len(head))
    }
    if found.get("$ACADVER", "AC1009") >= _UTF8_FROM:
        return "utf-8"
    page = found.get("$DWGCODEPAGE", "")
    return next((enc for digits, enc in _CODEPAGES.items() if page.endswith(digits)), "cp1252")


class _Scan:
    """The byte scan's state: the section and container it is in, the
    layers met, and the structures kept (as the bytes of whole lines).

    It keeps a structure whenever the line walk (:func:`_groups` and
    :class:`_Loader`) might use it, and drops one only when the walk would
    drop it without a trace: an entity kind the skeleton never holds, an
    entity of paper space, a circle on a layer with no role past its quota,
    another entity on such a layer whose kind is already listed for it.
    The walk then reads only what was kept, with the same result as on the
    whole file."""

    def __init__(self, roles: dict[str, Any], encoding: str) -> None:
        self.roles = roles
        self.encoding = encoding
        self.section = b""
        self.container = _MODEL_SPACE
        self.loose: dict[tuple[int, bytes], int] = {}
        self.listed: set[tuple[int, bytes, bytes]] = set()
        self.layers: dict[bytes, bool] = {}  # raw layer name -> has a role (or is layer 0, for blocks)
        self.kept: list[bytes] = []
        self.done = False

    def role_layer(self, raw: bytes) -> bool:
        """The layer has a role (as :meth:`_GroupWalk.layer_tag` decides)."""
        known = self.layers.get(raw)
        if known is None:
            known = self.layers[raw] = raw.decode(self.encoding, "surrogateescape").strip().upper() in self.roles
        return known

    def chunk(self, buf: bytes, cut: int) -> int:
        """Scan ``buf`` (starting with a line end) up to ``cut`` (the start of a
        group-code-0 line); returns where the next chunk starts (``cut``, or earlier when a
        kept structure runs past it)."""
        for m in _MARKER.finditer(buf, 0, cut):
            marker, kind = m.group(1), m.group(2)
            if marker is not None:
                end = self.marker(buf, m, marker)
            elif self.section in (_BLOCKS, _ENTITIES):
                end = self.entity(buf, m, kind)
            else:
                continue
            if end is None:
                return m.start()  # the structure runs on into the next chunk
            if self.done:
                return len(buf)
        return cut

    def keep(self, buf: bytes, start: int, end: int) -> None:
        self.kept.append(buf[start + 1 : end + 1])  # whole lines: from the code-0 line to the next one

    @staticmethod
    def _end(buf: bytes, m: re.Match[bytes], polyline: bool) -> int | None:
        """Where the structure of ``m`` ends: at the next group code 0 (a
        POLYLINE: at the one after its SEQEND); None past the buffer.  A
        structure is kept only once its end is found, and the scan's state
        changes only then, so that a structure run on into the next chunk is
        scanned again from its start."""
        at = m.end()
        if polyline:
            seqend = _SEQEND.search(buf, at)
            if seqend is None:
                return None
            at = seqend.end()
        nxt = _ZERO.search(buf, at)
        return None if nxt is None else nxt.start()

    def marker(self, buf: bytes, m: re.Match[bytes], marker: bytes) -> int | None:
        if marker == b"EOF":
            self.kept.append(b"0\nEOF\n")
            self.done = True
            return m.end()
        end = self._end(buf, m, False)
        if end is None:
            return None
        if marker == b"SECTION":
            name = _SECTION_NAME.match(buf, m.end())
            self.section = name.group(1) if name is not None else b""
        elif marker == b"ENDSEC":
            self.section = b""
        elif marker == b"BLOCK":
            self.container += 1
        self.keep(buf, m.start(), end)
        return end

    def entity(self, buf: bytes, m: re.Match[bytes], kind: bytes) -> int | None:
        """An entity of a kind the skeleton may use: kept, or dropped as the
        walk would drop it."""
        raw = m.group(4)
        polyline = kind == b"POLYLINE"
        in_blocks = self.section == _BLOCKS
        if raw is None or kind == b"INSERT" or self.role_layer(raw) or (in_blocks and raw.strip() == b"0"):
            if raw is not None and not in_blocks and not polyline and kind != b"INSERT" and self._paper(m.group(3)):
                return m.end()  # paper space, dropped at its layer tag
            return self._kept(buf, m, polyline)
        if not in_blocks and not polyline and self._paper(m.group(3)):
            return m.end()
        where = self.container if in_blocks else _MODEL_SPACE
        if kind == b"CIRCLE":
            n = self.loose.get((where, raw), 0)
            if n >= MAX_LOOSE_CIRCLES_PER_LAYER:
                return m.end()
            end = self._kept(buf, m, False)
            if end is not None:
                self.loose[(where, raw)] = n + 1
            return end
        key = (where, raw, kind)
        if key in self.listed:
            return m.end()
        end = self._kept(buf, m, polyline)
        if end is not None and not (polyline and not in_blocks and self._paper(buf[m.start() : end])):
            self.listed.add(key)  # as the loader lists it (a polyline of paper space is not listed)
        return end

    def _kept(self, buf: bytes, m: re.Match[bytes], polyline: bool) -> int | None:
        end = self._end(buf, m, polyline)
        if end is not None:
            self.keep(buf, m.start(), end)
        return end

    @staticmethod
    def _paper(tags: bytes | None) -> bool:
        """A paper-space flag (group code 67 = 1) among these tags."""
        if not tags or b"67" not in tags:
            return False
        lines = tags.split(b"\n")
        return any(c.strip() == b"67" and v.strip() == b"1" for c, v in zip(lines[::2], lines[1::2], strict=False))


def _scan(path: Path, roles: dict[str, Any]) -> tuple[bytes, str]:
    """The structures of an ASCII DXF file that the line walk may use (whole
    lines, in file order) and the file's encoding, read in chunks of
    :data:`CHUNK_BYTES` without splitting the rest into lines."""
    with open(path, "rb") as fh, progress.task(f"reading {path.name}", os.fstat(fh.fileno()).st_size) as bar:
        head = fh.read(CHUNK_BYTES)
        if head.startswith(_BINARY_SENTINEL):
            raise FastReadUnsupported("binary DXF")
        if head.startswith(_BOM) or (b"\r" in head and b"\n" not in head):
            raise FastReadUnsupported("a byte-order mark or old Mac line ends")
        scan = _Scan(roles, _encoding(b"\n" + head))
        buf = b"\n" + head
        at_end = len(head) < CHUNK_BYTES
        lines = None if at_end and len(head) < NUMPY_SCAN_MIN_BYTES else _LineScan(scan)
        while True:
            deadline.check("reading the drawing")
            bar.set(fh.tell())  # the bytes read so far
            data = buf if not at_end else buf + (_END[1:] if buf.endswith(b"\n") else _END)
            rest = None if lines is None else lines.chunk(data, at_end)
            if rest is None:  # a small file, or a chunk in a format the array scan does not follow
                rest = scan.chunk(data, _last_zero(buf) if not at_end else len(buf))
            if scan.done or at_end:
                break
            more = fh.read(CHUNK_BYTES)
            at_end = len(more) < CHUNK_BYTES
            if len(buf) - rest > MAX_CARRY_BYTES:
                raise FastReadUnsupported("a structure longer than the reader follows")
            buf = buf[rest:] + more  # from the line end before a group-code-0 line
    return b"".join(scan.kept), scan.encoding


#: Files this large [bytes] and larger are scanned as arrays of lines
#: (:class:`_LineScan`, numpy); smaller ones by the regular expressions alone.
NUMPY_SCAN_MIN_BYTES = 1 << 20
#: What ends the last chunk: a line end and an EOF marker, so that the last
#: structure ends (the file's own EOF marker comes first).
_END = b"\n  0\nEOF\n"
#: The longest group code line (spaces and digits) and structure name the
#: array scan reads [characters]; longer ones go to the regular expressions.
_CODE_WIDTH = 6
_NAME_WIDTH = 12
#: The longest layer name the array scan compares [bytes].
_LAYER_WIDTH = 255
#: Structure names by number in the array scan (0: any other).
_NAMES = (b"SECTION", b"ENDSEC", b"BLOCK", b"ENDBLK", b"EOF", b"SEQEND", *sorted(k.encode() for k in _KEEP))
_KIND = {name: k + 1 for k, name in enumerate(_NAMES)}


class _LineScan:
    """The byte scan of a chunk as arrays (numpy): the line ends, the group
    codes of the even lines, the structures at group code 0 with their
    names, layers and paper-space flags, and the decisions of
    :class:`_Scan` taken for all of them at once.  A chunk in a format it
    does not read (a group code that is not a right-aligned number of up to
    six characters, a structure name with spaces) goes to the regular
    expressions of :class:`_Scan` instead."""

    def __init__(self, scan: _Scan) -> None:
        import numpy as np  # a dependency of the statics; loaded here for big files only

        self.np = np
        self.scan = scan

    def chunk(self, buf: bytes, at_end: bool) -> int | None:
        """Scan ``buf`` (a line end, then whole structures, but for its end);
        returns where the next chunk starts, or None for the regular
        expressions."""
        np = self.np
        a = np.frombuffer(buf, np.uint8)
        nl = np.flatnonzero(a == 10)
        if len(nl) < 3:
            return None
        ends = nl[1:] - (a[nl[1:] - 1] == 13)  # each line's end, without a carriage return
        starts = nl[:-1] + 1
        pairs = len(starts) // 2
        code = self._codes(a, starts[0 : 2 * pairs : 2], ends[0 : 2 * pairs : 2])
        if code is None:
            return None
        vs, ve = starts[1 : 2 * pairs : 2], ends[1 : 2 * pairs : 2]
        zero = np.flatnonzero(code == 0)
        kinds = self._kinds(a, vs[zero], ve[zero])
        if kinds is None or len(zero) < 2:
            return None
        last = len(zero) if at_end else len(zero) - 1  # the last structure may run on
        seqends = np.flatnonzero(kinds == _KIND[b"SEQEND"])
        closed = seqends[seqends < last]
        open_poly = np.flatnonzero(kinds[:last] == _KIND[b"POLYLINE"])
        if len(open_poly) and (not len(closed) or open_poly[-1] > closed[-1]):
            last = int(open_poly[-1])  # a polyline whose vertices run on: the next chunk reads it
        bounds = np.append(zero, pairs)
        state = (self.scan.section, self.scan.container, self.scan.done)
        keep = self._decide(a, buf, code, vs, ve, zero, bounds, kinds, last)
        if keep is None:
            self.scan.section, self.scan.container, self.scan.done = state
            return None
        self._emit(buf, nl, bounds, kinds, seqends, keep)
        return int(nl[2 * bounds[last]]) if last < len(zero) else len(buf)

    def _codes(self, a: Any, s: Any, e: Any) -> Any:
        """The group codes the scan asks about (0, 2, 8, 67; -1 for any
        other) of the code lines [s, e), or None if one is not a number
        (digits after optional spaces, no leading zero) of up to
        :data:`_CODE_WIDTH` characters."""
        np = self.np
        n = e - s
        if not len(n) or bool(((n < 1) | (n > _CODE_WIDTH)).any()):
            return None
        chars = [a[e - 1 - k] for k in range(int(n.max()))]  # from the right; masked where k >= n
        run = (chars[0] >= 48) & (chars[0] <= 57)  # the characters so far are all digits
        ok = run.copy()
        for k in range(1, len(chars)):
            inside = n > k
            digit = (chars[k] >= 48) & (chars[k] <= 57)
            space = (chars[k] == 32) | (chars[k] == 9)
            ok &= ~inside | space | (digit & run)
            ok &= ~(inside & digit & run & (chars[k] == 48) & ((n == k + 1) | ~self._digit(chars, k + 1, n)))
            run &= digit & inside
        if not bool(ok.all()):
            return None
        one = (n == 1) | ~self._digit(chars, 1, n)  # a code of one digit
        code = np.full(len(s), -1, np.int16)
        for value in (0, 2, 8):
            code[one & (chars[0] == 48 + value)] = value
        if len(chars) > 1:
            code[(chars[0] == 55) & (chars[1] == 54) & ((n == 2) | ~self._digit(chars, 2, n))] = 67
        return code

    @staticmethod
    def _digit(chars: list[Any], k: int, n: Any) -> Any:
        """Whether the k-th character from the right is a digit (False past
        the line's start)."""
        if k >= len(chars):
            return n < 0  # all False
        return (n > k) & (chars[k] >= 48) & (chars[k] <= 57)

    def _fixed(self, a: Any, s: Any, e: Any, width: int) -> Any:
        """The lines [s, e) as fixed-width byte strings (numpy ``S`` type)."""
        np = self.np
        cols = np.arange(width)
        idx = np.minimum(s[:, None] + cols, len(a) - 1)
        block = np.where(cols < (e - s)[:, None], a[idx], 0).astype(np.uint8)
        return np.ascontiguousarray(block).view(f"S{width}").ravel()

    def _kinds(self, a: Any, s: Any, e: Any) -> Any:
        """Each structure's name as its number in :data:`_NAMES` (0 for any
        other); None if a name starts or ends with a space."""
        np = self.np
        n = e - s
        if bool((n > 0).any()):
            first, lastc = a[np.minimum(s, len(a) - 1)], a[np.maximum(e - 1, 0)]
            if bool((((first == 32) | (first == 9) | (lastc == 32) | (lastc == 9)) & (n > 0)).any()):
                return None
        names = self._fixed(a, s, e, _NAME_WIDTH)
        kinds = np.zeros(len(s), np.int8)
        for name, k in _KIND.items():
            kinds[names == name] = k
        kinds[n > _NAME_WIDTH] = 0
        return kinds

    def _decide(
        self, a: Any, buf: bytes, code: Any, vs: Any, ve: Any, zero: Any, bounds: Any, kinds: Any, last: int
    ) -> Any:
        """Which of the first ``last`` structures are kept (a boolean array),
        the scan's state carried on as :meth:`_Scan.marker` and
        :meth:`_Scan.entity` would; None when the regular expressions must
        read the chunk."""
        np, scan = self.np, self.scan
        n = last
        keep = np.zeros(n, bool)
        sections, containers = self._markers(buf, code, vs, ve, zero, kinds, n, keep)
        kind = kinds[:n]
        entity = (kind > _KIND[b"SEQEND"]) & ((sections == 1) | (sections == 2))  # 1 BLOCKS, 2 ENTITIES
        eights = np.flatnonzero(code == 8)
        j = np.searchsorted(eights, zero[:n])
        j_ok = np.minimum(j, max(len(eights) - 1, 0))
        has8 = (j < len(eights)) & (eights[j_ok] < bounds[1 : n + 1]) if len(eights) else np.zeros(n, bool)
        at8 = np.where(has8, eights[j_ok] if len(eights) else 0, 0)
        paper_at = self._paper(a, code, vs, ve)
        q = np.searchsorted(paper_at, zero[:n])
        q_ok = np.minimum(q, max(len(paper_at) - 1, 0))
        flag = paper_at[q_ok] if len(paper_at) else np.zeros(n, np.int64)
        found = q < len(paper_at)
        paper_any = found & (flag < bounds[1 : n + 1]) & (sections == 2)
        paper_before8 = found & (flag < at8) & has8 & (sections == 2)
        insert, poly, circle = kind == _KIND[b"INSERT"], kind == _KIND[b"POLYLINE"], kind == _KIND[b"CIRCLE"]
        drop = entity & ((poly & paper_any) | (~poly & ~insert & paper_before8))
        always = entity & ~drop & (insert | ~has8)
        keep |= always
        rest = np.flatnonzero(entity & ~drop & ~always)
        if len(rest) == 0:
            return keep
        lp = at8[rest]
        width = int((ve[lp] - vs[lp]).max(initial=0))
        if width > _LAYER_WIDTH:
            return None
        layers = self._fixed(a, vs[lp], ve[lp], max(width, 1))
        _, inv = np.unique(layers, return_inverse=True)
        raw = [bytes(buf[int(vs[p]) : int(ve[p])]) for p in lp[np.unique(inv, return_index=True)[1]]]
        in_blocks = sections[rest] == 1
        role = np.array([scan.role_layer(r) for r in raw], bool)[inv]
        zero_layer = np.array([r.strip() == b"0" for r in raw], bool)[inv]
        mine = role | (in_blocks & zero_layer)
        keep[rest[mine]] = True
        others = ~mine
        where = np.where(in_blocks, containers[rest], _MODEL_SPACE)
        self._loose(keep, rest[others & circle[rest]], where[others & circle[rest]], inv[others & circle[rest]], raw)
        listed = others & ~circle[rest]
        self._listed(keep, rest[listed], where[listed], inv[listed], kind[rest[listed]], raw)
        return keep

    def _markers(
        self, buf: bytes, code: Any, vs: Any, ve: Any, zero: Any, kinds: Any, n: int, keep: Any
    ) -> tuple[Any, Any]:
        """Sections (0 other, 1 BLOCKS, 2 ENTITIES, 3 HEADER) and containers
        of the first ``n`` structures; the markers are kept and the scan's
        section, container and end carried on."""
        np, scan = self.np, self.scan
        sections = np.empty(n, np.int8)
        containers = np.empty(n, np.int64)
        names = {b"BLOCKS": 1, b"ENTITIES": 2, b"HEADER": 3}
        marks = np.flatnonzero((kinds[:n] >= 1) & (kinds[:n] <= _KIND[b"EOF"]))
        sec = {b"BLOCKS": 1, b"ENTITIES": 2, b"HEADER": 3}.get(scan.section, 0)
        at = 0
        for i in (int(x) for x in marks):
            sections[at:i], containers[at:i] = sec, scan.container
            kind = _NAMES[int(kinds[i]) - 1]
            keep[i] = True
            if kind == b"EOF":
                scan.done = True
                keep[i + 1 :] = False
                sections[i:], containers[i:] = 0, scan.container
                return sections, containers
            if kind == b"SECTION":
                p = int(zero[i]) + 1
                name = bytes(buf[int(vs[p]) : int(ve[p])]).strip() if p < len(code) and code[p] == 2 else b""
                scan.section, sec = name, names.get(name, 0)
            elif kind == b"ENDSEC":
                scan.section, sec = b"", 0
            elif kind == b"BLOCK":
                scan.container += 1
            sections[i], containers[i] = sec, scan.container
            at = i + 1
        sections[at:n], containers[at:n] = sec, scan.container
        return sections, containers

    def _paper(self, a: Any, code: Any, vs: Any, ve: Any) -> Any:
        """The pairs that set paper space: group code 67, value 1."""
        np = self.np
        p = np.flatnonzero(code == 67)
        if not len(p):
            return p
        s, e = vs[p], ve[p]
        one = (e > s) & (a[np.maximum(e - 1, 0)] == 49)
        for k in range(1, _CODE_WIDTH + 1):
            inside = e - 1 - k >= s
            c = a[np.where(inside, e - 1 - k, 0)]
            one &= ~inside | (c == 32) | (c == 9)
        one &= (e - s) <= _CODE_WIDTH + 1
        return p[one]

    def _loose(self, keep: Any, idx: Any, where: Any, layer: Any, raw: list[bytes]) -> None:
        """The circles on layers with no role: the first of each container
        and layer, within the quota left."""
        np, scan = self.np, self.scan
        if not len(idx):
            return
        order = np.lexsort((idx, layer, where))
        w, lay = where[order], layer[order]
        new = np.ones(len(order), bool)
        new[1:] = (w[1:] != w[:-1]) | (lay[1:] != lay[:-1])
        group = np.cumsum(new) - 1
        first = np.flatnonzero(new)
        rank = np.arange(len(order)) - first[group]
        sizes = np.bincount(group)
        room = np.empty(len(first), np.int64)
        for g, f in enumerate(first):
            key = (int(w[f]), raw[int(lay[f])])
            count = scan.loose.get(key, 0)
            room[g] = taken = min(max(MAX_LOOSE_CIRCLES_PER_LAYER - count, 0), int(sizes[g]))
            scan.loose[key] = count + taken
        keep[idx[order[rank < room[group]]]] = True

    def _listed(self, keep: Any, idx: Any, where: Any, layer: Any, kind: Any, raw: list[bytes]) -> None:
        """Other entities on layers with no role: the first of each
        container, layer and kind not listed yet."""
        np, scan = self.np, self.scan
        if not len(idx):
            return
        key = ((where.astype(np.int64) + 1) * (int(layer.max()) + 1) + layer) * (len(_NAMES) + 1) + kind
        _, first = np.unique(key, return_index=True)
        for f in sorted(int(x) for x in first):
            k = (int(where[f]), raw[int(layer[f])], _NAMES[int(kind[f]) - 1])
            if k not in scan.listed:
                scan.listed.add(k)
                keep[idx[f]] = True

    def _emit(self, buf: bytes, nl: Any, bounds: Any, kinds: Any, seqends: Any, keep: Any) -> None:
        """Keep the chosen structures' lines, a polyline with its vertices
        up to the structure after its SEQEND."""
        poly = _KIND[b"POLYLINE"]
        for i in (int(x) for x in self.np.flatnonzero(keep)):
            end = i + 1
            if kinds[i] == poly:
                k = int(self.np.searchsorted(seqends, i))
                end = int(seqends[k]) + 1 if k < len(seqends) else len(bounds) - 1
            if _NAMES[int(kinds[i]) - 1] == b"EOF":
                self.scan.kept.append(b"0\nEOF\n")
                continue
            self.scan.kept.append(buf[int(nl[2 * bounds[i]]) + 1 : int(nl[2 * bounds[end]]) + 1])


def _last_zero(buf: bytes) -> int:
    """Where the last group-code-0 line of ``buf`` starts (0 if none: the
    whole buffer runs on into the next chunk)."""
    window = max(0, len(buf) - (1 << 16))
    while True:
        starts = [m.start() for m in _ZERO.finditer(buf, window)]
        if starts or window == 0:
            return starts[-1] if starts else 0
        window = max(0, window - (1 << 20))


def load_fast(path: Path, roles: dict[str, Any]) -> FastDocument:
    """Read the header, blocks and entities that matter for the skeleton.

    A byte scan (:class:`_Scan`) keeps the structures the skeleton may use;
    the line walk builds them.

    Parameters
    ----------
    path : Path
        An ASCII DXF file.
    roles : dict
        Upper-case layer name -> role: entities on other layers (but layer
        0 inside blocks, and INSERTs) are skipped without being built.

    Raises
    ------
    FastReadUnsupported
        For binary DXF or a structure this reader does not follow.
    """
    kept, encoding = _scan(path, roles)
    loader = _Loader(roles)
    text = io.TextIOWrapper(io.BytesIO(kept), encoding=encoding, errors="surrogateescape")
    for name, section, body in _groups(iter(text), roles):
        loader.take(name, section, body)
    return loader.doc
