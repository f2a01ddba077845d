"""Figure data shared by the PDF and the on-screen views: plain dataclasses of numpy arrays.

No drawing happens here: the report draws these arrays with reportlab, the window with
pyqtgraph. Lengths in metres (datum = the building's datum), speeds in m/s, times in s.

- :func:`facade_elevations`: per facade, the floor lines and one rectangle per opening with its
  expected injury band (index into ``injury.BANDS``; -1 = no result).
- :func:`floor_comparison`: per floor, openings counted by expected band, the highest risk score
  and the highest median impact speed.
- :func:`fall_profile_figure`: height, speed and acceleration against time for one opening, for a
  representative cat (the profile's median values) falling the opening's median drop.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from petfall_audit.model import (
    BALCONY_LIKE,
    Building,
    CatProfile,
    Distribution,
    Fixed,
    LogNormal,
    Normal,
    Uniform,
)

if TYPE_CHECKING:
    from petfall_audit.risk import Assessment

__all__ = [
    "FacadeElevation",
    "FloorComparison",
    "FallProfileFigure",
    "RepresentativeCat",
    "facade_elevations",
    "floor_comparison",
    "representative_cat",
    "fall_profile_figure",
    "storey_heights_m",
]

#: Head height of a window or door drawn on an elevation (m). Drawing convention only.
HEAD_HEIGHT_M = 2.1
_FALLBACK_STOREY_M = 2.7  # drawing only, for a one-floor building


@dataclass(frozen=True, slots=True)
class FacadeElevation:
    """One facade seen from outside. Opening arrays are aligned with ``opening_ids``.

    ``bottom_m`` / ``top_m``: drawn extent of each opening above the datum (windows from the sill,
    balconies from the floor). ``guard_m``: rail top above the datum for balcony-like openings,
    NaN for windows. ``band``: expected injury band, -1 when unknown. ``rank``: 1 = worst.
    """

    facade_id: str
    label: str
    length_m: float
    floor_levels: NDArray[np.int_]
    floor_labels: tuple[str, ...]
    floor_elevation_m: NDArray[np.float64]
    ground_m: float
    roof_m: float
    opening_ids: tuple[str, ...]
    kinds: tuple[str, ...]
    x_m: NDArray[np.float64]
    width_m: NDArray[np.float64]
    bottom_m: NDArray[np.float64]
    top_m: NDArray[np.float64]
    guard_m: NDArray[np.float64]
    band: NDArray[np.int_]
    rank: NDArray[np.int_]


@dataclass(frozen=True, slots=True)
class FloorComparison:
    """Per-floor summary, lowest floor first. ``band_counts``: (n_floors, n_bands) openings by
    expected band; ``max_risk``: highest risk score on the floor (0 if none);
    ``max_impact_p50_mps``: highest median impact speed on the floor (NaN if none)."""

    levels: NDArray[np.int_]
    labels: tuple[str, ...]
    elevation_m: NDArray[np.float64]
    band_names: tuple[str, ...]
    band_counts: NDArray[np.int_]
    n_openings: NDArray[np.int_]
    max_risk: NDArray[np.float64]
    max_impact_p50_mps: NDArray[np.float64]


@dataclass(frozen=True, slots=True)
class RepresentativeCat:
    """The median cat of a profile: mass (kg), C_d·A tense / spread (m²), the fraction of tense
    terminal speed at which it spreads out, and whether the median cat relaxes at all."""

    mass_kg: float
    cda_tense_m2: float
    cda_spread_m2: float
    relax_fraction: float
    relaxes: bool


@dataclass(frozen=True, slots=True)
class FallProfileFigure:
    """Time series of one representative fall (from rest at the perch to the landing)."""

    opening_id: str
    drop_m: float
    cat: RepresentativeCat
    rho_kg_m3: float
    t_s: NDArray[np.float64]
    height_m: NDArray[np.float64]
    speed_mps: NDArray[np.float64]
    accel_mps2: NDArray[np.float64]
    switch_time_s: float | None
    impact_speed_mps: float
    fall_time_s: float
    caption: str


def storey_heights_m(building: Building) -> dict[int, float]:
    """Floor-to-floor height per level (m); the top floor repeats the one below it."""
    floors = sorted(building.floors, key=lambda f: f.elevation_m)
    elev = np.array([f.elevation_m for f in floors], dtype=float)
    if elev.size == 0:
        return {}
    gaps = np.diff(elev)
    last = gaps[-1] if gaps.size else _FALLBACK_STOREY_M
    heights = np.append(gaps, last)
    return {f.level: float(h) for f, h in zip(floors, heights, strict=True)}


def _bands_by_id(assessment: Assessment) -> tuple[dict[str, int], dict[str, int]]:
    band = {o.id: int(o.expected_band) for o in assessment.openings}
    rank = {o.id: int(o.rank) for o in assessment.openings}
    return band, rank


def facade_elevations(assessment: Assessment) -> list[FacadeElevation]:
    """One :class:`FacadeElevation` per facade that has openings, in building order."""
    building = assessment.building
    band_of, rank_of = _bands_by_id(assessment)
    storey = storey_heights_m(building)
    floors = sorted(building.floors, key=lambda f: f.elevation_m)
    levels = np.array([f.level for f in floors], dtype=int)
    elev = np.array([f.elevation_m for f in floors], dtype=float)
    ground = min([s.elevation_m for s in building.surfaces] + [float(elev.min(initial=0.0))])
    roof = float(elev.max(initial=0.0)) + (storey[floors[-1].level] if floors else 0.0)
    floor_elev = {f.level: f.elevation_m for f in floors}
    out: list[FacadeElevation] = []
    for facade in building.facades:
        ops = [o for o in building.openings if o.facade == facade.id]
        if not ops:
            continue
        base = np.array([floor_elev[o.floor] for o in ops], dtype=float)
        h = np.array([storey[o.floor] for o in ops], dtype=float)
        perch = np.array([o.perch_height_m for o in ops], dtype=float)
        balcony = np.array([o.kind in BALCONY_LIKE for o in ops], dtype=bool)
        head = np.minimum(HEAD_HEIGHT_M, h - 0.2)
        sill = np.minimum(perch, head - 0.3)
        bottom = base + np.where(balcony, 0.0, sill)
        top = base + head
        guard = np.where(balcony, base + np.minimum(perch, head), np.nan)
        out.append(
            FacadeElevation(
                facade_id=facade.id,
                label=facade.label or facade.id,
                length_m=float(facade.length_m),
                floor_levels=levels,
                floor_labels=tuple(f.label for f in floors),
                floor_elevation_m=elev,
                ground_m=float(ground),
                roof_m=roof,
                opening_ids=tuple(o.id for o in ops),
                kinds=tuple(str(o.kind) for o in ops),
                x_m=np.array([o.x_m for o in ops], dtype=float),
                width_m=np.array([o.width_m for o in ops], dtype=float),
                bottom_m=bottom,
                top_m=top,
                guard_m=guard,
                band=np.array([band_of.get(o.id, -1) for o in ops], dtype=int),
                rank=np.array([rank_of.get(o.id, 0) for o in ops], dtype=int),
            )
        )
    return out


def floor_comparison(assessment: Assessment, band_names: tuple[str, ...] | None = None
                     ) -> FloorComparison:
    """Openings per floor by expected band, and each floor's worst risk and impact speed."""
    if band_names is None:
        from petfall_audit.injury import BANDS

        band_names = tuple(BANDS)
    floors = sorted(assessment.building.floors, key=lambda f: f.elevation_m)
    levels = np.array([f.level for f in floors], dtype=int)
    row_of = {lv: i for i, lv in enumerate(levels.tolist())}
    res = assessment.openings
    rows = np.array([row_of[o.floor] for o in res], dtype=int)
    bands = np.array([o.expected_band for o in res], dtype=int)
    risk = np.array([o.risk for o in res], dtype=float)
    v50 = np.array([o.impact_speed_mps.p50 for o in res], dtype=float)
    n_f, n_b = len(floors), len(band_names)
    counts = np.zeros((n_f, n_b), dtype=int)
    ok = (bands >= 0) & (bands < n_b)
    np.add.at(counts, (rows[ok], bands[ok]), 1)
    max_risk = np.zeros(n_f)
    np.maximum.at(max_risk, rows, risk)
    max_v = np.full(n_f, -np.inf)
    np.maximum.at(max_v, rows, np.where(np.isfinite(v50), v50, -np.inf))
    max_v[~np.isfinite(max_v)] = np.nan
    return FloorComparison(
        levels=levels,
        labels=tuple(f.label for f in floors),
        elevation_m=np.array([f.elevation_m for f in floors], dtype=float),
        band_names=band_names,
        band_counts=counts,
        n_openings=np.bincount(rows, minlength=n_f).astype(int),
        max_risk=max_risk,
        max_impact_p50_mps=max_v,
    )


def _median(d: Distribution) -> float:
    """Median of a profile distribution (the sampler truncates normals at zero)."""
    if isinstance(d, Fixed):
        return float(d.value)
    if isinstance(d, Normal):
        return float(max(d.mean, 0.0))
    if isinstance(d, Uniform):
        return 0.5 * (d.min + d.max)
    if isinstance(d, LogNormal):  # median = mean / sqrt(1 + cv²)
        return float(d.mean / math.sqrt(1.0 + (d.sd / d.mean) ** 2))
    raise TypeError(f"unknown distribution {d!r}")


def representative_cat(profile: CatProfile) -> RepresentativeCat:
    """The profile's median cat; it relaxes when at least half the cats do."""
    return RepresentativeCat(
        mass_kg=_median(profile.mass_kg),
        cda_tense_m2=_median(profile.cda_tense_m2),
        cda_spread_m2=_median(profile.cda_spread_m2),
        relax_fraction=_median(profile.relax_fraction),
        relaxes=profile.relax_probability >= 0.5,
    )


def fall_profile_figure(assessment: Assessment, opening_id: str) -> FallProfileFigure:
    """Fall profile of ``opening_id``: the representative cat over the opening's median drop."""
    from petfall_audit.physics import fall_profile

    result = next((o for o in assessment.openings if o.id == opening_id), None)
    if result is None:
        raise KeyError(opening_id)
    cat = representative_cat(assessment.building.cat_profile)
    drop = float(result.drop_m.p50)
    rho = float(assessment.falls.rho_kg_m3)
    prof = fall_profile(
        max(drop, 1e-3),
        mass_kg=cat.mass_kg,
        cda_tense_m2=cat.cda_tense_m2,
        cda_spread_m2=cat.cda_spread_m2 if cat.relaxes else cat.cda_tense_m2,
        relax_fraction=cat.relax_fraction,
        rho_kg_m3=rho,
    )
    switch = prof.switch_time_s if cat.relaxes else None
    if switch is not None and not math.isfinite(switch):
        switch = None
    posture = (
        f"spreads out at {cat.relax_fraction:.0%} of its tense terminal speed"
        if cat.relaxes
        else "stays tense (fewer than half the cats in the profile relax)"
    )
    caption = (
        f"Fall profile for opening {opening_id}: a representative cat (the profile's median "
        f"values: {cat.mass_kg:.1f} kg, C_d·A {cat.cda_tense_m2:.3f} m² tense) falling the "
        f"opening's median drop of {drop:.1f} m; it {posture}. Air density "
        f"{rho:.3f} kg/m³. One typical fall, not the range: see the table for p5-p95."
    )
    return FallProfileFigure(
        opening_id=opening_id,
        drop_m=drop,
        cat=cat,
        rho_kg_m3=rho,
        t_s=np.asarray(prof.t_s, dtype=float),
        height_m=np.asarray(prof.height_m, dtype=float),
        speed_mps=np.asarray(prof.speed_mps, dtype=float),
        accel_mps2=np.asarray(prof.accel_mps2, dtype=float),
        switch_time_s=switch,
        impact_speed_mps=float(prof.impact_speed_mps),
        fall_time_s=float(prof.fall_time_s),
        caption=caption,
    )

