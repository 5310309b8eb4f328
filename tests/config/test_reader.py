"""Loading through a reader: links and their material files from memory, each file read once, and
material-file errors placed at line and column (linkbudget/reader.py)."""

import numpy as np
import pytest
from numpy.testing import assert_allclose

import linkbudget
from linkbudget.config import ConfigError, load_link
from linkbudget.materials import MaterialFileError, load_material
from linkbudget.paths import PathRefused
from linkbudget.reader import MemoryReader, Source
from tests.conftest import TEST_GLASS

#: One window of the invented test glass (Cauchy n = 1.5 + 0.004/λ², λ in µm, κ = 0), 1 mm thick,
#: between two vacuum gaps, at 1 µm: n = 1.504.
LINK = """\
title: reader link
wavelength: 1000 nm
source: {power: 0 dBm}
receiver: {sensitivity: -30 dBm}
chain:
  - {name: vacuum, kind: gap, length: 1 mm, index: 1.0}
  - {name: window, kind: medium, thickness: 1 mm, material: ../materials/glass.yaml}
"""


class CountingReader(MemoryReader):
    """A memory reader that counts how often each path is asked for."""

    def __init__(self, texts):
        super().__init__(texts)
        object.__setattr__(self, "calls", [])

    def read(self, path, folder=None):
        self.calls.append((str(path), str(folder)))
        return super().read(path, folder)


def test_memory_reader_loads_link_and_material_without_disk(monkeypatch):
    def no_disk(*args, **kwargs):
        raise AssertionError("a file of the machine was opened")

    monkeypatch.setattr("builtins.open", no_disk)
    monkeypatch.setattr("os.open", no_disk)
    reader = MemoryReader({"configs/link.yaml": LINK, "materials/glass.yaml": TEST_GLASS})
    link = load_link("configs/link.yaml", reader=reader)
    assert link.file == "configs/link.yaml"
    assert link.referenced_files == ()  # nothing on disk was read
    # n at 1 µm from the Cauchy form written in TEST_GLASS: 1.5 + 0.004/1² = 1.504.
    assert_allclose(link.segments[1].medium_index(), [1.504 + 0j], rtol=1e-15)


def test_a_material_used_by_two_segments_is_read_once():
    link = LINK + "  - {name: second window, kind: medium, thickness: 1 mm, material: ../materials/glass.yaml}\n"
    reader = CountingReader({"configs/link.yaml": link, "materials/glass.yaml": TEST_GLASS})
    load_link("configs/link.yaml", reader=reader)
    assert reader.calls == [("configs/link.yaml", "None"), ("../materials/glass.yaml", "configs")]


def test_memory_reader_refuses_a_path_leaving_its_top_folder():
    reader = MemoryReader({"link.yaml": LINK.replace("../materials/glass.yaml", "../../glass.yaml")})
    with pytest.raises(ConfigError, match=r"link\.yaml:7:\d+: chain\[1\]\.material: path '\.\./\.\./glass\.yaml' "
                                          r"is outside the project"):
        load_link("link.yaml", reader=reader)
    with pytest.raises(PathRefused, match="No such file"):
        reader.read("absent.yaml")


def test_memory_reader_joins_a_windows_path_to_the_links_folder():
    assert MemoryReader({"a/b.yaml": "x"}).read("..\\a\\b.yaml", "c") == Source("a/b.yaml", "x")


#: A material file whose key on line 7, column 3 is misspelt (``coeficients``).
BAD_GLASS = TEST_GLASS.replace("  coefficients:", "  coeficients:")


def test_material_file_error_is_placed_at_line_and_column(tmp_path):
    assert BAD_GLASS.splitlines()[6].startswith("  coeficients:")  # line 7, key at column 3
    (tmp_path / "bad.yaml").write_text(BAD_GLASS, encoding="utf-8")
    with pytest.raises(MaterialFileError) as caught:
        load_material("bad.yaml", base_dir=tmp_path)
    assert str(caught.value) == ("bad.yaml:7:3: cauchy.coeficients: unknown key 'coeficients' "
                                 "(did you mean 'coefficients'?)")


def test_material_file_value_error_is_placed_at_the_value():
    # line 7: "  coefficients: [1.5, " is 22 characters, so true is at column 23
    text = TEST_GLASS.replace("[1.5, 0.004]", "[1.5, true]")
    with pytest.raises(MaterialFileError, match=r"^m\.yaml:7:23: cauchy\.coefficients\[1\]: expected a finite"):
        load_material("m.yaml", files=_files({"m.yaml": text}))


def _files(texts):
    from linkbudget.reader import LinkFiles

    return LinkFiles(MemoryReader(texts), "")


def test_link_error_names_the_material_key_and_the_material_place_in_two_lines():
    reader = MemoryReader({"configs/link.yaml": LINK, "materials/glass.yaml": BAD_GLASS})
    with pytest.raises(ConfigError) as caught:
        load_link("configs/link.yaml", reader=reader)
    # the material: value on line 7 of LINK, counted in the text itself
    column = LINK.splitlines()[6].index("../materials") + 1
    assert str(caught.value).splitlines() == [
        f"configs/link.yaml:7:{column}: chain[1].material: the file named here has an error:",
        "  materials/glass.yaml:7:3: cauchy.coeficients: unknown key 'coeficients' (did you mean 'coefficients'?)",
    ]


def test_cli_shows_both_places_of_a_malformed_material_file(tmp_path, cli):
    (tmp_path / ".git").mkdir()
    (tmp_path / "configs").mkdir()
    (tmp_path / "materials").mkdir()
    (tmp_path / "materials" / "glass.yaml").write_text(BAD_GLASS, encoding="utf-8")
    link = tmp_path / "configs" / "link.yaml"
    link.write_text(LINK, encoding="utf-8")
    result = cli("run", link)
    assert result.exit_code == 2
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 2 and "Traceback" not in result.output
    assert lines[0].startswith(f"{link}:7:") and "chain[1].material" in lines[0]
    assert lines[1].startswith(f"  {tmp_path / 'configs'}/../materials/glass.yaml:7:3: cauchy.coeficients:")


def test_working_tree_and_memory_give_the_same_link(tmp_path):
    (tmp_path / ".git").mkdir()
    (tmp_path / "configs").mkdir()
    (tmp_path / "materials").mkdir()
    (tmp_path / "materials" / "glass.yaml").write_text(TEST_GLASS, encoding="utf-8")
    (tmp_path / "configs" / "link.yaml").write_text(LINK, encoding="utf-8")
    on_disk = linkbudget.evaluate(linkbudget.load(tmp_path / "configs" / "link.yaml"))
    in_memory = linkbudget.evaluate(load_link(
        "configs/link.yaml", reader=MemoryReader({"configs/link.yaml": LINK, "materials/glass.yaml": TEST_GLASS})))
    assert np.array_equal(on_disk.margin_db["worst"], in_memory.margin_db["worst"])
