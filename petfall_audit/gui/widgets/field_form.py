"""A form of fields described by :class:`~petfall_audit.editing.fields.FieldSpec`.

Each field checks what is typed when editing finishes: a value that cannot be read, or an edit
the building refuses, is shown beside the field with the typed text kept for correction; the
model keeps its old value.
"""

from __future__ import annotations

from collections.abc import Callable, Mapping, Sequence
from typing import Any

from PySide6.QtCore import QDate, Qt, Signal
from PySide6.QtGui import QFocusEvent
from PySide6.QtWidgets import (
    QCheckBox,
    QComboBox,
    QDateEdit,
    QFormLayout,
    QLabel,
    QLineEdit,
    QPlainTextEdit,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.editing.fields import FieldSpec, format_value, parse_value, unit_hint
from petfall_audit.gui.adapters import ViewOptions
from petfall_audit.present import enum_label

__all__ = ["FieldForm", "MIXED", "ERROR_STYLE", "set_style"]

#: Marks a field whose selected records hold different values.
MIXED = object()

ERROR_STYLE = "color: #8C2D04;"
_INVALID_EDIT = "QLineEdit { border: 2px solid #8C2D04; }"

CommitFn = Callable[[str, Any], str | None]


def set_style(widget: QWidget, sheet: str) -> None:
    """Give ``widget`` the style sheet ``sheet`` unless it has it already: setting a sheet,
    even the same one, styles the widget again and lays its window out again (after every
    edit, that is work the user waits for)."""
    if widget.styleSheet() != sheet:
        widget.setStyleSheet(sheet)


class _LinesEdit(QPlainTextEdit):
    """Several lines of text (notes); ``editingFinished`` when the focus leaves it."""

    editingFinished = Signal()

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setTabChangesFocus(True)
        self.setFixedHeight(self.fontMetrics().lineSpacing() * 4 + 12)

    def focusOutEvent(self, event: QFocusEvent) -> None:
        super().focusOutEvent(event)
        self.editingFinished.emit()


class _DateEdit(QDateEdit):
    """A date with a calendar to pick it from; the lowest date means "no date"."""

    NO_DATE = QDate(1900, 1, 1)

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setCalendarPopup(True)
        self.setDisplayFormat("yyyy-MM-dd")
        self.setMinimumDate(self.NO_DATE)
        self.setSpecialValueText("no date")

    def text_value(self) -> str:
        return "" if self.date() == self.NO_DATE else self.date().toString("yyyy-MM-dd")

    def set_text_value(self, text: str) -> None:
        date = QDate.fromString(text, "yyyy-MM-dd") if text else self.NO_DATE
        self.setDate(date if date.isValid() else self.NO_DATE)


def _text_of(editor: QWidget) -> str:
    if isinstance(editor, _LinesEdit):
        return editor.toPlainText()
    if isinstance(editor, _DateEdit):
        return editor.text_value()
    assert isinstance(editor, QLineEdit)
    return editor.text()


def _set_text(editor: QWidget, text: str) -> None:
    if isinstance(editor, _LinesEdit):
        if editor.toPlainText() != text:
            editor.setPlainText(text)
    elif isinstance(editor, _DateEdit):
        editor.set_text_value(text)
    else:
        assert isinstance(editor, QLineEdit)
        editor.setText(text)


class FieldForm(QWidget):
    """Editors for ``fields``. ``commit(name, value)`` applies an edit and returns ``None`` or the
    reason it was refused. ``choices(spec)`` lists the ids a ``ref`` field may take."""

    edited = Signal(str)  # field name, after a successful commit

    def __init__(self, fields: Sequence[FieldSpec], options: ViewOptions, commit: CommitFn, *,
                 choices: Callable[[FieldSpec], list[str]] | None = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self._fields = tuple(fields)
        self._options = options
        self._commit = commit
        self._choices = choices or (lambda spec: [])
        self._values: dict[str, Any] = {}
        self._shown: dict[str, str] = {}
        self._errors: dict[str, str] = {}
        self._editors: dict[str, QWidget] = {}
        self._error_labels: dict[str, QLabel] = {}
        self._loading = False
        self._enabled = False
        self._disabled_fields: tuple[str, ...] = ()
        layout = QFormLayout(self)
        layout.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        for spec in self._fields:
            editor = self._make_editor(spec)
            editor.setObjectName(f"field_{spec.name}")
            if spec.help:
                editor.setToolTip(spec.help)
            error = QLabel()
            error.setStyleSheet(ERROR_STYLE)
            error.setWordWrap(True)
            error.setObjectName(f"error_{spec.name}")
            error.hide()
            box = QWidget()
            box_layout = QVBoxLayout(box)
            box_layout.setContentsMargins(0, 0, 0, 0)
            box_layout.setSpacing(1)
            box_layout.addWidget(editor)
            box_layout.addWidget(error)
            layout.addRow(spec.label, box)
            self._editors[spec.name] = editor
            self._error_labels[spec.name] = error
        options.changed.connect(self._on_options_changed)
        self.set_values({}, enabled=False)

    # --- public ----------------------------------------------------------------------------------

    def editor(self, name: str) -> QWidget:
        return self._editors[name]

    def error_text(self, name: str) -> str:
        """The error shown beside ``name``, or ``""``."""
        return self._errors.get(name, "")

    def set_values(self, values: Mapping[str, Any], *, enabled: bool = True,
                   keep_errors: bool = False, disabled_fields: Sequence[str] = ()) -> None:
        """Show ``values`` (``MIXED`` for differing values). ``keep_errors`` leaves fields with a
        pending error as typed."""
        self._values = dict(values)
        self._enabled = enabled
        self._disabled_fields = tuple(disabled_fields)
        if not keep_errors:
            for name in list(self._errors):
                self._set_error(name, "")
        self._loading = True
        try:
            for spec in self._fields:
                if spec.name in self._errors:
                    continue
                editor = self._editors[spec.name]
                editor.setEnabled(enabled and spec.name in values
                                  and spec.name not in disabled_fields)
                self._show(spec, editor, values.get(spec.name))
        finally:
            self._loading = False

    def commit_text(self, name: str, text: str) -> bool:
        """Type ``text`` into a text field and finish editing (used by tests and scripts)."""
        _set_text(self._editors[name], text)
        return self._on_text_finished(self._spec(name))

    # --- editors ---------------------------------------------------------------------------------

    def _spec(self, name: str) -> FieldSpec:
        return next(s for s in self._fields if s.name == name)

    def _make_editor(self, spec: FieldSpec) -> QWidget:
        if spec.kind == "bool":
            box = QCheckBox()
            box.clicked.connect(lambda checked, s=spec: self._commit_value(s, bool(checked)))
            return box
        if spec.kind in ("enum", "ref"):
            combo = QComboBox()
            combo.activated.connect(lambda _i, s=spec, c=combo: self._commit_value(
                s, c.currentData()))
            return combo
        if spec.editor == "lines":
            lines = _LinesEdit()
            lines.editingFinished.connect(lambda s=spec: self._on_text_finished(s))
            return lines
        if spec.editor == "date":
            date = _DateEdit()
            date.editingFinished.connect(lambda s=spec: self._on_text_finished(s))
            date.calendarWidget().clicked.connect(lambda _d, s=spec: self._on_text_finished(s))
            return date
        edit = QLineEdit()
        edit.editingFinished.connect(lambda s=spec: self._on_text_finished(s))
        return edit

    def _show(self, spec: FieldSpec, editor: QWidget, value: Any) -> None:
        units = self._options.units
        mixed = value is MIXED
        if isinstance(editor, QCheckBox):
            editor.setTristate(mixed)
            editor.setCheckState(Qt.CheckState.PartiallyChecked if mixed else
                                 Qt.CheckState.Checked if value else Qt.CheckState.Unchecked)
            if not mixed:
                editor.setTristate(False)
            return
        if isinstance(editor, QComboBox):
            editor.clear()
            if spec.kind == "enum":
                assert spec.enum is not None
                for member in spec.enum:
                    editor.addItem(enum_label(member), member)
            else:
                if spec.optional:
                    editor.addItem("(all)", None)
                for choice in self._choices(spec):
                    editor.addItem(choice, choice)
            if mixed or spec.name not in self._values:
                editor.setCurrentIndex(-1)
                editor.setPlaceholderText("(several values)" if mixed else "")
            else:
                i = editor.findData(value)
                if i < 0:
                    editor.addItem(str(value), value)
                    i = editor.count() - 1
                editor.setCurrentIndex(i)
            return
        text = "" if mixed or spec.name not in self._values else format_value(spec, value, units)
        _set_text(editor, text)
        self._shown[spec.name] = _text_of(editor)
        if not isinstance(editor, QLineEdit):
            return
        hint = unit_hint(spec, units)
        if mixed:
            editor.setPlaceholderText("(several values)")
        elif spec.optional and spec.kind == "gap":
            editor.setPlaceholderText(f"none (type a size, {hint} if no unit)")
        else:
            editor.setPlaceholderText(f"{hint} if no unit given" if hint else "")

    # --- committing ------------------------------------------------------------------------------

    def _on_text_finished(self, spec: FieldSpec) -> bool:
        if self._loading:
            return False
        editor = self._editors[spec.name]
        text = _text_of(editor)
        if text == self._shown.get(spec.name) and spec.name not in self._errors:
            return False
        try:
            value = parse_value(spec, text, self._options.units)
        except ValueError as exc:
            self._set_error(spec.name, str(exc))
            return False
        return self._commit_value(spec, value)

    def _commit_value(self, spec: FieldSpec, value: Any) -> bool:
        if self._loading:
            return False
        reason = self._commit(spec.name, value)
        if reason is not None:
            self._set_error(spec.name, reason)
            editor = self._editors[spec.name]
            if isinstance(editor, (QComboBox, QCheckBox)):  # a choice cannot stay half-typed
                self._set_error(spec.name, reason)
                self._loading = True
                self._show(spec, editor, self._values.get(spec.name))
                self._loading = False
            return False
        self._set_error(spec.name, "")
        self.edited.emit(spec.name)
        return True

    def _set_error(self, name: str, message: str) -> None:
        label = self._error_labels[name]
        editor = self._editors[name]
        if message:
            self._errors[name] = message
            label.setText(f"! {message}")
            label.show()
            if isinstance(editor, QLineEdit):
                set_style(editor, _INVALID_EDIT)
        else:
            self._errors.pop(name, None)
            label.clear()
            label.hide()
            set_style(editor, "")

    def _on_options_changed(self) -> None:
        self.set_values(self._values, enabled=self._enabled, keep_errors=True,
                        disabled_fields=self._disabled_fields)
