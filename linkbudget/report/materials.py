"""Terminal tables for the material catalog and for one material's constants at a wavelength."""

from rich import box
from rich.table import Table

from linkbudget.text import length_text


def catalog_table(materials):
    """Every material with its range, description and source (two lines each)."""
    table = Table(title="Material catalog", title_justify="left", box=box.SIMPLE_HEAD, show_header=True)
    table.add_column("name", no_wrap=True)
    table.add_column("range", no_wrap=True)
    table.add_column("description and source")
    for material in materials:
        low, high = material.valid_range_m
        table.add_row(material.name, f"{length_text(low)} – {length_text(high)}",
                      f"{material.description}\n[dim]{material.source}[/dim]", end_section=True)
    return table


def constants_table(material, wavelength_m):
    """n, κ, the intensity attenuation coefficient α and the loss per mm at each wavelength
    (:meth:`linkbudget.materials.library.Material.constants`)."""
    constants = material.constants(wavelength_m)
    table = Table(title=f"{material.name}: {material.description}", title_justify="left", box=box.SIMPLE_HEAD,
                  caption=f"source: {material.source}", caption_justify="left")
    for header in ("wavelength", "n", "κ", "α (1/cm)", "loss (dB/mm)"):
        table.add_column(header, justify="right", no_wrap=True)
    for wavelength, index, alpha_per_m, loss_db in zip(constants.wavelength_m, constants.index,
                                                       constants.absorption_per_m, constants.loss_db_per_mm,
                                                       strict=True):
        table.add_row(f"{wavelength * 1e9:.6g} nm", f"{index.real:.6f}", f"{index.imag:.4e}",
                      f"{alpha_per_m / 100:.4g}", f"{loss_db:.4g}")
    return table
