"""The JSON result: a versioned, documented contract other tools read.

Schema ``linkbudget.result/1`` (documented in ``docs/json-result.md``). Every per-wavelength
value is a list over ``wavelengths_nm``; every budget quantity is an object keyed by case
(``typ``, ``worst``, ``best``). Numbers are rounded to a fixed resolution so that a result
diffs cleanly (:data:`DB_RESOLUTION_DECIMALS`, :data:`WAVELENGTH_RESOLUTION_DECIMALS`). A null
stands only where total internal reflection blocks the light (see ``total_internal_reflection``).
"""

import math

import numpy as np

from linkbudget import __version__
from linkbudget.config.fields import CASES

SCHEMA = "linkbudget.result/1"

#: Decimals of every dB and dBm number written (1e-9 dB).
DB_RESOLUTION_DECIMALS = 9
#: Decimals of every power fraction written (reflectance, absorptance: 1e-12).
FRACTION_RESOLUTION_DECIMALS = 12
#: Decimals of every wavelength written in nm (1e-6 nm, as printed).
WAVELENGTH_RESOLUTION_DECIMALS = 6


def _numbers(values, decimals=DB_RESOLUTION_DECIMALS):
    """Finite values rounded to ``decimals`` (no float noise such as ``1550.0000000000002``,
    no ``-0.0``); ``None`` for a value that is not finite."""
    return [round(value, decimals) + 0.0 if math.isfinite(value) else None
            for value in np.asarray(values, dtype=float).ravel().tolist()]


def _by_case(arrays, index=None):
    return {case: _numbers(arrays[case] if index is None else arrays[case][index]) for case in CASES}


def _detail(value, decimals=DB_RESOLUTION_DECIMALS):
    if isinstance(value, dict):
        return {key: _detail(item, decimals) for key, item in value.items()}
    if isinstance(value, np.ndarray):
        return _numbers(value, decimals)
    if isinstance(value, float):
        return _numbers([value], decimals)[0]
    return value


def _decimals_of(key):
    """dB and dBm values to 1e-9; every other number of a row (a power fraction) to 1e-12."""
    return DB_RESOLUTION_DECIMALS if key.endswith(("_db", "_dbm")) else FRACTION_RESOLUTION_DECIMALS


def segment_dict(result, index):
    """The JSON object of one budget row."""
    row = result.rows[index]
    return {
        "name": row.name,
        "kind": row.kind,
        "loss_db": _by_case(result.loss_db, index),
        "cumulative_loss_db": _by_case(result.cumulative_loss_db, index),
        "power_after_dbm": _by_case(result.power_after_dbm, index),
        **{key: _detail(value, _decimals_of(key)) for key, value in row.detail.items()},
        **({"total_internal_reflection": [bool(value) for value in result.total_internal_reflection[index]]}
           if result.total_internal_reflection[index].any() else {}),
    }


def result_dict(result):
    """The whole result as plain JSON-ready data."""
    governing = result.governing_index
    return {
        "schema": SCHEMA,
        "tool": {"name": "linkbudget", "version": __version__},
        "title": result.title,
        "description": result.description,
        "file": result.file,
        "wavelengths_nm": _numbers(result.wavelength_m * 1e9, WAVELENGTH_RESOLUTION_DECIMALS),
        "source": {"name": result.source_name},
        "source_dbm": _by_case(result.source_dbm),
        "receiver": {
            "name": result.receiver_name,
            "sensitivity_dbm": _detail(result.sensitivity_dbm),
            "overload_dbm": None if result.overload_dbm is None else _detail(result.overload_dbm),
            "required_margin_db": _detail(result.required_margin_db),
        },
        "segments": [segment_dict(result, index) for index in range(len(result.rows))],
        "total_loss_db": _by_case({case: losses[-1] for case, losses in result.cumulative_loss_db.items()}),
        "received_dbm": _by_case(result.received_dbm),
        "margin_db": _by_case(result.margin_db),
        "governing_wavelength_nm": _numbers(result.wavelength_m[governing] * 1e9, WAVELENGTH_RESOLUTION_DECIMALS)[0],
        "margin_ok": result.margin_ok,
        "overload_ok": result.overload_ok,
        "closes": result.closes,
        "notes": list(result.notes),
        "cautions": list(result.cautions),
    }
