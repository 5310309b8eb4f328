"""What every segment kind shares: its name and kind keys, and the evaluation contract."""

from dataclasses import dataclass, field
from typing import ClassVar, Literal

import numpy as np

from linkbudget.config.fields import CASES, InputProblem, Strict, spread
from linkbudget.config.ranges import RANGES, mode_size_problem
from linkbudget.segments.coupling import TILT_DIRECTION_COSINES

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
    return np.full(np.shape(wavelength_m), value_db, dtype=float)


#: The ends of a spread a mode's size is evaluated at (a joint's worst case searches them).
SPREAD_ENDS = ("low", "typ", "high")


@dataclass(frozen=True)
class Row:
    """One line of the budget: a segment, interface or coating, its loss per case and details."""

    name: str
    kind: str
    loss_db: dict  # case -> ndarray (n_wavelengths,)
    detail: dict = field(default_factory=dict)


@dataclass(frozen=True)
class Mode:
    """Mode-field radii (1/e² intensity, half the mode field diameter) of a guided mode [m].

    Each attribute maps a spread end (:data:`SPREAD_ENDS`) to an array over the wavelength
    axis; a circular mode has equal x and y radii.
    """

    radius_x_m: dict
    radius_y_m: dict

    @classmethod
    def circular(cls, radius_m):
        """A circular mode from end -> radius arrays."""
        return cls(radius_m, radius_m)

    @classmethod
    def from_spread(cls, diameter_x, diameter_y, wavelength_m):
        """A mode from mode-field-diameter spreads (constant over the wavelength axis)."""
        def radii(spread):
            values = {"low": spread.low, "typ": spread.typ_value, "high": spread.high}
            return {end: np.full(np.shape(wavelength_m), value / 2) for end, value in values.items()}

        return cls(radii(diameter_x), radii(diameter_y))


class SegmentSpec(Strict):
    """A link segment as written in the ``chain`` list.

    Subclasses set ``kind`` to a ``Literal`` of their kind name, add their own keys, and
    implement :meth:`loss_db`.
    """

    name: str | None = None

    #: How the engine treats a segment that carries no medium: a joint or an element passes the
    #: light on between the media on either side (``passes_faces``); anything else (a fibre or
    #: waveguide without an index, a splitter) guides it and ends the run of faces.
    passes_faces: ClassVar[bool] = False
    #: The segment is a joint whose ``joint_type`` sets the faces between the media around it.
    sets_joint: ClassVar[bool] = False
    #: The segment is a coating on the face between its neighbours.
    is_coating: ClassVar[bool] = False
    #: A tilt of the face before it carries on inside (a plate in contact: parallel faces).
    parallel_faces: ClassVar[bool] = False

    def resolve(self, wavelength_m, files):
        """Check what needs the wavelength axis or other files (materials); return the segment.

        ``files`` (:class:`linkbudget.paths.LinkFiles`) locates the files the link refers to.
        Raises :class:`InputProblem` for input the schema alone cannot judge.
        """
        return self

    def medium_index(self):
        """Complex index over the wavelength axis of the medium the segment carries, or ``None``."""
        return

    def mode(self, wavelength_m):
        """The guided mode the segment carries (fibre, waveguide) as a :class:`Mode`, or ``None``.

        Joints next to the segment couple to this mode.
        """
        return None

    def budget_row(self, wavelength_m, *, mode_before=None, mode_after=None):
        """The segment's :class:`Row`; ``mode_before``/``mode_after`` are the modes of its
        neighbours in the chain (joints and gaps couple to them)."""
        losses = {case: self.loss_db(wavelength_m, case) for case in CASES}
        return Row(self.name, self.kind, losses, self.row_detail(wavelength_m))

    def row_detail(self, wavelength_m):
        """Extra facts for the report: the parts of the loss per case, where a kind has parts."""
        parts = {case: self.loss_parts_db(wavelength_m, case) for case in CASES}
        if parts["typ"] is None:
            return {}
        return {"loss_parts_db": {part: {case: parts[case][part] for case in CASES} for part in parts["typ"]}}

    def loss_parts_db(self, wavelength_m, case):
        """The loss split into named parts (part -> array), or ``None`` for a single-part loss."""
        return None

    def loss_db(self, wavelength_m, case):
        """Loss of the segment in dB over the wavelength axis for a budget case.

        Parameters
        ----------
        wavelength_m : numpy.ndarray
            Vacuum wavelengths [m], shape (n_wavelengths,).
        case : str
            One of :data:`linkbudget.config.fields.CASES`.

        Returns
        -------
        numpy.ndarray
            Loss [dB] of shape (n_wavelengths,), positive when power is lost.
        """
        raise NotImplementedError
