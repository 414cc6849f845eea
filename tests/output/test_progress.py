"""Progress of long work: reading a big drawing, sampling, a compare's
revisions.  The stages tell :mod:`dxfcheck.core.progress`; a listener sees
every task start, advance to its total and stop; the command line shows
rich bars on standard error only when that is a terminal.  The project's own
convention (no published source)."""

from __future__ import annotations

import os
import pty
import subprocess
import sys
import threading

import pytest
from common import ROOT, winch_two_shoe

from dxfcheck import cli
from dxfcheck.core import progress
from dxfcheck.core.config import Config
from dxfcheck.pipeline import build_mechanism, read_drawing
from dxfcheck.read.fast import load_fast
from dxfcheck.statics.sampling import sample_design

WINCH = ROOT / "drawings" / "winch_two_shoe.dxf"


class Recorder:
    """A listener that keeps every call."""

    def __init__(self) -> None:
        self.tasks: dict[object, dict] = {}

    def start(self, label, total):
        key = len(self.tasks)
        self.tasks[key] = {"label": label, "total": total, "done": [], "stopped": False}
        return key

    def update(self, key, done):
        self.tasks[key]["done"].append(done)

    def stop(self, key):
        self.tasks[key]["stopped"] = True

    def by_label(self, prefix):
        return [t for t in self.tasks.values() if t["label"].startswith(prefix)]


def _finished(t):
    done = t["done"]
    return t["stopped"] and done and done == sorted(done) and done[-1] == t["total"]


def test_without_a_listener_nothing_is_told():
    with progress.task("x", 3) as bar:
        bar.advance()
    assert bar.done == 1.0


def test_reading_a_drawing_advances_to_its_size(tmp_path):
    path = tmp_path / "winch.dxf"
    winch_two_shoe().save(path)
    rec = Recorder()
    with progress.listening(rec):
        load_fast(path, Config().role_of_layer())
    (t,) = rec.by_label("reading winch.dxf")
    assert t["total"] == path.stat().st_size and _finished(t)


def test_sampling_advances_by_the_samples_of_each_chunk():
    mech = build_mechanism(read_drawing(WINCH))
    rec = Recorder()
    with progress.listening(rec):
        sample_design(mech, (0.3, 0.4), 200, chunk=50)
    tasks = rec.by_label("sampling")
    assert sorted(t["label"] for t in tasks) == ["sampling ccw", "sampling cw"]
    for t in tasks:
        assert t["total"] == 200 and _finished(t) and t["done"] == [50, 100, 150, 200]


def test_compare_advances_one_revision_at_a_time(capsys):
    rec = Recorder()
    with progress.listening(rec):
        assert cli.main(["compare", str(WINCH), str(WINCH), str(WINCH)]) == 0
    (t,) = rec.by_label("checking revisions")
    assert t["total"] == 3 and t["done"] == [1, 2, 3] and t["stopped"]


def _stderr_on_a_terminal(*args, stdout_too=False):
    """Run the command with its standard error (and with ``stdout_too`` its
    standard output) on a pseudo-terminal; return (exit code, what the
    terminal got, standard output if piped)."""
    leader, follower = pty.openpty()
    got = bytearray()

    def drain():
        while True:
            try:
                chunk = os.read(leader, 65536)
            except OSError:
                return
            if not chunk:
                return
            got.extend(chunk)

    reader = threading.Thread(target=drain, daemon=True)
    reader.start()
    env = dict(os.environ, TERM="xterm-256color", COLUMNS="100")
    env.pop("NO_COLOR", None)
    done = subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)],
        stdout=follower if stdout_too else subprocess.PIPE,
        stderr=follower,
        env=env,
        timeout=300,
    )
    os.close(follower)
    reader.join(timeout=10)
    os.close(leader)
    return done.returncode, got.decode("utf-8", "replace"), (done.stdout or b"").decode()


@pytest.mark.skipif(not hasattr(os, "openpty"), reason="needs a pseudo-terminal")
def test_bars_show_on_a_terminal_and_nowhere_else():
    args = ("solve", WINCH, "--mu", "0.3..0.4", "--samples", "20000")
    code, terminal, out = _stderr_on_a_terminal(*args)
    assert code == 0 and "sampling cw" in terminal and "sampling ccw" in terminal and "sampling cw" not in out
    piped = subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=300
    )
    assert piped.returncode == 0 and "sampling cw" not in piped.stderr + piped.stdout
    code, terminal, _ = _stderr_on_a_terminal(*args, "--json")  # --json: no bars, as batch
    assert code == 0 and "sampling cw" not in terminal


@pytest.mark.skipif(not hasattr(os, "openpty"), reason="needs a pseudo-terminal")
def test_the_report_after_the_bars_is_whole_on_one_terminal():
    """Both streams on one terminal: the bars run only while the work does,
    so the report printed after them comes out whole."""
    code, terminal, _ = _stderr_on_a_terminal("solve", WINCH, "--mu", "0.3..0.4", "--samples", "20000", stdout_too=True)
    assert code == 0 and "sampling cw" in terminal
    report = terminal[terminal.rindex("sampling ccw") :]
    assert "qualified engineer" in report and "p50" in report
