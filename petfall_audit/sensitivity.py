"""Which cat-profile parameters move the building's top risks most: a one-at-a-time analysis.

Each parameter in turn is held at a low and a high value while every other parameter keeps its
sampled values (common random numbers: the sampler draws each parameter from its own stream of
the same seed). Low and high are the 10th and 90th percentiles of that parameter's samples;
the chance of relaxing, a single probability, swings by ±0.2 (clipped to 0..1). The measure is
the summed risk score of the building's :data:`TOP_OPENINGS` highest-risk openings, and the
swing is ``(risk_high − risk_low) / risk_base``. The likelihood is kept as assessed (although
body mass also decides which gaps a cat passes), so the swings show how the severity side of
the risk moves.

Only what is reported is simulated: the top openings and the balconies, terraces and galleries
below them that could catch their falls (with every surface), which gives those openings exactly
the falls they get in the whole building. A swing that leaves every fall unchanged (the righting
time only changes how a cat lands, and a fixed parameter swings nothing) reuses the assessment's
own falls, and a result is kept for the same reported part of the building, cat samples, seed,
thresholds and stopping distances, so an edit elsewhere in the building does not recompute it.
"""

from __future__ import annotations

import threading
from collections import OrderedDict
from dataclasses import dataclass, replace

import numpy as np
import numpy.typing as npt

from petfall_audit._percentiles import percentiles_last
from petfall_audit.injury import InjuryThresholds, StoppingDistances, band_probabilities
from petfall_audit.model import BALCONY_LIKE, Building, CatProfile, Fixed
from petfall_audit.physics import FallResults, simulate_falls
from petfall_audit.risk import Assessment, risk_score, severity_of_falls
from petfall_audit.sampling import CatSamples, sample_cat_profile

__all__ = ["TOP_OPENINGS", "PARAMETERS", "ParameterSwing", "SensitivityResult",
           "sensitivity_analysis", "with_sensitivity"]

#: How many of the highest-risk openings the measure sums.
TOP_OPENINGS = 5
#: Profile parameters swung, with their unit.
PARAMETERS: tuple[tuple[str, str], ...] = (
    ("mass_kg", "kg"),
    ("cda_tense_m2", "m²"),
    ("cda_spread_m2", "m²"),
    ("relax_probability", ""),
    ("relax_fraction", ""),
    ("righting_time_s", "s"),
    ("launch_speed_mps", "m/s"),
)
_RELAX_SWING = 0.2
#: Sample fields the falls depend on (the righting time only decides how the cat lands).
_FALL_FIELDS = ("mass_kg", "cda_tense_m2", "cda_spread_m2", "relax_fraction",
                "launch_speed_mps", "position_fraction")
#: Results kept for reuse (a few hundred bytes each).
_CACHE_SIZE = 32


@dataclass(frozen=True, slots=True)
class ParameterSwing:
    """One parameter held at ``low_value`` and ``high_value`` (in ``unit``): the summed top risk
    score at each, and ``swing`` = (high − low) / base (signed, dimensionless)."""

    parameter: str
    unit: str
    low_value: float
    high_value: float
    risk_low: float
    risk_high: float
    swing: float


@dataclass(frozen=True, slots=True)
class SensitivityResult:
    """``opening_ids``: the top-risk openings measured; ``base_risk``: their summed risk score;
    ``swings``: largest absolute swing first."""

    opening_ids: tuple[str, ...]
    base_risk: float
    swings: tuple[ParameterSwing, ...]


def _low_high(name: str, profile: CatProfile, cat: CatSamples) -> tuple[float, float]:
    if name == "relax_probability":
        p = profile.relax_probability
        return max(0.0, round(p - _RELAX_SWING, 12)), min(1.0, round(p + _RELAX_SWING, 12))
    values = np.asarray(getattr(cat, name), dtype=float)
    if name == "cda_spread_m2" and np.any(cat.relaxes):
        values = values[cat.relaxes]
    lo, hi = percentiles_last(values, (10.0, 90.0))
    return float(lo), float(hi)


def _with(profile: CatProfile, name: str, value: float) -> CatProfile:
    if name == "relax_probability":
        return replace(profile, relax_probability=value)
    return replace(profile, **{name: Fixed(value)})  # type: ignore[arg-type]


def _catchers_of(building: Building, reported: npt.NDArray[np.intp]) -> npt.NDArray[np.intp]:
    """Indices (building order) of the ``reported`` openings and of every balcony-like opening
    that could catch a fall from one of them: on the same facade, below its perch and
    overlapping its width and projecting beyond the point the cat leaves from, unless a strictly
    higher one of them spans the whole width and projects at least as far (whatever passes that
    one passes this one too: outward travel only grows with the drop). A superset of the
    simulation's own candidates, so simulating only these openings gives the reported ones
    exactly the falls they get in the whole building."""
    openings = building.openings
    elevation = {f.level: f.elevation_m for f in building.floors}
    floor_m = np.array([elevation[o.floor] for o in openings], dtype=float)
    left_m = np.array([o.x_m for o in openings], dtype=float)
    right_m = left_m + np.array([o.width_m for o in openings], dtype=float)
    start_m = floor_m + np.array([o.perch_height_m for o in openings], dtype=float)
    reach_m = np.array([o.projection_m if o.kind in BALCONY_LIKE else 0.0 for o in openings])
    facade = np.array([o.facade for o in openings], dtype=object)
    catches = np.array([o.kind in BALCONY_LIKE for o in openings], dtype=bool)
    keep = np.zeros(len(openings), dtype=bool)
    for i in np.asarray(reported, dtype=np.intp).tolist():
        keep[i] = True
        below = np.flatnonzero(
            catches & (facade == facade[i]) & (floor_m < start_m[i])
            & (left_m <= right_m[i]) & (right_m >= left_m[i])
        )
        below = below[np.argsort(-floor_m[below], kind="stable")]
        covered_m, level_m, level_cover_m = -np.inf, np.inf, -np.inf
        for j in below.tolist():  # a few per reported opening, highest first
            if floor_m[j] < level_m:  # a new, lower level: what is above covers it
                covered_m, level_m = max(covered_m, level_cover_m), floor_m[j]
            if reach_m[j] <= max(covered_m, reach_m[i]):  # passed, or out of reach
                continue
            keep[j] = True
            spans = left_m[j] <= left_m[i] and right_m[j] >= right_m[i]
            if spans:
                level_cover_m = max(level_cover_m, reach_m[j])
    return np.flatnonzero(keep).astype(np.intp)


def _rows(falls: FallResults, rows: npt.NDArray[np.intp]) -> FallResults:
    """``falls`` of the openings at ``rows`` only."""
    return replace(
        falls,
        opening_ids=tuple(falls.opening_ids[i] for i in rows),
        drop_m=falls.drop_m[rows],
        landing=falls.landing[rows],
        impact_speed_mps=falls.impact_speed_mps[rows],
        fall_time_s=falls.fall_time_s[rows],
        righted=falls.righted[rows],
    )


def _same_falls(a: CatSamples, b: CatSamples) -> bool:
    return all(np.array_equal(getattr(a, f), getattr(b, f)) for f in _FALL_FIELDS)


_cache: OrderedDict[str, tuple[ParameterSwing, ...]] = OrderedDict()
_cache_lock = threading.Lock()


def _cache_key(
    part: Building, rows: npt.NDArray[np.intp], n: int, seed: int,
    thresholds: InjuryThresholds, stops: StoppingDistances, lik: npt.NDArray[np.float64],
) -> str:
    """Everything the swings of the reported openings depend on, as one exact string (the
    building may hold unhashable parts; ``repr`` of frozen dataclasses and of floats is
    exact)."""
    return repr((part, rows.tolist(), n, seed, thresholds, stops, lik.tolist()))


def _swings(
    base: Assessment, cat: CatSamples, order: npt.NDArray[np.intp], lik: npt.NDArray[np.float64]
) -> tuple[ParameterSwing, ...]:
    """Unsorted swings of every parameter on the openings at ``order`` (their swing field
    still 0)."""
    building, thresholds, stops = base.building, base.thresholds, base.stops
    keep = _catchers_of(building, order)
    part = replace(building, openings=tuple(building.openings[i] for i in keep))
    rows = np.searchsorted(keep, order).astype(np.intp)  # the reported openings in ``part``
    key = _cache_key(part, rows, cat.n, base.seed, thresholds, stops, lik)
    with _cache_lock:
        if key in _cache:
            _cache.move_to_end(key)
            return _cache[key]
    kept = base.falls
    whole = kept is not None and kept.drop_m.shape == (len(building.openings), cat.n)
    own_falls = _rows(kept, order) if kept is not None and whole else None
    profile = building.cat_profile
    simulated: dict[tuple[str, float], float] = {}
    swings: list[ParameterSwing] = []
    for name, unit in PARAMETERS:
        lo, hi = _low_high(name, profile, cat)
        risks = []
        for value in (lo, hi):
            if (name, value) not in simulated:
                samples = sample_cat_profile(_with(profile, name, value), cat.n, seed=base.seed)
                if own_falls is not None and _same_falls(samples, cat):
                    falls = own_falls
                else:
                    falls = _rows(simulate_falls(part, samples), rows)
                sev = severity_of_falls(falls, samples, stops)
                simulated[(name, value)] = float(
                    risk_score(lik, band_probabilities(sev, thresholds)).sum()
                )
            risks.append(simulated[(name, value)])
        swings.append(ParameterSwing(name, unit, lo, hi, risks[0], risks[1], 0.0))
    result = tuple(swings)
    with _cache_lock:
        _cache[key] = result
        while len(_cache) > _CACHE_SIZE:
            _cache.popitem(last=False)
    return result


def sensitivity_analysis(base: Assessment, *, top: int = TOP_OPENINGS) -> SensitivityResult:
    """One-at-a-time swings of each cat-profile parameter on the top-risk openings of ``base``,
    with the samples, seed, thresholds and stopping distances ``base`` used.

    Costs two simulations per parameter of the top openings and what lies below them (fewer
    when a swing leaves the falls unchanged; none when the same part of the building was
    analysed before with the same inputs)."""
    building = base.building
    cat = base.cat if base.cat is not None else sample_cat_profile(
        building.cat_profile, base.samples, seed=base.seed
    )
    order = np.argsort(-base.risk, kind="stable")[: max(1, top)].astype(np.intp)
    ids = tuple(base.building.openings[i].id for i in order)
    lik = base.likelihood.annual_probability[order]
    base_risk = float(base.risk[order].sum())
    swings = [
        replace(s, swing=(s.risk_high - s.risk_low) / base_risk if base_risk > 0 else 0.0)
        for s in _swings(base, cat, order, lik)
    ]
    swings.sort(key=lambda s: (-abs(s.swing), s.parameter))
    return SensitivityResult(opening_ids=ids, base_risk=base_risk, swings=tuple(swings))


def with_sensitivity(base: Assessment, *, top: int = TOP_OPENINGS) -> Assessment:
    """``base`` with its :attr:`~petfall_audit.risk.Assessment.sensitivity` filled in (left
    ``None`` for a building without openings)."""
    if not base.openings:
        return base
    return replace(base, sensitivity=sensitivity_analysis(base, top=top))
