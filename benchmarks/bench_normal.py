"""Time the standard normal CDF of petfall_audit._normal against scipy.special.ndtr and print
the figures and the ratio.

Run: ``python benchmarks/bench_normal.py [--size N] [--repeats R]``.

``ndtr`` on N (default 2,000,000) float64 values, for a few spreads of the values (which decide
how many fall in each branch: erf for |x| < √2, erfc beyond), new array and in place
(``out=x``, as the injury dose–response uses it), ours and scipy's, the median of R calls each.
Target: ours no more than twice scipy's time.
"""

from __future__ import annotations

import argparse

import numpy as np
from _common import median_time_s
from scipy import special

from petfall_audit._normal import ndtr, ndtri


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--size", type=int, default=2_000_000)
    parser.add_argument("--repeats", type=int, default=11)
    args = parser.parse_args()
    rng = np.random.default_rng(1)
    cases = {
        "normal, sd 1": rng.normal(0.0, 1.0, args.size),
        "normal, sd 3": rng.normal(0.0, 3.0, args.size),
        "uniform -40..40": rng.uniform(-40.0, 40.0, args.size),
    }
    print(f"ndtr on {args.size:,} values, median of {args.repeats} (ms)")
    print(f"{'values':<18}{'ours':>9}{'scipy':>9}{'ratio':>8}{'ours out=':>11}{'scipy out=':>12}")
    for name, x in cases.items():
        buf = np.empty_like(x)

        def ours_inplace(x: np.ndarray = x, buf: np.ndarray = buf) -> None:
            buf[...] = x
            ndtr(buf, out=buf)

        def scipy_inplace(x: np.ndarray = x, buf: np.ndarray = buf) -> None:
            buf[...] = x
            special.ndtr(buf, out=buf)

        t_ours = median_time_s(lambda x=x: ndtr(x), args.repeats)
        t_scipy = median_time_s(lambda x=x: special.ndtr(x), args.repeats)
        t_ours_in = median_time_s(ours_inplace, args.repeats)
        t_scipy_in = median_time_s(scipy_inplace, args.repeats)
        print(f"{name:<18}{t_ours * 1e3:>9.1f}{t_scipy * 1e3:>9.1f}{t_ours / t_scipy:>8.2f}"
              f"{t_ours_in * 1e3:>11.1f}{t_scipy_in * 1e3:>12.1f}")
    p = rng.uniform(0.0, 1.0, 4000)
    t_ours = median_time_s(lambda: ndtri(p), args.repeats)
    t_scipy = median_time_s(lambda: special.ndtri(p), args.repeats)
    print(f"ndtri on {p.size:,} values (ms): ours {t_ours * 1e3:.3f}, scipy {t_scipy * 1e3:.3f}, "
          f"ratio {t_ours / t_scipy:.2f}")


if __name__ == "__main__":
    main()
