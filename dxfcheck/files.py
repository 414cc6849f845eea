"""Writing output files safely: never a half-written file, never the input.

Every output goes to a temporary file in the destination folder first and is
then moved into place with :func:`os.replace` (atomic on POSIX and Windows),
so an interrupted run leaves either the old file or the new one.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from dxfcheck.errors import ConfigError

__all__ = ["write_atomic"]


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
    dest = Path(path)
    for p in protect:
        if dest.exists() and Path(p).exists() and dest.resolve() == Path(p).resolve():
            raise ConfigError("refusing to overwrite the input drawing; choose another output name", path=str(dest))
    if dest.exists() and not force:
        raise ConfigError("exists; pass --force to replace it", path=str(dest))
    payload = data.encode("utf-8") if isinstance(data, str) else data
    folder = dest.parent if str(dest.parent) else Path(".")
    try:
        fd, tmp = tempfile.mkstemp(prefix=f".{dest.name}.", suffix=".tmp", dir=folder)
    except OSError as exc:
        raise ConfigError(f"cannot write here: {exc.strerror}", path=str(dest)) from exc
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(payload)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, dest)
    except BaseException:
        if os.path.exists(tmp):
            os.unlink(tmp)
        raise
    return dest
