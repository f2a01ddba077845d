"""Places in words (no Qt): what a refusal says instead of internal paths."""

from __future__ import annotations

from petfall_audit.demo import sample_building
from petfall_audit.editing.words import place_words, plain_text, problem_words
from petfall_audit.errors import Problem


def test_paths_become_the_names_the_user_gave() -> None:
    b = sample_building("walkup")
    assert place_words("floors[2].elevation_m", b) == (f"{b.floors[2].label}, "
                                                       "floor level above datum")
    assert place_words("openings[0]", b) == f"Opening {b.openings[0].id}"
    assert place_words("facades[0].length_m", b).startswith(f"Facade {b.facades[0].id}, ")
    assert place_words("floors[99]", b) == "Floor number 100"
    assert place_words("info.name", b).startswith("Building details, ")


def test_paths_inside_messages_are_replaced() -> None:
    b = sample_building("walkup")
    text = plain_text("level 2 is not above level 1 (floors[1]); see openings[0]", b)
    assert "floors[" not in text and "openings[" not in text
    assert b.floors[1].label in text and b.openings[0].id in text


def test_a_refusal_names_each_place_once() -> None:
    b = sample_building("walkup")
    problems = [Problem("openings[0].x_m", "must be at least 0 m, got -5 m")] * 2
    assert problem_words(problems, b) == (f"Opening {b.openings[0].id}, position along facade: "
                                          "must be at least 0 m, got -5 m")
    many = [Problem(f"openings[{k}].x_m", "too far") for k in range(5)]
    assert problem_words(many, b).endswith("(and 2 more problems like these)")
