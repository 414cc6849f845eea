"""A reader that reads only what the skeleton needs, for big drawings.

Vendor assembly drawings hold hundreds of thousands of entities of clutter
(hatches, dimensions, title blocks) around a few dozen skeleton entities.
Building every one of them as an ezdxf object costs most of the time and
memory of reading such a file.  This reader streams the raw tags of an ASCII
DXF file (ezdxf's low-level tag loader), groups them at group code 0, keeps
the header variables it needs, and builds light stand-ins only for the
entities on the mapped layers, for INSERTs and for what the blocks they place
hold; the rest is skipped as tags, but for the circles on other layers (up to
a number per layer) and one token per other layer and entity kind, which
name a layer near miss (:mod:`dxfcheck.mechanism.layers`).  The stand-ins offer the small part of the
ezdxf entity interface that :mod:`dxfcheck.read.drawing` uses, so both readers go
through the same geometry code and give the same results (a test compares
them on every test drawing).

Binary DXF, or anything this reader does not understand, falls back to the
full reader (and that to ezdxf's recover mode).
"""

from __future__ import annotations

from collections.abc import Iterator
from pathlib import Path
from typing import Any

__all__ = ["MAX_LOOSE_CIRCLES_PER_LAYER", "FastDocument", "FastReadUnsupported", "load_fast"]

#: Circles kept per layer that has no role, in each container (model space,
#: each block), counted on the entity's own layer: enough to recognise a pin
#: or drum layer, bounded on a vendor sheet with thousands of holes.
MAX_LOOSE_CIRCLES_PER_LAYER = 200

_KEEP = {"CIRCLE", "ARC", "LINE", "LWPOLYLINE", "POLYLINE", "TEXT", "MTEXT", "INSERT"}


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
        from ezdxf.tools.text import plain_mtext, plain_text

        raw = str(self.dxf.get("text", ""))
        if self._type == "MTEXT":
            return str(plain_mtext(raw, split=False))
        return str(plain_text(raw))

    # LWPOLYLINE
    def get_points(self, fmt: str = "xyb") -> list[tuple[float, float, float]]:
        return list(self._extra.get("points", []))

    @property
    def closed(self) -> bool:
        return bool(int(self.dxf.get("flags", 0)) & 1)

    # POLYLINE
    def get_mode(self) -> str:
        flags = int(self.dxf.get("flags", 0))
        if flags & 16:
            return "AcDbPolygonMesh"
        if flags & 64:
            return "AcDbPolyFaceMesh"
        if flags & 8:
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


def _float(v: str) -> float:
    return float(v)


def _entity(dxftype: str, tags: list[tuple[int, str]]) -> FastEntity:
    """Build the stand-in from one entity's tags (group code, value)."""
    v: dict[str, Any] = {}
    extra: dict[str, Any] = {}
    pts: dict[int, list[float]] = {}
    lw_points: list[list[float]] = []
    mtext_chunks: list[str] = []
    for code, value in tags:
        if code == 5:
            v["handle"] = value
        elif code == 8:
            v["layer"] = value
        elif dxftype == "LWPOLYLINE" and code in (10, 20, 42):
            if code == 10:
                lw_points.append([_float(value), 0.0, 0.0])
            elif lw_points:
                lw_points[-1][1 if code == 20 else 2] = _float(value)
        elif 10 <= code <= 18 or 20 <= code <= 28 or 30 <= code <= 38:
            base, axis = 10 + code % 10, code // 10 - 1  # x, y, z of point 10 + k
            pts.setdefault(base, [0.0, 0.0, 0.0])[axis] = _float(value)
        elif code in (210, 220, 230):
            pts.setdefault(210, [0.0, 0.0, 1.0])[(code - 210) // 10] = _float(value)
        elif code == 40:
            v["radius" if dxftype in ("CIRCLE", "ARC") else "height"] = _float(value)
        elif code == 50:
            v["start_angle" if dxftype == "ARC" else "rotation"] = _float(value)
        elif code == 51 and dxftype == "ARC":
            v["end_angle"] = _float(value)
        elif code == 1:
            if dxftype == "MTEXT":
                mtext_chunks.append(value)  # the last chunk, after the code-3 ones
            else:
                v["text"] = value
        elif code == 3 and dxftype == "MTEXT":
            mtext_chunks.append(value)
        elif code == 2 and dxftype == "INSERT":
            v["name"] = value
        elif code == 41 and dxftype == "INSERT":
            v["xscale"] = _float(value)
        elif code == 42 and dxftype == "INSERT":
            v["yscale"] = _float(value)
        elif code == 44 and dxftype == "INSERT":
            v["column_spacing"] = _float(value)
        elif code == 45 and dxftype == "INSERT":
            v["row_spacing"] = _float(value)
        elif code == 70:
            if dxftype == "INSERT":
                v["column_count"] = int(value)
            else:
                v["flags"] = int(value)
        elif code == 71 and dxftype == "INSERT":
            v["row_count"] = int(value)
        elif code == 72 and dxftype == "TEXT":
            v["halign"] = int(value)
        elif code == 73 and dxftype == "TEXT":
            v["valign"] = int(value)
    names = {
        "CIRCLE": {10: "center"},
        "ARC": {10: "center"},
        "LINE": {10: "start", 11: "end"},
        "TEXT": {10: "insert", 11: "align_point"},
        "MTEXT": {10: "insert"},
        "INSERT": {10: "insert"},
        "POLYLINE": {10: "elevation_point"},
    }.get(dxftype, {})
    for base, xyz in pts.items():
        if base == 210:
            v["extrusion"] = tuple(xyz)
        elif base in names:
            v[names[base]] = tuple(xyz)
    if dxftype == "MTEXT":
        v["text"] = "".join(mtext_chunks)
    if dxftype == "LWPOLYLINE":
        extra["points"] = [(p[0], p[1], p[2]) for p in lw_points]
    return FastEntity(dxftype, v, extra)


def _header(doc: FastDocument, body: list[tuple[int, str]]) -> None:
    """The header variables the skeleton reader asks for."""
    current: str | None = None
    pending: str | None = None
    for code, value in body:
        if code == 9:
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


def _groups(lines: Iterator[str], roles: dict[str, Any]) -> Iterator[tuple[str, str, list[tuple[int, str]]]]:
    """(structure name, section, tags) at every group code 0, reading the
    file's line pairs directly.  The tags of an entity on a layer that does
    not matter are not kept past its layer tag, but for the first circles of
    each such layer in a container (they may name a layer near miss), and the
    first entity of each kind on it is yielded with its tags up to the layer
    tag, so that the layer's kinds can be listed."""

    name: str | None = None
    body: list[tuple[int, str]] = []
    keeping = True
    stub = False
    paper = False  # an entity of paper space (group code 67 = 1): not model space
    section = ""
    want_section = False
    container = -1  # -1 model space, else the block's number
    loose: dict[tuple[int, str], int] = {}  # circles kept per (container, layer)
    listed: set[tuple[int, str, str]] = set()  # (container, layer, kind) yielded
    for code_line in lines:
        value = next(lines, None)
        if value is None:
            break
        code = code_line.strip()
        value = value.rstrip("\r\n")
        if code == "0":
            if name is not None and (keeping or stub):
                yield name, section, body
            name = value.strip()
            body = []
            keeping = True
            stub = False
            paper = False
            if name == "EOF":  # what follows the marker is not read (see drawing.TAIL_BYTES)
                return
            if name == "SECTION":
                want_section = True
            elif name == "ENDSEC":
                section = ""
            elif name == "BLOCK":
                container += 1
            continue
        if want_section and code == "2":
            section = value.strip()
            want_section = False
        if not keeping:
            continue
        if code == "67" and value.strip() == "1":
            paper = True
        if code == "8" and name in _KEEP and name not in ("INSERT", "POLYLINE"):
            if paper and section == "ENTITIES":
                keeping = False
                continue
            layer = value.strip()
            if layer.upper() not in roles and not (section == "BLOCKS" and layer == "0"):
                where = container if section == "BLOCKS" else -1
                if name == "CIRCLE":
                    n = loose.get((where, value), 0)
                    loose[(where, value)] = n + 1
                    keeping = n < MAX_LOOSE_CIRCLES_PER_LAYER
                else:
                    keeping, stub = False, (where, value, name) not in listed
                    listed.add((where, value, name))
                if not keeping:
                    if stub:
                        body.append((8, value))
                    continue
        if section not in ("HEADER", "BLOCKS", "ENTITIES"):
            keeping = name == "SECTION"
            if not keeping:
                continue
        if name not in _KEEP and name not in ("SECTION", "BLOCK", "ENDBLK", "VERTEX", "SEQEND") and section != "HEADER":
            keeping = False
            continue
        body.append((int(code), value))
    if name is not None and (keeping or stub):
        yield name, section, body


def load_fast(path: Path, roles: dict[str, Any]) -> FastDocument:
    """Read the header, blocks and entities that matter for the skeleton.

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
    from ezdxf.filemanagement import dxf_file_info

    with open(path, "rb") as fh:
        if fh.read(22).startswith(b"AutoCAD Binary DXF"):
            raise FastReadUnsupported("binary DXF")
    info = dxf_file_info(str(path))
    doc = FastDocument()
    block: _Block | None = None
    poly: FastEntity | None = None
    skip_attribs = False
    listed: set[tuple[int, str, str]] = set()  # (container, layer, kind) already listed
    with open(path, encoding=info.encoding or "cp1252", errors="surrogateescape") as fh:
        for name, section, body in _groups(iter(fh), roles):
            if name == "SECTION":
                if section == "HEADER":
                    _header(doc, body)
                continue
            if name in ("ENDSEC", "EOF"):
                continue
            if section == "BLOCKS":
                if name == "BLOCK":
                    bname = next((v for c, v in body if c == 2), "")
                    base = [0.0, 0.0, 0.0]
                    for c, val in body:
                        if c in (10, 20, 30):
                            base[(c - 10) // 10] = float(val)
                    block = _Block(bname, (base[0], base[1], base[2]))
                    doc.blocks.add(block)
                    continue
                if name == "ENDBLK":
                    block = None
                    continue
            if section not in ("ENTITIES", "BLOCKS"):
                continue
            target = doc._msp if section == "ENTITIES" else (block.entities if block is not None else None)
            if target is None:
                continue
            # polylines: VERTEX entities follow until SEQEND
            if name == "VERTEX" and poly is not None:
                loc = [0.0, 0.0, 0.0]
                bulge = 0.0
                for c, val in body:
                    if c in (10, 20, 30):
                        loc[(c - 10) // 10] = float(val)
                    elif c == 42:
                        bulge = float(val)
                poly._extra.setdefault("vertices", []).append(_Vertex((loc[0], loc[1], loc[2]), bulge))
                continue
            if name == "SEQEND":
                poly = None
                skip_attribs = False
                continue
            if skip_attribs and name == "ATTRIB":
                continue
            if name not in _KEEP:
                continue
            if section == "ENTITIES" and any(c == 67 and v.strip() == "1" for c, v in body):
                if name == "POLYLINE":
                    poly = FastEntity("POLYLINE", {})  # paper space: swallow its vertices
                continue
            layer = next((v for c, v in body if c == 8), "0")
            keep = name == "INSERT" or layer.upper() in roles or (section == "BLOCKS" and layer == "0")
            if not keep:
                if name == "POLYLINE":
                    poly = FastEntity("POLYLINE", {})  # swallow its vertices
                if name == "CIRCLE":  # within its layer's quota (see _groups)
                    target.append(_entity(name, body))
                elif (id(target), layer, name) not in listed:  # one token lists the layer's kind
                    listed.add((id(target), layer, name))
                    target.append(FastEntity(name, {"layer": layer}))
                continue
            ent = _entity(name, body)
            target.append(ent)
            if name == "POLYLINE":
                poly = ent
            if name == "INSERT" and any(c == 66 and val.strip() == "1" for c, val in body):
                skip_attribs = True
    return doc
