"""The back-reflection budget: how much of the launched light returns toward the source.

Every row that sends light back toward the source (a connector's datasheet return loss, a bare
face's Fresnel reflectance, a coating's reflectance) contributes its reflectance attenuated by the
round trip to it and back:

    B = Σ_k R_k·T_k²,   T_k = 10^(−L_k/10),

where L_k is the loss of every row before row k, taken the same on the way back (the rows are
reciprocal: an isolator's backward isolation is not modelled), and R_k = Σ_pol share_pol·R_pol the
reflectance the light reaching the row meets, per polarization. The reflections are summed
incoherently (their phases are taken as random: a source whose coherence length spans two
reflectors can see more, or less, through interference). The back reflection in dB is
10·log10(B) (negative), its optical return loss −10·log10(B).

The typical figure takes every loss and reflectance at its typical value; the worst case for the
source takes the lowest losses (the budget's best case) and each return loss at the low end of its
spread (the highest reflectance). A face at an angle reflects its light off the axis; it is still
counted here, as if it returned, which bounds its contribution from above.

References
----------
.. [1] IEC 61300-3-6, Fibre optic interconnecting devices and passive components – Basic test and
   measurement procedures – Part 3-6: Return loss measurements (the definition of return loss as
   −10·log10 of the returned power ratio; from memory).
"""

from dataclasses import dataclass

import numpy as np

from linkbudget.physics.decibel import transmittance_from_loss_db
from linkbudget.segments.rows import POLARIZATIONS

#: The two figures of the budget: name -> (the budget case whose losses it takes, whether a
#: spread's highest reflectance is taken).
FIGURES = {"typ": ("typ", False), "worst": ("best", True)}


@dataclass(frozen=True)
class Reflection:
    """One row's contribution: figure name -> polarization -> R·T² over the wavelength axis."""

    row_id: str
    row_index: int
    reflectance: dict  # figure name -> polarization -> the row's reflectance
    contribution: dict  # figure name -> polarization -> share·R·T² over the wavelength axis

    def total(self, figure):
        return sum(self.contribution[figure][pol] for pol in POLARIZATIONS)


def round_trip_transmittance(cumulative_loss_db, index):
    """T² of the rows before row ``index``: the light goes there and back through the same loss."""
    if index == 0:
        return np.ones(np.shape(cumulative_loss_db[0]))
    return transmittance_from_loss_db(2.0 * np.asarray(cumulative_loss_db[index - 1], dtype=float))


def reflections(result):
    """The :class:`Reflection` of every row that reflects toward the source, in chain order."""
    found = []
    for index, row in enumerate(result.rows):
        if row.reflectance is None:
            continue
        share = row.polarization_share or {pol: 0.5 for pol in POLARIZATIONS}
        reflectance, contribution = {}, {}
        for figure, (case, highest) in FIGURES.items():
            trip = round_trip_transmittance(result.cumulative_loss_db[case], index)
            reflected = row.reflectance_high if highest and row.reflectance_high is not None else row.reflectance
            reflectance[figure] = reflected
            with np.errstate(invalid="ignore"):
                contribution[figure] = {pol: np.nan_to_num(share[pol] * np.asarray(reflected[pol]) * trip)
                                        for pol in POLARIZATIONS}
        found.append(Reflection(row.id, index, reflectance, contribution))
    return tuple(found)


@dataclass(frozen=True)
class BackReflection:
    """The back-reflection budget of a link: its :class:`Reflection` s and the source's tolerance."""

    reflections: tuple
    tolerance_db: float | None
    wavelength_count: int

    def total(self, figure):
        """B over the wavelength axis (0 where nothing reflects)."""
        return sum((item.total(figure) for item in self.reflections), np.zeros(self.wavelength_count))

    def level_db(self, figure):
        """10·log10(B) [dB] over the wavelength axis; −inf where nothing reflects."""
        with np.errstate(divide="ignore"):
            return 10.0 * np.log10(self.total(figure))

    def largest(self, figure="worst"):
        """The reflection that returns most at any wavelength, or ``None``."""
        if not self.reflections:
            return None
        return max(self.reflections, key=lambda item: float(np.max(item.total(figure))))

    @property
    def tolerated(self):
        """The worst case stays at or below the source's tolerance at every wavelength (``True``
        without a tolerance)."""
        return self.tolerance_db is None or bool(np.all(self.level_db("worst") <= self.tolerance_db))


def back_reflection(result, tolerance_db=None):
    """The :class:`BackReflection` of an evaluated link, against ``tolerance_db`` (the source's
    ``max_back_reflection``) if given."""
    return BackReflection(reflections(result), tolerance_db, result.wavelength_m.size)
