"""Rules on the order of segments: each segment judges its own place in the chain."""

import warnings

from linkbudget.physics.validity import ValidityWarning
from linkbudget.segments.base import Place
from linkbudget.segments.roles import Carries


def chain_problems(segments, wavelength_m):
    """(position, InputProblem) for each misplaced segment of a resolved chain.

    Each segment's :meth:`~linkbudget.segments.base.SegmentSpec.placement_problem` judges its
    :class:`~linkbudget.segments.base.Place`: which neighbours carry a medium, whether one does
    before it, and its neighbours' modes.
    """
    carries = [isinstance(segment.role(), Carries) for segment in segments]
    with warnings.catch_warnings():  # validity warnings are reported when the link is evaluated
        warnings.simplefilter("ignore", ValidityWarning)
        modes = [segment.mode(wavelength_m) for segment in segments]
        last = len(segments) - 1
        found = [(position, segment.placement_problem(Place(
            wavelength_m,
            medium_before=position > 0 and carries[position - 1],
            medium_after=position < last and carries[position + 1],
            medium_upstream=any(carries[:position]),
            mode_before=modes[position - 1] if position else None,
            mode_after=modes[position + 1] if position < last else None)))
            for position, segment in enumerate(segments)]
    return [(position, problem) for position, problem in found if problem is not None]
