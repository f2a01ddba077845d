"""The window as composed from its typed state, offscreen: views built once, named menus, the
file session, a refused population change shown, the facade line after recomputing, the empty
building's views, the Help page, fitting a screen at 1.5x scaling, pasting floors."""

from __future__ import annotations

import dataclasses
import json
import os
import subprocess
import sys
from typing import Any

import pytest
from PySide6.QtCore import Qt
from PySide6.QtGui import QGuiApplication

from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.main_window import MainWindow, blank_building
from petfall_audit.gui.views import VIEW_NAMES
from petfall_audit.gui.views.common import wait_for_tasks
from petfall_audit.gui.views.facade import HOVER_HINT
from petfall_audit.gui.views.ranked import RankedModel
from petfall_audit.model import Building

pytestmark = pytest.mark.gui

SAMPLES = 32


class QuietPrompts(Prompts):
    def __init__(self) -> None:
        self.errors: list[str] = []

    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)


@pytest.fixture
def open_window(qtbot):  # type: ignore[no-untyped-def]
    made: list[MainWindow] = []

    def make(building: Building | None = None, **kwargs: Any) -> MainWindow:
        kwargs.setdefault("refine_samples", 0)
        window = MainWindow(Document(building or sample_building("walkup")),
                            prompts=QuietPrompts(), samples=SAMPLES, **kwargs)
        qtbot.addWidget(window)
        window.resize(1280, 720)
        window.show()
        qtbot.waitUntil(lambda: not window.results_stale, timeout=20000)
        made.append(window)
        return window

    yield make
    for window in made:
        window.recomputer.cancel()
        window.recomputer.wait(10000)
    wait_for_tasks(30000)


# --- issue 13 item 4: the window composes its views ---------------------------------------------


def test_the_views_are_built_once_from_typed_state_and_none_holds_the_window(open_window) -> None:  # type: ignore[no-untyped-def]
    window = open_window()
    tabs = window.view_tabs
    assert [tabs.tabText(i) for i in range(tabs.count())] == list(VIEW_NAMES)
    assert [tabs.widget(i) for i in range(tabs.count())] == list(window.views.widgets())
    # one ranked model: no plain table kept alive and hidden behind the filterable one
    assert len(window.findChildren(RankedModel)) == 1
    context = window.views.context
    assert not hasattr(context, "window")
    assert all(value is not window for value in vars(context).values())
    # the views follow the state objects: a selection made there reaches every view and the
    # openings editor
    worst = window.views.ranked.row_result(0).id
    window.state.selection.set_ids([worst])
    assert window.openings_panel.selected_ids() == [worst]
    assert window.views.profile.opening_id == worst
    # and a selection in the editor reaches the state
    other = window.document.building.openings[-1].id
    window.openings_panel.select_ids([other])
    assert window.state.selection.current == other


def test_the_menus_are_named_and_hold_import_export_and_help(open_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window()
    menus, a = window.menus, window.actions_
    file_actions = menus.file.actions()
    order = [file_actions.index(x) for x in (a.save_as, a.import_schedule,
                                             window.views.exports.menu.menuAction(), a.quit)]
    assert order == sorted(order)  # Import and Export between Save as and Quit
    assert a.guide in menus.help.actions() and a.cautions in menus.help.actions()
    assert set(window.views.view_actions) <= set(menus.view.actions())
    # the View menu's shortcuts bring each view to the front
    window.views.view_actions[4].trigger()
    assert window.view_tabs.currentWidget() is window.views.plan


def test_a_refused_population_change_is_shown_beside_the_choice(open_window, qtbot,
                                                                monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.widgets import building as building_module

    window = open_window()
    panel = window.building_panel
    window.show_editor(panel)
    before = window.document.building.cat_profile
    assert before.preset == "kitten"
    broken = dataclasses.replace(building_module.CAT_PRESETS["heavy_adult"],
                                 relax_probability=1.5)
    monkeypatch.setitem(building_module.CAT_PRESETS, "heavy_adult", broken)  # a chance above 1
    index = panel.profile.findData("heavy_adult")
    panel.profile.setCurrentIndex(index)
    panel.profile.activated.emit(index)
    assert window.document.building.cat_profile is before  # refused
    assert panel.profile_error.isVisible()  # in the layout, where the user looks
    assert panel.profile_error.text().startswith("! Not changed:")
    assert panel.profile.currentData() == before.preset  # the box shows what is in force
    # a change that is accepted clears the message
    ok = panel.profile.findData("adult")
    panel.profile.setCurrentIndex(ok)
    panel.profile.activated.emit(ok)
    assert window.document.building.cat_profile.preset == "adult"
    assert not panel.profile_error.isVisible()


def test_the_file_session_opens_saves_and_recovers_for_the_window(open_window, tmp_path) -> None:  # type: ignore[no-untyped-def]
    window = open_window()
    window.building_panel.form.commit_text("name", "Session test")
    path = tmp_path / "session.json"
    assert window.session.save_as(path)
    assert not window.isWindowModified() and "session.json" in window.windowTitle()
    window.building_panel.form.commit_text("name", "Edited again")
    assert window.session.autosave_now() is not None  # the recovery copy of the edit
    assert window.session.recovery.path is not None and window.session.recovery.path.exists()
    copy = window.session.recovery.path
    assert window.session.open_file(path)  # unsaved work discarded (the prompt says so)
    assert window.document.building.info.name == "Session test"
    assert not copy.exists()  # decided about: its copy went
    assert window.openings_panel.model.rowCount() == len(window.document.building.openings)


# --- issue 15 item 8: the facade line, the empty building ---------------------------------------


def test_the_facade_line_says_recomputing_only_while_it_is(open_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window()
    facade = window.views.facade
    window.show_view(facade)
    assert "Recomputing" not in facade.info.text()
    window.openings_panel.select_ids([window.document.building.openings[0].id])
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.openings_panel.form.commit_text("notes", "checked")  # the results go stale
        assert facade.info.text().startswith("Recomputing")
    qtbot.waitUntil(lambda: not window.results_stale, timeout=20000)
    assert "Recomputing" not in facade.info.text()
    current = window.state.selection.current
    assert current in facade.items
    assert facade.info.text() == facade.items[current].tooltip_text.replace("\n", " · ")
    window.state.selection.set_ids([])
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.recompute()
    assert facade.info.text() == HOVER_HINT


def test_an_empty_building_says_what_to_do_first_and_draws_no_empty_axes(open_window,
                                                                          qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window(blank_building())
    views = window.views
    qtbot.waitUntil(lambda: views.plan.plan is not None and views.plan.curve is not None,
                    timeout=20000)
    assert "Floors tab" in window.results_state.text()
    assert "How to audit a building" in window.results_state.text()
    plot = views.plan.curve_plot.getPlotItem()
    # not an axis of -400 to 400 around nothing: no axis, a sentence
    assert not plot.getAxis("left").isVisible() and not plot.getAxis("bottom").isVisible()
    assert views.plan.empty_note is not None
    assert "Nothing to plan yet" in views.plan.empty_note.toPlainText()
    (x0, x1), (y0, y1) = plot.getViewBox().viewRange()
    assert x0 >= 0 and y0 >= 0
    assert not views.floors.charts.isVisible() and "No openings yet" in views.floors.note.text()
    window.view_tabs.setCurrentWidget(views.profile)
    assert not views.profile.plots.isVisible()
    assert "No openings yet" in views.profile.caption.text()
    window.view_tabs.setCurrentWidget(views.facade)
    assert "Openings tab" in views.facade.info.text()
    # with an opening the chart comes back with its axes
    window.openings_panel.add_opening()
    qtbot.waitUntil(lambda: views.plan.empty_note is None, timeout=30000)
    assert plot.getAxis("left").isVisible()


# --- issue 15 item 13: the Help page, the window at 1.5x scaling --------------------------------


def test_help_explains_the_workflow_in_five_steps(open_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.guide import GUIDE_STEPS

    window = open_window()
    window.actions_.guide.trigger()
    guide = window.guide
    assert guide is not None and guide.isVisible() and not guide.isModal()
    text = guide.text.toPlainText()
    assert len(GUIDE_STEPS) == 5
    for title, _ in GUIDE_STEPS:
        assert title in text
    # every tab and menu the guide names is one the window has
    editor_tabs = [window.editor_tabs.tabText(i) for i in range(window.editor_tabs.count())]
    for name in editor_tabs:
        assert f"{name} tab" in text
    assert "Fix plan tab" in text and "Fix plan" in VIEW_NAMES
    window.actions_.guide.trigger()  # again: the same page, raised
    assert window.guide is guide


_FIT_SCRIPT = r"""
import json, sys
from PySide6.QtWidgets import QApplication
from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.gui.main_window import MainWindow

app = QApplication(sys.argv[:1])
window = MainWindow(Document(sample_building("tower")), samples=16, refine_samples=0)
window.show()
for _ in range(20):
    app.processEvents()
screen = window.screen().availableGeometry()
frame = window.frameGeometry()
hint = window.minimumSizeHint()
print(json.dumps({"screen": [screen.width(), screen.height()],
                  "frame": [frame.x(), frame.y(), frame.width(), frame.height()],
                  "hint": [hint.width(), hint.height()],
                  "scale": window.devicePixelRatio()}))
window.recomputer.shutdown()
"""


def test_the_window_fits_a_1280x720_screen_at_150_percent(tmp_path) -> None:
    """A 1280x720 screen at 1.5x scaling leaves 853x480 logical pixels: the window fits in
    them, menus, editors, views and the cautions included (the offscreen platform is given that
    screen, and Qt the scale factor)."""
    config = tmp_path / "screen.json"
    config.write_text(json.dumps({"screens": [{"name": "laptop", "x": 0, "y": 0,
                                               "width": 1280, "height": 720,
                                               "logicalDpi": 96, "logicalBaseDpi": 96,
                                               "dpr": 1}]}))
    env = dict(os.environ, QT_QPA_PLATFORM=f"offscreen:configfile={config}",
               QT_SCALE_FACTOR="1.5", PYTHONPATH=os.pathsep.join(sys.path))
    out = subprocess.run([sys.executable, "-c", _FIT_SCRIPT], env=env, capture_output=True,
                         text=True, timeout=120, check=True)
    seen = json.loads(out.stdout.strip().splitlines()[-1])
    assert seen["scale"] == pytest.approx(1.5)
    width, height = seen["screen"]
    assert (width, height) == (853, 480)
    x, y, w, h = seen["frame"]
    assert seen["hint"][0] <= width and seen["hint"][1] <= height
    assert x >= 0 and y >= 0 and x + w <= width and y + h <= height


# --- the floors table: Ctrl+V pastes tab-separated rows ------------------------------------------


def test_ctrl_v_pastes_floors_as_in_the_openings_table(open_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window()
    panel = window.floors_panel
    window.show_editor(panel)
    floors = window.document.building.floors
    top = floors[-1]
    # as a spreadsheet gives it: the header row, the top floor renamed, a new floor above
    text = (f"Level\tName\tFloor level above datum\n"
            f"{top.level}\tRoof storey\t{top.elevation_m:.2f} m\n"
            f"{top.level + 1}\tPenthouse\t{top.elevation_m + 3.0:.2f} m\n")
    QGuiApplication.clipboard().setText(text)
    before = window.document.building
    panel.table.setFocus()
    qtbot.waitUntil(panel.table.hasFocus, timeout=2000)
    qtbot.keyClick(panel.table, Qt.Key.Key_V, Qt.KeyboardModifier.ControlModifier)
    after = window.document.building
    by_level = {f.level: f for f in after.floors}
    assert by_level[top.level].label == "Roof storey"
    assert by_level[top.level + 1].label == "Penthouse"
    assert by_level[top.level + 1].elevation_m == pytest.approx(top.elevation_m + 3.0)
    assert len(after.floors) == len(floors) + 1
    assert panel.selected_level() in (top.level, top.level + 1)
    window.actions_.undo.trigger()  # one step
    assert window.document.building is before
    # what cannot be read pastes nothing and says where
    assert panel.paste("Level\tFloor level above datum\n9\ttall\n") is not None
    assert panel.error.isVisible() and "line 2" in panel.error.text()
    assert window.document.building is before
    # a new floor without its height is refused in words
    reason = panel.paste("Level\tName\n40\tSky lobby\n")
    assert reason is not None and "floor level above the datum" in reason


def test_copied_floors_paste_back_unchanged(open_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window()
    panel = window.floors_panel
    window.show_editor(panel)
    panel.table.selectRow(1)
    text = panel.copy_selected()
    assert len(text.splitlines()) == 2  # the header and the floor
    before = window.document.building
    assert panel.paste(text) is None
    assert window.document.building.floors == before.floors
