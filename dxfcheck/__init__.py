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
``import dxfcheck`` stays light (it loads neither numpy nor any stage).

Inside a running IPython shell (Jupyter), ``import dxfcheck`` also registers
the results' displays, tables and pictures (:mod:`dxfcheck.output.notebook`).

dxfcheck is a design aid; final design must follow the applicable codes and
standards and be checked by a qualified engineer.
"""

from __future__ import annotations

import sys
from typing import TYPE_CHECKING

from dxfcheck.core.version import __version__

if TYPE_CHECKING:  # the static view of the lazily loaded names below
    from dxfcheck.core.config import Config, Role, find_config, load_config
    from dxfcheck.core.directions import Direction
    from dxfcheck.core.errors import (
        ConfigError,
        DrawingReadError,
        DxfcheckError,
        LimitError,
        MechanismError,
        OutputError,
        SolveError,
        VerificationError,
    )
    from dxfcheck.core.findings import Code, Finding, Severity
    from dxfcheck.gate.rules import Judgement, RuleResult, Verdict
    from dxfcheck.gate.spec import Spec
    from dxfcheck.mechanism import Mechanism, build_mechanism
    from dxfcheck.output.annotate import annotate
    from dxfcheck.output.sketch import Sketch
    from dxfcheck.pipeline import DEFAULT_MU, analyse, check, sensitivity
    from dxfcheck.read.drawing import Drawing, read_drawing
    from dxfcheck.revision.compare import Comparison, Thresholds, compare_judgements
    from dxfcheck.statics import CaseSolution, Solution, solve, solve_case
    from dxfcheck.statics.contact import ContactOptions, ShoeModelChoice
    from dxfcheck.statics.results import (
        BandResult,
        GuideResult,
        LoadResult,
        MemberResult,
        PinResult,
        ShoeResult,
        SpringResult,
    )
    from dxfcheck.statics.sampling import SensitivityResult

#: Every public name and the module it is loaded from on first use (PEP 562),
#: so that ``import dxfcheck`` loads neither numpy nor any stage: the command
#: line decides how numpy runs before it is loaded (:mod:`dxfcheck.cli`).
_LAZY = {
    "Config": "dxfcheck.core.config",
    "Role": "dxfcheck.core.config",
    "find_config": "dxfcheck.core.config",
    "load_config": "dxfcheck.core.config",
    "ConfigError": "dxfcheck.core.errors",
    "DrawingReadError": "dxfcheck.core.errors",
    "DxfcheckError": "dxfcheck.core.errors",
    "MechanismError": "dxfcheck.core.errors",
    "SolveError": "dxfcheck.core.errors",
    "VerificationError": "dxfcheck.core.errors",
    "OutputError": "dxfcheck.core.errors",
    "LimitError": "dxfcheck.core.errors",
    "Code": "dxfcheck.core.findings",
    "Finding": "dxfcheck.core.findings",
    "Severity": "dxfcheck.core.findings",
    "Mechanism": "dxfcheck.mechanism",
    "build_mechanism": "dxfcheck.mechanism",
    "DEFAULT_MU": "dxfcheck.pipeline",
    "analyse": "dxfcheck.pipeline",
    "check": "dxfcheck.pipeline",
    "sensitivity": "dxfcheck.pipeline",
    "Drawing": "dxfcheck.read.drawing",
    "read_drawing": "dxfcheck.read.drawing",
    "CaseSolution": "dxfcheck.statics",
    "Solution": "dxfcheck.statics",
    "solve": "dxfcheck.statics",
    "solve_case": "dxfcheck.statics",
    "Direction": "dxfcheck.core.directions",
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
    "GuideResult": "dxfcheck.statics.results",
    "LoadResult": "dxfcheck.statics.results",
    "Sketch": "dxfcheck.output.sketch",
}


def __getattr__(name: str) -> object:
    """Load a public name's stage on first use (PEP 562)."""
    if name in _LAZY:
        import importlib

        value = getattr(importlib.import_module(_LAZY[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'dxfcheck' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted({*globals(), *_LAZY})


__all__ = [
    "DEFAULT_MU",
    "BandResult",
    "CaseSolution",
    "Code",
    "Comparison",
    "Config",
    "ConfigError",
    "ContactOptions",
    "Direction",
    "Drawing",
    "DrawingReadError",
    "DxfcheckError",
    "Finding",
    "GuideResult",
    "Judgement",
    "LimitError",
    "LoadResult",
    "Mechanism",
    "MechanismError",
    "MemberResult",
    "OutputError",
    "PinResult",
    "Role",
    "RuleResult",
    "SensitivityResult",
    "Severity",
    "ShoeModelChoice",
    "ShoeResult",
    "Sketch",
    "Solution",
    "SolveError",
    "Spec",
    "SpringResult",
    "Thresholds",
    "Verdict",
    "VerificationError",
    "__version__",
    "analyse",
    "annotate",
    "build_mechanism",
    "check",
    "compare_judgements",
    "find_config",
    "load_config",
    "read_drawing",
    "sensitivity",
    "solve",
    "solve_case",
]


def _in_ipython() -> bool:
    """True inside a running IPython shell (a Jupyter kernel, the IPython console)."""
    get = getattr(sys.modules.get("IPython"), "get_ipython", None)
    return get is not None and get() is not None


if _in_ipython():  # results display as tables and pictures (dxfcheck.output.notebook)
    from dxfcheck.output import notebook as _notebook

    _notebook.enable()
