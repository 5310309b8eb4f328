"""Quantity strings to SI through the unit table."""

import math

import pytest
from numpy.testing import assert_allclose

from linkbudget.units import UNITS, UnitError, allowed_units, parse_quantity


@pytest.mark.parametrize(
    ("text", "dimension", "expected"),
    [
        ("1310 nm", "length", 1310e-9),
        ("1.55um", "length", 1.55e-6),
        ("1.55 µm", "length", 1.55e-6),
        ("8.2 km", "length", 8200.0),
        ("-3 dBm", "power", -3.0),
        ("1 mW", "power", 0.0),
        ("1 W", "power", 30.0),
        ("10 uW", "power", -20.0),
        ("0.35 dB/km", "attenuation", 0.35e-3),
        ("2 dB/cm", "attenuation", 200.0),
        ("0.5 /cm", "absorption", 50.0),
        ("3 1/mm", "absorption", 3000.0),
        ("180 deg", "angle", math.pi),
        ("5 mrad", "angle", 5e-3),
        ("3dB", "ratio", 3.0),
        ("1e-3 m", "length", 1e-3),
    ],
)
def test_parse_quantity_values(text, dimension, expected):
    assert_allclose(parse_quantity(text, dimension), expected, rtol=1e-12)


@pytest.mark.parametrize(
    ("value", "dimension", "message"),
    [
        ("3", "length", "missing unit"),
        (3, "length", "bare number"),
        ("3 dB", "power", "is a ratio, expected a power"),
        ("3 furlongs", "length", "unknown unit"),
        ("1e400 m", "length", "not a finite"),
        ("nan m", "length", "cannot read"),
        ("0 mW", "power", "must be > 0"),
        ("three m", "length", "cannot read"),
        (True, "length", "expected a length"),
    ],
)
def test_parse_quantity_errors(value, dimension, message):
    with pytest.raises(UnitError, match=message):
        parse_quantity(value, dimension)


def test_parse_quantity_hint_lists_units():
    with pytest.raises(UnitError) as error:
        parse_quantity("3", "attenuation")
    assert "dB/km" in error.value.hint


def test_every_dimension_has_an_example_unit():
    for dimension in {dim for dim, _ in UNITS.values()}:
        assert allowed_units(dimension)
