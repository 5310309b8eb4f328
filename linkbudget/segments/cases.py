"""Budget cases: what a segment asks for the value of each spread it holds.

A segment never reads case names. It asks its case for the value of a spread
(:meth:`Corner.value`, :meth:`Draws.value`) and computes its loss from the answer:

- a :class:`Corner` answers one float: the nominal value (``typ``), or every value at the end that
  hurts (``worst``) or at the end that helps (``best``);
- :class:`Draws` answers an array of random draws of shape (n_draws, 1), which broadcasts against
  the wavelength axis, so a segment's loss comes out as (n_draws, n_wavelengths). Its draws come
  from :class:`DrawStreams`, one random stream per spread, so a run split into chunks draws the
  same numbers as one run.

Joints whose loss is not monotonic in a value search the tolerance box instead of asking for one
end (:attr:`Corner.searches`).
"""

import math
from dataclasses import dataclass

import numpy as np

from linkbudget.config.spectral import SpectralValue


@dataclass(frozen=True)
class Corner:
    """A corner of the tolerance box: every spread at its nominal value or at one end.

    ``stack`` is +1 when every value sits at the end that hurts, −1 at the end that helps, 0 at
    its nominal value.
    """

    name: str
    stack: int

    @property
    def searches(self):
        """The case is an extreme (worst or best) that a non-monotonic loss must search for."""
        return self.stack != 0

    def value(self, spread, *, larger_hurts=True):
        """The value of ``spread`` (a :class:`~linkbudget.config.fields.SpreadBase`) in this case."""
        if self.stack == 0:
            return spread.typ_value
        return spread.high if (self.stack > 0) == larger_hurts else spread.low

    def total(self, spread, count):
        """The sum of ``count`` values of ``spread`` (identical features): ``count`` times its value."""
        return count * self.value(spread)

    def unknown(self, owner, low, high, nominal):
        """The value of something the link does not give (a tilt's azimuth): its ``nominal``."""
        return nominal

    def extreme(self, typical, least, largest):
        """This case's efficiency of a searched coupling: the least found (worst), the largest
        (best), or ``typical``, the nominal point's, which counts as found, so best ≥ typ ≥ worst."""
        if self.stack == 0:
            return typical
        return np.minimum(typical, least) if self.stack > 0 else np.maximum(typical, largest)


TYPICAL = Corner("typ", 0)
WORST = Corner("worst", 1)
BEST = Corner("best", -1)
#: The corner budget every link gets: nominal, worst-case and best-case (overload check).
CORNERS = (TYPICAL, WORST, BEST)
#: The corners by name, for callers that take a name (the JSON keys, tests).
CORNER = {corner.name: corner for corner in CORNERS}
#: The corner names, the keys of every per-case value of a result, from the config to the JSON.
CASES = tuple(CORNER)




#: A normal spread's bound further than this many sigma from its mean is not applied by the inverse
#: distribution (the mass beyond it, < 1e-15, is below a double's resolution of a probability).
FAR_BOUND_SIGMA = 8.0


class _Stream:
    """One random stream (a PCG64 generator) and the draws it made beyond what was asked (a
    rejection sampler's surplus), handed out first next time so the stream's sequence does not
    depend on how many draws each chunk asks for."""

    def __init__(self, seed, number):
        self.generator = np.random.Generator(np.random.PCG64(np.random.SeedSequence(seed, spawn_key=(number,))))
        self.surplus = np.empty(0)

    def accepted(self, count, draw, keep):
        """The next ``count`` values of ``draw(size)`` for which ``keep(values)`` holds, in order."""
        taken, needed = [self.surplus[:count]] if self.surplus.size else [], count - min(count, self.surplus.size)
        self.surplus = self.surplus[count:]
        while needed > 0:
            values = draw(needed + needed // 64 + 16)
            values = values[keep(values)]
            taken.append(values[:needed])
            self.surplus = values[needed:]
            needed -= min(needed, values.size)
        return np.concatenate(taken) if len(taken) > 1 else taken[0]


class DrawStreams:
    """The random streams of one Monte Carlo run from its ``seed``.

    Stream number k (in the order the spreads are first asked for, which the chain fixes) is a
    PCG64 generator seeded by ``SeedSequence(seed, spawn_key=(k,))``; each chunk of trials takes the
    next draws of every stream, so trial i draws the same numbers whatever the chunk size.
    """

    def __init__(self, seed):
        self.seed = seed
        self._streams = {}  # key -> (the object drawn for, kept alive so its id stays its own; stream)

    def stream(self, key, owner=None):
        if key not in self._streams:
            self._streams[key] = (owner, _Stream(self.seed, len(self._streams)))
        return self._streams[key][1]


class Draws:
    """``count`` random draws of every spread at once (Monte Carlo), from seeded streams.

    Each spread is drawn once per :class:`Draws`: asking again for the same spread object gives the
    same draws, so two uses of one value (the x and y radius of a circular mode) stay equal. A
    spread's ``distribution`` (:attr:`~linkbudget.config.fields.SpreadBase.distribution_name`):

    - ``normal`` (``{mean, sigma}``): normal, truncated to the valid range of the value (a loss
      >= 0, a length > 0); a bound within :data:`FAR_BOUND_SIGMA` sigma of the mean is applied
      exactly (rejection, or the inverse distribution in a batch), one further away is not;
    - ``triangular`` (``{min, typ, max}``): triangular with its mode at ``typ``;
    - ``uniform`` (``{min, max}``, or ``distribution: uniform``): uniform over [min, max];
    - one value: that value.

    Spreads with the same ``batch`` name are drawn from one standard normal variate z per trial:
    a normal member takes mean + sigma·z (truncated through its inverse distribution), any other
    member its quantile at Φ(z), so the members move together (fully correlated, rank for rank).
    """

    searches = False

    def __init__(self, count, *, seed=0, streams=None, name="draws"):
        self.count, self.name = int(count), name
        self.streams = DrawStreams(seed) if streams is None else streams
        self._drawn = {}  # key -> (the object drawn for, kept alive so its id stays its own; draws)

    def _once(self, key, owner, draw):
        if key not in self._drawn:
            self._drawn[key] = (owner, draw())
        return self._drawn[key][1]

    def value(self, spread, *, larger_hurts=True):
        """Draws of ``spread``, shape (count, 1); ``larger_hurts`` does not change a draw."""
        return self._copy_value(spread, 0)

    def total(self, spread, count):
        """The sum of ``count`` values of ``spread`` (identical features), shape (count, 1): each
        feature drawn on its own, or all the same draw in a batch."""
        if spread.batch is not None or spread.is_fixed:
            return count * self.value(spread)
        return sum(self._copy_value(spread, copy) for copy in range(count))

    def _copy_value(self, spread, copy):
        def draw():
            values = self._drawn_values(spread, (id(spread), copy))
            return values if values.ndim == 2 else values[:, None]

        return self._once(("value", id(spread), copy), spread, draw)

    def unknown(self, owner, low, high, nominal):
        """Draws, shape (count, 1), of a value the link does not give, known only to lie in
        [low, high] (a tilt's azimuth), uniform, once per ``owner`` object."""
        def draw():
            uniform = self.streams.stream(("unknown", id(owner)), owner).generator.random(self.count)
            return (low + (high - low) * uniform)[:, None]

        return self._once(("unknown", id(owner)), owner, draw)

    def extreme(self, typical, least, largest):
        """Draws evaluate their own point: the efficiency at their drawn inputs."""
        return typical

    def _batch_variate(self, name):
        """The standard normal variate z of batch ``name`` (one per trial, shared by its members)."""
        return self._once(("batch", name), name,
                          lambda: self.streams.stream(("batch", name)).generator.standard_normal(self.count))

    def _drawn_values(self, spread, key):
        """``count`` draws of one spread, by the distributions this class documents; a table over
        the wavelength axis draws (count, n_wavelengths) by :meth:`SpectralValue.drawn`."""
        if isinstance(spread, SpectralValue):
            return spread.drawn(self.streams.stream(key, spread).generator, self.count)
        low, high = spread.low_bound, spread.high_bound
        if spread.is_fixed:
            return np.full(self.count, float(spread.low))
        distribution = spread.distribution_name
        if spread.batch is not None:
            z = self._batch_variate(spread.batch)
            if distribution == "normal":
                tail, lower = self._once(("batch tail", spread.batch), spread.batch, lambda: _tail(z))
                return _truncated_normal_at_tail(tail, lower, spread.mean, spread.sigma, low, high)
            from scipy.special import ndtr  # scipy only where a batch needs it: the command line starts fast

            return _quantile(spread, distribution, ndtr(z))
        stream = self.streams.stream(key, spread)
        if distribution == "normal":
            mean, sigma = spread.mean, spread.sigma
            low = low if mean - low <= FAR_BOUND_SIGMA * sigma else -math.inf
            high = high if high - mean <= FAR_BOUND_SIGMA * sigma else math.inf
            if math.isinf(low) and math.isinf(high):
                return _scaled(stream.generator.standard_normal(self.count), mean, sigma)
            return stream.accepted(self.count, lambda size: _scaled(stream.generator.standard_normal(size), mean,
                                                                    sigma), _within(low, high))
        if distribution == "uniform":
            return stream.generator.uniform(spread.low, spread.high, self.count)
        return stream.generator.triangular(spread.low, spread.typ_value, spread.high, self.count)


def _scaled(standard, mean, sigma):
    """mean + sigma·z, computed in the array of standard normal draws z."""
    standard *= sigma
    standard += mean
    return standard


def _within(low, high):
    """The test of draws against the bounds, on the side(s) where a bound is near (not infinite)."""
    if math.isinf(high):
        return lambda values: values >= low
    if math.isinf(low):
        return lambda values: values <= high
    return lambda values: (values >= low) & (values <= high)


def truncated_normal_quantile(z, mean, sigma, low, high):
    """The normal(mean, sigma) truncated to [low, high], at the quantile Φ(z) of the standard normal
    variate ``z``: x = mean + sigma·Φ⁻¹(Φ(a) + Φ(z)·(Φ(b) − Φ(a))), a and b the bounds in sigma.

    Each tail is computed from its own small probability Φ(−|z|), so neither loses precision: below
    the median Φ⁻¹(Φ(a) + Φ(−|z|)·m), above it −Φ⁻¹(Φ(−b) + Φ(−|z|)·m), m = Φ(b) − Φ(a) = Φ(−a) − Φ(−b).
    """
    return _truncated_normal_at_tail(*_tail(z), mean, sigma, low, high)


def _tail(z):
    """(Φ(−|z|), z <= 0): the tail probability of each standard normal variate and its side."""
    from scipy.special import ndtr

    return ndtr(-np.abs(z)), z <= 0


def _truncated_normal_at_tail(tail, lower, mean, sigma, low, high):
    """:func:`truncated_normal_quantile` from the variates' :func:`_tail` (computed once a batch)."""
    from scipy.special import ndtr, ndtri

    a, b = (low - mean) / sigma, (high - mean) / sigma
    mass = ndtr(b) - ndtr(a)
    standard = ndtri(tail * mass + np.where(lower, ndtr(a), ndtr(-b)))
    return np.clip(mean + np.where(lower, sigma, -sigma) * standard, low, high)


def _quantile(spread, distribution, probability):
    """The quantile of a triangular (mode ``typ``) or uniform spread over [min, max] at ``probability``
    (the inverse distributions numpy's ``Generator.triangular`` and ``uniform`` draw through)."""
    low, high = spread.low, spread.high
    if distribution == "uniform":
        return low + (high - low) * probability
    mode = spread.typ_value
    rising = probability * (high - low) <= mode - low
    return np.where(rising, low + np.sqrt(probability * (high - low) * (mode - low)),
                    high - np.sqrt((1 - probability) * (high - low) * (high - mode)))
