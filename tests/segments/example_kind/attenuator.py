"""An example datasheet kind, written as a new kind is (README, "Adding a segment kind").

A fixed optical attenuator: its datasheet ``attenuation`` (a spread) at every wavelength, passing
the faces around it on like an element. This module and one line in the registry are all it takes.
"""

from typing import Literal

from pydantic import Field

from linkbudget.segments.base import NOTHING_AROUND, ElementLossSpread, SegmentSpec, flat_over_wavelength
from linkbudget.segments.roles import PASSES


class Attenuator(SegmentSpec):
    """A fixed attenuator of datasheet ``attenuation`` (spread allowed)."""

    kind: Literal["attenuator"]
    attenuation: ElementLossSpread = Field(description="Datasheet attenuation of the attenuator.")

    def role(self):
        return PASSES

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        return flat_over_wavelength(case.value(self.attenuation), wavelength_m)
