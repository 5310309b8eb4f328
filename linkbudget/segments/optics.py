"""Segments that carry an optical medium, and the resolution of their materials.

A segment carries a medium when it gives an ``index`` or a ``material``. Between two
consecutive segments that carry media, the engine inserts the interface (or the coating) between
them; a segment without a medium is transparent to that logic.
"""

from typing import Literal

import numpy as np
from pydantic import PrivateAttr, model_validator

from linkbudget.config.fields import CASES, DielectricIndex, InputProblem, quantity
from linkbudget.config.ranges import RANGES
from linkbudget.materials.dispersion import MaterialRangeError
from linkbudget.materials.library import MaterialError, covering_hint, load_material
from linkbudget.paths import PathRefused
from linkbudget.segments.base import Row, SegmentSpec

Polarization = Literal["s", "p", "unpolarized"]

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


class OpticalSegment(SegmentSpec):
    """A segment that may carry a medium: ``index`` (n or n+κj) or ``material`` (catalog name or file).

    ``angle`` is the angle of incidence on the segment's entry face, in the medium before it;
    its faces are taken parallel, so the exit face sees the refracted angle. ``polarization``
    states the light arriving at the entry face (``s``, ``p`` or ``unpolarized``); without it
    the light keeps the s and p shares the faces before left it with (unpolarized at the start).
    """

    index: DielectricIndex | None = None
    material: str | None = None
    angle: quantity("angle", bounds=RANGES["angle of incidence"]) | None = None
    polarization: Polarization | None = None
    _index: np.ndarray | None = PrivateAttr(default=None)

    @model_validator(mode="after")
    def _one_medium(self):
        if self.index is not None and self.material is not None:
            raise InputProblem(("material",), "give index or material, not both")
        return self

    def resolve(self, wavelength_m, files):
        if self.index is not None or self.material is not None:
            self._index = resolve_index(self.index, self.material, wavelength_m, files)
        return self

    def medium_index(self):
        """Complex index over the wavelength axis, or ``None`` if the segment carries no medium."""
        return self._index

    def budget_row(self, wavelength_m, *, mode_before=None, mode_after=None, tangential_index=0.0):
        """The bulk row; ``tangential_index`` β = n0·sin θ0 of the light crossing it (0: normal)."""
        losses = {case: self.loss_db(wavelength_m, case, tangential_index=tangential_index) for case in CASES}
        return Row(self.name, self.kind, losses, self.row_detail(wavelength_m))

    def loss_db(self, wavelength_m, case, *, tangential_index=0.0):
        """Bulk loss [dB] over the wavelength axis, for light of tangential index β (0: normal)."""
        raise NotImplementedError
