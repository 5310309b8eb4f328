"""The command line: exit codes, the verdict in words, the output formats and the file guard.

The contract is README.md's "Commands", "Exit codes" and "JSON result" sections. Every example
link in ``configs/`` is run, so a new example is tested as soon as it is added.
"""

import csv
import io
import json
import re
import subprocess
import sys
from pathlib import Path

import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.cautions import CAUTIONS
from tests.conftest import CONFIGS

# The CSV report prints six significant digits ("%.6g"): a relative difference up to 5e-6.
CSV_DIGITS = 5e-6


def words(text):
    """Terminal text without box-drawing characters, whitespace collapsed (rich wraps lines)."""
    return " ".join(re.sub(r"[\u2500-\u257f]", " ", text).split())


def evaluated(path, **options):
    return linkbudget.evaluate(linkbudget.load(path), **options)


def test_configs_folder_holds_examples():
    assert len(CONFIGS) >= 1


# --- run: every example, every format ---------------------------------------------------------

@pytest.mark.parametrize("config", CONFIGS, ids=[path.name for path in CONFIGS])
def test_run_example_exit_code_and_verdict(config, cli):
    closes = evaluated(config).closes
    result = cli("run", config)
    assert result.exit_code == (0 if closes else 1), result.output
    text = words(result.stdout)
    verdict = "DOES NOT CLOSE" if not closes else "CLOSES"
    assert verdict in text
    if closes:
        assert "DOES NOT CLOSE" not in text
    # the cautions come last, after the verdict, every one of them, in order
    tail = text[text.index(verdict):]
    positions = [tail.find(words(caution)) for caution in CAUTIONS]
    assert -1 not in positions and positions == sorted(positions)
    assert text.endswith(words(CAUTIONS[-1]))
    # README's laser-safety statement, independently of the wording of cautions.py
    assert "Laser safety" in tail and "IEC 60825-1" in tail and "power meter" in tail


@pytest.mark.parametrize("config", CONFIGS, ids=[path.name for path in CONFIGS])
def test_run_example_json_contract(config, cli):
    expected = evaluated(config)
    result = cli("run", config, "--format", "json")
    assert result.exit_code == (0 if expected.closes else 1)
    data = json.loads(result.stdout)
    assert isinstance(data["schema"], str) and data["schema"]
    assert isinstance(data["title"], str) and data["title"] == expected.title
    wavelengths = data["wavelengths_nm"]
    assert isinstance(wavelengths, list) and len(wavelengths) == expected.wavelength_m.size
    assert_allclose(wavelengths, expected.wavelength_m * 1e9, rtol=0, atol=5e-7)  # 1e-6 nm resolution
    assert data["rows"]
    for segment in data["rows"]:
        assert isinstance(segment["name"], str) and isinstance(segment["kind"], str)
        for case in ("typ", "worst"):
            assert isinstance(segment["loss_db"][case], list)
            assert len(segment["loss_db"][case]) == len(wavelengths)
    for key in ("received_dbm", "margin_db"):
        for case in ("typ", "worst"):
            assert len(data[key][case]) == len(wavelengths)
    assert_allclose(data["margin_db"]["worst"], expected.margin_db["worst"], rtol=0, atol=5e-10)  # 1e-9 dB
    assert data["closes"] is expected.closes
    assert isinstance(data["cautions"], list) and data["cautions"]
    assert all(isinstance(caution, str) and caution for caution in data["cautions"])


def markdown_tables(text):
    """Every Markdown table as a list of rows of cells (header first, separator dropped).

    Cells are split at unescaped pipes; ``\\|`` is a pipe inside a cell (GitHub-flavoured Markdown).
    """
    tables, current = [], []
    for line in text.splitlines() + [""]:
        if line.startswith("|"):
            current.append(line)
        elif current:
            tables.append(current)
            current = []
    parsed = []
    for table in tables:
        assert re.fullmatch(r"\|(-{3,}:?\|)+", table[1]), table[1]
        rows = [[cell.strip().replace("\\|", "|") for cell in re.split(r"(?<!\\)\|", line[1:-1])]
                for line in [table[0], *table[2:]]]
        assert len({len(row) for row in rows}) == 1, "every row has the header's number of cells"
        parsed.append(rows)
    return parsed


@pytest.mark.parametrize("config", CONFIGS, ids=[path.name for path in CONFIGS])
def test_run_example_markdown_parses(config, cli):
    expected = evaluated(config)
    result = cli("run", config, "--format", "markdown")
    assert result.exit_code == (0 if expected.closes else 1)
    heading = next(line for line in result.stdout.splitlines() if line.startswith("#"))
    assert ("DOES NOT CLOSE" if not expected.closes else "CLOSES") in heading
    budget, margins, safety = markdown_tables(result.stdout)
    assert len(budget) - 1 == len(expected.rows)
    assert [row[0] for row in budget[1:]] == [row.name for row in expected.rows]
    assert len(margins) - 1 == expected.wavelength_m.size
    assert len(safety) - 1 == len(expected.review.assessments)  # the reachable points' table
    assert "Laser safety" in result.stdout.strip().splitlines()[-1]


def test_run_markdown_keeps_pipes_in_names_inside_their_cell(cli, write_link, minimal_link):
    result = cli("run", write_link(minimal_link.replace("name: panel", "name: 'panel | rear'")), "-f", "markdown")
    assert result.exit_code == 0
    budget, *_ = markdown_tables(result.stdout)
    assert [row[0] for row in budget[1:]] == ["trunk", "panel | rear"]


@pytest.mark.parametrize("config", CONFIGS, ids=[path.name for path in CONFIGS])
def test_run_example_csv_one_line_per_wavelength_and_row(config, cli):
    expected = evaluated(config)
    result = cli("run", config, "--format", "csv")
    assert result.exit_code == (0 if expected.closes else 1)
    lines = list(csv.DictReader(io.StringIO(result.stdout)))
    names = [row.name for row in expected.rows]
    assert len(lines) == expected.wavelength_m.size * len(names)
    for number, line in enumerate(lines):
        wavelength, row = divmod(number, len(names))
        assert line["name"] == names[row]
        assert_allclose(float(line["wavelength_nm"]), expected.wavelength_m[wavelength] * 1e9, rtol=CSV_DIGITS)
        assert_allclose(float(line["loss_db_worst"]), expected.loss_db["worst"][row, wavelength],
                        rtol=CSV_DIGITS, atol=1e-12)
        assert_allclose(float(line["loss_db_typ"]), expected.loss_db["typ"][row, wavelength],
                        rtol=CSV_DIGITS, atol=1e-12)


def test_run_minimal_link_numbers(cli, write_link, minimal_link):
    # conftest's hand arithmetic: 0 dBm - (2 km x 0.5 dB/km + 0.5 dB) = -1.5 dBm; -1.5 - (-30) = 28.5 dB
    result = cli("run", write_link(minimal_link), "--format", "json")
    assert result.exit_code == 0
    data = json.loads(result.stdout)
    assert_allclose(data["received_dbm"]["typ"], [-1.5], rtol=1e-12)
    assert_allclose(data["margin_db"]["worst"], [28.5], rtol=1e-12)


@pytest.mark.parametrize("name", ["[b]pan[/b]", "[/b]", "panel [1]"])
def test_run_terminal_prints_segment_names_verbatim(cli, write_link, minimal_link, name):
    # names are the user's text: brackets must not be read as terminal styling
    result = cli("run", write_link(minimal_link.replace("name: panel", f"name: '{name}'")))
    assert result.exit_code == 0
    assert name in result.stdout


# --- run --output ------------------------------------------------------------------------------

def test_run_output_writes_the_report(cli, write_link, minimal_link, tmp_path):
    link = write_link(minimal_link)
    report = tmp_path / "budget.json"
    result = cli("run", link, "--format", "json", "--output", report)
    assert result.exit_code == 0, result.output
    assert result.stdout == ""
    assert report.read_text(encoding="utf-8") == cli("run", link, "--format", "json").stdout
    assert [path.name for path in tmp_path.iterdir() if path.name.startswith(".")] == []


def test_run_output_refuses_existing_file(cli, write_link, minimal_link, tmp_path):
    report = tmp_path / "budget.md"
    report.write_text("keep me\n", encoding="utf-8")
    result = cli("run", write_link(minimal_link), "-f", "markdown", "-o", report)
    assert result.exit_code == 2
    assert "--force" in result.stderr and str(report) in result.stderr
    assert report.read_text(encoding="utf-8") == "keep me\n"


def test_run_output_force_replaces_existing_file(cli, write_link, minimal_link, tmp_path):
    report = tmp_path / "budget.md"
    report.write_text("keep me\n", encoding="utf-8")
    result = cli("run", write_link(minimal_link), "-f", "markdown", "-o", report, "--force")
    assert result.exit_code == 0, result.output
    assert report.read_text(encoding="utf-8").startswith("### ")


def test_run_output_onto_a_folder_exits_2(cli, write_link, minimal_link, tmp_path):
    folder = tmp_path / "reports"
    folder.mkdir()
    result = cli("run", write_link(minimal_link), "-f", "json", "-o", folder, "--force")
    assert result.exit_code == 2
    assert str(folder) in result.stderr
    assert folder.is_dir() and list(folder.iterdir()) == []


def test_run_output_never_replaces_the_input_link(cli, write_link, minimal_link):
    link = write_link(minimal_link)
    result = cli("run", link, "-f", "json", "-o", link, "--force")
    assert result.exit_code == 2
    assert "input file" in result.stderr
    assert link.read_text(encoding="utf-8") == minimal_link


# --- check ---------------------------------------------------------------------------------------

@pytest.fixture
def links(write_link, minimal_link):
    """Three links: one that closes (28.5 dB margin), one short of margin, one over overload."""
    return {
        "good": write_link(minimal_link, "good.yaml"),
        # sensitivity -1 dBm: margin -0.5 dB
        "short": write_link(minimal_link.replace("sensitivity: -30 dBm", "sensitivity: -1 dBm"), "short.yaml"),
        # received -1.5 dBm above a -5 dBm overload
        "loud": write_link(minimal_link.replace("sensitivity: -30 dBm", "sensitivity: -30 dBm\n  overload: -5 dBm"),
                           "loud.yaml"),
    }


def check_lines(result, paths):
    lines = result.stdout.splitlines()
    assert len(lines) == len(paths) + 1, result.stdout
    for line, path in zip(lines[:-1], paths, strict=True):  # the last line is the summary
        assert f" {path}: " in line
    return lines


def test_check_all_close_exits_0(cli, links):
    paths = [links["good"], links["good"]]
    result = cli("check", *paths)
    assert result.exit_code == 0
    lines = check_lines(result, paths)
    assert all(line.startswith("PASS") for line in lines[:-1])
    assert lines[-1] == "2 link(s): 2 close, 0 do not close, 0 with input errors"


def test_check_one_fails_exits_1(cli, links):
    paths = [links["good"], links["short"], links["loud"]]
    result = cli("check", *paths)
    assert result.exit_code == 1
    good, short, loud, summary = check_lines(result, paths)
    assert good.startswith("PASS")
    assert short.startswith("FAIL") and "margin short" in short and "-0.50 dB" in short
    assert loud.startswith("FAIL") and "overload exceeded" in loud
    assert summary == "3 link(s): 1 close, 2 do not close, 0 with input errors"


def test_check_examples_one_line_each(cli):
    closes = [evaluated(path).closes for path in CONFIGS]
    result = cli("check", *CONFIGS)
    assert result.exit_code == (0 if all(closes) else 1)
    lines = check_lines(result, CONFIGS)
    assert [line.startswith("PASS") for line in lines[:-1]] == closes
    assert lines[-1].startswith(f"{len(CONFIGS)} link(s): {sum(closes)} close, ")


# --- --min-margin ----------------------------------------------------------------------------------

def test_min_margin_override_fails_a_closing_link(cli, links):
    # the file asks for 0 dB and has 28.5 dB; 30 dB is more than it has
    assert cli("run", links["good"]).exit_code == 0
    assert cli("run", links["good"], "--min-margin", "30dB").exit_code == 1
    assert cli("run", links["good"], "--min-margin", "28 dB").exit_code == 0
    result = cli("check", links["good"], "--min-margin", "30dB")
    assert result.exit_code == 1 and "required 30.00 dB" in result.stdout


def test_min_margin_override_passes_a_failing_link(cli, write_link, minimal_link):
    demanding = write_link(
        minimal_link.replace("sensitivity: -30 dBm", "sensitivity: -30 dBm\n  required_margin: 40 dB"))
    assert cli("run", demanding).exit_code == 1
    assert cli("run", demanding, "--min-margin", "3dB").exit_code == 0
    result = cli("run", demanding, "--min-margin", "3dB", "-f", "json")
    assert json.loads(result.stdout)["receiver"]["required_margin_db"] == 3.0
    assert cli("check", demanding, "--min-margin", "3dB").exit_code == 0


@pytest.mark.parametrize("command", ["run", "check"])
@pytest.mark.parametrize(("value", "phrase"), [("3", "missing unit"), ("3 dBm", "expected a ratio")],
                         ids=["no-unit", "power-unit"])
def test_min_margin_without_ratio_unit_exits_2(cli, links, command, value, phrase):
    result = cli(command, links["good"], "--min-margin", value)
    assert result.exit_code == 2
    assert "--min-margin" in result.stderr and phrase in result.stderr
    assert "Traceback" not in result.output


# --- materials -------------------------------------------------------------------------------------

def test_materials_out_of_range_names_the_material_once_and_suggests_a_covering_one(cli):
    # The catalog's silicon stops at 1450 nm; silicon-infrared covers 1550 nm, as the link-file
    # error for the same material and wavelength suggests.
    result = cli("materials", "silicon", "-w", "1550nm")
    assert result.exit_code == 2
    assert result.stderr.count("silicon:") == 1, result.stderr
    assert "hint: " in result.stderr and "silicon-infrared" in result.stderr


def test_materials_wavelength_without_unit_shows_a_wavelength_example(cli):
    result = cli("materials", "silicon", "-w", "1550")
    assert result.exit_code == 2
    assert "missing unit" in result.stderr and "e.g. '1550 nm'" in result.stderr


# --- numbers ---------------------------------------------------------------------------------------

@pytest.mark.parametrize("command", [["run", "-f", "terminal"], ["run", "-f", "markdown"], ["run", "-f", "csv"],
                                     ["check"]], ids=["terminal", "markdown", "csv", "check"])
def test_a_value_that_rounds_to_zero_prints_without_a_minus_sign(cli, write_link, minimal_link, command):
    # Received -1.5 dBm against a -1.499 dBm sensitivity: the margin is -0.001 dB, 0.00 to two places.
    path = write_link(minimal_link.replace("sensitivity: -30 dBm", "sensitivity: -1.499 dBm"))
    result = cli(*command, path)
    assert result.exit_code == 1
    assert "-0.00" not in result.stdout, result.stdout
    assert not re.search(r"(^|,)-0(,|$)", result.stdout, re.M), result.stdout  # CSV's -0.0


# --- help --------------------------------------------------------------------------------------------

@pytest.mark.parametrize("command", [[], ["run"], ["check"], ["materials"]], ids=["app", "run", "check", "materials"])
def test_help_names_no_python_types(cli, command):
    # Only a list of choices may stand in angle brackets (``<terminal|json|...>``), never a type
    # of the code such as <list[Path]>, <path> or <str>.
    result = cli(*command, "--help")
    assert result.exit_code == 0
    bracketed = re.findall(r"<[^<>]*>", result.stdout)
    assert all("|" in text for text in bracketed), bracketed


# --- --version and the installed script ------------------------------------------------------------

def test_version_prints_the_package_version(cli):
    result = cli("--version")
    assert result.exit_code == 0
    assert result.stdout == f"linkbudget {linkbudget.__version__}\n"


def test_console_script_runs_an_example(tmp_path):
    script = Path(sys.executable).parent / "linkbudget"
    assert script.is_file(), f"no console script next to {sys.executable}"
    config = CONFIGS[0]
    closes = evaluated(config).closes
    # run from an unrelated folder, so the package must come from the installation
    completed = subprocess.run([str(script), "run", str(config), "--format", "markdown"], cwd=tmp_path,
                               capture_output=True, text=True, timeout=120)
    assert "Traceback" not in completed.stderr, completed.stderr
    assert completed.returncode == (0 if closes else 1), completed.stderr
    assert ("CLOSES" if closes else "DOES NOT CLOSE") in completed.stdout
    assert "Laser safety" in completed.stdout


def test_cli_import_leaves_heavy_modules_for_the_commands():
    # DESIGN.md: the CLI starts fast, heavy modules are imported only by the commands that need
    # them (measured as a ratio in benchmarks/startup.py; this guards the import graph itself).
    code = ("import sys, linkbudget.cli; "
            "print(','.join(m for m in ('numpy', 'scipy', 'pydantic', 'yaml') if m in sys.modules))")
    loaded = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True).stdout.strip()
    assert loaded == ""


def test_interrupt_exits_130_not_a_verdict(monkeypatch, capsys):
    # Ctrl-C must not look like "the link does not close" (1) to a CI gate: the shell's
    # convention 128 + SIGINT (2) = 130, with a one-line message.
    import os
    import signal
    import time

    from linkbudget import cli

    def interrupted_run():
        os.kill(os.getpid(), signal.SIGINT)
        time.sleep(5)

    previous = signal.getsignal(signal.SIGINT)
    monkeypatch.setattr(cli, "app", interrupted_run)
    try:
        with pytest.raises(SystemExit) as stop:
            cli.main()
    finally:
        signal.signal(signal.SIGINT, previous)
    assert stop.value.code == 130
    assert capsys.readouterr().err == "linkbudget: interrupted\n"
