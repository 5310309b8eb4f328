"""Segments that carry an optical medium, and the resolution of their materials.

A segment carries a medium when it gives an ``index`` or a ``material``. Between two
consecutive segments that carry media, the engine inserts the interface (or the coating) between
them; a segment without a medium is transparent to that logic.
"""

from typing import Literal

import numpy as np
from pydantic import Field, PrivateAttr, model_validator

from linkbudget.config.fields import DielectricIndex, InputProblem, quantity
from linkbudget.config.ranges import RANGES, index_notes
from linkbudget.config.source import ConfigError
from linkbudget.materials.dispersion import MaterialRangeError
from linkbudget.materials.library import MaterialError, covering_hint, load_material
from linkbudget.paths import PathRefused
from linkbudget.physics.fresnel import POLARIZATIONS
from linkbudget.segments.base import SegmentSpec
from linkbudget.segments.roles import GUIDES, Carries

#: The polarizations a segment may state for the light arriving at it.
Polarization = Literal[tuple(POLARIZATIONS)]


def resolve_index(index, material, wavelength_m, files, key_path=()):
    """The complex index over the wavelength axis from an ``index`` or a ``material`` key.

    Raises
    ------
    InputProblem
        When the material is unknown, malformed, or has no data at a wavelength of the link.
    """
    if index is not None:
        return np.full(np.shape(wavelength_m), index, dtype=complex)
    try:
        return load_material(material, files=files).index(wavelength_m)
    except MaterialRangeError as error:
        hint = covering_hint(material, wavelength_m) or "write an explicit `index` (n or n+κj) for these wavelengths"
        raise InputProblem((*key_path, "material"), str(error), hint) from None
    except MaterialError as error:
        raise InputProblem((*key_path, "material"), str(error),
                             "`linkbudget materials` lists the catalog") from None
    except PathRefused as error:
        raise InputProblem((*key_path, "material"), str(error), error.hint) from None
    except ConfigError as error:  # placed in the material file (unreadable, malformed): its first problem is the cause
        raise InputProblem((*key_path, "material"), "the file named here has an error:",
                           cause=error.problems[0]) from None


class OpticalSegment(SegmentSpec):
    """A segment that may carry a medium: ``index`` (n or n+κj) or ``material`` (catalog name or file).

    ``angle`` is the angle of incidence on the segment's entry face, in the medium before it;
    its faces are taken parallel, so the exit face sees the refracted angle. ``polarization``
    states the light arriving at the entry face (``s``, ``p`` or ``unpolarized``); without it
    the light keeps the s and p shares the faces before left it with (unpolarized at the start).
    """

    index: DielectricIndex | None = Field(None, description="Refractive index n or n+κj of its faces.")
    material: str | None = Field(None, description="Catalog material or material file of its faces.")
    angle: quantity("angle", bounds=RANGES["angle of incidence"]) | None = Field(
        None, description="Angle of incidence on its entry face, in the medium before it.")
    polarization: Polarization | None = Field(None, description="Polarization of the light arriving at its entry face.")
    _index: np.ndarray | None = PrivateAttr(default=None)

    @model_validator(mode="after")
    def _one_medium(self):
        if self.index is not None and self.material is not None:
            raise InputProblem(("material",), "give index or material, not both")
        return self

    def resolve(self, wavelength_m, files):
        if self.index is None and self.material is None:
            return self
        return self._resolved(_index=resolve_index(self.index, self.material, wavelength_m, files))

    def medium_index(self):
        """Complex index over the wavelength axis, or ``None`` if the segment carries no medium."""
        return self._index

    def role(self):
        """It carries its medium, else (a fibre or waveguide without faces) it guides the light."""
        if self._index is None:
            return GUIDES
        return Carries(self._index, self.angle, self.polarization, **self.faces_facts())

    def faces_facts(self):
        """What :class:`~linkbudget.segments.roles.Carries` says of its faces beyond the index:
        by default not parallel (the light is guided, or spreads, along the segment)."""
        return {}

    def input_notes(self):
        """Range notes, and a metal's index on its faces (:func:`~linkbudget.config.ranges.index_notes`)."""
        return super().input_notes() + ([] if self._index is None else index_notes(self._index))

    def placement_problem(self, place):
        if self.angle is not None and not place.medium_upstream:
            return InputProblem(("angle",),
                                "an angle of incidence needs a medium before this segment to be measured in")
        return None
