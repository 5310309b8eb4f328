"""The CSV report: one line per wavelength and budget row, every case in its own column."""

import csv
import io

from linkbudget.config.fields import CASES

COLUMNS = ["wavelength_nm", "row", "name", "kind"] + [
    f"{quantity}_{case}" for quantity in ("loss_db", "cumulative_loss_db", "power_after_dbm") for case in CASES
]


def render(result):
    """The report as CSV text."""
    buffer = io.StringIO()
    writer = csv.writer(buffer, lineterminator="\n")
    writer.writerow(COLUMNS)
    quantities = (result.loss_db, result.cumulative_loss_db, result.power_after_dbm)
    for index, wavelength_m in enumerate(result.wavelength_m):
        for number, row in enumerate(result.rows):
            values = [f"{q[case][number, index]:.6g}" for q in quantities for case in CASES]
            writer.writerow([f"{wavelength_m * 1e9:.6g}", number + 1, row.name, row.kind, *values])
    return buffer.getvalue()
