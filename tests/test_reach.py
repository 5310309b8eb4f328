"""``linkbudget reach`` against closed forms computed here.

- A linear budget: the worst-case margin is P − Σ losses − S, so the longest fibre is
  L = (P − S − M − other losses) / α (available loss ÷ attenuation), the most splices
  N = floor(available loss ÷ loss of one), the smallest launch power P = S + M + Σ losses.
- A free-space gap into an aperture: the aperture passes T = 1 − exp(−2a²/w(z)²) with
  w(z) = w0·√(1 + (z/z_R)²), z_R = π·w0²·n/λ (Siegman, *Lasers*, 1986; REFERENCES.md "Gaussian
  modes"); inverted, the longest gap for an available loss A dB is
  z = z_R·√(w²/w0² − 1) with w² = −2a²/ln(1 − 10^(−A/10)).
"""

import json

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.reach import LIMITED, NEVER_CLOSES, NEVER_LIMITS, ReachError, find_reach, target_of
from tests.conftest import run_cli

FIBRE_LINK = """\
title: Reach test link
channels: [1310 nm, 1550 nm]
source:
  power: {min: -2 dBm, typ: 0 dBm}
receiver:
  sensitivity: -28 dBm
  overload: -1 dBm
  required_margin: 3 dB
chain:
  - name: trunk
    kind: fiber
    length: {typ: 10 km, max: 10.5 km}
    attenuation: {1310 nm: {typ: 0.33 dB/km, max: 0.4 dB/km}, 1550 nm: {typ: 0.2 dB/km, max: 0.25 dB/km}}
  - name: panels
    kind: connector
    count: 2
    loss: {typ: 0.3 dB, max: 0.75 dB}
  - name: splices
    kind: splice
    count: 6
    loss: {typ: 0.05 dB, max: 0.1 dB}
"""

# worst case: launch -2 dBm, sensitivity -28 dBm, required 3 dB: 23 dB available for the losses
AVAILABLE_DB = -2 - (-28) - 3


def _reach(text, vary, **kwargs):
    link = linkbudget.load(text)
    return find_reach(link, target_of(link, vary), **kwargs)


def test_reach_fibre_length_is_available_loss_over_attenuation():
    found = _reach(FIBRE_LINK, "trunk.length")
    joints_db = 2 * 0.75 + 6 * 0.1
    expected_m = (AVAILABLE_DB - joints_db) / 0.4e-3  # the 1310 nm worst attenuation limits
    assert found.outcome == LIMITED
    assert_allclose(found.value, expected_m, rtol=1e-9)
    assert_allclose(found.slack.margin_db, 3.0, atol=1e-6)
    assert found.wavelength_m[found.failing.wavelength_index] == pytest.approx(1310e-9)
    assert found.failing.limited_by == "sensitivity"


def test_reach_splice_count_is_a_whole_number():
    found = _reach(FIBRE_LINK, "splices.count")
    expected = int(np.floor((AVAILABLE_DB - 10.5 * 0.4 - 2 * 0.75) / 0.1))
    assert (found.outcome, found.value) == (LIMITED, expected)
    assert found.slack.slack_db >= 0 > found.failing.slack_db


def test_reach_connector_count():
    found = _reach(FIBRE_LINK, "panels.count")
    assert found.value == int(np.floor((AVAILABLE_DB - 10.5 * 0.4 - 6 * 0.1) / 0.75))


def test_reach_source_power_is_the_smallest_that_closes():
    found = _reach(FIBRE_LINK, "source.power")
    losses_db = 10.5 * 0.4 + 2 * 0.75 + 6 * 0.1
    assert_allclose(found.value, -28 + 3 + losses_db, rtol=1e-9)
    assert found.target.smallest


LOSSLESS_TRUNK = FIBRE_LINK.replace(
    "attenuation: {1310 nm: {typ: 0.33 dB/km, max: 0.4 dB/km}, 1550 nm: {typ: 0.2 dB/km, max: 0.25 dB/km}}",
    "attenuation: 0 dB/km").replace("overload: -1 dBm", "overload: 0 dBm")


def test_reach_never_limits():
    # a fibre without loss closes at any length up to the valid range's end (40000 km)
    found = _reach(LOSSLESS_TRUNK, "trunk.length")
    assert found.outcome == NEVER_LIMITS
    assert found.value == pytest.approx(found.target.bounds.high)


def test_reach_never_closes():
    found = _reach(FIBRE_LINK.replace("sensitivity: -28 dBm", "sensitivity: 5 dBm").replace(
        "overload: -1 dBm", "overload: 10 dBm"), "trunk.length")
    assert found.outcome == NEVER_CLOSES
    assert found.slack.slack_db < 0


GAP_LINK = """\
title: Reach of a free-space gap
wavelength: 1550 nm
source:
  power: 0 dBm
receiver:
  sensitivity: -30 dBm
  required_margin: 3 dB
chain:
  - name: path
    kind: gap
    index: 1.0
    length: 10 m
    beam: {waist_diameter: 1 mm}
    aperture: 20 mm
"""


def _gap_length_m(available_db, waist_m, aperture_radius_m, wavelength_m, n=1.0):
    transmittance = 10 ** (-available_db / 10)
    spot_squared = -2 * aperture_radius_m**2 / np.log1p(-transmittance)
    rayleigh_m = np.pi * waist_m**2 * n / wavelength_m
    return rayleigh_m * np.sqrt(spot_squared / waist_m**2 - 1)


def test_reach_gap_length_inverts_the_aperture_formula():
    found = _reach(GAP_LINK, "path.length")
    assert found.outcome == LIMITED
    assert_allclose(found.value, _gap_length_m(27.0, 0.5e-3, 10e-3, 1550e-9), rtol=1e-8)


def test_reach_aperture_is_limited_by_overload():
    # a larger aperture passes more: with an overload of -0.5 dBm the largest aperture passes
    # T = 10^(-0.5/10), so a = w·sqrt(-ln(1 - T)/2) at the gap's 10 m
    text = GAP_LINK.replace("required_margin: 3 dB", "required_margin: 3 dB\n  overload: -0.5 dBm")
    found = _reach(text, "path.aperture")
    waist_m, rayleigh_m = 0.5e-3, np.pi * 0.5e-3**2 / 1550e-9
    spot_m = waist_m * np.sqrt(1 + (10 / rayleigh_m) ** 2)
    expected_diameter_m = 2 * spot_m * np.sqrt(-np.log(1 - 10 ** (-0.05)) / 2)
    assert found.outcome == LIMITED and found.failing.limited_by == "overload"
    assert_allclose(found.value, expected_diameter_m, rtol=1e-8)


@pytest.mark.parametrize("vary", ["nowhere.length", "trunk.colour", "trunk.attenuation", "trunk"])
def test_reach_unknown_key_is_refused(vary):
    link = linkbudget.load(FIBRE_LINK)
    with pytest.raises(ReachError, match="--vary"):
        target_of(link, vary)


def test_reach_cli_exit_codes_and_json(write_link):
    path = write_link(FIBRE_LINK)
    limited = run_cli("reach", path, "--vary", "trunk.length", "--format", "json")
    assert limited.exit_code == 0
    data = json.loads(limited.stdout)
    assert data["schema"] == "linkbudget.reach/1" and data["outcome"] == "limited"
    assert data["limited_by"] == "sensitivity" and data["limiting_wavelength_nm"] == 1310
    assert_allclose(data["limit"], (AVAILABLE_DB - 2.1) / 0.4e-3, rtol=1e-9)
    never_closes = write_link(FIBRE_LINK.replace("sensitivity: -28 dBm", "sensitivity: 5 dBm").replace(
        "overload: -1 dBm", "overload: 10 dBm"), "short.yaml")
    assert run_cli("reach", never_closes, "--vary", "trunk.length").exit_code == 5
    assert run_cli("reach", write_link(LOSSLESS_TRUNK, "lossless.yaml"), "--vary", "trunk.length").exit_code == 4
    refused = run_cli("reach", path, "--vary", "trunk.colour")
    assert refused.exit_code == 2 and "trunk.colour" in refused.stderr


def test_reach_terminal_text(write_link):
    out = run_cli("reach", write_link(FIBRE_LINK), "--vary", "trunk.length").stdout
    assert "limit:       52.25 km: worst-case margin +3.00 dB at 1310 nm" in out
    assert "limited by:  the receiver sensitivity" in out
