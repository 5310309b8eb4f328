"""Segments whose loss comes from a datasheet number: connector, splice, element.

A datasheet loss is the same at every wavelength of the link unless the part says otherwise;
the spread of the datasheet (``{min, typ, max}`` or ``{mean, sigma}``) sets the budget cases.
"""

from typing import Literal

import numpy as np
from pydantic import PrivateAttr

from linkbudget.config.fields import integer, quantity, spread
from linkbudget.segments.base import SegmentSpec
from linkbudget.segments.optics import resolve_index

LossSpread = spread("ratio", minimum=0.0)
SignedLossSpread = spread("ratio")


def _flat(value_db, wavelength_m):
    return np.full(np.shape(wavelength_m), value_db, dtype=float)


JointType = Literal["physical-contact", "index-matched", "air-gap"]


class _Joint(SegmentSpec):
    """A joint between two segments. When both carry a medium, ``joint`` sets the optics of the faces.

    ``physical-contact`` (default): the two media touch, one bare interface between them
    (none when their indices are equal); ``index-matched``: gel or adhesive, no Fresnel term;
    ``air-gap``: two interfaces, medium → air → medium.
    """

    joint: JointType = "physical-contact"
    _gap_index: np.ndarray | None = PrivateAttr(default=None)

    def resolve(self, wavelength_m, base_dir):
        if self.joint == "air-gap":
            self._gap_index = resolve_index(None, "air", wavelength_m, base_dir, ("joint",))
        return self

    def gap_index(self):
        """Index of the medium in an air gap over the wavelength axis, else ``None``."""
        return self._gap_index


class Connector(_Joint):
    """A mated connector pair: insertion ``loss`` and an optional ``return_loss``."""

    kind: Literal["connector"]
    loss: LossSpread
    return_loss: quantity("ratio", minimum=0.0) | None = None

    def loss_db(self, wavelength_m, case):
        return _flat(self.loss.at(case), wavelength_m)


class Splice(_Joint):
    """``count`` fusion or mechanical splices, each with insertion ``loss``."""

    kind: Literal["splice"]
    loss: LossSpread
    count: integer(minimum=1) = 1

    def loss_db(self, wavelength_m, case):
        return _flat(self.count * self.loss.at(case), wavelength_m)


class Element(SegmentSpec):
    """A fixed loss (filter, isolator, allowance) or, with a negative loss, a gain."""

    kind: Literal["element"]
    loss: SignedLossSpread
    note: str | None = None

    def loss_db(self, wavelength_m, case):
        return _flat(self.loss.at(case), wavelength_m)
