"""The shared-parts example and the commands around parts libraries: ``check`` on a folder, ``uses``,
and part folders confined to the repository (working tree, CLI).

Expected budgets are closed forms computed here (datasheet losses in dB add; a fibre loses
attenuation × length), never the package's own numbers.
"""

import json
import shutil
from pathlib import Path

import pytest

from tests.conftest import run_cli
from tests.test_readme_examples import README, collapsed

EXAMPLE = Path(__file__).resolve().parents[2] / "examples" / "shared-parts"
RESERVOIR = "links/reservoir-telemetry.yaml"
BACKHAUL = "links/pumping-station-backhaul.yaml"


@pytest.fixture
def repo(tmp_path, monkeypatch):
    """A copy of the example as a repository of its own (a ``.git`` folder), as the current folder."""
    copy = tmp_path / "shared-parts"
    shutil.copytree(EXAMPLE, copy)
    (copy / ".git").mkdir()
    monkeypatch.chdir(tmp_path)
    return copy


def readme_block_after(words):
    """The lines of the README's first code block after the sentence holding ``words``."""
    start = README.index(words)
    block = README[README.index("```\n", start) + 4:]
    return block[:block.index("```")].strip().splitlines()


def worst_margin_db(path):
    result = run_cli("run", path, "--format", "json")
    return min(json.loads(result.stdout)["margin_db"]["worst"])


def test_reservoir_link_budget_is_the_sum_of_its_parts(repo):
    # patch cord 3 m × 0.4 dB/km, two LC pairs (max 0.5 dB), 6.4 km × 0.4 dB/km, 3 splices × 0.3 dB,
    # 1 dB allowance; launch min −5 dBm, sensitivity −24 dBm
    worst_loss_db = 0.003 * 0.4 + 2 * 0.5 + 6.4 * 0.4 + 3 * 0.3 + 1.0
    assert worst_margin_db(repo / RESERVOIR) == pytest.approx(-5 - worst_loss_db + 24, abs=1e-9)


def test_backhaul_override_of_the_trunk_attenuation_applies_to_its_use_only(repo):
    # worn LC pair (max 1.0 dB), 14.2 km × 0.25 dB/km (this use's override), 6 splices × 0.3 dB, SC pair 0.6 dB
    worst_loss_db = 0.003 * 0.4 + 1.0 + 14.2 * 0.25 + 6 * 0.3 + 0.6
    assert worst_margin_db(repo / BACKHAUL) == pytest.approx(-8 - worst_loss_db + 28, abs=1e-9)


def test_check_the_example_folder_prints_what_the_readme_shows():
    result = run_cli("check", "examples/shared-parts")
    assert result.exit_code == 0, result.output
    assert result.stdout.strip().splitlines() == readme_block_after("**Check the folder.**")


def test_uses_prints_what_the_readme_shows():
    lines = readme_block_after("**Where used.**")
    result = run_cli(*lines[0].removeprefix("$ linkbudget ").split())
    assert result.exit_code == 0, result.output
    assert result.stdout.strip().splitlines() == lines[1:]


def test_one_datasheet_change_moves_every_link_using_the_part(repo):
    before = {path: worst_margin_db(repo / path) for path in (RESERVOIR, BACKHAUL)}
    connectors = repo / "parts" / "connectors.parts.yaml"
    connectors.write_text(connectors.read_text(encoding="utf-8").replace(
        "loss: {typ: 0.25 dB, max: 0.5 dB}", "loss: {typ: 0.25 dB, max: 0.6 dB}"), encoding="utf-8")
    after = {path: worst_margin_db(repo / path) for path in before}
    sentence = ("Raising `lc-upc-mated-pair`'s `max` from 0.5 dB to 0.6 dB lowers the worst-case margin of the "
                "reservoir link, which uses it twice, by 0.2 dB, and that of the backhaul by 0 dB")
    assert collapsed(sentence) in collapsed(README)
    assert before[RESERVOIR] - after[RESERVOIR] == pytest.approx(2 * 0.1, abs=1e-9)
    assert before[BACKHAUL] - after[BACKHAUL] == pytest.approx(0.0, abs=1e-12)  # its worn pair overrides the loss


def test_check_a_folder_reports_a_broken_part_nobody_uses(repo):
    connectors = repo / "parts" / "connectors.parts.yaml"
    connectors.write_text(connectors.read_text(encoding="utf-8").replace(
        "loss: {typ: 0.35 dB, max: 0.75 dB}", "loss: {typ: 0.35 dB, max: 0.75 dBx}"), encoding="utf-8")
    result = run_cli("check", repo)
    assert result.exit_code == 2
    assert f"ERROR  {connectors}: input error" in result.stdout
    assert f"{connectors}:17:31: parts.mpo-12-mated-pair.loss.max: unknown unit 'dBx'" in result.stderr
    assert "3 link(s): 3 close, 0 do not close, 0 with input errors" in result.stdout


def test_check_a_folder_leaves_out_material_files(repo):
    shutil.copy(Path(__file__).resolve().parents[2] / "linkbudget" / "materials" / "catalog" / "water.yaml",
                repo / "links" / "tank-water.yaml")
    result = run_cli("check", repo)
    assert result.exit_code == 0, result.output
    assert "tank-water" not in result.stdout


def test_check_a_folder_without_links_is_an_input_error(tmp_path):
    result = run_cli("check", tmp_path)
    assert result.exit_code == 2
    assert "no link files" in result.stderr


def test_uses_an_unknown_part_is_an_input_error(repo):
    result = run_cli("uses", "no-such-part", repo)
    assert result.exit_code == 2
    assert "no part 'no-such-part'" in result.stderr


def test_run_notes_the_part_of_each_row(repo):
    result = run_cli("run", repo / RESERVOIR)
    assert "part lc-upc-mated-pair" in collapsed(result.stdout)


def test_a_part_folder_outside_the_repository_is_refused_unless_allowed(repo, tmp_path):
    outside = tmp_path / "elsewhere"
    outside.mkdir()
    (outside / "extra.parts.yaml").write_text("parts:\n  far-pair: {kind: connector, loss: 0.2 dB}\n",
                                              encoding="utf-8")
    link = repo / "links" / "far.yaml"
    link.write_text((repo / RESERVOIR).read_text(encoding="utf-8").replace(
        "chain:\n", "part_folders: [../../elsewhere]\nchain:\n  - part: far-pair\n"), encoding="utf-8")
    refused = run_cli("check", link)
    assert refused.exit_code == 2
    assert (f"{link}:10:16: part_folders[0]: part folder '../../elsewhere': path '../../elsewhere' is outside "
            "the project") in refused.stderr
    allowed = run_cli("check", link, "--allow-path", outside)
    assert allowed.exit_code == 0, allowed.output


def test_a_part_file_linked_from_outside_the_repository_is_refused(repo, tmp_path):
    outside = tmp_path / "secret.parts.yaml"
    outside.write_text("parts:\n  lc-upc-mated-pair: {kind: connector, loss: 0 dB}\n", encoding="utf-8")
    (repo / "links" / "shadow.parts.yaml").symlink_to(outside)
    result = run_cli("run", repo / RESERVOIR)
    assert result.exit_code == 2
    assert (f"{repo}/links/shadow.parts.yaml: (top level): path 'shadow.parts.yaml' is outside the project"
            in result.stderr)


def test_check_a_part_file_given_alone_checks_its_parts(repo):
    broken = repo / "parts" / "windows.parts.yaml"
    broken.write_text(broken.read_text(encoding="utf-8").replace("thickness: 3 mm", "thicknes: 3 mm"),
                      encoding="utf-8")
    result = run_cli("check", broken)
    assert result.exit_code == 2
    assert result.stdout.splitlines() == [f"ERROR  {broken}: input error",
                                          "1 part file(s): 1 with input errors, 0 part(s) used by no link checked"]
    assert f"{broken}:9:5: parts.housing-window.thicknes: unknown key 'thicknes'" in result.stderr


def test_a_coating_row_from_a_part_names_it_in_json(repo):
    rows = json.loads(run_cli("run", repo / "links/clearwater-sensor.yaml", "--format", "json").stdout)["rows"]
    parts = {row["name"]: row.get("part") for row in rows}
    assert parts["housing-ar-coating"] == {"name": "housing-ar-coating", "file": f"{repo}/parts/windows.parts.yaml"}
    assert parts["return window"] == {"name": "housing-window", "file": f"{repo}/parts/windows.parts.yaml"}
    assert parts["tank water"] is None and parts["launch fibre"] is None
