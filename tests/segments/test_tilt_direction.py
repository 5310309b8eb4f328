"""Which way a tilt turns relative to the offset (`tilt_direction`), through whole links.

Each expected value is a 2-D numerical overlap integral computed here (tests/numeric_overlap.py:
the launched Gaussian at its waist with the tilt phase, Fresnel propagation over the gap by the
angular spectrum, the normalised overlap with the receiving Gaussian), not the package's closed
form. The geometry follows README "Joints from geometry": the offset is where the launched beam's
axis crosses the receiving mode's waist plane; `along-offset` turns the beam further in the
offset's direction (its waist then lies nearer the receiving axis), `against-offset` back toward
the receiving axis, `across-offset` perpendicular to the offset.

The joint is a reported case (MFD 8.2 µm into 11.7 µm across a 40 µm air gap, 2.1 µm offset,
0.75° tilt at 1550 nm).
"""

import numpy as np
import pytest
from numpy.testing import assert_allclose
from scipy.optimize import minimize, minimize_scalar

from linkbudget.materials.library import load_material
from tests import numeric_overlap
from tests.segments.linktext import evaluate, only_problem, row

WL = 1550e-9
N_AIR = load_material("air").index(np.array([WL])).real[0]  # the gap medium (Ciddor 1996)
AZIMUTH = {"along-offset": 0.0, "against-offset": np.pi, "across-offset": np.pi / 2}
# The numerical sums are exact far below this (tests/numeric_overlap.py); the link reports dB.
RTOL = 1e-6

LAUNCHED_MFD, RECEIVED_MFD = 8.2e-6, 11.7e-6
GAP, OFFSET, TILT = 40e-6, 2.1e-6, np.deg2rad(0.75)


def fibre(name, mfd):
    return {"name": name, "kind": "fiber", "length": "1 m", "attenuation": "0 dB/km", "mode_field_diameter": mfd}


def misaligned(kind, direction=None, offset="2.1 um", tilt="0.75 deg"):
    """The reported joint as a `connector` or `splice` (with a `gap`) or as a `gap` segment into a mode."""
    keys = {"name": "joint", "kind": kind, ("length" if kind == "gap" else "gap"): "40 um",
            "offset": offset, "tilt": tilt}
    if direction is not None:
        keys["tilt_direction"] = direction
    return [fibre("launching", "8.2 um"), keys, fibre("receiving", "11.7 um")]


def coupling_losses(chain):
    """case -> coupling loss [dB] of the row ``joint`` (a gap's beam part, without its ambient loss)."""
    found = row(evaluate(chain), "joint")
    return found.loss_parts_db.get("beam", found.loss_db)


def numeric_loss_db(azimuth_rad, offset_m=OFFSET, tilt_rad=TILT):
    transmitted = numeric_overlap.overlap_at_azimuth(
        (LAUNCHED_MFD / 2,) * 2, (RECEIVED_MFD / 2,) * 2, WL, offset_m=offset_m, tilt_rad=tilt_rad,
        azimuth_rad=azimuth_rad, gap_m=GAP, n=N_AIR)
    return -10.0 * np.log10(transmitted)


def assert_same_coupling(loss_db, expected_db):
    """Equal power coupling to RTOL (the dB values compared as transmittances)."""
    assert_allclose(10 ** (-np.asarray(loss_db) / 10), 10 ** (-np.asarray(expected_db) / 10), rtol=RTOL)


@pytest.mark.parametrize("kind", ["connector", "splice", "gap"])
@pytest.mark.parametrize("direction", list(AZIMUTH))
def test_tilt_direction_fixes_the_orientation_in_every_case(kind, direction):
    losses = coupling_losses(misaligned(kind, direction))
    expected = numeric_loss_db(AZIMUTH[direction])
    for case in ("typ", "worst", "best"):
        assert_same_coupling(losses[case], [expected])


@pytest.mark.parametrize("kind", ["connector", "gap"])
def test_tilt_direction_absent_worst_against_typ_across_best_along(kind):
    losses = coupling_losses(misaligned(kind))
    assert_same_coupling(losses["worst"], [numeric_loss_db(AZIMUTH["against-offset"])])
    assert_same_coupling(losses["typ"], [numeric_loss_db(AZIMUTH["across-offset"])])
    assert_same_coupling(losses["best"], [numeric_loss_db(AZIMUTH["along-offset"])])
    assert losses["worst"][0] > losses["typ"][0] > losses["best"][0]
    assert losses["worst"][0] - losses["best"][0] > 0.4  # the orientation matters here: 2.10 dB vs 1.66 dB


def numeric_best_loss_db(offset_um, tilt_deg):
    """The least numerical loss over the box of offsets [µm] and tilts [deg] and every azimuth:
    bounded quasi-Newton minimisation from the best corner turned along the offset."""
    def loss_db(x):
        return numeric_loss_db(x[2], offset_m=x[0] * 1e-6, tilt_rad=np.deg2rad(x[1]))

    start = min(([d, theta, 0.0] for d in offset_um for theta in tilt_deg), key=loss_db)
    found = minimize(loss_db, start, method="L-BFGS-B", bounds=[offset_um, tilt_deg, (0.0, np.pi)],
                     options={"ftol": 1e-14, "gtol": 1e-10})
    return found.fun


def test_tilt_direction_absent_searches_the_whole_tolerance_box_in_every_turn():
    # The worst case lies at a corner of offset and tilt with the tilt turned back against the
    # offset; the best case here lies inside the tilt's range, where a tilt along the offset
    # partly makes up for it (1.2596 dB at 1 µm, 0.447° against 1.2629 dB at the 0.3° corner).
    chain = misaligned("connector", offset={"typ": "1 um", "max": "2.1 um"}, tilt={"typ": "0.3 deg", "max": "0.75 deg"})
    losses = coupling_losses(chain)
    corners = [numeric_loss_db(azimuth, offset_m=d, tilt_rad=np.deg2rad(theta))
               for d in (1e-6, 2.1e-6) for theta in (0.3, 0.75) for azimuth in (0.0, np.pi)]
    assert_same_coupling(losses["worst"], [max(corners)])
    assert_same_coupling(losses["best"], [numeric_best_loss_db((1.0, 2.1), (0.3, 0.75))])
    assert losses["best"][0] < min(corners) - 0.003
    assert_same_coupling(losses["typ"], [numeric_loss_db(np.pi / 2, offset_m=1e-6, tilt_rad=np.deg2rad(0.3))])


def test_best_case_offset_inside_its_range_makes_up_for_the_least_tilt():
    # An offset range from 0 with a tilt of at least 0.5°: the best offset is neither end.
    chain = misaligned("connector", offset={"min": "0 um", "typ": "0.5 um", "max": "2 um"},
                       tilt={"min": "0.5 deg", "max": "0.75 deg"})
    best_db = coupling_losses(chain)["best"]
    assert_same_coupling(best_db, [numeric_best_loss_db((0.0, 2.0), (0.5, 0.75))])
    assert best_db[0] < numeric_loss_db(0.0, offset_m=0.0, tilt_rad=np.deg2rad(0.5)) - 0.005  # 1.1732 vs 1.1813 dB


def test_tilt_along_offset_with_spreads_searches_all_four_corners_and_the_near_edges():
    # A tilt turned along the offset: the least coupling may lie at any corner of the box (the
    # cross term then lowers the loss as d and θ grow together), the largest inside an edge.
    chain = misaligned("connector", "along-offset", offset={"min": "0.5 um", "max": "2.1 um"},
                       tilt={"min": "0.3 deg", "max": "0.75 deg"})
    losses = coupling_losses(chain)
    corners = [numeric_loss_db(0.0, offset_m=d, tilt_rad=np.deg2rad(theta)) for d in (0.5e-6, 2.1e-6)
               for theta in (0.3, 0.75)]
    assert_same_coupling(losses["worst"], [max(corners)])
    found = minimize(lambda x: numeric_loss_db(0.0, offset_m=x[0] * 1e-6, tilt_rad=np.deg2rad(x[1])),
                     [0.5, 0.3], method="L-BFGS-B", bounds=[(0.5, 2.1), (0.3, 0.75)],
                     options={"ftol": 1e-14, "gtol": 1e-10})
    assert_same_coupling(losses["best"], [found.fun])


# ---- an elliptical receiving mode: the least coupling at an intermediate azimuth ----

ELLIPTICAL_LAUNCHED = (2.4e-6, 2.4e-6)  # a 4.8 µm fibre mode
ELLIPTICAL_RECEIVED = (2.5e-6, 5.8e-6)  # a waveguide mode 5.0 µm wide, 11.6 µm high
ELLIPTICAL = dict(offset_m=1.5e-6, tilt_rad=np.deg2rad(8.0), gap_m=9e-6, n=1.0)


def elliptical_chain(direction=None):
    joint = {"name": "joint", "kind": "connector", "gap": "9 um", "gap_index": 1, "offset": "1.5 um", "tilt": "8 deg"}
    if direction is not None:
        joint["tilt_direction"] = direction
    waveguide = {"name": "chip", "kind": "waveguide", "length": "1 mm", "attenuation": "0 dB/cm",
                 "mode_size": {"width": "5.0 um", "height": "11.6 um"}}
    return [fibre("launching", "4.8 um"), joint, waveguide]


def elliptical_overlap(azimuth_rad, offset_along):
    return numeric_overlap.overlap_at_azimuth(ELLIPTICAL_LAUNCHED, ELLIPTICAL_RECEIVED, WL, azimuth_rad=azimuth_rad,
                                              offset_along=offset_along, **ELLIPTICAL)


def worse_axis_overlap(azimuth_rad):
    """README: an elliptical mode's offset is taken along the axis where it hurts more."""
    return min(elliptical_overlap(azimuth_rad, "x"), elliptical_overlap(azimuth_rad, "y"))


def extreme_over_azimuth(sign):
    """The least (sign +1) or largest (sign −1) worse-axis overlap over the azimuth in [0, π]:
    a coarse scan, then a bounded scalar minimisation around its best point."""
    scan = np.linspace(0.0, np.pi, 19)
    start = scan[np.argmin([sign * worse_axis_overlap(psi) for psi in scan])]
    step = scan[1] - scan[0]
    found = minimize_scalar(lambda psi: sign * worse_axis_overlap(psi), method="bounded",
                            bounds=(max(0.0, start - step), min(np.pi, start + step)), options={"xatol": 1e-7})
    return found.x, sign * found.fun


def test_tilt_direction_absent_elliptical_worst_is_at_an_intermediate_azimuth():
    losses = row(evaluate(elliptical_chain()), "joint").loss_db
    azimuth, least = extreme_over_azimuth(+1)
    assert 0.6 < azimuth < 2.5  # neither parallel turn nor across
    parallel_and_across = [worse_axis_overlap(psi) for psi in (0.0, np.pi / 2, np.pi)]
    assert 10 * np.log10(min(parallel_and_across) / least) > 0.2  # in dB worse than all three
    assert_same_coupling(losses["worst"], [-10 * np.log10(least)])
    assert_same_coupling(losses["typ"], [-10 * np.log10(worse_axis_overlap(np.pi / 2))])


def test_tilt_direction_absent_elliptical_best_is_the_largest_over_azimuth():
    losses = row(evaluate(elliptical_chain()), "joint").loss_db
    _, largest = extreme_over_azimuth(-1)
    assert_same_coupling(losses["best"], [-10 * np.log10(largest)])
    assert largest > worse_axis_overlap(0.0)  # here the best turn is not the parallel one either


@pytest.mark.parametrize("direction", list(AZIMUTH))
def test_tilt_direction_elliptical_takes_the_worse_axis_at_the_given_azimuth(direction):
    # `across-offset` on an elliptical mode: offset on one axis, tilt on the other (the worse pair).
    losses = row(evaluate(elliptical_chain(direction)), "joint").loss_db
    expected = -10 * np.log10(worse_axis_overlap(AZIMUTH[direction]))
    for case in ("typ", "worst", "best"):
        assert_same_coupling(losses[case], [expected])


# ---- input errors ----

@pytest.mark.parametrize("kind", ["connector", "splice", "gap"])
def test_error_tilt_direction_unknown_value(kind):
    path, message = only_problem(misaligned(kind, "toward"))
    assert path == "chain[1].tilt_direction"
    assert "'along-offset', 'against-offset' or 'across-offset'" in message


@pytest.mark.parametrize("missing", ["offset", "tilt"])
def test_error_tilt_direction_without_offset_or_tilt(missing):
    chain = misaligned("connector", "against-offset")
    del chain[1][missing]
    path, message = only_problem(chain)
    assert path == "chain[1].tilt_direction"
    assert f"give the {missing} too" in message
