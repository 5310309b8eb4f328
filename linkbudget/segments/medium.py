"""Bulk absorbing media and fibres: loss through the lossy-medium flux law.

A medium's loss may be written four ways; :func:`absorption_coefficient_per_m` turns every one of them
into the intensity attenuation coefficient α, and :func:`linkbudget.physics.flux.loss_db`
turns α and the length into dB. No other code converts a medium's loss.
"""

from typing import Literal

import numpy as np
from pydantic import model_validator

from linkbudget.config.fields import ComplexIndex, spread
from linkbudget.physics import flux
from linkbudget.segments.base import SegmentSpec

LengthSpread = spread("length", minimum=0.0)
AttenuationSpread = spread("attenuation", minimum=0.0)
AbsorptionSpread = spread("absorption", minimum=0.0)
KappaSpread = spread("number", minimum=0.0)


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
    shape = np.shape(wavelength_m)
    if kappa is not None:
        return flux.absorption_coefficient_from_kappa(kappa, wavelength_m)
    if absorption_per_m is not None:
        return np.broadcast_to(np.asarray(absorption_per_m, dtype=float), shape)
    return np.broadcast_to(flux.absorption_from_attenuation_db_per_m(attenuation_db_per_m), shape)


class Fiber(SegmentSpec):
    """A length of optical fibre with a datasheet ``attenuation`` in dB per length."""

    kind: Literal["fiber"]
    length: LengthSpread
    attenuation: AttenuationSpread

    def loss_db(self, wavelength_m, case):
        alpha = absorption_coefficient_per_m(wavelength_m, attenuation_db_per_m=self.attenuation.at(case))
        return flux.loss_db(alpha, self.length.at(case))


_LOSS_FORMS = ("index", "kappa", "absorption", "attenuation")


class Medium(SegmentSpec):
    """A bulk absorbing medium (window, blank, liquid cell) of a given ``thickness`` or ``length``.

    Its loss is given by exactly one of ``index`` (complex n + iκ), ``kappa``, ``absorption``
    (α with a unit such as ``/cm``) or ``attenuation`` (dB per length).
    """

    kind: Literal["medium"]
    thickness: LengthSpread | None = None
    length: LengthSpread | None = None
    index: ComplexIndex | None = None
    kappa: KappaSpread | None = None
    absorption: AbsorptionSpread | None = None
    attenuation: AttenuationSpread | None = None

    @model_validator(mode="after")
    def _one_of_each(self):
        if (self.thickness is None) == (self.length is None):
            raise ValueError("give exactly one of thickness or length")
        forms = [key for key in _LOSS_FORMS if getattr(self, key) is not None]
        if len(forms) != 1:
            raise ValueError(f"give exactly one of {', '.join(_LOSS_FORMS)}"
                             + (f" (got {', '.join(forms)})" if forms else ""))
        return self

    @property
    def path_length(self):
        return self.thickness if self.thickness is not None else self.length

    def absorption_per_m(self, wavelength_m, case):
        """α [1/m] over the wavelength axis for a budget case."""
        if self.index is not None:
            return absorption_coefficient_per_m(wavelength_m, kappa=self.index.imag)
        if self.kappa is not None:
            return absorption_coefficient_per_m(wavelength_m, kappa=self.kappa.at(case))
        if self.absorption is not None:
            return absorption_coefficient_per_m(wavelength_m, absorption_per_m=self.absorption.at(case))
        return absorption_coefficient_per_m(wavelength_m, attenuation_db_per_m=self.attenuation.at(case))

    def loss_db(self, wavelength_m, case):
        return flux.loss_db(self.absorption_per_m(wavelength_m, case), self.path_length.at(case))
