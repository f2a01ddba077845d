"""Percentiles by one partial sort against the reference library: ``numpy.percentile`` (linear
method, Hyndman and Fan 1996, definition 7), which must be matched bit for bit so that a
result never depends on which of the two computed it."""

from __future__ import annotations

import subprocess
import sys

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st
from hypothesis.extra import numpy as hnp

from petfall_audit._percentiles import percentiles_last

_FINITE = st.floats(-1e9, 1e9, allow_nan=False, allow_infinity=False, width=64)


def _reference(values: np.ndarray, q: list[float]) -> np.ndarray:
    return np.moveaxis(np.percentile(values, q, axis=-1), 0, -1)


@settings(max_examples=300, deadline=None)
@given(
    values=hnp.arrays(np.float64, hnp.array_shapes(min_dims=1, max_dims=3, min_side=1,
                                                   max_side=40), elements=_FINITE),
    q=st.lists(st.floats(0.0, 100.0, allow_nan=False), min_size=1, max_size=5),
)
def test_equal_to_numpy_percentile_bit_for_bit(values: np.ndarray, q: list[float]) -> None:
    before = values.copy()
    got = percentiles_last(values, q)
    assert got.shape == values.shape[:-1] + (len(q),)
    assert np.array_equal(got, _reference(values, q))
    assert np.array_equal(values, before)  # the input is not sorted in place


@pytest.mark.parametrize("n", [1, 2, 3, 20, 4000, 4001])
def test_the_reported_percentiles_of_long_rows_with_ties_and_a_nan(n: int) -> None:
    rng = np.random.default_rng(n)
    values = np.round(rng.lognormal(2.0, 0.6, size=(7, n)), 1)  # many equal values
    values[3, n // 2] = np.nan
    q = [5.0, 50.0, 95.0]
    got = percentiles_last(values, q)
    assert np.array_equal(got, _reference(values, q), equal_nan=True)
    assert np.all(np.isnan(got[3])) and not np.any(np.isnan(np.delete(got, 3, axis=0)))


def test_textbook_values() -> None:
    # linear interpolation between order statistics (Hyndman and Fan 1996, definition 7):
    # of 1..5 the 25th percentile is 2, the median 3, the 10th 1.4
    got = percentiles_last(np.array([5.0, 1.0, 4.0, 2.0, 3.0]), (10.0, 25.0, 50.0, 100.0))
    assert got.tolist() == pytest.approx([1.4, 2.0, 3.0, 5.0], abs=1e-15)


def test_refuses_what_numpy_refuses() -> None:
    with pytest.raises(ValueError):
        percentiles_last(np.array([1.0, 2.0]), (101.0,))
    with pytest.raises(ValueError):
        percentiles_last(np.empty((3, 0)), (50.0,))


def test_an_assessment_does_not_load_numpy_masked_arrays() -> None:
    # numpy.percentile's first call imports numpy.ma (about 10 ms of every command)
    code = ("import sys; from petfall_audit.risk import assess; "
            "from petfall_audit._resources import sample_path; "
            "from petfall_audit.io.building_file import load_building; "
            "from petfall_audit.sensitivity import with_sensitivity; "
            "with_sensitivity(assess(load_building(sample_path('walkup')), samples=64)); "
            "print('numpy.ma' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
