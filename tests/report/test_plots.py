"""Plots: the plotted data are the budget's powers and margins, summed by hand here.

The link below is summed by hand (dB losses add along the chain): 2 km of fibre at 0.5 dB/km typ
(0.6 worst), a connector of 0.3 dB typ (0.75 worst) and a 1 dB allowance, launched at -3 dBm typ
(-5 dBm worst). The power after each row is the launch power minus the running sum of losses.

matplotlib is in the test extra (pyproject), so these tests never skip: without it they fail with
the message of :class:`linkbudget.report.plots.PlotsUnavailable`.
"""

import subprocess
import sys

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.report import plots

HAND_LINK = """\
title: Hand-summed plot link
{axis}
source:
  power: {{min: -5 dBm, typ: -3 dBm, max: -2 dBm}}
receiver:
  sensitivity: -20 dBm
  overload: -1 dBm
  required_margin: 3 dB
chain:
  - name: {first}
    kind: fiber
    length: 2 km
    attenuation: {{typ: 0.5 dB/km, max: 0.6 dB/km}}
  - name: panel
    kind: connector
    loss: {{typ: 0.3 dB, max: 0.75 dB}}
  - name: allowance
    kind: element
    loss: 1 dB
"""
#: Launch power, then the power after each row [dBm], summed by hand.
TYP_DBM = [-3.0, -3.0 - 2 * 0.5, -3.0 - 2 * 0.5 - 0.3, -3.0 - 2 * 0.5 - 0.3 - 1.0]
WORST_DBM = [-5.0, -5.0 - 2 * 0.6, -5.0 - 2 * 0.6 - 0.75, -5.0 - 2 * 0.6 - 0.75 - 1.0]
FLOOR_DBM = -20.0 + 3.0  # sensitivity + required margin
OVERLOAD_DBM = -1.0


def hand_result(axis="wavelength: 1550 nm", first="trunk"):
    return linkbudget.evaluate(linkbudget.load(HAND_LINK.format(axis=axis, first=first)))


def drawn(panels):
    """The figure of ``panels``, drawn once (so text that matplotlib cannot draw fails here)."""
    shown = plots.figure(panels)
    shown.canvas.draw()
    return shown


def line(axes, gid):
    (found,) = [item for item in axes.get_lines() if item.get_gid() == gid]
    return found


def test_power_levels_lines_are_the_hand_summed_powers():
    axes = drawn(plots.run_panels(hand_result())).axes[0]
    assert_allclose(line(axes, "power-0-typ").get_ydata(), TYP_DBM, atol=1e-12)
    assert_allclose(line(axes, "power-0-worst").get_ydata(), WORST_DBM, atol=1e-12)
    assert_allclose(line(axes, "power-0-typ").get_xdata(), [0, 1, 2, 3])
    assert_allclose(line(axes, "floor-0").get_ydata(), [FLOOR_DBM, FLOOR_DBM])
    assert_allclose(line(axes, "overload-0").get_ydata(), [OVERLOAD_DBM, OVERLOAD_DBM])
    assert [label.get_text() for label in axes.get_xticklabels()] == ["source", "trunk", "panel", "allowance"]
    assert "[dBm]" in axes.get_ylabel() and "1550 nm" in axes.get_title()


def test_power_levels_no_overload_line_without_overload():
    result = linkbudget.evaluate(linkbudget.load(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk")
                                                 .replace("  overload: -1 dBm\n", "")))
    axes = drawn(plots.run_panels(result)).axes[0]
    assert [item.get_gid() for item in axes.get_lines()] == ["power-0-typ", "power-0-worst", "floor-0"]


def test_lines_differ_without_colour():
    """Greyscale and colour-blind readers tell the lines apart by style and marker alone."""
    axes = drawn(plots.run_panels(hand_result())).axes[0]
    styles = {(item.get_linestyle(), item.get_marker()) for item in axes.get_lines()}
    assert len(styles) == len(axes.get_lines())


def test_single_wavelength_has_no_sweep_and_a_sweep_has_one():
    assert [panel.name for panel in plots.run_panels(hand_result())] == ["power along the chain"]
    sweep = plots.run_panels(hand_result("channels: [1310 nm, 1490 nm, 1550 nm]"))
    assert [panel.name for panel in sweep] == ["power along the chain", "margin against wavelength"]


def test_margin_sweep_lines_are_the_hand_summed_margins():
    axes = drawn(plots.run_panels(hand_result("channels: [1310 nm, 1490 nm, 1550 nm]"))).axes[1]
    typ, worst = line(axes, "margin-0-typ"), line(axes, "margin-0-worst")
    assert_allclose(typ.get_xdata(), [1310, 1490, 1550])
    assert_allclose(typ.get_ydata(), [TYP_DBM[-1] + 20.0] * 3, atol=1e-9)  # margin = received - sensitivity
    assert_allclose(worst.get_ydata(), [WORST_DBM[-1] + 20.0] * 3, atol=1e-9)
    assert_allclose(line(axes, "required-0").get_ydata(), [3.0, 3.0])
    assert axes.get_xlabel() == "wavelength [nm]" and "[dB]" in axes.get_ylabel()


def test_margin_histogram_counts_and_required_margin():
    margins_db = np.array([0.5, 0.6, 2.5, 2.9, 3.0, 3.5, 5.5, 5.7, 5.9])
    shown = plots.figure([plots.Panel("h", lambda axes: plots.draw_margin_histogram(
        axes, margins_db, 3.0, bins=[0, 1, 2, 4, 6]))])
    axes = shown.axes[0]
    bars = {container.get_label(): [(patch.get_x(), patch.get_height()) for patch in container]
            for container in axes.containers}
    # the edge 3 dB is added: bins [0,1) [1,2) [2,3) below; [3,4) [4,6] at or above (3.0 itself is not short)
    assert bars["draws below the required margin"] == [(0, 2), (1, 0), (2, 2)]
    assert bars["draws at or above the required margin"] == [(3, 2), (4, 3)]
    assert all(patch.get_hatch() == "//" for patch in axes.containers[1])
    assert_allclose(line(axes, "required").get_xdata(), [3.0, 3.0])
    assert "9 draws" in axes.get_title()


def test_user_names_are_never_math_markup():
    """A name matplotlib would read as (broken) mathematical markup is drawn as typed."""
    axes = drawn(plots.run_panels(hand_result(first="'$\\frac{cost$ fibre'"))).axes[0]
    assert axes.get_xticklabels()[1].get_text() == "\\$\\\\frac{cost\\$ fibre"


TAP = """\
  - name: tap
    kind: element
    loss: 0.5 dB
"""


def test_two_revisions_on_one_diagram():
    """Two results (a comparison) share one axis: a segment only the new one has sits in its place."""
    old = hand_result("channels: [1310 nm, 1550 nm]")
    text = HAND_LINK.format(axis="channels: [1310 nm, 1550 nm]", first="trunk")
    new = linkbudget.evaluate(linkbudget.load(text.replace("  - name: panel\n", TAP + "  - name: panel\n")))
    levels, sweep = drawn(plots.comparison_panels(old, new)).axes
    assert [label.get_text() for label in levels.get_xticklabels()] == ["source", "trunk", "tap", "panel", "allowance"]
    assert_allclose(line(levels, "power-0-worst").get_xdata(), [0, 1, 3, 4])
    assert_allclose(line(levels, "power-0-worst").get_ydata(), WORST_DBM, atol=1e-12)
    new_worst = WORST_DBM[:2] + [value - 0.5 for value in [WORST_DBM[1], *WORST_DBM[2:]]]
    assert_allclose(line(levels, "power-1-worst").get_xdata(), [0, 1, 2, 3, 4])
    assert_allclose(line(levels, "power-1-worst").get_ydata(), new_worst, atol=1e-12)
    legend = [entry.get_text() for entry in levels.get_legend().get_texts()]
    assert "old: worst case" in legend and "new: worst case" in legend
    # limits both revisions share are drawn once, unnamed
    assert "sensitivity + required margin (-17.00 dBm)" in legend and "receiver overload (-1.00 dBm)" in legend
    assert not [found for found in levels.get_lines() if found.get_gid() in ("floor-1", "overload-1")]
    assert_allclose(line(sweep, "margin-1-worst").get_ydata(), [new_worst[-1] + 20.0] * 2, atol=1e-9)
    # the second revision's lines differ from the first's without colour: hollow markers, thinner line
    looks = [(found.get_markerfacecolor(), found.get_linewidth())
             for found in (line(levels, "power-0-worst"), line(levels, "power-1-worst"))]
    assert looks[0] != looks[1]


def test_limits_that_differ_between_revisions_are_drawn_for_each():
    old = hand_result()
    new = linkbudget.evaluate(linkbudget.load(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk")
                                              .replace("required_margin: 3 dB", "required_margin: 4.5 dB")))
    axes = drawn(plots.comparison_panels(old, new)).axes[0]
    assert_allclose(line(axes, "floor-0").get_ydata(), [FLOOR_DBM] * 2)
    assert_allclose(line(axes, "floor-1").get_ydata(), [-20.0 + 4.5] * 2)
    legend = [entry.get_text() for entry in axes.get_legend().get_texts()]
    assert "new: sensitivity + required margin (-15.50 dBm)" in legend and "receiver overload (-1.00 dBm)" in legend


def test_total_internal_reflection_is_marked_where_the_light_stops():
    """A face past the critical angle (fibre n = 1.45 into n = 1.0 at 60 degrees; arcsin(1/1.45) = 43.6
    degrees, Snell's law) passes no light: the line stops and a vertical mark names the face."""
    from tests.report.test_finite import link_text

    result = linkbudget.evaluate(linkbudget.load(link_text(index="1.0", extra="    angle: 60 deg\n")))
    axes = drawn(plots.run_panels(result)).axes[0]
    powers = line(axes, "power-0-worst").get_ydata()
    first_dark = int(np.flatnonzero(np.isneginf(powers))[0])
    assert np.isfinite(powers[:first_dark]).all() and first_dark >= 1
    assert_allclose(line(axes, "blocked-0").get_xdata(), [first_dark, first_dark])
    name = axes.get_xticklabels()[first_dark].get_text()
    legend = [entry.get_text() for entry in axes.get_legend().get_texts()]
    assert f"total internal reflection at {name}: no light past it" in legend and name == "lead → slab"


def test_chain_positions_keeps_removed_names():
    axis, positions = plots.chain_positions([("source", "a", "gone", "b"), ("source", "a", "b", "new")])
    assert axis == ["source", "a", "gone", "b", "new"]
    assert [list(p) for p in positions] == [[0, 1, 2, 3], [0, 1, 3, 4]]
    # a segment moved along the chain keeps one place (its old one); the new line visits it out of order
    axis, positions = plots.chain_positions([("source", "a", "b", "c"), ("source", "c", "a", "b")])
    assert axis == ["source", "a", "b", "c"]
    assert [list(p) for p in positions] == [[0, 1, 2, 3], [0, 3, 1, 2]]


def test_png_and_svg_bytes():
    shown = plots.figure(plots.run_panels(hand_result()))
    assert plots.plot_bytes(shown, "png").startswith(b"\x89PNG\r\n\x1a\n")
    svg = plots.inline_svg(plots.figure(plots.run_panels(hand_result())), salt="one")
    assert svg.startswith("<svg") and svg.rstrip().endswith("</svg>") and "<metadata>" not in svg
    again = plots.inline_svg(plots.figure(plots.run_panels(hand_result())), salt="one")
    assert again == svg  # reproducible: no date, ids from the salt


# --- the command line -----------------------------------------------------------------------------

@pytest.mark.parametrize("suffix, magic", [(".png", b"\x89PNG"), (".svg", b"<?xml")])
def test_run_plot_writes_the_file(cli, write_link, tmp_path, suffix, magic):
    link = write_link(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk"))
    picture = tmp_path / f"budget{suffix}"
    result = cli("run", link, "--plot", picture)
    assert result.exit_code == 0, result.output  # worst margin 12.05 >= 3 dB; best -4.3 <= -1 dBm
    assert picture.read_bytes().startswith(magic)
    assert "CLOSES" in result.stdout


def test_run_plot_keeps_an_existing_file_without_force(cli, write_link, tmp_path):
    link = write_link(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk"))
    picture = tmp_path / "budget.png"
    picture.write_bytes(b"mine")
    result = cli("run", link, "--plot", picture)
    assert result.exit_code == 2 and "pass --force" in result.stderr
    assert picture.read_bytes() == b"mine"
    assert cli("run", link, "--plot", picture, "--force").exit_code == 0
    assert picture.read_bytes().startswith(b"\x89PNG")


@pytest.mark.parametrize("name", ["budget.pdf", "budget"])
def test_run_plot_other_suffix_is_an_input_error(cli, write_link, tmp_path, name):
    link = write_link(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk"))
    result = cli("run", link, "--plot", tmp_path / name)
    assert result.exit_code == 2 and ".png or .svg" in result.stderr
    assert not (tmp_path / name).exists()


def test_run_plot_and_output_one_file_is_an_input_error(cli, write_link, tmp_path):
    link = write_link(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk"))
    result = cli("run", link, "--plot", tmp_path / "x.svg", "-o", tmp_path / "x.svg")
    assert result.exit_code == 2 and "same file" in result.stderr
    assert not (tmp_path / "x.svg").exists()


#: Runs the command line with matplotlib made unimportable, as without the plot extra.
WITHOUT_MATPLOTLIB = ("import sys; sys.modules['matplotlib'] = None; sys.argv = ['linkbudget', *sys.argv[1:]]; "
                      "from linkbudget.cli import main; main()")


def test_run_plot_without_the_extra_is_one_clear_line(write_link, tmp_path):
    link = write_link(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk"))
    done = subprocess.run([sys.executable, "-c", WITHOUT_MATPLOTLIB, "run", str(link), "--plot",
                           str(tmp_path / "x.png")], capture_output=True, text=True, timeout=120)
    assert done.returncode == 2
    assert done.stderr.strip() == '--plot: plots need matplotlib: pip install "linkbudget[plot]"'
    assert done.stdout == "" and not (tmp_path / "x.png").exists()


@pytest.mark.parametrize("extra", [[], ["--format", "markdown"], ["--format", "json"]])
def test_run_without_a_plot_never_imports_matplotlib(write_link, extra):
    """DESIGN.md: heavy modules only in the commands that need them; matplotlib only for a plot."""
    link = write_link(HAND_LINK.format(axis="wavelength: 1550 nm", first="trunk"))
    code = ("import sys, atexit; atexit.register(lambda: sys.stderr.write('loaded:' + str('matplotlib' in "
            "sys.modules))); sys.argv = ['linkbudget', *sys.argv[1:]]; from linkbudget.cli import main; main()")
    done = subprocess.run([sys.executable, "-c", code, "run", str(link), *extra], capture_output=True, text=True,
                          timeout=120)
    assert done.returncode == 0, done.stderr
    assert done.stderr.endswith("loaded:False")
