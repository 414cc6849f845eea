"""Revision compare: matching, rigid motion, changes, thresholds, exit codes."""

from __future__ import annotations

import json
import math

import ezdxf
import pytest
from common import conveyor_block, winch_two_shoe

import dxfcheck
from dxfcheck import cli
from dxfcheck.analysis import check
from dxfcheck.compare import Thresholds, compare_judgements
from dxfcheck.geometry import Affine


@pytest.fixture(autouse=True)
def _raise_internal_errors(monkeypatch):
    monkeypatch.setattr(cli, "INTERNAL_ERRORS_RAISE", True)


def _unlabelled(sk):
    sk.items = [it for it in sk.items if not (it[0] == "text" and it[1] == "label")]
    return sk


def _judge(path, **kw):
    return check(path, overrides=[("mu", "0.35")], **kw)


def _force_changes(comp):
    return [c for c in comp.changes if c.kind in ("torque", "pin", "member", "shoe", "band")]


def test_identical_drawings_compare_equal(tmp_path):
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    winch_two_shoe().save(a)
    winch_two_shoe().save(b)
    comp = compare_judgements(_judge(a), _judge(b))
    assert comp.changes == ()
    assert not comp.failed
    assert len(comp.pin_map) == 7 and all(k == v for k, v in comp.pin_map.items())


@pytest.mark.parametrize("labels", [True, False])
@pytest.mark.parametrize("theta", [37.0, 123.3])
def test_rotated_shifted_copy_compares_equal(tmp_path, labels, theta):
    """A re-drawn sheet: the whole brake turned and moved.  Labelled pins fix
    the motion by a least-squares fit (Kabsch 1976); without labels the drum
    axis and a search over turns do."""
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    sk = winch_two_shoe() if labels else _unlabelled(winch_two_shoe())
    sk.save(a)
    (winch_two_shoe() if labels else _unlabelled(winch_two_shoe())).save(
        b, transform=Affine.translation(1500, -800) @ Affine.rotation(theta)
    )
    comp = compare_judgements(_judge(a), _judge(b))
    assert ("labelled pins" in comp.motion_source) == labels
    assert len(comp.pin_map) == 7
    assert not [c for c in comp.changes if c.kind in ("moved", "added", "removed", "diameter")]
    assert _force_changes(comp) == []
    assert math.degrees(math.atan2(comp.motion.d, comp.motion.a)) == pytest.approx(theta, abs=1e-9)


def _winch_with_moved_pivot(dx: float):
    """The winch with its left frame pivot (and the lever's foot) moved."""
    sk = winch_two_shoe()
    out = []
    for it in sk.items:
        if it[0] == "circle" and it[1] == "pivot" and it[2] == (-250, -320):
            it = (it[0], it[1], (-250 + dx, -320), it[3])
        elif it[0] == "text" and it[2] == "O1":
            it = (it[0], it[1], it[2], (-250 + dx, -320))
        elif it[0] == "path" and it[1] == "link" and it[2][0] == (-250, -320):
            it = (it[0], it[1], ((-250 + dx, -320), *it[2][1:]))
        out.append(it)
    sk.items = out
    return sk


def test_moving_a_pivot_changes_torque_as_two_solves_say(tmp_path):
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    winch_two_shoe().save(a)
    _winch_with_moved_pivot(-12.0).save(b)
    ja, jb = _judge(a), _judge(b)
    comp = compare_judgements(ja, jb)
    (moved,) = [c for c in comp.changes if c.kind == "moved"]
    assert moved.name == "O1" and moved.new == pytest.approx(12.0, rel=1e-9)
    for d in ("cw", "ccw"):
        t = next(c for c in comp.changes if c.kind == "torque" and c.direction == d)
        ta = dxfcheck.analyse(a, mu=0.35).case(d).torque_Nm
        tb = dxfcheck.analyse(b, mu=0.35).case(d).torque_Nm
        assert t.abs_change == pytest.approx(tb - ta, rel=1e-9)
        assert t.rel_change == pytest.approx((tb - ta) / ta, rel=1e-9)


def test_thresholds_at_their_boundary(tmp_path):
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    winch_two_shoe().save(a)
    _winch_with_moved_pivot(-12.0).save(b)
    ja, jb = _judge(a), _judge(b)
    base = compare_judgements(ja, jb)
    drop = -min(c.rel_change for c in base.changes if c.kind == "torque")
    assert drop > 0
    assert not compare_judgements(ja, jb, Thresholds(max_torque_drop=drop * 1.001)).failed
    assert compare_judgements(ja, jb, Thresholds(max_torque_drop=drop * 0.999)).failed
    rise = max(c.rel_change for c in base.changes if c.kind == "pin")
    assert not compare_judgements(ja, jb, Thresholds(max_force_rise=rise * 1.001)).failed
    over = compare_judgements(ja, jb, Thresholds(max_force_rise=rise * 0.999))
    assert over.failed and over.changes[0].crossed  # crossings sort first


def test_added_part_is_reported(tmp_path):
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    conveyor_block().save(a)
    sk = conveyor_block()
    sk.pin(400, 210, 12, label="H")
    sk.link((400, 210), (400, 120), label="hanger", label_at=(412, 160))
    sk.load(400, 120, 0, -1, "50 N")
    sk.save(b)
    comp = compare_judgements(_judge(a), _judge(b))
    added = {(c.name, c.new) for c in comp.changes if c.kind == "added"}
    assert ("hanger", "part") in added and ("H", "pin") in added
    assert not [c for c in comp.changes if c.kind == "removed"]


def test_cli_exit_codes_history_and_outputs(tmp_path, capsys):
    revs = []
    for k, dx in enumerate((0.0, -6.0, -12.0)):
        p = tmp_path / f"BR-201_{'ABC'[k]}.dxf"
        _winch_with_moved_pivot(dx).save(p)
        revs.append(p)
    assert cli.main(["compare", str(revs[0]), str(revs[0])]) == 0
    capsys.readouterr()
    svg, marked = tmp_path / "trend.svg", tmp_path / "marked.dxf"
    rc = cli.main(
        ["compare", str(tmp_path), "--max-torque-drop", "0%", "--json", "--svg", str(svg), "--annotate", str(marked)]
    )
    doc = json.loads(capsys.readouterr().out)
    assert rc == 1 and doc["failed"] is True
    assert [row["drawing"] for row in doc["trend"]] == [str(p) for p in revs]
    assert len(doc["steps"]) == 2
    assert "<polyline" in svg.read_text()
    notes = [e.dxf.text for e in ezdxf.readfile(marked).modelspace().query("TEXT[layer=='DXFCHECK_NOTES']")]
    assert any("moved 6 mm" in t for t in notes)
    rc = cli.main(["compare", str(revs[0]), str(tmp_path / "missing.dxf")])
    assert rc == 2
    assert "missing.dxf" in capsys.readouterr().err
    rc = cli.main(["compare", str(revs[0])])
    assert rc == 2
