"""The JSON entries of a link's review: ``safety``, ``back_reflection`` and
``polarization_dependent_loss`` (documented in ``docs/json-result.md``)."""

import numpy as np

from linkbudget.physics.decibel import dbm_from_watt
from linkbudget.physics.laser_safety import EDITIONS
from linkbudget.segments.rows import POLARIZATIONS

#: The assumptions every safety figure rests on, written with them.
SAFETY_ASSUMPTIONS = (
    "continuous emission, long exposure (time base 100 s), small source (C6 = 1)",
    "highest power at each point: maximum launch, every loss before it at its low end",
    "channels add (sum of power over limit); the points of a band are assessed one by one",
    "accessible emission through the apertures of IEC 60825-1:2007 Table 10 for a Gaussian beam from the "
    "exposed face; all the power where the beam is not known",
    "limits from memory of the standard, not confirmed in a copy; see the README",
)


def _dbm(power_w, number):
    return number(float(dbm_from_watt(power_w)))


def _assessment_entry(result, item, numbers, number):
    point = item.point
    before = None if point.before_row == 0 else result.rows[point.before_row - 1].id
    return {
        "name": point.name,
        "what": point.what,
        "after_row": before,
        "power_dbm": _dbm(item.power_w, number),
        "class1_limit_dbm": _dbm(item.class1_limit_w, number),
        "margin_db": number(item.margin_db),
        "hazard_level": item.hazard_level,
        "above_hazard_level_1": item.above_level_1,
        "wavelengths_nm": numbers(result.wavelength_m[list(item.wavelength_index)] * 1e9, wavelength=True),
        "beam_known": item.beam_known,
    }


def safety_entry(result, numbers, number):
    """The ``safety`` object: every reachable point assessed, every excluded point with its reason."""
    review = result.review
    return {
        "standards": list(EDITIONS),
        "assumptions": list(SAFETY_ASSUMPTIONS),
        "points": [_assessment_entry(result, item, numbers, number) for item in review.assessments],
        "excluded": [{"name": point.name, "what": point.what, "reason": point.excluded} for point in review.excluded],
        "above_hazard_level_1": [item.point.name for item in review.assessments if item.above_level_1],
    }


def back_reflection_entry(result, numbers, number):
    """The ``back_reflection`` object: the total per figure, each row's contribution, the largest."""
    budget = result.review.back_reflection
    largest = budget.largest()
    with np.errstate(divide="ignore"):
        reflections = [{
            "row": item.row_id,
            "contribution_db": {figure: numbers(10.0 * np.log10(item.total(figure))) for figure in item.contribution},
        } for item in budget.reflections]
    return {
        "tolerance_db": None if budget.tolerance_db is None else number(budget.tolerance_db),
        "level_db": {figure: numbers(budget.level_db(figure)) for figure in ("typ", "worst")},
        "tolerated": budget.tolerated,
        "largest": None if largest is None else largest.row_id,
        "reflections": reflections,
    }


def polarization_loss_entry(result, numbers):
    """The ``polarization_dependent_loss`` object: each row's loss for s and p, and the link's."""
    loss = result.review.polarization_loss
    return {
        "rows": [{"row": item.row_id, "loss_db": {pol: numbers(item.loss_db[pol]) for pol in POLARIZATIONS},
                  "pdl_db": numbers(item.pdl_db)} for item in loss.rows],
        "link_loss_db": {pol: numbers(loss.link_loss_db[pol]) for pol in POLARIZATIONS},
        "link_pdl_db": numbers(loss.link_pdl_db),
    }
