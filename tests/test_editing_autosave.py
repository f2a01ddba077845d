"""The recovery file: written atomically, found after a crash, not while its process runs."""

from __future__ import annotations

from pathlib import Path

from petfall_audit.editing import autosave
from petfall_audit.model import Building, BuildingInfo, Facade, Floor


def building() -> Building:
    return Building(info=BuildingInfo(name="Cedar Flats (invented)"),
                    floors=(Floor(0, "Ground", 0.0),), facades=(Facade("west", 9.0),))


def _dead_pid() -> int:
    # pids above the kernel's pid_max never run (Linux default max 4 194 304; common practice)
    return 2**30


def test_folder_comes_from_the_environment(_isolated_settings: Path) -> None:
    assert autosave.settings_dir() == _isolated_settings
    assert autosave.recovery_dir().parent == _isolated_settings


def test_recovery_of_an_ended_process_is_found_and_loaded(tmp_path: Path) -> None:
    source = tmp_path / "cedar.json"
    path = autosave.write_recovery(building(), source, pid=_dead_pid())
    assert path.exists()
    found = autosave.find_recoveries()
    assert [r.path for r in found] == [path]
    assert found[0].source_path == source and found[0].saved_at_text
    assert autosave.load_recovery(found[0]) == building()
    autosave.discard_recovery(found[0])
    assert not autosave.find_recoveries() and not list(autosave.recovery_dir().iterdir())


def test_own_recovery_is_not_offered_while_running() -> None:
    autosave.write_recovery(building(), None)
    assert autosave.find_recoveries() == []
    assert len(autosave.find_recoveries(include_running=True)) == 1
    autosave.discard_recovery()
    assert autosave.find_recoveries(include_running=True) == []


def test_a_recovery_without_its_note_is_still_found() -> None:
    path = autosave.write_recovery(building(), None, pid=_dead_pid())
    path.with_name(path.stem + ".meta.json").unlink()
    (found,) = autosave.find_recoveries()
    assert found.source_path is None and found.pid == _dead_pid()
