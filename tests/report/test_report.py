"""The PDF audit, the tenant leaflet, their formatting service and the exports."""

from __future__ import annotations

import io
import json
import re
from dataclasses import replace
from pathlib import Path

import numpy as np
import pytest
from pypdf import PdfReader
from reportlab.platypus import Paragraph, SimpleDocTemplate

from petfall_audit.cautions import CAUTIONS
from petfall_audit.present import (
    fmt_length,
    fmt_money,
    fmt_one_in,
    fmt_percent,
    fmt_risk,
    fmt_speed,
    kind_label,
)
from petfall_audit.report import context as rc
from petfall_audit.report.context import ContactBlock
from petfall_audit.report.fonts import fonts, markup, plain
from petfall_audit.report.styles import audit_styles

# --- formatting service (pure) ------------------------------------------------------------------


def test_speed_and_length_round_to_a_tenth() -> None:
    # Conventions: speeds to 0.1 m/s, heights to 0.1 m; the report's tables print them bare
    # (the header names the unit).
    assert fmt_speed(15.54, unit=False) == "15.5"
    assert fmt_speed(9.96, unit=False) == "10.0"
    assert fmt_length(3.04, unit=False) == "3.0"
    assert fmt_speed(float("nan"), unit=False) == "–"


def test_percent_keeps_small_probabilities_visible() -> None:
    assert fmt_percent(0.0) == "0%"
    assert fmt_percent(0.004) == "<1%"
    assert fmt_percent(0.256) == "26%"
    assert fmt_percent(1.0) == "100%"


def test_money_to_the_unit_with_currency() -> None:
    assert fmt_money(12345.6, "EUR") == "12,346 EUR"
    assert fmt_money(0, "") == "0"


def test_one_in_n_two_significant_figures() -> None:
    # HHSRS writes likelihood as "1 in N over 12 months" (Housing Health and Safety Rating
    # System, England, Housing Act 2004).
    assert fmt_one_in(1234.0) == "1 in 1,200"
    assert fmt_one_in(56.0) == "1 in 56"
    assert fmt_one_in(3.0) == "1 in 3"
    assert fmt_one_in(float("inf")) == "negligible"


def test_risk_score_precision() -> None:
    assert fmt_risk(1234.4) == "1,234"
    assert fmt_risk(0.012345) == "0.0123"


def test_kind_labels_are_plain_words() -> None:
    # One table for the app and the paper (the model's wording).
    assert kind_label("window_tilt_turn") == "Tilt-and-turn window"
    assert kind_label("balcony") == "Balcony"
    assert kind_label("gallery") == "Walkway / access gallery"


def test_contact_block_from_text_and_settings() -> None:
    c = ContactBlock.from_text("Cat Aid Eastside | 12 Invented Lane\\nSampletown | 0123 456")
    assert c.lines() == ("Cat Aid Eastside", "12 Invented Lane", "Sampletown", "0123 456")
    s = ContactBlock.from_mapping({"organisation": "Org", "person": "A. Person", "website": "w",
                                   "unknown": "x"})
    assert s.lines() == ("Org", "A. Person", "w")
    assert ContactBlock().is_empty


# --- user text is literal -----------------------------------------------------------------------

NASTY = "Note <b>& </b> &amp; Ελληνικά Русский 北京市 東京タワー 서울 \"quoted\" 'x'"


def test_markup_escapes_tags_and_entities() -> None:
    m = markup("<b>&</b> &amp;")
    assert "<b>" not in m and "&amp;amp;" in m and "&lt;b&gt;" in m


def test_markup_wraps_cjk_runs_in_a_cjk_font() -> None:
    m = markup("a 北京 b")
    assert re.search(r'<font name="[^"]+">北京</font>', m)


def test_plain_removes_control_characters() -> None:
    assert plain("a\tb\nc\x00d") == "a b c d"


def _pdf_text(data: bytes) -> str:
    return "\n".join(p.extract_text() or "" for p in PdfReader(io.BytesIO(data)).pages)


def test_nasty_text_renders_literally_in_a_paragraph() -> None:
    buf = io.BytesIO()
    SimpleDocTemplate(buf).build([Paragraph(markup(NASTY), audit_styles().body)])
    text = _pdf_text(buf.getvalue())
    for word in ("<b>&", "</b>", "&amp;", "Ελληνικά", "Русский"):
        assert word in text
    if not fonts().note:  # DejaVu found: Greek and Cyrillic glyphs are embedded
        assert fonts().regular == "PetfallSans"


# --- end to end with the real assessment --------------------------------------------------------

SEED = 11
SAMPLES = 600


@pytest.fixture(scope="module")
def walkup():  # type: ignore[no-untyped-def]
    from petfall_audit.demo import sample_building
    from petfall_audit.plan import make_plan
    from petfall_audit.risk import assess

    building = sample_building("walkup")
    info = replace(building.info, notes=NASTY, auditor="Ζωή Петрова <QA>")
    building = replace(building, info=info)
    a = assess(building, samples=SAMPLES, seed=SEED)
    return a, make_plan(a, 4000.0)


@pytest.fixture(scope="module")
def audit_text(walkup, tmp_path_factory) -> str:  # type: ignore[no-untyped-def]
    from petfall_audit.report import write_audit

    a, plan = walkup
    path = write_audit(a, plan, tmp_path_factory.mktemp("audit") / "audit.pdf", top_n=3)
    return _pdf_text(path.read_bytes())


def _squash(text: str) -> str:
    """Whitespace removed: extraction breaks lines where the layout wraps them."""
    return re.sub(r"\s+", "", text)


def test_audit_holds_every_opening_id(walkup, audit_text) -> None:  # type: ignore[no-untyped-def]
    a, _ = walkup
    words = set(audit_text.split())
    missing = [o.id for o in a.building.openings if o.id not in words]
    assert not missing  # ids sit whole in their own table cell, never wrapped


def test_audit_holds_every_caution(audit_text) -> None:  # type: ignore[no-untyped-def]
    squashed = _squash(audit_text)
    for caution in CAUTIONS:
        assert _squash(caution) in squashed


def test_audit_speeds_equal_the_assess_json(walkup, audit_text) -> None:  # type: ignore[no-untyped-def]
    # The ranked table prints p5 / p50 / p95 impact speeds to 0.1 m/s; they must be the
    # numbers of the `assess` JSON export (same seed) formatted the same way.
    from petfall_audit.io.results_export import assessment_to_dict

    a, _ = walkup
    doc = assessment_to_dict(a)
    lines = [ln.strip() for ln in audit_text.splitlines()]
    checked = 0
    for o in doc["openings"]:
        v = o["impact_speed_mps"]
        want = [f"{v['p5']:.1f}", f"{v['p50']:.1f}", f"{v['p95']:.1f}"]
        # a table row is extracted cell by cell: id, kind (one or two lines), drop, v p5/50/95
        starts = [i for i, ln in enumerate(lines) if ln == o["id"]]
        found = any(
            lines[j : j + 3] == want for i in starts for j in range(i + 2, min(i + 6, len(lines)))
        )
        assert found, f"{o['id']}: {want} not in its table row"
        checked += 1
    assert checked == len(a.openings)


def test_audit_user_text_is_literal(audit_text) -> None:  # type: ignore[no-untyped-def]
    for word in ("<b>&", "</b>", "&amp;", "Ελληνικά", "Русский", "Петрова", "<QA>"):
        assert word in audit_text


def test_audit_has_page_x_of_y_and_sections(audit_text) -> None:  # type: ignore[no-untyped-def]
    n = int(re.findall(r"Page 1 of (\d+)", audit_text)[0])
    assert f"Page {n} of {n}" in audit_text
    for heading in ("Summary", "Method and assumptions", "Facade:", "Floor comparison",
                    "Ranked openings", "Fall profile", "Fix plan", "Sign-off", "Sources"):
        assert heading in audit_text
    assert "Vnuk et al. 2004" in audit_text and "Candela Andrade" in audit_text


def test_audit_without_a_plan(walkup, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.report import write_audit

    a, _ = walkup
    path = write_audit(a, None, tmp_path / "a.pdf", top_n=0)
    text = _pdf_text(path.read_bytes())
    assert "No budget was given" in text
    assert "Opening #" not in text  # no detail pages


def test_leaflet_is_short_large_and_carries_the_contact(walkup, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.report import write_leaflet

    a, plan = walkup
    contact = ContactBlock(organisation="Cat Aid <Eastside> & Co", person="Ирина",
                           phone="0123 456 789", note="東京 office")
    path = write_leaflet(a, plan, tmp_path / "leaflet.pdf", contact=contact)
    reader = PdfReader(path)
    assert 1 <= len(reader.pages) <= 2
    text = _pdf_text(path.read_bytes())
    for part in ("Cat Aid <Eastside> & Co", "Ирина", "0123 456 789", a.building.info.name,
                 "veterinarian", "even if it seems fine", "escape window"):
        assert _squash(part) in _squash(text)
    # large type: the body font is at least 14 pt
    from petfall_audit.report.styles import leaflet_styles

    assert leaflet_styles().body.fontSize >= 14


def test_exports_json_and_csv(walkup, tmp_path) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.io.results_export import assessment_to_dict
    from petfall_audit.report import export_results

    a, plan = walkup
    (jpath,) = export_results(a, plan, tmp_path / "r.json", "json")
    doc = json.loads(jpath.read_text("utf-8"))
    assert doc["results"] == json.loads(json.dumps(assessment_to_dict(a)))
    assert len(doc["plan"]["actions"]) == len(plan.actions)
    written = export_results(a, plan, tmp_path / "r.csv", "csv")
    assert [p.name for p in written] == ["r.csv", "r-plan.csv"]
    body = [ln for ln in written[0].read_text("utf-8").splitlines() if not ln.startswith("#")]
    assert len(body) == 1 + len(a.openings)
    with pytest.raises(ValueError):
        export_results(a, plan, tmp_path / "r.x", "xml")  # type: ignore[arg-type]


def test_a_failed_layout_leaves_no_file(walkup, tmp_path, monkeypatch) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.errors import ReportError
    from petfall_audit.report import audit, write_audit

    def broken(*args, **kwargs):  # type: ignore[no-untyped-def]
        raise RuntimeError("boom")

    monkeypatch.setattr(audit.sec, "build_signoff", broken)
    target = tmp_path / "a.pdf"
    with pytest.raises(ReportError):
        write_audit(walkup[0], walkup[1], target)
    assert not target.exists() and not list(tmp_path.iterdir())


def test_floor_labels_fit_their_column_and_keep_the_level_number() -> None:
    from reportlab.pdfbase.pdfmetrics import stringWidth

    from petfall_audit.report.charts import fit_label, label_column_width

    labels = ("Ground (lobby)", "Level 31 (penthouses)")
    col = label_column_width(labels, 6.0, gap=8.0, max_width=300.0)
    assert col == pytest.approx(stringWidth("Level 31 (penthouses)", fonts().regular, 6.0) + 8)
    assert fit_label("Level 31 (penthouses)", 31, col - 8.0, 6.0) == "Level 31 (penthouses)"
    for width in (60.0, 40.0, 25.0, 10.0):
        text = fit_label("Level 31 (penthouses)", 31, width, 6.0)
        assert "31" in text
        assert stringWidth(text, fonts().regular, 6.0) <= width or text == "L31"
    assert fit_label("Ground (lobby)", 0, 25.0, 6.0) == "Ground"


def test_plan_lists_each_condition_once_and_rows_refer_to_it() -> None:
    from petfall_audit.demo import sample_building
    from petfall_audit.plan import make_plan
    from petfall_audit.risk import assess

    a = assess(sample_building("walkup"), samples=64, seed=1)
    ctx = rc.build_audit_context(a, make_plan(a, 5000.0))
    assert len(set(ctx.plan_notes)) == len(ctx.plan_notes)
    for row in ctx.plan_rows:
        assert tuple(ctx.plan_notes[n - 1] for n in row.notes) == tuple(
            sorted(set(row.conditions), key=ctx.plan_notes.index))
    assert sum(int(c.openings) for c in ctx.plan_controls) == len(ctx.plan_rows)
    assert "control(s)" not in " ".join(ctx.plan_summary)


# --- how much the result depends on the cat ------------------------------------------------------


def test_audit_shows_how_much_the_result_depends_on_the_cat(audit_text) -> None:  # type: ignore[no-untyped-def]
    from petfall_audit.present import PARAMETER_LABELS

    squashed = _squash(audit_text)
    assert _squash(rc.SENSITIVITY_TITLE) in squashed
    for label in PARAMETER_LABELS.values():  # every bar is named on the chart
        assert _squash(label) in squashed, label
    assert "The result depends most on the" in audit_text
    assert _squash("its 10th and 90th percentile among the sampled cats") in squashed


def test_sensitivity_section_has_the_numbers_of_the_assess_json(walkup) -> None:  # type: ignore[no-untyped-def]
    # `petfall-audit assess --format json` exports with_sensitivity(); the report's swings
    # (same samples and seed) must be those numbers, in % of the base risk.
    from petfall_audit.sensitivity import with_sensitivity

    a, _ = walkup
    sens = rc.build_sensitivity_context(a)
    assert sens is not None
    exported = with_sensitivity(a).sensitivity
    assert sens.figure.parameters == tuple(s.parameter for s in exported.swings)
    assert sens.figure.swing_pct == pytest.approx([100 * s.swing for s in exported.swings])
    top = exported.swings[0]
    assert sens.values[0] == f"{100 * top.swing:+.0f}%"  # walk-up: the largest swing is >= 10 %
    assert "the 5 highest-risk openings" in sens.lead


def test_sensitivity_section_with_fewer_cats_says_so_and_can_be_left_out(walkup) -> None:  # type: ignore[no-untyped-def]
    a, plan = walkup
    sens = rc.build_sensitivity_context(a, max_samples=100)
    assert sens is not None and sens.figure.samples == 100
    assert "instead of 600" in sens.caption
    off = rc.build_audit_context(a, plan, options=rc.ReportOptions(sensitivity_samples=0))
    assert off.sensitivity is None


def test_the_plan_says_where_its_budget_came_from() -> None:
    """A default budget is called one; a saved budget is named as saved (issue of trust, no
    source needed: the wording is the tool's own)."""
    from petfall_audit.demo import sample_building
    from petfall_audit.model import PlanSettings
    from petfall_audit.plan import make_plan
    from petfall_audit.risk import assess

    a = assess(sample_building("walkup"), samples=64)
    plan = make_plan(a, 1200.0)
    default = rc.build_audit_context(a, plan, options=rc.ReportOptions(budget_is_default=True))
    assert "a default" in default.plan_summary[0]
    given = rc.build_audit_context(a, plan)
    assert "no budget is saved with the audit" in given.plan_summary[0]
    saved = replace(a, building=replace(a.building, plan=PlanSettings(budget=1200.0)))
    kept = rc.build_audit_context(saved, plan)
    assert "the budget saved with the audit" in kept.plan_summary[0]


def test_the_cat_profile_is_named_in_words_not_by_its_preset_key() -> None:
    # The PDF once printed the preset key `heavy_adult`.
    import dataclasses

    from petfall_audit.demo import sample_building
    from petfall_audit.model import CAT_PRESETS
    from petfall_audit.risk import assess

    b = dataclasses.replace(sample_building("walkup"), cat_profile=CAT_PRESETS["heavy_adult"])
    ctx = rc.build_audit_context(assess(b, samples=50, seed=1), None,
                                 options=rc.ReportOptions(sensitivity_samples=0))
    rows = dict(ctx.assumptions)
    assert rows["Cat profile"] == "Heavy adult cats (about 6 kg)"
    assert not any("heavy_adult" in v for _, v in ctx.assumptions)


def test_an_audit_without_a_plan_does_not_load_scipy(tmp_path: Path) -> None:
    # scipy takes about 0.2 s to import: a batch worker writing audits without a budget, and a
    # report of the fall profiles alone, never need it (the planner loads it when it solves)
    import subprocess
    import sys

    code = ("import os, sys\n"
            "from petfall_audit.risk import assess\n"
            "from petfall_audit._resources import sample_path\n"
            "from petfall_audit.io.building_file import load_building\n"
            "from petfall_audit.report import write_audit, write_leaflet\n"
            "a = assess(load_building(sample_path('walkup')), samples=64)\n"
            "d = sys.argv[1]\n"
            "write_audit(a, None, os.path.join(d, 'a.pdf'))\n"
            "write_leaflet(a, None, os.path.join(d, 'l.pdf'))\n"
            "print(any(m == 'scipy' or m.startswith('scipy.') for m in sys.modules))\n")
    out = subprocess.run([sys.executable, "-c", code, str(tmp_path)], capture_output=True,
                         text=True, check=True)
    assert out.stdout.strip() == "False"
    assert (tmp_path / "a.pdf").stat().st_size > 0


def test_estate_budget_curve_has_a_log_budget_axis() -> None:
    # the estate's budgets are spaced geometrically (figures.budget.budget_grid) and most of
    # the curve's bend lies at small budgets: a linear axis squeezed it into its first tenth
    from reportlab.graphics.shapes import Line, PolyLine, String

    from petfall_audit.report.charts import budget_curve_drawing

    budgets = np.array([0.0, 3.0, 30.0, 300.0, 3_000.0, 20_000.0, 205_000.0])
    risk_left = np.array([600.0, 580.0, 500.0, 300.0, 150.0, 100.0, 40.0])
    d = budget_curve_drawing(budgets, risk_left, chosen_budget=20_000.0, currency="EUR",
                             width=400.0)
    texts = {s.text: s.x for s in d.contents if isinstance(s, String)}
    assert "budget (EUR, log scale)" in texts
    # one tick per whole decade from the decade of the cheapest budget (1) to 100,000
    ticks = [texts[t] for t in ("1", "10", "100", "1,000", "10,000", "100,000")]
    steps = np.diff(ticks)
    assert np.allclose(steps, steps[0]) and steps[0] > 0  # equal steps: logarithmic
    assert "1,000,000" not in texts  # the axis ends at the largest budget
    # the step line: a budget's point lies log10(budget) decades from the axis' left end
    line = next(s for s in d.contents if isinstance(s, PolyLine))
    xs = line.points[0::2]
    decade_px = steps[0]
    for budget in budgets[1:]:
        expected = ticks[0] + np.log10(budget) * decade_px
        assert min(abs(x - expected) for x in xs) < 1e-6, budget
    assert xs[0] == pytest.approx(ticks[0])  # a budget of 0 at the left end
    marker = [s for s in d.contents if isinstance(s, Line) and s.strokeDashArray]
    assert marker[0].x1 == pytest.approx(ticks[0] + np.log10(20_000.0) * decade_px)


def test_estate_budget_curve_without_a_currency_or_any_budget() -> None:
    from reportlab.graphics.shapes import String

    from petfall_audit.report.charts import budget_curve_drawing

    d = budget_curve_drawing(np.array([0.0]), np.array([10.0]), chosen_budget=0.0,
                             currency="", width=300.0)
    texts = [s.text for s in d.contents if isinstance(s, String)]
    assert "budget (log scale)" in texts
