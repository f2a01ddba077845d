"""File > Export from the app, offscreen: PDFs written off the GUI thread, the leaflet's contact
block from the settings, results and plan as CSV and JSON."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path
from typing import Any

import jsonschema
import pytest
from pypdf import PdfReader

from petfall_audit._resources import resource_path
from petfall_audit.cautions import CAUTIONS_SHORT
from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.export_actions import EXPORTS, ExportPrompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views.common import wait_for_tasks

pytestmark = pytest.mark.gui

SAMPLES = 64
RESULTS_VALIDATOR = jsonschema.Draft202012Validator(
    json.loads(resource_path("results.schema.json").read_text("utf-8")))


class QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"


class SaveTo(ExportPrompts):
    def __init__(self, path: Path) -> None:
        self.path = path
        self.errors: list[str] = []

    def save_path(self, parent: Any, title: str, suggested: Path, file_filter: str) -> Path:
        return self.path

    def show_error(self, parent: Any, title: str, text: str) -> None:
        self.errors.append(text)


@pytest.fixture
def window(qtbot):  # type: ignore[no-untyped-def]
    w = MainWindow(Document(sample_building("walkup")), prompts=QuietPrompts(), samples=SAMPLES,
                   refine_samples=0)
    qtbot.addWidget(w)
    views = w.views
    views.exports.samples = SAMPLES  # the export's own full recomputation, kept small here
    w.show()
    qtbot.waitUntil(lambda: views.plan.plan is not None, timeout=20000)
    yield w
    w.recomputer.cancel()
    w.recomputer.wait(10000)
    wait_for_tasks(30000)


def _export(qtbot, window, kind: str, path: Path) -> list[Path]:  # type: ignore[no-untyped-def]
    exports = window.views.exports
    with qtbot.waitSignal(exports.finished, timeout=60000) as done:
        assert exports.export(kind, path) is not None
    return list(done.args[0])


def _pdf_text(path: Path) -> str:
    return "\n".join(page.extract_text() or "" for page in PdfReader(str(path)).pages)


def test_export_menu_holds_every_export(window) -> None:  # type: ignore[no-untyped-def]
    names = [a.text() for a in window.views.exports.menu.actions() if not a.isSeparator()]
    assert names == [text for text, _f, _s in EXPORTS.values()]
    file_menu = next(a.menu() for a in window.menuBar().actions() if a.text() == "&File")
    assert window.views.exports.menu.menuAction() in file_menu.actions()
    assert window.views.import_action in file_menu.actions()


def test_audit_pdf_is_written_off_the_gui_thread(qtbot, window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    out = tmp_path / "audit.pdf"
    assert _export(qtbot, window, "audit_pdf", out) == [out]
    text = _pdf_text(out)
    name = window.document.building.info.name
    assert name in text
    assert "veterinarian" in text  # the cautions travel with the report
    assert "Exported audit.pdf" in window.status_label.text()


def test_leaflet_takes_the_contact_block_from_the_settings(qtbot, window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window.settings.set_contact({"organisation": "Hollowmere Cat Rescue",
                                 "phone": "0100 555 0199"})
    out = tmp_path / "leaflet.pdf"
    _export(qtbot, window, "leaflet_pdf", out)
    text = _pdf_text(out)
    assert "Hollowmere Cat Rescue" in text and "0100 555 0199" in text


def test_results_and_plan_as_csv_and_json(qtbot, window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    n = len(window.document.building.openings)
    results_json = _export(qtbot, window, "results_json", tmp_path / "r.json")[0]
    data = json.loads(results_json.read_text("utf-8"))
    RESULTS_VALIDATOR.validate(data)  # the one results envelope (resources/results.schema.json)
    assert data["plan"] is None and data["caution"] == CAUTIONS_SHORT
    results_csv = _export(qtbot, window, "results_csv", tmp_path / "r.csv")
    assert results_csv == [tmp_path / "r.csv"]  # results only: the plan has its own export
    rows = [line for line in results_csv[0].read_text("utf-8").splitlines()
            if line and not line.startswith("#")]
    assert len(rows) >= n  # a header and one row per opening (cautions may follow)
    budget = 2500.0
    window.views.plan.set_budget(budget)
    plan_json = _export(qtbot, window, "plan_json", tmp_path / "p.json")[0]
    envelope = json.loads(plan_json.read_text("utf-8"))
    RESULTS_VALIDATOR.validate(envelope)
    assert envelope["contents"] == ["plan"]
    plan = envelope["plan"]
    assert plan["budget"] == budget and 0 < plan["total_cost"] <= budget
    assert plan["risk_after"] < plan["risk_before"]
    plan_csv = _export(qtbot, window, "plan_csv", tmp_path / "p.csv")[0]
    body = "\n".join(line for line in plan_csv.read_text("utf-8").splitlines()
                     if not line.startswith("#"))
    table = list(csv.DictReader(io.StringIO(body)))
    assert len(table) == len(plan["actions"])
    assert sum(float(r["cost"]) for r in table) == pytest.approx(plan["total_cost"])


def test_asking_for_a_path_and_refusing_a_second_export(qtbot, window, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    prompts = SaveTo(tmp_path / "chosen.json")
    exports = window.views.exports
    exports.prompts = prompts
    with qtbot.waitSignal(exports.finished, timeout=60000):
        assert exports.export("results_json") is not None
        assert exports.export("results_json") is None  # one at a time
    assert (tmp_path / "chosen.json").exists()
    assert prompts.errors == ["An export is already running."]


def test_an_export_over_the_building_file_itself_is_refused(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.io.building_file import save_building

    path = tmp_path / "court.json"
    save_building(sample_building("walkup"), path)
    before = path.read_bytes()
    w = MainWindow(Document(sample_building("walkup"), path=path), prompts=QuietPrompts(),
                   samples=SAMPLES, refine_samples=0)
    qtbot.addWidget(w)
    try:
        prompts = SaveTo(tmp_path / "." / "court.json")  # the same file, spelt otherwise
        w.views.exports.prompts = prompts
        assert w.views.exports.export("results_json") is None
        assert prompts.errors and "this building's own file" in prompts.errors[0]
        assert path.read_bytes() == before
    finally:
        w.recomputer.cancel()
        w.recomputer.wait(10000)
        wait_for_tasks(30000)
