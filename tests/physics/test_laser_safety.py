"""Accessible emission limits of IEC 60825-1:2007 (Ed. 2) for continuous emission.

Sources, beside each check:

- C4 and C7 are ICNIRP's C_A and C_C as Directive 2006/25/EC, Annex II, Table 2.2 gives them
  (confirmed in the Norwegian regulations on action and limit values, § 11-5, which reproduce it):
  C_A = 10^(0.002(λ − 700)) for 700–1050 nm, 5 for 1050–1400 nm; C_C = 1 for 700–1150 nm,
  10^(0.018(λ − 1150)) for 1150–1200 nm, 8 for 1200–1400 nm.
- The Class 1 limits 3.9e-4·C4·C7 W (700–1400 nm) and 1.0e-2 W (1400–4000 nm), Class 3R = 5 ×
  Class 1 and Class 3B = 0.5 W: IEC 60825-1:2007 Tables 4, 6 and 8, **from memory** (also
  /work/shared/REFERENCES.md, marked M there); hazard level 1 of IEC 60825-2 uses the Class 1
  limits (STUK, "Lasers in optic cables": hazard levels are evaluated as the classes are).

Every expected number is computed here from those formulas, never read from the package.
"""

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

from linkbudget.physics import laser_safety


def nm(value):
    return value * 1e-9


# --- Class 1 at the three usual wavelengths ------------------------------------------------------

def test_class1_ael_w_850nm_is_3p9e_4_times_c4():
    # IEC 60825-1:2007 Table 4 (from memory): 3.9e-4·C4·C7 W, C4 = 10^(0.002·150), C7 = 1
    assert_allclose(laser_safety.class1_ael_w(nm(850)), 3.9e-4 * 10 ** (0.002 * 150), rtol=1e-12)
    assert_allclose(laser_safety.class1_ael_w(nm(850)) * 1e3, 0.7782, atol=1e-4)  # REFERENCES.md (D)


def test_class1_ael_w_1310nm_is_15p6mW():
    # 3.9e-4 W · C4 (5) · C7 (8), Table 4 from memory; 15.6 mW in REFERENCES.md (D)
    assert_allclose(laser_safety.class1_ael_w(nm(1310)), 3.9e-4 * 5 * 8, rtol=1e-12)


def test_class1_ael_w_1550nm_is_10mW():
    # 1400–4000 nm, exposure over 10 s: 1.0e-2 W (Table 4, from memory); it equals the short-exposure
    # energy limit 1.8e-2·t^0.75 J at t = 10 s divided by 10 s (to 1 %)
    assert laser_safety.class1_ael_w(nm(1550)) == pytest.approx(1.0e-2, rel=1e-12)
    assert 1.8e-2 * 10**0.75 / 10 == pytest.approx(1.0e-2, rel=0.02)


def test_hazard_level_limits_at_1550nm_3r_and_3b():
    # 3R = 5 × Class 1 outside 400–700 nm, 3B = 0.5 W (Tables 6 and 8, from memory): +17 dBm and +27 dBm
    assert 10 * math.log10(laser_safety.class3r_ael_w(nm(1550)) / 1e-3) == pytest.approx(10 * math.log10(50))
    assert laser_safety.class3b_ael_w(nm(1550)) == 0.5


# --- band boundaries behave as the formulas say -------------------------------------------------

def test_correction_factor_c4_steps_at_1050nm_as_written():
    # C_A: 10^(0.002·350) = 5.0119 just below 1050 nm, then the constant 5 (Directive 2006/25/EC)
    below, at = laser_safety.correction_factor_c4(np.array([nm(1049.999999), nm(1050)]))
    assert below == pytest.approx(10 ** (0.002 * 349.999999), rel=1e-12)
    assert at == 5.0


def test_correction_factor_c7_is_continuous_at_1150nm_and_steps_at_1200nm():
    values = laser_safety.correction_factor_c7(np.array([nm(1149.9), nm(1150), nm(1175), nm(1199.999999), nm(1200)]))
    assert_allclose(values, [1.0, 1.0, 10 ** (0.018 * 25), 10 ** (0.018 * 49.999999), 8.0], rtol=1e-12)


def test_class1_ael_w_at_1400nm_retinal_then_corneal():
    # at 1400 nm the retinal formula still holds (15.6 mW); just above it the 10 mW limit
    assert_allclose(laser_safety.class1_ael_w(np.array([nm(1400), nm(1400.001)])), [15.6e-3, 1.0e-2], rtol=1e-12)


def test_class1_ael_w_at_700nm_is_0p39mW():
    assert laser_safety.class1_ael_w(nm(700)) == pytest.approx(3.9e-4, rel=1e-12)


def test_class1_ael_w_outside_700_to_4000nm_not_assessed():
    assert np.all(np.isnan(laser_safety.class1_ael_w(np.array([nm(650), nm(4000.001), nm(10_000)]))))
    assert laser_safety.class1_ael_w(nm(4000)) == pytest.approx(1.0e-2)


# --- hazard level from the ratios ----------------------------------------------------------------

@pytest.mark.parametrize(("ratios", "level"), [
    ((0.9, 0.9, 0.0, 0.2, 0.02), "1"),
    ((1.5, 0.8, 0.5, 0.3, 0.03), "1M"),   # the unaided eye within Class 1, aided within 3B
    ((1.5, 0.8, 1.2, 0.3, 1.2), "3R"),    # aided above 3B: not 1M
    ((6.0, 6.0, 0.8, 1.2, 0.8), "3B"),
    ((60.0, 60.0, 8.0, 12.0, 8.0), "4"),
])
def test_hazard_level_order(ratios, level):
    assert laser_safety.hazard_level(*ratios) == level
