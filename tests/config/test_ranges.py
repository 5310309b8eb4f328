"""Valid ranges (README, "Valid ranges"): impossible input is refused with the range and its reason,
possible but unusual input is accepted with a note on its row.

Each impossible case is a small edit of the minimal link of ``tests/conftest.py``; ``at`` marks the
expected place with ``|`` as in ``tests/config/test_bad_input.py``. Every case's phrase is the
start of the message that states the range (``<quantity> must be <range>``), so a refusal that did
not name its range fails.
"""

from pathlib import Path

import pytest

import linkbudget
from linkbudget.config import ranges
from linkbudget.config.source import format_key_path
from tests.config.test_bad_input import Case, append, edit, expected_mark


def extra(*lines):
    """The minimal link with a third chain item ``extra`` made of ``lines`` (its keys)."""
    return append("  - name: extra\n" + "".join(f"    {line}\n" for line in lines))


def refused(case_id, text, at, path, phrase):
    return Case(case_id, text, at, path, (phrase,))


FIBER_NA = ("length: 2 km", "length: 2 km\n    core_diameter: 8 um\n    numerical_aperture: ")
WAVE = "wavelength must be from 100 nm to 100000 nm"
DIELECTRIC = "this index must be a dielectric's, n from 1 to 10"
ANY_INDEX = "an index must be a dielectric's"
JOINT = "joint loss must be from 0 dB to 60 dB"
MFD = "mode field diameter must be from 0.1 um to 1000 um"
SMALL_MODE = "a mode field diameter must be at least 0.1 of the wavelength"
TILT = "tilt must be >= 0 deg and < 90 deg"
MEDIUM = ("kind: medium", "thickness: 1 mm")
GAP = ("kind: gap", "length: 1 m")
GUIDE = ("kind: waveguide", "length: 1 mm", "attenuation: 2 dB/cm")
BULK = "bulk attenuation must be from 0 dB/um to 1 dB/um"


def layers(count):
    return "layers: [" + ", ".join(["{index: 1.5, thickness: 100 nm}"] * count) + "]"


IMPOSSIBLE = [
    # top level
    refused("wavelength-50nm", edit("wavelength: 1310 nm", "wavelength: 50 nm"), "wavelength: |50 nm", "wavelength", WAVE),
    refused("channel-1mm", edit("wavelength: 1310 nm", "channels: [1310 nm, 1 mm]"), "|1 mm]", "channels[1]", WAVE),
    refused("band-from-50nm", edit("wavelength: 1310 nm", "band: {from: 50 nm, to: 1600 nm, step: 10 nm}"),
            "from: |50 nm", "band.from", WAVE),
    refused("band-to-200um", edit("wavelength: 1310 nm", "band: {from: 1500 nm, to: 200 um, step: 10 nm}"),
            "to: |200 um", "band.to", WAVE),
    refused("band-step-beyond-span", edit("wavelength: 1310 nm", "band: {from: 1500 nm, to: 1600 nm, step: 200 nm}"),
            "step: |200 nm", "band.step", "band step must be > 0 nm"),
    refused("band-step-zero", edit("wavelength: 1310 nm", "band: {from: 1500 nm, to: 1600 nm, step: 0 nm}"),
            "step: |0 nm", "band.step", "band step must be > 0 nm"),
    refused("source-1000dBm", edit("power: 0 dBm", "power: 1000 dBm"), "power: |1000 dBm", "source.power",
            "source power must be from -100 dBm to 70 dBm"),
    refused("source-1GW", edit("power: 0 dBm", "power: 1e9 W"), "power: |1e9 W", "source.power",
            "source power must be from -100 dBm to 70 dBm"),
    refused("source-sigma-beyond", edit("power: 0 dBm", "power: {mean: 0 dBm, sigma: 30 dB}"), "sigma: |30 dB",
            "source.power.sigma", "mean + 3 sigma must stay within the range of the source power, from -100 dBm"),
    refused("back-reflection-tolerance-positive", edit("power: 0 dBm", "power: 0 dBm\n  max_back_reflection: 3 dB"),
            "max_back_reflection: |3 dB", "source.max_back_reflection",
            "back-reflection tolerance must be from -100 dB to 0 dB"),
    refused("spectral-width-zero", edit("power: 0 dBm", "power: 0 dBm\n  spectral_width: 0 nm"),
            "spectral_width: |0 nm", "source.spectral_width", "spectral width must be > 0 nm"),
    refused("spectral-width-2um", edit("power: 0 dBm", "power: 0 dBm\n  spectral_width: 2 um"),
            "spectral_width: |2 um", "source.spectral_width", "spectral width must be > 0 nm and <= 1000 nm"),
    refused("sensitivity-minus-1000dBm", edit("sensitivity: -30 dBm", "sensitivity: -1000 dBm"),
            "sensitivity: |-1000 dBm", "receiver.sensitivity", "receiver power must be from -150 dBm to 40 dBm"),
    refused("overload-100dBm", edit("sensitivity: -30 dBm", "sensitivity: -30 dBm\n  overload: 100 dBm"),
            "overload: |100 dBm", "receiver.overload", "receiver power must be from -150 dBm to 40 dBm"),
    refused("overload-below-sensitivity", edit("sensitivity: -30 dBm", "sensitivity: -30 dBm\n  overload: -40 dBm"),
            "overload: |-40 dBm", "receiver.overload", "overload must be above sensitivity"),
    refused("margin-negative", edit("sensitivity: -30 dBm", "sensitivity: -30 dBm\n  required_margin: -3 dB"),
            "required_margin: |-3 dB", "receiver.required_margin", "required margin must be from 0 dB to 60 dB"),
    refused("margin-100dB", edit("sensitivity: -30 dBm", "sensitivity: -30 dBm\n  required_margin: 100 dB"),
            "required_margin: |100 dB", "receiver.required_margin", "required margin must be from 0 dB to 60 dB"),
    refused("trials-1", append("statistics: {trials: 1}\n"), "trials: |1}", "statistics.trials",
            "trial count must be from 2 to 1e+09"),
    refused("seed-negative", append("statistics: {trials: 10, seed: -1}\n"), "seed: |-1}", "statistics.seed",
            "seed must be >= 0"),
    # fiber (chain[0])
    refused("fiber-1e12km", edit("length: 2 km", "length: 1e12 km"), "length: |1e12 km", "chain[0].length",
            "fibre length must be from 0 km to 40000 km"),
    refused("fiber-attenuation-50dB/m", edit("attenuation: 0.5 dB/km", "attenuation: 50 dB/m"),
            "attenuation: |50 dB/m", "chain[0].attenuation", "fibre attenuation must be from 0 dB/km to 10000 dB/km"),
    refused("fiber-attenuation-negative", edit("attenuation: 0.5 dB/km", "attenuation: -0.5 dB/km"),
            "attenuation: |-0.5 dB/km", "chain[0].attenuation", "fibre attenuation must be from 0 dB/km"),
    refused("fiber-index-below-1", edit("length: 2 km", "length: 2 km\n    index: 0.9"), "index: |0.9",
            "chain[0].index", DIELECTRIC),
    refused("fiber-index-1e200", edit("length: 2 km", "length: 2 km\n    index: 1e200"), "index: |1e200",
            "chain[0].index", DIELECTRIC),
    refused("na-1.5", edit(FIBER_NA[0], FIBER_NA[1] + "1.5"), "numerical_aperture: |1.5",
            "chain[0].numerical_aperture", "numerical aperture must be > 0 and <= 1"),
    refused("na-50", edit(FIBER_NA[0], FIBER_NA[1] + "50"), "numerical_aperture: |50",
            "chain[0].numerical_aperture", "numerical aperture must be > 0 and <= 1"),
    refused("na-above-core-index", edit(FIBER_NA[0], FIBER_NA[1] + "1\n    index: 1"),
            "numerical_aperture: |1\n", "chain[0].numerical_aperture", "numerical aperture must be below the core index"),
    refused("core-1nm", edit(FIBER_NA[0], FIBER_NA[1].replace("8 um", "1 nm") + "0.1"), "core_diameter: |1 nm",
            "chain[0].core_diameter", "core diameter must be from 0.5 um to 2000 um"),
    refused("fiber-mfd-1nm", edit("length: 2 km", "length: 2 km\n    mode_field_diameter: 1 nm"),
            "mode_field_diameter: |1 nm", "chain[0].mode_field_diameter", MFD),
    refused("fiber-mfd-1km", edit("length: 2 km", "length: 2 km\n    mode_field_diameter: 1 km"),
            "mode_field_diameter: |1 km", "chain[0].mode_field_diameter", MFD),
    refused("fiber-mfd-below-wavelength", edit("length: 2 km", "length: 2 km\n    mode_field_diameter: 0.12 um"),
            "mode_field_diameter: |0.12 um", "chain[0].mode_field_diameter", SMALL_MODE),
    # connector (chain[1])
    refused("connector-minus-1000dB", edit("loss: 0.5 dB", "loss: -1000 dB"), "loss: |-1000 dB", "chain[1].loss", JOINT),
    refused("connector-100dB", edit("loss: 0.5 dB", "loss: 100 dB"), "loss: |100 dB", "chain[1].loss", JOINT),
    refused("connector-sigma-beyond", edit("loss: 0.5 dB", "loss: {mean: 59 dB, sigma: 1 dB}"), "sigma: |1 dB",
            "chain[1].loss.sigma", "mean + 3 sigma must stay within the range of the joint loss, from 0 dB to 60 dB"),
    refused("tilt-90deg", edit("loss: 0.5 dB", "loss: 0.5 dB\n    tilt: 90 deg"), "tilt: |90 deg", "chain[1].tilt", TILT),
    refused("tilt-180deg", edit("loss: 0.5 dB", "loss: 0.5 dB\n    tilt: 180 deg"), "tilt: |180 deg", "chain[1].tilt", TILT),
    refused("tilt-1e6deg", edit("loss: 0.5 dB", "loss: 0.5 dB\n    tilt: 1e6 deg"), "tilt: |1e6 deg", "chain[1].tilt", TILT),
    refused("offset-2m", edit("loss: 0.5 dB", "loss: 0.5 dB\n    offset: 2 m"), "offset: |2 m", "chain[1].offset",
            "offset must be from 0 mm to 1000 mm"),
    refused("joint-gap-5m", edit("loss: 0.5 dB", "loss: 0.5 dB\n    gap: 5 m"), "gap: |5 m", "chain[1].gap",
            "joint gap must be from 0 mm to 1000 mm"),
    refused("gap-index-below-1", edit("loss: 0.5 dB", "loss: 0.5 dB\n    gap: 1 um\n    gap_index: 0.5"),
            "gap_index: |0.5", "chain[1].gap_index", DIELECTRIC),
    refused("gap-index-1e300j", edit("loss: 0.5 dB", "loss: 0.5 dB\n    gap: 1 um\n    gap_index: 1.5+1e300j"),
            "gap_index: |1.5+1e300j", "chain[1].gap_index", DIELECTRIC),
    refused("mfd-before-1nm", edit("loss: 0.5 dB", "loss: 0.5 dB\n    mode_field_diameter_before: 1 nm"),
            "mode_field_diameter_before: |1 nm", "chain[1].mode_field_diameter_before", MFD),
    refused("mfd-after-1km", edit("loss: 0.5 dB", "loss: 0.5 dB\n    mode_field_diameter_after: 1 km"),
            "mode_field_diameter_after: |1 km", "chain[1].mode_field_diameter_after", MFD),
    refused("mfd-after-below-wavelength", edit("loss: 0.5 dB", "loss: 0.5 dB\n    mode_field_diameter_after: 0.12 um"),
            "mode_field_diameter_after: |0.12 um", "chain[1].mode_field_diameter_after", SMALL_MODE),
    refused("return-loss-negative", edit("loss: 0.5 dB", "loss: 0.5 dB\n    return_loss: -5 dB"),
            "return_loss: |-5 dB", "chain[1].return_loss", "return loss must be from 0 dB to 100 dB"),
    refused("return-loss-200dB", edit("loss: 0.5 dB", "loss: 0.5 dB\n    return_loss: 200 dB"),
            "return_loss: |200 dB", "chain[1].return_loss", "return loss must be from 0 dB to 100 dB"),
    # splice, element
    refused("splice-count-0", extra("kind: splice", "loss: 0.1 dB", "count: 0"), "count: |0", "chain[2].count",
            "splice count must be from 1 to 10000"),
    refused("splice-count-1e6", extra("kind: splice", "loss: 0.1 dB", "count: 1000000"), "count: |1000000",
            "chain[2].count", "splice count must be from 1 to 10000"),
    refused("connector-count-2000", extra("kind: connector", "loss: 0.3 dB", "count: 2000"), "count: |2000",
            "chain[2].count", "connector count must be from 1 to 1000"),
    refused("splice-70dB", extra("kind: splice", "loss: 70 dB"), "loss: |70 dB", "chain[2].loss", JOINT),
    refused("element-minus-1000dB", extra("kind: element", "loss: -1000 dB"), "loss: |-1000 dB", "chain[2].loss",
            "element loss must be from -60 dB to 100 dB"),
    refused("element-500dB", extra("kind: element", "loss: 500 dB"), "loss: |500 dB", "chain[2].loss",
            "element loss must be from -60 dB to 100 dB"),
    # medium
    refused("medium-zero-thickness", extra("kind: medium", "thickness: 0 mm", "index: 1.5"), "thickness: |0 mm",
            "chain[2].thickness", "medium thickness must be > 0 m and <= 1000 m"),
    refused("medium-10km", extra("kind: medium", "length: 10 km", "index: 1.5"), "length: |10 km",
            "chain[2].length", "medium thickness must be > 0 m and <= 1000 m"),
    refused("medium-dielectric-below-1", extra(*MEDIUM, "index: 0.5"), "index: |0.5", "chain[2].index", ANY_INDEX),
    refused("medium-index-1e200", extra(*MEDIUM, "index: 1e200"), "index: |1e200", "chain[2].index", ANY_INDEX),
    refused("medium-index-1e300j", extra(*MEDIUM, "index: 1.5+1e300j"), "index: |1.5+1e300j", "chain[2].index",
            ANY_INDEX),
    refused("medium-kappa-500", extra(*MEDIUM, "kappa: 500"), "kappa: |500", "chain[2].kappa",
            "extinction coefficient must be from 0 to 200"),
    refused("medium-absorption-1e12", extra(*MEDIUM, "absorption: 1e12 /m"), "absorption: |1e12 /m",
            "chain[2].absorption", "absorption coefficient must be from 0 /m to 1e+09 /m"),
    refused("medium-attenuation-10dB/um", extra(*MEDIUM, "attenuation: 10 dB/um"), "attenuation: |10 dB/um",
            "chain[2].attenuation", BULK),
    refused("medium-angle-89.5deg", extra(*MEDIUM, "index: 1.5", "angle: 89.5 deg"), "angle: |89.5 deg",
            "chain[2].angle", "angle of incidence must be from 0 deg to 89 deg"),
    # coating
    refused("coating-600-layers", extra("kind: coating", layers(600)), "layers: |[{index: 1.5, thickness: 100 nm}, {", "chain[2].layers",
            "layer count must be from 1 to 500"),
    refused("coating-no-layers", extra("kind: coating", "layers: []"), "layers: |[]", "chain[2].layers",
            "layer count must be from 1 to 500"),
    refused("layer-zero-thickness", extra("kind: coating", "layers: [{index: 1.38, thickness: 0 nm}]"),
            "thickness: |0 nm", "chain[2].layers[0].thickness", "layer thickness must be > 0 nm"),
    refused("layer-1mm", extra("kind: coating", "layers: [{index: 1.38, thickness: 1 mm}]"),
            "thickness: |1 mm}", "chain[2].layers[0].thickness", "layer thickness must be > 0 nm and <= 100000 nm"),
    refused("layer-index-50", extra("kind: coating", "layers: [{index: 50, thickness: 100 nm}]"),
            "index: |50,", "chain[2].layers[0].index", ANY_INDEX),
    refused("quarter-wave-10nm", extra("kind: coating", "layers: [{index: 1.38, quarter_wave: 10 nm}]"),
            "quarter_wave: |10 nm", "chain[2].layers[0].quarter_wave", WAVE),
    refused("quarter-waves-1000",
            extra("kind: coating", "layers: [{index: 1.38, quarter_wave: 1310 nm, quarter_waves: 1000}]"),
            "quarter_waves: |1000", "chain[2].layers[0].quarter_waves", "quarter-wave count must be from 1 to 100"),
    # gap
    refused("gap-1e9km", extra("kind: gap", "length: 1e9 km"), "length: |1e9 km", "chain[2].length",
            "gap length must be from 0 km to 400000 km"),
    refused("gap-visibility-1mm", extra(*GAP, "visibility: 1 mm"), "visibility: |1 mm", "chain[2].visibility",
            "visibility must be from 0.001 km to 1000 km"),
    refused("divergence-180deg", extra(*GAP, "beam: {divergence: 180 deg}", "aperture: 10 mm"),
            "divergence: |180 deg", "chain[2].beam.divergence", "beam divergence must be > 0 deg and < 90 deg"),
    refused("waist-1nm", extra(*GAP, "beam: {waist: 1 nm}", "aperture: 10 mm"), "waist: |1 nm",
            "chain[2].beam.waist", "beam waist must be from 5e-05 mm to 1000 mm"),
    refused("waist-below-wavelength", extra(*GAP, "beam: {waist: 0.06 um}", "aperture: 10 mm"), "waist: |0.06 um",
            "chain[2].beam.waist", SMALL_MODE),
    refused("waist-diameter-3m", extra(*GAP, "beam: {waist_diameter: 3 m}", "aperture: 10 mm"),
            "waist_diameter: |3 m", "chain[2].beam.waist_diameter",
            "beam waist diameter must be from 0.0001 mm to 2000 mm"),
    refused("waist-diameter-below-wavelength", extra(*GAP, "beam: {waist_diameter: 0.12 um}", "aperture: 10 mm"),
            "waist_diameter: |0.12 um", "chain[2].beam.waist_diameter", SMALL_MODE),
    refused("aperture-100m", extra(*GAP, "aperture: 100 m"), "aperture: |100 m", "chain[2].aperture",
            "aperture diameter must be > 0 mm and <= 10000 mm"),
    refused("gap-tilt-90deg", extra(*GAP, "tilt: 90 deg"), "tilt: |90 deg", "chain[2].tilt", TILT),
    refused("gap-offset-5m", extra(*GAP, "offset: 5 m"), "offset: |5 m", "chain[2].offset",
            "offset must be from 0 mm to 1000 mm"),
    refused("gap-index-0.9", extra(*GAP, "index: 0.9"), "index: |0.9", "chain[2].index", DIELECTRIC),
    refused("gap-kappa-negative", extra(*GAP, "kappa: -1"), "kappa: |-1", "chain[2].kappa",
            "extinction coefficient must be from 0 to 200"),
    refused("gap-attenuation-10dB/um", extra(*GAP, "attenuation: 10 dB/um"), "attenuation: |10 dB/um",
            "chain[2].attenuation", BULK),
    refused("gap-absorption-negative", extra(*GAP, "absorption: -1 /m"), "absorption: |-1 /m", "chain[2].absorption",
            "absorption coefficient must be from 0 /m"),
    # waveguide
    refused("waveguide-20m", extra("kind: waveguide", "length: 20 m", "attenuation: 2 dB/cm"), "length: |20 m",
            "chain[2].length", "waveguide length must be from 0 mm to 10000 mm"),
    refused("waveguide-1000dB/cm", extra("kind: waveguide", "length: 1 mm", "attenuation: 1000 dB/cm"),
            "attenuation: |1000 dB/cm", "chain[2].attenuation", "waveguide attenuation must be from 0 dB/cm to 100 dB/cm"),
    refused("effective-index-0.8", extra("kind: waveguide", "length: 1 mm", "effective_index: 0.8"),
            "effective_index: |0.8", "chain[2].effective_index", DIELECTRIC),
    refused("effective-index-1e300j", extra("kind: waveguide", "length: 1 mm", "effective_index: 1.5+1e300j"),
            "effective_index: |1.5+1e300j", "chain[2].effective_index", DIELECTRIC),
    refused("waveguide-index-0.5", extra(*GUIDE, "index: 0.5"), "index: |0.5", "chain[2].index", DIELECTRIC),
    refused("bends-1e6", extra(*GUIDE, "bends: {count: 1000000, loss: 0.01 dB}"), "count: |1000000",
            "chain[2].bends.count", "feature count must be from 0 to 100000"),
    refused("crossings-100dB", extra(*GUIDE, "crossings: {count: 2, loss: 100 dB}"), "loss: |100 dB",
            "chain[2].crossings.loss", JOINT),
    refused("bend-loss-negative", extra(*GUIDE, "bends: {count: 2, loss: -1 dB}"), "loss: |-1 dB",
            "chain[2].bends.loss", JOINT),
    refused("mode-width-1nm", extra(*GUIDE, "mode_size: {width: 1 nm, height: 2 um}"), "width: |1 nm",
            "chain[2].mode_size.width", MFD),
    refused("mode-height-1km", extra(*GUIDE, "mode_size: {width: 2 um, height: 1 km}"), "height: |1 km",
            "chain[2].mode_size.height", MFD),
    refused("waveguide-mfd-below-wavelength", extra(*GUIDE, "mode_field_diameter: 0.12 um"),
            "mode_field_diameter: |0.12 um", "chain[2].mode_field_diameter", SMALL_MODE),
    # splitter
    refused("splitter-1-port", extra("kind: splitter", "ports: 1"), "ports: |1", "chain[2].ports",
            "splitter ports must be from 2 to 1024"),
    refused("splitter-1e9-ports", extra("kind: splitter", "ports: 1000000000"), "ports: |1000000000", "chain[2].ports",
            "splitter ports must be from 2 to 1024"),
    refused("tap-1e-300", extra("kind: splitter", "ratio: 1e-300"), "ratio: |1e-300", "chain[2].ratio",
            "port share must be from 1e-06 to 1"),
    refused("tap-1-to-1e9", extra("kind: splitter", "ratio: 1/1000000000"), "ratio: |1/1000000000", "chain[2].ratio",
            "port share must be from 1e-06 to 1"),
    refused("splitter-port-2000", extra("kind: splitter", "ratio: 2/98", "port: 2000"), "port: |2000",
            "chain[2].port", "splitter port must be from 1 to 1024"),
    refused("excess-100dB", extra("kind: splitter", "ports: 4", "excess_loss: 100 dB"), "excess_loss: |100 dB",
            "chain[2].excess_loss", "excess loss must be from 0 dB to 60 dB"),
]


def test_impossible_table_covers_every_range_and_key():
    assert len(IMPOSSIBLE) >= 60
    phrases = " ".join(case.phrases[0] for case in IMPOSSIBLE)
    untested = [what for what in ranges.RANGES if what not in phrases and what != "sigma"]
    assert untested == ["splitter port"] or untested == [], untested


@pytest.mark.parametrize("case", IMPOSSIBLE, ids=[case.id for case in IMPOSSIBLE])
def test_load_impossible_value_refused_with_its_range(case):
    with pytest.raises(linkbudget.ConfigError) as caught:
        linkbudget.load(case.text)  # no budget: nothing past the loader runs
    line, column = expected_mark(case.text, case.at)
    placed = {(p.mark.line, p.mark.column, format_key_path(p.path)): p for p in caught.value.problems}
    assert (line, column, case.path) in placed, str(caught.value)
    problem = placed[(line, column, case.path)]
    assert case.phrases[0] in f"{problem.message} {problem.hint or ''}", problem.message


@pytest.mark.parametrize("case", IMPOSSIBLE[::10], ids=[case.id for case in IMPOSSIBLE[::10]])
def test_run_impossible_value_exits_2_without_budget(case, write_link, cli):
    path = write_link(case.text)
    result = cli("run", path)
    assert result.exit_code == 2 and result.stdout == ""
    line, column = expected_mark(case.text, case.at)
    assert f"{path}:{line}:{column}: {case.path}: " in result.stderr


COATED = ("  - {name: air, kind: gap, length: 1 mm}\n"
          "  - {name: mirror coat, kind: coating, layers: [{index: 0.1+5j, thickness: 50 nm}]}\n"
          "  - {name: plate, kind: medium, thickness: 1 mm, index: 1.5}\n")

UNUSUAL = [
    ("source-25dBm", edit("power: 0 dBm", "power: 25 dBm"), "source: power: source power 25 dBm is above 20 dBm"),
    ("sensitivity-90dBm", edit("sensitivity: -30 dBm", "sensitivity: -90 dBm"),
     "receiver: sensitivity: receiver power -90 dBm is below -80 dBm"),
    ("element-gain", extra("kind: element", "loss: -10 dB"), "extra: loss: element loss -10 dB is below 0 dB: an element with gain"),
    ("gap-100km", extra("kind: gap", "length: 100 km"), "extra: length: gap length 100 km is above 10 km"),
    ("fiber-500km", edit("length: 2 km", "length: 500 km"), "trunk: length: fibre length 500 km is above 300 km"),
    ("connector-clipped-at-0", edit("loss: 0.5 dB", "loss: {mean: 0.1 dB, sigma: 0.1 dB}"),
     "panel: loss: joint loss mean - 3 sigma = -0.2 dB is below 0 dB; the low end is taken at 0 dB"),
    ("divergence-20deg", extra("kind: gap", "length: 1 m", "beam: {divergence: 20 deg}", "aperture: 10 mm"),
     "extra: beam.divergence: beam divergence 20 deg is above 15 deg"),
    ("metal-index-medium", extra("kind: medium", "thickness: 10 nm", "index: 0.5+3j"),
     "extra: index n down to 0.5, kappa up to 3: a metal"),
    ("catalog-gold", extra("kind: medium", "thickness: 10 nm", "material: gold"), "extra: index n down to 0."),
    ("metal-layer", append(COATED), "mirror coat: layers[0]: index n down to 0.1, kappa up to 5: a metal"),
]


@pytest.mark.parametrize(("text", "note"), [case[1:] for case in UNUSUAL], ids=[case[0] for case in UNUSUAL])
def test_evaluate_unusual_value_accepted_with_note(text, note):
    result = linkbudget.evaluate(linkbudget.load(text))
    assert any(found.startswith(note) for found in result.notes), result.notes


def test_evaluate_usual_link_has_no_range_notes(minimal_link):
    assert linkbudget.evaluate(linkbudget.load(minimal_link)).notes == ()


def test_readme_documents_every_range():
    readme = (Path(__file__).resolve().parents[2] / "README.md").read_text(encoding="utf-8")
    assert ranges.markdown_table() in readme
