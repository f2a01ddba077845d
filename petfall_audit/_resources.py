"""Locate the files shipped beside the code: ``resources/`` and ``sample_buildings/``.

In a source checkout they sit at the repository root; in an installed package they are the
sub-packages ``petfall_audit.resources`` and ``petfall_audit.sample_buildings``.
"""

from __future__ import annotations

from pathlib import Path

__all__ = ["resource_path", "sample_path", "sample_names"]

_ROOT = Path(__file__).resolve().parent.parent


def _folder(name: str) -> Path:
    checkout = _ROOT / name
    if checkout.is_dir():
        return checkout
    return Path(__file__).resolve().parent / name  # installed: petfall_audit/<name>/


def resource_path(filename: str) -> Path:
    """Path of a file in ``resources/`` (schema, control catalogue, palette)."""
    return _folder("resources") / filename


def sample_path(name: str) -> Path:
    """Path of a sample building file by its stem, e.g. ``"tower"``."""
    return _folder("sample_buildings") / f"{name}.json"


def sample_names() -> list[str]:
    """Stems of every shipped sample building, sorted."""
    return sorted(p.stem for p in _folder("sample_buildings").glob("*.json"))
