"""The ``reachable:`` block of a link file: the points where a person can reach the light.

By default the points are the source output, every connector (unplugged, it exposes a fibre
end), every free-space gap and the receiver input. ``add`` places a further point after a named
segment (a monitoring tap, a splice tray opened during service); ``exclude`` removes a default
point, with the ``reason`` it cannot be reached (an enclosure), shown in every report::

    reachable:
      add:
        - after: splice tray
          name: tray opened for service
      exclude:
        - at: housing window gap
          reason: inside the sealed sensor head; opened only with the laser off
"""

from pydantic import Field, model_validator

from linkbudget.config.fields import InputProblem, Strict

#: The names of the two end points, as ``exclude`` refers to them.
SOURCE_POINT, RECEIVER_POINT = "source output", "receiver input"


class AddedPoint(Strict):
    """A reachable point after the segment named ``after``, shown as ``name``."""

    after: str = Field(description="The segment the point follows; it takes the power after that segment.")
    name: str | None = Field(None, description="The point's name in the reports (default: after SEGMENT).")

    @property
    def shown_name(self):
        return self.name or f"after {self.after}"


class ExcludedPoint(Strict):
    """A default point (a connector's or gap's name, or an end) that cannot be reached, and why."""

    at: str = Field(description="A connector's or gap's name, or source output or receiver input.")
    reason: str = Field(description="Why nobody can reach the point (an enclosure, an interlock); shown in the report.")

    @model_validator(mode="after")
    def _reason_given(self):
        if not self.reason.strip():
            raise InputProblem(("reason",), "say why the point cannot be reached (an enclosure, an interlock)")
        return self


class Reachable(Strict):
    """The ``reachable:`` block: points added after segments, default points excluded."""

    add: list[AddedPoint] = Field([], description="Points added after named segments.")
    exclude: list[ExcludedPoint] = Field([], description="Default points nobody can reach, each with its reason.")


def default_point_names(segments):
    """The names of the default reachable points of a chain, in order: the ends and each
    connector and gap (by segment name)."""
    return (SOURCE_POINT, *(segment.name for segment in segments if segment.kind in ("connector", "gap")),
            RECEIVER_POINT)


def reachable_problems(reachable, segments):
    """(key path, InputProblem) for each entry of the block that names no segment or point."""
    if reachable is None:
        return []
    names = [segment.name for segment in segments]
    defaults = default_point_names(segments)
    found = []
    for index, point in enumerate(reachable.add):
        if point.after not in names:
            found.append((("reachable", "add", index, "after"),
                          InputProblem((), f"no segment named '{point.after}' in the chain", _closest(point.after,
                                                                                                    names))))
    for index, point in enumerate(reachable.exclude):
        if point.at not in defaults:
            message = (f"'{point.at}' is not a default reachable point: those are the source output, each connector "
                       "and gap, and the receiver input")
            found.append((("reachable", "exclude", index, "at"), InputProblem((), message,
                                                                             _closest(point.at, defaults))))
    return found


def _closest(name, names):
    import difflib

    close = difflib.get_close_matches(name, list(names), n=1)
    return f"did you mean '{close[0]}'?" if close else f"one of: {', '.join(names)}"
