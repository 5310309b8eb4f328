"""Bulk absorbing media and fibres: loss through the lossy-medium flux law.

A medium's loss may be written several ways; :func:`absorption_coefficient_per_m` turns every
one of them into the intensity attenuation coefficient α, and
:func:`linkbudget.physics.flux.loss_db` turns α and the path length into dB. No other code
converts a medium's loss.
"""

from typing import Literal

import numpy as np
from pydantic import Field, model_validator

from linkbudget.config.fields import ComplexIndex, InputProblem, number, quantity
from linkbudget.config.ranges import RANGES
from linkbudget.physics import fiber, flux
from linkbudget.segments.base import (
    NOTHING_AROUND,
    AbsorptionSpread,
    BulkAttenuationSpread,
    KappaSpread,
    Mode,
    ModeAxis,
    ModeFieldDiameterSpread,
    attenuation_spread,
    check_mode_sizes,
    length_spread,
)
from linkbudget.segments.cases import TYPICAL
from linkbudget.segments.optics import OpticalSegment


def absorption_coefficient_per_m(wavelength_m, *, kappa=None, absorption_per_m=None, attenuation_db_per_m=None):
    """Intensity attenuation coefficient α [1/m] from exactly one way of stating a loss.

    Parameters
    ----------
    wavelength_m : numpy.ndarray
        Vacuum wavelengths [m].
    kappa : float or numpy.ndarray, optional
        Extinction coefficient κ (imaginary part of the index); α = 4πκ/λ.
    absorption_per_m : float, optional
        α itself [1/m].
    attenuation_db_per_m : float, optional
        Attenuation [dB/m]; α = A / (10·log10 e).

    Returns
    -------
    numpy.ndarray
        α [1/m] over the wavelength axis.

    References
    ----------
    .. [1] M. Born and E. Wolf, "Principles of Optics", 7th ed., 1999 (flux in absorbing media).
    """
    given = [value is not None for value in (kappa, absorption_per_m, attenuation_db_per_m)]
    if sum(given) != 1:
        raise ValueError("give exactly one of kappa, absorption or attenuation")
    ones = np.ones(np.shape(wavelength_m))  # a column of draws broadcasts to (n_draws, n_wavelengths)
    if kappa is not None:
        return flux.absorption_coefficient_from_kappa(kappa, wavelength_m)
    if absorption_per_m is not None:
        return np.asarray(absorption_per_m, dtype=float) * ones
    return flux.absorption_from_attenuation_db_per_m(attenuation_db_per_m) * ones


class Fiber(OpticalSegment):
    """A length of optical fibre with a datasheet ``attenuation`` in dB per length.

    An optional ``index`` (e.g. the core's effective index) or ``material`` gives it faces, so a
    joint to a medium of another index has a Fresnel term; fibre-to-fibre joints of the same
    index have none.
    """

    kind: Literal["fiber"]
    length: length_spread("fibre length") = Field(description="Length of the fibre.")
    attenuation: attenuation_spread("fibre attenuation") = Field(
        description="Datasheet attenuation per length, e.g. 0.35 dB/km.")
    mode_field_diameter: ModeFieldDiameterSpread | None = Field(
        None, description="Mode field diameter (1/e² intensity), for the joints beside it.")
    core_diameter: quantity("length", bounds=RANGES["core diameter"]) | None = Field(
        None, description="Core diameter, with numerical_aperture: the mode from the core geometry.")
    numerical_aperture: number(bounds=RANGES["numerical aperture"]) | None = Field(
        None, description="Numerical aperture of the core, with core_diameter.")

    @model_validator(mode="after")
    def _one_mode_description(self):
        if self.mode_field_diameter is not None and self.core_diameter is not None:
            raise InputProblem(("core_diameter",), "give mode_field_diameter or core geometry, not both")
        if (self.core_diameter is None) != (self.numerical_aperture is None):
            missing = "numerical_aperture" if self.numerical_aperture is None else "core_diameter"
            raise InputProblem((), f"core geometry needs both core_diameter and numerical_aperture; add {missing}")
        if self.numerical_aperture is not None and self.index is not None and (
                self.numerical_aperture >= self.index.real):
            raise InputProblem(("numerical_aperture",), "numerical aperture must be below the core index and at "
                               f"most 1: NA = sqrt(n_core² - n_cladding²) < n_core = {self.index.real:g}; "
                               f"got {self.numerical_aperture:g}")
        return self

    def resolve(self, wavelength_m, files):
        check_mode_sizes({("mode_field_diameter",): self.mode_field_diameter}, wavelength_m)
        return super().resolve(wavelength_m, files)

    def mode(self, wavelength_m):
        """The fundamental mode: the datasheet mode field diameter (the same at every wavelength),
        or Marcuse's Gaussian fit from the core geometry at each wavelength
        (:func:`linkbudget.physics.fiber.marcuse_mode_field_radius_m`)."""
        if self.mode_field_diameter is not None:
            return Mode.from_diameters(self.mode_field_diameter, self.mode_field_diameter, wavelength_m)
        if self.core_diameter is None:
            return None
        core_radius_m = self.core_diameter / 2
        v = fiber.v_number(core_radius_m, wavelength_m, numerical_aperture=self.numerical_aperture)
        radius_m = fiber.marcuse_mode_field_radius_m(core_radius_m, v)
        return Mode.circular(ModeAxis.fixed(radius_m))

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        """The guided path is not lengthened by a tilt (the tangential index is ignored)."""
        alpha = absorption_coefficient_per_m(wavelength_m, attenuation_db_per_m=case.value(self.attenuation))
        return flux.loss_db(alpha, case.value(self.length))


_BULK_FORMS = ("kappa", "absorption", "attenuation")


class Bulk(OpticalSegment):
    """An optical segment whose bulk loss is the flux law over an (oblique) path."""

    kappa: KappaSpread | None = Field(None, description="Extinction coefficient κ of the medium.")
    absorption: AbsorptionSpread | None = Field(
        None, description="Absorption coefficient α of the medium, e.g. 0.5 /cm.")
    attenuation: BulkAttenuationSpread | None = Field(
        None, description="Attenuation of the medium per length, e.g. 0.2 dB/mm.")

    def _check_bulk_forms(self):
        forms = [key for key in _BULK_FORMS if getattr(self, key) is not None]
        if len(forms) > 1:
            raise InputProblem((forms[1],), f"give at most one of {', '.join(_BULK_FORMS)} "
                               f"(got {', '.join(forms)})")
        if forms and self.index is not None and self.index.imag != 0:
            raise InputProblem((forms[0],), f"the complex index already gives kappa; drop {forms[0]} "
                               "or the imaginary part")
        return forms

    def absorption_per_m(self, wavelength_m, case):
        """α [1/m] over the wavelength axis for a budget case: the explicit form, else the medium's κ."""
        if self.kappa is not None:
            return absorption_coefficient_per_m(wavelength_m, kappa=case.value(self.kappa))
        if self.absorption is not None:
            return absorption_coefficient_per_m(wavelength_m, absorption_per_m=case.value(self.absorption))
        if self.attenuation is not None:
            return absorption_coefficient_per_m(wavelength_m, attenuation_db_per_m=case.value(self.attenuation))
        return absorption_coefficient_per_m(wavelength_m, kappa=self.medium_index().imag)

    def resolve(self, wavelength_m, files):
        """Resolve the faces' index; a stated loss form sets its imaginary part (one N per medium).

        With ``kappa``, ``absorption`` or ``attenuation`` the medium's complex index is
        Re(N) + iκ, κ = αλ/(4π) (:func:`linkbudget.physics.flux.kappa_from_absorption_coefficient`)
        from the typical value of the form: the faces hold one index per wavelength, while the
        bulk row keeps each budget case's own value.
        """
        resolved = super().resolve(wavelength_m, files)
        if not (self._check_bulk_forms() and resolved._index is not None):
            return resolved
        kappa = flux.kappa_from_absorption_coefficient(self.absorption_per_m(wavelength_m, TYPICAL), wavelength_m)
        return resolved._resolved(_index=resolved._index.real + 1j * kappa)

    def path_length_m(self, case):
        raise NotImplementedError

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        """Bulk loss [dB] of one pass: α·d at normal incidence; crossed at an angle, the flux decays
        along the normal by α_z (:func:`linkbudget.physics.flux.absorption_along_normal_per_m`) with
        this case's index N = Re(N) + iκ, κ = αλ/(4π) (one complex index per medium)."""
        alpha = self.absorption_per_m(wavelength_m, case)
        index = self.medium_index()
        if index is not None and np.any(around.tangential_index):
            kappa = flux.kappa_from_absorption_coefficient(alpha, wavelength_m)
            alpha = flux.absorption_along_normal_per_m(index.real + 1j * kappa, around.tangential_index, wavelength_m)
        return flux.loss_db(alpha, self.path_length_m(case))


class Medium(Bulk):
    """A bulk absorbing medium (window, blank, liquid film) of a given ``thickness`` or ``length``.

    Its faces come from ``index`` or ``material``; its bulk loss from their κ or from exactly
    one of ``kappa``, ``absorption`` (α, e.g. ``0.5 /cm``) or ``attenuation`` (dB per length),
    which then replaces the material's κ. With ``multiple_reflections: true`` the light bouncing
    between its two faces is summed incoherently.
    """

    kind: Literal["medium"]
    index: ComplexIndex | None = Field(None, description="Complex refractive index n+κj of the medium.")
    thickness: length_spread("medium thickness") | None = Field(
        None, description="Thickness crossed by the light (or length).")
    length: length_spread("medium thickness") | None = Field(
        None, description="Length crossed by the light (or thickness).")
    multiple_reflections: bool = Field(False, description="Sum the light bouncing between its two faces.")

    @model_validator(mode="after")
    def _one_of_each(self):
        if (self.thickness is None) == (self.length is None):
            raise ValueError("give exactly one of thickness or length")
        forms = self._check_bulk_forms()
        if not forms and self.index is None and self.material is None:
            raise ValueError("give its index or material, or its loss as kappa, absorption or attenuation")
        return self

    def resolve(self, wavelength_m, files):
        resolved = super().resolve(wavelength_m, files)
        if self.multiple_reflections and resolved.medium_index() is None:
            raise InputProblem(("multiple_reflections",), "multiple reflections need faces: give index or material")
        return resolved

    @property
    def _path(self):
        return self.thickness if self.thickness is not None else self.length

    def path_length_m(self, case):
        return case.value(self._path)

    def faces_facts(self):
        """A plate: parallel faces, its bounces summed if asked, and its thinnest path."""
        return {"parallel_faces": True, "multiple_reflections": self.multiple_reflections,
                "thinnest_m": self._path.low}
