"""Tests of linkbudget.physics.atmosphere.

Worked values from /work/shared/REFERENCES.md "Free-space optics": the Kim, McArthur & Korevaar
(2001) model (C) evaluated in dB/km (D), and the Kruse (1962) model (from memory).
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from linkbudget.physics.atmosphere import kim_attenuation_db_per_km, kruse_attenuation_db_per_km
from linkbudget.physics.decibel import DB_PER_NEPER

# REFERENCES.md quotes the worked values to 3–4 significant digits (±1 in the last digit).
RTOL = 2e-3


def _published_form_db_per_km(visibility_km, wavelength_nm, q):
    # Kim et al. 2001 (C): σ = (3.91/V)(λ/550 nm)^−q in 1/km, in dB/km through 10·log10(e)
    return DB_PER_NEPER * 3.91 / visibility_km * (wavelength_nm / 550.0) ** -q


@pytest.mark.parametrize(
    ("visibility_m", "wavelength_m", "expected_db_per_km"),
    [
        (10e3, 1550e-9, 0.442),  # REFERENCES.md, haze (D)
        (10e3, 850e-9, 0.964),  # REFERENCES.md (D)
        (1e3, 1550e-9, 10.115),  # REFERENCES.md (D)
        (0.5e3, 1550e-9, 33.96),  # REFERENCES.md: fog, any wavelength (D)
        (0.5e3, 850e-9, 33.96),
    ],
)
def test_kim_attenuation_db_per_km_worked_values(visibility_m, wavelength_m, expected_db_per_km):
    assert_allclose(kim_attenuation_db_per_km(visibility_m, wavelength_m), expected_db_per_km, rtol=RTOL)


def test_kim_attenuation_db_per_km_dense_fog_is_wavelength_independent():
    # Kim et al. 2001: q = 0 for V ≤ 0.5 km
    wavelengths_m = np.array([785e-9, 850e-9, 1310e-9, 1550e-9])
    attenuation = kim_attenuation_db_per_km(200.0, wavelengths_m)
    assert attenuation.shape == (4,)
    assert_allclose(attenuation, _published_form_db_per_km(0.2, 550.0, 0.0), rtol=1e-14)


def test_kim_attenuation_db_per_km_both_sides_of_50_km():
    # Kim et al. 2001: q = 1.3 up to and including 50 km, 1.6 above
    attenuation = kim_attenuation_db_per_km(np.array([50e3, 50.5e3]), 1550e-9)
    expected = [_published_form_db_per_km(50.0, 1550.0, 1.3), _published_form_db_per_km(50.5, 1550.0, 1.6)]
    assert_allclose(attenuation, expected, rtol=1e-14)


def test_kim_attenuation_db_per_km_both_sides_of_6_km():
    # Kim et al. 2001: q = 0.16 V + 0.34 up to 6 km (1.3 at 6 km), then 1.3 — continuous there
    attenuation = kim_attenuation_db_per_km(np.array([5.5e3, 6e3, 6.5e3]), 1550e-9)
    expected = [
        _published_form_db_per_km(5.5, 1550.0, 0.16 * 5.5 + 0.34),
        _published_form_db_per_km(6.0, 1550.0, 1.3),
        _published_form_db_per_km(6.5, 1550.0, 1.3),
    ]
    assert_allclose(attenuation, expected, rtol=1e-14)


def test_kim_attenuation_db_per_km_between_half_and_one_km():
    # Kim et al. 2001: q = V − 0.5 for 0.5 < V ≤ 1 km
    assert_allclose(
        kim_attenuation_db_per_km(0.8e3, 1550e-9), _published_form_db_per_km(0.8, 1550.0, 0.3), rtol=1e-14
    )


def test_kruse_attenuation_db_per_km_five_km_at_1550():
    # REFERENCES.md: Kruse model, V = 5 km at 1550 nm -> 1.205 dB/km (D from an M formula)
    assert_allclose(kruse_attenuation_db_per_km(5e3, 1550e-9), 1.205, rtol=RTOL)


def test_kruse_attenuation_db_per_km_both_sides_of_6_km():
    # Kruse 1962 (from memory): q = 0.585 V^(1/3) up to 6 km, 1.3 above — not continuous at 6 km
    attenuation = kruse_attenuation_db_per_km(np.array([6e3, 6.5e3]), 1550e-9)
    expected = [
        _published_form_db_per_km(6.0, 1550.0, 0.585 * 6.0 ** (1.0 / 3.0)),
        _published_form_db_per_km(6.5, 1550.0, 1.3),
    ]
    assert_allclose(attenuation, expected, rtol=1e-14)


def test_kruse_attenuation_db_per_km_both_sides_of_50_km():
    attenuation = kruse_attenuation_db_per_km(np.array([50e3, 50.5e3]), 1550e-9)
    expected = [_published_form_db_per_km(50.0, 1550.0, 1.3), _published_form_db_per_km(50.5, 1550.0, 1.6)]
    assert_allclose(attenuation, expected, rtol=1e-14)


def test_kruse_attenuation_db_per_km_matches_kim_above_6_km():
    # REFERENCES.md: Kruse is as Kim above 6 km
    visibility_m = np.array([6.01e3, 10e3, 23e3, 50e3, 80e3])
    wavelengths_m = np.array([[850e-9], [1550e-9]])
    assert_allclose(
        kruse_attenuation_db_per_km(visibility_m, wavelengths_m),
        kim_attenuation_db_per_km(visibility_m, wavelengths_m),
        rtol=1e-15,
    )


def test_kim_attenuation_db_per_km_broadcasts_over_wavelength():
    wavelengths_m = np.array([785e-9, 850e-9, 1550e-9])
    attenuation = kim_attenuation_db_per_km(10e3, wavelengths_m)
    assert attenuation.shape == (3,)
    # Kim et al. 2001: in haze (q > 0) longer wavelengths are attenuated less
    assert np.all(np.diff(attenuation) < 0)


@pytest.mark.parametrize("visibility_m", [0.0, -1.0, np.nan])
def test_kim_attenuation_db_per_km_rejects_impossible_visibility(visibility_m):
    with pytest.raises(ValueError, match="visibility"):
        kim_attenuation_db_per_km(visibility_m, 1550e-9)


def test_kruse_attenuation_db_per_km_rejects_non_positive_wavelength():
    with pytest.raises(ValueError, match="wavelength"):
        kruse_attenuation_db_per_km(5e3, 0.0)


@settings(max_examples=80, derandomize=True, deadline=None)
@given(
    visibility_m=st.floats(50.0, 200e3),
    factor=st.floats(1.001, 10.0),
    wavelength_m=st.floats(600e-9, 1700e-9),
)
def test_kim_and_kruse_attenuation_fall_with_visibility(visibility_m, factor, wavelength_m):
    # Beyond 550 nm both 1/V and (λ/550 nm)^−q fall as V grows (q never decreases with V)
    for model in (kim_attenuation_db_per_km, kruse_attenuation_db_per_km):
        assert model(factor * visibility_m, wavelength_m) < model(visibility_m, wavelength_m)
