"""Openings: a table and a form side by side. Selecting several rows edits them together; the
form ends with the selected opening's photos."""

from __future__ import annotations

from collections.abc import Callable, Sequence
from typing import Any

from PySide6.QtCore import QItemSelection, QItemSelectionModel, Qt
from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QScrollArea,
    QSplitter,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.editing.clipboard import parse_tsv, rows_to_tsv
from petfall_audit.editing.commands import (
    AddOpenings,
    PasteOpenings,
    RemoveOpenings,
    SetOpeningFields,
)
from petfall_audit.editing.document import Document
from petfall_audit.editing.fields import OPENING_FIELDS, FieldSpec
from petfall_audit.editing.history import History
from petfall_audit.editing.placement import duplicates, new_opening
from petfall_audit.editing.query import applicable_openings
from petfall_audit.editing.words import problem_words
from petfall_audit.gui.adapters import RecordTableModel, ViewOptions, _runs, push_command
from petfall_audit.gui.widgets.field_form import MIXED, FieldForm
from petfall_audit.gui.widgets.photos import PhotoHost, PhotoStrip
from petfall_audit.gui.widgets.tables import (
    add_remove_bar,
    clipboard_text,
    error_label,
    record_table,
    refusal_line,
    set_clipboard_text,
    table_action,
)

__all__ = ["OpeningsPanel", "TABLE_FIELDS"]

#: Columns of the openings table (every field but the notes).
TABLE_FIELDS: tuple[FieldSpec, ...] = tuple(s for s in OPENING_FIELDS if s.name != "notes")


class OpeningsPanel(QWidget):
    """The openings of ``doc``: table (multi-select) and form; edits go to ``history``."""

    def __init__(self, doc: Document, history: History, options: ViewOptions, *,
                 actions: Sequence[QAction] = (), host: PhotoHost | None = None,
                 place_hint: Callable[[], tuple[int | None, str | None]] | None = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        #: The floor and facade the user works on, for a new opening when none is selected.
        self._place_hint = place_hint
        self._doc = doc
        self._history = history
        self._options = options
        self.model = RecordTableModel(
            doc, history, options, kind="openings", items=lambda b: b.openings, key="id",
            fields=TABLE_FIELDS,
            make_command=lambda key, changes: SetOpeningFields([key], changes), parent=self,
        )
        self.table = record_table(self.model, "openings_table", self._choices, multi=True,
                                  stretch_last=False)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.DoubleClicked
                                   | QAbstractItemView.EditTrigger.EditKeyPressed
                                   | QAbstractItemView.EditTrigger.AnyKeyPressed)
        self.table.setAlternatingRowColors(True)
        self.form = FieldForm(OPENING_FIELDS, options, self._commit_form, choices=self._choices)
        self.form.setObjectName("opening_form")
        self.photos = PhotoStrip(doc, history, host=host)
        form_layout = self.form.layout()
        assert isinstance(form_layout, QFormLayout)
        form_layout.addRow("Photos", self.photos)
        self.form_title = QLabel("No opening selected")
        self.form_title.setObjectName("form_title")
        self.table_error = error_label("table_error")
        self.place_note = QLabel()
        self.place_note.setObjectName("place_note")
        self.place_note.setWordWrap(True)
        self.place_note.hide()

        bar = add_remove_bar("Add opening", self.add_opening,
                             "Remove selected", self.remove_selected, actions)
        duplicate = QPushButton("Duplicate")
        duplicate.setToolTip("A copy of each selected opening beside it (Ctrl+Shift+D)")
        duplicate.clicked.connect(lambda _c=False: self.duplicate_selected())
        bar.addWidget(duplicate)
        self.count_label = QLabel()
        bar.addSeparator()
        bar.addWidget(self.count_label)

        left = QWidget()
        left_layout = QVBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        left_layout.addWidget(bar)
        left_layout.addWidget(self.table_error)  # above the table, where the user looks
        left_layout.addWidget(self.place_note)
        left_layout.addWidget(self.table, 1)
        right = QWidget()
        right_layout = QVBoxLayout(right)
        right_layout.setContentsMargins(4, 0, 0, 0)
        right_layout.addWidget(self.form_title)
        scroll = QScrollArea()
        scroll.setWidgetResizable(True)
        scroll.setWidget(self.form)
        right_layout.addWidget(scroll, 1)
        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(left)
        splitter.addWidget(right)
        splitter.setStretchFactor(0, 3)
        splitter.setStretchFactor(1, 2)
        splitter.setSizes([640, 360])  # the table first; the form scrolls
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(splitter)

        self.model.edit_failed.connect(self._on_edit_failed)
        self.model.edited.connect(lambda *_: self.table_error.hide())
        self.table.selectionModel().selectionChanged.connect(self._on_selection_changed)
        self._disconnects = [doc.on_changed(k, self._on_doc_changed)
                             for k in ("openings", "facades")]
        SK = QKeySequence.StandardKey
        table_action(self.table, "Remove selected openings", SK.Delete, self.remove_selected)
        table_action(self.table, "Copy rows (tab-separated)", SK.Copy, self.copy_selected)
        table_action(self.table, "Paste rows", SK.Paste, self.paste)
        table_action(self.table, "Duplicate selected", "Ctrl+Shift+D", self.duplicate_selected)
        self._refresh_count()

    def detach(self) -> None:
        self.model.detach()
        self.photos.detach()
        for disconnect in self._disconnects:
            disconnect()

    # --- selection -------------------------------------------------------------------------------

    def selected_ids(self) -> list[str]:
        """Ids of the selected openings, in table order."""
        rows: set[int] = set()
        selection = self.table.selectionModel().selection()
        for k in range(selection.count()):  # whole rows are selected: read the row spans
            span = selection.at(k)
            rows.update(range(span.top(), span.bottom() + 1))
        return [self.model.key_of_row(r) for r in sorted(rows) if r < self.model.rowCount()]

    def select_ids(self, ids: Sequence[str]) -> None:
        """Select the openings with ``ids`` in one step (one selection change, however many)."""
        row_of = self.model.rows_by_key()
        rows = [row_of[i] for i in ids if i in row_of]
        selection = QItemSelection()
        last_col = self.model.columnCount() - 1
        for start, end in _runs(sorted(set(rows))):
            selection.select(self.model.index(start, 0), self.model.index(end, last_col))
        self.table.selectionModel().select(
            selection, QItemSelectionModel.SelectionFlag.ClearAndSelect
            | QItemSelectionModel.SelectionFlag.Rows)
        if rows:
            self.table.scrollTo(self.model.index(rows[0], 0))

    def _choices(self, spec: FieldSpec) -> list[str]:
        if spec.name == "facade":
            return [f.id for f in self._doc.building.facades]
        return []

    def _on_selection_changed(self, *_: Any) -> None:
        self.table_error.hide()
        self.place_note.hide()
        self._refresh_form(keep_errors=False)

    def _refresh_form(self, *, keep_errors: bool) -> None:
        ids = self.selected_ids()
        self.photos.set_opening(ids[0] if len(ids) == 1 else None, several=len(ids) > 1)
        if not ids:
            self.form_title.setText("No opening selected: select one or more rows")
            self.form.set_values({}, enabled=False)
            return
        chosen = set(ids)
        openings = [o for o in self._doc.building.openings if o.id in chosen]
        values: dict[str, Any] = {}
        for spec in OPENING_FIELDS:
            vals = [getattr(o, spec.name) for o in openings]
            values[spec.name] = vals[0] if all(v == vals[0] for v in vals) else MIXED
        if len(ids) == 1:
            self.form_title.setText(f"Opening {ids[0]}")
        else:
            self.form_title.setText(f"{len(ids)} openings selected: a change applies to all")
        self.form.set_values(values, keep_errors=keep_errors,
                             disabled_fields=("id",) if len(ids) > 1 else ())

    def _on_doc_changed(self, kind: str) -> None:
        self._refresh_count()
        self._refresh_form(keep_errors=True)

    def _refresh_count(self) -> None:
        n = len(self._doc.building.openings)
        self.count_label.setText(f"  {n} opening{'s' if n != 1 else ''}")

    # --- edits ------------------------------------------------------------------------------------

    def _commit_form(self, name: str, value: Any) -> str | None:
        ids = self.selected_ids()
        if not ids:
            return "select an opening first"
        fits, skipped, why = applicable_openings(self._doc.building, ids, name, value)
        if not fits:
            return why
        try:
            cmd = SetOpeningFields(fits, {name: value})
        except ValueError as exc:
            return str(exc)
        reason = push_command(self._history, cmd, self._options.units)
        if reason is None and skipped:
            self.table_error.setText(f"! {len(skipped)} of the selected openings left as they "
                                     f"were: {why}")
            self.table_error.show()
        if reason is None and name == "id":
            self.select_ids([value])
        return reason

    def _on_edit_failed(self, key: str, field_name: str, message: str) -> None:
        self.table_error.setText("! " + refusal_line(f"Opening {key}", message))
        self.table_error.show()

    def add_opening(self) -> str | None:
        """Add an opening on the selected opening's floor and facade (else the floor chosen in
        the floors table, else the lowest floor), at a free place the rules accept; returns its
        id, or ``None`` with the reason shown when no floor and facade accept one."""
        b = self._doc.building
        ids = self.selected_ids()
        level: int | None = None
        facade: str | None = None
        if ids:
            like = b.opening(ids[-1])
            level, facade = like.floor, like.facade
        elif self._place_hint is not None:
            level, facade = self._place_hint()
        opening, problems = new_opening(b, level=level, facade=facade)
        if opening is None:
            self.table_error.setText("! No opening added: " + problem_words(problems, b,
                                                                system=self._options.units))
            self.table_error.show()
            return None
        index = self.model.row_of_key(ids[-1]) + 1 if ids else None
        reason = push_command(self._history, AddOpenings([opening], index=index),
                              self._options.units)
        if reason is not None:
            self.table_error.setText(f"! {reason}")
            self.table_error.show()
            return None
        self.select_ids([opening.id])
        wanted = level if level is not None else min(f.level for f in b.floors)
        if (opening.floor, opening.facade) != (wanted, facade or opening.facade):
            self.place_note.setText(
                f"Added {opening.id} on level {opening.floor}, facade {opening.facade}: the "
                f"surfaces below do not allow an opening on level {wanted} there. Change its "
                "floor, facade and place in the form.")
            self.place_note.show()
        return opening.id

    def copy_selected(self) -> str:
        """Put the selected openings on the clipboard as tab-separated rows; returns the text."""
        ids = set(self.selected_ids())
        rows = [o for o in self._doc.building.openings if o.id in ids]
        text = rows_to_tsv(rows, TABLE_FIELDS, self._options.units) if rows else ""
        if text:
            set_clipboard_text(text)
        return text

    def paste(self, text: str | None = None) -> str | None:
        """Paste tab-separated rows (default: the clipboard) as one step: a row with an existing
        id changes that opening, others are added. The reason if refused."""
        text = clipboard_text() if text is None else text
        rows, problems = parse_tsv(text, TABLE_FIELDS, self._options.units)
        reason: str | None = None
        if problems:
            reason = "nothing pasted: " + problem_words(problems)
        elif not rows:
            reason = "nothing to paste: copy rows from a spreadsheet or this table first"
        else:
            cmd = PasteOpenings([r.values for r in rows])
            reason = push_command(self._history, cmd, self._options.units)
            if reason is None:
                self.select_ids([*cmd.updated, *cmd.added])
                return None
        self.table_error.setText(f"! {reason}")
        self.table_error.show()
        return reason

    def duplicate_selected(self) -> list[str]:
        """Add a copy of each selected opening beside it; returns the new ids."""
        ids = self.selected_ids()
        if not ids:
            return []
        copies = duplicates(self._doc.building, ids)
        index = max(self.model.row_of_key(i) for i in ids) + 1
        label = f"Duplicate {ids[0]}" if len(ids) == 1 else f"Duplicate {len(ids)} openings"
        reason = push_command(self._history, AddOpenings(copies, index=index, label=label),
                              self._options.units)
        if reason is not None:
            self.table_error.setText(f"! {reason}")
            self.table_error.show()
            return []
        self.select_ids([o.id for o in copies])
        return [o.id for o in copies]

    def remove_selected(self) -> None:
        ids = self.selected_ids()
        if ids:
            reason = push_command(self._history, RemoveOpenings(ids), self._options.units)
            if reason is not None:
                self.table_error.setText(f"! {reason}")
                self.table_error.show()
