"""Project configuration: ``dxfcheck.toml``.

The file is found with ``--config FILE`` or, failing that, as
``dxfcheck.toml`` in the drawing's folder or the nearest parent folder that
has one.  Its ``[layers]`` table maps each layer role to a list of layer
names (matched case-insensitively)::

    [layers]
    pivot = ["BRK-FIXED", "PIVOT"]
    link = ["BRK-CL"]

Unknown tables and keys are rejected, naming the key and the file.
"""

from __future__ import annotations

import enum
import json
import tomllib
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from dxfcheck.errors import ConfigError

__all__ = ["CONFIG_NAME", "DEFAULT_LAYERS", "Config", "Role", "find_config", "load_config", "toml_layers_line"]

CONFIG_NAME = "dxfcheck.toml"


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

_TOP_LEVEL = {"layers", "spec", "markup"}

#: Default names of the layers dxfcheck writes in a marked-up copy.
DEFAULT_FORCE_LAYER = "DXFCHECK_FORCES"
DEFAULT_NOTE_LAYER = "DXFCHECK_NOTES"
_MARKUP_KEYS = {"force_layer", "note_layer"}


@dataclass(frozen=True)
class Config:
    """Settings read from a project file (or the defaults).

    Attributes
    ----------
    layers : dict
        Role -> layer names (upper case).
    path : str or None
        The file the settings came from, or None for the defaults.
    spec : dict
        The raw ``[spec]`` table, checked by :mod:`dxfcheck.spec`.
    force_layer, note_layer : str
        Layers of a marked-up copy (``[markup]`` table).
    """

    layers: dict[Role, tuple[str, ...]] = field(default_factory=lambda: dict(DEFAULT_LAYERS))
    path: str | None = None
    spec: dict[str, Any] = field(default_factory=dict)
    force_layer: str = DEFAULT_FORCE_LAYER
    note_layer: str = DEFAULT_NOTE_LAYER

    def role_of_layer(self) -> dict[str, Role]:
        """Upper-case layer name -> role."""
        out: dict[str, Role] = {}
        for role, names in self.layers.items():
            for name in names:
                out[name.upper()] = role
        return out


def toml_layers_line(role: Role, names: Sequence[str]) -> str:
    """The line of the ``[layers]`` table that maps ``role`` to ``names``,
    as :func:`load_config` reads it, e.g. ``pin = ["PIN", "PINS"]``."""
    return f"{role.value} = [{', '.join(json.dumps(n, ensure_ascii=False) for n in names)}]"


def find_config(drawing: Path) -> Path | None:
    """The nearest ``dxfcheck.toml`` in the drawing's folder or its parents."""
    folder = drawing.resolve().parent
    for candidate in (folder, *folder.parents):
        p = candidate / CONFIG_NAME
        if p.is_file():
            return p
    return None


def _parse_layers(raw: Any, path: str) -> dict[Role, tuple[str, ...]]:
    if not isinstance(raw, dict):
        raise ConfigError("[layers] must be a table", path=path)
    layers = dict(DEFAULT_LAYERS)
    roles = {r.value: r for r in Role}
    seen: dict[str, Role] = {}
    for key, value in raw.items():
        if key not in roles:
            raise ConfigError(f"[layers] has an unknown role {key!r} (roles: {', '.join(roles)})", path=path)
        if isinstance(value, str):
            value = [value]
        if not isinstance(value, list) or not all(isinstance(v, str) and v for v in value):
            raise ConfigError(f"[layers] {key} must be a list of layer names", path=path)
        names = tuple(v.upper() for v in value)
        for n in names:
            if n in seen and seen[n] is not roles[key]:
                raise ConfigError(f"[layers] layer {n!r} is given two roles ({seen[n]}, {key})", path=path)
            seen[n] = roles[key]
        layers[roles[key]] = names
    return layers


def load_config(path: Path | None) -> Config:
    """Read a project file; ``None`` gives the defaults.

    Raises
    ------
    ConfigError
        When the file cannot be read, is not TOML, or has unknown keys.
    """
    if path is None:
        return Config()
    spath = str(path)
    try:
        with open(path, "rb") as fh:
            data = tomllib.load(fh)
    except OSError as exc:
        raise ConfigError(f"cannot read the project file: {exc.strerror}", path=spath) from exc
    except tomllib.TOMLDecodeError as exc:
        raise ConfigError(f"not valid TOML: {exc}", path=spath) from exc
    unknown = set(data) - _TOP_LEVEL
    if unknown:
        raise ConfigError(
            f"unknown table or key {sorted(unknown)[0]!r} (known: {', '.join(sorted(_TOP_LEVEL))})",
            path=spath,
        )
    layers = _parse_layers(data.get("layers", {}), spath)
    spec = data.get("spec", {})
    if not isinstance(spec, dict):
        raise ConfigError("[spec] must be a table", path=spath)
    markup = data.get("markup", {})
    if not isinstance(markup, dict):
        raise ConfigError("[markup] must be a table", path=spath)
    for key, value in markup.items():
        if key not in _MARKUP_KEYS:
            raise ConfigError(
                f"[markup] has an unknown key {key!r} (known: {', '.join(sorted(_MARKUP_KEYS))})", path=spath
            )
        if not isinstance(value, str) or not value.strip():
            raise ConfigError(f"[markup] {key} must be a layer name", path=spath)
    skeleton = {n for names in layers.values() for n in names}
    force_layer = markup.get("force_layer", DEFAULT_FORCE_LAYER)
    note_layer = markup.get("note_layer", DEFAULT_NOTE_LAYER)
    for name in (force_layer, note_layer):
        if name.upper() in skeleton:
            raise ConfigError(f"[markup] layer {name!r} is also a skeleton layer", path=spath)
    return Config(layers=layers, path=spath, spec=spec, force_layer=force_layer, note_layer=note_layer)
