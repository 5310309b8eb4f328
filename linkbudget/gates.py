"""The CI gate's checks beyond the margin and overload: eye safety at the reachable points, the
back reflection the source tolerates, and the link's polarization-dependent loss.

Each check is asked for on the command line (or, for the back reflection, by the source's own
``max_back_reflection``); each failure is a short reason for the gate's line.
"""

import numpy as np

from linkbudget.physics.laser_safety import HAZARD_LEVELS
from linkbudget.report.summary import fixed
from linkbudget.text import escaped


def hazard_failures(review, max_hazard_level):
    """The reason a reachable point is above ``max_hazard_level`` (or not assessed), if any."""
    if max_hazard_level is None:
        return []
    above = review.above(max_hazard_level)
    if not above:
        return []
    worst = ", ".join(f"{escaped(item.point.name)} {item.hazard_level or 'not assessed'}" for item in above)
    return [f"above hazard level {max_hazard_level}: {worst}"]


def back_reflection_failures(review, max_back_reflection_db):
    """The reason the worst-case back reflection exceeds the tolerance (the option's, else the
    source's), if it does."""
    budget = review.back_reflection
    tolerance_db = budget.tolerance_db if max_back_reflection_db is None else max_back_reflection_db
    if tolerance_db is None or not budget.reflections:
        return []
    worst_db = float(np.max(budget.level_db("worst")))
    if worst_db <= tolerance_db:
        return []
    return [f"back reflection {fixed(worst_db, signed=True)} dB above {fixed(tolerance_db, signed=True)} dB"]


def pdl_failures(review, max_pdl_db):
    """The reason the link's PDL exceeds ``max_pdl_db`` at some wavelength, if it does."""
    if max_pdl_db is None:
        return []
    pdl = review.polarization_loss.link_pdl_db
    if not np.any(~(pdl <= max_pdl_db)):
        return []
    return [f"PDL {fixed(float(np.nanmax(pdl)) if np.any(np.isfinite(pdl)) else np.inf)} dB above "
            f"{fixed(max_pdl_db)} dB"]


def gate_failures(result, *, max_hazard_level=None, max_back_reflection_db=None, max_pdl_db=None):
    """Every reason the link fails the review's gates (empty when it passes them)."""
    review = result.review
    return (hazard_failures(review, max_hazard_level) + back_reflection_failures(review, max_back_reflection_db)
            + pdl_failures(review, max_pdl_db))


def hazard_level_option(text):
    """A ``--max-hazard-level`` value as a name of :data:`HAZARD_LEVELS`, or ``ValueError``."""
    level = text.strip().upper()
    if level not in HAZARD_LEVELS:
        raise ValueError(f"a hazard level is one of {', '.join(HAZARD_LEVELS)}; got {text!r}")
    return level
