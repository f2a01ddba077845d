"""The ranked openings: sortable, filterable by floor, facade, kind and band, in expected-band
order or risk order, with the factors behind the selected row beside the table."""

from __future__ import annotations

import dataclasses
import html
import operator
from collections.abc import Callable
from typing import Any

from PySide6.QtCore import (
    QAbstractTableModel,
    QItemSelection,
    QItemSelectionModel,
    QModelIndex,
    QObject,
    QPersistentModelIndex,
    QSortFilterProxyModel,
    Qt,
    QTimer,
)
from PySide6.QtWidgets import (
    QAbstractItemView,
    QComboBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QSizePolicy,
    QSplitter,
    QTableView,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.gui.result_cells import result_style, result_text, two_line_title
from petfall_audit.gui.views.common import ViewContext, band_qstyle
from petfall_audit.gui.widgets.field_form import ERROR_STYLE, set_style
from petfall_audit.gui.widgets.steady_line import SteadyLine
from petfall_audit.gui.widgets.tables import keep_columns_fitted
from petfall_audit.injury import BAND_DESCRIPTIONS, BANDS
from petfall_audit.present import SPEED_TERMS, enum_label, fmt_one_in, fmt_percent, fmt_risk
from petfall_audit.present.explain import explain, explain_all

__all__ = ["RankedModel", "RankedFilter", "RankedView", "SORT_ROLE", "ID_ROLE"]

SORT_ROLE = Qt.ItemDataRole.UserRole + 11
ID_ROLE = Qt.ItemDataRole.UserRole + 12
Index = QModelIndex | QPersistentModelIndex
#: How long (ms) new results may take before the rows show the old ones as out of date.
STALE_LOOK_DELAY_MS = 250
#: The roles the ranked model answers (the others are ``None`` at once).
_ROLES = frozenset(int(r) for r in (
    Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.TextAlignmentRole,
    Qt.ItemDataRole.BackgroundRole, Qt.ItemDataRole.ForegroundRole, Qt.ItemDataRole.FontRole,
    Qt.ItemDataRole.ToolTipRole, ID_ROLE, SORT_ROLE))
#: The columns that sort by the result's field of the same name.
_PLAIN_SORT_KEYS = frozenset(("risk_rank", "rank", "id", "floor", "facade"))


#: The details pane with no opening selected (a paragraph, which wraps in a narrow pane; a
#: placeholder text does not).
_NOTHING_SELECTED_HTML = ('<p style="color:#606060">Select an opening to see the factors '
                          'behind its rank.</p>')


class RankedModel(QAbstractTableModel):
    """Every opening of an assessment, one row each, in the order of the sorted column.

    The model sorts itself (:meth:`sort`, from precomputed keys): a large building re-sorted
    by the proxy after every result would ask for tens of thousands of cells."""

    COLUMNS = ("Risk order", "Band order", "Opening", "Floor", "Facade", "Kind",
               "Expected injury", "Likelihood (12 months)", "Median drop", "Impact speed (median)",
               "Risk score", "Main factor")
    KEYS = ("risk_rank", "rank", "id", "floor", "facade", "kind", "band", "likelihood", "drop",
            "speed", "risk", "factor")
    BAND_COL = 6
    #: Columns of names (floor, facade, kind of opening) that fit to at most this many average
    #: characters (longer names are elided and shown whole in the tooltip), so that the
    #: results beside them stay in view on a 1280-pixel-wide screen.
    NAME_COLS = tuple(i for i, k in enumerate(KEYS) if k in ("floor", "facade", "kind"))
    NAME_FIT_CHARS = 20
    #: The roles that show a result as out of date (the texts stay).
    STALE_ROLES = (Qt.ItemDataRole.ForegroundRole, Qt.ItemDataRole.BackgroundRole,
                   Qt.ItemDataRole.FontRole)

    def __init__(self, context: ViewContext, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self._ctx = context
        self._rows: list[Any] = []
        self._floor_labels: dict[int, str] = {}
        self._facade_labels: dict[str, str] = {}
        self._sort: tuple[int, Qt.SortOrder] = (0, Qt.SortOrder.AscendingOrder)
        #: The shown texts of each row's result, by ``id(result)`` (rows hold the results, so
        #: an id stays one result's); ``None`` where not yet asked for.
        self._texts: dict[int, list[str | None]] = {}
        self.stale = True
        self._stale_timer = QTimer(self)
        self._stale_timer.setSingleShot(True)
        self._stale_timer.setInterval(STALE_LOOK_DELAY_MS)
        self._stale_timer.timeout.connect(lambda: self._show_stale(True))

    def set_assessment(self, assessment: Any) -> bool:
        """Show ``assessment``'s results. Returns True if the rows stayed in place and only
        the rows whose result changed were told (``dataChanged``; the rows' contents may have
        moved, so a filter must be applied again), False after a reset.

        After an edit the new results are mostly the old ones (the incremental recompute keeps
        the results it did not change): a reset would make the table repaint and refit every
        row, also when none of the changed rows is in view."""
        self._stale_timer.stop()
        old_rows = self._rows
        rows = self._ordered(list(assessment.openings) if assessment is not None else [])
        floor_labels = ({f.level: f.label for f in assessment.building.floors}
                        if assessment is not None else {})
        facade_labels = ({f.id: f.label or f.id for f in assessment.building.facades}
                         if assessment is not None else {})
        same_labels = (floor_labels, facade_labels) == (self._floor_labels, self._facade_labels)
        if same_labels and old_rows and len(rows) == len(old_rows):
            self._rows = rows
            self._texts = self._kept_texts(old_rows)
            changed = [i for i, (a, b) in enumerate(zip(old_rows, rows, strict=True))
                       if a is not b]
            if changed:
                self.dataChanged.emit(self.index(changed[0], 0),
                                      self.index(changed[-1], len(self.COLUMNS) - 1), [])
            self._show_stale(False)
            return True
        self.beginResetModel()
        self._rows = rows
        self._floor_labels, self._facade_labels = floor_labels, facade_labels
        self._texts = self._kept_texts(old_rows) if same_labels else {}
        self.stale = False
        self.endResetModel()
        return False

    #: The columns whose text is a rank (the only fields that differ between a result reused
    #: by an incremental recompute and the one before it).
    _RANK_COLS = tuple(i for i, k in enumerate(KEYS) if k in ("rank", "risk_rank"))
    _RANK_FIELDS = ("rank", "risk_rank")

    def _kept_texts(self, old_rows: list[Any]) -> dict[int, list[str | None]]:
        """The texts of the old rows that the new rows show unchanged: a result that is the
        same object keeps all of them, one that differs from the old result of its opening only
        by its ranks keeps all but the ranks (after an edit most results are one or the other,
        so a large building's texts are not formatted again after every result)."""
        old_texts = self._texts
        if not old_texts:
            return {}
        old_by_id = {r.id: r for r in old_rows}
        kept: dict[int, list[str | None]] = {}
        others: Callable[[Any], tuple[Any, ...]] | None = None
        for r in self._rows:
            old = old_by_id.get(r.id)
            texts = old_texts.get(id(old)) if old is not None else None
            if texts is None:
                continue
            if old is r:
                kept[id(r)] = texts
                continue
            if others is None:
                others = operator.attrgetter(*(f.name for f in dataclasses.fields(r)
                                               if f.name not in self._RANK_FIELDS))
            if all(map(operator.is_, others(r), others(old))):
                texts = list(texts)
                for col in self._RANK_COLS:
                    texts[col] = None
                kept[id(r)] = texts
        return kept

    def _text(self, row: int, col: int) -> str:
        """The shown text of ``row`` in ``col`` (formatted once per result, see :attr:`_texts`)."""
        r = self._rows[row]
        texts = self._texts.get(id(r))
        if texts is None:
            texts = self._texts[id(r)] = [None] * len(self.KEYS)
        text = texts[col]
        if text is None:
            text = texts[col] = result_text(r, self.KEYS[col], self._ctx.units,
                                            self._ctx.palette, self._floor_labels,
                                            self._facade_labels)
        return text

    def set_stale(self, stale: bool) -> None:
        """The results are out of date (or current again). The rows turn grey only when new
        results take longer than :data:`STALE_LOOK_DELAY_MS` (no flash on a quick edit; the
        line over the table says it at once)."""
        if stale:
            if not self.stale and not self._stale_timer.isActive():
                self._stale_timer.start()
        else:
            self._stale_timer.stop()
            self._show_stale(False)

    def _show_stale(self, stale: bool) -> None:
        if stale != self.stale:
            self.stale = stale
            self._changed(self.STALE_ROLES)  # grey italics: the look changes, not the text

    def refresh(self) -> None:
        """Every cell may read differently (units, palette)."""
        self._texts = {}
        self._changed(())

    def _changed(self, roles: tuple[Qt.ItemDataRole, ...]) -> None:
        if self._rows:
            self.dataChanged.emit(self.index(0, 0),
                                  self.index(len(self._rows) - 1, len(self.COLUMNS) - 1),
                                  list(roles))

    # --- order -----------------------------------------------------------------------------------

    def sort_key(self, column: int, r: Any) -> Any:
        """What ``column`` sorts result ``r`` by (ascending: worst first where it ranks)."""
        key = self.KEYS[column]
        if key in _PLAIN_SORT_KEYS:
            return getattr(r, key)
        if key == "kind":
            return str(r.kind)
        if key == "band":
            return (-r.expected_band, r.rank)
        if key == "likelihood":
            return -r.annual_probability
        if key == "drop":
            return -r.drop_m.p50
        if key == "speed":
            return -r.impact_speed_mps.p50
        if key == "risk":
            return -r.risk
        return explain(r.factors[0], self._ctx.units.system) if r.factors else ""

    def _ordered(self, rows: list[Any]) -> list[Any]:
        column, order = self._sort
        key = self.KEYS[column]
        # stable: equal keys keep the building's order, in either direction
        return sorted(rows, key=(operator.attrgetter(key) if key in _PLAIN_SORT_KEYS
                                 else lambda r: self.sort_key(column, r)),
                      reverse=order == Qt.SortOrder.DescendingOrder)

    def sort(self, column: int, order: Qt.SortOrder = Qt.SortOrder.AscendingOrder) -> None:
        if not 0 <= column < len(self.COLUMNS) or self._sort == (column, order):
            return
        self._sort = (column, order)
        if not self._rows:
            return
        self.layoutAboutToBeChanged.emit()
        old = self.persistentIndexList()
        held = [self._rows[i.row()] for i in old]
        self._rows = self._ordered(self._rows)
        where = {id(r): k for k, r in enumerate(self._rows)}
        self.changePersistentIndexList(
            old, [self.index(where[id(r)], i.column()) for r, i in zip(held, old, strict=True)])
        self.layoutChanged.emit()

    def display_texts(self, column: int, rows: Any) -> list[str]:
        """The shown text of ``rows`` in ``column``, as :meth:`data` gives it (column fitting
        reads a few hundred cells after every result)."""
        return [self._text(r, column) for r in rows]

    def result(self, row: int) -> Any:
        return self._rows[row]

    def row_of(self, opening_id: str) -> int:
        for i, r in enumerate(self._rows):
            if r.id == opening_id:
                return i
        return -1

    def rowCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent: Index = QModelIndex()) -> int:  # noqa: B008
        return 0 if parent.isValid() else len(self.COLUMNS)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if orientation != Qt.Orientation.Horizontal:
            return None
        if role == Qt.ItemDataRole.DisplayRole:
            return two_line_title(self.COLUMNS[section], longest=9)  # "Risk\norder": narrow
        if role == Qt.ItemDataRole.ToolTipRole:
            return {
                0: "Rank by risk score: likelihood × severity (1 = worst); the default order, "
                   "as in the PDF and the exports",
                1: "Rank by expected injury band, then by likelihood (1 = worst)",
                6: "The worst band that at least half of the simulated falls reach",
                7: "Chance that a cat falls from here over 12 months",
                8: "Median drop: half of the simulated falls are longer, half shorter",
                9: SPEED_TERMS["impact_median"],
                10: "Risk score adapted from England's HHSRS: orders openings, "
                    "not a rating of the building",
            }.get(section)
        return None

    def data(self, index: Index, role: int = Qt.ItemDataRole.DisplayRole) -> Any:
        if role not in _ROLES or not index.isValid():
            return None  # the view asks for many roles per cell while it paints
        r = self._rows[index.row()]
        col = index.column()
        if role == ID_ROLE:
            return r.id
        if role == SORT_ROLE:
            return self.sort_key(col, r)
        if role == Qt.ItemDataRole.DisplayRole:
            return self._text(index.row(), col)
        style = result_style(r, self.KEYS[col], role, stale=self.stale, palette=self._ctx.palette,
                             system=self._ctx.options.units)
        if role == Qt.ItemDataRole.ToolTipRole and col in self.NAME_COLS:
            # the name may be elided in its narrowed column: whole here, then the result's words
            return f"{self._text(index.row(), col)}\n{style}"
        return style

    def words(self, r: Any) -> list[str]:
        """The factors and hazards of result ``r`` in words, in the display units."""
        system = self._ctx.units.system
        return [*explain_all(r.factors, system), *explain_all(r.hazards, system)]


class RankedFilter(QSortFilterProxyModel):
    """Keeps rows whose floor, facade, kind and band match (``None`` = any) and whose id or
    factors contain the search text."""

    def __init__(self, parent: QObject | None = None) -> None:
        super().__init__(parent)
        self.floor: int | None = None
        self.facade: str | None = None
        self.kind: str | None = None
        self.band: int | None = None
        self.text = ""
        # rows are filtered again when the results or the filters change, not on every cell
        # change (an out-of-date look would refilter a large building twice per edit)
        self.setDynamicSortFilter(False)

    def sort(self, column: int, order: Qt.SortOrder = Qt.SortOrder.AscendingOrder) -> None:
        """The rows keep the source model's order, which :meth:`RankedModel.sort` sets."""
        model = self.sourceModel()
        if isinstance(model, RankedModel):
            model.sort(column, order)

    def display_texts(self, column: int, rows: Any) -> list[str]:
        """The shown text of the shown ``rows`` in ``column`` (for column fitting)."""
        model = self.sourceModel()
        assert isinstance(model, RankedModel)
        if self.rowCount() == model.rowCount():  # nothing filtered out: the same rows
            return model.display_texts(column, rows)
        return model.display_texts(column, [self.mapToSource(self.index(r, 0)).row()
                                            for r in rows])

    @property
    def filtering(self) -> bool:
        """True if some rows may be left out."""
        return not (self.floor is None and self.facade is None and self.kind is None
                    and self.band is None and not self.text)

    def set_filters(self, **values: Any) -> None:
        if all(getattr(self, key) == value for key, value in values.items()):
            return  # the same filters: nothing to redo
        self.refilter(**values)

    def refilter(self, **values: Any) -> None:
        """Set the filters in ``values`` and filter every row again."""
        if hasattr(self, "beginFilterChange"):  # Qt 6.10+; invalidateFilter is deprecated
            self.beginFilterChange()
            for key, value in values.items():
                setattr(self, key, value)
            self.endFilterChange(QSortFilterProxyModel.Direction.Rows)
        else:  # pragma: no cover - older Qt
            for key, value in values.items():
                setattr(self, key, value)
            self.invalidateFilter()

    def filterAcceptsRow(self, source_row: int, source_parent: Index) -> bool:
        if not self.filtering:
            return True  # no filter (the usual case: every row, after every result)
        model = self.sourceModel()
        assert isinstance(model, RankedModel)
        r = model.result(source_row)
        if self.floor is not None and r.floor != self.floor:
            return False
        if self.facade is not None and r.facade != self.facade:
            return False
        if self.kind is not None and str(r.kind) != self.kind:
            return False
        if self.band is not None and r.expected_band != self.band:
            return False
        if self.text:
            needle = self.text.lower()
            hay = " ".join([r.id, *model.words(r)]).lower()
            if needle not in hay:
                return False
        return True


def _factors_html(r: Any, palette: str, units: Any) -> str:
    style = band_qstyle(r.expected_band, palette)
    band = BANDS[r.expected_band]
    rows = "".join(
        f"<tr><td>{band_qstyle(i, palette).mark} {html.escape(name)}</td>"
        f"<td align='right'>{fmt_percent(r.bands.get(name, 0.0))}</td></tr>"
        for i, name in enumerate(BANDS))
    factors = "".join(f"<li>{html.escape(f)}</li>" for f in explain_all(r.factors, units.system))
    hazards = "".join(f"<li>{html.escape(h)}</li>" for h in explain_all(r.hazards, units.system))
    return (
        f"<h3 style='margin:0'>{html.escape(r.id)}</h3>"
        f"<p style='margin:2px 0'><span style='background:{style.fill}; color:{style.text}'>"
        f"&nbsp;{html.escape(style.mark)} {html.escape(band)}&nbsp;</span> expected: "
        f"{html.escape(BAND_DESCRIPTIONS.get(band, ''))}</p>"
        f"<p style='margin:2px 0'>Rank {r.risk_rank} by risk score, {r.rank} by band · "
        f"likelihood {fmt_one_in(r.one_in_n)} over 12 months · risk score "
        f"{fmt_risk(r.risk)}</p>"
        f"<p style='margin:2px 0' title='{html.escape(SPEED_TERMS['impact_range'], True)}'>"
        f"Impact speed {units.fmt_speed(r.impact_speed_mps.p50)} (median of the simulated "
        f"cats), {units.fmt_speed(r.impact_speed_mps.p5)} to "
        f"{units.fmt_speed(r.impact_speed_mps.p95)} for nine in ten of them (5th–95th "
        f"percentile)</p>"
        f"<table cellspacing='0' cellpadding='1'>{rows}</table>"
        f"<p style='margin:4px 0 0 0'><b>Why it ranks here</b></p>"
        f"<ul style='margin:0'>{factors}</ul>"
        + (f"<p style='margin:4px 0 0 0'><b>Other hazards</b></p>"
           f"<ul style='margin:0'>{hazards}</ul>" if hazards else "")
    )


#: Characters a filter box of the ranked list is sized for (its list shows every choice whole).
FILTER_CHARS = 8


class RankedView(QWidget):
    """Filter bar, ranked table and the factors of the selected opening."""

    def __init__(self, context: ViewContext, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("ranked_view")
        self._ctx = context
        self._syncing = False
        self.model = RankedModel(context, self)
        self.proxy = RankedFilter(self)
        self.proxy.setSourceModel(self.model)

        self.order_box = QComboBox()
        self.order_box.setObjectName("order_box")
        # The default order (the PDF's, the command line's and the exports'): risk score.
        self.order_box.addItem("Risk score (likelihood × severity)", 0)
        self.order_box.addItem("Expected injury, then likelihood", 1)
        self.floor_box = QComboBox()
        self.facade_box = QComboBox()
        self.kind_box = QComboBox()
        self.band_box = QComboBox()
        for box, name in ((self.floor_box, "floor_filter"), (self.facade_box, "facade_filter"),
                          (self.kind_box, "kind_filter"), (self.band_box, "band_filter")):
            box.setObjectName(name)
            # as wide as a short choice ("All", "Floor 12"), not as the longest one, so that the
            # order's name reads whole; the list that drops down shows every choice whole
            box.setSizeAdjustPolicy(
                QComboBox.SizeAdjustPolicy.AdjustToMinimumContentsLengthWithIcon)
            box.setMinimumContentsLength(FILTER_CHARS)
            box.setSizePolicy(QSizePolicy.Policy.Maximum, QSizePolicy.Policy.Fixed)
            box.currentIndexChanged.connect(self._on_filter_changed)
        # full width when there is room; on a small or scaled screen the boxes shrink (their
        # text elided) so that the window still fits
        em = self.fontMetrics().horizontalAdvance("M")
        for box, chars in ((self.order_box, 9), (self.floor_box, 5), (self.facade_box, 5),
                           (self.kind_box, 5), (self.band_box, 5)):
            box.setMinimumWidth(chars * em)
        self.search = QLineEdit()
        self.search.setObjectName("ranked_search")
        self.search.setPlaceholderText("Search id or factor…")
        self.search.setClearButtonEnabled(True)
        self.search.setMinimumWidth(8 * self.fontMetrics().horizontalAdvance("M"))
        self.search.textChanged.connect(self._on_filter_changed)
        self.count = QLabel()
        bar = QHBoxLayout()
        bar.setContentsMargins(0, 0, 0, 0)
        for text, widget in (("&Order:", self.order_box), ("F&loor:", self.floor_box),
                             ("Fa&cade:", self.facade_box), ("&Kind:", self.kind_box),
                             ("&Band:", self.band_box)):
            label = QLabel(text)
            label.setBuddy(widget)
            bar.addWidget(label)
            bar.addWidget(widget)
        bar.addWidget(self.search, 1)
        bar.addWidget(self.count)

        self.table = QTableView()
        self.table.setObjectName("ranked_table")
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setAlternatingRowColors(True)
        self.table.setWordWrap(False)
        self.table.verticalHeader().hide()
        self.table.verticalHeader().setDefaultSectionSize(22)  # as compact as the editors
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        header.setStretchLastSection(True)
        name_px = self.table.fontMetrics().averageCharWidth() * RankedModel.NAME_FIT_CHARS
        self.table.setProperty("fit_max_px", dict.fromkeys(RankedModel.NAME_COLS, name_px))
        keep_columns_fitted(self.table)
        self.details = QTextBrowser()
        self.details.setObjectName("ranked_details")
        self.details.setOpenLinks(False)
        self.details.setHtml(_NOTHING_SELECTED_HTML)
        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(self.table)
        splitter.addWidget(self.details)
        splitter.setStretchFactor(0, 3)
        splitter.setStretchFactor(1, 1)
        splitter.setChildrenCollapsible(False)
        self.details.setMinimumWidth(220)
        #: One line over the table: how the openings are ranked, that they are being
        #: recomputed, or why the results could not be computed.
        self.state_note = QLabel("Computing results…")
        self.state_note.setObjectName("results_state")
        self.state_note.setWordWrap(True)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(SteadyLine(self.state_note))  # its changes do not relay out the page
        layout.addLayout(bar)
        layout.addWidget(splitter, 1)
        self.setFocusProxy(self.table)

        self.order_box.currentIndexChanged.connect(self._on_order_changed)
        self.table.selectionModel().selectionChanged.connect(self._on_table_selection)
        context.assessment_changed.connect(self._on_assessment)
        context.stale_changed.connect(self.model.set_stale)
        context.stale_changed.connect(self._on_stale)
        context.results.failed.connect(self._on_failed)
        context.selection.changed.connect(self._on_selection)
        context.options.changed.connect(self._on_options)
        self.table.sortByColumn(0, Qt.SortOrder.AscendingOrder)  # risk_rank: the default order
        self._fill_filters(None)
        if context.assessment is not None:
            self._on_assessment(context.assessment)

    # --- public ----------------------------------------------------------------------------------

    def visible_ids(self) -> list[str]:
        """Opening ids in the order shown."""
        return [self.proxy.index(r, 0).data(ID_ROLE) for r in range(self.proxy.rowCount())]

    def row_result(self, row: int) -> Any:
        """The result of the opening shown in ``row`` (0 = the top row as sorted)."""
        return self.model.result(self.proxy.mapToSource(self.proxy.index(row, 0)).row())

    def set_order(self, by: str) -> None:
        """``"band"`` or ``"risk"`` (the default)."""
        self.order_box.setCurrentIndex(self.order_box.findData(1 if by == "band" else 0))

    # --- handlers --------------------------------------------------------------------------------

    def _on_stale(self, stale: bool) -> None:
        if stale:
            self.state_note.setText("Results are out of date: recomputing…")

    def _on_failed(self, message: str) -> None:
        self.state_note.setText(f"! Results could not be computed: {message}")
        set_style(self.state_note, ERROR_STYLE)

    def _on_assessment(self, assessment: Any) -> None:
        n = len(getattr(assessment, "openings", ()))
        set_style(self.state_note, "")  # a failure shown before is over
        self.state_note.setText(
            f"{n} openings ranked, worst first (by risk score, as in the PDF and the exports). "
            "Double-click a row to edit the opening." if n else
            "No openings yet. Start on the Floors tab (the storeys and their heights), then "
            "add the balconies and windows on the Openings tab, or import a schedule "
            "(File ▸ Import). Help ▸ How to audit a building has the five steps.")
        self._fill_filters(assessment)
        kept_rows = self.model.set_assessment(assessment)  # columns fit themselves (tables.py)
        if kept_rows and self.proxy.filtering:
            self.proxy.refilter()  # the rows in place may hold other openings now
        self._on_filter_changed()
        self._on_selection(self._ctx.selection.ids)

    def _on_options(self) -> None:
        self.model.refresh()
        self.proxy.invalidate()  # the words searched may read differently in other units
        self._show_details()

    def _fill_filters(self, assessment: Any) -> None:
        def fill(box: QComboBox, items: list[tuple[str, Any]]) -> None:
            shown = [(box.itemText(i), box.itemData(i)) for i in range(1, box.count())]
            if box.count() and shown == items:
                return  # the same choices (most results): the box stays as it is
            keep = box.currentData()
            box.blockSignals(True)
            box.clear()
            box.addItem("All", None)
            for text, data in items:
                box.addItem(text, data)
            i = box.findData(keep) if keep is not None else 0
            box.setCurrentIndex(max(i, 0))
            box.blockSignals(False)

        if assessment is None:
            b = None
            floors: list[tuple[str, Any]] = []
            facades: list[tuple[str, Any]] = []
            kinds: list[tuple[str, Any]] = []
        else:
            b = assessment.building
            floors = [(f.label or str(f.level), f.level)
                      for f in sorted(b.floors, key=lambda f: f.level)]
            facades = [(f.label or f.id, f.id) for f in b.facades]
            seen = dict.fromkeys(o.kind for o in b.openings)
            kinds = [(enum_label(k), str(k)) for k in seen]
        fill(self.floor_box, floors)
        fill(self.facade_box, facades)
        fill(self.kind_box, kinds)
        fill(self.band_box, [(f"{band_qstyle(i, self._ctx.palette).mark} {n}", i)
                             for i, n in enumerate(BANDS)])
        del b

    def _on_filter_changed(self, *_: Any) -> None:
        self.proxy.set_filters(floor=self.floor_box.currentData(),
                               facade=self.facade_box.currentData(),
                               kind=self.kind_box.currentData(),
                               band=self.band_box.currentData(),
                               text=self.search.text().strip())
        self.count.setText(f"{self.proxy.rowCount()} of {self.model.rowCount()} openings")

    def _on_order_changed(self, _index: int) -> None:
        self.table.sortByColumn(int(self.order_box.currentData()), Qt.SortOrder.AscendingOrder)

    def _on_table_selection(self, *_: Any) -> None:
        if self._syncing:
            return
        rows = self.table.selectionModel().selectedRows()
        current = self.table.currentIndex()
        ids = [i.data(ID_ROLE) for i in sorted(rows, key=lambda i: i.row())]
        if current.isValid():
            cid = current.data(ID_ROLE)
            if cid in ids:
                ids.remove(cid)
                ids.insert(0, cid)
        self._ctx.select(ids)
        self._show_details()

    def _on_selection(self, ids: Any) -> None:
        self._syncing = True
        try:
            sel = self.table.selectionModel()
            selection = QItemSelection()
            first: QModelIndex | None = None
            for oid in ids:
                row = self.model.row_of(oid)
                if row < 0:
                    continue
                index = self.proxy.mapFromSource(self.model.index(row, 0))
                if index.isValid():
                    selection.select(index, index)
                    first = index if first is None else first
            sel.select(selection, QItemSelectionModel.SelectionFlag.ClearAndSelect
                       | QItemSelectionModel.SelectionFlag.Rows)
            if first is not None:
                sel.setCurrentIndex(first, QItemSelectionModel.SelectionFlag.NoUpdate)
                self.table.scrollTo(first)
        finally:
            self._syncing = False
        self._show_details()

    def _show_details(self) -> None:
        a = self._ctx.assessment
        current = self._ctx.selection.current
        if a is None or current is None:
            self.details.setHtml(_NOTHING_SELECTED_HTML)
            return
        try:
            r = a.result(current)
        except KeyError:
            self.details.setHtml(_NOTHING_SELECTED_HTML)
            return
        self.details.setHtml(_factors_html(r, self._ctx.palette, self._ctx.units))
