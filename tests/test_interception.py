"""Tests of the outward travel and of which element below catches a falling cat
(petfall_audit.physics.simulate_falls)."""

from __future__ import annotations

import dataclasses
import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from petfall_audit.model import (
    BALCONY_LIKE,
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatProfile,
    Facade,
    Fixed,
    Floor,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
    Uniform,
)
from petfall_audit.physics import (
    G0,
    GROUND_ID,
    drop_to_reach_m,
    fall_time,
    impact_speed,
    outward_travel_m,
    simulate_falls,
)
from petfall_audit.sampling import CatSamples, sample_cat_profile

RHO0 = 1.225


# --- outward travel ------------------------------------------------------------------------------


def ivp_outward(drop_m: float, v0: float, m: float, c1: float, c2: float, f: float) -> float:
    """Independent reference: 2-D fall with coupled quadratic drag, dv/dt = g − (ρC_dA/2m)|v|v,
    integrated with scipy.integrate.solve_ivp; the posture switches (event) when the downward
    speed reaches f × the tense terminal speed. Returns the outward distance at the drop."""
    return ivp_landing(drop_m, v0, m, c1, c2, f)[0]


def ivp_segments(drop_m: float, v0: float, m: float, c1: float, c2: float, f: float
                 ) -> list:  # type: ignore[type-arg]
    """The 2-D reference fall as solve_ivp solutions (dense output): tense until the downward
    speed reaches f × the tense terminal speed, then spread (the same drag if it never relaxes),
    up to the drop."""
    b1, b2 = RHO0 * c1 / (2 * m), RHO0 * c2 / (2 * m)
    v_switch = f * math.sqrt(G0 / b1)

    def rhs(b: float):  # type: ignore[no-untyped-def]
        def fn(t: float, y: np.ndarray) -> list[float]:
            speed = math.hypot(y[2], y[3])
            return [y[2], y[3], -b * speed * y[2], G0 - b * speed * y[3]]

        return fn

    def land(t: float, y: np.ndarray) -> float:
        return y[1] - drop_m

    def switch(t: float, y: np.ndarray) -> float:
        return y[3] - v_switch

    land.terminal = switch.terminal = True  # type: ignore[attr-defined]
    tol = {"rtol": 1e-10, "atol": 1e-10, "dense_output": True}
    sol = solve_ivp(rhs(b1), (0, 1e4), [0, 0, v0, 0], events=[land, switch], **tol)
    segments = [sol]
    if sol.t_events[1].size and not sol.t_events[0].size:
        t0 = sol.t_events[1][0]
        segments.append(solve_ivp(rhs(b2), (t0, t0 + 1e4), sol.y_events[1][0], events=[land],
                                  **tol))
    return segments


def ivp_landing(drop_m: float, v0: float, m: float, c1: float, c2: float, f: float
                ) -> tuple[float, float]:
    """The 2-D reference of :func:`ivp_outward`: outward distance (m) and speed (m/s) at the
    drop."""
    y = ivp_segments(drop_m, v0, m, c1, c2, f)[-1].y_events[0][0]
    return float(y[0]), float(math.hypot(y[2], y[3]))


OUT_CATS = [(4.1, 0.114, 0.227, 0.75), (1.5, 0.058, 0.116, 0.65), (6.0, 0.147, 0.147, 0.7)]


@pytest.mark.parametrize(("m", "c1", "c2", "f"), OUT_CATS)
def test_outward_travel_against_2d_solve_ivp(m: float, c1: float, c2: float, f: float) -> None:
    # Source: 2-D solve_ivp with coupled drag (above). Stated error bound of the closed-form
    # approximation: it never underestimates, and overestimates by at most 2 % for launch speeds
    # up to 2.5 m/s and 4 % up to 4 m/s, drops 0.5–200 m.
    args = dict(mass_kg=m, cda_tense_m2=c1, cda_spread_m2=c2, relax_fraction=f, rho_kg_m3=RHO0)
    for v0, bound in [(0.5, 0.02), (2.5, 0.02), (4.0, 0.04)]:
        for drop in [0.5, 3.0, 10.0, 30.0, 100.0, 200.0]:
            ref = ivp_outward(drop, v0, m, c1, c2, f)
            approx = outward_travel_m(drop, launch_speed_mps=v0, **args)
            rel = (approx - ref) / ref
            assert -1e-6 <= rel <= bound, (v0, drop, approx, ref)


def test_impact_speed_is_the_speed_not_its_vertical_part() -> None:
    # a leap at 2.5 m/s from a window sill onto a deep terrace 0.3 m below (the window's floor
    # is the terrace's): the outward part carries as much kinetic energy as the drop itself.
    # Reference: the 2-D solve_ivp above.
    terrace = Opening("T", 1, "north", OpeningKind.TERRACE, -5.0, 20.0, projection_m=6.0,
                      perch_height_m=1.1)
    sill = dataclasses.replace(window("W", 1), perch_height_m=0.3)
    s = cats(2.5, n=50)
    res = simulate_falls(building([sill, terrace]), s)
    i = res.opening_ids.index("W")
    assert landed_on(res, "W") == {"T"}
    for j in range(s.n):
        _, ref = ivp_landing(0.3, 2.5, float(s.mass_kg[j]), float(s.cda_tense_m2[j]),
                             float(s.cda_spread_m2[j]), float(s.relax_fraction[j]))
        assert res.impact_speed_mps[i, j] == pytest.approx(ref, rel=0.01)
    down = math.sqrt(2 * G0 * 0.3)  # drag-free limit over 0.3 m
    assert np.median(res.impact_speed_mps[i]) ** 2 > 1.9 * down**2


def test_outward_travel_bound_over_the_whole_launch_range() -> None:
    # The file accepts launch speeds up to LIMITS.launch_speed_max_mps: the approximation never
    # underestimates the 2-D solve_ivp travel and overestimates it by at most 7 % to 6 m/s,
    # 13 % to 10 m/s and 31 % to 20 m/s (overestimating sends cats past ledges: cautious).
    from petfall_audit.io._schema import LIMITS

    assert LIMITS.launch_speed_max_mps == 20.0
    for m, c1, c2, f in OUT_CATS:
        args = dict(mass_kg=m, cda_tense_m2=c1, cda_spread_m2=c2, relax_fraction=f,
                    rho_kg_m3=RHO0)
        for v0, bound in [(6.0, 0.07), (10.0, 0.13), (20.0, 0.31)]:
            for drop in [0.5, 10.0, 100.0, 200.0]:
                ref = ivp_outward(drop, v0, m, c1, c2, f)
                approx = outward_travel_m(drop, launch_speed_mps=v0, **args)
                assert -1e-6 <= (approx - ref) / ref <= bound, (v0, drop)


def test_decoupled_drag_would_be_far_worse() -> None:
    # Why the coupled form: the decoupled law x = (m/k) ln(1 + k v0 t / m), k = ½ρC_dA, with the
    # closed-form fall time, ignores the falling speed in the drag and badly overestimates long
    # drops (compared with the same 2-D solve_ivp reference).
    m, c1, c2, f, v0, drop = 4.1, 0.114, 0.227, 0.75, 2.5, 100.0
    ref = ivp_outward(drop, v0, m, c1, c2, f)
    t = fall_time(drop, mass_kg=m, cda_tense_m2=c1, cda_spread_m2=c2, relax_fraction=f,
                  rho_kg_m3=RHO0)
    k = 0.5 * RHO0 * c1
    decoupled = m / k * math.log1p(k * v0 * t / m)
    assert (decoupled - ref) / ref > 0.5
    ours = outward_travel_m(drop, launch_speed_mps=v0, mass_kg=m, cda_tense_m2=c1,
                            cda_spread_m2=c2, relax_fraction=f, rho_kg_m3=RHO0)
    assert abs(ours - ref) / ref < 0.02


def test_outward_travel_limits_and_inverse() -> None:
    args = dict(mass_kg=4.1, cda_tense_m2=0.114, cda_spread_m2=0.227, relax_fraction=0.75,
                rho_kg_m3=RHO0)
    drops = np.array([0.0, 0.2, 2.0, 20.0, 24.0, 25.0, 80.0, 400.0])
    x = outward_travel_m(drops, launch_speed_mps=2.0, **args)
    assert x[0] == 0.0 and np.all(np.diff(x) > 0)
    back = drop_to_reach_m(x[1:], launch_speed_mps=2.0, **args)
    np.testing.assert_allclose(back, drops[1:], rtol=1e-7)
    # Source: drag-free projectile, x = v0 sqrt(2 h / g).
    thin = {**args, "rho_kg_m3": 1e-12}
    assert outward_travel_m(5.0, launch_speed_mps=2.0, **thin) == pytest.approx(
        2.0 * math.sqrt(10.0 / G0), rel=1e-9)
    assert drop_to_reach_m(0.0, launch_speed_mps=2.0, **args) == 0.0
    assert drop_to_reach_m(-1.0, launch_speed_mps=2.0, **args) == 0.0
    assert drop_to_reach_m(1.0, launch_speed_mps=0.0, **args) == math.inf
    assert drop_to_reach_m(1000.0, launch_speed_mps=2.0, **args) == math.inf  # never that far
    assert outward_travel_m(3.0, launch_speed_mps=0.0, **args) == 0.0
    with pytest.raises(ValueError, match="launch_speed_mps"):
        outward_travel_m(3.0, launch_speed_mps=-1.0, **args)


# --- an independent trajectory walk ---------------------------------------------------------


def ref_travel(drop_m: float, v0: float, m: float, c1: float, c2: float, f: float,
               rho: float = RHO0) -> float:
    """Outward travel (m) at ``drop_m``, by numerical quadrature of ``dx/dh = vx / vy`` (scipy
    ``quad``), with the downward speed of the closed-form two-posture fall (Taylor, Classical
    Mechanics, §2.4) and the outward speed decaying along the path as ``vx = v0 e^{−β s}``,
    ``s ≈ h`` (the approximation stated in physics.outward_travel_m; it is checked against a
    2-D solve_ivp above). Written here without the project's functions."""
    from scipy.integrate import quad

    if v0 == 0 or drop_m <= 0:
        return 0.0
    b1, b2 = rho * c1 / (2 * m), rho * c2 / (2 * m)
    vt1, vt2 = math.sqrt(G0 / b1), math.sqrt(G0 / b2)
    hs = -math.log(1 - f * f) / (2 * b1) if c2 > c1 else math.inf

    def vy(h: float) -> float:
        if h <= hs:
            return vt1 * math.sqrt(-math.expm1(-2 * b1 * h))
        vs2 = (f * vt1) ** 2
        return math.sqrt(vt2 ** 2 + (vs2 - vt2 ** 2) * math.exp(-2 * b2 * (h - hs)))

    def vx(h: float) -> float:
        return v0 * math.exp(-b1 * min(h, hs) - b2 * max(h - hs, 0.0))

    # h = u² removes the 1/sqrt(h) singularity at the perch
    def integrand(u: float) -> float:
        h = u * u
        return 2 * u * vx(h) / vy(h) if h > 0 else 2 * v0 / math.sqrt(2 * G0)

    pts = [math.sqrt(hs)] if hs < drop_m else None
    val, _ = quad(integrand, 0.0, math.sqrt(drop_m), points=pts, epsabs=1e-12, epsrel=1e-12,
                  limit=200)
    return val


def ref_cat(s: CatSamples, j: int) -> tuple[float, float, float, float, float]:
    return (float(s.launch_speed_mps[j]), float(s.mass_kg[j]), float(s.cda_tense_m2[j]),
            float(s.cda_spread_m2[j]), float(s.relax_fraction[j]))


def test_reference_travel_agrees_with_2d_solve_ivp() -> None:
    # the two references agree to the stated bound of the approximation (0 to +4 % to 4 m/s)
    for drop in (3.0, 30.0):
        ref = ivp_outward(drop, 2.5, 4.1, 0.114, 0.227, 0.75)
        assert 0 <= ref_travel(drop, 2.5, 4.1, 0.114, 0.227, 0.75) / ref - 1 < 0.02


# --- small buildings -----------------------------------------------------------------------------


def building(openings: list[Opening], surfaces: tuple[Surface, ...] = (),
             floors: int = 8, storey_m: float = 3.0) -> Building:
    return Building(
        info=BuildingInfo(name="Test block", address="1 Invented Lane"),
        floors=tuple(Floor(i, f"L{i}", storey_m * i) for i in range(floors)),
        facades=(Facade("north", 30.0), Facade("south", 30.0)),
        surfaces=surfaces,
        openings=tuple(openings),
    )


def balcony(id_: str, floor: int, x: float = 0.0, w: float = 4.0, proj: float = 1.5,
            facade: str = "north") -> Opening:
    return Opening(id_, floor, facade, OpeningKind.BALCONY, x, w, projection_m=proj,
                   perch_height_m=1.1)


def window(id_: str, floor: int, x: float = 1.0, w: float = 1.2, facade: str = "north",
           kind: OpeningKind = OpeningKind.WINDOW_CASEMENT) -> Opening:
    return Opening(id_, floor, facade, kind, x, w, perch_height_m=0.9)


def cats(launch: float | tuple[float, float], n: int = 400) -> CatSamples:
    speed = Fixed(launch) if isinstance(launch, float) else Uniform(*launch)
    return sample_cat_profile(dataclasses.replace(CAT_PRESETS["adult"], launch_speed_mps=speed),
                              n, seed=2)


def landed_on(res, opening_id: str) -> set[str]:  # type: ignore[no-untyped-def]
    i = res.opening_ids.index(opening_id)
    return {res.landing_ids[j] for j in np.unique(res.landing[i])}


def test_window_over_deeper_balcony_is_caught() -> None:
    b = building([window("W3", 3), balcony("B2", 2, proj=1.5)])
    res = simulate_falls(b, cats(0.5))
    i = res.opening_ids.index("W3")
    assert landed_on(res, "W3") == {"B2"}
    np.testing.assert_allclose(res.drop_m[i], 3 * 3.0 + 0.9 - 2 * 3.0)
    # a leap at 4 m/s carries the cat past the 1.5 m balcony (outward ≈ 3.5 m at 3.9 m drop)
    fast = simulate_falls(b, cats(4.0))
    assert landed_on(fast, "W3") == {GROUND_ID}
    np.testing.assert_allclose(fast.drop_m[i], 9.9)


def test_window_beside_balcony_is_not_caught() -> None:
    b = building([window("W3", 3, x=10.0), balcony("B2", 2, x=0.0, w=4.0)])
    assert landed_on(simulate_falls(b, cats(0.5)), "W3") == {GROUND_ID}


def test_partly_covered_window_splits_by_position() -> None:
    # the balcony spans only the left half of the window: position decides
    b = building([window("W3", 3, x=1.0, w=2.0), balcony("B2", 2, x=-2.0, w=4.0)])
    s = cats(0.3, n=2000)
    res = simulate_falls(b, s)
    i = res.opening_ids.index("W3")
    on_balcony = res.landing[i] == res.landing_ids.index("B2")
    np.testing.assert_array_equal(on_balcony, s.position_fraction < 0.5)


def test_stacked_identical_balconies_do_not_catch() -> None:
    stack = [balcony(f"B{k}", k) for k in range(1, 6)]
    res = simulate_falls(building(stack), cats((0.0, 2.5)))
    for k in range(1, 6):
        assert landed_on(res, f"B{k}") == {GROUND_ID}
        np.testing.assert_allclose(res.drop_m[res.opening_ids.index(f"B{k}")], 3.0 * k + 1.1)


def test_deeper_balcony_below_a_stack_catches() -> None:
    b = building([balcony("B5", 5, proj=1.5), balcony("T1", 1, x=-2.0, w=10.0, proj=6.0)])
    res = simulate_falls(b, cats((0.0, 2.5)))
    assert landed_on(res, "B5") == {"T1"}


def test_podium_roof_catches_its_own_facade_only() -> None:
    podium = Surface("podium", SurfaceKind.ROOF, 6.0, facade="south", to_facade_m=8.0)
    street = Surface("street", SurfaceKind.ASPHALT, 0.0)
    openings = [window(f"S{k}", k, facade="south") for k in range(0, 6)]
    openings += [window(f"N{k}", k, facade="north") for k in range(0, 6)]
    res = simulate_falls(building(openings, (podium, street)), cats((0.0, 2.5)))
    for k in range(0, 6):
        expected_south = {"podium"} if 3.0 * k + 0.9 > 6.0 else {"street"}
        assert landed_on(res, f"S{k}") == expected_south, k
        assert landed_on(res, f"N{k}") == {"street"}
    i = res.opening_ids.index("S5")
    np.testing.assert_allclose(res.drop_m[i], 15.9 - 6.0)


def test_surface_extent_decides_with_outward_travel() -> None:
    # paving up to 1 m from the facade, lawn beyond: slow cats land on paving, fast on lawn;
    # the split follows the outward travel at the drop (independent quadrature, above)
    paving = Surface("paving", SurfaceKind.CONCRETE, 0.0, to_facade_m=1.0)
    lawn = Surface("lawn", SurfaceKind.LAWN, 0.0, from_facade_m=1.0)
    s = cats((0.0, 2.5), n=300)
    res = simulate_falls(building([window("W1", 1)], (paving, lawn)), s)
    x = np.array([ref_travel(3.9, *ref_cat(s, j), rho=res.rho_kg_m3) for j in range(s.n)])
    expect = np.where(x < 1.0, res.landing_ids.index("paving"), res.landing_ids.index("lawn"))
    np.testing.assert_array_equal(res.landing[0], expect)
    assert 0 < np.mean(x < 1.0) < 1


def test_elements_at_or_above_the_start_never_catch() -> None:
    canopy_above = Surface("canopy", SurfaceKind.ROOF, 5.0, to_facade_m=3.0)
    res = simulate_falls(building([window("W1", 1)], (canopy_above,)), cats(0.5))
    assert landed_on(res, "W1") == {GROUND_ID}
    # a balcony on the same floor under the window's sill does catch
    res = simulate_falls(building([window("W2", 2), balcony("B2", 2, x=0.0, w=4.0)]), cats(0.5))
    assert landed_on(res, "W2") == {"B2"}
    np.testing.assert_allclose(res.drop_m[0], 0.9)


def test_results_layout_and_consistency() -> None:
    podium = Surface("podium", SurfaceKind.ROOF, 6.0, facade="south", to_facade_m=8.0)
    lawn = Surface("lawn", SurfaceKind.LAWN, 0.0)
    openings = [window("W4", 4), balcony("B3", 3), window("F5", 5, kind=OpeningKind.FIXED),
                Opening("G2", 2, "south", OpeningKind.GALLERY, 0.0, 20.0, projection_m=2.0)]
    s = cats((0.0, 2.5), n=300)
    calls: list[tuple[int, int]] = []
    res = simulate_falls(building(openings, (podium, lawn)), s,
                         progress=lambda done, total: calls.append((done, total)))
    assert res.opening_ids == ("W4", "B3", "F5", "G2")
    assert res.landing_ids == ("podium", "lawn", "B3", "G2", GROUND_ID)
    assert res.landing_kinds == (SurfaceKind.ROOF, SurfaceKind.LAWN, SurfaceKind.CONCRETE,
                                 SurfaceKind.CONCRETE, SurfaceKind.CONCRETE)
    for name in ("drop_m", "landing", "impact_speed_mps", "fall_time_s", "righted"):
        assert getattr(res, name).shape == (4, 300), name
        assert np.all(np.isfinite(getattr(res, name))), name
    assert res.rho_kg_m3 == pytest.approx(1.225, abs=1e-4)
    args = dict(mass_kg=s.mass_kg, cda_tense_m2=s.cda_tense_m2, cda_spread_m2=s.cda_spread_m2,
                relax_fraction=s.relax_fraction, rho_kg_m3=res.rho_kg_m3)
    # the speed itself: the closed-form downward speed (Taylor §2.4) with an outward part that
    # can only have decayed from the launch speed
    down = impact_speed(res.drop_m, **args)
    assert np.all(res.impact_speed_mps >= down * (1 - 1e-12))
    assert np.all(res.impact_speed_mps**2 - down**2 <= s.launch_speed_mps**2 * (1 + 1e-9) + 1e-12)
    np.testing.assert_allclose(res.fall_time_s, fall_time(res.drop_m, **args), rtol=1e-12)
    np.testing.assert_array_equal(res.righted, res.fall_time_s >= s.righting_time_s)
    assert calls[0] == (0, 4) and calls[-1] == (4, 4)
    assert [c[0] for c in calls] == sorted(c[0] for c in calls)
    # a low sill 0.4 m above a balcony's floor: a 0.29 s fall, within the sampled righting
    # times (0.25–0.4 s): some cats have turned feet-down, some not
    low = dataclasses.replace(window("W2", 2), perch_height_m=0.4)
    short = simulate_falls(building([low, balcony("B2", 2, x=0.0, w=4.0)]), s)
    assert 0 < short.righted[0].mean() < 1


def test_site_altitude_lowers_density_and_speed() -> None:
    b = building([window("W7", 7)])
    high = dataclasses.replace(b, info=dataclasses.replace(b.info, site_altitude_m=2000.0))
    s = cats(0.5)
    low_res, high_res = simulate_falls(b, s), simulate_falls(high, s)
    assert high_res.rho_kg_m3 < low_res.rho_kg_m3
    assert np.all(high_res.impact_speed_mps > low_res.impact_speed_mps)


def test_invalid_inputs() -> None:
    s = cats(0.5, n=20)
    bad = dataclasses.replace(s, mass_kg=np.where(np.arange(20) == 3, np.nan, s.mass_kg))
    with pytest.raises(ValueError, match="mass_kg"):
        simulate_falls(building([window("W1", 1)]), bad)
    with pytest.raises(ValueError, match="floor 9"):
        simulate_falls(building([window("W9", 9)], floors=3), s)
    with pytest.raises(ValueError, match="perch_height_m"):
        simulate_falls(building([dataclasses.replace(window("W1", 1), perch_height_m=np.nan)]), s)


def test_empty_building() -> None:
    res = simulate_falls(building([]), cats(0.5, n=10))
    assert res.drop_m.shape == (0, 10) and res.landing_ids == (GROUND_ID,)


# --- brute force ---------------------------------------------------------------------------------


def brute_force(b: Building, s: CatSamples, rho: float) -> tuple[np.ndarray, np.ndarray]:
    """Per opening and per cat, walk down the elements one by one (the definition, no pruning):
    the first element, highest first, whose footprint along and out from the facade holds the
    cat when it passes the element's level catches it; a sunken surface (below the datum) is
    entered at its rim, the datum. The outward travel is the independent quadrature above."""
    elev = {f.level: f.elevation_m for f in b.floors}
    ids = [x.id for x in b.surfaces] + [o.id for o in b.openings if o.kind in BALCONY_LIKE]
    elements = [(x.elevation_m, ids.index(x.id), x) for x in b.surfaces]
    elements += [(elev[o.floor], ids.index(o.id), o) for o in b.openings if o.kind in BALCONY_LIKE]
    elements.sort(key=lambda e: (-e[0], e[1]))
    n = s.n
    drop = np.zeros((len(b.openings), n))
    land = np.zeros((len(b.openings), n), dtype=int)
    for i, o in enumerate(b.openings):
        start = elev[o.floor] + o.perch_height_m
        x0 = o.projection_m if o.kind in BALCONY_LIKE else 0.0
        for j in range(n):
            cat = ref_cat(s, j)
            pos = o.x_m + s.position_fraction[j] * o.width_m
            drop[i, j], land[i, j] = max(start, 0.0), len(ids)
            for z, k, e in elements:
                if z >= start or e is o:
                    continue
                if e.facade is not None and e.facade != o.facade:
                    continue
                rim = max(z, 0.0) if isinstance(e, Surface) else z
                reach = x0 + ref_travel(start - rim, *cat, rho=rho)
                if isinstance(e, Opening):
                    hit = e.x_m <= pos < e.x_m + e.width_m and reach < e.projection_m
                else:
                    hi = math.inf if e.to_facade_m is None else e.to_facade_m
                    xlo = -math.inf if e.x_from_m is None else e.x_from_m
                    xhi = math.inf if e.x_to_m is None else e.x_to_m
                    hit = e.from_facade_m <= reach < hi and xlo <= pos < xhi
                if hit:
                    drop[i, j], land[i, j] = start - z, k
                    break
    return drop, land


@pytest.mark.parametrize("seed", [11, 12, 13])
def test_matches_brute_force_on_random_buildings(seed: int) -> None:
    rng = np.random.default_rng(seed)
    openings = []
    for k in range(14):
        fl = int(rng.integers(0, 7))
        fac = str(rng.choice(["north", "south"]))
        x, w = float(rng.uniform(0, 12)), float(rng.uniform(0.6, 5))
        if rng.random() < 0.5:
            openings.append(Opening(f"O{k}", fl, fac, OpeningKind.BALCONY, x, w,
                                    projection_m=float(rng.uniform(0.5, 3)),
                                    perch_height_m=float(rng.uniform(0.9, 1.2))))
        else:
            openings.append(Opening(f"O{k}", fl, fac, OpeningKind.WINDOW_HUNG, x, w,
                                    perch_height_m=float(rng.uniform(0.3, 1.2))))
    surfaces = (
        Surface("canopy", SurfaceKind.ROOF, 4.0, "north", 0.0, float(rng.uniform(1, 3))),
        Surface("bed", SurfaceKind.PLANTING, 0.0, None, 0.0, float(rng.uniform(0.5, 2))),
        Surface("pond", SurfaceKind.WATER, -0.5, "south", 2.0, 4.0),
        Surface("well", SurfaceKind.GRAVEL, -2.5, "north", 0.0, float(rng.uniform(0.3, 1.5)),
                x_from_m=float(rng.uniform(0, 6)), x_to_m=float(rng.uniform(7, 14))),
        Surface("podium", SurfaceKind.ROOF, 7.0, "south", 0.0, 6.0,
                x_from_m=float(rng.uniform(0, 5)), x_to_m=float(rng.uniform(6, 12))),
    )
    b = building(openings, surfaces)
    profile: CatProfile = dataclasses.replace(CAT_PRESETS["adult"],
                                              launch_speed_mps=Uniform(0.0, 4.0))
    s = sample_cat_profile(profile, 40, seed=seed)
    res = simulate_falls(b, s)
    drop, land = brute_force(b, s, res.rho_kg_m3)
    np.testing.assert_array_equal(res.landing, land)
    np.testing.assert_allclose(res.drop_m, drop, atol=1e-12)


# --- partial surfaces, lightwells, deep balconies, narrow canopies -------------------------------


def _street_building(openings: list[Opening], surfaces: tuple[Surface, ...]) -> Building:
    return Building(
        info=BuildingInfo(name="Test terrace", address="7 Invented Row"),
        floors=(Floor(0, "G", 0.0), Floor(1, "1", 4.5), *(Floor(k, str(k), 4.5 + 3.0 * (k - 1))
                                                         for k in range(2, 7))),
        facades=(Facade("north", 40.0), Facade("south", 40.0)),
        surfaces=surfaces,
        openings=tuple(openings),
    )


def test_partial_podium_catches_only_the_openings_over_it() -> None:
    # a podium roof at 7 m under the first 10 m of a 40 m facade, the street everywhere else;
    # geometry (by hand): a sill 0.9 m above level 4 (13.5 m) is 14.4 m up
    podium = Surface("podium", SurfaceKind.ROOF, 7.0, "north", 0.0, 12.0, x_from_m=0.0,
                     x_to_m=10.0)
    street = Surface("street", SurfaceKind.CONCRETE, 0.0, "north")
    over, beside = window("OVER", 4, x=3.0), window("BESIDE", 4, x=30.0)
    low_beside = window("LOW", 1, x=20.0)  # 5.4 m up: beside the podium, lower than its roof
    res = simulate_falls(_street_building([over, beside, low_beside], (podium, street)),
                         cats((0.0, 2.5)))
    assert landed_on(res, "OVER") == {"podium"}
    assert landed_on(res, "BESIDE") == {"street"}
    assert landed_on(res, "LOW") == {"street"}
    drops = {oid: res.drop_m[k] for k, oid in enumerate(res.opening_ids)}
    np.testing.assert_allclose(drops["OVER"], 14.4 - 7.0, atol=0.05)
    np.testing.assert_allclose(drops["BESIDE"], 14.4, atol=0.05)
    np.testing.assert_allclose(drops["LOW"], 5.4, atol=0.05)


def test_window_straddling_the_podium_end_splits_by_position() -> None:
    podium = Surface("podium", SurfaceKind.ROOF, 7.0, "north", 0.0, 12.0, x_to_m=10.0)
    street = Surface("street", SurfaceKind.CONCRETE, 0.0, "north")
    s = cats(0.5, n=1000)
    res = simulate_falls(_street_building([window("W", 4, x=9.0, w=2.0)], (podium, street)), s)
    on_podium = res.landing[0] == res.landing_ids.index("podium")
    np.testing.assert_array_equal(on_podium, 9.0 + 2.0 * s.position_fraction < 10.0)


def test_a_cat_over_the_lightwell_at_its_rim_falls_into_it() -> None:
    # a lightwell 2.3 m deep and 1.1 m wide in front of a raised ground floor, pavement beyond:
    # whoever is less than 1.1 m out when passing the rim (datum) lands in the well, 2.3 m
    # below it, whatever the outward travel further down (independent trajectory walk above)
    well = Surface("well", SurfaceKind.GRAVEL, -2.3, "north", 0.0, 1.1)
    pavement = Surface("pavement", SurfaceKind.CONCRETE, 0.0, "north", 1.1)
    b = Building(BuildingInfo("Walk-up"), (Floor(0, "G", 0.6), Floor(1, "1", 3.9)),
                 (Facade("north", 20.0),), (well, pavement),
                 (Opening("G", 0, "north", OpeningKind.WINDOW_HUNG, 2.0, 1.2,
                          perch_height_m=0.85),))
    s = cats((0.0, 4.0), n=300)
    res = simulate_falls(b, s)
    start = 0.6 + 0.85
    rim_travel = np.array([ref_travel(start, *ref_cat(s, j), rho=res.rho_kg_m3)
                           for j in range(s.n)])
    in_well = res.landing[0] == res.landing_ids.index("well")
    np.testing.assert_array_equal(in_well, rim_travel < 1.1)
    assert 0.1 < in_well.mean() < 0.9
    np.testing.assert_allclose(res.drop_m[0][in_well], start + 2.3, atol=0.05)
    np.testing.assert_allclose(res.drop_m[0][~in_well], start, atol=0.05)
    assert GROUND_ID not in landed_on(res, "G")


def test_deep_balcony_two_floors_below_catches() -> None:
    # a window on level 5 over a 3 m deep terrace on level 3: slow cats (outward travel under
    # 3 m after the 6.9 m drop) land on it; a fast leap passes it
    b = _street_building(
        [window("W5", 5, x=4.0), Opening("T3", 3, "north", OpeningKind.TERRACE, 0.0, 12.0,
                                          projection_m=3.0, perch_height_m=1.1)],
        (Surface("street", SurfaceKind.CONCRETE, 0.0, "north"),))
    s = cats((0.0, 4.0), n=300)
    res = simulate_falls(b, s)
    i = res.opening_ids.index("W5")
    sill, terrace_floor = 4.5 + 3.0 * 4 + 0.9, 4.5 + 3.0 * 2
    travel = np.array([ref_travel(sill - terrace_floor, *ref_cat(s, j), rho=res.rho_kg_m3)
                       for j in range(s.n)])
    on_terrace = res.landing[i] == res.landing_ids.index("T3")
    np.testing.assert_array_equal(on_terrace, travel < 3.0)
    assert 0.1 < on_terrace.mean() < 0.95
    np.testing.assert_allclose(res.drop_m[i][on_terrace], sill - terrace_floor, atol=0.05)
    np.testing.assert_allclose(res.drop_m[i][~on_terrace], sill, atol=0.05)


def test_canopy_narrower_than_the_travel_misses_the_fast_cats() -> None:
    canopy = Surface("canopy", SurfaceKind.ROOF, 3.5, "north", 0.0, 0.6, x_from_m=2.0,
                     x_to_m=6.0)
    street = Surface("street", SurfaceKind.CONCRETE, 0.0, "north")
    s = cats((0.0, 4.0), n=300)
    res = simulate_falls(_street_building([window("W2", 2, x=3.0)], (canopy, street)), s)
    sill = 4.5 + 3.0 + 0.9
    travel = np.array([ref_travel(sill - 3.5, *ref_cat(s, j), rho=res.rho_kg_m3)
                       for j in range(s.n)])
    on_canopy = res.landing[0] == res.landing_ids.index("canopy")
    np.testing.assert_array_equal(on_canopy, travel < 0.6)
    assert 0.05 < on_canopy.mean() < 0.9
    np.testing.assert_allclose(res.drop_m[0][~on_canopy], sill, atol=0.05)


def test_peak_speed_is_the_highest_speed_of_the_fall() -> None:
    # Reference: the 2-D solve_ivp above, its dense solution sampled finely; the highest speed
    # is at the switch for a cat that slows after spreading out, else at the impact.
    from petfall_audit.physics import peak_speed_of_falls

    s = cats(1.0, n=12)
    b = building([window(f"W{k}", k) for k in range(1, 8)],
                 floors=40, storey_m=6.0)  # drops 6.9 to 42.9 m
    res = simulate_falls(b, s)
    peak = peak_speed_of_falls(res, s)
    for j in range(s.n):
        m, c1, c2, f = (float(s.mass_kg[j]), float(s.cda_tense_m2[j]),
                        float(s.cda_spread_m2[j]), float(s.relax_fraction[j]))
        for i in range(len(res.opening_ids)):
            ref = ivp_peak(float(res.drop_m[i, j]), 1.0, m, c1, c2, f)
            assert peak[i, j] == pytest.approx(ref, rel=0.01), (i, j)
            assert peak[i, j] >= res.impact_speed_mps[i, j]


def ivp_peak(drop_m: float, v0: float, m: float, c1: float, c2: float, f: float) -> float:
    """Highest speed (m/s) over the 2-D fall of :func:`ivp_segments`, from dense output."""
    best = 0.0
    for seg in ivp_segments(drop_m, v0, m, c1, c2, f):
        t = np.linspace(seg.t[0], seg.t[-1], 2000)
        y = seg.sol(t)
        best = max(best, float(np.hypot(y[2], y[3]).max()))
    return best
