"""Facade elevation: one facade seen from outside, drawn to scale.

Floors are bands; every opening is drawn at its position and size, filled with the colour of
its expected injury band and marked with the band's text mark (so a grey print still reads).
Openings whose net, pet-resistant screen or limiter holds the building's cats carry a
cross-hatch (the figure data's ``protected`` array, drawn the same on paper). Balconies show
their slab (they can catch a cat from above) and rail; the surfaces below are drawn at their
height and listed under the ground line. Hover shows an opening's numbers; a click selects it
in every view; the arrow keys move the selection, + and - zoom.
"""

from __future__ import annotations

import math
from typing import Any

from PySide6.QtCore import QRectF, Qt, Signal
from PySide6.QtGui import (
    QBrush,
    QColor,
    QFont,
    QFontMetricsF,
    QKeyEvent,
    QPainter,
    QPen,
    QResizeEvent,
    QTransform,
    QWheelEvent,
)
from PySide6.QtWidgets import (
    QComboBox,
    QGraphicsItem,
    QGraphicsLineItem,
    QGraphicsRectItem,
    QGraphicsScene,
    QGraphicsSceneHoverEvent,
    QGraphicsSceneMouseEvent,
    QGraphicsSimpleTextItem,
    QGraphicsView,
    QHBoxLayout,
    QLabel,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.figures import (
    SURFACE_FILLS,
    FacadeElevation,
    facade_context,
    facade_elevations,
)
from petfall_audit.gui.views.common import ViewContext, WhileHidden, band_qstyle
from petfall_audit.injury import BANDS
from petfall_audit.model import BALCONY_LIKE, CatProfile, Opening
from petfall_audit.present import (
    SPEED_TERMS,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    surface_kind_label,
)
from petfall_audit.present.explain import barrier_words
from petfall_audit.present.labels import landing_names

__all__ = ["FacadeView", "OpeningItem", "opening_tooltip", "legend_html", "SELECT_COLOUR"]

#: Outline of selected openings: a vermilion that stands out from the straw-to-navy bands.
SELECT_COLOUR = "#D55E00"
_FLOOR_FILLS = ("#FAFAF7", "#EFEFEA")
_MIN_STOREY_PX = 40.0  # zoom so that a storey is at least this tall on screen


def opening_tooltip(result: Any, opening: Opening | None, units: Any,
                    names: dict[str, str] | None = None, where: str | None = None,
                    profile: CatProfile | None = None) -> str:
    """Plain-text numbers of one opening for a tooltip or the hover line; ``names``: what to
    call the places a cat lands (:func:`petfall_audit.present.labels.landing_names`);
    ``where``: its floor and facade in words (default: level number and facade id); its
    barrier and whether it holds the cats of ``profile`` (default: the adult preset)."""
    lines = [
        f"{result.id} — {where or f'floor {result.floor}, {result.facade}'}",
        f"Expected injury: {BANDS[result.expected_band]} (rank {result.risk_rank} by risk "
        f"score, {result.rank} by band)",
        "Chance of each band: " + ", ".join(f"{k} {fmt_percent(v)}"
                                             for k, v in result.bands.items()),
        f"Likelihood of a fall: {fmt_one_in(result.one_in_n)} over 12 months",
        f"Drop (median): {units.fmt_length(result.drop_m.p50)}; impact speed "
        f"{units.fmt_speed(result.impact_speed_mps.p50)} (median), "
        f"{units.fmt_speed(result.impact_speed_mps.p5)} to "
        f"{units.fmt_speed(result.impact_speed_mps.p95)} (5th–95th percentile)",
        f"Risk score: {fmt_risk(result.risk)}",
    ]
    if result.landing:
        top = sorted(result.landing.items(), key=lambda kv: -kv[1])[:3]
        lines.append("Lands on: " + ", ".join(f"{(names or {}).get(k, k)} {fmt_percent(v)}"
                                               for k, v in top))
    if opening is not None:
        lines.append(f"Barrier against cats: {barrier_words(opening, profile, units.system)}")
    lines.append(SPEED_TERMS["impact_median"] + ".")
    return "\n".join(lines)


class _Text(QGraphicsSimpleTextItem):
    """Text that keeps its size on screen when the view zooms; ``anchor`` in (0..1, 0..1) of
    its own box (0.5, 0.5 = centred on its position)."""

    def __init__(self, text: str, colour: str = "#1A1A1A", *, anchor: tuple[float, float] = (0, 0),
                 bold: bool = False, parent: QGraphicsItem | None = None) -> None:
        super().__init__(text, parent)
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIgnoresTransformations, True)
        self.setBrush(QBrush(QColor(colour)))
        if bold:
            font = QFont(self.font())
            font.setBold(True)
            self.setFont(font)
        r = self.boundingRect()
        self.setTransform(QTransform.fromTranslate(-anchor[0] * r.width(),
                                                   -anchor[1] * r.height()))
        self.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.setAcceptHoverEvents(False)


def _pen(colour: str, width: float = 1.0, style: Qt.PenStyle = Qt.PenStyle.SolidLine) -> QPen:
    pen = QPen(QColor(colour), width, style)
    pen.setCosmetic(True)
    return pen


class OpeningItem(QGraphicsRectItem):
    """One opening on the elevation. ``band`` is its expected band (-1: no result); ``protected``
    (from the figure data's ``protected`` array) whether it is hatched as holding the cats."""

    def __init__(self, view: FacadeView, opening_id: str, rect: QRectF, band: int, mark: str,
                 palette: str, protected: bool, tooltip: str, mark_y: float | None = None
                 ) -> None:
        super().__init__(rect)
        self.view_ = view
        self.opening_id = opening_id
        self.band = band
        self.protected = protected
        self.selected_ = False
        style = band_qstyle(band, palette)
        self.setBrush(QBrush(QColor(style.fill)))
        self.setPen(_pen("#303030", 1.0))
        self.setToolTip(tooltip)
        self.tooltip_text = tooltip
        self.setAcceptHoverEvents(True)
        self.setZValue(10)
        self.overlay = QGraphicsRectItem(rect, self)
        self.overlay.setPen(QPen(Qt.PenStyle.NoPen))
        hatch = QColor(style.text)
        hatch.setAlpha(150)
        self.overlay.setBrush(QBrush(hatch, Qt.BrushStyle.DiagCrossPattern)
                              if protected else QBrush(Qt.BrushStyle.NoBrush))
        self.overlay.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
        self.mark_text = mark
        self.compact_mark = str(band + 1) if band >= 0 else mark
        self.mark = _Text(mark, style.text, anchor=(0.5, 0.5), bold=True, parent=self)
        self.mark_y = mark_y
        self.rail: QGraphicsLineItem | None = None
        self.mark.setPos(rect.center())

    def fit_mark(self, px_per_m: float) -> None:
        """Show the full mark if it fits the drawn width, else the band number; show the rail
        only when the opening is tall enough on screen to hold it and the mark."""
        tall = self.rect().height() * px_per_m >= 44
        if self.rail is not None:
            self.rail.setVisible(tall)
        y = self.mark_y if (tall and self.mark_y is not None) else self.rect().center().y()
        self.mark.setPos(self.rect().center().x(), y)
        full = self.mark.text() == self.mark_text
        text_px = QFontMetricsF(self.mark.font()).horizontalAdvance(self.mark_text)
        fits = text_px + 4 <= self.rect().width() * px_per_m
        if fits != full:
            self.mark.setText(self.mark_text if fits else self.compact_mark)
            r = self.mark.boundingRect()
            self.mark.setTransform(QTransform.fromTranslate(-0.5 * r.width(), -0.5 * r.height()))

    def fill_brush(self) -> QBrush:
        """The band fill (tests read it)."""
        return self.brush()

    def set_selected(self, selected: bool) -> None:
        self.selected_ = selected
        self.setPen(_pen(SELECT_COLOUR, 3.0) if selected else _pen("#303030", 1.0))
        self.setZValue(20 if selected else 10)

    def hoverEnterEvent(self, event: QGraphicsSceneHoverEvent) -> None:
        self.view_.hovered.emit(self.opening_id)
        super().hoverEnterEvent(event)

    def hoverLeaveEvent(self, event: QGraphicsSceneHoverEvent) -> None:
        self.view_.hovered.emit("")
        super().hoverLeaveEvent(event)

    def mousePressEvent(self, event: QGraphicsSceneMouseEvent) -> None:
        if event.button() == Qt.MouseButton.LeftButton:
            extend = bool(event.modifiers() & Qt.KeyboardModifier.ControlModifier)
            self.view_.click_opening(self.opening_id, extend=extend)
            event.accept()
            return
        super().mousePressEvent(event)


class _Canvas(QGraphicsView):
    """The zoomable view; forwards keys to the facade view."""

    def __init__(self, owner: FacadeView) -> None:
        super().__init__()
        self._owner = owner
        self.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        self.setDragMode(QGraphicsView.DragMode.ScrollHandDrag)
        self.setFocusPolicy(Qt.FocusPolicy.StrongFocus)
        self.setObjectName("facade_canvas")
        self.setBackgroundBrush(QBrush(QColor("#FFFFFF")))

    def keyPressEvent(self, event: QKeyEvent) -> None:
        if not self._owner.handle_key(event):
            super().keyPressEvent(event)

    def wheelEvent(self, event: QWheelEvent) -> None:
        if event.modifiers() & Qt.KeyboardModifier.ControlModifier:
            self._owner.zoom(1.25 if event.angleDelta().y() > 0 else 0.8)
            event.accept()
            return
        super().wheelEvent(event)

    def resizeEvent(self, event: QResizeEvent) -> None:
        super().resizeEvent(event)
        self._owner.fit_if_auto()


#: The facade view's info line when no opening is current.
HOVER_HINT = "Hover over an opening to see its numbers; click to select it."


def _unbroken(words: str) -> str:
    """``words`` that a line never breaks: non-breaking spaces and hyphens."""
    return words.replace(" ", "&nbsp;").replace("-", "\u2011")


def legend_html(palette: str) -> str:
    """The elevation's key (bands in ``palette``, barriers, slab, rail) as rich text: a line
    breaks between the keys or between the words of the barrier's key, never inside a band's
    key (a word joiner holds its marks together: Qt would break "+++" after its second "+")."""
    cells = []
    for b, name in enumerate(BANDS):
        s = band_qstyle(b, palette)
        mark = "\u2060".join(s.mark)
        cells.append(f"<span style='background:{s.fill}; color:{s.text};'>&nbsp;{mark}"
                     f"&nbsp;</span>&nbsp;{_unbroken(name)}&nbsp;({b + 1})")
    cells.append("▦&nbsp;net, pet screen or limiter that holds these cats")  # wraps as words
    cells.append("━&nbsp;balcony&nbsp;slab")
    cells.append("┄&nbsp;rail")
    return "&nbsp;&nbsp; ".join(cells)


class FacadeView(QWidget):
    """Elevation of one facade at a time; the facade is chosen in a list above it."""

    hovered = Signal(str)  # opening id, "" when the pointer leaves

    def __init__(self, context: ViewContext, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("facade_view")
        self._ctx = context
        self._elevations: dict[str, FacadeElevation] = {}
        self.items: dict[str, OpeningItem] = {}
        self._auto_fit = True
        self._facade_id: str | None = None

        self.facade_box = QComboBox()
        self.facade_box.setObjectName("facade_box")
        self.facade_box.setToolTip("Which facade to show")
        self.facade_box.setSizeAdjustPolicy(QComboBox.SizeAdjustPolicy.AdjustToContents)
        label = QLabel("Fa&cade:")
        label.setBuddy(self.facade_box)
        fit = QToolButton()
        fit.setText("Fit")
        fit.setToolTip("Fit the facade's width (a storey stays readable; scroll for the rest)")
        fit.clicked.connect(self._on_fit)
        zoom_in = QToolButton()
        zoom_in.setText("+")
        zoom_in.setToolTip("Zoom in (Ctrl+wheel, or + on the elevation)")
        zoom_in.clicked.connect(lambda: self.zoom(1.25))
        zoom_out = QToolButton()
        zoom_out.setText("−")
        zoom_out.setToolTip("Zoom out (Ctrl+wheel, or - on the elevation)")
        zoom_out.clicked.connect(lambda: self.zoom(0.8))
        self.legend = QLabel()
        self.legend.setObjectName("facade_legend")
        self.legend.setTextFormat(Qt.TextFormat.RichText)
        self.legend.setWordWrap(True)
        bar = QHBoxLayout()
        bar.setContentsMargins(0, 0, 0, 0)
        bar.addWidget(label)
        bar.addWidget(self.facade_box)
        bar.addWidget(fit)
        bar.addWidget(zoom_in)
        bar.addWidget(zoom_out)
        bar.addSpacing(12)
        bar.addWidget(self.legend, 1)
        bar.addStretch(0)  # takes the room when the key is hidden (the audits' comparison)

        self.scene = QGraphicsScene(self)
        self.canvas = _Canvas(self)
        self.canvas.setScene(self.scene)
        self.info = QLabel(HOVER_HINT)
        self.info.setObjectName("facade_info")
        self.info.setWordWrap(True)
        self.info.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addLayout(bar)
        layout.addWidget(self.canvas, 1)
        layout.addWidget(self.info)
        self.setFocusProxy(self.canvas)

        self.facade_box.currentIndexChanged.connect(self._on_facade_chosen)
        self.hovered.connect(self._on_hovered)
        self._hidden = WhileHidden(self)  # off screen: new results drawn when shown or idle
        self._hidden.follow(context.assessment_changed, self._on_assessment)
        self._hidden.follow(context.stale_changed, self._on_stale)
        context.selection.changed.connect(self._on_selection)
        context.options.changed.connect(self._on_options)
        self._update_legend()
        if context.assessment is not None:
            self._on_assessment(context.assessment)

    # --- public ----------------------------------------------------------------------------------

    @property
    def facade_id(self) -> str | None:
        return self._facade_id

    @property
    def elevation(self) -> FacadeElevation | None:
        """The figure data drawn now (the PDF elevation draws the same object)."""
        return self._elevations.get(self._facade_id or "")

    def set_facade(self, facade_id: str) -> None:
        i = self.facade_box.findData(facade_id)
        if i >= 0:
            self.facade_box.setCurrentIndex(i)

    def opening_item(self, opening_id: str) -> OpeningItem | None:
        return self.items.get(opening_id)

    def click_opening(self, opening_id: str, *, extend: bool = False) -> None:
        ids = list(self._ctx.selection.ids)
        if extend:
            ids = [i for i in ids if i != opening_id] if opening_id in ids else [*ids, opening_id]
        else:
            ids = [opening_id]
        self._ctx.select(ids)

    def zoom(self, factor: float) -> None:
        self._auto_fit = False
        self.canvas.scale(factor, factor)
        self._fit_marks()

    def _fit_marks(self) -> None:
        px_per_m = float(self.canvas.transform().m11())
        for item in self.items.values():
            item.fit_mark(px_per_m)

    def fit_if_auto(self) -> None:
        if self._auto_fit:
            self._fit()

    # --- building the scene -----------------------------------------------------------------------

    def _on_assessment(self, assessment: Any) -> None:
        self._elevations = {e.facade_id: e for e in facade_elevations(assessment)}
        keep = self._facade_id
        self.facade_box.blockSignals(True)
        self.facade_box.clear()
        for e in self._elevations.values():
            self.facade_box.addItem(e.label, e.facade_id)
        self.facade_box.blockSignals(False)
        index = self.facade_box.findData(keep) if keep else -1
        current = self._ctx.selection.current
        if index < 0 and current is not None:
            try:
                index = self.facade_box.findData(assessment.result(current).facade)
            except KeyError:
                index = -1
        self.facade_box.setCurrentIndex(max(index, 0))
        self._rebuild()

    def _on_facade_chosen(self, _index: int) -> None:
        new = self.facade_box.currentData()
        if new != self._facade_id:
            self._facade_id = new
            self._auto_fit = True
            self._rebuild()

    def _on_options(self) -> None:
        self._update_legend()
        self._rebuild()

    def _rebuild(self) -> None:
        self.scene.clear()
        self.items = {}
        a = self._ctx.assessment
        self._facade_id = self.facade_box.currentData()
        if a is None or self._facade_id not in self._elevations:
            note = self.scene.addText(
                "No openings to draw yet: add the facades, then the balconies and windows, in "
                "the editors above (or import a schedule, File ▸ Import).")
            note.setTextWidth(360)
            # at the scale and extent of the last drawing the note could lie out of view
            self.scene.setSceneRect(note.sceneBoundingRect())
            self.canvas.resetTransform()
            return
        e = self._elevations[self._facade_id]
        building = a.building
        openings = {o.id: o for o in building.openings}
        results = {o.id: o for o in a.openings}
        names = landing_names(building)
        floor_names = {f.level: f.label or f"Level {f.level}" for f in building.floors}
        palette = self._ctx.palette
        units = self._ctx.units
        width = e.length_m
        top = e.roof_m

        def y(z: float) -> float:
            return -z

        # floors as bands, labels at the left
        elev = e.floor_elevation_m.tolist()
        for i, (z0, lab, lv) in enumerate(zip(elev, e.floor_labels, e.floor_levels.tolist(),
                                              strict=True)):
            z1 = elev[i + 1] if i + 1 < len(elev) else top
            storey = QGraphicsRectItem(QRectF(0.0, y(z1), width, z1 - z0))
            storey.setBrush(QBrush(QColor(_FLOOR_FILLS[i % 2])))
            storey.setPen(_pen("#C8C8C0", 1.0))
            storey.setToolTip(f"{lab} (level {lv}), floor at {units.fmt_length(z0)}")
            self.scene.addItem(storey)
            text = _Text(f"L{lv}", "#404040", anchor=(1.05, 0.5))
            text.setPos(-0.2, y(0.5 * (z0 + z1)))
            text.setToolTip(lab)
            self.scene.addItem(text)
        # surfaces below, at their height
        ctx = facade_context(building, self._facade_id)
        ground = e.ground_m
        notes = []
        labelled: list[float] = []
        for s in e.surfaces:
            lo, hi = s.span_along_m(width)
            lo = -1.0 if s.x_from_m is None else lo  # a strip that runs on past both ends
            hi = width + 1.0 if s.x_to_m is None else hi
            strip = QGraphicsRectItem(QRectF(lo, y(s.elevation_m), hi - lo, 0.35))
            strip.setBrush(QBrush(QColor(SURFACE_FILLS.get(s.kind, "#9A9A9A")),
                                  Qt.BrushStyle.Dense4Pattern))
            strip.setPen(_pen("#505050", 1.0))
            extent = (f"{units.fmt_length(s.from_m)}–{units.fmt_length(s.to_m)} out"
                      if s.to_m is not None else f"beyond {units.fmt_length(s.from_m)}")
            if s.x_from_m is not None or s.x_to_m is not None:
                extent += (f", along the facade {units.fmt_length(lo if lo > 0 else 0.0)}–"
                           f"{units.fmt_length(min(hi, width))}")
            kind = surface_kind_label(s.kind)
            strip.setToolTip(f"{s.label} ({kind}), top at {units.fmt_length(s.elevation_m)}, "
                             f"{extent}")
            strip.setZValue(5)
            self.scene.addItem(strip)
            notes.append(f"{s.label} — {kind}, {extent}, at "
                         f"{units.fmt_length(s.elevation_m)}")
            if s.elevation_m > ground + 0.5:
                # labels of surfaces at about the same height stack upwards, never overlap
                row = sum(abs(z - s.elevation_m) < 1.0 for z in labelled)
                labelled.append(s.elevation_m)
                t = _Text(f"{s.label.split(':')[0]} ({kind})", "#303030",
                          anchor=(0.0, 1.1 * (row + 1)))
                t.setPos(width + 0.3, y(s.elevation_m))
                self.scene.addItem(t)
        below = _Text("Below this facade, nearest first:\n" + "\n".join(notes)
                      if notes else "Nothing recorded below this facade: the ground catches.",
                      "#303030", anchor=(0.0, -0.15))
        below.setPos(0.0, y(ground) + 0.35)
        self.scene.addItem(below)
        # balcony slabs (they catch cats from above) and rails
        for c in ctx.catching:
            slab = QGraphicsLineItem(c.x_m, y(c.slab_m), c.x_m + c.width_m, y(c.slab_m))
            slab.setPen(_pen("#202020", 3.0))
            slab.setZValue(15)
            slab.setToolTip(f"Balcony slab of {c.id}, {units.fmt_length(c.projection_m)} deep: "
                            "can catch a cat falling from above")
            self.scene.addItem(slab)
        # openings
        for i, oid in enumerate(e.opening_ids):
            x0, w = float(e.x_m[i]), float(e.width_m[i])
            z0, z1 = float(e.bottom_m[i]), float(e.top_m[i])
            band = int(e.band[i])
            style = band_qstyle(band, palette)
            opening = openings.get(oid)
            res = results.get(oid)
            where = f"{floor_names.get(res.floor, res.floor)}, {e.label}" if res else ""
            tip = (opening_tooltip(res, opening, units, names, where, building.cat_profile)
                   if res is not None else oid)
            g = float(e.guard_m[i])
            mark_y = y(0.5 * (g + z1)) if math.isfinite(g) else None  # above the rail
            item = OpeningItem(self, oid, QRectF(x0, y(z1), w, z1 - z0), band, style.mark,
                               palette, bool(e.protected[i]), tip, mark_y)
            self.scene.addItem(item)
            self.items[oid] = item
            if math.isfinite(g):
                rail = QGraphicsLineItem(x0, y(g), x0 + w, y(g), item)
                rail.setPen(_pen(style.text, 1.5, Qt.PenStyle.DashLine))
                rail.setAcceptedMouseButtons(Qt.MouseButton.NoButton)
                item.rail = rail
            if opening is not None and opening.kind not in BALCONY_LIKE and opening.escape_window:
                t = _Text("E", style.text, anchor=(0.0, 0.0), parent=item)
                t.setPos(x0 + 0.05, y(z1) + 0.05)
                t.setToolTip("Emergency escape window")
        title = _Text(f"{e.label} — {units.fmt_length(width)} long, seen from outside", "#1A1A1A",
                      anchor=(0.0, 1.3), bold=True)
        title.setPos(0.0, y(top))
        self.scene.addItem(title)
        margin = 0.08 * width + 2.0
        self.scene.setSceneRect(QRectF(-margin, y(top) - 0.12 * (top - ground) - 3.0,
                                       width + 2.5 * margin, (top - ground) * 1.2 + 9.0))
        self._show_selection(self._ctx.selection.ids)  # the chosen facade stays shown
        self._on_stale(self._ctx.stale)
        self.fit_if_auto()

    def _fit(self) -> None:
        e = self._elevations.get(self._facade_id or "")
        if e is None:
            return
        rect = self.scene.sceneRect()
        vw = max(self.canvas.viewport().width() - 8, 50)
        vh = max(self.canvas.viewport().height() - 8, 50)
        fit_w = vw / max(rect.width(), 1.0)
        fit_h = vh / max(rect.height(), 1.0)
        storeys = max(len(e.floor_levels), 1)
        storey_m = max((e.roof_m - float(e.floor_elevation_m.min(initial=0.0))) / storeys, 1.0)
        # the whole facade if a storey stays readable, else readable storeys and a scroll bar
        scale = min(fit_w, max(fit_h, _MIN_STOREY_PX / storey_m), 60.0)
        self.canvas.setTransform(QTransform.fromScale(scale, scale))
        self._fit_marks()
        # the selected opening, else the worst of this facade (a tall facade does not fit:
        # its ground floors are often bare), else the ground
        current = self._ctx.selection.current
        shown = current if current in self.items else self._worst_shown()
        if shown is not None:
            self.canvas.centerOn(self.items[shown])
        else:
            self.canvas.centerOn(0.5 * e.length_m, -e.ground_m)

    def _worst_shown(self) -> str | None:
        """The opening of the shown facade that comes first in the list's default order
        (``None`` if none)."""
        a = self._ctx.assessment
        if a is None or not self.items:
            return None
        return next((r.id for r in a.ranked() if r.id in self.items), None)

    def _on_fit(self) -> None:
        self._auto_fit = True
        self._fit()

    # --- selection, hover, keys -------------------------------------------------------------------

    def _on_selection(self, ids: Any) -> None:
        """A new selection: show the facade of its current opening."""
        current = self._ctx.selection.current
        a = self._ctx.assessment
        if current is not None and current not in self.items and a is not None:
            try:
                facade = a.result(current).facade
            except KeyError:
                facade = None
            if facade != self._facade_id and facade in self._elevations:
                self.set_facade(facade)  # rebuilds and selects
                return
        self._show_selection(ids)

    def _show_selection(self, ids: Any) -> None:
        """Mark the selected openings drawn on this facade."""
        chosen = set(ids)
        for oid, item in self.items.items():
            item.set_selected(oid in chosen)
        current = self._ctx.selection.current
        if current in self.items:
            self.canvas.ensureVisible(self.items[current], 20, 20)
            self.info.setText(self.items[current].tooltip_text.replace("\n", " · "))

    def _on_hovered(self, opening_id: str) -> None:
        item = self.items.get(opening_id)
        if item is not None:
            self.info.setText(item.tooltip_text.replace("\n", " · "))
        else:
            current = self._ctx.selection.current
            if current in self.items:
                self.info.setText(self.items[current].tooltip_text.replace("\n", " · "))

    def _on_stale(self, stale: bool) -> None:
        for item in self.items.values():
            item.setOpacity(0.45 if stale else 1.0)
        if stale:
            self.info.setText("Recomputing: the colours show the previous results…")
        else:  # final again: what the line says when nothing is recomputed
            self._show_info()

    def _show_info(self) -> None:
        """The current opening's numbers, or what to do."""
        current = self._ctx.selection.current
        if current in self.items:
            self.info.setText(self.items[current].tooltip_text.replace("\n", " · "))
        elif not self.items:
            self.info.setText("No openings on this facade yet: add balconies and windows on "
                              "the Openings tab above (Help ▸ How to audit a building).")
        else:
            self.info.setText(HOVER_HINT)

    def handle_key(self, event: QKeyEvent) -> bool:
        """Arrow keys move the selection to the nearest opening that way; +/- zoom."""
        key = event.key()
        if key in (Qt.Key.Key_Plus, Qt.Key.Key_Equal):
            self.zoom(1.25)
            return True
        if key == Qt.Key.Key_Minus:
            self.zoom(0.8)
            return True
        moves = {Qt.Key.Key_Left: (-1, 0), Qt.Key.Key_Right: (1, 0), Qt.Key.Key_Up: (0, -1),
                 Qt.Key.Key_Down: (0, 1)}
        if key not in moves or not self.items:
            return False
        current = self._ctx.selection.current
        if current not in self.items:
            worst = min(self.items, key=lambda i: (self._rank(i), i))
            self._ctx.select([worst])
            return True
        dx, dy = moves[Qt.Key(key)]
        here = self.items[current].rect().center()
        best: tuple[float, str] | None = None
        for oid, item in self.items.items():
            if oid == current:
                continue
            c = item.rect().center()
            ax, ay = c.x() - here.x(), c.y() - here.y()
            along = ax * dx + ay * dy
            if along <= 1e-6:
                continue
            across = abs(ax * dy) + abs(ay * dx)
            score = along + 3.0 * across
            if best is None or score < best[0]:
                best = (score, oid)
        if best is not None:
            self._ctx.select([best[1]])
        return True

    def _rank(self, opening_id: str) -> int:
        a = self._ctx.assessment
        try:
            return int(a.result(opening_id).rank)
        except (AttributeError, KeyError):
            return 10**9

    def _update_legend(self) -> None:
        self.legend.setText(legend_html(self._ctx.palette))
