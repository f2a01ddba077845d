"""Export a fix plan as a JSON-ready dict or CSV text (the terminal table for people is
:func:`petfall_audit.present.tables.plan_to_table`).

Costs in the plan's currency (to the cent in JSON and CSV); risk in summed risk-score units of
:mod:`petfall_audit.risk`. Every format carries the cautions: JSON under ``"cautions"``, the table
below the rows, CSV as ``#`` comment lines before the header (read it with a reader that skips
comment lines, e.g. ``pandas.read_csv(..., comment="#")``).
"""

from __future__ import annotations

import io
from typing import Any

from petfall_audit.cautions import CAUTIONS
from petfall_audit.fixes import Option
from petfall_audit.io.csv_safe import csv_writer
from petfall_audit.io.results_export import round_significant as _r
from petfall_audit.plan import Plan

__all__ = [
    "PLAN_FORMAT",
    "PLAN_VERSION",
    "CSV_COLUMNS",
    "plan_to_dict",
    "action_to_dict",
    "plan_to_csv",
]

PLAN_FORMAT = "petfall-audit-plan"
PLAN_VERSION = 1
CSV_COLUMNS = (
    "opening",
    "control",
    "control_name",
    "cost",
    "risk_before",
    "risk_after",
    "conditions",
)
#: Separator of several conditions in one CSV cell.
CONDITION_SEPARATOR = " | "


def plan_to_dict(plan: Plan) -> dict[str, Any]:
    """The plan as a JSON-ready dict: budget, currency, total_cost, risk_before, risk_after,
    risk_removed, gap, actions (each {opening, control, control_name, cost, risk_before,
    risk_after, conditions}) and cautions."""
    return {
        "format": PLAN_FORMAT,
        "version": PLAN_VERSION,
        "budget": round(plan.budget, 2),
        "currency": plan.currency,
        "total_cost": round(plan.total_cost, 2),
        "risk_before": _r(plan.risk_before),
        "risk_after": _r(plan.risk_after),
        "risk_removed": _r(plan.risk_removed),
        "gap": plan.gap,
        "actions": [action_to_dict(a) for a in plan.actions],
        "cautions": list(CAUTIONS),
    }


def action_to_dict(a: Option) -> dict[str, Any]:
    """One action of a plan as a JSON-ready dict: opening, control, control_name, cost (to the
    cent), risk_before, risk_after (4 significant digits) and conditions."""
    return {
        "opening": a.opening_id,
        "control": a.control_id,
        "control_name": a.control_name,
        "cost": round(a.cost, 2),
        "risk_before": _r(a.risk_before),
        "risk_after": _r(a.risk_after),
        "conditions": list(a.conditions),
    }


def plan_to_csv(plan: Plan) -> str:
    """The plan's actions as CSV text, one row per action (:data:`CSV_COLUMNS`), cautions as
    leading ``#`` lines."""
    buf = io.StringIO()
    for caution in CAUTIONS:
        buf.write(f"# {caution}\n")
    writer = csv_writer(buf)
    writer.writerow(CSV_COLUMNS)
    for a in plan.actions:
        writer.writerow(
            [
                a.opening_id,
                a.control_id,
                a.control_name,
                f"{a.cost:.2f}",
                f"{a.risk_before:.6g}",
                f"{a.risk_after:.6g}",
                CONDITION_SEPARATOR.join(a.conditions),
            ]
        )
    return buf.getvalue()
