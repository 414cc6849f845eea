"""Project configuration: ``dxfcheck.toml``, ``[tool.dxfcheck]`` in
``pyproject.toml``, and the drawing's own file.

The project file is named with ``--config FILE`` or, failing that, found in
the drawing's folder or a parent folder: a ``dxfcheck.toml``, or else a
``pyproject.toml`` that holds a ``[tool.dxfcheck]`` table (the same keys,
one level down, as linters and test runners read theirs).  Where one folder
holds both, ``dxfcheck.toml`` is the project file and the table is not read.
The search stops at the first folder that is a repository root (holds
``.git``), holds a ``pyproject.toml`` (with or without the table), or is the
user's home folder; it never reads a folder that other users can write to (a
shared ``/tmp``), so a file planted there cannot change the layer map.  Its
``[layers]`` table maps each layer role to a list of layer names (matched
case-insensitively)::

    [layers]                      # [tool.dxfcheck.layers] in pyproject.toml
    pivot = ["BRK-FIXED", "PIVOT"]
    link = ["BRK-CL"]

The drawing's own file ``NAME.toml`` beside ``NAME.dxf`` (the sidecar) may
hold the same tables; every command reads it: its ``[layers]`` roles and
``[markup]`` keys replace the project file's for this drawing, and its
``[spec]`` sits above the project file's (:mod:`dxfcheck.gate.spec`).

Both are read within :data:`MAX_FILE_BYTES`; a FIFO, a device or a folder is
refused before it is opened.  Unknown tables and keys are rejected, naming
the key and the file.
"""

from __future__ import annotations

import enum
import json
import os
import stat
import tomllib
from collections.abc import Sequence
from dataclasses import field, replace
from pathlib import Path
from typing import Any

from dxfcheck.core.errors import ConfigError
from dxfcheck.core.records import record

__all__ = [
    "CONFIG_NAME",
    "DEFAULT_LAYERS",
    "MAX_FILE_BYTES",
    "PYPROJECT_NAME",
    "SKELETON_SOURCES",
    "Config",
    "InferSettings",
    "Role",
    "config_for_drawing",
    "find_config",
    "load_config",
    "read_toml",
    "sidecar_of",
    "table_name",
    "toml_layers_line",
]

CONFIG_NAME = "dxfcheck.toml"
#: A Python project's file; its ``[tool.dxfcheck]`` table is a project file.
PYPROJECT_NAME = "pyproject.toml"
#: Where dxfcheck's keys sit in a ``pyproject.toml``.
TOOL_TABLE = ("tool", "dxfcheck")
_TOOL_TABLE_NAME = f"[{'.'.join(TOOL_TABLE)}]"
#: Largest project file or sidecar read [bytes]: a real one is a few kB.
MAX_FILE_BYTES = 1_000_000
#: Files whose folder ends the search for a project file (a repository root
#: or a Python project).
PROJECT_ROOT_MARKERS = (".git", "pyproject.toml")


class Role(enum.StrEnum):
    """What the entities on a layer stand for (see the README's convention)."""

    PIVOT = "pivot"
    PIN = "pin"
    LINK = "link"
    DRUM = "drum"
    SHOE = "shoe"
    LOAD = "load"
    LABEL = "label"
    BAND = "band"
    SPRING = "spring"


#: Default layer name of each role.
DEFAULT_LAYERS: dict[Role, tuple[str, ...]] = {role: (role.value.upper(),) for role in Role}

_TOP_LEVEL = {"layers", "spec", "markup", "infer"}

#: Where the skeleton comes from: ``auto`` (the role layers when they hold a
#: skeleton, else the geometry), ``layers`` or ``geometry``.
SKELETON_SOURCES = ("auto", "layers", "geometry")
#: Default layers whose entities are the frame when the skeleton is inferred.
DEFAULT_FRAME_LAYERS = ("FRAME",)
_INFER_LISTS = ("frame_layers", "frame_blocks", "centre_layers", "outline_layers", "ignore_layers")


@record(frozen=True)
class InferSettings:
    """The ``[infer]`` table: how a skeleton is inferred from a drafted
    drawing (see :mod:`dxfcheck.infer`).

    Attributes
    ----------
    skeleton_from : str
        One of :data:`SKELETON_SOURCES` (``--skeleton-from`` overrides it).
    frame_layers, frame_blocks : tuple of str
        Layers and block names (upper case) whose geometry is the frame.
    centre_layers : tuple of str
        Layers whose lines are centre lines, whatever their linetype.
    outline_layers : tuple of str
        Layers of part outlines; empty: every continuous line may be one.
    ignore_layers : tuple of str
        Layers never read for the skeleton (hidden lines, dimensions...).
    """

    skeleton_from: str = "auto"
    frame_layers: tuple[str, ...] = DEFAULT_FRAME_LAYERS
    frame_blocks: tuple[str, ...] = ()
    centre_layers: tuple[str, ...] = ()
    outline_layers: tuple[str, ...] = ()
    ignore_layers: tuple[str, ...] = ()


#: Default names of the layers dxfcheck writes in a marked-up copy.
DEFAULT_FORCE_LAYER = "DXFCHECK_FORCES"
DEFAULT_NOTE_LAYER = "DXFCHECK_NOTES"
_MARKUP_KEYS = {"force_layer", "note_layer"}


@record(frozen=True)
class Config:
    """Settings read from a project file (or the defaults).

    Attributes
    ----------
    layers : dict
        Role -> layer names (upper case).
    path : str or None
        The project file the settings came from, or None for the defaults.
    spec : dict
        The raw ``[spec]`` table, checked by :mod:`dxfcheck.gate.spec`.
    force_layer, note_layer : str
        Layers of a marked-up copy (``[markup]`` table).
    sidecar : str or None
        The drawing's own file ``NAME.toml``, if one was read (its
        ``[spec]`` is read by :mod:`dxfcheck.gate.spec`).
    sidecar_layers : bool
        Whether the sidecar's ``[layers]`` changed the layer map.
    infer : InferSettings
        The ``[infer]`` table (skeleton inferred from the geometry).
    """

    layers: dict[Role, tuple[str, ...]] = field(default_factory=lambda: dict(DEFAULT_LAYERS))
    path: str | None = None
    spec: dict[str, Any] = field(default_factory=dict)
    force_layer: str = DEFAULT_FORCE_LAYER
    note_layer: str = DEFAULT_NOTE_LAYER
    sidecar: str | None = None
    sidecar_layers: bool = False
    infer: InferSettings = field(default_factory=InferSettings)

    @property
    def layers_source(self) -> str | None:
        """Where the layer map came from: the project file, the sidecar,
        both (``"A + B"``), or None for the built-in names."""
        named = [f for f in (self.path, self.sidecar if self.sidecar_layers else None) if f]
        return " + ".join(named) or None

    def role_of_layer(self) -> dict[str, Role]:
        """Upper-case layer name -> role."""
        out: dict[str, Role] = {}
        for role, names in self.layers.items():
            for name in names:
                out[name.upper()] = role
        return out


def table_name(path: str | os.PathLike[str] | None, table: str) -> str:
    """How a table of the project file at ``path`` is written:
    ``[layers]``, or ``[tool.dxfcheck.layers]`` in a ``pyproject.toml``."""
    if path is not None and Path(path).name == PYPROJECT_NAME:
        return f"[{'.'.join(TOOL_TABLE)}.{table}]"
    return f"[{table}]"


def toml_layers_line(role: Role, names: Sequence[str]) -> str:
    """The line of the ``[layers]`` table that maps ``role`` to ``names``,
    as :func:`load_config` reads it, e.g. ``pin = ["PIN", "PINS"]``."""
    return f"{role.value} = [{', '.join(json.dumps(n, ensure_ascii=False) for n in names)}]"


def _others_can_write(folder: Path) -> bool:
    try:
        return bool(folder.stat().st_mode & stat.S_IWOTH)
    except OSError:
        return True  # a folder that cannot be looked at is not trusted either


def _home() -> Path | None:
    try:
        return Path.home().resolve()
    except (RuntimeError, KeyError, OSError):
        return None


def _tool_table(data: dict[str, Any], spath: str) -> dict[str, Any] | None:
    """A ``pyproject.toml``'s ``[tool.dxfcheck]`` table, or None."""
    tool = data.get(TOOL_TABLE[0])
    table = tool.get(TOOL_TABLE[1]) if isinstance(tool, dict) else None
    if table is not None and not isinstance(table, dict):
        raise ConfigError(f"{_TOOL_TABLE_NAME} must be a table", path=spath)
    return table


def _has_tool_table(pyproject: Path) -> bool:
    """Whether a ``pyproject.toml`` holds ``[tool.dxfcheck]`` (it is read,
    within the same bounds as a project file: a broken one is refused,
    naming it, since it may hold the layer map)."""
    return _tool_table(read_toml(pyproject, f"the {PYPROJECT_NAME}"), str(pyproject)) is not None


def find_config(drawing: Path) -> Path | None:
    """The nearest project file in the drawing's folder or its parents: a
    ``dxfcheck.toml``, or else a ``pyproject.toml`` with ``[tool.dxfcheck]``
    (in one folder, ``dxfcheck.toml`` wins).

    The search stops after the first folder that is a repository root
    (``.git``), holds a ``pyproject.toml`` or is the user's home folder, and
    at the first folder other users can write to (which is not searched)."""
    folder = drawing.resolve().parent
    home = _home()
    for candidate in (folder, *folder.parents):
        if _others_can_write(candidate):
            return None
        p = candidate / CONFIG_NAME
        if os.path.lexists(p):
            return p  # read_toml refuses what is not a regular file, naming it
        pyproject = candidate / PYPROJECT_NAME
        if os.path.lexists(pyproject) and _has_tool_table(pyproject):
            return pyproject
        if candidate == home or any(os.path.lexists(candidate / m) for m in PROJECT_ROOT_MARKERS):
            return None
    return None


def sidecar_of(drawing: Path) -> Path | None:
    """The drawing's own file ``NAME.toml`` beside it, if there is one
    (never a ``pyproject.toml``: that is the project's file).

    Raises
    ------
    ConfigError
        When it lies in a folder others can write to and belongs to another
        user than the drawing (it may have been planted there).
    """
    side = drawing.with_suffix(".toml")
    if side == drawing or side.name == PYPROJECT_NAME or not os.path.lexists(side):
        return None  # a drawing named pyproject.dxf has no own file: that one is the Python project's
    if _others_can_write(side.parent):
        try:
            foreign = side.lstat().st_uid != drawing.stat().st_uid
        except OSError:
            foreign = True
        if foreign:
            raise ConfigError(
                "is in a folder others can write to and belongs to another user than the drawing; it is not read. "
                "Move the drawing and its file into a folder of your own",
                path=str(side),
            )
    return side


def read_toml(path: Path, what: str) -> dict[str, Any]:
    """Read a TOML file of at most :data:`MAX_FILE_BYTES`.

    A FIFO, a device, a socket or a folder is refused before it is opened
    (and the file is opened without blocking, in case it changes in
    between).

    Raises
    ------
    ConfigError
        Naming the file and ``what`` it is (``"the project file"``...).
    """
    spath = str(path)
    try:
        st = os.stat(path)
    except OSError as exc:
        raise ConfigError(f"cannot read {what}: {exc.strerror}", path=spath) from exc
    if not stat.S_ISREG(st.st_mode):
        kind = "a folder" if stat.S_ISDIR(st.st_mode) else "not a regular file (a FIFO, device or socket)"
        raise ConfigError(f"{what} is {kind}; name a .toml file", path=spath)
    try:
        fd = os.open(path, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
        with os.fdopen(fd, "rb") as fh:
            if not stat.S_ISREG(os.fstat(fh.fileno()).st_mode):
                raise ConfigError(f"{what} is not a regular file (a FIFO, device or socket)", path=spath)
            data = fh.read(MAX_FILE_BYTES + 1)
    except OSError as exc:
        raise ConfigError(f"cannot read {what}: {exc.strerror}", path=spath) from exc
    if len(data) > MAX_FILE_BYTES:
        raise ConfigError(f"{what} is larger than {MAX_FILE_BYTES / 1e6:g} MB; is it the right file?", path=spath)
    try:
        return tomllib.loads(data.decode("utf-8"))
    except UnicodeDecodeError as exc:
        raise ConfigError(f"{what} is not UTF-8 text (byte {exc.start})", path=spath) from exc
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"{what} is not valid TOML: {exc}", path=spath) from exc
    except (ValueError, RecursionError) as exc:  # an integer of thousands of digits, arrays nested too deep
        raise ConfigError(f"{what} cannot be read as TOML ({_short(exc)})", path=spath) from exc


def _short(exc: BaseException) -> str:
    text = str(exc).split(";")[0]
    return text if len(text) <= 120 else text[:117] + "..."


def _parse_layers(raw: Any, path: str, base: dict[Role, tuple[str, ...]]) -> dict[Role, tuple[str, ...]]:
    """``base`` with the roles of a ``[layers]`` table replaced."""
    t = table_name(path, "layers")
    if not isinstance(raw, dict):
        raise ConfigError(f"{t} must be a table", path=path)
    layers = dict(base)
    roles = {r.value: r for r in Role}
    for key, value in raw.items():
        if key not in roles:
            raise ConfigError(f"{t} has an unknown role {key!r} (roles: {', '.join(roles)})", path=path)
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
            raise ConfigError(f"{t} {key} must be a list of layer names", path=path)
        layers[roles[key]] = tuple(v.upper() for v in value)
    seen: dict[str, Role] = {}
    for role, names in layers.items():
        for n in names:
            if n in seen and seen[n] is not role:
                raise ConfigError(f"{t} layer {n!r} is given two roles ({seen[n]}, {role})", path=path)
            seen[n] = role
    return layers


def _apply(data: dict[str, Any], spath: str, base: Config) -> Config:
    """``base`` with a file's ``[layers]`` and ``[markup]`` applied (its
    ``[spec]`` is checked to be a table, and read by :mod:`dxfcheck.gate.spec`)."""
    unknown = set(data) - _TOP_LEVEL
    if unknown:
        where = f" in {_TOOL_TABLE_NAME}" if Path(spath).name == PYPROJECT_NAME else ""
        raise ConfigError(
            f"unknown table or key {sorted(unknown)[0]!r}{where} (known: {', '.join(sorted(_TOP_LEVEL))})",
            path=spath,
        )
    layers = _parse_layers(data.get("layers", {}), spath, base.layers)
    if not isinstance(data.get("spec", {}), dict):
        raise ConfigError(f"{table_name(spath, 'spec')} must be a table", path=spath)
    markup = data.get("markup", {})
    t = table_name(spath, "markup")
    if not isinstance(markup, dict):
        raise ConfigError(f"{t} must be a table", path=spath)
    for key, value in markup.items():
        if key not in _MARKUP_KEYS:
            raise ConfigError(f"{t} has an unknown key {key!r} (known: {', '.join(sorted(_MARKUP_KEYS))})", path=spath)
        if not isinstance(value, str) or not value.strip():
            raise ConfigError(f"{t} {key} must be a layer name", path=spath)
    skeleton = {n for names in layers.values() for n in names}
    force_layer = markup.get("force_layer", base.force_layer)
    note_layer = markup.get("note_layer", base.note_layer)
    for name in (force_layer, note_layer):
        if name.upper() in skeleton:
            raise ConfigError(f"{t} layer {name!r} is also a skeleton layer", path=spath)
    infer = _parse_infer(data.get("infer", {}), spath, base.infer)
    return replace(base, layers=layers, force_layer=force_layer, note_layer=note_layer, infer=infer)


def _parse_infer(raw: Any, path: str, base: InferSettings) -> InferSettings:
    """``base`` with the keys of an ``[infer]`` table applied."""
    if not isinstance(raw, dict):
        raise ConfigError("[infer] must be a table", path=path)
    out = base
    for key, value in raw.items():
        if key == "skeleton_from":
            if value not in SKELETON_SOURCES:
                raise ConfigError(f"[infer] skeleton_from must be one of {', '.join(SKELETON_SOURCES)}", path=path)
            out = replace(out, skeleton_from=value)
            continue
        if key not in _INFER_LISTS:
            known = ", ".join(("skeleton_from", *_INFER_LISTS))
            raise ConfigError(f"[infer] has an unknown key {key!r} (known: {known})", path=path)
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
            raise ConfigError(f"[infer] {key} must be a list of names", path=path)
        names: dict[str, Any] = {key: tuple(v.upper() for v in value)}
        out = replace(out, **names)
    return out


def load_config(path: Path | None) -> Config:
    """Read a project file (a ``pyproject.toml``: its ``[tool.dxfcheck]``
    table); ``None`` gives the defaults.

    Raises
    ------
    ConfigError
        When the file cannot be read, is not TOML, has unknown keys, or is
        a ``pyproject.toml`` without ``[tool.dxfcheck]``.
    """
    if path is None:
        return Config()
    spath = str(path)
    data = read_toml(path, "the project file")
    if path.name == PYPROJECT_NAME:
        table = _tool_table(data, spath)
        if table is None:
            raise ConfigError(f"has no {_TOOL_TABLE_NAME} table for dxfcheck", path=spath)
        data = table
    cfg = _apply(data, spath, Config())
    return replace(cfg, path=spath, spec=data.get("spec", {}))


def _same_file(a: Path, b: Path) -> bool:
    try:
        return os.path.samefile(a, b)
    except OSError:
        return False


def config_for_drawing(drawing: Path, project: Path | None = None) -> Config:
    """The configuration of one drawing, as every command reads it: the
    project file (``project``, else the one :func:`find_config` finds) with
    the ``[layers]`` and ``[markup]`` of the drawing's own file
    (:func:`sidecar_of`) applied over it.  A sidecar named as the project
    file is read once, as the project file.

    Raises
    ------
    ConfigError
    """
    path = project if project is not None else find_config(drawing)
    cfg = load_config(path)
    side = sidecar_of(drawing)
    if side is None or (path is not None and _same_file(side, path)):
        return cfg
    data = read_toml(side, "the drawing's own file (sidecar)")
    applied = _apply(data, str(side), cfg)
    return replace(applied, sidecar=str(side), sidecar_layers="layers" in data)
