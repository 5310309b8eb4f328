"""Reading rows of the JSON result in tests."""

import numpy as np


def seen(entry, key="reflectance"):
    """A row's per-polarization value (``reflectance``, ``absorptance``) weighted by the power
    shares of the light reaching it (``polarization_share``; unpolarized when the row has none)."""
    share = entry.get("polarization_share", {"s": [0.5], "p": [0.5]})
    return np.asarray(share["s"]) * np.asarray(entry[key]["s"]) + np.asarray(share["p"]) * np.asarray(entry[key]["p"])
