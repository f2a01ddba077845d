"""The result views, offscreen: one selection everywhere, facade fill and ranked place after a
fix, the plan following the budget, filters, floor comparison and keyboard use."""

from __future__ import annotations

import dataclasses
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from PySide6.QtCore import QItemSelectionModel, Qt

from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.figures import level_summary
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views import VIEW_NAMES, InstalledViews
from petfall_audit.gui.views.common import wait_for_tasks
from petfall_audit.gui.views.ranked import ID_ROLE
from petfall_audit.io.building_file import save_building
from petfall_audit.model import BALCONY_LIKE, Building
from petfall_audit.palette import palette_names
from petfall_audit.present.explain import explain
from petfall_audit.risk import assess

pytestmark = pytest.mark.gui

SAMPLES = 64  # few simulated cats keep the tests fast; the logic is the same


class QuietPrompts(Prompts):
    """Never blocks: unsaved work is discarded when the test closes the window."""

    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def show_error(self, parent: Any, title: str, text: str) -> None:
        raise AssertionError(f"{title}: {text}")


@pytest.fixture
def app_window(qtbot):  # type: ignore[no-untyped-def]
    made: list[MainWindow] = []

    def make(building: Building | None = None) -> tuple[MainWindow, InstalledViews]:
        window = MainWindow(Document(building or sample_building("walkup")),
                            prompts=QuietPrompts(), samples=SAMPLES,
                            refine_samples=0)  # one set of results per edit
        qtbot.addWidget(window)
        views = window.views
        window.resize(1366, 768)
        window.show()
        qtbot.waitUntil(lambda: views.context.assessment is not None
                        and not window.results_stale, timeout=20000)
        qtbot.waitUntil(lambda: views.plan.plan is not None, timeout=20000)
        # and the budget curve after it: a solve running on across the test's start would
        # print past pytest's capture (pytest swaps descriptors 1 and 2 between phases)
        assert wait_for_tasks(20000)
        made.append(window)
        return window, views

    yield make
    for window in made:
        window.recomputer.cancel()
        window.recomputer.wait(10000)
    wait_for_tasks(20000)


def _select_in_ranked(views: InstalledViews, opening_id: str) -> None:
    table = views.ranked.table
    proxy = views.ranked.proxy
    row = next(r for r in range(proxy.rowCount()) if proxy.index(r, 0).data(ID_ROLE) == opening_id)
    table.selectionModel().select(proxy.index(row, 0),
                                  QItemSelectionModel.SelectionFlag.ClearAndSelect
                                  | QItemSelectionModel.SelectionFlag.Rows)


def test_views_are_installed_as_tabs_with_shortcuts(app_window) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    names = [window.view_tabs.tabText(i) for i in range(window.view_tabs.count())]
    assert names == list(VIEW_NAMES)
    shortcuts = {a.shortcut().toString() for a in views.view_actions}
    assert {"Ctrl+1", "Ctrl+5", "Ctrl+0"} <= shortcuts
    views.view_actions[3].trigger()
    assert window.view_tabs.currentWidget() is views.profile


def test_selecting_in_the_list_selects_in_the_facade_profile_and_editor(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    a = views.context.assessment
    target = a.ranked("risk")[3]
    _select_in_ranked(views, target.id)
    assert views.context.selection.current == target.id
    # facade view: switched to the opening's facade, its shape outlined
    assert views.facade.facade_id == target.facade
    item = views.facade.opening_item(target.id)
    assert item is not None and item.selected_
    assert sum(i.selected_ for i in views.facade.items.values()) == 1
    # profile: both posture paths of that opening, ending at the median drop
    assert views.profile.opening_id == target.id
    assert views.profile.paths
    for path in views.profile.paths:
        assert path.height_m[0] == pytest.approx(target.drop_m.p50, rel=1e-6)
        assert path.height_m[-1] == pytest.approx(0.0, abs=1e-6)
    assert target.id in views.profile.caption.text()
    # the openings editor follows
    assert window.openings_panel.selected_ids() == [target.id]


def test_clicking_a_facade_shape_selects_it_everywhere(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    window.view_tabs.setCurrentWidget(views.facade)
    facade = views.facade
    oid = next(iter(facade.items))
    item = facade.items[oid]
    facade.canvas.centerOn(item)
    pos = facade.canvas.mapFromScene(item.sceneBoundingRect().center())
    qtbot.mouseClick(facade.canvas.viewport(), Qt.MouseButton.LeftButton, pos=pos)
    assert views.context.selection.ids == (oid,)
    assert views.ranked.table.selectionModel().selectedRows()[0].data(ID_ROLE) == oid
    assert window.openings_panel.selected_ids() == [oid]
    assert oid in facade.info.text()


def test_with_nothing_selected_a_tall_facade_opens_at_its_worst_opening(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    # the tower's facade is taller than the view and its lowest storeys have no openings:
    # opening at the ground showed bare floors
    window, views = app_window(sample_building("tower"))
    assert views.context.selection.current is None
    window.view_tabs.setCurrentWidget(views.facade)
    facade = views.facade
    qtbot.wait(20)
    a = views.context.assessment
    worst = min(facade.items, key=lambda oid: a.result(oid).risk_rank)
    canvas = facade.canvas
    seen = canvas.mapToScene(canvas.viewport().rect()).boundingRect()
    assert seen.height() < facade.scene.sceneRect().height()  # it does not all fit
    assert seen.contains(facade.items[worst].sceneBoundingRect().center())
    ground = facade.elevation.ground_m
    assert not seen.contains(seen.center().x(), -ground)  # not the bare ground floors


def test_another_facade_can_be_shown_while_an_opening_is_selected(app_window) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    window.view_tabs.setCurrentWidget(views.facade)
    facade = views.facade
    worst = views.context.assessment.ranked()[0]
    views.context.select([worst.id])
    assert facade.facade_id == worst.facade  # a new selection brings its facade
    other = next(facade.facade_box.itemData(i) for i in range(facade.facade_box.count())
                 if facade.facade_box.itemData(i) != worst.facade)
    facade.set_facade(other)
    assert facade.facade_id == other  # and the user's choice of facade then stays
    assert worst.id not in facade.items and facade.items
    assert views.context.selection.ids == (worst.id,)


def test_arrow_keys_move_the_selection_on_the_facade(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    window.view_tabs.setCurrentWidget(views.facade)
    facade = views.facade
    facade.canvas.setFocus()
    qtbot.keyClick(facade.canvas, Qt.Key.Key_Up)  # nothing selected: the worst one
    first = views.context.selection.current
    assert first in facade.items
    centre = facade.items[first].rect().center()
    qtbot.keyClick(facade.canvas, Qt.Key.Key_Down)
    second = views.context.selection.current
    assert second != first and second in facade.items
    assert facade.items[second].rect().center().y() > centre.y()  # lower on the facade


def test_netting_a_balcony_changes_its_fill_and_its_place(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    window.show_view(views.facade)  # the view looked at draws each result at once
    a = views.context.assessment
    building = a.building
    balcony = next(r for r in a.ranked("risk") if r.kind in BALCONY_LIKE
                   and building.opening(r.id).netting_mesh_mm is None)
    views.context.select([balcony.id])
    item = views.facade.opening_item(balcony.id)
    assert item is not None and not item.protected
    assert item.overlay.brush().style() == Qt.BrushStyle.NoBrush
    views.ranked.set_order("band")
    before_place = views.ranked.visible_ids().index(balcony.id)
    views.ranked.set_order("risk")
    before_risk_place = views.ranked.visible_ids().index(balcony.id)
    net = next(o for o in views.plan.options[balcony.id] if "net" in o.control_id)
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        assert views.plan.fit_option(net) is None
    assert window.document.building.opening(balcony.id).netting_mesh_mm is not None
    item = views.facade.opening_item(balcony.id)
    assert item is not None and item.protected
    assert item.overlay.brush().style() == Qt.BrushStyle.DiagCrossPattern
    after = views.context.assessment.result(balcony.id)
    assert after.risk < balcony.risk
    assert views.ranked.visible_ids().index(balcony.id) > before_risk_place
    assert views.context.selection.current == balcony.id  # still selected after the update
    # undo puts it back, in one step
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.undo()
    assert window.document.building.opening(balcony.id).netting_mesh_mm is None
    views.ranked.set_order("band")
    assert views.ranked.visible_ids().index(balcony.id) == before_place


def test_the_plan_shows_the_controls_names_at_1280_pixels(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    # with the plan, the options and the curve side by side, both tables elided the controls'
    # names to their first word ("Anchored ...") on a 1280 x 720 screen
    window, views = app_window()
    window.resize(1280, 720)
    window.show_view(views.plan)
    plan_view = views.plan
    plan_view.set_budget(2000)
    qtbot.waitUntil(lambda: plan_view.plan is not None and plan_view.plan.budget == 2000
                    and plan_view.chosen.rowCount() > 0, timeout=20000)
    qtbot.wait(50)
    metrics = plan_view.chosen.fontMetrics()
    for table, col in ((plan_view.chosen, 1), (plan_view.options_table, 0)):
        if table.rowCount() == 0:
            _select_in_ranked(views, plan_view.plan.actions[0].opening_id)
            window.show_view(views.plan)
            qtbot.waitUntil(lambda t=table: t.rowCount() > 0, timeout=20000)
        width = table.horizontalHeader().sectionSize(col)
        # a typical name of the shipped catalogue, whole (8 px for the cell's margins)
        assert width >= metrics.horizontalAdvance("Anchored enclosure net, 30 mm mesh") + 8, (
            table.objectName(), width)


def test_changing_the_budget_changes_the_plan(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    plan_view = views.plan
    def for_budget(amount: float):  # type: ignore[no-untyped-def]
        # a plan for an earlier budget may still arrive while the next one is asked for
        return lambda plan: plan.budget == amount

    with qtbot.waitSignal(plan_view.plan_ready, timeout=20000,
                          check_params_cb=for_budget(0)) as none:
        plan_view.set_budget(0)
    assert none.args[0].actions == () and none.args[0].total_cost == 0
    with qtbot.waitSignal(plan_view.plan_ready, timeout=20000,
                          check_params_cb=for_budget(300)) as small:
        plan_view.set_budget(300)
    with qtbot.waitSignal(plan_view.plan_ready, timeout=20000,
                          check_params_cb=for_budget(20000)) as large:
        plan_view.set_budget(20000)
    p_small, p_large = small.args[0], large.args[0]
    assert 0 < p_small.total_cost <= 300
    assert p_large.total_cost <= 20000
    assert p_large.risk_after < p_small.risk_after < p_small.risk_before
    assert plan_view.chosen.rowCount() == len(p_large.actions)
    assert "20,000" in plan_view.summary.text()
    # the curve: residual risk never rises with more budget (each point an exact optimum)
    qtbot.waitUntil(lambda: plan_view.curve is not None, timeout=20000)
    budgets, residual = plan_view.curve
    assert np.all(np.diff(residual) <= 1e-6 * residual[0])
    assert residual[0] == pytest.approx(float(np.sum(views.context.assessment.risk)))
    # no option on an escape window blocks it: nets and fixed devices are never offered there
    building = views.context.assessment.building
    for oid, options in plan_view.options.items():
        if building.opening(oid).escape_window:
            catalogue = plan_view.catalogue
            assert all(catalogue.control(o.control_id).releasable is not False for o in options)


def test_ranked_filters_and_orders(app_window) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    ranked = views.ranked
    a = views.context.assessment
    assert ranked.visible_ids() == [r.id for r in a.ranked("risk")]  # the default order
    ranked.set_order("band")
    assert ranked.visible_ids() == [r.id for r in a.ranked("band")]
    ranked.set_order("risk")
    assert ranked.visible_ids() == [r.id for r in a.ranked("risk")]
    facade = a.building.facades[1].id
    ranked.facade_box.setCurrentIndex(ranked.facade_box.findData(facade))
    shown = ranked.visible_ids()
    assert shown and all(a.result(i).facade == facade for i in shown)
    assert len(shown) == sum(o.facade == facade for o in a.openings)
    ranked.band_box.setCurrentIndex(ranked.band_box.findData(a.result(shown[0]).expected_band))
    assert all(a.result(i).expected_band == a.result(shown[0]).expected_band
               for i in ranked.visible_ids())
    ranked.set_order("band")
    _select_in_ranked(views, ranked.visible_ids()[0])
    text = ranked.details.toPlainText()
    assert "Why it ranks here" in text
    assert explain(a.result(ranked.visible_ids()[0]).factors[0]) in text


def test_floor_comparison_of_two_facades_and_of_an_earlier_audit(app_window, qtbot,
                                                                 tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    floors = views.floors
    a = views.context.assessment
    fa, fb = floors.a_box.currentData(), floors.b_box.currentData()
    assert fa != fb and fa is not None and fb is not None
    sa, sb = floors.series
    assert np.array_equal(sa.worst_band, level_summary(a, fa).worst_band)
    assert np.allclose(sb.falls_per_year, level_summary(a, fb).falls_per_year)
    # an earlier audit: the same building before a net on every balcony
    earlier = dataclasses.replace(a.building, openings=tuple(
        dataclasses.replace(o, netting_mesh_mm=None, climbing_aids=True)
        if o.kind in BALCONY_LIKE else o for o in a.building.openings))
    path = tmp_path / "last-year.json"
    save_building(earlier, path)
    with qtbot.waitSignal(floors.earlier_ready, timeout=20000):
        floors.open_earlier(path)
    assert floors.mode == "audits"
    this, before = floors.series
    expected = level_summary(assess(earlier, samples=SAMPLES, seed=window.recomputer.seed))
    assert np.allclose(before.falls_per_year, expected.falls_per_year)
    assert np.array_equal(before.worst_band, expected.worst_band)
    assert np.allclose(this.falls_per_year, level_summary(a).falls_per_year)
    assert "last-year.json" in floors.note.text()
    assert "different buildings" not in floors.note.text()
    # another building's file (no opening in common, another address) is named as such
    other = dataclasses.replace(earlier, info=dataclasses.replace(
        earlier.info, address="3 Nowhere Lane (invented)"), openings=tuple(
        dataclasses.replace(o, id=f"Q{i}") for i, o in enumerate(earlier.openings)))
    elsewhere = tmp_path / "elsewhere.json"
    save_building(other, elsewhere)
    with qtbot.waitSignal(floors.earlier_ready, timeout=20000):
        floors.open_earlier(elsewhere)
    note = floors.note.text()
    assert "These may be audits of two different buildings" in note
    assert "3 Nowhere Lane (invented)" in note


def test_views_follow_the_units_and_the_palette(app_window) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    oid = views.context.assessment.ranked()[0].id
    views.context.select([oid])
    window.set_units("imperial")
    assert " ft" in views.profile.caption.text() and "mph" in views.profile.caption.text()
    window.set_palette("grey")
    item = views.facade.opening_item(oid)
    assert item is not None
    from petfall_audit.palette import band_style

    assert item.fill_brush().color().name().upper() == band_style(item.band, "grey").fill.upper()


def test_cat_assumptions_panel_fills_after_the_results(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    panel = views.sensitivity
    show = next(a for a in views.view_actions if a.shortcut().toString() == "Ctrl+6")
    show.trigger()
    assert window.view_tabs.currentWidget() is panel
    qtbot.waitUntil(lambda: panel.section is not None, timeout=20000)
    a = views.context.assessment
    assert panel.section_for is a
    fig = panel.section.figure
    assert fig.samples == a.samples == SAMPLES and len(fig.opening_ids) == 5
    ticks = panel.plot.getAxis("left")._tickLevels[0]
    assert [t[1] for t in ticks] == [f"{label} ({r}): swing {v}" for label, r, v in zip(
        fig.labels, panel.section.ranges, panel.section.values, strict=True)]  # largest on top
    assert ticks[0][1].endswith(f"swing {panel.section.values[0]}")
    assert panel.note.text() == panel.section.lead and "depends most on" in panel.section.lead
    assert panel.plot.isEnabled() and panel.plot.isVisible()


def test_cat_assumptions_wait_for_the_full_results(qtbot, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.views import sensitivity as view_module

    seen: list[int] = []
    real = view_module.compute_sensitivity

    def spy(assessment: Any, is_current: Any = None) -> Any:
        seen.append(int(assessment.samples))
        return real(assessment, is_current)

    monkeypatch.setattr(view_module, "compute_sensitivity", spy)
    window = MainWindow(Document(sample_building("walkup")), prompts=QuietPrompts(),
                        samples=32, refine_samples=SAMPLES, refine_delay_ms=50)
    qtbot.addWidget(window)
    views = window.views
    window.show()
    try:
        qtbot.waitUntil(lambda: views.sensitivity.section is not None, timeout=30000)
        assert views.sensitivity.section.figure.samples == SAMPLES
        assert seen and set(seen) == {SAMPLES}  # never run on the quick 32-cat results
    finally:
        window.recomputer.cancel()
        window.recomputer.wait(10000)
        wait_for_tasks(20000)


def test_a_partial_podium_is_drawn_where_it_lies_on_screen_and_paper(app_window) -> None:  # type: ignore[no-untyped-def]
    from PySide6.QtWidgets import QGraphicsRectItem
    from reportlab.graphics.shapes import Rect

    from petfall_audit.figures import facade_elevations
    from petfall_audit.model import Surface, SurfaceKind
    from petfall_audit.report.charts import facade_drawing, facade_scales

    base = sample_building("walkup")
    podium = Surface("podium", SurfaceKind.ROOF, 0.5, "street", 1.1, 6.0, "Bin store roof",
                     x_from_m=4.0, x_to_m=10.0)
    b = dataclasses.replace(base, surfaces=(*base.surfaces, podium))
    window, views = app_window(b)
    window.view_tabs.setCurrentWidget(views.facade)
    views.facade.set_facade("street")
    strips = [i for i in views.facade.scene.items() if isinstance(i, QGraphicsRectItem)
              and i.toolTip().startswith("Bin store roof")]
    assert len(strips) == 1
    r = strips[0].rect()
    assert (r.left(), r.width()) == pytest.approx((4.0, 6.0))
    assert "along the facade" in strips[0].toolTip()
    # the PDF draws the same figure data: one strip, 6 m wide, starting 4 m along
    elev = next(e for e in facade_elevations(views.context.assessment) if e.facade_id == "street")
    band = next(s for s in elev.surfaces if s.id == "podium")
    assert band.span_along_m(elev.length_m) == (4.0, 10.0)
    d = facade_drawing(elev, 480.0, 600.0)
    _, sx = facade_scales(elev, 480.0, 600.0)
    widths = [round(c.width / sx, 6) for c in d.contents if isinstance(c, Rect)]
    assert 6.0 in widths


def _pdf_hatched(drawing: Any, elev: Any) -> set[str]:
    """Openings the PDF elevation cross-hatched: one group per opening (rectangle first, in
    the order of ``elev.opening_ids``); a hatch is a diagonal line inside the rectangle (the
    rail is horizontal and sticks out past it)."""
    from reportlab.graphics.shapes import Group, Line, Rect

    groups = [g for g in drawing.contents if isinstance(g, Group)]
    assert len(groups) == len(elev.opening_ids)
    out = set()
    for oid, g in zip(elev.opening_ids, groups, strict=True):
        r = g.contents[0]
        assert isinstance(r, Rect)
        for line in g.contents[1:]:
            if not isinstance(line, Line) or line.y1 == line.y2:
                continue
            inside = all(r.x - 1e-6 <= x <= r.x + r.width + 1e-6 for x in (line.x1, line.x2)) \
                and all(r.y - 1e-6 <= y <= r.y + r.height + 1e-6 for y in (line.y1, line.y2))
            if inside:
                out.add(oid)
    return out


def test_screen_and_paper_hatch_the_same_protected_openings(app_window) -> None:  # type: ignore[no-untyped-def]
    """One figure-data object drawn by the app and by the PDF: both hatch exactly the openings
    whose barrier holds the building's cats (kittens here), not every opening with a barrier."""
    from PySide6.QtCore import Qt as _Qt

    from petfall_audit.model import CAT_PRESETS
    from petfall_audit.report.charts import facade_drawing

    base = sample_building("walkup")
    assert base.cat_profile == CAT_PRESETS["kitten"]
    change = {
        "CY-1F": {"netting_mesh_mm": 100.0},  # balcony, coarse net: no protection
        "CY-2F": {"netting_mesh_mm": 20.0},   # balcony, kitten net (20 mm, pet-net practice)
        "CY-2K": {"limiter_gap_mm": 150.0},   # wider than any child limiter
        "CY-3K": {"limiter_gap_mm": 20.0},    # narrower than a kitten's head
        # CY-1K, CY-4K, CY-5K keep their 100 mm child limiters; CY-4B has a pet screen
    }
    b = dataclasses.replace(base, openings=tuple(
        dataclasses.replace(o, **change.get(o.id, {})) for o in base.openings))
    window, views = app_window(b)
    window.view_tabs.setCurrentWidget(views.facade)
    views.facade.set_facade("courtyard")
    elev = views.facade.elevation
    assert elev is not None and elev.facade_id == "courtyard"
    expected = {"CY-2F", "CY-3K", "CY-4B"}
    assert set(elev.protected_ids) == expected
    screen = {oid for oid, item in views.facade.items.items()
              if item.overlay.brush().style() == _Qt.BrushStyle.DiagCrossPattern}
    paper = _pdf_hatched(facade_drawing(elev, 480.0, 600.0), elev)
    assert screen == paper == expected
    # the tooltip says why a coarse barrier is not hatched, in the display units
    tip = views.facade.items["CY-1F"].tooltip_text
    assert "100 mm mesh (lets 100% of these cats through)" in tip
    assert "20 mm mesh (holds these cats)" in views.facade.items["CY-2F"].tooltip_text


def test_a_view_off_screen_draws_new_results_when_shown_or_when_the_user_pauses(
        app_window, qtbot, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.editing.commands import SetOpeningFields
    from petfall_audit.gui.views.common import WhileHidden

    window, views = app_window()
    assert window.view_tabs.currentWidget() is views.ranked
    balcony = next(o for o in window.document.building.openings
                   if o.kind in BALCONY_LIKE and o.netting_mesh_mm is None)
    box = views.facade.facade_box
    box.setCurrentIndex(box.findData(balcony.facade))
    assert not views.facade.opening_item(balcony.id).protected  # drawn once, before any edit
    monkeypatch.setattr(WhileHidden, "CATCH_UP_MS", 60_000)  # no pause within the test
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.history.push(SetOpeningFields([balcony.id], {"netting_mesh_mm": 30.0}))
    # the list in front follows at once; the facade tab behind it still shows the old results
    assert views.context.assessment.building.opening(balcony.id).netting_mesh_mm == 30.0
    assert not views.facade.opening_item(balcony.id).protected
    window.show_view(views.facade)  # shown: drawn before the user sees it
    assert views.facade.opening_item(balcony.id).protected

    window.show_view(views.ranked)
    monkeypatch.setattr(WhileHidden, "CATCH_UP_MS", 50)
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.undo()
    # a pause: the views behind catch up without being shown
    qtbot.waitUntil(lambda: not views.facade.opening_item(balcony.id).protected, timeout=5000)
    assert window.view_tabs.currentWidget() is views.ranked


def test_a_quick_recompute_does_not_flash_the_list_grey_but_a_slow_one_greys_it(
        app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.views.ranked import STALE_LOOK_DELAY_MS

    window, views = app_window()
    model = views.ranked.model
    assert not model.stale
    views.context.results.set_stale()  # a recomputation started
    assert not model.stale  # not yet: most results come back sooner
    assert "out of date" in views.ranked.state_note.text()  # the line says it at once
    qtbot.wait(STALE_LOOK_DELAY_MS + 150)
    assert model.stale  # they did not: the old rows are shown as out of date
    index = model.index(0, 0)
    assert model.data(index, Qt.ItemDataRole.FontRole).italic()
    views.context.results.set_assessment(views.context.assessment, SAMPLES)
    assert not model.stale and model.data(index, Qt.ItemDataRole.FontRole) is None


def _shown_texts(model: Any) -> list[list[str]]:
    return [[model.data(model.index(row, col)) for col in range(model.columnCount())]
            for row in range(model.rowCount())]


def _fresh_texts(model: Any, views: InstalledViews) -> list[list[str]]:
    """Every cell's text formatted anew from the results (no text kept from before)."""
    from petfall_audit.gui.result_cells import result_text

    a = views.context.assessment
    floors = {f.level: f.label for f in a.building.floors}
    facades = {f.id: f.label or f.id for f in a.building.facades}
    return [[result_text(model.result(row), key, views.context.units, views.context.palette,
                         floors, facades) for key in model.KEYS]
            for row in range(model.rowCount())]


def test_the_list_shows_each_result_as_it_is_after_edits_that_move_its_ranks(
        app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    """The list keeps a result's texts while the result stays the same; after edits that move
    other openings' ranks, after undo and after a change of units every cell still reads as
    the result it shows."""
    window, views = app_window()
    model = views.ranked.model
    _shown_texts(model)  # every text asked for once (as a first paint does)
    a = views.context.assessment
    worst = a.ranked("risk")[0]
    assert window.document.building.opening(worst.id).netting_mesh_mm is None
    from petfall_audit.editing.commands import SetOpeningFields

    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.history.push(SetOpeningFields([worst.id], {"netting_mesh_mm": 30.0}))
    after = views.context.assessment
    moved = [r.id for r in after.openings if r.risk_rank != a.result(r.id).risk_rank]
    assert len(moved) > 1  # the netted opening and those that moved up past it
    assert _shown_texts(model) == _fresh_texts(model, views)
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.undo()
    assert _shown_texts(model) == _fresh_texts(model, views)
    window.set_units("imperial")
    shown = _shown_texts(model)
    assert shown == _fresh_texts(model, views)
    assert any(" ft" in text for text in shown[0])


def test_new_results_of_the_same_openings_update_the_rows_in_place_and_keep_the_filter(
        app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    """After an edit the list is told which rows changed, not reset (a reset repainted and
    refitted every row, also when no changed row was in view); the rows in place may hold
    other openings then, so an active filter is applied again."""
    from petfall_audit.editing.commands import SetOpeningFields

    window, views = app_window()
    ranked = views.ranked
    model = ranked.model
    resets: list[int] = []
    changed: list[tuple[int, int]] = []
    model.modelReset.connect(lambda: resets.append(1))
    model.dataChanged.connect(lambda top, bottom, roles: changed.append((top.row(),
                                                                         bottom.row())))
    a = views.context.assessment
    worst = a.ranked("risk")[0]
    band = worst.expected_band
    ranked.band_box.setCurrentIndex(ranked.band_box.findData(band))
    assert ranked.proxy.rowCount() < model.rowCount()  # the filter leaves some out
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.history.push(SetOpeningFields([worst.id], {"netting_mesh_mm": 30.0}))
    after = views.context.assessment
    assert resets == [] and changed  # in place
    first, last = changed[0]
    moved = [i for i, r in enumerate(after.ranked("risk")) if r.risk_rank != a.result(
        r.id).risk_rank]
    assert first <= min(moved) and last >= max(moved)
    # every shown row is an opening of that band, and every opening of that band is shown
    shown = ranked.visible_ids()
    assert shown == [r.id for r in after.ranked("risk") if r.expected_band == band]
    assert _shown_texts(model) == _fresh_texts(model, views)
    # a building with other openings is a new list
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.actions_.add_opening.trigger()
    assert resets == [1]


def test_the_progress_bar_shows_only_when_results_take_a_while(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.main_window import PROGRESS_DELAY_MS

    window, views = app_window()
    window.recomputer.cancel()  # the results never come: the recomputation "takes long"
    window.state.results.set_stale()
    window._show_progress()
    assert not window.progress.isVisible()  # no flash on an edit that computes quickly
    qtbot.waitUntil(window.progress.isVisible, timeout=PROGRESS_DELAY_MS + 2000)
    with qtbot.waitSignal(window.results_updated, timeout=20000):
        window.recompute()
    assert not window.progress.isVisible()  # the results came: the bar goes


def test_the_floors_table_counts_each_floors_openings_after_an_edit(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = app_window()
    panel = window.floors_panel
    model = panel.model
    column = next(c for c in range(model.columnCount())
                  if model.headerData(c, Qt.Orientation.Horizontal) == "Openings")
    building = window.document.building
    opening = building.openings[0]
    row = next(r for r in range(model.rowCount())
               if model.index(r, 0).data(Qt.ItemDataRole.EditRole) in (opening.floor,
                                                                       str(opening.floor)))
    before = int(model.index(row, column).data())
    assert before == sum(o.floor == opening.floor for o in building.openings)
    from petfall_audit.editing.commands import RemoveOpenings

    window.history.push(RemoveOpenings([opening.id]))
    assert int(model.index(row, column).data()) == before - 1
    window.undo()
    assert int(model.index(row, column).data()) == before


def _line_starts(html: str, width_px: int) -> tuple[str, list[int]]:
    """The plain text of ``html`` laid out ``width_px`` wide, and where each line starts."""
    from PySide6.QtGui import QTextDocument

    doc = QTextDocument()
    doc.setHtml(html)
    doc.setTextWidth(width_px)
    doc.documentLayout()  # lays the document out
    starts: list[int] = []
    block = doc.begin()
    while block.isValid():
        layout = block.layout()
        starts += [block.position() + layout.lineAt(i).textStart()
                   for i in range(layout.lineCount())]
        block = block.next()
    return doc.toRawText(), starts  # raw: non-breaking spaces kept


@pytest.mark.parametrize("palette", palette_names())
def test_the_facade_key_breaks_between_keys_never_inside_one(qtbot, palette: str) -> None:  # type: ignore[no-untyped-def]
    # at 1280 px in the audits' comparison a band's "+++" broke after its second "+"
    from PySide6.QtGui import QFontMetrics, QTextDocument

    from petfall_audit.band_names import BANDS
    from petfall_audit.gui.views.facade import legend_html

    html = legend_html(palette)
    metrics = QFontMetrics(QTextDocument().defaultFont())
    widest = max(metrics.horizontalAdvance(f" ++++  {name} (4)") for name in BANDS)
    for width in range(widest + 10, 900, 5):  # a line as wide as a band's key at least
        text, starts = _line_starts(html, width)
        spans, at = [], 0
        for key in text.split("\xa0\xa0 ")[:len(BANDS)]:  # the bands' keys come first
            spans.append((at, at + len(key)))
            at += len(key) + 3
        for start in starts[1:]:
            inside = [text[a:b] for a, b in spans if a < start < b]
            assert not inside, (width, inside)


def test_the_audits_facades_share_one_key(app_window) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.gui.views.facade import legend_html

    window, views = app_window()
    compare = views.compare
    assert not compare.before_facade.legend.isVisibleTo(compare)
    assert not compare.after_facade.legend.isVisibleTo(compare)
    assert compare.facades_legend.text() == legend_html(views.context.palette)
    assert views.facade.legend.text() == legend_html(views.context.palette)


def test_an_empty_facade_view_says_what_to_do_where_it_can_be_seen(app_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    # after File > New the facade view was blank: its note lay out of view at the last
    # building's scale and extent
    from PySide6.QtWidgets import QGraphicsTextItem

    window, views = app_window()
    window.show_view(views.facade)
    qtbot.waitUntil(lambda: bool(views.facade.items), timeout=20000)  # the walk-up drawn
    window.document.dirty = False
    assert window.session.new()
    qtbot.waitUntil(lambda: views.context.assessment is not None
                    and not views.context.assessment.openings, timeout=20000)
    canvas = views.facade.canvas
    qtbot.waitUntil(lambda: any(isinstance(i, QGraphicsTextItem)
                                for i in views.facade.scene.items()), timeout=20000)
    note = next(i for i in views.facade.scene.items() if isinstance(i, QGraphicsTextItem))
    assert "No openings to draw yet" in note.toPlainText()
    shown = canvas.mapFromScene(note.sceneBoundingRect()).boundingRect()
    assert canvas.viewport().rect().contains(shown)
