"""Where parts are used: the links and part files under a folder of the working tree.

:func:`link_paths` expands the folders given to ``check`` into their link files; :func:`survey`
loads every link and part file under a folder, and :func:`users` and :func:`unused` answer which
links use a part and which parts no link uses. The command line prints what they return.
"""

import os
from dataclasses import dataclass, field
from pathlib import Path

from linkbudget.config.parts import PartLibrary, is_part_file, parse_part_file
from linkbudget.config.source import ConfigError, Problem, load_yaml
from linkbudget.paths import PathRefused
from linkbudget.reader import LinkFiles, WorkingTreeReader
from linkbudget.yamlread import ReadError, read_text

#: How the name of a file that may be a link or a part file ends.
YAML_SUFFIXES = (".yaml", ".yml")
#: Top-level keys that only a link file holds.
_LINK_KEYS = ("title", "chain", "receiver")


def yaml_files_under(folder):
    """Every YAML file under ``folder``, sorted, leaving out hidden folders (``.git``, ``.venv``)."""
    found = []
    for top, folders, names in os.walk(folder):
        folders[:] = sorted(name for name in folders if not name.startswith("."))
        found += [Path(top) / name for name in sorted(names) if name.endswith(YAML_SUFFIXES)]
    return found


def holds_link(path):
    """Whether the YAML file ``path`` (not a part file) is a link: a mapping with a link's keys, or a
    file that cannot be read as YAML at all (loading it then says why). Material files are not."""
    try:
        data, _ = load_yaml(read_text(path), str(path))
    except (ConfigError, ReadError, OSError, UnicodeDecodeError):
        return True
    return not isinstance(data, dict) or any(key in data for key in _LINK_KEYS)


def link_paths(paths):
    """The link files ``check`` evaluates for ``paths``: a file as given (unless a part file), a folder
    as the links under it (:func:`yaml_files_under`, without part files and other YAML files such as
    materials)."""
    expanded = []
    for path in map(Path, paths):
        if path.is_dir():
            expanded += [found for found in yaml_files_under(path)
                         if not is_part_file(found.name) and holds_link(found)]
        elif not is_part_file(path.name):
            expanded.append(path)
    return expanded


def part_files_in(paths):
    """The part files among ``paths`` and under the folders among them."""
    return [found for path in map(Path, paths)
            for found in (yaml_files_under(path) if path.is_dir() else [path]) if is_part_file(found.name)]


@dataclass
class PartFileCheck:
    """A part file found under a folder: its parts, or its placed problems."""

    path: Path
    names: tuple = ()
    problems: list = field(default_factory=list)


def checked_part_file(path, allow_paths=()):
    """The :class:`PartFileCheck` of the part file ``path``: each part checked alone, its bases
    found along the search path of a link in the part file's folder."""
    files = LinkFiles(WorkingTreeReader(tuple(allow_paths)), path.parent)
    try:
        part_file = parse_part_file(files.read(path.name))
    except ConfigError as error:
        return PartFileCheck(path, problems=error.problems)
    except PathRefused as error:
        return PartFileCheck(path, problems=[Problem(str(path), None, (), str(error), error.hint)])
    library = PartLibrary(files)
    return PartFileCheck(path, tuple(part_file.parts), library.file_problems(part_file) + library.problems)


def used_parts(links):
    """``{(resolved part file, part name)}`` of every part the loaded ``links`` use, bases included."""
    return {(os.path.realpath(part.file), part.name) for link in links for use in link.part_uses for part in use.parts}


def unused(part_files, links):
    """``[(part file path, unused part names)]`` of the checked ``part_files`` whose parts (some or all)
    no one of the loaded ``links`` uses."""
    used = used_parts(links)
    found = []
    for checked in part_files:
        names = tuple(name for name in checked.names if (os.path.realpath(checked.path), name) not in used)
        if names:
            found.append((checked.path, names))
    return found


def users(part_name, loaded):
    """``[(link path, part use)]`` of the uses of the part ``part_name`` (named, or built on) in the
    ``loaded`` links (``[(path, Link)]``)."""
    return [(path, use) for path, link in loaded for use in link.part_uses
            if any(part.name == part_name for part in use.parts)]


@dataclass
class Survey:
    """The links and part files under a folder: loaded links, links that did not load, part files."""

    loaded: list
    broken: list
    part_files: list


def survey(folder, allow_paths=()):
    """Load every link and check every part file under ``folder``."""
    from linkbudget.config import load_link

    loaded, broken = [], []
    for path in link_paths([folder]):
        try:
            loaded.append((path, load_link(path, allow_paths)))
        except ConfigError as error:
            broken.append((path, error))
    return Survey(loaded, broken, [checked_part_file(path, allow_paths) for path in part_files_in([folder])])
