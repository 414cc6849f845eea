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


def test_import_loads_no_stage_and_no_numpy():
    """``import dxfcheck`` loads only its version; every public name loads
    its stage on first use (so that the command line can set numpy's
    threads before numpy is loaded)."""
    code = (
        "import sys, dxfcheck; "
        "print(sorted(m for m in sys.modules if m.startswith(('dxfcheck.', 'numpy')) and m != 'dxfcheck.core'))"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=60, check=True).stdout
    assert eval(out) == ["dxfcheck.core.version"]  # a printed list of module names


def test_public_names_match_the_lazy_table():
    assert sorted(dxfcheck.__all__) == sorted(["__version__", *dxfcheck._LAZY])
    assert set(dxfcheck._LAZY) <= set(dir(dxfcheck))


def test_the_command_line_runs_blas_on_one_thread_unless_told():
    """The command sets OPENBLAS_NUM_THREADS=1 before numpy is loaded, keeps
    a value the user set, and changes nothing once numpy is loaded."""
    probe = (
        "import os, sys\n{pre}"
        "from dxfcheck import cli\n"
        "cli._one_blas_thread()\n"
        "print(os.environ.get('OPENBLAS_NUM_THREADS'))\n"
    )

    def run(pre: str, env_value: str | None) -> str:
        import os

        env = {k: v for k, v in os.environ.items() if k not in cli_vars}
        if env_value is not None:
            env["OPENBLAS_NUM_THREADS"] = env_value
        r = subprocess.run(
            [sys.executable, "-c", probe.format(pre=pre)], capture_output=True, text=True, timeout=60, env=env
        )
        return r.stdout.strip()

    from dxfcheck.cli import BLAS_THREAD_VARIABLES as cli_vars

    assert run("", None) == "1"
    assert run("", "3") == "3"
    assert run("import numpy\n", None) == "None"


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
