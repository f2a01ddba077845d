"""The app's re-audit comparison, offscreen: the same numbers as ``compare --format json``,
worst change first, filters, and a click selecting the opening everywhere."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import pytest

from petfall_audit.cli import main
from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views.common import wait_for_tasks
from petfall_audit.gui.views.compare import COLUMNS
from petfall_audit.io.building_file import save_building
from petfall_audit.present import fmt_risk
from tests.test_compare import earlier_building, later_building

pytestmark = pytest.mark.gui

SAMPLES = 64


class QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def show_error(self, parent: Any, title: str, text: str) -> None:
        raise AssertionError(f"{title}: {text}")


@pytest.fixture
def compared(qtbot, tmp_path: Path, capsys):  # type: ignore[no-untyped-def]
    window = MainWindow(Document(later_building()), prompts=QuietPrompts(), samples=SAMPLES,
                        refine_samples=0)
    qtbot.addWidget(window)
    views = window.views
    window.resize(1366, 768)
    window.show()
    qtbot.waitUntil(lambda: views.context.assessment is not None and not window.results_stale,
                    timeout=20000)
    earlier, later = tmp_path / "2025.json", tmp_path / "2026.json"
    save_building(earlier_building(), earlier)
    save_building(later_building(), later)
    view = views.compare
    assert view is not None
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.open_earlier(earlier)
    # the command line on the same two files, with the app's cats
    capsys.readouterr()
    assert main(["compare", str(earlier), str(later), "--format", "json", "--samples",
                 str(SAMPLES), "--seed", str(window.recomputer.seed)]) == 0
    doc = json.loads(capsys.readouterr().out)
    yield window, views, view, doc
    window.recomputer.cancel()
    window.recomputer.wait(10000)
    wait_for_tasks(20000)


def _cells(view: Any) -> dict[str, list[str]]:
    t = view.table
    return {t.item(r, 0).text(): [t.item(r, c).text() for c in range(t.columnCount())]
            for r in range(t.rowCount()) if not t.isRowHidden(r)}


def test_the_view_shows_the_numbers_of_the_json(compared) -> None:  # type: ignore[no-untyped-def]
    _, _, view, doc = compared
    cells = _cells(view)
    by_id = {o["id"]: o for o in doc["openings"]}
    assert set(cells) == {k for k, o in by_id.items() if o["status"] != "unchanged"}
    before, after = COLUMNS.index("Risk before"), COLUMNS.index("Risk after")
    for oid, row in cells.items():
        o = by_id[oid]
        want_before = "–" if o["risk_before"] is None else fmt_risk(o["risk_before"])
        want_after = "–" if o["risk_after"] is None else fmt_risk(o["risk_after"])
        assert (row[before], row[after]) == (want_before, want_after), oid
    summary = view.summary.text()
    assert f"{fmt_risk(doc['risk_before'])} before, {fmt_risk(doc['risk_after'])} after" in summary
    assert "2025.json" in view.summary.toolTip()


def test_worst_change_first_and_the_filters(compared) -> None:  # type: ignore[no-untyped-def]
    _, _, view, doc = compared
    changes = {o["id"]: (o["risk_after"] or 0) - (o["risk_before"] or 0)
               for o in doc["openings"] if o["status"] != "unchanged"}
    assert view.visible_ids() == sorted(changes, key=lambda k: (-changes[k], k))
    view.set_filter("added")
    assert view.visible_ids() == ["W-5"]
    view.set_filter("removed")
    assert view.visible_ids() == ["W-3"]
    view.set_filter("better")
    assert set(view.visible_ids()) == {k for k, d in changes.items() if d < 0}
    view.set_filter("all")
    assert "B-4" in view.visible_ids()
    view.search.setText("w-")
    assert all(i.startswith("W-") for i in view.visible_ids())


def test_a_click_selects_the_opening_everywhere(compared) -> None:  # type: ignore[no-untyped-def]
    _, views, view, _ = compared
    row = view.visible_ids().index("B-2")
    view.table.selectRow(row)
    assert views.context.selection.ids == ("B-2",)


def test_the_facades_before_and_after_side_by_side(compared, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    window, views, view, _ = compared
    window.view_tabs.setCurrentWidget(view)
    view.pages.setCurrentWidget(view.facades)
    assert view.facades.isVisible()
    # the earlier elevation has the removed window and not the new one; the later the reverse
    assert view.before_facade.opening_item("W-3") is not None
    assert view.before_facade.opening_item("W-5") is None
    assert view.after_facade.opening_item("W-5") is not None
    assert view.after_facade.opening_item("W-3") is None
    # a click on one elevation selects the opening on both and in every view
    view.before_facade.click_opening("B-2")
    assert views.context.selection.ids == ("B-2",)
    assert view.after_context.selection.ids == ("B-2",)
    image = window.grab()
    assert image.width() > 300 and image.height() > 200
    image.save(str(tmp_path / "compare.png"))


def test_fix_status_is_recorded_from_the_plan_and_undone(compared, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views, _, _ = compared
    plan_view = views.plan
    qtbot.waitUntil(lambda: plan_view.plan is not None and bool(plan_view.plan.actions),
                    timeout=20000)
    with qtbot.waitSignal(plan_view.plan_ready, timeout=20000,
                          check_params_cb=lambda p: p.budget == 20000):
        plan_view.set_budget(20000)
    saved = window.document.building.plan
    assert (saved.budget, saved.samples, saved.seed) == (20000, SAMPLES, window.recomputer.seed)
    assert plan_view.record_fix_status("plan", date="2026-05-04") is None
    recorded = window.document.building.fixes
    assert len(recorded) == len(plan_view.plan.actions)
    plan_view.chosen.selectRow(0)
    action = plan_view.selected_action()
    assert plan_view.record_fix_status("fitted", date="2026-06-01") is None
    last = window.document.building.fixes
    rec = next(r for r in last if (r.opening_id, r.control_id) == (action.opening_id,
                                                                   action.control_id))
    assert (rec.status.value, rec.date) == ("fitted", "2026-06-01")
    assert plan_view.chosen.item(0, 5).text() == "Fitted, 2026-06-01"
    window.history.undo()
    assert window.document.building.fixes == recorded


def test_what_if_shows_the_plan_and_touches_nothing_until_accepted(compared, qtbot) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.fix_tracking import apply_plan
    from petfall_audit.risk import assess

    window, views, view, _ = compared
    plan_view = views.plan
    with qtbot.waitSignal(plan_view.plan_ready, timeout=20000,
                          check_params_cb=lambda p: p.budget == 3000):
        plan_view.set_budget(3000)
    plan = plan_view.plan
    assert plan.actions
    before = window.document.building
    with qtbot.waitSignal(view.compared, timeout=20000):
        plan_view.what_if_button.click()
    assert window.view_tabs.currentWidget() is view and view.mode == "what_if"
    assert window.document.building is before  # a copy, the document is untouched
    # independent route: the copy assessed in full with the app's cats
    a = views.context.assessment
    after, _ = apply_plan(a.building, plan.actions, plan_view.catalogue)
    full = assess(after, samples=a.samples, seed=a.seed)
    assert view.comparison.risk_after == pytest.approx(sum(o.risk for o in full.openings),
                                                       rel=1e-12)
    assert set(view.visible_ids()) <= {x.opening_id for x in plan.actions}
    assert view.accept_button.isVisible()
    assert view.accept_what_if() is None
    fitted = window.document.building
    assert fitted.openings == after.openings
    window.history.undo()
    assert window.document.building.openings == before.openings


def test_an_unreadable_earlier_file_is_said_in_words(compared, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    _window, views, view, _doc = compared
    bad = tmp_path / "broken.json"
    bad.write_text("{ not json", encoding="utf-8")
    assert view.open_earlier(bad) is None
    assert view.summary.text().startswith("Cannot open broken.json")
    assert views.floors.open_earlier(bad) is None
    assert "Cannot open broken.json" in views.floors.note.text()


def test_another_buildings_audit_is_said_to_be_one(compared, qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    import dataclasses

    _window, _views, view, _doc = compared
    assert "different buildings" not in view.summary.text()
    e = earlier_building()
    other = dataclasses.replace(e, openings=tuple(
        dataclasses.replace(o, id=f"Q{i}") for i, o in enumerate(e.openings)))
    path = tmp_path / "elsewhere.json"
    save_building(other, path)
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.open_earlier(path)
    # said apart from the totals, in view, and gone with a comparison that is not in doubt
    assert not view.doubt.isHidden()
    assert view.doubt.text().startswith("These may be audits of two different buildings")
    assert "different buildings" not in view.summary.text()
    same = tmp_path / "same.json"
    save_building(e, same)
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.open_earlier(same)
    assert view.doubt.isHidden()


def test_a_long_list_of_building_changes_is_cut(compared, qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    import dataclasses

    from petfall_audit.gui.views.compare import NOTE_CHANGES

    _window, _views, view, _doc = compared
    e = earlier_building()
    floors = tuple(dataclasses.replace(f, label=f"Storey {f.level} (old name)") for f in e.floors)
    path = tmp_path / "renamed_floors.json"
    info = dataclasses.replace(e.info, site_altitude_m=120.0, air_temperature_c=28.0)
    save_building(dataclasses.replace(e, floors=floors, info=info), path)
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.open_earlier(path)
    changes = len(view.comparison.building_changes)
    assert changes > NOTE_CHANGES
    note = view.note.text()
    assert f"and {changes - NOTE_CHANGES} more" in note
    assert note.count(";") == NOTE_CHANGES  # the shown changes and the "and N more"
    assert len(view.note.toolTip().splitlines()) == changes  # the whole list


def test_renumbered_openings_are_paired_on_request(qtbot, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    import dataclasses

    e = earlier_building()
    # this audit: W-1 renumbered W-1a, nothing else changed
    now = dataclasses.replace(e, openings=tuple(
        dataclasses.replace(o, id="W-1a") if o.id == "W-1" else o for o in e.openings))
    window = MainWindow(Document(now), prompts=QuietPrompts(), samples=SAMPLES,
                        refine_samples=0)
    qtbot.addWidget(window)
    window.show()
    views = window.views
    qtbot.waitUntil(lambda: views.context.assessment is not None and not window.results_stale,
                    timeout=20000)
    path = tmp_path / "earlier.json"
    save_building(e, path)
    view = views.compare
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.open_earlier(path)
    assert not view.pair_renumbered.isHidden() and not view.pair_renumbered.isChecked()
    assert {(o.id, o.status) for o in view.comparison.openings if o.status != "unchanged"} == {
        ("W-1a", "added"), ("W-1", "removed")}
    assert "W-1 as W-1a" in view.summary.text()
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.pair_renumbered.setChecked(True)
    row = view.comparison.opening("W-1a")
    assert (row.status, row.earlier_id) == ("unchanged", "W-1")
    assert "renumbered" not in view.summary.text()
    with qtbot.waitSignal(view.compared, timeout=20000):
        view.pair_renumbered.setChecked(False)
    assert view.comparison.opening("W-1a").status == "added"
    window.recomputer.cancel()
    window.recomputer.wait(10000)
    wait_for_tasks(20000)
