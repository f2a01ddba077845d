"""Dialogs and questions to the user, gathered in :class:`Prompts` so tests can answer them.

The main window asks every question through its ``prompts`` object; a test replaces it with one
that answers at once, so no modal dialog ever blocks a test run.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from PySide6.QtWidgets import (
    QButtonGroup,
    QCheckBox,
    QComboBox,
    QDialog,
    QDialogButtonBox,
    QFileDialog,
    QFormLayout,
    QGroupBox,
    QHBoxLayout,
    QLabel,
    QLayout,
    QLineEdit,
    QMessageBox,
    QPlainTextEdit,
    QRadioButton,
    QSpinBox,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from petfall_audit import __version__
from petfall_audit.cautions import CAUTIONS, CAUTIONS_TITLE
from petfall_audit.editing.autosave import Recovery
from petfall_audit.editing.commands import (
    DEFAULT_ID_PATTERN,
    FACADE_LEVEL_PATTERN,
    KEEP_NUMBERING,
    EditRefused,
    copy_ids,
)
from petfall_audit.editing.fields import OPENING_FIELDS, FieldSpec, parse_value
from petfall_audit.editing.numbering import level_digits
from petfall_audit.editing.query import select_openings
from petfall_audit.gui.settings import CONTACT_FIELDS
from petfall_audit.gui.widgets.field_form import ERROR_STYLE
from petfall_audit.gui.widgets.photos import PHOTO_FILTER, PhotoDialog
from petfall_audit.model import Building, OpeningKind
from petfall_audit.present import enum_label

__all__ = ["Prompts", "CopyRequest", "BulkRequest", "CautionsDialog", "CopyFloorDialog",
           "BulkEditDialog", "ContactDialog", "FILE_FILTER", "APP_TITLE"]

APP_TITLE = "Petfall Audit"
FILE_FILTER = "Building files (*.json);;All files (*)"


@dataclass(frozen=True, slots=True)
class CopyRequest:
    """Copy the openings of ``level`` to ``to_levels`` with new ids from ``id_pattern``."""

    level: int
    to_levels: tuple[int, ...]
    id_pattern: str = DEFAULT_ID_PATTERN
    replace_existing: bool = False


@dataclass(frozen=True, slots=True)
class BulkRequest:
    """Set ``field`` to ``value`` on the openings with ``ids``."""

    ids: tuple[str, ...]
    field: str
    value: Any


class Prompts:
    """Every question the window asks. Replace methods (or the whole object) in tests."""

    def ask_save_changes(self, parent: QWidget, name: str) -> str:
        """``"save"``, ``"discard"`` or ``"cancel"``."""
        box = QMessageBox(parent)
        box.setIcon(QMessageBox.Icon.Warning)
        box.setWindowTitle(APP_TITLE)
        box.setText(f"'{name}' has changes that are not saved.")
        box.setInformativeText("Save them before closing?")
        box.setStandardButtons(QMessageBox.StandardButton.Save
                               | QMessageBox.StandardButton.Discard
                               | QMessageBox.StandardButton.Cancel)
        box.setDefaultButton(QMessageBox.StandardButton.Save)
        answer = box.exec()
        if answer == QMessageBox.StandardButton.Save:
            return "save"
        if answer == QMessageBox.StandardButton.Discard:
            return "discard"
        return "cancel"

    def ask_overwrite_changed(self, parent: QWidget, name: str) -> bool:
        """True to save over ``name`` although it changed on disk since it was opened here
        (another window or program saved it)."""
        box = QMessageBox(parent)
        box.setIcon(QMessageBox.Icon.Warning)
        box.setWindowTitle(APP_TITLE)
        box.setText(f"'{name}' was changed on disk since you opened it here, perhaps by another "
                    "window or program.")
        box.setInformativeText("Saving now replaces those changes with yours. Save anyway? "
                               "(Cancel keeps the file on disk as it is; Save As keeps both.)")
        box.setStandardButtons(QMessageBox.StandardButton.Save
                               | QMessageBox.StandardButton.Cancel)
        box.setDefaultButton(QMessageBox.StandardButton.Cancel)
        return box.exec() == QMessageBox.StandardButton.Save

    def ask_recover(self, parent: QWidget, recovery: Recovery) -> bool:
        if recovery.source_path is not None:
            what = f"{recovery.source_path.name} (in {recovery.source_path.parent})"
        else:
            what = f"an unsaved building, {recovery.building_name or 'without a name'}"
        answer = QMessageBox.question(
            parent, APP_TITLE,
            f"Work on {what} was not saved when the app closed unexpectedly "
            f"(recovery copy from {recovery.saved_at_text}).\n\nRecover it now? "
            "No discards this copy only.",
        )
        return answer == QMessageBox.StandardButton.Yes

    def open_path(self, parent: QWidget, folder: Path | None) -> Path | None:
        path, _ = QFileDialog.getOpenFileName(parent, "Open building", str(folder or ""),
                                              FILE_FILTER)
        return Path(path) if path else None

    def save_path(self, parent: QWidget, suggested: Path) -> Path | None:
        path, _ = QFileDialog.getSaveFileName(parent, "Save building as", str(suggested),
                                              FILE_FILTER)
        if not path:
            return None
        p = Path(path)
        return p if p.suffix else p.with_suffix(".json")

    def show_error(self, parent: QWidget, title: str, text: str) -> None:
        QMessageBox.warning(parent, title, text)

    def copy_floor(self, parent: QWidget, building: Building, level: int | None
                   ) -> CopyRequest | None:
        dialog = CopyFloorDialog(building, level, parent)
        return dialog.request() if dialog.exec() == QDialog.DialogCode.Accepted else None

    def bulk_edit(self, parent: QWidget, building: Building, selected: list[str], units: str
                  ) -> BulkRequest | None:
        dialog = BulkEditDialog(building, selected, units, parent)
        return dialog.request() if dialog.exec() == QDialog.DialogCode.Accepted else None

    def edit_contact(self, parent: QWidget, values: dict[str, str]) -> dict[str, str] | None:
        dialog = ContactDialog(values, parent)
        return dialog.values() if dialog.exec() == QDialog.DialogCode.Accepted else None

    def show_cautions(self, parent: QWidget, *, about: bool = False) -> None:
        CautionsDialog(parent, about=about).exec()

    def choose_photos(self, parent: QWidget, folder: Path | None) -> list[Path]:
        """Photo files (JPEG or PNG) to add to an opening; empty if none were chosen."""
        names, _ = QFileDialog.getOpenFileNames(parent, "Add photos", str(folder or ""),
                                                PHOTO_FILTER)
        return [Path(n) for n in names]

    def ask_save_for_photos(self, parent: QWidget) -> bool:
        """True if the user agrees to save the (never saved) building before adding photos."""
        answer = QMessageBox.question(
            parent, APP_TITLE,
            "Photos are kept in a 'photos' folder beside the building file, so the building "
            "has to be saved first.\n\nSave it now?")
        return answer == QMessageBox.StandardButton.Yes

    def show_photo(self, parent: QWidget, path: Path, caption: str) -> None:
        """Show the photo at ``path`` larger."""
        PhotoDialog(path, caption, parent).exec()


def cautions_html(*, about: bool = False) -> str:
    """The cautions (and with ``about`` the app's description) as simple HTML."""
    parts = []
    if about:
        parts.append(
            f"<h2>{APP_TITLE} {__version__}</h2>"
            "<p>Audits a residential building for the risk that a resident cat falls from a "
            "balcony or window: it simulates falls with gravity, air drag and a change of "
            "posture, grades the likely injury, ranks the openings and helps choose fixes "
            "within a budget.</p>"
            "<p>Injury grading uses a physical severity index whose bands were checked against "
            "published veterinary case series of cats that fell from buildings (for example "
            "Vnuk et al. 2004; Merbl et al. 2013; Candela Andrade et al. 2025); many of its "
            "values are stated assumptions. The risk score adapts England's Housing Health and "
            "Safety Rating System; the audit report states the method and its assumptions.</p>"
        )
    parts.append(f"<h3>{CAUTIONS_TITLE}</h3><ul>")
    parts += [f"<li>{c}</li>" for c in CAUTIONS]
    parts.append("</ul>")
    return "".join(parts)


def _span(first: QSpinBox, last: QSpinBox) -> QHBoxLayout:
    """Two level boxes side by side: "first to last"."""
    span = QHBoxLayout()
    span.addWidget(first)
    span.addWidget(QLabel("to"))
    span.addWidget(last)
    span.addStretch(1)
    return span


def _dialog_layout(dialog: QDialog, parts: list[QWidget | QLayout], *,
                   on_ok: Callable[[], None] | None = None) -> None:
    """Stack ``parts`` in ``dialog`` above OK and Cancel; OK calls ``on_ok`` (default: accept)."""
    buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Ok
                               | QDialogButtonBox.StandardButton.Cancel)
    buttons.accepted.connect(on_ok or dialog.accept)
    buttons.rejected.connect(dialog.reject)
    layout = QVBoxLayout(dialog)
    for part in parts:
        if isinstance(part, QLayout):
            layout.addLayout(part)
        else:
            layout.addWidget(part)
    layout.addWidget(buttons)


class CautionsDialog(QDialog):
    """The cautions, and with ``about`` the app's name, version and purpose."""

    def __init__(self, parent: QWidget | None = None, *, about: bool = False) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"About {APP_TITLE}" if about else CAUTIONS_TITLE)
        text = QTextBrowser()
        text.setObjectName("cautions_text")
        text.setHtml(cautions_html(about=about))
        text.setMinimumSize(520, 360)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.reject)
        buttons.accepted.connect(self.accept)
        layout = QVBoxLayout(self)
        layout.addWidget(text)
        layout.addWidget(buttons)


#: Ways to name the copies: label, pattern (``None``: the custom pattern typed).
_NAMINGS: tuple[tuple[str, str | None], ...] = (
    ("Keep the numbering of the copied ids, with the floor number changed", KEEP_NUMBERING),
    ("Facade, level and number (front-05-1)", FACADE_LEVEL_PATTERN),
    ("A pattern of my own", None),
)
#: Lines of the preview at most (the rest is counted).
_PREVIEW_LINES = 2000


class CopyFloorDialog(QDialog):
    """Copy a typical floor's openings to a range of levels: how the copies are named, and a
    preview of every new id."""

    def __init__(self, building: Building, level: int | None, parent: QWidget | None = None
                 ) -> None:
        super().__init__(parent)
        self.setWindowTitle("Copy a typical floor")
        self._building = building
        levels = [f.level for f in building.floors]
        self.source = QComboBox()
        for f in building.floors:
            n = sum(o.floor == f.level for o in building.openings)
            self.source.addItem(f"{f.level}  {f.label}  ({n} openings)", f.level)
        if level is not None and self.source.findData(level) >= 0:
            self.source.setCurrentIndex(self.source.findData(level))
        lo, hi = (min(levels), max(levels)) if levels else (0, 0)
        self.first = QSpinBox()
        self.last = QSpinBox()
        for box in (self.first, self.last):
            box.setRange(lo, hi)
        start = (level if level is not None else lo) + 1
        self.first.setValue(min(start, hi))
        self.last.setValue(hi)
        self.naming = QComboBox()
        for text, pattern in _NAMINGS:
            self.naming.addItem(text, pattern)
        self.pattern = QLineEdit("{id}-{level}")
        self.pattern.setToolTip("{facade}, {level} ({level:02d} for 05), {n} (number on the "
                                "facade), {id} (the copied id), {kind}, {label} (floor name)")
        self.pattern_help = QLabel("In a pattern of your own, {id} is the copied id and {level} "
                                   "the new floor's level; the tip lists the others.")
        self.pattern_help.setWordWrap(True)
        self.replace = QCheckBox("Replace the openings already on those floors")
        self.summary = QLabel()
        self.summary.setWordWrap(True)
        self.preview = QPlainTextEdit()
        self.preview.setObjectName("copy_preview")
        self.preview.setReadOnly(True)
        self.preview.setMinimumSize(420, 160)
        form = QFormLayout()
        form.addRow("Copy the openings of floor", self.source)
        form.addRow("To levels", _span(self.first, self.last))
        form.addRow("Name the copies", self.naming)
        form.addRow("Pattern", self.pattern)
        form.addRow(self.pattern_help)
        form.addRow(self.replace)
        form.addRow(self.summary)
        form.addRow("New ids", self.preview)
        _dialog_layout(self, [form])
        for signal in (self.source.currentIndexChanged, self.first.valueChanged,
                       self.last.valueChanged, self.pattern.textChanged,
                       self.naming.currentIndexChanged):
            signal.connect(self._update_preview)
        self._update_preview()

    def request(self) -> CopyRequest:
        level = int(self.source.currentData())
        first, last = sorted((self.first.value(), self.last.value()))
        targets = tuple(f.level for f in self._building.floors
                        if first <= f.level <= last and f.level != level)
        chosen = self.naming.currentData()
        pattern = self.pattern.text() if chosen is None else str(chosen)
        return CopyRequest(level, targets, pattern, self.replace.isChecked())

    def _update_preview(self) -> None:
        custom = self.naming.currentData() is None
        self.pattern.setEnabled(custom)
        self.pattern_help.setVisible(custom)
        req = self.request()
        source = [o for o in self._building.openings if o.floor == req.level]
        if not source or not req.to_levels:
            self.summary.setText("Nothing to copy: choose a floor with openings and other "
                                 "levels.")
            self.preview.setPlainText("")
            return
        try:
            copies = copy_ids(self._building, req.level, req.to_levels, req.id_pattern)
        except EditRefused as exc:
            self.summary.setText(f"! {exc.problems[0].message}")
            self.preview.setPlainText("")
            return
        note = ""
        if req.id_pattern == KEEP_NUMBERING and \
                level_digits([o.id for o in source], req.level) is None:
            note = (" The copied ids carry no floor number, so the copies are named by facade, "
                    "level and number.")
        used = {o.id for o in self._building.openings
                if not (req.replace_existing and o.floor in set(req.to_levels))}
        clashes = sum(new_id in used for _lv, _o, new_id in copies)
        clash_note = (f" ! {clashes} of the new ids are already used: tick 'replace' or name "
                      "the copies another way." if clashes else "")
        self.summary.setText(f"{len(source)} openings × {len(req.to_levels)} floors = "
                             f"{len(copies)} new openings.{note}{clash_note}")
        lines = [f"Level {lv}:  {o.id}  →  {new_id}"
                 for lv, o, new_id in copies[:_PREVIEW_LINES]]
        if len(copies) > _PREVIEW_LINES:
            lines.append(f"… and {len(copies) - _PREVIEW_LINES} more")
        self.preview.setPlainText("\n".join(lines))


class BulkEditDialog(QDialog):
    """Set one field on many openings: the selected ones, or those matching a filter."""

    def __init__(self, building: Building, selected: list[str], units: str,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Change many openings")
        self._building = building
        self._selected = list(selected)
        self._units = units
        self._specs = [s for s in OPENING_FIELDS if s.name != "id"]
        self.use_selected = QRadioButton(f"The {len(selected)} selected openings")
        self.use_filter = QRadioButton("Openings that match:")
        group = QButtonGroup(self)
        group.addButton(self.use_selected)
        group.addButton(self.use_filter)
        (self.use_selected if selected else self.use_filter).setChecked(True)
        self.use_selected.setEnabled(bool(selected))
        self.facade = QComboBox()
        self.facade.addItem("any facade", None)
        for f in building.facades:
            self.facade.addItem(f.label or f.id, f.id)
        self.kind = QComboBox()
        self.kind.addItem("any kind", None)
        for k in OpeningKind:
            self.kind.addItem(enum_label(k), k)
        levels = [f.level for f in building.floors] or [0]
        self.first = QSpinBox()
        self.last = QSpinBox()
        for box in (self.first, self.last):
            box.setRange(min(levels), max(levels))
        self.first.setValue(min(levels))
        self.last.setValue(max(levels))
        self.field = QComboBox()
        for spec in self._specs:
            self.field.addItem(spec.label, spec.name)
        self.value = QLineEdit()
        self.value.setPlaceholderText("e.g. 30 mm, 1.2 m, 42 in, yes")
        self.count = QLabel()
        self.error = QLabel()
        self.error.setStyleSheet(ERROR_STYLE)
        self.error.setWordWrap(True)
        filt = QGroupBox("Which openings")
        fl = QFormLayout(filt)
        fl.addRow(self.use_selected)
        fl.addRow(self.use_filter)
        fl.addRow("Facade", self.facade)
        fl.addRow("Kind", self.kind)
        fl.addRow("Floors", _span(self.first, self.last))
        fl.addRow(self.count)
        what = QFormLayout()
        what.addRow("Set", self.field)
        what.addRow("To", self.value)
        _dialog_layout(self, [filt, what, self.error], on_ok=self._on_accept)
        for signal in (self.facade.currentIndexChanged, self.kind.currentIndexChanged,
                       self.first.valueChanged, self.last.valueChanged, group.buttonClicked):
            signal.connect(self._update_count)
        self._update_count()
        self._request: BulkRequest | None = None

    def ids(self) -> list[str]:
        if self.use_selected.isChecked():
            return self._selected
        facade = self.facade.currentData()
        kind = self.kind.currentData()
        first, last = sorted((self.first.value(), self.last.value()))
        return select_openings(
            self._building,
            facades=None if facade is None else [facade],
            kinds=None if kind is None else [kind],
            levels=range(first, last + 1),
        )

    def _spec(self) -> FieldSpec:
        return self._specs[self.field.currentIndex()]

    def _update_count(self, *_: Any) -> None:
        self.count.setText(f"{len(self.ids())} openings will change")

    def _on_accept(self) -> None:
        ids = self.ids()
        if not ids:
            self.error.setText("! No opening matches.")
            return
        spec = self._spec()
        try:
            value = parse_value(spec, self.value.text(), self._units)
        except ValueError as exc:
            self.error.setText(f"! {spec.label}: {exc}")
            return
        self._request = BulkRequest(tuple(ids), spec.name, value)
        self.accept()

    def request(self) -> BulkRequest | None:
        return self._request


class ContactDialog(QDialog):
    """The contact block printed on tenant leaflets."""

    def __init__(self, values: dict[str, str], parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Contact details for tenant leaflets")
        self._edits: dict[str, QLineEdit] = {}
        form = QFormLayout()
        for key, label in CONTACT_FIELDS:
            edit = QLineEdit(values.get(key, ""))
            self._edits[key] = edit
            form.addRow(label, edit)
        _dialog_layout(self, [form])

    def values(self) -> dict[str, str]:
        return {key: edit.text().strip() for key, edit in self._edits.items()}
