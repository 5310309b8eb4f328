"""A thin-film coating between two media, replacing their bare interface.

Its layers are listed in the order the light meets them. The engine evaluates the stack with
the coherent transfer-matrix method (:func:`linkbudget.physics.thinfilm.coherent_stack`)
between the media of its two neighbours.
"""

from typing import Literal

import numpy as np
from pydantic import Field, PrivateAttr, model_validator

from linkbudget.config.fields import (
    ComplexIndex,
    InputProblem,
    Strict,
    integer,
    quantity,
)
from linkbudget.config.ranges import RANGES, index_notes
from linkbudget.physics.thinfilm import quarter_wave_thickness_m
from linkbudget.segments.base import SegmentSpec
from linkbudget.segments.optics import resolve_index
from linkbudget.segments.roles import Coats
from linkbudget.units import WAVELENGTH_EXAMPLE


class Layer(Strict):
    """One film: ``material`` or ``index``, and ``thickness`` or ``quarter_wave`` (a design wavelength).

    ``quarter_wave: 1550 nm`` is one optical quarter-wave, λ0/(4·n(λ0)), at that wavelength;
    ``quarter_waves: 2`` makes it a half-wave.
    """

    material: str | None = Field(None, description="Catalog material or material file of the film (or index).")
    index: ComplexIndex | None = Field(None, description="Refractive index n+κj of the film (or material).")
    thickness: quantity("length", bounds=RANGES["layer thickness"]) | None = Field(
        None, description="Physical thickness of the film (or quarter_wave).")
    quarter_wave: quantity("length", bounds=RANGES["wavelength"], example=WAVELENGTH_EXAMPLE) | None = Field(
        None, description="Design wavelength of a quarter-wave film (or thickness).")
    quarter_waves: integer(bounds=RANGES["quarter-wave count"]) | None = Field(
        None, description="Number of quarter-waves at quarter_wave; default 1.")

    @model_validator(mode="after")
    def _one_of_each(self):
        if (self.material is None) == (self.index is None):
            raise ValueError("a layer needs exactly one of material or index")
        if (self.thickness is None) == (self.quarter_wave is None):
            raise ValueError("a layer needs exactly one of thickness or quarter_wave")
        if self.quarter_waves is not None and self.quarter_wave is None:
            raise ValueError("quarter_waves counts quarter-waves at a quarter_wave design wavelength")
        return self

    def resolve(self, wavelength_m, files, key_path):
        """(index over the wavelength axis, physical thickness [m])."""
        index = resolve_index(self.index, self.material, wavelength_m, files, key_path)
        if self.thickness is not None:
            return index, self.thickness
        design = resolve_index(self.index, self.material, np.array([self.quarter_wave]), files, key_path)
        return index, float(quarter_wave_thickness_m(design.real[0], self.quarter_wave,
                                                     order=self.quarter_waves or 1))


class Coating(SegmentSpec):
    """A thin-film stack on the interface between the segments before and after it.

    It sees the light at the angle and polarization of that face: the ``angle`` and
    ``polarization`` of the coated segment after it (or the tilt carried from before).
    """

    kind: Literal["coating"]
    layers: list[Layer] = Field(description="The films, in the order the light meets them.")
    _stack: tuple | None = PrivateAttr(default=None)
    @model_validator(mode="after")
    def _layer_count(self):
        message = RANGES["layer count"].problem(len(self.layers))
        if message is not None:
            raise InputProblem(("layers",), message)
        return self

    def resolve(self, wavelength_m, files):
        resolved = [layer.resolve(wavelength_m, files, ("layers", number))
                    for number, layer in enumerate(self.layers)]
        return self._resolved(_stack=(np.array([index for index, _ in resolved]),
                                      np.array([t for _, t in resolved])))

    def role(self):
        """A coating on the face between its neighbours; the engine evaluates it between their media."""
        return Coats(*self._stack)

    def input_notes(self):
        """Range notes, and a metal's index in a layer (:func:`~linkbudget.config.ranges.index_notes`)."""
        return super().input_notes() + [f"layers[{number}]: {note}" for number, layer_index in
                                        enumerate(self._stack[0]) for note in index_notes(layer_index)]

    def placement_problem(self, place):
        if not (place.medium_before and place.medium_after):
            return InputProblem(("kind",), "a coating sits directly between two segments that carry a medium",
                                "give the neighbours an index or material, e.g. a gap (air) before a coated window")
        return None
