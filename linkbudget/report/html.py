"""The HTML report: one self-contained page a reviewer opens in a browser (e.g. attached to a CI run).

The page loads nothing: its style sheet is inline, its plots are inline SVG drawn with matplotlib
(with the ``plot`` extra; without it the page says so in their place), and it has no scripts, no
fonts, no images and no links to elsewhere. Every user string (title, names, notes) passes
through :func:`text`, so a segment named ``<script>`` shows as text.

A page is a list of :class:`Section` s inside :func:`page`; :func:`render` makes the page of one
run. Another report (statistics of a run, a comparison of two revisions) adds its own sections:
see the ``sections`` argument of :func:`render`, or build a page of its own from :func:`page`,
:func:`plots_section`, :func:`cautions_section` and :func:`provenance`.
"""

import hashlib
import html
from dataclasses import dataclass

from linkbudget import __version__
from linkbudget.report import review_text as words
from linkbudget.report import summary
from linkbudget.report.markdown import shown_wavelengths
from linkbudget.report.summary import db_text
from linkbudget.text import escaped, nm

#: Most wavelengths the page's margin table lists (chosen as the Markdown table chooses them).
HTML_MAX_WAVELENGTHS = 200

_STYLE = """
body { font-family: system-ui, sans-serif; max-width: 72rem; margin: 1.5rem auto; padding: 0 1rem;
       color: #111; line-height: 1.4; }
h1 { font-size: 1.5rem; }
.verdict { display: inline-block; padding: 0.3rem 0.8rem; border: 3px solid; font-weight: bold; }
.closes { border-color: #1b7837; color: #1b7837; }
.fails { border-color: #b2182b; color: #b2182b; border-style: double; }
table { border-collapse: collapse; margin: 0.5rem 0 1rem; font-size: 0.9rem; }
th, td { border-bottom: 1px solid #bbb; padding: 0.2rem 0.5rem; vertical-align: top; }
th { text-align: left; background: #eee; }
td.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.note { color: #444; font-size: 0.85rem; }
.status-short { font-weight: bold; }
figure { margin: 1rem 0; }
figure svg { max-width: 100%; height: auto; }
.cautions { border: 2px solid #b35806; padding: 0.5rem 1rem; }
li.alarm { font-weight: bold; }
footer { margin-top: 2rem; color: #444; font-size: 0.85rem; overflow-wrap: anywhere; }
"""


def text(value):
    """User text for HTML: one line (:func:`linkbudget.text.escaped`), then every character HTML
    reads as markup written as a character reference (``<`` ``>`` ``&`` and both quotes)."""
    return html.escape(escaped(value), quote=True)


@dataclass(frozen=True)
class Section:
    """A part of the page: a heading (plain text, escaped here), an id and its body, which is
    HTML the report module built, every user string already through :func:`text`."""

    heading: str
    id: str
    body: str

    def html(self):
        return f'<section id="{text(self.id)}">\n<h2>{text(self.heading)}</h2>\n{self.body}\n</section>'


def file_sha256(path):
    """The SHA-256 of a file's bytes, as hex."""
    digest = hashlib.sha256()
    with open(path, "rb") as stream:
        for block in iter(lambda: stream.read(1 << 20), b""):
            digest.update(block)
    return digest.hexdigest()


def _table(headers, rows, *, table_id, text_columns):
    """A table: ``rows`` of cell HTML; the first ``text_columns`` columns are text, the next are
    numbers (right-aligned); a last column named ``note`` is a note."""
    head = "".join(f'<th scope="col">{text(header)}</th>' for header in headers)

    def cell(position, content):
        kind = "text" if position < text_columns else "note" if headers[position] == "note" else "number"
        return f'<td class="{kind}">{content}</td>'

    body = "\n".join("<tr>" + "".join(cell(i, content) for i, content in enumerate(row)) + "</tr>" for row in rows)
    return f'<table id="{table_id}">\n<thead><tr>{head}</tr></thead>\n<tbody>\n{body}\n</tbody>\n</table>'


def verdict_section(result):
    """The verdict, in words, and the sentences on margin and overload."""
    state = "closes" if result.closes else "fails"
    lines = [f'<p><span class="verdict {state}" id="verdict">{summary.verdict(result)}</span></p>']
    about = (result.description, summary.parties_sentence(result, str))
    sentences = (summary.margin_sentence(result), summary.overload_sentence(result))
    lines += [f"<p>{text(words)}</p>" for words in (*about, *sentences) if words]
    return Section("Verdict", "verdict-section", "\n".join(lines))


def budget_section(result):
    """Every budget row at the wavelength with the least worst-case margin, with its note."""
    index = result.governing_index
    source = ["", "source", "", "", "", "", db_text(result.source_dbm["typ"][index], True),
              db_text(result.source_dbm["worst"][index], True), ""]
    rows = [source] + [
        [str(number + 1), text(row.name), text(row.shown_kind), db_text(result.loss_db["typ"][number, index]),
         db_text(result.loss_db["worst"][number, index]), db_text(result.cumulative_loss_db["worst"][number, index]),
         db_text(result.power_after_dbm["typ"][number, index], True),
         db_text(result.power_after_dbm["worst"][number, index], True), text(summary.row_note(row, index))]
        for number, row in enumerate(result.rows)]
    table = _table(["#", "segment", "kind", "loss typ dB", "loss worst dB", "total loss worst dB",
                    "power after typ dBm", "power after worst dBm", "note"], rows, table_id="budget", text_columns=3)
    notes = "".join(f"<li>{text(note)}</li>" for note in result.notes)
    body = (f"<p>At {nm(result.wavelength_m[index])}, the wavelength with the least worst-case margin.</p>\n{table}"
            + (f'\n<ul class="notes">{notes}</ul>' if notes else ""))
    return Section("Budget", "budget-section", body)


def margin_section(result):
    """Received power and margin per wavelength (all of them up to :data:`HTML_MAX_WAVELENGTHS`)."""
    shown = shown_wavelengths(result, HTML_MAX_WAVELENGTHS)
    status = summary.wavelength_status(result)
    rows = [[nm(result.wavelength_m[i]), db_text(result.received_dbm["typ"][i], True),
             db_text(result.received_dbm["worst"][i], True), db_text(result.received_dbm["best"][i], True),
             db_text(result.margin_db["typ"][i], True), db_text(result.margin_db["worst"][i], True),
             f'<span class="status-{"ok" if status[i] == "ok" else "short"}">{status[i]}</span>']
            for i in shown]
    table = _table(["wavelength", "received typ dBm", "received worst dBm", "received best dBm", "margin typ dB",
                    "margin worst dB", "status"], rows, table_id="margins", text_columns=1)
    count = result.wavelength_m.size
    intro = (f"<p>{len(shown)} of {count} wavelengths: both ends, the least and the largest worst-case margin, the "
             "highest best-case power and evenly spaced points; JSON and CSV list every wavelength.</p>\n"
             if len(shown) < count else "")
    return Section("Margin per wavelength", "margin-section", intro + table)


def review_section(result):
    """Eye safety at the reachable points, back reflection and polarization-dependent loss (the
    review's estimates, in the words the terminal and Markdown use); ``None`` without a review."""
    if result.review is None:
        return None
    rows = []
    for item in result.review.assessments:
        *cells, level = (text(cell) for cell in words.point_cells(result, item))
        rows.append([*cells, f'<span class="status-{"short" if item.above_level_1 else "ok"}">{level}</span>'])
    table = _table(words.POINT_HEADERS, rows, table_id="safety", text_columns=3)
    sentences = [*words.safety_sentences(result, str), *words.back_reflection_sentences(result, str),
                 (words.polarization_sentence(result, str), False)]
    items = "".join(f'<li class="{"alarm" if alarm else "fact"}">{text(sentence)}</li>'
                    for sentence, alarm in sentences)
    body = f"{table}\n<p>{text(words.LIMITS_SENTENCE)}</p>\n<ul>{items}</ul>"
    return Section("Eye safety, back reflection and polarization (estimates)", "review-section", body)


def plots_section(panels, *, heading="Plots", section_id="plots-section", salt="linkbudget"):
    """The diagrams (:class:`linkbudget.report.plots.Panel` s) as inline SVG, each in a figure
    with its caption; without matplotlib, a line saying how to get them. ``salt`` starts the SVG
    ids (one of its own per section of a page)."""
    from linkbudget.report import plots

    try:
        plots.require_matplotlib()
    except plots.PlotsUnavailable as missing:
        return Section(heading, section_id, f'<p class="missing-plots">{text(missing)}</p>')
    figures = [f"<figure>{plots.inline_svg(plots.figure([panel]), salt=f'{salt}-{number}')}"
               f"<figcaption>{text(panel.name)}</figcaption></figure>" for number, panel in enumerate(panels)]
    return Section(heading, section_id, "\n".join(figures))


def statistics_sections(result):
    """The statistical budget (:mod:`linkbudget.report.statistics_table`) and its margin histogram,
    as sections for :func:`render`; none without trials."""
    from linkbudget.report import statistics_table as tables
    from linkbudget.report.plots import statistics_panels

    if result.statistics is None:
        return []
    headers, rows, caption = tables.quantile_rows(result)
    body = [f"<p>{text(tables.quantile_title(result))}</p>",
            _table([header.replace("\n", " ") for header in headers], rows, table_id="statistics", text_columns=1),
            f"<p>{text(caption)}</p>", f'<p id="yield">{text(tables.yield_sentence(result))}</p>']
    contributions = tables.contribution_rows(result)
    if contributions:
        body += [f"<p>{text(tables.contribution_title(result))}</p>",
                 _table(list(tables.CONTRIBUTION_HEADERS), [[text(name), *numbers] for name, *numbers in contributions],
                        table_id="contributions", text_columns=1)]
    if result.statistics.margin_histogram is None:
        body.append('<p class="no-histogram">No margin histogram: this run has more trials × wavelengths than '
                    "the margins it keeps in memory.</p>")
    sections = [Section("Statistical budget", "statistics-section", "\n".join(body))]
    panels = statistics_panels(result)
    if panels:
        sections.append(plots_section(panels, heading="Margin histogram", section_id="histogram-section",
                                      salt="linkbudget-histogram"))
    return sections


def cautions_section(cautions):
    """The laser-safety cautions, as the terminal shows them."""
    items = "".join(f"<li>{text(caution)}</li>" for caution in cautions)
    return Section("Laser safety", "cautions", f'<div class="cautions"><ul>{items}</ul></div>')


def provenance(files):
    """The footer: the tool's version and each input file (path -> SHA-256 hex)."""
    inputs = "; ".join(f"input file {text(path)}, SHA-256 <code>{text(digest)}</code>"
                       for path, digest in files.items())
    return f"<footer>linkbudget {text(__version__)}; {inputs}</footer>"


def page(title, sections, footer):
    """A whole page: the title (user text), the sections in order and the footer."""
    body = "\n".join(section.html() for section in sections)
    return (f'<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
            f'<meta name="viewport" content="width=device-width, initial-scale=1">\n'
            f"<title>{text(title)}: linkbudget report</title>\n<style>{_STYLE}</style>\n</head>\n<body>\n"
            f"<h1>{text(title)}</h1>\n{body}\n{footer}\n</body>\n</html>\n")


def render(result, *, input_sha256, sections=()):
    """The page of one run.

    Parameters
    ----------
    result : linkbudget.engine.LinkResult
    input_sha256 : str
        The SHA-256 (hex) of the link file, shown in the footer (:func:`file_sha256`).
    sections : sequence of Section
        Further sections, put after the margin table and before the plots: this is where the
        statistics of a statistical run go.
    """
    from linkbudget.report.plots import run_panels

    review = review_section(result)
    parts = [verdict_section(result), budget_section(result), margin_section(result), *([review] if review else []),
             *sections, plots_section(run_panels(result)), cautions_section(result.cautions)]
    return page(result.title, parts, provenance({result.file: input_sha256}))
