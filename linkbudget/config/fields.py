"""Building blocks of the link schema: strict models, quantities with units, and spreads.

A quantity field takes a string with its unit (see :mod:`linkbudget.units`) and stores the
value in the internal unit of its dimension. A spread field takes either one quantity, or a
mapping ``{min, typ, max}`` (any subset holding ``typ``, or ``min`` and ``max``), or
``{mean, sigma}``.
"""

import math
import re
from functools import cache
from typing import Annotated, Any, ClassVar

from pydantic import (
    BaseModel,
    BeforeValidator,
    ConfigDict,
    create_model,
    model_validator,
)

from linkbudget.units import parse_quantity

#: Number of standard deviations a ``{mean, sigma}`` spread spans on each side in the
#: worst-case budget (common practice: ±3σ covers 99.7 % of a normal distribution).
SIGMA_SPAN = 3.0

#: The budget cases. ``worst`` takes every value at the end that hurts, ``best`` at the other.
CASES = ("typ", "worst", "best")


_PLAIN_NUMBER = re.compile(r"^\s*[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?\s*$")


class InputProblem(ValueError):
    """An input problem placed at a key path (relative to the model or segment raising it).

    Raised inside a model validator, the loader extends the error's location by ``key_path``,
    so the message points at the key that is wrong rather than at its parent.
    """

    def __init__(self, key_path, message, hint=None):
        super().__init__(message)
        self.key_path = tuple(key_path)
        self.hint = hint


class Strict(BaseModel):
    """A schema model: unknown keys are errors, values are immutable once validated."""

    model_config = ConfigDict(extra="forbid", frozen=True, populate_by_name=False)


def _bounded(value, minimum, strictly_positive):
    if math.isnan(value):
        raise ValueError("value is NaN")
    if minimum is not None and value < minimum:
        raise ValueError("must not be negative" if minimum == 0 else f"must be >= {minimum:g}")
    if strictly_positive and value <= 0:
        raise ValueError("must be > 0")
    return value


def quantity(dimension, *, minimum=None, strictly_positive=False):
    """An annotated float field parsed from a quantity string of ``dimension``.

    Parameters
    ----------
    dimension : str
        A dimension of :data:`linkbudget.units.UNITS`.
    minimum : float, optional
        Smallest allowed value in the internal unit (e.g. 0 for a length).
    strictly_positive : bool
        Reject zero as well.
    """
    def parse(value):
        return _bounded(parse_quantity(value, dimension), minimum, strictly_positive)

    return Annotated[float, BeforeValidator(parse)]


def number(*, minimum=None, strictly_positive=False):
    """An annotated float field for a dimensionless number (an index, a ratio of powers)."""
    def parse(value):
        # YAML 1.1 reads 1e-5 (no dot) as text, so plain numeric text is accepted too
        if isinstance(value, str) and _PLAIN_NUMBER.match(value):
            value = float(value)
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            raise ValueError(f"expected a number, got {value!r}")
        if not math.isfinite(value):
            raise ValueError(f"{value!r} is not a finite number")
        return _bounded(float(value), minimum, strictly_positive)

    return Annotated[float, BeforeValidator(parse)]


#: Largest count a link file may give (splices, bends, crossings, ports, quarter waves): beyond it
#: a count can only be a typing error, and a larger integer leaves the range of the float and
#: 64-bit integer arithmetic it enters (common practice bound, generous for any real link).
MAX_COUNT = 1_000_000


def integer(*, minimum=None):
    """An annotated int field for a count, at most :data:`MAX_COUNT`."""
    def parse(value):
        if isinstance(value, bool) or not isinstance(value, int):
            raise ValueError(f"expected a whole number, got {value!r}")
        if minimum is not None and value < minimum:
            raise ValueError(f"must be >= {minimum}")
        if value > MAX_COUNT:
            raise ValueError(f"must be <= {MAX_COUNT}")
        return value

    return Annotated[int, BeforeValidator(parse)]


def complex_index(value):
    """Parse a refractive index ``n`` or ``n+κj`` (e.g. ``1.447+3.0e-8j``) of a passive medium."""
    if isinstance(value, bool) or not isinstance(value, (int, float, str)):
        raise ValueError(f"expected an index such as 1.5 or 1.447+3.0e-8j, got {value!r}")
    try:
        index = complex(value.replace(" ", "") if isinstance(value, str) else value)
    except ValueError:
        raise ValueError(f"cannot read {value!r} as a complex index n+kj (e.g. 1.447+3.0e-8j)") from None
    if not (math.isfinite(index.real) and math.isfinite(index.imag)):
        raise ValueError(f"index {value!r} is not finite")
    if index.real <= 0:
        raise ValueError(f"the real part of an index must be > 0, got {index.real:g}")
    if index.imag < 0:
        raise ValueError(f"kappa = {index.imag:g} < 0 would be a gain medium; a passive medium has kappa >= 0")
    return index


ComplexIndex = Annotated[complex, BeforeValidator(complex_index)]


class SpreadBase(Strict):
    """A value known as a single number, a range ``{min, typ, max}`` or ``{mean, sigma}``.

    ``low``, ``typ`` and ``high`` are always set after validation: a single value has all three
    equal; a missing ``min`` or ``max`` falls back to ``typ``; ``{min, max}`` alone has ``typ``
    at the midpoint; ``{mean, sigma}`` spans ``mean ± SIGMA_SPAN·sigma``.
    """

    #: Lower physical bound of the values (a normal spread's low end is clipped to it).
    minimum: ClassVar[float | None] = None
    #: The values must be > 0 (a diameter, a visibility): a normal spread must not reach 0.
    strictly_positive: ClassVar[bool] = False

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
            if self.strictly_positive and self.low <= 0:
                raise InputProblem(("sigma",), f"mean - {SIGMA_SPAN:g} sigma must stay > 0 for this value",
                                   "the worst case spans mean ± 3 sigma; give a smaller sigma or {min, typ, max}")
            return self
        if self.typ is None and not {"min", "max"} <= given:
            raise ValueError("a spread needs typ, or both min and max")
        if not self.low <= self.typ_value <= self.high:
            raise InputProblem(("max",) if "max" in given else ("typ",), "a spread must have min <= typ <= max")
        return self

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
            return low if self.minimum is None else max(low, self.minimum)
        return self.min if self.min is not None else self.typ_value

    @property
    def high(self):
        if self.mean is not None:
            return self.mean + SIGMA_SPAN * self.sigma
        return self.max if self.max is not None else self.typ_value

    @property
    def is_fixed(self):
        return self.low == self.high

    def at(self, case, *, larger_hurts=True):
        """The value used in a budget case (one of :data:`CASES`)."""
        if case == "typ":
            return self.typ_value
        hurts = (case == "worst") == larger_hurts
        return self.high if hurts else self.low


@cache
def spread(dimension, *, minimum=None, strictly_positive=False):
    """A spread model whose values are quantities of ``dimension`` (sigma of a power is in dB).

    ``dimension="number"`` makes a spread of dimensionless numbers.
    """
    if dimension == "number":
        value = number(minimum=minimum, strictly_positive=strictly_positive)
        width = number(minimum=0.0)
    else:
        value = quantity(dimension, minimum=minimum, strictly_positive=strictly_positive)
        width = quantity("ratio" if dimension == "power" else dimension, minimum=0.0)
    model = create_model(
        f"Spread_{dimension}",
        __base__=SpreadBase,
        __module__=__name__,
        **{key: (value | None, None) for key in ("min", "typ", "max", "mean")},
        sigma=(width | None, None),
    )
    model.minimum = minimum
    model.strictly_positive = strictly_positive
    return model
