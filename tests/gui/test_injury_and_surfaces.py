"""The app edits the injury dose–response and a surface's extent along its facade (offscreen)."""

from __future__ import annotations

import pytest
from PySide6.QtCore import Qt

from petfall_audit.demo import sample_building
from petfall_audit.editing.fields import SURFACE_FIELDS
from petfall_audit.model import InjuryThresholds
from tests.gui.test_main_window import make_window, result_of

pytestmark = pytest.mark.gui


def test_injury_bands_are_edited_undone_and_reset(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot)
    doc = window.document
    panel = window.building_panel
    worst = window.views.ranked.row_result(0)
    before = result_of(window, worst.id).bands["life-threatening"]
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert panel.injury_form.commit_text("life_threatening_g", "120 g")
    assert doc.building.injury.life_threatening_g == 120.0
    # a lower median dose makes the highest band more likely everywhere
    assert result_of(window, worst.id).bands["life-threatening"] > before
    # medians that do not rise are refused where the user is looking, with the reason
    assert not panel.injury_form.commit_text("serious_g", "500 g")
    assert "must be above 0 and rise" in panel.injury_form.error_text("serious_g")
    assert doc.building.injury.serious_g == InjuryThresholds().serious_g
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.actions_.undo.trigger()
    assert doc.building.injury == InjuryThresholds()
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert panel.injury_form.commit_text("spread", "0.5")
    panel.injury_reset.click()
    assert doc.building.injury == InjuryThresholds()


def test_a_surface_can_cover_part_of_its_facade(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = make_window(qtbot, sample_building("tower"))
    doc = window.document
    model = window.site_panel.surfaces_model
    row = [s.id for s in doc.building.surfaces].index("street_pavement")
    col = [f.name for f in SURFACE_FIELDS].index("x_from_m")
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert model.setData(model.index(row, col), "0 m", Qt.ItemDataRole.EditRole)
    assert doc.building.surfaces[row].x_from_m == 0.0
    col_to = [f.name for f in SURFACE_FIELDS].index("x_to_m")
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert model.setData(model.index(row, col_to), "40 m", Qt.ItemDataRole.EditRole)
    assert doc.building.surfaces[row].x_to_m == 40.0
    assert model.data(model.index(row, col_to), Qt.ItemDataRole.DisplayRole) == "40 m"
