"""The review's sentences in words, shared by the terminal and the Markdown reports: each point
above hazard level 1, the points excluded, the back-reflection figure and the link's PDL.

Every function takes ``shown``, the format's escaping of the user's text (names, reasons)."""

import numpy as np

from linkbudget.physics.laser_safety import EDITIONS
from linkbudget.report.summary import db_text, fixed
from linkbudget.text import escaped, nm

#: What a hazard level above 1 means for the eye, in a few words (IEC 60825-1 class descriptions).
LEVEL_WORDS = {"1M": " (within the limit for the unaided eye at 100 mm, above it through a magnifier or telescope)",
               "3R": " (up to 5 times the Class 1 limit: looking into the beam is potentially hazardous)",
               "3B": " (looking into the beam is hazardous)",
               "4": " (above Class 3B: the eye and the skin are at risk, also from diffuse reflections)"}

#: The standards and assumptions line under the table.
LIMITS_SENTENCE = (f"Limits: {'; '.join(EDITIONS)}; continuous emission, small source, time base 100 s, from memory "
                   "of the standards. 'beam unknown': all the power at the point is taken to enter the eye.")


def milliwatt_text(power_w):
    return f"{power_w * 1e3:.3g}" if np.isfinite(power_w) else "n/a"


def assessed_at(result, item):
    """The wavelength an assessment is for, or how many channels it sums."""
    wavelengths = [nm(result.wavelength_m[index]) for index in item.wavelength_index]
    return wavelengths[0] if len(wavelengths) == 1 else f"{len(wavelengths)} channels"


#: The columns of the reachable points' table in the Markdown and HTML reports.
POINT_HEADERS = ["point", "what", "wavelength", "highest power mW", "Class 1 limit mW", "margin dB", "beam",
                 "hazard level"]


def point_cells(result, item):
    """The plain-text cells of one reachable point under :data:`POINT_HEADERS` (the name as the
    user wrote it: each format escapes it)."""
    return [item.point.name, item.point.what, assessed_at(result, item), milliwatt_text(item.power_w),
            milliwatt_text(item.class1_limit_w),
            db_text(item.margin_db, True) if np.isfinite(item.margin_db) else "n/a",
            "known" if item.beam_known else "unknown", item.hazard_level or "n/a"]


def point_sentence(result, item, shown=escaped):
    """The sentence for a point above hazard level 1 or not assessed, else ``None``."""
    name, where = shown(item.point.name), assessed_at(result, item)
    if item.hazard_level is None:
        return (f"{name}: NOT ASSESSED at {where}: the limits here cover 700-4000 nm only; treat the point as "
                "hazardous until a laser safety officer has assessed it.")
    if not item.above_level_1:
        return None
    return (f"{name}: ABOVE the Class 1 limit (hazard level 1) at {where}: highest power "
            f"{milliwatt_text(item.power_w)} mW against {milliwatt_text(item.class1_limit_w)} mW, "
            f"{fixed(-item.margin_db)} dB over; estimated hazard level {item.hazard_level}"
            f"{LEVEL_WORDS.get(item.hazard_level, '')}.")


def safety_sentences(result, shown=escaped):
    """(sentence, is_alarm) for the points above level 1 (or a sentence that none is), then one
    for each excluded point with its reason."""
    review = result.review
    found = [(sentence, True) for item in review.assessments
             if (sentence := point_sentence(result, item, shown)) is not None]
    if not found:
        found.append(("Every reachable point is within the Class 1 limit (hazard level 1), by these estimates.",
                      False))
    return found + [(f"excluded: {shown(point.name)} ({point.what}): {shown(point.excluded)}", False)
                    for point in review.excluded]


def back_reflection_sentences(result, shown=escaped):
    """(sentence, is_alarm): the back-reflection figure and its largest reflection, and the
    source's tolerance when given."""
    budget = result.review.back_reflection
    if not budget.reflections:
        return [("Back reflection toward the source: no row reflects (no return loss or face given).", False)]
    worst = budget.level_db("worst")
    index = int(np.argmax(worst))
    at = f" at {nm(result.wavelength_m[index])}" if result.wavelength_m.size > 1 else ""
    largest = budget.largest()
    with np.errstate(divide="ignore"):
        largest_db = 10 * np.log10(largest.total("worst")[index])
    found = [(f"Back reflection toward the source{at}: {db_text(budget.level_db('typ')[index], True)} dB typical, "
              f"{db_text(worst[index], True)} dB worst case (optical return loss {db_text(-worst[index])} dB) from "
              f"{len(budget.reflections)} reflection(s), summed incoherently; largest: {shown(largest.row_id)} "
              f"({db_text(largest_db, True)} dB).", False)]
    if budget.tolerance_db is not None:
        ok = budget.tolerated
        found.append((f"Source tolerance {db_text(budget.tolerance_db, True)} dB: "
                      + ("met." if ok else f"EXCEEDED by {fixed(float(np.max(worst)) - budget.tolerance_db)} dB."),
                      not ok))
    return found


def polarization_sentence(result, shown=escaped):
    """The link's polarization-dependent loss and the rows it comes from."""
    loss = result.review.polarization_loss
    if not loss.rows:
        return "Polarization-dependent loss: none (no oblique face or coating)."
    pdl = loss.link_pdl_db
    index = int(np.nanargmax(pdl)) if np.any(np.isfinite(pdl)) else 0
    at = f" at {nm(result.wavelength_m[index])}" if result.wavelength_m.size > 1 else ""
    rows = ", ".join(f"{shown(item.row_id)} {db_text(item.pdl_db[index])}" for item in loss.rows)
    return (f"Polarization-dependent loss of the link{at}: {db_text(pdl[index])} dB (s light "
            f"{db_text(loss.link_loss_db['s'][index])} dB, p light {db_text(loss.link_loss_db['p'][index])} "
            f"dB, typical); from: {rows}.")
