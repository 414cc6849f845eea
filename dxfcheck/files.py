"""Writing output files safely: never a half-written file, never the input.

Every output goes to a temporary file in the destination folder first and is
then moved into place with :func:`os.replace` (atomic on POSIX and Windows),
so an interrupted run leaves either the old file or the new one.
"""

from __future__ import annotations

import contextlib
import os
import tempfile
from collections.abc import Iterator
from pathlib import Path

from dxfcheck.errors import ConfigError

__all__ = ["atomic_target", "check_target", "write_atomic"]


def write_atomic(
    path: str | os.PathLike[str],
    data: bytes | str,
    *,
    force: bool = True,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> Path:
    """Write ``data`` to ``path`` atomically.

    Parameters
    ----------
    path : path-like
        Destination.
    data : bytes or str
        Content (str is written as UTF-8).
    force : bool
        Replace an existing file; when False an existing file is an error.
    protect : tuple of path-like
        Files that must never be overwritten (the input drawing).

    Raises
    ------
    ConfigError
        When the destination exists and ``force`` is False, is a protected
        file, or cannot be written.
    """
    payload = data.encode("utf-8") if isinstance(data, str) else data
    with atomic_target(path, force=force, protect=protect) as tmp, open(tmp, "wb") as fh:
        fh.write(payload)
        fh.flush()
        os.fsync(fh.fileno())
    return Path(path)


def check_target(
    path: str | os.PathLike[str], *, force: bool, protect: tuple[str | os.PathLike[str], ...] = ()
) -> None:
    """Raise :class:`ConfigError` when ``path`` may not be written: it is a
    protected file (the input), a folder, or exists and ``force`` is False."""
    dest = Path(path)
    for p in protect:
        if dest.exists() and Path(p).exists() and dest.resolve() == Path(p).resolve():
            raise ConfigError("refusing to overwrite the input drawing; choose another output name", path=str(dest))
    if dest.is_dir():
        raise ConfigError("is a folder; name an output file", path=str(dest))
    if dest.exists() and not force:
        raise ConfigError("exists; pass --force to replace it", path=str(dest))


@contextlib.contextmanager
def atomic_target(
    path: str | os.PathLike[str],
    *,
    force: bool = True,
    protect: tuple[str | os.PathLike[str], ...] = (),
) -> Iterator[str]:
    """Yield a temporary file name beside ``path``; when the block ends
    without an exception the file is moved onto ``path``, otherwise it is
    deleted.  Same checks as :func:`write_atomic`."""
    dest = Path(path)
    check_target(dest, force=force, protect=protect)
    folder = dest.parent if str(dest.parent) else Path(".")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise ConfigError(f"cannot write here: {exc.strerror}", path=str(dest)) from exc
    os.close(fd)
    try:
        yield tmp
        os.replace(tmp, dest)
    finally:
        if os.path.exists(tmp):
            os.unlink(tmp)
