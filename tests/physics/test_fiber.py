"""Tests of linkbudget.physics.fiber.

Check values: Marcuse (1977) w/a at V = 1.5 (C) and derived values (D) from /work/shared/REFERENCES.md
"Gaussian modes and joints"; ITU-T G.652.D (11/2016) mode-field diameter (from memory, REFERENCES.md
"M"); the scalar wave equation of a step-index fibre solved independently by finite differences
(Snyder & Love 1983); scipy.integrate.quad as an independent integrator.
"""

import warnings

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy import integrate, optimize, special
from scipy.linalg import eigh_tridiagonal

from linkbudget.physics.fiber import (
    LP11_CUTOFF_V,
    lp01_field,
    lp01_mode_field_radius_m,
    lp01_u,
    marcuse_mode_field_radius_m,
    mode_field_diameter_m,
    numerical_aperture,
    petermann_mode_field_radius_m,
    v_number,
)
from linkbudget.physics.validity import ValidityWarning

# A standard single-mode fibre geometry, typical datasheet-like values (common practice).
CORE_RADIUS_M = 4.1e-6
NA = 0.12


# --- V number and numerical aperture ---


def test_numerical_aperture_from_indices():
    # Gloge 1971: NA = √(n1² − n2²); 1.5 and 1.48 give √(0.0596) = 0.244131 (arithmetic)
    assert_allclose(numerical_aperture(1.5, 1.48), 0.2441311123, rtol=1e-9)


def test_v_number_standard_fibre_at_1310():
    # V = 2π a NA/λ = 2π·4.1·0.12/1.31 = 2.359792 (arithmetic)
    assert_allclose(v_number(CORE_RADIUS_M, 1.31e-6, numerical_aperture=NA), 2.359792, rtol=1e-6)


def test_v_number_indices_agree_with_aperture():
    wavelengths_m = np.array([1.31e-6, 1.55e-6])
    by_indices = v_number(CORE_RADIUS_M, wavelengths_m, n_core=1.4504, n_cladding=1.4447)
    by_aperture = v_number(CORE_RADIUS_M, wavelengths_m, numerical_aperture=numerical_aperture(1.4504, 1.4447))
    assert_allclose(by_indices, by_aperture, rtol=1e-15)
    assert by_indices.shape == (2,)


@pytest.mark.parametrize(
    "kwargs",
    [{}, {"numerical_aperture": 0.12, "n_core": 1.45}, {"n_core": 1.45}, {"n_cladding": 1.44}],
)
def test_v_number_requires_exactly_one_description(kwargs):
    with pytest.raises(ValueError, match="either"):
        v_number(CORE_RADIUS_M, 1.31e-6, **kwargs)


def test_numerical_aperture_rejects_antiguide():
    with pytest.raises(ValueError, match="n_core > n_cladding"):
        numerical_aperture(1.44, 1.45)


# --- Marcuse's formula (Marcuse 1977) ---


@pytest.mark.parametrize(
    ("v", "ratio"),
    [(1.5, 1.78403), (1.2, 2.84579), (2.0, 1.26739)],  # REFERENCES.md: 1.5 (C), others (D)
)
def test_marcuse_mode_field_radius_m_check_values(v, ratio):
    # REFERENCES.md values are good to ±1 in the last digit shown (1.5 gives 1.7840237 exactly)
    assert_allclose(marcuse_mode_field_radius_m(1.0, v), ratio, atol=1.5e-5)


def test_marcuse_mode_field_radius_m_warns_at_cutoff():
    # REFERENCES.md: w/a(2.405) = 1.09896 (D, ±1 in the last digit), outside the stated 1.2–2.4
    # 2.405 is also just above the LP11 cut-off 2.40483 (first zero of J0): not single-mode
    with pytest.warns(ValidityWarning, match="Marcuse"), pytest.warns(ValidityWarning, match="single-mode"):
        ratio = marcuse_mode_field_radius_m(1.0, 2.405)
    assert_allclose(ratio, 1.09896, atol=1.5e-5)


def test_marcuse_mode_field_radius_m_silent_inside_range():
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        marcuse_mode_field_radius_m(1.0, np.linspace(1.2, 2.4, 5))


def test_mode_field_diameter_m_g652_at_1310():
    # ITU-T G.652.D (11/2016): MFD at 1310 nm nominal 8.6–9.2 µm, tolerance ±0.4 µm (from memory)
    mfd = mode_field_diameter_m(CORE_RADIUS_M, 1.31e-6, numerical_aperture=NA)
    assert 8.2e-6 <= mfd <= 9.6e-6


def test_mode_field_diameter_m_g652_larger_at_1550():
    # At 1550 nm a G.652 fibre's MFD is about 10.4 µm, often quoted 9.5–11.5 µm (from memory;
    # not confirmed to be a G.652 requirement)
    mfd = mode_field_diameter_m(CORE_RADIUS_M, np.array([1.31e-6, 1.55e-6]), numerical_aperture=NA)
    assert mfd[1] > mfd[0]
    assert 9.5e-6 <= mfd[1] <= 11.5e-6


# --- Exact LP01 mode (Gloge 1971; Snyder & Love 1983) ---


def _finite_difference_u(v, cells_per_core_radius=400, outer_radius=20.0):
    """U of the lowest mode of the scalar radial wave equation, by finite differences.

    −(1/ρ)(ρψ')' − V²·[ρ < 1]·ψ = −W²ψ (Snyder & Love 1983), ψ = 0 at ρ = 20, cell-centred grid
    with the core boundary on a cell face; second order in the step.
    """
    h = 1.0 / cells_per_core_radius
    rho = (np.arange(int(outer_radius * cells_per_core_radius)) + 0.5) * h
    upper_face = rho + 0.5 * h
    lower_face = rho - 0.5 * h
    diagonal = (upper_face + lower_face) / h**2 - v**2 * rho * (rho < 1.0)
    off_diagonal = -upper_face[:-1] / h**2
    # symmetrise the generalised problem A ψ = λ diag(ρ) ψ
    eigenvalue = eigh_tridiagonal(
        diagonal / rho,
        off_diagonal / np.sqrt(rho[:-1] * rho[1:]),
        eigvals_only=True,
        select="i",
        select_range=(0, 0),
    )[0]
    return np.sqrt(v**2 + eigenvalue)


@pytest.mark.parametrize("v", [1.6, 2.0, 2.4])
def test_lp01_u_matches_finite_difference_wave_equation(v):
    # Independent solution of the same wave equation; 400 cells per core radius give ~1e-6, so
    # rtol 1e-5 leaves room for the discretisation error.
    assert_allclose(lp01_u(v), _finite_difference_u(v), rtol=1e-5)


def test_lp01_u_rudolph_neumann_approximation():
    # Rudolph & Neumann, Nachrichtentech. Z. 29, 328 (1976) (from memory): W ≈ 1.1428 V − 0.9960,
    # quoted as good to about 0.1 % for 1.5 ≤ V ≤ 2.5 (from memory); 0.2 % allows for that.
    # Checked over the single-mode part of that range.
    v = np.linspace(1.5, 2.4, 19)
    u = lp01_u(v)
    assert_allclose(np.sqrt(v**2 - u**2), 1.1428 * v - 0.9960, rtol=2e-3)


def test_lp01_u_satisfies_eigenvalue_equation():
    # Gloge 1971: U J1(U)/J0(U) = W K1(W)/K0(W), evaluated here with scipy directly
    v = np.array([0.8, 1.2, 1.8, 2.4])
    u = lp01_u(v)
    w = np.sqrt(v**2 - u**2)
    assert_allclose(u * special.j1(u) / special.j0(u), w * special.k1(w) / special.k0(w), rtol=1e-12)


def test_lp01_u_warns_above_cutoff():
    with pytest.warns(ValidityWarning, match="cut-off"):
        u = lp01_u(3.0)
    assert 0.0 < u < LP11_CUTOFF_V


def test_lp01_u_rejects_non_positive_v():
    with pytest.raises(ValueError, match="V number"):
        lp01_u(0.0)


def test_lp01_field_continuous_with_slope_at_core_boundary():
    # Snyder & Love 1983: the weakly guiding field and its radial derivative are continuous at r = a
    a, v, step = 4.1e-6, 2.2, 1e-11
    field = lp01_field(np.array([a - step, a, a + step]), a, v)
    assert_allclose(field, 1.0, rtol=1e-5)
    slope_inside = (field[1] - field[0]) / step
    slope_outside = (field[2] - field[1]) / step
    # one-sided differences with a 1e-11 m step: slopes agree to ~1e-4 relative
    assert_allclose(slope_inside, slope_outside, rtol=1e-3)


def test_lp01_field_broadcasts_radius_against_v():
    field = lp01_field(np.array([0.0, 4.1e-6, 12e-6])[:, np.newaxis], 4.1e-6, np.array([1.8, 2.2]))
    assert field.shape == (3, 2)
    assert_allclose(field[1], 1.0)  # normalised to 1 at the boundary
    assert np.all(field[0] > 1.0) and np.all(field[2] < 1.0)


def _quad_norm(a, v):
    return integrate.quad(lambda r: lp01_field(r, a, v) ** 2 * r, 0, a)[0] + integrate.quad(
        lambda r: lp01_field(r, a, v) ** 2 * r, a, np.inf
    )[0]


def test_lp01_mode_field_radius_m_matches_quad_overlap_maximum():
    # The best-fit Gaussian found independently with scipy.integrate.quad and minimize_scalar;
    # the optimum is flat (η is quadratic in w near it), so an error ε in η moves w by ~√ε; with
    # quad's default tolerances the two agree to ~1e-8, and rtol 1e-7 leaves margin.
    a, v = 1.0, 1.8
    norm = _quad_norm(a, v)

    def overlap(spot):
        amplitude = integrate.quad(lambda r: lp01_field(r, a, v) * np.exp(-(r**2) / spot**2) * r, 0, a)[0]
        amplitude += integrate.quad(lambda r: lp01_field(r, a, v) * np.exp(-(r**2) / spot**2) * r, a, np.inf)[0]
        return amplitude**2 / (norm * spot**2 / 4.0)

    best = optimize.minimize_scalar(
        lambda spot: -overlap(spot), bounds=(0.8, 2.5), method="bounded", options={"xatol": 1e-10}
    )
    assert_allclose(lp01_mode_field_radius_m(a, v), best.x, rtol=1e-7)


def test_lp01_mode_field_radius_m_marcuse_formula_within_one_percent():
    # Marcuse 1977: his formula fits the best-overlap Gaussian to about 1 % for 1.2 < V < 2.4
    # (from memory); the largest deviation found here is 0.8 %.
    v = np.linspace(1.2, 2.4, 25)
    assert_allclose(marcuse_mode_field_radius_m(8e-6, v), lp01_mode_field_radius_m(8e-6, v), rtol=0.01)


def test_lp01_mode_field_radius_m_broadcasts_over_wavelength():
    v = v_number(CORE_RADIUS_M, np.array([1.31e-6, 1.55e-6]), numerical_aperture=NA)
    radius = lp01_mode_field_radius_m(CORE_RADIUS_M, v)
    assert radius.shape == (2,)
    assert radius[1] > radius[0]  # a lower V spreads the mode further (Gloge 1971)


@pytest.mark.parametrize("v", [1.3, 1.9, 2.4])
def test_petermann_mode_field_radius_m_matches_definition_by_quad(v):
    # Petermann 1983 (from memory): w² = 2∫ψ²r dr / ∫ψ'²r dr, integrated with scipy quad and the
    # derivative of the Bessel field (−U J1(Ur/a)/(a J0(U)) inside, −W K1(Wr/a)/(a K0(W)) outside);
    # quad's default tolerances give ~1e-10.
    a = 1.0
    u = lp01_u(v)
    w = np.sqrt(v**2 - u**2)
    slope_sq_core = integrate.quad(lambda r: (u * special.j1(u * r) / special.j0(u)) ** 2 * r, 0, a)[0]
    slope_sq_cladding = integrate.quad(lambda r: (w * special.k1(w * r) / special.k0(w)) ** 2 * r, a, np.inf)[0]
    expected = np.sqrt(2.0 * _quad_norm(a, v) / (slope_sq_core + slope_sq_cladding))
    assert_allclose(petermann_mode_field_radius_m(a, v), expected, rtol=1e-8)


def test_petermann_mode_field_radius_m_g652_at_1310():
    # ITU-T G.650.1 defines the MFD by the Petermann II integral (from memory); G.652.D (11/2016)
    # MFD at 1310 nm 8.6–9.2 µm ± 0.4 µm (from memory)
    v = v_number(CORE_RADIUS_M, 1.31e-6, numerical_aperture=NA)
    assert 8.2e-6 <= 2.0 * petermann_mode_field_radius_m(CORE_RADIUS_M, v) <= 9.6e-6
