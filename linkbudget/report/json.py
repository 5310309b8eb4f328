"""The JSON result: a versioned, documented contract other tools read.

Schema ``linkbudget.result/2`` (documented in ``docs/json-result.md``). Every per-wavelength
value is a list over ``wavelengths_nm``; every budget quantity is an object keyed by case
(``typ``, ``worst``, ``best``). Numbers are rounded to a fixed resolution so that a result
diffs cleanly (:data:`DB_RESOLUTION_DECIMALS`, :data:`WAVELENGTH_RESOLUTION_DECIMALS`). A null
stands only where total internal reflection blocks the light (see ``total_internal_reflection``).
"""

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


def _numbers(values, decimals=DB_RESOLUTION_DECIMALS):
    """Finite values rounded to ``decimals`` (no float noise such as ``1550.0000000000002``,
    no ``-0.0``); ``None`` for a value that is not finite."""
    return [round(value, decimals) + 0.0 if math.isfinite(value) else None
            for value in np.asarray(values, dtype=float).ravel().tolist()]


def _by_case(arrays, index=None):
    return {case: _numbers(arrays[case] if index is None else arrays[case][index]) for case in CASES}


def _values(value, decimals=DB_RESOLUTION_DECIMALS):
    """A row's typed value as JSON: a mapping (by case, part or polarization) of arrays, or ``None``."""
    if value is None:
        return None
    if isinstance(value, dict):
        return {key: _values(item, decimals) for key, item in value.items()}
    return _numbers(value, decimals)


def _present(fields):
    """The fields a row has (a row without a reflectance, parts or facts leaves them out)."""
    return {key: value for key, value in fields.items() if value}


def row_dict(result, index):
    """The JSON object of one budget row."""
    row = result.rows[index]
    return {
        "id": row.id,
        "name": row.name,
        "kind": row.kind,
        "segment_kind": row.segment_kind,
        "origin": list(row.origin),
        "loss_db": _by_case(result.loss_db, index),
        "cumulative_loss_db": _by_case(result.cumulative_loss_db, index),
        "power_after_dbm": _by_case(result.power_after_dbm, index),
        **_present({"loss_parts_db": _values(row.loss_parts_db),
                    "geometric_estimate_db": _values(row.geometric_estimate_db),
                    "reflectance": _values(row.reflectance, FRACTION_RESOLUTION_DECIMALS),
                    "polarization_share": _values(row.polarization_share, FRACTION_RESOLUTION_DECIMALS),
                    "absorptance": _values(row.absorptance, FRACTION_RESOLUTION_DECIMALS),
                    "facts": list(row.facts), "notes": list(row.notes)}),
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
            "sensitivity_dbm": _numbers([result.sensitivity_dbm])[0],
            "overload_dbm": None if result.overload_dbm is None else _numbers([result.overload_dbm])[0],
            "required_margin_db": _numbers([result.required_margin_db])[0],
        },
        "rows": [row_dict(result, index) for index in range(len(result.rows))],
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
