"""The presentation layer's number formats (the one place numbers are written for people)."""

from __future__ import annotations

import datetime as dt
import math

import pytest

from petfall_audit.present import (
    NO_VALUE,
    band_label,
    fmt_date,
    fmt_length,
    fmt_money,
    fmt_one_in,
    fmt_percent,
    fmt_speed,
    kind_label,
    preset_label,
)


@pytest.mark.parametrize(
    ("n", "text"),
    [(1234.0, "1 in 1,200"), (4999.0, "1 in 5,000"), (12.4, "1 in 12"), (2.54, "1 in 2.5"),
     (4.0, "1 in 4"), (0.3, "1 in 1"), (math.inf, "negligible"), (2e8, "negligible"),
     (math.nan, NO_VALUE), (0.0, NO_VALUE)],
)
def test_one_in(n: float, text: str) -> None:
    assert fmt_one_in(n) == text


def test_imperial_speed_and_length() -> None:
    # 1 mph = 0.44704 m/s exactly (international yard and pound agreement, 1959).
    assert fmt_speed(0.44704 * 41.4, "imperial") == "41.4 mph"
    assert fmt_speed(18.46) == "18.5 m/s"
    # 3.1 m = 122.05 in = 10 ft 2 in.
    assert fmt_length(3.1, "imperial") == "10 ft 2 in"
    assert fmt_length(0.095, small=True) == "95 mm"
    assert fmt_length(3.048, "imperial", unit=False) == "10.0"


def test_speeds() -> None:
    # 26.8224 m/s = 60 mph (1 mile = 1609.344 m exactly)
    assert fmt_speed(26.8224, "imperial") == "60.0 mph"
    assert fmt_speed(15.54) == "15.5 m/s"


def test_money_percent_and_dates() -> None:
    assert fmt_money(33000.2, "EUR") == "33,000 EUR"
    assert fmt_money(math.nan, "EUR") == NO_VALUE
    assert fmt_percent(0.001) == "<1%"
    assert fmt_percent(0.999) == ">99%"
    assert fmt_percent(0.5) == "50%"
    assert fmt_date(dt.date(2026, 3, 4), "dmy") == "4 March 2026"
    assert fmt_date("2026-03-04", "mdy") == "March 4, 2026"
    assert fmt_date("spring 2026") == "spring 2026"


def test_labels() -> None:
    assert kind_label("balcony") == "Balcony"
    assert preset_label("heavy_adult").startswith("Heavy adult")
    assert preset_label(None) == "Custom cat profile"
    assert band_label(3) == "Life-threatening"
    assert band_label(-1) == "No result"


def test_metric_quantities_in_catalogue_text_read_in_imperial() -> None:
    from petfall_audit.present import units_in_text

    # 30 mm = 1.18 in; 40 mm = 1.57 in; 3.1 m = 10 ft 2 in (1 in = 25.4 mm exactly).
    assert units_in_text("Clamp-pole balcony net, 30 mm mesh", "imperial") == (
        "Clamp-pole balcony net, 1.2 in mesh")
    assert units_in_text("limiter, 40 mm gap; drop 3.1 m", "imperial") == (
        "limiter, 1.6 in gap; drop 10 ft 2 in")
    assert units_in_text("0.05 m² of net, 5 mins", "imperial") == "0.05 m² of net, 5 mins"
    assert units_in_text("net, 30 mm mesh", "metric") == "net, 30 mm mesh"


def test_survey_lengths_ticks_and_changes() -> None:
    from petfall_audit.present import fmt_change_pct, fmt_survey_length, fmt_tick

    assert fmt_survey_length(3.0) == "3 m" and fmt_survey_length(4.5) == "4.5 m"
    assert fmt_survey_length(3.048, "imperial") == "10 ft"  # 10 ft = 3.048 m exactly
    assert [fmt_tick(v) for v in (0.5, 20.0, 5000.0)] == ["0.5", "20", "5,000"]
    assert [fmt_change_pct(v) for v in (43.2, -4.94, 0.01)] == ["+43%", "-4.9%", "0%"]


def test_a_reader_never_meets_a_surface_id() -> None:
    from petfall_audit.model import Building, BuildingInfo, Facade, Floor, Surface, SurfaceKind
    from petfall_audit.present.labels import landing_names, surface_label

    b = Building(info=BuildingInfo(name="Invented House"), floors=(Floor(0, "G", 0.0),),
                 facades=(Facade("south", 10.0),),
                 surfaces=(Surface("podium_roof", SurfaceKind.ROOF, 4.5),
                           Surface("yard", SurfaceKind.LAWN, 0.0, label="Shared lawn")))
    names = landing_names(b)
    assert names["podium_roof"] == "Roof membrane" and names["yard"] == "Shared lawn"
    assert names["ground"] == "the ground"
    assert surface_label("", "concrete") == "Concrete / paving"


def test_presets_and_drag_terms_are_explained() -> None:
    from petfall_audit.present import DRAG_AREA_NOTE, PARAMETER_LABELS

    assert preset_label("heavy_adult") == "Heavy adult cats (about 6 kg)"
    assert preset_label(None) == "Custom cat profile"
    assert all("C_d·A" in PARAMETER_LABELS[k] for k in ("cda_tense_m2", "cda_spread_m2"))
    assert "drag coefficient" in DRAG_AREA_NOTE and "area" in DRAG_AREA_NOTE


def test_plural_agrees_with_the_count() -> None:
    from petfall_audit.present.numbers import fmt_count, plural

    assert [plural(n, "relies", "rely") for n in (0, 1, 2)] == ["rely", "relies", "rely"]
    assert [plural(n, "opening") for n in (0, 1, 2)] == ["openings", "opening", "openings"]
    assert fmt_count(2, "fix", "fixes") == "2 fixes" and fmt_count(1, "fix", "fixes") == "1 fix"
    assert fmt_count(1200, "row") == "1,200 rows"


def test_no_message_counts_with_a_bracketed_plural() -> None:
    # "3 problem(s)" reads as a form, not a sentence: counts go through fmt_count / plural
    import ast
    import re
    from pathlib import Path

    root = Path(__file__).resolve().parents[2] / "petfall_audit"
    found = []
    for path in sorted(root.rglob("*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.Constant) and isinstance(node.value, str):
                if re.search(r"[a-z]\((?:s|es|ies)\)", node.value):
                    found.append(f"{path.relative_to(root)}:{node.lineno}: {node.value[:60]!r}")
    assert found == []
