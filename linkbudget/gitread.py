"""Reading a link, and the files it refers to, at a git revision, through ``git`` itself.

Every call runs ``git`` as a subprocess with an argument list (no shell). A revision is resolved
once with ``git rev-parse --verify --end-of-options REV^{commit}``, so a revision written as
``--output=x`` is a revision that does not exist, never an option; text beginning with ``-`` is
refused before git runs at all. Files are then named by the full commit id and a path relative to
the repository's top folder (``git ls-tree`` with literal pathspecs after ``--``, then
``git cat-file blob`` of the object found), so no user text reaches git in a place it could read
as an option or a pathspec pattern.

A path written in a link is joined to the link's folder and must stay inside the repository; a
symlink, a folder or a submodule at the revision is refused, not followed. (The working tree's
``linkbudget.toml`` project boundary is not consulted at a revision: the repository is the
boundary there.)
"""

import os
import posixpath
import subprocess
from dataclasses import dataclass
from pathlib import Path

from linkbudget.paths import PathOutside, PathRefused
from linkbudget.reader import Source, decoded
from linkbudget.text import escaped
from linkbudget.yamlread import MAX_FILE_BYTES

#: git's file modes of a regular file (plain and executable).
_REGULAR_MODES = ("100644", "100755")
#: What each other mode of a tree entry is, for the refusal message.
_OTHER_MODES = {"120000": "a symlink", "040000": "a folder", "160000": "a submodule"}
#: Environment additions that keep git from prompting or taking locks while it only reads.
_QUIET_GIT = {"GIT_TERMINAL_PROMPT": "0", "GIT_OPTIONAL_LOCKS": "0", "LC_ALL": "C"}


class GitError(Exception):
    """A revision or repository cannot be read as asked; the message says which and why."""


def _git(arguments, folder):
    """``git ARGUMENTS`` run in ``folder``: its completed process (bytes out, bytes err)."""
    try:
        return subprocess.run(["git", *arguments], cwd=folder, capture_output=True, check=False,
                              env={**os.environ, **_QUIET_GIT}, stdin=subprocess.DEVNULL)
    except FileNotFoundError:
        raise GitError("git is not installed (or not on PATH): it is needed to read a revision") from None
    except NotADirectoryError:
        raise GitError(f"folder '{escaped(folder)}' does not exist") from None


def _first_line(stderr):
    text = stderr.decode("utf-8", "replace").strip().splitlines()
    return escaped(text[0]) if text else "no message"


def _blob_head(top, blob, max_bytes):
    """At most ``max_bytes`` bytes of the blob ``blob`` (an object id git listed), read as git
    writes them, so a huge file in a revision is never held in memory whole."""
    with subprocess.Popen(["git", "cat-file", "blob", blob], cwd=top, stdout=subprocess.PIPE,
                          stderr=subprocess.DEVNULL, stdin=subprocess.DEVNULL,
                          env={**os.environ, **_QUIET_GIT}) as process:
        data = process.stdout.read(max_bytes)
        process.kill()
    return data


@dataclass(frozen=True)
class RepositoryPath:
    """A working-tree file as git sees it: the repository's top folder and the path below it."""

    top: Path
    relative: str  # with ``/`` separators


def repository_path(path):
    """The :class:`RepositoryPath` of ``path`` (which need not exist in the working tree).

    Raises
    ------
    GitError
        When git is missing, the file's folder does not exist or is in no git repository, or the
        path leaves the repository.
    """
    path = Path(path)
    folder = path.parent if str(path.parent) else Path(".")
    if not folder.is_dir():
        raise GitError(f"{escaped(path)}: folder '{escaped(folder)}' does not exist")
    found = _git(["rev-parse", "--show-toplevel", "--show-prefix"], folder)
    if found.returncode != 0:
        raise GitError(f"{escaped(path)}: not in a git repository ({_first_line(found.stderr)})")
    lines = found.stdout.decode("utf-8", "surrogateescape").split("\n")
    top, prefix = Path(lines[0]), lines[1] if len(lines) > 1 else ""
    relative = posixpath.normpath(posixpath.join(prefix, path.name))
    if path.name in ("", ".", "..") or relative == ".." or relative.startswith("../"):
        raise GitError(f"{escaped(path)}: path is outside the repository at {escaped(top)}")
    return RepositoryPath(top, relative)


def resolve_commit(top, revision):
    """The full id of the commit ``revision`` names in the repository at ``top``.

    Raises
    ------
    GitError
        For an empty revision, one that begins with ``-`` (never passed to git), or one that names
        no commit.
    """
    text = str(revision)
    if not text or text.startswith("-"):
        raise GitError(f"revision '{escaped(text)}' is not a revision name (it is empty or begins with '-')")
    found = _git(["rev-parse", "--verify", "--quiet", "--end-of-options", f"{text}^{{commit}}"], top)
    if found.returncode != 0:
        raise GitError(f"revision '{escaped(text)}' names no commit in the repository at {escaped(top)}")
    return found.stdout.decode("ascii").strip()


@dataclass(frozen=True)
class GitRevisionReader:
    """A reader (see :mod:`linkbudget.reader`) of the files of one commit of one repository.

    ``read(path, folder)`` joins ``path`` to ``folder`` (both relative to the repository's top
    folder, ``/`` or ``\\`` separators) and returns the file's text at the commit. Sources are named
    ``REVISION:path`` in messages (the revision as the user wrote it), with no path of the machine.
    """

    top: Path
    commit: str
    label: str

    @classmethod
    def at(cls, top, revision):
        """The reader of ``revision`` (resolved once to its commit) in the repository at ``top``."""
        return cls(Path(top), resolve_commit(top, revision), str(revision))

    def read(self, path, folder=None):
        key = _repository_key(path, folder)
        name = f"{self.label}:{key}"
        listed = _git(["--literal-pathspecs", "ls-tree", "-l", "-z", self.commit, "--", key], self.top)
        if listed.returncode != 0:
            raise PathRefused(f"cannot read '{escaped(name)}': {_first_line(listed.stderr)}")
        entry = next((item for item in listed.stdout.split(b"\0")
                      if item.partition(b"\t")[2].decode("utf-8", "surrogateescape") == key), None)
        if entry is None:
            raise PathRefused(f"cannot read file '{escaped(name)}': no such file at revision {escaped(self.label)}")
        mode, _, blob, _size = entry.partition(b"\t")[0].decode("ascii").split()
        if mode not in _REGULAR_MODES:
            what = _OTHER_MODES.get(mode, f"not a regular file (mode {mode})")
            raise PathRefused(f"path '{escaped(name)}' is {what} at revision {escaped(self.label)}; not followed")
        data = _blob_head(self.top, blob, MAX_FILE_BYTES + 1)  # decoded() refuses more than the limit
        return Source(name, decoded(data, name))

    def file_names(self, path, folder=None):
        """Sorted names of the regular files directly in the folder ``path`` (joined to ``folder``)
        at the commit: how a parts search path is looked through at a revision."""
        key = _repository_key(path, folder)
        where = [] if key == "." else ["--", key + "/"]
        listed = _git(["--literal-pathspecs", "ls-tree", "-z", self.commit, *where], self.top)
        name = f"{escaped(self.label)}:{escaped(key)}"
        if listed.returncode != 0:
            raise PathRefused(f"cannot read folder '{name}': {_first_line(listed.stderr)}")
        entries = [item.decode("utf-8", "surrogateescape").partition("\t")
                   for item in listed.stdout.split(b"\0") if item]
        if not entries:
            raise PathRefused(f"cannot read folder '{name}': no such folder at revision {escaped(self.label)}")
        return tuple(sorted(posixpath.basename(entry_path) for head, _, entry_path in entries
                            if head.split()[0] in _REGULAR_MODES))


def _repository_key(path, folder):
    """``path`` joined to ``folder`` as a normalised path from the repository's top folder; a path
    that leaves the repository, or an absolute one, is refused (:class:`~linkbudget.paths.PathOutside`)."""
    written = str(path).replace("\\", "/")
    key = posixpath.normpath(posixpath.join(str(folder or "").replace("\\", "/"), written))
    if posixpath.isabs(written) or key == ".." or key.startswith("../"):
        raise PathOutside(f"path '{escaped(path)}' is outside the repository")
    return key
