"""The terminal sections of a link's review: eye safety at the reachable points, the
back-reflection budget and the polarization-dependent loss (estimates; the cautions follow)."""

import numpy as np
from rich import box
from rich.table import Table
from rich.text import Text

from linkbudget.report.review_text import (
    LIMITS_SENTENCE,
    assessed_at,
    back_reflection_sentences,
    milliwatt_text,
    polarization_sentence,
    safety_sentences,
)
from linkbudget.report.summary import db_text
from linkbudget.text import escaped, nm


def safety_table(result):
    """Each reachable point's highest power, its Class 1 limit, the margin and the hazard level."""
    review = result.review
    several = result.wavelength_m.size > 1
    single = "" if several else f" at {nm(result.wavelength_m[0])}"
    table = Table(title=f"Eye safety at reachable points{single} (estimates)", title_justify="left",
                  box=box.SIMPLE_HEAD)
    table.add_column("point", min_width=14, overflow="fold")
    for header in ("wavelength",) * several + ("highest\npower mW", "Class 1\nlimit mW", "margin\ndB", "beam",
                                              "hazard\nlevel"):
        table.add_column(header, justify="right", no_wrap=True)
    for item in review.assessments:
        name = Text(escaped(item.point.name))
        name.append(f"\n{item.point.what}", style="dim")
        table.add_row(name, *[assessed_at(result, item)] * several, milliwatt_text(item.power_w),
                      milliwatt_text(item.class1_limit_w),
                      db_text(item.margin_db, True) if np.isfinite(item.margin_db) else "n/a",
                      "known" if item.beam_known else "unknown",
                      Text(item.hazard_level or "n/a", style="bold red" if item.above_level_1 else "green"))
    return table


def _lines(sentences):
    return [Text(sentence, style="bold red" if alarm else None) for sentence, alarm in sentences]


def review_parts(result):
    """Every section of the review, in order, for the terminal report."""
    if result.review is None:
        return []
    return [safety_table(result), Text(LIMITS_SENTENCE, style="dim"), *_lines(safety_sentences(result)),
            *_lines(back_reflection_sentences(result)), Text(polarization_sentence(result))]
