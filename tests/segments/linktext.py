"""Link texts around a chain of segments, for the segment tests."""

import pytest
import yaml

import linkbudget
from linkbudget.config.source import format_key_path


def link_text(chain, axis="wavelength: 1550 nm"):
    """A link around ``chain`` (a list of segment mappings), 0 dBm into a -40 dBm receiver."""
    return f"""title: waveguide test link
{axis}
source:
  power: 0 dBm
receiver:
  sensitivity: -40 dBm
chain:
{yaml.safe_dump(chain, sort_keys=False)}"""


def only_problem(chain):
    """The one input problem of a link around ``chain``: (key path, message with its hint)."""
    with pytest.raises(linkbudget.ConfigError) as error:
        linkbudget.load(link_text(chain))
    (problem,) = error.value.problems
    return format_key_path(problem.path), f"{problem.message} {problem.hint or ''}"


def evaluate(chain, axis="wavelength: 1550 nm"):
    """The evaluated link around ``chain``."""
    return linkbudget.evaluate(linkbudget.load(link_text(chain, axis)))


def row(result, name):
    """The one budget row of ``result`` called ``name``."""
    (found,) = [candidate for candidate in result.rows if candidate.name == name]
    return found
