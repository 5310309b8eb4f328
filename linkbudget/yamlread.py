"""Reading the YAML files a link uses (link files and material files), within fixed bounds.

Both kinds of file are read by :func:`read_text` (at most :data:`MAX_FILE_BYTES` bytes are ever
read, so ``/dev/zero`` or a huge file is refused without being loaded) and composed into a node
graph by :func:`compose`, which enforces the other bounds while it reads, not after a full parse:

- :data:`MAX_NODES` nodes, every alias counted as the nodes it stands for ("billion laughs");
- :data:`MAX_DEPTH` levels of nesting, aliases expanded;
- :data:`MAX_TEXT_CHARS` characters in any one scalar (a name, a title, a note);
- no alias inside the list or mapping it names (a recursive structure).

Plain scalars are resolved with the rules of the YAML 1.2 core schema, not YAML 1.1's: only
``true``/``false`` are booleans, only plain decimal digits without a leading zero are integers,
so ``1:30`` (base 60 in YAML 1.1), ``0x10``, ``017`` (octal in YAML 1.1), ``1_000``, ``yes``,
``no``, ``on`` and dates stay text, and a field expecting a number says so. A merge key ``<<``
is kept for the reader of the nodes to apply.
"""

import re

import yaml
from yaml.composer import Composer
from yaml.events import AliasEvent, CollectionStartEvent, ScalarEvent, SequenceEndEvent
from yaml.parser import Parser
from yaml.reader import Reader
from yaml.resolver import BaseResolver
from yaml.scanner import Scanner


class PurePythonParser(Reader, Scanner, Parser):
    """PyYAML's own parser, written in Python: used where PyYAML was built without libyaml."""

    def __init__(self, stream):
        Reader.__init__(self, stream)
        Scanner.__init__(self)
        Parser.__init__(self)


try:  # libyaml's parser: about six times faster than the pure-Python one
    from yaml.cyaml import CParser as FastParser
except ImportError:  # pragma: no cover - PyYAML built without libyaml
    FastParser = PurePythonParser

#: Largest file read [bytes]. A link is a few kB; the largest catalog material file is 60 kB.
MAX_FILE_BYTES = 1_000_000

#: Most nodes a document may expand to, aliases counted as what they stand for.
MAX_NODES = 100_000

#: Deepest nesting of lists and mappings a document may have (a link needs about six).
MAX_DEPTH = 64

#: Longest scalar [characters]: a name, a title, a description, a note.
MAX_TEXT_CHARS = 1000

_CORE = "tag:yaml.org,2002:"

#: The implicit types of plain scalars (YAML 1.2 core schema) and the merge key.
IMPLICIT_TYPES = {
    "bool": re.compile(r"true|True|TRUE|false|False|FALSE"),
    "int": re.compile(r"[-+]?(0|[1-9][0-9]*)"),
    "float": re.compile(r"[-+]?(\.[0-9]+|(0|[1-9][0-9]*)(\.[0-9]*)?)([eE][-+]?[0-9]+)?"
                        r"|[-+]?\.(inf|Inf|INF)|\.(nan|NaN|NAN)"),
    "null": re.compile(r"~|null|Null|NULL|"),
    "merge": re.compile(r"<<"),
}


class ReadError(Exception):
    """A file that cannot be read or composed: a message, where (1-based line, column) and a hint."""

    def __init__(self, message, line=None, column=None, hint=None, *, quotes_input=False):
        super().__init__(message)
        self.line, self.column, self.hint = line, column, hint
        self.quotes_input = quotes_input  # the message repeats text of the file (a name, a character)


class _Resolver(BaseResolver):
    yaml_implicit_resolvers = {}


#: The characters a plain scalar of each implicit type can start with ("" for the empty null).
_FIRST_CHARACTERS = {"bool": "tTfF", "int": "-+0123456789", "float": "-+0123456789.", "null": ["~", "n", "N", ""],
                     "merge": "<"}

for _name, _pattern in IMPLICIT_TYPES.items():  # int before float: a float pattern matches "12" too
    _Resolver.add_implicit_resolver(_CORE + _name, re.compile(rf"^(?:{_pattern.pattern})$"),
                                    list(_FIRST_CHARACTERS[_name]))


def read_text(path, max_bytes=MAX_FILE_BYTES):
    """The UTF-8 text of the file at ``path``, reading at most ``max_bytes + 1`` bytes.

    Raises
    ------
    ReadError
        If the file holds more than ``max_bytes`` bytes.
    OSError, UnicodeDecodeError
        As :func:`open` and :meth:`bytes.decode` raise them.
    """
    with open(path, "rb") as stream:
        return bounded_text(stream.read(max_bytes + 1), max_bytes)


def bounded_text(data, max_bytes=MAX_FILE_BYTES):
    """``data`` (read as at most ``max_bytes + 1`` bytes) decoded as UTF-8, refused if over ``max_bytes``."""
    if len(data) > max_bytes:
        raise ReadError(f"file is larger than {max_bytes} bytes",
                        hint="link and material files are text of a few kB")
    return data.decode("utf-8")


def _place(mark):
    return mark.line + 1, mark.column + 1


class PlainSequenceNode(yaml.SequenceNode):
    """A list whose items are all scalars without tag or anchor (a row of a table such as
    ``[1.55, 1.444, 0]``): composed in one pass, each item's tag resolved from its text."""


class _BoundedComposer(Composer):
    """PyYAML's composer, counting nodes and depth as it composes (aliases expanded)."""

    def __init__(self):
        super().__init__()
        self.count = 0  # nodes so far, aliases expanded
        self.depth = 0  # nesting of the node being composed, aliases expanded
        self.extent = {}  # anchor -> (nodes, levels) of its node, once composed
        self.open = set()  # anchors whose node is still being composed
        self.levels = 0  # deepest nesting below the node being composed

    def grow(self, nodes, levels, event):
        self.count += nodes
        if self.count > MAX_NODES:
            raise ReadError(f"document expands to more than {MAX_NODES} nodes", *_place(event.start_mark),
                            "a YAML alias/anchor chain multiplies the document; write the values out")
        if self.depth + levels > MAX_DEPTH:
            raise ReadError(f"nested more than {MAX_DEPTH} levels deep", *_place(event.start_mark))

    def compose_node(self, parent, index):
        event = self.peek_event()
        if isinstance(event, AliasEvent):
            if event.anchor in self.open:
                raise ReadError("an alias is inside the list or mapping it names",
                                *_place(event.start_mark), "a recursive structure cannot be a value")
            nodes, levels = self.extent.get(event.anchor, (0, 0))
            self.grow(nodes, levels, event)
            self.levels = max(self.levels, levels)
            return super().compose_node(parent, index)
        if isinstance(event, ScalarEvent) and len(event.value) > MAX_TEXT_CHARS:
            raise ReadError(f"text longer than {MAX_TEXT_CHARS} characters", *_place(event.start_mark),
                            "names, titles and notes are short; a longer text belongs in a separate document")
        start = self.count
        collection = isinstance(event, CollectionStartEvent)
        self.grow(1, int(collection), event)
        self.depth += collection
        if event.anchor is not None:
            self.open.add(event.anchor)
        outer_levels, self.levels = self.levels, 0
        node = super().compose_node(parent, index)
        levels = self.levels + collection
        self.depth -= collection
        self.levels = max(outer_levels, levels)
        if event.anchor is not None:
            self.open.discard(event.anchor)
            self.extent[event.anchor] = (self.count - start, levels)
        return node

    def compose_sequence_node(self, anchor):
        """A sequence node, as PyYAML composes it, with a short path for untagged scalar items.

        A table of numbers (a material's rows) is thousands of scalars; each is counted and
        resolved here directly instead of through :meth:`compose_node`, with the same bounds. A
        list of only such items comes out as a :class:`PlainSequenceNode`.
        """
        start_event = self.get_event()
        tag = start_event.tag
        if tag is None or tag == "!":
            tag = self.resolve(yaml.SequenceNode, None, start_event.implicit)
        items, plain = [], True
        while not self.check_event(SequenceEndEvent):
            event = self.peek_event()
            if type(event) is ScalarEvent and event.tag is None and event.anchor is None \
                    and len(event.value) <= MAX_TEXT_CHARS:
                self.get_event()
                self.grow(1, 0, event)
                items.append(yaml.ScalarNode(self.resolve(yaml.ScalarNode, event.value, event.implicit), event.value,
                                             event.start_mark, event.end_mark, event.style))
            else:
                plain = False
                items.append(self.compose_node(None, len(items)))
        kind = PlainSequenceNode if plain and items else yaml.SequenceNode
        node = kind(tag, items, start_event.start_mark, self.get_event().end_mark, flow_style=start_event.flow_style)
        if anchor is not None:  # registered once composed: an alias inside it is refused by compose_node
            self.anchors[anchor] = node
        return node


def loader_class(parser):
    """The bounded loader class reading with ``parser`` (:data:`FastParser` or :class:`PurePythonParser`)."""

    class Loader(_BoundedComposer, parser, _Resolver):
        def __init__(self, text):
            parser.__init__(self, text)
            _BoundedComposer.__init__(self)
            _Resolver.__init__(self)

    return Loader


#: The loader :func:`compose` uses: libyaml's parser when PyYAML has it. Both parsers give the same
#: nodes and the same placed errors (the test suite reads every input test with each).
LOADER = loader_class(FastParser)


def compose(text):
    """The node graph of one YAML document, within the module's bounds; ``None`` if empty.

    Raises
    ------
    ReadError
        On a YAML syntax error, a character YAML does not allow, more than one document, or a
        document beyond one of the bounds; placed where the reader stopped.
    """
    try:
        return _single_node(text)
    except yaml.MarkedYAMLError as error:
        mark = error.problem_mark or error.context_mark
        where = () if mark is None else _place(mark)
        hint = "indent with spaces, not tabs" if "\t" in text else None
        raise ReadError(f"YAML syntax error: {error.problem or error.context}", *where, hint,
                        quotes_input=True) from None
    except yaml.reader.ReaderError as error:
        # libyaml counts bytes of UTF-8, the pure-Python reader characters
        if issubclass(LOADER, yaml.reader.Reader):
            before = text[: error.position]
        else:
            before = text.encode("utf-8")[: error.position].decode("utf-8", "replace")
        line, column = before.count("\n") + 1, len(before) - (before.rfind("\n") + 1) + 1
        bad = text[len(before): len(before) + 1]
        raise ReadError(f"character {bad!r} is not allowed in YAML text", line, column,
                        quotes_input=True) from None
    except UnicodeEncodeError as error:
        before = text[: error.start]
        line, column = before.count("\n") + 1, error.start - (before.rfind("\n") + 1) + 1
        raise ReadError("text holds a lone surrogate, which is not a character", line, column) from None


def _single_node(text):
    """The one document of ``text`` composed by :data:`LOADER` (the pure-Python reader checks
    the characters when it is made, libyaml's while it parses)."""
    loader = LOADER(text)
    try:
        return loader.get_single_node()
    finally:
        loader.dispose()
