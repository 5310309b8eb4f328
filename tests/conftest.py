"""Shared test fixtures: a minimal valid link, writing links to files, and invoking the CLI.

``MINIMAL_LINK`` is written by hand against the config reference in README.md: one 1310 nm
wavelength, 0 dBm launched, one 2 km fibre at 0.5 dB/km (1 dB) and one 0.5 dB connector, so the
received power is -1.5 dBm and the margin against the -30 dBm sensitivity is 28.5 dB.
"""

from pathlib import Path

import pytest
from typer.testing import CliRunner

from linkbudget.cli import app

MINIMAL_LINK = """\
title: Minimal test link
wavelength: 1310 nm
source:
  power: 0 dBm
receiver:
  sensitivity: -30 dBm
chain:
  - name: trunk
    kind: fiber
    length: 2 km
    attenuation: 0.5 dB/km
  - name: panel
    kind: connector
    loss: 0.5 dB
"""

#: The example links shipped with the project; the tests run every one of them.
CONFIGS = sorted((Path(__file__).resolve().parents[1] / "configs").glob("*.yaml"))
#: A link with every registered segment kind once, each where it can stand (the contract suite's).
EVERY_KIND = Path(__file__).resolve().parent / "data" / "every-kind.yaml"


@pytest.fixture
def minimal_link():
    """The text of a small valid link (see the module docstring for its numbers)."""
    return MINIMAL_LINK


@pytest.fixture
def write_link(tmp_path):
    """``write_link(text, name="link.yaml")`` writes text (str, or bytes as-is) and returns the path."""
    def write(text, name="link.yaml"):
        path = tmp_path / name
        if isinstance(text, bytes):
            path.write_bytes(text)
        else:
            path.write_text(text, encoding="utf-8")
        return path

    return write


_RUNNER = CliRunner()


def run_cli(*args):
    """Run ``linkbudget ARGS`` in-process and return the click ``Result``.

    The runner turns any uncaught exception into exit code 1, which would pass for "the link
    does not close"; so this fails the test unless the command ended through ``SystemExit``
    (the only way the app exits on purpose).
    """
    result = _RUNNER.invoke(app, [str(arg) for arg in args])
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        raise AssertionError(
            f"linkbudget {' '.join(map(str, args))} raised {type(result.exception).__name__}: {result.exception}"
        ) from result.exception
    return result


@pytest.fixture
def cli():
    """:func:`run_cli` as a fixture: ``cli("run", path)``."""
    return run_cli


#: A user material file (invented Cauchy glass) for the tests of material files.
TEST_GLASS = """\
name: test-glass
description: An invented glass for the tests
source: hand-made coefficients (2024)
valid_range: {from: 400 nm, to: 1.6 um}
cauchy:
  wavelength_unit: um
  coefficients: [1.5, 0.004]
  powers: [0, -2]
"""
