"""Safe YAML reading that keeps the line and column of every node.

The text is composed into a node graph with PyYAML's safe loader (no object construction),
then turned into plain dicts, lists and scalars while a :class:`Positions` table records where
each key path came from, so every later error can name ``FILE:LINE:COL: key.path``.
"""

from dataclasses import dataclass, field

import yaml

from linkbudget.messages import format_hint

#: Bound on the number of nodes a document may expand to (aliases included), against
#: "billion laughs" documents whose aliases multiply a small text into a huge structure.
MAX_NODES = 100_000

#: Deepest nesting of lists and mappings a document may have (a link needs about six).
MAX_DEPTH = 64

#: The only node tags a link file may use: plain scalars, lists and mappings.
_PLAIN_TAGS = {
    f"tag:yaml.org,2002:{name}" for name in ("str", "int", "float", "bool", "null", "seq", "map")
}


@dataclass(frozen=True)
class Mark:
    """A 1-based line and column in a file."""

    line: int
    column: int


def format_key_path(path):
    """``("chain", 2, "loss", "max")`` -> ``"chain[2].loss.max"``."""
    text = ""
    for part in path:
        if isinstance(part, int):
            text += f"[{part}]"
        else:
            text += f".{part}" if text else str(part)
    return text or "(top level)"


class ConfigError(Exception):
    """One or more input errors, each placed at a file, line, column and key path."""

    def __init__(self, problems):
        self.problems = list(problems)
        super().__init__("\n".join(problem.render() for problem in self.problems))


@dataclass(frozen=True)
class Problem:
    """One input error: where it is and what is wrong, with an optional hint line."""

    file: str
    mark: Mark | None
    path: tuple
    message: str
    hint: str | None = None

    def render(self):
        where = self.file if self.mark is None else f"{self.file}:{self.mark.line}:{self.mark.column}"
        text = f"{where}: {format_key_path(self.path)}: {self.message}"
        return text + format_hint(self.hint)


@dataclass
class Positions:
    """Where each key path of a document was written."""

    file: str
    marks: dict = field(default_factory=dict)
    key_marks: dict = field(default_factory=dict)

    def mark(self, path):
        """The mark of ``path``, or of its nearest written ancestor."""
        path = tuple(path)
        while path not in self.marks and path:
            path = path[:-1]
        return self.marks.get(path)

    def problem(self, path, message, hint=None, *, at_key=False):
        """A :class:`Problem` placed at ``path`` (at its key rather than its value if ``at_key``)."""
        mark = self.key_marks.get(tuple(path)) if at_key else None
        return Problem(self.file, mark or self.mark(path), tuple(path), message, hint)


def _mark(node):
    return Mark(node.start_mark.line + 1, node.start_mark.column + 1)


class _Builder:
    """Turns composed YAML nodes into plain data, recording the mark of every key path."""

    def __init__(self, positions):
        self.positions = positions
        self.constructor = yaml.SafeLoader("")
        self.count = 0

    def fail(self, node, path, message, hint=None):
        problem = Problem(self.positions.file, _mark(node), tuple(path), message, hint)
        raise ConfigError([problem])

    def build(self, node, path):
        self.count += 1
        if self.count > MAX_NODES:
            self.fail(node, path, f"document expands to more than {MAX_NODES} nodes",
                      "a YAML alias/anchor chain multiplies the document; write the values out")
        self.positions.marks.setdefault(tuple(path), _mark(node))
        if node.tag not in _PLAIN_TAGS:
            self.fail(node, path, f"unsupported YAML tag {node.tag!r}",
                      "link files hold plain text, numbers, lists and mappings only")
        if isinstance(node, yaml.MappingNode):
            return self.build_mapping(node, path)
        if isinstance(node, yaml.SequenceNode):
            return [self.build(item, (*path, index)) for index, item in enumerate(node.value)]
        return self.build_scalar(node, path)

    def build_mapping(self, node, path):
        try:
            self.constructor.flatten_mapping(node)
        except yaml.YAMLError as error:
            self.fail(node, path, f"bad merge key: {error.problem}")
        result = {}
        for key_node, value_node in node.value:
            key = self.build(key_node, path) if isinstance(key_node, yaml.ScalarNode) else None
            if not isinstance(key, str):
                self.fail(key_node, path, "mapping keys must be plain names")
            if key in result:
                self.fail(key_node, (*path, key), "duplicate key")
            self.positions.marks[(*path, key)] = _mark(value_node)
            self.positions.key_marks[(*path, key)] = _mark(key_node)
            result[key] = self.build(value_node, (*path, key))
        return result

    def build_scalar(self, node, path):
        try:
            return self.constructor.construct_object(node, deep=True)
        except (yaml.YAMLError, ValueError) as error:
            self.fail(node, path, f"cannot read value: {error}")


def _check_depth(text, file):
    """Refuse documents nested deeper than :data:`MAX_DEPTH`, at the first too-deep node."""
    depth = 0
    for event in yaml.parse(text, Loader=yaml.SafeLoader):
        if isinstance(event, (yaml.MappingStartEvent, yaml.SequenceStartEvent)):
            depth += 1
            if depth > MAX_DEPTH:
                raise ConfigError([Problem(file, _mark(event), (), f"nested more than {MAX_DEPTH} levels deep")])
        elif isinstance(event, (yaml.MappingEndEvent, yaml.SequenceEndEvent)):
            depth -= 1


def load_yaml(text, file="<string>"):
    """Parse YAML text into plain data and the positions of its key paths.

    Parameters
    ----------
    text : str
        The document.
    file : str
        Name used in error messages.

    Returns
    -------
    (object, Positions)

    Raises
    ------
    ConfigError
        On a YAML syntax error (tabs included), an unsupported tag, a duplicate key, more than
        one document, or a document that expands beyond :data:`MAX_NODES` nodes.
    """
    positions = Positions(file)
    try:
        _check_depth(text, file)
        node = yaml.compose(text, Loader=yaml.SafeLoader)
    except yaml.MarkedYAMLError as error:
        mark = error.problem_mark or error.context_mark
        where = None if mark is None else Mark(mark.line + 1, mark.column + 1)
        message = f"YAML syntax error: {error.problem or error.context}"
        hint = "indent with spaces, not tabs" if "\t" in text else None
        raise ConfigError([Problem(file, where, (), message, hint)]) from None
    except yaml.reader.ReaderError as error:
        before = text[: error.position]
        where = Mark(before.count("\n") + 1, error.position - (before.rfind("\n") + 1) + 1)
        message = f"character {error.character!r} is not allowed in YAML text"
        raise ConfigError([Problem(file, where, (), message)]) from None
    except yaml.YAMLError as error:
        raise ConfigError([Problem(file, None, (), f"YAML error: {error}")]) from None
    if node is None:
        raise ConfigError([Problem(file, Mark(1, 1), (), "the file is empty")])
    return _Builder(positions).build(node, ()), positions
