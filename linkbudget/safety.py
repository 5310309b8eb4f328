"""Eye safety at every point of a link where a person can reach the light.

The points (:func:`reachable_points`) are the source output, every connector, every free-space
gap and the receiver input, plus those the link's ``reachable:`` block adds after a segment, less
those it excludes with a reason. At each point the highest power that can be there is the
best case of the budget: maximum launch and every loss upstream at its low end, at every
wavelength of the link (:func:`point_power_w`).

The assessment (:func:`assess_point`) compares that power with the continuous-wave accessible
emission limits of :mod:`linkbudget.physics.laser_safety` (IEC 60825-1:2007 Ed. 2; hazard levels
of IEC 60825-2:2004 Ed. 3 with A1/A2):

- the channels of a link (``channels:``) are on at once and share the fibre, so their powers add:
  the point is within a limit when Σ P_i/AEL_i ≤ 1 over the channels (the rule for several
  wavelengths acting on the same tissue, here taken over all of them, which is the stricter
  reading); the wavelengths of a sweep (``band:``) are alternatives, each assessed alone, and the
  worst is reported; a single ``wavelength`` is alone;
- the accessible emission is the power that passes each measurement condition's aperture: a
  Gaussian beam from the waist at the exposed face (the mode of the fibre or waveguide that ends
  there; a gap's launched ``beam``, else the mode before it), spreading in air, through the
  aperture at its distance (:func:`~linkbudget.physics.gaussian.aperture_transmission`);
  where the beam is not known (the source output, a point after a segment without a mode) all
  the power is taken to pass every aperture, which is the most a point can hold, and hazard level
  1M cannot be told from 1;
- a gap's beam is assessed where it enters the gap, from its waist diameter and divergence;
  further along it is larger, so the estimate holds for the whole gap only while the beam has not
  been focused again.

The figures are estimates from the link file: not a measurement, not a product classification
and not a hazard-level assessment. IEC 60825-1, IEC 60825-2, local regulations and the site's
laser safety officer decide.
"""

import warnings
from dataclasses import dataclass

import numpy as np

from linkbudget.config.reachable import RECEIVER_POINT, SOURCE_POINT
from linkbudget.physics import gaussian, laser_safety
from linkbudget.physics.validity import ValidityWarning
from linkbudget.segments.rows import COATING_ROW, SEGMENT_ROW

#: The kinds of segment whose place is a default reachable point, and what the point is called. An
#: unplugged connector exposes a fibre end on both sides: the one facing the source carries the
#: light arriving at the connector, the other none of this source's light, so the point takes the
#: power arriving at the connector.
POINT_KINDS = {"connector": "connector", "gap": "free-space beam"}


@dataclass(frozen=True)
class ReachablePoint:
    """A point where the light can be reached.

    ``before_row`` is the index of the budget row the point stands before (the number of rows
    for the receiver input); ``waist_radius_m`` the 1/e² radius of the beam leaving the exposed face
    over the wavelength axis, or ``None`` where it is not known; ``excluded`` the reason the link
    gives for a point that cannot be reached, else ``None``.
    """

    name: str
    what: str
    before_row: int
    waist_radius_m: np.ndarray | None = None
    excluded: str | None = None


def _segment_row_indices(rows):
    """segment name -> the index of its own row (a coating's is its coating row)."""
    return {row.origin[0]: index for index, row in enumerate(rows) if row.kind in (SEGMENT_ROW, COATING_ROW)}


def _largest_radius_m(mode, wavelength_m):
    """The larger principal radius of a mode at its largest (the beam that spreads least, so the
    most power in an aperture far away), or ``None``."""
    if mode is None:
        return None
    return np.maximum(mode.x.ends()[1], mode.y.ends()[1]) * np.ones(np.shape(wavelength_m))


def _modes(segments, wavelength_m):
    with warnings.catch_warnings():  # validity notes are the budget's, reported there
        warnings.simplefilter("ignore", ValidityWarning)
        return [segment.mode(wavelength_m) for segment in segments]


def reachable_points(link, rows, wavelength_m):
    """The reachable points of ``link`` (its segments and ``reachable:`` block) over its ``rows``,
    in the order of the chain, excluded points included with their reason."""
    segments = link.segments
    modes = _modes(segments, wavelength_m)
    block = link.spec.reachable
    excluded = {} if block is None else {point.at: point.reason for point in block.exclude}
    points = [ReachablePoint(SOURCE_POINT, "source", 0, None, excluded.get(SOURCE_POINT))]
    added = {}
    for point in ([] if block is None else block.add):
        added.setdefault(point.after, []).append(point)
    row_index = _segment_row_indices(rows)
    for position, segment in enumerate(segments):
        index = row_index[segment.name]
        before = modes[position - 1] if position else None
        if segment.kind in POINT_KINDS:
            mode = segment.launched_mode(wavelength_m, before) if segment.kind == "gap" else before
            points.append(ReachablePoint(segment.name, POINT_KINDS[segment.kind], index,
                                         _largest_radius_m(mode, wavelength_m), excluded.get(segment.name)))
        for point in added.get(segment.name, ()):
            points.append(ReachablePoint(point.shown_name, "added", index + 1,
                                         _largest_radius_m(modes[position], wavelength_m)))
    points.append(ReachablePoint(RECEIVER_POINT, "receiver", len(rows),
                                 _largest_radius_m(modes[-1], wavelength_m), excluded.get(RECEIVER_POINT)))
    return tuple(points)


def point_power_w(result, point):
    """The highest power at ``point`` [W] over the wavelength axis: the best case (maximum
    launch, every loss before it at its low end); 0 W where total internal reflection blocks it."""
    if point.before_row == 0:
        power_dbm = result.source_dbm["best"]
    else:
        power_dbm = result.power_after_dbm["best"][point.before_row - 1]
    return 10.0 ** ((np.asarray(power_dbm, dtype=float) - 30.0) / 10.0)


def accessible_fractions(waist_radius_m, wavelength_m):
    """condition -> fraction of the power that passes its aperture at its distance, over the
    wavelength axis; 1 for every condition where the beam is not known.

    A Gaussian beam of waist radius w0 at the exposed face, in air: w(d) = w0·√(1 + (d/z_R)²)
    (Kogelnik & Li 1966), and the power in a centred aperture of radius a is 1 − exp(−2a²/w²)
    (Siegman 1986).
    """
    ones = np.ones(np.shape(wavelength_m))
    fractions = {}
    for condition in laser_safety.MEASUREMENT_CONDITIONS:
        if waist_radius_m is None:
            fractions[condition.name] = ones
            continue
        spot_m = gaussian.spot_radius_m(waist_radius_m, condition.distance_m, wavelength_m)
        fractions[condition.name] = gaussian.aperture_transmission(
            laser_safety.aperture_diameter_m(condition, wavelength_m) / 2, spot_m)
    return fractions


@dataclass(frozen=True)
class Assessment:
    """A reachable point against the limits, for the wavelengths that act together there.

    ``power_w`` is the highest total power at the point (summed over the channels, or at the
    worst wavelength of a sweep); ``class1_limit_w`` the total power at which it would reach the
    Class 1 limit under the most restrictive measurement condition; ``margin_db`` =
    10·log10(limit/power) (negative above the limit); ``hazard_level`` a name of
    :data:`~linkbudget.physics.laser_safety.HAZARD_LEVELS`, or ``None`` where a wavelength lies
    outside the assessed band; ``wavelength_index`` the wavelengths assessed (indices).
    """

    point: ReachablePoint
    power_w: float
    class1_limit_w: float
    margin_db: float
    hazard_level: str | None
    wavelength_index: tuple
    beam_known: bool

    @property
    def above_level_1(self):
        return self.hazard_level != "1"


def _ratios(power_w, fractions, limit_w, conditions, together):
    """Σ P_i·f_i/AEL_i under the most restrictive of ``conditions``: one value for the channels
    (``together``), else one per wavelength."""
    per_condition = np.array([power_w * fractions[condition.name] / limit_w for condition in conditions])
    if together:
        per_condition = per_condition.sum(axis=1, keepdims=True)
    return per_condition.max(axis=0)


@dataclass(frozen=True)
class Limits:
    """The limits [W] of the classes over a link's wavelength axis (computed once per link)."""

    class1_w: np.ndarray
    class3r_w: np.ndarray
    class3b_w: np.ndarray

    @classmethod
    def over(cls, wavelength_m):
        return cls(laser_safety.class1_ael_w(wavelength_m), laser_safety.class3r_ael_w(wavelength_m),
                   laser_safety.class3b_ael_w(wavelength_m))


def assess_point(result, spec, point, limits=None):
    """The :class:`Assessment` of ``point``: the channels of a ``channels`` link together, else
    the worst wavelength (the highest hazard level, then the least margin). ``limits``: the
    :class:`Limits` of the link's axis, if already computed."""
    wavelength_m = result.wavelength_m
    limits = Limits.over(wavelength_m) if limits is None else limits
    power_w = point_power_w(result, point)
    fractions = accessible_fractions(point.waist_radius_m, wavelength_m)
    together = spec.channels is not None
    conditions, aided = laser_safety.MEASUREMENT_CONDITIONS, laser_safety.MEASUREMENT_CONDITIONS[:2]
    class1 = _ratios(power_w, fractions, limits.class1_w, conditions, together)
    levels = laser_safety.hazard_level(
        class1, _ratios(power_w, fractions, limits.class1_w, (laser_safety.UNAIDED_EYE,), together),
        _ratios(power_w, fractions, limits.class3b_w, aided, together),
        _ratios(power_w, fractions, limits.class3r_w, conditions, together),
        _ratios(power_w, fractions, limits.class3b_w, conditions, together))
    totals_w = np.array([power_w.sum()]) if together else power_w
    levels = np.atleast_1d(levels)
    rank = np.full(levels.shape, len(laser_safety.HAZARD_LEVELS))  # not assessed (NaN) ranks highest
    for order, name in enumerate(laser_safety.HAZARD_LEVELS):
        rank[(levels == name) & ~np.isnan(class1)] = order
    worst = int(np.lexsort((np.nan_to_num(class1, nan=np.inf), rank))[-1])
    index = tuple(range(wavelength_m.size)) if together else (worst,)
    ratio, total_w = float(class1[worst]), float(totals_w[worst])
    assessed = bool(np.isfinite(ratio))
    with np.errstate(divide="ignore"):
        limit_w = total_w / ratio if ratio > 0 else float("inf") if assessed else float("nan")
        margin_db = float(-10.0 * np.log10(ratio)) if assessed else float("nan")
    return Assessment(point, total_w, limit_w, margin_db, str(levels[worst]) if assessed else None,
                      index, point.waist_radius_m is not None)


def assess_link(link, result):
    """(assessments of the reachable points, excluded points), each in chain order."""
    points = reachable_points(link, result.rows, result.wavelength_m)
    limits = Limits.over(result.wavelength_m)
    return (tuple(assess_point(result, link.spec, point, limits) for point in points if point.excluded is None),
            tuple(point for point in points if point.excluded is not None))
