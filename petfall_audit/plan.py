"""The budgeted building plan: at most one control per opening, most risk removed within a budget.

This is a multiple-choice knapsack, solved exactly with :func:`scipy.optimize.milp` (HiGHS)::

    maximise    sum_k gain_k x_k          gain_k = risk_before[i(k)] - risk_after[k]
    subject to  sum_{k in opening i} x_k <= 1      for every opening i
                sum_k cost_k x_k <= budget
                x_k in {0, 1}

Costs and the budget are handled in whole cents (hundredths of the currency unit) so that "within
budget" is decided exactly. Risk is in the units of :func:`petfall_audit.risk.risk_score`; costs in
the catalogue's currency.

Exactness: the solver proves its plan within a relative gap of :data:`MIP_REL_GAP` (1e-6) of the
best possible, far below the Monte Carlo noise of the risk scores. A very large building with a
small budget can make the proof slow (a near-tie knapsack); the solve then stops after
``time_limit_s`` with the best plan found and :attr:`Plan.gap` reports its proven gap (0 otherwise).

Tie-breaking, deterministic: within one opening, among options that remove the same risk (to a
relative 1e-9), only the cheapest is kept, and among equally cheap ones the first in the catalogue;
options that cost more and remove no more risk than another of the same opening are dropped before
solving (this never changes the optimum). Across openings, HiGHS is deterministic: the same input
gives the same plan.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp
from scipy.sparse import coo_array, vstack

from petfall_audit.errors import PlanError
from petfall_audit.fixes import Catalogue, Option, load_catalogue, opening_options
from petfall_audit.risk import Assessment

__all__ = [
    "MIP_REL_GAP",
    "TIME_LIMIT_S",
    "Plan",
    "make_plan",
    "plan_from_options",
    "risk_budget_curve",
    "curve_from_options",
    "solve_choice_knapsack",
]

_TIE_RTOL = 1e-9
#: Relative optimality gap the solver must prove.
MIP_REL_GAP = 1e-6
#: Default time limit of one solve, s.
TIME_LIMIT_S = 10.0
#: Objective scale: the largest single gain becomes this many units, so HiGHS' absolute gap
#: (1e-6) resolves gains to about 1e-9 of the largest one.
_OBJECTIVE_SCALE = 1e3


@dataclass(frozen=True, slots=True)
class Plan:
    """A building's fix plan.

    ``budget`` and ``total_cost`` in ``currency``; ``risk_before`` / ``risk_after``: the summed risk
    score of every opening in the building without and with the ``actions`` (one :class:`Option`
    per treated opening, in building order). ``gap``: proven relative optimality gap (0 when the
    plan is optimal to :data:`MIP_REL_GAP`; larger only if the solve hit its time limit).
    """

    budget: float
    total_cost: float
    risk_before: float
    risk_after: float
    actions: tuple[Option, ...]
    currency: str
    gap: float = 0.0

    @property
    def risk_removed(self) -> float:
        """Summed risk score the plan removes."""
        return self.risk_before - self.risk_after


def _to_cents(values: np.ndarray) -> np.ndarray:
    return np.round(np.asarray(values, dtype=float) * 100.0).astype(np.int64)


def _check_budget(budget: float) -> float:
    b = float(budget)
    if not np.isfinite(b) or b < 0:
        raise ValueError(f"budget must be a finite amount >= 0, got {budget!r}")
    return b


def _prune(
    group: np.ndarray, cost_c: np.ndarray, gain: np.ndarray, order: np.ndarray
) -> np.ndarray:
    """Indices of the options left after dropping, per group, those that cost at least as much as
    another option and remove no more risk (the tie-breaking rule in the module docstring)."""
    idx = np.lexsort((order, -gain, cost_c, group))
    keep: list[int] = []
    last_group = None
    best = -np.inf
    for k in idx.tolist():  # O(options), once per solve; not a hot loop over samples
        g = group[k]
        if g != last_group:
            last_group, best = g, -np.inf
            keep.append(k)
            best = gain[k]
        elif gain[k] > best + _TIE_RTOL * max(abs(best), abs(gain[k])):
            keep.append(k)
            best = gain[k]
    return np.asarray(sorted(keep), dtype=np.intp)


def solve_choice_knapsack(
    group: np.ndarray,
    cost: np.ndarray,
    gain: np.ndarray,
    budget: float,
    *,
    order: np.ndarray | None = None,
    mip_rel_gap: float = MIP_REL_GAP,
    time_limit_s: float = TIME_LIMIT_S,
) -> tuple[np.ndarray, float]:
    """Choose at most one option per group, total cost within ``budget``, most total gain.

    ``group`` (k,) integer group (opening) of each option; ``cost`` (k,) in currency units,
    compared in whole cents; ``gain`` (k,) the risk each option removes (options with gain <= 0
    are never chosen); ``order`` (k,) tie-break rank within a group (catalogue position; default
    0). Returns a boolean mask (k,) of the chosen options and the proven relative optimality gap
    (0 when optimal to ``mip_rel_gap``). Raises :class:`PlanError` when the solver fails or finds
    no plan within ``time_limit_s`` seconds.
    """
    budget = _check_budget(budget)
    group = np.asarray(group, dtype=np.int64)
    gain = np.asarray(gain, dtype=float)
    cost_c = _to_cents(cost)
    order_a = np.zeros(group.shape, dtype=np.int64) if order is None else np.asarray(order)
    if not (group.shape == gain.shape == cost_c.shape == order_a.shape) or group.ndim != 1:
        raise ValueError("group, cost, gain and order must be 1-D arrays of one length")
    if np.any(cost_c < 0) or not np.all(np.isfinite(gain)):
        raise ValueError("costs must be >= 0 and gains finite")
    budget_c = int(np.floor(budget * 100.0 + 1e-6))
    chosen = np.zeros(group.shape, dtype=bool)

    usable = np.flatnonzero((gain > 0) & (cost_c <= budget_c))
    if usable.size == 0:
        return chosen, 0.0
    usable = usable[_prune(group[usable], cost_c[usable], gain[usable], order_a[usable])]
    g, c, v = group[usable], cost_c[usable], gain[usable]

    # Budget covers the best option of every opening: no trade-off to solve.
    groups, inverse = np.unique(g, return_inverse=True)
    best = np.lexsort((order_a[usable], c, -v, inverse))
    first = np.ones(best.size, dtype=bool)
    first[1:] = inverse[best][1:] != inverse[best][:-1]
    top = best[first]
    if int(c[top].sum()) <= budget_c:
        chosen[usable[top]] = True
        return chosen, 0.0

    k = usable.size
    one_per_group = coo_array((np.ones(k), (inverse, np.arange(k))), shape=(groups.size, k)).tocsr()
    a = vstack([one_per_group, coo_array(c.astype(float)[None, :])]).tocsr()
    ub = np.concatenate([np.ones(groups.size), [float(budget_c)]])
    objective = -v * (_OBJECTIVE_SCALE / v.max())
    res = milp(
        objective,
        integrality=np.ones(k),
        bounds=Bounds(0.0, 1.0),
        constraints=LinearConstraint(a, -np.inf, ub),
        # disp=False: the solver prints no progress log (the command line also holds back what
        # compiled libraries print on the terminal, see petfall_audit.cli)
        options={"disp": False, "mip_rel_gap": float(mip_rel_gap),
                 "time_limit": float(time_limit_s)},
    )
    if res.status not in (0, 1) or res.x is None:
        raise PlanError(f"the fix plan could not be solved: {res.message}")
    gap = 0.0 if res.status == 0 else float(getattr(res, "mip_gap", np.nan))
    x = res.x > 0.5
    if int(c[x].sum()) > budget_c or np.any(np.bincount(inverse[x], minlength=groups.size) > 1):
        raise PlanError(
            "the solver returned a plan that breaks the budget or picks two fixes for one opening"
        )
    chosen[usable[x]] = True
    return chosen, gap


def _flatten(
    options: Mapping[str, Sequence[Option]],
) -> tuple[list[Option], np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    flat: list[Option] = []
    group: list[int] = []
    for gi, opts in enumerate(options.values()):
        flat.extend(opts)
        group.extend([gi] * len(opts))
    cost = np.array([o.cost for o in flat], dtype=float)
    gain = np.array([o.risk_before - o.risk_after for o in flat], dtype=float)
    order = np.array([o.catalogue_index for o in flat], dtype=np.int64)
    return flat, np.asarray(group, dtype=np.int64), cost, gain, order


def plan_from_options(
    options: Mapping[str, Sequence[Option]],
    budget: float,
    *,
    risk_before: float,
    currency: str,
) -> Plan:
    """The best plan within ``budget`` from per-opening ``options`` (as from
    :func:`petfall_audit.fixes.opening_options`). ``risk_before``: the building's summed risk score,
    including openings without options."""
    budget = _check_budget(budget)
    flat, group, cost, gain, order = _flatten(options)
    chosen, gap = solve_choice_knapsack(group, cost, gain, budget, order=order)
    actions = tuple(flat[k] for k in np.flatnonzero(chosen))
    total_cost = float(_to_cents(cost[chosen]).sum()) / 100.0
    removed = float(gain[chosen].sum())
    return Plan(
        budget=budget,
        total_cost=total_cost,
        risk_before=float(risk_before),
        risk_after=float(risk_before) - removed,
        actions=actions,
        currency=currency,
        gap=gap,
    )


def make_plan(
    assessment: Assessment,
    budget: float,
    *,
    catalogue: Catalogue | None = None,
    options: Mapping[str, Sequence[Option]] | None = None,
) -> Plan:
    """The set of controls (at most one per opening) that removes the most risk within ``budget``
    (in the catalogue's currency). ``catalogue`` defaults to the shipped one; pass ``options`` from
    :func:`~petfall_audit.fixes.opening_options` to reuse them."""
    budget = _check_budget(budget)
    cat = load_catalogue() if catalogue is None else catalogue
    if options is None:
        options = opening_options(assessment, cat)
    return plan_from_options(
        options, budget, risk_before=float(np.sum(assessment.risk)), currency=cat.currency
    )


def curve_from_options(
    options: Mapping[str, Sequence[Option]],
    budgets: Sequence[float] | np.ndarray,
    *,
    mip_rel_gap: float = 1e-4,
    time_limit_s: float = 5.0,
) -> tuple[np.ndarray, np.ndarray]:
    """Risk removed by the best plan at each budget: ``(budgets, risk_removed)``, both (b,) in the
    order given (budgets in currency, risk in summed risk-score units).

    Each point is solved to ``mip_rel_gap`` (1e-4 by default: a curve is read, not executed) within
    ``time_limit_s``; since a plan that fits a budget fits every larger one, each point is at least
    the best of the smaller budgets, so more budget never removes less risk."""
    b = np.asarray(budgets, dtype=float).reshape(-1)
    for value in b:
        _check_budget(float(value))
    flat, group, cost, gain, order = _flatten(options)
    removed = np.empty(b.shape)
    for j, value in enumerate(b):  # one solve per budget
        chosen, _ = solve_choice_knapsack(
            group,
            cost,
            gain,
            float(value),
            order=order,
            mip_rel_gap=mip_rel_gap,
            time_limit_s=time_limit_s,
        )
        removed[j] = gain[chosen].sum()
    by_budget = np.argsort(b, kind="stable")
    removed[by_budget] = np.maximum.accumulate(removed[by_budget])
    return b, removed


def risk_budget_curve(
    assessment: Assessment,
    budgets: Sequence[float] | np.ndarray,
    *,
    catalogue: Catalogue | None = None,
) -> tuple[np.ndarray, np.ndarray]:
    """The risk-reduction-against-budget curve: ``(budgets, risk_removed)``, (b,) each; budgets in
    the catalogue's currency, risk removed in summed risk-score units. Residual risk is
    ``assessment.risk.sum() - risk_removed``."""
    cat = load_catalogue() if catalogue is None else catalogue
    return curve_from_options(opening_options(assessment, cat), budgets)
