"""The Markdown section of a link's review: eye safety at the reachable points, back reflection
and polarization-dependent loss, for a pull-request comment (estimates; the cautions follow)."""

import numpy as np

from linkbudget.report import review_text as words
from linkbudget.report.summary import db_text


def review_lines(result, table, shown):
    """The section's Markdown lines; ``table`` builds a Markdown table, ``shown`` escapes user text."""
    if result.review is None:
        return []
    rows = [[shown(item.point.name), item.point.what, words.assessed_at(result, item),
             words.milliwatt_text(item.power_w), words.milliwatt_text(item.class1_limit_w),
             db_text(item.margin_db, True) if np.isfinite(item.margin_db) else "n/a",
             "known" if item.beam_known else "unknown",
             f"**{item.hazard_level or 'n/a'}**" if item.above_level_1 else item.hazard_level]
            for item in result.review.assessments]
    lines = ["", "Eye safety at reachable points (estimates):", ""]
    lines += table(["point", "what", "wavelength", "highest power mW", "Class 1 limit mW", "margin dB", "beam",
                    "hazard level"], rows, text_columns=3)
    lines += ["", words.LIMITS_SENTENCE, ""]
    lines += [f"- {'**' + sentence + '**' if alarm else sentence}" for sentence, alarm in
              (*words.safety_sentences(result, shown), *words.back_reflection_sentences(result, shown))]
    lines += [f"- {words.polarization_sentence(result, shown)}"]
    return lines
