"""A refusal of ours is never taken for damaged data.

:class:`~dxfcheck.core.errors.DrawingReadError` (like every dxfcheck error) is
a ``ValueError``; the readers turn ezdxf's ``ValueError`` on damaged entities
into findings.  Every such handler must therefore let a ``DxfcheckError``
through first, or a refusal raised inside the block walk (too many placements)
would become a finding and the drawing would be solved with part of it
dropped.  This walks the readers' source and holds every handler to it; the
second test shows the refusal still reaches the caller.  (Project convention,
no published source.)
"""

from __future__ import annotations

import ast
from pathlib import Path

import ezdxf
import pytest

import dxfcheck.read
from dxfcheck.core.errors import DrawingReadError, DxfcheckError
from dxfcheck.read.drawing import MAX_SKELETON_ENTITIES, read_drawing

READ_DIR = Path(dxfcheck.read.__file__).parent
#: Handlers that stand for damaged data (their type is a call or the name).
DATA_HANDLERS = {"_damaged", "_unreadable", "fallback"}


def _handler_name(h: ast.ExceptHandler) -> str | None:
    t = h.type
    if isinstance(t, ast.Call) and isinstance(t.func, ast.Name):
        return t.func.id
    if isinstance(t, ast.Name):
        return t.id
    return None


def _unguarded() -> list[str]:
    bad = []
    for path in sorted(READ_DIR.glob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if not isinstance(node, ast.Try):
                continue
            names = [_handler_name(h) for h in node.handlers]
            for i, name in enumerate(names):
                if name in DATA_HANDLERS and "DxfcheckError" not in names[:i]:
                    bad.append(f"{path.name}:{node.handlers[i].lineno}")
    return bad


def test_every_data_handler_lets_our_refusals_through() -> None:
    assert _unguarded() == []


def test_the_errors_are_value_errors() -> None:
    assert issubclass(DrawingReadError, ValueError) and issubclass(DrawingReadError, DxfcheckError)


def test_a_refusal_inside_the_block_walk_still_refuses(tmp_path: Path) -> None:
    """A block of more skeleton lines than the reader keeps, inserted once:
    the limit is reached while the walk places the block's entities, inside
    the handlers for damaged entities and references."""
    doc = ezdxf.new()
    blk = doc.blocks.new("ARM")
    for k in range(MAX_SKELETON_ENTITIES + 5):
        blk.add_line((0.0, float(k)), (100.0, float(k)), dxfattribs={"layer": "LINK"})
    doc.modelspace().add_blockref("ARM", (0, 0))
    path = tmp_path / "many.dxf"
    doc.saveas(path)
    with pytest.raises(DrawingReadError, match=f"more than {MAX_SKELETON_ENTITIES} entities"):
        read_drawing(path, reader="full")
