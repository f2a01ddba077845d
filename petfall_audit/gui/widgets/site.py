"""Facades and the surfaces below them: two tables with add and remove."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QSplitter,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.editing.commands import (
    AddFacade,
    AddSurface,
    RemoveFacade,
    RemoveSurface,
    SetFacade,
    SetSurface,
)
from petfall_audit.editing.document import Document
from petfall_audit.editing.fields import FACADE_FIELDS, SURFACE_FIELDS, FieldSpec
from petfall_audit.editing.history import History
from petfall_audit.editing.query import unique_id
from petfall_audit.gui.adapters import RecordTableModel, ViewOptions, push_command
from petfall_audit.gui.widgets.tables import error_label, record_table, refusal_line
from petfall_audit.model import Facade, Surface, SurfaceKind

__all__ = ["SitePanel"]


class SitePanel(QWidget):
    """Facades (named faces of the building) and surfaces below (ground, podium, canopy...)."""

    def __init__(self, doc: Document, history: History, options: ViewOptions,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._doc = doc
        self._history = history
        self._options = options
        self.facades_model = RecordTableModel(
            doc, history, options, kind="facades", items=lambda b: b.facades, key="id",
            fields=FACADE_FIELDS, make_command=lambda key, ch: SetFacade(key, ch), parent=self)
        self.surfaces_model = RecordTableModel(
            doc, history, options, kind="surfaces", items=lambda b: b.surfaces, key="id",
            fields=SURFACE_FIELDS, make_command=lambda key, ch: SetSurface(key, ch), parent=self)
        self.facades_table = record_table(self.facades_model, "facades_table", self._choices)
        self.surfaces_table = record_table(self.surfaces_model, "surfaces_table", self._choices)
        self.error = error_label()
        for model, noun in ((self.facades_model, "Facade"), (self.surfaces_model, "Surface")):
            model.edited.connect(lambda *_: self.error.hide())
            model.edit_failed.connect(
                lambda key, _f, msg, n=noun: self._show_error(refusal_line(f"{n} {key}", msg)))

        facades = self._group("Facades", self.facades_table, self.add_facade,
                              self.remove_facade,
                              "A facade is a named face of the building; openings sit along it.")
        surfaces = self._group(
            "Surfaces below", self.surfaces_table, self.add_surface, self.remove_surface,
            "What a falling cat meets: ground, a podium roof, a canopy, a pond. The extent runs "
            "out from the facade; an empty 'To' reaches on without end.")
        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(facades)
        splitter.addWidget(surfaces)
        splitter.setStretchFactor(1, 2)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.error)  # above the tables, where the user looks
        layout.addWidget(splitter, 1)

    def detach(self) -> None:
        self.facades_model.detach()
        self.surfaces_model.detach()

    def _choices(self, spec: FieldSpec) -> list[str]:
        return [f.id for f in self._doc.building.facades] if spec.kind == "ref" else []

    def _group(self, title: str, table: QTableView, add, remove, hint: str) -> QGroupBox:  # type: ignore[no-untyped-def]
        box = QGroupBox(title)
        buttons = QHBoxLayout()
        add_button = QPushButton("Add")
        add_button.clicked.connect(add)
        remove_button = QPushButton("Remove selected")
        remove_button.clicked.connect(remove)
        buttons.addWidget(add_button)
        buttons.addWidget(remove_button)
        buttons.addStretch(1)
        label = QLabel(hint)
        label.setWordWrap(True)
        layout = QVBoxLayout(box)
        layout.addLayout(buttons)
        layout.addWidget(label)
        layout.addWidget(table, 1)
        return box

    def _show_error(self, message: str) -> None:
        self.error.setText(f"! {message}")
        self.error.show()

    def _push(self, cmd) -> None:  # type: ignore[no-untyped-def]
        self.error.hide()
        reason = push_command(self._history, cmd, self._options.units)
        if reason:
            self._show_error(reason)

    @staticmethod
    def _selected_key(table: QTableView, model: RecordTableModel) -> str | None:
        rows = table.selectionModel().selectedRows()
        return str(model.key_of_row(rows[0].row())) if rows else None

    def add_facade(self) -> None:
        new_id = unique_id((f.id for f in self._doc.building.facades), "facade")
        self._push(AddFacade(Facade(id=new_id, length_m=20.0, label="New facade")))

    def remove_facade(self) -> None:
        key = self._selected_key(self.facades_table, self.facades_model)
        if key is not None:
            self._push(RemoveFacade(key))

    def add_surface(self) -> None:
        new_id = unique_id((s.id for s in self._doc.building.surfaces), "surface")
        self._push(AddSurface(Surface(id=new_id, kind=SurfaceKind.CONCRETE, elevation_m=0.0,
                                      label="New surface")))

    def remove_surface(self) -> None:
        key = self._selected_key(self.surfaces_table, self.surfaces_model)
        if key is not None:
            self._push(RemoveSurface(key))
