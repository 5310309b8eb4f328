"""The budget engine: the chain of segment losses over the wavelength axis, for every case.

For each budget case (``typ``, ``worst``, ``best``) the engine takes the source power at
that case's end, the loss of every row (segment) at the same case, and forms the cumulative
loss, the power after each row, the received power and the margin

    margin = received power − receiver sensitivity   [dB],

which must be at least the required margin at every wavelength in the worst case for the link
to close. The best case (max launch, every loss at its low end) must stay at or below the
receiver's overload.
"""

import warnings
from dataclasses import dataclass
from functools import cached_property

import numpy as np

from linkbudget.cautions import CAUTIONS
from linkbudget.config.fields import CASES
from linkbudget.physics import fresnel, thinfilm
from linkbudget.physics.decibel import (
    loss_db_from_transmittance,
    transmittance_from_loss_db,
)
from linkbudget.physics.validity import ValidityWarning
from linkbudget.segments.base import Row


@dataclass(frozen=True)
class LinkResult:
    """An evaluated link. Arrays run over :attr:`wavelength_m`; dicts are keyed by case."""

    title: str
    file: str
    wavelength_m: np.ndarray
    rows: tuple
    source_dbm: dict
    sensitivity_dbm: float
    overload_dbm: float | None
    required_margin_db: float
    notes: tuple = ()  # warnings of models used outside their stated validity, by row
    cautions: tuple = CAUTIONS

    @cached_property
    def loss_db(self):
        """case -> loss of every row, shape (n_rows, n_wavelengths)."""
        return {case: np.array([row.loss_db[case] for row in self.rows]) for case in CASES}

    @cached_property
    def cumulative_loss_db(self):
        """case -> cumulative loss after every row, shape (n_rows, n_wavelengths)."""
        return {case: np.cumsum(losses, axis=0) for case, losses in self.loss_db.items()}

    @cached_property
    def power_after_dbm(self):
        """case -> power after every row [dBm], shape (n_rows, n_wavelengths)."""
        return {case: self.source_dbm[case] - cumulative
                for case, cumulative in self.cumulative_loss_db.items()}

    @cached_property
    def received_dbm(self):
        """case -> power at the receiver [dBm] over the wavelengths."""
        return {case: powers[-1] for case, powers in self.power_after_dbm.items()}

    @cached_property
    def margin_db(self):
        """case -> received power minus sensitivity [dB]."""
        return {case: received - self.sensitivity_dbm for case, received in self.received_dbm.items()}

    @property
    def margin_ok(self):
        """The worst-case margin meets the required margin at every wavelength."""
        return bool(np.all(self.margin_db["worst"] >= self.required_margin_db))

    @property
    def overload_ok(self):
        """The best-case received power stays at or below the overload (if one is given)."""
        return self.overload_dbm is None or bool(np.all(self.received_dbm["best"] <= self.overload_dbm))

    @property
    def closes(self):
        return self.margin_ok and self.overload_ok

    @property
    def governing_index(self):
        """Index of the wavelength with the smallest worst-case margin."""
        return int(np.argmin(self.margin_db["worst"]))

    def to_dict(self):
        """The versioned JSON result (see :mod:`linkbudget.report.json`)."""
        from linkbudget.report.json import result_dict

        return result_dict(self)


#: The largest ray angle the faces are evaluated at: just below grazing incidence.
_GRAZING_RAD = np.nextafter(np.pi / 2, 0.0)


def _polarizations(polarization):
    """The linear polarizations whose powers are followed separately ("unpolarized": s and p)."""
    return fresnel.POLARIZATIONS[polarization]


def _even_share(polarization):
    """case -> polarization -> power share of light of ``polarization`` (equal shares)."""
    pols = _polarizations(polarization)
    return {case: {pol: 1.0 / len(pols) for pol in pols} for case in CASES}


def _pass(share, transmittance):
    """Power passed by a polarization-dependent transmittance, and the shares after it.

    The light passes Σ_pol share_pol·T_pol of the power reaching it; after it each polarization
    holds share_pol·T_pol of that, renormalised. Chaining such steps multiplies, per
    polarization, the transmittances of every face before averaging, so an unpolarized beam
    through several oblique faces loses mean_pol(Π T_pol), not Π mean_pol(T_pol).
    """
    passed = sum(share[pol] * transmittance[pol] for pol in transmittance)
    with np.errstate(divide="ignore", invalid="ignore"):
        after = {pol: np.where(passed > 0, share[pol] * transmittance[pol] / passed, share[pol])
                 for pol in transmittance}
    return passed, after


def _share_row(name, kind, share, transmittance, reflectance=None, absorptance=None):
    """A row whose power transmittance differs by polarization, and the shares after it (per case)."""
    losses, after = {}, {}
    for case in CASES:
        passed, after[case] = _pass(share[case], transmittance)
        losses[case] = loss_db_from_transmittance(passed)
    detail = {}
    for key, value in (("reflectance", reflectance), ("absorptance", absorptance)):
        if value is not None:
            detail[key] = sum(share["typ"][pol] * value[pol] for pol in value)
    return Row(name, kind, losses, detail), after


def _refracted_angle_rad(n_from, angle_rad, n_to):
    """Ray angle in ``n_to`` of a ray at ``angle_rad`` in ``n_from`` (Snell's law on the real
    parts; just below π/2 beyond the critical angle, where the face transmits nothing anyway)."""
    sine = np.real(n_from) * np.sin(angle_rad) / np.real(n_to)
    return np.minimum(np.arcsin(np.clip(sine, -1.0, 1.0)), _GRAZING_RAD)


def _face(name_from, name_to, n_from, n_to, angle_rad, polarization, share):
    """A bare interface: its row, the shares after it, its reflectance and that seen from the far
    side (per polarization)."""
    inside = _refracted_angle_rad(n_from, angle_rad, n_to)
    reflectance, transmittance, back = {}, {}, {}
    for pol in _polarizations(polarization):
        reflectance[pol], transmittance[pol] = fresnel.interface_power_coefficients(
            n_from, n_to, angle_rad=angle_rad, polarization=pol)
        back[pol], _ = fresnel.interface_power_coefficients(n_to, n_from, angle_rad=inside, polarization=pol)
    row, share = _share_row(f"{name_from} → {name_to}", "interface", share, transmittance, reflectance)
    return row, share, reflectance, back


def _coating(coating, wavelength_m, n_up, n_down, angle_rad, polarization, share):
    """A coating's row, the shares after it, its reflectance and that seen from the downstream
    medium (per polarization)."""
    angle = angle_rad if coating.angle is None else coating.angle
    reflectance, transmittance, absorptance, back = {}, {}, {}, {}
    for pol in _polarizations(polarization):
        forward = thinfilm.coherent_stack(coating.layer_index, coating.thickness_m, wavelength_m,
                                          n_incident=n_up, n_exit=n_down, angle_rad=angle, polarization=pol)
        backward = thinfilm.coherent_stack(coating.layer_index[::-1], coating.thickness_m[::-1], wavelength_m,
                                           n_incident=n_down, n_exit=n_up,
                                           angle_rad=_refracted_angle_rad(n_up, angle, n_down), polarization=pol)
        reflectance[pol], transmittance[pol] = forward.reflectance, forward.transmittance
        # 1 - R - T rounds to about -1e-16 for lossless layers
        absorptance[pol], back[pol] = np.maximum(forward.absorptance, 0.0), backward.reflectance
    row, share = _share_row(coating.name, "coating", share, transmittance, reflectance, absorptance)
    return [row], share, reflectance, back


@dataclass
class _Carrier:
    """The last segment that carried a medium, and what its exit face needs to know."""

    segment: object
    exit_angle_rad: np.ndarray | float  # ray angle inside it, at its exit face
    polarization: str
    share: dict  # case -> polarization -> power share of the light inside it
    back_reflectance: dict | None  # polarization -> of its entry face, seen from inside
    single_pass_db: dict | None  # its bulk loss per case, when its multiple reflections are summed


def _joint(upstream, segment, joint, coating, wavelength_m):
    """Rows between two media and the ray entering ``segment``.

    Returns (rows, shares after them, reflectance of the first face met, back-reflectance of the
    last face (both per polarization, None without a face), angle in the upstream medium,
    polarization).
    """
    n_up, n_down = upstream.segment.medium_index(), segment.medium_index()
    if segment.angle is not None:
        angle, polarization = segment.angle, segment.polarization
    else:
        angle, polarization = upstream.exit_angle_rad, upstream.polarization
    if coating is not None and coating.polarization is not None:
        polarization = coating.polarization
    share = upstream.share if polarization == upstream.polarization else _even_share(polarization)
    if coating is not None:
        return (*_coating(coating, wavelength_m, n_up, n_down, angle, polarization, share), angle, polarization)
    kind = "physical-contact" if joint is None else joint.joint_type
    if kind == "index-matched" or (kind == "physical-contact" and np.array_equal(n_up, n_down)):
        return [], share, None, None, angle, polarization
    if kind == "air-gap":
        n_gap, gap_name = joint.gap_medium_index(), f"{joint.name} gap"
        first, share, reflectance, _ = _face(upstream.segment.name, gap_name, n_up, n_gap, angle, polarization, share)
        angle_gap = _refracted_angle_rad(n_up, angle, n_gap)
        second, share, _, back = _face(gap_name, segment.name, n_gap, n_down, angle_gap, polarization, share)
        return [first, second], share, reflectance, back, angle, polarization
    row, share, reflectance, back = _face(upstream.segment.name, segment.name, n_up, n_down, angle, polarization,
                                          share)
    return [row], share, reflectance, back, angle, polarization


def _multiple_reflections_row(carrier, exit_reflectance, share):
    """The incoherent sum of the light bouncing between a medium's two faces, as a (negative) loss.

    T = T1·τ·T2 / (1 − R1'·R2·τ²) per polarization: the single-pass rows give T1·τ·T2, this row
    the factor 1/(1 − R1'·R2·τ²), with τ the single-pass bulk transmittance (Born & Wolf,
    "Principles of Optics", 1999, the incoherent sum over a thick plate; Katsidis & Siapkas,
    Appl. Opt. 41, 3978 (2002)). Returns the row and the shares after it.
    """
    losses, after = {}, {}
    for case, single_pass_db in carrier.single_pass_db.items():
        tau = transmittance_from_loss_db(single_pass_db)
        factor = {pol: 1.0 / (1.0 - carrier.back_reflectance[pol] * exit_reflectance[pol] * tau ** 2)
                  for pol in exit_reflectance}
        passed, after[case] = _pass(share[case], factor)
        losses[case] = loss_db_from_transmittance(passed)
    return Row(f"{carrier.segment.name} multiple reflections", "reflections", losses), after


def budget_rows(segments, wavelength_m):
    """The budget rows: every segment, with the interfaces and coatings between media inserted.

    Between two consecutive segments that carry a medium the engine inserts their interface
    (Fresnel, at the angle the downstream segment gives, or the one the upstream segment's
    tilted faces give its exit face), or the coating that sits between them, or what the joint
    of a connector or splice between them says (index-matched: nothing; air gap: two faces).
    A medium's ``angle`` tilts both of its (parallel) faces and lengthens its path by 1/cos θ;
    the tilt carries on through media in contact with it and ends at the next gap, fibre or
    waveguide. Through oblique faces the s and p powers are followed separately. No interface is
    added before the first segment or after the last.

    Returns (rows, notes): the notes are the :class:`ValidityWarning` s raised while
    evaluating each segment, prefixed by its name.
    """
    rows, upstream, joint, coating, notes = [], None, None, None, []
    for position, segment in enumerate(segments):
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", ValidityWarning)
            upstream, joint, coating = _add_segment_rows(
                rows, segments, position, wavelength_m, upstream, joint, coating)
        notes += [f"{segment.name}: {message}" for message in dict.fromkeys(str(w.message) for w in caught)]
    return tuple(rows), tuple(notes)


def _add_segment_rows(rows, segments, position, wavelength_m, upstream, joint, coating):
    """Append the rows of ``segments[position]`` (and the faces before it); return the new state."""
    segment = segments[position]
    neighbours = {"before": segments[position - 1] if position else None,
                  "after": segments[position + 1] if position + 1 < len(segments) else None}
    if segment.kind == "coating":
        return upstream, joint, segment
    index = segment.medium_index()
    if index is None:
        rows.append(segment.budget_row(wavelength_m, **neighbours))
        return upstream, segment if hasattr(segment, "joint") else joint, coating
    back_reflectance, angle, polarization = None, 0.0, segment.polarization
    share = _even_share(polarization)
    if upstream is not None:
        joint_rows, share, reflectance, back_reflectance, angle, polarization = _joint(
            upstream, segment, joint, coating, wavelength_m)
        rows.extend(joint_rows)
        if upstream.single_pass_db is not None and reflectance is not None and upstream.back_reflectance is not None:
            reflections, share = _multiple_reflections_row(upstream, reflectance, share)
            rows.append(reflections)
    n_before = index if upstream is None else upstream.segment.medium_index()
    # a tilt carries on through media in contact (their faces are parallel to the tilted one);
    # a gap, fibre or waveguide lies along the beam, so the ray inside it is at normal incidence
    carries_tilt = segment.angle is not None or segment.kind == "medium"
    inside = _refracted_angle_rad(n_before, angle, index) if carries_tilt else 0.0
    with np.errstate(divide="ignore"):
        bulk = segment.budget_row(wavelength_m, cos_inside=np.cos(inside), **neighbours)
    rows.append(bulk)
    upstream = _Carrier(segment, inside, polarization, share, back_reflectance,
                        bulk.loss_db if getattr(segment, "multiple_reflections", False) else None)
    return upstream, None, None


def evaluate(link, *, required_margin_db=None):
    """Evaluate a validated link over its wavelength axis.

    Parameters
    ----------
    link : linkbudget.config.Link
        A loaded link.
    required_margin_db : float, optional
        Override the receiver's ``required_margin`` (the CI gate's ``--min-margin``).

    Returns
    -------
    LinkResult
    """
    spec = link.spec
    wavelength_m = spec.wavelengths_m()
    rows, notes = budget_rows(link.segments, wavelength_m)
    power = spec.source.power
    source_dbm = {case: np.full(wavelength_m.shape, power.at(case, larger_hurts=False)) for case in CASES}
    receiver = spec.receiver
    return LinkResult(
        title=spec.title,
        file=link.file,
        wavelength_m=wavelength_m,
        rows=rows,
        notes=notes,
        source_dbm=source_dbm,
        sensitivity_dbm=receiver.sensitivity,
        overload_dbm=receiver.overload,
        required_margin_db=receiver.required_margin if required_margin_db is None else required_margin_db,
    )
