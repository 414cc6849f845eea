"""Batch scaling benchmark (run on demand):

    python tests/benchmarks/bench_batch.py [N]

Writes N drawings (copies of the demos, each moved so that no two files are
alike), then checks them all with 1 and with 2 worker processes, without the
cache, in one run; prints both times and the speed-up (2.0 would be linear
on two cores).  Then reruns with the cache and prints that time too, and
the per-drawing cost in a warm worker: each drawing's own check time in the
one-worker run (the worker's first drawing left out), median per demo and
the mean over all (target, issue 21: at most 15 ms on the demos).  Then the
same per-drawing costs with the demos' project file (``drawings/dxfcheck.toml``
beside the copies, each under its demo's name, so that its spec is judged:
three friction values and the self-locking scan on the winch).
"""

from __future__ import annotations

import shutil
import statistics
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "drawings"))

from build import capstan_band, conveyor_block, winch_two_shoe  # noqa: E402

from dxfcheck.batch import discover, run_batch  # noqa: E402
from dxfcheck.core.geometry import Affine  # noqa: E402


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 48
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "vault"
        folder.mkdir()
        makers = (winch_two_shoe, conveyor_block, capstan_band)
        for k in range(n):
            makers[k % 3]().save(folder / f"d{k:04d}.dxf", transform=Affine.translation(17.0 * k, -3.0 * k))
        paths = discover([str(folder)])
        run_batch(paths[:3], jobs=1, use_cache=False)  # warm the imports of the main process
        times = {}
        warm: dict[str, list[float]] = {}
        for jobs in (1, 2):
            t0 = time.perf_counter()
            result = run_batch(paths, jobs=jobs, use_cache=False)
            times[jobs] = time.perf_counter() - t0
            assert len(result.results) == n
            if jobs == 1:
                for r in result.results[1:]:  # the worker's first drawing is not warm
                    k = int(Path(r.drawing).stem[1:])
                    warm.setdefault(makers[k % 3].__name__, []).append(r.seconds)
        cache = str(Path(tmp) / "cache")
        run_batch(paths, jobs=2, cache_dir=cache)
        t0 = time.perf_counter()
        run_batch(paths, jobs=2, cache_dir=cache)
        cached = time.perf_counter() - t0
        spec_warm = _warm_with_spec(Path(tmp) / "specified", n, makers)
    print(f"{n} drawings, no cache:")
    print(f"  1 worker : {times[1]:7.2f} s ({n / times[1]:.1f} drawings/s)")
    print(f"  2 workers: {times[2]:7.2f} s ({n / times[2]:.1f} drawings/s)")
    print(f"  speed-up : {times[1] / times[2]:7.2f}x (2.0 would be linear)")
    print(f"  rerun from the cache: {cached:.2f} s ({times[2] / cached:.1f}x faster than checking)")
    _print_warm("per-drawing cost in a warm worker (its own check time, median):", warm)
    _print_warm("the same with the demos' project file (their specs judged):", spec_warm)


def _print_warm(title: str, warm: dict[str, list[float]]) -> None:
    """Median per demo and mean over all of per-drawing times [s], in ms."""
    print(title)
    for name, secs in warm.items():
        print(f"  {name:16s}: {statistics.median(secs) * 1000:6.1f} ms")
    every = [t for secs in warm.values() for t in secs]
    mean_ms = statistics.fmean(every) * 1000
    print(f"  mean over all    : {mean_ms:6.1f} ms (target <= 15 ms: {'met' if mean_ms <= 15 else 'NOT met'})")


def _warm_with_spec(folder: Path, n: int, makers: tuple[Any, ...]) -> dict[str, list[float]]:
    """Per-drawing check times [s] in one warm worker, each copy in its own
    folder under its demo's name, the demos' project file at the top."""
    folder.mkdir()
    shutil.copy(ROOT / "drawings" / "dxfcheck.toml", folder / "dxfcheck.toml")
    for k in range(n):
        sub = folder / f"{k:04d}"
        sub.mkdir()
        maker = makers[k % 3]
        maker().save(sub / f"{maker.__name__}.dxf", transform=Affine.translation(17.0 * k, -3.0 * k))
    result = run_batch(discover([str(folder)]), jobs=1, use_cache=False)
    bad = [r for r in result.results if r.status in ("error", "timeout")]
    assert len(result.results) == n and not bad, bad[:1]
    warm: dict[str, list[float]] = {}
    for r in result.results[1:]:  # the worker's first drawing is not warm
        warm.setdefault(Path(r.drawing).stem, []).append(r.seconds)
    return warm


if __name__ == "__main__":
    main()
