"""Vault benchmark, end to end (run on demand, never a timed test):

    python tests/benchmarks/bench_vault.py [N]

Writes N small drawings (default 10 000: copies of the three demos, each
moved and turned so that no two files are byte-identical) into a temporary
folder, then runs the real command ``dxfcheck batch FOLDER --json --no-cache``
with ``--jobs 1``, with ``--jobs 2`` and with ``--scheduler`` on a two-worker
Dask LocalCluster (worker processes, one thread each; extra 'cluster'), each
end to end (Python's start, discovery, checking, the JSON document).  Prints
the drawings per second of each, the speed-up of two jobs over one and of the
cluster over the local pool of two, and a cached second run (``--jobs 2``,
the cache filled by a first run).  Every run must give each drawing the same
status; the script stops with a message if they do not.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time
from collections import Counter
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))
sys.path.insert(0, str(ROOT / "drawings"))

from build import capstan_band, conveyor_block, winch_two_shoe  # noqa: E402

from dxfcheck.core.geometry import Affine  # noqa: E402

__all__ = ["main"]

STEP_MM = 17.0  # shift between consecutive copies
TURN_DEG = 7.0  # turn between consecutive copies


def generate(folder: Path, n: int) -> None:
    """Write n demo copies, copy k moved by k steps and turned by k * TURN_DEG."""
    makers = (winch_two_shoe, conveyor_block, capstan_band)
    sketches = [make() for make in makers]
    for k in range(n):
        move = Affine.translation(STEP_MM * k, -3.0 * k) @ Affine.rotation((TURN_DEG * k) % 360.0)
        sketches[k % 3].save(folder / f"d{k:05d}.dxf", transform=move)


def run(folder: Path, *options: str) -> tuple[float, dict[str, str]]:
    """One end-to-end `dxfcheck batch` run: wall seconds and each drawing's status."""
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    command = [sys.executable, "-m", "dxfcheck", "batch", str(folder), "--json", *options]
    t0 = time.perf_counter()
    done = subprocess.run(command, capture_output=True, text=True, env=env, check=False)
    seconds = time.perf_counter() - t0
    if done.returncode not in (0, 1):
        sys.exit(f"dxfcheck batch {' '.join(options)} exited {done.returncode}:\n{done.stderr[-2000:]}")
    document = json.loads(done.stdout)
    return seconds, {r["drawing"]: r["status"] for r in document["results"]}


def on_cluster(folder: Path) -> tuple[float, dict[str, str]]:
    """The batch on a two-worker LocalCluster (processes, one thread each)."""
    from dask.distributed import LocalCluster

    os.environ["PYTHONPATH"] = str(ROOT)  # the workers import this worktree's dxfcheck
    cluster = LocalCluster(n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None)  # type: ignore[no-untyped-call]
    with cluster:
        return run(folder, "--no-cache", "--scheduler", cluster.scheduler_address)


def report(n: int, times: dict[str, float], generate_s: float) -> None:
    print(f"{n} drawings (generated in {generate_s:.1f} s), end to end, no cache:")
    for name, label in (("1", "--jobs 1"), ("2", "--jobs 2"), ("dask", "dask, 2 workers"), ("cached", "cached rerun")):
        print(f"  {label:16s}: {times[name]:8.2f} s  {n / times[name]:8.1f} drawings/s")
    print(f"  speed-up, 2 jobs over 1      : {times['1'] / times['2']:.2f}x (2.0 would be linear)")
    print(f"  cluster over the local pool  : {times['2'] / times['dask']:.2f}x (over 1 means the cluster is faster)")
    print(f"  cached rerun over 2 jobs     : {times['2'] / times['cached']:.1f}x faster")


def main() -> None:
    n = int(sys.argv[1]) if len(sys.argv) > 1 else 10_000
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp) / "vault"
        folder.mkdir()
        t0 = time.perf_counter()
        generate(folder, n)
        generate_s = time.perf_counter() - t0
        times: dict[str, float] = {}
        verdicts: dict[str, dict[str, str]] = {}
        for jobs in ("1", "2"):
            times[jobs], verdicts[jobs] = run(folder, "--no-cache", "--jobs", jobs)
            print(f"  --jobs {jobs}: {times[jobs]:.1f} s", flush=True)
        times["dask"], verdicts["dask"] = on_cluster(folder)
        print(f"  dask: {times['dask']:.1f} s", flush=True)
        cache = str(Path(tmp) / "cache")
        run(folder, "--jobs", "2", "--cache-dir", cache)
        times["cached"], verdicts["cached"] = run(folder, "--jobs", "2", "--cache-dir", cache)
    for name, statuses in verdicts.items():
        if len(statuses) != n or statuses != verdicts["1"]:
            sys.exit(f"the verdicts of run {name!r} differ from those of --jobs 1")
    report(n, times, generate_s)
    print(f"  verdicts agree in all runs: {dict(Counter(verdicts['1'].values()))}")


if __name__ == "__main__":
    main()
