"""The JSON writer: the streamed pieces are exactly ``json.dumps(result_dict, indent=2)`` with each
list of numbers on one line, and its vectorised rounding is Python's ``round``.

Every expected value here comes from the standard library: ``round`` for the numbers, ``json.dumps``
with ``indent=2`` for the text (what the command line wrote before the writer streamed), its flat
lists then joined onto one line by a regular expression.
"""

import json
import re

import numpy as np
import pytest

import linkbudget
from linkbudget.report import json as json_report
from linkbudget.report.output import write_atomic
from tests.conftest import CONFIGS
from tests.report.test_finite import link_text

#: A list of numbers, booleans and nulls as ``indent=2`` writes it: one item a line.
_SCALAR = r"(?:-?[0-9][0-9.eE+-]*|null|true|false)"
FLAT_LIST = re.compile(r"\[\s*(" + _SCALAR + r"(?:,\s*" + _SCALAR + r")*)\s*\]")


def one_line_lists(text):
    """``text`` (``indent=2`` JSON) with every flat list on one line, its items joined by ", "."""
    return FLAT_LIST.sub(lambda match: "[" + ", ".join(re.split(r",\s*", match.group(1))) + "]", text)


def reference_text(result):
    return one_line_lists(json.dumps(linkbudget.result_dict(result), indent=2)) + "\n"


def streamed_text(result):
    return "".join(json_report.json_chunks(result))


def adversarial_values(decimals, seed=20261202):
    """Random values over many scales, exact and near ties at the last decimal, values at and past
    the range where ``x·10^d`` holds no fraction, signed zeros and non-finite values."""
    rng = np.random.default_rng(seed)
    scale = 10.0**decimals
    random = rng.normal(size=4000) * 10.0 ** rng.integers(-14, 9, 4000)
    ties = (rng.integers(-10**7, 10**7, 2000) + 0.5) / scale
    near_ties = np.concatenate([np.nextafter(ties, np.inf), np.nextafter(ties, -np.inf)])
    large = np.array([2.0**52, 2.0**53 + 2, 1e300, -1e300, 123456789.123456789]) / scale
    special = np.array([0.0, -0.0, -1e-15, 5e-10, 0.5e-12, 2.675, 1550.0000000000002, np.inf, -np.inf, np.nan])
    return np.concatenate([random, ties, near_ties, large, special])


@pytest.mark.parametrize("decimals", [json_report.DB_RESOLUTION_DECIMALS, json_report.FRACTION_RESOLUTION_DECIMALS,
                                      json_report.WAVELENGTH_RESOLUTION_DECIMALS])
def test_number_list_is_pythons_round_to_the_bit(decimals):
    values = adversarial_values(decimals)
    expected = [round(value, decimals) + 0.0 if np.isfinite(value) else None for value in values.tolist()]
    numbers = json_report._number_list(values, decimals)
    assert [None if n is None else n.hex() for n in numbers] == [None if e is None else e.hex() for e in expected]


@pytest.mark.parametrize("decimals", [json_report.DB_RESOLUTION_DECIMALS, json_report.FRACTION_RESOLUTION_DECIMALS,
                                      json_report.WAVELENGTH_RESOLUTION_DECIMALS])
def test_fixed_decimal_text_is_the_c_encoders_repr_of_the_rounded_values(decimals):
    # In-range values of every scale the writer meets, with exact and near ties at the last
    # decimal, zeros of both signs and values that round to zero, in slices of 1,000; a value
    # that repr writes with an exponent (below 1e-4) leaves its slice to the C encoder.
    rng = np.random.default_rng(7)
    values = adversarial_values(decimals)
    rounded = np.array([round(value, decimals) if np.isfinite(value) else np.nan for value in values.tolist()])
    in_range = values[(np.abs(rounded) < 4000) & ((rounded == 0) | (np.abs(rounded) >= 1e-4))]
    spread = rng.choice([-1.0, 1.0], 20_000) * rng.uniform(1e-4, 4.0, 20_000) * 10.0 ** rng.integers(0, 4, 20_000)
    values = rng.permutation(np.concatenate([in_range, spread, [0.0, -0.0, -0.4 / 10**decimals]]))
    for start in range(0, values.size, 1000):
        part = values[start:start + 1000]
        text = json_report._fixed_decimal_text(part, decimals)
        assert text == json.dumps([round(value, decimals) + 0.0 for value in part.tolist()])[1:-1]
    assert json_report._fixed_decimal_text(np.append(values[:1000], 3e-5), decimals) is None
    assert json_report._fixed_decimal_text(np.append(values[:1000], 12345.5), decimals) is None  # five whole places


@pytest.mark.parametrize("config", CONFIGS, ids=[path.stem for path in CONFIGS])
def test_streamed_json_of_each_shipped_example_is_the_indented_dump_with_lists_on_one_line(config):
    result = linkbudget.evaluate(linkbudget.load(config))
    assert streamed_text(result) == reference_text(result)


def test_streamed_json_with_nulls_details_and_many_slices_is_the_indented_dump_with_lists_on_one_line(monkeypatch):
    # total internal reflection (null losses, a boolean list) at 60 deg, a coating's reflectance
    # and absorptance, over a band of 11 points written in slices of 3 numbers
    text = link_text(index="1.0", extra="    angle: 60 deg\n").replace(
        "wavelength: 1550 nm", "band: {from: 1500 nm, to: 1600 nm, step: 10 nm}").replace(
        "  - name: slab\n", "  - name: film\n    kind: coating\n    layers:\n"
        "      - {material: magnesium-fluoride, quarter_wave: 1550 nm}\n  - name: slab\n")
    result = linkbudget.evaluate(linkbudget.load(text))
    monkeypatch.setattr(json_report, "SLICE_NUMBERS", 3)
    pieces = list(json_report.json_chunks(result))
    data = json.loads("".join(pieces))
    assert data["margin_db"]["worst"] == [None] * 11
    assert any("total_internal_reflection" in entry for entry in data["rows"])
    assert "".join(pieces) == reference_text(result)
    assert max(len(re.findall(r"-?[0-9][0-9.eE+-]*|null", piece)) for piece in pieces if '"' not in piece) == 3


def test_cli_json_file_is_its_standard_output(cli, tmp_path):
    config = CONFIGS[0]
    printed = cli("run", config, "-f", "json")
    written = cli("run", config, "-f", "json", "-o", tmp_path / "result.json")
    assert written.exit_code == printed.exit_code and written.stdout == ""
    assert (tmp_path / "result.json").read_text(encoding="utf-8") == printed.stdout


def test_atomic_write_of_pieces_writes_them_in_order(tmp_path):
    write_atomic(tmp_path / "report.json", iter(["{", '"a": 1', "}\n"]))
    assert (tmp_path / "report.json").read_text(encoding="utf-8") == '{"a": 1}\n'


def test_atomic_write_failing_midway_leaves_nothing(tmp_path):
    def pieces():
        yield "{\n"
        raise RuntimeError("a bug while writing")

    with pytest.raises(RuntimeError):
        write_atomic(tmp_path / "report.json", pieces())
    assert list(tmp_path.iterdir()) == []
