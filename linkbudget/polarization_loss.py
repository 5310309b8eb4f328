"""Polarization-dependent loss (PDL): the loss of s and of p light, row by row and for the link.

A face or a coating at oblique incidence transmits s and p light differently; the engine records
each such row's power transmittance per polarization (:attr:`Row.transmittance`, a multiple-
reflection sum's factor included). For s light alone the row loses L_s = −10·log10(T_s), for p
light L_p = −10·log10(T_p), and its PDL is |L_s − L_p|. The faces share one plane of incidence
(the engine follows s and p through all of them), so for the link the losses of pure s and pure p
light add row by row: the link loses its typical loss with each such row's loss replaced by L_s
(or L_p), and its PDL is the difference of the two. Every other row is taken to lose the same for
both (datasheet losses, fibre, bulk media at the same path length for s and p).
"""

from dataclasses import dataclass

import numpy as np

from linkbudget.physics.decibel import loss_db_from_transmittance
from linkbudget.segments.rows import POLARIZATIONS

#: Below this difference [dB] a row is taken to lose the same for s and p (round-off of 1 − R).
PDL_FLOOR_DB = 1e-9


@dataclass(frozen=True)
class RowPolarizationLoss:
    """One row's loss for s and for p light [dB] over the wavelength axis."""

    row_id: str
    row_index: int
    loss_db: dict  # polarization -> array

    @property
    def pdl_db(self):
        return np.abs(self.loss_db["s"] - self.loss_db["p"])


@dataclass(frozen=True)
class PolarizationLoss:
    """The rows whose loss depends on polarization and the link's loss for s and p light."""

    rows: tuple
    link_loss_db: dict  # polarization -> array over the wavelength axis

    @property
    def link_pdl_db(self):
        with np.errstate(invalid="ignore"):
            return np.abs(self.link_loss_db["s"] - self.link_loss_db["p"])


def row_losses_db(row):
    """polarization -> the row's loss [dB] for light of that polarization alone, where the two
    differ by more than :data:`PDL_FLOOR_DB` at some wavelength; else ``None``."""
    if row.transmittance is None:
        return None
    losses = {pol: loss_db_from_transmittance(np.asarray(row.transmittance[pol], dtype=float))
              for pol in POLARIZATIONS}
    with np.errstate(invalid="ignore"):
        differs = np.abs(losses["s"] - losses["p"])
    if np.any(differs > PDL_FLOOR_DB) or np.any(np.isinf(losses["s"]) != np.isinf(losses["p"])):
        return losses
    return None


def polarization_loss(result):
    """The :class:`PolarizationLoss` of an evaluated link (typical case)."""
    found = [RowPolarizationLoss(row.id, index, losses) for index, row in enumerate(result.rows)
             if (losses := row_losses_db(row)) is not None]
    total = result.cumulative_loss_db["typ"][-1]
    own = sum((result.loss_db["typ"][item.row_index] for item in found), np.zeros(total.shape))
    with np.errstate(invalid="ignore"):
        link = {pol: total - own + sum((item.loss_db[pol] for item in found), np.zeros(total.shape))
                for pol in POLARIZATIONS}
    return PolarizationLoss(tuple(found), link)
