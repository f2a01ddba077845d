"""A line of changing text (a state note over a table) that relays out the window only when
the height its text needs changes.

A label's new text asks its parents to lay themselves out again, all the way up the window; a
tab widget on the way repaints its whole page for it, although nothing moved. A note that
changes on every edit ("out of date", then "ranked") cost a repaint of the whole results page
while the results were being computed. :class:`SteadyLine` holds the label and passes the
request on only when the text needs another number of lines at the width it has.
"""

from __future__ import annotations

from PySide6.QtCore import QEvent, QSize
from PySide6.QtGui import QResizeEvent
from PySide6.QtWidgets import QLabel, QWidget

__all__ = ["SteadyLine"]


class SteadyLine(QWidget):
    """Holds ``label`` (which stays the object to set the text and style of) and sizes it to
    its whole area."""

    def __init__(self, label: QLabel, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.label = label
        label.setParent(self)
        self.setSizePolicy(label.sizePolicy())
        self._height = -1  # the height last asked of the layout (px)

    def _needed_height(self, width: int) -> int:
        if self.label.hasHeightForWidth():
            return self.label.heightForWidth(width)
        return self.label.sizeHint().height()

    def event(self, event: QEvent) -> bool:
        if event.type() == QEvent.Type.LayoutRequest:  # the label's text or font changed
            if self._needed_height(self.width()) != self._height:
                self.updateGeometry()
            return True
        return super().event(event)

    def resizeEvent(self, event: QResizeEvent) -> None:  # noqa: N802 (Qt's name)
        self.label.setGeometry(self.rect())
        self._height = self._needed_height(event.size().width())
        super().resizeEvent(event)

    def sizeHint(self) -> QSize:  # noqa: N802 (Qt's name)
        return self.label.sizeHint()

    def minimumSizeHint(self) -> QSize:  # noqa: N802 (Qt's name)
        return self.label.minimumSizeHint()

    def hasHeightForWidth(self) -> bool:  # noqa: N802 (Qt's name)
        return self.label.hasHeightForWidth()

    def heightForWidth(self, width: int) -> int:  # noqa: N802 (Qt's name)
        return self.label.heightForWidth(width)
