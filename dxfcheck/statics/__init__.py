"""Stage 3, Mechanism → Solution: planar statics with Coulomb friction.

``contact/`` holds the shoe models (plug-ins), ``equations`` assembles the
linkage's equilibrium equations, ``diagnosis`` names free motions and
redundancy, ``locking`` finds the self-locking limit, ``solver`` solves each
drum direction and builds the ``results``, ``verify`` checks every answer
before it is reported, and ``sampling`` runs stacked solves over the friction
range and pin tolerances.
"""

from __future__ import annotations

from dxfcheck.statics.locking import critical_mu
from dxfcheck.statics.results import (
    Attachment,
    BandEnd,
    BandResult,
    CaseSolution,
    LoadResult,
    MemberResult,
    PartDiagram,
    PinResult,
    ShoeResult,
    Solution,
    SpringEnd,
    SpringResult,
    Station,
)
from dxfcheck.statics.solver import solve, solve_case, solve_for_torque

__all__ = [
    "Attachment",
    "BandEnd",
    "BandResult",
    "CaseSolution",
    "LoadResult",
    "MemberResult",
    "PartDiagram",
    "PinResult",
    "ShoeResult",
    "Solution",
    "SpringEnd",
    "SpringResult",
    "Station",
    "critical_mu",
    "solve",
    "solve_case",
    "solve_for_torque",
]
