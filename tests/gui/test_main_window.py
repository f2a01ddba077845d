"""The main window, offscreen: edits update results, undo, copy floor, bulk edit, files,
invalid input, recovery and closing with unsaved work."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

import pytest
from PySide6.QtCore import Qt
from PySide6.QtWidgets import QLabel, QLineEdit, QTextBrowser

from petfall_audit.cautions import CAUTIONS, CAUTIONS_SHORT
from petfall_audit.demo import sample_building
from petfall_audit.editing import autosave
from petfall_audit.editing.document import Document
from petfall_audit.editing.query import select_openings
from petfall_audit.gui.dialogs import BulkEditDialog, CautionsDialog, CopyFloorDialog, Prompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.settings import AppSettings
from petfall_audit.io.building_file import load_building, save_building
from petfall_audit.model import Building, Floor, OpeningKind

pytestmark = pytest.mark.gui

SAMPLES = 64  # few simulated falls keep these tests fast; the ranking logic is the same


class FakePrompts(Prompts):
    """Answers every question at once and records what was asked."""

    def __init__(self) -> None:
        self.asked: list[str] = []
        self.save_answer = "discard"
        self.recover_answer = True
        self.save_to: Path | None = None
        self.errors: list[str] = []

    def ask_save_changes(self, parent: Any, name: str) -> str:
        self.asked.append(f"save {name}")
        return self.save_answer

    def ask_recover(self, parent: Any, recovery: Any) -> bool:
        self.asked.append("recover")
        return self.recover_answer

    def save_path(self, parent: Any, suggested: Path) -> Path | None:
        return self.save_to

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)

    def show_cautions(self, parent: Any, *, about: bool = False) -> None:
        self.asked.append("cautions")


def make_window(qtbot, building: Building | None = None, **kwargs: Any) -> MainWindow:  # type: ignore[no-untyped-def]
    kwargs.setdefault("refine_samples", 0)  # one set of results per edit, unless a test asks
    window = MainWindow(Document(building or sample_building("walkup")), prompts=FakePrompts(),
                        samples=SAMPLES, **kwargs)
    qtbot.addWidget(window)
    window.show()
    qtbot.waitUntil(lambda: not window.results_stale, timeout=20000)
    return window


def result_of(window: MainWindow, opening_id: str) -> Any:
    return window.state.results.assessment.result(opening_id)


def test_sample_opens_and_results_fill_the_ranked_table(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot, sample_building("tower"))
    model = window.views.ranked.proxy  # as shown: sorted worst first
    assert model.rowCount() == len(window.document.building.openings) == 166
    ranks = [int(model.data(model.index(r, 0))) for r in range(model.rowCount())]
    assert ranks == sorted(ranks) and ranks[0] == 1
    assert model.data(model.index(0, 7)).startswith("1 in ")  # likelihood
    assert model.data(model.index(0, 9)).endswith(" m/s")  # impact speed
    assert window.document.building.info.name in window.windowTitle()
    assert not window.isWindowModified()


def test_editing_an_opening_updates_results_and_undo_restores_exactly(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    doc = window.document
    original = doc.building
    worst = window.views.ranked.row_result(0)
    assert worst.one_in_n < float("inf")
    panel = window.openings_panel
    panel.select_ids([worst.id])
    assert panel.form_title.text() == f"Opening {worst.id}"
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert panel.form.commit_text("netting_mesh_mm", "20 mm")
    assert doc.building.opening(worst.id).netting_mesh_mm == 20.0
    assert window.isWindowModified()
    assert result_of(window, worst.id).annual_probability < worst.annual_probability
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.actions_.undo.trigger()
    assert doc.building is original
    assert not window.isWindowModified()
    assert result_of(window, worst.id).annual_probability == worst.annual_probability
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.actions_.redo.trigger()
    assert doc.building.opening(worst.id).netting_mesh_mm == 20.0


def test_table_cell_edit_goes_through_the_history(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    model = window.openings_panel.model
    col = model.column_of("perch_height_m")
    first = model.key_of_row(0)
    assert model.setData(model.index(0, col), "42 in", Qt.ItemDataRole.EditRole)
    assert window.document.building.opening(first).perch_height_m == pytest.approx(1.0668)
    # the field in the user's words, as the registry names it (not "perch height m")
    assert window.history.undo_label == f"Set rail or sill height of {first}"


def test_invalid_input_shows_an_error_and_keeps_the_old_value(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    panel = window.openings_panel
    opening_id = window.document.building.openings[0].id
    panel.select_ids([opening_id])
    before = window.document.building
    form = panel.form
    assert not form.commit_text("width_m", "wide")  # cannot be read
    assert "wide" in form.error_text("width_m")
    editor = form.editor("width_m")
    assert isinstance(editor, QLineEdit) and editor.text() == "wide"  # shown where it is
    error_label = form.findChild(QLabel, "error_width_m")
    assert error_label is not None and error_label.isVisibleTo(form)
    assert not form.commit_text("width_m", "-2 m")  # read, but the building refuses it
    assert form.error_text("width_m")
    assert window.document.building is before and not window.history.can_undo
    assert form.commit_text("width_m", "1.5 m")  # corrected: the error goes away
    assert form.error_text("width_m") == ""
    # the same in a table cell: nothing changes, the reason is shown above the table
    model = panel.model
    assert not model.setData(model.index(0, model.column_of("width_m")), "abc")
    assert panel.table_error.isVisibleTo(panel) and "Esc keeps the old" in panel.table_error.text()


def test_copy_a_typical_floor_to_ten_levels(qtbot) -> None:  # type: ignore[no-untyped-def]
    b = sample_building("walkup")
    floors = tuple(b.floors) + tuple(
        Floor(lv, f"Level {lv}", b.floors[-1].elevation_m + 3.0 * (lv - b.floors[-1].level))
        for lv in range(b.floors[-1].level + 1, b.floors[-1].level + 8))
    tall = dataclasses.replace(b, floors=floors)
    window = make_window(qtbot, tall)
    source = 1
    n_source = sum(o.floor == source for o in tall.openings)
    targets = [f.level for f in floors if f.level > source][:10]
    assert len(targets) == 10
    dialog = CopyFloorDialog(window.document.building, source)
    dialog.replace.setChecked(True)
    dialog.last.setValue(targets[-1])
    req = dialog.request()
    assert req.level == source and tuple(targets) == req.to_levels
    assert "new openings" in dialog.summary.text()
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert window.copy_floor(req.level, req.to_levels, id_pattern=req.id_pattern,
                                 replace_existing=True) is None
    after = window.document.building
    for level in targets:
        assert sum(o.floor == level for o in after.openings) == n_source
    assert window.openings_panel.model.rowCount() == len(after.openings)
    assert window.views.ranked.model.rowCount() == len(after.openings)
    window.undo()
    assert window.document.building is tall


def test_bulk_edit_netting_on_all_south_balconies(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot, sample_building("block"))
    b = window.document.building
    dialog = BulkEditDialog(b, [], "metric")
    dialog.facade.setCurrentIndex(dialog.facade.findData("south"))
    dialog.kind.setCurrentIndex(dialog.kind.findData(OpeningKind.BALCONY))
    dialog.field.setCurrentIndex(dialog.field.findData("netting_mesh_mm"))
    dialog.value.setText("30 mm")
    dialog._on_accept()
    req = dialog.request()
    expected = select_openings(b, facades=["south"], kinds=["balcony"])
    assert req is not None and list(req.ids) == expected and len(expected) > 3
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert window.bulk_edit(req.ids, req.field, req.value) is None
    after = window.document.building
    assert all(after.opening(i).netting_mesh_mm == 30.0 for i in expected)
    others = [o for o in after.openings if o.id not in expected]
    assert all(o == b.opening(o.id) for o in others)
    assert window.history.undo_label == f"Set netting mesh on {len(expected)} openings"
    assert sorted(window.openings_panel.selected_ids()) == sorted(expected)
    # a bad value in the dialog is shown there and nothing is requested
    bad = BulkEditDialog(b, expected[:2], "metric")
    bad.field.setCurrentIndex(bad.field.findData("width_m"))
    bad.value.setText("lots")
    bad._on_accept()
    assert bad.request() is None and bad.error.text().startswith("!")


def test_several_selected_rows_are_edited_together_in_the_form(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    panel = window.openings_panel
    ids = [o.id for o in window.document.building.openings[:3]]
    panel.select_ids(ids)
    assert "3 openings" in panel.form_title.text()
    assert not panel.form.editor("id").isEnabled()
    assert panel.form.commit_text("limiter_gap_mm", "4 in")
    assert all(window.document.building.opening(i).limiter_gap_mm == pytest.approx(101.6)
               for i in ids)
    assert len(window.history.labels()) == 1


def test_save_reopen_equal_and_recent_files(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    panel = window.openings_panel
    panel.select_ids([window.document.building.openings[2].id])
    panel.form.commit_text("notes", "planter by the rail")
    window.prompts.save_to = tmp_path / "walkup-audit.json"
    assert window.isWindowModified()
    assert window.session.save()  # no file yet: asks where, then saves
    assert not window.isWindowModified()
    assert "walkup-audit.json" in window.windowTitle()
    edited = window.document.building
    assert load_building(tmp_path / "walkup-audit.json") == edited
    other = make_window(qtbot)
    assert other.session.open_file(tmp_path / "walkup-audit.json")
    assert other.document.building == edited and not other.document.dirty
    assert AppSettings().recent_files()[0] == (tmp_path / "walkup-audit.json").resolve()


def test_a_broken_file_is_reported_and_the_work_kept(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    before = window.document
    bad = tmp_path / "broken.json"
    bad.write_text("{not json", encoding="utf-8")
    assert not window.session.open_file(bad)
    assert window.document is before and window.prompts.errors


def test_a_file_with_problems_names_each_place_in_words(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    import json

    window = make_window(qtbot)
    good = tmp_path / "good.json"
    save_building(sample_building("walkup"), good)
    doc = json.loads(good.read_text(encoding="utf-8"))
    doc["openings"][12]["floor"] = 42  # no such level
    doc["floors"][2]["elevation_m"] = doc["floors"][1]["elevation_m"] - 0.5  # below the last
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps(doc), encoding="utf-8")
    assert not window.session.open_file(bad)
    (text,) = window.prompts.errors
    opening = doc["openings"][12]["id"]
    assert f"Opening {opening}, floor: level 42 does not exist" in text
    assert doc["floors"][2]["label"] in text
    assert "openings[" not in text and "floors[" not in text  # no file paths for people


def test_recovery_file_after_edits_is_offered_on_the_next_start(qtbot, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot, autosave_delay_ms=10)
    panel = window.openings_panel
    panel.select_ids([window.document.building.openings[0].id])
    panel.form.commit_text("width_m", "1.3 m")
    qtbot.waitUntil(lambda: bool(autosave.find_recoveries(include_running=True)), timeout=5000)
    edited = window.document.building
    # the next start after a crash: the app that wrote the copy is gone (only this patch is
    # undone below: the test's own settings folder stays in place)
    with monkeypatch.context() as crashed:
        crashed.setattr(autosave, "_owner_running", lambda owner, pid: False)
        second = make_window(qtbot)
        assert second.session.offer_recovery()
        assert second.prompts.asked == ["recover"]
        assert second.document.building == edited
        assert second.document.dirty and second.isWindowModified()
        assert autosave.find_recoveries(include_running=True)  # its own copy, not the old one
    assert autosave.find_recoveries() == []
    # saving or reverting to the saved state removes the recovery copy
    window.undo()
    assert not window.document.dirty


def test_declined_recovery_is_discarded(qtbot, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    autosave.write_recovery(sample_building("walkup"), None, owner="ended-app")
    window = make_window(qtbot)
    window.prompts.recover_answer = False
    assert not window.session.offer_recovery()
    assert autosave.find_recoveries() == []
    assert not window.session.offer_recovery() and window.prompts.asked == ["recover"]


def test_closing_with_unsaved_work_asks_first(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    window.close()  # nothing to save: no question
    assert window.prompts.asked == []
    window = make_window(qtbot)
    panel = window.openings_panel
    panel.select_ids([window.document.building.openings[0].id])
    panel.form.commit_text("width_m", "1.4 m")
    window.prompts.save_answer = "cancel"
    assert not window.close()
    assert window.isVisible() and len(window.prompts.asked) == 1
    window.prompts.save_answer = "discard"
    assert window.close()
    assert len(window.prompts.asked) == 2


def test_new_document_asks_and_starts_clean(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    panel = window.openings_panel
    panel.select_ids([window.document.building.openings[0].id])
    panel.form.commit_text("width_m", "1.4 m")
    window.prompts.save_answer = "cancel"
    assert not window.session.new()
    window.prompts.save_answer = "discard"
    assert window.session.new()
    assert window.document.building.openings == () and not window.history.can_undo


def test_imperial_units_show_and_read_feet_and_inches(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    window.actions_.imperial.trigger()
    assert AppSettings().units == "imperial"  # persists
    panel = window.openings_panel
    opening_id = window.document.building.openings[0].id
    panel.select_ids([opening_id])
    editor = panel.form.editor("perch_height_m")
    assert isinstance(editor, QLineEdit) and editor.text().endswith(" in")
    assert panel.form.commit_text("perch_height_m", "3 ft 6 in")
    assert window.document.building.opening(opening_id).perch_height_m == pytest.approx(1.0668)
    ranked = window.views.ranked.proxy
    assert ranked.data(ranked.index(0, 9)).endswith("mph")  # impact speed
    window.set_units("metric")
    assert panel.form.editor("perch_height_m").text() == "1.067 m"


def test_results_are_marked_stale_and_older_runs_are_dropped(qtbot) -> None:  # type: ignore[no-untyped-def]
    import threading

    from petfall_audit.risk import assess

    gate = threading.Event()
    calls: list[str] = []

    def slow_assess(building: Building, **kwargs: Any) -> Any:
        calls.append(building.openings[0].notes)
        if building.openings[0].notes == "first":
            gate.wait(10)  # held until the second edit has been made
            kwargs["progress"](0, 1)  # a newer request exists: this run stops here
        return assess(building, **kwargs)

    window = make_window(qtbot, assess=slow_assess)
    panel = window.openings_panel
    panel.select_ids([window.document.building.openings[0].id])
    received: list[Any] = []
    window.results_updated.connect(received.append)
    panel.form.commit_text("notes", "first")
    assert window.results_stale
    qtbot.waitUntil(lambda: calls[-1:] == ["first"], timeout=5000)
    panel.form.commit_text("notes", "second")
    gate.set()
    qtbot.waitUntil(lambda: bool(received), timeout=20000)
    qtbot.wait(50)
    assert len(received) == 1
    assert received[0].building.openings[0].notes == "second"
    assert not window.results_stale


def test_cautions_are_in_the_window_and_in_the_dialog(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    assert CAUTIONS_SHORT in window.cautions_banner.text()
    assert window.cautions_banner.isVisible()
    window.cautions_banner.linkActivated.emit("#cautions")
    assert window.prompts.asked == ["cautions"]
    dialog = CautionsDialog(window, about=True)
    qtbot.addWidget(dialog)
    browser = dialog.findChild(QTextBrowser, "cautions_text")
    assert browser is not None
    text = browser.toPlainText()
    for caution in CAUTIONS:
        assert caution in text


def test_settings_persist_contact_block_and_palette(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    window.settings.set_contact({"organisation": "Riverside Cat Rescue (invented)",
                                 "phone": "0000 000000"})
    window.set_palette("grey")
    window.settings.sync()
    again = AppSettings()
    assert again.contact()["organisation"] == "Riverside Cat Rescue (invented)"
    assert again.palette == "grey"


# --- progressive refinement ------------------------------------------------------------------


def _same_results(shown: Any, expected: Any, ids: list[str]) -> None:
    for opening_id in ids:
        got, want = shown.result(opening_id), expected.result(opening_id)
        assert (got.rank, got.risk_rank, got.expected_band) == (
            want.rank, want.risk_rank, want.expected_band), opening_id
        assert got.risk == want.risk, opening_id


def test_quick_results_are_refined_to_the_full_assessment(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.editing.commands import SetBuildingInfo
    from petfall_audit.risk import assess

    window = make_window(qtbot, refine_samples=4000, refine_delay_ms=0)
    qtbot.waitUntil(lambda: window.results_samples == 4000, timeout=20000)
    first = window.document.building.openings[0].id
    notes: list[str] = []
    window.recomputer.refining.connect(lambda _g: notes.append(window.samples_label.text()))
    # what the status bar says as each set of results is shown (with no pause before the
    # refinement, it may already have started when the wait below returns)
    shown_with: list[tuple[int, str]] = []
    window.results_updated.connect(
        lambda a: shown_with.append((a.samples, window.samples_label.text())))
    # a new site altitude changes the air, so every fall: quick results first
    altitude = window.document.building.info.site_altitude_m + 800.0
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.history.push(SetBuildingInfo({"site_altitude_m": altitude}))
    assert shown_with[0][0] == SAMPLES
    assert "(quick)" in shown_with[0][1]
    refined: list[Any] = []
    window.results_refined.connect(refined.append)
    qtbot.waitUntil(lambda: window.results_samples == 4000, timeout=20000)
    assert notes and notes[-1].endswith("refining…")
    assert window.samples_label.text() == "4000 simulated falls per opening"
    assert not window.results_stale
    shown = window.state.results.assessment
    assert not refined or refined[-1] is shown
    # the same numbers as the command line and the report: assess(samples=4000, seed=1)
    expected = assess(window.document.building, samples=4000, seed=1)
    ids = [r.id for r in expected.ranked()[:5]] + [first]
    _same_results(shown, expected, ids)
    assert shown.samples == 4000


def test_an_edit_of_few_openings_gives_the_full_results_at_once(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.risk import assess

    window = make_window(qtbot, refine_samples=4000, refine_delay_ms=0)
    qtbot.waitUntil(lambda: window.results_samples == 4000, timeout=20000)
    first = window.document.building.openings[0].id
    quick: list[Any] = []
    window.recomputer.finished.connect(lambda _g, a, _s: quick.append(a))
    # netting changes the likelihood only: no fall is simulated again, no quick run is needed
    with qtbot.waitSignal(window.results_refined, timeout=20000) as refined:
        window.bulk_edit([first], "netting_mesh_mm", 20.0)
    assert quick == []
    assert window.results_samples == 4000 and not window.results_stale
    assert window.samples_label.text() == "4000 simulated falls per opening"
    assert "ranked" in window.results_state.text()
    shown = refined.args[0]
    assert shown.building.opening(first).netting_mesh_mm == 20.0
    # equal to a full recompute of the edited building (every opening, to the last bit)
    expected = assess(window.document.building, samples=4000, seed=1)
    assert shown.openings == expected.openings


def test_a_newer_edit_discards_the_running_refinement(qtbot) -> None:  # type: ignore[no-untyped-def]
    import time

    from petfall_audit.risk import assess

    def slow_refinement(building: Building, **kwargs: Any) -> Any:
        if kwargs["samples"] > SAMPLES:
            time.sleep(0.3)  # the next edit arrives meanwhile
        return assess(building, **kwargs)

    window = make_window(qtbot, assess=slow_refinement, refine_samples=2000, refine_delay_ms=0)
    qtbot.waitUntil(lambda: window.results_samples == 2000, timeout=20000)
    refined: list[Any] = []
    window.results_refined.connect(refined.append)
    first = window.document.building.openings[0].id
    with qtbot.waitSignal(window.recomputer.refining, timeout=20000):
        window.bulk_edit([first], "netting_mesh_mm", 20.0)
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.bulk_edit([first], "netting_mesh_mm", 30.0)  # the refinement above is now stale
    assert window.results_samples == SAMPLES
    qtbot.waitUntil(lambda: bool(refined), timeout=20000)
    qtbot.wait(400)
    assert len(refined) == 1
    assert refined[0].building.opening(first).netting_mesh_mm == 30.0
    assert refined[0].building is window.document.building


# --- room for the results, closing -------------------------------------------------------------


def test_the_views_get_most_of_the_height_and_the_split_is_remembered(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot, sample_building("tower"))
    window.resize(1366, 768)
    qtbot.wait(50)
    # every editor tab can shrink (the panels scroll), so the views can take the room
    assert window.editor_tabs.minimumSizeHint().height() < 120
    editors, views = window.splitter.sizes()
    assert views > editors > 150
    window.splitter.setSizes([120, editors + views - 120])
    window.close()
    again = MainWindow(Document(sample_building("walkup")), prompts=FakePrompts(),
                       samples=SAMPLES, refine_samples=0)
    qtbot.addWidget(again)
    again.resize(1366, 768)
    again.show()
    qtbot.wait(50)
    assert again.splitter.sizes()[0] == 120
    again.close()


def test_closing_stops_the_background_work(qtbot) -> None:  # type: ignore[no-untyped-def]
    import threading

    window = make_window(qtbot, refine_samples=4000, refine_delay_ms=0)
    window.bulk_edit([window.document.building.openings[0].id], "netting_mesh_mm", 20.0)
    window.document.dirty = False
    window.close()
    assert not window.recomputer.running and not window.recomputer.refining_now
    alive = [t.name for t in threading.enumerate() if t.name.startswith("petfall-")]
    assert alive == []
    window.recomputer.request(window.document.building)  # ignored once closed
    assert not window.recomputer.running
