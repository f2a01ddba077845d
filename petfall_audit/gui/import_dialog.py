"""Import a window and balcony schedule (CSV or XLSX) or a building model (IFC) from the app.

:class:`ImportDialog` drives the Qt-free steps of :mod:`petfall_audit.io.schedule`: the guessed
column mapping in an editable table (one combo box per column, a unit per column), a preview that
lists every bad cell by row and column, merge or replace, and "import the valid rows only". The
result is applied by :func:`import_schedule` as ONE undoable command on the document's history.
A ``.ifc`` file goes to :mod:`petfall_audit.gui.model_import_dialog` instead.
"""

from __future__ import annotations

import html
from collections.abc import Mapping
from pathlib import Path
from typing import Any

from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt
from PySide6.QtGui import QBrush, QColor, QFont
from PySide6.QtWidgets import (
    QAbstractItemView,
    QButtonGroup,
    QCheckBox,
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QGroupBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QMessageBox,
    QPushButton,
    QRadioButton,
    QSplitter,
    QTableView,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.editing.commands import ReplaceBuilding
from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.schedule import (
    COLUMNS,
    ImportPreview,
    PreviewGrid,
    RawTable,
    apply_import,
    column_letter,
    combine_mapping,
    guess_mapping,
    header_units,
    load_mapping,
    preview_grid,
    preview_import,
    read_table,
)
from petfall_audit.io.schedule.columns import human
from petfall_audit.io.schedule.grid import STATUS_WORDS
from petfall_audit.model import Building
from petfall_audit.present.numbers import fmt_count

__all__ = ["ImportDialog", "ImportPrompts", "import_schedule", "FIELD_CHOICES"]

#: (field, label) of every column a schedule may hold, for the combo boxes.
FIELD_CHOICES: tuple[tuple[str, str], ...] = tuple(
    (c.field, c.header.split(" (")[0] + (" *" if c.required else "")) for c in COLUMNS)
_IGNORE = "(ignore this column)"
_BAD_CELL = QColor("#f6c6c6")  # a light red that dark text reads on (common practice, no source)
_SKIPPED_TEXT = QColor("#6b6b6b")
_Index = QModelIndex | QPersistentModelIndex


class PreviewGridModel(QAbstractTableModel):
    """The schedule's rows as the file has them (column 0: what the import does with the row),
    each bad cell marked (background, bold, its problem as the tooltip). Reads a Qt-free
    :class:`~petfall_audit.io.schedule.PreviewGrid`."""

    def __init__(self, grid: PreviewGrid | None = None) -> None:
        super().__init__()
        self.grid = grid

    def set_grid(self, grid: PreviewGrid) -> None:
        self.beginResetModel()
        self.grid = grid
        self.endResetModel()

    def rowCount(self, parent: _Index = QModelIndex()) -> int:  # noqa: B008, N802
        return 0 if parent.isValid() or self.grid is None else self.grid.row_count

    def columnCount(self, parent: _Index = QModelIndex()) -> int:  # noqa: B008, N802
        return 0 if parent.isValid() or self.grid is None else self.grid.column_count + 1

    def headerData(self, section: int, orientation: Qt.Orientation,  # noqa: N802
                   role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        g = self.grid
        if g is None:
            return None
        if orientation == Qt.Orientation.Vertical:
            if role == Qt.ItemDataRole.DisplayRole and 0 <= section < g.row_count:
                return str(g.row_numbers[section])
            return None
        if section == 0:
            return "Import" if role == Qt.ItemDataRole.DisplayRole else None
        column = section - 1
        field = g.fields[column] if column < len(g.fields) else ""
        if role == Qt.ItemDataRole.DisplayRole:
            read_as = human(field) if field else "not read"
            return f"{column_letter(column)}: {g.headers[column]}\n({read_as})"
        if role == Qt.ItemDataRole.ToolTipRole:
            return g.header_problem(column) or None
        if role == Qt.ItemDataRole.ForegroundRole and g.header_problem(column):
            return QBrush(QColor("#a00000"))
        return None

    def data(self, index: _Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        g = self.grid
        if g is None or not index.isValid():
            return None
        row, column = index.row(), index.column()
        skipped = g.status(row) == "skipped"
        if column == 0:
            problem = g.row_problem(row)
            if role == Qt.ItemDataRole.DisplayRole:
                return STATUS_WORDS[g.status(row)]
            if role == Qt.ItemDataRole.ToolTipRole:
                return problem or None
            if role == Qt.ItemDataRole.BackgroundRole and problem:
                return QBrush(_BAD_CELL)
            if role == Qt.ItemDataRole.ForegroundRole and skipped:
                return QBrush(_SKIPPED_TEXT)
            return None
        cell = g.cell(row, column - 1)
        if role == Qt.ItemDataRole.DisplayRole:
            return cell.text
        if role == Qt.ItemDataRole.ToolTipRole:
            return cell.problem or None
        if role == Qt.ItemDataRole.BackgroundRole and cell.bad:
            return QBrush(_BAD_CELL)
        if role == Qt.ItemDataRole.FontRole and cell.bad:
            font = QFont()
            font.setBold(True)
            return font
        if role == Qt.ItemDataRole.ForegroundRole and skipped and not cell.bad:
            return QBrush(_SKIPPED_TEXT)
        return None


class ImportPrompts:
    """File choosers and messages of the import (replace in tests)."""

    def open_schedule(self, parent: QWidget | None) -> Path | None:
        name, _ = QFileDialog.getOpenFileName(
            parent, "Import a schedule or a building model", "",
            "Schedules and building models (*.csv *.xlsx *.xlsm *.txt *.tsv *.ifc);;"
            "Schedules (*.csv *.xlsx *.xlsm *.txt *.tsv);;Building models (*.ifc);;"
            "All files (*)")
        return Path(name) if name else None

    def open_mapping(self, parent: QWidget | None) -> Path | None:
        name, _ = QFileDialog.getOpenFileName(parent, "Load a column mapping", "",
                                              "Mappings (*.json);;All files (*)")
        return Path(name) if name else None

    def show_error(self, parent: QWidget | None, title: str, text: str) -> None:
        QMessageBox.warning(parent, title, text)

    def run(self, dialog: QDialog) -> bool:
        """Show the dialog; True if the user chose to import."""
        return dialog.exec() == QDialog.DialogCode.Accepted


class ImportDialog(QDialog):
    """Map the columns of ``table``, preview the import into ``building`` and choose how to
    apply it. After ``accept()``, :meth:`result_building` gives the new building."""

    def __init__(self, building: Building, table: RawTable, *,
                 prompts: ImportPrompts | None = None, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("import_dialog")
        self.setWindowTitle(f"Import schedule: {table.source or 'table'}")
        self.building = building
        self.table = table
        self.prompts = prompts or ImportPrompts()
        self.preview: ImportPreview | None = None
        self._updating = False

        intro = QLabel(
            f"{len(table.rows)} rows and {len(table.headers)} columns read from "
            f"<b>{html.escape(table.source or 'the file')}</b>. Check what each column holds "
            "(fields marked * are required) and the unit of bare numbers, then look at the "
            "problems below."
            + "".join(f"<br>Note: {html.escape(n)}." for n in table.notes))
        intro.setWordWrap(True)
        self.mapping_table = QTableWidget(len(table.headers), 4)
        self.mapping_table.setObjectName("mapping_table")
        self.mapping_table.setHorizontalHeaderLabels(["Column in the file", "First values",
                                                      "Read as", "Unit of bare numbers"])
        self.mapping_table.verticalHeader().setVisible(False)
        self.mapping_table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        header = self.mapping_table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(1, QHeaderView.ResizeMode.Stretch)
        guessed = guess_mapping(table.headers)
        units = header_units(table.headers)
        self.field_boxes: list[QComboBox] = []
        self.unit_edits: list[QLineEdit] = []
        for row, head in enumerate(table.headers):
            letter = column_letter(row)
            item = QTableWidgetItem(f"{letter}: {head}" if head else f"{letter}: (no header)")
            self.mapping_table.setItem(row, 0, item)
            sample = [cells[row] for _, cells in table.rows[:3] if row < len(cells) and cells[row]]
            self.mapping_table.setItem(row, 1, QTableWidgetItem(", ".join(sample)))
            box = QComboBox()
            box.setObjectName(f"field_{row}")
            box.addItem(_IGNORE, "")
            for field, label in FIELD_CHOICES:
                box.addItem(label, field)
            box.setCurrentIndex(max(box.findData(guessed.get(head, "")), 0))
            box.currentIndexChanged.connect(self._on_mapping_changed)
            self.mapping_table.setCellWidget(row, 2, box)
            self.field_boxes.append(box)
            unit = QLineEdit(units.get(head, ""))
            unit.setPlaceholderText("default")
            unit.setToolTip("Unit for numbers without one, e.g. m, mm, ft, in "
                            "(default: metres, millimetres for gaps)")
            unit.editingFinished.connect(self._on_mapping_changed)
            self.mapping_table.setCellWidget(row, 3, unit)
            self.unit_edits.append(unit)
        load = QPushButton("&Load mapping…")
        load.setToolTip("Read a saved column mapping (JSON)")
        load.clicked.connect(self._on_load_mapping)

        self.summary = QLabel()
        self.summary.setObjectName("import_summary")
        self.summary.setWordWrap(True)
        self.problems = QTableWidget(0, 3)
        self.problems.setObjectName("problems_table")
        self.problems.setHorizontalHeaderLabels(["Row", "Column", "Problem"])
        self.problems.verticalHeader().setVisible(False)
        self.problems.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.problems.horizontalHeader().setSectionResizeMode(
            QHeaderView.ResizeMode.ResizeToContents)
        self.problems.horizontalHeader().setStretchLastSection(True)
        self.problems.setToolTip("Double-click a problem to see its cell in the rows")
        self.problems.cellDoubleClicked.connect(self.show_problem)
        self.grid_model = PreviewGridModel()
        self.grid_view = QTableView()
        self.grid_view.setObjectName("preview_grid")
        self.grid_view.setModel(self.grid_model)
        self.grid_view.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.grid_view.setWordWrap(False)
        self.grid_view.verticalHeader().setDefaultSectionSize(
            self.grid_view.fontMetrics().height() + 8)  # compact rows: more of the file in view
        self.preview_tabs = QTabWidget()
        self.preview_tabs.setObjectName("preview_tabs")
        self.preview_tabs.addTab(self.grid_view, "Rows")
        self.preview_tabs.addTab(self.problems, "Problems")

        self.merge = QRadioButton("&Merge: update openings with the same id, add the new ones")
        self.merge.setObjectName("merge_mode")
        self.replace = QRadioButton("&Replace every opening of the building with the schedule's")
        self.replace.setObjectName("replace_mode")
        self.merge.setChecked(True)
        group = QButtonGroup(self)
        group.addButton(self.merge)
        group.addButton(self.replace)
        self.accept_valid = QCheckBox("Import the &valid rows only and skip the rows with problems")
        self.accept_valid.setObjectName("accept_valid")
        for w in (self.merge, self.replace, self.accept_valid):
            w.toggled.connect(self._update_ok)
        how = QGroupBox("How to apply it")
        how_layout = QVBoxLayout(how)
        how_layout.addWidget(self.merge)
        how_layout.addWidget(self.replace)
        how_layout.addWidget(self.accept_valid)

        self.buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Cancel)
        self.ok_button = self.buttons.addButton("&Import", QDialogButtonBox.ButtonRole.AcceptRole)
        self.ok_button.setObjectName("import_button")
        self.buttons.accepted.connect(self.accept)
        self.buttons.rejected.connect(self.reject)
        note = QLabel("The import is one step on the Edit menu: undo it with Ctrl+Z. "
                      + CAUTIONS_SHORT)
        note.setWordWrap(True)
        note.setStyleSheet("color: #404040;")

        top = QWidget()
        tl = QVBoxLayout(top)
        tl.setContentsMargins(0, 0, 0, 0)
        intro_row = QHBoxLayout()
        intro_row.addWidget(intro, 1)
        intro_row.addWidget(load)
        tl.addLayout(intro_row)
        tl.addWidget(self.mapping_table, 1)
        bottom = QWidget()
        bl = QVBoxLayout(bottom)
        bl.setContentsMargins(0, 0, 0, 0)
        bl.addWidget(self.summary)
        bl.addWidget(self.preview_tabs, 1)
        splitter = QSplitter(Qt.Orientation.Vertical)
        splitter.addWidget(top)
        splitter.addWidget(bottom)
        splitter.setStretchFactor(0, 2)
        splitter.setStretchFactor(1, 3)  # the rows of the preview get the larger share
        layout = QVBoxLayout(self)
        layout.addWidget(splitter, 1)
        layout.addWidget(how)
        layout.addWidget(note)
        layout.addWidget(self.buttons)
        self.resize(860, 620)
        self.refresh_preview()

    # --- mapping ----------------------------------------------------------------------------------

    def mapping(self) -> dict[str, str]:
        """{header: field} as chosen ("" ignores a column)."""
        return {h: str(box.currentData() or "")
                for h, box in zip(self.table.headers, self.field_boxes, strict=True) if h}

    def units(self) -> dict[str, str]:
        """{header: unit} for the columns with a unit."""
        return {h: e.text().strip()
                for h, e in zip(self.table.headers, self.unit_edits, strict=True)
                if h and e.text().strip()}

    def set_field(self, header: str, field: str) -> None:
        """Read the column ``header`` as ``field`` ("" ignores it)."""
        box = self.field_boxes[self.table.headers.index(header)]
        box.setCurrentIndex(max(box.findData(field), 0))

    def set_unit(self, header: str, unit: str) -> None:
        self.unit_edits[self.table.headers.index(header)].setText(unit)
        self.refresh_preview()

    def apply_mapping(self, columns: Mapping[str, str], units: Mapping[str, str]) -> None:
        """Apply a mapping file's columns and units over the current choices."""
        combined = combine_mapping(self.mapping(), columns)
        self._updating = True
        try:
            for h, box in zip(self.table.headers, self.field_boxes, strict=True):
                box.setCurrentIndex(max(box.findData(combined.get(h, "")), 0))
            for h, edit in zip(self.table.headers, self.unit_edits, strict=True):
                if h in units:
                    edit.setText(units[h])
        finally:
            self._updating = False
        self.refresh_preview()

    def _on_load_mapping(self) -> None:
        path = self.prompts.open_mapping(self)
        if path is None:
            return
        try:
            loaded = load_mapping(path)
        except ScheduleImportError as exc:
            self.prompts.show_error(self, "Cannot use the mapping", str(exc))
            return
        self.apply_mapping(loaded.columns, loaded.units)

    def _on_mapping_changed(self, *_: Any) -> None:
        if not self._updating:
            self.refresh_preview()

    # --- preview ----------------------------------------------------------------------------------

    def refresh_preview(self) -> None:
        """Parse every row with the current mapping and list the problems."""
        self.preview = preview_import(self.table, self.mapping(), self.building,
                                      units=self.units())
        p = self.preview
        self.summary.setText(
            p.summary() + (". No problems." if not p.problems else
                           f". {fmt_count(len(p.problems), 'problem')}: the bad cells are "
                           "marked in the "
                           "rows (point at one for its problem) and listed under Problems, by "
                           "spreadsheet row (the header is row 1) and column."))
        self.problems.setRowCount(len(p.problems))
        for i, prob in enumerate(p.problems):
            where = (f"{prob.letter} ({prob.column})" if prob.letter and prob.column
                     else prob.letter or prob.column)
            for col, text in enumerate((str(prob.row) if prob.row else "file", where,
                                        prob.message)):
                self.problems.setItem(i, col, QTableWidgetItem(text))
        self.grid = preview_grid(self.table, p)
        self.grid_model.set_grid(self.grid)
        self.grid_view.resizeColumnsToContents()
        for column in range(1, self.grid_model.columnCount()):  # long notes stay readable
            self.grid_view.setColumnWidth(column, min(self.grid_view.columnWidth(column), 260))
        bad = len(p.bad_rows)
        self.preview_tabs.setTabText(
            0, f"Rows ({len(self.table.rows)}, {bad} with problems)" if bad
            else f"Rows ({len(self.table.rows)})")
        self.preview_tabs.setTabText(1, f"Problems ({len(p.problems)})")
        self._update_ok()

    def show_problem(self, index: int, *_: Any) -> None:
        """Show the cell of problem ``index`` (of the problems table) in the rows."""
        if self.preview is None or not 0 <= index < len(self.preview.problems):
            return
        prob = self.preview.problems[index]
        row = self.grid.index_of_row(prob.row)
        if row is None:
            return
        column = 0
        if prob.letter:
            letters = [column_letter(i) for i in range(len(self.table.headers))]
            column = letters.index(prob.letter) + 1 if prob.letter in letters else 0
        cell = self.grid_model.index(row, column)
        self.preview_tabs.setCurrentWidget(self.grid_view)
        self.grid_view.scrollTo(cell)
        self.grid_view.setCurrentIndex(cell)

    def _update_ok(self, *_: Any) -> None:
        p = self.preview
        ok = p is not None and bool(p.openings) and (not p.problems
                                                     or self.accept_valid.isChecked())
        self.ok_button.setEnabled(ok)
        if p is not None and p.problems and not self.accept_valid.isChecked():
            self.ok_button.setToolTip("Fix the problems in the file, or import the valid rows only")
        else:
            self.ok_button.setToolTip("")

    @property
    def mode(self) -> str:
        return "replace" if self.replace.isChecked() else "merge"

    def result_building(self) -> Building:
        """The building with the schedule applied; :class:`ScheduleImportError` if it cannot be."""
        if self.preview is None:
            raise ScheduleImportError("nothing to import")
        return apply_import(self.building, self.preview, mode=self.mode,  # type: ignore[arg-type]
                            accept_valid_rows=self.accept_valid.isChecked())

    def command(self) -> ReplaceBuilding:
        """The undoable edit that applies the import."""
        p = self.preview
        n = len(p.openings) if p is not None else 0
        what = "replace openings" if self.mode == "replace" else "merge"
        return ReplaceBuilding(self.result_building(),
                               label=f"Import {n} openings from {self.table.source} ({what})")


def import_schedule(window: Any, path: Path | None = None, *,
                    prompts: ImportPrompts | None = None) -> str | None:
    """Ask for a schedule (unless ``path``), show the import dialog and apply the result as one
    undoable step on ``window``'s history. Returns the reason nothing changed, or ``None``."""
    prompts = prompts or ImportPrompts()
    if path is None:
        path = prompts.open_schedule(window)
        if path is None:
            return "cancelled"
    if Path(path).suffix.lower() == ".ifc":
        from petfall_audit.gui.model_import_dialog import import_model

        return import_model(window, Path(path), prompts=prompts)
    try:
        table = read_table(path)
    except ScheduleImportError as exc:
        prompts.show_error(window, "Cannot read the schedule", str(exc))
        return str(exc)
    try:
        dialog = ImportDialog(window.document.building, table, prompts=prompts, parent=window)
    except (ArithmeticError, ValueError) as exc:  # a cell no reader expected: say so, go on
        message = f"{Path(path).name}: a cell could not be read ({exc}); nothing was changed"
        prompts.show_error(window, "Cannot read the schedule", message)
        return message
    try:
        if not prompts.run(dialog):
            return "cancelled"
        try:
            cmd = dialog.command()
        except ScheduleImportError as exc:
            prompts.show_error(window, "Schedule not imported", str(exc))
            return str(exc)
        reason: str | None = window.push(cmd)
        if reason is not None:
            prompts.show_error(window, "Schedule not imported", reason)
        return reason
    finally:
        dialog.deleteLater()
