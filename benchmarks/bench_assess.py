"""Time the full assessment of the large tower against a bare closed-form evaluation.

Run: ``python benchmarks/bench_assess.py [--samples N] [--repeats R]``.

(a) the full assessment (sampling, physics, severity, bands, likelihood, risk, ranking, per-opening
    results) of the 60-floor × 20-opening tower with N samples (default 4000);
(b) a bare numpy evaluation of the closed-form two-posture impact speed on an array of the same
    size (openings × samples), in the same run;
(c) the whole ``petfall-audit assess TOWER --format json`` command in a fresh Python process:
    start-up, loading the building file, the assessment, the sensitivity summary and writing
    the JSON;
(d) the same command on a building of one opening: what any command pays before it does work
    that grows with the building (the interpreter, numpy, pydantic and the building file's
    schema); (e) ``python -c "import numpy"`` alone, for scale; and (f) the bare closed form
    as a command of its own: a fresh Python process that imports numpy, reads the openings'
    drops, draws the same number of cats (four parameters each), evaluates (b)'s formula on
    every fall and writes each opening's mean speed as JSON: the same falls with start-up;
(g) in this process, the work the command does between loading and writing: the assessment
    as it runs it (each distinct fall signature once, no falls kept) and the sensitivity.
Targets: a/b ≤ 4, c/b ≤ 3. Prints the median times and the ratios, (c − d)/b: the part of
the command that grows with the building against the bare pass, and c/f: the whole command
against the bare closed-form command.
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np
from _common import large_tower, median_time_s

from petfall_audit.io.building_file import save_building
from petfall_audit.physics import G0, simulate_falls
from petfall_audit.reassess import assess_deduplicated
from petfall_audit.risk import assess
from petfall_audit.sampling import CatSamples, sample_cat_profile
from petfall_audit.sensitivity import with_sensitivity


def bare_speed(drop_m: np.ndarray, cat: CatSamples, rho: float) -> np.ndarray:
    """Closed-form two-posture impact speed (Taylor, Classical Mechanics, §2.4), plain numpy."""
    m, f = cat.mass_kg, cat.relax_fraction
    vt1 = np.sqrt(2 * m * G0 / (rho * cat.cda_tense_m2))
    vt2 = np.sqrt(2 * m * G0 / (rho * cat.cda_spread_m2))
    hs = -vt1**2 * np.log1p(-(f**2)) / (2 * G0)
    tense = vt1 * np.sqrt(-np.expm1(-2 * G0 * drop_m / vt1**2))
    spread = np.sqrt(
        vt2**2 + ((f * vt1) ** 2 - vt2**2) * np.exp(-2 * G0 * np.maximum(drop_m - hs, 0) / vt2**2)
    )
    out: np.ndarray = np.where(drop_m < hs, tense, spread)
    return out


#: (f): the bare closed form of (b) as a command of its own (argv: drops .npy, samples, output).
#: Its cat parameters only give the work its size (a yardstick of time, not a check of values).
BARE_COMMAND = """
import json, sys
import numpy as np
drop = np.load(sys.argv[1])[:, None]
n = int(sys.argv[2])
rng = np.random.default_rng(1)
m = rng.lognormal(np.log(4.2), 0.25, n)
cda1 = rng.uniform(0.018, 0.03, n)
cda2 = cda1 * rng.uniform(1.5, 2.5, n)
f = rng.uniform(0.5, 0.8, n)
g, rho = 9.80665, 1.2
vt1 = np.sqrt(2 * m * g / (rho * cda1))
vt2 = np.sqrt(2 * m * g / (rho * cda2))
hs = -vt1**2 * np.log1p(-(f**2)) / (2 * g)
tense = vt1 * np.sqrt(-np.expm1(-2 * g * drop / vt1**2))
spread = np.sqrt(vt2**2 + ((f * vt1) ** 2 - vt2**2)
                 * np.exp(-2 * g * np.maximum(drop - hs, 0) / vt2**2))
speed = np.where(drop < hs, tense, spread)
with open(sys.argv[3], "w") as out:
    json.dump(speed.mean(axis=1).tolist(), out)
"""


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__)
    parser.add_argument("--samples", type=int, default=4000)
    parser.add_argument("--repeats", type=int, default=5)
    parser.add_argument("--command-repeats", type=int, default=3)
    args = parser.parse_args()

    building = large_tower(60, 20)
    cat = sample_cat_profile(building.cat_profile, args.samples, seed=1)
    falls = simulate_falls(building, cat)  # the drops for (b)
    assess(building, samples=args.samples, seed=1)  # warm-up

    # (a) and (b) in turn, so that a change of the machine's speed during the run moves both
    times_a: list[float] = []
    times_b: list[float] = []
    for _ in range(args.repeats):
        times_a.append(median_time_s(lambda: assess(building, samples=args.samples, seed=1), 1))
        times_b.append(median_time_s(lambda: bare_speed(falls.drop_m, cat, falls.rho_kg_m3), 1))
    t_a, t_b = statistics.median(times_a), statistics.median(times_b)
    paired = statistics.median(x / y for x, y in zip(times_a, times_b, strict=True))
    t_g = median_time_s(lambda: with_sensitivity(
        assess_deduplicated(building, samples=args.samples, seed=1)), args.repeats)
    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "tower.json"
        save_building(building, path)
        command = [sys.executable, "-m", "petfall_audit.cli", "assess", str(path),
                   "--format", "json", "--samples", str(args.samples), "--seed", "1",
                   "-o", str(Path(tmp) / "results.json")]
        root = Path(__file__).resolve().parent.parent

        def run_command() -> None:
            subprocess.run(command, check=True, cwd=root, stdout=subprocess.DEVNULL)

        run_command()  # warm-up (file cache)
        t_c = median_time_s(run_command, args.command_repeats)
        one = Path(tmp) / "one.json"
        save_building(large_tower(1, 1), one)
        small = [*command[:4], str(one), *command[5:]]

        def run_small() -> None:
            subprocess.run(small, check=True, cwd=root, stdout=subprocess.DEVNULL)

        run_small()
        t_d = median_time_s(run_small, args.command_repeats)
        t_e = median_time_s(lambda: subprocess.run([sys.executable, "-c", "import numpy"],
                                                   check=True), args.command_repeats)
        drops = Path(tmp) / "drops.npy"
        np.save(drops, np.median(falls.drop_m, axis=1))
        bare = [sys.executable, "-c", BARE_COMMAND, str(drops), str(args.samples),
                str(Path(tmp) / "bare.json")]

        def run_bare() -> None:
            subprocess.run(bare, check=True)

        run_bare()
        t_f = median_time_s(run_bare, args.command_repeats)
    n = len(building.openings)
    print(f"building: {n} openings x {args.samples} samples = {n * args.samples:,} falls")
    print(f"(a) full assessment, median           {t_a:8.3f} s")
    print(f"(b) bare closed-form speed, median    {t_b:8.3f} s")
    print(f"(c) whole assess command, median      {t_c:8.3f} s")
    print(f"(d) the command on one opening        {t_d:8.3f} s")
    print(f"(e) python -c 'import numpy'          {t_e:8.3f} s")
    print(f"(f) bare closed-form command          {t_f:8.3f} s")
    print(f"(g) the command's work, in process    {t_g:8.3f} s")
    print(f"a/b = {t_a / t_b:.2f}   (target <= 4; median of the paired ratios {paired:.2f})")
    print(f"c/b = {t_c / t_b:.2f}   (target <= 3: start-up, file, assessment, sensitivity, JSON)")
    print(f"(c-d)/b = {(t_c - t_d) / t_b:.2f}   (the part that grows with the building)")
    print(f"e/b = {t_e / t_b:.2f}   (the interpreter and numpy alone)")
    print(f"g/b = {t_g / t_b:.2f}   (assessment and sensitivity as the command runs them)")
    print(f"c/f = {t_c / t_f:.2f}   (the whole command against the bare closed-form command)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
