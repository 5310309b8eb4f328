"""The statistical budget of a 40-segment link against a numpy floor, and its peak memory.

Run: python benchmarks/monte_carlo.py [--trials N]   (default 10^6)

Two links of our own invention (a hillside vineyard sensor trunk), 40 segments each, at one
wavelength: (A) datasheet values only (fibres with toleranced attenuation, connectors, counted
splices, elements: normal, triangular and uniform spreads, one batch); (B) the same with three
geometric joints (splices computed from a drawn offset and drawn mode field diameters).
Printed, as ratios measured in this one run:

(a) the time of :func:`linkbudget.statistics.run_statistics` over the floor: the same random
    numbers drawn with numpy alone (one PCG64 stream per spread and per counted splice, numpy's
    own normal, uniform and triangular draws, no truncation) and the rows summed (a fibre's as
    length × attenuation), in chunks of 2^16 trials; targets <= 2 (A) and <= 5 (B);
(b) the peak memory traced (``tracemalloc``, which sees numpy's buffers) of a statistical run and
    the process's peak resident size (``resource``, imports included); target < 500 MB;
(c) the engine's time per trial at N against N / 10 (1.0 is linear in the draws, as the
    evaluation must be; target <= 1.25, as for the wavelengths in ``evaluation_floor.py``).

The timed runs and the traced run are separate (tracing slows allocation). Times are CPU times,
the least of :data:`REPEATS` runs each.
"""

import argparse
import resource
import time
import tracemalloc

import numpy as np

import linkbudget
from linkbudget.segments.cases import FAR_BOUND_SIGMA
from linkbudget.statistics import run_statistics

TARGET_DATASHEET_RATIO = 2.0
TARGET_GEOMETRIC_RATIO = 5.0
TARGET_PEAK_MB = 500.0
TARGET_DECADE_PER_TRIAL_RATIO = 1.25
#: Each time is the least of this many runs, in CPU time of this process (``time.process_time``):
#: on a shared machine the wall-clock time of one run counts the other processes' load too.
REPEATS = 2

HEAD = """\
# Invented scenario: a hillside vineyard's sensor trunk, 40 segments.
title: vineyard sensor trunk, statistics benchmark
wavelength: 1550 nm
source:
  power: {mean: 0 dBm, sigma: 0.5 dB}
receiver:
  sensitivity: -45 dBm
  required_margin: 3 dB
chain:
"""


def chain_text(geometric_joints):
    """Ten blocks of four segments: fibre, connector, splices (or a geometric splice), element."""
    items = []
    for block in range(10):
        items.append(f"  - {{name: fibre {block}, kind: fiber, length: 1.2 km, mode_field_diameter: 10.4 um, "
                     "attenuation: {min: 0.19 dB/km, typ: 0.21 dB/km, max: 0.25 dB/km}}")
        items.append(f"  - {{name: connector {block}, kind: connector, loss: {{mean: 0.25 dB, sigma: 0.08 dB, "
                     "batch: lot-3}}" if block % 3 == 0 else
                     f"  - {{name: connector {block}, kind: connector, loss: {{mean: 0.25 dB, sigma: 0.08 dB}}}}")
        if geometric_joints and block % 3 == 1:
            items.append(f"  - {{name: splice {block}, kind: splice, offset: {{mean: 0.6 um, sigma: 0.2 um}}, "
                         "mode_field_diameter_before: {mean: 10.4 um, sigma: 0.2 um}, "
                         "mode_field_diameter_after: {mean: 9.8 um, sigma: 0.2 um}}")
        else:
            items.append(f"  - {{name: splices {block}, kind: splice, count: 2, "
                         "loss: {mean: 0.05 dB, sigma: 0.02 dB}}")
        items.append(f"  - {{name: allowance {block}, kind: element, loss: {{min: 0.1 dB, max: 0.3 dB}}}}")
    return HEAD + "\n".join(items) + "\n"


def spread_draws(link):
    """(spread, copies) of every spread the link draws, in chain order, the source first."""
    found = [(link.spec.source.power, 1)]
    for segment in link.segments:
        for key in ("attenuation", "loss", "offset", "mode_field_diameter_before", "mode_field_diameter_after"):
            spread = getattr(segment, key, None)
            if spread is not None and not spread.is_fixed:
                found.append((spread, getattr(segment, "count", 1) if key == "loss" else 1))
    return found


def floor_seconds(link, trials, seed):
    """The floor: the same random numbers (a PCG64 stream per spread) mapped to their values and
    summed with numpy alone, in chunks of 2^16 trials; fibre losses as length × attenuation."""
    lengths = {id(segment.attenuation): segment.length.typ_value for segment in link.segments
               if segment.kind == "fiber"}
    spreads = spread_draws(link)
    start = time.process_time()
    streams = [np.random.Generator(np.random.PCG64(np.random.SeedSequence(seed, spawn_key=(k,))))
               for k in range(sum(copies for _, copies in spreads))]
    chunk = 2**16
    total = 0.0
    for first in range(0, trials, chunk):
        count = min(chunk, trials - first)
        margin = np.zeros(count)
        stream = iter(streams)
        for spread, copies in spreads:
            for _ in range(copies):
                generator = next(stream)
                distribution = spread.distribution_name
                if distribution == "normal":
                    values = spread.mean + spread.sigma * generator.standard_normal(count)
                elif distribution == "uniform":
                    values = generator.uniform(spread.low, spread.high, count)
                else:
                    values = generator.triangular(spread.low, spread.typ_value, spread.high, count)
                margin += values * lengths.get(id(spread), 1.0)
        total += margin.sum()
    return time.process_time() - start


def engine_seconds(link, result, trials, seed):
    start = time.process_time()
    run_statistics(link, result, trials=trials, seed=seed)
    return time.process_time() - start


def traced_peak_mb(link, result, trials, seed):
    tracemalloc.start()
    run_statistics(link, result, trials=trials, seed=seed)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    return peak / 2**20


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--trials", type=int, default=1_000_000)
    trials = parser.parse_args().trials
    print(f"{trials} trials, one wavelength; normal bounds within {FAR_BOUND_SIGMA:g} sigma are applied")
    for label, geometric, target in (("A datasheet only", False, TARGET_DATASHEET_RATIO),
                                     ("B with 3 geometric joints", True, TARGET_GEOMETRIC_RATIO)):
        link = linkbudget.load(chain_text(geometric))
        result = linkbudget.evaluate(link)
        floor = min(floor_seconds(link, trials, seed=1) for _ in range(REPEATS))
        engine = min(engine_seconds(link, result, trials, seed=1) for _ in range(REPEATS))
        print(f"{label}: {len(link.segments)} segments, engine {engine / trials * 1e9:.0f} ns/trial, "
              f"floor {floor / trials * 1e9:.0f} ns/trial, ratio {engine / floor:.2f} (target <= {target:g})")
        fewer = trials // 10
        fewer_seconds = min(engine_seconds(link, result, fewer, seed=1) for _ in range(REPEATS))
        growth = (engine / trials) / (fewer_seconds / fewer)
        print(f"    engine per trial at {trials} / at {fewer}: {growth:.2f} (1.0 linear; "
              f"target <= {TARGET_DECADE_PER_TRIAL_RATIO:g})")
    peak = traced_peak_mb(link, result, trials, seed=1)
    resident = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"peak traced memory of a run (B): {peak:.0f} MB; process peak resident {resident:.0f} MB "
          f"(target < {TARGET_PEAK_MB:g} MB)")


if __name__ == "__main__":
    main()
