"""The sentences that explain a result: factors and hazards in words.

The computation carries each finding as a :class:`~petfall_audit.reasons.Reason` (a code and SI
values); :func:`explain` writes it in the reader's units. The app (ranked view and tooltips),
the PDF audit, the command line and the exports all call it, so a factor reads the same
everywhere and an imperial reader sees no metric unit.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable, Iterable, Mapping

from petfall_audit.barriers import gap_pass_share, limiter_holds, net_holds
from petfall_audit.errors import Problem
from petfall_audit.injury import BANDS
from petfall_audit.model import BALCONY_LIKE, CAT_PRESETS, CatProfile, Opening, Screen, SurfaceKind
from petfall_audit.present.numbers import fmt_length, fmt_percent, fmt_speed
from petfall_audit.reasons import Reason, ReasonValue

__all__ = [
    "explain",
    "explain_all",
    "reason_json",
    "problem_message",
    "surface_words",
    "barrier_words",
    "REASON_CODES",
]

_V = Mapping[str, ReasonValue]

#: Window limiter gap of UK practice, m (common practice, no source).
_UK_LIMITER_M = 0.100


def surface_words(kind: SurfaceKind | str) -> str:
    """A surface kind as it reads inside a sentence ("concrete or paving", "a planting bed")."""
    try:
        k = SurfaceKind(getattr(kind, "value", kind))
    except ValueError:
        return str(kind).replace("_", " ")
    return {
        SurfaceKind.CONCRETE: "concrete or paving",
        SurfaceKind.ASPHALT: "asphalt",
        SurfaceKind.GRAVEL: "gravel",
        SurfaceKind.LAWN: "lawn or soil",
        SurfaceKind.PLANTING: "a planting bed",
        SurfaceKind.WATER: "water",
        SurfaceKind.ROOF: "a roof",
        SurfaceKind.DECK: "a timber deck",
    }[k]


def _num(v: _V, name: str) -> float:
    return float(v[name])


class _Words:
    """The sentence writers of one unit system."""

    def __init__(self, system: str) -> None:
        self.system = system

    def small(self, x_m: float) -> str:
        return fmt_length(x_m, self.system, small=True)

    def length(self, x_m: float) -> str:
        return fmt_length(x_m, self.system)


_Writer = Callable[[_Words, _V], str]


def _fixed(text: str) -> _Writer:
    return lambda _w, _v: text


_FACTOR_WORDS: dict[str, _Writer] = {
    # likelihood factors (petfall_audit.likelihood.FACTORS)
    "base": _fixed("Base rate: 1 in 20 a year for a cat with daily access to an unguarded "
                   "opening"),
    "cats_yes": _fixed("Cats live behind this opening"),
    "cats_unknown": _fixed("Not known whether cats live here (counted as moderately likely)"),
    "cats_no": _fixed("No cats reported behind it (a new tenant's cat could still use it)"),
    "open_never": _fixed("Reported never opened (it still may be, for cleaning or by a new "
                         "tenant)"),
    "open_rarely": _fixed("Opened rarely"),
    "open_seasonal": _fixed("Open in the warm season, when most falls happen"),
    "open_daily": _fixed("Open daily"),
    "open_always": _fixed("Open all the time"),
    "kind_balcony": _fixed("Balcony or terrace: cats spend unsupervised time beside the guard"),
    "kind_gallery": _fixed("Access gallery: cats reach it only when let out of the flat"),
    "kind_window": _fixed("Opening window: cats sit on the sill and chase birds and insects"),
    "kind_tilt_turn": _fixed("Tilt-and-turn window: a fall needs it turned fully open"),
    "kind_top_hung": _fixed("Top-hung window: opens only at the bottom edge"),
    "kind_fixed": _fixed("Fixed glazing: does not open"),
    "guard_over": _fixed("Guard height stops a child, not a cat: cats jump onto the rail top"),
    "guard_gap": lambda w, v: (f"Gaps of {w.small(_num(v, 'gap_m'))} in the guard let "
                               f"{fmt_percent(_num(v, 'share'))} of these cats through (if the "
                               "head passes, the body follows)"),
    "guard_gap_small": lambda w, v: (f"Gaps in the guard ({w.small(_num(v, 'gap_m'))}) are too "
                                     "narrow for these cats"),
    "sill_only": _fixed("Nothing but the sill between the cat and the drop"),
    "net_fitted": lambda w, v: (f"Netting with {w.small(_num(v, 'mesh_m'))} mesh (cats still "
                                "climb, bite or push through loose edges: keep it taut and "
                                "closed)"),
    "net_mesh_large": lambda w, v: (f"Netting mesh of {w.small(_num(v, 'mesh_m'))} lets "
                                    f"{fmt_percent(_num(v, 'share'))} of these cats through"),
    "screen_pet": _fixed("Pet-resistant screen"),
    "screen_insect": _fixed("Insect screen only: cats push or claw through it"),
    "limiter_fitted": lambda w, v: (f"Limiter set to {w.small(_num(v, 'gap_m'))} (left released "
                                    "now and then)"),
    "limiter_gap_large": lambda w, v: (
        f"Limiter gap of {w.small(_num(v, 'gap_m'))} lets {fmt_percent(_num(v, 'share'))} of "
        f"these cats through (child limiters of {w.small(_UK_LIMITER_M)} do not stop cats)"),
    "flat_rail_top": _fixed("Flat, wide rail top invites the cat to sit on it"),
    "climbing_aids": _fixed("Furniture, planters or bins next to the guard help the cat up"),
    "climbable_infill": _fixed("Climbable infill (horizontal rails) under the rail top"),
    "escape_window": _fixed("Emergency escape window: only releasable devices that meet the "
                            "local code may be fitted"),
    # fall and injury factors (petfall_audit.risk)
    "drop_landing": lambda w, v: (f"Median drop {w.length(_num(v, 'drop_m'))}; "
                                  f"{fmt_percent(_num(v, 'share'))} of falls land on "
                                  f"{surface_words(str(v['surface']))} ({v['landing_id']})"),
    "impact_speed": lambda w, v: f"Median impact speed {fmt_speed(_num(v, 'speed_mps'), w.system)}",
    "beyond_calibration": lambda w, v: (
        f"Higher than the falls of the published case series (up to about "
        f"{w.length(_num(v, 'limit_m'))}): the injury shares here are extrapolated and may "
        "understate how badly cats are hurt"),
    "median_band": lambda _w, v: (f"At least half of the falls from here are "
                                  f"{BANDS[int(v['band'])]}"
                                  + (" or worse" if int(v["band"]) < len(BANDS) - 1 else "")),
    "life_share": lambda _w, v: f"{fmt_percent(_num(v, 'share'))} of falls are life-threatening",
    "short_drop": lambda _w, v: (f"Short drop: {fmt_percent(_num(v, 'share'))} of cats land "
                                 "before they have fully turned feet-down"),
    # hazards apart from falls
    "tilt_turn_entrapment": _fixed("Tilt-and-turn window: a cat that climbs into the tilted gap "
                                   "can slip down and be trapped, with crush injuries to the "
                                   "hind body, at any height"),
    "water_below": lambda _w, v: (f"Water below ({fmt_percent(_num(v, 'share'))} of falls): a "
                                  "cat that survives the fall may drown"),
}


def _amount(w: _Words, v: _V, name: str) -> str:
    """A checked value in the reader's units: lengths and gaps through the length formatter,
    other quantities as the number in their own unit."""
    x = _num(v, name)
    quantity = str(v.get("quantity", "plain"))
    if quantity == "length":
        return w.length(x) if abs(x) >= 1.0 or x == 0 else w.small(x)
    if quantity == "gap":
        return w.small(x)
    unit = str(v.get("unit", ""))
    return f"{x:g} {unit}".strip()


def _range_words(low: bool) -> _Writer:
    def write(w: _Words, v: _V) -> str:
        if low:
            word = "greater than" if int(v.get("open", 0)) else "at least"
        else:
            word = "less than" if int(v.get("open", 0)) else "at most"
        why = str(v.get("why", ""))
        tail = f" ({why})" if why and not low else ""
        return f"must be {word} {_amount(w, v, 'limit')}, got {_amount(w, v, 'value')}{tail}"
    return write


def _nothing_below(w: _Words, v: _V) -> str:
    start, end = _num(v, "out_from_m"), _num(v, "out_to_m")
    extent = (f"from {w.length(start)} out" if math.isinf(end)
              else f"from {w.length(start)} to {w.length(end)} out")
    a, z = _num(v, "along_from_m"), _num(v, "along_to_m")
    along = ("" if a <= 0 and math.isinf(z) else
             f", along the facade from {w.length(a)}"
             + ("" if math.isinf(z) else f" to {w.length(z)}"))
    return (f"nothing lies below opening {v['opening_id']!r} on facade {v['facade']!r} "
            f"{extent}{along} (its floor at {w.length(_num(v, 'floor_m'))}): add a surface "
            "there, e.g. the ground running on without end (outer edge empty)")


#: Problems of a building that state numbers (petfall_audit.io._checks).
_PROBLEM_WORDS: dict[str, _Writer] = {
    "range_low": _range_words(True),
    "range_high": _range_words(False),
    "floor_not_above": lambda w, v: (
        f"level {v['level']} at {w.length(_num(v, 'elevation_m'))} is not above level "
        f"{v['below_level']} at {w.length(_num(v, 'below_m'))}"),
    "surface_above_openings": lambda w, v: (
        f"at {w.length(_num(v, 'surface_m'))} this surface is above the openings it would "
        f"catch: {v['opening_id']!r} (level {v['level']} at {w.length(_num(v, 'opening_m'))})"
        + (f" and {v['more']} more" if int(v.get("more", 0)) > 0 else "")
        + "; check its elevation, facade and extent"),
    "nothing_below": _nothing_below,
}

_WRITERS: dict[str, _Writer] = {**_FACTOR_WORDS, **_PROBLEM_WORDS}

#: Every reason code this module writes in words.
REASON_CODES: frozenset[str] = frozenset(_WRITERS)


@functools.lru_cache(maxsize=1 << 14)
def explain(reason: Reason, system: str = "metric") -> str:
    """One reason in plain words, lengths and speeds in ``system`` (``"metric"`` or
    ``"imperial"``). An unknown code reads as its code in words (never an error: a newer file's
    result still shows). Cached: a large building's results repeat the same reasons (equal
    openings, the same guard and netting findings)."""
    writer = _WRITERS.get(reason.code)
    if writer is None:
        return reason.code.replace("_", " ").capitalize()
    try:
        return writer(_Words(system), reason.values)
    except (KeyError, ValueError, TypeError, IndexError):
        return reason.code.replace("_", " ").capitalize()


def explain_all(reasons: Iterable[Reason], system: str = "metric") -> tuple[str, ...]:
    """:func:`explain` of each reason, in order."""
    return tuple(explain(r, system) for r in reasons)


def problem_message(problem: Problem, system: str = "metric") -> str:
    """A problem's message in the reader's units: its message (written metric, as the command
    line and the file checks show it), or in other units from its reason where it has one."""
    if system == "metric" or problem.reason is None or problem.reason.code not in _WRITERS:
        return problem.message
    return explain(problem.reason, system)


def reason_json(reason: Reason, system: str = "metric") -> dict[str, object]:
    """A reason for an export: its ``code``, its SI ``values`` and its ``text`` in ``system``."""
    return {**reason.to_json(), "text": explain(reason, system)}


def barrier_words(opening: Opening, profile: CatProfile | None = None,
                  system: str = "metric") -> str:
    """What barrier the opening has against cats and whether it holds the profile's cats
    (default: the adult preset), for a tooltip: ``"net, 20 mm mesh (holds these cats)"``,
    ``"limiter, 150 mm gap (lets 100% of these cats through)"``; ``"none recorded"``."""
    prof = CAT_PRESETS["adult"] if profile is None else profile

    def verdict(gap_mm: float, holds: bool) -> str:
        if holds:
            return " (holds these cats)"
        return f" (lets {fmt_percent(gap_pass_share(gap_mm, prof))} of these cats through)"

    parts = []
    if opening.netting_mesh_mm is not None:
        mesh = fmt_length(opening.netting_mesh_mm / 1000.0, system, small=True)
        parts.append(f"net, {mesh} mesh" + verdict(opening.netting_mesh_mm,
                                                   net_holds(opening, prof)))
    if opening.screen is Screen.PET_RESISTANT:
        parts.append("pet-resistant screen")
    if opening.limiter_gap_mm is not None and opening.kind not in BALCONY_LIKE:
        gap = fmt_length(opening.limiter_gap_mm / 1000.0, system, small=True)
        parts.append(f"limiter, {gap} gap" + verdict(opening.limiter_gap_mm,
                                                     limiter_holds(opening, prof)))
    return ", ".join(parts) or "none recorded"
