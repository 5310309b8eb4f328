"""The terminal report: a rich table of the budget and its verdict in words.

Colour is an aid only: every status is also written out. User text is always put in a
:class:`rich.text.Text` (never read as console markup) after :func:`linkbudget.text.escaped`.
"""

import numpy as np
from rich import box
from rich.console import Group
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from linkbudget.report.review_terminal import review_parts
from linkbudget.report.statistics_table import statistics_section
from linkbudget.report.summary import (
    db_text,
    margin_sentence,
    overload_sentence,
    parties_sentence,
    row_note,
    verdict,
    wavelength_status,
)
from linkbudget.text import escaped, nm

#: Wavelengths listed one by one in the margin table; longer axes list the tightest ones.
MAX_LISTED_WAVELENGTHS = 8
#: Axes up to this many wavelengths show the margin table; longer ones a summary (see :func:`margin_part`).
SHORT_AXIS = 12
#: A channel plan up to this many channels is summarised channel by channel, in this many columns.
MAX_CHANNEL_SUMMARY = 96
CHANNEL_COLUMNS = 2
#: Runs of failing wavelengths named in a band summary; more are counted.
MAX_NAMED_RUNS = 4


def _name_cell(row, index):
    """The row's name, with its note (reflectance, geometry, parts) dimmed on a line below."""
    cell = Text(escaped(row.name))
    note = row_note(row, index)
    if note:
        cell.append(f"\n{escaped(note)}", style="dim")
    return cell


def budget_table(result, index):
    """The per-segment table at wavelength number ``index``."""
    table = Table(title=f"Budget at {nm(result.wavelength_m[index])}", title_justify="left",
                  box=box.SIMPLE_HEAD, pad_edge=False,
                  caption="losses and totals in dB; power after each segment in dBm", caption_justify="left")
    table.add_column("#", justify="right")
    table.add_column("segment", min_width=16, overflow="fold")
    table.add_column("kind", min_width=9, no_wrap=True)
    for header in ("loss\ntyp", "loss\nworst", "total\nworst", "power\ntyp", "power\nworst"):
        table.add_column(header, justify="right", no_wrap=True)
    table.add_row("", "source", "", "", "", "", db_text(result.source_dbm["typ"][index], True),
                  db_text(result.source_dbm["worst"][index], True))
    for number, row in enumerate(result.rows):
        table.add_row(
            str(number + 1), _name_cell(row, index), row.shown_kind,
            db_text(result.loss_db["typ"][number, index]), db_text(result.loss_db["worst"][number, index]),
            db_text(result.cumulative_loss_db["worst"][number, index]),
            db_text(result.power_after_dbm["typ"][number, index], True),
            db_text(result.power_after_dbm["worst"][number, index], True),
        )
    return table


def margin_table(result):
    """Received power and margin per wavelength (the tightest ones on a long axis)."""
    table = Table(title="Received power (dBm) and margin (dB)", title_justify="left", box=box.SIMPLE_HEAD)
    for header in ("wavelength", "received\ntyp", "received\nworst", "received\nbest", "margin\ntyp",
                   "margin\nworst", "status"):
        table.add_column(header, justify="right", no_wrap=True)
    order = result.margin_db["worst"].argsort(kind="stable")[:MAX_LISTED_WAVELENGTHS]
    status = wavelength_status(result)
    for index in sorted(order):
        table.add_row(*_margin_cells(result, index, status))
    if result.wavelength_m.size > MAX_LISTED_WAVELENGTHS:
        table.caption = (f"the {MAX_LISTED_WAVELENGTHS} tightest of {result.wavelength_m.size} wavelengths; "
                         "--format csv or json lists all")
    return table


def _status_text(word):
    return Text(str(word), style="green" if word == "ok" else "bold red")


def _margin_cells(result, index, status):
    """The margin table's cells at wavelength number ``index``."""
    return (nm(result.wavelength_m[index]), db_text(result.received_dbm["typ"][index], True),
            db_text(result.received_dbm["worst"][index], True), db_text(result.received_dbm["best"][index], True),
            db_text(result.margin_db["typ"][index], True), db_text(result.margin_db["worst"][index], True),
            _status_text(status[index]))


def channel_summary(result):
    """The worst-case margin and status of every channel, :data:`CHANNEL_COLUMNS` channels a line."""
    table = Table(title="Worst-case margin (dB) per channel", title_justify="left", box=box.SIMPLE_HEAD,
                  caption_justify="left")
    for _ in range(CHANNEL_COLUMNS):
        for header in ("channel", "margin\nworst", "status"):
            table.add_column(header, justify="right", no_wrap=True)
    status, worst = wavelength_status(result), result.margin_db["worst"]
    count = result.wavelength_m.size
    lines = -(-count // CHANNEL_COLUMNS)
    for line in range(lines):  # channels run down the columns, as a reader scans a list
        cells = []
        for index in range(line, count, lines):
            cells += [nm(result.wavelength_m[index]), db_text(worst[index], True), _status_text(status[index])]
        table.add_row(*cells, *[""] * (3 * CHANNEL_COLUMNS - len(cells)))
    tightest = result.governing_index
    table.caption = (f"{count} channels; the worst is {nm(result.wavelength_m[tightest])} "
                     f"({db_text(worst[tightest], True)} dB); --format csv or json lists every value")
    return table


def _runs(mask):
    """(first, last) index of each run of True in ``mask``."""
    edges = np.flatnonzero(np.diff(np.concatenate(([0], mask.astype(np.int8), [0]))))
    return list(zip(edges[::2], edges[1::2] - 1, strict=True))


def failing_sentence(result, status):
    """Where the link fails on a long axis: how many wavelengths, and the runs of them."""
    failing = status != "ok"
    count = result.wavelength_m.size
    if not failing.any():
        return f"All {count} wavelengths meet the required margin and the overload."
    runs = _runs(failing)
    named = [nm(result.wavelength_m[first]) if first == last
             else f"{nm(result.wavelength_m[first])} to {nm(result.wavelength_m[last])}"
             for first, last in runs[:MAX_NAMED_RUNS]]
    more = f" and {len(runs) - MAX_NAMED_RUNS} more runs" if len(runs) > MAX_NAMED_RUNS else ""
    return (f"{int(failing.sum())} of {count} wavelengths fail (short of margin or overloaded): "
            f"{', '.join(named)}{more}.")


def band_summary(result):
    """The band's worst and best points (least and largest worst-case margin), and where it fails."""
    table = Table(title=f"Received power (dBm) and margin (dB): the worst point (least worst-case margin), then "
                        f"the best, of {result.wavelength_m.size} wavelengths", title_justify="left",
                  box=box.SIMPLE_HEAD, caption_justify="left")
    for header in ("wavelength", "received\ntyp", "received\nworst", "received\nbest", "margin\ntyp",
                   "margin\nworst", "status"):
        table.add_column(header, justify="right", no_wrap=True)
    status = wavelength_status(result)
    worst = result.margin_db["worst"]
    for index in (result.governing_index, int(np.argmax(worst))):
        table.add_row(*_margin_cells(result, index, status))
    table.caption = f"{failing_sentence(result, status)} --format csv or json lists every wavelength"
    return table


def margin_part(result):
    """The margins: the table of :func:`margin_table` up to :data:`SHORT_AXIS` wavelengths; beyond,
    a channel plan channel by channel (:func:`channel_summary`, up to :data:`MAX_CHANNEL_SUMMARY`),
    else the worst and best points (:func:`band_summary`)."""
    count = result.wavelength_m.size
    if count <= SHORT_AXIS:
        return margin_table(result)
    if result.axis == "channels" and count <= MAX_CHANNEL_SUMMARY:
        return channel_summary(result)
    return band_summary(result)


def render(result):
    """The whole terminal report as a rich renderable."""
    closes = result.closes
    headline = Text(f"{escaped(result.title)}: {verdict(result)}", style="bold green" if closes else "bold red")
    about = [Text(text) for text in (escaped(result.description or ""), parties_sentence(result)) if text]
    summary = Group(headline, *about, Text(margin_sentence(result)), Text(overload_sentence(result)))
    cautions = Panel("\n".join(f"- {line}" for line in result.cautions), title="Laser safety",
                     title_align="left", border_style="yellow")
    parts = [budget_table(result, result.governing_index)]
    if result.wavelength_m.size > 1:
        parts.append(Text(f"(the table shows the wavelength with the least worst-case margin; "
                          f"the link carries {result.wavelength_m.size})", style="dim"))
    notes = [Text(f"note: {escaped(note)}", style="yellow") for note in result.notes]
    return Group(*parts, margin_part(result), summary, *statistics_section(result), *notes, *review_parts(result),
                 cautions)
