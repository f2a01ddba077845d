"""The ``petfall-audit plan`` command and the plan exporters."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from petfall_audit._resources import resource_path, sample_path
from petfall_audit.cautions import CAUTIONS
from petfall_audit.cli import main
from petfall_audit.io.plan_export import CSV_COLUMNS

WALKUP = str(sample_path("walkup"))


def _run(capsys: pytest.CaptureFixture[str], *argv: str) -> tuple[int, str, str]:
    code = main(list(argv))
    out, err = capsys.readouterr()
    return code, out, err


def test_json_has_the_promised_fields_and_respects_the_budget(capsys) -> None:  # type: ignore[no-untyped-def]
    code, out, _ = _run(
        capsys,
        "plan",
        WALKUP,
        "--budget",
        "600",
        "--format",
        "json",
        "--samples",
        "200",
        "--seed",
        "2",
    )
    assert code == 0
    doc = json.loads(out)["plan"]
    for key in ("budget", "total_cost", "risk_before", "risk_after", "actions", "currency"):
        assert key in doc
    assert doc["budget"] == 600 and doc["total_cost"] <= 600
    assert doc["risk_after"] < doc["risk_before"]
    assert doc["actions"]
    for action in doc["actions"]:
        assert set(action) >= {
            "opening",
            "control",
            "cost",
            "risk_before",
            "risk_after",
            "conditions",
        }
        assert isinstance(action["conditions"], list)
        assert all(isinstance(c, str) for c in action["conditions"])
    assert doc["cautions"] == list(CAUTIONS)
    assert sum(a["cost"] for a in doc["actions"]) == pytest.approx(doc["total_cost"])


def test_table_and_csv_carry_the_cautions(capsys, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    code, out, _ = _run(capsys, "plan", WALKUP, "--budget", "300", "--samples", "200")
    assert code == 0
    assert "Fix plan: budget 300 EUR" in out
    assert "Cautions:" in out and "veterinarian" in out
    target = tmp_path / "plan.csv"
    code, out, _ = _run(
        capsys,
        "plan",
        WALKUP,
        "--budget",
        "300",
        "--samples",
        "200",
        "--format",
        "csv",
        "-o",
        str(target),
    )
    assert code == 0 and "wrote" in out
    text = target.read_text(encoding="utf-8")
    comments = [line for line in text.splitlines() if line.startswith("#")]
    assert len(comments) == len(CAUTIONS)
    rows = list(
        csv.DictReader(
            io.StringIO("\n".join(line for line in text.splitlines() if not line.startswith("#")))
        )
    )
    assert rows and tuple(rows[0]) == CSV_COLUMNS
    assert sum(float(r["cost"]) for r in rows) <= 300


def test_user_catalogue_changes_currency_and_choice(capsys, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    doc = json.loads(resource_path("controls.json").read_text(encoding="utf-8"))
    doc["currency"] = "GBP"
    doc["controls"] = [c for c in doc["controls"] if c["id"] == "tenant_guidance"]
    path = tmp_path / "controls.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    code, out, _ = _run(
        capsys,
        "plan",
        WALKUP,
        "--budget",
        "1000",
        "--format",
        "json",
        "--samples",
        "100",
        "--controls",
        str(path),
    )
    assert code == 0
    result = json.loads(out)["plan"]
    assert result["currency"] == "GBP"
    assert {a["control"] for a in result["actions"]} == {"tenant_guidance"}


def test_invalid_input_exits_2_with_a_located_message(capsys, tmp_path: Path) -> None:  # type: ignore[no-untyped-def]
    code, _, err = _run(capsys, "plan", WALKUP, "--budget", "-5")
    assert code == 2 and "--budget" in err
    doc = json.loads(resource_path("controls.json").read_text(encoding="utf-8"))
    doc["controls"][3]["cost"]["per_m_width"] = -1
    bad = tmp_path / "bad.json"
    bad.write_text(json.dumps(doc), encoding="utf-8")
    code, _, err = _run(
        capsys, "plan", WALKUP, "--budget", "10", "--samples", "50", "--controls", str(bad)
    )
    assert code == 2 and "controls[3].cost.per_m_width" in err
    code, _, err = _run(
        capsys, "plan", WALKUP, "--budget", "10", "--controls", str(tmp_path / "missing.json")
    )
    assert code == 2 and "missing.json" in err
    code, _, err = _run(capsys, "plan", str(tmp_path / "nope.json"), "--budget", "10")
    assert code == 2
    code, _, _ = _run(capsys, "plan", WALKUP)  # --budget is required
    assert code == 2


def test_table_fits_an_80_column_terminal(capsys) -> None:  # type: ignore[no-untyped-def]
    # The tower's plan has long control names and conditions; every line once ran past 200.
    code, out, _ = _run(capsys, "plan", str(sample_path("tower")), "--budget", "3000",
                        "--samples", "200")
    assert code == 0 and "Notes (the conditions of the fixes above):" in out
    assert max(len(line) for line in out.splitlines()) <= 80


def test_table_states_each_condition_once_and_rows_refer_to_it() -> None:
    # 42 actions once repeated the same two conditions under every row (~200 lines)
    from petfall_audit.io.building_file import load_building
    from petfall_audit.plan import make_plan
    from petfall_audit.present.tables import plan_to_table
    from petfall_audit.risk import assess

    plan = make_plan(assess(load_building(sample_path("walkup")), samples=200, seed=1), 3000.0)
    text = plan_to_table(plan)
    flat = " ".join(text.split())
    distinct: list[str] = []  # the reference: first-met order, written here
    for a in plan.actions:
        for c in a.conditions:
            if str(c) not in distinct:
                distinct.append(str(c))
    assert len(distinct) >= 2 and len(plan.actions) > len(distinct)
    for i, c in enumerate(distinct, start=1):
        assert flat.count(" ".join(c.split())) == 1, c
        assert f"{i}. {' '.join(c.split())}" in flat
    rows = {line.split()[0]: line for line in text.splitlines()
            if line and line.split()[0] in {a.opening_id for a in plan.actions}}
    for a in plan.actions:
        want = ",".join(str(distinct.index(str(c)) + 1)
                        for c in sorted(set(a.conditions), key=lambda c: distinct.index(str(c))))
        assert rows[a.opening_id].rstrip().endswith(want or "-"), a.opening_id


def test_plan_json_rounds_risks_like_the_results_json(tmp_path: Path) -> None:
    """Plan JSON carries model numbers to 4 significant digits, as the assess JSON does."""
    import json

    from petfall_audit._resources import sample_path

    out = tmp_path / "plan.json"
    assert main(["plan", str(sample_path("walkup")), "--budget", "800", "--samples", "200",
                 "--format", "json", "-o", str(out)]) == 0
    doc = json.loads(out.read_text(encoding="utf-8"))["plan"]
    numbers = [doc["risk_before"], doc["risk_after"]]
    numbers += [a[k] for a in doc["actions"] for k in ("risk_before", "risk_after")]
    assert numbers and all(float(f"{x:.4g}") == x for x in numbers)


@pytest.mark.parametrize("text, value", [("5000", 5000.0), ("250 000", 250000.0),
                                         ("250_000", 250000.0), ("1'500.5", 1500.5),
                                         ("1e4", 10000.0)])
def test_budget_amounts_are_read_as_written(text: str, value: float) -> None:
    from petfall_audit.cli import _build_parser

    args = _build_parser().parse_args(["plan", WALKUP, "--budget", text])
    assert args.budget == value


@pytest.mark.parametrize("text, words", [("5,000", "a comma separates thousands"),
                                         ("€500", "without its sign"),
                                         ("1e400", "not a finite amount"),
                                         ("nan", "not a finite amount")])
def test_a_budget_that_cannot_be_read_without_guessing_is_refused_in_words(
        capsys, text: str, words: str) -> None:  # type: ignore[no-untyped-def]
    code, _, err = _run(capsys, "plan", WALKUP, "--budget", text)
    assert code == 2 and words in " ".join(err.split())
    assert "invalid float value" not in err
