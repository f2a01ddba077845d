"""Vector charts (reportlab.graphics) drawn from :mod:`petfall_audit.figures` data.

Every band fill is paired with its text mark so a grey printout still reads. Sizes in points.
"""

from __future__ import annotations

import dataclasses
import math
import statistics

import numpy as np
from reportlab.graphics.shapes import Drawing, Group, Line, PolyLine, Rect, String
from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth

from petfall_audit.figures import (
    SURFACE_FILLS,
    FacadeElevation,
    FallProfileFigure,
    FloorComparison,
    SensitivityFigure,
)
from petfall_audit.palette import band_style, band_styles, rgb
from petfall_audit.present import (
    budget_axis_label,
    fmt_change_pct,
    fmt_money,
    fmt_risk,
    fmt_speed,
    fmt_tick,
)
from petfall_audit.report.fonts import fonts, plain
from petfall_audit.report.styles import INK, MUTED, RULE

__all__ = [
    "facade_drawing",
    "facade_scales",
    "hatch_segments",
    "floor_chart",
    "fall_profile_drawing",
    "sensitivity_drawing",
    "SENSITIVITY_LOW_FILL",
    "SENSITIVITY_HIGH_FILL",
    "band_legend",
    "budget_curve_drawing",
    "budget_log_span",
    "building_bars_drawing",
    "colour",
    "fit_label",
    "label_column_width",
]


def colour(hex_colour: str) -> colors.Color:
    """``#RRGGBB`` as a reportlab colour."""
    return colors.Color(*rgb(hex_colour))


def _nice_step(span: float, target: int = 5) -> float:
    if span <= 0 or not math.isfinite(span):
        return 1.0
    raw = span / target
    mag = float(10.0 ** math.floor(math.log10(raw)))
    for m in (1, 2, 2.5, 5, 10):
        if raw <= m * mag:
            return m * mag
    return 10 * mag


def _text(x: float, y: float, text: str, size: float = 7, *, anchor: str = "start",
          colour_: colors.Color = INK, bold: bool = False) -> String:
    f = fonts()
    return String(x, y, plain(text), fontName=f.bold if bold else f.regular, fontSize=size,
                  fillColor=colour_, textAnchor=anchor)


def _width(text: str, size: float) -> float:
    return float(stringWidth(plain(text), fonts().regular, size))


def fit_label(label: str, level: int, max_width: float, size: float) -> str:
    """``label`` as drawn at ``size`` pt in at most ``max_width`` pt: whole if it fits, else with
    its parenthesised note shortened ("Level 31 (pent…)") or dropped ("Level 31"); a label
    without its level number may be cut short ("Raised gro…"); last the level number alone
    ("L31"). A label that shows its level number never loses it."""
    text = plain(label)
    if _width(text, size) <= max_width:
        return text
    head, sep, note = text.partition(" (")
    note = note.rstrip(")")
    candidates = [f"{head} ({note[:k]}…)" for k in range(len(note) - 1, 2, -1)] if sep else []
    candidates.append(head)
    if str(level) not in text:  # no number to lose: cut the words short
        candidates += [f"{text[:k].rstrip()}…" for k in range(len(text) - 1, 3, -1)]
    candidates += [f"Level {level}", f"L{level}"]
    for c in candidates:
        if _width(c, size) <= max_width and (str(level) in c or str(level) not in text):
            return c
    return f"L{level}"


def label_column_width(labels: tuple[str, ...], size: float, *, gap: float,
                       max_width: float) -> float:
    """Width (pt) of a label column: the widest label at ``size`` pt plus ``gap``, at most
    ``max_width`` (longer labels are then shortened by :func:`fit_label`)."""
    widest = max((_width(t, size) for t in labels), default=0.0)
    return min(widest + gap, max_width)


def band_legend(band_names: tuple[str, ...], width: float, palette: str = "standard") -> Drawing:
    """One row: a swatch with its mark and the band name for every band."""
    d = Drawing(width, 16)
    cell = width / max(len(band_names), 1)
    for i, name in enumerate(band_names):
        st = band_style(i, palette)
        x = i * cell
        d.add(Rect(x, 2, 22, 12, fillColor=colour(st.fill), strokeColor=INK, strokeWidth=0.4))
        d.add(_text(x + 11, 5, st.mark, 6.5, anchor="middle", colour_=colour(st.text), bold=True))
        d.add(_text(x + 26, 5, name, 7.5))
    return d


_FACADE_PAD = 6.0
_LABEL_PT = 6.0  # floor labels on elevations and the floor chart
_LABEL_GAP = 8.0  # between a floor label and the drawing
_LABEL_SHARE = 0.3  # floor labels take at most this share of the drawing's width


def _facade_label_w(elev: FacadeElevation, width: float) -> float:
    return label_column_width(elev.floor_labels, _LABEL_PT, gap=_LABEL_GAP,
                              max_width=_LABEL_SHARE * width)


def _facade_span(elev: FacadeElevation) -> tuple[float, float]:
    span_x = max(elev.length_m, float(np.max(elev.x_m + elev.width_m, initial=0.0)), 1.0)
    return span_x, max(elev.roof_m - elev.ground_m, 1.0)


def facade_scales(elev: FacadeElevation, width: float, max_height: float) -> tuple[float, float]:
    """Vertical and horizontal scale (pt per m) of an elevation. At most 20 pt/m, so a small
    building is not blown up; a tall, narrow facade is stretched sideways up to 4× so its
    openings stay legible (the caption says so)."""
    span_x, span_y = _facade_span(elev)
    fit_x = (width - _facade_label_w(elev, width) - _FACADE_PAD) / span_x
    sy = min(fit_x, (max_height - 2 * _FACADE_PAD) / span_y, 20.0)
    sx = max(min(fit_x, 4.0 * sy), sy) if sy < 20.0 else sy
    return sy, sx


def facade_drawing(elev: FacadeElevation, width: float, max_height: float,
                   palette: str = "standard", label_ranks_upto: int = 10) -> Drawing:
    """Elevation of one facade: floors, every opening filled and marked by its band; the worst
    ``label_ranks_upto`` openings carry their rank number; openings whose barrier holds the cats
    (``elev.protected``) are cross-hatched, as on screen. Each opening is one group (its
    rectangle first), in the order of ``elev.opening_ids``, after the floors and surfaces."""
    label_w, pad = _facade_label_w(elev, width), _FACADE_PAD
    span_x, span_y = _facade_span(elev)
    scale, sx = facade_scales(elev, width, max_height)
    h = span_y * scale + 2 * pad
    d = Drawing(width, h)

    def x_of(xm: float) -> float:
        return label_w + xm * sx

    def y_of(ym: float) -> float:
        return pad + (ym - elev.ground_m) * scale

    # building outline and ground
    d.add(Rect(x_of(0), y_of(float(elev.floor_elevation_m.min(initial=elev.ground_m))),
               elev.length_m * sx,
               y_of(elev.roof_m) - y_of(float(elev.floor_elevation_m.min(initial=elev.ground_m))),
               fillColor=colors.white, strokeColor=INK, strokeWidth=0.8))
    d.add(Line(label_w - 4, y_of(elev.ground_m), x_of(span_x) + 4, y_of(elev.ground_m),
               strokeColor=INK, strokeWidth=1.2))
    # what lies below, at its height and where it lies along the facade (a podium under part
    # of the facade is drawn only there); nearest the facade drawn last, on top
    for surf in reversed(elev.surfaces):
        lo, hi = surf.span_along_m(elev.length_m)
        if hi <= lo:
            continue
        fill = colors.HexColor(SURFACE_FILLS.get(surf.kind, "#9A9A9A"))
        d.add(Rect(x_of(lo), y_of(surf.elevation_m) - 1.2, (hi - lo) * sx, 2.4,
                   fillColor=fill, strokeColor=INK, strokeWidth=0.3))
    # floor lines and labels, thinned so labels never overlap
    # (statistics.median: numpy's median imports numpy.ma, ~5 ms of a batch worker's first PDF)
    spacing_m = (statistics.median(np.diff(elev.floor_elevation_m).tolist())
                 if elev.floor_elevation_m.size > 1 else None)
    every = max(1, math.ceil(9.0 / max(scale * spacing_m if spacing_m is not None else 9.0,
                                       1e-6)))
    rows = zip(elev.floor_levels.tolist(), elev.floor_labels, elev.floor_elevation_m, strict=True)
    for i, (level, lab, ym) in enumerate(rows):
        d.add(Line(x_of(0), y_of(ym), x_of(elev.length_m), y_of(ym), strokeColor=RULE,
                   strokeWidth=0.3))
        if i % every == 0:
            text = fit_label(lab, level, label_w - _LABEL_GAP, _LABEL_PT)
            d.add(_text(label_w - 6, y_of(ym) + 1, text, _LABEL_PT, anchor="end",
                        colour_=MUTED))
    # openings
    styles = band_styles(palette)
    none = band_style(None, palette)
    for i in range(len(elev.opening_ids)):
        b = int(elev.band[i])
        st = styles[b] if 0 <= b < len(styles) else none
        x0, y0 = x_of(float(elev.x_m[i])), y_of(float(elev.bottom_m[i]))
        w = float(elev.width_m[i]) * sx
        hh = (float(elev.top_m[i]) - float(elev.bottom_m[i])) * scale
        item = Group(Rect(x0, y0, w, hh, fillColor=colour(st.fill), strokeColor=INK,
                          strokeWidth=0.35))
        if bool(elev.protected[i]):  # a barrier that holds the cats: cross-hatch, as on screen
            ink = colour(st.text)
            hatch = colors.Color(ink.red, ink.green, ink.blue, alpha=0.6)
            for (xa, ya), (xb, yb) in hatch_segments(x0, y0, w, hh, _HATCH_STEP_PT):
                item.add(Line(xa, ya, xb, yb, strokeColor=hatch, strokeWidth=0.3))
        g = float(elev.guard_m[i])
        if math.isfinite(g):  # balcony rail
            item.add(Line(x0 - 1, y_of(g), x0 + w + 1, y_of(g), strokeColor=INK,
                          strokeWidth=0.9))
        rank = int(elev.rank[i])
        text = st.mark
        if 0 < rank <= label_ranks_upto:
            text = f"{st.mark} #{rank}"
        size = min(6.5, hh * 0.7, w / max(len(text), 1) * 1.6)
        if size >= 3.0:
            item.add(_text(x0 + w / 2, y0 + hh / 2 - size * 0.35, text, size, anchor="middle",
                           colour_=colour(st.text), bold=True))
        d.add(item)
    return d


_HATCH_STEP_PT = 3.0  # spacing of the cross-hatch on a protected opening


def hatch_segments(x0: float, y0: float, w: float, h: float, step: float
                   ) -> list[tuple[tuple[float, float], tuple[float, float]]]:
    """Cross-hatch of the rectangle ``x0, y0, w, h`` (pt): both diagonals every ``step`` pt,
    each segment clipped to the rectangle."""
    out: list[tuple[tuple[float, float], tuple[float, float]]] = []
    if w <= 0 or h <= 0 or step <= 0:
        return out
    n = int(math.ceil((w + h) / step))
    for k in range(1, n):
        c = k * step  # rising lines: x - x0 + (y - y0) = c; falling: x - x0 = c - (y1 - y)
        lo_x, hi_x = max(0.0, c - h), min(w, c)
        if hi_x <= lo_x:
            continue
        out.append(((x0 + lo_x, y0 + c - lo_x), (x0 + hi_x, y0 + c - hi_x)))
        out.append(((x0 + lo_x, y0 + h - (c - lo_x)), (x0 + hi_x, y0 + h - (c - hi_x))))
    return out


_FLOOR_ROW_MIN_PT = 4.0
_FLOOR_PADS_PT = 14.0 + 22.0  # above and below the floor rows


def floors_per_chart(max_height: float) -> int:
    """The most floors one floor chart of at most ``max_height`` (pt) holds; a taller building
    is drawn as several charts (:func:`slice_floors`)."""
    return max(1, int((max_height - _FLOOR_PADS_PT) // _FLOOR_ROW_MIN_PT))


def slice_floors(fc: FloorComparison, start: int, stop: int) -> FloorComparison:
    """The floors ``start:stop`` (lowest first) of ``fc``."""
    cut = slice(start, stop)
    return dataclasses.replace(
        fc, levels=fc.levels[cut], labels=fc.labels[cut], elevation_m=fc.elevation_m[cut],
        max_impact_p50_mps=fc.max_impact_p50_mps[cut], max_risk=fc.max_risk[cut],
        n_openings=fc.n_openings[cut], band_counts=fc.band_counts[cut])


def floor_chart(fc: FloorComparison, width: float, max_height: float,
                palette: str = "standard", *, count_max: int | None = None) -> Drawing:
    """Per floor (top floor at the top): openings stacked by expected band, and the floor's
    highest median impact speed at the right. ``count_max``: the count the axis runs to (the
    same on every part of a tall building split over pages); the chart's own largest by
    default. At most :func:`floors_per_chart` floors fit in ``max_height``."""
    n = len(fc.levels)
    label_size = 6.5
    label_w = label_column_width(fc.labels, label_size, gap=_LABEL_GAP,
                                 max_width=_LABEL_SHARE * width)
    right_w, top_pad, bottom_pad = 70.0, 14.0, 22.0
    row = max(_FLOOR_ROW_MIN_PT, min(14.0, (max_height - top_pad - bottom_pad) / max(n, 1)))
    h = n * row + top_pad + bottom_pad
    d = Drawing(width, h)
    plot_w = width - label_w - right_w
    max_count = count_max or int(fc.n_openings.max(initial=1)) or 1
    step = _nice_step(max_count, 5)
    xmax = math.ceil(max_count / step) * step
    scale = plot_w / xmax
    every = max(1, math.ceil(8.0 / row))
    styles = band_styles(palette)
    for t in np.arange(0, xmax + step / 2, step):
        x = label_w + t * scale
        d.add(Line(x, bottom_pad, x, bottom_pad + n * row, strokeColor=RULE, strokeWidth=0.3))
        d.add(_text(x, bottom_pad - 9, fmt_tick(t), 6.5, anchor="middle", colour_=MUTED))
    d.add(_text(label_w + plot_w / 2, 2, "openings on the floor, by expected injury band", 7,
                anchor="middle", colour_=MUTED))
    d.add(_text(width - 2, bottom_pad + n * row + 4, "max median impact", 6.5, anchor="end",
                colour_=MUTED))
    for i in range(n):
        y = bottom_pad + i * row
        x = label_w
        for b in range(fc.band_counts.shape[1]):
            c = int(fc.band_counts[i, b])
            if c == 0:
                continue
            st = styles[b]
            w = c * scale
            d.add(Rect(x, y + row * 0.12, w, row * 0.76, fillColor=colour(st.fill),
                       strokeColor=INK, strokeWidth=0.3))
            size = min(6.0, row * 0.6)
            if w >= len(st.mark) * size * 0.7 and size >= 3.5:
                d.add(_text(x + w / 2, y + row / 2 - size * 0.35, st.mark, size, anchor="middle",
                            colour_=colour(st.text), bold=True))
            x += w
        if i % every == 0 or i == n - 1:
            text = fit_label(fc.labels[i], int(fc.levels[i]), label_w - _LABEL_GAP, label_size)
            d.add(_text(label_w - 4, y + row / 2 - 2.2, text, label_size, anchor="end",
                        colour_=MUTED))
            v = float(fc.max_impact_p50_mps[i])
            if math.isfinite(v):
                d.add(_text(width - 2, y + row / 2 - 2.2, fmt_speed(v), 6.5, anchor="end"))
    return d


def _panel(d: Drawing, x0: float, y0: float, w: float, h: float, t: np.ndarray, y: np.ndarray,
           *, xlabel: str, ylabel: str, marker_t: float | None) -> None:
    tmax = float(t.max(initial=0.0)) or 1.0
    ymax = float(np.nanmax(y)) if y.size else 1.0
    ymax = ymax if ymax > 0 else 1.0
    xs, ys = _nice_step(tmax, 5), _nice_step(ymax, 4)
    xtop, ytop = math.ceil(tmax / xs) * xs, math.ceil(ymax / ys) * ys
    for v in np.arange(0, ytop + ys / 2, ys):
        yy = y0 + v / ytop * h
        d.add(Line(x0, yy, x0 + w, yy, strokeColor=RULE, strokeWidth=0.3))
        d.add(_text(x0 - 3, yy - 2.2, fmt_tick(v), 6.5, anchor="end", colour_=MUTED))
    for v in np.arange(0, xtop + xs / 2, xs):
        xx = x0 + v / xtop * w
        d.add(Line(xx, y0, xx, y0 - 2, strokeColor=INK, strokeWidth=0.4))
        d.add(_text(xx, y0 - 10, fmt_tick(v), 6.5, anchor="middle", colour_=MUTED))
    d.add(Line(x0, y0, x0 + w, y0, strokeColor=INK, strokeWidth=0.6))
    d.add(Line(x0, y0, x0, y0 + h, strokeColor=INK, strokeWidth=0.6))
    if marker_t is not None and 0 <= marker_t <= xtop:
        xx = x0 + marker_t / xtop * w
        line = Line(xx, y0, xx, y0 + h, strokeColor=MUTED, strokeWidth=0.6)
        line.strokeDashArray = [2, 2]
        d.add(line)
        d.add(_text(xx + 2, y0 + h - 8, "spreads out", 6, colour_=MUTED))
    pts: list[float] = []
    for ti, yi in zip(t.tolist(), y.tolist(), strict=True):
        pts += [x0 + ti / xtop * w, y0 + yi / ytop * h]
    d.add(PolyLine(pts, strokeColor=INK, strokeWidth=1.2))
    d.add(_text(x0 + w / 2, y0 - 20, xlabel, 7, anchor="middle"))
    d.add(_text(x0, y0 + h + 5, ylabel, 7, colour_=INK))


def fall_profile_drawing(fig: FallProfileFigure, width: float, height: float = 150) -> Drawing:
    """Two panels side by side: speed (m/s) and height above the landing (m) against time (s)."""
    d = Drawing(width, height)
    gap, left = 30.0, 26.0
    w = (width - 2 * left - gap) / 2
    t = np.asarray(fig.t_s)
    # thin long series: a few hundred points draw smoothly
    stride = max(1, t.size // 300)
    idx = np.r_[np.arange(0, t.size, stride), t.size - 1] if t.size else np.arange(0)
    _panel(d, left, 26, w, height - 40, t[idx], np.asarray(fig.speed_mps)[idx],
           xlabel="time since leaving the perch (s)", ylabel="speed (m/s)",
           marker_t=fig.switch_time_s)
    _panel(d, 2 * left + w + gap, 26, w, height - 40, t[idx], np.asarray(fig.height_m)[idx],
           xlabel="time since leaving the perch (s)", ylabel="height above landing (m)",
           marker_t=fig.switch_time_s)
    return d


#: Bar fills of the sensitivity chart: the low value light, the high value dark (Okabe-Ito blue),
#: far apart in grey too; both outlined in ink.
SENSITIVITY_LOW_FILL = "#C6DBEF"
SENSITIVITY_HIGH_FILL = "#0072B2"


def sensitivity_drawing(fig: SensitivityFigure, labels: tuple[str, ...],
                        ranges: tuple[str, ...], values: tuple[str, ...], width: float) -> Drawing:
    """Tornado of the one-at-a-time swings: per parameter (largest first, at the top) a light
    bar for the change of the top risk at its low value and a dark one at its high value (% of
    the base risk), its name and value range at the left and the swing at the right."""
    n = len(fig.parameters)
    row, top_pad, bottom_pad = 19.0, 16.0, 22.0
    label_w = min(max([_width(t, 7) for t in labels + ranges] + [40.0]) + 8, 0.35 * width)
    right_w = 36.0
    plot_w = width - label_w - right_w
    h = n * row + top_pad + bottom_pad
    d = Drawing(width, h)
    lo_pct, hi_pct = np.asarray(fig.low_pct, float), np.asarray(fig.high_pct, float)
    span = max(fig.span_pct, 1.0)
    step = _nice_step(span, 3)
    vmin = min(0.0, math.floor(min(float(lo_pct.min(initial=0)), float(hi_pct.min(initial=0)))
                               / step) * step)
    vmax = max(0.0, math.ceil(max(float(lo_pct.max(initial=0)), float(hi_pct.max(initial=0)))
                              / step) * step)
    if vmax - vmin <= 0:
        vmin, vmax = -step, step

    def x_of(v: float) -> float:
        return label_w + (v - vmin) / (vmax - vmin) * plot_w

    y_plot_top = bottom_pad + n * row
    for t in np.arange(vmin, vmax + step / 2, step):
        x = x_of(float(t))
        d.add(Line(x, bottom_pad, x, y_plot_top, strokeColor=RULE, strokeWidth=0.3))
        d.add(_text(x, bottom_pad - 9, fmt_change_pct(float(t)) if t else "0", 6.5,
                    anchor="middle", colour_=MUTED))
    d.add(_text(label_w + plot_w / 2, 2, "change of the top openings' summed risk score "
                "(% of its value)", 7, anchor="middle", colour_=MUTED))
    # legend above the bars
    lx = label_w
    for fill, text in ((SENSITIVITY_LOW_FILL, "low value (10th percentile)"),
                       (SENSITIVITY_HIGH_FILL, "high value (90th percentile)")):
        d.add(Rect(lx, h - 10, 14, 7, fillColor=colour(fill), strokeColor=INK, strokeWidth=0.4))
        d.add(_text(lx + 18, h - 9.5, text, 6.5))
        lx += 26 + _width(text, 6.5)
    d.add(_text(width - 2, h - 9.5, "swing", 6.5, anchor="end", colour_=MUTED))
    zero = x_of(0.0)
    for i in range(n):
        y = bottom_pad + (n - 1 - i) * row  # largest swing at the top
        half = row * 0.36
        for v, fill, y0 in ((float(lo_pct[i]), SENSITIVITY_LOW_FILL, y + row / 2),
                            (float(hi_pct[i]), SENSITIVITY_HIGH_FILL, y + row / 2 - half)):
            x0, x1 = sorted((zero, x_of(v)))
            d.add(Rect(x0, y0, max(x1 - x0, 0.6), half, fillColor=colour(fill),
                       strokeColor=INK, strokeWidth=0.35))
        d.add(_text(label_w - 6, y + row / 2 + 1, labels[i], 7, anchor="end", bold=i == 0))
        d.add(_text(label_w - 6, y + row / 2 - 7, ranges[i], 6, anchor="end", colour_=MUTED))
        d.add(_text(width - 2, y + row / 2 - 2.5, values[i], 7, anchor="end", bold=i == 0))
    d.add(Line(zero, bottom_pad, zero, y_plot_top, strokeColor=INK, strokeWidth=0.7))
    return d


def budget_log_span(budgets: np.ndarray, chosen_budget: float) -> tuple[float, float]:
    """The span (``lo``, ``hi``, currency) of a logarithmic budget axis: from the whole decade
    at or below the smallest positive budget to the largest budget (the chosen budget
    included); ``(1, 10)`` when no budget is positive."""
    values = np.asarray(budgets, float).reshape(-1)
    positive = values[values > 0]
    if chosen_budget > 0:
        positive = np.append(positive, float(chosen_budget))
    if positive.size == 0:
        return 1.0, 10.0
    lo = 10.0 ** math.floor(math.log10(float(positive.min())))
    return lo, max(float(positive.max()), lo * 10.0)


def budget_curve_drawing(budgets: np.ndarray, risk_left: np.ndarray, *, chosen_budget: float,
                         currency: str, width: float, height: float = 170) -> Drawing:
    """Risk left (summed risk score) against budget (``currency``) on a logarithmic budget axis
    (the budgets are spaced geometrically, see :func:`petfall_audit.figures.budget.budget_grid`,
    and most of the curve's bend lies at small budgets): a step line through the solved
    budgets, a budget of 0 at the axis' left end, the chosen budget marked by a dashed line."""
    d = Drawing(width, height)
    left, bottom, top_pad, right_pad = 52.0, 28.0, 14.0, 14.0
    w, h = width - left - right_pad, height - bottom - top_pad
    order = np.argsort(budgets, kind="stable")
    b, r = np.asarray(budgets, float)[order], np.asarray(risk_left, float)[order]
    lo, hi = budget_log_span(b, chosen_budget)
    decades = math.log10(hi / lo)
    rmax = float(r.max(initial=0.0)) or 1.0
    ys = _nice_step(rmax, 4)
    ytop = math.ceil(rmax / ys) * ys

    def x_of(v: float) -> float:
        return left + math.log10(max(v, lo) / lo) / decades * w

    def y_of(v: float) -> float:
        return bottom + v / ytop * h

    for v in np.arange(0, ytop + ys / 2, ys):
        d.add(Line(left, y_of(v), left + w, y_of(v), strokeColor=RULE, strokeWidth=0.3))
        d.add(_text(left - 3, y_of(v) - 2.2, fmt_risk(float(v)), 6.5, anchor="end", colour_=MUTED))
    for k in range(math.floor(decades + 1e-9) + 1):  # a tick at each whole decade
        v = lo * 10.0 ** k
        d.add(Line(x_of(v), bottom, x_of(v), bottom + h, strokeColor=RULE, strokeWidth=0.3))
        d.add(Line(x_of(v), bottom, x_of(v), bottom - 2, strokeColor=INK, strokeWidth=0.4))
        d.add(_text(x_of(v), bottom - 10, fmt_money(v), 6.5, anchor="middle", colour_=MUTED))
    d.add(Line(left, bottom, left + w, bottom, strokeColor=INK, strokeWidth=0.6))
    d.add(Line(left, bottom, left, bottom + h, strokeColor=INK, strokeWidth=0.6))
    pts: list[float] = []
    for i, (bi, ri) in enumerate(zip(b.tolist(), r.tolist(), strict=True)):
        if i:
            pts += [x_of(bi), pts[-1]]  # risk left only drops when a larger budget is reached
        pts += [x_of(bi), y_of(ri)]
    if len(pts) >= 4:
        d.add(PolyLine(pts, strokeColor=INK, strokeWidth=1.2))
    if 0 < chosen_budget <= hi:
        marker = Line(x_of(chosen_budget), bottom, x_of(chosen_budget), bottom + h,
                      strokeColor=MUTED, strokeWidth=0.6)
        marker.strokeDashArray = [2, 2]
        d.add(marker)
        d.add(_text(x_of(chosen_budget) + 2, bottom + h - 8, "this plan", 6, colour_=MUTED))
    d.add(_text(left + w / 2, 2, budget_axis_label(currency), 7, anchor="middle"))
    d.add(_text(left - 40, bottom + h + 4, "risk score left in the estate", 7))
    return d


def building_bars_drawing(labels: tuple[str, ...], spend: np.ndarray, removed: np.ndarray, *,
                          currency: str, width: float) -> Drawing:
    """Per building (one row each, in the order given) a bar of its spend and a bar of the risk
    removed there, each on its own scale (left: spend in ``currency``, right: risk score)."""
    n = len(labels)
    row, top_pad, bottom_pad = 16.0, 16.0, 10.0
    label_w = min(max([_width(t, 7) for t in labels] + [40.0]) + 8, 0.3 * width)
    gap = 16.0
    half = (width - label_w - gap) / 2
    h = n * row + top_pad + bottom_pad
    d = Drawing(width, h)
    smax = float(np.max(spend, initial=0.0)) or 1.0
    rmax = float(np.max(removed, initial=0.0)) or 1.0
    x_spend, x_risk = label_w, label_w + half + gap
    d.add(_text(x_spend, h - 9, f"spend ({currency})".strip(), 7, bold=True))
    d.add(_text(x_risk, h - 9, "risk score removed", 7, bold=True))
    for i, label in enumerate(labels):
        y = bottom_pad + (n - 1 - i) * row
        bar_h = row * 0.55
        y0 = y + (row - bar_h) / 2
        d.add(_text(label_w - 6, y + row / 2 - 2.5, label, 7, anchor="end"))
        for x0, value, top, text, fill in (
            (x_spend, float(spend[i]), smax, fmt_money(float(spend[i])), SENSITIVITY_LOW_FILL),
            (x_risk, float(removed[i]), rmax, fmt_risk(float(removed[i])),
             SENSITIVITY_HIGH_FILL),
        ):
            bar_w = max(value / top * (half - 40), 0.6 if value > 0 else 0.0)
            if bar_w > 0:
                d.add(Rect(x0, y0, bar_w, bar_h, fillColor=colour(fill), strokeColor=INK,
                           strokeWidth=0.35))
            d.add(_text(x0 + bar_w + 3, y + row / 2 - 2.5, text, 6.5, colour_=MUTED))
    return d
