"""Numbers for people: likelihood as "1 in N", money, lengths, speeds, shares, dates.

SI in (metres, m/s, probabilities 0..1), text out. ``system`` is ``"metric"`` or
``"imperial"``. A value that is not a finite number reads :data:`NO_VALUE`.
"""

from __future__ import annotations

import datetime as _dt
import functools
import math
import re
from dataclasses import dataclass

from petfall_audit.units import FOOT_M, INCH_M, SYSTEMS

__all__ = [
    "SIGNIFICANT_DIGITS",
    "round_significant",
    "NO_VALUE",
    "DATE_STYLES",
    "fmt_one_in",
    "fmt_money",
    "fmt_length",
    "fmt_speed",
    "fmt_percent",
    "fmt_risk",
    "fmt_count",
    "plural",
    "fmt_date",
    "fmt_number",
    "fmt_int",
    "fmt_tick",
    "fmt_seconds",
    "fmt_change_pct",
    "fmt_survey_length",
    "units_in_text",
    "length_unit",
    "speed_unit",
    "Units",
    "units_of",
]

#: Significant digits of a model number written for a person or a file: the model is not more
#: precise than that, and rounded numbers keep exports stable and readable.
SIGNIFICANT_DIGITS = 4


def round_significant(x: float) -> float | None:
    """Round to :data:`SIGNIFICANT_DIGITS` significant digits; ``None`` for NaN or infinity.
    Every JSON export rounds model numbers this way."""
    return _rounded(float(x))


@functools.lru_cache(maxsize=1 << 16)
def _rounded(x: float) -> float | None:
    # cached: an export of a large building rounds the same values (shares, drops) many times
    if not math.isfinite(x):
        return None
    r = float(f"{x:.{SIGNIFICANT_DIGITS}g}")
    return 0.0 if r == 0 else r  # no "-0.0"

#: What a missing or undefined number reads (an en dash).
NO_VALUE = "\u2013"
#: One mile per hour in m/s (1 mi = 5,280 ft, international yard and pound agreement, 1959).
MPH_MPS = FOOT_M * 5280 / 3600
#: A "1 in N" beyond this many years reads as negligible.
ONE_IN_NEGLIGIBLE = 1e7
#: How a date is written: ``iso`` 2026-03-14, ``dmy`` 14 March 2026, ``mdy`` March 14, 2026.
DATE_STYLES = ("iso", "dmy", "mdy")


def _finite(x: float | None) -> bool:
    return x is not None and math.isfinite(x)


def _as_exported(x: float) -> float:
    """``x`` rounded as the JSON/CSV exports round it, so printed and exported numbers agree."""
    r = round_significant(x)
    return x if r is None else r


def _unsigned(text: str) -> str:
    """``"-0.0"`` -> ``"0.0"``: a value that rounds to zero shows no sign."""
    return text[1:] if text.startswith("-") and float(text.split(" ", 1)[0]) == 0.0 else text


def fmt_one_in(n: float | None) -> str:
    """An annual likelihood given as its return period ``n`` (years) as "1 in N".

    Below 10 to one decimal ("1 in 2.5", "1 in 4"), above to two significant figures with
    thousands separators ("1 in 1,200"); infinite or beyond 10 million years "negligible".
    """
    if n is None or math.isnan(n) or n <= 0:
        return NO_VALUE
    if n == math.inf or n > ONE_IN_NEGLIGIBLE:
        return "negligible"
    n = max(n, 1.0)
    if n < 10:
        text = f"{n:.1f}"
        return f"1 in {text[:-2] if text.endswith('.0') else text}"
    digits = int(math.floor(math.log10(n))) - 1
    return f"1 in {round(n, -digits):,.0f}"


def fmt_money(amount: float | None, currency: str = "") -> str:
    """A cost to the whole unit with thousands separators, the currency code after it:
    ``"1,250 EUR"``."""
    if not _finite(amount):
        return NO_VALUE
    return f"{amount:,.0f} {currency}".strip()


def fmt_length(x_m: float | None, system: str = "metric", *, small: bool = False,
               unit: bool = True, digits: int = 1) -> str:
    """A length in metres: ``"3.1 m"`` / ``"10 ft 2 in"``; ``small`` for gaps and meshes
    (``"95 mm"`` / ``"3.7 in"``). ``unit=False`` gives the bare number in metres or feet to
    ``digits`` decimals (for a table whose column header names the unit); ``digits`` above 1
    with a unit writes metres (``"4.500 m"``) or decimal feet (``"14.76 ft"``) for survey
    values. Rounded from the exported value (4 significant digits) so print and export agree."""
    if system not in SYSTEMS:
        raise ValueError(f"system must be one of {SYSTEMS}, not {system!r}")
    if not _finite(x_m):
        return NO_VALUE
    assert x_m is not None
    if system == "metric" and not small:  # the exports hold metres: print what they hold
        x_m = _as_exported(x_m)
    if unit and (small or digits == 1):
        return _length_text(x_m, system, small)
    value = x_m / FOOT_M if system == "imperial" else x_m
    text = _unsigned(f"{value:.{digits}f}")
    return f"{text} {length_unit(system)}" if unit else text


def _length_text(x_m: float, system: str, small: bool) -> str:
    """``metric``: ``"3.1 m"`` (to 0.1 m), ``small``: ``"95 mm"`` (to 1 mm); ``imperial``:
    ``"10 ft 2 in"`` (to the inch), ``small``: ``"3.7 in"`` (to 0.1 in)."""
    if system == "metric":
        text = f"{x_m * 1000.0:.0f} mm" if small else f"{x_m:.1f} m"
    elif small:
        text = f"{x_m / INCH_M:.1f} in"
    else:
        inches = int(math.floor(abs(x_m) / INCH_M + 0.5))
        feet, inch = divmod(inches, 12)
        sign = "-" if x_m < 0 and inches else ""
        text = f"{sign}{feet} ft {inch} in" if feet else f"{sign}{inch} in"
    return _unsigned(text)


def fmt_survey_length(x_m: float | None, system: str = "metric") -> str:
    """A surveyed length as read from a drawing or a model, to the millimetre (0.001 ft) with
    no trailing zeros: ``"4.5 m"``, ``"3 m"``, ``"12.275 m"`` / ``"14.76 ft"``."""
    if not _finite(x_m):
        return NO_VALUE
    assert x_m is not None
    value = x_m / FOOT_M if system == "imperial" else x_m
    text = f"{value:.3f}".rstrip("0").rstrip(".")
    return f"{_unsigned(text if text not in ('', '-') else '0')} {length_unit(system)}"


def length_unit(system: str = "metric") -> str:
    """The unit :func:`fmt_length` with ``unit=False`` counts in: ``m`` or ``ft``."""
    return "ft" if system == "imperial" else "m"


def fmt_speed(v_mps: float | None, system: str = "metric", *, unit: bool = True) -> str:
    """A speed to 0.1 m/s or 0.1 mph: ``"18.5 m/s"`` / ``"41.4 mph"``."""
    if not _finite(v_mps):
        return NO_VALUE
    assert v_mps is not None
    imperial = system == "imperial"
    v_mps = _as_exported(v_mps)
    text = _unsigned(f"{v_mps / MPH_MPS if imperial else v_mps:.1f}")
    if not unit:
        return text
    return f"{text} {'mph' if imperial else 'm/s'}"


def speed_unit(system: str = "metric") -> str:
    """The unit :func:`fmt_speed` counts in: ``m/s`` or ``mph``."""
    return "mph" if system == "imperial" else "m/s"


def fmt_percent(p: float | None, digits: int = 0) -> str:
    """A probability 0..1 as a percentage to ``digits`` decimals (whole by default); "<1%" for
    small non-zero values, ">99%" for values just short of certain."""
    if not _finite(p):
        return NO_VALUE
    assert p is not None
    if digits:
        return f"{p * 100:.{digits}f}%"
    if 0 < p < 0.005:
        return "<1%"
    if 0.995 <= p < 1:
        return ">99%"
    return f"{p * 100:.0f}%"


def fmt_risk(score: float | None) -> str:
    """A risk score: whole numbers with separators from 10 up, three significant figures below."""
    if not _finite(score):
        return NO_VALUE
    assert score is not None
    if abs(score) >= 10:
        return f"{score:,.0f}"
    return f"{score:.3g}"


def fmt_number(x: float | None, digits: int = 1, unit: str = "") -> str:
    """A plain number to ``digits`` decimals with thousands separators and an optional unit
    after it: ``fmt_number(1.2251, 3, "kg/m³")`` -> ``"1.225 kg/m³"``."""
    if not _finite(x):
        return NO_VALUE
    assert x is not None
    text = _unsigned(f"{x:,.{digits}f}")
    return f"{text} {unit}" if unit else text


def fmt_int(n: int) -> str:
    """A whole number with thousands separators: ``"20,000"``."""
    return f"{int(n):,}"


def fmt_tick(v: float) -> str:
    """A chart axis tick: the shortest exact form, thousands separated from 1,000
    (``"0.5"``, ``"20"``, ``"5,000"``)."""
    if not _finite(v):
        return NO_VALUE
    if abs(v) >= 1000 and float(v).is_integer():
        return f"{v:,.0f}"
    return f"{v:g}"


def fmt_seconds(t_s: float | None) -> str:
    """A short duration to 0.01 s: ``"0.52 s"``."""
    return fmt_number(t_s, 2, "s")


def fmt_change_pct(pct: float | None) -> str:
    """A signed change in % for a bar's label: "+43%", "-4.9%", "0%" (whole numbers from 10)."""
    if not _finite(pct):
        return NO_VALUE
    assert pct is not None
    if abs(pct) < 0.05:
        return "0%"
    return f"{pct:+.0f}%" if abs(pct) >= 9.95 else f"{pct:+.1f}%"


def plural(n: int, one: str, many: str | None = None) -> str:
    """The word that goes with a count of ``n``: ``one`` for 1, else ``many`` (default ``one``
    + "s"); also a verb: ``plural(n, "relies", "rely")``."""
    return one if n == 1 else (many if many is not None else one + "s")


def fmt_count(n: int, one: str, many: str | None = None) -> str:
    """``3 openings`` / ``1 opening``, with thousands separators."""
    return f"{n:,} {plural(n, one, many)}"


_MONTHS = ("January", "February", "March", "April", "May", "June", "July", "August",
           "September", "October", "November", "December")


def fmt_date(value: _dt.date | str | None, style: str = "iso") -> str:
    """A date in one of :data:`DATE_STYLES`; an ISO text (``2026-03-14``) is read first.
    Text that is not a date is returned as it is (a user's own wording)."""
    if value is None or value == "":
        return NO_VALUE
    if isinstance(value, str):
        try:
            day = _dt.date.fromisoformat(value.strip()[:10])
        except ValueError:
            return value
    else:
        day = value.date() if isinstance(value, _dt.datetime) else value
    if style == "dmy":
        return f"{day.day} {_MONTHS[day.month - 1]} {day.year}"
    if style == "mdy":
        return f"{_MONTHS[day.month - 1]} {day.day}, {day.year}"
    return day.isoformat()


@dataclass(frozen=True, slots=True)
class Units:
    """A display system for plots and tables: divide metres by ``length_m`` to get ``length``
    units and m/s by ``speed_mps`` to get ``speed`` units; the text goes through
    :func:`fmt_length` and :func:`fmt_speed`."""

    system: str
    length: str
    length_m: float
    speed: str
    speed_mps: float

    def fmt_length(self, x_m: float | None, *, small: bool = False) -> str:
        """:func:`fmt_length` in this system."""
        return fmt_length(x_m, self.system, small=small)

    def fmt_speed(self, v_mps: float | None) -> str:
        """:func:`fmt_speed` in this system."""
        return fmt_speed(v_mps, self.system)


def units_of(system: str) -> Units:
    """:class:`Units` of ``"metric"`` or ``"imperial"``."""
    if system == "imperial":
        return Units("imperial", "ft", FOOT_M, "mph", MPH_MPS)
    return Units("metric", "m", 1.0, "m/s", 1.0)


#: A metric quantity written in a sentence of data text (a catalogue name, a condition):
#: a number, a space and mm, m, m/s or km/h, not followed by another letter.
_METRIC_IN_TEXT = re.compile(r"(?<![\w.])(\d+(?:[.,]\d+)?)\s?(mm|m/s|km/h|m)(?![\w/²³])")


def units_in_text(text: str, system: str = "metric") -> str:
    """``text`` (written in metric, such as a control's name "net, 30 mm mesh") with each
    quantity in it shown in ``system``: in imperial "net, 1.2 in mesh". Metric text is
    returned as it is."""
    if system != "imperial" or not text:
        return text

    def convert(m: re.Match[str]) -> str:
        value = float(m.group(1).replace(",", "."))
        unit = m.group(2)
        if unit == "mm":
            return fmt_length(value / 1000.0, system, small=True)
        if unit == "m":
            return fmt_length(value, system)
        return fmt_speed(value / 3.6 if unit == "km/h" else value, system)

    return _METRIC_IN_TEXT.sub(convert, text)
