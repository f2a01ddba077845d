"""Qt's own diagnostic messages while the app runs: kept off the terminal unless they are errors.

Qt writes notes of its platform plugin, fonts and window system on standard error (for instance
"This plugin does not support propagateSizeHints()"): chatter to someone who started the app
from a terminal. While :func:`qt_messages_routed` is active, Qt's debug, info and warning
messages go to the Python logger ``petfall_audit.gui.qt`` (debug and info at DEBUG, warnings at
INFO: silent unless a caller configures logging), and its critical and fatal messages still
reach standard error, so a real error is never swallowed.
"""

from __future__ import annotations

import logging
import sys
from collections.abc import Iterator
from contextlib import contextmanager

from PySide6.QtCore import QMessageLogContext, QtMsgType, qInstallMessageHandler

__all__ = ["QT_LOGGER", "qt_messages_routed", "route_qt_message"]

#: Where Qt's debug, info and warning messages go.
QT_LOGGER = logging.getLogger("petfall_audit.gui.qt")

_LOG_LEVEL = {
    QtMsgType.QtDebugMsg: logging.DEBUG,
    QtMsgType.QtInfoMsg: logging.DEBUG,
    QtMsgType.QtWarningMsg: logging.INFO,
}


def route_qt_message(mode: QtMsgType, context: QMessageLogContext | None, message: str) -> None:
    """Qt's message handler: to :data:`QT_LOGGER`, or on standard error when it is an error."""
    level = _LOG_LEVEL.get(mode)
    category = getattr(context, "category", None) or "default"
    if level is not None:
        QT_LOGGER.log(level, "%s: %s", category, message)
        return
    stream = sys.stderr
    if stream is not None:
        stream.write(f"petfall-audit: Qt reported an error ({category}): {message}\n")
        stream.flush()


@contextmanager
def qt_messages_routed() -> Iterator[None]:
    """Within this block Qt's messages go through :func:`route_qt_message`; the handler that
    was there before is put back after."""
    previous = qInstallMessageHandler(route_qt_message)
    try:
        yield
    finally:
        qInstallMessageHandler(previous)
