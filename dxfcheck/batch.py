"""Check whole folders of drawings: in parallel processes, with a cache.

Each drawing is checked as by ``dxfcheck check`` in a worker process; one
bad file is reported with its error and never stops the batch.

* Discovery takes regular files only: FIFOs, devices and sockets are skipped
  with a message and never opened; symbolic links that lead out of the
  folders given are not followed unless asked.
* The pool holds at most one worker per CPU core unless ``jobs`` asks for
  more (never above :data:`MAX_JOBS_PER_CORE` per core); workers start as
  they are needed, each drawing has its own time limit (a drawing over it is
  killed with its worker and reported as ``timeout``), and workers die with
  the batch (``PR_SET_PDEATHSIG`` on Linux, and a watch on the parent's pid).
* A cache keyed by every input of the verdict (the drawing's bytes, its name
  and path as the spec sees them, the project file's and the sidecar's
  content, the options and the tool's version) lets a rerun skip drawings
  that did not change.  Every record is checked against a strict schema and
  signed with HMAC-SHA256 under a key kept in the cache folder (mode 0600);
  a record that fails either is discarded and the drawing checked again.

Test hook: the environment variable ``DXFCHECK_TEST_SLOW=SECONDS`` (or
``SECONDS:PATTERN``, a shell pattern on the file name) makes a worker sleep
that long before checking a drawing, and say so on stderr with its pid.  It
is read only by the workers and exists for the tests of the time limit and
of the signals.
"""

from __future__ import annotations

import contextlib
import csv
import fnmatch
import hashlib
import hmac
import io
import json
import math
import os
import secrets
import signal
import stat
import sys
import threading
import time
from collections import deque
from collections.abc import Callable, Iterable, Iterator, Sequence
from dataclasses import asdict, dataclass, field, replace
from pathlib import Path
from typing import TYPE_CHECKING, Any, TypeVar

from dxfcheck.core.records import record

if TYPE_CHECKING:
    from multiprocessing.connection import Connection
    from multiprocessing.process import BaseProcess

__all__ = [
    "BATCH_SCHEMA",
    "DEFAULT_TIMEOUT_EACH_S",
    "MAX_JOBS_PER_CORE",
    "MAX_SPEC_SOURCE_BYTES",
    "OUTPUT_SUFFIX",
    "STATUSES",
    "BatchResult",
    "CheckOptions",
    "DrawingResult",
    "Found",
    "Skipped",
    "cache_key",
    "check_inputs",
    "check_one",
    "discover",
    "find_drawings",
    "results_csv",
    "results_json",
    "run_batch",
    "run_on_cluster",
    "worker_count",
]

#: Marked-up copies that ``annotate`` names by default end in this (a batch
#: skips dxfcheck's outputs by their marker, whatever their name).
OUTPUT_SUFFIX = "-forces.dxf"
#: Version of the cache records (bump when their content or key changes).
CACHE_FORMAT = 2
#: Versioned name of the ``batch --json`` document.
BATCH_SCHEMA = "dxfcheck.batch/2"
#: Every status a drawing can get, in the order of the counts.
STATUSES = ("pass", "warn", "fail", "error", "timeout")
#: Statuses a cache record may hold (errors and timeouts are checked again).
CACHED_STATUSES = frozenset({"pass", "warn", "fail"})
#: Time limit of one drawing unless ``--timeout-each`` says otherwise [s].
DEFAULT_TIMEOUT_EACH_S = 120.0
#: Longest ``--timeout-each`` accepted [s] (one day).
MAX_TIMEOUT_EACH_S = 86400.0
#: Time a new worker may take to start (imports) before its first drawing's
#: own limit starts [s].
STARTUP_GRACE_S = 60.0
#: ``--jobs`` may ask for at most this many workers per CPU core.
MAX_JOBS_PER_CORE = 4
#: Largest project file or sidecar a batch reads [bytes].
MAX_SPEC_SOURCE_BYTES = 1_000_000
#: Largest cache record read [bytes]; a record is a few hundred bytes.
MAX_RECORD_BYTES = 64_000
#: Name of the signing key in the cache folder.
KEY_FILE = "hmac.key"
_KEY_BYTES = 32
_TEST_SLOW_ENV = "DXFCHECK_TEST_SLOW"

_T = TypeVar("_T")


@record(frozen=True)
class CheckOptions:
    """Everything besides the drawing that goes into its check (and so into
    its cache key).

    Attributes
    ----------
    config : str or None
        Project file for every drawing (default: each one's nearest).
    overrides : tuple of (str, str)
        ``--set KEY=VALUE`` pairs.
    units : str or None
        Drawing unit overriding ``$INSUNITS``.
    tolerance_mm : float or None
        "Lies on" tolerance [mm].
    max_bytes : int or None
        Largest drawing read [bytes].
    records_dir : str or None
        Folder the calculation record of each drawing checked is written to
        (:func:`dxfcheck.output.record.record_name`), or None.
    skeleton_from : str or None
        ``auto``, ``layers`` or ``geometry`` for every drawing, over the
        project file's ``[infer] skeleton_from`` (``--skeleton-from``); None
        keeps each drawing's own.
    """

    config: str | None = None
    overrides: tuple[tuple[str, str], ...] = ()
    units: str | None = None
    tolerance_mm: float | None = None
    max_bytes: int | None = None
    records_dir: str | None = None
    skeleton_from: str | None = None


@record(frozen=True)
class DrawingResult:
    """The outcome for one drawing.

    Attributes
    ----------
    drawing : str
    status : str
        ``pass``, ``warn``, ``fail`` (a rule failed), ``error`` (the drawing
        or its spec could not be used) or ``timeout`` (over its time limit).
    torque_cw_Nm, torque_ccw_Nm : float or None
        Braking torque at the nominal μ [N·m].
    failed_rules : tuple of str
    message : str
        The error, for ``error`` and ``timeout``.
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


@record(frozen=True)
class Skipped:
    """A path a batch did not check, and why (it was never opened)."""

    path: str
    reason: str


@record(frozen=True)
class Found:
    """What discovery found: drawings to check, and paths skipped."""

    drawings: tuple[Path, ...]
    skipped: tuple[Skipped, ...] = ()


@dataclass
class BatchResult:
    """Every drawing's result, in the order they were found."""

    results: list[DrawingResult] = field(default_factory=list)
    interrupted: bool = False
    #: Name of the signal that stopped the batch (``SIGINT``, ``SIGTERM``...).
    signal: str | None = None
    #: Cache records discarded for a bad schema or signature.
    cache_rejected: int = 0
    skipped: tuple[Skipped, ...] = ()
    #: Notes about the run (e.g. a cache that could not be used).
    notes: list[str] = field(default_factory=list)

    def counts(self) -> dict[str, int]:
        out = dict.fromkeys(STATUSES, 0)
        for r in self.results:
            out[r.status] += 1
        return out

    def worst(self) -> str:
        """The worst status (``timeout`` counts as ``error``)."""
        c = self.counts()
        if c["error"] or c["timeout"]:
            return "error"
        return next((s for s in ("fail", "warn") if c[s]), "pass")

    def summary(self) -> str:
        """One line: the counts, what was skipped and rejected."""
        c = self.counts()
        n = len(self.results)
        text = (
            f"{n} drawing{'' if n == 1 else 's'}: {c['pass']} passed, {c['warn']} warnings, {c['fail']} failed, "
            f"{c['error']} unusable, {c['timeout']} timed out"
        )
        if self.skipped:
            text += f"; {len(self.skipped)} skipped"
        if self.cache_rejected:
            text += f"; {self.cache_rejected} cache records rejected"
        if self.interrupted:
            text += f" (interrupted{' by ' + self.signal if self.signal else ''})"
        return text


# --------------------------------------------------------------------------
# discovery


def _own_output(path: Path) -> bool:
    """Files dxfcheck itself wrote, which a batch does not check: they carry
    the marker (:func:`dxfcheck.core.files.is_dxfcheck_output`, the file's first
    bytes), whatever their name.  Called on regular files only."""
    from dxfcheck.core.files import is_dxfcheck_output

    return is_dxfcheck_output(path)


def _kind(mode: int) -> str:
    for test, name in (
        (stat.S_ISFIFO, "FIFO (named pipe)"),
        (stat.S_ISCHR, "character device"),
        (stat.S_ISBLK, "block device"),
        (stat.S_ISSOCK, "socket"),
        (stat.S_ISDIR, "folder"),
    ):
        if test(mode):
            return name
    return "special file"


def _inside(target: str, roots: Sequence[str]) -> bool:
    return any(os.path.commonpath([target, r]) == r for r in roots)


def _refusal(path: Path, roots: Sequence[str], follow: bool, explicit: bool) -> str | None:
    """Why ``path`` is not checked, or None; only ``lstat``/``stat``, never
    an open.  A file named on the command line is followed where it leads."""
    try:
        mode = os.lstat(path).st_mode
    except OSError:
        return None if explicit else "vanished while the folder was searched"
    if stat.S_ISLNK(mode):
        if not (explicit or follow or _inside(os.path.realpath(path), roots)):
            return "is a symbolic link that leads out of the folders given; not followed (--follow-symlinks follows it)"
        try:
            mode = os.stat(path).st_mode
        except OSError:
            return None if explicit else "is a broken symbolic link"
    if not stat.S_ISREG(mode):
        return f"is a {_kind(mode)}, not a regular file; skipped without opening it"
    return None


def _walk(root: Path, roots: Sequence[str], follow: bool, skipped: list[Skipped]) -> Iterator[Path]:
    """``.dxf`` and ``.dwg`` files under ``root``, in a stable order; linked folders are
    entered only with ``follow`` (each real folder once)."""
    seen: set[str] = set()

    def unreadable(exc: OSError) -> None:
        skipped.append(Skipped(str(exc.filename), f"cannot be searched ({exc.strerror})"))

    for dirpath, dirnames, filenames in os.walk(root, onerror=unreadable, followlinks=follow):
        real = os.path.realpath(dirpath)
        if real in seen:
            dirnames[:] = []
            continue
        seen.add(real)
        for d in sorted(dirnames):
            full = os.path.join(dirpath, d)
            if not follow and os.path.islink(full) and not _inside(os.path.realpath(full), roots):
                skipped.append(
                    Skipped(
                        full,
                        "is a symbolic link to a folder outside the folders given; not followed "
                        "(--follow-symlinks follows it)",
                    )
                )
        dirnames.sort()
        for name in sorted(filenames):
            if name.lower().endswith((".dxf", ".dwg")):
                yield Path(dirpath) / name


def _glob_root(item: str) -> tuple[Path, str]:
    """The folder before the first wildcard, and the pattern below it."""
    parts = Path(item).parts
    n = next(i for i, part in enumerate(parts) if any(ch in part for ch in "*?["))
    base = Path(*parts[:n]) if n else Path(".")
    return base, str(Path(*parts[n:]))


def find_drawings(items: Iterable[str], *, follow_symlinks: bool = False) -> Found:
    """Drawings named by files, folders (searched recursively) and glob
    patterns, in a stable order, without our own outputs; special files and
    symbolic links leaving the folders given are skipped, never opened."""
    items = list(items)
    roots: list[str] = []
    plan: list[tuple[str, Path | None]] = []
    for item in items:
        if any(ch in item for ch in "*?["):
            glob_base = _glob_root(item)[0]
            roots.append(os.path.realpath(glob_base))
            plan.append((item, glob_base))
        elif Path(item).is_dir():
            roots.append(os.path.realpath(item))
            plan.append((item, Path(item)))
        else:
            plan.append((item, None))
    found: dict[Path, None] = {}
    skipped: list[Skipped] = []
    for item, base in plan:
        if base is None:
            candidates: Iterable[Path] = [Path(item)]
        elif base == Path(item):
            candidates = sorted(_walk(base, roots, follow_symlinks, skipped))
        else:
            candidates = sorted(x for x in base.glob(_glob_root(item)[1]) if not x.is_dir())
        for c in candidates:
            if c in found:
                continue
            reason = _refusal(c, roots, follow_symlinks, explicit=base is None)
            if not reason and _own_output(c):  # only a regular file is opened for the marker
                reason = "is a marked-up copy dxfcheck wrote (its DXFCHECK_OUTPUT marker), not a drawing to check"
            if reason:
                skipped.append(Skipped(str(c), reason))
            else:
                found[c] = None
    return Found(tuple(found), tuple(skipped))


def discover(paths: Iterable[str], *, follow_symlinks: bool = False) -> list[Path]:
    """The drawings of :func:`find_drawings`, without the skipped paths."""
    return list(find_drawings(paths, follow_symlinks=follow_symlinks).drawings)


# --------------------------------------------------------------------------
# bounded reads and the cache key


class _Unreadable(Exception):
    """A file a batch will not read: special, too large, or unreadable."""


def _open_regular(path: Path, limit: int, what: str) -> tuple[int, int]:
    """Open ``path`` without blocking (a FIFO never stalls the open) and
    return its descriptor and size; refuse anything but a regular file of at
    most ``limit`` bytes."""
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0) | getattr(os, "O_CLOEXEC", 0))
    except OSError as exc:
        raise _Unreadable(f"{what} {path} cannot be read ({exc.strerror})") from exc
    st = os.fstat(fd)
    if not stat.S_ISREG(st.st_mode):
        os.close(fd)
        raise _Unreadable(f"{what} {path} is a {_kind(st.st_mode)}, not a regular file")
    if st.st_size > limit:
        os.close(fd)
        raise _Unreadable(f"{what} {path} is {st.st_size / 1e6:.1f} MB, over the {limit / 1e6:g} MB limit")
    return fd, st.st_size


def _read_limited(path: Path, limit: int, what: str) -> bytes:
    fd, _ = _open_regular(path, limit, what)
    with os.fdopen(fd, "rb") as fh:
        data = fh.read(limit + 1)
    if len(data) > limit:
        raise _Unreadable(f"{what} {path} grew over the {limit / 1e6:g} MB limit while it was read")
    return data


def _drawing_digest(path: Path, limit: int) -> bytes:
    fd, _ = _open_regular(path, limit, "drawing")
    h = hashlib.sha256()
    with os.fdopen(fd, "rb") as fh:
        for chunk in iter(lambda: fh.read(1 << 20), b""):
            h.update(chunk)
    return h.digest()


def _project_file(path: Path, options: CheckOptions) -> Path | None:
    from dxfcheck.core.config import find_config

    return Path(options.config) if options.config else find_config(path)


def _spec_sources(path: Path, options: CheckOptions) -> list[tuple[str, Path, bytes]]:
    """The project file and the sidecar a check of ``path`` reads, as
    (role, path, content); bounded reads, special files refused.

    Raises
    ------
    _Unreadable
    """
    out: list[tuple[str, Path, bytes]] = []
    project = _project_file(path, options)
    if project is not None:
        out.append(("project file", project, _read_limited(project, MAX_SPEC_SOURCE_BYTES, "the project file")))
    sidecar = path.with_suffix(".toml")
    if sidecar != path and os.path.lexists(sidecar):  # one that is not a regular file is refused, naming it
        out.append(("sidecar", sidecar, _read_limited(sidecar, MAX_SPEC_SOURCE_BYTES, "the sidecar spec")))
    return out


def cache_key(path: Path, options: CheckOptions) -> str:
    """SHA-256 over every input of a drawing's verdict: the tool's version,
    the drawing's name, path and bytes, the project file's and the sidecar's
    path and content, and the options.

    Raises
    ------
    _Unreadable
        When the drawing or a spec source is not a regular file within its
        size limit (the drawing is then checked without the cache, or
        refused).
    """
    from dxfcheck.core.version import __version__
    from dxfcheck.read.drawing import MAX_INPUT_BYTES

    h = hashlib.sha256()

    def part(label: str, data: bytes) -> None:
        h.update(f"{label}\0{len(data)}\0".encode())
        h.update(data)

    part("tool", f"dxfcheck {__version__} cache {CACHE_FORMAT}".encode())
    part("name", path.name.encode("utf-8", "surrogateescape"))
    part("path", os.path.abspath(path).encode("utf-8", "surrogateescape"))
    part("real path", os.path.realpath(path).encode("utf-8", "surrogateescape"))
    limit = options.max_bytes if options.max_bytes is not None else MAX_INPUT_BYTES
    part("drawing", _drawing_digest(path, limit))
    for role, source, content in _spec_sources(path, options):
        part(role, os.path.abspath(source).encode("utf-8", "surrogateescape"))
        part(role + " content", content)
    part("options", _canonical(asdict(options)))
    return h.hexdigest()


# --------------------------------------------------------------------------
# the cache: strict records, signed


def _canonical(obj: Any) -> bytes:
    return json.dumps(obj, sort_keys=True, separators=(",", ":"), ensure_ascii=True, allow_nan=False).encode()


def _cache_dir(explicit: str | None) -> Path:
    if explicit:
        return Path(explicit)
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    return Path(base) / "dxfcheck"


def _read_key(f: Path) -> bytes:
    """The signing key, if it is ours alone: a regular file (not a link) of
    the right length, owned by this user, readable by no one else."""
    fd = os.open(f, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_NONBLOCK", 0))
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode) or st.st_size != _KEY_BYTES:
            raise _Unreadable(f"the cache key {f} is not a {_KEY_BYTES}-byte file")
        if hasattr(os, "getuid") and (st.st_uid != os.getuid() or st.st_mode & 0o077):
            raise _Unreadable(f"the cache key {f} is not private (mode {stat.S_IMODE(st.st_mode):o}, must be 600)")
        return os.read(fd, _KEY_BYTES + 1)
    finally:
        os.close(fd)


def _cache_secret(folder: Path) -> bytes:
    """The key that signs the records, created on first use (mode 0600,
    published atomically so two batches agree on it).

    Raises
    ------
    _Unreadable, OSError
    """
    folder.mkdir(parents=True, exist_ok=True, mode=0o700)
    f = folder / KEY_FILE
    if not os.path.lexists(f):
        tmp = folder / f".{KEY_FILE}.{os.getpid()}.{secrets.token_hex(4)}"
        fd = os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_NOFOLLOW", 0), 0o600)
        try:
            os.fchmod(fd, 0o600)
            os.write(fd, secrets.token_bytes(_KEY_BYTES))
            os.fsync(fd)
        finally:
            os.close(fd)
        try:
            os.link(tmp, f)  # fails when another batch published its key first
        except FileExistsError:
            pass
        finally:
            tmp.unlink()
    key = _read_key(f)
    if len(key) != _KEY_BYTES:
        raise _Unreadable(f"the cache key {f} is not a {_KEY_BYTES}-byte file")
    return key


def _finite(x: Any) -> bool:
    return x is None or (type(x) in (int, float) and math.isfinite(x) and abs(x) < 1e15)


def _valid_rule(name: Any) -> bool:
    return isinstance(name, str) and 0 < len(name) <= 200 and name.isprintable()


def _valid_result(r: Any) -> bool:
    """The strict schema of a cached result."""
    if not isinstance(r, dict) or set(r) != {"status", "torque_cw_Nm", "torque_ccw_Nm", "failed_rules", "message"}:
        return False
    rules = r["failed_rules"]
    return (
        r["status"] in CACHED_STATUSES
        and _finite(r["torque_cw_Nm"])
        and _finite(r["torque_ccw_Nm"])
        and isinstance(rules, list)
        and len(rules) <= 1000
        and all(_valid_rule(x) for x in rules)
        and (r["status"] == "fail") == bool(rules)  # a verdict fails exactly when a rule fails
        and isinstance(r["message"], str)
        and len(r["message"]) <= 4000
    )


def _mac(secret: bytes, key: str, result: dict[str, Any]) -> str:
    return hmac.new(secret, _canonical({"key": key, "result": result}), hashlib.sha256).hexdigest()


class _Cache:
    """Signed, schema-checked records, one file per key."""

    def __init__(self, folder: Path, enabled: bool) -> None:
        self.folder = folder
        self.secret: bytes | None = None
        self.rejected = 0
        self.note = ""
        if enabled:
            try:
                self.secret = _cache_secret(folder)
            except (OSError, _Unreadable) as exc:
                detail = exc.strerror if isinstance(exc, OSError) and exc.strerror else str(exc)
                self.note = f"the cache in {folder} is not used: {detail}; every drawing is checked"

    @property
    def enabled(self) -> bool:
        return self.secret is not None

    def get(self, key: str, drawing: str) -> DrawingResult | None:
        if self.secret is None or not key:
            return None
        f = self.folder / f"{key}.json"
        if not os.path.lexists(f):
            return None
        try:
            doc = json.loads(_read_limited(f, MAX_RECORD_BYTES, "cache record"), parse_constant=_no_constant)
            ok = (
                isinstance(doc, dict)
                and set(doc) == {"format", "key", "result", "mac"}
                and doc["format"] == CACHE_FORMAT
                and doc["key"] == key
                and _valid_result(doc["result"])
                and isinstance(doc["mac"], str)
                and hmac.compare_digest(doc["mac"], _mac(self.secret, key, doc["result"]))
            )
        except (_Unreadable, ValueError, RecursionError):
            ok = False
        if not ok:
            self.rejected += 1
            self._discard(f)
            return None
        r = doc["result"]
        return DrawingResult(
            drawing,
            r["status"],
            None if r["torque_cw_Nm"] is None else float(r["torque_cw_Nm"]),
            None if r["torque_ccw_Nm"] is None else float(r["torque_ccw_Nm"]),
            tuple(r["failed_rules"]),
            r["message"],
            cached=True,
        )

    def _discard(self, f: Path) -> None:
        with contextlib.suppress(OSError):
            f.unlink()

    def put(self, key: str, result: DrawingResult) -> None:
        if self.secret is None or not key or result.status not in CACHED_STATUSES:
            return  # errors may pass next time (a file still being written): check again
        body = {
            "status": result.status,
            "torque_cw_Nm": result.torque_cw_Nm,
            "torque_ccw_Nm": result.torque_ccw_Nm,
            "failed_rules": list(result.failed_rules),
            "message": result.message,
        }
        if not _valid_result(body):
            return
        from dxfcheck.core.files import write_atomic

        doc = {"format": CACHE_FORMAT, "key": key, "result": body, "mac": _mac(self.secret, key, body)}
        try:
            write_atomic(self.folder / f"{key}.json", _canonical(doc))
        except Exception:  # a cache that cannot be written only costs time
            return


def _no_constant(name: str) -> Any:
    raise ValueError(f"{name} is not a number")


# --------------------------------------------------------------------------
# the worker


def check_one(path: str, options: CheckOptions = CheckOptions()) -> DrawingResult:
    """Check one drawing; never raises (an unusable drawing is an
    ``error`` result).  Runs in a worker process."""
    from dxfcheck.core.errors import DxfcheckError
    from dxfcheck.pipeline import check

    t0 = time.perf_counter()
    try:
        j = check(
            path,
            config=_config(path, options),
            overrides=list(options.overrides),
            units=options.units,
            tolerance_mm=options.tolerance_mm,
            max_bytes=options.max_bytes,
        )
        if options.records_dir is not None:
            from dxfcheck.output.record import record_name, write_record

            write_record(j, Path(options.records_dir) / record_name(path), force=True)
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


def _config(path: str, options: CheckOptions) -> Any:
    """The project file for ``check``: ``options.config`` (a path, or each
    drawing's nearest when None), as a resolved Config with
    ``options.skeleton_from`` over its ``[infer] skeleton_from`` when given."""
    if options.skeleton_from is None:
        return options.config
    from dxfcheck.pipeline import resolve_config

    cfg = resolve_config(path, options.config)
    return replace(cfg, infer=replace(cfg.infer, skeleton_from=options.skeleton_from))


def _watch_parent(parent_pid: int) -> None:
    while True:
        if os.getppid() != parent_pid:
            os._exit(1)
        time.sleep(0.5)


def _die_with_parent(parent_pid: int) -> None:
    """End this worker when the batch ends, however it ends (kill -9
    included): the kernel's parent-death signal on Linux, and everywhere a
    thread that watches the parent's pid."""
    if sys.platform.startswith("linux"):
        try:
            import ctypes

            libc = ctypes.CDLL(None, use_errno=True)
            libc.prctl(1, int(signal.SIGKILL), 0, 0, 0)  # PR_SET_PDEATHSIG
        except (OSError, AttributeError):
            pass
    if os.getppid() != parent_pid:
        os._exit(1)
    threading.Thread(target=_watch_parent, args=(parent_pid,), daemon=True).start()


def _test_hook_slow(path: str) -> None:
    """``DXFCHECK_TEST_SLOW=SECONDS[:PATTERN]``: sleep before the check (a
    test hook; see the module docstring)."""
    spec = os.environ.get(_TEST_SLOW_ENV)
    if not spec:
        return
    seconds, _, pattern = spec.partition(":")
    if pattern and not fnmatch.fnmatch(Path(path).name, pattern):
        return
    sys.stderr.write(f"dxfcheck: test hook {_TEST_SLOW_ENV}: worker {os.getpid()} sleeps {seconds} s on {path}\n")
    sys.stderr.flush()
    time.sleep(float(seconds))


def _worker_main(conn: Connection, parent_pid: int) -> None:
    """A worker: check the drawings the batch sends, one at a time, until it
    sends None or goes away."""
    signal.signal(signal.SIGINT, signal.SIG_IGN)  # Ctrl-C reaches the whole group: the batch handles it
    _die_with_parent(parent_pid)
    import dxfcheck.pipeline  # noqa: F401  (imported before the first drawing's clock starts)

    while True:
        try:
            task = conn.recv()
        except (EOFError, OSError):
            return
        if task is None:
            return
        k, path, options = task
        conn.send(("started", k))
        _test_hook_slow(path)
        conn.send(("done", k, check_one(path, options)))


# --------------------------------------------------------------------------
# the pool


def _cores() -> int:
    try:
        return len(os.sched_getaffinity(0))
    except (AttributeError, OSError):
        return os.cpu_count() or 1


def worker_count(jobs: int | None, todo: int | None = None) -> int:
    """Workers for a batch: ``jobs``, default the CPU cores; never more than
    :data:`MAX_JOBS_PER_CORE` per core, nor more than drawings to check.

    Raises
    ------
    ConfigError
        When ``jobs`` is below 1 or above the bound.
    """
    from dxfcheck.core.errors import ConfigError

    cores = _cores()
    if jobs is not None and jobs < 1:
        raise ConfigError("--jobs must be at least 1")
    if jobs is not None and jobs > MAX_JOBS_PER_CORE * cores:
        raise ConfigError(
            f"--jobs {jobs} is more than {MAX_JOBS_PER_CORE} workers for each of the {cores} CPU cores "
            f"(at most {MAX_JOBS_PER_CORE * cores}); leave it out to use one per core"
        )
    n = cores if jobs is None else jobs
    return max(1, min(n, todo)) if todo is not None else n


class _Child:
    """A worker started as ``python -c`` (no main module re-imported, so a
    script without a ``__main__`` guard is safe), talking over a socket pair;
    the subset of :class:`multiprocessing.Process` the pool uses."""

    def __init__(self, parent_pid: int) -> None:
        import socket
        import subprocess
        from multiprocessing.connection import Connection

        import dxfcheck

        ours, theirs = socket.socketpair()
        home = str(Path(dxfcheck.__file__).resolve().parent.parent)
        env = {**os.environ, "PYTHONPATH": os.pathsep.join(filter(None, (home, os.environ.get("PYTHONPATH"))))}
        code = "import sys; from dxfcheck.batch import _worker_entry; _worker_entry(int(sys.argv[1]), int(sys.argv[2]))"
        try:
            self.popen = subprocess.Popen(
                [sys.executable, "-c", code, str(theirs.fileno()), str(parent_pid)],
                pass_fds=(theirs.fileno(),),
                stdin=subprocess.DEVNULL,
                env=env,
            )
        finally:
            theirs.close()
        self.pid = self.popen.pid
        self.conn = Connection(ours.detach())

    @property
    def exitcode(self) -> int | None:
        return self.popen.poll()

    def kill(self) -> None:
        if self.popen.poll() is None:
            self.popen.kill()

    def join(self, timeout: float) -> None:
        import subprocess

        with contextlib.suppress(subprocess.TimeoutExpired):
            self.popen.wait(timeout)

    def is_alive(self) -> bool:
        return self.popen.poll() is None


def _worker_entry(fd: int, parent_pid: int) -> None:
    """Where a worker started by :class:`_Child` begins (its stdout joins
    stderr: the batch's stdout carries only the report)."""
    from multiprocessing.connection import Connection

    os.dup2(2, 1)
    _worker_main(Connection(fd), parent_pid)


@dataclass
class _Slot:
    proc: BaseProcess | _Child
    conn: Connection
    task: tuple[int, str, str] | None = None
    deadline: float = math.inf
    started: float = 0.0


class _Pool:
    """Worker processes started as needed; a drawing over its time limit is
    killed with its worker, which is replaced when there is more to do."""

    def __init__(self, size: int, options: CheckOptions, timeout_each_s: float) -> None:
        import multiprocessing

        self.ctx = multiprocessing.get_context("spawn")  # a clean process: no threads or locks inherited
        self.size = size
        self.options = options
        self.timeout_each_s = timeout_each_s
        self.slots: list[_Slot] = []

    def busy(self) -> list[_Slot]:
        return [s for s in self.slots if s.task is not None]

    def has_room(self) -> bool:
        return len(self.busy()) < self.size

    def submit(self, task: tuple[int, str, str]) -> None:
        slot = next((s for s in self.slots if s.task is None), None)
        grace = 0.0
        if slot is not None:
            try:
                slot.conn.send((task[0], task[1], self.options))
            except OSError:  # an idle worker that went away: start another
                self._discard(slot)
                slot = None
        if slot is None:
            slot, grace = self._start(), STARTUP_GRACE_S
            slot.conn.send((task[0], task[1], self.options))
        slot.task, slot.started = task, time.monotonic()
        slot.deadline = slot.started + grace + self.timeout_each_s

    def _start(self) -> _Slot:
        if os.name == "posix":
            child = _Child(os.getpid())
            slot = _Slot(child, child.conn)
        else:  # no descriptors to pass: multiprocessing's spawn (the script needs its __main__ guard)
            here, there = self.ctx.Pipe()
            proc = self.ctx.Process(target=_worker_main, args=(there, os.getpid()), daemon=True)
            proc.start()
            there.close()
            slot = _Slot(proc, here)
        self.slots.append(slot)
        return slot

    def collect(self) -> list[tuple[tuple[int, str, str], DrawingResult]]:
        """Wait (at most a second) for results and expired time limits."""
        from multiprocessing.connection import wait

        busy = self.busy()
        if not busy:
            return []
        pause = min(1.0, max(0.0, min(s.deadline for s in busy) - time.monotonic()))
        ready = wait([s.conn for s in busy], pause)
        out: list[tuple[tuple[int, str, str], DrawingResult]] = []
        for s in busy:
            assert s.task is not None
            task = s.task
            if s.conn in ready:
                try:
                    msg = s.conn.recv()
                except (EOFError, OSError):
                    self._discard(s)
                    out.append((task, self._died(s, task[1])))
                    continue
                if msg[0] == "started":
                    s.started = time.monotonic()
                    s.deadline = s.started + self.timeout_each_s
                else:
                    s.task = None
                    out.append((task, msg[2]))
            elif time.monotonic() >= s.deadline:
                self._discard(s)
                out.append((task, self._timed_out(s, task[1])))
        return out

    def _timed_out(self, s: _Slot, path: str) -> DrawingResult:
        took = time.monotonic() - s.started
        return DrawingResult(
            path,
            "timeout",
            message=f"took longer than {self.timeout_each_s:g} s (--timeout-each); its worker was stopped",
            seconds=took,
        )

    def _died(self, s: _Slot, path: str) -> DrawingResult:
        code = s.proc.exitcode
        how = f"was killed by signal {-code}" if code is not None and code < 0 else f"exited with code {code}"
        if code == -signal.SIGKILL:
            how += " (out of memory?)"
        return DrawingResult(
            path,
            "error",
            message=f"internal error: the worker checking it {how}",
            seconds=time.monotonic() - s.started,
        )

    def _discard(self, s: _Slot) -> None:
        s.proc.kill()
        s.proc.join(5)
        s.conn.close()
        self.slots.remove(s)

    def close(self, *, kill: bool) -> None:
        """Stop every worker: idle ones are asked to leave, busy ones (and
        all of them when ``kill``) are killed; each one is waited for."""
        for s in list(self.slots):
            if kill or s.task is not None:
                s.proc.kill()
            else:
                try:
                    s.conn.send(None)
                except OSError:
                    s.proc.kill()
        for s in list(self.slots):
            s.proc.join(2)
            if s.proc.is_alive():
                s.proc.kill()
                s.proc.join(2)
            s.conn.close()
        self.slots.clear()


class _Signalled(KeyboardInterrupt):
    """SIGTERM or SIGHUP reached the batch."""

    def __init__(self, signum: int) -> None:
        super().__init__(signal.Signals(signum).name)
        self.signum = signum


class _Signals:
    """While a batch runs: SIGTERM and SIGHUP end it like Ctrl-C (the workers
    are killed, what was done is reported)."""

    NAMES = ("SIGTERM", "SIGHUP")

    def __init__(self) -> None:
        self.saved: dict[int, Any] = {}
        self.fired = False

    def __enter__(self) -> _Signals:
        if threading.current_thread() is threading.main_thread():
            for name in self.NAMES:
                if hasattr(signal, name):
                    num = getattr(signal, name)
                    self.saved[num] = signal.signal(num, self._handler)
        return self

    def _handler(self, signum: int, frame: object) -> None:
        if not self.fired:  # a second signal does not interrupt the clean-up
            self.fired = True
            raise _Signalled(signum)

    def __exit__(self, *exc: object) -> None:
        for num, old in self.saved.items():
            signal.signal(num, old)


def run_batch(
    paths: Sequence[Path],
    *,
    jobs: int | None = None,
    options: CheckOptions = CheckOptions(),
    use_cache: bool = True,
    cache_dir: str | None = None,
    on_result: Callable[[DrawingResult], None] | None = None,
    timeout_each_s: float = DEFAULT_TIMEOUT_EACH_S,
) -> BatchResult:
    """Check every drawing in worker processes, ``jobs`` at a time (default:
    the CPU cores), each within ``timeout_each_s`` seconds.

    ``on_result`` is called in the main process as each drawing finishes (the
    progress display).  Ctrl-C, SIGTERM and SIGHUP stop the batch cleanly:
    the workers are killed and the result holds what was done,
    ``interrupted`` set.

    Raises
    ------
    ConfigError
        On a bad ``jobs`` or ``timeout_each_s``, or a project file that
        cannot be read.
    """
    check_inputs(options, jobs=jobs, timeout_each_s=timeout_each_s)
    book = _Book(options, use_cache, cache_dir, on_result)
    pool = _Pool(1, options, timeout_each_s)
    queue: deque[tuple[int, str, str]] = deque()
    with _Signals():
        try:
            book.scan(paths)  # the cache's answers; a signal here reports them
            pool.size = worker_count(jobs, max(1, len(book.todo)))
            queue.extend(book.todo)
            while queue or pool.busy():
                while queue and pool.has_room():
                    pool.submit(queue.popleft())
                for (k, name, key), result in pool.collect():
                    book.record(k, name, key, result)
        except KeyboardInterrupt as exc:
            book.out.interrupted = True
            book.out.signal = exc.args[0] if isinstance(exc, _Signalled) else "SIGINT"
        finally:
            pool.close(kill=book.out.interrupted or bool(queue) or bool(pool.busy()))
    return book.finish()


def check_inputs(options: CheckOptions, *, jobs: int | None, timeout_each_s: float) -> None:
    """Refuse a bad ``jobs``, ``timeout_each_s`` or project file before any
    drawing is looked at.

    Raises
    ------
    ConfigError
    """
    worker_count(jobs)
    _check_timeout_each(timeout_each_s)
    _check_project(options)
    _check_skeleton_from(options)


def _check_skeleton_from(options: CheckOptions) -> None:
    from dxfcheck.core.config import SKELETON_SOURCES
    from dxfcheck.core.errors import ConfigError

    if options.skeleton_from is not None and options.skeleton_from not in SKELETON_SOURCES:
        raise ConfigError(
            f"--skeleton-from must be one of {', '.join(SKELETON_SOURCES)}, got {options.skeleton_from!r}"
        )


def _check_timeout_each(seconds: float) -> None:
    from dxfcheck.core.errors import ConfigError

    if not (isinstance(seconds, (int, float)) and 0 < seconds <= MAX_TIMEOUT_EACH_S):
        raise ConfigError(
            f"--timeout-each must be a number of seconds above 0 and at most {MAX_TIMEOUT_EACH_S:g}, got {seconds}"
        )


def _check_project(options: CheckOptions) -> None:
    """A project file given for every drawing must be a regular file within
    its limit: refused once, naming it, instead of once per drawing (or a
    worker stuck on a FIFO)."""
    from dxfcheck.core.errors import ConfigError

    if options.config:
        try:
            _read_limited(Path(options.config), MAX_SPEC_SOURCE_BYTES, "the project file")
        except _Unreadable as exc:
            raise ConfigError(str(exc)) from None


class _Book:
    """What a batch has done: cache hits up front, results as they come."""

    def __init__(
        self,
        options: CheckOptions,
        use_cache: bool,
        cache_dir: str | None,
        on_result: Callable[[DrawingResult], None] | None,
    ) -> None:
        self.options = options
        self.cache = _Cache(_cache_dir(cache_dir), use_cache)
        self.on_result = on_result
        self.out = BatchResult()
        if self.cache.note:
            self.out.notes.append(self.cache.note)
        self.done: dict[int, DrawingResult] = {}
        self.todo: list[tuple[int, str, str]] = []

    def scan(self, paths: Sequence[Path]) -> None:
        """Answer from the cache what it can; the rest is to do."""
        for k, p in enumerate(paths):
            refused = self._refused_spec(p)
            if refused:
                self._done(k, DrawingResult(str(p), "error", message=refused))
                continue
            key = self._key(p)
            hit = self.cache.get(key, str(p))
            if hit is None:
                self.todo.append((k, str(p), key))
            else:
                self._done(k, hit)

    def _refused_spec(self, p: Path) -> str:
        """Why the spec of ``p`` cannot be read safely (a sidecar too large),
        or ''; the check itself would read it whole."""
        try:
            _spec_sources(p, self.options)
        except _Unreadable as exc:
            return f"{p}: {exc}"
        except OSError:
            pass  # the check reports what it cannot read
        return ""

    def _key(self, p: Path) -> str:
        if not self.cache.enabled:
            return ""
        try:
            return cache_key(p, self.options)
        except (_Unreadable, OSError):
            return ""  # the check says what is wrong with it

    def _done(self, k: int, r: DrawingResult) -> None:
        self.done[k] = r
        if self.on_result:
            self.on_result(r)

    def record(self, k: int, name: str, key: str, r: DrawingResult) -> None:
        # stored only if no input changed while it was checked
        if key and self._key(Path(name)) == key:
            self.cache.put(key, r)
        self._done(k, r)

    def finish(self) -> BatchResult:
        self.out.results = [self.done[k] for k in sorted(self.done)]
        self.out.cache_rejected = self.cache.rejected
        return self.out


#: How long to try reaching a Dask scheduler [s].
SCHEDULER_TIMEOUT_S = 10.0
#: Most drawings sent to a cluster's worker as one task.  A task's round
#: trip costs the scheduler about 2 ms of CPU (1.8 ms measured on a
#: two-worker LocalCluster sharing two cores), as much as a small drawing's
#: check; a few drawings a task make it a small share.
CLUSTER_CHUNK_MAX = 32
#: Tasks per worker at least, so that the work still spreads evenly.
CLUSTER_TASKS_PER_WORKER = 8


def cluster_chunks(todo: Sequence[_T], workers: int) -> list[list[_T]]:
    """``todo`` in consecutive chunks for a cluster of ``workers``: at least
    :data:`CLUSTER_TASKS_PER_WORKER` tasks a worker where there is enough
    work, at most :data:`CLUSTER_CHUNK_MAX` drawings a task."""
    per = math.ceil(len(todo) / (CLUSTER_TASKS_PER_WORKER * max(workers, 1)))
    size = min(max(per, 1), CLUSTER_CHUNK_MAX)
    return [list(todo[i : i + size]) for i in range(0, len(todo), size)]


def check_many(paths: Sequence[str], options: CheckOptions = CheckOptions()) -> list[DrawingResult]:
    """:func:`check_one` on each drawing, in order (one cluster task)."""
    return [check_one(p, options) for p in paths]


def run_on_cluster(
    paths: Sequence[Path],
    scheduler: str,
    *,
    options: CheckOptions = CheckOptions(),
    use_cache: bool = True,
    cache_dir: str | None = None,
    on_result: Callable[[DrawingResult], None] | None = None,
) -> BatchResult:
    """The same per-drawing work on an existing Dask distributed cluster
    (``pip install "dxfcheck[cluster]"``).  The workers must see the drawings
    at the same paths (a shared file system) and have dxfcheck installed.
    The cache stays on this machine; the per-drawing time limit is not
    enforced there (the cluster's own limits apply).

    Raises
    ------
    ConfigError
        When dask.distributed is not installed or the scheduler cannot be
        reached.
    """
    from dxfcheck.core.errors import ConfigError

    try:
        from distributed import Client
        from distributed import as_completed as dask_completed
    except ImportError as exc:
        raise ConfigError('--scheduler needs dask.distributed: pip install "dxfcheck[cluster]"') from exc
    _check_project(options)
    book = _Book(options, use_cache, cache_dir, on_result)
    book.scan(paths)
    try:
        client = Client(scheduler, timeout=f"{SCHEDULER_TIMEOUT_S}s")  # type: ignore[no-untyped-call]
    except Exception as exc:  # the scheduler's address is the user's to fix
        raise ConfigError(f"cannot reach the Dask scheduler at {scheduler!r}: {exc}") from exc
    try:
        workers = len(client.scheduler_info().get("workers", {}))
        chunks = cluster_chunks(book.todo, workers)
        futures = {client.submit(check_many, [name for _, name, _ in c], options, pure=False): c for c in chunks}
        for fut in dask_completed(list(futures)):  # type: ignore[no-untyped-call]
            for task, result in zip(futures[fut], fut.result(), strict=True):
                book.record(*task, result)
    except KeyboardInterrupt:
        book.out.interrupted = True
        book.out.signal = "SIGINT"
    finally:
        client.close()  # type: ignore[no-untyped-call]
    return book.finish()


# --------------------------------------------------------------------------
# outputs


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
    """The ``dxfcheck.batch/2`` JSON document."""
    from dxfcheck.output.text import CAUTION

    return {
        "schema": BATCH_SCHEMA,
        "counts": batch.counts(),
        "interrupted": batch.interrupted,
        "signal": batch.signal,
        "cache_records_rejected": batch.cache_rejected,
        "skipped": [asdict(s) for s in batch.skipped],
        "notes": list(batch.notes),
        "results": [{**asdict(r), "failed_rules": list(r.failed_rules)} for r in batch.results],
        "caution": CAUTION,
    }
