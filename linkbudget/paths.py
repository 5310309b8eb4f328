"""The files a link refers to: found next to the link and confined to its project.

``check`` runs in CI on link files that anyone who can open a pull request may write, so a path
written in a link (a ``material:`` file today) must not make the tool read, or print, a file of the
machine. Every such path is resolved, symlinks included, and must lie inside the project root: the
nearest folder at or above the link's folder that holds a ``.git`` (a repository; a file in a git
worktree) or the settings file ``linkbudget.toml``, else the link's own folder. Folders the user
names with ``--allow-path`` (``allow_paths=`` in Python) are let in as well. A path outside them, or
one that is not a regular file (a folder, a device, a FIFO), is refused from its name and ``stat``
alone, before anything is opened.

A backslash is read as a folder separator and a drive letter (``C:``) as an absolute path, so a link
written on Windows is judged as it would be there; a leading ``~`` (a home folder) is refused.
"""

import os
import re
import stat
from dataclasses import dataclass
from pathlib import Path

from linkbudget.text import escaped

#: Files whose presence marks a project root: a repository, or linkbudget's settings file.
PROJECT_MARKERS = (".git", "linkbudget.toml")

_DRIVE = re.compile(r"[A-Za-z]:")
_OUTSIDE_HINT = ("a link reads only files inside its project (the folder holding .git or linkbudget.toml); "
                 "pass --allow-path DIR to let another folder in")


class PathRefused(ValueError):
    """A path written in a link names no file the link may read; ``hint`` says what to do."""

    def __init__(self, message, hint=None):
        super().__init__(message)
        self.hint = hint


class PathOutside(PathRefused):
    """A path written in a link that leaves its project (and every allowed folder)."""


def project_root(folder):
    """The nearest folder at or above ``folder`` holding a :data:`PROJECT_MARKERS` entry, else ``folder``.

    Both resolved (symlinks followed), as every path compared with them is.
    """
    folder = Path(folder).resolve()
    for candidate in (folder, *folder.parents):
        if any(os.path.lexists(candidate / marker) for marker in PROJECT_MARKERS):
            return candidate
    return folder


@dataclass(frozen=True)
class FileLocator:
    """Where the files a link refers to are found and which folders they may lie in.

    Attributes
    ----------
    base_dir : Path
        Folder a relative path starts from (the link file's).
    roots : tuple of Path or None
        Resolved folders a file must lie in (project root, then allowed folders); ``None``: anywhere,
        for a path the user gave directly rather than through a link.
    """

    base_dir: Path
    roots: tuple | None

    @classmethod
    def for_link(cls, base_dir, allow_paths=()):
        """The files of a link whose own folder is ``base_dir`` (default: the current folder)."""
        base_dir = Path(base_dir or ".")
        allowed = tuple(Path(folder).expanduser().resolve() for folder in allow_paths)
        return cls(base_dir, (project_root(base_dir), *allowed))

    def locate(self, written):
        """The resolved path of a regular file named ``written``, checked without opening it.

        Raises
        ------
        PathRefused
            For a ``~`` path, a path outside :attr:`roots` (:class:`PathOutside`), a missing file, a
            folder, a device or a FIFO.
        """
        path, mode = self._confined(written)
        shown = escaped(written)
        if stat.S_ISDIR(mode):
            raise PathRefused(f"path '{shown}' is a folder, not a file")
        if not stat.S_ISREG(mode):
            raise PathRefused(f"path '{shown}' is not a regular file (a device, a FIFO or a socket)")
        return path

    def locate_folder(self, written):
        """The resolved path of a folder named ``written``, confined as :meth:`locate` confines a file."""
        path, mode = self._confined(written)
        if not stat.S_ISDIR(mode):
            raise PathRefused(f"path '{escaped(written)}' is not a folder")
        return path

    def _confined(self, written):
        """``(resolved path, stat mode)`` of ``written``, refused if it leaves :attr:`roots` or is missing."""
        shown = escaped(written)
        text = str(written)
        if self.roots is not None and text.startswith("~"):
            raise PathOutside(f"path '{shown}' is outside the project (a home folder)", _OUTSIDE_HINT)
        portable = text.replace("\\", "/")
        if self.roots is not None and _DRIVE.match(portable):
            raise PathOutside(f"path '{shown}' is outside the project (a drive path)", _OUTSIDE_HINT)
        try:
            path = (self.base_dir / portable).resolve()
        except (OSError, RuntimeError):  # RuntimeError: a symlink loop (Python 3.11)
            raise PathRefused(f"path '{shown}' cannot be resolved (a symlink loop?)") from None
        if self.roots is not None and not any(path.is_relative_to(root) for root in self.roots):
            raise PathOutside(f"path '{shown}' is outside the project", _OUTSIDE_HINT)
        try:
            return path, os.stat(path).st_mode
        except OSError as error:
            raise PathRefused(f"cannot read file '{shown}': {error.strerror}") from None


def read_regular_file(path, *, max_bytes):
    """At most ``max_bytes + 1`` bytes of the regular file ``path`` (as given by :meth:`FileLocator.locate`).

    Opened without following a last symlink and without blocking, and checked again once open, so a
    file swapped for a FIFO or a device after :meth:`~FileLocator.locate` is refused, not read.

    Raises
    ------
    PathRefused
        If it cannot be opened or is no longer a regular file.
    """
    flags = os.O_RDONLY | os.O_NONBLOCK | getattr(os, "O_NOFOLLOW", 0) | getattr(os, "O_BINARY", 0)
    try:
        descriptor = os.open(path, flags)
    except OSError as error:
        raise PathRefused(f"cannot read file '{escaped(path)}': {error.strerror}") from None
    with os.fdopen(descriptor, "rb") as stream:
        if not stat.S_ISREG(os.fstat(descriptor).st_mode):
            raise PathRefused(f"path '{escaped(path)}' is not a regular file")
        return stream.read(max_bytes + 1)
