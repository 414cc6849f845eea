"""Quantities written as text, against exact definitions (NIST SP 811,
2008 ed., Appendix B.8), and numbers written with decimal and thousands marks
(BIPM, *The International System of Units*, 9th ed., 2019, §5.4.4: the
decimal marker is a point or a comma on the line, digits may be grouped in
threes by a space, never by a point or a comma; from memory)."""

from __future__ import annotations

import pytest

from dxfcheck.core.units import AmbiguousTextError, UnitError, length_unit_factor, parse_quantity, quantity_in_text


@pytest.mark.parametrize(
    ("text", "dimension", "value"),
    [
        ("1.2 kN", "force", 1200.0),
        ("650 N", "force", 650.0),
        ("150 lbf", "force", 150 * 4.4482216152605),  # NIST SP 811 B.8: 1 lbf = 4.448 221 615 260 5 N
        ("60 kgf", "force", 60 * 9.80665),  # NIST SP 811 B.8: 1 kgf = 9.806 65 N
        ("1,5 kN", "force", 1500.0),
        ("450 N*m", "torque", 450.0),
        ("450 N·m", "torque", 450.0),
        ("100 lbf*ft", "torque", 100 * 4.4482216152605 * 0.3048),
        ("0.3 MPa", "pressure", 0.3),
        ("25 psi", "pressure", 25 * 4.4482216152605 / 25.4**2),
        ("2 in", "length", 50.8),
        ("1450 rpm", "speed", 1450.0),
        ("7.5 kW", "power", 7500.0),
    ],
)
def test_parse(text, dimension, value):
    assert parse_quantity(text, dimension).value == pytest.approx(value, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "dimension"), [("12", "force"), ("12 N", "torque"), ("kN", "force"), ("nan N", "force")]
)
def test_rejects(text, dimension):
    with pytest.raises(UnitError):
        parse_quantity(text, dimension)


def test_default_unit():
    assert parse_quantity("0.05", "length", default_unit="mm").value == 0.05


def test_length_units():
    assert length_unit_factor("inch") == 25.4
    assert length_unit_factor("Millimetre") == 1.0
    with pytest.raises(UnitError):
        length_unit_factor("furlong")


# --- decimal and thousands marks ------------------------------------------------


@pytest.mark.parametrize(
    ("text", "value"),
    [
        # spaces group thousands (BIPM SI Brochure 9th ed. §5.4.4, from memory): ordinary, no-break,
        # thin and narrow no-break spaces; the mark left after them is decimal
        ("1 200 N", 1200.0),
        ("1\u00a0200 N", 1200.0),
        ("1\u2009200 N", 1200.0),
        ("1\u202f200 N", 1200.0),
        ("1\\U+2009200 N", 1200.0),  # the DXF escape of a thin space (R2000 and older)
        ("12 500 000 N", 12.5e6),
        ("1 200,5 N", 1200.5),
        ("1 200.500 N", 1200.5),
        # both marks: the last one is decimal (common practice)
        ("1,200.5 N", 1200.5),
        ("1.200,5 N", 1200.5),
        ("1,200,000.25 N", 1200000.25),
        # a mark written twice cannot be the decimal one (common practice)
        ("1,200,000 N", 1.2e6),
        ("1.200.000 N", 1.2e6),
        # one mark that cannot group thousands: a lone leading 0, no digit before it, more than three
        # digits before it or not exactly three after it (common practice)
        ("0,250 kN", 250.0),
        ("0.250 kN", 250.0),
        (".250 kN", 250.0),
        ("1200,500 N", 1200.5),
        ("1,2 kN", 1200.0),
        ("1,20 kN", 1200.0),
        ("1,2000 kN", 1200.0),
        ("1.2e3 N", 1200.0),
    ],
)
def test_marks_read_as_written(text, value):
    assert parse_quantity(text, "force").value == pytest.approx(value, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "dec", "thou"),
    [
        ("1,200 N", "'1,2 N'", "'1200 N'"),
        ("1.200 N", "'1.2 N'", "'1200 N'"),
        ("12,500 kN", "'12,5 kN'", "'12500 kN'"),
        ("1.234 kN", "'1.2340 kN'", "'1234 kN'"),
        ("-1,200 N", "'-1,2 N'", "'-1200 N'"),
        ("1,200e3 N", "'1,2e3 N'", "'1200e3 N'"),
    ],
)
def test_a_mark_that_may_group_thousands_is_refused(text, dec, thou):
    """One comma or point with 1-3 digits before it (not a lone 0) and exactly
    three after it may be a decimal or a thousands mark: refused, quoting the
    text and both ways to write it (common practice)."""
    with pytest.raises(AmbiguousTextError) as info:
        parse_quantity(text, "force")
    msg = str(info.value)
    assert repr(text) in msg and dec in msg and thou in msg


def test_suggested_spellings_read_back():
    """The two spellings the refusal suggests are read without a refusal."""
    assert parse_quantity("1,2 N", "force").value == pytest.approx(1.2)
    assert parse_quantity("1200 N", "force").value == 1200.0
    assert parse_quantity("1.2340 kN", "force").value == pytest.approx(1234.0)
    assert parse_quantity("1 200 N", "force").value == 1200.0


@pytest.mark.parametrize("text", ["12 3456 N", "1 20 N", "1,2,3 N", "1.2.5 N"])
def test_malformed_groups_are_not_numbers(text):
    with pytest.raises(UnitError):
        parse_quantity(text, "force")


# --- a quantity among words -----------------------------------------------------


@pytest.mark.parametrize(
    ("text", "value", "written"),
    [
        ("F=1.2kN", 1200.0, "1.2kN"),
        ("1.2 kN (set)", 1200.0, "1.2 kN"),
        ("PRELOAD 1.2 kN T", 1200.0, "1.2 kN"),
        ("1 200 N", 1200.0, "1 200 N"),
        ("F1 = 650 N", 650.0, "650 N"),  # F1 is a name, not a number
        ("L = 250 mm, F = 1,5 kN", 1500.0, "1,5 kN"),  # a length beside it is passed over
        ("1.2 kN (1200 N)", 1200.0, "1.2 kN"),  # the same force twice
        ("SET 1.2 kN.", 1200.0, "1.2 kN"),
        ("1.2kN\n(set)", 1200.0, "1.2kN"),
    ],
)
def test_quantity_in_text(text, value, written):
    q = quantity_in_text(text, "force")
    assert (q.value, q.text) == (pytest.approx(value, rel=1e-12), written)


def test_glued_letters():
    """A spring's sense letter written against the unit is not part of it."""
    with pytest.raises(UnitError):
        quantity_in_text("1.2kNT", "force")
    assert quantity_in_text("1.2kNT", "force", glued="CTct").value == 1200.0


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("1,200 N", ["'1,200 N'", "'1,2 N'", "'1200 N'"]),
        ("1.2 kN / 2.4 kN", ["2 different forces", "'1.2 kN'", "'2.4 kN'"]),
        ("1,2 kN 270 lbf", ["2 different forces"]),
        ("2 x 600 N", ["'2 x'", "'600 N'"]),
        ("2×600 N", ["'2'", "'600 N'"]),
        ("1.2-1.5 kN", ["'1.2'", "'1.5 kN'"]),
        ("1.2 to 1.5 kN", ["'1.2 to'"]),
        ("Load 1: 650 N", ["'1'", "'650 N'"]),
    ],
)
def test_quantity_in_text_ambiguous(text, words):
    with pytest.raises(AmbiguousTextError) as info:
        quantity_in_text(text, "force")
    assert repr(text) in str(info.value)
    for w in words:
        assert w in str(info.value)


@pytest.mark.parametrize("text", ["F", "42 N*m", "lots", "", "F1.2kN"])
def test_quantity_in_text_none(text):
    with pytest.raises(UnitError) as info:
        quantity_in_text(text, "force")
    assert not isinstance(info.value, AmbiguousTextError)
    assert repr(text) in str(info.value) and "holds no force" in str(info.value)


@pytest.mark.parametrize(
    ("text", "dimension"),
    [("5 mN", "force"), ("2 mPa", "pressure"), ("3 mW", "power"), ("450 mN*m", "torque")],
)
def test_milli_with_its_case_is_refused_not_read_as_mega(text, dimension):
    """SI Brochure (BIPM, 9th ed., 2019, §3, table of prefixes): m is milli
    (10⁻³), M is mega (10⁶).  The tables are read without case, so ``mN``
    would have been read as MN, 10⁹ times too large; it is refused naming
    both readings."""
    with pytest.raises(UnitError, match="milli"):
        parse_quantity(text, dimension)


def test_mega_and_upper_case_texts_still_read():
    """Drawing texts are often all capitals: ``MN``, ``MPA``, ``KN`` are read
    as mega and kilo (SI Brochure §3; upper-case k is common practice on
    drawings)."""
    assert parse_quantity("5 MN", "force").value == 5.0e6
    assert parse_quantity("2 MPA", "pressure").value == 2.0
    assert parse_quantity("1.2 KN", "force").value == 1200.0
    assert parse_quantity("450 N*m", "torque").value == 450.0
