"""The diff for people: a terminal report (rich) and Markdown to paste as a pull-request comment.

Both read a :class:`linkbudget.diff.LinkDiff` and share their cells and sentences; each escapes
user text its own way (:func:`linkbudget.text.escaped` inside :class:`rich.text.Text`, or
:func:`linkbudget.report.markdown.markdown_text`). The per-segment numbers are given at the
diff's *focus* wavelength, where the worst-case margin fell most (or rose least). The Markdown is
bounded: at most :data:`MAX_LISTED_SEGMENTS` segments and rows, :data:`MAX_LISTED_KEYS` keys per
segment, :data:`MARKDOWN_MAX_WAVELENGTHS` wavelengths, and :data:`MAX_MARKDOWN_CHARS` characters
in all, each cut said in a line; the JSON diff always holds everything.
"""

import math

import numpy as np

from linkbudget.diff import UNCHANGED
from linkbudget.report.markdown import MARKDOWN_MAX_WAVELENGTHS, _table, markdown_text
from linkbudget.report.summary import db_text, fixed, verdict
from linkbudget.text import escaped, nm

#: Most changed segments (and, apart, inserted rows) a report lists.
MAX_LISTED_SEGMENTS = 40
#: Most changed keys shown for one segment.
MAX_LISTED_KEYS = 6
#: Most characters of the Markdown diff: below the 65,536 of a pull-request comment on common
#: hosting services (common practice), with room for a CI job's own lines.
MAX_MARKDOWN_CHARS = 60_000
#: Wavelengths the terminal's margin table lists; a longer axis lists where margin fell most.
TERMINAL_MAX_WAVELENGTHS = 8


def focus_index(diff):
    """Index (into the common wavelengths) where the worst-case margin fell most, or ``None``."""
    change = diff.margin_change_db["worst"]
    if change.size == 0:
        return None
    ranked = np.where(np.isnan(change), np.inf, change)
    return int(np.argmin(ranked))


def shown_wavelengths(diff, limit):
    """Indices of the common wavelengths a table lists: all up to ``limit``; beyond it both ends,
    the most and the least worst-case margin lost, then evenly spaced points."""
    count = diff.wavelength_m.size
    if count <= limit:
        return list(range(count))
    change = np.where(np.isnan(diff.margin_change_db["worst"]), 0.0, diff.margin_change_db["worst"])
    kept = {0, count - 1, int(np.argmin(change)), int(np.argmax(change))}
    for index in np.linspace(0, count - 1, limit).round().astype(int):
        if len(kept) >= limit:
            break
        kept.add(int(index))
    return sorted(kept)


def shown_sentence(shown_count, count):
    """Which wavelengths a bounded margin table lists (:func:`shown_wavelengths`)."""
    return (f"{shown_count} of {count} wavelengths shown: both ends, where the margin fell most and least, "
            "and evenly spaced points.")


def change_text(value_db):
    """A signed change [dB]: ``+0.50``, ``-1.20``; ``n/a`` when either side is blocked."""
    value_db = float(value_db)
    return "n/a" if math.isnan(value_db) or math.isinf(value_db) else fixed(value_db, signed=True)


def verdict_sentence(diff):
    """The verdict of both revisions, saying whether it changed."""
    old, new = verdict(diff.old.result), verdict(diff.new.result)
    return f"Verdict: {old} → {new} (changed)." if diff.verdict_changed else f"Verdict: {new} (unchanged)."


def margin_sentence(diff):
    """The worst-case margin's change where it fell most, with both values and the required one."""
    index = focus_index(diff)
    if index is None:
        return "No wavelength in common: margins cannot be compared."
    change = float(diff.margin_change_db["worst"][index])
    where = f" at {nm(diff.wavelength_m[index])}" if diff.wavelength_m.size > 1 else ""
    if math.isnan(change):
        what = "not comparable (both revisions block the light)"
    elif math.isinf(change):
        what = "lost: the new revision blocks the light" if change < 0 else "gained: the old revision blocked the light"
    elif change_text(change) == "+0.00":
        what = "unchanged"
    else:
        what = f"{'lost' if change < 0 else 'gained'} {fixed(abs(change))} dB"
    return (f"Worst-case margin {what}{where}: {db_text(diff.old_margin_db['worst'][index])} dB → "
            f"{db_text(diff.new_margin_db['worst'][index])} dB (required "
            f"{fixed(diff.new.result.required_margin_db)} dB).")


def gate_sentence(diff, max_margin_loss_db):
    """The gate's verdict in words, or ``None`` without a gate."""
    if max_margin_loss_db is None:
        return None
    lost = diff.worst_margin_loss_db
    if diff.margin_loss_exceeds(max_margin_loss_db):
        return (f"Gate FAILED: the worst-case margin fell by {fixed(lost)} dB, more than the "
                f"{fixed(max_margin_loss_db)} dB allowed (--max-margin-loss).")
    return (f"Gate passed: worst-case margin lost at most {fixed(max(lost, 0.0))} dB "
            f"(allowed {fixed(max_margin_loss_db)} dB).")


def wavelength_lines(diff):
    """Lines on wavelengths only one revision carries (as nm)."""
    return [f"{len(values)} wavelength(s) only in the {side} revision: "
            f"{', '.join(nm(value) for value in values[:10])}{' …' if len(values) > 10 else ''}"
            for side, values in (("old", diff.only_old_wavelength_m), ("new", diff.only_new_wavelength_m))
            if len(values)]


def _name(change, shown):
    if change.status == "renamed":
        return f"{shown(change.old_name)} → {shown(change.new_name)}"
    return shown(change.name)


def _keys_text(keys, shown):
    texts = [f"{shown(key.path)}: {shown(key.old) if key.old is not None else '(none)'} → "
             f"{shown(key.new) if key.new is not None else '(none)'}" for key in keys[:MAX_LISTED_KEYS]]
    if len(keys) > MAX_LISTED_KEYS:
        texts.append(f"and {len(keys) - MAX_LISTED_KEYS} more")
    return "; ".join(texts)


def change_cells(change, index, shown):
    """Cells of one changed segment or inserted row: status, name, kind, (segments) the changed
    keys, and the loss change typ and worst at wavelength number ``index``; user text through ``shown``."""
    def loss(case):
        return "" if index is None else change_text(change.loss_change_db[case][index])

    return [change.status, _name(change, shown), change.kind, _keys_text(change.keys, shown), loss("typ"),
            loss("worst")]


CHANGE_HEADERS = ["status", "segment", "kind", "changed keys (old → new)", "Δ loss typ dB", "Δ loss worst dB"]
MARGIN_HEADERS = ["wavelength", "Δ received typ dB", "Δ received worst dB", "margin typ dB (old → new)",
                  "margin worst dB (old → new)", "Δ margin worst dB"]


#: The same headers for the terminal, broken into lines so the tables fit 80 columns.
TERMINAL_CHANGE_HEADERS = ["status", "segment", "kind", "changed keys\n(old → new)", "Δ loss\ntyp dB",
                           "Δ loss\nworst dB"]
TERMINAL_MARGIN_HEADERS = ["wavelength", "Δ power\ntyp dB", "Δ power\nworst dB", "margin typ\nold → new",
                           "margin worst\nold → new", "Δ margin\nworst dB"]


def margin_cells(diff, index):
    """Cells of the margin table at common wavelength number ``index``."""
    def both(case):
        return f"{db_text(diff.old_margin_db[case][index])} → {db_text(diff.new_margin_db[case][index])}"

    return [nm(diff.wavelength_m[index]), change_text(diff.received_change_db["typ"][index]),
            change_text(diff.received_change_db["worst"][index]), both("typ"), both("worst"),
            change_text(diff.margin_change_db["worst"][index])]


def listed_changes(changes):
    """The changed ones of ``changes``, at most :data:`MAX_LISTED_SEGMENTS`, and how many more changed."""
    changed = [change for change in changes if change.status != UNCHANGED]
    return changed[:MAX_LISTED_SEGMENTS], len(changed) - MAX_LISTED_SEGMENTS


def summary_lines(diff, max_margin_loss_db):
    """The sentences on verdict, margin, wavelengths only one side carries and the gate."""
    lines = [verdict_sentence(diff), margin_sentence(diff), *wavelength_lines(diff)]
    gate = gate_sentence(diff, max_margin_loss_db)
    return lines + ([gate] if gate else [])


def _bounded(lines, max_chars):
    """``lines`` joined, cut at a line boundary to at most ``max_chars`` with a closing note."""
    text = "\n".join(lines) + "\n"
    if len(text) <= max_chars:
        return text
    note = "\n… the diff is cut here to fit a comment ({} more lines); `linkbudget diff --format json` holds all.\n"
    kept, size = [], 0
    for line in lines:
        if size + len(line) + 1 + len(note) + 8 > max_chars:
            break
        kept.append(line)
        size += len(line) + 1
    return "\n".join(kept) + note.format(len(lines) - len(kept))


def render_markdown(diff, max_margin_loss_db=None, *, max_chars=MAX_MARKDOWN_CHARS):
    """The diff as Markdown for a pull-request comment, at most ``max_chars`` characters."""
    index = focus_index(diff)
    title = markdown_text(diff.new.result.title)
    lines = [f"### linkbudget diff: {title}", "",
             f"{markdown_text(diff.old.label)} → {markdown_text(diff.new.label)}", ""]
    lines += [f"- {markdown_text(line)}" for line in summary_lines(diff, max_margin_loss_db)]
    if diff.link_keys:
        lines += ["", "Link keys changed:", ""]
        lines += _table(["key", "old", "new"], [[markdown_text(key.path), markdown_text(key.old or "(none)"),
                                                 markdown_text(key.new or "(none)")]
                                                for key in diff.link_keys[:MAX_LISTED_KEYS * 4]], text_columns=3)
    for what, changes in (("Segments", diff.segments), ("Faces between media", diff.rows)):
        listed, more = listed_changes(changes)
        if not listed:
            continue
        at = "" if index is None else f" (loss changes at {nm(diff.wavelength_m[index])})"
        lines += ["", f"{what} changed{at}:", ""]
        lines += _table(CHANGE_HEADERS, [change_cells(change, index, markdown_text) for change in listed],
                        text_columns=4)
        lines += ["", f"and {more} more changed, not listed"] if more > 0 else []
    if not diff.changed_segments and not diff.rows:
        lines += ["", "No segment changed."]
    shown = shown_wavelengths(diff, MARKDOWN_MAX_WAVELENGTHS)
    if shown:
        lines += ["", "Margins:", ""]
        if len(shown) < diff.wavelength_m.size:
            lines += [shown_sentence(len(shown), diff.wavelength_m.size), ""]
        lines += _table(MARGIN_HEADERS, [margin_cells(diff, i) for i in shown])
    return _bounded(lines, max_chars)


def render_terminal(diff, max_margin_loss_db=None):
    """The diff as rich renderables for a terminal."""
    from rich import box
    from rich.console import Group
    from rich.table import Table
    from rich.text import Text

    index = focus_index(diff)
    parts = [Text(f"linkbudget diff: {escaped(diff.new.result.title)}", style="bold"),
             Text(f"{escaped(diff.old.label)} → {escaped(diff.new.label)}")]
    parts += [Text(line) for line in summary_lines(diff, max_margin_loss_db)]
    if diff.link_keys:
        parts.append(Text("Link keys changed: " + _keys_text(diff.link_keys, escaped)))

    def table(title, headers, rows, text_columns):
        shown_table = Table(title=title, title_justify="left", box=box.SIMPLE_HEAD, pad_edge=False)
        for number, header in enumerate(headers):
            text = number < text_columns
            shown_table.add_column(header, justify="left" if text else "right", overflow="fold",
                                   no_wrap=header in ("status", "wavelength"))
        for row in rows:
            shown_table.add_row(*(Text(cell) for cell in row))
        return shown_table

    for what, changes in (("Segments", diff.segments), ("Faces between media", diff.rows)):
        listed, more = listed_changes(changes)
        if listed:
            at = "" if index is None else f" (loss changes at {nm(diff.wavelength_m[index])})"
            rows = [change_cells(change, index, escaped) for change in listed]
            parts.append(table(f"{what} changed{at}", TERMINAL_CHANGE_HEADERS, rows, 4))
            if more > 0:
                parts.append(Text(f"and {more} more changed, not listed"))
    if not diff.changed_segments and not diff.rows:
        parts.append(Text("No segment changed."))
    shown = shown_wavelengths(diff, TERMINAL_MAX_WAVELENGTHS)
    if shown:
        parts.append(table("Margins", TERMINAL_MARGIN_HEADERS, [margin_cells(diff, i) for i in shown], 1))
    return Group(*parts)
