"""Time the estate plan (one budget over every opening of every building) of 200 buildings the
size of the sample tower.

Run: ``python benchmarks/bench_portfolio.py [--buildings 200] [--samples 1000]``.

The buildings are the sample tower with its floors raised or lowered a little (each one
different); they are assessed first (not timed). Then, in the same run:
(a) the estate plan over every opening of every building with one budget;
(b) the baseline: each building planned alone with an equal share of that budget;
(c) the estate's budget curve and the summary PDF.
Target: (a) under 60 s. Prints the times, a/b, and the risk removed by (a) and (b).
"""

from __future__ import annotations

import argparse
import tempfile
import time
from dataclasses import replace
from pathlib import Path

from _common import median_time_s  # noqa: F401  (puts the repository on the path)

from petfall_audit.demo import sample_building
from petfall_audit.figures.budget import estate_curve
from petfall_audit.fixes import load_catalogue, opening_options
from petfall_audit.portfolio import (
    EstateBuilding,
    equal_share_plans,
    plan_portfolio,
)
from petfall_audit.report.portfolio import write_portfolio_report
from petfall_audit.risk import assess


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--buildings", type=int, default=200)
    parser.add_argument("--samples", type=int, default=1000)
    parser.add_argument("--budget-per-building", type=float, default=3000.0)
    args = parser.parse_args()

    catalogue = load_catalogue()
    tower = sample_building("tower")
    estate = []
    t0 = time.perf_counter()
    for k in range(args.buildings):
        scale = 0.8 + 0.4 * k / max(1, args.buildings - 1)
        floors = tuple(replace(f, elevation_m=f.elevation_m * scale) for f in tower.floors)
        b = replace(tower, floors=floors, info=replace(tower.info, name=f"Tower {k + 1}"))
        a = assess(b, samples=args.samples, seed=1 + k)
        estate.append(EstateBuilding(file=f"tower{k + 1}.json", name=b.info.name,
                                     result_file=f"tower{k + 1}.json",
                                     options=opening_options(a, catalogue),
                                     risk_before=float(a.risk.sum())))
    t_setup = time.perf_counter() - t0
    budget = args.budget_per_building * args.buildings
    n_open = sum(len(e.options) for e in estate)
    n_opt = sum(len(v) for e in estate for v in e.options.values())

    t0 = time.perf_counter()
    portfolio = plan_portfolio(estate, budget, currency=catalogue.currency)
    t_a = time.perf_counter() - t0
    t0 = time.perf_counter()
    alone = equal_share_plans(estate, budget, currency=catalogue.currency)
    t_b = time.perf_counter() - t0
    t0 = time.perf_counter()
    budgets, removed = estate_curve(estate, budget)
    with tempfile.TemporaryDirectory() as tmp:
        write_portfolio_report(portfolio, budgets, removed, Path(tmp) / "portfolio.pdf")
    t_c = time.perf_counter() - t0

    alone_removed = sum(p.risk_removed for p in alone)
    print(f"{args.buildings} buildings, {n_open:,} openings, {n_opt:,} options "
          f"(assessed in {t_setup:.1f} s, not timed); budget {budget:,.0f} {catalogue.currency}")
    print(f"(a) estate plan                          {t_a:8.2f} s   (target < 60 s)")
    print(f"(b) each building alone, equal shares    {t_b:8.2f} s")
    print(f"(c) estate budget curve and summary PDF  {t_c:8.2f} s")
    print(f"a/b = {t_a / t_b:.2f}")
    print(f"risk removed: estate plan {portfolio.risk_removed:,.0f} (gap {portfolio.gap:.2e}), "
          f"equal shares {alone_removed:,.0f}; cost {portfolio.total_cost:,.0f}")
    return 0 if t_a < 60 and portfolio.total_cost <= budget else 1


if __name__ == "__main__":
    raise SystemExit(main())
