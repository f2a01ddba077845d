"""Import a building model (IFC) from the app: preview storeys, openings and assumptions.

:class:`ModelImportDialog` shows what :func:`petfall_audit.io.ifc_import.read_model` found: the
storeys and the floors they become, the facades (each can be put on a facade the building
already has), every opening with the assumptions made for it, what the model does not hold, and
the problems the spreadsheet import's checks find. The result is applied by :func:`import_model`
as ONE undoable command on the document's history.
"""

from __future__ import annotations

from collections.abc import Sequence
from pathlib import Path
from typing import Any

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QAbstractItemView,
    QApplication,
    QButtonGroup,
    QCheckBox,
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QGroupBox,
    QHeaderView,
    QLabel,
    QPlainTextEdit,
    QRadioButton,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.editing.commands import ReplaceBuilding
from petfall_audit.errors import ModelImportError, ScheduleImportError
from petfall_audit.io.ifc_import import (
    ModelRead,
    apply_model,
    floor_levels,
    opening_of_row,
    preview_model,
    read_model,
)
from petfall_audit.io.schedule import ImportPreview
from petfall_audit.model import Building
from petfall_audit.present import (
    fmt_count,
    fmt_length,
    fmt_survey_length,
    kind_label,
    length_unit,
    surface_label,
)
from petfall_audit.present.labels import surface_kind_label

__all__ = ["ModelImportDialog", "import_model"]

_NEW = "(a new facade)"


def _table(name: str, headers: Sequence[str], rows: Sequence[Sequence[str]]) -> QTableWidget:
    table = QTableWidget(len(rows), len(headers))
    table.setObjectName(name)
    table.setHorizontalHeaderLabels(list(headers))
    table.verticalHeader().setVisible(False)
    table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
    header = table.horizontalHeader()
    header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
    header.setStretchLastSection(True)
    for r, row in enumerate(rows):
        for c, text in enumerate(row):
            table.setItem(r, c, QTableWidgetItem(text))
    return table


class ModelImportDialog(QDialog):
    """Preview importing ``model`` into ``building``; after ``accept()``,
    :meth:`result_building` gives the new building."""

    def __init__(self, building: Building, model: ModelRead, *, units: str = "metric",
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.units = units
        u = length_unit(units)
        self.setObjectName("model_import_dialog")
        self.setWindowTitle(f"Import building model: {model.source}")
        self.building = building
        self.model = model
        self.preview: ImportPreview | None = None

        intro = QLabel(f"<b>{model.summary()}</b>. Check the storeys, the facades and every "
                       "assumption below before importing.")
        intro.setWordWrap(True)

        levels = floor_levels(model, building)
        self.storeys = _table(
            "storeys_table", ["Level", "Storey", f"Elevation ({u})", "In this building"],
            [(str(levels[s.level]), s.label, self._survey(s.elevation_m, 3),
              self._floor_state(levels[s.level], s.elevation_m)) for s in model.storeys])

        existing = [f.id for f in building.facades]
        self.facades = _table("facades_table",
                              ["Facade in the model", "Facing", f"Length ({u})", "Put on facade"],
                              [(f.id, f.label, self._survey(f.length_m), "")
                               for f in model.facades])
        self.facade_boxes: list[QComboBox] = []
        for row, f in enumerate(model.facades):
            box = QComboBox()
            box.setObjectName(f"facade_{row}")
            box.addItem(f"{f.id} {_NEW}" if f.id not in existing else f.id, f.id)
            for fid in existing:
                if fid != f.id:
                    box.addItem(fid, fid)
            box.currentIndexChanged.connect(self.refresh_preview)
            self.facades.setCellWidget(row, 3, box)
            self.facade_boxes.append(box)

        self.openings = _table(
            "openings_table",
            ["Row", "Opening", "Level", "Facade", "Kind", f"Position ({u})", f"Width ({u})",
             f"Sill or rail ({u})", f"Projection ({u})", "Assumed"],
            [(str(i + 2), o.id, str(o.level), o.facade, kind_label(o.kind),
              self._survey(o.x_m), self._survey(o.width_m), self._survey(o.perch_height_m),
              self._survey(o.projection_m), "; ".join(o.assumptions) or "—")
             for i, o in enumerate(model.openings)])

        self.assumptions = QPlainTextEdit()
        self.assumptions.setObjectName("assumptions_text")
        self.assumptions.setReadOnly(True)
        self.assumptions.setPlainText(self.assumption_text())

        self.summary = QLabel()
        self.summary.setObjectName("import_summary")
        self.summary.setWordWrap(True)
        self.problems = _table("problems_table", ["Row", "Opening", "Problem"], [])

        tabs = QTabWidget()
        tabs.setObjectName("model_tabs")
        tabs.addTab(self.storeys, f"Storeys ({len(model.storeys)})")
        tabs.addTab(self.facades, f"Facades ({len(model.facades)})")
        tabs.addTab(self.openings, f"Openings ({len(model.openings)})")
        tabs.addTab(self.assumptions, "Assumptions and what is missing")
        self.tabs = tabs

        self.merge = QRadioButton("&Merge: update openings with the same id, add the new ones")
        self.merge.setObjectName("merge_mode")
        self.replace = QRadioButton("&Replace every opening of the building with the model's")
        self.replace.setObjectName("replace_mode")
        self.merge.setChecked(True)
        group = QButtonGroup(self)
        group.addButton(self.merge)
        group.addButton(self.replace)
        self.accept_valid = QCheckBox("Import the &valid openings only and skip those with "
                                      "problems")
        self.accept_valid.setObjectName("accept_valid")
        for w in (self.merge, self.replace, self.accept_valid):
            w.toggled.connect(self._update_ok)
        how = QGroupBox("How to apply it")
        how_layout = QVBoxLayout(how)
        for w in (self.merge, self.replace, self.accept_valid):
            how_layout.addWidget(w)

        self.buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Cancel)
        self.ok_button = self.buttons.addButton("&Import", QDialogButtonBox.ButtonRole.AcceptRole)
        self.ok_button.setObjectName("import_button")
        self.buttons.accepted.connect(self.accept)
        self.buttons.rejected.connect(self.reject)
        note = QLabel("The import is one step on the Edit menu: undo it with Ctrl+Z. "
                      + CAUTIONS_SHORT)
        note.setWordWrap(True)
        note.setStyleSheet("color: #404040;")

        layout = QVBoxLayout(self)
        layout.addWidget(intro)
        layout.addWidget(tabs, 3)
        layout.addWidget(self.summary)
        layout.addWidget(self.problems, 1)
        layout.addWidget(how)
        layout.addWidget(note)
        layout.addWidget(self.buttons)
        self.resize(960, 680)
        self.refresh_preview()

    # --- what is shown ------------------------------------------------------------------------

    def _survey(self, x_m: float, digits: int = 2) -> str:
        """A surveyed length as the table shows it (the column names the unit)."""
        return fmt_length(x_m, self.units, unit=False, digits=digits)

    def _precise(self, x_m: float) -> str:
        """A surveyed height with its unit, no trailing zeros."""
        return fmt_survey_length(x_m, self.units)

    def _floor_state(self, level: int, elevation_m: float) -> str:
        """What the storey does to the building's floor at ``level``."""
        for f in self.building.floors:
            if f.level != level:
                continue
            if abs(f.elevation_m - elevation_m) <= 0.05:
                return f"floor {f.level} '{f.label}' ({self._precise(f.elevation_m)})"
            return (f"changes floor {f.level} '{f.label}' from {self._precise(f.elevation_m)} "
                    f"to {self._precise(elevation_m)}")
        return "new floor"

    def assumption_text(self) -> str:
        """Every assumption, what was left out, and what the model does not hold."""
        m = self.model
        lines = ["Assumed for the whole model:"]
        lines += [f"  • {a}" for a in m.assumptions] or ["  (nothing)"]
        per_opening = sum(bool(o.assumptions) for o in m.openings)
        lines.append(f"Assumed for {fmt_count(per_opening, 'opening')}: see the Openings tab; "
                     "each is kept in the opening's notes.")
        lines.append("Left out of the import:")
        lines += [f"  • {s}" for s in m.skipped] or ["  (nothing)"]
        lines.append("Not in the model, left for you (each opening's notes list them, and "
                     "Check lists them as warnings): guard or infill gaps, limiters, screens, "
                     "netting, how often each opening is opened, whether cats live behind it.")
        if self.building.surfaces:
            below = ", ".join(f"{surface_label(s.label, s.kind)} ({surface_kind_label(s.kind)}, "
                              f"{self._precise(s.elevation_m)})" for s in self.building.surfaces)
            lines.append(f"What lies below is not in the model either: this building's "
                         f"surfaces apply: {below}. Check them for the model's facades.")
        else:
            lines.append("What lies below is not in the model, and this building has no "
                         "surface: add the surfaces before the results mean anything.")
        return "\n".join(lines)

    def facade_map(self) -> dict[str, str]:
        """{model facade: building facade} as chosen."""
        return {f.id: str(box.currentData())
                for f, box in zip(self.model.facades, self.facade_boxes, strict=True)}

    def set_facade(self, model_id: str, building_id: str) -> None:
        """Put the model's facade ``model_id`` on ``building_id``."""
        index = [f.id for f in self.model.facades].index(model_id)
        box = self.facade_boxes[index]
        box.setCurrentIndex(max(box.findData(building_id), 0))

    def refresh_preview(self, *_: Any) -> None:
        self.preview = preview_model(self.model, self.building, facade_map=self.facade_map())
        p = self.preview
        self.summary.setText(p.summary() + (". No problems." if not p.problems else
                                            f". {fmt_count(len(p.problems), 'problem')} below."))
        self.problems.setRowCount(len(p.problems))
        for i, prob in enumerate(p.problems):
            opening = opening_of_row(self.model, prob.row)
            where = opening.id if opening is not None else "model"
            for col, text in enumerate((str(prob.row) if prob.row else "model", where,
                                        prob.message)):
                self.problems.setItem(i, col, QTableWidgetItem(text))
        self._update_ok()

    def _update_ok(self, *_: Any) -> None:
        p = self.preview
        ok = p is not None and bool(p.openings) and (not p.problems
                                                     or self.accept_valid.isChecked())
        self.ok_button.setEnabled(ok)

    @property
    def mode(self) -> str:
        return "replace" if self.replace.isChecked() else "merge"

    def result_building(self) -> Building:
        if self.preview is None:
            raise ScheduleImportError("nothing to import")
        return apply_model(self.building, self.model, self.preview,
                           mode=self.mode,  # type: ignore[arg-type]
                           accept_valid_rows=self.accept_valid.isChecked(),
                           facade_map=self.facade_map())

    def command(self) -> ReplaceBuilding:
        """The undoable edit that applies the import."""
        n = len(self.preview.openings) if self.preview is not None else 0
        what = "replace openings" if self.mode == "replace" else "merge"
        return ReplaceBuilding(self.result_building(),
                               label=f"Import {n} openings from {self.model.source} ({what})")


def import_model(window: Any, path: Path, *, prompts: Any) -> str | None:
    """Read the model at ``path``, show the preview and apply it as one undoable step on
    ``window``'s history. Returns the reason nothing changed, or ``None``."""
    QApplication.setOverrideCursor(Qt.CursorShape.WaitCursor)
    try:
        model = read_model(path)
    except ModelImportError as exc:
        QApplication.restoreOverrideCursor()
        prompts.show_error(window, "Cannot read the building model", str(exc))
        return str(exc)
    QApplication.restoreOverrideCursor()
    dialog = ModelImportDialog(window.document.building, model, units=window.options.units,
                               parent=window)
    try:
        if not prompts.run(dialog):
            return "cancelled"
        try:
            cmd = dialog.command()
        except ScheduleImportError as exc:
            prompts.show_error(window, "Model not imported", str(exc))
            return str(exc)
        reason: str | None = window.push(cmd)
        if reason is not None:
            prompts.show_error(window, "Model not imported", reason)
        return reason
    finally:
        dialog.deleteLater()
