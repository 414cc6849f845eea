"""Post-import hooks (:mod:`dxfcheck.core.imports`) and the two routes of
ezdxf's log records laid through them: findings (D114) while reading, note
lines from the command line elsewhere; ``logging`` is loaded only with
ezdxf.  (The project's own conventions, README "Bad input"; no published
source.)"""

from __future__ import annotations

import subprocess
import sys
import textwrap
from pathlib import Path

from common import ROOT

from dxfcheck.core.imports import when_imported


def _module(tmp_path: Path, name: str, monkeypatch) -> None:
    (tmp_path / f"{name}.py").write_text("LOADED = True\n")
    monkeypatch.syspath_prepend(str(tmp_path))


def test_a_callback_runs_before_the_first_import_once_and_in_order(tmp_path, monkeypatch):
    _module(tmp_path, "dxfcheck_probe_a", monkeypatch)
    seen: list[str] = []
    when_imported("dxfcheck_probe_a", lambda: seen.append(f"first {'dxfcheck_probe_a' in sys.modules}"))
    when_imported("dxfcheck_probe_a", lambda: seen.append("second"))
    assert seen == []
    import dxfcheck_probe_a  # noqa: F401

    assert seen == ["first False", "second"]  # before the module ran, in the order given
    import importlib

    importlib.reload(sys.modules["dxfcheck_probe_a"])
    assert seen == ["first False", "second"]  # once
    when_imported("dxfcheck_probe_a", lambda: seen.append("now"))
    assert seen[-1] == "now"  # a loaded module: at once


def test_a_cancelled_callback_never_runs(tmp_path, monkeypatch):
    _module(tmp_path, "dxfcheck_probe_b", monkeypatch)
    seen: list[str] = []
    cancel = when_imported("dxfcheck_probe_b", lambda: seen.append("ran"))
    cancel()
    import dxfcheck_probe_b  # noqa: F401

    assert seen == []


def _fresh(code: str) -> subprocess.CompletedProcess[str]:
    """``code`` in a fresh interpreter (ezdxf and logging not loaded yet)."""
    return subprocess.run(
        [sys.executable, "-c", textwrap.dedent(code)], capture_output=True, text=True, timeout=120, cwd=ROOT
    )


def test_ezdxf_messages_while_reading_are_findings_when_ezdxf_loads_during_the_read(tmp_path):
    """ezdxf warns of tags outside a section while the full reader reads:
    the warning is a D114 finding, not a line on stderr, although ezdxf was
    first imported inside the read."""
    text = (ROOT / "drawings" / "conveyor_block.dxf").read_text()
    head, sep, rest = text.partition("ENDSEC\n")
    path = tmp_path / "outside.dxf"
    path.write_text(head + sep + "  0\nSTRAY\n" + rest)  # a structure between two sections
    r = _fresh(
        f"""
        import sys
        import dxfcheck
        assert "logging" not in sys.modules and "ezdxf" not in sys.modules
        d = dxfcheck.read_drawing({str(path)!r}, reader="full")
        print([f.code.value[0] + ": " + f.message for f in d.findings])
        """
    )
    assert r.returncode == 0, r.stderr
    assert "D114: ezdxf says: DXF Structure Warning: found tags outside a SECTION" in r.stdout
    assert r.stderr == ""


def test_the_command_line_notes_ezdxf_messages_outside_reading():
    """Laid before ezdxf is loaded, the command line's route turns a
    warning ezdxf logs outside reading into a ``dxfcheck: note: ezdxf:``
    line; ``logging`` is loaded with ezdxf, not before."""
    r = _fresh(
        """
        import sys
        from dxfcheck import cli
        cli._route_library_logs()
        assert "logging" not in sys.modules
        import ezdxf
        assert "logging" in sys.modules
        doc = ezdxf.new("R12")
        doc.units = 4
        """
    )
    assert r.returncode == 0, r.stderr
    lines = r.stderr.splitlines()  # ezdxf.new("R12") sets the units too, and says so
    assert lines and set(lines) == {"dxfcheck: note: ezdxf: Drawing units ($INSUNITS) are not exported for DXF R12."}
