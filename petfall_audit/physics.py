"""Fall physics: air density, the closed-form two-posture fall, outward travel, interception by
the elements below, and time series for plots. SI units throughout; no Qt.

Vertical motion with quadratic drag, ``m dv/dt = m g − ½ ρ C_d A v²`` (Taylor, *Classical
Mechanics*, 2005, §2.4). The cat falls tense (``cda_tense_m2``) until its speed reaches
``relax_fraction`` × its tense terminal speed, then spreads out (``cda_spread_m2`` ≥ tense) and
tends to the spread terminal speed, slowing down if it was faster. Both postures have exact
closed forms, so every opening × every sampled cat is one array computation; ``solve_ivp`` is
the reference in the tests. The time series of :func:`fall_profile` integrate the smooth
spreading out with a fixed-step Runge–Kutta method (the rest of the fall in closed form).

The results are an indicative model for ranking openings: not a structural or code-compliance
assessment.
"""

from __future__ import annotations

from collections.abc import Callable

import numpy as np
import numpy.typing as npt
from numpy.typing import ArrayLike

from petfall_audit import _physics_kernels as _k
from petfall_audit._interception import simulate as _simulate
from petfall_audit._physics_kernels import G0
from petfall_audit._physics_results import GROUND_ID, FallProfile, FallResults
from petfall_audit.model import Building
from petfall_audit.sampling import CatSamples

__all__ = [
    "G0",
    "GROUND_ID",
    "R_AIR",
    "air_density",
    "isa_temperature_c",
    "terminal_speed",
    "impact_speed",
    "peak_speed_of_falls",
    "fall_time",
    "switch_drop",
    "outward_travel_m",
    "drop_to_reach_m",
    "FallResults",
    "simulate_falls",
    "FallProfile",
    "fall_profile",
]

FloatArray = npt.NDArray[np.float64]
FloatOrArray = float | FloatArray

#: Specific gas constant of dry air (J/(kg·K)), ISO 2533.
R_AIR = 287.05287

# ISO 2533:1975 (= ICAO Doc 7488/3) troposphere
_T0_K = 288.15
_P0_PA = 101_325.0
_LAPSE_K_PER_M = 0.0065
_EARTH_RADIUS_M = 6_356_766.0  # ISO 2533 radius for geopotential altitude
_ALTITUDE_RANGE_M = (-1_000.0, 11_000.0)


# --- argument checks -----------------------------------------------------------------------------


def _as_float(name: str, value: ArrayLike) -> FloatArray:
    try:
        a = np.asarray(value, dtype=float)
    except (TypeError, ValueError) as exc:
        raise ValueError(f"{name} must be a number or an array of numbers") from exc
    if not np.all(np.isfinite(a)):
        raise ValueError(f"{name} must be finite (no NaN or infinity)")
    return a


def _positive(name: str, value: ArrayLike) -> FloatArray:
    a = _as_float(name, value)
    if not np.all(a > 0):
        raise ValueError(f"{name} must be positive, got min {float(np.min(a))}")
    return a


def _non_negative(name: str, value: ArrayLike) -> FloatArray:
    a = _as_float(name, value)
    if not np.all(a >= 0):
        raise ValueError(f"{name} must not be negative, got min {float(np.min(a))}")
    return a


def _fraction(name: str, value: ArrayLike) -> FloatArray:
    a = _as_float(name, value)
    if not np.all((a > 0) & (a < 1)):
        raise ValueError(f"{name} must lie strictly between 0 and 1")
    return a


def _out(a: FloatArray) -> FloatOrArray:
    return float(a) if a.ndim == 0 else a


def _fall_args(
    mass_kg: ArrayLike, cda_tense_m2: ArrayLike, cda_spread_m2: ArrayLike,
    relax_fraction: ArrayLike, rho_kg_m3: ArrayLike,
    g: ArrayLike,
) -> tuple[FloatArray, FloatArray, FloatArray, float]:
    """Checked ``(beta_tense, beta_spread, relax_fraction, g)``."""
    m = _positive("mass_kg", mass_kg)
    c1 = _positive("cda_tense_m2", cda_tense_m2)
    c2 = _positive("cda_spread_m2", cda_spread_m2)
    f = _fraction("relax_fraction", relax_fraction)
    rho = _positive("rho_kg_m3", rho_kg_m3)
    g_ = _positive("g", g)
    if g_.ndim:
        raise ValueError("g must be a scalar")
    if not np.all(c2 >= c1):
        raise ValueError("cda_spread_m2 must not be smaller than cda_tense_m2")
    return _k.drag_per_mass(rho, c1, m), _k.drag_per_mass(rho, c2, m), f, float(g_)


# --- atmosphere ----------------------------------------------------------------------------------


def isa_temperature_c(altitude_m: ArrayLike) -> FloatOrArray:
    """ISO 2533 standard-atmosphere temperature (°C) at geometric ``altitude_m`` (troposphere)."""
    h = _altitude(altitude_m)
    geopotential_m = _EARTH_RADIUS_M * h / (_EARTH_RADIUS_M + h)
    return _out(_T0_K - _LAPSE_K_PER_M * geopotential_m - 273.15)


def _altitude(altitude_m: ArrayLike) -> FloatArray:
    h = _as_float("altitude_m", altitude_m)
    lo, hi = _ALTITUDE_RANGE_M
    if not np.all((h >= lo) & (h <= hi)):
        raise ValueError(f"altitude_m must lie in [{lo:g}, {hi:g}] m (the troposphere)")
    return h


def air_density(altitude_m: ArrayLike, temperature_c: ArrayLike) -> FloatOrArray:
    """Air density (kg/m³) at the site: ISO 2533 / ICAO standard-atmosphere pressure at geometric
    ``altitude_m`` (m above mean sea level, troposphere), ideal gas at ``temperature_c`` (°C):
    ``ρ = p / (R T)``. Dry air; 1.225 kg/m³ at sea level and 15 °C."""
    h = _altitude(altitude_m)
    t_c = _as_float("temperature_c", temperature_c)
    if not np.all(t_c > -273.15):
        raise ValueError("temperature_c must be above absolute zero (-273.15 °C)")
    geopotential_m = _EARTH_RADIUS_M * h / (_EARTH_RADIUS_M + h)
    t_isa_k = _T0_K - _LAPSE_K_PER_M * geopotential_m
    p_pa = _P0_PA * (t_isa_k / _T0_K) ** (G0 / (R_AIR * _LAPSE_K_PER_M))
    return _out(np.asarray(p_pa / (R_AIR * (t_c + 273.15)), dtype=float))


# --- vertical fall -------------------------------------------------------------------------------


def terminal_speed(
    mass_kg: ArrayLike, cda_m2: ArrayLike, rho_kg_m3: ArrayLike, g: float = G0,
) -> FloatOrArray:
    """Terminal speed (m/s) ``sqrt(2 m g / (ρ C_d A))``."""
    m = _positive("mass_kg", mass_kg)
    c = _positive("cda_m2", cda_m2)
    rho = _positive("rho_kg_m3", rho_kg_m3)
    g_ = float(_positive("g", g))
    return _out(np.sqrt(2.0 * m * g_ / (rho * c)))


def impact_speed(
    drop_m: ArrayLike, *, mass_kg: ArrayLike, cda_tense_m2: ArrayLike, cda_spread_m2: ArrayLike,
    relax_fraction: ArrayLike,
    rho_kg_m3: ArrayLike, g: float = G0,
) -> FloatOrArray:
    """Speed (m/s) after falling ``drop_m`` (m) from rest in two postures; broadcasts.

    ``cda_spread_m2 == cda_tense_m2`` is a cat that never spreads out. As ``rho_kg_m3 → 0`` the
    result tends to ``sqrt(2 g h)``. Invalid arguments raise ``ValueError`` naming them."""
    h = _non_negative("drop_m", drop_m)
    b1, b2, f, g_ = _fall_args(mass_kg, cda_tense_m2, cda_spread_m2, relax_fraction, rho_kg_m3, g)
    v, _ = _k.two_posture(h, b1, b2, f, g_)
    return _out(v)


def fall_time(
    drop_m: ArrayLike, *, mass_kg: ArrayLike, cda_tense_m2: ArrayLike, cda_spread_m2: ArrayLike,
    relax_fraction: ArrayLike,
    rho_kg_m3: ArrayLike, g: float = G0,
) -> FloatOrArray:
    """Time (s) to fall ``drop_m`` (m) from rest in two postures; same arguments as
    :func:`impact_speed`."""
    h = _non_negative("drop_m", drop_m)
    b1, b2, f, g_ = _fall_args(mass_kg, cda_tense_m2, cda_spread_m2, relax_fraction, rho_kg_m3, g)
    _, t = _k.two_posture(h, b1, b2, f, g_)
    return _out(t)


def switch_drop(
    *, mass_kg: ArrayLike, cda_tense_m2: ArrayLike, relax_fraction: ArrayLike,
    rho_kg_m3: ArrayLike, g: float = G0,
) -> FloatOrArray:
    """Drop (m) after which a relaxing cat spreads out: ``−v_t² ln(1 − f²) / (2 g)``."""
    b1, _, f, _g = _fall_args(mass_kg, cda_tense_m2, cda_tense_m2, relax_fraction, rho_kg_m3, g)
    return _out(_k.switch_drop_m(b1, f))


# --- outward travel ------------------------------------------------------------------------------


def outward_travel_m(
    drop_m: ArrayLike, *, launch_speed_mps: ArrayLike, mass_kg: ArrayLike, cda_tense_m2: ArrayLike,
    cda_spread_m2: ArrayLike,
    relax_fraction: ArrayLike, rho_kg_m3: ArrayLike, g: float = G0,
) -> FloatOrArray:
    """Outward distance (m) from the perch when the cat has dropped ``drop_m`` (m), having left
    it horizontally at ``launch_speed_mps`` (m/s).

    Approximation: with coupled quadratic drag ``dv/dt = g − β|v| v`` (``β = ρ C_d A / 2m``) the
    outward speed decays along the path as ``v0 e^{−β s}``; taking the path length ``s`` as the
    drop and the vertical motion from the closed-form fall gives closed forms in both postures
    (an arccos in the tense posture; asinh or asin after the switch). It slightly overestimates
    the travel (the neglected outward speed adds to the drag): against a 2-D ``solve_ivp`` with
    coupled drag, 0 to +2 % for launch speeds up to 2.5 m/s, 0 to +4 % up to 4 m/s, +7 % up to
    6 m/s, +13 % up to 10 m/s and +31 % up to 20 m/s (the most a building file accepts), drops
    0.5–200 m (tests/test_interception.py). Overestimating sends cats past ledges that might have
    caught them: the cautious side."""
    h = _non_negative("drop_m", drop_m)
    v0 = _non_negative("launch_speed_mps", launch_speed_mps)
    b1, b2, f, g_ = _fall_args(mass_kg, cda_tense_m2, cda_spread_m2, relax_fraction, rho_kg_m3, g)
    return _out(_k.outward_travel(h, v0, b1, b2, f, g_))


def drop_to_reach_m(
    distance_m: ArrayLike, *, launch_speed_mps: ArrayLike, mass_kg: ArrayLike,
    cda_tense_m2: ArrayLike,
    cda_spread_m2: ArrayLike, relax_fraction: ArrayLike, rho_kg_m3: ArrayLike, g: float = G0,
) -> FloatOrArray:
    """Drop (m) at which the outward travel of :func:`outward_travel_m` reaches ``distance_m``
    (m): its exact inverse; 0 for distances ≤ 0, ``inf`` where the cat never gets that far out."""
    d = _as_float("distance_m", distance_m)
    v0 = _non_negative("launch_speed_mps", launch_speed_mps)
    b1, b2, f, g_ = _fall_args(mass_kg, cda_tense_m2, cda_spread_m2, relax_fraction, rho_kg_m3, g)
    return _out(_k.drop_to_reach(d, v0, b1, b2, f, g_))


# --- the whole building --------------------------------------------------------------------------


def simulate_falls(
    building: Building,
    samples: CatSamples,
    *,
    progress: Callable[[int, int], None] | None = None,
) -> FallResults:
    """Simulate a fall of every sampled cat from every opening of ``building``.

    The cat leaves the perch (floor elevation + ``perch_height_m``) at the facade for windows
    and at the outer edge (``projection_m`` out) for balconies, terraces and galleries, at
    ``x_m + position_fraction × width_m`` along the facade. Going down, the first (highest)
    element that catches it is where it lands: a lower balcony, terrace or gallery on the same
    facade that spans that position and projects further than the cat has travelled outward by
    the time it gets down to it, or a surface (of that facade or of every facade) whose outward
    extent ``[from_facade_m, to_facade_m)`` contains the outward travel at its elevation.
    A surface catches only over its extent along the facade (``x_from_m`` to ``x_to_m``) when it
    has one; a sunken surface (below the datum: a lightwell, a basement area) catches a cat that
    is over its footprint when it passes the rim (the datum), whatever its outward travel further
    down. Elements at or above the start height never catch; the implicit ground (datum 0)
    catches the rest (``check`` refuses a building with a gap below an opening, so in a file that
    loads it is never reached). The impact speed is the speed itself, downward and outward parts
    together. ``progress(done, total)`` is called as openings are done.
    """
    info = building.info
    rho = float(air_density(info.site_altitude_m, info.air_temperature_c))
    return _simulate(building, samples, rho_kg_m3=rho, progress=progress)


def peak_speed_of_falls(falls: FallResults, samples: CatSamples) -> FloatArray:
    """Highest speed (m/s) each simulated fall reaches, shape ``(n_openings, n_samples)``.

    A cat that spreads out after the switch drop can land a little slower than it was falling at
    the switch (the spread terminal speed is lower); this is that higher speed, else the impact
    speed. The injury dose uses it so that no fall is credited with the slow-down: the later
    case series did not find high falls gentler (docs/risk-model.md)."""
    m = np.asarray(samples.mass_kg, dtype=float)
    b1 = _k.drag_per_mass(falls.rho_kg_m3, samples.cda_tense_m2, m)
    f = np.asarray(samples.relax_fraction, dtype=float)
    relaxes = np.asarray(samples.cda_spread_m2, dtype=float) > np.asarray(
        samples.cda_tense_m2, dtype=float)
    hs = np.where(relaxes, _k.switch_drop_m(b1, f), np.inf)
    v_switch = _k.switch_speed(samples.launch_speed_mps, b1, f, G0)
    return _k.peak_speed(falls.drop_m, falls.impact_speed_mps, hs[None, :], v_switch[None, :])


# --- time series ---------------------------------------------------------------------------------


def fall_profile(
    drop_m: float, *, mass_kg: float, cda_tense_m2: float, cda_spread_m2: float,
    relax_fraction: float, rho_kg_m3: float, transition_s: float = 0.3, g: float = G0,
    n_points: int = 400,
) -> FallProfile:
    """Height, speed and acceleration against time for one fall of ``drop_m`` (m): the closed
    forms while the posture holds, the spreading out integrated with the classical fourth-order
    Runge–Kutta method on a fixed grid (``petfall_audit._physics_profile``).

    The cat spreads out smoothly: after the switch its C_d·A moves from tense to spread over
    ``transition_s`` seconds (a smoothstep), so the impact speed and fall time here differ
    slightly from the closed form, which switches at once (``transition_s=0`` matches it)."""
    from petfall_audit._physics_profile import profile

    h = float(_non_negative("drop_m", drop_m))
    b1, b2, f, g_ = _fall_args(mass_kg, cda_tense_m2, cda_spread_m2, relax_fraction, rho_kg_m3, g)
    tr = float(_non_negative("transition_s", transition_s))
    if isinstance(n_points, bool) or not isinstance(n_points, int | np.integer) or n_points < 2:
        raise ValueError(f"n_points must be an integer of at least 2, got {n_points!r}")
    return profile(h, float(b1), float(b2), float(f), g_, tr, int(n_points))
