"""A beam's waist is written as a diameter (``waist_diameter``), like every other size in a link;
``waist`` (a radius, the earlier spelling) is read for this release with a note.

The aperture loss is checked against Siegman's closed form: w(z) = w0·√(1 + (z/z_R)²),
z_R = π·w0²/λ (n = 1 in vacuum), T = 1 − exp(−2a²/w²) for an aperture of radius a.
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from tests.segments.linktext import link_text


def beam_gap(beam):
    return [{"name": "bench path", "kind": "gap", "length": "400 mm", "index": 1.0, "beam": beam,
             "aperture": "1.5 mm"}]


def test_waist_diameter_gives_the_closed_form_aperture_loss():
    result = linkbudget.evaluate(linkbudget.load(link_text(beam_gap({"waist_diameter": "0.5 mm"}))))
    waist_m, z_m, wavelength_m, aperture_radius_m = 0.25e-3, 0.4, 1550e-9, 0.75e-3
    spot_m = waist_m * np.sqrt(1 + (z_m * wavelength_m / (np.pi * waist_m**2)) ** 2)
    expected_db = -10 * np.log10(1 - np.exp(-2 * aperture_radius_m**2 / spot_m**2))
    assert_allclose(result.rows[0].loss_parts_db["beam"]["typ"], [expected_db], rtol=1e-12)


def test_old_radius_spelling_gives_the_same_budget_and_a_note():
    new = linkbudget.evaluate(linkbudget.load(link_text(beam_gap({"waist_diameter": "0.5 mm"}))))
    old = linkbudget.evaluate(linkbudget.load(link_text(beam_gap({"waist": "0.25 mm"}))))
    for case in ("typ", "worst", "best"):
        assert_allclose(old.loss_db[case], new.loss_db[case], rtol=1e-15)
    (note,) = [note for note in old.notes if "waist" in note]
    assert "radius" in note and "waist_diameter: 0.5 mm" in note
    assert not [note for note in new.notes if "waist" in note]


@pytest.mark.parametrize("beam", [{"waist_diameter": "0.5 mm", "waist": "0.25 mm"},
                                  {"waist_diameter": "0.5 mm", "divergence": "1 mrad"}])
def test_two_ways_of_giving_the_beam_are_a_placed_error(beam):
    with pytest.raises(linkbudget.ConfigError) as error:
        linkbudget.load(link_text(beam_gap(beam)))
    (problem,) = error.value.problems
    assert problem.path[:3] == ("chain", 0, "beam") and problem.mark is not None
    assert "one of them" in problem.message
