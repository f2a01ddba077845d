"""Time the fall-physics engine on the large tower and print the figures and ratios.

Run: ``python benchmarks/bench_physics.py [--samples N] [--repeats R]``.

(a) time per fall of a per-opening ``solve_ivp`` baseline with events (2-D fall with coupled
    drag, posture switch and landing as events);
(b) time per fall of the vectorised engine (= c / number of falls);
(c) time to simulate the whole large tower (60 floors × 20 openings) with N samples;
(d) a bare numpy evaluation of the closed-form two-posture speed on an array of the same size.
Targets: a/b ≥ 20,000; c/d ≤ 3; peak memory of (c) under 1 GB.
"""

from __future__ import annotations

import argparse
import math

import numpy as np
from _common import large_tower, median_time_s, peak_memory_bytes
from scipy.integrate import solve_ivp

from petfall_audit.physics import G0, simulate_falls
from petfall_audit.sampling import CatSamples, sample_cat_profile


def baseline_fall(drop_m: float, cat: CatSamples, i: int, rho: float) -> tuple[float, float]:
    """One fall of cat ``i`` integrated with ``solve_ivp`` (events: switch, landing)."""
    m = float(cat.mass_kg[i])
    b1 = rho * float(cat.cda_tense_m2[i]) / (2 * m)
    b2 = rho * float(cat.cda_spread_m2[i]) / (2 * m)
    v_switch = float(cat.relax_fraction[i]) * math.sqrt(G0 / b1)

    def rhs(beta: float):  # type: ignore[no-untyped-def]
        def f(t: float, y: np.ndarray) -> list[float]:
            speed = math.hypot(y[2], y[3])
            return [y[2], y[3], -beta * speed * y[2], G0 - beta * speed * y[3]]

        return f

    def landed(t: float, y: np.ndarray) -> float:
        return float(y[1] - drop_m)

    def switched(t: float, y: np.ndarray) -> float:
        return float(y[3] - v_switch)

    landed.terminal = switched.terminal = True  # type: ignore[attr-defined]
    y0 = [0.0, 0.0, float(cat.launch_speed_mps[i]), 0.0]
    sol = solve_ivp(rhs(b1), (0, 1e3), y0, events=[landed, switched], rtol=1e-8, atol=1e-9)
    if sol.t_events[1].size and not sol.t_events[0].size:
        t0 = float(sol.t_events[1][0])
        sol = solve_ivp(rhs(b2), (t0, t0 + 1e3), sol.y_events[1][0], events=[landed],
                        rtol=1e-8, atol=1e-9)
    return float(sol.y_events[0][0][3]), float(sol.t_events[0][0])


def bare_speed(drop_m: np.ndarray, cat: CatSamples, rho: float) -> np.ndarray:
    """The closed-form two-posture speed written plainly, on the whole array at once."""
    m, f = cat.mass_kg, cat.relax_fraction
    vt1 = np.sqrt(2 * m * G0 / (rho * cat.cda_tense_m2))
    vt2 = np.sqrt(2 * m * G0 / (rho * cat.cda_spread_m2))
    hs = -vt1**2 * np.log1p(-(f**2)) / (2 * G0)
    vs2 = (f * vt1) ** 2
    tense = vt1 * np.sqrt(-np.expm1(-2 * G0 * drop_m / vt1**2))
    d2 = np.maximum(drop_m - hs, 0)
    spread = np.sqrt(vt2**2 + (vs2 - vt2**2) * np.exp(-2 * G0 * d2 / vt2**2))
    out: np.ndarray = np.where(drop_m < hs, tense, spread)
    return out


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--samples", type=int, default=4000)
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--baseline-falls", type=int, default=40)
    args = parser.parse_args()

    building = large_tower(60, 20)
    cat = sample_cat_profile(building.cat_profile, args.samples, seed=1)
    n_falls = len(building.openings) * cat.n
    results = simulate_falls(building, cat)  # warm-up; also gives the drops for (a) and (d)

    rng = np.random.default_rng(0)
    picks = rng.integers(0, [len(building.openings), cat.n], size=(args.baseline_falls, 2))
    falls = [(float(results.drop_m[o, i]), int(i)) for o, i in picks]
    t_a = median_time_s(
        lambda: [baseline_fall(d, cat, i, results.rho_kg_m3) for d, i in falls], 3
    ) / len(falls)
    t_c = median_time_s(lambda: simulate_falls(building, cat), args.repeats)
    t_d = median_time_s(lambda: bare_speed(results.drop_m, cat, results.rho_kg_m3), args.repeats)
    t_b = t_c / n_falls
    peak = peak_memory_bytes(lambda: simulate_falls(building, cat))

    check = np.max(np.abs(bare_speed(results.drop_m, cat, results.rho_kg_m3)
                          - results.impact_speed_mps))
    print(f"building: {len(building.openings)} openings x {cat.n} samples = {n_falls:,} falls")
    print(f"(a) solve_ivp baseline, per fall     {t_a * 1e3:10.3f} ms")
    print(f"(b) vectorised engine, per fall      {t_b * 1e9:10.1f} ns")
    print(f"(c) whole tower                      {t_c:10.3f} s")
    print(f"(d) bare closed-form speed, same size {t_d:9.3f} s")
    print(f"a/b = {t_a / t_b:,.0f}   (target >= 20,000)")
    print(f"c/d = {t_c / t_d:.2f}   (target <= 3)")
    print(f"peak memory of (c): {peak / 2**20:.0f} MiB   (target < 1024 MiB)")
    print(f"max |engine - bare| impact speed: {check:.2e} m/s")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
