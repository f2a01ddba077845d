"""The columns a schedule may hold, fed by the field registry, and the cell words they read.

Each :class:`ColumnSpec` is built from a :class:`~petfall_audit.field_registry.ScheduleColumnDef`:
its header, synonyms, limits and help come from the registry, so the editor, the building file
and the schedule name and bound a field the same way.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass
from enum import StrEnum
from typing import Literal

from petfall_audit.field_registry import ENUM_SYNONYMS, SCHEDULE_COLUMNS, ScheduleColumnDef
from petfall_audit.model import Opening

__all__ = [
    "Kind",
    "ColumnSpec",
    "COLUMNS",
    "FLOOR_FIELDS",
    "SPEC",
    "OPENING_DEFAULTS",
    "ENUM_SYNONYMS",
    "TRUE_WORDS",
    "FALSE_WORDS",
    "NONE_WORDS",
    "column_letter",
    "human",
    "norm",
]

Kind = Literal["text", "int", "length", "gap", "bool", "enum"]


@dataclass(frozen=True, slots=True)
class ColumnSpec:
    """One column a schedule may hold.

    ``field`` is the :class:`~petfall_audit.model.Opening` field (or ``floor_elevation_m`` /
    ``floor_label`` for the floor the row sits on); ``header`` the template's header (with its
    default unit); ``aliases`` other headers that mean the same; ``kind`` how cells are read:
    ``length`` in metres, ``gap`` in millimetres, ``enum`` one of ``choices``. ``words``: the
    column in a message ("rail or sill height").
    """

    field: str
    header: str
    kind: Kind
    required: bool = False
    aliases: tuple[str, ...] = ()
    choices: type[StrEnum] | None = None
    example: str = ""
    help: str = ""
    min_value: float | None = None
    max_value: float | None = None
    positive: bool = False  # the value must be more than ``min_value``
    words: str = ""

    @property
    def default_unit(self) -> str | None:
        """``m`` for lengths, ``mm`` for gaps, ``None`` for the rest."""
        return {"length": "m", "gap": "mm"}.get(self.kind)


_KIND: dict[str, Kind] = {"length": "length", "gap": "gap", "int": "int", "bool": "bool",
                          "enum": "enum"}


def _spec(col: ScheduleColumnDef) -> ColumnSpec:
    f = col.field
    kind = _KIND.get(f.kind, "text")
    numeric = kind in ("length", "gap")
    return ColumnSpec(
        field=col.key,
        header=col.header,
        kind=kind,
        required=col.required,
        aliases=col.aliases,
        choices=f.enum,
        example=col.example,
        help=col.help + (f" (blank = {col.blank})" if col.blank else ""),
        min_value=f.minimum if numeric else None,
        max_value=f.maximum if numeric else None,
        positive=f.exclusive_minimum and numeric,
        words=col.noun,
    )


#: Every column, in template order.
COLUMNS: tuple[ColumnSpec, ...] = tuple(_spec(c) for c in SCHEDULE_COLUMNS)

#: Fields that describe the row's floor rather than the opening.
FLOOR_FIELDS = frozenset({"floor_elevation_m", "floor_label"})

#: The column of each field name.
SPEC: dict[str, ColumnSpec] = {c.field: c for c in COLUMNS}

#: What an empty optional cell means: the model's default.
OPENING_DEFAULTS = {
    f.name: f.default for f in dataclasses.fields(Opening) if f.default is not dataclasses.MISSING
}
OPENING_DEFAULTS["x_m"] = 0.0  # a schedule without positions puts openings at the facade start

TRUE_WORDS = frozenset({"yes", "y", "true", "t", "1", "x", "✓", "ja", "oui", "si", "sí"})
FALSE_WORDS = frozenset({"no", "n", "false", "f", "0", "", "-", "nein", "non"})
NONE_WORDS = frozenset({"", "-", "—", "none", "n/a", "na", "solid", "no"})


def column_letter(index: int) -> str:
    """Spreadsheet letter of a 0-based column index: 0 -> ``A``, 26 -> ``AA``."""
    letters = ""
    index += 1
    while index:
        index, rem = divmod(index - 1, 26)
        letters = chr(65 + rem) + letters
    return letters


def human(field_name: str) -> str:
    """A column's field in a sentence (the registry's words)."""
    spec = SPEC.get(field_name)
    return spec.words if spec is not None else field_name.replace("_", " ")


def norm(text: str) -> str:
    """``text`` for matching: lower case, ``_`` and punctuation as spaces, ``&`` as ``and``."""
    text = text.lower().replace("_", " ").replace("&", " and ")
    text = re.sub(r"[^\w?]+", " ", text)
    return re.sub(r"\s+", " ", text).strip()
