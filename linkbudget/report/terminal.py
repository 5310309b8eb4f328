"""The terminal report: a rich table of the budget and its verdict in words.

Colour is an aid only: every status is also written out. User text is always put in a
:class:`rich.text.Text` (never read as console markup) after :func:`linkbudget.text.escaped`.
"""


from rich import box
from rich.console import Group
from rich.panel import Panel
from rich.table import Table
from rich.text import Text

from linkbudget.report.review_terminal import review_parts
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
        worst = result.margin_db["worst"][index]
        ok = status[index] == "ok"
        table.add_row(
            nm(result.wavelength_m[index]), db_text(result.received_dbm["typ"][index], True),
            db_text(result.received_dbm["worst"][index], True), db_text(result.received_dbm["best"][index], True),
            db_text(result.margin_db["typ"][index], True), db_text(worst, True),
            Text(str(status[index]), style="green" if ok else "bold red"),
        )
    if result.wavelength_m.size > MAX_LISTED_WAVELENGTHS:
        table.caption = (f"the {MAX_LISTED_WAVELENGTHS} tightest of {result.wavelength_m.size} wavelengths; "
                         "--format csv or json lists all")
    return table


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
    return Group(*parts, margin_table(result), summary, *notes, *review_parts(result), cautions)
