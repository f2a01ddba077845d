"""Export the estate's plan (one budget over many buildings) as a JSON-ready dict.

Costs in the plan's currency (to the cent); risk in summed risk-score units of
:mod:`petfall_audit.risk` (4 significant digits). The document carries the cautions.
"""

from __future__ import annotations

from typing import Any

from petfall_audit.cautions import CAUTIONS
from petfall_audit.io.plan_export import action_to_dict
from petfall_audit.io.results_export import round_significant as _r
from petfall_audit.portfolio import PortfolioPlan

__all__ = ["PORTFOLIO_FORMAT", "PORTFOLIO_VERSION", "portfolio_to_dict"]

PORTFOLIO_FORMAT = "petfall-audit-portfolio-plan"
PORTFOLIO_VERSION = 1


def portfolio_to_dict(portfolio: PortfolioPlan) -> dict[str, Any]:
    """The estate's plan: budget, currency, total_cost, risk_before, risk_after, risk_removed,
    gap, and per building (input order) its file, name, result file, cost, risk before and
    after and its actions (as in a building's plan), then the cautions."""
    return {
        "format": PORTFOLIO_FORMAT,
        "version": PORTFOLIO_VERSION,
        "budget": round(portfolio.budget, 2),
        "currency": portfolio.currency,
        "total_cost": round(portfolio.total_cost, 2),
        "risk_before": _r(portfolio.risk_before),
        "risk_after": _r(portfolio.risk_after),
        "risk_removed": _r(portfolio.risk_removed),
        "gap": portfolio.gap,
        "buildings": [
            {
                "file": b.file,
                "building": b.name,
                "result_file": b.result_file,
                "cost": round(b.cost, 2),
                "risk_before": _r(b.risk_before),
                "risk_after": _r(b.risk_after),
                "risk_removed": _r(b.risk_removed),
                "actions": [action_to_dict(a) for a in b.actions],
            }
            for b in portfolio.buildings
        ],
        "cautions": list(CAUTIONS),
    }
