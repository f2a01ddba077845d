"""Fall profile of the selected opening: height, speed and acceleration against time for each
posture path (the cat stays tense, or spreads out), the posture switch marked; and impact speed
against drop height with every opening of the building placed on the curve."""

from __future__ import annotations

from typing import Any

import numpy as np
import pyqtgraph as pg
from PySide6.QtCore import Qt
from PySide6.QtGui import QColor, QPen
from PySide6.QtWidgets import QHBoxLayout, QLabel, QSplitter, QVBoxLayout, QWidget

from petfall_audit.figures import ImpactCurve, PosturePath, impact_speed_curve, posture_paths
from petfall_audit.gui.views.common import ViewContext, WhileHidden, band_qstyle
from petfall_audit.present import SPEED_TERMS, fmt_percent, fmt_seconds

__all__ = ["ProfileView", "PATH_STYLES"]

#: Line style per posture path: colour (Okabe-Ito, colour-blind safe) and dash.
PATH_STYLES: dict[str, tuple[str, Qt.PenStyle]] = {
    "stays tense": ("#000000", Qt.PenStyle.SolidLine),
    "spreads out": ("#0072B2", Qt.PenStyle.DashLine),
}
_SWITCH_COLOUR = "#D55E00"
_GERUND = {"stays tense": "Staying tense", "spreads out": "Spreading out"}


def _pen(colour: str, width: float = 2.0, style: Qt.PenStyle = Qt.PenStyle.SolidLine) -> QPen:
    pen = QPen(pg.mkPen(QColor(colour), width=width))
    pen.setStyle(style)
    return pen


def _plot(title: str, y_label: str, x_label: str) -> pg.PlotWidget:
    w = pg.PlotWidget(background="w")
    w.setTitle(title, color="#1A1A1A", size="10pt")
    w.setLabel("left", y_label, color="#1A1A1A")
    w.setLabel("bottom", x_label, color="#1A1A1A")
    w.showGrid(x=True, y=True, alpha=0.25)
    w.setMenuEnabled(False)
    w.setMinimumHeight(90)
    for axis in ("left", "bottom"):
        w.getAxis(axis).setTextPen("#1A1A1A")
        w.getAxis(axis).setPen("#606060")
    return w


class ProfileView(QWidget):
    """Three time plots (left) and the impact-speed curve of the whole building (right)."""

    def __init__(self, context: ViewContext, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("profile_view")
        self._ctx = context
        self.paths: tuple[PosturePath, ...] = ()
        self.curve: ImpactCurve | None = None
        self.opening_id: str | None = None
        self.switch_lines: list[pg.InfiniteLine] = []

        self.caption = QLabel("Select an opening to see how a cat falls from it.")
        self.caption.setObjectName("profile_caption")
        self.caption.setWordWrap(True)
        self.height_plot = _plot("Height above landing", "height", "time (s)")
        self.speed_plot = _plot("Speed", "speed", "time (s)")
        self.accel_plot = _plot("Acceleration (downward)", "m/s²", "time (s)")
        self.speed_plot.setXLink(self.height_plot)
        self.accel_plot.setXLink(self.height_plot)
        left = QWidget()
        left_layout = QHBoxLayout(left)
        left_layout.setContentsMargins(0, 0, 0, 0)
        for p in (self.height_plot, self.speed_plot, self.accel_plot):
            left_layout.addWidget(p)
        self.curve_plot = _plot("Impact speed by drop; every opening marked", "speed",
                                "drop height")
        self.curve_plot.addLegend(offset=(-10, -10), labelTextColor="#1A1A1A",
                                  brush=pg.mkBrush(255, 255, 255, 220))
        self.speed_plot.addLegend(offset=(10, 10), labelTextColor="#1A1A1A",
                                  brush=pg.mkBrush(255, 255, 255, 220))
        self.scatter = pg.ScatterPlotItem(size=8, hoverable=True, tip=None)
        self.scatter.setZValue(10)
        self.scatter.sigClicked.connect(self._on_point_clicked)
        self.marker = pg.ScatterPlotItem(size=16, symbol="o", pen=pg.mkPen(_SWITCH_COLOUR, width=3),
                                         brush=pg.mkBrush(0, 0, 0, 0))
        self.marker.setZValue(20)
        self.marker_label = pg.TextItem(color="#1A1A1A", anchor=(0, 1.2), fill=pg.mkBrush(
            255, 255, 255, 220))
        self.marker_label.setZValue(21)
        splitter = QSplitter(Qt.Orientation.Horizontal)
        splitter.addWidget(left)
        splitter.addWidget(self.curve_plot)
        splitter.setChildrenCollapsible(False)
        splitter.setSizes([900, 450])
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(self.caption)
        layout.addWidget(splitter, 1)
        self.plots = splitter

        self._hidden = WhileHidden(self)  # off screen: new results drawn when shown or idle
        self._hidden.follow(context.assessment_changed, self._on_assessment)
        context.selection.changed.connect(self._on_selection)
        context.options.changed.connect(self._on_options)
        self._hidden.follow(context.stale_changed, self._on_stale)
        if context.assessment is not None:
            self._on_assessment(context.assessment)

    # --- handlers --------------------------------------------------------------------------------

    def _on_assessment(self, assessment: Any) -> None:
        self.plots.setVisible(bool(assessment.openings))  # no empty axes for no openings
        self.curve = impact_speed_curve(assessment) if assessment.openings else None
        self._draw_curve()
        self._on_selection(self._ctx.selection.ids)

    def _on_options(self) -> None:
        self._draw_curve()
        self._draw_paths()

    def _on_stale(self, stale: bool) -> None:
        for p in (self.height_plot, self.speed_plot, self.accel_plot, self.curve_plot):
            p.setEnabled(not stale)

    def _on_selection(self, ids: Any) -> None:
        a = self._ctx.assessment
        current = ids[0] if ids else None
        self.opening_id = None
        self.paths = ()
        if a is not None and current is not None:
            try:
                self.paths = posture_paths(a, current)
                self.opening_id = current
            except KeyError:
                pass
        self._draw_paths()
        self._draw_marker()

    def _on_point_clicked(self, _item: Any, points: Any, *_: Any) -> None:
        if self.curve is None or len(points) == 0:
            return
        index = int(points[0].data())
        self._ctx.select([self.curve.opening_ids[index]])

    # --- drawing ---------------------------------------------------------------------------------

    def _draw_paths(self) -> None:
        units = self._ctx.units
        for p in (self.height_plot, self.speed_plot, self.accel_plot):
            p.clear()
        self.switch_lines = []
        self.height_plot.setLabel("left", f"height ({units.length})")
        self.speed_plot.setLabel("left", f"speed ({units.speed})")
        self.accel_plot.setLabel("left", f"acceleration ({units.length}/s²)")
        if not self.paths or self.opening_id is None:
            a = self._ctx.assessment
            self.caption.setText(
                "No openings yet: add a balcony or window on the Openings tab and the fall "
                "from it is drawn here." if a is not None and not a.openings else
                "Select an opening (in the list, on a facade or on the curve) to see how a cat "
                "falls from it.")
            return
        a = self._ctx.assessment
        r = a.result(self.opening_id)
        for path in self.paths:
            colour, dash = PATH_STYLES.get(path.name, ("#555555", Qt.PenStyle.SolidLine))
            name = f"{path.name} ({fmt_percent(path.share)} of cats)"
            pen = _pen(colour, 2.0, dash)
            self.height_plot.plot(path.t_s, path.height_m / units.length_m, pen=pen)
            self.speed_plot.plot(path.t_s, path.speed_mps / units.speed_mps, pen=pen, name=name)
            self.accel_plot.plot(path.t_s, path.accel_mps2 / units.length_m, pen=pen)
            if path.switch_time_s is not None:
                for plot in (self.height_plot, self.speed_plot, self.accel_plot):
                    line = pg.InfiniteLine(
                        pos=path.switch_time_s, angle=90, movable=False,
                        pen=_pen(_SWITCH_COLOUR, 1.5, Qt.PenStyle.DotLine),
                        label="spreads out" if plot is self.speed_plot else None,
                        labelOpts={"position": 0.15, "color": _SWITCH_COLOUR,
                                   "fill": pg.mkBrush(255, 255, 255, 200)})
                    plot.addItem(line)
                    self.switch_lines.append(line)
        relaxing = [p for p in self.paths if p.switch_time_s is not None]
        switch = (f"A relaxing cat spreads out after {fmt_seconds(relaxing[0].switch_time_s)} "
                  "(dotted line)." if relaxing else "The drop is too short for a cat to spread out "
                  "before it lands." if len(self.paths) > 1
                  else "No cat in the profile spreads out.")
        speeds = "; ".join(f"{_GERUND.get(p.name, p.name)}, it lands at "
                           f"{units.fmt_speed(p.impact_speed_mps)} after "
                           f"{fmt_seconds(p.fall_time_s)}" for p in self.paths)
        speeds = speeds[:1] + speeds[1:].replace("; S", "; s")
        self.caption.setText(
            f"Opening {r.id}: a typical cat (the profile's median) falling the median drop of "
            f"{units.fmt_length(r.drop_m.p50)}. {speeds}. {switch} One typical fall, not the "
            f"range: across all simulated cats the median impact speed (the one the tables "
            f"show) is {units.fmt_speed(r.impact_speed_mps.p50)} and nine in ten land between "
            f"{units.fmt_speed(r.impact_speed_mps.p5)} and "
            f"{units.fmt_speed(r.impact_speed_mps.p95)}.")
        self.caption.setToolTip("\n".join(SPEED_TERMS[k] + "." for k in
                                          ("typical_fall", "impact_median", "impact_range")))

    def _draw_curve(self) -> None:
        units = self._ctx.units
        plot = self.curve_plot
        plot.clear()
        plot.setLabel("left", f"impact speed ({units.speed})")
        plot.setLabel("bottom", f"drop height ({units.length})")
        plot.setToolTip(SPEED_TERMS["curve"] + ".")
        c = self.curve
        if c is None:
            return
        x = c.drop_m / units.length_m
        tense_c, tense_d = PATH_STYLES["stays tense"]
        plot.plot(x, c.speed_tense_mps / units.speed_mps, pen=_pen(tense_c, 2.0, tense_d),
                  name="stays tense")
        if not np.allclose(c.speed_spread_mps, c.speed_tense_mps):
            col, dash = PATH_STYLES["spreads out"]
            plot.plot(x, c.speed_spread_mps / units.speed_mps, pen=_pen(col, 2.0, dash),
                      name="spreads out")
        palette = self._ctx.palette
        brushes = [pg.mkBrush(band_qstyle(int(b), palette).fill) for b in c.opening_band]
        symbols = ["o", "t", "s", "d"]
        self.scatter.setData(
            x=c.opening_drop_m / units.length_m, y=c.opening_speed_mps / units.speed_mps,
            brush=brushes, pen=pg.mkPen("#1A1A1A", width=1),
            symbol=[symbols[int(b)] if 0 <= b < 4 else "x" for b in c.opening_band],
            data=list(range(len(c.opening_ids))),
        )
        plot.addItem(self.scatter)
        plot.addItem(self.marker)
        plot.addItem(self.marker_label)
        self._draw_marker()

    def _draw_marker(self) -> None:
        c = self.curve
        if c is None or self.opening_id not in c.opening_ids:
            self.marker.setData([], [])
            self.marker_label.setText("")
            return
        units = self._ctx.units
        i = c.opening_ids.index(self.opening_id)
        x = float(c.opening_drop_m[i]) / units.length_m
        y = float(c.opening_speed_mps[i]) / units.speed_mps
        self.marker.setData([x], [y])
        self.marker_label.setText(f"{self.opening_id} (typical cat): "
                                  f"{units.fmt_speed(c.opening_speed_mps[i])}")
        x_max = float(np.nanmax(c.drop_m)) / units.length_m if len(c.drop_m) else x
        # right of the mark in the left half of the plot, left of it in the right half
        self.marker_label.setAnchor((0, 1.2) if x < 0.5 * x_max else (1, 1.2))
        self.marker_label.setPos(x, y)
