"""The JSON result: a versioned, documented contract other tools read.

Schema ``linkbudget.result/1`` (documented in ``docs/json-result.md``). Every per-wavelength
value is a list over ``wavelengths_nm``; every budget quantity is an object keyed by case
(``typ``, ``worst``, ``best``). Non-finite numbers (a row that blocks all light) are ``null``.
"""

import math

import numpy as np

from linkbudget import __version__
from linkbudget.config.fields import CASES

SCHEMA = "linkbudget.result/1"


def _numbers(values):
    return [float(value) if math.isfinite(value) else None for value in np.asarray(values, dtype=float).ravel()]


def _by_case(arrays, index=None):
    return {case: _numbers(arrays[case] if index is None else arrays[case][index]) for case in CASES}


def _detail(value):
    if isinstance(value, dict):
        return {key: _detail(item) for key, item in value.items()}
    if isinstance(value, np.ndarray):
        return _numbers(value)
    if isinstance(value, float):
        return _numbers([value])[0]
    return value


def segment_dict(result, index):
    """The JSON object of one budget row."""
    row = result.rows[index]
    return {
        "name": row.name,
        "kind": row.kind,
        "loss_db": _by_case(result.loss_db, index),
        "cumulative_loss_db": _by_case(result.cumulative_loss_db, index),
        "power_after_dbm": _by_case(result.power_after_dbm, index),
        **{key: _detail(value) for key, value in row.detail.items()},
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
        "file": result.file,
        "wavelengths_nm": _numbers(result.wavelength_m * 1e9),
        "source_dbm": _by_case(result.source_dbm),
        "receiver": {
            "sensitivity_dbm": result.sensitivity_dbm,
            "overload_dbm": result.overload_dbm,
            "required_margin_db": result.required_margin_db,
        },
        "segments": [segment_dict(result, index) for index in range(len(result.rows))],
        "total_loss_db": _by_case({case: losses[-1] for case, losses in result.cumulative_loss_db.items()}),
        "received_dbm": _by_case(result.received_dbm),
        "margin_db": _by_case(result.margin_db),
        "governing_wavelength_nm": float(result.wavelength_m[governing] * 1e9),
        "margin_ok": result.margin_ok,
        "overload_ok": result.overload_ok,
        "closes": result.closes,
        "notes": list(result.notes),
        "cautions": list(result.cautions),
    }
