"""A budget is finite or refused: no non-finite loss, power or margin may pass the gate.

Total internal reflection is the one case where light is blocked (+inf loss, null in the JSON);
it never passes either.
"""

import json
import math

import numpy as np
from hypothesis import given, settings
from hypothesis import strategies as st

import linkbudget
from linkbudget.config import ConfigError
from linkbudget.physics import thinfilm

LINK = """\
title: slab between two fibres
wavelength: 1550 nm
source:
  power: 0 dBm
receiver:
  sensitivity: -30 dBm
chain:
  - name: lead
    kind: fiber
    length: 1 m
    attenuation: 0.4 dB/km
    index: 1.45
  - name: slab
    kind: medium
    thickness: {thickness}
    index: {index}
{extra}  - name: out
    kind: fiber
    length: 1 m
    attenuation: 0.4 dB/km
    index: 1.45
"""


def link_text(index="1.5", thickness="1 mm", extra="    multiple_reflections: true\n"):
    return LINK.format(index=index, thickness=thickness, extra=extra)


def test_huge_index_with_multiple_reflections_is_a_placed_input_error(write_link, cli):
    # the reported false PASS: refused now by the index's valid range, at the key (line 16)
    path = write_link(link_text(index="1e17"))
    for command in ("run", "check"):
        result = cli(command, path)
        assert result.exit_code == 2, result.output
        assert "PASS" not in result.stdout
    message = cli("run", path).stderr.splitlines()[0]
    assert message.startswith(f"{path}:16:12: chain[1].index: an index must be"), message


def test_non_finite_row_is_a_placed_input_error_never_a_pass(write_link, cli, monkeypatch):
    # behind the ranges, the gate itself refuses a non-finite row: force the round-trip factor of
    # the multiple reflections to overflow, as the unbounded index once made it
    monkeypatch.setattr(thinfilm, "round_trip_factor", lambda *args: np.inf)
    path = write_link(link_text())
    for command in ("run", "check"):
        result = cli(command, path)
        assert result.exit_code == 2, result.output
        assert "PASS" not in result.stdout
    message = cli("run", path).stderr.splitlines()[0]
    # placed at the slab (line 13 of the file: "- name: slab"), naming the row
    assert message.startswith(f"{path}:13:5: chain[1]: the budget is not finite"), message
    assert "slab multiple reflections" in message


def test_total_internal_reflection_blocks_and_is_marked_in_json(write_link, cli):
    # fibre n = 1.45 into a medium of n = 1.0 at 60 degrees: past the critical angle (43.6 degrees)
    path = write_link(link_text(index="1.0", extra="    angle: 60 deg\n"))
    check = cli("check", path)
    assert check.exit_code == 1 and check.stdout.startswith("FAIL"), check.output
    result = cli("run", path, "--format", "json")
    assert result.exit_code == 1
    data = json.loads(result.stdout)
    face = data["rows"][1]
    assert face["name"] == "lead → slab" and face["total_internal_reflection"] == [True]
    assert face["loss_db"]["worst"] == [None] and data["margin_db"]["worst"] == [None]
    assert [s["name"] for s in data["rows"] if "total_internal_reflection" in s] == ["lead → slab"]
    assert data["closes"] is False


@settings(max_examples=60, deadline=None)
@given(real=st.floats(1.0, 1e30), kappa=st.sampled_from([0.0, 1e-9, 1e-3, 1.0, 1e6]),
       thickness_um=st.floats(1e-3, 1e6), reflections=st.booleans())
def test_no_medium_gives_a_non_finite_margin_that_passes(real, kappa, thickness_um, reflections):
    extra = "    multiple_reflections: true\n" if reflections else ""
    text = link_text(index=f"{real!r}+{kappa!r}j" if kappa else repr(real), thickness=f"{thickness_um!r} um",
                     extra=extra)
    try:
        result = linkbudget.evaluate(linkbudget.load(text))
    except ConfigError as error:
        assert str(error).startswith("<string>:") or ":" in str(error).splitlines()[0]
        return
    margin = result.margin_db["worst"]
    assert np.all(np.isfinite(margin)) or not result.closes
    if result.closes:
        assert all(math.isfinite(value) for value in result.margin_db["typ"])
