"""Qt's notes stay off the terminal while the app runs; Qt's errors still reach it."""

from __future__ import annotations

import logging
import os
import subprocess
import sys
from pathlib import Path

import pytest
from PySide6.QtCore import qCritical, qWarning

from petfall_audit.gui.qt_messages import QT_LOGGER, qt_messages_routed

pytestmark = pytest.mark.gui


def test_a_qt_warning_goes_to_the_log_not_the_terminal(
    capfd: pytest.CaptureFixture[str], caplog: pytest.LogCaptureFixture
) -> None:
    caplog.set_level(logging.DEBUG, logger=QT_LOGGER.name)
    with qt_messages_routed():
        qWarning("this plugin cannot do that")
    out, err = capfd.readouterr()
    assert "cannot do that" not in out + err
    assert [r.levelno for r in caplog.records if "cannot do that" in r.getMessage()] == [
        logging.INFO
    ]


def test_a_qt_error_still_reaches_standard_error(capfd: pytest.CaptureFixture[str]) -> None:
    with qt_messages_routed():
        qCritical("the paint device is gone")
    _, err = capfd.readouterr()
    assert "Qt reported an error" in err and "the paint device is gone" in err


_APP_FOR_A_MOMENT = """
import sys
from PySide6.QtCore import QTimer
from PySide6.QtWidgets import QApplication
app = QApplication(sys.argv[:1])
QTimer.singleShot(1500, app.quit)
from petfall_audit.gui.app import run_app
sys.exit(run_app(None))
"""


def test_the_app_started_from_a_terminal_prints_nothing(tmp_path: Path) -> None:
    # offscreen, Qt's platform plugin notes every window's size hints on standard error
    env = {**os.environ, "QT_QPA_PLATFORM": "offscreen", "PETFALL_AUDIT_HOME": str(tmp_path)}
    done = subprocess.run([sys.executable, "-c", _APP_FOR_A_MOMENT], capture_output=True,
                          text=True, env=env, timeout=120, check=False)
    assert done.returncode == 0, done.stderr
    assert done.stdout == ""
    assert done.stderr == ""
