"""Hostile drawings and files, made here for the bounded-run tests
(``test_hostile.py``) and for measuring a run's time and peak memory
(``python tests/hostile.py OUTDIR`` writes them all).

Each maker writes one file and returns its path.  The brake inside is the
winch demo (7 pins); what is hostile is around it: blocks that insert each
other, trailers after the end-of-file marker, files that never end.
"""

from __future__ import annotations

import itertools
import logging
import math
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from common import winch_two_shoe

from dxfcheck.output.sketch import BlockWrap

__all__ = [
    "MAKERS",
    "clutter_block",
    "deep_chain",
    "eof_trailer",
    "fan_out",
    "minsert",
    "placed_skeleton",
    "self_insert",
]


def _r12_text() -> str:
    """The winch demo as R12 text (blocks need no block records there)."""
    import io

    doc = winch_two_shoe().to_doc(dxfversion="R12")
    buf = io.StringIO()
    quiet = logging.getLogger("ezdxf")
    level = quiet.level
    quiet.setLevel(logging.ERROR)  # "$INSUNITS is not exported for R12": known
    try:
        doc.write(buf)
    finally:
        quiet.setLevel(level)
    return buf.getvalue()


def _block(name: str, body: str) -> str:
    head = f"  0\nBLOCK\n  8\n0\n  2\n{name}\n 70\n0\n 10\n0.0\n 20\n0.0\n 30\n0.0\n  3\n{name}\n"
    return head + body + "  0\nENDBLK\n  8\n0\n"


_HANDLES = itertools.count(0x100000)


def _handle() -> str:
    """A handle of its own (far above ezdxf's), so both readers name the
    entity alike."""
    return f"  5\n{next(_HANDLES):X}\n"


def _insert(name: str, x: float = 0.0, y: float = 0.0, layer: str = "0") -> str:
    return f"  0\nINSERT\n{_handle()}  8\n{layer}\n  2\n{name}\n 10\n{x}\n 20\n{y}\n 30\n0.0\n"


def _line(layer: str, x0: float, y0: float, x1: float, y1: float) -> str:
    return f"  0\nLINE\n{_handle()}  8\n{layer}\n 10\n{x0}\n 20\n{y0}\n 30\n0.0\n 11\n{x1}\n 21\n{y1}\n 31\n0.0\n"


def _with_blocks(blocks: str, inserts: str) -> str:
    """The winch in R12 with extra block definitions and model-space
    INSERTs."""
    text = _r12_text()
    head, sep, rest = text.partition("  0\nSECTION\n  2\nBLOCKS\n")
    if not sep:  # no BLOCKS section yet: add one before the entities
        head, sep, rest = text.partition("  0\nSECTION\n  2\nENTITIES\n")
        text = head + "  0\nSECTION\n  2\nBLOCKS\n" + blocks + "  0\nENDSEC\n" + sep + inserts + rest
        return text
    return (
        head
        + sep
        + blocks
        + rest.replace("  0\nSECTION\n  2\nENTITIES\n", "  0\nSECTION\n  2\nENTITIES\n" + inserts, 1)
    )


def self_insert(folder: Path, *, skeleton: bool = True) -> Path:
    """A block that inserts itself twice (2^depth visits), holding a link
    piece far from the brake."""
    body = (
        (_line("LINK", 5000, 5000, 5100, 5000) if skeleton else _line("CLUTTER", 0, 0, 1, 1))
        + _insert("LOOP", 1, 0)
        + _insert("LOOP", 0, 1)
    )
    path = folder / "self_insert.dxf"
    path.write_text(_with_blocks(_block("LOOP", body), _insert("LOOP", 4000, 4000)))
    return path


def fan_out(folder: Path, *, levels: int = 12, each: int = 10) -> Path:
    """Blocks F1..F{levels}, each inserting the previous one ``each`` times:
    ``each**levels`` placements of F0's clutter line."""
    blocks = _block("F0", _line("CLUTTER", 0, 0, 1, 1))
    for k in range(1, levels + 1):
        blocks += _block(f"F{k}", "".join(_insert(f"F{k - 1}", i * 2.0, 0) for i in range(each)))
    path = folder / f"fan_out_{each}x{levels}.dxf"
    path.write_text(_with_blocks(blocks, _insert(f"F{levels}", 9000, 9000)))
    return path


def deep_chain(folder: Path, *, n: int = 100_000) -> Path:
    """C0 inserts C1 inserts ... C{n-1}: a chain ``n`` blocks deep."""
    parts = [_block(f"C{k}", _insert(f"C{k + 1}")) for k in range(n - 1)]
    parts.append(_block(f"C{n - 1}", _line("CLUTTER", 0, 0, 1, 1)))
    path = folder / f"deep_chain_{n}.dxf"
    path.write_text(_with_blocks("".join(parts), _insert("C0", 9000, 9000)))
    return path


def minsert(folder: Path, *, rows: int = 30_000, cols: int = 30_000) -> Path:
    """One INSERT of a one-line block as an array of ``rows`` × ``cols``."""
    blocks = _block("ARRAY", _line("CLUTTER", 0, 0, 1, 1))
    ins = _insert("ARRAY", 9000, 9000).replace(
        " 30\n0.0\n", f" 30\n0.0\n 70\n{cols}\n 71\n{rows}\n 44\n3.0\n 45\n3.0\n", 1
    )
    path = folder / f"minsert_{rows}x{cols}.dxf"
    path.write_text(_with_blocks(blocks, ins))
    return path


def placed_skeleton(folder: Path, *, copies: int = 1000, spacing: float = 40.0) -> Path:
    """A block of ten link pieces placed ``copies`` times in a row (spacing
    0: all on top of each other, every copy a duplicate)."""
    body = "".join(_line("LINK", 3000 + 10 * k, 3000, 3005 + 10 * k, 3000) for k in range(10))
    ins = _insert("TEN", 0, 0).replace(" 30\n0.0\n", f" 30\n0.0\n 70\n{copies}\n 44\n{spacing}\n", 1)
    path = folder / f"placed_skeleton_{copies}_{spacing:g}.dxf"
    path.write_text(_with_blocks(_block("TEN", body), ins))
    return path


def clutter_block(folder: Path, *, clutter: int = 40_000) -> Path:
    """The winch inside a block (turned 30°) that also holds ``clutter``
    short lines on a layer with no role: the block walk takes a while."""
    doc = winch_two_shoe().to_doc(wraps=(BlockWrap(insert=(100.0, 50.0), rotation_deg=30.0),))
    blk = doc.blocks.get("SKEL0")
    for k in range(clutter):
        a = 2 * math.pi * k / clutter
        blk.add_line(
            (900 * math.cos(a), 900 * math.sin(a)),
            (905 * math.cos(a), 905 * math.sin(a)),
            dxfattribs={"layer": "HATCH"},
        )
    path = folder / "clutter_block.dxf"
    doc.saveas(path)
    return path


def eof_trailer(folder: Path, kind: str) -> Path:
    """The winch in R12 with something after its ``EOF`` marker: a DOS
    end-of-file byte, NUL padding to a sector, or text."""
    text = _r12_text().encode("ascii")
    trailer = {
        "ctrl-z": b"\x1a",
        "nul-padding": b"\x00" * (512 - len(text) % 512),
        "text": b"\r\nsaved by PLOTSTATION 3.1\r\n",
        "blank-lines": b"\n\n\n   \n",
    }[kind]
    path = folder / f"eof_{kind}.dxf"
    path.write_bytes(text + trailer)
    return path


#: Every maker with its default arguments, for the measuring script.
MAKERS = {
    "self_insert": self_insert,
    "fan_out_10x12": fan_out,
    "deep_chain_100k": deep_chain,
    "clutter_block": clutter_block,
    "minsert_30000x30000": minsert,
    "placed_skeleton_1000": placed_skeleton,
}


if __name__ == "__main__":  # pragma: no cover - a tool
    out = Path(sys.argv[1])
    out.mkdir(parents=True, exist_ok=True)
    for name, make in MAKERS.items():
        print(name, make(out))
    for kind in ("ctrl-z", "nul-padding", "text", "blank-lines"):
        print(kind, eof_trailer(out, kind))
    print("deep_chain_1M", deep_chain(out, n=1_000_000))
