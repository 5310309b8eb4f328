"""Seeded mutants of a link file, for the fuzz test of the command line's exit-code contract.

Two families of damage, as a user's editor or a broken pipeline would do it:

* structure-aware edits, found from the YAML node graph of the example (with the position of
  every node, so the rest of the text, its comments and its layout are kept): a key renamed, a
  value replaced, a unit or a number changed, a list entry or mapping entry deleted, duplicated or
  swapped, a segment's kind swapped, a key or a whole segment moved in from another example, an
  explicit tag, an anchor and alias (plain, undefined, recursive, merge key), a line re-indented;
* byte-level damage: bytes inserted, deleted, overwritten or bit-flipped, a range duplicated,
  the file truncated.

Every mutant is a pure function of the example's text, the donor texts and a seed string, so a
failure found once is found again (``random.Random`` seeded with a string is the same on every
platform and run, whatever ``PYTHONHASHSEED``).
"""

import random
import re
import typing
from dataclasses import dataclass

import yaml
from pydantic import BaseModel

#: Unit spellings tried in place of a value's unit: every accepted unit is added by the caller
#: (from the units table), these are near misses and nonsense.
ODD_UNITS = ["", "DB", "db", "dBmm", "nm nm", "km2", "µ", "dB/ft", "%", "K", "parsec", "Nm", "m^2", "1/s",
             "dB/km/nm", "mw", "dBW", "ft", "in", "°C", "dB/", "/", "1/", "e", "-", "m-1", "um²"]

#: Numbers tried in place of a value's number: edges of floats, YAML 1.1 oddities, huge integers.
ODD_NUMBERS = ["0", "-0", "1", "-1", "0.5", "-0.5", "2", "10", "100", "1e3", "1e6", "1e9", "1e17", "-1e17",
               "1e-9", "1e-30", "1e-300", "1e-320", "5e-324", "1e308", "1.8e308", "1e400", "-1e400",
               "9" * 40, "9" * 400, "-" + "9" * 400, "123456789012345678901234567890", ".inf", "-.inf",
               ".nan", "NaN", "inf", "0x1F", "0o17", "017", "1_000", "1:30", "+5", "1.", ".5", "3e", "1e",
               "2**10", "1,5", "0.1.2", "--1", "1e+", "08", "0b101"]

#: YAML text put in place of a value (or after an inserted key): every YAML type, odd strings.
ODD_VALUES = ["~", "null", "''", '""', "true", "false", "yes", "no", "on", "[]", "{}", "[1, 2]", "[[]]",
              "{typ: 1 dB}", "{min: 3 dB, typ: 1 dB}", "{min: 1 dB, max: 0.5 dB}", "{mean: 1 dB, sigma: -1 dB}",
              "{mean: 1 dB}", "{typ: 1 dB, mean: 1 dB, sigma: 0.1 dB}", "{from: 1500 nm, to: 1400 nm}",
              "{x: 1}", "[1 dB, 2 dB]", "2001-12-14", "12:30:00", "0 dB", "-3 dBm", "1 mW", "0 W", "12.4 km",
              "1 nm", "0 m", "0.35 dB/km", "0.5 /cm", "90 deg", "89.9 deg", "1.5 rad", "1e400 km", "-0 dB",
              "1310nm", "1.447+3.0e-8j", "1.5-0.1j", "0+1j", "1e17", "1e17+1e17j", "j", "nanj", "1.5 + 1j",
              "1.5", "0", "-1", "3", "8", "1e400", "fused-silica", "water", "air", "silicon", "vacuum",
              "magnesium-fluoride", "unobtainium", "!!str 1", "'1e400'", "|\n  block text", ">\n  folded"]

#: Texts put in place of a name, a title, a note or a material (quoted YAML where they need it).
ODD_STRINGS = ["x", " ", "'  '", "PASS", "FAIL", "'ERROR  link.yaml: input error'", "'CLOSES'", "'[bold]x[/]'",
               "'[/]'", "'%s %d'", "'{0}'", "'\\'", '"line one\\nline two"', '"tab\\there"', '"\\x1b[31mred"',
               '"\\e[2J"', '"\\u202eright to left"', '"\\0nul"', '"\\r"', '"\\x85next line"', '"\\u2028"',
               "名前", "é", "🔦", "'#not a comment'", "'- item'", "'key: value'", "'&anchor'", "'*alias'"]

#: Explicit tags: the plain ones a link file may spell out, and ones it may not hold.
TAGS = ["!!str", "!!int", "!!float", "!!bool", "!!null", "!!binary", "!!timestamp", "!!set", "!!omap",
        "!!pairs", "!!map", "!!seq", "!!merge", "!!value", "!custom", "!", "!<tag:example.com,2000:x>",
        "!!python/tuple", "!!python/name:os.system", "!local!x"]

#: Bytes worth inserting: YAML punctuation, line ends, a BOM, NUL, bytes that are not UTF-8.
ODD_BYTES = [b"\x00", b"\xff", b"\xfe", b"\xc3", b"\xe2\x80", b"\xed\xa0\x80", b"\t", b"\r", b"\n", b"\r\n",
             b"\x1b", b"\x85", b"\x0c", b"\x7f", b"\xef\xbb\xbf", b":", b": ", b"-", b"- ", b"{", b"}", b"[",
             b"]", b",", b"#", b"&a ", b"*a", b"!", b"'", b'"', b"%", b"@", b"`", b"|", b">", b"? ", b"---",
             b"...", b"\\", b" ", b"  "]

_QUANTITY = re.compile(r"^(?P<number>[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?)(?P<space>\s*)(?P<unit>\S*)$")
_NUMBER = re.compile(r"[-+]?(\d+(\.\d*)?|\.\d+)([eE][-+]?\d+)?")

#: Keys whose values are free text rather than quantities.
_TEXT_KEYS = {"name", "title", "description", "note", "material", "gap_material", "kind"}


def schema_keys(models):
    """Every key name of ``models`` and of the models nested in their fields (aliases included)."""
    keys, seen, todo = set(), set(), list(models)
    while todo:
        model = todo.pop()
        if model in seen:
            continue
        seen.add(model)
        for name, field in model.model_fields.items():
            keys.add(field.alias or name)
            todo.extend(_models_in(field.annotation))
    return sorted(keys)


def _models_in(annotation):
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return [annotation]
    return [model for argument in typing.get_args(annotation) for model in _models_in(argument)]


@dataclass(frozen=True)
class Child:
    """One entry of a collection: its key node (None in a list), its value node, its slot start."""

    key: object
    value: object
    start: int  # where the entry's text starts (the key, or the "-" of a block list item)


@dataclass(frozen=True)
class Collection:
    node: object
    flow: bool
    children: tuple
    parent_key: str | None
    colon: int | None  # index just after the ':' of the key this collection is the value of


def _content_end(node):
    """Index just after the last character of ``node``'s own text (trailing comments excluded)."""
    if isinstance(node, yaml.ScalarNode) or node.flow_style or not node.value:
        return node.end_mark.index
    last = node.value[-1]
    return _content_end(last[1] if isinstance(node, yaml.MappingNode) else last)


class Example:
    """The node graph of one example, with the places a mutation can edit."""

    def __init__(self, text, *, keys, units, kinds, donors=()):
        self.text = text
        self.keys = list(keys)
        self.units = list(units) + ODD_UNITS
        self.kinds = list(kinds)
        self.scalars, self.collections = [], []
        root = yaml.compose(text, Loader=yaml.SafeLoader)
        self._walk(root, None, None)
        self.names = [self.slice(node) for key, node in self.pairs() if self.slice(key) == "name"]
        self.donor_pairs = [pair for donor in (self, *donors) for pair in donor.flow_pairs()]
        self.donor_items = [item for donor in (self, *donors) for item in donor.chain_items()]

    # --- reading the graph ---------------------------------------------------------------------

    def slice(self, node):
        return self.text[node.start_mark.index:node.end_mark.index]

    def _walk(self, node, parent_key, colon):
        if isinstance(node, yaml.ScalarNode):
            self.scalars.append((node, parent_key))
            return
        flow = bool(node.flow_style)
        children = []
        if isinstance(node, yaml.MappingNode):
            for key, value in node.value:
                if isinstance(key, yaml.ScalarNode):
                    self.scalars.append((key, None))
                children.append(Child(key, value, key.start_mark.index))
                key_text = self.slice(key) if isinstance(key, yaml.ScalarNode) else None
                after = key.end_mark.index
                self._walk(value, key_text, after + 1 if self.text[after:after + 1] == ":" else None)
        else:
            for item in node.value:
                start = item.start_mark.index
                if not flow:
                    start = self.text.rindex("-", 0, start)
                children.append(Child(None, item, start))
                self._walk(item, parent_key, None)
        self.collections.append(Collection(node, flow, tuple(children), parent_key, colon))

    def pairs(self):
        return [(child.key, child.value) for collection in self.collections
                if isinstance(collection.node, yaml.MappingNode) for child in collection.children
                if isinstance(child.key, yaml.ScalarNode)]

    def flow_text(self, node):
        """``node`` written as one line of flow YAML (its own text if it is already one line)."""
        if isinstance(node, yaml.ScalarNode) or node.flow_style:
            text = self.slice(node)
            if "\n" not in text:
                return text
        data = yaml.SafeLoader("").construct_object(node, deep=True)
        return yaml.safe_dump(data, default_flow_style=True, width=1 << 20, allow_unicode=True).strip()

    def flow_pairs(self):
        return [f"{self.slice(key)}: {self.flow_text(value)}" for key, value in self.pairs()]

    def chain_items(self):
        return [self.flow_text(child.value) for collection in self.collections
                if collection.parent_key == "chain" and isinstance(collection.node, yaml.SequenceNode)
                for child in collection.children]

    def line_start(self, index):
        return self.text.rfind("\n", 0, index) + 1

    def column(self, index):
        return index - self.line_start(index)

    def line_end(self, index):
        """Index just after the newline ending the line of ``index`` (or the end of the text)."""
        end = self.text.find("\n", index)
        return len(self.text) if end < 0 else end + 1

    def slot(self, collection, position):
        """(start, end) of a block collection's entry, or of a flow collection's entry text."""
        children = collection.children
        child = children[position]
        if collection.flow:
            return child.start, child.value.end_mark.index
        if position + 1 < len(children):
            return child.start, children[position + 1].start
        return child.start, self.line_end(_content_end(child.value))

    # --- mutations of the structure: each returns a list of (start, end, replacement) ----------

    def mutate_structure(self, rng):
        operation = rng.choice(_STRUCTURE_OPERATIONS)
        return operation(self, rng)

    def _value_scalars(self):
        return [(node, key) for node, key in self.scalars if key is not None]

    def rename_key(self, rng):
        node = rng.choice([node for node, key in self.scalars if key is None])
        name = self.slice(node)
        choices = [
            lambda: name[:-1], lambda: name + rng.choice("sx_"), lambda: name.upper(), lambda: name.title(),
            lambda: _typo(rng, name), lambda: rng.choice(self.keys), lambda: rng.choice(self.keys),
            lambda: f"'{name} '", lambda: "''", lambda: "<<", lambda: rng.choice(["1", "true", "~", "[a]", "{a: 1}"]),
            lambda: name.replace("_", "-"), lambda: name + "\u200b", lambda: rng.choice(ODD_STRINGS),
        ]
        return [(node.start_mark.index, node.end_mark.index, rng.choice(choices)())]

    def replace_value(self, rng):
        node, key = rng.choice(self._value_scalars())
        pool = ODD_STRINGS if key in _TEXT_KEYS and rng.random() < 0.5 else ODD_VALUES
        value = rng.choice(pool)
        if key == "name" and rng.random() < 0.3:
            value = rng.choice(self.names) if self.names else value
        if rng.random() < 0.05:
            value = rng.choice("abcx ") * rng.randint(100, 4000)  # a long text, but not a slow one
        return [(node.start_mark.index, node.end_mark.index, value)]

    def edit_unit(self, rng):
        quantities = [(node, match) for node, _ in self._value_scalars()
                      if (match := _QUANTITY.match(self.slice(node))) and match["unit"]]
        node, match = rng.choice(quantities)
        start = node.start_mark.index
        if rng.random() < 0.2:  # glue the unit to the number, or pad it with spaces
            return [(start + match.end("number"), start + match.start("unit"), rng.choice(["", "   ", "\u00a0"]))]
        return [(start + match.start("unit"), start + match.end("unit"), rng.choice(self.units))]

    def edit_number(self, rng):
        numbers = [(node, match) for node, _ in self._value_scalars()
                   if (match := _NUMBER.search(self.slice(node)))]
        node, match = rng.choice(numbers)
        start = node.start_mark.index
        number = match.group()
        choices = [
            lambda: rng.choice(ODD_NUMBERS), lambda: rng.choice(ODD_NUMBERS),
            lambda: f"{float(number) * 10.0 ** rng.randint(-30, 30):g}",
            lambda: number[1:] if number.startswith("-") else "-" + number,
            lambda: number + rng.choice("0123456789") * rng.randint(1, 30),
        ]
        return [(start + match.start(), start + match.end(), rng.choice(choices)())]

    def _collection(self, rng, *, mapping=None, minimum=1):
        eligible = [c for c in self.collections if len(c.children) >= minimum
                    and (mapping is None or isinstance(c.node, yaml.MappingNode) == mapping)]
        return rng.choice(eligible) if eligible else None

    def delete_entry(self, rng):
        collection = self._collection(rng)
        children = collection.children
        position = rng.randrange(len(children))
        start, end = self.slot(collection, position)
        if collection.flow and len(children) > 1:
            if position + 1 < len(children):
                end = children[position + 1].start
            else:
                start = children[position - 1].value.end_mark.index
        elif not collection.flow and position + 1 == len(children) and not self.text[
                self.line_start(start):start].strip():
            start = self.line_start(start)
        return [(start, end, "")]

    @staticmethod
    def _renamed(text, rng):
        """``text`` with its first ``name`` changed, half of the time, so that a copy need not clash."""
        if rng.random() < 0.5:
            return text
        return re.sub(r"(\bname: *)([^\n,}#]*[^\n,}# ])", lambda m: f"{m[1]}{m[2]} {rng.randint(2, 99)}",
                      text, count=1)

    def duplicate_entry(self, rng):
        collection = self._collection(rng)
        position = rng.randrange(len(collection.children))
        start, end = self.slot(collection, position)
        text = self._renamed(self.text[start:end], rng)
        if collection.flow:
            return [(end, end, ", " + text)]
        if position + 1 < len(collection.children):
            return [(end, end, text)]
        lead = "" if self.text[end - 1:end] == "\n" else "\n"
        return [(end, end, lead + " " * self.column(start) + text)]

    def swap_entries(self, rng):
        collection = self._collection(rng, minimum=3)
        if collection is None:
            return None
        last = len(collection.children) - (0 if collection.flow else 1)
        first, second = sorted(rng.sample(range(last), 2))
        (a, b), (c, d) = self.slot(collection, first), self.slot(collection, second)
        return [(a, b, self.text[c:d]), (c, d, self.text[a:b])]

    def _insert(self, collection, rng, text, *, list_item):
        """Splice that puts ``text`` as a new entry of ``collection`` before a random entry."""
        child = rng.choice(collection.children)
        if collection.flow:
            return [(child.start, child.start, text + ", ")]
        entry = f"- {text}" if list_item else text
        return [(child.start, child.start, entry + "\n" + " " * self.column(child.start))]

    def insert_pair(self, rng):
        collection = self._collection(rng, mapping=True)
        if rng.random() < 0.5:  # a key with a value it holds in one of the examples
            return self._insert(collection, rng, rng.choice(self.donor_pairs), list_item=False)
        pair = f"{rng.choice(self.keys)}: {rng.choice(ODD_VALUES)}"
        return self._insert(collection, rng, pair, list_item=False)

    def insert_item(self, rng):
        collection = self._collection(rng, mapping=False)
        if collection is None:
            return None
        if collection.parent_key == "chain":
            item = rng.choice(self.donor_items)
        else:
            item = rng.choice(ODD_VALUES + [self.flow_text(rng.choice(collection.children).value)] * 5)
        return self._insert(collection, rng, item, list_item=True)

    def swap_kind(self, rng):
        kinds = [node for node, key in self.scalars if key == "kind"]
        if not kinds:
            return None
        node = rng.choice(kinds)
        kind = rng.choice(self.kinds + [_typo(rng, self.slice(node)), "Fiber", "fibre", "'fiber '", "~"])
        return [(node.start_mark.index, node.end_mark.index, kind)]

    def _props_at(self, node, collection_colon=None):
        """Where properties (a tag or an anchor) of ``node`` are written."""
        if isinstance(node, yaml.ScalarNode) or node.flow_style:
            return node.start_mark.index, ""
        if collection_colon is None:
            return None
        return collection_colon, " "

    def add_tag(self, rng):
        tag = rng.choice(TAGS)
        if rng.random() < 0.7:
            node, _ = rng.choice(self.scalars)
            at = node.start_mark.index
            return [(at, at, f"{tag} ")]
        collection = rng.choice([c for c in self.collections if c.colon is not None or c.node.flow_style])
        at, lead = self._props_at(collection.node, collection.colon)
        return [(at, at, f"{lead}{tag} ")]

    def add_alias(self, rng):
        variant = rng.choice(["scalar", "scalar", "recursive", "recursive", "undefined", "merge", "collection"])
        values = self._value_scalars()
        if variant == "undefined":
            node, _ = rng.choice(values)
            return [(node.start_mark.index, node.end_mark.index, "*nowhere")]
        if variant == "scalar":
            first, second = sorted(rng.sample(range(len(values)), 2))
            anchor, alias = values[first][0], values[second][0]
            return [(anchor.start_mark.index, anchor.start_mark.index, "&v "),
                    (alias.start_mark.index, alias.end_mark.index, "*v")]
        candidates = [c for c in self.collections if c.colon is not None or c.node.flow_style]
        collection = rng.choice(candidates)
        at, lead = self._props_at(collection.node, collection.colon)
        if variant == "recursive":  # the collection holds an alias of itself, somewhere below it
            inner = [node for node, _ in values
                     if collection.node.start_mark.index <= node.start_mark.index < _content_end(collection.node)]
            node = rng.choice(inner)
            return [(at, at, f"{lead}&r "), (node.start_mark.index, node.end_mark.index, "*r")]
        later = [node for node, _ in values if node.start_mark.index > _content_end(collection.node)]
        if not later:
            return None
        node = rng.choice(later)
        if variant == "merge" and isinstance(collection.node, yaml.MappingNode):
            return [(at, at, f"{lead}&m "), (node.start_mark.index, node.end_mark.index, "{<<: *m, name: merged}")]
        return [(at, at, f"{lead}&c "), (node.start_mark.index, node.end_mark.index, "*c")]

    def reindent(self, rng):
        starts = [0] + [match.end() for match in re.finditer("\n", self.text) if match.end() < len(self.text)]
        start = rng.choice(starts)
        indent = len(self.text[start:]) - len(self.text[start:].lstrip(" "))
        change = rng.choice([-4, -2, -1, 1, 2, 4])
        if change < 0:
            return [(start, start + min(indent, -change), "")] if indent else None
        return [(start, start, " " * change)]


def _typo(rng, word):
    if len(word) < 2:
        return word + "x"
    position = rng.randrange(len(word) - 1)
    edits = [word[:position] + word[position + 1:],
             word[:position] + word[position + 1] + word[position] + word[position + 2:],
             word[:position] + rng.choice("aeiou") + word[position:]]
    return rng.choice(edits)


_STRUCTURE_OPERATIONS = [
    Example.rename_key, Example.replace_value, Example.replace_value, Example.edit_unit, Example.edit_unit,
    Example.edit_number, Example.edit_number, Example.edit_number, Example.delete_entry, Example.delete_entry,
    Example.duplicate_entry, Example.swap_entries, Example.insert_pair, Example.insert_pair, Example.insert_item,
    Example.swap_kind, Example.add_tag, Example.add_alias, Example.reindent,
]


def _overlaps(splice, taken):
    start, end, _ = splice
    return any(start <= other_end and other_start <= end for other_start, other_end, _ in taken)


def apply_splices(text, splices):
    for start, end, replacement in sorted(splices, key=lambda splice: splice[0], reverse=True):
        text = text[:start] + replacement + text[end:]
    return text


def structure_mutant(example, rng):
    """The example's text after one to three structure-aware edits at places that do not overlap."""
    taken = []
    for _ in range(rng.choices([1, 2, 3], weights=[6, 3, 1])[0]):
        for _attempt in range(5):
            splices = example.mutate_structure(rng)
            if splices and not any(_overlaps(splice, taken) for splice in splices):
                taken += splices
                break
    return apply_splices(example.text, taken)


def byte_mutant(data, rng):
    """``data`` after one to four byte-level edits."""
    data = bytearray(data)
    for _ in range(rng.randint(1, 4)):
        position = rng.randrange(len(data) + 1)
        operation = rng.choice(["insert", "insert", "delete", "flip", "overwrite", "duplicate", "truncate"])
        if operation == "insert":
            piece = rng.choice(ODD_BYTES) if rng.random() < 0.6 else bytes([rng.randrange(256)])
            data[position:position] = piece
        elif operation == "delete":
            del data[position:position + rng.randint(1, 16)]
        elif operation == "flip" and position < len(data):
            data[position] ^= 1 << rng.randrange(8)
        elif operation == "overwrite" and position < len(data):
            data[position] = rng.randrange(256)
        elif operation == "duplicate":
            data[position:position] = data[position:position + rng.randint(1, 64)]
        elif operation == "truncate" and rng.random() < 0.3:
            del data[position:]
    return bytes(data)


def mutant(example, seed):
    """One mutant (bytes) of ``example``, a pure function of the example and ``seed``."""
    rng = random.Random(seed)
    family = rng.choices(["structure", "bytes", "both"], weights=[60, 25, 15])[0]
    text = example.text if family == "bytes" else structure_mutant(example, rng)
    data = text.encode("utf-8")
    return data if family == "structure" else byte_mutant(data, rng)


def mutants(example, name, count):
    """``count`` distinct mutants of ``example`` (none equal to it), seeded by ``name`` and their number.

    Returns a list of ``(seed, data)``.
    """
    original = example.text.encode("utf-8")
    found, seen, number = [], {original}, 0
    while len(found) < count:
        seed = f"{name}:{number}"
        data = mutant(example, seed)
        number += 1
        if data not in seen:
            seen.add(data)
            found.append((seed, data))
    return found
