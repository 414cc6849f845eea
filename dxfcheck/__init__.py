"""dxfcheck: check the statics of drum-brake linkages drawn in DXF.

The public API, in pipeline order::

    import dxfcheck
    drawing = dxfcheck.read_drawing("brake.dxf")       # DXF -> geometry [mm]
    mech = dxfcheck.build_mechanism(drawing)           # geometry -> parts, pins, shoes
    sol = dxfcheck.solve(mech, mu=0.35)                # statics, both drum directions
    sol.case("cw").torque_Nm

or all at once: ``dxfcheck.analyse("brake.dxf", mu=0.35)``.

dxfcheck is a design aid; final design must follow the applicable codes and
standards and be checked by a qualified engineer.
"""

from __future__ import annotations

from dxfcheck.core.config import Config, Role, find_config, load_config
from dxfcheck.core.errors import ConfigError, DrawingReadError, DxfcheckError, MechanismError, SolveError
from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.version import __version__
from dxfcheck.mechanism import Mechanism, build_mechanism
from dxfcheck.pipeline import DEFAULT_MU, analyse
from dxfcheck.read.drawing import Drawing, read_drawing
from dxfcheck.statics import CaseSolution, Solution, solve, solve_case
from dxfcheck.statics.contact import Direction

__all__ = [
    "DEFAULT_MU",
    "CaseSolution",
    "Code",
    "Config",
    "ConfigError",
    "Direction",
    "Drawing",
    "DrawingReadError",
    "DxfcheckError",
    "Finding",
    "Mechanism",
    "MechanismError",
    "Role",
    "Severity",
    "Solution",
    "SolveError",
    "__version__",
    "analyse",
    "build_mechanism",
    "find_config",
    "load_config",
    "read_drawing",
    "solve",
    "solve_case",
]
