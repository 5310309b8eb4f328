"""Power division in passive splitters and taps (ideal, lossless devices).

An ideal lossless 1×N splitter shares the input power equally, so each output port carries 1/N
of it; a tap of split ratio r sends the fraction r to the port being followed. Excess loss of a
real device comes on top and is a datasheet value, not modelled here.

References
----------
.. [1] G. Keiser, "Optical Fiber Communications", McGraw-Hill (the chapter on couplers and
   star couplers: splitting loss 10·log10 N; edition and chapter from memory).
"""

import numpy as np

from linkbudget.physics.decibel import loss_db_from_transmittance


def ideal_split_loss_db(ports):
    """Splitting loss of an ideal lossless 1×N splitter, 10·log10(N).

    Parameters
    ----------
    ports : array_like of int
        Number of output ports N (integer ≥ 1).

    Returns
    -------
    numpy.ndarray
        Loss [dB] from the input to any one output port.

    References
    ----------
    .. [1] G. Keiser, "Optical Fiber Communications", McGraw-Hill (from memory).
    """
    ports = np.asarray(ports)
    if ports.dtype == bool or not np.issubdtype(ports.dtype, np.number):
        raise ValueError("number of ports must be an integer >= 1")
    if np.any(~np.isfinite(ports)) or np.any(ports < 1) or np.any(ports != np.round(ports)):
        raise ValueError(f"number of ports must be an integer >= 1, got {ports!r}")
    return 10.0 * np.log10(ports.astype(float))


def tap_loss_db(ratio):
    """Loss to the followed port of a tap that sends it the power fraction ``ratio``.

    Parameters
    ----------
    ratio : array_like
        Fraction of the input power reaching the followed port, 0 < ratio ≤ 1 (0.98 for the
        through port of a 2/98 tap, 0.02 for its tap port).

    Returns
    -------
    numpy.ndarray
        Loss [dB], −10·log10(ratio).

    References
    ----------
    .. [1] G. Keiser, "Optical Fiber Communications", McGraw-Hill (from memory).
    """
    ratio = np.asarray(ratio, dtype=float)
    if np.any(np.isnan(ratio)) or np.any(ratio <= 0) or np.any(ratio > 1):
        raise ValueError("a tap ratio is a power fraction with 0 < ratio <= 1")
    return loss_db_from_transmittance(ratio)
