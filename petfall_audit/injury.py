"""Injury from a fall: a physical dose (mean deceleration, in g) and a dose–response that gives
the chance of each of four injury bands.

**Dose.** The mean deceleration over the stop, ``D = v² / (2 s g0)``, where ``v`` is the highest
speed the cat reached during the fall (m/s; the impact speed, or the speed at which it spread out
when it slowed a little afterwards: no fall is credited with that slow-down) and ``s`` the
stopping distance (m): the cat's own (legs flexing when it lands feet first, far less when it has
not yet righted itself) plus the surface's (concrete none, lawn and planting beds more). A cat
part-way through righting itself gets a stopping distance in proportion to the part of its
righting time that has passed. The dose never falls as the drop grows.

**Dose–response.** Cats hurt by the same fall are hurt very differently, so the band is a
probability given the dose, not a step function of it: an ordinal probit on ``ln D``,
``P(band ≥ b | D) = Φ((ln D − ln θ_b) / σ)`` with the band medians ``θ_b`` and the spread ``σ``
of :class:`~petfall_audit.model.InjuryThresholds`, fitted to published case series
(:mod:`petfall_audit.calibration`). An opening's band probabilities are the mean over its
simulated falls. Defaults and their sources are in ``docs/risk-model.md``.

Band names (mildest first) are ours: ``minor``, ``moderate``, ``serious``, ``life-threatening``.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np
import numpy.typing as npt

from petfall_audit._normal import ndtr
from petfall_audit.band_names import BANDS
from petfall_audit.model import InjuryThresholds, SurfaceKind

__all__ = [
    "BANDS",
    "BAND_DESCRIPTIONS",
    "G0",
    "SURFACE_STOP_M",
    "InjuryThresholds",
    "StoppingDistances",
    "thresholds_array",
    "DEFAULT_THRESHOLDS",
    "DEFAULT_STOPS",
    "CALIBRATED_DROP_MAX_M",
    "righting_fraction",
    "surface_stop_m",
    "stopping_distance_m",
    "severity_index_g",
    "dose_g",
    "band_at_least",
    "band_of",
    "band_probabilities",
    "expected_band",
]

G0 = 9.80665  # standard gravity, m/s² (ISO 80000-3)

#: What each band means for a cat, in plain words (for tables, the report and the leaflet).
BAND_DESCRIPTIONS: Mapping[str, str] = MappingProxyType(
    {
        "minor": "bruising, a scare, broken claws or teeth; usually treated as an outpatient",
        "moderate": "sprains, facial and jaw injuries, nosebleed; needs veterinary treatment",
        "serious": "limb or jaw fractures, chest injuries (collapsed lung); needs surgery or "
        "intensive care",
        "life-threatening": "severe chest, abdominal, spinal or head injuries, shock; "
        "may be fatal even with treatment",
    }
)

#: Stopping distance a landing surface adds, m (design assumptions, from memory; there are no
#: published cat-specific surface factors). Hard surfaces add next to nothing; lawn or soil cuts
#: the deceleration of a righted cat by about 40 % and a planting bed by about half (often one
#: band lower); water is softer still but carries a drowning hazard reported separately.
SURFACE_STOP_M: Mapping[SurfaceKind, float] = MappingProxyType(
    {
        SurfaceKind.CONCRETE: 0.0,
        SurfaceKind.ASPHALT: 0.002,
        SurfaceKind.ROOF: 0.005,
        SurfaceKind.DECK: 0.01,
        SurfaceKind.GRAVEL: 0.03,
        SurfaceKind.LAWN: 0.08,
        SurfaceKind.PLANTING: 0.12,
        SurfaceKind.WATER: 0.20,
    }
)


@dataclass(frozen=True, slots=True)
class StoppingDistances:
    """The cat's own stopping distance, m: ``righted_m`` feet first, legs flexing (about the
    travel of a crouch, 10-15 cm; from memory); ``unrighted_m`` landing on side, chest or chin
    (compression of the body wall, a few cm; from memory). ``surface_m`` adds per surface kind."""

    righted_m: float = 0.12
    unrighted_m: float = 0.03
    surface_m: Mapping[SurfaceKind, float] = field(default_factory=lambda: SURFACE_STOP_M)

    def __post_init__(self) -> None:
        if not 0.0 < self.unrighted_m <= self.righted_m:
            raise ValueError("need 0 < unrighted_m <= righted_m")
        if any(v < 0 for v in self.surface_m.values()):
            raise ValueError("surface stopping distances must not be negative")


DEFAULT_THRESHOLDS = InjuryThresholds()

#: Highest drop (m) among the falls of the case series the dose–response is fitted to
#: (:mod:`petfall_audit.calibration`); above it the band shares are extrapolated.
CALIBRATED_DROP_MAX_M = 22.0
DEFAULT_STOPS = StoppingDistances()


def righting_fraction(
    fall_time_s: npt.ArrayLike, righting_time_s: npt.ArrayLike
) -> npt.NDArray[np.float64]:
    """Share of the righting turn done at impact, 0..1: fall time over righting time (s/s)."""
    t = np.asarray(fall_time_s, dtype=float)
    tr = np.asarray(righting_time_s, dtype=float)
    with np.errstate(divide="ignore", invalid="ignore"):
        frac = np.where(tr > 0, t / np.where(tr > 0, tr, 1.0), 1.0)
    return np.clip(frac, 0.0, 1.0)


def surface_stop_m(
    kinds: Iterable[SurfaceKind | str], stops: StoppingDistances = DEFAULT_STOPS
) -> npt.NDArray[np.float64]:
    """Stopping distance (m) each landing surface kind adds, one per kind given."""
    return np.array([stops.surface_m[SurfaceKind(k)] for k in kinds], dtype=float)


def stopping_distance_m(
    righted: npt.ArrayLike,
    surface_m: npt.ArrayLike,
    stops: StoppingDistances = DEFAULT_STOPS,
) -> npt.NDArray[np.float64]:
    """Total stopping distance (m): the cat's, interpolated by ``righted`` (bool or 0..1 share of
    the righting turn), plus the surface's ``surface_m``."""
    r = np.asarray(righted, dtype=float)
    cat_m = stops.unrighted_m + (stops.righted_m - stops.unrighted_m) * r
    out: npt.NDArray[np.float64] = cat_m + np.asarray(surface_m, dtype=float)
    return out


def severity_index_g(
    impact_speed_mps: npt.ArrayLike,
    righted: npt.ArrayLike,
    surface_m: npt.ArrayLike,
    stops: StoppingDistances = DEFAULT_STOPS,
) -> npt.NDArray[np.float64]:
    """Mean deceleration of the stop, in g: ``v² / (2 s g0)``.

    ``impact_speed_mps`` m/s; ``righted`` bool or 0..1 share of the righting turn; ``surface_m``
    the stopping distance the landing surface adds (m, see :func:`surface_stop_m`). All broadcast.
    """
    v = np.asarray(impact_speed_mps, dtype=float)
    s = stopping_distance_m(righted, surface_m, stops)
    out: npt.NDArray[np.float64] = (v * v) / ((2.0 * G0) * s)
    return out


def dose_g(
    peak_speed_mps: npt.ArrayLike,
    fall_time_s: npt.ArrayLike,
    righting_time_s: npt.ArrayLike,
    surface_m: npt.ArrayLike,
    stops: StoppingDistances = DEFAULT_STOPS,
) -> npt.NDArray[np.float64]:
    """The injury dose of each fall, in g: :func:`severity_index_g` of the highest speed reached
    (m/s) with the share of the righting turn done after ``fall_time_s`` of the cat's
    ``righting_time_s`` (s); ``surface_m`` the stopping distance the surface adds (m). All
    broadcast."""
    return severity_index_g(
        peak_speed_mps, righting_fraction(fall_time_s, righting_time_s), surface_m, stops
    )


def _log_medians(thresholds: InjuryThresholds) -> npt.NDArray[np.float64]:
    return np.log(thresholds_array(thresholds))


def thresholds_array(thresholds: InjuryThresholds) -> npt.NDArray[np.float64]:
    """The three band medians (g) as an array, mildest first."""
    return np.array(
        [thresholds.moderate_g, thresholds.serious_g, thresholds.life_threatening_g], dtype=float
    )


def band_at_least(
    severity_g: npt.ArrayLike, thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
) -> npt.NDArray[np.float64]:
    """Chance that a fall of each dose (g) is moderate, serious, life-threatening *or worse*:
    shape ``(..., 3)``, ``Φ((ln D − ln θ_b) / σ)``; a step at the medians when ``σ`` is 0."""
    sev = np.asarray(severity_g, dtype=float)
    log_t = _log_medians(thresholds)
    with np.errstate(divide="ignore"):
        z = np.log(sev)[..., None] - log_t
    if thresholds.spread == 0:
        out: npt.NDArray[np.float64] = (z >= 0).astype(float)
        return out
    z /= thresholds.spread
    return ndtr(z, out=z)


def band_of(
    severity_g: npt.ArrayLike, thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
) -> npt.NDArray[np.int8]:
    """The median band (0..3, index into :data:`BANDS`) of each dose (g): the band whose median
    dose it reaches. A dose equal to a median belongs to the higher band."""
    sev = np.asarray(severity_g, dtype=float)
    return np.searchsorted(thresholds_array(thresholds), sev, side="right").astype(np.int8)


def band_probabilities(
    severity_g: npt.ArrayLike, thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
) -> npt.NDArray[np.float64]:
    """Chance of each band, shape ``(..., 4)``, from the doses ``(..., n_samples)`` of the
    simulated falls (g): the dose–response averaged over the falls. Each row sums to 1."""
    sev = np.asarray(severity_g, dtype=float)
    n = sev.shape[-1]
    if n == 0:
        raise ValueError("severity_g needs at least one sample")
    lead = sev.shape[:-1]
    at_least = np.empty(lead + (3,))
    log_t = _log_medians(thresholds)
    with np.errstate(divide="ignore"):
        log_sev = np.log(sev)
    for b in range(3):  # one (..., n_samples) temporary at a time
        z = log_sev - log_t[b]
        if thresholds.spread == 0:
            at_least[..., b] = np.count_nonzero(z >= 0, axis=-1) / float(n)
        else:
            z /= thresholds.spread
            ndtr(z, out=z)
            at_least[..., b] = z.mean(axis=-1)
    # keep the tail shares nested against rounding (they are in exact arithmetic)
    at_least[..., 1] = np.minimum(at_least[..., 1], at_least[..., 0])
    at_least[..., 2] = np.minimum(at_least[..., 2], at_least[..., 1])
    ones = np.ones(lead + (1,))
    zeros = np.zeros_like(ones)
    cum = np.concatenate([ones, at_least, zeros], axis=-1)  # P(band >= b), b = 0..4
    probs: npt.NDArray[np.float64] = cum[..., :-1] - cum[..., 1:]
    return probs


def expected_band(band_probabilities_: npt.ArrayLike) -> npt.NDArray[np.int8]:
    """The median band: the worst band that at least half of the falls reach or exceed.

    ``band_probabilities_`` has shape ``(..., 4)``; returns band numbers 0..3. In plain words,
    "at least half of the falls from here are this bad or worse"."""
    p = np.asarray(band_probabilities_, dtype=float)
    # P(band >= b) for b = 1..3; a small tolerance keeps exact halves stable against rounding
    tail = np.cumsum(p[..., ::-1], axis=-1)[..., ::-1][..., 1:]
    out: npt.NDArray[np.int8] = np.count_nonzero(tail >= 0.5 - 1e-12, axis=-1).astype(np.int8)
    return out
