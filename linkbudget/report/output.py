"""Writing report files atomically, never over a file the user did not agree to replace.

The report is written to a temporary file ``.NAME.linkbudget-tmp-XXXXXXXX`` beside the
destination, then put in place in one step, so a reader sees the old file or the whole new one:

- without ``--force`` by a hard link, which fails if anything (a file, a symlink, even a dangling
  one) has taken the name meanwhile, so of two writers to one new name only one succeeds; where the
  file system has no hard links, the name is first reserved with an exclusive create;
- with ``--force`` by a rename over the old entry. A symlink at the destination is itself replaced
  by the report, never written through, so ``-o`` never writes outside the name it was given.

The file gets the mode a plain write would give it: the umask's for a new file, the replaced
file's own with ``--force``. An interruption (Ctrl-C, SIGTERM) removes the temporary file.
"""

import contextlib
import errno
import os
import secrets
import signal
import stat
import threading
from pathlib import Path

#: Marks the temporary files of an unfinished write: ``.NAME.linkbudget-tmp-XXXXXXXX``.
TEMPORARY_MARK = ".linkbudget-tmp-"

#: Errors of ``link()`` that mean the file system has no hard links here.
_NO_HARD_LINKS = {errno.EPERM, errno.EOPNOTSUPP, errno.ENOTSUP, errno.EMLINK, errno.EXDEV}


class OutputError(Exception):
    """An output file cannot be written as asked."""


def write_atomic(path, text, *, overwrite=False, protected=()):
    """Write ``text`` to ``path`` through a temporary file put in place in one step.

    Parameters
    ----------
    path : path-like
        Destination file.
    text : str, bytes or iterable of str
        Content (text is written as UTF-8, bytes as they are, e.g. a PNG picture), whole or in
        pieces written as they come (a large JSON result is never one string); the file takes the
        destination's name only once every piece is written.
    overwrite : bool
        Replace an existing file or symlink; without it any existing entry is an error.
    protected : iterable of path-like
        Files that must never be replaced (the link files and the material files being read).

    Raises
    ------
    OutputError
        When the file may not or cannot be written; nothing is left behind then.
    """
    path = Path(path)
    try:
        _write(path, [text] if isinstance(text, str | bytes) else text, overwrite, protected)
    except OSError as error:
        raise OutputError(f"{path}: cannot write: {error.strerror or error}") from None


def _write(path, pieces, overwrite, protected):
    try:
        target = path.resolve()
    except RuntimeError:  # Python 3.11 reports a symlink loop so
        raise OutputError(f"{path}: cannot write: a symlink loop") from None
    if any(target == Path(other).resolve() for other in protected):
        raise OutputError(f"{path}: refusing to write a report over an input file")
    try:
        existing = os.lstat(path)
    except FileNotFoundError:
        existing = None
    if existing is not None and stat.S_ISDIR(existing.st_mode):
        raise OutputError(f"{path}: is a folder; give a file name")
    if existing is not None and not overwrite:
        what = "a symlink" if stat.S_ISLNK(existing.st_mode) else "file"
        raise OutputError(f"{path}: {what} exists; pass --force to replace it")
    directory = path.parent
    if not directory.is_dir():
        raise OutputError(f"{path}: folder {directory} does not exist")
    kept_mode = stat.S_IMODE(existing.st_mode) if existing is not None and stat.S_ISREG(existing.st_mode) else None
    with _termination_raises():
        descriptor, temporary = _create_temporary(directory, path.name)
        try:
            with os.fdopen(descriptor, "wb") as stream:
                if kept_mode is not None:
                    os.fchmod(stream.fileno(), kept_mode)
                for piece in pieces:
                    stream.write(piece.encode("utf-8") if isinstance(piece, str) else piece)
                stream.flush()
                os.fsync(stream.fileno())
            if overwrite:
                os.replace(temporary, path)
            else:
                _put_exclusively(temporary, path)
        finally:
            temporary.unlink(missing_ok=True)


def _create_temporary(directory, name):
    """A new file ``.NAME.linkbudget-tmp-XXXXXXXX`` in ``directory``, mode 0666 less the umask."""
    flags = os.O_WRONLY | os.O_CREAT | os.O_EXCL | getattr(os, "O_BINARY", 0)
    while True:
        temporary = directory / f".{name}{TEMPORARY_MARK}{secrets.token_hex(4)}"
        try:
            return os.open(temporary, flags, 0o666), temporary
        except FileExistsError:
            continue


def _put_exclusively(temporary, path):
    """Give ``temporary`` the name ``path`` unless something holds that name already."""
    try:
        os.link(temporary, path)
        return
    except FileExistsError:
        raise OutputError(f"{path}: file exists (written meanwhile); pass --force to replace it") from None
    except OSError as error:
        if error.errno not in _NO_HARD_LINKS:
            raise
    try:  # no hard links here: reserve the name, then rename over the reservation
        os.close(os.open(path, os.O_WRONLY | os.O_CREAT | os.O_EXCL, 0o666))
    except FileExistsError:
        raise OutputError(f"{path}: file exists (written meanwhile); pass --force to replace it") from None
    try:
        os.replace(temporary, path)
    except BaseException:
        path.unlink(missing_ok=True)
        raise


@contextlib.contextmanager
def _termination_raises():
    """SIGTERM raises ``SystemExit(143)`` inside the block, so its ``finally`` clauses run."""
    if threading.current_thread() is not threading.main_thread():
        yield
        return

    def terminate(signum, frame):
        raise SystemExit(128 + signum)

    previous = signal.signal(signal.SIGTERM, terminate)
    try:
        yield
    finally:
        signal.signal(signal.SIGTERM, previous)
