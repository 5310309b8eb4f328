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
from linkbudget.config.fields import CASES, range_notes
from linkbudget.config.ranges import index_notes
from linkbudget.config.source import ConfigError, Problem
from linkbudget.physics import coherence, fresnel, thinfilm
from linkbudget.physics.decibel import (
    loss_db_from_transmittance,
    transmittance_from_loss_db,
)
from linkbudget.physics.validity import ValidityWarning, span_text
from linkbudget.segments.base import Row
from linkbudget.text import length_text


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
    description: str | None = None  # the link's own words, as written
    source_name: str | None = None
    receiver_name: str | None = None
    cautions: tuple = CAUTIONS

    @cached_property
    def loss_db(self):
        """case -> loss of every row, shape (n_rows, n_wavelengths)."""
        return {case: np.array([row.loss_db[case] for row in self.rows]) for case in CASES}

    @cached_property
    def cumulative_loss_db(self):
        """case -> cumulative loss after every row, shape (n_rows, n_wavelengths); +inf from a row
        of total internal reflection on (whatever the rows after it, which no light reaches)."""
        with np.errstate(invalid="ignore"):
            return {case: np.where(self.blocked, np.inf, np.cumsum(losses, axis=0))
                    for case, losses in self.loss_db.items()}

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

    @cached_property
    def total_internal_reflection(self):
        """Mask (n_rows, n_wavelengths): the row is a face or coating that reflects all the light
        (total internal reflection), so its loss is +inf. The only non-finite values a result holds
        are this loss and the values after it at that wavelength (no light reaches them)."""
        reflectance = np.array([row.detail.get("reflectance", np.zeros(self.wavelength_m.shape))
                                for row in self.rows], dtype=float).reshape(len(self.rows), -1)
        return np.isposinf(self.loss_db["typ"]) & (reflectance >= 1 - 1e-9)

    @cached_property
    def blocked(self):
        """Mask (n_rows, n_wavelengths): no light reaches past this row, a total internal
        reflection at it or before it at that wavelength."""
        return np.logical_or.accumulate(self.total_internal_reflection, axis=0)

    @property
    def closes(self):
        return self.margin_ok and self.overload_ok

    @property
    def governing_index(self):
        """Index of the wavelength with the smallest worst-case margin."""
        return int(np.argmin(self.margin_db["worst"]))


#: The linear polarizations whose powers are followed separately through every face.
_POLARIZATIONS = ("s", "p")

#: Power shares of s and p light for each ``polarization`` a segment may state.
_STATED_SHARES = {"unpolarized": {"s": 0.5, "p": 0.5}, "s": {"s": 1.0, "p": 0.0}, "p": {"s": 0.0, "p": 1.0}}


def _stated_share(polarization):
    """case -> polarization -> power share, for light stated to be of ``polarization``."""
    return {case: dict(_STATED_SHARES[polarization]) for case in CASES}


def _pass(share, transmittance):
    """Power passed by a polarization-dependent transmittance, and the shares after it.

    The light passes Σ_pol share_pol·T_pol of the power reaching it; after it each polarization
    holds share_pol·T_pol of that, renormalised. Chaining such steps multiplies, per
    polarization, the transmittances of every face before averaging, so an unpolarized beam
    through several oblique faces loses mean_pol(Π T_pol), not Π mean_pol(T_pol).
    """
    passed = sum(share[pol] * transmittance[pol] for pol in _POLARIZATIONS)
    with np.errstate(divide="ignore", invalid="ignore"):
        after = {pol: np.where(passed > 0, share[pol] * transmittance[pol] / passed, share[pol])
                 for pol in _POLARIZATIONS}
    return passed, after


def _share_row(name, kind, share, transmittance, **detail):
    """A row whose power transmittance differs by polarization, and the shares after it (per case).

    ``detail`` values (per polarization) are reported weighted by the typical case's shares.
    """
    losses, after = {}, {}
    for case in CASES:
        passed, after[case] = _pass(share[case], transmittance)
        losses[case] = loss_db_from_transmittance(passed)
    weighted = {key: sum(share["typ"][pol] * value[pol] for pol in _POLARIZATIONS) for key, value in detail.items()}
    return Row(name, kind, losses, weighted), after


class _RowNote(ValidityWarning):
    """A validity note that belongs to another row than the segment being added (a face, a
    coating, the medium before it), under that row's name."""

    def __init__(self, owner, message):
        super().__init__(message)
        self.owner = owner


def _recorded(function, **kwargs):
    """``function(**kwargs)`` and the warnings it raised."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        value = function(**kwargs)
    return value, caught


def _polarized(row_name, share, function, **kwargs):
    """pol -> ``function(polarization=pol, **kwargs)`` for s and p (their powers are followed apart).

    Its :class:`ValidityWarning` s are raised once, under ``row_name``, for the light the row
    carries (the typical case's shares): one polarization's own, or for both those of unpolarized
    light, so a p-polarized face never quotes its s value.
    """
    values, caught = {}, {}
    for pol in _POLARIZATIONS:
        values[pol], caught[pol] = _recorded(function, polarization=pol, **kwargs)
    carried = [pol for pol in _POLARIZATIONS if np.any(share["typ"][pol] > 0)]
    if len(carried) != 1 and any(caught.values()):
        _, caught["unpolarized"] = _recorded(function, polarization="unpolarized", **kwargs)
        carried = ["unpolarized"]
    for warning in (w for pol in carried for w in caught[pol]):
        is_note = issubclass(warning.category, ValidityWarning)
        warnings.warn(_RowNote(row_name, str(warning.message)) if is_note else warning.message, stacklevel=2)
    return values


def _quietly(function, **kwargs):
    """pol -> ``function(polarization=pol, **kwargs)``, its validity notes dropped (a face seen from
    inside, whose reflectance only enters the multiple-reflection sum, checked against tmm)."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", ValidityWarning)
        return {pol: function(polarization=pol, **kwargs) for pol in _POLARIZATIONS}


def _face(name_from, name_to, n_from, n_to, angle_rad, share, need_back):
    """A bare interface: its row, the shares after it, its reflectance, and (if ``need_back``) its
    reflectance seen from the far side, each per polarization."""
    name = f"{name_from} → {name_to}"
    forward = _polarized(name, share, fresnel.interface_power_coefficients, n1=n_from, n2=n_to, angle_rad=angle_rad)
    reflectance = {pol: r for pol, (r, _) in forward.items()}
    back = None
    if need_back:
        inside = fresnel.refraction_angle_rad(n_from, n_to, angle_rad)
        back = {pol: r for pol, (r, _) in _quietly(fresnel.interface_power_coefficients, n1=n_to, n2=n_from,
                                                   angle_rad=inside).items()}
    row, share = _share_row(name, "interface", share, {pol: t for pol, (_, t) in forward.items()},
                            reflectance=reflectance)
    return [row], share, reflectance, back


def _coating(coating, wavelength_m, n_up, n_down, angle_rad, share, need_back):
    """A coating's row, the shares after it, its reflectance, and (if ``need_back``) its
    reflectance seen from the downstream medium, each per polarization."""
    forward = _polarized(coating.name, share, thinfilm.coherent_stack, layer_index=coating.layer_index,
                         thickness_m=coating.thickness_m, wavelength_m=wavelength_m, n_incident=n_up,
                         n_exit=n_down, angle_rad=angle_rad)
    reflectance = {pol: response.reflectance for pol, response in forward.items()}
    back = None
    if need_back:
        back = {pol: response.reflectance for pol, response in _quietly(
            thinfilm.coherent_stack, layer_index=coating.layer_index[::-1], thickness_m=coating.thickness_m[::-1],
            wavelength_m=wavelength_m, n_incident=n_down, n_exit=n_up,
            angle_rad=fresnel.refraction_angle_rad(n_up, n_down, angle_rad)).items()}
    # 1 - R - T rounds to -1e-16 when lossless
    absorptance = {pol: np.maximum(response.absorptance, 0.0) for pol, response in forward.items()}
    row, share = _share_row(coating.name, "coating", share,
                            {pol: response.transmittance for pol, response in forward.items()},
                            reflectance=reflectance, absorptance=absorptance)
    return [row], share, reflectance, back


@dataclass
class _Carrier:
    """The last segment that carried a medium, and what its exit face needs to know."""

    segment: object
    exit_angle_rad: np.ndarray | float  # ray angle inside it, at its exit face
    share: dict  # case -> polarization -> power share of the light inside it
    back_reflectance: dict | None  # polarization -> of its entry face, seen from inside
    single_pass_db: dict | None  # its bulk loss per case, when its multiple reflections are summed
    entered_through_face: bool = False  # a face (or coating) was inserted before it


def _joint_faces(upstream, segment, joint, coating, wavelength_m, angle_rad, share):
    """Rows between two media: (rows, shares after them, reflectance of the first face met,
    back-reflectance of the last face); reflectances per polarization, ``None`` without a face."""
    n_up, n_down = upstream.segment.medium_index(), segment.medium_index()
    need_back = getattr(segment, "multiple_reflections", False)
    if coating is not None:
        return _coating(coating, wavelength_m, n_up, n_down, angle_rad, share, need_back)
    kind = "physical-contact" if joint is None else joint.joint_type
    if kind == "index-matched" or (kind == "physical-contact" and np.array_equal(n_up, n_down)):
        return [], share, None, None
    if kind == "air-gap":
        n_gap, gap_name = joint.gap_medium_index(), f"{joint.name} gap"
        first, share, reflectance, _ = _face(upstream.segment.name, gap_name, n_up, n_gap, angle_rad, share, False)
        angle_gap = fresnel.refraction_angle_rad(n_up, n_gap, angle_rad)
        second, share, _, back = _face(gap_name, segment.name, n_gap, n_down, angle_gap, share, need_back)
        return first + second, share, reflectance, back
    return _face(upstream.segment.name, segment.name, n_up, n_down, angle_rad, share, need_back)


#: Index of the air around a lone window (a ``medium`` with no medium on either side). Air's
#: n − 1 ≈ 2.7e-4 in the near infrared (Ciddor 1996) changes a face's reflectance by about 0.1 %
#: of itself (< 0.0002 dB); n = 1 holds at every wavelength the tool accepts, catalog air only
#: over 230–1690 nm.
SURROUNDING_INDEX = 1.0


@dataclass(frozen=True)
class _Surroundings:
    """The air around a lone window, standing in for a segment at its two faces."""

    index: np.ndarray
    name: str = "air"

    def medium_index(self):
        return self.index


def _lone_windows(segments):
    """For each segment: it is a window (a ``medium``, parallel faces) with no segment carrying a
    medium before or after it in its run of faces (joints and elements pass the run on), and no
    fibre, waveguide or splitter directly against it (a guide it touches is what lies on that side,
    its face unknown)."""
    def alone(run):
        for step, neighbour in enumerate(run):
            if neighbour.medium_index() is not None:
                return False
            if not (neighbour.passes_faces or neighbour.is_coating):
                return step > 0
        return True

    return [segment.parallel_faces and segment.medium_index() is not None
            and alone(reversed(segments[:position])) and alone(segments[position + 1:])
            for position, segment in enumerate(segments)]


def _multiple_reflections_row(carrier, exit_reflectance, share):
    """The incoherent sum of the light bouncing between a medium's two faces, as a (negative) loss.

    T = T1·τ·T2 / (1 − R1'·R2·τ²) per polarization: the single-pass rows give T1·τ·T2, this row
    the factor :func:`linkbudget.physics.thinfilm.round_trip_factor`, with τ the single-pass
    bulk transmittance. Returns the row and the shares after it.
    """
    losses, after = {}, {}
    for case, single_pass_db in carrier.single_pass_db.items():
        tau = transmittance_from_loss_db(single_pass_db)
        factor = {pol: thinfilm.round_trip_factor(carrier.back_reflectance[pol], exit_reflectance[pol], tau)
                  for pol in _POLARIZATIONS}
        passed, after[case] = _pass(share[case], factor)
        losses[case] = loss_db_from_transmittance(passed)
    return Row(f"{carrier.segment.name} multiple reflections", "reflections", losses), after


def _noted(notes, owner, function, *args):
    """``function(*args)``, with the :class:`ValidityWarning` s it raises added to ``notes`` for ``owner``."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", ValidityWarning)
        value = function(*args)
    notes.extend(f"{getattr(w.message, 'owner', owner)}: {w.message}" for w in caught
                 if issubclass(w.category, ValidityWarning))
    return value


def segment_notes(segment):
    """Notes on a segment's possible but unusual input: its values (:func:`range_notes`) and a
    metal's index (:func:`linkbudget.config.ranges.index_notes`) on its own faces or in its layers."""
    notes = range_notes(segment)
    index = segment.medium_index()
    if index is not None:
        notes += index_notes(index)
    if segment.is_coating:
        notes += [f"layers[{number}]: {note}" for number, layer_index in enumerate(segment.layer_index)
                  for note in index_notes(layer_index)]
    return notes


def _coherence_problem(thickness_m, n_real, wavelength_m, spectral_width_m):
    """Why a medium between two faces may not be summed incoherently, or ``None``.

    With the source's spectral width: the medium is thinner than the coherence length in it,
    λ²/(n·Δλ) (:func:`linkbudget.physics.coherence.coherence_length_m`). Without it: thinner
    than :data:`~linkbudget.physics.coherence.THICK_MEDIUM_WAVELENGTHS` wavelengths.
    """
    thick = length_text(thickness_m)
    if spectral_width_m is None:
        if np.all(thickness_m >= coherence.THICK_MEDIUM_WAVELENGTHS * wavelength_m):
            return None
        return (f"{thick} thick, under {coherence.THICK_MEDIUM_WAVELENGTHS} wavelengths: its two faces are summed "
                "without interference, which holds only if the source's coherence length is shorter; give "
                "`source.spectral_width` to check it")
    length_m = coherence.coherence_length_m(wavelength_m, spectral_width_m, n=n_real)
    if np.all(thickness_m >= length_m):
        return None
    return (f"{thick} thick, thinner than the source's coherence length in it ({span_text(length_m * 1e3, 4, ' mm')}"
            f", λ²/(n·Δλ)): the reflections at its two faces interfere, and the fringes this makes in its "
            "transmittance are averaged out here")


def _note_coherence(owner, thickness_m, n_real, wavelength_m, spectral_width_m):
    """Raise the note of :func:`_coherence_problem` for ``owner``, if any."""
    problem = _coherence_problem(thickness_m, n_real, wavelength_m, spectral_width_m)
    if problem is not None:
        warnings.warn(_RowNote(owner, problem), stacklevel=2)


def _note_faced_gaps(upstream, joint, wavelength_m, spectral_width_m):
    """The coherence notes of the media just left between two faces: the medium ``upstream``
    (entered through a face, a plate with parallel faces) and an air-gap ``joint``'s gap."""
    if upstream.entered_through_face and upstream.segment.parallel_faces:
        thinnest_m = min(upstream.segment.path_length_m(case) for case in CASES)
        _note_coherence(upstream.segment.name, thinnest_m, np.real(upstream.segment.medium_index()),
                        wavelength_m, spectral_width_m)
    if joint is not None and joint.joint_type == "air-gap" and joint.gap is not None and joint.gap.low > 0:
        _note_coherence(joint.name, joint.gap.low, np.real(joint.gap_medium_index()), wavelength_m,
                        spectral_width_m)


def budget_rows(segments, wavelength_m, spectral_width_m=None):
    """The budget rows: every segment, with the interfaces and coatings between media inserted.

    Between two consecutive segments that carry a medium the engine inserts their interface
    (Fresnel, at the angle the downstream segment gives, or the one the upstream segment's
    tilted faces give its exit face), or the coating that sits between them (at the same angle),
    or what the joint of a connector or splice between them says (index-matched: nothing; air
    gap: two faces). Joints and elements pass the light on between two media; a fibre,
    waveguide or splitter without a medium of its own ends the run of faces (the light is
    guided in between). A medium's ``angle`` tilts both of its (parallel) faces and lengthens its
    path by 1/cos θ; the tilt carries on through media in contact with it and ends at the next
    gap, fibre or waveguide. Through every face the s and p powers are followed separately (a
    segment's ``polarization`` states the light arriving at it; unpolarized at the start). No
    interface is added before the first segment or after the last.

    Returns (rows, notes): the notes are the :class:`ValidityWarning` s raised by each segment's
    own model (its mode, its loss), prefixed by its name, and the coherence notes of media
    between two faces (``spectral_width_m``: the source's, if given).
    """
    notes = [f"{segment.name}: {note}" for segment in segments for note in segment_notes(segment)]
    modes = [_noted(notes, segment.name, segment.mode, wavelength_m) for segment in segments]
    lone = _lone_windows(segments)
    rows, upstream, joint, coating = [], None, None, None
    for position, segment in enumerate(segments):
        around = {"mode_before": modes[position - 1] if position else None,
                  "mode_after": modes[position + 1] if position + 1 < len(segments) else None}
        upstream, joint, coating = _noted(notes, segment.name, _add_segment_rows, rows, segment, around,
                                          wavelength_m, upstream, joint, coating, lone[position], spectral_width_m)
    return tuple(rows), tuple(dict.fromkeys(notes))  # a note said once, where its owner is first met


def _faces_between(rows, upstream, segment, joint, coating, wavelength_m, angle, share):
    """Append the faces between the medium of ``upstream`` and that of ``segment`` (and the sum of
    the multiple reflections in ``upstream``); return the shares after them and the back-
    reflectance of the last face."""
    joint_rows, share, reflectance, back_reflectance = _joint_faces(
        upstream, segment, joint, coating, wavelength_m, angle, share)
    rows.extend(joint_rows)
    if upstream.single_pass_db is not None and reflectance is not None and upstream.back_reflectance is not None:
        reflections, share = _multiple_reflections_row(upstream, reflectance, share)
        rows.append(reflections)
    return share, back_reflectance, bool(joint_rows)


def _add_segment_rows(rows, segment, around, wavelength_m, upstream, joint, coating, lone=False,
                      spectral_width_m=None):
    """Append the rows of ``segment`` (and the faces before it); return the new state.

    A ``lone`` window has its two faces to the air around it (:data:`SURROUNDING_INDEX`).
    """
    if segment.is_coating:
        return upstream, joint, segment
    index = segment.medium_index()
    if index is None:
        rows.append(segment.budget_row(wavelength_m, **around))
        if not segment.passes_faces:
            return None, None, None
        return upstream, segment if segment.sets_joint else joint, coating
    back_reflectance, angle = None, 0.0
    polarization = segment.polarization or "unpolarized"
    share = _stated_share(polarization)
    surroundings = _Surroundings(np.full(np.shape(wavelength_m), SURROUNDING_INDEX, dtype=complex)) if lone else None
    if lone:
        upstream, joint, coating = _Carrier(surroundings, 0.0, share, None, None), None, None
    entered_through_face = False
    if upstream is not None:
        angle = upstream.exit_angle_rad if segment.angle is None else segment.angle
        share = upstream.share if segment.polarization is None else share
        share, back_reflectance, entered_through_face = _faces_between(
            rows, upstream, segment, joint, coating, wavelength_m, angle, share)
        if entered_through_face:
            _note_faced_gaps(upstream, joint, wavelength_m, spectral_width_m)
    n_before = index if upstream is None else upstream.segment.medium_index()
    # a tilt carries on through media in contact (their faces are parallel to the tilted one);
    # a gap, fibre or waveguide lies along the beam, so the ray inside it is at normal incidence
    carries_tilt = segment.angle is not None or segment.parallel_faces
    inside = fresnel.refraction_angle_rad(n_before, index, angle) if carries_tilt else 0.0
    tangential_index = np.real(n_before) * np.sin(angle) if carries_tilt else 0.0  # Snell: conserved
    bulk = segment.budget_row(wavelength_m, tangential_index=tangential_index, **around)
    rows.append(bulk)
    upstream = _Carrier(segment, inside, share, back_reflectance,
                        bulk.loss_db if getattr(segment, "multiple_reflections", False) else None,
                        entered_through_face)
    if lone:
        _faces_between(rows, upstream, surroundings, None, None, wavelength_m, inside, share)
        _note_faced_gaps(upstream, None, wavelength_m, spectral_width_m)
        return None, None, None
    return upstream, None, None


def _row_segments(rows, segments):
    """The chain index each row belongs to: a segment's own row to it, a multiple-reflection row to
    its medium (the last segment before it), an inserted face to the segment after it."""
    owners, pending, position = [], [], 0
    for number, row in enumerate(rows):
        if row.kind == "interface":
            pending.append(number)
        elif row.kind != "reflections":
            position = next((i for i in range(position, len(segments)) if segments[i].name == row.name), position)
            for face in pending:
                owners[face] = position
            pending = []
        owners.append(position)
    return owners


def _not_finite_problem(result, link):
    """The placed :class:`Problem` of the first value of ``result`` that is not finite (NaN, an
    infinite gain, an overflow), or ``None``. Total internal reflection is the one allowed case:
    it blocks the light, and nothing after it at that wavelength is evaluated."""
    bad = np.zeros(result.blocked.shape, dtype=bool)
    for case in CASES:
        bad |= ~np.isfinite(result.loss_db[case]) & ~result.blocked
        bad |= ~np.isfinite(result.power_after_dbm[case]) & ~result.blocked
    if not bad.any():
        return None
    number, index = (int(i) for i in np.argwhere(bad)[0])
    row = result.rows[number]
    values = ", ".join(f"{case} {result.loss_db[case][number, index]:g} dB" for case in CASES)
    owner = _row_segments(result.rows, link.segments)[number]
    path = ("chain", owner)
    mark = None if link.positions is None else link.positions.mark(path)
    from linkbudget.report.summary import nm
    from linkbudget.text import escaped

    return Problem(link.file, mark, path,
                   f"the budget is not finite at {nm(result.wavelength_m[index])}: row '{escaped(row.name)}' "
                   f"loses {values}; the values are outside what the models can evaluate",
                   "check the index, thickness and loss values of this segment")


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

    Raises
    ------
    linkbudget.ConfigError
        When a loss, power or margin is not finite (NaN, an infinite gain), placed at the segment
        of the first such row; only total internal reflection may block the light (+inf loss).
    """
    spec = link.spec
    wavelength_m = spec.wavelengths_m()
    rows, notes = budget_rows(link.segments, wavelength_m, spec.source.spectral_width)
    notes = (*(f"{part}: {note}" for part in ("source", "receiver") for note in range_notes(getattr(spec, part))),
             *notes)
    power = spec.source.power
    source_dbm = {case: np.full(wavelength_m.shape, power.at(case, larger_hurts=False)) for case in CASES}
    receiver = spec.receiver
    result = LinkResult(
        title=spec.title,
        description=spec.description,
        source_name=spec.source.name,
        receiver_name=receiver.name,
        file=link.file,
        wavelength_m=wavelength_m,
        rows=rows,
        notes=notes,
        source_dbm=source_dbm,
        sensitivity_dbm=receiver.sensitivity,
        overload_dbm=receiver.overload,
        required_margin_db=receiver.required_margin if required_margin_db is None else required_margin_db,
    )
    problem = _not_finite_problem(result, link)
    if problem is not None:
        raise ConfigError([problem])
    return result
