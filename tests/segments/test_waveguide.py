"""The ``waveguide`` segment: flux-law propagation, bends, crossings, mode size, input errors.

Outside sources: the lossy-medium flux law α = 4πκ/λ, loss = 10·log10(e)·α·L (M. Born and
E. Wolf, "Principles of Optics", 7th ed., 1999; section from memory); the decibel as
10·log10 of a power ratio, so losses in dB add and a loss in dB per length times a length is a
loss in dB (IEC 60027-3, from memory); the normal-incidence Fresnel reflectance of crystalline
silicon, n = 3.4757 at 1550 nm (Li 1980), R = 30.597 %, 1.5862 dB a face (REFERENCES.md, D).
The README's spread rules (worst case at the end that hurts) are re-stated here, not imported.
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.segments.cases import CASES, CORNER
from linkbudget.segments.waveguide import Waveguide
from tests.segments.linktext import link_text, only_problem

WL_1550 = np.array([1550e-9])


def waveguide(**keys):
    return Waveguide.model_validate({"kind": "waveguide", **keys})


def test_loss_db_effective_index_born_wolf_flux_law():
    # Born & Wolf flux law: κ = 1e-5 at 1550 nm -> α = 4π·1e-5/1.55e-6 m = 81.07 /m
    # -> 4.3429·81.07 = 352.1 dB/m = 3.521 dB/cm. The check value has 4 digits: atol 5e-4 dB.
    segment = waveguide(length="1 cm", effective_index="2.4+1e-5j")
    for case in CASES:
        assert_allclose(segment.loss_db(WL_1550, CORNER[case]), [3.521], atol=5e-4)


def test_loss_db_effective_index_scales_as_inverse_wavelength():
    # Born & Wolf flux law: α = 4πκ/λ at fixed κ, so the loss at 1310 nm is 1550/1310 times that
    # at 1550 nm; only float rounding separates them (rtol 1e-12).
    segment = waveguide(length="2 mm", effective_index="1.9+3e-6j")
    loss = segment.loss_db(np.array([1310e-9, 1550e-9]), CORNER["typ"])
    assert_allclose(loss[0] / loss[1], 1550 / 1310, rtol=1e-12)


def test_loss_db_attenuation_per_length_times_length():
    # Decibel arithmetic (IEC 60027-3, from memory): 2 dB/cm over 5 mm is 1 dB; worst case
    # 3 dB/cm over 6 mm is 1.8 dB; best case 1.5 dB/cm over 4 mm is 0.6 dB. Rounding only: rtol 1e-12.
    segment = waveguide(length={"min": "4 mm", "typ": "5 mm", "max": "6 mm"},
                        attenuation={"min": "1.5 dB/cm", "typ": "2 dB/cm", "max": "3 dB/cm"})
    expected = {"typ": 1.0, "worst": 1.8, "best": 0.6}
    for case, loss_db in expected.items():
        assert_allclose(segment.loss_db(WL_1550, CORNER[case]), [loss_db], rtol=1e-12)


def test_loss_parts_db_bends_and_crossings_add():
    # Losses in dB add (IEC 60027-3, from memory): 12 bends of {typ 0.01, max 0.03} dB are 0.12 dB
    # typ and 0.36 dB worst; 4 crossings of 0.15 dB are 0.6 dB; 2 dB/cm over 5 mm is 1 dB.
    segment = waveguide(length="5 mm", attenuation="2 dB/cm",
                        bends={"count": 12, "loss": {"typ": "0.01 dB", "max": "0.03 dB"}},
                        crossings={"count": 4, "loss": "0.15 dB"})
    wavelength_m = np.array([1500e-9, 1550e-9, 1600e-9])
    parts = segment.loss_parts_db(wavelength_m, CORNER["worst"])
    assert_allclose(parts["propagation"], [1.0] * 3, rtol=1e-12)
    assert_allclose(parts["bends"], [0.36] * 3, rtol=1e-12)
    assert_allclose(parts["crossings"], [0.6] * 3, rtol=1e-12)
    assert_allclose(segment.loss_db(wavelength_m, CORNER["worst"]), [1.96] * 3, rtol=1e-12)
    assert_allclose(segment.loss_db(wavelength_m, CORNER["typ"]), [1.72] * 3, rtol=1e-12)


def test_loss_parts_db_absent_parts_are_zero():
    # A part that is not given loses nothing (0 dB is a power ratio of 1).
    parts = waveguide(length="1 mm", attenuation="1 dB/mm").loss_parts_db(WL_1550, CORNER["typ"])
    assert_allclose(parts["bends"], [0.0], atol=0)
    assert_allclose(parts["crossings"], [0.0], atol=0)


def test_loss_db_zero_length_is_zero():
    # Limit identity: a guide of zero length has no propagation loss, whatever its κ.
    for keys in ({"effective_index": "2.0+1e-3j"}, {"attenuation": "50 dB/cm"}):
        assert_allclose(waveguide(length="0 mm", **keys).loss_db(WL_1550, CORNER["worst"]), [0.0], atol=0)


lengths_mm = st.lists(st.floats(0.0, 50.0), min_size=3, max_size=3).map(sorted)
losses_db = st.lists(st.floats(0.0, 1.0), min_size=3, max_size=3).map(sorted)


@settings(max_examples=40, derandomize=True, deadline=None)
@given(length=lengths_mm, attenuation=losses_db, bend=losses_db, count=st.integers(0, 50))
def test_loss_db_worst_at_least_typ_at_least_best(length, attenuation, bend, count):
    # README spread rules: the worst case takes every length and loss at its max, the best at its
    # min, so worst >= typ >= best for any spreads.
    def spread(values, unit):
        return dict(zip(("min", "typ", "max"), (f"{value!r} {unit}" for value in values), strict=True))

    segment = waveguide(length=spread(length, "mm"), attenuation=spread(attenuation, "dB/cm"),
                        bends={"count": count, "loss": spread(bend, "dB")})
    loss = {case: segment.loss_db(WL_1550, CORNER[case]) for case in CASES}
    assert np.all(loss["worst"] >= loss["typ"]) and np.all(loss["typ"] >= loss["best"])


def test_mode_circular_mode_field_diameter():
    # Mode convention of linkbudget.segments.base.Mode: the radius is half the 1/e² diameter.
    mode = waveguide(length="1 mm", attenuation="1 dB/cm",
                     mode_field_diameter={"min": "9 um", "typ": "10 um", "max": "10.6 um"}).mode(WL_1550)
    for axis in (mode.x, mode.y):
        (low, high), typical = axis.ends(), axis.at(CORNER["typ"])
        assert_allclose([low[0], typical[0], high[0]], [4.5e-6, 5e-6, 5.3e-6], rtol=1e-12)


def test_mode_rectangular_mode_size():
    mode = waveguide(length="1 mm", attenuation="1 dB/cm",
                     mode_size={"width": {"typ": "3 um", "min": "2.8 um", "max": "3.2 um"},
                                "height": "1 um"}).mode(np.array([1300e-9, 1550e-9]))
    assert_allclose(mode.x.ends(), [[1.4e-6] * 2, [1.6e-6] * 2], rtol=1e-12)
    assert_allclose(mode.x.at(CORNER["typ"]), [1.5e-6] * 2, rtol=1e-12)
    assert_allclose(mode.y.at(CORNER["typ"]), [0.5e-6] * 2, rtol=1e-12)


def test_mode_none_without_a_mode_size():
    assert waveguide(length="1 mm", attenuation="1 dB/cm").mode(WL_1550) is None


def test_evaluate_facet_fresnel_and_guide_rows():
    # A silicon facet (index 3.4757, Li 1980) after a lossless medium of index 1: the engine adds
    # the interface row, R = 30.597 % -> 1.5862 dB (REFERENCES.md, D; atol 5e-5 for 4 decimals).
    # The guide: 2 dB/cm over 5 mm + 12·0.01 dB + 4·0.15 dB = 1.72 dB (decibel arithmetic).
    link = linkbudget.load(link_text([
        {"name": "air", "kind": "medium", "thickness": "1 mm", "index": 1.0},
        {"name": "chip", "kind": "waveguide", "length": "5 mm", "attenuation": "2 dB/cm", "index": 3.4757,
         "bends": {"count": 12, "loss": "0.01 dB"}, "crossings": {"count": 4, "loss": "0.15 dB"}},
    ]))
    result = linkbudget.evaluate(link)
    assert [row.shown_kind for row in result.rows] == ["medium", "interface", "waveguide"]
    assert_allclose(result.loss_db["typ"][:, 0], [0.0, 1.5862, 1.72], atol=5e-5)


def test_evaluate_effective_index_gives_no_faces():
    # effective_index describes the mode, not the faces: between two media of equal index the
    # guide carries no medium, so the engine adds no interface row (physical contact of equal
    # indices reflects nothing, Fresnel). Loss: Born & Wolf flux law as above, 3.521 dB.
    link = linkbudget.load(link_text([
        {"name": "cladding in", "kind": "medium", "thickness": "1 mm", "index": 1.5},
        {"name": "chip", "kind": "waveguide", "length": "1 cm", "effective_index": "2.4+1e-5j"},
        {"name": "cladding out", "kind": "medium", "thickness": "1 mm", "index": 1.5},
    ]))
    result = linkbudget.evaluate(link)
    assert [row.name for row in result.rows] == ["cladding in", "chip", "cladding out"]
    assert_allclose(result.cumulative_loss_db["worst"][-1], [3.521], atol=5e-4)


GUIDE = {"kind": "waveguide", "length": "1 mm"}


@pytest.mark.parametrize(("keys", "path", "phrases"), [
    ({"attenuation": "2 dB/cm", "effective_index": "2.4+1e-5j"}, "chain[0].effective_index", ("not both",)),
    ({}, "chain[0]", ("attenuation", "effective_index")),
    ({"attenuation": "2 dB/cm", "mode_field_diameter": "3 um", "mode_size": {"width": "3 um", "height": "1 um"}},
     "chain[0].mode_size", ("not both",)),
    ({"attenuation": "2 dB/cm", "bends": {"count": -1, "loss": "0.01 dB"}}, "chain[0].bends.count", ("feature count must be from 0 to 100000",)),
    ({"attenuation": "2 dB/cm", "bends": {"count": 2.5, "loss": "0.01 dB"}}, "chain[0].bends.count",
     ("whole number",)),
    ({"attenuation": "2 dB/cm", "crossings": {"count": 4, "loss": "-0.1 dB"}}, "chain[0].crossings.loss",
     ("joint loss must be from 0 dB to 60 dB",)),
    ({"attenuation": "2 dB/cm", "bends": {"count": 4, "loss": "0.1 dB", "losses": "0.2 dB"}},
     "chain[0].bends.losses", ("unknown key", "did you mean 'loss'?")),
    ({"effective_index": "2.4-1e-5j"}, "chain[0].effective_index", ("passive medium",)),
    ({"attenuation": "-2 dB/cm"}, "chain[0].attenuation", ("waveguide attenuation must be from 0 dB/cm",)),
    ({"attenuation": "2 dB/cm", "mode_field_diameter": {"mean": "1 um", "sigma": "0.5 um"}},
     "chain[0].mode_field_diameter.sigma", ("from 0.1 um to 1000 um", "mean - 3 sigma")),
    ({"attenuation": "2 dB/cm", "mode_size": {"width": "3 um"}}, "chain[0].mode_size",
     ("missing required key 'height'",)),
    ({"attenuation": "2 dB/cm", "mode_field_diameter": "0 um"}, "chain[0].mode_field_diameter", ("from 0.1 um to 1000 um",)),
])
def test_load_waveguide_bad_input(keys, path, phrases):
    found_path, message = only_problem([{**GUIDE, **keys}])
    assert found_path == path
    for phrase in phrases:
        assert phrase in message


def test_load_waveguide_negative_length():
    found_path, message = only_problem([{"kind": "waveguide", "length": "-1 mm", "attenuation": "2 dB/cm"}])
    assert (found_path, "waveguide length must be from 0 mm to 10000 mm" in message) == ("chain[0].length", True)


def test_evaluate_joint_couples_to_the_waveguide_mode():
    # Ghatak & Thyagarajan, "An Introduction to Fiber Optics", 1998, eq. 8.69 (REFERENCES.md, D):
    # two equal modes, w = 5.2 um, offset 1 um -> 0.1606 dB (4 decimals: atol 5e-5 dB). The
    # connector finds the waveguide's mode through mode(), the fibre's from its datasheet MFD.
    link = linkbudget.load(link_text([
        {"name": "chip", "kind": "waveguide", "length": "0 mm", "attenuation": "2 dB/cm",
         "mode_size": {"width": "10.4 um", "height": "10.4 um"}},
        {"name": "pigtail joint", "kind": "connector", "offset": "1 um"},
        {"name": "pigtail", "kind": "fiber", "length": "0 m", "attenuation": "0.3 dB/km",
         "mode_field_diameter": "10.4 um"},
    ]))
    result = linkbudget.evaluate(link)
    assert_allclose(result.loss_db["typ"][:, 0], [0.0, 0.1606, 0.0], atol=5e-5)
