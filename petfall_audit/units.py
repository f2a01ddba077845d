"""Reading and showing lengths typed by people: ``42 in``, ``3'6"``, ``3 ft 6 in``, ``1100 mm``.

The units library pint decides what a unit is and how big it is; this module only splits the
text into numbers and unit words first. SI inside: :func:`parse_length_m` returns metres,
:func:`parse_gap_mm` millimetres.

Rules for text (also in ``docs/schedule-import.md``):

- A bare number takes the caller's ``default_unit`` (a header unit such as ``Width (in)``).
- Foot and inch marks: ``'`` ``’`` ``′`` mean feet; ``"`` ``''`` ``”`` ``″`` mean inches.
  ``3'6"``, ``3' 6"``, ``3'-6"``, ``3 ft 6 in`` and ``3 feet 6 inches`` are all 1.0668 m.
- A bare number right after a feet term is inches (``3'6``, ``5 ft 10``), as builders write it;
  any other number without its own unit in a compound is refused (``3 6`` is ambiguous).
  A compound lists larger units first, each once (``1 m 20 cm``); ``3'6'`` or ``6 in 3 ft``
  is refused as a likely typing slip.
- Fractions: ``42 1/2 in``, ``3'6 1/2"``, ``½``, ``¼``, ``¾``.
- A decimal comma is accepted (``1,1 m``) unless it could be a thousands separator: a comma
  followed by exactly three digits (``1,100 mm``), or a text with both ``,`` and ``.``, is refused
  as ambiguous. Spaces inside a number (``1 100 mm``) are refused the same way.
- Unit words are case-sensitive as pint defines them; an all-wrong case that pint does not know
  as a length (``MM``, ``FT``, ``M``) is read in lower case, but a case that names a different
  length (``Mm``, megametres, against ``mm``) is refused as ambiguous.
- Units that are not lengths (``3 kg``) and unknown words are refused. Every refusal is a
  ``ValueError`` with a plain message.
- Results are rounded to 12 significant digits, which drops the floating-point noise of the
  unit factors (``3'6"`` gives exactly ``1.0668``).
"""

from __future__ import annotations

import math
import re
from fractions import Fraction
from functools import cache
from numbers import Real
from typing import Any

__all__ = [
    "INCH_M",
    "FOOT_M",
    "SYSTEMS",
    "parse_length_m",
    "parse_gap_mm",
    "to_display",
    "from_display",
]

#: Exact definitions from the international yard and pound agreement (1959): 1 in = 25.4 mm.
INCH_M = 0.0254
FOOT_M = 12 * INCH_M
#: Display systems: ``metric`` shows metres / millimetres, ``imperial`` feet / inches.
SYSTEMS = ("metric", "imperial")

_MARKS = {
    # inch marks first so that '' (two apostrophes) is read before '
    "''": " in ",
    "\u2019\u2019": " in ",
    "\u2032\u2032": " in ",
    '"': " in ",
    "\u201d": " in ",
    "\u201c": " in ",
    "\u2033": " in ",
    "\u02ba": " in ",
    "'": " ft ",
    "\u2019": " ft ",
    "\u2018": " ft ",
    "\u2032": " ft ",
    "\u02b9": " ft ",
}
_VULGAR = {
    "\u00bd": " 1/2 ",
    "\u00bc": " 1/4 ",
    "\u00be": " 3/4 ",
    "\u215b": " 1/8 ",
    "\u215c": " 3/8 ",
    "\u215d": " 5/8 ",
    "\u215e": " 7/8 ",
}
_SPACES = re.compile(r"[\s\u00a0\u2009\u202f]+")
_MINUS = ("-", "\u2212", "\u2013")
_TOKEN = re.compile(
    r"\s*(?:(?P<frac>\d+/\d+)|(?P<num>(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)|(?P<unit>[^\W\d_]+))"
)
_THOUSANDS = re.compile(r"\d,\d{3}(?!\d)")
_FEET = {"ft", "foot", "feet"}


@cache
def _registry() -> Any:
    """The one pint registry, created on first use (pint takes a moment to load)."""
    import pint

    return pint.UnitRegistry()


@cache
def _length_factor_m(word: str) -> float | None:
    """Metres in one ``word`` as pint defines it; ``None`` if pint does not know it as a length."""
    import pint

    ureg = _registry()
    try:
        quantity = ureg.Quantity(1.0, word)
    except (pint.errors.PintError, ValueError, AttributeError, TypeError):
        return None
    if not quantity.check("[length]"):
        return None
    return float(quantity.to("meter").magnitude)


#: The units people type most, by their exact definitions (1 in = 25.4 mm and 1 ft = 0.3048 m,
#: international yard and pound agreement, 1959), so that a bare number or a common unit does not
#: wait for the units library to load; tests check them against the library's own values.
_COMMON_M: dict[str, float] = {
    "m": 1.0, "metre": 1.0, "metres": 1.0, "meter": 1.0, "meters": 1.0,
    "mm": 0.001, "millimetre": 0.001, "millimetres": 0.001, "millimeter": 0.001,
    "millimeters": 0.001, "cm": 0.01, "centimetre": 0.01, "centimetres": 0.01,
    "centimeter": 0.01, "centimeters": 0.01,
    "ft": 0.3048, "foot": 0.3048, "feet": 0.3048,
    "in": 0.0254, "inch": 0.0254, "inches": 0.0254,
}


def _unit_m(word: str) -> float:
    """Metres per unit ``word``; ``ValueError`` for unknown, ambiguous or non-length units."""
    common = _COMMON_M.get(word)
    if common is not None:
        return common
    exact = _length_factor_m(word)
    lower = word.lower()
    if lower != word:
        folded = _length_factor_m(lower)
        if exact is not None and folded is not None and not math.isclose(exact, folded):
            raise ValueError(
                f"ambiguous unit '{word}': it is not the same length as '{lower}'; "
                f"write the unit in its usual case (e.g. mm, m, ft, in)"
            )
        if exact is None:
            exact = folded
    if exact is not None:
        return exact
    if _is_known(word) or _is_known(lower):
        raise ValueError(f"'{word}' is not a unit of length")
    raise ValueError(f"unknown unit '{word}' (use m, mm, cm, ft or in)")


@cache
def _is_known(word: str) -> bool:
    import pint

    try:
        _registry().Unit(word)
    except (pint.errors.PintError, ValueError, AttributeError, TypeError):
        return False
    return True


def _number(token: str) -> Fraction:
    if "/" in token:
        num, den = token.split("/")
        if int(den) == 0:
            raise ValueError(f"cannot divide by zero in '{token}'")
        return Fraction(int(num), int(den))
    return Fraction(token)


def _normalise(text: str) -> str:
    s = _SPACES.sub(" ", text).strip()
    for vulgar, plain in _VULGAR.items():
        s = s.replace(vulgar, plain)
    for mark, word in _MARKS.items():
        s = s.replace(mark, word)
    # architects write 3'-6": a dash after a feet mark joins feet and inches
    s = re.sub(r"(\bft)\s*[-\u2013]\s*(?=[\d.])", r"\1 ", s)
    if "," in s:
        if "." in s:
            raise ValueError(f"ambiguous number '{text}': it has both ',' and '.'")
        if _THOUSANDS.search(s):
            raise ValueError(
                f"ambiguous number '{text}': ',' could separate thousands or decimals; "
                "write 1100 or 1.1"
            )
        s = s.replace(",", ".")
    return s.strip()


def _terms(text: str, s: str) -> list[tuple[Fraction, str | None]]:
    """Split normalised ``s`` into (number, unit word or None) terms."""
    terms: list[tuple[Fraction, str | None]] = []
    mixed_ok = False  # a fraction may join the bare whole number just before it
    pos = 0
    while pos < len(s):
        m = _TOKEN.match(s, pos)
        if m is None or m.end() == pos:
            rest = s[pos:].strip()
            if not rest:
                break
            raise ValueError(f"cannot read '{text}' (stuck at '{rest}')")
        pos = m.end()
        if m.group("unit") is not None:
            word = m.group("unit")
            if not terms or terms[-1][1] is not None:
                raise ValueError(f"cannot read '{text}': unit '{word}' has no number before it")
            terms[-1] = (terms[-1][0], word)
            mixed_ok = False
            continue
        if m.group("frac") is not None:
            value = _number(m.group("frac"))
            if mixed_ok and terms and terms[-1][1] is None:
                terms[-1] = (terms[-1][0] + value, None)
                mixed_ok = False
                continue
            terms.append((value, None))
            mixed_ok = False
            continue
        token = m.group("num")
        terms.append((_number(token), None))
        mixed_ok = token.isdigit()
    if not terms:
        raise ValueError(f"cannot read '{text}': no number")
    return terms


def parse_length_m(text: str | float, *, default_unit: str = "m") -> float:
    """Read a length typed by a person and return it in metres.

    ``default_unit`` applies to a bare number (and to a plain ``float``). Raises ``ValueError``
    with a plain message for empty text, unknown or ambiguous units and things that are not
    lengths. See the module docstring for the rules.
    """
    default_m = _unit_m(default_unit)
    if isinstance(text, bool):
        raise ValueError(f"not a length: {text!r}")
    if isinstance(text, Real):
        value = _tidy(float(text) * default_m)
        if not math.isfinite(value):
            raise ValueError(f"not a finite length: {text!r}")
        return value
    if not isinstance(text, str):
        raise ValueError(f"not a length: {text!r}")
    s = _normalise(text)
    if not s:
        raise ValueError("empty length")
    sign = 1.0
    if s.startswith(_MINUS):
        sign, s = -1.0, s[1:].lstrip()
    elif s.startswith("+"):
        s = s[1:].lstrip()
    terms = _terms(text, s)
    if len(terms) == 1 and terms[0][1] is None:
        total = _as_float(terms[0][0], text) * default_m
    else:
        total = 0.0
        previous_m = math.inf
        for i, (value, word) in enumerate(terms):
            if word is None:
                after_feet = i == len(terms) - 1 and i > 0 and terms[i - 1][1] in _FEET
                if not after_feet:
                    raise ValueError(
                        f"ambiguous length '{text}': give every number its unit (e.g. 3 ft 6 in)"
                    )
                word = "inch"
            unit_m = _unit_m(word)
            if unit_m >= previous_m:
                raise ValueError(
                    f"ambiguous length '{text}': write larger units first, each once "
                    "(e.g. 3 ft 6 in)"
                )
            previous_m = unit_m
            total += _as_float(value, text) * unit_m
    result = _tidy(sign * total)
    if not math.isfinite(result):
        raise ValueError(f"not a finite length: '{text}'")
    return result


def _as_float(value: Any, text: str) -> float:
    try:
        return float(value)
    except OverflowError:
        raise ValueError(f"number too large: '{text}'") from None


def _tidy(value_m: float) -> float:
    """Drop floating-point noise of the unit factors: 12 significant digits (3'6" is 1.0668 m)."""
    return float(f"{value_m:.12g}") if math.isfinite(value_m) else value_m


def parse_gap_mm(text: str | float, *, default_unit: str = "mm") -> float:
    """Read a gap or mesh size (e.g. ``"95"``, ``"3.7 in"``, ``'1 1/2"'``) in millimetres.

    A bare number takes ``default_unit`` (millimetres unless a header says otherwise).
    """
    return _tidy(parse_length_m(text, default_unit=default_unit) * 1000.0)


def _check_system(system: str) -> None:
    if system not in SYSTEMS:
        raise ValueError(f"system must be one of {SYSTEMS}, not {system!r}")


def to_display(value_m: float, system: str) -> float:
    """Metres to the display unit of ``system``: metres (metric) or feet (imperial)."""
    _check_system(system)
    return value_m if system == "metric" else value_m / FOOT_M


def from_display(value: float, system: str) -> float:
    """The display unit of ``system`` (metres or feet) back to metres."""
    _check_system(system)
    return value if system == "metric" else value * FOOT_M
