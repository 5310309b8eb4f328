"""The best case of a joint across a long gap, where the receiving size that couples best is not
the launched one: checked against Joyce and DeLoach's coupling of two Gaussian waists D apart,
η = 4w1²w2²/((w1² + w2²)² + (λD/(πn))²) (Appl. Opt. 23, 4187 (1984); from memory), maximised
over the receiving size's spread by scipy in the test (no offset or tilt: the formula is exact)."""

import numpy as np
import pytest
from scipy.optimize import minimize_scalar

from tests.segments.linktext import evaluate, row

LAUNCHED_RADIUS_M, GAP_M, WAVELENGTH_M = 5.2e-6, 50e-6, 1550e-9
RECEIVING_RADII_M = (5.0e-6, 7.0e-6)  # 10 um to 14 um mode field diameter

CHAIN = [
    {"name": "launch fibre", "kind": "fiber", "length": "1 m", "attenuation": "0 dB/km",
     "mode_field_diameter": "10.4 um"},
    {"name": "bench gap", "kind": "connector", "gap": "50 um", "gap_index": 1},
    {"name": "pickup fibre", "kind": "fiber", "length": "1 m", "attenuation": "0 dB/km",
     "mode_field_diameter": {"min": "10 um", "typ": "10.4 um", "max": "14 um"}},
]


def gap_loss_db(receiving_radius_m):
    w1_sq, w2_sq = LAUNCHED_RADIUS_M**2, receiving_radius_m**2
    gap_term = WAVELENGTH_M * GAP_M / np.pi  # n = 1
    return -10 * np.log10(4 * w1_sq * w2_sq / ((w1_sq + w2_sq) ** 2 + gap_term**2))


def test_best_case_across_a_long_gap_takes_the_receiving_size_that_couples_best():
    best = minimize_scalar(gap_loss_db, bounds=RECEIVING_RADII_M, method="bounded", options={"xatol": 1e-13})
    assert 6.0e-6 < best.x < 6.1e-6  # inside the spread, away from its ends and from 5.2 um
    loss_db = row(evaluate(CHAIN), "bench gap").loss_db
    assert loss_db["best"][0] == pytest.approx(best.fun, abs=1e-9)
    assert loss_db["typ"][0] == pytest.approx(gap_loss_db(LAUNCHED_RADIUS_M), abs=1e-9)
    assert loss_db["worst"][0] == pytest.approx(max(gap_loss_db(r) for r in RECEIVING_RADII_M), abs=1e-9)
