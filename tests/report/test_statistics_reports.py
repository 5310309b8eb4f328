"""The statistical budget in the Markdown and HTML reports: the numbers the JSON ``statistics``
object holds, and against a closed form.

Closed form: a link whose only spread is a normal source power N(P̄, σ²) has the margin
m = P̄ − Σ losses − S exactly normal, so over n trials its sample mean lies within 4·σ/√n of
P̄ − Σ losses − S and its sample standard deviation within 4·σ/√(2n) of σ (the standard errors of
a normal sample's mean and standard deviation; common practice).
"""

import json
import re
import subprocess
import sys

import numpy as np
import pytest

from tests.conftest import run_cli
from tests.report.test_plots import WITHOUT_MATPLOTLIB

TRIALS, SIGMA_DB = 4000, 0.5
NOMINAL_MARGIN_DB = 0 - 2 * 0.25 - 0.5 - (-20)  # launch 0 dBm, 2 km at 0.25 dB/km, a 0.5 dB panel, -20 dBm

LINK = f"""\
title: Statistics report <b>test</b>
channels: [1550 nm]
source:
  power: {{mean: 0 dBm, sigma: {SIGMA_DB} dB}}
receiver:
  sensitivity: -20 dBm
  overload: 5 dBm
  required_margin: 17.9 dB
chain:
  - name: trunk
    kind: fiber
    length: 2 km
    attenuation: 0.25 dB/km
  - name: "<i>panel</i> *a*|b"
    kind: connector
    loss: {{min: 0.4 dB, typ: 0.5 dB, max: 0.6 dB}}
"""


def _outputs(write_link, *formats):
    path = write_link(LINK)
    done = [run_cli("run", path, "--trials", TRIALS, "--seed", 4, "--format", name) for name in formats]
    return [item.stdout for item in done]


def _expected_cells(statistics):
    """The row of the quantile table, from the JSON numbers: mean, std, 0.1 %, 1 %, 50 %, RSS 0.1 %,
    P(short), P(overload) (two decimals signed, three for σ, percentages to three digits)."""
    margin, rss = statistics["margin_db"], statistics["rss_db"]["quantiles"]["0.001"]
    return ["1550 nm", f"{margin['mean'][0]:+.2f}", f"{margin['std'][0]:.3f}",
            *(f"{margin['quantiles'][p][0]:+.2f}" for p in ("0.001", "0.01", "0.5")), f"{rss[0]:+.2f}",
            *(f"{100 * statistics[key][0]:.3g} %" for key in ("probability_below_required_margin",
                                                              "probability_above_overload"))]


def test_json_statistics_match_the_closed_form(write_link):
    statistics = json.loads(_outputs(write_link, "json")[0])["statistics"]
    # the triangular panel loss (mean (a+b+c)/3 = typ) adds its variance (a²+b²+c²−ab−ac−bc)/18 = 0.03/18 dB²
    # (the triangular distribution's moments, e.g. Evans, Hastings & Peacock, *Statistical Distributions*; from memory)
    panel_variance = (0.4**2 + 0.5**2 + 0.6**2 - 0.4 * 0.5 - 0.4 * 0.6 - 0.5 * 0.6) / 18
    sigma_db = np.sqrt(SIGMA_DB**2 + panel_variance)
    assert abs(statistics["margin_db"]["mean"][0] - NOMINAL_MARGIN_DB) < 4 * sigma_db / np.sqrt(TRIALS)
    assert abs(statistics["margin_db"]["std"][0] - sigma_db) < 4 * sigma_db / np.sqrt(2 * TRIALS)


def test_markdown_shows_the_json_statistics(write_link):
    markdown, data = _outputs(write_link, "markdown", "json")
    statistics = json.loads(data)["statistics"]
    assert f"Statistical budget: {TRIALS} trials, seed 4 (margin in dB):" in markdown
    assert "| wavelength | mean | std | 0.1 % | 1 % | 50 % | RSS 0.1 % | P (short) | P (overload) |" in markdown
    assert "| " + " | ".join(_expected_cells(statistics)) + " |" in markdown
    assert f"in {100 * statistics['yield']:.3f} % of {TRIALS} trials" in markdown
    panel = next(item for item in statistics["contributions"] if item["id"] is not None)
    # user text escaped: HTML as character references, Markdown syntax backslashed
    assert (f"| &lt;i&gt;panel&lt;/i&gt; \\*a\\*\\|b | {panel['std_db'][0]:.3f} | "
            f"{100 * panel['variance_share'][0]:.3g} % |") in markdown
    assert "<i>" not in markdown


def test_html_shows_the_json_statistics_and_the_histogram(write_link):
    pytest.importorskip("matplotlib")
    page, data = _outputs(write_link, "html", "json")
    statistics = json.loads(data)["statistics"]
    section = page[page.index('<section id="statistics-section">'):page.index('<section id="plots-section">')]
    cells = re.findall(r'<td class="[a-z]+">([^<]*)</td>', section[:section.index('id="contributions"')])
    assert cells == _expected_cells(statistics)
    assert "&lt;i&gt;panel&lt;/i&gt; *a*|b" in section and "<i>" not in section
    histogram = section[section.index('<section id="histogram-section">'):]
    assert histogram.count("<svg") == 1 and f"margin of {TRIALS} trials at 1550 nm" in histogram
    assert 'id="histogram-short' in histogram and 'id="histogram-met' in histogram


def test_the_histogram_counts_every_trial_and_the_share_short(write_link):
    import linkbudget
    from linkbudget.statistics import run_statistics

    link = linkbudget.load(LINK)
    result = linkbudget.evaluate(link)
    statistics = run_statistics(link, result, trials=TRIALS, seed=4)
    edges, counts = statistics.margin_histogram
    assert counts.sum() == TRIALS and result.required_margin_db in edges
    short = counts[edges[:-1] < result.required_margin_db].sum()
    assert short / TRIALS == statistics.probability_below_required[0]


def test_html_without_matplotlib_still_has_the_tables(write_link):
    path = write_link(LINK)
    done = subprocess.run([sys.executable, "-c", WITHOUT_MATPLOTLIB, "run", str(path), "--trials", "500",
                           "--format", "html"], capture_output=True, text=True, timeout=120)
    assert done.returncode == 1, done.stderr  # the worst case misses the 17.9 dB
    assert 'id="statistics"' in done.stdout and "<svg" not in done.stdout
    assert done.stdout.count('<p class="missing-plots">') == 2


def test_reports_without_trials_have_no_statistics(write_link):
    path = write_link(LINK)
    for name in ("markdown", "html"):
        assert "Statistical budget" not in run_cli("run", path, "--format", name).stdout


def test_a_run_too_large_to_keep_its_margins_says_it_has_no_histogram(write_link, monkeypatch):
    from linkbudget import statistics

    monkeypatch.setattr(statistics, "KEPT_MARGIN_BYTES", 100 * 8)  # fewer than the 500 trials' margins
    page = run_cli("run", write_link(LINK), "--trials", 500, "--format", "html").stdout
    assert "No margin histogram" in page and 'id="histogram-section"' not in page
