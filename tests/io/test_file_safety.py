"""The smaller promises about files: another program's save is not silently overwritten,
saving through a link writes its target, the temporary file is private and leftovers are swept,
messages never echo whole values, terminal control sequences from a file are shown and not
obeyed, an unwritable output is refused before the work and a full disk names the file.
(POSIX rename(2) and open(2) semantics; ECMA-48 for terminal control sequences.)"""

from __future__ import annotations

import dataclasses
import errno
import json
import os
import stat
import sys
import time
from pathlib import Path
from typing import Any

import pytest

from petfall_audit import cli
from petfall_audit.cli import main
from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.errors import Problem
from petfall_audit.io import atomic
from petfall_audit.io.atomic import STALE_TEMP_S, atomic_write_text
from petfall_audit.io.building_file import dumps_building, load_building, save_building
from petfall_audit.io.schedule import ImportProblem
from petfall_audit.safe_text import MAX_MESSAGE_CHARS, cut, terminal_safe

posix_only = pytest.mark.skipif(os.name != "posix", reason="POSIX permissions and links")


# --- changed on disk ---------------------------------------------------------------------------


def test_the_document_knows_when_its_file_changed_on_disk(tmp_path: Path) -> None:
    path = tmp_path / "b.json"
    save_building(sample_building("walkup"), path)
    doc = Document(load_building(path), path)
    assert not doc.changed_on_disk()
    os.utime(path)  # touched, same content: not a change
    assert not doc.changed_on_disk()
    other = dataclasses.replace(doc.building, info=dataclasses.replace(
        doc.building.info, name="Saved by another window"))
    save_building(other, path)  # another instance saves
    assert doc.changed_on_disk()
    doc.remember_disk_state()  # e.g. the user chose to save over it
    assert not doc.changed_on_disk()
    path.unlink()
    assert doc.changed_on_disk()
    doc.path = tmp_path / "elsewhere.json"  # Save As: the file dialog asked already
    assert not doc.changed_on_disk()


@pytest.mark.gui
def test_the_window_asks_before_saving_over_another_save(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.main_window import MainWindow
    from tests.gui.test_main_window import FakePrompts

    class Asking(FakePrompts):
        overwrite = False

        def ask_overwrite_changed(self, parent: Any, name: str) -> bool:
            self.asked.append(f"overwrite {name}")
            return self.overwrite

    path = tmp_path / "b.json"
    save_building(sample_building("walkup"), path)
    prompts = Asking()
    window = MainWindow(Document(load_building(path), path), prompts=prompts, samples=16,
                        refine_samples=0)
    qtbot.addWidget(window)
    theirs = dataclasses.replace(sample_building("walkup"), info=dataclasses.replace(
        sample_building("walkup").info, name="Theirs"))
    save_building(theirs, path)
    assert not window.session.save()
    assert prompts.asked == ["overwrite b.json"]
    assert load_building(path).info.name == "Theirs"
    prompts.overwrite = True
    assert window.session.save()
    assert load_building(path).info.name != "Theirs"
    assert window.session.save() and prompts.asked == ["overwrite b.json"] * 2  # not asked again


# --- links, permissions, leftovers ---------------------------------------------------------------


@posix_only
def test_saving_through_a_link_writes_its_target(tmp_path: Path) -> None:
    real = tmp_path / "real" / "b.json"
    real.parent.mkdir()
    real.write_text("old", encoding="utf-8")
    link = tmp_path / "link.json"
    link.symlink_to(real)
    atomic_write_text(link, "new")
    assert link.is_symlink() and os.readlink(link) == str(real)
    assert real.read_text(encoding="utf-8") == "new"
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]


@posix_only
def test_the_temporary_file_is_private_while_written(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    seen: list[int] = []
    real_fsync = os.fsync

    def spy(fd: int) -> None:
        seen.append(stat.S_IMODE(os.fstat(fd).st_mode))
        real_fsync(fd)

    monkeypatch.setattr(atomic.os, "fsync", spy)
    old = os.umask(0o022)
    try:
        atomic_write_text(tmp_path / "new.json", "x")
    finally:
        os.umask(old)
    assert seen[0] == 0o600, "other users could read the file while it is written"
    assert stat.S_IMODE((tmp_path / "new.json").stat().st_mode) == 0o644  # 0o666 less umask


def test_leftover_temporary_files_are_swept_and_fresh_ones_kept(tmp_path: Path) -> None:
    stale = tmp_path / ".b.json.0123456789ab.tmp"
    fresh = tmp_path / ".b.json.ba9876543210.tmp"
    unrelated = tmp_path / ".c.json.0123456789ab.tmp"
    for p in (stale, fresh, unrelated):
        p.write_text("partial", encoding="utf-8")
    long_ago = time.time() - STALE_TEMP_S - 60
    os.utime(stale, (long_ago, long_ago))
    os.utime(unrelated, (long_ago, long_ago))
    atomic_write_text(tmp_path / "b.json", "x")
    assert not stale.exists()
    assert fresh.exists(), "another save may be writing it right now"
    assert unrelated.exists()


# --- errors --------------------------------------------------------------------------------------


def test_a_full_disk_names_the_file_and_keeps_the_old_one(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    target = tmp_path / "b.json"
    target.write_text("old", encoding="utf-8")

    def full(fd: int) -> None:
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(atomic.os, "fsync", full)
    with pytest.raises(OSError) as err:
        atomic_write_text(target, "new")
    assert err.value.errno == errno.ENOSPC and err.value.filename == str(target)
    assert target.read_text(encoding="utf-8") == "old"
    assert [p.name for p in tmp_path.iterdir()] == ["b.json"]


def test_a_full_disk_during_a_report_is_reported_with_the_file_name(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str],
) -> None:
    src = tmp_path / "b.json"
    save_building(sample_building("walkup"), src)

    def full(fd: int) -> None:
        raise OSError(errno.ENOSPC, "No space left on device")

    monkeypatch.setattr(atomic.os, "fsync", full)
    out = tmp_path / "audit.pdf"
    assert main(["report", str(src), "-o", str(out), "--samples", "16"]) == 1
    err = capsys.readouterr().err
    assert f"{out}: No space left on device" in err and "Traceback" not in err


def _unwritable_folder(tmp_path: Path) -> Path:
    if sys.platform.startswith("linux") and os.geteuid() == 0:
        return Path("/proc")  # an administrator may write anywhere but on a read-only system
    folder = tmp_path / "ro"
    folder.mkdir()
    folder.chmod(0o500)
    return folder


@posix_only
@pytest.mark.parametrize("command", ["report", "assess", "plan"])
def test_output_into_an_unwritable_folder_fails_before_the_computation(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch, capsys: pytest.CaptureFixture[str],
        command: str) -> None:
    src = tmp_path / "b.json"
    save_building(sample_building("walkup"), src)
    folder = _unwritable_folder(tmp_path)

    def no_work(*a: object, **k: object) -> None:
        raise AssertionError("the computation ran before the output was checked")

    monkeypatch.setattr(cli, "_assess", no_work)
    extra = ["--budget", "100"] if command == "plan" else []
    try:
        code = main([command, str(src), "-o", str(folder / "out.pdf"), *extra])
    finally:
        if folder != Path("/proc"):
            folder.chmod(0o700)
    assert code == 2
    assert "cannot be written" in capsys.readouterr().err


def test_long_values_are_cut_in_messages() -> None:
    huge = "x" * 1_000_000
    assert len(str(Problem("openings[0].id", f"duplicate id {huge!r}"))) < MAX_MESSAGE_CHARS + 30
    assert len(str(ImportProblem(3, huge, f"cannot read {huge!r} as a number", "B"))) < 700
    assert cut("short") == "short"
    assert cut(huge).endswith("(1,000,000 characters)")


def test_a_huge_id_in_a_file_is_not_echoed_back(tmp_path: Path,
                                                capsys: pytest.CaptureFixture[str]) -> None:
    doc = json.loads(dumps_building(sample_building("walkup")))
    doc["openings"][0]["id"] = "I" * 5_000_000
    doc["openings"][1]["facade"] = "F" * 5_000_000
    path = tmp_path / "b.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "openings[0].id" in err and len(err) < 5_000


# --- terminal ------------------------------------------------------------------------------------


def test_control_characters_are_shown_not_obeyed() -> None:
    assert terminal_safe("a\x1b[2Jb\x9b31m\u202ec\td\n") == "a\\x1b[2Jb\\x9b31m\\u202ec\td\n"
    assert terminal_safe("line\r\n") == "line\n"
    assert terminal_safe("plain Ünïcode ✓") == "plain Ünïcode ✓"


def test_escape_sequences_in_names_never_reach_the_terminal(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    b = sample_building("walkup")
    ops = list(b.openings)
    ops[0] = dataclasses.replace(ops[0], facade="\x1b]0;owned\x07")  # sets the window title
    bad = dataclasses.replace(b, openings=tuple(ops))
    path = tmp_path / "b.json"
    save_building(bad, path)
    assert main(["check", str(path)]) == 2
    err = capsys.readouterr().err
    assert "\x1b" not in err and "\\x1b]0;owned\\x07" in err
    good = dataclasses.replace(b, info=dataclasses.replace(b.info, name="\x1b[31mRed Court"))
    save_building(good, path)
    assert main(["assess", str(path), "--samples", "16"]) == 0
    out = capsys.readouterr().out
    assert "\x1b" not in out and "\\x1b[31mRed Court" in out
