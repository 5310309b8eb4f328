"""The terminal sections of a link's review: eye safety at the reachable points, the
back-reflection budget and the polarization-dependent loss (estimates; the cautions follow)."""

import numpy as np
from rich import box
from rich.table import Table
from rich.text import Text

from linkbudget.physics.laser_safety import EDITIONS
from linkbudget.report.summary import db_text, fixed
from linkbudget.text import escaped, nm


def _mw(power_w):
    return f"{power_w * 1e3:.3g}" if np.isfinite(power_w) else "n/a"


def _where(result, item):
    wavelengths = [nm(result.wavelength_m[index]) for index in item.wavelength_index]
    return wavelengths[0] if len(wavelengths) == 1 else f"{len(wavelengths)} channels"


def point_statement(result, item):
    """The sentence for one point: within hazard level 1, or above it and by how much."""
    name, where = escaped(item.point.name), _where(result, item)
    if item.hazard_level is None:
        return (f"{name}: NOT ASSESSED at {where}: the limits here cover 700-4000 nm only; treat the point as "
                "hazardous until a laser safety officer has assessed it.")
    if not item.above_level_1:
        return None
    return (f"{name}: ABOVE the Class 1 limit (hazard level 1) at {where}: highest power {_mw(item.power_w)} mW "
            f"against {_mw(item.class1_limit_w)} mW, {fixed(-item.margin_db)} dB over; estimated hazard level "
            f"{item.hazard_level}.")


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
        table.add_row(name, *[_where(result, item)] * several, _mw(item.power_w), _mw(item.class1_limit_w),
                      db_text(item.margin_db, True) if np.isfinite(item.margin_db) else "n/a",
                      "known" if item.beam_known else "unknown",
                      Text(item.hazard_level or "n/a", style="bold red" if item.above_level_1 else "green"))
    return table


def _limits_line():
    return Text(f"Limits: {'; '.join(EDITIONS)}; continuous emission, small source, time base 100 s, from memory "
                "of the standards. 'beam unknown': all the power at the point is taken to enter the eye.",
                style="dim")


def safety_lines(result):
    """The statements under the table: points above level 1, points excluded with their reason."""
    review = result.review
    lines = [Text(statement, style="bold red") for item in review.assessments
             if (statement := point_statement(result, item)) is not None]
    if not lines:
        lines.append(Text("Every reachable point is within the Class 1 limit (hazard level 1), by these estimates.",
                          style="green"))
    lines += [Text(f"excluded: {escaped(point.name)} ({point.what}): {escaped(point.excluded)}", style="dim")
              for point in review.excluded]
    return lines


def back_reflection_lines(result):
    """The back-reflection figure, its largest contribution and the source's tolerance."""
    budget = result.review.back_reflection
    if not budget.reflections:
        return [Text("Back reflection toward the source: no row reflects (no return loss or face given).")]
    worst = budget.level_db("worst")
    index = int(np.argmax(worst))
    at = f" at {nm(result.wavelength_m[index])}" if result.wavelength_m.size > 1 else ""
    largest = budget.largest()
    with np.errstate(divide="ignore"):
        largest_db = 10 * np.log10(largest.total("worst")[index])
    text = (f"Back reflection toward the source{at}: {db_text(budget.level_db('typ')[index], True)} dB typical, "
            f"{db_text(worst[index], True)} dB worst case (optical return loss {db_text(-worst[index])} dB) from "
            f"{len(budget.reflections)} reflection(s), summed incoherently; largest: {escaped(largest.row_id)} "
            f"({db_text(largest_db, True)} dB).")
    lines = [Text(text)]
    if budget.tolerance_db is not None:
        ok = budget.tolerated
        lines.append(Text(f"Source tolerance {db_text(budget.tolerance_db, True)} dB: "
                          + ("met." if ok else f"EXCEEDED by {fixed(float(np.max(worst)) - budget.tolerance_db)} dB."),
                          style="green" if ok else "bold red"))
    return lines


def polarization_lines(result):
    """The link's polarization-dependent loss and the rows it comes from."""
    loss = result.review.polarization_loss
    if not loss.rows:
        return [Text("Polarization-dependent loss: none (no oblique face or coating).")]
    pdl = loss.link_pdl_db
    index = int(np.nanargmax(pdl)) if np.any(np.isfinite(pdl)) else 0
    at = f" at {nm(result.wavelength_m[index])}" if result.wavelength_m.size > 1 else ""
    rows = ", ".join(f"{escaped(item.row_id)} {db_text(item.pdl_db[index])}" for item in loss.rows)
    return [Text(f"Polarization-dependent loss of the link{at}: {db_text(pdl[index])} dB (s light "
                 f"{db_text(loss.link_loss_db['s'][index])} dB, p light {db_text(loss.link_loss_db['p'][index])} "
                 f"dB, typical); from: {rows}.")]


def review_parts(result):
    """Every section of the review, in order, for the terminal report."""
    if result.review is None:
        return []
    return [safety_table(result), _limits_line(), *safety_lines(result), *back_reflection_lines(result),
            *polarization_lines(result)]
