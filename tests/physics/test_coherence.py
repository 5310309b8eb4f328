"""Coherence length λ²/(n·Δλ) (Hecht 2017 §12.1, from memory; Born & Wolf 1999)."""

import numpy as np
from numpy.testing import assert_allclose

from linkbudget.physics.coherence import coherence_length_m


def test_coherence_length_of_a_narrow_line_at_1550nm():
    # λ²/Δλ = (1550 nm)²/0.1 nm = 24.025 mm in vacuum; in n = 1.5 it is 16.017 mm.
    assert_allclose(coherence_length_m(1550e-9, 0.1e-9), 1550e-9**2 / 0.1e-9, rtol=1e-15)
    assert_allclose(coherence_length_m(np.array([1550e-9]), 0.1e-9, n=1.5), [24.025e-3 / 1.5], rtol=1e-12)


def test_coherence_length_of_a_broad_source():
    # An LED 50 nm wide at 850 nm: 850²/50 nm = 14.45 µm.
    assert_allclose(coherence_length_m(850e-9, 50e-9), 14.45e-6, rtol=1e-12)
