"""Drawings with faults: each fault gives its own finding code, naming the
entity (handle, layer) and the place."""

from __future__ import annotations

import pytest
from common import conveyor_block

import dxfcheck
from dxfcheck.core.findings import Code, Severity
from dxfcheck.output.sketch import Sketch


def _conveyor(*, pivot=True, drum=True, units="mm", shoe=(0, 0, 150, 75, 105), load=(520, 210)):
    sk = Sketch(units=units)
    if drum:
        sk.drum(0, 0, 150)
    if pivot:
        sk.pivot(-260, 210, 24, label="O")
    sk.link((-260, 210), (520, 210), label="lever", label_at=(300, 230))
    sk.link((0, 210), (0, 150))
    sk.shoe(*shoe, label="block")
    sk.load(*load, 0, -1, "420 N", length=80)
    return sk


def _findings(tmp_path, sk, **kw):
    path = tmp_path / "fault.dxf"
    sk.save(path)
    drawing = dxfcheck.read_drawing(path, **kw)
    mech = dxfcheck.build_mechanism(drawing)
    return path, mech, list(mech.findings)


def _one(findings, code):
    hits = [f for f in findings if f.code is code]
    assert len(hits) == 1, [f.line() for f in findings]
    return hits[0]


def test_clean_demo_has_no_findings(tmp_path):
    _, mech, findings = _findings(tmp_path, conveyor_block())
    assert findings == []
    assert len(mech.parts) == 1


def test_open_end(tmp_path):
    sk = _conveyor()
    sk.link((300, 210), (300, 320))  # a stub off the lever, ending on nothing
    _, _, fs = _findings(tmp_path, sk)
    f = _one(fs, Code.OPEN_END)
    assert f.at == pytest.approx((300, 320))
    assert f.layers == ("LINK",) and f.handles


def test_lonely_pin(tmp_path):
    sk = _conveyor()
    sk.pin(200, 210, 16)
    _, mech, fs = _findings(tmp_path, sk)
    f = _one(fs, Code.LONELY_PIN)
    assert f.at == pytest.approx((200, 210)) and f.layers == ("PIN",)
    assert len(mech.pins) == 1  # left out of the statics


def test_orphan_pin(tmp_path):
    sk = _conveyor()
    sk.pin(900, 900, 16)
    _, _, fs = _findings(tmp_path, sk)
    f = _one(fs, Code.ORPHAN_PIN)
    assert f.severity is Severity.ERROR and f.at == pytest.approx((900, 900))


def test_shoe_off_drum(tmp_path):
    _, _, fs = _findings(tmp_path, _conveyor(shoe=(0, 0, 160, 75, 105)))
    f = _one(fs, Code.SHOE_OFF_DRUM)
    assert f.layers == ("SHOE",) and "radius off by 10" in f.message


def test_shoe_unattached(tmp_path):
    sk = _conveyor()
    sk.shoe(0, 0, 150, 250, 290)
    _, _, fs = _findings(tmp_path, sk)
    f = _one(fs, Code.SHOE_UNATTACHED)
    assert f.at == pytest.approx((0, -150), abs=1e-9)


def test_load_off_part(tmp_path):
    _, _, fs = _findings(tmp_path, _conveyor(load=(700, 500)))
    f = _one(fs, Code.LOAD_OFF_PART)
    assert f.at == pytest.approx((700, 500)) and f.layers == ("LOAD",)


def test_missing_drum(tmp_path):
    _, _, fs = _findings(tmp_path, _conveyor(drum=False))
    _one(fs, Code.NO_DRUM)


def test_missing_units(tmp_path):
    _, _, fs = _findings(tmp_path, _conveyor(units=None))
    assert _one(fs, Code.UNITS_ASSUMED).severity is Severity.WARNING


def test_load_without_magnitude(tmp_path):
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(-260, 210, 24)
    sk.link((-260, 210), (520, 210))
    sk.link((0, 210), (0, 150))
    sk.shoe(0, 0, 150, 75, 105)
    sk.load(520, 210, 0, -1, None)
    _, _, fs = _findings(tmp_path, sk)
    _one(fs, Code.LOAD_NO_MAGNITUDE)


def test_load_text_not_a_force(tmp_path):
    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(-260, 210, 24)
    sk.link((-260, 210), (520, 210))
    sk.link((0, 210), (0, 150))
    sk.shoe(0, 0, 150, 75, 105)
    sk.load(520, 210, 0, -1, "42 N*m")
    _, _, fs = _findings(tmp_path, sk)
    _one(fs, Code.TEXT_UNREAD)
    _one(fs, Code.LOAD_NO_MAGNITUDE)


def test_free_lever(tmp_path):
    """Without its pivot the lever can turn under the effort: a free motion,
    naming the lever."""
    path = tmp_path / "free.dxf"
    _conveyor(pivot=False).save(path)
    with pytest.raises(dxfcheck.SolveError) as info:
        dxfcheck.analyse(path, mu=0.35)
    f, *rest = info.value.findings
    assert f.code is Code.FREE_MOTION and "lever" in f.message
    assert f.layers and f.layers[0] == "LINK"
    # the refusal also carries the warnings that may explain it, after the errors
    assert all(w.severity is Severity.WARNING for w in rest)


def test_pieces_that_cross_do_not_join(tmp_path):
    """Two centrelines that cross without an end on the other stay two parts."""
    sk = _conveyor()
    sk.link((100, 100), (100, 300))  # crosses the lever at (100, 210)
    _, mech, fs = _findings(tmp_path, sk)
    assert len(mech.parts) == 2
    assert sum(f.code is Code.OPEN_END for f in fs) == 2


def test_effort_option_overrides_text(tmp_path):
    path = tmp_path / "c.dxf"
    conveyor_block().save(path)
    a = dxfcheck.analyse(path, mu=0.35)
    b = dxfcheck.analyse(path, mu=0.35, effort_N=840.0)
    assert b.case("cw").torque_Nm == pytest.approx(2 * a.case("cw").torque_Nm, rel=1e-12)
