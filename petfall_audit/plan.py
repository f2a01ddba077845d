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

Large problems (more than :data:`LARGE_PROBLEM` options, e.g. a plan over many buildings): the
linear relaxation is solved exactly first (the greedy over each opening's upper convex hull of
cost against risk removed), every opening far from the relaxation's break keeps the relaxation's
whole choice, and only the :data:`CORE_OPENINGS` openings nearest the break go to the MILP with
the budget left ("core" method). The relaxation bounds the best possible plan, so the reported
gap is proven against it (0 when within :data:`MIP_REL_GAP`). The core method also takes over
when the MILP runs out of time before it finds any plan (many near-identical openings, as in an
estate of copies of one building); should the core's own MILP fail, the relaxation's whole steps
are the plan, never an error, and the gap says how far from the best it may be.

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

from petfall_audit._solver_output import solver_output_filtered
from petfall_audit.errors import PlanError
from petfall_audit.fixes import Catalogue, Option, load_catalogue, opening_options
from petfall_audit.model import Building, PlanSettings
from petfall_audit.risk import Assessment, assess
from petfall_audit.sampling import DEFAULT_SAMPLES, DEFAULT_SEED

__all__ = [
    "MIP_REL_GAP",
    "LARGE_PROBLEM",
    "CORE_OPENINGS",
    "TIME_LIMIT_S",
    "Plan",
    "make_plan",
    "plan_from_settings",
    "with_plan_settings",
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
#: Options above which the core method solves the knapsack (see the module docstring).
LARGE_PROBLEM = 10_000
#: Openings left to the MILP by the core method.
CORE_OPENINGS = 300


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
    large_problem: int = LARGE_PROBLEM,
    core_fallback: bool = True,
) -> tuple[np.ndarray, float]:
    """Choose at most one option per group, total cost within ``budget``, most total gain.

    ``group`` (k,) integer group (opening) of each option; ``cost`` (k,) in currency units,
    compared in whole cents; ``gain`` (k,) the risk each option removes (options with gain <= 0
    are never chosen); ``order`` (k,) tie-break rank within a group (catalogue position; default
    0). Returns a boolean mask (k,) of the chosen options and the proven relative optimality gap
    (0 when optimal to ``mip_rel_gap``). Raises :class:`PlanError` when the solver fails or finds
    no plan within ``time_limit_s`` seconds and ``core_fallback`` is off. Above ``large_problem``
    usable options the core method of the module docstring is used; with ``core_fallback`` (the
    default) also when the solver runs out of time before it finds any plan.
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

    if usable.size > large_problem:
        mask, gap = _solve_with_core(inverse, c, v, order_a[usable], budget_c,
                                     mip_rel_gap=mip_rel_gap, time_limit_s=time_limit_s)
        chosen[usable[mask]] = True
        return chosen, gap

    # scipy's optimiser is loaded only here, where a trade-off is solved: importing it costs
    # about 0.2 s, which a report, a batch worker or the app that plans nothing need not pay
    from scipy.optimize import Bounds, LinearConstraint, milp
    from scipy.sparse import coo_array, vstack

    k = usable.size
    one_per_group = coo_array((np.ones(k), (inverse, np.arange(k))), shape=(groups.size, k)).tocsr()
    a = vstack([one_per_group, coo_array(c.astype(float)[None, :])]).tocsr()
    ub = np.concatenate([np.ones(groups.size), [float(budget_c)]])
    objective = -v * (_OBJECTIVE_SCALE / v.max())
    with solver_output_filtered():  # the solver prints some lines whatever its options say
        res = milp(
            objective,
            integrality=np.ones(k),
            bounds=Bounds(0.0, 1.0),
            constraints=LinearConstraint(a, -np.inf, ub),
            # disp=False: no progress log; its other prints are dropped by the filter
            options={"disp": False, "mip_rel_gap": float(mip_rel_gap),
                     "time_limit": float(time_limit_s)},
        )
    if res.status == 1 and res.x is None and core_fallback:
        # out of time before any plan (many near-identical openings, e.g. an estate of copies
        # of one building): the core method's plan, its gap proven against the relaxation
        mask, gap = _solve_with_core(inverse, c, v, order_a[usable], budget_c,
                                     mip_rel_gap=mip_rel_gap, time_limit_s=time_limit_s)
        chosen[usable[mask]] = True
        return chosen, gap
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


def _hull_segments(
    group: np.ndarray, cost_c: np.ndarray, gain: np.ndarray
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """The steps of every group's upper convex hull of (cost, gain) from "no option" (0, 0):
    ``(group, to_option, prev_option or -1, d_cost, d_gain)`` per step, steps of one group in
    increasing cost. The linear relaxation of the knapsack takes steps by falling efficiency."""
    order = np.lexsort((-gain, cost_c, group))
    seg_g: list[int] = []
    seg_to: list[int] = []
    seg_from: list[int] = []
    start = 0
    n = order.size
    g_sorted = group[order]
    bounds = np.flatnonzero(np.diff(g_sorted)) + 1
    for end in [*bounds.tolist(), n]:  # O(options) once per solve; not a loop over samples
        hull: list[int] = []  # option indices; the origin is implicit
        for k in order[start:end].tolist():
            ck, vk = float(cost_c[k]), float(gain[k])
            if hull and vk <= float(gain[hull[-1]]):
                continue  # costs no less, removes no more
            while hull:
                c1, v1 = (float(cost_c[hull[-2]]), float(gain[hull[-2]])) if len(hull) > 1 \
                    else (0.0, 0.0)
                c2, v2 = float(cost_c[hull[-1]]), float(gain[hull[-1]])
                # drop the last point when it lies on or below the line from c1 to the new one
                if (v2 - v1) * (ck - c1) <= (vk - v1) * (c2 - c1):
                    hull.pop()
                else:
                    break
            hull.append(k)
        prev = -1
        for k in hull:
            seg_g.append(int(group[k]))
            seg_to.append(k)
            seg_from.append(prev)
            prev = k
        start = end
    to = np.asarray(seg_to, dtype=np.intp)
    frm = np.asarray(seg_from, dtype=np.intp)
    d_cost = cost_c[to].astype(float) - np.where(frm >= 0, cost_c[np.maximum(frm, 0)], 0)
    d_gain = gain[to] - np.where(frm >= 0, gain[np.maximum(frm, 0)], 0.0)
    return np.asarray(seg_g, dtype=np.intp), to, frm, d_cost, d_gain


def _solve_with_core(
    group: np.ndarray, cost_c: np.ndarray, gain: np.ndarray, order: np.ndarray, budget_c: int,
    *, mip_rel_gap: float, time_limit_s: float,
) -> tuple[np.ndarray, float]:
    """The core method (module docstring) on ``group`` (0..G-1), ``cost_c`` (whole cents),
    ``gain`` and ``order``: the chosen mask and the gap proven against the relaxation."""
    seg_g, seg_to, _, d_cost, d_gain = _hull_segments(group, cost_c, gain)
    with np.errstate(divide="ignore"):
        eff = np.where(d_cost > 0, d_gain / np.where(d_cost > 0, d_cost, 1.0), np.inf)
    steps = np.lexsort((np.arange(eff.size), -eff))
    spent = np.cumsum(d_cost[steps])
    n_fit = int(np.searchsorted(spent, budget_c, side="right"))
    taken = steps[:n_fit]
    bound = float(d_gain[taken].sum())
    if n_fit < steps.size:  # the step that does not fit, taken in part by the relaxation
        brk = steps[n_fit]
        left = budget_c - (float(spent[n_fit - 1]) if n_fit else 0.0)
        bound += d_gain[brk] * left / d_cost[brk]
        brk_eff = float(eff[brk])
    else:
        brk_eff = float(eff[steps[-1]])
    n_groups = int(group.max()) + 1 if group.size else 0
    greedy = np.full(n_groups, -1, dtype=np.intp)
    last = taken[np.lexsort((cost_c[seg_to[taken]], seg_g[taken]))]  # by group, then cost
    ends = np.flatnonzero(np.append(seg_g[last][1:] != seg_g[last][:-1], True))
    greedy[seg_g[last[ends]]] = seg_to[last[ends]]  # a group's costliest step taken
    # the openings whose hull steps are nearest the break in efficiency form the core
    with np.errstate(divide="ignore", invalid="ignore"):
        distance = np.abs(np.log(eff) - np.log(brk_eff))
    distance = np.where(np.isfinite(distance), distance, np.inf)
    near = np.lexsort((np.arange(eff.size), distance))
    picked: list[int] = []
    seen: set[int] = set()
    for gi in seg_g[near].tolist():
        if gi not in seen:
            seen.add(gi)
            picked.append(gi)
            if len(picked) >= CORE_OPENINGS:
                break
    core_groups = np.asarray(sorted(picked), dtype=np.intp)
    in_core = np.zeros(n_groups, dtype=bool)
    in_core[core_groups] = True
    chosen = np.zeros(group.size, dtype=bool)
    fixed = greedy[(~in_core) & (greedy >= 0)]
    chosen[fixed] = True
    left_c = budget_c - int(cost_c[fixed].sum())
    core = np.flatnonzero(in_core[group])
    greedy_core = greedy[in_core & (greedy >= 0)]
    greedy_value = float(gain[fixed].sum() + gain[greedy_core].sum())
    if bound > 0 and (bound - greedy_value) / bound <= mip_rel_gap:
        chosen[greedy_core] = True  # the relaxation's choice is already close enough
    elif core.size and left_c >= 0:
        # the core needs to close only the estate's gap, not a gap relative to itself
        core_gain = max(bound - float(gain[fixed].sum()), 1e-300)
        try:
            sub, _ = solve_choice_knapsack(
                group[core], cost_c[core] / 100.0, gain[core], left_c / 100.0, order=order[core],
                mip_rel_gap=min(0.5, mip_rel_gap * bound / core_gain), time_limit_s=time_limit_s,
                core_fallback=False,  # the core of a core is itself: no second round
            )
        except PlanError:
            sub = np.zeros(core.size, dtype=bool)  # the relaxation's choice, below
        chosen[core[sub]] = True
        if float(gain[chosen].sum()) < greedy_value:  # never worse than the relaxation's choice
            chosen[core] = False
            chosen[greedy_core] = True
    value = float(gain[chosen].sum())
    gap = max(0.0, (bound - value) / bound) if bound > 0 else 0.0
    return chosen, (gap if gap > mip_rel_gap else 0.0)


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


def with_plan_settings(building: Building, budget: float | None, *, currency: str = "",
                       samples: int | None = None, seed: int | None = None) -> Building:
    """``building`` with the plan's settings to save with it (``samples`` / ``seed`` ``None``:
    the defaults)."""
    from dataclasses import replace

    return replace(building, plan=PlanSettings(
        budget=None if budget is None else _check_budget(budget), currency=currency,
        samples=samples, seed=seed))


def plan_from_settings(building: Building, *, catalogue: Catalogue | None = None) -> Plan:
    """The plan the building's saved settings make: the building assessed with the saved
    samples and seed (defaults when not saved), planned within the saved budget. Raises
    ``ValueError`` when no budget is saved. Same file, same plan."""
    settings = building.plan
    if settings.budget is None:
        raise ValueError("no budget is saved with this audit")
    a = assess(building,
               samples=DEFAULT_SAMPLES if settings.samples is None else settings.samples,
               seed=DEFAULT_SEED if settings.seed is None else settings.seed)
    return make_plan(a, settings.budget, catalogue=catalogue)
