"""What a change did to a link: two evaluated revisions compared, as plain data (no printing).

Matching rules
--------------
- **Segments** are matched by name (an unnamed segment's name is its kind and position, e.g.
  ``fiber 2``). A segment only in the old link and one only in the new are a **rename** when their
  written entries are identical except for ``name``: same ``kind``, the same keys, every value
  written the same (``3 m`` and ``3m`` differ). Such pairs are taken in chain order, each segment at
  most once; its loss change is still given (zero unless what lies around it changed). A
  segment renamed *and* edited is reported as removed plus added.
- **Rows** (a segment's own row, and the faces the engine inserts between media) are matched by
  their stable origin: the row's kind and the names of the segments it sits between, old names
  mapped through the renames found (the n-th row of a kind and origin to the n-th).
- **Wavelengths** are matched by value to 1e-6 nm; every change is given at the wavelengths both
  revisions carry, and the ones only one of them carries are listed.
- **Changed keys** compare what is written: each leaf of a segment's (or the link's) YAML mapping
  by its key path (``attenuation.max``, ``layers[1].thickness``), old text → new text, ``None``
  where one side does not write it.

A change is new minus old: a loss change > 0 loses more; a margin change < 0 lost margin.
"""

import hashlib
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from linkbudget.config.source import ConfigError, Problem, load_yaml
from linkbudget.paths import PathRefused
from linkbudget.segments.rows import COATING_ROW, SEGMENT_ROW
from linkbudget.text import escaped

#: The statuses of a segment or inserted row in a diff.
STATUSES = (ADDED, REMOVED, RENAMED, CHANGED, UNCHANGED) = ("added", "removed", "renamed", "changed", "unchanged")
#: Budget cases a loss change is given for, and those a received power change is given for.
LOSS_CASES = ("typ", "worst")
POWER_CASES = ("typ", "worst", "best")
#: Decimals of nm to which two wavelengths are the same wavelength.
WAVELENGTH_MATCH_DECIMALS = 6
#: A loss change smaller than this [dB] is no change (float noise of a re-evaluation).
SAME_LOSS_DB = 1e-9


@dataclass(frozen=True)
class Side:
    """One revision of a link: its name in messages, written data, loaded link and result, and the
    SHA-256 (hex) of the link's text as read (of the file, or of the file at a git revision)."""

    label: str
    data: dict
    link: object
    result: object
    link_path: Path | None = None  # the file of the machine read, if any (never overwritten)
    text_sha256: str | None = None


def load_side(path, *, reader, label=None):
    """Read ``path`` through ``reader`` (:mod:`linkbudget.reader`), load and evaluate it.

    Raises
    ------
    ConfigError
        For every input problem, placed in the file as ``run`` places it (a file the reader
        refuses is a problem of that file).
    """
    from linkbudget.config.loader import parse_link
    from linkbudget.engine import evaluate

    try:
        source = reader.read(str(path))
    except PathRefused as error:
        raise ConfigError([Problem(label or str(path), None, (), str(error), error.hint)]) from None
    link = parse_link(source.text, source.name, Path(str(path)).parent, reader=reader)
    data, _ = load_yaml(source.text, source.name)
    return Side(label or source.name, data, link, evaluate(link), source.path,
                hashlib.sha256(source.text.encode("utf-8")).hexdigest())


#: Between the two revisions of a range.
RANGE_MARK = ".."


def load_sides(first, second=None, *, against=None, allow_paths=()):
    """The old and new :class:`Side` of ``diff``: two files (``first``, ``second``); the file
    ``first`` at revision ``against`` and as it is now; or ``first`` at the two revisions of the
    range ``second`` (``REV1..REV2``; an empty end is ``HEAD``). A ``second`` holding ``..`` that
    names an existing file is that file. Every revision is resolved before anything is loaded.

    Raises
    ------
    linkbudget.gitread.GitError
        A revision that names no commit, no repository, git missing, a path outside the repository.
    ConfigError
        Either link's input problems, placed.
    """
    from linkbudget.gitread import GitError, GitRevisionReader, repository_path
    from linkbudget.reader import WorkingTreeReader

    working_tree = WorkingTreeReader(tuple(allow_paths))
    is_range = second is not None and RANGE_MARK in second and not Path(second).exists()
    if against is None and not is_range:
        if second is None:
            raise GitError("diff: give the new link file, a range REV1..REV2, or --against REV")
        return load_side(first, reader=working_tree), load_side(second, reader=working_tree)
    if against is not None and second is not None:
        raise GitError("diff: --against REV compares LINK with its working-tree file; give no second argument")
    if is_range and "..." in second:
        raise GitError(f"diff: '{escaped(second)}': give a range as REV1..REV2 (two dots)")
    revisions = [against] if against is not None else [text or "HEAD" for text in second.split(RANGE_MARK, 1)]
    located = repository_path(first)
    given = "--against" if against is not None else f"range '{escaped(second)}'"
    try:
        readers = [GitRevisionReader.at(located.top, revision) for revision in revisions]
    except GitError as error:
        raise GitError(f"{escaped(first)}: {given}: {error}") from None
    sides = [load_side(located.relative, reader=reader) for reader in readers]
    if against is not None:
        sides.append(load_side(first, reader=working_tree))
    return tuple(sides)


@dataclass(frozen=True)
class KeyChange:
    """One written value that differs: its key path and both texts (``None``: not written)."""

    path: str
    old: str | None
    new: str | None


@dataclass(frozen=True)
class Change:
    """The fate of a segment, or of a row the engine inserted (a face, a plate's reflections): its
    names in each revision (``None`` where it is not, a row's identifier for a row), its kind, its
    changed written keys (a segment's), and ``loss_change_db``: case -> new minus old loss of its
    row over the common wavelengths (an added one's whole loss, a removed one's loss negated)."""

    status: str
    old_name: str | None
    new_name: str | None
    kind: str
    loss_change_db: dict
    keys: tuple = ()

    @property
    def name(self):
        return self.new_name if self.new_name is not None else self.old_name


@dataclass(frozen=True)
class LinkDiff:
    """Two revisions of a link compared. Arrays run over :attr:`wavelength_m`, the wavelengths
    both carry; dicts are keyed by case."""

    old: Side
    new: Side
    wavelength_m: np.ndarray
    only_old_wavelength_m: np.ndarray
    only_new_wavelength_m: np.ndarray
    link_keys: tuple
    segments: tuple  # of Change, every segment
    rows: tuple  # of Change, the inserted rows that changed
    received_change_db: dict
    margin_change_db: dict
    old_margin_db: dict
    new_margin_db: dict

    @property
    def verdict_changed(self):
        return self.old.result.closes != self.new.result.closes

    @property
    def worst_margin_loss_db(self):
        """The most worst-case margin lost at any common wavelength [dB] (> 0: lost; NaN where
        both revisions are blocked is no change); ``0.0`` without common wavelengths."""
        change = self.margin_change_db["worst"]
        lost = -change[~np.isnan(change)]
        return float(lost.max()) if lost.size else 0.0

    def margin_loss_exceeds(self, max_loss_db):
        """The gate: the worst-case margin fell by more than ``max_loss_db`` at some wavelength."""
        return self.worst_margin_loss_db > max_loss_db

    @property
    def changed_segments(self):
        return tuple(change for change in self.segments if change.status != UNCHANGED)


def _leaf_text(value):
    if isinstance(value, bool):
        return "true" if value else "false"
    return "null" if value is None else str(value)


def flat_keys(data, prefix=""):
    """key path -> written text of every leaf of ``data`` (nested mappings and lists)."""
    if isinstance(data, dict):
        items = ((f"{prefix}.{key}" if prefix else str(key), value) for key, value in data.items())
    elif isinstance(data, list):
        items = ((f"{prefix}[{index}]", value) for index, value in enumerate(data))
    else:
        return {prefix: _leaf_text(data)}
    flat = {}
    for path, value in items:
        flat.update(flat_keys(value, path))
    return flat


def key_changes(old, new, *, ignore=()):
    """The :class:`KeyChange` s between two flat key maps, in the order the keys are written."""
    paths = list(old) + [path for path in new if path not in old]
    return tuple(KeyChange(path, old.get(path), new.get(path)) for path in paths
                 if old.get(path) != new.get(path) and path.split(".")[0].split("[")[0] not in ignore)


def _chain_entries(side):
    """segment name -> its written keys (flat), in chain order; a segment made from a part has its
    part's keys too, each named after the part (``part NAME: loss.typ``), so a change inside
    a part file shows in every link that uses the part."""
    items = side.data.get("chain") or []
    uses = {use.index: use for use in side.link.part_uses}
    return {segment.name: flat_keys(item) if index not in uses else _part_use_keys(item, uses[index])
            for index, (segment, item) in enumerate(zip(side.link.segments, items, strict=True))}


def _part_use_keys(item, use):
    """The flat keys of a chain entry made from a part: its own, then the part's it does not override."""
    from_part = {key: value for key, value in use.entry.items() if key not in use.own_keys}
    named = {f"part {use.parts[0].name}: {path}": text for path, text in flat_keys(from_part).items()}
    return {**flat_keys(item), **named}


def find_renames(old_entries, new_entries):
    """old name -> new name for the segments only one side names whose written keys, ``name``
    aside, are identical (in chain order, each at most once; linear in the chain's length)."""
    def signature(entry):
        return tuple(sorted((path, text) for path, text in entry.items() if path != "name"))

    came = {}
    for name, entry in new_entries.items():
        if name not in old_entries:
            came.setdefault(signature(entry), []).append(name)
    renames = {}
    for name, entry in old_entries.items():
        candidates = came.get(signature(entry)) if name not in new_entries else None
        if candidates:
            renames[name] = candidates.pop(0)
    return renames


def _row_keys(rows, renames=None):
    """(kind, origin, occurrence) -> row, origins mapped through ``renames``."""
    keyed, seen = {}, {}
    for row in rows:
        origin = tuple((renames or {}).get(name, name) for name in row.origin)
        occurrence = seen.get((row.kind, origin), 0)
        seen[(row.kind, origin)] = occurrence + 1
        keyed[(row.kind, origin, occurrence)] = row
    return keyed


def _own_rows(keyed):
    """segment name -> its own row (a ``segment`` or ``coating`` row), from :func:`_row_keys`."""
    return {origin[0]: row for (kind, origin, _), row in keyed.items() if kind in (SEGMENT_ROW, COATING_ROW)}


def _loss_change(old_row, new_row, old_index, new_index):
    def loss(row, index, case):
        return np.zeros(len(index)) if row is None else np.asarray(row.loss_db[case], dtype=float)[index]

    with np.errstate(invalid="ignore"):
        return {case: loss(new_row, new_index, case) - loss(old_row, old_index, case) for case in LOSS_CASES}


def _loss_differs(change):
    return any(bool(np.any(~(np.abs(values) <= SAME_LOSS_DB))) for values in change.values())


def _common_wavelengths(old_m, new_m):
    """Indices into each axis of the wavelengths both carry, and the ones only each carries."""
    old_key = np.round(old_m * 1e9, WAVELENGTH_MATCH_DECIMALS)
    new_key = np.round(new_m * 1e9, WAVELENGTH_MATCH_DECIMALS)
    common, old_index, new_index = np.intersect1d(old_key, new_key, return_indices=True)
    return (old_index, new_index, old_m[~np.isin(old_key, common)], new_m[~np.isin(new_key, common)])


def _segment_changes(old, new, renames, old_rows, new_rows, old_index, new_index):
    old_entries, new_entries = _chain_entries(old), _chain_entries(new)
    back = {new_name: old_name for old_name, new_name in renames.items()}
    old_own, new_own = _own_rows(old_rows), _own_rows(new_rows)
    changes = []
    for segment in new.link.segments:
        old_name = back.get(segment.name, segment.name if segment.name in old_entries else None)
        keys = () if old_name is None else key_changes(old_entries[old_name], new_entries[segment.name],
                                                       ignore=("name",))
        old_row = None if old_name is None else old_own.get(segment.name)
        loss = _loss_change(old_row, new_own.get(segment.name), old_index, new_index)
        if old_name is None:
            status = ADDED
        elif old_name != segment.name:
            status = RENAMED
        else:
            status = CHANGED if keys or _loss_differs(loss) else UNCHANGED
        changes.append(Change(status, old_name, segment.name, segment.kind, loss, keys))
    for segment in old.link.segments:
        if segment.name not in renames and segment.name not in new_entries:
            loss = _loss_change(old_own.get(segment.name), None, old_index, new_index)
            changes.append(Change(REMOVED, segment.name, None, segment.kind, loss))
    return tuple(changes)


def _row_changes(old_rows, new_rows, old_index, new_index):
    """The inserted rows (not a segment's own) that were added, removed or whose loss changed."""
    changes = []
    for key in list(new_rows) + [key for key in old_rows if key not in new_rows]:
        if key[0] in (SEGMENT_ROW, COATING_ROW):
            continue
        old_row, new_row = old_rows.get(key), new_rows.get(key)
        loss = _loss_change(old_row, new_row, old_index, new_index)
        status = ADDED if old_row is None else REMOVED if new_row is None else CHANGED if _loss_differs(loss) else None
        if status is not None:
            changes.append(Change(status, old_row and old_row.id, new_row and new_row.id, key[0], loss))
    return tuple(changes)


def compare(old, new):
    """The :class:`LinkDiff` of two :class:`Side` s (see the module's matching rules)."""
    old_result, new_result = old.result, new.result
    old_index, new_index, only_old, only_new = _common_wavelengths(old_result.wavelength_m, new_result.wavelength_m)
    renames = find_renames(_chain_entries(old), _chain_entries(new))
    old_rows, new_rows = _row_keys(old_result.rows, renames), _row_keys(new_result.rows)

    def at(values, index):
        return {case: np.asarray(values[case], dtype=float)[index] for case in values}

    old_margin, new_margin = at(old_result.margin_db, old_index), at(new_result.margin_db, new_index)
    old_received, new_received = at(old_result.received_dbm, old_index), at(new_result.received_dbm, new_index)
    with np.errstate(invalid="ignore"):
        received_change = {case: new_received[case] - old_received[case] for case in POWER_CASES}
        margin_change = {case: new_margin[case] - old_margin[case] for case in LOSS_CASES}
    return LinkDiff(
        old=old, new=new,
        wavelength_m=new_result.wavelength_m[new_index],
        only_old_wavelength_m=only_old, only_new_wavelength_m=only_new,
        link_keys=key_changes(flat_keys(old.data), flat_keys(new.data), ignore=("chain",)),
        segments=_segment_changes(old, new, renames, old_rows, new_rows, old_index, new_index),
        rows=_row_changes(old_rows, new_rows, old_index, new_index),
        received_change_db=received_change, margin_change_db=margin_change,
        old_margin_db={case: old_margin[case] for case in LOSS_CASES},
        new_margin_db={case: new_margin[case] for case in LOSS_CASES},
    )
