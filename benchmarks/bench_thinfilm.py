"""Speed of the vectorised coherent thin-film solver against a per-wavelength reference loop.

Run with ``python benchmarks/bench_thinfilm.py``. Builds a 20-layer absorbing, dispersive
stack over 2,000 wavelengths, evaluates it with :func:`linkbudget.physics.thinfilm.coherent_stack`
(one numpy pass) and with the `tmm` reference library's ``coh_tmm`` (one call per wavelength
and polarization), checks that both agree to 1e-9 in R and T, and prints the speed ratio
(target: at least 50x). Both timings are the best of a few repeats in the same run.
"""

import sys
import time

import numpy as np
import tmm

from linkbudget.physics.thinfilm import coherent_stack

N_LAYERS = 20
N_WAVELENGTHS = 2000
ANGLE_RAD = np.deg2rad(30.0)
N_INCIDENT = 1.0
N_EXIT = 1.52 + 1e-6j
TOLERANCE = 1e-9
TARGET_RATIO = 50.0


def build_stack(seed=20240601):
    """Dispersive absorbing layers: n(λ) = A + B/λ² (λ in µm), κ(λ) = κ0·(1 µm/λ)."""
    rng = np.random.default_rng(seed)
    wavelength_m = np.linspace(0.4e-6, 2.0e-6, N_WAVELENGTHS)
    wavelength_um = wavelength_m * 1e6
    a = rng.uniform(1.3, 2.4, (N_LAYERS, 1))
    b = rng.uniform(0.0, 0.02, (N_LAYERS, 1))
    kappa0 = rng.uniform(0.0, 0.3, (N_LAYERS, 1))
    layer_index = a + b / wavelength_um**2 + 1j * kappa0 / wavelength_um
    thickness_m = rng.uniform(20e-9, 300e-9, N_LAYERS)
    return layer_index, thickness_m, wavelength_m


def run_vectorised(layer_index, thickness_m, wavelength_m):
    response = coherent_stack(
        layer_index,
        thickness_m,
        wavelength_m,
        n_incident=N_INCIDENT,
        n_exit=N_EXIT,
        angle_rad=ANGLE_RAD,
        polarization="unpolarized",
    )
    return response.reflectance, response.transmittance


def run_reference(layer_index, thickness_m, wavelength_m):
    d_list = [np.inf, *thickness_m, np.inf]
    reflectance = np.empty(wavelength_m.size)
    transmittance = np.empty(wavelength_m.size)
    for k, lam in enumerate(wavelength_m):
        n_list = [N_INCIDENT, *layer_index[:, k], N_EXIT]
        s = tmm.coh_tmm("s", n_list, d_list, ANGLE_RAD, lam)
        p = tmm.coh_tmm("p", n_list, d_list, ANGLE_RAD, lam)
        reflectance[k] = 0.5 * (s["R"] + p["R"])
        transmittance[k] = 0.5 * (s["T"] + p["T"])
    return reflectance, transmittance


def best_time(function, args, repeats):
    best, result = np.inf, None
    for _ in range(repeats):
        start = time.perf_counter()
        result = function(*args)
        best = min(best, time.perf_counter() - start)
    return best, result


def main():
    args = build_stack()
    fast_s, (r_fast, t_fast) = best_time(run_vectorised, args, repeats=20)
    slow_s, (r_slow, t_slow) = best_time(run_reference, args, repeats=3)
    delta_r = np.max(np.abs(r_fast - r_slow))
    delta_t = np.max(np.abs(t_fast - t_slow))
    ratio = slow_s / fast_s
    print(f"stack: {N_LAYERS} absorbing layers, {N_WAVELENGTHS} wavelengths, unpolarized, 30 deg")
    print(f"coherent_stack (vectorised): {fast_s * 1e3:9.2f} ms  (best of 20)")
    print(f"tmm.coh_tmm per wavelength:  {slow_s * 1e3:9.2f} ms  (best of 3)")
    print(f"speed ratio: {ratio:.0f}x  (target >= {TARGET_RATIO:.0f}x)")
    print(f"agreement: max |dR| = {delta_r:.2e}, max |dT| = {delta_t:.2e}  (limit {TOLERANCE:g})")
    ok = delta_r <= TOLERANCE and delta_t <= TOLERANCE and ratio >= TARGET_RATIO
    print("PASS" if ok else "FAIL")
    return 0 if ok else 1


if __name__ == "__main__":
    sys.exit(main())
