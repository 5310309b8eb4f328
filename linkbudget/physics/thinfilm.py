"""Thin-film stacks (coherent transfer-matrix method) and thick slabs (incoherent sums).

Index, angle and power conventions are those of :mod:`linkbudget.physics.fresnel`:
N = n + iκ with κ ≥ 0, the angle of incidence is given in the incident medium, and power
transmittance is a ratio of normal Poynting fluxes. Every function returns a
:class:`StackResponse` over the wavelength axis.

References
----------
.. [1] S. J. Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016.
.. [2] H. A. Macleod, "Thin-Film Optical Filters", 4th ed., CRC Press, 2010, ch. 2.
.. [3] C. C. Katsidis and D. I. Siapkas, "General transfer-matrix method for optical multilayer
   systems with coherent, partially coherent, and incoherent interference", Appl. Opt. 41,
   3978-3987, 2002, doi:10.1364/AO.41.003978.
.. [4] M. Born and E. Wolf, "Principles of Optics", 7th ed., Cambridge University Press, 1999.
"""

from dataclasses import dataclass

import numpy as np

from linkbudget.physics import flux
from linkbudget.physics.fresnel import (
    _amplitudes,
    _flux_ratio,
    _forward_cos,
    _incident_cross_term,
    _polarization_components,
    _tangential_index,
    _validated_angle,
    _validated_index,
    _warn_if_absorbing_incident,
)

#: Absorptances 1 − R − T smaller than this in magnitude are round-off and are returned as 0: a
#: lossless stack leaves a few 1e-16 (double-precision eps ≈ 2.2e-16 per operation), a thousand
#: times below this floor, and any absorber that matters to a budget (1e-12 is 4e-12 dB) lies
#: far above it.
ABSORPTANCE_FLOOR = 1e-12


@dataclass(frozen=True)
class StackResponse:
    """Power response of a stack or slab over the wavelength axis.

    Attributes
    ----------
    reflectance : numpy.ndarray
        Power reflectance R, shape (n_wavelengths,).
    transmittance : numpy.ndarray
        Power transmittance T into the exit medium, shape (n_wavelengths,).
    """

    reflectance: np.ndarray
    transmittance: np.ndarray

    @property
    def absorptance(self):
        """Absorptance A = 1 − R − T (power absorbed in the layers), shape (n_wavelengths,);
        0 where |A| < :data:`ABSORPTANCE_FLOOR` (round-off of a lossless stack)."""
        absorptance = 1.0 - self.reflectance - self.transmittance
        return np.where(np.abs(absorptance) < ABSORPTANCE_FLOOR, 0.0, absorptance)


def _wavelength_axis(wavelength_m):
    wavelength = np.atleast_1d(np.asarray(wavelength_m, dtype=float))
    if wavelength.ndim != 1:
        raise ValueError(f"wavelength_m must be 1-D, got shape {wavelength.shape}")
    if not np.all(np.isfinite(wavelength)) or np.any(wavelength <= 0):
        raise ValueError("wavelength_m must be finite and > 0")
    return wavelength


def _over_wavelength(values, n_wavelengths, name):
    try:
        return np.broadcast_to(values, (n_wavelengths,))
    except ValueError:
        raise ValueError(
            f"{name} must be a scalar or an array over the {n_wavelengths} wavelengths, "
            f"got shape {np.shape(values)}"
        ) from None


def _medium(index, n_wavelengths, name):
    return _over_wavelength(_validated_index(index, name), n_wavelengths, name)


def _thickness(thickness_m, name):
    thickness = np.asarray(thickness_m, dtype=float)
    if not np.all(np.isfinite(thickness)) or np.any(thickness < 0):
        raise ValueError(f"{name} must be finite and >= 0 [m]")
    return thickness


def _face(polarization, n1, n2, cos1, cos2):
    """(r, R, T) of one bare face, cosines given (fresnel kernels)."""
    r, t = _amplitudes(polarization, n1, n2, cos1, cos2)
    return r, np.abs(r) ** 2, _flux_ratio(polarization, n1, n2, cos1, cos2) * np.abs(t) ** 2


def _mean_response(reflectances, transmittances):
    return StackResponse(
        reflectance=np.mean(reflectances, axis=0), transmittance=np.mean(transmittances, axis=0)
    )


def coherent_stack(
    layer_index,
    thickness_m,
    wavelength_m,
    *,
    n_incident,
    n_exit,
    angle_rad=0.0,
    polarization="unpolarized",
):
    """Reflectance and transmittance of a coherent thin-film stack (transfer-matrix method).

    Parameters
    ----------
    layer_index : array_like of complex
        Index N = n + iκ of each layer, shape (n_layers, n_wavelengths) or (n_layers, 1)
        (a 1-D array of length n_layers is taken as wavelength-independent). Layers are listed
        in the order the light meets them. Zero layers give the bare interface.
    thickness_m : array_like
        Physical thickness of each layer [m], shape (n_layers,).
    wavelength_m : array_like
        Vacuum wavelengths [m], shape (n_wavelengths,).
    n_incident : complex or array_like
        Index of the semi-infinite incident medium, scalar or over wavelength. It should be
        lossless: R and T are normalised to the incident wave's own flux.
    n_exit : complex or array_like
        Index of the semi-infinite exit medium (substrate), scalar or over wavelength.
    angle_rad : float or array_like, optional
        Angle of incidence in the incident medium [rad], in [0, π/2).
    polarization : {"s", "p", "unpolarized"}, optional
        "unpolarized" is the mean of the s and p powers.

    Returns
    -------
    StackResponse
        Reflectance, transmittance and absorptance, each of shape (n_wavelengths,).

    Warns
    -----
    ValidityWarning
        When an absorbing incident medium shifts the energy balance by more than 1e-6.

    Notes
    -----
    With N_0 the incident medium, N_1..N_L the layers, N_{L+1} the exit medium and r_j, t_j
    the Fresnel amplitudes of interface j (between media j and j+1), the stack matrix is
    M = (1/t_0)[[1, r_0], [r_0, 1]] · Π_{j=1..L} [[e^{−iδ_j}, 0], [0, e^{iδ_j}]]
    (1/t_j)[[1, r_j], [r_j, 1]] with the phase thickness δ_j = 2π N_j cos θ_j d_j / λ, and
    r = M_10/M_00, t = 1/M_00 (Eqs. of section 4 of [1]_, numbering from memory; the
    characteristic-matrix form of [2]_). T follows from t with the flux ratio of
    :func:`linkbudget.physics.fresnel.interface_power_coefficients`.

    Numerically, each diagonal propagation matrix is written e^{−iδ}·diag(1, e^{2iδ}); the
    scalar factors are collected into t separately, so opaque or evanescent layers (Im δ ≫ 1)
    underflow to T = 0 instead of overflowing. Only the first column of M is needed, so it is
    built from the exit side as a vector, one layer at a time, for all wavelengths at once.

    References
    ----------
    .. [1] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016.
    .. [2] Macleod, "Thin-Film Optical Filters", 4th ed., 2010, ch. 2.
    """
    components = _polarization_components(polarization)
    wavelength = _wavelength_axis(wavelength_m)
    n_wavelengths = wavelength.size
    layers = _validated_index(layer_index, "layer_index")
    if layers.ndim == 1:
        layers = layers[:, np.newaxis]
    if layers.ndim != 2 or layers.shape[1] not in (1, n_wavelengths):
        raise ValueError(
            f"layer_index must have shape (n_layers, {n_wavelengths}) or (n_layers, 1), "
            f"got {layers.shape}"
        )
    thickness = _thickness(thickness_m, "thickness_m")
    if thickness.shape != (layers.shape[0],):
        raise ValueError(
            f"thickness_m must have shape ({layers.shape[0]},) to match layer_index, "
            f"got {thickness.shape}"
        )
    n_in = _medium(n_incident, n_wavelengths, "n_incident")
    n_out = _medium(n_exit, n_wavelengths, "n_exit")
    angle = _over_wavelength(_validated_angle(angle_rad), n_wavelengths, "angle_rad")

    layers = np.broadcast_to(layers, (layers.shape[0], n_wavelengths))
    media = np.concatenate([n_in[np.newaxis], layers, n_out[np.newaxis]])
    cos = _forward_cos(media, _tangential_index(n_in, angle))
    # Phase thickness δ_j = 2π N_j cos θ_j d_j / λ (Byrnes [1]); e^{iδ} and e^{2iδ} per layer.
    phase = np.exp(2j * np.pi * media[1:-1] * cos[1:-1] * thickness[:, np.newaxis] / wavelength)
    phase_twice = phase * phase

    reflectances, transmittances, cross_term = [], [], 0.0
    for pol in components:
        r, t = _amplitudes(pol, media[:-1], media[1:], cos[:-1], cos[1:])
        # First column of M, from the exit interface backwards: v ← I_j v, then v ← P_j v.
        v0 = np.ones(n_wavelengths, dtype=complex)
        v1 = r[-1]
        t_total = t[-1]
        for j in range(layers.shape[0] - 1, -1, -1):
            v1 = v1 * phase_twice[j]
            v0, v1 = v0 + r[j] * v1, r[j] * v0 + v1
            t_total = t_total * phase[j] * t[j]
        r_stack = v1 / v0
        t_stack = t_total / v0
        cross_term = max(cross_term, _incident_cross_term(pol, n_in, cos[0], r_stack))
        reflectances.append(np.abs(r_stack) ** 2)
        transmittances.append(
            _flux_ratio(pol, n_in, n_out, cos[0], cos[-1]) * np.abs(t_stack) ** 2
        )
    _warn_if_absorbing_incident(cross_term)
    return _mean_response(reflectances, transmittances)


def quarter_wave_thickness_m(n, design_wavelength_m, *, order=1):
    """Physical thickness of a layer whose optical thickness is ``order`` quarter waves.

    Parameters
    ----------
    n : array_like of complex
        Layer index at the design wavelength; its real part sets the optical thickness.
    design_wavelength_m : array_like
        Vacuum design wavelength λ0 [m].
    order : int, optional
        Number of quarter waves (1 = quarter-wave, 2 = half-wave, ...), ≥ 1.

    Returns
    -------
    numpy.ndarray
        Thickness d = order·λ0/(4 Re n) [m].

    Notes
    -----
    A quarter-wave layer has n·d = λ0/4 at normal incidence [1]_.

    References
    ----------
    .. [1] Macleod, "Thin-Film Optical Filters", 4th ed., 2010 (ch. 2-3, from memory).
    """
    if isinstance(order, bool) or not isinstance(order, (int, np.integer)) or order < 1:
        raise ValueError(f"order must be an integer >= 1, got {order!r}")
    wavelength = np.asarray(design_wavelength_m, dtype=float)
    if not np.all(np.isfinite(wavelength)) or np.any(wavelength <= 0):
        raise ValueError("design_wavelength_m must be finite and > 0")
    return order * wavelength / (4.0 * _validated_index(n, "n").real)


def round_trip_factor(entry_reflectance_inside, exit_reflectance, single_pass_transmittance):
    """Gain of a thick slab's transmittance from its internal round trips, summed incoherently.

    Parameters
    ----------
    entry_reflectance_inside : array_like
        R1': power reflectance of the entry face seen from inside the slab.
    exit_reflectance : array_like
        R2: power reflectance of the exit face seen from inside the slab.
    single_pass_transmittance : array_like
        τ: internal transmittance of one pass through the slab.

    Returns
    -------
    numpy.ndarray
        1 / (1 − R1'·R2·τ²) (≥ 1), the factor between the single-pass T1·τ·T2 and the slab's
        incoherent transmittance.

    Notes
    -----
    The geometric series Σ (R1'·R2·τ²)^m of the intensities of the internal round trips [3]_, [4]_.

    References
    ----------
    .. [3] C. C. Katsidis and D. I. Siapkas, Appl. Opt. 41, 3978 (2002), doi:10.1364/AO.41.003978.
    .. [4] M. Born and E. Wolf, "Principles of Optics", 7th ed., 1999.
    """
    round_trip = np.asarray(entry_reflectance_inside) * np.asarray(exit_reflectance) * np.asarray(
        single_pass_transmittance) ** 2
    return 1.0 / (1.0 - round_trip)


def incoherent_slab(
    n_slab,
    thickness_m,
    wavelength_m,
    *,
    n_before,
    n_after,
    angle_rad=0.0,
    polarization="unpolarized",
    multiple_reflections=True,
):
    """Reflectance and transmittance of a thick slab with bare faces, summed incoherently.

    Parameters
    ----------
    n_slab : complex or array_like
        Slab index N = n + iκ, scalar or over wavelength.
    thickness_m : float
        Slab thickness [m] (thick compared with the coherence length, so no fringes).
    wavelength_m : array_like
        Vacuum wavelengths [m], shape (n_wavelengths,).
    n_before : complex or array_like
        Index of the semi-infinite medium the light comes from (should be lossless).
    n_after : complex or array_like
        Index of the semi-infinite medium behind the slab.
    angle_rad : float or array_like, optional
        Angle of incidence in the first medium [rad], in [0, π/2).
    polarization : {"s", "p", "unpolarized"}, optional
        "unpolarized" is the mean of the s and p powers.
    multiple_reflections : bool, optional
        Sum all the internal round trips (True) or keep the single pass only (False).

    Returns
    -------
    StackResponse
        Reflectance, transmittance and absorptance, each of shape (n_wavelengths,).

    Warns
    -----
    ValidityWarning
        When an absorbing first medium shifts the energy balance by more than 1e-6.

    Notes
    -----
    With face powers R1, T1 (first face, entering), R1', T1' (first face, from inside), R2, T2
    (second face, leaving) from :mod:`~linkbudget.physics.fresnel`, and the single-pass
    internal transmittance τ, the geometric series of round trips gives [3]_, [4]_:

        T = T1 τ T2 / (1 − R1' R2 τ²),   R = R1 + T1 T1' R2 τ² / (1 − R1' R2 τ²);

    with ``multiple_reflections=False``, T = T1 τ T2 and R = R1. τ = exp(−α_z d) with
    α_z = 4π Im√(N² − β²)/λ, the decay of the refracted wave along the slab normal
    (:func:`linkbudget.physics.flux.absorption_along_normal_per_m`).

    References
    ----------
    .. [1] Byrnes, "Multilayer optical calculations", arXiv:1603.02720, 2016 (incoherent
       method).
    .. [2] Macleod, "Thin-Film Optical Filters", 4th ed., 2010.
    .. [3] Katsidis & Siapkas, Appl. Opt. 41, 3978 (2002), doi:10.1364/AO.41.003978.
    .. [4] Born & Wolf, "Principles of Optics", 1999.
    """
    components = _polarization_components(polarization)
    wavelength = _wavelength_axis(wavelength_m)
    n_wavelengths = wavelength.size
    thickness = _thickness(thickness_m, "thickness_m")
    if thickness.ndim != 0:
        raise ValueError(f"thickness_m must be a scalar, got shape {thickness.shape}")
    n_in = _medium(n_before, n_wavelengths, "n_before")
    n_mid = _medium(n_slab, n_wavelengths, "n_slab")
    n_out = _medium(n_after, n_wavelengths, "n_after")
    angle = _over_wavelength(_validated_angle(angle_rad), n_wavelengths, "angle_rad")

    beta = _tangential_index(n_in, angle)
    cos_in, cos_mid, cos_out = (_forward_cos(n, beta) for n in (n_in, n_mid, n_out))
    tau = flux.transmittance(flux.absorption_along_normal_per_m(n_mid, beta, wavelength), thickness)

    reflectances, transmittances, cross_term = [], [], 0.0
    for pol in components:
        r_front, refl_front, trans_front = _face(pol, n_in, n_mid, cos_in, cos_mid)
        _, refl_inside, trans_inside = _face(pol, n_mid, n_in, cos_mid, cos_in)
        _, refl_rear, trans_rear = _face(pol, n_mid, n_out, cos_mid, cos_out)
        cross_term = max(cross_term, _incident_cross_term(pol, n_in, cos_in, r_front))
        if multiple_reflections:
            round_trips = round_trip_factor(refl_inside, refl_rear, tau)
            transmittances.append(trans_front * tau * trans_rear * round_trips)
            reflectances.append(refl_front + trans_front * trans_inside * refl_rear * tau**2 * round_trips)
        else:
            transmittances.append(trans_front * tau * trans_rear)
            reflectances.append(refl_front)
    _warn_if_absorbing_incident(cross_term)
    return _mean_response(reflectances, transmittances)
