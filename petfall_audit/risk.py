"""Risk of each opening and the two rankings: by expected injury band, and by risk score.

- **Expected band** (see :func:`petfall_audit.injury.expected_band`): the worst band that at least
  half of the simulated falls from the opening reach or exceed.
- **Band ranking** (``rank``): expected band first ("where would a fall hurt most"), ties broken
  by the yearly likelihood ("of those, where is one most likely"), then by the mean severity
  index, then building order.
- **Risk score** (``risk``, ``risk_rank``): an adaptation of England's HHSRS score,
  ``Σ_b weight_b × (100 × P(band b)) × annual_probability``, with our bands mapped onto the HHSRS
  harm classes (life-threatening → class I, 10 000; serious → II, 1 000; moderate → III, 300;
  minor → IV, 10). See ``docs/risk-model.md``.

The whole building is computed in one pass over ``(n_openings, n_samples)`` arrays.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from typing import Any, Literal

import numpy as np
import numpy.typing as npt

from petfall_audit.injury import (
    BANDS,
    CALIBRATED_DROP_MAX_M,
    DEFAULT_STOPS,
    DEFAULT_THRESHOLDS,
    G0,
    InjuryThresholds,
    StoppingDistances,
    band_probabilities,
    expected_band,
    surface_stop_m,
)
from petfall_audit.likelihood import LikelihoodResult, assess_likelihood
from petfall_audit.model import Building, OpeningKind, SurfaceKind
from petfall_audit.physics import FallResults, peak_speed_of_falls, simulate_falls
from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED, CatSamples, sample_cat_profile

__all__ = [
    "MODEL_VERSION",
    "HHSRS_CLASS_WEIGHTS",
    "Percentiles",
    "OpeningResult",
    "Assessment",
    "risk_score",
    "percentiles",
    "severity_of_falls",
    "assess",
    "MAX_FALLS",
    "max_samples",
]

#: Version of the injury, likelihood and risk model; changes whenever a default changes.
MODEL_VERSION = "risk-model 2.0"

#: HHSRS harm-class weights for our bands, mildest first (classes IV, III, II, I).
HHSRS_CLASS_WEIGHTS: npt.NDArray[np.float64] = np.array([10.0, 300.0, 1000.0, 10000.0])

#: Most simulated falls (openings × samples) in one assessment: about 0.6 GB of memory, 1.2 GB
#: with the sensitivity summary.
MAX_FALLS = 10_000_000


def max_samples(n_openings: int) -> int:
    """The most samples :func:`assess` takes for a building with ``n_openings`` openings."""
    return MAX_FALLS // max(1, n_openings)


_MOSTLY_UNRIGHTED = 0.10  # share of unrighted landings worth a factor line


@dataclass(frozen=True, slots=True)
class Percentiles:
    """5th, 50th and 95th percentile of a quantity over the samples (its unit in the name)."""

    p5: float
    p50: float
    p95: float


@dataclass(frozen=True, slots=True)
class OpeningResult:
    """The assessment of one opening.

    ``rank`` (band order) and ``risk_rank`` (risk order): 1 = worst. ``risk``: HHSRS-style score;
    ``expected_band``: index into :data:`~petfall_audit.injury.BANDS`; ``expected_severity_g``:
    mean severity index (g); ``annual_probability`` (0..1) and ``one_in_n``: likelihood over 12
    months; ``drop_m`` (m) and ``impact_speed_mps`` (m/s) percentiles; ``landing``: landing
    element id → probability; ``bands``: band name → probability; ``factors`` and ``hazards`` in
    plain words.
    """

    id: str
    floor: int
    facade: str
    kind: OpeningKind
    rank: int
    risk_rank: int
    risk: float
    expected_band: int
    expected_severity_g: float
    annual_probability: float
    one_in_n: float
    drop_m: Percentiles
    impact_speed_mps: Percentiles
    landing: dict[str, float]
    bands: dict[str, float]
    factors: tuple[str, ...]
    hazards: tuple[str, ...]

    @property
    def band_name(self) -> str:
        """Name of the expected band."""
        return BANDS[self.expected_band]


@dataclass(frozen=True, slots=True)
class Assessment:
    """A whole building assessed. Arrays are in building order of the openings.

    ``band_probabilities`` ``(n_openings, 4)``; ``risk`` ``(n_openings,)``; ``severity_g``
    ``(n_openings, n_samples)`` severity index per fall (g); ``sensitivity``: a
    :class:`petfall_audit.sensitivity.SensitivityResult` (added by
    :func:`petfall_audit.sensitivity.with_sensitivity`) or ``None``. ``thresholds``, ``stops``
    and ``cat`` are what the assessment used.
    """

    building: Building
    samples: int
    seed: int
    model_version: str
    falls: FallResults
    band_probabilities: npt.NDArray[np.float64]
    likelihood: LikelihoodResult
    risk: npt.NDArray[np.float64]
    openings: tuple[OpeningResult, ...]
    sensitivity: Any | None = None
    severity_g: npt.NDArray[np.float64] = field(default_factory=lambda: np.zeros((0, 0)))
    thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
    cat: CatSamples | None = None
    stops: StoppingDistances = DEFAULT_STOPS

    def ranked(self, by: Literal["band", "risk"] = "band") -> list[OpeningResult]:
        """Openings worst first: ``"band"`` by expected band then likelihood; ``"risk"`` by
        risk score."""
        if by == "band":
            return sorted(self.openings, key=lambda o: o.rank)
        if by == "risk":
            return sorted(self.openings, key=lambda o: o.risk_rank)
        raise ValueError(f"by must be 'band' or 'risk', got {by!r}")

    def result(self, opening_id: str) -> OpeningResult:
        """The result of one opening; ``KeyError`` if there is none."""
        for o in self.openings:
            if o.id == opening_id:
                return o
        raise KeyError(opening_id)


def risk_score(
    annual_probability: npt.ArrayLike, band_probabilities_: npt.ArrayLike
) -> npt.NDArray[np.float64]:
    """HHSRS-style risk score per opening: ``Σ_b w_b × 100 P_b × annual_probability``.

    ``annual_probability`` ``(n,)`` (0..1 over 12 months), ``band_probabilities_`` ``(n, 4)``.
    Scores of 1000 and more correspond to HHSRS Category 1 for people; for cats the score only
    orders openings."""
    p = np.asarray(annual_probability, dtype=float)
    b = np.asarray(band_probabilities_, dtype=float)
    out: npt.NDArray[np.float64] = (100.0 * (b @ HHSRS_CLASS_WEIGHTS)) * p
    return out


def percentiles(values: npt.ArrayLike) -> npt.NDArray[np.float64]:
    """5th, 50th and 95th percentiles along the last axis, shape ``(..., 3)``."""
    a = np.asarray(values, dtype=float)
    out: npt.NDArray[np.float64] = np.moveaxis(np.percentile(a, [5.0, 50.0, 95.0], axis=-1), 0, -1)
    return out


def severity_of_falls(
    falls: FallResults, cat: CatSamples, stops: StoppingDistances = DEFAULT_STOPS
) -> npt.NDArray[np.float64]:
    """Injury dose (g) of every simulated fall, shape ``(n_openings, n_samples)``: the mean
    deceleration of the stop from the highest speed the fall reached (see
    :func:`petfall_audit.injury.dose_g`)."""
    # the same formula as injury.dose_g, written in place: one pass per step over the
    # (n_openings, n_samples) arrays, few temporaries (tests check the two agree)
    peak = peak_speed_of_falls(falls, cat)
    surf = surface_stop_m(falls.landing_kinds, stops)
    righting_s = np.maximum(cat.righting_time_s, 1e-12)  # a zero righting time: always righted
    s = np.divide(falls.fall_time_s, righting_s)  # share of the righting turn done
    np.clip(s, 0.0, 1.0, out=s)
    s *= stops.righted_m - stops.unrighted_m
    s += stops.unrighted_m
    if surf.size and np.any(surf):
        s += np.take(surf, falls.landing)
    sev = np.multiply(peak, peak, out=peak)
    sev /= s
    sev *= 1.0 / (2.0 * G0)
    return sev


def _fall_percentiles(
    drop_m: npt.NDArray[np.float64], impact_speed_mps: npt.NDArray[np.float64]
) -> tuple[npt.NDArray[np.float64], npt.NDArray[np.float64]]:
    """Percentiles (``(n_openings, 3)``) of the drop (m) and the impact speed (m/s).

    Sorting is the costly part, so it is done only where needed: a row whose drop is the same
    for every sample has that drop as its percentiles, and its impact speeds depend on that drop
    and the cats alone, so rows with the same constant drop share their speed percentiles."""
    n = drop_m.shape[0]
    lo = drop_m.min(axis=1)
    const = lo == drop_m.max(axis=1)
    var = np.flatnonzero(~const)
    drop_pct = np.repeat(lo[:, None], 3, axis=1)
    speed_pct = np.empty((n, 3))
    if var.size:
        drop_pct[var] = percentiles(drop_m[var])
        speed_pct[var] = percentiles(impact_speed_mps[var])
    rows = np.flatnonzero(const)
    if rows.size:
        _, first, inverse = np.unique(lo[rows], return_index=True, return_inverse=True)
        speed_pct[rows] = percentiles(impact_speed_mps[rows[first]])[inverse.ravel()]
    return drop_pct, speed_pct


def _landing_shares(falls: FallResults) -> npt.NDArray[np.float64]:
    """Share of falls landing on each element, ``(n_openings, n_landing)``."""
    landing = np.asarray(falls.landing, dtype=np.int64)
    n_open, n_samp = landing.shape
    n_land = max(len(falls.landing_ids), 1)
    flat = landing + (np.arange(n_open, dtype=np.int64) * n_land)[:, None]
    counts = np.bincount(flat.ravel(), minlength=n_open * n_land).reshape(n_open, n_land)
    out: npt.NDArray[np.float64] = counts / float(max(n_samp, 1))
    return out


def _rank(keys: list[npt.NDArray[Any]]) -> npt.NDArray[np.int64]:
    """1-based ranks from sort keys, most significant first, all "smaller is worse"."""
    order = np.lexsort(tuple(reversed(keys)))
    ranks = np.empty(order.size, dtype=np.int64)
    ranks[order] = np.arange(1, order.size + 1)
    return ranks


def _surface_word(kind: SurfaceKind | str) -> str:
    return {
        SurfaceKind.CONCRETE: "concrete or paving",
        SurfaceKind.ASPHALT: "asphalt",
        SurfaceKind.GRAVEL: "gravel",
        SurfaceKind.LAWN: "lawn or soil",
        SurfaceKind.PLANTING: "a planting bed",
        SurfaceKind.WATER: "water",
        SurfaceKind.ROOF: "a roof",
        SurfaceKind.DECK: "a timber deck",
    }[SurfaceKind(kind)]


def assess(
    building: Building,
    *,
    samples: int = DEFAULT_SAMPLES,
    seed: int = DEFAULT_SEED,
    progress: Callable[[int, int], None] | None = None,
    thresholds: InjuryThresholds | None = None,
    stops: StoppingDistances = DEFAULT_STOPS,
) -> Assessment:
    """Assess every opening of ``building`` with ``samples`` cats drawn with ``seed``.

    The same samples serve every opening (common random numbers). ``progress(done, total)`` is
    called as the simulation advances. For the sensitivity of the top risks to the cat profile,
    pass the result to :func:`petfall_audit.sensitivity.with_sensitivity`.
    Same inputs, same result. ``samples`` may be at most :func:`max_samples` (memory).
    ``thresholds``: the injury dose–response (default: the building's own, ``building.injury``).
    """
    if samples < 1:
        raise ValueError(f"samples must be at least 1, got {samples}")
    if samples > max_samples(len(building.openings)):
        raise ValueError(
            f"samples must be at most {max_samples(len(building.openings))} for "
            f"{len(building.openings)} openings (at most {MAX_FALLS:,} simulated falls), "
            f"got {samples}"
        )
    cat = sample_cat_profile(building.cat_profile, samples, seed=seed)
    falls = simulate_falls(building, cat, progress=progress)
    return _assess_from_falls(
        building, cat, falls, samples=samples, seed=seed,
        thresholds=building.injury if thresholds is None else thresholds, stops=stops,
    )


def _assess_from_falls(
    building: Building,
    cat: CatSamples,
    falls: FallResults,
    *,
    samples: int,
    seed: int,
    thresholds: InjuryThresholds,
    stops: StoppingDistances,
) -> Assessment:
    n_open = len(building.openings)
    sev = severity_of_falls(falls, cat, stops) if n_open else np.zeros((0, samples))
    probs = band_probabilities(sev, thresholds) if n_open else np.zeros((0, 4))
    exp_band = expected_band(probs)
    mean_sev = sev.mean(axis=1) if n_open else np.zeros(0)
    lik = assess_likelihood(building.openings, profile=building.cat_profile)
    risk = risk_score(lik.annual_probability, probs)

    band_rank = _rank([-exp_band.astype(float), -lik.annual_probability, -mean_sev,
                       np.arange(n_open, dtype=float)])
    risk_rank = _rank([-risk, -exp_band.astype(float), -mean_sev, np.arange(n_open, dtype=float)])

    drop_pct, speed_pct = (
        _fall_percentiles(falls.drop_m, falls.impact_speed_mps)
        if n_open
        else (np.zeros((0, 3)), np.zeros((0, 3)))
    )
    shares = _landing_shares(falls) if n_open else np.zeros((0, 0))
    is_water = np.array([SurfaceKind(k) is SurfaceKind.WATER for k in falls.landing_kinds], bool)
    water_share = shares[:, is_water].sum(axis=1) if n_open else np.zeros(0)
    unrighted_share = (
        1.0 - np.count_nonzero(falls.righted, axis=1) / float(samples) if n_open else np.zeros(0)
    )
    life_share = probs[:, 3] if n_open else np.zeros(0)

    rows, cols = np.nonzero(shares)
    row_start = np.searchsorted(rows, np.arange(n_open + 1))
    results: list[OpeningResult] = []
    for i, o in enumerate(building.openings):
        order = sorted(
            cols[row_start[i] : row_start[i + 1]].tolist(),
            key=lambda j: (-shares[i, j], falls.landing_ids[j]),
        )
        landing = {str(falls.landing_ids[j]): float(shares[i, j]) for j in order}
        factors = list(lik.factors[i])
        hazards = list(lik.hazards[i])
        if order:
            j0 = order[0]
            kind0 = falls.landing_kinds[j0]
            factors.append(
                f"Median drop {drop_pct[i, 1]:.1f} m; {shares[i, j0]:.0%} of falls land on "
                f"{_surface_word(kind0)} ({falls.landing_ids[j0]})"
            )
            water = float(water_share[i])
            if water > 0:
                hazards.append(
                    f"Water below ({water:.0%} of falls): a cat that survives the fall may drown"
                )
        factors.append(f"Median impact speed {speed_pct[i, 1]:.1f} m/s")
        if drop_pct[i, 1] > CALIBRATED_DROP_MAX_M:
            factors.append(
                f"Higher than the falls of the published case series (up to about "
                f"{CALIBRATED_DROP_MAX_M:.0f} m): the injury shares here are extrapolated and "
                "may understate how badly cats are hurt"
            )
        factors.append(
            f"At least half of the falls from here are {BANDS[int(exp_band[i])]}"
            + (" or worse" if exp_band[i] < len(BANDS) - 1 else "")
        )
        if exp_band[i] < 3 and life_share[i] >= 0.05:
            factors.append(f"{life_share[i]:.0%} of falls are life-threatening")
        if unrighted_share[i] >= _MOSTLY_UNRIGHTED:
            factors.append(
                f"Short drop: {unrighted_share[i]:.0%} of cats land before they have fully "
                "turned feet-down"
            )
        results.append(
            OpeningResult(
                id=o.id,
                floor=o.floor,
                facade=o.facade,
                kind=o.kind,
                rank=int(band_rank[i]),
                risk_rank=int(risk_rank[i]),
                risk=float(risk[i]),
                expected_band=int(exp_band[i]),
                expected_severity_g=float(mean_sev[i]),
                annual_probability=float(lik.annual_probability[i]),
                one_in_n=float(lik.one_in_n[i]),
                drop_m=Percentiles(*(float(x) for x in drop_pct[i])),
                impact_speed_mps=Percentiles(*(float(x) for x in speed_pct[i])),
                landing=landing,
                bands={name: float(probs[i, b]) for b, name in enumerate(BANDS)},
                factors=tuple(factors),
                hazards=tuple(hazards),
            )
        )

    assessment = Assessment(
        building=building,
        samples=samples,
        seed=seed,
        model_version=MODEL_VERSION,
        falls=falls,
        band_probabilities=probs,
        likelihood=lik,
        risk=risk,
        openings=tuple(results),
        severity_g=sev,
        thresholds=thresholds,
        cat=cat,
        stops=stops,
    )
    return assessment
