"""Time ``petfall-audit batch`` on 8 buildings with ``--jobs 2`` against ``--jobs 1``.

Run: ``python benchmarks/bench_batch.py [--buildings 8] [--floors 30] [--per-floor 20]
[--format pdf] [--repeats 3]``.

The buildings are invented towers (``floors`` × ``per-floor`` openings, each a little different)
written to a temporary folder; each command runs in a fresh process, start-up included, and the
result files of both runs are compared byte for byte (json/csv; for pdf the file names).
Target on a 2-core machine: jobs-1 time / jobs-2 time ≥ 1.6. The two run in turn, ``repeats``
times; prints the median times, their ratio and the median of the paired ratios, and beside
them the machine's own ceiling measured in the same run: two pure-Python loops
in two processes at once against one after the other (other work on the machine lowers both;
on an idle 2-core machine the ceiling is about 2).
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
from dataclasses import replace
from pathlib import Path

from _common import large_tower, median_time_s

from petfall_audit.io.building_file import save_building

_LOOP = "s = 0\nfor i in range(20_000_000):\n    s += i\n"


def parallel_ceiling() -> float:
    """Speed-up of two CPU-bound processes run together over the same two run in turn."""
    import time

    def loop() -> subprocess.Popen[bytes]:
        return subprocess.Popen([sys.executable, "-c", _LOOP])

    t0 = time.perf_counter()
    for _ in range(2):
        loop().wait()
    serial = time.perf_counter() - t0
    t0 = time.perf_counter()
    running = [loop(), loop()]
    for p in running:
        p.wait()
    return serial / (time.perf_counter() - t0)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--buildings", type=int, default=8)
    parser.add_argument("--floors", type=int, default=30)
    parser.add_argument("--per-floor", type=int, default=20)
    parser.add_argument("--format", choices=("json", "csv", "pdf"), default="pdf")
    parser.add_argument("--samples", type=int, default=4000)
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()

    root = Path(__file__).resolve().parent.parent
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        files = []
        base = large_tower(args.floors, args.per_floor)
        for k in range(args.buildings):
            info = replace(base.info, name=f"{base.info.name} {k + 1}")
            floors = tuple(replace(f, elevation_m=f.elevation_m * (1 + 0.01 * k))
                           for f in base.floors)
            path = folder / f"building{k + 1}.json"
            save_building(replace(base, info=info, floors=floors), path)
            files.append(str(path))

        def command(jobs: int) -> list[str]:
            return [sys.executable, "-m", "petfall_audit.cli", "batch", *files, "--out-dir",
                    str(folder / f"out{jobs}"), "--format", args.format, "--samples",
                    str(args.samples), "--jobs", str(jobs)]

        def run(jobs: int) -> None:
            subprocess.run(command(jobs), check=True, cwd=root, stdout=subprocess.DEVNULL)

        ceiling_before = parallel_ceiling()
        # --jobs 1 and --jobs 2 in turn, so that a change of the machine's speed moves both
        times1: list[float] = []
        times2: list[float] = []
        for _ in range(args.repeats):
            times1.append(median_time_s(lambda: run(1), 1))
            times2.append(median_time_s(lambda: run(2), 1))
        t1, t2 = statistics.median(times1), statistics.median(times2)
        paired = statistics.median(x / y for x, y in zip(times1, times2, strict=True))
        ceiling = (ceiling_before + parallel_ceiling()) / 2
        out1, out2 = folder / "out1", folder / "out2"
        names1 = sorted(p.name for p in out1.iterdir())
        names2 = sorted(p.name for p in out2.iterdir())
        same = names1 == names2 and (args.format == "pdf" or all(
            (out1 / n).read_bytes() == (out2 / n).read_bytes() for n in names1))
    n_open = args.floors * args.per_floor
    print(f"{args.buildings} buildings of {n_open} openings, {args.samples} samples, "
          f"{args.format} results")
    print(f"--jobs 1, median    {t1:8.2f} s")
    print(f"--jobs 2, median    {t2:8.2f} s")
    print(f"same results: {'yes' if same else 'NO'}")
    print(f"jobs1/jobs2 = {t1 / t2:.2f}   (target >= 1.6 on 2 cores; median of the paired "
          f"ratios {paired:.2f})")
    print(f"machine ceiling (two CPU-bound processes together / in turn) = {ceiling:.2f}")
    return 0 if same else 1


if __name__ == "__main__":
    raise SystemExit(main())
