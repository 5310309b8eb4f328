"""Rules on the order of segments that no single segment can check."""

from linkbudget.config.fields import InputProblem


def chain_problems(segments):
    """(position, InputProblem) for each misplaced segment of a resolved chain.

    A coating sits directly between two segments that carry a medium; an ``angle`` needs a
    medium before the segment that gives it (it is measured there).
    """
    problems = []
    carries = [segment.medium_index() is not None for segment in segments]
    for position, segment in enumerate(segments):
        if segment.kind == "coating":
            before = position > 0 and carries[position - 1]
            after = position + 1 < len(segments) and carries[position + 1]
            if not (before and after):
                problems.append((position, InputProblem(
                    ("kind",), "a coating sits directly between two segments that carry a medium",
                    "give the neighbours an index or material, e.g. a gap (air) before a coated window")))
        elif getattr(segment, "angle", None) is not None and not any(carries[:position]):
            problems.append((position, InputProblem(
                ("angle",), "an angle of incidence needs a medium before this segment to be measured in")))
    return problems
