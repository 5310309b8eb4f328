import re
from importlib import resources
from pathlib import Path

import numpy as np
import pytest
import yaml
from numpy.testing import assert_allclose

from linkbudget.materials import (
    Material,
    MaterialError,
    MaterialFileError,
    MaterialRangeError,
    catalog_names,
    load_material,
)
from linkbudget.paths import PathRefused
from linkbudget.physics.flux import absorption_coefficient_from_kappa
from tests.conftest import TEST_GLASS

UM = 1e-6
RAW_NK = Path(__file__).parents[1] / "data" / "nk"  # refractiveindex.info copies, see tests/data/README.md

# Every catalog material and the refractiveindex.info file it was converted from.
CONVERTED_FROM = {
    "air": "air-Ciddor.yml",
    "calcium-fluoride": "CaF2-Malitson.yml",
    "fused-silica": "SiO2-Malitson.yml",
    "gallium-arsenide": "GaAs-Skauli.yml",
    "gold": "Au-Johnson.yml",
    "indium-phosphide": "InP-Pettit.yml",
    "magnesium-fluoride": "MgF2-Dodge-o.yml",
    "sapphire": "Al2O3-Malitson-o.yml",
    "silicon": "Si-Green-2008.yml",
    "silicon-infrared": "Si-Li-293K.yml",
    "silicon-nitride": "Si3N4-Luke.yml",
    "silver": "Ag-Johnson.yml",
    "tantalum-pentoxide": "Ta2O5-Gao.yml",
    "titanium-dioxide": "TiO2-Devore-o.yml",
    "water": "H2O-Segelstein.yml",
}


# ---- the raw file's own formulas, written from the shared nk README, independent of our code ----


def _formula_1(um, c):  # Sellmeier: n² − 1 = C1 + Σ C(2i)·λ²/(λ² − C(2i+1)²)
    return np.sqrt(1 + c[0] + sum(b * um**2 / (um**2 - r**2) for b, r in zip(c[1::2], c[2::2], strict=True)))


def _formula_4(um, c):  # n² = C1 + C2·λ^C3/(λ² − C4^C5) + C6·λ^C7/(λ² − C8^C9)
    return np.sqrt(c[0] + c[1] * um ** c[2] / (um**2 - c[3] ** c[4]) + c[5] * um ** c[6] / (um**2 - c[7] ** c[8]))


def _formula_6(um, c):  # gases: n − 1 = C1 + Σ C(2i)/(C(2i+1) − λ⁻²)
    return 1 + c[0] + sum(b / (r - um**-2) for b, r in zip(c[1::2], c[2::2], strict=True))


RAW_FORMULAS = {"formula 1": _formula_1, "formula 4": _formula_4, "formula 6": _formula_6}


def _raw_data(name):
    (entry,) = yaml.safe_load((RAW_NK / CONVERTED_FROM[name]).read_text(encoding="utf-8"))["DATA"]
    return entry


def test_catalog_names_are_every_converted_material():
    assert catalog_names() == sorted(CONVERTED_FROM)


@pytest.mark.parametrize("name", catalog_names())
def test_load_material_catalog_file_is_complete(name):
    material = load_material(name)
    assert isinstance(material, Material)
    assert material.name == name and re.fullmatch(r"[a-z0-9]+(-[a-z0-9]+)*", name)
    assert material.description and material.source
    assert re.search(r"\(\d{4}\)", material.source), "the source names a publication with its year"


@pytest.mark.parametrize("name", catalog_names())
def test_material_index_covers_valid_range(name):
    material = load_material(name)
    low_m, high_m = material.valid_range_m
    wavelength_m = np.geomspace(low_m, high_m, 41)  # both ends and inside
    index = material.index(wavelength_m)
    assert index.shape == wavelength_m.shape and index.dtype == complex
    assert np.all(np.isfinite(index)) and np.all(index.real > 0) and np.all(index.imag >= 0)


@pytest.mark.parametrize("name", catalog_names())
@pytest.mark.parametrize("outside", [0.99, 1.01])
def test_material_index_outside_range_raises(name, outside):
    material = load_material(name)
    end_m = material.valid_range_m[0] if outside < 1 else material.valid_range_m[1]
    with pytest.raises(MaterialRangeError, match=rf"^{name}: wavelength .* nm is outside the valid range .* nm$"):
        material.index(np.array([end_m * outside]))


@pytest.mark.parametrize(
    "name, range_text",
    [
        ("fused-silica", "210–6700 nm"),  # Malitson 1965 / Tan 1998 via SiO2-Malitson.yml
        ("silicon", "250–1450 nm"),  # Green 2008 table ends
        ("air", "230–1690 nm"),  # Ciddor 1996 via air-Ciddor.yml
    ],
)
def test_material_index_outside_range_names_range_in_nm(name, range_text):
    with pytest.raises(MaterialRangeError, match=f"outside the valid range {range_text}"):
        load_material(name).index(5e-8)


@pytest.mark.parametrize("name", catalog_names())
def test_catalog_reproduces_raw_nk_file(name):
    raw = _raw_data(name)
    material = load_material(name)
    if raw["type"].startswith("tabulated"):
        rows = np.array([line.split() for line in raw["data"].strip().splitlines()], dtype=float)
        raw_k = rows[:, 2] if raw["type"] == "tabulated nk" else np.zeros(len(rows))  # n-only: κ = 0
        raw_um = rows[:, 0]
        expected = rows[:, 1] + 1j * raw_k
    else:
        raw_range_um = [float(value) for value in raw["wavelength_range"].split()]
        coefficients = [float(value) for value in raw["coefficients"].split()]
        raw_um = np.geomspace(*raw_range_um, 25)
        expected = RAW_FORMULAS[raw["type"]](raw_um, coefficients)
    assert_allclose(np.array(material.valid_range_m) / UM, raw_um[[0, -1]], rtol=1e-12)
    # Tables: the rows themselves; formulas: exact rewrites (Devore's form holds 16-digit
    # coefficients), so agreement to float64 rounding.
    assert_allclose(material.index(raw_um * UM), expected, rtol=1e-12, atol=0)


def test_fused_silica_coefficients_as_published():
    # Malitson 1965 Sellmeier coefficients (C in /work/shared/REFERENCES.md), as written in the file.
    text = resources.files("linkbudget.materials").joinpath("catalog/fused-silica.yaml").read_text(encoding="utf-8")
    block = yaml.safe_load(text)["sellmeier"]
    assert block == {
        "b": [0.6961663, 0.4079426, 0.8974794],
        "c": ["0.0684043 um", "0.1162414 um", "9.896161 um"],
    }


def test_silicon_infrared_li_1980_at_1550_nm():
    # Li 1980, 293 K: n(1.55 µm) = 3.4757 (C), a tabulated wavelength.
    assert_allclose(load_material("silicon-infrared").index(1.55 * UM), 3.4757, rtol=1e-12)


def test_water_segelstein_absorption_at_1549_nm():
    # Segelstein 1981: κ(1.5488166 µm) = 1.3483112e-4 (C) → α = 4πκ/λ = 10.940 /cm (D, ±1 last digit).
    wavelength_m = 1.5488166 * UM
    kappa = load_material("water").index(wavelength_m).imag
    assert_allclose(kappa, 1.3483112e-4, rtol=1e-12)
    assert_allclose(absorption_coefficient_from_kappa(kappa, wavelength_m) / 100, 10.940, atol=1e-3)


@pytest.mark.parametrize(
    "name, wavelength_um, expected",
    [
        # Johnson & Christy 1972, tabulated values (C in /work/shared/REFERENCES.md).
        ("gold", 0.6595, 0.14 + 3.697j),
        ("gold", 1.610, 0.56 + 11.21j),
        ("silver", 0.6595, 0.05 + 4.483j),
        ("silver", 1.610, 0.15 + 11.85j),
    ],
)
def test_noble_metals_johnson_christy(name, wavelength_um, expected):
    assert_allclose(load_material(name).index(wavelength_um * UM), expected, rtol=1e-12)


def test_load_material_is_cached():
    assert load_material("water") is load_material("water")


def test_load_material_unknown_name_suggests_close_matches():
    with pytest.raises(MaterialError, match=r"unknown material 'fused-silca'; did you mean fused-silica\?"):
        load_material("fused-silca")


def test_load_material_unknown_name_lists_catalog():
    with pytest.raises(MaterialError, match=r"catalog materials: air, calcium-fluoride, .*, water"):
        load_material("unobtainium")


# ---- users' own material files ----



def _write(folder, relative, text):
    path = folder / relative
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")
    return path


def test_load_material_user_file_relative_to_base_dir(tmp_path):
    _write(tmp_path, "materials/glass.yaml", TEST_GLASS)
    material = load_material("materials/glass.yaml", base_dir=tmp_path)
    assert material.name == "test-glass" and material.data_via is None
    assert_allclose(material.valid_range_m, (400e-9, 1.6e-6), rtol=1e-15)
    # Cauchy form, hand arithmetic: 1.5 + 0.004/0.5² = 1.516.
    assert_allclose(material.index(0.5 * UM), 1.516 + 0j, rtol=1e-15)


def test_load_material_user_file_absolute_path(tmp_path):
    path = _write(tmp_path, "glass.yml", TEST_GLASS)
    assert_allclose(load_material(path, base_dir="/elsewhere").index(1.0 * UM), 1.504, rtol=1e-15)


@pytest.mark.parametrize(
    "old, new",
    [
        # The same glass with λ in nm: B = 0.004 µm² = 4000 nm².
        ("wavelength_unit: um\n  coefficients: [1.5, 0.004]", "wavelength_unit: nm\n  coefficients: [1.5, 4000.0]"),
        ("wavelength_unit: um", "wavelength_unit: µm"),  # micro sign
    ],
)
def test_load_material_cauchy_wavelength_unit(tmp_path, old, new):
    _write(tmp_path, "glass.yaml", TEST_GLASS.replace(old, new))
    assert_allclose(load_material("glass.yaml", base_dir=tmp_path).index(0.5 * UM), 1.516, rtol=1e-14)


def test_load_material_user_sellmeier_in_nm_matches_malitson(tmp_path):
    # Malitson 1965 coefficients written in nm; n(0.5876 µm) = 1.45846 (C).
    text = """\
name: my-silica
description: Fused silica, coefficients written in nm
source: I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965)
valid_range: {from: 210 nm, to: 3710 nm}
sellmeier:
  b: [0.6961663, 0.4079426, 0.8974794]
  c: [68.4043 nm, 116.2414 nm, 9896.161 nm]
"""
    _write(tmp_path, "silica.yaml", text)
    assert_allclose(load_material("silica.yaml", base_dir=tmp_path).index(0.5876 * UM), 1.45846, atol=1e-5)


def test_load_material_user_table_n_only_is_transparent(tmp_path):
    text = """\
name: my-crystal
description: Invented crystal, n only
source: invented numbers (2024)
table:
  wavelength_unit: nm
  columns: [wavelength, n]
  rows:
    - [1000, 2.0]
    - [2000, 1.9]
"""
    _write(tmp_path, "crystal.yaml", text)
    material = load_material("crystal.yaml", base_dir=tmp_path)
    assert_allclose(material.valid_range_m, (1e-6, 2e-6), rtol=1e-15)
    # Linear interpolation midway: (2.0 + 1.9)/2, κ = 0 for an n-only table.
    assert_allclose(material.index(1.5 * UM), 1.95 + 0j, rtol=1e-15)


TABLE_MATERIAL = """\
name: my-film
description: Invented film
source: invented numbers (2024)
table:
  wavelength_unit: um
  columns: [wavelength, n, k]
  rows:
    - [1.0, 2.0, 0.001]
    - [2.0, 1.9, 0.002]
"""


@pytest.mark.parametrize(
    "base, old, new, message",
    [
        (TEST_GLASS, "source:", "sourse:", r"unknown key 'sourse' \(did you mean 'source'\?\)"),
        (TEST_GLASS, "source: hand-made coefficients (2024)\n", "", r"missing key 'source'"),
        (TEST_GLASS, "source: hand-made coefficients (2024)", "source: ''", r"source: must be non-empty text"),
        (TEST_GLASS, "400 nm", "400 furlong", r"valid_range.from: unknown unit; use one of nm"),
        (TEST_GLASS, "400 nm", "400", r"valid_range.from: expected a number with a unit"),
        (TEST_GLASS, "to: 1.6 um", "to: 100 nm", r"valid_range: need 0 < from < to"),
        (TEST_GLASS, "valid_range: {from: 400 nm, to: 1.6 um}\n", "", r"missing key 'valid_range'"),
        (TEST_GLASS, "wavelength_unit: um", "wavelength_unit: mile", r"wavelength_unit: unknown unit; use one of nm"),
        (TEST_GLASS, "[0, -2]", "[0]", r"2 coefficients but 1 powers"),
        (TEST_GLASS, "[1.5, 0.004]", "[1.5, '4e-3']", r"coefficients\[1\]: expected a finite number.*do not quote"),
        (TEST_GLASS, "[1.5, 0.004]", "[1.5, .nan]", r"coefficients\[1\]: expected a finite number"),
        (TEST_GLASS, "[1.5, 0.004]", "[true, 0.004]", r"coefficients\[0\]: expected a finite number"),
        (TEST_GLASS, "name: test-glass", "name: Test Glass", r"lowercase words joined by hyphens"),
        (TEST_GLASS, "cauchy:", "kauchy:", r"unknown key 'kauchy' \(did you mean 'cauchy'\?\)"),
        (TEST_GLASS, "cauchy:", "sellmeier: {b: [1.0], c: [0.1 um]}\ncauchy:", r"exactly one model"),
        (TEST_GLASS, TEST_GLASS, "[1.5, 0.004]\n", r"^bad\.yaml:1:1: \(top level\): expected a mapping"),
        (TEST_GLASS, "powers: [0, -2]", "powers: [0, -2", r"^bad\.yaml:9:1: \(top level\): not valid YAML"),
        (TABLE_MATERIAL, "source:", "valid_range: {from: 1 um, to: 2 um}\nsource:", r"valid_range: not allowed"),
        (TABLE_MATERIAL, "[2.0, 1.9, 0.002]", "[0.5, 1.9, 0.002]", r"rows\[0\]: wavelengths must increase"),
        (TABLE_MATERIAL, "0.002]", "-0.002]", r"rows\[1\]: k must be >= 0"),
        (TABLE_MATERIAL, "[1.0, 2.0, 0.001]", "[1.0, 0.0, 0.001]", r"rows\[0\]: n must be positive"),
        (TABLE_MATERIAL, "[1.0, 2.0, 0.001]", "[1.0, 2.0]", r"rows\[0\]: need a list of 3 numbers"),
        (TABLE_MATERIAL, "[wavelength, n, k]", "[wavelength, k, n]", r"columns: must be"),
        (TABLE_MATERIAL, "    - [2.0, 1.9, 0.002]\n", "", r"rows: need a list of at least two rows"),
    ],
)
def test_load_material_malformed_user_file_raises(tmp_path, base, old, new, message):
    assert old in base
    _write(tmp_path, "bad.yaml", base.replace(old, new))
    with pytest.raises(MaterialFileError, match=message):
        load_material("bad.yaml", base_dir=tmp_path)


@pytest.mark.parametrize(
    "block, message",
    [
        ("sellmeier: {b: [1.0, 2.0], c: [0.1 um]}", r"b and c must be non-empty lists of the same length"),
        ("sellmeier: {b: [1.0], c: [0.1]}", r"sellmeier.c\[0\]: expected a number with a unit"),
        ("sellmeier: {b: [one], c: [0.1 um]}", r"sellmeier.b\[0\]: expected a finite number"),
        ("sellmeier: {b: [1.0], c: [0.1 um], d: 1}", r"unknown key 'd'"),
        ("gas: {b: [0.05 um^-2], c: [238 um]}", r"gas.c\[0\]: unknown unit; use one of nm\^-2"),
    ],
)
def test_load_material_malformed_formula_block_raises(tmp_path, block, message):
    text = TEST_GLASS[: TEST_GLASS.index("cauchy:")] + block + "\n"
    _write(tmp_path, "bad.yaml", text)
    with pytest.raises(MaterialFileError, match=message):
        load_material("bad.yaml", base_dir=tmp_path)


def test_load_material_user_gas_file(tmp_path):
    # Ciddor 1996 standard air written in nm⁻²: 1 µm⁻² = 1e-6 nm⁻²; n − 1 at 0.6328 µm as derived
    # in test_dispersion (30-digit decimal arithmetic).
    block = "gas:\n  b: [0.05792105e-6 nm^-2, 0.00167917e-6 nm^-2]\n  c: [238.0185e-6 nm^-2, 57.362e-6 nm^-2]\n"
    text = TEST_GLASS[: TEST_GLASS.index("cauchy:")] + block
    _write(tmp_path, "air.yaml", text)
    n = load_material("air.yaml", base_dir=tmp_path).index(0.6328 * UM)
    assert_allclose(n.real - 1, 2.76532738083504e-4, rtol=1e-10)


def test_load_material_missing_file_raises(tmp_path):
    with pytest.raises(PathRefused, match=r"cannot read file 'absent\.yaml': No such file"):
        load_material("absent.yaml", base_dir=tmp_path)


def test_material_constants_follow_the_flux_law():
    # α = 4πκ/λ and the loss of 1 mm 10·log10(e)·α·1 mm (Born & Wolf; the flux law in DESIGN.md),
    # computed here from the material's own κ at two wavelengths.
    wavelength_m = np.array([1000e-9, 1550e-9])
    constants = load_material("gold").constants(wavelength_m)
    kappa = constants.index.imag
    assert_allclose(constants.absorption_per_m, 4 * np.pi * kappa / wavelength_m, rtol=1e-12)
    assert_allclose(constants.loss_db_per_mm, 10 * np.log10(np.e) * constants.absorption_per_m * 1e-3, rtol=1e-12)
    assert_allclose(constants.index, load_material("gold").index(wavelength_m), rtol=0)
