"""Time series of one fall from ``scipy.integrate.solve_ivp`` (private; SI units)."""

from __future__ import annotations

import math
from collections.abc import Callable

import numpy as np
from scipy.integrate import solve_ivp

from petfall_audit import _physics_kernels as _k
from petfall_audit._physics_results import FallProfile

_RTOL = 1e-10
_ATOL = 1e-10


def _smoothstep(x: np.ndarray) -> np.ndarray:
    """0 before 0, 1 after 1, ``3x² − 2x³`` between (continuous slope)."""
    x = np.clip(x, 0.0, 1.0)
    out: np.ndarray = x * x * (3.0 - 2.0 * x)
    return out


def profile(
    drop_m: float, beta_tense: float, beta_spread: float, relax_fraction: float, g: float,
    transition_s: float, n_points: int,
) -> FallProfile:
    """Integrate ``dh/dt = v``, ``dv/dt = g − β(t) v²`` until the cat has dropped ``drop_m``.

    ``β(t)`` is the tense value until the speed reaches ``relax_fraction`` × the tense terminal
    speed, then moves to the spread value over ``transition_s`` (instantly if 0)."""
    if drop_m == 0.0:
        zeros = np.zeros(n_points)
        return FallProfile(zeros, zeros.copy(), zeros.copy(), np.full(n_points, g), None,
                           0.0, 0.0, 0.0)
    relaxes = beta_spread > beta_tense
    v_switch = relax_fraction * math.sqrt(g / beta_tense)
    _, t_closed = _k.two_posture(drop_m, beta_tense, beta_spread, relax_fraction, g)
    t_max = 2.0 * float(t_closed) + 1.0

    def beta_of(t: np.ndarray | float, t_switch: float | None) -> np.ndarray:
        t = np.asarray(t, dtype=float)
        if t_switch is None:
            return np.full(t.shape, beta_tense)
        if transition_s == 0.0:
            w = (t >= t_switch).astype(float)
        else:
            w = _smoothstep((t - t_switch) / transition_s)
        out: np.ndarray = beta_tense + (beta_spread - beta_tense) * w
        return out

    def rhs(t_switch: float | None) -> Callable[[float, np.ndarray], list[float]]:
        def f(t: float, y: np.ndarray) -> list[float]:
            b = float(beta_of(t, t_switch))
            return [y[1], g - b * y[1] * abs(y[1])]

        return f

    def landed(t: float, y: np.ndarray) -> float:
        return float(y[0] - drop_m)

    landed.terminal = True  # type: ignore[attr-defined]
    landed.direction = 1.0  # type: ignore[attr-defined]

    def switched(t: float, y: np.ndarray) -> float:
        return float(y[1] - v_switch)

    switched.terminal = True  # type: ignore[attr-defined]
    switched.direction = 1.0  # type: ignore[attr-defined]

    events = [landed, switched] if relaxes else [landed]
    first = solve_ivp(rhs(None), (0.0, t_max), [0.0, 0.0], events=events, dense_output=True,
                      rtol=_RTOL, atol=_ATOL)
    t_switch: float | None = None
    pieces = [(0.0, first)]
    if relaxes and first.t_events[1].size and not first.t_events[0].size:
        t_switch = float(first.t_events[1][0])
        y0 = first.y_events[1][0]
        max_step = transition_s / 8.0 if transition_s > 0 else math.inf
        second = solve_ivp(rhs(t_switch), (t_switch, t_switch + t_max), y0, events=[landed],
                           dense_output=True, rtol=_RTOL, atol=_ATOL, max_step=max_step)
        pieces.append((t_switch, second))
    last = pieces[-1][1]
    if not last.t_events[0].size:  # pragma: no cover - t_max is an upper bound of the fall time
        raise RuntimeError("the fall did not end within the expected time")
    t_land = float(last.t_events[0][0])
    impact = float(last.y_events[0][0][1])

    t = np.linspace(0.0, t_land, n_points)
    y = np.empty((2, n_points))
    for start, sol in pieces:
        sel = t >= start
        y[:, sel] = sol.sol(t[sel])
    fallen = np.clip(y[0], 0.0, drop_m)
    fallen[-1] = drop_m
    speed = y[1]
    speed[-1] = impact
    accel = g - beta_of(t, t_switch) * speed * np.abs(speed)
    return FallProfile(
        t_s=t,
        height_m=drop_m - fallen,
        speed_mps=speed,
        accel_mps2=accel,
        switch_time_s=t_switch,
        impact_speed_mps=impact,
        fall_time_s=t_land,
        drop_m=drop_m,
    )
