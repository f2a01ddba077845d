"""The estate summary PDF of a plan over many buildings (``batch --portfolio-budget``).

One A4 document in the audit's layout and styles: a cover with the estate's figures, the budget
curve of the whole estate, spend and risk removed per building, the buildings ranked by the risk
left after the plan, and the cautions. Strings are formatted here with the audit's formatters;
charts come from :mod:`petfall_audit.report.charts`.
"""

from __future__ import annotations

import datetime as _dt
from collections import Counter
from collections.abc import Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import BinaryIO

import numpy as np
from reportlab.lib.units import mm
from reportlab.platypus import Flowable, PageBreak, Paragraph, Spacer, Table, TableStyle

from petfall_audit.cautions import CAUTIONS, CAUTIONS_SHORT
from petfall_audit.portfolio import BuildingShare, PortfolioPlan
from petfall_audit.present import fmt_money, fmt_percent, fmt_risk
from petfall_audit.report.charts import budget_curve_drawing, building_bars_drawing
from petfall_audit.report.context import LIMITS
from petfall_audit.report.fonts import markup
from petfall_audit.report.styles import (
    HEADED_TABLE,
    TABLE_GRID,
    Styles,
    audit_styles,
)
from petfall_audit.report.template import AuditDocTemplate, write_pdf_atomic

__all__ = ["PortfolioContext", "build_portfolio_context", "write_portfolio_report"]

TITLE = "Estate fix plan"
#: Buildings drawn in the spend and risk chart (the rest are in the table).
MAX_CHART_BUILDINGS = 40



@dataclass(frozen=True, slots=True)
class PortfolioContext:
    """Every string and number of the estate summary. ``rows``: per building, ranked by risk
    left (most first): name, file, actions, cost, risk before, risk after, share removed."""

    header: str
    footer: str
    generated_on: str
    facts: tuple[tuple[str, str], ...]
    summary: tuple[str, ...]
    currency: str
    budget: float
    curve_budgets: np.ndarray
    curve_risk_left: np.ndarray
    chart_labels: tuple[str, ...]
    chart_spend: np.ndarray
    chart_removed: np.ndarray
    chart_note: str
    rows: tuple[tuple[str, str, str, str, str, str, str], ...]
    cautions: tuple[str, ...]
    limits: tuple[str, ...]


def _label(name: str, file: str) -> str:
    return name or Path(file).stem or "Unnamed building"


def _chart_labels(buildings: Sequence[BuildingShare]) -> tuple[str, ...]:
    """The buildings' names, each with its results file where two buildings share a name (the
    chart has no column that tells them apart)."""
    names = [_label(b.name, b.file) for b in buildings]
    seen = Counter(names)
    return tuple(f"{n} ({b.result_file or Path(b.file).name})" if seen[n] > 1 else n
                 for n, b in zip(names, buildings, strict=True))


def build_portfolio_context(portfolio: PortfolioPlan, budgets: np.ndarray,
                            risk_removed: np.ndarray, *, generated_on: str | None = None
                            ) -> PortfolioContext:
    """The estate summary's strings and numbers; ``budgets`` and ``risk_removed`` are the
    estate's budget curve (as from :func:`petfall_audit.portfolio.portfolio_curve`)."""
    cur = portfolio.currency
    generated = generated_on or _dt.date.today().isoformat()
    share = portfolio.risk_removed / portfolio.risk_before if portfolio.risk_before > 0 else 0.0
    treated = sum(1 for b in portfolio.buildings if b.actions)
    n_actions = sum(len(b.actions) for b in portfolio.buildings)
    summary = [
        f"{len(portfolio.buildings)} buildings planned together with one budget of "
        f"{fmt_money(portfolio.budget, cur)}: {n_actions} controls in {treated} buildings cost "
        f"{fmt_money(portfolio.total_cost, cur)}.",
        f"The estate's summed risk score goes from {fmt_risk(portfolio.risk_before)} to "
        f"{fmt_risk(portfolio.risk_after)} ({fmt_percent(share)} removed). The budget goes "
        "where it removes the most risk, whichever building that is.",
    ]
    if portfolio.gap > 0:
        summary.append(f"The plan is proven within {fmt_percent(portfolio.gap, 2)} of the best "
                       "possible for this budget.")
    summary.append("Risk scores rank openings against each other; a building with less risk "
                   "left is not safe because of it. Every control still needs the conditions "
                   "listed in the building's plan, and escape windows keep releasable devices "
                   "only.")
    ranked = sorted(portfolio.buildings, key=lambda b: (-b.risk_after, b.name, b.file))
    rows = tuple(
        (_label(b.name, b.file), b.result_file or Path(b.file).name, str(len(b.actions)),
         fmt_money(b.cost, cur), fmt_risk(b.risk_before), fmt_risk(b.risk_after),
         fmt_percent(b.risk_removed / b.risk_before if b.risk_before > 0 else 0.0))
        for b in ranked
    )
    by_spend = sorted(portfolio.buildings, key=lambda b: (-b.cost, -b.risk_removed, b.name))
    shown = by_spend[:MAX_CHART_BUILDINGS]
    note = ("Spend and risk removed per building, most spend first."
            + (f" The {len(by_spend) - len(shown)} buildings with the least spend are in the "
               "table only." if len(by_spend) > len(shown) else ""))
    order = np.argsort(budgets, kind="stable")
    return PortfolioContext(
        header=f"{TITLE} — {len(portfolio.buildings)} buildings — {generated}",
        footer=CAUTIONS_SHORT,
        generated_on=generated,
        facts=(
            ("Buildings", str(len(portfolio.buildings))),
            ("Budget", fmt_money(portfolio.budget, cur)),
            ("Cost of the plan", fmt_money(portfolio.total_cost, cur)),
            ("Risk score before / after", f"{fmt_risk(portfolio.risk_before)} / "
                                          f"{fmt_risk(portfolio.risk_after)}"),
            ("Report generated", generated),
        ),
        summary=tuple(summary),
        currency=cur,
        budget=portfolio.budget,
        curve_budgets=np.asarray(budgets, float)[order],
        curve_risk_left=portfolio.risk_before - np.asarray(risk_removed, float)[order],
        chart_labels=_chart_labels(shown),
        chart_spend=np.array([b.cost for b in shown], dtype=float),
        chart_removed=np.array([b.risk_removed for b in shown], dtype=float),
        chart_note=note,
        rows=rows,
        cautions=CAUTIONS,
        limits=LIMITS,
    )


def _p(text: str, style: object) -> Paragraph:
    return Paragraph(markup(text), style)


def portfolio_story(ctx: PortfolioContext, st: Styles, width: float) -> list[Flowable]:
    """The flowables of the estate summary."""
    facts = Table([[_p(k, st.cell_bold), _p(v, st.cell)] for k, v in ctx.facts],
                  colWidths=[0.35 * width, 0.65 * width])
    facts.setStyle(TableStyle(TABLE_GRID))
    out: list[Flowable] = [
        Spacer(1, 12 * mm), _p(TITLE, st.title),
        _p("One budget over every opening of every building", st.subtitle),
        Spacer(1, 4 * mm), facts, Spacer(1, 4 * mm), _p("Summary", st.h2),
        *[Paragraph(markup(s), st.bullet, bulletText="•") for s in ctx.summary],
        Spacer(1, 3 * mm), _p(ctx.cautions[0], st.small), _p(ctx.cautions[1], st.small),
        _p("Budget curve of the estate", st.h2),
        budget_curve_drawing(ctx.curve_budgets, ctx.curve_risk_left,
                             chosen_budget=ctx.budget, currency=ctx.currency, width=width),
        _p("Summed risk score left in the estate with the best plan at each budget; more "
           "budget never leaves more risk. The budget axis is logarithmic: each grid line is "
           "ten times the money of the one before. Read it for the size of a budget, not as a "
           "prediction.", st.caption),
        PageBreak(), _p("Spend and risk removed per building", st.h1),
        building_bars_drawing(ctx.chart_labels, ctx.chart_spend, ctx.chart_removed,
                              currency=ctx.currency, width=width),
        _p(ctx.chart_note, st.caption),
        _p("Buildings ranked by risk left", st.h1),
    ]
    head = ["Building", "Results", "Controls", "Cost", "Risk before", "Risk after", "Removed"]
    data: list[list[object]] = [[_p(h, st.cell_bold) for h in head]]
    data += [[_p(c, st.cell) for c in row] for row in ctx.rows]
    table = Table(data, colWidths=[width * f for f in (0.26, 0.2, 0.09, 0.12, 0.12, 0.12, 0.09)],
                  repeatRows=1)
    table.setStyle(TableStyle(HEADED_TABLE))
    out += [table, _p("The building with the most risk left after the plan comes first. Each "
                      "building's own results and conditions are in its result file.",
                      st.caption)]
    out += [_p("Cautions", st.h1),
            *[Paragraph(markup(c), st.bullet, bulletText="•") for c in ctx.cautions],
            _p("Limits of this plan", st.h2),
            *[Paragraph(markup(c), st.bullet, bulletText="•") for c in ctx.limits]]
    return out


def write_portfolio_report(portfolio: PortfolioPlan, budgets: Sequence[float] | np.ndarray,
                           risk_removed: Sequence[float] | np.ndarray, path: str | Path, *,
                           generated_on: str | None = None) -> Path:
    """Write the estate summary PDF to ``path`` (atomically) and return it."""
    ctx = build_portfolio_context(portfolio, np.asarray(budgets, float),
                                  np.asarray(risk_removed, float), generated_on=generated_on)
    st = audit_styles()

    def make_doc(out: BinaryIO) -> AuditDocTemplate:
        return AuditDocTemplate(out, header=markup(ctx.header), footer=markup(ctx.footer),
                                title=TITLE, subject="Cat fall risk: estate fix plan",
                                first_page_header=False)

    return write_pdf_atomic(path, make_doc, lambda doc: portfolio_story(ctx, st, doc.width))
