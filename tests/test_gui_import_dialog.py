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

FIXTURES = Path(__file__).parent / "fixtures" / "schedules"


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
