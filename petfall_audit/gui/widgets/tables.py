"""The editors' common parts: a record table set up the same way everywhere, and the line that
shows why an edit was refused."""

from __future__ import annotations

from collections.abc import Callable, Iterable

from PySide6.QtCore import QEvent, QModelIndex, QObject, Qt, QTimer
from PySide6.QtGui import QAction, QGuiApplication, QKeySequence
from PySide6.QtWidgets import QAbstractItemView, QLabel, QPushButton, QTableView, QToolBar

from petfall_audit.editing.fields import FieldSpec
from petfall_audit.gui.adapters import RecordTableModel
from petfall_audit.gui.widgets.delegates import FieldDelegate
from petfall_audit.gui.widgets.field_form import ERROR_STYLE

__all__ = ["add_remove_bar", "record_table", "error_label", "keep_columns_fitted",
           "fit_columns", "widen_columns", "table_action", "clipboard_text",
           "set_clipboard_text", "refusal_line"]

ROW_HEIGHT_PX = 22


def record_table(model: RecordTableModel, name: str,
                 choices: Callable[[FieldSpec], list[str]], *, multi: bool = False,
                 stretch_last: bool = True) -> QTableView:
    """A compact table of ``model`` (whole rows selected; several with ``multi``), its cells
    edited through the field specs with ``choices`` for lists, columns sized to the content."""
    table = QTableView()
    table.setObjectName(name)
    table.setModel(model)
    table.setItemDelegate(FieldDelegate(choices, table))
    table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
    table.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection if multi
                           else QAbstractItemView.SelectionMode.SingleSelection)
    table.verticalHeader().hide()
    table.verticalHeader().setDefaultSectionSize(ROW_HEIGHT_PX)
    header = table.horizontalHeader()
    header.setStretchLastSection(stretch_last)
    keep_columns_fitted(table)
    return table


#: Rows read to size a column (the first ones, then a sample of the rest).
_FIT_ROWS = 200
#: Room (px) beside the text of a cell for its margins and focus frame.
_CELL_PAD_PX = 12


def fit_columns(table: QTableView) -> None:
    """Size every column to its header and the cells it shows: a column the user has resized
    is only ever widened, the others fit exactly. A column named in the table's
    ``fit_max_px`` property (column -> px) grows no wider than that by itself (its longer texts
    are elided; the user may still widen it). Reads at most :data:`_FIT_ROWS` rows, spread
    over the whole table, so that a large building stays quick."""
    model = table.model()
    if model is None:
        return
    header = table.horizontalHeader()
    metrics = table.fontMetrics()
    rows = model.rowCount()
    step = max(1, rows // _FIT_ROWS)
    sample = range(0, rows, step)
    last = model.columnCount() - 1
    user_sized: set[int] = table.property("user_sized_columns") or set()
    # a model may give a column's texts without an index per cell (same texts as data())
    texts_of = getattr(model, "display_texts", None)
    widths = _text_widths(table)  # columns repeat their texts, from fit to fit too
    table.setProperty("fitting_columns", True)
    try:
        for col in range(model.columnCount()):
            if header.isSectionHidden(col) or (col == last and header.stretchLastSection()):
                continue
            want = header.sectionSizeFromContents(col).width()
            texts = (texts_of(col, sample) if texts_of is not None else
                     [model.data(model.index(row, col)) for row in sample])
            for text in texts:
                if text is None:
                    continue
                t = str(text)
                width = widths.get(t)
                if width is None:
                    width = widths[t] = metrics.horizontalAdvance(t)
                want = max(want, width + _CELL_PAD_PX)
            want = _capped(table, col, want)
            size = header.sectionSize(col)
            if size < want or (col not in user_sized and size != want):
                header.resizeSection(col, want)
    finally:
        table.setProperty("fitting_columns", False)


def _capped(table: QTableView, col: int, want_px: int) -> int:
    """``want_px`` held to the column's ``fit_max_px`` (never below its header's width)."""
    caps: dict[int, int] = table.property("fit_max_px") or {}
    if col not in caps:
        return want_px
    header_px = table.horizontalHeader().sectionSizeFromContents(col).width()
    return min(want_px, max(caps[col], header_px))


#: Most measured texts kept per table between fits.
_WIDTHS_KEPT = 20_000


def _text_widths(table: QTableView) -> dict[str, int]:
    """The measured width (px) of each text ``table`` showed, kept while its font stays."""
    key = table.font().key()
    kept: tuple[str, dict[str, int]] | None = getattr(table, "_petfall_text_widths", None)
    if kept is None or kept[0] != key or len(kept[1]) > _WIDTHS_KEPT:
        kept = (key, {})
        table._petfall_text_widths = kept  # type: ignore[attr-defined]
    return kept[1]


def _note_user_resize(table: QTableView, col: int) -> None:
    if not table.property("fitting_columns"):
        sized: set[int] = table.property("user_sized_columns") or set()
        table.setProperty("user_sized_columns", sized | {col})


def widen_columns(table: QTableView, first_row: int, last_row: int) -> None:
    """Widen the columns that are too narrow for rows ``first_row`` to ``last_row`` (a few
    edited rows: a whole refit of a large table on every edit would cost tens of ms)."""
    model = table.model()
    if model is None:
        return
    header = table.horizontalHeader()
    metrics = table.fontMetrics()
    last = model.columnCount() - 1
    rows = range(max(first_row, 0), min(last_row, model.rowCount() - 1) + 1)
    table.setProperty("fitting_columns", True)
    try:
        for col in range(model.columnCount()):
            if header.isSectionHidden(col) or (col == last and header.stretchLastSection()):
                continue
            want = 0
            for row in rows:
                text = model.data(model.index(row, col))
                if text is not None:
                    want = max(want, metrics.horizontalAdvance(str(text)) + _CELL_PAD_PX)
            want = _capped(table, col, want)
            if header.sectionSize(col) < want:
                header.resizeSection(col, want)
    finally:
        table.setProperty("fitting_columns", False)


#: A change of at most this many rows only widens columns (see :func:`keep_columns_fitted`).
_FEW_ROWS = 8
_TEXT_ROLES = (int(Qt.ItemDataRole.DisplayRole), int(Qt.ItemDataRole.EditRole))


def keep_columns_fitted(table: QTableView) -> None:
    """Fit ``table``'s columns now and whenever rows come, go or change (once per burst of
    changes): columns never clip what they show, also when a table that started empty fills.

    A change of colours or fonts only (``dataChanged`` naming only such roles) fits nothing; a
    change of a few rows only widens the columns those rows need (a column may then stay wider
    than its content until the next whole fit: rows added, removed or reset, or a larger
    change)."""
    table.setWordWrap(False)  # a wrapped cell in a one-line row shows only its first word
    table.setTextElideMode(Qt.TextElideMode.ElideRight)
    timer = QTimer(table)
    timer.setSingleShot(True)
    timer.setInterval(0)
    pending: dict[str, object] = {"whole": False, "rows": None}

    def fit_now() -> None:
        if not table.isVisible():  # behind another tab: fitted when it is shown
            return
        rows = pending["rows"]
        whole = bool(pending["whole"])
        pending["whole"], pending["rows"] = False, None
        if whole:
            fit_columns(table)
        elif isinstance(rows, tuple):
            widen_columns(table, rows[0], rows[1])

    def whole(*_: object) -> None:
        pending["whole"] = True
        timer.start()

    def reset() -> None:
        # a reset comes alone (new results, another building): fitted at once, before the
        # table repaints, which would otherwise paint it twice, before and after the fit
        pending["whole"] = True
        timer.stop()
        fit_now()  # a hidden table keeps it pending until shown

    def changed(top: QModelIndex, bottom: QModelIndex, roles: list[int] | None = None) -> None:
        if roles and not any(int(r) in _TEXT_ROLES for r in roles):
            return  # colours, fonts, tooltips: no text changed
        rows = pending["rows"]
        first, last = top.row(), bottom.row()
        if isinstance(rows, tuple):
            first, last = min(first, rows[0]), max(last, rows[1])
        if last - first + 1 > _FEW_ROWS:
            pending["whole"] = True
        else:
            pending["rows"] = (first, last)
        timer.start()

    timer.timeout.connect(fit_now)
    table.installEventFilter(_FitWhenShown(table, fit_now))
    model = table.model()
    model.modelReset.connect(reset)
    for signal in (model.rowsInserted, model.layoutChanged):
        signal.connect(whole)
    model.dataChanged.connect(changed)
    table.horizontalHeader().sectionResized.connect(
        lambda col, _old, _new: _note_user_resize(table, col))
    fit_columns(table)


class _FitWhenShown(QObject):
    """Runs the pending fit of a table when it is shown (a hidden table's changes wait: the
    editors behind other tabs follow every edit of the building)."""

    def __init__(self, table: QTableView, fit: Callable[[], None]) -> None:
        super().__init__(table)
        self._fit = fit

    def eventFilter(self, watched: QObject, event: QEvent) -> bool:  # noqa: N802 (Qt's name)
        if event.type() == QEvent.Type.Show:
            self._fit()
        return False


def table_action(table: QTableView, text: str, shortcut: QKeySequence | QKeySequence.StandardKey
                 | str, handler: Callable[[], object]) -> QAction:
    """An action of ``table`` with ``shortcut``, active while the table (not a cell editor in
    it) has the focus, also in its context menu."""
    action = QAction(text, table)
    action.setShortcut(QKeySequence(shortcut))
    action.setShortcutContext(Qt.ShortcutContext.WidgetShortcut)
    action.triggered.connect(lambda _checked=False: handler())
    table.addAction(action)
    table.setContextMenuPolicy(Qt.ContextMenuPolicy.ActionsContextMenu)
    return action


def clipboard_text() -> str:
    """The text on the clipboard (empty if none)."""
    return QGuiApplication.clipboard().text()


def set_clipboard_text(text: str) -> None:
    QGuiApplication.clipboard().setText(text)


def refusal_line(thing: str, message: str) -> str:
    """The line shown for a refused edit of ``thing`` ("Opening S01-B1"): the reason in words,
    without naming the thing twice, and what happens next."""
    if not message.lower().startswith(thing.lower()):
        message = f"{thing}: {message}"
    return f"{message}. Correct the value in the cell (Esc keeps the old one)."


def error_label(name: str = "") -> QLabel:
    """A hidden, word-wrapped label in the error style (shown with the reason of a refusal)."""
    label = QLabel()
    if name:
        label.setObjectName(name)
    label.setStyleSheet(ERROR_STYLE)
    label.setWordWrap(True)
    label.hide()
    return label


def add_remove_bar(
    add_label: str,
    on_add: Callable[[], object],
    remove_label: str,
    on_remove: Callable[[], object],
    actions: Iterable[QAction] = (),
) -> QToolBar:
    """The toolbar above an editor table: an add and a remove button, then ``actions``."""
    bar = QToolBar()
    for label, handler in ((add_label, on_add), (remove_label, on_remove)):
        button = QPushButton(label)
        button.clicked.connect(lambda _checked=False, h=handler: h())
        bar.addWidget(button)
    for action in actions:
        bar.addAction(action)
    return bar
