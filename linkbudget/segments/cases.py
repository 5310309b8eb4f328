"""Budget cases: what a segment asks for the value of each spread it holds.

A segment never reads case names. It asks its case for the value of a spread
(:meth:`Corner.value`, :meth:`Draws.value`) and computes its loss from the answer:

- a :class:`Corner` answers one float: the nominal value (``typ``), or every value at the end that
  hurts (``worst``) or at the end that helps (``best``);
- :class:`Draws` answers an array of random draws of shape (n_draws, 1), which broadcasts against
  the wavelength axis, so a segment's loss comes out as (n_draws, n_wavelengths).

Joints whose loss is not monotonic in a value search the tolerance box instead of asking for one
end (:attr:`Corner.searches`).
"""

from dataclasses import dataclass

import numpy as np


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


class Draws:
    """``count`` random draws of every spread at once (Monte Carlo), from a seeded generator.

    Each spread is drawn independently, once: asking again for the same spread object gives the
    same draws, so two uses of one value (the x and y radius of a circular mode) stay equal. The
    distributions (common practice for tolerance analysis):

    - ``{mean, sigma}``: normal, truncated to its stated ends mean ± 3σ (the worst and best
      corners; the low end at a physical floor where it is clipped);
    - ``{min, typ, max}``: triangular with its mode at ``typ``; ``{min, max}``: uniform;
    - one value: that value.

    Every draw lies between the corners, so each draw's loss lies between best and worst for a
    loss monotonic in its values.
    """

    searches = False

    def __init__(self, count, *, seed=0, name="draws"):
        self.count, self.name = int(count), name
        self._rng = np.random.default_rng(seed)
        self._drawn = {}  # (what, id) -> (the object drawn for, kept alive so its id stays its own; draws)

    def _once(self, what, owner, draw):
        key = (what, id(owner))
        if key not in self._drawn:
            self._drawn[key] = (owner, draw()[:, None])
        return self._drawn[key][1]

    def value(self, spread, *, larger_hurts=True):
        """Draws of ``spread``, shape (count, 1); ``larger_hurts`` does not change a draw."""
        return self._once("value", spread, lambda: _drawn_values(spread, self._rng, self.count))

    def unknown(self, owner, low, high, nominal):
        """Draws, shape (count, 1), of a value the link does not give, known only to lie in
        [low, high] (a tilt's azimuth), uniform, once per ``owner`` object."""
        return self._once("unknown", owner, lambda: self._rng.uniform(low, high, self.count))

    def extreme(self, typical, least, largest):
        """Draws evaluate their own point: the efficiency at their drawn inputs."""
        return typical


def _drawn_values(spread, rng, count):
    """``count`` draws of one spread, by the distributions :class:`Draws` documents."""
    low, high = spread.low, spread.high
    if low == high:
        return np.full(count, float(low))
    if spread.mean is not None:
        values = rng.normal(spread.mean, spread.sigma, count)
        while np.any(outside := (values < low) | (values > high)):  # truncation by rejection
            values[outside] = rng.normal(spread.mean, spread.sigma, int(outside.sum()))
        return values
    if spread.typ is None:
        return rng.uniform(low, high, count)
    return rng.triangular(low, spread.typ_value, high, count)
