"""Tests of linkbudget.physics.thinfilm.

Outside sources: the `tmm` reference library (S. J. Byrnes, arXiv:1603.02720: `coh_tmm` for
coherent stacks, `inc_tmm` for incoherent layers; N = n + iκ with κ ≥ 0 for loss, as here), the
published values of /work/shared/REFERENCES.md ("Indices and Fresnel"; Macleod, "Thin-Film
Optical Filters"; Hecht, "Optics"), and textbook identities named beside each test.
"""

import warnings

import numpy as np
import pytest
import tmm
from hypothesis import assume, given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp
from numpy.testing import assert_allclose

from linkbudget.physics.fresnel import interface_power_coefficients
from linkbudget.physics.thinfilm import coherent_stack, incoherent_slab, quarter_wave_thickness_m
from linkbudget.physics.validity import ValidityWarning

# Agreement with tmm required by the project brief (absolute, in R and T).
TMM_TOLERANCE = 1e-9
# Float rounding of a stack of a few tens of 2x2 products on O(1) numbers.
ROUNDING = 1e-12
N_WAVELENGTHS = 3
# tmm multiplies unscaled transfer matrices whose entries grow as exp(Σ|Im δ|) and overflow
# near exp(709); cases beyond this total single-pass opacity are outside the reference's range
# (tmm itself caps each layer at Im δ = 35).
TMM_MAX_OPACITY = 500.0

real_part = st.floats(1.0, 4.0)
kappa = st.floats(0.0, 2.0)
angle = st.floats(0.0, np.deg2rad(80.0))
linear = st.sampled_from(["s", "p"])
wavelengths = hnp.arrays(float, N_WAVELENGTHS, elements=st.floats(0.8e-6, 2.0e-6))
hypothesis_settings = settings(max_examples=150, derandomize=True, deadline=None)


@st.composite
def layer_stacks(draw, *, max_kappa=2.0):
    """(index (n_layers, N_WAVELENGTHS), thickness (n_layers,)) of 1 to 30 layers, 0-2 um."""
    n_layers = draw(st.integers(1, 30))
    shape = (n_layers, N_WAVELENGTHS)
    real = draw(hnp.arrays(float, shape, elements=real_part))
    imag = draw(hnp.arrays(float, shape, elements=st.floats(0.0, max_kappa)))
    thickness = draw(hnp.arrays(float, n_layers, elements=st.floats(0.0, 2e-6)))
    return real + 1j * imag, thickness


def tmm_coherent(polarization, layers, thickness, wavelength_m, n_incident, n_exit, angle_rad):
    """R, T from tmm.coh_tmm, one wavelength at a time; also the total opacity Σ|Im δ|."""
    reflectance, transmittance, opacity = [], [], 0.0
    for k, lam in enumerate(wavelength_m):
        n_list = np.array([n_incident, *layers[:, k], n_exit], dtype=complex)
        angles = tmm.list_snell(n_list, angle_rad)
        delta = 2 * np.pi * n_list[1:-1] * np.cos(angles[1:-1]) * thickness / lam
        opacity = max(opacity, np.sum(np.minimum(np.abs(delta.imag), 35.0)))
        with np.errstate(all="ignore"):  # tmm overflows on opaque stacks; those draws are skipped
            result = tmm.coh_tmm(polarization, n_list, [np.inf, *thickness, np.inf], angle_rad, lam)
        reflectance.append(result["R"])
        transmittance.append(result["T"])
    return np.array(reflectance), np.array(transmittance), opacity


# --- against the tmm reference library ---------------------------------------------------------


@hypothesis_settings
@given(
    stack=layer_stacks(),
    wavelength_m=wavelengths,
    n_incident=real_part,
    n_exit_real=real_part,
    n_exit_kappa=kappa,
    angle_rad=angle,
    polarization=linear,
)
def test_coherent_stack_matches_tmm_coh_tmm(
    stack, wavelength_m, n_incident, n_exit_real, n_exit_kappa, angle_rad, polarization
):
    layers, thickness = stack
    n_exit = n_exit_real + 1j * n_exit_kappa
    expected_r, expected_t, opacity = tmm_coherent(
        polarization, layers, thickness, wavelength_m, n_incident, n_exit, angle_rad
    )
    assume(opacity < TMM_MAX_OPACITY)
    response = coherent_stack(
        layers,
        thickness,
        wavelength_m,
        n_incident=n_incident,
        n_exit=n_exit,
        angle_rad=angle_rad,
        polarization=polarization,
    )
    assert_allclose(response.reflectance, expected_r, rtol=0, atol=TMM_TOLERANCE)
    assert_allclose(response.transmittance, expected_t, rtol=0, atol=TMM_TOLERANCE)


@hypothesis_settings
@given(
    n_slab_real=real_part,
    n_slab_kappa=st.floats(0.0, 1e-3),
    thickness_m=st.floats(1e-6, 5e-3),
    wavelength_m=wavelengths,
    n_before=real_part,
    n_after_real=real_part,
    n_after_kappa=kappa,
    angle_rad=angle,
    polarization=linear,
)
def test_incoherent_slab_matches_tmm_inc_tmm(
    n_slab_real,
    n_slab_kappa,
    thickness_m,
    wavelength_m,
    n_before,
    n_after_real,
    n_after_kappa,
    angle_rad,
    polarization,
):
    # tmm's incoherent transfer matrix divides by the face transmittances, so it cannot
    # represent total internal reflection at either face; those cases are tested below.
    tangential = n_before * np.sin(angle_rad)
    assume(tangential < 0.999 * min(n_slab_real, n_after_real))
    n_slab = n_slab_real + 1j * n_slab_kappa
    n_after = n_after_real + 1j * n_after_kappa
    expected_r, expected_t = [], []
    for lam in wavelength_m:
        result = tmm.inc_tmm(
            polarization,
            [n_before, n_slab, n_after],
            [np.inf, thickness_m, np.inf],
            ["i", "i", "i"],
            angle_rad,
            lam,
        )
        expected_r.append(result["R"])
        expected_t.append(result["T"])
    response = incoherent_slab(
        n_slab,
        thickness_m,
        wavelength_m,
        n_before=n_before,
        n_after=n_after,
        angle_rad=angle_rad,
        polarization=polarization,
    )
    assert_allclose(response.reflectance, expected_r, rtol=0, atol=TMM_TOLERANCE)
    assert_allclose(response.transmittance, expected_t, rtol=0, atol=TMM_TOLERANCE)


# --- published values (REFERENCES.md "Indices and Fresnel") -----------------------------------

AIR, MGF2, GLASS, HIGH = 1.0, 1.38, 1.52, 2.35
DESIGN_WAVELENGTH_M = 550e-9


def test_quarter_wave_thickness_m_mgf2_550nm():
    # REFERENCES.md (C/D): quarter-wave MgF2 (1.38) at 550 nm is 99.638 nm thick.
    assert_allclose(
        quarter_wave_thickness_m(MGF2, DESIGN_WAVELENGTH_M), 99.638e-9, rtol=0, atol=1e-12
    )
    assert_allclose(
        quarter_wave_thickness_m(MGF2, DESIGN_WAVELENGTH_M, order=3), 3 * 99.638e-9, atol=3e-12
    )


def test_coherent_stack_quarter_wave_mgf2_on_glass():
    # Macleod ch. 3 / Hecht (REFERENCES.md C/D): R = ((n0 ns - n1^2)/(n0 ns + n1^2))^2 = 1.2601 %.
    thickness = quarter_wave_thickness_m(MGF2, DESIGN_WAVELENGTH_M)
    response = coherent_stack(
        [MGF2], [thickness], DESIGN_WAVELENGTH_M, n_incident=AIR, n_exit=GLASS
    )
    formula = ((AIR * GLASS - MGF2**2) / (AIR * GLASS + MGF2**2)) ** 2
    assert_allclose(response.reflectance, formula, rtol=0, atol=ROUNDING)
    assert_allclose(response.reflectance, 0.012601, rtol=0, atol=1e-6)  # ±1 in the last digit


def test_coherent_stack_half_wave_gives_bare_substrate():
    # Macleod (REFERENCES.md): a half-wave layer is absent at its design wavelength; bare glass
    # 1.52 reflects 4.2580 %.
    thickness = quarter_wave_thickness_m(MGF2, DESIGN_WAVELENGTH_M, order=2)
    response = coherent_stack(
        [MGF2], [thickness], DESIGN_WAVELENGTH_M, n_incident=AIR, n_exit=GLASS
    )
    assert_allclose(response.reflectance, 0.042580, rtol=0, atol=1e-6)


def test_coherent_stack_quarter_wave_mirror_hl4h():
    # REFERENCES.md (D): (HL)^4 H, nH = 2.35, nL = 1.38 on 1.52 -> R = 0.984552, matching
    # ((1 - Y)/(1 + Y))^2 with Y = (nH/nL)^(2N) nH^2/ns (closed form from memory).
    indices = [HIGH, MGF2] * 4 + [HIGH]
    thickness = [quarter_wave_thickness_m(n, DESIGN_WAVELENGTH_M) for n in indices]
    response = coherent_stack(
        indices, thickness, DESIGN_WAVELENGTH_M, n_incident=AIR, n_exit=GLASS
    )
    admittance = (HIGH / MGF2) ** 8 * HIGH**2 / GLASS
    closed_form = ((1 - admittance) / (1 + admittance)) ** 2
    assert_allclose(response.reflectance, closed_form, rtol=0, atol=ROUNDING)
    assert_allclose(response.reflectance, 0.984552, rtol=0, atol=1e-6)
    assert_allclose(response.absorptance, 0.0, rtol=0, atol=ROUNDING)


def test_coherent_stack_single_film_airy_formula_over_sweep():
    # Single lossless film at normal incidence (Born & Wolf, single-film reflectance, section
    # from memory §7.6.1): R = (r1² + r2² + 2 r1 r2 cos 2δ)/(1 + r1² r2² + 2 r1 r2 cos 2δ),
    # δ = 2π n d/λ, with r1, r2 the amplitude reflectances of the two faces.
    wavelength_m = np.linspace(400e-9, 1600e-9, 301)
    thickness = 0.8e-6
    r1 = (AIR - MGF2) / (AIR + MGF2)
    r2 = (MGF2 - GLASS) / (MGF2 + GLASS)
    cos_2delta = np.cos(4 * np.pi * MGF2 * thickness / wavelength_m)
    expected = (r1**2 + r2**2 + 2 * r1 * r2 * cos_2delta) / (
        1 + r1**2 * r2**2 + 2 * r1 * r2 * cos_2delta
    )
    response = coherent_stack([MGF2], [thickness], wavelength_m, n_incident=AIR, n_exit=GLASS)
    assert response.reflectance.shape == (301,)
    assert_allclose(response.reflectance, expected, rtol=0, atol=ROUNDING)


# --- invariants ---------------------------------------------------------------------------------


@hypothesis_settings
@given(stack=layer_stacks(max_kappa=0.0), wavelength_m=wavelengths, n_incident=real_part,
       n_exit=real_part, angle_rad=angle, polarization=linear)
def test_coherent_stack_lossless_absorbs_nothing(
    stack, wavelength_m, n_incident, n_exit, angle_rad, polarization
):
    # Energy conservation (Born & Wolf): lossless layers between lossless media, R + T = 1.
    layers, thickness = stack
    response = coherent_stack(
        layers, thickness, wavelength_m, n_incident=n_incident, n_exit=n_exit,
        angle_rad=angle_rad, polarization=polarization,
    )
    assert_allclose(response.absorptance, 0.0, rtol=0, atol=ROUNDING)


@settings(max_examples=60, derandomize=True, deadline=None)
@given(stack=layer_stacks(), wavelength_m=wavelengths, n_incident=real_part,
       angle_rad=angle, polarization=linear)
def test_coherent_stack_absorptance_between_zero_and_one(
    stack, wavelength_m, n_incident, angle_rad, polarization
):
    # Passive layers and a lossless incident medium (Byrnes 2016): 0 <= R, T, A <= 1.
    layers, thickness = stack
    response = coherent_stack(
        layers, thickness, wavelength_m, n_incident=n_incident, n_exit=1.5 + 0.1j,
        angle_rad=angle_rad, polarization=polarization,
    )
    for values in (response.reflectance, response.transmittance, response.absorptance):
        assert np.all(values >= -ROUNDING) and np.all(values <= 1 + ROUNDING)


@settings(max_examples=60, derandomize=True, deadline=None)
@given(stack=layer_stacks(max_kappa=0.5), wavelength_m=wavelengths,
       position=st.integers(0, 30), extra_real=real_part, extra_kappa=kappa,
       angle_rad=angle, polarization=linear)
def test_coherent_stack_zero_thickness_layer_changes_nothing(
    stack, wavelength_m, position, extra_real, extra_kappa, angle_rad, polarization
):
    # Limit identity (Macleod ch. 2): a layer of zero thickness has the unit characteristic matrix.
    layers, thickness = stack
    position = min(position, layers.shape[0])
    extra = np.full((1, N_WAVELENGTHS), extra_real + 1j * extra_kappa)
    with_extra = np.concatenate([layers[:position], extra, layers[position:]])
    thickness_extra = np.concatenate([thickness[:position], [0.0], thickness[position:]])
    common = dict(n_incident=1.2, n_exit=2.0, angle_rad=angle_rad, polarization=polarization)
    plain = coherent_stack(layers, thickness, wavelength_m, **common)
    padded = coherent_stack(with_extra, thickness_extra, wavelength_m, **common)
    assert_allclose(padded.reflectance, plain.reflectance, rtol=0, atol=1e-10)
    assert_allclose(padded.transmittance, plain.transmittance, rtol=0, atol=1e-10)


@settings(max_examples=60, derandomize=True, deadline=None)
@given(stack=layer_stacks(max_kappa=0.0), wavelength_m=wavelengths,
       angle_rad=st.floats(0.0, np.deg2rad(60.0)), polarization=linear)
def test_coherent_stack_reversed_keeps_transmittance(stack, wavelength_m, angle_rad, polarization):
    # Reciprocity (Born & Wolf; Byrnes 2016): between lossless media, T is the same from either
    # side, at the angle Snell's law gives in the exit medium.
    layers, thickness = stack
    n_in, n_out = 1.3, 2.2
    exit_angle = np.arcsin(n_in * np.sin(angle_rad) / n_out)
    forward = coherent_stack(layers, thickness, wavelength_m, n_incident=n_in, n_exit=n_out,
                             angle_rad=angle_rad, polarization=polarization)
    backward = coherent_stack(layers[::-1], thickness[::-1], wavelength_m, n_incident=n_out,
                              n_exit=n_in, angle_rad=exit_angle, polarization=polarization)
    assert_allclose(backward.transmittance, forward.transmittance, rtol=0, atol=1e-10)


def test_coherent_stack_index_matched_reflects_nothing():
    # Identity (Fresnel equations with equal indices): layers index-matched to both media.
    response = coherent_stack(
        [1.5, 1.5], [100e-9, 1e-6], [1e-6, 1.5e-6], n_incident=1.5, n_exit=1.5, angle_rad=0.5
    )
    assert_allclose(response.reflectance, 0.0, rtol=0, atol=ROUNDING)
    assert_allclose(response.transmittance, 1.0, rtol=0, atol=ROUNDING)


@pytest.mark.parametrize("index", [1.5, 2.1 + 0.3j])
def test_coherent_stack_film_of_exit_index_is_bare_interface(index):
    # Identity: a film index-matched to the substrate only moves the interface, whose Fresnel
    # powers (fresnel.interface_power_coefficients, checked against tmm) are unchanged; T is
    # counted after the film, so it also carries the flux-law decay exp(-4πκd/λ) (Born & Wolf).
    thickness, wavelength_m = 50e-9, 1e-6
    response = coherent_stack([index], [thickness], [wavelength_m], n_incident=1.0, n_exit=index)
    bare_r, bare_t = interface_power_coefficients(1.0, index)
    decay = np.exp(-4 * np.pi * np.imag(index) * thickness / wavelength_m)
    assert_allclose(response.reflectance, bare_r, rtol=0, atol=ROUNDING)
    assert_allclose(response.transmittance, bare_t * decay, rtol=0, atol=ROUNDING)


@pytest.mark.parametrize("polarization", ["s", "p", "unpolarized"])
def test_coherent_stack_no_layers_is_bare_interface(polarization):
    # Zero layers: the Fresnel interface (fresnel.interface_power_coefficients, itself checked
    # against tmm in test_fresnel.py).
    wavelength_m = np.array([0.8e-6, 1.3e-6, 1.55e-6])
    response = coherent_stack(
        np.empty((0, 1)), [], wavelength_m, n_incident=1.0, n_exit=0.14 + 3.697j,
        angle_rad=0.7, polarization=polarization,
    )
    expected_r, expected_t = interface_power_coefficients(
        1.0, 0.14 + 3.697j, angle_rad=0.7, polarization=polarization
    )
    assert_allclose(response.reflectance, np.full(3, expected_r), rtol=0, atol=ROUNDING)
    assert_allclose(response.transmittance, np.full(3, expected_t), rtol=0, atol=ROUNDING)


def test_coherent_stack_unpolarized_is_mean_and_broadcasts_layer_index():
    # Unpolarized light is the mean of the s and p powers (Born & Wolf); a (n_layers, 1) index
    # broadcasts over wavelength like its tiled copy.
    layers = np.array([[2.35], [1.38 + 0.01j], [2.35]])
    thickness = [60e-9, 110e-9, 60e-9]
    wavelength_m = np.linspace(0.5e-6, 1.6e-6, 7)
    common = dict(n_incident=1.0, n_exit=1.52, angle_rad=0.6)
    responses = {
        pol: coherent_stack(layers, thickness, wavelength_m, polarization=pol, **common)
        for pol in ("s", "p", "unpolarized")
    }
    tiled = coherent_stack(np.tile(layers, (1, 7)), thickness, wavelength_m, **common)
    assert_allclose(
        responses["unpolarized"].reflectance,
        0.5 * (responses["s"].reflectance + responses["p"].reflectance),
        rtol=0, atol=ROUNDING,
    )
    assert_allclose(tiled.transmittance, responses["unpolarized"].transmittance, atol=ROUNDING)


def test_coherent_stack_opaque_layers_do_not_overflow():
    # Thirty 2-um gold-like layers (κ = 3.7 at 0.6 um) have a single-pass Im δ of ~2300:
    # T underflows to 0 and R is the front-face reflectance of the first layer (Fresnel).
    layers = np.full(30, 0.14 + 3.697j)
    response = coherent_stack(layers, np.full(30, 2e-6), 0.6e-6, n_incident=1.0, n_exit=1.5)
    bare_r, _ = interface_power_coefficients(1.0, 0.14 + 3.697j)
    assert_allclose(response.transmittance, 0.0, rtol=0, atol=0)
    assert_allclose(response.reflectance, bare_r, rtol=0, atol=ROUNDING)


# --- incoherent slab -----------------------------------------------------------------------------


def test_incoherent_slab_lossless_glass_sums_series():
    # Born & Wolf / Macleod: a lossless slab, face reflectance R = 0.04 (n = 1.5), summed
    # incoherently gives T = (1 - R)/(1 + R) = 0.923077 and R_total = 2R/(1 + R).
    response = incoherent_slab(1.5, 3e-3, [1.31e-6, 1.55e-6], n_before=1.0, n_after=1.0)
    assert_allclose(response.transmittance, 0.96 / 1.04, rtol=0, atol=ROUNDING)
    assert_allclose(response.reflectance, 0.08 / 1.04, rtol=0, atol=ROUNDING)


def test_incoherent_slab_single_pass_normal_incidence_flux_law():
    # Single pass at normal incidence: T = (1 - R)^2 exp(-4πκd/λ) (flux law, Born & Wolf);
    # R = 0.04 to O(κ/n) ≈ 1e-5, hence the tolerance.
    kappa_slab, thickness, wavelength_m = 2e-5, 2e-3, 1.55e-6
    response = incoherent_slab(
        1.5 + 1j * kappa_slab, thickness, wavelength_m, n_before=1.0, n_after=1.0,
        multiple_reflections=False,
    )
    expected = 0.96**2 * np.exp(-4 * np.pi * kappa_slab * thickness / wavelength_m)
    assert_allclose(response.transmittance, expected, rtol=1e-5)
    assert_allclose(response.reflectance, 0.04, rtol=1e-5)


@pytest.mark.parametrize("polarization", ["s", "p"])
def test_incoherent_slab_single_pass_oblique_path(polarization):
    # Flux law along the refracted ray: τ = exp(-α d / cos θr), α = 4πκ/λ,
    # sin θr = sin θ / n
    # (Born & Wolf). Faces change by O(κ/n) ≈ 1e-6 between κ and κ = 0, hence rtol 1e-5.
    n, kappa_slab, thickness, wavelength_m, angle_rad = 1.5, 1e-6, 5e-3, 1.55e-6, 0.9
    common = dict(n_before=1.0, n_after=1.0, angle_rad=angle_rad, polarization=polarization,
                  multiple_reflections=False)
    lossy = incoherent_slab(n + 1j * kappa_slab, thickness, wavelength_m, **common)
    clear = incoherent_slab(n, thickness, wavelength_m, **common)
    cos_refracted = np.sqrt(1 - (np.sin(angle_rad) / n) ** 2)
    alpha = 4 * np.pi * kappa_slab / wavelength_m
    assert_allclose(
        lossy.transmittance / clear.transmittance,
        np.exp(-alpha * thickness / cos_refracted),
        rtol=1e-5,
    )


def test_incoherent_slab_rear_total_internal_reflection():
    # An index-matched entry face and total internal reflection at the rear face (Born & Wolf):
    # a lossless slab sends everything back, T = 0, R = 1.
    response = incoherent_slab(
        1.5, 1e-3, 1e-6, n_before=1.5, n_after=1.0, angle_rad=np.deg2rad(60.0)
    )
    assert_allclose(response.transmittance, 0.0, rtol=0, atol=0)
    assert_allclose(response.reflectance, 1.0, rtol=0, atol=ROUNDING)


# --- warnings and validation -------------------------------------------------------------------


def test_coherent_stack_absorbing_incident_warns():
    # Byrnes 2016: an absorbing incident medium mixes incident and reflected flux.
    with pytest.warns(ValidityWarning, match="incident medium absorbs") as record:
        coherent_stack([1.38], [100e-9], 550e-9, n_incident=1.5 + 0.5j, n_exit=1.52)
    assert len(record) == 1  # once for the unpolarized call, not once per polarization
    with pytest.warns(ValidityWarning, match="incident medium absorbs"):
        incoherent_slab(1.5, 1e-3, 1e-6, n_before=1.5 + 0.5j, n_after=1.0)


def test_coherent_stack_lossless_incident_silent():
    with warnings.catch_warnings():
        warnings.simplefilter("error", ValidityWarning)
        coherent_stack([1.38 + 0.2j], [100e-9], 550e-9, n_incident=1.0, n_exit=1.52)


@pytest.mark.parametrize(
    ("layer_index", "thickness_m", "message"),
    [
        ([[1.5, 1.5, 1.5]], [1e-7], "layer_index must have shape"),
        ([1.5, 2.0], [1e-7], "thickness_m must have shape"),
        ([1.5], [-1e-7], "thickness_m must be finite and >= 0"),
        ([1.5 - 0.1j], [1e-7], "negative imaginary part"),
    ],
)
def test_coherent_stack_rejects_bad_input(layer_index, thickness_m, message):
    with pytest.raises(ValueError, match=message):
        coherent_stack(layer_index, thickness_m, [1e-6, 1.5e-6], n_incident=1.0, n_exit=1.5)


def test_coherent_stack_rejects_bad_wavelength():
    with pytest.raises(ValueError, match="wavelength_m"):
        coherent_stack([1.5], [1e-7], [1e-6, 0.0], n_incident=1.0, n_exit=1.5)


def test_incoherent_slab_rejects_thickness_array():
    with pytest.raises(ValueError, match="thickness_m must be a scalar"):
        incoherent_slab(1.5, [1e-3, 2e-3], 1e-6, n_before=1.0, n_after=1.0)


@pytest.mark.parametrize("order", [0, -1, 1.5, True])
def test_quarter_wave_thickness_m_rejects_order(order):
    with pytest.raises(ValueError, match="order"):
        quarter_wave_thickness_m(1.38, 550e-9, order=order)
