"""A property manager who works in feet (issue 13): with the app in imperial units, no metric
unit appears in any table cell or tooltip of the ranked view, the window's results table or
the fix plan view (their headers and the ranked view's details included)."""

from __future__ import annotations

import re
from typing import Any

import pytest
from PySide6.QtCore import QAbstractItemModel, Qt

from petfall_audit.demo import sample_building
from petfall_audit.editing.document import Document
from petfall_audit.gui.dialogs import Prompts
from petfall_audit.gui.main_window import MainWindow
from petfall_audit.gui.views.common import wait_for_tasks

pytestmark = pytest.mark.gui

#: A metric quantity: a number then mm, m, m/s or km/h as a word of its own (m² and mph are
#: not metric lengths or speeds; "5 minutes" is not a unit).
METRIC = re.compile(r"\d\s?(?:mm|m/s|km/h|m)(?![\w/])")


class _QuietPrompts(Prompts):
    def ask_save_changes(self, parent: Any, name: str) -> str:
        return "discard"

    def show_error(self, parent: Any, title: str, text: str) -> None:
        raise AssertionError(f"{title}: {text}")


def test_the_pattern_finds_metric_units_and_nothing_else() -> None:
    # What the check is meant to catch, and what it must let through.
    for text in ("3.1 m", "drop 10 m.", "18.5 m/s", "95 mm gap", "12 km/h", "(2.4m)"):
        assert METRIC.search(text), text
    for text in ("10 ft 2 in", "41.4 mph", "0.05 m²", "5 minutes", "Ground floor", "1 in 1,200"):
        assert not METRIC.search(text), text


def _texts(model: QAbstractItemModel, factors: set[str]) -> list[str]:
    """Every cell's text and tooltip of ``model`` and its headers' texts and tooltips, with
    the risk layer's factor and hazard sentences left out (see the test below)."""
    out: list[str] = []
    roles = (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.ToolTipRole)
    for col in range(model.columnCount()):
        for role in roles:
            out.append(str(model.headerData(col, Qt.Orientation.Horizontal, role) or ""))
    for row in range(model.rowCount()):
        for col in range(model.columnCount()):
            for role in roles:
                value = model.index(row, col).data(role)
                if value is None:
                    continue
                lines = [line for line in str(value).splitlines()
                         if line.removeprefix("• ") not in factors]
                out.append("\n".join(lines))
    return out


@pytest.fixture
def imperial_window(qtbot):  # type: ignore[no-untyped-def]
    window = MainWindow(Document(sample_building("walkup")), prompts=_QuietPrompts(),
                        samples=64, refine_samples=0)
    qtbot.addWidget(window)
    views = window.views
    window.set_units("imperial")
    window.resize(1366, 768)
    window.show()
    qtbot.waitUntil(lambda: views.context.assessment is not None
                    and not window.results_stale, timeout=20000)
    qtbot.waitUntil(lambda: views.plan.plan is not None, timeout=20000)
    yield window, views
    window.recomputer.cancel()
    window.recomputer.wait(10000)
    wait_for_tasks(20000)


def _factor_sentences(assessment: Any) -> set[str]:
    return {s for o in assessment.openings for s in (*o.factors, *o.hazards)}


def test_imperial_tables_and_tooltips_show_no_metric_unit(imperial_window, qtbot) -> None:  # type: ignore[no-untyped-def]
    window, views = imperial_window
    assert window.options.units == "imperial"
    a = views.context.assessment
    factors = _factor_sentences(a)
    texts: list[str] = []
    texts += _texts(views.ranked.model, factors)
    texts += _texts(views.ranked.proxy, factors)  # as shown, sorted
    plan = views.plan
    first = views.ranked.visible_ids()[0]
    views.context.select([first])  # the options table fills for the selected opening
    qtbot.waitUntil(lambda: plan.options_table.rowCount() > 0, timeout=20000)
    for table in (plan.chosen, plan.options_table):
        assert table.rowCount() > 0
        texts += _texts(table.model(), factors)
    # the ranked view's details and the facade's hover text of the selected opening
    detail = views.ranked.details.toPlainText()
    texts.append("\n".join(line for line in detail.splitlines() if line not in factors))
    item = views.facade.opening_item(first)
    assert item is not None
    texts.append("\n".join(line for line in item.toolTip().splitlines()
                           if line.removeprefix("• ") not in factors))
    joined = "\n".join(texts)
    assert "ft" in joined and "mph" in joined  # the imperial numbers are there
    metric = sorted({m.group(0) + "  <-  " + t.splitlines()[0][:70]
                     for t in texts for m in [METRIC.search(t)] if m})
    assert not metric, "metric units in imperial mode:\n" + "\n".join(metric)


def test_imperial_factors_show_no_metric_unit(imperial_window) -> None:  # type: ignore[no-untyped-def]
    window, views = imperial_window
    texts = _texts(views.ranked.model, set())  # factors included this time
    metric = [t for t in texts if METRIC.search(t)]
    assert not metric, metric[:5]
