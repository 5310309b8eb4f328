import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from linkbudget.materials.dispersion import (
    MaterialRangeError,
    cauchy,
    gas_dispersion,
    require_in_range,
    sellmeier,
    tabulated,
)

UM = 1e-6

# Malitson 1965 fused-silica coefficients (C in /work/shared/REFERENCES.md).
MALITSON_B = [0.6961663, 0.4079426, 0.8974794]
MALITSON_C_M = [0.0684043 * UM, 0.1162414 * UM, 9.896161 * UM]


@pytest.mark.parametrize(
    "wavelength_um, expected",
    [
        (0.5876, 1.45846),  # Malitson 1965, published (C)
        (1.064, 1.44963),  # derived from Malitson's formula (D), REFERENCES.md
        (1.31, 1.44680),  # (D)
        (1.55, 1.44402),  # (D)
    ],
)
def test_sellmeier_fused_silica_malitson(wavelength_um, expected):
    n = sellmeier(wavelength_um * UM, b=MALITSON_B, c_m=MALITSON_C_M)
    # Values are given to 5 decimals, good to ±1 in the last digit.
    assert_allclose(n, expected, atol=1e-5)


def test_sellmeier_keeps_wavelength_shape():
    # The same Malitson values as above, laid out as a 2 × 2 array and as a 0-d scalar.
    wavelength_m = np.array([[0.5876, 1.064], [1.31, 1.55]]) * UM
    n = sellmeier(wavelength_m, b=MALITSON_B, c_m=MALITSON_C_M)
    assert n.shape == (2, 2)
    assert_allclose(n, [[1.45846, 1.44963], [1.44680, 1.44402]], atol=1e-5)
    assert sellmeier(1.55 * UM, b=MALITSON_B, c_m=MALITSON_C_M).shape == ()


def test_sellmeier_constant_term_adds_to_n_squared():
    # Sellmeier's form n² = 1 + A + Σ…: with no resonance terms left (B = 0), n² = 1 + A.
    assert_allclose(sellmeier(1.0 * UM, b=[0.0], c_m=[0.1 * UM], a=1.25), 1.5, rtol=1e-15)


def test_sellmeier_resonance_inside_request_raises():
    # Just below a resonance at 1 µm with B = 1: n² = 1 + 0.9801/(0.9801 − 1) < 0 (hand arithmetic).
    with pytest.raises(ValueError, match="Sellmeier n² is not a finite positive number at 990 nm"):
        sellmeier(0.99 * UM, b=[1.0], c_m=[1.0 * UM])


def test_cauchy_two_term_hand_value():
    # Cauchy 1836, n = A + B/λ²: A = 1.5, B = 0.004 µm² at 0.5 µm → 1.5 + 0.004/0.25 = 1.516.
    n = cauchy(np.array([0.5, 1.0]) * UM, coefficients=[1.5, 0.004], powers=[0, -2])
    assert_allclose(n, [1.516, 1.504], rtol=1e-15)


def test_cauchy_three_term_hand_value():
    # n = A + B/λ² + C/λ⁴ at 0.5 µm: 1.45 + 0.004/0.25 + 0.0001/0.0625 = 1.4676 (hand arithmetic).
    n = cauchy(0.5 * UM, coefficients=[1.45, 0.004, 0.0001], powers=[0, -2, -4])
    assert_allclose(n, 1.4676, rtol=1e-15)


@pytest.mark.parametrize(
    "wavelength_um, expected_n_minus_1",
    [
        # Ciddor 1996 standard air, coefficients as in the shared nk file air-Ciddor.yml; values
        # derived with 30-digit decimal arithmetic from n − 1 = B1/(C1 − σ²) + B2/(C2 − σ²).
        (0.6328, 2.76532738083504e-4),
        (1.55, 2.73260315767429e-4),
    ],
)
def test_gas_dispersion_ciddor_standard_air(wavelength_um, expected_n_minus_1):
    n = gas_dispersion(
        wavelength_um * UM,
        b_per_m2=[0.05792105 / UM**2, 0.00167917 / UM**2],
        c_per_m2=[238.0185 / UM**2, 57.362 / UM**2],
    )
    # n − 1 carries float64 rounding of n ≈ 1 (2e-16 absolute), i.e. ~1e-12 relative.
    assert_allclose(n - 1, expected_n_minus_1, rtol=1e-10)


TABLE_M = np.array([1.0, 2.0, 4.0]) * UM
TABLE_N = np.array([1.5, 1.7, 1.6])
TABLE_K = np.array([0.0, 1e-3, 5e-3])


def test_tabulated_returns_rows_at_tabulated_wavelengths():
    assert_allclose(tabulated(TABLE_M, TABLE_M, TABLE_N, TABLE_K), TABLE_N + 1j * TABLE_K, rtol=0)


def test_tabulated_linear_between_rows():
    # Linear interpolation in wavelength (numpy.interp): midway between rows gives their mean;
    # a quarter of the way from 2 µm to 4 µm gives 1.7 − 0.25·0.1 and 1e-3 + 0.25·4e-3.
    index = tabulated(np.array([1.5, 2.5]) * UM, TABLE_M, TABLE_N, TABLE_K)
    assert_allclose(index, [1.6 + 0.5e-3j, 1.675 + 2e-3j], rtol=1e-14)


@pytest.mark.parametrize("wavelength_um", [0.999, 4.001])
def test_tabulated_outside_table_raises_naming_range(wavelength_um):
    with pytest.raises(MaterialRangeError, match="outside the valid range 1000–4000 nm"):
        tabulated(np.array([2.0, wavelength_um]) * UM, TABLE_M, TABLE_N, TABLE_K)


def test_require_in_range_accepts_ends_after_unit_rounding():
    # 0.21 µm → 2.0999999999999997e-07 m, 210 nm → 2.1e-07 m: both are the range's end.
    require_in_range(np.array([0.21 * 1e-6, 210 * 1e-9]), (210e-9, 6.7e-6), what="test")
    with pytest.raises(MaterialRangeError, match="test: wavelengths 200, 7000 nm are outside"):
        require_in_range(np.array([200e-9, 7e-6]), (210e-9, 6.7e-6), what="test")


@settings(max_examples=60, derandomize=True)
@given(st.floats(min_value=1.0, max_value=4.0))
def test_tabulated_stays_between_neighbouring_rows(wavelength_um):
    # Property of linear interpolation: the value lies between the two rows that bracket it.
    index = tabulated(wavelength_um * UM, TABLE_M, TABLE_N, TABLE_K)
    right = min(int(np.searchsorted(TABLE_M, wavelength_um * UM)), len(TABLE_M) - 1)
    left = max(right - 1, 0)
    for value, column in ((index.real, TABLE_N), (index.imag, TABLE_K)):
        low, high = sorted(column[[left, right]])
        assert low - 1e-15 <= value <= high + 1e-15
