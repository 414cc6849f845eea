"""Contact models: the force the drum exerts on a shoe.

Each model turns a :class:`~dxfcheck.mechanism.Shoe`, the drum, the friction
coefficient and the drum's direction into basis :class:`ContactWrench` es:
the force on the shoe's part *per unit of each of the shoe's unknowns* (its
normal force for the short-shoe models, line-load coefficients for the long
ones), so that the statics stays linear in those unknowns.  Modules:
``short_shoe`` (fixed and pivoted short shoes), ``long_shoe`` (hinged and
pivoted long shoes).  New models plug in by implementing
:class:`ContactModel`.
"""

from __future__ import annotations

from dxfcheck.statics.contact.base import (
    DEFAULT_MU,
    LONG_SHOE_THRESHOLD_DEG,
    ContactModel,
    ContactModelName,
    ContactOptions,
    ContactWrench,
    Direction,
    ShoeModelChoice,
    combine,
    contact_options,
    line_of_action_point,
    moment_about_center,
    surface_tangent,
)
from dxfcheck.statics.contact.short_shoe import ShortFixedShoe, ShortPivotedShoe, short_shoe_model

__all__ = [
    "DEFAULT_MU",
    "LONG_SHOE_THRESHOLD_DEG",
    "ContactModel",
    "ContactModelName",
    "ContactOptions",
    "ContactWrench",
    "Direction",
    "ShoeModelChoice",
    "ShortFixedShoe",
    "ShortPivotedShoe",
    "combine",
    "contact_options",
    "line_of_action_point",
    "moment_about_center",
    "short_shoe_model",
    "surface_tangent",
]
