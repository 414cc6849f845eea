"""The pre-commit hooks (``.pre-commit-hooks.yaml``) run by the
``pre-commit`` package on a temporary git repository: a commit of a drawing
that fails its spec is stopped, a passing one goes through; the compare hook
stops a commit whose drawing lost braking torque against the committed
revision (``git show HEAD:./NAME``), and lets a small change through.

The hooks are declared ``language: python`` for users (pre-commit installs
dxfcheck into its own environment); here they run as ``repo: local`` hooks
with ``language: system`` and this interpreter, since installing the package
would need the network.  Everything else (ids, entry arguments, file
pattern) is read from the shipped file.  The torque figures: linear statics,
the block's normal force and so the braking torque scale with the effort
(the single-lever block brake, Khurmi & Gupta, the lever equation; as in
tests/revision/test_compare.py)."""

from __future__ import annotations

import math
import os
import shutil
import subprocess
import sys

import pytest
from common import ROOT, conveyor_block, winch_two_shoe

yaml = pytest.importorskip("yaml")  # pre-commit's own dependency (PyYAML)
pytest.importorskip("pre_commit")

HOOKS = ROOT / ".pre-commit-hooks.yaml"
pytestmark = pytest.mark.skipif(shutil.which("git") is None, reason="needs git")


def _conveyor(text: str):
    """The conveyor brake with its effort of ``text`` (the demo: 420 N)."""
    sk = conveyor_block()
    sk.items = [it for it in sk.items if it[1] != "load"]
    t = math.radians(-90.0)
    return sk.load(520.0, 210, math.cos(t), math.sin(t), text, length=80)


def test_the_shipped_manifest_is_valid_for_pre_commit():
    """pre-commit's own manifest check (what it runs on a hooks repository)."""
    from pre_commit.clientlib import load_manifest

    hooks = {h["id"]: h for h in load_manifest(HOOKS)}
    assert set(hooks) == {"dxfcheck-check", "dxfcheck-compare"}
    assert all(h["language"] == "python" and h["pass_filenames"] for h in hooks.values())
    assert hooks["dxfcheck-check"]["entry"] == "dxfcheck hook check"
    assert hooks["dxfcheck-compare"]["entry"] == "dxfcheck hook compare"


def _local_config() -> str:
    """The shipped hooks as ``repo: local`` hooks run by this interpreter."""
    shipped = yaml.safe_load(HOOKS.read_text())
    hooks = []
    for hook in shipped:
        assert hook["language"] == "python" and hook["entry"].startswith("dxfcheck hook ")
        local = dict(hook, language="system", entry=f"{sys.executable} -m {hook['entry']}")
        hooks.append(local)
    return yaml.safe_dump({"repos": [{"repo": "local", "hooks": hooks}]})


@pytest.fixture
def repo(tmp_path):
    env = dict(os.environ)
    env.update(
        PRE_COMMIT_HOME=str(tmp_path / "pre-commit-home"),
        GIT_AUTHOR_NAME="t",
        GIT_AUTHOR_EMAIL="t@example.invalid",
        GIT_COMMITTER_NAME="t",
        GIT_COMMITTER_EMAIL="t@example.invalid",
        GIT_CONFIG_GLOBAL=os.devnull,
        GIT_CONFIG_NOSYSTEM="1",
        PYTHONPATH=os.pathsep.join([str(ROOT), env.get("PYTHONPATH", "")]),
    )
    work = tmp_path / "brakes"
    work.mkdir()

    def sh(*args: str, check: bool = True) -> subprocess.CompletedProcess[str]:
        """Run a command in the repository; ``stdout`` holds both streams
        (git prints the hooks' output on standard error)."""
        done = subprocess.run(
            args, cwd=work, env=env, stdout=subprocess.PIPE, stderr=subprocess.STDOUT, text=True, timeout=300
        )
        if check:
            assert done.returncode == 0, done.stdout
        return done

    sh("git", "init", "-q", "-b", "main")
    shutil.copy(ROOT / "drawings" / "dxfcheck.toml", work / "dxfcheck.toml")
    (work / ".pre-commit-config.yaml").write_text(_local_config())
    sh("git", "add", "dxfcheck.toml", ".pre-commit-config.yaml")
    sh(sys.executable, "-m", "pre_commit", "install")
    sh("git", "commit", "-q", "-m", "project file and hooks")
    return work, sh


def _committed(sh) -> list[str]:
    return sh("git", "ls-tree", "-r", "--name-only", "HEAD").stdout.split()


def test_a_failing_drawing_is_stopped_and_a_passing_one_goes_through(repo):
    work, sh = repo
    winch_two_shoe().save(work / "winch_two_shoe.dxf")  # fails its spec: lining pressure, pin bearing
    sh("git", "add", "winch_two_shoe.dxf")
    stopped = sh("git", "commit", "-m", "winch", check=False)
    assert stopped.returncode != 0
    assert "dxfcheck check" in stopped.stdout and "Failed" in stopped.stdout
    assert "FAIL  winch_two_shoe.dxf" in stopped.stdout and "pin bearing, S1" in stopped.stdout
    assert "winch_two_shoe.dxf" not in _committed(sh)
    sh("git", "rm", "-q", "--cached", "winch_two_shoe.dxf")
    _conveyor("420 N").save(work / "conveyor_block.dxf")
    sh("git", "add", "conveyor_block.dxf")
    passed = sh("git", "commit", "-m", "conveyor", check=False)
    assert passed.returncode == 0, passed.stdout
    assert "conveyor_block.dxf" in _committed(sh)
    assert "new, not in HEAD" in passed.stdout or "Passed" in passed.stdout


def test_compare_hook_stops_a_torque_drop_against_the_committed_revision(repo):
    work, sh = repo
    path = work / "conveyor_block.dxf"
    _conveyor("420 N").save(path)
    sh("git", "add", "conveyor_block.dxf")
    sh("git", "commit", "-q", "-m", "conveyor")
    # 380 N instead of 420 N: the torque falls by 1 - 380/420 = 9.5 %, over the default 5 %
    _conveyor("380 N").save(path)
    sh("git", "add", "conveyor_block.dxf")
    stopped = sh("git", "commit", "-m", "lighter weight", check=False)
    assert stopped.returncode != 0
    lines = stopped.stdout.splitlines()
    compare_line = next(x for x in lines if x.startswith("dxfcheck compare"))
    check_line = next(x for x in lines if x.startswith("dxfcheck check"))
    assert "Failed" in compare_line and "Passed" in check_line
    assert "torque" in stopped.stdout and "-9.5" in stopped.stdout
    # 430 N: the torque rises by 2.4 %, the forces by 2.4 % (under 10 %): it goes through
    _conveyor("430 N").save(path)
    sh("git", "add", "conveyor_block.dxf")
    passed = sh("git", "commit", "-m", "heavier weight", check=False)
    assert passed.returncode == 0, passed.stdout
    assert sh("git", "log", "-1", "--format=%s").stdout.strip() == "heavier weight"


def test_hook_command_compares_with_the_committed_copy(repo):
    """The helper itself: ``dxfcheck hook compare`` reads HEAD's bytes, and a
    drawing not yet committed is reported as new, not refused."""
    work, sh = repo
    path = work / "conveyor_block.dxf"
    _conveyor("420 N").save(path)
    new = sh(sys.executable, "-m", "dxfcheck", "hook", "compare", "conveyor_block.dxf")
    assert "new, not in HEAD" in new.stdout
    sh("git", "add", "conveyor_block.dxf")
    sh("git", "commit", "-q", "-m", "conveyor")
    _conveyor("380 N").save(path)
    r = sh(sys.executable, "-m", "dxfcheck", "hook", "compare", "conveyor_block.dxf", check=False)
    assert r.returncode == 1 and "dxfcheck-hook-" in r.stdout  # the committed copy, from git show
    same = sh(sys.executable, "-m", "dxfcheck", "hook", "compare", "--rev", "HEAD", "conveyor_block.dxf", check=False)
    assert same.returncode == 1
    bad = sh(sys.executable, "-m", "dxfcheck", "hook", "compare", "--rev", "nosuch", "conveyor_block.dxf", check=False)
    assert bad.returncode == 2 and "git cannot read nosuch:./conveyor_block.dxf" in bad.stdout
