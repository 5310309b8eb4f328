"""Tests of linkbudget.physics.fresnel.

Outside sources: published values in /work/shared/REFERENCES.md ("Indices and Fresnel"; C =
confirmed, D = derived from a confirmed formula, given to the digits shown) and the `tmm`
reference library (S. J. Byrnes, arXiv:1603.02720), which uses N = n + iκ with κ ≥ 0 for loss,
as this package does.
"""

import warnings

import numpy as np
import pytest
import tmm
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from linkbudget.physics.fresnel import (
    brewster_angle_rad,
    cos_theta_in,
    critical_angle_rad,
    interface_amplitude_coefficients,
    interface_power_coefficients,
    normal_incidence_reflectance,
)
from linkbudget.physics.validity import ValidityWarning

# Float rounding of a handful of complex operations on O(1) numbers.
ROUNDING = 1e-12

real_index = st.floats(1.0, 4.0)
kappa = st.floats(0.0, 2.0)
angle = st.floats(0.0, np.deg2rad(80.0))
linear = st.sampled_from(["s", "p"])
hypothesis_settings = settings(max_examples=150, derandomize=True, deadline=None)


def published_tolerance(value_shown):
    """One unit in the last digit shown: REFERENCES.md states its D values to ±1 there."""
    decimals = len(value_shown.split(".")[1])
    return 10.0**-decimals


def malitson_silica_index(wavelength_um):
    """Fused silica, Malitson 1965 Sellmeier coefficients (REFERENCES.md, C)."""
    b = (0.6961663, 0.4079426, 0.8974794)
    c = (0.0684043, 0.1162414, 9.896161)
    square = wavelength_um**2
    return np.sqrt(1.0 + sum(bi * square / (square - ci**2) for bi, ci in zip(b, c, strict=True)))


def test_malitson_silica_index_fixture_published_values():
    # Guards the fixture above: n(0.5876 um) = 1.45846 (C), n(1.55 um) = 1.44402 (D).
    assert_allclose(malitson_silica_index(0.5876), 1.45846, rtol=0, atol=1e-5)
    assert_allclose(malitson_silica_index(1.55), 1.44402, rtol=0, atol=1e-5)


# --- published values (REFERENCES.md "Indices and Fresnel") -----------------------------------


def test_normal_incidence_reflectance_glass_1p5():
    # REFERENCES.md (D): n = 1.5 -> 4.000 %; exact arithmetic gives 0.04.
    assert_allclose(normal_incidence_reflectance(1.0, 1.5), 0.04, rtol=0, atol=ROUNDING)
    reflectance, transmittance = interface_power_coefficients(1.0, 1.5)
    assert_allclose(reflectance, 0.04, rtol=0, atol=ROUNDING)
    assert_allclose(transmittance, 0.96, rtol=0, atol=ROUNDING)


@pytest.mark.parametrize(
    ("n2", "percent_shown"),
    [
        # Fused silica at 1550 nm: 3.3007 % (D) from the unrounded Sellmeier index 1.444024.
        (malitson_silica_index(1.55), "3.3007"),
        (3.4757, "30.597"),  # crystalline silicon at 1.55 um, Li 1980 (C index, D reflectance)
    ],
)
def test_normal_incidence_reflectance_published_dielectrics(n2, percent_shown):
    expected = float(percent_shown) / 100.0
    tolerance = published_tolerance(percent_shown) / 100.0
    assert_allclose(normal_incidence_reflectance(1.0, n2), expected, rtol=0, atol=tolerance)
    reflectance, _ = interface_power_coefficients(1.0, n2, polarization="s")
    assert_allclose(reflectance, expected, rtol=0, atol=tolerance)


def test_normal_incidence_reflectance_gold_johnson_christy():
    # Gold at 0.6595 um, N = 0.14 + 3.697i (Johnson & Christy 1972, C) -> R = 0.9626 (D).
    gold = 0.14 + 3.697j
    tolerance = published_tolerance("0.9626")
    assert_allclose(normal_incidence_reflectance(1.0, gold), 0.9626, rtol=0, atol=tolerance)
    reflectance, transmittance = interface_power_coefficients(1.0, gold)
    assert_allclose(reflectance, 0.9626, rtol=0, atol=tolerance)
    # Lossless incident medium: the power not reflected enters the metal.
    assert_allclose(reflectance + transmittance, 1.0, rtol=0, atol=ROUNDING)


def test_brewster_angle_rad_glass_1p5():
    # REFERENCES.md (C): Brewster angle for n = 1.5 is 56.310 deg.
    brewster = brewster_angle_rad(1.0, 1.5)
    assert_allclose(np.rad2deg(brewster), 56.310, rtol=0, atol=published_tolerance("56.310"))
    reflectance_p, _ = interface_power_coefficients(1.0, 1.5, angle_rad=brewster, polarization="p")
    assert_allclose(reflectance_p, 0.0, rtol=0, atol=ROUNDING)


def test_interface_power_coefficients_45_degrees_glass_1p5():
    # REFERENCES.md (D): at 45 deg on n = 1.5, Rs = 9.201 %, Rp = 0.8466 %.
    angle_rad = np.deg2rad(45.0)
    rs, _ = interface_power_coefficients(1.0, 1.5, angle_rad=angle_rad, polarization="s")
    rp, _ = interface_power_coefficients(1.0, 1.5, angle_rad=angle_rad, polarization="p")
    assert_allclose(rs, 0.09201, rtol=0, atol=published_tolerance("9.201") / 100)
    assert_allclose(rp, 0.008466, rtol=0, atol=published_tolerance("0.8466") / 100)
    unpolarized, _ = interface_power_coefficients(1.0, 1.5, angle_rad=angle_rad)
    assert_allclose(unpolarized, 0.5 * (rs + rp), rtol=0, atol=ROUNDING)


def test_critical_angle_rad_glass_1p5_to_air():
    # REFERENCES.md (D): critical angle glass -> air for n = 1.5 is 41.810 deg.
    critical = critical_angle_rad(1.5, 1.0)
    assert_allclose(np.rad2deg(critical), 41.810, rtol=0, atol=published_tolerance("41.810"))


@pytest.mark.parametrize("polarization", ["s", "p", "unpolarized"])
def test_interface_power_coefficients_total_internal_reflection(polarization):
    # Beyond the critical angle (Born & Wolf): no flux crosses, R = 1, T = 0 exactly.
    angles = critical_angle_rad(1.5, 1.0) + np.array([1e-6, 0.1, 0.5])
    reflectance, transmittance = interface_power_coefficients(
        1.5, 1.0, angle_rad=angles, polarization=polarization
    )
    assert_allclose(transmittance, 0.0, rtol=0, atol=0)
    assert_allclose(reflectance, 1.0, rtol=0, atol=ROUNDING)


def test_cos_theta_in_total_internal_reflection_decays():
    # Byrnes (arXiv:1603.02720): the forward evanescent wave has
    # N cos(theta) = +i sqrt(beta^2 - N^2).
    angle_rad = np.deg2rad(60.0)
    cos = cos_theta_in(1.5, 1.0, angle_rad)
    expected = 1j * np.sqrt((1.5 * np.sin(angle_rad)) ** 2 - 1.0)
    assert_allclose(cos, expected, rtol=0, atol=ROUNDING)


# --- against the tmm reference library ---------------------------------------------------------


@hypothesis_settings
@given(n1=real_index, n2=real_index, k2=kappa, angle_rad=angle, polarization=linear)
def test_interface_power_coefficients_match_tmm(n1, n2, k2, angle_rad, polarization):
    # tmm.interface_R / interface_T (Byrnes 2016) with a lossless incident medium.
    medium = n2 + 1j * k2
    angle_2 = tmm.snell(n1, medium, angle_rad)
    expected_r = tmm.interface_r(polarization, n1, medium, angle_rad, angle_2)
    expected_t = tmm.interface_t(polarization, n1, medium, angle_rad, angle_2)
    r, t = interface_amplitude_coefficients(
        n1, medium, angle_rad=angle_rad, polarization=polarization
    )
    assert_allclose(r, expected_r, rtol=0, atol=ROUNDING)
    assert_allclose(t, expected_t, rtol=0, atol=ROUNDING)
    reflectance, transmittance = interface_power_coefficients(
        n1, medium, angle_rad=angle_rad, polarization=polarization
    )
    expected_big_r = tmm.interface_R(polarization, n1, medium, angle_rad, angle_2)
    expected_big_t = tmm.interface_T(polarization, n1, medium, angle_rad, angle_2)
    assert_allclose(reflectance, expected_big_r, rtol=0, atol=ROUNDING)
    assert_allclose(transmittance, expected_big_t, rtol=0, atol=ROUNDING)


@hypothesis_settings
@given(n1=real_index, n2=real_index, k2=kappa, angle_rad=angle)
def test_cos_theta_in_matches_tmm_snell(n1, n2, k2, angle_rad):
    # tmm.snell picks the forward-propagating or decaying branch (Byrnes 2016, appendix D).
    medium = n2 + 1j * k2
    assert_allclose(
        cos_theta_in(n1, medium, angle_rad),
        np.cos(tmm.snell(n1, medium, angle_rad)),
        rtol=0,
        atol=ROUNDING,
    )


# --- invariants ---------------------------------------------------------------------------------


@hypothesis_settings
@given(n1=real_index, n2=real_index, angle_rad=angle, polarization=linear)
def test_interface_power_coefficients_lossless_conserve_energy(n1, n2, angle_rad, polarization):
    # Lossless media (Born & Wolf): R + T = 1, including total internal reflection.
    reflectance, transmittance = interface_power_coefficients(
        n1, n2, angle_rad=angle_rad, polarization=polarization
    )
    assert_allclose(reflectance + transmittance, 1.0, rtol=0, atol=ROUNDING)


@pytest.mark.parametrize("index", [1.5, 3.4757, 0.14 + 3.697j])
@pytest.mark.parametrize("angle_deg", [0.0, 30.0, 70.0])
def test_interface_power_coefficients_index_matched(index, angle_deg):
    # Identity (Fresnel equations with N1 = N2): an index-matched interface reflects nothing.
    reflectance, transmittance = interface_power_coefficients(
        index, index, angle_rad=np.deg2rad(angle_deg)
    )
    assert_allclose(reflectance, 0.0, rtol=0, atol=ROUNDING)
    assert_allclose(transmittance, 1.0, rtol=0, atol=ROUNDING)


def test_interface_amplitude_coefficients_normal_incidence_signs():
    # Born & Wolf sign convention at normal incidence: r_s = (n1 - n2)/(n1 + n2) = -r_p,
    # t_s = t_p = 2 n1/(n1 + n2).
    rs, ts = interface_amplitude_coefficients(1.0, 1.5, polarization="s")
    rp, tp = interface_amplitude_coefficients(1.0, 1.5, polarization="p")
    assert_allclose([rs, rp, ts, tp], [-0.2, 0.2, 0.8, 0.8], rtol=0, atol=ROUNDING)


def test_interface_power_coefficients_broadcast_over_wavelength():
    # Array in, array out: a dispersive second medium over 4 wavelengths, one angle.
    n2 = np.array([1.5, 1.45, 1.44402, 3.4757])
    reflectance, transmittance = interface_power_coefficients(1.0, n2, angle_rad=0.2)
    assert reflectance.shape == transmittance.shape == (4,)
    expected = [interface_power_coefficients(1.0, n, angle_rad=0.2)[0] for n in n2]
    assert_allclose(reflectance, expected, rtol=0, atol=ROUNDING)


# --- absorbing incident medium ------------------------------------------------------------------


def test_interface_power_coefficients_absorbing_incident_warns():
    # Byrnes 2016: in an absorbing incident medium incident and reflected waves interfere in
    # the flux, so R + T != 1; reported with ValidityWarning.
    with pytest.warns(ValidityWarning, match="incident medium absorbs"):
        interface_power_coefficients(1.5 + 0.5j, 1.0)


def test_interface_power_coefficients_slightly_absorbing_incident_silent():
    # A window-glass κ of 3e-8 shifts the balance by ~1e-8 only: no warning.
    with warnings.catch_warnings():
        warnings.simplefilter("error", ValidityWarning)
        reflectance, transmittance = interface_power_coefficients(1.447 + 3e-8j, 1.0)
    assert_allclose(reflectance + transmittance, 1.0, rtol=0, atol=1e-7)


# --- validation ----------------------------------------------------------------------------------


def test_interface_power_coefficients_rejects_gain():
    with pytest.raises(ValueError, match="negative imaginary part"):
        interface_power_coefficients(1.0, 1.5 - 1e-3j)


@pytest.mark.parametrize("bad_angle", [-0.1, np.pi / 2, 2.0, np.nan])
def test_interface_power_coefficients_rejects_angle(bad_angle):
    with pytest.raises(ValueError, match="angle_rad"):
        interface_power_coefficients(1.0, 1.5, angle_rad=bad_angle)


def test_interface_power_coefficients_rejects_polarization():
    with pytest.raises(ValueError, match="polarization"):
        interface_power_coefficients(1.0, 1.5, polarization="circular")


def test_interface_amplitude_coefficients_rejects_unpolarized():
    with pytest.raises(ValueError, match="polarization"):
        interface_amplitude_coefficients(1.0, 1.5, polarization="unpolarized")


@pytest.mark.parametrize(("n1", "n2"), [(1.0, 1.5), (1.5, 1.5)])
def test_critical_angle_rad_rejects_no_total_internal_reflection(n1, n2):
    with pytest.raises(ValueError, match="n2 < n1"):
        critical_angle_rad(n1, n2)


def test_brewster_angle_rad_rejects_absorbing_medium():
    with pytest.raises(ValueError, match="lossless"):
        brewster_angle_rad(1.0, 0.14 + 3.697j)
