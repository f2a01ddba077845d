"""What each editable field is, how it is shown and how typed text is read. No Qt.

The fields, their labels, help and units come from the one registry,
:mod:`petfall_audit.field_registry`.

Forms and tables share these specs, so a value typed in either is read the same way. The
formats here are the editor's round-trip formats (precise enough to read back unchanged); the
names of enum values come from :mod:`petfall_audit.present`. Lengths are
shown in the display system (``"metric"`` or ``"imperial"``) and read with units
(``42 in``, ``1.1 m``, ``3'6"``); a bare number takes the system's unit (m or ft for lengths,
mm or in for gaps). Files and the model stay SI.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass
from enum import StrEnum
from typing import Any

from petfall_audit.field_registry import ENUM_SYNONYMS, FieldDef, section_fields
from petfall_audit.limits import LIMITS
from petfall_audit.present.labels import enum_label
from petfall_audit.units import INCH_M, parse_length_m

__all__ = [
    "FieldSpec",
    "spec_of",
    "OPENING_FIELDS",
    "FLOOR_FIELDS",
    "FACADE_FIELDS",
    "SURFACE_FIELDS",
    "INFO_FIELDS",
    "INJURY_FIELDS",
    "max_chars",
    "field_spec",
    "format_value",
    "parse_value",
    "unit_hint",
]

@dataclass(frozen=True, slots=True)
class FieldSpec:
    """One editable field, as the editor sees it (built from the registry,
    :mod:`petfall_audit.field_registry`).

    ``kind``: ``text`` | ``id`` | ``int`` | ``length`` (m) | ``gap`` (mm) | ``enum`` | ``bool`` |
    ``temperature`` (°C) | ``ref`` (the id of another item, e.g. a facade) | ``dose`` (a mean
    deceleration in g) | ``number`` (a plain number). ``optional``: empty text means ``None`` (a
    gap field: none).
    """

    name: str
    label: str
    kind: str
    enum: type[StrEnum] | None = None
    optional: bool = False
    help: str = ""
    #: How the app edits a ``text`` field: ``""`` one line, ``"lines"`` several lines,
    #: ``"date"`` a date picker (the value stays ``YYYY-MM-DD`` text or empty).
    editor: str = ""
    #: The field in a sentence (undo labels, messages); default: the label in lower case.
    words: str = ""
    #: The most characters a text field holds; ``None``: by its kind (see :func:`max_chars`).
    chars: int | None = None

    @property
    def noun(self) -> str:
        """The field in a sentence."""
        return self.words or self.label.lower()


def spec_of(field: FieldDef) -> FieldSpec:
    """The editor's spec of a registry field."""
    return FieldSpec(field.name, field.label, field.kind, field.enum, field.optional, field.help,
                     field.editor, words=field.noun, chars=field.max_chars)


def _specs(section: str, names: Sequence[str]) -> tuple[FieldSpec, ...]:
    return tuple(spec_of(f) for f in section_fields(section, names))


OPENING_FIELDS: tuple[FieldSpec, ...] = _specs("openings", (
    "id", "floor", "facade", "kind", "x_m", "width_m", "projection_m", "perch_height_m",
    "largest_gap_mm", "bottom_gap_mm", "climbable_infill", "flat_rail_top", "climbing_aids",
    "limiter_gap_mm", "screen", "netting_mesh_mm", "open_frequency", "cats_present",
    "escape_window", "notes",
))
FLOOR_FIELDS: tuple[FieldSpec, ...] = _specs("floors", ("level", "label", "elevation_m"))
FACADE_FIELDS: tuple[FieldSpec, ...] = _specs("facades", ("id", "label", "length_m"))
SURFACE_FIELDS: tuple[FieldSpec, ...] = _specs("surfaces", (
    "id", "label", "kind", "elevation_m", "facade", "from_facade_m", "to_facade_m", "x_from_m",
    "x_to_m",
))
INJURY_FIELDS: tuple[FieldSpec, ...] = _specs(
    "injury", ("moderate_g", "serious_g", "life_threatening_g", "spread"))
INFO_FIELDS: tuple[FieldSpec, ...] = _specs("info", (
    "name", "address", "site_altitude_m", "air_temperature_c", "auditor", "audit_date", "notes",
))


def field_spec(fields: Sequence[FieldSpec], name: str) -> FieldSpec:
    """The spec called ``name`` in ``fields``; ``KeyError`` if none."""
    for spec in fields:
        if spec.name == name:
            return spec
    raise KeyError(name)


def _trim(number: float, digits: int) -> str:
    text = f"{number:.{digits}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def unit_hint(spec: FieldSpec, system: str) -> str:
    """The unit a bare number takes in this field: ``m``, ``ft``, ``mm``, ``in``, ``°C``, ``°F``."""
    imperial = system == "imperial"
    if spec.kind == "length":
        return "ft" if imperial else "m"
    if spec.kind == "gap":
        return "in" if imperial else "mm"
    if spec.kind == "temperature":
        return "°F" if imperial else "°C"
    return ""


def format_value(spec: FieldSpec, value: Any, system: str = "metric") -> str:
    """Show ``value`` for editing, precise enough that reading it back changes nothing visible."""
    if value is None:
        return ""
    imperial = system == "imperial"
    if spec.kind == "length":
        if not imperial:
            return f"{_trim(float(value), 3)} m"
        inches = abs(float(value)) / INCH_M
        feet = math.floor(inches / 12 + 1e-9)
        rest = inches - 12 * feet
        if abs(rest - 12) < 0.05:
            feet, rest = feet + 1, 0.0
        sign = "-" if float(value) < 0 else ""
        return f"{sign}{feet} ft {_trim(rest, 1)} in" if feet else f"{sign}{_trim(rest, 1)} in"
    if spec.kind == "gap":
        if imperial:
            return f"{_trim(float(value) / 1000 / INCH_M, 2)} in"
        return f"{_trim(float(value), 1)} mm"
    if spec.kind == "temperature":
        c = float(value)
        return f"{_trim(c * 9 / 5 + 32, 1)} °F" if imperial else f"{_trim(c, 1)} °C"
    if spec.kind == "enum":
        return enum_label(value)
    if spec.kind == "bool":
        return "Yes" if value else "No"
    if spec.kind == "dose":
        return f"{_trim(float(value), 1)} g"
    if spec.kind == "number":
        return _trim(float(value), 3)
    return str(value)


def _parse_temperature_c(text: str, system: str) -> float:
    t = text.strip().replace("°", "").replace(" ", "")
    unit = "F" if system == "imperial" else "C"
    if t[-1:].upper() in ("C", "F"):
        unit, t = t[-1].upper(), t[:-1]
    try:
        number = float(t.replace(",", "."))
    except ValueError:
        number = math.nan
    if not math.isfinite(number):
        raise ValueError(f"cannot read '{text}' as a temperature (e.g. 15 °C or 59 °F)")
    return (number - 32) * 5 / 9 if unit == "F" else number


_NONE_WORDS = {"", "none", "no", "-", "—", "n/a"}


def _length_m(text: str, default_unit: str) -> float:
    """A typed length in metres; ``ValueError`` (never ``OverflowError``) for what is not one."""
    try:
        value = parse_length_m(text, default_unit=default_unit)
    except OverflowError:
        value = math.inf
    if not math.isfinite(value):
        raise ValueError(f"'{text}' is too large to be a length")
    return value


def max_chars(spec: FieldSpec) -> int | None:
    """The most characters a text, id or reference field holds (the loader's limits), or
    ``None`` for a field that is not text."""
    if spec.chars is not None:
        return spec.chars
    if spec.kind in ("id", "ref"):
        return LIMITS.id_max_chars
    if spec.kind != "text":
        return None
    return {"notes": LIMITS.notes_max_chars,
            "address": LIMITS.address_max_chars}.get(spec.name, LIMITS.name_max_chars)


def parse_value(spec: FieldSpec, text: str, system: str = "metric") -> Any:
    """Read typed ``text`` into a model value for ``spec``.

    Raises ``ValueError`` with a plain message the form shows beside the field.
    """
    raw = text.strip()
    imperial = system == "imperial"
    limit = max_chars(spec)
    if limit is not None and len(raw) > limit:
        raise ValueError(f"{spec.label} is {len(raw):,} characters long; at most {limit:,} "
                         "are allowed")
    if spec.kind in ("length", "gap", "int", "temperature", "enum") and spec.optional and (
        raw.lower() in _NONE_WORDS
    ):
        return None
    if spec.kind == "length":
        return _length_m(raw, "ft" if imperial else "m")
    if spec.kind == "gap":
        value_mm = _length_m(raw, "in" if imperial else "mm") * 1000.0
        if value_mm < 0:
            raise ValueError("a gap cannot be negative")
        return value_mm
    if spec.kind == "temperature":
        return _parse_temperature_c(raw, system)
    if spec.kind in ("dose", "number"):
        t = raw[:-1].strip() if spec.kind == "dose" and raw[-1:].lower() == "g" else raw
        try:
            number = float(t.replace(",", "."))
        except ValueError:
            number = math.nan
        if not math.isfinite(number):
            example = "e.g. 70 g" if spec.kind == "dose" else "e.g. 0.8"
            raise ValueError(f"cannot read '{text}' as a number ({example})")
        return number
    if spec.kind == "int":
        try:
            return int(raw)
        except ValueError:
            raise ValueError(f"'{text}' is not a whole number") from None
    if spec.kind == "enum":
        assert spec.enum is not None
        lowered = raw.lower()
        for member in spec.enum:
            if lowered in (member.value, enum_label(member).lower()):
                return member
        synonym = ENUM_SYNONYMS.get(lowered)  # the trade's words, as a schedule reads them
        if synonym is not None and synonym in {m.value for m in spec.enum}:
            return spec.enum(synonym)
        choices = ", ".join(enum_label(m) for m in spec.enum)
        raise ValueError(f"'{text}' is not one of: {choices}")
    if spec.kind == "bool":
        lowered = raw.lower()
        if lowered in ("yes", "y", "true", "1", "x"):
            return True
        if lowered in ("no", "n", "false", "0", ""):
            return False
        raise ValueError(f"'{text}' is not yes or no")
    if spec.kind in ("id", "ref"):
        if not raw:
            if spec.optional:
                return None
            raise ValueError(f"{spec.label} cannot be empty")
        return raw
    if not raw and not spec.optional:
        raise ValueError(f"{spec.label} cannot be empty")
    return raw if spec.kind != "text" else text.strip()
