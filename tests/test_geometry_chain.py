"""Geometry through a whole link: joints from mode fields, free-space gaps, waveguides, splitters.

Links are loaded from YAML text and evaluated end to end; each loss is computed here again by
hand from the published model and compared with the budget row:

- joints: A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", 1998, eqs. (8.69),
  (8.75), (8.81) (offset with mode mismatch, tilt, end gap), and D. Marcuse, "Loss analysis of
  single-mode fiber splices", Bell Syst. Tech. J. 56, 703 (1977) (mismatch factor, combined
  offset and tilt, and the mode-field radius w/a = 0.65 + 1.619 V^−1.5 + 2.879 V^−6), with the
  worked values of REFERENCES.md (w = 5.2 µm, λ = 1.55 µm, D, ±1e-3 dB);
- elliptical modes: the one-axis overlap factor 2w1w2/(w1² + w2²) of two Gaussians (H. Kogelnik,
  "Coupling and conversion coefficients for optical modes", 1964, from memory), whose square is
  Marcuse's circular mismatch factor;
- beams: A. E. Siegman, "Lasers", 1986 (z_R = π·w0²·n/λ, w(z), aperture 1 − exp(−2a²/w²));
  REFERENCES.md z_R = 2.0268 m and θ = 0.49338 mrad for w0 = 1 mm at 1550 nm (D);
- haze: Kim, McArthur & Korevaar, Proc. SPIE 4214, 26 (2001) (C) and the Kruse model (M),
  worked values of REFERENCES.md (D);
- splitters: the ideal 1×N splitting loss 10·log10 N (G. Keiser, "Optical Fiber
  Communications", from memory).
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.materials.library import load_material
from linkbudget.physics.fiber import marcuse_mode_field_radius_m, v_number
from tests.segments.linktext import evaluate, only_problem, row

WL = 1550e-9
W = 5.2e-6  # mode-field radius of the REFERENCES.md worked values
DB = 10 * np.log10(np.e)  # dB per neper of power: loss = DB·(−ln T)
# The worked values are printed to four decimals (D, ±1 in the last digit): REFERENCES.md ±1e-3 dB.
WORKED = 1e-3
# Both sides evaluate the same closed form in double precision.
EXACT = 1e-12


def loss_db(transmitted):
    return -10.0 * np.log10(transmitted)


def fibre(name, **keys):
    """A 1 m lossless fibre with a 10.4 µm mode field diameter, unless ``keys`` give its mode."""
    mode = {} if "core_diameter" in keys else {"mode_field_diameter": "10.4 um"}
    return {"name": name, "kind": "fiber", "length": "1 m", "attenuation": "0 dB/km", **mode, **keys}


def joint(keys, before=None, after=None, kind="connector"):
    """fibre → joint → fibre, both fibres 10.4 µm unless given."""
    return [before or fibre("f1"), {"name": "joint", "kind": kind, **keys}, after or fibre("f2")]


def joint_loss(keys, case="typ", **sides):
    return row(evaluate(joint(keys, **sides)), "joint").loss_db[case]


def mismatch(w1, w2):
    """Marcuse's mode-mismatch factor (2w1w2/(w1² + w2²))² of two circular Gaussians."""
    return (2 * w1 * w2 / (w1**2 + w2**2)) ** 2


def one_axis(w1, w2):
    """One transverse axis of the Gaussian overlap, 2w1w2/(w1² + w2²) (Kogelnik, from memory)."""
    return 2 * w1 * w2 / (w1**2 + w2**2)


def marcuse_radius(core_radius, na, wavelength):
    v = 2 * np.pi * core_radius * na / wavelength
    return core_radius * (0.65 + 1.619 * v**-1.5 + 2.879 * v**-6)


def kim_db_per_km(v_km, wavelength):
    """Kim et al. 2001: (3.91/V)·(λ/550 nm)^−q per km, in dB (REFERENCES.md)."""
    q = 1.6 if v_km > 50 else 1.3 if v_km > 6 else 0.16 * v_km + 0.34 if v_km > 1 else v_km - 0.5
    return DB * 3.91 / v_km * (wavelength / 550e-9) ** -q


# ---- joints: Ghatak & Thyagarajan / Marcuse worked values ----


def test_joint_offset_1um_ghatak_8_69():
    # T = exp(−d²/w²) for equal modes (eq. 8.69): 0.1606 dB (REFERENCES.md).
    loss = joint_loss({"offset": "1 um"})
    assert_allclose(loss, [0.1606], atol=WORKED)
    assert_allclose(loss, loss_db(np.exp(-(1e-6**2) / W**2)), rtol=EXACT)


def test_joint_mode_field_ratio_1_2_marcuse():
    # (2w1w2/(w1² + w2²))² with w2/w1 = 1.2: 0.1436 dB (REFERENCES.md), from the joint's own
    # diameters and from two different fibres.
    expected = loss_db(mismatch(W, 1.2 * W))
    from_keys = joint_loss({"mode_field_diameter_before": "10.4 um", "mode_field_diameter_after": "12.48 um"},
                           before=fibre("f1", mode_field_diameter="9 um"),
                           after=fibre("f2", mode_field_diameter="9 um"))
    from_fibres = joint_loss({"offset": "0 um"}, after=fibre("f2", mode_field_diameter="12.48 um"))
    for loss in (from_keys, from_fibres):
        assert_allclose(loss, [0.1436], atol=WORKED)
        assert_allclose(loss, [expected], rtol=EXACT)


def test_joint_tilt_1deg_in_air_ghatak_8_75():
    # T = exp(−(π·n·w·θ/λ)²), n of catalog air (Ciddor 1996; a joint without a gap medium measures
    # its tilt in air): 0.1470 dB (REFERENCES.md, n = 1; air's 2.7e-4 moves it by 8e-5 dB).
    n_air = load_material("air").index(np.array([WL])).real
    loss = joint_loss({"tilt": "1 deg"})
    assert_allclose(loss, [0.1470], atol=WORKED)
    assert_allclose(loss, loss_db(np.exp(-((np.pi * n_air * W * np.deg2rad(1) / WL) ** 2))), rtol=EXACT)


def test_joint_tilt_1deg_in_index_matching_gel_ghatak_8_75():
    # The tilt is measured in the medium between the fibre ends (Ghatak's convention, stated in
    # the joint's docstring): in gel of n = 1.46 the same 1° loses 0.3132 dB (REFERENCES.md).
    loss = joint_loss({"tilt": "1 deg", "joint": "index-matched", "gap_index": 1.46})
    assert_allclose(loss, [0.3132], atol=WORKED)


def test_joint_gap_10um_in_air_ghatak_8_81():
    # T = 1/(1 + D̂²), D̂ = λD/(2π·n·w²), n of catalog air (Ciddor 1996): 0.0360 dB (REFERENCES.md,
    # n = 1; air's 2.7e-4 moves it by 2e-5 dB). Fibres without an index have no faces: the row is
    # the coupling alone and there are no interface rows.
    result = evaluate(joint({"gap": "10 um"}))
    n_air = load_material("air").index(np.array([WL])).real
    reduced = WL * 10e-6 / (2 * np.pi * n_air * W**2)
    assert [r.shown_kind for r in result.rows] == ["fiber", "connector", "fiber"]
    assert_allclose(row(result, "joint").loss_db["typ"], [0.0360], atol=WORKED)
    assert_allclose(row(result, "joint").loss_db["typ"], loss_db(1 / (1 + reduced**2)), rtol=EXACT)


def test_joint_gap_between_fibres_with_index_adds_two_faces():
    # With an index on both fibres the air gap also has its two Fresnel faces (Born & Wolf),
    # as rows of their own; the joint's row stays the coupling alone.
    n_core = 1.4682
    result = evaluate(joint({"gap": "10 um"}, before=fibre("f1", index=n_core), after=fibre("f2", index=n_core)))
    n_air = load_material("air").index(np.array([WL])).real
    faces = [r for r in result.rows if r.shown_kind == "interface"]
    assert [f.name for f in faces] == ["f1 → joint gap", "joint gap → f2"]
    for face in faces:
        assert_allclose(face.reflectance_seen, ((n_core - n_air) / (n_core + n_air)) ** 2, rtol=EXACT)
    assert_allclose(row(result, "joint").loss_db["typ"], [0.0360], atol=WORKED)


def test_joint_gap_50um_index_matched_ghatak_8_81():
    # D = 50 µm in n = 1.46: 0.4045 dB (REFERENCES.md); index matched, so no faces.
    result = evaluate(joint({"gap": "50 um", "gap_index": 1.46, "joint": "index-matched"},
                            before=fibre("f1", index=1.46), after=fibre("f2", index=1.46)))
    reduced = WL * 50e-6 / (2 * np.pi * 1.46 * W**2)
    assert [r.shown_kind for r in result.rows] == ["fiber", "connector", "fiber"]
    assert_allclose(row(result, "joint").loss_db["typ"], [0.4045], atol=WORKED)
    assert_allclose(row(result, "joint").loss_db["typ"], loss_db(1 / (1 + reduced**2)), rtol=EXACT)


def test_joint_datasheet_loss_wins_and_geometry_is_shown():
    joint_row = row(evaluate(joint({"loss": "0.5 dB", "offset": "1 um"})), "joint")
    for case in ("typ", "worst", "best"):
        assert_allclose(joint_row.loss_db[case], [0.5], rtol=EXACT)
    assert_allclose(joint_row.geometric_estimate_db["typ"], [0.1606], atol=WORKED)


def test_joint_worst_case_is_the_worst_offset_corner():
    # offset {typ 0.5 µm, max 1.5 µm}: worst = eq. 8.69 at 1.5 µm, best and typ at 0.5 µm.
    result = row(evaluate(joint({"offset": {"typ": "0.5 um", "max": "1.5 um"}})), "joint")
    assert_allclose(result.loss_db["worst"], [loss_db(np.exp(-(1.5e-6**2) / W**2))], rtol=EXACT)
    assert_allclose(result.loss_db["typ"], [loss_db(np.exp(-(0.5e-6**2) / W**2))], rtol=EXACT)
    assert_allclose(result.loss_db["best"], result.loss_db["typ"], rtol=EXACT)
    assert result.loss_db["worst"][0] >= result.loss_db["typ"][0]


def test_joint_worst_case_offset_and_tilt_together_marcuse():
    # Zero gap: the offset and tilt exponents add (Marcuse 1977), T = exp(−d²/w²)·exp(−(πwθ/λ)²);
    # the worst corner takes both maxima.
    keys = {"offset": {"typ": "0.5 um", "max": "1.5 um"}, "tilt": {"typ": "0.1 deg", "max": "0.3 deg"}}
    result = row(evaluate(joint(keys)), "joint")
    n_air = load_material("air").index(np.array([WL])).real[0]  # the tilt is measured in air (Ciddor 1996)

    def expected(d, theta_deg):
        return loss_db(np.exp(-(d**2) / W**2 - (np.pi * n_air * W * np.deg2rad(theta_deg) / WL) ** 2))

    assert_allclose(result.loss_db["worst"], [expected(1.5e-6, 0.3)], rtol=EXACT)
    assert_allclose(result.loss_db["typ"], [expected(0.5e-6, 0.1)], rtol=EXACT)


def test_joint_splice_count_multiplies_the_geometric_loss():
    # Losses of identical joints in series add in dB (decibel definition).
    assert_allclose(joint_loss({"offset": "1 um", "count": 3}, kind="splice"), [3 * 0.1606], atol=3 * WORKED)


# ---- fibre core geometry ----


def test_fibre_core_geometry_mode_is_marcuse_at_each_wavelength():
    # 8.2 µm core, NA 0.12: V = 2π·a·NA/λ (Gloge 1971) and Marcuse's w(V) at each channel; an
    # offset of 1 µm between two such fibres loses exp(−d²/w²), and a joint to a 10.4 µm fibre
    # the mismatch factor.
    core = {"core_diameter": "8.2 um", "numerical_aperture": 0.12}
    wavelengths = np.array([1310e-9, 1550e-9])
    axis = "channels: [1310 nm, 1550 nm]"
    w = marcuse_radius(4.1e-6, 0.12, wavelengths)
    library_w = marcuse_mode_field_radius_m(4.1e-6, v_number(4.1e-6, wavelengths, numerical_aperture=0.12))
    assert_allclose(library_w, w, rtol=EXACT)
    same = evaluate(joint({"offset": "1 um"}, before=fibre("f1", **core), after=fibre("f2", **core)), axis)
    assert_allclose(row(same, "joint").loss_db["typ"], loss_db(np.exp(-(1e-6**2) / w**2)), rtol=EXACT)
    mixed = evaluate(joint({"offset": "0 um"}, after=fibre("f2", **core)), axis)
    # At 1550 nm the two modes nearly match (1.4e-5 dB): −10·log10 of T ≈ 1 cancels digits, so
    # the comparison there is absolute, 1e-12 dB.
    assert_allclose(row(mixed, "joint").loss_db["typ"], loss_db(mismatch(W, w)), rtol=EXACT, atol=1e-12)


# ---- waveguide modes ----


def chip(name="chip", **keys):
    return {"name": name, "kind": "waveguide", "length": "1 mm", "attenuation": "0 dB/cm", **keys}


def test_waveguide_elliptical_mode_couples_with_the_product_of_axis_factors():
    # A 3 µm × 2 µm mode to a 10.4 µm fibre: η = η_x·η_y with η_axis = 2w1w2/(w1² + w2²).
    result = evaluate(joint({"offset": "0 um"}, after=chip(mode_size={"width": "3 um", "height": "2 um"})))
    expected = one_axis(W, 1.5e-6) * one_axis(W, 1.0e-6)
    assert_allclose(row(result, "joint").loss_db["typ"], [loss_db(expected)], rtol=EXACT)


def test_waveguide_elliptical_mode_offset_along_the_worse_axis():
    # An offset d multiplies one axis factor by exp(−2d²/(w1² + w2²)) (eq. 8.69 split per axis);
    # the direction is not known, so the axis where it hurts more (the narrower, y) is taken.
    result = evaluate(joint({"offset": "0.5 um"}, after=chip(mode_size={"width": "3 um", "height": "2 um"})))
    d = 0.5e-6
    along_x = np.exp(-2 * d**2 / (W**2 + 1.5e-6**2))
    along_y = np.exp(-2 * d**2 / (W**2 + 1.0e-6**2))
    expected = one_axis(W, 1.5e-6) * one_axis(W, 1.0e-6) * min(along_x, along_y)
    assert_allclose(row(result, "joint").loss_db["typ"], [loss_db(expected)], rtol=EXACT)


def test_waveguide_circular_mode_reduces_to_marcuse():
    result = evaluate(joint({"offset": "0 um"}, after=chip(mode_field_diameter="6 um")))
    assert_allclose(row(result, "joint").loss_db["typ"], [loss_db(one_axis(W, 3e-6) ** 2)], rtol=EXACT)
    assert_allclose(row(result, "joint").loss_db["typ"], [loss_db(mismatch(W, 3e-6))], rtol=EXACT)


# ---- free-space gaps ----


def aperture_link(beam, length="100 m", aperture="10 mm", **gap):
    return [{"name": "path", "kind": "gap", "length": length, "beam": beam, "aperture": aperture, **gap}]


def siegman_aperture_loss(w0, z, a, n=1.0):
    z_r = np.pi * w0**2 * n / WL
    w = w0 * np.sqrt(1 + (z / z_r) ** 2)
    return loss_db(1 - np.exp(-2 * a**2 / w**2))


def test_gap_waist_to_aperture_siegman():
    # w0 = 1 mm at 1550 nm in vacuum: z_R = 2.0268 m (REFERENCES.md, D); after 100 m a 10 mm
    # aperture (a = 5 mm) passes 1 − exp(−2a²/w²).
    assert_allclose(np.pi * 1e-3**2 / WL, 2.0268, atol=5e-5)
    result = row(evaluate(aperture_link({"waist": "1 mm"}, index=1.0)), "path")
    expected = siegman_aperture_loss(1e-3, 100.0, 5e-3)
    assert_allclose(result.loss_db["typ"], [expected], rtol=EXACT)
    assert_allclose(result.loss_parts_db["beam"]["typ"], [expected], rtol=EXACT)
    assert_allclose(result.loss_parts_db["medium"]["typ"], [0.0], atol=0)


def test_gap_waist_to_aperture_in_catalog_air():
    # Default ambient air (catalog, Ciddor 1996): z_R = π·w0²·n/λ with its index.
    n_air = load_material("air").index(np.array([WL])).real[0]
    result = row(evaluate(aperture_link({"waist": "1 mm"})), "path")
    assert_allclose(result.loss_db["typ"], [siegman_aperture_loss(1e-3, 100.0, 5e-3, n_air)], rtol=EXACT)


def test_gap_divergence_is_the_waist_of_the_same_beam():
    # θ = λ/(π·w0) = 0.49338 mrad for w0 = 1 mm (REFERENCES.md, D, 5 digits: w0 good to 1e-5,
    # the loss to ~2e-5 relative).
    result = row(evaluate(aperture_link({"divergence": "0.49338 mrad"}, index=1.0)), "path")
    assert_allclose(result.loss_db["typ"], [siegman_aperture_loss(1e-3, 100.0, 5e-3)], rtol=1e-4)


def test_gap_between_fibres_equals_the_joint_gap_closed_form():
    # fibre → 10 µm of air → fibre (10.4 µm both): the beam leaves the first fibre's waist and is
    # received by the second's, T = 1/(1 + D̂²) (eq. 8.81) with n of catalog air.
    chain = [fibre("f1"), {"name": "air", "kind": "gap", "length": "10 um"}, fibre("f2")]
    result = row(evaluate(chain), "air")
    n_air = load_material("air").index(np.array([WL])).real
    reduced = WL * 10e-6 / (2 * np.pi * n_air * W**2)
    assert_allclose(result.loss_db["typ"], loss_db(1 / (1 + reduced**2)), rtol=EXACT)
    assert_allclose(result.loss_db["typ"], [0.0360], atol=WORKED)


def test_gap_kim_visibility_10km_over_1km():
    # V = 10 km at 1550 nm: 0.442 dB/km (REFERENCES.md, D; 3 decimals: atol 5e-4).
    result = row(evaluate([{"name": "haze", "kind": "gap", "length": "1 km", "visibility": "10 km"}]), "haze")
    assert_allclose(result.loss_db["typ"], [0.442], atol=5e-4)
    assert_allclose(result.loss_db["typ"], [kim_db_per_km(10.0, WL)], rtol=EXACT)


def test_gap_kruse_visibility_5km():
    # Kruse: q = 0.585·V^(1/3) below 6 km (model from memory, REFERENCES.md M); V = 5 km at 1550 nm:
    # 1.205 dB/km (D from that formula; 3 decimals: atol 5e-4).
    result = row(evaluate([{"name": "haze", "kind": "gap", "length": "1 km", "visibility": "5 km",
                            "visibility_model": "kruse"}]), "haze")
    assert_allclose(result.loss_db["typ"], [1.205], atol=5e-4)


def test_gap_worst_case_uses_the_lower_visibility():
    # visibility {typ 10 km, min 2 km} over 2 km: worst at 2 km (Kim q = 0.16·2 + 0.34), best = typ.
    result = row(evaluate([{"name": "haze", "kind": "gap", "length": "2 km",
                            "visibility": {"typ": "10 km", "min": "2 km"}}]), "haze")
    assert_allclose(result.loss_db["worst"], [2 * kim_db_per_km(2.0, WL)], rtol=EXACT)
    assert_allclose(result.loss_db["typ"], [2 * kim_db_per_km(10.0, WL)], rtol=EXACT)
    assert_allclose(result.loss_db["best"], result.loss_db["typ"], rtol=EXACT)


# ---- a full link ----


def test_full_link_total_is_the_sum_of_the_published_models():
    # Every row computed again from its model; the budget total is their sum (losses in dB add).
    chain = [
        {"name": "trunk", "kind": "fiber", "length": "2 km", "attenuation": "0.35 dB/km",
         "mode_field_diameter": "10.4 um"},
        {"name": "patch panel", "kind": "connector", "offset": "1 um"},
        {"name": "patch lead", "kind": "fiber", "length": "10 m", "attenuation": "0.5 dB/km",
         "mode_field_diameter": "10.4 um"},
        {"name": "edge coupler", "kind": "connector", "offset": "0.5 um"},
        {"name": "chip", "kind": "waveguide", "length": "5 mm", "attenuation": "2 dB/cm",
         "bends": {"count": 4, "loss": "0.05 dB"}, "crossings": {"count": 2, "loss": "0.2 dB"},
         "mode_size": {"width": "3 um", "height": "2 um"}},
        {"name": "output coupler", "kind": "splice", "offset": "0 um"},
        {"name": "pigtail", "kind": "fiber", "length": "100 m", "attenuation": "0.5 dB/km",
         "mode_field_diameter": "10.4 um"},
        {"name": "star", "kind": "splitter", "ports": 8, "excess_loss": "0.5 dB", "port": 3},
        {"name": "drop", "kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km",
         "mode_field_diameter": "10.4 um"},
        {"name": "fibre gap", "kind": "gap", "length": "20 um"},
        {"name": "receiver tail", "kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km",
         "mode_field_diameter": "10.4 um"},
    ]
    result = evaluate(chain)
    wx, wy, d = 1.5e-6, 1.0e-6, 0.5e-6
    n_air = load_material("air").index(np.array([WL])).real[0]
    expected = {
        "trunk": 0.7,
        "patch panel": loss_db(np.exp(-(1e-6**2) / W**2)),
        "patch lead": 0.005,
        "edge coupler": loss_db(one_axis(W, wx) * one_axis(W, wy) * np.exp(-2 * d**2 / (W**2 + wy**2))),
        "chip": 1.0 + 4 * 0.05 + 2 * 0.2,
        "output coupler": loss_db(one_axis(wx, W) * one_axis(wy, W)),
        "pigtail": 0.05,
        "star": 10 * np.log10(8) + 0.5,
        "drop": 0.0005,
        "fibre gap": loss_db(1 / (1 + (WL * 20e-6 / (2 * np.pi * n_air * W**2)) ** 2)),
        "receiver tail": 0.0005,
    }
    assert [r.name for r in result.rows] == list(expected)
    assert_allclose(result.loss_db["typ"][:, 0], list(expected.values()), rtol=1e-11)
    assert_allclose(result.cumulative_loss_db["typ"][-1], [sum(expected.values())], rtol=1e-11)

    segments = {segment["name"]: segment for segment in linkbudget.result_dict(result)["rows"]}
    parts = segments["chip"]["loss_parts_db"]
    assert_allclose([parts[p]["typ"][0] for p in ("propagation", "bends", "crossings")], [1.0, 0.2, 0.4], rtol=1e-12)
    assert segments["star"]["facts"] == ["port 3"]
    assert_allclose(segments["star"]["loss_parts_db"]["split"]["worst"], [10 * np.log10(8)],
                    rtol=0, atol=5e-10)  # the JSON writes dB to 1e-9


# ---- errors ----


def test_error_geometric_joint_without_a_mode_after_it():
    chain = [fibre("f1"), {"name": "mate", "kind": "connector", "offset": "1 um"},
             {"name": "isolator", "kind": "element", "loss": "0.5 dB"}]
    path, message = only_problem(chain)
    assert path == "chain[1].mode_field_diameter_after"
    assert "mode field diameter" in message


def test_error_geometric_joint_without_a_mode_before_it():
    chain = [{"name": "isolator", "kind": "element", "loss": "0.5 dB"},
             {"name": "mate", "kind": "connector", "tilt": "0.2 deg"}, fibre("f2")]
    path, _ = only_problem(chain)
    assert path == "chain[1].mode_field_diameter_before"


@pytest.mark.parametrize("after", [None, {"name": "isolator", "kind": "element", "loss": "0.5 dB"}])
def test_error_gap_beam_without_a_receiving_side(after):
    chain = [{"name": "launch", "kind": "gap", "length": "1 m", "beam": {"waist": "1 mm"}}]
    path, message = only_problem(chain + ([after] if after else []))
    assert path == "chain[0].beam"
    assert "receiving side" in message


def test_gap_aperture_best_case_takes_the_waist_that_spreads_least():
    # w(z) = w0·√(1 + (λz/(π·w0²))²) is smallest at w0* = √(λz/π) (Siegman, Lasers, 1986): with a
    # waist toleranced across w0*, the best case (the overload check) is the power through the
    # aperture at w0*, not at a corner of the waist range.
    result = evaluate([{"name": "path", "kind": "gap", "length": "1 m", "index": 1.0,
                        "beam": {"waist": {"min": "0.3 mm", "typ": "1 mm", "max": "2 mm"}}, "aperture": "2 mm"}])
    least_waist = np.sqrt(WL * 1.0 / np.pi)
    spot = least_waist * np.sqrt(1 + (WL * 1.0 / (np.pi * least_waist**2)) ** 2)
    best = -10 * np.log10(1 - np.exp(-2 * (1e-3) ** 2 / spot**2))
    assert_allclose(row(result, "path").loss_db["best"], [best], rtol=1e-9)
    assert row(result, "path").loss_db["best"][0] < row(result, "path").loss_db["typ"][0]
