"""The injury dose–response against published case series (petfall_audit.calibration)."""

from __future__ import annotations

import pytest

from petfall_audit.calibration import (
    CASE_SERIES,
    MODERATE_RATIO,
    comparison_rows,
    fit_thresholds,
    series_doses,
)
from petfall_audit.model import InjuryThresholds


@pytest.fixture(scope="module")
def doses():  # type: ignore[no-untyped-def]
    return [series_doses(s, samples=2000) for s in CASE_SERIES]


def test_shipped_defaults_are_the_fit(doses) -> None:  # type: ignore[no-untyped-def]
    # the defaults in model.InjuryThresholds are what tools/calibrate_injury.py fitted (4,000
    # cats); refitting with 2,000 cats lands close to them
    fit = fit_thresholds(doses)
    shipped = InjuryThresholds()
    assert fit.serious_g == pytest.approx(shipped.serious_g, rel=0.05)
    assert fit.life_threatening_g == pytest.approx(shipped.life_threatening_g, rel=0.08)
    assert fit.spread == pytest.approx(shipped.spread, abs=0.05)
    assert shipped.moderate_g == pytest.approx(shipped.serious_g * MODERATE_RATIO, abs=0.06)


def test_published_figures_and_the_model(doses) -> None:  # type: ignore[no-untyped-def]
    rows = {(r["series"], r["measure"]): r for r in comparison_rows(doses, InjuryThresholds())}
    berlin = {m: r for (s, m), r in rows.items() if s.startswith("Candela Andrade")}
    # Candela Andrade et al. 2025, J Feline Med Surg (1125 cats, Berlin): 13.3 % died or were
    # put to sleep; 47.2 % had limb fractures. The fit matches the largest series closely.
    died = berlin["died or put to sleep → life-threatening"]
    assert died["published"] == 0.133 and abs(float(died["difference"])) < 0.03
    fract = berlin["limb fracture → serious or worse"]
    assert fract["published"] == 0.472 and abs(float(fract["difference"])) < 0.03
    # Vnuk et al. 2004, J Feline Med Surg 6:305 (Zagreb): 96.5 % survived, 46.2 % limb fractures
    zagreb = {m: r for (s, m), r in rows.items() if s.startswith("Vnuk")}
    assert zagreb["died or put to sleep → life-threatening"]["published"] == pytest.approx(0.035)
    assert abs(float(zagreb["limb fracture → serious or worse"]["difference"])) < 0.05
    # every figure of the table within 20 points: the series scatter around the model
    assert all(abs(float(r["difference"])) < 0.20 for r in rows.values())
    assert sum(1 for s in CASE_SERIES if s.in_fit) >= 3


def test_an_unpenalised_fit_would_ignore_the_dose(doses) -> None:  # type: ignore[no-untyped-def]
    # why the prior on the spread is stated: without it the series alone push the spread to
    # its bound (the response no longer depends on the dose)
    import petfall_audit.calibration as cal

    old = cal.SPREAD_PRIOR_LOG_SD
    try:
        cal.SPREAD_PRIOR_LOG_SD = 1e6
        free = fit_thresholds(doses)
    finally:
        cal.SPREAD_PRIOR_LOG_SD = old
    assert free.spread > 2.0


def test_the_extrapolation_note_starts_where_the_fitted_series_end() -> None:
    from petfall_audit.injury import CALIBRATED_DROP_MAX_M

    assert max(max(s.drops_m) for s in CASE_SERIES if s.in_fit) == CALIBRATED_DROP_MAX_M
