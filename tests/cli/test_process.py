"""The ``petfall-audit`` program as a process: exit codes, written output, and the garbage
collector's settings while a command runs (petfall_audit.cli.run and main)."""

from __future__ import annotations

import gc
import json
import os
import subprocess
import sys
from pathlib import Path

import pytest

from petfall_audit import cli
from petfall_audit._collector import COMMAND_GC_THRESHOLDS

ROOT = Path(__file__).resolve().parents[2]
WALKUP = ROOT / "sample_buildings" / "walkup.json"


def _program(*args: str) -> subprocess.CompletedProcess[str]:
    code = "import sys; from petfall_audit.cli import run; sys.argv[1:] = sys.argv[2:]; run()"
    return subprocess.run([sys.executable, "-c", code, "--", *args], capture_output=True,
                          text=True, cwd=ROOT, timeout=300)


def test_the_program_exits_with_the_command_code_and_writes_its_output(tmp_path: Path) -> None:
    out = tmp_path / "results.json"
    done = _program("assess", str(WALKUP), "--format", "json", "--samples", "64", "-o", str(out))
    assert done.returncode == 0, done.stderr
    doc = json.loads(out.read_text(encoding="utf-8"))
    assert len(doc["results"]["openings"]) == 50  # the walk-up's openings, all written
    assert _program("check", str(tmp_path / "missing.json")).returncode == 2
    assert _program("assess", str(WALKUP), "--samples", "0").returncode == 2


def test_the_collector_runs_rarely_during_a_command_and_as_before_after(
        monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    seen: list[tuple[tuple[int, int, int], bool]] = []
    real = cli._cmd_check

    def spy(args: object) -> int:
        seen.append((gc.get_threshold(), gc.isenabled()))
        return real(args)  # type: ignore[arg-type]

    monkeypatch.setattr(cli, "_cmd_check", spy)
    before = gc.get_threshold()
    assert cli.main(["check", str(WALKUP)]) == 0
    assert seen == [(COMMAND_GC_THRESHOLDS, True)]  # rarely, but still on
    assert gc.get_threshold() == before
    seen.clear()
    assert cli.main(["check", str(tmp_path / "missing.json")]) == 2  # a failing command too
    assert seen and gc.get_threshold() == before


def test_a_worker_process_collects_rarely_and_freezes_its_survivors_at_exit() -> None:
    # atexit runs its handlers last registered first: the check below runs after the freeze
    code = (
        "import atexit, gc\n"
        "atexit.register(lambda: print('frozen at exit:', gc.get_freeze_count() > 0))\n"
        "from petfall_audit._collector import set_up_worker\n"
        "set_up_worker()\n"
        "print('thresholds:', gc.get_threshold())\n"
    )
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          cwd=ROOT, timeout=120)
    assert done.returncode == 0, done.stderr
    assert f"thresholds: {COMMAND_GC_THRESHOLDS}" in done.stdout
    assert "frozen at exit: True" in done.stdout


def test_output_piped_to_a_reader_that_has_gone_ends_quietly(tmp_path: Path) -> None:
    # `petfall-audit assess FILE | head -1`: the reader closes the pipe early. A pipe whose
    # read end is closed before the program starts fails every write (EPIPE) deterministically.
    read_end, write_end = os.pipe()
    os.close(read_end)
    code = "import sys; from petfall_audit.cli import run; sys.argv[1:] = sys.argv[2:]; run()"
    try:
        done = subprocess.run(
            [sys.executable, "-c", code, "--", "assess", str(WALKUP), "--samples", "64"],
            stdout=write_end, stderr=subprocess.PIPE, text=True, cwd=ROOT, timeout=300)
    finally:
        os.close(write_end)
    assert done.returncode == 1
    assert "Traceback" not in done.stderr and "Exception ignored" not in done.stderr
    assert "Broken pipe" not in done.stderr, done.stderr
