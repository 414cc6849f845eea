"""Batch runs over folders: discovery, errors, cache, parallel workers, and
the hostile cases of issue 14 (items 1, 2, 6, 8, 13): a cache that cannot
lie, a pool that is bounded in size and time and dies with its parent,
special files and symbolic links that are never opened.

The hostile cases run the real command (``python -m dxfcheck batch``) in a
subprocess, each bounded by a subprocess timeout.  Where they compare a
verdict, the reference is a direct ``dxfcheck check`` of the same drawing
(the batch must give the same verdict: common practice for a cache, which
may only save time).  The time limit uses the test hook
``DXFCHECK_TEST_SLOW`` (see :mod:`dxfcheck.batch`).
"""

from __future__ import annotations

import contextlib
import csv
import io
import json
import math
import os
import re
import shutil
import signal
import stat
import subprocess
import sys
import time
from pathlib import Path

import pytest
from common import ROOT, conveyor_block, winch_two_shoe
from schema_check import output_json

from dxfcheck import batch, cli
from dxfcheck.batch import (
    KEY_FILE,
    MAX_JOBS_PER_CORE,
    CheckOptions,
    cache_key,
    discover,
    find_drawings,
    run_batch,
    worker_count,
)

#: Bound of one subprocess run [s]; a hung batch fails the test instead of the run.
RUN_S = 90
DEMOS = ("winch_two_shoe.dxf", "conveyor_block.dxf", "capstan_band.dxf")


@pytest.fixture
def folder(tmp_path):
    d = tmp_path / "vault"
    (d / "sub").mkdir(parents=True)
    winch_two_shoe().save(d / "winch_two_shoe.dxf")
    conveyor_block().save(d / "sub" / "conveyor.dxf")
    out = d / "sub" / "conveyor-forces.dxf"  # a marked-up output (it carries dxfcheck's marker): skipped
    conveyor_block().save(out)
    out.write_bytes(b"999\nDXFCHECK_OUTPUT 0.1.0\n" + out.read_bytes())
    (d / "sub" / "broken.dxf").write_text("not a drawing\n")
    shutil.copy(ROOT / "drawings" / "dxfcheck.toml", d / "dxfcheck.toml")
    return d


@pytest.fixture
def demos(tmp_path):
    """The demo drawings and their project file, in a folder of their own."""
    d = tmp_path / "demos"
    d.mkdir()
    for name in (*DEMOS, "dxfcheck.toml"):
        shutil.copy(ROOT / "drawings" / name, d / name)
    return d


def _run(*args: str, env: dict[str, str] | None = None, timeout: float = RUN_S) -> subprocess.CompletedProcess[str]:
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *args],
        capture_output=True,
        text=True,
        timeout=timeout,
        env={**os.environ, **(env or {})},
    )


def _batch_json(*args: str, env: dict[str, str] | None = None) -> tuple[int, dict]:
    done = _run("batch", *args, "--json", env=env)
    assert done.stdout, done.stderr
    return done.returncode, output_json(done.stdout)


def _direct(path: Path) -> tuple[str, list[str]]:
    """Verdict and failed rules of a direct ``dxfcheck check`` (the command
    line, run in this process: the batches are the subprocesses)."""
    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        rc = cli.main(["check", str(path), "--json"])
    doc = output_json(buf.getvalue())
    assert rc == (1 if doc["verdict"] == "fail" else 0)
    return doc["verdict"], [r["rule"] for r in doc["rules"] if r["verdict"] == "fail"]


def _verdicts(doc: dict) -> dict[str, tuple[str, list[str]]]:
    return {Path(r["drawing"]).name: (r["status"], r["failed_rules"]) for r in doc["results"]}


def _dead(pid: int) -> bool:
    """Gone, or a zombie (killed; only waiting for a parent to reap it)."""
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return True
    try:
        state = Path(f"/proc/{pid}/stat").read_text().rsplit(")", 1)[1].split()[0]
    except FileNotFoundError:
        return True
    return state in ("Z", "X")


# ---------------------------------------------------------------------------
# discovery, results, the cache


def test_discover_recurses_and_skips_outputs(folder):
    names = [p.name for p in discover([str(folder)])]
    assert names == ["broken.dxf", "conveyor.dxf", "winch_two_shoe.dxf"]
    assert [p.name for p in discover([str(folder / "sub" / "*.dxf")])] == ["broken.dxf", "conveyor.dxf"]


def test_bad_file_does_not_stop_the_batch(folder, tmp_path):
    result = run_batch(discover([str(folder)]), jobs=1, cache_dir=str(tmp_path / "cache"))
    status = {r.drawing.split("/")[-1]: r.status for r in result.results}
    assert status == {"broken.dxf": "error", "conveyor.dxf": "pass", "winch_two_shoe.dxf": "fail"}
    broken = next(r for r in result.results if r.status == "error")
    assert "not a DXF file" in broken.message


def test_parallel_equals_serial(folder, tmp_path):
    paths = discover([str(folder)])
    one = run_batch(paths, jobs=1, use_cache=False)
    two = run_batch(paths, jobs=2, use_cache=False)
    strip = [(r.drawing, r.status, r.torque_cw_Nm, r.failed_rules) for r in one.results]
    assert strip == [(r.drawing, r.status, r.torque_cw_Nm, r.failed_rules) for r in two.results]


def test_cache_skips_unchanged_and_sees_changes(folder, tmp_path):
    cache = str(tmp_path / "cache")
    paths = discover([str(folder)])
    first = run_batch(paths, jobs=1, cache_dir=cache)
    assert not any(r.cached for r in first.results)
    second = run_batch(paths, jobs=1, cache_dir=cache)
    assert [r.cached for r in second.results] == [False, True, True]  # errors are checked again
    assert [r.torque_cw_Nm for r in second.results] == [r.torque_cw_Nm for r in first.results]
    assert second.cache_rejected == 0
    # a changed drawing, and a changed spec, are checked again
    sk = conveyor_block()
    sk.load(400, 210, 0, -1, "10 N")
    sk.save(folder / "sub" / "conveyor.dxf")
    third = run_batch(paths, jobs=1, cache_dir=cache)
    assert [r.cached for r in third.results] == [False, False, True]
    fourth = run_batch(paths, jobs=1, cache_dir=cache, options=CheckOptions(overrides=(("mu", "0.3"),)))
    assert not any(r.cached for r in fourth.results)
    assert not any(r.cached for r in run_batch(paths, jobs=1, cache_dir=cache, use_cache=False).results)


def test_cache_key_covers_every_input_of_the_verdict(demos, tmp_path):
    """Name, path, project file, sidecar and every option change the key;
    the same inputs give the same key."""
    winch = demos / "winch_two_shoe.dxf"
    base = cache_key(winch, CheckOptions())
    assert cache_key(winch, CheckOptions()) == base
    copy = demos / "copy.dxf"
    shutil.copy(winch, copy)
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    shutil.copy(winch, elsewhere / winch.name)
    keys = {
        "name": cache_key(copy, CheckOptions()),
        "path": cache_key(elsewhere / winch.name, CheckOptions()),
        "overrides": cache_key(winch, CheckOptions(overrides=(("mu", "0.3"),))),
        "units": cache_key(winch, CheckOptions(units="mm")),
        "tolerance": cache_key(winch, CheckOptions(tolerance_mm=0.05)),
        "max size": cache_key(winch, CheckOptions(max_bytes=10**7)),
        "config": cache_key(winch, CheckOptions(config=str(demos / "dxfcheck.toml"))),
        "skeleton from layers": cache_key(winch, CheckOptions(skeleton_from="layers")),
        "skeleton from geometry": cache_key(winch, CheckOptions(skeleton_from="geometry")),
    }
    (demos / "winch_two_shoe.toml").write_text("[spec]\nmu = 0.3\n")
    keys["sidecar"] = cache_key(winch, CheckOptions())
    (demos / "winch_two_shoe.toml").write_text("[spec]\nmu = 0.31\n")
    keys["sidecar content"] = cache_key(winch, CheckOptions())
    (demos / "winch_two_shoe.toml").unlink()
    toml = demos / "dxfcheck.toml"
    toml.write_text(toml.read_text() + "\n# a comment\n")
    keys["project content"] = cache_key(winch, CheckOptions())
    assert base not in keys.values() and len(set(keys.values())) == len(keys), keys


def test_same_bytes_under_another_name_keeps_its_own_verdict(demos, tmp_path):
    """Issue 14.1: the copy (no spec section: the defaults pass) batched first
    must not lend its PASS to the original, which fails 3 rules checked
    directly."""
    copy = demos / "copy.dxf"
    shutil.copy(demos / "winch_two_shoe.dxf", copy)
    assert _direct(copy)[0] == "pass"
    want = _direct(demos / "winch_two_shoe.dxf")
    assert want[0] == "fail" and len(want[1]) == 3
    cache = str(tmp_path / "cache")
    rc, doc = _batch_json(str(copy), "--cache-dir", cache)
    assert rc == 0 and doc["counts"]["pass"] == 1
    for _ in range(2):  # checked, then from the cache: the same verdict both times
        rc, doc = _batch_json(str(demos / "winch_two_shoe.dxf"), "--cache-dir", cache)
        assert rc == 1 and _verdicts(doc)["winch_two_shoe.dxf"] == want
    assert doc["results"][0]["cached"] is True


def test_skeleton_from_applies_to_every_drawing_and_keys_the_cache(tmp_path):
    """``batch --skeleton-from``: a drafted drawing (no role layers) under a
    project file that says ``skeleton_from = "layers"`` is an error read from
    the layers, and with ``geometry`` gives the verdict of a direct ``check
    --skeleton-from geometry``; each run is keyed by the option, so neither
    answer comes from the other's cache record (a cache may only save time:
    common practice)."""
    d = tmp_path / "drafted"
    d.mkdir()
    shutil.copy(ROOT / "drawings" / "drafted" / "winch_outlines.dxf", d / "winch_outlines.dxf")
    toml = ROOT / "drawings" / "dxfcheck.toml"
    (d / "dxfcheck.toml").write_text(toml.read_text() + '\n[infer]\nskeleton_from = "layers"\n')
    buf = io.StringIO()
    with contextlib.redirect_stdout(buf):
        cli.main(["check", str(d / "winch_outlines.dxf"), "--json", "--skeleton-from", "geometry"])
    direct = output_json(buf.getvalue())
    assert direct["skeleton"] == "geometry (outlines)"
    want = (direct["verdict"], [r["rule"] for r in direct["rules"] if r["verdict"] == "fail"])
    cache = str(tmp_path / "cache")
    for cached in (False, True):
        rc, doc = _batch_json(str(d), "--cache-dir", cache)  # the project file's "layers"
        assert rc == 2 and doc["results"][0]["status"] == "error" and "M201" in doc["results"][0]["message"]
        assert doc["results"][0]["cached"] is False  # errors are never cached
        for option in ("geometry", "auto"):
            rc, doc = _batch_json(str(d), "--cache-dir", cache, "--skeleton-from", option)
            assert _verdicts(doc)["winch_outlines.dxf"] == want, option
            assert doc["results"][0]["cached"] is cached, option
        rc, doc = _batch_json(str(d), "--cache-dir", cache, "--skeleton-from", "layers")
        assert doc["results"][0]["status"] == "error" and doc["results"][0]["cached"] is False


def test_skeleton_from_is_checked_before_the_batch():
    """A library call with an unknown source is refused naming the option."""
    from dxfcheck.batch import check_inputs
    from dxfcheck.core.errors import ConfigError

    with pytest.raises(ConfigError, match="--skeleton-from must be one of auto, layers, geometry, got 'both'"):
        check_inputs(CheckOptions(skeleton_from="both"), jobs=1, timeout_each_s=10.0)


def test_batch_gives_the_verdicts_of_direct_checks(demos, tmp_path):
    """Every demo: the batch, checked and from the cache, says what a direct
    ``check`` says."""
    want = {name: _direct(demos / name) for name in DEMOS}
    cache = str(tmp_path / "cache")
    for cached in (False, True):
        rc, doc = _batch_json(str(demos), "--cache-dir", cache)
        assert _verdicts(doc) == want
        assert all(r["cached"] is cached for r in doc["results"])
        assert rc == (1 if any(v == "fail" for v, _ in want.values()) else 0)


def test_cli_outputs_and_exit_codes(folder, tmp_path, capsys):
    cache = str(tmp_path / "c")
    rc = cli.main(["batch", str(folder), "--json", "--cache-dir", cache, "--jobs", "2"])
    doc = output_json(capsys.readouterr().out)
    assert rc == 2  # one drawing unusable
    assert doc["schema"] == "dxfcheck.batch/2"
    assert doc["counts"] == {"pass": 1, "warn": 0, "fail": 1, "error": 1, "timeout": 0}
    assert doc["cache_records_rejected"] == 0 and doc["interrupted"] is False
    # dxfcheck's own output is skipped by its marker, and said so
    assert [(Path(s["path"]).name, "marked-up copy" in s["reason"]) for s in doc["skipped"]] == [
        ("conveyor-forces.dxf", True)
    ]
    rc = cli.main(["batch", str(folder / "winch_two_shoe.dxf"), "--csv", "--cache-dir", cache])
    rows = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    assert rc == 1 and rows[0]["status"] == "fail" and "pin.bearing.S1" in rows[0]["failed_rules"]
    rc = cli.main(["batch", str(folder / "sub" / "conveyor.dxf"), "--cache-dir", cache])
    assert rc == 0 and "1 passed" in capsys.readouterr().out
    assert cli.main(["batch", str(tmp_path / "nothing-here")]) == 2


# ---------------------------------------------------------------------------
# forged cache records (issue 14.2)


def _forgeries() -> dict[str, object]:
    """Each a change to a stored record of the failing winch; every one must
    be rejected and the drawing checked again."""

    def status_pass(doc):  # the forgery of the issue: a pass, signature kept
        doc["result"].update(status="pass", failed_rules=[])

    def unknown_status(doc):
        doc["result"]["status"] = "ok"

    def nan_torque(doc):
        doc["result"]["torque_cw_Nm"] = float("nan")

    def string_for_list(doc):
        doc["result"]["failed_rules"] = "pin.bearing.S1"

    def bad_signature(doc):  # valid content, a signature that is not ours
        doc["mac"] = "0" * 64

    def resigned_pass(doc):  # a pass signed with a key guessed by the forger
        import hashlib
        import hmac

        doc["result"].update(status="pass", failed_rules=[])
        body = json.dumps({"key": doc["key"], "result": doc["result"]}, sort_keys=True, separators=(",", ":"))
        doc["mac"] = hmac.new(b"\0" * 32, body.encode(), hashlib.sha256).hexdigest()

    def extra_field(doc):
        doc["result"]["cached"] = True

    def not_an_object(doc):
        doc.clear()
        doc["format"] = [1, 2]

    return {
        f.__name__: f
        for f in (
            status_pass,
            unknown_status,
            nan_torque,
            string_for_list,
            bad_signature,
            resigned_pass,
            extra_field,
            not_an_object,
        )
    }


def test_forged_cache_records_are_rejected_and_checked_again(tmp_path):
    """One folder per forgery, each holding the failing winch (a key of its
    own); after the forgery every one still fails as a direct check says."""
    forgeries = _forgeries()
    top = tmp_path / "top"
    for name in forgeries:
        d = top / name
        d.mkdir(parents=True)
        for f in ("winch_two_shoe.dxf", "dxfcheck.toml"):
            shutil.copy(ROOT / "drawings" / f, d / f)
    want = _direct(top / "status_pass" / "winch_two_shoe.dxf")
    cache = tmp_path / "cache"
    rc, doc = _batch_json(str(top), "--cache-dir", str(cache))
    assert rc == 1 and doc["counts"]["fail"] == len(forgeries)
    assert stat.S_IMODE((cache / KEY_FILE).stat().st_mode) == 0o600
    assert stat.S_IMODE(cache.stat().st_mode) == 0o700
    for name, forge in forgeries.items():
        record = cache / f"{cache_key(top / name / 'winch_two_shoe.dxf', CheckOptions())}.json"
        doc = json.loads(record.read_text())  # a cache record, not an output
        forge(doc)
        record.write_text(json.dumps(doc))  # NaN is written as the bare word NaN
    rc, doc = _batch_json(str(top), "--cache-dir", str(cache))
    assert rc == 1, doc
    assert doc["cache_records_rejected"] == len(forgeries)
    assert all(r["status"] == "fail" and not r["cached"] for r in doc["results"])
    assert all(r["failed_rules"] == want[1] for r in doc["results"])
    # the records written again are trusted again
    rc, doc = _batch_json(str(top), "--cache-dir", str(cache))
    assert rc == 1 and doc["cache_records_rejected"] == 0 and all(r["cached"] for r in doc["results"])


def test_a_record_moved_to_another_key_is_rejected(demos, tmp_path):
    """The copy's genuine PASS record put in the original's place: the
    signature covers the key, so it is refused."""
    copy = demos / "copy.dxf"
    shutil.copy(demos / "winch_two_shoe.dxf", copy)
    cache = tmp_path / "cache"
    _batch_json(str(copy), "--cache-dir", str(cache))
    src = cache / f"{cache_key(copy, CheckOptions())}.json"
    shutil.copy(src, cache / f"{cache_key(demos / 'winch_two_shoe.dxf', CheckOptions())}.json")
    rc, doc = _batch_json(str(demos / "winch_two_shoe.dxf"), "--cache-dir", str(cache))
    assert rc == 1 and doc["cache_records_rejected"] == 1 and doc["results"][0]["status"] == "fail"


def test_a_shared_signing_key_disables_the_cache(demos, tmp_path):
    """A key readable by others could sign forgeries: the cache is not used,
    and the note says why."""
    cache = tmp_path / "cache"
    _batch_json(str(demos / "conveyor_block.dxf"), "--cache-dir", str(cache))
    os.chmod(cache / KEY_FILE, 0o644)
    rc, doc = _batch_json(str(demos / "conveyor_block.dxf"), "--cache-dir", str(cache))
    assert rc == 0 and not doc["results"][0]["cached"]
    assert any("not private" in n for n in doc["notes"])


# ---------------------------------------------------------------------------
# the pool: bounded in size and time, dies with its parent (issue 14.6)


def test_jobs_are_bounded_by_the_cores(folder):
    cores = worker_count(None)
    assert worker_count(None, 1000) == cores and worker_count(None, 1) == 1
    assert worker_count(MAX_JOBS_PER_CORE * cores) == MAX_JOBS_PER_CORE * cores
    t0 = time.monotonic()
    done = _run("batch", str(folder), "--jobs", "100000", "--no-cache", timeout=30)
    assert done.returncode == 2 and "--jobs 100000" in done.stderr and "CPU cores" in done.stderr
    assert time.monotonic() - t0 < 20 and not done.stdout
    assert _run("batch", str(folder), "--jobs", "0", timeout=30).returncode == 2


@pytest.mark.parametrize("bad", ["0", "-1", "nan", "inf", "1e9"])
def test_timeout_each_is_validated(folder, bad):
    done = _run("batch", str(folder), f"--timeout-each={bad}", "--no-cache", timeout=30)
    assert done.returncode == 2 and "--timeout-each" in done.stderr


def test_a_slow_drawing_is_stopped_and_reported(demos):
    """A drawing over its own time limit is killed with its worker and
    reported ``timeout`` (exit 2); the others are checked as usual."""
    shutil.copy(demos / "conveyor_block.dxf", demos / "slow.dxf")
    t0 = time.monotonic()
    rc, doc = _batch_json(
        str(demos), "--no-cache", "--timeout-each", "3", "--jobs", "2", env={"DXFCHECK_TEST_SLOW": "600:slow.dxf"}
    )
    took = time.monotonic() - t0
    assert rc == 2 and took < 45, took
    got = _verdicts(doc)
    assert got["slow.dxf"][0] == "timeout" and doc["counts"]["timeout"] == 1
    assert got["conveyor_block.dxf"][0] == "pass" and got["winch_two_shoe.dxf"][0] == "fail"
    slow = next(r for r in doc["results"] if r["status"] == "timeout")
    assert "--timeout-each" in slow["message"] and 2.5 < slow["seconds"] < 30


def _start_slow_batch(demos: Path, cache: Path) -> tuple[subprocess.Popen[str], list[int]]:
    """A batch whose two workers sleep; returns it and the workers' pids (from
    the test hook's line on stderr)."""
    proc = subprocess.Popen(
        [sys.executable, "-m", "dxfcheck", "batch", str(demos), "--json", "--jobs", "2", "--cache-dir", str(cache)],
        stdout=subprocess.PIPE,
        stderr=subprocess.PIPE,
        text=True,
        env={**os.environ, "DXFCHECK_TEST_SLOW": "600"},
    )
    pids: list[int] = []
    deadline = time.monotonic() + 60
    while len(pids) < 2 and time.monotonic() < deadline:
        line = proc.stderr.readline()
        m = re.search(r"worker (\d+) sleeps", line)
        if m:
            pids.append(int(m.group(1)))
    if len(pids) < 2:
        proc.kill()
        pytest.fail("the workers did not start")
    return proc, pids


@pytest.mark.parametrize(("sig", "code"), [(signal.SIGTERM, 143), (signal.SIGINT, 130)])
def test_a_signal_ends_the_batch_and_its_workers(demos, tmp_path, sig, code):
    """SIGTERM or SIGINT to the batch: it reports what was done, exits
    128+signal at once, no worker lives on, no temporary file is left."""
    cache = tmp_path / "cache"
    proc, pids = _start_slow_batch(demos, cache)
    t0 = time.monotonic()
    proc.send_signal(sig)
    out, err = proc.communicate(timeout=30)
    assert time.monotonic() - t0 < 15
    assert proc.returncode == code, err
    doc = output_json(out)
    assert doc["interrupted"] is True and doc["signal"] == signal.Signals(sig).name
    assert f"interrupted by {signal.Signals(sig).name}" in err
    deadline = time.monotonic() + 10
    while not all(_dead(p) for p in pids) and time.monotonic() < deadline:
        time.sleep(0.1)
    assert all(_dead(p) for p in pids)
    assert sorted(p.name for p in cache.iterdir()) == [KEY_FILE]


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="the parent-death signal is Linux's")
def test_workers_die_when_the_batch_is_killed(demos, tmp_path):
    """kill -9 leaves the batch no chance to clean up: the workers end by
    themselves (parent-death signal, and the watch on the parent's pid)."""
    proc, pids = _start_slow_batch(demos, tmp_path / "cache")
    proc.kill()
    proc.communicate(timeout=30)
    deadline = time.monotonic() + 10
    while not all(_dead(p) for p in pids) and time.monotonic() < deadline:
        time.sleep(0.1)
    assert all(_dead(p) for p in pids)


# ---------------------------------------------------------------------------
# special files and symbolic links (issues 14.6, 14.8, 14.13)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs FIFOs")
def test_fifos_are_skipped_never_opened(demos, tmp_path):
    """A FIFO named like a drawing, given in a folder or by name, is skipped
    with a message (opening it would block for ever); the batch goes on.  A
    FIFO as a sidecar is that drawing's error; as the project file it is
    refused; both name it."""
    os.mkfifo(demos / "pipe.dxf")
    rc, doc = _batch_json(str(demos), "--no-cache")
    assert rc == 1 and "pipe.dxf" not in _verdicts(doc) and len(doc["results"]) == len(DEMOS)
    assert [Path(s["path"]).name for s in doc["skipped"]] == ["pipe.dxf"]
    assert "FIFO" in doc["skipped"][0]["reason"]
    done = _run("batch", str(demos / "pipe.dxf"), str(demos / "conveyor_block.dxf"), "--no-cache")
    assert done.returncode == 0 and "pipe.dxf: skipped: is a FIFO" in done.stderr
    os.mkfifo(demos / "conveyor_block.toml")  # a sidecar that is a FIFO: that drawing's error, naming it
    rc, doc = _batch_json(str(demos / "conveyor_block.dxf"), "--no-cache")
    assert rc == 2 and "conveyor_block.toml is a FIFO" in doc["results"][0]["message"]
    os.mkfifo(tmp_path / "project.toml")
    done = _run("batch", str(demos), "--config", str(tmp_path / "project.toml"), "--no-cache", timeout=30)
    assert done.returncode == 2 and "project.toml is a FIFO" in done.stderr


def test_oversized_sidecar_and_device_config_are_refused(demos):
    """A sidecar over the limit is that drawing's error, naming the sidecar; a
    device as the project file is refused before any drawing is read."""
    with open(demos / "winch_two_shoe.toml", "wb") as fh:
        fh.write(b"#" * 1_500_000)
    rc, doc = _batch_json(str(demos), "--no-cache")
    winch = next(r for r in doc["results"] if r["drawing"].endswith("winch_two_shoe.dxf"))
    assert rc == 2 and winch["status"] == "error" and "winch_two_shoe.toml" in winch["message"]
    if os.path.exists("/dev/zero"):
        done = _run("batch", str(demos), "--config", "/dev/zero", "--no-cache", timeout=30)
        assert done.returncode == 2 and "/dev/zero is a character device" in done.stderr


SECRET = "SECRET_TOKEN=hunter2-do-not-print"


def test_links_out_of_the_folder_are_not_followed_and_bytes_never_echoed(demos, tmp_path):
    """A link to an environment file outside the folder is skipped; followed
    on request (or named directly) it is refused as not DXF, described
    without its bytes."""
    outside = tmp_path / "private"
    outside.mkdir()
    (outside / "app.env").write_text(SECRET + "\n")
    (outside / "blob.bin").write_bytes(b"\x01\x02SECRET\x7f" * 10)
    (outside / "dir").mkdir()
    shutil.copy(demos / "conveyor_block.dxf", outside / "dir" / "hidden.dxf")
    os.symlink(outside / "app.env", demos / "leak.dxf")
    os.symlink(outside / "blob.bin", demos / "blob.dxf")
    os.symlink(outside / "dir", demos / "linked")
    os.symlink(demos / "conveyor_block.dxf", demos / "inside.dxf")  # stays in the folder: followed

    done = _run("batch", str(demos), "--no-cache", "--json")
    doc = output_json(done.stdout)
    assert "SECRET" not in done.stdout + done.stderr
    assert sorted(Path(s["path"]).name for s in doc["skipped"]) == ["blob.dxf", "leak.dxf", "linked"]
    assert "inside.dxf" in _verdicts(doc) and "hidden.dxf" not in _verdicts(doc)

    for args in (
        (str(demos), "--follow-symlinks", "--no-cache"),
        (str(demos / "leak.dxf"), str(demos / "blob.dxf"), "--no-cache"),  # named: followed
    ):
        done = _run("batch", *args, "--json")
        assert done.returncode == 2
        assert "SECRET" not in done.stdout + done.stderr and "hunter2" not in done.stdout + done.stderr
        got = {Path(r["drawing"]).name: r["message"] for r in output_json(done.stdout)["results"]}
        assert "bytes of text (not shown)" in got["leak.dxf"]
        assert "bytes of binary data (not shown)" in got["blob.dxf"]
        assert ("hidden.dxf" in got) is ("--follow-symlinks" in args)
    direct = _run("check", str(demos / "leak.dxf"))
    assert direct.returncode == 2 and "SECRET" not in direct.stdout + direct.stderr


def test_find_drawings_reports_what_it_skips(demos, tmp_path):
    os.symlink(tmp_path / "nowhere.dxf", demos / "dangling.dxf")
    found = find_drawings([str(demos)])
    assert [p.name for p in found.drawings] == sorted(DEMOS)
    assert [Path(s.path).name for s in found.skipped] == ["dangling.dxf"]
    assert "link" in found.skipped[0].reason


# ---------------------------------------------------------------------------
# a Dask cluster


def test_dask_cluster_gives_the_local_results(folder, tmp_path):
    """A local Dask cluster on loopback runs the same per-drawing work."""
    distributed = pytest.importorskip("distributed")
    from dxfcheck.batch import run_on_cluster

    paths = discover([str(folder)])
    local = run_batch(paths, jobs=1, use_cache=False)
    with distributed.LocalCluster(
        n_workers=2, threads_per_worker=1, host="127.0.0.1", dashboard_address=None, processes=True
    ) as cluster:
        remote = run_on_cluster(paths, cluster.scheduler_address, use_cache=False)
    strip = [(r.drawing, r.status, r.torque_cw_Nm, r.torque_ccw_Nm, r.failed_rules) for r in local.results]
    assert strip == [(r.drawing, r.status, r.torque_cw_Nm, r.torque_ccw_Nm, r.failed_rules) for r in remote.results]


def test_cluster_tasks_hold_every_drawing_once_in_order():
    from dxfcheck.batch import CLUSTER_CHUNK_MAX, CLUSTER_TASKS_PER_WORKER, cluster_chunks

    for n, workers in [(0, 2), (1, 2), (7, 2), (16, 2), (17, 2), (1000, 2), (10_000, 2), (50, 0), (3000, 64)]:
        todo = list(range(n))
        chunks = cluster_chunks(todo, workers)
        assert [x for c in chunks for x in c] == todo
        assert all(1 <= len(c) <= CLUSTER_CHUNK_MAX for c in chunks)
        if n >= CLUSTER_TASKS_PER_WORKER * max(workers, 1):  # enough work: every worker gets several tasks
            assert len(chunks) >= min(CLUSTER_TASKS_PER_WORKER * max(workers, 1), math.ceil(n / CLUSTER_CHUNK_MAX))


def test_unreachable_scheduler_is_a_clean_error(folder, capsys, monkeypatch):
    pytest.importorskip("distributed")
    monkeypatch.setattr(batch, "SCHEDULER_TIMEOUT_S", 1.0)  # refused at once; no need to wait the full time
    rc = cli.main(
        ["batch", str(folder / "winch_two_shoe.dxf"), "--scheduler", "tcp://127.0.0.1:1", "--no-cache", "--json"]
    )
    assert rc == 2 and "Dask scheduler" in capsys.readouterr().err
