"""Tests of linkbudget.physics.gaussian.

Worked values come from /work/shared/REFERENCES.md, "Gaussian modes and joints": the joint-loss
formulas of Ghatak & Thyagarajan (1998) eqs 8.69/8.75/8.81 (C) evaluated for w = 5.2 µm,
λ = 1.55 µm (D, quoted to ±1e-3 dB), and the beam formulas of Kogelnik & Li (1966) / Siegman (1986).
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from linkbudget.physics.decibel import loss_db_from_transmittance
from linkbudget.physics.gaussian import (
    abcd_flat_interface,
    abcd_free_space,
    abcd_propagate,
    abcd_thin_lens,
    aperture_transmission,
    coupling_efficiency,
    coupling_efficiency_tilt_azimuth,
    divergence_half_angle_rad,
    gap_coupling,
    offset_coupling,
    q_from_waist,
    rayleigh_range_m,
    spot_radius_from_q,
    spot_radius_m,
    tilt_coupling,
    waist_from_divergence_m,
    waist_from_q,
)
from tests import numeric_overlap

W = 5.2e-6
LAMBDA = 1.55e-6
ONE_DEGREE = np.deg2rad(1.0)
# REFERENCES.md quotes the worked dB values to ±1e-3 dB.
DB_TOLERANCE = 1e-3

FAST = settings(max_examples=60, derandomize=True, deadline=None)
waists = st.floats(2e-6, 12e-6)
wavelengths = st.floats(0.8e-6, 1.7e-6)
indices = st.floats(1.0, 1.8)
offsets = st.floats(-10e-6, 10e-6)
tilts = st.floats(-0.05, 0.05)
separations = st.floats(0.0, 300e-6)


# --- Beam formulas: Kogelnik & Li 1966, Siegman 1986 (REFERENCES.md, D) ---


def test_rayleigh_range_m_one_mm_waist_at_1550():
    # REFERENCES.md: w0 = 1 mm at 1550 nm -> z_R = 2.0268 m (D, 5 digits)
    assert_allclose(rayleigh_range_m(1e-3, 1.55e-6), 2.0268, rtol=3e-5)


def test_rayleigh_range_m_scales_with_index():
    # Siegman 1986: z_R = π w0² n / λ, linear in n
    assert_allclose(rayleigh_range_m(1e-3, 1.55e-6, n=1.5), 1.5 * 2.0268339700579308, rtol=1e-14)


def test_divergence_half_angle_rad_one_mm_waist_at_1550():
    # REFERENCES.md: θ = 0.49338 mrad (D, 5 digits)
    assert_allclose(divergence_half_angle_rad(1e-3, 1.55e-6), 0.49338e-3, rtol=2e-5)


def test_waist_from_divergence_m_inverts_divergence():
    # Siegman 1986: θ = λ/(π n w0), so w0 = λ/(π n θ)
    waist = np.array([1e-6, 5.2e-6, 1e-3])
    theta = divergence_half_angle_rad(waist, 1.31e-6, n=1.45)
    assert_allclose(waist_from_divergence_m(theta, 1.31e-6, n=1.45), waist, rtol=1e-14)


def test_spot_radius_m_at_rayleigh_range_is_root_two_waist():
    # Kogelnik & Li 1966: w(z_R) = √2·w0
    z_r = rayleigh_range_m(1e-3, 1.55e-6)
    assert_allclose(spot_radius_m(1e-3, z_r, 1.55e-6), np.sqrt(2.0) * 1e-3, rtol=1e-14)


def test_spot_radius_m_broadcasts_over_wavelength():
    wavelengths_m = np.array([0.85e-6, 1.31e-6, 1.55e-6])
    spot = spot_radius_m(1e-3, 2.0, wavelengths_m)
    assert spot.shape == (3,)
    # far from the waist the spot grows with λ (Siegman 1986: w ≈ θ z, θ ∝ λ)
    assert np.all(np.diff(spot) > 0)


def test_aperture_transmission_siegman_values():
    # REFERENCES.md: T = 1 − exp(−2a²/w²) (Siegman, C); a = w, 1.5w, 2w -> 0.864665, 0.988891,
    # 0.999665 (D, 6 digits)
    transmission = aperture_transmission(np.array([1.0, 1.5, 2.0]) * 3e-3, 3e-3)
    assert_allclose(transmission, [0.864665, 0.988891, 0.999665], atol=1e-6)


def test_aperture_transmission_closed_aperture_passes_nothing():
    assert aperture_transmission(0.0, 1e-3) == 0.0


# --- Complex beam parameter and ABCD matrices ---


def test_abcd_free_space_matches_spot_radius_formula_in_a_medium():
    # Kogelnik & Li 1966: propagating q through a path gives w(z) = w0·√(1 + (z/z_R)²) with
    # z_R = π w0² n/λ (the reduced distance L/n enters the matrix).
    wavelengths_m = np.array([0.85e-6, 1.31e-6, 1.55e-6])
    q = abcd_propagate(q_from_waist(10e-6, wavelengths_m, n=1.46), abcd_free_space(0.8e-3, n=1.46))
    expected = spot_radius_m(10e-6, 0.8e-3, wavelengths_m, n=1.46)
    assert_allclose(spot_radius_from_q(q, wavelengths_m), expected, rtol=1e-13)
    assert_allclose(waist_from_q(q, wavelengths_m), 10e-6, rtol=1e-13)


def test_q_from_waist_distance_matches_free_space_propagation():
    q_direct = q_from_waist(4e-6, 1.55e-6, n=1.5, distance_m=30e-6)
    q_propagated = abcd_propagate(q_from_waist(4e-6, 1.55e-6, n=1.5), abcd_free_space(30e-6, n=1.5))
    assert_allclose(q_direct, q_propagated, rtol=1e-14)


def test_abcd_flat_interface_into_glass_uses_reduced_distance():
    # Siegman 1986: after a flat interface into index n, a beam from an air waist w0 spreads
    # as if the glass path L2 were an air path L2/n: w = w0·√(1 + ((L1 + L2/n)/z_R,air)²).
    n_glass = 1.5
    chain = abcd_free_space(2e-3, n=n_glass) @ abcd_flat_interface(1.0, n_glass)
    chain = chain @ abcd_free_space(1e-3)
    q = abcd_propagate(q_from_waist(20e-6, 1.31e-6), chain)
    z_r_air = rayleigh_range_m(20e-6, 1.31e-6)
    expected = 20e-6 * np.sqrt(1.0 + ((1e-3 + 2e-3 / n_glass) / z_r_air) ** 2)
    assert_allclose(spot_radius_from_q(q, 1.31e-6), expected, rtol=1e-13)
    # the waist radius is unchanged by a flat interface (z_R scales by n, the waist does not)
    assert_allclose(waist_from_q(q, 1.31e-6), 20e-6, rtol=1e-13)


def test_abcd_thin_lens_kogelnik_li_lens_transformation():
    # Kogelnik & Li 1966, transformation of a waist by a thin lens (equation numbers from memory):
    # 1/w2² = (1/w1²)(1 − d1/f)² + (1/f²)(π w1/λ)²;  d2 − f = (d1 − f) f² / ((d1 − f)² + (π w1²/λ)²)
    w1, d1, f, wavelength = 0.3e-3, 0.25, 0.1, 1.064e-6
    q = abcd_propagate(q_from_waist(w1, wavelength), abcd_thin_lens(f) @ abcd_free_space(d1))
    z1 = np.pi * w1**2 / wavelength
    w2 = (1.0 / w1**2 * (1.0 - d1 / f) ** 2 + (np.pi * w1 / (wavelength * f)) ** 2) ** -0.5
    d2 = f + (d1 - f) * f**2 / ((d1 - f) ** 2 + z1**2)
    assert_allclose(waist_from_q(q, wavelength), w2, rtol=1e-12)
    assert_allclose(-np.real(q), d2, rtol=1e-12)  # n = 1: distance to the waist is −Re(q)


def test_abcd_propagate_broadcasts_matrices_over_wavelength():
    wavelengths_m = np.array([1.31e-6, 1.55e-6])
    lengths_m = np.array([1e-3, 2e-3])
    matrices = abcd_free_space(lengths_m)
    assert matrices.shape == (2, 2, 2)
    q = abcd_propagate(q_from_waist(5e-6, wavelengths_m), matrices)
    assert_allclose(q.real, lengths_m, rtol=1e-14)


def test_abcd_propagate_rejects_a_non_square_matrix():
    with pytest.raises(ValueError, match="shape"):
        abcd_propagate(1j, np.eye(3))


def test_abcd_thin_lens_rejects_zero_focal_length():
    with pytest.raises(ValueError, match="focal"):
        abcd_thin_lens(0.0)


def test_spot_radius_from_q_rejects_a_non_beam():
    with pytest.raises(ValueError, match="Im"):
        spot_radius_from_q(1.0 - 1j, 1.55e-6)


# --- Joint losses: Ghatak & Thyagarajan 1998 eqs 8.69, 8.75, 8.81 (REFERENCES.md worked values) ---


@pytest.mark.parametrize(
    ("offset_m", "expected_db"),
    [(1e-6, 0.1606), (W, 4.3429)],  # REFERENCES.md, offset 1 µm and offset = w (D)
)
def test_offset_coupling_worked_values(offset_m, expected_db):
    assert_allclose(loss_db_from_transmittance(offset_coupling(W, W, offset_m)), expected_db, atol=DB_TOLERANCE)
    assert_allclose(
        loss_db_from_transmittance(coupling_efficiency(W, W, LAMBDA, offset_m=offset_m)), expected_db, atol=DB_TOLERANCE
    )


@pytest.mark.parametrize(("ratio", "expected_db"), [(1.2, 0.1436), (2.0, 1.9382)])  # REFERENCES.md (D)
def test_offset_coupling_mode_field_mismatch_worked_values(ratio, expected_db):
    assert_allclose(loss_db_from_transmittance(offset_coupling(W, ratio * W, 0.0)), expected_db, atol=DB_TOLERANCE)
    assert_allclose(
        loss_db_from_transmittance(coupling_efficiency(W, ratio * W, LAMBDA)), expected_db, atol=DB_TOLERANCE
    )


@pytest.mark.parametrize(("n", "expected_db"), [(1.0, 0.1470), (1.46, 0.3132)])  # REFERENCES.md (D)
def test_tilt_coupling_one_degree_worked_values(n, expected_db):
    assert_allclose(
        loss_db_from_transmittance(tilt_coupling(W, ONE_DEGREE, LAMBDA, n=n)), expected_db, atol=DB_TOLERANCE
    )
    assert_allclose(
        loss_db_from_transmittance(coupling_efficiency(W, W, LAMBDA, tilt_rad=ONE_DEGREE, n=n)),
        expected_db,
        atol=DB_TOLERANCE,
    )


@pytest.mark.parametrize(("gap_m", "n", "expected_db"), [(10e-6, 1.0, 0.0360), (50e-6, 1.46, 0.4045)])
def test_gap_coupling_worked_values(gap_m, n, expected_db):
    # REFERENCES.md: gap 10 µm in air 0.0360 dB, 50 µm in n = 1.46 0.4045 dB (D)
    assert_allclose(loss_db_from_transmittance(gap_coupling(W, gap_m, LAMBDA, n=n)), expected_db, atol=DB_TOLERANCE)
    assert_allclose(
        loss_db_from_transmittance(coupling_efficiency(W, W, LAMBDA, separation_m=gap_m, n=n)),
        expected_db,
        atol=DB_TOLERANCE,
    )


def test_coupling_efficiency_broadcasts_over_wavelength():
    wavelengths_m = np.array([1.31e-6, 1.55e-6, 1.625e-6])
    joint = dict(offset_m=1e-6, tilt_rad=0.01, separation_m=20e-6)
    efficiency = coupling_efficiency(W, 5.6e-6, wavelengths_m, **joint)
    assert efficiency.shape == (3,)
    one_by_one = [coupling_efficiency(W, 5.6e-6, wavelength_m, **joint) for wavelength_m in wavelengths_m]
    assert_allclose(efficiency, one_by_one, rtol=1e-15)


def test_coupling_efficiency_rejects_negative_separation():
    with pytest.raises(ValueError, match="separation"):
        coupling_efficiency(W, W, LAMBDA, separation_m=-1e-6)


# --- The general overlap reduces to each published closed form (Ghatak & Thyagarajan 1998) ---


@FAST
@given(w1=waists, w2=waists, offset_m=offsets, wavelength_m=wavelengths)
def test_coupling_efficiency_reduces_to_offset_coupling(w1, w2, offset_m, wavelength_m):
    # eq 8.69 with the mismatch factor; rtol 1e-12 allows a few roundings in either expression
    assert_allclose(
        coupling_efficiency(w1, w2, wavelength_m, offset_m=offset_m), offset_coupling(w1, w2, offset_m), rtol=1e-12
    )


@FAST
@given(w=waists, tilt_rad=tilts, wavelength_m=wavelengths, n=indices)
def test_coupling_efficiency_reduces_to_tilt_coupling(w, tilt_rad, wavelength_m, n):
    # eq 8.75
    assert_allclose(
        coupling_efficiency(w, w, wavelength_m, tilt_rad=tilt_rad, n=n),
        tilt_coupling(w, tilt_rad, wavelength_m, n=n),
        rtol=1e-12,
    )


@FAST
@given(w=waists, gap_m=separations, wavelength_m=wavelengths, n=indices)
def test_coupling_efficiency_reduces_to_gap_coupling_exactly(w, gap_m, wavelength_m, n):
    # eq 8.81: for equal waists the exact overlap 4w⁴/(4w⁴ + (λD/πn)²) is 1/(1 + D̂²) exactly
    assert_allclose(
        coupling_efficiency(w, w, wavelength_m, separation_m=gap_m, n=n),
        gap_coupling(w, gap_m, wavelength_m, n=n),
        rtol=1e-12,
    )


def test_coupling_efficiency_mismatched_gap_kogelnik_form():
    # Kogelnik 1964 (from memory): a waist w1 meeting a waist w2 after a gap D couples
    # 4 / ((w1/w2 + w2/w1)² + (λD/(π n w1 w2))²)
    w1, w2, gap_m, n = 4.0e-6, 6.5e-6, 40e-6, 1.2
    expected = 4.0 / ((w1 / w2 + w2 / w1) ** 2 + (LAMBDA * gap_m / (np.pi * n * w1 * w2)) ** 2)
    assert_allclose(coupling_efficiency(w1, w2, LAMBDA, separation_m=gap_m, n=n), expected, rtol=1e-13)


# --- Independent numerical overlap integrals on a 2-D grid ---

GRID = np.linspace(-45e-6, 45e-6, 601)


def _gaussian_field(x, y, q, k):
    # Kogelnik & Li convention: exp(−ik r²/(2q)), q = z + i z_R (physical q in the medium)
    return np.exp(-1j * k * (x**2 + y**2) / (2.0 * q))


def _grid_overlap(u1, u2):
    return np.abs(np.sum(u1 * np.conj(u2))) ** 2 / (np.sum(np.abs(u1) ** 2) * np.sum(np.abs(u2) ** 2))


CASE = dict(w1=5.2e-6, w2=6.3e-6, offset=2.0e-6, tilt=0.02, separation=30e-6, n=1.46)


def test_coupling_efficiency_matches_grid_overlap_at_second_waist():
    # Mode 1 propagated analytically (Kogelnik & Li) to mode 2's waist plane, tilt applied as the
    # linear phase exp(−ikθ(x − d)) of a wave heading toward +x (carrier exp(−ikz)).
    # The Gaussians are sampled over ±8 spot radii with 0.15 µm steps: the rectangle-rule sum
    # of a smooth, decayed integrand is accurate far below the 1e-6 tolerance.
    c = CASE
    k = 2.0 * np.pi * c["n"] / LAMBDA
    x, y = np.meshgrid(GRID, GRID, indexing="ij")
    z_r1 = np.pi * c["w1"] ** 2 * c["n"] / LAMBDA
    z_r2 = np.pi * c["w2"] ** 2 * c["n"] / LAMBDA
    u1 = _gaussian_field(x - c["offset"], y, c["separation"] + 1j * z_r1, k) * np.exp(-1j * k * c["tilt"] * x)
    u2 = _gaussian_field(x, y, 1j * z_r2, k)
    expected = _grid_overlap(u1, u2)
    actual = coupling_efficiency(
        c["w1"], c["w2"], LAMBDA, offset_m=c["offset"], tilt_rad=c["tilt"], separation_m=c["separation"], n=c["n"]
    )
    assert_allclose(actual, expected, rtol=1e-6)


def test_coupling_efficiency_matches_grid_overlap_at_first_waist_with_fft_propagation():
    # Geometry check, independent of the q-parameter algebra: at mode 1's own waist plane, mode 1
    # sits at x = d − θD (its axis reaches d after the gap D) and is tilted by θ; mode 2 is
    # carried back by D with the paraxial angular-spectrum propagator exp(−i(kx² + ky²)D/(2k))
    # (Goodman, Introduction to Fourier Optics, Fresnel transfer function; sign for exp(−ikz)).
    c = CASE
    k = 2.0 * np.pi * c["n"] / LAMBDA
    x, y = np.meshgrid(GRID, GRID, indexing="ij")
    z_r1 = np.pi * c["w1"] ** 2 * c["n"] / LAMBDA
    z_r2 = np.pi * c["w2"] ** 2 * c["n"] / LAMBDA
    centre = c["offset"] - c["tilt"] * c["separation"]
    u1 = _gaussian_field(x - centre, y, 1j * z_r1, k) * np.exp(-1j * k * c["tilt"] * x)
    spatial_frequency = 2.0 * np.pi * np.fft.fftfreq(GRID.size, GRID[1] - GRID[0])
    kx, ky = np.meshgrid(spatial_frequency, spatial_frequency, indexing="ij")
    u2_at_waist = _gaussian_field(x, y, 1j * z_r2, k)
    u2 = np.fft.ifft2(np.fft.fft2(u2_at_waist) * np.exp(-1j * (kx**2 + ky**2) * c["separation"] / (2.0 * k)))
    expected = _grid_overlap(u1, u2)
    actual = coupling_efficiency(
        c["w1"], c["w2"], LAMBDA, offset_m=c["offset"], tilt_rad=c["tilt"], separation_m=c["separation"], n=c["n"]
    )
    assert_allclose(actual, expected, rtol=1e-6)


def test_coupling_efficiency_tilt_toward_offset_side_helps_after_a_gap():
    # Same geometry as above: with θ·d > 0 mode 1's waist sits nearer mode 2's axis (d − θD)
    # than with θ·d < 0 (d + |θ|D), so it couples better.
    c = CASE
    common = dict(offset_m=c["offset"], separation_m=c["separation"], n=c["n"])
    toward = coupling_efficiency(c["w1"], c["w2"], LAMBDA, tilt_rad=c["tilt"], **common)
    away = coupling_efficiency(c["w1"], c["w2"], LAMBDA, tilt_rad=-c["tilt"], **common)
    assert toward > away


# Two elliptical modes (principal axes aligned) across 25 µm of a medium of index 1.46; radii
# along the offset's axis first, then across it.
ELLIPTICAL = dict(w1=(3.0e-6, 2.2e-6), w2=(2.5e-6, 4.0e-6), offset=1.2e-6, tilt=np.deg2rad(3.0),
                  separation=25e-6, n=1.46)


@pytest.mark.parametrize("azimuth_rad", [0.0, np.pi, np.pi / 2, 2.2], ids=["along", "against", "across", "2.2rad"])
def test_coupling_efficiency_tilt_azimuth_matches_fft_overlap(azimuth_rad):
    # 2-D numerical overlap with Fresnel propagation (tests/numeric_overlap.py): the launched mode
    # at its waist, tilted toward azimuth ψ from the offset, carried over the gap by the angular
    # spectrum; the offset along x. The sums are exact far below 1e-6 (see that module).
    c = ELLIPTICAL
    expected = numeric_overlap.overlap_at_azimuth(c["w1"], c["w2"], LAMBDA, offset_m=c["offset"], tilt_rad=c["tilt"],
                                                  azimuth_rad=azimuth_rad, gap_m=c["separation"], n=c["n"])
    actual = coupling_efficiency_tilt_azimuth(*c["w1"], *c["w2"], LAMBDA, offset_m=c["offset"], tilt_rad=c["tilt"],
                                              azimuth_cosine=np.cos(azimuth_rad), separation_m=c["separation"],
                                              n=c["n"])
    assert_allclose(actual, expected, rtol=1e-6)
    # the geometry the numerical overlap rests on: the tilted beam reaches the offset after the gap
    tilt_xy = (c["tilt"] * np.cos(azimuth_rad), c["tilt"] * np.sin(azimuth_rad))
    centroid = numeric_overlap.centroid_at_gap_end(c["w1"], LAMBDA, offset_xy_m=(c["offset"], 0.0), tilt_xy_rad=tilt_xy,
                                                   gap_m=c["separation"], n=c["n"])
    assert_allclose(centroid, (c["offset"], 0.0), atol=1e-12)


# --- Invariants (hypothesis) ---


@FAST
@given(
    w1=waists, w2=waists, wavelength_m=wavelengths, offset_m=offsets, tilt_rad=tilts, separation_m=separations,
    n=indices,
)
def test_coupling_efficiency_is_a_fraction(w1, w2, wavelength_m, offset_m, tilt_rad, separation_m, n):
    efficiency = coupling_efficiency(
        w1, w2, wavelength_m, offset_m=offset_m, tilt_rad=tilt_rad, separation_m=separation_m, n=n
    )
    # Cauchy–Schwarz bounds the overlap by 1; 1e-15 allows the last rounding of the prefactor
    assert 0.0 <= efficiency <= 1.0 + 1e-15


@FAST
@given(w=waists, wavelength_m=wavelengths, n=indices)
def test_coupling_efficiency_identical_aligned_modes_couple_exactly(w, wavelength_m, n):
    assert coupling_efficiency(w, w, wavelength_m, n=n) == 1.0


@FAST
@given(
    w1=waists, w2=waists, wavelength_m=wavelengths, separation_m=separations, n=indices,
    offset_m=offsets, extra_m=st.floats(1e-8, 5e-6),
)
def test_coupling_efficiency_decreases_with_offset(w1, w2, wavelength_m, separation_m, n, offset_m, extra_m):
    # Without tilt the offset penalty exp(−2d²·Re(1/S)) grows with |d| (Re(1/S) > 0)
    near = coupling_efficiency(w1, w2, wavelength_m, offset_m=abs(offset_m), separation_m=separation_m, n=n)
    far = coupling_efficiency(w1, w2, wavelength_m, offset_m=-(abs(offset_m) + extra_m), separation_m=separation_m, n=n)
    assert far <= near


@FAST
@given(
    w1=waists, w2=waists, wavelength_m=wavelengths, separation_m=separations, n=indices,
    tilt_rad=tilts, extra_rad=st.floats(1e-5, 0.02),
)
def test_coupling_efficiency_decreases_with_tilt(w1, w2, wavelength_m, separation_m, n, tilt_rad, extra_rad):
    small = coupling_efficiency(w1, w2, wavelength_m, tilt_rad=abs(tilt_rad), separation_m=separation_m, n=n)
    large = coupling_efficiency(
        w1, w2, wavelength_m, tilt_rad=-(abs(tilt_rad) + extra_rad), separation_m=separation_m, n=n
    )
    assert large <= small


@FAST
@given(
    w1=waists, w2=waists, wavelength_m=wavelengths, tilt_rad=tilts, n=indices,
    separation_m=separations, extra_m=st.floats(1e-7, 100e-6),
)
def test_coupling_efficiency_decreases_with_separation(w1, w2, wavelength_m, tilt_rad, n, separation_m, extra_m):
    # At zero offset both the mode-size factor and the tilt penalty worsen with the gap. (With an
    # offset, a gap can reduce the offset penalty, so this holds only at zero offset.)
    short = coupling_efficiency(w1, w2, wavelength_m, tilt_rad=tilt_rad, separation_m=separation_m, n=n)
    long = coupling_efficiency(w1, w2, wavelength_m, tilt_rad=tilt_rad, separation_m=separation_m + extra_m, n=n)
    assert long <= short


@FAST
@given(
    w1=waists, w2=waists, wavelength_m=wavelengths, offset_m=offsets, tilt_rad=tilts, separation_m=separations,
    n=indices,
)
def test_coupling_efficiency_is_reciprocal(w1, w2, wavelength_m, offset_m, tilt_rad, separation_m, n):
    # Reciprocity of the overlap (Kogelnik 1964, from memory): seen from mode 2 looking back,
    # mode 1's axis crosses mode 1's waist plane at d − θD with the opposite tilt.
    forward = coupling_efficiency(
        w1, w2, wavelength_m, offset_m=offset_m, tilt_rad=tilt_rad, separation_m=separation_m, n=n
    )
    backward = coupling_efficiency(
        w2, w1, wavelength_m, offset_m=offset_m - tilt_rad * separation_m, tilt_rad=-tilt_rad,
        separation_m=separation_m, n=n,
    )
    # absolute tolerance: efficiencies far below 1e-12 differ only in rounding of their exponent
    assert_allclose(backward, forward, rtol=1e-9, atol=1e-14)
