"""Segments whose loss is a datasheet number or follows from a joint's geometry.

``connector`` and ``splice`` are joints: their loss is the datasheet ``loss``, or the Gaussian
mode overlap of the two sides from the joint's ``offset``, ``tilt`` and ``gap`` and the mode field
diameters of its neighbours. When both are given the datasheet wins and the geometric estimate is
shown beside it. ``element`` is a fixed loss or gain. A datasheet loss is the same at every
wavelength; its spread (``{min, typ, max}`` or ``{mean, sigma}``) sets the budget cases.
"""

from typing import ClassVar, Literal

import numpy as np
from pydantic import PrivateAttr, model_validator

from linkbudget.config.fields import (
    CASES,
    DielectricIndex,
    InputProblem,
    integer,
    quantity,
)
from linkbudget.config.ranges import RANGES
from linkbudget.segments.base import (
    ElementLossSpread,
    JointLossSpread,
    Mode,
    ModeFieldDiameterSpread,
    OffsetSpread,
    Row,
    SegmentSpec,
    TiltDirection,
    TiltSpread,
    check_mode_sizes,
    check_tilt_direction,
    flat_over_wavelength,
    length_spread,
)
from linkbudget.segments.coupling import coupling_losses_db
from linkbudget.segments.optics import resolve_index

JointType = Literal["physical-contact", "index-matched", "air-gap"]

_GEOMETRY = ("offset", "tilt", "gap", "mode_field_diameter_before", "mode_field_diameter_after")



class _Joint(SegmentSpec):
    """A joint between two segments, from a datasheet ``loss`` or from its geometry.

    ``joint`` sets the optics of the faces when both neighbours carry a medium:
    ``physical-contact`` (default without a ``gap``): the media touch, one bare interface
    (none when their indices are equal); ``index-matched``: gel or adhesive, no Fresnel term;
    ``air-gap`` (default with a ``gap``): two faces through the gap's medium (``gap_material``
    or ``gap_index``; air by default). The gap medium's index also sets the diffraction across
    the gap, and ``tilt`` is measured in it (Ghatak & Thyagarajan's convention), air included
    when the joint has no gap.
    """

    passes_faces: ClassVar[bool] = True
    sets_joint: ClassVar[bool] = True

    loss: JointLossSpread | None = None
    joint: JointType | None = None
    offset: OffsetSpread | None = None
    tilt: TiltSpread | None = None
    tilt_direction: TiltDirection | None = None
    gap: length_spread("joint gap") | None = None
    gap_material: str | None = None
    gap_index: DielectricIndex | None = None
    mode_field_diameter_before: ModeFieldDiameterSpread | None = None
    mode_field_diameter_after: ModeFieldDiameterSpread | None = None
    _gap_index: np.ndarray | None = PrivateAttr(default=None)

    @model_validator(mode="after")
    def _loss_or_geometry(self):
        if self.loss is None and not self.geometric:
            raise InputProblem((), "give the datasheet loss, or the joint's geometry "
                               "(offset, tilt, gap, mode field diameters)")
        if self.gap_material is not None and self.gap_index is not None:
            raise InputProblem(("gap_index",), "give gap_material or gap_index, not both")
        if self.joint == "physical-contact" and self.gap is not None and self.gap.high > 0:
            raise InputProblem(("joint",), "a physical-contact joint has no gap; use air-gap or index-matched")
        check_tilt_direction(self)
        return self

    @property
    def geometric(self):
        """The joint gives any geometry to compute its coupling from."""
        return any(getattr(self, key) is not None for key in _GEOMETRY)

    @property
    def joint_type(self):
        if self.joint is not None:
            return self.joint
        return "air-gap" if self.gap is not None else "physical-contact"

    def resolve(self, wavelength_m, files):
        check_mode_sizes({(f"mode_field_diameter_{side}",): getattr(self, f"mode_field_diameter_{side}")
                          for side in ("before", "after")}, wavelength_m)
        if self.joint_type == "air-gap" or self.geometric:
            material = None if self.gap_index is not None else (self.gap_material or "air")
            self._gap_index = resolve_index(self.gap_index, material, wavelength_m, files, ("gap_material",))
        elif self.gap_material is not None or self.gap_index is not None:
            raise InputProblem(("gap_material" if self.gap_material else "gap_index",),
                               "a gap medium needs a gap, a tilt or an air-gap joint to act on")
        return self

    def gap_medium_index(self):
        """Index of the medium in the gap over the wavelength axis, else ``None``."""
        return self._gap_index

    def side_modes(self, wavelength_m, mode_before, mode_after):
        """(mode before, mode after): the explicit diameters, else the neighbours' modes."""
        def side(diameter, neighbour_mode):
            return neighbour_mode if diameter is None else Mode.from_spread(diameter, diameter, wavelength_m)

        return side(self.mode_field_diameter_before, mode_before), side(self.mode_field_diameter_after, mode_after)

    def geometric_losses_db(self, wavelength_m, mode_before, mode_after):
        """Coupling loss per case from the joint's geometry (Gaussian overlap of the two modes)."""
        mode_before, mode_after = self.side_modes(wavelength_m, mode_before, mode_after)
        n_gap = np.real(self._gap_index)
        return coupling_losses_db(wavelength_m, mode_before, mode_after, offset=self.offset, tilt=self.tilt,
                                  separation=self.gap, n=n_gap, tilt_direction=self.tilt_direction)

    def budget_row(self, wavelength_m, *, mode_before=None, mode_after=None):
        geometric = self.geometric_losses_db(wavelength_m, mode_before, mode_after) if self.geometric else None
        if self.loss is None:
            return Row(self.name, self.kind, geometric)
        datasheet = {case: self.loss_db(wavelength_m, case) for case in CASES}
        return Row(self.name, self.kind, datasheet, {} if geometric is None else {"geometric_loss_db": geometric})


class Connector(_Joint):
    """A mated connector pair: insertion ``loss`` (or geometry) and an optional ``return_loss``."""

    kind: Literal["connector"]
    return_loss: quantity("ratio", bounds=RANGES["return loss"]) | None = None

    def budget_row(self, wavelength_m, *, mode_before=None, mode_after=None):
        row = super().budget_row(wavelength_m, mode_before=mode_before, mode_after=mode_after)
        if self.return_loss is not None:
            row.detail["return_loss_db"] = self.return_loss
        return row

    def loss_db(self, wavelength_m, case):
        return flat_over_wavelength(self.loss.at(case), wavelength_m)


class Splice(_Joint):
    """``count`` fusion or mechanical splices, each with insertion ``loss`` (or geometry)."""

    kind: Literal["splice"]
    count: integer(bounds=RANGES["splice count"]) = 1

    def loss_db(self, wavelength_m, case):
        return flat_over_wavelength(self.count * self.loss.at(case), wavelength_m)

    def geometric_losses_db(self, wavelength_m, mode_before, mode_after):
        return {case: self.count * loss for case, loss in super().geometric_losses_db(
            wavelength_m, mode_before, mode_after).items()}


class Element(SegmentSpec):
    """A fixed loss (filter, isolator, allowance) or, with a negative loss, a gain."""

    passes_faces: ClassVar[bool] = True

    kind: Literal["element"]
    loss: ElementLossSpread
    note: str | None = None

    def loss_db(self, wavelength_m, case):
        return flat_over_wavelength(self.loss.at(case), wavelength_m)

    def row_detail(self, wavelength_m):
        return {} if self.note is None else {"note": self.note}
