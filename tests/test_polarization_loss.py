"""Polarization-dependent loss (linkbudget.polarization_loss) against the ``tmm`` package.

``tmm`` (S. J. Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016) computes the
power transmittance of a stack for s and p light; each check here builds the same stack in it:
a glass plate (n = 1.5) at 45° in air, its two faces one by one (tmm with semi-infinite media on
both sides, the exit face at the refracted angle), and a thin gold film (Johnson & Christy 1972 at
1610 nm: 0.56 + 11.21i, /work/shared/REFERENCES.md, C) between two glasses at 45°. At 45° on
n = 1.5, Rs = 9.201 % and Rp = 0.8466 % (REFERENCES.md, D).
"""

import json
import math

import numpy as np
import pytest
import tmm
from numpy.testing import assert_allclose

import linkbudget
from tests.conftest import run_cli

WAVELENGTH_NM = 1610.0
GOLD = complex(0.56, 11.21)


def link_text(chain):
    return f"""\
title: PDL test
wavelength: {WAVELENGTH_NM:g} nm
source:
  power: 0 dBm
receiver:
  sensitivity: -40 dBm
chain:
{chain}"""


def evaluated(chain):
    return linkbudget.evaluate(linkbudget.load(link_text(chain)))


def db(transmittance):
    return -10 * math.log10(transmittance)


def tmm_t(pol, indices, thicknesses_nm, angle_rad):
    return tmm.coh_tmm(pol, indices, thicknesses_nm, angle_rad, WAVELENGTH_NM)["T"]


PLATE = ("  - name: entry air\n    kind: gap\n    length: 10 mm\n    index: 1.0\n"
         "  - name: plate\n    kind: medium\n    thickness: 1 mm\n    index: 1.5\n    angle: 45 deg\n"
         "  - name: exit air\n    kind: gap\n    length: 10 mm\n    index: 1.0\n")


def test_polarization_loss_glass_plate_at_45deg_against_tmm():
    loss = evaluated(PLATE).review.polarization_loss
    inside = math.asin(math.sin(math.pi / 4) / 1.5)
    expected = {pol: db(tmm_t(pol, [1, 1.5], [np.inf, np.inf], math.pi / 4))
                + db(tmm_t(pol, [1.5, 1], [np.inf, np.inf], inside)) for pol in ("s", "p")}
    assert 1 - tmm_t("s", [1, 1.5], [np.inf, np.inf], math.pi / 4) == pytest.approx(0.09201, abs=1e-5)
    assert 1 - tmm_t("p", [1, 1.5], [np.inf, np.inf], math.pi / 4) == pytest.approx(0.008466, abs=1e-6)
    assert [item.row_id for item in loss.rows] == ["entry air → plate", "plate → exit air"]
    for pol in ("s", "p"):
        assert_allclose(loss.link_loss_db[pol], [expected[pol]], atol=1e-9)
    assert_allclose(loss.link_pdl_db, [expected["s"] - expected["p"]], atol=1e-9)


def test_polarization_loss_gold_film_at_45deg_against_tmm():
    chain = ("  - name: front glass\n    kind: medium\n    thickness: 1 mm\n    index: 1.5\n"
             f"  - name: gold film\n    kind: coating\n    layers:\n      - {{index: {GOLD.real}+{GOLD.imag}j, "
             "thickness: 10 nm}\n"
             "  - name: back glass\n    kind: medium\n    thickness: 1 mm\n    index: 1.5\n    angle: 45 deg\n")
    loss = evaluated(chain).review.polarization_loss
    (film,) = loss.rows
    assert film.row_id == "gold film"
    for pol in ("s", "p"):
        expected = db(tmm_t(pol, [1.5, GOLD, 1.5], [np.inf, 10.0, np.inf], math.pi / 4))
        assert_allclose(film.loss_db[pol], [expected], atol=1e-9)
    pdl = abs(db(tmm_t("s", [1.5, GOLD, 1.5], [np.inf, 10.0, np.inf], math.pi / 4))
              - db(tmm_t("p", [1.5, GOLD, 1.5], [np.inf, 10.0, np.inf], math.pi / 4)))
    assert pdl > 0.1
    assert_allclose(loss.link_pdl_db, [pdl], atol=1e-9)


def test_polarization_loss_normal_incidence_has_none():
    assert evaluated(PLATE.replace("    angle: 45 deg\n", "")).review.polarization_loss.rows == ()


def test_polarization_loss_row_note_json_and_gate(write_link):
    path = write_link(link_text(PLATE))
    terminal = run_cli("run", path).stdout
    assert "PDL 0." in terminal and "Polarization-dependent loss of the link" in terminal
    data = json.loads(run_cli("run", path, "--format", "json").stdout)
    entry = data["polarization_dependent_loss"]
    assert [row["row"] for row in entry["rows"]] == ["entry air → plate", "plate → exit air"]
    pdl = entry["link_pdl_db"][0]
    assert run_cli("check", path, "--max-pdl", f"{pdl + 0.01:.3f} dB").exit_code == 0
    failed = run_cli("check", path, "--max-pdl", f"{pdl - 0.01:.3f} dB")
    assert failed.exit_code == 1 and "PDL" in failed.stdout
