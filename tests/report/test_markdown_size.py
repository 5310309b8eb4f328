"""A long band's Markdown fits a pull-request comment (issue 7 item 14); CSV keeps every point."""

import math

from linkbudget.report.markdown import MARKDOWN_MAX_WAVELENGTHS

LINK = """\
title: long band
band: {from: 1500 nm, to: 1600 nm, step: 0.1 nm}
source:
  power: 0 dBm
receiver:
  sensitivity: -30 dBm
chain:
  - name: lead
    kind: fiber
    length: 1 m
    attenuation: 0.4 dB/km
  - name: slab
    kind: medium
    thickness: 1 mm
    kappa: 1e-4
"""


def _margin_db(wavelength_nm):
    # the flux law, computed here: 10 log10(e) * 4 pi kappa L / lambda, plus 0.4 dB/km over 1 m
    loss_db = 10 * math.log10(math.e) * 4 * math.pi * 1e-4 * 1e-3 / (wavelength_nm * 1e-9) + 0.4e-3
    return 0 - loss_db + 30


def test_markdown_of_a_long_band_is_summarised(write_link, cli):
    path = write_link(LINK)
    text = cli("run", path, "--format", "markdown").stdout
    rows = [line for line in text.splitlines() if line.startswith("| 1")]
    assert len(rows) == MARKDOWN_MAX_WAVELENGTHS
    assert f"{MARKDOWN_MAX_WAVELENGTHS} of 1001 wavelengths shown" in text
    assert len(text.encode()) < 10_000  # a pull-request comment holds 65,536 characters
    # both ends are there, and the least margin (the shortest wavelength: loss goes as 1/lambda)
    first, last = rows[0].split(" | "), rows[-1].split(" | ")
    assert first[0] == "| 1500 nm" and first[4] == f"{_margin_db(1500):.2f}"
    assert last[0] == "| 1600 nm" and last[4] == f"{_margin_db(1600):.2f}"


def test_csv_of_a_long_band_keeps_every_wavelength(write_link, cli):
    path = write_link(LINK)
    text = cli("run", path, "--format", "csv").stdout
    assert sum(1 for line in text.splitlines() if line.startswith(("1500", "1600"))) >= 2
    assert len({line.split(",")[0] for line in text.splitlines()[1:] if line}) >= 1001
