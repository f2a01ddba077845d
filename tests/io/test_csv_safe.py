"""No text from a building file reaches a spreadsheet as a formula (OWASP "CSV Injection":
prefix cells starting with = + - @ tab or carriage return with an apostrophe)."""

from __future__ import annotations

import csv
import dataclasses
import io
from pathlib import Path

import pytest

from petfall_audit.cli import main
from petfall_audit.demo import sample_building
from petfall_audit.io.building_file import save_building
from petfall_audit.io.csv_safe import safe_cell
from petfall_audit.io.plan_export import plan_to_csv
from petfall_audit.io.results_export import assessment_to_csv
from petfall_audit.plan import make_plan
from petfall_audit.report import export_results
from petfall_audit.risk import assess

HOSTILE = ["=HYPERLINK(\"http://example.invalid\")", "+1+cmd", "-2+3", "@SUM(A1)",
           "\tx=1", "\r=1"]


@pytest.mark.parametrize("text", HOSTILE)
def test_formula_starts_get_an_apostrophe(text: str) -> None:
    assert safe_cell(text) == "'" + text.replace("\r", "\n")


def test_a_carriage_return_never_starts_a_new_row_with_a_formula() -> None:
    """RFC 4180 §2: a field holding a line break must be quoted; the csv module quotes only the
    characters of its own line terminator, so a bare CR would end the row in a spreadsheet."""
    from petfall_audit.io.csv_safe import csv_writer

    buf = io.StringIO()
    csv_writer(buf).writerow(["a\r=1+1", "b"])
    rows = list(csv.reader(io.StringIO(buf.getvalue(), newline="")))
    assert rows == [["a\n=1+1", "b"]]
    assert "\r" not in buf.getvalue()


@pytest.mark.parametrize("value", [-0.5, 3, "-0.5", "+3", "1e-3", "-1.5E+3", "plain", "", "a=b"])
def test_numbers_and_ordinary_text_are_left_alone(value: object) -> None:
    assert safe_cell(value) == value


def _hostile_building() -> object:
    b = sample_building("walkup")
    ops = list(b.openings)
    ops[0] = dataclasses.replace(ops[0], id="=1+1")
    ops[1] = dataclasses.replace(ops[1], id="@cmd")
    return dataclasses.replace(b, openings=tuple(ops),
                               info=dataclasses.replace(b.info, name="-2+3 Court"))


def _cells(text: str) -> list[str]:
    lines = text.split("\n")
    while lines and lines[0].startswith("#"):
        lines.pop(0)
    rows = csv.reader(io.StringIO("\n".join(lines), newline=""))
    return [cell for row in rows for cell in row]


def _assert_safe(text: str) -> None:
    cells = _cells(text)
    assert cells, "the CSV has cells"
    for cell in cells:
        if cell[:1] in ("=", "+", "-", "@", "\t", "\r"):
            float(cell)  # only a plain number may start so (raises ValueError otherwise)
    assert "'=1+1" in cells and "'@cmd" in cells


def test_results_and_plan_csv_are_spreadsheet_safe(tmp_path: Path) -> None:
    a = assess(_hostile_building(), samples=64, seed=1)  # type: ignore[arg-type]
    _assert_safe(assessment_to_csv(a))
    plan = make_plan(a, 1e6)
    assert {act.opening_id for act in plan.actions} & {"=1+1", "@cmd"}
    _assert_safe(plan_to_csv(plan))
    written = export_results(a, plan, tmp_path / "r.csv", "csv")  # what the app's export calls
    for path in written:
        _assert_safe(path.read_text(encoding="utf-8"))


def test_command_line_csv_outputs_are_spreadsheet_safe(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    path = tmp_path / "=evil.json"
    save_building(_hostile_building(), path)  # type: ignore[arg-type]
    assert main(["assess", str(path), "--format", "csv", "--samples", "64"]) == 0
    _assert_safe(capsys.readouterr().out)
    assert main(["plan", str(path), "--format", "csv", "--samples", "64",
                 "--budget", "1000000"]) == 0
    _assert_safe(capsys.readouterr().out)
    assert main(["report", str(path), "-o", str(tmp_path / "out.csv"), "--samples", "64"]) == 0
    _assert_safe((tmp_path / "out.csv").read_text(encoding="utf-8"))
    out = tmp_path / "batch"
    assert main(["batch", str(path), "--out-dir", str(out), "--samples", "64"]) == 0
    summary = _cells((out / "summary.csv").read_text(encoding="utf-8"))
    assert "'-2+3 Court" in summary
    assert not any(c.startswith("=") for c in summary)
