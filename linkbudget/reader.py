"""Readers: where the text of a link and of the files it refers to comes from.

A reader answers one question, ``read(path, folder=...)``: the text of ``path`` as written in a link
whose own folder is ``folder`` (or, without ``folder``, a path the caller gives directly), as a
:class:`Source` that says what was read. A link that uses parts (:mod:`linkbudget.config.parts`)
asks one more, ``file_names(path, folder)``: the sorted names of the files in the folder ``path``.
The loader and the material library never open files themselves, so the same code loads a link
from the working tree (:class:`WorkingTreeReader`), from memory in tests (:class:`MemoryReader`),
or, by adding one more class with these methods, from a git revision. A reader refuses a path it
may not read with :class:`~linkbudget.paths.PathRefused` (:class:`~linkbudget.paths.PathOutside`
for one leaving the project) and a file whose bytes are no text with a placed
:class:`~linkbudget.config.source.ConfigError`.

:class:`LinkFiles` is what one link hands its segments: its reader, its folder, and each file read
once however many segments refer to it.
"""

import os
import posixpath
from dataclasses import dataclass, field
from pathlib import Path

from linkbudget.config.source import ConfigError, Mark, Problem
from linkbudget.paths import FileLocator, PathOutside, PathRefused, read_regular_file
from linkbudget.text import escaped
from linkbudget.yamlread import MAX_FILE_BYTES, ReadError, bounded_text


@dataclass(frozen=True)
class Source:
    """The text of one file and what was read.

    Attributes
    ----------
    name : str
        How messages name the file (the path as the user can find it).
    text : str
        Its UTF-8 text.
    path : Path or None
        The resolved file of the machine that was read, so no report overwrites it; ``None`` when
        nothing on disk was read (memory, a git revision).
    """

    name: str
    text: str
    path: Path | None = None


def decoded(data, name, max_bytes=MAX_FILE_BYTES):
    """``data`` (at most ``max_bytes + 1`` bytes) as UTF-8 text; an error placed in file ``name``."""
    try:
        return bounded_text(data, max_bytes)
    except ReadError as error:
        raise ConfigError([Problem(name, None, (), str(error), error.hint)]) from None
    except UnicodeDecodeError as error:
        before = error.object[: error.start]
        mark = Mark(before.count(b"\n") + 1, error.start - (before.rfind(b"\n") + 1) + 1)
        raise ConfigError([Problem(name, mark, (), f"not UTF-8 text ({error.reason})")]) from None


@dataclass(frozen=True)
class WorkingTreeReader:
    """Files of the machine: a path written in a link is confined to the link's project (see
    :mod:`linkbudget.paths`) and the folders of ``allow_paths``; a path given directly is not."""

    allow_paths: tuple = ()

    def read(self, path, folder=None):
        """The :class:`Source` of ``path``, written relative to ``folder`` (a link's folder) if given."""
        if folder is None:
            return located_source(FileLocator(Path("."), None), path, str(path))
        return located_source(FileLocator.for_link(folder, self.allow_paths), path, str(Path(folder) / str(path)))

    def file_names(self, path, folder):
        """Sorted names of the regular files in the folder ``path``, written relative to ``folder``."""
        found = FileLocator.for_link(folder, self.allow_paths).locate_folder(path)
        with os.scandir(found) as entries:
            return tuple(sorted(entry.name for entry in entries if entry.is_file()))


def located_source(locator, written, name):
    """The :class:`Source` of the file ``locator`` finds for ``written``, named ``name`` in messages."""
    resolved = locator.locate(written)
    return Source(name, decoded(read_regular_file(resolved, max_bytes=MAX_FILE_BYTES), name), resolved)


@dataclass(frozen=True)
class MemoryReader:
    """Files held in memory, ``{relative path: text}`` with ``/`` separators (for tests and tools).

    A path written in a link is joined to the link's folder and normalised; one that leaves the
    mapping's top folder, or is absolute, is refused as a path outside the project would be.
    """

    texts: dict

    def read(self, path, folder=None):
        key = self._key(path, folder)
        if key not in self.texts:
            raise PathRefused(f"cannot read file '{escaped(path)}': No such file")
        return Source(key, self.texts[key])

    def file_names(self, path, folder):
        """Sorted names of the files directly in the folder ``path``, written relative to ``folder``."""
        key = self._key(path, folder)
        prefix = "" if key == "." else key + "/"
        names = tuple(sorted({name[len(prefix):] for name in self.texts
                              if name.startswith(prefix) and "/" not in name[len(prefix):]}))
        if not names and not any(name.startswith(prefix) for name in self.texts):
            raise PathRefused(f"cannot read folder '{escaped(path)}': No such folder")
        return names

    @staticmethod
    def _key(path, folder):
        """The mapping's key of ``path`` written relative to ``folder``; refused if it leaves the mapping."""
        written = str(path).replace("\\", "/")
        key = posixpath.normpath(posixpath.join(str(folder or "").replace("\\", "/"), written))
        if posixpath.isabs(key) or key == ".." or key.startswith("../"):
            raise PathOutside(f"path '{escaped(path)}' is outside the project")
        return key


@dataclass
class LinkFiles:
    """The files one link refers to: read through ``reader`` relative to ``folder``, each once.

    Attributes
    ----------
    reader : object with ``read(path, folder)``
        A :class:`WorkingTreeReader`, a :class:`MemoryReader` or another reader.
    folder : str or Path
        The link's folder, which a written path starts from.
    sources : dict
        ``written path -> Source`` of every file read so far.
    """

    reader: object
    folder: object = "."
    sources: dict = field(default_factory=dict)

    def read(self, written):
        """The :class:`Source` of the path ``written`` in the link, read once per path."""
        key = str(written)
        if key not in self.sources:
            self.sources[key] = self.reader.read(key, self.folder)
        return self.sources[key]

    @property
    def read_paths(self):
        """Resolved paths of the files of the machine read so far."""
        return tuple(source.path for source in self.sources.values() if source.path is not None)
