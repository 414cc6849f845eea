"""Contact models: the force the drum exerts on a shoe.

Each model turns a :class:`~dxfcheck.mechanism.Shoe`, the drum, the friction
coefficient and the drum's direction into a :class:`ContactWrench`: the force
on the shoe's part *per unit of the shoe's one unknown* (its normal force for
the short-shoe models), so that the statics stays linear in that unknown.
New models (long shoes, bands) plug in by implementing :class:`ContactModel`.
"""

from __future__ import annotations

from dxfcheck.contact.base import ContactModel, ContactWrench, Direction, surface_tangent
from dxfcheck.contact.short_shoe import ShortFixedShoe, ShortPivotedShoe, short_shoe_model

__all__ = [
    "ContactModel",
    "ContactWrench",
    "Direction",
    "ShortFixedShoe",
    "ShortPivotedShoe",
    "short_shoe_model",
    "surface_tangent",
]
