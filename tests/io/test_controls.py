"""The control catalogue file: its pydantic shape, its committed JSON Schema and its messages."""

from __future__ import annotations

import copy
import json

import jsonschema
import pytest

from petfall_audit._resources import resource_path
from petfall_audit.errors import CatalogueError
from petfall_audit.io.controls import (
    CATALOGUE_SCHEMA_FILENAME,
    catalogue_json_schema,
    dumps_catalogue_schema,
    parse_catalogue,
)
from petfall_audit.model import OpenFrequency, Screen


def _doc() -> dict:
    return json.loads(resource_path("controls.json").read_text(encoding="utf-8"))


def test_committed_schema_is_the_generated_one() -> None:
    committed = resource_path(CATALOGUE_SCHEMA_FILENAME).read_text(encoding="utf-8")
    assert committed == dumps_catalogue_schema(), "run: python -m petfall_audit.io.controls"


def test_schema_accepts_the_shipped_catalogue_and_refuses_what_the_loader_refuses() -> None:
    # jsonschema (an independent validator) reads the shipped schema as the loader's rules
    schema = json.loads(resource_path(CATALOGUE_SCHEMA_FILENAME).read_text(encoding="utf-8"))
    jsonschema.Draft202012Validator.check_schema(schema)
    validator = jsonschema.Draft202012Validator(schema)
    assert not list(validator.iter_errors(_doc()))
    bad = _doc()
    bad["controls"][0]["cost"]["fixed"] = -5
    bad["controls"][1]["effect"]["colour"] = "blue"
    assert len(list(validator.iter_errors(bad))) == 2
    with pytest.raises(CatalogueError):
        parse_catalogue(bad)
    assert catalogue_json_schema()["$schema"].endswith("2020-12/schema")


def test_messages_are_plain_words_with_their_place() -> None:
    doc = _doc()
    doc["controls"][3]["cost"]["per_m_width"] = "cheap"
    doc["controls"][0]["hierarchy"] = "pray"
    doc["controls"][2]["adherence"] = 0
    doc["controls"][5]["effect"]["colour"] = "blue"
    del doc["controls"][4]["name"]
    with pytest.raises(CatalogueError) as info:
        parse_catalogue(doc)
    said = {p.where: p.message for p in info.value.problems}
    assert said["controls[3].cost.per_m_width"] == "expected a number, got 'cheap'"
    assert said["controls[0].hierarchy"].startswith("unknown value 'pray' (one of ")
    assert said["controls[2].adherence"] == "must be more than 0.0, got 0"
    assert said["controls[5].effect.colour"].startswith("not a field a control can change")
    assert said["controls[4].name"] == "required, but missing"
    text = str(info.value)
    assert "pydantic" not in text and "Input should" not in text


def test_effect_values_become_model_values_and_null_means_none() -> None:
    cat = parse_catalogue(_doc())
    assert dict(cat.control("keep_closed").effect) == {"open_frequency": OpenFrequency.RARELY}
    assert dict(cat.control("screen_pet_hinged").effect) == {"screen": Screen.PET_RESISTANT}
    panels = dict(cat.control("infill_panels").effect)
    assert panels == {"largest_gap_mm": None, "bottom_gap_mm": None, "climbable_infill": False}
    doc = _doc()
    doc["controls"][0]["effect"] = {"screen": None}
    with pytest.raises(CatalogueError, match=r"controls\[0\]\.effect\.screen: cannot be null"):
        parse_catalogue(doc)


def test_optional_fields_may_be_left_out_so_older_files_load() -> None:
    doc = _doc()
    minimal = copy.deepcopy(doc["controls"][0])
    for key in ("description", "conflicts", "conditions", "adherence", "effect"):
        minimal.pop(key, None)
    doc["controls"] = [minimal]
    doc.pop("cost_basis")
    doc.pop("wind_rated_above_m")
    cat = parse_catalogue(doc)
    assert cat.controls[0].adherence == 1.0 and cat.controls[0].effect == ()
    assert (cat.enclosure_height_m, cat.window_height_m, cat.wind_rated_above_m) == (2.4, 1.2, 18.0)


def test_duplicate_ids_and_inverted_heights_are_refused() -> None:
    doc = _doc()
    doc["controls"][2]["id"] = doc["controls"][1]["id"]
    doc["controls"][1]["applies_to"]["min_height_m"] = 30.0
    with pytest.raises(CatalogueError) as info:
        parse_catalogue(doc)
    where = {p.where for p in info.value.problems}
    assert {"controls[2].id", "controls[1].applies_to.min_height_m"} <= where
