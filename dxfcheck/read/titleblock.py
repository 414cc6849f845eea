"""The drawing's identity from its title block: drawing number, title and
revision, for the calculation record.

Two places are searched, in this order:

1. the attributes (ATTRIB) of block references in model space and the paper
   space layouts: a title block is a block whose attribute tags name the
   fields (``DRAWING_NO``, ``DWG_NO``, ``TITLE``, ``REV``...; the tag is
   compared in upper case with everything but letters and digits removed,
   so ``DWG-NO`` and ``dwg no`` match too);
2. the header's custom properties (R2004 and later) under the same names
   (``dxfcheck.`` properties are spec values and are not read here).

A DWG drawing is read through :mod:`dxfcheck.read.dwg`, which carries the
block attributes (ATTDEF, ATTRIB) from ezdwg's reader; the handle named is
then the DWG's own.

Each field says where it came from.  The texts are the drawing's data: the
record escapes them (:mod:`dxfcheck.core.textsafe`).
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from dxfcheck.core import deadline
from dxfcheck.core.config import Config
from dxfcheck.core.errors import DxfcheckError
from dxfcheck.core.records import record
from dxfcheck.read import dwg
from dxfcheck.read.drawing import _damaged, _load_dwg, load_document

__all__ = ["FIELD_TAGS", "TitleBlock", "TitleField", "read_title_block", "title_from"]

#: Normalised attribute tags (and custom property names) of each field.
FIELD_TAGS: dict[str, frozenset[str]] = {
    "number": frozenset(
        {"DRAWINGNO", "DRAWINGNUMBER", "DWGNO", "DWGNUMBER", "DRGNO", "DRNO", "DRAWNO", "DOCNO", "DOCUMENTNO"}
    ),
    "title": frozenset({"TITLE", "DRAWINGTITLE", "DWGTITLE", "TITLE1"}),
    "revision": frozenset({"REV", "REVISION", "REVNO", "REVISIONNO", "DWGREV", "DRAWINGREV"}),
}
#: Block references looked at before giving up [-] (a hostile drawing may
#: hold millions).
MAX_INSERTS = 20_000
#: Characters of one field kept [-].
MAX_FIELD_CHARS = 200


@record(frozen=True)
class TitleField:
    """One identity field: its ``value`` and where it was read (``source``:
    ``block attribute`` or ``custom property``; ``where``: the block, tag,
    handle and layer, or the property's name)."""

    value: str
    source: str
    where: str


@record(frozen=True)
class TitleBlock:
    """The drawing number, title and revision found (None where not found)."""

    number: TitleField | None = None
    title: TitleField | None = None
    revision: TitleField | None = None
    note: str = ""

    def fields(self) -> tuple[tuple[str, TitleField | None], ...]:
        return (("drawing number", self.number), ("title", self.title), ("revision", self.revision))


def _norm(tag: str) -> str:
    return "".join(ch for ch in tag.upper() if ch.isalnum())


def _field_of(tag: str) -> str | None:
    n = _norm(tag)
    return next((f for f, tags in FIELD_TAGS.items() if n in tags), None)


def _from_attributes(doc: Any, handles: dict[str, str] | None = None) -> dict[str, TitleField]:
    """The fields from block attributes; ``handles`` names the references
    by another handle (a DWG's: the in-memory document's handle -> the
    DWG's)."""
    handles = handles or {}
    found: dict[str, TitleField] = {}
    seen = 0
    for layout in doc.layouts:
        for e in layout.query("INSERT"):
            seen += 1
            if seen > MAX_INSERTS:
                return found
            deadline.check("reading the title block")
            for a in getattr(e, "attribs", ()):
                name = _field_of(str(a.dxf.get("tag", "")))
                text = str(a.dxf.get("text", "")).strip()[:MAX_FIELD_CHARS]
                if name is None or not text or name in found:
                    continue
                handle = str(e.dxf.get("handle", "?"))
                where = (
                    f"block {e.dxf.get('name', '?')!s}, tag {a.dxf.get('tag', '?')!s}, "
                    f"handle {handles.get(handle, handle)}, layer {e.dxf.get('layer', '?')!s}"
                )
                found[name] = TitleField(text, "block attribute", where)
    return found


def _from_properties(properties: tuple[tuple[str, str], ...]) -> dict[str, TitleField]:
    found: dict[str, TitleField] = {}
    for key, value in properties:
        if key.lower().startswith("dxfcheck."):
            continue
        name = _field_of(key)
        text = str(value).strip()[:MAX_FIELD_CHARS]
        if name is not None and text and name not in found:
            found[name] = TitleField(text, "custom property", f"header custom property {key}")
    return found


def title_from(attributes: dict[str, TitleField], properties: tuple[tuple[str, str], ...]) -> TitleBlock:
    """Each field from the block attributes, else from the custom properties."""
    merged = {**_from_properties(properties), **attributes}
    note = "" if merged else "no title block attributes or custom properties name a drawing number, title or revision"
    return TitleBlock(merged.get("number"), merged.get("title"), merged.get("revision"), note)


def read_title_block(path: str | os.PathLike[str], properties: tuple[tuple[str, str], ...] = ()) -> TitleBlock:
    """The title block of the drawing at ``path`` (already read by
    :func:`dxfcheck.read.drawing.read_drawing`, whose ``custom_properties``
    are passed as ``properties``).  A drawing whose block references cannot
    be read gives the custom properties alone, with a note."""
    fails: tuple[type[BaseException], ...] = (*_damaged(), OSError)
    try:
        if dwg.is_dwg_name(Path(path)):
            dd = _load_dwg(Path(path), Config(), None)
            attributes = _from_attributes(dd.doc, dd.handles)
        else:
            doc, _ = load_document(Path(path))
            attributes = _from_attributes(doc)
    except DxfcheckError:
        raise
    except fails as exc:
        block = title_from({}, properties)
        why = f"the block references could not be read ({type(exc).__name__})"
        return TitleBlock(block.number, block.title, block.revision, why)
    return title_from(attributes, properties)
