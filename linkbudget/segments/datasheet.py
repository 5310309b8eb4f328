"""Segments whose loss comes from a datasheet number: connector, splice, element.

A datasheet loss is the same at every wavelength of the link unless the part says otherwise;
the spread of the datasheet (``{min, typ, max}`` or ``{mean, sigma}``) sets the budget cases.
"""

from typing import Literal

import numpy as np

from linkbudget.config.fields import integer, quantity, spread
from linkbudget.segments.base import SegmentSpec

LossSpread = spread("ratio", minimum=0.0)
SignedLossSpread = spread("ratio")


def _flat(value_db, wavelength_m):
    return np.full(np.shape(wavelength_m), value_db, dtype=float)


class Connector(SegmentSpec):
    """A mated connector pair: insertion ``loss`` and an optional ``return_loss``."""

    kind: Literal["connector"]
    loss: LossSpread
    return_loss: quantity("ratio", minimum=0.0) | None = None

    def loss_db(self, wavelength_m, case):
        return _flat(self.loss.at(case), wavelength_m)


class Splice(SegmentSpec):
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
