"""The recomputer: quick results first, then the full count, never queued behind each other."""

from __future__ import annotations

import time
from typing import Any

import pytest

from petfall_audit.demo import sample_building
from petfall_audit.gui.worker import REFINED_SAMPLES, Recomputer
from petfall_audit.sampling import DEFAULT_SAMPLES

pytestmark = pytest.mark.gui


def test_refined_count_is_the_report_count() -> None:
    assert REFINED_SAMPLES == DEFAULT_SAMPLES


def test_quick_run_does_not_wait_behind_a_stale_refinement(qtbot) -> None:  # type: ignore[no-untyped-def]
    calls: list[int] = []

    def fake_assess(building: Any, *, samples: int, seed: int, progress: Any) -> Any:
        calls.append(samples)
        if samples == 400:
            time.sleep(1.0)  # a refinement that cannot stop early
        return (building, samples, seed)

    r = Recomputer(fake_assess, samples=16, refine_samples=400, refine_delay_ms=0)
    finished: list[Any] = []
    refined: list[Any] = []
    r.finished.connect(lambda _g, a, _s: finished.append(a))
    r.refined.connect(lambda _g, a, _s: refined.append(a))
    walkup, tower = sample_building("walkup"), sample_building("tower")
    with qtbot.waitSignal(r.refining, timeout=5000):
        r.request(walkup)
    start = time.perf_counter()
    with qtbot.waitSignal(r.finished, timeout=5000):
        r.request(tower)
    assert time.perf_counter() - start < 0.8  # not after the 1 s refinement
    assert finished[-1] == (tower, 16, 1)
    qtbot.waitUntil(lambda: bool(refined), timeout=10000)
    assert refined == [(tower, 400, 1)]  # the walk-up's refinement was dropped
    r.shutdown()


def test_no_refinement_when_the_quick_count_is_full(qtbot) -> None:  # type: ignore[no-untyped-def]
    calls: list[int] = []

    def fake_assess(building: Any, *, samples: int, seed: int, progress: Any) -> Any:
        calls.append(samples)
        return samples

    r = Recomputer(fake_assess, samples=4000, refine_samples=4000, refine_delay_ms=0)
    assert not r.refines and r.final_samples == 4000
    with qtbot.waitSignal(r.finished, timeout=5000):
        r.request(sample_building("walkup"))
    qtbot.wait(50)
    assert calls == [4000] and not r.refining_now
    r.shutdown()
