"""The app driven as a demanding user would, offscreen: an empty building in every view, refused
edits explained briefly and cleared once fixed, floors removed with their openings, bulk edits
on mixed kinds, many openings selected at once, exports that cannot be written, a schedule with
a cell no reader expects, a damaged recovery copy."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from PySide6.QtCore import Qt

from petfall_audit.demo import sample_building
from petfall_audit.editing import autosave
from petfall_audit.editing.document import Document
from petfall_audit.gui import main_window as main_window_module
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.export_actions import ExportPrompts
from petfall_audit.gui.import_dialog import ImportPrompts, import_schedule
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views import VIEW_NAMES
from petfall_audit.gui.views.common import wait_for_tasks
from petfall_audit.model import BALCONY_LIKE, Building, BuildingInfo

pytestmark = pytest.mark.gui

SAMPLES = 64  # few simulated falls keep these tests fast; the logic is the same


class RecordingPrompts(Prompts):
    """Answers at once; records the errors shown."""

    def __init__(self) -> None:
        self.errors: list[tuple[str, str]] = []

    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def ask_recover(self, parent: Any, recovery: Any) -> bool:
        return True

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append((title, text))


class ExportTo(ExportPrompts):
    def __init__(self) -> None:
        self.path: Path | None = None
        self.errors: list[str] = []

    def save_path(self, parent: Any, title: str, suggested: Path, file_filter: str
                  ) -> Path | None:
        return self.path

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)

    def leaflet_choice(self, parent: Any, defaults: Any, current: Any) -> Any:
        """The leaflet's sections as offered (the user presses OK)."""
        from petfall_audit.report.leaflet_sections import LeafletChoice

        return current or LeafletChoice(tuple(defaults))


@pytest.fixture
def app(qtbot):  # type: ignore[no-untyped-def]
    made: list[MainWindow] = []

    def make(building: Building | None = None) -> MainWindow:
        window = MainWindow(Document(building or sample_building("walkup")),
                            prompts=RecordingPrompts(), samples=SAMPLES, refine_samples=0,
                            export_prompts=ExportTo())
        qtbot.addWidget(window)
        views = window.views
        views.exports.samples = SAMPLES
        window.show()
        qtbot.waitUntil(lambda: views.context.assessment is not None
                        and not window.results_stale, timeout=20000)
        made.append(window)
        return window

    yield make
    for window in made:
        window.recomputer.cancel()
        window.recomputer.wait(10000)
    wait_for_tasks(30000)


def _export(qtbot, window: MainWindow, kind: str, path: Path) -> dict[str, Any]:  # type: ignore[no-untyped-def]
    exports = window.views.exports
    exports.prompts.path = path
    result: dict[str, Any] = {}
    exports.finished.connect(lambda paths: result.setdefault("written", paths))
    exports.failed.connect(lambda message: result.setdefault("failed", message))
    if exports.export(kind) is None:
        return {"refused": exports.prompts.errors[-1]}
    qtbot.waitUntil(lambda: bool(result), timeout=60000)
    return result


def test_an_empty_building_has_an_empty_plan_and_exports_it(app, qtbot, tmp_path) -> None:  # type: ignore[no-untyped-def]
    window = app(Building(info=BuildingInfo(name="Nothing yet")))
    plan = window.views.plan
    for name in VIEW_NAMES:
        window.view_tabs.setCurrentWidget(window.views.widget(name))
    qtbot.waitUntil(lambda: plan.plan is not None, timeout=20000)  # was stuck "Computing…"
    assert plan.summary.text().startswith("No fix to plan")
    assert plan.plan.actions == () and plan.chosen.rowCount() == 0
    out = _export(qtbot, window, "plan_csv", tmp_path / "plan.csv")
    assert out == {"written": [tmp_path / "plan.csv"]}
    for kind in ("audit_pdf", "leaflet_pdf", "results_json"):
        assert "written" in _export(qtbot, window, kind, tmp_path / f"empty-{kind}")


def test_removing_every_opening_clears_the_old_plan(app, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = app()
    plan = window.views.plan
    qtbot.waitUntil(lambda: plan.plan is not None and bool(plan.plan.actions), timeout=20000)
    window.openings_panel.table.selectAll()
    window.openings_panel.remove_selected()
    qtbot.waitUntil(lambda: plan.plan is not None and not plan.plan.actions, timeout=20000)
    assert plan.chosen.rowCount() == 0
    assert plan.summary.text().startswith("No fix to plan")


def test_a_refusal_is_short_and_a_later_good_edit_clears_it(app) -> None:  # type: ignore[no-untyped-def]
    window = app()
    site = window.site_panel
    facades = site.facades_model
    # a zero length breaks the facade and every opening on it: dozens of problems at once
    assert not facades.setData(facades.index(0, facades.column_of("length_m")), "0",
                               Qt.ItemDataRole.EditRole)
    shown = site.error.text()
    assert "must be greater than 0 m" in shown and "more problems like these" in shown
    assert len(shown) < 400
    assert facades.setData(facades.index(0, facades.column_of("label")), "Street side",
                           Qt.ItemDataRole.EditRole)
    assert site.error.isHidden()  # the old refusal no longer shows once an edit succeeds
    floors = window.floors_panel
    assert not floors.model.setData(floors.model.index(1, floors.model.column_of("level")),
                                    "x", Qt.ItemDataRole.EditRole)
    assert not floors.error.isHidden()
    assert floors.model.setData(floors.model.index(1, floors.model.column_of("label")),
                                "First", Qt.ItemDataRole.EditRole)
    assert floors.error.isHidden()


def test_removing_a_floor_says_its_openings_go_and_undo_brings_them_back(app) -> None:  # type: ignore[no-untyped-def]
    window = app()
    before = window.document.building
    level = max(o.floor for o in before.openings)
    on_it = {o.id for o in before.openings if o.floor == level}
    panel = window.floors_panel
    panel.table.selectRow(panel.model.row_of_key(level))
    assert panel.remove_selected() is None
    assert not on_it & {o.id for o in window.document.building.openings}
    assert window.history.undo_label == f"Remove floor {level} and its {len(on_it)} openings"
    assert f"the {len(on_it)} openings" in panel.note.text() and "Undo" in panel.note.text()
    assert window.actions_.undo.text().startswith(f"&Undo Remove floor {level} and its")
    window.undo()
    assert window.document.building is before


def test_a_limiter_set_on_balconies_and_windows_goes_on_the_windows_only(app) -> None:  # type: ignore[no-untyped-def]
    window = app()
    b = window.document.building
    balconies = [o.id for o in b.openings if o.kind in BALCONY_LIKE][:2]
    windows = [o.id for o in b.openings if o.kind.value.startswith("window")][:3]
    assert balconies and windows
    assert window.bulk_edit([*balconies, *windows], "limiter_gap_mm", 100.0) is None
    after = window.document.building
    assert all(after.opening(i).limiter_gap_mm == 100.0 for i in windows)
    assert all(after.opening(i).limiter_gap_mm is None for i in balconies)
    assert f"{len(balconies)} left as they were" in window.status_label.text()
    assert len(window.history.labels()) == 1  # one undo step
    # only balconies: nothing changes, and the user is told why
    assert window.bulk_edit(balconies, "limiter_gap_mm", 100.0) is not None
    assert "windows only" in window.prompts.errors[-1][1]
    # the form does the same for a multi-selection
    panel = window.openings_panel
    panel.select_ids(balconies)
    assert not panel.form.commit_text("limiter_gap_mm", "80 mm")
    assert "windows only" in panel.form.error_text("limiter_gap_mm")


def test_selecting_many_openings_is_one_selection_change(app, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = app()
    ids = [o.id for o in window.document.building.openings]
    changes: list[Any] = []
    window.views.context.selection.changed.connect(changes.append)
    panel_changes: list[Any] = []
    panel = window.openings_panel
    panel.table.selectionModel().selectionChanged.connect(lambda *a: panel_changes.append(a))
    window.views.context.select(ids)  # e.g. a filtered list in the ranked view
    assert len(changes) == 1 and len(panel_changes) == 1  # was one per opening, each
    assert set(panel.selected_ids()) == set(ids)  # rippling through every view
    panel_changes.clear()
    assert window.bulk_edit(ids, "netting_mesh_mm", 30.0) is None
    assert len(panel_changes) <= 1


def test_an_export_that_cannot_be_written_says_why_and_leaves_nothing(app, qtbot, tmp_path,  # type: ignore[no-untyped-def]
                                                                      monkeypatch) -> None:
    window = app()
    blocker = tmp_path / "not-a-folder"
    blocker.write_text("a file where a folder should be")
    out = _export(qtbot, window, "results_csv", blocker / "results.csv")
    assert "cannot write results.csv" in out["failed"] and ".tmp" not in out["failed"]
    assert not out["failed"].startswith("OSError")
    assert "Nothing was written" in window.views.exports.prompts.errors[-1]

    import os

    from petfall_audit.io import atomic

    locked = tmp_path / "read-only"
    locked.mkdir()
    real_open = os.open

    def refuse(path: Any, *args: Any, **kwargs: Any) -> int:  # a read-only folder, as any user
        if Path(path).parent == locked:
            raise PermissionError(13, "Permission denied", str(path))
        return real_open(path, *args, **kwargs)

    monkeypatch.setattr(atomic.os, "open", refuse)
    for kind in ("audit_pdf", "plan_json"):
        out = _export(qtbot, window, kind, locked / f"x-{kind}")
        assert "permission denied" in out["failed"]
    assert list(locked.iterdir()) == []
    assert window.status_label.text().startswith("! Export failed: cannot write")


def test_an_export_name_typed_without_extension_gets_one(app, qtbot, tmp_path) -> None:  # type: ignore[no-untyped-def]
    window = app()
    out = _export(qtbot, window, "results_json", tmp_path / "results")
    assert out == {"written": [tmp_path / "results.json"]}


def test_a_schedule_cell_no_reader_expects_is_reported_not_a_crash(app, tmp_path) -> None:  # type: ignore[no-untyped-def]
    window = app()
    before = window.document.building
    schedule = tmp_path / "huge.csv"
    schedule.write_text("Opening ID,Floor,Facade,Type,Position along facade (m),Width (m)\n"
                        "X-1,1,street,balcony,1e400,1\n")

    class Errors(ImportPrompts):
        shown: list[str] = []

        def run(self, dialog: Any) -> bool:
            return True

        def show_error(self, parent: Any, title: str, text: str) -> None:
            self.shown.append(text)

    prompts = Errors()
    reason = import_schedule(window, schedule, prompts=prompts)
    assert reason is not None and window.document.building is before
    assert prompts.shown  # a message, whether the reader flags the cell or cannot read it


def test_a_damaged_recovery_copy_is_explained_and_discarded(app) -> None:  # type: ignore[no-untyped-def]
    window = app()
    damaged = autosave.recovery_dir() / "999998.json"
    damaged.write_text("{ not a building")
    assert not window.session.offer_recovery()
    title, text = window.prompts.errors[-1]
    assert title == "Cannot recover" and "damaged" in text and "discarded" in text
    assert not damaged.exists()


def test_results_lose_the_error_style_once_they_compute_again(app, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = app()
    real = window.recomputer.assess
    calls = {"n": 0}

    def flaky(building: Building, **kwargs: Any) -> Any:
        calls["n"] += 1
        if calls["n"] == 1:
            raise RuntimeError("solver unavailable")
        return real(building, **kwargs)

    window.recomputer.assess = flaky
    with qtbot.waitSignal(window.results_failed, timeout=20000):
        window.recompute()
    assert window.results_state.styleSheet()
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.recompute()
    assert window.results_state.styleSheet() == ""


def test_the_unit_tables_load_in_the_background_after_the_window_opens(qtbot, monkeypatch
                                                                        ) -> None:  # type: ignore[no-untyped-def]
    # pint's tables take about a second to load: the first length typed stalled the window
    flag = main_window_module.threading.Event()
    monkeypatch.setattr(main_window_module, "WARM_UP_DELAY_MS", 0)
    monkeypatch.setattr(main_window_module, "_warmed_up", flag)
    window = MainWindow(Document(sample_building("walkup")), prompts=RecordingPrompts(),
                        samples=SAMPLES, refine_samples=0)
    qtbot.addWidget(window)
    qtbot.waitUntil(flag.is_set, timeout=5000)
    window.recomputer.cancel()
    window.recomputer.wait(10000)
