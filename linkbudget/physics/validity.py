"""Warnings raised when a model is used outside its stated validity range."""

import numpy as np


def span_text(values, digits=4, unit=""):
    """``values`` for a note: one value ("3.648") or their range ("from 1.1 to 3.6"), with units."""
    low, high = (f"{v:.{digits}g}{unit}" for v in (np.min(values), np.max(values)))
    return low if low == high else f"from {low} to {high}"


class ValidityWarning(UserWarning):
    """A model was evaluated outside the range its source states it is accurate in.

    Impossible input raises ``ValueError``; input that is possible but outside a model's
    validity range only warns with this class, so callers can collect and report it.
    """
