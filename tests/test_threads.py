"""Blocks of one building computed on two cores (petfall_audit._threads): in order, errors at
their key, the same results bit for bit as on one thread, and off within ``one_thread``."""

from __future__ import annotations

import threading
import time

import numpy as np
import pytest

from petfall_audit._interception import simulate_chunks
from petfall_audit._threads import in_order_ahead, one_thread, worker_count
from petfall_audit.demo import sample_building
from petfall_audit.reassess import assess_deduplicated
from petfall_audit.risk import assess
from petfall_audit.sampling import sample_cat_profile


def test_results_come_in_the_order_of_the_keys_whatever_finishes_first() -> None:
    def slow_first(k: int) -> int:
        time.sleep(0.02 if k % 3 == 0 else 0.0)
        return k * k

    assert list(in_order_ahead(slow_first, range(20))) == [k * k for k in range(20)]


def test_an_error_reaches_the_caller_at_its_key() -> None:
    def fails_at_five(k: int) -> int:
        if k == 5:
            raise ValueError("block 5")
        return k

    got: list[int] = []
    with pytest.raises(ValueError, match="block 5"):
        for v in in_order_ahead(fails_at_five, range(10)):
            got.append(v)
    assert got == [0, 1, 2, 3, 4]


def test_a_caller_that_stops_early_starts_no_further_work() -> None:
    started: list[int] = []
    lock = threading.Lock()

    def note(k: int) -> int:
        with lock:
            started.append(k)
        return k

    gen = in_order_ahead(note, range(100))
    assert next(gen) == 0
    gen.close()
    assert len(started) <= 1 + max(worker_count(), 1)


def test_one_thread_computes_on_the_calling_thread() -> None:
    with one_thread():
        assert worker_count() == 0
        names = list(in_order_ahead(lambda _: threading.current_thread().name, range(4)))
    assert set(names) == {threading.current_thread().name}


def test_two_threads_give_the_results_of_one_bit_for_bit() -> None:
    building = sample_building()
    samples = 4000  # several blocks of openings, so that blocks run side by side
    blocks = list(simulate_chunks(building, sample_cat_profile(building.cat_profile, samples),
                                  rho_kg_m3=1.2))
    assert len(blocks) >= 3
    with one_thread():
        one = assess(building, samples=samples, seed=3, keep_falls=True)
        one_d = assess_deduplicated(building, samples=samples, seed=3)
    two = assess(building, samples=samples, seed=3, keep_falls=True)
    two_d = assess_deduplicated(building, samples=samples, seed=3)
    for a, b in ((one, two), (one_d, two_d)):
        assert a.openings == b.openings
        assert np.array_equal(a.band_probabilities, b.band_probabilities)
        assert np.array_equal(a.risk, b.risk)
    assert one.falls is not None and two.falls is not None
    assert np.array_equal(one.falls.drop_m, two.falls.drop_m)
    assert np.array_equal(one.falls.landing, two.falls.landing)
    assert np.array_equal(one.severity_g, two.severity_g)


def test_the_falls_kept_block_by_block_are_those_of_one_pass_over_the_building() -> None:
    """assess(keep_falls=True) writes each block's falls into the building's arrays on the
    block's own thread; they equal physics.simulate_falls over every opening at once, and the
    kept doses those of risk.severity_of_falls on them."""
    from petfall_audit.physics import simulate_falls
    from petfall_audit.risk import DEFAULT_STOPS, severity_of_falls

    building = sample_building()
    samples = 4000
    cat = sample_cat_profile(building.cat_profile, samples, seed=5)
    whole = simulate_falls(building, cat)
    got = assess(building, samples=samples, seed=5, keep_falls=True)
    assert got.falls is not None and got.severity_g is not None
    assert got.falls.opening_ids == whole.opening_ids
    assert got.falls.landing_ids == whole.landing_ids
    assert got.falls.landing_kinds == whole.landing_kinds
    for name in ("drop_m", "landing", "impact_speed_mps", "fall_time_s", "righted"):
        want = getattr(whole, name)
        have = getattr(got.falls, name)
        assert have.dtype == want.dtype and np.array_equal(have, want), name
    assert np.array_equal(got.severity_g, severity_of_falls(whole, cat, DEFAULT_STOPS))
