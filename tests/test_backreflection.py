"""The back-reflection budget (linkbudget.backreflection) against closed forms worked out here.

Two reflectors R1 and R2 with a transmittance T between them return B = R1 + T²·R2 (incoherent
sum, the light crossing the loss twice); a return loss RL is R = 10^(−RL/10) (IEC 61300-3-6's
definition of return loss, from memory); a bare face at normal incidence reflects
R = ((n1 − n2)/(n1 + n2))² (Fresnel; Born & Wolf, *Principles of Optics*); n = 1.5 in air → 4 %
(/work/shared/REFERENCES.md, D); an index-matched joint has no face and reflects nothing.
"""

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from tests.conftest import run_cli


def review(chain, source_extra=""):
    text = f"""\
title: Back-reflection test
wavelength: 1310 nm
source:
  power: 0 dBm{source_extra}
receiver:
  sensitivity: -30 dBm
chain:
{chain}"""
    return linkbudget.evaluate(linkbudget.load(text)).review.back_reflection


TWO_CONNECTORS = """\
  - name: first
    kind: connector
    loss: 0.5 dB
    return_loss: {return_loss}
  - name: span
    kind: fiber
    length: 5 km
    attenuation: 0.4 dB/km
  - name: second
    kind: connector
    loss: 0.3 dB
    return_loss: 30 dB
"""


def test_back_reflection_two_connectors_closed_form():
    budget = review(TWO_CONNECTORS.format(return_loss="40 dB"))
    r1, r2 = 10 ** -4.0, 10 ** -3.0
    t = 10 ** (-(0.5 + 2.0) / 10)  # the first connector's loss and 5 km × 0.4 dB/km
    for figure in ("typ", "worst"):
        assert_allclose(budget.total(figure), [r1 + t**2 * r2], rtol=1e-12)
    assert budget.largest().row_id == "second"
    assert_allclose(budget.level_db("worst"), [10 * math.log10(r1 + t**2 * r2)], rtol=1e-12)


def test_back_reflection_return_loss_spread_uses_its_bad_end():
    budget = review(TWO_CONNECTORS.format(return_loss="{min: 35 dB, typ: 45 dB}"))
    t2 = 10 ** (-5.0 / 10)
    assert_allclose(budget.total("typ"), [10 ** -4.5 + t2 * 1e-3], rtol=1e-12)
    assert_allclose(budget.total("worst"), [10 ** -3.5 + t2 * 1e-3], rtol=1e-12)


def test_back_reflection_fresnel_faces_of_a_window_add_their_reflectance():
    budget = review("  - name: window\n    kind: medium\n    thickness: 2 mm\n    index: 1.5\n")
    r = ((1.5 - 1) / (1.5 + 1)) ** 2
    assert r == pytest.approx(0.04)
    assert [item.row_id for item in budget.reflections] == ["air → window", "window → air"]
    assert_allclose(budget.total("typ"), [r + (1 - r) ** 2 * r], rtol=1e-12)


FIBRES_JOINED = """\
  - name: left
    kind: fiber
    length: 10 m
    attenuation: 0.4 dB/km
    index: 1.468
  - name: joint
    kind: connector
    loss: 0.3 dB
    joint: {joint}
  - name: right
    kind: fiber
    length: 10 m
    attenuation: 0.4 dB/km
    index: 1.45
"""


def test_back_reflection_index_matched_joint_adds_none():
    assert review(FIBRES_JOINED.format(joint="index-matched")).reflections == ()
    assert_allclose(review(FIBRES_JOINED.format(joint="index-matched")).total("worst"), [0.0])
    # the same joint in physical contact has the face between the two indices
    contact = review(FIBRES_JOINED.format(joint="physical-contact"))
    t2 = 10 ** (-2 * (0.004 + 0.3) / 10)
    assert_allclose(contact.total("typ"), [t2 * ((1.468 - 1.45) / (1.468 + 1.45)) ** 2], rtol=1e-9)


def test_back_reflection_tolerance_gated_in_check(write_link, tmp_path):
    text = f"""\
title: Tolerance test
wavelength: 1310 nm
source:
  power: 0 dBm
  max_back_reflection: -40 dB
receiver:
  sensitivity: -30 dBm
chain:
{TWO_CONNECTORS.format(return_loss="40 dB")}"""
    path = write_link(text)
    budget = linkbudget.evaluate(linkbudget.load(path)).review.back_reflection
    assert not budget.tolerated and budget.tolerance_db == -40.0
    result = run_cli("check", path)
    assert result.exit_code == 1 and "back reflection -33.81 dB above -40.00 dB" in result.stdout
    assert run_cli("check", path, "--max-back-reflection", "-30 dB").exit_code == 0
    assert run_cli("check", path, "--max-back-reflection", "3 dB").exit_code == 2
    assert 10 * np.log10(1e-4 + 10 ** -0.5 * 1e-3) == pytest.approx(-33.81, abs=0.005)  # R1 + T²·R2
