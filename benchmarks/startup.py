"""CLI start-up time against the floor of importing numpy, measured in one run.

Prints the ratio of `linkbudget --help` and of `linkbudget run <example>` to
`python -c "import numpy"`, each the median of several fresh processes.
Target (issue 2): --help within 1.5x of the numpy floor.

Run: python benchmarks/startup.py [--repeats N]
"""

import argparse
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
EXAMPLE = ROOT / "configs" / "quarry-uplink.yaml"
CLI = [sys.executable, "-c", "import sys; from linkbudget.cli import main; sys.argv[0] = 'linkbudget'; main()"]


def median_seconds(command, repeats):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        subprocess.run(command, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False)
        times.append(time.perf_counter() - start)
    return statistics.median(times)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=15)
    repeats = parser.parse_args().repeats
    commands = {
        "floor: python -c 'import numpy'": [sys.executable, "-c", "import numpy"],
        "linkbudget --help": [*CLI, "--help"],
        "linkbudget --version": [*CLI, "--version"],
        f"linkbudget run {EXAMPLE.name}": [*CLI, "run", str(EXAMPLE)],
    }
    median_seconds(commands["linkbudget --help"], 2)  # warm the file cache
    results = {name: median_seconds(command, repeats) for name, command in commands.items()}
    floor = next(iter(results.values()))
    print(f"median of {repeats} fresh processes each")
    for name, seconds in results.items():
        print(f"{name:40s} {seconds * 1e3:7.1f} ms   {seconds / floor:5.2f} x floor")
    ratio = results["linkbudget --help"] / floor
    print(f"--help / numpy floor = {ratio:.2f} (target <= 1.5): {'met' if ratio <= 1.5 else 'NOT met'}")


if __name__ == "__main__":
    main()
