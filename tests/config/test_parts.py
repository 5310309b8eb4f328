"""Parts libraries (linkbudget/config/parts.py): part files found along the search path through the
link's reader, uses with overrides, and every problem placed in the part file below the link line.

Every expected budget is a closed form computed here: datasheet losses in dB add along the chain
(a fibre's is attenuation × length), so a change of one part's loss moves each total by that change.
"""

import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.config import ConfigError, load_link
from linkbudget.config.parts import changed_part_uses
from linkbudget.reader import MemoryReader
from tests.conftest import TEST_GLASS

#: An invented stock of parts, with a fibre type whose length each use gives.
CONNECTORS = """\
description: Connectors of the test stock
parts:
  lc-pair:
    kind: connector
    loss: {{typ: {typ} dB, max: {max} dB}}
    return_loss: 50 dB
  lc-pair-worn:
    part: lc-pair
    loss: {{typ: 0.6 dB, max: 1.2 dB}}
"""
FIBRES = """\
parts:
  trunk-fibre:
    kind: fiber
    attenuation: {typ: 0.35 dB/km, max: 0.4 dB/km}
"""


def link_text(title, length_km, extra=""):
    """A link using the trunk fibre (``length_km``) and the connector pair twice."""
    return f"""\
title: {title}
wavelength: 1310 nm
source: {{power: 0 dBm}}
receiver: {{sensitivity: -30 dBm}}
part_folders: [../parts]
chain:
  - part: trunk-fibre
    length: {length_km} km
  - part: lc-pair
    name: panel A
  - part: lc-pair
    name: panel B
{extra}"""


def library(typ=0.25, max_=0.5, **more):
    """The files of a small repository: two links sharing the parts folder."""
    return {"parts/connectors.parts.yaml": CONNECTORS.format(typ=typ, max=max_),
            "parts/fibres.parts.yaml": FIBRES,
            "links/north.yaml": link_text("north", 2),
            "links/south.yaml": link_text("south", 5), **more}


def total_loss_db(texts, path):
    result = linkbudget.evaluate(load_link(path, reader=MemoryReader(texts)))
    return {case: float(result.cumulative_loss_db[case][-1, 0]) for case in ("typ", "worst")}


def problem_lines(texts, path):
    with pytest.raises(ConfigError) as caught:
        load_link(path, reader=MemoryReader(texts))
    return str(caught.value).splitlines()


def test_a_part_used_by_two_links_gives_the_closed_form_budget():
    for path, length_km in (("links/north.yaml", 2), ("links/south.yaml", 5)):
        # fibre α·L plus two connector pairs (typ 0.25 dB, max 0.5 dB each)
        expected = {"typ": 0.35 * length_km + 2 * 0.25, "worst": 0.4 * length_km + 2 * 0.5}
        assert_allclose(list(total_loss_db(library(), path).values()), list(expected.values()), rtol=1e-12)


def test_changing_a_part_loss_moves_both_links_by_exactly_that_amount():
    before = {path: total_loss_db(library(), path) for path in ("links/north.yaml", "links/south.yaml")}
    after = {path: total_loss_db(library(typ=0.4, max_=0.75), path) for path in before}
    for path in before:
        # each link uses the pair twice: typ moves by 2 × 0.15 dB, worst by 2 × 0.25 dB
        assert_allclose(after[path]["typ"] - before[path]["typ"], 2 * 0.15, atol=1e-12)
        assert_allclose(after[path]["worst"] - before[path]["worst"], 2 * 0.25, atol=1e-12)


def test_an_override_changes_only_its_use():
    texts = library()
    texts["links/north.yaml"] = texts["links/north.yaml"].replace(
        "    name: panel B\n", "    name: panel B\n    loss: {typ: 1 dB, max: 2 dB}\n")
    link = load_link("links/north.yaml", reader=MemoryReader(texts))
    result = linkbudget.evaluate(link)
    by_name = {row.name: index for index, row in enumerate(result.rows)}
    assert_allclose(result.loss_db["typ"][by_name["panel A"], 0], 0.25, rtol=1e-12)
    assert_allclose(result.loss_db["typ"][by_name["panel B"], 0], 1.0, rtol=1e-12)
    assert_allclose(result.loss_db["worst"][by_name["panel B"], 0], 2.0, rtol=1e-12)
    # the other link, sharing the part, is untouched: 0.35·5 + 2·0.25 dB
    assert_allclose(total_loss_db(texts, "links/south.yaml")["typ"], 0.35 * 5 + 0.5, rtol=1e-12)


def test_a_part_built_on_a_part_overrides_its_keys_and_keeps_the_others():
    texts = library()
    texts["links/north.yaml"] = link_text("north", 2, "  - part: lc-pair-worn\n")
    result = linkbudget.evaluate(load_link("links/north.yaml", reader=MemoryReader(texts)))
    row = result.rows[-1]
    assert row.name == "lc-pair-worn"
    assert_allclose(result.loss_db["typ"][-1, 0], 0.6, rtol=1e-12)
    assert_allclose(row.return_loss_db, [50.0], rtol=1e-9)  # kept from lc-pair
    assert (row.part.name, row.part.file) == ("lc-pair-worn", "parts/connectors.parts.yaml")


def test_rows_from_parts_name_their_part_and_file_in_json():
    result = linkbudget.evaluate(load_link("links/north.yaml", reader=MemoryReader(library())))
    rows = linkbudget.result_dict(result)["rows"]
    assert [row.get("part") for row in rows] == [
        {"name": "trunk-fibre", "file": "parts/fibres.parts.yaml"},
        {"name": "lc-pair", "file": "parts/connectors.parts.yaml"},
        {"name": "lc-pair", "file": "parts/connectors.parts.yaml"}]


def test_a_row_not_from_a_part_has_no_part_field():
    texts = library()
    texts["links/north.yaml"] += "  - {name: allowance, kind: element, loss: 1 dB}\n"
    result = linkbudget.evaluate(load_link("links/north.yaml", reader=MemoryReader(texts)))
    rows = linkbudget.result_dict(result)["rows"]
    assert "part" not in rows[-1]


def test_the_links_folder_comes_first_in_the_search_path():
    local = "parts:\n  lc-pair: {kind: connector, loss: 0.1 dB}\n"
    texts = library(**{"links/local.parts.yaml": local})
    link = load_link("links/north.yaml", reader=MemoryReader(texts))
    assert link.segments[1].part_origin.file == "links/local.parts.yaml"
    assert_allclose(total_loss_db(texts, "links/north.yaml")["typ"], 0.35 * 2 + 2 * 0.1, rtol=1e-12)


def test_the_settings_file_lists_part_folders_for_every_link_below_it():
    texts = library()
    for path in ("links/north.yaml", "links/south.yaml"):
        texts[path] = texts[path].replace("part_folders: [../parts]\n", "")
    texts["links/deep/east.yaml"] = link_text("east", 1).replace("part_folders: [../parts]\n", "")
    texts["linkbudget.toml"] = '[parts]\nfolders = ["parts"]\n'
    assert_allclose(total_loss_db(texts, "links/deep/east.yaml")["typ"], 0.35 + 0.5, rtol=1e-12)
    assert_allclose(total_loss_db(texts, "links/north.yaml")["typ"], 0.7 + 0.5, rtol=1e-12)


def test_a_problem_inside_a_part_file_is_placed_there_below_the_link_line():
    texts = library()
    texts["parts/fibres.parts.yaml"] = FIBRES.replace("attenuation:", "atenuation:")
    lines = problem_lines(texts, "links/north.yaml")
    assert lines == [
        "links/north.yaml:7:11: chain[0].part: part 'trunk-fibre' (parts/fibres.parts.yaml) has an error:",
        "  parts/fibres.parts.yaml:4:5: parts.trunk-fibre.atenuation: unknown key 'atenuation' "
        "(hint: did you mean 'attenuation'?)"]


def test_a_bad_value_in_a_part_is_placed_at_its_line_and_column():
    texts = library()
    texts["parts/connectors.parts.yaml"] = CONNECTORS.format(typ="0.25", max="-0.5")
    lines = problem_lines(texts, "links/south.yaml")
    assert lines[0] == ("links/south.yaml:9:11: chain[1].part: part 'lc-pair' (parts/connectors.parts.yaml) "
                        "has an error:")
    assert lines[1].startswith("  parts/connectors.parts.yaml:5:31: parts.lc-pair.loss.max: ")


def test_an_override_of_a_key_the_kind_does_not_have_is_placed_at_the_referring_line():
    texts = library()
    texts["links/north.yaml"] = texts["links/north.yaml"].replace("    name: panel A\n",
                                                                  "    name: panel A\n    length: 3 m\n")
    lines = problem_lines(texts, "links/north.yaml")
    assert lines[0] == "links/north.yaml:11:5: chain[1].length: unknown key 'length'"
    assert "allowed keys: name, loss" in lines[1]


def test_a_use_cannot_change_the_kind_of_its_part():
    texts = library()
    texts["links/north.yaml"] = texts["links/north.yaml"].replace("    name: panel A\n",
                                                                  "    name: panel A\n    kind: splice\n")
    assert problem_lines(texts, "links/north.yaml")[0] == (
        "links/north.yaml:11:11: chain[1].kind: part 'lc-pair' (parts/connectors.parts.yaml) is a connector; "
        "a use cannot change its kind")


def test_a_key_left_to_the_uses_and_not_given_is_placed_at_the_use():
    texts = library()
    texts["links/north.yaml"] = texts["links/north.yaml"].replace("    length: 2 km\n", "")
    assert problem_lines(texts, "links/north.yaml") == ["links/north.yaml:7:5: chain[0]: missing required key 'length'"]


def test_a_cycle_of_parts_is_placed_at_each_part_line():
    cycle = "parts:\n  ring-a: {part: ring-b}\n  ring-b:\n    part: ring-a\n"
    texts = library(**{"parts/ring.parts.yaml": cycle})
    texts["links/north.yaml"] = link_text("north", 2, "  - part: ring-a\n")
    assert problem_lines(texts, "links/north.yaml") == [
        "links/north.yaml:13:11: chain[3].part: part 'ring-a' (parts/ring.parts.yaml) has an error:",
        "  parts/ring.parts.yaml:2:18: parts.ring-a.part: part 'ring-b' (parts/ring.parts.yaml) has an error:",
        "  parts/ring.parts.yaml:4:11: parts.ring-b.part: parts build on each other in a cycle: "
        "ring-a -> ring-b -> ring-a (hint: a part may build on another part, never on itself)"]


def test_a_part_built_on_itself_is_a_cycle():
    texts = library(**{"parts/self.parts.yaml": "parts:\n  selfish: {part: selfish}\n"})
    texts["links/north.yaml"] = link_text("north", 2, "  - part: selfish\n")
    assert "cycle: selfish -> selfish" in problem_lines(texts, "links/north.yaml")[-1]


def test_a_missing_part_names_the_search_path_and_a_close_name():
    texts = library()
    texts["links/north.yaml"] = link_text("north", 2, "  - part: lc-pairs\n")
    assert problem_lines(texts, "links/north.yaml") == [
        "links/north.yaml:13:11: chain[3].part: no part 'lc-pairs' in the search path: links/, parts/",
        "  hint: did you mean 'lc-pair'?"]


def test_a_part_folder_that_leaves_the_project_is_refused():
    texts = library()
    texts["links/north.yaml"] = texts["links/north.yaml"].replace("[../parts]", "[../parts, ../../elsewhere]")
    lines = problem_lines(texts, "links/north.yaml")
    assert lines[0] == ("links/north.yaml:5:26: part_folders[1]: part folder '../../elsewhere': "
                        "path '../../elsewhere' is outside the project")


def test_a_part_defined_twice_in_one_folder_is_an_error():
    texts = library(**{"parts/more.parts.yaml": "parts:\n  lc-pair: {kind: connector, loss: 0.2 dB}\n"})
    assert problem_lines(texts, "links/north.yaml")[0] == (
        "links/north.yaml:9:11: chain[1].part: part 'lc-pair' is defined in 2 files of one folder: "
        "parts/connectors.parts.yaml, parts/more.parts.yaml")


def test_a_part_file_is_a_mapping_with_parts():
    texts = library(**{"parts/broken.parts.yaml": "parts: [lc-pair]\n"})
    lines = problem_lines(texts, "links/north.yaml")
    assert lines[:2] == ["links/north.yaml:7:11: chain[0].part: a part file of the search path has an error:",
                         "  parts/broken.parts.yaml:1:8: parts: expected a mapping of part names to parts"]


def test_a_material_file_of_a_part_is_read_next_to_the_part_file():
    window = "parts:\n  glass-window: {kind: medium, thickness: 1 mm, material: glass.yaml}\n"
    texts = {"parts/windows.parts.yaml": window, "parts/glass.yaml": TEST_GLASS,
             "links/probe.yaml": "title: probe\nwavelength: 1000 nm\nsource: {power: 0 dBm}\n"
                                 "receiver: {sensitivity: -30 dBm}\npart_folders: [../parts]\n"
                                 "chain:\n  - {name: vacuum, kind: gap, length: 1 mm, index: 1.0}\n"
                                 "  - part: glass-window\n"}
    link = load_link("links/probe.yaml", reader=MemoryReader(texts))
    # n at 1 µm from the Cauchy form of TEST_GLASS: 1.5 + 0.004/1² = 1.504
    assert_allclose(link.segments[1].medium_index(), [1.504 + 0j], rtol=1e-15)


def test_changed_part_uses_names_the_uses_a_changed_file_moves():
    link = load_link("links/north.yaml", reader=MemoryReader(library()))
    moved = changed_part_uses(link, {"parts/connectors.parts.yaml"})
    assert [(use.segment, use.parts[0].name) for use in moved] == [("panel A", "lc-pair"), ("panel B", "lc-pair")]
    assert changed_part_uses(link, {"parts/other.parts.yaml", "links/south.yaml"}) == ()


def test_changed_part_uses_follows_the_parts_a_part_builds_on():
    texts = library(**{"parts/worn.parts.yaml": "parts:\n  worn: {part: lc-pair, loss: 0.9 dB}\n"})
    texts["links/north.yaml"] = link_text("north", 2, "  - part: worn\n")
    link = load_link("links/north.yaml", reader=MemoryReader(texts))
    assert [use.segment for use in changed_part_uses(link, ["parts/worn.parts.yaml"])] == ["worn"]
    assert [use.segment for use in changed_part_uses(link, ["parts/connectors.parts.yaml"])] == [
        "panel A", "panel B", "worn"]


@pytest.mark.parametrize(("settings", "expected"), [
    ('[parts]\nfolders = "parts"\n', "linkbudget.toml: parts.folders: expected a list of folder names"),
    ('[parts]\nfolder = ["parts"]\n', "linkbudget.toml: parts.folder: unknown key 'folder'"),
    ('[colours]\nrow = "red"\n', "linkbudget.toml: colours: unknown settings section 'colours'"),
    ("[parts\n", "linkbudget.toml: (top level): not valid TOML: "),
])
def test_a_bad_settings_file_is_named_with_its_key(settings, expected):
    texts = library(**{"linkbudget.toml": settings})
    assert any(line.startswith(expected) for line in problem_lines(texts, "links/north.yaml"))


def test_a_reader_that_cannot_list_folders_gives_a_placed_problem():
    class ReadOnly:
        def __init__(self, texts):
            self.memory = MemoryReader(texts)

        def read(self, path, folder=None):
            return self.memory.read(path, folder)

    with pytest.raises(ConfigError) as caught:
        load_link("links/north.yaml", reader=ReadOnly(library()))
    assert "links: (top level): part folder '.': this reader cannot list a folder's files" in str(caught.value)


@pytest.mark.parametrize("written", ["null", "[lc-pair]", "'lc pair'"])
def test_a_part_key_that_names_no_plain_part_is_placed_at_it(written):
    texts = library()
    texts["links/north.yaml"] = link_text("north", 2, f"  - part: {written}\n")
    assert problem_lines(texts, "links/north.yaml")[0] == "links/north.yaml:13:11: chain[3].part: not a plain part name"
