"""One budget over many buildings: the fix plan of an estate (``batch --portfolio-budget``).

Every opening of every building is one group of the multiple-choice knapsack of
:mod:`petfall_audit.plan` (at most one control per opening, most risk removed, total cost within
the budget), solved by the same planner: the estate's plan spends where it removes the most risk,
whichever building that is. Risk in the summed risk-score units of :mod:`petfall_audit.risk`,
costs in the catalogue's currency.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass

import numpy as np

from petfall_audit.fixes import Option
from petfall_audit.plan import Plan, curve_from_options, plan_from_options

__all__ = ["EstateBuilding", "BuildingShare", "PortfolioPlan", "plan_portfolio", "estate_options",
           "portfolio_curve", "equal_share_plans"]


@dataclass(frozen=True, slots=True)
class EstateBuilding:
    """One building of the estate: ``file`` it came from, ``name``, ``result_file`` (its
    results in the batch folder), per opening id its fix ``options`` (as from
    :func:`petfall_audit.fixes.opening_options`) and ``risk_before`` (summed risk score of
    every opening)."""

    file: str
    name: str
    result_file: str
    options: Mapping[str, Sequence[Option]]
    risk_before: float


@dataclass(frozen=True, slots=True)
class BuildingShare:
    """What the estate's plan does in one building: ``actions`` (one :class:`Option` per
    treated opening, building order), their ``cost`` and the building's risk before and
    after."""

    file: str
    name: str
    result_file: str
    risk_before: float
    risk_after: float
    cost: float
    actions: tuple[Option, ...]

    @property
    def risk_removed(self) -> float:
        """Summed risk score removed in this building."""
        return self.risk_before - self.risk_after


@dataclass(frozen=True, slots=True)
class PortfolioPlan:
    """The estate's plan: the :class:`~petfall_audit.plan.Plan` over every opening and the
    ``buildings`` (input order) with their share of it."""

    plan: Plan
    buildings: tuple[BuildingShare, ...]

    @property
    def budget(self) -> float:
        return self.plan.budget

    @property
    def total_cost(self) -> float:
        return self.plan.total_cost

    @property
    def risk_before(self) -> float:
        return self.plan.risk_before

    @property
    def risk_after(self) -> float:
        return self.plan.risk_after

    @property
    def risk_removed(self) -> float:
        return self.plan.risk_removed

    @property
    def currency(self) -> str:
        return self.plan.currency

    @property
    def gap(self) -> float:
        return self.plan.gap


def estate_options(buildings: Sequence[EstateBuilding]) -> dict[str, Sequence[Option]]:
    """Every opening of every building as one group, keyed ``"<building index>/<opening id>"``."""
    return {f"{b}/{oid}": opts for b, building in enumerate(buildings)
            for oid, opts in building.options.items()}


def plan_portfolio(buildings: Sequence[EstateBuilding], budget: float, *,
                   currency: str) -> PortfolioPlan:
    """The estate's plan within ``budget`` (``currency``): one knapsack over every opening of
    every building."""
    owner: dict[int, int] = {}
    for b, building in enumerate(buildings):
        for opts in building.options.values():
            for option in opts:
                owner[id(option)] = b
    plan = plan_from_options(estate_options(buildings), budget,
                             risk_before=float(sum(b.risk_before for b in buildings)),
                             currency=currency)
    actions: list[list[Option]] = [[] for _ in buildings]
    for option in plan.actions:
        actions[owner[id(option)]].append(option)
    shares = []
    for building, chosen in zip(buildings, actions, strict=True):
        removed = float(sum(o.risk_before - o.risk_after for o in chosen))
        cost = float(np.round(np.array([o.cost for o in chosen], dtype=float) * 100).sum()) / 100
        shares.append(BuildingShare(
            file=building.file, name=building.name, result_file=building.result_file,
            risk_before=building.risk_before, risk_after=building.risk_before - removed,
            cost=cost, actions=tuple(chosen),
        ))
    return PortfolioPlan(plan=plan, buildings=tuple(shares))


def portfolio_curve(buildings: Sequence[EstateBuilding], budgets: Sequence[float] | np.ndarray
                    ) -> tuple[np.ndarray, np.ndarray]:
    """Risk removed from the estate by the best plan at each budget: ``(budgets,
    risk_removed)`` (see :func:`petfall_audit.plan.curve_from_options`)."""
    return curve_from_options(estate_options(buildings), budgets)


def equal_share_plans(buildings: Sequence[EstateBuilding], budget: float, *,
                      currency: str) -> list[Plan]:
    """Each building planned alone with an equal share of ``budget``: the comparison the
    estate's plan must beat."""
    share = float(budget) / max(1, len(buildings))
    return [plan_from_options(b.options, share, risk_before=b.risk_before, currency=currency)
            for b in buildings]
