"""How every input error is written: ``FILE:LINE:COL: key.path: message`` and a hint line.

Kept free of imports so the command line can use it without loading the config machinery.
"""


def format_hint(hint):
    """The hint line that follows an error message (empty without a hint)."""
    return "" if hint is None else f"\n  hint: {hint}"
