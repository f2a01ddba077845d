"""Edits that leave the window where it was: the toolbar's buttons keep their places, the state
note over the results does not lay out the results page again, and a table fits its columns
on new results before it repaints (petfall_audit.gui.widgets.steady_line, tables.py,
main_window.py)."""

from __future__ import annotations

from typing import Any

import pytest
from PySide6.QtCore import QAbstractTableModel, QEvent, QModelIndex, QObject, Qt
from PySide6.QtWidgets import QLabel, QTableView, QTabWidget, QToolButton, QVBoxLayout, QWidget

from petfall_audit.editing.commands import SetOpeningFields
from petfall_audit.gui.widgets.steady_line import SteadyLine
from petfall_audit.gui.widgets.tables import keep_columns_fitted
from tests.gui.test_editing_day import open_window

pytestmark = pytest.mark.gui


class _Count(QObject):
    """Counts the events of one type that reach a widget."""

    def __init__(self, kind: QEvent.Type) -> None:
        super().__init__()
        self.kind = kind
        self.seen = 0

    def eventFilter(self, watched: QObject, event: QEvent) -> bool:  # noqa: N802
        if event.type() == self.kind:
            self.seen += 1
        return False


def test_the_toolbar_buttons_keep_their_places_while_the_menu_names_the_edit(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.demo import sample_building

    window = open_window(qtbot, sample_building("walkup"))
    bar = window.findChild(QWidget, "main_toolbar")
    buttons = [b for b in bar.findChildren(QToolButton) if b.isVisible()]
    before = [(b.text(), b.geometry()) for b in buttons]
    first = window.document.building.openings[0]
    window.history.push(SetOpeningFields([first.id], {"netting_mesh_mm": 30.0}))
    qtbot.wait(20)
    undo = window.actions_.undo
    assert undo.text().startswith("&Undo Set netting mesh of")  # the Edit menu names the edit
    assert undo.iconText() == "Undo"
    assert undo.toolTip().startswith("Undo Set netting mesh of")  # and the button's tooltip
    assert [(b.text(), b.geometry()) for b in buttons] == before
    window.history.undo()
    qtbot.wait(20)
    assert window.actions_.redo.iconText() == "Redo"
    assert window.actions_.undo.toolTip() == "Nothing to undo"
    assert [(b.text(), b.geometry()) for b in buttons] == before
    # the note over the ranked openings changes on every edit: it sits in a steady line
    assert isinstance(window.results_state.parentWidget(), SteadyLine)


def test_a_steady_line_lays_out_its_page_again_only_when_its_height_changes(qtbot) -> None:  # type: ignore[no-untyped-def]
    tabs = QTabWidget()
    page = QWidget()
    label = QLabel("Results are out of date: recomputing…")
    label.setWordWrap(True)
    layout = QVBoxLayout(page)
    layout.addWidget(SteadyLine(label))
    layout.addWidget(QTableView(), 1)
    tabs.addTab(page, "Ranked")
    qtbot.addWidget(tabs)
    tabs.resize(600, 300)
    tabs.show()
    qtbot.waitExposed(tabs)
    qtbot.wait(20)
    requests = _Count(QEvent.Type.LayoutRequest)
    tabs.installEventFilter(requests)  # a tab widget repaints its whole page on each
    one_line = label.height()
    label.setText("166 openings ranked, worst first. Double-click a row to edit the opening.")
    qtbot.wait(20)
    assert requests.seen == 0 and label.height() == one_line
    label.setText(" ".join(["A note long enough to need more than one line."] * 12))
    qtbot.waitUntil(lambda: label.height() > one_line, timeout=2000)
    assert requests.seen >= 1  # more lines: the page makes room
    assert label.width() == label.parentWidget().width()
    label.setText("Back to one line.")
    qtbot.waitUntil(lambda: label.height() == one_line, timeout=2000)


class _Texts(QAbstractTableModel):
    """One column of texts, replaced by a model reset."""

    def __init__(self, texts: list[str]) -> None:
        super().__init__()
        self.texts = texts

    def replace(self, texts: list[str]) -> None:
        self.beginResetModel()
        self.texts = texts
        self.endResetModel()

    def rowCount(self, parent: Any = QModelIndex()) -> int:  # noqa: N802, B008
        return 0 if parent.isValid() else len(self.texts)

    def columnCount(self, parent: Any = QModelIndex()) -> int:  # noqa: N802, B008
        return 0 if parent.isValid() else 2

    def data(self, index: Any, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if role == Qt.ItemDataRole.DisplayRole and index.column() == 0:
            return self.texts[index.row()]
        return None


def test_a_table_fits_its_columns_on_a_reset_before_it_repaints(qtbot) -> None:  # type: ignore[no-untyped-def]
    model = _Texts(["short"])
    table = QTableView()
    table.setModel(model)
    keep_columns_fitted(table)
    qtbot.addWidget(table)
    table.show()
    qtbot.waitExposed(table)
    narrow = table.columnWidth(0)
    model.replace(["a much longer text than the column had before"])
    # no event processed yet: the column is already as wide as its new text
    assert table.columnWidth(0) > narrow
    wide = table.fontMetrics().horizontalAdvance("a much longer text than the column had before")
    assert table.columnWidth(0) >= wide
