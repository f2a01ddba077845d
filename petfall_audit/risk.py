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
- **Default order** (:data:`DEFAULT_ORDER`, ``Assessment.ranked()``): the risk ranking, highest
  score first; equal scores by the worse expected band, then the higher mean severity, then the
  opening id (alphabetical), so that the order is total and the same on every run. The app's
  ranked view, the PDF's ranked table, the command line's table and the JSON and CSV exports
  all list the openings in this order.

The whole building is computed in one pass over ``(n_openings, n_samples)`` arrays.
"""

from __future__ import annotations

import threading
from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import Any, Literal

import numpy as np
import numpy.typing as npt

from petfall_audit import sample_counts as _counts
from petfall_audit._interception import simulate_chunks
from petfall_audit._percentiles import percentiles_last
from petfall_audit._physics_results import FALL_ARRAYS
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
from petfall_audit.physics import FallResults, air_density, peak_speed_of_falls, simulate_falls
from petfall_audit.reasons import Reason
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
    "KEEP_FALLS_MAX",
    "MAX_SAMPLES",
    "DEFAULT_ORDER",
]

#: The order every listing of openings uses unless the user picks another: by risk score, see
#: the module's docstring and docs/risk-model.md ("Default order").
DEFAULT_ORDER: Literal["risk"] = "risk"

#: Version of the injury, likelihood and risk model; changes whenever a default changes.
MODEL_VERSION = "risk-model 2.0"

#: HHSRS harm-class weights for our bands, mildest first (classes IV, III, II, I).
HHSRS_CLASS_WEIGHTS: npt.NDArray[np.float64] = np.array([10.0, 300.0, 1000.0, 10000.0])

#: Most simulated falls an assessment keeps whole by default (about 170 MB with the doses);
#: beyond it only the per-opening summaries are kept and memory stays bounded.
KEEP_FALLS_MAX = 5_000_000
#: Most sampled cats one assessment takes (see :mod:`petfall_audit.sample_counts`).
MAX_SAMPLES = _counts.MAX_SAMPLES


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
    element id → probability; ``bands``: band name → probability; ``factors`` and ``hazards`` as
    :class:`~petfall_audit.reasons.Reason` codes and values (in words:
    :func:`petfall_audit.present.explain.explain`).
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
    factors: tuple[Reason, ...]
    hazards: tuple[Reason, ...]

    @property
    def band_name(self) -> str:
        """Name of the expected band."""
        return BANDS[self.expected_band]


@dataclass(frozen=True, slots=True)
class Assessment:
    """A whole building assessed. Arrays are in building order of the openings.

    ``band_probabilities`` ``(n_openings, 4)``; ``risk`` ``(n_openings,)``; ``falls`` and
    ``severity_g`` ``(n_openings, n_samples)`` (the dose of each fall, g) when the assessment
    kept every fall (``None`` for a large building, see :func:`assess`); ``rho_kg_m3`` the air
    density used (kg/m³); ``sensitivity``: a
    :class:`petfall_audit.sensitivity.SensitivityResult` (added by
    :func:`petfall_audit.sensitivity.with_sensitivity`) or ``None``. ``thresholds``, ``stops``
    and ``cat`` are what the assessment used.
    """

    building: Building
    samples: int
    seed: int
    model_version: str
    falls: FallResults | None
    band_probabilities: npt.NDArray[np.float64]
    likelihood: LikelihoodResult
    risk: npt.NDArray[np.float64]
    openings: tuple[OpeningResult, ...]
    sensitivity: Any | None = None
    severity_g: npt.NDArray[np.float64] | None = None
    thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
    cat: CatSamples | None = None
    stops: StoppingDistances = DEFAULT_STOPS
    rho_kg_m3: float = 1.225

    def ranked(self, by: Literal["band", "risk"] = DEFAULT_ORDER) -> list[OpeningResult]:
        """Openings worst first: ``"risk"`` (the default order, :data:`DEFAULT_ORDER`) by risk
        score; ``"band"`` by expected band then likelihood."""
        if by == "band":
            return sorted(self.openings, key=lambda o: o.rank)
        if by == "risk":
            return sorted(self.openings, key=lambda o: o.risk_rank)
        raise ValueError(f"by must be 'band' or 'risk', got {by!r}")

    def band_counts(self) -> tuple[int, ...]:
        """How many openings have each expected band, in the order of
        :data:`~petfall_audit.injury.BANDS`."""
        counts = np.bincount(np.array([o.expected_band for o in self.openings], dtype=np.intp),
                             minlength=len(BANDS))
        return tuple(int(c) for c in counts[: len(BANDS)])

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


#: The percentiles of drops and impact speeds that results report.
_REPORTED_PERCENTILES = (5.0, 50.0, 95.0)


def percentiles(values: npt.ArrayLike) -> npt.NDArray[np.float64]:
    """5th, 50th and 95th percentiles along the last axis, shape ``(..., 3)`` (as
    ``numpy.percentile``, linear method)."""
    return percentiles_last(values, _REPORTED_PERCENTILES)


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


def assess(
    building: Building,
    *,
    samples: int = DEFAULT_SAMPLES,
    seed: int = DEFAULT_SEED,
    progress: Callable[[int, int], None] | None = None,
    thresholds: InjuryThresholds | None = None,
    stops: StoppingDistances = DEFAULT_STOPS,
    keep_falls: bool | None = None,
) -> Assessment:
    """Assess every opening of ``building`` with ``samples`` cats drawn with ``seed``.

    The same samples serve every opening (common random numbers). ``progress(done, total)`` is
    called as the simulation advances. For the sensitivity of the top risks to the cat profile,
    pass the result to :func:`petfall_audit.sensitivity.with_sensitivity`.
    Same inputs, same result. ``thresholds``: the injury dose–response (default: the building's
    own, ``building.injury``). The falls are simulated and summarised a block of openings at a
    time, so memory stays bounded for a building of any size; ``keep_falls`` keeps every fall
    in the result as well (``falls``, ``severity_g``), by default when there are at most
    :data:`KEEP_FALLS_MAX` of them.
    """
    if samples < 1:
        raise ValueError(f"samples must be at least 1, got {samples}")
    if samples > MAX_SAMPLES:
        raise ValueError(f"samples must be at most {MAX_SAMPLES:,}, got {samples}")
    n_open = len(building.openings)
    keep = n_open * samples <= KEEP_FALLS_MAX if keep_falls is None else bool(keep_falls)
    cat = sample_cat_profile(building.cat_profile, samples, seed=seed)
    rho = float(air_density(building.info.site_altitude_m, building.info.air_temperature_c))
    t = building.injury if thresholds is None else thresholds
    summary = _Summary(n_open, samples)
    kept = _KeptFalls(n_open, samples) if keep else None

    def summarise(a: int, b: int, part: FallResults) -> None:  # on the block's own thread
        sev = severity_of_falls(part, cat, stops)
        summary.add(a, b, part, sev, t)
        if kept is not None:
            kept.put(a, b, part, sev)

    for _ in simulate_chunks(building, cat, rho_kg_m3=rho, progress=progress, then=summarise):
        pass
    falls, sev_all = kept.joined(building, rho) if kept is not None else (None, None)
    return _assessment(building, cat, summary, samples=samples, seed=seed, thresholds=t,
                       stops=stops, rho_kg_m3=rho, falls=falls, severity_g=sev_all)


class _KeptFalls:
    """Every fall of a building, written a block of openings at a time into arrays of the
    whole building's shape (on the blocks' own threads: no copy of them all at the end)."""

    def __init__(self, n_open: int, samples: int) -> None:
        self._shape = (n_open, samples)
        self._lock = threading.Lock()
        self._arrays: dict[str, npt.NDArray[Any]] = {}
        self._landing: tuple[tuple[str, ...], tuple[SurfaceKind, ...]] | None = None

    def _array(self, name: str, dtype: np.dtype[Any]) -> npt.NDArray[Any]:
        with self._lock:
            out = self._arrays.get(name)
            if out is None:
                out = self._arrays[name] = np.empty(self._shape, dtype=dtype)
            return out

    def put(self, a: int, b: int, part: FallResults, sev: npt.NDArray[np.float64]) -> None:
        """The falls and doses of openings ``a`` to ``b - 1``."""
        for name in FALL_ARRAYS:
            values = getattr(part, name)
            self._array(name, values.dtype)[a:b] = values
        self._array("severity_g", sev.dtype)[a:b] = sev
        with self._lock:
            if self._landing is None:
                self._landing = (part.landing_ids, part.landing_kinds)

    def joined(self, building: Building, rho: float
               ) -> tuple[FallResults, npt.NDArray[np.float64]]:
        """Every fall as one :class:`FallResults`, and the doses (g)."""
        if self._landing is None:  # no opening: no block
            empty = simulate_falls(building, sample_cat_profile(building.cat_profile,
                                                                self._shape[1]))
            return empty, np.zeros((0, self._shape[1]))
        a = self._arrays
        falls = FallResults(
            opening_ids=tuple(o.id for o in building.openings),
            landing_ids=self._landing[0],
            landing_kinds=self._landing[1],
            drop_m=a["drop_m"],
            landing=a["landing"],
            impact_speed_mps=a["impact_speed_mps"],
            fall_time_s=a["fall_time_s"],
            righted=a["righted"],
            rho_kg_m3=rho,
        )
        return falls, a["severity_g"]


class _Summary:
    """Per-opening summaries of the falls, filled a block of openings at a time."""

    def __init__(self, n_open: int, samples: int) -> None:
        self.samples = samples
        self.probs = np.zeros((n_open, 4))
        self.mean_sev = np.zeros(n_open)
        self.drop_pct = np.zeros((n_open, 3))
        self.speed_pct = np.zeros((n_open, 3))
        self.water_share = np.zeros(n_open)
        self.unrighted_share = np.zeros(n_open)
        self.landing: list[dict[str, float]] = [{} for _ in range(n_open)]
        self.landing_kind: list[SurfaceKind | None] = [None] * n_open

    def add(self, a: int, b: int, falls: FallResults, sev: npt.NDArray[np.float64],
            thresholds: InjuryThresholds) -> None:
        self.probs[a:b] = band_probabilities(sev, thresholds)
        self.mean_sev[a:b] = sev.mean(axis=1)
        self.drop_pct[a:b], self.speed_pct[a:b] = _fall_percentiles(falls.drop_m,
                                                                    falls.impact_speed_mps)
        self.unrighted_share[a:b] = (1.0 - np.count_nonzero(falls.righted, axis=1)
                                     / float(self.samples))
        shares = _landing_shares(falls)
        is_water = np.array([SurfaceKind(k) is SurfaceKind.WATER for k in falls.landing_kinds],
                            bool)
        self.water_share[a:b] = shares[:, is_water].sum(axis=1)
        rows, cols = np.nonzero(shares)
        row_start = np.searchsorted(rows, np.arange(b - a + 1))
        for r in range(b - a):
            order = sorted(cols[row_start[r]:row_start[r + 1]].tolist(),
                           key=lambda j: (-shares[r, j], falls.landing_ids[j]))
            self.landing[a + r] = {str(falls.landing_ids[j]): float(shares[r, j])
                                   for j in order}
            if order:
                self.landing_kind[a + r] = SurfaceKind(falls.landing_kinds[order[0]])


def _assessment(
    building: Building,
    cat: CatSamples,
    summary: _Summary,
    *,
    samples: int,
    seed: int,
    thresholds: InjuryThresholds,
    stops: StoppingDistances,
    rho_kg_m3: float,
    falls: FallResults | None,
    severity_g: npt.NDArray[np.float64] | None,
    likelihood: LikelihoodResult | None = None,
    previous: Callable[[int], OpeningResult | None] | None = None,
) -> Assessment:
    """The assessment from the summaries. ``previous(i)``: a result computed before for opening
    ``i`` from the same opening, summary and likelihood (only its ranks may differ), or
    ``None``; it is reused with the new ranks instead of being written again."""
    n_open = len(building.openings)
    probs = summary.probs
    exp_band = expected_band(probs)
    mean_sev = summary.mean_sev
    lik = (assess_likelihood(building.openings, profile=building.cat_profile)
           if likelihood is None else likelihood)
    risk = risk_score(lik.annual_probability, probs)

    band_rank = _rank([-exp_band.astype(float), -lik.annual_probability, -mean_sev,
                       np.arange(n_open, dtype=float)])
    # the default order (see the module's docstring): the last key is each id's alphabetical place
    by_id = np.argsort(np.argsort(np.array([o.id for o in building.openings], dtype=object),
                                  kind="stable"), kind="stable").astype(float)
    risk_rank = _rank([-risk, -exp_band.astype(float), -mean_sev, by_id])

    # plain Python numbers, converted once (indexing numpy arrays one value at a time is slow)
    drop_pct, speed_pct = summary.drop_pct.tolist(), summary.speed_pct.tolist()
    water_share = summary.water_share.tolist()
    unrighted_share = summary.unrighted_share.tolist()
    prob_rows = probs.tolist()
    bands_l, sev_l, risk_l = exp_band.tolist(), mean_sev.tolist(), risk.tolist()
    p_year, one_in = lik.annual_probability.tolist(), lik.one_in_n.tolist()
    band_rank_l, risk_rank_l = band_rank.tolist(), risk_rank.tolist()

    results: list[OpeningResult] = []
    for i, o in enumerate(building.openings):
        old = previous(i) if previous is not None else None
        if old is not None:
            rank, rrank = band_rank_l[i], risk_rank_l[i]
            results.append(old if (old.rank, old.risk_rank) == (rank, rrank)
                           else replace(old, rank=rank, risk_rank=rrank))
            continue
        landing = summary.landing[i]
        factors = list(lik.factors[i])
        hazards = list(lik.hazards[i])
        drop, speed, band, p = drop_pct[i], speed_pct[i], bands_l[i], prob_rows[i]
        if landing:
            id0, share0 = next(iter(landing.items()))
            kind0 = summary.landing_kind[i]
            assert kind0 is not None
            factors.append(Reason.of("drop_landing", drop_m=drop[1], share=float(share0),
                                     surface=SurfaceKind(kind0).value, landing_id=str(id0)))
            water = water_share[i]
            if water > 0:
                hazards.append(Reason.of("water_below", share=water))
        factors.append(Reason.of("impact_speed", speed_mps=speed[1]))
        if drop[1] > CALIBRATED_DROP_MAX_M:
            factors.append(Reason.of("beyond_calibration", limit_m=float(CALIBRATED_DROP_MAX_M)))
        factors.append(Reason.of("median_band", band=band))
        if band < 3 and p[3] >= 0.05:
            factors.append(Reason.of("life_share", share=p[3]))
        if unrighted_share[i] >= _MOSTLY_UNRIGHTED:
            factors.append(Reason.of("short_drop", share=unrighted_share[i]))
        results.append(
            OpeningResult(
                id=o.id,
                floor=o.floor,
                facade=o.facade,
                kind=o.kind,
                rank=band_rank_l[i],
                risk_rank=risk_rank_l[i],
                risk=risk_l[i],
                expected_band=band,
                expected_severity_g=sev_l[i],
                annual_probability=p_year[i],
                one_in_n=one_in[i],
                drop_m=Percentiles(*drop),
                impact_speed_mps=Percentiles(*speed),
                landing=landing,
                bands=dict(zip(BANDS, p, strict=True)),
                factors=tuple(factors),
                hazards=tuple(hazards),
            )
        )

    return Assessment(
        building=building,
        samples=samples,
        seed=seed,
        model_version=MODEL_VERSION,
        falls=falls,
        band_probabilities=probs,
        likelihood=lik,
        risk=risk,
        openings=tuple(results),
        severity_g=severity_g,
        thresholds=thresholds,
        cat=cat,
        stops=stops,
        rho_kg_m3=rho_kg_m3,
    )
