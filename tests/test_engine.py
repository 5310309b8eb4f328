"""The budget engine: datasheet sums against published allowances, cases, margin and overload."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget


def link_text(chain, *, wavelength="wavelength: 1310 nm", power="0 dBm", receiver="sensitivity: -20 dBm"):
    return f"""title: test link
{wavelength}
source:
  power: {power}
receiver:
  {receiver}
chain:
{chain}
"""


def evaluate(chain, **kwargs):
    return linkbudget.evaluate(linkbudget.load(link_text(chain, **kwargs)))


def test_evaluate_tia_568_3_d_single_mode_outside_plant_allowances():
    # TIA-568.3-D allowances (REFERENCES.md; from memory): mated pair <= 0.75 dB, splice <= 0.3 dB,
    # single-mode outside-plant cable <= 0.5 dB/km. A 5 km link with two mated pairs and two splices
    # therefore has a maximum loss of 5*0.5 + 2*0.75 + 2*0.3 = 4.6 dB.
    result = evaluate("""  - {kind: connector, name: near pair, loss: {typ: 0.3 dB, max: 0.75 dB}}
  - {kind: fiber, name: cable, length: 5 km, attenuation: {typ: 0.35 dB/km, max: 0.5 dB/km}}
  - {kind: splice, name: splices, count: 2, loss: {typ: 0.05 dB, max: 0.3 dB}}
  - {kind: connector, name: far pair, loss: {typ: 0.3 dB, max: 0.75 dB}}""")
    assert_allclose(result.cumulative_loss_db["worst"][-1], [4.6], rtol=1e-12)
    assert_allclose(result.cumulative_loss_db["typ"][-1], [0.6 + 1.75 + 0.1], rtol=1e-12)


def test_evaluate_g652d_maximum_cabled_attenuation():
    # ITU-T G.652.D (11/2016): max cabled attenuation 0.40 dB/km over 1310-1625 nm (REFERENCES.md; from
    # memory) -> 40 km of cable loses at most 16 dB.
    result = evaluate("  - {kind: fiber, length: 40 km, attenuation: 0.40 dB/km}",
                      wavelength="channels: [1310 nm, 1550 nm, 1625 nm]")
    assert_allclose(result.loss_db["worst"][0], [16.0, 16.0, 16.0], rtol=1e-12)


def test_evaluate_10gbase_sr_channel_fits_om3_allowance():
    # IEEE 802.3 10GBASE-SR over OM3: max channel insertion loss 2.6 dB at 300 m (REFERENCES.md; from memory);
    # TIA-568.3-D multimode 3.0 dB/km at 850 nm and 0.75 dB a mated pair (from memory): 300 m with two
    # mated pairs is at most 0.9 + 1.5 = 2.4 dB, inside the 2.6 dB channel allowance.
    result = evaluate("""  - {kind: connector, name: a, loss: {typ: 0.2 dB, max: 0.75 dB}}
  - {kind: fiber, length: 300 m, attenuation: {typ: 2.5 dB/km, max: 3.0 dB/km}}
  - {kind: connector, name: b, loss: {typ: 0.2 dB, max: 0.75 dB}}""", wavelength="wavelength: 850 nm")
    worst = result.cumulative_loss_db["worst"][-1, 0]
    assert_allclose(worst, 2.4, rtol=1e-12)
    assert worst <= 2.6


def test_evaluate_margin_and_received_power():
    result = evaluate("  - {kind: element, loss: {typ: 10 dB, max: 12 dB, min: 9 dB}}",
                      power="{min: -2 dBm, typ: 0 dBm, max: 1 dBm}",
                      receiver="{sensitivity: -20 dBm, overload: -5 dBm, required_margin: 3 dB}")
    assert_allclose(result.received_dbm["typ"], [-10.0])
    assert_allclose(result.received_dbm["worst"], [-14.0])
    assert_allclose(result.received_dbm["best"], [-8.0])
    assert_allclose(result.margin_db["worst"], [6.0])
    assert result.margin_ok and result.overload_ok and result.closes


def test_evaluate_overload_fails_the_link():
    result = evaluate("  - {kind: element, loss: {typ: 2 dB, min: 1 dB}}", power="0 dBm",
                      receiver="{sensitivity: -20 dBm, overload: -3 dBm}")
    assert result.margin_ok
    assert not result.overload_ok
    assert not result.closes


def test_evaluate_required_margin_override():
    chain = "  - {kind: element, loss: 15 dB}"
    link = linkbudget.load(link_text(chain, receiver="{sensitivity: -20 dBm, required_margin: 3 dB}"))
    assert linkbudget.evaluate(link).closes  # margin 5 dB >= 3 dB
    assert not linkbudget.evaluate(link, required_margin_db=6.0).closes


def test_evaluate_gain_element_is_negative_loss():
    result = evaluate("""  - {kind: fiber, length: 100 km, attenuation: 0.25 dB/km}
  - {kind: element, name: amplifier, loss: -20 dB}""")
    assert_allclose(result.cumulative_loss_db["typ"][-1], [5.0])


def test_evaluate_normal_spread_spans_three_sigma():
    result = evaluate("  - {kind: splice, count: 10, loss: {mean: 0.05 dB, sigma: 0.02 dB}}")
    assert_allclose(result.loss_db["typ"][0], [0.5])
    assert_allclose(result.loss_db["worst"][0], [10 * (0.05 + 3 * 0.02)])
    assert_allclose(result.loss_db["best"][0], [0.0])  # mean - 3 sigma is clipped at 0 dB


def test_evaluate_wavelength_axis_shapes():
    result = evaluate("  - {kind: fiber, length: 1 km, attenuation: 1 dB/km}\n  - {kind: element, loss: 1 dB}",
                      wavelength="band: {from: 1500 nm, to: 1600 nm, step: 10 nm}")
    assert result.wavelength_m.shape == (11,)
    assert_allclose(result.wavelength_m[[0, -1]], [1500e-9, 1600e-9])
    assert result.power_after_dbm["worst"].shape == (2, 11)


def test_evaluate_medium_flux_law_forms_agree():
    # kappa = 1e-5 at 1550 nm: alpha = 4 pi kappa / lambda = 81.07 /m (Born & Wolf); 1 cm -> 3.521 dB.
    alpha = float(4 * np.pi * 1e-5 / 1550e-9)
    expected = float(10 * np.log10(np.e) * alpha * 0.01)
    forms = ["index: 1.5+1e-5j", "kappa: 1e-5", f"absorption: {alpha / 100!r} /cm",
             f"attenuation: {expected!r} dB/cm"]
    for form in forms:
        result = evaluate(f"  - {{kind: medium, thickness: 1 cm, {form}}}", wavelength="wavelength: 1550 nm")
        # the bulk row (with an index the lone window also has its two faces to air around it)
        (bulk,) = [row for row in result.rows if row.shown_kind == "medium"]
        assert_allclose(bulk.loss_db["typ"], [expected], rtol=1e-12, err_msg=form)


def test_result_dict_minimum_contract():
    result = evaluate("  - {kind: element, loss: {typ: 1 dB, max: 2 dB}}", wavelength="channels: [1310 nm, 1550 nm]")
    data = linkbudget.result_dict(result)
    assert data["schema"] == "linkbudget.result/3"
    assert data["wavelengths_nm"] == pytest.approx([1310.0, 1550.0])
    assert data["rows"][0]["loss_db"] == {"typ": [1.0, 1.0], "worst": [2.0, 2.0], "best": [1.0, 1.0]}
    assert data["margin_db"]["worst"] == [18.0, 18.0]
    assert data["closes"] is True
    assert data["cautions"]


def test_result_rows_carry_losses_whose_running_sum_is_the_power_after_each_row():
    # Hand sums: source 0 dBm (the test link's), elements of 1 dB and 2.5 dB (worst case 2 dB and
    # 3 dB): power after them 0 - 1 = -1 and -1 - 2.5 = -3.5 dBm, worst -2 and -5 dBm.
    result = evaluate("  - {kind: element, name: first, loss: {typ: 1 dB, max: 2 dB}}\n"
                      "  - {kind: element, name: second, loss: {typ: 2.5 dB, max: 3 dB}}")
    data = linkbudget.result_dict(result)
    assert all("power_after_dbm" not in row and "cumulative_loss_db" not in row for row in data["rows"])
    for case, expected in {"typ": [-1.0, -3.5], "worst": [-2.0, -5.0]}.items():
        losses = np.array([row["loss_db"][case] for row in data["rows"]])
        power_after = np.array(data["source_dbm"][case]) - np.cumsum(losses, axis=0)  # docs/json-result.md
        assert_allclose(power_after[:, 0], expected, atol=1e-9)
        assert_allclose(power_after[-1], data["received_dbm"][case], atol=1e-9)


def test_engine_holds_no_kind_names_class_flags_or_probes():
    # the engine walks the chain by the segments' roles alone (linkbudget.segments.roles)
    import inspect

    from linkbudget import engine
    from linkbudget.segments.registry import KINDS

    source = inspect.getsource(engine)
    assert not [kind for kind in KINDS if f'"{kind}"' in source or f"'{kind}'" in source]
    for probe in ("getattr(", "hasattr(", "segment.kind ==", "ClassVar", "isinstance(segment"):
        assert probe not in source, probe
