"""Places in words (no Qt): what a refusal says instead of internal paths."""

from __future__ import annotations

from petfall_audit.demo import sample_building
from petfall_audit.editing.words import place_words, plain_text, problem_words
from petfall_audit.errors import Place, Problem


def test_places_become_the_names_the_user_gave() -> None:
    b = sample_building("walkup")
    assert place_words(Place("floors", 2, "elevation_m"), b) == (f"{b.floors[2].label}, "
                                                                 "floor level above datum")
    assert place_words(Place("openings", 0), b) == f"Opening {b.openings[0].id}"
    assert place_words(Place("openings", 0, "floor"), b) == f"Opening {b.openings[0].id}, floor"
    assert place_words(Place("facades", 0, "length_m"), b).startswith(
        f"Facade {b.facades[0].id}, ")
    assert place_words(Place("floors", 99), b) == "Floor number 100"
    assert place_words(Place("info", None, "name"), b).startswith("Building details, ")
    assert place_words(Place("openings", 0, "photos[1]"), b) == (
        f"Opening {b.openings[0].id}, photos")
    # a place with no parts reads as it is: its text is never parsed back into parts
    assert place_words("line 4, Width", b) == "line 4, Width"
    assert place_words("openings[0].floor", b) == "openings[0].floor"


def test_a_place_keeps_its_text_form_for_files_and_the_command_line() -> None:
    p = Problem(Place("openings", 12, "floor"), "level 9 does not exist")
    assert p.where == "openings[12].floor"
    assert str(p) == "openings[12].floor: level 9 does not exist"
    assert p.place == Place("openings", 12, "floor")
    assert str(Place.of_path(("cat_profile", "mass_kg", "sd"))) == "cat_profile.mass_kg.sd"
    assert Place.of_path(("openings", 3, "photos", 0)) == Place("openings", 3, "photos[0]")


def test_paths_inside_messages_are_replaced() -> None:
    b = sample_building("walkup")
    text = plain_text("level 2 is not above level 1 (floors[1]); see openings[0]", b)
    assert "floors[" not in text and "openings[" not in text
    assert b.floors[1].label in text and b.openings[0].id in text


def test_a_refusal_names_each_place_once() -> None:
    b = sample_building("walkup")
    problems = [Problem(Place("openings", 0, "x_m"), "must be at least 0 m, got -5 m")] * 2
    assert problem_words(problems, b) == (f"Opening {b.openings[0].id}, position along facade: "
                                          "must be at least 0 m, got -5 m")
    many = [Problem(Place("openings", k, "x_m"), "too far") for k in range(5)]
    assert problem_words(many, b).endswith("(and 2 more problems like these)")


def test_a_refused_value_reads_in_the_units_of_the_reader() -> None:
    import dataclasses
    import re

    from petfall_audit.editing.document import validate

    b = sample_building("walkup")
    bad = dataclasses.replace(b, openings=(
        dataclasses.replace(b.openings[0], x_m=-1.524, netting_mesh_mm=600.0),
        *b.openings[1:]))
    problems = [p for p in validate(bad) if p.place.index == 0 and p.place.section == "openings"]
    assert {p.place.field for p in problems} >= {"x_m", "netting_mesh_mm"}
    metric = problem_words(problems, bad, limit=9)
    imperial = problem_words(problems, bad, limit=9, system="imperial")
    assert "got -1.524 m" in metric and "mm" in metric  # the metric wording as the checks write it
    # -1.524 m is -5 ft exactly (1 ft = 0.3048 m, international yard and pound agreement, 1959)
    assert "got -5 ft 0 in" in imperial
    assert not re.search(r"\d\s*(mm|cm|m)\b", imperial), imperial
