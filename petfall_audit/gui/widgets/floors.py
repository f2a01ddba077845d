"""Floors: levels, names, elevations and storey heights; add, remove, copy a typical floor."""

from __future__ import annotations

from collections import Counter
from collections.abc import Sequence

from PySide6.QtCore import QItemSelection, QItemSelectionModel
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import (
    QLabel,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.editing.clipboard import parse_tsv, rows_to_tsv
from petfall_audit.editing.commands import (
    AddFloor,
    AddFloors,
    Command,
    PasteFloors,
    RemoveFloor,
    SetFloor,
    SetFloorElevations,
)
from petfall_audit.editing.document import Document
from petfall_audit.editing.fields import FLOOR_FIELDS, FieldSpec, format_value, parse_value
from petfall_audit.editing.history import History
from petfall_audit.editing.query import (
    elevations_for_storey_height,
    next_floor,
    next_floors,
    storey_heights_m,
)
from petfall_audit.editing.words import problem_words
from petfall_audit.gui.adapters import RecordTableModel, ViewOptions, push_command
from petfall_audit.gui.widgets.tables import (
    add_remove_bar,
    clipboard_text,
    error_label,
    record_table,
    refusal_line,
    set_clipboard_text,
    table_action,
)
from petfall_audit.model import Building, Floor
from petfall_audit.present.numbers import plural

__all__ = ["FloorsPanel"]

_LENGTH = FieldSpec("storey_m", "Storey height", "length")


class _PerBuilding:
    """The storey heights (m) and opening counts by level of the last building asked about,
    and their texts: a table of floors reads them once per cell, and each takes a pass over
    the building."""

    def __init__(self) -> None:
        self._building: Building | None = None
        self._heights: dict[int, float | None] = {}
        self._counts: Counter[int] = Counter()

    def _of(self, building: Building) -> None:
        if building is not self._building:  # buildings are immutable: same object, same values
            self._heights = storey_heights_m(building)
            self._counts = Counter(o.floor for o in building.openings)
            self._building = building

    def storey_m(self, building: Building, level: int) -> float | None:
        self._of(building)
        return self._heights.get(level)

    def openings(self, building: Building, level: int) -> int:
        self._of(building)
        return self._counts[level]

    def storey_text(self, building: Building, floor: Floor, units: str) -> str:
        height = self.storey_m(building, floor.level)
        return "—" if height is None else format_value(_LENGTH, height, units)

    def openings_text(self, building: Building, floor: Floor, units: str) -> str:
        return str(self.openings(building, floor.level))


class FloorsPanel(QWidget):
    """The floors of ``doc``. Editing a storey height moves every floor above it."""

    def __init__(self, doc: Document, history: History, options: ViewOptions, *,
                 actions: Sequence[QAction] = (), parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._doc = doc
        self._history = history
        self._options = options
        self._per_building = _PerBuilding()
        self.model = RecordTableModel(
            doc, history, options, kind="floors", items=lambda b: b.floors, key="level",
            fields=FLOOR_FIELDS,
            make_command=lambda level, changes: SetFloor(level, changes),
            extra=[("Storey height (to floor above)", self._per_building.storey_text),
                   ("Openings", self._per_building.openings_text)],
            editable_extra=self._edit_extra, extra_kinds=("openings",), parent=self,
        )
        self.table = record_table(self.model, "floors_table", lambda spec: [])
        self.error = error_label()
        self.note = QLabel()
        self.note.setObjectName("floors_note")
        self.note.setWordWrap(True)
        self.note.hide()
        self.model.edit_failed.connect(self._on_edit_failed)
        self.model.edited.connect(lambda *_: self._clear_messages())

        bar = add_remove_bar("Add floors on top", self.add_floor,
                             "Remove selected floor", self.remove_selected, actions)
        self.add_count = QSpinBox()
        self.add_count.setObjectName("add_floor_count")
        self.add_count.setRange(1, 200)
        self.add_count.setSuffix(" floor")
        self.add_count.valueChanged.connect(
            lambda n: self.add_count.setSuffix(f" {plural(n, 'floor')}"))
        self.add_count.setToolTip("How many floors 'Add floors on top' adds, one storey apart")
        bar.insertWidget(bar.actions()[1], self.add_count)
        SK = QKeySequence.StandardKey
        table_action(self.table, "Remove selected floor", SK.Delete, self.remove_selected)
        table_action(self.table, "Copy rows (tab-separated)", SK.Copy, self.copy_selected)
        table_action(self.table, "Paste rows", SK.Paste, self.paste)
        hint = QLabel("Floor levels are finished-floor heights above the building's datum. "
                      "Changing a storey height moves every floor above it.")
        hint.setWordWrap(True)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(bar)
        layout.addWidget(self.error)  # above the table, where the user looks
        layout.addWidget(self.note)
        layout.addWidget(hint)
        layout.addWidget(self.table, 1)

    def detach(self) -> None:
        self.model.detach()

    def selected_level(self) -> int | None:
        rows = self.table.selectionModel().selectedRows()
        return int(self.model.key_of_row(rows[0].row())) if rows else None

    def _edit_extra(self, floor: Floor, column: int, text: str) -> Command | str | None:
        if column != 0:
            return None
        units = self._options.units
        if text == self._per_building.storey_text(self._doc.building, floor, units):
            return None
        try:
            height_m = parse_value(_LENGTH, text, units)
            mapping = elevations_for_storey_height(self._doc.building, floor.level, height_m)
        except ValueError as exc:
            return f"storey height: {exc}"
        if height_m <= 0:
            return "storey height must be more than zero"
        return SetFloorElevations(mapping, label=f"Set storey height of floor {floor.level}")

    def _on_edit_failed(self, key: str, field_name: str, message: str) -> None:
        floor = next((f for f in self._doc.building.floors if str(f.level) == key), None)
        thing = (floor.label or f"Level {floor.level}") if floor is not None else f"Level {key}"
        self._show_error(refusal_line(thing, message))

    def _show_error(self, message: str) -> None:
        self.note.hide()
        self.error.setText(f"! {message}")
        self.error.show()

    def _clear_messages(self) -> None:
        self.error.hide()
        self.note.hide()

    def add_floor(self, count: int | None = None) -> None:
        """Add ``count`` floors on top (default: the number chosen beside the button), one
        storey apart, as one undo step."""
        self._clear_messages()
        n = self.add_count.value() if count is None else count
        cmd = (AddFloor(next_floor(self._doc.building)) if n == 1
               else AddFloors(next_floors(self._doc.building, n)))
        reason = push_command(self._history, cmd)
        if reason:
            self._show_error(reason)

    def copy_selected(self) -> str:
        """Put the selected floors on the clipboard as tab-separated rows."""
        rows = {r.row() for r in self.table.selectionModel().selectedRows()}
        floors = [f for k, f in enumerate(self._doc.building.floors) if k in rows]
        text = rows_to_tsv(floors, FLOOR_FIELDS, self._options.units) if floors else ""
        if text:
            set_clipboard_text(text)
        return text

    def paste(self, text: str | None = None) -> str | None:
        """Paste tab-separated rows (default: the clipboard) as one step: a row with an existing
        level changes that floor, others are added. The reason if refused."""
        self._clear_messages()
        text = clipboard_text() if text is None else text
        rows, problems = parse_tsv(text, FLOOR_FIELDS, self._options.units)
        reason: str | None
        if problems:
            reason = "nothing pasted: " + problem_words(problems)
        elif not rows:
            reason = "nothing to paste: copy rows from a spreadsheet or this table first"
        else:
            cmd = PasteFloors([r.values for r in rows])
            reason = push_command(self._history, cmd)
            if reason is None:
                self.select_levels([*cmd.updated, *cmd.added])
                return None
        self._show_error(reason)
        return reason

    def select_levels(self, levels: Sequence[int]) -> None:
        """Select the rows of the floors at ``levels``."""
        selection = QItemSelection()
        for level in levels:
            row = self.model.row_of_key(level)
            if row >= 0:
                selection.select(self.model.index(row, 0),
                                 self.model.index(row, self.model.columnCount() - 1))
        self.table.selectionModel().select(
            selection, QItemSelectionModel.SelectionFlag.ClearAndSelect)

    def remove_selected(self) -> str | None:
        """Remove the selected floor and its openings; the reason if refused."""
        self._clear_messages()
        level = self.selected_level()
        if level is None:
            self._show_error("select a floor first")
            return "select a floor first"
        cmd = RemoveFloor(level)
        reason = push_command(self._history, cmd)
        if reason:
            self._show_error(reason)
            return reason
        n = len(cmd.removed_openings)
        if n:
            self.note.setText(f"Removed floor {level} and the {n} opening{'s' if n != 1 else ''} "
                              "on it. Undo (Ctrl+Z) brings them back.")
            self.note.show()
        return None
