"""The fundamental mode of a weakly guiding step-index fibre.

Normalised quantities of a core of radius a and cladding (Gloge [1]_, Snyder & Love [2]_)::

    V = 2π·a·NA/λ,   NA = √(n_core² − n_cladding²),   U² + W² = V²,

with U the transverse wavenumber in the core and W the decay constant in the cladding, both
normalised to 1/a. The fibre is single-mode below the LP11 cut-off V = j01 ≈ 2.405 (first zero of
J0). The functions that solve for the exact LP01 mode import scipy lazily, so a caller needing
only V or Marcuse's formula does not pay its import time.

References
----------
.. [1] D. Gloge, "Weakly guiding fibers", Appl. Opt. 10, 2252–2258 (1971),
   doi:10.1364/AO.10.002252 (DOI from memory).
.. [2] A. W. Snyder and J. D. Love, "Optical Waveguide Theory", Chapman and Hall, 1983
   (chapter on weakly guiding step-profile fibres; chapter number from memory: ch. 14).
.. [3] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56,
   703–718 (1977), doi:10.1002/j.1538-7305.1977.tb00534.x (pages and DOI from memory).
.. [4] K. Petermann, "Constraints for fundamental-mode spot size for broadband dispersion-
   compensated single-mode fibres", Electron. Lett. 19, 712–714 (1983),
   doi:10.1049/el:19830485 (from memory).
"""

import warnings

import numpy as np

from linkbudget.physics.checks import positive
from linkbudget.physics.validity import ValidityWarning, span_text

#: First zero of the Bessel function J0: the LP11 cut-off V number of a step-index fibre.
LP11_CUTOFF_V = 2.404825557695773

#: V range over which Marcuse's mode-field formula is stated to be accurate (about 1 %, from memory).
MARCUSE_VALID_V = (1.2, 2.4)

_BISECTION_STEPS = 64  # halves a log-W bracket of at most ~700 to ~4e-17, below double precision
_GOLDEN_STEPS = 60  # shrinks a bracket by 0.618^60 ~ 3e-13
_LEGENDRE_NODES = 96



def _aperture_from_indices(n_core, n_cladding):
    n_core = positive(n_core, "core index")
    n_cladding = positive(n_cladding, "cladding index")
    if np.any(n_core <= n_cladding):
        raise ValueError("a guiding fibre needs n_core > n_cladding")
    return np.sqrt(n_core**2 - n_cladding**2)


def numerical_aperture(n_core, n_cladding):
    """Numerical aperture of a step-index fibre, NA = √(n_core² − n_cladding²).

    Parameters
    ----------
    n_core, n_cladding : array_like
        Refractive indices of core and cladding; the core index must be the larger.

    Returns
    -------
    numpy.ndarray
        NA (dimensionless).

    References
    ----------
    .. [1] D. Gloge, "Weakly guiding fibers", Appl. Opt. 10, 2252 (1971).
    """
    return _aperture_from_indices(n_core, n_cladding)


def v_number(core_radius_m, wavelength_m, *, numerical_aperture=None, n_core=None, n_cladding=None):
    """Normalised frequency V = 2π·a·NA/λ of a step-index fibre.

    Give either ``numerical_aperture`` or both ``n_core`` and ``n_cladding``.

    Parameters
    ----------
    core_radius_m : array_like
        Core radius a [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    numerical_aperture : array_like, optional
        NA of the fibre.
    n_core, n_cladding : array_like, optional
        Core and cladding indices (NA from :func:`numerical_aperture`).

    Returns
    -------
    numpy.ndarray
        V (dimensionless), broadcast over the inputs.

    References
    ----------
    .. [1] D. Gloge, "Weakly guiding fibers", Appl. Opt. 10, 2252 (1971).
    """
    indices_given = (n_core is not None, n_cladding is not None)
    if (numerical_aperture is not None) == any(indices_given) or any(indices_given) != all(indices_given):
        raise ValueError("give either numerical_aperture or both n_core and n_cladding")
    if numerical_aperture is None:
        aperture = _aperture_from_indices(n_core, n_cladding)
    else:
        aperture = positive(numerical_aperture, "numerical aperture")
    core_radius_m = positive(core_radius_m, "core radius")
    return 2.0 * np.pi * core_radius_m * aperture / positive(wavelength_m, "wavelength")


def _warn_if_multimode(v):
    """Warn (ValidityWarning) where V is above the LP11 cut-off: LP11 is guided too [1]_."""
    if np.any(v > LP11_CUTOFF_V):
        warnings.warn(
            f"V up to {v.max():.4g} is above the LP11 cut-off {LP11_CUTOFF_V:.4f}: the fibre is not "
            "single-mode there (higher modes are guided too; only the fundamental mode is modelled)",
            ValidityWarning,
            stacklevel=4,
        )


def _warn_outside(v, low, high, what):
    if np.any((v < low) | (v > high)):
        warnings.warn(
            f"{what} is stated to be accurate for {low} <= V <= {high}; got V {span_text(v)}",
            ValidityWarning,
            stacklevel=3,
        )


def marcuse_mode_field_radius_m(core_radius_m, v):
    """Mode-field radius of a step-index fibre from Marcuse's empirical formula.

    Parameters
    ----------
    core_radius_m : array_like
        Core radius a [m].
    v : array_like
        V number; warns with :class:`ValidityWarning` outside 1.2 ≤ V ≤ 2.4, and separately
        above the LP11 cut-off 2.405, where the fibre is not single-mode.

    Returns
    -------
    numpy.ndarray
        Radius w [m] of the Gaussian that best approximates the LP01 mode.

    Notes
    -----
    w/a = 0.65 + 1.619·V^(−3/2) + 2.879·V^(−6) [1]_, about 1 % accurate for 1.2 < V < 2.4
    (from memory).

    References
    ----------
    .. [1] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56,
       703 (1977).
    """
    v = positive(v, "V number")
    _warn_outside(v, *MARCUSE_VALID_V, "Marcuse's mode-field formula")
    _warn_if_multimode(v)
    # Marcuse's fit of w/a [1] (equation number not confirmed)
    return positive(core_radius_m, "core radius") * (0.65 + 1.619 * v**-1.5 + 2.879 * v**-6)


def mode_field_diameter_m(core_radius_m, wavelength_m, *, numerical_aperture=None, n_core=None, n_cladding=None):
    """Mode-field diameter 2w of a step-index fibre, w from Marcuse's formula.

    Parameters are those of :func:`v_number`.

    Returns
    -------
    numpy.ndarray
        Mode-field diameter [m].

    See Also
    --------
    marcuse_mode_field_radius_m, lp01_mode_field_radius_m

    References
    ----------
    .. [1] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56,
       703 (1977).
    """
    v = v_number(
        core_radius_m, wavelength_m, numerical_aperture=numerical_aperture, n_core=n_core, n_cladding=n_cladding
    )
    return 2.0 * marcuse_mode_field_radius_m(core_radius_m, v)


def _lp01_v(v):
    v = positive(v, "V number")
    _warn_if_multimode(v)
    return v


def _lp01_uw(v):
    """U and W of LP01, found by bisection in log W so that W stays accurate when W << V."""
    from scipy import special

    # U < min(V, j01), so W lies between √(V² − j01²) (or 0) and V; 1e-300·V stands in for 0.
    w_floor = np.sqrt(np.maximum(v**2 - LP11_CUTOFF_V**2, 0.0))
    log_low = np.log(np.maximum(w_floor, 1e-300 * v))
    log_high = np.log(v)
    for _ in range(_BISECTION_STEPS):
        w = np.exp(0.5 * (log_low + log_high))
        u = np.sqrt(v**2 - w**2)
        # Eigenvalue equation of LP01, U·J1(U)/J0(U) = W·K1(W)/K0(W) [1, 2]: as W grows, U falls,
        # the left side falls and the right side rises, so the root is unique.
        residual = u * special.j1(u) / special.j0(u) - w * special.k1(w) / special.k0(w)
        below_root = residual > 0
        log_low = np.where(below_root, np.log(w), log_low)
        log_high = np.where(below_root, log_high, np.log(w))
    w = np.exp(0.5 * (log_low + log_high))
    return np.sqrt(v**2 - w**2), w


def lp01_u(v):
    """Core parameter U of the LP01 mode of a weakly guiding step-index fibre.

    Parameters
    ----------
    v : array_like
        V number (> 0); warns with :class:`ValidityWarning` above the LP11 cut-off 2.405 (LP01
        still exists there, but other modes are guided too).

    Returns
    -------
    numpy.ndarray
        U in (0, min(V, 2.405)); W = √(V² − U²).

    Notes
    -----
    Root of U·J1(U)/J0(U) = W·K1(W)/K0(W) [1]_, [2]_, W = √(V² − U²), found by bisection on
    all elements at once (in log W, which keeps W accurate at small V where W ≪ V).

    References
    ----------
    .. [1] D. Gloge, "Weakly guiding fibers", Appl. Opt. 10, 2252 (1971).
    .. [2] A. W. Snyder and J. D. Love, "Optical Waveguide Theory", 1983.
    """
    return _lp01_uw(_lp01_v(v))[0]


def _lp01_field_normalised(rho, u, w):
    from scipy import special

    inside = special.j0(u * np.minimum(rho, 1.0)) / special.j0(u)
    outside = special.k0(w * np.maximum(rho, 1.0)) / special.k0(w)
    return np.where(rho < 1.0, inside, outside)


def lp01_field(r_m, core_radius_m, v):
    """Radial field of the LP01 mode, 1 at the core–cladding boundary.

    Parameters
    ----------
    r_m : array_like
        Radial position r [m] (≥ 0).
    core_radius_m : array_like
        Core radius a [m].
    v : array_like
        V number (see :func:`lp01_u`).

    Returns
    -------
    numpy.ndarray
        ψ(r) = J0(U·r/a)/J0(U) for r < a, K0(W·r/a)/K0(W) for r ≥ a; broadcast over the inputs.

    References
    ----------
    .. [1] D. Gloge, "Weakly guiding fibers", Appl. Opt. 10, 2252 (1971).
    .. [2] A. W. Snyder and J. D. Love, "Optical Waveguide Theory", 1983.
    """
    r_m = np.asarray(r_m, dtype=float)
    if np.any(np.isnan(r_m)) or np.any(r_m < 0):
        raise ValueError("radial position must be >= 0")
    v = _lp01_v(v)
    u, w = _lp01_uw(v)
    return _lp01_field_normalised(r_m / positive(core_radius_m, "core radius"), u, w)


def _gaussian_overlap(u, w, spot):
    """Power overlap of the LP01 mode (U, W) with a Gaussian exp(−ρ²/s²), ρ = r/a, s = spot."""
    from scipy import special

    nodes, weights = np.polynomial.legendre.leggauss(_LEGENDRE_NODES)
    u, w, spot = (x[..., np.newaxis] for x in (u, w, spot))
    # The core [0, 1] and the cladding [1, 1 + 10 s], beyond which the Gaussian is below e^-100.
    core = 0.5 * (nodes + 1.0)
    cladding_span = 10.0 * spot
    cladding = 1.0 + 0.5 * (nodes + 1.0) * cladding_span
    field_core = _lp01_field_normalised(core, u, w)
    field_cladding = _lp01_field_normalised(cladding, u, w)
    overlap = 0.5 * np.sum(weights * field_core * np.exp(-(core**2) / spot**2) * core, axis=-1)
    overlap += 0.5 * cladding_span[..., 0] * np.sum(
        weights * field_cladding * np.exp(-(cladding**2) / spot**2) * cladding, axis=-1
    )
    u, w, spot = u[..., 0], w[..., 0], spot[..., 0]
    # ∫ψ²ρdρ in closed form (Bessel integrals of [2]) reduced with the eigenvalue equation:
    # ½(J1²/J0² + K1²/K0²).
    mode_norm = 0.5 * ((special.j1(u) / special.j0(u)) ** 2 + (special.k1(w) / special.k0(w)) ** 2)
    gaussian_norm = spot**2 / 4.0  # ∫exp(−2ρ²/s²)ρdρ
    return overlap**2 / (mode_norm * gaussian_norm)


def _petermann_ratio(u, w):
    from scipy import special

    return np.sqrt(2.0) * special.j1(u) / (w * special.j0(u))


def lp01_mode_field_radius_m(core_radius_m, v):
    """Mode-field radius of the exact LP01 mode: the Gaussian of best overlap.

    Parameters
    ----------
    core_radius_m : array_like
        Core radius a [m].
    v : array_like
        V number (see :func:`lp01_u`).

    Returns
    -------
    numpy.ndarray
        Radius w [m] of the Gaussian exp(−r²/w²) that maximises the power overlap with the LP01
        field, the definition Marcuse fitted his formula to [1]_ (from memory).

    Notes
    -----
    η(w) = (∫ψ·exp(−r²/w²)·r dr)² / (∫ψ²r dr · ∫exp(−2r²/w²)r dr), evaluated by Gauss–Legendre
    quadrature over core and cladding and maximised by golden-section search, all elements at
    once.

    References
    ----------
    .. [1] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56,
       703 (1977).
    .. [2] A. W. Snyder and J. D. Love, "Optical Waveguide Theory", 1983.
    """
    v = _lp01_v(v)
    core_radius_m = positive(core_radius_m, "core radius")
    u, w = _lp01_uw(v)
    # Search bracket around the Petermann II radius, which the best-fit Gaussian exceeds by a
    # factor from 1.01 (V ≈ 2.4) to about 1/V at small V, where the mode tail is K0-like.
    petermann = _petermann_ratio(u, w)
    low, high = 0.5 * petermann, (2.0 + 2.0 / v**2) * petermann
    ratio = (np.sqrt(5.0) - 1.0) / 2.0
    for _ in range(_GOLDEN_STEPS):
        left = high - ratio * (high - low)
        right = low + ratio * (high - low)
        left_better = _gaussian_overlap(u, w, left) > _gaussian_overlap(u, w, right)
        high = np.where(left_better, right, high)
        low = np.where(left_better, low, left)
    return core_radius_m * 0.5 * (low + high)


def petermann_mode_field_radius_m(core_radius_m, v):
    """Petermann II mode-field radius of the LP01 mode of a step-index fibre.

    Parameters
    ----------
    core_radius_m : array_like
        Core radius a [m].
    v : array_like
        V number (see :func:`lp01_u`).

    Returns
    -------
    numpy.ndarray
        w_PII [m].

    Notes
    -----
    Definition [1]_: w_PII² = 2·∫ψ²r dr / ∫(dψ/dr)²r dr. With the Bessel integrals of the
    LP01 field [2]_ and its eigenvalue equation, ∫(dψ/dρ)²ρdρ = V²/2 and
    ∫ψ²ρdρ = ½(J1(U)²/J0(U)² + K1(W)²/K0(W)²), so that

        w_PII = √2·a·J1(U)/(W·J0(U)) = √2·a·K1(W)/(U·K0(W)).

    References
    ----------
    .. [1] K. Petermann, Electron. Lett. 19, 712 (1983) (from memory).
    .. [2] A. W. Snyder and J. D. Love, "Optical Waveguide Theory", 1983.
    """
    v = _lp01_v(v)
    u, w = _lp01_uw(v)
    return positive(core_radius_m, "core radius") * _petermann_ratio(u, w)
