"""The statistical budget: the margin over Monte Carlo trials of every spread at once.

Each trial draws every spread of the link (its distribution and batch, see
:class:`linkbudget.segments.cases.Draws`) and evaluates the whole chain on those draws over the
wavelength axis, so a trial's margin is

    margin = drawn source power − Σ drawn row losses − receiver sensitivity   [dB].

The trials run in chunks of at most :data:`CHUNK_NUMBERS` numbers per row array, so memory stays
bounded whatever the trial count; each spread has its own random stream, so the chunking never
changes a draw (same seed, same numbers, byte for byte).

Results per wavelength: the margin's mean and standard deviation, its quantiles (exact order
statistics, interpolated linearly between the two nearest as numpy's default quantile does), the probability that the
margin is below the required margin and that the received power exceeds the overload, the
root-sum-square (RSS) estimate, and every row's share of the margin variance.

- **Quantiles.** While trials × wavelengths fits :data:`KEPT_MARGIN_BYTES`, the margins are kept
  (float64) and the quantiles taken from them. Beyond it the trials are drawn again (the same
  numbers) twice: once to count the margins in :data:`HISTOGRAM_BINS` bins between the least and
  largest margin of each wavelength, once to keep only the margins in the bins that hold the
  wanted order statistics, which are then sorted: the same exact values, in bounded memory.
- **RSS.** σ_RSS = √(Σ_rows σ_row² + σ_source²) with each row's σ from its draws: the margin's
  spread if the rows were independent and added linearly (common practice for tolerance
  stacks); its quantile estimate is the nominal margin + Φ⁻¹(p)·σ_RSS. The Monte Carlo shows what
  the RSS misses (a batch's correlation, a skewed or truncated distribution, a non-linear joint).
- **Shares.** A row's share of the margin variance is −cov(row loss, margin)/var(margin) (the
  source's: +cov(power, margin)/var(margin)); the shares add up to 1, and a row correlated with
  others (a batch) carries its covariance with them.

Moments are summed about the nominal (``typ``) values, which keeps the sums free of cancellation.
"""

from dataclasses import dataclass, replace

import numpy as np

from linkbudget.engine import budget_rows
from linkbudget.segments.cases import Draws, DrawStreams

#: The probabilities at which the margin's quantiles are reported.
QUANTILE_PROBABILITIES = (0.001, 0.01, 0.05, 0.5)
#: Numbers per (trials × wavelengths) array of one chunk (1 MB of float64): bounds the memory.
CHUNK_NUMBERS = 2**17
#: Most trials in one chunk (a short wavelength axis).
MAX_CHUNK_TRIALS = 2**16
#: Largest array of margins kept for the quantiles (trials × wavelengths × 8 bytes).
KEPT_MARGIN_BYTES = 192 * 2**20
#: Bins per wavelength of the counting pass of a run too large to keep its margins.
HISTOGRAM_BINS = 4096
#: Bins of the margin histogram the reports draw (:attr:`Statistics.margin_histogram`).
REPORT_HISTOGRAM_BINS = 40


@dataclass(frozen=True)
class Contribution:
    """One row's (or the source power's, ``row_id`` ``None``) part in the margin's spread: its own
    standard deviation [dB] and its share of the margin variance, each over the wavelength axis."""

    row_id: str | None
    name: str
    std_db: np.ndarray
    share: np.ndarray


@dataclass(frozen=True)
class Statistics:
    """The statistical budget of a link; arrays run over its wavelength axis."""

    trials: int
    seed: int
    margin_mean_db: np.ndarray
    margin_std_db: np.ndarray
    margin_quantiles_db: dict  # probability -> array
    probability_below_required: np.ndarray
    probability_overload: np.ndarray | None  # None without an overload
    probability_fails: float  # a trial misses the margin or overloads at any wavelength
    rss_std_db: np.ndarray
    rss_quantiles_db: dict  # probability -> nominal margin + Φ⁻¹(p)·σ_RSS
    contributions: tuple  # of Contribution, largest share (at the governing wavelength) first
    governing_index: int  # the wavelength with the least margin at the smallest probability
    margin_histogram: tuple | None = None  # (edges, counts) at the governing wavelength; None if not kept

    @property
    def yield_fraction(self):
        """The fraction of trials in which the link closes at every wavelength."""
        return 1.0 - self.probability_fails


def chunk_trials(n_wavelengths):
    """Trials per chunk for a wavelength axis of ``n_wavelengths``."""
    return int(max(1, min(MAX_CHUNK_TRIALS, CHUNK_NUMBERS // max(1, n_wavelengths))))


def _chunks(link, trials, seed):
    """(drawn source power (n, 1), rows, margin (n, n_wavelengths)) of each chunk of trials, in order."""
    spec = link.spec
    wavelength_m = spec.wavelengths_m()
    streams = DrawStreams(seed)
    per_chunk = chunk_trials(wavelength_m.size)
    for start in range(0, trials, per_chunk):
        draws = Draws(min(per_chunk, trials - start), streams=streams)
        source_dbm = draws.value(spec.source.power)
        rows, _ = budget_rows(link.segments, wavelength_m, spec.source.spectral_width, cases=(draws,))
        total_db = np.zeros((draws.count, wavelength_m.size))
        with np.errstate(invalid="ignore"):
            for row in rows:
                total_db += row.loss_db["draws"]
        # +inf (total internal reflection) and a negative -inf after it add to NaN: no light arrives
        total_db[np.isnan(total_db)] = np.inf
        yield source_dbm, rows, source_dbm - total_db - spec.receiver.sensitivity


class _Moments:
    """Running sums about a nominal value: Σd, Σd² and Σd·m of one drawn quantity d."""

    def __init__(self, nominal):
        self.nominal = nominal
        self.sum = self.squares = self.with_margin = 0.0

    def add(self, values, margin_offset, scratch=None):
        """Add a chunk's draws (broadcasting to ``margin_offset``'s shape), their offset computed in
        ``scratch`` (an array of that shape) when given."""
        if scratch is None:
            offset = np.broadcast_to(values - self.nominal, margin_offset.shape)
        else:
            offset = np.subtract(values, self.nominal, out=scratch)
        self.sum = self.sum + offset.sum(axis=0)
        self.squares = self.squares + np.einsum("ij,ij->j", offset, offset)
        self.with_margin = self.with_margin + np.einsum("ij,ij->j", offset, margin_offset)

    def variance(self, count):
        return np.maximum(self.squares - self.sum**2 / count, 0.0) / (count - 1)

    def covariance(self, count, margin):
        return (self.with_margin - self.sum * margin.sum / count) / (count - 1)


def run_statistics(link, result, *, trials, seed, progress=None):
    """The statistical budget of ``link`` over ``trials`` Monte Carlo trials from ``seed``.

    Parameters
    ----------
    link : linkbudget.config.Link
        A loaded link.
    result : linkbudget.engine.LinkResult
        Its corner budget (the nominal values the moments are summed about; the required margin).
    trials : int
        Number of trials (>= 2).
    seed : int
        Seed of the random streams (>= 0).
    progress : callable, optional
        Called with the number of trials done after each chunk, and the total first as
        ``progress(0, total)`` (a run too large to keep its margins counts three passes).

    Returns
    -------
    Statistics
    """
    from scipy.special import ndtri  # only where trials are run: the command line starts without scipy

    n_wavelengths = result.wavelength_m.size
    keep = trials * n_wavelengths * 8 <= KEPT_MARGIN_BYTES
    report = progress or (lambda done, total=None: None)
    report(0, trials if keep else 3 * trials)
    margin = _Moments(result.margin_db["typ"])
    source = _Moments(result.source_dbm["typ"])
    rows = [_Moments(result.loss_db["typ"][index]) for index in range(len(result.rows))]
    below = np.zeros(n_wavelengths)
    overload = np.zeros(n_wavelengths)
    fails, done = 0, 0
    lowest, highest = np.full(n_wavelengths, np.inf), np.full(n_wavelengths, -np.inf)
    kept = np.empty((trials, n_wavelengths)) if keep else None
    with np.errstate(invalid="ignore"):  # a blocked wavelength (margin -inf) has NaN moments
        for source_dbm, drawn_rows, margin_db in _chunks(link, trials, seed):
            count = margin_db.shape[0]
            margin_offset = margin_db - margin.nominal
            margin.add(margin_db, margin_offset)
            source.add(source_dbm, margin_offset)
            scratch = np.empty(margin_db.shape)
            for moments, row in zip(rows, drawn_rows, strict=True):
                moments.add(row.loss_db["draws"], margin_offset, scratch)
            missed = margin_db < result.required_margin_db
            if result.overload_dbm is not None:
                over = margin_db + result.sensitivity_dbm > result.overload_dbm
                overload += over.sum(axis=0)
                missed |= over
            below += (margin_db < result.required_margin_db).sum(axis=0)
            fails += int(missed.any(axis=1).sum())
            if keep:
                kept[done:done + count] = margin_db
            else:  # the finite extremes (light blocked by total internal reflection has margin -inf)
                finite = np.isfinite(margin_db)
                lowest = np.minimum(lowest, np.where(finite, margin_db, np.inf).min(axis=0))
                highest = np.maximum(highest, np.where(finite, margin_db, -np.inf).max(axis=0))
            done += count
            report(done)
    if keep:
        lower, upper, weight = _order_ranks(trials)
        ordered = np.partition(kept, np.unique(np.concatenate([lower, upper])), axis=0)
        quantiles = _interpolated(ordered[lower], ordered[upper], weight)
        del ordered
    else:
        quantiles = _quantiles_by_counting(link, trials, seed, lowest, highest, lambda n: report(trials + n))
    margin_variance = margin.variance(trials)
    with np.errstate(divide="ignore", invalid="ignore"):
        shares = [source.covariance(trials, margin) / margin_variance,
                  *(-moments.covariance(trials, margin) / margin_variance for moments in rows)]
    variances = [source.variance(trials), *(moments.variance(trials) for moments in rows)]
    names = [(None, "source power"), *((row.id, row.name) for row in result.rows)]
    quantile_map = dict(zip(QUANTILE_PROBABILITIES, quantiles, strict=True))
    governing = int(np.argmin(quantile_map[QUANTILE_PROBABILITIES[0]]))
    histogram = margin_histogram(kept[:, governing], result.required_margin_db) if keep else None
    del kept
    contributions = [Contribution(row_id, name, np.sqrt(variance), np.nan_to_num(share))
                     for (row_id, name), variance, share in zip(names, variances, shares, strict=True)
                     if np.any(variance > 0)]
    contributions.sort(key=lambda item: -item.share[governing])
    rss_std = np.sqrt(sum(variances))
    return Statistics(
        trials=trials, seed=seed,
        margin_mean_db=margin.nominal + margin.sum / trials,
        margin_std_db=np.sqrt(margin_variance),
        margin_quantiles_db=quantile_map,
        probability_below_required=below / trials,
        probability_overload=None if result.overload_dbm is None else overload / trials,
        probability_fails=fails / trials,
        rss_std_db=rss_std,
        rss_quantiles_db={p: result.margin_db["typ"] + ndtri(p) * rss_std for p in QUANTILE_PROBABILITIES},
        contributions=tuple(contributions),
        governing_index=governing,
        margin_histogram=histogram,
    )


def margin_histogram(margins_db, required_margin_db, *, bins=REPORT_HISTOGRAM_BINS):
    """(edges [dB], counts) of the finite ``margins_db`` in ``bins`` equal bins (or at the given
    edges), the required margin [dB] made one more edge when it falls inside, so every bin lies
    wholly below it or wholly at or above it."""
    margins_db = np.asarray(margins_db, dtype=float).ravel()
    margins_db = margins_db[np.isfinite(margins_db)]
    edges = np.histogram_bin_edges(margins_db, bins=bins)
    if edges[0] < required_margin_db < edges[-1]:
        edges = np.union1d(edges, [required_margin_db])
    counts, _ = np.histogram(margins_db, bins=edges)
    return edges, counts


def _order_ranks(trials):
    """The two order statistics (0-based ranks) numpy's linear quantile reads for each probability,
    and the weight of the upper one."""
    position = (trials - 1) * np.array(QUANTILE_PROBABILITIES)
    lower = np.floor(position).astype(np.int64)
    return lower, np.minimum(lower + 1, trials - 1), position - lower


def _quantiles_by_counting(link, trials, seed, lowest, highest, report):
    """Exact quantiles (as :func:`numpy.quantile`) of margins too many to keep: one pass counts
    them in bins, a second keeps those in the bins holding the wanted ranks (module docstring)."""
    n_wavelengths = lowest.size
    width = np.where(highest > lowest, (highest - lowest) / HISTOGRAM_BINS, 1.0)
    lowest = np.where(np.isfinite(lowest), lowest, 0.0)  # a wavelength no trial reaches: every margin in bin 0

    def bins_of(margin_db):
        """Each margin's bin; one below the least finite margin (-inf) in the first, above it in the last."""
        with np.errstate(invalid="ignore"):
            scaled = np.clip((margin_db - lowest) / width, 0, HISTOGRAM_BINS - 1)
        return np.nan_to_num(scaled, nan=0.0).astype(np.int64)

    counts = np.zeros((n_wavelengths, HISTOGRAM_BINS), dtype=np.int64)
    done = 0
    for _, _, margin_db in _chunks(link, trials, seed):
        flat = bins_of(margin_db) + HISTOGRAM_BINS * np.arange(n_wavelengths)
        counts += np.bincount(flat.ravel(), minlength=n_wavelengths * HISTOGRAM_BINS).reshape(counts.shape)
        done += margin_db.shape[0]
        report(done)
    lower, upper, weight = _order_ranks(trials)
    ranks = np.concatenate([lower, upper])
    cumulative = np.cumsum(counts, axis=1)
    wanted = np.array([np.searchsorted(cumulative[w], ranks, side="right") for w in range(n_wavelengths)])
    before = np.where(wanted > 0, np.take_along_axis(cumulative, np.maximum(wanted - 1, 0), axis=1), 0)
    kept = {(w, b): [] for w in range(n_wavelengths) for b in set(wanted[w].tolist())}
    for _, _, margin_db in _chunks(link, trials, seed):
        bins = bins_of(margin_db)
        for w, b in kept:
            kept[(w, b)].append(margin_db[bins[:, w] == b, w])
        done += margin_db.shape[0]
        report(done)
    values = np.empty((n_wavelengths, ranks.size))
    for w in range(n_wavelengths):
        for position, (b, rank) in enumerate(zip(wanted[w], ranks, strict=True)):
            in_bin = np.sort(np.concatenate(kept[(w, int(b))]))
            values[w, position] = in_bin[rank - before[w, position]]
    return _interpolated(values[:, :lower.size].T, values[:, lower.size:].T, weight)


def _interpolated(low_values, high_values, weight):
    """numpy's linear quantile from its two order statistics (probability, wavelength) and the upper
    one's weight; equal neighbours, infinite ones too (light blocked), are their own quantile."""
    with np.errstate(invalid="ignore"):
        between = low_values + weight[:, None] * (high_values - low_values)
    return np.where(high_values == low_values, low_values, between)


def requested(spec, trials=None, seed=None):
    """(trials, seed) of the statistical budget asked for, the command line's over the file's
    ``statistics`` block, or ``None`` when neither asks for trials."""
    block = spec.statistics
    if trials is None and block is None:
        return None
    return (block.trials if trials is None else trials,
            seed if seed is not None else (0 if block is None else block.seed))


def with_statistics(link, result, *, trials, seed, progress=None):
    """``result`` holding the statistical budget of ``link`` (:func:`run_statistics`)."""
    return replace(result, statistics=run_statistics(link, result, trials=trials, seed=seed, progress=progress))


def trial_slacks_db(link, result, *, trials, seed):
    """Each trial's slack [dB] and where it binds, from the same draws as :func:`run_statistics`.

    A trial's slack is the least, over the wavelength axis, of margin − required margin and
    overload − received power; the trial closes (counts in the yield) where it is ≥ 0, the same
    test as :attr:`Statistics.yield_fraction`. Returns ``(slack_db, wavelength_index,
    by_overload, margin_db)``, each of length ``trials``: the slack, the wavelength where it binds,
    whether the overload binds there, and the trial's margin at that wavelength.
    """
    parts = []
    for _, _, margin_db in _chunks(link, trials, seed):
        slack_db = margin_db - result.required_margin_db
        over_db = (np.full(slack_db.shape, np.inf) if result.overload_dbm is None
                   else result.overload_dbm - result.sensitivity_dbm - margin_db)
        by_overload = over_db < slack_db
        slack_db = np.where(by_overload, over_db, slack_db)
        index = np.argmin(slack_db, axis=1)
        picked = np.arange(index.size), index
        parts.append((slack_db[picked], index, by_overload[picked], margin_db[picked]))
    return tuple(np.concatenate(column) for column in zip(*parts, strict=True))
