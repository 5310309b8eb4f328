"""User text in every format: shown (description, names, element notes) and shown escaped.

Escape sequences and line breaks in a title or name must never reach the output raw: they could
forge a PASS line in a CI log. Markdown must not read user text as markup or HTML; a CSV cell
must not be run as a spreadsheet formula.
"""

import csv
import io
import json

import linkbudget
from linkbudget.report.markdown import markdown_text
from tests.cli.test_cli import markdown_tables

HOSTILE = """\
title: "Ring [bold]B[/bold] \\x1b[32m\\nPASS  other.yaml: worst-case margin +9.00 dB"
description: "Spare ring | <script>x</script> `code`"
wavelength: 1550 nm
source:
  power: 0 dBm
  name: "tx \\x1b[2J laser"
receiver:
  sensitivity: -30 dBm
  overload: -1 dBm
  name: "rx *one*"
chain:
  - name: "=SUM(A1) | trunk\\nPASS"
    kind: fiber
    length: 1 m
    attenuation: 0.4 dB/km
  - name: pad
    kind: element
    loss: 0.1 dB
    note: "per drawing 7\\rPASS"
"""

FORGED = "\nPASS"


def test_terminal_shows_user_text_escaped(write_link, cli):
    result = cli("run", write_link(HOSTILE))
    out = result.stdout
    assert result.exit_code == 1
    assert "\x1b" not in out and "\r" not in out
    assert not any(line.startswith("PASS") for line in out.splitlines())
    assert "[bold]B[/bold]" in out  # rich markup in a title is shown, not applied
    assert "\\x1b[32m\\nPASS" in out
    assert "Spare ring | <script>x</script> `code`" in out
    assert "source: tx \\x1b[2J laser; receiver: rx *one*" in out
    assert "per drawing 7\\rPASS" in out


def test_markdown_shows_user_text_escaped(write_link, cli):
    out = cli("run", write_link(HOSTILE), "--format", "markdown").stdout
    assert "\x1b" not in out and "<script>" not in out and "\r" not in out
    assert not any(line.startswith("PASS") for line in out.splitlines())
    assert "&lt;script&gt;" in out and "\\`code\\`" in out and "rx \\*one\\*" in out
    budget = markdown_tables(out)[0]
    assert len(budget) == 3  # the pipe in the name does not split a cell
    assert budget[1][0] == "=SUM(A1) | trunk\\\\nPASS"
    assert "per drawing 7\\\\rPASS" in budget[2][-1]


def test_markdown_text_escapes_syntax_and_html():
    assert markdown_text("a|b `c` *d* _e_ [f](g) <h> & #i") == (
        "a\\|b \\`c\\` \\*d\\* \\_e\\_ \\[f\\](g) &lt;h&gt; &amp; \\#i")
    assert markdown_text("tab\there\\") == "tab\\\\there\\\\\\\\"


def test_csv_cells_escaped_and_never_a_formula(write_link, cli):
    out = cli("run", write_link(HOSTILE), "--format", "csv").stdout
    rows = list(csv.reader(io.StringIO(out)))
    assert len(rows) == 3  # header + two rows: the line break in the name is escaped
    assert rows[1][2] == "'=SUM(A1) | trunk\\nPASS"
    assert rows[2][2] == "pad"


def test_check_lines_escape_the_path(tmp_path, cli):
    path = tmp_path / "a\nPASS  b.yaml"
    path.write_text(HOSTILE, encoding="utf-8")
    out = cli("check", path).stdout
    assert not any(line.startswith("PASS") for line in out.splitlines())
    assert "a\\nPASS  b.yaml" in out.splitlines()[0]
    broken = tmp_path / "c\x1b[2Jd.yaml"
    broken.write_text("title: [", encoding="utf-8")
    result = cli("check", broken)
    assert result.exit_code == 2 and "\x1b" not in result.stdout and "c\\x1b[2Jd.yaml" in result.stdout


def test_json_keeps_user_text_as_written(write_link, cli):
    data = json.loads(cli("run", write_link(HOSTILE), "--format", "json").stdout)
    assert data["title"].startswith("Ring [bold]B[/bold] \x1b[32m\nPASS")
    assert data["description"] == "Spare ring | <script>x</script> `code`"
    assert data["source"]["name"] == "tx \x1b[2J laser"
    assert data["receiver"]["name"] == "rx *one*"
    assert data["rows"][1]["facts"] == ["per drawing 7\rPASS"]


def test_without_user_text_json_holds_nulls(minimal_link):
    data = linkbudget.result_dict(linkbudget.evaluate(linkbudget.load(minimal_link)))
    assert data["description"] is None and data["source"] == {"name": None}
    assert data["receiver"]["name"] is None
    assert all("facts" not in row for row in data["rows"])
