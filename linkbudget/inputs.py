"""The link files a command is given: plain paths, folders, glob patterns and ``-`` (standard input).

A folder stands for the ``.yaml`` and ``.yml`` files directly inside it (not its subfolders, where
material files usually live), sorted by name; a pattern with ``*``, ``?`` or ``[`` that names no
existing file is expanded (``**`` crosses folders), sorted; a pattern matching nothing is an input
error of its own.
"""

import glob
import sys
from dataclasses import dataclass
from pathlib import Path

from linkbudget.yamlread import MAX_FILE_BYTES

#: The argument that means standard input.
STDIN = "-"
#: File endings a folder's links have.
LINK_SUFFIXES = (".yaml", ".yml")
#: What the messages call standard input.
STDIN_NAME = "<stdin>"


@dataclass(frozen=True)
class LinkArgument:
    """One link to check: a file (``path``), standard input (``path`` is ``None``), or an argument
    that names no file (``problem`` says why)."""

    name: str
    path: Path | None = None
    problem: str | None = None

    @property
    def is_stdin(self):
        return self.path is None and self.problem is None


def _is_pattern(text):
    return any(char in text for char in "*?[")


def expand(arguments):
    """The :class:`LinkArgument` s of ``arguments`` (strings or paths), in order (a file given
    twice is checked twice, as it was given)."""
    found = []
    add = found.append

    for argument in map(str, arguments):
        path = Path(argument)
        if argument == STDIN:
            add(LinkArgument(STDIN_NAME))
        elif path.is_dir():
            files = sorted(entry for entry in path.iterdir()
                           if entry.suffix.lower() in LINK_SUFFIXES and entry.is_file())
            if not files:
                add(LinkArgument(argument, problem="folder holds no .yaml or .yml file"))
            for entry in files:
                add(LinkArgument(str(entry), entry))
        elif _is_pattern(argument) and not path.exists():
            matches = sorted(glob.glob(argument, recursive=True))
            files = [Path(match) for match in matches if Path(match).is_file()]
            if not files:
                add(LinkArgument(argument, problem="no file matches this pattern"))
            for entry in files:
                add(LinkArgument(str(entry), entry))
        else:
            add(LinkArgument(str(path), path))
    return found


def load_argument(item, allow_paths=()):
    """The loaded link of one :class:`LinkArgument` (standard input read whole, at most
    :data:`~linkbudget.yamlread.MAX_FILE_BYTES`, its files found from the current folder).

    Raises
    ------
    ConfigError
        Placed in the file (``<stdin>`` for standard input), or the argument's own problem.
    """
    from linkbudget.config import load_link, parse_link
    from linkbudget.config.source import ConfigError, Problem
    from linkbudget.reader import decoded

    if item.problem is not None:
        raise ConfigError([Problem(item.name, None, (), item.problem)])
    if item.is_stdin:
        text = decoded(sys.stdin.buffer.read(MAX_FILE_BYTES + 1), STDIN_NAME)
        return parse_link(text, STDIN_NAME, Path("."), allow_paths)
    return load_link(item.path, allow_paths)
