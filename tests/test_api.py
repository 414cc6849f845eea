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
