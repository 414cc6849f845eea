"""Writing outputs safely: never a half-written file, never the input, only
where the user meant.

Every output file goes to a temporary file in the destination folder first
and is then moved into place with :func:`os.replace` (atomic on POSIX and
Windows), so an interrupted run leaves either the old file or the new one.

* A target is checked before anything is written (:func:`check_targets`
  checks all of a command's targets, and refuses two outputs to one path):
  it may be a new path or a regular file (replaced only with ``force``),
  never the input drawing, a folder, a symbolic link, a device, a FIFO or a
  socket.  ``-`` is standard output, for text outputs only.
* A new file gets the permissions the user's umask gives (``0666 & ~umask``);
  a replaced file keeps its mode.
* A temporary file is removed on an error, on Ctrl-C and on SIGTERM/SIGHUP
  (a handler removes it, then the signal ends the run as before).
* A write that fails (a full disk, a closed standard output) is an
  :class:`~dxfcheck.core.errors.OutputError` naming the output; a closed pipe
  (``| head``) ends the report quietly (:func:`guarded_streams`).
* Every DXF dxfcheck writes carries a marker (:data:`MARKER`), which
  :func:`is_dxfcheck_output` finds in the file's first bytes, so that batch
  and compare never check an output as a drawing.
"""

from __future__ import annotations

import contextlib
import os
import re
import signal
import stat
import sys
import threading
from collections.abc import Iterable, Iterator
from pathlib import Path
from typing import Any

from dxfcheck.core.errors import ConfigError, OutputError
from dxfcheck.core.records import record
from dxfcheck.core.textsafe import degrade_stream

__all__ = [
    "MARKER",
    "STDOUT",
    "GuardedStream",
    "Target",
    "atomic_target",
    "check_target",
    "check_targets",
    "guarded_streams",
    "is_dxfcheck_output",
    "write_atomic",
]

#: The path that means standard output (text outputs only).
STDOUT = "-"
#: Name of the marker every DXF dxfcheck writes carries: a ``999`` comment
#: on the first line of an ASCII file (``999`` / ``DXFCHECK_OUTPUT 0.1.0``),
#: a header custom property (R2004 and later) or an APPID table entry (R12,
#: R2000) in a binary one.
MARKER = "DXFCHECK_OUTPUT"
#: Bytes read from the start of a file to look for the marker: the first
#: line of an ASCII file; the header (and, in a binary R12/R2000 file, the
#: tables up to APPID) of a binary one.
MARKER_SCAN_BYTES = 1 << 16
MARKER_SCAN_BYTES_BINARY = 1 << 20
_MARKER_PATTERNS = (
    re.compile(rb"\A(?:\xef\xbb\xbf)?\s*999\r?\n" + MARKER.encode() + rb"\b"),
    re.compile(rb"\$CUSTOMPROPERTYTAG(?:\s+1\r?\n|\x00\x01\x00?)" + MARKER.encode() + rb"[\r\n\x00]"),
    re.compile(rb"\x02\x00?" + MARKER.encode() + rb"\x00"),  # binary APPID name (group code 2)
)
_BINARY_SENTINEL = b"AutoCAD Binary DXF"
#: Signals whose default action kills the run; a temporary file is removed
#: first.
_CLEANUP_SIGNALS = ("SIGTERM", "SIGHUP")


@record(frozen=True)
class Target:
    """One output of a command.

    Attributes
    ----------
    path : path-like or None
        The destination (None: this output was not asked for).
    force : bool
        An existing regular file may be replaced.
    text : bool
        A text output, which may go to standard output (``-``).
    """

    path: str | os.PathLike[str] | None
    force: bool = False
    text: bool = False


def _kind(mode: int) -> str | None:
    """What a non-regular file is, or None for a regular file."""
    for test, name in (
        (stat.S_ISLNK, "a symbolic link"),
        (stat.S_ISDIR, "a folder"),
        (stat.S_ISFIFO, "a FIFO (named pipe)"),
        (stat.S_ISCHR, "a character device"),
        (stat.S_ISBLK, "a block device"),
        (stat.S_ISSOCK, "a socket"),
    ):
        if test(mode):
            return name
    return None if stat.S_ISREG(mode) else "not a regular file"


def check_target(
    path: str | os.PathLike[str],
    *,
    force: bool,
    protect: tuple[str | os.PathLike[str], ...] = (),
    text: bool = False,
) -> None:
    """Raise :class:`ConfigError` when ``path`` may not be written.

    Refused: ``-`` unless ``text``; a path ending in a slash; a missing or
    unwritable folder; the input drawing (``protect``, also through a hard
    link); a symbolic link, folder, device, FIFO or socket (each named); an
    existing file unless ``force``.  Nothing is opened or written."""
    name = os.fspath(path)
    if name == STDOUT:
        if not text:
            raise ConfigError("'-' (standard output) is only for text outputs such as --junit or --svg; name a file")
        return
    if not name or name.endswith(("/", os.sep)) or (os.altsep and name.endswith(os.altsep)):
        raise ConfigError("names a folder; name an output file inside it", path=name)
    dest = Path(name)
    try:
        st = os.lstat(dest)
    except FileNotFoundError:
        st = None
    except OSError as exc:
        raise ConfigError(f"cannot be checked ({exc.strerror})", path=name) from exc
    if st is not None and stat.S_ISLNK(st.st_mode):
        try:
            to = f" to {os.readlink(dest)}"
        except OSError:
            to = ""
        raise ConfigError(
            f"is a symbolic link{to}; name the file itself (dxfcheck does not write through links)", path=name
        )
    for p in protect:
        if st is not None and os.path.exists(p) and os.path.samefile(dest, p):
            raise ConfigError("refusing to overwrite the input drawing; choose another output name", path=name)
    if st is not None:
        kind = _kind(st.st_mode)
        if kind is not None:
            advice = (
                "name an output file inside it" if stat.S_ISDIR(st.st_mode) else "dxfcheck writes only regular files"
            )
            raise ConfigError(f"is {kind}; {advice}", path=name)
        if not force:
            raise ConfigError("exists; pass --force to replace it", path=name)
    folder = dest.parent
    if not folder.is_dir():
        raise ConfigError(f"cannot be written: the folder {folder} does not exist", path=name)
    if not os.access(folder, os.W_OK | os.X_OK):
        raise ConfigError(f"cannot be written: no permission to write in {folder}", path=name)


def _identity(path: str | os.PathLike[str]) -> str:
    name = os.fspath(path)
    if name == STDOUT:
        return STDOUT
    return os.path.normcase(os.path.realpath(name))


def check_targets(targets: Iterable[Target], *, protect: tuple[str | os.PathLike[str], ...] = ()) -> None:
    """Check every output of a command before anything is written: each as
    :func:`check_target` does, and no two of them to the same file (the same
    path resolved, a hard link, or standard output twice)."""
    seen: dict[str, str] = {}
    for t in targets:
        if t.path is None:
            continue
        check_target(t.path, force=t.force, protect=protect, text=t.text)
        key = _identity(t.path)
        name = os.fspath(t.path)
        if key in seen:
            where = "standard output" if key == STDOUT else key
            raise ConfigError(f"two outputs go to {where} ({seen[key]} and {name}); name each output differently")
        for other_key, other in seen.items():
            if STDOUT not in (key, other_key) and _same_file(key, other_key):
                raise ConfigError(f"two outputs go to the same file ({other} and {name}, hard links)")
        seen[key] = name


def _same_file(a: str, b: str) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:  # one of them does not exist yet
        return False


def write_atomic(
    path: str | os.PathLike[str],
    data: bytes | str,
    *,
    force: bool = True,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> Path:
    """Write ``data`` to ``path`` atomically (``-``: text to standard output).

    Parameters
    ----------
    path : path-like
        Destination.
    data : bytes or str
        Content (str is written as UTF-8).
    force : bool
        Replace an existing regular file; when False an existing file is an
        error.
    protect : tuple of path-like
        Files that must never be overwritten (the input drawing).

    Raises
    ------
    ConfigError
        When the destination may not be written (see :func:`check_target`).
    OutputError
        When writing fails (a full disk, a lost folder).
    """
    if os.fspath(path) == STDOUT:
        check_target(path, force=force, protect=protect, text=isinstance(data, str))
        sys.stdout.write(data if isinstance(data, str) else "")  # check_target refused bytes
        sys.stdout.flush()
        return Path(STDOUT)
    payload = data.encode("utf-8") if isinstance(data, str) else data
    with atomic_target(path, force=force, protect=protect) as tmp, open(tmp, "wb") as fh:
        fh.write(payload)
        fh.flush()
        os.fsync(fh.fileno())
    return Path(path)


# -- temporary files, removed on errors and on signals ------------------------------------

_LIVE: set[str] = set()
_PREVIOUS: dict[int, Any] = {}


def _on_signal(signum: int, frame: Any) -> None:
    previous = _PREVIOUS.get(signum, signal.SIG_DFL)
    if callable(previous):  # someone else's handler decides; the finally below removes the file
        previous(signum, frame)
        return
    for tmp in list(_LIVE):
        with contextlib.suppress(OSError):
            os.unlink(tmp)
    _LIVE.clear()
    signal.signal(signum, signal.SIG_DFL)
    os.kill(os.getpid(), signum)  # end the run as the signal would have


def _guard_signals() -> None:
    if threading.current_thread() is not threading.main_thread():
        return
    for name in _CLEANUP_SIGNALS:
        signum = getattr(signal, name, None)
        if signum is None or signum in _PREVIOUS:
            continue
        current = signal.getsignal(signum)
        if current is signal.SIG_IGN or current is None:
            continue
        _PREVIOUS[signum] = current
        signal.signal(signum, _on_signal)


def _release_signals() -> None:
    if _LIVE or threading.current_thread() is not threading.main_thread():
        return
    for signum, previous in list(_PREVIOUS.items()):
        if signal.getsignal(signum) is _on_signal:
            signal.signal(signum, previous)
        del _PREVIOUS[signum]


def _new_temp(dest: Path, claimed: set[str]) -> str:
    """Create an empty temporary file beside ``dest``, with the permissions
    the umask gives (``0666 & ~umask``, as any new file).  Each name is put
    in ``claimed`` (and in the signal handler's list) *before* the file is
    created, so that a signal arriving at any moment leaves nothing behind:
    the caller removes whatever ``claimed`` holds."""
    folder = dest.parent if str(dest.parent) else Path(".")
    flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_NOFOLLOW", 0)
    for _ in range(100):
        tmp = str(folder / f".{dest.name}.{os.urandom(4).hex()}.tmp")
        claimed.add(tmp)
        _LIVE.add(tmp)
        try:
            fd = os.open(tmp, flags, 0o666)
        except FileExistsError:
            claimed.discard(tmp)  # someone else's file: never ours to remove
            _LIVE.discard(tmp)
            continue
        except OSError as exc:
            raise OutputError(f"cannot write here: {exc.strerror}", path=str(dest)) from exc
        os.close(fd)
        return tmp
    raise OutputError("cannot make a temporary file beside it", path=str(dest))


@contextlib.contextmanager
def atomic_target(
    path: str | os.PathLike[str],
    *,
    force: bool = True,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> Iterator[str]:
    """Yield a temporary file name beside ``path``; when the block ends
    without an exception the file is moved onto ``path`` (keeping the mode
    of a file it replaces), otherwise it is deleted.  Same checks as
    :func:`write_atomic`; a failed write (:class:`OSError`) becomes an
    :class:`OutputError` naming ``path``."""
    dest = Path(path)
    check_target(dest, force=force, protect=protect)
    _guard_signals()
    claimed: set[str] = set()
    try:
        tmp = _new_temp(dest, claimed)
        try:
            yield tmp
            with contextlib.suppress(FileNotFoundError):
                os.chmod(tmp, stat.S_IMODE(os.stat(dest).st_mode))  # a replaced file keeps its mode
            os.replace(tmp, dest)
        except OSError as exc:
            raise OutputError(
                f"cannot be written ({exc.strerror or exc}); nothing was changed", path=str(dest)
            ) from exc
    finally:
        for name in claimed:
            _LIVE.discard(name)
            if os.path.lexists(name):
                with contextlib.suppress(OSError):
                    os.unlink(name)
        _release_signals()


# -- the marker of dxfcheck's own outputs ---------------------------------------------------


def is_dxfcheck_output(path: str | os.PathLike[str]) -> bool:
    """True when ``path`` is a DXF file dxfcheck wrote (it carries
    :data:`MARKER`).  Reads at most the first :data:`MARKER_SCAN_BYTES` of an
    ASCII file, :data:`MARKER_SCAN_BYTES_BINARY` of a binary one; a file that
    is not regular or cannot be read is not an output."""
    try:
        if not stat.S_ISREG(os.stat(path).st_mode):
            return False
        with open(path, "rb") as fh:
            head = fh.read(MARKER_SCAN_BYTES)
            if head.startswith(_BINARY_SENTINEL):
                head += fh.read(MARKER_SCAN_BYTES_BINARY - len(head))
    except OSError:
        return False
    return bool(_MARKER_PATTERNS[0].match(head)) or any(p.search(head) for p in _MARKER_PATTERNS[1:])


# -- standard output and error --------------------------------------------------------------


class GuardedStream:
    """Standard output or error as dxfcheck writes it.

    A closed pipe (``dxfcheck solve x | head -1``) silences the stream: the
    run goes on and ends with its own exit code.  Any other failed write (a
    full disk, a closed descriptor) raises :class:`OutputError` naming the
    stream when ``raise_errors`` (standard output), else silences it
    (standard error: there is nowhere left to say so).  A silenced stream's
    descriptor is pointed at the null device, so that the interpreter's last
    flush succeeds too.
    """

    def __init__(self, stream: Any, name: str, *, raise_errors: bool) -> None:
        self._stream = stream
        self._name = name
        self._raise = raise_errors
        self.silenced = stream is None and not raise_errors
        self.failed: OSError | None = None

    def _silence(self) -> None:
        self.silenced = True
        with contextlib.suppress(AttributeError, OSError, ValueError):
            null = os.open(os.devnull, os.O_WRONLY)
            try:
                os.dup2(null, self._stream.fileno())
            finally:
                os.close(null)

    def _failed(self, exc: OSError) -> None:
        self._silence()
        if isinstance(exc, BrokenPipeError) or not self._raise:
            return
        self.failed = exc
        raise OutputError(f"cannot write the report ({exc.strerror or exc})", path=self._name) from exc

    def _closed(self) -> None:
        if self._raise:
            raise OutputError("is closed; cannot write the report", path=self._name)

    def write(self, text: str) -> int:
        if self.silenced:
            return len(text)
        if self._stream is None:
            self._closed()
            return len(text)
        try:
            return int(self._stream.write(text))
        except OSError as exc:
            self._failed(exc)
            return len(text)

    def flush(self) -> None:
        if self.silenced or self._stream is None:
            return
        try:
            self._stream.flush()
        except OSError as exc:
            self._failed(exc)

    def isatty(self) -> bool:
        return bool(self._stream is not None and not self.silenced and self._stream.isatty())

    @property
    def encoding(self) -> str:
        return str(getattr(self._stream, "encoding", None) or "utf-8")

    def __getattr__(self, name: str) -> Any:
        if self._stream is None:
            raise AttributeError(name)
        return getattr(self._stream, name)


def _occupy(fd: int) -> None:
    """Point a closed descriptor 0-2 at the null device, so that a file the
    run opens never becomes standard output by accident."""
    try:
        os.fstat(fd)
    except OSError:
        with contextlib.suppress(OSError):
            null = os.open(os.devnull, os.O_RDWR)
            if null != fd:
                os.dup2(null, fd)
                os.close(null)


@contextlib.contextmanager
def guarded_streams() -> Iterator[GuardedStream]:
    """Run a command with standard output and error guarded (see
    :class:`GuardedStream`) and degraded to ASCII stand-ins where their
    encoding cannot show a symbol; yields the guarded standard output.  The
    streams are restored afterwards."""

    for fd in (1, 2):
        _occupy(fd)
    out, err = sys.stdout, sys.stderr
    for s in (out, err):
        if s is not None:
            degrade_stream(s)
    g_out = GuardedStream(out, "standard output", raise_errors=True)
    g_err = GuardedStream(err, "standard error", raise_errors=False)
    sys.stdout, sys.stderr = g_out, g_err
    try:
        yield g_out
    finally:
        sys.stdout, sys.stderr = out, err
