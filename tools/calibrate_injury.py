"""Refit the injury dose-response to the published case series and print the comparison.

    python tools/calibrate_injury.py [--samples N]

Prints the fitted band medians and spread (to copy into ``InjuryThresholds`` in
``petfall_audit/model.py`` when they change) and the comparison table of ``docs/risk-model.md``.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from petfall_audit.calibration import (  # noqa: E402
    CASE_SERIES,
    comparison_rows,
    fit_thresholds,
    rounded,
    series_doses,
)
from petfall_audit.model import InjuryThresholds  # noqa: E402


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--samples", type=int, default=4000)
    args = ap.parse_args(argv)
    doses = [series_doses(s, samples=args.samples) for s in CASE_SERIES]
    fit = rounded(fit_thresholds(doses))
    shipped = InjuryThresholds()
    print(f"fitted:  moderate {fit.moderate_g} g, serious {fit.serious_g} g, "
          f"life-threatening {fit.life_threatening_g} g, spread {fit.spread}")
    print(f"shipped: moderate {shipped.moderate_g} g, serious {shipped.serious_g} g, "
          f"life-threatening {shipped.life_threatening_g} g, spread {shipped.spread}")
    print()
    print("| Series | Heights (as modelled) | Published figure | Published | Model | "
          "Difference | In the fit |")
    print("|---|---|---|---|---|---|---|")
    for r in comparison_rows(doses, shipped):
        note = f" ({r['note']})" if r["note"] else ""
        print(f"| {r['series']} | {r['heights']}; {float(r['hard_share']):.0%} hard | "
              f"{r['measure']}{note} | {float(r['published']):.1%} | {float(r['model']):.1%} | "
              f"{float(r['difference']) * 100:+.1f} points | {'yes' if r['in_fit'] else 'no'} |")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
