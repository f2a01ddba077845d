"""Budgets at which to draw the risk-against-budget curve (the catalogue's currency)."""

from __future__ import annotations

import math
from collections.abc import Mapping, Sequence
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

if TYPE_CHECKING:
    from petfall_audit.fixes import Option
    from petfall_audit.portfolio import EstateBuilding

__all__ = ["budget_grid", "knee_budget", "estate_curve", "ESTATE_CURVE_POINTS"]

#: Budgets at which the estate's curve is solved (0, then geometric: a step every quarter to
#: third of a decade on the summary's log axis; each point is one solve over the estate).
ESTATE_CURVE_POINTS = 20


def knee_budget(options: Mapping[str, Sequence[Option]]) -> float:
    """Cost of the recommended option (:func:`petfall_audit.fixes.recommend`) of every opening
    together: about where the risk-against-budget curve flattens (catalogue's currency)."""
    from petfall_audit.fixes import recommend

    return float(sum(o.cost for o in recommend(options).values() if o is not None))


def budget_grid(options: Mapping[str, Sequence[Option]], n_points: int = 25) -> NDArray[np.float64]:
    """``n_points`` budgets for the risk-against-budget curve: 0, then geometrically spaced from
    the cheapest option to a little beyond the cost at which every opening has its most effective
    option (more money removes no more risk), so the bend of the curve is resolved on a log axis;
    the catalogue's currency."""
    from petfall_audit.fixes import full_fix_cost

    top = full_fix_cost(options)
    cheapest = min((float(o.cost) for opts in options.values() for o in opts), default=math.inf)
    if top <= 0:
        return np.zeros(1)
    low = max(cheapest, top * 1e-5, 1.0)
    return np.concatenate([[0.0], np.geomspace(low, 1.1 * top, max(int(n_points) - 1, 2))])


def estate_curve(buildings: Sequence[EstateBuilding], budget: float
                 ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """The estate's risk-removed-against-budget curve as its summary draws it:
    ``(budgets, risk_removed)`` at :data:`ESTATE_CURVE_POINTS` budgets spread over the
    estate's options and at ``budget`` (the plan's own), in increasing order (currency;
    summed risk score; see :func:`petfall_audit.portfolio.portfolio_curve`)."""
    from petfall_audit.portfolio import estate_options, portfolio_curve

    grid = budget_grid(estate_options(buildings), n_points=ESTATE_CURVE_POINTS)
    return portfolio_curve(buildings, sorted({*grid.tolist(), float(budget)}))
