"""Time the PDF audit of the large demo tower (target: under 30 s) and print the split.

Run: ``python benchmarks/bench_report.py [--samples N] [--budget AMOUNT]``. The PDF goes to a
temporary folder and is deleted afterwards.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))  # run from a source checkout


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--samples", type=int, default=4000)
    parser.add_argument("--budget", type=float, default=50_000.0)
    parser.add_argument("--keep", metavar="PDF", help="also copy the PDF here")
    args = parser.parse_args()

    from petfall_audit.demo import make_large_tower
    from petfall_audit.plan import make_plan
    from petfall_audit.report import write_audit, write_leaflet
    from petfall_audit.risk import assess

    building = make_large_tower()
    t0 = time.perf_counter()
    assessment = assess(building, samples=args.samples, seed=1)
    t1 = time.perf_counter()
    plan = make_plan(assessment, args.budget)
    t2 = time.perf_counter()
    with tempfile.TemporaryDirectory() as tmp:
        pdf = write_audit(assessment, plan, Path(tmp) / "audit.pdf")
        t3 = time.perf_counter()
        write_leaflet(assessment, plan, Path(tmp) / "leaflet.pdf")
        t4 = time.perf_counter()
        size_kb = pdf.stat().st_size / 1024
        if args.keep:
            Path(args.keep).write_bytes(pdf.read_bytes())
    print(f"large tower: {len(building.openings)} openings, {len(building.floors)} floors, "
          f"{args.samples} samples")
    print(f"assess     {t1 - t0:6.2f} s")
    print(f"plan       {t2 - t1:6.2f} s")
    print(f"audit PDF  {t3 - t2:6.2f} s  ({size_kb:.0f} kB)")
    print(f"leaflet    {t4 - t3:6.2f} s")
    total = t3 - t0
    print(f"report total (assess + plan + audit) {total:.2f} s — target < 30 s: "
          f"{'OK' if total < 30 else 'TOO SLOW'}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
