"""Mode coupling across a joint or a gap, from geometry, with its worst case over tolerances.

Both sides are :class:`~linkbudget.segments.base.Mode` s (a fibre's, a waveguide's, or a
launched beam's waist). The coupling is the Gaussian overlap
(:func:`linkbudget.physics.gaussian.coupling_efficiency_tilt_azimuth`: η = η_x·η_y, the offset
along one principal axis and the tilt turned at an azimuth from it). The azimuth is the joint's
``tilt_direction`` when given; otherwise the worst case searches every azimuth, the best case
too, and the typical point takes the tilt across the offset.
Every toleranced value (offset, tilt, separation, each side's mode-field diameter) is a spread;
the worst case is the smallest coupling over the corners of the tolerance box, the best case the
largest. The typical point and the interior points where coupling peaks are candidates too: equal
mode sizes where the two sides' ranges overlap, the sizes that couple best across the least gap
(w⁴ = w'⁴ + (λD/(πn))², :func:`_gap_matched_radius_m`), and the waist that spreads least over a
gap, so that the best case (the overload check) is not optimistic where coupling is not monotonic
in a value. With an offset d or a tilt at the best corner the best size moves a little further
(by about d² in w², a gain of order (d²/2w²)² in η), which the search does not follow: its best
case may then read pessimistic by that much, never optimistic. (The corners as the extremes of a
tolerance stack-up are common practice; coupling falls monotonically in offset, tilt and
separation alone, not always in a mode size.)
"""

import itertools

import numpy as np

from linkbudget.physics import gaussian
from linkbudget.physics.decibel import loss_db_from_transmittance
from linkbudget.physics.gaussian import coupling_efficiency_tilt_azimuth
from linkbudget.segments.cases import TYPICAL

#: cos ψ of the tilt's azimuth ψ from the offset's direction, per ``tilt_direction`` value.
TILT_DIRECTION_COSINES = {"along-offset": 1.0, "against-offset": -1.0, "across-offset": 0.0}
#: The nominal azimuth when ``tilt_direction`` is not given: the tilt across the offset.
TYPICAL_TILT_DIRECTION = "across-offset"


def _ends(spread):
    """The values a spread takes at the corners of the tolerance box (0 when absent)."""
    if spread is None:
        return (0.0,)
    return (spread.low,) if spread.is_fixed else (spread.low, spread.high)


def _value(case, spread):
    """The value of ``spread`` in ``case`` (0 when absent)."""
    return 0.0 if spread is None else case.value(spread)


def _azimuth_cosine(case, tilt, tilt_direction):
    """cos ψ of the tilt's azimuth in ``case``: the stated direction, else the case's value of an
    unknown azimuth (the nominal one across the offset; draws uniform over the circle)."""
    if tilt_direction is not None:
        return TILT_DIRECTION_COSINES[tilt_direction]
    azimuth_rad = case.unknown(tilt, 0.0, 2 * np.pi, nominal=None)
    return TILT_DIRECTION_COSINES[TYPICAL_TILT_DIRECTION] if azimuth_rad is None else np.cos(azimuth_rad)


def _case_losses_db(cases, typical_at, search):
    """case name -> loss [dB], from the efficiency each case's own point gives (``typical_at(case)``);
    the cases that search (worst, best) take the least and largest efficiency ``search()`` finds
    over the tolerance box, or the nominal point's where that is beyond them. The search and the
    nominal point are each evaluated once, and only when a case needs them."""
    evaluated = {}

    def once(key, compute):
        if key not in evaluated:
            evaluated[key] = compute()
        return evaluated[key]

    def nominal():
        return once("nominal", lambda: typical_at(TYPICAL))

    losses = {}
    for case in cases:
        if case.searches:
            least, largest = once("search", search)
            efficiency = case.extreme(nominal(), least, largest)
        else:
            efficiency = nominal() if case == TYPICAL else typical_at(case)
        losses[case.name] = loss_db_from_transmittance(efficiency)
    return losses


def _per_offset_axis(wavelength_m, before, after, offset_m, tilt_rad, separation_m, n, *, circular=False):
    """cos ψ -> (η with the offset along x, η with it along y), before/after as (x, y) radii; for
    ``circular`` modes the two are equal and one is computed."""
    (before_x, before_y), (after_x, after_y) = before, after
    misalignment = dict(offset_m=offset_m, tilt_rad=tilt_rad, separation_m=separation_m, n=n)

    def at(cosine):
        along_x = coupling_efficiency_tilt_azimuth(before_x, before_y, after_x, after_y, wavelength_m,
                                                   azimuth_cosine=cosine, **misalignment)
        if circular:
            return (along_x,)
        return (along_x, coupling_efficiency_tilt_azimuth(before_y, before_x, after_y, after_x, wavelength_m,
                                                          azimuth_cosine=cosine, **misalignment))
    return at


def _worse_axis(efficiencies):
    """The smaller of the offset axes' efficiencies (the offset lies along the worse axis)."""
    return efficiencies[0] if len(efficiencies) == 1 else np.minimum(*efficiencies)


def _circular(mode):
    """The mode has one axis for both (:meth:`~linkbudget.segments.base.Mode.circular`)."""
    return mode.x is mode.y


def _searched_cosines(at):
    """The azimuth cosines where min(η_x, η_y) can be least or largest over an unknown azimuth,
    on the axis before the wavelengths' (``at`` takes and gives arrays broadcast that way).

    ln η of each offset axis is a quadratic a + b·u + c·u² in u = cos ψ
    (:func:`~linkbudget.physics.gaussian.coupling_efficiency_tilt_azimuth`), found exactly from
    its values at u = −1, 0, 1; the extremes of the smaller of the two lie at u = ±1, at either
    quadratic's vertex or where the two cross. Candidates that do not exist (η underflows, no
    crossing) fall back to u = 1; each candidate is then evaluated exactly.
    """
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        logs = np.log(np.stack(at(np.array([[-1.0], [0.0], [1.0]]))))  # (offset axis, ..., u, wavelength)
        minus, zero, plus = logs[..., 0, :], logs[..., 1, :], logs[..., 2, :]
        a, b, c = zero, (plus - minus) / 2.0, (plus + minus) / 2.0 - zero
        vertices = -b / (2.0 * c)
        da, db, dc = a[0] - a[1], b[0] - b[1], c[0] - c[1]  # the two curves cross at da + db·u + dc·u² = 0
        q = -(db + np.copysign(np.sqrt(db**2 - 4.0 * da * dc), db)) / 2.0
        candidates = [*vertices, q / dc, da / q]
    found = [np.clip(np.nan_to_num(u, nan=1.0), -1.0, 1.0) for u in candidates]
    return np.stack(np.broadcast_arrays(-1.0, 1.0, *found), axis=-2)


#: Corner-by-azimuth-by-wavelength values evaluated at once (bounds the memory of the search).
_CHUNK_VALUES = 1 << 20


def _stacked(corners, shape):
    """The corners' (before x, before y, after x, after y, offset, tilt, separation) as arrays with
    a leading corner axis and an axis for the azimuths, broadcast against the wavelengths."""
    before, after, offset, tilt, gap = zip(*corners, strict=True)
    radii = [np.stack([np.broadcast_to(pair[axis], shape) for pair in pairs])[:, None, :]
             for pairs in (before, after) for axis in (0, 1)]
    scalars = [np.array(values, dtype=float)[:, None, None] for values in (offset, tilt, gap)]
    return radii, scalars


def coupling_losses_db(wavelength_m, before, after, cases, *, offset=None, tilt=None, separation=None, n=1.0,
                       tilt_direction=None):
    """Coupling loss [dB] per budget case between two modes.

    The offset lies along the mode's worse axis (an elliptical mode's offset direction is not
    known, so the axis where it hurts more is taken; circular modes are unaffected). The tilt
    turns the launched beam at an azimuth from the offset: ``tilt_direction`` fixes it for every
    case; without it the worst case takes the least coupling over every azimuth, the best case
    the largest, the nominal the tilt across the offset, and draws a uniformly random azimuth.
    Draws evaluate the overlap at their drawn values.

    Parameters
    ----------
    wavelength_m : numpy.ndarray
        Vacuum wavelengths [m].
    before, after : Mode
        The mode launched and the mode received.
    cases : sequence of Corner or Draws
        The budget cases (:mod:`linkbudget.segments.cases`).
    offset, tilt, separation : spread or None
        Lateral offset [m] at the receiving mode's waist, tilt [rad] (in the gap medium) and axial
        separation [m].
    n : float or numpy.ndarray
        Real index of the medium between the two waists.
    tilt_direction : str or None
        A key of :data:`TILT_DIRECTION_COSINES`, or ``None`` when not known.

    Returns
    -------
    dict
        case name -> loss array over the wavelength axis.

    References
    ----------
    .. [1] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56, 703 (1977).
    .. [2] A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", 1998, eqs. 8.69/8.75/8.81.
    """
    def typical_at(case):
        cosine = _azimuth_cosine(case, tilt, tilt_direction)
        at = _per_offset_axis(wavelength_m, _radii_at(before, case), _radii_at(after, case),
                              _value(case, offset), _value(case, tilt), _value(case, separation), n,
                              circular=_circular(before) and _circular(after))
        return _worse_axis(at(cosine))

    def search():
        return _searched_extremes(wavelength_m, before, after, offset, tilt, separation, n, tilt_direction)

    return _case_losses_db(cases, typical_at, search)


def _searched_extremes(wavelength_m, before, after, offset, tilt, separation, n, tilt_direction):
    """(least, largest) coupling efficiency over the tolerance box and every azimuth the tilt may
    have: in closed form over offset, tilt and azimuth between circular modes
    (:func:`_circular_extremes`), else over the box's corners (:func:`_corner_extremes`)."""
    search = _circular_extremes if _circular(before) and _circular(after) else _corner_extremes
    return search(wavelength_m, before, after, offset, tilt, separation, n, tilt_direction)


def _span(spread):
    """(low, high) of a spread, (0, 0) when absent."""
    ends = _ends(spread)
    return ends[0], ends[-1]


def _circular_extremes(wavelength_m, before, after, offset, tilt, separation, n, tilt_direction):
    """(least, largest) coupling between circular modes: the closed form over offset, tilt and
    azimuth (:func:`~linkbudget.physics.gaussian.circular_coupling_extremes`) over every candidate
    of mode sizes and separation at once (one candidate axis each), in blocks of wavelengths, so
    memory is O(wavelengths)."""
    given = None if tilt_direction is None else TILT_DIRECTION_COSINES[tilt_direction]
    box = dict(offset_range_m=_span(offset), tilt_range_rad=_span(tilt),
               cosine_range=(-1.0, 1.0) if given is None else (given, given))
    wavenumber = np.atleast_1d(gaussian.wavenumber_per_m(wavelength_m, n=n))
    before_sizes, after_sizes = ([x for x, _ in candidates] for candidates in
                                 _both_candidates(before, after, wavelength_m, separation, n))
    w1, w2 = _candidate_axis(before_sizes)[:, None, None], _candidate_axis(after_sizes)[None, :, None]
    gap = np.array(_ends(separation), dtype=float)[None, None, :, None]
    least, largest = gaussian.circular_coupling_extremes(w1, w2, wavenumber.reshape(-1), separation_m=gap, **box)
    return least.reshape(np.shape(wavelength_m)), largest.reshape(np.shape(wavelength_m))


def _candidate_axis(values):
    """Candidate values stacked on a leading axis: (candidates, 1) for constants, else
    (candidates, wavelengths)."""
    arrays = np.broadcast_arrays(*(np.asarray(value, dtype=float) for value in values))
    return np.stack(arrays).reshape(len(arrays), -1)


def _corner_extremes(wavelength_m, before, after, offset, tilt, separation, n, tilt_direction):
    """(least, largest) coupling efficiency over the corners of the tolerance box and every
    azimuth the tilt may have (:func:`_searched_cosines`), in bounded chunks: for elliptical modes,
    whose overlap is not one quadratic in offset and tilt over both axes."""
    shape = np.shape(wavelength_m)
    corners = list(itertools.product(*_both_candidates(before, after, wavelength_m, separation, n),
                                     _ends(offset), _ends(tilt), _ends(separation)))
    per_chunk = max(1, _CHUNK_VALUES // (8 * max(1, int(np.prod(shape)))))
    least, largest = [], []
    for start in range(0, len(corners), per_chunk):
        (bx, by, ax, ay), (d, theta, gap) = _stacked(corners[start:start + per_chunk], shape)
        at = _per_offset_axis(wavelength_m, (bx, by), (ax, ay), d, theta, gap, n)
        if tilt_direction is not None:
            cosines = np.array([[TILT_DIRECTION_COSINES[tilt_direction]]])
        else:
            cosines = _searched_cosines(at)
        values = _worse_axis(at(cosines))  # (corner, azimuth, wavelength)
        least.append(values.min(axis=(0, 1)))
        largest.append(values.max(axis=(0, 1)))
    return np.min(least, axis=0), np.max(largest, axis=0)


def _one_if_constant(radius_m):
    """The radius [m] with a wavelength axis of length one where it is the same at every
    wavelength (a datasheet mode field diameter), else as given: the coupling then computes what
    does not depend on the wavelength once, and broadcasts it."""
    radius_m = np.asarray(radius_m, dtype=float)
    if radius_m.ndim and radius_m.shape[-1] > 1 and np.all(radius_m == radius_m[..., :1]):
        return radius_m[..., :1]
    return radius_m


def _radii_at(mode, case):
    """(x, y) radii [m] of ``mode`` in ``case`` (:func:`_one_if_constant`), y the same array as x
    for a circular mode."""
    x = _one_if_constant(mode.x.at(case))
    return x, (x if _circular(mode) else _one_if_constant(mode.y.at(case)))


def _mode_ends(mode):
    """((x low, x high), (y low, y high)) radii [m] of ``mode`` (:func:`_one_if_constant`), each
    axis's ends computed once."""
    def ends(axis):
        return tuple(_one_if_constant(end) for end in axis.ends())

    x = ends(mode.x)
    return x, (x if _circular(mode) else ends(mode.y))


def _mode_candidates(ends, other_ends, gap_term_sq=None):
    """(x, y) radii of a mode to search, each once, from its :func:`_mode_ends` and the other
    mode's: the ends of its range, and the ends of the other's clipped into its range (where the
    ranges overlap, equal sizes couple best); across a gap, also the sizes that couple best with
    each end of the other (:func:`_gap_matched_radius_m`, where ``gap_term_sq`` is given)."""
    (x_low, x_high), (y_low, y_high) = ends
    (other_x_low, other_x_high), (other_y_low, other_y_high) = other_ends
    candidates = [(x_low, y_low), (x_high, y_high),
                  (np.clip(other_x_low, x_low, x_high), np.clip(other_y_low, y_low, y_high)),
                  (np.clip(other_x_high, x_low, x_high), np.clip(other_y_high, y_low, y_high))]
    if gap_term_sq is not None:
        candidates += [(np.clip(_gap_matched_radius_m(other_x, gap_term_sq), x_low, x_high),
                        np.clip(_gap_matched_radius_m(other_y, gap_term_sq), y_low, y_high))
                       for other_x, other_y in ((other_x_low, other_y_low), (other_x_high, other_y_high))]
    unique = []
    for x, y in candidates:
        if not any(np.array_equal(x, seen_x) and np.array_equal(y, seen_y) for seen_x, seen_y in unique):
            unique.append((x, y))
    return unique


def _both_candidates(before, after, wavelength_m, separation, n):
    """(candidates of ``before``, candidates of ``after``) (:func:`_mode_candidates`) across the
    ``separation`` in a medium of index ``n``."""
    before_ends, after_ends = _mode_ends(before), _mode_ends(after)
    gap_term_sq = _matched_gap_term_sq(wavelength_m, (*before_ends, *after_ends), separation, n)
    return (_mode_candidates(before_ends, after_ends, gap_term_sq),
            _mode_candidates(after_ends, before_ends, gap_term_sq))


#: Below this (λD/(πn))² / w⁴ at the least separation D, the radius coupling best across the gap
#: is the other's own to better than 10^-6 in η (the gain is of the order of its square):
#: :func:`_matched_gap_term_sq` leaves those candidates out.
_GAP_MATCH_NEGLIGIBLE = 1e-3


def _gap_matched_radius_m(other_radius_m, gap_term_sq):
    """The radius w that couples best with a mode of radius w' across a gap, offset and tilt
    aside: w⁴ = w'⁴ + (λD/(πn))².

    The gap's coupling of two Gaussian waists D apart, η = 4w²w'²/((w² + w'²)² + (λD/(πn))²)
    (Joyce and DeLoach 1984 [1]_, the separation term of
    :func:`~linkbudget.physics.gaussian.circular_coupling_extremes`), is largest in w² where its
    derivative vanishes, (w²)² = (w'²)² + (λD/(πn))²; each axis of an elliptical mode alike.

    References
    ----------
    .. [1] W. B. Joyce and B. C. DeLoach, "Alignment of Gaussian beams", Appl. Opt. 23, 4187
       (1984) (from memory).
    """
    return (np.asarray(other_radius_m, dtype=float) ** 4 + gap_term_sq) ** 0.25


def _matched_gap_term_sq(wavelength_m, axes_ends, separation, n):
    """(λD/(πn))² at the least separation D, or ``None`` where the sizes coupling best across the
    gap differ from the other side's own by a negligible amount (:data:`_GAP_MATCH_NEGLIGIBLE`)
    or no mode size has a range to search (``axes_ends``: (low, high) of each mode axis)."""
    if all(np.array_equal(low, high) for low, high in axes_ends):
        return None
    gap_term_sq = (np.asarray(wavelength_m) * _span(separation)[0] / (np.pi * np.real(n))) ** 2
    least_radius = min(float(np.min(low)) for low, _ in axes_ends)
    return gap_term_sq if np.max(gap_term_sq) / least_radius**4 > _GAP_MATCH_NEGLIGIBLE else None


def aperture_losses_db(wavelength_m, launched, cases, *, separation, aperture_diameter, n=1.0):
    """Loss per case of the power falling outside a circular aperture after a free-space path.

    The launched beam has its waist (``launched`` mode radii) at the start; after the axial
    ``separation`` z its radius is w(z) (:func:`linkbudget.physics.gaussian.spot_radius_m`), and the aperture of
    radius a passes T = 1 − exp(−2a²/w²) (:func:`linkbudget.physics.gaussian.aperture_transmission`).
    An elliptical beam is taken at its larger radius (conservative for the margin). Worst and best
    cases search the corners of the waist, separation and aperture spreads, and the waist
    w0* = √(λz/(π·n)) that spreads least over the separation z, clipped into the waist's range;
    draws evaluate their own values.

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", University Science Books, 1986 (Gaussian beam propagation and
       the power through a circular aperture).
    """
    def transmittance(waist_m, separation_m, diameter_m):
        spot_m = gaussian.spot_radius_m(waist_m, separation_m, wavelength_m, n=n)
        return gaussian.aperture_transmission(diameter_m / 2, spot_m)

    def typical_at(case):
        waist_m = np.maximum(launched.x.at(case), launched.y.at(case))
        return transmittance(waist_m, case.value(separation), case.value(aperture_diameter))

    def search():
        (x_low, x_high), (y_low, y_high) = launched.x.ends(), launched.y.ends()
        waist_low, waist_high = np.maximum(x_low, y_low), np.maximum(x_high, y_high)

        def waist_candidates(separation_m):
            least_spread = np.sqrt(wavelength_m * separation_m / (np.pi * n))  # minimises w(z) (Siegman)
            return (waist_low, waist_high, np.clip(least_spread, waist_low, waist_high))

        corners = [transmittance(w, z, a) for z, a in itertools.product(_ends(separation), _ends(aperture_diameter))
                   for w in waist_candidates(z)]
        return np.min(corners, axis=0), np.max(corners, axis=0)

    return _case_losses_db(cases, typical_at, search)
