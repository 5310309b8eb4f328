"""Eye safety at the reachable points of a link (linkbudget.safety), end to end.

Expected numbers are worked out here: the powers from the link's own datasheet figures, the
limits from the formulas of IEC 60825-1:2007 Table 4 (from memory; see
tests/physics/test_laser_safety.py for their sources), the power in an aperture from the Gaussian
beam w(z) = w0·√(1 + (z/z_R)²), z_R = π·w0²/λ (Kogelnik & Li, Appl. Opt. 5, 1550, 1966) and
T = 1 − exp(−2a²/w²) (Siegman, *Lasers*, 1986), and the 7 mm / 100 mm, 7 mm / 14 mm and
50 mm / 2000 mm conditions of IEC 60825-1:2007 Table 10 (from memory; 3.5 mm above 1400 nm for the
unaided eye).
"""

import json
import math

import pytest

import linkbudget
from tests.conftest import CONFIGS, run_cli


def link(chain, *, wavelength="wavelength: 1550 nm", power="{min: 10 dBm, typ: 12 dBm, max: 13 dBm}", extra=""):
    return f"""\
title: Safety test link
{wavelength}
source:
  power: {power}
receiver:
  sensitivity: -30 dBm
chain:
{chain}{extra}"""


HOT_THEN_ATTENUATED = """\
  - name: lead
    kind: fiber
    length: 1 km
    attenuation: {typ: 0.3 dB/km, min: 0.2 dB/km, max: 0.4 dB/km}
  - name: hot panel
    kind: connector
    loss: {min: 0.1 dB, typ: 0.3 dB, max: 0.75 dB}
  - name: attenuator
    kind: element
    loss: {min: 10 dB, typ: 10.5 dB, max: 11 dB}
  - name: far panel
    kind: connector
    loss: 0.5 dB
"""


def points(text):
    review = linkbudget.evaluate(linkbudget.load(text)).review
    return {item.point.name: item for item in review.assessments}


def test_assess_link_connector_above_class1_flagged_there_not_after_loss():
    found = points(link(HOT_THEN_ATTENUATED))
    # 13 dBm max launch, 0.2 dB of fibre at its low end before the hot panel: 12.8 dBm = 19.05 mW
    hot_mw = 10 ** (12.8 / 10)
    assert found["hot panel"].power_w * 1e3 == pytest.approx(hot_mw, rel=1e-9)
    # beam unknown (no mode field given): all of it counts, against 10 mW at 1550 nm
    assert found["hot panel"].margin_db == pytest.approx(10 * math.log10(10 / hot_mw), abs=1e-9)
    assert found["hot panel"].above_level_1 and found["hot panel"].hazard_level == "3R"  # below 5 × 10 mW
    # after 0.1 dB of connector and 10 dB of attenuator at their low ends: 2.7 dBm, within Class 1
    assert found["far panel"].power_w * 1e3 == pytest.approx(10 ** (2.7 / 10), rel=1e-9)
    assert found["far panel"].hazard_level == "1" and not found["far panel"].above_level_1
    assert found["receiver input"].hazard_level == "1"
    assert found["source output"].above_level_1


def test_assess_link_well_below_flagged_nowhere():
    found = points(link(HOT_THEN_ATTENUATED, power="{min: -3 dBm, typ: -1 dBm, max: 0 dBm}"))
    assert all(item.hazard_level == "1" for item in found.values())
    assert found["source output"].margin_db == pytest.approx(10.0, abs=1e-9)  # 1 mW against 10 mW


def test_assess_link_cwdm_channels_add_at_a_shared_point():
    # four channels of 6 dBm (3.98 mW) each: 15.9 mW in all against 15.6 mW at every one of them
    # (1271–1331 nm: C4 = 5, C7 = 8), so the sum is above the limit though each channel alone is not
    chain = "  - name: panel\n    kind: connector\n    loss: 0.5 dB\n"
    text = link(chain, wavelength="channels: [1271 nm, 1291 nm, 1311 nm, 1331 nm]", power="6 dBm")
    found = points(text)
    each_mw = 10 ** 0.6
    assert found["source output"].power_w * 1e3 == pytest.approx(4 * each_mw, rel=1e-9)
    assert found["source output"].margin_db == pytest.approx(-10 * math.log10(4 * each_mw / 15.6), abs=1e-9)
    assert found["source output"].above_level_1
    alone = points(link(chain, wavelength="wavelength: 1271 nm", power="6 dBm"))
    assert not alone["source output"].above_level_1


def test_assess_link_band_points_are_alternatives_not_summed():
    chain = "  - name: panel\n    kind: connector\n    loss: 0.5 dB\n"
    found = points(link(chain, wavelength="band: {from: 1280 nm, to: 1340 nm, step: 20 nm}", power="6 dBm"))
    assert found["source output"].power_w * 1e3 == pytest.approx(10 ** 0.6, rel=1e-9)
    assert not found["source output"].above_level_1


def gaussian_fraction(waist_m, wavelength_m, distance_m, aperture_diameter_m):
    rayleigh_m = math.pi * waist_m**2 / wavelength_m
    spot_m = waist_m * math.sqrt(1 + (distance_m / rayleigh_m) ** 2)
    return 1 - math.exp(-2 * (aperture_diameter_m / 2) ** 2 / spot_m**2)


def test_assess_link_fibre_end_with_known_mode_is_hazard_level_1m():
    # 15 mW out of a fibre of 10.4 um mode field diameter at 1550 nm: through the 7 mm aperture at
    # 14 mm nearly all of it, through 3.5 mm at 100 mm (the unaided eye) a few per cent
    chain = ("  - name: pigtail\n    kind: fiber\n    length: 1 m\n    attenuation: 0 dB/km\n"
             "    mode_field_diameter: 10.4 um\n  - name: open end\n    kind: connector\n    loss: 0.5 dB\n")
    found = points(link(chain, power="11.76091259 dBm"))["open end"]
    power_mw = 10 ** 1.176091259
    fractions = [gaussian_fraction(5.2e-6, 1550e-9, distance, aperture)
                 for distance, aperture in ((2.0, 50e-3), (14e-3, 7e-3), (100e-3, 3.5e-3))]
    assert found.margin_db == pytest.approx(-10 * math.log10(power_mw * max(fractions) / 10), abs=1e-6)
    assert power_mw * fractions[2] < 10 < power_mw * max(fractions)
    assert found.hazard_level == "1M" and found.beam_known


REACHABLE = """
reachable:
  add:
    - after: attenuator
      name: monitor tap
  exclude:
    - at: hot panel
      reason: inside the locked transmitter shelf
"""


def test_reachable_block_adds_and_excludes_with_reason(write_link):
    text = link(HOT_THEN_ATTENUATED, extra=REACHABLE)
    review = linkbudget.evaluate(linkbudget.load(text)).review
    names = [item.point.name for item in review.assessments]
    assert names == ["source output", "monitor tap", "far panel", "receiver input"]
    (excluded,) = review.excluded
    assert (excluded.name, excluded.excluded) == ("hot panel", "inside the locked transmitter shelf")
    # the tap sits after the attenuator: 13 − 0.2 − 0.1 − 10 dB
    assert review.assessments[1].power_w * 1e3 == pytest.approx(10 ** (2.7 / 10), rel=1e-9)
    path = write_link(text)
    terminal = run_cli("run", path).stdout
    assert "inside the locked transmitter shelf" in terminal and "ABOVE the Class 1 limit" in terminal
    data = json.loads(run_cli("run", path, "--format", "json").stdout)
    assert data["safety"]["excluded"] == [{"name": "hot panel", "what": "connector",
                                           "reason": "inside the locked transmitter shelf"}]
    assert data["safety"]["above_hazard_level_1"] == ["source output"]


@pytest.mark.parametrize(("block", "where", "message"), [
    ("reachable:\n  add:\n    - after: atenuator\n", "reachable.add[0].after", "no segment named 'atenuator'"),
    ("reachable:\n  exclude:\n    - at: lead\n      reason: buried\n", "reachable.exclude[0].at",
     "'lead' is not a default reachable point"),
    ("reachable:\n  exclude:\n    - at: far panel\n      reason: ' '\n", "reachable.exclude[0].reason",
     "say why the point cannot be reached"),
    ("reachable:\n  exclude:\n    - at: far panel\n", "reachable.exclude[0]", "missing required key 'reason'"),
])
def test_reachable_block_errors_are_placed(write_link, block, where, message):
    result = run_cli("run", write_link(link(HOT_THEN_ATTENUATED, extra="\n" + block)))
    assert result.exit_code == 2
    line = result.stderr.splitlines()[0] if result.stderr else result.output.splitlines()[0]
    assert f": {where}: " in line and message in line, line
    assert "link.yaml:" in line and "Traceback" not in result.output


def test_check_max_hazard_level_gate(write_link):
    hot = write_link(link(HOT_THEN_ATTENUATED), "hot.yaml")
    assert run_cli("check", hot).exit_code == 0
    gated = run_cli("check", hot, "--max-hazard-level", "1")
    assert gated.exit_code == 1 and "above hazard level 1: source output 3R, hot panel 3R" in gated.stdout
    assert run_cli("check", hot, "--max-hazard-level", "3R").exit_code == 0
    assert run_cli("check", hot, "--max-hazard-level", "2X").exit_code == 2


def test_assess_link_visible_wavelength_not_assessed_and_fails_every_gate(write_link):
    # 650 nm lies outside the 700–4000 nm the limits here cover (Classes 2 and 2M are not modelled)
    found = points(link(HOT_THEN_ATTENUATED, wavelength="wavelength: 650 nm"))
    assert all(item.hazard_level is None and item.above_level_1 for item in found.values())
    path = write_link(link(HOT_THEN_ATTENUATED, wavelength="wavelength: 650 nm"))
    assert "NOT ASSESSED at 650 nm" in run_cli("run", path).stdout
    assert run_cli("check", path, "--max-hazard-level", "3B").exit_code == 1


@pytest.mark.parametrize("config", CONFIGS, ids=[path.name for path in CONFIGS])
def test_every_result_holds_the_review_objects(config):
    data = json.loads(run_cli("run", config, "--format", "json").stdout)
    assert list(data)[-4:] == ["safety", "back_reflection", "polarization_dependent_loss", "cautions"]
    names = [point["name"] for point in data["safety"]["points"]]
    assert names[0] == "source output" or "source output" in [p["name"] for p in data["safety"]["excluded"]]
    assert names[-1] == "receiver input"
