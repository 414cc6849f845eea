"""Compound units read by pint where the tables lack them, the numbers read
by dxfcheck alone, and the exact factors.

Expected values are built from the exact definitions of NIST SP 811 (2008
ed.), Appendix B.8 and B.9: 1 lbf = 4.448 221 615 260 5 N, 1 kgf = 9.806 65 N,
1 ft = 0.3048 m, 1 in = 0.0254 m, 1 hp (550 ft·lbf/s) = 745.699 871 582 270 22 W,
1 psi = 6894.757 293 168 361 Pa (lbf/in²), 1 bar = 10^5 Pa; the SI prefixes
(deca = 10, centi = 10^-2) from the SI Brochure (BIPM, 9th ed., 2019,
Table 7).  pint is the units library (pint.readthedocs.io)."""

from __future__ import annotations

import subprocess
import sys

import pytest

from dxfcheck.core import units
from dxfcheck.core.units import AmbiguousTextError, UnitError, parse_quantity, pint_factor, quantity_in_text

pytest.importorskip("pint")

LBF_N = 4.4482216152605  # NIST SP 811 B.8 (exact)
KGF_N = 9.80665  # NIST SP 811 B.8 (exact)
FT_M = 0.3048  # NIST SP 811 B.8 (exact)
IN_M = 0.0254  # NIST SP 811 B.8 (exact)


@pytest.mark.parametrize(
    ("text", "dimension", "expected"),
    [
        ("45 daN*m", "torque", 45 * 10 * 1.0),  # deca = 10
        ("300 ft*lbf", "torque", 300 * LBF_N * FT_M),
        ("300 ft·lbf", "torque", 300 * LBF_N * FT_M),
        ("1200 N*cm", "torque", 1200 * 0.01),
        ("3 kN*mm", "torque", 3 * 1000 * 0.001),
        ("20 ozf*in", "torque", 20 * LBF_N / 16 * IN_M),  # 1 ozf = lbf/16 (avoirdupois ounce, B.8)
        ("8 kgf/cm^2", "pressure", 8 * KGF_N / 100),  # N/mm² = MPa; 1 cm² = 100 mm²
        ("8 kgf/cm²", "pressure", 8 * KGF_N / 100),
        ("120 N/cm2", "pressure", 120 / 100),
        ("1.2 MPa*ft/min", "pv", 1.2 * FT_M / 60),
        ("6 kgf", "force", 6 * KGF_N),  # from the table, not pint
        ("1 200 daN*m", "torque", 12000.0),  # dxfcheck reads the number: space groups thousands
        ("1,5 daN*m", "torque", 15.0),  # decimal comma
    ],
)
def test_compound_units_against_exact_definitions(text, dimension, expected):
    assert parse_quantity(text, dimension).value == pytest.approx(expected, rel=1e-12)


def test_a_compound_unit_among_words_in_a_drawing_text():
    assert quantity_in_text("T = 45 daN*m (hold)", "torque").value == pytest.approx(450.0, rel=1e-12)
    # another dimension's compound unit is passed over, as the tables' are
    assert quantity_in_text("40 N/mm2 max, 450 daN*m", "torque").value == pytest.approx(4500.0, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "dimension", "phrase"),
    [
        ("450 J", "torque", "energy unit, not a torque"),  # same dimension as N·m, not a torque
        ("30 ft*lb", "torque", "pint reads lb as a mass: write lbf"),
        ("45 kg*m", "torque", "not a torque unit"),
        ("3 foo*bar", "force", "not a unit pint knows"),
        ("5 Hz", "speed", "not a speed unit"),  # speed is not given to pint: Hz would pass as rpm
        ("3 N**2", "force", "not a force unit"),  # nothing but names and * / · reaches pint
        ("3 N)(", "force", "not a force unit"),
    ],
)
def test_wrong_dimension_or_unknown_is_refused(text, dimension, phrase):
    with pytest.raises(UnitError, match=phrase.replace("(", r"\(").replace("*", r"\*")):
        parse_quantity(text, dimension)


def test_numbers_never_go_to_pint():
    """pint reads '1 200' as 200 and '1,200' as 1200; dxfcheck refuses the
    ambiguous one and reads the grouped one as 1200."""
    with pytest.raises(AmbiguousTextError):
        parse_quantity("1,200 daN*m", "torque")
    assert parse_quantity("1 200 daN*m", "torque").value == pytest.approx(12000.0)


@pytest.mark.parametrize(
    ("unit", "dimension", "table"),
    [
        ("lbf", "force", LBF_N),
        ("kgf", "force", KGF_N),
        ("kip", "force", 1000 * LBF_N),
        ("lbf*ft", "torque", LBF_N * FT_M),
        ("lbf*in", "torque", LBF_N * IN_M),
        ("kgf*m", "torque", KGF_N),
        ("psi", "pressure", LBF_N / (IN_M * 1000) ** 2),
        ("ksi", "pressure", 1000 * LBF_N / (IN_M * 1000) ** 2),
        ("bar", "pressure", 0.1),
        ("hp", "power", 745.69987158227022),
        ("in", "length", 25.4),
        ("ft", "length", 304.8),
        ("yd", "length", 914.4),
        ("MPa*m/s", "pv", 1.0),
    ],
)
def test_the_tables_exact_factors_and_pint_agree(unit, dimension, table):
    """The tables keep the exact factors (NIST SP 811 B.8) and pint's
    definitions give the same within round-off."""
    own = units.DIMENSIONS[dimension][0][units._normalise_unit(unit)]
    assert own == pytest.approx(table, rel=1e-15)
    assert pint_factor(unit, dimension) == pytest.approx(table, rel=1e-12)


def test_pint_is_imported_only_when_a_text_needs_it():
    code = (
        "import sys\n"
        "from dxfcheck.core.units import parse_quantity, quantity_in_text\n"
        "parse_quantity('450 N*m', 'torque'); parse_quantity('1,2 kN', 'force'); parse_quantity('3 psi', 'pressure')\n"
        "quantity_in_text('F1 1.8 kN (set)', 'force'); quantity_in_text('12 coils 1.8 kN', 'force')\n"
        "assert 'pint' not in sys.modules, 'pint imported for table units'\n"
        "parse_quantity('45 daN*m', 'torque')\n"
        "assert 'pint' in sys.modules\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr


def test_without_pint_the_message_names_the_extra(monkeypatch):
    monkeypatch.setitem(sys.modules, "pint", None)  # import pint raises ImportError
    units._registry.cache_clear()
    monkeypatch.setattr(units, "_pint_missing", lambda dimension: True)
    try:
        with pytest.raises(UnitError, match="need pint \\(extra 'units'\\)"):
            parse_quantity("45 daN*m", "torque")
        assert parse_quantity("450 N*m", "torque").value == 450.0
    finally:
        units._registry.cache_clear()
