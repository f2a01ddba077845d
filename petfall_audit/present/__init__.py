"""How results read for people: every label, unit-aware formatter and sentence a user sees.

Qt-free and shared by the app, the PDF audit, the tenant leaflet, the command line and the
exports, so that one number or name reads the same everywhere. Units are an argument
(``system="metric"`` or ``"imperial"``); nothing here computes a result.
"""

from __future__ import annotations

from petfall_audit.present.explain import barrier_words, explain, explain_all, reason_json
from petfall_audit.present.labels import (
    DRAG_AREA_NOTE,
    ENUM_LABELS,
    PARAMETER_LABELS,
    PRESET_LABELS,
    SPEED_TERMS,
    band_label,
    budget_axis_label,
    enum_label,
    hierarchy_label,
    kind_label,
    preset_label,
    surface_kind_label,
    surface_label,
)
from petfall_audit.present.numbers import (
    DATE_STYLES,
    NO_VALUE,
    Units,
    fmt_change_pct,
    fmt_count,
    fmt_date,
    fmt_int,
    fmt_length,
    fmt_money,
    fmt_number,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    fmt_seconds,
    fmt_speed,
    fmt_survey_length,
    fmt_tick,
    length_unit,
    speed_unit,
    units_in_text,
    units_of,
)

__all__ = [
    "DATE_STYLES",
    "DRAG_AREA_NOTE",
    "ENUM_LABELS",
    "NO_VALUE",
    "PARAMETER_LABELS",
    "PRESET_LABELS",
    "SPEED_TERMS",
    "Units",
    "band_label",
    "budget_axis_label",
    "barrier_words",
    "explain",
    "explain_all",
    "reason_json",
    "enum_label",
    "fmt_change_pct",
    "fmt_count",
    "fmt_date",
    "fmt_int",
    "fmt_length",
    "fmt_money",
    "fmt_number",
    "fmt_one_in",
    "fmt_percent",
    "fmt_risk",
    "fmt_seconds",
    "fmt_speed",
    "fmt_survey_length",
    "fmt_tick",
    "hierarchy_label",
    "kind_label",
    "length_unit",
    "preset_label",
    "speed_unit",
    "surface_kind_label",
    "surface_label",
    "units_in_text",
    "units_of",
]
