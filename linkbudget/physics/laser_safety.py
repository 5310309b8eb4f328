"""Accessible emission limits (AEL) of IEC 60825-1 for continuous-wave emission in the infrared.

One function per published formula, each a pure function of the vacuum wavelength. The edition
is **IEC 60825-1:2007 (Ed. 2)**, Table 4 (accessible emission limits of Class 1 and Class 1M),
Table 6 (Class 3R) and Table 8 (Class 3B), and its Table 10 (measurement conditions), the edition
that **IEC 60825-2:2004 (Ed. 3) with amendments 1:2006 and 2:2010** refers to for the hazard levels
of optical fibre communication systems. IEC 60825-2 assesses a *hazard level* at each accessible
location instead of classifying a product, "in the same way as the radiated power of a laser
device would be evaluated for classification" (STUK, the Finnish radiation safety authority,
*Lasers in optic cables*): hazard level 1 uses the Class 1 limits, 1M the Class 1M limits, and so
on.

The correction factors C4 and C7 are the same functions as the coefficients C_A and C_C of the
ICNIRP guidelines, as reproduced in Directive 2006/25/EC, Annex II, Table 2.2 (confirmed in the
Norwegian regulations on action and limit values, § 11-5, which reproduce that table). The
limits themselves (3.9e-4·C4·C7 W; 10 mW above 1400 nm; 5 × Class 1 for 3R; 0.5 W for 3B) and the
measurement conditions are **from memory**, not confirmed in a copy of the standard.

What the limits assume (Ed. 2, from memory):

- continuous emission viewed for the longest time base of the class, 100 s (700–4000 nm, for
  Class 1 a long exposure; the limits do not decrease between 100 s and 30 000 s here);
- a small apparent source (angular subtense α ≤ 1.5 mrad, so C6 = 1): a fibre end or a beam
  waist seen from 100 mm or more;
- the power is measured through a limiting aperture at a distance from the exposed face
  (:data:`MEASUREMENT_CONDITIONS`): condition 1, a 50 mm aperture at 2000 mm (a collimated beam
  seen through binoculars or a telescope); condition 2, a 7 mm aperture at 14 mm (a divergent
  beam seen through a magnifier); condition 3, a 7 mm aperture at 100 mm (the unaided eye), whose
  aperture above 1400 nm is the limiting aperture there, 3.5 mm (for exposures over 10 s). Class 1
  holds under all three, Class 1M under condition 3 only (while conditions 1 and 2 stay within Class 3B).

Edition 3 (IEC 60825-1:2014) raised C7 above 1250 nm (from memory: C7 = 8 + 10^(0.04(λ − 1250))),
so its limits there are higher: those of Ed. 2 used here are the stricter of the two.

Outside 700–4000 nm these functions return NaN: the visible band (where Class 2 and 2M apply,
and the photochemical limits) and the far infrared are not assessed by this module.

References
----------
.. [1] IEC 60825-1:2007, Safety of laser products – Part 1: Equipment classification and
   requirements, Ed. 2, Tables 4, 6, 8 and 10 (from memory).
.. [2] IEC 60825-2:2004+A1:2006+A2:2010, Safety of laser products – Part 2: Safety of optical
   fibre communication systems (OFCS), Ed. 3 (hazard levels at accessible locations).
.. [3] Directive 2006/25/EC (artificial optical radiation), Annex II, Table 2.2: C_A and C_C.
"""

from dataclasses import dataclass

import numpy as np

#: The editions the limits are taken from, as the reports name them.
EDITIONS = ("IEC 60825-1:2007 (Ed. 2), Tables 4, 6, 8 and 10",
            "IEC 60825-2:2004 (Ed. 3) with A1:2006 and A2:2010, hazard levels")

#: The band the limits here cover [m]: the near and short-wave infrared.
ASSESSED_BAND_M = (700e-9, 4000e-9)
#: Where the retina stops receiving the light and the cornea takes it [m].
RETINAL_BAND_END_M = 1400e-9
#: Class 3B limit for continuous emission [W] (Ed. 2 Table 8, from memory).
CLASS_3B_AEL_W = 0.5
#: Class 3R limit as a multiple of the Class 1 limit outside 400–700 nm (Ed. 2 Table 6, from memory).
CLASS_3R_FACTOR = 5.0


def _nm(wavelength_m):
    """λ in nm, to 1e-6 nm (the resolution wavelengths are written in), so a band edge written
    as ``1400 nm`` is 1400 exactly, not 1400.0000000000002."""
    return np.round(np.asarray(wavelength_m, dtype=float) * 1e9, 6)


def _in_band(wavelength_m):
    wavelength_nm = _nm(wavelength_m)
    low, high = (edge * 1e9 for edge in ASSESSED_BAND_M)
    return wavelength_nm, (wavelength_nm >= low) & (wavelength_nm <= high)


def correction_factor_c4(wavelength_m):
    """Correction factor C4 of IEC 60825-1 (ICNIRP's C_A).

    Parameters
    ----------
    wavelength_m : array_like
        Vacuum wavelength [m].

    Returns
    -------
    numpy.ndarray
        C4 = 10^(0.002(λ − 700)) for 700–1050 nm, 5 for 1050–1400 nm (λ in nm); NaN elsewhere
        (above 1400 nm the retina is not reached and C4 does not enter).

    References
    ----------
    .. [1] Directive 2006/25/EC, Annex II, Table 2.2 (C_A); IEC 60825-1:2007, Table 9.
    """
    wavelength_nm = _nm(wavelength_m)
    factor = np.where(wavelength_nm < 1050, 10.0 ** (0.002 * (wavelength_nm - 700)), 5.0)
    return np.where((wavelength_nm >= 700) & (wavelength_nm <= 1400), factor, np.nan)


def correction_factor_c7(wavelength_m):
    """Correction factor C7 of IEC 60825-1:2007 (ICNIRP's C_C).

    Returns
    -------
    numpy.ndarray
        C7 = 1 for 700–1150 nm, 10^(0.018(λ − 1150)) for 1150–1200 nm, 8 for 1200–1400 nm (λ in nm;
        the two ends meet: 10^0.9 = 7.94); NaN elsewhere.

    References
    ----------
    .. [1] Directive 2006/25/EC, Annex II, Table 2.2 (C_C); IEC 60825-1:2007, Table 9.
    """
    wavelength_nm = _nm(wavelength_m)
    factor = np.where(wavelength_nm < 1150, 1.0,
                      np.where(wavelength_nm < 1200, 10.0 ** (0.018 * (wavelength_nm - 1150)), 8.0))
    return np.where((wavelength_nm >= 700) & (wavelength_nm <= 1400), factor, np.nan)


def class1_ael_w(wavelength_m):
    """Class 1 accessible emission limit for continuous emission, small source [W].

    Returns
    -------
    numpy.ndarray
        3.9e-4·C4·C7 W for 700–1400 nm (retinal thermal, time base 100 s, C6 = 1);
        1.0e-2 W for 1400–4000 nm (exposure over 10 s; the cornea and lens absorb it); NaN outside
        700–4000 nm. At exactly 1400 nm the retinal formula holds (3.9e-4·5·8 = 15.6 mW).

    Notes
    -----
    IEC 60825-1:2007 Table 4 (from memory). Above 1400 nm the limit of 1.0e-2 W is where the
    short-exposure energy limit 1.8e-2·t^0.75 J reaches at t = 10 s (0.101 J in 10 s).
    """
    wavelength_nm, inside = _in_band(wavelength_m)
    retinal = 3.9e-4 * correction_factor_c4(wavelength_m) * correction_factor_c7(wavelength_m)
    limit = np.where(wavelength_nm <= RETINAL_BAND_END_M * 1e9, retinal, 1.0e-2)
    return np.where(inside, limit, np.nan)


def class3r_ael_w(wavelength_m):
    """Class 3R accessible emission limit for continuous emission outside 400–700 nm [W]:
    5 × the Class 1 limit (IEC 60825-1:2007 Table 6, from memory); NaN outside 700–4000 nm."""
    return CLASS_3R_FACTOR * class1_ael_w(wavelength_m)


def class3b_ael_w(wavelength_m):
    """Class 3B accessible emission limit for continuous emission [W]: 0.5 W from 315 nm to
    1 mm (IEC 60825-1:2007 Table 8, from memory); NaN outside 700–4000 nm, as for the others."""
    _, inside = _in_band(wavelength_m)
    return np.where(inside, CLASS_3B_AEL_W, np.nan)


@dataclass(frozen=True)
class MeasurementCondition:
    """A limiting aperture at a distance from the exposed face, as the classes are measured."""

    name: str
    aperture_diameter_m: float
    distance_m: float
    aperture_diameter_above_1400_m: float  # the limiting aperture beyond the retinal band


#: The measurement conditions of IEC 60825-1:2007, Table 10 (from memory).
MEASUREMENT_CONDITIONS = (
    MeasurementCondition("condition 1: 50 mm aperture at 2000 mm (telescope)", 50e-3, 2.0, 50e-3),
    MeasurementCondition("condition 2: 7 mm aperture at 14 mm (magnifier)", 7e-3, 14e-3, 7e-3),
    MeasurementCondition("condition 3: 7 mm aperture at 100 mm (unaided eye)", 7e-3, 100e-3, 3.5e-3),
)
#: The condition Class 1M is measured under (the unaided eye).
UNAIDED_EYE = MEASUREMENT_CONDITIONS[2]


def aperture_diameter_m(condition, wavelength_m):
    """The limiting aperture [m] of a :class:`MeasurementCondition` at each wavelength."""
    return np.where(_nm(wavelength_m) <= RETINAL_BAND_END_M * 1e9, condition.aperture_diameter_m,
                    condition.aperture_diameter_above_1400_m)


#: Hazard levels of IEC 60825-2 (the classes of IEC 60825-1) from the least to the most hazardous;
#: 2 and 2M exist only for visible light (400–700 nm), which is not assessed here.
HAZARD_LEVELS = ("1", "1M", "2", "2M", "3R", "3B", "4")


def hazard_level(class1_ratio_all, class1_ratio_unaided, class3b_ratio_aided, class3r_ratio_all,
                 class3b_ratio_all):
    """The hazard level (a name of :data:`HAZARD_LEVELS`) from the accessible emission as
    fractions of each limit, summed over the wavelengths that act together.

    Parameters
    ----------
    class1_ratio_all : float
        Σ AE/AEL(Class 1) under the most restrictive of the measurement conditions.
    class1_ratio_unaided : float
        The same under condition 3 (the unaided eye) alone.
    class3b_ratio_aided : float
        Σ AE/AEL(Class 3B) under conditions 1 and 2 (the more restrictive).
    class3r_ratio_all, class3b_ratio_all : float
        Σ AE/AEL of Class 3R and 3B, most restrictive condition.

    Notes
    -----
    Level 1: every condition within Class 1. Level 1M: condition 3 within Class 1, conditions
    1 and 2 within Class 3B. Else 3R, 3B within their limits, else 4 (IEC 60825-1:2007 clause 8,
    from memory). A ratio ≤ 1 is within the limit. The ratios may be arrays (one level each).

    Returns
    -------
    numpy.ndarray of str
        The levels, of the ratios' shape (a 0-d array for scalars).
    """
    ratios = [np.asarray(value, dtype=float) for value in (class1_ratio_all, class1_ratio_unaided,
                                                             class3b_ratio_aided, class3r_ratio_all, class3b_ratio_all)]
    all1, unaided1, aided3b, all3r, all3b = ratios
    return np.select([all1 <= 1, (unaided1 <= 1) & (aided3b <= 1), all3r <= 1, all3b <= 1], ["1", "1M", "3R", "3B"],
                     default="4")
