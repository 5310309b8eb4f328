"""``linkbudget reach --yield`` against the closed form of a normal spread.

A link of one fibre (attenuation α) whose only spread is a normal term of standard deviation σ
(the source power, or a connector's loss) has the margin m = P̄ − αL − S + N(0, σ²); it meets the
required margin M with probability Φ((P̄ − S − M − αL)/σ), which falls to the yield y at

    L = (available_mean − z_y·σ)/α,   available_mean = P̄ − S − M,   z_y = Φ⁻¹(y) (scipy.stats.norm.ppf).

The search finds where the empirical (1 − y) quantile of the margin meets M; that quantile's
standard error from n trials is √(y(1−y)/n)/φ(z_y)·σ (the asymptotic variance of a sample
quantile, e.g. Stuart & Ord, *Kendall's Advanced Theory of Statistics* vol. 1, §10.10; from memory),
which divided by α is the standard error of the length. The tests allow 4 of those.
"""

import json

import numpy as np
import pytest
from scipy.stats import norm

import linkbudget
from linkbudget.reach import LIMITED, NEVER_CLOSES, find_reach, target_of, with_value
from linkbudget.reach_yield import YieldCriterion
from linkbudget.statistics import run_statistics
from tests.conftest import run_cli

SIGMA_DB, ATTENUATION_DB_PER_M = 0.5, 0.25e-3
AVAILABLE_MEAN_DB = 0 - (-20) - 3  # mean launch 0 dBm, sensitivity -20 dBm, required margin 3 dB

SOURCE_SPREAD_LINK = f"""\
title: Yield reach test link
channels: [1550 nm]
source:
  power: {{mean: 0 dBm, sigma: {SIGMA_DB} dB}}
receiver:
  sensitivity: -20 dBm
  required_margin: 3 dB
chain:
  - name: trunk
    kind: fiber
    length: 10 km
    attenuation: 0.25 dB/km
"""

CONNECTOR_SPREAD_LINK = SOURCE_SPREAD_LINK.replace(f"{{mean: 0 dBm, sigma: {SIGMA_DB} dB}}", "2 dBm") + f"""\
  - name: panel
    kind: connector
    loss: {{mean: 2 dB, sigma: {SIGMA_DB} dB}}
"""


def _closed_form_length_m(stated_yield):
    return (AVAILABLE_MEAN_DB - norm.ppf(stated_yield) * SIGMA_DB) / ATTENUATION_DB_PER_M


def _tolerance_m(stated_yield, trials):
    z = norm.ppf(stated_yield)
    return 4 * np.sqrt(stated_yield * (1 - stated_yield) / trials) / norm.pdf(z) * SIGMA_DB / ATTENUATION_DB_PER_M


def _reach_key(text, key, criterion):
    """(the link, its reach of ``key``) at ``criterion``'s yield, or in the worst case for ``None``."""
    link = linkbudget.load(text)
    options = {} if criterion is None else {"slack": criterion}
    return link, find_reach(link, target_of(link, key), **options)


def _reach(text, criterion):
    return _reach_key(text, "trunk.length", criterion)


@pytest.mark.parametrize("text", [SOURCE_SPREAD_LINK, CONNECTOR_SPREAD_LINK], ids=["source", "connector"])
@pytest.mark.parametrize("stated_yield", [0.9, 0.99])
def test_length_at_a_yield_is_the_normal_quantile(text, stated_yield):
    trials = 20000
    _, found = _reach(text, YieldCriterion(stated_yield, trials, 3))
    assert found.outcome == LIMITED
    assert abs(found.value - _closed_form_length_m(stated_yield)) < _tolerance_m(stated_yield, trials)
    assert found.slack.yield_fraction >= stated_yield > found.failing.yield_fraction
    assert found.failing.limited_by == "sensitivity"


def test_the_limit_has_the_statistical_budgets_yield():
    # the statistics module's own yield (closes at every wavelength, no overload) at the limit and past it
    criterion = YieldCriterion(0.95, 4000, 11)
    link, found = _reach(SOURCE_SPREAD_LINK, criterion)

    def budget_yield(length_m):
        changed = with_value(link, found.target, length_m)
        return run_statistics(changed, linkbudget.evaluate(changed), trials=4000, seed=11).yield_fraction

    assert budget_yield(found.value) == found.slack.yield_fraction >= 0.95
    assert budget_yield(found.value * (1 + 1e-6)) < 0.95


def test_cli_json_gains_the_trial_fields_and_repeats(write_link):
    path = write_link(SOURCE_SPREAD_LINK)
    args = ("reach", path, "--vary", "trunk.length", "--format", "json", "--trials", "3000", "--seed", "5")
    first, second = run_cli(*args, "--yield", "99%"), run_cli(*args, "--yield", "0.99")
    assert first.exit_code == 0 and first.stdout == second.stdout
    data = json.loads(first.stdout)
    assert (data["trials"], data["seed"], data["stated_yield"]) == (3000, 5, 0.99)
    assert data["yield_at_value"] >= 0.99 and data["outcome"] == "limited"
    assert abs(data["limit"] - _closed_form_length_m(0.99)) < _tolerance_m(0.99, 3000)
    worst = json.loads(run_cli("reach", path, "--vary", "trunk.length", "--format", "json").stdout)
    assert not {"trials", "seed", "stated_yield", "yield_at_value"} & set(worst)


def test_cli_text_and_exit_codes(write_link):
    path = write_link(SOURCE_SPREAD_LINK)
    out = run_cli("reach", path, "--vary", "trunk.length", "--trials", "2000", "--yield", "90%").stdout
    assert "closes in at least 90.000 % of 2000 trials (seed 0)" in out
    assert "margin at the yield's edge +3.00 dB at 1550 nm" in out
    short = write_link(SOURCE_SPREAD_LINK.replace("sensitivity: -20 dBm", "sensitivity: 5 dBm"), "short.yaml")
    assert run_cli("reach", short, "--vary", "trunk.length", "--trials", "500", "--yield", "90%").exit_code == 5
    lossless = write_link(SOURCE_SPREAD_LINK.replace("0.25 dB/km", "0 dB/km"), "lossless.yaml")
    assert run_cli("reach", lossless, "--vary", "trunk.length", "--trials", "500", "--yield", "90%").exit_code == 4
    from_file = write_link(SOURCE_SPREAD_LINK + "statistics: {trials: 700, seed: 2}\n", "block.yaml")
    json_out = run_cli("reach", from_file, "--vary", "trunk.length", "--yield", "90%", "--format", "json").stdout
    assert (json.loads(json_out)["trials"], json.loads(json_out)["seed"]) == (700, 2)
    for bad in (("--yield", "150%", "--trials", "100"), ("--yield", "ninety"), ("--yield", "90%"), ("--trials", "100")):
        refused = run_cli("reach", path, "--vary", "trunk.length", *bad)
        assert refused.exit_code == 2 and refused.stderr.startswith(("--yield", "--trials"))


def test_a_link_that_never_closes_at_the_yield():
    _, found = _reach(SOURCE_SPREAD_LINK.replace("sensitivity: -20 dBm", "sensitivity: 5 dBm"),
                      YieldCriterion(0.9, 500, 0))
    assert found.outcome == NEVER_CLOSES and found.slack.yield_fraction == 0


def test_readme_yield_reach_example():
    readme = open("README.md", encoding="utf-8").read()
    out = run_cli("reach", "configs/estuary-cwdm-backhaul.yaml", "--vary", "estuary cable.length", "--trials", "10000",
                  "--seed", "7", "--yield", "99.9%")
    assert out.exit_code == 0
    shown = [line for line in out.stdout.splitlines() if line.startswith(("Reach of", "  limit:"))]
    assert len(shown) == 2 and all(line in readme for line in shown)


def test_the_progress_counts_the_trials_of_each_evaluation():
    from linkbudget.cli import _counted

    seen = []
    criterion = YieldCriterion(0.9, 300, 1)
    link = linkbudget.load(SOURCE_SPREAD_LINK)
    find_reach(link, target_of(link, "trunk.length"), slack=_counted(criterion, seen.append))
    assert len(seen) > 10 and seen == [300 * (n + 1) for n in range(len(seen))]


def test_no_progress_when_stderr_is_not_a_terminal(write_link):
    done = run_cli("reach", write_link(SOURCE_SPREAD_LINK), "--vary", "trunk.length", "--trials", 500, "--yield", "90%")
    assert done.exit_code == 0 and done.stderr == ""


SPLICE_LINK = """\
title: Yield reach of a splice count
channels: [1550 nm]
source:
  power: 0 dBm
receiver:
  sensitivity: -20 dBm
  required_margin: 3 dB
chain:
  - name: splices
    kind: splice
    count: 10
    loss: {mean: 0.5 dB, sigma: 0.05 dB}
"""


def test_splice_count_at_a_yield_is_the_sum_of_normals_quantile():
    # N independent N(μ, σ²) losses sum to N(Nμ, Nσ²): the link closes with probability
    # Φ((A − Nμ)/(√N·σ)), A = 17 dB available; the answer is the largest N where that is ≥ y
    stated_yield, mean_db, sigma_db = 0.99, 0.5, 0.05
    counts = np.arange(1, 60)
    closing = norm.cdf((AVAILABLE_MEAN_DB - counts * mean_db) / (np.sqrt(counts) * sigma_db))
    expected = int(counts[closing >= stated_yield].max())
    assert closing[expected - 1] > 0.999 and closing[expected] < 0.97  # far from y: no trial-count noise
    _, found = _reach_key(SPLICE_LINK, "splices.count", YieldCriterion(stated_yield, 5000, 2))
    assert (found.outcome, found.value) == (LIMITED, expected)
    worst = _reach_key(SPLICE_LINK, "splices.count", None)[1]
    assert worst.value == int(AVAILABLE_MEAN_DB // (mean_db + 3 * sigma_db))  # the ±3σ corner: fewer
