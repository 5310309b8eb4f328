"""Optics through a whole link: materials, bare interfaces, coatings and thick media.

Links are loaded from YAML text and evaluated end to end; the budget rows are compared with
sources outside the project:

- the reference library ``tmm`` (S. J. Byrnes, "Multilayer optical calculations",
  arXiv:1603.02720, 2016): ``coh_tmm`` for coatings and bare faces, ``inc_tmm`` for thick slabs;
- the Fresnel formulae (M. Born and E. Wolf, "Principles of Optics", 7th ed., 1999; E. Hecht,
  "Optics", 5th ed., 2017) and the worked values of REFERENCES.md (labels C/D/M as there);
- the quarter-wave coating formula (H. A. Macleod, "Thin-Film Optical Filters", 4th ed., 2010,
  ch. 3) and the Malitson 1965 Sellmeier coefficients of fused silica (REFERENCES.md, C);
- the lossy-medium flux law α = 4πκ/λ, loss = 10·log10(e)·α·L (Born & Wolf; section from memory).

Indices of catalog materials are taken from ``load_material(name).index(λ)`` and handed to
``tmm`` unchanged, so the comparison tests the chain's optics, not the catalog.
"""

import numpy as np
import pytest
import tmm
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.materials.library import load_material
from linkbudget.physics.thinfilm import incoherent_slab
from tests.result_json import seen
from tests.segments.linktext import evaluate, link_text, only_problem, row

# Both sides compute the same closed-form physics in double precision; 1e-9 leaves room for the
# different order of operations (and is the brief's agreement figure), far below any budget digit.
TIGHT = 1e-9

CHANNELS_M = np.array([1310e-9, 1450e-9, 1550e-9, 1625e-9])
CHANNELS = "channels: [1310 nm, 1450 nm, 1550 nm, 1625 nm]"


def transmittance(loss_db):
    return 10.0 ** (-np.asarray(loss_db) / 10.0)


def total_transmittance(result, case="typ"):
    return transmittance(result.loss_db[case].sum(axis=0))


def index_of(material, wavelength_m=CHANNELS_M):
    return load_material(material).index(wavelength_m)


def fresnel_normal(n1, n2):
    """Normal-incidence power reflectance ((n1 − n2)/(n1 + n2))² (Born & Wolf; Hecht)."""
    return np.abs((n1 - n2) / (n1 + n2)) ** 2


def loss_db(transmitted):
    return -10.0 * np.log10(transmitted)


def tmm_coherent(indices, thicknesses_m, angle_rad, wavelengths_m, polarization):
    """(R, T, A) of a coherent stack from ``tmm.coh_tmm``, over the wavelengths.

    ``indices`` is a list of per-wavelength index arrays (incident medium, layers, exit medium);
    ``polarization`` "unpolarized" is the mean of the s and p powers. A is the power absorbed in
    the layers as ``tmm.absorp_in_each_layer`` reports it (its own Poynting bookkeeping).
    """
    pols = ("s", "p") if polarization == "unpolarized" else (polarization,)
    out = np.zeros((3, len(wavelengths_m)))
    thickness_nm = [np.inf, *(d * 1e9 for d in thicknesses_m), np.inf]
    for k, wavelength_m in enumerate(wavelengths_m):
        for pol in pols:
            data = tmm.coh_tmm(pol, [n[k] for n in indices], thickness_nm, angle_rad, wavelength_m * 1e9)
            absorbed = sum(tmm.absorp_in_each_layer(data)[1:-1])
            out[:, k] += (data["R"], data["T"], absorbed)
    return out / len(pols)


def snell_rad(n_from, angle_rad, n_to):
    """Refraction angle from Snell's law n1·sin θ1 = n2·sin θ2 on the real parts."""
    return np.arcsin(np.real(n_from) * np.sin(angle_rad) / np.real(n_to))


# ---- coatings against tmm ----

# A four-layer stack with catalog materials, a plain index layer and an absorbing layer: thin gold
# (Johnson & Christy 1972, catalog) or an index with κ > 0.
STACKS = {
    "gold": [
        {"material": "tantalum-pentoxide", "quarter_wave": "1550 nm"},
        {"index": 1.8, "thickness": "120 nm"},
        {"material": "gold", "thickness": "6 nm"},
        {"material": "magnesium-fluoride", "quarter_wave": "1550 nm"},
    ],
    "absorbing-index": [
        {"material": "silicon-nitride", "thickness": "190 nm"},
        {"index": "1.9+0.02j", "thickness": "40 nm"},
        {"material": "magnesium-fluoride", "quarter_wave": "1310 nm", "quarter_waves": 2},
    ],
}

ANGLES = [(None, "unpolarized"), ("30 deg", "s"), ("30 deg", "p"), ("30 deg", "unpolarized")]


def layer_index(layer, wavelength_m):
    if "material" in layer:
        return load_material(layer["material"]).index(wavelength_m)
    return np.full(np.shape(wavelength_m), complex(layer["index"]))


def layer_stack(layers):
    """(indices over CHANNELS_M, thicknesses [m]) of the layers, written out independently.

    A quarter-wave layer is λ0/(4·n(λ0)) thick, times the number of quarter waves (Macleod ch. 3).
    """
    indices, thicknesses = [], []
    for layer in layers:
        indices.append(layer_index(layer, CHANNELS_M))
        if "thickness" in layer:
            thicknesses.append(float(layer["thickness"].split()[0]) * 1e-9)
        else:
            design_m = float(layer["quarter_wave"].split()[0]) * 1e-9
            n_design = layer_index(layer, np.array([design_m]))[0].real
            thicknesses.append(layer.get("quarter_waves", 1) * design_m / (4 * n_design))
    return indices, thicknesses


def coated_window(layers, angle, polarization):
    window = {"name": "window", "kind": "medium", "thickness": "3 mm", "material": "fused-silica"}
    if angle is not None:
        window.update(angle=angle, polarization=polarization)
    return [
        {"name": "lens side", "kind": "gap", "length": "5 mm"},
        {"name": "AR coating", "kind": "coating", "layers": layers},
        window,
        {"name": "far side", "kind": "gap", "length": "5 mm"},
    ]


@pytest.mark.parametrize("angle, polarization", ANGLES)
@pytest.mark.parametrize("stack", sorted(STACKS))
def test_coating_row_matches_tmm_coh_tmm(stack, angle, polarization):
    # tmm.coh_tmm with the same indices (air from the catalog before, fused silica after) and the
    # same physical thicknesses: R and -10·log10(T) agree to rounding.
    result = evaluate(coated_window(STACKS[stack], angle, polarization), CHANNELS)
    indices, thicknesses = layer_stack(STACKS[stack])
    angle_rad = 0.0 if angle is None else np.deg2rad(30.0)
    expected_r, expected_t, _ = tmm_coherent(
        [index_of("air"), *indices, index_of("fused-silica")], thicknesses, angle_rad, CHANNELS_M, polarization)
    coating = row(result, "AR coating")
    assert coating.shown_kind == "coating"
    assert_allclose(coating.reflectance_seen, expected_r, rtol=0, atol=TIGHT)
    for case in ("typ", "worst", "best"):
        assert_allclose(coating.loss_db[case], loss_db(expected_t), rtol=0, atol=TIGHT)


@pytest.mark.parametrize("angle, polarization", ANGLES[:3])
def test_bare_exit_face_matches_fresnel_and_tmm(angle, polarization):
    # The window's uncoated exit face is a silica → air interface seen at the refraction angle
    # inside the window (Snell); tmm.coh_tmm of the two half-spaces gives its R and T. (Unpolarized
    # light is partly polarized once it has crossed the oblique coating, so that face alone has no
    # single reference value; the whole window's is checked against tmm.inc_tmm below.)
    result = evaluate(coated_window(STACKS["gold"], angle, polarization), CHANNELS)
    n_air, n_silica = index_of("air"), index_of("fused-silica")
    inside_rad = snell_rad(n_air, 0.0 if angle is None else np.deg2rad(30.0), n_silica)
    expected_r = np.zeros(len(CHANNELS_M))
    expected_t = np.zeros(len(CHANNELS_M))
    for k in range(len(CHANNELS_M)):
        expected_r[k], expected_t[k], _ = tmm_coherent(
            [n_silica[k:k + 1], n_air[k:k + 1]], [], inside_rad[k], CHANNELS_M[k:k + 1], polarization)[:, 0]
    face = row(result, "window → far side")
    assert face.shown_kind == "interface"
    assert_allclose(face.reflectance_seen, expected_r, rtol=0, atol=TIGHT)
    assert_allclose(face.loss_db["typ"], loss_db(expected_t), rtol=0, atol=TIGHT)
    if angle is None:  # normal incidence: the Fresnel formula itself
        assert_allclose(face.reflectance_seen, fresnel_normal(n_silica, n_air), rtol=0, atol=TIGHT)


@pytest.mark.parametrize("angle, polarization", ANGLES)
@pytest.mark.parametrize("stack", sorted(STACKS))
def test_coating_row_energy_balance_and_absorptance_matches_tmm(stack, angle, polarization):
    # R + T + A = 1 with T from the row's loss and R, A from its detail; A is the power absorbed
    # in the layers, which tmm.absorp_in_each_layer sums from its own Poynting fluxes.
    result = evaluate(coated_window(STACKS[stack], angle, polarization), CHANNELS)
    indices, thicknesses = layer_stack(STACKS[stack])
    angle_rad = 0.0 if angle is None else np.deg2rad(30.0)
    *_, expected_a = tmm_coherent(
        [index_of("air"), *indices, index_of("fused-silica")], thicknesses, angle_rad, CHANNELS_M, polarization)
    coating = row(result, "AR coating")
    reflectance, absorptance = coating.reflectance_seen, coating.absorptance_seen
    assert_allclose(reflectance + transmittance(coating.loss_db["typ"]) + absorptance, 1.0, rtol=0, atol=1e-12)
    assert_allclose(absorptance, expected_a, rtol=0, atol=TIGHT)
    assert np.all(absorptance > 1e-3)  # the absorbing layer really absorbs


@pytest.mark.parametrize("angle, polarization", ANGLES)
def test_coating_row_lossless_layers_absorb_nothing(angle, polarization):
    # Lossless films conserve energy exactly (Born & Wolf): A = 0 up to rounding, R + T = 1.
    layers = [{"material": "tantalum-pentoxide", "quarter_wave": "1550 nm"},
              {"index": 2.0, "thickness": "150 nm"},
              {"material": "magnesium-fluoride", "quarter_wave": "1550 nm"}]
    coating = row(evaluate(coated_window(layers, angle, polarization), CHANNELS), "AR coating")
    assert_allclose(coating.absorptance_seen, 0.0, rtol=0, atol=1e-12)
    assert_allclose(coating.reflectance_seen + transmittance(coating.loss_db["typ"]), 1.0, rtol=0, atol=1e-12)


def test_coating_in_json_carries_reflectance_and_absorptance():
    data = linkbudget.result_dict(evaluate(coated_window(STACKS["gold"], None, "unpolarized"), CHANNELS))
    (coating,) = [segment for segment in data["rows"] if segment["kind"] == "coating"]
    for per_polarization in (coating["reflectance"], coating["absorptance"]):
        assert set(per_polarization) == {"s", "p"}
        assert all(len(values) == len(CHANNELS_M) for values in per_polarization.values())


# ---- every interface is visible ----


def media_chain(*indices):
    """gap (n = 1) → one 1 mm medium per index, named A, B, ... → gap (n = 1)."""
    media = [{"name": chr(ord("A") + k), "kind": "medium", "thickness": "1 mm", "index": n}
             for k, n in enumerate(indices)]
    return [{"name": "in", "kind": "gap", "length": "1 mm", "index": 1.0}, *media,
            {"name": "out", "kind": "gap", "length": "1 mm", "index": 1.0}]


def test_interface_rows_one_between_each_pair_of_different_indices():
    # Fresnel at normal incidence (Born & Wolf): R = ((n1 − n2)/(n1 + n2))² for each pair; equal
    # indices (B, C) add no row.
    result = evaluate(media_chain(1.5, 1.7, 1.7, 2.0))
    faces = {r.name: r for r in result.rows if r.shown_kind == "interface"}
    pairs = {"in → A": (1.0, 1.5), "A → B": (1.5, 1.7), "C → D": (1.7, 2.0), "D → out": (2.0, 1.0)}
    assert list(faces) == list(pairs)
    for name, (n1, n2) in pairs.items():
        assert_allclose(faces[name].reflectance_seen, [fresnel_normal(n1, n2)], rtol=1e-12)
        assert_allclose(faces[name].loss_db["worst"], loss_db(1 - fresnel_normal(n1, n2)), rtol=1e-12)
    json_faces = [s for s in linkbudget.result_dict(result)["rows"] if s["kind"] == "interface"]
    assert [s["name"] for s in json_faces] == list(pairs)
    assert_allclose([seen(s, "reflectance")[0] for s in json_faces], [fresnel_normal(*p) for p in pairs.values()],
                    rtol=0, atol=5e-13)  # the JSON writes fractions to 1e-12


def fibre_joint(joint_keys, n_after=1.45):
    return [{"name": "f1", "kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km", "index": 1.4682},
            {"name": "mate", "kind": "connector", "loss": "0.2 dB", **joint_keys},
            {"name": "f2", "kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km", "index": n_after}]


def test_interface_rows_physical_contact_between_fibres_of_different_index():
    result = evaluate(fibre_joint({}))
    (face,) = [r for r in result.rows if r.shown_kind == "interface"]
    assert face.name == "f1 → f2"
    assert_allclose(face.reflectance_seen, [fresnel_normal(1.4682, 1.45)], rtol=1e-12)


def test_interface_rows_index_matched_joint_removes_the_face():
    # Gel or adhesive matched to the fibres: no Fresnel term (STYLE.md identity: an
    # index-matched interface reflects nothing); only the datasheet loss remains.
    result = evaluate(fibre_joint({"joint": "index-matched"}))
    assert [r.shown_kind for r in result.rows] == ["fiber", "connector", "fiber"]
    assert_allclose(result.loss_db["typ"].sum(), 0.2 + 2 * 0.5e-3, rtol=1e-12)


def test_interface_rows_air_gap_joint_gives_two_faces_through_air():
    # Two Fresnel faces, fibre → air and air → fibre, air from the catalog (Ciddor 1996).
    result = evaluate(fibre_joint({"joint": "air-gap"}))
    faces = [r for r in result.rows if r.shown_kind == "interface"]
    assert [f.name for f in faces] == ["f1 → mate gap", "mate gap → f2"]
    n_air = index_of("air", np.array([1550e-9]))
    assert_allclose(faces[0].reflectance_seen, fresnel_normal(1.4682, n_air), rtol=1e-12)
    assert_allclose(faces[1].reflectance_seen, fresnel_normal(n_air, 1.45), rtol=1e-12)


# ---- published worked values through a link ----


def face_after_vacuum(medium_keys, axis="wavelength: 1550 nm", **window):
    chain = [{"name": "vacuum", "kind": "gap", "length": "1 mm", "index": 1.0},
             {"name": "sample", "kind": "medium", "thickness": "1 mm", **medium_keys, **window}]
    return row(evaluate(chain, axis), "vacuum → sample")


@pytest.mark.parametrize("medium", [{"index": 3.4757}, {"material": "silicon-infrared"}])
def test_published_silicon_facet_li_1980(medium):
    # Li 1980: n(1.55 µm) = 3.4757 (C) → R = 30.597 %, 1.5862 dB a face (REFERENCES.md, D; ±1 in
    # the last digit shown: atol 5e-6 and 5e-5 dB).
    face = face_after_vacuum(medium)
    assert_allclose(face.reflectance_seen, [0.30597], atol=5e-6)
    assert_allclose(face.loss_db["typ"], [1.5862], atol=5e-5)


def test_published_silica_face_malitson_sellmeier():
    # Malitson 1965 Sellmeier (REFERENCES.md, C; λ in µm, C squared): n(1.55 µm) = 1.44402 (D),
    # R = 3.3007 %, 0.1458 dB a face (D). The catalog face must equal the Fresnel formula of the
    # hand-written Sellmeier to rounding, and the published digits to ±1 in the last place.
    b, c = (0.6961663, 0.4079426, 0.8974794), (0.0684043, 0.1162414, 9.896161)
    wl_um = 1.55
    n = np.sqrt(1 + sum(bi * wl_um**2 / (wl_um**2 - ci**2) for bi, ci in zip(b, c, strict=True)))
    assert_allclose(n, 1.44402, atol=5e-6)
    face = face_after_vacuum({"material": "fused-silica"})
    assert_allclose(face.reflectance_seen, [fresnel_normal(1.0, n)], rtol=0, atol=TIGHT)
    assert_allclose(face.reflectance_seen, [0.033007], atol=5e-7)
    assert_allclose(face.loss_db["typ"], [0.1458], atol=5e-5)


def test_published_glass_n_1_5_reflects_four_percent():
    # ((1.5 − 1)/(1.5 + 1))² = 0.04 exactly (Hecht; REFERENCES.md 4.000 %).
    face = face_after_vacuum({"index": 1.5})
    assert_allclose(face.reflectance_seen, [0.04], rtol=1e-12)
    assert_allclose(face.loss_db["typ"], [-10 * np.log10(0.96)], rtol=1e-12)


def test_published_brewster_angle_p_polarised_entry_face_loses_nothing():
    # Brewster angle for n = 1.5: 56.310° (REFERENCES.md, C). The rounding of the angle (7e-5°)
    # leaves |r_p|² ~ 1e-12, so the loss is below 1e-9 dB. The s wave at the same angle reflects
    # cos²(2θ_B) = ((n² − 1)/(n² + 1))² (Fresnel with θ_i + θ_t = 90°, Hecht); the angle rounding
    # moves it by ~1e-6.
    p_face = face_after_vacuum({"index": 1.5}, angle="56.310 deg", polarization="p")
    assert p_face.reflectance_seen[0] < 1e-10
    assert 0 <= p_face.loss_db["typ"][0] < 1e-9
    s_face = face_after_vacuum({"index": 1.5}, angle="56.310 deg", polarization="s")
    assert_allclose(s_face.reflectance_seen, [((1.5**2 - 1) / (1.5**2 + 1)) ** 2], atol=1e-5)


@pytest.mark.parametrize("polarization, expected", [("s", 0.09201), ("p", 0.008466)])
def test_published_45_degrees_on_glass(polarization, expected):
    # At 45° on n = 1.5: Rs = 9.201 %, Rp = 0.8466 % (REFERENCES.md, D; 4 digits: rtol 1e-4).
    face = face_after_vacuum({"index": 1.5}, angle="45 deg", polarization=polarization)
    assert_allclose(face.reflectance_seen, [expected], rtol=1e-4)


def quarter_wave_link(quarter_waves=1):
    layer = {"index": 1.38, "quarter_wave": "550 nm"}
    if quarter_waves != 1:
        layer["quarter_waves"] = quarter_waves
    chain = [{"name": "air", "kind": "gap", "length": "1 mm", "index": 1.0},
             {"name": "MgF2", "kind": "coating", "layers": [layer]},
             {"name": "glass", "kind": "medium", "thickness": "1 mm", "index": 1.52}]
    return linkbudget.load(link_text(chain, "wavelength: 550 nm"))


def test_published_quarter_wave_mgf2_on_glass():
    # Macleod ch. 3: R = ((n0·ns − n1²)/(n0·ns + n1²))²; 1.38 on 1.52 → 1.2601 %, quarter-wave
    # thickness at 550 nm 99.638 nm (REFERENCES.md, C/D; ±1 in the last digit shown).
    link = quarter_wave_link()
    assert_allclose(link.segments[1].role().thickness_m, [99.638e-9], atol=5e-13)
    coating = row(linkbudget.evaluate(link), "MgF2")
    assert_allclose(coating.reflectance_seen, [0.012601], atol=5e-7)
    assert_allclose(coating.reflectance_seen, [((1.52 - 1.38**2) / (1.52 + 1.38**2)) ** 2], rtol=1e-12)


def test_published_half_wave_layer_is_absent():
    # A half-wave layer gives back the bare reflectance 4.2580 % (Macleod; REFERENCES.md, D).
    coating = row(linkbudget.evaluate(quarter_wave_link(quarter_waves=2)), "MgF2")
    assert_allclose(coating.reflectance_seen, [fresnel_normal(1.0, 1.52)], rtol=1e-12)
    assert_allclose(coating.reflectance_seen, [0.042580], atol=5e-7)


# ---- multiple reflections in a thick slab ----

SLAB_INDEX = 1.5 + 1e-4j  # α = 4π·1e-4/1.55 µm = 811 /m: τ ≈ 0.44 over 1 mm
# A strongly absorbing film crossed steeply, where α·d/cos θ_r (Snell on the real index) is far
# from the exact decay along the normal: 1.26 dB too high at 72° (the case reported in issue 7).
STRONG_INDEX, STRONG_THICKNESS_M = 1.35 + 0.45j, 0.8e-6


def slab_chain(angle, polarization, multiple_reflections, index=SLAB_INDEX, thickness_m=1e-3):
    slab = {"name": "slab", "kind": "medium", "thickness": f"{thickness_m * 1e6:g} um", "index": str(index),
            "multiple_reflections": multiple_reflections}
    if angle is not None:
        slab.update(angle=f"{angle} deg", polarization=polarization)
    return [{"name": "g1", "kind": "gap", "length": "1 mm", "index": 1.0}, slab,
            {"name": "g2", "kind": "gap", "length": "1 mm", "index": 1.0}]


def tmm_incoherent_slab(angle_rad, polarization, index, thickness_m, wavelength_nm=1550.0):
    pols = ("s", "p") if polarization == "unpolarized" else (polarization,)
    return np.mean([tmm.inc_tmm(pol, [1.0, index, 1.0], [np.inf, thickness_m * 1e9, np.inf], ["i", "i", "i"],
                                angle_rad, wavelength_nm)["T"] for pol in pols])


def normal_decay_transmittance(index, thickness_m, angle_rad, wavelength_m=1550e-9):
    """τ = exp(−4π·Im(N cos θ)·d/λ), θ the complex refraction angle from vacuum (tmm.snell): the
    decay of the refracted wave along the normal (Born & Wolf §14.2)."""
    cos_inside = np.cos(tmm.snell(1.0, index, angle_rad))
    return np.exp(-4 * np.pi * np.imag(index * cos_inside) * thickness_m / wavelength_m)


# s and p separately at any angle, and unpolarized light at normal and at oblique incidence, for a
# weakly absorbing thick slab and a strongly absorbing thin one at 60–80°.
SLAB_CASES = [(SLAB_INDEX, 1e-3, angle, pol) for angle, pol in
              [(None, "unpolarized"), (30, "s"), (30, "p"), (60, "s"), (60, "p"), (60, "unpolarized")]] + [
    (STRONG_INDEX, STRONG_THICKNESS_M, angle, pol) for angle, pol in
    [(None, "unpolarized"), (60, "s"), (60, "p"), (72, "s"), (72, "p"), (72, "unpolarized"), (80, "s"),
     (80, "unpolarized")]]


@pytest.mark.parametrize("index, thickness_m, angle, polarization", SLAB_CASES)
def test_multiple_reflections_total_matches_incoherent_slab_and_tmm_inc_tmm(index, thickness_m, angle,
                                                                            polarization):
    # T = T1·τ·T2/(1 − R1'·R2·τ²) (Katsidis & Siapkas 2002; Born & Wolf), as summed by
    # incoherent_slab and by tmm.inc_tmm. Unpolarized light is the mean of the s and p
    # transmittances of the whole slab (each polarization bounces with its own R).
    result = evaluate(slab_chain(angle, polarization, True, index, thickness_m))
    names = [r.name for r in result.rows]
    assert names == ["g1", "g1 → slab", "slab", "slab → g2", "slab multiple reflections", "g2"]
    angle_rad = 0.0 if angle is None else np.deg2rad(angle)
    reference = tmm_incoherent_slab(angle_rad, polarization, index, thickness_m)
    expected = incoherent_slab(index, thickness_m, np.array([1550e-9]), n_before=1.0, n_after=1.0,
                               angle_rad=angle_rad, polarization=polarization).transmittance
    assert_allclose(expected, [reference], rtol=0, atol=TIGHT)
    assert_allclose(total_transmittance(result), [reference], rtol=0, atol=TIGHT)


@pytest.mark.parametrize("index, thickness_m, angle, polarization", SLAB_CASES)
def test_multiple_reflections_off_is_the_single_pass_product(index, thickness_m, angle, polarization):
    # Without the flag: T = T1·τ·T2 per polarization (Born & Wolf), averaged for unpolarized light;
    # tmm's half-space faces give T1 and T2; τ is the exact decay along the normal, and the bulk
    # row is that single pass alone.
    result = evaluate(slab_chain(angle, polarization, False, index, thickness_m))
    assert "slab multiple reflections" not in [r.name for r in result.rows]
    angle_rad = 0.0 if angle is None else np.deg2rad(angle)
    tau = normal_decay_transmittance(index, thickness_m, angle_rad)
    assert_allclose(transmittance(row(result, "slab").loss_db["typ"]), [tau], rtol=TIGHT)
    pols = ("s", "p") if polarization == "unpolarized" else (polarization,)
    # tmm wants the complex angle in an absorbing incident medium, N·sin θ real (its docstring).
    inside_complex = tmm.snell(1.0, index, angle_rad)
    single_pass = np.mean([tmm.coh_tmm(pol, [1.0, index], [np.inf, np.inf], angle_rad, 1550.0)["T"]
                           * tau * tmm.coh_tmm(pol, [index, 1.0], [np.inf, np.inf], inside_complex, 1550.0)["T"]
                           for pol in pols])
    assert_allclose(total_transmittance(result), [single_pass], rtol=0, atol=TIGHT)
    assert_allclose(incoherent_slab(index, thickness_m, np.array([1550e-9]), n_before=1.0, n_after=1.0,
                                    angle_rad=angle_rad, polarization=polarization,
                                    multiple_reflections=False).transmittance, [single_pass], rtol=0, atol=TIGHT)


def test_strongly_absorbing_film_at_72_degrees_is_not_the_real_angle_path():
    # The reported case: N = 1.35 + 0.45i, 0.8 µm, 72° from air, 1550 nm. α·d/cos θ_r (θ_r from
    # Snell on Re N) overstates the bulk loss by about 1.26 dB; the row is the exact decay.
    angle_rad = np.deg2rad(72.0)
    exact_db = loss_db(normal_decay_transmittance(STRONG_INDEX, STRONG_THICKNESS_M, angle_rad))
    real_angle = snell_rad(1.0, angle_rad, STRONG_INDEX)
    approximate_db = 10 * np.log10(np.e) * 4 * np.pi * 0.45 / 1550e-9 * STRONG_THICKNESS_M / np.cos(real_angle)
    assert approximate_db - exact_db == pytest.approx(1.26, abs=0.01)
    result = evaluate(slab_chain(72, "unpolarized", False, STRONG_INDEX, STRONG_THICKNESS_M))
    assert_allclose(row(result, "slab").loss_db["typ"], [exact_db], rtol=1e-12)


@pytest.mark.parametrize("angle, polarization", ANGLES)
def test_multiple_reflections_coated_window_matches_tmm_inc_tmm(angle, polarization):
    # The coated window of the README example: coherent film stack on an incoherent 3 mm silica
    # slab, summed by tmm.inc_tmm with coherency list [i, c..., i, i]; the chain's coating row,
    # exit face and reflections row must give the same total.
    chain = coated_window(STACKS["gold"], angle, polarization)
    chain[2]["multiple_reflections"] = True
    result = evaluate(chain, CHANNELS)
    indices, thicknesses = layer_stack(STACKS["gold"])
    media = [index_of("air"), *indices, index_of("fused-silica"), index_of("air")]
    d_nm = [np.inf, *(d * 1e9 for d in thicknesses), 3e6, np.inf]
    coherency = ["i", *"c" * len(thicknesses), "i", "i"]
    angle_rad = 0.0 if angle is None else np.deg2rad(30.0)
    pols = ("s", "p") if polarization == "unpolarized" else (polarization,)
    expected = [np.mean([tmm.inc_tmm(pol, [n[k] for n in media], d_nm, coherency, angle_rad, wl * 1e9)["T"]
                         for pol in pols]) for k, wl in enumerate(CHANNELS_M)]
    assert_allclose(total_transmittance(result), expected, rtol=0, atol=TIGHT)


# ---- materials in links ----


def test_material_outside_its_range_is_placed_at_the_material_key():
    # Devore 1951 TiO2 data (catalog titanium-dioxide) hold from 430 to 1530 nm only.
    chain = [{"name": "air", "kind": "gap", "length": "1 mm"},
             {"name": "window", "kind": "medium", "thickness": "1 mm", "material": "titanium-dioxide"}]
    path, message = only_problem(chain)
    assert path == "chain[1].material"
    assert "titanium-dioxide" in message and "430" in message and "1530 nm" in message


def test_material_outside_its_range_in_a_coating_layer():
    chain = [{"name": "air", "kind": "gap", "length": "1 mm"},
             {"name": "film", "kind": "coating", "layers": [{"material": "titanium-dioxide", "thickness": "80 nm"}]},
             {"name": "window", "kind": "medium", "thickness": "1 mm", "material": "fused-silica"}]
    path, message = only_problem(chain)
    assert path == "chain[1].layers[0].material"
    assert "430" in message and "1530 nm" in message


MY_GLASS = """\
name: my-glass
description: Test glass, tabulated n and k
source: invented for this test
table:
  wavelength_unit: um
  columns: [wavelength, n, k]
  rows:
    - [1.50, 1.52, 1.0e-6]
    - [1.55, 1.53, 2.0e-6]
    - [1.60, 1.54, 3.0e-6]
"""


def test_material_user_file_next_to_the_link(tmp_path, monkeypatch):
    # A user material file in the catalog format (linkbudget.materials.library), found next to
    # the link, not in the working directory. At the tabulated 1550 nm: N = 1.53 + 2e-6j, so the
    # face reflects |(N − 1)/(N + 1)|² (Fresnel) and 10 mm lose 10·log10(e)·(4πκ/λ)·L (flux law).
    (tmp_path / "my-glass.yaml").write_text(MY_GLASS, encoding="utf-8")
    chain = [{"name": "vacuum", "kind": "gap", "length": "1 mm", "index": 1.0},
             {"name": "lens", "kind": "medium", "thickness": "10 mm", "material": "./my-glass.yaml"}]
    link_path = tmp_path / "link.yaml"
    link_path.write_text(link_text(chain), encoding="utf-8")
    elsewhere = tmp_path / "elsewhere"
    elsewhere.mkdir()
    monkeypatch.chdir(elsewhere)
    result = linkbudget.evaluate(linkbudget.load(link_path))
    n = 1.53 + 2.0e-6j
    assert_allclose(row(result, "vacuum → lens").reflectance_seen, [fresnel_normal(1.0, n)], rtol=1e-12)
    alpha = 4 * np.pi * 2.0e-6 / 1550e-9
    assert_allclose(row(result, "lens").loss_db["typ"], [10 * np.log10(np.e) * alpha * 10e-3], rtol=1e-12)


# ---- oblique media ----


def kappa_of_attenuation(attenuation_db_per_m, wavelength_m=1550e-9):
    """κ = αλ/(4π) with α = A/(10·log10 e) (the flux law, Born & Wolf)."""
    return attenuation_db_per_m / (10 * np.log10(np.e)) * wavelength_m / (4 * np.pi)


def test_oblique_medium_bulk_path_is_thickness_over_cos_inside_explicit_index():
    # Snell: sin θ_in = sin 30°/1.5 = 1/3, cos θ_in = √(8/9); 1 dB/mm over 2 mm/cos θ_in = 3/√2 dB
    # for weak absorption (κ = 2.8e-5); the exact decay along the normal differs by 2.5e-11 of it.
    chain = [{"name": "vacuum", "kind": "gap", "length": "1 mm", "index": 1.0},
             {"name": "plate", "kind": "medium", "thickness": "2 mm", "index": 1.5, "attenuation": "1 dB/mm",
              "angle": "30 deg"}]
    plate = row(evaluate(chain), "plate").loss_db["typ"]
    assert_allclose(plate, [3 / np.sqrt(2)], rtol=1e-10)
    exact = normal_decay_transmittance(1.5 + 1j * kappa_of_attenuation(1e3), 2e-3, np.deg2rad(30.0))
    assert_allclose(plate, [loss_db(exact)], rtol=1e-12)


def test_oblique_medium_bulk_path_with_catalog_materials():
    # Catalog air before, catalog fused silica with κ = 1e-6: the flux law α = 4πκ/λ over
    # 5 mm/cos θ_in, θ_in from Snell with both catalog indices, at every channel.
    chain = [{"name": "air", "kind": "gap", "length": "1 mm"},
             {"name": "window", "kind": "medium", "thickness": "5 mm", "material": "fused-silica",
              "kappa": 1e-6, "angle": "30 deg"}]
    result = evaluate(chain, CHANNELS)
    inside = snell_rad(index_of("air"), np.deg2rad(30.0), index_of("fused-silica"))
    expected = 10 * np.log10(np.e) * 4 * np.pi * 1e-6 / CHANNELS_M * 5e-3 / np.cos(inside)
    assert_allclose(row(result, "window").loss_db["typ"], expected, rtol=1e-12)


def test_oblique_ray_continues_into_the_next_medium():
    # Two plates in contact with parallel faces, the first tilted 30° (s): the ray refracts into
    # the second by Snell, sin θ_B = sin 30°/2.0, so the second plate's path is 1 mm/cos θ_B and its
    # exit face (2.0 → 1.0) is met at θ_B (tmm.coh_tmm of the two half-spaces).
    chain = [{"name": "vacuum", "kind": "gap", "length": "1 mm", "index": 1.0},
             {"name": "A", "kind": "medium", "thickness": "1 mm", "index": 1.5, "angle": "30 deg",
              "polarization": "s"},
             {"name": "B", "kind": "medium", "thickness": "1 mm", "index": 2.0, "attenuation": "1 dB/mm"},
             {"name": "out", "kind": "gap", "length": "1 mm", "index": 1.0}]
    result = evaluate(chain)
    theta_b = np.arcsin(0.5 / 2.0)
    assert_allclose(row(result, "B").loss_db["typ"], [1 / np.cos(theta_b)], rtol=1e-10)
    exact = normal_decay_transmittance(2.0 + 1j * kappa_of_attenuation(1e3), 1e-3, np.deg2rad(30.0))
    assert_allclose(row(result, "B").loss_db["typ"], [loss_db(exact)], rtol=1e-12)
    exit_face = tmm.coh_tmm("s", [2.0, 1.0], [np.inf, np.inf], theta_b, 1550.0)
    assert_allclose(row(result, "B → out").reflectance_seen, [exit_face["R"]], rtol=0, atol=TIGHT)


def test_polarized_plate_with_reflections_before_an_angled_block_keeps_both_shares():
    # An s-polarized tilted plate summing its reflections, then a block at its own angle: the s
    # share carries on (the block states no polarization), so the exit face of the plate and the
    # block's face see s light only; the plate's total matches tmm.inc_tmm for s (Katsidis &
    # Siapkas 2002, through the reference library).
    result = evaluate([
        {"name": "air", "kind": "gap", "length": "1 mm", "index": 1.0},
        {"name": "plate", "kind": "medium", "thickness": "1 mm", "index": 1.5, "angle": "10 deg",
         "polarization": "s", "multiple_reflections": True},
        {"name": "block", "kind": "medium", "thickness": "1 mm", "index": 1.7},
    ])
    kinds = [row.shown_kind for row in result.rows]
    assert kinds == ["gap", "interface", "medium", "interface", "reflections", "medium"]
    expected = tmm.inc_tmm("s", [1.0, 1.5, 1.7], [np.inf, 1e3, np.inf], ["i", "i", "i"], np.deg2rad(10), 1550)["T"]
    assert_allclose(result.cumulative_loss_db["typ"][-1], -10 * np.log10([expected]), rtol=1e-9)


def test_guided_fibre_without_index_ends_the_faces():
    # A fibre without an index guides the light between a gap and a window: no air → glass face is
    # computed across it (the fibre declares no faces of its own).
    result = evaluate([
        {"name": "launch", "kind": "gap", "length": "1 mm"},
        {"name": "pigtail", "kind": "fiber", "length": "2 km", "attenuation": "0.3 dB/km"},
        {"name": "window", "kind": "medium", "thickness": "1 mm", "material": "fused-silica"},
    ])
    assert [row.shown_kind for row in result.rows] == ["gap", "fiber", "medium"]


@pytest.mark.parametrize("angle, polarization", ANGLES)
def test_coating_row_lossless_round_off_prints_as_zero(angle, polarization):
    # Lossless films absorb nothing (Born & Wolf); 1 − R − T leaves round-off of order 1e-16,
    # which is below the documented floor (thinfilm.ABSORPTANCE_FLOOR, README) and must be an
    # exact 0 in the row and print as "A 0 %", not "A 4.44e-14 %".
    from linkbudget.report.summary import row_note

    layers = [{"material": "tantalum-pentoxide", "quarter_wave": "1550 nm"},
              {"index": 2.0, "thickness": "150 nm"},
              {"material": "magnesium-fluoride", "quarter_wave": "1550 nm"}]
    coating = row(evaluate(coated_window(layers, angle, polarization), CHANNELS), "AR coating")
    assert np.all(coating.absorptance_seen == 0.0)
    assert all("A 0 %" in row_note(coating, index) for index in range(len(CHANNELS_M)))


def test_coating_row_small_real_absorptance_is_kept():
    # κ = 1e-6 in a 100 nm layer at normal incidence absorbs about 4πκd/λ·n-ish ≈ 1e-6 of the
    # power (flux law, order of magnitude): far above the floor, so it must not be zeroed.
    layers = [{"index": "1.5+1e-6j", "thickness": "100 nm"}]
    coating = row(evaluate(coated_window(layers, None, "unpolarized"), CHANNELS), "AR coating")
    assert np.all(coating.absorptance_seen > 1e-7)


# ---- a lone window has its faces to the air around it ----


def test_lone_window_has_two_faces_to_air_closed_form():
    # A window between fibre connectors (no medium on either side) is surrounded by air, taken as
    # n = 1 (README): two faces with R = ((n − 1)/(n + 1))² each (Fresnel at normal incidence,
    # Hecht), bulk by the flux law α = 4πκ/λ (Born & Wolf), as in configs/quarry-uplink.yaml.
    n, kappa, thickness_m, wavelength_m = 1.447, 3.0e-8, 3e-3, 1310e-9
    chain = [{"name": "lead", "kind": "fiber", "length": "3 m", "attenuation": "0.4 dB/km"},
             {"name": "panel", "kind": "connector", "loss": "0.3 dB"},
             {"name": "window", "kind": "medium", "thickness": "3 mm", "index": f"{n}+{kappa}j"},
             {"name": "allowance", "kind": "element", "loss": "1 dB"}]
    result = evaluate(chain, "wavelength: 1310 nm")
    names = [r.name for r in result.rows]
    assert names == ["lead", "panel", "air → window", "window", "window → air", "allowance"]
    r_face = ((n - 1) / (n + 1)) ** 2
    for name in ("air → window", "window → air"):
        face = row(result, name)
        assert_allclose(face.reflectance_seen, [r_face], rtol=1e-12)
        assert_allclose(face.loss_db["typ"], [loss_db(1 - r_face)], rtol=1e-12)
    bulk = 10 * np.log10(np.e) * 4 * np.pi * kappa / wavelength_m * thickness_m
    assert_allclose(row(result, "window").loss_db["typ"], [bulk], rtol=1e-12)


def test_lone_window_in_shipped_quarry_example_is_not_zero():
    from pathlib import Path

    text = (Path(__file__).resolve().parents[1] / "configs" / "quarry-uplink.yaml").read_text()
    result = linkbudget.evaluate(linkbudget.load(text))
    r_face = ((1.447 - 1) / (1.447 + 1)) ** 2  # Fresnel, normal incidence (Hecht): 3.337 %
    faces = [r for r in result.rows if r.shown_kind == "interface"]
    assert [f.name for f in faces] == ["air → receiver enclosure window", "receiver enclosure window → air"]
    assert_allclose([f.loss_db["typ"][0] for f in faces], [loss_db(1 - r_face)] * 2, rtol=1e-12)


def test_lone_window_with_multiple_reflections_matches_inc_tmm():
    # The lone window's two air faces and its bulk, summed incoherently, equal tmm.inc_tmm for
    # air | window (incoherent) | air at normal incidence (thicknesses in nm, like the wavelength).
    n = complex(1.5, 2e-6)
    chain = [{"name": "window", "kind": "medium", "thickness": "2 mm", "index": f"{n.real}+{n.imag}j",
              "multiple_reflections": True}]
    result = evaluate(chain)
    expected = tmm.inc_tmm("s", [1.0, n, 1.0], [np.inf, 2e6, np.inf], ["i", "i", "i"], 0.0,
                           1550.0)["T"]
    assert_allclose(total_transmittance(result), [expected], rtol=0, atol=TIGHT)


def test_window_touching_a_guide_gets_no_air_faces():
    # A medium directly against a waveguide without a medium of its own: the face there is not
    # known, so the window is not lone and no air face is invented.
    chain = [{"name": "cladding", "kind": "medium", "thickness": "1 mm", "index": 1.5},
             {"name": "chip", "kind": "waveguide", "length": "1 cm", "attenuation": "1 dB/cm"}]
    assert [r.shown_kind for r in evaluate(chain).rows] == ["medium", "waveguide"]


# One medium has one complex index N = n + iκ: the κ given as `kappa`, `absorption` (α) or
# `attenuation` (dB per length) is the imaginary part of the faces' index too, κ = αλ/(4π)
# (Born & Wolf). The thin absorbing slab below is 0.2 um thick in air at 1550 nm; the
# attenuation form is bounded at 1 dB/um, so it is checked with its own, smaller κ.
LOSSY_THICKNESS_M = 0.2e-6
LOSSY_ALPHA_PER_M = 4 * np.pi * 0.45 / 1550e-9
LOSSY_ATTENUATION_DB_PER_M = 0.5e6
LOSSY_FORMS = {  # form: (medium keys, the complex index they state)
    "kappa": ({"index": "1.35", "kappa": 0.45}, 1.35 + 0.45j),
    "absorption": ({"index": "1.35", "absorption": f"{LOSSY_ALPHA_PER_M!r} /m"}, 1.35 + 0.45j),
    "attenuation": ({"index": "1.35", "attenuation": f"{LOSSY_ATTENUATION_DB_PER_M!r} dB/m"},
                    1.35 + 1j * LOSSY_ATTENUATION_DB_PER_M / (10 * np.log10(np.e)) * 1550e-9 / (4 * np.pi)),
}


def lossy_slab(medium_keys, multiple_reflections):
    slab = {"name": "slab", "kind": "medium", "thickness": "0.2 um",
            "multiple_reflections": multiple_reflections, **medium_keys}
    return [{"name": "g1", "kind": "gap", "length": "1 mm", "index": 1.0}, slab,
            {"name": "g2", "kind": "gap", "length": "1 mm", "index": 1.0}]


@pytest.mark.parametrize("multiple_reflections", [False, True])
@pytest.mark.parametrize("form", sorted(LOSSY_FORMS))
def test_lossy_medium_faces_use_the_stated_kappa(form, multiple_reflections):
    # Every row (faces, bulk, reflections) is that of the complex index, and the total is tmm's:
    # inc_tmm with the slab incoherent when the reflections are summed, else the single-pass
    # product T1·τ·T2 of coh_tmm half-space faces and τ = exp(−4πκL/λ) (normal incidence: s = p).
    # Before the fix the faces were lossless: for κ = 0.45, 3.364 dB where tmm gives 3.216 dB.
    keys, index = LOSSY_FORMS[form]
    stated = evaluate(lossy_slab(keys, multiple_reflections))
    complex_index = evaluate(lossy_slab({"index": str(index)}, multiple_reflections))
    assert [r.name for r in stated.rows] == [r.name for r in complex_index.rows]
    for case in ("typ", "worst", "best"):
        assert_allclose(stated.loss_db[case], complex_index.loss_db[case], rtol=0, atol=TIGHT)
    if multiple_reflections:
        expected = tmm.inc_tmm("s", [1.0, index, 1.0], [np.inf, LOSSY_THICKNESS_M * 1e9, np.inf],
                               ["i", "i", "i"], 0.0, 1550.0)["T"]
    else:
        expected = (tmm.coh_tmm("s", [1.0, index], [np.inf, np.inf], 0.0, 1550.0)["T"]
                    * np.exp(-4 * np.pi * index.imag / 1550e-9 * LOSSY_THICKNESS_M)
                    * tmm.coh_tmm("s", [index, 1.0], [np.inf, np.inf], 0.0, 1550.0)["T"])
    assert_allclose(loss_db(total_transmittance(stated)), [loss_db(expected)], rtol=0, atol=TIGHT)


def test_lossy_medium_kappa_spread_faces_take_typ_bulk_takes_each_case():
    # The faces hold one index per wavelength (typical κ); the bulk row keeps each case's κ:
    # loss = 10·log10(e)·4πκ/λ·L (flux law, Born & Wolf) with κ = 0.6 in the worst case.
    spread = evaluate(lossy_slab({"index": "1.35", "kappa": {"min": 0.3, "typ": 0.45, "max": 0.6}}, False))
    complex_index = evaluate(lossy_slab({"index": "1.35+0.45j"}, False))
    for face in ("g1 → slab", "slab → g2"):
        for case in ("typ", "worst", "best"):
            assert_allclose(row(spread, face).loss_db[case], row(complex_index, face).loss_db[case],
                            rtol=0, atol=TIGHT)
    bulk_worst_db = 10 * np.log10(np.e) * 4 * np.pi * 0.6 / 1550e-9 * LOSSY_THICKNESS_M
    assert_allclose(row(spread, "slab").loss_db["worst"], [bulk_worst_db], rtol=0, atol=TIGHT)
