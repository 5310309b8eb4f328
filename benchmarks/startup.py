"""CLI start-up time against the floor of importing numpy, measured in one run.

Runs the installed console script (``linkbudget`` beside this Python), so that the package is
imported as users import it, compiled files included. Each round runs the numpy floor and then
every command once, in turn, so that a slow spell of the machine touches all of them alike (all
with one BLAS thread, :data:`SINGLE_THREADED`); the ratio of each command to the floor is taken
within a round and printed as the median of the rounds with its min–max.

Targets (issue 13): ``run`` on each shipped example ≤ 2.5× the floor, ``--help`` ≤ 0.7×.

Run: python benchmarks/startup.py [--rounds N]
"""

import argparse
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
CONSOLE_SCRIPT = Path(sys.executable).with_name("linkbudget")
FLOOR = [sys.executable, "-c", "import numpy"]
#: Target ratio to the floor for each command name; ``run`` of every shipped example shares one.
TARGETS = {"--help": 0.7, "run": 2.5}


#: One BLAS thread in the floor and in every command: numpy's import starts a thread per core, so
#: with more the floor's time swings with the machine's load (one core busy: 77 -> 123 ms here,
#: while ``run`` stayed near 350 ms), and every ratio read low on a busy machine.
SINGLE_THREADED = {**os.environ, "OPENBLAS_NUM_THREADS": "1", "OMP_NUM_THREADS": "1", "MKL_NUM_THREADS": "1"}


def seconds_of(command):
    start = time.perf_counter()
    subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False, env=SINGLE_THREADED)
    return time.perf_counter() - start


def commands():
    """name -> (argument list, target ratio)."""
    named = {"--help": ([str(CONSOLE_SCRIPT), "--help"], TARGETS["--help"])}
    for example in sorted((ROOT / "configs").glob("*.yaml")):
        named[f"run {example.name}"] = ([str(CONSOLE_SCRIPT), "run", str(example)], TARGETS["run"])
    return named


def ratios_by_round(named, rounds):
    """(name -> the ratio of the command to the floor run just before it, one per round; the
    floor's times [s])."""
    ratios, floors = {name: [] for name in named}, []
    for _ in range(rounds):
        for name, (command, _target) in named.items():
            floors.append(seconds_of(FLOOR))
            ratios[name].append(seconds_of(command) / floors[-1])
    return ratios, floors


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--rounds", type=int, default=11)
    rounds = parser.parse_args().rounds
    if not CONSOLE_SCRIPT.exists():
        sys.exit(f"no console script at {CONSOLE_SCRIPT}: install the package into this Python first")
    named = commands()
    for command, _target in named.values():  # warm the file cache
        seconds_of(command)
    load_before = os.getloadavg()[0]
    ratios, floors = ratios_by_round(named, rounds)
    print(f"ratio to `python -c 'import numpy'` run just before it; median (min-max) of {rounds} rounds")
    print(f"floor median {statistics.median(floors) * 1e3:.0f} ms; 1-minute load average {load_before:.2f} before, "
          f"{os.getloadavg()[0]:.2f} after (one BLAS thread everywhere, see SINGLE_THREADED)")
    met = True
    for name, (_command, target) in named.items():
        median = statistics.median(ratios[name])
        verdict = "met" if median <= target else "NOT met"
        met &= median <= target
        print(f"linkbudget {name:42s} {median:5.2f} ({min(ratios[name]):.2f}-{max(ratios[name]):.2f})"
              f"  target <= {target}: {verdict}")
    print("all targets met" if met else "some targets NOT met")


if __name__ == "__main__":
    main()
