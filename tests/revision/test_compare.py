"""Revision compare: matching, rigid motion, changes, thresholds, exit codes."""

from __future__ import annotations

import math
import subprocess
import sys

import ezdxf
import pytest
from common import capstan_band, conveyor_block, winch_two_shoe
from schema_check import output_json

import dxfcheck
from dxfcheck import cli
from dxfcheck.core.geometry import Affine
from dxfcheck.pipeline import check
from dxfcheck.revision.compare import RevisionMismatch, Thresholds, compare_judgements, history_svg


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
    doc = output_json(capsys.readouterr().out)
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


# --- geometry changes of parts, loads and springs --------------------------------


def _edit(sk, fn):
    """Map every item of a sketch through ``fn``."""
    sk.items = [fn(it) for it in sk.items]
    return sk


def _shift(p, dx, dy=0.0):
    return (p[0] + dx, p[1] + dy)


def winch_crank_arm(extra: float):
    """The winch with the bell crank's arm to the set weight ``extra`` mm
    longer (330 mm from T2 in the demo); the weight hangs at its end."""

    def fn(it):
        if it[0] == "path" and it[1] == "link" and (580, 420) in it[2]:
            return (*it[:2], tuple(_shift(p, extra) if p == (580, 420) else p for p in it[2]))
        if it[0] == "path" and it[1] == "load":
            return (*it[:2], tuple(_shift(p, extra) for p in it[2]))
        if it[0] == "text" and it[1] == "load":
            return (*it[:3], _shift(it[3], extra))
        return it

    return _edit(winch_two_shoe(), fn)


def test_bell_crank_arm_longer_is_listed_and_the_forces_follow_it(tmp_path):
    """The arm from T2 to the weight grows from 330 to 350 mm.  The crank
    floats on T2, so its moment balance about T2 gives the tie-rod pull
    F_tie·100 mm = 1.8 kN·arm (Beer & Johnston, *Vector Mechanics for
    Engineers: Statics*, ch. 4, moment about a point; from memory): 5940 N
    -> 6300 N, still tension.  The weight's vertical reaction at T2 runs
    along the vertical right lever through O2, so it adds no moment about O2
    and the braking torque scales with the tie-rod pull: × 350/330."""
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    winch_two_shoe().save(a)
    winch_crank_arm(20.0).save(b)
    comp = compare_judgements(_judge(a), _judge(b))
    geo = {c.name: c for c in comp.changes if c.kind in ("part", "load", "spring", "moved")}
    length = geo.pop("bell crank length")
    assert (length.old, length.new, length.abs_change) == pytest.approx((430.0, 450.0, 20.0), rel=1e-9)
    point = geo.pop("F1 point")
    assert point.new == pytest.approx(20.0, rel=1e-9) and point.at_mm == pytest.approx((600.0, 420.0))
    assert geo == {}  # no pin moved, no other part changed, the weight neither turned nor changed
    tie = {c.direction: c for c in comp.changes if c.kind == "member" and c.name == "tie rod"}
    for d in ("cw", "ccw"):
        assert (tie[d].old, tie[d].new) == pytest.approx((1800 * 3.3, 1800 * 3.5), rel=1e-9)
        assert comp.new.nominal.case(d).member("tie rod").axial_N > 0  # tension: the rod pulls the levers together
        t = next(c for c in comp.changes if c.kind == "torque" and c.direction == d)
        assert t.new / t.old == pytest.approx(350 / 330, rel=1e-9)
    # geometry (the cause) is listed before the forces it changes
    kinds = [c.kind for c in comp.changes]
    assert max(kinds.index(k) for k in ("part", "load")) < min(i for i, k in enumerate(kinds) if k == "torque")


def capstan_spring_moved(dx: float):
    """The capstan with its set spring (and the frame bracket K it pushes
    from) moved ``dx`` mm along the lever; the lever is unchanged."""
    k0 = next(it[2] for it in capstan_band().items if it[0] == "circle" and it[1] == "pivot" and it[3] == 8.0)

    def fn(it):
        if it[0] == "path" and it[1] == "spring":
            return (*it[:2], tuple(_shift(p, dx) for p in it[2]))
        if it[0] == "circle" and it[2] == k0:
            return (it[0], it[1], _shift(it[2], dx), it[3])
        if it[0] == "text" and (it[1] == "spring" or it[2] == "K"):
            return (*it[:3], _shift(it[3], dx))
        return it

    return _edit(capstan_band(), fn)


def test_spring_end_moved_in_the_capstan(tmp_path):
    """The spring pushes vertically at 520 mm from the fulcrum O; moved 40 mm
    towards O its moment about O, and so the band's pull at A and the
    braking torque, fall by 480/520 (lever rule, moments about O; Beer &
    Johnston, Statics, ch. 4, from memory): a 7.7 % drop, over the default
    5 % limit."""
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    capstan_band().save(a)
    capstan_spring_moved(-40.0).save(b)
    comp = compare_judgements(_judge(a), _judge(b))
    ends = {c.name: c for c in comp.changes if c.kind == "spring"}
    assert set(ends) == {"spring1 end on band lever", "spring1 end on frame"}
    assert all(c.new == pytest.approx(40.0, rel=1e-9) for c in ends.values())
    assert not [c for c in comp.changes if c.kind in ("part", "load", "moved")]
    for d in ("cw", "ccw"):
        t = next(c for c in comp.changes if c.kind == "torque" and c.direction == d)
        assert t.old > 0 and t.new > 0  # still braking in both directions
        assert t.new / t.old == pytest.approx(480 / 520, rel=1e-9)
        assert t.crossed  # 7.7 % > the default 5 %
    assert comp.failed and comp.thresholds.torque_drop_source == "default, common practice"


def conveyor_load(x=520.0, deg=-90.0, text="420 N"):
    """The conveyor brake with its effort at ``x`` on the lever, pointing
    ``deg`` degrees from +x (the demo: 520, -90, 420 N)."""
    sk = conveyor_block()
    sk.items = [it for it in sk.items if it[1] != "load"]
    t = math.radians(deg)
    return sk.load(x, 210, math.cos(t), math.sin(t), text, length=80)


@pytest.mark.parametrize(
    ("change", "kw", "ratio"),
    [
        # moment arm about O (x = -260): 780 mm -> 740 mm
        ("F1 point", {"x": 480.0}, 740 / 780),
        # turned 30° counter-clockwise: only the component across the lever
        # (which runs through O) has a moment, 420·cos 30°
        ("F1 direction", {"deg": -60.0}, math.cos(math.radians(30))),
        ("F1 force", {"text": "500 N"}, 500 / 420),
    ],
)
def test_load_moved_turned_or_changed(tmp_path, change, kw, ratio):
    """Single-lever block brake: the block's normal force, and so the torque,
    follows the effort's moment about the pivot O (P·l = N(x ∓ μa),
    Khurmi & Gupta, *Theory of Machines*, brakes; from memory)."""
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    conveyor_load().save(a)
    conveyor_load(**kw).save(b)
    comp = compare_judgements(_judge(a), _judge(b), Thresholds(None, None))
    geo = [c for c in comp.changes if c.kind in ("part", "load", "spring", "moved")]
    assert [c.name for c in geo] == [change]
    if change == "F1 point":
        assert geo[0].new == pytest.approx(40.0, rel=1e-9)
    elif change == "F1 direction":
        assert (geo[0].old, geo[0].new, geo[0].abs_change) == pytest.approx((-90.0, -60.0, 30.0), abs=1e-9)
    else:
        assert (geo[0].old, geo[0].new, geo[0].rel_change) == pytest.approx((420.0, 500.0, 80 / 420), rel=1e-12)
    for d in ("cw", "ccw"):
        t = next(c for c in comp.changes if c.kind == "torque" and c.direction == d)
        assert t.new / t.old == pytest.approx(ratio, rel=1e-9)


def test_cli_json_lists_geometry_changes_and_thresholds(tmp_path):
    """The real command on two revisions: schema 2, the geometry changes
    with their places, the thresholds with their sources."""
    a, b = tmp_path / "TQ-K4-BR-310_A.dxf", tmp_path / "TQ-K4-BR-310_B.dxf"
    capstan_band().save(a)
    capstan_spring_moved(-40.0).save(b)
    r = _cli("compare", a, b, "--json")
    assert r.returncode == 1, r.stderr  # the default 5 % torque-drop limit is crossed
    doc = output_json(r.stdout)
    assert doc["schema"] == "dxfcheck.revision.compare/2"
    assert doc["thresholds"] == {
        "max_torque_drop": 0.05,
        "max_torque_drop_source": "default, common practice",
        "max_force_rise": 0.10,
        "max_force_rise_source": "default, common practice",
    }
    step = doc["steps"][0]
    assert step["matched"]["pins"] == step["matched"]["old_pins"] == 2
    springs = [c for c in step["changes"] if c["kind"] == "spring"]
    assert len(springs) == 2 and all(len(c["at_mm"]) == 2 for c in springs)
    r = _cli("compare", a, b, "--max-torque-drop", "8%", "--json")
    assert r.returncode == 0 and output_json(r.stdout)["thresholds"]["max_torque_drop_source"] == "--max-torque-drop"
    r = _cli("compare", a, b, "--set", "max_torque_drop=0.1")
    assert r.returncode == 0
    assert "torque drop 10 % (spec key max_torque_drop, command line)" in " ".join(r.stdout.split())
    r = _cli("compare", a, b, "--max-torque-drop", "none")
    assert r.returncode == 0 and "torque drop off (--max-torque-drop)" in r.stdout
    r = _cli("compare", a, b, "--max-torque-drop", "lots")
    assert r.returncode == 2 and "--max-torque-drop" in r.stderr and "'lots'" in r.stderr


def _cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=180
    )


# --- revisions that do not match --------------------------------------------------


def test_unrelated_drawings_are_refused(tmp_path):
    """Two different brakes share no pin or part: no comparison (issue 14,
    item 19: it said OK with exit 0)."""
    a, b = tmp_path / "winch.dxf", tmp_path / "capstan.dxf"
    winch_two_shoe().save(a)
    capstan_band().save(b)
    with pytest.raises(RevisionMismatch) as info:
        compare_judgements(_judge(a), _judge(b))
    msg = str(info.value)
    assert "do not look like revisions of one brake" in msg and "0 of 7 pins" in msg
    r = _cli("compare", a, b)
    assert r.returncode == 2
    assert "do not look like revisions" in r.stderr and "winch.dxf" in r.stderr and r.stdout == ""


def test_a_revision_with_a_part_added_still_matches(tmp_path):
    """The conveyor with a hanger added keeps its pivot and lever: related."""
    a, b = tmp_path / "a.dxf", tmp_path / "b.dxf"
    conveyor_block().save(a)
    sk = conveyor_block()
    sk.pin(400, 210, 12, label="H")
    sk.link((400, 210), (400, 120), label="hanger", label_at=(412, 160))
    sk.load(400, 120, 0, -1, "50 N")
    sk.save(b)
    comp = compare_judgements(_judge(a), _judge(b))
    assert comp.pin_map == {"O": "O"} and comp.part_map == {"lever": "lever"}


# --- the trend picture --------------------------------------------------------------

#: Estimated character width for the clipping check [em]: wider than Arial's
#: digits (0.556 em) and most of its letters (from memory; common practice).
EM = 0.7


def _svg_texts(svg: str):
    import xml.etree.ElementTree as ET

    root = ET.fromstring(svg)
    ns = "{http://www.w3.org/2000/svg}"
    box = [float(v) for v in root.get("viewBox").split()]
    return root, ns, box


def _text_box(t):
    size = float(t.get("font-size"))
    x, y = float(t.get("x")), float(t.get("y"))
    w = EM * size * len(t.text or "")
    anchor = t.get("text-anchor", "start")
    x0 = x - (w if anchor == "end" else w / 2 if anchor == "middle" else 0.0)
    return x0, y - 0.8 * size, x0 + w, y + 0.25 * size


def _points(el):
    return [tuple(float(v) for v in p.split(",")) for p in el.get("points").split()]


def test_trend_svg_axis_required_line_and_labels(tmp_path):
    """Three revisions with the crank arm 330, 350, 370 mm and a required
    torque of 1650 N·m: the torque rises as 330 : 350 : 370 (see the bell
    crank test).  Every text lies inside the viewBox; the required torque is
    a horizontal line at its value on the plot's scale; the axis is broken
    above a zero tick, since every value is far above zero."""
    names = []
    for k, extra in enumerate((0.0, 20.0, 40.0)):
        p = tmp_path / f"TQ-W2-BR-201_revision_{'ABC'[k]}.dxf"
        winch_crank_arm(extra).save(p)
        names.append(p)
    svg = tmp_path / "trend.svg"
    r = _cli("compare", *names, "--set", "required_torque=1650 N*m", "--svg", svg, "--json")
    assert r.returncode == 0, r.stderr
    doc = output_json(r.stdout)
    torques = [row["torque_cw_Nm"] for row in doc["trend"]]
    assert [row["required_torque_Nm"] for row in doc["trend"]] == [1650.0] * 3
    assert torques[2] / torques[0] == pytest.approx(370 / 330, rel=1e-9)
    root, ns, (bx, by, bw, bh) = _svg_texts(svg.read_text())
    texts = root.iter(f"{ns}text")
    for t in texts:
        x0, y0, x1, y1 = _text_box(t)
        assert bx <= x0 and x1 <= bx + bw and by <= y0 and y1 <= by + bh, t.text
    series = [el for el in root.iter(f"{ns}polyline") if el.get("class") == "series"]
    cw = _points(series[0])
    # the plot's value scale from two revisions, then where 1650 N·m must be
    slope = (cw[2][1] - cw[0][1]) / (torques[2] - torques[0])
    assert slope < 0  # larger torque higher up
    (req,) = [el for el in root.iter(f"{ns}polyline") if el.get("class") == "required"]
    ys = {round(y, 2) for _, y in _points(req)}
    assert len(ys) == 1
    assert ys.pop() == pytest.approx(cw[0][1] + slope * (1650 - torques[0]), abs=0.02)
    assert [el for el in root.iter(f"{ns}polyline") if el.get("class") == "axis-break"]
    ticks = [t for t in root.iter(f"{ns}text") if t.get("class") == "tick"]
    zero = [t for t in ticks if t.text == "0"]
    assert zero and float(zero[0].get("y")) > max(float(t.get("y")) for t in ticks if t.text != "0")
    assert "BR-201_revision_A" in svg.read_text()


def test_history_svg_starts_at_zero_without_a_break():
    svg = history_svg(["A", "B"], {"torque cw": [100.0, 300.0]}, "N·m")
    root, ns, _box = _svg_texts(svg)
    ticks = [t for t in root.iter(f"{ns}text") if t.get("class") == "tick"]
    assert ticks[0].text == "0"
    assert not [el for el in root.iter(f"{ns}polyline") if el.get("class") in ("axis-break", "required")]
    (line,) = [el for el in root.iter(f"{ns}polyline") if el.get("class") == "series"]
    (x_axis,) = [el for el in root.iter(f"{ns}line") if el.get("class") == "x-axis"]
    # 100 is a third of the way from zero (the x axis) to 300
    y0, (ya, yb) = float(x_axis.get("y1")), (p[1] for p in _points(line))
    assert (y0 - ya) / (y0 - yb) == pytest.approx(1 / 3, abs=1e-3)
