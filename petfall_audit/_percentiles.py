"""Percentiles along the last axis by one partial sort (private).

:func:`percentiles_last` gives what ``numpy.percentile(values, q, axis=-1)`` gives with its
default "linear" method (Hyndman and Fan's definition 7), bit for bit, moved to the last axis:
the same virtual indices, the same neighbouring order statistics and the same interpolation
arithmetic. It partitions each row once at the few order statistics it needs instead of going
through numpy's general quantile machinery, which moves the axis, and whose first call imports
``numpy.ma`` (about 10 ms of every command's start).
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import numpy.typing as npt

__all__ = ["percentiles_last"]

FloatArray = npt.NDArray[np.float64]


def percentiles_last(values: npt.ArrayLike, q_percent: Sequence[float]) -> FloatArray:
    """The ``q_percent`` percentiles (0..100) of ``values`` along its last axis: shape
    ``values.shape[:-1] + (len(q_percent),)``, in the unit of ``values``. A row holding a NaN
    gives NaN. ``values`` is not changed."""
    a = np.array(values, dtype=np.float64)  # a copy: the partition works in place
    if a.ndim == 0 or a.shape[-1] == 0:
        raise ValueError("percentiles_last needs at least one value along the last axis")
    q = np.true_divide(np.asarray(q_percent, dtype=np.float64), 100)
    if q.ndim != 1 or np.any(q < 0) or np.any(q > 1):
        raise ValueError(f"percentiles must be between 0 and 100, got {list(q_percent)}")
    n = a.shape[-1]
    # numpy's virtual index of the linear method, evaluated the same way
    virtual = (n - 1) * q
    prev = np.floor(virtual)
    nxt = prev + 1
    above = virtual >= n - 1  # beyond the last value: the largest one
    prev[above] = -1
    nxt[above] = -1
    gamma = virtual - prev
    i_prev = prev.astype(np.intp)
    i_next = nxt.astype(np.intp)
    kth = np.array(sorted({0, n - 1, *(i % n for i in (*i_prev.tolist(), *i_next.tolist()))}))
    a.partition(kth, axis=-1)
    lo = a[..., i_prev]
    hi = a[..., i_next]
    # numpy's _lerp: from the nearer end, so that gamma 1 gives hi exactly
    diff = hi - lo
    out: FloatArray = np.add(lo, diff * gamma)
    np.subtract(hi, diff * (1 - gamma), out=out, where=gamma >= 0.5)
    has_nan = np.isnan(a[..., -1])  # a NaN sorts to the end of its row
    if np.any(has_nan):
        out[has_nan] = np.nan
    return out
