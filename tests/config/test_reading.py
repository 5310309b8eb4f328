"""Reading link and material files: YAML rules and the bounds checked while reading."""

import os

import pytest

import linkbudget
from linkbudget.config.source import ConfigError, Mark, load_yaml
from linkbudget.materials.library import load_material
from linkbudget.paths import PathRefused
from linkbudget.yamlread import MAX_FILE_BYTES, MAX_NODES, ReadError, compose, read_text
from tests.conftest import MINIMAL_LINK

MERGED_PANELS = MINIMAL_LINK.replace("  - name: panel\n", "  - &panel\n    name: panel\n") + (
    "  - <<: *panel\n    name: panel 2\n    loss: 0.25 dB\n")


def test_load_merge_key_explicit_keys_override_merged_ones():
    link = linkbudget.load(MERGED_PANELS)
    second = link.segments[2]
    assert (second.name, second.kind) == ("panel 2", "connector")
    assert second.loss.typ_value == 0.25


def test_load_yaml_merge_earlier_mapping_wins_over_later():
    data, _ = load_yaml("a: &a {x: 1, y: 1}\nb: &b {x: 2, z: 2}\nc:\n  <<: [*a, *b]\n  y: 3\n")
    assert data["c"] == {"x": 1, "y": 3, "z": 2}


def test_load_yaml_standard_tags_are_honoured():
    data, _ = load_yaml("a: !!str 12\nb: !!int 3\nc: !!float 3\nd: !!bool true\ne: !!null ''\n")
    assert data == {"a": "12", "b": 3, "c": 3.0, "d": True, "e": None}


def test_load_yaml_core_schema_keeps_yaml_1_1_forms_as_text():
    text = "a: 1:30\nb: 0x10\nc: 017\nd: 1_000\ne: yes\nf: off\ng: 2024-05-01\nh: 1e-5\ni: -.inf\n"
    data, _ = load_yaml(text)
    assert data == {"a": "1:30", "b": "0x10", "c": "017", "d": "1_000", "e": "yes", "f": "off",
                    "g": "2024-05-01", "h": 1e-5, "i": float("-inf")}


def test_load_title_that_looks_like_a_date_is_text():
    link = linkbudget.load(MINIMAL_LINK.replace("title: Minimal test link", "title: 2024-05-01"))
    assert link.spec.title == "2024-05-01"


def test_compose_node_bound_stops_at_the_node_that_crosses_it():
    """The bound fires while reading: the error names a line near the limit, not the file's end."""
    text = "".join(f"- {number}\n" for number in range(3 * MAX_NODES))
    with pytest.raises(ReadError, match=f"more than {MAX_NODES} nodes") as caught:
        compose(text)
    assert caught.value.line == MAX_NODES  # the root list is the first node


def test_read_text_reads_at_most_the_cap(tmp_path):
    path = tmp_path / "big.yaml"
    path.write_bytes(b"#" * (MAX_FILE_BYTES + 1))
    with pytest.raises(ReadError, match=f"larger than {MAX_FILE_BYTES} bytes"):
        read_text(path)
    path.write_bytes(b"#" * MAX_FILE_BYTES)
    assert len(read_text(path)) == MAX_FILE_BYTES


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="needs /dev/zero")
def test_run_endless_file_exits_2(cli):
    result = cli("run", "/dev/zero")
    assert result.exit_code == 2
    assert result.stderr.startswith(f"/dev/zero: (top level): file is larger than {MAX_FILE_BYTES} bytes")


@pytest.mark.skipif(not os.path.exists("/dev/zero"), reason="needs /dev/zero")
def test_load_material_endless_file_is_refused_unread():
    with pytest.raises(PathRefused, match="not a regular file"):
        load_material("/dev/zero")


def test_load_material_oversized_file_is_refused(tmp_path):
    path = tmp_path / "huge.yaml"
    with open(path, "wb") as stream:  # sparse: its size without writing its bytes
        stream.truncate(MAX_FILE_BYTES + 1)
    with pytest.raises(ConfigError, match="larger than"):
        load_material(path)


def test_load_material_alias_bomb_is_refused_while_reading(tmp_path):
    bomb = "a: &a [1, 1, 1, 1, 1, 1, 1, 1, 1]\n" + "".join(
        f"{name}: &{name} [{', '.join([f'*{previous}'] * 9)}]\n"
        for previous, name in zip("abcdefgh", "bcdefghi", strict=True))
    path = tmp_path / "bomb.yaml"
    path.write_text(bomb, encoding="utf-8")
    with pytest.raises(ConfigError, match=f"more than {MAX_NODES} nodes"):
        load_material(path)


def test_load_material_recursive_alias_is_refused(tmp_path):
    path = tmp_path / "loop.yaml"
    path.write_text("name: loop\nrows: &r [*r]\n", encoding="utf-8")
    with pytest.raises(ConfigError, match="alias"):
        load_material(path)


# --- lists of scalars (table rows) are read in one pass, each item still placed -----------------

def test_load_yaml_places_every_item_of_a_list_of_scalars():
    text = "rows:\n  - [1.5, 2, x]\n  - [7, 'q', null, true]\n"
    data, positions = load_yaml(text)
    assert data == {"rows": [[1.5, 2, "x"], [7, "q", None, True]]}
    # rows[1][1] is the quoted 'q' on line 3, column 9 (counted by hand in the text above)
    assert positions.mark(("rows", 1, 1)) == Mark(3, 9)
    assert positions.mark(("rows", 0, 2)) == Mark(2, 14)
    assert positions.mark(("rows", 0)) == Mark(2, 5)
    assert positions.mark(("rows", 0, 7)) == Mark(2, 5)  # no such item: the row itself


def test_load_yaml_list_with_a_tagged_or_anchored_item_keeps_each_rule():
    with pytest.raises(ConfigError, match=r"<string>:1:8: a\[1\]: '2.5' cannot be read as !!int"):
        load_yaml("a: [1, !!int 2.5]\n")
    with pytest.raises(ConfigError, match=r"<string>:1:5: a\[0\]: unsupported YAML tag"):
        load_yaml("a: [<<, 1]\n")
    assert load_yaml("a: [1, &x 2, *x]\n")[0] == {"a": [1, 2, 2]}


def test_material_table_error_is_placed_at_the_item(tmp_path):
    path = tmp_path / "glass.yaml"
    path.write_text("name: test-glass\ndescription: d\nsource: s\ntable:\n  wavelength_unit: um\n"
                    "  columns: [wavelength, n]\n  rows:\n    - [1.0, 1.5]\n    - [1.2, abc]\n", encoding="utf-8")
    with pytest.raises(ConfigError) as caught:
        load_material(str(path))
    # "abc" is on line 9 at column 13 of the file written above
    assert f"{path}:9:13: table.rows[1][1]" in str(caught.value)
