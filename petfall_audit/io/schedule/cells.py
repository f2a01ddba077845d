"""Reading one cell of a schedule: text to a model value, and lengths in the file's units.

A cell is read for its :class:`Column` (the column's spec and the unit of its bare numbers).
Messages say a length in the column's own system: ``3.2 m`` / ``95 mm``, or ``10 ft 6 in`` /
``3.7 in`` for a column in feet or inches (:func:`in_system` does the same for a whole message).
"""

from __future__ import annotations

import math
import re
from collections.abc import Mapping, Sequence
from enum import StrEnum
from typing import Any, NamedTuple

from petfall_audit.io.schedule.columns import (
    ENUM_SYNONYMS,
    FALSE_WORDS,
    NONE_WORDS,
    TRUE_WORDS,
    ColumnSpec,
    human,
    norm,
)
from petfall_audit.present.numbers import fmt_length as format_length
from petfall_audit.units import FOOT_M, INCH_M, parse_gap_mm, parse_length_m

__all__ = ["Column", "parse_cell", "in_system", "file_system", "is_imperial"]


class Column(NamedTuple):
    """A column of the file as it is read."""

    position: int  # 0-based column index in the table
    header: str
    spec: ColumnSpec
    unit: str | None


def _parse_enum(text: str, choices: type[StrEnum]) -> StrEnum:
    key = norm(text)
    candidates = (
        key,
        key.replace(" ", "_"),
        ENUM_SYNONYMS.get(key, ""),
        ENUM_SYNONYMS.get(text.strip().lower(), ""),
    )
    for candidate in candidates:
        if candidate:
            try:
                return choices(candidate)
            except ValueError:
                continue
    allowed = ", ".join(m.value for m in choices)
    raise ValueError(f"unknown value '{text}' (use one of: {allowed})")


def _parse_bool(text: str) -> bool:
    key = text.strip().lower()
    if key in TRUE_WORDS:
        return True
    if key in FALSE_WORDS:
        return False
    raise ValueError(f"'{text}' is not yes or no")


def _parse_int(text: str) -> int:
    try:
        value = float(text.replace(",", "."))
    except ValueError:
        raise ValueError(f"'{text}' is not a whole number") from None
    if not value.is_integer():
        raise ValueError(f"'{text}' is not a whole number")
    return int(value)


def parse_cell(text: str, col: Column, floor_labels: Mapping[str, int]) -> Any:
    """The value of one cell for its field; ``ValueError`` with a plain message."""
    spec = col.spec
    if spec.kind == "text":
        return text
    if spec.kind == "bool":
        return _parse_bool(text)
    if spec.kind == "enum":
        assert spec.choices is not None
        return _parse_enum(text, spec.choices)
    if spec.kind == "int":
        try:
            return _parse_int(text)
        except ValueError:
            level = floor_labels.get(norm(text))
            if level is None:
                raise ValueError(
                    f"unknown floor '{text}' (give a level number or a known floor label)"
                ) from None
            return level
    assert col.unit is not None
    if spec.kind == "gap":
        if text.strip().lower() in NONE_WORDS:
            return None
        value = parse_gap_mm(text, default_unit=col.unit)
    else:
        value = parse_length_m(text, default_unit=col.unit)
    name = human(spec.field)

    def show(v: float) -> str:  # in the column's own system: feet and inches for a file in feet
        return _show(v, col)

    if spec.min_value is not None:
        if value < 0 <= spec.min_value:
            raise ValueError(f"negative {name} ({show(value)})")
        if value < spec.min_value or (spec.positive and value <= spec.min_value):
            bound = "more than" if spec.positive else "at least"
            raise ValueError(f"{name} must be {bound} {show(spec.min_value)} (got {show(value)})")
    if spec.max_value is not None and value > spec.max_value:
        raise ValueError(
            f"{name} of {show(value)} is implausible (at most {show(spec.max_value)}); check "
            f"the unit (a bare number in this column is read in {col.unit})"
        )
    return value


_IMPERIAL_M = (INCH_M, FOOT_M, 3 * FOOT_M)  # inch, foot, yard


def is_imperial(unit: str | None) -> bool:
    """True for a unit of the imperial system (in, ft, yd and their spellings)."""
    if not unit:
        return False
    try:
        one_m = parse_length_m("1", default_unit=unit)
    except ValueError:
        return False
    return any(math.isclose(one_m, k, rel_tol=1e-9) for k in _IMPERIAL_M)


def _show(value: float, col: Column) -> str:
    """``value`` (m, or mm for a gap) as the column's file writes it: ``3.2 m`` / ``95 mm``, or
    ``10 ft 6 in`` / ``3.7 in`` for a column in feet or inches."""
    gap = col.spec.kind == "gap"
    if is_imperial(col.unit):
        return format_length(value / 1000.0 if gap else value, "imperial", small=gap)
    return f"{value:g} {'mm' if gap else 'm'}"


_SI_LENGTH = re.compile(r"(?<![\w.])(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?) (mm|m)(?![\w²³/])")


def in_system(message: str, system: str) -> str:
    """``message`` with its lengths (``12.3 m``, ``95 mm``) in ``system``: unchanged for
    ``metric``, feet and inches for ``imperial`` (``40 ft 4 in``, ``3.7 in``)."""
    if system != "imperial":
        return message

    def feet(m: re.Match[str]) -> str:
        value, unit = float(m.group(1)), m.group(2)
        if unit == "mm":
            return format_length(value / 1000.0, "imperial", small=True)
        return format_length(value, "imperial")

    return _SI_LENGTH.sub(feet, message)


def file_system(columns: Sequence[Column]) -> str:
    """``imperial`` when any length column of the file is read in feet or inches."""
    lengths = [c for c in columns if c.spec.kind in ("length", "gap")]
    return "imperial" if any(is_imperial(c.unit) for c in lengths) else "metric"
