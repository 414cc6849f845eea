"""A drawing's committed revision, read from git for the ``compare`` hook.

``git show REV:./NAME``, run in the drawing's folder, writes the committed
bytes of the drawing (and of its own file ``NAME.toml``, where one was
committed) into a folder of the caller's, under the same names, so that the
copy is compared with the working file as ``compare OLD NEW``.
"""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

from dxfcheck.core.errors import ConfigError

__all__ = ["GIT_TIMEOUT_S", "committed_copy"]

#: Longest a ``git show`` may take [s]: a local object read, even of a big drawing.
GIT_TIMEOUT_S = 120.0


def _git() -> str:
    git = shutil.which("git")
    if git is None:
        raise ConfigError("the compare hook needs git on the PATH")
    return git


def _show(drawing: Path, rev: str, name: str, out: Path) -> bool:
    """Write ``rev:./name`` (relative to the drawing's folder) to ``out``;
    False when the file is not in that revision.

    Raises
    ------
    ConfigError
        When git cannot read the revision (not a repository, no such revision).
    """
    with open(out, "wb") as fh:
        try:
            done = subprocess.run(
                [_git(), "show", f"{rev}:./{name}"],
                cwd=drawing.parent,
                stdout=fh,
                stderr=subprocess.PIPE,
                timeout=GIT_TIMEOUT_S,
                check=False,
            )
        except (OSError, subprocess.TimeoutExpired) as exc:
            raise ConfigError(f"git show {rev}:./{name} did not run: {exc}", path=str(drawing)) from exc
    if done.returncode == 0:
        return True
    out.unlink()
    message = done.stderr.decode("utf-8", "replace").strip()
    if "exists on disk, but not in" in message or "does not exist in" in message:
        return False
    raise ConfigError(
        f"git cannot read {rev}:./{name}: {message.splitlines()[0] if message else 'failed'}", path=str(drawing)
    )


def committed_copy(drawing: Path, rev: str, into: Path) -> Path | None:
    """The drawing as committed in ``rev``, written to ``into/NAME`` (with its
    own file ``NAME.toml`` beside it if that was committed too); None when
    the drawing is new (not in ``rev``).

    Raises
    ------
    ConfigError
        When git is missing, the folder is not in a repository, or ``rev``
        does not exist.
    """
    if rev.startswith("-"):
        raise ConfigError(f"--rev {rev!r} is not a revision")
    copy = into / drawing.name
    if not _show(drawing, rev, drawing.name, copy):
        return None
    sidecar = drawing.with_suffix(".toml")
    if sidecar != drawing:
        _show(drawing, rev, sidecar.name, into / sidecar.name)
    return copy
