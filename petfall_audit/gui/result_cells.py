"""How one opening's result reads in a table: text per column, band colours, stale styling and
tooltip, shared by the window's plain results table and the ranked-openings view. Every number
and name comes from :mod:`petfall_audit.present`."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

from PySide6.QtCore import Qt
from PySide6.QtGui import QBrush, QColor, QFont

from petfall_audit.injury import BANDS
from petfall_audit.palette import band_style
from petfall_audit.present import SPEED_TERMS, Units, enum_label, fmt_one_in, fmt_risk
from petfall_audit.present.explain import explain, explain_all

__all__ = ["result_text", "result_style", "result_tooltip", "two_line_title", "STALE_TEXT",
           "NUMERIC_COLUMNS"]

#: Text colour of results that are being recomputed.
STALE_TEXT = "#7A7A7A"
#: Column keys shown right-aligned.
NUMERIC_COLUMNS = frozenset({"rank", "risk_rank", "likelihood", "drop", "speed", "risk"})

# --- formatting ---------------------------------------------------------------------------------


def two_line_title(title: str, longest: int = 10) -> str:
    """A column title on two lines when it is longer than ``longest`` characters (split at the
    space nearest its middle), so that a column is as narrow as its numbers allow."""
    if len(title) <= longest or " " not in title:
        return title
    spaces = [i for i, c in enumerate(title) if c == " "]
    cut = min(spaces, key=lambda i: abs(i - len(title) / 2))
    return title[:cut] + "\n" + title[cut + 1:]


def result_text(r: Any, column: str, units: Units, palette: str,
                floor_labels: Mapping[int, str] | None = None,
                facade_labels: Mapping[str, str] | None = None) -> str:
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
        return (facade_labels or {}).get(r.facade, str(r.facade))
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
        return fmt_risk(r.risk)
    if column == "factor":
        return explain(r.factors[0], units.system) if r.factors else ""
    raise KeyError(column)


def result_tooltip(r: Any, column: str = "", system: str = "metric") -> str:
    """The expected band of result ``r``, then its factors and hazards (in ``system`` units),
    one a line; in the ``speed`` column first what that speed is (one opening shows several)."""
    lead = [SPEED_TERMS["impact_median"] + "."] if column == "speed" else []
    return "\n".join([*lead, f"{r.id}: {BANDS[r.expected_band]} expected",
                      *(f"• {f}" for f in explain_all(r.factors, system)),
                      *(f"• {h}" for h in explain_all(r.hazards, system))])


def result_style(r: Any, column: str, role: int, *, stale: bool, palette: str,
                 system: str = "metric") -> Any:
    """Alignment, band colours (the ``band`` column), grey italics while ``stale`` and the
    tooltip of result ``r`` (in ``system`` units) for an item-data ``role``; ``None`` for other
    roles."""
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
        return result_tooltip(r, column, system)
    return None
