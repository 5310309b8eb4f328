"""Dispersion models: the refractive index of a material as a function of vacuum wavelength.

Each function takes the vacuum wavelength in metres (any array shape; a single wavelength is
the length-1 case) and returns an array of the same shape. Formula models return the real index
n of a transparent material; :func:`tabulated` returns the complex index n + iκ.

The functions know nothing of material files. They do not check a material's stated validity
range themselves, except :func:`tabulated`, whose table is its range; a material applies its own
range through :func:`require_in_range`.
"""

import numpy as np

_M_PER_UM = 1e-6
_NM_PER_M = 1e9
# Relative slack on range ends, so that 210 nm and 0.21 µm converted to metres (which may differ
# in the last bit) both count as the end of the range itself.
_RANGE_RTOL = 1e-9


class MaterialRangeError(ValueError):
    """A wavelength lies outside the range in which a material's data are valid."""


def require_in_range(wavelength_m, valid_range_m, *, what):
    """Raise :class:`MaterialRangeError` unless every wavelength lies inside a range.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelengths [m].
    valid_range_m : tuple of float
        Shortest and longest valid wavelength [m], ends included.
    what : str
        What the range belongs to, for the message (e.g. ``"fused-silica"``).
    """
    wavelength_m = np.asarray(wavelength_m, dtype=float)
    low_m, high_m = valid_range_m
    inside = (wavelength_m >= low_m * (1 - _RANGE_RTOL)) & (wavelength_m <= high_m * (1 + _RANGE_RTOL))
    if not np.all(inside):
        outside_nm = np.unique(wavelength_m[~inside]) * _NM_PER_M
        shown = ", ".join(f"{value:.6g}" for value in outside_nm[:3])
        more = f" and {outside_nm.size - 3} more" if outside_nm.size > 3 else ""
        subject = f"wavelength {shown} nm is" if outside_nm.size == 1 else f"wavelengths {shown} nm{more} are"
        raise MaterialRangeError(
            f"{what}: {subject} outside the valid range {low_m * _NM_PER_M:.6g}–{high_m * _NM_PER_M:.6g} nm"
        )


def _require_positive(values, wavelength_m, what):
    bad = ~(np.isfinite(values) & (values > 0))
    if np.any(bad):
        at_nm = np.broadcast_to(wavelength_m, values.shape)[bad][0] * _NM_PER_M
        raise ValueError(f"{what} is not a finite positive number at {at_nm:.6g} nm")
    return values


def sellmeier(wavelength_m, *, b, c_m, a=0.0):
    """Sellmeier dispersion formula.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    b : sequence of float
        Oscillator strengths B_i [dimensionless].
    c_m : sequence of float
        Resonance wavelengths C_i [m] (the formula uses C_i²).
    a : float, optional
        Constant term A [dimensionless], 0 in the classic form.

    Returns
    -------
    numpy.ndarray
        Real refractive index n, shape of ``wavelength_m``.

    Raises
    ------
    ValueError
        If n² is not finite and positive (a resonance inside the requested wavelengths).

    Notes
    -----
    n² = 1 + A + Σ_i B_i λ² / (λ² − C_i²).

    Malitson [2]_ fits fused silica at 20 °C with B = 0.6961663, 0.4079426, 0.8974794 and
    C = 0.0684043, 0.1162414, 9.896161 µm over 0.21–3.71 µm.

    References
    ----------
    .. [1] W. Sellmeier, "Zur Erklärung der abnormen Farbenfolge im Spectrum einiger
       Substanzen", Annalen der Physik und Chemie 219, 272–282 (1871).
    .. [2] I. H. Malitson, "Interspecimen comparison of the refractive index of fused silica",
       J. Opt. Soc. Am. 55, 1205–1208 (1965), doi:10.1364/JOSA.55.001205.
    """
    wavelength_m = np.asarray(wavelength_m, dtype=float)
    lam2 = wavelength_m[..., np.newaxis] ** 2
    b = np.asarray(b, dtype=float)
    c2 = np.asarray(c_m, dtype=float) ** 2
    n2 = 1.0 + a + np.sum(b * lam2 / (lam2 - c2), axis=-1)  # Sellmeier's formula [1]
    return np.sqrt(_require_positive(n2, wavelength_m, "Sellmeier n²"))


def cauchy(wavelength_m, *, coefficients, powers):
    """Cauchy-type power series in wavelength.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    coefficients : sequence of float
        A_i [µm^(−p_i)]: coefficients for λ expressed in micrometres, as is customary.
    powers : sequence of float
        Exponents p_i of λ (``0, -2, -4`` for Cauchy's three-term form).

    Returns
    -------
    numpy.ndarray
        Real refractive index n, shape of ``wavelength_m``.

    Raises
    ------
    ValueError
        If n is not finite and positive.

    Notes
    -----
    n = Σ_i A_i λ^(p_i), λ in µm. Cauchy's form is n = A + B/λ² + C/λ⁴ [1]_; a series of
    arbitrary powers is the general case (refractiveindex.info "formula 5" [2]_).

    References
    ----------
    .. [1] A.-L. Cauchy, "Mémoire sur la dispersion de la lumière", Prague, 1836.
    .. [2] M. N. Polyanskiy, "Refractiveindex.info database of optical constants",
       Sci. Data 11, 94 (2024), doi:10.1038/s41597-023-02898-2.
    """
    wavelength_um = np.asarray(wavelength_m, dtype=float)[..., np.newaxis] / _M_PER_UM
    terms = np.asarray(coefficients, dtype=float) * wavelength_um ** np.asarray(powers, dtype=float)
    return _require_positive(np.sum(terms, axis=-1), wavelength_m, "Cauchy n")


def gas_dispersion(wavelength_m, *, b_per_m2, c_per_m2, a=0.0):
    """Dispersion of a gas as a sum of resonance terms in wavenumber squared.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength λ [m].
    b_per_m2 : sequence of float
        Strengths B_i [1/m²].
    c_per_m2 : sequence of float
        Resonance wavenumbers squared C_i [1/m²].
    a : float, optional
        Constant term A [dimensionless].

    Returns
    -------
    numpy.ndarray
        Real refractive index n, shape of ``wavelength_m``.

    Notes
    -----
    n − 1 = A + Σ_i B_i / (C_i − σ²), σ = 1/λ.

    Ciddor [1]_ gives standard air (dry, 15 °C, 101.325 kPa, 450 ppm CO₂) in this two-term form,
    10⁸ (n − 1) = k1/(k0 − σ²) + k3/(k2 − σ²) with σ in µm⁻¹ (Eq. (1) of [1], from memory), the
    form Peck and Reeder [2]_ introduced. In micrometre units B = 0.05792105, 0.00167917 µm⁻² and
    C = 238.0185, 57.362 µm⁻² (refractiveindex.info "formula 6" [3]_).

    References
    ----------
    .. [1] P. E. Ciddor, "Refractive index of air: new equations for the visible and near
       infrared", Appl. Opt. 35, 1566–1573 (1996), doi:10.1364/AO.35.001566.
    .. [2] E. R. Peck and K. Reeder, "Dispersion of air", J. Opt. Soc. Am. 62, 958–962 (1972)
       (from memory).
    .. [3] M. N. Polyanskiy, "Refractiveindex.info database of optical constants",
       Sci. Data 11, 94 (2024), doi:10.1038/s41597-023-02898-2.
    """
    wavelength_m = np.asarray(wavelength_m, dtype=float)
    sigma2 = 1.0 / wavelength_m[..., np.newaxis] ** 2
    terms = np.asarray(b_per_m2, dtype=float) / (np.asarray(c_per_m2, dtype=float) - sigma2)
    n = 1.0 + a + np.sum(terms, axis=-1)  # Eq. (1) of [1] (from memory), here in SI units
    return _require_positive(n, wavelength_m, "gas dispersion n")


def tabulated(wavelength_m, table_wavelength_m, n, k):
    """Complex index interpolated in a table of measured optical constants.

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength λ [m]; must lie inside the table.
    table_wavelength_m : array_like
        Tabulated vacuum wavelengths [m], strictly increasing.
    n, k : array_like
        Tabulated refractive index n and extinction coefficient κ [dimensionless].

    Returns
    -------
    numpy.ndarray
        Complex index n + iκ, shape of ``wavelength_m``.

    Raises
    ------
    MaterialRangeError
        If a wavelength lies outside the table (no extrapolation).

    Notes
    -----
    n and κ are interpolated separately, each piecewise-linearly in wavelength between
    neighbouring rows (:func:`numpy.interp`); at a tabulated wavelength the tabulated values
    are returned unchanged.

    References
    ----------
    .. [1] NumPy documentation, ``numpy.interp`` (one-dimensional linear interpolation).
    """
    wavelength_m = np.asarray(wavelength_m, dtype=float)
    table_wavelength_m = np.asarray(table_wavelength_m, dtype=float)
    require_in_range(wavelength_m, (table_wavelength_m[0], table_wavelength_m[-1]), what="table")
    return np.interp(wavelength_m, table_wavelength_m, n) + 1j * np.interp(wavelength_m, table_wavelength_m, k)
