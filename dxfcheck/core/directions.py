"""The drum's two directions of rotation, as seen in the drawing."""

from __future__ import annotations

import enum

__all__ = ["Direction"]


class Direction(enum.StrEnum):
    """Sense of the drum's rotation as seen in the drawing."""

    CW = "cw"
    CCW = "ccw"

    @property
    def sign(self) -> int:
        """+1 for counter-clockwise, -1 for clockwise."""
        return 1 if self is Direction.CCW else -1

    def mirrored(self) -> Direction:
        return Direction.CW if self is Direction.CCW else Direction.CCW
