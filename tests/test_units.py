"""Quantities written as text, against exact definitions (NIST SP 811,
2008 ed., Appendix B.8)."""

from __future__ import annotations

import pytest

from dxfcheck.units import UnitError, length_unit_factor, parse_quantity


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
