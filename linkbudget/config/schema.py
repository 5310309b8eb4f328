"""The link file's top level: title, wavelength axis, source, receiver and chain."""

from typing import Any

import numpy as np
from pydantic import Field, model_validator

from linkbudget.config.fields import InputProblem, Strict, quantity, spread

#: Wavelengths a link may carry [m]: the ultraviolet to the far infrared.
OPTICAL_RANGE_M = (100e-9, 100e-6)

#: Most wavelengths a band may expand to.
MAX_WAVELENGTHS = 100_000


def _optical(wavelength_m, key_path):
    low, high = OPTICAL_RANGE_M
    if not low <= wavelength_m <= high:
        raise InputProblem(key_path, f"{wavelength_m * 1e9:g} nm is outside the optical range "
                           f"{low * 1e9:g} nm to {high * 1e9:g} nm")


Length = quantity("length", strictly_positive=True)


class Band(Strict):
    """A wavelength sweep ``{from, to, step}``, both ends included."""

    start: Length = Field(alias="from")
    stop: Length = Field(alias="to")
    step: Length

    @model_validator(mode="after")
    def _ordered(self):
        if self.stop <= self.start:
            raise InputProblem(("to",), "a band needs from < to")
        if (self.stop - self.start) / self.step + 1 > MAX_WAVELENGTHS:
            raise ValueError(f"the band holds more than {MAX_WAVELENGTHS} wavelengths; use a larger step")
        return self

    def wavelengths_m(self):
        count = int(np.floor((self.stop - self.start) / self.step * (1 + 1e-12))) + 1
        return self.start + self.step * np.arange(count)


class Source(Strict):
    """The transmitter: launch ``power`` into the first segment (a spread is allowed)."""

    power: spread("power")
    name: str | None = None


class Receiver(Strict):
    """The receiver: ``sensitivity``, optional ``overload``, and the ``required_margin``."""

    sensitivity: quantity("power")
    overload: quantity("power") | None = None
    required_margin: quantity("ratio", minimum=0.0) = 0.0
    name: str | None = None

    @model_validator(mode="after")
    def _overload_above_sensitivity(self):
        if self.overload is not None and self.overload <= self.sensitivity:
            raise InputProblem(("overload",), "overload must be above sensitivity")
        return self


class LinkSpec(Strict):
    """A whole link file. ``chain`` items are validated by their own kind (see the registry)."""

    title: str
    description: str | None = None
    wavelength: Length | None = None
    channels: list[Length] | None = Field(default=None, min_length=1)
    band: Band | None = None
    source: Source
    receiver: Receiver
    chain: list[Any] = Field(min_length=1)

    @model_validator(mode="after")
    def _one_axis(self):
        given = [key for key in ("wavelength", "channels", "band") if getattr(self, key) is not None]
        if len(given) != 1:
            raise InputProblem(given[1:2], "give exactly one of wavelength, channels or band")
        if self.wavelength is not None:
            _optical(self.wavelength, ("wavelength",))
        for number, wavelength_m in enumerate(self.channels or ()):
            _optical(wavelength_m, ("channels", number))
        if self.band is not None:
            _optical(self.band.start, ("band", "from"))
            _optical(self.band.stop, ("band", "to"))
        return self

    def wavelengths_m(self):
        """The wavelength axis [m] as a 1-D array."""
        if self.wavelength is not None:
            return np.array([self.wavelength])
        if self.channels is not None:
            return np.array(self.channels)
        return self.band.wavelengths_m()
