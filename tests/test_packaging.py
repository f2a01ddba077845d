"""An installed copy (not the checkout) carries its resources and sample buildings."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.mark.slow
def test_installed_copy_finds_resources_and_samples(tmp_path: Path) -> None:
    source = tmp_path / "source"  # build from a copy: the build leaves files behind in its tree
    shutil.copytree(
        ROOT, source,
        ignore=shutil.ignore_patterns(".git", "build", "*.egg-info", "__pycache__", "tests"),
    )
    target = tmp_path / "site"
    subprocess.run(
        [sys.executable, "-m", "pip", "install", "--quiet", "--no-deps",
         "--no-compile", "--target", str(target), str(source)],
        check=True, capture_output=True, text=True, cwd=tmp_path,
    )
    code = (
        "import petfall_audit, pathlib\n"
        "from petfall_audit._resources import resource_path, sample_names\n"
        "assert 'site' in pathlib.Path(petfall_audit.__file__).parts, petfall_audit.__file__\n"
        "for name in ('building.schema.json', 'controls.json', 'controls.schema.json',\n"
        "             'palette.json', 'results.schema.json'):\n"
        "    assert resource_path(name).is_file(), resource_path(name)\n"
        "assert sample_names() == ['block', 'tower', 'walkup'], sample_names()\n"
        "from petfall_audit.code_profile import PROFILE_IDS, code_profile\n"
        "assert resource_path('code_profiles/code_profile.schema.json').is_file()\n"
        "assert all(code_profile(p).id == p for p in PROFILE_IDS)\n"
        "assert code_profile('england').cite('guard_height')\n"
        "from petfall_audit.present.tables import assessment_to_table\n"
        "from petfall_audit.demo import sample_building\n"
        "print(sample_building('walkup').info.name)\n"
    )
    env = {**os.environ, "PYTHONPATH": str(target)}
    out = subprocess.run([sys.executable, "-c", code], check=True, capture_output=True,
                         text=True, cwd=tmp_path, env=env)
    assert out.stdout.strip()
    # the installed copy is typed: a user's mypy --strict reads it (py.typed in the wheel)
    assert (target / "petfall_audit" / "py.typed").is_file()
    # a copy outside the checkout, so that nothing but the installed package is importable
    typing_test = tmp_path / "typing_check" / "test_public_typing.py"
    typing_test.parent.mkdir()
    shutil.copy(ROOT / "tests" / "test_public_typing.py", typing_test)
    run = subprocess.run(
        [sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", str(typing_test)],
        capture_output=True, text=True, cwd=tmp_path, env=env, timeout=600)
    assert run.returncode == 0, run.stdout[-3000:] + run.stderr[-2000:]
    assert "2 passed" in run.stdout


def test_reportlab_uses_its_compiled_accelerators() -> None:
    # the project asks for reportlab[accel]: without it reportlab falls back to pure-Python
    # number formatting and string widths, and the PDF audit of a tower takes ~25% longer
    from reportlab.lib import rl_accel

    assert type(rl_accel.fp_str).__name__ == "builtin_function_or_method"
    assert type(rl_accel.instanceStringWidthTTF).__name__ == "builtin_function_or_method"
