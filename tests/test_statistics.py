"""The statistical budget against closed forms (scipy.stats), and its determinism.

Tolerances follow from the trial count n (each bound at 5 standard errors, so a correct engine
fails about once in 10^6 runs; the seeds are fixed, so each test is deterministic):

- a mean: σ/√n;
- a standard deviation of a (near) normal quantity: σ/√(2(n − 1));
- a variance: σ²·√(2/(n − 1)) for a (near) normal quantity;
- a quantile x_p: √(p(1 − p)/n) / f(x_p), f the density at x_p (the asymptotic standard error of a
  sample quantile, e.g. Stuart & Ord, Kendall's Advanced Theory of Statistics, from memory);
- a probability p: √(p(1 − p)/n).
"""

import json
import signal
import subprocess
import sys
import time

import numpy as np
import pytest
import scipy.stats
from numpy.testing import assert_allclose
from typer.testing import CliRunner

import linkbudget
import linkbudget.statistics as statistics
from linkbudget.cli import app
from linkbudget.segments.cases import Draws, DrawStreams
from linkbudget.statistics import run_statistics
from tests.conftest import EVERY_KIND
from tests.segments.linktext import link_text

SE = 5  # standard errors of every tolerance
TRIALS = 100_000


def stats_of(chain, *, trials=TRIALS, seed=7, axis="wavelength: 1550 nm"):
    link = linkbudget.load(link_text(chain, axis))
    return run_statistics(link, linkbudget.evaluate(link), trials=trials, seed=seed)


def elements(count, loss, **extra):
    return [{"name": f"part {number}", "kind": "element", "loss": loss, **extra} for number in range(count)]


def quantile_tolerance(distribution, p, n):
    return SE * np.sqrt(p * (1 - p) / n) / distribution.pdf(distribution.ppf(p))


def test_sum_of_independent_normal_losses_has_mean_n_mu_and_std_sqrt_n_sigma():
    # element loss may lie from -60 dB: the bound is 600 sigma away and truncates nothing
    count, mu, sigma = 9, 0.5, 0.1
    stats = stats_of(elements(count, {"mean": f"{mu} dB", "sigma": f"{sigma} dB"}))
    margin = scipy.stats.norm(0 - (-40) - count * mu, np.sqrt(count) * sigma)  # 0 dBm into -40 dBm
    assert stats.margin_mean_db[0] == pytest.approx(margin.mean(), abs=SE * margin.std() / np.sqrt(TRIALS))
    assert stats.margin_std_db[0] == pytest.approx(margin.std(), abs=SE * margin.std() / np.sqrt(2 * (TRIALS - 1)))
    for p, values in stats.margin_quantiles_db.items():
        assert values[0] == pytest.approx(margin.ppf(p), abs=quantile_tolerance(margin, p, TRIALS)), p
    # RSS of the rows' sigmas: √N·σ, each row's sigma a sample std of TRIALS draws
    assert stats.rss_std_db[0] == pytest.approx(np.sqrt(count) * sigma, abs=SE * sigma / np.sqrt(2 * TRIALS))
    assert stats.rss_quantiles_db[0.001][0] == pytest.approx(margin.ppf(0.001), abs=SE * 3.09 * sigma / np.sqrt(TRIALS))


def test_probabilities_of_a_short_margin_and_of_overload_against_the_normal_cdf():
    text = link_text(elements(4, {"mean": "9.5 dB", "sigma": "1 dB"}))
    text = text.replace("sensitivity: -40 dBm", "sensitivity: -40 dBm\n  overload: -35 dBm")
    link = linkbudget.load(text)
    stats = run_statistics(link, linkbudget.evaluate(link), trials=TRIALS, seed=5)
    received = scipy.stats.norm(0 - 4 * 9.5, 2.0)  # std √4·1
    short, over = received.cdf(-40 + 0), received.sf(-35)  # required margin 0 dB
    assert stats.probability_below_required[0] == pytest.approx(short, abs=SE * np.sqrt(short * (1 - short) / TRIALS))
    assert stats.probability_overload[0] == pytest.approx(over, abs=SE * np.sqrt(over * (1 - over) / TRIALS))
    # a trial fails when it is short or overloads (disjoint: below -40 dBm, above -35 dBm)
    assert stats.probability_fails == pytest.approx(stats.probability_below_required[0]
                                                    + stats.probability_overload[0], abs=1e-12)


def test_sum_of_uniform_losses_has_the_variance_n_width_squared_over_12():
    count, low, high = 12, 0.2, 0.8
    for loss in ({"min": f"{low} dB", "max": f"{high} dB"},
                 {"min": f"{low} dB", "typ": "0.3 dB", "max": f"{high} dB", "distribution": "uniform"}):
        stats = stats_of(elements(count, loss), seed=11)
        variance = count * (high - low) ** 2 / 12
        assert stats.margin_std_db[0] ** 2 == pytest.approx(variance, abs=SE * variance * np.sqrt(2 / (TRIALS - 1)))
        assert stats.margin_mean_db[0] == pytest.approx(40 - count * (low + high) / 2,
                                                        abs=SE * np.sqrt(variance / TRIALS))


def test_sum_of_triangular_losses_has_the_triangular_variance():
    count, (low, mode, high) = 6, (0.1, 0.2, 0.6)
    stats = stats_of(elements(count, {"min": f"{low} dB", "typ": f"{mode} dB", "max": f"{high} dB"}), seed=3)
    one = scipy.stats.triang((mode - low) / (high - low), loc=low, scale=high - low)
    assert stats.margin_std_db[0] ** 2 == pytest.approx(count * one.var(),
                                                        abs=SE * count * one.var() * np.sqrt(2 / (TRIALS - 1)))
    assert stats.margin_mean_db[0] == pytest.approx(40 - count * one.mean(),
                                                    abs=SE * np.sqrt(count * one.var() / TRIALS))


def test_a_fully_correlated_batch_has_the_variance_n_squared_sigma_squared():
    count, sigma = 10, 0.02
    batched = elements(count, {"mean": "0.1 dB", "sigma": f"{sigma} dB", "batch": "crew-a"})
    stats = stats_of(batched, seed=13)
    spread = count * sigma  # N·σ, not √N·σ
    assert stats.margin_std_db[0] == pytest.approx(spread, abs=SE * spread / np.sqrt(2 * (TRIALS - 1)))
    # the RSS takes the rows as independent: √N·σ, what the correlation adds is the Monte Carlo's
    assert stats.rss_std_db[0] == pytest.approx(np.sqrt(count) * sigma, abs=SE * sigma / np.sqrt(2 * TRIALS))
    # each row's share of the variance is its covariance with the margin: 1/N each
    assert_allclose([item.share[0] for item in stats.contributions], 1 / count, rtol=1e-9)


def test_counted_splices_draw_each_splice_unless_batched():
    count, sigma = 16, 0.03
    loss = {"mean": "0.1 dB", "sigma": f"{sigma} dB"}  # the 0 dB bound is 3.3 sigma away: truncnorm
    one = scipy.stats.truncnorm((0 - 0.1) / sigma, np.inf, loc=0.1, scale=sigma)
    independent = stats_of([{"name": "splices", "kind": "splice", "count": count, "loss": loss}])
    batched = stats_of([{"name": "splices", "kind": "splice", "count": count, "loss": {**loss, "batch": "crew-b"}}])
    assert independent.margin_std_db[0] == pytest.approx(np.sqrt(count) * one.std(),
                                                         abs=SE * np.sqrt(count) * one.std() / np.sqrt(2 * TRIALS))
    assert batched.margin_std_db[0] == pytest.approx(count * one.std(),
                                                     abs=SE * count * one.std() / np.sqrt(2 * TRIALS))


def test_a_batch_moves_members_of_different_distributions_rank_for_rank():
    chain = [{"name": "a", "kind": "element", "loss": {"mean": "1 dB", "sigma": "0.1 dB", "batch": "lot 7"}},
             {"name": "b", "kind": "element", "loss": {"min": "0.1 dB", "typ": "0.2 dB", "max": "0.6 dB",
                                                       "batch": "lot 7"}}]
    link = linkbudget.load(link_text(chain))
    draws = Draws(2000, seed=1)
    first, second = (draws.value(segment.loss)[:, 0] for segment in link.segments)
    assert scipy.stats.spearmanr(first, second).statistic == pytest.approx(1.0, abs=1e-12)
    assert second.min() >= 0.1 and second.max() <= 0.6


def test_truncation_at_zero_loss_is_the_truncated_normal():
    mu, sigma = 0.05, 0.05  # the bound 0 dB is 1 sigma below the mean
    stats = stats_of([{"name": "joint", "kind": "connector", "loss": {"mean": f"{mu} dB", "sigma": f"{sigma} dB"}}])
    loss = scipy.stats.truncnorm(-1, np.inf, loc=mu, scale=sigma)
    assert stats.margin_mean_db[0] == pytest.approx(40 - loss.mean(), abs=SE * loss.std() / np.sqrt(TRIALS))
    assert stats.margin_quantiles_db[0.5][0] == pytest.approx(40 - loss.median(),
                                                              abs=quantile_tolerance(loss, 0.5, TRIALS))
    assert stats.margin_quantiles_db[0.001][0] < 40 - (mu + 3 * sigma)  # not cut at the 3-sigma corner


def test_shares_of_two_independent_rows_are_their_variance_fractions():
    chain = [{"name": "big", "kind": "element", "loss": {"mean": "1 dB", "sigma": "0.3 dB"}},
             {"name": "small", "kind": "element", "loss": {"mean": "1 dB", "sigma": "0.1 dB"}},
             {"name": "fixed", "kind": "element", "loss": "1 dB"}]
    stats = stats_of(chain)
    shares = {item.name: item.share[0] for item in stats.contributions}
    assert list(shares) == ["big", "small"]  # ranked, the fixed row left out
    assert shares["big"] == pytest.approx(0.9, abs=0.01)  # 0.09 / (0.09 + 0.01)
    assert sum(shares.values()) == pytest.approx(1.0, abs=1e-9)


def test_draws_do_not_depend_on_the_chunk_size():
    link = linkbudget.load(link_text(elements(3, {"mean": "0.3 dB", "sigma": "0.1 dB"})))
    spread = link.segments[0].loss
    whole = Draws(1000, streams=DrawStreams(9)).value(spread)
    streams = DrawStreams(9)
    parts = [Draws(count, streams=streams).value(spread) for count in (1, 333, 666)]
    assert_allclose(np.concatenate(parts), whole, rtol=0, atol=0)


def test_chunking_and_the_counting_pass_give_the_same_quantiles(monkeypatch):
    chain = [*elements(3, {"mean": "0.3 dB", "sigma": "0.1 dB"}),
             {"name": "splices", "kind": "splice", "count": 4, "loss": {"mean": "0.05 dB", "sigma": "0.03 dB"}}]
    kept = stats_of(chain, trials=20_000, axis="channels: [1310 nm, 1550 nm]")
    monkeypatch.setattr(statistics, "CHUNK_NUMBERS", 999)
    monkeypatch.setattr(statistics, "KEPT_MARGIN_BYTES", 0)
    counted = stats_of(chain, trials=20_000, axis="channels: [1310 nm, 1550 nm]")
    for p in kept.margin_quantiles_db:
        assert_allclose(counted.margin_quantiles_db[p], kept.margin_quantiles_db[p], rtol=0, atol=1e-12)
    assert_allclose(counted.margin_mean_db, kept.margin_mean_db, rtol=1e-12)


def test_every_kind_draws_the_same_trials_whatever_the_chunk_size(monkeypatch):
    link = linkbudget.load(EVERY_KIND)
    result = linkbudget.evaluate(link)
    whole = run_statistics(link, result, trials=3000, seed=2)
    monkeypatch.setattr(statistics, "CHUNK_NUMBERS", 777)
    chunked = run_statistics(link, result, trials=3000, seed=2)
    for p in whole.margin_quantiles_db:
        assert_allclose(chunked.margin_quantiles_db[p], whole.margin_quantiles_db[p], rtol=0, atol=0)
    assert np.all(whole.margin_std_db > 0)


def test_light_blocked_by_total_internal_reflection_has_no_yield_and_the_same_quantiles(monkeypatch):
    # fibre n = 1.45 into a medium of n = 1.0 at 60 degrees: past the critical angle (43.6 degrees)
    chain = [{"name": "lead", "kind": "fiber", "length": "1 m", "attenuation": {"min": "0.3 dB/km", "max": "0.5 dB/km"},
              "index": 1.45},
             {"name": "slab", "kind": "medium", "thickness": "1 mm", "index": 1.0, "angle": "60 deg"},
             {"name": "out", "kind": "fiber", "length": "1 m", "attenuation": "0.4 dB/km", "index": 1.45}]
    kept = stats_of(chain, trials=2000)
    monkeypatch.setattr(statistics, "KEPT_MARGIN_BYTES", 0)
    counted = stats_of(chain, trials=2000)
    for stats in (kept, counted):
        assert stats.yield_fraction == 0.0
        assert all(np.isneginf(values[0]) for values in stats.margin_quantiles_db.values())


# --- the command line ---------------------------------------------------------------------------

RUNNER = CliRunner()


@pytest.fixture
def cwdm(tmp_path):
    path = tmp_path / "ring.yaml"
    chain = [{"name": "mux", "kind": "element", "loss": {"mean": "1.8 dB", "sigma": "0.2 dB"}},
             {"name": "trunk", "kind": "fiber", "length": "20 km", "attenuation": {"min": "0.32 dB/km",
                                                                                  "typ": "0.33 dB/km",
                                                                                  "max": "0.35 dB/km"}},
             {"name": "splices", "kind": "splice", "count": 12, "loss": {"mean": "0.05 dB", "sigma": "0.03 dB",
                                                                         "batch": "crew-a"}}]
    path.write_text(link_text(chain, "channels: [1271 nm, 1291 nm, 1311 nm]"), encoding="utf-8")
    return path


def json_of(*args):
    result = RUNNER.invoke(app, ["run", *map(str, args), "--format", "json"])
    assert result.exit_code in (0, 1), result.output
    assert result.stderr == ""  # no progress bar where stderr is not a terminal
    return result.stdout


def test_same_seed_gives_the_same_json_bytes_and_another_seed_other_draws(cwdm):
    first = json_of(cwdm, "--trials", 3000, "--seed", 7)
    assert json_of(cwdm, "--trials", 3000, "--seed", 7) == first
    other = json.loads(json_of(cwdm, "--trials", 3000, "--seed", 8))["statistics"]
    stats = json.loads(first)["statistics"]
    assert stats["trials"] == 3000 and stats["seed"] == 7
    assert set(stats["margin_db"]["quantiles"]) >= {"0.001", "0.01", "0.5"}
    assert stats["margin_db"]["mean"] != other["margin_db"]["mean"]
    assert len(stats["margin_db"]["mean"]) == 3
    assert [item["id"] for item in stats["contributions"]][:1] == ["splices"]  # 12 × 0.03 dB together


def test_the_file_block_asks_for_trials_and_the_command_line_overrides_it(cwdm):
    assert "statistics" not in json.loads(json_of(cwdm))
    cwdm.write_text(cwdm.read_text(encoding="utf-8") + "statistics: {trials: 500, seed: 3}\n", encoding="utf-8")
    assert json.loads(json_of(cwdm))["statistics"]["trials"] == 500
    stats = json.loads(json_of(cwdm, "--trials", 600))["statistics"]
    assert (stats["trials"], stats["seed"]) == (600, 3)


def test_check_gates_on_the_yield(cwdm):
    # nominal margin 40 - 1.8 - 6.6 - 0.6 = 31.0 dB: about half the trials meet a required 31 dB
    gate = ["check", str(cwdm), "--trials", "2000", "--min-margin", "31 dB", "--min-yield"]
    passed = RUNNER.invoke(app, [*gate, "10%"])
    assert passed.exit_code == 0 and passed.stdout.startswith("PASS"), passed.output
    # the worst case does not close at 31 dB, but the summary counts what the gate judged: the yield
    assert passed.stdout.splitlines()[-1] == "1 link(s): 1 reach the least yield, 0 fall short of it, 0 with input errors"
    failed = RUNNER.invoke(app, [*gate, "0.9"])
    assert failed.exit_code == 1 and failed.stdout.startswith("FAIL"), failed.output
    assert "0 reach the least yield, 1 fall short of it" in failed.stdout.splitlines()[-1]
    summary = json.loads(RUNNER.invoke(app, [*gate, "10%", "--format", "json"]).stdout)["summary"]
    assert (summary["close"], summary["do_not_close"], summary["judged_by"]) == (1, 0, "yield")
    for bad in (["--min-yield", "150%"], ["--min-yield", "most"], ["--min-yield", "99%"], ["--trials", "1"],
                ["--seed", "4"]):
        result = RUNNER.invoke(app, ["check", str(cwdm), *bad])
        assert result.exit_code == 2, (bad, result.output)


@pytest.mark.parametrize("loss, key", [
    ("{min: 0.1 dB, max: 0.3 dB, distribution: normal}", "distribution"),
    ("{mean: 0.2 dB, sigma: 0.1 dB, distribution: uniform}", "distribution"),
    ("{typ: 0.2 dB, max: 0.3 dB, distribution: uniform}", "distribution"),
    ("{typ: 0.2 dB, distribution: lognormal}", "distribution"),
    ("{typ: 0.2 dB, batch: ' '}", "batch"),
])
def test_a_distribution_that_does_not_fit_its_keys_is_a_placed_error(tmp_path, loss, key):
    path = tmp_path / "bad.yaml"
    path.write_text(link_text([{"name": "joint", "kind": "connector", "loss": "LOSS"}]).replace("LOSS", loss),
                    encoding="utf-8")
    result = RUNNER.invoke(app, ["run", str(path)])
    assert result.exit_code == 2
    assert f"chain[0].loss.{key}" in result.stderr and ".yaml:10:" in result.stderr, result.stderr


def test_ctrl_c_stops_a_long_run_with_one_line(cwdm):
    process = subprocess.Popen([sys.executable, "-c", "from linkbudget.cli import main; main()", "run", str(cwdm),
                                "--trials", "100000000", "--quiet"], stdout=subprocess.PIPE, stderr=subprocess.PIPE,
                               text=True)
    time.sleep(4)
    process.send_signal(signal.SIGINT)
    out, err = process.communicate(timeout=60)
    assert process.returncode == 130
    assert err.strip() == "linkbudget: interrupted" and out == ""
