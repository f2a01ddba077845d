"""Shared fixtures. Qt runs offscreen; settings and autosave go to a temporary folder."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")


@pytest.fixture(autouse=True)
def _isolated_settings(
    tmp_path_factory: pytest.TempPathFactory, monkeypatch: pytest.MonkeyPatch
) -> Path:
    """Point the app's settings and autosave folder at a fresh temporary folder."""
    folder = tmp_path_factory.mktemp("petfall-home")
    monkeypatch.setenv("PETFALL_AUDIT_HOME", str(folder))
    return folder
