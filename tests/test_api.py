"""The public API: every exported name resolves, and the heavier stages load
only when their names are first used.  (The project's own conventions, as
DEVELOPERS.md states them; no published source.)"""

from __future__ import annotations

import subprocess
import sys

import dxfcheck


def test_every_exported_name_resolves():
    for name in dxfcheck.__all__:
        assert getattr(dxfcheck, name) is not None, name


def test_gate_output_and_revision_load_on_first_use():
    code = (
        "import sys, dxfcheck; "
        "print(sorted({m.split('.')[1] for m in sys.modules if m.startswith('dxfcheck.') and m.count('.') >= 1}))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60, check=True).stdout
    loaded = eval(out)  # a printed list of stage names
    assert not {"gate", "output", "revision"} & set(loaded), loaded


def test_the_gate_is_public(tmp_path):
    from common import conveyor_block

    path = tmp_path / "c.dxf"
    conveyor_block().save(path)
    j = dxfcheck.check(path, overrides=[("mu", "0.35")])
    assert isinstance(j, dxfcheck.Judgement) and isinstance(j.spec, dxfcheck.Spec)
    assert str(j.verdict) in ("pass", "warn", "fail")


def test_errors_are_also_the_builtins_they_stand_for():
    from dxfcheck.core import errors as e

    assert issubclass(e.ConfigError, ValueError) and issubclass(e.SolveError, ValueError)
    assert issubclass(e.MechanismError, ValueError) and issubclass(e.OutputError, OSError)
    assert issubclass(e.LimitError, RuntimeError) and issubclass(e.VerificationError, AssertionError)
    err = e.OutputError("cannot write", path="x.dxf")
    assert str(err) == "x.dxf: cannot write" and err.path == "x.dxf"


def test_check_takes_typed_values(tmp_path):
    """The same spec given as typed values and as command-line texts gives
    the same judgement, and each value shows where it came from."""
    from common import conveyor_block

    from dxfcheck.core.directions import Direction

    path = tmp_path / "c.dxf"
    conveyor_block().save(path)
    typed = dxfcheck.check(
        path,
        spec={"mu": 0.35, "required_torque": (0.45, "kN*m"), "directions": (Direction.CW,), "units": "mm"},
    )
    texts = dxfcheck.check(
        path, overrides=[("mu", "0.35"), ("required_torque", "450 N*m"), ("directions", "cw"), ("units", "mm")]
    )
    assert typed.spec.values["required_torque"].value == 450.0
    assert typed.spec.values["required_torque"].source == "Python call"
    assert [(r.rule, r.verdict, r.value) for r in typed.rules] == [(r.rule, r.verdict, r.value) for r in texts.rules]
    assert any(r.rule.startswith("torque.") for r in typed.rules)


def test_check_refuses_a_typed_quantity_without_unit(tmp_path):
    import pytest
    from common import conveyor_block

    path = tmp_path / "c.dxf"
    conveyor_block().save(path)
    with pytest.raises(dxfcheck.ConfigError, match="required_torque"):
        dxfcheck.check(path, spec={"required_torque": 450.0})
    with pytest.raises(dxfcheck.ConfigError, match=r"\(number, 'unit'\)"):
        dxfcheck.check(path, spec={"required_torque": (450.0,)})
