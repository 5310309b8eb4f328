"""Writing report files atomically, never over a file the user did not agree to replace."""

import os
import tempfile
from pathlib import Path


class OutputError(Exception):
    """An output file cannot be written as asked."""


def write_atomic(path, text, *, overwrite=False, protected=()):
    """Write ``text`` to ``path`` through a temporary file and an atomic rename.

    Parameters
    ----------
    path : path-like
        Destination file.
    text : str
        Content (UTF-8).
    overwrite : bool
        Replace an existing file; without it an existing file is an error.
    protected : iterable of path-like
        Files that must never be replaced (the link files being read).
    """
    path = Path(path)
    if any(path.resolve() == Path(other).resolve() for other in protected):
        raise OutputError(f"{path}: refusing to write a report over an input file")
    if path.is_dir():
        raise OutputError(f"{path}: is a folder; give a file name")
    if path.exists() and not overwrite:
        raise OutputError(f"{path}: file exists; pass --force to replace it")
    directory = path.parent if str(path.parent) else Path(".")
    if not directory.is_dir():
        raise OutputError(f"{path}: folder {directory} does not exist")
    try:
        handle, temporary = tempfile.mkstemp(dir=directory, prefix=f".{path.name}.", suffix=".tmp")
    except OSError as error:
        raise OutputError(f"{path}: cannot write: {error.strerror}") from None
    try:
        with os.fdopen(handle, "w", encoding="utf-8") as stream:
            stream.write(text)
        os.replace(temporary, path)
    except OSError as error:
        Path(temporary).unlink(missing_ok=True)
        raise OutputError(f"{path}: cannot write: {error.strerror}") from None
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
