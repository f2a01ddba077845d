"""The schedule import dialog, offscreen: guessed and edited mapping, problems by row and column,
merge or replace, valid rows only, applied as one undoable step."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.import_dialog import ImportDialog, ImportPrompts, import_schedule
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.io.schedule import read_table
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

pytestmark = pytest.mark.gui

FIXTURES = Path(__file__).parents[1] / "fixtures" / "schedules"


def _building() -> Building:
    """An invented four-storey block (as in test_schedule_import.py)."""
    return Building(
        info=BuildingInfo(name="Larkspur Court", address="14 Invented Row"),
        floors=(Floor(0, "Ground", 0.0), Floor(1, "First", 4.5), Floor(2, "Second", 7.6),
                Floor(3, "Third", 10.7)),
        facades=(Facade("north", 40.0), Facade("south", 40.0)),
        surfaces=(Surface("ground", SurfaceKind.CONCRETE, 0.0),),
        openings=(Opening("S-1", 1, "south", OpeningKind.BALCONY, 2.0, 3.0, 1.2),),
    )


class Answers(ImportPrompts):
    """Accepts the dialog after ``setup(dialog)``; records errors instead of showing them."""

    def __init__(self, setup: Any = None, accept: bool = True) -> None:
        self.setup = setup
        self.accept = accept
        self.errors: list[str] = []
        self.dialogs: list[ImportDialog] = []

    def run(self, dialog: ImportDialog) -> bool:
        self.dialogs.append(dialog)
        if self.setup is not None:
            self.setup(dialog)
        return self.accept

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)


class QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"


def test_guessed_mapping_and_a_clean_preview(qtbot) -> None:  # type: ignore[no-untyped-def]
    dialog = ImportDialog(_building(), read_table(FIXTURES / "metric.csv"))
    qtbot.addWidget(dialog)
    mapping = dialog.mapping()
    assert mapping["Opening ID"] == "id" and mapping["Width (m)"] == "width_m"
    assert dialog.preview is not None and dialog.preview.ok
    assert dialog.problems.rowCount() == 0
    assert dialog.ok_button.isEnabled()


def test_problems_are_listed_by_row_and_column_and_block_until_valid_rows_accepted(qtbot) -> None:  # type: ignore[no-untyped-def]
    dialog = ImportDialog(_building(), read_table(FIXTURES / "bad.csv"))
    qtbot.addWidget(dialog)
    p = dialog.preview
    assert p is not None and p.problems
    assert dialog.problems.rowCount() == len(p.problems)
    first = p.problems[0]
    assert dialog.problems.item(0, 0).text() == str(first.row)
    assert first.letter in dialog.problems.item(0, 1).text()
    assert dialog.problems.item(0, 2).text() == first.message
    assert p.openings  # the fixture has good rows among the bad ones
    assert not dialog.ok_button.isEnabled()
    dialog.accept_valid.setChecked(True)
    assert dialog.ok_button.isEnabled()
    built = dialog.result_building()
    assert {o.id for o in p.openings} <= {o.id for o in built.openings}
    assert not set(p.bad_rows) & set(p.rows)  # a bad row is never applied in part


def test_editing_the_mapping_updates_the_preview(qtbot) -> None:  # type: ignore[no-untyped-def]
    table = read_table(FIXTURES / "custom_headers.csv")
    dialog = ImportDialog(_building(), table)
    qtbot.addWidget(dialog)
    # the file's own names are not all guessed; map them by hand as a user would
    dialog.set_field("Ref", "id")
    dialog.set_field("Lvl", "floor")
    dialog.set_field("Elevation side", "facade")
    dialog.set_field("W", "width_m")
    dialog.set_field("Tenant", "")
    dialog.set_unit("W", "in")
    assert dialog.mapping()["W"] == "width_m" and dialog.units()["W"] == "in"
    p = dialog.preview
    assert p is not None and p.openings
    a101 = next(o for o in p.openings if o.id == "A-101")
    assert a101.width_m == pytest.approx(126 * 0.0254)  # 126 in = 3.2004 m (exact inch, NIST)
    dialog.set_field("W", "")  # width is required: every row now has a problem
    assert not dialog.preview.openings and not dialog.ok_button.isEnabled()


def test_import_is_one_undoable_step_merge_or_replace(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = MainWindow(Document(_building()), prompts=QuietPrompts(), samples=32,
                        refine_samples=0)
    qtbot.addWidget(window)
    before = window.document.building
    answers = Answers()
    assert import_schedule(window, FIXTURES / "metric.csv", prompts=answers) is None
    merged = window.document.building
    assert "S-1" in {o.id for o in merged.openings}  # merge keeps the others
    assert len(merged.openings) > len(before.openings)
    assert window.history.undo_label.startswith("Import ")
    assert len(window.history.labels()) == 1
    window.undo()
    assert window.document.building is before
    replace = Answers(setup=lambda d: d.replace.setChecked(True))
    assert import_schedule(window, FIXTURES / "metric.csv", prompts=replace) is None
    assert "S-1" not in {o.id for o in window.document.building.openings}
    # cancelling changes nothing
    current = window.document.building
    assert import_schedule(window, FIXTURES / "metric.csv",
                           prompts=Answers(accept=False)) == "cancelled"
    assert window.document.building is current
    window.recomputer.cancel()
    window.recomputer.wait(10000)


def test_a_mapping_file_applies_over_the_guess(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    class MappingPrompts(ImportPrompts):
        def open_mapping(self, parent: Any) -> Path | None:
            return FIXTURES / "custom_headers.map.json"

    dialog = ImportDialog(_building(), read_table(FIXTURES / "custom_headers.csv"),
                          prompts=MappingPrompts())
    qtbot.addWidget(dialog)
    dialog._on_load_mapping()
    assert dialog.mapping()["Ref"] == "id" and dialog.mapping()["Tenant"] == ""
    assert dialog.units()["W"] == "in"
    assert dialog.preview is not None and dialog.preview.openings


def _csv(path: Path, rows: list[list[str]]) -> Path:
    path.write_text("\n".join(",".join(r) for r in rows) + "\n", encoding="utf-8")
    return path


_NEW_TOWER = [
    ["Opening ID", "Floor", "Floor elevation (m)", "Facade", "Type",
     "Position along facade (m)", "Width (m)"],
    ["N-1", "1", "3.0", "north", "balcony", "2", "3"],
    ["N-2", "1", "3.0", "north", "balcony", "7", "3"],
    ["E-1", "2", "6.0", "east", "window_casement", "1.5", "1.2"],
]


def test_new_facades_get_the_furthest_end_plus_the_margin_before_the_first_opening(
        qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    """Documented rule (docs/schedule-import.md; common practice, no source): a new facade is
    as long as its furthest opening reaches plus the space before its first opening (at least
    1 m), rounded up to 0.1 m: north 2 + ... 7 + 3 = 10 m, plus 2 m; east 1.5 + 1.2 + 1.5."""
    window = MainWindow(Document(_building()), prompts=QuietPrompts(), samples=32,
                        refine_samples=0)
    qtbot.addWidget(window)
    path = _csv(tmp_path / "tower.csv", [[c.replace("north", "west") for c in r]
                                         for r in _NEW_TOWER])
    answers = Answers()
    assert import_schedule(window, path, prompts=answers) is None
    dialog = answers.dialogs[0]
    assert "west (12.0 m long)" in dialog.summary.text()
    lengths = {f.id: f.length_m for f in window.document.building.facades}
    assert lengths["west"] == pytest.approx(12.0) and lengths["east"] == pytest.approx(4.2)
    assert lengths["north"] == 40.0  # the building's own facades keep their length
    window.recomputer.cancel()
    window.recomputer.wait(10000)


def test_the_blank_buildings_unused_facade_goes_when_the_schedule_brings_its_own(
        qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.main_window import blank_building

    window = MainWindow(Document(blank_building()), prompts=QuietPrompts(), samples=32,
                        refine_samples=0)
    qtbot.addWidget(window)
    before = window.document.building
    assert [f.id for f in before.facades] == ["front"]
    answers = Answers()
    assert import_schedule(window, _csv(tmp_path / "t.csv", _NEW_TOWER), prompts=answers) is None
    assert "unused facade removed: front" in answers.dialogs[0].summary.text()
    after = window.document.building
    assert [f.id for f in after.facades] == ["north", "east"]
    assert [s.id for s in after.surfaces] == ["ground"]  # it lies in front of every facade
    window.undo()  # one step puts the facade back
    assert window.document.building is before
    # a schedule on the building's own facade keeps the others
    same = [[c.replace("north", "front").replace("east", "front").replace("1.5", "12")
             for c in r] for r in _NEW_TOWER]
    assert import_schedule(window, _csv(tmp_path / "s.csv", same), prompts=Answers()) is None
    assert [f.id for f in window.document.building.facades] == ["front"]
    window.recomputer.cancel()
    window.recomputer.wait(10000)


def test_a_schedule_in_feet_is_reported_in_feet(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    import re

    # 130 ft + 5 ft = 135 ft = 41.148 m runs past the 40 m (131 ft 3 in) north facade;
    # 400 ft = 121.92 m is wider than the 100 m limit (328 ft 1 in): 1 ft = 0.3048 m exactly
    path = _csv(tmp_path / "feet.csv", [
        ["Opening ID", "Floor", "Facade", "Type", "Position along facade (ft)", "Width (ft)",
         "Largest gap (in)"],
        ["N-1", "1", "north", "balcony", "130", "5", "4"],
        ["N-2", "1", "north", "balcony", "2", "400", "4"],
        ["N-3", "2", "north", "balcony", "2", "8", "100"],
    ])
    dialog = ImportDialog(_building(), read_table(path))
    qtbot.addWidget(dialog)
    shown = [dialog.problems.item(i, 2).text() for i in range(dialog.problems.rowCount())]
    assert len(shown) == 3, shown
    assert any("135 ft 0 in" in m and "131 ft 3 in" in m for m in shown), shown
    assert any("400 ft 0 in" in m and "328 ft 1 in" in m for m in shown), shown
    assert any("100.0 in" in m for m in shown), shown  # 100 in = 2540 mm > the 2000 mm limit
    for message in shown:
        assert not re.search(r"\d m\b|\d mm\b", message), message


def test_the_preview_grid_shows_every_row_with_the_bad_cells_marked(qtbot) -> None:  # type: ignore[no-untyped-def]
    from PySide6.QtCore import Qt

    dialog = ImportDialog(_building(), read_table(FIXTURES / "bad.csv"))
    qtbot.addWidget(dialog)
    model, p = dialog.grid_model, dialog.preview
    assert p is not None
    assert dialog.preview_tabs.currentWidget() is dialog.grid_view
    assert model.rowCount() == p.rows_read and model.columnCount() == len(dialog.table.headers) + 1
    marked = set()
    for r in range(model.rowCount()):
        for c in range(1, model.columnCount()):
            if model.data(model.index(r, c), Qt.ItemDataRole.BackgroundRole) is not None:
                marked.add((int(model.headerData(r, Qt.Orientation.Vertical)), c - 1))
    letters = [chr(65 + i) for i in range(len(dialog.table.headers))]
    expected = {(q.row, letters.index(q.letter)) for q in p.problems if q.letter}
    assert marked == expected and marked  # every bad cell, and only those
    # the bad cell's tooltip is its problem; the row says it is not imported
    row, letter = 3, "B"  # unknown floor 9 (as in test_schedule_import.py)
    index = model.index(dialog.grid.index_of_row(row), letters.index(letter) + 1)
    assert "unknown floor 9" in model.data(index, Qt.ItemDataRole.ToolTipRole)
    assert model.data(index, Qt.ItemDataRole.DisplayRole) == "9"
    status = model.index(dialog.grid.index_of_row(row), 0)
    assert model.data(status, Qt.ItemDataRole.DisplayRole) == "Not imported"
    good = model.index(dialog.grid.index_of_row(2), 0)
    assert model.data(good, Qt.ItemDataRole.DisplayRole) == "New"
    # double-clicking a problem shows its cell
    dialog.preview_tabs.setCurrentWidget(dialog.problems)
    i = next(k for k, q in enumerate(p.problems) if q.row == row and q.letter == letter)
    dialog.show_problem(i)
    assert dialog.preview_tabs.currentWidget() is dialog.grid_view
    assert dialog.grid_view.currentIndex() == index
