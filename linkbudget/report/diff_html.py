"""The HTML page of a diff: what a change did to a link, as one self-contained file for a reviewer.

Built from the pieces of :mod:`linkbudget.report.html` (the same style sheet, tables, plots,
cautions and footer) and from the sentences and cells of :mod:`linkbudget.report.diff_text`, so
the page says what the Markdown says; it reads the :class:`~linkbudget.diff.LinkDiff` only and
recomputes nothing. Every user string (title, file names, segment names, keys and values) passes
through :func:`~linkbudget.report.html.text`. Segments are listed as in the Markdown (at most
:data:`~linkbudget.report.diff_text.MAX_LISTED_SEGMENTS`); margins at up to
:data:`~linkbudget.report.html.HTML_MAX_WAVELENGTHS` wavelengths, chosen as the Markdown chooses.
"""

from linkbudget.report import diff_text
from linkbudget.report.html import (
    HTML_MAX_WAVELENGTHS,
    Section,
    _table,
    cautions_section,
    page,
    plots_section,
    provenance,
    text,
)
from linkbudget.report.summary import verdict
from linkbudget.text import nm


def diff_panels(diff):
    """The diagrams of both revisions on shared axes, each named by its side's label; a renamed
    segment at one place, under its new name."""
    from linkbudget.diff import RENAMED
    from linkbudget.report.plots import comparison_panels

    renames = {change.old_name: change.new_name for change in diff.segments if change.status == RENAMED}
    return comparison_panels(diff.old.result, diff.new.result, labels=(diff.old.label, diff.new.label),
                             renames=renames)


def _verdict_span(result, element_id):
    state = "closes" if result.closes else "fails"
    return f'<span class="verdict {state}" id="{element_id}">{verdict(result)}</span>'


def summary_section(diff, max_margin_loss_db):
    """Both verdicts (old → new), the compared sides, and the sentences the Markdown starts with."""
    verdicts = f"<p>{_verdict_span(diff.old.result, 'old-verdict')} → {_verdict_span(diff.new.result, 'verdict')}</p>"
    sides = f'<p id="sides">{text(diff.old.label)} → {text(diff.new.label)}</p>'
    sentences = "".join(f"<li>{text(line)}</li>" for line in diff_text.summary_lines(diff, max_margin_loss_db))
    return Section("Verdict", "verdict-section", f'{verdicts}\n{sides}\n<ul id="summary">{sentences}</ul>')


def link_keys_section(diff):
    """The link's own keys (source, receiver, wavelengths...) that changed, old → new."""
    rows = [[text(key.path), text(key.old or "(none)"), text(key.new or "(none)")]
            for key in diff.link_keys[:diff_text.MAX_LISTED_KEYS * 4]]
    return Section("Link keys changed", "link-keys-section",
                   _table(["key", "old", "new"], rows, table_id="diff-link-keys", text_columns=3))


def changes_section(diff, heading, changes, table_id):
    """The changed segments (or inserted rows) with their changed keys and loss changes, or ``None``."""
    listed, more = diff_text.listed_changes(changes)
    if not listed:
        return None
    index = diff_text.focus_index(diff)
    at = "" if index is None else f"<p>Loss changes at {nm(diff.wavelength_m[index])}, where the worst-case " \
                                  "margin fell most.</p>\n"
    rows = [[text(cell) for cell in diff_text.change_cells(change, index, str)] for change in listed]
    table = _table(diff_text.CHANGE_HEADERS, rows, table_id=table_id, text_columns=4)
    return Section(heading, f"{table_id}-section",
                   at + table + (f"\n<p>and {more} more changed, not listed</p>" if more > 0 else ""))


def margins_section(diff):
    """Received power and margin changes per common wavelength, or ``None`` without one."""
    shown = diff_text.shown_wavelengths(diff, HTML_MAX_WAVELENGTHS)
    if not shown:
        return None
    count = diff.wavelength_m.size
    intro = f"<p>{text(diff_text.shown_sentence(len(shown), count))}</p>\n" if len(shown) < count else ""
    rows = [[text(cell) for cell in diff_text.margin_cells(diff, i)] for i in shown]
    return Section("Margin per wavelength", "diff-margins-section",
                   intro + _table(diff_text.MARGIN_HEADERS, rows, table_id="diff-margins", text_columns=1))


def render(diff, max_margin_loss_db=None):
    """The page of a :class:`~linkbudget.diff.LinkDiff`; the footer gives the SHA-256 of each side's text."""
    segments = changes_section(diff, "Segments changed", diff.segments, "diff-segments")
    parts = [summary_section(diff, max_margin_loss_db),
             link_keys_section(diff) if diff.link_keys else None,
             segments or Section("Segments changed", "diff-segments-section", "<p>No segment changed.</p>"),
             changes_section(diff, "Faces between media changed", diff.rows, "diff-rows"),
             margins_section(diff),
             plots_section(diff_panels(diff)),
             cautions_section(list(dict.fromkeys((*diff.old.result.cautions, *diff.new.result.cautions))))]
    footer = provenance({diff.old.label: diff.old.text_sha256, diff.new.label: diff.new.text_sha256})
    return page(f"Diff of {diff.new.result.title}", [part for part in parts if part is not None], footer)
