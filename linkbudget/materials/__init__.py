"""Material dispersion models and the shipped catalog of optical constants."""
