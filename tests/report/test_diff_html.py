"""The diff's plot and HTML page: plotted powers, a margin change and escaping, each summed by hand.

The two revisions are the links of ``tests/cli/test_diff.py`` (trunk 2 km -> 3 km, panel renamed
bulkhead, old filter of 1 dB removed, an ageing allowance of 0.8 dB added); the power after each
row is the launch power minus the running sum of the datasheet losses (dB add along the chain;
the worst case takes the minimum launch and every loss at its maximum).
"""

import hashlib
import re
import subprocess
import sys

from numpy.testing import assert_allclose

import linkbudget
from linkbudget.diff import compare, load_side
from linkbudget.reader import MemoryReader
from linkbudget.report import diff_html, plots
from tests.cli.test_diff import NEW_LINK, OLD_LINK, WORST_CHANGE_DB, repo  # noqa: F401 (repo: a fixture)
from tests.report.test_html import HOSTILE, fetching_markup
from tests.report.test_plots import WITHOUT_MATPLOTLIB, drawn, line

#: Launch, then the power after trunk, panel/bulkhead, splices and the last element [dBm], by hand.
OLD_TYP_DBM = [0.0, -2 * 0.5, -2 * 0.5 - 0.3, -2 * 0.5 - 0.3 - 2 * 0.05, -2 * 0.5 - 0.3 - 2 * 0.05 - 1.0]
OLD_WORST_DBM = [-2.0, -2 - 2 * 0.6, -2 - 2 * 0.6 - 0.75, -2 - 2 * 0.6 - 0.75 - 2 * 0.3,
                 -2 - 2 * 0.6 - 0.75 - 2 * 0.3 - 1.0]
NEW_TYP_DBM = [0.0, -3 * 0.5, -3 * 0.5 - 0.3, -3 * 0.5 - 0.3 - 2 * 0.05, -3 * 0.5 - 0.3 - 2 * 0.05 - 0.8]
NEW_WORST_DBM = [-2.0, -2 - 3 * 0.6, -2 - 3 * 0.6 - 0.75, -2 - 3 * 0.6 - 0.75 - 2 * 0.3,
                 -2 - 3 * 0.6 - 0.75 - 2 * 0.3 - 0.8]
#: Worst-case margin = received worst - sensitivity (-30 dBm), both revisions, by hand.
OLD_WORST_MARGIN_DB, NEW_WORST_MARGIN_DB = OLD_WORST_DBM[-1] + 30, NEW_WORST_DBM[-1] + 30  # 24.45, 24.05


def kiln_diff(new_text=NEW_LINK):
    reader = MemoryReader({"old.yaml": OLD_LINK, "new.yaml": new_text})
    return compare(load_side("old.yaml", reader=reader), load_side("new.yaml", reader=reader))


def test_diff_plot_holds_both_revisions_hand_summed_powers():
    levels = drawn(diff_html.diff_panels(kiln_diff())).axes[0]
    for number, (typ, worst) in enumerate(((OLD_TYP_DBM, OLD_WORST_DBM), (NEW_TYP_DBM, NEW_WORST_DBM))):
        assert_allclose(line(levels, f"power-{number}-typ").get_ydata(), typ, atol=1e-9)
        assert_allclose(line(levels, f"power-{number}-worst").get_ydata(), worst, atol=1e-9)
    # the renamed panel shares its place with the bulkhead; the removed and the added element have their own
    assert [label.get_text() for label in levels.get_xticklabels()] == [
        "source", "trunk", "bulkhead", "splices", "old filter", "ageing allowance"]
    assert_allclose(line(levels, "power-0-worst").get_xdata(), [0, 1, 2, 3, 4])
    assert_allclose(line(levels, "power-1-worst").get_xdata(), [0, 1, 2, 3, 5])
    legend = [entry.get_text() for entry in levels.get_legend().get_texts()]
    assert "old.yaml: worst case" in legend and "new.yaml: worst case" in legend


def test_diff_plot_option_writes_png_and_svg_with_run_s_checks(cli, tmp_path):
    old, new = tmp_path / "old.yaml", tmp_path / "new.yaml"
    old.write_text(OLD_LINK, encoding="utf-8")
    new.write_text(NEW_LINK, encoding="utf-8")
    picture = tmp_path / "diff.png"
    assert cli("diff", old, new, "--plot", picture).exit_code == 0
    assert picture.read_bytes().startswith(b"\x89PNG\r\n\x1a\n")
    assert cli("diff", old, new, "--plot", tmp_path / "diff.svg").exit_code == 0
    assert "<svg" in (tmp_path / "diff.svg").read_text(encoding="utf-8")
    refused = cli("diff", old, new, "--plot", picture)
    assert refused.exit_code == 2 and "pass --force" in refused.stderr
    assert cli("diff", old, new, "--plot", picture, "--force").exit_code == 0
    assert cli("diff", old, new, "--plot", tmp_path / "diff.pdf").exit_code == 2
    same = cli("diff", old, new, "--format", "markdown", "-o", picture, "--plot", picture, "--force")
    assert same.exit_code == 2 and "the same file as --output" in same.stderr
    assert cli("diff", old, new, "--plot", new, "--force").exit_code == 2 and new.read_text() == NEW_LINK


def margin_rows(page):
    """The cells of each row of the page's margin table, as text."""
    table = re.search(r'<table id="diff-margins">.*?</table>', page, re.S).group(0)
    return [re.findall(r"<td[^>]*>(.*?)</td>", row) for row in re.findall(r"<tr>(.*?)</tr>", table, re.S)[1:]]


def test_diff_page_holds_hand_summed_margin_change_segments_and_both_hashes(cli, repo):  # noqa: F811
    done = cli("diff", repo / "links" / "kiln.yaml", "HEAD~1..HEAD", "--format", "html")
    assert done.exit_code == 0, done.stderr
    page = done.stdout
    change = f"{NEW_WORST_MARGIN_DB - OLD_WORST_MARGIN_DB:+.2f}"
    assert change == f"{WORST_CHANGE_DB:+.2f}" == "-0.40"
    assert margin_rows(page) == [
        [wavelength, "-0.30", "-0.40", "27.60 → 27.30", f"{OLD_WORST_MARGIN_DB:.2f} → {NEW_WORST_MARGIN_DB:.2f}",
         change] for wavelength in ("1310 nm", "1550 nm")]
    segments = re.search(r'<table id="diff-segments">.*?</table>', page, re.S).group(0)
    assert "<td class=\"text\">renamed</td><td class=\"text\">panel → bulkhead</td>" in segments
    assert "length: 2 km → 3 km" in segments and "+0.50" in segments  # trunk: 1 km more at 0.5 dB/km typ
    assert "<td class=\"text\">removed</td><td class=\"text\">old filter</td>" in segments
    assert "<td class=\"text\">added</td><td class=\"text\">ageing allowance</td>" in segments
    assert '<span class="verdict closes" id="verdict">CLOSES</span>' in page
    # the footer: the version and the SHA-256 of each revision's text, hashed here from the test's own text
    for revision, written in (("HEAD~1", OLD_LINK), ("HEAD", NEW_LINK)):
        assert (f"input file {revision}:links/kiln.yaml, SHA-256 <code>"
                f"{hashlib.sha256(written.encode('utf-8')).hexdigest()}</code>") in page
    assert f"linkbudget {linkbudget.__version__}" in page
    assert page.count("<svg") == 2  # the power levels and the margin sweep of both revisions
    assert fetching_markup(page) == []


def hostile_files(tmp_path):
    old, new = tmp_path / "old.yaml", tmp_path / f"{HOSTILE[:7]}new.yaml"
    old.write_text(OLD_LINK, encoding="utf-8")
    new.write_text(NEW_LINK.replace("name: ageing allowance", f"name: '{HOSTILE}'")
                   .replace("title: Kiln yard sensor uplink", "title: '<b>Kiln</b> & \"yard\"'"), encoding="utf-8")
    return old, new


def test_diff_page_escapes_user_strings_and_loads_nothing(cli, tmp_path):
    old, new = hostile_files(tmp_path)
    report = tmp_path / "diff.html"
    assert cli("diff", old, new, "--format", "html", "-o", report).exit_code == 0
    page = report.read_text(encoding="utf-8")
    assert "<td class=\"text\">added</td><td class=\"text\">&lt;script&gt;alert(1)&lt;/script&gt;</td>" in page
    assert "&lt;b&gt;Kiln&lt;/b&gt; &amp; &quot;yard&quot;" in page
    assert "&lt;script" in page.split("<footer>")[1]  # the file name, in the footer
    assert not re.search(r"<\s*(?:script|b)\b", page, re.I)
    assert fetching_markup(page) == []


def test_diff_page_without_the_extra_says_so(tmp_path):
    old, new = hostile_files(tmp_path)
    done = subprocess.run([sys.executable, "-c", WITHOUT_MATPLOTLIB, "diff", str(old), str(new), "--format", "html"],
                          capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, done.stderr
    assert f'<p class="missing-plots">{plots.MISSING_EXTRA.replace(chr(34), "&quot;")}</p>' in done.stdout
    assert "<svg" not in done.stdout and "-0.40" in done.stdout
