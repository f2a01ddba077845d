"""Every results JSON the tool writes is the one envelope described by
``resources/results.schema.json`` (issue 13, item 7): ``assess --format json``, each ``batch``
result file, ``report -o x.json``, ``plan --format json`` and ``portfolio-plan.json`` (the app's
exports are checked in test_gui_export.py). Validated with jsonschema (Draft 2020-12)."""

from __future__ import annotations

import json
from pathlib import Path
from typing import Any

import jsonschema
import pytest

from petfall_audit._resources import resource_path, sample_path
from petfall_audit.cli import main

FAST = ["--samples", "120", "--seed", "3"]


@pytest.fixture(scope="module")
def validator() -> jsonschema.Draft202012Validator:
    schema = json.loads(resource_path("results.schema.json").read_text("utf-8"))
    jsonschema.Draft202012Validator.check_schema(schema)
    return jsonschema.Draft202012Validator(schema)


def _valid(validator: jsonschema.Draft202012Validator, text: str) -> dict[str, Any]:
    doc: dict[str, Any] = json.loads(text)
    errors = sorted(validator.iter_errors(doc), key=lambda e: list(e.path))
    assert not errors, "\n".join(f"{list(e.path)}: {e.message}" for e in errors[:5])
    return doc


def test_the_schema_refuses_what_is_not_an_envelope(validator: Any) -> None:
    # The schema is not a pass-everything: an old bare assessment and a wrong part fail it.
    with pytest.raises(jsonschema.ValidationError):
        validator.validate({"openings": [], "samples": 10})
    with pytest.raises(jsonschema.ValidationError):
        validator.validate({"format": "petfall-audit-results", "version": 1,
                            "software_version": "x", "contents": ["plan"], "results": None,
                            "plan": {"actions": "none"}, "portfolio": None, "caution": "c",
                            "cautions": ["c"]})


def test_assess_json(validator: Any, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["assess", str(sample_path("walkup")), "--format", "json", *FAST]) == 0
    doc = _valid(validator, capsys.readouterr().out)
    assert doc["contents"] == ["results"] and doc["plan"] is None
    assert doc["results"]["sensitivity"] is not None


def test_plan_json(validator: Any, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["plan", str(sample_path("walkup")), "--budget", "1500", "--format", "json",
                 *FAST]) == 0
    doc = _valid(validator, capsys.readouterr().out)
    assert doc["contents"] == ["plan"] and doc["plan"]["total_cost"] <= 1500


def test_report_json(validator: Any, tmp_path: Path) -> None:
    out = tmp_path / "r.json"
    assert main(["report", str(sample_path("walkup")), "-o", str(out), "--budget", "1000",
                 *FAST]) == 0
    doc = _valid(validator, out.read_text("utf-8"))
    assert doc["contents"] == ["results", "plan"]


def test_batch_result_files_and_the_portfolio_plan(validator: Any, tmp_path: Path) -> None:
    files = [str(sample_path(n)) for n in ("walkup", "block")]
    out = tmp_path / "out"
    assert main(["batch", *files, "--out-dir", str(out), "--budget", "800",
                 "--portfolio-budget", "2000", "--jobs", "1", *FAST]) == 0
    for name in ("walkup", "block"):
        doc = _valid(validator, (out / f"{name}.json").read_text("utf-8"))
        assert doc["contents"] == ["results", "plan"]
    estate = _valid(validator, (out / "portfolio-plan.json").read_text("utf-8"))
    assert estate["contents"] == ["portfolio"]
    assert [b["result_file"] for b in estate["portfolio"]["buildings"]] == ["walkup.json",
                                                                           "block.json"]


def test_compare_json(validator: Any, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    # The comparison of two audits is the same envelope, its keys at the top level (issue 16).
    walkup = str(sample_path("walkup"))
    assert main(["compare", walkup, walkup, "--format", "json", *FAST]) == 0
    doc = _valid(validator, capsys.readouterr().out)
    assert doc["contents"] == ["comparison"]
    assert doc["results"] is None and doc["plan"] is None
    assert {o["status"] for o in doc["openings"]} == {"unchanged"}
    assert doc["risk_before"] == doc["risk_after"] and doc["doubts"] == []
    # two different buildings: the doubts are in the envelope and valid
    assert main(["compare", walkup, str(sample_path("block")), "--format", "json", *FAST]) == 0
    other = _valid(validator, capsys.readouterr().out)
    assert other["doubts"] == ["no_common_openings", "different_address", "different_name",
                              "dates_reversed"]
    # a comparison without its openings is refused by the schema
    broken = dict(doc)
    del broken["openings"]
    with pytest.raises(jsonschema.ValidationError):
        validator.validate(broken)
