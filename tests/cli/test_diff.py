"""``linkbudget diff``: two files, or one link at two git revisions of a repository made here.

Every expected number is a hand sum of the datasheet values written in the links below (the
tool's own numbers are never the reference): a loss in dB adds along the chain, the worst case
takes the minimum launch and every loss at its maximum (README "Spreads and budget cases").
"""

import json
import math
import shutil
import subprocess

import pytest
from numpy.testing import assert_allclose

import linkbudget.diff
from linkbudget.diff import compare, load_side
from linkbudget.reader import MemoryReader
from linkbudget.report.diff_text import MAX_MARKDOWN_CHARS, render_markdown

OLD_LINK = """\
title: Kiln yard sensor uplink
channels: [1310 nm, 1550 nm]
source:
  power: {min: -2 dBm, typ: 0 dBm, max: 1 dBm}
receiver:
  sensitivity: -30 dBm
  required_margin: 3 dB
chain:
  - name: trunk
    kind: fiber
    length: 2 km
    attenuation: {typ: 0.5 dB/km, max: 0.6 dB/km}
  - name: panel
    kind: connector
    loss: {typ: 0.3 dB, max: 0.75 dB}
  - name: splices
    kind: splice
    count: 2
    loss: {typ: 0.05 dB, max: 0.3 dB}
  - name: old filter
    kind: element
    loss: 1 dB
"""

# trunk lengthened to 3 km, panel renamed bulkhead (nothing else changed), old filter removed,
# an ageing allowance of 0.8 dB added.
NEW_LINK = (OLD_LINK.replace("length: 2 km", "length: 3 km").replace("name: panel", "name: bulkhead")
            .replace("name: old filter\n    kind: element\n    loss: 1 dB",
                     "name: ageing allowance\n    kind: element\n    loss: 0.8 dB"))
assert NEW_LINK.count("3 km") == NEW_LINK.count("bulkhead") == NEW_LINK.count("0.8 dB") == 1

# Hand sums: received = launch - sum of losses.
OLD_TYP_DBM = 0 - (2 * 0.5 + 0.3 + 2 * 0.05 + 1.0)      # -2.4 dBm
OLD_WORST_DBM = -2 - (2 * 0.6 + 0.75 + 2 * 0.3 + 1.0)   # -5.55 dBm
NEW_TYP_DBM = 0 - (3 * 0.5 + 0.3 + 2 * 0.05 + 0.8)      # -2.7 dBm
NEW_WORST_DBM = -2 - (3 * 0.6 + 0.75 + 2 * 0.3 + 0.8)   # -5.95 dBm
TYP_CHANGE_DB = NEW_TYP_DBM - OLD_TYP_DBM               # -0.3 dB
WORST_CHANGE_DB = NEW_WORST_DBM - OLD_WORST_DBM         # -0.4 dB


def git(folder, *arguments):
    subprocess.run(["git", *arguments], cwd=folder, check=True, capture_output=True)


def new_repository(top):
    """An empty repository at ``top`` with an author for its commits."""
    git(top, "init", "-q")
    git(top, "config", "user.email", "tests@example.invalid")
    git(top, "config", "user.name", "tests")


@pytest.fixture
def repo(tmp_path):
    """A repository with two commits of ``links/kiln.yaml`` (OLD_LINK, then NEW_LINK)."""
    assert shutil.which("git"), "these tests need git"
    top = tmp_path / "repo"
    (top / "links").mkdir(parents=True)
    new_repository(top)
    link = top / "links" / "kiln.yaml"
    for number, text in enumerate((OLD_LINK, NEW_LINK)):
        link.write_text(text, encoding="utf-8")
        git(top, "add", "links/kiln.yaml")
        git(top, "commit", "-q", "-m", f"revision {number + 1}")
    return top


def json_diff(cli, *arguments):
    result = cli("diff", *arguments, "--format", "json")
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


def assert_hand_sums(document):
    assert document["schema"] == "linkbudget.diff/1"
    assert document["wavelengths_nm"] == [1310.0, 1550.0]
    assert_allclose(document["margin_change_db"]["typ"], [TYP_CHANGE_DB] * 2, atol=1e-9)
    assert_allclose(document["margin_change_db"]["worst"], [WORST_CHANGE_DB] * 2, atol=1e-9)
    assert_allclose(document["received_change_db"]["worst"], [WORST_CHANGE_DB] * 2, atol=1e-9)
    assert_allclose(document["margin_db"]["old"]["worst"], [OLD_WORST_DBM + 30] * 2, atol=1e-9)
    assert_allclose(document["margin_db"]["new"]["worst"], [NEW_WORST_DBM + 30] * 2, atol=1e-9)
    assert document["worst_margin_loss_db"] == pytest.approx(-WORST_CHANGE_DB, abs=1e-9)
    by_name = {(entry["old_name"], entry["new_name"]): entry for entry in document["segments"]}
    assert by_name[("trunk", "trunk")]["status"] == "changed"
    assert by_name[("trunk", "trunk")]["keys"] == [{"path": "length", "old": "2 km", "new": "3 km"}]
    assert_allclose(by_name[("trunk", "trunk")]["loss_change_db"]["worst"], [0.6] * 2, atol=1e-9)  # 1 km · 0.6
    assert by_name[("panel", "bulkhead")]["status"] == "renamed"
    assert by_name[("panel", "bulkhead")]["keys"] == []
    assert by_name[("splices", "splices")]["status"] == "unchanged"
    assert by_name[(None, "ageing allowance")]["status"] == "added"
    assert_allclose(by_name[(None, "ageing allowance")]["loss_change_db"]["typ"], [0.8] * 2)
    assert by_name[("old filter", None)]["status"] == "removed"
    assert_allclose(by_name[("old filter", None)]["loss_change_db"]["worst"], [-1.0] * 2)
    assert document["old"]["closes"] and document["new"]["closes"] and not document["verdict_changed"]


def test_diff_range_margin_change_is_difference_of_hand_sums(cli, repo):
    assert_hand_sums(json_diff(cli, repo / "links" / "kiln.yaml", "HEAD~1..HEAD"))


def test_diff_against_revision_reads_old_from_git_new_from_working_tree(cli, repo):
    document = json_diff(cli, repo / "links" / "kiln.yaml", "--against", "HEAD~1")
    assert_hand_sums(document)
    assert document["old"]["file"] == "HEAD~1:links/kiln.yaml"
    assert document["new"]["file"].endswith("kiln.yaml") and ":" not in document["new"]["file"]


def test_diff_two_files(cli, write_link):
    old, new = write_link(OLD_LINK, "old.yaml"), write_link(NEW_LINK, "new.yaml")
    assert_hand_sums(json_diff(cli, old, new))


def test_diff_range_of_one_revision_with_itself_changes_nothing(cli, repo):
    document = json_diff(cli, repo / "links" / "kiln.yaml", "HEAD..HEAD")
    assert {entry["status"] for entry in document["segments"]} == {"unchanged"}
    assert document["margin_change_db"]["worst"] == [0.0, 0.0]


def test_diff_gate_max_margin_loss(cli, repo):
    link = repo / "links" / "kiln.yaml"
    # the worst-case margin fell by 0.4 dB (hand sum): a 0.5 dB allowance passes, 0.3 dB fails
    assert cli("diff", link, "HEAD~1..HEAD", "--max-margin-loss", "0.5dB").exit_code == 0
    failed = cli("diff", link, "HEAD~1..HEAD", "--max-margin-loss", "0.3 dB", "--format", "markdown")
    assert failed.exit_code == 1
    assert "Gate FAILED" in failed.stdout and "0.40 dB" in failed.stdout
    assert cli("diff", link, "HEAD~1..HEAD", "--max-margin-loss", "-1 dB").exit_code == 2
    assert cli("diff", link, "HEAD~1..HEAD", "--max-margin-loss", "0.5").exit_code == 2


def test_diff_markdown_and_terminal_name_the_changes(cli, repo):
    link = repo / "links" / "kiln.yaml"
    markdown = cli("diff", link, "HEAD~1..HEAD", "--format", "markdown").stdout
    assert "| renamed | panel → bulkhead | connector |" in markdown
    assert "| added | ageing allowance | element |" in markdown
    assert "| removed | old filter | element |" in markdown
    assert "length: 2 km → 3 km" in markdown
    assert "Worst-case margin lost 0.40 dB" in markdown
    terminal = cli("diff", link, "HEAD~1..HEAD").stdout
    assert "renamed" in terminal and "Worst-case margin lost 0.40 dB" in terminal


def test_diff_material_file_is_read_at_the_same_revision(cli, repo, minimal_link):
    """A window of a material file committed with n = 1.5 and then edited in the working tree to
    n = 1.7: the old side's faces use the committed index. Normal incidence Fresnel loss of one
    face in air, -10·log10(1 - ((n-1)/(n+1))²) (Hecht, Optics, 5th ed., Eq. 4.67 at θ = 0)."""
    glass = ("name: yard-glass\ndescription: invented\nsource: hand-made (2024)\n"
             "valid_range: {from: 400 nm, to: 1.6 um}\n"
             "cauchy:\n  wavelength_unit: um\n  coefficients: [N, 0.0]\n  powers: [0, -2]\n")
    link = minimal_link + "  - name: window\n    kind: medium\n    thickness: 1 mm\n    material: ./glass.yaml\n"
    (repo / "links" / "window.yaml").write_text(link, encoding="utf-8")
    (repo / "links" / "glass.yaml").write_text(glass.replace("N", "1.5"), encoding="utf-8")
    git(repo, "add", "links")
    git(repo, "commit", "-q", "-m", "window")
    (repo / "links" / "glass.yaml").write_text(glass.replace("N", "1.7"), encoding="utf-8")

    def face_db(n):
        return -10 * math.log10(1 - ((n - 1) / (n + 1)) ** 2)

    document = json_diff(cli, repo / "links" / "window.yaml", "--against", "HEAD")
    expected_db = 2 * (face_db(1.7) - face_db(1.5))  # two faces, no bulk loss (κ = 0)
    assert_allclose(document["margin_change_db"]["typ"], [-expected_db], atol=1e-9)  # JSON resolution 1e-9 dB
    faces = [entry for entry in document["rows"] if entry["kind"] == "interface"]
    assert len(faces) == 2 and {entry["status"] for entry in faces} == {"changed"}
    assert_allclose([entry["loss_change_db"]["typ"][0] for entry in faces], [face_db(1.7) - face_db(1.5)] * 2,
                    atol=1e-9)


@pytest.fixture
def loads(monkeypatch):
    """Records every link the diff loads: a refused revision must load nothing."""
    calls = []
    real = linkbudget.diff.load_side

    def recording(path, **options):
        calls.append(path)
        return real(path, **options)

    monkeypatch.setattr(linkbudget.diff, "load_side", recording)
    return calls


@pytest.mark.parametrize("arguments", [
    ("--against", "no-such-branch"),
    ("HEAD~1..no-such-branch",),
    ("--against", "--output=x"),
    ("--against=--output=x",),
    ("--", "--output=x..HEAD"),
    ("HEAD~1...HEAD",),
    ("--against", ""),
], ids=["missing", "missing-in-range", "option-like", "option-like-equals", "option-like-range", "three-dots",
        "empty"])
def test_diff_bad_revision_exits_2_and_runs_nothing(cli, repo, monkeypatch, loads, arguments):
    monkeypatch.chdir(repo)
    before = sorted(path.name for path in repo.iterdir())
    if arguments[0] == "--":
        result = cli("diff", "--", "links/kiln.yaml", *arguments[1:])
    else:
        result = cli("diff", "links/kiln.yaml", *arguments)
    assert result.exit_code == 2, result.output
    assert result.stdout == ""
    assert "revision" in result.stderr or "range" in result.stderr
    assert loads == []
    assert sorted(path.name for path in repo.iterdir()) == before  # no file named x, nothing written


def test_diff_material_path_outside_repository_exits_2(cli, repo, minimal_link):
    (repo.parent / "outside.yaml").write_text("name: x\n", encoding="utf-8")
    link = minimal_link + "  - name: window\n    kind: medium\n    thickness: 1 mm\n    material: ../../outside.yaml\n"
    (repo / "links" / "escape.yaml").write_text(link, encoding="utf-8")
    git(repo, "add", "links")
    git(repo, "commit", "-q", "-m", "escape")
    result = cli("diff", repo / "links" / "escape.yaml", "--against", "HEAD")
    assert result.exit_code == 2
    assert "outside the repository" in result.stderr and "chain[2].material" in result.stderr
    assert result.stdout == ""


def test_diff_link_outside_any_repository_exits_2(cli, tmp_path, loads):
    (tmp_path / "plain").mkdir()
    link = tmp_path / "plain" / "link.yaml"
    link.write_text(OLD_LINK, encoding="utf-8")
    result = cli("diff", link, "--against", "HEAD")
    assert result.exit_code == 2 and "not in a git repository" in result.stderr
    assert loads == []


def test_diff_link_missing_at_revision_exits_2(cli, repo):
    (repo / "links" / "new.yaml").write_text(NEW_LINK, encoding="utf-8")
    result = cli("diff", repo / "links" / "new.yaml", "--against", "HEAD")
    assert result.exit_code == 2
    assert "HEAD:links/new.yaml" in result.stderr and "no such file" in result.stderr


def test_diff_symlink_at_revision_is_not_followed(cli, repo):
    (repo / "links" / "alias.yaml").symlink_to("kiln.yaml")
    git(repo, "add", "links/alias.yaml")
    git(repo, "commit", "-q", "-m", "alias")
    result = cli("diff", repo / "links" / "alias.yaml", "--against", "HEAD")
    assert result.exit_code == 2 and "symlink" in result.stderr


def test_diff_output_file_atomic_and_force(cli, repo):
    link, report = repo / "links" / "kiln.yaml", repo / "diff.md"
    assert cli("diff", link, "HEAD~1..HEAD", "-f", "markdown", "-o", report).exit_code == 0
    assert "panel → bulkhead" in report.read_text(encoding="utf-8")
    report.write_text("keep", encoding="utf-8")
    refused = cli("diff", link, "HEAD~1..HEAD", "-f", "markdown", "-o", report)
    assert refused.exit_code == 2 and "--force" in refused.stderr
    assert report.read_text(encoding="utf-8") == "keep"
    assert cli("diff", link, "HEAD~1..HEAD", "-f", "json", "-o", report, "--force").exit_code == 0
    assert json.loads(report.read_text(encoding="utf-8"))["schema"] == "linkbudget.diff/1"
    assert cli("diff", link, "--against", "HEAD", "-f", "json", "-o", link, "--force").exit_code == 2


def test_diff_needs_a_second_side(cli, repo):
    result = cli("diff", repo / "links" / "kiln.yaml")
    assert result.exit_code == 2 and "--against" in result.stderr


def _long_link(count, renamed=False, loss="0.1 dB"):
    """A link of ``count`` elements over a 201-point band."""
    chain = "".join(f"  - name: {'renamed ' if renamed and n % 2 else ''}part {n}\n    kind: element\n"
                    f"    loss: {loss if n % 3 else '0.2 dB'}\n" for n in range(count))
    return (f"title: Long test link\nband: {{from: 1500 nm, to: 1600 nm, step: 0.5 nm}}\n"
            f"source:\n  power: 0 dBm\nreceiver:\n  sensitivity: -100 dBm\nchain:\n{chain}")


def test_diff_markdown_is_bounded():
    old = load_side("l.yaml", reader=MemoryReader({"l.yaml": _long_link(400)}))
    new = load_side("l.yaml", reader=MemoryReader({"l.yaml": _long_link(400, renamed=True, loss="0.15 dB")}))
    found = compare(old, new)
    assert len(found.wavelength_m) == 201
    text = render_markdown(found)
    assert len(text) <= MAX_MARKDOWN_CHARS
    assert "more changed, not listed" in text
    assert "25 of 201 wavelengths shown" in text
    short = render_markdown(found, max_chars=2_000)
    assert len(short) <= 2_000
    assert "the diff is cut here" in short and "--format json" in short


def test_readme_states_the_markdown_bounds_and_the_gate():
    from pathlib import Path

    from linkbudget.report.diff_text import MAX_LISTED_SEGMENTS
    from linkbudget.report.markdown import MARKDOWN_MAX_WAVELENGTHS

    readme = " ".join((Path(__file__).resolve().parents[2] / "README.md").read_text(encoding="utf-8").split())
    section = readme.split("## Reviewing a change", 1)[1].split("## Python API", 1)[0]
    assert (f"at most {MAX_LISTED_SEGMENTS} segments, {MARKDOWN_MAX_WAVELENGTHS} wavelengths and "
            f"{MAX_MARKDOWN_CHARS:,} characters") in section
    assert "--max-margin-loss 0.5dB" in section and "linkbudget check configs/ --junit" in section


def test_diff_margin_sentence_and_gate_when_light_is_blocked():
    """A margin of -inf (total internal reflection) in the new revision: the margin is lost, the
    gate fails; both revisions blocked: not comparable, and no margin lost."""
    from types import SimpleNamespace

    import numpy as np

    from linkbudget.diff import LinkDiff
    from linkbudget.report.diff_text import margin_sentence

    def diff_of(old_db, new_db):
        old, new = np.array(old_db), np.array(new_db)
        with np.errstate(invalid="ignore"):
            change = new - old
        side = SimpleNamespace(result=SimpleNamespace(required_margin_db=3.0))
        return LinkDiff(side, side, np.array([1310e-9, 1550e-9]), np.array([]), np.array([]), (), (), (),
                        {}, {"typ": change, "worst": change}, {"worst": old}, {"worst": new})

    blocked = diff_of([10.0, 10.0], [9.0, -np.inf])
    assert margin_sentence(blocked).startswith("Worst-case margin lost: the new revision blocks the light at 1550 nm")
    assert blocked.margin_loss_exceeds(100.0)
    both = diff_of([-np.inf, 10.0], [-np.inf, 10.5])
    assert both.worst_margin_loss_db == pytest.approx(-0.5)
    assert not both.margin_loss_exceeds(0.0)
    assert margin_sentence(both).startswith("Worst-case margin gained 0.50 dB at 1550 nm")


def test_diff_markdown_escapes_user_text():
    old_text = OLD_LINK.replace("name: panel", "name: 'pa|nel <script>'")
    new_text = OLD_LINK.replace("name: panel", 'name: "*bulk*\\x1b[31m"')
    old = load_side("l.yaml", reader=MemoryReader({"l.yaml": old_text}))
    new = load_side("l.yaml", reader=MemoryReader({"l.yaml": new_text}))
    text = render_markdown(compare(old, new))
    assert "| renamed | pa\\|nel &lt;script&gt; → \\*bulk\\*\\\\x1b\\[31m | connector |" in text
    assert "<script>" not in text and "\x1b" not in text


# ---- a part changed in its part file: every use moves, and the part is named ----

PART_FILE = "parts:\n  pair:\n    kind: connector\n    loss: {typ: 0.25 dB, max: 0.5 dB}\n"
PART_LINK = """\
title: shared pair
wavelength: 1310 nm
source: {power: 0 dBm}
receiver: {sensitivity: -20 dBm}
chain:
  - part: pair
    name: first
  - name: trunk
    kind: fiber
    length: 1 km
    attenuation: 0.4 dB/km
  - part: pair
    name: second
    loss: {typ: 0.3 dB, max: 0.6 dB}
"""


@pytest.fixture
def parts_repo(tmp_path):
    """Two commits: the part file's pair loses 0.25/0.5 dB (typ/max), then 0.35/0.7 dB."""
    top = tmp_path / "parts-repo"
    (top / "parts").mkdir(parents=True)
    (top / "links").mkdir()
    new_repository(top)
    (top / "linkbudget.toml").write_text('[parts]\nfolders = ["parts"]\n', encoding="utf-8")
    (top / "links" / "shared.yaml").write_text(PART_LINK, encoding="utf-8")
    for number, text in enumerate((PART_FILE, PART_FILE.replace("0.25 dB, max: 0.5 dB", "0.35 dB, max: 0.7 dB"))):
        (top / "parts" / "pairs.parts.yaml").write_text(text, encoding="utf-8")
        git(top, "add", "-A")
        git(top, "commit", "-q", "-m", f"revision {number + 1}")
    return top


def test_diff_of_a_part_change_moves_each_use_and_names_the_part(cli, parts_repo, monkeypatch):
    monkeypatch.chdir(parts_repo)
    document = json_diff(cli, "links/shared.yaml", "HEAD~1..HEAD")
    # hand sums: only "first" takes the part's loss (second overrides it): 0.35 - 0.25 typ, 0.7 - 0.5 worst
    assert_allclose(document["margin_change_db"]["typ"], [-0.10], atol=1e-9)
    assert_allclose(document["margin_change_db"]["worst"], [-0.20], atol=1e-9)
    by_name = {entry["new_name"]: entry for entry in document["segments"]}
    assert by_name["first"]["status"] == "changed"
    assert by_name["first"]["keys"] == [{"path": "part pair: loss.typ", "old": "0.25 dB", "new": "0.35 dB"},
                                        {"path": "part pair: loss.max", "old": "0.5 dB", "new": "0.7 dB"}]
    assert by_name["second"]["status"] == "unchanged" and by_name["trunk"]["status"] == "unchanged"


def test_git_reader_lists_a_folder_at_a_revision(parts_repo):
    from linkbudget.gitread import GitRevisionReader
    from linkbudget.paths import PathOutside, PathRefused

    reader = GitRevisionReader.at(parts_repo, "HEAD~1")
    assert reader.file_names("parts", "links/..") == ("pairs.parts.yaml",)
    assert reader.file_names(".", None) == ("linkbudget.toml",)  # files only, not the folders
    with pytest.raises(PathOutside):
        reader.file_names("..", None)
    with pytest.raises(PathRefused):
        reader.file_names("no-such-folder", None)
