"""Mode coupling across a joint or a gap, from geometry, with its worst case over tolerances.

Both sides are :class:`~linkbudget.segments.base.Mode` s (a fibre's, a waveguide's, or a
launched beam's waist). The coupling is the Gaussian overlap
(:func:`linkbudget.physics.gaussian.coupling_efficiency_1d` on each transverse axis, η = η_x·η_y).
Every toleranced value (offset, tilt, separation, each side's mode-field diameter) is a spread;
the worst case is the smallest coupling over the corners of the tolerance box, the best case the
largest. The typical point and the interior points where coupling peaks are candidates too: equal
mode sizes where the two sides' ranges overlap, and the waist that spreads least over a gap, so
that the best case (the overload check) is not optimistic where coupling is not monotonic in a
value. (The corners as the extremes of a tolerance stack-up are common practice; coupling falls
monotonically in offset, tilt and separation alone, not always in a mode size.)
"""

import itertools

import numpy as np

from linkbudget.config.fields import CASES
from linkbudget.physics import gaussian
from linkbudget.physics.decibel import loss_db_from_transmittance
from linkbudget.physics.gaussian import coupling_efficiency_1d


def _ends(spread):
    """The values a spread takes at the corners of the tolerance box (0 when absent)."""
    if spread is None:
        return (0.0,)
    return (spread.low,) if spread.is_fixed else (spread.low, spread.high)


def _typ(spread):
    return 0.0 if spread is None else spread.typ_value


def _case_losses_db(typical, corners):
    """Loss per case from the typical efficiency and those at the tolerance corners (the typical
    point counts too, so that best ≤ typ ≤ worst in loss even where a value is not monotonic)."""
    candidates = np.array([typical, *corners])
    efficiency = {"typ": typical, "worst": candidates.min(axis=0), "best": candidates.max(axis=0)}
    return {case: loss_db_from_transmittance(efficiency[case]) for case in CASES}


def _efficiency(wavelength_m, before_x, before_y, after_x, after_y, offset_m, tilt_rad, separation_m, n):
    """η with the misalignment along the mode's worse axis (an elliptical mode's offset direction
    is not known, so the axis where it hurts more is taken; circular modes are unaffected)."""
    common = dict(separation_m=separation_m, n=n)
    misaligned = dict(offset_m=offset_m, tilt_rad=tilt_rad, **common)
    along_x = (coupling_efficiency_1d(before_x, after_x, wavelength_m, **misaligned)
               * coupling_efficiency_1d(before_y, after_y, wavelength_m, **common))
    along_y = (coupling_efficiency_1d(before_x, after_x, wavelength_m, **common)
               * coupling_efficiency_1d(before_y, after_y, wavelength_m, **misaligned))
    return np.minimum(along_x, along_y)


def coupling_losses_db(wavelength_m, before, after, *, offset=None, tilt=None, separation=None, n=1.0):
    """Coupling loss [dB] per budget case between two modes.

    Parameters
    ----------
    wavelength_m : numpy.ndarray
        Vacuum wavelengths [m].
    before, after : Mode
        The mode launched and the mode received.
    offset, tilt, separation : spread or None
        Lateral offset [m], tilt [rad] (in the gap medium) and axial separation [m].
    n : float or numpy.ndarray
        Real index of the medium between the two waists.

    Returns
    -------
    dict
        case -> loss array over the wavelength axis.

    References
    ----------
    .. [1] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56, 703 (1977).
    .. [2] A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", 1998, eqs. 8.69/8.75/8.81.
    """
    corners = [
        _efficiency(wavelength_m, bx, by, ax, ay, d, theta, gap, n)
        for (bx, by), (ax, ay), d, theta, gap in itertools.product(
            _mode_candidates(before, after), _mode_candidates(after, before),
            _ends(offset), _ends(tilt), _ends(separation))
    ]
    typical = _efficiency(wavelength_m, before.radius_x_m["typ"], before.radius_y_m["typ"],
                          after.radius_x_m["typ"], after.radius_y_m["typ"],
                          _typ(offset), _typ(tilt), _typ(separation), n)
    return _case_losses_db(typical, corners)


def _mode_candidates(mode, other):
    """(x, y) radii of ``mode`` to search: the ends of its spread, and the ends of ``other``'s
    clipped into its range (where the ranges overlap, equal sizes couple best)."""
    def clipped(axis, end):
        own = getattr(mode, axis)
        return np.clip(getattr(other, axis)[end], own["low"], own["high"])

    ends = [(mode.radius_x_m[end], mode.radius_y_m[end]) for end in ("low", "high")]
    return ends + [(clipped("radius_x_m", end), clipped("radius_y_m", end)) for end in ("low", "high")]


def aperture_losses_db(wavelength_m, launched, *, distance, aperture_diameter, n=1.0):
    """Loss per case of the power falling outside a circular aperture after a free-space path.

    The launched beam has its waist (``launched`` mode radii) at the start; after ``distance`` its
    radius is w(z) (:func:`linkbudget.physics.gaussian.spot_radius_m`), and the aperture of
    radius a passes T = 1 − exp(−2a²/w²) (:func:`linkbudget.physics.gaussian.aperture_transmission`).
    An elliptical beam is taken at its larger radius (conservative for the margin). Worst and best
    cases search the corners of the waist, distance and aperture spreads, and the waist
    w0* = √(λz/(π·n)) that spreads least over the distance z, clipped into the waist's range.

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", University Science Books, 1986 (Gaussian beam propagation and
       the power through a circular aperture).
    """
    def transmittance(waist_m, distance_m, diameter_m):
        spot_m = gaussian.spot_radius_m(waist_m, distance_m, wavelength_m, n=n)
        return gaussian.aperture_transmission(diameter_m / 2, spot_m)

    waist = {end: np.maximum(launched.radius_x_m[end], launched.radius_y_m[end]) for end in ("low", "typ", "high")}

    def waist_candidates(distance_m):
        least_spread = np.sqrt(wavelength_m * distance_m / (np.pi * n))  # minimises w(z) (Siegman)
        return (waist["low"], waist["high"], np.clip(least_spread, waist["low"], waist["high"]))

    corners = [transmittance(w, z, a) for z, a in itertools.product(_ends(distance), _ends(aperture_diameter))
               for w in waist_candidates(z)]
    return _case_losses_db(transmittance(waist["typ"], _typ(distance), _typ(aperture_diameter)), corners)
