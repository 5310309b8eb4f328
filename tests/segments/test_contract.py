"""The contract every registered segment kind keeps, like the one over the material catalog.

For each kind of the registry: a link with it (``tests/data/every-kind.yaml`` holds every kind
once, each where it can stand) loads and evaluates at the corners and on random draws; its row
has an origin, finite values, worst ≥ typ ≥ best, and draws between best and worst (those of this
link, seed 7; a normal spread may reach past its ±3σ corners); and a
placement where the kind cannot stand is a placed input error. A kind added to the registry
without an entry here fails :func:`test_every_registered_kind_is_covered`.

The draws' distributions are checked against their closed forms (normal truncated at its physical
bound from ``scipy.stats.truncnorm``; the triangular and uniform means and variances), and a geometric joint's
draws against the Gaussian overlap computed in the test from the drawn offsets.
"""

import numpy as np
import pytest
import scipy.stats
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.config.source import format_key_path
from linkbudget.engine import budget_rows
from linkbudget.segments.cases import CASES, Draws
from linkbudget.segments.registry import KINDS
from tests.conftest import EVERY_KIND
from tests.segments.linktext import link_text

DRAW_COUNT = 400
#: Draws may exceed a corner by rounding only.
ROUNDING_DB = 1e-9

#: kind -> (chain where it cannot stand, the key path of the placed error).
MISPLACED = {
    "coating": ([{"kind": "coating", "layers": [{"index": 1.38, "thickness": "100 nm"}]},
                 {"kind": "medium", "index": 1.5, "thickness": "1 mm"}], "chain[0].kind"),
    "medium": ([{"kind": "medium", "index": 1.5, "thickness": "1 mm", "angle": "10 deg"}], "chain[0].angle"),
    "gap": ([{"kind": "gap", "length": "1 mm", "beam": {"waist": "0.1 mm"}}], "chain[0].beam"),
    "connector": ([{"kind": "connector", "offset": "1 um"}], "chain[0].mode_field_diameter_before"),
    "splice": ([{"kind": "splice", "offset": "1 um"}], "chain[0].mode_field_diameter_before"),
    "fiber": ([{"kind": "fiber", "length": "1 m", "attenuation": "1 dB/km", "index": 1.46, "angle": "5 deg"}],
              "chain[0].angle"),
    "waveguide": ([{"kind": "waveguide", "length": "1 mm", "attenuation": "1 dB/cm", "index": 2.0,
                    "angle": "5 deg"}], "chain[0].angle"),
}
#: Kinds that can stand anywhere in a chain (no neighbour changes what they mean).
STANDS_ANYWHERE = {"element", "splitter"}


@pytest.fixture(scope="module")
def link():
    return linkbudget.load(EVERY_KIND)


@pytest.fixture(scope="module")
def corners(link):
    return linkbudget.evaluate(link)


@pytest.fixture(scope="module")
def draws(link):
    rows, _ = budget_rows(link.segments, link.spec.wavelengths_m(), cases=(Draws(DRAW_COUNT, seed=7),))
    return {row.id: row for row in rows}


def test_every_registered_kind_is_covered(link):
    assert sorted({segment.kind for segment in link.segments}) == sorted(KINDS)
    assert sorted(MISPLACED.keys() | STANDS_ANYWHERE) == sorted(KINDS)


def segment_rows(result, kind):
    return [row for row in result.rows if row.segment_kind == kind]


@pytest.mark.parametrize("kind", sorted(KINDS))
def test_kind_row_has_its_origin_and_finite_ordered_corners(corners, kind):
    rows = segment_rows(corners, kind)
    assert rows
    for row in rows:
        assert row.origin == (row.id,)
        assert row.kind == ("coating" if kind == "coating" else "segment")
        for case in CASES:
            assert np.all(np.isfinite(row.loss_db[case]))
        assert np.all(row.loss_db["worst"] >= row.loss_db["typ"] - ROUNDING_DB)
        assert np.all(row.loss_db["typ"] >= row.loss_db["best"] - ROUNDING_DB)


@pytest.mark.parametrize("kind", sorted(KINDS))
def test_kind_evaluates_on_draws_between_its_corners(corners, draws, kind):
    for row in segment_rows(corners, kind):
        drawn = draws[row.id].loss_db["draws"]  # a loss no spread enters may stay (n_wavelengths,)
        assert np.broadcast_shapes(drawn.shape, (DRAW_COUNT, 1)) == (DRAW_COUNT, len(corners.wavelength_m))
        assert np.all(np.isfinite(drawn))
        assert np.all(drawn <= row.loss_db["worst"] + ROUNDING_DB)
        assert np.all(drawn >= row.loss_db["best"] - ROUNDING_DB)


def test_toleranced_rows_spread_over_their_draws(corners, draws):
    for name in ("bench connector", "sensor window", "sensor chip", "chip pigtail", "monitor tap", "detector lens"):
        drawn = draws[name].loss_db["draws"]
        assert np.ptp(drawn[:, 0]) > 0, name


def test_inserted_rows_name_the_segments_they_sit_between(corners):
    inserted = {row.id: row.origin for row in corners.rows if row.kind in ("interface", "reflections")}
    assert inserted["launch lead → bench connector gap"] == ("launch lead", "bench connector")
    assert inserted["bench connector gap → bench lead"] == ("bench connector", "bench lead")
    assert inserted["sensor window multiple reflections"] == ("sensor window", "return air")


def test_inserted_row_ids_do_not_change_when_a_segment_is_added_elsewhere(link, corners):
    text = EVERY_KIND.read_text(encoding="utf-8").replace(
        "chain:\n", "chain:\n  - name: launch attenuator\n    kind: element\n    loss: 1 dB\n", 1)
    grown = linkbudget.evaluate(linkbudget.load(text))
    assert [row.id for row in grown.rows][1:] == [row.id for row in corners.rows]


def test_connector_return_loss_is_its_reflectance_toward_the_source(corners):
    (connector,) = segment_rows(corners, "connector")
    for pol in ("s", "p"):
        assert_allclose(connector.reflectance[pol], 10 ** (-45 / 10), rtol=1e-12)  # R = 10^(−RL/10)


@pytest.mark.parametrize("kind", sorted(MISPLACED))
def test_kind_where_it_cannot_stand_is_a_placed_error(kind):
    chain, key_path = MISPLACED[kind]
    with pytest.raises(linkbudget.ConfigError) as error:
        linkbudget.load(link_text(chain))
    (problem,) = error.value.problems
    assert format_key_path(problem.path) == key_path
    assert problem.mark is not None


# --- the draws themselves ----------------------------------------------------------------------

def joint_link(loss):
    return linkbudget.load(link_text([{"name": "joint", "kind": "connector", "loss": loss}]))


def drawn_losses(link, count=20_000, seed=3):
    rows, _ = budget_rows(link.segments, link.spec.wavelengths_m(), cases=(Draws(count, seed=seed),))
    return rows[0].loss_db["draws"][:, 0]


def test_normal_spread_draws_are_a_normal_truncated_at_its_physical_bound():
    # a loss is >= 0: mean 0.1 dB, sigma 0.1 dB is a normal truncated at a = (0 - 0.1)/0.1 = -1 sigma
    values = drawn_losses(joint_link({"mean": "0.1 dB", "sigma": "0.1 dB"}))
    expected = scipy.stats.truncnorm(-1, np.inf, loc=0.1, scale=0.1)
    assert values.min() >= 0
    assert values.max() > 0.1 + 3 * 0.1  # not cut at the worst corner, mean + 3 sigma
    assert values.mean() == pytest.approx(expected.mean(), abs=4 * expected.std() / np.sqrt(values.size))
    assert values.std() == pytest.approx(expected.std(), rel=0.03)
    for p in (0.01, 0.5, 0.99):  # standard error of a quantile: sqrt(p(1 - p)/n)/f(x_p)
        tolerance = 4 * np.sqrt(p * (1 - p) / values.size) / expected.pdf(expected.ppf(p))
        assert np.quantile(values, p) == pytest.approx(expected.ppf(p), abs=tolerance)


def test_three_point_spread_draws_are_triangular():
    low, mode, high = 0.2, 0.3, 0.7
    values = drawn_losses(joint_link({"min": f"{low} dB", "typ": f"{mode} dB", "max": f"{high} dB"}))
    mean = (low + mode + high) / 3  # triangular distribution
    variance = (low**2 + mode**2 + high**2 - low * mode - low * high - mode * high) / 18
    assert values.mean() == pytest.approx(mean, abs=4 * np.sqrt(variance / values.size))
    assert values.var() == pytest.approx(variance, rel=0.05)


def test_range_spread_draws_are_uniform():
    values = drawn_losses(joint_link({"min": "0.1 dB", "max": "0.5 dB"}))
    assert values.mean() == pytest.approx(0.3, abs=4 * 0.4 / np.sqrt(12 * values.size))
    assert values.var() == pytest.approx(0.4**2 / 12, rel=0.05)


def test_a_fixed_value_draws_itself():
    assert_allclose(drawn_losses(joint_link("0.25 dB"), count=10), 0.25, rtol=0, atol=0)


def test_geometric_joint_draws_follow_the_gaussian_overlap_of_their_drawn_offset():
    # two equal 10.4 µm modes, offset d: η = exp(−d²/w²), loss 10·log10(e)·d²/w² (Marcuse 1977)
    link = linkbudget.load(link_text([
        {"name": "a", "kind": "fiber", "length": "1 m", "attenuation": "0 dB/km", "mode_field_diameter": "10.4 um"},
        {"name": "joint", "kind": "splice", "offset": {"min": "0 um", "max": "2 um"}},
        {"name": "b", "kind": "fiber", "length": "1 m", "attenuation": "0 dB/km", "mode_field_diameter": "10.4 um"},
    ]))
    draws = Draws(500, seed=11)
    rows, _ = budget_rows(link.segments, link.spec.wavelengths_m(), cases=(draws,))
    offset_m = draws.value(link.segments[1].offset)[:, 0]
    expected_db = 10 * np.log10(np.e) * offset_m**2 / 5.2e-6**2
    assert_allclose(rows[1].loss_db["draws"][:, 0], expected_db, rtol=1e-12, atol=1e-15)
    assert offset_m.min() >= 0 and offset_m.max() <= 2e-6 and np.ptp(offset_m) > 1e-6
