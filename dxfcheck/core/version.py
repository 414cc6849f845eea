"""dxfcheck's version, read once from the installed package's metadata
(``pyproject.toml`` is the one place it is written).

The metadata file is found on ``sys.path`` as :mod:`importlib.metadata`
finds it (the first ``dxfcheck-*.dist-info`` or ``dxfcheck*.egg-info``, in
path order) and its ``Version:`` line read directly: importing
``importlib.metadata`` loads the e-mail, zip and CSV modules, a tenth of
the time of a small drawing's whole command.  Anything unusual falls back
to :mod:`importlib.metadata`."""

from __future__ import annotations

import os
import sys

__all__ = ["__version__"]

#: The distribution's name as it starts its metadata folder's name.
_DIST = "dxfcheck"
#: The metadata file in a metadata folder, by the folder's suffix.
_METADATA = {".dist-info": "METADATA", ".egg-info": "PKG-INFO"}


def _metadata_file() -> str | None:
    """The first metadata file of the distribution on ``sys.path``; None
    when there is none or a path entry is not a folder (a zip file)."""
    for entry in sys.path:
        folder = entry or "."
        if not os.path.isdir(folder):
            if os.path.exists(folder):
                return None  # a zip or another finder's entry: ask importlib.metadata
            continue
        try:
            names = sorted(os.listdir(folder))
        except OSError:
            continue
        for name in names:
            stem, dot, _ = name.partition("-")
            for suffix, meta in _METADATA.items():
                if name.endswith(suffix) and (stem if dot else name.removesuffix(suffix)).lower() == _DIST:
                    return os.path.join(folder, name, meta)
    return None


def _read_version() -> str | None:
    path = _metadata_file()
    if path is None:
        return None
    try:
        with open(path, encoding="utf-8") as fh:
            for line in fh:
                if line.startswith("Version:"):
                    return line.partition(":")[2].strip()
                if not line.strip():
                    break  # the headers end at the first blank line
    except OSError:
        return None
    return None


def _version() -> str:
    found = _read_version()
    if found:
        return found
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version(_DIST)
    except PackageNotFoundError:  # run from a source tree that was never installed
        return "0+unknown"


__version__ = _version()
