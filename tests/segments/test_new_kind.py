"""A new datasheet kind is one module and one registry line: the example attenuator
(``tests/segments/example_kind/attenuator.py``) registered here loads, evaluates at the corners and
on draws, passes the faces around it on, and is refused with a placed error where its keys are
wrong, with no other change to the program."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.config.json_schema import link_schema
from linkbudget.engine import budget_rows
from linkbudget.segments import registry
from linkbudget.segments.cases import Draws
from tests.segments.example_kind.attenuator import Attenuator
from tests.segments.linktext import link_text

WINDOWS = [{"name": "front", "kind": "medium", "index": 1.5, "thickness": "1 mm"},
           {"name": "pad", "kind": "attenuator", "attenuation": {"typ": "3 dB", "max": "3.5 dB", "min": "2.8 dB"}},
           {"name": "back", "kind": "medium", "index": 1.5, "thickness": "1 mm"}]


@pytest.fixture(autouse=True)
def registered(monkeypatch):
    monkeypatch.setitem(registry.KINDS, "attenuator", Attenuator)  # the one registry line


def test_new_kind_evaluates_at_the_corners_and_passes_the_faces_on():
    result = linkbudget.evaluate(linkbudget.load(link_text(WINDOWS)))
    # equal indices on both sides of a passing element: no face between the two windows
    assert [row.id for row in result.rows] == ["front", "pad", "back"]
    pad = result.rows[1]
    assert pad.origin == ("pad",) and pad.segment_kind == "attenuator"
    assert_allclose([pad.loss_db[case][0] for case in ("typ", "worst", "best")], [3.0, 3.5, 2.8], rtol=1e-12)


def test_new_kind_evaluates_on_draws():
    link = linkbudget.load(link_text(WINDOWS))
    rows, _ = budget_rows(link.segments, link.spec.wavelengths_m(), cases=(Draws(1000, seed=5),))
    drawn = rows[1].loss_db["draws"][:, 0]
    assert drawn.min() >= 2.8 and drawn.max() <= 3.5
    assert drawn.mean() == pytest.approx((2.8 + 3.0 + 3.5) / 3, abs=0.02)  # triangular mean (a + c + b)/3


def test_new_kind_input_errors_are_placed():
    with pytest.raises(linkbudget.ConfigError) as error:
        linkbudget.load(link_text([{"kind": "attenuator", "attenuation": "3 dB", "atenuation": "1 dB"}]))
    (problem,) = error.value.problems
    assert problem.path == ("chain", 0, "atenuation") and problem.mark is not None
    assert "did you mean 'attenuation'" in problem.hint
    assert np.isfinite(problem.mark.line)


def test_new_kind_is_in_the_editor_schema():
    schema = link_schema()
    entry = schema["properties"]["chain"]["items"]
    assert "attenuator" in entry["properties"]["kind"]["enum"]
    (rule,) = [rule for rule in entry["allOf"] if rule["if"]["properties"]["kind"]["const"] == "attenuator"]
    keys = schema["$defs"][rule["then"]["$ref"].rsplit("/", 1)[-1]]["properties"]
    assert sorted(keys) == ["attenuation", "kind", "name"]
    assert keys["attenuation"]["description"] == "Datasheet attenuation of the attenuator."
