"""The Markdown report, for a pull-request comment."""

import numpy as np

from linkbudget.report.review_markdown import review_lines
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

#: Characters Markdown would read as syntax (emphasis, code, links, tables, headings), shown literally.
_MARKDOWN_SYNTAX = "\\`*_[]#|~"
#: HTML that a Markdown renderer would pass through, as character references.
_HTML = {"&": "&amp;", "<": "&lt;", ">": "&gt;"}


def markdown_text(text):
    """User text for Markdown: one line (:func:`linkbudget.text.escaped`), every Markdown syntax
    character backslash-escaped and HTML written as character references, so it shows as typed."""
    return "".join(_HTML.get(char, f"\\{char}" if char in _MARKDOWN_SYNTAX else char) for char in escaped(text))


#: Most wavelengths the Markdown margin table lists, so a long band fits a pull-request comment;
#: JSON and CSV always carry every wavelength.
MARKDOWN_MAX_WAVELENGTHS = 25


def shown_wavelengths(result, limit=MARKDOWN_MAX_WAVELENGTHS):
    """Indices of the wavelengths the margin table lists: all of them up to ``limit``; beyond it
    both ends, the least and the largest worst-case margin, the highest best-case received power
    (the overload side), and evenly spaced points to fill ``limit``."""
    count = len(result.wavelength_m)
    if count <= limit:
        return list(range(count))
    kept = {0, count - 1, result.governing_index, int(np.argmax(result.margin_db["worst"])),
            int(np.argmax(result.received_dbm["best"]))}
    spaced = np.linspace(0, count - 1, limit).round().astype(int)
    for index in spaced:
        if len(kept) >= limit:
            break
        kept.add(int(index))
    return sorted(kept)


def _table(headers, rows, *, text_columns=1):
    """A Markdown table: the first ``text_columns`` left-aligned, the numbers right-aligned."""
    rule = "|".join("---" if i < text_columns else "---:" for i in range(len(headers)))
    lines = ["| " + " | ".join(headers) + " |", f"|{rule}|"]
    lines += ["| " + " | ".join(row) + " |" for row in rows]
    return lines


def render(result):
    """The report as Markdown text."""
    index = result.governing_index
    status = wavelength_status(result)
    mark = "✅" if result.closes else "❌"
    lines = [f"### {mark} {markdown_text(result.title)}: {verdict(result)}", ""]
    lines += [f"{markdown_text(text)}" for text in (result.description,) if text]
    parties = parties_sentence(result, markdown_text)
    lines += [f"- {parties}"] if parties else []
    lines += [f"- {margin_sentence(result)}", f"- {overload_sentence(result)}", "",
             f"Budget at {nm(result.wavelength_m[index])}:", ""]
    lines += _table(
        ["segment", "kind", "loss typ dB", "loss worst dB", "cumulative worst dB", "power after worst dBm", "note"],
        [[markdown_text(row.name), row.shown_kind, db_text(result.loss_db["typ"][n, index]),
          db_text(result.loss_db["worst"][n, index]), db_text(result.cumulative_loss_db["worst"][n, index]),
          db_text(result.power_after_dbm["worst"][n, index]),
          markdown_text(row_note(row, index))]
         for n, row in enumerate(result.rows)], text_columns=2)
    shown = shown_wavelengths(result)
    lines += ["", "Margins:", ""]
    if len(shown) < len(result.wavelength_m):
        lines += [f"{len(shown)} of {len(result.wavelength_m)} wavelengths shown: both ends, the least and the largest "
                  "worst-case margin, the highest best-case power and evenly spaced points; JSON and CSV list "
                  "every wavelength.", ""]
    lines += _table(
        ["wavelength", "received typ dBm", "received worst dBm", "margin typ dB", "margin worst dB", "status"],
        [[nm(wavelength), db_text(result.received_dbm["typ"][i]), db_text(result.received_dbm["worst"][i]),
          db_text(result.margin_db["typ"][i]), db_text(result.margin_db["worst"][i]), str(status[i])]
         for i, wavelength in ((i, result.wavelength_m[i]) for i in shown)])
    lines += statistics_lines(result)
    lines += [""] + [f"- note: {markdown_text(note)}" for note in result.notes]
    lines += review_lines(result, _table, markdown_text)
    lines += ["", "> **Laser safety.** " + " ".join(result.cautions), ""]
    return "\n".join(lines)


def statistics_lines(result):
    """The statistical budget's tables and yield (:mod:`linkbudget.report.statistics_table`), or no
    lines without trials."""
    from linkbudget.report import statistics_table as tables

    if result.statistics is None:
        return []
    headers, rows, caption = tables.quantile_rows(result)
    lines = ["", f"{markdown_text(tables.quantile_title(result))}:", ""]
    lines += _table([header.replace("\n", " ") for header in headers], rows)
    lines += ["", markdown_text(caption), "", markdown_text(tables.yield_sentence(result))]
    contributions = tables.contribution_rows(result)
    if contributions:
        lines += ["", f"{markdown_text(tables.contribution_title(result))}:", ""]
        lines += _table(list(tables.CONTRIBUTION_HEADERS),
                        [[markdown_text(name), *numbers] for name, *numbers in contributions])
    return lines
