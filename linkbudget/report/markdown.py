"""The Markdown report, for a pull-request comment."""

from linkbudget.report.summary import margin_sentence, nm, overload_sentence, row_note, verdict


def _cell(value):
    return "blocked" if value == float("inf") else f"{value:.2f}"


def _table(headers, rows, *, text_columns=1):
    """A Markdown table: the first ``text_columns`` left-aligned, the numbers right-aligned."""
    rule = "|".join("---" if i < text_columns else "---:" for i in range(len(headers)))
    lines = ["| " + " | ".join(headers) + " |", f"|{rule}|"]
    lines += ["| " + " | ".join(cell.replace("|", "\\|") for cell in row) + " |" for row in rows]
    return lines


def render(result):
    """The report as Markdown text."""
    index = result.governing_index
    mark = "✅" if result.closes else "❌"
    lines = [f"### {mark} {result.title}: {verdict(result)}", "",
             f"- {margin_sentence(result)}", f"- {overload_sentence(result)}", "",
             f"Budget at {nm(result.wavelength_m[index])}:", ""]
    lines += _table(
        ["segment", "kind", "loss typ dB", "loss worst dB", "cumulative worst dB", "power after worst dBm", "note"],
        [[row.name, row.kind, _cell(result.loss_db["typ"][n, index]), _cell(result.loss_db["worst"][n, index]),
          _cell(result.cumulative_loss_db["worst"][n, index]), _cell(result.power_after_dbm["worst"][n, index]),
          row_note(row, index)]
         for n, row in enumerate(result.rows)], text_columns=2)
    lines += ["", "Margins:", ""]
    lines += _table(
        ["wavelength", "received typ dBm", "received worst dBm", "margin typ dB", "margin worst dB"],
        [[nm(wavelength), _cell(result.received_dbm["typ"][i]), _cell(result.received_dbm["worst"][i]),
          _cell(result.margin_db["typ"][i]), _cell(result.margin_db["worst"][i])]
         for i, wavelength in enumerate(result.wavelength_m)])
    lines += [""] + [f"- note: {note}" for note in result.notes]
    lines += ["", "> **Laser safety.** " + " ".join(result.cautions), ""]
    return "\n".join(lines)
