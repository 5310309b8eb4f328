"""Optical materials: the shipped catalog and users' own material files.

A material file is YAML holding one material::

    name: fused-silica                  # lowercase words joined by hyphens
    description: Fused silica (amorphous SiO2), 20 °C
    source: I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965), doi:10.1364/JOSA.55.001205
    data_via: where the numbers were taken from, if not the source itself   # optional
    valid_range: {from: 210 nm, to: 6700 nm}
    sellmeier:
      a: 0                              # optional, default 0
      b: [0.6961663, 0.4079426, 0.8974794]
      c: [0.0684043 um, 0.1162414 um, 9.896161 um]

and exactly one model, named by its key:

- ``sellmeier: {a, b, c}``: n² = 1 + a + Σ b λ²/(λ² − c²), c as lengths
  (:func:`~linkbudget.materials.dispersion.sellmeier`);
- ``cauchy: {wavelength_unit, coefficients, powers}``: n = Σ A λ^p with λ in ``wavelength_unit``
  (:func:`~linkbudget.materials.dispersion.cauchy`);
- ``gas: {a, b, c}``: n − 1 = a + Σ b/(c − λ⁻²), b and c as inverse squared lengths such as
  ``238.0185 um^-2`` (:func:`~linkbudget.materials.dispersion.gas_dispersion`);
- ``table: {wavelength_unit, columns, rows}``: ``columns`` is ``[wavelength, n, k]``, or
  ``[wavelength, n]`` for a transparent material (κ = 0, as with the formulas); rows in
  increasing wavelength (:func:`~linkbudget.materials.dispersion.tabulated`). A table's range is
  its first and last row, so a table takes no ``valid_range``.

Lengths are written with their unit: ``nm``, ``um`` or ``µm``. Unknown keys, a missing source and
unknown units are errors (:class:`MaterialFileError`), placed at ``FILE:LINE:COL: key.path``
as a link's are, since a material file is read by the same YAML reader.
"""

import difflib
import functools
import math
import os
import re
from collections.abc import Callable
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

import numpy as np

from linkbudget.config.source import ConfigError, load_yaml
from linkbudget.materials import dispersion
from linkbudget.materials.dispersion import require_in_range
from linkbudget.paths import FileLocator
from linkbudget.physics import flux
from linkbudget.reader import Source, located_source
from linkbudget.units import NUMBER_PATTERN, UNITS

_CATALOG = resources.files(__package__).joinpath("catalog")

# length units of the one unit table (linkbudget.units), by spelling -> metres
_LENGTH_M = {unit: factor for unit, (dimension, factor) in UNITS.items() if dimension == "length"}
_INVERSE_SQUARE_LENGTH_PER_M2 = {f"{unit}^-2": scale**-2 for unit, scale in _LENGTH_M.items()}
_QUANTITY = re.compile(rf"\s*({NUMBER_PATTERN})\s*(\S+)\s*")
_NAME = re.compile(r"[a-z0-9]+(?:-[a-z0-9]+)*")
#: An unknown key short and plain enough to be named in a message (the material keys are all so).
_PLAIN_KEY = re.compile(r"[A-Za-z_][A-Za-z0-9_-]{0,19}")
_TABLE_COLUMNS = (["wavelength", "n", "k"], ["wavelength", "n"])


class MaterialError(ValueError):
    """A material name is unknown."""


class MaterialFileError(ConfigError):
    """A material file is malformed: its problem placed at ``FILE:LINE:COL: key.path``, like a link's."""


class _Invalid(ValueError):
    """A malformed value at ``key_path`` of a material file (at its key if ``at_key``), before it is placed."""

    def __init__(self, key_path, message, *, at_key=False):
        super().__init__(message)
        self.key_path, self.at_key = tuple(key_path), at_key


@dataclass(frozen=True)
class OpticalConstants:
    """A material's constants over wavelengths [m]: index N = n + iκ, the intensity attenuation
    coefficient α = 4πκ/λ [1/m] and the loss of 1 mm [dB] through the flux law
    (:mod:`linkbudget.physics.flux`)."""

    wavelength_m: np.ndarray
    index: np.ndarray
    absorption_per_m: np.ndarray
    loss_db_per_mm: np.ndarray


@dataclass(frozen=True)
class Material:
    """An optical material: its complex index over a stated wavelength range.

    Attributes
    ----------
    name, description, source : str
        Catalog name, what the material is (phase, temperature), and the original publication.
    valid_range_m : tuple of float
        Shortest and longest wavelength [m] for which the data hold.
    dispersion : callable
        The model, wavelength [m] array → index array, without the range check.
    data_via : str or None
        Where the numbers were taken from, when not from the source directly.
    """

    name: str
    description: str
    source: str
    valid_range_m: tuple[float, float]
    dispersion: Callable[[np.ndarray], np.ndarray] = field(repr=False)
    data_via: str | None = None

    def index(self, wavelength_m):
        """Complex refractive index n + iκ (κ ≥ 0) at vacuum wavelengths [m].

        Raises
        ------
        MaterialRangeError
            If a wavelength lies outside :attr:`valid_range_m`.
        """
        wavelength_m = np.asarray(wavelength_m, dtype=float)
        require_in_range(wavelength_m, self.valid_range_m, what=self.name)
        return np.asarray(self.dispersion(wavelength_m), dtype=complex)

    def constants(self, wavelength_m):
        """:class:`OpticalConstants` at vacuum wavelengths [m] (same range check as :meth:`index`)."""
        wavelength_m = np.asarray(wavelength_m, dtype=float)
        index = self.index(wavelength_m)
        absorption_per_m = flux.absorption_coefficient_from_kappa(index.imag, wavelength_m)
        return OpticalConstants(wavelength_m, index, absorption_per_m, flux.loss_db(absorption_per_m, 1e-3))


@functools.cache
def _catalog_names():
    return tuple(sorted(entry.name[: -len(".yaml")] for entry in _CATALOG.iterdir() if entry.name.endswith(".yaml")))


def catalog_names():
    """Names of the materials shipped in the catalog, sorted."""
    return list(_catalog_names())


def load_material(name_or_path, *, base_dir=None, files=None):
    """A catalog material by name, or a user's material file by path.

    Parameters
    ----------
    name_or_path : str or os.PathLike
        A catalog name such as ``"fused-silica"``, or the path of a material file (anything
        ending in ``.yaml``/``.yml`` or containing a ``/`` or ``\\``).
    base_dir : str or os.PathLike, optional
        Folder a relative path is taken from; the current directory when omitted. The path may
        lead anywhere: for a path the caller gives directly.
    files : linkbudget.reader.LinkFiles, optional
        For a path written in a link: the link's reader and folder (see :mod:`linkbudget.reader`),
        which confine it and read each file once; replaces ``base_dir``.

    Raises
    ------
    MaterialError
        Unknown catalog name (with close matches).
    MaterialFileError
        Malformed content, placed at ``FILE:LINE:COL: key.path``; the messages name the keys of
        the material language but never quote a value of the file.
    linkbudget.paths.PathRefused
        A path outside the link's project, a missing file, or one that is not a regular file.
    """
    text = str(name_or_path)
    if isinstance(name_or_path, os.PathLike) or "/" in text or "\\" in text or text.endswith((".yaml", ".yml")):
        if files is None:
            return parse_material(located_source(FileLocator(Path(base_dir or "."), None), text, text))
        return parse_material(files.read(text))
    return _catalog_material(text)


def covering_hint(material, wavelength_m):
    """Catalog materials of the same family whose data cover every wavelength, as a hint (or None)."""
    family = str(material).split("-")[0]
    covering = []
    for name in catalog_names():
        low, high = load_material(name).valid_range_m
        same_family = name.split("-")[0] == family and name != material
        if same_family and low <= wavelength_m.min() and wavelength_m.max() <= high:
            covering.append(name)
    return f"catalog materials named {family}-* with data there: {', '.join(covering)}" if covering else None


@functools.cache
def _catalog_material(name):
    names = _catalog_names()
    if name not in names:
        close = difflib.get_close_matches(name, names, n=3, cutoff=0.6)
        hint = f"did you mean {', '.join(close)}?" if close else f"catalog materials: {', '.join(names)}"
        raise MaterialError(f"unknown material {name!r}; {hint} (or give the path of a material file)")
    resource = _CATALOG.joinpath(f"{name}.yaml")
    return parse_material(Source(f"catalog/{name}.yaml", resource.read_text(encoding="utf-8")))


def parse_material(source):
    """The :class:`Material` of a material file's :class:`~linkbudget.reader.Source`.

    Read by the link loader's YAML reader (:func:`linkbudget.config.source.load_yaml`, with its
    bounds), without quoting the file in any message.

    Raises
    ------
    MaterialFileError
        With the problem placed at ``FILE:LINE:COL: key.path``.
    """
    try:
        data, positions = load_yaml(source.text, source.name, quote_input=False)
    except ConfigError as error:
        raise MaterialFileError(error.problems) from None
    try:
        return _material(data)
    except _Invalid as invalid:
        raise MaterialFileError([positions.problem(invalid.key_path, str(invalid), at_key=invalid.at_key)]) from None


def _material(document):
    top = _check_keys(
        _mapping(document, ()),
        required={"name", "description", "source"},
        optional={"data_via", "valid_range", *_MODELS},
        where=(),
    )
    models = [key for key in _MODELS if key in top]
    if len(models) != 1:
        raise _Invalid((), f"give exactly one model, one of {', '.join(_MODELS)}; found {len(models)}")
    (model,) = models
    name = _text(top["name"], ("name",))
    if not _NAME.fullmatch(name):
        raise _Invalid(("name",), "must be lowercase words joined by hyphens")
    evaluate, table_range_m = _MODELS[model](top[model], (model,))
    if table_range_m is not None and "valid_range" in top:
        raise _Invalid(("valid_range",), "not allowed with a table, whose range is its first and last row")
    if table_range_m is None and "valid_range" not in top:
        raise _Invalid((), "missing key 'valid_range' (a formula needs the range its source states)")
    return Material(
        name=name,
        description=_text(top["description"], ("description",)),
        source=_text(top["source"], ("source",)),
        valid_range_m=table_range_m or _range(top["valid_range"], ("valid_range",)),
        dispersion=evaluate,
        data_via=None if top.get("data_via") is None else _text(top["data_via"], ("data_via",)),
    )


# ---- the four models: each turns its block into (evaluate, table range or None) ----


def _sellmeier(block, where):
    block = _check_keys(_mapping(block, where), required={"b", "c"}, optional={"a"}, where=where)
    b, c_m = _resonances(block, where, b_units=None, c_units=_LENGTH_M)
    a = _number(block.get("a", 0.0), (*where, "a"))
    return functools.partial(dispersion.sellmeier, b=b, c_m=c_m, a=a), None


def _gas(block, where):
    block = _check_keys(_mapping(block, where), required={"b", "c"}, optional={"a"}, where=where)
    units = _INVERSE_SQUARE_LENGTH_PER_M2
    b_per_m2, c_per_m2 = _resonances(block, where, b_units=units, c_units=units)
    a = _number(block.get("a", 0.0), (*where, "a"))
    return functools.partial(dispersion.gas_dispersion, b_per_m2=b_per_m2, c_per_m2=c_per_m2, a=a), None


def _cauchy(block, where):
    block = _check_keys(
        _mapping(block, where), required={"wavelength_unit", "coefficients", "powers"}, optional=set(), where=where
    )
    um_per_unit = _unit(block["wavelength_unit"], (*where, "wavelength_unit")) / _LENGTH_M["um"]
    coefficients = _numbers(block["coefficients"], (*where, "coefficients"))
    powers = _numbers(block["powers"], (*where, "powers"))
    if len(coefficients) != len(powers):
        raise _Invalid(where, f"{len(coefficients)} coefficients but {len(powers)} powers")
    # A·λ_unit^p = A·(λ_um / um_per_unit)^p: rescale once to the µm coefficients cauchy() takes.
    coefficients_um = tuple(value * um_per_unit**-power for value, power in zip(coefficients, powers, strict=True))
    return functools.partial(dispersion.cauchy, coefficients=coefficients_um, powers=powers), None


def _table(block, where):
    block = _check_keys(
        _mapping(block, where), required={"wavelength_unit", "columns", "rows"}, optional=set(), where=where
    )
    unit_m = _unit(block["wavelength_unit"], (*where, "wavelength_unit"))
    columns = block["columns"]
    if columns not in _TABLE_COLUMNS:
        raise _Invalid((*where, "columns"), "must be [wavelength, n, k] or [wavelength, n]")
    rows = block["rows"]
    if not isinstance(rows, list) or len(rows) < 2:
        raise _Invalid((*where, "rows"), "need a list of at least two rows")
    for i, row in enumerate(rows):
        if not isinstance(row, list) or len(row) != len(columns):
            raise _Invalid((*where, "rows", i), f"need a list of {len(columns)} numbers ({', '.join(columns)})")
        for j, value in enumerate(row):
            _number(value, (*where, "rows", i, j))
    values = np.array(rows, dtype=float)
    wavelength_m = values[:, 0] * unit_m
    n = values[:, 1].copy()
    k = values[:, 2].copy() if values.shape[1] == 3 else np.zeros_like(n)
    for array in (wavelength_m, n, k):
        array.setflags(write=False)  # shared by every user of a cached catalog material
    checks = (
        (wavelength_m > 0, "wavelength must be positive"),
        (np.append(np.diff(wavelength_m) > 0, True), "wavelengths must increase from row to row"),
        (n > 0, "n must be positive"),
        (k >= 0, "k must be >= 0 (a passive material)"),
    )
    for ok, problem in checks:
        if not np.all(ok):
            raise _Invalid((*where, "rows", int(np.argmin(ok))), problem)
    evaluate = functools.partial(dispersion.tabulated, table_wavelength_m=wavelength_m, n=n, k=k)
    return evaluate, (float(wavelength_m[0]), float(wavelength_m[-1]))


_MODELS = {"sellmeier": _sellmeier, "cauchy": _cauchy, "gas": _gas, "table": _table}


# ---- small validators ----


def _mapping(value, where):
    if not isinstance(value, dict):
        raise _Invalid(where, f"expected a mapping of keys, got {type(value).__name__}")
    return value


def _check_keys(mapping, *, required, optional, where):
    allowed = required | optional
    for key in mapping:
        if key not in allowed:
            close = difflib.get_close_matches(str(key), sorted(allowed), n=1)
            hint = f" (did you mean {close[0]!r}?)" if close else f" (allowed: {', '.join(sorted(allowed))})"
            shown = _shown_key(key)
            raise _Invalid(where if shown.startswith("(") else (*where, key), f"unknown key {shown}{hint}", at_key=True)
    missing = sorted(required - set(mapping))
    if missing:
        raise _Invalid(where, f"missing key {', '.join(map(repr, missing))}")
    return mapping


def _shown_key(key):
    """An unknown key as the message may show it: quoted if short and plain, else not at all.

    A material file may be any file the user points at; its keys could be secrets.
    """
    if isinstance(key, str) and _PLAIN_KEY.fullmatch(key):
        return f"'{key}'"
    return "(not shown: long or not plain)"


def _rejected_number(value):
    """What a value :func:`_number` refuses is, in words, without quoting it."""
    if isinstance(value, bool):
        return "true/false"
    if value is None:
        return "nothing"
    return {str: "text", list: "a list", dict: "a mapping"}.get(type(value), "an infinite or NaN number")


def _text(value, where):
    if not isinstance(value, str) or not value.strip():
        raise _Invalid(where, "must be non-empty text")
    return value.strip()


def _number(value, where):
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        hint = ""
        if isinstance(value, str) and re.fullmatch(NUMBER_PATTERN, value.strip()):
            hint = " (YAML read it as text: do not quote numbers)"
        raise _Invalid(where, f"expected a finite number, got {_rejected_number(value)}{hint}")
    return float(value)


def _numbers(value, where):
    if not isinstance(value, list) or not value:
        raise _Invalid(where, "expected a non-empty list of numbers")
    return tuple(_number(item, (*where, i)) for i, item in enumerate(value))


def _unit(value, where, table=_LENGTH_M):
    if not isinstance(value, str) or value not in table:
        raise _Invalid(where, f"unknown unit; use one of {', '.join(table)}")
    return table[value]


def _quantity(value, where, table):
    match = _QUANTITY.fullmatch(value) if isinstance(value, str) else None
    if match is None:
        raise _Invalid(where, f"expected a number with a unit ({', '.join(table)})")
    return float(match[1]) * _unit(match[2], where, table)


def _resonances(block, where, *, b_units, c_units):
    """The paired b and c lists of a resonance model; numbers where the units are None."""
    b, c = block["b"], block["c"]
    if not isinstance(b, list) or not isinstance(c, list) or not b or len(b) != len(c):
        raise _Invalid(where, "b and c must be non-empty lists of the same length")

    def values(items, key, units):
        return tuple(
            _number(item, (*where, key, i)) if units is None else _quantity(item, (*where, key, i), units)
            for i, item in enumerate(items)
        )

    return values(b, "b", b_units), values(c, "c", c_units)


def _range(value, where):
    value = _check_keys(_mapping(value, where), required={"from", "to"}, optional=set(), where=where)
    low_m, high_m = (_quantity(value[end], (*where, end), _LENGTH_M) for end in ("from", "to"))
    if not 0 < low_m < high_m:
        raise _Invalid(where, "need 0 < from < to")
    return (low_m, high_m)
