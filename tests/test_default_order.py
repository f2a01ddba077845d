"""One default order of the openings (issue 13): by risk score, highest first, equal scores by
the worse expected band, the higher mean severity, then the opening id. The app's ranked view
and results table, the PDF's ranked table, the command line's table and the JSON list the
openings in that order."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from petfall_audit.cli import main
from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views.common import wait_for_tasks
from petfall_audit.io.building_file import save_building
from petfall_audit.model import (
    Building,
    BuildingInfo,
    CatsPresent,
    Facade,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from petfall_audit.report.context import build_audit_context
from petfall_audit.risk import DEFAULT_ORDER, assess

SAMPLES = 64
SEED = 1  # the app's seed


class _QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def show_error(self, parent: Any, title: str, text: str) -> None:
        raise AssertionError(f"{title}: {text}")


def _twins() -> Building:
    """Three identical windows side by side (ids out of alphabetical order) and a balcony:
    the windows' scores are equal, so only the tie-break orders them."""
    window = dict(floor=3, facade="south", kind=OpeningKind.WINDOW_CASEMENT, width_m=1.0,
                  perch_height_m=0.9, cats_present=CatsPresent.YES,
                  open_frequency=OpenFrequency.DAILY)
    return Building(
        info=BuildingInfo(name="Twin Windows House"),
        floors=tuple(Floor(i, f"Level {i}", 3.0 * i) for i in range(5)),
        facades=(Facade("south", 20.0),),
        surfaces=(Surface("yard", SurfaceKind.CONCRETE, 0.0),),
        openings=(Opening("W-c", x_m=1.0, **window),  # type: ignore[arg-type]
                  Opening("W-a", x_m=4.0, **window),  # type: ignore[arg-type]
                  Opening("W-b", x_m=7.0, **window),  # type: ignore[arg-type]
                  Opening("B-1", 4, "south", OpeningKind.BALCONY, 10.0, 3.0, projection_m=1.2,
                          cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY)),
    )


def test_equal_scores_are_ordered_by_id_and_scores_never_rise() -> None:
    a = assess(_twins(), samples=200, seed=3)
    order = [o.id for o in a.ranked()]
    assert DEFAULT_ORDER == "risk" and order == [o.id for o in a.ranked("risk")]
    risks = [o.risk for o in a.ranked()]
    assert all(x >= y for x, y in zip(risks, risks[1:], strict=False))
    windows = [i for i in order if i.startswith("W-")]
    twins = {a.result(i).risk for i in windows}
    assert len(twins) == 1, "identical windows with the same sampled cats score the same"
    assert windows == ["W-a", "W-b", "W-c"]  # the tie-break: alphabetical id


def test_band_counts_count_every_opening_once() -> None:
    a = assess(_twins(), samples=100, seed=3)
    counts = a.band_counts()
    assert sum(counts) == len(a.openings) == 4
    for band, n in enumerate(counts):
        assert n == sum(1 for o in a.openings if o.expected_band == band)


@pytest.mark.gui
def test_app_pdf_cli_and_json_list_the_openings_in_the_same_order(
    qtbot: Any, tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    building = sample_building("walkup")
    path = tmp_path / "walkup.json"
    save_building(building, path)

    # the app: the ranked view as it opens, and the window's results table
    window = MainWindow(Document(building), prompts=_QuietPrompts(), samples=SAMPLES,
                        refine_samples=0)
    qtbot.addWidget(window)
    views = window.views
    window.show()
    try:
        qtbot.waitUntil(lambda: views.context.assessment is not None
                        and not window.results_stale, timeout=20000)
        assessment = views.context.assessment
        app_ranked = views.ranked.visible_ids()
        ranked = views.ranked
        app_table = [ranked.row_result(r).id for r in range(ranked.proxy.rowCount())]
    finally:
        window.recomputer.cancel()
        window.recomputer.wait(10000)
        wait_for_tasks(20000)
    assert assessment.samples == SAMPLES and assessment.seed == SEED

    # the PDF's ranked table (the rows the layout prints)
    pdf = [row.opening_id for row in build_audit_context(assessment, None).ranked]

    # the command line's table and its JSON, the same samples and seed
    args = ["assess", str(path), "--samples", str(SAMPLES), "--seed", str(SEED)]
    assert main(args) == 0
    table = capsys.readouterr().out
    ids = {o.id for o in building.openings}
    cli = [line.split()[1] for line in table.splitlines()
           if line.strip()[:1].isdigit() and len(line.split()) > 1 and line.split()[1] in ids]
    assert main([*args, "--format", "json", "--no-sensitivity"]) == 0
    doc = json.loads(capsys.readouterr().out)
    exported = [o["id"] for o in doc["results"]["openings"]]

    expected = [o.id for o in assessment.ranked()]
    assert len(expected) == len(building.openings) > 10
    assert app_ranked == expected
    assert app_table == expected
    assert pdf == expected
    assert cli == expected
    assert exported == expected
    # and it is the risk order: the scores never rise down the list
    risks = [o["risk"] for o in doc["results"]["openings"]]
    assert all(x >= y for x, y in zip(risks, risks[1:], strict=False))
