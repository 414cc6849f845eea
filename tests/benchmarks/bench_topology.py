"""Topology benchmark: where the STRtree starts to pay (run on demand):

    python tests/benchmarks/bench_topology.py

Builds skeleton drawings of N centreline pieces (chains of four pieces
joined end to end, a pin at each chain's ends, laid out on a grid) and
times, in this process, :func:`dxfcheck.mechanism.topology.rigid_parts`
plus one ``parts_at`` question per piece end (what the later build steps
ask) twice: by the search through every piece and through shapely's
STRtrees (shapely already loaded).  It also times ``import shapely`` in a
fresh interpreter, which a command pays once when the tree is used.  The
crossover is the piece count from which the tree (plus, for one command,
the import) is faster; :data:`dxfcheck.mechanism.topology.INDEX_MIN_PIECES`
is set from it.  No timed assertions: the figures are for the report.
"""

from __future__ import annotations

import itertools
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

from dxfcheck.core.config import Config  # noqa: E402
from dxfcheck.mechanism import topology  # noqa: E402
from dxfcheck.output.sketch import Sketch  # noqa: E402
from dxfcheck.pipeline import read_skeleton  # noqa: E402

SIZES = (4, 8, 16, 32, 48, 64, 96, 128, 256, 512, 1024)
#: Pieces per chain (joined end to end, a pin at each end of the chain).
CHAIN = 4
REPEATS = 5


def _drawing(n: int, folder: Path):  # type: ignore[no-untyped-def]
    sk = Sketch()
    sk.drum(0, 0, 100)
    for c in range(max(1, n // CHAIN)):
        x0, y0 = 300.0 * (c % 32) + 400.0, 300.0 * (c // 32)
        pts = [(x0 + 50.0 * k, y0 + (20.0 if k % 2 else 0.0)) for k in range(CHAIN + 1)]
        sk.pin(*pts[0])
        sk.pin(*pts[-1])
        for a, b in itertools.pairwise(pts):
            sk.link(a, b)
    path = folder / f"n{n}.dxf"
    sk.save(path)
    return read_skeleton(path, Config())


def _time(drawing, min_pieces: int) -> float:  # type: ignore[no-untyped-def]
    topology.INDEX_MIN_PIECES = min_pieces
    tol = topology.default_tolerance(drawing)
    best = float("inf")
    for _ in range(REPEATS):
        t0 = time.perf_counter()
        topo, _ = topology.rigid_parts(drawing, tol)
        for link in topo.links:
            for end in topology.path_ends(link):
                topo.parts_at(end)
        best = min(best, time.perf_counter() - t0)
    return best


def _import_ms() -> float:
    code = "import time, numpy; t = time.perf_counter(); import shapely; print(time.perf_counter() - t)"
    runs = [
        float(subprocess.run([sys.executable, "-c", code], capture_output=True, text=True).stdout) for _ in range(5)
    ]
    return 1000.0 * min(runs)


def main() -> None:
    import shapely  # noqa: F401  (loaded once, outside the timings)

    imp = _import_ms()
    print(f"import shapely (numpy loaded): {imp:.1f} ms")
    print(f"{'pieces':>7} {'scan ms':>9} {'tree ms':>9} {'tree+import ms':>15}")
    with tempfile.TemporaryDirectory() as tmp:
        for n in SIZES:
            d = _drawing(n, Path(tmp))
            scan, tree = _time(d, sys.maxsize), _time(d, 0)
            print(f"{n:>7} {1000 * scan:>9.2f} {1000 * tree:>9.2f} {1000 * tree + imp:>15.2f}")


if __name__ == "__main__":
    main()
