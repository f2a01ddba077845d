"""Step 2 of a schedule import: which field each header holds, and the units headers give.

:func:`guess_mapping` recognises the registry's names and synonyms of each column
(:mod:`petfall_audit.io.schedule.columns`); :func:`load_mapping` reads a mapping file;
:func:`header_units` reads units such as ``Width (in)``.
"""

from __future__ import annotations

import difflib
import json
import re
from collections.abc import Mapping, Sequence
from pathlib import Path
from typing import NamedTuple

from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.schedule.columns import COLUMNS, SPEC, norm

__all__ = [
    "LoadedMapping",
    "guess_mapping",
    "combine_mapping",
    "header_units",
    "load_mapping",
    "split_header",
]

_HEADER_UNIT = re.compile(r"^(?P<name>.*?)\s*[\(\[]\s*(?P<unit>[^\)\]]*?)\s*[\)\]]\s*$")
_FT_IN_HEADERS = {
    "ft-in",
    "ft in",
    "ft/in",
    "ft & in",
    "ft and in",
    "ft+in",
    "feet and inches",
    "ft-in-fraction",
}



def split_header(header: str) -> tuple[str, str | None]:
    """``"Width (in)"`` -> (``"Width"``, ``"in"``); ``"Width"`` -> (``"Width"``, ``None``)."""
    m = _HEADER_UNIT.match(header)
    if m is None:
        return header.strip(), None
    return m.group("name").strip(), m.group("unit").strip() or None


_ALIASES: dict[str, str] = {}
for _c in COLUMNS:
    for _alias in (_c.field, split_header(_c.header)[0], *_c.aliases):
        _ALIASES.setdefault(norm(_alias), _c.field)
    _ALIASES.setdefault(norm(_c.field.removesuffix("_m").removesuffix("_mm")), _c.field)


def guess_mapping(headers: Sequence[str]) -> dict[str, str]:
    """Guess the field of each header: ``{header: field}`` for the headers it recognises.

    Units in brackets are ignored (``Width (in)`` is ``width_m``); case, spaces, ``_`` and
    punctuation do not matter; close misspellings are accepted. Each field goes to the first
    header that names it.
    """
    mapping: dict[str, str] = {}
    taken: set[str] = set()
    pending: list[str] = []
    for header in headers:
        if not header or header in mapping:
            continue
        key = norm(split_header(header)[0])
        field_name = _ALIASES.get(key)
        if field_name is not None and field_name not in taken:
            mapping[header] = field_name
            taken.add(field_name)
        else:
            pending.append(header)
    for header in pending:
        key = norm(split_header(header)[0])
        for match in difflib.get_close_matches(key, list(_ALIASES), n=3, cutoff=0.8):
            if _ALIASES[match] not in taken:
                mapping[header] = _ALIASES[match]
                taken.add(_ALIASES[match])
                break
    return {h: mapping[h] for h in headers if h in mapping}


def combine_mapping(guessed: Mapping[str, str], chosen: Mapping[str, str]) -> dict[str, str]:
    """``guessed`` overridden by ``chosen`` (e.g. a mapping file or the user's edits).

    A header in ``chosen`` takes its field from there (``""`` ignores the column); a field that
    ``chosen`` gives to a header is taken away from any other guessed header.
    """
    claimed = {f for f in chosen.values() if f}
    combined = {h: f for h, f in guessed.items() if h not in chosen and f not in claimed}
    combined.update({h: f for h, f in chosen.items() if f})
    return combined


def header_units(headers: Sequence[str]) -> dict[str, str]:
    """Units written in headers: ``{"Width (in)": "in", "Sill height [mm]": "mm"}``.

    ``(ft-in)`` and similar mean feet for a bare number. Units are not checked here;
    :func:`preview_import` reports an unknown one at row 1.
    """
    units: dict[str, str] = {}
    for header in headers:
        unit = split_header(header)[1]
        if unit:
            units[header] = "ft" if norm(unit) in {norm(u) for u in _FT_IN_HEADERS} else unit
    return units


class LoadedMapping(NamedTuple):
    """A mapping file: ``columns`` {header: field} and ``units`` {header: unit}."""

    columns: dict[str, str]
    units: dict[str, str]


def load_mapping(path: str | Path) -> LoadedMapping:
    """Read a mapping file (JSON).

    Either ``{"Header": "field", ...}`` or ``{"columns": {"Header": "field"}, "units":
    {"Header": "in"}}``. A field of ``""`` or ``null`` ignores the column. Raises
    :class:`ScheduleImportError` for a malformed file or an unknown field name.
    """
    path = Path(path)
    try:
        data = json.loads(path.read_text(encoding="utf-8-sig"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as exc:
        raise ScheduleImportError(f"{path.name}: cannot read the mapping ({exc})") from exc
    if not isinstance(data, dict):
        raise ScheduleImportError(f"{path.name}: a mapping is a JSON object")
    nested = isinstance(data.get("columns"), dict)
    columns_raw = data["columns"] if nested else data
    units_raw = data.get("units", {}) if nested else {}
    if not isinstance(columns_raw, dict) or not isinstance(units_raw, dict):
        raise ScheduleImportError(f"{path.name}: 'columns' and 'units' must be JSON objects")
    columns: dict[str, str] = {}
    for header, field_name in columns_raw.items():
        if field_name in (None, ""):
            columns[str(header)] = ""
            continue
        if not isinstance(field_name, str) or field_name not in SPEC:
            raise ScheduleImportError(
                f"{path.name}: column '{header}': unknown field {field_name!r}; "
                f"fields are {', '.join(SPEC)}"
            )
        columns[str(header)] = field_name
    units = {str(h): str(u) for h, u in units_raw.items()}
    return LoadedMapping(columns, units)


