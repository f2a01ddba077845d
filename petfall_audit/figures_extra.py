"""More figure data for the on-screen views: plain dataclasses of numpy arrays, no drawing.

Companion of :mod:`petfall_audit.figures` (which the PDF shares). Lengths in metres above the
building's datum, speeds in m/s, accelerations in m/s², times in s, likelihoods as yearly
probabilities (0..1).

- :func:`level_summary`: per floor, the worst expected injury band and the yearly likelihood of a
  fall, for the whole building or one facade; :func:`align_levels` puts two summaries (two
  facades, or this audit and an earlier one) on the same list of levels.
- :func:`posture_paths`: the fall of the representative cat from one opening, once staying tense
  and once spreading out, as time series.
- :func:`impact_speed_curve`: impact speed against drop height for the representative cat, with
  every opening of the building placed on the curve at its median drop.
- :func:`facade_context`: what the elevation of one facade shows besides the openings: the
  surfaces below it and the balconies that can catch a cat falling from above.
- :func:`budget_grid`: budgets at which to draw the risk-against-budget curve.
"""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from petfall_audit.figures import representative_cat
from petfall_audit.model import BALCONY_LIKE, Building

if TYPE_CHECKING:
    from petfall_audit.fixes import Option
    from petfall_audit.risk import Assessment

__all__ = [
    "LevelSummary",
    "PosturePath",
    "ImpactCurve",
    "SurfaceBand",
    "CatchingBalcony",
    "FacadeContext",
    "level_summary",
    "align_levels",
    "posture_paths",
    "impact_speed_curve",
    "facade_context",
    "budget_grid",
    "knee_budget",
]


@dataclass(frozen=True, slots=True)
class LevelSummary:
    """Per floor, lowest first. ``worst_band``: worst expected injury band of the floor's
    openings (index into ``injury.BANDS``; -1 = no opening); ``falls_per_year``: summed yearly
    fall probability of its openings (the expected number of falls a year, for small values);
    ``max_impact_p50_mps``: highest median impact speed (NaN = no opening); ``max_risk``: highest
    risk score (0 = none); ``n_openings``."""

    title: str
    levels: NDArray[np.int_]
    labels: tuple[str, ...]
    elevation_m: NDArray[np.float64]
    worst_band: NDArray[np.int_]
    falls_per_year: NDArray[np.float64]
    max_impact_p50_mps: NDArray[np.float64]
    max_risk: NDArray[np.float64]
    n_openings: NDArray[np.int_]


def level_summary(assessment: Assessment, facade: str | None = None, *,
                  title: str = "") -> LevelSummary:
    """Per-floor summary of ``assessment`` over every opening, or only those on ``facade``."""
    floors = sorted(assessment.building.floors, key=lambda f: f.elevation_m)
    levels = np.array([f.level for f in floors], dtype=int)
    row_of = {lv: i for i, lv in enumerate(levels.tolist())}
    res = [o for o in assessment.openings
           if (facade is None or o.facade == facade) and o.floor in row_of]
    n = len(floors)
    rows = np.array([row_of[o.floor] for o in res], dtype=int)
    band = np.array([o.expected_band for o in res], dtype=int)
    p = np.array([o.annual_probability for o in res], dtype=float)
    v50 = np.array([o.impact_speed_mps.p50 for o in res], dtype=float)
    risk = np.array([o.risk for o in res], dtype=float)
    worst = np.full(n, -1, dtype=int)
    np.maximum.at(worst, rows, band)
    falls = np.zeros(n)
    np.add.at(falls, rows, p)
    vmax = np.full(n, -np.inf)
    np.maximum.at(vmax, rows, np.where(np.isfinite(v50), v50, -np.inf))
    vmax[~np.isfinite(vmax)] = np.nan
    rmax = np.zeros(n)
    np.maximum.at(rmax, rows, risk)
    if not title:
        title = assessment.building.info.name if facade is None else facade
    return LevelSummary(
        title=title,
        levels=levels,
        labels=tuple(f.label for f in floors),
        elevation_m=np.array([f.elevation_m for f in floors], dtype=float),
        worst_band=worst,
        falls_per_year=falls,
        max_impact_p50_mps=vmax,
        max_risk=rmax,
        n_openings=np.bincount(rows, minlength=n).astype(int),
    )


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


@dataclass(frozen=True, slots=True)
class PosturePath:
    """One way the representative cat can fall: ``name`` in plain words, ``share`` of the
    cats that take it (0..1), time series from the perch to the landing (``height_m`` above the
    landing point), when it starts to spread out (``switch_time_s``; ``None`` if it does not
    before landing) and the impact speed and fall time."""

    name: str
    share: float
    t_s: NDArray[np.float64]
    height_m: NDArray[np.float64]
    speed_mps: NDArray[np.float64]
    accel_mps2: NDArray[np.float64]
    switch_time_s: float | None
    impact_speed_mps: float
    fall_time_s: float


def posture_paths(assessment: Assessment, opening_id: str, *,
                  n_points: int = 300) -> tuple[PosturePath, ...]:
    """The representative cat falling the opening's median drop: tense all the way, and (if any
    cat in the profile relaxes) spreading out at the profile's median relax fraction."""
    from petfall_audit.physics import fall_profile

    result = assessment.result(opening_id)
    profile = assessment.building.cat_profile
    cat = representative_cat(profile)
    drop = max(float(result.drop_m.p50), 1e-3)
    rho = float(assessment.falls.rho_kg_m3)
    p_relax = float(profile.relax_probability)
    spec = [("stays tense", 1.0 - p_relax, cat.cda_tense_m2)]
    if p_relax > 0.0 and cat.cda_spread_m2 > cat.cda_tense_m2:
        spec.append(("spreads out", p_relax, cat.cda_spread_m2))
    else:
        spec[0] = ("stays tense", 1.0, cat.cda_tense_m2)
    out: list[PosturePath] = []
    for name, share, cda_spread in spec:
        prof = fall_profile(drop, mass_kg=cat.mass_kg, cda_tense_m2=cat.cda_tense_m2,
                            cda_spread_m2=cda_spread, relax_fraction=cat.relax_fraction,
                            rho_kg_m3=rho, n_points=n_points)
        switch = prof.switch_time_s if cda_spread > cat.cda_tense_m2 else None
        if switch is not None and not np.isfinite(switch):
            switch = None
        out.append(PosturePath(
            name=name, share=share,
            t_s=np.asarray(prof.t_s, dtype=float),
            height_m=np.asarray(prof.height_m, dtype=float),
            speed_mps=np.asarray(prof.speed_mps, dtype=float),
            accel_mps2=np.asarray(prof.accel_mps2, dtype=float),
            switch_time_s=None if switch is None else float(switch),
            impact_speed_mps=float(prof.impact_speed_mps),
            fall_time_s=float(prof.fall_time_s),
        ))
    return tuple(out)


@dataclass(frozen=True, slots=True)
class ImpactCurve:
    """Impact speed (m/s) of the representative cat against drop height (m).

    ``speed_tense_mps`` / ``speed_spread_mps``: the two posture paths over ``drop_m``
    (``speed_spread_mps`` equals the tense one when no cat relaxes). ``speed_typical_mps``: the
    path the median cat takes. Openings: ``opening_ids`` (building order), their median drop
    ``opening_drop_m``, the typical curve's speed there ``opening_speed_mps`` (so the marks sit
    on the curve) and their expected ``opening_band``."""

    drop_m: NDArray[np.float64]
    speed_tense_mps: NDArray[np.float64]
    speed_spread_mps: NDArray[np.float64]
    speed_typical_mps: NDArray[np.float64]
    typical_relaxes: bool
    opening_ids: tuple[str, ...]
    opening_drop_m: NDArray[np.float64]
    opening_speed_mps: NDArray[np.float64]
    opening_band: NDArray[np.int_]


def impact_speed_curve(assessment: Assessment, *, n_points: int = 200) -> ImpactCurve:
    """The impact-speed curve up to a little beyond the building's longest median drop."""
    from petfall_audit.physics import impact_speed

    cat = representative_cat(assessment.building.cat_profile)
    rho = float(assessment.falls.rho_kg_m3)
    drops = np.array([o.drop_m.p50 for o in assessment.openings], dtype=float)
    top = float(np.nanmax(drops)) if drops.size else 10.0
    grid = np.linspace(0.0, max(1.2 * top, 5.0), n_points)
    relaxes = cat.relaxes and cat.cda_spread_m2 > cat.cda_tense_m2

    def speed(h: NDArray[np.float64], spread: float) -> NDArray[np.float64]:
        v = impact_speed(h, mass_kg=cat.mass_kg, cda_tense_m2=cat.cda_tense_m2,
                         cda_spread_m2=spread, relax_fraction=cat.relax_fraction, rho_kg_m3=rho)
        return np.asarray(v, dtype=float)

    tense = speed(grid, cat.cda_tense_m2)
    spread = speed(grid, max(cat.cda_spread_m2, cat.cda_tense_m2))
    typical_cda = cat.cda_spread_m2 if relaxes else cat.cda_tense_m2
    return ImpactCurve(
        drop_m=grid,
        speed_tense_mps=tense,
        speed_spread_mps=spread,
        speed_typical_mps=spread if relaxes else tense,
        typical_relaxes=relaxes,
        opening_ids=tuple(o.id for o in assessment.openings),
        opening_drop_m=drops,
        opening_speed_mps=speed(np.nan_to_num(np.maximum(drops, 0.0)), typical_cda),
        opening_band=np.array([o.expected_band for o in assessment.openings], dtype=int),
    )


@dataclass(frozen=True, slots=True)
class SurfaceBand:
    """A surface below, seen on an elevation: its top ``elevation_m``, outward extent
    ``from_m``..``to_m`` (``None`` = unbounded) and plain-words ``label``."""

    id: str
    kind: str
    elevation_m: float
    from_m: float
    to_m: float | None
    label: str


@dataclass(frozen=True, slots=True)
class CatchingBalcony:
    """A balcony, terrace or gallery that can catch a cat falling from above: floor level
    ``slab_m`` above the datum, ``x_m`` / ``width_m`` along the facade, ``projection_m`` out."""

    id: str
    slab_m: float
    x_m: float
    width_m: float
    projection_m: float


@dataclass(frozen=True, slots=True)
class FacadeContext:
    """What lies below and in front of one facade (surfaces nearest the facade first)."""

    facade_id: str
    surfaces: tuple[SurfaceBand, ...]
    catching: tuple[CatchingBalcony, ...]


def facade_context(building: Building, facade_id: str) -> FacadeContext:
    """Surfaces that lie in front of ``facade_id`` (its own and those of every facade) and its
    balcony-like openings, which catch cats falling from higher up when they project far
    enough."""
    surfaces = sorted(
        (s for s in building.surfaces if s.facade in (None, facade_id)),
        key=lambda s: (s.from_facade_m, -s.elevation_m),
    )
    elev = {f.level: f.elevation_m for f in building.floors}
    catching = tuple(
        CatchingBalcony(o.id, float(elev.get(o.floor, 0.0)), o.x_m, o.width_m, o.projection_m)
        for o in building.openings
        if o.facade == facade_id and o.kind in BALCONY_LIKE and o.projection_m > 0
    )
    return FacadeContext(
        facade_id=facade_id,
        surfaces=tuple(
            SurfaceBand(s.id, str(s.kind), float(s.elevation_m), float(s.from_facade_m),
                        None if s.to_facade_m is None else float(s.to_facade_m),
                        s.label or s.id)
            for s in surfaces
        ),
        catching=catching,
    )


def knee_budget(options: Mapping[str, Sequence[Option]]) -> float:
    """Cost of the recommended option (:func:`petfall_audit.fixes.recommend`) of every opening
    together: about where the risk-against-budget curve flattens (catalogue's currency)."""
    from petfall_audit.fixes import recommend

    return float(sum(o.cost for o in recommend(options).values() if o is not None))


def budget_grid(options: Mapping[str, Sequence[Option]], n_points: int = 25) -> NDArray[np.float64]:
    """``n_points`` budgets for the risk-against-budget curve: 0, then geometrically spaced from
    the cheapest option to a little beyond the cost at which every opening has its most effective
    option (more money removes no more risk), so the bend of the curve is resolved on a log axis;
    the catalogue's currency."""
    top = 0.0
    cheapest = math.inf
    for opts in options.values():
        if opts:
            best = min(opts, key=lambda o: (-o.risk_removed, o.cost))
            top += float(best.cost)
            cheapest = min(cheapest, min(float(o.cost) for o in opts))
    if top <= 0:
        return np.zeros(1)
    low = max(cheapest, top * 1e-5, 1.0)
    return np.concatenate([[0.0], np.geomspace(low, 1.1 * top, max(int(n_points) - 1, 2))])
