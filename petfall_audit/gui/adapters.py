"""Adapters from the Qt-free document to Qt: signals and item models.

- :class:`DocumentSignals` re-emits :class:`~petfall_audit.editing.document.Document` callbacks
  as a Qt signal.
- :class:`ViewOptions` carries the display units and palette to every widget.
- :class:`RecordTableModel` shows one tuple of the building (openings, floors, facades, surfaces)
  as a table; it keeps its own copy of the rows and turns each change into
  ``beginRemoveRows``/``beginInsertRows``/``dataChanged``. Edits typed in a cell are read by the
  shared field specs and pushed as commands; a bad value emits ``edit_failed`` and the old value
  stays.
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import Any

from PySide6.QtCore import (
    QAbstractTableModel,
    QModelIndex,
    QObject,
    QPersistentModelIndex,
    Qt,
    Signal,
)

from petfall_audit.editing.commands import Command
from petfall_audit.editing.document import Document
from petfall_audit.editing.fields import (
    FieldSpec,
    format_value,
    parse_value,
)
from petfall_audit.editing.history import History
from petfall_audit.editing.state import DisplayOptions, push_command
from petfall_audit.model import Building

__all__ = [
    "DocumentSignals",
    "ViewOptions",
    "RecordTableModel",
    "push_command",
    "KEY_ROLE",
    "SPEC_ROLE",
]

Index = QModelIndex | QPersistentModelIndex
#: Role that gives a row's key (e.g. an opening id).
KEY_ROLE = Qt.ItemDataRole.UserRole + 1
#: Role that gives a column's :class:`FieldSpec`.
SPEC_ROLE = Qt.ItemDataRole.UserRole + 2


class DocumentSignals(QObject):
    """``changed(kind)`` for every document change (see ``Document`` for the kinds)."""

    changed = Signal(str)

    def __init__(self, doc: Document, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._disconnect = doc.on_changed("*", self.changed.emit)

    def detach(self) -> None:
        """Stop listening to the document (before it is replaced)."""
        self._disconnect()


class ViewOptions(QObject):
    """The Qt face of the window's :class:`~petfall_audit.editing.state.DisplayOptions`
    (display units and band palette): ``changed`` is a Qt signal, so a widget that is deleted
    stops receiving it."""

    changed = Signal()

    def __init__(self, model: DisplayOptions | None = None,
                 parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.model = model if model is not None else DisplayOptions()
        self._disconnect = self.model.changed.connect(self.changed.emit)

    @property
    def units(self) -> str:
        return self.model.units

    @units.setter
    def units(self, value: str) -> None:
        self.model.units = value

    @property
    def palette(self) -> str:
        return self.model.palette

    @palette.setter
    def palette(self, value: str) -> None:
        self.model.palette = value


class RecordTableModel(QAbstractTableModel):
    """Rows of one part of the building, columns from field specs.

    ``items(building)`` gives the rows; ``key`` names the field that identifies a row;
    ``make_command(key, changes)`` builds the command for an edit. ``extra`` adds read-only
    computed columns: ``(header, fn(building, item, units) -> str)``.
    """

    edit_failed = Signal(str, str, str)  # row key, field name, message
    edited = Signal(str, str)  # row key, field name: an edit typed in a cell was applied

    def __init__(
        self,
        doc: Document,
        history: History,
        options: ViewOptions,
        *,
        kind: str,
        items: Callable[[Building], Sequence[Any]],
        key: str,
        fields: Sequence[FieldSpec],
        make_command: Callable[[Any, dict[str, Any]], Command],
        extra: Sequence[tuple[str, Callable[[Building, Any, str], str]]] = (),
        editable_extra: Callable[[Any, int, str], Command | str | None] | None = None,
        extra_kinds: Sequence[str] = (),
        parent: QObject | None = None,
    ) -> None:
        super().__init__(parent)
        self._doc = doc
        self._history = history
        self._options = options
        self._kind = kind
        self._items_of = items
        self._key = key
        self._fields = tuple(fields)
        self._make_command = make_command
        self._extra = tuple(extra)
        self._editable_extra = editable_extra
        self._rows: list[Any] = list(items(doc.building))
        #: The last refused cell edit: ``(row, column, text typed, reason)``, else ``None``.
        self.refused: tuple[int, int, str, str] | None = None
        self._editing: tuple[int, int, str] | None = None
        self.edit_failed.connect(self._note_refusal)
        self._row_index: tuple[list[Any], dict[Any, int]] | None = None
        self._disconnects = [doc.on_changed(kind, self._on_changed)]
        for other in extra_kinds:  # computed columns may read other parts of the building
            self._disconnects.append(doc.on_changed(other, self._on_other_changed))
        options.changed.connect(self._on_options_changed)

    def detach(self) -> None:
        for disconnect in self._disconnects:
            disconnect()

    # --- reading ---------------------------------------------------------------------------------

    @property
    def fields(self) -> tuple[FieldSpec, ...]:
        return self._fields

    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self._fields) + len(self._extra)

    def key_of_row(self, row: int) -> Any:
        return getattr(self._rows[row], self._key)

    def row_of_key(self, key: Any) -> int:
        return self.rows_by_key().get(key, -1)

    def rows_by_key(self) -> dict[Any, int]:
        """Row of each key (built once per change of the rows)."""
        if self._row_index is None or self._row_index[0] is not self._rows:
            index: dict[Any, int] = {}
            for i, item in enumerate(self._rows):
                index.setdefault(getattr(item, self._key), i)
            self._row_index = (self._rows, index)
        return self._row_index[1]

    def column_of(self, field_name: str) -> int:
        for i, spec in enumerate(self._fields):
            if spec.name == field_name:
                return i
        raise KeyError(field_name)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if orientation != Qt.Orientation.Horizontal:
            return None
        if section < len(self._fields):
            spec = self._fields[section]
            if role == Qt.ItemDataRole.DisplayRole:
                return spec.label
            if role == Qt.ItemDataRole.ToolTipRole:
                return spec.help or None
            return None
        if role == Qt.ItemDataRole.DisplayRole:
            return self._extra[section - len(self._fields)][0]
        return None

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if not index.isValid():
            return None
        item = self._rows[index.row()]
        col = index.column()
        if role == KEY_ROLE:
            return getattr(item, self._key)
        if col >= len(self._fields):
            if role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.EditRole):
                fn = self._extra[col - len(self._fields)][1]
                return fn(self._doc.building, item, self._options.units)
            return None
        spec = self._fields[col]
        value = getattr(item, spec.name)
        if role == SPEC_ROLE:
            return spec
        if spec.kind == "bool":
            if role == Qt.ItemDataRole.CheckStateRole:
                return Qt.CheckState.Checked if value else Qt.CheckState.Unchecked
            return None
        if role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.EditRole):
            if spec.kind == "gap" and value is None and role == Qt.ItemDataRole.DisplayRole:
                return "none"
            return format_value(spec, value, self._options.units)
        if role == Qt.ItemDataRole.ToolTipRole:
            return spec.help or None
        return None

    def flags(self, index: Index) -> Qt.ItemFlag:
        base = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        col = index.column()
        if col >= len(self._fields):
            if self._editable_extra is not None:
                return base | Qt.ItemFlag.ItemIsEditable
            return base
        if self._fields[col].kind == "bool":
            return base | Qt.ItemFlag.ItemIsUserCheckable
        return base | Qt.ItemFlag.ItemIsEditable

    # --- editing ---------------------------------------------------------------------------------

    def setData(self, index: Index, value: Any, role: int = Qt.ItemDataRole.EditRole) -> bool:
        self.refused = None
        if not index.isValid():
            return False
        self._editing = (index.row(), index.column(), str(value))
        item = self._rows[index.row()]
        key = getattr(item, self._key)
        col = index.column()
        if col >= len(self._fields):
            if self._editable_extra is None or role != Qt.ItemDataRole.EditRole:
                return False
            result = self._editable_extra(item, col - len(self._fields), str(value))
            if result is None:
                return False
            if isinstance(result, str):
                self.edit_failed.emit(str(key), self._extra[col - len(self._fields)][0], result)
                return False
            return self._push(key, "", result)
        spec = self._fields[col]
        if spec.kind == "bool":
            if role != Qt.ItemDataRole.CheckStateRole:
                return False
            new = Qt.CheckState(value) == Qt.CheckState.Checked if not isinstance(value, bool) \
                else value
        else:
            if role != Qt.ItemDataRole.EditRole:
                return False
            text = str(value)
            if text == format_value(spec, getattr(item, spec.name), self._options.units):
                return False  # nothing changed
            try:
                new = parse_value(spec, text, self._options.units)
            except ValueError as exc:
                self.edit_failed.emit(str(key), spec.name, f"{spec.label}: {exc}")
                return False
        if new == getattr(item, spec.name):
            return False
        return self._push(key, spec.name, self._make_command(key, {spec.name: new}))

    def _note_refusal(self, _key: str, _field: str, message: str) -> None:
        if self._editing is not None:
            self.refused = (*self._editing, message)

    def _push(self, key: Any, field_name: str, cmd: Command) -> bool:
        reason = push_command(self._history, cmd, self._options.units)
        if reason is not None:
            self.edit_failed.emit(str(key), field_name, reason)
            return False
        self.edited.emit(str(key), field_name)
        return True

    # --- following the document ------------------------------------------------------------------

    def _on_options_changed(self) -> None:
        if self._rows:
            self.dataChanged.emit(self.index(0, 0),
                                  self.index(len(self._rows) - 1, self.columnCount() - 1))

    def _on_other_changed(self, kind: str) -> None:
        if kind != self._kind:
            self._on_options_changed()

    def _on_changed(self, kind: str) -> None:
        self.sync(self._items_of(self._doc.building))

    def sync(self, new_items: Sequence[Any]) -> None:
        """Bring the rows in line with ``new_items`` using row removes, inserts and changes."""
        new = list(new_items)
        old_keys = [getattr(i, self._key) for i in self._rows]
        new_keys = [getattr(i, self._key) for i in new]
        if len(set(old_keys)) != len(old_keys) or len(set(new_keys)) != len(new_keys):
            self.beginResetModel()
            self._rows = new
            self.endResetModel()
            return
        new_set, old_set = set(new_keys), set(old_keys)
        # removals, last first, in runs of neighbouring rows
        gone = [i for i, k in enumerate(old_keys) if k not in new_set]
        for start, end in reversed(_runs(gone)):
            self.beginRemoveRows(QModelIndex(), start, end)
            del self._rows[start:end + 1]
            self._row_index = None
            self.endRemoveRows()
        kept_keys = [k for k in old_keys if k in new_set]
        if kept_keys != [k for k in new_keys if k in old_set]:  # order changed: start over
            self.beginResetModel()
            self._rows = new
            self.endResetModel()
            return
        added = [j for j, k in enumerate(new_keys) if k not in old_set]
        for start, end in _runs(added):
            self.beginInsertRows(QModelIndex(), start, end)
            self._rows[start:start] = new[start:end + 1]
            self._row_index = None
            self.endInsertRows()
        changed = [i for i, (a, b) in enumerate(zip(self._rows, new, strict=True)) if a is not b]
        self._rows = new
        last_col = self.columnCount() - 1
        for start, end in _runs(changed):
            self.dataChanged.emit(self.index(start, 0), self.index(end, last_col))
        if self._extra and (gone or added) and self._rows:
            self.dataChanged.emit(self.index(0, len(self._fields)),
                                  self.index(len(self._rows) - 1, last_col))


def _runs(indices: list[int]) -> list[tuple[int, int]]:
    """Sorted indices grouped into (first, last) runs of consecutive numbers."""
    runs: list[tuple[int, int]] = []
    for i in indices:
        if runs and runs[-1][1] == i - 1:
            runs[-1] = (runs[-1][0], i)
        else:
            runs.append((i, i))
    return runs


# --- results --------------------------------------------------------------------------------------
