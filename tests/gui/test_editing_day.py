"""The app used for a day by a property manager, through the real widgets: adding the first
opening above a podium, crash recovery of two windows, columns that fit, refusals shown where the
user looks, changing an opening's kind, the plan's budget, copying a typical floor, keyboard
habits."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

import pytest
from PySide6.QtCore import Qt

from petfall_audit.editing.document import Document
from petfall_audit.gui.main_window import MainWindow, blank_building
from petfall_audit.model import Building, Floor, Surface, SurfaceKind
from tests.gui.test_main_window import FakePrompts

pytestmark = pytest.mark.gui

SAMPLES = 64


def open_window(qtbot, building: Building | None = None, **kwargs: Any) -> MainWindow:  # type: ignore[no-untyped-def]
    kwargs.setdefault("refine_samples", 0)
    window = MainWindow(Document(building or blank_building()), prompts=FakePrompts(),
                        samples=SAMPLES, **kwargs)
    qtbot.addWidget(window)
    window.show()
    qtbot.waitUntil(lambda: not window.results_stale, timeout=20000)
    return window


def podium_tower() -> Building:
    """New building, 20 floors, a 4.5 m ground storey, a podium roof at 4.5 m in front of the
    first facade (the property manager's first steps)."""
    b = blank_building()
    floors = (Floor(0, "Ground floor", 0.0),
              *(Floor(k, f"Level {k}", 4.5 + 3.0 * (k - 1)) for k in range(1, 20)))
    podium = Surface(id="podium", kind=SurfaceKind.CONCRETE, elevation_m=4.5,
                     facade=b.facades[0].id, from_facade_m=0.0, to_facade_m=6.0,
                     label="Podium roof")
    return dataclasses.replace(b, floors=floors, surfaces=(*b.surfaces, podium))


# --- item 1: the first opening above a podium -----------------------------------------------------

def test_add_opening_above_a_podium_goes_where_the_rules_allow(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window(qtbot, podium_tower())
    panel = window.openings_panel
    qtbot.mouseClick(_button(panel, "Add opening"), Qt.MouseButton.LeftButton)
    (opening,) = window.document.building.openings
    assert opening.floor == 1  # level 0 sits below the podium roof at 4.5 m
    assert panel.selected_ids() == [opening.id]
    assert not panel.table_error.isVisibleTo(panel)
    assert "level 1" in panel.place_note.text()


def test_add_opening_uses_the_floor_chosen_in_the_floors_table(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window(qtbot, podium_tower())
    floors = window.floors_panel
    floors.table.selectRow(floors.model.row_of_key(7))
    window.actions_.add_opening.trigger()
    (opening,) = window.document.building.openings
    assert opening.floor == 7
    # a second one on the same floor goes beside the first, not over it
    window.actions_.add_opening.trigger()
    first, second = sorted(window.document.building.openings, key=lambda o: o.x_m)
    assert second.floor == 7 and second.x_m >= first.x_m + first.width_m


def _button(panel: Any, text: str) -> Any:
    from PySide6.QtWidgets import QPushButton

    return next(b for b in panel.findChildren(QPushButton) if b.text() == text)


# --- item 2: recovery of every window's work ------------------------------------------------------

def _copies() -> list[Any]:
    from petfall_audit.editing import autosave

    return autosave.find_recoveries(include_running=True)


def test_steady_editing_is_recoverable_within_a_second(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.demo import sample_building
    from petfall_audit.editing import autosave

    window = open_window(qtbot, sample_building("walkup"))
    form = window.building_panel.form
    # an edit every 0.2 s for 2 s: never a pause long enough for an idle-only timer
    for k in range(10):
        form.commit_text("name", f"Walk-up, edit {k}")
        qtbot.wait(200)
    (copy,) = _copies()
    recovered = autosave.load_recovery(copy).info.name
    assert recovered in {f"Walk-up, edit {k}" for k in range(5, 10)}  # at most ~1 s behind
    # one more edit, then a crash 1 s later: the edit is in the copy
    form.commit_text("name", "Walk-up, last edit")
    qtbot.wait(1000)
    (copy,) = _copies()
    assert autosave.load_recovery(copy).info.name == "Walk-up, last edit"


_CRASHING_APP = """
import sys
from pathlib import Path
from PySide6.QtCore import QTimer
from PySide6.QtWidgets import QApplication
from petfall_audit.editing.document import Document
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.io.building_file import load_building

app = QApplication(sys.argv[:1])
path = Path(sys.argv[1])
window = MainWindow(Document(load_building(path), path), samples=16, refine_samples=0)
window.show()
window.building_panel.form.commit_text("name", sys.argv[2])

def report():
    if window.session.recovery.path is not None and window.session.recovery.path.exists():
        print("copy written", flush=True)
    else:
        QTimer.singleShot(20, report)

QTimer.singleShot(0, report)
app.exec()
"""


def _crash_two_apps(tmp_path: Any) -> tuple[Any, Any]:
    """Two apps, two files, an edit in each, both killed once their copies are written."""
    import os
    import select
    import shutil
    import subprocess
    import sys

    files = []
    for name in ("walkup", "block"):
        target = tmp_path / f"{name}.json"
        shutil.copy(Path(__file__).parents[2] / "sample_buildings" / f"{name}.json", target)
        files.append(target)
    env = {**os.environ, "QT_QPA_PLATFORM": "offscreen"}
    procs = [subprocess.Popen([sys.executable, "-c", _CRASHING_APP, str(f), f"Edited {f.stem}"],
                              stdout=subprocess.PIPE, text=True, env=env) for f in files]
    try:
        for proc in procs:
            assert proc.stdout is not None
            ready, _, _ = select.select([proc.stdout], [], [], 90)
            assert ready, "the app never wrote its recovery copy"
            assert proc.stdout.readline().strip() == "copy written"
    finally:
        for proc in procs:
            proc.kill()  # like a crash: nothing cleaned up
            proc.wait(timeout=60)
            assert proc.stdout is not None
            proc.stdout.close()
    return files[0], files[1]


def test_two_crashed_apps_are_both_offered_and_recovered(qtbot, tmp_path) -> None:  # type: ignore[no-untyped-def]
    walkup, block = _crash_two_apps(tmp_path)
    window = open_window(qtbot)
    assert window.session.offer_recovery()
    assert window.prompts.asked == ["recover", "recover"]
    windows = [window, *window.extra_windows]
    for w in windows[1:]:
        qtbot.addWidget(w)
    names = {w.document.path: w.document.building.info.name for w in windows}
    assert names == {walkup: "Edited walkup", block: "Edited block"}
    assert all(w.document.dirty for w in windows)
    # each recovered window now holds its own copy; the crashed apps' copies are gone
    assert sorted(c.source_path for c in _copies()) == sorted([walkup, block])
    assert {c.path for c in _copies()} == {w.session.recovery.path for w in windows}


def test_answering_no_discards_only_that_copy(qtbot, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.editing import autosave

    walkup, block = _crash_two_apps(tmp_path)
    window = open_window(qtbot)
    answers = iter([False, None])
    offered: list[Any] = []

    def ask(parent: Any, recovery: Any) -> bool:
        offered.append(recovery.source_path)
        answer = next(answers)
        if answer is None:  # the app is killed again before the user answers
            raise KeyboardInterrupt
        return answer

    window.prompts.ask_recover = ask  # type: ignore[method-assign]
    with pytest.raises(KeyboardInterrupt):
        window.session.offer_recovery()
    declined, undecided = offered
    left = autosave.find_recoveries()
    assert [c.source_path for c in left] == [undecided]  # the undecided copy stays
    assert declined != undecided
    # the next start offers the one left, and only it
    window.prompts.ask_recover = lambda parent, rec: offered.append(rec.source_path) or True  # type: ignore[method-assign]
    assert window.session.offer_recovery()
    assert offered[-1] == undecided and len(offered) == 3
    assert window.document.building.info.name == f"Edited {undecided.stem}"


# --- item 3: columns fit what they show -----------------------------------------------------------

def clipped_cells(table: Any, rows: int = 60, skip: tuple[int, ...] = ()) -> list[str]:
    """Cells of ``table`` whose text is wider than its column (the last, stretched, column and
    the columns ``skip`` aside), or any text at all when the table wraps words into its
    one-line rows."""
    model = table.model()
    metrics = table.fontMetrics()
    header = table.horizontalHeader()
    bad = []
    for col in range(model.columnCount() - 1):
        if col in skip:
            continue
        width = header.sectionSize(col)
        for row in range(min(rows, model.rowCount())):
            text = str(model.data(model.index(row, col)) or "")
            if metrics.horizontalAdvance(text) + 8 > width:
                bad.append(f"{model.headerData(col, Qt.Orientation.Horizontal)}: {text!r}")
    return bad


def _tower_at_1280(qtbot) -> Any:  # type: ignore[no-untyped-def]
    """The sample tower's window at 1280 x 720 with its full results (256 cats) shown."""
    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("tower"), refine_samples=256,
                         refine_delay_ms=10)
    window.resize(1280, 720)
    qtbot.waitSignal(window.results_refined, timeout=60000)
    qtbot.waitUntil(lambda: window.results_samples == 256, timeout=60000)
    qtbot.wait(50)
    return window


def test_result_columns_fit_at_the_default_size_after_the_full_results(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.views.ranked import RankedModel

    window = _tower_at_1280(qtbot)
    table = window.views.ranked.table
    assert not table.wordWrap()
    # results are never clipped; names (floor, facade, kind) are narrowed to a cap, below
    assert clipped_cells(table, skip=RankedModel.NAME_COLS) == []


def test_ranked_names_are_narrowed_so_the_results_stay_in_view(qtbot) -> None:  # type: ignore[no-untyped-def]
    # the sample tower's facade names ("South, Lanternfield Road") made the ranked list so wide
    # that the likelihood and the drop were scrolled out of view at 1280 x 720
    from petfall_audit.gui.views.ranked import RankedModel
    from petfall_audit.gui.widgets.tables import fit_columns

    window = _tower_at_1280(qtbot)
    table = window.views.ranked.table
    model, header = table.model(), table.horizontalHeader()
    metrics = table.fontMetrics()
    cap = metrics.averageCharWidth() * RankedModel.NAME_FIT_CHARS
    facade_col = RankedModel.KEYS.index("facade")
    names = [str(model.data(model.index(r, facade_col))) for r in range(model.rowCount())]
    longest = max(names, key=metrics.horizontalAdvance)
    assert metrics.horizontalAdvance(longest) > cap  # the sample has names longer than the cap
    assert header.sectionSize(facade_col) <= max(cap, header.sectionSizeFromContents(
        facade_col).width())
    # the likelihood and the median drop are in view without scrolling
    for key in ("likelihood", "drop"):
        col = RankedModel.KEYS.index(key)
        right = header.sectionViewportPosition(col) + header.sectionSize(col)
        assert 0 <= right <= table.viewport().width(), key
    # an elided name is whole in its tooltip
    row = names.index(longest)
    tip = str(model.data(model.index(row, facade_col), Qt.ItemDataRole.ToolTipRole))
    assert tip.splitlines()[0] == longest
    assert len(tip.splitlines()) > 1  # then the result's words, as in the other columns
    # a user who widens the column keeps it: the next fit does not narrow it again
    wide = metrics.horizontalAdvance(longest) + 40
    header.resizeSection(facade_col, wide)
    fit_columns(table)
    assert header.sectionSize(facade_col) == wide


def test_ranked_order_reads_whole_and_filters_list_every_choice(qtbot) -> None:  # type: ignore[no-untyped-def]
    # the filter boxes were as wide as their longest choice while showing "All", and the order
    # box was cut to "Risk score (likelihood × severi" at 1280 x 720
    window = _tower_at_1280(qtbot)
    ranked = window.views.ranked
    box = ranked.order_box
    text_px = box.fontMetrics().horizontalAdvance(box.currentText())
    assert box.width() >= text_px + 20  # the text and the arrow
    for f in (ranked.floor_box, ranked.facade_box, ranked.kind_box, ranked.band_box):
        f.showPopup()
        try:
            widest = max(f.fontMetrics().horizontalAdvance(f.itemText(i))
                         for i in range(f.count()))
            assert f.view().width() >= widest, f.objectName()  # the list shows each whole
        finally:
            f.hidePopup()


def test_editor_columns_fit_after_a_new_building_fills(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window(qtbot)
    assert window.session.new()
    window.floors_panel.add_floor()
    window.floors_panel.add_floor()
    window.actions_.add_opening.trigger()
    assert window.copy_floor(0, [1, 2]) is None
    qtbot.wait(50)
    assert len(window.document.building.openings) == 3
    assert clipped_cells(window.openings_panel.table) == []
    assert clipped_cells(window.floors_panel.table) == []


def test_a_table_behind_another_tab_fits_its_columns_when_it_is_shown(qtbot, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    # the editors behind other tabs follow every edit of the building: their columns are
    # fitted when they are shown, not on each edit (a whole fit of a long table takes ms)
    import petfall_audit.gui.widgets.tables as tables
    from petfall_audit.demo import sample_building
    from petfall_audit.editing.commands import SetFloor, SetOpeningFields

    window = open_window(qtbot, sample_building("walkup"))
    window.show_editor(window.openings_panel)
    fitted: list[str] = []
    for name in ("fit_columns", "widen_columns"):
        real = getattr(tables, name)
        monkeypatch.setattr(tables, name, lambda table, *a, real=real: (
            fitted.append(table.objectName()), real(table, *a))[1])
    floors = window.floors_panel.table
    assert not floors.isVisible()
    long_label = "Second floor, the former print works' drawing office"
    window.history.push(SetFloor(2, {"label": long_label}))
    first = window.document.building.openings[0]
    window.history.push(SetOpeningFields([first.id], {"netting_mesh_mm": 30.0}))
    qtbot.wait(50)
    assert "floors_table" not in fitted
    window.show_editor(window.floors_panel)
    qtbot.waitUntil(lambda: "floors_table" in fitted, timeout=3000)
    assert clipped_cells(floors) == []
    model = floors.model()
    assert long_label in [str(model.data(model.index(r, c))) for r in range(model.rowCount())
                          for c in range(model.columnCount())]


# --- item 4: a refused cell edit is explained at the cell and kept for correction ---------

def _type_into_cell(qtbot, table: Any, row: int, col: int, text: str) -> None:  # type: ignore[no-untyped-def]
    from PySide6.QtWidgets import QLineEdit

    index = table.model().index(row, col)
    table.setCurrentIndex(index)
    table.edit(index)
    editor = table.viewport().findChild(QLineEdit)
    assert editor is not None
    editor.selectAll()
    qtbot.keyClicks(editor, text)
    qtbot.keyClick(editor, Qt.Key.Key_Return)


def _open_cell_editor(table: Any) -> Any:
    from PySide6.QtWidgets import QLineEdit

    editors = [e for e in table.viewport().findChildren(QLineEdit) if e.isVisible()]
    return editors[0] if editors else None


def test_a_refused_floor_edit_is_explained_in_words_and_kept(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("walkup"))
    window.show_editor(window.floors_panel)
    panel = window.floors_panel
    before = window.document.building
    row = panel.model.row_of_key(2)
    col = panel.model.column_of("elevation_m")
    _type_into_cell(qtbot, panel.table, row, col, "1 m")  # below the floor beneath
    qtbot.waitUntil(panel.error.isVisible, timeout=3000)
    qtbot.wait(20)
    qtbot.waitUntil(lambda: _open_cell_editor(panel.table) is not None, timeout=3000)
    assert window.document.building is before
    editor = _open_cell_editor(panel.table)
    assert editor.text() == "1 m"  # what was typed, to correct
    assert panel.table.currentIndex().row() == row
    message = panel.error.text()
    assert panel.error.isVisible()
    assert "floors[" not in message and "Floor 2" in message and "Floor 1" in message
    # the reason sits above the table, so it is in view whenever the table is
    assert panel.error.geometry().bottom() <= panel.table.geometry().top()
    # correcting it in the same editor applies
    editor.selectAll()
    qtbot.keyClicks(editor, "7 m")
    qtbot.keyClick(editor, Qt.Key.Key_Return)
    qtbot.waitUntil(lambda: window.document.building.floors[row].elevation_m == 7.0,
                    timeout=3000)


# --- item 5: changing the kind carries the fields that no longer apply --------------------------

def _choose(combo: Any, data: Any) -> None:
    i = combo.findData(data)
    assert i >= 0
    combo.setCurrentIndex(i)
    combo.activated.emit(i)  # what a click on the list entry sends


def test_a_new_balcony_becomes_a_window_in_one_undo_step(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.model import OpeningKind

    window = open_window(qtbot)
    panel = window.openings_panel
    new_id = panel.add_opening()
    assert new_id is not None
    before = window.document.building
    assert before.opening(new_id).projection_m > 0  # a new opening starts as a balcony
    _choose(panel.form.editor("kind"), OpeningKind.WINDOW_SLIDING)
    changed = window.document.building.opening(new_id)
    assert changed.kind is OpeningKind.WINDOW_SLIDING and changed.projection_m == 0.0
    assert panel.form.error_text("kind") == ""
    assert "projection" in window.history.undo_label
    window.actions_.undo.trigger()
    assert window.document.building is before
    # the escape-window mark and a limiter go when a window becomes fixed glazing
    window.actions_.redo.trigger()
    assert panel.form.commit_text("limiter_gap_mm", "100 mm")
    panel.form.editor("escape_window").click()
    assert window.document.building.opening(new_id).escape_window
    _choose(panel.form.editor("kind"), OpeningKind.FIXED)
    fixed = window.document.building.opening(new_id)
    assert fixed.kind is OpeningKind.FIXED
    assert fixed.limiter_gap_mm is None and not fixed.escape_window


def test_the_window_message_reads_in_plain_order() -> None:
    from petfall_audit.editing.document import validate
    from petfall_audit.model import Opening, OpeningKind

    b = dataclasses.replace(blank_building(), openings=(
        Opening("w", 0, "front", OpeningKind.WINDOW_SLIDING, 0.0, 1.0, projection_m=0.5),))
    (problem,) = [p for p in validate(b) if p.where.endswith("projection_m")]
    assert "a sliding window sits in the wall" in problem.message


# --- item 6: the plan's budget is kept with the audit ---------------------------------------------

def _window_with_views(qtbot, building: Building | None = None, path: Any = None) -> Any:  # type: ignore[no-untyped-def]
    from petfall_audit.demo import sample_building
    window = MainWindow(Document(building or sample_building("walkup"), path),
                        prompts=FakePrompts(), samples=SAMPLES, refine_samples=0)
    qtbot.addWidget(window)
    views = window.views
    window.resize(1280, 720)
    window.show()
    qtbot.waitUntil(lambda: views.plan.plan is not None, timeout=30000)
    return window, views


def test_a_new_building_does_not_inherit_the_last_ones_default_budget(qtbot) -> None:  # type: ignore[no-untyped-def]
    # a new building without openings showed the sample's "4400 EUR, a default"
    from petfall_audit.fixes import default_budget

    window, views = _window_with_views(qtbot)
    plan = views.plan
    qtbot.waitUntil(lambda: bool(plan.options), timeout=30000)
    assert plan.budget.value() == default_budget(plan.options) > 0
    window.document.dirty = False
    assert window.session.new()
    qtbot.waitUntil(lambda: views.context.assessment is not None
                    and not views.context.assessment.openings and not plan.options
                    and plan.catalogue is not None, timeout=30000)
    window.show_view(plan)
    qtbot.waitUntil(lambda: plan.budget.value() == 0.0, timeout=30000)
    assert plan.budget_is_default and "default" in plan.budget_note.text()
    assert window.document.building.plan.budget is None  # nothing was set for the audit


def test_the_budget_typed_is_saved_with_the_audit_and_comes_back(qtbot, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.views.common import wait_for_tasks
    from petfall_audit.io.building_file import load_building

    window, views = _window_with_views(qtbot)
    plan = views.plan
    assert plan.budget_is_default and "default" in plan.budget_note.text()
    spin = plan.budget
    spin.lineEdit().selectAll()
    qtbot.keyClicks(spin.lineEdit(), "1200")
    qtbot.keyClick(spin.lineEdit(), Qt.Key.Key_Return)
    assert window.document.building.plan.budget == 1200.0
    assert not plan.budget_is_default and window.document.dirty
    qtbot.waitUntil(lambda: plan.plan is not None and plan.plan.budget == 1200.0, timeout=30000)
    path = tmp_path / "walkup.json"
    assert window.session.save_as(path)
    assert load_building(path).plan.budget == 1200.0
    # undo takes the budget back to the default
    window.actions_.undo.trigger()
    assert window.document.building.plan.budget is None and plan.budget_is_default
    # opening the saved audit shows its budget, not a default
    again, again_views = _window_with_views(qtbot, load_building(path), path)
    assert again_views.plan.budget.value() == 1200.0
    assert not again_views.plan.budget_is_default
    qtbot.waitUntil(lambda: again_views.plan.plan.budget == 1200.0, timeout=30000)
    for w in (window, again):
        w.recomputer.cancel()
        w.recomputer.wait(10000)
    wait_for_tasks(20000)


def test_a_file_without_plan_settings_loads_and_saves_as_before(tmp_path) -> None:
    from petfall_audit.io.building_file import dumps_building, load_building

    source = Path(__file__).parents[2] / "sample_buildings" / "walkup.json"
    b = load_building(source)
    assert b.plan.budget is None
    assert '"plan"' not in dumps_building(b)


# --- item 7: copy a typical floor keeps the building's numbering -------------

def test_copy_floor_keeps_the_numbering_and_previews_every_id(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.dialogs import CopyFloorDialog
    from petfall_audit.model import Opening, OpeningKind

    b = blank_building()
    floors = tuple(Floor(k, f"Level {k}", 3.0 * k) for k in range(6))
    openings = tuple(Opening(f"S01-B{n}", 1, "front", OpeningKind.BALCONY, 2.0 * n, 1.0, 1.0)
                     for n in range(1, 4))
    window = open_window(qtbot, dataclasses.replace(b, floors=floors, openings=openings))
    dialog = CopyFloorDialog(window.document.building, 1, window)
    qtbot.addWidget(dialog)
    dialog.last.setValue(5)
    text = dialog.preview.toPlainText()
    assert "{" not in dialog.naming.currentText()  # no programmer syntax in the choice
    assert len(text.splitlines()) == 3 * 4  # every new id, not just the first
    assert "S01-B1  →  S05-B1" in text and "S01-B3  →  S02-B3" in text
    req = dialog.request()
    assert window.copy_floor(req.level, req.to_levels, id_pattern=req.id_pattern) is None
    ids = {o.id for o in window.document.building.openings}
    assert {"S02-B1", "S03-B2", "S05-B3"} <= ids and len(ids) == 15


# --- item 9: keyboard and editing habits ---------------------------------------------------------

def _focus(qtbot, widget: Any) -> None:  # type: ignore[no-untyped-def]
    widget.window().activateWindow()
    widget.setFocus()
    qtbot.waitUntil(widget.hasFocus, timeout=3000)


def test_delete_copy_paste_and_redo_keys_in_the_openings_table(qtbot) -> None:  # type: ignore[no-untyped-def]
    from PySide6.QtGui import QGuiApplication

    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("walkup"))
    panel = window.openings_panel
    table = panel.table
    first, second = window.document.building.openings[:2]
    panel.select_ids([first.id, second.id])
    _focus(qtbot, table)
    ctrl = Qt.KeyboardModifier.ControlModifier
    # Ctrl+C: the rows as tab-separated text with a header, for a spreadsheet
    qtbot.keyClick(table, Qt.Key.Key_C, ctrl)
    text = QGuiApplication.clipboard().text()
    lines = text.splitlines()
    assert len(lines) == 3 and lines[0].split("\t")[0] == "Id"
    assert lines[1].split("\t")[0] == first.id and "\t" in lines[2]
    # Del removes the selected rows; Ctrl+Z brings them back; Ctrl+Y removes them again
    qtbot.keyClick(table, Qt.Key.Key_Delete)
    ids = {o.id for o in window.document.building.openings}
    assert first.id not in ids and second.id not in ids
    window.actions_.undo.trigger()
    assert first.id in {o.id for o in window.document.building.openings}
    _focus(qtbot, table)
    qtbot.keyClick(table, Qt.Key.Key_Y, ctrl)
    assert first.id not in {o.id for o in window.document.building.openings}
    window.actions_.undo.trigger()
    # Ctrl+V: a row edited in a spreadsheet changes its opening, a new row adds one, one step
    cells = lines[1].split("\t")
    cells[5] = "1.4 m"  # width
    new = list(cells)
    new[0], new[4] = "ST-NEW", "12 m"
    QGuiApplication.clipboard().setText("\n".join([lines[0], "\t".join(cells),
                                                   "\t".join(new)]) + "\n")
    before = window.document.building
    _focus(qtbot, table)
    qtbot.keyClick(table, Qt.Key.Key_V, ctrl)
    after = window.document.building
    assert after.opening(first.id).width_m == pytest.approx(1.4)
    assert after.opening("ST-NEW").x_m == pytest.approx(12.0)
    assert set(panel.selected_ids()) == {first.id, "ST-NEW"}
    window.actions_.undo.trigger()
    assert window.document.building is before
    # a row that cannot be read pastes nothing and says which line and column
    assert panel.paste("Id\tWidth\nST-0A\twide\n") is not None
    assert "line 2, Width" in panel.table_error.text()


def test_duplicate_and_add_several_floors_at_once(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("walkup"))
    panel = window.openings_panel
    source = window.document.building.openings[0]
    panel.select_ids([source.id])
    _focus(qtbot, panel.table)
    qtbot.keyClick(panel.table, Qt.Key.Key_D,
                   Qt.KeyboardModifier.ControlModifier | Qt.KeyboardModifier.ShiftModifier)
    (copy_id,) = panel.selected_ids()
    copy = window.document.building.opening(copy_id)
    assert copy_id != source.id and copy.floor == source.floor and copy.kind == source.kind
    assert copy.x_m >= source.x_m + source.width_m or copy.x_m + copy.width_m <= source.x_m
    floors = window.floors_panel
    n = len(window.document.building.floors)
    floors.add_count.setValue(5)
    qtbot.mouseClick(_button(floors, "Add floors on top"), Qt.MouseButton.LeftButton)
    levels = [f.level for f in window.document.building.floors]
    assert len(levels) == n + 5 and levels == sorted(levels)
    heights = [b.elevation_m - a.elevation_m for a, b in
               zip(window.document.building.floors[-6:-1], window.document.building.floors[-5:],
                   strict=True)]
    assert max(heights) - min(heights) < 1e-9  # one storey apart
    window.actions_.undo.trigger()
    assert len(window.document.building.floors) == n  # one undo step


def test_notes_take_several_lines_and_the_audit_date_is_picked(qtbot) -> None:  # type: ignore[no-untyped-def]
    from PySide6.QtCore import QDate
    from PySide6.QtWidgets import QDateEdit, QPlainTextEdit

    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("walkup"))
    panel = window.openings_panel
    oid = window.document.building.openings[0].id
    panel.select_ids([oid])
    notes = panel.form.editor("notes")
    assert isinstance(notes, QPlainTextEdit)
    window.show_editor(panel)
    _focus(qtbot, notes)
    notes.selectAll()
    qtbot.keyClicks(notes, "Rail loose")
    qtbot.keyClick(notes, Qt.Key.Key_Return)
    qtbot.keyClicks(notes, "Planter by the guard")
    panel.form.editor("width_m").setFocus()  # leaving the notes commits them
    qtbot.waitUntil(lambda: window.document.building.opening(oid).notes ==
                    "Rail loose\nPlanter by the guard", timeout=3000)
    date = window.building_panel.form.editor("audit_date")
    assert isinstance(date, QDateEdit) and date.calendarPopup()
    date.calendarWidget().setSelectedDate(QDate(2026, 5, 14))
    date.calendarWidget().clicked.emit(QDate(2026, 5, 14))  # a click on the day
    assert window.document.building.info.audit_date == "2026-05-14"


def test_no_two_controls_of_a_page_share_an_alt_key(qtbot) -> None:  # type: ignore[no-untyped-def]
    # Alt+O meant both "Open earlier audit" and the page "Openings that changed"; Alt+F the
    # File menu, "Fit this control" and "Facade:"
    import collections
    import re

    from PySide6.QtWidgets import QAbstractButton, QGroupBox, QLabel, QTabWidget

    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("walkup"))

    def key(text: str) -> str | None:
        m = re.search(r"&([^&])", text.replace("&&", ""))
        return m.group(1).lower() if m else None

    menus = [a.text() for a in window.menuBar().actions()]
    clashes = {}
    for tabs in (window.view_tabs, window.editor_tabs):
        for i in range(tabs.count()):
            page = tabs.widget(i)
            texts = [*menus, *(b.text() for b in page.findChildren(QAbstractButton)),
                     *(lb.text() for lb in page.findChildren(QLabel) if lb.buddy() is not None),
                     *(t.tabText(j) for t in page.findChildren(QTabWidget)
                       for j in range(t.count())),
                     *(g.title() for g in page.findChildren(QGroupBox))]
            by_key = collections.defaultdict(set)
            for text in texts:
                if key(text):
                    by_key[key(text)].add(text)
            shared = {k: sorted(v) for k, v in by_key.items() if len(v) > 1}
            if shared:
                clashes[tabs.tabText(i)] = shared
    assert clashes == {}
