"""Floor comparison: per level, the expected injury and the yearly likelihood of a fall side by
side, for two facades of this building or for this audit and an earlier one (a second building
file, assessed with the same number of simulated cats and the same seed)."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt, Signal
from PySide6.QtGui import QBrush, QColor
from PySide6.QtWidgets import (
    QComboBox,
    QFileDialog,
    QHBoxLayout,
    QLabel,
    QPushButton,
    QScrollArea,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.figures import LevelSummary, align_levels, level_summary
from petfall_audit.gui.views.common import (
    Task,
    ViewContext,
    WhileHidden,
    band_qstyle,
    load_earlier_building,
    run_task,
)
from petfall_audit.injury import BANDS
from petfall_audit.present import fmt_one_in

__all__ = ["FloorsView", "EarlierAudit"]

_BAR = 0.38  # bar thickness in level rows
_ROW_PX = 24  # screen height of one level row
_LIK_A, _LIK_B = "#1B2C57", "#7A7A7A"


class EarlierAudit:
    """Asks for an earlier building file (replace ``open_path`` in tests)."""

    def open_path(self, parent: QWidget) -> Path | None:
        name, _ = QFileDialog.getOpenFileName(parent, "Open an earlier audit to compare",
                                              "", "Building files (*.json);;All files (*)")
        return Path(name) if name else None


def _levels_axis(plot: pg.PlotItem, s: LevelSummary) -> None:
    ticks = [(float(i), f"{lab}") for i, lab in enumerate(s.labels)]
    plot.getAxis("left").setTicks([ticks])


def _plot(title: str) -> pg.PlotWidget:
    w = pg.PlotWidget(background="w")
    w.setTitle(title, color="#1A1A1A", size="10pt")
    w.setMenuEnabled(False)
    w.setMouseEnabled(x=False, y=False)
    w.hideButtons()
    w.showGrid(x=True, y=False, alpha=0.25)
    for axis in ("left", "bottom"):
        w.getAxis(axis).setTextPen("#1A1A1A")
        w.getAxis(axis).setPen("#606060")
    return w


class FloorsView(QWidget):
    """Two charts per level row: worst expected injury band, and yearly fall likelihood."""

    earlier_ready = Signal(object)  # the earlier assessment
    drawn = Signal()

    def __init__(self, context: ViewContext, *, prompts: EarlierAudit | None = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("floors_view")
        self._ctx = context
        self.prompts = prompts or EarlierAudit()
        self.earlier: Any = None
        self.earlier_path: Path | None = None
        self._task: Task | None = None
        self.series: tuple[LevelSummary, LevelSummary] | None = None

        self.mode_box = QComboBox()
        self.mode_box.setObjectName("compare_mode")
        self.mode_box.addItem("Two facades of this building", "facades")
        self.mode_box.addItem("This audit with an earlier one", "audits")
        self.a_box = QComboBox()
        self.a_box.setObjectName("compare_a")
        self.b_box = QComboBox()
        self.b_box.setObjectName("compare_b")
        for box in (self.a_box, self.b_box):
            box.setSizeAdjustPolicy(QComboBox.SizeAdjustPolicy.AdjustToContents)
        self.a_label = QLabel("&A (solid):")
        self.a_label.setBuddy(self.a_box)
        self.b_label = QLabel("&B (hatched):")
        self.b_label.setBuddy(self.b_box)
        self.open_button = QPushButton("Open earlier audit…")
        self.open_button.setObjectName("open_earlier")
        self.open_button.clicked.connect(self.open_earlier)
        self.note = QLabel()
        self.note.setWordWrap(True)
        mode_label = QLabel("Co&mpare:")
        mode_label.setBuddy(self.mode_box)
        bar = QHBoxLayout()
        bar.setContentsMargins(0, 0, 0, 0)
        bar.addWidget(mode_label)
        bar.addWidget(self.mode_box)
        bar.addWidget(self.a_label)
        bar.addWidget(self.a_box)
        bar.addWidget(self.b_label)
        bar.addWidget(self.b_box)
        bar.addWidget(self.open_button)
        bar.addStretch(1)

        self.band_plot = _plot("Expected injury (worst band on the level)")
        self.lik_plot = _plot("Likelihood of a fall over 12 months (sum of the level's openings)")
        self.lik_plot.setYLink(self.band_plot)
        self.lik_plot.getAxis("left").setStyle(showValues=False)
        self.lik_plot.setLabel("bottom", "expected falls per year (each bar says it as 1 in N)",
                               color="#1A1A1A")
        for p in (self.band_plot, self.lik_plot):  # the scale stays in sight when scrolled
            p.showAxis("top")
            p.getAxis("top").setTextPen("#1A1A1A")
            p.getAxis("top").setPen("#606060")
        charts = QWidget()
        charts_layout = QHBoxLayout(charts)
        charts_layout.setContentsMargins(0, 0, 0, 0)
        charts_layout.addWidget(self.band_plot, 1)
        charts_layout.addWidget(self.lik_plot, 1)
        self.charts = charts
        self.scroll_area = QScrollArea()
        self.scroll_area.setWidgetResizable(True)
        self.scroll_area.setWidget(charts)
        self.scroll_area.setFrameShape(QScrollArea.Shape.NoFrame)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addLayout(bar)
        layout.addWidget(self.note)
        layout.addWidget(self.scroll_area, 1)

        self.mode_box.currentIndexChanged.connect(self._on_mode_changed)
        self.a_box.currentIndexChanged.connect(self._on_choice_changed)
        self.b_box.currentIndexChanged.connect(self._on_choice_changed)
        self._hidden = WhileHidden(self)  # off screen: new results drawn when shown or idle
        self._hidden.follow(context.assessment_changed, self._on_assessment)
        context.options.changed.connect(self.redraw)
        self._on_mode_changed(0)
        if context.assessment is not None:
            self._on_assessment(context.assessment)

    # --- public ----------------------------------------------------------------------------------

    @property
    def mode(self) -> str:
        return str(self.mode_box.currentData())

    def set_mode(self, mode: str) -> None:
        self.mode_box.setCurrentIndex(max(self.mode_box.findData(mode), 0))

    def open_earlier(self, path: Path | None = None) -> Task | None:
        """Load and assess an earlier building file off the GUI thread (the seed and the full
        count of simulated falls of this audit's results); ``earlier_ready`` when done."""
        loaded = load_earlier_building(self.prompts, self, path)
        if loaded is None:
            return None
        if isinstance(loaded, str):
            self.note.setText(f"! {loaded}")
            return None
        building, path = loaded
        assessor = self._ctx.assessor
        assess_fn, seed, samples = assessor.assess, assessor.seed, assessor.samples
        self.note.setText(f"Assessing {Path(path).name}…")
        if self._task is not None:
            self._task.cancel()
        self._task = run_task(lambda: assess_fn(building, samples=samples, seed=seed),
                              parent=self)
        self.earlier_path = Path(path)
        self._task.finished.connect(self._on_earlier)
        self._task.failed.connect(lambda m: self.note.setText(f"! Earlier audit failed: {m}"))
        return self._task

    # --- handlers --------------------------------------------------------------------------------

    def _on_earlier(self, assessment: Any) -> None:
        self.earlier = assessment
        self.set_mode("audits")
        self._fill_choices()
        self.redraw()
        self.earlier_ready.emit(assessment)

    def _on_assessment(self, _assessment: Any) -> None:
        self._fill_choices()
        self.redraw()

    def _on_mode_changed(self, _index: int) -> None:
        audits = self.mode == "audits"
        self.a_label.setText("Fa&cade:" if audits else "&A (solid):")
        self.b_label.setVisible(not audits)
        self.b_box.setVisible(not audits)
        self.open_button.setVisible(audits)
        self._fill_choices(reset=True)
        self.redraw()

    def _on_choice_changed(self, _index: int) -> None:
        self.redraw()

    def _fill_choices(self, *, reset: bool = False) -> None:
        a = self._ctx.assessment
        facades = [] if a is None else [(f.label or f.id, f.id) for f in a.building.facades
                                         if any(o.facade == f.id for o in a.building.openings)]
        audits = self.mode == "audits"
        for box, default in ((self.a_box, 0), (self.b_box, 1)):
            keep = None if reset else box.currentData()
            box.blockSignals(True)
            box.clear()
            if audits and box is self.a_box:
                box.addItem("All facades", None)
            for text, fid in facades:
                box.addItem(text, fid)
            i = box.findData(keep)
            box.setCurrentIndex(i if i >= 0 else min(default if not audits else 0,
                                                     box.count() - 1))
            box.blockSignals(False)

    # --- drawing ---------------------------------------------------------------------------------

    def _series(self) -> tuple[LevelSummary, LevelSummary] | None:
        a = self._ctx.assessment
        if a is None:
            return None
        if self.mode == "audits":
            facade = self.a_box.currentData()
            where = "" if facade is None else f", {facade}"
            this = level_summary(a, facade, title=f"this audit{where}")
            if self.earlier is None:
                self.note.setText("Open an earlier building file to compare it with this audit "
                                  "(it is assessed with the same simulated cats).")
                return this, level_summary(a, "\0none", title="(no earlier audit)")
            from petfall_audit.compare import audit_doubts
            from petfall_audit.present.comparison import doubt_words

            name = self.earlier_path.name if self.earlier_path else "earlier audit"
            earlier = level_summary(self.earlier, facade, title=f"{name}{where}")
            before, now = self.earlier.building, a.building
            doubt = doubt_words(audit_doubts(before, now), before.info, now.info)
            self.note.setText(f"A (solid) = this audit; B (hatched) = {name}, assessed with "
                              f"{self.earlier.samples} simulated cats per opening, seed "
                              f"{self.earlier.seed}. Levels are matched by number."
                              + (f" {doubt}" if doubt else ""))
            return align_levels(this, earlier)
        fa, fb = self.a_box.currentData(), self.b_box.currentData()
        if fa is None or fb is None:
            self.note.setText("This building has only one facade with openings.")
            s = level_summary(a, fa)
            return s, level_summary(a, "\0none", title="—")
        self.note.setText(f"A (solid) = {self.a_box.currentText()}; B (hatched) = "
                          f"{self.b_box.currentText()}. A level without openings on a facade "
                          "has no bar.")
        return align_levels(level_summary(a, fa, title=self.a_box.currentText()),
                            level_summary(a, fb, title=self.b_box.currentText()))

    def _bands_text(self) -> str:
        return "Bands: " + " · ".join(f"{band_qstyle(i, self._ctx.palette).mark} {n}"
                                      for i, n in enumerate(BANDS)) + "."

    def redraw(self) -> None:
        self.band_plot.clear()
        self.lik_plot.clear()
        self.series = self._series()
        a = self._ctx.assessment
        empty = a is not None and not a.building.openings
        self.charts.setVisible(not empty)  # no axes around nothing
        if empty:
            self.note.setText("No openings yet: the floors are compared once the building has "
                              "balconies or windows (Openings tab above).")
        if self.series is None or empty:
            return
        sa, sb = self.series
        n = len(sa.levels)
        palette = self._ctx.palette
        self.charts.setMinimumHeight(max(160, n * _ROW_PX + 90))
        y = np.arange(n, dtype=float)
        for s, offset, pattern in ((sa, +0.2, None), (sb, -0.2, Qt.BrushStyle.Dense4Pattern)):
            has = s.worst_band >= 0
            if np.any(has):
                brushes = []
                for b in s.worst_band[has]:
                    style = band_qstyle(int(b), palette)
                    brushes.append(QBrush(QColor(style.fill)) if pattern is None
                                   else QBrush(QColor(style.fill) if b >= 2
                                               else QColor(style.fill).darker(170), pattern))
                bars = pg.BarGraphItem(x0=np.zeros(int(has.sum())), y=y[has] + offset,
                                       height=_BAR, width=s.worst_band[has] + 1.0,
                                       brushes=brushes, pen=pg.mkPen("#303030", width=1.5))
                self.band_plot.addItem(bars)
                for yy, b in zip(y[has], s.worst_band[has], strict=True):
                    style = band_qstyle(int(b), palette)
                    t = pg.TextItem(style.mark, color="#1A1A1A", anchor=(0, 0.5))
                    t.setPos(float(b) + 1.05, float(yy) + offset)
                    self.band_plot.addItem(t)
            lik_brush = (QBrush(QColor(_LIK_A)) if pattern is None
                         else QBrush(QColor(_LIK_B), pattern))
            bars = pg.BarGraphItem(x0=np.zeros(n), y=y + offset, height=_BAR,
                                   width=s.falls_per_year, brush=lik_brush,
                                   pen=pg.mkPen("#303030"))
            self.lik_plot.addItem(bars)
            for yy, rate in zip(y, s.falls_per_year, strict=True):
                if rate > 0:  # the one likelihood scale of the app: "1 in N"
                    t = pg.TextItem(fmt_one_in(1.0 / float(rate)), color="#1A1A1A",
                                    anchor=(0, 0.5))
                    t.setPos(float(rate), float(yy) + offset)
                    self.lik_plot.addItem(t)
        _levels_axis(self.band_plot.getPlotItem(), sa)
        self.band_plot.setXRange(0, 4.9, padding=0)
        self.band_plot.setYRange(-0.6, n - 0.4, padding=0)
        top = float(max(sa.falls_per_year.max(initial=0.0), sb.falls_per_year.max(initial=0.0)))
        self.lik_plot.setXRange(0, max(top * 1.5, 1e-3), padding=0)  # room for "1 in N"
        self.note.setText(f"{self.note.text()} {self._bands_text()}")
        ticks = [[(i + 1.0, band_qstyle(i, palette).mark) for i in range(len(BANDS))]]
        self.band_plot.getAxis("bottom").setTicks(ticks)
        self.band_plot.getAxis("top").setTicks(ticks)
        self.drawn.emit()
