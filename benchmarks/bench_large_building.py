"""Wall time and peak memory of the whole commands on a very large building.

Run: ``python benchmarks/bench_large_building.py [--floors 200] [--per-floor 50] [--samples 4000]``.

Writes the invented tower of ``make_large_tower(floors, per_floor)`` (200 × 50 = 10,000 openings
by default, 40 million simulated falls at 4,000 samples) to a temporary folder and runs
``petfall-audit assess``, ``plan`` and ``report`` on it, each in its own process, measuring its
wall time and its peak resident memory (``os.wait4``). Baseline in the same run: a bare numpy
closed-form pass over the same number of falls, a block at a time. Target: every command's peak
memory under 2 GB (printed as a ratio to 2 GB) and no command fails.
"""

from __future__ import annotations

import argparse
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import numpy as np
from _common import _ROOT  # noqa: F401  (puts the checkout on the path)

from petfall_audit.demo import make_large_tower
from petfall_audit.io.building_file import save_building
from petfall_audit.physics import G0
from petfall_audit.sampling import sample_cat_profile

LIMIT_BYTES = 2 * 1024**3


def run(cmd: list[str], cwd: Path) -> tuple[float, int, int]:
    """Wall time (s), peak resident memory (bytes) and exit code of one command."""
    env = dict(os.environ, PYTHONPATH=str(_ROOT))
    t0 = time.perf_counter()
    proc = subprocess.Popen([sys.executable, "-m", "petfall_audit.cli", *cmd], cwd=cwd, env=env,
                            stdout=subprocess.DEVNULL, stderr=subprocess.PIPE)
    _, status, usage = os.wait4(proc.pid, 0)
    wall = time.perf_counter() - t0
    err = proc.stderr.read().decode(errors="replace") if proc.stderr else ""
    code = os.waitstatus_to_exitcode(status)
    if code != 0:
        print(f"   failed ({code}): {err.strip().splitlines()[-1:]}")
    return wall, int(usage.ru_maxrss) * 1024, code


def bare_pass_s(n_falls: int, samples: int) -> float:
    """A bare closed-form impact-speed pass over ``n_falls`` falls, 256 rows at a time."""
    cat = sample_cat_profile(make_large_tower(1, 1).cat_profile, samples, seed=1)
    rho = 1.225
    vt1 = np.sqrt(2 * cat.mass_kg * G0 / (rho * cat.cda_tense_m2))
    rows = n_falls // samples
    drop = np.linspace(3.0, 600.0, 256)[:, None] * np.ones(samples)
    t0 = time.perf_counter()
    for _ in range(0, rows, 256):
        vt1 * np.sqrt(-np.expm1(-2 * G0 * drop / vt1**2))
    return time.perf_counter() - t0


def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--floors", type=int, default=200)
    ap.add_argument("--per-floor", type=int, default=50)
    ap.add_argument("--samples", type=int, default=4000)
    args = ap.parse_args()
    building = make_large_tower(args.floors, args.per_floor)
    n = len(building.openings)
    falls = n * args.samples
    print(f"building: {args.floors} floors x {args.per_floor} = {n:,} openings, "
          f"{args.samples:,} samples = {falls:,} falls")
    base = bare_pass_s(falls, args.samples)
    print(f"baseline: bare closed-form pass over the same falls {base:8.2f} s")
    worst = 0
    failed = 0
    with tempfile.TemporaryDirectory() as tmp:
        folder = Path(tmp)
        save_building(building, folder / "large.json")
        s = ["--samples", str(args.samples)]
        for name, cmd in [
            ("assess", ["assess", "large.json", "--format", "json", "-o", "out.json", *s]),
            ("plan", ["plan", "large.json", "--budget", "50000", *s]),
            ("report", ["report", "large.json", "-o", "audit.pdf", "--budget", "50000", *s]),
        ]:
            wall, peak, code = run(cmd, folder)
            worst = max(worst, peak)
            failed += code != 0
            print(f"{name:7s} {wall:8.1f} s  ({wall / base:6.1f} x baseline)   peak "
                  f"{peak / 1024**2:7.0f} MB  ({peak / LIMIT_BYTES:.2f} of 2 GB)")
    print(f"worst peak / 2 GB = {worst / LIMIT_BYTES:.2f}   (target < 1; {failed} failed)")
    return 1 if failed or worst >= LIMIT_BYTES else 0


if __name__ == "__main__":
    raise SystemExit(main())
