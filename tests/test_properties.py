"""Invariants of the budget engine and the input layer, checked with hypothesis.

Outside sources: the additivity of losses in decibels and the dBm scale follow from the
definitions of IEC 60027-3 (the decibel as 10·log10 of a power ratio; dBm referred to 1 mW); the
spread rules (worst case at the end that hurts, ``{mean, sigma}`` spanning ±3σ, clipped at a
physical bound) and the unit table are README.md's config reference, re-stated here rather than
imported; the equivalence of κ, α and dB per length is the lossy-medium flux law
α = 4πκ/λ, loss = 10·log10(e)·α·L (Born & Wolf, "Principles of Optics", 7th ed., 1999; Hecht,
"Optics", 5th ed., 2017).

Tolerances: unless a test says otherwise, values pass through a decimal round trip (``repr``,
exact) and a handful of float multiplications and additions of numbers below 1e5, so they agree
to a relative 1e-12; ``SUM_ATOL`` allows for the cancellation in a sum of losses and gains that
nets to near zero.
"""

import math

import numpy as np
import pytest
import yaml
from hypothesis import given, settings
from hypothesis import strategies as st
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.physics import flux
from tests.conftest import run_cli

ROUNDING = 1e-12
# A chain sums at most a few dozen terms below ~100 dB each: 1e-9 dB of absolute rounding.
SUM_ATOL = 1e-9

PROPERTY = settings(max_examples=60, derandomize=True, deadline=None)
FUZZ = settings(max_examples=100, derandomize=True, deadline=None)

SENSITIVITY_DBM = -60.0
AXES = [
    {"wavelength": "1310 nm"},
    {"channels": ["1271 nm", "1291 nm", "1311 nm"]},
    {"band": {"from": "1500 nm", "to": "1600 nm", "step": "25 nm"}},
]
CASES = ("typ", "worst", "best")


def q(value, unit):
    """A quantity string (``repr`` keeps every digit of the float); a bare number if ``unit`` is None."""
    return value if unit is None else f"{value!r} {unit}"


def link_text(chain, *, power="0 dBm", axis=AXES[0]):
    data = {"title": "property link", **axis, "source": {"power": power},
            "receiver": {"sensitivity": q(SENSITIVITY_DBM, "dBm")}, "chain": chain}
    return yaml.safe_dump(data, sort_keys=False, allow_unicode=True)


def evaluate(chain, **options):
    return linkbudget.evaluate(linkbudget.load(link_text(chain, **options)))


def row_loss(result, name):
    """case -> loss of the row called ``name`` over the wavelengths."""
    (index,) = [number for number, row in enumerate(result.rows) if row.name == name]
    return {case: result.loss_db[case][index] for case in CASES}


# --- strategies ------------------------------------------------------------------------------

@st.composite
def spreads(draw, low, high, unit, *, bound=None, sigma_unit=None):
    """A value written in one of README's spread forms, and its (best-end, typ, worst-end) values.

    ``bound`` is the physical lower bound a ``{mean, sigma}`` spread's low end is clipped to;
    ``unit=None`` writes bare numbers (κ).
    """
    a, b, c = sorted(draw(st.lists(st.floats(low, high), min_size=3, max_size=3)))
    form = draw(st.sampled_from(["one", "typ-max", "min-typ-max", "min-max", "mean-sigma"]))
    if form == "one":
        return q(b, unit), (b, b, b)
    if form == "typ-max":
        return {"typ": q(b, unit), "max": q(c, unit)}, (b, b, c)
    if form == "min-typ-max":
        return {"min": q(a, unit), "typ": q(b, unit), "max": q(c, unit)}, (a, b, c)
    if form == "min-max":
        return {"min": q(a, unit), "max": q(c, unit)}, (a, 0.5 * (a + c), c)
    sigma = (c - b) / 3.0
    low_end = b - 3.0 * sigma if bound is None else max(b - 3.0 * sigma, bound)
    return {"mean": q(b, unit), "sigma": q(sigma, sigma_unit or unit)}, (low_end, b, b + 3.0 * sigma)


@st.composite
def fibers(draw):
    length, (l_low, l_typ, l_high) = draw(spreads(0.0, 50.0, "km", bound=0.0))
    attenuation, (a_low, a_typ, a_high) = draw(spreads(0.0, 1.0, "dB/km", bound=0.0))
    return {"kind": "fiber", "length": length, "attenuation": attenuation}, (
        l_low * a_low, l_typ * a_typ, l_high * a_high)


@st.composite
def connectors(draw):
    loss, ends = draw(spreads(0.0, 2.0, "dB", bound=0.0))
    return {"kind": "connector", "loss": loss}, ends


@st.composite
def splices(draw):
    loss, ends = draw(spreads(0.0, 0.5, "dB", bound=0.0))
    count = draw(st.integers(1, 12))
    return {"kind": "splice", "count": count, "loss": loss}, tuple(count * end for end in ends)


@st.composite
def elements(draw):
    loss, ends = draw(spreads(-20.0, 20.0, "dB"))
    return {"kind": "element", "loss": loss}, ends


datasheet_segments = st.one_of(fibers(), connectors(), splices(), elements())


@st.composite
def chains(draw):
    """1 to 6 datasheet segments with unique names, and each one's expected (best, typ, worst) loss."""
    drawn = draw(st.lists(datasheet_segments, min_size=1, max_size=6))
    items = [{"name": f"part {number}", **item} for number, (item, _) in enumerate(drawn)]
    return items, [ends for _, ends in drawn]


source_powers = spreads(-10.0, 10.0, "dBm", sigma_unit="dB")


# --- losses add in dB ------------------------------------------------------------------------

@PROPERTY
@given(chain=chains(), power=source_powers, axis=st.sampled_from(AXES))
def test_evaluate_received_is_launch_minus_sum_of_losses(chain, power, axis):
    items, ends = chain
    (power_text, (p_low, p_typ, p_high)) = power
    result = evaluate(items, power=power_text, axis=axis)
    assert [row.name for row in result.rows] == [item["name"] for item in items]
    # worst case: least launch power, every loss at its high end; best case the other way
    launch = {"typ": p_typ, "worst": p_low, "best": p_high}
    column = {"best": 0, "typ": 1, "worst": 2}
    n_wavelengths = result.wavelength_m.size
    for case in CASES:
        expected = np.array([[end[column[case]]] * n_wavelengths for end in ends])
        assert_allclose(result.loss_db[case], expected, rtol=ROUNDING, atol=SUM_ATOL)
        assert_allclose(result.received_dbm[case], launch[case] - expected.sum(axis=0),
                        rtol=ROUNDING, atol=SUM_ATOL)
        assert_allclose(result.margin_db[case], result.received_dbm[case] - SENSITIVITY_DBM,
                        rtol=ROUNDING, atol=SUM_ATOL)


@PROPERTY
@given(lengths_m=st.lists(st.floats(0.0, 1e5), min_size=3, max_size=3),
       fraction=st.floats(0.0, 1.0), attenuation=spreads(0.0, 1.0, "dB/km", bound=0.0))
def test_evaluate_split_fibre_loses_as_whole_fibre(lengths_m, fraction, attenuation):
    low, typ, high = sorted(lengths_m)
    rest = 1.0 - fraction  # multiplying by one constant keeps min <= typ <= max after rounding

    def fiber(name, scale):
        length = {"min": q(scale * low, "m"), "typ": q(scale * typ, "m"), "max": q(scale * high, "m")}
        return {"name": name, "kind": "fiber", "length": length, "attenuation": attenuation[0]}

    whole = evaluate([fiber("whole", 1.0)])
    split = evaluate([fiber("first part", fraction), fiber("second part", rest)])
    for case in CASES:
        assert_allclose(split.cumulative_loss_db[case][-1], whole.cumulative_loss_db[case][-1],
                        rtol=ROUNDING, atol=SUM_ATOL)


@PROPERTY
# a medium has a thickness > 0 (README, valid ranges), so the lengths start at 1 um
@given(kind=st.sampled_from(["fiber", "medium"]), lengths=st.lists(st.floats(1e-3, 100.0), min_size=3, max_size=3),
       extra=st.floats(0.0, 100.0), axis=st.sampled_from(AXES),
       attenuation=spreads(0.0, 1.0, "dB/km", bound=0.0), kappa=spreads(0.0, 1e-6, None, bound=0.0))
def test_evaluate_longer_path_never_loses_less(kind, lengths, extra, axis, attenuation, kappa):
    low, typ, high = sorted(lengths)
    unit = "m" if kind == "fiber" else "mm"
    loss_form = {"attenuation": attenuation[0]} if kind == "fiber" else {"kappa": kappa[0]}
    length_key = "length" if kind == "fiber" else "thickness"

    def segment(add):
        length = {"min": q(low + add, unit), "typ": q(typ + add, unit), "max": q(high + add, unit)}
        return {"name": "path", "kind": kind, length_key: length, **loss_form}

    short, long = (row_loss(evaluate([segment(add)], axis=axis), "path") for add in (0.0, extra))
    for case in CASES:
        # every float operation is monotonic, so the order holds exactly
        assert np.all(long[case] >= short[case]), case


@st.composite
def media(draw):
    # a medium has a thickness > 0, mean - 3 sigma included: from 3 mm to 5 mm, 2·typ - max >= 1 mm
    thickness, _ = draw(spreads(3.0, 5.0, "mm"))
    kappa, _ = draw(spreads(0.0, 1e-4, None, bound=0.0))
    return {"kind": "medium", "thickness": thickness, "kappa": kappa}


@PROPERTY
@given(items=st.lists(st.one_of(datasheet_segments.map(lambda drawn: drawn[0]), media()), min_size=1, max_size=6),
       power=source_powers, axis=st.sampled_from(AXES))
def test_evaluate_nominal_between_worst_and_best(items, power, axis):
    chain = [{"name": f"part {number}", **item} for number, item in enumerate(items)]
    result = evaluate(chain, power=power[0], axis=axis)
    # exact: each case is built from values ordered low <= typ <= high by monotonic float operations
    assert np.all(result.margin_db["typ"] >= result.margin_db["worst"])
    assert np.all(result.received_dbm["best"] >= result.received_dbm["typ"])
    assert np.all(result.loss_db["worst"] >= result.loss_db["best"])


# --- the same physics in other units ---------------------------------------------------------

#: README's unit table, re-stated: unit -> size in the SI unit (m; dB/m).
LENGTH_UNITS = {"km": 1e3, "m": 1.0, "cm": 1e-2, "mm": 1e-3, "um": 1e-6}
ATTENUATION_UNITS = {"dB/km": 1e-3, "dB/m": 1.0, "dB/cm": 1e2, "dB/mm": 1e3}
POWER_UNITS = {"W": 1.0, "mW": 1e-3, "uW": 1e-6, "nW": 1e-9}


def power_text(watts, unit):
    """``watts`` written in ``unit``; dBm is 10·log10(P / 1 mW) (IEC 60027-3)."""
    if unit == "dBm":
        return q(10.0 * math.log10(watts / 1e-3), "dBm")
    return q(watts / POWER_UNITS[unit], unit)


@st.composite
def unit_choices(draw):
    return (draw(st.sampled_from(sorted(LENGTH_UNITS))), draw(st.sampled_from(sorted(ATTENUATION_UNITS))),
            draw(st.sampled_from([*sorted(POWER_UNITS), "dBm"])))


@PROPERTY
@given(lengths_m=st.lists(st.floats(1e-3, 5e4), min_size=3, max_size=3),
       attenuations=st.lists(st.floats(0.0, 1e-3), min_size=3, max_size=3),
       powers_w=st.lists(st.floats(1e-7, 1e-1), min_size=3, max_size=3),
       first=unit_choices(), second=unit_choices())
def test_evaluate_spread_in_other_units_same_budget(lengths_m, attenuations, powers_w, first, second):
    """lengths [m], attenuations [dB/m] and powers [W], written once in each choice of units."""
    def link(units):
        length_unit, attenuation_unit, power_unit = units
        spread = {key: q(value / LENGTH_UNITS[length_unit], length_unit)
                  for key, value in zip(("min", "typ", "max"), sorted(lengths_m), strict=True)}
        attenuation = {key: q(value / ATTENUATION_UNITS[attenuation_unit], attenuation_unit)
                       for key, value in zip(("min", "typ", "max"), sorted(attenuations), strict=True)}
        power = {key: power_text(value, power_unit)
                 for key, value in zip(("min", "typ", "max"), sorted(powers_w), strict=True)}
        chain = [{"name": "trunk", "kind": "fiber", "length": spread, "attenuation": attenuation}]
        return evaluate(chain, power=power)

    one, other = link(first), link(second)
    for case in CASES:
        assert_allclose(one.loss_db[case], other.loss_db[case], rtol=ROUNDING, atol=SUM_ATOL)
        assert_allclose(one.received_dbm[case], other.received_dbm[case], rtol=ROUNDING, atol=SUM_ATOL)


@PROPERTY
@given(kappa=st.floats(0.0, 1e-3), wavelength_nm=st.floats(400.0, 2000.0), thickness_mm=st.floats(1e-6, 10.0))
def test_evaluate_medium_loss_forms_agree(kappa, wavelength_nm, thickness_mm):
    # α from κ by the flux law (Born & Wolf), then written as α in /cm and as dB/mm
    absorption_per_m = float(flux.absorption_coefficient_from_kappa(kappa, wavelength_nm * 1e-9))
    attenuation_db_per_m = float(flux.attenuation_db_per_m_from_absorption(absorption_per_m))
    forms = [
        {"kappa": kappa},
        {"absorption": q(absorption_per_m / 100.0, "/cm")},
        {"attenuation": q(attenuation_db_per_m / 1000.0, "dB/mm")},
        {"index": f"1.5+{kappa!r}j"},
    ]
    losses = []
    for form in forms:
        sample = {"name": "sample", "kind": "medium", "thickness": q(thickness_mm, "mm"), **form}
        losses.append(row_loss(evaluate([sample], axis={"wavelength": q(wavelength_nm, "nm")}), "sample"))
    expected = attenuation_db_per_m * thickness_mm * 1e-3
    for loss in losses:
        for case in CASES:
            # atol: a κ near the smallest floats loses relative precision; 1e-15 dB is nothing
            assert_allclose(loss[case], [expected], rtol=ROUNDING, atol=1e-15)


# --- malformed input never escapes as anything but a ConfigError -----------------------------

BASE_LINK = {
    "title": "fuzz base",
    "description": "every kind once",
    "channels": ["1310 nm", "1550 nm"],
    "source": {"name": "laser", "power": {"min": "-5 dBm", "typ": "-3 dBm", "max": "0 dBm"}},
    "receiver": {"sensitivity": "-28 dBm", "overload": "-1 dBm", "required_margin": "3 dB"},
    "chain": [
        {"name": "lead", "kind": "fiber", "length": {"typ": "2 km", "max": "2.2 km"}, "attenuation": "0.35 dB/km"},
        {"name": "panel", "kind": "connector", "loss": {"typ": "0.3 dB", "max": "0.75 dB"}, "return_loss": "45 dB"},
        {"name": "joints", "kind": "splice", "count": 3, "loss": {"mean": "0.05 dB", "sigma": "0.02 dB"}},
        {"name": "filter", "kind": "element", "loss": "1.2 dB", "note": "band-pass"},
        {"name": "film", "kind": "medium", "thickness": {"min": "90 um", "typ": "100 um", "max": "110 um"},
         "kappa": 1e-5},
        {"name": "window", "kind": "medium", "thickness": "2 mm", "index": "1.45+1e-8j"},
        {"name": "cell", "kind": "medium", "length": "1 cm", "absorption": "0.01 /cm"},
    ],
}

UNIT_SPELLINGS = ["nm", "um", "mm", "m", "km", "dBm", "mW", "W", "dB", "dB/km", "dB/mm", "/cm", "1/m",
                  "deg", "rad", "", "parsec", "DB", "dBmm"]
FIELD_NAMES = ["typ", "min", "max", "mean", "sigma", "kind", "name", "loss", "length", "count",
               "thickness", "kappa", "index", "from", "to", "step", "wavelength", "x"]

#: Texts that mean something to a formatter or a terminal (markup, format fields, bidi control).
TRICKY_TEXTS = ["[/]", "[bold]", "%s", "{0}", "\\", "\u202e", "1e400 km", "-0 dB", "1310nm"]

quantity_texts = st.builds(q, st.floats(allow_nan=True, allow_infinity=True), st.sampled_from(UNIT_SPELLINGS))
scalars = st.one_of(st.none(), st.booleans(), st.integers(-10**6, 10**6),
                    st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=12), quantity_texts,
                    st.sampled_from(TRICKY_TEXTS))
values = st.one_of(scalars, st.lists(scalars, max_size=3),
                   st.dictionaries(st.sampled_from(FIELD_NAMES), scalars, max_size=3))


def node_paths(node, prefix=()):
    """Every key path below ``node`` (the root excluded)."""
    children = node.items() if isinstance(node, dict) else enumerate(node) if isinstance(node, list) else ()
    for key, child in children:
        yield (*prefix, key)
        yield from node_paths(child, (*prefix, key))


def at(node, path):
    for part in path:
        node = node[part]
    return node


@st.composite
def mutated_links(draw):
    """BASE_LINK as text after one to three random edits: replace a value, delete a key, insert a key."""
    data = yaml.safe_load(yaml.safe_dump(BASE_LINK))  # a deep copy
    for _ in range(draw(st.integers(1, 3))):
        operation = draw(st.sampled_from(["replace", "delete", "insert"]))
        paths = list(node_paths(data))
        if operation == "insert":
            containers = [()] + [path for path in paths if isinstance(at(data, path), (dict, list))]
            parent = at(data, draw(st.sampled_from(containers)))
            if isinstance(parent, dict):
                parent[draw(st.one_of(st.sampled_from(FIELD_NAMES), st.text(min_size=1, max_size=8)))] = draw(values)
            else:
                parent.insert(draw(st.integers(0, len(parent))), draw(values))
            continue
        if not paths:
            continue
        *parent_path, key = draw(st.sampled_from(paths))
        parent = at(data, parent_path)
        if operation == "replace":
            parent[key] = draw(values)
        else:
            del parent[key]
    return yaml.safe_dump(data, sort_keys=False, allow_unicode=True)


YAML_PIECES = [":", " ", "-", "[", "]", "{", "}", ",", "#", "&a", "*a", "!", "!!python/name:os.system", "|", ">",
               "'", '"', "\t", "\n", "\n  ", "? ", "---", "...", "%YAML 1.1", "~", ".nan", "1e400", "ÿ", "\x00"]


@st.composite
def edited_texts(draw):
    """The text of BASE_LINK with one slice cut out and YAML punctuation put in its place."""
    text = yaml.safe_dump(BASE_LINK, sort_keys=False)
    start = draw(st.integers(0, len(text)))
    stop = draw(st.integers(start, min(len(text), start + 40)))
    insert = "".join(draw(st.lists(st.sampled_from(YAML_PIECES), max_size=4)))
    return text[:start] + insert + text[stop:]


@pytest.fixture(scope="module")
def link_file(tmp_path_factory):
    """One file the fuzz examples are written to in turn (module scope: hypothesis reuses it)."""
    return tmp_path_factory.mktemp("fuzz") / "link.yaml"


def assert_input_error_or_budget(text, link_file):
    try:
        link = linkbudget.load(text)
    except linkbudget.ConfigError as error:
        assert error.problems and all(problem.mark is not None for problem in error.problems), str(error)
    else:
        linkbudget.evaluate(link)
    link_file.write_text(text, encoding="utf-8")
    result = run_cli("run", link_file)
    assert result.exit_code in (0, 1, 2), result.output
    assert "Traceback" not in result.output


@FUZZ
@given(text=mutated_links())
def test_load_mutated_link_or_config_error(text, link_file):
    assert_input_error_or_budget(text, link_file)


@FUZZ
@given(text=edited_texts())
def test_load_edited_text_or_config_error(text, link_file):
    assert_input_error_or_budget(text, link_file)


def test_load_fuzz_base_link_is_valid():
    """The fuzz starts from a valid link, so its edits test the error paths and not a broken base."""
    result = linkbudget.evaluate(linkbudget.load(yaml.safe_dump(BASE_LINK, sort_keys=False)))
    assert [row.name for row in result.rows if row.shown_kind != "interface"] == [
        item["name"] for item in BASE_LINK["chain"]]
