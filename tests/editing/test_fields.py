"""Field specs: values typed with units are read into SI; what is shown reads back unchanged."""

from __future__ import annotations

import dataclasses
import math

import pytest
from hypothesis import given
from hypothesis import strategies as st

from petfall_audit.editing.fields import (
    INFO_FIELDS,
    OPENING_FIELDS,
    field_spec,
    format_value,
    parse_value,
)
from petfall_audit.model import Opening, OpeningKind
from petfall_audit.present import enum_label

PERCH = field_spec(OPENING_FIELDS, "perch_height_m")
MESH = field_spec(OPENING_FIELDS, "netting_mesh_mm")
KIND = field_spec(OPENING_FIELDS, "kind")
TEMP = field_spec(INFO_FIELDS, "air_temperature_c")


def test_every_opening_field_has_a_spec() -> None:
    names = {f.name for f in dataclasses.fields(Opening)} - {"photos"}
    assert {s.name for s in OPENING_FIELDS} == names


def test_lengths_typed_with_units() -> None:
    # 1 in = 25.4 mm exactly (international yard and pound agreement, 1959)
    assert parse_value(PERCH, "42 in") == pytest.approx(1.0668)
    assert parse_value(PERCH, "1.1 m") == pytest.approx(1.1)
    assert parse_value(PERCH, "1.1") == pytest.approx(1.1)  # bare number: metres
    assert parse_value(PERCH, "3.5", "imperial") == pytest.approx(3.5 * 0.3048)  # feet
    assert parse_value(MESH, "30") == pytest.approx(30.0)
    assert parse_value(MESH, "1.5", "imperial") == pytest.approx(38.1)  # inches
    assert parse_value(MESH, "") is None and parse_value(MESH, "none") is None


def test_bad_text_raises_a_plain_value_error() -> None:
    for spec, text in ((PERCH, "tall"), (PERCH, "3 kg"), (MESH, "-5 mm"), (KIND, "door"),
                       (PERCH, "")):
        with pytest.raises(ValueError):
            parse_value(spec, text)


def test_enums_read_by_label_or_value() -> None:
    assert parse_value(KIND, "Tilt-and-turn window") is OpeningKind.WINDOW_TILT_TURN
    assert parse_value(KIND, "balcony") is OpeningKind.BALCONY
    assert format_value(KIND, OpeningKind.GALLERY) == enum_label(OpeningKind.GALLERY)


def test_temperature_in_both_systems() -> None:
    # 59 °F = 15 °C (Celsius = (F - 32) * 5/9)
    assert parse_value(TEMP, "59", "imperial") == pytest.approx(15.0)
    assert parse_value(TEMP, "15 C", "imperial") == pytest.approx(15.0)
    assert format_value(TEMP, 15.0, "imperial") == "59 °F"


@given(st.floats(min_value=0.0, max_value=500.0, allow_nan=False), st.sampled_from(
    ["metric", "imperial"]))
def test_shown_lengths_read_back_within_display_precision(value_m: float, system: str) -> None:
    shown = format_value(PERCH, value_m, system)
    back = parse_value(PERCH, shown, system)
    tolerance = 0.0005 if system == "metric" else 0.05 * 0.0254
    assert math.isclose(back, value_m, abs_tol=tolerance + 1e-9)
    assert format_value(PERCH, back, system) == shown  # showing it again changes nothing


@given(st.floats(min_value=0.0, max_value=2000.0, allow_nan=False), st.sampled_from(
    ["metric", "imperial"]))
def test_shown_gaps_read_back(value_mm: float, system: str) -> None:
    shown = format_value(MESH, value_mm, system)
    tolerance = 0.05 if system == "metric" else 0.005 * 25.4
    assert math.isclose(parse_value(MESH, shown, system), value_mm, abs_tol=tolerance + 1e-9)


@pytest.mark.parametrize("name", ["width_m", "largest_gap_mm"])
def test_a_number_too_large_for_a_float_is_a_plain_error(name: str) -> None:
    # 1e400 overflows a double (IEEE 754 binary64 tops out near 1.8e308): a ValueError the form
    # can show, never an OverflowError that escapes the editor.
    with pytest.raises(ValueError, match="too large"):
        parse_value(field_spec(OPENING_FIELDS, name), "1e400")


@pytest.mark.parametrize("text", ["nan", "inf", "-inf °C"])
def test_a_temperature_must_be_a_finite_number(text: str) -> None:
    with pytest.raises(ValueError, match="temperature"):
        parse_value(field_spec(INFO_FIELDS, "air_temperature_c"), text)


def test_enum_fields_read_the_trades_words_as_the_schedule_does() -> None:
    """The editor and the schedule import share the registry's value synonyms ("casement",
    "sash", "fly screen" are trade words for these kinds and screens; common practice)."""
    from petfall_audit.editing.fields import OPENING_FIELDS, field_spec, parse_value
    from petfall_audit.model import CatsPresent, OpeningKind, Screen

    kind = field_spec(OPENING_FIELDS, "kind")
    assert parse_value(kind, "casement") is OpeningKind.WINDOW_CASEMENT
    assert parse_value(kind, "Sash window") is OpeningKind.WINDOW_HUNG
    assert parse_value(field_spec(OPENING_FIELDS, "screen"), "fly screen") is Screen.INSECT
    assert parse_value(field_spec(OPENING_FIELDS, "cats_present"), "y") is CatsPresent.YES
    with pytest.raises(ValueError, match="is not one of"):
        parse_value(kind, "no")  # "no" is a screen's synonym, never a kind
