"""The Qt boundary: nothing outside ``petfall_audit.gui`` imports Qt, so the core runs and is
tested without a screen; and the package is laid out so that an install carries all of it."""

from __future__ import annotations

import pkgutil
import subprocess
import sys
from pathlib import Path

import petfall_audit

QT_MODULES = ("PySide6", "pyqtgraph", "shiboken6")


def _core_modules() -> list[str]:
    names = []
    for info in pkgutil.walk_packages(petfall_audit.__path__, prefix="petfall_audit."):
        if info.name.startswith("petfall_audit.gui"):
            continue
        if info.name.startswith(("petfall_audit.resources", "petfall_audit.sample_buildings")):
            continue
        names.append(info.name)
    return names


def test_core_modules_do_not_import_qt() -> None:
    modules = _core_modules()
    assert "petfall_audit.model" in modules
    code = (
        "import importlib, sys\n"
        f"for name in {modules!r}:\n"
        "    importlib.import_module(name)\n"
        f"bad = sorted(m for m in sys.modules if m.split('.')[0] in {QT_MODULES!r})\n"
        "print(','.join(bad))\n"
    )
    out = subprocess.run(
        [sys.executable, "-c", code],
        capture_output=True,
        text=True,
        check=True,
        cwd=Path(__file__).resolve().parents[1],
    )
    assert out.stdout.strip() == "", f"Qt imported outside gui/: {out.stdout.strip()}"


_LINT = "from importlinter.cli import lint_imports_command; lint_imports_command()"


def test_import_linter_contract_holds() -> None:
    """The same rule as an import-linter contract (pyproject.toml), which also sees lazy imports."""
    root = Path(__file__).resolve().parents[1]
    out = subprocess.run(
        [sys.executable, "-c", _LINT],
        capture_output=True,
        text=True,
        cwd=root,
    )
    assert out.returncode == 0, out.stdout + out.stderr


def test_public_api_resolves() -> None:
    """Every name in ``__all__`` exists (the lazy ones are imported on first access)."""
    for name in petfall_audit.__all__:
        assert getattr(petfall_audit, name) is not None, name


def test_every_subpackage_is_packaged() -> None:
    """pyproject lists the packages explicitly (resources/ and sample_buildings/ are mapped in
    from the repository root), so a new sub-package must be added there or it would be missing
    from an installed copy."""
    import tomllib

    root = Path(__file__).resolve().parents[1]
    config = tomllib.loads((root / "pyproject.toml").read_text(encoding="utf-8"))
    listed = set(config["tool"]["setuptools"]["packages"])
    found = {
        ".".join(p.parent.relative_to(root).parts)
        for p in (root / "petfall_audit").rglob("__init__.py")
    }
    assert found <= listed, f"add to [tool.setuptools] packages: {sorted(found - listed)}"
