"""Material dispersion models and the shipped catalog of optical constants."""

from linkbudget.materials.dispersion import MaterialRangeError
from linkbudget.materials.library import (
    Material,
    MaterialError,
    MaterialFileError,
    catalog_names,
    load_material,
)

__all__ = ["Material", "MaterialError", "MaterialFileError", "MaterialRangeError", "catalog_names", "load_material"]
