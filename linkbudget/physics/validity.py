"""Warnings raised when a model is used outside its stated validity range."""


class ValidityWarning(UserWarning):
    """A model was evaluated outside the range its source states it is accurate in.

    Impossible input raises ``ValueError``; input that is possible but outside a model's
    validity range only warns with this class, so callers can collect and report it.
    """
