"""The app's import of a building model (IFC), offscreen: the preview shows the storeys, the
openings and every assumption; the import is one undoable step."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

pytest.importorskip("ifcopenshell")

from petfall_audit.editing.document import Document  # noqa: E402
from petfall_audit.gui.dialogs import Prompts  # noqa: E402
from petfall_audit.gui.import_dialog import ImportPrompts, import_schedule  # noqa: E402
from petfall_audit.gui.main_window import MainWindow, blank_building  # noqa: E402
from petfall_audit.gui.model_import_dialog import ModelImportDialog  # noqa: E402
from petfall_audit.io.ifc_import import read_model  # noqa: E402
from tests.ifc_builder import IfcModelBuilder, box_tower  # noqa: E402

pytestmark = pytest.mark.gui

ELEVATIONS_M = (0.0, 4.5, 7.6, 10.7)


def _model(tmp_path: Path) -> Path:
    b = IfcModelBuilder(unit="mm", true_north_deg=0.0)
    box_tower(b, ELEVATIONS_M, windows_per_face=2)
    storey = b.storey("Roof level", 13.8)
    wall = b.wall(storey, (0.0, 0.0), (12.0, 0.0))
    b.window(storey, wall, along_m=1.0, sill_m=0.9, operation="TILTANDTURNLEFTHAND", name="T1")
    return b.write(tmp_path / "model.ifc")


class Answers(ImportPrompts):
    def __init__(self, setup: Any = None, accept: bool = True) -> None:
        self.setup = setup
        self.accept = accept
        self.errors: list[str] = []
        self.dialogs: list[Any] = []

    def run(self, dialog: Any) -> bool:
        self.dialogs.append(dialog)
        if self.setup is not None:
            self.setup(dialog)
        return self.accept

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)


class QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"


def test_preview_shows_storeys_openings_and_every_assumption(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    model = read_model(_model(tmp_path))
    dialog = ModelImportDialog(blank_building(), model)
    qtbot.addWidget(dialog)
    # storeys: one row each, with the elevation in metres
    assert dialog.storeys.rowCount() == 5
    shown = [float(dialog.storeys.item(r, 2).text()) for r in range(5)]
    assert shown == pytest.approx([*ELEVATIONS_M, 13.8])
    assert dialog.storeys.item(0, 3).text().startswith("floor 0")  # the blank building's ground
    assert dialog.storeys.item(1, 3).text() == "new floor"
    # openings: every one, with its assumptions
    assert dialog.openings.rowCount() == len(model.openings) == 4 * 2 * 2 + 1
    for r, o in enumerate(model.openings):
        assert dialog.openings.item(r, 1).text() == o.id
        for assumption in o.assumptions:
            assert assumption in dialog.openings.item(r, 9).text()
    text = dialog.assumptions.toPlainText()
    for assumption in model.assumptions:
        assert assumption in text
    assert "Paving at ground level" in text  # the building's own surface, said so
    assert "guard or infill gaps" in text
    assert dialog.preview is not None and dialog.preview.ok
    assert dialog.ok_button.isEnabled()


def test_import_into_a_new_building_is_one_undoable_step(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = MainWindow(Document(blank_building()), prompts=QuietPrompts(), samples=32,
                        refine_samples=0)
    qtbot.addWidget(window)
    before = window.document.building
    answers = Answers()
    assert import_schedule(window, _model(tmp_path), prompts=answers) is None
    assert isinstance(answers.dialogs[0], ModelImportDialog)
    after = window.document.building
    assert [f.elevation_m for f in after.floors] == pytest.approx([*ELEVATIONS_M, 13.8])
    assert len(after.openings) == 17
    assert {"north", "south"} <= {f.id for f in after.facades}
    assert len(window.history.labels()) == 1
    assert window.history.undo_label.startswith("Import 17 openings from model.ifc")
    window.undo()
    assert window.document.building is before
    window.recomputer.cancel()
    window.recomputer.wait(10000)


def test_facades_can_go_on_the_building_s_own(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    model = read_model(_model(tmp_path))
    dialog = ModelImportDialog(blank_building(), model)
    qtbot.addWidget(dialog)
    dialog.set_facade("south", "front")
    assert dialog.facade_map()["south"] == "front"
    built = dialog.result_building()
    assert {o.facade for o in built.openings} == {"front", "north"}


def test_a_foreign_file_is_refused_with_a_message(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window = MainWindow(Document(blank_building()), prompts=QuietPrompts(), samples=32,
                        refine_samples=0)
    qtbot.addWidget(window)
    bad = tmp_path / "notes.ifc"
    bad.write_text("just some notes", encoding="utf-8")
    before = window.document.building
    answers = Answers()
    reason = import_schedule(window, bad, prompts=answers)
    assert reason is not None and "not an IFC model" in reason
    assert answers.errors and not answers.dialogs
    assert window.document.building is before
    window.recomputer.cancel()
    window.recomputer.wait(10000)


def test_preview_says_which_floors_change(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    import dataclasses

    from petfall_audit.model import Floor

    # the building has floor 1 at 3.0 m; the model's level 1 stands at 4.5 m
    building = dataclasses.replace(
        blank_building(), floors=(Floor(0, "Ground floor", 0.0), Floor(1, "First", 3.0)))
    dialog = ModelImportDialog(building, read_model(_model(tmp_path)))
    qtbot.addWidget(dialog)
    states = [dialog.storeys.item(r, 3).text() for r in range(dialog.storeys.rowCount())]
    assert states[0].startswith("floor 0 'Ground floor'")
    assert states[1] == "changes floor 1 'First' from 3 m to 4.5 m"
    assert states[2] == "new floor"
