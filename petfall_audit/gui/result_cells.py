"""How one opening's result reads in a table: text per column, band colours, stale styling and
tooltip, shared by the window's plain results table and the ranked-openings view; plus display
units and the "1 in N" likelihood."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

from PySide6.QtCore import Qt
from PySide6.QtGui import QBrush, QColor, QFont

from petfall_audit.editing.fields import enum_label
from petfall_audit.injury import BANDS
from petfall_audit.palette import band_style

__all__ = ["Units", "units_of", "fmt_one_in", "result_text", "result_style", "result_tooltip",
           "STALE_TEXT", "NUMERIC_COLUMNS"]

#: Text colour of results that are being recomputed.
STALE_TEXT = "#7A7A7A"
#: Column keys shown right-aligned.
NUMERIC_COLUMNS = frozenset({"rank", "risk_rank", "likelihood", "drop", "speed", "risk"})

# --- units --------------------------------------------------------------------------------------

_FOOT_M = 0.3048
_MPH_MPS = _FOOT_M * 5280 / 3600


@dataclass(frozen=True, slots=True)
class Units:
    """Display units: divide metres by ``length_m`` to get ``length`` units, m/s by
    ``speed_mps`` to get ``speed`` units."""

    system: str
    length: str
    length_m: float
    speed: str
    speed_mps: float

    def fmt_length(self, x_m: float, digits: int = 1) -> str:
        if not math.isfinite(x_m):
            return "—"
        return f"{x_m / self.length_m:.{digits}f} {self.length}"

    def fmt_speed(self, v_mps: float) -> str:
        if not math.isfinite(v_mps):
            return "—"
        return f"{v_mps / self.speed_mps:.1f} {self.speed}"


def units_of(system: str) -> Units:
    """:class:`Units` of ``"metric"`` or ``"imperial"``."""
    if system == "imperial":
        return Units("imperial", "ft", _FOOT_M, "mph", _MPH_MPS)
    return Units("metric", "m", 1.0, "m/s", 1.0)


# --- formatting ---------------------------------------------------------------------------------


def two_line_title(title: str, longest: int = 10) -> str:
    """A column title on two lines when it is longer than ``longest`` characters (split at the
    space nearest its middle), so that a column is as narrow as its numbers allow."""
    if len(title) <= longest or " " not in title:
        return title
    spaces = [i for i, c in enumerate(title) if c == " "]
    cut = min(spaces, key=lambda i: abs(i - len(title) / 2))
    return title[:cut] + "\n" + title[cut + 1:]


def fmt_one_in(n: float) -> str:
    """Likelihood over 12 months as "1 in N"."""
    if not math.isfinite(n) or n <= 0:
        return "never" if n == math.inf else "—"
    if n > 1e9:
        return "never"
    if n < 1.5:
        return "1 in 1"
    return f"1 in {n:,.0f}" if n < 1e5 else f"1 in {n:.2g}"


def result_text(r: Any, column: str, units: Units, palette: str,
                floor_labels: Mapping[int, str] | None = None) -> str:
    """The text of result ``r`` (an ``OpeningResult``) in the column ``column``: one of
    ``rank risk_rank id floor facade kind band likelihood drop speed risk factor``."""
    if column == "rank":
        return str(r.rank)
    if column == "risk_rank":
        return str(r.risk_rank)
    if column == "id":
        return str(r.id)
    if column == "floor":
        return (floor_labels or {}).get(r.floor, str(r.floor))
    if column == "facade":
        return str(r.facade)
    if column == "kind":
        return enum_label(r.kind)
    if column == "band":
        return f"{band_style(r.expected_band, palette).mark} {BANDS[r.expected_band]}"
    if column == "likelihood":
        return fmt_one_in(r.one_in_n)
    if column == "drop":
        return units.fmt_length(r.drop_m.p50)
    if column == "speed":
        return units.fmt_speed(r.impact_speed_mps.p50)
    if column == "risk":
        return f"{r.risk:,.0f}"
    if column == "factor":
        return r.factors[0] if r.factors else ""
    raise KeyError(column)


def result_tooltip(r: Any) -> str:
    """The expected band of result ``r``, then its factors and hazards, one a line."""
    return "\n".join([f"{r.id}: {BANDS[r.expected_band]} expected",
                      *(f"• {f}" for f in r.factors), *(f"• {h}" for h in r.hazards)])


def result_style(r: Any, column: str, role: int, *, stale: bool, palette: str) -> Any:
    """Alignment, band colours (the ``band`` column), grey italics while ``stale`` and the
    tooltip of result ``r`` for an item-data ``role``; ``None`` for other roles."""
    if role == Qt.ItemDataRole.TextAlignmentRole and column in NUMERIC_COLUMNS:
        return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
    if role == Qt.ItemDataRole.BackgroundRole and column == "band" and not stale:
        return QBrush(QColor(band_style(r.expected_band, palette).fill))
    if role == Qt.ItemDataRole.ForegroundRole:
        if stale:
            return QBrush(QColor(STALE_TEXT))
        if column == "band":
            return QBrush(QColor(band_style(r.expected_band, palette).text))
    if role == Qt.ItemDataRole.FontRole and stale:
        font = QFont()
        font.setItalic(True)
        return font
    if role == Qt.ItemDataRole.ToolTipRole:
        return result_tooltip(r)
    return None
