"""The link file's top level: title, wavelength axis, source, receiver and chain."""

from typing import Any

import numpy as np
from pydantic import Field, model_validator

from linkbudget.config.fields import InputProblem, Strict, quantity, spread
from linkbudget.config.ranges import RANGES
from linkbudget.units import WAVELENGTH_EXAMPLE

#: Most wavelengths a band may expand to.
MAX_WAVELENGTHS = 100_000


Wavelength = quantity("length", bounds=RANGES["wavelength"], example=WAVELENGTH_EXAMPLE)


class Band(Strict):
    """A wavelength sweep ``{from, to, step}``, both ends included."""

    start: Wavelength = Field(alias="from")
    stop: Wavelength = Field(alias="to")
    step: quantity("length", bounds=RANGES["band step"])

    @model_validator(mode="after")
    def _ordered(self):
        if self.stop <= self.start:
            raise InputProblem(("to",), "a band needs from < to")
        if self.step > self.stop - self.start:
            step = RANGES["band step"]
            raise InputProblem(("step",), f"{step.what} must be {step.text()}: {step.why}; got "
                               f"{step.shown(self.step)} for a span of {step.shown(self.stop - self.start)}")
        if (self.stop - self.start) / self.step + 1 > MAX_WAVELENGTHS:
            raise ValueError(f"the band holds more than {MAX_WAVELENGTHS} wavelengths; use a larger step")
        return self

    def wavelengths_m(self):
        count = int(np.floor((self.stop - self.start) / self.step * (1 + 1e-12))) + 1
        return self.start + self.step * np.arange(count)


class Source(Strict):
    """The transmitter: launch ``power`` into the first segment (a spread is allowed)."""

    power: spread("power", bounds=RANGES["source power"])
    name: str | None = None


class Receiver(Strict):
    """The receiver: ``sensitivity``, optional ``overload``, and the ``required_margin``."""

    sensitivity: quantity("power", bounds=RANGES["receiver power"])
    overload: quantity("power", bounds=RANGES["receiver power"]) | None = None
    required_margin: quantity("ratio", bounds=RANGES["required margin"]) = 0.0
    name: str | None = None

    @model_validator(mode="after")
    def _overload_above_sensitivity(self):
        if self.overload is not None and self.overload <= self.sensitivity:
            raise InputProblem(("overload",), "overload must be above sensitivity: a receiver works between the "
                               f"two; got {self.overload:g} dBm <= {self.sensitivity:g} dBm")
        return self


class LinkSpec(Strict):
    """A whole link file. ``chain`` items are validated by their own kind (see the registry)."""

    title: str
    description: str | None = None
    wavelength: Wavelength | None = None
    channels: list[Wavelength] | None = Field(default=None, min_length=1)
    band: Band | None = None
    source: Source
    receiver: Receiver
    chain: list[Any] = Field(min_length=1)

    @model_validator(mode="after")
    def _one_axis(self):
        given = [key for key in ("wavelength", "channels", "band") if getattr(self, key) is not None]
        if len(given) != 1:
            raise InputProblem(given[1:2], "give exactly one of wavelength, channels or band")
        return self

    def wavelengths_m(self):
        """The wavelength axis [m] as a 1-D array."""
        if self.wavelength is not None:
            return np.array([self.wavelength])
        if self.channels is not None:
            return np.array(self.channels)
        return self.band.wavelengths_m()
