"""The wavelength axis of a band: both ends always there (issue 7 item 5).

Expected points are written out by hand from the rule in the README: from, from + step, ... and the
upper end itself, the last step shorter when the step does not divide the span.
"""

import numpy as np
import pytest

import linkbudget

LINK = """\
title: axis
{axis}
source:
  power: 0 dBm
receiver:
  sensitivity: -30 dBm
chain:
  - name: allowance
    kind: element
    loss: 1 dB
"""


@pytest.mark.parametrize(("band", "expected_nm"), [
    ("{from: 1500 nm, to: 1600 nm, step: 30 nm}", [1500, 1530, 1560, 1590, 1600]),
    ("{from: 1500 nm, to: 1600 nm, step: 20 nm}", [1500, 1520, 1540, 1560, 1580, 1600]),
    # 0.01 / 0.002 is 4.999... in binary floating point: the upper end must not be lost to it
    ("{from: 1550 nm, to: 1550.01 nm, step: 0.002 nm}", [1550, 1550.002, 1550.004, 1550.006, 1550.008, 1550.01]),
    ("{from: 1260 nm, to: 1625 nm, step: 365 nm}", [1260, 1625]),
    ("{from: 1.5 um, to: 1.6 um, step: 0.04 um}", [1500, 1540, 1580, 1600]),
])
def test_band_wavelengths_include_both_ends(band, expected_nm):
    link = linkbudget.load(LINK.format(axis=f"band: {band}"))
    result = linkbudget.evaluate(link)
    np.testing.assert_allclose(result.wavelength_m * 1e9, expected_nm, rtol=0, atol=1e-9)
    assert result.wavelength_m[-1] == link.spec.band.stop  # the written end, exactly


def test_band_has_no_point_beside_its_end():
    # ten steps only up to round-off (1e-9 nm span near 1550 nm): the end once, not a second point beside it
    link = linkbudget.load(LINK.format(axis="band: {from: 1550 nm, to: 1550.000000001 nm, step: 0.0000000001 nm}"))
    assert len(link.spec.wavelengths_m()) == 11
