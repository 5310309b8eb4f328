"""``linkbudget check``'s CI reports (JUnit XML, Markdown, JSON, -o) and its inputs (folders,
glob patterns, standard input). The margins are MINIMAL_LINK's hand sums (tests/conftest.py):
28.5 dB against a -30 dBm sensitivity, -0.5 dB against -1 dBm."""

import json
import xml.etree.ElementTree as ElementTree

import pytest

BROKEN = "title: broken\nwavelength: 1310\n"


@pytest.fixture
def folder(tmp_path, minimal_link):
    """good.yaml (closes), short.yml (0.5 dB short), broken.yaml (bare number), notes.txt."""
    (tmp_path / "good.yaml").write_text(minimal_link, encoding="utf-8")
    (tmp_path / "short.yml").write_text(minimal_link.replace("-30 dBm", "-1 dBm"), encoding="utf-8")
    (tmp_path / "broken.yaml").write_text(BROKEN, encoding="utf-8")
    (tmp_path / "notes.txt").write_text("not a link", encoding="utf-8")
    (tmp_path / "sub").mkdir()
    (tmp_path / "sub" / "deeper.yaml").write_text(minimal_link, encoding="utf-8")
    return tmp_path


def junit_cases(path):
    root = ElementTree.parse(path).getroot()  # raises unless it is well-formed XML
    assert root.tag == "testsuites"
    (suite,) = root.findall("testsuite")
    return suite, {case.get("name"): case for case in suite.findall("testcase")}


def test_check_junit_one_case_per_link_with_failures_and_errors(cli, folder):
    report = folder / "out" / "junit.xml"
    report.parent.mkdir()
    result = cli("check", folder, "--junit", report)
    assert result.exit_code == 2  # an input error outranks a failing link
    suite, cases = junit_cases(report)
    assert sorted(cases) == sorted(str(folder / name) for name in ("broken.yaml", "good.yaml", "short.yml",
                                                                   "sub/deeper.yaml"))
    assert (suite.get("tests"), suite.get("failures"), suite.get("errors")) == ("4", "1", "1")
    good, short, broken = (cases[str(folder / name)] for name in ("good.yaml", "short.yml", "broken.yaml"))
    assert good.find("failure") is None and good.find("error") is None
    assert short.find("failure") is not None and "margin short" in short.find("failure").get("message")
    assert "-0.50 dB" in short.find("failure").text
    assert broken.find("error") is not None and broken.find("failure") is None
    assert "broken.yaml:2:13: wavelength" in broken.find("error").text


def test_check_junit_all_pass_and_refuses_overwrite(cli, folder):
    report = folder / "junit.xml"
    assert cli("check", folder / "good.yaml", folder / "sub", "--junit", report).exit_code == 0
    suite, cases = junit_cases(report)
    assert len(cases) == 2 and suite.get("failures") == "0" and suite.get("errors") == "0"
    again = cli("check", folder / "good.yaml", "--junit", report)
    assert again.exit_code == 2 and "--force" in again.stderr
    assert cli("check", folder / "short.yml", "--junit", report, "--force").exit_code == 1
    assert junit_cases(report)[0].get("failures") == "1"


def test_check_junit_escapes_names(cli, tmp_path, minimal_link):
    path = tmp_path / "a<&>\x1b.yaml"
    path.write_text(minimal_link, encoding="utf-8")
    report = tmp_path / "junit.xml"
    assert cli("check", path, "--junit", report).exit_code == 0
    _, cases = junit_cases(report)
    assert list(cases) == [str(tmp_path / "a<&>\\x1b.yaml")]


def test_check_folder_and_pattern_expand_sorted(cli, folder):
    lines = cli("check", folder).stdout.splitlines()
    assert [line.split()[1].rstrip(":") for line in lines[:-1]] == [
        str(folder / name) for name in ("broken.yaml", "good.yaml", "short.yml", "sub/deeper.yaml")]
    assert lines[-1] == "4 link(s): 2 close, 1 do not close, 1 with input errors"
    pattern = cli("check", str(folder / "**" / "*.yaml"))
    names = [line.split()[1].rstrip(":") for line in pattern.stdout.splitlines()[:-1]]
    assert names == sorted(str(folder / name) for name in ("broken.yaml", "good.yaml", "sub/deeper.yaml"))


def test_check_pattern_matching_nothing_is_an_input_error(cli, folder):
    result = cli("check", str(folder / "*.json"), folder / "good.yaml")
    assert result.exit_code == 2
    assert "no file matches this pattern" in result.stderr
    assert result.stdout.splitlines()[-1] == "2 link(s): 1 close, 0 do not close, 1 with input errors"


def test_check_standard_input(cli, minimal_link, monkeypatch, tmp_path):
    from typer.testing import CliRunner

    from linkbudget.cli import app

    monkeypatch.chdir(tmp_path)
    result = CliRunner().invoke(app, ["check", "-"], input=minimal_link)
    assert result.exit_code == 0, result.output
    assert result.stdout.startswith("PASS   <stdin>: worst-case margin +28.50 dB")
    broken = CliRunner().invoke(app, ["check", "-"], input=BROKEN)
    assert broken.exit_code == 2 and "<stdin>:2:13: wavelength" in broken.stderr


def test_check_json_report(cli, folder):
    result = cli("check", folder, "--format", "json", "--min-margin", "1dB")
    assert result.exit_code == 2
    document = json.loads(result.stdout)
    assert document["schema"] == "linkbudget.check/1" and document["min_margin_db"] == 1.0
    by_status = {entry["status"]: entry for entry in document["links"]}
    assert by_status["pass"]["worst_margin_db"] == pytest.approx(28.5, abs=1e-9)
    assert by_status["pass"]["required_margin_db"] == 1.0
    assert by_status["fail"]["worst_margin_db"] == pytest.approx(-0.5, abs=1e-9)
    assert by_status["fail"]["reasons"] == ["margin short"]
    assert by_status["error"]["closes"] is None and "wavelength" in by_status["error"]["error"]
    assert document["summary"] == {"links": 4, "close": 2, "do_not_close": 1, "input_errors": 1, "judged_by": "closing",
                                   "fail_a_gate": 0}


def test_check_markdown_report_to_file(cli, folder):
    report = folder / "check.md"
    result = cli("check", folder / "good.yaml", folder / "short.yml", "-f", "markdown", "-o", report)
    assert result.exit_code == 1 and result.stdout == ""
    text = report.read_text(encoding="utf-8")
    assert "### ❌ linkbudget check: 1 of 2 link(s) close" in text
    assert "| FAIL | margin short | -0.50 | 0.00 |" in text
    assert "| PASS |  | +28.50 | 0.00 |" in text


def test_check_markdown_error_lines(cli, tmp_path):
    path = tmp_path / "empty.yaml"
    path.write_text("title: x\n", encoding="utf-8")
    text = cli("check", path, "-f", "markdown").stdout
    assert "missing required key 'source'<br>" in text and "missing required key 'chain' |" in text
