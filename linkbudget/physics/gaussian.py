"""Gaussian beams and the coupling between two Gaussian modes.

A fundamental Gaussian beam of waist radius w0 (1/e² intensity radius) in a medium of index n at
vacuum wavelength λ, with the paraxial field convention of Kogelnik & Li [1]_ (time dependence
exp(+iωt), carrier exp(−ikz), k = 2πn/λ)::

    u(x, y, z) ∝ exp(−i·k·(x² + y²) / (2·q(z))),   q(z) = z + i·z_R,   z_R = π·w0²·n/λ.

Complex beam parameter convention: this module uses the **reduced** beam parameter
q̂ = q/n throughout (Siegman [2]_, "reduced" ABCD matrices), so that

    1/q̂ = n/R − i·λ/(π·w²),   q̂ = z/n + i·π·w0²/λ   (λ the vacuum wavelength).

The reduced distance of a path of physical length L in index n is L/n. With q̂, every ABCD matrix
has determinant 1, a flat interface between two media is the identity, and spot and waist radii
follow from q̂ and the vacuum wavelength alone (no index needed).

ABCD matrices are numpy arrays of shape ``(..., 2, 2)`` whose leading axes broadcast against the
other inputs (a wavelength axis, for instance); a chain of elements is their matrix product,
the element met last on the left: ``M = M_n @ ... @ M_2 @ M_1``.

References
----------
.. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550–1567 (1966),
   doi:10.1364/AO.5.001550 (DOI from memory).
.. [2] A. E. Siegman, "Lasers", University Science Books, 1986 (chapters on Gaussian beams
   and ray matrices; chapter numbers from memory: ch. 15 and 17).
"""


import numpy as np

from linkbudget.physics.checks import finite, non_negative, positive


def rayleigh_range_m(waist_m, wavelength_m, *, n=1.0):
    """Rayleigh range of a Gaussian beam, z_R = π·w0²·n/λ.

    Parameters
    ----------
    waist_m : array_like
        Waist radius w0 (1/e² intensity radius) [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the medium the beam travels in (default 1.0, vacuum/air).

    Returns
    -------
    numpy.ndarray
        z_R [m], a physical distance in the medium.

    Notes
    -----
    z_R = π w0² n / λ [1]_, [2]_.

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    .. [2] A. E. Siegman, "Lasers", 1986.
    """
    waist_m = positive(waist_m, "waist radius")
    return np.pi * waist_m**2 * positive(n, "refractive index") / positive(wavelength_m, "wavelength")


def spot_radius_m(waist_m, distance_m, wavelength_m, *, n=1.0):
    """Spot radius (1/e² intensity) of a Gaussian beam at a distance from its waist.

    Parameters
    ----------
    waist_m : array_like
        Waist radius w0 [m].
    distance_m : array_like
        Physical distance z from the waist along the axis, in the medium [m] (either sign).
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the medium (default 1.0).

    Returns
    -------
    numpy.ndarray
        w(z) [m].

    Notes
    -----
    w(z) = w0·√(1 + (z/z_R)²), z_R = π w0² n/λ [1]_.

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    """
    z_r = rayleigh_range_m(waist_m, wavelength_m, n=n)
    return np.asarray(waist_m, dtype=float) * np.sqrt(1.0 + (finite(distance_m, "distance") / z_r) ** 2)


def divergence_half_angle_rad(waist_m, wavelength_m, *, n=1.0):
    """Far-field half-angle divergence of a Gaussian beam, θ = λ/(π·n·w0).

    Parameters
    ----------
    waist_m : array_like
        Waist radius w0 [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the medium (default 1.0); the angle is measured in that medium.

    Returns
    -------
    numpy.ndarray
        Half-angle θ [rad] of the 1/e² intensity cone, w0/z_R.

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", 1986.
    """
    return positive(waist_m, "waist radius") / rayleigh_range_m(waist_m, wavelength_m, n=n)


def waist_from_divergence_m(divergence_half_angle_rad, wavelength_m, *, n=1.0):
    """Waist radius of a Gaussian beam of a given far-field half-angle, w0 = λ/(π·n·θ).

    Parameters
    ----------
    divergence_half_angle_rad : array_like
        Far-field half-angle θ of the 1/e² intensity cone, in the medium [rad].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the medium (default 1.0).

    Returns
    -------
    numpy.ndarray
        w0 [m], the inverse of :func:`divergence_half_angle_rad`.

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", 1986.
    """
    theta = positive(divergence_half_angle_rad, "divergence half-angle")
    return positive(wavelength_m, "wavelength") / (np.pi * positive(n, "refractive index") * theta)


def q_from_waist(waist_m, wavelength_m, *, n=1.0, distance_m=0.0):
    """Reduced complex beam parameter q̂ = q/n of a Gaussian beam.

    Parameters
    ----------
    waist_m : array_like
        Waist radius w0 [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the medium (default 1.0).
    distance_m : array_like, optional
        Physical distance from the waist in the medium [m]; positive after the waist (the beam
        diverging), negative before it (default 0, at the waist).

    Returns
    -------
    numpy.ndarray of complex
        q̂ = z/n + i·π·w0²/λ [m].

    Notes
    -----
    q = z + i·z_R [1]_ and the reduced parameter q̂ = q/n [2]_ (see the module docstring).

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    .. [2] A. E. Siegman, "Lasers", 1986 (reduced ray matrices).
    """
    n = positive(n, "refractive index")
    z_r = rayleigh_range_m(waist_m, wavelength_m, n=n)
    return (finite(distance_m, "distance") + 1j * z_r) / n


def abcd_propagate(q, abcd):
    """Transform a reduced complex beam parameter through an ABCD matrix.

    Parameters
    ----------
    q : array_like of complex
        Reduced beam parameter q̂ before the element [m].
    abcd : array_like, shape (..., 2, 2)
        Reduced ray-transfer matrix [[A, B], [C, D]] (B in m, C in 1/m); leading axes broadcast
        against ``q``.

    Returns
    -------
    numpy.ndarray of complex
        q̂' = (A·q̂ + B)/(C·q̂ + D) [m].

    Notes
    -----
    The ABCD law of Gaussian beams, Kogelnik & Li [1]_ (their Eq. (27), from memory).

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    """
    abcd = np.asarray(abcd)
    if abcd.shape[-2:] != (2, 2):
        raise ValueError(f"an ABCD matrix has shape (..., 2, 2), got {abcd.shape}")
    q = np.asarray(q, dtype=complex)
    a, b, c, d = abcd[..., 0, 0], abcd[..., 0, 1], abcd[..., 1, 0], abcd[..., 1, 1]
    return (a * q + b) / (c * q + d)


def _matrix(a, b, c, d):
    a, b, c, d = np.broadcast_arrays(*(np.asarray(x, dtype=float) for x in (a, b, c, d)))
    return np.stack([np.stack([a, b], axis=-1), np.stack([c, d], axis=-1)], axis=-2)


def abcd_free_space(length_m, *, n=1.0):
    """Reduced ABCD matrix of a homogeneous path, [[1, L/n], [0, 1]].

    Parameters
    ----------
    length_m : array_like
        Physical length L of the path [m] (≥ 0).
    n : array_like, optional
        Refractive index of the path (default 1.0).

    Returns
    -------
    numpy.ndarray, shape (..., 2, 2)
        The matrix, for use with the reduced beam parameter q̂ = q/n.

    Notes
    -----
    In the reduced convention the distance entering B is L/n [1]_.

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", 1986 (reduced ray matrices).
    """
    reduced = non_negative(length_m, "length") / positive(n, "refractive index")
    return _matrix(1.0, reduced, 0.0, 1.0)


def abcd_thin_lens(focal_length_m):
    """ABCD matrix of a thin lens, [[1, 0], [−1/f, 1]].

    Parameters
    ----------
    focal_length_m : array_like
        Focal length f of the lens in air [m]; positive for a converging lens. For a lens
        immersed in a medium of index n, pass its equivalent air focal length (f_medium/n), so
        that 1/f is the lens power.

    Returns
    -------
    numpy.ndarray, shape (..., 2, 2)

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    .. [2] A. E. Siegman, "Lasers", 1986.
    """
    focal_length_m = finite(focal_length_m, "focal length")
    if np.any(focal_length_m == 0):
        raise ValueError("focal length must be non-zero")
    return _matrix(1.0, 0.0, -1.0 / focal_length_m, 1.0)


def abcd_flat_interface(n1, n2):
    """Reduced ABCD matrix of a flat interface from index n1 into index n2: the identity.

    Parameters
    ----------
    n1, n2 : array_like
        Refractive indices before and after the interface (> 0).

    Returns
    -------
    numpy.ndarray, shape (..., 2, 2)
        [[1, 0], [0, 1]] broadcast to the shape of the indices.

    Notes
    -----
    With physical q the flat-interface matrix is [[1, 0], [0, n1/n2]] (q scales by n2/n1); the
    reduced q̂ = q/n is unchanged [1]_. The function exists so a chain of elements can be
    written element by element without special cases; the indices are checked.

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", 1986 (reduced ray matrices).
    """
    n1 = positive(n1, "refractive index n1")
    n2 = positive(n2, "refractive index n2")
    ones = np.ones(np.broadcast_shapes(n1.shape, n2.shape))
    return _matrix(ones, 0.0, 0.0, ones)


def spot_radius_from_q(q, wavelength_m):
    """Spot radius (1/e² intensity) of a beam from its reduced complex beam parameter.

    Parameters
    ----------
    q : array_like of complex
        Reduced beam parameter q̂ [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    Returns
    -------
    numpy.ndarray
        w = √(−λ / (π·Im(1/q̂))) [m].

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    """
    inverse_imag = np.imag(1.0 / np.asarray(q, dtype=complex))
    if np.any(inverse_imag >= 0):
        raise ValueError("a Gaussian beam has Im(1/q) < 0")
    return np.sqrt(-positive(wavelength_m, "wavelength") / (np.pi * inverse_imag))


def waist_from_q(q, wavelength_m):
    """Waist radius of the beam described by a reduced complex beam parameter.

    Parameters
    ----------
    q : array_like of complex
        Reduced beam parameter q̂ [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].

    Returns
    -------
    numpy.ndarray
        w0 = √(λ·Im(q̂)/π) [m]. The waist lies a physical distance −n·Re(q̂) from the plane
        where q̂ is given (ahead of it when Re(q̂) < 0).

    References
    ----------
    .. [1] H. Kogelnik and T. Li, "Laser beams and resonators", Appl. Opt. 5, 1550 (1966).
    """
    q_imag = np.imag(np.asarray(q, dtype=complex))
    if np.any(q_imag <= 0):
        raise ValueError("a Gaussian beam has Im(q) > 0")
    return np.sqrt(positive(wavelength_m, "wavelength") * q_imag / np.pi)


def coupling_efficiency(w1_m, w2_m, wavelength_m, *, offset_m=0.0, tilt_rad=0.0, separation_m=0.0, n=1.0):
    """Power coupling efficiency between two circular Gaussian modes (general overlap).

    Mode 1 has its waist w1 at its own plane and travels a distance ``separation_m`` in a medium
    of index n to the plane of mode 2's waist w2. There, mode 1's axis crosses the plane at a
    lateral distance ``offset_m`` from mode 2's axis and makes the angle ``tilt_rad`` with it.

    Parameters
    ----------
    w1_m, w2_m : array_like
        Mode-field (waist) radii of the two modes, 1/e² intensity [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    offset_m : array_like, optional
        Signed lateral offset d of mode 1's axis from mode 2's axis at mode 2's plane [m].
    tilt_rad : array_like, optional
        Signed angle θ between the two axes, measured in the medium of index n (the gap medium,
        as Ghatak & Thyagarajan [3]_ do; Marcuse [4]_ used the cladding index), in the plane of
        the offset; positive when mode 1's axis moves toward +d as it propagates. The sign
        matters only when both offset and separation are non-zero.
    separation_m : array_like, optional
        Axial distance D from mode 1's waist to mode 2's waist, in the medium (≥ 0) [m].
    n : array_like, optional
        Refractive index of the medium between the two planes (default 1.0).

    Returns
    -------
    numpy.ndarray
        Power coupling efficiency η in [0, 1], broadcast over all inputs.

    Notes
    -----
    η = |∫u1·u2* dA|² / (∫|u1|² dA · ∫|u2|² dA), evaluated at mode 2's plane with
    u1 = exp(−ik((x−d)² + y²)/(2q1))·exp(−ikθ(x−d)), q1 = D + i·z_R1, and
    u2 = exp(−ik(x² + y²)/(2q2)), q2 = i·z_R2, k = 2πn/λ (small-angle, paraxial tilt).
    The integrand is a Gaussian in x and in y, and ∫exp(−Ax² + Bx)dx = √(π/A)·exp(B²/(4A))
    gives, with S = w1² + w2² − i·λD/(πn) and c = w1² − i·λD/(πn),

        η = 4w1²w2² / |S|² · exp(−2·Re[(d² + i·kθd·w2² + k²θ²w2²·c/4) / S]).

    The prefactor is Kogelnik's 4·Im(q1)·Im(q2)/|q1 − q2*|² [1]_; for D = 0 the exponent is
    −2d²/(w1² + w2²) − 2(πnθw1w2/λ)²/(w1² + w2²), the joint-loss result of Marcuse [4]_; the
    combined offset, tilt and separation case is of the kind treated by Joyce & DeLoach [2]_
    (all from memory). Special cases: :func:`offset_coupling`, :func:`tilt_coupling` and
    :func:`gap_coupling`.

    References
    ----------
    .. [1] H. Kogelnik, "Coupling and conversion coefficients for optical modes", in Proc.
       Symp. Quasi-Optics, Polytechnic Institute of Brooklyn, 1964, pp. 333–347 (from memory).
    .. [2] W. B. Joyce and B. C. DeLoach, "Alignment of Gaussian beams", Appl. Opt. 23,
       4187–4196 (1984), doi:10.1364/AO.23.004187 (from memory).
    .. [3] A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", Cambridge
       University Press, 1998, eqs. (8.69), (8.75), (8.81).
    .. [4] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56,
       703–718 (1977), doi:10.1002/j.1538-7305.1977.tb00534.x (pages and DOI from memory).
    """
    one_axis = dict(separation_m=separation_m, n=n)
    return (coupling_efficiency_1d(w1_m, w2_m, wavelength_m, offset_m=offset_m, tilt_rad=tilt_rad, **one_axis)
            * coupling_efficiency_1d(w1_m, w2_m, wavelength_m, **one_axis))


def coupling_efficiency_1d(w1_m, w2_m, wavelength_m, *, offset_m=0.0, tilt_rad=0.0, separation_m=0.0, n=1.0):
    """One transverse axis of the Gaussian overlap: the factor η_x of η = η_x·η_y.

    The two-dimensional overlap of Gaussian modes separates into a product over x and y
    (the integrand is a product of a Gaussian in x and one in y), so an elliptical mode couples
    with the product of the factors of its two axes, each with its own mode-field radii, offset
    and tilt.

    Parameters
    ----------
    w1_m, w2_m : array_like
        Mode-field radii of the two modes along this axis, 1/e² intensity [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    offset_m, tilt_rad : array_like, optional
        Signed lateral offset d [m] of mode 1's axis from mode 2's axis at mode 2's plane, and
        signed tilt θ [rad] in this axis's plane, measured in the medium of index n; θ > 0 when
        mode 1's axis moves toward +x as it propagates, so θ·d > 0 is a tilt that turns mode 1
        further along its offset (see :func:`coupling_efficiency`).
    separation_m : array_like, optional
        Axial distance between the two waists [m] (≥ 0).
    n : array_like, optional
        Index of the medium between them.

    Returns
    -------
    numpy.ndarray
        η_x = (2w1w2/|S|)·exp(−2·Re[(d² + i·kθd·w2² + k²θ²w2²·c/4)/S]), with S and c as in
        :func:`coupling_efficiency`.

    Notes
    -----
    The one-axis integral ∫exp(−Ax² + Bx)dx = √(π/A)·exp(B²/(4A)) of the derivation in
    :func:`coupling_efficiency`; for w1 = w2 and no misalignment η_x = 1. The real part of the
    exponent is taken term by term in :func:`misalignment_terms`.

    The sign of the tilt matters through the cross term i·kθd·w2² alone, whose share of the
    exponent is +2kθd·w2²·δ/|S|² (δ = λD/(πn)): after a gap (D > 0) a tilt with θ·d > 0 couples
    better than θ·d < 0. Geometrically, mode 1's waist lies at d − θD, nearer mode 2's axis when
    θ·d > 0. Without a gap, or without an offset, the sign plays no part.

    References
    ----------
    .. [1] H. Kogelnik, "Coupling and conversion coefficients for optical modes", 1964 (from memory).
    .. [2] W. B. Joyce and B. C. DeLoach, "Alignment of Gaussian beams", Appl. Opt. 23, 4187 (1984)
       (from memory).
    """
    offset_m = finite(offset_m, "offset")
    tilt_rad = finite(tilt_rad, "tilt")
    return _axis_efficiency(misalignment_terms(w1_m, w2_m, wavelength_m, separation_m=separation_m, n=n),
                            offset_m, tilt_rad)


def _axis_efficiency(terms, offset_m, tilt_rad):
    """η_x = P·exp(−2·(A·d² − B·θ·d + C·θ²)) from the (P, A, B, C) of :func:`misalignment_terms`."""
    prefactor, offset_term, cross_term, tilt_term = terms
    return prefactor * np.exp(-2.0 * (offset_term * offset_m**2 - cross_term * tilt_rad * offset_m
                                      + tilt_term * tilt_rad**2))


def misalignment_terms(w1_m, w2_m, wavelength_m, *, separation_m=0.0, n=1.0):
    """One axis of the Gaussian overlap as a quadratic in offset and tilt: (P, A, B, C) of

        η_x = P·exp(−2·(A·d² − B·θ·d + C·θ²)),

    the real part of the exponent of :func:`coupling_efficiency_1d` taken term by term, with
    S = w1² + w2² − iδ, δ = λD/(πn) and k = 2πn/λ:

        P = 2w1w2/|S|,  A = (w1² + w2²)/|S|²,  B = k·w2²·δ/|S|²,
        C = k²w2²·(w1²(w1² + w2²) + δ²)/(4|S|²).

    A > 0, C > 0, B ≥ 0 (B = 0 without a gap) and 4AC − B² ∝ w1²((w1² + w2²)² + δ²) > 0, so the
    quadratic is positive definite in (d, θ): over a box of offsets and tilts its largest value
    lies at a corner and its least on the edges nearest d = θ = 0
    (:func:`circular_coupling_extremes`).

    References
    ----------
    .. [1] H. Kogelnik, "Coupling and conversion coefficients for optical modes", 1964 (from memory).
    .. [2] W. B. Joyce and B. C. DeLoach, "Alignment of Gaussian beams", Appl. Opt. 23, 4187 (1984)
       (from memory).
    """
    w1_sq = positive(w1_m, "mode-field radius w1") ** 2
    w2_sq = positive(w2_m, "mode-field radius w2") ** 2
    wavelength_m = positive(wavelength_m, "wavelength")
    n = positive(n, "refractive index")
    delta = wavelength_m * non_negative(separation_m, "separation") / (np.pi * n)  # 2D/k
    k = 2.0 * np.pi * n / wavelength_m
    sum_sq = w1_sq + w2_sq
    s_abs_sq = sum_sq**2 + delta**2
    prefactor = 2.0 * np.sqrt(w1_sq * w2_sq / s_abs_sq)
    return (prefactor, sum_sq / s_abs_sq, k * w2_sq * delta / s_abs_sq,
            k**2 * w2_sq * (w1_sq * sum_sq + delta**2) / (4.0 * s_abs_sq))


def wavenumber_per_m(wavelength_m, *, n=1.0):
    """Wavenumber k = 2πn/λ [1/m] in a medium of index n, from the vacuum wavelength λ [m]."""
    return 2.0 * np.pi * positive(n, "refractive index") / positive(wavelength_m, "wavelength")


#: Candidate-by-wavelength values :func:`circular_coupling_extremes` evaluates at once: its five
#: buffers of that size are reused from block to block and stay in the cache (fresh arrays over a
#: long sweep cost more in page faults than their arithmetic).
_BLOCK_VALUES = 1 << 15


def circular_coupling_extremes(w1_m, w2_m, wavenumber_per_m, *, separation_m, offset_range_m, tilt_range_rad,
                               cosine_range):
    """(least, largest) coupling of two circular Gaussian modes over a box of offsets and tilts and
    over candidate mode sizes and separations.

    Both axes of :func:`coupling_efficiency_1d` together give, for an offset d along x and a tilt
    θ turned at azimuth ψ from it (u = cos ψ),

        η = 4w1²w2²/|S|² · exp(−2·Q/|S|²),  Q = Σd² − 2u·D·w2²·θd + w2²·H·θ²,

    with Σ = w1² + w2², |S|² = Σ² + (2D/k)², H = k²w1²Σ/4 + D² and D the separation (the terms of
    :func:`misalignment_terms` times |S|²). Q is a positive definite quadratic in (d, θ) and linear
    in u with a slope −2D·w2²·θd ≤ 0. Over d ∈ [d_low, d_high], θ ∈ [θ_low, θ_high] and the
    ``cosine_range`` (u_least, u_largest) where the least and the largest are sought (−1 and +1
    over an unknown azimuth):

    - the least coupling is Q's largest value, at a corner of the box (at (d_high, θ_high) when
      u_least ≤ 0, every term then growing with d and θ);
    - the largest is Q's least value, which lies on the edges θ = θ_low, at
      d* = u·D·w2²·θ_low/Σ, or d = d_low, at θ* = u·D·w2²·d_low/(w2²H), each clipped into its
      range (where ∂Q/∂d = 0 or ∂Q/∂θ = 0; on the far edges both derivatives are positive, as
      4AC − B² > 0 in :func:`misalignment_terms`).

    The least and the largest are then taken over the candidates too, in blocks of wavelengths,
    so the memory is that of the inputs and a few blocks, whatever the number of candidates.

    Parameters
    ----------
    w1_m, w2_m : numpy.ndarray
        Mode-field radii of the launched and the receiving mode [m]. Every axis but the last is a
        candidate axis; the last is the wavelength axis, of length one for a radius that is the
        same at every wavelength (e.g. shape (before candidates, 1, 1, 1) and
        (1, after candidates, 1, wavelengths)).
    wavenumber_per_m : numpy.ndarray, shape (wavelengths,)
        k = 2πn/λ in the gap medium (:func:`wavenumber_per_m`).
    separation_m : numpy.ndarray
        Axial distance D between the waists [m], on candidate axes and a last wavelength axis as
        the radii; the three broadcast together.
    offset_range_m, tilt_range_rad : (float, float)
        (low, high) of the offset [m] and of the tilt [rad], both ≥ 0.
    cosine_range : (float, float)
        cos ψ at which the least and the largest coupling are sought.

    Returns
    -------
    (numpy.ndarray, numpy.ndarray)
        The least and the largest η over the box and the candidates, shape (wavelengths,).

    References
    ----------
    .. [1] W. B. Joyce and B. C. DeLoach, "Alignment of Gaussian beams", Appl. Opt. 23, 4187 (1984)
       (from memory): the overlap whose exponent this maximises and minimises.
    """
    w1_sq, w2_sq = positive(w1_m, "mode-field radius w1") ** 2, positive(w2_m, "mode-field radius w2") ** 2
    gap_m = non_negative(separation_m, "separation")
    (d_low, d_high), (t_low, t_high) = (sorted(non_negative(pair, name)) for pair, name in
                                        ((offset_range_m, "offset"), (tilt_range_rad, "tilt")))
    box = (d_low, d_high, t_low, t_high, *cosine_range)
    corners = _extreme_corners(*box)
    inputs = (w1_sq, w2_sq, gap_m)
    constant = all(values.shape[-1] == 1 for values in inputs)
    terms = _closed_form_terms(*inputs, box, corners) if constant else None
    k_sq = np.square(wavenumber_per_m)
    # The edge d = d_low, at θ* = u·cross·d_low/(2·w2²H): where θ* ≤ θ_low its least Q is the corner
    # (d_low, θ_low), on the edge θ = θ_low already searched. With terms the same at every
    # wavelength, w2²H grows with k², so θ* is largest at the least k².
    on_low_offset = cosine_range[1] * d_low > 0 and (not constant or np.any(
        terms["low_offset_numerator"] > 2.0 * t_low * (terms["h_0"] + terms["h_k"] * np.min(k_sq))))

    points = k_sq.shape[-1]
    candidates = np.broadcast_shapes(*(values.shape[:-1] for values in inputs))
    candidate_axes = tuple(range(len(candidates)))
    width = min(points, max(1, _BLOCK_VALUES // max(1, int(np.prod(candidates)))))
    buffers = np.empty((5, *candidates, width))
    least, largest = np.empty(points), np.empty(points)
    for start in range(0, points, width):
        block = slice(start, start + width)
        part = terms if constant else _closed_form_terms(*(_over_block(values, block) for values in inputs), box,
                                                         corners)
        most, fewest = _block_extremes(part, k_sq[block], buffers[..., :min(width, points - start)], box, corners,
                                       on_low_offset)
        np.min(most, axis=candidate_axes, out=least[block])
        np.max(fewest, axis=candidate_axes, out=largest[block])
    return least, largest


def _block_extremes(part, k_sq, buffers, box, corners, on_low_offset):
    """(least, largest) η of each candidate over one block of wavelengths
    (:func:`circular_coupling_extremes`), from its :func:`_closed_form_terms` ``part`` and k², computed
    in place in the five ``buffers`` (two of which it returns)."""
    d_low, _, t_low, t_high, _, _ = box
    inverse_s_sq, w2_sq_h, most, fewest, other = buffers
    np.divide(part["gap_term"], k_sq, out=inverse_s_sq)
    inverse_s_sq += part["sum_sq_sq"]
    np.divide(1.0, inverse_s_sq, out=inverse_s_sq)
    np.multiply(part["h_k"], k_sq, out=w2_sq_h)
    w2_sq_h += part["h_0"]
    _quadratic_into(fewest, w2_sq_h, part["low_tilt_fixed"], t_low**2)
    if on_low_offset:  # Q on the edge d = d_low at θ* = u·cross·d_low/(2·w2²H), clipped
        t_star = most  # scratch until the corners are evaluated
        np.multiply(2.0, w2_sq_h, out=t_star)
        np.divide(part["low_offset_numerator"], t_star, out=t_star)
        np.clip(t_star, t_low, t_high, out=t_star)
        np.multiply(part["low_offset_cross"], t_star, out=other)
        other *= d_low
        np.subtract(part["low_offset_fixed"], other, out=other)
        np.square(t_star, out=t_star)
        t_star *= w2_sq_h
        other += t_star
        np.minimum(fewest, other, out=fewest)
    (_, first_tilt), *others = corners
    _quadratic_into(most, w2_sq_h, part["corner_fixed"][0], first_tilt**2)
    for fixed, (_, tilt_rad) in zip(part["corner_fixed"][1:], others, strict=True):
        np.maximum(most, _quadratic_into(other, w2_sq_h, fixed, tilt_rad**2), out=most)
    scale = np.multiply(part["scale_factor"], inverse_s_sq, out=w2_sq_h)
    inverse_s_sq *= -2.0
    for exponent in (most, fewest):  # η = scale·exp(−2·Q/|S|²), in place
        exponent *= inverse_s_sq
        np.exp(exponent, out=exponent)
        exponent *= scale
    return most, fewest


def _extreme_corners(d_low, d_high, t_low, t_high, u_least, u_largest):
    """The (offset, tilt) corners where Q can be largest (:func:`circular_coupling_extremes`)."""
    if u_least <= 0:
        return [(d_high, t_high)]
    return [(d, t) for d in (d_low, d_high) for t in (t_low, t_high)]


def _closed_form_terms(w1_sq, w2_sq, gap_m, box, corners):
    """What :func:`circular_coupling_extremes` needs that does not depend on the wavenumber:
    |S|² = Σ² + gap_term/k², w2²H = h_0 + h_k·k², η = scale_factor/|S|²·exp(−2·Q/|S|²), and Q at
    a box point = fixed + w2²H·θ², by the fixed part of each point."""
    d_low, d_high, t_low, _, u_least, u_largest = box
    sum_sq = w1_sq + w2_sq
    cross = 2.0 * gap_m * w2_sq  # Q's cross term is −u·cross·θd
    d_star = np.clip(u_largest * cross * t_low / (2.0 * sum_sq), d_low, d_high)
    low_offset_cross = u_largest * cross
    return dict(sum_sq_sq=sum_sq**2, gap_term=4.0 * gap_m**2, h_k=w1_sq * w2_sq * sum_sq / 4.0,
                h_0=w2_sq * gap_m**2, scale_factor=4.0 * w1_sq * w2_sq,
                low_tilt_fixed=sum_sq * d_star**2 - u_largest * cross * t_low * d_star,
                low_offset_cross=low_offset_cross, low_offset_numerator=low_offset_cross * d_low,
                low_offset_fixed=sum_sq * d_low**2,
                corner_fixed=[sum_sq * d**2 - u_least * cross * t * d for d, t in corners])


def _over_block(values, block):
    """Values over a block of wavelengths, the last axis (the same in every block when constant)."""
    return values if values.shape[-1] == 1 else values[..., block]


def _quadratic_into(out, w2_sq_h, fixed, theta_sq):
    """Q = fixed + w2²H·θ² at a box point (:func:`circular_coupling_extremes`), into ``out``."""
    np.multiply(w2_sq_h, theta_sq, out=out)
    out += fixed
    return out


def coupling_efficiency_tilt_azimuth(w1_along_m, w1_across_m, w2_along_m, w2_across_m, wavelength_m, *,
                                     offset_m=0.0, tilt_rad=0.0, azimuth_cosine=1.0, separation_m=0.0, n=1.0):
    """Coupling of two Gaussian modes with a lateral offset and a tilt turned at an azimuth from it.

    Both modes have their principal axes aligned (a circular mode is the case of equal radii).
    At mode 2's plane, mode 1's axis is offset by d ≥ 0 along one principal axis ("along"); it
    is tilted by θ ≥ 0, turning toward the transverse direction at azimuth ψ from the offset's
    direction: ψ = 0 turns mode 1 further along its offset, ψ = π back toward mode 2's axis,
    ψ = π/2 across the offset (the tilt then lies along the other principal axis, "across").

    Parameters
    ----------
    w1_along_m, w1_across_m, w2_along_m, w2_across_m : array_like
        Mode-field radii (1/e² intensity) of modes 1 and 2 along the offset's axis and across
        it [m].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    offset_m : array_like, optional
        Lateral offset d of mode 1's axis from mode 2's axis at mode 2's plane [m].
    tilt_rad : array_like, optional
        Angle θ between the two axes, measured in the medium of index n [rad].
    azimuth_cosine : array_like, optional
        cos ψ, in [−1, 1] (default 1: the tilt turns along the offset); the sign of sin ψ does
        not matter, as nothing is offset across.
    separation_m : array_like, optional
        Axial distance D from mode 1's waist to mode 2's waist (≥ 0) [m].
    n : array_like, optional
        Refractive index of the medium between the two waists (default 1.0).

    Returns
    -------
    numpy.ndarray
        η = η_along(d, θ·cos ψ)·η_across(0, θ·sin ψ), each factor that of
        :func:`coupling_efficiency_1d` (the two share their :func:`misalignment_terms` when both
        modes give the same radii, the same arrays, along and across).

    Notes
    -----
    The tilt is a vector in the transverse plane; its components along the principal axes enter
    the two separable factors of the overlap (see :func:`coupling_efficiency_1d`). With u = cos ψ
    the exponents make ln η = a + b·u + c·u², a quadratic in u: b comes from the cross term
    (b ≥ 0, and b > 0 after a gap with both offset and tilt: ψ = 0 is the favourable
    turn, ψ = π the unfavourable one), c from the difference between the tilt terms of the two
    axes. For circular modes c = 0, so the extremes over ψ are the two parallel turns; for
    elliptical modes c ≠ 0, and where c > 0 and |b| < 2c the least coupling lies at the
    intermediate azimuth cos ψ = −b/(2c).

    References
    ----------
    .. [1] H. Kogelnik, "Coupling and conversion coefficients for optical modes", 1964 (from memory).
    .. [2] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56, 703 (1977).
    """
    cosine = finite(azimuth_cosine, "azimuth cosine")
    if np.any(np.abs(cosine) > 1):
        raise ValueError("an azimuth cosine lies in [-1, 1]")
    common = dict(separation_m=separation_m, n=n)
    tilt_rad = finite(tilt_rad, "tilt")
    offset_m = finite(offset_m, "offset")
    along_terms = misalignment_terms(w1_along_m, w2_along_m, wavelength_m, **common)
    if w1_across_m is w1_along_m and w2_across_m is w2_along_m:  # circular modes: one set of terms
        across_terms = along_terms
    else:
        across_terms = misalignment_terms(w1_across_m, w2_across_m, wavelength_m, **common)
    along = _axis_efficiency(along_terms, offset_m, tilt_rad * cosine)
    across = _axis_efficiency(across_terms, 0.0, tilt_rad * np.sqrt(1.0 - cosine**2))
    return along * across


def offset_coupling(w1_m, w2_m, offset_m):
    """Power coupling of two Gaussian modes with a lateral offset and a mode-size mismatch.

    Parameters
    ----------
    w1_m, w2_m : array_like
        Mode-field radii of the two modes [m].
    offset_m : array_like
        Lateral offset d between the two axes [m].

    Returns
    -------
    numpy.ndarray
        T = (2w1w2/(w1² + w2²))²·exp(−2d²/(w1² + w2²)).

    Notes
    -----
    Eq. (8.69) of [1]_ with the mismatch factor of [2]_; the zero-gap, zero-tilt case of
    :func:`coupling_efficiency`.

    References
    ----------
    .. [1] A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", 1998.
    .. [2] D. Marcuse, "Loss analysis of single-mode fiber splices", Bell Syst. Tech. J. 56,
       703 (1977).
    """
    w1_sq = positive(w1_m, "mode-field radius w1") ** 2
    w2_sq = positive(w2_m, "mode-field radius w2") ** 2
    offset_m = finite(offset_m, "offset")
    # Eq. (8.69) of [1]
    return (2.0 * np.sqrt(w1_sq * w2_sq) / (w1_sq + w2_sq)) ** 2 * np.exp(-2.0 * offset_m**2 / (w1_sq + w2_sq))


def tilt_coupling(w_m, tilt_rad, wavelength_m, *, n=1.0):
    """Power coupling of two equal Gaussian modes whose axes are tilted by an angle.

    Parameters
    ----------
    w_m : array_like
        Mode-field radius w of both modes [m].
    tilt_rad : array_like
        Angle θ between the axes, measured in the medium of index n [rad].
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the gap medium (default 1.0).

    Returns
    -------
    numpy.ndarray
        T = exp(−(π·n·w·θ/λ)²).

    Notes
    -----
    Eq. (8.75) of [1]_ (index of the gap medium).

    References
    ----------
    .. [1] A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", 1998.
    """
    w_m = positive(w_m, "mode-field radius")
    n = positive(n, "refractive index")
    tilt_rad = finite(tilt_rad, "tilt")
    # Eq. (8.75) of [1]
    return np.exp(-((np.pi * n * w_m * tilt_rad / positive(wavelength_m, "wavelength")) ** 2))


def gap_coupling(w_m, gap_m, wavelength_m, *, n=1.0):
    """Power coupling of two equal, aligned Gaussian modes separated by an axial gap.

    Parameters
    ----------
    w_m : array_like
        Mode-field radius w of both modes [m].
    gap_m : array_like
        Axial gap D between the two waists [m] (≥ 0).
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    n : array_like, optional
        Refractive index of the gap medium (default 1.0).

    Returns
    -------
    numpy.ndarray
        T = 1/(1 + D̂²), D̂ = λD/(2π·n·w²).

    Notes
    -----
    Eq. (8.81) of [1]_; equal to the exact overlap of :func:`coupling_efficiency` for equal
    waists (D̂ = D/(2z_R)).

    References
    ----------
    .. [1] A. Ghatak and K. Thyagarajan, "An Introduction to Fiber Optics", 1998.
    """
    w_m = positive(w_m, "mode-field radius")
    n = positive(n, "refractive index")
    gap_m = non_negative(gap_m, "gap")
    # Eq. (8.81) of [1]
    reduced_gap = positive(wavelength_m, "wavelength") * gap_m / (2.0 * np.pi * n * w_m**2)
    return 1.0 / (1.0 + reduced_gap**2)


def aperture_transmission(radius_m, spot_radius_m):
    """Fraction of a Gaussian beam's power passing a centred circular aperture.

    Parameters
    ----------
    radius_m : array_like
        Aperture radius a [m] (≥ 0).
    spot_radius_m : array_like
        Beam radius w (1/e² intensity) at the aperture [m].

    Returns
    -------
    numpy.ndarray
        T = 1 − exp(−2a²/w²).

    References
    ----------
    .. [1] A. E. Siegman, "Lasers", 1986 (aperture transmission of a Gaussian beam).
    """
    radius_m = non_negative(radius_m, "aperture radius")
    return -np.expm1(-2.0 * radius_m**2 / positive(spot_radius_m, "spot radius") ** 2)
