"""``dxfcheck skeleton``: the skeleton written on the role layers (alone, or
over a faded copy of the drawing) reads and solves to the same answers as
the drafted drawing it came from, and so as the skeleton twin (the project's
own invariant, ``twins.py``; no published source)."""

from __future__ import annotations

import subprocess
import sys

import ezdxf
import pytest
from common import CATALOGUE, ROOT
from schema_check import output_json
from twins import assert_same_mechanism, assert_same_solution

import dxfcheck
from dxfcheck.core.findings import Code
from dxfcheck.output.drafting import save_drafted

CASES = [
    ("winch two-shoe (pivoted shoes, floating crank)", "outlines", False),
    ("winch two-shoe (pivoted shoes, floating crank)", "centrelines", True),
    ("capstan band (spring-set)", "centrelines", False),
    ("internal hinged pair", "outlines", True),
]


def _cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *args], capture_output=True, text=True, cwd=ROOT, timeout=120
    )


@pytest.mark.parametrize(("name", "style", "over"), CASES)
def test_skeleton_written_solves_the_same(tmp_path, name, style, over):
    make, mu = CATALOGUE[name]
    twin, drafted, out, svg = (tmp_path / n for n in ("twin.dxf", "drafted.dxf", "out.dxf", "out.svg"))
    make().save(twin)
    save_drafted(make(), drafted, style)
    res = _cli("skeleton", str(drafted), "-o", str(out), "--svg", str(svg), *(["--over"] if over else []))
    assert res.returncode == 0, res.stderr
    assert f"wrote {out}" in res.stdout and "skeleton: inferred from the geometry" in res.stdout
    assert svg.read_text().startswith("<?xml") or "<svg" in svg.read_text()
    a = dxfcheck.analyse(twin, mu=mu)
    b = dxfcheck.analyse(drafted, mu=mu)
    c = dxfcheck.analyse(out, mu=mu)
    assert c.mechanism.drawing.skeleton_source == "layers"
    assert_same_mechanism(b, c)  # the inferred centrelines, written and read back as they are
    assert_same_mechanism(a, c, same_centrelines=style == "centrelines")
    assert_same_solution(a, c)
    doc = ezdxf.readfile(out)
    if over:  # the original is there, faded
        assert doc.layers.get("PARTS").color == 8
        assert len(doc.modelspace().query("HATCH")) > 0
    else:
        assert "PARTS" not in doc.layers


def test_skeleton_json_and_refusals(tmp_path):
    drafted, out = tmp_path / "drafted.dxf", tmp_path / "out.dxf"
    save_drafted(CATALOGUE["conveyor block"][0](), drafted, "outlines")
    res = _cli("skeleton", str(drafted), "-o", str(out), "--json")
    assert res.returncode == 0, res.stderr
    doc = output_json(res.stdout)  # validated against its schema
    assert doc["schema"] == "dxfcheck.skeleton/1" and doc["skeleton"] == "geometry (outlines)"
    assert doc["written"] == [str(out)] and "caution" in doc
    again = _cli("skeleton", str(drafted), "-o", str(out))  # exists: refused without --force
    assert again.returncode == 2 and "exists" in again.stderr
    same = _cli("skeleton", str(drafted), "-o", str(drafted), "--force")  # never the input
    assert same.returncode == 2


@pytest.mark.parametrize("over", [False, True])
def test_skeleton_of_a_drawing_with_role_layers(tmp_path, over):
    """A skeleton read from the role layers is written back as it is (over
    the copy: not drawn twice), and solves the same."""
    make, mu = CATALOGUE["push rod block"]
    twin, out = tmp_path / "twin.dxf", tmp_path / "out.dxf"
    make().save(twin)
    res = _cli("skeleton", str(twin), "-o", str(out), *(["--over"] if over else []))
    assert res.returncode == 0, res.stderr
    assert "skeleton: from the role layers" in res.stdout
    a, c = dxfcheck.analyse(twin, mu=mu), dxfcheck.analyse(out, mu=mu)
    assert_same_mechanism(a, c)
    assert_same_solution(a, c)
    assert Code.DUPLICATE_ENTITY not in {f.code for f in c.findings}
