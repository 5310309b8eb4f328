"""Reading files at a git revision (linkbudget.gitread): what reaches git, and what is refused."""

import subprocess

import pytest

import linkbudget.config  # noqa: F401  (the config package first: linkbudget.reader imports the loader)
import linkbudget.gitread as gitread
from linkbudget.config.source import ConfigError
from linkbudget.gitread import GitError, GitRevisionReader, repository_path, resolve_commit
from linkbudget.paths import PathRefused
from linkbudget.yamlread import MAX_FILE_BYTES


def git(folder, *arguments):
    return subprocess.run(["git", *arguments], cwd=folder, check=True, capture_output=True, text=True).stdout


@pytest.fixture
def top(tmp_path):
    top = tmp_path / "repo"
    (top / "links").mkdir(parents=True)
    git(top, "init", "-q")
    git(top, "config", "user.email", "tests@example.invalid")
    git(top, "config", "user.name", "tests")
    (top / "links" / "a.yaml").write_text("title: a\n", encoding="utf-8")
    (top / "links" / "big.yaml").write_bytes(b"#" * (MAX_FILE_BYTES + 10))
    git(top, "add", ".")
    git(top, "commit", "-q", "-m", "one")
    return top


@pytest.fixture
def git_calls(monkeypatch):
    calls = []
    real = gitread._git

    def recording(arguments, folder):
        calls.append(list(arguments))
        return real(arguments, folder)

    monkeypatch.setattr(gitread, "_git", recording)
    return calls


@pytest.mark.parametrize("revision", ["--output=x", "-p", "", "--end-of-options"])
def test_resolve_commit_option_like_never_reaches_git(top, git_calls, revision):
    with pytest.raises(GitError, match="not a revision name"):
        resolve_commit(top, revision)
    assert git_calls == []


def test_resolve_commit_passes_the_revision_after_end_of_options(top, git_calls):
    commit = resolve_commit(top, "HEAD")
    assert commit == git(top, "rev-parse", "HEAD").strip() and len(commit) == 40
    (arguments,) = git_calls
    assert arguments.index("--end-of-options") < arguments.index("HEAD^{commit}")


def test_resolve_commit_missing_and_non_commit(top):
    with pytest.raises(GitError, match="names no commit"):
        resolve_commit(top, "no-such-branch")
    tree = git(top, "rev-parse", "HEAD^{tree}").strip()
    with pytest.raises(GitError, match="names no commit"):
        resolve_commit(top, tree)


def test_reader_reads_at_the_commit_not_the_working_tree(top):
    reader = GitRevisionReader.at(top, "HEAD")
    (top / "links" / "a.yaml").write_text("title: edited\n", encoding="utf-8")
    source = reader.read("a.yaml", "links")
    assert (source.name, source.text, source.path) == ("HEAD:links/a.yaml", "title: a\n", None)


@pytest.mark.parametrize("written", ["../../outside.yaml", "/etc/hostname", "..\\..\\x.yaml"])
def test_reader_refuses_paths_outside_the_repository(top, written):
    with pytest.raises(PathRefused, match="outside the repository"):
        GitRevisionReader.at(top, "HEAD").read(written, "links")


def test_reader_pathspec_magic_is_literal(top):
    with pytest.raises(PathRefused, match="no such file"):
        GitRevisionReader.at(top, "HEAD").read("*.yaml", "links")
    with pytest.raises(PathRefused, match="no such file"):
        GitRevisionReader.at(top, "HEAD").read(":(glob)**/a.yaml")


def test_reader_refuses_a_folder_and_a_large_file(top):
    reader = GitRevisionReader.at(top, "HEAD")
    with pytest.raises(PathRefused, match="a folder"):
        reader.read("links")
    with pytest.raises(ConfigError, match=f"larger than {MAX_FILE_BYTES} bytes"):
        reader.read("links/big.yaml")


def test_repository_path_and_errors(top, tmp_path, monkeypatch):
    located = repository_path(top / "links" / "a.yaml")
    assert (located.top, located.relative) == (top, "links/a.yaml")
    (tmp_path / "plain").mkdir()
    with pytest.raises(GitError, match="not in a git repository"):
        repository_path(tmp_path / "plain" / "a.yaml")
    with pytest.raises(GitError, match="does not exist"):
        repository_path(tmp_path / "nowhere" / "a.yaml")
    monkeypatch.setenv("PATH", str(tmp_path / "plain"))
    with pytest.raises(GitError, match="git is not installed"):
        repository_path(top / "links" / "a.yaml")
