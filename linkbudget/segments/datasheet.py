"""Segments whose loss is a datasheet number or follows from a joint's geometry.

``connector`` and ``splice`` are joints: their loss is the datasheet ``loss``, or the Gaussian
mode overlap of the two sides from the joint's ``offset``, ``tilt`` and ``gap`` and the mode field
diameters of its neighbours. When both are given the datasheet wins and the geometric estimate is
shown beside it. ``element`` is a fixed loss or gain. A datasheet loss is the same at every
wavelength; its spread (``{min, typ, max}`` or ``{mean, sigma}``) sets the budget cases.
"""

from typing import Literal

import numpy as np
from pydantic import Field, PrivateAttr, model_validator

from linkbudget.config.fields import (
    DielectricIndex,
    InputProblem,
    integer,
    spread,
)
from linkbudget.config.ranges import RANGES
from linkbudget.config.spectral import spectral
from linkbudget.physics.decibel import transmittance_from_loss_db
from linkbudget.segments.base import (
    NOTHING_AROUND,
    ElementLossSpread,
    JointLossSpread,
    Mode,
    ModeFieldDiameterSpread,
    OffsetSpread,
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
from linkbudget.segments.roles import PASSES, Faces, Joint
from linkbudget.segments.rows import POLARIZATIONS, segment_row

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

    loss: spectral(JointLossSpread) | None = Field(None, description="Datasheet insertion loss (or the geometry).")
    joint: JointType | None = Field(None, description="How the faces meet when both neighbours carry a medium.")
    offset: OffsetSpread | None = Field(None, description="Lateral offset between the two modes.")
    tilt: TiltSpread | None = Field(None, description="Angle between the two modes' axes.")
    tilt_direction: TiltDirection | None = Field(None, description="Which way the tilt turns relative to the offset.")
    gap: length_spread("joint gap") | None = Field(None, description="Separation of the two faces.")
    gap_material: str | None = Field(
        None, description="Catalog material or material file in the gap (or gap_index); default air.")
    gap_index: DielectricIndex | None = Field(None, description="Refractive index in the gap (or gap_material).")
    mode_field_diameter_before: ModeFieldDiameterSpread | None = Field(
        None, description="Mode field diameter on the side before the joint; default: the neighbour's.")
    mode_field_diameter_after: ModeFieldDiameterSpread | None = Field(
        None, description="Mode field diameter on the side after the joint; default: the neighbour's.")
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
            return self._resolved(_gap_index=resolve_index(self.gap_index, material, wavelength_m, files,
                                                           ("gap_material",)))
        if self.gap_material is not None or self.gap_index is not None:
            raise InputProblem(("gap_material" if self.gap_material else "gap_index",),
                               "a gap medium needs a gap, a tilt or an air-gap joint to act on")
        return self

    def role(self):
        """A joint, with the faces its ``joint`` type makes between the media around it."""
        faces = _JOINT_FACES[self.joint_type]
        if faces is not Faces.GAP:
            return Joint(faces)
        return Joint(faces, self._gap_index, 0.0 if self.gap is None else self.gap.low)

    def placement_problem(self, place):
        if not self.geometric:
            return None
        for side, mode in zip(("before", "after"), self.side_modes(place.wavelength_m, place.mode_before,
                                                                    place.mode_after), strict=True):
            if mode is None:
                return InputProblem((f"mode_field_diameter_{side}",),
                                    f"the joint's geometry needs the mode field diameter {side} it",
                                    f"give mode_field_diameter_{side}, or a neighbouring fiber or waveguide "
                                    "with mode_field_diameter (or core geometry)")
        return None

    def side_modes(self, wavelength_m, mode_before, mode_after):
        """(mode before, mode after): the explicit diameters, else the neighbours' modes."""
        def side(diameter, neighbour_mode):
            return neighbour_mode if diameter is None else Mode.from_diameters(diameter, diameter, wavelength_m)

        return side(self.mode_field_diameter_before, mode_before), side(self.mode_field_diameter_after, mode_after)

    def geometric_losses_db(self, wavelength_m, cases, around):
        """Coupling loss per case from the joint's geometry (Gaussian overlap of the two modes)."""
        mode_before, mode_after = self.side_modes(wavelength_m, around.mode_before, around.mode_after)
        return coupling_losses_db(wavelength_m, mode_before, mode_after, cases, offset=self.offset, tilt=self.tilt,
                                  separation=self.gap, n=np.real(self._gap_index),
                                  tilt_direction=self.tilt_direction)

    def budget_row(self, wavelength_m, cases, around):
        """The datasheet loss (with the geometric estimate beside it, when the geometry is given
        too), else the loss from the geometry."""
        geometric = self.geometric_losses_db(wavelength_m, cases, around) if self.geometric else None
        typed = {"reflectance": self.reflectance(wavelength_m), "reflectance_high": self.reflectance_high(wavelength_m)}
        if self.loss is None:
            return segment_row(self, geometric, **typed)
        datasheet = {case.name: self.loss_db(wavelength_m, case) for case in cases}
        return segment_row(self, datasheet, geometric_estimate_db=geometric, **typed)

    def reflectance(self, wavelength_m):
        """polarization -> the power fraction the joint sends back toward the source, or ``None``."""
        return None

    def reflectance_high(self, wavelength_m):
        """polarization -> the highest such fraction its spread allows, where it differs, or ``None``."""
        return None

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        """The datasheet loss over the wavelength axis."""
        return flat_over_wavelength(case.value(self.loss), wavelength_m)


#: The faces each ``joint`` type makes between the media around it.
_JOINT_FACES = {"physical-contact": Faces.CONTACT, "index-matched": Faces.NONE, "air-gap": Faces.GAP}


class _Counted(_Joint):
    """``count`` joints of the same kind in a row, each with the same insertion ``loss`` (or
    geometry): the loss is multiplied by the count; the faces between media are those of one."""

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        """The datasheet loss of the ``count`` splices (drawn one by one in a statistical budget)."""
        return flat_over_wavelength(case.total(self.loss, self.count), wavelength_m)

    def geometric_losses_db(self, wavelength_m, cases, around):
        return {case: self.count * loss for case, loss in super().geometric_losses_db(
            wavelength_m, cases, around).items()}


class Connector(_Counted):
    """``count`` mated connector pairs (default 1): insertion ``loss`` (or geometry) of each and an
    optional ``return_loss`` (of one: the reflections of several are not summed)."""

    kind: Literal["connector"]
    count: integer(bounds=RANGES["connector count"]) = Field(1, description="Number of identical mated pairs.")
    return_loss: spectral(spread("ratio", bounds=RANGES["return loss"])) | None = Field(
        None, description="Datasheet return loss of the mated pair (spread allowed: its low end is the worst case).")

    def reflectance(self, wavelength_m):
        """The datasheet return loss RL (its typical value) as the reflectance R = 10^(−RL/10),
        the same for s and p (a datasheet states one value)."""
        if self.return_loss is None:
            return None
        return _reflectance_of(self.return_loss.typ_value, wavelength_m)

    def reflectance_high(self, wavelength_m):
        """The reflectance of the return loss's low end (its bad end), where it is a spread."""
        if self.return_loss is None or np.array_equal(self.return_loss.low, self.return_loss.typ_value):
            return None
        return _reflectance_of(self.return_loss.low, wavelength_m)


def _reflectance_of(return_loss_db, wavelength_m):
    """polarization -> R = 10^(−RL/10) over the wavelength axis."""
    reflected = flat_over_wavelength(transmittance_from_loss_db(return_loss_db), wavelength_m)
    return {pol: reflected for pol in POLARIZATIONS}


class Splice(_Counted):
    """``count`` fusion or mechanical splices, each with insertion ``loss`` (or geometry)."""

    kind: Literal["splice"]
    count: integer(bounds=RANGES["splice count"]) = Field(1, description="Number of identical splices.")


class Element(SegmentSpec):
    """A fixed loss (filter, isolator, allowance) or, with a negative loss, a gain."""

    kind: Literal["element"]
    loss: spectral(ElementLossSpread) = Field(description="Fixed loss; a negative loss is a gain.")
    note: str | None = Field(None, description="A short note shown beside the row.")

    def role(self):
        return PASSES

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        return flat_over_wavelength(case.value(self.loss), wavelength_m)

    def row_facts(self):
        return () if self.note is None else (self.note,)
