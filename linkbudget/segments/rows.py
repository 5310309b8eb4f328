"""Budget rows: what one line of the budget records, as typed fields every report reads.

A row is a segment's own (``segment``), or one the engine inserts between two media: a bare
``interface``, or the sum of the ``reflections`` between a medium's two faces; a coating's row is
a ``coating``. Inserted rows are named, and identified, by the segments they sit between, so a
row keeps its identifier when a segment is added elsewhere in the chain.
"""

from dataclasses import dataclass, field

import numpy as np

from linkbudget.physics.decibel import loss_db_from_transmittance
from linkbudget.physics.fresnel import LINEAR_POLARIZATIONS

#: The kinds of row.
ROW_KINDS = (SEGMENT_ROW, INTERFACE_ROW, COATING_ROW, REFLECTIONS_ROW) = ("segment", "interface", "coating",
                                                                         "reflections")
#: The linear polarizations whose powers are followed separately through every face.
POLARIZATIONS = LINEAR_POLARIZATIONS


@dataclass(frozen=True)
class PartOrigin:
    """The part of a parts library a segment was made from: its ``name`` and the ``file`` defining it."""

    name: str
    file: str


@dataclass(frozen=True)
class Row:
    """One line of the budget.

    Attributes
    ----------
    id : str
        Stable identifier: a segment's name; an inserted row's name, made of the names of the
        segments it sits between.
    name : str
        Shown name (today the identifier itself).
    kind : str
        One of :data:`ROW_KINDS`.
    origin : tuple of str
        The segment it came from, or the pair of segments an inserted row sits between (one name
        for the faces of a window standing in air).
    loss_db : dict
        case name -> loss [dB] array over the wavelength axis.
    segment_kind : str or None
        The kind of the segment a ``segment`` or ``coating`` row came from.
    reflectance : dict or None
        polarization (:data:`POLARIZATIONS`) -> fraction of the power reaching the row that it
        sends back toward the source: a face's or coating's, or a connector's return loss.
    reflectance_high : dict or None
        polarization -> the highest reflectance the row's spread allows (a connector's return loss
        at its low end), where it differs from ``reflectance``.
    polarization_share : dict or None
        polarization -> power share of the light reaching the row (the typical case), where the
        row's loss depends on polarization.
    absorptance : dict or None
        polarization -> fraction absorbed (a coating).
    transmittance : dict or None
        polarization -> the row's power transmittance (its factor, for a multiple-reflection sum;
        the typical case), where it depends on polarization: a face, a coating.
    loss_parts_db : dict
        part -> case name -> array: the named parts the loss is the sum of (may be empty).
    geometric_estimate_db : dict or None
        case name -> array: a joint's loss from its geometry, shown beside its datasheet loss.
    facts : tuple of str
        Short facts the reports show beside the row (a port followed, the user's note).
    notes : tuple of str
        Validity notes of the models this row used.
    part : PartOrigin or None
        The part a segment's or coating's row was made from (:mod:`linkbudget.config.parts`).
    """

    id: str
    kind: str
    origin: tuple
    loss_db: dict
    segment_kind: str | None = None
    reflectance: dict | None = None
    reflectance_high: dict | None = None
    polarization_share: dict | None = None
    absorptance: dict | None = None
    transmittance: dict | None = None
    loss_parts_db: dict = field(default_factory=dict)
    geometric_estimate_db: dict | None = None
    facts: tuple = ()
    notes: tuple = ()
    part: PartOrigin | None = None

    @property
    def name(self):
        return self.id

    @property
    def shown_kind(self):
        """What a report's kind column says: the segment's kind, else the row's."""
        return self.segment_kind or self.kind

    def seen(self, per_polarization):
        """A per-polarization value weighted by the light's shares (unpolarized without them)."""
        share = self.polarization_share or {pol: 0.5 for pol in POLARIZATIONS}
        return sum(share[pol] * np.asarray(per_polarization[pol], dtype=float) for pol in POLARIZATIONS)

    @property
    def reflectance_seen(self):
        """The reflectance the light reaching the row meets (:meth:`seen`), or ``None``."""
        return None if self.reflectance is None else self.seen(self.reflectance)

    @property
    def absorptance_seen(self):
        """The absorptance the light reaching the row meets (:meth:`seen`), or ``None``."""
        return None if self.absorptance is None else self.seen(self.absorptance)

    @property
    def return_loss_db(self):
        """The reflectance toward the source as a return loss [dB] (−10·log10 R), or ``None``."""
        return None if self.reflectance is None else loss_db_from_transmittance(self.reflectance_seen)


def segment_row(segment, losses, **typed):
    """The ``segment`` row of a segment (its name, kind and origin) with ``losses`` per case."""
    return Row(segment.name, SEGMENT_ROW, (segment.name,), losses, segment_kind=segment.kind,
               part=segment.part_origin, **typed)
