"""One budget over many buildings (petfall_audit.portfolio, plan's core method, batch
--portfolio-budget)."""

from __future__ import annotations

import json
from pathlib import Path

import numpy as np
import pytest
from scipy.optimize import Bounds, LinearConstraint, milp

import petfall_audit.plan as plan_module
from petfall_audit._resources import sample_path
from petfall_audit.cli import main
from petfall_audit.demo import sample_building
from petfall_audit.fixes import load_catalogue, opening_options
from petfall_audit.plan import solve_choice_knapsack
from petfall_audit.portfolio import EstateBuilding, equal_share_plans, plan_portfolio
from petfall_audit.risk import assess


@pytest.fixture(scope="module")
def estate() -> list[EstateBuilding]:
    catalogue = load_catalogue()
    out = []
    for name in ("walkup", "block", "tower"):
        a = assess(sample_building(name), samples=300, seed=1)
        out.append(EstateBuilding(file=f"{name}.json", name=a.building.info.name,
                                  result_file=f"{name}.json",
                                  options=opening_options(a, catalogue),
                                  risk_before=float(a.risk.sum())))
    return out


@pytest.mark.parametrize("budget", [0.0, 150.0, 1_000.0, 4_000.0, 15_000.0, 60_000.0, 1e6])
def test_one_budget_removes_at_least_equal_shares_and_stays_within_it(
    estate: list[EstateBuilding], budget: float
) -> None:
    currency = load_catalogue().currency
    portfolio = plan_portfolio(estate, budget, currency=currency)
    alone = equal_share_plans(estate, budget, currency=currency)
    # the equal-share plans together are one feasible plan for the whole budget, so the best
    # plan over the estate removes at least as much (knapsack optimality; both solved to a
    # relative gap of 1e-6)
    assert portfolio.risk_removed >= sum(p.risk_removed for p in alone) * (1 - 2e-6) - 1e-9
    assert portfolio.total_cost <= budget + 1e-9
    assert sum(b.cost for b in portfolio.buildings) == pytest.approx(portfolio.total_cost)
    assert sum(b.risk_removed for b in portfolio.buildings) == pytest.approx(
        portfolio.risk_removed)
    for share, building in zip(portfolio.buildings, estate, strict=True):
        treated = [a.opening_id for a in share.actions]
        assert len(treated) == len(set(treated))  # at most one control per opening
        assert set(treated) <= set(building.options)


def _exact(group: np.ndarray, cost: np.ndarray, gain: np.ndarray, budget: float) -> float:
    """The best total gain, written straight as a scipy milp (the general-purpose reference)."""
    groups = np.unique(group)
    rows = (group[None, :] == groups[:, None]).astype(float)
    a = np.vstack([rows, cost[None, :]])
    ub = np.concatenate([np.ones(groups.size), [budget]])
    res = milp(-gain, integrality=np.ones(gain.size), bounds=Bounds(0, 1),
               constraints=LinearConstraint(a, -np.inf, ub), options={"mip_rel_gap": 1e-9})
    assert res.status == 0
    return float(-res.fun)


def _random_knapsack(seed: int, n_groups: int = 60, per: int = 4
                     ) -> tuple[np.ndarray, np.ndarray, np.ndarray, float]:
    """A random multiple-choice knapsack: ``per`` options in each of ``n_groups`` groups and a
    budget of 60% of what the cheapest option of every group costs together."""
    rng = np.random.default_rng(seed)
    group = np.repeat(np.arange(n_groups), per)
    cost = np.round(rng.uniform(5, 400, group.size), 2)
    gain = np.round(cost * rng.uniform(0.2, 3.0, group.size) + rng.uniform(0, 50, group.size), 3)
    budget = float(cost.reshape(n_groups, per).min(axis=1).sum() * 0.6)
    return group, cost, gain, budget


def _assert_a_plan(group: np.ndarray, cost: np.ndarray, chosen: np.ndarray,
                   budget: float) -> None:
    """Within the budget (whole cents) and at most one option per group."""
    assert float(np.round(cost[chosen] * 100).sum()) <= round(budget * 100)
    assert np.bincount(group[chosen], minlength=group.max() + 1).max() <= 1


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_the_core_method_is_within_its_reported_gap_of_the_best(
    seed: int, monkeypatch: pytest.MonkeyPatch
) -> None:
    group, cost, gain, budget = _random_knapsack(seed, n_groups=120)
    monkeypatch.setattr(plan_module, "CORE_OPENINGS", 15)  # most openings fixed by the LP
    chosen, gap = solve_choice_knapsack(group, cost, gain, budget, large_problem=10)
    best = _exact(group, cost, gain, budget)
    value = float(gain[chosen].sum())
    _assert_a_plan(group, cost, chosen, budget)
    assert value <= best * (1 + 1e-9)
    assert (best - value) / best <= max(gap, 1e-6) + 1e-9
    exact_chosen, exact_gap = solve_choice_knapsack(group, cost, gain, budget)
    assert exact_gap == 0.0
    assert float(gain[exact_chosen].sum()) == pytest.approx(best, rel=1e-6)


class _OutOfTime:
    """What scipy's milp returns when HiGHS reaches its time limit before it finds any plan
    (seen on an estate of 50 copies of two sample buildings: status 1, no x)."""

    status, x, fun = 1, None, None
    message = "Time limit reached. (HiGHS Status 13: model_status is Time limit reached)"


@pytest.mark.parametrize("seed", [0, 1])
def test_a_solver_out_of_time_without_a_plan_falls_back_to_the_core_method(
    seed: int, monkeypatch: pytest.MonkeyPatch
) -> None:
    import scipy.optimize

    group, cost, gain, budget = _random_knapsack(seed)
    best = _exact(group, cost, gain, budget)  # before the solver is replaced
    real_milp = scipy.optimize.milp
    calls: list[int] = []

    def first_out_of_time(*args: object, **kwargs: object) -> object:
        calls.append(1)  # the whole problem runs out of time; the core's solve does not
        return _OutOfTime() if len(calls) == 1 else real_milp(*args, **kwargs)

    monkeypatch.setattr(scipy.optimize, "milp", first_out_of_time)
    monkeypatch.setattr(plan_module, "CORE_OPENINGS", 10)
    chosen, gap = solve_choice_knapsack(group, cost, gain, budget)
    assert len(calls) == 2  # the whole problem, then the core
    value = float(gain[chosen].sum())
    _assert_a_plan(group, cost, chosen, budget)
    assert 0 < value <= best * (1 + 1e-9)
    assert (best - value) / best <= max(gap, 1e-6) + 1e-9  # the reported gap is honest


def test_a_core_that_cannot_be_solved_keeps_the_relaxations_plan(
    monkeypatch: pytest.MonkeyPatch
) -> None:
    import scipy.optimize

    group, cost, gain, budget = _random_knapsack(3)
    best = _exact(group, cost, gain, budget)
    monkeypatch.setattr(scipy.optimize, "milp", lambda *a, **k: _OutOfTime())
    chosen, gap = solve_choice_knapsack(group, cost, gain, budget)
    value = float(gain[chosen].sum())
    _assert_a_plan(group, cost, chosen, budget)
    # the relaxation's whole steps: a plan, not nothing, and its gap is said
    assert value > 0.5 * best
    assert gap > 0 and (best - value) / best <= gap + 1e-9


def test_the_planner_still_refuses_when_the_solver_fails_outright(
    monkeypatch: pytest.MonkeyPatch
) -> None:
    import scipy.optimize

    from petfall_audit.errors import PlanError

    class Infeasible:
        status, x, message = 2, None, "the model is infeasible"

    group, cost, gain, budget = _random_knapsack(4)
    monkeypatch.setattr(scipy.optimize, "milp", lambda *a, **k: Infeasible())
    with pytest.raises(PlanError, match="infeasible"):
        solve_choice_knapsack(group, cost, gain, budget)


def test_batch_writes_the_estate_plan_and_summary(tmp_path: Path) -> None:
    files = [str(sample_path(n)) for n in ("walkup", "block", "tower")]
    out = tmp_path / "out"
    code = main(["batch", *files, "--out-dir", str(out), "--samples", "300",
                 "--portfolio-budget", "5000", "--jobs", "1"])
    assert code == 0
    doc = json.loads((out / "portfolio-plan.json").read_text("utf-8"))["portfolio"]
    assert doc["format"] == "petfall-audit-portfolio-plan"
    assert doc["total_cost"] <= 5000
    assert doc["risk_after"] < doc["risk_before"]
    assert [Path(b["file"]).stem for b in doc["buildings"]] == ["walkup", "block", "tower"]
    assert sum(b["cost"] for b in doc["buildings"]) == pytest.approx(doc["total_cost"], abs=0.05)
    assert all({"actions", "cost", "risk_before", "risk_after"} <= set(b)
               for b in doc["buildings"])
    assert doc["cautions"]
    pdf = (out / "portfolio.pdf").read_bytes()
    assert pdf.startswith(b"%PDF") and len(pdf) > 5000
    summary = (out / "summary.csv").read_text("utf-8")
    assert "portfolio" not in summary  # the estate files are not building results


def test_portfolio_budget_must_not_be_negative(tmp_path: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["batch", str(sample_path("walkup")), "--out-dir", str(tmp_path),
                 "--portfolio-budget", "-1"]) == 2
    assert "--portfolio-budget must be at least 0" in capsys.readouterr().err


def test_no_estate_plan_when_no_building_could_be_assessed(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    # an estate plan of no building would say "risk 0 -> 0": as if the estate had no risk
    bad = tmp_path / "bad.json"
    bad.write_text("{}", "utf-8")
    out = tmp_path / "out"
    assert main(["batch", str(bad), "--out-dir", str(out), "--portfolio-budget", "1000",
                 "--jobs", "1"]) == 2
    err = capsys.readouterr().err
    assert "no building could be assessed, so no estate plan was written" in err
    assert not (out / "portfolio-plan.json").exists()
    assert not (out / "portfolio.pdf").exists()


def test_the_spend_chart_tells_buildings_of_one_name_apart(estate: list[EstateBuilding]) -> None:
    from dataclasses import replace

    from petfall_audit.report.portfolio import build_portfolio_context

    twins = [replace(estate[0], file="north/walkup.json", result_file="walkup.json"),
             replace(estate[0], file="south/walkup.json", result_file="walkup-2.json"),
             estate[1]]
    portfolio = plan_portfolio(twins, 3000.0, currency="EUR")
    ctx = build_portfolio_context(portfolio, np.array([0.0, 3000.0]), np.array([0.0, 1.0]),
                                  generated_on="2026-12-04")
    name, other = estate[0].name, estate[1].name
    assert sorted(ctx.chart_labels) == sorted([f"{name} (walkup.json)",
                                               f"{name} (walkup-2.json)", other])
