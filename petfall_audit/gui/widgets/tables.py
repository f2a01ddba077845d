"""The editors' common parts: a record table set up the same way everywhere, and the line that
shows why an edit was refused."""

from __future__ import annotations

from collections.abc import Callable, Iterable

from PySide6.QtGui import QAction
from PySide6.QtWidgets import QAbstractItemView, QLabel, QPushButton, QTableView, QToolBar

from petfall_audit.editing.fields import FieldSpec
from petfall_audit.gui.adapters import RecordTableModel
from petfall_audit.gui.widgets.delegates import FieldDelegate
from petfall_audit.gui.widgets.field_form import ERROR_STYLE

__all__ = [
    "add_remove_bar","record_table", "error_label"]

ROW_HEIGHT_PX = 22


def record_table(model: RecordTableModel, name: str,
                 choices: Callable[[FieldSpec], list[str]], *, multi: bool = False,
                 stretch_last: bool = True) -> QTableView:
    """A compact table of ``model`` (whole rows selected; several with ``multi``), its cells
    edited through the field specs with ``choices`` for lists, columns sized to the content."""
    table = QTableView()
    table.setObjectName(name)
    table.setModel(model)
    table.setItemDelegate(FieldDelegate(choices, table))
    table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
    table.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection if multi
                           else QAbstractItemView.SelectionMode.SingleSelection)
    table.verticalHeader().hide()
    table.verticalHeader().setDefaultSectionSize(ROW_HEIGHT_PX)
    table.setWordWrap(False)
    header = table.horizontalHeader()
    header.setResizeContentsPrecision(40)  # size columns from the first rows only
    table.resizeColumnsToContents()
    header.setStretchLastSection(stretch_last)
    return table


def error_label(name: str = "") -> QLabel:
    """A hidden, word-wrapped label in the error style (shown with the reason of a refusal)."""
    label = QLabel()
    if name:
        label.setObjectName(name)
    label.setStyleSheet(ERROR_STYLE)
    label.setWordWrap(True)
    label.hide()
    return label


def add_remove_bar(
    add_label: str,
    on_add: Callable[[], object],
    remove_label: str,
    on_remove: Callable[[], object],
    actions: Iterable[QAction] = (),
) -> QToolBar:
    """The toolbar above an editor table: an add and a remove button, then ``actions``."""
    bar = QToolBar()
    for label, handler in ((add_label, on_add), (remove_label, on_remove)):
        button = QPushButton(label)
        button.clicked.connect(lambda _checked=False, h=handler: h())
        bar.addWidget(button)
    for action in actions:
        bar.addAction(action)
    return bar
