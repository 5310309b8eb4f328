"""Attenuation of a horizontal free-space path by haze and fog, from the meteorological visibility.

Both models here scale the visible-light extinction fixed by the visibility with a power law in
wavelength. The visibility V is the distance at which a dark object's contrast against the sky
falls to 2 %, so the extinction coefficient at 550 nm is σ = ln(50)/V ≈ 3.91/V; at another
wavelength

    σ(λ) = (3.91/V)·(λ/550 nm)^(−q)   [1/km, V in km],

and the attenuation is 10·log10(e)·σ ≈ 4.343·σ dB/km. The two models differ only in the
exponent q for visibility below 6 km. Reading σ as a natural-log coefficient in 1/km and
converting it to dB/km reproduces the worked values: V = 10 km gives 0.442 dB/km at 1550 nm,
V = 0.5 km gives 33.96 dB/km at any wavelength.

References
----------
.. [1] I. I. Kim, B. McArthur and E. Korevaar, "Comparison of laser beam propagation at 785 nm
   and 1550 nm in fog and haze for optical wireless communications", Proc. SPIE 4214, 26–37
   (2001), doi:10.1117/12.417512 (title and DOI from memory).
.. [2] P. W. Kruse, L. D. McGlauchlin and R. B. McQuistan, "Elements of Infrared Technology:
   Generation, Transmission, and Detection", Wiley, 1962 (from memory).
.. [3] R. M. Pierce, J. Ramaprasad and E. C. Eisenberg, "Optical attenuation in fog and clouds",
   Proc. SPIE 4530 (2001), doi:10.1117/12.449815: the Kruse formula "was originally devised to
   relate visibility to optical attenuation, from the visible to the near infrared".
"""

import warnings

import numpy as np

from linkbudget.physics.checks import positive
from linkbudget.physics.decibel import DB_PER_NEPER
from linkbudget.physics.validity import ValidityWarning, span_text

#: ln(1/0.02) rounded as published in [1]: the 2 % contrast threshold defining visibility.
_VISIBILITY_CONSTANT = 3.91
_REFERENCE_WAVELENGTH_M = 550e-9
#: The visible and near infrared, where Kruse's formula was devised [3] and Kim et al. measured
#: (785 and 1550 nm) [1]; 2 µm is where aerosol scattering is still computed in the same way (a
#: bound of common practice, not a stated limit).
VISIBILITY_MODEL_RANGE_M = (400e-9, 2000e-9)


def _visibility_km(visibility_m):
    return positive(visibility_m, "visibility") / 1e3


def _warn_outside_wavelengths(wavelength_m, model):
    """Warn (ValidityWarning) at wavelengths outside :data:`VISIBILITY_MODEL_RANGE_M`."""
    low, high = VISIBILITY_MODEL_RANGE_M
    wavelength_m = np.atleast_1d(wavelength_m)
    outside = wavelength_m[(wavelength_m < low) | (wavelength_m > high)]
    if outside.size:
        warnings.warn(f"{model}'s visibility model is stated for the visible and near infrared "
                      f"({low * 1e9:g}-{high * 1e9:g} nm); used here at {span_text(outside * 1e9, 6, ' nm')}",
                      ValidityWarning, stacklevel=3)


def _attenuation_db_per_km(visibility_km, wavelength_m, exponent):
    # σ = (3.91/V)(λ/550 nm)^−q in 1/km [1], converted to dB/km
    extinction_per_km = _VISIBILITY_CONSTANT / visibility_km * (wavelength_m / _REFERENCE_WAVELENGTH_M) ** -exponent
    return DB_PER_NEPER * extinction_per_km


def kim_attenuation_db_per_km(visibility_m, wavelength_m):
    """Haze and fog attenuation from visibility, model of Kim, McArthur & Korevaar.

    Parameters
    ----------
    visibility_m : array_like
        Meteorological visibility V [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    Returns
    -------
    numpy.ndarray
        Specific attenuation [dB/km], broadcast over the inputs.

    Warns
    -----
    ValidityWarning
        At wavelengths outside :data:`VISIBILITY_MODEL_RANGE_M` (visible and near infrared).

    Notes
    -----
    σ = (3.91/V)·(λ/550 nm)^(−q) [1/km], attenuation 10·log10(e)·σ, with V in km and [1]_

    ======================  ===============
    visibility              q
    ======================  ===============
    V > 50 km               1.6
    6 km < V ≤ 50 km        1.3
    1 km < V ≤ 6 km         0.16·V + 0.34
    0.5 km < V ≤ 1 km       V − 0.5
    V ≤ 0.5 km              0
    ======================  ===============

    In dense fog (V ≤ 0.5 km) the attenuation does not depend on wavelength.

    References
    ----------
    .. [1] I. I. Kim, B. McArthur and E. Korevaar, Proc. SPIE 4214, 26 (2001).
    """
    v_km = _visibility_km(visibility_m)
    wavelength_m = positive(wavelength_m, "wavelength")
    _warn_outside_wavelengths(wavelength_m, "Kim")
    exponent = np.select(
        [v_km > 50.0, v_km > 6.0, v_km > 1.0, v_km > 0.5],
        [1.6, 1.3, 0.16 * v_km + 0.34, v_km - 0.5],
        default=0.0,
    )
    return _attenuation_db_per_km(v_km, wavelength_m, exponent)


def kruse_attenuation_db_per_km(visibility_m, wavelength_m):
    """Haze attenuation from visibility, model of Kruse, McGlauchlin & McQuistan.

    Parameters
    ----------
    visibility_m : array_like
        Meteorological visibility V [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    Returns
    -------
    numpy.ndarray
        Specific attenuation [dB/km], broadcast over the inputs.

    Warns
    -----
    ValidityWarning
        At wavelengths outside :data:`VISIBILITY_MODEL_RANGE_M` (visible and near infrared).

    Notes
    -----
    σ = (3.91/V)·(λ/550 nm)^(−q) [1/km], attenuation 10·log10(e)·σ, with V in km and
    q = 1.6 for V > 50 km, 1.3 for 6 km < V ≤ 50 km, 0.585·V^(1/3) for V ≤ 6 km [1]_ (from
    memory). Kim et al. [2]_ revised the low-visibility exponent, since this one keeps a strong
    wavelength dependence in fog that measurements do not show.

    References
    ----------
    .. [1] P. W. Kruse, L. D. McGlauchlin and R. B. McQuistan, "Elements of Infrared
       Technology", 1962 (from memory).
    .. [2] I. I. Kim, B. McArthur and E. Korevaar, Proc. SPIE 4214, 26 (2001).
    """
    v_km = _visibility_km(visibility_m)
    wavelength_m = positive(wavelength_m, "wavelength")
    _warn_outside_wavelengths(wavelength_m, "Kruse")
    exponent = np.select([v_km > 50.0, v_km > 6.0], [1.6, 1.3], default=0.585 * np.cbrt(v_km))
    return _attenuation_db_per_km(v_km, wavelength_m, exponent)
