"""The budgeted plan (multiple-choice knapsack with scipy.optimize.milp) and its budget curve."""

from __future__ import annotations

import itertools
import time
from dataclasses import replace

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from petfall_audit.demo import make_large_tower, sample_building
from petfall_audit.errors import PlanError
from petfall_audit.fixes import Option, load_catalogue, opening_options
from petfall_audit.model import OpeningKind
from petfall_audit.plan import (
    curve_from_options,
    make_plan,
    plan_from_options,
    risk_budget_curve,
    solve_choice_knapsack,
)
from petfall_audit.risk import assess

CAT = load_catalogue()
ESCAPE_BLOCKING = {
    "net_clamp_30",
    "net_anchored_30",
    "net_anchored_20",
    "screen_pet_fixed",
    "limiter_fixed_40",
}


def _brute_force(group: np.ndarray, cost: np.ndarray, gain: np.ndarray, budget: float) -> float:
    """Best total gain over every choice of at most one option per group (exhaustive)."""
    groups = sorted(set(group.tolist()))
    per_group = [[None, *np.flatnonzero(group == g).tolist()] for g in groups]
    budget_c = int(np.floor(budget * 100 + 1e-6))
    cost_c = np.round(cost * 100).astype(np.int64)
    best = 0.0
    for combo in itertools.product(*per_group):
        picked = [k for k in combo if k is not None]
        if int(cost_c[picked].sum()) <= budget_c:
            best = max(best, float(gain[picked].sum()))
    return best


@st.composite
def instances(draw: st.DrawFn) -> tuple[np.ndarray, np.ndarray, np.ndarray, float]:
    n_groups = draw(st.integers(1, 5))
    sizes = [draw(st.integers(0, 4)) for _ in range(n_groups)]
    group = np.repeat(np.arange(n_groups), sizes)
    k = int(group.size)
    cost = np.array(draw(st.lists(st.integers(0, 500), min_size=k, max_size=k)), float) * 1.25
    gain = np.array(draw(st.lists(st.floats(-5.0, 100.0), min_size=k, max_size=k)), float)
    budget = float(draw(st.integers(0, 1500)))
    return group, cost, gain, budget


@settings(max_examples=150, deadline=None)
@given(instances())
def test_milp_plan_equals_the_brute_force_optimum(inst) -> None:  # type: ignore[no-untyped-def]
    group, cost, gain, budget = inst
    chosen, gap = solve_choice_knapsack(group, cost, gain, budget)
    assert gap == 0.0
    assert np.round(cost[chosen] * 100).sum() <= np.floor(budget * 100 + 1e-6)
    assert np.all(np.bincount(group[chosen], minlength=max(group.size, 1)) <= 1)
    assert np.all(gain[chosen] > 0)
    best = _brute_force(group, cost, gain, budget)
    assert gain[chosen].sum() == pytest.approx(best, rel=1e-6, abs=1e-9)


@settings(max_examples=60, deadline=None)
@given(instances(), st.integers(0, 800))
def test_more_budget_never_removes_less_risk(inst, extra: int) -> None:  # type: ignore[no-untyped-def]
    group, cost, gain, budget = inst
    small, _ = solve_choice_knapsack(group, cost, gain, budget)
    large, _ = solve_choice_knapsack(group, cost, gain, budget + extra)
    assert gain[large].sum() >= gain[small].sum() - 1e-6 * max(1.0, abs(gain[small].sum()))


def test_ties_prefer_cheaper_then_catalogue_order() -> None:
    group = np.array([0, 0, 0, 1, 1])
    cost = np.array([50.0, 20.0, 20.0, 10.0, 10.0])
    gain = np.array([7.0, 7.0, 7.0, 3.0, 3.0])
    order = np.array([0, 5, 2, 4, 1])
    chosen, _ = solve_choice_knapsack(group, cost, gain, 1000.0, order=order)
    assert chosen.tolist() == [False, False, True, False, True]
    again, _ = solve_choice_knapsack(group, cost, gain, 25.0, order=order)
    assert again.tolist() == [False, False, True, False, False]


def test_budget_zero_no_options_and_bad_budgets() -> None:
    group = np.array([0, 0, 1])
    cost = np.array([0.0, 10.0, 5.0])
    gain = np.array([1.0, 9.0, 4.0])
    chosen, _ = solve_choice_knapsack(group, cost, gain, 0.0)
    assert chosen.tolist() == [True, False, False]  # only the free option fits
    empty, _ = solve_choice_knapsack(np.array([], int), np.array([]), np.array([]), 100.0)
    assert empty.size == 0
    plan = plan_from_options({"A": [], "B": []}, 100.0, risk_before=12.0, currency="EUR")
    assert plan.actions == () and plan.total_cost == 0.0 and plan.risk_after == 12.0
    for bad in (-1.0, float("nan"), float("inf")):
        with pytest.raises(ValueError, match="budget"):
            solve_choice_knapsack(group, cost, gain, bad)


def test_solver_failure_raises_plan_error(monkeypatch: pytest.MonkeyPatch) -> None:
    class Failed:
        status, x, message = 4, None, "numerical trouble"

    import scipy.optimize

    # the planner takes milp from scipy.optimize when it solves (a lazy import)
    monkeypatch.setattr(scipy.optimize, "milp", lambda *a, **k: Failed())
    group, cost, gain = np.array([0, 1]), np.array([10.0, 10.0]), np.array([1.0, 2.0])
    with pytest.raises(PlanError, match="numerical trouble"):
        solve_choice_knapsack(group, cost, gain, 10.0)


# --- on real buildings ----------------------------------------------------------------------------


@pytest.fixture(scope="module")
def walkup():  # type: ignore[no-untyped-def]
    building = sample_building("walkup")
    openings = tuple(  # make every hinged window an escape window to stress the rule
        replace(o, escape_window=True) if o.kind is OpeningKind.WINDOW_CASEMENT else o
        for o in building.openings
    )
    a = assess(replace(building, openings=openings), samples=300, seed=5)
    return a, opening_options(a, CAT)


@pytest.mark.parametrize("budget", [0.0, 35.0, 400.0, 2500.0, 1e6])
def test_plan_respects_budget_escape_windows_and_accounts_risk(walkup, budget: float) -> None:  # type: ignore[no-untyped-def]
    a, options = walkup
    plan = make_plan(a, budget, catalogue=CAT, options=options)
    assert plan.total_cost <= budget + 1e-9
    assert plan.total_cost == pytest.approx(sum(x.cost for x in plan.actions))
    assert plan.risk_before == pytest.approx(float(a.risk.sum()))
    removed = sum(x.risk_before - x.risk_after for x in plan.actions)
    assert plan.risk_after == pytest.approx(plan.risk_before - removed)
    assert len({x.opening_id for x in plan.actions}) == len(plan.actions)
    escape = {o.id for o in a.building.openings if o.escape_window}
    assert escape
    for action in plan.actions:
        if action.opening_id in escape:
            assert action.control_id not in ESCAPE_BLOCKING
        assert all(isinstance(c, str) for c in action.conditions)
    assert plan.currency == "EUR"


def test_curve_is_monotone_and_matches_single_plans(walkup) -> None:  # type: ignore[no-untyped-def]
    a, options = walkup
    budgets = np.array([2000.0, 0.0, 100.0, 500.0, 1e5])
    b, removed = risk_budget_curve(a, budgets, catalogue=CAT)
    assert b.tolist() == budgets.tolist()
    order = np.argsort(budgets)
    assert np.all(np.diff(removed[order]) >= 0)
    exact = make_plan(a, 500.0, catalogue=CAT, options=options)
    assert removed[3] == pytest.approx(exact.risk_removed, rel=1e-4)
    _, again = curve_from_options(options, budgets)
    assert again.tolist() == removed.tolist()


def test_plan_is_deterministic(walkup) -> None:  # type: ignore[no-untyped-def]
    a, options = walkup
    p1 = make_plan(a, 750.0, catalogue=CAT, options=options)
    p2 = make_plan(a, 750.0, catalogue=CAT)
    assert p1 == p2


def test_large_tower_plans_quickly() -> None:
    # 60 floors × 20 openings; the issue asks for a fast plan on this building
    a = assess(make_large_tower(), samples=200, seed=1)
    options = opening_options(a, CAT)
    assert sum(len(v) for v in options.values()) > 4000
    start = time.perf_counter()
    for budget in (1000.0, 50_000.0):
        plan = make_plan(a, budget, catalogue=CAT, options=options)
        assert plan.total_cost <= budget
        assert plan.risk_after < plan.risk_before
    assert time.perf_counter() - start < 30.0


def test_option_dataclass_fields_for_consumers() -> None:
    o = Option("A", "net", "Net", 10.0, 5.0, 1.0, ("c",))
    assert o.risk_removed == 4.0 and o.share_removed == 0.8


def test_importing_the_planner_does_not_load_the_optimiser() -> None:
    # scipy.optimize costs about 0.2 s to import; a batch worker with no budget never solves
    import subprocess
    import sys

    code = ("import sys; import petfall_audit.plan, petfall_audit.report, petfall_audit.batch; "
            "print('scipy.optimize' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
