"""Check whole folders of drawings: in parallel processes, with a cache.

Each drawing is checked as by ``dxfcheck check`` in a worker process; one
bad file is reported with its error and never stops the batch.  A cache
keyed by the drawing's content, everything that makes up its spec (the
project file, a sidecar, the command-line values) and the tool's version
lets a rerun skip drawings that did not change.
"""

from __future__ import annotations

import csv
import hashlib
import io
import json
import os
import time
from collections.abc import Callable, Iterable, Sequence
from concurrent.futures import Future, ProcessPoolExecutor, as_completed
from dataclasses import asdict, dataclass, field
from pathlib import Path
from typing import Any

__all__ = [
    "OUTPUT_SUFFIX",
    "BatchResult",
    "DrawingResult",
    "cache_key",
    "check_one",
    "discover",
    "run_batch",
    "run_on_cluster",
]

#: Marked-up copies that ``annotate`` names by default end in this; a batch
#: skips them.
OUTPUT_SUFFIX = "-forces.dxf"
#: Version of the cache records (bump when their content changes).
CACHE_FORMAT = 1


@dataclass(frozen=True)
class DrawingResult:
    """The outcome for one drawing.

    Attributes
    ----------
    drawing : str
    status : str
        ``pass``, ``warn``, ``fail`` (a rule failed) or ``error`` (the
        drawing or its spec could not be used).
    torque_cw_Nm, torque_ccw_Nm : float or None
        Braking torque at the nominal μ [N·m].
    failed_rules : tuple of str
    message : str
        The error, for ``error``.
    seconds : float
        Time the check took [s] (0 when it came from the cache).
    cached : bool
    """

    drawing: str
    status: str
    torque_cw_Nm: float | None = None
    torque_ccw_Nm: float | None = None
    failed_rules: tuple[str, ...] = ()
    message: str = ""
    seconds: float = 0.0
    cached: bool = False


@dataclass
class BatchResult:
    """Every drawing's result, in the order they were found."""

    results: list[DrawingResult] = field(default_factory=list)
    interrupted: bool = False

    def counts(self) -> dict[str, int]:
        out = {"pass": 0, "warn": 0, "fail": 0, "error": 0}
        for r in self.results:
            out[r.status] += 1
        return out


def discover(paths: Iterable[str]) -> list[Path]:
    """Drawings named by files, folders (searched recursively) and glob
    patterns, in a stable order, without our own marked-up outputs."""
    found: dict[Path, None] = {}
    for item in paths:
        p = Path(item)
        if p.is_dir():
            candidates = sorted(x for x in p.rglob("*") if x.suffix.lower() == ".dxf" and x.is_file())
        elif any(ch in item for ch in "*?["):
            base = Path(item).anchor or "."
            pattern = item[len(base) :] if item.startswith(base) and base != "." else item
            candidates = sorted(x for x in Path(base).glob(pattern) if x.is_file())
        else:
            candidates = [p]
        for c in candidates:
            if not c.name.lower().endswith(OUTPUT_SUFFIX):
                found[c] = None
    return list(found)


def _spec_inputs(path: Path, config: str | None, overrides: Sequence[tuple[str, str]]) -> bytes:
    from dxfcheck.config import find_config

    parts: list[bytes] = []
    cfg = Path(config) if config else find_config(path)
    for f in (cfg, path.with_suffix(".toml")):
        if f is not None and f.is_file():
            parts.append(f.read_bytes())
    parts.append(json.dumps(list(overrides)).encode())
    return b"\0".join(parts)


def cache_key(path: Path, config: str | None, overrides: Sequence[tuple[str, str]]) -> str:
    """SHA-256 of the drawing's bytes, its spec's sources and the tool's
    version."""
    from dxfcheck import __version__

    h = hashlib.sha256()
    h.update(f"dxfcheck {__version__} cache {CACHE_FORMAT}\0".encode())
    with open(path, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    h.update(b"\0")
    h.update(_spec_inputs(path, config, overrides))
    return h.hexdigest()


def check_one(path: str, config: str | None, overrides: Sequence[tuple[str, str]]) -> DrawingResult:
    """Check one drawing; never raises (an unusable drawing is an
    ``error`` result).  Runs in a worker process."""
    from dxfcheck.analysis import check
    from dxfcheck.errors import DxfcheckError

    t0 = time.perf_counter()
    try:
        j = check(path, config=config, overrides=list(overrides))
    except DxfcheckError as exc:
        lines = [str(exc)] + [f.line() for f in exc.findings[:3]]
        return DrawingResult(path, "error", message="; ".join(lines), seconds=time.perf_counter() - t0)
    except Exception as exc:  # one bad file never stops the batch
        return DrawingResult(
            path, "error", message=f"internal error ({type(exc).__name__}: {exc})", seconds=time.perf_counter() - t0
        )
    torques = {str(c.direction): c.torque_Nm for c in j.nominal.cases}
    failed = tuple(r.rule for r in j.rules if str(r.verdict) == "fail")
    return DrawingResult(
        path,
        str(j.verdict),
        torques.get("cw"),
        torques.get("ccw"),
        failed,
        seconds=time.perf_counter() - t0,
    )


def _cache_dir(explicit: str | None) -> Path:
    if explicit:
        return Path(explicit)
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return Path(base) / "dxfcheck"


def _cache_get(folder: Path, key: str) -> DrawingResult | None:
    f = folder / f"{key}.json"
    try:
        data = json.loads(f.read_text())
        data["failed_rules"] = tuple(data["failed_rules"])
        return DrawingResult(**{**data, "cached": True, "seconds": 0.0})
    except (OSError, ValueError, TypeError, KeyError):
        return None


def _cache_put(folder: Path, key: str, result: DrawingResult) -> None:
    if result.status == "error":
        return  # errors may be passing (a file still being written): check again next time
    from dxfcheck.files import write_atomic

    try:
        folder.mkdir(parents=True, exist_ok=True)
        write_atomic(folder / f"{key}.json", json.dumps(asdict(result)))
    except Exception:  # a cache that cannot be written only costs time
        return


def run_batch(
    paths: Sequence[Path],
    *,
    jobs: int | None = None,
    config: str | None = None,
    overrides: Sequence[tuple[str, str]] = (),
    use_cache: bool = True,
    cache_dir: str | None = None,
    on_result: Callable[[DrawingResult], None] | None = None,
) -> BatchResult:
    """Check every drawing, ``jobs`` at a time (default: the CPU count).

    ``on_result`` is called in the main process as each drawing finishes (the
    progress display).  Ctrl-C stops the batch cleanly: pending drawings are
    cancelled and the result holds what was done, ``interrupted`` set.
    """
    book = _Book(paths, config, overrides, use_cache, cache_dir, on_result)
    workers = max(1, jobs or os.cpu_count() or 1)
    if book.todo and workers == 1:
        try:
            for k, name, key in book.todo:
                book.record(k, key, check_one(name, config, overrides))
        except KeyboardInterrupt:
            book.out.interrupted = True
    elif book.todo:
        pool = ProcessPoolExecutor(max_workers=workers)
        futures: dict[Future[DrawingResult], tuple[int, str]] = {}
        try:
            for k, name, key in book.todo:
                futures[pool.submit(check_one, name, config, tuple(overrides))] = (k, key)
            for fut in as_completed(futures):
                book.record(*futures[fut], fut.result())
        except KeyboardInterrupt:
            book.out.interrupted = True
        finally:
            pool.shutdown(wait=not book.out.interrupted, cancel_futures=True)
    return book.finish()


class _Book:
    """What a batch has done: cache hits up front, results as they come."""

    def __init__(
        self,
        paths: Sequence[Path],
        config: str | None,
        overrides: Sequence[tuple[str, str]],
        use_cache: bool,
        cache_dir: str | None,
        on_result: Callable[[DrawingResult], None] | None,
    ) -> None:
        self.folder = _cache_dir(cache_dir)
        self.use_cache = use_cache
        self.on_result = on_result
        self.out = BatchResult()
        self.done: dict[int, DrawingResult] = {}
        self.todo: list[tuple[int, str, str]] = []
        for k, p in enumerate(paths):
            key = ""
            if use_cache:
                try:
                    key = cache_key(p, config, overrides)
                except OSError:
                    key = ""
            hit = _cache_get(self.folder, key) if key else None
            if hit is None:
                self.todo.append((k, str(p), key))
            else:
                self._done(k, DrawingResult(**{**asdict(hit), "drawing": str(p), "failed_rules": hit.failed_rules}))

    def _done(self, k: int, r: DrawingResult) -> None:
        self.done[k] = r
        if self.on_result:
            self.on_result(r)

    def record(self, k: int, key: str, r: DrawingResult) -> None:
        if self.use_cache and key:
            _cache_put(self.folder, key, r)
        self._done(k, r)

    def finish(self) -> BatchResult:
        self.out.results = [self.done[k] for k in sorted(self.done)]
        return self.out


def run_on_cluster(
    paths: Sequence[Path],
    scheduler: str,
    *,
    config: str | None = None,
    overrides: Sequence[tuple[str, str]] = (),
    use_cache: bool = True,
    cache_dir: str | None = None,
    on_result: Callable[[DrawingResult], None] | None = None,
) -> BatchResult:
    """The same per-drawing work on an existing Dask distributed cluster
    (``pip install "dxfcheck[cluster]"``).  The workers must see the drawings
    at the same paths (a shared file system) and have dxfcheck installed.
    The cache stays on this machine.

    Raises
    ------
    ConfigError
        When dask.distributed is not installed or the scheduler cannot be
        reached.
    """
    from dxfcheck.errors import ConfigError

    try:
        from distributed import Client
        from distributed import as_completed as dask_completed
    except ImportError as exc:
        raise ConfigError('--scheduler needs dask.distributed: pip install "dxfcheck[cluster]"') from exc
    book = _Book(paths, config, overrides, use_cache, cache_dir, on_result)
    try:
        client = Client(scheduler, timeout="10s")  # type: ignore[no-untyped-call]
    except Exception as exc:  # the scheduler's address is the user's to fix
        raise ConfigError(f"cannot reach the Dask scheduler at {scheduler!r}: {exc}") from exc
    try:
        futures = {
            client.submit(check_one, name, config, tuple(overrides), pure=False): (k, key) for k, name, key in book.todo
        }
        for fut in dask_completed(list(futures)):  # type: ignore[no-untyped-call]
            book.record(*futures[fut], fut.result())
    except KeyboardInterrupt:
        book.out.interrupted = True
    finally:
        client.close()  # type: ignore[no-untyped-call]
    return book.finish()


def results_csv(batch: BatchResult) -> str:
    """The per-drawing results as CSV text."""
    buf = io.StringIO()
    w = csv.writer(buf)
    w.writerow(["drawing", "status", "torque_cw_Nm", "torque_ccw_Nm", "failed_rules", "message", "seconds", "cached"])
    for r in batch.results:
        w.writerow(
            [
                r.drawing,
                r.status,
                r.torque_cw_Nm,
                r.torque_ccw_Nm,
                " ".join(r.failed_rules),
                r.message,
                f"{r.seconds:.3f}",
                r.cached,
            ]
        )
    return buf.getvalue()


def results_json(batch: BatchResult) -> dict[str, Any]:
    """The ``dxfcheck.batch/1`` JSON document."""
    from dxfcheck.report import CAUTION

    return {
        "schema": "dxfcheck.batch/1",
        "counts": batch.counts(),
        "interrupted": batch.interrupted,
        "results": [{**asdict(r), "failed_rules": list(r.failed_rules)} for r in batch.results],
        "caution": CAUTION,
    }
