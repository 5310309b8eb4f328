"""A free-space gap: its ambient medium, atmospheric extinction, and the spreading beam.

The gap's loss is the sum of

- the ambient medium's loss through the flux law (its κ, or ``kappa``/``absorption``/
  ``attenuation``; an outdoor path's measured extinction in dB per length is an ``attenuation``),
- or the extinction of the Kim (default) or Kruse model from a ``visibility``,
- and the beam's coupling loss, when both ends are known: the launched beam is the ``beam``
  (a ``waist`` at the gap's start, or the ``divergence`` of a collimated source) or else the mode
  of the segment before the gap; the receiving side is an ``aperture`` (the power inside it) or
  else the mode of the segment after the gap (overlap after propagation, with optional
  ``offset`` and ``tilt`` at the receiving end).
"""

from typing import Literal

import numpy as np
from pydantic import Field, model_validator

from linkbudget.config.fields import DielectricIndex, InputProblem, Strict
from linkbudget.config.ranges import RANGES, mode_size_problem
from linkbudget.physics import atmosphere, gaussian
from linkbudget.segments.base import (
    Mode,
    ModeAxis,
    OffsetSpread,
    TiltDirection,
    TiltSpread,
    check_tilt_direction,
    length_spread,
    spread,
)
from linkbudget.segments.coupling import aperture_losses_db, coupling_losses_db
from linkbudget.segments.medium import Bulk, absorption_coefficient_per_m
from linkbudget.segments.rows import segment_row

#: Visibility models, by name (each a published model of :mod:`linkbudget.physics.atmosphere`).
VISIBILITY_MODELS = {
    "kim": atmosphere.kim_attenuation_db_per_km,
    "kruse": atmosphere.kruse_attenuation_db_per_km,
}


class Beam(Strict):
    """The beam launched into a gap: its ``waist_diameter`` at the gap's start (1/e² intensity, a
    diameter like every size in a link), or the far-field ``divergence`` half-angle of a
    collimated source (its waist radius is then λ/(π·n·θ)). ``waist``, a radius, is the spelling of
    earlier releases, read for this one with a note."""

    waist_diameter: length_spread("beam waist diameter") | None = Field(
        None, description="Waist diameter (1/e² intensity) at the gap's start (or divergence).")
    waist: length_spread("beam waist") | None = Field(
        None, description="Waist radius: the spelling of earlier releases; write waist_diameter.")
    divergence: spread("angle", bounds=RANGES["beam divergence"]) | None = Field(
        None, description="Far-field divergence half-angle of a collimated source (or waist_diameter).")

    @model_validator(mode="after")
    def _one(self):
        given = [key for key in ("waist_diameter", "waist", "divergence") if getattr(self, key) is not None]
        if len(given) != 1:
            raise InputProblem(() if not given else (given[-1],),
                               "give the beam's waist_diameter or its divergence, one of them")
        return self

    def notes(self):
        """The note on the old spelling ``waist`` (a radius), if used."""
        if self.waist is None:
            return []
        return [f"beam.waist is a radius, read as such in this release; write waist_diameter: "
                f"{2 * self.waist.typ_value * 1e3:g} mm (twice it), as every other size in a link is a diameter"]

    def waist_diameter_low_m(self):
        """The smallest waist diameter written [m], or ``None`` for a beam given by its divergence."""
        if self.waist_diameter is not None:
            return self.waist_diameter.low
        return None if self.waist is None else 2 * self.waist.low

    def mode(self, wavelength_m, n):
        """The launched beam as a circular :class:`Mode`: half its waist diameter, or the waist
        λ/(π·n·θ) of its divergence θ (:func:`linkbudget.physics.gaussian.waist_from_divergence_m`)."""
        ones = np.ones(np.shape(wavelength_m))
        if self.waist_diameter is not None:
            return Mode.circular(ModeAxis(self.waist_diameter, lambda diameter_m: diameter_m / 2 * ones))
        if self.waist is not None:
            return Mode.circular(ModeAxis(self.waist, lambda radius_m: radius_m * ones))
        return Mode.circular(ModeAxis(self.divergence,
                                      lambda angle_rad: gaussian.waist_from_divergence_m(angle_rad, wavelength_m, n=n)))


class Gap(Bulk):
    """A free-space gap of ``length`` through an ambient medium (``material``/``index``; default air)."""

    kind: Literal["gap"]
    index: DielectricIndex | None = Field(None, description="Refractive index of the ambient medium; default: air.")
    length: length_spread("gap length") = Field(description="Length of the free-space path.")
    visibility: length_spread("visibility") | None = Field(
        None, description="Meteorological visibility, for the extinction of the air.")
    visibility_model: Literal["kim", "kruse"] = Field("kim", description="Model turning visibility into extinction.")
    beam: Beam | None = Field(None, description="The beam launched into the gap; default: the mode before it.")
    aperture: length_spread("aperture diameter") | None = Field(
        None, description="Diameter of the receiving aperture; default: the mode after the gap.")
    offset: OffsetSpread | None = Field(None, description="Lateral offset of the beam at the receiving end.")
    tilt: TiltSpread | None = Field(None, description="Tilt of the beam at the receiving end.")
    tilt_direction: TiltDirection | None = Field(None, description="Which way the tilt turns relative to the offset.")

    @model_validator(mode="after")
    def _forms(self):
        forms = self._check_bulk_forms()
        if self.visibility is not None and forms:
            raise InputProblem(("visibility",), f"give the extinction as {forms[0]} or as visibility, not both")
        if self.aperture is not None and (self.offset is not None or self.tilt is not None):
            raise InputProblem(("aperture",), "offset and tilt apply to coupling into a mode, not to an aperture")
        check_tilt_direction(self)
        return self

    def resolve(self, wavelength_m, files):
        diameter_m = None if self.beam is None else self.beam.waist_diameter_low_m()
        message = None if diameter_m is None else mode_size_problem(diameter_m, wavelength_m)
        if message is not None:
            key = "waist_diameter" if self.beam.waist_diameter is not None else "waist"
            raise InputProblem(("beam", key), f"the beam's waist diameter: {message}")
        if self.index is None and self.material is None:
            try:
                return self.model_copy(update={"material": "air"}).resolve(wavelength_m, files)
            except InputProblem as problem:
                if problem.key_path != ("material",):
                    raise
                # placed at the gap itself: the `material` key the message would name is not written
                raise InputProblem((), f"no `material` or `index` written, so the gap holds air (the default); "
                                       f"{problem}", problem.hint) from None
        return super().resolve(wavelength_m, files)

    def input_notes(self):
        return super().input_notes() + ([] if self.beam is None else self.beam.notes())

    def path_length_m(self, case):
        return case.value(self.length)

    def absorption_per_m(self, wavelength_m, case):
        """α [1/m] of the ambient medium, or the visibility model's extinction if given."""
        if self.visibility is None:
            return super().absorption_per_m(wavelength_m, case)
        model = VISIBILITY_MODELS[self.visibility_model]
        visibility_m = case.value(self.visibility, larger_hurts=False)
        return absorption_coefficient_per_m(wavelength_m, attenuation_db_per_m=model(visibility_m, wavelength_m) / 1e3)

    def launched_mode(self, wavelength_m, mode_before):
        """The beam entering the gap: its ``beam``, else the mode of the segment before it."""
        if self.beam is not None:
            return self.beam.mode(wavelength_m, np.real(self.medium_index()))
        return mode_before

    def beam_losses_db(self, wavelength_m, cases, around):
        """Beam coupling loss per case, or ``None`` when an end of the beam is not known."""
        launched = self.launched_mode(wavelength_m, around.mode_before)
        n = np.real(self.medium_index())
        if launched is None:
            return None
        if self.aperture is not None:
            return aperture_losses_db(wavelength_m, launched, cases, separation=self.length,
                                      aperture_diameter=self.aperture, n=n)
        if around.mode_after is None:
            return None
        return coupling_losses_db(wavelength_m, launched, around.mode_after, cases, offset=self.offset,
                                  tilt=self.tilt, separation=self.length, n=n, tilt_direction=self.tilt_direction)

    def budget_row(self, wavelength_m, cases, around):
        """The medium's loss over the path, plus the beam's coupling loss when both ends are known
        (the two are the row's parts ``medium`` and ``beam``)."""
        ambient = {case.name: self.loss_db(wavelength_m, case, around) for case in cases}
        beam = self.beam_losses_db(wavelength_m, cases, around)
        if beam is None:
            return segment_row(self, ambient, facts=("beam not evaluated: no launched beam or receiving side",))
        total = {case.name: ambient[case.name] + beam[case.name] for case in cases}
        return segment_row(self, total, loss_parts_db={"medium": ambient, "beam": beam})

    def placement_problem(self, place):
        receives = self.aperture is not None or place.mode_after is not None
        if self.beam is not None and not receives:
            return InputProblem(("beam",), "a launched beam needs a receiving side",
                                "give the gap an aperture, or follow it with a fiber or waveguide that has a mode")
        if (self.offset is not None or self.tilt is not None) and not (
                receives and self.launched_mode(place.wavelength_m, place.mode_before) is not None):
            return InputProblem(("offset" if self.offset is not None else "tilt",),
                                "offset and tilt need a beam launched into the gap and a mode receiving it")
        return super().placement_problem(place)
