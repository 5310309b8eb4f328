"""The JSON Schema of the link language (``linkbudget schema``), checked with the ``jsonschema`` library.

Every link the project ships (configs/ and each ```yaml example of README.md) must validate; a key
the loader does not know and a bare number where a unit is needed must not, wherever they are
written. The quantity patterns are compared with the loader on samples of written forms. The
documents are read with PyYAML's ``safe_load``, as an editor's language server reads them: a
value such as ``1310 nm`` is text.
"""

import copy
import json
import random
import re
import shutil
import subprocess
from functools import cache
from pathlib import Path

import pytest
import yaml
from jsonschema import Draft202012Validator
from pydantic import TypeAdapter, ValidationError

from linkbudget.config import ConfigError, parse_link
from linkbudget.config.fields import ComplexIndex
from linkbudget.config.json_schema import DIALECT, SCHEMA_ID, link_schema, part_file_schema, quantity_schema
from linkbudget.segments.registry import KINDS
from linkbudget.segments.splitter import split_ratio
from linkbudget.units import UNITS, UnitError, parse_quantity
from tests.cli.mutants import structure_mutant
from tests.cli.test_fuzz import examples as fuzz_examples
from tests.conftest import run_cli

ROOT = Path(__file__).resolve().parents[2]
README = (ROOT / "README.md").read_text(encoding="utf-8")
CONFIGS = sorted((ROOT / "configs").glob("*.yaml"))
DIMENSIONS = sorted({dimension for dimension, _ in UNITS.values()})

#: The smallest link around a list of chain entries (the README's entries are written for ``chain:``).
MINIMAL_LINK = {"title": "README example", "wavelength": "1550 nm", "source": {"power": "0 dBm"},
                "receiver": {"sensitivity": "-30 dBm"}}


@cache
def validator():
    return Draft202012Validator(link_schema())


def readme_yaml_blocks():
    """Each ```yaml block of README.md, parsed, with the line it starts on."""
    return [(README[: match.start()].count("\n") + 2, yaml.safe_load(match.group(1)))
            for match in re.finditer(r"```yaml\n(.*?)```", README, re.S)]


def is_material_file(document):
    """A material file (the README shows two): a name, a source and one model, no chain."""
    return isinstance(document, dict) and {"name", "source"} <= document.keys() and "chain" not in document


def is_part_file(document):
    """A part file (the README shows some): named parts under ``parts``, no chain."""
    return isinstance(document, dict) and "parts" in document and "chain" not in document


def readme_links():
    """(where, link) for every README example that is a link or chain entries, wrapped in a minimal link."""
    links = []
    for line, document in readme_yaml_blocks():
        if is_material_file(document) or is_part_file(document):
            continue
        link = {**MINIMAL_LINK, "chain": document} if isinstance(document, list) else (
            document if "title" in document else {**MINIMAL_LINK, "chain": [{"kind": "element", "loss": "1 dB"}],
                                                  **document})  # top-level keys shown alone (`reachable:`)
        links.append((f"README.md:{line}", link))
    return links


def example_links():
    """Every link the project shows: the shipped configs and the README's examples."""
    return [(path.name, yaml.safe_load(path.read_text(encoding="utf-8"))) for path in CONFIGS] + readme_links()


def errors(document):
    return list(validator().iter_errors(document))


def test_schema_is_a_valid_draft_2020_12_schema():
    schema = link_schema()
    Draft202012Validator.check_schema(schema)
    assert schema["$schema"] == DIALECT == "https://json-schema.org/draft/2020-12/schema"
    assert schema["$id"] == SCHEMA_ID


def test_readme_examples_found():
    """The README's blocks: every one is a link, chain entries or one of the two material files."""
    blocks = readme_yaml_blocks()
    materials = [document for _, document in blocks if is_material_file(document)]
    assert [document["name"] for document in materials] == ["my-glass", "potting-epoxy"]
    part_files = [document for _, document in blocks if is_part_file(document)]
    assert len(part_files) >= 1
    assert len(readme_links()) == len(blocks) - 2 - len(part_files) >= 10


@pytest.mark.parametrize(("where", "link"), example_links(), ids=[where for where, _ in example_links()])
def test_every_example_validates(where, link):
    assert [f"{list(error.absolute_path)}: {error.message}" for error in errors(link)] == []


def mappings(node, path=()):
    """The key path of every mapping in a document."""
    if isinstance(node, dict):
        yield path
        for key, value in node.items():
            yield from mappings(value, (*path, key))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            yield from mappings(value, (*path, index))


def at(document, path):
    for part in path:
        document = document[part]
    return document


def in_part_use(document, path):
    """Whether ``path`` lies in a chain entry that uses a part: its keys are the part's kind's,
    which only the loader knows (the part file names the kind)."""
    return any(isinstance(at(document, path[:end]), dict) and "part" in at(document, path[:end])
               for end in range(len(path) + 1))


def test_unknown_key_rejected_in_every_mapping_of_every_example():
    checked = 0
    for where, link in example_links():
        for path in (path for path in mappings(link) if not in_part_use(link, path)):
            changed = copy.deepcopy(link)
            at(changed, path)["colour"] = "blue"
            assert errors(changed), f"{where}: an unknown key at {list(path)} passes the schema"
            checked += 1
    assert checked > 200  # every mapping: top level, source, receiver, entries, spreads, layers, beams


def quantity_leaves(node, path=()):
    """(key path, text) of every value written as a number and a unit of the language."""
    if isinstance(node, dict):
        items = node.items()
    elif isinstance(node, list):
        items = enumerate(node)
    else:
        match = isinstance(node, str) and re.fullmatch(r"\s*(\S+?)\s*([^\s\d.+-]\S*)\s*", node)
        if match and match[2] in UNITS:
            yield path, match[1]
        return
    for key, value in items:
        yield from quantity_leaves(value, (*path, key))


def test_bare_number_rejected_for_every_quantity_of_every_example():
    checked = 0
    for where, link in example_links():
        for path, number_text in quantity_leaves(link):
            if in_part_use(link, path[:-1]):
                continue
            changed = copy.deepcopy(link)
            at(changed, path[:-1])[path[-1]] = float(number_text)
            assert errors(changed), f"{where}: a bare number at {list(path)} passes the schema"
            checked += 1
    assert checked > 200


def test_unknown_key_and_bare_number_rejected_by_loader_too():
    """The two rejections above are the loader's as well (on the shipped quarry link)."""
    text = (ROOT / "configs" / "quarry-uplink.yaml").read_text(encoding="utf-8")
    parse_link(text, "quarry-uplink.yaml", ROOT / "configs")
    for changed in (text.replace("  sensitivity:", "  sensitivty:", 1),
                    re.sub(r"length: [0-9.]+ m\b", "length: 3", text, count=1)):
        assert changed != text
        with pytest.raises(ConfigError):
            parse_link(changed, "quarry-uplink.yaml", ROOT / "configs")
        assert errors(yaml.safe_load(changed))


FIBRE = {"name": "lead", "kind": "fiber", "length": "3 m", "attenuation": "0.4 dB/km"}


@pytest.mark.parametrize(("entry", "accepted"), [
    (FIBRE, True),
    ({**FIBRE, "thickness": "3 mm"}, False),  # a medium's key on a fibre
    ({**FIBRE, "kind": "fibre"}, False),  # no such kind
    ({key: value for key, value in FIBRE.items() if key != "kind"}, False),
    ({key: value for key, value in FIBRE.items() if key != "length"}, False),  # a fibre's required key
    ({"kind": "element", "loss": {"min": "0.1 dB", "max": "0.3 dB"}}, True),
    ({"kind": "element", "loss": {"mean": "0.2 dB", "sigma": "0.05 dB"}}, True),
    ({"kind": "element", "loss": {"mean": "0.2 dB"}}, False),
    ({"kind": "element", "loss": {"typ": "0.2 dB", "mean": "0.2 dB", "sigma": "0.05 dB"}}, False),
    ({"kind": "element", "loss": {"min": "0.1 dB"}}, False),
    ({"kind": "element", "loss": {}}, False),
    ({"kind": "splitter", "ratio": "2/98"}, True),
    ({"kind": "splitter", "ratio": 0.02}, True),
    ({"kind": "splitter", "ratio": "2:98"}, False),
    ({"kind": "medium", "index": "1.447+3.0e-8j", "thickness": "3 mm"}, True),
    ({"kind": "medium", "index": 1.5, "thickness": "3 mm"}, True),
    ({"kind": "medium", "index": "1.5 + 2e-6 j", "thickness": "3 mm"}, True),
    ({"kind": "medium", "index": "n=1.5", "thickness": "3 mm"}, False),
    ({"kind": "splice", "count": 4, "loss": "0.1 dB"}, True),
    ({"kind": "splice", "count": 0, "loss": "0.1 dB"}, False),
    ({"kind": "splice", "count": "4", "loss": "0.1 dB"}, False),
    ({"kind": "fiber", "length": "3 m", "attenuation": "0.4 dB/km", "numerical_aperture": 1.5,
      "core_diameter": "8.2 um"}, False),
])
def test_chain_entry_judged_by_its_kind_as_the_loader_judges_it(entry, accepted):
    link = {**MINIMAL_LINK, "chain": [entry]}
    assert (not errors(link)) is accepted
    try:
        parse_link(yaml.safe_dump(link), "link.yaml")
        loaded = True
    except ConfigError:
        loaded = False
    assert loaded is accepted


def test_every_kind_of_the_registry_is_discriminated():
    items = link_schema()["properties"]["chain"]["items"]["else"]
    assert items["properties"]["kind"]["enum"] == list(KINDS)
    assert [rule["if"]["properties"]["kind"]["const"] for rule in items["allOf"]] == list(KINDS)


def described_keys(node, path=()):
    """(path, key, key schema) of every key of every mapping the schema describes."""
    if isinstance(node, dict):
        if path[-1:] != ("if",):
            for key, value in node.get("properties", {}).items():
                yield path, key, value
        for key, value in node.items():
            yield from described_keys(value, (*path, key))
    elif isinstance(node, list):
        for index, value in enumerate(node):
            yield from described_keys(value, (*path, index))


def test_every_key_has_a_title_and_a_description():
    keys = list(described_keys(link_schema()))
    assert len(keys) > 150
    missing = [(path, key) for path, key, value in keys if not (value.get("title") and value.get("description"))]
    assert missing == []


def test_every_strict_mapping_refuses_unknown_keys():
    """Each definition is a mapping, or (a spread) one value or a mapping: each mapping is closed."""
    for name, definition in link_schema()["$defs"].items():
        mapping = definition if "properties" in definition else definition["anyOf"][-1]
        assert mapping["type"] == "object" and mapping["additionalProperties"] is False, name


def loader_reads(text, dimension):
    try:
        parse_quantity(text, dimension)
        return True
    except UnitError:
        return False


def pattern_reads(text, dimension):
    return Draft202012Validator(quantity_schema(dimension)).is_valid(text)


#: Written forms of a quantity: the edge forms the units module reads, and near misses it refuses.
FORM_SAMPLES = [
    "1310 nm", "1310nm", "  1310 nm  ", "1310 nm\n", "\t1310\tnm", "1.5e3 nm", "1.5E-3 km", ".5 mm", "5. mm",
    "+3 dBm", "-3dBm", "-3 dB", "0 dB", "1 µm", "1 μm", "1 um", "0.5 °", "0.5deg", "2 mrad", "1e-3 W", "3 mW",
    "0.35 dB/km", "2 dB/cm", "0.5 /cm", "0.5 1/cm", "1e5m", "007 m",
    "1310", "nm", "", " ", "1310 nm nm", "1 310 nm", "1,5 mm", "1310 NM", "1310 nM", "1310 Nm", "1 e3 m", "1e m",
    "--1 m", "+-1 m", "1..5 m", "1.5.5 m", "m 1", "1 m m", "1 dB / km", "1 dB/ km", "0x10 m", "1_000 m", "inf m",
    "nan dB", "1\u00a0nm", "\u00a01 nm", "\u0661 nm", "1\u2009nm", "1 mm.", "1 m;", "(1 m)", "1 m # note",
    "1 kilometre", "1 \u00b5W", "1 μW", "1 dBmW", "1 dBm/km", "1 cm^-1",
]


@pytest.mark.parametrize("dimension", DIMENSIONS)
def test_quantity_pattern_reads_the_forms_the_loader_reads(dimension):
    for unit, (unit_dimension, _) in UNITS.items():
        text = f"2 {unit}"
        assert pattern_reads(text, dimension) is loader_reads(text, dimension) is (unit_dimension == dimension)
    disagree = [text for text in FORM_SAMPLES if pattern_reads(text, dimension) is not loader_reads(text, dimension)]
    assert disagree == []
    assert any(loader_reads(text, dimension) for text in FORM_SAMPLES)


#: Values whose form is right but whose size the loader refuses: the schema leaves them to it.
SIZE_SAMPLES = [("1e999 m", "length"), ("1e308 km", "length"), ("2000 dB", "ratio"), ("-1001 dBm", "power"),
                ("0 mW", "power"), ("-1 mW", "power")]


@pytest.mark.parametrize(("text", "dimension"), SIZE_SAMPLES)
def test_quantity_size_is_the_loaders_to_judge(text, dimension):
    assert pattern_reads(text, dimension) and not loader_reads(text, dimension)


def test_number_and_count_carry_their_valid_range():
    fibre = link_schema()["$defs"]["Fiber"]["properties"]
    aperture = fibre["numerical_aperture"]["anyOf"][0]
    assert aperture == {"type": "number", "exclusiveMinimum": 0.0, "maximum": 1.0}
    count = link_schema()["$defs"]["Splice"]["properties"]["count"]
    assert count["type"] == "integer" and count["minimum"] == 1 and count["default"] == 1


def test_cli_schema_prints_and_writes_the_schema(tmp_path):
    printed = run_cli("schema")
    assert printed.exit_code == 0
    assert json.loads(printed.stdout) == link_schema()
    target = tmp_path / "linkbudget.schema.json"
    assert run_cli("schema", "-o", target).exit_code == 0
    assert target.read_text(encoding="utf-8") == printed.stdout
    target.write_text("mine", encoding="utf-8")
    refused = run_cli("schema", "-o", target)
    assert refused.exit_code == 2 and "--force" in refused.stderr
    assert target.read_text(encoding="utf-8") == "mine"
    assert run_cli("schema", "-o", target, "--force").exit_code == 0
    assert target.read_text(encoding="utf-8") == printed.stdout


def schema_of(model, key):
    """The text form of a "number or text" key: its pattern's schema."""
    (text,) = [form for form in link_schema()["$defs"][model]["properties"][key]["anyOf"] if form["type"] == "string"]
    return text


def reads(function, value):
    try:
        function(value)
        return True
    except (ValueError, ValidationError):
        return False


#: Indices written as text: the forms of the README and near misses; sizes all valid.
INDEX_SAMPLES = ["1.5", " 1.5 ", "1.447+3.0e-8j", "1.447 + 3.0e-8 j", "(1.5+2j)", "( 1.5+2j )", "1.5+j", "1.5+2J",
                 "1.5e0+1.0e-3j", "1.5-0j", "1.5+2i", "1.5+2", "j", "n=1.5", "1.5 2j", "1.5+2jj", "(1.5+2j", "1.5++2j",
                 "", "1.5\t+2j", "1.5;"]
#: Forms Python's complex() takes that the pattern refuses (the schema is stricter there).
INDEX_FORMS_ONLY_THE_LOADER_READS = ["1.4_5", "1 . 5", "\u0661.\u0665"]
RATIO_SAMPLES = ["2/98", " 2 / 98 ", "1/3", "0.02", "1e-2", "2.5/97.5", "2:98", "2/98/1", "a/b", "2 98", "/98", "2/",
                 "2%", "\u0662/98"]


def test_index_pattern_reads_the_forms_the_loader_reads():
    pattern = Draft202012Validator(schema_of("Medium", "index"))
    loader = TypeAdapter(ComplexIndex).validate_python
    assert [text for text in INDEX_SAMPLES if pattern.is_valid(text) is not reads(loader, text)] == []
    assert all(reads(loader, text) and not pattern.is_valid(text) for text in INDEX_FORMS_ONLY_THE_LOADER_READS)


def test_split_ratio_pattern_reads_the_forms_the_loader_reads():
    pattern = Draft202012Validator(schema_of("Splitter", "ratio"))
    assert [text for text in RATIO_SAMPLES if pattern.is_valid(text) is not reads(split_ratio, text)] == []


def schema_patterns(node):
    if isinstance(node, dict):
        yield from [node["pattern"]] if isinstance(node.get("pattern"), str) else []
        for value in node.values():
            yield from schema_patterns(value)
    elif isinstance(node, list):
        for value in node:
            yield from schema_patterns(value)


_NODE_MATCHES = """const [patterns, samples] = JSON.parse(require("fs").readFileSync(0, "utf8"));
const matches = patterns.map(p => { const r = new RegExp(p, "u"); return samples.map(t => r.test(t)); });
console.log(JSON.stringify(matches));"""


@pytest.mark.skipif(shutil.which("node") is None, reason="needs Node.js for ECMA-262 regular expressions")
def test_patterns_match_alike_in_ecma262_and_python():
    """An editor's language server runs the patterns as JavaScript regular expressions (with the
    ``u`` flag), jsonschema as Python's: on every sample both must agree."""
    patterns = sorted(set(schema_patterns(link_schema())))
    assert len(patterns) >= len(DIMENSIONS) + 2  # a pattern per dimension, the index and the split ratio
    samples = FORM_SAMPLES + INDEX_SAMPLES + INDEX_FORMS_ONLY_THE_LOADER_READS + RATIO_SAMPLES
    done = subprocess.run(["node", "-e", _NODE_MATCHES], input=json.dumps([patterns, samples]), capture_output=True,
                          text=True, check=True, timeout=60)
    in_javascript = json.loads(done.stdout)
    in_python = [[re.search(pattern, text) is not None for text in samples] for pattern in patterns]
    assert in_javascript == in_python


def test_readme_editor_support_names_one_schema_file():
    """The README's command writes the file its modeline and its editor settings point at."""
    (written,) = set(re.findall(r"linkbudget schema -o (\S+)", README))
    assert f"# yaml-language-server: $schema=./{written}\n" in README
    (settings,) = [json.loads(block) for block in re.findall(r"```json\n(.*?)```", README, re.S)
                   if "yaml.schemas" in block]
    assert list(settings["yaml.schemas"]) == [f"./{written}"]
    assert "configs/*.yaml" in settings["yaml.schemas"][f"./{written}"]


#: Structure-aware mutants (tests/cli/mutants.py) made of each example the fuzz test starts from.
MUTANTS_PER_EXAMPLE = 30
#: How the loader's messages begin for what the schema refuses too: a key, a kind, a unit or a type.
REFUSED_BY_BOTH = ("unknown key", "unknown segment kind", "missing required key", "missing unit", "unknown unit",
                   "expected ", "cannot read ")


def json_data(text):
    """The document as PyYAML's safe_load reads it, or ``None`` when it is not JSON data (not YAML,
    a date, binary, a recursive alias): a JSON Schema does not judge those."""
    try:
        document = yaml.safe_load(text)
        json.dumps(document)
    except Exception:  # noqa: BLE001 - whatever safe_load or json refuses: not a document to validate
        return None
    return document


def test_schema_and_loader_agree_on_mutants_of_the_examples():
    """A mutant the loader reads validates; one it refuses for a key, a kind, a unit or a type does
    not. (The schema may pass what the loader refuses for a value's size or a rule between keys.)"""
    seen = {"both read": 0, "both refuse": 0}
    for path, example in fuzz_examples().items():
        for number in range(MUTANTS_PER_EXAMPLE):
            text = structure_mutant(example, random.Random(f"schema:{path.stem}:{number}"))
            document = json_data(text)
            if document is None:
                continue
            try:
                parse_link(text, path.name, path.parent)
                refused = []
            except ConfigError as error:
                refused = [problem.message for problem in error.problems]
            passes = not errors(document)
            where = f"{path.stem} mutant {number}"
            if not refused:
                assert passes, f"{where}: the loader reads it, the schema refuses it: {errors(document)[0].message}"
                seen["both read"] += 1
            elif any(message.startswith(REFUSED_BY_BOTH) for message in refused):
                assert not passes, f"{where}: the loader refuses it ({refused[0]}), the schema passes it"
                seen["both refuse"] += 1
    assert seen["both read"] >= 20 and seen["both refuse"] >= 50, seen


# ---- part files (linkbudget schema --parts) ----

SHARED_PARTS = ROOT / "examples" / "shared-parts"


def part_file_examples():
    """Every part file the project shows: the shipped example's and the README's."""
    return ([(path.name, yaml.safe_load(path.read_text(encoding="utf-8"))) for path in
             sorted(SHARED_PARTS.rglob("*.parts.yaml"))]
            + [(f"README.md:{line}", document) for line, document in readme_yaml_blocks() if is_part_file(document)])


def test_part_file_schema_is_valid_and_every_shown_part_file_validates():
    Draft202012Validator.check_schema(part_file_schema())
    validator = Draft202012Validator(part_file_schema())
    examples = part_file_examples()
    assert len(examples) >= 4
    for where, document in examples:
        assert [error.message for error in validator.iter_errors(document)] == [], where


def test_links_using_parts_validate_and_a_part_use_needs_no_kind():
    links = sorted((SHARED_PARTS / "links").glob("*.yaml"))
    assert links
    for path in links:
        assert errors(yaml.safe_load(path.read_text(encoding="utf-8"))) == [], path.name
    use = {**MINIMAL_LINK, "chain": [{"part": "lc-upc-mated-pair", "name": "hut patch panel"}]}
    assert errors(use) == []
    assert errors({**MINIMAL_LINK, "chain": [{"name": "no kind, no part"}]}) != []


def test_part_file_schema_refuses_unknown_keys_and_bare_numbers_but_not_a_missing_length():
    validator = Draft202012Validator(part_file_schema())
    assert not list(validator.iter_errors({"parts": {"trunk": {"kind": "fiber", "attenuation": "0.3 dB/km"}}}))
    for bad in ({"parts": {"trunk": {"kind": "fiber", "attenuation": 0.3}}},
                {"parts": {"trunk": {"kind": "fiber", "lenght": "2 km"}}},
                {"parts": {"trunk": {"kind": "fiber"}}, "chain": []},
                {"parts": {"trunk": {"kind": "no-such-kind"}}}):
        assert list(validator.iter_errors(bad)), bad


def test_schema_command_prints_the_part_file_schema():
    result = run_cli("schema", "--parts")
    assert result.exit_code == 0
    assert json.loads(result.stdout)["title"] == "linkbudget part file"
