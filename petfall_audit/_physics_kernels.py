"""Closed-form fall kernels, without argument checks (private; SI units throughout).

Notation: ``beta = rho·C_d·A / (2 m)`` (1/m) is the drag per unit mass over speed squared, so
``dv/dt = g − beta v²`` and the terminal speed is ``vt = sqrt(g / beta)``. All functions
broadcast over numpy arrays and are written in forms that stay finite as ``beta → 0``.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

FloatArray = npt.NDArray[np.float64]
ArrayLike = npt.ArrayLike

#: Standard gravity (m/s²), ISO 2533 / ICAO.
G0 = 9.80665


def drag_per_mass(rho_kg_m3: ArrayLike, cda_m2: ArrayLike, mass_kg: ArrayLike) -> FloatArray:
    """``beta = rho C_d A / (2 m)`` in 1/m."""
    out: FloatArray = np.asarray(rho_kg_m3) * np.asarray(cda_m2) / (2.0 * np.asarray(mass_kg))
    return out


def switch_drop_m(beta_tense: ArrayLike, relax_fraction: ArrayLike) -> FloatArray:
    """Drop (m) at which a cat falling tense from rest reaches ``relax_fraction`` × its tense
    terminal speed: ``h_s = −ln(1 − f²) / (2 beta)`` (from ``v² = vt² (1 − e^{−2 beta h})``)."""
    f = np.asarray(relax_fraction, dtype=float)
    with np.errstate(divide="ignore", over="ignore"):
        out: FloatArray = -np.log1p(-f * f) / (2.0 * np.asarray(beta_tense, dtype=float))
    return out


def segment(
    v0_mps: ArrayLike, d_m: ArrayLike, beta: ArrayLike, vt_mps: ArrayLike, g: float
) -> tuple[FloatArray, FloatArray]:
    """Speed (m/s) and time (s) after a drop ``d_m`` with constant ``beta``, from speed ``v0``.

    ``v² = vt² + (v0² − vt²) e^{−2 beta d}`` whether the cat speeds up or slows down, and
    ``t = (vt/g) [ln((vt + v)/(vt + v0)) + beta d]`` (the tanh and coth branches written as one
    expression; ``beta d vt / g = d / vt``). Stable for ``beta → 0`` (gives free fall)."""
    v0 = np.asarray(v0_mps, dtype=float)
    d = np.asarray(d_m, dtype=float)
    vt = np.asarray(vt_mps, dtype=float)
    e = -np.expm1(-2.0 * np.asarray(beta) * d)
    v = np.sqrt(v0 * v0 + (vt * vt - v0 * v0) * e)
    t = (vt / g) * np.log1p((v - v0) / (vt + v0)) + d / vt
    return v, t


def two_posture(
    drop_m: ArrayLike,
    beta_tense: ArrayLike,
    beta_spread: ArrayLike,
    relax_fraction: ArrayLike,
    g: float,
) -> tuple[FloatArray, FloatArray]:
    """Impact speed (m/s) and fall time (s) of the two-posture fall from rest over ``drop_m``.

    Tense (``beta_tense``) up to the switch drop, then spread (``beta_spread``) from the speed
    reached there. Equal betas give the one-posture fall exactly."""
    h = np.asarray(drop_m, dtype=float)
    b1 = np.asarray(beta_tense, dtype=float)
    b2 = np.asarray(beta_spread, dtype=float)
    hs = switch_drop_m(b1, relax_fraction)
    h1 = np.minimum(h, hs)
    v1, t1 = segment(0.0, h1, b1, np.sqrt(g / b1), g)
    v2, t2 = segment(v1, h - h1, b2, np.sqrt(g / b2), g)
    return v2, t1 + t2


# --- outward travel ------------------------------------------------------------------------------
#
# Approximation (documented in physics.outward_travel_m): the horizontal speed obeys the coupled
# drag law dvx/dt = −beta |v| vx, i.e. dvx/ds = −beta vx along the path s, so vx = v0 e^{−beta s}.
# We take the path length s equal to the vertical drop h (the outward speed is small next to the
# falling speed) and the vertical motion from the one-dimensional closed form. Then
# x = ∫ vx / vy dh has closed forms in both postures:
#   tense:  x1(h) = v0 arccos(e^{−b1 h}) / sqrt(g b1)
#   spread: x2(d) = vxs / (b2 vt2) [F(1) − F(e^{−b2 d})],  F(u) = ∫0^u dw / sqrt(1 + σ a² w²)
# with vxs = v0 e^{−b1 h_s} = v0 sqrt(1 − f²), σ a² = (vs² − vt2²)/vt2² and vs = f vt1.


def _f_integral(a: FloatArray, sign: FloatArray, u: FloatArray) -> FloatArray:
    """``F(u) = ∫0^u dw / sqrt(1 + sign a² w²)``: asinh (sign > 0), asin (sign < 0) or u."""
    z = a * u
    small = a < 1e-5
    a_safe = np.where(small, 1.0, a)
    exact = np.where(sign > 0, np.arcsinh(z), np.arcsin(np.clip(z, -1.0, 1.0))) / a_safe
    series = u * (1.0 - sign * z * z / 6.0)
    out: FloatArray = np.where(small, series, exact)
    return out


def _f_inverse(a: FloatArray, sign: FloatArray, y: FloatArray) -> FloatArray:
    """Inverse of :func:`_f_integral` in ``u``."""
    z = a * y
    small = a < 1e-5
    a_safe = np.where(small, 1.0, a)
    exact = np.where(sign > 0, np.sinh(z), np.sin(np.clip(z, -np.pi / 2, np.pi / 2))) / a_safe
    series = y * (1.0 + sign * z * z / 6.0)
    out: FloatArray = np.where(small, series, exact)
    return out


def _spread_phase(
    beta_tense: FloatArray, beta_spread: FloatArray, relax_fraction: FloatArray, g: float
) -> tuple[FloatArray, FloatArray, FloatArray]:
    """``(a, sign, 1/(b2 vt2))`` of the spread-posture outward integral."""
    vs2 = relax_fraction**2 * (g / beta_tense)
    vt2sq = g / beta_spread
    c = vs2 - vt2sq
    a = np.sqrt(np.abs(c) / vt2sq)
    return a, np.sign(c), 1.0 / (beta_spread * np.sqrt(vt2sq))


def outward_travel(
    drop_m: ArrayLike,
    launch_speed_mps: ArrayLike,
    beta_tense: ArrayLike,
    beta_spread: ArrayLike,
    relax_fraction: ArrayLike,
    g: float,
) -> FloatArray:
    """Outward distance (m) travelled from the perch when the cat has dropped ``drop_m``."""
    h, v0, b1, b2, f = np.broadcast_arrays(
        *(np.asarray(x, dtype=float) for x in
          (drop_m, launch_speed_mps, beta_tense, beta_spread, relax_fraction))
    )
    hs = switch_drop_m(b1, f)
    h1 = np.minimum(h, hs)
    d2 = h - h1
    e = -np.expm1(-b1 * h1)
    x1 = v0 * 2.0 * np.arcsin(np.sqrt(e / 2.0)) / np.sqrt(g * b1)
    a, sign, k = _spread_phase(b1, b2, f, g)
    vxs = v0 * np.exp(-b1 * h1)
    u = np.exp(-b2 * d2)
    x2 = vxs * k * (_f_integral(a, sign, np.ones_like(u)) - _f_integral(a, sign, u))
    out: FloatArray = x1 + x2
    return out


def drop_to_reach(
    distance_m: ArrayLike,
    launch_speed_mps: ArrayLike,
    beta_tense: ArrayLike,
    beta_spread: ArrayLike,
    relax_fraction: ArrayLike,
    g: float,
) -> FloatArray:
    """Drop (m) at which the outward travel reaches ``distance_m``: the exact inverse of
    :func:`outward_travel`. 0 for distances ≤ 0; ``inf`` where the cat never gets that far."""
    dist, v0, b1, b2, f = np.broadcast_arrays(
        *(np.asarray(x, dtype=float) for x in
          (distance_m, launch_speed_mps, beta_tense, beta_spread, relax_fraction))
    )
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        hs = switch_drop_m(b1, f)
        s1 = np.sqrt(g * b1)
        moving = v0 > 0
        v0_safe = np.where(moving, v0, 1.0)
        x1max = v0 * np.arcsin(f) / s1
        # tense posture: x = v0 arccos(e^{-b1 h}) / s1  ->  h = -ln(cos θ) / b1
        theta = np.minimum(dist * s1 / v0_safe, np.arcsin(f))
        h_tense = -np.log1p(-2.0 * np.sin(theta / 2.0) ** 2) / b1
        # spread posture
        a, sign, k = _spread_phase(b1, b2, f, g)
        vxs = v0_safe * np.sqrt(1.0 - f * f)
        f_one = _f_integral(a, sign, np.ones_like(a))
        y = f_one - (dist - x1max) / (vxs * k)
        reachable = y > 0
        u = _f_inverse(a, sign, np.where(reachable, y, 1.0))
        u = np.clip(u, np.finfo(float).tiny, 1.0)
        h_spread = np.where(reachable, hs - np.log(u) / b2, np.inf)
        out = np.where(dist <= x1max, h_tense, h_spread)
        out = np.where(moving, out, np.inf)
        out = np.where(dist <= 0.0, 0.0, out)
    result: FloatArray = np.asarray(out, dtype=float)
    return result


def outward_speed(
    drop_m: ArrayLike,
    launch_speed_mps: ArrayLike,
    beta_tense: ArrayLike,
    beta_spread: ArrayLike,
    relax_fraction: ArrayLike,
) -> FloatArray:
    """Outward (horizontal) speed (m/s) after a drop ``drop_m`` from a launch at
    ``launch_speed_mps``: ``vx = v0 e^{−beta s}`` with the path length ``s`` taken as the drop,
    the same approximation as :func:`outward_travel` (tense up to the switch drop, then spread)."""
    h = np.asarray(drop_m, dtype=float)
    b1 = np.asarray(beta_tense, dtype=float)
    hs = switch_drop_m(b1, relax_fraction)
    h1 = np.minimum(h, hs)
    out: FloatArray = np.asarray(launch_speed_mps, dtype=float) * np.exp(
        -b1 * h1 - np.asarray(beta_spread, dtype=float) * (h - h1)
    )
    return out


def switch_speed(
    launch_speed_mps: ArrayLike, beta_tense: ArrayLike, relax_fraction: ArrayLike, g: float
) -> FloatArray:
    """Speed (m/s, downward and outward together) at the moment the cat spreads out: downward
    ``f vt1``, outward ``v0 e^{−beta h_s} = v0 sqrt(1 − f²)``."""
    f = np.asarray(relax_fraction, dtype=float)
    v0 = np.asarray(launch_speed_mps, dtype=float)
    vt1sq = g / np.asarray(beta_tense, dtype=float)
    out: FloatArray = np.sqrt(f * f * vt1sq + v0 * v0 * (1.0 - f * f))
    return out


def peak_speed(
    drop_m: ArrayLike, impact_speed_mps: ArrayLike, switch_drop: ArrayLike,
    switch_speed_mps: ArrayLike,
) -> FloatArray:
    """Highest speed (m/s) reached over a two-posture fall: the impact speed, or the speed at
    the posture switch when the cat got that far and slowed down after spreading out."""
    h = np.asarray(drop_m, dtype=float)
    v = np.asarray(impact_speed_mps, dtype=float)
    out: FloatArray = np.where(
        h >= np.asarray(switch_drop), np.maximum(v, np.asarray(switch_speed_mps)), v
    )
    return out


class FallConstants:
    """Per-sample constants of :func:`fall_rows` (1-D arrays over samples)."""

    __slots__ = ("hs", "m2b1", "vt1", "vt1_g", "inv_vt1", "m2b2", "vt2", "vt2sq", "vt2_g",
                 "inv_vt2")

    def __init__(self, beta_tense: FloatArray, beta_spread: FloatArray,
                 relax_fraction: FloatArray, g: float) -> None:
        self.hs = switch_drop_m(beta_tense, relax_fraction)
        self.m2b1 = -2.0 * beta_tense
        self.vt1 = np.sqrt(g / beta_tense)
        self.vt1_g = self.vt1 / g
        self.inv_vt1 = 1.0 / self.vt1
        self.m2b2 = -2.0 * beta_spread
        self.vt2 = np.sqrt(g / beta_spread)
        self.vt2sq = self.vt2 * self.vt2
        self.vt2_g = self.vt2 / g
        self.inv_vt2 = 1.0 / self.vt2


def fall_rows(h: FloatArray, c: FallConstants) -> tuple[FloatArray, FloatArray]:
    """:func:`two_posture` for ``h`` of shape ``(rows, n_samples)`` with precomputed per-sample
    constants, written with few temporaries (the hot path of the building simulation)."""
    h1 = np.minimum(h, c.hs)
    s = np.multiply(h1, c.m2b1)
    np.expm1(s, out=s)
    np.negative(s, out=s)
    np.sqrt(s, out=s)  # v / vt1 at the end of the tense part
    va = s * c.vt1
    t = np.log1p(s, out=s)
    t *= c.vt1_g
    h1 *= c.inv_vt1
    t += h1
    d2 = np.subtract(h, np.minimum(h, c.hs, out=h1), out=h1)
    e = np.multiply(d2, c.m2b2)
    np.expm1(e, out=e)
    np.negative(e, out=e)  # 1 - exp(-2 b2 d2)
    va2 = va * va
    vb = np.subtract(c.vt2sq, va2)
    vb *= e
    vb += va2
    np.sqrt(vb, out=vb)
    num = np.subtract(vb, va, out=e)
    va += c.vt2
    num /= va
    np.log1p(num, out=num)
    num *= c.vt2_g
    t += num
    d2 *= c.inv_vt2
    t += d2
    return vb, t
