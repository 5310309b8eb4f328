"""Notes on budget rows whose model is used outside its stated validity (issue 7, item 4).

Each test builds a link whose physics is outside a model's range and checks that the row says
so, with the number the note quotes checked against a closed form computed here.
"""

import numpy as np
from scipy import special

from tests.segments.linktext import evaluate


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


def test_fibre_below_lp11_cutoff_has_no_single_mode_note():
    # V = 2π·4.1 µm·0.14/1.55 µm = 2.33: single-mode, inside Marcuse's range: no note at all.
    fibre = {"kind": "fiber", "length": "1 m", "attenuation": "0.5 dB/km", "core_diameter": "8.2 um",
             "numerical_aperture": 0.14}
    result = evaluate([{"name": "f1", **fibre}, {"name": "joint", "kind": "splice", "offset": "1 um"},
                       {"name": "f2", **fibre}])
    assert result.notes == ()
