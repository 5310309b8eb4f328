"""Building blocks of the link schema: strict models, quantities with units, and spreads.

A quantity field takes a string with its unit (see :mod:`linkbudget.units`) and stores the
value in the internal unit of its dimension. A spread field takes either one quantity, or a
mapping ``{min, typ, max}`` (any subset holding ``typ``, or ``min`` and ``max``), or
``{mean, sigma}``.
"""

import math
import sys
import typing
from dataclasses import dataclass
from functools import cache
from typing import Annotated, Any, ClassVar

from pydantic import (
    BaseModel,
    BeforeValidator,
    ConfigDict,
    Field,
    create_model,
    model_validator,
)

from linkbudget.config.ranges import Range, index_problem
from linkbudget.units import parse_quantity

#: Number of standard deviations a ``{mean, sigma}`` spread spans on each side in the
#: worst-case budget (common practice: ±3σ covers 99.7 % of a normal distribution).
SIGMA_SPAN = 3.0

@dataclass(frozen=True)
class Written:
    """How a field is written in a link file, for the JSON Schema of the language.

    ``form`` is ``"quantity"`` (text with a unit of ``dimension``, such as ``example``),
    ``"number"``, ``"integer"``, ``"index"`` (a number or ``n+κj`` text) or ``"number or text"``
    (text matching ``pattern``); ``bounds`` is the field's valid range. Pydantic
    calls :meth:`__get_pydantic_json_schema__` only when a schema is asked for
    (:mod:`linkbudget.config.json_schema` builds it), never while a link is validated.
    """

    form: str
    dimension: str | None = None
    bounds: Range | None = None
    example: str | None = None
    pattern: str | None = None  # a ``re.ASCII`` expression the text of a "number or text" field matches

    def __get_pydantic_json_schema__(self, core_schema, handler):
        from linkbudget.config.json_schema import written_schema

        return written_schema(self)


class InputProblem(ValueError):
    """An input problem placed at a key path (relative to the model or segment raising it).

    Raised inside a model validator, the loader extends the error's location by ``key_path``,
    so the message points at the key that is wrong rather than at its parent.
    """

    def __init__(self, key_path, message, hint=None, cause=None):
        super().__init__(message)
        self.key_path = tuple(key_path)
        self.hint = hint
        self.cause = cause  # a placed Problem in another file (a material file) this one refers to


class Strict(BaseModel):
    """A schema model: unknown keys are errors, values are immutable once validated."""

    model_config = ConfigDict(extra="forbid", frozen=True, populate_by_name=False, defer_build=True)


def _within(value, bounds):
    if math.isnan(value):
        raise ValueError("value is NaN")
    return value if bounds is None else bounds.check(value)


def quantity(dimension, *, bounds=None, example=None):
    """An annotated float field parsed from a quantity string of ``dimension``.

    Parameters
    ----------
    dimension : str
        A dimension of :data:`linkbudget.units.UNITS`.
    bounds : linkbudget.config.ranges.Range, optional
        The valid range (internal unit); a value outside it is an input error that states it.
    example : str, optional
        Example value for error messages (default: the dimension's, see :func:`parse_quantity`).
    """
    def parse(value):
        return _within(parse_quantity(value, dimension, example), bounds)

    return Annotated[float, BeforeValidator(parse), bounds, Written("quantity", dimension, bounds, example)]


def number(*, bounds=None):
    """An annotated float field for a dimensionless number (an index, a ratio of powers)."""
    def parse(value):
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise ValueError(f"expected a number, got {value!r}")
        if isinstance(value, int) and abs(value) > sys.float_info.max:
            raise ValueError(f"a number beyond ±{sys.float_info.max:.3g} is out of range")
        if not math.isfinite(value):
            raise ValueError(f"{value!r} is not a finite number")
        return _within(float(value), bounds)

    return Annotated[float, BeforeValidator(parse), bounds, Written("number", bounds=bounds)]


def integer(*, bounds):
    """An annotated int field for a count within ``bounds`` (a :class:`~linkbudget.config.ranges.Range`)."""
    def parse(value):
        if isinstance(value, bool) or not isinstance(value, int):
            raise ValueError(f"expected a whole number, got {value!r}")
        return bounds.check(value)

    return Annotated[int, BeforeValidator(parse), bounds, Written("integer", bounds=bounds)]


def complex_index(value):
    """Parse a refractive index ``n`` or ``n+κj`` (e.g. ``1.447+3.0e-8j``) of a passive medium."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise ValueError(f"expected an index such as 1.5 or 1.447+3.0e-8j, got {value!r}")
    try:
        index = complex(value.replace(" ", "") if isinstance(value, str) else value)
    except (ValueError, OverflowError):
        raise ValueError(f"cannot read {value!r} as a complex index n+kj (e.g. 1.447+3.0e-8j)") from None
    if not (math.isfinite(index.real) and math.isfinite(index.imag)):
        raise ValueError(f"index {value!r} is not finite")
    if index.real <= 0:
        raise ValueError(f"the real part of an index must be > 0, got {index.real:g}")
    if index.imag < 0:
        raise ValueError(f"kappa = {index.imag:g} < 0 would be a gain medium; a passive medium has kappa >= 0")
    return index


def _index_field(*, metal_allowed):
    """An index field: a passive index (:func:`complex_index`) of one of the valid forms
    (:func:`linkbudget.config.ranges.index_problem`)."""
    def parse(value):
        index = complex_index(value)
        message = index_problem(index, metal_allowed=metal_allowed)
        if message is not None:
            raise ValueError(message)
        return index

    return Annotated[complex, BeforeValidator(parse), Written("index")]


#: The index of a segment that may be a metal (a bulk medium, a thin-film layer).
ComplexIndex = _index_field(metal_allowed=True)
#: The index of a transparent medium (a fibre's or waveguide's faces, a gap, a mode's effective index).
DielectricIndex = _index_field(metal_allowed=False)


class SpreadBase(Strict):
    """A value known as a single number, a range ``{min, typ, max}`` or ``{mean, sigma}``.

    ``low``, ``typ`` and ``high`` are always set after validation: a single value has all three
    equal; a missing ``min`` or ``max`` falls back to ``typ``; ``{min, max}`` alone has ``typ``
    at the midpoint; ``{mean, sigma}`` spans ``mean ± SIGMA_SPAN·sigma``.
    """

    #: The valid range of the values (a normal spread's low end is clipped to a closed lower bound).
    bounds: ClassVar[Range | None] = None

    min: Any = None
    typ: Any = None
    max: Any = None
    mean: Any = None
    sigma: Any = None

    @model_validator(mode="before")
    @classmethod
    def _single_value(cls, data):
        return {"typ": data} if not isinstance(data, dict) else data

    @model_validator(mode="after")
    def _consistent(self):
        given = {key for key in ("min", "typ", "max", "mean", "sigma") if getattr(self, key) is not None}
        if given & {"mean", "sigma"}:
            if given != {"mean", "sigma"}:
                raise ValueError("a normal spread is written {mean, sigma} and nothing else")
            self._check_normal_ends()
            return self
        if self.typ is None and not {"min", "max"} <= given:
            raise ValueError("a spread needs typ, or both min and max")
        if not self.low <= self.typ_value <= self.high:
            raise InputProblem(("max",) if "max" in given else ("typ",), "a spread must have min <= typ <= max")
        return self

    def _check_normal_ends(self):
        """mean ± 3σ within the bounds; only a physical floor of 0 (a loss, a length) may be passed at
        the low end: the low end is then clipped to 0 and noted."""
        bounds = self.bounds
        if bounds is None:
            return
        reach = {"-": self.mean - SIGMA_SPAN * self.sigma, "+": self.mean + SIGMA_SPAN * self.sigma}
        for side, value in reach.items():
            clipped = side == "-" and bounds.low == 0 and not bounds.low_open
            if not clipped and not bounds.contains(value):
                raise InputProblem(("sigma",), f"mean {side} {SIGMA_SPAN:g} sigma must stay within the range "
                                   f"of the {bounds.what}, {bounds.text()}: {bounds.why}; got {bounds.shown(value)}",
                                   "the worst case spans mean ± 3 sigma; give a smaller sigma or {min, typ, max}")

    def notes(self):
        """Notes on the spread: its ends past an unusual threshold, its low end clipped to the bound."""
        if self.bounds is None:
            return []
        found = self.bounds.notes([self.low, self.high])
        if self.mean is not None and self.mean - SIGMA_SPAN * self.sigma < self.low:
            found.append(f"{self.bounds.what} mean - {SIGMA_SPAN:g} sigma = "
                         f"{self.bounds.shown(self.mean - SIGMA_SPAN * self.sigma)} is below "
                         f"{self.bounds.shown(self.low)}; the low end is taken at {self.bounds.shown(self.low)}")
        return found

    @property
    def typ_value(self):
        """The nominal value: typ, mean, or the midpoint of min and max."""
        if self.mean is not None:
            return self.mean
        if self.typ is not None:
            return self.typ
        return 0.5 * (self.min + self.max)

    @property
    def low(self):
        if self.mean is not None:
            low = self.mean - SIGMA_SPAN * self.sigma
            bounds = self.bounds
            return low if bounds is None or bounds.low != 0 else max(low, bounds.low)
        return self.min if self.min is not None else self.typ_value

    @property
    def high(self):
        if self.mean is not None:
            return self.mean + SIGMA_SPAN * self.sigma
        return self.max if self.max is not None else self.typ_value

    @property
    def is_fixed(self):
        return self.low == self.high


#: Internal unit of each dimension, the unit a spread's sigma is shown in.
_INTERNAL_UNIT = {"length": "m", "power": "dB", "ratio": "dB", "attenuation": "dB/m", "absorption": "/m",
                  "angle": "rad", "number": ""}


#: The keys of a spread other than ``sigma``, with their descriptions.
_SPREAD_KEYS = {
    "min": "Lowest value; with max alone, typ is their midpoint.",
    "typ": "Typical value, used by the nominal budget.",
    "max": "Highest value.",
    "mean": "Mean of a normal spread, with sigma.",
}


@cache
def spread(dimension, *, bounds=None):
    """A spread model whose values are quantities of ``dimension`` within ``bounds`` (a
    :class:`~linkbudget.config.ranges.Range`); sigma of a power is in dB.

    ``dimension="number"`` makes a spread of dimensionless numbers.
    """
    sigma = Range("sigma", "", 0.0, None, _INTERNAL_UNIT[dimension], "a spread's width is not negative")
    if dimension == "number":
        value = number(bounds=bounds)
        width = number(bounds=sigma)
    else:
        value = quantity(dimension, bounds=bounds)
        width = quantity("ratio" if dimension == "power" else dimension, bounds=sigma)
    model = create_model(
        f"Spread_{dimension}_{'any' if bounds is None else bounds.what.replace(' ', '_')}",
        __base__=SpreadBase,
        __module__=__name__,
        **{key: (value | None, Field(None, description=text)) for key, text in _SPREAD_KEYS.items()},
        sigma=(width | None, Field(None, description="Standard deviation of a normal spread, with mean.")),
    )
    model.bounds = bounds
    return model


def _bounds_of(field_info):
    """The :class:`~linkbudget.config.ranges.Range` a schema field is checked against, if any."""
    def search(items):
        for item in items:
            if isinstance(item, Range):
                return item
            found = search(typing.get_args(item)) if typing.get_args(item) else None
            if found is not None:
                return found
        return None

    return search([*field_info.metadata, field_info.annotation])


def range_notes(model, prefix=""):
    """Notes on the possible but unusual values of a validated model and the models inside it.

    Each note is ``key.path: what``: a value past an :class:`~linkbudget.config.ranges.Unusual`
    threshold of its range, or a normal spread's low end clipped to its bound.
    """
    found = []
    for name, info in type(model).model_fields.items():
        value = getattr(model, name)
        key = f"{prefix}{info.alias or name}"
        if isinstance(value, SpreadBase):
            found += [f"{key}: {note}" for note in value.notes()]
        elif isinstance(value, Strict):
            found += range_notes(value, f"{key}.")
        elif isinstance(value, list):
            for number, item in enumerate(value):
                if isinstance(item, Strict):
                    found += range_notes(item, f"{key}[{number}].")
        elif isinstance(value, (int, float)) and not isinstance(value, bool):
            bounds = _bounds_of(info)
            if bounds is not None:
                found += [f"{key}: {note}" for note in bounds.notes([value])]
    return found
