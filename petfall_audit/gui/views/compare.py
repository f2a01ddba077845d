"""Re-audit: this audit beside an earlier one, opening by opening.

Open an earlier building file; it is assessed off the GUI thread with the same simulated cats
(samples and seed) as this audit's results, then compared with them
(:func:`petfall_audit.compare.compare_assessments`). The list shows the openings that changed,
worst change first (the largest rise of risk), with filters; its text comes from
:mod:`petfall_audit.present.comparison`, so it reads the numbers of ``petfall-audit compare
--format json``. A click selects the opening in every view.
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QCheckBox,
    QComboBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QPushButton,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.gui.views.common import (
    Task,
    ViewContext,
    WhileHidden,
    load_earlier_building,
    run_task,
)
from petfall_audit.gui.views.facade import FacadeView, legend_html
from petfall_audit.gui.views.floors import EarlierAudit
from petfall_audit.gui.widgets.tables import error_label
from petfall_audit.present.comparison import ComparisonRow

__all__ = ["CompareView", "COLUMNS", "FILTERS", "ID_ROLE"]

COLUMNS: tuple[str, ...] = ("Opening", "Status", "Band", "Risk before", "Risk after", "Change",
                            "Removed by fixes", "What changed")
#: The filters of the list: (key, label).
FILTERS: tuple[tuple[str, str], ...] = (
    ("moved", "Every change"),
    ("worse", "Got worse"),
    ("better", "Got better"),
    ("added", "New openings"),
    ("removed", "Removed openings"),
    ("fixed", "With fixes fitted"),
    ("all", "Every opening, unchanged too"),
)
ID_ROLE = int(Qt.ItemDataRole.UserRole) + 1
_RIGHT = {3, 4, 5, 6}


#: Changes outside the openings listed under the table; the rest are in its tooltip, so that
#: a long list (another building's file, a rebuilt estate) never squeezes the table.
NOTE_CHANGES = 6


def _keep(row: ComparisonRow, key: str) -> bool:
    if key == "all":
        return True
    if row.status == "unchanged":
        return False
    return {
        "moved": True,
        "worse": row.risk_change > 0,
        "better": row.risk_change < 0,
        "added": row.status == "added",
        "removed": row.status == "removed",
        "fixed": bool(row.fitted_text) or row.removed_by_fixes > 0,
    }.get(key, True)


class CompareView(QWidget):
    """The comparison list and its summary. ``comparison`` is the current
    :class:`~petfall_audit.compare.Comparison` (``None`` before an earlier audit is opened);
    ``compared`` is emitted with it each time it is made."""

    compared = Signal(object)

    def __init__(self, context: ViewContext, *, prompts: EarlierAudit | None = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("compare_view")
        self._ctx = context
        self.prompts = prompts or EarlierAudit()
        self.earlier_building: Any = None
        self.earlier_name = ""
        self.earlier: Any = None  # the earlier assessment
        self.comparison: Any = None
        self.rows: list[ComparisonRow] = []
        self._task: Task | None = None
        self.mode = "earlier"  # or "what_if": this audit against its building after a plan
        self.what_if_actions: tuple[Any, ...] = ()
        self.what_if_catalogue: Any = None
        self.what_if_left: tuple[Any, ...] = ()
        self.what_if_plan: Any = None

        self.open_button = QPushButton("&Open earlier audit…")
        self.open_button.setObjectName("open_earlier_compare")
        self.open_button.setToolTip("Compare this audit with an earlier building file of the "
                                    "same building, opening by opening")
        self.open_button.clicked.connect(lambda _c=False: self.open_earlier())
        self.filter_box = QComboBox()
        self.filter_box.setObjectName("compare_filter")
        for key, label in FILTERS:
            self.filter_box.addItem(label, key)
        show = QLabel("Sho&w:")
        show.setBuddy(self.filter_box)
        self.search = QLineEdit()
        self.search.setObjectName("compare_search")
        self.search.setPlaceholderText("Opening id contains…")
        self.search.setClearButtonEnabled(True)
        self.accept_button = QPushButton("F&it the plan's fixes")
        self.accept_button.setObjectName("accept_what_if")
        self.accept_button.setToolTip("Write the plan's fixes into the openings of this "
                                      "building (undo with Ctrl+Z)")
        self.accept_button.clicked.connect(lambda _c=False: self.accept_what_if())
        self.close_button = QPushButton("C&lose the what-if")
        self.close_button.setObjectName("close_what_if")
        self.close_button.clicked.connect(lambda _c=False: self.close_what_if())
        for b in (self.accept_button, self.close_button):
            b.hide()
        # openings that look renumbered (same floor, facade, kind and place) are paired on
        # request, as the command line's --rename pairs them
        self.pair_renumbered = QCheckBox("&Pair renumbered openings")
        self.pair_renumbered.setObjectName("pair_renumbered")
        self.pair_renumbered.setToolTip(
            "Pair each opening of the earlier audit that has no match by id with the one new "
            "opening on the same floor, facade and kind, at the same place along the facade")
        self.pair_renumbered.hide()
        self.pair_renumbered.toggled.connect(lambda _on: self._compare())
        bar = QHBoxLayout()
        bar.setContentsMargins(0, 0, 0, 0)
        bar.addWidget(self.open_button)
        bar.addWidget(self.accept_button)
        bar.addWidget(self.close_button)
        bar.addWidget(show)
        bar.addWidget(self.filter_box)
        bar.addWidget(self.search, 1)
        bar.addWidget(self.pair_renumbered)

        self.summary = QLabel("Open an earlier building file to see what changed since that "
                              "audit; it is assessed with the same simulated cats as this one.")
        self.summary.setObjectName("compare_summary")
        self.summary.setWordWrap(True)
        self.summary.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        # a file that may be another building's audit: said apart, in the error style
        self.doubt = error_label("compare_doubt")
        self.table = QTableWidget(0, len(COLUMNS))
        self.table.setObjectName("compare_table")
        self.table.setHorizontalHeaderLabels(list(COLUMNS))
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.verticalHeader().setVisible(False)
        self.table.setWordWrap(True)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(len(COLUMNS) - 1, QHeaderView.ResizeMode.Stretch)
        self.note = QLabel()
        self.note.setObjectName("compare_note")
        self.note.setWordWrap(True)
        # the facade elevation before and after, side by side, the same facade on both
        self.before_context = context.derived()
        self.after_context = context.derived()
        self.before_facade = FacadeView(self.before_context)
        self.before_facade.setObjectName("facade_before")
        self.after_facade = FacadeView(self.after_context)
        self.after_facade.setObjectName("facade_after")
        self.before_title = QLabel("Earlier audit")
        self.after_title = QLabel("This audit")
        sides = QSplitter(Qt.Orientation.Horizontal)
        for title, view in ((self.before_title, self.before_facade),
                            (self.after_title, self.after_facade)):
            view.legend.hide()  # one key for both, over them: room for the elevations
            pane = QWidget()
            pl = QVBoxLayout(pane)
            pl.setContentsMargins(0, 0, 0, 0)
            pl.addWidget(title)
            pl.addWidget(view, 1)
            sides.addWidget(pane)
        sides.setChildrenCollapsible(False)
        self.facades_legend = QLabel()
        self.facades_legend.setObjectName("compare_facades_legend")
        self.facades_legend.setTextFormat(Qt.TextFormat.RichText)
        self.facades_legend.setWordWrap(True)
        self._update_facades_legend()
        context.options.changed.connect(self._update_facades_legend)
        facades = QWidget()
        fl = QVBoxLayout(facades)
        fl.setContentsMargins(0, 0, 0, 0)
        fl.addWidget(self.facades_legend)
        fl.addWidget(sides, 1)
        self.facades = facades
        self.before_facade.facade_box.currentIndexChanged.connect(
            lambda _i: self._same_facade(self.before_facade, self.after_facade))
        self.after_facade.facade_box.currentIndexChanged.connect(
            lambda _i: self._same_facade(self.after_facade, self.before_facade))
        for side in (self.before_context, self.after_context):
            side.selection.changed.connect(lambda ids, s=side: self._on_side_selected(s, ids))
        self._hidden = WhileHidden(self)  # off screen: new results drawn when shown or idle
        context.selection.changed.connect(self._on_main_selected)
        self.pages = QTabWidget()
        self.pages.setObjectName("compare_pages")
        self.pages.setDocumentMode(True)
        self.pages.addTab(self.table, "Openin&gs that changed")
        self.pages.addTab(self.facades, "Facades &before and after")
        self.pages.setMinimumHeight(110)  # the window still fits a small or scaled screen
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addLayout(bar)
        layout.addWidget(self.doubt)
        layout.addWidget(self.summary)
        layout.addWidget(self.pages, 1)
        layout.addWidget(self.note)

        self.filter_box.currentIndexChanged.connect(lambda _i: self._apply_filter())
        self.search.textChanged.connect(lambda _t: self._apply_filter())
        self.table.itemSelectionChanged.connect(self._on_row_selected)
        self._hidden.follow(context.assessment_changed, self._on_assessment)

    def _update_facades_legend(self) -> None:
        self.facades_legend.setText(legend_html(self._ctx.palette))

    # --- public ----------------------------------------------------------------------------------

    def set_filter(self, key: str) -> None:
        self.filter_box.setCurrentIndex(max(self.filter_box.findData(key), 0))

    def visible_ids(self) -> list[str]:
        return [row.id for r, row in enumerate(self.rows) if not self.table.isRowHidden(r)]

    def open_earlier(self, path: Path | None = None) -> Task | None:
        """Load an earlier building file and compare it with this audit's results (assessed off
        the GUI thread); ``compared`` when done."""
        loaded = load_earlier_building(self.prompts, self, path)
        if loaded is None:
            return None
        if isinstance(loaded, str):
            self.summary.setText(loaded)
            self.doubt.hide()
            return None
        building, path = loaded
        self.earlier_building, self.earlier_name = building, path.name
        self.earlier = None
        self.pair_renumbered.blockSignals(True)  # a new file: nothing paired unless asked
        self.pair_renumbered.setChecked(False)
        self.pair_renumbered.blockSignals(False)
        self._set_mode("earlier")
        return self._assess_earlier()

    def show_what_if(self, plan: Any, catalogue: Any = None) -> Task | None:
        """Compare this audit with a copy of its building with ``plan``'s fixes fitted (the
        document is not touched unless :meth:`accept_what_if`); ``compared`` when done."""
        self.what_if_actions = tuple(getattr(plan, "actions", plan) or ())
        self.what_if_catalogue = catalogue
        self.what_if_plan = plan if hasattr(plan, "risk_removed") else None
        self._set_mode("what_if")
        return self._start_what_if()

    def accept_what_if(self) -> str | None:
        """Fit the what-if's fixes to the document (one undoable step); the refusal reason or
        ``None``."""
        from petfall_audit.editing.commands import FitPlanFixes

        if self.mode != "what_if" or not self.what_if_actions:
            return "there is no what-if to accept"
        reason = self._ctx.push(FitPlanFixes(self.what_if_actions, self.what_if_catalogue))
        if reason is None:
            self.close_what_if()
        return reason

    def close_what_if(self) -> None:
        self.what_if_actions = ()
        self._set_mode("earlier")
        self.comparison, self.rows = None, []
        self.table.setRowCount(0)
        if self.earlier is not None:
            self._compare()
        else:
            self.summary.setText("Open an earlier building file to see what changed since "
                                 "that audit; it is assessed with the same simulated cats as "
                                 "this one.")
            self.note.setText("")
            self.note.setToolTip("")
            self.pages.setCurrentIndex(0)

    def _set_mode(self, mode: str) -> None:
        self.mode = mode
        self.doubt.hide()
        self.pair_renumbered.hide()
        what_if = mode == "what_if"
        self.accept_button.setVisible(what_if)
        self.close_button.setVisible(what_if)
        self.pages.setTabText(0, "Openin&gs the plan improves" if what_if
                              else "Openin&gs that changed")

    def _start_what_if(self) -> Task | None:
        from petfall_audit.fix_tracking import apply_plan

        current = self._ctx.assessment
        if current is None or not self.what_if_actions:
            self.summary.setText("No plan to try: the fix plan has no fixes yet.")
            return None
        after, self.what_if_left = apply_plan(current.building, self.what_if_actions,
                                              self.what_if_catalogue)
        samples, seed = current.samples, current.seed
        assess_fn = self._ctx.assessor.assess
        self.summary.setText("Assessing the building after the plan with the same simulated "
                             "cats…")
        if self._task is not None:
            self._task.cancel()
        self._task = run_task(lambda: assess_fn(after, samples=samples, seed=seed), parent=self)
        self._task.finished.connect(lambda a, base=current: self._on_what_if(base, a))
        self._task.failed.connect(
            lambda m: self.summary.setText(f"The what-if could not be assessed: {m}"))
        return self._task

    def _on_what_if(self, base: Any, after: Any) -> None:
        from petfall_audit.compare import compare_assessments

        if self.mode != "what_if" or base is not self._ctx.assessment:
            return  # closed, or newer results: a newer what-if follows
        self._show(compare_assessments(base, after), what_if=True)

    # --- handlers --------------------------------------------------------------------------------

    def _assess_earlier(self) -> Task | None:
        current = self._ctx.assessment
        if self.earlier_building is None or current is None:
            return None
        building, samples, seed = self.earlier_building, current.samples, current.seed
        assess_fn = self._ctx.assessor.assess
        self.summary.setText(f"Assessing {self.earlier_name} with the same simulated cats…")
        if self._task is not None:
            self._task.cancel()
        self._task = run_task(lambda: assess_fn(building, samples=samples, seed=seed),
                              parent=self)
        self._task.finished.connect(self._on_earlier)
        self._task.failed.connect(
            lambda m: self.summary.setText(f"The earlier audit could not be assessed: {m}"))
        return self._task

    def _on_earlier(self, assessment: Any) -> None:
        self.earlier = assessment
        if self.mode == "earlier":
            self._compare()

    def _on_assessment(self, assessment: Any) -> None:
        if self.mode == "what_if" and assessment is not None:
            self._start_what_if()
            return
        if self.earlier_building is None or assessment is None:
            return
        e = self.earlier
        if e is None or (e.samples, e.seed) != (assessment.samples, assessment.seed):
            self._assess_earlier()  # the cats must be the same on both sides
        else:
            self._compare()

    def _compare(self) -> None:
        from petfall_audit.compare import compare_assessments, renumbered_openings

        current = self._ctx.assessment
        if self.earlier is None or current is None or self.mode != "earlier":
            return
        # unpaired, the comparison names its renumbered openings itself; paired, they are found
        # first and given as renames
        pairs = (renumbered_openings(self.earlier.building, current.building)
                 if self.pair_renumbered.isChecked() else None)
        try:
            c = compare_assessments(self.earlier, current, renamed=pairs or None)
        except ValueError:  # newer results with other cats are on their way
            self._assess_earlier()
            return
        self.pair_renumbered.setVisible(bool(pairs if pairs is not None else c.renumbered))
        self._show(c, what_if=False)

    def _show(self, c: Any, *, what_if: bool) -> None:
        from petfall_audit.present.comparison import (
            METHOD,
            building_change_lines,
            comparison_rows,
            doubt_line,
            summary_lines,
        )

        self.comparison = c
        self.rows = comparison_rows(c, self._ctx.options.units, exact=what_if)
        self.summary.setText("\n".join(summary_lines(c, what_if=what_if, doubt=False)))
        doubt = "" if what_if else doubt_line(c)
        self.doubt.setText(doubt)
        self.doubt.setVisible(bool(doubt))
        if what_if:
            self.summary.setToolTip("A copy of this building with the plan's fixes fitted, "
                                    "assessed with the same simulated cats; nothing is fitted "
                                    "until you accept it.")
            from petfall_audit.present import fmt_count, fmt_percent, fmt_risk, plural

            left, p = len(self.what_if_left), self.what_if_plan
            text = "Nothing is changed until you choose Fit the plan's fixes."
            if left:
                text += (f" {fmt_count(left, 'fix', 'fixes')} of the plan "
                         f"{plural(left, 'relies', 'rely')} on people or "
                         f"{plural(left, 'changes', 'change')} no field of an opening (keeping "
                         f"a window shut, tenant guidance) and {plural(left, 'is', 'are')} not "
                         "shown here")
                if p is not None and p.risk_before > 0:
                    text += (f"; with them the plan's estimate is {fmt_risk(p.risk_after)} "
                             f"({fmt_percent(p.risk_removed / p.risk_before)} less)")
                text += "."
            self.note.setText(text)
            self.note.setToolTip("")
            self.before_title.setText("As audited")
            self.after_title.setText("After the plan (what-if)")
        else:
            self.summary.setToolTip(f"Compared with {self.earlier_name}. {METHOD}")
            building = building_change_lines(c, self._ctx.options.units)
            shown = building[:NOTE_CHANGES]
            more = len(building) - len(shown)
            self.note.setText("Changed in the building: " + "; ".join(shown)
                              + (f"; and {more} more (point here for the whole list)."
                                 if more else ".") if building else "")
            self.note.setToolTip("\n".join(building) if more else "")
            self.before_title.setText(f"Earlier audit: {self.earlier_name}")
            self.after_title.setText("This audit")
        self._fill()
        self.before_context.set_assessment(c.earlier)
        self.after_context.set_assessment(c.later)
        self.compared.emit(c)

    def _same_facade(self, source: FacadeView, other: FacadeView) -> None:
        fid = source.facade_id
        if fid is not None and other.facade_id != fid and other.facade_box.findData(fid) >= 0:
            other.set_facade(fid)

    def _on_main_selected(self, ids: Any) -> None:
        if self.comparison is None:
            return
        for side in (self.before_context, self.after_context):
            side.select(list(ids))

    def _on_side_selected(self, side: ViewContext, ids: Any) -> None:
        """A click on either elevation selects the opening on both and in every view."""
        chosen = list(ids)
        for other in (self.before_context, self.after_context):
            if other is not side and list(other.selection.ids) != chosen:
                other.select(chosen)
        known = self._ctx.assessment is not None and all(
            any(o.id == i for o in self._ctx.assessment.openings) for i in chosen)
        if chosen and known and list(self._ctx.selection.ids) != chosen:
            self._ctx.select(chosen)

    def _fill(self) -> None:
        self.table.setSortingEnabled(False)
        self.table.setRowCount(len(self.rows))
        for r, row in enumerate(self.rows):
            what = "; ".join((*row.changes_text, *((row.fitted_text,) if row.fitted_text
                                                    else ()))) or row.where_text
            cells = (row.id, row.status_text, row.band_text, row.risk_before_text,
                     row.risk_after_text, row.change_text, row.by_fixes_text, what)
            for col, text in enumerate(cells):
                item = QTableWidgetItem(text)
                item.setData(ID_ROLE, row.id)
                if col in _RIGHT:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                if col == len(cells) - 1:
                    item.setToolTip(what.replace("; ", "\n"))
                self.table.setItem(r, col, item)
        self._apply_filter()

    def _apply_filter(self) -> None:
        key = str(self.filter_box.currentData())
        needle = self.search.text().strip().lower()
        for r, row in enumerate(self.rows):
            hide = not _keep(row, key) or (bool(needle) and needle not in row.id.lower())
            self.table.setRowHidden(r, hide)
        if self.comparison is not None and not self.visible_ids():
            self.note.setText("No opening matches this filter. " + self.note.text()
                              .removeprefix("No opening matches this filter. "))

    def _on_row_selected(self) -> None:
        items = self.table.selectedItems()
        if not items:
            return
        oid = str(items[0].data(ID_ROLE))
        known = self._ctx.assessment is not None and any(
            o.id == oid for o in self._ctx.assessment.openings)
        if known:  # a removed opening exists only in the earlier audit
            self._ctx.select([oid])
