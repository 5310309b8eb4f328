"""README.md's sections on values over wavelength, long sweeps and reach, checked against the tool.

Each fragment is looked up in README.md (whitespace collapsed, as in tests/test_readme_examples.py)
and compared with the tool's output; the numbers are also worked out here from closed forms:
linear interpolation, the silica model's terms written out (Walker 1986 form; Keiser's infrared
coefficients, from memory), and the linear budget length = available loss ÷ attenuation.
"""

import re

import numpy as np
from numpy.testing import assert_allclose

import linkbudget
from tests.conftest import run_cli
from tests.report.test_sweep_summary import BAND_LINK
from tests.test_readme_examples import README, collapsed, readme_says, yaml_block

HEAD = """\
title: mux check
channels: [1250 nm, 1361 nm]
source: {power: 0 dBm}
receiver: {sensitivity: -30 dBm}
chain:
  - name: trunk
    kind: fiber
    length: 1 km
    attenuation: 0.3 dB/km
"""


def _silica_db_per_km(wavelength_nm, peak_db_per_km=0.04, floor_db_per_km=0.02):
    um = np.asarray(wavelength_nm) / 1e3
    return (0.9 / um**4 + floor_db_per_km + 7.81e11 * np.exp(-48.48 / um)
            + peak_db_per_km * np.exp(-4 * np.log(2) * ((um - 1.383) / 0.030) ** 2))


def test_readme_table_example_interpolates_and_refuses_outside(write_link):
    block = yaml_block("name: channel mux")
    readme_says("so at 1361 nm this mux loses 1.95 dB typ, 2.6 dB worst")
    text = (HEAD + block).replace("1250 nm, ", "")
    row = linkbudget.evaluate(linkbudget.load(text)).rows[1]
    share = (1361 - 1271) / (1451 - 1271)
    assert_allclose([row.loss_db["typ"][0], row.loss_db["worst"][0]],
                    [2.1 + share * (1.8 - 2.1), 2.8 + share * (2.4 - 2.8)], rtol=1e-12)
    assert_allclose([row.loss_db["typ"][0], row.loss_db["worst"][0]], [1.95, 2.6], rtol=1e-12)
    refused = run_cli("run", write_link(HEAD + block))
    assert refused.exit_code == 2
    message = refused.stderr.replace(str(write_link("", "unused.yaml").parent / "link.yaml"), "link.yaml")
    assert collapsed(readme_says(message.strip())) == collapsed(message)


def test_readme_silica_model_figures():
    readme_says("0.326 dB/km at 1310 nm, 0.306 at 1383 nm, 0.196 at 1550 nm and 0.235 at 1625 nm")
    readme_says("0.365 dB/km at 1271 nm to its least, 0.196, at 1551 nm")
    text = HEAD.replace("channels: [1250 nm, 1361 nm]",
                        "channels: [1271 nm, 1310 nm, 1383 nm, 1550 nm, 1551 nm, 1625 nm]")
    text = text.replace("attenuation: 0.3 dB/km", "attenuation: {model: silica, water_peak: low}")
    loss = linkbudget.evaluate(linkbudget.load(text)).rows[0].loss_db["typ"]  # 1 km: dB = dB/km
    expected = _silica_db_per_km([1271, 1310, 1383, 1550, 1551, 1625])
    assert_allclose(loss, expected, rtol=1e-9)
    assert [f"{value:.3f}" for value in expected] == ["0.365", "0.326", "0.306", "0.196", "0.196", "0.235"]
    cwdm = _silica_db_per_km(np.arange(1271, 1612, 20))
    assert np.arange(1271, 1612, 20)[np.argmin(cwdm)] == 1551


def test_readme_reach_example():
    out = run_cli("reach", "configs/estuary-cwdm-backhaul.yaml", "--vary", "estuary cable.length")
    assert out.exit_code == 0
    start = "Reach of estuary cable.length"
    shown = out.stdout[out.stdout.index(start):]
    readme_says(shown)
    # 18 dB available at 1271 nm; 2 × 2.8 (mux, demux) + 2 × 0.5 (panels) + 7 × 0.15 (splices) = 7.65 dB
    length_km = (0 - (-21) - 3 - 7.65) / (_silica_db_per_km(1271, floor_db_per_km=0.05))
    assert f"{length_km:.2f}" == "26.21"
    readme_says(f"so the cable may lose 10.35 dB at {_silica_db_per_km(1271, floor_db_per_km=0.05):.4f} dB/km")
    assert_allclose(float(shown.split("limit:")[1].split("km")[0]), length_km, rtol=1e-5)
    splices = run_cli("reach", "configs/estuary-cwdm-backhaul.yaml", "--vary", "cable splices.count").stdout
    limit_line = next(line for line in splices.splitlines() if "limit:" in line)
    readme_says(limit_line)
    # worst case at 1271 nm: 18 dB less the muxes 2 × 2.8, the panels 2 × 0.5 and 21.9 km of cable
    available_db = 18 - 2 * 2.8 - 2 * 0.5 - 21.9 * _silica_db_per_km(1271, floor_db_per_km=0.05)
    assert int(limit_line.split("limit:")[1].split(":")[0]) == int(np.floor(available_db / 0.15))


def test_readme_band_summary(write_link):
    readme_says("(40 km of legacy fibre on the silica model, swept from 1260 to 1625 nm in 0.365 nm steps.)")
    out = collapsed(run_cli("run", write_link(BAND_LINK)).stdout)
    (block,) = re.findall(r"```\n(Received power \(dBm\) and margin \(dB\): the worst point.*?)```", README, re.S)
    assert collapsed(block) in out
