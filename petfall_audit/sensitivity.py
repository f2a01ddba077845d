"""Which cat-profile parameters move the building's top risks most: a one-at-a-time analysis.

Each parameter in turn is held at a low and a high value while every other parameter keeps its
sampled values (common random numbers: the sampler draws each parameter from its own stream of
the same seed). Low and high are the 10th and 90th percentiles of that parameter's samples;
the chance of relaxing, a single probability, swings by ±0.2 (clipped to 0..1). The measure is
the summed risk score of the building's :data:`TOP_OPENINGS` highest-risk openings, and the
swing is ``(risk_high − risk_low) / risk_base``. The likelihood is kept as assessed (although
body mass also decides which gaps a cat passes), so the swings show how the severity side of
the risk moves.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from petfall_audit.injury import band_probabilities
from petfall_audit.model import CatProfile, Fixed
from petfall_audit.physics import simulate_falls
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
    lo, hi = np.percentile(values, [10.0, 90.0])
    return float(lo), float(hi)


def _with(profile: CatProfile, name: str, value: float) -> CatProfile:
    if name == "relax_probability":
        return replace(profile, relax_probability=value)
    return replace(profile, **{name: Fixed(value)})  # type: ignore[arg-type]


def sensitivity_analysis(base: Assessment, *, top: int = TOP_OPENINGS) -> SensitivityResult:
    """One-at-a-time swings of each cat-profile parameter on the top-risk openings of ``base``,
    with the samples, seed, thresholds and stopping distances ``base`` used.

    Costs two simulations of the building per parameter."""
    building = base.building
    cat = base.cat if base.cat is not None else sample_cat_profile(
        building.cat_profile, base.samples, seed=base.seed
    )
    thresholds, stops = base.thresholds, base.stops
    order = np.argsort(-base.risk, kind="stable")[: max(1, top)]
    ids = tuple(base.building.openings[i].id for i in order)
    lik = base.likelihood.annual_probability[order]
    base_risk = float(base.risk[order].sum())
    profile = building.cat_profile
    swings: list[ParameterSwing] = []
    for name, unit in PARAMETERS:
        lo, hi = _low_high(name, profile, cat)
        risks = []
        for value in (lo, hi):
            samples = sample_cat_profile(_with(profile, name, value), cat.n, seed=base.seed)
            falls = simulate_falls(building, samples)
            sev = severity_of_falls(falls, samples, stops)[order]
            risks.append(float(risk_score(lik, band_probabilities(sev, thresholds)).sum()))
        swing = (risks[1] - risks[0]) / base_risk if base_risk > 0 else 0.0
        swings.append(ParameterSwing(name, unit, lo, hi, risks[0], risks[1], swing))
    swings.sort(key=lambda s: (-abs(s.swing), s.parameter))
    return SensitivityResult(opening_ids=ids, base_risk=base_risk, swings=tuple(swings))


def with_sensitivity(base: Assessment, *, top: int = TOP_OPENINGS) -> Assessment:
    """``base`` with its :attr:`~petfall_audit.risk.Assessment.sensitivity` filled in (left
    ``None`` for a building without openings)."""
    if not base.openings:
        return base
    return replace(base, sensitivity=sensitivity_analysis(base, top=top))
