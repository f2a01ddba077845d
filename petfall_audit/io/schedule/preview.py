"""Step 3 of a schedule import: parse every row against the building, without changing it.

:func:`preview_import` returns an :class:`ImportPreview`: the openings, floors and facades an
import would add or change and every problem, located by spreadsheet row (the header is row 1)
and column. Each cell is read by :mod:`.cells` (lengths with :mod:`petfall_audit.units`: a unit
in the cell wins over a unit in the header, which wins over the column's own default: metres,
or millimetres for gaps); the rows are then checked together and against the building.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

from petfall_audit.io.schedule.apply import merged, new_facades, opening_of, unused_facades
from petfall_audit.io.schedule.cells import Column, file_system, in_system, parse_cell
from petfall_audit.io.schedule.columns import (
    COLUMNS,
    FLOOR_FIELDS,
    OPENING_DEFAULTS,
    SPEC,
    ColumnSpec,
    column_letter,
    human,
    norm,
)
from petfall_audit.io.schedule.mapping import header_units
from petfall_audit.io.schedule.read import RawTable
from petfall_audit.model import WINDOW_KINDS, Building, Facade, Floor, Opening
from petfall_audit.present.numbers import fmt_count, plural
from petfall_audit.present.numbers import fmt_length as format_length
from petfall_audit.safe_text import MAX_MESSAGE_CHARS, cut
from petfall_audit.units import parse_length_m

__all__ = ["ImportProblem", "ImportPreview", "preview_import"]


@dataclass(frozen=True, slots=True)
class ImportProblem:
    """A problem at spreadsheet ``row`` (header = 1; 0 = the whole file) and ``column``.

    ``column`` is the header text (``""`` when the problem is not in one column), ``letter`` the
    spreadsheet column letter (``""`` likewise).
    """

    row: int
    column: str
    message: str
    letter: str = ""

    def __post_init__(self) -> None:
        # a message never grows with the cell it is about (long values are cut)
        object.__setattr__(self, "column", cut(self.column))
        object.__setattr__(self, "message", cut(self.message, MAX_MESSAGE_CHARS))

    def __str__(self) -> str:
        where = f"row {self.row}" if self.row else "file"
        if self.column or self.letter:
            col = f"{self.letter} ({self.column})" if self.letter else f"'{self.column}'"
            where += f", column {col}"
        return f"{where}: {self.message}"


@dataclass(frozen=True, slots=True)
class ImportPreview:
    """What an import would do, before it is applied.

    ``values``: one dict per valid row of the fields its mapped cells set (SI units, model
    types), with ``rows`` the spreadsheet row of each; ``openings`` the same rows as
    :class:`Opening` objects built on the model defaults. ``floors``: floors the schedule adds
    or changes. ``facades``: facades the import would create. ``updates``: ids of openings the
    building already has (a merge changes them; a replace drops all others). ``problems``: every
    bad cell and row. ``bad_rows``: rows that will not be imported. ``removed_facades``: ids of
    the unused facades of a blank building that the import removes. ``system``: ``"imperial"``
    when the file gives lengths in feet or inches (messages and the summary then say lengths in
    feet and inches), else ``"metric"``.
    """

    openings: tuple[Opening, ...]
    rows: tuple[int, ...]
    values: tuple[Mapping[str, Any], ...]
    floors: tuple[Floor, ...]
    facades: tuple[Facade, ...]
    updates: tuple[str, ...]
    problems: tuple[ImportProblem, ...]
    bad_rows: tuple[int, ...]
    ignored_columns: tuple[str, ...]
    rows_read: int
    mapping: Mapping[str, str] = field(default_factory=dict)
    removed_facades: tuple[str, ...] = ()
    system: str = "metric"

    @property
    def ok(self) -> bool:
        """True when there is nothing to report and at least one opening to import."""
        return not self.problems and bool(self.openings)

    def problems_at(self, row: int) -> tuple[ImportProblem, ...]:
        """Problems of one spreadsheet row."""
        return tuple(p for p in self.problems if p.row == row)

    def summary(self) -> str:
        """One line: rows read, openings, floors and facades it would add, rows refused."""
        new = len(self.openings) - len(self.updates)
        parts = [
            f"{fmt_count(self.rows_read, 'row')} read",
            f"{fmt_count(new, 'new opening')}",
            f"{fmt_count(len(self.updates), 'existing opening')} matched",
        ]
        if self.floors:
            parts.append(f"{fmt_count(len(self.floors), 'floor')} added or changed")
        if self.facades:
            parts.append(
                f"{fmt_count(len(self.facades), 'new facade')}: "
                + ", ".join(f"{f.id} ({format_length(f.length_m, self.system)} long)"
                            for f in self.facades)
            )
        if self.removed_facades:
            parts.append(f"{plural(len(self.removed_facades), 'unused facade')} removed: "
                         + ", ".join(self.removed_facades))
        if self.bad_rows:
            parts.append(f"{fmt_count(len(self.bad_rows), 'row')} with problems")
        return "; ".join(parts)


def _resolve_columns(
    table: RawTable, mapping: Mapping[str, str], units: Mapping[str, str]
) -> tuple[list[Column], list[ImportProblem], list[str]]:
    problems: list[ImportProblem] = []
    columns: list[Column] = []
    ignored: list[str] = []
    seen_headers: dict[str, int] = {}
    by_field: dict[str, str] = {}
    for index, header in enumerate(table.headers):
        letter = column_letter(index)
        field_name = mapping.get(header, "")
        if not field_name:
            if header:
                ignored.append(header)
            continue
        if header in seen_headers:
            problems.append(
                ImportProblem(1, header, "the same header appears twice; rename one", letter)
            )
            continue
        seen_headers[header] = index
        spec = SPEC.get(field_name)
        if spec is None:
            problems.append(ImportProblem(1, header, f"unknown field '{field_name}'", letter))
            continue
        if field_name in by_field:
            problems.append(
                ImportProblem(
                    1,
                    header,
                    f"'{human(field_name)}' is already read from column '{by_field[field_name]}'",
                    letter,
                )
            )
            continue
        by_field[field_name] = header
        unit = units.get(header)
        if unit is not None and spec.default_unit is None:
            problems.append(
                ImportProblem(
                    1, header, f"a unit ('{unit}') makes no sense for {human(field_name)}", letter
                )
            )
            continue
        if unit is not None:
            try:
                parse_length_m("1", default_unit=unit)
            except ValueError as exc:
                problems.append(ImportProblem(1, header, f"header unit: {exc}", letter))
                continue
        columns.append(Column(index, header, spec, unit or spec.default_unit))
    for spec in COLUMNS:
        if spec.required and spec.field not in by_field:
            problems.append(
                ImportProblem(
                    1,
                    "",
                    f"no column holds the {human(spec.field)} "
                    f"(expected a header such as '{spec.header}')",
                )
            )
    return columns, problems, ignored


def preview_import(
    table: RawTable,
    mapping: Mapping[str, str],
    building: Building,
    *,
    units: Mapping[str, str] | None = None,
) -> ImportPreview:
    """Parse every row of ``table`` against ``building`` and report what an import would do.

    ``mapping`` is {header: field} (see :func:`guess_mapping`); ``units`` {header: unit} for
    bare numbers (default: :func:`header_units` of the table's headers). A row's floor must
    exist in the building unless the schedule gives that floor an elevation (column
    ``floor_elevation_m``, in this row or another). Every problem names its row and column.
    """
    if units is None:
        units = header_units(table.headers)
    columns, problems, ignored = _resolve_columns(table, mapping, units)
    fatal = bool(problems)
    floor_labels = {norm(f.label): f.level for f in building.floors if f.label}
    building_levels = {f.level: f for f in building.floors}

    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]] = []
    for row_number, cells in table.rows:
        values: dict[str, Any] = {}
        row_problems: list[ImportProblem] = []
        for col in columns:
            text = cells[col.position] if col.position < len(cells) else ""
            letter = column_letter(col.position)
            if not text:
                if col.spec.required:
                    row_problems.append(
                        ImportProblem(
                            row_number, col.header, f"empty {human(col.spec.field)}", letter
                        )
                    )
                elif col.spec.field not in FLOOR_FIELDS:
                    values[col.spec.field] = _blank_value(col.spec)
                continue
            try:
                values[col.spec.field] = parse_cell(text, col, floor_labels)
            except ValueError as exc:
                row_problems.append(ImportProblem(row_number, col.header, str(exc), letter))
        extra = [i for i in range(len(table.headers), len(cells)) if cells[i]]
        if extra:
            row_problems.append(
                ImportProblem(
                    row_number,
                    "",
                    f"cells beyond the last header (column "
                    f"{column_letter(extra[0])}); add a header or remove them",
                    column_letter(extra[0]),
                )
            )
        parsed.append((row_number, values, row_problems))

    header_of = {c.spec.field: c for c in columns}
    system = file_system(columns)
    floors, floor_rows = _schedule_floors(parsed, header_of, building_levels, system)
    known_levels = set(building_levels) | set(floors)
    _check_rows(parsed, header_of, known_levels)
    if not fatal:
        _check_merged(parsed, header_of, building, floors, floor_rows, system)

    good = [(n, v) for n, v, p in parsed if not p and not fatal]
    for _, _, row_problems in parsed:
        problems.extend(row_problems)
    openings = tuple(opening_of(values) for _, values in good)
    existing_ids = {o.id for o in building.openings}
    return ImportPreview(
        openings=openings,
        rows=tuple(n for n, _ in good),
        values=tuple(v for _, v in good),
        floors=_floors_to_apply(floors, [v for _, v in good], building_levels),
        facades=new_facades(openings, building),
        updates=tuple(o.id for o in openings if o.id in existing_ids),
        problems=tuple(sorted(problems, key=lambda p: (p.row, p.letter.rjust(3), p.message))),
        bad_rows=tuple(
            sorted({n for n, _, p in parsed if p} if not fatal else {n for n, _, _ in parsed})
        ),
        ignored_columns=tuple(ignored),
        rows_read=len(table.rows),
        mapping=dict(mapping),
        removed_facades=unused_facades(building, openings) if openings else (),
        system=system,
    )


def _floors_to_apply(
    floors: Mapping[int, Floor],
    values: Sequence[Mapping[str, Any]],
    building_levels: Mapping[int, Floor],
) -> tuple[Floor, ...]:
    """Schedule floors that valid rows stand on and that are new or differ from the building."""
    used = {v["floor"] for v in values}
    return tuple(
        sorted(
            (f for level, f in floors.items() if level in used and building_levels.get(level) != f),
            key=lambda f: f.level,
        )
    )




def _check_merged(
    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]],
    header_of: Mapping[str, Column],
    building: Building,
    floors: Mapping[int, Floor],
    floor_rows: Mapping[int, int],
    system: str = "metric",
) -> None:
    """Check the building the good rows would make (facade lengths, floor order, escape
    windows...) with :func:`validate_building`; add each problem of an imported opening or floor
    to its row. Problems the building had already are not the schedule's and are left out."""
    from petfall_audit.io.building_file import validate_building

    good = [(n, v) for n, v, p in parsed if not p]
    if not good:
        return
    openings = [opening_of(v) for _, v in good]
    levels = {f.level: f for f in building.floors}
    trial = merged(
        building,
        openings,
        [v for _, v in good],
        _floors_to_apply(floors, [v for _, v in good], levels),
        "merge",
    )
    row_of_id = {v["id"]: n for n, v in good}
    new_facades = {f.id for f in trial.facades} - {f.id for f in building.facades}
    problems_of = {n: p for n, _, p in parsed}
    for problem in validate_building(trial):
        place = problem.place
        section, index = place.section, place.index
        if section not in ("openings", "floors", "facades") or index is None:
            continue
        field_name = place.field.replace("[", ".").split(".", 1)[0]
        rows: list[int] = []
        if section == "openings":
            rows = [row_of_id[i] for i in (trial.openings[index].id,) if i in row_of_id]
        elif section == "floors":
            rows = [r for r in (floor_rows.get(trial.floors[index].level),) if r is not None]
            field_name = "floor_elevation_m" if field_name == "elevation_m" else field_name
        elif trial.facades[index].id in new_facades:  # a facade the schedule creates
            rows = [n for n, v in good if v["facade"] == trial.facades[index].id]
            field_name = "facade"
        col = header_of.get(field_name)
        message = problem.message if col else f"{field_name or 'row'}: {problem.message}"
        if section == "facades" and trial.facades[index].id in new_facades:
            message = (
                f"facade {trial.facades[index].id!r} is not in the building, so this import "
                f"would create it with nothing below it ({problem.message}); check the name, or "
                "add the facade and what lies below it first"
            )
        for row in rows:
            problems_of[row].append(
                ImportProblem(
                    row,
                    col.header if col else "",
                    in_system(message, system),
                    column_letter(col.position) if col else "",
                )
            )


def _blank_value(spec: ColumnSpec) -> Any:
    """What an empty optional cell means: the model default (``None``, no, 0, 1.1 m...)."""
    return OPENING_DEFAULTS.get(spec.field)


def _schedule_floors(
    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]],
    header_of: Mapping[str, Column],
    building_levels: Mapping[int, Floor],
    system: str = "metric",
) -> tuple[dict[int, Floor], dict[int, int]]:
    """Floors that rows define with an elevation, and the row that first defines each; a
    second, different definition is a problem."""
    floors: dict[int, Floor] = {}
    first_row: dict[int, int] = {}
    if "floor_elevation_m" not in header_of:
        return floors, first_row
    col = header_of["floor_elevation_m"]
    for row_number, values, row_problems in parsed:
        level = values.get("floor")
        elevation = values.get("floor_elevation_m")
        if level is None or elevation is None:
            continue
        old = building_levels.get(level)
        label = values.get("floor_label") or (old.label if old else _default_label(level))
        floor = Floor(level=level, label=label, elevation_m=elevation)
        if level in floors:
            prev = floors[level]
            if not math.isclose(prev.elevation_m, elevation, abs_tol=1e-6) or (
                "floor_label" in values and prev.label != label
            ):
                row_problems.append(
                    ImportProblem(
                        row_number,
                        col.header,
                        in_system(f"floor {level} was given elevation {prev.elevation_m:g} m "
                                  f"and label '{prev.label}' in row {first_row[level]}; rows "
                                  "disagree", system),
                        column_letter(col.position),
                    )
                )
            continue
        floors[level] = floor
        first_row[level] = row_number
    return floors, first_row


def _default_label(level: int) -> str:
    return "Ground" if level == 0 else f"Level {level}"


def _check_rows(
    parsed: list[tuple[int, dict[str, Any], list[ImportProblem]]],
    header_of: Mapping[str, Column],
    known_levels: set[int],
) -> None:
    """Row-level checks: unknown floor, duplicate id, a window with a projection."""
    first_id_row: dict[str, int] = {}

    def at(field_name: str, row_number: int, message: str) -> ImportProblem:
        col = header_of.get(field_name)
        return ImportProblem(
            row_number,
            col.header if col else "",
            message,
            column_letter(col.position) if col else "",
        )

    for row_number, values, row_problems in parsed:
        level = values.get("floor")
        if level is not None and level not in known_levels:
            hint = (
                "; add it to the building first, or give its elevation in the "
                "floor elevation column"
            )
            row_problems.append(at("floor", row_number, f"unknown floor {level}{hint}"))
        opening_id = values.get("id")
        if opening_id:
            if opening_id in first_id_row:
                row_problems.append(
                    at(
                        "id",
                        row_number,
                        f"duplicate id '{opening_id}' (also in row {first_id_row[opening_id]})",
                    )
                )
            else:
                first_id_row[opening_id] = row_number
        kind = values.get("kind")
        if kind in WINDOW_KINDS and (values.get("projection_m") or 0.0) > 0.0:
            row_problems.append(
                at("projection_m", row_number, "a window has no projection; leave it blank or 0")
            )
