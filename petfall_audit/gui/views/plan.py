"""Fix plan: the budget, the chosen set of controls with its total cost and the risk before and
after, the risk-against-budget curve, the options for the selected opening with their residual
risk and cost, and every condition that comes with them. "Fit this control" records its effect on
the opening as one undoable edit.

The options, the plan and the curve are computed off the GUI thread; ``plan_ready(plan)`` and
``curve_ready((budgets, residual))`` arrive queued.
"""

from __future__ import annotations

import html
from typing import Any

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, QTimer, Signal
from PySide6.QtGui import QAction
from PySide6.QtWidgets import (
    QAbstractItemView,
    QDoubleSpinBox,
    QGridLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QProgressBar,
    QPushButton,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QTextBrowser,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.editing.commands import SetOpeningFields
from petfall_audit.gui.views.common import Task, ViewContext, WhileHidden, run_task
from petfall_audit.present import (
    budget_axis_label,
    fmt_count,
    fmt_money,
    fmt_percent,
    fmt_risk,
    hierarchy_label,
    units_in_text,
)

__all__ = ["PlanView", "fit_command"]

_CURVE_POINTS = 21


def fit_command(catalogue: Any, option: Any) -> SetOpeningFields | None:
    """The edit that records ``option``'s control on its opening (``None`` if the control
    changes no recorded field, e.g. tenant guidance)."""
    control = catalogue.control(option.control_id)
    if not control.effect:
        return None
    return SetOpeningFields([option.opening_id], dict(control.effect),
                            label=f"Fit {control.name.lower()} on {option.opening_id}")


def _compute_options(assessment: Any) -> dict[str, Any]:
    from petfall_audit.figures import budget_grid
    from petfall_audit.fixes import load_catalogue, opening_options

    catalogue = load_catalogue()
    options = opening_options(assessment, catalogue)
    return {"assessment": assessment, "catalogue": catalogue, "options": options,
            "grid": budget_grid(options, _CURVE_POINTS)}


def _fix_status_actions(view: PlanView) -> list[QAction]:
    """The chosen-fixes table's right-click menu: record what became of the selected fix, or
    the whole plan as recommended."""
    from petfall_audit.model import FixStatus
    from petfall_audit.present.changes import fix_status_label

    made: list[QAction] = []
    items = [("plan", "Record the whole plan as recommended")]
    items += [(s.value, f"Mark as {fix_status_label(s.value).lower()} today") for s in FixStatus]
    for status, text in items:
        action = QAction(text, view.chosen)
        action.triggered.connect(lambda _c=False, s=status: view.record_fix_status(s))
        view.chosen.addAction(action)
        made.append(action)
    view.chosen.setContextMenuPolicy(Qt.ContextMenuPolicy.ActionsContextMenu)
    return made


class PlanView(QWidget):
    """The building's fix plan within a budget."""

    plan_ready = Signal(object)  # Plan
    curve_ready = Signal(object)  # (budgets, residual risk)
    options_ready = Signal()

    def __init__(self, context: ViewContext, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("plan_view")
        self._ctx = context
        self.catalogue: Any = None
        self.options: dict[str, list[Any]] = {}
        self.plan: Any = None
        self.curve: tuple[np.ndarray, np.ndarray] | None = None
        self._for: Any = None  # the assessment the options belong to
        self._tasks: dict[str, Task] = {}
        self._budget_set_by_user = False

        self.budget = QDoubleSpinBox()
        self.budget.setObjectName("budget")
        self.budget.setRange(0.0, 1e9)
        self.budget.setDecimals(0)
        self.budget.setSingleStep(500.0)
        self.budget.setValue(5000.0)
        self.budget.setKeyboardTracking(False)
        self.budget.setAccelerated(True)
        self.budget.setToolTip("Money available for fixes, in the catalogue's currency "
                               "(indicative costs; replace them with local prices)")
        budget_label = QLabel("&Budget:")
        budget_label.setBuddy(self.budget)
        self.summary = QLabel("Computing the options…")
        self.summary.setObjectName("plan_summary")
        self.summary.setWordWrap(True)
        self.progress = QProgressBar()
        self.progress.setMaximumWidth(140)
        self.progress.setTextVisible(False)
        self.progress.hide()
        self.what_if_button = QPushButton("&What if…")
        self.what_if_button.setObjectName("what_if_button")
        self.what_if_button.setToolTip("Show the building with every fix of this plan fitted, "
                                       "beside the building as audited (nothing is changed "
                                       "until you accept it)")
        top = QHBoxLayout()
        top.setContentsMargins(0, 0, 0, 0)
        self.budget_note = QLabel()
        self.budget_note.setObjectName("budget_note")
        top.addWidget(budget_label)
        top.addWidget(self.budget)
        top.addWidget(self.budget_note)
        top.addWidget(self.summary, 1)
        top.addWidget(self.progress)
        top.addWidget(self.what_if_button)

        self.chosen = QTableWidget(0, 6)
        self.chosen.setObjectName("plan_table")
        self.chosen.setHorizontalHeaderLabels(["Opening", "Control", "Cost", "Risk before",
                                               "Risk after", "Status"])
        self.fix_actions = _fix_status_actions(self)
        self.options_table = QTableWidget(0, 5)
        self.options_table.setObjectName("options_table")
        self.options_table.setHorizontalHeaderLabels(["Control", "Kind of control", "Cost",
                                                      "Residual risk", "In plan"])
        for t in (self.chosen, self.options_table):
            t.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
            t.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
            t.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
            t.verticalHeader().hide()
            t.setWordWrap(False)
            t.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
            t.setTextElideMode(Qt.TextElideMode.ElideRight)
        # the control's name takes what is left; long names are elided (full name in the tip)
        self.chosen.horizontalHeader().setSectionResizeMode(1, QHeaderView.ResizeMode.Stretch)
        self.options_table.horizontalHeader().setSectionResizeMode(
            0, QHeaderView.ResizeMode.Stretch)
        self.chosen.itemSelectionChanged.connect(self._on_plan_row)
        self.options_title = QLabel("Options for the selected opening")
        self.options_title.setWordWrap(True)
        self.fit_button = QPushButton("F&it this control")
        self.fit_button.setObjectName("fit_button")
        self.fit_button.setToolTip("Record the chosen control on the opening (undo with Ctrl+Z)")
        self.fit_button.setEnabled(False)
        self.fit_button.clicked.connect(self.fit_selected_option)
        self.options_table.itemSelectionChanged.connect(self._on_option_row)
        self.conditions = QTextBrowser()
        self.conditions.setObjectName("plan_conditions")
        self.curve_plot = pg.PlotWidget(background="w")
        self.curve_plot.setTitle("Summed risk left against budget", color="#1A1A1A", size="10pt")
        self.curve_plot.setLabel("left", "risk score left", color="#1A1A1A")
        self.curve_plot.setMenuEnabled(False)
        self.curve_plot.showGrid(x=True, y=True, alpha=0.25)
        for axis in ("left", "bottom"):
            self.curve_plot.getAxis(axis).setTextPen("#1A1A1A")
            self.curve_plot.getAxis(axis).setPen("#606060")
        self.curve_plot.setMinimumHeight(100)  # under the plan: a small screen has room
        self.curve_plot.setLogMode(x=True, y=False)
        self.budget_line = pg.InfiniteLine(angle=90, movable=True,
                                           pen=pg.mkPen("#D55E00", width=2),
                                           hoverPen=pg.mkPen("#D55E00", width=4))
        self.budget_line.setToolTip("Drag to change the budget (the axis is logarithmic)")
        self.budget_line.sigPositionChangeFinished.connect(self._on_line_moved)

        left = QWidget()
        ll = QVBoxLayout(left)
        ll.setContentsMargins(0, 0, 0, 0)
        ll.addWidget(QLabel("Chosen fixes (at most one per opening), most risk removed first"))
        ll.addWidget(self.chosen, 1)
        opts = QWidget()
        ol = QGridLayout(opts)
        ol.setContentsMargins(0, 0, 0, 0)
        ol.addWidget(self.options_title, 0, 0)
        ol.addWidget(self.fit_button, 0, 1)
        ol.addWidget(self.options_table, 1, 0, 1, 2)
        ol.setRowStretch(1, 1)
        conds = QWidget()
        cl = QVBoxLayout(conds)
        cl.setContentsMargins(0, 0, 0, 0)
        cl.addWidget(QLabel("Conditions"))
        cl.addWidget(self.conditions, 1)
        middle = QSplitter(Qt.Orientation.Vertical)
        middle.addWidget(opts)
        middle.addWidget(conds)
        middle.setChildrenCollapsible(False)
        # the plan and its curve on the left, the selected opening's options and conditions on
        # the right: two columns, so that each table is wide enough for the controls' names
        # at 1280 pixels (three columns side by side elided most names to their first word)
        plan_side = QSplitter(Qt.Orientation.Vertical)
        plan_side.addWidget(left)
        plan_side.addWidget(self.curve_plot)
        plan_side.setChildrenCollapsible(False)
        plan_side.setSizes([300, 220])
        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(plan_side)
        splitter.addWidget(middle)
        splitter.setChildrenCollapsible(False)
        splitter.setSizes([640, 640])
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addLayout(top)
        layout.addWidget(splitter, 1)

        self._plan_timer = QTimer(self)
        self._plan_timer.setSingleShot(True)
        self._plan_timer.setInterval(150)
        self.budget.valueChanged.connect(self._on_budget_changed)
        # off screen, the options, the plan and the curve wait until the view is shown (the
        # exports work out the default budget themselves); the saved budget is always shown
        self._hidden = WhileHidden(self)
        self._hidden.follow(self._plan_timer.timeout, self._start_plan)
        self._hidden.follow(context.assessment_changed, self._on_assessment)
        context.selection.changed.connect(self._on_selection)
        self._hidden.follow(context.stale_changed, self._on_stale)
        context.workspace.plan_settings_changed.connect(self._on_saved_settings)
        self._on_saved_settings(context.workspace.plan_settings)
        self.empty_note: pg.TextItem | None = None
        self._draw_curve()
        if context.assessment is not None:
            self._on_assessment(context.assessment)

    # --- public ----------------------------------------------------------------------------------

    @property
    def currency(self) -> str:
        return str(getattr(self.catalogue, "currency", ""))

    def export_budget(self) -> float | str:
        """The budget of the plan an export holds: the one set for the audit, the default this
        view shows, or ``"default"`` while the view has not worked it out (it was not shown
        since the results came; the export then proposes the same default itself)."""
        if self._budget_set_by_user or self.catalogue is not None:
            return float(self.budget.value())
        from petfall_audit.gui.export_actions import DEFAULT_BUDGET

        return DEFAULT_BUDGET

    @property
    def budget_is_default(self) -> bool:
        """True while the budget is the default the view proposed (none set for the audit)."""
        return not self._budget_set_by_user

    def set_budget(self, amount: float) -> None:
        """Set the budget (the plan follows; it is kept with the audit)."""
        self.budget.setValue(float(amount))
        self._on_budget_changed(float(amount))

    def _on_saved_settings(self, settings: Any) -> None:
        """The document's plan settings (loaded, edited, undone): show the saved budget."""
        saved = getattr(settings, "budget", None)
        if saved is None:
            self._budget_set_by_user = False
            if self._for is not None and self.options:
                self._set_default_budget()
        else:
            self._budget_set_by_user = True
            if abs(float(self.budget.value()) - saved) >= 0.005:
                self.budget.blockSignals(True)
                self.budget.setValue(float(saved))
                self.budget.blockSignals(False)
                self._place_line()
                self._plan_timer.start()
        self._show_budget_note()

    def _show_budget_note(self) -> None:
        if self._budget_set_by_user:
            self.budget_note.setText("kept with the audit")
            self.budget_note.setToolTip("Saved in the building file with the rest of the audit.")
        else:
            self.budget_note.setText("a default: type a budget to keep it with the audit")
            self.budget_note.setToolTip("5 % of what fixing every opening would cost. The PDF "
                                        "audit says when its budget is a default.")

    def option_for(self, opening_id: str, control_id: str) -> Any:
        for o in self.options.get(opening_id, []):
            if o.control_id == control_id:
                return o
        raise KeyError((opening_id, control_id))

    def fit_option(self, option: Any) -> str | None:
        """Record ``option``'s control on its opening through the history; the refusal reason
        or ``None``."""
        cmd = fit_command(self.catalogue, option)
        if cmd is None:
            return "this control changes nothing recorded on the opening (e.g. guidance)"
        return self._ctx.push(cmd)

    def fit_selected_option(self) -> str | None:
        option = self._selected_option()
        if option is None:
            return "select an option first"
        return self.fit_option(option)

    # --- computing -------------------------------------------------------------------------------

    def _on_assessment(self, assessment: Any) -> None:
        self._for = assessment
        self.progress.setRange(0, 0)
        self.progress.show()
        self._cancel("options")
        task = run_task(lambda: _compute_options(assessment), parent=self)
        self._tasks["options"] = task
        task.finished.connect(self._on_options)
        task.failed.connect(self._on_failed)

    def _on_options(self, result: dict[str, Any]) -> None:
        if result["assessment"] is not self._ctx.assessment:
            return  # an older result
        self.catalogue = result["catalogue"]
        self.options = result["options"]
        grid = result["grid"]
        self.budget.setSuffix(f" {self.currency}")
        if not self._budget_set_by_user:
            self._set_default_budget()
        self.curve_plot.setLabel("bottom", budget_axis_label(self.currency),
                                 color="#1A1A1A")
        self.options_ready.emit()
        self._start_plan()
        self._start_curve(grid, result["assessment"])
        self._on_selection(self._ctx.selection.ids)

    def _start_plan(self) -> None:
        if self.catalogue is None or self._ctx.assessment is None:
            return  # the options are not computed yet (none at all is a plan too: empty)
        from petfall_audit.plan import plan_from_options

        options, budget = self.options, float(self.budget.value())
        risk_before = float(np.sum(self._ctx.assessment.risk))
        currency = self.currency
        self._cancel("plan")
        self.progress.setRange(0, 0)
        self.progress.show()
        task = run_task(lambda: plan_from_options(options, budget, risk_before=risk_before,
                                                  currency=currency), parent=self)
        self._tasks["plan"] = task
        task.finished.connect(self._on_plan)
        task.failed.connect(self._on_failed)

    def _start_curve(self, grid: np.ndarray, assessment: Any) -> None:
        from petfall_audit.plan import curve_from_options

        options = self.options
        risk_before = float(np.sum(assessment.risk))

        def work(progress: Any) -> tuple[np.ndarray, np.ndarray]:
            residual = np.empty(len(grid))
            for j, b in enumerate(grid):  # one exact solve per budget, progress between
                _, removed = curve_from_options(options, [float(b)])
                residual[j] = risk_before - float(removed[0])
                progress(j + 1, len(grid))
            return np.asarray(grid, dtype=float), residual

        self._cancel("curve")
        task = run_task(work, parent=self, with_progress=True)
        self._tasks["curve"] = task
        task.progress.connect(self._on_curve_progress)
        task.finished.connect(self._on_curve)
        task.failed.connect(self._on_failed)

    def _cancel(self, name: str) -> None:
        old = self._tasks.pop(name, None)
        if old is not None:
            old.cancel()

    def _on_failed(self, message: str) -> None:
        if message == "cancelled":
            return
        self.progress.hide()
        self.summary.setText(f"! The plan could not be computed: {message}")

    def _on_curve_progress(self, done: int, total: int) -> None:
        self.progress.setRange(0, total)
        self.progress.setValue(done)
        self.progress.show()

    def _set_default_budget(self) -> None:
        from petfall_audit.fixes import default_budget

        # 0 when nothing can be fixed: the last building's default would read as this one's
        amount = default_budget(self.options)
        self.budget.blockSignals(True)  # a default, not the user's choice
        self.budget.setValue(amount)
        self.budget.blockSignals(False)
        self._place_line()
        self._show_budget_note()

    def _place_line(self) -> None:
        value = float(self.budget.value())
        self.budget_line.blockSignals(True)
        self.budget_line.setValue(float(np.log10(max(value, 1.0))))
        self.budget_line.blockSignals(False)

    def _on_budget_changed(self, value: float) -> None:
        self._budget_set_by_user = True
        self._place_line()
        self._plan_timer.start()
        self._show_budget_note()
        if self._ctx.workspace.plan_settings.budget != float(value):
            from petfall_audit.editing.commands import SetPlanSettings
            from petfall_audit.model import PlanSettings

            assessor = self._ctx.assessor  # the falls the budget was chosen with
            self._ctx.push(SetPlanSettings(PlanSettings(
                budget=float(value), currency=self.currency,
                samples=assessor.samples, seed=assessor.seed)))

    def _on_line_moved(self, line: pg.InfiniteLine) -> None:
        value = float(10.0 ** float(line.value()))
        self.set_budget(float(np.round(value, -1 if value >= 100 else 0)))

    def _on_stale(self, stale: bool) -> None:
        if stale:
            self.summary.setText("Results are being recomputed; the plan follows…")

    # --- showing ----------------------------------------------------------------------------------

    def _on_plan(self, plan: Any) -> None:
        self.plan = plan
        self._ctx.plan = plan
        self.progress.hide()
        cur = plan.currency
        share = plan.risk_removed / plan.risk_before if plan.risk_before > 0 else 0.0
        if not self.options:
            self.summary.setText(
                "No fix to plan: the building has no openings yet." if not
                len(getattr(self._ctx.assessment, "openings", ())) else
                "No control in the catalogue lowers the risk of these openings.")
        else:
            self.summary.setText(
                f"{len(plan.actions)} fixes chosen for {fmt_money(plan.total_cost, cur)} of "
                f"{fmt_money(plan.budget, cur)}. Summed risk score {fmt_risk(plan.risk_before)} → "
                f"{fmt_risk(plan.risk_after)} ({fmt_percent(share)} less). Indicative costs; a "
                "fix needs the conditions listed and competent installers.")
        self.chosen.setRowCount(len(plan.actions))
        for row, o in enumerate(sorted(plan.actions, key=lambda o: -o.risk_removed)):
            cells = [o.opening_id, self._text(o.control_name), fmt_money(o.cost, cur),
                     fmt_risk(o.risk_before), fmt_risk(o.risk_after)]
            for col, text in enumerate(cells):
                item = QTableWidgetItem(text)
                item.setData(Qt.ItemDataRole.UserRole, o.opening_id)
                if col in (2, 3, 4):
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                item.setToolTip(self._text("\n".join([o.control_name, *o.conditions])))
                self.chosen.setItem(row, col, item)
        self.show_fix_status()
        self._fill_options()
        self._show_conditions()
        self._draw_curve()
        self.plan_ready.emit(plan)

    # --- fix tracking -----------------------------------------------------------------------------

    def show_fix_status(self) -> None:
        """The recorded status of each chosen fix in the last column."""
        from petfall_audit.fix_tracking import latest_records
        from petfall_audit.present.changes import fix_status_label
        from petfall_audit.present.numbers import fmt_date

        records = latest_records(self._ctx.workspace.document.building)
        actions = sorted(self.plan.actions, key=lambda o: -o.risk_removed) if self.plan else []
        for row, o in enumerate(actions):
            rec = records.get((o.opening_id, o.control_id))
            text = "Not recorded" if rec is None else fix_status_label(rec.status.value)
            if rec is not None and rec.date:
                text += f", {fmt_date(rec.date)}"
            item = QTableWidgetItem(text)
            item.setData(Qt.ItemDataRole.UserRole, o.opening_id)
            if rec is not None and rec.note:
                item.setToolTip(rec.note)
            self.chosen.setItem(row, 5, item)

    def selected_action(self) -> Any:
        """The plan's action of the selected row of chosen fixes, or ``None``."""
        rows = {i.row() for i in self.chosen.selectedItems()}
        if not rows or self.plan is None:
            return None
        actions = sorted(self.plan.actions, key=lambda o: -o.risk_removed)
        row = min(rows)
        return actions[row] if row < len(actions) else None

    def record_fix_status(self, status: str, *, date: str | None = None) -> str | None:
        """Record the selected chosen fix as ``status`` (dated today unless ``date``); the
        refusal reason or ``None``. Undo with Ctrl+Z."""
        import datetime as _dt

        from petfall_audit.editing.commands import RecordFixes, SetFixStatus

        when = _dt.date.today().isoformat() if date is None else date
        if status == "plan":
            if self.plan is None or not self.plan.actions:
                return "there is no plan to record"
            reason = self._ctx.push(RecordFixes(self.plan.actions, date=when))
        else:
            action = self.selected_action()
            if action is None:
                return "select a fix of the plan first"
            reason = self._ctx.push(SetFixStatus(action.opening_id, action.control_id, status,
                                                 date=when))
        self.show_fix_status()
        return reason

    def _on_curve(self, curve: tuple[np.ndarray, np.ndarray]) -> None:
        self.curve = curve
        if self.plan is not None or self._tasks.get("plan") is None:
            self.progress.hide()
        self._draw_curve()
        self.curve_ready.emit(curve)

    def _draw_curve(self) -> None:
        plot = self.curve_plot
        plot.clear()
        budgets, residual = self.curve if self.curve is not None else (np.empty(0), np.empty(0))
        keep = budgets > 0  # a log axis: "no budget" is the summary's "before"
        if not np.any(keep) or not self.options:
            self._draw_empty_curve()
            return
        self.empty_note = None
        for axis in ("left", "bottom"):
            plot.showAxis(axis)
        plot.enableAutoRange()
        plot.plot(budgets[keep], residual[keep], pen=pg.mkPen("#1B2C57", width=2),
                  symbol="o", symbolSize=5, symbolBrush="#1B2C57")
        self.budget_line.show()
        plot.addItem(self.budget_line)
        self._place_line()
        if self.plan is not None and self.plan.budget > 0:
            plot.plot([self.plan.budget], [self.plan.risk_after], pen=None, symbol="s",
                      symbolSize=11, symbolBrush="#D55E00", symbolPen="#1A1A1A")

    def _draw_empty_curve(self) -> None:
        """No curve (no openings, or none that a control helps): a plain frame that says so,
        not an axis around nothing."""
        plot = self.curve_plot
        plot.disableAutoRange()
        plot.setXRange(2.0, 5.0, padding=0.0)  # 100 to 100,000 (log axis)
        plot.setYRange(0.0, 1.0, padding=0.0)
        self.budget_line.hide()
        for axis in ("left", "bottom"):  # no numbers around nothing
            plot.hideAxis(axis)
        waiting = self.curve is None and self._ctx.assessment is None
        text = pg.TextItem("The curve appears\nwith the results." if waiting else
                           "Nothing to plan yet:\nthe curve appears once\nthe building has "
                           "openings\nthat a fix can make safer.",
                           color="#1A1A1A", anchor=(0.5, 0.5))
        text.setPos(3.5, 0.5)
        plot.addItem(text)
        self.empty_note = text

    def _on_selection(self, _ids: Any) -> None:
        self._fill_options()
        self._show_conditions()

    def _on_plan_row(self) -> None:
        items = self.chosen.selectedItems()
        if items:
            oid = items[0].data(Qt.ItemDataRole.UserRole)
            if oid and oid != self._ctx.selection.current:
                self._ctx.select([oid])

    def _fill_options(self) -> None:
        current = self._ctx.selection.current
        opts = self.options.get(current or "", [])
        chosen = {(o.opening_id, o.control_id) for o in (self.plan.actions if self.plan else ())}
        cur = self.currency
        if current is None:
            self.options_title.setText("Select an opening to see its options")
        elif not opts:
            self.options_title.setText(f"{current}: no control in the catalogue lowers its risk")
        else:
            self.options_title.setText(
                f"{current}: {len(opts)} options, risk score now {fmt_risk(opts[0].risk_before)}")
        self.options_table.setRowCount(len(opts))
        for row, o in enumerate(opts):
            in_plan = (o.opening_id, o.control_id) in chosen
            cells = [self._text(o.control_name), hierarchy_label(o.hierarchy),
                     fmt_money(o.cost, cur),
                     f"{fmt_risk(o.risk_after)} ({fmt_percent(o.share_removed)} less)",
                     "yes" if in_plan else ""]
            for col, text in enumerate(cells):
                item = QTableWidgetItem(text)
                item.setData(Qt.ItemDataRole.UserRole, o.control_id)
                item.setToolTip(self._text("\n".join(o.conditions) or o.control_name))
                if col in (2, 3):
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                self.options_table.setItem(row, col, item)
        if opts:
            self.options_table.selectRow(0)
        self._on_option_row()

    def _selected_option(self) -> Any:
        current = self._ctx.selection.current
        rows = self.options_table.selectionModel().selectedRows()
        if current is None or not rows:
            return None
        opts = self.options.get(current, [])
        row = rows[0].row()
        return opts[row] if 0 <= row < len(opts) else None

    def _on_option_row(self) -> None:
        option = self._selected_option()
        ok = option is not None and fit_command(self.catalogue, option) is not None
        self.fit_button.setEnabled(ok)
        if option is not None and not ok:
            self.fit_button.setToolTip("This control changes nothing recorded on the opening")
        self._show_conditions()

    def _text(self, text: str) -> str:
        """Catalogue text (written in metric) in the display units."""
        return units_in_text(text, self._ctx.units.system)

    def _show_conditions(self) -> None:
        parts: list[str] = []
        option = self._selected_option()
        if option is not None:
            control = self.catalogue.control(option.control_id)
            parts.append(f"<p><b>{html.escape(self._text(option.control_name))}</b> on "
                         f"{html.escape(option.opening_id)}: "
                         f"{html.escape(self._text(control.description))}</p>")
            parts.append("<ul>" + "".join(f"<li>{html.escape(self._text(c))}</li>"
                                          for c in option.conditions) + "</ul>")
        if self.plan is not None and self.plan.actions:
            by: dict[str, list[str]] = {}
            for o in self.plan.actions:
                for c in o.conditions:
                    by.setdefault(c, []).append(o.opening_id)
            items = "".join(
                f"<li>{html.escape(self._text(c))} <i>({fmt_count(len(ids), 'fix', 'fixes')})"
                "</i></li>" for c, ids in sorted(by.items(), key=lambda kv: -len(kv[1])))
            parts.append(f"<p><b>Conditions of the chosen fixes</b></p><ul>{items}</ul>")
        parts.append("<p><i>Never fit a fixed limiter or a permanent net on an emergency escape "
                     "window: the plan never offers one. Local building and fire codes and "
                     "licensed professionals take precedence.</i></p>")
        self.conditions.setHtml("".join(parts))
