"""Recovery copies (no Qt): written atomically, one per file and window, found only once the app
that wrote them has ended, deleted one at a time; the schedule that writes them during steady
editing."""

from __future__ import annotations

import subprocess
import sys
import textwrap
from pathlib import Path

import pytest
from hypothesis import given
from hypothesis import strategies as st

from petfall_audit.editing import autosave
from petfall_audit.model import Building, BuildingInfo, Facade, Floor


def building(name: str = "Cedar Flats (invented)") -> Building:
    return Building(info=BuildingInfo(name=name),
                    floors=(Floor(0, "Ground", 0.0),), facades=(Facade("west", 9.0),))


def test_folder_comes_from_the_environment(_isolated_settings: Path) -> None:
    assert autosave.settings_dir() == _isolated_settings
    assert autosave.recovery_dir().parent == _isolated_settings


def test_recovery_of_an_ended_app_is_found_and_loaded(tmp_path: Path) -> None:
    source = tmp_path / "cedar.json"
    path = autosave.write_recovery(building(), source, owner="ended-app")
    assert path.exists()
    found = autosave.find_recoveries()
    assert [r.path for r in found] == [path]
    assert found[0].source_path == source and found[0].saved_at_text
    assert found[0].building_name == "Cedar Flats (invented)"
    assert autosave.load_recovery(found[0]) == building()
    autosave.discard_recovery(found[0])
    assert not autosave.find_recoveries() and not list(autosave.recovery_dir().glob("*.json"))


def test_own_copy_is_not_offered_while_running() -> None:
    copy = autosave.RecoveryCopy()
    copy.write(building(), None)
    assert autosave.find_recoveries() == []
    assert len(autosave.find_recoveries(include_running=True)) == 1
    copy.discard()
    assert autosave.find_recoveries(include_running=True) == []


def test_copies_of_two_files_and_two_windows_are_kept_apart(tmp_path: Path) -> None:
    a, b = autosave.RecoveryCopy(), autosave.RecoveryCopy()
    pa = a.write(building("A"), tmp_path / "a.json")
    pb = b.write(building("B"), tmp_path / "b.json")
    pu1 = autosave.RecoveryCopy().write(building("U1"), None)
    pu2 = autosave.RecoveryCopy().write(building("U2"), None)
    assert len({pa, pb, pu1, pu2}) == 4
    a.discard()  # one window's work saved: the other copies stay
    assert not pa.exists() and pb.exists() and pu1.exists() and pu2.exists()
    # a window that moves to another file replaces its own copy, nobody else's
    pb2 = b.write(building("B"), tmp_path / "b2.json")
    assert pb2 != pb and not pb.exists() and pb2.exists() and pu1.exists()


def test_a_copy_is_named_by_its_file_not_by_a_process_id(tmp_path: Path) -> None:
    path = autosave.write_recovery(building(), tmp_path / "cedar.json", owner="ended-app")
    assert path.name.startswith(autosave.file_key(tmp_path / "cedar.json") + ".")
    assert autosave.file_key(tmp_path / "cedar.json") != autosave.file_key(tmp_path / "oak.json")
    assert autosave.file_key(None) == "untitled"


def test_a_recovery_without_its_note_is_still_found() -> None:
    path = autosave.write_recovery(building(), None, owner="ended-app")
    path.with_name(path.stem + ".meta.json").unlink()
    (found,) = autosave.find_recoveries()
    assert found.source_path is None and found.path == path


def test_a_copy_of_another_running_app_is_not_offered_until_it_ends(tmp_path: Path) -> None:
    """A second process takes its lock and writes a copy; while it runs the copy is not offered
    (whatever its process id), once it is killed the copy is, and its lock file is swept."""
    script = textwrap.dedent("""
        import sys
        from pathlib import Path
        from petfall_audit.editing import autosave
        from petfall_audit.model import Building, BuildingInfo, Facade, Floor
        b = Building(info=BuildingInfo(name="Other app"), floors=(Floor(0, "G", 0.0),),
                     facades=(Facade("west", 9.0),))
        autosave.write_recovery(b, Path(sys.argv[1]))
        print("written", flush=True)
        sys.stdin.read()
    """)
    with subprocess.Popen([sys.executable, "-c", script, str(tmp_path / "other.json")],
                          stdin=subprocess.PIPE, stdout=subprocess.PIPE, text=True) as proc:
        try:
            assert proc.stdout is not None and proc.stdout.readline().strip() == "written"
            assert autosave.find_recoveries() == []
            (running,) = autosave.find_recoveries(include_running=True)
            assert (autosave.recovery_dir() / f"{running.owner}.lock").exists()
        finally:
            proc.kill()  # like a crash: no chance to clean up
            proc.wait(timeout=30)
    (found,) = autosave.find_recoveries()
    assert found.building_name == "Other app" and found.source_path == tmp_path / "other.json"
    assert not (autosave.recovery_dir() / f"{found.owner}.lock").exists()  # swept


# --- the schedule ---------------------------------------------------------------------------------

def test_a_pause_writes_after_the_idle_delay() -> None:
    s = autosave.AutosaveSchedule(idle_s=0.3, max_wait_s=0.8)
    assert s.edited(10.0) == pytest.approx(0.3)
    s.written()
    assert not s.pending


def test_steady_editing_is_written_within_the_maximum_wait() -> None:
    # edits every 0.2 s, faster than the idle delay: the old idle-only timer never fired
    s = autosave.AutosaveSchedule(idle_s=0.3, max_wait_s=0.8)
    deadlines = [t + s.edited(t) for t in (0.0, 0.2, 0.4, 0.6, 0.8)]
    assert deadlines == pytest.approx([0.3, 0.5, 0.7, 0.8, 0.8])
    s.written()  # the timer fired at 0.8 s
    assert 1.0 + s.edited(1.0) == pytest.approx(1.3)


@given(st.lists(st.floats(0, 10), min_size=1, max_size=40),
       st.floats(0, 2), st.floats(0, 2))
def test_no_edit_waits_longer_than_the_maximum(gaps: list[float], idle: float,
                                               wait: float) -> None:
    s = autosave.AutosaveSchedule(idle_s=idle, max_wait_s=wait)
    t = 0.0
    first: float | None = None
    deadline = 0.0
    for gap in gaps:
        t += gap
        if first is not None and t >= deadline:
            s.written()  # the timer fired before this edit
            first = None
        first = t if first is None else first
        deadline = t + s.edited(t)
        assert deadline - first <= max(idle, wait) + 1e-9
        assert deadline - t <= idle + 1e-9


def test_negative_delays_are_refused() -> None:
    with pytest.raises(ValueError):
        autosave.AutosaveSchedule(idle_s=-1)
