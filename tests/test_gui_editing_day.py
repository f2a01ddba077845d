"""The app used for a day by a property manager, through the real widgets: adding the first
opening above a podium, crash recovery of two windows, columns that fit, refusals shown where the
user looks, changing an opening's kind, the plan's budget, copying a typical floor, keyboard
habits."""

from __future__ import annotations

import dataclasses
from typing import Any

import pytest
from PySide6.QtCore import Qt

from petfall_audit.editing.document import Document
from petfall_audit.gui.main_window import MainWindow, blank_building
from petfall_audit.model import Building, Floor, Surface, SurfaceKind
from tests.test_gui_main_window import FakePrompts

pytestmark = pytest.mark.gui

SAMPLES = 64


def open_window(qtbot, building: Building | None = None, **kwargs: Any) -> MainWindow:  # type: ignore[no-untyped-def]
    kwargs.setdefault("refine_samples", 0)
    window = MainWindow(Document(building or blank_building()), prompts=FakePrompts(),
                        samples=SAMPLES, **kwargs)
    qtbot.addWidget(window)
    window.show()
    qtbot.waitUntil(lambda: not window.results_stale, timeout=20000)
    return window


def podium_tower() -> Building:
    """New building, 20 floors, a 4.5 m ground storey, a podium roof at 4.5 m in front of the
    first facade (the property manager's first steps)."""
    b = blank_building()
    floors = (Floor(0, "Ground floor", 0.0),
              *(Floor(k, f"Level {k}", 4.5 + 3.0 * (k - 1)) for k in range(1, 20)))
    podium = Surface(id="podium", kind=SurfaceKind.CONCRETE, elevation_m=4.5,
                     facade=b.facades[0].id, from_facade_m=0.0, to_facade_m=6.0,
                     label="Podium roof")
    return dataclasses.replace(b, floors=floors, surfaces=(*b.surfaces, podium))


# --- item 1: the first opening above a podium -----------------------------------------------------

def test_add_opening_above_a_podium_goes_where_the_rules_allow(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window(qtbot, podium_tower())
    panel = window.openings_panel
    qtbot.mouseClick(_button(panel, "Add opening"), Qt.MouseButton.LeftButton)
    (opening,) = window.document.building.openings
    assert opening.floor == 1  # level 0 sits below the podium roof at 4.5 m
    assert panel.selected_ids() == [opening.id]
    assert not panel.table_error.isVisibleTo(panel)
    assert "level 1" in panel.place_note.text()


def test_add_opening_uses_the_floor_chosen_in_the_floors_table(qtbot) -> None:  # type: ignore[no-untyped-def]
    window = open_window(qtbot, podium_tower())
    floors = window.floors_panel
    floors.table.selectRow(floors.model.row_of_key(7))
    window.actions_.add_opening.trigger()
    (opening,) = window.document.building.openings
    assert opening.floor == 7
    # a second one on the same floor goes beside the first, not over it
    window.actions_.add_opening.trigger()
    first, second = sorted(window.document.building.openings, key=lambda o: o.x_m)
    assert second.floor == 7 and second.x_m >= first.x_m + first.width_m


def _button(panel: Any, text: str) -> Any:
    from PySide6.QtWidgets import QPushButton

    return next(b for b in panel.findChildren(QPushButton) if b.text() == text)
