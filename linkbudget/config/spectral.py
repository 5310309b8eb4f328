"""Datasheet values that vary with wavelength: a table over wavelength, or a fibre's spectral model.

A datasheet key that takes a table (:func:`spectral`) accepts, besides its usual value or spread,

- a **table** ``{1310 nm: 0.35 dB/km, 1550 nm: 0.22 dB/km}``: wavelengths in increasing order
  (at least two), each entry itself a value or a spread. Between two entries the low, typical and
  high ends are interpolated linearly in wavelength. A wavelength of the link outside the table is
  an input error unless the table says ``hold_ends: true``: the first entry's values then hold
  below it and the last's above it (never a linear extrapolation, which would take a loss below
  zero or past the steep edge of a filter the datasheet does not describe);
- for a fibre's ``attenuation``, the **silica model** ``{model: silica, water_peak: low}``
  (:class:`SilicaAttenuation`, the terms of :mod:`linkbudget.physics.silica_attenuation`).

Both are resolved on the link's wavelength axis into a :class:`SpectralValue`, which answers the
budget cases like a spread (its ends are arrays over the wavelength axis).
"""

import difflib
from dataclasses import dataclass
from typing import Annotated, Literal

import numpy as np
from pydantic import BeforeValidator, Field, TypeAdapter, ValidationError, WrapValidator

from linkbudget.config.fields import InputProblem, SpreadBase, Strict, quantity, spread
from linkbudget.config.ranges import RANGES
from linkbudget.physics import silica_attenuation as silica
from linkbudget.physics.validity import span_text
from linkbudget.text import nm
from linkbudget.units import UnitError, parse_quantity

#: The key of a table that holds its end values beyond its first and last wavelength.
HOLD_ENDS = "hold_ends"
_SPREAD_KEYS = frozenset({"min", "typ", "max", "mean", "sigma"})


@dataclass(frozen=True)
class SpectralValue:
    """A value resolved over the wavelength axis: ``low``, ``typ_value`` and ``high`` are arrays of
    shape (n_wavelengths,), as a :class:`~linkbudget.config.fields.SpreadBase` holds floats.

    ``form`` says how :meth:`drawn` draws it: ``fixed``, ``uniform``, ``triangular`` (mode at
    ``typ_value``) or ``normal`` (``mean``, ``sigma``, truncated to ``low`` and ``high``).
    """

    low: np.ndarray
    typ_value: np.ndarray
    high: np.ndarray
    form: str
    mean: np.ndarray | None = None
    sigma: np.ndarray | None = None
    notes_text: tuple = ()
    #: A table is drawn on its own (tables take no ``batch``; see :class:`linkbudget.segments.cases.Draws`).
    batch = None

    @property
    def is_fixed(self):
        return bool(np.all(self.low == self.high))

    def notes(self):
        return list(self.notes_text)

    def drawn(self, rng, count):
        """``count`` draws over the wavelength axis, shape (count, n_wavelengths).

        One uniform quantile u per draw is shared by every wavelength and mapped through each
        wavelength's distribution (its inverse cumulative distribution), so a part that is
        lossy at one wavelength is lossy at all of them (one part, one draw).
        """
        u = rng.uniform(size=(int(count), 1))
        low, typ, high = self.low, self.typ_value, self.high
        if self.form == "fixed":
            return np.broadcast_to(typ, (int(count), typ.size)).copy()
        if self.form == "uniform":
            return low + u * (high - low)
        if self.form == "normal":
            from scipy.special import ndtr, ndtri

            sigma = np.where(self.sigma > 0, self.sigma, 1.0)
            below, above = ndtr((low - self.mean) / sigma), ndtr((high - self.mean) / sigma)
            return np.clip(self.mean + sigma * ndtri(below + u * (above - below)), low, high)
        span = np.where(high > low, high - low, 1.0)
        rising = (typ - low) / span  # the triangular distribution's cumulative share below its mode
        return np.where(u < rising, low + np.sqrt(u * span * (typ - low)),
                        high - np.sqrt((1 - u) * span * (high - typ)))


def _form(entries):
    """The distribution form of the entries of a table (see :class:`SpectralValue`)."""
    if all(not isinstance(entry, SpreadBase) or entry.is_fixed for entry in entries):
        return "fixed"
    if all(isinstance(entry, SpreadBase) and entry.mean is not None for entry in entries):
        return "normal"
    if all(isinstance(entry, SpreadBase) and entry.typ is None and entry.mean is None for entry in entries):
        return "uniform"
    return "triangular"


def _ends(entry):
    """(low, typ, high, mean, sigma) of a table entry (a float or a spread)."""
    if not isinstance(entry, SpreadBase):
        return entry, entry, entry, entry, 0.0
    return entry.low, entry.typ_value, entry.high, entry.mean, entry.sigma


@dataclass(frozen=True)
class SpectralTable:
    """A table over wavelength: ``wavelengths_m`` increasing, one entry (a float or a spread) each."""

    wavelengths_m: tuple
    entries: tuple
    hold_ends: bool = False

    def at(self, wavelength_m):
        """The table interpolated linearly on ``wavelength_m`` (a :class:`SpectralValue`).

        Raises :class:`InputProblem` for a wavelength outside the table, unless it holds its ends.
        """
        first, last = self.wavelengths_m[0], self.wavelengths_m[-1]
        outside = wavelength_m[(wavelength_m < first * (1 - 1e-12)) | (wavelength_m > last * (1 + 1e-12))]
        if outside.size and not self.hold_ends:
            raise InputProblem((), f"the link's wavelength {span_text(outside * 1e9, 6, ' nm')} lies outside "
                               f"this table ({nm(first)} to {nm(last)}); a table is not extrapolated",
                               f"add entries that cover it, or write `{HOLD_ENDS}: true` to hold the first "
                               "and last entries' values beyond them")
        form = _form(self.entries)
        columns = np.array([_ends(entry) for entry in self.entries], dtype=float).T  # (5, n_entries)
        low, typ, high, mean, sigma = (np.interp(wavelength_m, self.wavelengths_m, column) for column in columns)
        if form != "normal":
            mean = sigma = None
        return SpectralValue(low, typ, high, form, mean, sigma)


class _WaterPeakSchema:
    """The JSON Schema of ``water_peak``: a fibre type's name or a height with its unit."""

    def __get_pydantic_json_schema__(self, core_schema, handler):
        from linkbudget.config.json_schema import quantity_schema

        return {"anyOf": [{"enum": list(silica.HYDROXYL_PEAK_HEIGHT_DB_PER_KM)},
                          quantity_schema("attenuation", "0.3 dB/km")]}


def _water_peak(value):
    """A fibre type's name (``low``, ``legacy``, ``none``), or the OH peak's height [dB/m]."""
    if isinstance(value, str) and value.strip()[:1].isalpha():
        if value not in silica.HYDROXYL_PEAK_HEIGHT_DB_PER_KM:
            raise ValueError(f"water_peak is one of {', '.join(silica.HYDROXYL_PEAK_HEIGHT_DB_PER_KM)} "
                             f"or a height such as 0.3 dB/km; got {value!r}")
        return value
    return RANGES["fibre attenuation"].check(parse_quantity(value, "attenuation", "0.3 dB/km"))


class SilicaAttenuation(Strict):
    """A fibre's attenuation from the spectral model of silica fibre: Rayleigh scattering, a flat
    term, the infrared tail and the OH peak
    (:func:`linkbudget.physics.silica_attenuation.silica_fibre_attenuation_db_per_km`).

    ``water_peak``: ``low`` (low-water-peak fibre, ITU-T G.652.D), ``legacy`` (G.652.A/B), ``none``,
    or the peak's height above the rest of the spectrum (e.g. ``0.3 dB/km``). ``rayleigh_at_1um``:
    the Rayleigh term at 1 µm (A of A/λ⁴, λ in µm); ``excess``: the wavelength-independent term B
    (spread allowed: it carries the fibre-to-fibre and cabling spread into the budget cases).
    """

    model: Literal["silica"] = Field(description="The spectral model of silica fibre.")
    water_peak: Annotated[str | float, BeforeValidator(_water_peak), _WaterPeakSchema()] = Field(
        description="The OH peak at 1383 nm: low (G.652.D fibre), legacy (G.652.A/B), none, or its height.")
    rayleigh_at_1um: quantity("attenuation", bounds=RANGES["fibre attenuation"]) = Field(
        default=f"{silica.RAYLEIGH_COEFFICIENT_DB_PER_KM_UM4} dB/km", validate_default=True,
        description="Rayleigh scattering at 1 µm, A of A/λ⁴.")
    excess: spread("attenuation", bounds=RANGES["fibre attenuation"]) = Field(
        default=f"{silica.WAVELENGTH_INDEPENDENT_DB_PER_KM} dB/km", validate_default=True,
        description="The wavelength-independent term B (imperfections, microbending, cabling).")

    @property
    def water_peak_db_per_km(self):
        """The OH peak's height [dB/km]."""
        if isinstance(self.water_peak, str):
            return silica.HYDROXYL_PEAK_HEIGHT_DB_PER_KM[self.water_peak]
        return self.water_peak * 1e3

    def at(self, wavelength_m):
        """The model on ``wavelength_m`` [dB/m] as a :class:`SpectralValue` whose spread is that of
        ``excess``, with a note where the wavelength lies outside the model's stated range."""
        base_db_per_m = 1e-3 * silica.silica_fibre_attenuation_db_per_km(
            wavelength_m, water_peak_db_per_km=self.water_peak_db_per_km,
            rayleigh_db_per_km_um4=self.rayleigh_at_1um * 1e3, floor_db_per_km=0.0)
        excess = self.excess
        low_m, high_m = silica.MODEL_RANGE_M
        outside = wavelength_m[(wavelength_m < low_m) | (wavelength_m > high_m)]
        notes = () if not outside.size else (
            f"attenuation: the silica model is stated for {low_m * 1e9:g}-{high_m * 1e9:g} nm; used here at "
            f"{span_text(outside * 1e9, 6, ' nm')}",)
        form = _form([excess])
        return SpectralValue(base_db_per_m + excess.low, base_db_per_m + excess.typ_value,
                             base_db_per_m + excess.high, form,
                             None if excess.mean is None else base_db_per_m + excess.mean,
                             None if excess.sigma is None else np.full(wavelength_m.shape, excess.sigma), notes)


def _wavelength_key(key):
    """A table key as a wavelength [m]; raises :class:`InputProblem` at the key."""
    bounds = RANGES["wavelength"]
    if isinstance(key, bool) or not isinstance(key, (str, int, float)):
        raise InputProblem((key,), "a table key is a wavelength with its unit, e.g. 1310 nm")
    try:
        wavelength_m = parse_quantity(key, "length", "1310 nm")
    except UnitError as error:
        raise InputProblem((key,), f"a table key is a wavelength: {error}", error.hint) from None
    problem = bounds.problem(wavelength_m)
    if problem is not None:
        raise InputProblem((key,), problem)
    return wavelength_m


def _is_table(value):
    """A mapping is a table when one of its keys is a number or reads as a wavelength."""
    def wavelength_like(key):
        return isinstance(key, (int, float)) and not isinstance(key, bool) or (
            isinstance(key, str) and key[:1].isdigit())

    return isinstance(value, dict) and (HOLD_ENDS in value or any(wavelength_like(key) for key in value))


def _prefixed(error, key):
    """``error`` (a ``ValidationError`` of one table entry) with its locations under ``key``."""
    return ValidationError.from_exception_data(error.title, [
        {"type": item["type"], "loc": (key, *item["loc"]), "input": item["input"],
         **({"ctx": item["ctx"]} if "ctx" in item else {})} for item in error.errors()])


def _table(value, entry_type):
    """Parse a table mapping (see the module docstring) into a :class:`SpectralTable`."""
    hold_ends = value.get(HOLD_ENDS, False)
    if not isinstance(hold_ends, bool):
        raise InputProblem((HOLD_ENDS,), f"{HOLD_ENDS} is true or false, got {hold_ends!r}")
    adapter = TypeAdapter(entry_type)
    wavelengths_m, entries = [], []
    for key, entry in value.items():
        if key == HOLD_ENDS:
            continue
        wavelength_m = _wavelength_key(key)
        if wavelengths_m and wavelength_m <= wavelengths_m[-1]:
            raise InputProblem((key,), f"table wavelengths must increase: {key} comes after {nm(wavelengths_m[-1])}")
        try:
            entries.append(adapter.validate_python(entry))
        except ValidationError as error:
            raise _prefixed(error, key) from None
        wavelengths_m.append(wavelength_m)
    if len(entries) < 2:
        raise InputProblem((), "a table over wavelength needs at least two entries (one value needs no table)")
    return SpectralTable(tuple(wavelengths_m), tuple(entries), hold_ends)


def _model(value, models):
    """Validate ``{model: NAME, ...}`` by the model class of NAME; unknown keys are placed with a hint."""
    if not models:
        raise InputProblem(("model",), "a spectral model (model: silica) is for a fibre's attenuation; "
                           "give a value, a spread or a table over wavelength")
    name = value["model"]
    if not isinstance(name, str) or name not in models:
        raise InputProblem(("model",), f"unknown spectral model {name!r}; models: {', '.join(models)}")
    allowed = [field.alias or key for key, field in models[name].model_fields.items()]
    for key in value:
        if key not in allowed:
            close = difflib.get_close_matches(str(key), allowed, n=1)
            raise InputProblem((key,), f"unknown key '{key}'",
                               f"did you mean '{close[0]}'?" if close else f"allowed keys: {', '.join(allowed)}")
    return models[name].model_validate(value)


@dataclass(frozen=True)
class _SpectralSchema:
    """The JSON Schema of a value that may be a table over wavelength or a spectral model: the
    value's own schema, a table (wavelength keys with their unit, ``hold_ends``, each entry of the
    value's schema) or one of ``models``. Asked for only when a schema is built
    (:mod:`linkbudget.config.json_schema`), never while a link is validated."""

    models: tuple = ()

    def __get_pydantic_json_schema__(self, core_schema, handler):
        from linkbudget.config.json_schema import quantity_pattern_of

        entry = handler(core_schema)
        table = {"type": "object", "title": "Table over wavelength",
                 "description": "Values at wavelengths in increasing order, interpolated linearly; "
                                f"`{HOLD_ENDS}: true` holds the end values beyond the table.",
                 "propertyNames": {"anyOf": [{"const": HOLD_ENDS}, {"pattern": quantity_pattern_of("length")}]},
                 "properties": {HOLD_ENDS: {"type": "boolean", "title": "Hold ends",
                                            "description": "Hold the first and last entries' values beyond "
                                                           "them (default false: a wavelength outside is an error)."}},
                 "additionalProperties": entry, "minProperties": 2}
        for model in self.models:
            model.model_rebuild()
        return {"anyOf": [entry, table, *(handler(model.__pydantic_core_schema__) for model in self.models)]}


def spectral(entry_type, *, models=None):
    """The field type of a datasheet value ``entry_type`` that may also be a table over wavelength
    (:class:`SpectralTable`), or, with ``models`` (name -> model class), a spectral model written
    ``{model: NAME, ...}``."""
    models = models or {}

    def table_or_value(value, handler):
        if isinstance(value, dict) and "model" in value:
            return _model(value, models)
        if _is_table(value):
            return _table(value, entry_type)
        return handler(value)

    return Annotated[entry_type, WrapValidator(table_or_value), _SpectralSchema(tuple(models.values()))]


def spectral_keys(segment):
    """The keys of ``segment`` whose value is a table or a spectral model."""
    return [key for key in type(segment).model_fields
            if isinstance(getattr(segment, key), (SpectralTable, SilicaAttenuation))]


def resolve_spectral(segment, wavelength_m):
    """``segment`` with every table and spectral model resolved on ``wavelength_m`` into a
    :class:`SpectralValue`; an :class:`InputProblem` at the key of a table the axis leaves."""
    resolved = {}
    for key in spectral_keys(segment):
        try:
            resolved[key] = getattr(segment, key).at(wavelength_m)
        except InputProblem as problem:
            raise InputProblem((key, *problem.key_path), str(problem), problem.hint) from None
    return segment.model_copy(update=resolved) if resolved else segment


def spectral_notes(segment):
    """Notes of the resolved spectral values of ``segment`` (a model used outside its range)."""
    return [note for value in vars(segment).values() if isinstance(value, SpectralValue) for note in value.notes()]



def typical(value):
    """The typical value of a plain quantity (a float) or of a resolved :class:`SpectralValue`
    (an array over the wavelength axis)."""
    return value.typ_value if isinstance(value, SpectralValue) else value
