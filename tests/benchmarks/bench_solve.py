"""Solve-time benchmark (run on demand, not in the default test run):

    python tests/benchmarks/bench_solve.py

Times the whole analysis (read, topology, both directions, self-locking
scan) of the two-shoe demo drawing with long-shoe theory and with
short-shoe theory, in one process so the machine's noise hits both alike,
and prints the figures and their ratio.  Target (issue: long-shoe theory):
the long-shoe solve of a two-shoe drawing well under a second.
"""

from __future__ import annotations

import statistics
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

import dxfcheck  # noqa: E402
from dxfcheck.statics import critical_mu  # noqa: E402

DEMO = ROOT / "drawings" / "winch_two_shoe.dxf"
REPEATS = 15


def _time(model: str) -> list[float]:
    out = []
    for _ in range(REPEATS):
        critical_mu.cache_clear()  # measure the full solve each time
        t0 = time.perf_counter()
        dxfcheck.analyse(DEMO, mu=0.35, shoe_model=model)
        out.append(time.perf_counter() - t0)
    return out


def main() -> None:
    dxfcheck.analyse(DEMO, mu=0.35)  # warm imports
    long_t = _time("long")
    short_t = _time("short")
    ml, ms = statistics.median(long_t), statistics.median(short_t)
    print(f"two-shoe demo, both directions, {REPEATS} runs each (median):")
    print(f"  long-shoe theory : {ml * 1000:7.1f} ms")
    print(f"  short-shoe theory: {ms * 1000:7.1f} ms")
    print(f"  ratio long/short : {ml / ms:7.2f}")
    print(f"  long solve vs the 1 s target: {ml:.3f} s ({'met' if ml < 1.0 else 'NOT met'})")


if __name__ == "__main__":
    main()
