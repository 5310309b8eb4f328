"""The JSON Schema (draft 2020-12) of the link language, for editors and YAML language servers.

It is generated from the validation models (:mod:`linkbudget.config.schema` and the segment kinds
of :data:`linkbudget.segments.registry.KINDS`) by pydantic's JSON-schema generation, told how each
field is written (:class:`linkbudget.config.fields.Written`):

- a quantity is text matching its dimension's pattern (:func:`quantity_pattern`: the loader's
  number-and-unit expression with the units of :data:`linkbudget.units.UNITS` of that dimension);
- a number or a count carries its valid range; an index is a number or ``n+κj`` text;
- a spread is one value, or a mapping holding ``typ``, or ``min`` and ``max``, or ``mean`` and
  ``sigma``;
- a chain entry is checked against the keys of its ``kind`` (one ``if``/``then`` per kind), so an
  editor completes and checks the keys of the kind written;
- every mapping refuses unknown keys (``additionalProperties: false``), as the loader does.

The schema judges the form of a value, not its size: the valid ranges of quantities, the ±1000 dB
limit, a power in watts above 0, and the rules between keys (exactly one of ``wavelength``,
``channels`` or ``band``; a medium's thickness or length) are the loader's, with its messages.
"""

import json
import re

from pydantic.json_schema import GenerateJsonSchema, models_json_schema

from linkbudget import __version__
from linkbudget.config.fields import SpreadBase
from linkbudget.units import EXAMPLES, NUMBER_PATTERN, allowed_units, quantity_pattern, with_article

DIALECT = "https://json-schema.org/draft/2020-12/schema"
#: The schema's identifier: the language as this release reads it.
SCHEMA_ID = f"urn:linkbudget:link-schema:{__version__}"

#: What ``\s`` means under ``re.ASCII``, spelled out: ECMA-262 (the regular expressions of JSON
#: Schema) and Python's ``re`` without ``re.ASCII`` would also match other Unicode spaces.
_ASCII_SPACE = r"[\t\n\v\f\r ]"

#: An index written as text (an expression for ``re.ASCII``): ``n`` or ``n+κj`` (``κ`` may be left out, as
#: in ``1.5+j``), in parentheses or not, spaces around the sign. The loader reads it with Python's
#: ``complex``, which also takes a few rarer forms (digits of other scripts, ``_`` between digits).
_UNSIGNED = NUMBER_PATTERN.removeprefix("[-+]?")
INDEX_PATTERN = (rf"^\s*(?:\(\s*{NUMBER_PATTERN} *(?:[-+] *(?:{_UNSIGNED})? *[jJ])?\s*\)"
                 rf"|{NUMBER_PATTERN} *(?:[-+] *(?:{_UNSIGNED})? *[jJ])?)\s*$")

#: The one-value and mapping forms of a spread, as the keys each needs and excludes.
_SPREAD_FORMS = (
    {"required": ["typ"], "not": {"anyOf": [{"required": ["mean"]}, {"required": ["sigma"]}]}},
    {"required": ["min", "max"], "not": {"anyOf": [{"required": ["mean"]}, {"required": ["sigma"]}]}},
    {"required": ["mean", "sigma"], "not": {"anyOf": [{"required": [key]} for key in ("min", "typ", "max")]}},
)


def portable_pattern(pattern):
    """A regular expression written for Python's ``re.ASCII``, in the syntax ECMA-262 and ``re`` read alike.

    ``\\d`` and ``\\s`` are spelled as the ASCII classes ``re.ASCII`` gives them and named groups
    ``(?P<name>...)`` (Python's alone) become plain groups.
    """
    pattern = pattern.replace(r"\d", "[0-9]").replace(r"\s", _ASCII_SPACE)
    return re.sub(r"\(\?P<\w+>", "(?:", pattern)


def quantity_pattern_of(dimension):
    """The pattern of a quantity of ``dimension``: a number and one of its units."""
    units = "|".join(re.escape(unit) for unit in allowed_units(dimension))
    return portable_pattern(quantity_pattern(units))


def quantity_schema(dimension, example=None):
    """A quantity of ``dimension``: text matching :func:`quantity_pattern_of`, with an example."""
    example = example or EXAMPLES[dimension]
    return {
        "type": "string",
        "pattern": quantity_pattern_of(dimension),
        "examples": [example],
        "patternErrorMessage": f"write {with_article(dimension)} with its unit, e.g. '{example}' "
                               f"(units: {', '.join(allowed_units(dimension))})",
    }


def _bounds_keywords(bounds):
    """``minimum``/``maximum`` (or their exclusive forms) of a :class:`~linkbudget.config.ranges.Range`."""
    if bounds is None:
        return {}
    keywords = {}
    if bounds.low is not None:
        keywords["exclusiveMinimum" if bounds.low_open else "minimum"] = bounds.low
    if bounds.high is not None:
        keywords["exclusiveMaximum" if bounds.high_open else "maximum"] = bounds.high
    return keywords


def written_schema(written):
    """The JSON Schema of a field written as ``written`` (a :class:`~linkbudget.config.fields.Written`)."""
    if written.form == "quantity":
        return quantity_schema(written.dimension, written.example)
    if written.form in ("number", "integer"):
        return {"type": written.form, **_bounds_keywords(written.bounds)}
    pattern = INDEX_PATTERN if written.form == "index" else written.pattern
    return {"anyOf": [{"type": "number"}, {"type": "string", "pattern": portable_pattern(pattern)}]}


def _summary(docstring):
    """The first paragraph of a docstring, on one line, with reST ````code```` as Markdown ```code```."""
    first = docstring.strip().split("\n\n")[0]
    return " ".join(first.split()).replace("``", "`")


class _LinkSchemaGenerator(GenerateJsonSchema):
    """Pydantic's generator, with spreads in both their forms, short model descriptions and
    a title on every key."""

    def model_schema(self, schema):
        json_schema = super().model_schema(schema)
        model = schema["cls"]
        if issubclass(model, SpreadBase):
            return _spread(json_schema)
        json_schema["description"] = _summary(model.__doc__)
        return json_schema

    def field_title_should_be_set(self, schema):
        return True

    def handle_ref_overrides(self, json_schema):
        """Keep a key's title beside its ``$ref`` (pydantic drops what the definition repeats)."""
        return json_schema


def _spread(mapping):
    """A spread: its one value, or the mapping in one of its forms (:data:`_SPREAD_FORMS`)."""
    mapping.update(title="Spread", anyOf=list(_SPREAD_FORMS))
    mapping.pop("description", None)
    return {"anyOf": [mapping["properties"]["typ"]["anyOf"][0], mapping],
            "description": "One value, or a spread {min, typ, max} (with typ, or min and max) or {mean, sigma}: "
                           "the nominal budget takes typ or mean, the worst case the end that hurts."}


def _chain_entry(kinds, refs):
    """A chain entry: a mapping whose ``kind`` is one of ``kinds`` (name -> model), checked against
    that kind's model (an ``if``/``then`` per kind)."""
    return {
        "type": "object",
        "title": "Chain entry",
        "description": "A segment of the link; its kind says which keys it takes.",
        "required": ["kind"],
        "properties": {"kind": {"title": "Kind", "description": "The segment kind.", "enum": list(kinds)}},
        "allOf": [{"if": {"properties": {"kind": {"const": kind}}, "required": ["kind"]},
                   "then": {"$ref": refs[model]}} for kind, model in kinds.items()],
    }


def link_schema():
    """The JSON Schema of a link file, as a dict."""
    from linkbudget.config.schema import LinkSpec
    from linkbudget.segments.registry import KINDS

    models = [LinkSpec, *KINDS.values()]
    keyed, document = models_json_schema([(model, "validation") for model in models],
                                         schema_generator=_LinkSchemaGenerator)
    refs = {model: keyed[(model, "validation")]["$ref"] for model in models}
    definitions = document["$defs"]
    for kind, model in KINDS.items():
        kind_key = definitions[refs[model].rsplit("/", 1)[-1]]["properties"]["kind"]
        summary = _summary(model.__doc__)
        kind_key["description"] = f"Segment kind `{kind}`: {summary[0].lower()}{summary[1:]}"
    link = definitions.pop(refs[LinkSpec].rsplit("/", 1)[-1])
    link["properties"]["chain"]["items"] = _chain_entry(KINDS, refs)
    return {
        "$schema": DIALECT,
        "$id": SCHEMA_ID,
        **link,
        "title": "linkbudget link",
        "description": "A link file of linkbudget: a title, one wavelength axis (wavelength, channels or band), "
                       "the source, the receiver and the chain of segments in the order light passes them.",
        "$defs": definitions,
    }


def schema_text():
    """The schema as JSON text (UTF-8, indented, ending in a newline)."""
    return json.dumps(link_schema(), indent=2, ensure_ascii=False) + "\n"
