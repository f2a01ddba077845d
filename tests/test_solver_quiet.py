"""The MILP solver prints nothing on the descriptors, and nothing else printed meanwhile is lost
(petfall_audit._solver_output, used by petfall_audit.plan).

The HiGHS build inside scipy 1.17 prints lines such as
``HighsMipSolverData::transformNewIntegerFeasibleSolution tmpSolver.run();`` with C printf on
these knapsacks whatever ``disp`` says (seen on this project's machines; no source).
``capfd`` reads file descriptors 1 and 2, where C code prints.
"""

from __future__ import annotations

import os
import sys

import numpy as np
import pytest

from petfall_audit._solver_output import is_solver_chatter, solver_output_filtered
from petfall_audit.demo import sample_building
from petfall_audit.plan import make_plan, solve_choice_knapsack
from petfall_audit.risk import assess


def _knapsack(k: int, seed: int = 0) -> tuple[np.ndarray, np.ndarray, np.ndarray, float]:
    rng = np.random.default_rng(seed)
    group = np.repeat(np.arange(k // 3), 3)
    cost = rng.uniform(10, 500, k).round(2)
    gain = rng.uniform(0.1, 10, k)
    return group, cost, gain, float(cost.sum() / 10)


def _solver_lines(text: str) -> list[str]:
    return [line for line in text.splitlines() if is_solver_chatter(line)]


@pytest.mark.parametrize("k, large_problem", [(300, 10**9), (3000, 100)])
def test_the_knapsack_solver_prints_nothing(capfd: pytest.CaptureFixture[str], k: int,
                                            large_problem: int) -> None:
    group, cost, gain, budget = _knapsack(k)
    chosen, _ = solve_choice_knapsack(group, cost, gain, budget, large_problem=large_problem)
    assert 0 < chosen.sum() < k // 3  # a real trade-off: the solver ran
    out, err = capfd.readouterr()
    assert _solver_lines(out) == [] and _solver_lines(err) == []
    assert out == "" and err == ""


def test_the_plan_path_prints_nothing(capfd: pytest.CaptureFixture[str]) -> None:
    assessment = assess(sample_building("tower"), samples=300, seed=1)
    plan = make_plan(assessment, 3000.0)
    assert 0 < plan.total_cost <= 3000.0
    out, err = capfd.readouterr()
    assert _solver_lines(out) == [] and _solver_lines(err) == []


def test_other_output_during_a_solve_still_arrives(capfd: pytest.CaptureFixture[str]) -> None:
    with solver_output_filtered():
        os.write(1, b"HighsMipSolverData::run();\n")  # the solver's kind of line: dropped
        os.write(2, b"Traceback: a real error\n")
        print("a Python line", flush=True)
        print("a Python warning", file=sys.stderr, flush=True)
    out, err = capfd.readouterr()
    assert out == "a Python line\n"
    assert sorted(err.splitlines()) == ["Traceback: a real error", "a Python warning"]


def test_chatter_is_recognised_by_the_solver_name() -> None:
    assert is_solver_chatter("HighsMipSolverData::transformNewIntegerFeasibleSolution")
    assert is_solver_chatter("Running HiGHS 1.8.0 (git hash: 222cce7)")
    assert not is_solver_chatter("the fix plan could not be solved: infeasible")
