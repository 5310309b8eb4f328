"""An on-chip waveguide: propagation loss over its length, plus bends and crossings.

The loss of a waveguide is one budget row, the sum of three parts
(:meth:`Waveguide.loss_parts_db` gives them separately):

- ``propagation``: the flux law over ``length``, from a datasheet ``attenuation`` in dB per
  length or from the imaginary part κ_eff of the mode's complex ``effective_index``,
  α = 4πκ_eff/λ, through :func:`linkbudget.segments.medium.absorption_coefficient_per_m`;
- ``bends``: ``bends.count`` times the loss of one bend;
- ``crossings``: ``crossings.count`` times the loss of one crossing.

``effective_index`` describes the guided mode, not the faces: the waveguide has faces (and the
engine a Fresnel row at each joint to another medium) only when it gives ``index`` or
``material``, as a fibre does. So how the propagation loss is written never adds or removes an
interface row.
"""

from typing import Literal

from pydantic import Field, model_validator

from linkbudget.config.fields import DielectricIndex, InputProblem, Strict, integer
from linkbudget.config.ranges import RANGES
from linkbudget.physics import flux
from linkbudget.segments.base import (
    NOTHING_AROUND,
    JointLossSpread,
    Mode,
    ModeFieldDiameterSpread,
    attenuation_spread,
    check_mode_sizes,
    flat_over_wavelength,
    length_spread,
)
from linkbudget.segments.medium import absorption_coefficient_per_m
from linkbudget.segments.optics import OpticalSegment


class CountedLoss(Strict):
    """``count`` identical features (bends, crossings), each with insertion ``loss``."""

    count: integer(bounds=RANGES["feature count"]) = Field(description="How many there are.")
    loss: JointLossSpread = Field(description="Insertion loss of each.")

    def loss_db(self, case):
        """Total loss of the features [dB] for a budget case."""
        return self.count * case.value(self.loss)


class ModeSize(Strict):
    """A rectangular guide's mode: 1/e² intensity mode-field diameters along x and y."""

    width: ModeFieldDiameterSpread = Field(description="Mode field diameter across the chip (x).")
    height: ModeFieldDiameterSpread = Field(description="Mode field diameter out of the chip (y).")


class Waveguide(OpticalSegment):
    """An on-chip waveguide of ``length`` with its propagation loss, bends and crossings.

    Give exactly one of ``attenuation`` (dB per length, spread allowed, e.g. ``2 dB/cm``) or
    ``effective_index`` (the mode's complex effective index n_eff + κ_eff j, e.g.
    ``2.4+1.2e-5j``; one value, only κ_eff enters the loss). ``bends`` and ``crossings`` are each
    ``{count, loss}``. The mode size for the joints next to it is ``mode_field_diameter``
    (circular) or ``mode_size: {width, height}``, at most one. ``index``/``material`` give the
    faces (see the module docstring); ``angle`` tilts the entry face but does not lengthen the
    guided path.
    """

    kind: Literal["waveguide"]
    length: length_spread("waveguide length") = Field(description="Length of the waveguide.")
    attenuation: attenuation_spread("waveguide attenuation") | None = Field(
        None, description="Propagation loss per length, e.g. 2 dB/cm (or effective_index).")
    effective_index: DielectricIndex | None = Field(
        None, description="Complex effective index of the mode; its κ gives the loss (or attenuation).")
    bends: CountedLoss | None = Field(None, description="Bends {count, loss}.")
    crossings: CountedLoss | None = Field(None, description="Crossings {count, loss}.")
    mode_field_diameter: ModeFieldDiameterSpread | None = Field(
        None, description="Mode field diameter of a circular mode (or mode_size).")
    mode_size: ModeSize | None = Field(None, description="Mode field diameters {width, height} of a rectangular mode.")

    @model_validator(mode="after")
    def _one_of_each(self):
        if self.attenuation is None and self.effective_index is None:
            raise ValueError("give its propagation loss as attenuation (e.g. 2 dB/cm) or effective_index "
                             "(e.g. 2.4+1.2e-5j)")
        if self.attenuation is not None and self.effective_index is not None:
            raise InputProblem(("effective_index",), "give attenuation or effective_index, not both")
        if self.mode_field_diameter is not None and self.mode_size is not None:
            raise InputProblem(("mode_size",), "give mode_field_diameter or mode_size, not both")
        return self

    def loss_parts_db(self, wavelength_m, case):
        """The parts of the loss [dB] over the wavelength axis for a budget case.

        Parameters
        ----------
        wavelength_m : numpy.ndarray
            Vacuum wavelengths [m].
        case : Corner or Draws
            What every spread's value is (:mod:`linkbudget.segments.cases`).

        Returns
        -------
        dict
            ``{"propagation", "bends", "crossings"}`` -> loss [dB] arrays shaped like
            ``wavelength_m`` (zero for a part not given).

        Notes
        -----
        Propagation: 10·log10(e)·α·L with α = 4πκ_eff/λ or α = A/(10·log10 e) for an
        attenuation A [1]_.

        References
        ----------
        .. [1] M. Born and E. Wolf, "Principles of Optics", 7th ed., 1999 (flux in absorbing
           media; section from memory).
        """
        if self.effective_index is not None:
            alpha = absorption_coefficient_per_m(wavelength_m, kappa=self.effective_index.imag)
        else:
            alpha = absorption_coefficient_per_m(wavelength_m, attenuation_db_per_m=case.value(self.attenuation))
        counted = {"bends": self.bends, "crossings": self.crossings}
        return {
            "propagation": flux.loss_db(alpha, case.value(self.length)),
            **{part: flat_over_wavelength(0.0 if features is None else features.loss_db(case), wavelength_m)
               for part, features in counted.items()},
        }

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        """Sum of :meth:`loss_parts_db`; the tangential index is ignored (the mode follows the guide)."""
        return sum(self.loss_parts_db(wavelength_m, case).values())

    def resolve(self, wavelength_m, files):
        size = self.mode_size
        check_mode_sizes({("mode_field_diameter",): self.mode_field_diameter,
                          ("mode_size", "width"): None if size is None else size.width,
                          ("mode_size", "height"): None if size is None else size.height}, wavelength_m)
        return super().resolve(wavelength_m, files)

    def mode(self, wavelength_m):
        if self.mode_field_diameter is not None:
            return Mode.from_diameters(self.mode_field_diameter, self.mode_field_diameter, wavelength_m)
        if self.mode_size is not None:
            return Mode.from_diameters(self.mode_size.width, self.mode_size.height, wavelength_m)
        return None
