"""Evaluation and JSON output of a wavelength sweep against a numpy floor, and a long chain's growth.

Run: python benchmarks/evaluation_floor.py [--repeats N]

A link of our own invention (a greenhouse spectrometer feed) holds a two-layer coating,
dispersive catalog media (fused silica, sapphire, air from their dispersion formulas), a connector
computed from its offset, tilt, gap and mode field diameters, and free-space gaps, one of them
into an aperture. It is swept over N = 1,000, 10,000 and 100,000 wavelengths. Printed, all as
ratios measured in this one run (times are the best of a few repeats with ``time.perf_counter``, at
least two at every size: a process's first evaluation of a size also pays the operating system's
first touch of the memory it takes, which the best of one would count at one size and not another):

(a) evaluation time per point, and the ratio of the time per point at 10 N to that at N
    (1.0 is linear; target <= 1.25, the 2.5-per-doubling rule of ``output_scaling.py``);
(b) evaluation time over a numpy floor that computes, as plain vectorised numpy, the same number
    of complex exponentials and 2x2 complex matrix products the link physically needs
    (:func:`floor_counts` says how they are counted); target <= 20;
(c) the JSON output time (``result_dict`` and the JSON writer, through the command line's own
    ``_emit`` to an ``--output`` file, as ``linkbudget run --format json -o FILE`` writes it) over
    the evaluation time, target <= 2; and the JSON step's peak traced memory (``tracemalloc``,
    which also sees numpy's buffers) over the size of the file written, target <= 2;
(d) the evaluation of chains of 250, 500 and 1,000 segments at a few wavelengths: the ratio of
    each doubling (2.0 is linear; target <= 2.5).
"""

import argparse
import json
import tempfile
import time
import tracemalloc
from pathlib import Path

import numpy as np

import linkbudget
from linkbudget.cli import Format, _emit

SWEEP_POINTS = (1_000, 10_000, 100_000)
CHAIN_SEGMENTS = (250, 500, 1_000)
CHAIN_WAVELENGTHS = "[1270 nm, 1310 nm, 1550 nm, 1610 nm]"
BAND_FROM_NM, BAND_TO_NM = 1300.0, 1600.0

TARGET_DECADE_PER_POINT_RATIO = 1.25
TARGET_FLOOR_RATIO = 20.0
TARGET_JSON_TIME_RATIO = 2.0
TARGET_JSON_MEMORY_RATIO = 2.0
TARGET_DOUBLING_RATIO = 2.5

SWEEP_LINK = """\
# Invented scenario: a greenhouse leaf-moisture spectrometer feed swept over 1300-1600 nm.
title: greenhouse spectrometer feed, benchmark sweep
band: {{from: {start} nm, to: {stop} nm, step: {step!r} nm}}
source:
  power: {{min: 2 dBm, typ: 3 dBm, max: 4 dBm}}
receiver:
  sensitivity: -40 dBm
  required_margin: 3 dB
chain:
  - name: launch fibre
    kind: fiber
    length: 2 m
    attenuation: 0.4 dB/km
    material: fused-silica
    mode_field_diameter: {{min: 9.9 um, typ: 10.4 um, max: 10.9 um}}
  - name: bulkhead
    kind: connector
    offset: {{typ: 0.3 um, max: 1.0 um}}
    tilt: {{typ: 0.1 deg, max: 0.3 deg}}
    gap: {{typ: 2 um, max: 5 um}}
  - name: probe fibre
    kind: fiber
    length: 1 m
    attenuation: 0.4 dB/km
    material: fused-silica
    mode_field_diameter: {{min: 9.0 um, typ: 9.2 um, max: 9.6 um}}
  - name: launch air
    kind: gap
    length: 5 mm
    aperture: 1 mm
  - name: front AR
    kind: coating
    layers:
      - {{material: magnesium-fluoride, quarter_wave: 1450 nm}}
      - {{material: tantalum-pentoxide, quarter_wave: 1450 nm, quarter_waves: 2}}
  - name: window
    kind: medium
    thickness: 3 mm
    material: fused-silica
    multiple_reflections: true
  - name: sample cell
    kind: medium
    thickness: {{min: 1.9 mm, typ: 2 mm, max: 2.1 mm}}
    material: sapphire
  - name: exit air
    kind: gap
    length: 20 mm
  - name: collection optics
    kind: element
    loss: {{typ: 3 dB, max: 4 dB}}
"""

#: What the sweep link holds, for the floor (checked against its JSON result in :func:`main`).
COATING_LAYERS = 2
FACES = 5  # interface rows: two at the bulkhead's air gap, probe fibre → air, window → sapphire → air
MEDIA = 6  # two fibres, two air gaps, the window, the sapphire cell: each a propagation
POLARIZATIONS = 2
CASES = 3  # typ, worst, best


def floor_counts():
    """Complex exponentials and 2x2 complex matrix products per wavelength point of the sweep link.

    - Coating, transfer-matrix method: per polarization and case, each layer's phase is one
      complex exponential; its L layers and L + 1 interfaces are 2L + 1 matrices, 2L products.
      2 layers x 2 polarizations x 3 cases: 12 exponentials, 24 products.
    - Faces: each bare face is one interface matrix joined to the chain (one product) per
      polarization and case: 5 faces x 2 x 3 = 30 products.
    - Media: each medium's propagation exp(i·2π·N·d/λ) with complex N, per case: 6 x 3 = 18.
    - The geometric joint: one Gaussian overlap (for circular modes one complex exponential of the
      offset, tilt and gap terms together) per distinct corner the cases need. The loss grows with
      offset, tilt and gap, so the worst case needs only their high ends and the best case their
      low ends; the two mode field diameters are not monotonic (2 x 2 ends each), nor is the
      unknown tilt direction (along or against the offset, its two extremes for circular modes):
      1 (typ, tilt across the offset) + 2 cases x 4 x 2 = 17 exponentials.
    - The gap into the aperture: T = 1 - exp(-2a²/w²), one exponential per case: 3.

    Returns (exponentials, products): (50, 54).
    """
    coating_exponentials = COATING_LAYERS * POLARIZATIONS * CASES
    coating_products = 2 * COATING_LAYERS * POLARIZATIONS * CASES
    face_products = FACES * POLARIZATIONS * CASES
    media_exponentials = MEDIA * CASES
    joint_exponentials = 1 + 2 * (2 * 2) * 2
    aperture_exponentials = CASES
    exponentials = coating_exponentials + media_exponentials + joint_exponentials + aperture_exponentials
    return exponentials, coating_products + face_products


def sweep_text(n_points):
    """The sweep link over ``n_points`` wavelengths: the step is a hair over span / (n - 1), so the
    band holds exactly n points (its last step a hair shorter) and never one over the reader's limit."""
    step_nm = (BAND_TO_NM - BAND_FROM_NM) / (n_points - 1) * (1 + 1e-9)
    return SWEEP_LINK.format(start=BAND_FROM_NM, stop=BAND_TO_NM, step=step_nm)


def chain_text(n_segments):
    """A chain of ``n_segments``: a repeating unit of fibres, splices (some from geometry),
    connectors, a lone fused-silica window between connectors, and an allowance."""
    unit = [
        "{{name: fibre {i}, kind: fiber, length: 20 m, attenuation: 0.4 dB/km,"
        " mode_field_diameter: {{min: 9.9 um, typ: 10.4 um, max: 10.9 um}}}}",
        "{{name: splice {i}, kind: splice, offset: {{typ: 0.2 um, max: 0.6 um}}}}",
        "{{name: jumper {i}, kind: fiber, length: 3 m, attenuation: 0.5 dB/km, mode_field_diameter: 10.4 um}}",
        "{{name: panel {i}, kind: connector, loss: {{typ: 0.01 dB, max: 0.02 dB}}}}",
        "{{name: cabinet window {i}, kind: medium, thickness: 1 mm, material: fused-silica}}",
        "{{name: patch {i}, kind: connector, loss: {{typ: 0.01 dB, max: 0.02 dB}}}}",
        "{{name: drop {i}, kind: fiber, length: 5 m, attenuation: 0.4 dB/km}}",
        "{{name: field splice {i}, kind: splice, loss: {{typ: 0.005 dB, max: 0.01 dB}}}}",
        "{{name: tail {i}, kind: fiber, length: 5 m, attenuation: 0.4 dB/km}}",
        "{{name: allowance {i}, kind: element, loss: 0.001 dB}}",
    ]
    entries = [unit[k % len(unit)].format(i=k // len(unit)) for k in range(n_segments)]
    chain = "".join(f"  - {entry}\n" for entry in entries)
    return ("# Invented scenario: a long campus distribution run, for the chain-length benchmark.\n"
            f"title: campus run of {n_segments} segments\nchannels: {CHAIN_WAVELENGTHS}\n"
            "source:\n  power: 0 dBm\nreceiver:\n  sensitivity: -90 dBm\nchain:\n" + chain)


def best_seconds(function, repeats):
    """The least time of ``repeats`` calls of ``function`` and its last value (each call's value
    is let go before the next call: held, it would make the next call take all-new memory, as no
    single evaluation does)."""
    best, value = np.inf, None
    for _ in range(repeats):
        value = None
        start = time.perf_counter()
        value = function()
        best = min(best, time.perf_counter() - start)
    return best, value


def floor_inputs(n_points, n_exponentials, n_products, seed=20261202):
    """Random exponents and matrices of the shapes the floor works on (not timed)."""
    rng = np.random.default_rng(seed)
    shape = (n_exponentials, n_points)
    exponent = 1j * rng.uniform(0, 2 * np.pi, shape) - rng.uniform(0, 1e-3, shape)

    def matrices():
        return [rng.normal(size=(n_products, n_points)) + 1j * rng.normal(size=(n_products, n_points))
                for _ in range(4)]

    return exponent, matrices(), matrices()


def numpy_floor(exponent, left, right):
    """The floor itself: the complex exponentials, and the 2x2 products written out element-wise
    over stacked matrices ([[a, b], [c, d]] as four arrays)."""
    phases = np.exp(exponent)
    a, b, c, d = left
    e, f, g, h = right
    product = (a * e + b * g, a * f + b * h, c * e + d * g, c * f + d * h)
    return phases, product


def json_step(result, path):
    """The JSON output as ``linkbudget run --format json -o FILE --force`` writes it."""
    _emit(result, Format.json, path, True, protected=())


def traced_peak_bytes(function):
    tracemalloc.start()
    try:
        function()
        return tracemalloc.get_traced_memory()[1]
    finally:
        tracemalloc.stop()


def step_ratios(by_size):
    """Each value over the one before it, in the order of the sizes."""
    values = list(by_size.values())
    return [large / small for small, large in zip(values, values[1:], strict=False)]


def verdict(ratio, target):
    return f"(target <= {target:g}: {'meets' if ratio <= target else 'MISSES'})"


def sweep_section(repeats, folder):
    n_exponentials, n_products = floor_counts()
    print(f"sweep link: per point {n_exponentials} complex exponentials and {n_products} 2x2 complex products "
          "in the floor (see floor_counts)")
    print(f"{'points':>8} {'eval us/pt':>11} {'floor us/pt':>12} {'eval/floor':>11} {'json/eval':>10} "
          f"{'json MB':>8} {'peak/size':>10}")
    per_point, worst = {}, {"floor": 0.0, "json": 0.0, "memory": 0.0}
    for n_points in SWEEP_POINTS:
        link = linkbudget.load(sweep_text(n_points))
        tries = max(2, repeats if n_points < 100_000 else repeats // 2)
        evaluation_s, result = best_seconds(lambda: linkbudget.evaluate(link), tries)  # noqa: B023
        if result.wavelength_m.size != n_points:
            raise SystemExit(f"the band holds {result.wavelength_m.size} points, not {n_points}")
        inputs = floor_inputs(n_points, n_exponentials, n_products)
        floor_s, _ = best_seconds(lambda: numpy_floor(*inputs), repeats)  # noqa: B023
        output = folder / f"sweep-{n_points}.json"
        json_s, _ = best_seconds(lambda: json_step(result, output), tries)  # noqa: B023
        size_bytes = output.stat().st_size
        peak_bytes = traced_peak_bytes(lambda: json_step(result, output))  # noqa: B023
        if n_points == SWEEP_POINTS[0]:
            check_counts(output)
        per_point[n_points] = evaluation_s / n_points
        ratios = {"floor": evaluation_s / floor_s, "json": json_s / evaluation_s, "memory": peak_bytes / size_bytes}
        worst = {key: max(worst[key], ratios[key]) for key in worst}
        print(f"{n_points:>8} {per_point[n_points] * 1e6:>11.2f} {floor_s / n_points * 1e6:>12.3f} "
              f"{ratios['floor']:>11.1f} {ratios['json']:>10.2f} {size_bytes / 1e6:>8.1f} {ratios['memory']:>10.2f}")
    decades = step_ratios(per_point)
    print("(a) time per point at 10N / at N: " + ", ".join(f"{ratio:.2f}" for ratio in decades)
          + f"  (1.0 linear) {verdict(max(decades), TARGET_DECADE_PER_POINT_RATIO)}")
    print(f"(b) evaluation / numpy floor, largest: {worst['floor']:.1f} {verdict(worst['floor'], TARGET_FLOOR_RATIO)}")
    print(f"(c) JSON / evaluation, largest: {worst['json']:.2f} {verdict(worst['json'], TARGET_JSON_TIME_RATIO)}")
    print(f"    JSON peak memory / output size, largest: {worst['memory']:.2f} "
          f"{verdict(worst['memory'], TARGET_JSON_MEMORY_RATIO)}")


def check_counts(output):
    """The floor's counts of faces and coating layers must be the link's own (from its JSON rows)."""
    kinds = [row["kind"] for row in json.loads(output.read_text(encoding="utf-8"))["rows"]]
    if kinds.count("interface") != FACES or kinds.count("coating") != 1:
        raise SystemExit(f"the sweep link's rows are {kinds}: update the floor's counts")


def chain_section(repeats):
    seconds = {}
    for n_segments in CHAIN_SEGMENTS:
        link = linkbudget.load(chain_text(n_segments))
        seconds[n_segments], result = best_seconds(lambda: linkbudget.evaluate(link), repeats)  # noqa: B023
    doublings = step_ratios(seconds)
    print(f"(d) chain at {len(result.wavelength_m)} wavelengths: "
          + ", ".join(f"{n} segments {seconds[n] * 1e3:.0f} ms" for n in CHAIN_SEGMENTS)
          + f" ({len(result.rows)} rows at {CHAIN_SEGMENTS[-1]})")
    print("    doubling ratios: " + ", ".join(f"{ratio:.2f}" for ratio in doublings)
          + f"  (2.0 linear) {verdict(max(doublings), TARGET_DOUBLING_RATIO)}")


def main():
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3, 
                        help="repeats per timing (half of them, at least two, at 100,000 points)")
    repeats = parser.parse_args().repeats
    with tempfile.TemporaryDirectory() as folder:
        sweep_section(repeats, Path(folder))
    chain_section(repeats)


if __name__ == "__main__":
    main()
