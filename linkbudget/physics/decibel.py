"""Decibel, neper and linear power-ratio conversions, in one place.

Sign convention (stated once for the whole package): a loss in dB is positive when power is
lost, ``loss_db = -10·log10(T)`` for a power transmittance ``T``; a gain is a negative loss.

References
----------
.. [1] IEC 60027-3:2002, "Letter symbols to be used in electrical technology - Part 3:
   Logarithmic and related quantities, and their units" (definitions of the decibel and neper).
"""

import numpy as np

#: dB per neper of power attenuation coefficient: 10·log10(e) = 4.342944819...
DB_PER_NEPER = 10.0 * np.log10(np.e)


def loss_db_from_transmittance(transmittance):
    """Loss in dB of a power transmittance, ``-10·log10(T)``.

    Parameters
    ----------
    transmittance : array_like
        Power transmittance T in [0, 1] (values above 1 are gains). [1]

    Returns
    -------
    numpy.ndarray
        Loss in dB; ``inf`` where T = 0.
    """
    with np.errstate(divide="ignore"):
        return -10.0 * np.log10(np.asarray(transmittance, dtype=float))


def transmittance_from_loss_db(loss_db):
    """Power transmittance of a loss in dB, ``10**(-loss/10)``."""
    return 10.0 ** (-np.asarray(loss_db, dtype=float) / 10.0)


def dbm_from_watt(power_w):
    """Power in dBm of a power in watts, ``10·log10(P / 1 mW)``; ``-inf`` at 0 W."""
    with np.errstate(divide="ignore"):
        return 10.0 * np.log10(np.asarray(power_w, dtype=float) / 1e-3)
