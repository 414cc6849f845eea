"""Inference benchmark (run on demand; about a minute):

    python tests/benchmarks/bench_infer.py [MAX_ENTITIES]

Drafts the winch brake in each style (:mod:`dxfcheck.output.drafting`) and
adds clutter around it until the drawing holds 10^3, 10^4 and 10^5
entities (MAX_ENTITIES, default 100 000): short continuous lines, hidden
lines, bolt-hole circles no part reaches, small closed outlines with no
hole (a parts list's cells), and texts.  For each size it times, in this
process, the linework walk (:func:`dxfcheck.infer.linework.read_linework`),
the inference (:func:`dxfcheck.infer.skeleton.infer_from_linework`) and the
topology of the inferred skeleton, checks that the inferred mechanism is
still the winch's, and prints the times, microseconds per entity and the
growth against the entity count (1.0 = linear).  No timed assertions: the
figures are for the report (the issue asks for about linear growth).
"""

from __future__ import annotations

import itertools
import math
import random
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "drawings"))

from build import winch_two_shoe  # noqa: E402

from dxfcheck.core.config import Config  # noqa: E402
from dxfcheck.infer.linework import read_linework  # noqa: E402
from dxfcheck.infer.skeleton import KEPT_ROLES, infer_from_linework  # noqa: E402
from dxfcheck.mechanism import build_mechanism  # noqa: E402
from dxfcheck.output.drafting import draft  # noqa: E402
from dxfcheck.read.drawing import load_document, read_drawing  # noqa: E402

SIZES = (1_000, 10_000, 100_000)
#: Clutter lies in a band this far [mm] from the brake (it never touches it).
OFFSET_MM = 2000.0


def _clutter(msp, n: int, rng: random.Random) -> None:
    """``n`` entities of clutter to the right of the brake."""
    for k in range(n):
        x, y = OFFSET_MM + rng.uniform(0, 40 * math.sqrt(n)), rng.uniform(-2000, 2000)
        kind = k % 5
        if kind == 0:
            msp.add_line((x, y), (x + rng.uniform(1, 30), y + rng.uniform(-5, 5)), dxfattribs={"layer": "DETAIL"})
        elif kind == 1:
            msp.add_line((x, y), (x + 20, y), dxfattribs={"layer": "HIDDEN"})
        elif kind == 2:
            msp.add_circle((x, y), rng.uniform(2, 6), dxfattribs={"layer": "DETAIL"})
        elif kind == 3:
            msp.add_lwpolyline(
                [(x, y), (x + 8, y), (x + 8, y + 4), (x, y + 4)], close=True, dxfattribs={"layer": "BOM"}
            )
        else:
            msp.add_text("M12 x 40 DIN 931", height=3, dxfattribs={"layer": "BOM"}).set_placement((x, y))


def _run(style: str, total: int, folder: Path) -> tuple[int, float, float, float, str]:
    doc = draft(winch_two_shoe(), style)
    n0 = len(doc.modelspace())
    _clutter(doc.modelspace(), max(0, total - n0), random.Random(total))
    path = folder / f"{style}-{total}.dxf"
    doc.saveas(path)
    cfg = Config()
    drawing = read_drawing(path, cfg, reader="full")
    doc, _ = load_document(path)
    t0 = time.perf_counter()
    kept = [name for role in KEPT_ROLES for name in cfg.layers.get(role, ())]
    lw = read_linework(doc, drawing.mm_per_unit, str(path), kept)
    t1 = time.perf_counter()
    inferred = infer_from_linework(drawing, lw, cfg)
    t2 = time.perf_counter()
    mech = build_mechanism(inferred)
    t3 = time.perf_counter()
    pins = sorted(p.name for p in mech.pins)
    return len(doc.modelspace()), t1 - t0, t2 - t1, t3 - t2, f"{len(mech.parts)} parts, pins {' '.join(pins)}"


def main() -> None:
    top = int(sys.argv[1]) if len(sys.argv) > 1 else SIZES[-1]
    sizes = [s for s in SIZES if s <= top]
    print(f"{'style':12} {'entities':>9} {'walk s':>8} {'infer s':>8} {'topology s':>10} {'us/entity':>10}  mechanism")
    with tempfile.TemporaryDirectory() as tmp:
        for style in ("centrelines", "outlines", "blocks"):
            rows = []
            for total in sizes:
                n, walk, infer, topo, what = _run(style, total, Path(tmp))
                rows.append((n, walk + infer + topo))
                per = 1e6 * (walk + infer + topo) / n
                print(f"{style:12} {n:>9,} {walk:>8.3f} {infer:>8.3f} {topo:>10.4f} {per:>10.1f}  {what}")
            for (n0, t0), (n1, t1) in itertools.pairwise(rows):
                print(
                    f"{'':12} growth {n0:,} -> {n1:,}: time x{t1 / t0:.1f} for entities x{n1 / n0:.1f} "
                    f"(exponent {math.log(t1 / t0) / math.log(n1 / n0):.2f})"
                )


if __name__ == "__main__":
    main()
