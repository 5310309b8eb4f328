"""Closed forms and material constants written for the tests, independently of the package.

Each function here is a published formula typed in from its source (named in its docstring), or
a reader of the unchanged refractiveindex.info files in ``tests/data/nk/``; none of them calls
the package, so a test that compares the package with them checks something.
"""

import math
from functools import cache
from pathlib import Path

import numpy as np
import yaml

NK_DIR = Path(__file__).resolve().parent / "data" / "nk"
DB_PER_NEPER = 10.0 / math.log(10.0)  # 10·log10(e) = 4.342944819 dB per neper


def db(transmittance):
    """Loss in dB of a power transmittance (positive when power is lost)."""
    return -10.0 * np.log10(transmittance)


def dbm(milliwatt):
    return 10.0 * math.log10(milliwatt)


# --- material constants, from the raw refractiveindex.info files -------------------------------

@cache
def _nk_data(filename):
    return yaml.safe_load((NK_DIR / filename).read_text(encoding="utf-8"))["DATA"][0]


def nk_file_index(filename, wavelength_nm):
    """Complex index n + iκ at a vacuum wavelength, from one refractiveindex.info file.

    Formula 1 (Sellmeier): n² − 1 = C0 + Σ B·λ²/(λ² − C²); formula 6 (gases):
    n − 1 = C0 + Σ B/(C − λ⁻²); "tabulated nk" ("tabulated n": κ = 0): n and κ linear in λ
    between rows. λ in µm.
    """
    data = _nk_data(filename)
    lam = wavelength_nm / 1000.0
    if data["type"].startswith("tabulated"):
        table = np.array([row.split() for row in data["data"].strip().splitlines()], dtype=float)
        kappa = np.interp(lam, table[:, 0], table[:, 2]) if data["type"] == "tabulated nk" else 0.0
        return complex(np.interp(lam, table[:, 0], table[:, 1]), kappa)
    c = [float(v) for v in data["coefficients"].split()]
    pairs = list(zip(c[1::2], c[2::2], strict=True))
    if data["type"] == "formula 1":
        return complex(math.sqrt(1 + c[0] + sum(b * lam**2 / (lam**2 - cc**2) for b, cc in pairs)))
    if data["type"] == "formula 6":
        return complex(1 + c[0] + sum(b / (cc - lam**-2) for b, cc in pairs))
    raise AssertionError(f"{filename}: no reader for {data['type']}")


def air(nm):
    return nk_file_index("air-Ciddor.yml", nm).real


def silica(nm):
    return nk_file_index("SiO2-Malitson.yml", nm).real


def magnesium_fluoride(nm):
    return nk_file_index("MgF2-Dodge-o.yml", nm).real


def water(nm):
    return nk_file_index("H2O-Segelstein.yml", nm)


# --- closed forms --------------------------------------------------------------------------------

def flux_law_db(kappa, wavelength_m, length_m):
    """Bulk loss 10·log10(e)·α·L with α = 4πκ/λ (Born & Wolf)."""
    return DB_PER_NEPER * 4 * math.pi * kappa / wavelength_m * length_m


def face(n_before, n_after):
    """Normal-incidence Fresnel face: (R, T), T = Re(N_B)/Re(N_A)·|2N_A/(N_A + N_B)|²."""
    n_before, n_after = complex(n_before), complex(n_after)
    r = (n_before - n_after) / (n_before + n_after)
    t = 2 * n_before / (n_before + n_after)
    return abs(r) ** 2, n_after.real / n_before.real * abs(t) ** 2


def face_loss_db(n_before, n_after):
    return db(face(n_before, n_after)[1])


def marcuse_mode_radius_m(core_radius_m, numerical_aperture, wavelength_m):
    """w = a·(0.65 + 1.619·V^−1.5 + 2.879·V^−6), V = 2π·a·NA/λ (Marcuse 1977)."""
    v = 2 * math.pi * core_radius_m * numerical_aperture / wavelength_m
    return core_radius_m * (0.65 + 1.619 * v**-1.5 + 2.879 * v**-6)


def overlap_1d(w1_m, w2_m, wavelength_m, *, n, offset_m=0.0, tilt_rad=0.0, separation_m=0.0):
    """One axis of the power overlap of two Gaussian modes, from the Gaussian integral.

    Mode 1, waist w1, travels D in index n: u1 = exp(−p1·(x − d)²) with p1 = ik/(2q1),
    q1 = D + i·π·n·w1²/λ, k = 2πn/λ (Kogelnik & Li 1966); mode 2 has its waist w2 there and is
    tilted by θ: u2 = exp(−x²/w2² + ikθx). With ∫exp(−Ax² + Bx)dx = √(π/A)·exp(B²/(4A)),
    η = |∫u1·u2*|² / (∫|u1|²·∫|u2|²) = 2√(Re p1·Re p2)/|A| · exp(2·Re[B²/(4A) − p1·d²]),
    A = p1 + p2, B = 2p1·d − ikθ, p2 = 1/w2². At D = 0 this is Ghatak & Thyagarajan's
    (2w1w2/(w1² + w2²))·exp(−2d²/(w1² + w2²))·(tilt factor) per axis (their eqs 8.69, 8.75).
    The tilt pivots about mode 2's axis in its plane; without a separation its sign is immaterial.
    """
    k = 2 * math.pi * n / wavelength_m
    q1 = separation_m + 1j * math.pi * n * w1_m**2 / wavelength_m
    p1 = 1j * k / (2 * q1)
    p2 = 1 / w2_m**2
    a = p1 + p2
    b = 2 * p1 * offset_m - 1j * k * tilt_rad
    return 2 * math.sqrt(p1.real * p2) / abs(a) * math.exp(2 * (b**2 / (4 * a) - p1 * offset_m**2).real)


def aperture_beam_loss_db(divergence_rad, length_m, aperture_diameter_m, wavelength_m, n):
    """Power outside a circular aperture of a beam launched with far-field half-angle θ.

    w0 = λ/(π·n·θ), z_R = π·w0²·n/λ, w(L) = w0·√(1 + (L/z_R)²) (Kogelnik & Li 1966);
    T = 1 − exp(−2a²/w²) (Siegman 1986).
    """
    w0 = wavelength_m / (math.pi * n * divergence_rad)
    z_r = math.pi * w0**2 * n / wavelength_m
    w = w0 * math.sqrt(1 + (length_m / z_r) ** 2)
    return db(1 - math.exp(-2 * (aperture_diameter_m / 2) ** 2 / w**2))


def kim_db_per_km(visibility_km, wavelength_nm):
    """σ = (3.91/V)·(λ/550 nm)^−q per km, 4.343·σ dB/km; q of Kim et al. 2001."""
    v = visibility_km
    q = 1.6 if v > 50 else 1.3 if v > 6 else 0.16 * v + 0.34 if v > 1 else v - 0.5 if v > 0.5 else 0.0
    return DB_PER_NEPER * 3.91 / v * (wavelength_nm / 550.0) ** -q


def kruse_db_per_km(visibility_km, wavelength_nm):
    """Kruse, McGlauchlin & McQuistan 1962: q = 1.6 above 50 km, 1.3 above 6 km, 0.585·V^(1/3) below."""
    v = visibility_km
    q = 1.6 if v > 50 else 1.3 if v > 6 else 0.585 * v ** (1 / 3)
    return DB_PER_NEPER * 3.91 / v * (wavelength_nm / 550.0) ** -q


def oblique_face_s(n_before, n_after, angle_rad):
    """Fresnel s-polarised face of two transparent media at incidence θ: (R, T) (Hecht, Optics).

    r_s = (n1·cosθ1 − n2·cosθ2)/(n1·cosθ1 + n2·cosθ2), T = n2·cosθ2/(n1·cosθ1)·|t_s|²,
    t_s = 2n1·cosθ1/(n1·cosθ1 + n2·cosθ2), Snell n1·sinθ1 = n2·sinθ2.
    """
    cos1 = math.cos(angle_rad)
    cos2 = math.sqrt(1 - (n_before * math.sin(angle_rad) / n_after) ** 2)
    a, b = n_before * cos1, n_after * cos2
    return ((a - b) / (a + b)) ** 2, b / a * (2 * a / (a + b)) ** 2
