"""Every brake of the catalogue drafted with no role layers for its skeleton
solves to the same mechanism and the same forces as its skeleton twin.

* Style 3 (``centrelines``): centre lines between pin circles (bosses,
  centre marks, hatched ground marks, the drum with hub and shaft, linings
  with backing plates);
* style 1 (``blocks``): each part a block inserted turned and, every other
  one, mirrored; a mirror-image part as the same block inserted mirrored;
  the frame a block of hatched brackets; pin blocks at the pins;
* style 2 (``outlines``): closed part outlines with a hole in every part a
  pin joins (rods as two parallel lines with eyes), centre marks, hatched
  frame brackets at the pivots, the lining face as an arc;

each with clutter (border, title, a dimension, hidden lines through a pin,
a bolt hole).  The comparison (``twins.py``: the
project's own invariant, no published source).  The skeleton twins
themselves are checked against published methods elsewhere
(tests/statics/).
"""

from __future__ import annotations

import math
import subprocess
import sys

import ezdxf
import pytest
from common import CATALOGUE, ROOT, winch_two_shoe
from schema_check import output_json
from twins import assert_same_mechanism, assert_same_solution

import dxfcheck
from dxfcheck.core.config import Config, InferSettings
from dxfcheck.core.errors import MechanismError
from dxfcheck.core.findings import Code
from dxfcheck.output.drafting import save_drafted

STYLE_NAMES = {"centrelines": "centre lines", "outlines": "outlines", "blocks": "blocks"}


def _cases() -> list[object]:
    return [pytest.param(name, style, id=f"{name}-{style}") for name in CATALOGUE for style in STYLE_NAMES]


@pytest.mark.parametrize(("name", "style"), _cases())
def test_drafted_twin_solves_the_same(tmp_path, name, style):
    make, mu = CATALOGUE[name]
    skeleton, drafted = tmp_path / "skeleton.dxf", tmp_path / "drafted.dxf"
    make().save(skeleton)
    save_drafted(make(), drafted, style)
    a = dxfcheck.analyse(skeleton, mu=mu)
    b = dxfcheck.analyse(drafted, mu=mu)
    assert a.mechanism.drawing.skeleton_source == "layers"
    assert b.mechanism.drawing.skeleton_source == f"geometry ({STYLE_NAMES[style]})"
    assert_same_mechanism(a, b, same_centrelines=style == "centrelines")
    assert_same_solution(a, b)
    codes = {f.code for f in b.findings}
    assert Code.SKELETON_INFERRED in codes
    assert Code.HOLE_UNUSED in codes  # the title block's bolt hole
    assert not codes & {
        Code.DRUM_AMBIGUOUS,
        Code.PIVOT_GUESSED,
        Code.NO_LINING_CIRCLE,
        Code.HOLE_ONE_PART,
        Code.TWO_FORCE_OR_LEVER,
    }


def test_blocks_are_inserted_turned_mirrored_and_reused(tmp_path):
    """The symmetric pair of pivoted shoes: each side's lever and shoe are
    one block inserted twice, once mirrored; so the twin test above reads
    blocks placed every way."""
    path = tmp_path / "pair.dxf"
    save_drafted(CATALOGUE["pivoted long pair"][0](), path, "blocks")
    inserts = ezdxf.readfile(path).modelspace().query("INSERT")
    names = [i.dxf.name for i in inserts]
    assert any(names.count(n) == 2 for n in names if n.startswith("PART"))
    assert any(i.dxf.xscale == -1 for i in inserts)
    assert len({round(i.dxf.rotation, 6) for i in inserts if i.dxf.name.startswith("PART")}) >= 3
    assert "FRAME" in names and any(n.startswith("PIN") for n in names)


def test_forced_layers_on_a_drafted_drawing_finds_no_skeleton(tmp_path):
    path = tmp_path / "drafted.dxf"
    save_drafted(winch_two_shoe(), path)
    cfg = Config(infer=InferSettings(skeleton_from="layers"))
    with pytest.raises(MechanismError) as exc:
        dxfcheck.analyse(path, config=cfg)
    assert Code.NO_DRUM in {f.code for f in exc.value.findings}


def test_forced_geometry_on_a_skeleton_drawing_is_refused_with_a_finding(tmp_path):
    path = tmp_path / "skeleton.dxf"
    winch_two_shoe().save(path)
    cfg = Config(infer=InferSettings(skeleton_from="geometry"))
    with pytest.raises(MechanismError) as exc:
        dxfcheck.analyse(path, config=cfg)
    assert Code.NO_PART_GEOMETRY in {f.code for f in exc.value.findings}


def _cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *args], capture_output=True, text=True, cwd=ROOT, timeout=120
    )


def test_cli_header_says_where_the_skeleton_came_from(tmp_path):
    drafted, skeleton = tmp_path / "drafted.dxf", tmp_path / "skeleton.dxf"
    save_drafted(winch_two_shoe(), drafted)
    winch_two_shoe().save(skeleton)
    out = _cli("solve", str(drafted), "--mu", "0.3")
    assert out.returncode == 0, out.stderr
    assert "skeleton: inferred from the geometry (centre lines)" in out.stdout
    out = _cli("solve", str(skeleton), "--mu", "0.3")
    assert "skeleton: from the role layers" in out.stdout
    out = _cli("solve", str(drafted), "--mu", "0.3", "--skeleton-from", "layers")
    assert out.returncode == 2
    assert "M201" in out.stderr
    out = _cli("solve", str(drafted), "--mu", "0.3", "--json")
    assert '"skeleton": "geometry (centre lines)"' in out.stdout


#: The layers the drafter (dxfcheck.output.drafting) puts each style's part
#: geometry on, read off its code: centre lines on CL and AXES (centre
#: linetype) with pin circles, drum and linings on PARTS; outlines and holes
#: on PARTS, lining arcs on LINING; blocks drawn on layer 0 and inserted on
#: PARTS (an entity on layer 0 in a block takes the insert's layer, DXF
#: Reference, "Blocks": common CAD practice).  Never the clutter's layers
#: (BORDER, TITLE, DIM, HIDDEN, HATCH).
DRAFTED_LAYERS = {"centrelines": ["AXES", "CL", "PARTS"], "outlines": ["LINING", "PARTS"], "blocks": ["PARTS"]}


@pytest.mark.parametrize("style", sorted(DRAFTED_LAYERS))
def test_layers_line_says_what_inference_used(tmp_path, style):
    """An inferred skeleton's header shows the style and the layers the
    inference used, with the items found per role, instead of counts under
    role layers it did not read; the JSON ``inference`` says the same, and
    the counts are those of the skeleton twin's role layers."""
    from collections import Counter

    from dxfcheck.pipeline import read_skeleton

    drafted, skeleton = tmp_path / "drafted.dxf", tmp_path / "skeleton.dxf"
    save_drafted(winch_two_shoe(), drafted, style)
    winch_two_shoe().save(skeleton)
    twin = read_skeleton(skeleton, Config())
    want = Counter(g.role.value for group in (twin.circles, twin.arcs, twin.paths) for g in group)
    doc = output_json(_cli("solve", str(drafted), "--mu", "0.3", "--json").stdout)
    inf = doc["inference"]
    assert inf["layers"] == DRAFTED_LAYERS[style]
    assert inf["found"] == {r: want[r] for r in ("pivot", "pin", "link", "drum", "shoe")}
    assert inf["style"] == doc["skeleton"].removeprefix("geometry (").removesuffix(")")
    assert sorted(doc["layers"]) == ["band", "label", "load", "spring"]
    text = _cli("solve", str(drafted), "--mu", "0.3").stdout
    flat = " ".join(text.split())  # the report wraps at its width
    where = ("layer " if len(inf["layers"]) == 1 else "layers ") + ", ".join(inf["layers"])
    items = ", ".join(f"{r} {n}" for r, n in inf["found"].items())
    assert f"layers: inferred from geometry (style: {inf['style']}) on {where} ({items}), load ← LOAD" in flat
    assert "pivot ←" not in text and "drum ←" not in text
    twin_doc = output_json(_cli("solve", str(skeleton), "--mu", "0.3", "--json").stdout)
    assert twin_doc["inference"] is None and len(twin_doc["layers"]) == 9


def test_project_file_forces_the_source(tmp_path):
    (tmp_path / "dxfcheck.toml").write_text('[infer]\nskeleton_from = "layers"\n')
    drafted = tmp_path / "drafted.dxf"
    save_drafted(winch_two_shoe(), drafted)
    out = _cli("solve", str(drafted), "--mu", "0.3")
    assert out.returncode == 2
    out = _cli("solve", str(drafted), "--mu", "0.3", "--skeleton-from", "auto")
    assert out.returncode == 0, out.stderr


def test_compare_two_drafts_of_one_brake(tmp_path):
    """The winch drafted as outlines and as blocks are the same brake:
    compare matches every pin and part and passes; forced to the role
    layers it refuses (there are none)."""
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    save_drafted(winch_two_shoe(), a, "outlines")
    save_drafted(winch_two_shoe(), b, "blocks")
    out = _cli("compare", str(a), str(b))
    assert out.returncode == 0, out.stderr
    assert "7 of 7 pins" in out.stdout and "6 of 6 parts matched" in out.stdout
    assert _cli("compare", str(a), str(b), "--skeleton-from", "layers").returncode == 2


@pytest.mark.parametrize("style", ["centrelines", "outlines"])
def test_a_drafted_sheet_placed_turned_and_mirrored(tmp_path, style):
    """The whole drafted sheet moved into one block and inserted turned 30°
    and mirrored: a mirror image turns the drum the other way, so each
    direction's braking torque is the other direction's of the original, and
    every pin carries the same force magnitude (invariance of the statics
    under Euclidean maps, common practice; the property tests of
    tests/statics/test_invariance.py show it for drawn skeletons)."""
    from dxfcheck.output.drafting import draft

    make, mu = CATALOGUE["push rod block"]  # cw and ccw differ (a fixed block): the swap is seen
    plain, placed = tmp_path / "plain.dxf", tmp_path / "placed.dxf"
    doc = draft(make(), style, clutter=False)
    doc.saveas(plain)
    msp = doc.modelspace()
    sheet = doc.blocks.new("SHEET")
    for e in list(msp):
        sheet.add_entity(e.copy())
        msp.delete_entity(e)
    msp.add_blockref("SHEET", (1000, -400), dxfattribs={"rotation": 30, "xscale": -1})
    doc.saveas(placed)
    a, b = dxfcheck.analyse(plain, mu=mu), dxfcheck.analyse(placed, mu=mu)
    assert a.case("cw").torque_Nm != pytest.approx(a.case("ccw").torque_Nm, rel=1e-3)
    assert b.mechanism.drawing.skeleton_source == f"geometry ({STYLE_NAMES[style]})"
    for d, other in (("cw", "ccw"), ("ccw", "cw")):
        ca, cb = a.case(d), b.case(other)
        assert cb.torque_Nm == pytest.approx(ca.torque_Nm, rel=1e-9)
        fa = {p.name: p.max_force_N for p in ca.pins}
        assert {p.name: pytest.approx(p.max_force_N, rel=1e-9) for p in cb.pins} == fa


@pytest.mark.parametrize("style", ["outlines", "blocks"])
def test_a_rod_through_a_lever_crosses_it(tmp_path, style):
    """The spring-set pull rod drafted as outlines or blocks: the spring's
    end at the crossing (320, 250) is held by the right lever and lies on
    the rod's centreline too.  The lever's piece runs on through it, up the
    lever's own axis (x = 320, y rising past 250) to its outline's edge, so
    that the two pieces cross (the skeleton twin's drawing of it,
    tests/common.py ``spring_rod_double_block``) and do not join: three
    parts, the spring from the lever to the rod, and the rod a two-force
    member along its own line (the project's convention; the values are
    checked against Sarkar in tests/statics/test_spring_rod.py)."""
    make, mu = CATALOGUE["double block, spring on a pull rod"]
    path = tmp_path / "drafted.dxf"
    save_drafted(make(), path, style)
    sol = dxfcheck.analyse(path, mu=mu)
    mech = sol.mechanism
    assert [p.name for p in mech.parts] == ["left lever", "right lever", "pull rod"]
    lever = next(p for p in mech.parts if p.name == "right lever")
    points = [lever.segments[0][0], *(s[1] for s in lever.segments)]
    k = next(i for i, q in enumerate(points) if math.dist(q, (320.0, 250.0)) < 1e-6)
    assert 0 < k < len(points) - 1  # the crossing is inside the lever's piece, not an end
    end = points[0]
    assert end[0] == pytest.approx(320.0, abs=1e-6) and 300.0 < end[1] < 330.0  # on, beyond the rod
    assert [s.parts for s in mech.springs] == [("right lever", "pull rod")]
    for case in sol.cases:
        (rod,) = case.members
        # the rod's balance: only the pin T1 and the spring's 3500 N at the nut
        # act on it, so the pin takes the spring's force back along the rod and
        # the rod carries it: tension, since the spring pushes the nut away from T1
        assert rod.name == "pull rod" and rod.axial_N == pytest.approx(3500.0, rel=1e-9)
