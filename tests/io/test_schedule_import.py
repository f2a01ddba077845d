"""Tests for importing opening schedules (petfall_audit.io.schedule, .template and the CLI)."""

from __future__ import annotations

import csv
import dataclasses
import json
from pathlib import Path

import openpyxl
import pytest

from petfall_audit.cli import main
from petfall_audit.errors import ScheduleImportError
from petfall_audit.io.building_file import load_building, save_building, validate_building
from petfall_audit.io.schedule import (
    COLUMNS,
    apply_import,
    column_letter,
    combine_mapping,
    guess_mapping,
    header_units,
    load_mapping,
    preview_import,
    read_table,
)
from petfall_audit.io.template import template_example, template_headers, write_template
from petfall_audit.model import (
    Building,
    BuildingInfo,
    CatsPresent,
    Facade,
    Floor,
    Opening,
    OpeningKind,
    Screen,
    Surface,
    SurfaceKind,
)

FIXTURES = Path(__file__).parents[1] / "fixtures" / "schedules"


def _building(openings: tuple[Opening, ...] = ()) -> Building:
    """An invented four-storey block with a tall ground floor."""
    return Building(
        info=BuildingInfo(name="Larkspur Court", address="14 Invented Row"),
        floors=(
            Floor(0, "Ground", 0.0),
            Floor(1, "First", 4.5),
            Floor(2, "Second", 7.6),
            Floor(3, "Third", 10.7),
        ),
        facades=(Facade("north", 40.0), Facade("south", 40.0)),
        surfaces=(Surface("ground", SurfaceKind.CONCRETE, 0.0),),  # in front of every facade
        openings=openings,
    )


def _preview(name: str, building: Building | None = None):  # type: ignore[no-untyped-def]
    table = read_table(FIXTURES / name)
    return preview_import(table, guess_mapping(table.headers), building or _building())


def _write_csv(path: Path, rows: list[list[str]], delimiter: str = ",") -> Path:
    with path.open("w", newline="", encoding="utf-8") as fh:
        csv.writer(fh, delimiter=delimiter).writerows(rows)
    return path


# --- the checks ---------------------------------------------------------------------


def test_feet_and_inches_import_to_the_same_model_as_metres() -> None:
    # the imperial fixture holds the metric fixture's values written in feet and inches (cell
    # units, header units, marks, fractions, trade words); 1 in = 25.4 mm exactly (1959)
    metric = _preview("metric.csv")
    imperial = _preview("imperial.csv")
    assert metric.problems == ()
    assert imperial.problems == ()
    assert len(metric.openings) == 5
    assert imperial.openings == metric.openings
    assert imperial.floors == metric.floors
    assert imperial.facades == metric.facades
    b = _building()
    assert apply_import(b, imperial) == apply_import(b, metric)


def test_imported_values() -> None:
    preview = _preview("metric.csv")
    balcony = preview.openings[0]
    assert balcony.id == "N-01-B1"
    assert balcony.kind is OpeningKind.BALCONY
    assert balcony.perch_height_m == pytest.approx(1.0668)  # "1066.8 mm" in a metre column
    assert balcony.largest_gap_mm == pytest.approx(101.6)
    assert balcony.limiter_gap_mm is None  # blank: no limiter
    assert balcony.flat_rail_top is True
    assert balcony.cats_present is CatsPresent.YES
    window = preview.openings[1]
    assert window.kind is OpeningKind.WINDOW_CASEMENT
    assert window.escape_window is True
    assert window.screen is Screen.INSECT
    assert window.projection_m == 0.0
    # floor 4 is new: the schedule gives its elevation (45 ft = 13.716 m) and label
    assert preview.floors == (Floor(4, "Roof terrace level", 13.716),)
    # facade "east" is new: its opening reaches 40 ft = 12.192 m from x = 0, plus the 1 m least
    # margin, rounded up to 0.1 m (the documented rule; common practice, no source)
    assert [(f.id, f.length_m) for f in preview.facades] == [("east", 13.2)]
    assert preview.rows == (2, 3, 4, 5, 6)


def test_bad_rows_are_each_reported_with_row_and_column() -> None:
    preview = _preview("bad.csv")
    found = {(p.row, p.letter) for p in preview.problems}
    assert (3, "B") in found  # unknown floor 9
    assert (4, "H") in found  # negative width
    assert (5, "H") in found  # unknown unit "mtrs"
    assert (6, "A") in found  # empty id
    assert (7, "A") in found  # duplicate id G-1 (first in row 2)
    assert (8, "F") in found  # unknown type "balcone"
    assert (8, "J") in found  # "3 kg" is not a length
    messages = {(p.row, p.letter): p.message for p in preview.problems}
    assert "unknown floor 9" in messages[(3, "B")]
    assert "negative width" in messages[(4, "H")]
    assert "unknown unit 'mtrs'" in messages[(5, "H")]
    assert "empty id" in messages[(6, "A")]
    assert "duplicate id 'G-1'" in messages[(7, "A")] and "row 2" in messages[(7, "A")]
    assert str(preview.problems_at(4)[0]).startswith("row 4, column H (Width (m)):")
    assert preview.bad_rows == (3, 4, 5, 6, 7, 8)
    assert [o.id for o in preview.openings] == ["G-1", "G-8"]


def test_nothing_is_applied_unless_the_valid_rows_are_accepted() -> None:
    building = _building()
    preview = _preview("bad.csv", building)
    with pytest.raises(ScheduleImportError, match="problem"):
        apply_import(building, preview)
    assert building.openings == ()  # the building is immutable; nothing changed
    accepted = apply_import(building, preview, accept_valid_rows=True)
    assert [o.id for o in accepted.openings] == ["G-1", "G-8"]
    assert validate_building(accepted) == []


def test_template_imports_with_no_mapping(tmp_path: Path) -> None:
    for name, system in (("t.csv", "metric"), ("t.xlsx", "metric"), ("ti.xlsx", "imperial")):
        path = tmp_path / name
        write_template(path, system=system)
        table = read_table(path)
        assert table.headers == template_headers(system)
        mapping = guess_mapping(table.headers)
        assert sorted(mapping.values()) == sorted(c.field for c in COLUMNS)
        preview = preview_import(table, mapping, _building())
        assert preview.problems == (), name
        assert [o.id for o in preview.openings] == ["N-01-B1"]


def test_metric_and_imperial_templates_describe_the_same_example(tmp_path: Path) -> None:
    previews = []
    for system in ("metric", "imperial"):
        path = tmp_path / f"{system}.csv"
        write_template(path, system=system)
        previews.append(
            preview_import(read_table(path), guess_mapping(template_headers(system)), _building())
        )
    metric, imperial = previews
    # the imperial example is the metric one rounded to the inch (1 in = 25.4 mm)
    for field in ("x_m", "width_m", "projection_m", "perch_height_m"):
        a = getattr(metric.openings[0], field)
        b = getattr(imperial.openings[0], field)
        assert b == pytest.approx(a, abs=0.0254 / 2), field
    assert len(template_example("imperial")) == len(template_headers("imperial"))


# --- reading files --------------------------------------------------------------------------


def test_xlsx_with_numeric_cells_matches_csv(tmp_path: Path) -> None:
    workbook = openpyxl.Workbook()
    sheet = workbook.active
    with (FIXTURES / "metric.csv").open(encoding="utf-8") as fh:
        for row in csv.reader(fh):
            sheet.append([_number_or_text(cell) for cell in row])
    workbook.create_sheet("Other").append(["ignored"])
    path = tmp_path / "metric.xlsx"
    workbook.save(path)
    from_xlsx = preview_import(
        read_table(path), guess_mapping(read_table(path).headers), _building()
    )
    assert from_xlsx.problems == ()
    assert from_xlsx.openings == _preview("metric.csv").openings


def _number_or_text(cell: str) -> object:
    try:
        return int(cell)
    except ValueError:
        pass
    try:
        return float(cell)
    except ValueError:
        return cell or None


def test_semicolons_and_decimal_commas(tmp_path: Path) -> None:
    path = _write_csv(
        tmp_path / "eu.csv",
        [
            ["Opening ID", "Floor", "Facade", "Type", "Width (m)", "Rail height (mm)"],
            ["A1", "1", "north", "balcony", "1,2", "1100"],
            ["A2", "1", "north", "balcony", "2,25 m", "1,1 m"],
        ],
        delimiter=";",
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), _building())
    assert preview.problems == ()
    assert [o.width_m for o in preview.openings] == [pytest.approx(1.2), pytest.approx(2.25)]
    assert [o.perch_height_m for o in preview.openings] == [pytest.approx(1.1)] * 2


def test_custom_headers_with_a_mapping_file() -> None:
    table = read_table(FIXTURES / "custom_headers.csv")
    loaded = load_mapping(FIXTURES / "custom_headers.map.json")
    mapping = combine_mapping(guess_mapping(table.headers), loaded.columns)
    assert mapping["Ref"] == "id" and mapping["Elevation side"] == "facade"
    assert mapping["Rail (in)"] == "perch_height_m" and mapping["Remarks"] == "notes"
    assert "Tenant" not in mapping
    units = {**header_units(table.headers), **loaded.units}
    preview = preview_import(table, mapping, _building(), units=units)
    assert preview.problems == ()
    a101, a102, a201 = preview.openings
    assert a101.width_m == pytest.approx(126 * 0.0254)  # "W" is in inches by the mapping file
    assert a101.perch_height_m == pytest.approx(42 * 0.0254)  # header "Rail (in)"
    assert a102.kind is OpeningKind.WINDOW_HUNG  # "Sash window"
    assert a201.floor == 2  # floor label "Second" from the building
    assert a201.width_m == pytest.approx(1.2)  # "1,2 m": the cell's unit wins
    assert preview.rows == (2, 3, 6)  # the comment row and the blank row are skipped


def test_missing_required_column_is_reported_once_and_blocks_every_row(tmp_path: Path) -> None:
    path = _write_csv(
        tmp_path / "s.csv",
        [
            ["Opening ID", "Floor", "Type", "Width"],
            ["A1", "1", "balcony", "1.2"],
        ],
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), _building())
    assert [(p.row, p.message) for p in preview.problems] == [
        (1, "no column holds the facade (expected a header such as 'Facade')")
    ]
    assert preview.openings == () and preview.bad_rows == (2,)
    with pytest.raises(ScheduleImportError):
        apply_import(_building(), preview, accept_valid_rows=True)


def test_unknown_header_unit_is_refused(tmp_path: Path) -> None:
    path = _write_csv(
        tmp_path / "s.csv",
        [
            ["Opening ID", "Floor", "Facade", "Type", "Width (cubit-ish)"],
            ["A1", "1", "north", "balcony", "3"],
        ],
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), _building())
    assert [(p.row, p.letter) for p in preview.problems] == [(1, "E")]
    assert "header unit" in preview.problems[0].message


def test_rows_checked_against_the_building(tmp_path: Path) -> None:
    # an opening that runs past the end of its facade, and a window with a projection
    path = _write_csv(
        tmp_path / "s.csv",
        [
            [
                "Opening ID",
                "Floor",
                "Facade",
                "Type",
                "Position (m)",
                "Width (m)",
                "Projection (m)",
            ],
            ["A1", "1", "north", "balcony", "39", "3", "1.5"],
            ["A2", "1", "north", "window_hung", "1", "1", "0.5"],
            ["A3", "1", "north", "window_hung", "3", "1", ""],
        ],
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), _building())
    assert {(p.row, p.letter) for p in preview.problems} == {(2, "E"), (3, "G")}
    assert [o.id for o in preview.openings] == ["A3"]


def test_conflicting_floor_elevations(tmp_path: Path) -> None:
    path = _write_csv(
        tmp_path / "s.csv",
        [
            ["Opening ID", "Floor", "Floor elevation (m)", "Facade", "Type", "Width (m)"],
            ["A1", "5", "16.8", "north", "balcony", "3"],
            ["A2", "5", "17.2", "north", "balcony", "3"],
            ["A3", "5", "", "north", "balcony", "3"],
        ],
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), _building())
    assert [(p.row, p.letter) for p in preview.problems] == [(3, "C")]
    assert preview.floors == (Floor(5, "Level 5", 16.8),)


# --- merge and replace ----------------------------------------------------------------------


def test_merge_updates_matching_ids_and_keeps_unmapped_fields(tmp_path: Path) -> None:
    old = Opening(
        "N-01-B1",
        1,
        "north",
        OpeningKind.BALCONY,
        2.0,
        3.0,
        projection_m=1.2,
        netting_mesh_mm=30.0,
        notes="surveyed last year",
    )
    keep = Opening("S-01-B1", 1, "south", OpeningKind.BALCONY, 0.0, 3.0, projection_m=1.2)
    building = _building((old, keep))
    path = _write_csv(
        tmp_path / "s.csv",
        [
            ["Opening ID", "Floor", "Facade", "Type", "Width", "Rail height (in)"],
            ["N-01-B1", "1", "north", "balcony", "3.5", "44"],
            ["N-01-B2", "1", "north", "balcony", "3.5", "44"],
        ],
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), building)
    assert preview.updates == ("N-01-B1",)
    merged = apply_import(building, preview, mode="merge")
    assert [o.id for o in merged.openings] == ["N-01-B1", "S-01-B1", "N-01-B2"]
    updated = merged.opening("N-01-B1")
    assert updated.width_m == 3.5 and updated.perch_height_m == pytest.approx(44 * 0.0254)
    assert updated.netting_mesh_mm == 30.0 and updated.notes == "surveyed last year"
    assert updated.x_m == 2.0  # no position column: kept
    replaced = apply_import(building, preview, mode="replace")
    assert [o.id for o in replaced.openings] == ["N-01-B1", "N-01-B2"]
    assert replaced.opening("N-01-B1").netting_mesh_mm is None
    assert replaced.floors == building.floors and replaced.facades == building.facades
    with pytest.raises(ValueError, match="mode"):
        apply_import(building, preview, mode="upsert")  # type: ignore[arg-type]


def test_apply_refuses_a_stale_preview() -> None:
    building = _building()
    preview = _preview("metric.csv", building)
    smaller = dataclasses.replace(building, floors=building.floors[:2])
    with pytest.raises(ScheduleImportError, match="preview the schedule again"):
        apply_import(smaller, preview)


# --- mapping --------------------------------------------------------------------------------


def test_guess_mapping_reads_trade_headers() -> None:
    headers = [
        "Window Ref",
        "LEVEL",
        "Façade",
        "Opening type",
        "Clear width (in)",
        "Sill height [mm]",
        "Baluster gap",
        "Restrictor",
        "Egress window",
        "Remarks",
        "Whatever",
    ]
    mapping = guess_mapping(headers)
    assert mapping == {
        "Window Ref": "id",
        "LEVEL": "floor",
        "Façade": "facade",
        "Opening type": "kind",
        "Clear width (in)": "width_m",
        "Sill height [mm]": "perch_height_m",
        "Baluster gap": "largest_gap_mm",
        "Restrictor": "limiter_gap_mm",
        "Egress window": "escape_window",
        "Remarks": "notes",
    }
    assert header_units(headers) == {"Clear width (in)": "in", "Sill height [mm]": "mm"}
    assert guess_mapping(["Widht"]) == {"Widht": "width_m"}  # a close misspelling


def test_load_mapping_refuses_unknown_fields(tmp_path: Path) -> None:
    path = tmp_path / "m.json"
    path.write_text(json.dumps({"Ref": "identifier"}), encoding="utf-8")
    with pytest.raises(ScheduleImportError, match="unknown field 'identifier'"):
        load_mapping(path)
    path.write_text("[1, 2]", encoding="utf-8")
    with pytest.raises(ScheduleImportError):
        load_mapping(path)
    path.write_text(json.dumps({"Ref": "id", "Owner": None}), encoding="utf-8")
    assert load_mapping(path).columns == {"Ref": "id", "Owner": ""}


def test_column_letters() -> None:
    # spreadsheet column naming: A..Z, AA.., as in any spreadsheet program
    assert [column_letter(i) for i in (0, 25, 26, 27, 701, 702)] == [
        "A",
        "Z",
        "AA",
        "AB",
        "ZZ",
        "AAA",
    ]


def test_read_table_refuses_other_files(tmp_path: Path) -> None:
    with pytest.raises(ScheduleImportError, match="csv or .xlsx"):
        read_table(tmp_path / "schedule.ods")
    empty = tmp_path / "empty.csv"
    empty.write_text("", encoding="utf-8")
    with pytest.raises(ScheduleImportError, match="empty"):
        read_table(empty)
    broken = tmp_path / "broken.xlsx"
    broken.write_bytes(b"not a zip")
    with pytest.raises(ScheduleImportError, match="cannot read"):
        read_table(broken)


# --- command line ---------------------------------------------------------------------------


def test_cli_import_and_template(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    into = tmp_path / "court.json"
    save_building(_building(), into)
    assert main(["import", str(FIXTURES / "imperial.csv"), "--into", str(into)]) == 0
    out = capsys.readouterr().out
    assert "5 new openings" in out and "not a structural" in out
    loaded = load_building(into)
    assert [o.id for o in loaded.openings] == [o.id for o in _preview("metric.csv").openings]

    template = tmp_path / "blank.xlsx"
    assert main(["template", str(template), "--units", "imperial"]) == 0
    assert read_table(template).headers == template_headers("imperial")


def test_cli_import_reports_problems_and_exits_2(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    into = tmp_path / "court.json"
    save_building(_building(), into)
    before = into.read_bytes()
    assert main(["import", str(FIXTURES / "bad.csv"), "--into", str(into)]) == 2
    err = capsys.readouterr().err
    assert "row 4, column H (Width (m)): negative width" in err
    assert "--accept-valid" in err
    assert into.read_bytes() == before  # nothing written
    assert (
        main(
            [
                "import",
                str(FIXTURES / "bad.csv"),
                "--into",
                str(into),
                "--accept-valid",
                "--mode",
                "replace",
            ]
        )
        == 0
    )
    assert [o.id for o in load_building(into).openings] == ["G-1", "G-8"]


def test_cli_import_with_mapping_file(tmp_path: Path) -> None:
    into = tmp_path / "court.json"
    save_building(_building(), into)
    code = main(
        [
            "import",
            str(FIXTURES / "custom_headers.csv"),
            "--into",
            str(into),
            "--map",
            str(FIXTURES / "custom_headers.map.json"),
        ]
    )
    assert code == 0
    assert [o.id for o in load_building(into).openings] == ["A-101", "A-102", "A-201"]
    # without the mapping the facade column is not recognised: refused, exit 2
    save_building(_building(), into)
    assert main(["import", str(FIXTURES / "custom_headers.csv"), "--into", str(into)]) == 2


def test_building_checks_land_on_the_row_that_caused_them(tmp_path: Path) -> None:
    # floor 4 below floor 3 (10.7 m), and a balcony marked as an escape window
    path = _write_csv(
        tmp_path / "s.csv",
        [
            [
                "Opening ID",
                "Floor",
                "Floor elevation (m)",
                "Facade",
                "Type",
                "Width (m)",
                "Escape window",
            ],
            ["A1", "4", "5.0", "north", "balcony", "3", "no"],
            ["A2", "1", "", "north", "balcony", "3", "yes"],
            ["A3", "1", "", "north", "window_casement", "1", "yes"],
        ],
    )
    preview = preview_import(read_table(path), guess_mapping(read_table(path).headers), _building())
    found = {(p.row, p.letter): p.message for p in preview.problems}
    assert set(found) == {(2, "C"), (3, "G")}
    assert "not above level 3" in found[(2, "C")]
    assert [o.id for o in preview.openings] == ["A3"]


@pytest.mark.parametrize("name", ["missing.csv", "missing.xlsx", "folder.csv"])
def test_unreadable_schedule_is_a_schedule_import_error(tmp_path: Path, name: str) -> None:
    (tmp_path / "folder.csv").mkdir()
    with pytest.raises(ScheduleImportError, match="cannot read the file"):
        read_table(tmp_path / name)


def test_cli_import_of_a_missing_schedule_exits_2(tmp_path: Path,
                                                   capsys: pytest.CaptureFixture[str]) -> None:
    into = tmp_path / "b.json"
    save_building(_building(), into)
    assert main(["import", str(tmp_path / "missing.csv"), "--into", str(into)]) == 2
    assert "cannot read the file" in capsys.readouterr().err


def test_a_facade_the_building_lacks_is_named_as_the_cause(tmp_path: Path) -> None:
    """A row on a facade the building does not have would create it with nothing below: the
    problem names the facade as the cause, on the facade cell."""
    path = tmp_path / "s.csv"
    path.write_text(
        "id,floor,facade,kind,x_m,width_m\nZZ-1,1,nowhere,window_casement,1,1\n", encoding="utf-8"
    )
    table = read_table(path)
    from petfall_audit.demo import sample_building

    building = sample_building("walkup")  # every surface belongs to one facade
    preview = preview_import(table, guess_mapping(table.headers), building)
    [problem] = preview.problems
    assert (problem.row, problem.column) == (2, "facade")
    assert "facade 'nowhere' is not in the building" in problem.message


def test_cli_import_into_a_missing_file_says_how_to_start_one(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    into = tmp_path / "new.json"
    assert main(["import", str(FIXTURES / "metric.csv"), "--into", str(into)]) == 2
    err = " ".join(capsys.readouterr().err.split())
    assert "no such building file" in err and "New building" in err and "MODEL.ifc" in err
    assert not into.exists()
