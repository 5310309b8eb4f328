"""The terminal report of long sweeps: bounded in length, naming the worst wavelength, while the
JSON and CSV outputs keep every point."""

import csv
import io
import json

import numpy as np

from tests.conftest import run_cli

BAND_LINK = """\
title: Long sweep
band: {from: 1260 nm, to: 1625 nm, step: 0.365 nm}
source: {power: 0 dBm}
receiver: {sensitivity: -20 dBm, required_margin: 3 dB}
chain:
  - name: trunk
    kind: fiber
    length: 40 km
    attenuation: {model: silica, water_peak: legacy, excess: {typ: 0.02 dB/km, max: 0.05 dB/km}}
"""


def _label(wavelength_nm):
    return f"{wavelength_nm:.6f}".rstrip("0").rstrip(".")


def _terminal(path):
    return run_cli("run", path).stdout


def test_band_of_1001_points_shows_its_worst_and_best_points(write_link):
    path = write_link(BAND_LINK)
    data = json.loads(run_cli("run", path, "--format", "json").stdout)
    wavelengths_nm = np.array(data["wavelengths_nm"])
    worst = np.array(data["margin_db"]["worst"])
    assert wavelengths_nm.size == 1001
    out = _terminal(path)
    assert len(out.splitlines()) < 70
    # the water peak at 1383 nm dominates legacy fibre's loss: the worst point is the sweep's nearest
    worst_nm = wavelengths_nm[np.argmin(worst)]
    assert abs(worst_nm - 1383) < 0.365
    assert f"worst-case margin {worst.min():.2f} dB at {_label(worst_nm)} nm" in " ".join(out.split())
    failing = worst < 3.0
    edges = wavelengths_nm[failing][[0, -1]]
    assert f"{failing.sum()} of 1001 wavelengths fail" in out
    assert f"{_label(edges[0])} nm to {_label(edges[1])} nm" in " ".join(out.split())


def test_band_csv_keeps_every_point(write_link):
    rows = list(csv.DictReader(io.StringIO(run_cli("run", write_link(BAND_LINK), "--format", "csv").stdout)))
    assert len({row["wavelength_nm"] for row in rows}) == 1001


def test_channel_plan_lists_each_channel_once(write_link):
    channels = [1271 + 20 * number for number in range(18)]
    text = BAND_LINK.replace("band: {from: 1260 nm, to: 1625 nm, step: 0.365 nm}",
                             f"channels: [{', '.join(f'{c} nm' for c in channels)}]")
    out = _terminal(write_link(text))
    assert "per channel" in out
    assert all(out.count(f"{c} nm ") + out.count(f"{c} nm\n") >= 1 for c in channels)
    assert "18 channels; the worst is 1391 nm" in out  # nearest to the 1383 nm water peak


def test_short_axis_keeps_the_margin_table(write_link):
    text = BAND_LINK.replace("step: 0.365 nm", "step: 36.5 nm")  # 11 points
    out = _terminal(write_link(text))
    assert "Received power (dBm) and margin (dB)" in [line.strip() for line in out.splitlines()]
    assert "the 8 tightest of 11 wavelengths" in " ".join(out.split())
