"""Injury severity of a fall: a mean-deceleration index (in g) mapped to four injury bands.

The index is the mean deceleration over the stop, ``a = v² / (2 s)``, in units of standard
gravity, where ``v`` is the impact speed (m/s) and ``s`` the stopping distance (m): the cat's own
(legs flexing when it lands feet first, far less when it has not yet righted itself) plus the
surface's (concrete none, lawn and planting beds more). A cat that is part-way through righting
itself gets a stopping distance in proportion to the part of its righting time that has passed.

The index grows with the square of the impact speed and falls with a softer surface or a better
posture; it has no term of its own that changes with height. Defaults and their sources are in
``docs/risk-model.md``.

Band names (mildest first) are ours: ``minor``, ``moderate``, ``serious``, ``life-threatening``.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from types import MappingProxyType

import numpy as np
import numpy.typing as npt

from petfall_audit.model import SurfaceKind

__all__ = [
    "BANDS",
    "BAND_DESCRIPTIONS",
    "G0",
    "SURFACE_STOP_M",
    "InjuryThresholds",
    "StoppingDistances",
    "DEFAULT_THRESHOLDS",
    "DEFAULT_STOPS",
    "righting_fraction",
    "surface_stop_m",
    "stopping_distance_m",
    "severity_index_g",
    "band_of",
    "band_probabilities",
    "expected_band",
]

G0 = 9.80665  # standard gravity, m/s² (ISO 80000-3)

#: Injury bands, mildest first; the index into this tuple is the band number 0..3.
BANDS: tuple[str, ...] = ("minor", "moderate", "serious", "life-threatening")

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
class InjuryThresholds:
    """Lower bounds of the bands above ``minor``, as mean deceleration in g (strictly rising).

    Defaults (see ``docs/risk-model.md`` for how they were chosen):
    ``moderate_g`` 15 g (a righted cat on concrete after about a 2 m drop);
    ``serious_g`` 45 g (about a 6 m drop onto concrete: second-floor falls, where the case
    series start to report fractures and chest injuries); ``life_threatening_g`` 90 g (a mean
    deceleration whose peak, 1.6-2 times the mean for a half-sine or triangular pulse, is
    140-180 g, just under the playground head-injury limit of 200 g with a 4.6 kg headform,
    ASTM F1292 / EN 1177; it also puts about 14 % of falls from 8-15 m, 74 % onto hard ground,
    in this band, against 13.3 % of cats that died in Candela Andrade et al. 2025).
    """

    moderate_g: float = 15.0
    serious_g: float = 45.0
    life_threatening_g: float = 90.0

    def __post_init__(self) -> None:
        t = (self.moderate_g, self.serious_g, self.life_threatening_g)
        if not all(np.isfinite(t)) or not 0.0 < t[0] < t[1] < t[2]:
            raise ValueError(f"thresholds must be positive and strictly rising, got {t}")

    def as_array(self) -> npt.NDArray[np.float64]:
        """The three thresholds (g) as an array, mildest first."""
        return np.array([self.moderate_g, self.serious_g, self.life_threatening_g])


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


def band_of(
    severity_g: npt.ArrayLike, thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
) -> npt.NDArray[np.int8]:
    """Band number 0..3 (index into :data:`BANDS`) of each severity index (g).

    A value equal to a threshold belongs to the higher band."""
    sev = np.asarray(severity_g, dtype=float)
    return np.searchsorted(thresholds.as_array(), sev, side="right").astype(np.int8)


def band_probabilities(
    severity_g: npt.ArrayLike, thresholds: InjuryThresholds = DEFAULT_THRESHOLDS
) -> npt.NDArray[np.float64]:
    """Share of samples in each band, shape ``(..., 4)`` from severities ``(..., n_samples)``.

    Each row sums to 1."""
    sev = np.asarray(severity_g, dtype=float)
    n = sev.shape[-1]
    if n == 0:
        raise ValueError("severity_g needs at least one sample")
    # share at or above each threshold, then differences: three passes, no sort
    at_least = np.stack(
        [np.count_nonzero(sev >= t, axis=-1) for t in thresholds.as_array()], axis=-1
    ) / float(n)
    ones = np.ones(at_least.shape[:-1] + (1,))
    zeros = np.zeros_like(ones)
    cum = np.concatenate([ones, at_least, zeros], axis=-1)  # P(band >= b), b = 0..4
    probs: npt.NDArray[np.float64] = cum[..., :-1] - cum[..., 1:]
    return probs


def expected_band(band_probabilities_: npt.ArrayLike) -> npt.NDArray[np.int8]:
    """The median band: the worst band that at least half of the falls reach or exceed.

    ``band_probabilities_`` has shape ``(..., 4)``; returns band numbers 0..3. In plain words,
    "at least half of the simulated falls from here are this bad or worse"."""
    p = np.asarray(band_probabilities_, dtype=float)
    # P(band >= b) for b = 1..3; a small tolerance keeps exact halves stable against rounding
    tail = np.cumsum(p[..., ::-1], axis=-1)[..., ::-1][..., 1:]
    out: npt.NDArray[np.int8] = np.count_nonzero(tail >= 0.5 - 1e-12, axis=-1).astype(np.int8)
    return out
