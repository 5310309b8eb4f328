"""Datasheet values as tables over wavelength, and the silica model on a fibre.

Expected numbers are closed forms computed here: linear interpolation between two table entries
is y1 + (y2 − y1)·(λ − λ1)/(λ2 − λ1); a fibre's loss is its length times its attenuation.
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.engine import budget_rows
from linkbudget.segments.cases import Draws
from tests.conftest import MINIMAL_LINK

CHANNELS = "channels: [1310 nm, 1400 nm, 1550 nm]"


def _link(attenuation="0.5 dB/km", loss="0.5 dB", axis=CHANNELS, extra=""):
    text = MINIMAL_LINK.replace("wavelength: 1310 nm", axis).replace("attenuation: 0.5 dB/km",
                                                                       f"attenuation: {attenuation}")
    return text.replace("    loss: 0.5 dB\n", f"    loss: {loss}\n{extra}")


def _interpolated(x, x1, y1, x2, y2):
    return y1 + (y2 - y1) * (x - x1) / (x2 - x1)


def test_two_point_table_interpolates_linearly():
    result = linkbudget.evaluate(linkbudget.load(_link("{1310 nm: 0.35 dB/km, 1550 nm: 0.22 dB/km}")))
    expected_db_per_km = [_interpolated(x, 1310, 0.35, 1550, 0.22) for x in (1310, 1400, 1550)]
    for case in ("typ", "worst", "best"):
        assert_allclose(result.rows[0].loss_db[case], 2.0 * np.array(expected_db_per_km), rtol=1e-12)


def test_table_of_spreads_interpolates_each_end():
    loss = "{1310 nm: {typ: 0.2 dB, max: 0.5 dB}, 1550 nm: {typ: 0.4 dB, max: 0.9 dB}}"
    rows = linkbudget.evaluate(linkbudget.load(_link(loss=loss))).rows
    assert_allclose(rows[1].loss_db["typ"], [_interpolated(x, 1310, 0.2, 1550, 0.4) for x in (1310, 1400, 1550)])
    assert_allclose(rows[1].loss_db["worst"], [_interpolated(x, 1310, 0.5, 1550, 0.9) for x in (1310, 1400, 1550)])
    assert_allclose(rows[1].loss_db["best"], rows[1].loss_db["typ"])  # no min: the low end is typ


def test_table_outside_its_wavelengths_is_a_placed_error():
    text = _link(loss="{1400 nm: 0.3 dB, 1550 nm: 0.4 dB}")
    with pytest.raises(linkbudget.ConfigError) as raised:
        linkbudget.load(text)
    line = next(number for number, line in enumerate(text.splitlines(), 1) if "1400 nm: 0.3" in line)
    column = text.splitlines()[line - 1].index("{") + 1
    message = str(raised.value)
    assert message.startswith(f"<string>:{line}:{column}: chain[1].loss: the link's wavelength 1310 nm lies outside")
    assert "hold_ends: true" in message


def test_table_with_hold_ends_holds_the_end_values():
    rows = linkbudget.evaluate(linkbudget.load(_link(loss="{1400 nm: 0.3 dB, 1500 nm: 0.4 dB, hold_ends: true}"))).rows
    assert_allclose(rows[1].loss_db["typ"], [0.3, 0.3, 0.4])


@pytest.mark.parametrize(("loss", "path", "phrase"), [
    ("{1550 nm: 0.3 dB, 1310 nm: 0.4 dB}", "chain[1].loss.1310 nm", "must increase"),
    ("{1310 nm: 0.3 dB}", "chain[1].loss", "at least two entries"),
    ("{1310 nm: 0.3 dB, 1550 nmm: 0.4 dB}", "chain[1].loss.1550 nmm", "unknown unit"),
    ("{1310 nm: 0.3 dB, 1550 nm: -0.4 dB}", "chain[1].loss.1550 nm", "joint loss"),
    ("{1310 nm: 0.3 dB, 1550 nm: {typ: 0.4 dB, min: 0.5 dB}}", "chain[1].loss.1550 nm.typ", "min <= typ"),
    ("{1310 nm: 0.3 dB, 1550 nm: 0.4 dB, hold_ends: 1}", "chain[1].loss.hold_ends", "true or false"),
    ("{model: silica, water_peak: low}", "chain[1].loss.model", "fibre's attenuation"),
])
def test_malformed_table_is_a_placed_error(loss, path, phrase):
    with pytest.raises(linkbudget.ConfigError) as raised:
        linkbudget.load(_link(loss=loss))
    message = str(raised.value)
    assert f": {path}: " in message.splitlines()[0] and phrase in message


def test_return_loss_table_sets_the_reflectance():
    extra = "    return_loss: {1310 nm: 50 dB, 1550 nm: 40 dB}\n"
    row = linkbudget.evaluate(linkbudget.load(_link(extra=extra))).rows[1]
    assert_allclose(row.return_loss_db, [_interpolated(x, 1310, 50, 1550, 40) for x in (1310, 1400, 1550)])


def test_silica_model_fibre_loss_is_length_times_the_model():
    # Rayleigh A/λ⁴ + B + C·exp(−D/λ) + Gaussian OH peak, written out here (coefficients as given)
    attenuation = ("{model: silica, water_peak: 0.3 dB/km, rayleigh_at_1um: 0.8 dB/km, "
                   "excess: {typ: 0.02 dB/km, max: 0.06 dB/km}}")
    rows = linkbudget.evaluate(linkbudget.load(_link(attenuation))).rows
    um = np.array([1.31, 1.40, 1.55])
    peak = 0.3 * np.exp(-4 * np.log(2) * ((um - 1.383) / 0.030) ** 2)
    base = 0.8 / um**4 + 7.81e11 * np.exp(-48.48 / um) + peak
    assert_allclose(rows[0].loss_db["typ"], 2.0 * (base + 0.02), rtol=1e-9)
    assert_allclose(rows[0].loss_db["worst"], 2.0 * (base + 0.06), rtol=1e-9)


def test_silica_model_outside_its_range_is_noted():
    result = linkbudget.evaluate(linkbudget.load(_link("{model: silica, water_peak: low}", axis="wavelength: 850 nm")))
    assert any("silica model is stated for 1200-1700 nm" in note for note in result.rows[0].notes)


@pytest.mark.parametrize("loss", [
    "{1310 nm: {typ: 0.2 dB, max: 0.5 dB, min: 0.1 dB}, 1550 nm: {typ: 0.4 dB, max: 0.9 dB}}",
    "{1310 nm: {mean: 0.3 dB, sigma: 0.05 dB}, 1550 nm: {mean: 0.5 dB, sigma: 0.1 dB}}",
    "{1310 nm: {min: 0.1 dB, max: 0.3 dB}, 1550 nm: {min: 0.2 dB, max: 0.6 dB}}",
])
def test_table_draws_lie_between_the_corners_and_share_one_quantile(loss):
    link = linkbudget.load(_link(loss=loss))
    wavelength_m = link.spec.wavelengths_m()
    corners = linkbudget.evaluate(link).rows[1].loss_db
    drawn = budget_rows(link.segments, wavelength_m, cases=(Draws(4000, seed=3),))[0][1].loss_db["draws"]
    assert drawn.shape == (4000, 3)
    assert np.all(drawn >= corners["best"] - 1e-12) and np.all(drawn <= corners["worst"] + 1e-12)
    # one part, one draw: the draws at two wavelengths are ranked alike (Spearman correlation 1)
    ranks = np.argsort(np.argsort(drawn, axis=0), axis=0)
    assert np.array_equal(ranks[:, 0], ranks[:, 2])


@pytest.mark.parametrize(("loss", "reference"), [
    # at 1310 nm: triangular(0.1, 0.2, 0.5) and truncated normal(0.3, 0.05) within ±3σ (scipy.stats)
    ("{1310 nm: {min: 0.1 dB, typ: 0.2 dB, max: 0.5 dB}, 1550 nm: {min: 0.1 dB, typ: 0.4 dB, max: 0.9 dB}}",
     lambda stats: stats.triang(c=(0.2 - 0.1) / 0.4, loc=0.1, scale=0.4)),
    ("{1310 nm: {mean: 0.3 dB, sigma: 0.05 dB}, 1550 nm: {mean: 0.5 dB, sigma: 0.1 dB}}",
     lambda stats: stats.truncnorm(-3, 3, loc=0.3, scale=0.05)),
])
def test_table_draws_follow_the_entry_distribution(loss, reference):
    from scipy import stats

    link = linkbudget.load(_link(loss=loss))
    drawn = budget_rows(link.segments, link.spec.wavelengths_m(), cases=(Draws(20000, seed=5),))[0][1].loss_db["draws"]
    assert stats.kstest(drawn[:, 0], reference(stats).cdf).pvalue > 1e-3  # seeded: a fixed draw


@pytest.mark.parametrize(("attenuation", "path", "phrase"), [
    ("{model: silica}", "chain[0].attenuation", "missing required key 'water_peak'"),
    ("{model: silica, water_peak: lowish}", "chain[0].attenuation.water_peak", "one of low, legacy, none"),
    ("{model: silica, water_peak: -1 dB/km}", "chain[0].attenuation.water_peak", "from 0 dB/km to 10000 dB/km"),
    ("{model: silica, water_peak: low, rayleigh: 1 dB/km}", "chain[0].attenuation.rayleigh",
     "did you mean 'rayleigh_at_1um'?"),
    ("{model: quartz, water_peak: low}", "chain[0].attenuation.model", "unknown spectral model"),
    ("{model: [1], water_peak: low}", "chain[0].attenuation.model", "unknown spectral model"),
    ("{model: silica, water_peak: low, excess: {typ: 0.1 dB/km, max: 0.05 dB/km}}",
     "chain[0].attenuation.excess.max", "min <= typ <= max"),
])
def test_malformed_silica_model_is_a_placed_error(attenuation, path, phrase):
    with pytest.raises(linkbudget.ConfigError) as raised:
        linkbudget.load(_link(attenuation))
    message = str(raised.value)
    assert f": {path}: " in message.splitlines()[0] and phrase in message
