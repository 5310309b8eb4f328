"""Argument checks shared by the physics models: impossible input raises ``ValueError``."""

import numpy as np


def positive(values, name):
    """``values`` as a float array, or ``ValueError`` if any is NaN or ≤ 0."""
    array = np.asarray(values, dtype=float)
    if np.any(np.isnan(array)) or np.any(array <= 0):
        raise ValueError(f"{name} must be > 0, got {array.min() if array.size else array!r}")
    return array


def non_negative(values, name):
    """``values`` as a float array, or ``ValueError`` if any is NaN or < 0."""
    array = np.asarray(values, dtype=float)
    if np.any(np.isnan(array)) or np.any(array < 0):
        raise ValueError(f"{name} must be >= 0, got {array.min() if array.size else array!r}")
    return array


def finite(values, name):
    """``values`` as a float array, or ``ValueError`` if any is not finite."""
    array = np.asarray(values, dtype=float)
    if not np.all(np.isfinite(array)):
        raise ValueError(f"{name} must be finite")
    return array
