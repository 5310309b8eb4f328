"""Tests of linkbudget.physics.silica_attenuation against the published figures of standard fibre.

ITU-T G.652 (11/2016), category G.652.D, table of its attributes (from memory): cabled
attenuation at most 0.40 dB/km from 1310 to 1625 nm and at 1383 ± 3 nm (no more than the 1310 nm
maximum, after hydrogen ageing), at most 0.30 dB/km at 1550 nm. Typical values of G.652.D fibre
(from memory, datasheets of common practice): 0.32–0.35 dB/km at 1310 nm, 0.18–0.20 dB/km at
1550 nm, about 0.30 dB/km at 1383 nm for low-water-peak fibre.
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose

from linkbudget.physics import silica_attenuation as silica

LOW = silica.HYDROXYL_PEAK_HEIGHT_DB_PER_KM["low"]
LEGACY = silica.HYDROXYL_PEAK_HEIGHT_DB_PER_KM["legacy"]


def _default(wavelength_nm, peak_db_per_km=LOW):
    return silica.silica_fibre_attenuation_db_per_km(np.asarray(wavelength_nm) * 1e-9,
                                                     water_peak_db_per_km=peak_db_per_km)


@pytest.mark.parametrize(("wavelength_nm", "limit_db_per_km"), [
    (1310, 0.40),  # ITU-T G.652.D: 1310-1625 nm <= 0.40 dB/km (from memory)
    (1383, 0.40),  # ITU-T G.652.D: 1383 nm after hydrogen ageing <= the 1310 nm maximum (from memory)
    (1550, 0.30),  # ITU-T G.652.D: 1550 nm <= 0.30 dB/km (from memory)
    (1625, 0.40),  # ITU-T G.652.D: 1310-1625 nm <= 0.40 dB/km (from memory)
])
def test_silica_fibre_attenuation_within_g652d_limits(wavelength_nm, limit_db_per_km):
    assert _default(wavelength_nm) <= limit_db_per_km


@pytest.mark.parametrize(("wavelength_nm", "low_db_per_km", "high_db_per_km"), [
    (1310, 0.30, 0.35),  # typical G.652.D at 1310 nm, 0.32-0.35 (from memory), widened by 0.02 below
    (1550, 0.17, 0.21),  # typical at 1550 nm, 0.18-0.20 (from memory), widened by 0.01
    (1383, 0.27, 0.34),  # typical low-water-peak fibre at 1383 nm, about 0.28-0.32 (from memory)
])
def test_silica_fibre_attenuation_typical_values(wavelength_nm, low_db_per_km, high_db_per_km):
    assert low_db_per_km <= _default(wavelength_nm) <= high_db_per_km


def test_silica_fibre_attenuation_legacy_fibre_exceeds_the_g652d_water_peak_limit():
    # G.652.A/B fibre (legacy) has no 1383 nm limit; its water peak is well above 0.4 dB/km (from memory)
    assert _default(1383, LEGACY) > 0.40
    assert_allclose(_default(1383, LEGACY) - _default(1383), LEGACY - LOW, rtol=1e-12)


def test_silica_fibre_attenuation_minimum_lies_in_the_c_band():
    # standard fibre loses least near 1550-1580 nm (common practice: the reason the C band is used)
    wavelength_nm = np.arange(1260, 1626, 1.0)
    assert 1530 <= wavelength_nm[np.argmin(_default(wavelength_nm))] <= 1600


def test_silica_fibre_attenuation_cwdm_plan_spreads_across_channels():
    # ITU-T G.694.2 CWDM grid (from memory): 1271 to 1611 nm in 20 nm steps. On low-water-peak fibre
    # the O-band end loses most (about 0.35-0.4 dB/km) and the L-band end about 0.2 dB/km.
    channels = np.arange(1271, 1612, 20)
    loss = _default(channels)
    assert 0.12 <= loss.max() - loss.min() <= 0.2
    assert np.argmax(loss) == 0


def test_rayleigh_scattering_db_per_km_scales_as_inverse_fourth_power():
    # closed form: A/λ⁴ with λ in µm; at 1 µm it is A itself
    assert_allclose(silica.rayleigh_scattering_db_per_km(1e-6, coefficient_db_per_km_um4=0.9), 0.9)
    ratio = silica.rayleigh_scattering_db_per_km(1310e-9) / silica.rayleigh_scattering_db_per_km(1550e-9)
    assert_allclose(ratio, (1550 / 1310) ** 4, rtol=1e-12)


def test_infrared_absorption_db_per_km_closed_form():
    # Keiser's α_IR = 7.81e11·exp(−48.48/λ) dB/km, λ in µm (from memory), evaluated here by hand
    assert_allclose(silica.infrared_absorption_db_per_km(1.55e-6), 7.81e11 * np.exp(-48.48 / 1.55), rtol=1e-12)
    assert 0.015 < silica.infrared_absorption_db_per_km(1.55e-6) < 0.03  # about 0.02 dB/km at 1550 nm


def test_hydroxyl_peak_db_per_km_half_height_at_half_width():
    height = 0.5
    center, width = silica.HYDROXYL_PEAK_M, silica.HYDROXYL_PEAK_WIDTH_M
    assert_allclose(silica.hydroxyl_peak_db_per_km(center, height_db_per_km=height), height)
    assert_allclose(silica.hydroxyl_peak_db_per_km(center + width / 2, height_db_per_km=height), height / 2)


def test_wavelength_independent_db_per_km_is_flat():
    assert_allclose(silica.wavelength_independent_db_per_km(np.array([1.3e-6, 1.6e-6]), loss_db_per_km=0.03),
                    [0.03, 0.03])
