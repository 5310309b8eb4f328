"""Reach at a stated yield: the limit of one key where the share of Monte Carlo trials that close
falls to a stated yield y.

A trial closes when its margin meets the required margin at every wavelength and its received
power stays at or below the overload (:func:`linkbudget.statistics.trial_slacks_db`, the same test
as the statistical budget's yield). With k = ⌈y·n⌉ of n trials that must close, the link meets the
yield where the k-th largest trial slack is ≥ 0; that order statistic is the :class:`YieldSlack`'s
``slack_db`` [dB], which :func:`linkbudget.reach.find_reach` takes as its ``slack``.

Every evaluation draws the trials from the same seed (common random numbers), so the slack is a
deterministic, continuous function of the varied value (an order statistic of continuous
functions of it): Brent's bracket stays valid and the answer repeats byte for byte.
"""

from dataclasses import dataclass

import numpy as np

from linkbudget.config.source import ConfigError
from linkbudget.reach import Slack, worst_case_slack


@dataclass(frozen=True)
class YieldSlack(Slack):
    """A :class:`~linkbudget.reach.Slack` at a stated yield: ``stated_yield`` (the fraction asked
    for), ``yield_fraction`` (the share of the ``trials`` from ``seed`` that close), and
    ``margin_db`` the margin of the trial at the yield's edge, at its binding wavelength."""

    stated_yield: float = 1.0
    yield_fraction: float = 0.0
    trials: int = 0
    seed: int = 0


@dataclass(frozen=True)
class YieldCriterion:
    """The slack function of a reach at ``stated_yield`` over ``trials`` trials from ``seed``.

    Every call draws the same numbers from ``seed`` (common random numbers), so the slack is a
    deterministic function of the varied value and Brent's bracket in :func:`find_reach` holds."""

    stated_yield: float
    trials: int
    seed: int

    @property
    def must_close(self):
        """k = ⌈y·n⌉: how many trials must close (a hair below, so 0.999·1000 is 999, not 1000)."""
        return min(self.trials, max(1, int(np.ceil(self.stated_yield * self.trials - 1e-9))))

    def __call__(self, link, required_margin_db=None):
        from linkbudget.engine import evaluate
        from linkbudget.statistics import trial_slacks_db

        def slack_of(slack_db, limited_by, wavelength_index, margin_db, yield_fraction):
            return YieldSlack(float(slack_db), limited_by, int(wavelength_index), float(margin_db),
                              stated_yield=self.stated_yield, yield_fraction=float(yield_fraction),
                              trials=self.trials, seed=self.seed)

        try:
            result = evaluate(link, required_margin_db=required_margin_db, review=False)
        except ConfigError:  # no light passes: the corner budget's sure failure
            failed = worst_case_slack(link, required_margin_db)
            return slack_of(failed.slack_db, failed.limited_by, 0, failed.margin_db, 0.0)
        slack_db, index, by_overload, margin_db = trial_slacks_db(link, result, trials=self.trials, seed=self.seed)
        edge = np.argsort(slack_db, kind="stable")[self.trials - self.must_close]
        closing = float(np.count_nonzero(slack_db >= 0)) / self.trials
        # a trial no light reaches has slack −inf: clamp it to the corner budget's sure failure, −1e6 dB
        return slack_of(max(slack_db[edge], -1e6), "overload" if by_overload[edge] else "sensitivity",
                        index[edge], margin_db[edge], closing)
