"""Tests of the closed-form fall, the atmosphere and the fall profile (petfall_audit.physics)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from scipy.integrate import solve_ivp

from petfall_audit.physics import (
    G0,
    air_density,
    fall_profile,
    fall_time,
    impact_speed,
    isa_temperature_c,
    switch_drop,
    terminal_speed,
)

RHO0 = 1.225  # ISO 2533 sea-level density, kg/m³


def cda_for(v_t: float, mass_kg: float, rho: float = RHO0) -> float:
    """C_d·A (m²) that gives terminal speed ``v_t`` (m/s): from v_t = sqrt(2 m g / (ρ C_d A))."""
    return 2 * mass_kg * G0 / (rho * v_t**2)


def ivp_fall(
    drop_m: float, m: float, c1: float, c2: float, f: float, rho: float
) -> tuple[float, float]:
    """Independent reference: integrate m dv/dt = m g − ½ρC_dA v² with scipy.integrate.solve_ivp,
    an event at the posture switch (speed = f × tense terminal speed) and one at landing."""
    b1, b2 = rho * c1 / (2 * m), rho * c2 / (2 * m)
    v_switch = f * math.sqrt(G0 / b1)

    def rhs(b: float):  # type: ignore[no-untyped-def]
        return lambda t, y: [y[1], G0 - b * y[1] * abs(y[1])]

    def land(t: float, y: np.ndarray) -> float:
        return y[0] - drop_m

    def switch(t: float, y: np.ndarray) -> float:
        return y[1] - v_switch

    land.terminal = switch.terminal = True  # type: ignore[attr-defined]
    tol = {"rtol": 1e-12, "atol": 1e-12, "method": "DOP853"}
    events = [land, switch] if c2 > c1 else [land]
    sol = solve_ivp(rhs(b1), (0, 1e4), [0.0, 0.0], events=events, **tol)
    if c2 > c1 and sol.t_events[1].size and not sol.t_events[0].size:
        t0 = sol.t_events[1][0]
        sol = solve_ivp(rhs(b2), (t0, t0 + 1e4), sol.y_events[1][0], events=[land], **tol)
    return float(sol.y_events[0][0][1]), float(sol.t_events[0][0])


CATS = [  # mass kg, C_d·A tense, spread (m²), relax fraction
    (4.1, 0.114, 0.227, 0.75),
    (1.5, 0.058, 0.116, 0.65),
    (6.0, 0.147, 0.147, 0.70),  # never spreads out
    (3.0, 0.06, 0.30, 0.85),  # much faster than its spread terminal speed: slows down a lot
]
DROPS = [0.5, 1.0, 2.0, 3.5, 7.0, 15.0, 22.0, 30.0, 50.0, 90.0, 140.0, 200.0]


@pytest.mark.parametrize(("m", "c1", "c2", "f"), CATS)
def test_closed_form_matches_solve_ivp(m: float, c1: float, c2: float, f: float) -> None:
    # Source: closed forms of the quadratic-drag fall (Taylor, Classical Mechanics, 2005, §2.4)
    # checked against scipy.integrate.solve_ivp (DOP853, rtol 1e-12, events at the switch).
    h = np.array(DROPS)
    args = dict(mass_kg=m, cda_tense_m2=c1, cda_spread_m2=c2, relax_fraction=f, rho_kg_m3=RHO0)
    v = impact_speed(h, **args)
    t = fall_time(h, **args)
    for i, drop in enumerate(DROPS):
        v_ref, t_ref = ivp_fall(drop, m, c1, c2, f, RHO0)
        assert abs(v[i] - v_ref) / v_ref < 1e-6, (drop, v[i], v_ref)
        assert abs(t[i] - t_ref) / t_ref < 1e-6, (drop, t[i], t_ref)


def test_one_posture_textbook_formulas() -> None:
    # Source: Taylor, Classical Mechanics (2005) §2.4: v(h) = v_t sqrt(1 − exp(−2gh/v_t²)),
    # t(h) = (v_t/g) arccosh(exp(g h / v_t²)).
    m, cda = 4.1, 0.114
    vt = math.sqrt(2 * m * G0 / (RHO0 * cda))
    h = np.array([0.3, 3.0, 30.0, 300.0])
    args = dict(mass_kg=m, cda_tense_m2=cda, cda_spread_m2=cda, relax_fraction=0.75,
                rho_kg_m3=RHO0)
    v_ref = vt * np.sqrt(1 - np.exp(-2 * G0 * h / vt**2))
    np.testing.assert_allclose(impact_speed(h, **args), v_ref, rtol=1e-12)
    np.testing.assert_allclose(fall_time(h, **args), vt / G0 * np.arccosh(np.exp(G0 * h / vt**2)),
                               rtol=1e-10)
    assert terminal_speed(m, cda, RHO0) == pytest.approx(vt, rel=1e-14)


@pytest.mark.parametrize("rho", [1e-12, 1e-30])
def test_drag_free_limit(rho: float) -> None:
    # Source: free fall, v = sqrt(2 g h), t = sqrt(2 h / g) (any mechanics textbook).
    h = np.array([0.0, 0.5, 3.0, 30.0, 200.0])
    args = dict(mass_kg=4.1, cda_tense_m2=0.114, cda_spread_m2=0.227, relax_fraction=0.75,
                rho_kg_m3=rho)
    v = impact_speed(h, **args)
    t = fall_time(h, **args)
    assert np.all(np.isfinite(v)) and np.all(np.isfinite(t))
    np.testing.assert_allclose(v, np.sqrt(2 * G0 * h), rtol=1e-9)
    np.testing.assert_allclose(t, np.sqrt(2 * h / G0), rtol=1e-9)


def test_long_drop_gives_spread_terminal_speed() -> None:
    # Source: terminal speed sqrt(2 m g / (ρ C_d A)) (Taylor §2.4) is the limit of a long fall.
    args = dict(mass_kg=4.1, cda_tense_m2=0.114, cda_spread_m2=0.227, relax_fraction=0.75,
                rho_kg_m3=RHO0)
    v_spread = terminal_speed(4.1, 0.227, RHO0)
    assert impact_speed(2000.0, **args) == pytest.approx(v_spread, rel=1e-9)
    assert impact_speed(1e6, **args) == pytest.approx(v_spread, rel=1e-12)


def test_skydiver_terminal_speed() -> None:
    # Common practice, no source: a belly-down skydiver falls at about
    # 53–56 m/s; for 80 kg that implies C_d·A 0.41–0.46 m² (derived: C_d·A = 2 m g / (ρ v²)).
    args = dict(mass_kg=80.0, cda_tense_m2=0.45, cda_spread_m2=0.45, relax_fraction=0.5,
                rho_kg_m3=RHO0)
    assert 53.0 <= impact_speed(3000.0, **args) <= 56.0


def test_commonly_quoted_cat_figures() -> None:
    # Fact of the trade, no source: tense ≈ 24 m/s, spread ≈ 17 m/s, relaxing
    # at three quarters of the tense terminal speed, after roughly 7–8 storeys of 3 m and
    # 2.2–2.6 s; it then slows down for a while; from 30 storeys it lands at about 17 m/s.
    m = 4.1
    args = dict(mass_kg=m, cda_tense_m2=cda_for(24.0, m), cda_spread_m2=cda_for(17.0, m),
                relax_fraction=0.75, rho_kg_m3=RHO0)
    hs = float(switch_drop(mass_kg=m, cda_tense_m2=args["cda_tense_m2"], relax_fraction=0.75,
                           rho_kg_m3=RHO0))
    assert 7.0 <= hs / 3.0 <= 8.5
    assert 2.2 <= fall_time(hs, **args) <= 2.6
    assert impact_speed(hs, **args) == pytest.approx(18.0, rel=1e-9)  # 0.75 × 24
    after = impact_speed(hs + np.array([0.0, 3.0, 6.0, 12.0]), **args)
    assert np.all(np.diff(after) < 0)
    assert impact_speed(90.0, **args) == pytest.approx(17.0, abs=0.1)


def test_broadcasting_and_scalars() -> None:
    masses = np.array([3.0, 4.0, 5.0])[:, None]
    drops = np.array([1.0, 10.0, 40.0, 80.0])
    v = impact_speed(drops, mass_kg=masses, cda_tense_m2=0.1, cda_spread_m2=0.2,
                     relax_fraction=0.75, rho_kg_m3=RHO0)
    assert v.shape == (3, 4)
    assert isinstance(impact_speed(3.0, mass_kg=4.0, cda_tense_m2=0.1, cda_spread_m2=0.2,
                                   relax_fraction=0.75, rho_kg_m3=RHO0), float)
    # heavier cats fall faster from the same height
    assert np.all(np.diff(v, axis=0) > 0)


GOOD = dict(mass_kg=4.0, cda_tense_m2=0.1, cda_spread_m2=0.2, relax_fraction=0.75, rho_kg_m3=1.2)


@pytest.mark.parametrize(
    ("name", "bad"),
    [
        ("mass_kg", 0.0),
        ("mass_kg", -1.0),
        ("mass_kg", float("nan")),
        ("cda_tense_m2", 0.0),
        ("cda_spread_m2", -0.2),
        ("relax_fraction", 0.0),
        ("relax_fraction", 1.0),
        ("relax_fraction", 1.2),
        ("rho_kg_m3", 0.0),
    ],
)
@pytest.mark.parametrize("fn", [impact_speed, fall_time])
def test_invalid_arguments_name_themselves(fn, name: str, bad: float) -> None:  # type: ignore[no-untyped-def]
    args = {**GOOD, name: bad}
    with pytest.raises(ValueError, match=name):
        fn(10.0, **args)


def test_invalid_drop_and_areas() -> None:
    with pytest.raises(ValueError, match="drop_m"):
        impact_speed(-0.1, **GOOD)
    with pytest.raises(ValueError, match="drop_m"):
        fall_time(np.array([1.0, np.nan]), **GOOD)
    with pytest.raises(ValueError, match="cda_spread_m2"):
        impact_speed(3.0, **{**GOOD, "cda_spread_m2": 0.05})
    with pytest.raises(ValueError, match="mass_kg"):
        impact_speed(3.0, **{**GOOD, "mass_kg": np.array([4.0, 0.0])})


@settings(max_examples=60, deadline=None)
@given(
    h=st.floats(0.0, 500.0),
    m=st.floats(0.5, 10.0),
    c1=st.floats(0.02, 0.3),
    ratio=st.floats(1.0, 4.0),
    f=st.floats(0.05, 0.95),
)
def test_physical_bounds(h: float, m: float, c1: float, ratio: float, f: float) -> None:
    # Source: bounds implied by the equation of motion: never faster than free fall, never
    # faster than max(switch speed, spread terminal speed); time never shorter than free fall.
    args = dict(mass_kg=m, cda_tense_m2=c1, cda_spread_m2=c1 * ratio, relax_fraction=f,
                rho_kg_m3=RHO0)
    v = impact_speed(h, **args)
    t = fall_time(h, **args)
    vt1 = terminal_speed(m, c1, RHO0)
    vt2 = terminal_speed(m, c1 * ratio, RHO0)
    assert v <= math.sqrt(2 * G0 * h) * (1 + 1e-12) + 1e-12
    assert v <= max(f * vt1, vt2) * (1 + 1e-12) + 1e-12
    # (the absolute 1e-15 s allows for rounding in subnormal drops such as 2e-313 m)
    assert t >= math.sqrt(2 * h / G0) * (1 - 1e-12) - 1e-15
    assert fall_time(h + 1.0, **args) > t


# --- atmosphere ----------------------------------------------------------------------------------


@pytest.mark.parametrize("altitude_m", [0.0, 1000.0, 2000.0])
def test_density_matches_standard_atmosphere_package(altitude_m: float) -> None:
    # Source: ISO 2533 / ICAO standard atmosphere as implemented by the `ambiance` package
    # (geometric altitude); at the standard temperature of that altitude.
    from ambiance import Atmosphere

    ref = Atmosphere(altitude_m)
    t_c = float(ref.temperature_in_celsius[0])
    assert isa_temperature_c(altitude_m) == pytest.approx(t_c, abs=1e-6)
    assert air_density(altitude_m, t_c) == pytest.approx(float(ref.density[0]), rel=1e-6)


def test_density_check_values() -> None:
    # Source: ISO 2533: 1.225 kg/m³ at 0 m and 15 °C.
    assert air_density(0.0, 15.0) == pytest.approx(1.225, abs=5e-5)
    # Derived (ideal gas, ρ = p / (R T), R = 287.05 J/(kg·K)): dry air, 101 325 Pa, 30 °C:
    # 1.1644 kg/m³.
    assert air_density(0.0, 30.0) == pytest.approx(1.1644, abs=5e-5)
    dens = air_density(np.array([0.0, 500.0, 1500.0]), 15.0)
    assert np.all(np.diff(dens) < 0)


def test_density_invalid_arguments() -> None:
    with pytest.raises(ValueError, match="altitude_m"):
        air_density(20_000.0, 15.0)
    with pytest.raises(ValueError, match="temperature_c"):
        air_density(0.0, -300.0)
    with pytest.raises(ValueError, match="altitude_m"):
        air_density(float("nan"), 15.0)


# --- time series ---------------------------------------------------------------------------------

CAT = dict(mass_kg=4.1, cda_tense_m2=0.114, cda_spread_m2=0.227, relax_fraction=0.75,
           rho_kg_m3=RHO0)


def test_profile_without_transition_matches_closed_form() -> None:
    # Switching at once, the profile is the closed form (Taylor §2.4) the engine uses; the
    # outside reference is solve_ivp (ivp_fall above, and test_profile_matches_solve_ivp).
    p = fall_profile(60.0, **CAT, transition_s=0.0)
    v_ref, t_ref = ivp_fall(60.0, 4.1, 0.114, 0.227, 0.75, RHO0)
    assert p.impact_speed_mps == pytest.approx(v_ref, rel=1e-9)
    assert p.fall_time_s == pytest.approx(t_ref, rel=1e-9)
    assert p.impact_speed_mps == pytest.approx(impact_speed(60.0, **CAT), rel=1e-6)
    assert p.fall_time_s == pytest.approx(fall_time(60.0, **CAT), rel=1e-6)
    hs = switch_drop(mass_kg=4.1, cda_tense_m2=0.114, relax_fraction=0.75, rho_kg_m3=RHO0)
    assert p.switch_time_s == pytest.approx(fall_time(hs, **CAT), rel=1e-6)


def ivp_profile(drop_m: float, m: float, c1: float, c2: float, f: float, rho: float,
                transition_s: float):  # type: ignore[no-untyped-def]
    """Independent reference for the time series: scipy.integrate.solve_ivp (DOP853) of
    dv/dt = g − β(t) v², tense until the speed reaches f × the tense terminal speed (an event),
    then β moving to the spread value over ``transition_s`` as a smoothstep 3x² − 2x³."""
    b1, b2 = rho * c1 / (2 * m), rho * c2 / (2 * m)
    v_switch = f * math.sqrt(G0 / b1)

    def beta(t: float, t_switch: float | None) -> float:
        if t_switch is None:
            return b1
        x = min(max((t - t_switch) / transition_s, 0.0), 1.0) if transition_s else 1.0
        return b1 + (b2 - b1) * x * x * (3 - 2 * x)

    def rhs(t_switch: float | None):  # type: ignore[no-untyped-def]
        return lambda t, y: [y[1], G0 - beta(t, t_switch) * y[1] * abs(y[1])]

    def land(t: float, y: np.ndarray) -> float:
        return y[0] - drop_m

    def switch(t: float, y: np.ndarray) -> float:
        return y[1] - v_switch

    land.terminal = switch.terminal = True  # type: ignore[attr-defined]
    tol = {"rtol": 1e-13, "atol": 1e-12, "method": "DOP853", "dense_output": True}
    events = [land, switch] if c2 > c1 else [land]
    first = solve_ivp(rhs(None), (0, 1e4), [0.0, 0.0], events=events, **tol)
    pieces, t_switch = [(0.0, first)], None
    if c2 > c1 and first.t_events[1].size and not first.t_events[0].size:
        t_switch = float(first.t_events[1][0])
        step = transition_s / 50 if transition_s else np.inf
        pieces.append((t_switch, solve_ivp(rhs(t_switch), (t_switch, t_switch + 1e4),
                                           first.y_events[1][0], events=[land],
                                           max_step=step, **tol)))
    last = pieces[-1][1]
    t_land, impact = float(last.t_events[0][0]), float(last.y_events[0][0][1])

    def speed_at(t: np.ndarray) -> np.ndarray:
        out = np.empty_like(t)
        for start, sol in pieces:
            sel = t >= start
            out[sel] = sol.sol(t[sel])[1]
        return out

    return t_land, impact, t_switch, speed_at


@pytest.mark.parametrize("transition_s", [0.0, 0.05, 0.3, 1.0])
@pytest.mark.parametrize("drop_m", [1.0, 4.0, 9.0, 30.0, 120.0])
@pytest.mark.parametrize("cat", CATS)
def test_profile_matches_solve_ivp(cat: tuple[float, float, float, float], drop_m: float,
                                   transition_s: float) -> None:
    # Source: scipy.integrate.solve_ivp (DOP853, rtol 1e-13) of the same equation of motion,
    # written above without the project's code. Landings before, during and after the
    # transition are all in the grid.
    m, c1, c2, f = cat
    t_land, impact, t_switch, speed_at = ivp_profile(drop_m, m, c1, c2, f, RHO0, transition_s)
    p = fall_profile(drop_m, mass_kg=m, cda_tense_m2=c1, cda_spread_m2=c2, relax_fraction=f,
                     rho_kg_m3=RHO0, transition_s=transition_s, n_points=257)
    assert p.fall_time_s == pytest.approx(t_land, rel=1e-10)
    assert p.impact_speed_mps == pytest.approx(impact, rel=1e-10)
    if t_switch is None:
        assert p.switch_time_s is None
    else:
        assert p.switch_time_s == pytest.approx(t_switch, rel=1e-10)
    np.testing.assert_allclose(p.speed_mps, speed_at(p.t_s), rtol=0, atol=1e-9 * impact)


def test_profile_with_smooth_transition() -> None:
    p = fall_profile(60.0, **CAT, transition_s=0.3, n_points=300)
    assert p.t_s.shape == p.height_m.shape == p.speed_mps.shape == p.accel_mps2.shape == (300,)
    assert p.height_m[0] == pytest.approx(60.0) and p.height_m[-1] == pytest.approx(0.0)
    assert np.all(np.diff(p.height_m) <= 1e-12)
    assert p.t_s[-1] == pytest.approx(p.fall_time_s)
    # spreading out gradually keeps the cat faster for a moment, so it lands a little sooner
    assert p.fall_time_s < fall_time(60.0, **CAT)
    assert p.impact_speed_mps == pytest.approx(impact_speed(60.0, **CAT), rel=0.01)
    # it decelerates after the switch: negative acceleration shortly after
    after = p.t_s > p.switch_time_s + 0.3
    assert np.min(p.accel_mps2[after]) < 0
    # the acceleration has no jump (smooth transition): steps stay small
    assert np.max(np.abs(np.diff(p.accel_mps2))) < 1.0
    # acceleration is the slope of the speed (central differences)
    slope = np.gradient(p.speed_mps, p.t_s)
    np.testing.assert_allclose(slope[5:-5], p.accel_mps2[5:-5], atol=0.05)


def test_profile_switch_none_when_no_relax_or_short_drop() -> None:
    never = fall_profile(60.0, **{**CAT, "cda_spread_m2": 0.114})
    assert never.switch_time_s is None
    assert never.impact_speed_mps == pytest.approx(
        impact_speed(60.0, **{**CAT, "cda_spread_m2": 0.114}), rel=1e-6)
    short = fall_profile(6.0, **CAT)
    assert short.switch_time_s is None
    assert short.impact_speed_mps == pytest.approx(impact_speed(6.0, **CAT), rel=1e-6)
    zero = fall_profile(0.0, **CAT)
    assert zero.fall_time_s == 0.0 and zero.impact_speed_mps == 0.0


def test_profile_invalid_arguments() -> None:
    with pytest.raises(ValueError, match="drop_m"):
        fall_profile(-1.0, **CAT)
    with pytest.raises(ValueError, match="transition_s"):
        fall_profile(10.0, **CAT, transition_s=-0.1)
    with pytest.raises(ValueError, match="n_points"):
        fall_profile(10.0, **CAT, n_points=1)
