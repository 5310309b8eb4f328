"""The CSV report: one line per wavelength and budget row, every case in its own column."""

import csv
import io

from linkbudget.segments.cases import CASES
from linkbudget.text import escaped, wavelength_text

#: First characters a spreadsheet reads as a formula (common practice: OWASP "CSV injection").
_FORMULA_STARTS = ("=", "+", "-", "@")


def csv_text(text):
    """User text for a CSV cell: one line (:func:`linkbudget.text.escaped`), and a leading
    apostrophe where a spreadsheet would otherwise run the text as a formula."""
    text = escaped(text)
    return f"'{text}" if text.startswith(_FORMULA_STARTS) else text

COLUMNS = ["wavelength_nm", "row", "name", "kind"] + [
    f"{quantity}_{case}" for quantity in ("loss_db", "cumulative_loss_db", "power_after_dbm") for case in CASES
]


def render(result):
    """The report as CSV text."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(COLUMNS)
    quantities = (result.loss_db, result.cumulative_loss_db, result.power_after_dbm)
    labels = wavelength_text(result.wavelength_m)
    for index in range(result.wavelength_m.size):
        for number, row in enumerate(result.rows):
            values = [f"{q[case][number, index] + 0.0:.6g}" for q in quantities for case in CASES]
            writer.writerow([labels[index], number + 1, csv_text(row.name), row.shown_kind, *values])
    return buffer.getvalue()
