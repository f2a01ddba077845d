"""tools/screenshot.py renders the main window and every view of a building to PNGs, offscreen."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from PySide6.QtGui import QImage

from petfall_audit.gui.views import VIEW_NAMES

pytestmark = pytest.mark.gui

ROOT = Path(__file__).resolve().parents[2]


def test_screenshot_tool_writes_every_view(tmp_path: Path) -> None:
    building = ROOT / "sample_buildings" / "walkup.json"
    env = {**os.environ, "QT_QPA_PLATFORM": "offscreen"}
    out = subprocess.run(
        [sys.executable, str(ROOT / "tools" / "screenshot.py"), str(tmp_path), str(building),
         "--size", "1366x768"],
        capture_output=True, text=True, cwd=ROOT, env=env, timeout=120,
    )
    assert out.returncode == 0, out.stderr[-2000:]
    written = [Path(line) for line in out.stdout.splitlines() if line.endswith(".png")]
    names = {p.stem for p in written}
    assert "main-window" in names
    # one picture per view; the facade view once per facade of the walk-up (3 facades)
    assert sum(n.startswith("view-facade-") for n in names) == 3
    for view in VIEW_NAMES:
        if view != "Facade elevation":
            assert f"view-{view.lower().replace(' ', '-')}" in names
    for path in written:
        image = QImage(str(path))
        assert not image.isNull(), path
        assert (image.width(), image.height()) == (1366, 768), path
        # not a blank picture: many distinct colours
        colours = {image.pixel(x, y) for x in range(0, 1366, 37) for y in range(0, 768, 23)}
        assert len(colours) > 8, path
