"""Tests for petfall_audit.units (reading lengths) and petfall_audit.present.fmt_length
(showing them)."""

from __future__ import annotations

import math

import pint
import pytest
from hypothesis import given
from hypothesis import strategies as st

from petfall_audit.present import fmt_length
from petfall_audit.units import (
    FOOT_M,
    INCH_M,
    from_display,
    parse_gap_mm,
    parse_length_m,
    to_display,
)

UREG = pint.UnitRegistry()

# 1 in = 25.4 mm exactly, 1 ft = 12 in (international yard and pound agreement, 1959).
IN_M = 25.4 / 1000
FT_M = 12 * IN_M


def test_exact_definitions_match_the_1959_agreement_and_pint() -> None:
    # international yard and pound agreement (1959): 1 in = 25.4 mm, 1 ft = 0.3048 m
    assert INCH_M == pytest.approx(0.0254, abs=0, rel=1e-15)
    assert FOOT_M == pytest.approx(0.3048, rel=1e-15)
    # the units library's own values
    assert INCH_M == pytest.approx(UREG.Quantity(1, "inch").to("m").magnitude, rel=1e-12)
    assert FOOT_M == pytest.approx(UREG.Quantity(1, "foot").to("m").magnitude, rel=1e-12)


@pytest.mark.parametrize(
    ("text", "expected_m"),
    [
        ("42 in", 42 * IN_M),  # IBC guard height 42 in = 1067 mm (IBC §1015.3)
        ("3'6\"", 42 * IN_M),
        ("3' 6\"", 42 * IN_M),
        ("3'-6\"", 42 * IN_M),  # architects' notation
        ("3\u20196\u201d", 42 * IN_M),  # typographic quotes from a spreadsheet
        ("3\u20326\u2033", 42 * IN_M),  # prime marks
        ("3 ft 6 in", 42 * IN_M),
        ("3 feet 6 inches", 42 * IN_M),
        ("3'6", 42 * IN_M),  # bare number after feet: inches
        ("5 ft 10", 70 * IN_M),
        ("42''", 42 * IN_M),
        ("42 1/2 in", 42.5 * IN_M),
        ("3'6 1/2\"", 42.5 * IN_M),
        ("\u00bd in", 0.5 * IN_M),
        ("1.1 m", 1.1),
        ("1100 mm", 1.1),
        ("110 cm", 1.1),
        ("1 m 20 cm", 1.2),
        ("1,1 m", 1.1),  # decimal comma
        ("1100 MM", 1.1),  # capitals pint does not know as a length are read in lower case
        ("2 FT", 2 * FT_M),
        ("  1.1\u00a0m ", 1.1),
        ("-3 ft", -3 * FT_M),
        ("1e3 mm", 1.0),
        ("2 yd", 6 * FT_M),
    ],
)
def test_parse_length(text: str, expected_m: float) -> None:
    assert parse_length_m(text) == pytest.approx(expected_m, rel=1e-12)


@pytest.mark.parametrize("unit", ["in", "ft", "mm", "cm", "m", "yd", "km"])
def test_parse_length_agrees_with_pint(unit: str) -> None:
    # reference: the units library's own conversion
    expected = UREG.Quantity(7.25, unit).to("meter").magnitude
    assert parse_length_m(f"7.25 {unit}") == pytest.approx(expected, rel=1e-12)
    assert parse_length_m(7.25, default_unit=unit) == pytest.approx(expected, rel=1e-12)


def test_bare_numbers_take_the_default_unit() -> None:
    assert parse_length_m("42", default_unit="in") == pytest.approx(42 * IN_M)
    assert parse_length_m(1.5) == 1.5
    assert parse_length_m(3, default_unit="ft") == pytest.approx(3 * FT_M)
    # a unit in the text overrides the default
    assert parse_length_m("1.1 m", default_unit="in") == pytest.approx(1.1)


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("3 6", "ambiguous"),
        ("3 6 in", "ambiguous"),
        ("1 100 mm", "ambiguous"),
        ("1,100 mm", "ambiguous"),
        ("1.000,5 m", "ambiguous"),
        ("1100 Mm", "ambiguous"),  # megametres or millimetres?
        ("3'6'", "ambiguous"),
        ("6 in 3 ft", "ambiguous"),
        ("3 kg", "not a unit of length"),
        ("3 s", "not a unit of length"),
        ("3 zz", "unknown unit"),
        ("", "empty"),
        ("   ", "empty"),
        ("abc", "cannot read"),
        ("m", "cannot read"),
        ("1/0 in", "zero"),
        ("3 m?", "cannot read"),
    ],
)
def test_parse_length_refuses(text: str, fragment: str) -> None:
    with pytest.raises(ValueError, match=fragment):
        parse_length_m(text)


def test_parse_length_refuses_non_numbers() -> None:
    with pytest.raises(ValueError):
        parse_length_m(True)  # type: ignore[arg-type]
    with pytest.raises(ValueError):
        parse_length_m(math.nan)
    with pytest.raises(ValueError, match="not a unit of length"):
        parse_length_m("3", default_unit="kg")


def test_parse_gap_mm() -> None:
    assert parse_gap_mm("95") == pytest.approx(95.0)
    assert parse_gap_mm(95) == pytest.approx(95.0)
    assert parse_gap_mm("4 in") == pytest.approx(101.6)  # 4 in sphere = 101.6 mm (exact)
    assert parse_gap_mm("2", default_unit="in") == pytest.approx(50.8)
    assert parse_gap_mm("1.5 cm") == pytest.approx(15.0)


@pytest.mark.parametrize(
    ("value_m", "system", "small", "expected"),
    [
        (3.1, "metric", False, "3.1 m"),
        (0.095, "metric", True, "95 mm"),
        (10 * FT_M + 2 * IN_M, "imperial", False, "10 ft 2 in"),
        (0.094, "imperial", True, "3.7 in"),
        (8 * IN_M, "imperial", False, "8 in"),
        (11.99 * IN_M, "imperial", False, "1 ft 0 in"),  # rounding carries into feet
        (-1e-5, "metric", False, "0.0 m"),
        (-1e-5, "metric", True, "0 mm"),
        (-3 * FT_M, "imperial", False, "-3 ft 0 in"),
    ],
)
def test_fmt_length(value_m: float, system: str, small: bool, expected: str) -> None:
    assert fmt_length(value_m, system, small=small) == expected


def test_format_length_rejects_unknown_system() -> None:
    with pytest.raises(ValueError, match="system"):
        fmt_length(1.0, "cubits")


@given(st.floats(min_value=0.0, max_value=300.0))
def test_format_then_parse_round_trips(value_m: float) -> None:
    # imperial to the nearest inch, metric to 1 mm
    assert parse_length_m(fmt_length(value_m, "imperial")) == pytest.approx(
        value_m, abs=IN_M / 2 + 1e-9
    )
    assert parse_length_m(fmt_length(value_m, "metric", small=True)) == pytest.approx(
        value_m, abs=0.0005 + 1e-9
    )


def test_display_conversions() -> None:
    assert to_display(3.048, "imperial") == pytest.approx(10.0)
    assert from_display(10.0, "imperial") == pytest.approx(3.048)
    assert to_display(2.5, "metric") == 2.5
    assert from_display(to_display(7.3, "imperial"), "imperial") == pytest.approx(7.3)
    with pytest.raises(ValueError):
        to_display(1.0, "furlongs")


def test_common_units_match_the_units_library() -> None:
    """The built-in factors for common units equal pint's own definitions (and the exact
    1 in = 25.4 mm of the 1959 international yard and pound agreement)."""
    from petfall_audit.units import _COMMON_M, _length_factor_m

    for word, factor_m in _COMMON_M.items():
        assert _length_factor_m(word) == pytest.approx(factor_m, rel=1e-15), word
    assert _COMMON_M["in"] == 25.4 / 1000


def test_a_number_too_large_for_a_float_is_a_plain_error() -> None:
    with pytest.raises(ValueError, match="too large"):
        parse_length_m("1e400")
    with pytest.raises(ValueError, match="too large"):
        parse_length_m("1e400 ft")
