"""Rules on the order of segments that no single segment can check."""

import warnings

from linkbudget.config.fields import InputProblem
from linkbudget.physics.validity import ValidityWarning


def _segment_problem(segments, position, carries, modes, wavelength_m):
    segment = segments[position]
    mode_before = modes[position - 1] if position else None
    mode_after = modes[position + 1] if position + 1 < len(segments) else None
    if segment.is_coating:
        if not (position and carries[position - 1] and position + 1 < len(segments) and carries[position + 1]):
            return InputProblem(("kind",), "a coating sits directly between two segments that carry a medium",
                                "give the neighbours an index or material, e.g. a gap (air) before a coated window")
    elif getattr(segment, "angle", None) is not None and not any(carries[:position]):
        return InputProblem(("angle",), "an angle of incidence needs a medium before this segment to be measured in")
    if getattr(segment, "geometric", False):
        for side, mode in zip(("before", "after"), segment.side_modes(wavelength_m, mode_before, mode_after),
                              strict=True):
            if mode is None:
                return InputProblem((f"mode_field_diameter_{side}",),
                                    f"the joint's geometry needs the mode field diameter {side} it",
                                    f"give mode_field_diameter_{side}, or a neighbouring fiber or waveguide "
                                    "with mode_field_diameter (or core geometry)")
    if segment.kind == "gap":
        receives = segment.aperture is not None or mode_after is not None
        if segment.beam is not None and not receives:
            return InputProblem(("beam",), "a launched beam needs a receiving side",
                                "give the gap an aperture, or follow it with a fiber or waveguide that has a mode")
        if (segment.offset is not None or segment.tilt is not None) and not (
                receives and segment.launched_mode(wavelength_m, mode_before) is not None):
            return InputProblem(("offset" if segment.offset is not None else "tilt",),
                                "offset and tilt need a beam launched into the gap and a mode receiving it")
    return None


def chain_problems(segments, wavelength_m):
    """(position, InputProblem) for each misplaced segment of a resolved chain.

    A coating sits directly between two segments that carry a medium; an ``angle`` needs a
    medium before the segment that gives it (it is measured there); a joint's geometry needs
    the modes of both sides; a gap's launched beam needs a receiving side.
    """
    carries = [segment.medium_index() is not None for segment in segments]
    with warnings.catch_warnings():  # validity warnings are reported when the link is evaluated
        warnings.simplefilter("ignore", ValidityWarning)
        modes = [segment.mode(wavelength_m) for segment in segments]
        found = [(position, _segment_problem(segments, position, carries, modes, wavelength_m))
                 for position in range(len(segments))]
    return [(position, problem) for position, problem in found if problem is not None]
