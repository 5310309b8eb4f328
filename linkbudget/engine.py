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
from dataclasses import dataclass, replace
from functools import cached_property

import numpy as np

from linkbudget.cautions import CAUTIONS
from linkbudget.config.fields import range_notes
from linkbudget.config.source import ConfigError, Problem
from linkbudget.physics import coherence, fresnel, thinfilm
from linkbudget.physics.decibel import (
    loss_db_from_transmittance,
    transmittance_from_loss_db,
)
from linkbudget.physics.validity import ValidityWarning, span_text
from linkbudget.segments.base import Around
from linkbudget.segments.cases import CASES, CORNERS
from linkbudget.segments.roles import Carries, Coats, Faces, Guides, Joint, Passes
from linkbudget.segments.rows import COATING_ROW, INTERFACE_ROW, POLARIZATIONS, REFLECTIONS_ROW, Row
from linkbudget.text import escaped, length_text, nm


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
    statistics: object | None = None  # a linkbudget.statistics.Statistics, when trials were asked
    axis: str = "wavelength"  # how the link gives its wavelengths: wavelength, channels or band
    review: object = None  # the reachable points' eye safety, back reflection and PDL (linkbudget.review)

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
        reflectance = np.array([np.zeros(self.wavelength_m.shape) if row.reflectance is None
                                else row.reflectance_seen for row in self.rows],
                               dtype=float).reshape(len(self.rows), -1)
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


def _stated_share(polarization, cases):
    """case name -> polarization -> power share, for light stated to be of ``polarization``
    (a name of :data:`~linkbudget.physics.fresnel.POLARIZATIONS`: its linear parts share the power)."""
    parts = fresnel.POLARIZATIONS[polarization]
    return {case.name: {pol: 1.0 / len(parts) if pol in parts else 0.0 for pol in POLARIZATIONS} for case in cases}


def _pass(share, transmittance):
    """Power passed by a polarization-dependent transmittance, and the shares after it.

    The light passes Σ_pol share_pol·T_pol of the power reaching it; after it each polarization
    holds share_pol·T_pol of that, renormalised. Chaining such steps multiplies, per
    polarization, the transmittances of every face before averaging, so an unpolarized beam
    through several oblique faces loses mean_pol(Π T_pol), not Π mean_pol(T_pol).
    """
    passed = sum(share[pol] * transmittance[pol] for pol in POLARIZATIONS)
    with np.errstate(divide="ignore", invalid="ignore"):
        after = {pol: np.where(passed > 0, share[pol] * transmittance[pol] / passed, share[pol])
                 for pol in POLARIZATIONS}
    return passed, after


def _share_row(row_id, kind, origin, share, transmittance, **typed):
    """A row whose power transmittance differs by polarization (case name -> its loss), and the
    shares after it; it records the shares of the light reaching it (the first case's)."""
    losses, after = {}, {}
    for case, case_share in share.items():
        passed, after[case] = _pass(case_share, transmittance)
        losses[case] = loss_db_from_transmittance(passed)
    return Row(row_id, kind, origin, losses, polarization_share=next(iter(share.values())),
               transmittance=transmittance, **typed), after


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
    carries (the first case's shares): one polarization's own, or for both those of unpolarized
    light, so a p-polarized face never quotes its s value.
    """
    values, caught = {}, {}
    for pol in POLARIZATIONS:
        values[pol], caught[pol] = _recorded(function, polarization=pol, **kwargs)
    carried_share = next(iter(share.values()))
    carried = [pol for pol in POLARIZATIONS if np.any(carried_share[pol] > 0)]
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
        return {pol: function(polarization=pol, **kwargs) for pol in POLARIZATIONS}


#: Index of the air around a lone window (a ``medium`` with no medium on either side). Air's
#: n − 1 ≈ 2.7e-4 in the near infrared (Ciddor 1996) changes a face's reflectance by about 0.1 %
#: of itself (< 0.0002 dB); n = 1 holds at every wavelength the tool accepts, catalog air only
#: over 230–1690 nm.
SURROUNDING_INDEX = 1.0


@dataclass(frozen=True)
class _Side:
    """A medium on one side of a face: its name in row names, the segment it is (``None`` for the
    air around a lone window), and its :class:`~linkbudget.segments.roles.Carries` role."""

    name: str
    owner: str | None
    medium: Carries


def _air_around(wavelength_m):
    """The air around a lone window, as the :class:`_Side` at its two faces."""
    return _Side("air", None, Carries(np.full(np.shape(wavelength_m), SURROUNDING_INDEX, dtype=complex)))


def _origin(*owners):
    """The segments a row sits between (the air around a window is none)."""
    return tuple(owner for owner in owners if owner is not None)


@dataclass
class _Carrier:
    """The last medium met, and what its exit face needs to know."""

    side: _Side
    exit_angle_rad: np.ndarray | float  # ray angle inside it, at its exit face
    share: dict  # case name -> polarization -> power share of the light inside it
    back_reflectance: dict | None  # polarization -> of its entry face, seen from inside
    single_pass_db: dict | None  # its bulk loss per case, when its multiple reflections are summed
    entered_through_face: bool = False  # a face (or coating) was inserted before it


def _face(up, down, origin, angle_rad, share, need_back):
    """A bare interface between two :class:`_Side` s: its row, the shares after it, its
    reflectance, and (if ``need_back``) its reflectance seen from the far side, per polarization."""
    name = f"{up.name} → {down.name}"
    n_from, n_to = up.medium.index, down.medium.index
    forward = _polarized(name, share, fresnel.interface_power_coefficients, n1=n_from, n2=n_to, angle_rad=angle_rad)
    reflectance = {pol: r for pol, (r, _) in forward.items()}
    back = None
    if need_back:
        inside = fresnel.refraction_angle_rad(n_from, n_to, angle_rad)
        back = {pol: r for pol, (r, _) in _quietly(fresnel.interface_power_coefficients, n1=n_to, n2=n_from,
                                                   angle_rad=inside).items()}
    row, share = _share_row(name, INTERFACE_ROW, origin, share, {pol: t for pol, (_, t) in forward.items()},
                            reflectance=reflectance)
    return [row], share, reflectance, back


def _coating(coating, coats, wavelength_m, n_up, n_down, angle_rad, share, need_back):
    """A coating's row, the shares after it, its reflectance, and (if ``need_back``) its
    reflectance seen from the downstream medium, each per polarization."""
    forward = _polarized(coating.name, share, thinfilm.coherent_stack, layer_index=coats.layer_index,
                         thickness_m=coats.thickness_m, wavelength_m=wavelength_m, n_incident=n_up,
                         n_exit=n_down, angle_rad=angle_rad)
    reflectance = {pol: response.reflectance for pol, response in forward.items()}
    back = None
    if need_back:
        back = {pol: response.reflectance for pol, response in _quietly(
            thinfilm.coherent_stack, layer_index=coats.layer_index[::-1], thickness_m=coats.thickness_m[::-1],
            wavelength_m=wavelength_m, n_incident=n_down, n_exit=n_up,
            angle_rad=fresnel.refraction_angle_rad(n_up, n_down, angle_rad)).items()}
    # 1 - R - T rounds to -1e-16 when lossless
    absorptance = {pol: np.maximum(response.absorptance, 0.0) for pol, response in forward.items()}
    row, share = _share_row(coating.name, COATING_ROW, (coating.name,), share,
                            {pol: response.transmittance for pol, response in forward.items()},
                            segment_kind=coating.kind, reflectance=reflectance, absorptance=absorptance,
                            part=coating.part_origin)
    return [row], share, reflectance, back


def _lone_windows(roles):
    """For each segment (by its role): it is a window (a medium with parallel faces) with no
    medium before or after it in its run of faces (joints, elements and coatings pass the run
    on), and no guide directly against it (a guide it touches is what lies on that side, its face
    unknown)."""
    def alone(run):
        for step, role in enumerate(run):
            if isinstance(role, Carries):
                return False
            if not isinstance(role, (Passes, Joint, Coats)):
                return step > 0
        return True

    return [isinstance(role, Carries) and role.parallel_faces
            and alone(reversed(roles[:position])) and alone(roles[position + 1:])
            for position, role in enumerate(roles)]


def _multiple_reflections_row(carrier, downstream, exit_reflectance, share):
    """The incoherent sum of the light bouncing between a medium's two faces, as a (negative) loss.

    T = T1·τ·T2 / (1 − R1'·R2·τ²) per polarization: the single-pass rows give T1·τ·T2, this row
    the factor :func:`linkbudget.physics.thinfilm.round_trip_factor`, with τ the single-pass
    bulk transmittance. Returns the row and the shares after it.
    """
    losses, after, factors = {}, {}, {}
    for case, single_pass_db in carrier.single_pass_db.items():
        tau = transmittance_from_loss_db(single_pass_db)
        factors[case] = {pol: thinfilm.round_trip_factor(carrier.back_reflectance[pol], exit_reflectance[pol], tau)
                         for pol in POLARIZATIONS}
        passed, after[case] = _pass(share[case], factors[case])
        losses[case] = loss_db_from_transmittance(passed)
    name = f"{carrier.side.name} multiple reflections"
    return Row(name, REFLECTIONS_ROW, _origin(carrier.side.owner, downstream.owner), losses,
               transmittance=next(iter(factors.values()))), after


def _noted(notes, owner, function, *args):
    """``function(*args)``, with the :class:`ValidityWarning` s it raises added to ``notes`` as
    (owner, message) for ``owner`` (or the owner the warning names)."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", ValidityWarning)
        value = function(*args)
    notes.extend((w.message.owner if isinstance(w.message, _RowNote) else owner, str(w.message)) for w in caught
                 if issubclass(w.category, ValidityWarning))
    return value


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


class _ChainWalk:
    """The engine's walk along the chain: it appends each segment's row, and inserts the faces,
    coatings and multiple-reflection sums between media, from the segments' roles alone.

    State between segments: the last medium met (``upstream``, a :class:`_Carrier`), and the
    joint and the coating met since then.
    """

    def __init__(self, wavelength_m, cases, spectral_width_m):
        self.wavelength_m, self.cases, self.spectral_width_m = wavelength_m, cases, spectral_width_m
        self.rows = []
        self._end_run()

    def _end_run(self):
        self.upstream, self.joint, self.coating = None, None, None

    def add(self, segment, role, around, lone):
        """Append the rows of ``segment`` (of ``role``), and the faces before it."""
        match role:
            case Coats():
                self.coating = (segment, role)
            case Carries():
                self._add_medium(segment, role, around, lone)
            case Joint():
                self.rows.append(segment.budget_row(self.wavelength_m, self.cases, around))
                self.joint = (segment, role)
            case Passes():
                self.rows.append(segment.budget_row(self.wavelength_m, self.cases, around))
            case Guides():
                self.rows.append(segment.budget_row(self.wavelength_m, self.cases, around))
                self._end_run()

    def _add_medium(self, segment, medium, around, lone):
        """A medium's bulk row and the faces before it; a ``lone`` window has its two faces to the
        air around it (:data:`SURROUNDING_INDEX`)."""
        side = _Side(segment.name, segment.name, medium)
        share = _stated_share(medium.polarization or "unpolarized", self.cases)
        air = _air_around(self.wavelength_m) if lone else None
        if lone:
            self.upstream, self.joint, self.coating = _Carrier(air, 0.0, share, None, None), None, None
        back_reflectance, angle, entered_through_face, upstream = None, 0.0, False, self.upstream
        if upstream is not None:
            angle = upstream.exit_angle_rad if medium.angle_rad is None else medium.angle_rad
            share = upstream.share if medium.polarization is None else share
            share, back_reflectance, entered_through_face = self._faces_between(side, angle, share)
            if entered_through_face:
                self._note_faced_gaps()
        n_before = medium.index if upstream is None else upstream.side.medium.index
        # a tilt carries on through media in contact (their faces are parallel to the tilted one);
        # a gap, fibre or waveguide lies along the beam, so the ray inside it is at normal incidence
        carries_tilt = medium.angle_rad is not None or medium.parallel_faces
        inside = fresnel.refraction_angle_rad(n_before, medium.index, angle) if carries_tilt else 0.0
        tangential_index = np.real(n_before) * np.sin(angle) if carries_tilt else 0.0  # Snell: conserved
        bulk = segment.budget_row(self.wavelength_m, self.cases,
                                  Around(around.mode_before, around.mode_after, tangential_index))
        self.rows.append(bulk)
        self.upstream = _Carrier(side, inside, share, back_reflectance,
                                 bulk.loss_db if medium.multiple_reflections else None, entered_through_face)
        self.joint, self.coating = None, None
        if lone:
            self._faces_between(air, inside, share)
            self._note_faced_gaps()
            self._end_run()

    def _faces_between(self, downstream, angle, share):
        """Append the faces between the medium upstream and ``downstream`` (a :class:`_Side`), and
        the sum of the multiple reflections in the upstream medium; return the shares after them,
        the back-reflectance of the last face, and whether a face was inserted."""
        rows, share, reflectance, back_reflectance = self._joint_faces(downstream, angle, share)
        self.rows.extend(rows)
        upstream = self.upstream
        if upstream.single_pass_db is not None and reflectance is not None and upstream.back_reflectance is not None:
            reflections, share = _multiple_reflections_row(upstream, downstream, reflectance, share)
            self.rows.append(reflections)
        return share, back_reflectance, bool(rows)

    def _joint_faces(self, downstream, angle_rad, share):
        """Rows between two media: (rows, shares after them, reflectance of the first face met,
        back-reflectance of the last face); reflectances per polarization, ``None`` without a face."""
        up = self.upstream.side
        n_up, n_down = up.medium.index, downstream.medium.index
        need_back = downstream.medium.multiple_reflections
        if self.coating is not None:
            coating, coats = self.coating
            return _coating(coating, coats, self.wavelength_m, n_up, n_down, angle_rad, share, need_back)
        faces = Faces.CONTACT if self.joint is None else self.joint[1].faces
        if faces is Faces.NONE or (faces is Faces.CONTACT and np.array_equal(n_up, n_down)):
            return [], share, None, None
        if faces is Faces.GAP:
            joint, role = self.joint
            gap = _Side(f"{joint.name} gap", joint.name, Carries(role.gap_index))
            first, share, reflectance, _ = _face(up, gap, _origin(up.owner, joint.name), angle_rad, share, False)
            angle_gap = fresnel.refraction_angle_rad(n_up, role.gap_index, angle_rad)
            second, share, _, back = _face(gap, downstream, _origin(joint.name, downstream.owner), angle_gap,
                                           share, need_back)
            return first + second, share, reflectance, back
        return _face(up, downstream, _origin(up.owner, downstream.owner), angle_rad, share, need_back)

    def _note_faced_gaps(self):
        """The coherence notes of the media just left between two faces: the medium upstream
        (entered through a face, a plate with parallel faces) and an air-gap joint's gap."""
        upstream, width = self.upstream, self.spectral_width_m
        medium = upstream.side.medium
        if upstream.entered_through_face and medium.parallel_faces:
            _note_coherence(upstream.side.name, medium.thinnest_m, np.real(medium.index), self.wavelength_m, width)
        if self.joint is not None and self.joint[1].faces is Faces.GAP and self.joint[1].shortest_gap_m > 0:
            joint, role = self.joint
            _note_coherence(joint.name, role.shortest_gap_m, np.real(role.gap_index), self.wavelength_m, width)


def budget_rows(segments, wavelength_m, spectral_width_m=None, cases=CORNERS):
    """The budget rows: every segment, with the interfaces and coatings between media inserted.

    Between two consecutive segments that carry a medium the engine inserts their interface
    (Fresnel, at the angle the downstream segment gives, or the one the upstream segment's
    tilted faces give its exit face), or the coating that sits between them (at the same angle),
    or what the joint of a connector or splice between them says (index-matched: nothing; air
    gap: two faces). Joints and elements pass the light on between two media; a guide without a
    medium of its own ends the run of faces. A medium's ``angle`` tilts both of its (parallel)
    faces and lengthens its path by 1/cos θ; the tilt carries on through media in contact with it
    and ends at the next gap, fibre or waveguide. Through every face the s and p powers are
    followed separately (a segment's ``polarization`` states the light arriving at it;
    unpolarized at the start). No interface is added before the first segment or after the last.
    What each segment does is its :mod:`~linkbudget.segments.roles` role.

    ``cases`` are the budget cases (:mod:`linkbudget.segments.cases`): the corners, or draws,
    whose rows then hold (n_draws, n_wavelengths) arrays.

    Returns (rows, notes): the notes are the :class:`ValidityWarning` s raised by each segment's
    own model (its mode, its loss), prefixed by its name, and the coherence notes of media
    between two faces (``spectral_width_m``: the source's, if given); each row holds its own.
    """
    notes = [(segment.name, note) for segment in segments for note in segment.input_notes()]
    modes = [_noted(notes, segment.name, segment.mode, wavelength_m) for segment in segments]
    roles = [segment.role() for segment in segments]
    walk = _ChainWalk(wavelength_m, cases, spectral_width_m)
    for position, (segment, role, lone) in enumerate(zip(segments, roles, _lone_windows(roles), strict=True)):
        around = Around(modes[position - 1] if position else None,
                        modes[position + 1] if position + 1 < len(segments) else None)
        _noted(notes, segment.name, walk.add, segment, role, around, lone)
    notes = list(dict.fromkeys(notes))  # a note said once, where its owner is first met
    rows = tuple(replace(row, notes=tuple(message for owner, message in notes if owner == row.id))
                 for row in walk.rows)
    return rows, tuple(f"{owner}: {message}" for owner, message in notes)


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
    names = [segment.name for segment in link.segments]
    # an inserted face is placed at the segment after it; the light bouncing in a medium, at it
    owner = row.origin[0] if row.kind == REFLECTIONS_ROW else row.origin[-1]
    path = ("chain", names.index(owner))
    mark = None if link.positions is None else link.positions.mark(path)
    return Problem(link.file, mark, path,
                   f"the budget is not finite at {nm(result.wavelength_m[index])}: row '{escaped(row.name)}' "
                   f"loses {values}; the values are outside what the models can evaluate",
                   "check the index, thickness and loss values of this segment")


def evaluate(link, *, required_margin_db=None, review=True):
    """Evaluate a validated link over its wavelength axis.

    Parameters
    ----------
    link : linkbudget.config.Link
        A loaded link.
    required_margin_db : float, optional
        Override the receiver's ``required_margin`` (the CI gate's ``--min-margin``).
    review : bool, optional
        Also assess the reachable points, the back reflection and the PDL (``LinkResult.review``);
        a search that evaluates the link many times for its margin alone (``reach``) leaves it out.

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
    notes = (*(f"{part}: {note}" for part, model in (("source", spec.source), ("receiver", spec.receiver))
             for note in range_notes(model)),
             *notes)
    power = spec.source.power
    source_dbm = {case.name: np.full(wavelength_m.shape, case.value(power, larger_hurts=False)) for case in CORNERS}
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
        axis="channels" if spec.channels is not None else "band" if spec.band is not None else "wavelength",
    )
    problem = _not_finite_problem(result, link)
    if problem is not None:
        raise ConfigError([problem])
    if not review:
        return result
    from linkbudget.review import review_link

    reviewed = replace(result, review=review_link(link, result))
    reviewed.__dict__.update(result.__dict__ | reviewed.__dict__)  # keep the cached arrays the review computed
    return reviewed
