"""The JSON diff: schema ``linkbudget.diff/1``, documented in ``docs/json-diff.md``.

Written with the result's own JSON writer (:mod:`linkbudget.report.json`): the same rounding of
every number, lists over ``wavelengths_nm`` (the wavelengths both revisions carry), ``null`` for a
change that is not finite (a revision blocked by total internal reflection there).
"""

from linkbudget import __version__
from linkbudget.diff import LOSS_CASES, POWER_CASES
from linkbudget.report.json import (
    DB_RESOLUTION_DECIMALS,
    WAVELENGTH_RESOLUTION_DECIMALS,
    _encoded,
    _number,
    _Numbers,
    _plain,
)

SCHEMA = "linkbudget.diff/1"


def _cases(arrays, cases):
    return {case: _Numbers(arrays[case]) for case in cases}


def _wavelengths(wavelength_m):
    return _Numbers(wavelength_m * 1e9, WAVELENGTH_RESOLUTION_DECIMALS)


def _keys(changes):
    return [{"path": change.path, "old": change.old, "new": change.new} for change in changes]


def _side(side):
    result = side.result
    return {"file": side.label, "title": result.title, "closes": result.closes, "margin_ok": result.margin_ok,
            "overload_ok": result.overload_ok,
            "required_margin_db": _number(result.required_margin_db, DB_RESOLUTION_DECIMALS)}


def _document(diff, max_margin_loss_db):
    return {
        "schema": SCHEMA,
        "tool": {"name": "linkbudget", "version": __version__},
        "old": _side(diff.old),
        "new": _side(diff.new),
        "verdict_changed": diff.verdict_changed,
        "wavelengths_nm": _wavelengths(diff.wavelength_m),
        "only_old_wavelengths_nm": _wavelengths(diff.only_old_wavelength_m),
        "only_new_wavelengths_nm": _wavelengths(diff.only_new_wavelength_m),
        "link_keys": _keys(diff.link_keys),
        "segments": [{"status": change.status, "old_name": change.old_name, "new_name": change.new_name,
                      "kind": change.kind, "keys": _keys(change.keys),
                      "loss_change_db": _cases(change.loss_change_db, LOSS_CASES)} for change in diff.segments],
        "rows": [{"status": change.status, "old_id": change.old_name, "new_id": change.new_name, "kind": change.kind,
                  "loss_change_db": _cases(change.loss_change_db, LOSS_CASES)} for change in diff.rows],
        "received_change_db": _cases(diff.received_change_db, POWER_CASES),
        "margin_change_db": _cases(diff.margin_change_db, LOSS_CASES),
        "margin_db": {"old": _cases(diff.old_margin_db, LOSS_CASES), "new": _cases(diff.new_margin_db, LOSS_CASES)},
        "worst_margin_loss_db": _number(diff.worst_margin_loss_db, DB_RESOLUTION_DECIMALS),
        "gate": {"max_margin_loss_db": (None if max_margin_loss_db is None
                                        else _number(max_margin_loss_db, DB_RESOLUTION_DECIMALS)),
                 "fails": max_margin_loss_db is not None and diff.margin_loss_exceeds(max_margin_loss_db)},
    }


def diff_dict(diff, max_margin_loss_db=None):
    """The diff (:class:`linkbudget.diff.LinkDiff`) as plain JSON-ready data."""
    return _plain(_document(diff, max_margin_loss_db))


def diff_json_chunks(diff, max_margin_loss_db=None):
    """The JSON text of the diff in pieces (together :func:`~linkbudget.report.json.json_text` of
    :func:`diff_dict`)."""
    yield from _encoded(_document(diff, max_margin_loss_db), 0)
    yield "\n"
