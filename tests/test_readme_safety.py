"""The README's eye-safety, back-reflection and PDL example is what the tool prints for it.

The figures themselves are checked against closed forms and tmm in
tests/test_shipped_examples.py (``test_vineyard_frost_fan_broadcast_...``); here the README's
blocks and sentences must be the tool's own output for configs/vineyard-frost-fan-broadcast.yaml.
"""

import re
from pathlib import Path

import pytest

from tests.conftest import run_cli

ROOT = Path(__file__).resolve().parents[1]
README = (ROOT / "README.md").read_text(encoding="utf-8")
SECTION = README[README.index("## Eye safety, back reflection and polarization"):README.index("## Commands")]


def collapsed(text):
    return " ".join(re.sub(r"[\u2500-\u257f]", " ", text).split())


@pytest.fixture(scope="module")
def printed():
    result = run_cli("run", ROOT / "configs" / "vineyard-frost-fan-broadcast.yaml")
    assert result.exit_code == 0
    return collapsed(result.stdout)


def blocks(text):
    """The fenced blocks without a language tag (the tool's output), in order."""
    found, current, language = [], None, None
    for line in text.splitlines():
        if line.startswith("```"):
            if current is None:
                current, language = [], line[3:].strip()
            else:
                if not language:
                    found.append("\n".join(current))
                current = None
        elif current is not None:
            current.append(line)
    return found


def test_readme_safety_blocks_are_the_tool_output(printed):
    shown = blocks(SECTION)
    assert len(shown) == 2
    for block in shown:
        assert collapsed(block) in printed


@pytest.mark.parametrize("figure", ["PDL 0.13 dB (s 0.22, p 0.09)", "−36.46 dB", "−41.45 dB", "25.1 mW"])
def test_readme_safety_sentences_quote_the_output(printed, figure):
    assert figure in SECTION
    assert figure.replace("−", "-") in printed


def test_readme_gates_fail_the_example(tmp_path):
    config = ROOT / "configs" / "vineyard-frost-fan-broadcast.yaml"
    assert run_cli("check", config).exit_code == 0
    assert run_cli("check", config, "--max-hazard-level", "1").exit_code == 1
    assert run_cli("check", config, "--max-hazard-level", "3R").exit_code == 0
    assert run_cli("check", config, "--max-back-reflection", "-40dB").exit_code == 1
    assert run_cli("check", config, "--max-pdl", "0.2dB").exit_code == 1
