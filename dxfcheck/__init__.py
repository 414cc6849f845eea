"""dxfcheck: check the statics of drum-brake linkages drawn in DXF.

The public API, in pipeline order::

    import dxfcheck
    drawing = dxfcheck.read_drawing("brake.dxf")       # DXF -> geometry [mm]
    mech = dxfcheck.build_mechanism(drawing)           # geometry -> parts, pins, shoes
    sol = dxfcheck.solve(mech, mu=0.35)                # statics, both drum directions
    sol.case("cw").torque_Nm

or all at once: ``dxfcheck.analyse("brake.dxf", mu=0.35)``.  The release gate
is ``dxfcheck.check("brake.dxf")`` (a :class:`Judgement` against the
drawing's :class:`Spec`), the marked-up copy ``dxfcheck.annotate(sol,
out=...)``, two revisions ``dxfcheck.compare_judgements(old, new)``, and the
friction range and pin tolerances ``dxfcheck.sensitivity(...)``.  These, and
the option and result types, load their stage on first use, so that
``import dxfcheck`` stays light.

Inside a running IPython shell (Jupyter), ``import dxfcheck`` also registers
the results' displays, tables and pictures (:mod:`dxfcheck.output.notebook`).

dxfcheck is a design aid; final design must follow the applicable codes and
standards and be checked by a qualified engineer.
"""

from __future__ import annotations

import sys

from dxfcheck.core.config import Config, Role, find_config, load_config
from dxfcheck.core.errors import ConfigError, DrawingReadError, DxfcheckError, MechanismError, SolveError
from dxfcheck.core.findings import Code, Finding, Severity
from dxfcheck.core.version import __version__
from dxfcheck.mechanism import Mechanism, build_mechanism
from dxfcheck.pipeline import DEFAULT_MU, analyse
from dxfcheck.read.drawing import Drawing, read_drawing
from dxfcheck.statics import CaseSolution, Solution, solve, solve_case
from dxfcheck.statics.contact import Direction

#: Public names whose stage is imported on first use: name -> module.
_LAZY = {
    "check": "dxfcheck.pipeline",
    "sensitivity": "dxfcheck.pipeline",
    "Spec": "dxfcheck.gate.spec",
    "Judgement": "dxfcheck.gate.rules",
    "RuleResult": "dxfcheck.gate.rules",
    "Verdict": "dxfcheck.gate.rules",
    "annotate": "dxfcheck.output.annotate",
    "compare_judgements": "dxfcheck.revision.compare",
    "Comparison": "dxfcheck.revision.compare",
    "Thresholds": "dxfcheck.revision.compare",
    "SensitivityResult": "dxfcheck.statics.sampling",
    "ContactOptions": "dxfcheck.statics.contact",
    "ShoeModelChoice": "dxfcheck.statics.contact",
    "ShoeResult": "dxfcheck.statics.results",
    "PinResult": "dxfcheck.statics.results",
    "BandResult": "dxfcheck.statics.results",
    "MemberResult": "dxfcheck.statics.results",
    "SpringResult": "dxfcheck.statics.results",
    "LoadResult": "dxfcheck.statics.results",
    "VerificationError": "dxfcheck.core.errors",
    "OutputError": "dxfcheck.core.errors",
    "LimitError": "dxfcheck.core.errors",
    "Sketch": "dxfcheck.output.sketch",
}


def __getattr__(name: str) -> object:
    """Load a lazily exported name's stage on first use (PEP 562)."""
    if name in _LAZY:
        import importlib

        value = getattr(importlib.import_module(_LAZY[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'dxfcheck' has no attribute {name!r}")


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
    *_LAZY,
]


def _in_ipython() -> bool:
    """True inside a running IPython shell (a Jupyter kernel, the IPython console)."""
    get = getattr(sys.modules.get("IPython"), "get_ipython", None)
    return get is not None and get() is not None


if _in_ipython():  # results display as tables and pictures (dxfcheck.output.notebook)
    from dxfcheck.output import notebook as _notebook

    _notebook.enable()
