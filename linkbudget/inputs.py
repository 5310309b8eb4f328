"""The link files a command is given: plain paths, folders, glob patterns and ``-`` (standard input).

A folder stands for the link files under it (:func:`linkbudget.usage.link_paths`: its ``.yaml`` and
``.yml`` files and its subfolders', sorted, without part files and other YAML files such as
material files); a pattern with ``*``, ``?`` or ``[`` that names no existing file is expanded
(``**`` crosses folders), sorted, part files left to their own check; a pattern matching nothing
is an input error of its own.
"""

import glob
import sys
from dataclasses import dataclass
from pathlib import Path

from linkbudget.config.parts import is_part_file
from linkbudget.usage import link_paths, part_files_in
from linkbudget.yamlread import MAX_FILE_BYTES

#: The argument that means standard input.
STDIN = "-"
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
            files = link_paths([path])
            if not files and not part_files_in([path]):
                add(LinkArgument(argument, problem="no link files (.yaml or .yml) and no part files in this folder"))
            for entry in files:
                add(LinkArgument(str(entry), entry))
        elif _is_pattern(argument) and not path.exists():
            matches = sorted(glob.glob(argument, recursive=True))
            files = [Path(match) for match in matches if Path(match).is_file()]
            if not files:
                add(LinkArgument(argument, problem="no file matches this pattern"))
            for entry in files:
                if not is_part_file(entry.name):  # checked as a part file (see linkbudget.usage)
                    add(LinkArgument(str(entry), entry))
        elif not is_part_file(path.name):
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
