"""Hostile and unlucky inputs get a bounded, honest answer (issue 14).

Every case runs the real command (``python -m dxfcheck``) in a child process
with a wall-clock limit and an address-space limit (:data:`MEMORY_LIMIT`),
and asserts the child's own peak memory (``os.wait4``'s ``ru_maxrss``) and
time.  The bounds are common practice for a command-line tool on a drawing
of a few kB: answers within seconds, never more than a few hundred MB.
"""

from __future__ import annotations

import os
import resource
import subprocess
import sys
import time
from dataclasses import dataclass
from pathlib import Path

import hostile
import pytest
from common import winch_two_shoe
from schema_check import output_json

ROOT = Path(__file__).resolve().parents[2]  # the repository
#: Address space of each child [bytes]: numpy and its threads fit well within.
MEMORY_LIMIT = 1_500_000_000
#: Peak resident memory a child may reach [kB].
PEAK_KB = 600_000


@dataclass(frozen=True)
class Run:
    code: int
    out: str
    err: str
    seconds: float
    peak_kb: int


def _limit_memory() -> None:  # pragma: no cover - runs in the child
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))


def dxfcheck(*args: object, cwd: Path | None = None, limit_s: float = 60.0, env: dict[str, str] | None = None) -> Run:
    """Run ``python -m dxfcheck ARGS`` with the limits; its peak memory from
    ``wait4`` (that child's own, not the other tests')."""
    out_f = (cwd or Path("/tmp")) / f".out-{os.getpid()}-{time.monotonic_ns()}"
    err_f = out_f.with_suffix(".err")
    t0 = time.monotonic()
    with open(out_f, "w") as out, open(err_f, "w") as err:
        proc = subprocess.Popen(
            [sys.executable, "-m", "dxfcheck", *map(str, args)],
            stdout=out,
            stderr=err,
            stdin=subprocess.DEVNULL,
            cwd=cwd,
            preexec_fn=_limit_memory,
            env={**os.environ, "PYTHONPATH": str(ROOT), **(env or {})},
        )
        while True:
            pid, status, usage = os.wait4(proc.pid, os.WNOHANG)
            if pid:
                break
            if time.monotonic() - t0 > limit_s:
                proc.kill()
                os.wait4(proc.pid, 0)
                pytest.fail(f"dxfcheck {' '.join(map(str, args))} ran longer than {limit_s} s")
            time.sleep(0.02)
    proc.returncode = os.waitstatus_to_exitcode(status)
    run = Run(proc.returncode, out_f.read_text(), err_f.read_text(), time.monotonic() - t0, usage.ru_maxrss)
    out_f.unlink()
    err_f.unlink()
    assert run.peak_kb < PEAK_KB, (run.peak_kb, args)
    assert "Traceback" not in run.err, run.err
    assert "internal error" not in run.err, run.err
    for line in run.err.strip().splitlines():  # every message in the tool's own format
        assert line.startswith(("dxfcheck:", "usage:", " ")), line
    return run


@pytest.fixture(scope="module")
def winch(tmp_path_factory) -> Path:
    folder = tmp_path_factory.mktemp("winch")
    path = folder / "winch.dxf"
    winch_two_shoe().save(path)
    return path


# --- blocks that multiply (items 4, 7) ---------------------------------------------


def test_a_block_that_inserts_itself_is_an_error_found_at_once(tmp_path):
    run = dxfcheck("solve", hostile.self_insert(tmp_path), limit_s=30)
    assert run.code == 2 and "D113" in run.err and "'LOOP' inserts itself" in run.err
    assert run.seconds < 15


def test_blocks_that_fan_out_are_refused_naming_them(tmp_path):
    """Ten references per block, twelve levels: 10^12 placements."""
    run = dxfcheck("solve", hostile.fan_out(tmp_path), limit_s=30)
    assert run.code == 2 and "'F12' places" in run.err and "Explode or purge" in run.err
    assert run.seconds < 15


def test_a_huge_minsert_array_is_refused(tmp_path):
    run = dxfcheck("solve", hostile.minsert(tmp_path), limit_s=30)
    assert run.code == 2 and "'ARRAY' places" in run.err


def test_skeleton_entities_are_counted_as_they_are_placed(tmp_path):
    """1000 placements of ten link pieces: refused at the 2000-entity limit
    of the skeleton, while the walk runs."""
    run = dxfcheck("solve", hostile.placed_skeleton(tmp_path), limit_s=30)
    assert run.code == 2 and "more than 2000 entities on the skeleton layers" in run.err


def test_a_skeleton_placed_on_itself_many_times_is_refused(tmp_path):
    run = dxfcheck("solve", hostile.placed_skeleton(tmp_path, copies=100_000, spacing=0.0), limit_s=30)
    assert run.code == 2 and "drawn over one another" in run.err and "'TEN'" in run.err


def test_a_deep_chain_of_blocks_is_read_in_bounded_time(tmp_path):
    run = dxfcheck("solve", hostile.deep_chain(tmp_path, n=20_000), "--json", limit_s=60)
    assert run.code == 0
    doc = output_json(run.out)
    assert len(doc["mechanism"]["pins"]) == 7
    assert any("nested deeper than 32" in f["message"] for f in doc["findings"])


def test_duplicate_findings_are_summed_up(tmp_path):
    import dxfcheck as lib

    d = lib.read_drawing(hostile.placed_skeleton(tmp_path, copies=300, spacing=0.0))
    dups = [f for f in d.findings if f.code.value[0] == "D108"]
    assert len(dups) == 51 and "more entities drawn twice" in dups[-1].message


def test_both_readers_agree_on_hostile_blocks(tmp_path):
    import dxfcheck as lib
    from dxfcheck.core.errors import DrawingReadError

    for path in (hostile.self_insert(tmp_path), hostile.deep_chain(tmp_path, n=50)):
        assert lib.read_drawing(path, reader="fast") == lib.read_drawing(path, reader="full")
    for path in (hostile.fan_out(tmp_path), hostile.minsert(tmp_path), hostile.placed_skeleton(tmp_path)):
        messages = []
        for reader in ("fast", "full"):
            with pytest.raises(DrawingReadError) as info:
                lib.read_drawing(path, reader=reader)
            messages.append(info.value.message)
        assert messages[0] == messages[1]


# --- the time limit (items 3, 5) ----------------------------------------------------


def test_a_time_limit_is_never_taken_for_a_reading_problem(tmp_path):
    """The winch inside a block with 40 000 clutter lines: whenever the
    limit fires, the run ends with exit 2 and its own message; a run that
    ends in time has all 7 pins and no damage finding (before: 5 parts and
    6 pins, exit 0, a false D109)."""
    path = hostile.clutter_block(tmp_path)
    for limit in ("0.4", "0.8", "1.2", "1.6", "30"):
        run = dxfcheck("solve", path, "--json", "--timeout", limit, limit_s=60)
        if run.code == 2:
            assert f"took longer than {limit} s (--timeout)" in run.err
            assert output_json(run.out)["error"]
        else:
            doc = output_json(run.out)
            assert run.code == 0 and len(doc["mechanism"]["pins"]) == 7
            assert not [f for f in doc["findings"] if f["code"] in ("D106", "D109")]
    assert run.code == 0  # with 30 s it ends in time


def test_the_handlers_let_a_time_limit_through(tmp_path, winch, monkeypatch):
    """The block walk, the strict→recover and the fast→full fallbacks catch
    reading problems only."""
    import dxfcheck.read.drawing as drawing
    import dxfcheck.read.fast as fastread
    from dxfcheck.core.deadline import TimeLimitExceeded

    def expired(*args, **kwargs):
        raise TimeLimitExceeded(1.0, "test")

    with monkeypatch.context() as m:
        m.setattr(drawing, "_take", expired)
        with pytest.raises(TimeLimitExceeded):
            drawing.read_drawing(winch)
    with monkeypatch.context() as m:
        m.setattr("ezdxf.filemanagement.readfile", expired)
        m.setattr("ezdxf.recover.readfile", lambda *a: pytest.fail("recover mode tried"))
        with pytest.raises(TimeLimitExceeded):
            drawing.read_drawing(winch, reader="full")
    with monkeypatch.context() as m:
        m.setattr(fastread, "load_fast", expired)
        m.setattr(drawing, "load_document", lambda *a, **k: pytest.fail("full reader tried"))
        with pytest.raises(TimeLimitExceeded):
            drawing.read_drawing(winch, reader="fast")


def test_sampling_stops_at_the_deadline(winch):
    run = dxfcheck("solve", winch, "--samples", "1000000", "--timeout", "3", limit_s=60)
    assert run.code == 2 and "took longer than 3 s (--timeout)" in run.err
    assert run.seconds < 20


def test_the_sampling_bound_is_the_same_in_cli_and_library():
    from dxfcheck import cli
    from dxfcheck.statics import sampling as sensitivity

    assert cli.MAX_SAMPLES == sensitivity.MAX_SAMPLES


@pytest.mark.parametrize("value", ["0", "-1", "nan", "inf", "1e12", "soon"])
def test_time_limits_that_are_no_limits_are_refused(winch, value):
    run = dxfcheck("solve", winch, f"--timeout={value}", limit_s=30)
    assert run.code == 2 and "--timeout" in run.err


@pytest.mark.parametrize("value", ["0", "-1", "nan", "inf", "1e30"])
def test_size_limits_that_are_no_limits_are_refused(winch, value):
    run = dxfcheck("solve", winch, f"--max-size={value}", limit_s=30)
    assert run.code == 2 and "--max-size" in run.err


# --- special and endless files (items 5, 8) -------------------------------------------


def test_special_files_are_refused_before_they_are_opened(tmp_path, winch):
    fifo = tmp_path / "pipe.dxf"
    os.mkfifo(fifo)
    run = dxfcheck("solve", fifo, limit_s=20)
    assert run.code == 2 and "not a regular file" in run.err and str(fifo) in run.err
    config_fifo = tmp_path / "pipe.toml"
    os.mkfifo(config_fifo)
    for config, shown in ((config_fifo, str(config_fifo)), ("/dev/zero", "/dev/zero"), (tmp_path, str(tmp_path))):
        run = dxfcheck("solve", winch, "--config", config, limit_s=20)
        assert run.code == 2 and shown in run.err and "the project file is" in run.err
        assert str(winch) not in run.err  # the drawing is not blamed
    folder = tmp_path / "side"
    folder.mkdir()
    drawing = folder / "w.dxf"
    drawing.write_bytes(winch.read_bytes())
    os.mkfifo(folder / "w.toml")
    for command in ("solve", "check"):
        run = dxfcheck(command, drawing, limit_s=20)
        assert run.code == 2 and "w.toml" in run.err and "sidecar" in run.err


def test_big_project_files_and_sidecars_are_refused_naming_them(tmp_path, winch):
    drawing = tmp_path / "w.dxf"
    drawing.write_bytes(winch.read_bytes())
    (tmp_path / "w.toml").write_text("[spec]\n" + "# padding\n" * 200_000)
    run = dxfcheck("check", drawing, limit_s=20)
    assert run.code == 2 and "w.toml" in run.err and "larger than 1 MB" in run.err


# --- values out of range (item 15) --------------------------------------------------


@pytest.mark.parametrize(
    ("args", "named"),
    [
        (("check", "--set", "mu=1e308"), "mu"),
        (("check", "--set", "buckling_safety=inf", "--json"), "buckling_safety"),
        (("check", "--set", "pin_length=1e300mm"), "pin_length"),
        (("check", "--mu-max", "35"), "mu_max"),
        (("solve", "--torque=1e300N*m"), "--torque"),
        (("solve", "--effort", "1e300 N"), "--effort"),
        (("solve", "--mu", "1e308"), "--mu"),
        (("solve", "--mu", "0.3..inf", "--samples", "10"), "--mu"),
        (("solve", "--samples", "1000000000"), "--samples"),
        (("solve", "--samples", "10", "--seed", "-1"), "--seed"),
        (("solve", "--long-threshold", "nan"), "--long-threshold"),
        (("solve", "--tolerance", "1e300mm"), "--tolerance"),
        (("annotate", "--mu", "inf"), "--mu"),
    ],
)
def test_values_out_of_range_are_named(winch, tmp_path, args, named):
    run = dxfcheck(args[0], winch, *args[1:], limit_s=30, cwd=tmp_path)
    assert run.code == 2 and named in run.err, run.err
    if "--json" in args:
        assert output_json(run.out)["error"]


def test_a_toml_integer_of_thousands_of_digits_is_refused(tmp_path, winch):
    config = tmp_path / "huge.toml"
    config.write_text(f"[spec]\nmu = {'9' * 5000}\n")
    run = dxfcheck("check", winch, "--config", config, limit_s=20)
    assert run.code == 2 and str(config) in run.err
    config.write_text(f"[spec]\nholding_brakes = {'9' * 400}\n")
    run = dxfcheck("check", winch, "--config", config, limit_s=20)
    assert run.code == 2 and "holding_brakes" in run.err and "400 digits" in run.err


# --- what follows the end-of-file marker (item 17) ----------------------------------


@pytest.mark.parametrize("kind", ["ctrl-z", "nul-padding", "text", "blank-lines"])
def test_what_follows_a_complete_eof_is_ignored_with_a_finding(tmp_path, kind):
    import dxfcheck as lib

    path = hostile.eof_trailer(tmp_path, kind)
    run = dxfcheck("solve", path, "--json", limit_s=30)
    assert run.code == 0, run.err
    doc = output_json(run.out)
    after = [f for f in doc["findings"] if f["code"] == "D112"]
    assert len(after) == (0 if kind == "blank-lines" else 1)
    assert lib.read_drawing(path, reader="fast") == lib.read_drawing(path, reader="full")


def test_a_file_cut_before_its_eof_is_still_refused(tmp_path):
    path = hostile.eof_trailer(tmp_path, "text")
    data = path.read_bytes()
    cut = data[: data.rindex(b"EOF") - 1] + b"\x1a"
    path.write_bytes(cut)
    run = dxfcheck("solve", path, limit_s=30)
    assert run.code == 2 and "cut off" in run.err


# --- project files (items 14, 18) ---------------------------------------------------


def _layers_toml(pin: str = "NOTHING") -> str:
    return f'[layers]\npin = ["{pin}"]\n'


def test_a_project_file_in_a_folder_others_can_write_is_not_read(tmp_path, winch):
    shared = tmp_path / "shared"
    (shared / "me").mkdir(parents=True)
    shared.chmod(0o1777)
    (shared / "dxfcheck.toml").write_text(_layers_toml())
    drawing = shared / "me" / "w.dxf"
    drawing.write_bytes(winch.read_bytes())
    run = dxfcheck("solve", drawing, "--json", limit_s=30)
    assert run.code == 0 and output_json(run.out)["config"] is None


@pytest.mark.parametrize("marker", [".git", "pyproject.toml"])
def test_the_search_stops_at_a_project_root(tmp_path, winch, marker):
    (tmp_path / "dxfcheck.toml").write_text(_layers_toml())
    repo = tmp_path / "repo"
    (repo / "drawings").mkdir(parents=True)
    (repo / marker).mkdir() if marker == ".git" else (repo / marker).write_text("[project]\nname = 'x'\n")
    drawing = repo / "drawings" / "w.dxf"
    drawing.write_bytes(winch.read_bytes())
    run = dxfcheck("solve", drawing, "--json", limit_s=30)
    assert run.code == 0 and output_json(run.out)["config"] is None
    (repo / "dxfcheck.toml").write_text("[spec]\nmu = 0.3\n")
    run = dxfcheck("solve", drawing, "--json", limit_s=30)
    assert output_json(run.out)["config"] == str((repo / "dxfcheck.toml").resolve())


def test_the_project_file_used_is_in_every_report(tmp_path, winch):
    (tmp_path / "dxfcheck.toml").write_text(_layers_toml("PIN"))
    drawing = tmp_path / "w.dxf"
    drawing.write_bytes(winch.read_bytes())
    config = str((tmp_path / "dxfcheck.toml").resolve())
    for command in ("solve", "check"):
        assert output_json(dxfcheck(command, drawing, "--json", limit_s=30).out)["config"] == config
        assert "mapfrom" + config in "".join(dxfcheck(command, drawing, limit_s=30).out.split())


def _vendor(folder: Path) -> Path:
    """A vendor's drawing on its own layer names with its own file
    ``brake.toml`` beside it: layers and a spec."""
    sk = winch_two_shoe()
    sk.layers = {"pin": "V-PIN", "pivot": "V-PIV", "link": "V-CL"}
    folder.mkdir(parents=True, exist_ok=True)
    path = folder / "brake.dxf"
    sk.save(path)
    (folder / "brake.toml").write_text(
        '[layers]\npin = ["V-PIN"]\npivot = ["V-PIV"]\nlink = ["V-CL"]\n\n[spec]\nrequired_torque = "100 N*m"\n'
    )
    return path


def test_the_drawing_s_own_file_is_read_alike_by_every_command(tmp_path):
    """One rule (README, configuration): NAME.toml beside NAME.dxf may hold
    [layers], [markup] and [spec]; solve, check, compare and batch read it."""
    old, new = _vendor(tmp_path / "rev-a"), _vendor(tmp_path / "rev-b")
    solved = output_json(dxfcheck("solve", old, "--json", limit_s=30).out)
    assert len(solved["mechanism"]["pins"]) == 7 and solved["sidecar"] == str(old.with_suffix(".toml"))
    checked = dxfcheck("check", old, "--json", limit_s=30)
    doc = output_json(checked.out)
    assert checked.code == 0 and len(doc["mechanism"]["pins"]) == 7
    assert any(v["key"] == "required_torque" and "brake.toml" in v["source"] for v in doc["spec"])
    named = dxfcheck("check", old, "--config", old.with_suffix(".toml"), "--json", limit_s=30)
    assert named.code == 0 and output_json(named.out)["config"] == str(old.with_suffix(".toml"))
    compared = dxfcheck("compare", old, new, limit_s=60)
    assert compared.code == 0, compared.err
    batch = dxfcheck("batch", tmp_path, "--json", "--no-cache", limit_s=120)
    statuses = {Path(r["drawing"]).parent.name: r["status"] for r in output_json(batch.out)["results"]}
    assert statuses == {"rev-a": "pass", "rev-b": "pass"}, batch.out


def test_a_sidecar_layer_map_is_checked_against_the_project_file(tmp_path, winch):
    (tmp_path / "dxfcheck.toml").write_text('[layers]\npivot = ["FIX"]\n')
    drawing = tmp_path / "w.dxf"
    drawing.write_bytes(winch.read_bytes())
    (tmp_path / "w.toml").write_text('[layers]\npin = ["FIX"]\n')
    run = dxfcheck("solve", drawing, limit_s=30)
    assert run.code == 2 and "w.toml" in run.err and "two roles" in run.err


# --- ezdxf's own messages (item 20) -------------------------------------------------


def test_ezdxf_messages_become_findings(tmp_path, winch):
    lines = winch.read_text().split("\n")
    at = lines.index("DRUM", lines.index("ENTITIES"))
    lines[at + 1 : at + 1] = [" 62", "1e999"]  # an integer group code with a value ezdxf repairs
    path = tmp_path / "odd.dxf"
    path.write_text("\n".join(lines))
    run = dxfcheck("solve", path, "--json", limit_s=30)
    assert run.err == ""  # nothing outside the report
    messages = [f["message"] for f in output_json(run.out)["findings"]]
    assert any('invalid integer value "1e999"' in m for m in messages)
