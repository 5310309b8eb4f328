"""Safe YAML reading that keeps the line and column of every node.

The text is composed into a node graph by :func:`linkbudget.yamlread.compose` (no object
construction; size, node and depth bounds checked while reading), then turned into plain dicts,
lists and scalars while a :class:`Positions` table records where each key path came from, so
every later error can name ``FILE:LINE:COL: key.path``.
"""

import math
from dataclasses import dataclass, field

import yaml

from linkbudget.messages import format_hint
from linkbudget.text import escaped
from linkbudget.yamlread import IMPLICIT_TYPES, PlainSequenceNode, ReadError, compose

_CORE = "tag:yaml.org,2002:"


def _float(text):
    """``.inf``, ``-.inf`` and ``.nan`` as YAML writes them; any other float as Python reads it."""
    special = {".inf": math.inf, ".nan": math.nan}
    word = text.lstrip("+-").lower()
    return (-1.0 if text.startswith("-") else 1.0) * special[word] if word in special else float(text)


#: The scalar tags a link file may use: (pattern the text must match, its value). The same rules
#: apply whether the tag is implicit (resolved from the text) or written (``!!int 3``); an
#: integer may also be written where a float is.
_SCALARS = {
    _CORE + "str": (None, str),
    _CORE + "null": (IMPLICIT_TYPES["null"], lambda text: None),
    _CORE + "bool": (IMPLICIT_TYPES["bool"], lambda text: text.lower() == "true"),
    _CORE + "int": (IMPLICIT_TYPES["int"], int),
    _CORE + "float": (IMPLICIT_TYPES["float"], _float),
}
_COLLECTIONS = {"mapping": _CORE + "map", "list": _CORE + "seq"}
_MERGE = _CORE + "merge"

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
    """One input error: where it is and what is wrong, with an optional hint line.

    ``cause`` is the placed error in another file this place refers to (a material file, a part):
    it is written as the second line instead of the hint, so both places show; a cause may have its
    own cause (a part's material file), each on a further line.
    """

    file: str
    mark: Mark | None
    path: tuple
    message: str
    hint: str | None = None
    cause: "Problem | None" = None

    def line(self):
        """``FILE:LINE:COL: key.path: message``, escaped, without the hint."""
        where = self.file if self.mark is None else f"{self.file}:{self.mark.line}:{self.mark.column}"
        return f"{escaped(where)}: {escaped(format_key_path(self.path))}: {escaped(self.message)}"

    def render(self):
        if self.cause is None:
            return self.line() + format_hint(None if self.hint is None else escaped(self.hint))
        lines, cause = [self.line()], self.cause
        while cause is not None:  # a part used by a link, a part it builds on, a material file...
            lines.append("  " + cause.line() + ("" if cause.hint is None or cause.cause is not None
                                                else f" (hint: {escaped(cause.hint)})"))
            cause = cause.cause
        return "\n".join(lines)


@dataclass
class Positions:
    """Where each key path of a document was written.

    The items of a list of scalars (a table row) are not entered one by one: ``scalar_lists``
    keeps each such list's nodes by its key path, and :meth:`mark` reads an item's place there.
    """

    file: str
    marks: dict = field(default_factory=dict)
    key_marks: dict = field(default_factory=dict)
    scalar_lists: dict = field(default_factory=dict)

    def mark(self, path):
        """The mark of ``path``, or of its nearest written ancestor."""
        path = tuple(path)
        while path not in self.marks and path:
            items = self.scalar_lists.get(path[:-1])
            if items is not None and isinstance(path[-1], int) and 0 <= path[-1] < len(items):
                return _mark(items[path[-1]])
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

    def __init__(self, positions, quote_input):
        self.positions = positions
        self.quote_input = quote_input

    def fail(self, node, path, message, hint=None, *, discreet=None):
        """Stop at ``node``; ``discreet`` is the message to give instead when the file may not be quoted."""
        if discreet is not None and not self.quote_input:
            message = discreet
        problem = Problem(self.positions.file, _mark(node), tuple(path), message, hint)
        raise ConfigError([problem])

    def build(self, node, path):
        self.positions.marks.setdefault(tuple(path), _mark(node))
        if isinstance(node, yaml.MappingNode):
            self.check_tag(node, path, _COLLECTIONS["mapping"])
            return {key: self.build(value_node, (*path, key))
                    for key, (_, value_node) in self.pairs(node, path).items()}
        if isinstance(node, PlainSequenceNode) and all(item.tag in _SCALARS for item in node.value):
            # untagged scalars, each tag resolved from its own text by the pattern _SCALARS checks
            self.check_tag(node, path, _COLLECTIONS["list"])
            self.positions.scalar_lists[tuple(path)] = node.value
            return [_SCALARS[item.tag][1](item.value) for item in node.value]
        if isinstance(node, yaml.SequenceNode):
            self.check_tag(node, path, _COLLECTIONS["list"])
            return [self.build(item, (*path, index)) for index, item in enumerate(node.value)]
        return self.build_scalar(node, path)

    def check_tag(self, node, path, expected):
        if node.tag == expected:
            return
        if node.tag in _SCALARS or node.tag in _COLLECTIONS.values():
            self.fail(node, path, f"YAML tag {node.tag!r} does not fit this {node.id}",
                      discreet=f"a YAML tag does not fit this {node.id}")
        self.fail(node, path, f"unsupported YAML tag {node.tag!r}",
                  "link and material files hold plain text, numbers, lists and mappings only",
                  discreet="unsupported YAML tag")

    def pairs(self, node, path):
        """``key -> (key node, value node)`` of a mapping, merge keys applied (YAML 1.1).

        The mappings a merge key ``<<`` names come first, an earlier one winning over a later
        one; keys written in the mapping itself override them. Only a key written twice in the
        same mapping is a duplicate.
        """
        merged, written = {}, {}
        for key_node, value_node in node.value:
            if key_node.tag == _MERGE:
                if _MERGE in written:
                    self.fail(key_node, path, "duplicate merge key '<<'", "merge several mappings as <<: [*a, *b]")
                written[_MERGE] = None
                for source in self.merge_sources(value_node, path):
                    for key, pair in self.pairs(source, path).items():
                        merged.setdefault(key, pair)
                continue
            key = self.build_scalar(key_node, path) if isinstance(key_node, yaml.ScalarNode) else None
            if not isinstance(key, str):
                self.fail(key_node, path, "mapping keys must be plain names")
            if key in written:
                shown = (*path, key) if self.quote_input else path
                self.fail(key_node, shown, "duplicate key")
            written[key] = (key_node, value_node)
        written.pop(_MERGE, None)
        pairs = {**merged, **written}
        for key, (key_node, value_node) in pairs.items():
            self.positions.marks[(*path, key)] = _mark(value_node)
            self.positions.key_marks[(*path, key)] = _mark(key_node)
        return pairs

    def merge_sources(self, node, path):
        """The mappings a merge key's value names: one mapping, or a list of mappings."""
        sources = node.value if isinstance(node, yaml.SequenceNode) else [node]
        for source in sources:
            if not isinstance(source, yaml.MappingNode):
                self.fail(source, path, "a merge key '<<' takes a mapping or a list of mappings",
                          "write <<: *name, with the anchor &name on a mapping")
        return sources

    def build_scalar(self, node, path):
        if node.tag not in _SCALARS:
            self.check_tag(node, path, None)
        pattern, value = _SCALARS[node.tag]
        if pattern is not None and not pattern.fullmatch(node.value):
            tag = node.tag.replace(_CORE, "!!")
            self.fail(node, path, f"{node.value!r} cannot be read as {tag}",
                      discreet=f"a value cannot be read as {tag}")
        return value(node.value)


def load_yaml(text, file="<string>", *, quote_input=True):
    """Parse YAML text into plain data and the positions of its key paths.

    The reading bounds of :mod:`linkbudget.yamlread` apply (size of each text, nodes with
    aliases expanded, nesting depth, no recursive alias), checked while the text is read.

    Parameters
    ----------
    text : str
        The document.
    file : str
        Name used in error messages.
    quote_input : bool
        Whether a message may repeat text of the file (a YAML syntax error's, a tag, a value, a
        duplicate key). ``False`` for a file a link points at, which could be anyone's: the message
        then says what is wrong and where, never what is written there.

    Returns
    -------
    (object, Positions)

    Raises
    ------
    ConfigError
        On a YAML syntax error (tabs included), an unsupported tag, a duplicate key, more than
        one document, or a document beyond a reading bound.
    """
    positions = Positions(file)
    try:
        node = compose(text)
    except ReadError as error:
        where = None if error.line is None else Mark(error.line, error.column)
        message = str(error) if quote_input or not error.quotes_input else "not valid YAML"
        raise ConfigError([Problem(file, where, (), message, error.hint)]) from None
    if node is None:
        raise ConfigError([Problem(file, Mark(1, 1), (), "the file is empty")])
    return _Builder(positions, quote_input).build(node, ()), positions
