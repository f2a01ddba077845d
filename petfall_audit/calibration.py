"""The injury dose–response fitted to published veterinary case series of cats that fell.

Each series is a clinic's record of cats brought in after a fall from a building, with the share
that died (or were put to sleep) and the share with limb fractures, and the heights the cats fell
from. The model is run under each series' conditions (the same physics and dose as an audit, the
adult cat profile, drops spread as the series reports them, hard ground or lawn below) and the
dose–response (:class:`~petfall_audit.model.InjuryThresholds`) is chosen by maximum likelihood so
that the model's shares match the published ones as well as they can together.

How a published figure is read as a band share (assumptions, stated in ``docs/risk-model.md``):

- *died or put to sleep* → the share of falls in the **life-threatening** band (the band also
  holds cats that survive with intensive care; and cats killed outright are rarely brought in,
  while some are put to sleep for the cost of treatment: the two biases pull opposite ways);
- *limb fracture* → the share of falls that are **serious or worse** (a fracture needs surgery);
- *moderate* has no published counterpart: its median dose is a third of the serious one
  (:data:`MODERATE_RATIO`, a judgement, from memory);
- heights given in storeys are ``storey × 3.0 m + 1.0 m`` (storey height 2.7–3.5 m and a rail or
  sill of about 1 m, common practice, no source; the ground floor is storey 0);
- where a series does not report the ground below, 74.2 % hard ground as in the Berlin series,
  the rest lawn (an assumption);
- the cats are the adult preset (the Berlin series' mean mass, 4.1 kg).

Run ``python tools/calibrate_injury.py`` to refit and print the comparison table.
"""

from __future__ import annotations

import dataclasses
import math
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

import numpy as np
import numpy.typing as npt
from scipy import optimize

from petfall_audit.injury import DEFAULT_STOPS, StoppingDistances, band_at_least
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatProfile,
    Facade,
    Floor,
    InjuryThresholds,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from petfall_audit.physics import simulate_falls
from petfall_audit.risk import severity_of_falls
from petfall_audit.sampling import DEFAULT_SEED, sample_cat_profile

__all__ = [
    "STOREY_HEIGHT_M",
    "PERCH_HEIGHT_M",
    "MODERATE_RATIO",
    "HARD_SHARE_DEFAULT",
    "SPREAD_PRIOR_MEDIAN",
    "SPREAD_PRIOR_LOG_SD",
    "Outcome",
    "CaseSeries",
    "CASE_SERIES",
    "storey_drops",
    "SeriesDoses",
    "series_doses",
    "model_share",
    "fit_thresholds",
    "comparison_rows",
]

FloatArray = npt.NDArray[np.float64]

#: Storey height (m) used to turn reported storeys into metres (2.7–3.5 m; common practice).
STOREY_HEIGHT_M = 3.0
#: Height of the rail or sill above the floor the cat fell from (m; common practice).
PERCH_HEIGHT_M = 1.0
#: Median dose of *moderate* as a fraction of *serious* (judgement, from memory).
MODERATE_RATIO = 1.0 / 3.0
#: Prior on the spread σ: log-normal with this median and this sd of ln σ. The series' shares
#: differ between clinics more than between heights, so alone they cannot tell how steep the
#: dose–response is; the injury-risk curves of injury biomechanics are log-normal in the dose
#: with σ of roughly 0.3–0.8 (from memory), which this prior spans.
SPREAD_PRIOR_MEDIAN = 0.6
SPREAD_PRIOR_LOG_SD = 0.25
#: Share of falls onto hard ground where a series does not say: the Berlin series' 74.2 %.
HARD_SHARE_DEFAULT = 0.742

Measure = Literal["died", "limb_fracture", "shock"]
#: The band "or worse" that each published measure is read as (index into injury.BANDS).
MEASURE_BAND: dict[str, int] = {"died": 3, "limb_fracture": 2, "shock": 2}
MEASURE_WORDS: dict[str, str] = {
    "died": "died or put to sleep → life-threatening",
    "limb_fracture": "limb fracture → serious or worse",
    "shock": "shock → serious or worse",
}


@dataclass(frozen=True, slots=True)
class Outcome:
    """One published share (0..1) of one measure in one series."""

    measure: Measure
    share: float
    note: str = ""


@dataclass(frozen=True, slots=True)
class CaseSeries:
    """A published case series: ``n`` cats; ``drops_m`` and ``weights`` the spread of drops (m)
    assumed for it; ``hard_share`` of falls onto hard ground; ``in_fit``: whether its figures
    take part in the fit (else the table only compares)."""

    key: str
    citation: str
    n: int
    heights: str
    drops_m: tuple[float, ...]
    weights: tuple[float, ...]
    hard_share: float
    outcomes: tuple[Outcome, ...]
    in_fit: bool = True


def storey_drops(storeys: Sequence[int], weights: Sequence[float] | None = None
                 ) -> tuple[tuple[float, ...], tuple[float, ...]]:
    """Drops (m) and normalised weights for falls from the given storeys."""
    w = np.ones(len(storeys)) if weights is None else np.asarray(weights, dtype=float)
    w = w / w.sum()
    drops = tuple(float(s * STOREY_HEIGHT_M + PERCH_HEIGHT_M) for s in storeys)
    return drops, tuple(float(x) for x in w)


def _uniform_drops(lo_m: float, hi_m: float, n: int = 15) -> tuple[tuple[float, ...],
                                                                   tuple[float, ...]]:
    drops = np.linspace(lo_m, hi_m, n)
    return tuple(float(d) for d in drops), tuple([1.0 / n] * n)


_BERLIN = _uniform_drops(8.0, 15.0)
_ZAGREB = storey_drops(range(1, 8))  # storeys 1-7: mean 4, as reported
_ALEXANDRIA = storey_drops(range(2, 6))  # 2nd to 5th storey, as reported
# 2nd to 12th storey, 35 of 43 from the 6th or lower
_RIO = storey_drops(list(range(2, 7)) + list(range(7, 13)),
                    [35 / 43 / 5] * 5 + [8 / 43 / 6] * 6)

_CLINIC37 = storey_drops(range(2, 8))  # 2nd storey and up, mean 4.42: storeys 2-7, evenly
_CLINIC37_HIGH = storey_drops(range(6, 8))  # "from the 6th storey and above"

_CLINIC37_CITE = ("Retrospective series of 37 cats from one clinic (published summary; authors, "
                  "journal and year not retrieved)")

#: The series the dose–response is fitted to (and one it is only compared with).
CASE_SERIES: tuple[CaseSeries, ...] = (
    CaseSeries(
        "berlin", "Candela Andrade et al. 2025, J Feline Med Surg (1125 cats, Berlin 2004-13)",
        1125, "4 m or more, typically 8-15 m: taken as 8-15 m, evenly", *_BERLIN, 0.742,
        (Outcome("died", 0.133), Outcome("limb_fracture", 0.472)),
    ),
    CaseSeries(
        "zagreb", "Vnuk et al. 2004, J Feline Med Surg 6:305 (119 cats, Zagreb)",
        119, "mean 4 storeys: taken as storeys 1-7, evenly", *_ZAGREB, HARD_SHARE_DEFAULT,
        (Outcome("died", 1.0 - 0.965), Outcome("limb_fracture", 0.462)),
    ),
    CaseSeries(
        "alexandria", "Zaghloul & Samy 2018, Alex J Vet Sci 59:43 (45 cats)",
        45, "2nd to 5th storey, evenly", *_ALEXANDRIA, HARD_SHARE_DEFAULT,
        (Outcome("died", 1.0 - 0.778), Outcome("limb_fracture", 0.60, "fracture or luxation")),
    ),
    CaseSeries(
        "clinic37", _CLINIC37_CITE, 37, "2nd storey and up, mean 4.42: taken as storeys 2-7",
        *_CLINIC37, HARD_SHARE_DEFAULT,
        (Outcome("shock", 0.351),),
    ),
    CaseSeries(
        "clinic37_high", _CLINIC37_CITE + ", the cats from the 6th storey and above", 6,
        "6th storey and above: taken as storeys 6-7; 6 cats assumed (not in the summary)",
        *_CLINIC37_HIGH, HARD_SHARE_DEFAULT,
        (Outcome("shock", 0.66),),
    ),
    CaseSeries(
        "rio", "Gheren et al., Braz J Vet Med (43 cats, Rio de Janeiro 2010-12)",
        43, "2nd to 12th storey, 35 of 43 from the 6th or lower", *_RIO, HARD_SHARE_DEFAULT,
        (Outcome("limb_fracture", 0.419, "forelimb fractures alone; any limb fracture is "
                 "between 41.9 % and 72.1 %"),),
        in_fit=False,
    ),
)


@dataclass(frozen=True, slots=True)
class SeriesDoses:
    """Doses (g) of the simulated falls under a series' conditions, ``(n_drops, n_samples)``,
    onto hard ground and onto lawn, with the weight of each drop."""

    series: CaseSeries
    hard_g: FloatArray
    soft_g: FloatArray
    weights: FloatArray


def _falls_building(drops_m: Sequence[float], kind: SurfaceKind) -> Building:
    """One window per drop over one surface: the same physics and dose as an audit."""
    floors = tuple(Floor(i, f"drop {d:g} m", float(d) - PERCH_HEIGHT_M)
                   for i, d in enumerate(drops_m))
    openings = tuple(
        Opening(f"W{i}", i, "f", OpeningKind.WINDOW_CASEMENT, 0.0, 1.0,
                perch_height_m=PERCH_HEIGHT_M)
        for i in range(len(drops_m))
    )
    return Building(BuildingInfo("calibration"), floors, (Facade("f", 10.0),),
                    (Surface("below", kind, 0.0),), openings)


def series_doses(
    series: CaseSeries,
    *,
    samples: int = 4000,
    seed: int = DEFAULT_SEED,
    profile: CatProfile | None = None,
    stops: StoppingDistances = DEFAULT_STOPS,
) -> SeriesDoses:
    """Simulate the falls of a series' conditions with ``samples`` cats of ``profile``
    (default: the adult preset)."""
    prof = CAT_PRESETS["adult"] if profile is None else profile
    cat = sample_cat_profile(prof, samples, seed=seed)
    out = []
    for kind in (SurfaceKind.CONCRETE, SurfaceKind.LAWN):
        b = _falls_building(series.drops_m, kind)
        out.append(severity_of_falls(simulate_falls(b, cat), cat, stops))
    return SeriesDoses(series, out[0], out[1], np.asarray(series.weights, dtype=float))


def model_share(doses: SeriesDoses, band: int, thresholds: InjuryThresholds) -> float:
    """The model's share of falls of ``band`` or worse (1..3) under a series' conditions."""
    hard = band_at_least(doses.hard_g, thresholds)[..., band - 1].mean(axis=-1)
    soft = band_at_least(doses.soft_g, thresholds)[..., band - 1].mean(axis=-1)
    h = doses.series.hard_share
    return float(doses.weights @ (h * hard + (1.0 - h) * soft))


def _thresholds(x: FloatArray) -> InjuryThresholds:
    serious = math.exp(float(x[0]))
    life = serious * math.exp(math.exp(float(x[1])))  # always above serious
    return InjuryThresholds(serious * MODERATE_RATIO, serious, life, math.exp(float(x[2])))


def fit_thresholds(doses: Sequence[SeriesDoses]) -> InjuryThresholds:
    """Penalised maximum-likelihood dose–response: the published shares as binomial counts of
    each series' ``n`` cats, over the series with ``in_fit``, with the prior on the spread
    (:data:`SPREAD_PRIOR_MEDIAN`)."""
    data = [(d, MEASURE_BAND[o.measure], o.share, d.series.n)
            for d in doses if d.series.in_fit for o in d.series.outcomes]
    if not data:
        raise ValueError("no case series to fit")

    def nll(x: FloatArray) -> float:
        try:
            t = _thresholds(x)
        except ValueError:
            return math.inf
        total = 0.0
        for d, band, share, n in data:
            p = min(max(model_share(d, band, t), 1e-9), 1.0 - 1e-9)
            total -= n * (share * math.log(p) + (1.0 - share) * math.log(1.0 - p))
        prior_z = (math.log(t.spread) - math.log(SPREAD_PRIOR_MEDIAN)) / SPREAD_PRIOR_LOG_SD
        return total + 0.5 * prior_z * prior_z

    x0 = np.array([math.log(45.0), math.log(math.log(2.0)), math.log(0.8)])
    res = optimize.minimize(nll, x0, method="Nelder-Mead",
                            options={"xatol": 1e-4, "fatol": 1e-6, "maxiter": 4000})
    return _thresholds(res.x)


def comparison_rows(doses: Sequence[SeriesDoses], thresholds: InjuryThresholds
                    ) -> list[dict[str, object]]:
    """Per published figure: the series, the measure, the published and the model's share."""
    rows: list[dict[str, object]] = []
    for d in doses:
        for o in d.series.outcomes:
            model = model_share(d, MEASURE_BAND[o.measure], thresholds)
            rows.append({
                "series": d.series.citation, "heights": d.series.heights,
                "hard_share": d.series.hard_share, "measure": MEASURE_WORDS[o.measure],
                "note": o.note, "published": o.share, "model": model,
                "difference": model - o.share, "in_fit": d.series.in_fit,
            })
    return rows


def rounded(t: InjuryThresholds) -> InjuryThresholds:
    """The fit as shipped: medians to 0.1 g, the spread to 0.01."""
    return dataclasses.replace(
        t, moderate_g=round(t.moderate_g, 1), serious_g=round(t.serious_g, 1),
        life_threatening_g=round(t.life_threatening_g, 1), spread=round(t.spread, 2))
