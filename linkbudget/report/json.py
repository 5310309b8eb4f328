"""The JSON result: a versioned, documented contract other tools read.

Schema ``linkbudget.result/3`` (documented in ``docs/json-result.md``). Every per-wavelength
value is a list over ``wavelengths_nm``; every budget quantity is an object keyed by case
(``typ``, ``worst``, ``best``). Numbers are rounded to a fixed resolution so that a result
diffs cleanly (:data:`DB_RESOLUTION_DECIMALS`, :data:`WAVELENGTH_RESOLUTION_DECIMALS`). A null
stands only where total internal reflection blocks the light (see ``total_internal_reflection``).

The result is built once as a document whose per-wavelength lists are still arrays
(:class:`_Numbers`): :func:`result_dict` turns them into plain lists, :func:`json_chunks` writes
them slice by slice, so a sweep of 100,000 wavelengths is never one string in memory.
"""

import json
import math
from functools import cache

import numpy as np

from linkbudget import __version__
from linkbudget.segments.cases import CASES

SCHEMA = "linkbudget.result/3"

#: Decimals of every dB and dBm number written (1e-9 dB).
DB_RESOLUTION_DECIMALS = 9
#: Decimals of every power fraction written (reflectance, absorptance: 1e-12).
FRACTION_RESOLUTION_DECIMALS = 12
#: Decimals of every wavelength written in nm (1e-6 nm, as printed).
WAVELENGTH_RESOLUTION_DECIMALS = 6

#: Numbers converted and written at a time: bounds the memory of writing a long list.
SLICE_NUMBERS = 65_536

#: Lists up to this length are rounded value by value (see :func:`_number_list`).
_SHORT_LIST = 32

#: Indentation of the written JSON (that of ``json.dumps(..., indent=2)``).
_INDENT = "  "
#: Between the numbers of a list (that of ``json.dumps``).
_SEPARATOR = ", "


def _number(value, decimals):
    """A finite value rounded to ``decimals`` (no float noise such as ``1550.0000000000002``, no
    ``-0.0``); ``None`` for a value that is not finite."""
    return round(value, decimals) + 0.0 if math.isfinite(value) else None


def _number_list(values, decimals):
    """:func:`_number` of each of ``values`` (a float array), vectorised.

    ``rint(x·10^d)/10^d`` is Python's ``round(x, d)`` (the exact binary value rounded half to
    even, then the nearest double) except where the product's own rounding may cross a half;
    those few values, and any too large for the product, take :func:`round` itself; so do lists
    of up to :data:`_SHORT_LIST` values, where numpy's calls cost more than they save.
    """
    if values.size <= _SHORT_LIST:
        return [_number(value, decimals) for value in values.tolist()]
    scale = 10.0 ** decimals
    scaled, near_tie = _scaled(values, scale)
    with np.errstate(invalid="ignore"):
        rounded = np.rint(scaled) / scale + 0.0
        unsure = near_tie | ~(np.abs(scaled) < 2.0**52)
    numbers = rounded.tolist()
    for index in np.flatnonzero(unsure).tolist():  # non-finite values too: their comparisons are false
        numbers[index] = _number(float(values[index]), decimals)
    return numbers


def _scaled(values, scale):
    """(x·scale, near tie): where the product's own rounding may have crossed a half of the last
    place (or x is not finite: its comparisons are false), so that rint of it may not be round()'s."""
    with np.errstate(invalid="ignore", over="ignore"):
        scaled = values * scale
        distance_from_half = np.abs(scaled - np.floor(scaled) - 0.5)
        return scaled, ~(distance_from_half > np.abs(scaled) * 2.0**-51)  # 2^-51·|y| ≥ 2 ulp(y)


class _Numbers:
    """A per-wavelength list of the document, kept as an array until it is written."""

    __slots__ = ("decimals", "values")

    def __init__(self, values, decimals=DB_RESOLUTION_DECIMALS):
        self.values = np.asarray(values, dtype=float).ravel()
        self.decimals = decimals

    def plain(self):
        return _number_list(self.values, self.decimals)

    def slices(self):
        for start in range(0, self.values.size, SLICE_NUMBERS):
            yield _number_list(self.values[start:start + SLICE_NUMBERS], self.decimals)


def _by_case(arrays, index=None):
    return {case: _Numbers(arrays[case] if index is None else arrays[case][index]) for case in CASES}


def _values(value, decimals=DB_RESOLUTION_DECIMALS):
    """A row's typed value: a mapping (by case, part or polarization) of arrays, or ``None``."""
    if value is None:
        return None
    if isinstance(value, dict):
        return {key: _values(item, decimals) for key, item in value.items()}
    return _Numbers(value, decimals)


def _present(fields):
    """The fields a row has (a row without a reflectance, parts or facts leaves them out)."""
    return {key: value for key, value in fields.items() if value}


def _row_document(result, index):
    """The entry of one budget row (the one place that reads a row)."""
    row = result.rows[index]
    return {
        "id": row.id,
        "name": row.name,
        "kind": row.kind,
        "segment_kind": row.segment_kind,
        "origin": list(row.origin),
        **({"part": {"name": row.part.name, "file": row.part.file}} if row.part is not None else {}),
        "loss_db": _by_case(result.loss_db, index),
        **_present({"loss_parts_db": _values(row.loss_parts_db),
                    "geometric_estimate_db": _values(row.geometric_estimate_db),
                    "reflectance": _values(row.reflectance, FRACTION_RESOLUTION_DECIMALS),
                    "reflectance_high": _values(row.reflectance_high, FRACTION_RESOLUTION_DECIMALS),
                    "polarization_share": _values(row.polarization_share, FRACTION_RESOLUTION_DECIMALS),
                    "absorptance": _values(row.absorptance, FRACTION_RESOLUTION_DECIMALS),
                    "facts": list(row.facts), "notes": list(row.notes)}),
        **({"total_internal_reflection": result.total_internal_reflection[index].tolist()}
           if result.total_internal_reflection[index].any() else {}),
    }


def _document(result):
    """The whole result, its per-wavelength lists still as :class:`_Numbers`."""
    governing = result.governing_index
    return {
        "schema": SCHEMA,
        "tool": {"name": "linkbudget", "version": __version__},
        "title": result.title,
        "description": result.description,
        "file": result.file,
        "wavelengths_nm": _Numbers(result.wavelength_m * 1e9, WAVELENGTH_RESOLUTION_DECIMALS),
        "source": {"name": result.source_name},
        "source_dbm": _by_case(result.source_dbm),
        "receiver": {
            "name": result.receiver_name,
            "sensitivity_dbm": _number(result.sensitivity_dbm, DB_RESOLUTION_DECIMALS),
            "overload_dbm": (None if result.overload_dbm is None
                             else _number(result.overload_dbm, DB_RESOLUTION_DECIMALS)),
            "required_margin_db": _number(result.required_margin_db, DB_RESOLUTION_DECIMALS),
        },
        "rows": [_row_document(result, index) for index in range(len(result.rows))],
        "total_loss_db": _by_case({case: losses[-1] for case, losses in result.cumulative_loss_db.items()}),
        "received_dbm": _by_case(result.received_dbm),
        "margin_db": _by_case(result.margin_db),
        "governing_wavelength_nm": _number(float(result.wavelength_m[governing] * 1e9),
                                           WAVELENGTH_RESOLUTION_DECIMALS),
        "margin_ok": result.margin_ok,
        "overload_ok": result.overload_ok,
        "closes": result.closes,
        "notes": list(result.notes),
        **_review_entries(result),
        "cautions": list(result.cautions),
        **({} if result.statistics is None else {"statistics": _statistics_document(result)}),
    }


def _by_probability(arrays):
    """probability as its text (``"0.001"``) -> the array over the wavelengths."""
    return {f"{probability:g}": _Numbers(values) for probability, values in arrays.items()}


def _statistics_document(result):
    """The statistical budget (:class:`linkbudget.statistics.Statistics`) of the result."""
    stats = result.statistics

    def fraction(values):
        return None if values is None else _Numbers(values, FRACTION_RESOLUTION_DECIMALS)

    return {
        "trials": stats.trials,
        "seed": stats.seed,
        "margin_db": {"mean": _Numbers(stats.margin_mean_db), "std": _Numbers(stats.margin_std_db),
                      "quantiles": _by_probability(stats.margin_quantiles_db)},
        "probability_below_required_margin": fraction(stats.probability_below_required),
        "probability_above_overload": fraction(stats.probability_overload),
        "yield": _number(stats.yield_fraction, FRACTION_RESOLUTION_DECIMALS),
        "governing_wavelength_nm": _number(float(result.wavelength_m[stats.governing_index] * 1e9),
                                           WAVELENGTH_RESOLUTION_DECIMALS),
        "rss_db": {"std": _Numbers(stats.rss_std_db), "quantiles": _by_probability(stats.rss_quantiles_db)},
        "contributions": [{"id": item.row_id, "name": item.name, "std_db": _Numbers(item.std_db),
                           "variance_share": fraction(item.share)} for item in stats.contributions],
    }


def _review_numbers(values, *, wavelength=False, fraction=False):
    decimals = (WAVELENGTH_RESOLUTION_DECIMALS if wavelength else FRACTION_RESOLUTION_DECIMALS if fraction
                else DB_RESOLUTION_DECIMALS)
    return _Numbers(values, decimals)


def _review_entries(result):
    """The ``safety``, ``back_reflection`` and ``polarization_dependent_loss`` objects (none for a
    result built without its review)."""
    if result.review is None:
        return {}
    from linkbudget.report.review_json import back_reflection_entry, polarization_loss_entry, safety_entry

    def number(value):
        return _number(value, DB_RESOLUTION_DECIMALS)

    return {"safety": safety_entry(result, _review_numbers, number),
            "back_reflection": back_reflection_entry(result, _review_numbers, number),
            "polarization_dependent_loss": polarization_loss_entry(result, _review_numbers)}


def _plain(value):
    if isinstance(value, _Numbers):
        return value.plain()
    if isinstance(value, dict):
        return {key: _plain(item) for key, item in value.items()}
    if isinstance(value, list):
        return [_plain(item) for item in value]
    return value


def result_dict(result):
    """The whole result as plain JSON-ready data."""
    return _plain(_document(result))


def json_text(data):
    """Plain JSON-ready ``data`` as every JSON file of the tool is laid out (:func:`_encoded`),
    with a final newline."""
    return "".join(_encoded(data, 0)) + "\n"


def json_chunks(result):
    """The JSON text of the result in pieces, in order: together they are :func:`json_text` of
    :func:`result_dict`, but no piece holds more than :data:`SLICE_NUMBERS` numbers."""
    yield from _encoded(_document(result), 0)
    yield "\n"


def _encoded(value, depth):
    """Pieces of ``value`` as ``json.dumps(value, indent=2)`` writes it at nesting ``depth``, but
    for a list of numbers, booleans and nulls, written on one line (:func:`_is_flat`)."""
    if isinstance(value, _Numbers):
        yield from _encoded_numbers(value)
        return
    if not isinstance(value, dict | list) or not value or _is_flat(value):
        yield json.dumps(value)
        return
    inner = "\n" + _INDENT * (depth + 1)
    is_dict = isinstance(value, dict)
    yield "{" if is_dict else "["
    for position, (key, item) in enumerate(value.items() if is_dict else enumerate(value)):
        yield ("," if position else "") + inner + (json.dumps(key) + ": " if is_dict else "")
        yield from _encoded(item, depth + 1)
    yield "\n" + _INDENT * depth + ("}" if is_dict else "]")


def _is_flat(value):
    """Whether ``value`` is a list of numbers, booleans and nulls only (one line in the JSON)."""
    return isinstance(value, list) and all(item is None or isinstance(item, int | float) for item in value)


def _encoded_numbers(numbers):
    """A number list on one line, slice by slice: in fixed decimals where that is Python's float
    repr (:func:`_fixed_decimal_text`), else through the compact C encoder."""
    yield "["
    for position, start in enumerate(range(0, numbers.values.size, SLICE_NUMBERS)):
        values = numbers.values[start:start + SLICE_NUMBERS]
        text = _fixed_decimal_text(values, numbers.decimals)
        if text is None:
            text = json.dumps(_number_list(values, numbers.decimals))[1:-1]
        yield (_SEPARATOR if position else "") + text
    yield "]"


def _fixed_decimal_text(values, decimals):
    """The values rounded to ``decimals`` and written as ``repr`` writes the rounded floats, joined
    by :data:`_SEPARATOR`; ``None`` where that is not sure for every value.

    The scaled integer k = rint(x·10^d) is exact where :func:`_number_list` is sure, and the
    rounded float is the double nearest to k/10^d (near ties take k from :func:`round`); below
    2^(52 − 3.33·d) its ulp is under 10^−d, so no other decimal of d places or fewer maps to it
    and its shortest repr is k/10^d itself, the fraction's trailing zeros dropped (one kept).
    ``repr`` switches to an exponent below 1e-4, so those values, non-finite ones and whole parts
    of more than four digits are left to the caller.

    Each number is one fixed-width record of bytes, ``", "``, sign, four-digit groups of its
    whole part and fraction looked up in tables and written as 32-bit words (the places a number
    does not use left NUL), and the NULs are then dropped from all records at once.
    """
    scale = 10 ** decimals
    if values.size <= _SHORT_LIST or not np.isfinite(values).all():
        return None
    scaled, near_tie = _scaled(values, float(scale))
    rounded = np.rint(scaled)
    magnitude, negative = np.abs(rounded), rounded < 0  # rint(-0.3) is -0.0: not negative
    for index in np.flatnonzero(near_tie).tolist():  # a near tie: round()'s
        rounded_value = round(_number(float(values[index]), decimals) * scale)
        magnitude[index], negative[index] = abs(rounded_value), rounded_value < 0
    if not (magnitude.max() < 2.0 ** (52 - 3.33 * decimals) * scale
            and np.all((magnitude == 0) | (magnitude >= scale / 1e4))):
        return None
    units = magnitude.astype(np.int64)
    whole = units // scale
    fraction = units - whole * scale
    whole_places = len(str(int(whole.max())))
    if whole_places > 4:
        return None
    width = len(_SEPARATOR) + 2 + whole_places + decimals  # separator, sign, whole, point, fraction
    records = np.empty(values.size * width, dtype=np.uint8)
    groups = _digit_groups(fraction, decimals)
    words = _group_words(decimals - 4 * (len(groups) - 1))
    zeros_after = True  # whether every group after this one is zero: this one's trailing zeros go
    for position, (group, places_after) in enumerate(groups):  # each ends places_after before the end
        trimmed = _KEEP_FIRST_PLACE if position == len(groups) - 1 else _TRIMMED
        _column(records, width, width - places_after - 4, "<u4")[...] = words[group + zeros_after * trimmed]
        zeros_after = zeros_after & (group == 0)
    point = width - decimals - 1
    _column(records, width, point - 4, "<u4")[...] = _RIGHT_ALIGNED_DIGITS[whole]  # its spill is rewritten below
    _column(records, width, point, "u1")[...] = ord(".")
    for place, character in enumerate(_SEPARATOR.encode("ascii")):
        _column(records, width, place, "u1")[...] = character
    _column(records, width, len(_SEPARATOR), "u1")[...] = negative.view(np.uint8) * np.uint8(ord("-"))
    return records.tobytes().translate(None, b"\0")[len(_SEPARATOR):].decode("ascii")


def _digit_groups(fraction, decimals):
    """The four-digit groups of the ``decimals``-place fractions (integers below 10^decimals),
    last first, each with the number of places after it; the first group may hold fewer places."""
    groups, rest = [], fraction
    for places_after in range(0, decimals - 4, 4):
        above = rest // 10_000
        groups.append((rest - above * 10_000, places_after))
        rest = above
    return [*groups, (rest, 4 * len(groups))]


def _column(records, width, offset, dtype):
    """The field at byte ``offset`` of every ``width``-byte record, as an array of ``dtype``
    (little-endian words may sit at any byte)."""
    return np.ndarray((records.size // width,), dtype=dtype, buffer=records, offset=offset, strides=(width,))


def _digit_tables():
    """(zero-padded, right-aligned with NUL for leading zeros) ASCII of 0 to 9999 in four places,
    as little-endian 32-bit words (the first place lowest)."""
    numbers = np.arange(10_000)
    padded = np.stack([numbers // 10 ** (3 - place) % 10 for place in range(4)], axis=1).astype(np.uint8) + ord("0")
    shown = (numbers[:, None] >= 10 ** (3 - np.arange(4))) | (np.arange(4) == 3)
    return padded, np.where(shown, padded, 0).astype(np.uint8)


_PADDED_PLACES, _RIGHT_ALIGNED_PLACES = _digit_tables()
_RIGHT_ALIGNED_DIGITS = _RIGHT_ALIGNED_PLACES.view("<u4").ravel()
#: Offsets into :func:`_group_words`: a group as it is, its trailing zeros NUL, and the same but
#: for the fraction's first place (the first group's, which ``repr`` keeps: "3.0").
_TRIMMED, _KEEP_FIRST_PLACE = 10_000, 20_000


@cache
def _group_words(first_group_places):
    """Words of the four-digit groups 0 to 9999: as they are, with their trailing zeros NUL, and
    the same keeping the fraction's first place (place 4 − ``first_group_places`` of the first group)."""
    trailing = np.cumprod((_PADDED_PLACES == ord("0"))[:, ::-1], axis=1)[:, ::-1].astype(bool)
    trimmed = np.where(trailing, 0, _PADDED_PLACES).astype(np.uint8)
    keep_first = trimmed.copy()
    keep_first[:, 4 - first_group_places] = _PADDED_PLACES[:, 4 - first_group_places]
    return np.concatenate([_PADDED_PLACES, trimmed, keep_first]).view("<u4").ravel()
