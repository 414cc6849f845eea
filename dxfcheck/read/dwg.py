"""Read a DWG drawing through the optional ``ezdwg`` package (extra ``dwg``).

The adapter takes ezdwg's *reader* (``ezdwg.read()``: the document's
entities, each entity's owner from ``entity_placement()``, the layer table,
the block records with their base points, the header's ``$INSUNITS``) and
builds from it an in-memory ezdxf document of the same drawing: model space
and every block definition, entity for entity, with the DWG's layer names,
block names and insert transforms.  That document then goes through the
same reader as a DXF file (:mod:`dxfcheck.read.drawing`: the block walk,
layer-0 inheritance, every check and finding), so a DWG and its DXF twin
give the same :class:`~dxfcheck.read.drawing.Drawing`.  ezdwg's bundled DXF
conversion (``to_dxf``) is never used: it drops ``$INSUNITS`` and block
inserts of older versions.

Carried over as geometry: LINE, CIRCLE, ARC, ELLIPSE, LWPOLYLINE, 2D
POLYLINE (its vertices and bulges), TEXT, MTEXT, INSERT and MINSERT; as text, the block attributes: the
ATTDEFs of each block definition and the ATTRIBs of each block reference
(the title block's drawing number, title and revision,
:mod:`dxfcheck.read.titleblock`).  Other
kinds (SPLINE, SOLID, 3D polylines, ...) become an invisible entity of their kind
without geometry where they could reach a role layer (their own layer has a
role, or ``0`` inside a block), so that the reader reports them as it does
for DXF (D102); hatches, dimensions, viewports and points are ignored by
the reader anywhere and are not carried (attributes are ignored by the
geometry reader too, but the title block reader reads them).

Versions: R2000-R2018 (``AC1015``-``AC1032``) are read; R14 (``AC1014``) and
R13 (``AC1012``) with finding D120 (no ``$INSUNITS`` in R14's header; R13's
layer names are not decoded, so R13 is refused when no role layer is found);
older versions, unknown versions and damaged files are refused.

References
----------
Open Design Alliance, *Open Design Specification for .dwg files*, version
5.4.1 (2018): the file starts with the six-byte version string (section 2,
"R13-R15 DWG file format organization"; the version codes ``AC1012`` R13 to
``AC1032`` R2018 listed in section 1).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from dxfcheck.core import deadline
from dxfcheck.core.errors import DrawingReadError
from dxfcheck.core.findings import Code, Finding, Severity

__all__ = [
    "DWG_SUFFIX",
    "INSTALL_HINT",
    "OLD_VERSIONS",
    "QUERIED_KINDS",
    "READ_VERSIONS",
    "DwgDocument",
    "check_head",
    "is_dwg_name",
    "load_dwg",
    "looks_like_dwg",
]

#: File name ending that sends a drawing to the DWG reader.
DWG_SUFFIX = ".dwg"
#: What to run to read DWG files.
INSTALL_HINT = "pip install dxfcheck[dwg]"
#: DWG versions read: code -> release name.  R14 and R13 with finding D120.
READ_VERSIONS = {
    "AC1012": "R13",
    "AC1014": "R14",
    "AC1015": "R2000",
    "AC1018": "R2004",
    "AC1021": "R2007",
    "AC1024": "R2010",
    "AC1027": "R2013",
    "AC1032": "R2018",
}
#: Older DWG versions (refused): code -> release name.
OLD_VERSIONS = {
    "MC0.0": "R1.0",
    "AC1.2": "R1.2",
    "AC1.4": "R1.4",
    "AC1.50": "R2.0",
    "AC2.10": "R2.10",
    "AC1001": "R2.2",
    "AC1002": "R2.5",
    "AC1003": "R2.6",
    "AC1004": "R9",
    "AC1006": "R10",
    "AC1009": "R11/R12",
}
#: DXF version of the in-memory document for each DWG version (R13/R14 have
#: no DXF version of their own in ezdxf: R2000 holds everything they hold).
_DXF_VERSION = {"AC1012": "AC1015", "AC1014": "AC1015"}
#: Entity kinds the DXF reader ignores anywhere (not carried over).
_NOT_CARRIED = frozenset({"DIMENSION", "HATCH", "VIEWPORT", "POINT", "SEQEND", "VERTEX_2D", "VERTEX_3D"})
#: The ezdwg kinds asked for: those carried as geometry and those carried as
#: stand-ins (asking only for them halves ezdwg's decoding time on ACadSharp's
#: samples; the kinds of :data:`_NOT_CARRIED` are never decoded).
QUERIED_KINDS = (
    "LINE",
    "CIRCLE",
    "ARC",
    "ELLIPSE",
    "LWPOLYLINE",
    "POLYLINE_2D",
    "TEXT",
    "MTEXT",
    "INSERT",
    "MINSERT",
    "ATTDEF",
    "ATTRIB",
    "POLYLINE_3D",
    "POLYLINE_MESH",
    "POLYLINE_PFACE",
    "3DFACE",
    "SOLID",
    "TRACE",
    "SHAPE",
    "3DSOLID",
    "BODY",
    "REGION",
    "RAY",
    "XLINE",
    "SPLINE",
    "LEADER",
    "TOLERANCE",
    "MLINE",
    "IMAGE",
    "OLEFRAME",
    "OLE2FRAME",
)
#: ezdwg kind -> ezdxf kind for the kinds carried as an invisible stand-in.
_STAND_IN = {"POLYLINE_3D": "POLYLINE", "POLYLINE_MESH": "POLYLINE", "POLYLINE_PFACE": "POLYLINE"}
#: Entities carried over between two checks of the run's time limit.
DEADLINE_EVERY = 512
#: At most this many D122 findings are listed one by one.
MAX_SKIPPED_FINDINGS = 20


@functools.cache
def _data_errors() -> tuple[type[BaseException], ...]:
    """What ezdwg and ezdxf raise on damaged data (never a time limit or
    memory)."""
    from ezdxf.lldxf.const import DXFError

    return (
        DXFError,
        ValueError,
        TypeError,
        AttributeError,
        LookupError,
        OSError,
        EOFError,
        ArithmeticError,
        UnicodeError,
    )


def _is_panic(exc: BaseException) -> bool:
    """A panic of ezdwg's Rust core (``pyo3_runtime.PanicException``, a
    ``BaseException``): damaged data the decoder did not expect."""
    return type(exc).__name__ == "PanicException"


def is_dwg_name(path: str | Path) -> bool:
    """Whether the file's name ends in ``.dwg`` (any case)."""
    return Path(path).suffix.lower() == DWG_SUFFIX


def looks_like_dwg(head: bytes) -> bool:
    """Whether the first bytes are a DWG version string (``AC10xx``,
    ``AC1.x``, ``AC2.10``, ``MC0.0``)."""
    return head[:4] in (b"AC10", b"AC1.", b"AC2.", b"MC0.")


def check_head(path: str, head: bytes) -> str:
    """The version code of a file named ``.dwg`` from its first bytes;
    refuse what is not a DWG file, an old version or an unknown one.

    Raises
    ------
    DrawingReadError
    """
    if not looks_like_dwg(head):
        first = head.lstrip(b"\xef\xbb\xbf").split(None, 1)[0] if head.strip() else b""
        if first.isdigit() or head.startswith(b"AutoCAD Binary DXF"):
            raise DrawingReadError("is a DXF file named .dwg; rename it to .dxf", path=path)
        raise DrawingReadError(
            "is not a DWG file: a DWG file starts with its version (AC1015 for R2000 ...), this one does not",
            path=path,
        )
    code = head[:6].decode("ascii", "replace").rstrip("\x00")
    for old, name in OLD_VERSIONS.items():
        if code.startswith(old):
            raise DrawingReadError(
                f"is a DWG file of version {name} ({old}), older than dxfcheck reads (R13 and later; R2000 and later "
                "in full); save it as DWG R2000 or later, or as DXF, from the CAD program",
                path=path,
            )
    if code not in READ_VERSIONS:
        shown = code if code.isascii() and code.isprintable() else "not readable"
        raise DrawingReadError(
            f"is a DWG file of an unknown version ({shown}): dxfcheck reads R13 to R2018 (AC1012-AC1032); "
            "save it as DWG R2018 or older, or as DXF",
            path=path,
        )
    return code


@dataclass
class DwgDocument:
    """What :func:`load_dwg` made of a DWG file.

    Attributes
    ----------
    doc : ezdxf Drawing
        The in-memory document: model space and the block definitions.
    version : str
        The DWG's version code (``AC1015`` ...).
    handles : dict of str to str
        The ezdxf handle of each entity carried over -> its DWG handle
        (upper-case hex, as a DXF file writes it).
    findings : list of Finding
        D120-D122 met while reading.
    roles_found : bool
        Whether any layer name of the DWG is one of the configured role
        layers.
    """

    doc: Any
    version: str
    handles: dict[str, str] = field(default_factory=dict)
    findings: list[Finding] = field(default_factory=list)
    roles_found: bool = False


def _import_ezdwg(path: str) -> Any:
    try:
        import ezdwg
    except ImportError:
        raise DrawingReadError(
            f"is a DWG drawing, and reading DWG needs the optional extra dwg: run `{INSTALL_HINT}` "
            "(or save the drawing as DXF)",
            path=path,
        ) from None
    return ezdwg


def load_dwg(path: Path, head: bytes, roles: Iterable[str]) -> DwgDocument:
    """Read a DWG file into an in-memory ezdxf document.

    Parameters
    ----------
    path : Path
        The file (already checked by the caller: a regular, readable file
        within the size limit).
    head : bytes
        Its first bytes (the version string).
    roles : iterable of str
        The role layer names (upper case), to refuse an R13 file whose
        layers cannot be matched.

    Raises
    ------
    DrawingReadError
        Without the extra; for an old, unknown or damaged file.
    """
    spath = str(path)
    code = check_head(spath, head)
    ezdwg = _import_ezdwg(spath)
    wanted = frozenset(r.upper() for r in roles)
    try:
        src = ezdwg.read(spath)
        out = _build(src, code, wanted)
    except NotImplementedError as exc:  # e.g. encrypted (password-protected) sections
        raise DrawingReadError(
            f"uses a DWG feature the reader does not support ({' '.join(str(exc).split())[:160]}); "
            "save it as DXF (without a password) from the CAD program",
            path=spath,
        ) from exc
    except _data_errors() as exc:
        raise _damaged_file(spath, code, exc) from exc
    except BaseException as exc:
        if not _is_panic(exc):
            raise
        raise _damaged_file(spath, code, exc) from None
    finally:
        # ezdwg keeps what it decoded keyed by the path: a file changed at the
        # same path would be read from the old one's tables (and a batch
        # worker would keep every drawing it read)
        ezdwg.clear_decode_caches()
    out.roles_found = any(layer.dxf.name.upper() in wanted for layer in out.doc.layers)
    if code == "AC1012" and not out.roles_found:
        raise DrawingReadError(
            "is a DWG R13 file whose layer names cannot be decoded, and no role layer was found; save it as DWG "
            "R2000 or later, or as DXF, from the CAD program",
            path=spath,
            findings=out.findings,
        )
    return out


def _damaged_file(path: str, code: str, exc: BaseException) -> DrawingReadError:
    text = " ".join(str(exc).split())[:200]
    return DrawingReadError(
        f"is a damaged or unreadable DWG file ({READ_VERSIONS[code]}; the DWG reader says: "
        f"{type(exc).__name__}: {text}); open and re-save it in the CAD program, or save it as DXF",
        path=path,
    )


@dataclass
class _Source:
    """The decoded DWG: entities by owner, names of layers and blocks."""

    ezdwg_doc: Any
    layers: dict[int, str]
    blocks: dict[int, str]
    bases: dict[int, tuple[float, float, float]]
    insert_names: dict[int, str]
    model: list[Any]
    owned: dict[int, list[Any]]
    roles: frozenset[str] = frozenset()
    #: the ATTRIBs of each block reference (by the reference's DWG handle)
    attribs: dict[int, list[Any]] = field(default_factory=dict)


def _decode(src: Any, roles: frozenset[str]) -> _Source:
    """Everything the adapter needs from ezdwg, in one place: the block
    records (handle, name, base point) from the writer's block rows, named
    as the block header table names them (anonymous blocks in full:
    ``*U1``); the entities of model space and of each block, in handle
    order (the order they were drawn in)."""
    raw = src.raw
    path = src.decode_path or src.path
    layers = {int(layer.handle): str(layer.name) for layer in src.layers}
    header_names = {int(h): str(n) for h, n in raw.decode_block_header_names(path)}
    blocks: dict[int, str] = {}
    bases: dict[int, tuple[float, float, float]] = {}
    model_records: set[int] = set()
    for row in raw.decode_write_blocks(path):
        h = int(row["handle"])
        name = header_names.get(h) or str(row["name"])
        if name.upper().startswith("*MODEL_SPACE"):
            model_records.add(h)
        elif not name.upper().startswith("*PAPER_SPACE"):
            blocks[h] = name
            base = tuple(float(v) for v in row["base_point"])
            bases[h] = (base[0], base[1], base[2])
    insert_names = {
        int(h): blocks.get(int(b)) or header_names[int(b)]
        for h, _, b, _ in raw.decode_insert_write_properties(path)
        if b and (int(b) in blocks or int(b) in header_names)
    }
    model: list[Any] = []
    owned: dict[int, list[Any]] = {}
    attribs: dict[int, list[Any]] = {}
    for e in src.entities().query(QUERIED_KINDS):
        if e.dxftype in _NOT_CARRIED:
            continue
        if e.dxftype == "ATTRIB":  # carried with its block reference
            ref = e.dxf.get("owner_handle")
            if ref is not None:
                attribs.setdefault(int(ref), []).append(e)
            continue
        placement = src.entity_placement(e.handle)
        mode, owner = placement if placement is not None else (2, None)
        owner = owner if owner is not None else e.dxf.get("owner_handle")
        if owner is not None and int(owner) in blocks:
            owned.setdefault(int(owner), []).append(e)
        elif mode == 2 or (owner is not None and int(owner) in model_records):
            model.append(e)
    model.sort(key=lambda e: int(e.handle))
    for items in (*owned.values(), *attribs.values()):
        items.sort(key=lambda e: int(e.handle))
    return _Source(src, layers, blocks, bases, insert_names, model, owned, roles, attribs)


def _build(src: Any, code: str, roles: frozenset[str]) -> DwgDocument:
    """The in-memory ezdxf document of the decoded DWG."""
    from ezdxf.filemanagement import new

    dec = _decode(src, roles)
    doc = new(_DXF_VERSION.get(code, code))
    out = DwgDocument(doc=doc, version=code)
    _header(src, doc, code, out)
    for name in sorted(set(dec.layers.values()), key=str.upper):
        if name.upper() != "0" and name not in doc.layers:
            try:
                doc.layers.add(name)
            except _data_errors():  # a name ezdxf refuses: its entities keep it all the same
                continue
    carrier = _Carrier(out, dec)
    for handle, name in dec.blocks.items():
        base = dec.bases.get(handle, (0.0, 0.0, 0.0))
        try:
            block = doc.blocks.new(name, base_point=base)
        except _data_errors() as exc:  # a duplicate or refused name: its entities cannot be placed
            carrier.skipped("BLOCK", handle, f"{name!r} not carried over: {exc}", "0", False)
            continue
        carrier.fill(block, dec.owned.get(handle, ()), in_block=True)
    carrier.fill(doc.modelspace(), dec.model, in_block=False)
    carrier.close()
    if code in ("AC1012", "AC1014"):
        out.findings.insert(0, _old_version_finding(code))
    return out


def _old_version_finding(code: str) -> Finding:
    what = (
        "its layer names are not decoded (role layers may not be found), its header has no $INSUNITS"
        if code == "AC1012"
        else "its header has no $INSUNITS (the unit is assumed)"
    )
    return Finding(
        Code.DWG_OLD_VERSION,
        f"DWG {READ_VERSIONS[code]} ({code}) read with care: {what}, and the reader may not decode every block "
        "reference of such files (each one lost is named, D122); check the results against the drawing, or save "
        "it as DWG R2000 or later",
    )


def _header(src: Any, doc: Any, code: str, out: DwgDocument) -> None:
    """``$INSUNITS`` from the DWG header, unset (0) when unknown so that the
    reader assumes millimetres and says so (D101); D121 says why it is
    unknown: a header that cannot be decoded (some writers' files), one
    without ``$INSUNITS`` (R2000 and later; R13/R14 have none, said by
    D120), or ``$INSUNITS`` = 0, where a DXF reading falls back on
    ``$MEASUREMENT``, which is not decoded from DWG."""
    insunits: int | None = None
    why: str | None = None
    try:
        value = src.header_variables().get("insunits")
        insunits = None if value is None else int(value)
    except _data_errors() as exc:
        why = f"the DWG header could not be decoded ({' '.join(str(exc).split())[:120]})"
    if why is None and insunits is None and code not in ("AC1012", "AC1014"):
        why = "the DWG header holds no $INSUNITS"
    elif why is None and insunits == 0:
        why = "$INSUNITS is 0 (unitless) and $MEASUREMENT, which a DXF reading falls back on, is not read from DWG"
    if why is not None:
        message = f"{why}: the drawing's unit is unknown; give it with --units or the spec key units"
        out.findings.append(Finding(Code.DWG_HEADER_UNREAD, message))
    doc.header["$INSUNITS"] = insunits if insunits is not None else 0
    if "$MEASUREMENT" in doc.header:
        del doc.header["$MEASUREMENT"]


class _Carrier:
    """Carries ezdwg entities into ezdxf layouts, recording handles and
    what could not be carried."""

    def __init__(self, out: DwgDocument, dec: _Source) -> None:
        self.out = out
        self.dec = dec
        self.count = 0
        self.n_skipped = 0
        self.unlisted_errors = 0
        in_blocks = [e for items in dec.owned.values() for e in items]
        #: some block holds an entity on a role layer (a lost INSERT may place it)
        self.blocks_hold_roles = any(self.layer_of(e).upper() in dec.roles for e in in_blocks)
        #: some INSERT is on a role layer (layer-0 entities in blocks may take it)
        self.inserts_on_roles = any(
            e.dxftype in ("INSERT", "MINSERT") and self.layer_of(e).upper() in dec.roles
            for e in (*dec.model, *in_blocks)
        )

    def severity(self, kind: str, layer: str, in_block: bool) -> Severity:
        """An error where what is lost may be the brake's skeleton (so the
        drawing is not solved with part of it missing), else a warning."""
        if layer.upper() in self.dec.roles:
            return Severity.ERROR
        if kind in ("INSERT", "MINSERT", "BLOCK") and (self.blocks_hold_roles or layer.upper() in self.dec.roles):
            return Severity.ERROR
        if in_block and layer == "0" and self.inserts_on_roles:
            return Severity.ERROR
        return Severity.WARNING

    def skipped(self, kind: str, handle: int, message: str, layer: str, in_block: bool) -> None:
        self.n_skipped += 1
        severity = self.severity(kind, layer, in_block)
        if severity is Severity.ERROR:
            message += (
                "; it may hold the brake's skeleton, so the drawing is not solved: "
                "save it as DWG R2000 or later, or as DXF"
            )
        if self.n_skipped <= MAX_SKIPPED_FINDINGS:
            finding = Finding(Code.DWG_NOT_CARRIED, f"{kind} {message}", (f"{handle:X}",), (layer,), severity=severity)
            self.out.findings.append(finding)
        elif severity is Severity.ERROR:
            self.unlisted_errors += 1

    def close(self) -> None:
        more = self.n_skipped - MAX_SKIPPED_FINDINGS
        if more > 0:
            severity = Severity.ERROR if self.unlisted_errors else Severity.WARNING
            self.out.findings.append(
                Finding(Code.DWG_NOT_CARRIED, f"{more} more DWG entities could not be carried over", severity=severity)
            )

    def layer_of(self, e: Any) -> str:
        h = e.dxf.get("layer_handle")
        if h is None:
            return "0"
        return self.dec.layers.get(int(h), f"$DWG-LAYER-{int(h):X}")

    def fill(self, layout: Any, entities: Iterable[Any], in_block: bool) -> None:
        for e in entities:
            self.count += 1
            if self.count % DEADLINE_EVERY == 0:
                deadline.check("reading the DWG drawing")
            layer = self.layer_of(e)
            try:
                made = _carry(layout, e, layer, self.dec, in_block)
            except _data_errors() as exc:
                self.skipped(e.dxftype, int(e.handle), f"not carried over: {exc}", layer, in_block)
                continue
            if made is not None:
                self.out.handles[str(made.dxf.handle)] = f"{int(e.handle):X}"


def _attribs(e: Any, layer: str, *names: str) -> dict[str, Any]:
    """The ezdxf attributes ``names`` that the ezdwg entity has (not None),
    with the layer."""
    out: dict[str, Any] = {"layer": layer}
    for name in names:
        value = e.dxf.get(name)
        if value is not None:
            out[name] = value
    return out


def _xy(p: Any) -> tuple[float, float]:
    return float(p[0]), float(p[1])


def _carry(layout: Any, e: Any, layer: str, dec: _Source, in_block: bool) -> Any:
    """One ezdwg entity as an ezdxf entity in ``layout`` (None when not
    carried)."""
    kind = e.dxftype
    d = e.dxf
    if kind == "LINE":
        return layout.add_line(d["start"], d["end"], dxfattribs=_attribs(e, layer, "extrusion", "thickness"))
    if kind == "CIRCLE":
        return layout.add_circle(d["center"], float(d["radius"]), dxfattribs=_attribs(e, layer, "extrusion"))
    if kind == "ARC":
        return layout.add_arc(
            d["center"],
            float(d["radius"]),
            float(d["start_angle"]),
            float(d["end_angle"]),
            dxfattribs=_attribs(e, layer, "extrusion"),
        )
    if kind == "ELLIPSE":
        return layout.add_ellipse(
            d["center"],
            d["major_axis"],
            float(d["axis_ratio"]),
            float(d.get("start_angle", 0.0)),
            float(d.get("end_angle", math.tau)),
            dxfattribs=_attribs(e, layer, "extrusion"),
        )
    if kind == "LWPOLYLINE":
        return _lwpolyline(layout, e, layer)
    if kind == "POLYLINE_2D":
        return _polyline2d(layout, e, layer)
    if kind == "TEXT":
        return _text(layout, e, layer)
    if kind == "MTEXT":
        text = d.get("raw_text") or d.get("text") or ""
        return layout.add_mtext(str(text), dxfattribs=_attribs(e, layer, "insert", "char_height", "extrusion"))
    if kind in ("INSERT", "MINSERT"):
        return _insert(layout, e, layer, dec)
    if kind == "ATTDEF":
        return layout.add_attdef(
            str(d.get("tag") or ""),
            d.get("insert", (0.0, 0.0, 0.0)),
            str(d.get("text") or ""),
            dxfattribs=_text_attribs(e, layer),
        )
    return _stand_in(layout, e, layer, dec, in_block)


def _lwpolyline(layout: Any, e: Any, layer: str) -> Any:
    d = e.dxf
    pts = [_xy(p) for p in d.get("points", [])]
    bulges = list(d.get("bulges") or [0.0] * len(pts))
    rows = [(x, y, 0.0, 0.0, float(b)) for (x, y), b in zip(pts, bulges, strict=False)]
    return layout.add_lwpolyline(
        rows, format="xyseb", close=bool(d.get("closed")), dxfattribs=_attribs(e, layer, "extrusion", "elevation")
    )


def _polyline2d(layout: Any, e: Any, layer: str) -> Any:
    d = e.dxf
    pts = [_xy(p) for p in d.get("points", [])]
    bulges = list(d.get("bulges") or [0.0] * len(pts))
    poly = layout.add_polyline2d(pts, close=bool(d.get("closed")), dxfattribs=_attribs(e, layer, "extrusion"))
    for v, b in zip(poly.vertices, bulges, strict=False):
        if b:
            v.dxf.bulge = float(b)
    return poly


def _text_attribs(e: Any, layer: str) -> dict[str, Any]:
    """The placement of a TEXT, ATTDEF or ATTRIB."""
    attribs = _attribs(e, layer, "insert", "height", "rotation", "extrusion", "halign", "valign")
    if e.dxf.get("align_point") is not None:
        attribs["align_point"] = e.dxf["align_point"]
    return attribs


def _text(layout: Any, e: Any, layer: str) -> Any:
    return layout.add_text(str(e.dxf.get("text") or ""), dxfattribs=_text_attribs(e, layer))


def _insert(layout: Any, e: Any, layer: str, dec: _Source) -> Any:
    d = e.dxf
    name = dec.insert_names.get(int(e.handle)) or d.get("name")
    if not name:
        raise ValueError("the reader does not decode which block it places (as in some writers' R14 files)")
    attribs = _attribs(e, layer, "xscale", "yscale", "zscale", "rotation", "extrusion")
    if e.dxftype == "MINSERT":
        attribs.update(_attribs(e, layer, "row_count", "column_count", "row_spacing", "column_spacing"))
    ins = d.get("insert", (0.0, 0.0, 0.0))
    if not all(math.isfinite(float(v)) for v in ins):
        raise ValueError("its insertion point is not finite")
    ref = layout.add_blockref(str(name), ins, dxfattribs=attribs)
    for a in dec.attribs.get(int(e.handle), ()):
        # the attribute's own layer (an ATTRIB names it as any entity does)
        h = a.dxf.get("layer_handle")
        a_layer = layer if h is None else dec.layers.get(int(h), layer)
        tag, text = str(a.dxf.get("tag") or ""), str(a.dxf.get("text") or "")
        ref.add_attrib(tag, text, a.dxf.get("insert", (0.0, 0.0, 0.0)), dxfattribs=_text_attribs(a, a_layer))
    return ref


def _stand_in(layout: Any, e: Any, layer: str, dec: _Source, in_block: bool) -> Any:
    """An invisible entity of the same kind, without geometry, where it
    could reach a role layer; the reader reports it as for DXF (D102)."""
    if not (in_block and layer == "0") and layer.upper() not in dec.roles:
        return None
    kind = _STAND_IN.get(e.dxftype, e.dxftype)
    if kind == "POLYLINE":
        made = layout.add_polyline3d([])
    else:
        try:
            made = layout.new_entity(kind, {})
        except _data_errors():  # a kind ezdxf cannot make bare (IMAGE needs its definition): never skeleton
            return None
    made.dxf.layer = layer
    made.dxf.invisible = 1
    return made
