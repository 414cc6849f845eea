"""Regenerate the demo drawings in this folder.

    python drawings/build.py

The scenario is invented for the demos: the Tarnbeck Slate Quarry's incline
haulage winch (drawing TQ-W2-BR-201, a two-shoe holding brake on a 400 mm
drum worked through a tie rod and a floating bell crank) and its stone-saw
feed conveyor (drawing TQ-C7-BR-105, a single-lever block brake on a 300 mm
drum) and its rope capstan (drawing TQ-K4-BR-310, a spring-set simple band
brake on a 250 mm drum).  All dimensions are made up; they are not taken from any real brake.
"""

from __future__ import annotations

import sys
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))

from dxfcheck.output.sketch import Sketch  # noqa: E402


def winch_two_shoe() -> Sketch:
    """TQ-W2-BR-201: two pivoted shoes, levers, tie rod, floating bell crank."""
    sk = Sketch()
    sk.drum(0, 0, 200)
    # left lever: frame pivot at the foot, shoe pin, tie-rod pin at the top
    sk.pivot(-250, -320, 30, label="O1")
    sk.pin(-250, 0, 24, label="S1")
    sk.pin(-250, 520, 20, label="T1")
    sk.link((-250, -320), (-250, 0), (-250, 520), label="left lever", label_at=(-285, 260))
    # left shoe: pivoted on S1, lining over 70 degrees
    sk.link((-250, 0), (-200, 0), label="left shoe", label_at=(-212, 12))
    sk.shoe(0, 0, 200, 145, 215)
    # right lever
    sk.pivot(250, -320, 30, label="O2")
    sk.pin(250, 0, 24, label="S2")
    sk.pin(250, 420, 24, label="T2")
    sk.link((250, -320), (250, 0), (250, 420), label="right lever", label_at=(285, 210))
    sk.link((250, 0), (200, 0), label="right shoe", label_at=(212, 12))
    sk.shoe(0, 0, 200, -35, 35)
    # floating bell crank on T2: arm up to the tie rod, arm out to the effort
    sk.pin(250, 520, 20, label="C")
    sk.link((250, 520), (250, 420), (580, 420), label="bell crank", label_at=(420, 440))
    # tie rod T1-C
    sk.link((-250, 520), (250, 520), label="tie rod", label_at=(0, 540))
    # effort: the set weight's pull at the end of the bell crank arm
    sk.load(580, 420, 0, -1, "1.8 kN", length=90)
    return sk


def conveyor_block() -> Sketch:
    """TQ-C7-BR-105: one lever with a block fixed to it."""
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(-260, 210, 24, label="O")
    sk.link((-260, 210), (520, 210), label="lever", label_at=(300, 230))
    sk.link((0, 210), (0, 150))
    sk.shoe(0, 0, 150, 75, 105, label="block")
    sk.load(520, 210, 0, -1, "420 N", length=80)
    return sk


def capstan_band() -> Sketch:
    """TQ-K4-BR-310: the rope capstan's simple band brake, set by a spring.

    A 250 mm drum wrapped 250°; the band's left end is anchored at the lever
    fulcrum O, its right end pinned to the lever at A; a compression spring
    between the frame bracket and the lever's tail sets the brake.
    """
    import math

    r, wrap = 125.0, 250.0
    s_deg, e_deg = 90 - wrap / 2, 90 + wrap / 2
    pe = (r * math.cos(math.radians(e_deg)), r * math.sin(math.radians(e_deg)))
    out_e = (-math.sin(math.radians(e_deg)), math.cos(math.radians(e_deg)))
    o = (pe[0] + 90 * out_e[0], pe[1] + 90 * out_e[1])
    ps = (r * math.cos(math.radians(s_deg)), r * math.sin(math.radians(s_deg)))
    out_s = (math.sin(math.radians(s_deg)), -math.cos(math.radians(s_deg)))
    t = (o[1] - ps[1]) / out_s[1]
    a_pin = (ps[0] + t * out_s[0], o[1])
    tail = (o[0] + 520, o[1])
    sk = Sketch()
    sk.drum(0, 0, r)
    sk.pivot(*o, 20, label="O")
    sk.pin(*a_pin, 16, label="A")
    sk.link(o, tail, label="band lever", label_at=(o[0] + 380, o[1] + 14))
    sk.band(0, 0, r, s_deg, e_deg, a_pin, o)
    sk.pivot(tail[0], o[1] + 160, 16, label="K")
    sk.spring((tail[0], o[1] + 160), tail, "0.5 kN C")
    return sk


#: Each demo's title block: drawing number, title, revision (block attributes).
TITLES = {
    "winch_two_shoe": ("TQ-W2-BR-201", "Incline winch holding brake, two shoes", "C"),
    "conveyor_block": ("TQ-C7-BR-105", "Saw feed conveyor block brake", "A"),
    "capstan_band": ("TQ-K4-BR-310", "Rope capstan band brake, spring-set", "B"),
}


def save_with_title(sk: Sketch, path: Path, number: str, title: str, revision: str) -> None:
    """Save a demo with a title block: a block of attribute definitions
    inserted on layer TITLE (no skeleton entity), its attributes filled."""
    doc = sk.to_doc()
    block = doc.blocks.new("DXFCHECK_DEMO_TITLE")
    for k, tag in enumerate(("DRAWING_NO", "TITLE", "REV")):
        block.add_attdef(tag, (0, -12 * k), dxfattribs={"height": 8})
    doc.layers.add("TITLE")
    ref = doc.modelspace().add_blockref("DXFCHECK_DEMO_TITLE", (300, -450), dxfattribs={"layer": "TITLE"})
    ref.add_auto_attribs({"DRAWING_NO": number, "TITLE": title, "REV": revision})
    doc.saveas(path)


def drafted() -> None:
    """The winch drafted in each style with no skeleton layers
    (``drafted/winch_STYLE.dxf``), each with its picture (``.svg``): the
    README's drafted drawings."""
    from ezdxf.addons.drawing import Frontend, RenderContext, layout, svg
    from ezdxf.addons.drawing.config import BackgroundPolicy, ColorPolicy, Configuration

    from dxfcheck.core.config import Config
    from dxfcheck.output.drafting import STYLES, draft
    from dxfcheck.output.skeleton_dxf import skeleton_document
    from dxfcheck.pipeline import read_mechanism

    out = HERE / "drafted"
    out.mkdir(exist_ok=True)
    cfg = Configuration(background_policy=BackgroundPolicy.WHITE, color_policy=ColorPolicy.BLACK)

    def picture(doc: object, name: str) -> None:
        backend = svg.SVGBackend()
        Frontend(RenderContext(doc), backend, config=cfg).draw_layout(doc.modelspace())  # type: ignore[attr-defined]
        page = layout.Page(120, 120, layout.Units.mm, margins=layout.Margins.all(4))
        (out / name).write_text(backend.get_string(page), encoding="utf-8")

    for style in STYLES:
        doc = draft(winch_two_shoe(), style, clutter=False)
        doc.saveas(out / f"winch_{style}.dxf")
        picture(doc, f"winch_{style}.svg")
    mech = read_mechanism(out / "winch_outlines.dxf")
    picture(skeleton_document(mech, Config(), over=False), "winch_outlines_skeleton.svg")


def main() -> None:
    for make in (winch_two_shoe, conveyor_block, capstan_band):
        save_with_title(make(), HERE / f"{make.__name__}.dxf", *TITLES[make.__name__])
    drafted()


if __name__ == "__main__":
    main()
