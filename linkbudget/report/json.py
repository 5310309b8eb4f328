"""The JSON result: a versioned, documented contract other tools read.

Schema ``linkbudget.result/2`` (documented in ``docs/json-result.md``). Every per-wavelength
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

import numpy as np

from linkbudget import __version__
from linkbudget.segments.cases import CASES

SCHEMA = "linkbudget.result/2"

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
        return scaled, ~(distance_from_half > 2 * np.spacing(np.abs(scaled)))


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
        "cumulative_loss_db": _by_case(result.cumulative_loss_db, index),
        "power_after_dbm": _by_case(result.power_after_dbm, index),
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


def json_chunks(result):
    """The JSON text of the result in pieces, in order: together they are exactly
    ``json.dumps(result_dict(result), indent=2) + "\\n"``, but no piece holds more than
    :data:`SLICE_NUMBERS` numbers."""
    yield from _encoded(_document(result), 0)
    yield "\n"


def _encoded(value, depth):
    """Pieces of ``value`` as ``json.dumps(value, indent=2)`` writes it at nesting ``depth``."""
    if isinstance(value, _Numbers):
        yield from _encoded_numbers(value, depth)
        return
    if not isinstance(value, dict | list) or not value:
        yield json.dumps(value)
        return
    inner = "\n" + _INDENT * (depth + 1)
    is_dict = isinstance(value, dict)
    yield "{" if is_dict else "["
    for position, (key, item) in enumerate(value.items() if is_dict else enumerate(value)):
        yield ("," if position else "") + inner + (json.dumps(key) + ": " if is_dict else "")
        yield from _encoded(item, depth + 1)
    yield "\n" + _INDENT * depth + ("}" if is_dict else "]")


def _encoded_numbers(numbers, depth):
    """A number list, one number a line as ``indent=2`` writes it, slice by slice: in fixed
    decimals where that is Python's float repr (:func:`_fixed_decimal_text`), else through the
    compact C encoder with its line breaks put in by one replacement."""
    if not numbers.values.size:
        yield "[]"
        return
    inner = "\n" + _INDENT * (depth + 1)
    separator = "," + inner
    for position, start in enumerate(range(0, numbers.values.size, SLICE_NUMBERS)):
        values = numbers.values[start:start + SLICE_NUMBERS]
        text = _fixed_decimal_text(values, numbers.decimals, separator)
        if text is None:
            text = json.dumps(_number_list(values, numbers.decimals))[1:-1].replace(", ", separator)
        yield (separator if position else "[" + inner) + text
    yield "\n" + _INDENT * depth + "]"


def _fixed_decimal_text(values, decimals, separator):
    """The values rounded to ``decimals`` and written as ``repr`` writes the rounded floats, joined
    by ``separator``, built as one byte matrix; ``None`` where that is not sure for every value.

    The scaled integer k = rint(x·10^d) is exact where :func:`_number_list` is sure, and the
    rounded float is the double nearest to k/10^d (near ties take k from :func:`round`); below
    2^(52 − 3.33·d) its ulp is under 10^−d, so no other decimal of d places or fewer maps to it
    and its shortest repr is k/10^d itself, the fraction's trailing zeros dropped (one kept).
    ``repr`` switches to an exponent below 1e-4, so those values, and non-finite ones, are left
    to the caller.
    """
    scale = 10 ** decimals
    if values.size <= _SHORT_LIST or not np.isfinite(values).all():
        return None
    scaled, near_tie = _scaled(values, float(scale))
    magnitude = np.abs(np.rint(scaled))
    for index in np.flatnonzero(near_tie).tolist():
        magnitude[index] = abs(round(_number(float(values[index]), decimals) * scale))  # a near tie: round()'s
    if not np.all((magnitude < 2.0 ** (52 - 3.33 * decimals) * scale)
                  & ((magnitude == 0) | (magnitude >= scale / 1e4))):
        return None
    whole = np.floor(magnitude / scale)  # exact: magnitude < 2^53, and its fraction is ≥ 1/scale or 0
    fraction = magnitude - whole * scale
    whole_places = len(str(int(whole.max())))
    # One row per number, one column per character place, each filled column by column.
    sign_column, point_column = 1, 2 + whole_places
    chars = np.empty((values.size, 3 + whole_places + decimals), dtype=np.uint8)
    chars[:, 0], chars[:, sign_column], chars[:, point_column] = ord(","), ord("-"), ord(".")
    _write_digits(whole, chars[:, sign_column + 1:point_column])
    fraction_groups = _write_digits(fraction, chars[:, point_column + 1:])
    keep = np.ones(chars.shape, dtype=bool)
    keep[:, sign_column] = (scaled < 0) & (magnitude > 0)
    for place in range(whole_places - 1):  # a leading zero is kept only as the whole part "0"
        keep[:, sign_column + 1 + place] = whole >= 10.0 ** (whole_places - 1 - place)
    kept_decimals = decimals - _trailing_zeros(fraction_groups)  # one at least: "3.0"
    for place in range(1, decimals):
        keep[:, point_column + 1 + place] = kept_decimals > place
    written = np.compress(keep.ravel(), chars.ravel()).tobytes()
    return written.replace(b",", separator.encode("ascii")).decode("ascii")[len(separator):]


#: The ASCII digits of 0 to 999: row k holds the k-th of the three digits of each number.
_THREE_DIGITS = np.array([list(f"{number:03d}".encode("ascii")) for number in range(1000)], dtype=np.uint8).T.copy()
#: The trailing zeros of the three digits of 0 to 999 (three for 0).
_TRAILING_ZEROS = np.array([3 - len(f"{number:03d}".rstrip("0")) for number in range(1000)])


def _write_digits(integers, out):
    """Write the ASCII digits of non-negative integers held exactly as floats (below 2^53) into
    the (n, places) byte matrix ``out`` (a column per place), zero-padded, three digits a lookup;
    the groups of three (0 to 999), last first."""
    places = out.shape[1]
    groups, rest = [], integers
    for end in range(places, 0, -3):
        above = np.floor(rest / 1000.0)  # exact: the quotient's error is far below its distance to an integer
        groups.append((rest - above * 1000.0).astype(np.intp))
        for place in range(max(0, end - 3), end):
            out[:, place] = _THREE_DIGITS[3 - end + place].take(groups[-1])
        rest = above
    return groups


def _trailing_zeros(groups):
    """The trailing zeros of the numbers whose groups of three digits (last first) are ``groups``."""
    count, zero_so_far = np.zeros(groups[0].shape, dtype=np.intp), np.ones(groups[0].shape, dtype=bool)
    for group in groups:
        count += _TRAILING_ZEROS[group] * zero_so_far
        zero_so_far &= group == 0
    return count
