"""Time series of one fall, for plots (private; SI units).

The fall obeys ``ds/dt = v``, ``dv/dt = g − β(t) v²`` from rest (``s`` the distance fallen).
While ``β`` is constant the motion has exact closed forms (from rest: ``v = vt tanh(t/τ)``; from
a speed ``v0`` above the terminal speed ``vt``: the ``coth`` branch; ``τ = vt/g``), so only the
cat's spreading out, when ``β`` moves from the tense to the spread value over ``transition_s``
(a smoothstep in time), is integrated: with the classical fourth-order Runge–Kutta method on a
fixed grid that starts at the switch and ends with the transition, so that ``β`` is a smooth
polynomial within every step. A landing within the transition is found within its step (the
same Runge–Kutta step, its length solved by bisection); values between the grid's nodes come
from cubic Hermite interpolation of the nodes' positions, speeds and accelerations.

The tests check the series against ``scipy.integrate.solve_ivp`` (an adaptive Runge–Kutta
method with events), which this module does not import: scipy's integrators take about 0.2 s to
load, more than a report's whole use of them.
"""

from __future__ import annotations

import math

import numpy as np

from petfall_audit import _physics_kernels as _k
from petfall_audit._physics_results import FallProfile

#: Runge–Kutta steps over the transition (at least); a step is also at most 1/400 of the spread
#: posture's time constant ``vt/g``: the method's error then stays near 1e-10 of the speed.
_MIN_STEPS = 200
_STEPS_PER_TAU = 400
_BISECTIONS = 60  # halvings of a step's length to find the landing (to ~1e-18 of the step)


def _smoothstep(x: np.ndarray) -> np.ndarray:
    """0 before 0, 1 after 1, ``3x² − 2x³`` between (continuous slope)."""
    x = np.clip(x, 0.0, 1.0)
    out: np.ndarray = x * x * (3.0 - 2.0 * x)
    return out


def _log_cosh(x: np.ndarray) -> np.ndarray:
    """``ln cosh x`` for ``x ≥ 0``, without overflow."""
    out: np.ndarray = x + np.log1p(np.exp(-2.0 * x)) - math.log(2.0)
    return out


def _log_sinh(x: np.ndarray) -> np.ndarray:
    """``ln sinh x`` for ``x > 0``, without overflow."""
    out: np.ndarray = x + np.log1p(-np.exp(-2.0 * x)) - math.log(2.0)
    return out


def _constant_beta(t: np.ndarray, t0: float, s0: float, v0: float, beta: float,
                   g: float) -> tuple[np.ndarray, np.ndarray]:
    """Distance fallen (m) and speed (m/s) at times ``t ≥ t0`` under a constant ``beta`` from
    ``s0`` and ``v0 ≥ 0`` at ``t0`` (the exact solution: tanh below, coth above ``vt``)."""
    vt = math.sqrt(g / beta)
    tau = vt / g
    u = (np.asarray(t, dtype=float) - t0) / tau
    if v0 < vt:
        a0 = math.atanh(v0 / vt)
        speed = vt * np.tanh(a0 + u)
        fallen = s0 + vt * tau * (_log_cosh(a0 + u) - _log_cosh(np.asarray(a0)))
    elif v0 > vt:
        a0 = math.atanh(vt / v0)
        speed = vt / np.tanh(a0 + u)
        fallen = s0 + vt * tau * (_log_sinh(a0 + u) - _log_sinh(np.asarray(a0)))
    else:
        speed = np.full(u.shape, vt)
        fallen = s0 + vt * (np.asarray(t, dtype=float) - t0)
    return fallen, speed


class _Transition:
    """The fall while the cat spreads out, on the Runge–Kutta grid (see the module docstring):
    from the switch at ``t0`` (fallen ``s0``, speed ``v0``) until the transition ends at
    ``t0 + span`` or the cat has fallen ``drop_m``, whichever comes first."""

    def __init__(self, t0: float, s0: float, v0: float, b1: float, b2: float, g: float,
                 span: float, drop_m: float) -> None:
        self.t0, self.span, self.b1, self.b2, self.g = t0, span, b1, b2, g
        tau2 = math.sqrt(g / b2) / g
        n = max(_MIN_STEPS, math.ceil(span * _STEPS_PER_TAU / tau2))
        h = span / n
        times, fallen, speed = [t0], [s0], [v0]
        s, v = s0, v0
        self.landed = False
        for k in range(n):
            t = t0 + k * h
            s1, v1 = self._step(t, s, v, h)
            if s1 >= drop_m:  # lands within this step: the step's length that ends at drop_m
                lo, hi = 0.0, h
                for _ in range(_BISECTIONS):
                    mid = 0.5 * (lo + hi)
                    if self._step(t, s, v, mid)[0] < drop_m:
                        lo = mid
                    else:
                        hi = mid
                s1, v1 = self._step(t, s, v, hi)
                times.append(t + hi)
                fallen.append(drop_m)
                speed.append(v1)
                self.landed = True
                break
            s, v = s1, v1
            times.append(t0 + (k + 1) * h if k + 1 < n else t0 + span)
            fallen.append(s)
            speed.append(v)
        self.t = np.array(times)
        self.s = np.array(fallen)
        self.v = np.array(speed)
        self.a = g - self.beta(self.t) * self.v * self.v

    def beta(self, t: np.ndarray | float) -> np.ndarray:
        """``β`` (1/m) at times ``t`` within the transition."""
        w = _smoothstep((np.asarray(t, dtype=float) - self.t0) / self.span)
        out: np.ndarray = self.b1 + (self.b2 - self.b1) * w
        return out

    def _beta(self, t: float) -> float:
        x = min(max((t - self.t0) / self.span, 0.0), 1.0)
        return self.b1 + (self.b2 - self.b1) * x * x * (3.0 - 2.0 * x)

    def _step(self, t: float, s: float, v: float, h: float) -> tuple[float, float]:
        """One classical Runge–Kutta step of length ``h`` from ``(s, v)`` at ``t``."""
        g, beta = self.g, self._beta
        half = 0.5 * h
        b_mid = beta(t + half)
        k1s, k1v = v, g - beta(t) * v * v
        v2 = v + half * k1v
        k2s, k2v = v2, g - b_mid * v2 * v2
        v3 = v + half * k2v
        k3s, k3v = v3, g - b_mid * v3 * v3
        v4 = v + h * k3v
        k4s, k4v = v4, g - beta(t + h) * v4 * v4
        return (s + h / 6.0 * (k1s + 2.0 * k2s + 2.0 * k3s + k4s),
                v + h / 6.0 * (k1v + 2.0 * k2v + 2.0 * k3v + k4v))

    def at(self, t: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Distance fallen (m) and speed (m/s) at times ``t`` within the grid (cubic Hermite
        interpolation between its nodes)."""
        i = np.clip(np.searchsorted(self.t, t, side="right") - 1, 0, self.t.size - 2)
        h = self.t[i + 1] - self.t[i]
        x = (t - self.t[i]) / h
        h00 = (1.0 + 2.0 * x) * (1.0 - x) ** 2
        h10 = x * (1.0 - x) ** 2
        h01 = x * x * (3.0 - 2.0 * x)
        h11 = x * x * (x - 1.0)
        s = h00 * self.s[i] + h10 * h * self.v[i] + h01 * self.s[i + 1] + h11 * h * self.v[i + 1]
        v = h00 * self.v[i] + h10 * h * self.a[i] + h01 * self.v[i + 1] + h11 * h * self.a[i + 1]
        return s, v


def profile(
    drop_m: float, beta_tense: float, beta_spread: float, relax_fraction: float, g: float,
    transition_s: float, n_points: int,
) -> FallProfile:
    """The time series of one fall from rest over ``drop_m`` (m), sampled at ``n_points``
    evenly spaced times from 0 to the landing.

    ``β(t)`` is the tense value until the speed reaches ``relax_fraction`` × the tense terminal
    speed, then moves to the spread value over ``transition_s`` (instantly if 0)."""
    if drop_m == 0.0:
        zeros = np.zeros(n_points)
        return FallProfile(zeros, zeros.copy(), zeros.copy(), np.full(n_points, g), None,
                           0.0, 0.0, 0.0)
    b1, b2 = beta_tense, beta_spread
    vt1 = math.sqrt(g / b1)
    h_switch = float(_k.switch_drop_m(b1, relax_fraction))
    if not (b2 > b1 and drop_m > h_switch):  # tense all the way down
        impact, t_land = (float(x) for x in _k.segment(0.0, drop_m, b1, vt1, g))
        t = np.linspace(0.0, t_land, n_points)
        fallen, speed = _constant_beta(t, 0.0, 0.0, 0.0, b1, g)
        beta = np.full(n_points, b1)
        return _series(t, fallen, speed, beta, g, None, impact, t_land, drop_m)

    v_switch = relax_fraction * vt1
    t_switch = float(_k.segment(0.0, h_switch, b1, vt1, g)[1])
    transition = (_Transition(t_switch, h_switch, v_switch, b1, b2, g, transition_s, drop_m)
                  if transition_s > 0.0 else None)
    if transition is not None and transition.landed:
        t_land, impact = float(transition.t[-1]), float(transition.v[-1])
        t_spread = math.inf
        s_spread = v_spread = math.nan
    else:
        t_spread = t_switch if transition is None else float(transition.t[-1])
        s_spread = h_switch if transition is None else float(transition.s[-1])
        v_spread = v_switch if transition is None else float(transition.v[-1])
        v_end, dt = _k.segment(v_spread, drop_m - s_spread, b2, math.sqrt(g / b2), g)
        impact, t_land = float(v_end), t_spread + float(dt)

    t = np.linspace(0.0, t_land, n_points)
    fallen = np.empty(n_points)
    speed = np.empty(n_points)
    beta = np.empty(n_points)
    tense = t < t_switch
    fallen[tense], speed[tense] = _constant_beta(t[tense], 0.0, 0.0, 0.0, b1, g)
    beta[tense] = b1
    spread = t >= t_spread
    if np.any(spread):
        fallen[spread], speed[spread] = _constant_beta(t[spread], t_spread, s_spread, v_spread,
                                                       b2, g)
        beta[spread] = b2
    between = ~tense & ~spread
    if np.any(between):
        assert transition is not None
        fallen[between], speed[between] = transition.at(t[between])
        beta[between] = transition.beta(t[between])
    return _series(t, fallen, speed, beta, g, t_switch, impact, t_land, drop_m)


def _series(t: np.ndarray, fallen: np.ndarray, speed: np.ndarray, beta: np.ndarray, g: float,
            t_switch: float | None, impact: float, t_land: float, drop_m: float) -> FallProfile:
    """The :class:`FallProfile` of the sampled series (the last sample is the landing)."""
    fallen = np.clip(fallen, 0.0, drop_m)
    fallen[-1] = drop_m
    speed[-1] = impact
    return FallProfile(
        t_s=t,
        height_m=drop_m - fallen,
        speed_mps=speed,
        accel_mps2=g - beta * speed * np.abs(speed),
        switch_time_s=t_switch,
        impact_speed_mps=impact,
        fall_time_s=t_land,
        drop_m=drop_m,
    )
