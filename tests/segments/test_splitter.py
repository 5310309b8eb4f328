"""The ``splitter`` segment: equal 1×N splits, unequal taps, excess loss, input errors.

Outside sources: an ideal lossless 1×N splitter loses 10·log10(N) to each port and a tap that
sends the fraction r to a port loses −10·log10(r) there (G. Keiser, "Optical Fiber
Communications", McGraw-Hill, the chapter on couplers; edition and chapter from memory); losses
in dB add (IEC 60027-3, from memory). The check values are given to 4 decimals, so they are
compared with atol 5e-5 dB.
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.segments.cases import CASES, CORNER
from linkbudget.segments.splitter import Splitter
from tests.segments.linktext import link_text, only_problem

WL_1310 = np.array([1310e-9])
#: Check values have 4 decimals.
ATOL_4_DECIMALS = 5e-5


def splitter(**keys):
    return Splitter.model_validate({"kind": "splitter", **keys})


@pytest.mark.parametrize(("ports", "loss_db"), [(2, 3.0103), (8, 9.0309), (32, 15.0515)])
def test_loss_db_equal_split_keiser(ports, loss_db):
    # Keiser (from memory): splitting loss of an ideal 1xN splitter is 10·log10 N.
    segment = splitter(ports=ports)
    for case in CASES:
        assert_allclose(segment.loss_db(WL_1310, CORNER[case]), [loss_db], atol=ATOL_4_DECIMALS)


def test_loss_db_equal_split_port_does_not_change_loss():
    # Keiser (from memory): every port of an ideal equal splitter carries 1/N.
    losses = [splitter(ports=8, port=port).loss_db(WL_1310, CORNER["typ"]) for port in (1, 5, 8)]
    assert_allclose(losses, [[9.0309]] * 3, atol=ATOL_4_DECIMALS)


@pytest.mark.parametrize(("keys", "loss_db", "followed_port"), [
    ({"ratio": "2/98"}, 16.9897, 1),
    ({"ratio": "2/98", "port": 1}, 16.9897, 1),
    ({"ratio": "2/98", "port": 2}, 0.0877, 2),
    ({"ratio": "1 / 3", "port": 2}, 1.2494, 2),  # -10·log10(3/4) = 1.2494 dB
    ({"ratio": 0.02}, 16.9897, None),
    ({"ratio": "2e-2"}, 16.9897, None),  # YAML 1.1 reads 2e-2 as text
    ({"ratio": 1}, 0.0, None),
])
def test_loss_db_tap_keiser(keys, loss_db, followed_port):
    # Keiser (from memory): a tap sending the fraction r to the followed port loses -10·log10 r
    # there; 2/98 -> 16.9897 dB on the 2 % port, 0.0877 dB on the 98 % port.
    segment = splitter(**keys)
    assert_allclose(segment.loss_db(WL_1310, CORNER["worst"]), [loss_db], atol=ATOL_4_DECIMALS)
    assert segment.followed_port == followed_port


@pytest.mark.parametrize(("keys", "split_db"), [({"ports": 8}, 9.0309), ({"ratio": "2/98", "port": 2}, 0.0877),
                                                ({"ratio": 0.02}, 16.9897)])
def test_loss_parts_db_excess_loss_adds_in_every_case(keys, split_db):
    # Losses in dB add; the worst case takes the excess loss's max, the best its min (README spreads).
    excess = {"min": "0.1 dB", "typ": "0.3 dB", "max": "0.8 dB"}
    segment = splitter(**keys, excess_loss=excess)
    wavelength_m = np.array([1270e-9, 1310e-9, 1550e-9])
    for case, excess_db in {"typ": 0.3, "worst": 0.8, "best": 0.1}.items():
        parts = segment.loss_parts_db(wavelength_m, CORNER[case])
        assert_allclose(parts["split"], [split_db] * 3, atol=ATOL_4_DECIMALS)
        assert_allclose(parts["excess"], [excess_db] * 3, rtol=1e-12)
        assert_allclose(segment.loss_db(wavelength_m, CORNER[case]), [split_db + excess_db] * 3, atol=ATOL_4_DECIMALS)


def test_loss_parts_db_default_excess_is_zero():
    assert_allclose(splitter(ports=2).loss_parts_db(WL_1310, CORNER["worst"])["excess"], [0.0], atol=0)


def test_evaluate_splitter_in_a_link():
    # Keiser (from memory) and decibel arithmetic: a 2/98 tap's through port (0.0877 dB), then a
    # 1x32 split (15.0515 dB) with an excess loss of 0.8 dB typ, 1.5 dB max: 16.6392 dB worst,
    # 15.9392 dB typ, so the typical margin against the -40 dBm sensitivity is 24.0608 dB.
    link = linkbudget.load(link_text([
        {"name": "monitor tap", "kind": "splitter", "ratio": "2/98", "port": 2},
        {"name": "drop split", "kind": "splitter", "ports": 32, "port": 17,
         "excess_loss": {"typ": "0.8 dB", "max": "1.5 dB"}},
    ]))
    result = linkbudget.evaluate(link)
    assert [row.shown_kind for row in result.rows] == ["splitter", "splitter"]
    assert_allclose(result.cumulative_loss_db["worst"][:, 0], [0.0877, 16.6392], atol=ATOL_4_DECIMALS)
    assert_allclose(result.margin_db["typ"], [24.0608], atol=ATOL_4_DECIMALS)


@pytest.mark.parametrize(("keys", "path", "phrases"), [
    ({"ports": 0}, "chain[0].ports", ("splitter ports must be from 2 to 1024",)),
    ({"ports": 8, "port": 9}, "chain[0].port", ("port 9", "1x8", "1 to 8")),
    ({"ports": 8, "port": 0}, "chain[0].port", ("splitter port must be from 1 to 1024",)),
    ({"ratio": 0}, "chain[0].ratio", ("0 < ratio <= 1",)),
    ({"ratio": 1.5}, "chain[0].ratio", ("0 < ratio <= 1",)),
    ({"ratio": "2/x"}, "chain[0].ratio", ("cannot read '2/x'", "2/98")),
    ({"ratio": "2/98/0"}, "chain[0].ratio", ("cannot read",)),
    ({"ratio": "0/100"}, "chain[0].ratio", ("both shares", "> 0")),
    ({"ratio": [2, 98]}, "chain[0].ratio", ("expected a split ratio",)),
    ({"ratio": "2/98", "port": 3}, "chain[0].port", ("ports 1 and 2", "port 3")),
    ({"ratio": 0.02, "port": 1}, "chain[0].port", ("fraction", "drop port", "a/b")),
    ({"ports": 8, "ratio": "2/98"}, "chain[0].ratio", ("ports or ratio, not both",)),
    ({}, "chain[0]", ("ports", "ratio")),
    ({"ports": 4, "excess_loss": "-0.5 dB"}, "chain[0].excess_loss", ("excess loss must be from 0 dB to 60 dB",)),
])
def test_load_splitter_bad_input(keys, path, phrases):
    found_path, message = only_problem([{"kind": "splitter", **keys}])
    assert found_path == path
    for phrase in phrases:
        assert phrase in message
