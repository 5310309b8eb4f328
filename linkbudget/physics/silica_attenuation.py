"""Spectral attenuation of silica single-mode fibre: the terms of the usual loss model.

The attenuation of a silica fibre in the near infrared is written as a sum of terms [1]_ [2]_

    α(λ) = A/λ⁴ + B + C·exp(−D/λ) + α_OH(λ)   [dB/km, λ in µm],

- A/λ⁴: Rayleigh scattering by frozen-in density and composition fluctuations of the glass;
- B: the wavelength-independent losses (waveguide imperfections, microbending, cabling);
- C·exp(−D/λ): the tail of the infrared absorption of the Si–O bond vibrations [1]_ [3]_;
- α_OH: the absorption of the hydroxyl (water) overtone near 1383 nm, low in fibre made with
  a low water content (ITU-T G.652.D), high in older ("legacy") fibre.

The ultraviolet absorption tail is below 0.01 dB/km beyond 1200 nm [3]_ (from memory) and is not
modelled; nor are the weaker OH overtones near 1240 and 950 nm. The model is stated here for
1200–1700 nm (:data:`MODEL_RANGE_M`), the single-mode telecom windows.

The coefficients below are published figures quoted **from memory** (not confirmed against a
stored copy); the tests check their sum against the attenuation limits of ITU-T G.652 and typical
values of standard single-mode fibre.

References
----------
.. [1] S. S. Walker, "Rapid modeling and estimation of total spectral loss in optical fibers",
   J. Lightwave Technol. 4(8), 1125–1131 (1986), doi:10.1109/JLT.1986.1074837: the model
   α = A/λ⁴ + B + C(λ) with an infrared edge K_IR·exp(−C_IR/λ) (the form confirmed in a stored
   secondary page; volume, pages and DOI from memory).
.. [2] G. Keiser, "Optical Fiber Communications", 3rd ed., McGraw-Hill, 2000, section 3.1: the
   Rayleigh term and the infrared tail α_IR = 7.81·10¹¹·exp(−48.48/λ) dB/km (λ in µm) of
   GeO₂-doped silica (from memory).
.. [3] T. Miya, Y. Terunuma, T. Hosaka and T. Miyashita, "Ultimate low-loss single-mode fibre at
   1.55 µm", Electron. Lett. 15(4), 106–108 (1979): 0.2 dB/km at 1.55 µm, close to the
   Rayleigh and infrared floor (from memory).
.. [4] ITU-T Recommendation G.652, "Characteristics of a single-mode optical fibre and cable"
   (11/2016), table of the G.652.D attributes: cabled attenuation ≤ 0.40 dB/km from 1310 to
   1625 nm, ≤ 0.30 dB/km at 1550 nm; at 1383 ± 3 nm, after hydrogen ageing, no more than the
   maximum at 1310 nm (from memory).
"""

import numpy as np

#: Rayleigh coefficient A of germanium-doped standard single-mode fibre [dB/km·µm⁴]: about
#: 0.8–1.0 for a germanium-doped core, 0.7–0.8 for a pure-silica core [1]_ [2]_ (from memory).
RAYLEIGH_COEFFICIENT_DB_PER_KM_UM4 = 0.90
#: Wavelength-independent term B of a cabled standard fibre [dB/km] (from memory, typical).
WAVELENGTH_INDEPENDENT_DB_PER_KM = 0.02
#: Infrared absorption tail C·exp(−D/λ) of GeO₂-doped silica [2]_: C [dB/km], D [µm] (from memory).
INFRARED_AMPLITUDE_DB_PER_KM = 7.81e11
INFRARED_DECAY_UM = 48.48
#: Centre of the first OH overtone absorption in silica [m] (1383 nm, the wavelength ITU-T
#: G.652.D specifies it at [4]_).
HYDROXYL_PEAK_M = 1383e-9
#: Full width at half maximum of the OH absorption peak [m], about 30 nm (from memory).
HYDROXYL_PEAK_WIDTH_M = 30e-9
#: Height of the OH peak above the rest of the spectrum [dB/km], by fibre type (from memory,
#: typical): low-water-peak fibre (G.652.D) a few hundredths; legacy fibre (G.652.A/B, made
#: before about 2000) about half a dB per km.
HYDROXYL_PEAK_HEIGHT_DB_PER_KM = {"low": 0.04, "legacy": 0.5, "none": 0.0}
#: Wavelengths the model is stated for [m]: the single-mode windows from O to U band.
MODEL_RANGE_M = (1200e-9, 1700e-9)


def _um(wavelength_m):
    return np.asarray(wavelength_m, dtype=float) * 1e6


def rayleigh_scattering_db_per_km(wavelength_m, *, coefficient_db_per_km_um4=RAYLEIGH_COEFFICIENT_DB_PER_KM_UM4):
    """Rayleigh scattering loss of silica fibre, A/λ⁴.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength [m].
    coefficient_db_per_km_um4 : float
        The Rayleigh coefficient A [dB/km·µm⁴]: the scattering loss at 1 µm.

    Returns
    -------
    numpy.ndarray
        Scattering loss [dB/km].

    Notes
    -----
    α_R = A/λ⁴ with λ in µm (the first term of the model of [1]_ and [2]_ in the module docstring).
    """
    return coefficient_db_per_km_um4 / _um(wavelength_m) ** 4


def wavelength_independent_db_per_km(wavelength_m, *, loss_db_per_km=WAVELENGTH_INDEPENDENT_DB_PER_KM):
    """The wavelength-independent term B of the model [1]_ (imperfections, microbending, cabling),
    over the wavelength axis [dB/km]."""
    return np.asarray(loss_db_per_km, dtype=float) * np.ones(np.shape(wavelength_m))


def infrared_absorption_db_per_km(wavelength_m, *, amplitude_db_per_km=INFRARED_AMPLITUDE_DB_PER_KM,
                                  decay_um=INFRARED_DECAY_UM):
    """The tail of the infrared (Si–O vibration) absorption of silica, C·exp(−D/λ).

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength [m].
    amplitude_db_per_km, decay_um : float
        C [dB/km] and D [µm]; the defaults are Keiser's figures for GeO₂-doped silica [2]_.

    Returns
    -------
    numpy.ndarray
        Loss [dB/km]: 0.020 at 1550 nm, 0.087 at 1625 nm with the defaults.

    Notes
    -----
    α_IR = C·exp(−D/λ), λ in µm (Eq. 2.20b of Walker's model as quoted from [1]_).
    """
    return amplitude_db_per_km * np.exp(-decay_um / _um(wavelength_m))


def hydroxyl_peak_db_per_km(wavelength_m, *, height_db_per_km, center_m=HYDROXYL_PEAK_M,
                            width_m=HYDROXYL_PEAK_WIDTH_M):
    """The OH overtone absorption near 1383 nm, as a Gaussian in wavelength.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength [m].
    height_db_per_km : float
        Peak height above the rest of the spectrum [dB/km]
        (:data:`HYDROXYL_PEAK_HEIGHT_DB_PER_KM` gives typical ones).
    center_m, width_m : float
        Centre and full width at half maximum of the peak [m].

    Returns
    -------
    numpy.ndarray
        Absorption loss [dB/km] of the peak.

    Notes
    -----
    α_OH = H·exp(−4·ln 2·(λ − λ0)²/w²), so α_OH = H/2 at λ0 ± w/2. A Gaussian line shape is the
    usual approximation of the peak in spectral loss models [1]_ (Walker's α_POH); its width is
    from memory.
    """
    detuning = (np.asarray(wavelength_m, dtype=float) - center_m) / width_m
    return height_db_per_km * np.exp(-4 * np.log(2) * detuning**2)


def silica_fibre_attenuation_db_per_km(wavelength_m, *, water_peak_db_per_km,
                                       rayleigh_db_per_km_um4=RAYLEIGH_COEFFICIENT_DB_PER_KM_UM4,
                                       floor_db_per_km=WAVELENGTH_INDEPENDENT_DB_PER_KM):
    """The total spectral attenuation α(λ) = A/λ⁴ + B + C·exp(−D/λ) + α_OH(λ) [dB/km] of the
    module docstring: the sum of :func:`rayleigh_scattering_db_per_km`,
    :func:`wavelength_independent_db_per_km`, :func:`infrared_absorption_db_per_km` and
        :func:`hydroxyl_peak_db_per_km` (of height ``water_peak_db_per_km``), with B = ``floor_db_per_km``."""
    return (rayleigh_scattering_db_per_km(wavelength_m, coefficient_db_per_km_um4=rayleigh_db_per_km_um4)
            + wavelength_independent_db_per_km(wavelength_m, loss_db_per_km=floor_db_per_km)
            + infrared_absorption_db_per_km(wavelength_m)
            + hydroxyl_peak_db_per_km(wavelength_m, height_db_per_km=water_peak_db_per_km))
