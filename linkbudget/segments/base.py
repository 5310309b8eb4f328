"""What every segment kind shares: its name and kind keys, its modes, and the evaluation contract."""

from collections.abc import Callable
from dataclasses import dataclass
from typing import Literal

import numpy as np
from pydantic import Field

from linkbudget.config.fields import InputProblem, SpreadBase, Strict, range_notes, spread
from linkbudget.config.ranges import RANGES, mode_size_problem
from linkbudget.segments.coupling import TILT_DIRECTION_COSINES
from linkbudget.segments.roles import GUIDES
from linkbudget.segments.rows import segment_row

#: The spread types the segment kinds share (one definition each), by their valid range.
JointLossSpread = spread("ratio", bounds=RANGES["joint loss"])
ExcessLossSpread = spread("ratio", bounds=RANGES["excess loss"])
ElementLossSpread = spread("ratio", bounds=RANGES["element loss"])
TiltSpread = spread("angle", bounds=RANGES["tilt"])
OffsetSpread = spread("length", bounds=RANGES["offset"])
ModeFieldDiameterSpread = spread("length", bounds=RANGES["mode field diameter"])
AbsorptionSpread = spread("absorption", bounds=RANGES["absorption coefficient"])
BulkAttenuationSpread = spread("attenuation", bounds=RANGES["bulk attenuation"])
KappaSpread = spread("number", bounds=RANGES["extinction coefficient"])
#: Which way a joint's or gap's ``tilt`` turns the launched beam, relative to its ``offset``.
TiltDirection = Literal[tuple(TILT_DIRECTION_COSINES)]


def check_tilt_direction(spec):
    """Raise :class:`InputProblem` where ``tilt_direction`` is given without both a tilt and an
    offset to relate (it would change nothing)."""
    if spec.tilt_direction is not None and (spec.tilt is None or spec.offset is None):
        missing = "tilt" if spec.tilt is None else "offset"
        raise InputProblem(("tilt_direction",), f"tilt_direction says which way the tilt turns relative to "
                                                f"the offset; give the {missing} too")


def length_spread(what):
    """The spread type of a length whose valid range is ``RANGES[what]``."""
    return spread("length", bounds=RANGES[what])


def attenuation_spread(what):
    """The spread type of an attenuation whose valid range is ``RANGES[what]``."""
    return spread("attenuation", bounds=RANGES[what])


def check_mode_sizes(diameters, wavelength_m):
    """Raise :class:`InputProblem` at the first diameter spread (key path -> spread or ``None``)
    whose smallest value is too small a mode for the wavelength axis."""
    for key_path, diameter in diameters.items():
        message = None if diameter is None else mode_size_problem(diameter.low, wavelength_m)
        if message is not None:
            raise InputProblem(key_path, message)


def flat_over_wavelength(value_db, wavelength_m):
    """A value that is the same at every wavelength, as an array over the wavelength axis."""
    return np.asarray(value_db, dtype=float) * np.ones(np.shape(wavelength_m))  # draws: (n_draws, n_wavelengths)


@dataclass(frozen=True)
class ModeAxis:
    """One principal axis of a mode: its 1/e² radius [m] over the wavelength axis, as a function
    of one toleranced value (a mode field diameter, a beam's divergence), or fixed.

    ``radius_m(value)`` broadcasts a column of draws against the wavelength axis.
    """

    value: SpreadBase | None
    radius_m: Callable

    @classmethod
    def fixed(cls, radius_m):
        """An axis whose radius [m] (an array over the wavelength axis) has no tolerance."""
        return cls(None, lambda _: radius_m)

    def at(self, case):
        """The radius in ``case`` (nominal, or drawn); the corners search :meth:`ends`."""
        return self.radius_m(None if self.value is None else case.value(self.value))

    def ends(self):
        """(least, largest) radius over the value's range, elementwise over the wavelength axis."""
        if self.value is None:
            radius_m = self.radius_m(None)
            return radius_m, radius_m
        at_low, at_high = self.radius_m(self.value.low), self.radius_m(self.value.high)
        return np.minimum(at_low, at_high), np.maximum(at_low, at_high)


@dataclass(frozen=True)
class Mode:
    """A guided mode or a launched beam's waist: its two principal axes (:class:`ModeAxis`).

    A circular mode has one axis for both (one toleranced value: its draws are shared).
    """

    x: ModeAxis
    y: ModeAxis

    @classmethod
    def circular(cls, axis):
        return cls(axis, axis)

    @classmethod
    def from_diameters(cls, diameter_x, diameter_y, wavelength_m):
        """A mode from mode-field-diameter spreads (constant over the wavelength axis)."""
        ones = np.ones(np.shape(wavelength_m))

        def axis(diameter):
            return ModeAxis(diameter, lambda value: value / 2 * ones)

        return cls.circular(axis(diameter_x)) if diameter_x is diameter_y else cls(axis(diameter_x), axis(diameter_y))


@dataclass(frozen=True)
class Around:
    """What a segment's row depends on beyond itself: the modes of its neighbours in the chain
    (joints and gaps couple to them) and the tangential index β = n0·sin θ0 of the light crossing
    it (0 at normal incidence; a tilted medium's path lengthens)."""

    mode_before: Mode | None = None
    mode_after: Mode | None = None
    tangential_index: np.ndarray | float = 0.0


#: A segment alone: no neighbours' modes, normal incidence.
NOTHING_AROUND = Around()


@dataclass(frozen=True)
class Place:
    """Where a segment stands in the chain, for its :meth:`SegmentSpec.placement_problem`."""

    wavelength_m: np.ndarray
    medium_before: bool  # the segment just before it carries a medium
    medium_after: bool  # the segment just after it carries a medium
    medium_upstream: bool  # any segment before it carries a medium
    mode_before: Mode | None
    mode_after: Mode | None


class SegmentSpec(Strict):
    """A link segment as written in the ``chain`` list.

    Subclasses set ``kind`` to a ``Literal`` of their kind name, add their own keys, and
    implement :meth:`loss_db` (or :meth:`budget_row`) and :meth:`role`. The engine asks a segment
    only what this class declares.
    """

    name: str | None = Field(None, description="Name of the segment, unique in the chain; default: its kind and place.")

    def resolve(self, wavelength_m, files):
        """Check what needs the wavelength axis or other files (materials); return the resolved
        segment, a new object (this one, read from the file, is never changed).

        ``files`` (:class:`linkbudget.reader.LinkFiles`) reads the files the link refers to.
        Raises :class:`InputProblem` for input the schema alone cannot judge.
        """
        return self

    def _resolved(self, **private):
        """A copy of this segment holding the values resolution found (private attributes)."""
        copy = self.model_copy()
        copy.__pydantic_private__ = {**(copy.__pydantic_private__ or {}), **private}
        return copy

    def role(self):
        """What the segment does to the faces of the chain (:mod:`linkbudget.segments.roles`);
        by default it guides the light, ending a run of faces."""
        return GUIDES

    def input_notes(self):
        """Notes on possible but unusual input (:func:`~linkbudget.config.fields.range_notes`)."""
        return range_notes(self)

    def mode(self, wavelength_m):
        """The guided mode the segment carries (fibre, waveguide) as a :class:`Mode`, or ``None``.

        Joints next to the segment couple to this mode.
        """
        return None

    def placement_problem(self, place):
        """An :class:`InputProblem` where the segment cannot stand at ``place`` (a :class:`Place`),
        or ``None``."""
        return None

    def budget_row(self, wavelength_m, cases, around):
        """The segment's :class:`~linkbudget.segments.rows.Row` for each of ``cases``
        (:mod:`linkbudget.segments.cases`), given what lies ``around`` it (:class:`Around`)."""
        parts = [self.loss_parts_db(wavelength_m, case) for case in cases]
        losses = {case.name: self.loss_db(wavelength_m, case, around) if case_parts is None
                  else sum(case_parts.values()) for case, case_parts in zip(cases, parts, strict=True)}
        return segment_row(self, losses, loss_parts_db=by_part(cases, parts), facts=self.row_facts())

    def row_facts(self):
        """Short facts a report shows beside the row (a port followed, the user's note)."""
        return ()

    def loss_parts_db(self, wavelength_m, case):
        """The loss split into named parts (part -> array), or ``None`` for a single-part loss."""
        return None

    def loss_db(self, wavelength_m, case, around=NOTHING_AROUND):
        """Loss of the segment in dB over the wavelength axis for a budget case.

        Parameters
        ----------
        wavelength_m : numpy.ndarray
            Vacuum wavelengths [m], shape (n_wavelengths,).
        case : Corner or Draws
            What every spread's value is (:mod:`linkbudget.segments.cases`).
        around : Around
            The segment's neighbours' modes and the light's tangential index.

        Returns
        -------
        numpy.ndarray
            Loss [dB] of shape (n_wavelengths,) (or (n_draws, n_wavelengths) for draws), positive
            when power is lost.
        """
        raise NotImplementedError


def by_part(cases, parts):
    """part -> case name -> array, from one ``{part: array}`` (or ``None``) per case."""
    if parts[0] is None:
        return {}
    return {part: {case.name: values[part] for case, values in zip(cases, parts, strict=True)} for part in parts[0]}
