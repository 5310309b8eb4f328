"""The shipped example links in ``configs/``, checked against numbers worked out in this file.

Nothing expected here comes from the package: each link's received power (typical, worst, best),
its worst-case margin and its verdict (``closes`` and the exit code of ``linkbudget run``) are
summed here from the link's own datasheet figures and from closed forms written below, with the
material constants read from the unchanged refractiveindex.info copies in ``tests/data/nk/`` by
the few lines of :func:`tests.closedforms.nk_file_index` (not through the package's material loader):

- the lossy-medium flux law α = 4πκ/λ, loss = 10·log10(e)·α·L (Born & Wolf, *Principles of
  Optics*, 1999; Hecht, *Optics*, 2017);
- the normal-incidence Fresnel equations, with the power transmittance as the flux ratio
  T = Re(N_B)/Re(N_A)·|t|² (Born & Wolf; Hecht), and a single-layer coating by the ``tmm``
  package's coherent transfer matrix (S. J. Byrnes, arXiv:1603.02720, 2016);
- the incoherent sum over a thick plate, T1·τ·T2/(1 − R1′·R2·τ²) (Born & Wolf);
- Marcuse's mode-field fit w/a = 0.65 + 1.619·V^−1.5 + 2.879·V^−6 (Marcuse, Bell Syst. Tech. J.
  56, 703, 1977) and the overlap of two Gaussian modes, worked out below from the Gaussian
  integral (Kogelnik, 1964; Ghatak & Thyagarajan, *An Introduction to Fiber Optics*, 1998,
  eqs 8.69/8.75/8.81 as its limits);
- the Gaussian beam (Kogelnik & Li, Appl. Opt. 5, 1550, 1966), the power inside a circular
  aperture 1 − exp(−2a²/w²) (Siegman, *Lasers*, 1986) and Kim's visibility law
  (Kim, McArthur & Korevaar, Proc. SPIE 4214, 26, 2001).

The package's JSON result is rounded to 1e-9 dB, so the tolerance is 1e-6 dB wherever the same
formula is evaluated; a looser one carries its reason beside it.
"""

import json
import math
from functools import cache
from pathlib import Path

import numpy as np
import pytest
import tmm
from numpy.testing import assert_allclose

from tests.closedforms import (
    DB_PER_NEPER,
    air,
    aperture_beam_loss_db,
    db,
    dbm,
    face,
    face_loss_db,
    flux_law_db,
    kim_db_per_km,
    magnesium_fluoride,
    marcuse_mode_radius_m,
    overlap_1d,
    silica,
    water,
)
from tests.conftest import CONFIGS, run_cli

CONFIG_DIR = Path(__file__).resolve().parents[1] / "configs"
DB_TOL = 1e-6  # dB: the JSON's 1e-9 dB rounding, far below
#: Every file of configs/ has its test below.
CHECKED = {
    "quarry-uplink.yaml", "orchard-cwdm-ring.yaml", "flow-cell-probe.yaml", "rooftop-optical-bridge.yaml",
    "wafer-probe-splitter-card.yaml", "fish-tank-turbidity-probe.yaml", "estuary-cwdm-backhaul.yaml",
    "vineyard-frost-fan-broadcast.yaml",
}


# --- the package's answer ------------------------------------------------------------------------

@cache
def shipped(name):
    """(exit code, JSON result) of ``linkbudget run configs/NAME --format json``."""
    result = run_cli("run", CONFIG_DIR / name, "--format", "json")
    return result.exit_code, json.loads(result.stdout)


def row(data, name):
    (entry,) = [segment for segment in data["rows"] if segment["name"] == name]
    return entry


def check_budget(name, launch_dbm, loss_db, *, sensitivity_dbm, required_margin_db, overload_dbm=None):
    """Compare received power, worst margin and verdict of a shipped link with the sums here.

    ``launch_dbm`` and ``loss_db`` map each case (typ, worst, best) to a number or a list over
    the link's wavelengths.
    """
    exit_code, data = shipped(name)
    received = {case: np.asarray(launch_dbm[case]) - np.asarray(loss_db[case]) for case in ("typ", "worst", "best")}
    for case in ("typ", "worst", "best"):
        expected = np.broadcast_to(received[case], np.shape(data["received_dbm"][case]))
        assert_allclose(data["received_dbm"][case], expected, rtol=0, atol=DB_TOL, err_msg=f"received {case}")
    margin_worst = received["worst"] - sensitivity_dbm
    assert_allclose(min(data["margin_db"]["worst"]), np.min(margin_worst), rtol=0, atol=DB_TOL)
    closes = bool(np.all(margin_worst >= required_margin_db)
                  and (overload_dbm is None or np.all(received["best"] <= overload_dbm)))
    assert data["closes"] is closes
    assert exit_code == (0 if closes else 1)
    return data


def test_every_shipped_config_is_checked_here():
    assert {path.name for path in CONFIGS} == set(CHECKED)


# --- pure datasheet sums -------------------------------------------------------------------------

def test_quarry_uplink_budget():
    # Datasheet rows (worst uses every max, best every min = typ when only typ/max are given):
    #   patch lead 3 m × 0.4 dB/km = 0.0012 dB; panel 0.3 / 0.75; trunk 8.2 km × 0.33 / 0.40 dB/km
    #   = 2.706 / 3.28; 4 splices × 0.05 / 0.3 = 0.2 / 1.2; office panel 0.3 / 0.75; ageing 1.
    typ = 0.0012 + 0.3 + 8.2 * 0.33 + 4 * 0.05 + 0.3 + 1.0     # 4.5072 dB
    worst = 0.0012 + 0.75 + 8.2 * 0.40 + 4 * 0.3 + 0.75 + 1.0  # 6.9812 dB
    best = typ
    # The lone window N = 1.447 + 3e-8j in air (n = 1, README "Which segments carry a medium"):
    # air → N: T = Re(N)·|2/(1 + N)|²; N → air: T = |2N/(N + 1)|²/Re(N); bulk 3 mm by the flux law.
    n_window = 1.447 + 3.0e-8j
    window = face_loss_db(1.0, n_window) + face_loss_db(n_window, 1.0) + flux_law_db(3.0e-8, 1310e-9, 3e-3)
    # R = (0.447/2.447)² = 3.337 %: 0.1474 dB a face; bulk 4.343·(4π·3e-8/1.31 µm)·3 mm = 0.00375 dB
    assert window == pytest.approx(2 * 0.14740 + 0.00375, abs=1e-4)
    loss = {case: value + window for case, value in (("typ", typ), ("worst", worst), ("best", best))}
    check_budget("quarry-uplink.yaml", {"typ": -3.0, "worst": -5.0, "best": 0.0}, loss,
                 sensitivity_dbm=-24.0, required_margin_db=3.0, overload_dbm=-3.0)


def test_orchard_cwdm_ring_budget_does_not_close():
    # mux 1.8 / 2.5; panel 0.25 / 0.75; ring fibre 14.8 km × 0.36 = 5.328, worst 15.1 km × 0.45
    # = 6.795, best 14.6 km × 0.36 = 5.256 (attenuation has no min: best takes typ);
    # 9 splices of {mean 0.08, sigma 0.03}: typ 9 × 0.08 = 0.72, worst 9 × 0.17 = 1.53, best
    # 9 × max(0.08 − 0.09, 0) = 0 (README: the low end is taken at 0 dB); demux 1.8 / 2.5; repair 1.5.
    typ = 1.8 + 0.25 + 14.8 * 0.36 + 9 * 0.08 + 1.8 + 1.5         # 11.398 dB
    worst = 2.5 + 0.75 + 15.1 * 0.45 + 9 * (0.08 + 3 * 0.03) + 2.5 + 1.5  # 15.575 dB
    best = 1.8 + 0.25 + 14.6 * 0.36 + 0.0 + 1.8 + 1.5              # 10.606 dB
    data = check_budget("orchard-cwdm-ring.yaml", {"typ": -4.0, "worst": -7.0, "best": -1.0},
                        {"typ": typ, "worst": worst, "best": best}, sensitivity_dbm=-23.0, required_margin_db=3.0)
    # worst margin -7 - 15.575 + 23 = 0.425 dB < 3 dB at all four channels: exit 1
    assert data["closes"] is False


def test_estuary_cwdm_backhaul_budget():
    # Silica fibre attenuation written out (Walker 1986 form; Keiser's coefficients, from memory):
    # 0.9/λ⁴ (λ in µm) + 7.81e11·exp(−48.48/λ) + 0.04·exp(−4 ln2 ((λ − 1.383)/0.030)²) dB/km, plus
    # the flat term 0.02 dB/km typ, 0.05 max. The multiplexer tables interpolate linearly between
    # 1271, 1451 and 1611 nm: np.interp, the textbook piecewise-linear interpolant.
    channels_um = np.arange(1271, 1612, 20) / 1e3
    curve = (0.9 / channels_um**4 + 7.81e11 * np.exp(-48.48 / channels_um)
             + 0.04 * np.exp(-4 * np.log(2) * ((channels_um - 1.383) / 0.030) ** 2))
    table_um = [1.271, 1.451, 1.611]
    mux = {"typ": np.interp(channels_um, table_um, [2.1, 1.8, 2.2]),
           "worst": np.interp(channels_um, table_um, [2.8, 2.4, 2.9])}
    mux["best"] = mux["typ"]
    fibre = {"typ": 21.4 * (curve + 0.02), "worst": 21.9 * (curve + 0.05), "best": 21.4 * (curve + 0.02)}
    joints = {"typ": 0.25 + 7 * 0.05 + 0.25, "worst": 0.5 + 7 * 0.15 + 0.5}
    joints["best"] = joints["typ"]
    loss = {case: 2 * mux[case] + fibre[case] + joints[case] for case in ("typ", "worst", "best")}
    data = check_budget("estuary-cwdm-backhaul.yaml", {"typ": 2.0, "worst": 0.0, "best": 4.0}, loss,
                        sensitivity_dbm=-21.0, required_margin_db=3.0, overload_dbm=-3.0)
    # the O-band end is the worst channel (Rayleigh scattering and the mux), not the water peak
    assert data["wavelengths_nm"][int(np.argmin(data["margin_db"]["worst"]))] == 1271


def test_flow_cell_probe_budget():
    wavelengths_nm = np.array([1500.0, 1525.0, 1550.0, 1575.0, 1600.0])  # band 1500–1600 nm, step 25 nm
    _, data = shipped("flow-cell-probe.yaml")
    assert_allclose(data["wavelengths_nm"], wavelengths_nm, rtol=0, atol=1e-6)
    launch = dbm(2.0)  # 2 mW = 3.0103 dBm, every case
    # pigtail 1.5 m × 1 dB/km = 0.0015; inlet window 1 mm × 0.002 dB/mm = 0.002; outlet window
    # α = 0.0005 /mm over 1 mm: 4.343 × 0.0005 = 0.0021715 dB; coupling 3 / 4.5 (best = typ).
    fixed_typ = 0.0015 + 0.002 + DB_PER_NEPER * 0.0005 + 3.0
    fixed_worst = 0.0015 + 0.002 + DB_PER_NEPER * 0.0005 + 4.5
    # water film: κ = 1.35e-4 through the flux law, 100 µm typ, 110 µm worst, 95 µm best
    # (at 1550 nm: α = 4π·1.35e-4/1.55 µm = 10.945 /cm, 0.4753 dB over 100 µm)
    lam = wavelengths_nm * 1e-9
    film = {case: flux_law_db(1.35e-4, lam, thickness) for case, thickness in
            (("typ", 100e-6), ("worst", 110e-6), ("best", 95e-6))}
    assert film["typ"][2] == pytest.approx(0.4753, abs=1e-4)
    loss = {"typ": fixed_typ + film["typ"], "worst": fixed_worst + film["worst"], "best": fixed_typ + film["best"]}
    check_budget("flow-cell-probe.yaml", {"typ": launch, "worst": launch, "best": launch}, loss,
                 sensitivity_dbm=-30.0, required_margin_db=6.0, overload_dbm=0.0)


# --- physics: beams, joints, materials -----------------------------------------------------------

def test_rooftop_optical_bridge_budget():
    lam_nm, lam = 1550.0, 1550e-9
    n_air = air(lam_nm)  # Ciddor standard air, 1.000268 at 1550 nm; the gap's ambient medium
    # datasheet rows: leads 5 m and 10 m × 0.5 dB/km = 0.0075; collimator 0.5 / 0.8;
    # pointing 1 / 3; telescope 1.5 / 2.5 (best = typ)
    fixed_typ = 0.0075 + 0.5 + 1.0 + 1.5
    fixed_worst = 0.0075 + 0.8 + 3.0 + 2.5
    # the 850 m path: the beam outside the 60 mm aperture (typ θ = 0.25 mrad, worst 0.35 mrad,
    # best = typ) and the haze by Kim's law (typ V = 15 km, q = 1.3; worst 0.8 km, q = V − 0.5 = 0.3)
    beam = {case: aperture_beam_loss_db(theta, 850.0, 60e-3, lam, n_air) for case, theta in
            (("typ", 0.25e-3), ("worst", 0.35e-3))}
    haze = {"typ": 0.85 * kim_db_per_km(15.0, lam_nm), "worst": 0.85 * kim_db_per_km(0.8, lam_nm)}
    assert haze["typ"] == pytest.approx(0.2502, abs=1e-4)   # 4.343·(3.91/15)·(1550/550)^−1.3·0.85
    assert haze["worst"] == pytest.approx(13.222, abs=1e-3)  # 4.343·(3.91/0.8)·(1550/550)^−0.3·0.85
    data = row(shipped("rooftop-optical-bridge.yaml")[1], "rooftop path")
    for case in ("typ", "worst"):
        assert_allclose(data["loss_parts_db"]["beam"][case], [beam[case]], rtol=0, atol=DB_TOL)
        assert_allclose(data["loss_parts_db"]["medium"][case], [haze[case]], rtol=0, atol=DB_TOL)
    loss = {"typ": fixed_typ + beam["typ"] + haze["typ"], "worst": fixed_worst + beam["worst"] + haze["worst"],
            "best": fixed_typ + beam["typ"] + haze["typ"]}
    check_budget("rooftop-optical-bridge.yaml", {"typ": 5.0, "worst": 4.0, "best": 6.0}, loss,
                 sensitivity_dbm=-38.0, required_margin_db=3.0, overload_dbm=-10.0)


def _coupling_extremes(corners):
    """(worst, best) loss in dB over the corners of a tolerance box (each a transmittance)."""
    losses = [db(t) for t in corners]
    return max(losses), min(losses)


def test_wafer_probe_splitter_card_budget():
    lam = 1550e-9
    n_air = air(1550.0)  # the joints' gap medium (README: air, Ciddor, unless given otherwise)
    w_probe = marcuse_mode_radius_m(4.1e-6, 0.14, lam)  # V = 2.3268: w = 4.1 µm × 1.1243 = 4.610 µm
    assert w_probe == pytest.approx(4.610e-6, rel=1e-3)
    deg = math.pi / 180

    # bulkhead: pigtail MFD 9.9 / 10.4 / 10.9 µm into the probe fibre's mode, offset 0.3 / 1.0 µm,
    # tilt 0.1° / 0.3° in air, no gap: η = η_x(offset, tilt)·η_y. Worst and best over the corners.
    def bulkhead(mfd_um, offset_um, tilt_deg):
        w1 = mfd_um / 2 * 1e-6
        return (overlap_1d(w1, w_probe, lam, n=n_air, offset_m=offset_um * 1e-6, tilt_rad=tilt_deg * deg)
                * overlap_1d(w1, w_probe, lam, n=n_air))

    bulkhead_typ = db(bulkhead(10.4, 0.3, 0.1))
    bulkhead_worst, bulkhead_best = _coupling_extremes(
        bulkhead(m, o, t) for m in (9.9, 10.9) for o in (0.3, 1.0) for t in (0.1, 0.3))

    # edge coupler: the probe fibre's circular mode into the 3.2 × 2.4 µm elliptical mode across
    # an air gap 2 / 5 µm, offset 0.2 / 0.8 µm along the axis where it hurts more.
    def edge(offset_um, gap_um):
        wx, wy = 1.6e-6, 1.2e-6
        common = dict(n=n_air, separation_m=gap_um * 1e-6)
        along_x = overlap_1d(w_probe, wx, lam, offset_m=offset_um * 1e-6, **common) * overlap_1d(
            w_probe, wy, lam, **common)
        along_y = overlap_1d(w_probe, wx, lam, **common) * overlap_1d(
            w_probe, wy, lam, offset_m=offset_um * 1e-6, **common)
        return min(along_x, along_y)

    edge_typ = db(edge(0.2, 2.0))
    edge_worst, edge_best = _coupling_extremes(edge(o, g) for o in (0.2, 0.8) for g in (2.0, 5.0))

    # datasheet and flux-law rows: fibres (1.5 + 0.8 + 1) m × 0.4 dB/km = 0.00132 dB;
    # input waveguide 0.4 cm × 1.5 / 2.5 dB/cm + 6 bends × 0.02 / 0.05; splitter 10·log10(8) =
    # 9.0309 + 0.5 / 1.2 excess; site 3 waveguide: κ_eff = 6e-6 over 7 mm (1.4788 dB) + 3 crossings
    # × 0.15 / 0.3; grating 3.5 / 5.
    fibres = 3.3 * 0.4e-3
    split = 10 * math.log10(8)
    site_guide = flux_law_db(6e-6, lam, 7e-3)
    assert site_guide == pytest.approx(1.4788, abs=1e-4)  # 4.343·(4π·6e-6/1.55 µm)·7 mm
    rest_typ = fibres + 0.4 * 1.5 + 6 * 0.02 + split + 0.5 + site_guide + 3 * 0.15 + 3.5
    rest_worst = fibres + 0.4 * 2.5 + 6 * 0.05 + split + 1.2 + site_guide + 3 * 0.3 + 5.0

    _, data = shipped("wafer-probe-splitter-card.yaml")
    for name, typ, worst, best in (("bulkhead", bulkhead_typ, bulkhead_worst, bulkhead_best),
                                   ("edge coupler", edge_typ, edge_worst, edge_best)):
        entry = row(data, name)
        assert_allclose([entry["loss_db"][c][0] for c in ("typ", "worst", "best")], [typ, worst, best],
                        rtol=0, atol=DB_TOL, err_msg=name)
    loss = {"typ": bulkhead_typ + edge_typ + rest_typ, "worst": bulkhead_worst + edge_worst + rest_worst,
            "best": bulkhead_best + edge_best + rest_typ}
    check_budget("wafer-probe-splitter-card.yaml", {"typ": 10.0, "worst": 8.0, "best": 11.0}, loss,
                 sensitivity_dbm=-20.0, required_margin_db=3.0, overload_dbm=0.0)


def test_fish_tank_turbidity_probe_budget():
    channels_nm = (1310.0, 1450.0, 1550.0)
    loss = {"typ": [], "worst": [], "best": []}
    for nm in channels_nm:
        lam = nm * 1e-9
        n_air, n_glass, n_water = air(nm), silica(nm), water(nm)
        # coating: one MgF2 quarter-wave at 1550 nm, d = 1550 nm/(4·n_MgF2(1550 nm)) ≈ 281.2 nm,
        # between the launch air space and the launch window, coherent TMM at normal incidence
        layer_nm = 1550.0 / (4 * magnesium_fluoride(1550.0))
        coated = tmm.coh_tmm("s", [n_air, magnesium_fluoride(nm), n_glass], [np.inf, layer_nm, np.inf], 0.0, nm)
        # return window's incoherent sum: R1′ its entry face seen from inside (glass → water),
        # R2 its exit face (glass → air), τ = 1 (κ = 0): row −10·log10(1/(1 − R1′·R2))
        r1_inside = face(n_glass, n_water)[0]
        r2 = face(n_glass, n_air)[0]
        reflections = 10 * math.log10(1 - r1_inside * r2)
        common = (0.5e-3 * 2                        # launch fibre 2 m × 0.5 dB/km
                  + face_loss_db(1.4682, n_air)     # fibre end (n_eff 1.4682) → air
                  + db(coated["T"])                 # AR-coated air → window face
                  + face_loss_db(n_glass, n_water)  # launch window → water (T normalised to water's flux)
                  + face_loss_db(n_water, n_glass)  # water → return window
                  + face_loss_db(n_glass, n_air)    # return window → collection air
                  + reflections)                    # the windows and air spaces absorb nothing
        water_db = {case: flux_law_db(n_water.imag, lam, d) for case, d in
                    (("typ", 0.4e-3), ("worst", 0.43e-3), ("best", 0.38e-3))}
        loss["typ"].append(common + water_db["typ"] + 4.0)  # collection optics 4 / 6 (best = typ)
        loss["worst"].append(common + water_db["worst"] + 6.0)
        loss["best"].append(common + water_db["best"] + 4.0)
    # at 1450 nm water's κ = 3.62e-4 (Segelstein, interpolated): α = 31.4 /cm, 5.45 dB over 0.4 mm
    assert loss["typ"][1] == pytest.approx(9.87, abs=0.01)
    check_budget("fish-tank-turbidity-probe.yaml", {"typ": -10.0, "worst": -12.0, "best": -9.0}, loss,
                 sensitivity_dbm=-35.0, required_margin_db=3.0, overload_dbm=-5.0)


# --- eye safety, back reflection and PDL ---------------------------------------------------------

def _oblique_face(pol, n_before, n_after, angle_rad, lam_nm):
    """(R, T) of a bare face at an angle, by tmm's coherent transfer matrix (Byrnes 2016)."""
    found = tmm.coh_tmm(pol, [n_before, n_after], [np.inf, np.inf], angle_rad, lam_nm)
    return found["R"], found["T"]


def test_vineyard_frost_fan_broadcast_budget_safety_back_reflection_and_pdl():
    lam_nm, lam = 1550.0, 1550e-9
    n_air, n_glass = air(lam_nm), silica(lam_nm)
    split = 10 * math.log10(16)  # 12.0412 dB to every port
    # datasheet rows: pigtail 2 m × 0.4 dB/km; hut panel; splitter excess; 2.2/2.4/2.6 km of cable at
    # 0.25/0.3/0.4 dB/km; 3 splices; station connector; lead 3 m × 0.4 dB/km
    typ = 0.0008 + 0.25 + split + 1.0 + 2.4 * 0.3 + 3 * 0.05 + 0.3 + 0.0012
    worst = 0.0008 + 0.5 + split + 1.6 + 2.6 * 0.4 + 3 * 0.2 + 0.75 + 0.0012
    best = 0.0008 + 0.1 + split + 0.6 + 2.2 * 0.25 + 3 * 0.02 + 0.15 + 0.0012
    # faces: lead (n = 1.468) → air at normal incidence; air → silica at 30 deg and silica → air at
    # the refracted angle, s and p followed through both (unpolarized light: the mean of the products)
    inside = math.asin(n_air * math.sin(math.radians(30)) / n_glass)
    first = {pol: _oblique_face(pol, n_air, n_glass, math.radians(30), lam_nm) for pol in ("s", "p")}
    second = {pol: _oblique_face(pol, n_glass, n_air, inside, lam_nm) for pol in ("s", "p")}
    window_t = 0.5 * sum(first[pol][1] * second[pol][1] for pol in ("s", "p"))
    fibre_r, fibre_t = face(1.468, n_air)
    faces = db(fibre_t) + db(window_t)
    loss = {"typ": typ + faces, "worst": worst + faces, "best": best + faces}
    _, data = shipped("vineyard-frost-fan-broadcast.yaml")
    check_budget("vineyard-frost-fan-broadcast.yaml", {"typ": 13.0, "worst": 12.0, "best": 14.0}, loss,
                 sensitivity_dbm=-28.0, required_margin_db=3.0, overload_dbm=3.0)

    # eye safety (IEC 60825-1:2007 Table 4, from memory: 10 mW at 1550 nm; 3R = 50 mW): 14 dBm at the
    # source output, beam unknown, so all of it counts: 25.1 mW, 4.0 dB above, 3R
    points = {point["name"]: point for point in data["safety"]["points"]}
    assert points["source output"]["margin_db"] == pytest.approx(10 * math.log10(10 / dbm_to_mw(14.0)), abs=DB_TOL)
    assert points["source output"]["hazard_level"] == "3R"
    # the hut panel: the pigtail's 10.4 um mode from its end; through 3.5 mm at 100 mm (the unaided eye,
    # Table 10 from memory) w(z) = w0·√(1 + (z/z_R)²) (Kogelnik & Li) leaves a few per cent in the
    # aperture, 1 − exp(−2a²/w²) (Siegman), within Class 1; through 7 mm at 14 mm almost all: 1M
    hut_mw = dbm_to_mw(14.0 - 0.0008)
    w0, z_r = 5.2e-6, math.pi * 5.2e-6**2 / lam
    unaided = 1 - math.exp(-2 * 1.75e-3**2 / (w0**2 * (1 + (0.1 / z_r) ** 2)))
    magnifier = 1 - math.exp(-2 * 3.5e-3**2 / (w0**2 * (1 + (14e-3 / z_r) ** 2)))
    assert hut_mw * unaided < 10 < hut_mw * magnifier < 500
    assert points["hut patch panel"]["hazard_level"] == "1M"
    assert points["hut patch panel"]["margin_db"] == pytest.approx(10 * math.log10(10 / (hut_mw * magnifier)),
                                                                   abs=DB_TOL)
    spare_dbm = 14.0 - 0.0008 - 0.1 - split - 0.6
    assert points["spare splitter port"]["power_dbm"] == pytest.approx(spare_dbm, abs=DB_TOL)
    assert points["spare splitter port"]["margin_db"] == pytest.approx(10 - spare_dbm, abs=DB_TOL)
    assert data["safety"]["above_hazard_level_1"] == ["source output", "hut patch panel"]
    assert [point["name"] for point in data["safety"]["excluded"]] == ["head air space", "detector space"]

    # back reflection: Σ share·R·T² (incoherent), T² the round trip through everything before each
    def returned(hut_rl, station_rl, before):
        t2 = [10 ** (-2 * value / 10) for value in before]
        share_s = first["s"][1] / (first["s"][1] + first["p"][1])
        window = (0.5 * (first["s"][0] + first["p"][0]) * t2[3]
                  + (share_s * second["s"][0] + (1 - share_s) * second["p"][0]) * t2[4])
        return 10 ** (-hut_rl / 10) * t2[0] + 10 ** (-station_rl / 10) * t2[1] + fibre_r * t2[2] + window

    def before_rows(case):
        upto_station = {"typ": typ - 0.3 - 0.0012, "best": best - 0.15 - 0.0012}[case]
        to_window = {"typ": typ, "best": best}[case] + db(fibre_t)
        return [0.0008, upto_station, upto_station + {"typ": 0.3, "best": 0.15}[case] + 0.0012, to_window,
                to_window + db(0.5 * (first["s"][1] + first["p"][1]))]

    typical = returned(55.0, 50.0, before_rows("typ"))
    worst_case = returned(45.0, 40.0, before_rows("best"))
    assert_allclose(data["back_reflection"]["level_db"]["typ"], [10 * math.log10(typical)], atol=DB_TOL)
    assert_allclose(data["back_reflection"]["level_db"]["worst"], [10 * math.log10(worst_case)], atol=DB_TOL)
    assert data["back_reflection"]["tolerated"] is (10 * math.log10(worst_case) <= -35.0)
    assert data["back_reflection"]["largest"] == "station lead → head air space"

    # PDL: the two window faces, s and p light alone
    pdl = abs(db(first["s"][1] * second["s"][1]) - db(first["p"][1] * second["p"][1]))
    assert_allclose(data["polarization_dependent_loss"]["link_pdl_db"], [pdl], atol=DB_TOL)
    assert pdl == pytest.approx(0.252, abs=1e-3)


def dbm_to_mw(power_dbm):
    return 10 ** (power_dbm / 10)
