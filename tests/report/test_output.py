"""Report files written with ``-o``: atomic, exclusive, with a plain write's mode, never damaging a file.

The contract is the docstring of linkbudget/report/output.py and README.md's "Commands".
"""

import errno
import os
import stat
import subprocess
import sys
import textwrap

import pytest

from linkbudget.report.output import OutputError, write_atomic
from tests.conftest import TEST_GLASS


def leftovers(folder):
    return [path.name for path in folder.iterdir() if path.name.startswith(".")]


@pytest.fixture
def umask():
    """``umask(value)`` sets the process umask for the test and restores it afterwards."""
    saved = os.umask(0o022)
    os.umask(saved)
    yield lambda value: os.umask(value)
    os.umask(saved)


# --- the mode a plain write would give ---------------------------------------------------------

@pytest.mark.parametrize("mask, mode", [(0o022, 0o644), (0o002, 0o664), (0o077, 0o600)])
def test_new_file_gets_the_umask_mode(tmp_path, umask, mask, mode):
    umask(mask)
    write_atomic(tmp_path / "report.md", "new\n")
    assert stat.S_IMODE(os.stat(tmp_path / "report.md").st_mode) == mode


@pytest.mark.parametrize("mode", [0o644, 0o640, 0o664])
def test_force_keeps_the_replaced_files_mode(tmp_path, umask, mode):
    umask(0o077)
    report = tmp_path / "report.md"
    report.write_text("old\n", encoding="utf-8")
    report.chmod(mode)
    write_atomic(report, "new\n", overwrite=True)
    assert report.read_text(encoding="utf-8") == "new\n"
    assert stat.S_IMODE(os.stat(report).st_mode) == mode


# --- symlinks and protected files ----------------------------------------------------------------

def test_dangling_symlink_is_not_replaced_without_force(tmp_path, cli, write_link, minimal_link):
    report = tmp_path / "report.md"
    report.symlink_to(tmp_path / "nowhere.md")
    result = cli("run", write_link(minimal_link), "-f", "markdown", "-o", report)
    assert result.exit_code == 2
    assert "--force" in result.stderr and str(report) in result.stderr
    assert report.is_symlink() and os.readlink(report) == str(tmp_path / "nowhere.md")
    assert not (tmp_path / "nowhere.md").exists()


def test_force_replaces_a_symlink_itself_never_writing_through(tmp_path):
    target = tmp_path / "elsewhere.md"
    target.write_text("not yours\n", encoding="utf-8")
    report = tmp_path / "report.md"
    report.symlink_to(target)
    write_atomic(report, "new\n", overwrite=True)
    assert not report.is_symlink() and report.read_text(encoding="utf-8") == "new\n"
    assert target.read_text(encoding="utf-8") == "not yours\n"


def test_a_material_file_the_link_reads_is_protected(tmp_path, cli, write_link, minimal_link):
    glass = tmp_path / "glass.yaml"
    glass.write_text(TEST_GLASS, encoding="utf-8")
    link = write_link(minimal_link.replace(
        "chain:\n", "chain:\n  - {name: air, kind: gap, length: 1 mm, index: 1.0}\n"
                    "  - {name: window, kind: medium, thickness: 1 mm, material: ./glass.yaml}\n"))
    assert cli("run", link).exit_code == 0
    result = cli("run", link, "-f", "json", "-o", glass, "--force")
    assert result.exit_code == 2
    assert "input file" in result.stderr
    assert glass.read_text(encoding="utf-8") == TEST_GLASS


# --- exclusive creation --------------------------------------------------------------------------

def _another_writer_takes(path, monkeypatch):
    """Make another writer create ``path`` while ours has its content open (the race)."""
    real_fdopen = os.fdopen

    def fdopen(*args, **kwargs):
        path.write_text("the other writer\n", encoding="utf-8")
        return real_fdopen(*args, **kwargs)

    monkeypatch.setattr(os, "fdopen", fdopen)


def test_two_writers_to_one_new_file_cannot_both_succeed(tmp_path, monkeypatch):
    report = tmp_path / "report.md"
    _another_writer_takes(report, monkeypatch)
    with pytest.raises(OutputError, match="file exists"):
        write_atomic(report, "ours\n")
    assert report.read_text(encoding="utf-8") == "the other writer\n"
    assert leftovers(tmp_path) == []


def _no_hard_links(monkeypatch):
    def link(*args, **kwargs):
        raise OSError(errno.EPERM, "Operation not permitted")

    monkeypatch.setattr(os, "link", link)


def test_without_hard_links_the_write_still_succeeds_and_stays_exclusive(tmp_path, monkeypatch, umask):
    umask(0o022)
    _no_hard_links(monkeypatch)
    write_atomic(tmp_path / "first.md", "first\n")
    assert (tmp_path / "first.md").read_text(encoding="utf-8") == "first\n"
    assert stat.S_IMODE(os.stat(tmp_path / "first.md").st_mode) == 0o644
    report = tmp_path / "report.md"
    _another_writer_takes(report, monkeypatch)
    with pytest.raises(OutputError, match="file exists"):
        write_atomic(report, "ours\n")
    assert report.read_text(encoding="utf-8") == "the other writer\n"
    assert leftovers(tmp_path) == []


# --- interruptions leave nothing behind ----------------------------------------------------------

def test_temporary_file_is_named_recognisably(tmp_path, monkeypatch):
    seen = []
    real_fdopen = os.fdopen

    def fdopen(*args, **kwargs):
        seen.extend(leftovers(tmp_path))
        return real_fdopen(*args, **kwargs)

    monkeypatch.setattr(os, "fdopen", fdopen)
    write_atomic(tmp_path / "report.md", "new\n")
    assert len(seen) == 1 and seen[0].startswith(".report.md.linkbudget-tmp-")
    assert leftovers(tmp_path) == []


def test_keyboard_interrupt_removes_the_temporary_file(tmp_path, monkeypatch):
    def fsync(descriptor):
        raise KeyboardInterrupt

    monkeypatch.setattr(os, "fsync", fsync)
    with pytest.raises(KeyboardInterrupt):
        write_atomic(tmp_path / "report.md", "new\n")
    assert list(tmp_path.iterdir()) == []


def test_sigterm_during_the_write_removes_the_temporary_file(tmp_path):
    report = tmp_path / "report.md"
    report.write_text("old\n", encoding="utf-8")
    child = textwrap.dedent(f"""
        import os, signal, time
        from linkbudget.report.output import write_atomic
        real_replace = os.replace
        def replace(*args):  # SIGTERM arrives just before the file is put in place
            os.kill(os.getpid(), signal.SIGTERM)
            time.sleep(5)
            real_replace(*args)
        os.replace = replace
        write_atomic({str(report)!r}, "new\\n", overwrite=True)
    """)
    done = subprocess.run([sys.executable, "-c", child], capture_output=True, text=True, timeout=60)
    assert done.returncode == 128 + 15, done.stderr
    assert leftovers(tmp_path) == []
    assert report.read_text(encoding="utf-8") == "old\n"


# --- a folder that cannot be written: exit 2 with the path, no traceback ---------------------------

def test_unsearchable_folder_exits_2_without_traceback(tmp_path, cli, write_link, minimal_link, monkeypatch):
    # As root, a chmod cannot deny access; the operating system's answer to a non-root user
    # (EACCES from stat in a folder without search permission) is given here instead.
    folder = tmp_path / "locked"
    folder.mkdir()
    real_stat, real_lstat = os.stat, os.lstat

    def denied(real):
        def call(path, *args, **kwargs):
            if str(folder) in os.fsdecode(path) and os.fsdecode(path) != str(folder):
                raise PermissionError(errno.EACCES, "Permission denied", os.fsdecode(path))
            return real(path, *args, **kwargs)
        return call

    link = write_link(minimal_link)
    monkeypatch.setattr(os, "stat", denied(real_stat))
    monkeypatch.setattr(os, "lstat", denied(real_lstat))
    result = cli("run", link, "-f", "json", "-o", folder / "report.json")
    assert result.exit_code == 2
    assert result.stderr.startswith(f"{folder / 'report.json'}: cannot write: Permission denied")


def test_too_long_a_name_exits_2_without_traceback(tmp_path, cli, write_link, minimal_link):
    report = tmp_path / ("x" * 300 + ".md")
    result = cli("run", write_link(minimal_link), "-f", "markdown", "-o", report)
    assert result.exit_code == 2
    assert "cannot write: File name too long" in result.stderr
    assert leftovers(tmp_path) == []
