"""The app, offscreen: the code profile picked in the building details (undoable, the rules in
force listed, conditions recomputed, units followed) and the leaflet's sections chosen and edited
before it is written."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest
from pypdf import PdfReader
from PySide6.QtCore import Qt

from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.editing.history import History
from petfall_audit.gui.adapters import ViewOptions
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.export_actions import ExportPrompts
from petfall_audit.gui.leaflet_dialog import LeafletDialog
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views.common import wait_for_tasks
from petfall_audit.gui.widgets.building import BuildingPanel

pytestmark = pytest.mark.gui

SAMPLES = 64


def _pick(panel: BuildingPanel, profile_id: str) -> None:
    """Choose ``profile_id`` in the combo box, as a user does."""
    i = panel.code.findData(profile_id)
    assert i >= 0
    panel.code.setCurrentIndex(i)
    panel.code.activated.emit(i)


def test_picking_a_profile_is_one_undo_step_and_lists_the_rules(qtbot) -> None:  # type: ignore[no-untyped-def]
    doc = Document(sample_building("walkup"))
    history = History(doc)
    panel = BuildingPanel(doc, history, ViewOptions())
    qtbot.addWidget(panel)
    picked: list[str] = []
    panel.code_profile_picked.connect(picked.append)
    assert panel.code.currentData() == "generic"
    assert "Local rules must be checked" in panel.code_rules.text()
    _pick(panel, "england")
    assert doc.building.info.code_profile == "england"
    rules = panel.code_rules.text()
    # Approved Document K (2013), Diagram 3.1; the confidence of each rule is shown
    assert "Approved Document K, Diagram 3.1 (2013)" in rules and "read in the text" in rules
    assert "IBC" not in rules
    _pick(panel, "us-ibc")
    assert "IBC §1015.3" in panel.code_rules.text() and picked == ["metric", "imperial"]
    assert "from memory: verify" in panel.code_rules.text()
    history.undo()
    assert doc.building.info.code_profile == "england"
    assert panel.code.currentData() == "england"
    history.undo()
    assert doc.building.info.code_profile == "generic"
    assert panel.code.currentData() == "generic"


class QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"


@pytest.fixture
def window(qtbot):  # type: ignore[no-untyped-def]
    w = MainWindow(Document(sample_building("walkup")), prompts=QuietPrompts(), samples=SAMPLES,
                   refine_samples=0)
    qtbot.addWidget(w)
    views = w.views
    views.exports.samples = SAMPLES
    w.show()
    qtbot.waitUntil(lambda: views.plan.plan is not None, timeout=20000)
    yield w
    w.recomputer.cancel()
    w.recomputer.wait(10000)
    wait_for_tasks(30000)


def _conditions(window: MainWindow) -> set[str]:
    return {c for opts in window.views.plan.options.values() for o in opts for c in o.conditions}


def test_the_profile_picked_recomputes_the_conditions_and_sets_the_units(qtbot, window) -> None:  # type: ignore[no-untyped-def]
    assert not any("IRC" in c for c in _conditions(window))
    window.settings.units = "metric"
    _pick(window.building_panel, "us-ibc")
    # IRC R310.4: a device on an escape window releases without a key or tool
    qtbot.waitUntil(lambda: any("IRC §R310.4" in c for c in _conditions(window)), timeout=30000)
    assert window.options.units == "imperial"
    assert not any("Approved Document" in c for c in _conditions(window))
    window.undo()
    qtbot.waitUntil(lambda: not any("IRC" in c for c in _conditions(window)), timeout=30000)
    assert window.document.building.info.code_profile == "generic"


class LeafletPrompts(ExportPrompts):
    """Chooses the file and answers the leaflet dialog as a user would: unticks a section and
    the plan's measures and rewrites a title."""

    def __init__(self, path: Path) -> None:
        self.path = path
        self.shown: list[LeafletDialog] = []

    def save_path(self, parent: Any, title: str, suggested: Path, file_filter: str) -> Path:
        return self.path

    def show_error(self, parent: Any, title: str, text: str) -> None:
        raise AssertionError(text)

    def leaflet_choice(self, parent: Any, defaults: Any, current: Any) -> Any:
        dialog = LeafletDialog(defaults, current, parent)
        self.shown.append(dialog)
        dialog.set_checked("checks", False)
        dialog.measures.setChecked(False)
        dialog.list.setCurrentRow(0)
        dialog.title.setText("Cats and high windows")
        dialog.list.setCurrentRow(2)  # moving on keeps the edit
        return dialog.choice()


def test_the_leaflet_sections_are_chosen_and_edited_before_printing(
    qtbot, window, tmp_path: Path,  # type: ignore[no-untyped-def]
) -> None:
    out = tmp_path / "leaflet.pdf"
    exports = window.views.exports
    exports.prompts = LeafletPrompts(out)
    window.views.plan.set_budget(3000.0)
    with qtbot.waitSignal(exports.finished, timeout=60000):
        assert exports.export("leaflet_pdf") is not None
    text = " ".join("\n".join(p.extract_text() or "" for p in PdfReader(out).pages).split())
    assert "Cats and high windows" in text and "Why cats fall" not in text
    assert "What to check at home" not in text and "plans these measures" not in text
    assert "Never block an escape window" in text  # always printed
    # the next export starts from the choice made
    from petfall_audit.report.leaflet_sections import default_sections

    again = LeafletDialog(default_sections(), exports.leaflet_choice)
    qtbot.addWidget(again)
    assert again.list.item(0).text() == "Cats and high windows"
    assert again.list.item(1).checkState() == Qt.CheckState.Unchecked
    assert not again.measures.isChecked()


def test_a_building_of_a_jurisdiction_opens_in_its_units(qtbot) -> None:  # type: ignore[no-untyped-def]
    import dataclasses

    base = sample_building("walkup")
    us = dataclasses.replace(base, info=dataclasses.replace(base.info, code_profile="us-ibc"))
    w = MainWindow(Document(us), prompts=QuietPrompts(), samples=SAMPLES, refine_samples=0)
    qtbot.addWidget(w)
    try:
        assert w.options.units == "imperial"  # the IBC profile: imperial (US practice)
        w.load_document(Document(base))  # generic: the user's choice stays
        assert w.options.units == "imperial"
        england = dataclasses.replace(base, info=dataclasses.replace(base.info,
                                                                     code_profile="england"))
        w.load_document(Document(england))
        assert w.options.units == "metric"
    finally:
        w.recomputer.cancel()
        w.recomputer.wait(10000)
        wait_for_tasks(30000)


def test_the_panel_says_when_an_escape_limiter_is_too_narrow(qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.editing.commands import SetOpeningFields

    doc = Document(sample_building("walkup"))
    history = History(doc)
    panel = BuildingPanel(doc, history, ViewOptions())
    qtbot.addWidget(panel)
    _pick(panel, "england")
    assert panel.code_warnings.isHidden()
    escape = next(o for o in doc.building.openings if o.escape_window)
    history.push(SetOpeningFields([escape.id], {"limiter_gap_mm": 100.0}))
    # Approved Document B vol. 1 para 2.8: at least 450 mm wide
    assert not panel.code_warnings.isHidden()
    assert "450 mm" in panel.code_warnings.text() and escape.id in panel.code_warnings.text()
