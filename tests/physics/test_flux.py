"""The lossy-medium flux law against textbook relations and published optical constants."""

import numpy as np
import pytest
import tmm
from numpy.testing import assert_allclose

from linkbudget.physics import flux
from linkbudget.physics.decibel import DB_PER_NEPER, loss_db_from_transmittance


def test_absorption_coefficient_from_kappa_textbook_relation():
    # alpha = 4*pi*kappa/lambda (Born & Wolf, Principles of Optics, 1999; Hecht, Optics, 2017):
    # kappa = 1/(4*pi) at lambda = 1 um gives alpha = 1e6 /m exactly.
    assert_allclose(flux.absorption_coefficient_from_kappa(1 / (4 * np.pi), 1e-6), 1e6, rtol=1e-15)


def test_loss_db_one_neper_is_4_3429_db():
    # 10*log10(e) = 4.342944819 dB per neper of power (IEC 60027-3 definitions of dB and Np).
    assert_allclose(DB_PER_NEPER, 4.342944819032518, rtol=1e-15)
    assert_allclose(flux.loss_db(1.0, 1.0), 4.342944819032518, rtol=1e-15)


def test_loss_db_matches_transmittance():
    alpha, length = 37.0, 0.021
    assert_allclose(flux.loss_db(alpha, length), loss_db_from_transmittance(flux.transmittance(alpha, length)),
                    rtol=1e-13)


def test_kappa_alpha_round_trip():
    wavelength_m = np.array([0.5e-6, 1.31e-6, 1.55e-6])
    kappa = np.array([1e-8, 3e-5, 2.0])
    alpha = flux.absorption_coefficient_from_kappa(kappa, wavelength_m)
    assert_allclose(flux.kappa_from_absorption_coefficient(alpha, wavelength_m), kappa, rtol=1e-15)


@pytest.mark.parametrize(
    ("wavelength_um", "kappa", "alpha_per_cm"),
    [
        # Segelstein 1981 table (tests/data/nk/H2O-Segelstein.yml rows), alpha derived (REFERENCES.md, D):
        (1.4487719, 3.6373923e-4, 31.55),
        (1.5488166, 1.3483112e-4, 10.940),
        # Hale & Querry, Appl. Opt. 12, 555 (1973) table rows, alpha derived (REFERENCES.md, D):
        (0.975, 3.48e-6, 0.4485),
        (1.4, 1.38e-4, 12.387),
    ],
)
def test_absorption_coefficient_from_kappa_liquid_water(wavelength_um, kappa, alpha_per_cm):
    alpha = flux.absorption_coefficient_from_kappa(kappa, wavelength_um * 1e-6) / 100
    # the check values are quoted to 4-5 significant figures
    assert_allclose(alpha, alpha_per_cm, rtol=2e-4)


def test_loss_db_water_one_centimetre_at_1549_nm():
    # Segelstein 1981 kappa at 1.5488166 um -> 47.51 dB through 1 cm of water (REFERENCES.md, D).
    alpha = flux.absorption_coefficient_from_kappa(1.3483112e-4, 1.5488166e-6)
    assert_allclose(flux.loss_db(alpha, 0.01), 47.51, rtol=2e-4)


@pytest.mark.parametrize(("wavelength_um", "kappa", "decay_nm"), [(0.6595, 3.697, 14.20), (1.610, 11.21, 11.43)])
def test_absorption_coefficient_from_kappa_gold_decay_length(wavelength_um, kappa, decay_nm):
    # Johnson & Christy, Phys. Rev. B 6, 4370 (1972): intensity decay length lambda/(4 pi k) (REFERENCES.md, D).
    alpha = flux.absorption_coefficient_from_kappa(kappa, wavelength_um * 1e-6)
    assert_allclose(1e9 / alpha, decay_nm, rtol=5e-4)


def test_loss_db_zero_length_is_zero():
    assert flux.loss_db(123.0, 0.0) == 0.0


@pytest.mark.parametrize("function", [flux.absorption_coefficient_from_kappa, flux.kappa_from_absorption_coefficient])
def test_negative_absorption_raises(function):
    with pytest.raises(ValueError, match="passive"):
        function(-1e-6, 1.55e-6)


def test_loss_db_negative_length_raises():
    with pytest.raises(ValueError, match="length"):
        flux.loss_db(1.0, -1.0)


def test_attenuation_db_per_m_round_trip():
    assert_allclose(flux.absorption_from_attenuation_db_per_m(flux.attenuation_db_per_m_from_absorption(2.5)), 2.5)


# ---- decay along the normal at oblique incidence ----


def test_absorption_along_normal_at_normal_incidence_is_the_flux_law():
    # β = 0: α_z = 4π·Im(N)/λ = 4πκ/λ (Born & Wolf).
    index = np.array([1.45 + 1e-6j, 3.5 + 0.02j, 1.35 + 0.45j])
    assert_allclose(flux.absorption_along_normal_per_m(index, 0.0, 1550e-9), 4 * np.pi * index.imag / 1550e-9,
                    rtol=1e-12)


@pytest.mark.parametrize("index", [1.35 + 0.45j, 2.6 + 0.12j, 0.2 + 7.0j])
@pytest.mark.parametrize("angle_deg", [30.0, 60.0, 72.0, 85.0])
def test_absorption_along_normal_matches_tmm_complex_refraction_angle(index, angle_deg):
    # tmm.snell gives the complex angle θ with N·sin θ = sin θ0 (from vacuum); the wave decays along
    # the normal by Im(N cos θ) (Born & Wolf §14.2; the single-pass factor of tmm.inc_tmm).
    angle_rad = np.deg2rad(angle_deg)
    expected = 4 * np.pi * np.imag(index * np.cos(tmm.snell(1.0, index, angle_rad))) / 1550e-9
    assert_allclose(flux.absorption_along_normal_per_m(index, np.sin(angle_rad), 1550e-9), expected, rtol=1e-12)
