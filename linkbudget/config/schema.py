"""The link file's top level: title, wavelength axis, source, receiver and chain."""

from typing import Any

import numpy as np
from pydantic import Field, model_validator

from linkbudget.config.fields import InputProblem, Strict, integer, quantity, spread
from linkbudget.config.ranges import RANGES
from linkbudget.config.reachable import Reachable
from linkbudget.units import WAVELENGTH_EXAMPLE

#: Most wavelengths a band may expand to.
MAX_WAVELENGTHS = 100_000


Wavelength = quantity("length", bounds=RANGES["wavelength"], example=WAVELENGTH_EXAMPLE)


#: Fraction of a step within which a sweep point counts as the band's upper end (float round-off).
_BAND_END_TOLERANCE = 1e-6


class Band(Strict):
    """A wavelength sweep ``{from, to, step}``, both ends included.

    The points are ``from``, ``from + step``, ... up to ``to``, and ``to`` itself is always the last
    point: when the step does not divide the span, the last step is shorter (1500 to 1600 nm in
    steps of 30 nm gives 1500, 1530, 1560, 1590, 1600 nm). A point within a millionth of a step of
    ``to`` is ``to`` (round-off of the division), never a second point beside it.
    """

    start: Wavelength = Field(alias="from", description="First wavelength of the sweep.")
    stop: Wavelength = Field(alias="to", description="Last wavelength of the sweep, always included.")
    step: quantity("length", bounds=RANGES["band step"]) = Field(
        description="Spacing of the sweep; the last step may be shorter.")

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
        full_steps = int(np.ceil((self.stop - self.start) / self.step - _BAND_END_TOLERANCE))
        return np.append(self.start + self.step * np.arange(full_steps), self.stop)


class Source(Strict):
    """The transmitter: launch ``power`` into the first segment (a spread is allowed), and the
    optional ``spectral_width`` (FWHM) that sets its coherence length, and the optional
    ``max_back_reflection``: the most light returning toward it that it tolerates, relative to its
    launch power (e.g. ``-30 dB``)."""

    power: spread("power", bounds=RANGES["source power"]) = Field(description="Power launched into the chain.")
    spectral_width: quantity("length", bounds=RANGES["spectral width"]) | None = Field(
        None, description="Spectral width (FWHM) of the source; sets its coherence length.")
    max_back_reflection: quantity("ratio", bounds=RANGES["back-reflection tolerance"]) | None = Field(
        None, description="Most light returning toward the source that it tolerates, relative to its launch.")
    name: str | None = Field(None, description="Name of the transmitter, for the reports.")


class Receiver(Strict):
    """The receiver: ``sensitivity``, optional ``overload``, and the ``required_margin``."""

    sensitivity: quantity("power", bounds=RANGES["receiver power"]) = Field(
        description="Least power the receiver needs.")
    overload: quantity("power", bounds=RANGES["receiver power"]) | None = Field(
        None, description="Most power the receiver takes; above sensitivity.")
    required_margin: quantity("ratio", bounds=RANGES["required margin"]) = Field(
        "0 dB", validate_default=True, description="Margin the worst case must keep above sensitivity.")
    name: str | None = Field(None, description="Name of the receiver, for the reports.")

    @model_validator(mode="after")
    def _overload_above_sensitivity(self):
        if self.overload is not None and self.overload <= self.sensitivity:
            raise InputProblem(("overload",), "overload must be above sensitivity: a receiver works between the "
                               f"two; got {self.overload:g} dBm <= {self.sensitivity:g} dBm")
        return self


class StatisticsSpec(Strict):
    """A statistical budget asked for by the file: ``trials`` Monte Carlo trials from ``seed``
    (the command line's ``--trials`` and ``--seed`` override them)."""

    trials: integer(bounds=RANGES["trial count"]) = Field(description="Monte Carlo trials, e.g. 100000.")
    seed: integer(bounds=RANGES["seed"]) = Field(0, description="Seed of the random draws; the same seed, "
                                                 "the same numbers.")


class LinkSpec(Strict):
    """A whole link file. ``chain`` items are validated by their own kind (see the registry)."""

    title: str = Field(description="What the link is, in a line.")
    description: str | None = Field(None, description="More words on the link, for the reader.")
    wavelength: Wavelength | None = Field(None, description="The one wavelength the link carries.")
    channels: list[Wavelength] | None = Field(None, min_length=1, description="The wavelengths the link carries.")
    band: Band | None = Field(None, description="A wavelength sweep {from, to, step}.")
    source: Source = Field(description="The transmitter.")
    receiver: Receiver = Field(description="The receiver.")
    chain: list[Any] = Field(min_length=1, description="The segments, in the order light passes them.")
    part_folders: list[str] | None = Field(
        None, description="Folders searched for parts after the link's own (see linkbudget.config.parts).")
    statistics: StatisticsSpec | None = Field(None, description="A statistical budget: {trials, seed}.")
    reachable: Reachable | None = Field(
        None, description="Points where a person can reach the light: added after segments, or excluded with a reason.")

    @model_validator(mode="after")
    def _one_axis(self):
        given = [key for key in ("wavelength", "channels", "band") if getattr(self, key) is not None]
        if len(given) != 1:
            raise InputProblem(given[1:2], "give exactly one of wavelength, channels or band")
        return self

    @model_validator(mode="after")
    def _distinct_channels(self):
        for index, channel in enumerate(self.channels or ()):
            earlier = next((i for i, other in enumerate(self.channels[:index])
                            if np.isclose(other, channel, rtol=1e-12, atol=0.0)), None)
            if earlier is not None:
                raise InputProblem(("channels", index), f"channel {channel * 1e9:.6g} nm is listed twice "
                                   f"(also channels[{earlier}]): each channel is one wavelength of the link")
        return self

    def wavelengths_m(self):
        """The wavelength axis [m] as a 1-D array."""
        if self.wavelength is not None:
            return np.array([self.wavelength])
        if self.channels is not None:
            return np.array(self.channels)
        return self.band.wavelengths_m()
