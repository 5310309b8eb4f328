"""Quantity strings such as ``"12.4 km"`` or ``"-3 dBm"`` to SI values, through one table.

Every dimensional value in a link file carries its unit. This module turns the text into a
float in the package's internal unit for its dimension:

============== ================= ===============================================
dimension       internal unit     accepted units
============== ================= ===============================================
length          m                 nm, um, µm (or μm), mm, cm, m, km
power           dBm               dBm, W, mW, uW, µW, nW
ratio           dB                dB
attenuation     dB/m              dB/km, dB/m, dB/cm, dB/mm, dB/um
absorption      1/m               1/m, /m, 1/cm, /cm, 1/mm, /mm, 1/um, /um
angle           rad               rad, mrad, urad, µrad, deg, °
============== ================= ===============================================

A wavelength is a length. Decibel-to-linear conversions live in
:mod:`linkbudget.physics.decibel`.
"""

import math
import re

from linkbudget.physics.decibel import dbm_from_watt

#: unit text -> (dimension, factor to the internal unit). Power in watts is the one non-linear
#: case: its factor converts to watts, then :func:`dbm_from_watt` gives dBm.
UNITS: dict[str, tuple[str, float]] = {
    "nm": ("length", 1e-9),
    "um": ("length", 1e-6),
    "µm": ("length", 1e-6),  # micro sign
    "μm": ("length", 1e-6),  # Greek mu
    "mm": ("length", 1e-3),
    "cm": ("length", 1e-2),
    "m": ("length", 1.0),
    "km": ("length", 1e3),
    "dBm": ("power", 1.0),
    "W": ("power", 1.0),
    "mW": ("power", 1e-3),
    "uW": ("power", 1e-6),
    "µW": ("power", 1e-6),
    "nW": ("power", 1e-9),
    "dB": ("ratio", 1.0),
    "dB/km": ("attenuation", 1e-3),
    "dB/m": ("attenuation", 1.0),
    "dB/cm": ("attenuation", 1e2),
    "dB/mm": ("attenuation", 1e3),
    "dB/um": ("attenuation", 1e6),
    "1/m": ("absorption", 1.0),
    "/m": ("absorption", 1.0),
    "1/cm": ("absorption", 1e2),
    "/cm": ("absorption", 1e2),
    "1/mm": ("absorption", 1e3),
    "/mm": ("absorption", 1e3),
    "1/um": ("absorption", 1e6),
    "/um": ("absorption", 1e6),
    "rad": ("angle", 1.0),
    "mrad": ("angle", 1e-3),
    "urad": ("angle", 1e-6),
    "µrad": ("angle", 1e-6),
    "deg": ("angle", math.pi / 180.0),
    "°": ("angle", math.pi / 180.0),
}

#: Largest magnitude accepted for decibel quantities (a loss, a gain, a power in dBm): beyond it
#: a value can only be a typing error, and sums of such values overflow.
DECIBEL_LIMITS = {"ratio": 1000.0, "power": 1000.0}

#: Example value shown in error messages, per dimension.
EXAMPLES = {
    "length": "12.4 km",
    "power": "-3 dBm",
    "ratio": "0.5 dB",
    "attenuation": "0.35 dB/km",
    "absorption": "0.5 /cm",
    "angle": "0.5 deg",
}

#: Example shown for a length that is a wavelength.
WAVELENGTH_EXAMPLE = "1550 nm"

#: A decimal number as the config language writes one (``-1.5``, ``.5``, ``2e-3``); the one pattern for numbers.
NUMBER_PATTERN = r"[-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?"


def quantity_pattern(unit=r"\S*"):
    """The regular expression (for ``re.ASCII``) of a quantity text: a number, then a unit matching
    the pattern ``unit`` (default: any word), spaces allowed around both.

    The loader reads every quantity with it; the JSON Schema of the language
    (:mod:`linkbudget.config.json_schema`) gives it each dimension's units.
    """
    return rf"^\s*(?P<number>{NUMBER_PATTERN})\s*(?P<unit>{unit})\s*$"


_QUANTITY = re.compile(quantity_pattern(), re.ASCII)


class UnitError(ValueError):
    """A quantity string is malformed, lacks its unit, or has a unit of the wrong dimension."""

    def __init__(self, message, hint=None):
        super().__init__(message)
        self.hint = hint


def allowed_units(dimension):
    """The unit spellings accepted for a dimension, in table order."""
    return [unit for unit, (dim, _) in UNITS.items() if dim == dimension]


def with_article(word):
    """``word`` after its indefinite article: "an attenuation", "a length"."""
    return f"{'an' if word[0] in 'aeiou' else 'a'} {word}"


def _allowed_hint(dimension, example):
    return (
        f"write {with_article(dimension)} with its unit, e.g. '{example}' "
        f"(units: {', '.join(allowed_units(dimension))})"
    )


def parse_quantity(value, dimension, example=None):
    """Parse a quantity string into the internal unit of ``dimension``.

    Parameters
    ----------
    value : str
        Text such as ``"1310 nm"``, ``"-3dBm"`` or ``"0.35 dB/km"``.
    dimension : str
        One of the dimensions of :data:`UNITS` (length, power, ratio, attenuation,
        absorption, angle).
    example : str, optional
        Example shown in error messages (such as :data:`WAVELENGTH_EXAMPLE`); default: the
        dimension's entry in :data:`EXAMPLES`.

    Returns
    -------
    float
        The value in the dimension's internal unit (see the module table).

    Raises
    ------
    UnitError
        If the text is not a number followed by a known unit of that dimension, lacks a unit,
        or is not finite.
    """
    example = example or EXAMPLES[dimension]
    if isinstance(value, bool) or not isinstance(value, (str, int, float)):
        raise UnitError(f"expected {with_article(dimension)} such as '{example}'",
                        _allowed_hint(dimension, example))
    if isinstance(value, (int, float)):
        raise UnitError(f"missing unit: {value!r} is a bare number", _allowed_hint(dimension, example))
    match = _QUANTITY.match(value)
    if match is None:
        raise UnitError(f"cannot read {value!r} as {with_article(dimension)}",
                        _allowed_hint(dimension, example))
    number = float(match["number"])
    unit = match["unit"]
    if not math.isfinite(number):
        raise UnitError(f"{value!r} is not a finite number")
    if not unit:
        raise UnitError(f"missing unit in {value!r}", _allowed_hint(dimension, example))
    if unit not in UNITS:
        raise UnitError(f"unknown unit {unit!r} in {value!r}", _allowed_hint(dimension, example))
    unit_dimension, factor = UNITS[unit]
    if unit_dimension != dimension:
        raise UnitError(
            f"{value!r} is {with_article(unit_dimension)}, expected {with_article(dimension)}",
            _allowed_hint(dimension, example),
        )
    value_si = number * factor
    if not math.isfinite(value_si):
        raise UnitError(f"{value!r} is not a finite number in {dimension} units")
    if dimension == "power" and unit != "dBm":
        if value_si <= 0:
            raise UnitError(f"power {value!r} must be > 0 to be expressed in dBm")
        value_si = float(dbm_from_watt(value_si))
    limit = DECIBEL_LIMITS.get(dimension)
    if limit is not None and abs(value_si) > limit:
        raise UnitError(f"{value!r} is beyond ±{limit:g} dB, outside any optical link")
    return value_si
