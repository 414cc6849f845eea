"""Whether a drawing's skeleton is inferred from its geometry or read from
its role layers (``--skeleton-from``, ``[infer] skeleton_from``).

Kept apart from :mod:`dxfcheck.infer.skeleton`, so that a drawing drawn on
the role layers is read without loading the inference."""

from __future__ import annotations

from dxfcheck.core.config import SKELETON_SOURCES, Config, Role
from dxfcheck.core.errors import ConfigError
from dxfcheck.read.drawing import Drawing

__all__ = ["KEPT_ROLES", "SKELETON_ROLES", "has_role_skeleton", "infers_skeleton"]

#: The roles inferred from the geometry.
SKELETON_ROLES = frozenset({Role.PIVOT, Role.PIN, Role.LINK, Role.DRUM, Role.SHOE})
#: The roles still read from their layers when the skeleton is inferred.
KEPT_ROLES = frozenset(set(Role) - SKELETON_ROLES)


def has_role_skeleton(drawing: Drawing) -> bool:
    """Whether the role layers hold any of the skeleton (a pivot, pin,
    drum, centreline or shoe arc)."""
    roles = [c.role for c in drawing.circles] + [p.role for p in drawing.paths] + [a.role for a in drawing.arcs]
    return any(r in SKELETON_ROLES for r in roles)


def infers_skeleton(drawing: Drawing, config: Config, skeleton_from: str | None = None) -> bool:
    """Whether the skeleton is inferred from the geometry (``skeleton_from``:
    ``auto``, ``layers``, ``geometry``; default the project file's ``[infer]
    skeleton_from``): ``geometry``, or ``auto`` on role layers that hold none.

    Raises
    ------
    ConfigError
        For an unknown ``skeleton_from``.
    """
    mode = skeleton_from or config.infer.skeleton_from
    if mode not in SKELETON_SOURCES:
        raise ConfigError(f"--skeleton-from must be one of {', '.join(SKELETON_SOURCES)}, got {mode!r}")
    return mode == "geometry" or (mode == "auto" and not has_role_skeleton(drawing))
