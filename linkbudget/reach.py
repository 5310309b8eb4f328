"""Reach: the largest (for the launch power, the smallest) value of one key at which a link still closes.

A link closes when, at every wavelength, the worst-case margin meets the required margin and the
best-case received power stays at or below the receiver's overload. Its **slack** at a value x of
the varied key is the least of

    worst-case margin − required margin   and   overload − best-case received power   [dB]

over the wavelength axis; the link closes where the slack is ≥ 0. The search evaluates the slack on
a grid over the key's valid range (geometric for lengths and counts, linear for a power in dBm),
takes the last grid point that closes before one that does not (in the direction of the answer),
and refines the crossing between them with Brent's bracketing root finder
(:func:`scipy.optimize.brentq`). A whole-number key (a count) takes the whole number nearest
each value tried (the trials draw each counted part), so Brent's method closes in on the step
between two counts; the answer is the whole number there, checked on both sides.

Everything here works on a loaded link (:class:`linkbudget.config.Link`): the varied key is
replaced on copies of its segment (``model_copy``), never by editing YAML. The varied value
replaces the key's spread by one value, which every budget case then takes.

The slack is a function of the link (:func:`worst_case_slack`); a statistical criterion (the
limit at a stated yield, :class:`linkbudget.reach_yield.YieldCriterion`) stands in for it
through :func:`find_reach`'s ``slack``.
"""

from dataclasses import dataclass, replace

import numpy as np

from linkbudget.config.fields import SpreadBase
from linkbudget.config.ranges import Range
from linkbudget.config.source import ConfigError
from linkbudget.config.spectral import SpectralValue

#: The key that varies the launch power, the one key whose answer is the smallest closing value.
SOURCE_POWER = "source.power"
#: Points of the search grid over a key's valid range.
GRID_POINTS = 96
#: A geometric grid starts this fraction of the range's upper end above a lower end of 0.
_GEOMETRIC_START = 1e-9
#: A root of the slack within this much [dB] of 0 counts as closing (round-off of the sums).
ROOT_TOLERANCE_DB = 1e-9
#: Slack [dB] given to a value the engine cannot evaluate (no light passes): a sure failure.
_NO_LIGHT_DB = -1e6

#: Outcomes of a search.
LIMITED, NEVER_LIMITS, NEVER_CLOSES = "limited", "never-limits", "never-closes"


class ReachError(ValueError):
    """The key to vary cannot be varied (unknown segment or key, not a number, a table)."""


@dataclass(frozen=True)
class Target:
    """The key to vary: ``segment`` (its position in the chain, ``None`` for the source) and
    ``key``; its valid range, whether it is a whole number, and its value in the link (typical,
    and the ends of its spread)."""

    label: str
    segment: int | None
    key: str
    bounds: Range
    whole: bool
    current: float
    current_ends: tuple = ()

    @property
    def smallest(self):
        """The answer is the smallest closing value (the launch power), else the largest."""
        return self.segment is None


@dataclass(frozen=True)
class Slack:
    """How far a link is from failing: ``slack_db`` (≥ 0 closes), what limits it (``sensitivity``
    or ``overload``), at which wavelength (its index), and the worst-case margin there."""

    slack_db: float
    limited_by: str
    wavelength_index: int
    margin_db: float
    result: object = None


@dataclass(frozen=True)
class Reach:
    """The answer of :func:`find_reach`.

    ``outcome`` is :data:`LIMITED` (``value`` is the limit), :data:`NEVER_LIMITS` (the link closes
    up to the end of the key's valid range, ``value``), or :data:`NEVER_CLOSES` (no value in the
    range closes; ``value`` is where it comes closest). ``slack`` is the :class:`Slack` at
    ``value``; ``failing`` the one just past the limit (what stops it), when there is a limit.
    """

    target: Target
    outcome: str
    value: float
    slack: Slack
    failing: Slack | None
    wavelength_m: np.ndarray
    required_margin_db: float


def target_of(link, text):
    """The :class:`Target` that ``text`` (``SEGMENT.KEY`` or ``source.power``) names in ``link``.

    Raises :class:`ReachError` with the keys that could be varied when it names none of them.
    """
    if text == SOURCE_POWER:
        power = link.spec.source.power
        return Target(text, None, "power", type(power).bounds, False, power.typ_value, _ends(power))
    name, dot, key = text.rpartition(".")
    names = [segment.name for segment in link.segments]
    if not dot or name not in names:
        raise ReachError(f"--vary {text!r}: no segment named {name or text!r}; write SEGMENT.KEY with one of "
                         f"the segment names ({', '.join(map(repr, names))}) or {SOURCE_POWER}")
    position = names.index(name)
    segment = link.segments[position]
    keys = variable_keys(segment)
    if isinstance(getattr(segment, key, None), SpectralValue):
        raise ReachError(f"--vary {text!r}: {key} is a table over wavelength (or a spectral model), which has no "
                         "one value to vary")
    if key not in keys:
        raise ReachError(f"--vary {text!r}: segment {name!r} has no number to vary named {key!r}; "
                         f"it has: {', '.join(sorted(keys)) or 'none'}")
    bounds, whole = keys[key]
    value = getattr(segment, key)
    return Target(text, position, key, bounds, whole, float(getattr(value, "typ_value", value)), _ends(value))


def _ends(value):
    """(low, high) of a spread that is not one value, else ``()``."""
    return (value.low, value.high) if isinstance(value, SpreadBase) and not value.is_fixed else ()


def variable_keys(segment):
    """key -> (valid range, is a whole number) of every key of ``segment`` the search can vary: a
    written spread with a valid range, or a count."""
    keys = {}
    for key, info in type(segment).model_fields.items():
        value = getattr(segment, key)
        if isinstance(value, SpreadBase) and value.bounds is not None:
            keys[key] = (value.bounds, False)
        elif isinstance(value, int) and not isinstance(value, bool):
            bounds = next((item for item in info.metadata if isinstance(item, Range)), None)
            if bounds is not None:
                keys[key] = (bounds, True)
    return keys


def with_value(link, target, value):
    """A copy of ``link`` whose varied key holds ``value`` (one value: every case takes it)."""
    if target.segment is None:
        source = link.spec.source
        power = type(source.power).model_construct(typ=float(value))
        spec = link.spec.model_copy(update={"source": source.model_copy(update={"power": power})})
        return replace(link, spec=spec)
    segment = link.segments[target.segment]
    old = getattr(segment, target.key)
    if target.whole:  # a count: the nearest whole number (the trials draw each counted part)
        new = int(round(float(value)))
    else:
        new = type(old).model_construct(typ=float(value)) if isinstance(old, SpreadBase) else value
    segments = list(link.segments)
    segments[target.segment] = segment.model_copy(update={target.key: new})
    return replace(link, segments=tuple(segments))


def worst_case_slack(link, required_margin_db=None):
    """The :class:`Slack` of ``link`` in its corner budget (see the module docstring); a link the
    engine cannot evaluate (no light passes) fails with a slack of −1e6 dB."""
    from linkbudget.engine import evaluate

    try:
        result = evaluate(link, required_margin_db=required_margin_db, review=False)
    except ConfigError:
        return Slack(_NO_LIGHT_DB, "sensitivity", 0, _NO_LIGHT_DB)
    short_db = result.margin_db["worst"] - result.required_margin_db
    over_db = (np.full(short_db.shape, np.inf) if result.overload_dbm is None
               else result.overload_dbm - result.received_dbm["best"])
    worst = result.governing_index
    margin_db = float(result.margin_db["worst"][worst])
    if np.min(over_db) < np.min(short_db):
        index = int(np.argmin(over_db))
        return Slack(float(over_db[index]), "overload", index, margin_db, result)
    return Slack(max(float(short_db[worst]), _NO_LIGHT_DB), "sensitivity", worst, margin_db, result)


def search_grid(target):
    """The values the search first evaluates: the key's valid range (geometric from near 0 for a
    length or count, linear for a power in dBm) and the link's own value, increasing."""
    bounds = target.bounds
    low, high = bounds.low, bounds.high
    if low is not None and low >= 0:
        start = max(low, high * _GEOMETRIC_START) if low == 0 else low
        points = np.geomspace(start, high, GRID_POINTS)
        if low == 0 and not bounds.low_open:
            points = np.append(points, 0.0)
    else:
        points = np.linspace(low, high, GRID_POINTS)
    if bounds.low_open:
        points = points[points > low]
    if bounds.high_open:
        points = points[points < high]
    points = np.append(points, target.current)
    if target.whole:
        points = np.round(points)
    return np.unique(points)


def find_reach(link, target, *, slack=worst_case_slack, required_margin_db=None):
    """The limit of ``target`` (a :class:`Target`) at which ``link`` still closes: a :class:`Reach`.

    ``slack(link, required_margin_db)`` returns the :class:`Slack` of a link (default: the worst
    case of the corner budget).
    """
    from scipy.optimize import brentq

    def at(value):
        return slack(with_value(link, target, value), required_margin_db)

    def reach(outcome, value, found, failing=None):
        wavelength_m = link.spec.wavelengths_m()
        required = link.spec.receiver.required_margin if required_margin_db is None else required_margin_db
        return Reach(target, outcome, float(value), found, failing, wavelength_m, required)

    grid = search_grid(target)
    slacks = [at(value) for value in grid]
    closing = [index for index, found in enumerate(slacks) if found.slack_db >= 0]
    if not closing:
        best = int(np.argmax([found.slack_db for found in slacks]))
        return reach(NEVER_CLOSES, grid[best], slacks[best])
    edge = closing[0] if target.smallest else closing[-1]
    beyond = edge - 1 if target.smallest else edge + 1
    if beyond < 0 or beyond >= grid.size:
        return reach(NEVER_LIMITS, grid[edge], slacks[edge])
    span = sorted((grid[edge], grid[beyond]))
    step = 1e-12 * max(abs(span[1]), 1.0)
    root = brentq(lambda value: at(value).slack_db, *span, xtol=step, rtol=1e-12)
    if target.whole:
        return _whole_limit(at, reach, root, target.smallest)
    found = at(root)
    if found.slack_db < -ROOT_TOLERANCE_DB:
        root, found = grid[edge], slacks[edge]
    root, found = _closing_side(at, root, found, grid[edge], step)
    return reach(LIMITED, root, found, slacks[beyond])


def _closing_side(at, root, found, closing_value, step):
    """(value, slack) of a root that fails by round-off moved toward ``closing_value`` in doubling
    steps until it closes, so the limit reported always closes (a yield's count of closing trials)."""
    direction = np.sign(closing_value - root)
    for power in range(64):
        if found.slack_db >= 0:
            break
        root = root + direction * step * 2.0**power
        if (closing_value - root) * direction <= 0:
            return closing_value, at(closing_value)
        found = at(root)
    return root, found


def _whole_limit(at, reach, root, smallest):
    """The whole number at the crossing ``root`` that closes, with its neighbour that does not."""
    value = int(np.ceil(root) if smallest else np.floor(root))
    step = 1 if smallest else -1
    while at(value).slack_db < 0:
        value += step
    while at(value - step).slack_db >= 0:
        value -= step
    return reach(LIMITED, value, at(value), at(value - step))
