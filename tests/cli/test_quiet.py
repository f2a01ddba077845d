"""No solver or library chatter on the terminal, and real errors still shown (petfall_audit.cli).

Each check runs the command line in a fresh Python process and reads its file descriptors 1
and 2, where compiled libraries print (Python-level capture would not see them).
"""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = ROOT / "sample_buildings"

# A MILP solve that prints on both descriptors as some solver builds do, then solves (or fails)
CHATTY = """
import os, sys
from pathlib import Path
import scipy.optimize as optimize

real = optimize.milp  # the planner takes milp from here when it solves
marker = Path(sys.argv[1])

class Failed:
    status, x, message = 4, None, "the model is infeasible"

def chatty(*args, **kwargs):
    marker.write_text("called")
    os.write(1, b"solver line on descriptor 1\\n")
    os.write(2, b"solver line on descriptor 2\\n")
    return Failed() if os.environ.get("FAIL_SOLVE") else real(*args, **kwargs)

optimize.milp = chatty
from petfall_audit.cli import main
raise SystemExit(main(sys.argv[2:]))
"""


def _run(args: list[str], *, script: str | None = None,
         env: dict[str, str] | None = None) -> subprocess.CompletedProcess[str]:
    import os

    command = [sys.executable, "-c", script, *args] if script else [
        sys.executable, "-m", "petfall_audit.cli", *args]
    return subprocess.run(command, capture_output=True, text=True, cwd=ROOT, timeout=300,
                          env={**os.environ, **(env or {})})


def test_solver_chatter_reaches_neither_stdout_nor_stderr(tmp_path: Path) -> None:
    marker = tmp_path / "called"
    out = _run([str(marker), "plan", str(SAMPLES / "tower.json"), "--budget", "3000",
                "--samples", "300", "--format", "json"], script=CHATTY)
    assert out.returncode == 0, out.stderr
    assert marker.exists(), "the budget must make the solver run"
    doc = json.loads(out.stdout)["plan"]  # nothing but the plan on standard output
    assert doc["total_cost"] <= 3000
    assert out.stderr == ""


def test_chatter_is_shown_when_the_command_fails(tmp_path: Path) -> None:
    marker = tmp_path / "called"
    out = _run([str(marker), "plan", str(SAMPLES / "tower.json"), "--budget", "3000",
                "--samples", "300", "--format", "json"], script=CHATTY,
               env={"FAIL_SOLVE": "1"})
    assert out.returncode == 2
    assert out.stdout == ""
    assert "the fix plan could not be solved: the model is infeasible" in out.stderr
    # what the solver said may explain the failure: it is not swallowed
    assert "solver line on descriptor 1" in out.stderr
    assert "solver line on descriptor 2" in out.stderr


def test_an_unexpected_error_keeps_its_traceback(tmp_path: Path) -> None:
    script = (
        "import os, sys\n"
        "import petfall_audit.cli as cli\n"
        "def boom(args):\n"
        "    os.write(1, b'library line\\n')\n"
        "    raise RuntimeError('something broke')\n"
        "cli._cmd_check = boom\n"
        "raise SystemExit(cli.main(sys.argv[1:]))\n"
    )
    out = _run(["check", str(SAMPLES / "walkup.json")], script=script)
    assert out.returncode == 1
    assert "RuntimeError: something broke" in out.stderr
    assert "library line" in out.stderr
    assert out.stdout == ""


@pytest.mark.parametrize("args", [
    ["check", "{walkup}"],
    ["assess", "{walkup}", "--format", "json", "--samples", "200"],
    ["assess", "{walkup}", "--format", "csv", "--samples", "200"],
    ["plan", "{tower}", "--budget", "2500", "--samples", "200", "--format", "csv"],
    ["report", "{walkup}", "-o", "{tmp}/audit.pdf", "--budget", "800", "--samples", "200",
     "--leaflet", "{tmp}/leaflet.pdf"],
    ["batch", "{walkup}", "{block}", "--out-dir", "{tmp}/batch", "--samples", "200",
     "--budget", "800"],
    ["template", "{tmp}/schedule.xlsx"],
])
def test_every_command_is_quiet_on_stderr(args: list[str], tmp_path: Path) -> None:
    names = {"walkup": SAMPLES / "walkup.json", "block": SAMPLES / "block.json",
             "tower": SAMPLES / "tower.json", "tmp": tmp_path}
    out = _run([a.format(**names) for a in args])
    assert out.returncode == 0, out.stderr
    assert out.stderr == ""
    assert out.stdout


def test_python_output_still_goes_to_the_real_streams() -> None:
    script = (
        "import os, sys\n"
        "from petfall_audit.cli import _library_chatter_held\n"
        "with _library_chatter_held() as held:\n"
        "    os.write(1, b'chatter\\n')\n"
        "    print('{\"result\": 1}')\n"
        "    print('a message', file=sys.stderr)\n"
        "    assert held.text() == 'chatter'\n"
        "print('after')\n"
    )
    out = subprocess.run([sys.executable, "-c", script], capture_output=True, text=True,
                         check=True, cwd=ROOT)
    assert out.stdout == '{"result": 1}\nafter\n'
    assert out.stderr == "a message\n"
