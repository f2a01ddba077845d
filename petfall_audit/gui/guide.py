"""Help ▸ How to audit a building: the workflow in five steps, inside the app."""

from __future__ import annotations

import html

from PySide6.QtWidgets import QDialog, QDialogButtonBox, QTextBrowser, QVBoxLayout, QWidget

from petfall_audit.cautions import CAUTIONS_SHORT

__all__ = ["GUIDE_STEPS", "GuideDialog", "guide_html"]

#: The five steps of an audit (title, what to do), in the words of the window's tabs and menus.
GUIDE_STEPS: tuple[tuple[str, str], ...] = (
    ("Describe the building and its cats",
     "On the Building and cats tab, type the building's name and address and choose the "
     "population of cats at risk (adults, kittens or heavy adults)."),
    ("Enter the floors",
     "On the Floors tab, add one row per storey with its height above the ground (several "
     "at once with Add floors on top; paste rows from a spreadsheet with Ctrl+V)."),
    ("Say what lies below each facade",
     "On the Facades and surfaces below tab, give each facade its length and the surfaces a "
     "cat would land on: paving, grass, a podium roof, a canopy."),
    ("Enter the balconies and windows",
     "On the Openings tab, add each balcony and window with its guard height, gaps and any "
     "net or opening limiter; mark emergency escape windows. Edit ▸ Copy a typical floor "
     "(Ctrl+D) repeats a floor, File ▸ Import reads a window and balcony schedule."),
    ("Read the results, plan the fixes, export",
     "The result views below rank the openings worst first and show each facade, floor and "
     "fall. On the Fix plan tab, set the budget: the plan picks the fixes that remove the "
     "most risk. File ▸ Export writes the PDF audit and the tenant leaflet; File ▸ Save "
     "(Ctrl+S) keeps the audit."),
)


def guide_html() -> str:
    """The five steps and the short cautions as simple HTML."""
    steps = "".join(f"<li><b>{html.escape(title)}.</b> {html.escape(text)}</li>"
                    for title, text in GUIDE_STEPS)
    return (f"<h2>How to audit a building</h2><ol>{steps}</ol>"
            f"<p><b>Caution:</b> {html.escape(CAUTIONS_SHORT)}</p>")


class GuideDialog(QDialog):
    """The guide in a window of its own, beside the main window (not modal)."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("guide_dialog")
        self.setWindowTitle("How to audit a building")
        self.text = QTextBrowser()
        self.text.setObjectName("guide_text")
        self.text.setHtml(guide_html())
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.close)
        layout = QVBoxLayout(self)
        layout.addWidget(self.text, 1)
        layout.addWidget(buttons)
        self.resize(560, 440)
