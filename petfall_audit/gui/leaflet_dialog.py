"""Choose and edit the tenant leaflet's sections before it is written.

Thin: the sections and their default wording come from
:mod:`petfall_audit.report.leaflet_sections`; the dialog only ticks them on or off, edits their
titles and lines, and says whether the fix plan's measures are named.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import replace

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QCheckBox,
    QDialog,
    QDialogButtonBox,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QListWidget,
    QListWidgetItem,
    QPlainTextEdit,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.report.leaflet_sections import LeafletChoice, LeafletSection

__all__ = ["LeafletDialog"]


class LeafletDialog(QDialog):
    """The leaflet's sections, each ticked on or off, with its title and lines to edit (one
    paragraph or bullet per line). ``defaults``: the shipped sections in the words of the
    building's code profile; ``current``: the choice made earlier (``None``: the defaults)."""

    def __init__(self, defaults: Sequence[LeafletSection], current: LeafletChoice | None = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Tenant leaflet: sections")
        self._defaults = tuple(defaults)
        chosen = {s.key: s for s in (current.sections or ())} if current is not None else None
        self._sections: list[LeafletSection] = [
            (chosen.get(s.key, s) if chosen is not None else s) for s in self._defaults
        ]
        self.list = QListWidget()
        self.list.setObjectName("leaflet_sections")
        for s in self._sections:
            item = QListWidgetItem(s.title)
            item.setFlags(item.flags() | Qt.ItemFlag.ItemIsUserCheckable)
            on = chosen is None or s.key in chosen
            item.setCheckState(Qt.CheckState.Checked if on else Qt.CheckState.Unchecked)
            self.list.addItem(item)
        self.list.setMinimumWidth(self.list.sizeHintForColumn(0) + 2 * self.list.frameWidth()
                                  + 24)
        self.measures = QCheckBox("Name the measures of the fix plan")
        self.measures.setObjectName("leaflet_measures")
        self.measures.setChecked(current.include_measures if current is not None else True)
        self.title = QLineEdit()
        self.title.setObjectName("leaflet_title")
        self.text = QPlainTextEdit()
        self.text.setObjectName("leaflet_text")
        self.text.setToolTip("One paragraph or bullet per line")
        self.reset = QPushButton("Default wording")
        self.reset.setToolTip("Put back the shipped title and lines of this section")
        self.reset.clicked.connect(self._on_reset)
        edit = QFormLayout()
        edit.addRow("Title", self.title)
        edit.addRow("Lines", self.text)
        note = QLabel("The escape-window warning and the cautions are printed on every "
                      "leaflet. The contact block comes from Settings ▸ Contact.")
        note.setWordWrap(True)
        edit.addRow(note)
        edit.addRow(self.reset)
        body = QHBoxLayout()
        left = QVBoxLayout()
        left.addWidget(QLabel("Sections to print"))
        left.addWidget(self.list)
        left.addWidget(self.measures)
        body.addLayout(left, 0)
        body.addLayout(edit, 1)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok
                                   | QDialogButtonBox.StandardButton.Cancel)
        buttons.button(QDialogButtonBox.StandardButton.Ok).setText("Write the leaflet…")
        buttons.accepted.connect(self.accept)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addLayout(body)
        layout.addWidget(buttons)
        self._row = -1
        self.list.currentRowChanged.connect(self._on_row)
        self.list.setCurrentRow(0)
        self.resize(820, 460)

    def _keep_edits(self) -> None:
        if 0 <= self._row < len(self._sections):
            lines = tuple(x.strip() for x in self.text.toPlainText().splitlines() if x.strip())
            s = self._sections[self._row]
            title = self.title.text().strip() or s.title
            self._sections[self._row] = replace(s, title=title, items=lines)
            self.list.item(self._row).setText(title)

    def _on_row(self, row: int) -> None:
        self._keep_edits()
        self._row = row
        if 0 <= row < len(self._sections):
            s = self._sections[row]
            self.title.setText(s.title)
            self.text.setPlainText("\n".join(s.items))
            self.text.setEnabled(True)

    def _on_reset(self) -> None:
        if 0 <= self._row < len(self._sections):
            s = self._defaults[self._row]
            self.title.setText(s.title)
            self.text.setPlainText("\n".join(s.items))

    def set_checked(self, key: str, on: bool) -> None:
        """Tick section ``key`` on or off (as a click on its box would)."""
        for i, s in enumerate(self._sections):
            if s.key == key:
                self.list.item(i).setCheckState(
                    Qt.CheckState.Checked if on else Qt.CheckState.Unchecked)

    def choice(self) -> LeafletChoice:
        """The sections ticked, with their edits, in order; and whether the measures are named."""
        self._keep_edits()
        kept = tuple(s for i, s in enumerate(self._sections)
                     if self.list.item(i).checkState() == Qt.CheckState.Checked)
        return LeafletChoice(kept, include_measures=self.measures.isChecked())
