"""Export a fix plan as a JSON-ready dict, CSV text or a plain-text table.

Costs in the plan's currency (to the cent in JSON and CSV); risk in summed risk-score units of
:mod:`petfall_audit.risk`. Every format carries the cautions: JSON under ``"cautions"``, the table
below the rows, CSV as ``#`` comment lines before the header (read it with a reader that skips
comment lines, e.g. ``pandas.read_csv(..., comment="#")``).
"""

from __future__ import annotations

import io
import textwrap
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
    "plan_to_table",
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
#: Conditions and cautions in the terminal table are wrapped to this many columns.
TEXT_WIDTH = 80
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


def plan_to_table(plan: Plan) -> str:
    """A plain-text table for a terminal: summary, one line per action with its conditions
    below it, then the cautions; prose wrapped to :data:`TEXT_WIDTH` columns."""
    cur = plan.currency
    share = plan.risk_removed / plan.risk_before if plan.risk_before > 0 else 0.0
    lines = [
        f"Fix plan: budget {plan.budget:,.0f} {cur}, cost {plan.total_cost:,.0f} {cur}, "
        f"{len(plan.actions)} action(s)",
        f"Risk score {plan.risk_before:,.1f} -> {plan.risk_after:,.1f} ({share:.0%} removed)",
    ]
    if plan.gap > 0:
        lines.append(
            f"The solver stopped at its time limit: this plan is within {plan.gap:.2%} "
            "of the best possible."
        )
    lines.append("")
    if plan.actions:
        w_open = max(len("Opening"), *(len(a.opening_id) for a in plan.actions))
        w_ctrl = max(len("Control"), *(len(a.control_name) for a in plan.actions))
        w_cost = max(len("Cost"), *(len(f"{a.cost:,.0f}") for a in plan.actions))
        w_risk = max(len("Risk before"), *(len(f"{a.risk_before:,.1f}") for a in plan.actions))
        lines.append(
            f"{'Opening':<{w_open}}  {'Control':<{w_ctrl}}  {'Cost':>{w_cost}}  "
            f"{'Risk before':>{w_risk}}  {'Risk after':>{w_risk}}"
        )
        for a in plan.actions:
            lines.append(
                f"{a.opening_id:<{w_open}}  {a.control_name:<{w_ctrl}}  {a.cost:>{w_cost},.0f}  "
                f"{a.risk_before:>{w_risk},.1f}  {a.risk_after:>{w_risk},.1f}"
            )
            for c in a.conditions:
                lines += textwrap.wrap(f"condition: {c}", TEXT_WIDTH,
                                       initial_indent=" " * (w_open + 4),
                                       subsequent_indent=" " * (w_open + 6))
    else:
        lines.append("No action fits the budget or lowers the risk.")
    lines.append("")
    lines.append("Cautions:")
    for c in CAUTIONS:
        lines += textwrap.wrap(c, TEXT_WIDTH, initial_indent="- ", subsequent_indent="  ")
    return "\n".join(lines) + "\n"
