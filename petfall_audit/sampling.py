"""Samples of the cat profile: a seeded, reproducible population of cats.

Every opening of a building is simulated with the same samples (common random numbers), so the
differences between openings are differences of the building, not of the draw.

How the samples are drawn (documented assumptions):

- Each parameter is the inverse cumulative distribution function applied to its own stream of
  uniforms, so changing one parameter's distribution moves its values monotonically and leaves
  every other parameter's values untouched (useful for one-at-a-time sensitivity).
- Body size is one stream shared by ``mass_kg``, ``cda_tense_m2`` and ``cda_spread_m2``: a heavy
  cat is also a large one. Independent draws would pair heavy cats with small drag areas and
  spread the terminal speeds far wider than the figures of the trade (tense about 24 m/s,
  spread about 17 m/s; fact of the trade, no source); the areas scale with body size.
- ``Normal`` and ``LogNormal`` are truncated exactly to the parameter's valid range (positive
  quantities, relax fraction inside (0, 1), launch speed at least 0) by drawing from the
  truncated distribution's own inverse CDF: no resampling, no pile-up at a clipped bound.
  ``Fixed`` and ``Uniform`` values outside the valid range raise ``ValueError``.
- ``LogNormal(mean, sd)`` is given by the arithmetic mean and sd of the quantity:
  ``sigma² = ln(1 + sd²/mean²)``, ``mu = ln(mean) − sigma²/2``.
- ``cda_spread_m2`` is at least ``cda_tense_m2`` for every cat; a cat that does not relax
  (``relaxes`` False, Bernoulli with ``relax_probability``) gets ``cda_spread_m2 ==
  cda_tense_m2``, which the physics reads as "never spreads out".
- ``position_fraction`` (where along the opening's width the cat goes over) is a property of the
  fall, not of the cat: it stays uniform on [0, 1) even for a deterministic profile, whose
  cats are otherwise identical.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import numpy.typing as npt

from petfall_audit import sample_counts as _counts
from petfall_audit._normal import ndtr, ndtri
from petfall_audit.model import CatProfile, Distribution, Fixed, LogNormal, Normal, Uniform

__all__ = ["DEFAULT_SAMPLES", "DEFAULT_SEED", "CatSamples", "sample_cat_profile"]

DEFAULT_SAMPLES = _counts.DEFAULT_SAMPLES
DEFAULT_SEED = _counts.DEFAULT_SEED

FloatArray = npt.NDArray[np.float64]

# Independent uniform streams, one per quantity, spawned from the seed in this fixed order.
_STREAMS = ("size", "relax", "relax_fraction", "righting", "launch", "position")
# Keep uniforms strictly inside (0, 1) so that inverse CDFs stay finite.
_U_LO = 2.0**-53
_U_HI = 1.0 - 2.0**-53


@dataclass(frozen=True, slots=True)
class CatSamples:
    """``n`` sampled cats; every field is a 1-D array of length ``n``.

    ``mass_kg`` (kg); ``cda_tense_m2`` / ``cda_spread_m2`` drag coefficient × frontal area (m²)
    tense and spread out (equal for cats that do not relax); ``relaxes`` (bool);
    ``relax_fraction`` fraction of the tense terminal speed at which the cat spreads out;
    ``righting_time_s`` (s); ``launch_speed_mps`` outward speed leaving the perch (m/s);
    ``position_fraction`` in [0, 1): where along the opening's width the cat goes over.
    """

    mass_kg: FloatArray
    cda_tense_m2: FloatArray
    cda_spread_m2: FloatArray
    relaxes: npt.NDArray[np.bool_]
    relax_fraction: FloatArray
    righting_time_s: FloatArray
    launch_speed_mps: FloatArray
    position_fraction: FloatArray

    @property
    def n(self) -> int:
        """Number of cats."""
        return int(self.mass_kg.shape[0])


def _uniforms(rng: np.random.Generator, n: int) -> FloatArray:
    u: FloatArray = np.clip(rng.random(n), _U_LO, _U_HI)
    return u


def _check_finite(name: str, *values: float) -> None:
    if not all(math.isfinite(v) for v in values):
        raise ValueError(f"{name}: distribution parameters must be finite, got {values}")


def _draw(
    name: str, dist: Distribution, u: FloatArray, lo: float, hi: float, *, open_lo: bool
) -> FloatArray:
    """Inverse-CDF draw of ``dist`` from uniforms ``u``, truncated to the valid range.

    The valid range is ``(lo, hi)`` (``[lo, hi)`` when ``open_lo`` is False); ``Normal`` and
    ``LogNormal`` are truncated to it exactly, ``Fixed`` and ``Uniform`` must lie inside it."""

    def inside(v: float) -> bool:
        return (v > lo if open_lo else v >= lo) and v < hi

    if isinstance(dist, Fixed):
        _check_finite(name, dist.value)
        if not inside(dist.value):
            raise ValueError(f"{name}: value {dist.value} is outside the valid range")
        return np.full(u.shape, float(dist.value))
    if isinstance(dist, Uniform):
        _check_finite(name, dist.min, dist.max)
        if dist.max < dist.min:
            raise ValueError(f"{name}: Uniform max {dist.max} is below min {dist.min}")
        if not (inside(dist.min) and inside(dist.max)):
            raise ValueError(
                f"{name}: Uniform({dist.min}, {dist.max}) leaves the valid range"
            )
        out: FloatArray = dist.min + (dist.max - dist.min) * u
        return out
    if isinstance(dist, Normal | LogNormal):
        _check_finite(name, dist.mean, dist.sd)
        if dist.sd < 0:
            raise ValueError(f"{name}: sd must not be negative, got {dist.sd}")
        if isinstance(dist, LogNormal) and dist.mean <= 0:
            raise ValueError(f"{name}: LogNormal mean must be positive, got {dist.mean}")
        if dist.sd == 0:
            if not inside(dist.mean):
                raise ValueError(f"{name}: value {dist.mean} is outside the valid range")
            return np.full(u.shape, float(dist.mean))
        if isinstance(dist, Normal):
            loc, scale = float(dist.mean), float(dist.sd)
            z_lo, z_hi = (lo - loc) / scale, (hi - loc) / scale
        else:
            sigma2 = math.log1p((dist.sd / dist.mean) ** 2)
            scale = math.sqrt(sigma2)
            loc = math.log(dist.mean) - sigma2 / 2.0
            z_lo = (math.log(lo) - loc) / scale if lo > 0 else -math.inf
            z_hi = (math.log(hi) - loc) / scale if math.isfinite(hi) else math.inf
        # Inverse CDF of the standard normal truncated to [z_lo, z_hi].
        p_lo, p_hi = float(ndtr(z_lo)), float(ndtr(z_hi))
        if p_hi - p_lo <= 0.0:
            raise ValueError(f"{name}: the distribution has no mass inside the valid range")
        z = ndtri(p_lo + u * (p_hi - p_lo))
        z = np.clip(z, z_lo, z_hi)
        x = loc + scale * z
        if isinstance(dist, LogNormal):
            x = np.exp(x)
        # Guard the open bound against rounding onto it.
        x = np.clip(x, np.nextafter(lo, math.inf) if open_lo else lo, np.nextafter(hi, -math.inf))
        result: FloatArray = np.asarray(x, dtype=float)
        return result
    raise TypeError(f"{name}: unknown distribution {dist!r}")


def sample_cat_profile(
    profile: CatProfile, n: int = DEFAULT_SAMPLES, *, seed: int = DEFAULT_SEED
) -> CatSamples:
    """Draw ``n`` cats from ``profile`` with generator seed ``seed`` (same seed, same cats).

    See the module docstring for the sampling scheme. Raises ``ValueError`` naming the parameter
    when a distribution is invalid (e.g. a fixed mass of 0 or a relax fraction of 1), and for a
    negative or non-integer ``seed``."""
    if isinstance(n, bool) or not isinstance(n, int | np.integer) or n < 1:
        raise ValueError(f"n must be a positive integer, got {n!r}")
    if isinstance(seed, bool) or not isinstance(seed, int | np.integer) or seed < 0:
        raise ValueError(f"seed must be a whole number of 0 or more, got {seed!r}")
    p = profile.relax_probability
    if not (isinstance(p, int | float) and 0.0 <= p <= 1.0):
        raise ValueError(f"relax_probability must lie in [0, 1], got {p!r}")
    streams = np.random.SeedSequence(seed).spawn(len(_STREAMS))
    u = {
        name: _uniforms(np.random.default_rng(s), int(n))
        for name, s in zip(_STREAMS, streams, strict=True)
    }
    inf = math.inf
    mass = _draw("mass_kg", profile.mass_kg, u["size"], 0.0, inf, open_lo=True)
    tense = _draw("cda_tense_m2", profile.cda_tense_m2, u["size"], 0.0, inf, open_lo=True)
    spread = _draw("cda_spread_m2", profile.cda_spread_m2, u["size"], 0.0, inf, open_lo=True)
    relaxes = u["relax"] < p
    spread = np.where(relaxes, np.maximum(spread, tense), tense)
    fraction = _draw("relax_fraction", profile.relax_fraction, u["relax_fraction"], 0.0, 1.0,
                     open_lo=True)
    righting = _draw("righting_time_s", profile.righting_time_s, u["righting"], 0.0, inf,
                     open_lo=False)
    launch = _draw("launch_speed_mps", profile.launch_speed_mps, u["launch"], 0.0, inf,
                   open_lo=False)
    # position keeps the full [0, 1) range (the clip above only moves exact 0 by 2**-53)
    position = u["position"]
    return CatSamples(
        mass_kg=mass,
        cda_tense_m2=tense,
        cda_spread_m2=spread,
        relaxes=relaxes,
        relax_fraction=fraction,
        righting_time_s=righting,
        launch_speed_mps=launch,
        position_fraction=position,
    )
