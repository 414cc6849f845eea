"""Batch runs over folders: discovery, errors, cache, parallel workers."""

from __future__ import annotations

import csv
import io
import json
import shutil

import pytest
from common import ROOT, conveyor_block, winch_two_shoe

from dxfcheck import cli
from dxfcheck.batch import discover, run_batch


@pytest.fixture
def folder(tmp_path):
    d = tmp_path / "vault"
    (d / "sub").mkdir(parents=True)
    winch_two_shoe().save(d / "winch_two_shoe.dxf")
    conveyor_block().save(d / "sub" / "conveyor.dxf")
    conveyor_block().save(d / "sub" / "conveyor-forces.dxf")  # a marked-up output: skipped
    (d / "sub" / "broken.dxf").write_text("not a drawing\n")
    shutil.copy(ROOT / "drawings" / "dxfcheck.toml", d / "dxfcheck.toml")
    return d


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
    # a changed drawing, and a changed spec, are checked again
    sk = conveyor_block()
    sk.load(400, 210, 0, -1, "10 N")
    sk.save(folder / "sub" / "conveyor.dxf")
    third = run_batch(paths, jobs=1, cache_dir=cache)
    assert [r.cached for r in third.results] == [False, False, True]
    fourth = run_batch(paths, jobs=1, cache_dir=cache, overrides=[("mu", "0.3")])
    assert not any(r.cached for r in fourth.results)
    assert not any(r.cached for r in run_batch(paths, jobs=1, cache_dir=cache, use_cache=False).results)


def test_cli_outputs_and_exit_codes(folder, tmp_path, capsys):
    cache = str(tmp_path / "c")
    rc = cli.main(["batch", str(folder), "--json", "--cache-dir", cache, "--jobs", "2"])
    doc = json.loads(capsys.readouterr().out)
    assert rc == 2  # one drawing unusable
    assert doc["schema"] == "dxfcheck.batch/1" and doc["counts"] == {"pass": 1, "warn": 0, "fail": 1, "error": 1}
    rc = cli.main(["batch", str(folder / "winch_two_shoe.dxf"), "--csv", "--cache-dir", cache])
    rows = list(csv.DictReader(io.StringIO(capsys.readouterr().out)))
    assert rc == 1 and rows[0]["status"] == "fail" and "pin.bearing.S1" in rows[0]["failed_rules"]
    rc = cli.main(["batch", str(folder / "sub" / "conveyor.dxf"), "--cache-dir", cache])
    assert rc == 0 and "1 passed" in capsys.readouterr().out
    assert cli.main(["batch", str(tmp_path / "nothing-here")]) == 2


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


def test_unreachable_scheduler_is_a_clean_error(folder, capsys):
    pytest.importorskip("distributed")
    rc = cli.main(
        ["batch", str(folder / "winch_two_shoe.dxf"), "--scheduler", "tcp://127.0.0.1:1", "--no-cache", "--json"]
    )
    assert rc == 2 and "Dask scheduler" in capsys.readouterr().err
