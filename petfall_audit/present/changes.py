"""What changed between two audits, in words: field names, old and new values, statuses and
fix statuses. Values come as the comparison holds them (SI, file values of enums, ``None``)."""

from __future__ import annotations

import math
from typing import Any

from petfall_audit.model import CatsPresent, OpenFrequency, OpeningKind, Screen
from petfall_audit.present.labels import enum_label, kind_label
from petfall_audit.present.numbers import NO_VALUE, fmt_length, fmt_risk

__all__ = [
    "FIELD_LABELS",
    "STATUS_LABELS",
    "FIX_STATUS_LABELS",
    "field_label",
    "fmt_field_value",
    "fmt_field_change",
    "fmt_risk_change",
    "status_label",
    "fix_status_label",
]

#: The compared fields in plain words (opening fields as the editor names them).
FIELD_LABELS: dict[str, str] = {
    "floor": "Floor",
    "facade": "Facade",
    "kind": "Kind",
    "x_m": "Position along facade",
    "width_m": "Width",
    "projection_m": "Projection",
    "perch_height_m": "Rail top / sill height",
    "largest_gap_mm": "Largest gap in guard",
    "bottom_gap_mm": "Gap under guard",
    "climbable_infill": "Climbable infill",
    "flat_rail_top": "Flat rail top",
    "climbing_aids": "Furniture or planters by the guard",
    "limiter_gap_mm": "Limiter opening",
    "screen": "Screen",
    "netting_mesh_mm": "Netting mesh",
    "open_frequency": "How often open",
    "cats_present": "Cats live behind it",
    "escape_window": "Emergency escape window",
    "floor_elevation_m": "Floor level above datum",
    "surfaces_below": "Surfaces below",
    "surroundings": "Surroundings (an opening below, the site or the cat profile)",
    "site_altitude_m": "Site altitude",
    "air_temperature_c": "Design air temperature",
    "cat_profile": "Cat profile",
    # fields of floors, facades and surfaces ("Floor 1: level above datum")
    "elevation_m": "level above datum",
    "length_m": "length",
    "label": "name",
    "from_facade_m": "from the facade",
    "to_facade_m": "to",
    "x_from_m": "along the facade from",
    "x_to_m": "along the facade to",
}
#: What "none" reads for fields whose ``None`` means an absent device.
_NONE_WORDS: dict[str, str] = {
    "largest_gap_mm": "solid",
    "bottom_gap_mm": "none",
    "limiter_gap_mm": "no limiter",
    "netting_mesh_mm": "no net",
}
_ENUMS: dict[str, type[Any]] = {
    "screen": Screen, "open_frequency": OpenFrequency, "cats_present": CatsPresent,
}

STATUS_LABELS: dict[str, str] = {
    "added": "New", "removed": "Removed", "changed": "Changed", "unchanged": "Unchanged",
}
FIX_STATUS_LABELS: dict[str, str] = {
    "recommended": "Recommended", "approved": "Approved", "fitted": "Fitted",
    "checked": "Fitted and checked", "declined": "Declined",
}


def field_label(name: str) -> str:
    """A compared field in words; ``floors[3].elevation_m`` reads "Floor 3: floor level"."""
    if name in FIELD_LABELS:
        return FIELD_LABELS[name]
    if "[" in name and "]" in name:
        kind, rest = name.split("[", 1)
        key, _, sub = rest.partition("]")
        sub = sub.lstrip(".")
        item = {"floors": "Floor", "facades": "Facade", "surfaces": "Surface"}.get(kind, kind)
        return f"{item} {key}" + (f": {FIELD_LABELS.get(sub, sub.replace('_', ' '))}"
                                  if sub else "")
    if name.startswith("injury."):
        return "Injury threshold: " + name.removeprefix("injury.").replace("_", " ")
    return name.replace("_", " ").capitalize()


def fmt_field_value(name: str, value: Any, system: str = "metric") -> str:
    """One value of a compared field, with its unit."""
    base = name.rsplit(".", 1)[-1]
    if value is None:
        return _NONE_WORDS.get(base, NO_VALUE)
    if isinstance(value, bool):
        return "yes" if value else "no"
    if base == "kind":
        return kind_label(value) if value in {k.value for k in OpeningKind} else str(value)
    if base in _ENUMS:
        try:
            return enum_label(_ENUMS[base](value))
        except ValueError:
            return str(value)
    if isinstance(value, list):
        return ", ".join(str(v) for v in value) or "none"
    if isinstance(value, int | float) and math.isfinite(value):
        if base.endswith("_mm"):
            return fmt_length(float(value) / 1000.0, system, small=True)
        if base.endswith("_m"):
            return fmt_length(float(value), system)
        if base.endswith("_c"):
            return f"{float(value):.1f} °C" if system != "imperial" \
                else f"{float(value) * 9 / 5 + 32:.1f} °F"
        return f"{value:g}"
    return str(value)


def fmt_field_change(name: str, old: Any, new: Any, system: str = "metric") -> str:
    """``"Netting mesh: no net → 30 mm"``; an item added or removed reads so."""
    label = field_label(name)
    if old == "present" and new is None:
        return f"{label}: removed"
    if old is None and new == "present":
        return f"{label}: added"
    if name == "surroundings":
        return label
    return f"{label}: {fmt_field_value(name, old, system)} → {fmt_field_value(name, new, system)}"


def fmt_risk_change(delta: float | None) -> str:
    """A change of risk score with its sign: ``"-1,200"``, ``"+35"``, ``"0"``."""
    if delta is None or not math.isfinite(delta):
        return NO_VALUE
    if delta == 0:
        return "0"
    text = fmt_risk(abs(delta))
    return ("+" if delta > 0 else "\u2212") + text


def status_label(status: str) -> str:
    return STATUS_LABELS.get(status, status.capitalize())


def fix_status_label(status: str) -> str:
    return FIX_STATUS_LABELS.get(status, status.capitalize())
