"""Parts libraries: a connector, patch cord, fibre or coating defined once and used in many links.

A *part file* (its name ends in ``.parts.yaml`` or ``.parts.yml``) holds named parts; a part is a
chain entry without a place in a chain: its ``kind`` and keys (values, spreads, tables, materials)::

    description: Connectors stocked for the field kits
    parts:
      lc-upc-mated-pair:
        kind: connector
        loss: {typ: 0.25 dB, max: 0.5 dB}
        return_loss: 50 dB
      lc-upc-worn:                  # a part may build on another part and change some of its keys
        part: lc-upc-mated-pair
        loss: {typ: 0.4 dB, max: 0.9 dB}

A chain entry uses a part with ``part: NAME``; its other keys override the part's for this use
(each replaces the part's value of that key whole). The segment is named after the part unless
the entry gives a ``name``. A part may leave out keys its kind requires (a fibre's ``length``):
each use gives them.

Parts are looked up by name along the *search path*: the link's own folder, then the folders the
link lists under ``part_folders:`` (relative to the link), then those of the settings file
``linkbudget.toml`` (``[parts] folders = [...]``, relative to that file), the nearest one found
walking up from the link's folder to its project root. The first folder holding the name wins; a
name defined in two part files of one folder is an error. A part that builds on another looks in
its own file's folder first. Every file is read through the link's reader, so the path
confinement of :mod:`linkbudget.paths` (and ``--allow-path``) applies, and a link read at a git
revision reads its parts at that revision. Material paths in a part file are relative to it.

Problems inside a part file are placed there (``FILE:LINE:COL``) below the line of the link (and
of each part in between) that used it.
"""

import difflib
import posixpath
import re
from dataclasses import dataclass, field, replace
from functools import partial
from pathlib import Path

from linkbudget.config.source import ConfigError, Problem, load_yaml
from linkbudget.paths import PathOutside, PathRefused
from linkbudget.reader import LinkFiles
from linkbudget.segments.rows import PartOrigin

#: How a part file's name ends.
PART_FILE_SUFFIXES = (".parts.yaml", ".parts.yml")
#: The repository-level settings file (its presence also marks the project root, see linkbudget.paths).
SETTINGS_FILE = "linkbudget.toml"
#: The chain entry's key naming a part.
PART_KEY = "part"
#: The keys of a part file's top level.
PART_FILE_KEYS = ("description", "parts")
#: Keys whose values name files, read relative to the file the key is written in.
_FILE_KEYS = ("material", "gap_material", "layers")

_PART_NAME = re.compile(r"[A-Za-z0-9][A-Za-z0-9._-]*")
_PART_NAME_HINT = "a part name is a plain name: letters, digits, '.', '_' and '-'"


def is_part_file(name):
    """Whether a file named ``name`` is a part file (by its suffix)."""
    return str(name).endswith(PART_FILE_SUFFIXES)


def is_part_use(item):
    """Whether the chain entry ``item`` uses a part."""
    return isinstance(item, dict) and PART_KEY in item


def shown_file(name):
    """A file's name as reports show it: ``/`` separators, ``a/../b`` folded."""
    return posixpath.normpath(str(name).replace("\\", "/"))


@dataclass(frozen=True)
class PartFile:
    """One part file as read: its source, its folder written from the link's folder, its parts."""

    source: object
    folder: str
    parts: dict
    positions: object

    @property
    def name(self):
        return shown_file(self.source.name)


def parse_part_file(source, folder="."):
    """The :class:`PartFile` of ``source`` (a :class:`~linkbudget.reader.Source`) lying in ``folder``.

    Raises
    ------
    ConfigError
        Placed problems of the file's layout (its parts' keys are checked where they are used, or by
        :meth:`PartLibrary.file_problems`).
    """
    data, positions = load_yaml(source.text, shown_file(source.name))
    if not isinstance(data, dict):
        raise ConfigError([positions.problem((), "a part file is a mapping of keys",
                                             "write parts: {NAME: {kind: ..., ...}, ...}")])
    problems = [positions.problem((key,), f"unknown key '{key}'", f"a part file holds {', '.join(PART_FILE_KEYS)}",
                                  at_key=True) for key in data if key not in PART_FILE_KEYS]
    if not isinstance(data.get("description", ""), str):
        problems.append(positions.problem(("description",), "expected text"))
    parts = data.get("parts")
    if not isinstance(parts, dict):
        problems.append(positions.problem(("parts",), "expected a mapping of part names to parts" if "parts" in data
                                          else "missing required key 'parts'"))
        parts = {}
    for name, entry in parts.items():
        if not _PART_NAME.fullmatch(name):
            problems.append(positions.problem(("parts", name), "not a plain part name", _PART_NAME_HINT, at_key=True))
        elif not isinstance(entry, dict):
            problems.append(positions.problem(("parts", name), "a part is a mapping with a 'kind' (or a 'part')"))
    if problems:
        raise ConfigError(problems)
    return PartFile(source, folder, parts, positions)


@dataclass(frozen=True)
class Written:
    """A mapping as written, to place the problems of its keys: in its own file for the keys it
    writes, else in the part it builds on, below a line at its ``part`` key.

    Attributes
    ----------
    positions : Positions
        Where the mapping's file wrote each key path.
    path : tuple
        The mapping's key path in its file (``("chain", 3)``, ``("parts", "lc-upc")``).
    own_keys : frozenset
        The keys the mapping writes itself (a use's overrides).
    folder : str or None
        Its file's folder written from the link's folder; ``None`` for the link itself.
    base : Written or None
        The part the mapping builds on; ``base_origin`` (a :class:`PartOrigin`) names it.
    """

    positions: object
    path: tuple
    own_keys: frozenset = frozenset()
    folder: str | None = None
    base: "Written | None" = None
    base_origin: PartOrigin | None = None

    @property
    def base_label(self):
        return f"part '{self.base_origin.name}' ({self.base_origin.file})"

    def owner(self, key):
        """The :class:`Written` that wrote ``key`` (the deepest part, for a key nobody wrote)."""
        if self.base is None or key in self.own_keys:
            return self
        return self.base.owner(key)

    def problem(self, key_path, message, hint=None, *, at_key=False, cause=None):
        """A :class:`Problem` at ``key_path`` below the mapping, placed where the key was written."""
        key = key_path[0] if key_path else None
        if self.base is None or key is None or key in self.own_keys:
            placed = self.positions.problem((*self.path, *key_path), message, hint, at_key=at_key)
            return placed if cause is None else replace(placed, cause=cause)
        return self.via(self.base.problem(key_path, message, hint, at_key=at_key, cause=cause))

    def via(self, problem, label=None):
        """``problem`` (in a part) as the cause of a problem at this mapping's ``part`` key."""
        return replace(self.positions.problem((*self.path, PART_KEY), f"{label or self.base_label} has an error:"),
                       cause=problem)

    def parts(self):
        """The :class:`PartOrigin` of each part below this mapping, outermost first."""
        written, found = self, []
        while written.base is not None:
            found.append(written.base_origin)
            written = written.base
        return tuple(found)

    def keys(self):
        """Every key written by this mapping or a part below it."""
        return self.own_keys | (self.base.keys() if self.base is not None else frozenset())


@dataclass(frozen=True)
class PartUse:
    """A chain entry of a link made from a part.

    Attributes
    ----------
    segment : str
        The segment's name in the link.
    index : int
        Its place in the link's chain.
    parts : tuple of PartOrigin
        The part it names, then each part that one builds on; their files are all the part files
        the segment depends on.
    paths : tuple of Path
        The resolved files of the machine those are (none when read from memory or a revision).
    entry : dict
        The entry as the segment was made from it: the parts' keys under the use's own.
    own_keys : frozenset
        The keys the chain entry itself writes (the rest come from the parts).
    """

    segment: str
    index: int
    parts: tuple
    paths: tuple = ()
    entry: dict = field(default_factory=dict, compare=False)
    own_keys: frozenset = frozenset()

    @property
    def files(self):
        """The part files the use depends on, each once, as the reader names them."""
        return tuple(dict.fromkeys(part.file for part in self.parts))


def changed_part_uses(link, changed_files):
    """The part uses of ``link`` (a :class:`~linkbudget.config.Link`) that a change of
    ``changed_files`` moves: those whose part files (the part's, or one it builds on) are among them.

    ``changed_files`` are names as the link's reader names its sources (see :func:`shown_file`), or
    paths of the machine. An empty answer means no part the link uses changed; a changed part file
    could still shadow a part from a later folder of the search path, which only loading the link
    again shows.
    """
    changed = {shown_file(name) for name in changed_files}
    changed |= {str(Path(name).resolve()) for name in changed_files}
    return tuple(use for use in link.part_uses
                 if changed & set(use.files) or changed & {str(path) for path in use.paths})


def parse_settings(source, up):
    """The part folders of the settings file ``source``, written from the link's folder (``up`` leads
    from the link's folder to the settings file's), each with its key path.

    Raises
    ------
    ConfigError
        Placed at the settings file (TOML gives no key positions: the key path is named).
    """
    import tomllib  # here: only a link that uses parts reads the settings file

    def problem(path, message, hint=None):
        return ConfigError([Problem(shown_file(source.name), None, path, message, hint)])

    try:
        data = tomllib.loads(source.text)
    except tomllib.TOMLDecodeError as error:
        raise problem((), f"not valid TOML: {error}") from None
    for key in data:
        if key != "parts":
            raise problem((key,), f"unknown settings section '{key}'", "the settings file has a [parts] section")
    section = data.get("parts", {})
    if not isinstance(section, dict):
        raise problem(("parts",), "expected a table", "write [parts] then folders = [\"parts\"]")
    for key in section:
        if key != "folders":
            raise problem(("parts", key), f"unknown key '{key}'", "the [parts] section holds folders")
    folders = section.get("folders", [])
    if not isinstance(folders, list) or not all(isinstance(folder, str) for folder in folders):
        raise problem(("parts", "folders"), "expected a list of folder names", "folders = [\"parts\"]")
    return tuple((posixpath.normpath(posixpath.join(up, folder)), ("parts", "folders", number))
                 for number, folder in enumerate(folders))


@dataclass
class _Folder:
    """A folder of the search path: its part files by part name, and those that did not load."""

    written: str
    parts: dict = field(default_factory=dict)
    broken: list = field(default_factory=list)


class PartLibrary:
    """The parts one link can use: its search path, each part file read once.

    Parameters
    ----------
    files : LinkFiles
        The link's reader and folder.
    part_folders : sequence of str
        The link's ``part_folders`` (relative to its folder).
    positions : Positions
        The link's positions, to place a problem of a listed folder.
    """

    def __init__(self, files, part_folders=(), positions=None):
        self.files = files
        self.part_folders = tuple(part_folders or ())
        self.positions = positions
        #: Problems of the search path itself (a folder that cannot be listed, a bad settings file).
        self.problems = []
        self._folders = None
        self._files_by_folder = {}
        self._reported = set()

    # -- the search path ---------------------------------------------------------------------

    def folders(self):
        """The :class:`_Folder` s of the search path, listed and read on first use."""
        if self._folders is None:
            self._folders = [self._folder(written, where) for written, where in self._search_path()]
            self._folders = [folder for folder in self._folders if folder is not None]
        return self._folders

    def _search_path(self):
        """``(written folder, where)`` in search order; ``where(message, hint)`` places its problem."""
        link = [(".", partial(Problem, shown_file(self.files.folder), None, ()))]
        link += [(posixpath.normpath(folder), partial(self.positions.problem, ("part_folders", number)))
                 for number, folder in enumerate(self.part_folders)]
        return link + list(self._settings_folders())

    def _settings_folders(self):
        for level in range(len(Path(self.files.folder).resolve().parts)):
            up = "../" * level
            try:
                source = self.files.reader.read(up + SETTINGS_FILE, self.files.folder)
            except PathOutside:
                return ()
            except PathRefused:
                continue
            try:
                return tuple((written, partial(Problem, shown_file(source.name), None, path))
                             for written, path in parse_settings(source, up))
            except ConfigError as error:
                self.problems += error.problems
                return ()
        return ()

    def _folder(self, written, where):
        """The :class:`_Folder` ``written``, or ``None`` (its problem recorded) if it cannot be listed."""
        try:
            names = self.files.reader.file_names(written, self.files.folder)
        except AttributeError:  # a reader that reads files but cannot list a folder
            self.problems.append(where(f"part folder '{written}': this reader cannot list a folder's files", None))
            return None
        except PathRefused as error:
            self.problems.append(where(f"part folder '{written}': {error}", error.hint))
            return None
        folder = _Folder(written)
        for name in filter(is_part_file, names):
            path = posixpath.normpath(posixpath.join(written, name))
            try:
                part_file = parse_part_file(self.files.read(path), written)
            except ConfigError as error:
                folder.broken.append(error)
                continue
            except PathRefused as error:
                shown = shown_file(posixpath.join(str(self.files.folder), path))
                folder.broken.append(ConfigError([Problem(shown, None, (), str(error), error.hint)]))
                continue
            for part_name in part_file.parts:
                folder.parts.setdefault(part_name, []).append(part_file)
        return folder

    def search_text(self):
        """The search path as messages show it."""
        return ", ".join(shown_file(posixpath.join(str(self.files.folder), folder.written)) + "/"
                         for folder in self.folders()) or "(no folder could be read)"

    # -- finding and expanding parts ------------------------------------------------------------

    def find(self, name, at, first_folder=None):
        """The :class:`PartFile` defining part ``name`` for the mapping ``at`` (a :class:`Written`).

        Raises
        ------
        ConfigError
            Placed at ``at``'s ``part`` key: no such part, a name defined twice in one folder, or a
            broken part file met on the way (the file's problems below).
        """
        folders = self.folders()
        if first_folder is not None:
            folders = sorted(folders, key=lambda folder: folder.written != first_folder)
        problems = []
        for folder in folders:
            for error in folder.broken:
                problems += [at.problem((PART_KEY,), "a part file of the search path has an error:", cause=problem)
                             for problem in error.problems if id(error) not in self._reported]
                self._reported.add(id(error))
            found = folder.parts.get(name)
            if found is None:
                continue
            if len(found) > 1:
                defining = ", ".join(part_file.name for part_file in found)
                problems.append(at.problem((PART_KEY,), f"part '{name}' is defined in {len(found)} files of one "
                                           f"folder: {defining}", "keep one definition, or rename one of them"))
            if problems:
                raise ConfigError(problems)
            return found[0]
        known = sorted({known for folder in folders for known in folder.parts})
        close = difflib.get_close_matches(name, known, n=1)
        problems.append(at.problem((PART_KEY,), f"no part '{name}' in the search path: {self.search_text()}",
                                   f"did you mean '{close[0]}'?" if close else
                                   "a part file's name ends in .parts.yaml; list more folders in part_folders"))
        raise ConfigError(problems)

    def expanded(self, entry, at, stack=()):
        """``(data, written)``: ``entry`` (a mapping written at ``at``) with the part it names, and
        the parts that one builds on, filled in under its own keys; ``written`` places each key.

        Raises
        ------
        ConfigError
            Placed problems: a name that is no plain name, a missing part, a cycle, a changed kind.
        """
        at = replace(at, own_keys=frozenset(entry) - {PART_KEY})
        if PART_KEY not in entry:
            return entry, at
        name = entry[PART_KEY]
        if not isinstance(name, str) or not _PART_NAME.fullmatch(name):
            raise ConfigError([at.problem((PART_KEY,), "not a plain part name", _PART_NAME_HINT)])
        part_file = self.find(name, at, at.folder)
        key = (part_file.name, name)
        if key in stack:
            cycle = " -> ".join(part for _, part in (*stack[stack.index(key):], key))
            raise ConfigError([at.problem((PART_KEY,), f"parts build on each other in a cycle: {cycle}",
                                          "a part may build on another part, never on itself")])
        label = f"part '{name}' ({part_file.name})"
        base = Written(part_file.positions, ("parts", name), folder=part_file.folder)
        try:
            base_data, base = self.expanded(part_file.parts[name], base, (*stack, key))
        except ConfigError as error:
            raise ConfigError([at.via(problem, label) for problem in error.problems]) from None
        own = {key: value for key, value in entry.items() if key != PART_KEY}
        if "kind" in own and "kind" in base_data and own["kind"] != base_data["kind"]:
            raise ConfigError([at.problem(("kind",), f"{label} is a {base_data['kind']}; a use cannot change its kind",
                                          "leave out kind, or use another part")])
        return {**base_data, **own}, replace(at, base=base, base_origin=PartOrigin(name, part_file.name))

    def files_for(self, written):
        """The :class:`LinkFiles` a mapping whose file keys (materials) were written by ``written`` reads through."""
        if written.folder is None:
            return self.files
        if written.folder not in self._files_by_folder:
            self._files_by_folder[written.folder] = LinkFiles(self.files.reader,
                                                              Path(self.files.folder) / written.folder)
        return self._files_by_folder[written.folder]

    def segment_files(self, written):
        """The :class:`LinkFiles` of a segment made from parts: those of the file writing its first file key."""
        owners = [written.owner(key) for key in _FILE_KEYS if key in written.keys()]
        return self.files_for(owners[0] if owners else written)

    def use(self, item, index, positions):
        """``(segment or None, problems, written, files, part use)`` of the chain entry ``item`` at
        ``index`` of the link, which names a part."""
        from linkbudget.config.loader import validate_entry  # the loader imports this module

        at = Written(positions, ("chain", index))
        try:
            data, at = self.expanded(item, at)
        except ConfigError as error:
            return None, error.problems, at, self.files, None
        segment, problems = validate_entry(data, (), at)
        if segment is None:
            return None, problems, at, self.files, None
        parts = at.parts()
        if segment.name is None:
            segment = segment.model_copy(update={"name": item[PART_KEY]})
        segment = segment._resolved(_part_origin=parts[0])
        use = PartUse(segment.name, index, parts, self._paths(parts), data, frozenset(item) - {PART_KEY})
        return segment, [], at, self.segment_files(at), use

    def _paths(self, parts):
        """The resolved files of the machine the part files of ``parts`` are (read through the link's files)."""
        files = {part.file for part in parts}
        return tuple(source.path for source in self.files.sources.values()
                     if source.path is not None and shown_file(source.name) in files)

    @property
    def read_paths(self):
        """Resolved paths of the files of the machine the parts' files (materials) read so far."""
        return tuple(path for files in self._files_by_folder.values() for path in files.read_paths)

    # -- a part file on its own (check, uses) -------------------------------------------------------

    def file_problems(self, part_file):
        """The placed problems of every part of ``part_file``, each checked alone (its kind and keys;
        keys its kind requires may be left to the uses)."""
        from linkbudget.config.loader import validate_entry

        problems = []
        for name, entry in part_file.parts.items():
            at = Written(part_file.positions, ("parts", name), folder=part_file.folder)
            try:
                data, at = self.expanded(entry, at, ((part_file.name, name),))
            except ConfigError as error:
                problems += error.problems
                continue
            problems += validate_entry(data, (), at, complete=False)[1]
        return problems
