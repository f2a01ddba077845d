"""The schedule preview without a screen: the grid of rows with bad cells marked, the length
of new facades, the placeholder facade of a blank building, and lengths said in feet."""

from __future__ import annotations

from pathlib import Path

import pytest

from petfall_audit.io.schedule import guess_mapping, preview_grid, preview_import, read_table
from petfall_audit.io.schedule.apply import new_facades, unused_facades
from petfall_audit.io.schedule.cells import in_system
from petfall_audit.model import (
    Building,
    BuildingInfo,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)

FIXTURES = Path(__file__).parents[1] / "fixtures" / "schedules"


def _building(*, openings: bool = True) -> Building:
    return Building(
        info=BuildingInfo(name="Larkspur Court"),
        floors=(Floor(0, "Ground", 0.0), Floor(1, "First", 4.5), Floor(2, "Second", 7.6)),
        facades=(Facade("north", 40.0), Facade("south", 40.0)),
        surfaces=(Surface("ground", SurfaceKind.CONCRETE, 0.0),
                  Surface("south-lawn", SurfaceKind.LAWN, 0.0, facade="south")),
        openings=(Opening("S-1", 1, "south", OpeningKind.BALCONY, 2.0, 3.0, 1.2),)
        if openings else (),
    )


def test_the_grid_marks_exactly_the_cells_the_preview_reports() -> None:
    table = read_table(FIXTURES / "bad.csv")
    preview = preview_import(table, guess_mapping(table.headers), _building())
    grid = preview_grid(table, preview)
    assert grid.row_count == preview.rows_read and grid.column_count == len(table.headers)
    located = {(p.row, p.letter) for p in preview.problems if p.letter}
    marked = {(grid.row_numbers[r], chr(65 + c)) for r, c in grid.bad_cells()}
    assert marked == located
    for r in range(grid.row_count):
        bad = grid.row_numbers[r] in preview.bad_rows
        assert (grid.status(r) == "skipped") == bad
    r = grid.index_of_row(4)
    assert r is not None
    assert grid.cell(r, 7).text == "-1.2" and "negative width" in grid.cell(r, 7).problem
    assert not grid.cell(r, 0).bad


def test_a_missing_column_is_a_problem_of_the_whole_file(tmp_path: Path) -> None:
    path = tmp_path / "s.csv"
    path.write_text("Opening ID,Floor,Type,Width\nA1,1,balcony,1.2\n", encoding="utf-8")
    table = read_table(path)
    grid = preview_grid(table, preview_import(table, guess_mapping(table.headers), _building()))
    assert grid.file_problems and "facade" in grid.file_problems[0]
    assert grid.status(0) == "skipped" and not grid.bad_cells()


def _opening(oid: str, facade: str, x_m: float, width_m: float) -> Opening:
    return Opening(oid, 1, facade, OpeningKind.BALCONY, x_m, width_m, 1.2)


def test_a_new_facade_reaches_past_its_last_opening_by_the_space_before_the_first() -> None:
    # documented rule (docs/schedule-import.md; common practice, no source)
    made = new_facades([_opening("E1", "east", 2.5, 3.0), _opening("E2", "east", 7.0, 3.0),
                        _opening("W1", "west", 0.0, 4.0)], _building())
    lengths = {f.id: f.length_m for f in made}
    assert lengths == {"east": pytest.approx(12.5), "west": pytest.approx(5.0)}


def test_only_a_building_without_openings_loses_its_unused_facades() -> None:
    brought = [_opening("E1", "east", 1.0, 3.0)]
    assert unused_facades(_building(openings=False), brought) == ("north", "south")
    assert unused_facades(_building(), brought) == ()  # a building with openings keeps its own
    on_north = [_opening("N1", "north", 1.0, 3.0)]
    assert unused_facades(_building(openings=False), on_north) == ()  # no facade of its own


@pytest.mark.parametrize(("metric", "imperial"), [
    # 1 ft = 0.3048 m and 1 in = 25.4 mm exactly (international yard and pound, 1959)
    ("runs to 41.148 m along", "runs to 135 ft 0 in along"),
    ("only 40 m long", "only 131 ft 3 in long"),
    ("a gap of 101.6 mm", "a gap of 4.0 in"),
    ("2 m² of net, 18.5 m/s", "2 m² of net, 18.5 m/s"),  # areas and speeds are not lengths
])
def test_messages_say_lengths_in_feet_for_a_file_in_feet(metric: str, imperial: str) -> None:
    assert in_system(metric, "imperial") == imperial
    assert in_system(metric, "metric") == metric
