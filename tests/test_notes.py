"""Notes on budget rows whose model is used outside its stated validity (issue 7, item 4).

Each test builds a link whose physics is outside a model's range and checks that the row says
so, with the number the note quotes checked against a closed form computed here.
"""

import re

import numpy as np
import pytest
import tmm
from scipy import special

import linkbudget
from tests.segments.linktext import evaluate, link_text


def notes_of(result, owner):
    return [note for note in result.notes if note.startswith(f"{owner}: ")]


def test_fibre_above_lp11_cutoff_is_noted_not_single_mode():
    # V = 2π·a·NA/λ (Gloge 1971) = 2π·4.5 µm·0.2/1.55 µm = 3.648, above the LP11 cut-off, the
    # first zero of J0 (2.405; Gloge 1971, Snyder & Love 1983): the fibre is not single-mode.
    v = 2 * np.pi * 4.5e-6 * 0.2 / 1550e-9
    assert v > special.jn_zeros(0, 1)[0]
    fibre = {"kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km", "core_diameter": "9 um",
             "numerical_aperture": 0.2}
    result = evaluate([{"name": "f1", **fibre}, {"name": "joint", "kind": "splice", "offset": "1 um"},
                       {"name": "f2", **fibre}])
    for owner in ("f1", "f2"):
        notes = notes_of(result, owner)
        assert any("not single-mode" in note and f"{v:.4g}" in note for note in notes), notes
        # one wavelength: one V, not a range "from 3.648 to 3.648"
        assert any(f"1.2 <= V <= 2.4; got V {v:.4g}" in note for note in notes), notes


def test_fibre_below_lp11_cutoff_has_no_single_mode_note():
    # V = 2π·4.1 µm·0.14/1.55 µm = 2.33: single-mode, inside Marcuse's range: no note at all.
    fibre = {"kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km", "core_diameter": "8.2 um",
             "numerical_aperture": 0.14}
    result = evaluate([{"name": "f1", **fibre}, {"name": "joint", "kind": "splice", "offset": "1 um"},
                       {"name": "f2", **fibre}])
    assert result.notes == ()


def incident_cross_term(polarization, index, angle_rad, wavelength_nm=1550.0):
    """Energy-balance shift at the exit face of an absorbing film, from tmm's amplitude r: the
    incident and reflected waves' cross term in Byrnes' "power entering" (Byrnes 2016),
    2·Im(r)·Im(u)/Re(u), u = N·cos θ (s) or N·cos θ* (p), minus sign for p."""
    inside = tmm.snell(1.0, index, angle_rad)
    r = tmm.coh_tmm(polarization, [index, 1.0], [np.inf, np.inf], inside, wavelength_nm)["r"]
    u = index * (np.cos(inside) if polarization == "s" else np.conj(np.cos(inside)))
    return abs(2 * np.imag(r) * u.imag / u.real)


def absorbing_film(polarization):
    return [{"name": "a", "kind": "gap", "length": "1 mm", "index": 1.0},
            {"name": "film", "kind": "medium", "thickness": "0.8 um", "index": "1.35+0.45j", "angle": "72 deg",
             "polarization": polarization},
            {"name": "b", "kind": "gap", "length": "1 mm", "index": 1.0}]


@pytest.mark.parametrize("polarization", ["s", "p", "unpolarized"])
def test_face_from_an_absorbing_film_is_noted_once_with_the_light_it_carries(polarization):
    # One note on the exit face, under the face's own name, quoting the shift of the polarization
    # the light has (unpolarized: the larger of s and p), never the other one's value.
    shifts = {pol: incident_cross_term(pol, 1.35 + 0.45j, np.deg2rad(72.0)) for pol in ("s", "p")}
    assert abs(shifts["s"] - shifts["p"]) > 0.1  # the two would print differently
    expected = max(shifts.values()) if polarization == "unpolarized" else shifts[polarization]
    (note,) = notes_of(evaluate(absorbing_film(polarization)), "film → b")
    assert f"up to {expected:.3g} of the incident power" in note
    assert not [n for n in evaluate(absorbing_film(polarization)).notes if n.startswith("b: ")]


def test_a_film_summing_its_reflections_has_one_note_on_its_exit_face():
    # At normal incidence with multiple reflections the entry face is also evaluated from inside
    # the film (for the round trips); that reflectance is checked against tmm.inc_tmm elsewhere and
    # is no face of the budget, so the only note is the exit face's, once.
    chain = absorbing_film("unpolarized")
    del chain[1]["angle"], chain[1]["polarization"]
    chain[1]["multiple_reflections"] = True
    result = evaluate(chain)
    absorbing = [note for note in result.notes if "incident medium absorbs" in note]
    expected = incident_cross_term("s", 1.35 + 0.45j, 0.0)
    assert absorbing == [next(n for n in absorbing if n.startswith("film → b: "))]
    assert f"up to {expected:.3g} of the incident power" in absorbing[0]


@pytest.mark.parametrize("model", ["kim", "kruse"])
def test_visibility_model_far_outside_its_wavelengths_is_noted(model):
    # Kruse's formula was devised for the visible and near infrared (Pierce, Ramaprasad &
    # Eisenberg, Proc. SPIE 4530, 2001); Kim et al. measured at 785 and 1550 nm (Proc. SPIE 4214,
    # 2001). At 1550 nm no note; at 4 µm and 10 µm a note naming the model and the wavelengths.
    gap = {"name": "path", "kind": "gap", "length": "500 m", "index": 1.0, "visibility": "10 km",
           "visibility_model": model}
    assert evaluate([gap]).notes == ()
    (note,) = notes_of(evaluate([gap], "channels: [1550 nm, 4000 nm, 10000 nm]"), "path")
    assert f"{model.capitalize()}'s visibility model" in note and "from 4000 nm to 10000 nm" in note


# ---- media summed incoherently while the light may be coherent across them ----


def faced_chain(thickness):
    return [{"name": "a", "kind": "gap", "length": "1 mm", "index": 1.0},
            {"name": "plate", "kind": "medium", "thickness": thickness, "index": 1.5},
            {"name": "b", "kind": "gap", "length": "1 mm", "index": 1.0}]


def with_width(chain, width):
    text = link_text(chain).replace("power: 0 dBm", f"power: 0 dBm\n  spectral_width: {width}")
    return linkbudget.evaluate(linkbudget.load(text))


def test_thin_plate_without_spectral_width_is_noted_under_100_wavelengths():
    # 100 λ = 155 µm at 1550 nm (common practice bound): a 20 µm plate is noted, a 1 mm one not.
    (note,) = notes_of(evaluate(faced_chain("20 um")), "plate")
    assert "20 µm thick, under 100 wavelengths" in note and "spectral_width" in note
    assert evaluate(faced_chain("1 mm")).notes == ()


def test_plate_thinner_than_the_coherence_length_is_noted():
    # L_c = λ²/(n·Δλ) = (1550 nm)²/(1.5 · 0.1 nm) = 16.02 mm (Hecht 2017 §12.1, from memory):
    # a 3 mm plate is inside it, a 30 mm plate is not; a 1 nm wide source (1.6 mm) clears 3 mm.
    coherence_mm = (1550e-9) ** 2 / (1.5 * 0.1e-9) * 1e3
    (note,) = notes_of(with_width(faced_chain("3 mm"), "0.1 nm"), "plate")
    quoted_mm = float(re.search(r"coherence length in it \(([0-9.]+) mm", note).group(1))
    assert quoted_mm == pytest.approx(coherence_mm, rel=1e-3) and "interfere" in note
    assert with_width(faced_chain("30 mm"), "0.1 nm").notes == ()
    assert with_width(faced_chain("3 mm"), "1 nm").notes == ()


def test_plate_without_faces_is_not_noted():
    # Between two media of its own index there are no faces and nothing to interfere.
    chain = faced_chain("20 um")
    chain[0]["index"] = chain[2]["index"] = 1.5
    assert evaluate(chain).notes == ()


def test_air_gap_joint_thinner_than_the_coherence_length_is_noted():
    # Two fibre ends of index 1.45 through a 10 µm air gap: an etalon of L_c = λ²/Δλ = 24.03 mm
    # in air for a 0.1 nm source (n = 1, default index of the gap medium taken from catalog air).
    fibre = {"kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km", "index": 1.45,
             "mode_field_diameter": "10.4 um"}
    chain = [{"name": "f1", **fibre}, {"name": "joint", "kind": "connector", "loss": "0.3 dB", "gap": "10 um",
                                         "gap_index": 1.0}, {"name": "f2", **fibre}]
    (note,) = notes_of(with_width(chain, "0.1 nm"), "joint")
    quoted_mm = float(re.search(r"coherence length in it \(([0-9.]+) mm", note).group(1))
    assert quoted_mm == pytest.approx((1550e-9) ** 2 / 0.1e-9 * 1e3, rel=1e-3)
    assert notes_of(evaluate(chain), "joint")  # and under 100 wavelengths without the width
