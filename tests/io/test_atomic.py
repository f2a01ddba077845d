"""Atomic writes (``io/atomic.py``): errors name the file asked for, never the temporary file."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

from petfall_audit.io import atomic
from petfall_audit.io.atomic import atomic_write_text, check_writable_path


def test_missing_folder_names_the_target(tmp_path: Path) -> None:
    target = tmp_path / "missing" / "out.json"
    with pytest.raises(FileNotFoundError) as info:
        atomic_write_text(target, "{}")
    assert info.value.filename == str(target) and "does not exist" in str(info.value.strerror)


def test_target_that_is_a_folder_leaves_it_untouched(tmp_path: Path) -> None:
    with pytest.raises(IsADirectoryError) as info:
        atomic_write_text(tmp_path, "x")
    assert info.value.filename == str(tmp_path)
    assert list(tmp_path.iterdir()) == []  # no temporary file left behind


def test_folder_that_is_a_file(tmp_path: Path) -> None:
    file = tmp_path / "a.json"
    file.write_text("old", "utf-8")
    with pytest.raises(NotADirectoryError):
        check_writable_path(file / "b.json")


def test_unwritable_folder_names_the_target_and_keeps_the_old_file(
    tmp_path: Path, monkeypatch: pytest.MonkeyPatch
) -> None:
    # A read-only folder cannot be made read-only for root, so the refusal is simulated.
    target = tmp_path / "out.csv"
    target.write_text("old", "utf-8")
    real_open = os.open

    def refuse(path: str | os.PathLike[str], flags: int, mode: int = 0o777) -> int:
        if str(path).endswith(".tmp"):
            raise PermissionError(13, "Permission denied", str(path))
        return real_open(path, flags, mode)

    monkeypatch.setattr(atomic.os, "open", refuse)
    with pytest.raises(PermissionError) as info:
        atomic_write_text(target, "new")
    assert info.value.filename == str(target)
    assert target.read_text("utf-8") == "old"


def test_overwrite_replaces_the_whole_file(tmp_path: Path) -> None:
    target = tmp_path / "out.txt"
    target.write_text("a much longer old content\n" * 100, "utf-8")
    atomic_write_text(target, "new\n")
    assert target.read_text("utf-8") == "new\n"
    assert [p.name for p in tmp_path.iterdir()] == ["out.txt"]
