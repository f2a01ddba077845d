"""Cat assumptions: how much the building's top risks move when one parameter of the cat
profile is set low and then high (the audit report's "How much the result depends on the cat").

The analysis simulates the top openings (and what lies below them) up to 14 more times, so it
runs in the background and only on full results (never on the quick ones shown while editing),
a short pause after they arrive and once the other views' background work is done; on a large
building it waits until the tab is shown. Bars in % of the top openings' summed risk.
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, QTimer
from PySide6.QtGui import QShowEvent
from PySide6.QtWidgets import (
    QFrame,
    QHBoxLayout,
    QLabel,
    QScrollArea,
    QSplitter,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.gui.views.common import (
    StaleLabel,
    Task,
    ViewContext,
    WhileHidden,
    run_task,
    wait_for_tasks,
)

__all__ = ["SensitivityView", "START_DELAY_MS", "EAGER_FALLS", "compute_sensitivity"]

#: Pause after full results before the analysis starts (ms): a burst of results starts one run.
START_DELAY_MS = 300
#: Openings × cats up to which the analysis runs while the tab is hidden; above, when shown.
EAGER_FALLS = 1_000_000
#: Bar fills as in the PDF chart: low value light, high value dark (Okabe-Ito blue).
LOW_FILL, HIGH_FILL, INK = "#C6DBEF", "#0072B2", "#1A1A1A"


def compute_sensitivity(assessment: Any, is_current: Any = None) -> Any:
    """The report's sensitivity section for ``assessment`` (run off the GUI thread); ``None``
    without openings or when ``is_current()`` is false before the work starts."""
    from petfall_audit.report.context import build_sensitivity_context

    if is_current is not None and not is_current():
        return None
    return build_sensitivity_context(assessment)


class SensitivityView(QWidget):
    """A tornado chart of the one-at-a-time swings, the sentence on the largest and the
    definition. ``section``: the shown :class:`~petfall_audit.report.context.SensitivityContext`
    (``None`` before the first); ``section_for``: the assessment it belongs to."""

    def __init__(self, context: ViewContext, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("sensitivity_view")
        self._ctx = context
        self.section: Any = None
        self.section_for: Any = None
        self.task: Task | None = None
        self._pending: Any = None
        self._generation = [0]
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(START_DELAY_MS)
        self._timer.timeout.connect(self._maybe_start)

        self.note = StaleLabel("The cat assumptions are tested once the full results are in.")
        self.note.setObjectName("sensitivity_note")
        self.plot = pg.PlotWidget(background="w")
        self.plot.setMenuEnabled(False)
        self.plot.setMouseEnabled(x=False, y=False)
        self.plot.hideButtons()
        self.plot.showGrid(x=True, y=False, alpha=0.25)
        self.plot.setMinimumHeight(120)
        for axis in ("left", "bottom"):
            self.plot.getAxis(axis).setTextPen(INK)
            self.plot.getAxis(axis).setPen("#606060")
        self.plot.setLabel("bottom", "change of the top openings' summed risk score (% of its "
                                     "value)", color=INK)
        legend = QHBoxLayout()
        legend.setContentsMargins(0, 0, 0, 0)
        for fill, text in ((LOW_FILL, "low value (10th percentile)"),
                           (HIGH_FILL, "high value (90th percentile)")):
            swatch = QLabel()
            swatch.setFixedSize(18, 10)
            swatch.setStyleSheet(f"background: {fill}; border: 1px solid {INK};")
            legend.addWidget(swatch)
            legend.addWidget(QLabel(text))
            legend.addSpacing(12)
        legend.addStretch(1)
        self.chart = QWidget()  # the legend and the plot, shown with the first analysis
        chart_layout = QVBoxLayout(self.chart)
        chart_layout.setContentsMargins(0, 0, 0, 0)
        chart_layout.addLayout(legend)
        chart_layout.addWidget(self.plot, 1)
        self.chart.hide()
        self.caption = QLabel()
        self.caption.setObjectName("sensitivity_caption")
        self.caption.setWordWrap(True)
        self.caption.setTextFormat(Qt.TextFormat.PlainText)
        self.caption.setAlignment(Qt.AlignmentFlag.AlignTop | Qt.AlignmentFlag.AlignLeft)
        self.caption.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        text_area = QScrollArea()
        text_area.setWidgetResizable(True)
        text_area.setFrameShape(QFrame.Shape.NoFrame)
        text_area.setWidget(self.caption)
        text_area.setMinimumWidth(220)
        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(self.chart)
        splitter.addWidget(text_area)
        splitter.setChildrenCollapsible(False)
        splitter.setStretchFactor(0, 3)
        splitter.setStretchFactor(1, 2)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addWidget(self.note)
        layout.addWidget(splitter, 1)

        self._hidden = WhileHidden(self)  # off screen: new results drawn when shown or idle
        self._hidden.follow(context.assessment_changed, self._on_assessment)
        self._hidden.follow(context.stale_changed, self._on_stale)
        if context.assessment is not None:
            self._on_assessment(context.assessment)

    # --- when to compute ---------------------------------------------------------------------

    def _is_final(self) -> bool:
        return self._ctx.results.is_final

    def _on_assessment(self, assessment: Any) -> None:
        self._generation[0] += 1  # any running analysis is for older results now
        if assessment is self.section_for:
            return
        if not self._is_final():
            self._pending = None
            self.note.setText("Quick results: the cat assumptions are tested once the full "
                              "results are in.")
            self._set_stale(True)
            return
        self._pending = assessment
        self._timer.start()

    def _on_stale(self, stale: bool) -> None:
        if stale:
            self._timer.stop()
            self._generation[0] += 1
            self._set_stale(True)

    def showEvent(self, event: QShowEvent) -> None:
        super().showEvent(event)
        if self._pending is not None and not self._timer.isActive():
            self._maybe_start()

    def _maybe_start(self) -> None:
        a = self._pending
        if a is None:
            return
        falls = len(getattr(a, "openings", ())) * int(getattr(a, "samples", 0))
        if falls > EAGER_FALLS and not self.isVisible():
            self.note.setText("The cat assumptions will be tested when this tab is shown.")
            return
        if not wait_for_tasks(0):  # the other views' work (the plan) goes first
            self._timer.start()
            return
        self._pending = None
        self._start(a)

    def _start(self, assessment: Any) -> None:
        if self.task is not None:
            self.task.cancel()
        self._generation[0] += 1
        gen, counter = self._generation[0], self._generation
        self.note.setText("Testing the cat assumptions: the highest-risk openings simulated "
                          "up to 14 more times…")
        self._set_stale(True)
        task = run_task(lambda: compute_sensitivity(assessment, lambda: counter[0] == gen),
                        parent=self)
        task.finished.connect(lambda section, a=assessment, g=gen: self._on_done(a, g, section))
        task.failed.connect(lambda message, g=gen: self._on_failed(g, message))
        self.task = task

    def _on_done(self, assessment: Any, gen: int, section: Any) -> None:
        if gen != self._generation[0]:
            return
        self.task = None
        self.section, self.section_for = section, assessment
        self._draw()

    def _on_failed(self, gen: int, message: str) -> None:
        if gen != self._generation[0] or message == "cancelled":
            return
        self.task = None
        self.note.setText(f"! The cat assumptions could not be tested: {message}")

    # --- drawing -------------------------------------------------------------------------------

    def _set_stale(self, stale: bool) -> None:
        self.note.set_stale(stale)
        self.plot.setEnabled(not stale)

    def _draw(self) -> None:
        self.plot.clear()
        s = self.section
        self._set_stale(False)
        self.chart.setVisible(s is not None)
        if s is None:
            self.note.setText("No openings: there is nothing to test the cat assumptions on.")
            self.caption.setText("")
            return
        fig = s.figure
        n = len(fig.parameters)
        y = np.arange(n, 0, -1, dtype=float)  # largest swing at the top
        lo, hi = np.asarray(fig.low_pct, float), np.asarray(fig.high_pct, float)
        half = 0.36
        low = pg.BarGraphItem(x0=np.minimum(lo, 0), width=np.abs(lo), y=y + half / 2,
                              height=half, brush=LOW_FILL, pen=pg.mkPen(INK, width=1))
        high = pg.BarGraphItem(x0=np.minimum(hi, 0), width=np.abs(hi), y=y - half / 2,
                               height=half, brush=HIGH_FILL, pen=pg.mkPen(INK, width=1))
        self.plot.addItem(low)
        self.plot.addItem(high)
        self.plot.addItem(pg.InfiniteLine(pos=0, angle=90, pen=pg.mkPen(INK, width=1.5)))
        span = max(fig.span_pct, 1.0)
        right = max(float(np.max(np.r_[lo, hi, 0.0])), 0.0)
        left = min(float(np.min(np.r_[lo, hi, 0.0])), 0.0)
        ticks = [(float(y[i]), f"{s.labels[i]} ({s.ranges[i]}): swing {s.values[i]}")
                 for i in range(n)]
        self.plot.getAxis("left").setTicks([ticks, []])
        self.plot.setXRange(left - 0.05 * span, right + 0.05 * span, padding=0)
        self.plot.setYRange(0.4, n + 0.6, padding=0)
        self.note.setText(s.lead)
        self.caption.setText(f"{s.caption}\n\n{s.definition}")
