"""Write a DXF drawing's skeleton as DWG R2000 with ezdwg's own DWG writer
(for the tests: the DWG side of a round trip through one library).

Carries the kinds the demo drawings use (LINE, CIRCLE, ARC, LWPOLYLINE,
TEXT, MTEXT, INSERT with its ATTRIBs, and the title block's ATTDEFs), the
layers, the blocks with their base points, and ``$INSUNITS``.  Optionally
wraps model space in a block placed by a rotated, mirrored INSERT nested in
a second one, to carry block references through the DWG too.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

__all__ = ["write_dwg"]


def _xyz(p: Any) -> tuple[float, float, float]:
    return (float(p[0]), float(p[1]), float(p[2]) if len(p) > 2 else 0.0)


def _copy(target: Any, e: Any) -> None:
    kind = e.dxftype()
    attrs = {"layer": e.dxf.layer}
    if kind == "LINE":
        target.add_line(_xyz(e.dxf.start), _xyz(e.dxf.end), **attrs)
    elif kind == "CIRCLE":
        target.add_circle(_xyz(e.dxf.center), float(e.dxf.radius), **attrs)
    elif kind == "ARC":
        target.add_arc(
            _xyz(e.dxf.center), float(e.dxf.radius), float(e.dxf.start_angle), float(e.dxf.end_angle), **attrs
        )
    elif kind == "LWPOLYLINE":
        pts = list(e.get_points("xyb"))
        target.add_lwpolyline(
            [(float(x), float(y)) for x, y, _ in pts],
            bulges=[float(b) for _, _, b in pts],
            closed=bool(e.closed),
            **attrs,
        )
    elif kind == "TEXT":
        target.add_text(e.dxf.text, _xyz(e.dxf.insert), float(e.dxf.height), **attrs)
    elif kind == "MTEXT":
        target.add_mtext(e.text, _xyz(e.dxf.insert), float(e.dxf.char_height), **attrs)
    elif kind == "ATTDEF":
        target.add_attdef(e.dxf.tag, e.dxf.text, _xyz(e.dxf.insert), float(e.dxf.height), **attrs)
    elif kind == "INSERT":
        ref = target.add_blockref(
            e.dxf.name,
            _xyz(e.dxf.insert),
            scale=(float(e.dxf.xscale), float(e.dxf.yscale), float(e.dxf.zscale)),
            rotation=float(e.dxf.rotation),
            **attrs,
        )
        for a in e.attribs:  # a title block's values
            target.add_attrib(ref, a.dxf.tag, a.dxf.text, _xyz(a.dxf.insert), float(a.dxf.height), layer=a.dxf.layer)
    else:
        raise ValueError(f"the test writer does not carry {kind}")


def write_dwg(dxf_path: Path, dwg_path: Path, *, wrap: bool = False, insunits: int | None = None) -> None:
    """Write ``dxf_path`` as DWG R2000 at ``dwg_path`` (ezdwg's writer).
    ``wrap``: model space goes into block ``INNER``, placed inside block
    ``OUTER`` rotated by 90° and mirrored in x (scale -1, 1), and ``OUTER``
    placed in model space mirrored and rotated by 90° again: the world
    geometry is the drawing's own. ``insunits`` overrides the header's ``$INSUNITS``."""
    import ezdwg
    import ezdxf

    src = ezdxf.readfile(str(dxf_path))
    out = ezdwg.new()
    out.header["insunits"] = int(src.header.get("$INSUNITS", 0)) if insunits is None else insunits
    for layer in src.layers:
        if layer.dxf.name != "0":
            out.layers[layer.dxf.name] = {"color_index": abs(int(layer.dxf.color))}
    for block in src.blocks:
        if block.name.startswith("*"):
            continue
        b = out.blocks.new(block.name, base_point=_xyz(block.block.dxf.base_point))
        for e in block:
            _copy(b, e)
    target: Any = out.modelspace()
    if wrap:
        target = out.blocks.new("INNER", base_point=(0.0, 0.0, 0.0))
        outer = out.blocks.new("OUTER", base_point=(0.0, 0.0, 0.0))
        # S(-1, 1)·R(θ)·S(-1, 1) = R(-θ), so R(90°)·S(-1, 1)·R(90°)·S(-1, 1) = R(90°)·R(-90°) = identity
        outer.add_blockref("INNER", (0.0, 0.0, 0.0), scale=(-1.0, 1.0, 1.0), rotation=90.0, layer="0")
        out.modelspace().add_blockref("OUTER", (0.0, 0.0, 0.0), scale=(-1.0, 1.0, 1.0), rotation=90.0, layer="0")
    for e in src.modelspace():
        _copy(target, e)
    out.save(str(dwg_path))
