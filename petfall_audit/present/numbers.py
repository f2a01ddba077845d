"""Numbers for people: likelihood as "1 in N", money, lengths, speeds, shares, dates.

SI in (metres, m/s, probabilities 0..1), text out. ``system`` is ``"metric"`` or
``"imperial"``. A value that is not a finite number reads :data:`NO_VALUE`.
"""

from __future__ import annotations

import datetime as _dt
import math

from petfall_audit.units import FOOT_M, format_length

__all__ = [
    "NO_VALUE",
    "DATE_STYLES",
    "fmt_one_in",
    "fmt_money",
    "fmt_length",
    "fmt_speed",
    "fmt_percent",
    "fmt_risk",
    "fmt_count",
    "fmt_date",
]

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
               unit: bool = True) -> str:
    """A length in metres: ``"3.1 m"`` / ``"10 ft 2 in"``; ``small`` for gaps and meshes
    (``"95 mm"`` / ``"3.7 in"``). ``unit=False`` gives the bare number in metres or feet to 0.1
    (for a table whose column header names the unit)."""
    if not _finite(x_m):
        return NO_VALUE
    assert x_m is not None
    if unit:
        return format_length(x_m, system, small=small)
    value = x_m / FOOT_M if system == "imperial" else x_m
    return f"{value:.1f}"


def length_unit(system: str = "metric") -> str:
    """The unit :func:`fmt_length` with ``unit=False`` counts in: ``m`` or ``ft``."""
    return "ft" if system == "imperial" else "m"


def fmt_speed(v_mps: float | None, system: str = "metric", *, unit: bool = True) -> str:
    """A speed to 0.1 m/s or 0.1 mph: ``"18.5 m/s"`` / ``"41.4 mph"``."""
    if not _finite(v_mps):
        return NO_VALUE
    assert v_mps is not None
    imperial = system == "imperial"
    text = f"{v_mps / MPH_MPS if imperial else v_mps:.1f}"
    if not unit:
        return text
    return f"{text} {'mph' if imperial else 'm/s'}"


def speed_unit(system: str = "metric") -> str:
    """The unit :func:`fmt_speed` counts in: ``m/s`` or ``mph``."""
    return "mph" if system == "imperial" else "m/s"


def fmt_percent(p: float | None) -> str:
    """A probability 0..1 as a whole percentage; "<1%" for small non-zero values, ">99%" for
    values just short of certain."""
    if not _finite(p):
        return NO_VALUE
    assert p is not None
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


def fmt_count(n: int, one: str, many: str | None = None) -> str:
    """``3 openings`` / ``1 opening``, with thousands separators."""
    word = one if n == 1 else (many if many is not None else one + "s")
    return f"{n:,} {word}"


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
