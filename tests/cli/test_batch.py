"""``petfall-audit batch``: many buildings in one run, one result file each and a summary."""

from __future__ import annotations

import csv
import json
from pathlib import Path
from typing import Any

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
        # (in the results envelope, with the building's own plan beside it)
        written = json.loads((tmp_path / f"{name}.json").read_text(encoding="utf-8"))
        expected = assessment_to_dict(assess(building, samples=300, seed=1))
        assert written["results"]["openings"] == expected["openings"]
        assert written["contents"] == ["results", "plan"]
        assert written["plan"]["total_cost"] == pytest.approx(float(row["plan_cost"]), abs=0.5)


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


def _result_files(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())}


def test_parallel_jobs_write_the_same_files_and_skip_a_failing_building(
    tmp_path: Path, capsys: pytest.CaptureFixture[str]
) -> None:
    broken = tmp_path / "broken.json"
    broken.write_text('{"format": "petfall-audit-building", "version": 1}', encoding="utf-8")
    files = [str(sample_path("walkup")), str(broken), str(sample_path("block")),
             str(sample_path("tower"))]
    outputs = {}
    for jobs in ("1", "2"):
        out = tmp_path / f"jobs{jobs}"
        code = main(["batch", *files, "--out-dir", str(out), "--samples", "200",
                     "--budget", "1500", "--jobs", jobs])
        assert code == 2  # one building could not be assessed
        err = capsys.readouterr().err
        assert "broken.json" in err
        outputs[jobs] = _result_files(out)
    assert outputs["1"] == outputs["2"]
    assert sorted(outputs["1"]) == ["block.json", "summary.csv", "tower.json", "walkup.json"]
    # no temporary file is left behind
    assert not any(name.startswith(".") for name in outputs["2"])


def test_jobs_must_be_at_least_one(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["batch", str(sample_path("walkup")), "--out-dir", str(tmp_path),
                 "--jobs", "0"]) == 2
    assert "--jobs must be at least 1" in capsys.readouterr().err


def test_a_building_that_fails_while_assessed_is_reported_and_skipped(
    tmp_path: Path, capsys: pytest.CaptureFixture[str], monkeypatch: pytest.MonkeyPatch
) -> None:
    import petfall_audit.reassess as reassess

    real = reassess.assess_deduplicated

    def failing(building, **kw):  # type: ignore[no-untyped-def]
        if building.info.name == sample_building("block").info.name:
            raise ValueError("the simulation broke")
        return real(building, **kw)

    monkeypatch.setattr(reassess, "assess_deduplicated", failing)
    out = tmp_path / "out"
    code = main(["batch", str(sample_path("block")), str(sample_path("walkup")),
                 "--out-dir", str(out), "--samples", "100", "--jobs", "1"])
    assert code == 2
    assert "block.json: could not be assessed: the simulation broke" in capsys.readouterr().err
    assert [Path(r["file"]).stem for r in _summary(out)] == ["walkup"]
    assert sorted(p.name for p in out.iterdir()) == ["summary.csv", "walkup.json"]


def test_default_jobs_follow_the_cores_but_fit_in_memory(monkeypatch: pytest.MonkeyPatch) -> None:
    import os

    import petfall_audit.batch as batch

    monkeypatch.setattr(os, "sched_getaffinity", lambda pid: set(range(64)), raising=False)
    pages = {"SC_PAGE_SIZE": 4096, "SC_PHYS_PAGES": 4_000_000_000 // 4096}
    monkeypatch.setattr(os, "sysconf", lambda name: pages[name])
    assert batch.default_jobs() == 4_000_000_000 // batch.WORKER_MEMORY_BYTES  # 2, not 64
    pages["SC_PHYS_PAGES"] = 10**15 // 4096
    assert batch.default_jobs() == 64
    pages["SC_PHYS_PAGES"] = 1
    assert batch.default_jobs() == 1


def test_the_batch_parent_starts_its_workers_before_it_imports_numpy(tmp_path: Path) -> None:
    # each worker imports numpy (and pydantic, reportlab) itself; the parent importing it first
    # would only delay the workers' start (about 50 ms of every --jobs run)
    import subprocess
    import sys

    script = (
        "import sys\n"
        "import petfall_audit.batch as batch\n"
        "real = batch._run_parallel\n"
        "def spy(*args, **kwargs):\n"
        "    print('numpy before workers:', 'numpy' in sys.modules, file=sys.stderr)\n"
        "    return real(*args, **kwargs)\n"
        "batch._run_parallel = spy\n"
        "from petfall_audit.cli import main\n"
        "raise SystemExit(main(sys.argv[1:]))\n"
    )
    files = [str(sample_path("walkup")), str(sample_path("block"))]
    out = subprocess.run(
        [sys.executable, "-c", script, "batch", *files, "--out-dir", str(tmp_path / "out"),
         "--format", "json", "--samples", "64", "--jobs", "2"],
        capture_output=True, text=True, timeout=300)
    assert out.returncode == 0, out.stderr
    assert "numpy before workers: False" in out.stderr
    assert len(list((tmp_path / "out").glob("*.json"))) == 2


def test_batch_workers_run_with_the_commands_collector_settings(
        monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    # a worker is a fresh interpreter: without these its first building paid tens of
    # milliseconds of young collections over the libraries' start-up, and its exit one more
    # full collection, which the parent process avoids
    from concurrent.futures import ProcessPoolExecutor

    import petfall_audit.batch as batch
    from petfall_audit._collector import set_up_worker

    seen: list[object] = []

    class Spy(ProcessPoolExecutor):
        def __init__(self, *args: Any, **kwargs: Any) -> None:
            seen.append(kwargs.get("initializer"))
            super().__init__(*args, **kwargs)

    monkeypatch.setattr(batch, "ProcessPoolExecutor", Spy)
    files = [str(sample_path("walkup")), str(sample_path("block"))]
    assert main(["batch", *files, "--out-dir", str(tmp_path / "out"), "--format", "json",
                 "--samples", "64", "--jobs", "2"]) == 0
    assert seen == [set_up_worker]
    assert len(list((tmp_path / "out").glob("*.json"))) == 2
