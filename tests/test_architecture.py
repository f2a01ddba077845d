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


def _layers() -> list[list[str]]:
    import tomllib

    config = tomllib.loads((Path(__file__).resolve().parents[1] / "pyproject.toml").read_text())
    contract = next(c for c in config["tool"]["importlinter"]["contracts"]
                    if c["type"] == "layers")
    return [[m.strip() for m in layer.replace("|", ":").split(":")]
            for layer in contract["layers"]]


def test_every_module_has_its_place_in_the_layers() -> None:
    """A new module outside every layer would escape the one-way rule: each module of the
    package is a layer's module or inside one (the root and the io and present packages' own
    __init__, which only gather names, aside)."""
    listed = [m for layer in _layers() for m in layer]
    names = [info.name for info in pkgutil.walk_packages(petfall_audit.__path__,
                                                         prefix="petfall_audit.")
             if not info.name.startswith(("petfall_audit.resources",
                                          "petfall_audit.sample_buildings"))]
    assert "petfall_audit.risk" in names and "petfall_audit.gui.main_window" in names
    outside = [n for n in names if n not in ("petfall_audit.io", "petfall_audit.present")
               and not any(n == m or n.startswith(m + ".") for m in listed)]
    assert outside == [], f"modules in no layer of pyproject.toml: {outside}"


def test_the_layers_keep_the_documented_order() -> None:
    """The flow of issue 13: files and model at the bottom, then physics, risk, fixes, the
    presentation layer, and report / gui / cli on top."""
    where = {m: i for i, layer in enumerate(_layers()) for m in layer}  # 0 = top
    order = ["petfall_audit.model", "petfall_audit.io.building_file", "petfall_audit.physics",
             "petfall_audit.risk", "petfall_audit.fixes", "petfall_audit.present.labels",
             "petfall_audit.report", "petfall_audit.gui", "petfall_audit.cli"]
    depths = [where[m] for m in order]
    assert depths == sorted(depths, reverse=True)
    assert where["petfall_audit.report"] > where["petfall_audit.cli"]


def test_every_exception_is_drawn_in_the_tree_of_errors_py() -> None:
    """Each exception class the package raises on purpose (a PetfallError) appears in the tree
    drawn in errors.py's docstring, under its real base class."""
    import importlib
    import re

    from petfall_audit import errors

    for info in pkgutil.walk_packages(petfall_audit.__path__, prefix="petfall_audit."):
        if not info.name.startswith(("petfall_audit.gui", "petfall_audit.resources",
                                     "petfall_audit.sample_buildings")):
            importlib.import_module(info.name)

    def subclasses(cls: type) -> list[type]:
        return [c for sub in cls.__subclasses__() for c in (sub, *subclasses(sub))]

    found = subclasses(errors.PetfallError)
    assert found and any(c.__name__ == "EditRefused" for c in found)
    doc = errors.__doc__ or ""
    tree = [line for line in doc.splitlines() if re.search(r"[├└]── \w+", line)]
    drawn = {re.search(r"[├└]── (\w+)", line).group(1): line.index("──")  # type: ignore[union-attr]
             for line in tree}
    missing = sorted(c.__name__ for c in found if c.__name__ not in drawn)
    assert missing == [], f"exceptions missing from the tree in errors.py: {missing}"
    top = min(drawn.values())  # the column of PetfallError's own branches
    for cls in found:  # drawn one level below its base
        base = next(b for b in cls.__mro__[1:] if issubclass(b, errors.PetfallError))
        expected = top if base is errors.PetfallError else drawn[base.__name__] + 4
        assert drawn[cls.__name__] == expected, cls.__name__


def test_tests_mirror_the_package() -> None:
    """Each folder of tests/ is named after the package (or module) of petfall_audit it tests,
    and a package's tests live in its folder (no tests/test_gui_*.py beside tests/gui/)."""
    root = Path(__file__).resolve().parents[1]
    package = root / "petfall_audit"
    folders = [p for p in (root / "tests").iterdir()
               if p.is_dir() and p.name not in ("fixtures", "__pycache__")]
    assert folders, "tests are grouped by package"
    for folder in folders:
        assert (package / folder.name).is_dir() or (package / f"{folder.name}.py").is_file(), (
            f"tests/{folder.name}/ names no part of petfall_audit")
        stray = sorted(p.name for p in (root / "tests").glob(f"test_{folder.name}_*.py"))
        assert not stray, f"move {stray} into tests/{folder.name}/"
