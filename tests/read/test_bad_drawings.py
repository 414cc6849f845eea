"""Bad drawings: a corpus of broken and hostile inputs made here, and a
fuzz test that mutates the DXF tags of good drawings.  Every command must
exit 0, 1 or 2, and on 2 say what is wrong in lines that start with
``dxfcheck:`` -- never a traceback, never a half-written file, never a change
to the input."""

from __future__ import annotations

import hashlib
import os
import random
from collections import Counter

import pytest
from common import conveyor_block, winch_two_shoe
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from schema_check import output_json

from dxfcheck import cli

#: What was tried, reported at the end of the run (see conftest.py).
TRIED: Counter[str] = Counter()


@pytest.fixture(autouse=True)
def _raise_internal_errors(monkeypatch):
    # an internal error must fail the test, not become one polite line
    monkeypatch.setattr(cli, "INTERNAL_ERRORS_RAISE", True)


def run(capsys, *args) -> tuple[int, str, str]:
    rc = cli.main([str(a) for a in args])
    out, err = capsys.readouterr()
    assert rc in (0, 1, 2), (rc, err)
    assert "Traceback" not in err
    if rc == 2:
        lines = err.strip().splitlines()
        assert lines and all(line.startswith(("dxfcheck:", "usage:")) for line in lines), err
    return rc, out, err


@pytest.fixture(scope="module")
def good(tmp_path_factory):
    folder = tmp_path_factory.mktemp("good")
    conveyor_block().save(folder / "conveyor.dxf")
    winch_two_shoe().save(folder / "winch.dxf")
    return folder


COMMANDS = [("solve", "--json"), ("check", "--json")]


def _all_commands(capsys, path, tmp_path):
    before = hashlib.sha256(path.read_bytes()).hexdigest() if path.is_file() else None
    codes = []
    for cmd in COMMANDS:
        codes.append(run(capsys, cmd[0], path, *cmd[1:])[0])
    out = tmp_path / "marked.dxf"
    rc, _, _ = run(capsys, "annotate", path, "-o", out, "--force")
    codes.append(rc)
    if rc != 0:
        assert not out.exists()
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]  # no half-written files
    if before is not None:
        assert hashlib.sha256(path.read_bytes()).hexdigest() == before
    return codes


def test_truncations(capsys, good, tmp_path):
    """A file cut at 25 places (still being written, or cut off in transfer)."""
    data = (good / "conveyor.dxf").read_bytes()
    for k in range(1, 26):
        cut = tmp_path / f"cut{k}.dxf"
        cut.write_bytes(data[: len(data) * k // 26])
        rc, _, err = run(capsys, "solve", cut)
        TRIED["truncation"] += 1
        assert rc == 2 and ("cut off" in err or "empty" in err or "not a DXF" in err), err


def test_byte_flips(capsys, good, tmp_path):
    """40 files with one byte changed at a random (seeded) place."""
    rng = random.Random(1729)
    data = bytearray((good / "winch.dxf").read_bytes())
    outcomes = Counter()
    for k in range(40):
        flipped = bytearray(data)
        pos = rng.randrange(len(flipped) - 8)
        flipped[pos] = rng.choice(b"0123456789.-eE \n\x00\xff:AZ")
        path = tmp_path / f"flip{k}.dxf"
        path.write_bytes(bytes(flipped))
        outcomes[run(capsys, "solve", path, "--json")[0]] += 1
        TRIED["byte flip"] += 1
    assert sum(outcomes.values()) == 40


def test_binary_and_r12_versions_solve_alike(capsys, good, tmp_path):
    import ezdxf

    doc = ezdxf.readfile(good / "winch.dxf")
    doc.saveas(tmp_path / "winch-bin.dxf", fmt="bin")
    winch_two_shoe().save(tmp_path / "winch-r12.dxf", dxfversion="R12")
    results = []
    for name in ("winch-bin.dxf", "winch-r12.dxf"):
        rc, out, _ = run(capsys, "solve", tmp_path / name, "--json", "--units", "mm")
        assert rc == 0
        results.append(output_json(out)["cases"][0]["torque_Nm"])
        TRIED["binary/R12"] += 1
    rc, out, _ = run(capsys, "solve", good / "winch.dxf", "--json")
    assert results == [pytest.approx(output_json(out)["cases"][0]["torque_Nm"], rel=1e-12)] * 2


@pytest.mark.parametrize(
    ("version", "codepage", "label"),
    [("R2000", "ANSI_1252", "Hebel Ø 30"), ("R2010", None, "Bremshebel ü ✓"), ("R12", "ANSI_1252", "Hébel")],
)
def test_encodings(capsys, tmp_path, version, codepage, label):
    sk = conveyor_block()
    sk.label(label, 300, 240)
    doc = sk.to_doc(dxfversion=version)
    if codepage:
        doc.header["$DWGCODEPAGE"] = codepage
    path = tmp_path / "enc.dxf"
    doc.saveas(path)
    rc, _, _ = run(capsys, "solve", path, "--json", "--units", "mm")
    assert rc == 0
    TRIED["encoding"] += 1


def test_mixed_encoding_bytes(capsys, good, tmp_path):
    """Invalid UTF-8 inside an R2010 (UTF-8) file's text."""
    data = (good / "conveyor.dxf").read_bytes().replace(b"420 N", b"420 N \xe9\xff")
    path = tmp_path / "mixed.dxf"
    path.write_bytes(data)
    rc, _, _ = run(capsys, "solve", path, "--json")
    assert rc in (0, 2)
    TRIED["encoding"] += 1


@pytest.mark.parametrize("value", ["nan", "inf", "-inf", "1e300", "1e12345"])
def test_non_finite_and_huge_coordinates(capsys, good, tmp_path, value):
    """The lever's end x coordinate replaced: a finding naming the entity
    or a clean error, never a number made up."""
    text = (good / "conveyor.dxf").read_text()
    lines = text.splitlines()
    idx = lines.index("LINK", lines.index("LINE"))  # first LINE on LINK
    j = next(i for i in range(idx, len(lines)) if lines[i].strip() == "11")
    lines[j + 1] = value
    path = tmp_path / "bad.dxf"
    path.write_text("\n".join(lines) + "\n")
    rc, _, err = run(capsys, "solve", path, "--json")
    TRIED["non-finite"] += 1
    assert rc == 2
    assert "D105" in err or "M2" in err or "S30" in err or "not a readable" in err


def test_size_limit(capsys, good, tmp_path):
    """A drawing with 3 MB of clutter on another layer solves; with a 1 MB
    limit it is refused with the option to raise it."""
    import ezdxf

    doc = ezdxf.readfile(good / "conveyor.dxf")
    msp = doc.modelspace()
    for k in range(30000):
        msp.add_line((k, 1000), (k + 1, 1001), dxfattribs={"layer": "HATCH-CLUTTER"})
    path = tmp_path / "big.dxf"
    doc.saveas(path)
    assert path.stat().st_size > 2_000_000
    assert run(capsys, "solve", path, "--json")[0] == 0
    rc, _, err = run(capsys, "solve", path, "--max-size", "1MB")
    assert rc == 2 and "--max-size" in err
    TRIED["size limit"] += 2


def test_too_many_skeleton_entities(capsys, good, tmp_path):
    import ezdxf

    doc = ezdxf.readfile(good / "conveyor.dxf")
    for k in range(2500):
        doc.modelspace().add_line((k, -500), (k + 0.5, -500), dxfattribs={"layer": "LINK"})
    path = tmp_path / "wrongmap.dxf"
    doc.saveas(path)
    rc, _, err = run(capsys, "solve", path)
    assert rc == 2 and "layer map" in err
    TRIED["wrong layer map"] += 1


def test_time_limit(capsys, good):
    rc, _, err = run(capsys, "solve", good / "winch.dxf", "--timeout", "0.000001")
    assert rc == 2 and "--timeout" in err
    TRIED["time limit"] += 1


def test_not_dxf_at_all(capsys, tmp_path):
    cases = {
        "missing.dxf": None,
        "empty.dxf": b"",
        "drawing.dwg.dxf": b"AC1032\x00\x00\x00\x00garbage",
        "doc.pdf.dxf": b"%PDF-1.7\n...",
        "image.dxf": b"\x89PNG\r\n\x1a\n....",
        "words.dxf": b"this is a letter, not a drawing\n",
    }
    for name, data in cases.items():
        path = tmp_path / name
        if data is not None:
            path.write_bytes(data)
        rc, _, err = run(capsys, "solve", path)
        assert rc == 2 and str(path) in err
        TRIED["not DXF"] += 1
    rc, _, err = run(capsys, "solve", tmp_path)
    assert rc == 2 and "folder" in err


@pytest.mark.skipif(os.geteuid() == 0, reason="root reads files whatever their permissions")
def test_unreadable_permissions(capsys, good, tmp_path):  # pragma: no cover - not run as root
    path = tmp_path / "locked.dxf"
    path.write_bytes((good / "conveyor.dxf").read_bytes())
    path.chmod(0)
    rc, _, err = run(capsys, "solve", path)
    assert rc == 2 and "permission" in err


def test_commands_on_every_demo_like_corpus(capsys, good, tmp_path):
    """Every command on a few damaged files: exit codes and no half files."""
    data = (good / "winch.dxf").read_bytes()
    for k, cut in enumerate((len(data) // 3, len(data) // 2, len(data) - 40)):
        path = tmp_path / f"c{k}.dxf"
        path.write_bytes(data[:cut])
        assert set(_all_commands(capsys, path, tmp_path)) == {2}
        TRIED["all commands"] += 1
    assert set(_all_commands(capsys, good / "winch.dxf", tmp_path)) <= {0, 1}


# --- fuzzing the tags --------------------------------------------------------------


def _pairs(path):
    lines = path.read_text().splitlines()
    return [(lines[i], lines[i + 1]) for i in range(0, len(lines) - 1, 2)]


mutation = st.tuples(
    st.sampled_from(["delete", "duplicate", "value", "code", "swap"]),
    st.floats(min_value=0, max_value=1, allow_nan=False),
    st.one_of(
        st.sampled_from(["nan", "inf", "-1e308", "0", "-0", "1e20", "", "LINK", "PIN", "SHOE", "ARC", "EOF", "x"]),
        st.integers(-(10**9), 10**9).map(str),
        st.floats(allow_nan=True, allow_infinity=True).map(repr),
        st.text(alphabet="0123456789.-eE \tÿ", max_size=8),
    ),
)


@settings(max_examples=60, deadline=None, derandomize=True, suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(ops=st.lists(mutation, min_size=1, max_size=4), which=st.sampled_from(["conveyor.dxf", "winch.dxf"]))
def test_fuzz_tags(capsys, good, tmp_path, ops, which):
    """Mutations of the DXF tag stream of good drawings (delete, duplicate,
    change a value or a group code, swap neighbours): every command exits 0,
    1 or 2 with one-line messages, no traceback.  Derandomised, so that CI
    runs the same 60 examples every time; run with a larger max_examples and
    without derandomize to hunt for new cases."""
    pairs = _pairs(good / which)
    for kind, where, value in ops:
        i = min(int(where * len(pairs)), len(pairs) - 2)
        if kind == "delete":
            del pairs[i]
        elif kind == "duplicate":
            pairs.insert(i, pairs[i])
        elif kind == "value":
            pairs[i] = (pairs[i][0], value)
        elif kind == "code":
            pairs[i] = (value or "0", pairs[i][1])
        else:
            pairs[i], pairs[i + 1] = pairs[i + 1], pairs[i]
    path = tmp_path / "fuzz.dxf"
    path.write_text("\n".join(f"{c}\n{v}" for c, v in pairs) + "\n", errors="surrogateescape")
    for cmd in COMMANDS:
        rc, _, _ = run(capsys, cmd[0], path, *cmd[1:])
        TRIED[f"fuzz {cmd[0]} exit {rc}"] += 1


def test_mu_at_the_self_locking_limit(tmp_path):
    """At μ = x/a exactly the block brake's equations are singular: said so,
    not answered with huge numbers (Khurmi & Gupta, self-locking x ≤ μa; from
    memory)."""
    from common import block_brake

    import dxfcheck
    from dxfcheck.core.findings import Code

    path = tmp_path / "lock.dxf"
    block_brake(r=200, l=500, x=200, a=250, effort="500 N").save(path)
    with pytest.raises(dxfcheck.SolveError) as info:
        dxfcheck.analyse(path, mu=0.8, directions=["cw", "ccw"])
    assert [f.code for f in info.value.findings] == [Code.SELF_LOCKING]
    assert "limit" in info.value.findings[0].message


def test_shoe_pin_at_the_drum_axis(tmp_path):
    """A pivoted shoe whose pin sits on the drum axis has no line of action
    at the friction angle through it: a finding, not a number."""
    import dxfcheck
    from dxfcheck.core.findings import Code
    from dxfcheck.output.sketch import Sketch

    sk = Sketch()
    sk.drum(0, 0, 150)
    sk.pivot(0, -300, 20)
    sk.pin(0, 0, 10)
    sk.link((0, -300), (0, 0), (300, 0))
    sk.link((0, 0), (0, 150))
    sk.shoe(0, 0, 150, 80, 100)
    sk.load(300, 0, 0, 1, "100 N")
    path = tmp_path / "axis.dxf"
    sk.save(path)
    with pytest.raises(dxfcheck.SolveError) as info:
        dxfcheck.analyse(path, mu=0.3, shoe_model="short")
    assert Code.NO_CONTACT_LINE in {f.code for f in info.value.findings}


# --- texts that cannot be read one way ----------------------------------------------


@pytest.mark.parametrize(
    ("role", "text"),
    [
        ("load", "1,200 N"),  # a decimal or a thousands comma (read as 1.2 N before)
        ("load", "1.200 N"),
        ("load", "2 x 600 N"),  # a factor beside the force
        ("load", "1.2 kN / 2.4 kN"),  # two forces
        ("load", "-420 N"),  # a sign: the line gives the direction
        ("load", "F"),  # no force at all
        ("spring", "1,500 N C"),
        ("spring", "0.5 kN C T"),  # both senses
        ("spring", "0.5 kN"),  # no sense
    ],
)
def test_texts_read_two_ways_or_not_at_all(capsys, tmp_path, role, text):
    """A load or spring text that could be read two ways, or not at all:
    every command exits 2 and the message quotes the text (issue 13)."""
    from common import capstan_band

    sk = conveyor_block() if role == "load" else capstan_band()
    sk.items = [(it[0], it[1], text, *it[3:]) if it[:2] == ("text", role) else it for it in sk.items]
    path = tmp_path / "text.dxf"
    sk.save(path)
    rc, _, err = run(capsys, "solve", path)
    assert rc == 2 and repr(text) in err, err
    assert set(_all_commands(capsys, path, tmp_path)) == {2}
    TRIED[f"{role} text"] += 1


# --- drawings read in the wrong unit (issue 13) --------------------------------------


def _drum_315_mm(units):
    """A block brake on a Ø315 mm drum (a DIN 15435 size, from memory) whose
    numbers are millimetres, saved with the header unit ``units``."""
    from common import block_brake

    return block_brake(r=157.5, l=600, x=250, a=50, effort="1 kN", units=units)


def _mott_inch(units):
    """Mott, *Machine Elements in Mechanical Design*, 4th ed., Example
    Problem 22-10 (from memory): a band brake on a 12 in drum, its numbers
    inches, saved with the header unit ``units``."""
    from common import simple_band

    return simple_band(r=6, wrap_deg=225, anchor_run=4, arm=20, effort="120 lbf", units=units)


#: name -> (sketch, $MEASUREMENT or None, extra check options, exit code,
#: codes that must be reported, codes that must not, phrase in the findings).
#: Ranges: drum Ø 100-1250 mm (DIN 15435 series 160-710 mm widened, from
#: memory / common practice), see dxfcheck.mechanism.plausibility.
UNIT_SLIPS = {
    "mm drawing, $INSUNITS = 6 (m)": (_drum_315_mm("m"), None, ("--strict",), 1, {"D110"}, set(), "as millimetres"),
    "mm drawing, $INSUNITS = 1 (inch)": (_drum_315_mm("inch"), None, (), 1, {"D110"}, set(), "as millimetres"),
    "mm drawing, $INSUNITS = 0, $MEASUREMENT = 0": (
        _drum_315_mm(None),
        0,
        (),
        1,
        {"D101", "D110"},
        set(),
        "as millimetres it would be Ø315 mm",
    ),
    "the same, confirmed with --units mm": (_drum_315_mm(None), 0, ("--units", "mm"), 0, set(), {"D101", "D110"}, ""),
    "mm drawing, no unit at all": (_drum_315_mm(None), None, (), 1, {"D101"}, {"D110"}, "millimetres assumed"),
    "inch drawing, $INSUNITS = 4 (mm)": (_mott_inch("mm"), None, (), 1, {"D110"}, set(), "as inches it would be"),
    "inch drawing, $INSUNITS = 1": (_mott_inch("inch"), None, ("--mu", "0.25"), 0, set(), {"D101", "D110", "D111"}, ""),
}


@pytest.mark.parametrize("case", list(UNIT_SLIPS))
def test_units_misread(capsys, tmp_path, case):
    """A drawing read in the wrong unit never passes check; the finding says
    which unit makes it plausible; a confirmed or plausible unit passes."""
    sketch, measurement, options, code, must, must_not, phrase = UNIT_SLIPS[case]
    path = tmp_path / "units.dxf"
    doc = sketch.to_doc()
    if measurement is not None:
        doc.header["$MEASUREMENT"] = measurement
    doc.saveas(path)
    rc, out, _ = run(capsys, "check", path, "--json", *options)
    TRIED["units misread"] += 1
    report = output_json(out)
    codes = {f["code"] for f in report["findings"]}
    units_rule = next(r for r in report["rules"] if r["rule"] == "drawing.units")
    assert rc == code, units_rule
    assert must <= codes and not codes & must_not, codes
    assert (units_rule["verdict"] == "fail") == bool(must), units_rule
    assert phrase in " ".join(f["message"] for f in report["findings"])
    if code:
        assert run(capsys, "check", path, "--strict", *options)[0] == 1


# --- texts from the drawing are data, never control ---------------------------------------------

#: Labels and load texts as a hostile or careless drawing carries them: an
#: ANSI colour and an OSC title sequence, a bell, a bidirectional override,
#: rich markup, an emoji code, XML's < & >.
HOSTILE_LABELS = {
    "O": "\x1b[31mO1<&>",
    "lever": "[/]lev\x07er [bold red]x",
    "block": "blk\x1b]0;pwned\x07 \u202e:warning: &amp;",
}
#: Control characters that must never reach a terminal or an XML file raw.
RAW_CONTROLS = ("\x1b", "\x07", "\u202e")


def _hostile(path, load_text="650 N"):
    from common import block_brake

    sk = block_brake(r=150, l=600, x=250, a=40, effort=load_text)
    sk.items = [
        ("text", "label", HOSTILE_LABELS[it[2]], it[3]) if it[:2] == ("text", "label") else it for it in sk.items
    ]
    sk.save(path)
    return path


def test_hostile_labels_are_shown_not_obeyed(capsys, tmp_path):
    """The terminal report, the JSON, the JUnit XML, the SVG and the marked-up
    DXF of a drawing whose labels carry ESC sequences, a bell, a bidi
    override, rich markup and < & >: no raw control character anywhere, the
    markup printed as written, both XML files well-formed (parsed here with
    xml.etree), the labels readable in them."""
    import xml.etree.ElementTree as ET

    import ezdxf

    path = _hostile(tmp_path / "hostile.dxf")
    rc, out, err = run(capsys, "solve", path)
    assert rc == 0, err
    assert not any(c in out + err for c in RAW_CONTROLS)
    assert "\\x1b[31mO1<&>" in out and "[/]lev\\x07er [bold red]x" in out and ":warning:" in out
    rc, out, _ = run(capsys, "solve", path, "--json")
    assert rc == 0 and not any(c in out for c in RAW_CONTROLS)
    names = {p["name"] for p in output_json(out)["mechanism"]["pins"]}
    assert names == {HOSTILE_LABELS["O"]}  # the data itself is kept, JSON escapes it
    junit = tmp_path / "gate.xml"
    rc, out, _ = run(capsys, "check", path, "--junit", junit)
    assert rc in (0, 1) and not any(c in out for c in RAW_CONTROLS)
    cases = [c.get("name") for c in ET.parse(junit).getroot().iter("testcase")]
    assert any("\\x1b[31mO1<&>" in c for c in cases), cases
    svg, marked = tmp_path / "p.svg", tmp_path / "m.dxf"
    rc, _, err = run(capsys, "annotate", path, "-o", marked, "--svg", svg)
    assert rc == 0, err
    desc = ET.parse(svg).getroot().find("{http://www.w3.org/2000/svg}desc")
    assert desc is not None and "\\x1b[31mO1<&>" in desc.text
    texts = [e.dxf.text for e in ezdxf.readfile(marked).modelspace().query("TEXT[layer=='DXFCHECK_NOTES']")]
    assert any("O1<&>" in t for t in texts) and not any(c in t for t in texts for c in RAW_CONTROLS)
    TRIED["hostile labels"] += 5


def test_hostile_text_in_an_error_line(capsys, tmp_path):
    """A load text that cannot be read is quoted in the error lines on
    stderr: its control characters are shown, each problem stays one line."""
    path = _hostile(tmp_path / "hostile.dxf", load_text="\x1b[2J\x1b[Hforty\nnewtons")
    rc, _, err = run(capsys, "solve", path)
    assert rc == 2
    assert not any(c in err for c in RAW_CONTROLS) and "\\x1b[2J" in err
    TRIED["hostile labels"] += 1


# --- layer near misses ---------------------------------------------------------------


def _layers_slip(make, **layers):
    def build():
        sk = make()
        sk.layers = dict(layers)
        return sk.to_doc()

    return build


def _one_pin_on_pins():
    doc = winch_two_shoe().to_doc()
    s1 = next(e for e in doc.modelspace().query("CIRCLE[layer=='PIN']") if tuple(e.dxf.center)[:2] == (-250, 0))
    s1.dxf.layer = "PINS"
    return doc


def _pivoted_pair():
    from common import pivoted_long_shoes

    return pivoted_long_shoes(r=250, semi_deg=50, a=330, effort_N=4000, pair=True)


#: case -> (drawing, check's exit code, codes that must be found, phrase in a message)
LAYER_SLIPS = {
    "pins on PINS: pivoted shoes read as fixed": (
        _layers_slip(_pivoted_pair, pin="PINS"),
        0,
        {"M223", "M224"},
        'pin = ["PIN", "PINS"]',
    ),
    "pins on PINS: the winch becomes one rigid frame": (
        _layers_slip(winch_two_shoe, pin="PINS"),
        2,
        {"M223", "M224"},
        'pin = ["PIN", "PINS"]',
    ),
    "one shoe pin on PINS": (_one_pin_on_pins, 0, {"M223", "M224"}, 'pin = ["PIN", "PINS"]'),
    "drum on BRK-DRUM": (_layers_slip(winch_two_shoe, drum="BRK-DRUM"), 2, {"M201"}, 'drum = ["DRUM", "BRK-DRUM"]'),
    "drum on a layer of any name": (
        _layers_slip(winch_two_shoe, drum="XYZ-17"),
        2,
        {"M201"},
        'drum = ["DRUM", "XYZ-17"]',
    ),
    "pivots on PIVOTS": (_layers_slip(winch_two_shoe, pivot="PIVOTS"), 2, {"M223"}, 'pivot = ["PIVOT", "PIVOTS"]'),
    "shoes on SHOES": (_layers_slip(conveyor_block, shoe="SHOES"), 2, {"M211"}, 'shoe = ["SHOE", "SHOES"]'),
    "load on LOADS": (_layers_slip(conveyor_block, load="LOADS"), 2, {"M212"}, 'load = ["LOAD", "LOADS"]'),
    "labels on Labels": (_layers_slip(winch_two_shoe, label="Labels"), 0, {"M223"}, 'label = ["LABEL", "Labels"]'),
}


@pytest.mark.parametrize("case", list(LAYER_SLIPS))
def test_layer_slips(capsys, tmp_path, case):
    """A role's entities on a layer with no role never pass check quietly:
    the finding names the layer and the [layers] line that reads it; a
    warning fails --strict."""
    build, code, must, phrase = LAYER_SLIPS[case]
    path = tmp_path / "layers.dxf"
    build().saveas(path)
    rc, out, _ = run(capsys, "check", path, "--json")
    TRIED["layer near miss"] += 1
    report = output_json(out)
    codes = {f["code"] for f in report["findings"]}
    assert rc == code, report.get("error")
    assert must <= codes, codes
    assert phrase in " ".join(f["message"] for f in report["findings"])
    if code == 0:
        assert report["verdict"] == "warn"
        assert run(capsys, "check", path, "--strict")[0] == 1
