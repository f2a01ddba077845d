"""Per-floor summaries of an assessment, lowest floor first: openings, worst injury band, yearly
likelihood, highest risk score and highest median impact speed (m/s)."""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING, TypedDict

import numpy as np
from numpy.typing import NDArray

from petfall_audit.model import Building, Floor

if TYPE_CHECKING:
    from petfall_audit.risk import Assessment, OpeningResult

__all__ = [
    "FloorSummary",
    "LevelSummary",
    "FloorComparison",
    "floors_by_elevation",
    "level_summary",
    "floor_comparison",
    "align_levels",
]


@dataclass(frozen=True, slots=True)
class FloorSummary:
    """What every per-floor summary has, lowest floor first: ``levels``, ``labels``,
    ``elevation_m`` above the datum, ``n_openings``, the highest risk score ``max_risk`` (0 = no
    opening) and the highest median impact speed ``max_impact_p50_mps`` (NaN = no opening)."""

    levels: NDArray[np.int_]
    labels: tuple[str, ...]
    elevation_m: NDArray[np.float64]
    max_impact_p50_mps: NDArray[np.float64]
    max_risk: NDArray[np.float64]
    n_openings: NDArray[np.int_]


@dataclass(frozen=True, slots=True)
class LevelSummary(FloorSummary):
    """The on-screen floor chart: ``worst_band``, the worst expected injury band of the floor's
    openings (index into ``injury.BANDS``; -1 = no opening), and ``falls_per_year``, the summed
    yearly fall probability of its openings (the expected number of falls a year, for small
    values), over the whole building or one facade (``title``)."""

    title: str
    worst_band: NDArray[np.int_]
    falls_per_year: NDArray[np.float64]


@dataclass(frozen=True, slots=True)
class FloorComparison(FloorSummary):
    """The PDF's floor chart: ``band_counts`` (n_floors, n_bands), openings by expected band."""

    band_names: tuple[str, ...]
    band_counts: NDArray[np.int_]


class _FloorFields(TypedDict):
    """Keyword arguments of :class:`FloorSummary`."""

    levels: NDArray[np.int_]
    labels: tuple[str, ...]
    elevation_m: NDArray[np.float64]
    max_impact_p50_mps: NDArray[np.float64]
    max_risk: NDArray[np.float64]
    n_openings: NDArray[np.int_]


def floors_by_elevation(building: Building) -> tuple[Floor, ...]:
    """The building's floors, lowest first."""
    return tuple(sorted(building.floors, key=lambda f: f.elevation_m))


def _max_per_floor(n: int, rows: NDArray[np.int_], values: NDArray[np.float64],
                   empty: float) -> NDArray[np.float64]:
    """Highest finite value per floor row; ``empty`` where a floor has none."""
    out = np.full(n, -np.inf)
    np.maximum.at(out, rows, np.where(np.isfinite(values), values, -np.inf))
    out[~np.isfinite(out)] = empty
    return out


def _common(assessment: Assessment, facade: str | None
            ) -> tuple[_FloorFields, list[OpeningResult], NDArray[np.int_]]:
    """The :class:`FloorSummary` fields, the results counted and each one's floor row."""
    floors = floors_by_elevation(assessment.building)
    levels = np.array([f.level for f in floors], dtype=int)
    row_of = {lv: i for i, lv in enumerate(levels.tolist())}
    res = [o for o in assessment.openings
           if (facade is None or o.facade == facade) and o.floor in row_of]
    n = len(floors)
    rows = np.array([row_of[o.floor] for o in res], dtype=int)
    v50 = np.array([o.impact_speed_mps.p50 for o in res], dtype=float)
    risk = np.array([o.risk for o in res], dtype=float)
    fields: _FloorFields = {
        "levels": levels,
        "labels": tuple(f.label for f in floors),
        "elevation_m": np.array([f.elevation_m for f in floors], dtype=float),
        "max_impact_p50_mps": _max_per_floor(n, rows, v50, np.nan),
        "max_risk": _max_per_floor(n, rows, risk, 0.0),
        "n_openings": np.bincount(rows, minlength=n).astype(int),
    }
    return fields, res, rows


def level_summary(assessment: Assessment, facade: str | None = None, *,
                  title: str = "") -> LevelSummary:
    """Per-floor summary of ``assessment`` over every opening, or only those on ``facade``."""
    fields, res, rows = _common(assessment, facade)
    n = len(fields["labels"])
    band = np.array([o.expected_band for o in res], dtype=float)
    falls = np.zeros(n)
    np.add.at(falls, rows, np.array([o.annual_probability for o in res], dtype=float))
    if not title:
        title = assessment.building.info.name if facade is None else facade
    return LevelSummary(
        title=title,
        worst_band=_max_per_floor(n, rows, band, -1).astype(int),
        falls_per_year=falls,
        **fields,
    )


def floor_comparison(assessment: Assessment, band_names: tuple[str, ...] | None = None
                     ) -> FloorComparison:
    """Openings per floor by expected band (``injury.BANDS`` by default), and each floor's worst
    risk and impact speed."""
    if band_names is None:
        from petfall_audit.injury import BANDS

        band_names = tuple(BANDS)
    fields, res, rows = _common(assessment, None)
    n_f, n_b = len(fields["labels"]), len(band_names)
    bands = np.array([o.expected_band for o in res], dtype=int)
    counts = np.zeros((n_f, n_b), dtype=int)
    ok = (bands >= 0) & (bands < n_b)
    np.add.at(counts, (rows[ok], bands[ok]), 1)
    return FloorComparison(band_names=band_names, band_counts=counts, **fields)


def _reindex(s: LevelSummary, levels: NDArray[np.int_], labels: tuple[str, ...],
             elevation_m: NDArray[np.float64]) -> LevelSummary:
    pos = {lv: i for i, lv in enumerate(s.levels.tolist())}
    idx = np.array([pos.get(lv, -1) for lv in levels.tolist()], dtype=int)
    have = idx >= 0
    safe = np.where(have, idx, 0)

    def take(a: NDArray[np.generic], fill: float) -> NDArray[np.generic]:
        if a.size == 0:
            return np.full(levels.shape, fill, dtype=a.dtype)
        return np.where(have, a[safe], fill).astype(a.dtype)

    return LevelSummary(
        title=s.title, levels=levels, labels=labels, elevation_m=elevation_m,
        worst_band=take(s.worst_band, -1).astype(int),
        falls_per_year=take(s.falls_per_year, 0.0).astype(float),
        max_impact_p50_mps=take(s.max_impact_p50_mps, np.nan).astype(float),
        max_risk=take(s.max_risk, 0.0).astype(float),
        n_openings=take(s.n_openings, 0).astype(int),
    )


def align_levels(a: LevelSummary, b: LevelSummary) -> tuple[LevelSummary, LevelSummary]:
    """``a`` and ``b`` on the union of their levels (sorted by level); a level one of them lacks
    gets no openings. Labels and elevations come from ``a`` where it has the level."""
    info: dict[int, tuple[str, float]] = {}
    for s in (b, a):  # a's labels win
        for lv, label, z in zip(s.levels.tolist(), s.labels, s.elevation_m.tolist(), strict=True):
            info[lv] = (label, z)
    levels = np.array(sorted(info), dtype=int)
    labels = tuple(info[lv][0] for lv in levels.tolist())
    elev = np.array([info[lv][1] for lv in levels.tolist()], dtype=float)
    return _reindex(a, levels, labels, elev), _reindex(b, levels, labels, elev)
