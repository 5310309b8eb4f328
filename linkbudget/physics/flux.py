"""The lossy-medium flux law: power carried by a plane wave in an absorbing medium.

Every way of stating a medium's loss (complex index, extinction coefficient κ, intensity
attenuation coefficient α, dB per length) is converted here and only here.

For a plane wave in a medium of complex index N = n + iκ at vacuum wavelength λ, the field
decays as exp(−k_I z) with k_I = 2πκ/λ, and the time-averaged Poynting flux is

    S(z) = ½ ε0 c n |E0|² · exp(−2 k_I z),

so the intensity attenuation coefficient is α = 4πκ/λ and a length L loses
10·log10(e)·α·L ≈ 4.3429·α·L dB.

References
----------
.. [1] M. Born and E. Wolf, "Principles of Optics", 7th ed., Cambridge University Press, 1999,
   section on wave propagation in absorbing media (section number from memory: §14.1).
.. [2] E. Hecht, "Optics", 5th ed., Pearson, 2017, the complex refractive index and absorption
   (section number from memory: §4.8).
"""

import numpy as np

from linkbudget.physics.checks import non_negative
from linkbudget.physics.decibel import DB_PER_NEPER


def _passive(values, name):
    return non_negative(values, f"{name} of a passive medium")


def absorption_coefficient_from_kappa(kappa, wavelength_m):
    """Intensity attenuation coefficient α = 4πκ/λ.

    Parameters
    ----------
    kappa : array_like
        Extinction coefficient κ, the imaginary part of N = n + iκ (≥ 0 in a passive medium).
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    Returns
    -------
    numpy.ndarray
        α [1/m], broadcast over the inputs.

    Notes
    -----
    From S(z) ∝ exp(−2 k_I z), k_I = 2πκ/λ [1]_, [2]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    kappa = _passive(kappa, "extinction coefficient kappa")
    return 4.0 * np.pi * kappa / np.asarray(wavelength_m, dtype=float)


def absorption_along_normal_per_m(index, tangential_index, wavelength_m):
    """Decay coefficient of the power flux along a medium's normal, for light crossing it at an angle.

    Parameters
    ----------
    index : array_like of complex
        Index N = n + iκ of the medium (κ ≥ 0).
    tangential_index : array_like of float
        β = n0·sin θ0, the tangential index of the light (real: it comes from a lossless medium;
        Snell's law keeps it across parallel faces); 0 at normal incidence.
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    Returns
    -------
    numpy.ndarray
        α_z [1/m]: a slab of thickness d passes exp(−α_z·d) of the power entering it.

    Notes
    -----
    The refracted wave in an absorbing medium varies along the normal as exp(i·2π·q·z/λ) with
    q = N cos θ = √(N² − β²) [1]_, so its flux decays as exp(−4π·Im(q)·z/λ):

        α_z = 4π · Im √(N² − β²) / λ,

    the single-pass factor of an incoherent slab [2]_. At normal incidence α_z = 4πκ/λ = α; for
    κ ≪ n it tends to α / cos θ_r with θ_r the real refraction angle. For κ ≥ 0 and real β the
    principal square root is the forward (decaying) wave.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 7th ed., 1999, §14.2 (waves in absorbing media).
    .. [2] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016 (incoherent method).
    """
    index = np.asarray(index, dtype=complex)
    _passive(index.imag, "extinction coefficient kappa")
    normal_index = np.sqrt(index * index - np.asarray(tangential_index, dtype=float) ** 2)
    return 4.0 * np.pi * np.maximum(normal_index.imag, 0.0) / np.asarray(wavelength_m, dtype=float)


def kappa_from_absorption_coefficient(absorption_per_m, wavelength_m):
    """Extinction coefficient κ = αλ/(4π), the inverse of :func:`absorption_coefficient_from_kappa`.

    Parameters
    ----------
    absorption_per_m : array_like
        Intensity attenuation coefficient α [1/m] (≥ 0 in a passive medium).
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    """
    alpha = _passive(absorption_per_m, "absorption coefficient")
    return alpha * np.asarray(wavelength_m, dtype=float) / (4.0 * np.pi)


def attenuation_db_per_m_from_absorption(absorption_per_m):
    """Attenuation in dB/m of an intensity attenuation coefficient: 10·log10(e)·α.

    References
    ----------
    .. [1] Hecht, "Optics", 2017 (Beer–Lambert law in decibels).
    """
    return DB_PER_NEPER * _passive(absorption_per_m, "absorption coefficient")


def absorption_from_attenuation_db_per_m(attenuation_db_per_m):
    """Intensity attenuation coefficient α [1/m] of an attenuation in dB/m: α = A/(10·log10 e)."""
    return _passive(attenuation_db_per_m, "attenuation") / DB_PER_NEPER


def transmittance(absorption_per_m, length_m):
    """Fraction of power flux left after a length: S(L)/S(0) = exp(−αL).

    Parameters
    ----------
    absorption_per_m : array_like
        α [1/m].
    length_m : array_like
        Path length L [m] (≥ 0).

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    """
    length_m = _passive(length_m, "length")
    return np.exp(-_passive(absorption_per_m, "absorption coefficient") * length_m)


def loss_db(absorption_per_m, length_m):
    """Loss in dB of a length of absorbing medium: 10·log10(e)·α·L ≈ 4.3429·α·L.

    Parameters
    ----------
    absorption_per_m : array_like
        Intensity attenuation coefficient α [1/m].
    length_m : array_like
        Path length L [m] (≥ 0).

    Returns
    -------
    numpy.ndarray
        Loss [dB], positive when power is lost.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    return attenuation_db_per_m_from_absorption(absorption_per_m) * _passive(length_m, "length")
