"""Stage 2, Drawing → Mechanism: the brake's parts, pins, shoes, loads,
springs and bands, inferred from the drawing's geometry.

``model`` holds the frozen model, ``build`` infers it (one module per
step: ``topology``, ``naming``, ``pins``, ``loads``, ``springs``, ``bands``,
``shoes``), ``layers`` names
layers that look like a role's, ``plausibility`` compares what was read with
real drum brakes.
"""

from __future__ import annotations

from dxfcheck.mechanism.build import LIES_ON_RTOL, build_mechanism, default_tolerance
from dxfcheck.mechanism.model import (
    FRAME,
    Band,
    BandKind,
    Drum,
    Guide,
    Load,
    Mechanism,
    Mounting,
    Part,
    Pin,
    Shoe,
    Spring,
)

__all__ = [
    "FRAME",
    "LIES_ON_RTOL",
    "Band",
    "BandKind",
    "Drum",
    "Guide",
    "Load",
    "Mechanism",
    "Mounting",
    "Part",
    "Pin",
    "Shoe",
    "Spring",
    "build_mechanism",
    "default_tolerance",
]
