"""How results read for people: every label, unit-aware formatter and sentence a user sees.

Qt-free and shared by the app, the PDF audit, the tenant leaflet, the command line and the
exports, so that one number or name reads the same everywhere. Units are an argument
(``system="metric"`` or ``"imperial"``); nothing here computes a result.
"""

from __future__ import annotations

from petfall_audit.present.labels import (
    band_label,
    enum_label,
    kind_label,
    preset_label,
)
from petfall_audit.present.numbers import (
    DATE_STYLES,
    NO_VALUE,
    fmt_count,
    fmt_date,
    fmt_length,
    fmt_money,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    fmt_speed,
)

__all__ = [
    "DATE_STYLES",
    "NO_VALUE",
    "band_label",
    "enum_label",
    "fmt_count",
    "fmt_date",
    "fmt_length",
    "fmt_money",
    "fmt_one_in",
    "fmt_percent",
    "fmt_risk",
    "fmt_speed",
    "kind_label",
    "preset_label",
]
