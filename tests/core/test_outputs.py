"""Outputs land only where they should, as the user's system expects.

The real command (``python -m dxfcheck``) in subprocesses: permissions from
the umask, special files and links refused, ``-`` for standard output, two
outputs to one file refused before anything is written, temporary files
removed on SIGTERM, binary DXF kept binary, the marker of dxfcheck's own
outputs (batch and compare skip them whatever their name), closed pipes,
full disks and encodings that cannot show μ.

Sources: the permission and file-type rules are POSIX (open(2): a new file's
mode is ``mode & ~umask``; lstat(2) file types), common practice for Unix
tools (``-`` for standard output, a replaced file keeping its mode, a closed
pipe ending output quietly); the ``999`` comment group is in the AutoCAD DXF
Reference ("Group codes in numerical order": 999, comment), from memory.
"""

from __future__ import annotations

import os
import re
import resource
import shutil
import signal
import stat
import subprocess
import sys
import time
import xml.etree.ElementTree as ET
from pathlib import Path

import ezdxf
import pytest
from common import ROOT, conveyor_block, winch_two_shoe
from schema_check import output_json

from dxfcheck.core.files import MARKER, is_dxfcheck_output

DEMOS = ROOT / "drawings"
RUN_S = 120
BINARY_SENTINEL = b"AutoCAD Binary DXF"


def _cmd(*args: object) -> list[str]:
    return [sys.executable, "-m", "dxfcheck", *map(str, args)]


def run(*args: object, cwd: Path | None = None, env: dict[str, str] | None = None, **kw) -> subprocess.CompletedProcess:
    return subprocess.run(_cmd(*args), capture_output=True, text=True, cwd=cwd, env=env, timeout=RUN_S, **kw)


def sh(script: str, cwd: Path) -> subprocess.CompletedProcess:
    """A shell line with ``DXFCHECK`` standing for the command."""
    exe = " ".join(f"'{p}'" for p in _cmd())
    return subprocess.run(
        ["bash", "-c", script.replace("DXFCHECK", exe)], capture_output=True, text=True, cwd=cwd, timeout=RUN_S
    )


@pytest.fixture
def demo(tmp_path):
    """The demos and their project file, copied: outputs never go into the repository."""
    for name in ("winch_two_shoe.dxf", "conveyor_block.dxf", "dxfcheck.toml"):
        shutil.copy(DEMOS / name, tmp_path / name)
    return tmp_path


def _mode(path: Path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


def _no_temporaries(folder: Path) -> None:
    assert not [p.name for p in folder.iterdir() if p.name.endswith(".tmp")]


# -- permissions ----------------------------------------------------------------------------


@pytest.mark.parametrize(("umask", "expected"), [("022", 0o644), ("027", 0o640), ("002", 0o664)])
def test_new_outputs_get_the_permissions_the_umask_gives(demo, umask, expected):
    """POSIX open(2): a new file's mode is 0666 & ~umask (a colleague on a
    shared drive can read what a 022 umask allows)."""
    r = sh(
        f"umask {umask}; DXFCHECK annotate conveyor_block.dxf -o c.dxf --svg c.svg && "
        "DXFCHECK check conveyor_block.dxf --junit gate.xml",
        demo,
    )
    assert r.returncode == 0, r.stderr
    for name in ("c.dxf", "c.svg", "gate.xml"):
        assert _mode(demo / name) == expected, name


def test_a_replaced_output_keeps_its_mode(demo):
    """--force replaces the content, not the permissions the user chose."""
    out = demo / "c.dxf"
    out.write_text("old")
    out.chmod(0o664)
    gate = demo / "gate.xml"
    gate.write_text("old")
    gate.chmod(0o600)
    r = sh(
        "umask 077; DXFCHECK annotate conveyor_block.dxf -o c.dxf --force && "
        "DXFCHECK check conveyor_block.dxf --junit gate.xml",
        demo,
    )
    assert r.returncode == 0, r.stderr
    assert _mode(out) == 0o664 and out.read_text() != "old"
    assert _mode(gate) == 0o600 and gate.read_text().startswith("<?xml")


# -- where outputs may go -------------------------------------------------------------------


def test_a_fifo_target_is_refused_without_blocking(demo):
    """A FIFO would block the write or feed whoever reads it; it is named
    and refused, and stays a FIFO."""
    fifo = demo / "pipe.dxf"
    os.mkfifo(fifo)
    for args in (
        ("annotate", "conveyor_block.dxf", "-o", fifo, "--force"),
        ("check", "conveyor_block.dxf", "--junit", fifo),
    ):
        r = run(*args, cwd=demo)
        assert r.returncode == 2 and "FIFO" in r.stderr and str(fifo) in r.stderr, r.stderr
        assert stat.S_ISFIFO(os.lstat(fifo).st_mode)
    _no_temporaries(demo)


def test_a_symlink_target_is_refused(demo):
    """A link (to a file, or dangling) is not written through, even with
    --force: the message says it is a link and where it leads."""
    real = demo / "real.dxf"
    real.write_text("keep me")
    link = demo / "link.dxf"
    link.symlink_to(real)
    dangling = demo / "dangling.svg"
    dangling.symlink_to(demo / "nowhere.svg")
    r = run("annotate", "conveyor_block.dxf", "-o", link, "--force", cwd=demo)
    assert r.returncode == 2 and "symbolic link" in r.stderr and "real.dxf" in r.stderr, r.stderr
    assert link.is_symlink() and real.read_text() == "keep me"
    r = run("annotate", "conveyor_block.dxf", "-o", demo / "new.dxf", "--svg", dangling, "--force", cwd=demo)
    assert r.returncode == 2 and "symbolic link" in r.stderr
    assert not (demo / "new.dxf").exists() and not (demo / "nowhere.svg").exists()


def test_a_device_target_is_refused(demo):
    """``--junit /dev/null`` run as root would replace the device node by a
    regular file; it is refused and the node stays a character device."""
    r = run("check", "conveyor_block.dxf", "--junit", "/dev/null", cwd=demo)
    assert r.returncode == 2 and "character device" in r.stderr
    assert stat.S_ISCHR(os.stat("/dev/null").st_mode)


def test_a_folder_target_is_refused_and_no_file_named_like_it(demo):
    (demo / "out").mkdir()
    for target in ("out", "out/", "newdir/"):
        r = run("annotate", "conveyor_block.dxf", "-o", target, cwd=demo)
        assert r.returncode == 2 and "folder" in r.stderr, (target, r.stderr)
    assert (demo / "out").is_dir() and list((demo / "out").iterdir()) == []
    assert not (demo / "newdir").exists()
    r = run("annotate", "conveyor_block.dxf", "-o", "missing/c.dxf", cwd=demo)
    assert r.returncode == 2 and "does not exist" in r.stderr


def test_two_outputs_to_one_file_are_refused_before_anything_is_written(demo):
    """All targets are checked first, duplicates among them too (the same
    file by another spelling, or through a hard link)."""
    before = sorted(p.name for p in demo.iterdir())
    r = run("annotate", "conveyor_block.dxf", "-o", "x.dxf", "--svg", "x.dxf", cwd=demo)
    assert r.returncode == 2 and "two outputs" in r.stderr
    assert sorted(p.name for p in demo.iterdir()) == before
    (demo / "y.dxf").write_text("old")
    os.link(demo / "y.dxf", demo / "y-link.svg")
    for args in (
        ("annotate", "conveyor_block.dxf", "-o", "./y.dxf", "--svg", "y.dxf", "--force"),
        ("annotate", "conveyor_block.dxf", "-o", "y.dxf", "--svg", "y-link.svg", "--force"),
        ("check", "conveyor_block.dxf", "--annotate", "y.dxf", "--junit", "y.dxf", "--force"),
        ("solve", "conveyor_block.dxf", "--annotate", "y.dxf", "--force"),  # one output: fine
    ):
        r = run(*args, cwd=demo)
        if args[0] == "solve":
            assert r.returncode == 0, r.stderr
            continue
        assert r.returncode == 2 and "two outputs" in r.stderr, (args, r.stderr)
        assert (demo / "y.dxf").read_text() == "old"
    r = run("compare", "winch_two_shoe.dxf", "winch_two_shoe.dxf", "--annotate", "t.svg", "--svg", "t.svg", cwd=demo)
    assert r.returncode == 2 and "two outputs" in r.stderr and not (demo / "t.svg").exists()
    _no_temporaries(demo)


def test_junit_to_standard_output(demo):
    """``--junit -`` prints the XML on stdout (parsed here) and the report
    on stderr; with --json it is refused (two documents on one stream)."""
    r = run("check", "winch_two_shoe.dxf", "--junit", "-", cwd=demo)
    assert r.returncode == 1, r.stderr  # the demo fails on purpose (README)
    root = ET.fromstring(r.stdout)
    assert root.tag == "testsuites" and int(root[0].get("failures")) == 3
    assert "FAIL" in r.stderr and "winch_two_shoe.dxf" in r.stderr
    assert not (demo / "-").exists()
    r = run("check", "winch_two_shoe.dxf", "--junit", "-", "--json", cwd=demo)
    assert r.returncode == 2 and "standard output" in r.stderr


def test_svg_to_standard_output_and_dxf_not(demo):
    r = run("annotate", "conveyor_block.dxf", "-o", "c.dxf", "--svg", "-", cwd=demo)
    assert r.returncode == 0, r.stderr
    assert ET.fromstring(r.stdout).tag.endswith("svg")
    assert "wrote c.dxf" in r.stderr
    r = run("annotate", "conveyor_block.dxf", "-o", "-", cwd=demo)
    assert r.returncode == 2 and "text outputs" in r.stderr


# -- interrupted and failed writes -----------------------------------------------------------


@pytest.fixture(scope="module")
def big_drawing(tmp_path_factory):
    """The conveyor demo with 20 000 clutter lines: its marked-up copy takes
    long enough to write (a few tenths of a second) that a signal can arrive
    during the write."""
    path = tmp_path_factory.mktemp("big") / "big.dxf"
    doc = conveyor_block().to_doc()
    msp = doc.modelspace()
    doc.layers.add("CLUTTER")
    for k in range(20000):
        x, y = (k % 200) * 4.0 - 400, (k // 200) * 4.0 - 600
        msp.add_line((x, y), (x + 3, y + 1), dxfattribs={"layer": "CLUTTER"})
    doc.saveas(path)
    return path


def _interrupt_the_write(folder: Path, src: Path, sig: int) -> int | None:
    """Start an annotate, send ``sig`` once its temporary file exists;
    returns its exit status, or None when the write ended before the signal
    could be sent."""
    proc = subprocess.Popen(_cmd("annotate", src, "-o", folder / "out.dxf"), stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + RUN_S
    try:
        while not any(p.name.endswith(".tmp") for p in folder.iterdir()):
            if proc.poll() is not None:
                return None
            assert time.monotonic() < deadline
            time.sleep(0.001)
        proc.send_signal(sig)
        rc = proc.wait(timeout=RUN_S)
    finally:
        proc.kill()
    assert "Traceback" not in proc.stderr.read()
    return rc


@pytest.mark.parametrize("sig", [signal.SIGTERM, signal.SIGINT], ids=["SIGTERM", "SIGINT"])
def test_a_signal_during_the_write_leaves_no_temporary_file(tmp_path, big_drawing, sig):
    """SIGTERM (a CI job cancelled) and SIGINT (Ctrl-C) while the marked-up
    copy is being written: the temporary file is removed, the output never
    appears, the run ends as the signal asks.  (On a loaded machine the
    write may end between seeing the temporary file and the signal's
    arrival: then the output is complete; tried until one run is
    interrupted.)"""
    src = tmp_path / "big.dxf"
    shutil.copy(big_drawing, src)
    interrupted = 0
    for attempt in range(4):
        folder = tmp_path / f"try{attempt}"
        folder.mkdir()
        rc = _interrupt_the_write(folder, src, sig)
        _no_temporaries(folder)
        if rc in (-sig, 128 + sig, 130):
            assert not (folder / "out.dxf").exists()
            interrupted += 1
            break
        assert rc in (0, None), rc  # finished first: a whole output
        assert ezdxf.readfile(folder / "out.dxf").layers.has_entry("DXFCHECK_FORCES")
    assert interrupted == 1


def _limit_file_size(limit: int):
    def pre() -> None:
        resource.setrlimit(resource.RLIMIT_FSIZE, (limit, limit))
        signal.signal(signal.SIGXFSZ, signal.SIG_IGN)  # a write over the limit fails with EFBIG instead

    return pre


def test_a_failed_file_write_names_the_output(demo):
    """A full disk (simulated by a file-size limit) is exit 2 with a line
    naming the output, not an internal error; nothing half-written stays."""
    r = run("annotate", "conveyor_block.dxf", "-o", "c.dxf", cwd=demo, preexec_fn=_limit_file_size(8000))
    assert r.returncode == 2, r.stderr
    assert "c.dxf" in r.stderr and "internal error" not in r.stderr
    assert not (demo / "c.dxf").exists()
    _no_temporaries(demo)


@pytest.mark.skipif(not Path("/dev/full").exists(), reason="needs /dev/full")
def test_a_full_or_closed_standard_output_is_exit_2(demo):
    for extra in ((), ("--json",)):
        r = sh(f"DXFCHECK solve conveyor_block.dxf {' '.join(extra)} > /dev/full", demo)
        assert r.returncode == 2 and "standard output" in r.stderr and "internal" not in r.stderr, r.stderr
    r = sh("DXFCHECK solve conveyor_block.dxf >&-", demo)
    assert r.returncode == 2 and "standard output" in r.stderr and "closed" in r.stderr, r.stderr


def test_a_closed_pipe_is_a_quiet_exit_with_the_runs_own_code(demo):
    """``| head -1``: exit 0 for a solve, 1 for a failing gate (the run's
    own code, under pipefail), and no error text."""
    r = sh("set -o pipefail; DXFCHECK solve winch_two_shoe.dxf | head -1", demo)
    assert r.returncode == 0 and r.stdout.startswith("dxfcheck solve") and r.stderr == "", r.stderr
    r = sh("set -o pipefail; DXFCHECK check winch_two_shoe.dxf | head -1", demo)
    assert r.returncode == 1 and r.stdout.startswith("FAIL") and r.stderr == "", r.stderr
    # the reader gone before the first byte: every write meets a broken pipe
    proc = subprocess.Popen(
        _cmd("solve", "winch_two_shoe.dxf", "--json"), cwd=demo, stdout=subprocess.PIPE, stderr=subprocess.PIPE
    )
    proc.stdout.close()
    _, err = proc.communicate(timeout=RUN_S)
    assert proc.returncode == 0 and err == b"", err


@pytest.mark.parametrize("encoding", ["ascii", "latin-1", "cp1252"])
def test_a_narrow_encoding_gets_ascii_stand_ins(demo, encoding):
    """A non-UTF-8 standard output: μ, ·, ° that the encoding cannot show
    are written as mu, *, deg; the report is complete."""
    env = {**os.environ, "PYTHONIOENCODING": encoding}
    r = subprocess.run(_cmd("solve", "winch_two_shoe.dxf"), cwd=demo, env=env, capture_output=True, timeout=RUN_S)
    assert r.returncode == 0, r.stderr
    text = r.stdout.decode(encoding)
    assert "qualified engineer" in text and "tie rod" in text
    if encoding == "ascii":
        assert "mu = 0.35" in text and "N*m" in text and " deg" in text
    r = subprocess.run(_cmd("check", "winch_two_shoe.dxf"), cwd=demo, env=env, capture_output=True, timeout=RUN_S)
    assert r.returncode == 1 and b"Traceback" not in r.stderr


# -- the marker of dxfcheck's outputs ------------------------------------------------------------


def test_every_dxf_output_carries_the_marker(demo):
    """annotate, solve/check --annotate and compare --annotate: the ASCII
    copy starts with the 999 comment, whatever its name; the drawings do
    not carry it."""
    runs = [
        ("annotate", "winch_two_shoe.dxf", "-o", "a.dxf"),
        ("solve", "winch_two_shoe.dxf", "--annotate", "s.dxf"),
        ("check", "winch_two_shoe.dxf", "--annotate", "k.dxf"),
        ("compare", "winch_two_shoe.dxf", "winch_two_shoe.dxf", "--annotate", "rev-C.dxf"),
    ]
    for args in runs:
        r = run(*args, cwd=demo)
        assert r.returncode in (0, 1), r.stderr
    for name in ("a.dxf", "s.dxf", "k.dxf", "rev-C.dxf"):
        head = (demo / name).read_bytes()[:64]
        assert head.startswith(f"999\n{MARKER} ".encode()), head
        assert is_dxfcheck_output(demo / name)
        assert ezdxf.readfile(demo / name).dxfversion == "AC1024"  # readers skip the comment
    for name in ("winch_two_shoe.dxf", "conveyor_block.dxf", "dxfcheck.toml"):
        assert not is_dxfcheck_output(demo / name)
    assert not is_dxfcheck_output(demo / "missing.dxf") and not is_dxfcheck_output(demo)


@pytest.mark.parametrize("version", ["R12", "R2000", "R2010"])
def test_binary_input_stays_binary_with_the_marker(tmp_path, version):
    """A binary DXF comes back binary in its version (ezdxf writes binary
    DXF: ``saveas(fmt="bin")``), with the marker in its header (custom
    property, R2004+) or APPID table (R12, R2000)."""
    src = tmp_path / "w.dxf"
    winch_two_shoe().to_doc(dxfversion=version).saveas(src, fmt="bin")
    r = run("annotate", src, "-o", tmp_path / "w-marked.dxf", "--units", "mm")
    assert r.returncode == 0, r.stderr
    out = tmp_path / "w-marked.dxf"
    assert out.read_bytes().startswith(BINARY_SENTINEL)
    a, b = ezdxf.readfile(src), ezdxf.readfile(out)
    assert b.dxfversion == a.dxfversion
    assert len(b.modelspace()) > len(a.modelspace())
    assert is_dxfcheck_output(out) and not is_dxfcheck_output(src)


def test_batch_skips_outputs_by_marker_and_says_so(tmp_path):
    """A marked-up copy named like a drawing is skipped (and counted in the
    summary); a drawing named like an output is checked."""
    vault = tmp_path / "vault"
    vault.mkdir()
    conveyor_block().save(vault / "conveyor.dxf")
    conveyor_block().save(vault / "lever-forces.dxf")  # a user's drawing, named like an output
    r = run("annotate", vault / "conveyor.dxf", "-o", vault / "conveyor-rev-B.dxf")
    assert r.returncode == 0, r.stderr
    r = run("batch", vault, "--no-cache", "--jobs", "1")
    assert r.returncode == 0, r.stderr
    assert "conveyor-rev-B.dxf: skipped" in r.stderr and "marked-up copy" in r.stderr
    assert re.search(r"2 drawings: .*; 1 skipped", r.stdout), r.stdout
    r = run("batch", vault, "--no-cache", "--jobs", "1", "--json")
    doc = output_json(r.stdout)
    assert sorted(Path(x["drawing"]).name for x in doc["results"]) == ["conveyor.dxf", "lever-forces.dxf"]
    assert [Path(x["path"]).name for x in doc["skipped"]] == ["conveyor-rev-B.dxf"]


def test_compare_skips_outputs_in_a_folder_and_refuses_one_named(tmp_path):
    revs = tmp_path / "revs"
    revs.mkdir()
    winch_two_shoe().save(revs / "rev-A.dxf")
    winch_two_shoe().save(revs / "rev-B.dxf")
    r = run("compare", revs / "rev-A.dxf", revs / "rev-B.dxf", "--annotate", revs / "rev-C.dxf")
    assert r.returncode in (0, 1), r.stderr
    r = run("compare", revs, "--json")
    assert r.returncode in (0, 1), r.stderr
    assert "rev-C.dxf: skipped" in r.stderr
    assert [Path(p).name for p in output_json(r.stdout)["drawings"]] == ["rev-A.dxf", "rev-B.dxf"]
    r = run("compare", revs / "rev-A.dxf", revs / "rev-C.dxf")
    assert r.returncode == 2 and "marked-up copy" in r.stderr


# -- the repository ------------------------------------------------------------------------------


def test_the_readmes_demo_outputs_are_git_ignored():
    """Every output the README's commands write (``-o``, ``--svg``,
    ``--png``, ``--junit``, ``--annotate`` in its sh blocks) is ignored by
    git, so that trying the README leaves a clean working tree."""
    if shutil.which("git") is None or not (ROOT / ".git").exists():
        pytest.skip("not a git checkout")
    readme = (ROOT / "README.md").read_text()
    blocks = re.findall(r"```sh\n(.*?)```", readme, re.S)
    outputs = {m.group(2) for b in blocks for m in re.finditer(r"(-o|--svg|--png|--junit|--annotate)\s+(\S+)", b)}
    assert {"gate.xml", "winch-forces.dxf", "winch-forces.svg"} <= outputs
    for name in sorted(outputs):
        r = subprocess.run(["git", "check-ignore", "-q", name], cwd=ROOT, timeout=30)
        assert r.returncode == 0, f"{name} is not git-ignored"
