"""Coherence length of a source, and whether a medium is thick enough to sum its faces incoherently.

The engine sums the reflections at a medium's two faces by their powers (no interference). That
holds when the round trip between the faces is longer than the source's coherence length; in a
thinner medium the reflections interfere and its transmittance shows fringes in wavelength and
thickness (Born & Wolf; Katsidis & Siapkas 2002, on coherent and incoherent layers).

References
----------
.. [1] M. Born and E. Wolf, "Principles of Optics", 7th ed., 1999, §7.5.8 (coherence length;
   section number from memory).
.. [2] E. Hecht, "Optics", 5th ed., 2017, §12.1 (coherence length λ²/Δλ; from memory).
.. [3] C. C. Katsidis and D. I. Siapkas, Appl. Opt. 41, 3978 (2002).
"""


from linkbudget.physics.checks import positive

#: Without the source's spectral width, a medium under this many wavelengths thick is noted as
#: possibly coherent (common practice: a laser diode's coherence length is at least ~100 λ).
THICK_MEDIUM_WAVELENGTHS = 100


def coherence_length_m(wavelength_m, spectral_width_m, *, n=1.0):
    """Coherence length of a source inside a medium, L_c = λ²/(n·Δλ).

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum centre wavelength λ [m].
    spectral_width_m : float
        Spectral width Δλ of the source [m] (full width at half maximum).
    n : array_like, optional
        Real index of the medium (group index, where known, is the better choice).

    Returns
    -------
    numpy.ndarray
        L_c [m]. The constant in front depends on the line shape (e.g. 0.44 for a Gaussian line
        with the FWHM [2]_); λ²/Δλ is the order of magnitude [1]_, [2]_.

    References
    ----------
    .. [1] Born & Wolf, "Principles of Optics", 1999.
    .. [2] Hecht, "Optics", 2017.
    """
    wavelength_m = positive(wavelength_m, "wavelength")
    return wavelength_m**2 / (positive(n, "index") * positive(spectral_width_m, "spectral width"))
