"""Fresnel equations at a plane interface between two media of complex index N = n + iκ.

Conventions (the same as the rest of :mod:`linkbudget.physics` and as [3]_):

* N = n + iκ with κ ≥ 0 for a passive (lossy) medium; fields vary as exp(i(k·r − ωt)).
* Snell's law conserves the tangential index β = N1·sin θ1. The angle of incidence
  ``angle_rad`` is given in the first medium and β = Re(N1)·sin(angle_rad) is taken real, so
  the field has constant intensity along the interface (the choice recommended in [3]_ for an
  absorbing incident medium; for a lossless incident medium it is the ordinary angle).
* In every medium the propagation "angle" may be complex; only the normal index component
  q = N·cos θ = ±√(N² − β²) is needed. The sign is chosen for the forward wave: decaying
  (Im q > 0) when q is not real, carrying power forward (Re q > 0) otherwise [3]_.
* Power reflectance R = |r|²; power transmittance is the ratio of the normal Poynting flux
  components, T = Re(N2 cos θ2)/Re(N1 cos θ1)·|t|² (s) and
  T = Re(N2 cos θ2*)/Re(N1 cos θ1*)·|t|² (p) [3]_, never |t|² alone.

References
----------
.. [1] M. Born and E. Wolf, "Principles of Optics", 7th ed., Cambridge University Press, 1999,
   Fresnel formulae (section number from memory: §1.5.2).
.. [2] E. Hecht, "Optics", 5th ed., Pearson, 2017, the Fresnel equations
   (section number from memory: §4.6).
.. [3] S. J. Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016
   (forward-wave branch choice and the flux ratios for T; section numbers from memory).
"""

import warnings

import numpy as np

from linkbudget.physics.validity import ValidityWarning

#: The linear polarizations whose powers are computed (and followed through a chain) separately.
LINEAR_POLARIZATIONS = ("s", "p")
#: Polarization names accepted by the power functions, and the linear polarizations averaged.
POLARIZATIONS = {"s": ("s",), "p": ("p",), "unpolarized": LINEAR_POLARIZATIONS}

# Below this size the imaginary part of N·cos θ is rounding, not decay; the forward wave is
# then chosen by the sign of Re(N·cos θ). The same threshold as the reference library `tmm`
# that implements [3]; indices are of order 1, so an absolute tolerance is appropriate.
_BRANCH_TOLERANCE = 100.0 * np.finfo(float).eps

# Energy-bookkeeping defect (power entering the second medium minus 1 − R) above which an
# absorbing incident medium is reported: 1 ppm of the incident power is far below any
# link-budget figure, so smaller defects are not worth a warning.
_CROSS_TERM_TOLERANCE = 1e-6

# The largest ray angle returned by refraction_angle_rad: just below grazing incidence.
_GRAZING_RAD = np.nextafter(np.pi / 2, 0.0)


def _validated_index(index, name):
    """Complex index array of a passive medium: finite, Re N > 0 and κ = Im N ≥ 0.

    Raises
    ------
    ValueError
        On NaN/inf, a non-positive real part, or a negative imaginary part (gain).
    """
    array = np.asarray(index, dtype=complex)
    if not np.all(np.isfinite(array)):
        raise ValueError(f"{name} must be finite, got {array}")
    if np.any(array.imag < 0):
        raise ValueError(
            f"{name} has a negative imaginary part (min {array.imag.min():g}): "
            "N = n + iκ needs κ >= 0 for a passive medium"
        )
    if np.any(array.real <= 0):
        raise ValueError(f"{name} must have a positive real part, got min {array.real.min():g}")
    return array


def _validated_angle(angle_rad):
    """Angle-of-incidence array [rad], checked to lie in [0, π/2)."""
    angle = np.asarray(angle_rad, dtype=float)
    if not np.all(np.isfinite(angle)) or np.any(angle < 0) or np.any(angle >= np.pi / 2):
        raise ValueError(f"angle_rad must lie in [0, pi/2), got {angle}")
    return angle


def _polarization_components(polarization, *, allow_unpolarized=True):
    """Linear polarizations to compute (and average) for a polarization name."""
    allowed = POLARIZATIONS if allow_unpolarized else {pol: (pol,) for pol in LINEAR_POLARIZATIONS}
    if polarization not in allowed:
        raise ValueError(f"polarization must be one of {sorted(allowed)}, got {polarization!r}")
    return allowed[polarization]


def _tangential_index(n_incident, angle_rad):
    """Real tangential index β = Re(N_incident)·sin θ, conserved by Snell's law (module notes)."""
    return np.real(n_incident) * np.sin(angle_rad)


def _forward_cos(n_medium, beta):
    """cos θ of the forward wave in a medium of index N for a tangential index β.

    Parameters
    ----------
    n_medium : array_like of complex
        Index N of the medium (already validated).
    beta : array_like of float
        Tangential index β = N_incident·sin θ_incident.

    Returns
    -------
    numpy.ndarray of complex
        cos θ with q = N·cos θ = ±√(N² − β²), the sign of the forward wave [1]_.

    References
    ----------
    .. [1] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016 (appendix on the
       forward direction, letter from memory: D).
    """
    n_medium = np.asarray(n_medium, dtype=complex)
    q = np.sqrt(n_medium * n_medium - np.asarray(beta) ** 2)  # Snell: q² = N² − β²
    decaying = np.abs(q.imag) > _BRANCH_TOLERANCE
    backward = np.where(decaying, q.imag < 0, q.real < 0)
    return np.where(backward, -q, q) / n_medium


def cos_theta_in(n_incident, n_medium, angle_rad):
    """Complex cosine of the refraction angle in a medium, from Snell's law.

    Parameters
    ----------
    n_incident : array_like of complex
        Index N1 = n1 + iκ1 of the medium the light comes from.
    n_medium : array_like of complex
        Index N = n + iκ of the medium the light enters.
    angle_rad : array_like
        Angle of incidence in the first medium [rad], in [0, π/2).

    Returns
    -------
    numpy.ndarray of complex
        cos θ in the medium, broadcast over the inputs.

    Notes
    -----
    N·sin θ = β with β = Re(N1)·sin θ1 real (Snell's law, [1]_), so
    N·cos θ = ±√(N² − β²). The sign is the forward wave's: Im(N cos θ) > 0 (decaying,
    evanescent or absorbed) when it is not zero to rounding, else Re(N cos θ) > 0 [2]_.
    Beyond the critical angle in a lossless medium cos θ is purely imaginary.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016.
    """
    n_incident = _validated_index(n_incident, "n_incident")
    n_medium = _validated_index(n_medium, "n_medium")
    beta = _tangential_index(n_incident, _validated_angle(angle_rad))
    return _forward_cos(n_medium, beta)


def _amplitudes(polarization, n1, n2, cos1, cos2):
    """Fresnel amplitude coefficients (r, t) from indices and complex cosines, no validation.

    s: r = (N1 cos θ1 − N2 cos θ2)/(N1 cos θ1 + N2 cos θ2), t = 2 N1 cos θ1/(same);
    p: r = (N2 cos θ1 − N1 cos θ2)/(N2 cos θ1 + N1 cos θ2), t = 2 N1 cos θ1/(same)
    (Born & Wolf §1.5.2, from memory for the section; the sign convention of Byrnes 2016).
    """
    if polarization == "s":
        a, b = n1 * cos1, n2 * cos2
    else:
        a, b = n2 * cos1, n1 * cos2
    denominator = a + b
    return (a - b) / denominator, 2.0 * n1 * cos1 / denominator


def _flux_ratio(polarization, n1, n2, cos1, cos2):
    """Factor turning |t|² into the power transmittance (ratio of normal Poynting fluxes).

    s: Re(N2 cos θ2)/Re(N1 cos θ1); p: Re(N2 cos θ2*)/Re(N1 cos θ1*) (Byrnes 2016).
    """
    if polarization == "s":
        return np.real(n2 * cos2) / np.real(n1 * cos1)
    return np.real(n2 * np.conj(cos2)) / np.real(n1 * np.conj(cos1))


def _incident_cross_term(polarization, n1, cos1, r):
    """Largest energy-balance shift from interference in an absorbing incident medium.

    In an absorbing incident medium the incident and reflected waves exchange power (cross
    terms of the Poynting vector), so the power entering the next medium differs from 1 − |r|²
    [Byrnes 2016]. The difference is 2 Im(r) Im(N1 cos θ1)/Re(N1 cos θ1) for s and
    −2 Im(r) Im(N1 cos θ1*)/Re(N1 cos θ1*) for p (expanding Byrnes' "power entering");
    it is zero for a lossless incident medium.
    """
    if polarization == "s":
        u = n1 * cos1
        defect = 2.0 * np.imag(r) * u.imag / u.real
    else:
        u = n1 * np.conj(cos1)
        defect = -2.0 * np.imag(r) * u.imag / u.real
    return float(np.max(np.abs(defect), initial=0.0))


def _warn_if_absorbing_incident(cross_term):
    """Warn (ValidityWarning) when :func:`_incident_cross_term` exceeds 1e-6 of the power."""
    if cross_term > _CROSS_TERM_TOLERANCE:
        warnings.warn(
            "the incident medium absorbs: R and T are normalised to the incident wave's own "
            f"flux and interference with the reflected wave shifts the energy balance by up "
            f"to {cross_term:.3g} of the incident power, so 1 - R - T is not a pure absorptance",
            ValidityWarning,
            stacklevel=3,
        )


def interface_amplitude_coefficients(n1, n2, *, angle_rad=0.0, polarization):
    """Fresnel amplitude reflection and transmission coefficients of a plane interface.

    Parameters
    ----------
    n1 : array_like of complex
        Index N1 = n1 + iκ1 of the incident medium (κ1 ≥ 0).
    n2 : array_like of complex
        Index N2 = n2 + iκ2 of the second medium (κ2 ≥ 0).
    angle_rad : array_like, optional
        Angle of incidence in the first medium [rad], in [0, π/2).
    polarization : {"s", "p"}
        Linear polarization (electric field perpendicular or parallel to the plane of
        incidence).

    Returns
    -------
    r, t : numpy.ndarray of complex
        Amplitude coefficients of the electric field, broadcast over the inputs.

    Notes
    -----
    r_s = (N1 cos θ1 − N2 cos θ2)/(N1 cos θ1 + N2 cos θ2), t_s = 2 N1 cos θ1/(N1 cos θ1 +
    N2 cos θ2); r_p = (N2 cos θ1 − N1 cos θ2)/(N2 cos θ1 + N1 cos θ2), t_p = 2 N1 cos θ1/
    (N2 cos θ1 + N1 cos θ2) [1]_, [2]_, with the complex cos θ2 of :func:`cos_theta_in` [3]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999 (§1.5.2, from memory).
    .. [2] Hecht, "Optics", 2017.
    .. [3] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016.
    """
    (pol,) = _polarization_components(polarization, allow_unpolarized=False)
    n1 = _validated_index(n1, "n1")
    n2 = _validated_index(n2, "n2")
    beta = _tangential_index(n1, _validated_angle(angle_rad))
    return _amplitudes(pol, n1, n2, _forward_cos(n1, beta), _forward_cos(n2, beta))


def interface_power_coefficients(n1, n2, *, angle_rad=0.0, polarization="unpolarized"):
    """Power reflectance and transmittance of a plane interface between two media.

    Parameters
    ----------
    n1 : array_like of complex
        Index N1 = n1 + iκ1 of the incident medium (κ1 ≥ 0).
    n2 : array_like of complex
        Index N2 = n2 + iκ2 of the second medium (κ2 ≥ 0).
    angle_rad : array_like, optional
        Angle of incidence in the first medium [rad], in [0, π/2).
    polarization : {"s", "p", "unpolarized"}, optional
        "unpolarized" is the mean of the s and p powers.

    Returns
    -------
    R, T : numpy.ndarray of float
        Power reflectance and transmittance, broadcast over the inputs.

    Warns
    -----
    ValidityWarning
        When the incident medium absorbs enough that R + T departs from 1 by interference
        between incident and reflected waves by more than 1e-6.

    Notes
    -----
    R = |r|²; T = Re(N2 cos θ2)/Re(N1 cos θ1)·|t|² (s) and
    T = Re(N2 cos θ2*)/Re(N1 cos θ1*)·|t|² (p) [3]_. For lossless media R + T = 1; beyond the
    critical angle cos θ2 is imaginary and T = 0 (total internal reflection) [1]_, [2]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    .. [3] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016.
    """
    components = _polarization_components(polarization)
    n1 = _validated_index(n1, "n1")
    n2 = _validated_index(n2, "n2")
    beta = _tangential_index(n1, _validated_angle(angle_rad))
    cos1, cos2 = _forward_cos(n1, beta), _forward_cos(n2, beta)
    reflectance, transmittance, cross_term = 0.0, 0.0, 0.0
    for pol in components:
        r, t = _amplitudes(pol, n1, n2, cos1, cos2)
        cross_term = max(cross_term, _incident_cross_term(pol, n1, cos1, r))
        reflectance = reflectance + np.abs(r) ** 2
        transmittance = transmittance + _flux_ratio(pol, n1, n2, cos1, cos2) * np.abs(t) ** 2
    _warn_if_absorbing_incident(cross_term)
    return reflectance / len(components), transmittance / len(components)


def _real_index(index, name):
    array = _validated_index(index, name)
    if np.any(array.imag != 0):
        raise ValueError(f"{name} must be lossless (real) here, got {array}")
    return array.real


def refraction_angle_rad(n1, n2, angle_rad):
    """Ray angle in the second medium by Snell's law on the real parts of the indices.

    Parameters
    ----------
    n1, n2 : array_like of complex
        Indices of the first and second medium (only the real parts enter).
    angle_rad : array_like
        Ray angle in the first medium [rad].

    Returns
    -------
    numpy.ndarray
        θ2 = arcsin(Re(N1)·sin θ1 / Re(N2)) [rad]; beyond the critical angle (no transmitted
        ray) just below π/2, so that the result is still a valid angle of incidence for
        :func:`interface_power_coefficients`, which then gives T = 0.

    Notes
    -----
    n1·sin θ1 = n2·sin θ2 [1]_, [2]_; the real-part form is the geometric ray direction in a
    weakly absorbing medium (the complex form is in :func:`cos_theta_in`).

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    sine = np.real(np.asarray(n1, dtype=complex)) * np.sin(angle_rad) / np.real(np.asarray(n2, dtype=complex))
    return np.minimum(np.arcsin(np.clip(sine, -1.0, 1.0)), _GRAZING_RAD)


def brewster_angle_rad(n1, n2):
    """Brewster angle, where the p reflectance of a lossless interface vanishes.

    Parameters
    ----------
    n1, n2 : array_like of float
        Real indices of the incident and second medium (an absorbing medium has only a
        pseudo-Brewster minimum, which this model does not give).

    Returns
    -------
    numpy.ndarray
        θ_B [rad].

    Notes
    -----
    tan θ_B = n2/n1 [1]_, [2]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    return np.arctan(_real_index(n2, "n2") / _real_index(n1, "n1"))


def critical_angle_rad(n1, n2):
    """Critical angle of total internal reflection from a denser lossless medium.

    Parameters
    ----------
    n1, n2 : array_like of float
        Real indices of the incident (denser) and second medium, n2 < n1.

    Returns
    -------
    numpy.ndarray
        θ_c [rad].

    Raises
    ------
    ValueError
        If n2 >= n1 anywhere (no total internal reflection).

    Notes
    -----
    sin θ_c = n2/n1 [1]_, [2]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    n1 = _real_index(n1, "n1")
    n2 = _real_index(n2, "n2")
    if np.any(n2 >= n1):
        raise ValueError("a critical angle needs n2 < n1 (light going to a less dense medium)")
    return np.arcsin(n2 / n1)


def normal_incidence_reflectance(n1, n2):
    """Power reflectance of a plane interface at normal incidence.

    Parameters
    ----------
    n1, n2 : array_like of complex
        Indices N = n + iκ of the two media (κ ≥ 0).

    Returns
    -------
    numpy.ndarray
        R = |(N1 − N2)/(N1 + N2)|², broadcast over the inputs.

    Notes
    -----
    For a metal in air this is ((n − 1)² + κ²)/((n + 1)² + κ²) [1]_, [2]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    n1 = _validated_index(n1, "n1")
    n2 = _validated_index(n2, "n2")
    return np.abs((n1 - n2) / (n1 + n2)) ** 2
