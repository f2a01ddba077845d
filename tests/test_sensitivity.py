"""The sensitivity summary simulates only what it reports (petfall_audit.sensitivity).

The reference below is the plain method the module documents, written out here: every parameter
held at its low and high value, the **whole building** simulated each time, and the summed risk
score of the top openings kept. Simulating only the reported openings and what can catch their
falls must give exactly the same numbers.
"""

from __future__ import annotations

from collections.abc import Iterator
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import petfall_audit.sensitivity as sensitivity
from petfall_audit.injury import band_probabilities
from petfall_audit.io.building_file import load_building
from petfall_audit.model import (
    CAT_PRESETS,
    Building,
    BuildingInfo,
    CatProfile,
    CatsPresent,
    Facade,
    Fixed,
    Floor,
    OpenFrequency,
    Opening,
    OpeningKind,
    Surface,
    SurfaceKind,
)
from petfall_audit.physics import simulate_falls
from petfall_audit.risk import Assessment, assess, risk_score, severity_of_falls
from petfall_audit.sampling import sample_cat_profile
from petfall_audit.sensitivity import PARAMETERS, sensitivity_analysis

FLOORS = (Floor(0, "G", 0.0), Floor(1, "1", 4.5)) + tuple(
    Floor(i, str(i), 4.5 + 3.1 * (i - 1)) for i in range(2, 21)
)


@pytest.fixture(autouse=True)
def _fresh_cache() -> Iterator[None]:
    sensitivity._cache.clear()
    yield
    sensitivity._cache.clear()


def _reference(base: Assessment, top: int = 5) -> dict[str, tuple[float, float, float, float]]:
    """Parameter -> (low, high, risk_low, risk_high), simulating the whole building."""
    building = base.building
    cat = sample_cat_profile(building.cat_profile, base.samples, seed=base.seed)
    order = np.argsort(-base.risk, kind="stable")[:top]
    lik = base.likelihood.annual_probability[order]
    out = {}
    for name, _unit in PARAMETERS:
        if name == "relax_probability":
            p = building.cat_profile.relax_probability
            lo, hi = max(0.0, round(p - 0.2, 12)), min(1.0, round(p + 0.2, 12))
        else:
            values = np.asarray(getattr(cat, name), dtype=float)
            if name == "cda_spread_m2" and np.any(cat.relaxes):
                values = values[cat.relaxes]
            lo, hi = (float(v) for v in np.percentile(values, [10.0, 90.0]))
        risks = []
        for value in (lo, hi):
            if name == "relax_probability":
                profile = replace(building.cat_profile, relax_probability=value)
            else:
                profile = replace(building.cat_profile, **{name: Fixed(value)})
            samples = sample_cat_profile(profile, base.samples, seed=base.seed)
            falls = simulate_falls(building, samples)
            sev = severity_of_falls(falls, samples, base.stops)[order]
            risks.append(float(risk_score(lik, band_probabilities(sev, base.thresholds)).sum()))
        out[name] = (lo, hi, risks[0], risks[1])
    return out


def _check_equal(base: Assessment) -> None:
    result = sensitivity_analysis(base)
    expected = _reference(base)
    assert {s.parameter for s in result.swings} == set(expected)
    for s in result.swings:
        lo, hi, r_lo, r_hi = expected[s.parameter]
        # the same falls of the same cats: equal to the last bit, or within float rounding of
        # a sum taken in another order
        assert (s.low_value, s.high_value) == (lo, hi)
        assert s.risk_low == pytest.approx(r_lo, rel=1e-12, abs=1e-9), s.parameter
        assert s.risk_high == pytest.approx(r_hi, rel=1e-12, abs=1e-9), s.parameter


def _opening(oid: str, floor: int, kind: OpeningKind, x_m: float, width_m: float,
             projection_m: float, facade: str = "street") -> Opening:
    balcony = kind in (OpeningKind.BALCONY, OpeningKind.TERRACE, OpeningKind.GALLERY)
    return Opening(
        id=oid, floor=floor, facade=facade, kind=kind, x_m=x_m, width_m=width_m,
        projection_m=projection_m if balcony else 0.0, perch_height_m=1.1 if balcony else 0.9,
        cats_present=CatsPresent.YES, open_frequency=OpenFrequency.DAILY,
    )


def _building(openings: list[Opening], profile: CatProfile | None = None) -> Building:
    return Building(
        info=BuildingInfo(name="Test House", address="1 Example Row"),
        floors=FLOORS,
        facades=(Facade("street", 30.0), Facade("garden", 30.0)),
        surfaces=(
            Surface("canopy", SurfaceKind.ROOF, 4.5, facade="street", to_facade_m=2.0),
            Surface("pavement", SurfaceKind.CONCRETE, 0.0, facade="street"),
            Surface("lawn", SurfaceKind.LAWN, 0.0, facade="garden"),
        ),
        openings=tuple(openings),
        cat_profile=CAT_PRESETS["adult"] if profile is None else profile,
    )


def _tricky() -> Building:
    """Windows over balconies of other widths and depths, deep balconies under shallow ones,
    two balconies side by side on one floor, a terrace low down, the other facade too."""
    b, w, t = OpeningKind.BALCONY, OpeningKind.WINDOW_CASEMENT, OpeningKind.TERRACE
    ops = [
        _opening("W18", 18, w, 3.0, 1.2, 0.0),
        _opening("B15", 15, b, 2.0, 2.0, 0.8),
        _opening("B12", 12, b, 3.5, 3.0, 1.6),
        _opening("B12b", 12, b, 0.0, 3.4, 2.5),
        _opening("B9", 9, b, 0.0, 6.0, 1.2),
        _opening("B6", 6, b, 2.5, 1.0, 3.0),
        _opening("T2", 2, t, 0.0, 10.0, 4.0),
        _opening("W16", 16, w, 10.0, 1.0, 0.0),
        _opening("B16", 16, b, 8.0, 4.0, 1.5),
        _opening("B14", 14, b, 8.0, 4.0, 1.5),
        _opening("B13", 13, b, 8.0, 4.0, 2.0),
        _opening("W20g", 20, w, 3.0, 1.2, 0.0, facade="garden"),
        _opening("B19g", 19, b, 3.2, 0.8, 1.0, facade="garden"),
        _opening("W11", 11, w, 20.0, 1.0, 0.0),
        _opening("W3", 3, w, 26.0, 1.0, 0.0),
    ]
    return _building(ops)


def test_equals_the_whole_building_method_on_the_samples() -> None:
    # invented sample buildings shipped with the package
    for name in ("tower", "block", "walkup"):
        building = load_building(f"sample_buildings/{name}.json")
        _check_equal(assess(building, samples=300, seed=4))


def test_equals_the_whole_building_method_where_balconies_catch() -> None:
    _check_equal(assess(_tricky(), samples=400, seed=2))
    # a fixed profile (every parameter swings by nothing but the relax probability)
    fixed = CatProfile(
        mass_kg=Fixed(4.1), cda_tense_m2=Fixed(0.114), cda_spread_m2=Fixed(0.227),
        relax_probability=0.5, relax_fraction=Fixed(0.75), righting_time_s=Fixed(0.3),
        launch_speed_mps=Fixed(1.5),
    )
    _check_equal(assess(replace(_tricky(), cat_profile=fixed), samples=200, seed=3))


_KINDS = st.sampled_from([OpeningKind.BALCONY, OpeningKind.TERRACE, OpeningKind.GALLERY,
                          OpeningKind.WINDOW_CASEMENT, OpeningKind.WINDOW_HUNG])


@st.composite
def _stacks(draw: st.DrawFn) -> Building:
    n = draw(st.integers(3, 14))
    ops = []
    for k in range(n):
        ops.append(_opening(
            f"O{k}", draw(st.integers(1, 20)), draw(_KINDS),
            draw(st.sampled_from([0.0, 0.5, 1.0, 2.0, 3.0])),
            draw(st.sampled_from([0.6, 1.0, 2.0, 4.0])),
            draw(st.sampled_from([0.5, 1.0, 1.5, 2.5])),
            facade=draw(st.sampled_from(["street", "street", "garden"])),
        ))
    return _building(ops)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(_stacks(), st.integers(0, 50))
def test_equals_the_whole_building_method_on_random_stacks(building: Building, seed: int) -> None:
    _check_equal(assess(building, samples=64, seed=seed))


def _counting(monkeypatch: pytest.MonkeyPatch) -> list[int]:
    calls: list[int] = []
    real = sensitivity.simulate_falls

    def counted(building: Building, samples: object) -> object:
        calls.append(len(building.openings))
        return real(building, samples)  # type: ignore[arg-type]

    monkeypatch.setattr(sensitivity, "simulate_falls", counted)
    return calls


def test_simulates_only_the_reported_part(monkeypatch: pytest.MonkeyPatch) -> None:
    building = _tricky()
    base = assess(building, samples=200, seed=1)
    calls = _counting(monkeypatch)
    sensitivity_analysis(base)
    # two values per parameter; the righting time changes no fall, so it reuses the falls
    assert len(calls) == 2 * (len(PARAMETERS) - 1)
    assert max(calls) < len(building.openings)


def test_reuses_the_result_when_an_edit_does_not_touch_the_reported_part(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    building = _tricky()
    base = assess(building, samples=200, seed=1)
    first = sensitivity_analysis(base)
    calls = _counting(monkeypatch)
    assert sensitivity_analysis(base) == first and calls == []
    # a low window away from the top openings made narrower: not reported, catches nothing
    ops = list(building.openings)
    low = next(i for i, o in enumerate(ops) if o.id == "W3")
    assert "W3" not in first.opening_ids
    ops[low] = replace(ops[low], width_m=0.9)
    edited = assess(replace(building, openings=tuple(ops)), samples=200, seed=1)
    assert sensitivity_analysis(edited) == first
    assert calls == []
    # a different seed: different cats, computed again
    sensitivity_analysis(assess(building, samples=200, seed=2))
    assert calls


def test_an_edit_below_a_reported_opening_is_computed_again(
    monkeypatch: pytest.MonkeyPatch,
) -> None:
    building = _tricky()
    base = assess(building, samples=200, seed=1)
    first = sensitivity_analysis(base)
    calls = _counting(monkeypatch)
    ops = list(building.openings)
    i = next(i for i, o in enumerate(ops) if o.id == "T2")
    ops[i] = replace(ops[i], projection_m=6.0)  # the terrace that catches the falls above
    edited = assess(replace(building, openings=tuple(ops)), samples=200, seed=1)
    again = sensitivity_analysis(edited)
    assert calls
    assert again != first
    _check_equal(edited)
