"""The public face keeps its types: a user's ``mypy --strict`` sees ``petfall_audit.assess`` and
the other public names with their real signatures (the package is marked ``py.typed``), so a
misuse is reported and a correct script passes.

mypy finds the package the way it finds any installed one (PEP 561): on the interpreter's
search path, read only because of its ``py.typed`` marker. That is the folder holding the
imported package: site-packages for a normal install, the checkout for a development one.
"""

from __future__ import annotations

import os
import textwrap
from pathlib import Path

import pytest

import petfall_audit

mypy_api = pytest.importorskip("mypy.api")

WRONG = textwrap.dedent("""\
    from petfall_audit import assess, load_building

    building = load_building("tower.json")
    result = assess("tower.json", samples=100)  # a path, not a building
    late = assess(building, 100)  # the options are keyword-only
    speeds: list[str] = result.openings  # not a list of text
""")

RIGHT = textwrap.dedent("""\
    import numpy as np

    from petfall_audit import Assessment, assess, impact_speed, load_building, make_plan

    building = load_building("tower.json")
    result: Assessment = assess(building, samples=100, seed=3)
    plan = make_plan(result, 5000.0)
    total: float = plan.total_cost
    speed = impact_speed(np.linspace(1.0, 30.0, 5), mass_kg=4.0, cda_tense_m2=0.02,
                         cda_spread_m2=0.05, relax_fraction=0.6, rho_kg_m3=1.2)
    print(total, speed)
""")


def test_the_package_is_marked_typed() -> None:
    package = Path(petfall_audit.__file__).parent
    assert (package / "py.typed").is_file()
    pyproject = Path(__file__).resolve().parents[1] / "pyproject.toml"
    if pyproject.is_file():  # a checkout: the marker is shipped in the wheel
        import tomllib

        data = tomllib.loads(pyproject.read_text())["tool"]["setuptools"]["package-data"]
        assert "py.typed" in data["petfall_audit"]


def test_mypy_strict_reports_a_misuse_of_assess_and_passes_a_correct_script(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    wrong, right = tmp_path / "wrong_use.py", tmp_path / "right_use.py"
    wrong.write_text(WRONG)
    right.write_text(RIGHT)
    site = Path(petfall_audit.__file__).resolve().parents[1]
    monkeypatch.setenv("PYTHONPATH", os.pathsep.join(
        [str(site), *filter(None, [os.environ.get("PYTHONPATH")])]))
    monkeypatch.delenv("MYPYPATH", raising=False)
    # mypy run in this process reads its search path from sys.path and drops its first entry
    # (the script's folder), so the package's folder must not stand first
    monkeypatch.syspath_prepend(str(site))
    monkeypatch.syspath_prepend(str(tmp_path))
    monkeypatch.chdir(tmp_path)  # no project config: the user's own strict run
    stdout, stderr, status = mypy_api.run([
        "--strict", "--no-incremental", "--cache-dir", str(tmp_path / "cache"),
        "--no-error-summary", "--hide-error-context", "--show-error-codes",
        str(wrong), str(right)])
    lines = [line for line in stdout.splitlines() if ": error:" in line]
    assert status == 1, stdout + stderr
    assert not any("right_use.py" in line for line in lines), stdout
    assert not any("import-untyped" in line or "import-not-found" in line for line in lines), (
        stdout)
    mine = [line.split(": error:", 1)[1] for line in lines if "wrong_use.py" in line]
    assert len(mine) == 3, stdout
    assert '"assess" has incompatible type "str"; expected "Building"' in mine[0], stdout
    assert "Too many positional arguments" in mine[1], stdout
    assert "list[str]" in mine[2], stdout
