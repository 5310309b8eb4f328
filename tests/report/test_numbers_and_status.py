"""Wavelength labels, JSON resolution, the per-wavelength status and the exit codes in --help."""

import json

from linkbudget.text import wavelength_text

LINK = """\
title: three close channels
channels: [1550.116 nm, 1550.0001 nm, 1550.0002 nm]
source:
  power: 0 dBm
receiver:
  sensitivity: -30 dBm
  overload: -1 dBm
chain:
  - name: pad
    kind: element
    loss: 0.1 dB
"""


def test_wavelength_text_keeps_written_digits_and_neighbours_apart():
    assert wavelength_text([1550.116e-9, 1550.0001e-9, 1550.0002e-9, 1550e-9]) == [
        "1550.116", "1550.0001", "1550.0002", "1550"]
    assert wavelength_text(1550e-9 + 2e-21) == "1550"  # float noise (1550.0000000000002) dropped


def test_status_column_shows_overload(write_link, cli):
    result = cli("run", write_link(LINK))
    assert result.exit_code == 1
    assert result.stdout.count("OVERLOAD") == 3 and " ok " not in result.stdout
    markdown = cli("run", write_link(LINK), "-f", "markdown").stdout
    assert markdown.count("| OVERLOAD |") == 3


def test_json_numbers_at_documented_resolution(write_link, cli):
    data = json.loads(cli("run", write_link(LINK), "-f", "json").stdout)
    assert data["wavelengths_nm"] == [1550.116, 1550.0001, 1550.0002]
    assert data["rows"][0]["loss_db"]["typ"] == [0.1, 0.1, 0.1]
    assert data["received_dbm"]["typ"] == [-0.1, -0.1, -0.1]


def test_help_states_every_exit_status(cli):
    text = " ".join(cli("--help").stdout.split())
    for code in ("0 the link closes", "1 a link does not meet", "2 the input is wrong", "3 an internal error"):
        assert code in text
