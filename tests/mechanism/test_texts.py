"""Load and spring texts in a drawing are read as written, or refused with a
finding that quotes them.

Numbers: a comma or a point may be a decimal mark, a space groups thousands
(BIPM, *The International System of Units*, 9th ed., 2019, §5.4.4; from
memory); a single mark with exactly three digits after it may also be a
thousands mark, so it is refused (common practice).
"""

from __future__ import annotations

import subprocess
import sys

import pytest
from common import block_brake, capstan_band, double_block_spring_pair, winch_two_shoe

import dxfcheck
from dxfcheck.core.findings import Code, Severity
from dxfcheck.output.sketch import Sketch
from dxfcheck.pipeline import check

MU = 0.35
#: Book 764 Example 12.4's block brake (FOSSEE Scilab Textbook Companion;
#: ../shared/REFERENCES.md [seen]): r = 200, effort arm l = 500, x = 200,
#: a = 50 [mm].
R, L, X, A = 200.0, 500.0, 200.0, 50.0


def _with_text(sk: Sketch, role: str, text: str) -> Sketch:
    """The sketch with the text on the ``role`` layer replaced."""
    sk.items = [(it[0], it[1], text, *it[3:]) if it[:2] == ("text", role) else it for it in sk.items]
    return sk


def _mechanism(tmp_path, sk: Sketch, **kw):
    path = tmp_path / "t.dxf"
    sk.save(path)
    return dxfcheck.build_mechanism(dxfcheck.read_drawing(path), **kw)


def _codes(mech) -> dict[Code, list]:
    out: dict[Code, list] = {}
    for f in mech.findings:
        out.setdefault(f.code, []).append(f)
    return out


def _spring_pair(text: str) -> Sketch:
    """Sarkar's Illustration 3 pair of levers (ch. 10, p. 270; REFERENCES.md
    [seen]) with the spring drawn between the lever tops."""
    sk = double_block_spring_pair(r=180, l=450, x=200, a=140, spring=None)
    sk.items = [it for it in sk.items if not (it[0] == "path" and it[1] == "load")]
    sk.spring((-320, 250), (320, 250), text)
    return sk


# --- loads ----------------------------------------------------------------------


@pytest.mark.parametrize(
    "text", ["F=1.2kN", "1.2 kN (set)", "PRELOAD 1.2 kN T", "1 200 N", "1\u2009200 N", "F1 = 1,2 kN", "1,200.0 N"]
)
def test_load_text_with_words_around_is_read(tmp_path, text):
    """Before: 'has no magnitude' although a force was written.  The read
    load keeps the LOAD line's place and direction (down, at the lever's
    end) and brakes as the lever equation says: P·l = N(x ∓ μa), T = μNr
    (book 764 Example 12.4's equation; REFERENCES.md [seen])."""
    path = tmp_path / "b.dxf"
    block_brake(r=R, l=L, x=X, a=A, effort=text).save(path)
    sol = dxfcheck.analyse(path, mu=MU)
    (load,) = sol.mechanism.loads
    assert load.magnitude_N == pytest.approx(1200.0, rel=1e-12)
    assert load.direction == pytest.approx((0.0, -1.0), abs=1e-12)
    assert load.point == pytest.approx((-X + L, R + A), abs=1e-9)
    assert not {f.code for f in sol.findings} & {Code.TEXT_UNREAD, Code.TEXT_AMBIGUOUS}
    for case in sol.cases:
        (ld,) = case.loads
        assert (ld.fx_N, ld.fy_N) == (pytest.approx(0.0, abs=1e-9), pytest.approx(-1200.0, rel=1e-12))
    torques = sorted(c.torque_Nm for c in sol.cases)
    expect = sorted(MU * 1200.0 * L / (X + s * MU * A) * R / 1000 for s in (1, -1))
    assert torques == [pytest.approx(t, rel=1e-9) for t in expect]  # 193.10 and 230.14 N·m, both braking


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("1,200 N", ["'1,200 N'", "'1,2 N'", "'1200 N'"]),
        ("1.200 N", ["'1.200 N'", "'1.2 N'", "'1200 N'"]),
        ("1.2 kN / 2.4 kN", ["'1.2 kN'", "'2.4 kN'"]),
        ("2 x 600 N", ["'2 x'", "'600 N'"]),
        ("1.2-1.5 kN", ["'1.2'", "'1.5 kN'"]),
    ],
)
def test_ambiguous_load_text_is_refused(tmp_path, text, words):
    """Before: '1,200 N' and '1.200 N' were read as 1.2 N with no finding
    (a torque of 0.4 N·m)."""
    sk = block_brake(r=R, l=L, x=X, a=A, effort=text)
    mech = _mechanism(tmp_path, sk)
    (f,) = _codes(mech)[Code.TEXT_AMBIGUOUS]
    assert f.severity is Severity.ERROR and f.layers == ("LOAD",) and f.handles
    assert "load F1" in f.message and repr(text) in f.message
    for w in words:
        assert w in f.message
    assert mech.loads[0].magnitude_N is None
    assert Code.LOAD_NO_MAGNITUDE not in _codes(mech)  # said once, as M222
    path = tmp_path / "t.dxf"
    with pytest.raises(dxfcheck.MechanismError) as info:
        dxfcheck.analyse(path, mu=MU)
    assert [f.code for f in info.value.findings] == [Code.TEXT_AMBIGUOUS]
    # --effort replaces the text: the solve goes on, the text stays a warning
    sol = dxfcheck.analyse(path, mu=MU, effort_N=1200.0)
    (w,) = [f for f in sol.findings if f.code is Code.TEXT_AMBIGUOUS]
    assert w.severity is Severity.WARNING
    # and the inverse question, which keeps the texts' ratios, refuses it too
    with pytest.raises(dxfcheck.MechanismError):
        dxfcheck.analyse(path, mu=MU, torque_Nm=250.0)


@pytest.mark.parametrize(
    ("text", "why"),
    [("F", "holds no force"), ("42 N*m", "holds no force"), ("-1.2 kN", "negative force")],
)
def test_unread_load_text_is_quoted(tmp_path, text, why):
    """Every message about a text that was not read quotes it."""
    mech = _mechanism(tmp_path, block_brake(r=R, l=L, x=X, a=A, effort=text))
    codes = _codes(mech)
    (unread,) = codes[Code.TEXT_UNREAD]
    (none,) = codes[Code.LOAD_NO_MAGNITUDE]
    for f in (unread, none):
        assert repr(text) in f.message and why in f.message


def test_spaced_thousands_solve_alike_on_the_winch_demo(tmp_path):
    """'1 800 N' gives the same solution as '1800 N' and '1.8 kN' on the
    winch demo (drawings/build.py, invented data)."""
    sols = []
    for text in ("1800 N", "1 800 N", "1\u00a0800 N", "1.8 kN"):
        path = tmp_path / f"w{len(sols)}.dxf"
        _with_text(winch_two_shoe(), "load", text).save(path)
        sols.append(dxfcheck.analyse(path, mu=MU))
    assert all(s.cases == sols[0].cases for s in sols[1:])
    assert all(c.torque_Nm > 0 for c in sols[0].cases)


@pytest.mark.parametrize("version", ["R2000", "R12"])
def test_thin_space_escaped_in_older_dxf_versions(tmp_path, version):
    """An R2000 or R12 file carries a thin space outside its code page as the
    escape \\U+2009 (DXF Reference, "Unicode characters"; from memory):
    decoded, it groups thousands like any space."""
    path = tmp_path / "old.dxf"
    block_brake(r=R, l=L, x=X, a=A, effort="1\u2009200 N").save(path, dxfversion=version)
    drawing = dxfcheck.read_drawing(path, units="mm")
    assert any("\\U+2009" in t.text for t in drawing.texts)
    (load,) = dxfcheck.build_mechanism(drawing).loads
    assert load.magnitude_N == 1200.0


def test_spaced_thousands_solve_alike_on_the_block_brake(tmp_path):
    sols = []
    for text in ("1200 N", "1 200 N"):
        path = tmp_path / f"b{len(sols)}.dxf"
        block_brake(r=R, l=L, x=X, a=A, effort=text).save(path)
        sols.append(dxfcheck.analyse(path, mu=MU))
    assert sols[0].cases == sols[1].cases


# --- springs --------------------------------------------------------------------


@pytest.mark.parametrize(
    ("text", "tension"),
    [
        ("3.5kNT", True),
        ("3.5 kN T", True),
        ("3.5kN-T", True),
        ("3.5 kN (T)", True),
        ("PRELOAD 3.5 kN T", True),
        ("T 3 500 N", True),
        ("3,5 kN tension", True),
        ("TENSION SPRING 3.5 kN", True),
        ("3.5kNC", False),
        ("3.5 kN compression", False),
    ],
)
def test_spring_sense_is_read_apart_from_the_unit(tmp_path, text, tension):
    """Before: '3.5kNT' was refused with 'end its text with C or T'."""
    mech = _mechanism(tmp_path, _spring_pair(text))
    (sp,) = mech.springs
    assert sp.force_N == pytest.approx(3500.0, rel=1e-12) and sp.tension is tension
    assert not {f.code for f in mech.findings} & {Code.TEXT_UNREAD, Code.TEXT_AMBIGUOUS, Code.SPRING_NO_SENSE}


def test_glued_sense_solves_like_the_spaced_one(tmp_path):
    """'3.5kNT' and '3.5 kN T' give one solution; the tension spring pulls
    the lever tops together and the brake holds both ways (Sarkar ch. 10,
    Illustration 3: both shoes pressed, T = 1412.2 N·m with the long-shoe
    μ'; here only its sign and the equality are checked)."""
    sols = []
    for text in ("3.5 kN T", "3.5kNT"):
        path = tmp_path / f"s{len(sols)}.dxf"
        _spring_pair(text).save(path)
        sols.append(dxfcheck.analyse(path, mu=0.4))
    assert sols[0].cases == sols[1].cases
    assert all(c.torque_Nm > 0 for c in sols[0].cases)
    assert not any(f.code is Code.SHOE_LIFTS for f in sols[0].findings)


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("3,500 N T", ["'3,500 N T'", "'3,5 N T'", "'3500 N T'"]),
        ("3.5 kN C T", ["compression", "tension", "'C'", "'T'"]),
        ("3.5 kNT (compression)", ["'kNT'", "'compression'"]),
        ("3.5 kN / 4.2 kN T", ["'3.5 kN'", "'4.2 kN'"]),
    ],
)
def test_ambiguous_spring_text_is_refused(tmp_path, text, words):
    mech = _mechanism(tmp_path, _spring_pair(text))
    fs = _codes(mech)[Code.TEXT_AMBIGUOUS]
    assert all(f.severity is Severity.ERROR and f.layers == ("SPRING",) for f in fs)
    msg = " ".join(f.message for f in fs)
    assert repr(text) in msg and "spring1" in msg
    for w in words:
        assert w in msg
    assert not mech.springs or mech.springs[0].force_N is None


@pytest.mark.parametrize(
    ("text", "code"), [("3500 N", Code.SPRING_NO_SENSE), ("lots T", Code.LOAD_NO_MAGNITUDE), ("T1 3.5 kN", None)]
)
def test_unread_spring_text_is_quoted(tmp_path, text, code):
    """'T1' is a name, not the sense letter T."""
    mech = _mechanism(tmp_path, _spring_pair(text))
    f = _codes(mech)[code or Code.SPRING_NO_SENSE][0]
    assert repr(text) in f.message


def test_capstan_demo_spring_reads_the_same(tmp_path):
    """The capstan demo's '0.5 kN C' written '500N compression' or '0,500 kNC'
    (a leading 0: a decimal comma): one solution (invented data)."""
    sols = []
    for text in ("0.5 kN C", "500N compression", "0,500 kNC"):
        path = tmp_path / f"c{len(sols)}.dxf"
        _with_text(capstan_band(), "spring", text).save(path)
        sols.append(dxfcheck.analyse(path, mu=MU))
    assert all(s.cases == sols[0].cases for s in sols[1:])


# --- spec values and options ----------------------------------------------------


def _cli(*args):
    return subprocess.run(
        [sys.executable, "-m", "dxfcheck", *map(str, args)], capture_output=True, text=True, timeout=120
    )


@pytest.fixture
def brake(tmp_path):
    path = tmp_path / "block.dxf"
    block_brake(r=R, l=L, x=X, a=A, effort="1.2 kN").save(path)
    return path


@pytest.mark.parametrize(
    ("where", "value", "words"),
    [
        ("toml", "1,200 N*m", ["dxfcheck.toml", "required_torque", "'1,200 N*m'", "ambiguous", "'1200 N*m'"]),
        ("header", "1.250 mm", ["header property dxfcheck.pin_length", "pin_length", "'1.250 mm'", "ambiguous"]),
        ("set", "1.200 kN", ["command line", "effort", "'1.200 kN'", "ambiguous"]),
    ],
)
def test_ambiguous_spec_value_is_refused(tmp_path, brake, where, value, words):
    """A spec value from dxfcheck.toml, a header property or --set is read
    by the same rule and refused naming its key and source."""
    overrides = []
    if where == "toml":
        (tmp_path / "dxfcheck.toml").write_text(f'[spec]\nrequired_torque = "{value}"\n')
    elif where == "header":
        doc = block_brake(r=R, l=L, x=X, a=A, effort="1.2 kN").to_doc()
        doc.header.custom_vars.append("dxfcheck.pin_length", value)
        doc.saveas(brake)
    else:
        overrides = [("effort", value)]
    with pytest.raises(dxfcheck.ConfigError) as info:
        check(brake, overrides=overrides)
    for w in words:
        assert w in str(info.value)


def test_ambiguous_spaced_spec_value_is_read(tmp_path, brake):
    (tmp_path / "dxfcheck.toml").write_text('[spec]\nrequired_torque = "1 200 N*m"\n')
    j = check(brake)
    assert j.spec.num("required_torque") == 1200.0


@pytest.mark.parametrize(
    ("args", "option"),
    [
        (("solve", "--effort", "1.200kN"), "--effort"),
        (("solve", "--torque", "1,200 N*m"), "--torque"),
        (("check", "--required-torque", "1,200 N*m"), "required_torque"),
        (("solve", "--samples", "8", "--mu", "0.3..0.4", "--required-torque", "1,200 N*m"), "--required-torque"),
        (("solve", "--tolerance", "0,125"), None),  # a leading-0 decimal comma: read, not refused
    ],
)
def test_ambiguous_option_is_refused_naming_it(brake, args, option):
    r = _cli(args[0], brake, *args[1:])
    if option is None:
        assert r.returncode == 0, r.stderr
        return
    assert r.returncode == 2
    assert option in r.stderr and "ambiguous" in r.stderr and r.stderr.startswith("dxfcheck:")
