"""The standard normal distribution: its cumulative distribution function ``Φ`` (:func:`ndtr`)
and its inverse, the quantile function (:func:`ndtri`), vectorised in numpy (dimensionless).

Both are ports of the Cephes Math Library, S. L. Moshier (BSD licence), as distributed with
SciPy (``ndtr.c`` with its ``erf``/``erfc``, and ``ndtri.c``): the same rational approximations,
coefficient tables and branches, evaluated the same way, so the results agree with
``scipy.special.ndtr`` and ``scipy.special.ndtri``. One change in ``ndtr``: where ``Φ`` comes
from ``erfc`` (``|x| ≥ √2``), the Gaussian factor ``exp(−x²/2)`` is taken from ``x²`` split
into its rounded value and the rounding error (Dekker's exact product), not from
``(x/√2)²`` rounded twice, whose error grows with ``x²`` (about 2000 ulp at ``x = −37``). The
tails are so accurate to a few ulp, where Cephes is accurate to a few hundred.

Here so that the assessment does not import ``scipy.special`` when it starts.
"""

from __future__ import annotations

import numpy as np
import numpy.typing as npt

__all__ = ["ndtr", "ndtri"]

FloatArray = npt.NDArray[np.float64]

_SQRT1_2 = 7.07106781186547524401e-1  # 1/√2
_SQRT2PI = 2.50662827463100050242e0  # √(2π)
_MAXLOG = 7.09782712893383996843e2  # ln(largest double): erfc is 0 beyond exp(−MAXLOG)
_EXP_M2 = 0.13533528323661269189  # exp(−2), where ndtri's central branch ends
_SPLIT = 134217729.0  # 2**27 + 1, Dekker's splitter: a double into two halves of 26 bits
_X_CLIP = 40.0  # |x| beyond which Φ is exactly 0 or 1 (x²/2 > MAXLOG); also takes ±inf
_CHUNK = 1 << 15  # elements processed at a time, so the temporaries stay in the cache

# erf(x) = x T(x²) / U(x²) for |x| < 1 (Cephes ndtr.c)
_T = (9.60497373987051638749e0, 9.00260197203842689217e1, 2.23200534594684319226e3,
      7.00332514112805075473e3, 5.55923013010394962768e4)
_U = (3.35617141647503099647e1, 5.21357949780152679795e2, 4.59432382970980127987e3,
      2.26290000613890934246e4, 4.92673942608635921086e4)  # leading coefficient 1
# erfc(x) = exp(−x²) P(x) / Q(x) for 1 ≤ x < 8
_P = (2.46196981473530512524e-10, 5.64189564831068821977e-1, 7.46321056442269912687e0,
      4.86371970985681366614e1, 1.96520832956077098242e2, 5.26445194995477358631e2,
      9.34528527171957607540e2, 1.02755188689515710272e3, 5.57535335369399327526e2)
_Q = (1.32281951154744992508e1, 8.67072140885989742329e1, 3.54937778887819891062e2,
      9.75708501743205489753e2, 1.82390916687909736289e3, 2.24633760818710981792e3,
      1.65666309194161350182e3, 5.57535340817727675546e2)  # leading coefficient 1
# erfc(x) = exp(−x²) R(x) / S(x) for x ≥ 8
_R = (5.64189583547755073984e-1, 1.27536670759978104416e0, 5.01905042251180477414e0,
      6.16021097993053585195e0, 7.40974269950448939160e0, 2.97886665372100240670e0)
_S = (2.26052863220117276590e0, 9.39603524938001434673e0, 1.20489539808096656605e1,
      1.70814450747565897222e1, 9.60896809063285878198e0, 3.36907645100081516050e0)

# ndtri(y) = √(2π) (w + w w² P0(w²)/Q0(w²)), w = y − ½, for exp(−2) < y < 1 − exp(−2)
_P0 = (-5.99633501014107895267e1, 9.80010754185999661536e1, -5.66762857469070293439e1,
       1.39312609387279679503e1, -1.23916583867381258016e0)
_Q0 = (1.95448858338141759834e0, 4.67627912898881538453e0, 8.63602421390890590575e1,
       -2.25462687854119370527e2, 2.00260212380060660359e2, -8.20372256168333339912e1,
       1.59056225126211695515e1, -1.18331621121330003142e0)  # leading coefficient 1
# tails, t = √(−2 ln y): ndtri = −(t − ln(t)/t − P(1/t)/(t Q(1/t))); P1/Q1 for t < 8
_P1 = (4.05544892305962419923e0, 3.15251094599893866154e1, 5.71628192246421288162e1,
       4.40805073893200834700e1, 1.46849561928858024014e1, 2.18663306850790267539e0,
       -1.40256079171354495875e-1, -3.50424626827848203418e-2, -8.57456785154685413611e-4)
_Q1 = (1.57799883256466749731e1, 4.53907635128879210584e1, 4.13172038254672030440e1,
       1.50425385692907503408e1, 2.50464946208309415979e0, -1.42182922854787788574e-1,
       -3.80806407691578277194e-2, -9.33259480895457427372e-4)  # leading coefficient 1
# ... and P2/Q2 for t ≥ 8 (y < exp(−32))
_P2 = (3.23774891776946035970e0, 6.91522889068984211695e0, 3.93881025292474443415e0,
       1.33303460815807542389e0, 2.01485389549179081538e-1, 1.23716634817820021358e-2,
       3.01581553508235416007e-4, 2.65806974686737550832e-6, 6.23974539184983293730e-9)
_Q2 = (6.02427039364742014255e0, 3.67983563856160859403e0, 1.37702099489081330271e0,
       2.16236993594496635890e-1, 1.34204006088543189037e-2, 3.28014464682127739104e-4,
       2.89247864745380683936e-6, 6.79019408009981274425e-9)  # leading coefficient 1


def _polevl(x: FloatArray, coef: tuple[float, ...]) -> FloatArray:
    """``coef[0] xᴺ + … + coef[N]`` by Horner's rule, in Cephes' order of operations."""
    p = x * coef[0]
    p += coef[1]
    for c in coef[2:]:
        p *= x
        p += c
    return p


def _p1evl(x: FloatArray, coef: tuple[float, ...]) -> FloatArray:
    """``xᴺ + coef[0] xᴺ⁻¹ + … + coef[N−1]`` (leading coefficient 1), as :func:`_polevl`."""
    p = x + coef[0]
    for c in coef[1:]:
        p *= x
        p += c
    return p


def _take(x: FloatArray, idx: npt.NDArray[np.intp]) -> FloatArray:
    """``x[idx]``, without the copy when ``idx`` is every element in order."""
    return x if idx.size == x.size else x.take(idx)


def _gauss_half(ax: FloatArray) -> FloatArray:
    """``exp(−x²/2)`` for ``x = ax ≥ 0``, with ``x²`` carried to twice the working precision
    (Dekker's product: ``x² = hi + lo`` exactly) and ``exp(−lo/2) ≈ 1 − lo/2``."""
    c = ax * _SPLIT
    h = c - ax
    np.subtract(c, h, out=h)  # the high 26 bits of x
    low = np.subtract(ax, h, out=c)  # the rest: x = h + low exactly
    hi = ax * ax
    lo = h * h
    lo -= hi
    h *= low
    h += h  # 2 h low
    lo += h
    low *= low
    lo += low  # x² − hi, exact up to a rounding far below one ulp of hi
    lo *= -0.5
    lo += 1.0
    hi *= -0.5
    e = np.exp(hi, out=hi)
    e *= lo
    return e


def _ndtr_tail(xs: FloatArray, big: bool) -> FloatArray:
    """``Φ(x)`` for ``|x| ≥ √2`` from ``½ erfc(|x|/√2)``; ``big`` for ``|x|/√2 ≥ 8``."""
    ax = np.abs(xs)
    if big:
        np.minimum(ax, _X_CLIP, out=ax)  # ±inf too: Φ is 0 or 1 there all the same
    z = ax * _SQRT1_2
    num, den = (_R, _S) if big else (_P, _Q)
    y = _gauss_half(ax)
    if big:  # Cephes: erfc underflows to 0 once x²/2 > MAXLOG
        y *= ax * ax <= 2.0 * _MAXLOG
    y *= _polevl(z, num)
    y /= _p1evl(z, den)
    y *= 0.5  # Φ(−|x|)
    # Φ(x) = Φ(−|x|) for x < 0 and 1 − Φ(−|x|) for x > 0
    np.copysign(y, -xs, out=y)
    y += xs > 0
    return y


def _ndtr_central(xs: FloatArray) -> FloatArray:
    """``Φ(x) = ½ + ½ erf(x/√2)`` for ``|x| < √2`` (and NaN)."""
    a = xs * _SQRT1_2
    w = a * a
    y = _polevl(w, _T)
    y *= a
    y /= _p1evl(w, _U)
    y *= 0.5
    y += 0.5
    return y


def _ndtr_chunk(x: FloatArray, out: FloatArray) -> None:
    """:func:`ndtr` of the 1-D contiguous ``x`` into ``out`` (which may be ``x`` itself)."""
    z = x * _SQRT1_2
    np.abs(z, out=z)
    ge1 = z >= 1.0
    ge8 = z >= 8.0
    i_central = np.flatnonzero(~ge1)  # NaN included: it propagates
    i_mid = np.flatnonzero(ge1 ^ ge8)
    i_big = np.flatnonzero(ge8)
    # every input is read before any output is written, so out may be x
    parts = [(i, _take(x, i)) for i in (i_central, i_mid, i_big)]
    (ic, xc), (im, xm), (ib, xb) = parts
    results = []
    if ic.size:
        results.append((ic, _ndtr_central(xc)))
    if im.size:
        results.append((im, _ndtr_tail(xm, big=False)))
    if ib.size:
        results.append((ib, _ndtr_tail(xb, big=True)))
    for idx, y in results:
        if idx.size == out.size:
            out[...] = y
        else:
            out[idx] = y


def ndtr(x: npt.ArrayLike, out: FloatArray | None = None) -> FloatArray:
    """The standard normal CDF ``Φ(x) = ∫₋∞ˣ exp(−t²/2) dt / √(2π)`` of each element
    (dimensionless), as ``scipy.special.ndtr``: 0 below about −37.68 (where Cephes' ``erfc``
    underflows), 1 from about 8.3, NaN for NaN.

    ``out``, a float64 array of ``x``'s shape (``x`` itself allowed), receives the result.
    Accurate to a few ulp (relative) over the whole range.
    """
    xa = np.asarray(x, dtype=np.float64)
    if out is None:
        res: FloatArray = np.empty(xa.shape)
    else:
        if out.shape != xa.shape or out.dtype != np.float64:
            raise ValueError(f"out must be float64 of shape {xa.shape}, got {out.dtype} "
                             f"{out.shape}")
        res = out
        if np.may_share_memory(xa, res) and not (
            xa.__array_interface__["data"] == res.__array_interface__["data"]
            and xa.strides == res.strides
        ):
            xa = xa.copy()  # a partial overlap: read the input before writing any output
    work = res if res.flags.c_contiguous else np.empty(xa.shape)
    src = np.ascontiguousarray(xa).reshape(-1)
    dst = work.reshape(-1)
    with np.errstate(under="ignore"):
        for start in range(0, src.size, _CHUNK):
            stop = start + _CHUNK
            _ndtr_chunk(src[start:stop], dst[start:stop])
    if work is not res:
        res[...] = work
    return res


def _ndtri_tail(y: FloatArray, lower: npt.NDArray[np.bool_]) -> FloatArray:
    """The quantile of the tail probability ``0 < y < exp(−2)``: of ``y`` itself where
    ``lower``, else of ``1 − y`` (the upper tail, ``y`` being ``1 − p`` there)."""
    t = np.log(y)
    t *= -2.0
    np.sqrt(t, out=t)
    r = 1.0 / t
    res = t - np.log(t) / t
    big = t >= 8.0
    i_mid, i_big = np.flatnonzero(~big), np.flatnonzero(big)
    for idx, num, den in ((i_mid, _P1, _Q1), (i_big, _P2, _Q2)):
        if idx.size:
            ri = _take(r, idx)
            x1 = _polevl(ri, num)
            x1 *= ri
            x1 /= _p1evl(ri, den)
            if idx.size == res.size:
                res -= x1
            else:
                res[idx] -= x1
    np.negative(res, out=res, where=lower)
    return res


def ndtri(p: npt.ArrayLike) -> FloatArray:
    """The standard normal quantile: the ``x`` with ``Φ(x) = p`` for each element of ``p``
    (dimensionless), as ``scipy.special.ndtri``: −inf at 0, +inf at 1, NaN outside [0, 1] and
    for NaN. Accurate to about 1e-15 (relative) on (0, 1)."""
    y0 = np.asarray(p, dtype=np.float64)
    flat = np.ascontiguousarray(y0).reshape(-1)
    res = np.full(flat.shape, np.nan)
    upper = flat > 1.0 - _EXP_M2
    central = (flat > _EXP_M2) & ~upper
    tail = ((flat > 0.0) & (flat <= _EXP_M2)) | (upper & (flat < 1.0))
    i_central = np.flatnonzero(central)
    if i_central.size:
        w = flat[i_central] - 0.5
        w2 = w * w
        x = _polevl(w2, _P0)
        x *= w2
        x /= _p1evl(w2, _Q0)
        x *= w
        x += w
        x *= _SQRT2PI
        res[i_central] = x
    i_tail = np.flatnonzero(tail)
    if i_tail.size:
        y = flat[i_tail]
        up = upper[i_tail]
        np.subtract(1.0, y, out=y, where=up)
        res[i_tail] = _ndtri_tail(y, ~up)
    res[flat == 0.0] = -np.inf
    res[flat == 1.0] = np.inf
    out: FloatArray = res.reshape(y0.shape)
    return out
