"""``petfall-audit batch``: many buildings in one run, one result file each and a summary."""

from __future__ import annotations

import csv
import json
from pathlib import Path

import pytest

from petfall_audit._resources import sample_path
from petfall_audit.cli import main
from petfall_audit.demo import sample_building
from petfall_audit.io.results_export import assessment_to_dict
from petfall_audit.risk import assess


def _summary(folder: Path) -> list[dict[str, str]]:
    lines = (folder / "summary.csv").read_text(encoding="utf-8").splitlines()
    assert lines[0].startswith("# "), "the summary starts with the cautions"
    return list(csv.DictReader(lines[1:]))


def test_batch_writes_one_result_per_building_and_a_summary(tmp_path: Path) -> None:
    files = [str(sample_path("walkup")), str(sample_path("block"))]
    code = main(["batch", *files, "--out-dir", str(tmp_path), "--samples", "300",
                 "--budget", "2000"])
    assert code == 0
    rows = _summary(tmp_path)
    assert [Path(r["file"]).stem for r in rows] == ["walkup", "block"]
    for row, name in zip(rows, ("walkup", "block"), strict=True):
        building = sample_building(name)
        assert int(row["openings"]) == len(building.openings)
        counts = sum(int(v) for k, v in row.items() if k.startswith("expected_"))
        assert counts == len(building.openings)
        assert float(row["plan_cost"]) <= 2000
        # The per-building file is the same document `assess --format json` writes (same seed).
        written = json.loads((tmp_path / f"{name}.json").read_text(encoding="utf-8"))
        expected = assessment_to_dict(assess(building, samples=300, seed=1))
        assert written["openings"] == expected["openings"]


def test_batch_skips_a_broken_file_and_exits_2(tmp_path: Path,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    broken = tmp_path / "broken.json"
    broken.write_text('{"format": "petfall-audit-building", "version": 1}', encoding="utf-8")
    out = tmp_path / "out"
    code = main(["batch", str(broken), str(sample_path("walkup")), "--out-dir", str(out),
                 "--samples", "200", "--format", "csv"])
    assert code == 2
    assert "broken.json" in capsys.readouterr().err
    rows = _summary(out)
    assert [Path(r["file"]).stem for r in rows] == ["walkup"]
    assert (out / "walkup.csv").exists() and not (out / "broken.csv").exists()


def test_batch_never_overwrites_results_of_files_with_the_same_name(tmp_path: Path) -> None:
    a, b = tmp_path / "a", tmp_path / "b"
    a.mkdir()
    b.mkdir()
    (a / "summary.json").write_bytes(sample_path("walkup").read_bytes())
    (b / "summary.json").write_bytes(sample_path("block").read_bytes())
    out = tmp_path / "out"
    assert main(["batch", str(a / "summary.json"), str(b / "summary.json"),
                 "--out-dir", str(out), "--samples", "100", "--format", "csv"]) == 0
    rows = _summary(out)  # the summary itself is not overwritten by a building's result
    assert [r["result_file"] for r in rows] == ["summary-2.csv", "summary-3.csv"]
    assert [r["building"] for r in rows] == [sample_building("walkup").info.name,
                                             sample_building("block").info.name]
    for row in rows:
        assert (out / row["result_file"]).read_text("utf-8").startswith("# ")


def test_batch_out_dir_that_is_a_file_is_refused(tmp_path: Path,
                                                  capsys: pytest.CaptureFixture[str]) -> None:
    file = tmp_path / "results"
    file.write_text("x", "utf-8")
    assert main(["batch", str(sample_path("walkup")), "--out-dir", str(file)]) == 2
    assert "not a folder" in capsys.readouterr().err
