"""The window's state and file session without Qt: the selection, options and results objects
the views follow, the workspace's edits and plan settings, and new / open / save / save as /
recovery answered by a scripted user."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

from petfall_audit.editing import autosave
from petfall_audit.editing.commands import AddFloor, SetBuildingInfo, SetPlanSettings
from petfall_audit.editing.document import Document
from petfall_audit.editing.session import FileSession
from petfall_audit.editing.state import (
    CurrentResults,
    DisplayOptions,
    Event,
    Selection,
    Workspace,
)
from petfall_audit.io.building_file import load_building, save_building
from petfall_audit.model import Building, BuildingInfo, Facade, Floor, PlanSettings


def building(name: str = "Linden Court (invented)") -> Building:
    return Building(info=BuildingInfo(name=name),
                    floors=(Floor(0, "Ground", 0.0),), facades=(Facade("east", 12.0),))


class ScriptedUser:
    """Answers a session's questions from its attributes and records them."""

    def __init__(self) -> None:
        self.asked: list[str] = []
        self.save_answer = "discard"
        self.recover_answer = True
        self.overwrite_answer = True
        self.open_answer: Path | None = None
        self.save_answer_path: Path | None = None
        self.errors: list[str] = []

    def ask_save_changes(self, name: str) -> str:
        self.asked.append(f"save {name}")
        return self.save_answer

    def ask_overwrite_changed(self, name: str) -> bool:
        self.asked.append(f"overwrite {name}")
        return self.overwrite_answer

    def ask_recover(self, recovery: autosave.Recovery) -> bool:
        self.asked.append(f"recover {recovery.building_name}")
        return self.recover_answer

    def open_path(self, folder: Path | None) -> Path | None:
        return self.open_answer

    def save_path(self, suggested: Path) -> Path | None:
        self.asked.append(f"save as {suggested.name}")
        return self.save_answer_path

    def show_error(self, title: str, text: str) -> None:
        self.errors.append(f"{title}: {text}")


def session_on(b: Building | None = None, path: Path | None = None,
               **kwargs: Any) -> tuple[FileSession, ScriptedUser, list[str]]:
    user = ScriptedUser()
    session = FileSession(Workspace(Document(b or building(), path)), user,
                          new_building=lambda: building("New building"), **kwargs)
    statuses: list[str] = []
    session.status.connect(statuses.append)
    return session, user, statuses


# --- the state objects ---------------------------------------------------------------------------


def test_events_call_back_in_order_and_disconnect() -> None:
    seen: list[Any] = []
    event: Event[int] = Event()
    first = event.connect(lambda v: seen.append(("a", v)))
    event.connect(lambda v: seen.append(("b", v)))
    event.emit(1)
    first()
    event.emit(2)
    assert seen == [("a", 1), ("b", 1), ("b", 2)]


def test_selection_keeps_order_drops_duplicates_and_tells_only_changes() -> None:
    selection = Selection()
    seen: list[tuple[str, ...]] = []
    selection.changed.connect(seen.append)
    selection.set_ids(["B2", "A1", "B2"])
    selection.set_ids(("B2", "A1"))
    assert seen == [("B2", "A1")] and selection.current == "B2"
    selection.set_ids([])
    assert selection.current is None and seen[-1] == ()


def test_options_and_results_tell_their_changes() -> None:
    options = DisplayOptions()
    changes: list[None] = []
    options.changed.connect(lambda: changes.append(None))
    options.units = "imperial"
    options.units = "imperial"
    options.palette = "grey"
    assert len(changes) == 2 and (options.units, options.palette) == ("imperial", "grey")

    results = CurrentResults(final_samples=256)
    events: list[Any] = []
    results.stale_changed.connect(lambda s: events.append(("stale", s)))
    results.assessment_changed.connect(lambda a: events.append(("new", a)))
    assert results.stale and not results.is_final
    results.set_assessment("quick", 32)
    assert not results.is_final
    results.set_stale()
    results.set_stale()  # told once
    results.set_assessment("full", 256)
    assert results.is_final
    assert events == [("stale", False), ("new", "quick"), ("stale", True),
                      ("stale", False), ("new", "full")]


def test_workspace_pushes_edits_in_words_and_tells_plan_settings() -> None:
    workspace = Workspace(Document(building()))
    pushed: list[tuple[str, str | None]] = []
    plans: list[PlanSettings] = []
    workspace.pushed.connect(pushed.append)
    workspace.plan_settings_changed.connect(plans.append)
    assert workspace.push(SetBuildingInfo({"name": "Renamed"})) is None
    assert workspace.document.building.info.name == "Renamed"
    assert workspace.push(SetPlanSettings(PlanSettings(budget=4000.0, currency="EUR"))) is None
    assert plans[-1].budget == 4000.0 and workspace.plan_settings.budget == 4000.0
    reason = workspace.push(AddFloor(Floor(0, "Second ground floor", 0.0)))
    assert reason is not None and "already a floor at level 0" in reason
    assert [r is None for _, r in pushed] == [True, True, False]
    # another document: a fresh history, its plan settings told
    loaded: list[Document] = []
    workspace.loaded.connect(loaded.append)
    other = Document(building("Other"))
    workspace.load(other)
    assert loaded == [other] and not workspace.history.can_undo
    assert plans[-1] == other.building.plan


# --- the file session ----------------------------------------------------------------------------


def test_save_asks_for_a_file_once_then_saves_there(tmp_path: Path) -> None:
    session, user, statuses = session_on()
    session.workspace.push(SetBuildingInfo({"name": "Edited"}))
    user.save_answer_path = tmp_path / "linden.json"
    assert session.save()
    assert user.asked == ["save as Edited.json"]
    assert load_building(tmp_path / "linden.json") == session.document.building
    assert not session.document.dirty and statuses[-1] == "Saved linden.json"
    session.workspace.push(SetBuildingInfo({"name": "Edited twice"}))
    assert session.save() and user.asked == ["save as Edited.json"]  # not asked again


def test_a_cancelled_save_as_keeps_the_old_file(tmp_path: Path) -> None:
    path = tmp_path / "a.json"
    save_building(building(), path)
    session, user, _ = session_on(load_building(path), path)
    user.save_answer_path = None
    assert not session.save_as()
    assert session.document.path == path


def test_saving_over_a_file_changed_elsewhere_asks_first(tmp_path: Path) -> None:
    path = tmp_path / "b.json"
    save_building(building(), path)
    session, user, _ = session_on(load_building(path), path)
    save_building(building("Written by someone else"), path)
    user.overwrite_answer = False
    assert not session.save()
    assert load_building(path).info.name == "Written by someone else"
    user.overwrite_answer = True
    assert session.save() and user.asked == ["overwrite b.json"] * 2


def test_open_asks_about_unsaved_work_and_keeps_it_on_a_bad_file(tmp_path: Path) -> None:
    session, user, _ = session_on()
    session.workspace.push(SetBuildingInfo({"name": "Unsaved"}))
    bad = tmp_path / "bad.json"
    bad.write_text("{not json")
    user.save_answer = "cancel"
    assert not session.open_file(bad)
    assert user.asked == ["save Unsaved"] and not user.errors  # cancelled: not even read
    user.save_answer = "discard"
    assert not session.open_file(bad)
    assert user.errors and user.errors[0].startswith("Cannot open the building file: bad.json")
    assert session.document.building.info.name == "Unsaved"  # kept
    good = tmp_path / "good.json"
    save_building(building("From disk"), good)
    remembered: list[Path] = []
    session._remember = remembered.append  # the recent list
    user.open_answer = good
    assert session.open_dialog()
    assert session.document.building.info.name == "From disk" and remembered == [good]


def test_new_replaces_the_work_only_when_allowed() -> None:
    session, user, _ = session_on()
    session.workspace.push(SetBuildingInfo({"name": "Unsaved"}))
    user.save_answer = "cancel"
    assert not session.new() and session.document.building.info.name == "Unsaved"
    user.save_answer = "discard"
    assert session.new() and session.document.building.info.name == "New building"


def test_the_recovery_copy_follows_the_work_and_goes_when_saved(tmp_path: Path) -> None:
    session, _, _ = session_on(idle_s=0.5, max_wait_s=1.0)
    assert session.autosave_now() is None  # nothing unsaved: no copy
    session.workspace.push(SetBuildingInfo({"name": "Edited"}))
    assert session.edited(100.0) == pytest.approx(0.5)  # after a pause...
    assert session.edited(100.6) <= 0.5  # ...or within the longest wait
    copy = session.autosave_now()
    assert copy is not None and copy.exists()
    mine = [r for r in autosave.find_recoveries(include_running=True) if r.path == copy]
    assert len(mine) == 1 and autosave.load_recovery(mine[0]) == session.document.building
    assert session.save_as(tmp_path / "edited.json")
    assert not copy.exists()


def test_recovered_work_opens_here_and_further_copies_elsewhere(tmp_path: Path) -> None:
    first = autosave.write_recovery(building("Crashed one"), tmp_path / "one.json",
                                    owner="ended-app-1")
    second = autosave.write_recovery(building("Crashed two"), tmp_path / "two.json",
                                     owner="ended-app-2")
    others: list[FileSession] = []

    def elsewhere(doc: Document) -> FileSession:
        other = FileSession(Workspace(doc), ScriptedUser(), new_building=building)
        others.append(other)
        return other

    session, user, _ = session_on(open_elsewhere=elsewhere)
    assert session.offer_recovery()
    assert sorted(user.asked) == ["recover Crashed one", "recover Crashed two"]
    names = {session.document.building.info.name, others[0].document.building.info.name}
    assert names == {"Crashed one", "Crashed two"}
    assert session.document.dirty and others[0].document.dirty  # recovered, not saved
    # each now holds its own copy; the crashed apps' copies are gone
    assert not first.exists() and not second.exists()
    assert session.recovery.path is not None and session.recovery.path.exists()
    assert others[0].recovery.path is not None and others[0].recovery.path.exists()


def test_without_another_window_a_second_copy_waits_for_the_next_start(tmp_path: Path) -> None:
    autosave.write_recovery(building("Crashed"), tmp_path / "c.json", owner="ended-app")
    session, user, _ = session_on()
    session.workspace.push(SetBuildingInfo({"name": "Unsaved here"}))
    assert not session.offer_recovery()
    assert user.asked == [] and len(autosave.find_recoveries()) == 1  # kept, not offered
    assert session.document.building.info.name == "Unsaved here"


def test_declined_copies_are_deleted_and_damaged_ones_explained(tmp_path: Path) -> None:
    declined = autosave.write_recovery(building("Declined"), tmp_path / "d.json", owner="x-1")
    session, user, _ = session_on()
    user.recover_answer = False
    assert not session.offer_recovery() and not declined.exists()
    damaged = autosave.write_recovery(building("Damaged"), tmp_path / "e.json", owner="x-2")
    damaged.write_text("{broken")
    user.recover_answer = True
    assert [r.path for r in autosave.find_recoveries()] == [damaged]  # still offered
    assert not session.offer_recovery()
    assert user.errors and "damaged" in user.errors[-1]
    assert not autosave.find_recoveries()
    assert session.document.building.info.name == "Linden Court (invented)"
