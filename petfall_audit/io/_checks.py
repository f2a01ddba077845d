"""Checks on a building model: limits, duplicates, references, order, geometry, cat profile.

Used by :func:`petfall_audit.io.building_file.validate_building` (the GUI calls it after edits)
and by the loader after the shape checks. Places are written like the file
(``openings[3].floor``); after a partial load, :class:`Places` maps model indices back to file
indices. Lengths in metres, gaps and mesh in millimetres (see the limits in ``_schema``).
"""

from __future__ import annotations

import dataclasses
import difflib
import functools
import itertools
import math
import operator
from collections.abc import Iterable, Sequence
from typing import Any

import numpy as np

from petfall_audit.errors import Place, Problem
from petfall_audit.io._schema import CAT_PARAMETERS, LIMITS, is_iso_date
from petfall_audit.io.photos import photo_problem
from petfall_audit.model import (
    BALCONY_LIKE,
    CAT_PRESETS,
    KIND_LABELS,
    WINDOW_KINDS,
    Building,
    BuildingInfo,
    CatProfile,
    Distribution,
    Facade,
    Fixed,
    Floor,
    LogNormal,
    Normal,
    Opening,
    OpeningKind,
    Uniform,
)
from petfall_audit.reasons import Reason

__all__ = ["Places", "check_model", "code_profile_warnings", "describe", "number", "unit_of"]

_EPS = 1e-9


def describe(value: Any) -> str:
    """A short, plain rendering of a JSON value for messages."""
    if value is None:
        return "null"
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        if abs(value) >= 10**15:
            return "a very large number"
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "NaN"
        if math.isinf(value):
            return "infinity" if value > 0 else "minus infinity"
        return repr(value)
    if isinstance(value, str):
        text = value if len(value) <= 40 else value[:37] + "..."
        return repr(text)
    if isinstance(value, dict):
        return "an object"
    if isinstance(value, list | tuple):
        return "a list"
    return f"a {type(value).__name__}"


_UNIT_SUFFIXES = (
    ("_mm", "mm"),
    ("_m2", "m²"),
    ("_mps", "m/s"),
    ("_kg", "kg"),
    ("_m", "m"),
    ("_c", "°C"),
    ("_s", "s"),
)


def unit_of(loc: Sequence[Any]) -> str:
    names = [p for p in loc if isinstance(p, str) and not p.startswith("<")]
    for name in reversed(names):
        for suffix, unit in _UNIT_SUFFIXES:
            if name.endswith(suffix):
                return f" {unit}"
        if name not in ("mean", "sd", "min", "max", "lognormal"):
            return ""
    return ""


def number(x: float) -> str:
    return f"{x:g}"


@dataclasses.dataclass(frozen=True, slots=True)
class Places:
    """Maps an item's index in the model to its index in the file (they differ after salvage)."""

    index: dict[str, list[int]]

    @classmethod
    def identity(cls, b: Building) -> Places:
        return cls(
            {
                "floors": list(range(len(b.floors))),
                "facades": list(range(len(b.facades))),
                "surfaces": list(range(len(b.surfaces))),
                "openings": list(range(len(b.openings))),
                "fixes": list(range(len(b.fixes))),
            }
        )

    def at(self, section: str, i: int, field: str = "") -> Place:
        """The place of item ``i`` of ``section`` (its index in the file) and its ``field``."""
        return Place(section, self.index[section][i], field)


def _finite(x: object) -> bool:
    return isinstance(x, int | float) and not isinstance(x, bool) and math.isfinite(x)


def _range(
    problems: list[Problem],
    where: str | Place,
    value: float | None,
    unit: str,
    lo: float | None = None,
    hi: float | None = None,
    *,
    lo_open: bool = False,
    hi_open: bool = False,
    why: str = "",
) -> bool:
    """Append a problem unless ``lo (<)<= value (<)<= hi``; True when the value is fine.

    ``why`` explains the upper bound (e.g. "far heavier than any cat")."""
    if value is None:
        return True
    u = f" {unit}" if unit else ""
    if not _finite(value):
        problems.append(Problem(where, f"expected a finite number, got {describe(value)}"))
        return False
    got = f", got {number(value)}{u}"
    tail = f" ({why})" if why else ""
    if lo is not None and (value <= lo if lo_open else value < lo):
        word = "greater than" if lo_open else "at least"
        problems.append(Problem(where, f"must be {word} {number(lo)}{u}{got}",
                                reason=_range_reason("range_low", value, lo, unit, lo_open, why)))
        return False
    if hi is not None and (value >= hi if hi_open else value > hi):
        word = "less than" if hi_open else "at most"
        problems.append(Problem(where, f"must be {word} {number(hi)}{u}{got}{tail}",
                                reason=_range_reason("range_high", value, hi, unit, hi_open, why)))
        return False
    return True


def _range_reason(code: str, value: float, limit: float, unit: str, open_: bool, why: str
                  ) -> Reason:
    """A value out of its range as a reason: lengths in metres (``quantity`` ``length``, or
    ``gap`` for millimetre sizes), other quantities in their own ``unit``."""
    scale, quantity = {"m": (1.0, "length"), "mm": (1e-3, "gap")}.get(unit, (1.0, "plain"))
    return Reason.of(code, value=float(value) * scale, limit=float(limit) * scale,
                     quantity=quantity, unit=unit, open=int(open_), why=why)


def _duplicates(
    problems: list[Problem], places: Places, section: str, keys: Sequence[object], what: str
) -> None:
    first: dict[object, int] = {}
    for i, key in enumerate(keys):
        if key in first:
            field = "level" if section == "floors" else "id"
            other = places.at(section, first[key])
            problems.append(
                Problem(
                    places.at(section, i, field),
                    f"{what} {describe(key)} is used more than once (also {other})",
                )
            )
        else:
            first[key] = i


def _suggest(name: str, known: Iterable[str]) -> str:
    known = sorted(known)
    hint = difflib.get_close_matches(name, known, n=1)
    if hint:
        return f" (did you mean {hint[0]!r}?)"
    if known and len(known) <= 8:
        return " (known: " + ", ".join(known) + ")"
    return ""


def check_model(b: Building, places: Places, incomplete: frozenset[str]) -> list[Problem]:
    """Every problem in ``b``; checks that need a section in ``incomplete`` are skipped."""
    problems: list[Problem] = []
    _check_info(problems, b.info)
    _check_floors(problems, b, places)
    _check_facades(problems, b, places)
    _check_surfaces(problems, b, places, incomplete)
    _check_openings(problems, b, places, incomplete)
    _check_landing(problems, b, places, coverage="surfaces" not in incomplete)
    _check_profile(problems, b.cat_profile, compare="cat_profile" not in incomplete)
    return problems


def _check_info(problems: list[Problem], info: BuildingInfo) -> None:
    L = LIMITS
    _range(problems, Place("building", None, "site_altitude_m"), info.site_altitude_m, "m",
           L.altitude_min_m, L.altitude_max_m)
    _range(problems, Place("building", None, "air_temperature_c"), info.air_temperature_c, "°C",
           L.temperature_min_c, L.temperature_max_c)
    if info.audit_date and not is_iso_date(info.audit_date):
        problems.append(
            Problem(
                Place("building", None, "audit_date"),
                f"expected a date written YYYY-MM-DD (or empty), got {describe(info.audit_date)}",
            )
        )


def _check_floors(problems: list[Problem], b: Building, places: Places) -> None:
    L = LIMITS
    _duplicates(problems, places, "floors", [f.level for f in b.floors], "level")
    previous: Floor | None = None
    for i, f in enumerate(b.floors):
        if not (L.level_min <= f.level <= L.level_max):
            problems.append(
                Problem(
                    places.at("floors", i, "level"),
                    f"must be between {L.level_min} and {L.level_max}, got {f.level}",
                )
            )
        where = places.at("floors", i, "elevation_m")
        ok = _range(problems, where, f.elevation_m, "m", L.elevation_min_m, L.elevation_max_m)
        if previous is not None and f.level != previous.level:
            below = places.at("floors", i - 1)
            if f.level < previous.level:
                problems.append(
                    Problem(
                        places.at("floors", i, "level"),
                        f"floors must be listed from the lowest level up: level {f.level} comes "
                        f"after level {previous.level} ({below})",
                    )
                )
            elif ok and _finite(previous.elevation_m) and f.elevation_m <= previous.elevation_m:
                problems.append(
                    Problem(
                        places.at("floors", i, "elevation_m"),
                        f"level {f.level} at {f.elevation_m:g} m is not above level "
                        f"{previous.level} at {previous.elevation_m:g} m ({below})",
                        reason=Reason.of("floor_not_above", level=f.level,
                                         elevation_m=float(f.elevation_m),
                                         below_level=previous.level,
                                         below_m=float(previous.elevation_m)),
                    )
                )
        previous = f


def _check_facades(problems: list[Problem], b: Building, places: Places) -> None:
    _duplicates(problems, places, "facades", [f.id for f in b.facades], "facade id")
    for i, f in enumerate(b.facades):
        if not f.id:
            problems.append(Problem(places.at("facades", i, "id"), "must not be empty"))
        where = places.at("facades", i, "length_m")
        _range(problems, where, f.length_m, "m", 0.0, LIMITS.length_max_m, lo_open=True)


def _check_surfaces(
    problems: list[Problem], b: Building, places: Places, incomplete: frozenset[str]
) -> None:
    L = LIMITS
    facade_ids = {f.id for f in b.facades}
    _duplicates(problems, places, "surfaces", [s.id for s in b.surfaces], "surface id")
    for i, s in enumerate(b.surfaces):
        at = functools.partial(places.at, "surfaces", i)
        if not s.id:
            problems.append(Problem(at("id"), "must not be empty"))
        _range(
            problems, at("elevation_m"), s.elevation_m, "m", L.elevation_min_m, L.elevation_max_m
        )
        ok_from = _range(problems, at("from_facade_m"), s.from_facade_m, "m", 0.0, L.length_max_m)
        ok_to = _range(problems, at("to_facade_m"), s.to_facade_m, "m", 0.0, L.length_max_m)
        if ok_from and ok_to and s.to_facade_m is not None and s.to_facade_m <= s.from_facade_m:
            problems.append(
                Problem(
                    at("to_facade_m"),
                    f"the outer edge must lie further out than the inner edge "
                    f"({s.from_facade_m:g} m), got {s.to_facade_m:g} m; leave it empty "
                    f"(to_facade_m null) for a surface that runs on without end",
                )
            )
        ok_xf = _range(problems, at("x_from_m"), s.x_from_m, "m", 0.0, L.length_max_m)
        ok_xt = _range(problems, at("x_to_m"), s.x_to_m, "m", 0.0, L.length_max_m)
        if ok_xf and ok_xt and s.x_from_m is not None and s.x_to_m is not None \
                and s.x_to_m <= s.x_from_m:
            problems.append(
                Problem(
                    at("x_to_m"),
                    f"the surface must end further along the facade than it starts "
                    f"({s.x_from_m:g} m), got {s.x_to_m:g} m",
                )
            )
        if s.facade is None and (s.x_from_m is not None or s.x_to_m is not None):
            problems.append(
                Problem(
                    at("x_from_m" if s.x_from_m is not None else "x_to_m"),
                    "an extent along a facade needs the facade it lies along: set its facade, "
                    "or leave x_from_m and x_to_m empty for a surface in front of every facade",
                )
            )
        if s.facade is not None and "facades" not in incomplete and s.facade not in facade_ids:
            problems.append(
                Problem(
                    at("facade"),
                    f"facade {s.facade!r} does not exist{_suggest(s.facade, facade_ids)}",
                )
            )


#: The last call's problems of each opening, by opening (held, so that its id stays its own),
#: with what they depend on besides the opening: an edit of a few openings of a large building
#: re-checks only those (the app validates the whole building after every edit).
_OPENING_PROBLEMS: dict[int, tuple[Any, Any, tuple[Any, ...], list[Problem]]] = {}


@dataclasses.dataclass(frozen=True, slots=True)
class _LastOpenings:
    """The openings of the last call with what their checks depended on, and the problems
    of each, in order: when only some openings are other objects than then (an edit), only
    those are looked at."""

    openings: tuple[Opening, ...]
    facades: tuple[Facade, ...]
    floors: tuple[Floor, ...]
    incomplete: frozenset[str]
    index: list[int]
    found: list[list[Problem]]


_LAST_OPENINGS: _LastOpenings | None = None


def _check_openings(
    problems: list[Problem], b: Building, places: Places, incomplete: frozenset[str]
) -> None:
    global _OPENING_PROBLEMS, _LAST_OPENINGS
    _duplicates(problems, places, "openings", [o.id for o in b.openings], "opening id")
    index = places.index["openings"]
    last = _LAST_OPENINGS
    if (last is not None and last.facades is b.facades and last.floors is b.floors
            and last.incomplete == incomplete and len(last.openings) == len(b.openings)
            and last.index == index):
        found = list(last.found)
        changed = list(itertools.compress(range(len(found)),
                                          map(operator.is_not, last.openings, b.openings)))
        if changed:
            facades = {f.id: f for f in b.facades}
            levels = {f.level for f in b.floors}
            for i in changed:
                found[i] = []
                _check_opening(found[i], b.openings[i],
                               functools.partial(places.at, "openings", i),
                               facades.get(b.openings[i].facade), levels, incomplete, facades)
    else:
        found = _check_all_openings(b, places, incomplete)
    problems.extend(itertools.chain.from_iterable(found))
    _LAST_OPENINGS = _LastOpenings(b.openings, b.facades, b.floors, incomplete, list(index),
                                   found)


def _check_all_openings(b: Building, places: Places,
                        incomplete: frozenset[str]) -> list[list[Problem]]:
    """The problems of each opening of ``b``, in order (reusing those of openings that are
    the same objects, in the same context, as in an earlier call)."""
    global _OPENING_PROBLEMS
    facades = {f.id: f for f in b.facades}
    levels = {f.level for f in b.floors}
    old = _OPENING_PROBLEMS
    new: dict[int, tuple[Any, Any, tuple[Any, ...], list[Problem]]] = {}
    floors_known, facades_known = "floors" not in incomplete, "facades" not in incomplete
    out: list[list[Problem]] = []
    for i, o in enumerate(b.openings):
        facade = facades.get(o.facade)
        context = (places.index["openings"][i], o.floor in levels, floors_known, facades_known,
                   tuple(facades) if facade is None else ())  # the names a hint may suggest
        hit = old.get(id(o))
        if hit is not None and hit[0] is o and hit[1] is facade and hit[2] == context:
            found = hit[3]
        else:
            found = []
            _check_opening(found, o, functools.partial(places.at, "openings", i), facade,
                           levels, incomplete, facades)
        new[id(o)] = (o, facade, context, found)
        out.append(found)
    _OPENING_PROBLEMS = new
    return out


def _check_opening(
    problems: list[Problem], o: Opening, at: Any, facade: Facade | None, levels: set[int],
    incomplete: frozenset[str], facades: dict[str, Facade],
) -> None:
    """The problems of one opening on its own (``facade``: the one it names, if it exists)."""
    L = LIMITS
    if not o.id:
        problems.append(Problem(at("id"), "must not be empty"))
    if "floors" not in incomplete and o.floor not in levels:
        problems.append(Problem(at("floor"), f"level {o.floor} does not exist"))
    if facade is None and "facades" not in incomplete:
        problems.append(
            Problem(
                at("facade"), f"facade {o.facade!r} does not exist{_suggest(o.facade, facades)}"
            )
        )
    ok_x = _range(problems, at("x_m"), o.x_m, "m", 0.0, L.length_max_m)
    ok_w = _range(problems, at("width_m"), o.width_m, "m", 0.0, L.width_max_m, lo_open=True)
    if ok_x and ok_w and facade is not None and _finite(facade.length_m):
        end = o.x_m + o.width_m
        if end > facade.length_m + L.facade_tolerance_m:
            problems.append(
                Problem(
                    at("x_m"),
                    f"the opening runs to {end:g} m along facade {facade.id!r}, which is only "
                    f"{facade.length_m:g} m long",
                )
            )
    if _range(problems, at("projection_m"), o.projection_m, "m", 0.0, L.projection_max_m):
        if o.kind in WINDOW_KINDS and o.projection_m != 0:
            problems.append(
                Problem(
                    at("projection_m"),
                    f"a {KIND_LABELS[o.kind].lower()} sits in the wall: its projection "
                    f"must be 0, got {o.projection_m:g} m",
                )
            )
    _range(problems, at("perch_height_m"), o.perch_height_m, "m", 0.0, L.perch_height_max_m)
    _range(problems, at("largest_gap_mm"), o.largest_gap_mm, "mm", 0.0, L.gap_max_mm)
    _range(problems, at("bottom_gap_mm"), o.bottom_gap_mm, "mm", 0.0, L.gap_max_mm)
    _range(problems, at("limiter_gap_mm"), o.limiter_gap_mm, "mm", 0.0, L.gap_max_mm)
    mesh_mm = o.netting_mesh_mm
    _range(problems, at("netting_mesh_mm"), mesh_mm, "mm", 0.0, L.mesh_max_mm, lo_open=True)
    if o.escape_window and (o.kind is OpeningKind.FIXED or o.kind in BALCONY_LIKE):
        problems.append(
            Problem(
                at("escape_window"),
                f"only an opening window can be an emergency escape window, not "
                f"{KIND_LABELS[o.kind].lower()}",
            )
        )
    # Only the form of a photo path is checked here (the file itself by load_building, which
    # knows the folder): a missing photo file never stops a building from loading; the app
    # and the report say so where they show the photo.
    for k, photo in enumerate(o.photos):
        if photo_problem(None, photo) is not None:
            problems.append(
                Problem(
                    at(f"photos[{k}]"),
                    ("expected a path inside the building file's folder (no '..' parts)"
                     if photo and ".." in photo.replace("\\", "/").split("/") else
                     "expected a path relative to the building file")
                    + f", got {describe(photo)}",
                )
            )


def _check_landing(
    problems: list[Problem], b: Building, places: Places, *, coverage: bool = True
) -> None:
    """Surfaces above the openings they would catch; with ``coverage``, openings with gaps in
    what lies below them (skipped when some surfaces were left out: one may fill the gap)."""
    if not b.openings:
        return
    L = LIMITS
    elevation = {f.level: f.elevation_m for f in b.floors}
    facade_index = {f.id: k for k, f in enumerate(b.facades)}
    o_elev = np.array([elevation.get(o.floor, np.nan) for o in b.openings], dtype=float)
    o_fac = np.array([facade_index.get(o.facade, -2) for o in b.openings])
    o_proj = np.array([o.projection_m for o in b.openings], dtype=float)
    o_x = np.array([o.x_m for o in b.openings], dtype=float)
    o_right = o_x + np.array([o.width_m for o in b.openings], dtype=float)
    if b.surfaces:
        s_elev = np.array([s.elevation_m for s in b.surfaces], dtype=float)
        s_fac = np.array([facade_index.get(s.facade, -2) if s.facade else -1 for s in b.surfaces])
        s_from = np.array([s.from_facade_m for s in b.surfaces], dtype=float)
        s_to = np.array([np.inf if s.to_facade_m is None else s.to_facade_m for s in b.surfaces])
        s_xlo = np.array([-np.inf if s.x_from_m is None else s.x_from_m for s in b.surfaces])
        s_xhi = np.array([np.inf if s.x_to_m is None else s.x_to_m for s in b.surfaces])
        with np.errstate(invalid="ignore"):
            same_face = (s_fac[:, None] == -1) | (s_fac[:, None] == o_fac[None, :])
            in_reach = (s_from[:, None] <= o_proj[None, :] + L.catch_reach_m) & (
                s_to[:, None] > o_proj[None, :]
            )
            along = (s_xlo[:, None] < o_right[None, :]) & (s_xhi[:, None] > o_x[None, :])
            above = s_elev[:, None] > o_elev[None, :] + _EPS
            caught = same_face & in_reach & along & above & (o_fac[None, :] >= 0)
        for si in np.flatnonzero(caught.any(axis=1)):
            hits = np.flatnonzero(caught[si])
            first = int(hits[0])
            o = b.openings[first]
            more = f" and {len(hits) - 1} more" if len(hits) > 1 else ""
            problems.append(
                Problem(
                    places.at("surfaces", int(si), "elevation_m"),
                    f"at {s_elev[si]:g} m this surface is above the openings it would catch: "
                    f"{places.at('openings', first)} ({o.id!r}, level {o.floor} at "
                    f"{o_elev[first]:g} m){more}; check its elevation, facade and extent",
                    reason=Reason.of("surface_above_openings", surface_m=float(s_elev[si]),
                                     opening_id=o.id, level=o.floor,
                                     opening_m=float(o_elev[first]), more=len(hits) - 1),
                )
            )
    # Every opening must land somewhere: below each opening, along its whole width, the
    # surfaces at or below its floor must cover the whole way out from the facade.
    if not coverage:
        return
    for k, facade in enumerate(b.facades):
        on_face = np.flatnonzero((o_fac == k) & np.isfinite(o_elev))
        if not on_face.size:
            continue
        mine = [s for s in b.surfaces if s.facade is None or s.facade == facade.id]
        # Between two consecutive ends of surfaces along the facade the same surfaces lie
        # below; the lowest opening over such a cell needs the least of them (a higher one has
        # every surface the lower one has), so checking it checks the cell.
        cuts = sorted({x for s in mine for x in (s.x_from_m, s.x_to_m) if x is not None})
        bounds = [-math.inf, *cuts, math.inf]
        for a, z in zip(bounds[:-1], bounds[1:], strict=True):
            over = on_face[(o_x[on_face] < z) & (o_right[on_face] > a)]
            if not over.size:
                continue
            i = int(over[np.argmin(o_elev[over])])
            lo, hi = max(a, float(o_x[i])), min(z, float(o_right[i]))
            mid = 0.5 * (lo + hi) if hi > lo else lo
            spans = sorted(
                (s.from_facade_m, math.inf if s.to_facade_m is None else s.to_facade_m)
                for s in mine
                if s.elevation_m <= o_elev[i] + _EPS
                and (s.x_from_m is None or s.x_from_m <= mid)
                and (s.x_to_m is None or s.x_to_m > mid)
            )
            gap = _first_gap(spans)
            if gap is None:
                continue
            start, end = gap
            extent = (f"from {start:g} m out" if math.isinf(end)
                      else f"from {start:g} to {end:g} m out")
            where = ("" if math.isinf(a) and math.isinf(z) else
                     f", along the facade from {max(a, 0.0):g} m"
                     + ("" if math.isinf(z) else f" to {z:g} m"))
            o = b.openings[i]
            problems.append(
                Problem(
                    places.at("facades", k),
                    f"nothing lies below opening {o.id!r} on facade {facade.id!r} {extent}"
                    f"{where} (its floor at {o_elev[i]:g} m): add a surface there, e.g. the "
                    f"ground running on without end (outer edge empty, to_facade_m null)",
                    reason=Reason.of(
                        "nothing_below", opening_id=o.id, facade=facade.id, out_from_m=start,
                        out_to_m=end, along_from_m=max(a, 0.0), along_to_m=z,
                        floor_m=float(o_elev[i])),
                )
            )
            break  # one message per facade is enough to act on


def _first_gap(spans: Sequence[tuple[float, float]]) -> tuple[float, float] | None:
    """First stretch of [0, ∞) not covered by the sorted ``(from_m, to_m)`` spans."""
    reach = 0.0
    for start, end in spans:
        if start > reach + _EPS:
            return (reach, start)
        reach = max(reach, end)
        if math.isinf(reach):
            return None
    return (reach, math.inf)


# (lower bound, lower bound open, upper bound, upper bound open, why the upper bound)
_PARAM_LIMITS: dict[str, tuple[float, bool, float, bool, str]] = {
    "mass_kg": (LIMITS.mass_min_kg, False, LIMITS.mass_max_kg, False, "far heavier than any cat"),
    "cda_tense_m2": (LIMITS.cda_min_m2, False, LIMITS.cda_max_m2, False, "far larger than any cat"),
    "cda_spread_m2": (LIMITS.cda_min_m2, False, LIMITS.cda_max_m2, False,
                      "far larger than any cat"),
    "relax_fraction": (0.0, True, 1.0, True, "a fraction of the terminal speed"),
    "righting_time_s": (0.0, True, LIMITS.righting_time_max_s, False, "far slower than a cat"),
    "launch_speed_mps": (0.0, False, LIMITS.launch_speed_max_mps, False, "far faster than a cat"),
}


def _centre(d: Distribution) -> float:
    if isinstance(d, Fixed):
        return d.value
    if isinstance(d, Uniform):
        return 0.5 * (d.min + d.max)
    return d.mean


def _check_profile(problems: list[Problem], p: CatProfile, *, compare: bool = True) -> None:
    """Limits of every parameter; with ``compare``, spread C_d·A not below tense C_d·A."""
    if p.preset is not None and p.preset not in CAT_PRESETS:
        problems.append(
            Problem(
                Place("cat_profile", None, "preset"),
                f"unknown preset {p.preset!r} (known: {', '.join(CAT_PRESETS)})",
            )
        )
    _range(problems, Place("cat_profile", None, "relax_probability"), p.relax_probability, "",
           0.0, 1.0)
    fine = True
    for name in CAT_PARAMETERS:
        lo, lo_open, hi, hi_open, why = _PARAM_LIMITS[name]
        unit = unit_of((name,)).strip()
        d: Distribution = getattr(p, name)
        at = Place("cat_profile", None, name)

        def part(sub: str, name: str = name) -> Place:
            return Place("cat_profile", None, f"{name}.{sub}")
        before = len(problems)

        value = functools.partial(
            _range, problems, unit=unit, lo=lo, hi=hi, lo_open=lo_open, hi_open=hi_open, why=why
        )

        if isinstance(d, Fixed):
            value(at, d.value)
        elif isinstance(d, Normal):
            value(part("mean"), d.mean)
            _range(problems, part("sd"), d.sd, unit, 0.0, hi, why=why)
        elif isinstance(d, Uniform):
            value(part("min"), d.min)
            value(part("max"), d.max)
            if len(problems) == before and d.min > d.max:
                problems.append(
                    Problem(part("max"), f"must not be below min ({d.min:g}), got {d.max:g}")
                )
        elif isinstance(d, LogNormal):
            value(part("lognormal.mean"), d.mean)
            _range(problems, part("lognormal.sd"), d.sd, unit, 0.0, hi, why=why)
        else:
            problems.append(Problem(at, DISTRIBUTION_WORDS))
        fine = fine and len(problems) == before
    if compare and fine and _centre(p.cda_spread_m2) < _centre(p.cda_tense_m2):
        problems.append(
            Problem(
                Place("cat_profile", None, "cda_spread_m2"),
                f"the spread-out posture ({_centre(p.cda_spread_m2):g} m²) must not meet less "
                f"air than the tense one ({_centre(p.cda_tense_m2):g} m²)",
            )
        )


DISTRIBUTION_WORDS = "expected a fixed number or a normal, uniform or log-normal distribution"


def code_profile_warnings(b: Building) -> list[Problem]:
    """Located warnings from the building's code profile (``check`` lists them): an emergency
    escape window whose limiter leaves less than the profile's minimum clear opening width must
    release by hand, without a key or tool, to open the full escape opening. The generic profile
    checks against the widest minimum of the codes known (508 mm) and cites no clause."""
    from petfall_audit.code_profile import building_profile

    profile = building_profile(b)
    escape = profile.rule("escape_opening")
    if escape is None or escape.value_mm is None:
        return []
    minimum_mm = escape.value_mm
    release = profile.rule("escape_release")
    cites = [r.citation for r in (escape, release) if r is not None and r.cited]
    where = (
        f" ({'; '.join(dict.fromkeys(cites))})" if cites else " (no clause: check the local rule)"
    )
    out: list[Problem] = []
    for i, o in enumerate(b.openings):
        if not o.escape_window or o.limiter_gap_mm is None or o.limiter_gap_mm >= minimum_mm:
            continue
        out.append(
            Problem(
                f"openings[{i}].limiter_gap_mm",
                f"{o.id!r} is an emergency escape window, and its limiter leaves "
                f"{number(o.limiter_gap_mm)} mm, less than the {number(minimum_mm)} mm clear "
                f"opening the {profile.name} profile asks{where}: the limiter must release by "
                "hand, without a key or tool, to open the full escape opening; check that it does",
                severity="warning",
            )
        )
    return out
