"""Tests of the standard normal CDF and quantile (petfall_audit._normal), against
``scipy.special.ndtr``/``ndtri`` (the Cephes code they port), the standard library's
``math.erfc`` and ``statistics.NormalDist`` (Wichura's AS241 PPND16 quantile)."""

from __future__ import annotations

import decimal
import math
import subprocess
import sys
from fractions import Fraction
from pathlib import Path

import numpy as np
import numpy.typing as npt
import pytest
from hypothesis import given
from hypothesis import strategies as st
from scipy import special

from petfall_audit._normal import ndtr, ndtri

EPS = float(np.finfo(np.float64).eps)
TINY = float(np.finfo(np.float64).tiny)  # the smallest normal double
GRID = np.linspace(-40.0, 40.0, 200001)
SPECIAL_X = np.array([0.0, -0.0, np.inf, -np.inf, np.nan, 5e-324, -5e-324, 1e-300, -1e-300,
                      1e300, -1e300, 1.7976931348623157e308, -1.7976931348623157e308,
                      math.sqrt(2.0), -math.sqrt(2.0), 8 * math.sqrt(2.0), -8 * math.sqrt(2.0),
                      -37.5, -37.67, -37.68, -38.0, 8.3, 8.5])


def _rel(a: npt.NDArray[np.float64], b: npt.NDArray[np.float64]) -> npt.NDArray[np.float64]:
    return np.abs(a - b) / np.abs(b)


def test_ndtr_against_scipy_on_a_dense_grid_and_special_values() -> None:
    """scipy.special.ndtr (Cephes ndtr.c) is the reference. Cephes takes exp(−(x/√2)²) from
    x/√2 rounded and squared, an error of up to about 2.5 (x²/2) eps of its own (measured here:
    2.0 (x²/2) eps, 1056 eps at x = −37); ours carries x² exactly, so the two agree to
    (8 + 3 x²/2) eps, and to 8 eps for |x| < √2, where both use the same erf."""
    x = np.concatenate([GRID, SPECIAL_X])
    ours, ref = ndtr(x), special.ndtr(x)
    normal = ref >= TINY
    half_x2 = np.clip(x[normal], -100.0, 100.0) ** 2 / 2.0  # Φ is 1 beyond 100 all the same
    bound = (8.0 + 3.0 * half_x2) * EPS
    assert np.all(_rel(ours[normal], ref[normal]) <= bound)
    central = normal & (np.abs(x) < math.sqrt(2.0))
    assert np.all(_rel(ours[central], ref[central]) <= 8 * EPS)
    # the deep lower tail underflows to 0 where Cephes' erfc does (x below about −37.68)
    low = ~normal & ~np.isnan(ref)
    assert np.all(ours[low] <= TINY)
    assert np.array_equal(ours == 0.0, ref == 0.0)
    assert np.array_equal(ours == 1.0, ref == 1.0)
    assert np.array_equal(np.isnan(ours), np.isnan(x))


def test_ndtr_special_values() -> None:
    """Φ(±0) = ½ and Φ(x) → 0, 1 at ∓inf (from the definition); NaN propagates; below x = −37
    the values are still normal doubles, down to about −37.5 (as scipy.special.ndtr)."""
    out = ndtr(np.array([0.0, -0.0, -np.inf, np.inf, np.nan, 1e-300, -40.0, 40.0]))
    np.testing.assert_array_equal(out, [0.5, 0.5, 0.0, 1.0, np.nan, 0.5, 0.0, 1.0])
    assert math.isclose(float(ndtr(-37.0)), float(special.ndtr(-37.0)), rel_tol=1e-12)
    assert 0.0 < float(ndtr(-37.5)) < 1e-306


def _sqrt_half_parts() -> tuple[float, float]:
    """√½ as the double nearest it plus the remainder (both from the standard library)."""
    head = math.sqrt(0.5)  # IEEE square root: correctly rounded
    with decimal.localcontext() as ctx:
        ctx.prec = 50
        tail = float(decimal.Decimal(2).sqrt() / 2 - decimal.Decimal(head))
    return head, tail


def _phi_from_erfc(x: float, head: float, tail: float) -> float:
    """Φ(x) = ½ erfc(−x/√2) from math.erfc, corrected for the rounding of −x/√2 to the double
    b: with δ = −x/√2 − b (exact by fractions), erfc(b + δ) = erfc(b) − 2/√π exp(−b²) δ to
    far below one ulp (δ is about 1e-16 |b|)."""
    b = -x * head
    delta = float(Fraction(-x) * Fraction(head) - Fraction(b)) + (-x) * tail
    return 0.5 * (math.erfc(b) - 2.0 / math.sqrt(math.pi) * math.exp(-b * b) * delta)


def test_ndtr_against_math_erfc_to_a_few_ulp_in_the_tails_too() -> None:
    """The standard library's erfc (accurate to about 1 ulp), with the argument's rounding
    corrected, is a reference that does not lose accuracy in the tails: ours agrees to 8 eps
    (relative) from x = −37.5 to 40 (measured: 5.2 eps)."""
    head, tail = _sqrt_half_parts()
    x = np.concatenate([np.linspace(-37.5, 40.0, 15501), np.linspace(-37.6, -20.0, 2001),
                        np.linspace(-3.0, 3.0, 2001)])
    ref = np.array([_phi_from_erfc(float(v), head, tail) for v in x])
    assert np.all(_rel(ndtr(x), ref) <= 8 * EPS)


def test_ndtr_writes_into_out_like_scipy() -> None:
    """out= as scipy's ufunc: in place, into a non-contiguous array, from a strided input and
    from an input overlapping the output; the result is out itself."""
    rng = np.random.default_rng(5)
    x = rng.normal(0.0, 6.0, (70, 1001))  # more than one chunk
    ref = special.ndtr(x)
    inplace = x.copy()
    assert ndtr(inplace, out=inplace) is inplace
    np.testing.assert_allclose(inplace, ref, rtol=1e-12, atol=0)
    transposed = np.empty((1001, 70)).T
    ndtr(x, out=transposed)
    np.testing.assert_array_equal(transposed, ndtr(x))
    np.testing.assert_array_equal(ndtr(x[:, ::3]), ndtr(x)[:, ::3])
    shifted = x.copy()
    ndtr(shifted[:, :-1], out=shifted[:, 1:])
    np.testing.assert_array_equal(shifted[:, 1:], ndtr(x[:, :-1]))
    assert ndtr(np.empty((0, 3))).shape == (0, 3)
    assert ndtr(0.25).shape == ()
    with pytest.raises(ValueError, match="out must be"):
        ndtr(x, out=np.empty(3))


P_GRID = np.concatenate([np.linspace(0.0, 1.0, 200001), np.logspace(-320, -1, 4001),
                         1.0 - np.logspace(-16, -1, 1001),
                         [math.exp(-2), 1 - math.exp(-2), math.exp(-32), 5e-324, 1 - 1e-16]])


def test_ndtri_against_scipy() -> None:
    """scipy.special.ndtri (Cephes ndtri.c) is the reference: the same code, so 4 eps
    (relative; measured: 0) on (0, 1), and the same infinities and NaNs."""
    ours, ref = ndtri(P_GRID), special.ndtri(P_GRID)
    np.testing.assert_allclose(ours, ref, rtol=4 * EPS, atol=0)
    bad = np.array([0.0, -0.0, 1.0, -1e-300, -1.0, 1.0 + 2 * EPS, 2.0, np.inf, -np.inf, np.nan])
    np.testing.assert_array_equal(ndtri(bad), special.ndtri(bad))
    np.testing.assert_array_equal(ndtri(bad), [-np.inf, -np.inf, np.inf] + [np.nan] * 7)


def test_ndtri_against_the_standard_library_as241() -> None:
    """statistics.NormalDist.inv_cdf is Wichura's AS241 (PPND16, about 1e-16): the two agree
    to 8 eps, relative (measured: 4.6 eps)."""
    from statistics import NormalDist

    p = P_GRID[(P_GRID > 0.0) & (P_GRID < 1.0)][::5]
    ref = np.array([NormalDist().inv_cdf(float(q)) for q in p])
    ours = ndtri(p)
    nonzero = ref != 0.0
    assert np.all(_rel(ours[nonzero], ref[nonzero]) <= 8 * EPS)
    assert np.all(ours[~nonzero] == 0.0)


def test_ndtri_undoes_ndtr() -> None:
    """ndtri(ndtr(x)) = x to the error of Φ's rounding carried through the quantile's slope
    (ε Φ/φ) plus the quantile's own, 16 eps in all (φ the normal density, from math)."""
    x = np.linspace(-37.5, 5.0, 85001)
    p = ndtr(x)
    density = np.exp(-x * x / 2.0) / math.sqrt(2.0 * math.pi)
    bound = 16 * EPS * (np.abs(x) + p / density)
    assert np.all(np.abs(ndtri(p) - x) <= bound)


FINITE = st.floats(min_value=-40.0, max_value=40.0, allow_nan=False)


@given(FINITE, FINITE)
def test_ndtr_never_falls(a: float, b: float) -> None:
    """Non-decreasing up to its rounding: Φ(lo) ≤ Φ(hi) (1 + 16 eps). Exactly non-decreasing it
    is not, nor is scipy's: between neighbouring doubles for |x| < 2 the rounding of the
    rational function wobbles by up to 7 eps (measured), more than Φ rises."""
    lo, hi = min(a, b), max(a, b)
    assert float(ndtr(lo)) <= float(ndtr(hi)) * (1.0 + 16 * EPS)


@given(st.floats(min_value=0.0, max_value=1.0), st.floats(min_value=0.0, max_value=1.0))
def test_ndtri_never_falls(a: float, b: float) -> None:
    """Non-decreasing up to its rounding: 8 eps of the larger quantile's size (plus a floor of
    1e-300 near the median, where the quantile is 0)."""
    lo, hi = min(a, b), max(a, b)
    q_lo, q_hi = float(ndtri(lo)), float(ndtri(hi))
    assert q_lo <= q_hi or q_lo - q_hi <= 8 * EPS * max(abs(q_lo), abs(q_hi)) + 1e-300


def test_the_assessment_does_not_import_scipy_special() -> None:
    """risk (and the injury and sampling it uses) starts without scipy.special, whose import
    costs a large share of a short command. In a fresh interpreter, so that this test session's
    own imports do not count."""
    code = (
        "import sys\n"
        "import petfall_audit.risk, petfall_audit.injury, petfall_audit.sampling\n"
        "print(','.join(sorted(m for m in sys.modules if m.startswith('scipy.special'))))\n"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=Path(__file__).resolve().parents[1])
    assert out.stdout.strip() == "", f"scipy.special imported: {out.stdout.strip()}"
