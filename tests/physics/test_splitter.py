"""Tests of linkbudget.physics.splitter.

An ideal lossless 1×N splitter puts 1/N of the power in each port (energy conservation; the
10·log10 N splitting loss of textbooks such as Keiser, Optical Fiber Communications, from memory).
The check values are arithmetic of that law.
"""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

from linkbudget.physics.decibel import transmittance_from_loss_db
from linkbudget.physics.splitter import ideal_split_loss_db, tap_loss_db


def test_ideal_split_loss_db_standard_port_counts():
    # 10·log10 N: 1×2 3.0103 dB, 1×8 9.0309 dB, 1×32 15.0515 dB (arithmetic, 5 significant digits)
    assert_allclose(ideal_split_loss_db(np.array([2, 8, 32])), [3.0103, 9.0309, 15.0515], atol=5e-5)


def test_ideal_split_loss_db_single_port_is_lossless():
    assert ideal_split_loss_db(1) == 0.0


@pytest.mark.parametrize("ports", [0, -4, 2.5, np.nan, True, "8"])
def test_ideal_split_loss_db_rejects_non_counts(ports):
    with pytest.raises(ValueError, match="integer"):
        ideal_split_loss_db(ports)


@settings(max_examples=40, derandomize=True, deadline=None)
@given(first=st.integers(1, 64), second=st.integers(1, 64))
def test_ideal_split_loss_db_cascade_adds_in_db(first, second):
    # a 1×M splitter on every port of a 1×N splitter is a 1×(N·M) splitter: losses add in dB
    assert_allclose(
        ideal_split_loss_db(first) + ideal_split_loss_db(second), ideal_split_loss_db(first * second), rtol=1e-12
    )


def test_tap_loss_db_two_percent_tap():
    # 2/98 tap: through port −10·log10(0.98) = 0.0877 dB, tap port −10·log10(0.02) = 16.9897 dB
    # (arithmetic, quoted to 4 decimals)
    assert_allclose(tap_loss_db(np.array([0.98, 0.02])), [0.0877, 16.9897], atol=5e-5)


def test_tap_loss_db_full_ratio_is_lossless():
    assert tap_loss_db(1.0) == 0.0


@pytest.mark.parametrize("ratio", [0.0, -0.1, 1.01, np.nan])
def test_tap_loss_db_rejects_impossible_ratio(ratio):
    with pytest.raises(ValueError, match="ratio"):
        tap_loss_db(ratio)


@settings(max_examples=40, derandomize=True, deadline=None)
@given(ratio=st.floats(1e-6, 1.0 - 1e-6))
def test_tap_loss_db_ports_conserve_power(ratio):
    # an ideal lossless tap: the two ports together carry all the input power
    both = transmittance_from_loss_db(tap_loss_db(ratio)) + transmittance_from_loss_db(tap_loss_db(1.0 - ratio))
    assert_allclose(both, 1.0, rtol=1e-12)
