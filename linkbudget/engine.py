"""The budget engine: the chain of segment losses over the wavelength axis, for every case.

For each budget case (``typ``, ``worst``, ``best``) the engine takes the source power at
that case's end, the loss of every row (segment) at the same case, and forms the cumulative
loss, the power after each row, the received power and the margin

    margin = received power − receiver sensitivity   [dB],

which must be at least the required margin at every wavelength in the worst case for the link
to close. The best case (max launch, every loss at its low end) must stay at or below the
receiver's overload.
"""

from dataclasses import dataclass, field
from functools import cached_property

import numpy as np

from linkbudget.cautions import CAUTIONS
from linkbudget.config.fields import CASES


@dataclass(frozen=True)
class Row:
    """One line of the budget: a segment (or, later, an interface) and its loss per case."""

    name: str
    kind: str
    loss_db: dict  # case -> ndarray (n_wavelengths,)
    detail: dict = field(default_factory=dict)


@dataclass(frozen=True)
class LinkResult:
    """An evaluated link. Arrays run over :attr:`wavelength_m`; dicts are keyed by case."""

    title: str
    file: str
    wavelength_m: np.ndarray
    rows: tuple
    source_dbm: dict
    sensitivity_dbm: float
    overload_dbm: float | None
    required_margin_db: float
    cautions: tuple = CAUTIONS

    @cached_property
    def loss_db(self):
        """case -> loss of every row, shape (n_rows, n_wavelengths)."""
        return {case: np.array([row.loss_db[case] for row in self.rows]) for case in CASES}

    @cached_property
    def cumulative_loss_db(self):
        """case -> cumulative loss after every row, shape (n_rows, n_wavelengths)."""
        return {case: np.cumsum(losses, axis=0) for case, losses in self.loss_db.items()}

    @cached_property
    def power_after_dbm(self):
        """case -> power after every row [dBm], shape (n_rows, n_wavelengths)."""
        return {case: self.source_dbm[case] - cumulative
                for case, cumulative in self.cumulative_loss_db.items()}

    @cached_property
    def received_dbm(self):
        """case -> power at the receiver [dBm] over the wavelengths."""
        return {case: powers[-1] for case, powers in self.power_after_dbm.items()}

    @cached_property
    def margin_db(self):
        """case -> received power minus sensitivity [dB]."""
        return {case: received - self.sensitivity_dbm for case, received in self.received_dbm.items()}

    @property
    def margin_ok(self):
        """The worst-case margin meets the required margin at every wavelength."""
        return bool(np.all(self.margin_db["worst"] >= self.required_margin_db))

    @property
    def overload_ok(self):
        """The best-case received power stays at or below the overload (if one is given)."""
        return self.overload_dbm is None or bool(np.all(self.received_dbm["best"] <= self.overload_dbm))

    @property
    def closes(self):
        return self.margin_ok and self.overload_ok

    @property
    def governing_index(self):
        """Index of the wavelength with the smallest worst-case margin."""
        return int(np.argmin(self.margin_db["worst"]))

    def to_dict(self):
        """The versioned JSON result (see :mod:`linkbudget.report.json`)."""
        from linkbudget.report.json import result_dict

        return result_dict(self)


def segment_rows(segments, wavelength_m):
    """One :class:`Row` per segment with its loss in every case."""
    return tuple(
        Row(segment.name, segment.kind, {case: segment.loss_db(wavelength_m, case) for case in CASES})
        for segment in segments
    )


def evaluate(link, *, required_margin_db=None):
    """Evaluate a validated link over its wavelength axis.

    Parameters
    ----------
    link : linkbudget.config.Link
        A loaded link.
    required_margin_db : float, optional
        Override the receiver's ``required_margin`` (the CI gate's ``--min-margin``).

    Returns
    -------
    LinkResult
    """
    spec = link.spec
    wavelength_m = spec.wavelengths_m()
    power = spec.source.power
    source_dbm = {case: np.full(wavelength_m.shape, power.at(case, larger_hurts=False)) for case in CASES}
    receiver = spec.receiver
    return LinkResult(
        title=spec.title,
        file=link.file,
        wavelength_m=wavelength_m,
        rows=segment_rows(link.segments, wavelength_m),
        source_dbm=source_dbm,
        sensitivity_dbm=receiver.sensitivity,
        overload_dbm=receiver.overload,
        required_margin_db=receiver.required_margin if required_margin_db is None else required_margin_db,
    )
