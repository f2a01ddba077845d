"""Validating a building again after an edit re-checks only the openings that changed (the app
validates after every edit); the problems found must be exactly those of a validation from
scratch, whatever the edits (petfall_audit.io._checks)."""

from __future__ import annotations

import dataclasses

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from petfall_audit.demo import sample_building
from petfall_audit.io import _checks
from petfall_audit.io.building_file import validate_building
from petfall_audit.model import Building

BASE = sample_building("walkup")


def _from_scratch(b: Building) -> list[tuple[str, str, str]]:
    """The problems of ``b`` with nothing remembered from earlier calls."""
    kept = (_checks._LAST_OPENINGS, _checks._OPENING_PROBLEMS)
    _checks._LAST_OPENINGS, _checks._OPENING_PROBLEMS = None, {}
    try:
        return [(p.where, p.message, p.severity) for p in validate_building(b)]
    finally:
        _checks._LAST_OPENINGS, _checks._OPENING_PROBLEMS = kept


def _edit(b: Building, step: tuple[str, int, int]) -> Building:
    """One edit of ``b``: ``(what, which opening, which value)``."""
    what, i, k = step
    ops = list(b.openings)
    o = ops[i % len(ops)]
    other = ops[(i + 1 + k) % len(ops)]
    facade_ids = [f.id for f in b.facades]
    if what == "floor":
        ops[i % len(ops)] = dataclasses.replace(o, floor=(99 if k % 2 else other.floor))
    elif what == "width":
        ops[i % len(ops)] = dataclasses.replace(o, width_m=(-1.0 if k % 2 else 1.2))
    elif what == "facade":
        ops[i % len(ops)] = dataclasses.replace(
            o, facade=("nowhere" if k % 2 else facade_ids[k % len(facade_ids)]))
    elif what == "x":
        ops[i % len(ops)] = dataclasses.replace(o, x_m=(10_000.0 if k % 2 else 0.5))
    elif what == "id":
        ops[i % len(ops)] = dataclasses.replace(o, id=(other.id if k % 2 else f"N{i}-{k}"))
    elif what == "same":  # an equal copy: another object, the same problems
        ops[i % len(ops)] = dataclasses.replace(o)
    elif what == "remove" and len(ops) > 2:
        del ops[i % len(ops)]
    elif what == "facade_length":  # every opening on it is looked at again
        facades = list(b.facades)
        f = facades[k % len(facades)]
        facades[k % len(facades)] = dataclasses.replace(f, length_m=(3.0 if k % 2 else 40.0))
        return dataclasses.replace(b, facades=tuple(facades))
    elif what == "floor_gone":
        return dataclasses.replace(b, floors=tuple(b.floors[:-1]) if k % 2 else BASE.floors)
    return dataclasses.replace(b, openings=tuple(ops))


STEPS = st.lists(st.tuples(
    st.sampled_from(["floor", "width", "facade", "x", "id", "same", "remove",
                     "facade_length", "floor_gone"]),
    st.integers(0, 200), st.integers(0, 50)), min_size=1, max_size=12)


@settings(max_examples=60, deadline=None, derandomize=True)
@given(STEPS)
def test_problems_after_any_edits_equal_those_from_scratch(
        steps: list[tuple[str, int, int]]) -> None:
    b = BASE
    validate_building(b)
    for step in steps:
        b = _edit(b, step)
        again = [(p.where, p.message, p.severity) for p in validate_building(b)]
        assert again == _from_scratch(b), step


def test_an_edit_of_one_opening_checks_that_opening_alone(monkeypatch: pytest.MonkeyPatch) -> None:
    b = BASE
    validate_building(b)
    checked: list[str] = []
    real = _checks._check_opening

    def spy(problems: list[object], o: object, *args: object) -> None:
        checked.append(o.id)  # type: ignore[attr-defined]
        real(problems, o, *args)  # type: ignore[arg-type]

    monkeypatch.setattr(_checks, "_check_opening", spy)
    target = b.openings[7]
    edited = _edit(b, ("width", 7, 1))
    problems = validate_building(edited)
    assert checked == [target.id]
    assert any(p.where == "openings[7].width_m" for p in problems)
