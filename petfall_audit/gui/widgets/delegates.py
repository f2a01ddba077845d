"""Cell editors for record tables: a list for choices, a line for typed values."""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import QAbstractItemModel, QModelIndex, QPersistentModelIndex, Qt, QTimer
from PySide6.QtWidgets import (
    QAbstractItemView,
    QComboBox,
    QLineEdit,
    QStyledItemDelegate,
    QStyleOptionViewItem,
    QToolTip,
    QWidget,
)

from petfall_audit.editing.fields import FieldSpec, format_value
from petfall_audit.gui.adapters import SPEC_ROLE
from petfall_audit.present import enum_label

__all__ = ["FieldDelegate"]

Index = QModelIndex | QPersistentModelIndex


class FieldDelegate(QStyledItemDelegate):
    """Combo boxes for ``enum`` and ``ref`` columns (``choices(spec)`` lists the ids); the default
    line editor elsewhere. The model reads and checks what is typed; when it refuses, the editor
    opens again on the same cell with what was typed, and the reason shows beside the cell."""

    def __init__(self, choices: Callable[[FieldSpec], list[str]], parent: QWidget | None = None
                 ) -> None:
        super().__init__(parent)
        self._choices = choices
        self._retry: dict[tuple[int, int], str] = {}

    def createEditor(self, parent: QWidget, option: QStyleOptionViewItem, index: Index) -> QWidget:
        spec = index.data(SPEC_ROLE)
        if isinstance(spec, FieldSpec) and spec.kind in ("enum", "ref"):
            combo = QComboBox(parent)
            if spec.kind == "enum":
                assert spec.enum is not None
                for member in spec.enum:
                    combo.addItem(enum_label(member), format_value(spec, member))
            else:
                if spec.optional:
                    combo.addItem("(all)", "")
                for choice in self._choices(spec):
                    combo.addItem(choice, choice)
            return combo
        return super().createEditor(parent, option, index)

    def setEditorData(self, editor: QWidget, index: Index) -> None:
        if isinstance(editor, QComboBox):
            i = editor.findData(index.data(Qt.ItemDataRole.EditRole))
            editor.setCurrentIndex(max(i, 0))
            return
        typed = self._retry.pop((index.row(), index.column()), None)
        if typed is not None and isinstance(editor, QLineEdit):
            editor.setText(typed)  # what was refused, to correct
            return
        super().setEditorData(editor, index)

    def setModelData(self, editor: QWidget, model: QAbstractItemModel, index: Index) -> None:
        if isinstance(editor, QComboBox):
            model.setData(index, editor.currentData(), Qt.ItemDataRole.EditRole)
            return
        super().setModelData(editor, model, index)
        refused = getattr(model, "refused", None)
        view = self.parent()
        if (isinstance(editor, QLineEdit) and refused is not None
                and refused[:2] == (index.row(), index.column())
                and isinstance(view, QAbstractItemView)):
            cell = QPersistentModelIndex(index)
            QTimer.singleShot(0, lambda: self._reopen(view, cell, refused[2], refused[3]))

    def _reopen(self, view: QAbstractItemView, cell: QPersistentModelIndex, typed: str,
                reason: str) -> None:
        """Open the editor on ``cell`` again with ``typed`` in it and ``reason`` beside it."""
        if not cell.isValid():
            return
        index = view.model().index(cell.row(), cell.column())
        self._retry[(index.row(), index.column())] = typed
        view.setCurrentIndex(index)
        view.edit(index)
        self._retry.pop((index.row(), index.column()), None)
        rect = view.visualRect(index)
        QToolTip.showText(view.viewport().mapToGlobal(rect.bottomLeft()), reason,
                          view.viewport(), rect, 15000)
