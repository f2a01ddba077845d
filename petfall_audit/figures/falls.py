"""The representative cat and its falls: time series of one fall, the two posture paths and
the impact-speed curve. Lengths in m, speeds in m/s, accelerations in m/s², times in s."""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import TYPE_CHECKING, TypedDict

import numpy as np
from numpy.typing import NDArray

from petfall_audit.model import CatProfile, Distribution, Fixed, LogNormal, Normal, Uniform
from petfall_audit.present import fmt_length, fmt_number, fmt_percent

if TYPE_CHECKING:
    from petfall_audit.risk import Assessment

__all__ = [
    "RepresentativeCat",
    "FallTrace",
    "FallProfileFigure",
    "PosturePath",
    "ImpactCurve",
    "representative_cat",
    "fall_profile_figure",
    "posture_paths",
    "impact_speed_curve",
]

_MIN_DROP_M = 1e-3  # a zero drop still gets a (trivial) profile


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
class FallTrace:
    """Time series of one fall from rest at the perch to the landing: ``height_m`` above the
    landing point, the moment the cat starts to spread out (``switch_time_s``; ``None`` if it does
    not before landing), the impact speed and the fall time."""

    t_s: NDArray[np.float64]
    height_m: NDArray[np.float64]
    speed_mps: NDArray[np.float64]
    accel_mps2: NDArray[np.float64]
    switch_time_s: float | None
    impact_speed_mps: float
    fall_time_s: float


@dataclass(frozen=True, slots=True)
class FallProfileFigure(FallTrace):
    """The fall the PDF draws for one opening: the representative ``cat`` falling the opening's
    median ``drop_m`` in air of density ``rho_kg_m3``, with a plain-words ``caption``."""

    opening_id: str
    drop_m: float
    cat: RepresentativeCat
    rho_kg_m3: float
    caption: str


@dataclass(frozen=True, slots=True)
class PosturePath(FallTrace):
    """One way the representative cat can fall: ``name`` in plain words and the ``share`` of the
    cats that take it (0..1)."""

    name: str
    share: float


class _TraceFields(TypedDict):
    """Keyword arguments of :class:`FallTrace`."""

    t_s: NDArray[np.float64]
    height_m: NDArray[np.float64]
    speed_mps: NDArray[np.float64]
    accel_mps2: NDArray[np.float64]
    switch_time_s: float | None
    impact_speed_mps: float
    fall_time_s: float


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


def _trace(drop_m: float, cat: RepresentativeCat, cda_spread_m2: float, rho_kg_m3: float,
           n_points: int = 400) -> _TraceFields:
    """Fields of a :class:`FallTrace`: ``cat`` falling ``drop_m`` (m) and spreading out to
    ``cda_spread_m2`` (m²; no switch when it is not larger than the tense C_d·A)."""
    from petfall_audit.physics import fall_profile

    prof = fall_profile(max(drop_m, _MIN_DROP_M), mass_kg=cat.mass_kg,
                        cda_tense_m2=cat.cda_tense_m2, cda_spread_m2=cda_spread_m2,
                        relax_fraction=cat.relax_fraction, rho_kg_m3=rho_kg_m3,
                        n_points=n_points)
    switch = prof.switch_time_s if cda_spread_m2 > cat.cda_tense_m2 else None
    if switch is not None and not math.isfinite(switch):
        switch = None
    return {
        "t_s": np.asarray(prof.t_s, dtype=float),
        "height_m": np.asarray(prof.height_m, dtype=float),
        "speed_mps": np.asarray(prof.speed_mps, dtype=float),
        "accel_mps2": np.asarray(prof.accel_mps2, dtype=float),
        "switch_time_s": None if switch is None else float(switch),
        "impact_speed_mps": float(prof.impact_speed_mps),
        "fall_time_s": float(prof.fall_time_s),
    }


def fall_profile_figure(assessment: Assessment, opening_id: str) -> FallProfileFigure:
    """Fall profile of ``opening_id`` (``KeyError`` if unknown): the representative cat over the
    opening's median drop, spreading out only if the median cat relaxes."""
    result = assessment.result(opening_id)
    cat = representative_cat(assessment.building.cat_profile)
    drop = float(result.drop_m.p50)
    rho = float(assessment.rho_kg_m3)
    trace = _trace(drop, cat, cat.cda_spread_m2 if cat.relaxes else cat.cda_tense_m2, rho)
    posture = (
        f"spreads out at {fmt_percent(cat.relax_fraction)} of its tense terminal speed"
        if cat.relaxes
        else "stays tense (fewer than half the cats in the profile relax)"
    )
    caption = (
        f"Fall profile for opening {opening_id}: a representative cat (the profile's median "
        f"values: {fmt_number(cat.mass_kg, 1, 'kg')}, air drag (C_d·A) when tense "
        f"{fmt_number(cat.cda_tense_m2, 3, 'm²')}) falling the opening's median drop of "
        f"{fmt_length(drop)}; it {posture}. Air density {fmt_number(rho, 3, 'kg/m³')}. One "
        "typical fall, so its landing speed differs a little from the median impact speed of "
        "all simulated cats given above with their range (p5–p95)."
    )
    return FallProfileFigure(opening_id=opening_id, drop_m=drop, cat=cat, rho_kg_m3=rho,
                             caption=caption, **trace)


def posture_paths(assessment: Assessment, opening_id: str, *,
                  n_points: int = 300) -> tuple[PosturePath, ...]:
    """The representative cat falling the opening's median drop: tense all the way, and (if any
    cat in the profile relaxes) spreading out at the profile's median relax fraction."""
    result = assessment.result(opening_id)
    profile = assessment.building.cat_profile
    cat = representative_cat(profile)
    drop = float(result.drop_m.p50)
    rho = float(assessment.rho_kg_m3)
    p_relax = float(profile.relax_probability)
    if p_relax > 0.0 and cat.cda_spread_m2 > cat.cda_tense_m2:
        spec = [("stays tense", 1.0 - p_relax, cat.cda_tense_m2),
                ("spreads out", p_relax, cat.cda_spread_m2)]
    else:
        spec = [("stays tense", 1.0, cat.cda_tense_m2)]
    return tuple(PosturePath(name=name, share=share, **_trace(drop, cat, cda, rho, n_points))
                 for name, share, cda in spec)


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
    rho = float(assessment.rho_kg_m3)
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
