"""The budget's verdict in words, shared by every human-readable format."""

import math

import numpy as np

from linkbudget.polarization_loss import row_losses_db
from linkbudget.segments.rows import SEGMENT_ROW
from linkbudget.text import escaped, nm


def fixed(value, places=2, signed=False):
    """``value`` with ``places`` decimals; a value that rounds to zero prints as 0.00, never -0.00."""
    value = round(float(value), places) + 0.0  # adding 0.0 turns -0.0 into 0.0
    return f"{value:+.{places}f}" if signed else f"{value:.{places}f}"


def db_text(value, signed=False):
    """A budget number [dB or dBm] as every human-readable format prints it: :func:`fixed`, and
    ``blocked`` for the +inf loss of total internal reflection (and the powers after it)."""
    value = float(value)
    if math.isnan(value):
        return "n/a"
    if math.isinf(value):
        return "blocked" if value > 0 else "-inf"
    return fixed(value, signed=signed)

def _where(result, values, index):
    """`` at 1271 nm`` for the wavelength ``index`` on a multi-wavelength axis, if values differ."""
    if result.wavelength_m.size == 1:
        return ""
    if np.ptp(values) == 0:
        return f" at all {result.wavelength_m.size} wavelengths"
    return f" at {nm(result.wavelength_m[index])}"


def margin_sentence(result):
    """One sentence on the worst-case margin against the required margin."""
    index = result.governing_index
    worst = float(result.margin_db["worst"][index])
    required = result.required_margin_db
    where = _where(result, result.margin_db["worst"], index)
    if result.margin_ok:
        return (f"Margin met: worst-case margin {fixed(worst)} dB{where} is at least the required "
                f"{fixed(required)} dB (spare {fixed(worst - required)} dB).")
    return (f"Margin NOT met: worst-case margin {fixed(worst)} dB{where} is below the required "
            f"{fixed(required)} dB (short by {fixed(required - worst)} dB).")


def overload_sentence(result):
    """One sentence on the best-case received power against the receiver overload."""
    if result.overload_dbm is None:
        return "Overload not checked: the receiver gives no overload."
    best = result.received_dbm["best"]
    index = int(np.argmax(best))
    where = _where(result, best, index)
    if result.overload_ok:
        return (f"Overload OK: best-case received power {fixed(best[index])} dBm{where} is at or below "
                f"the overload {fixed(result.overload_dbm)} dBm.")
    return (f"Overload EXCEEDED: best-case received power {fixed(best[index])} dBm{where} is above the "
            f"overload {fixed(result.overload_dbm)} dBm by {fixed(best[index] - result.overload_dbm)} dB; "
            "add attenuation.")


def verdict(result):
    """``"CLOSES"`` or ``"DOES NOT CLOSE"``."""
    return "CLOSES" if result.closes else "DOES NOT CLOSE"


def _percent(values, index):
    return f"{100 * float(values[index]):.3g} %"


def _db_cases(losses, index):
    return f"{fixed(losses['typ'][index])} dB typ, {fixed(losses['worst'][index])} worst"


def row_note(row, index):
    """A short note on a budget row at wavelength number ``index``: the reflectance of a face,
    R and A of a coating, a connector's return loss, the geometric estimate beside a datasheet
    loss, the parts of a loss, the row's facts, the library part it was made from."""
    notes = []
    if row.reflectance is not None and row.kind != SEGMENT_ROW:
        notes.append(f"R {_percent(row.reflectance_seen, index)}")
    if row.absorptance is not None:
        notes.append(f"A {_percent(row.absorptance_seen, index)}")
    if row.geometric_estimate_db is not None:
        notes.append(f"geometry: {_db_cases(row.geometric_estimate_db, index)}")
    parts = ", ".join(f"{part} {fixed(cases['typ'][index])}" for part, cases in row.loss_parts_db.items()
                      if any(float(cases[case][index]) != 0 for case in cases))
    if parts:
        notes.append(parts)
    if row.kind == SEGMENT_ROW and row.reflectance is not None:
        notes.append(f"return loss {fixed(row.return_loss_db[index], 1)} dB")
    by_polarization = row_losses_db(row)
    if by_polarization is not None:
        notes.append(f"PDL {db_text(abs(by_polarization['s'][index] - by_polarization['p'][index]))} dB "
                     f"(s {db_text(by_polarization['s'][index])}, p {db_text(by_polarization['p'][index])})")
    notes.extend(row.facts)  # the user's own words among them: each format escapes the whole note
    if row.part is not None:
        notes.append(f"part {row.part.name} ({row.part.file})")
    return "; ".join(notes)


def parties_sentence(result, shown=escaped):
    """``source: NAME; receiver: NAME`` for the names the link gives (each through ``shown``, the
    format's escaping), or ``""``."""
    return "; ".join(f"{part}: {shown(name)}" for part, name in (("source", result.source_name),
                                                                 ("receiver", result.receiver_name)) if name)


def wavelength_status(result):
    """Per wavelength: ``"ok"``, or what fails there (``"SHORT"``, ``"OVERLOAD"``, both)."""
    short = ~(result.margin_db["worst"] >= result.required_margin_db)
    over = (np.zeros(short.shape, dtype=bool) if result.overload_dbm is None
            else ~(result.received_dbm["best"] <= result.overload_dbm))
    words = np.array(["ok", "SHORT", "OVERLOAD", "SHORT, OVERLOAD"])
    return words[short.astype(int) + 2 * over.astype(int)]


def budget_reasons(result):
    """What fails in the worst-case budget, in words: ``margin short``, ``overload exceeded``."""
    return [reason for ok, reason in ((result.margin_ok, "margin short"), (result.overload_ok, "overload exceeded"))
            if not ok]


def check_line(result, path, reasons):
    """The CI gate's line for one link: PASS or FAIL, its worst-case margin and what fails
    (``reasons``, in words: :func:`budget_reasons` and the review's gates)."""
    word = "PASS " if not reasons else "FAIL "
    worst = float(result.margin_db["worst"].min())
    line = (f"{word}  {escaped(path)}: worst-case margin {fixed(worst, signed=True)} dB, "
            f"required {fixed(result.required_margin_db)} dB")
    return line + (f" ({', '.join(reasons)})" if reasons else "")


def check_error_line(path):
    """The CI gate's line for a link whose input is wrong (the placed errors go to stderr)."""
    return f"ERROR  {escaped(path)}: input error"


def check_summary(count, closes, fails, broken, gated=0, *, by_yield=False):
    """The CI gate's last line; ``gated`` links failed a gate of the review (said when any did);
    ``by_yield``: the budgets were judged by their yield (``--min-yield``), not by closing."""
    gates = f", {gated} fail a safety, back-reflection or PDL gate" if gated else ""
    budget = (f"{closes} reach the least yield, {fails} fall short of it" if by_yield
              else f"{closes} close, {fails} do not close")
    return f"{count} link(s): {budget}{gates}, {broken} with input errors"
