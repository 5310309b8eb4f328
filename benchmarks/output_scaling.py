"""Time to load, evaluate and write a link against its size: output time must grow linearly.

Builds links of N elements, each with a long name and a long note (the text limits of the reader,
``linkbudget.yamlread.MAX_TEXT_CHARS``), at N and 2N and 4N up to a file near the 1 MB reading
limit, and times ``load`` + ``evaluate`` + each report format (terminal, JSON, Markdown, CSV) in
this process, best of a few repeats. Prints, per format, the ratio of the time at 2N to the time
at N for each doubling: 2.0 is linear; the target (issue 7 item 19) is at most 2.5 at every
doubling, i.e. no quadratic term in the input size.

Run: python benchmarks/output_scaling.py [--repeats N]
"""

import argparse
import io
import json
import sys
import time

from rich.console import Console

import linkbudget
from linkbudget.report import csv, markdown, terminal
from linkbudget.yamlread import MAX_FILE_BYTES, MAX_TEXT_CHARS

TARGET_DOUBLING_RATIO = 2.5
SIZES = (60, 120, 240, 480)


def link_text(n_elements):
    """A link of ``n_elements`` elements, each named and noted with long (but allowed) text."""
    words = "grey filter wheel position " * (MAX_TEXT_CHARS // 27)
    chain = "".join(f"  - name: \"{number} {words[:MAX_TEXT_CHARS - 8]}\"\n    kind: element\n    loss: 0.01 dB\n"
                    f"    note: \"{words[:MAX_TEXT_CHARS]}\"\n" for number in range(n_elements))
    return ("title: long text scaling\nwavelength: 1550 nm\nsource:\n  power: 0 dBm\n"
            f"receiver:\n  sensitivity: -40 dBm\nchain:\n{chain}")


def terminal_text(result):
    console = Console(file=io.StringIO(), width=100)
    console.print(terminal.render(result))
    return console.file.getvalue()


FORMATS = {
    "terminal": terminal_text,
    "json": lambda result: json.dumps(linkbudget.result_dict(result)),
    "markdown": markdown.render,
    "csv": csv.render,
}


def best_seconds(function, repeats):
    times = []
    for _ in range(repeats):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    repeats = parser.parse_args().repeats
    texts = {size: link_text(size) for size in SIZES}
    if len(texts[SIZES[-1]].encode()) > MAX_FILE_BYTES:
        sys.exit("the largest link is over the reading limit; lower SIZES")
    seconds = {name: {} for name in FORMATS}
    for size, text in texts.items():
        for name, write in FORMATS.items():
            seconds[name][size] = best_seconds(lambda t=text, w=write: w(linkbudget.evaluate(linkbudget.load(t))),
                                               repeats)
    print(f"{'elements':>10}" + "".join(f"{size:>10}" for size in SIZES))
    print(f"{'file kB':>10}" + "".join(f"{len(texts[size].encode()) / 1e3:>10.0f}" for size in SIZES))
    worst = 0.0
    for name, by_size in seconds.items():
        ratios = [by_size[large] / by_size[small] for small, large in zip(SIZES, SIZES[1:], strict=False)]
        worst = max(worst, *ratios)
        print(f"{name:>10}" + "".join(f"{by_size[size]:>9.3f}s" for size in SIZES)
              + "   doubling ratios " + " ".join(f"{ratio:.2f}" for ratio in ratios))
    verdict = "meets" if worst <= TARGET_DOUBLING_RATIO else "MISSES"
    print(f"largest doubling ratio {worst:.2f} (linear 2.0; target <= {TARGET_DOUBLING_RATIO}): {verdict}")


if __name__ == "__main__":
    main()
