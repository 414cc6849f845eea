"""A picture of the mechanism and its forces: SVG, and PNG where a PNG
backend is installed.

Rendered with ezdxf's drawing add-on (which needs Pillow).  Only the skeleton
layers and dxfcheck's own force and note layers are drawn (block references
only when their block holds skeleton entities): rendering the whole clutter
of a big assembly drawing is slow and hides the forces.  The SVG carries a
``<title>`` and a ``<desc>`` listing every force label, as a text alternative
(the add-on draws text as outlines).

PNG output uses the add-on's matplotlib backend: install it with
``pip install "dxfcheck[png]"``.
"""

from __future__ import annotations

import os
from collections.abc import Sequence
from typing import Any
from xml.sax.saxutils import escape

from dxfcheck.core.config import Config
from dxfcheck.core.errors import ConfigError
from dxfcheck.core.files import write_atomic
from dxfcheck.core.textsafe import xml_text
from dxfcheck.output.markup import Markup

__all__ = ["PAGE_MM", "render_png", "render_svg"]

#: Page size of the picture [mm] (A4 landscape); the drawing is fitted to it.
PAGE_MM = (297.0, 210.0)
#: Page margin [mm].
MARGIN_MM = 8.0
#: PNG resolution [dots per inch].
PNG_DPI = 150


def _visible_layers(config: Config) -> set[str]:
    names = {n.upper() for names in config.layers.values() for n in names}
    return names | {config.force_layer.upper(), config.note_layer.upper()}


def _skeleton_blocks(doc: Any, layers: set[str]) -> set[str]:
    """Names of blocks that hold (directly or nested) entities on ``layers``."""
    holds: dict[str, bool] = {}

    def visit(name: str, stack: frozenset[str]) -> bool:
        if name in holds:
            return holds[name]
        if name in stack:
            return False
        block = doc.blocks.get(name)
        found = False
        if block is not None:
            for e in block:
                if e.dxftype() == "INSERT":
                    found = visit(e.dxf.name, stack | {name}) or e.dxf.layer.upper() in layers
                else:
                    found = e.dxf.layer.upper() in layers or e.dxf.layer == "0"
                if found:
                    break
        holds[name] = found
        return found

    return {b.name for b in doc.blocks if visit(b.name, frozenset())}


def _draw(doc: Any, config: Config, backend: Any) -> None:
    from ezdxf.addons.drawing.config import BackgroundPolicy, ColorPolicy, Configuration
    from ezdxf.addons.drawing.frontend import Frontend
    from ezdxf.addons.drawing.properties import RenderContext

    layers = _visible_layers(config)
    blocks = _skeleton_blocks(doc, layers)

    def keep(e: Any) -> bool:
        if e.dxftype() == "INSERT":
            return bool(e.dxf.name in blocks)
        return bool(e.dxf.layer.upper() in layers)

    cfg = Configuration(background_policy=BackgroundPolicy.WHITE, color_policy=ColorPolicy.COLOR)
    Frontend(RenderContext(doc), backend, config=cfg).draw_layout(doc.modelspace(), filter_func=keep)


def _page() -> Any:
    from ezdxf.addons.drawing import layout

    return layout.Page(PAGE_MM[0], PAGE_MM[1], layout.Units.mm, margins=layout.Margins.all(MARGIN_MM))


def svg_text(doc: Any, config: Config, markups: Sequence[Markup], title: str) -> str:
    """The SVG document as text."""
    from ezdxf.addons.drawing import svg

    backend = svg.SVGBackend()
    _draw(doc, config, backend)
    text: str = backend.get_string(_page())
    labels = [a.label for m in markups for a in m.arrows] + [n.label for m in markups for n in m.members]
    # drawing texts are data: markup escaped, characters XML forbids shown as escapes
    meta = f"<title>{escape(xml_text(title))}</title><desc>{escape(xml_text('; '.join(labels)))}</desc>"
    head_end = text.index(">", text.index("<svg")) + 1
    return xml_text(text[:head_end] + meta + text[head_end:])


def render_svg(
    doc: Any,
    out: str | os.PathLike[str],
    markups: Sequence[Markup],
    *,
    title: str,
    config: Config | None = None,
    force: bool = False,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> None:
    """Write the picture of ``doc`` (already marked up) as SVG."""
    write_atomic(out, svg_text(doc, config or Config(), markups, title), force=force, protect=protect)


def render_png(
    doc: Any,
    out: str | os.PathLike[str],
    *,
    config: Config | None = None,
    force: bool = False,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> None:
    """Write the picture of ``doc`` as PNG through the add-on's matplotlib
    backend (the ``png`` extra).

    Raises
    ------
    ConfigError
        When matplotlib is not installed.
    """
    import importlib.util
    import io

    if importlib.util.find_spec("matplotlib") is None:
        raise ConfigError('--png needs matplotlib: pip install "dxfcheck[png]"')
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from ezdxf.addons.drawing.matplotlib import MatplotlibBackend

    fig = plt.figure(figsize=(PAGE_MM[0] / 25.4, PAGE_MM[1] / 25.4))
    try:
        ax = fig.add_axes((0, 0, 1, 1))
        _draw(doc, config or Config(), MatplotlibBackend(ax))
        buf = io.BytesIO()
        fig.savefig(buf, format="png", dpi=PNG_DPI, facecolor="white")
    finally:
        plt.close(fig)
    write_atomic(out, buf.getvalue(), force=force, protect=protect)
