"""The photos of one opening in its form: thumbnails, "Add photos…", "Remove"; a double-click
shows a photo larger.

Photos are stored in the opening as paths relative to the building file's folder. A photo chosen
from elsewhere is copied into a ``photos/`` folder beside the building file first
(:func:`petfall_audit.io.photos.import_photo`), so an unsaved building is saved before photos
can be added. Adding and removing are undoable commands; removing a photo from an opening
leaves its file where it is. A photo whose file is missing shows a placeholder.
"""

from __future__ import annotations

from collections.abc import Sequence
from html import escape
from pathlib import Path
from typing import Any, Protocol

from PySide6.QtCore import QBuffer, QByteArray, QIODevice, QSize, Qt
from PySide6.QtGui import QColor, QIcon, QImageReader, QPainter, QPen, QPixmap
from PySide6.QtWidgets import (
    QAbstractItemView,
    QDialog,
    QDialogButtonBox,
    QHBoxLayout,
    QLabel,
    QListView,
    QListWidget,
    QListWidgetItem,
    QPushButton,
    QVBoxLayout,
    QWidget,
)

from petfall_audit.editing.commands import SetOpeningFields
from petfall_audit.editing.document import Document
from petfall_audit.editing.history import History
from petfall_audit.gui.adapters import push_command
from petfall_audit.gui.widgets.field_form import ERROR_STYLE, set_style
from petfall_audit.io.photos import (
    PHOTO_SUFFIXES,
    import_photo,
    photo_file,
    photo_name,
    read_regular_file,
)

__all__ = ["PhotoStrip", "PhotoDialog", "PhotoHost", "PHOTO_FILTER", "THUMB_SIZE",
           "load_photo", "placeholder_pixmap"]

#: File dialog filter: the photo files the app accepts.
PHOTO_FILTER = "Photos (" + " ".join(f"*{s} *{s.upper()}" for s in PHOTO_SUFFIXES) + ")"
#: Size of a thumbnail (px).
THUMB_SIZE = QSize(96, 72)
_GRID = QSize(THUMB_SIZE.width() + 12, THUMB_SIZE.height() + 28)
_MUTED = QColor("#6b6b6b")


class PhotoHost(Protocol):
    """What the strip needs from the window: its prompts and a way to save the building."""

    prompts: Any

    def save_as(self, path: Path | None = None) -> bool: ...


def load_photo(path: Path, box: QSize | None = None) -> QPixmap | None:
    """The image at ``path`` turned upright (as the camera recorded), scaled to fit ``box``
    (aspect kept; ``None``: full size); ``None`` if it is missing or cannot be read."""
    try:
        data = read_regular_file(path)  # never a pipe or device: no hang
    except OSError:
        return None
    buffer = QBuffer()
    buffer.setData(QByteArray(data))
    buffer.open(QIODevice.OpenModeFlag.ReadOnly)
    reader = QImageReader(buffer)
    reader.setAutoTransform(True)
    size = reader.size()
    if box is not None and size.isValid():
        reader.setScaledSize(size.scaled(box, Qt.AspectRatioMode.KeepAspectRatio))
    image = reader.read()
    return None if image.isNull() else QPixmap.fromImage(image)


_cache: dict[tuple[str, int, int], QPixmap] = {}


def _thumbnail(path: Path) -> QPixmap | None:
    """A thumbnail of ``path``, cached while the file is unchanged."""
    try:
        stat = path.stat()
    except OSError:
        return None
    key = (str(path), stat.st_mtime_ns, stat.st_size)
    if key not in _cache:
        pixmap = load_photo(path, THUMB_SIZE)
        if pixmap is None:
            return None
        if len(_cache) > 200:
            _cache.clear()
        _cache[key] = pixmap
    return _cache[key]


def placeholder_pixmap(text: str, size: QSize = THUMB_SIZE) -> QPixmap:
    """A grey frame with ``text`` in it, shown where a photo cannot be."""
    pixmap = QPixmap(size)
    pixmap.fill(QColor("#f2f2f2"))
    painter = QPainter(pixmap)
    pen = QPen(_MUTED)
    pen.setStyle(Qt.PenStyle.DashLine)
    painter.setPen(pen)
    painter.drawRect(0, 0, size.width() - 1, size.height() - 1)
    painter.drawText(pixmap.rect().adjusted(4, 4, -4, -4),
                     int(Qt.AlignmentFlag.AlignCenter) | int(Qt.TextFlag.TextWordWrap), text)
    painter.end()
    return pixmap


class PhotoDialog(QDialog):
    """One photo, larger, with its name (``caption``) below."""

    def __init__(self, path: Path, caption: str, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle(f"Photo: {caption}")
        self.image = QLabel()
        self.image.setObjectName("photo_image")
        self.image.setAlignment(Qt.AlignmentFlag.AlignCenter)
        screen = self.screen().availableGeometry().size() if self.screen() else QSize(1280, 800)
        box = QSize(min(1200, int(screen.width() * 0.8)), min(900, int(screen.height() * 0.75)))
        pixmap = load_photo(path, None)
        if pixmap is not None and (pixmap.width() > box.width() or pixmap.height() > box.height()):
            pixmap = pixmap.scaled(box, Qt.AspectRatioMode.KeepAspectRatio,
                                   Qt.TransformationMode.SmoothTransformation)
        self.image.setPixmap(pixmap if pixmap is not None else
                             placeholder_pixmap(f"cannot read {caption}", QSize(320, 200)))
        text = QLabel(f"{escape(caption)}<br><span style='color:#4d4d4d'>{escape(str(path))}"
                      "</span>")
        text.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        text.setWordWrap(True)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.image, 1)
        layout.addWidget(text)
        layout.addWidget(buttons)


class PhotoStrip(QWidget):
    """The photos of the opening set with :meth:`set_opening`, in ``doc``; edits go to
    ``history``. ``host`` (the main window) asks questions and saves the building when photos
    are added to one that was never saved."""

    def __init__(self, doc: Document, history: History, *, host: PhotoHost | None = None,
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setObjectName("photo_strip")
        self._doc = doc
        self._history = history
        self._host = host
        self._own_prompts: Any = None
        self._opening_id: str | None = None
        self._several = False
        self._shown: tuple[Any, ...] | None = None
        self._stored: tuple[str, ...] = ()

        self.list = QListWidget()
        self.list.setObjectName("photo_list")
        self.list.setViewMode(QListView.ViewMode.IconMode)
        self.list.setFlow(QListView.Flow.LeftToRight)
        self.list.setWrapping(False)
        self.list.setMovement(QListView.Movement.Static)
        self.list.setIconSize(THUMB_SIZE)
        self.list.setGridSize(_GRID)
        self.list.setTextElideMode(Qt.TextElideMode.ElideMiddle)
        self.list.setSelectionMode(QAbstractItemView.SelectionMode.ExtendedSelection)
        self.list.setHorizontalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAsNeeded)
        self.list.setVerticalScrollBarPolicy(Qt.ScrollBarPolicy.ScrollBarAlwaysOff)
        self.list.setFixedHeight(_GRID.height() + 22)  # one row and a scroll bar
        self.list.setToolTip("Double-click a photo to see it larger")
        self.add_button = QPushButton("Add photos…")
        self.add_button.setObjectName("add_photos")
        self.add_button.setToolTip("JPEG or PNG files; photos from elsewhere are copied into a "
                                   "'photos' folder beside the building file")
        self.remove_button = QPushButton("Remove")
        self.remove_button.setObjectName("remove_photos")
        self.remove_button.setToolTip("Remove the selected photos from this opening (the files "
                                      "are kept)")
        self.message = QLabel()
        self.message.setObjectName("photo_message")
        self.message.setWordWrap(True)

        buttons = QHBoxLayout()
        buttons.setContentsMargins(0, 0, 0, 0)
        buttons.addWidget(self.add_button)
        buttons.addWidget(self.remove_button)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(2)
        layout.addWidget(self.list)
        layout.addLayout(buttons)
        layout.addWidget(self.message)

        self.add_button.clicked.connect(self.add_photos)
        self.remove_button.clicked.connect(self.remove_selected)
        self.list.itemDoubleClicked.connect(lambda item: self.view(self.list.row(item)))
        self.list.itemSelectionChanged.connect(self._update_buttons)
        self._disconnect = doc.on_changed("path", lambda _kind: self.refresh())
        self.set_opening(None)

    def detach(self) -> None:
        self._disconnect()

    # --- what is shown ----------------------------------------------------------------------------

    @property
    def opening_id(self) -> str | None:
        return self._opening_id

    @property
    def stored(self) -> tuple[str, ...]:
        """The photo paths of the opening shown, as stored in the building."""
        return self._stored

    def root(self) -> Path | None:
        """The building file's folder (``None`` while the building has never been saved)."""
        return self._doc.path.parent if self._doc.path is not None else None

    def set_opening(self, opening_id: str | None, *, several: bool = False) -> None:
        """Show the photos of ``opening_id`` (``None``: no opening, or ``several`` selected)."""
        self._opening_id = opening_id
        self._several = several
        self.refresh()

    def refresh(self) -> None:
        """Show the current photos of the opening (thumbnails are reloaded only on a change)."""
        opening = None
        if self._opening_id is not None:
            opening = next((o for o in self._doc.building.openings
                            if o.id == self._opening_id), None)
        stored = opening.photos if opening is not None else ()
        root = self.root()
        files = tuple(photo_file(root, p) for p in stored)
        key = (self._opening_id if opening else None, stored, files,
               tuple(_stamp(f) for f in files))
        self._stored = stored
        if key != self._shown:
            self._shown = key
            self._fill(stored, files)
        if opening is None:
            self._say("Select one opening to see its photos" if not self._several else
                      "Photos: select one opening at a time")
        elif not stored:
            self._say("No photos yet: add JPEG or PNG files")
        else:
            missing = [photo_name(p) for p, f in zip(stored, files, strict=True)
                       if f is None or not f.is_file()]
            if missing and root is None:
                self._say("Save the building to see its photos (their paths are relative to "
                          "the building file)", error=True)
            elif missing:
                self._say(f"! photo not found: {', '.join(missing)} (expected beside the "
                          f"building file, in {root})", error=True)
            else:
                self._say(f"{len(stored)} photo{'s' if len(stored) != 1 else ''}; "
                          "double-click one to see it larger")
        self.add_button.setEnabled(opening is not None)
        self._update_buttons()

    def _fill(self, stored: Sequence[str], files: Sequence[Path | None]) -> None:
        self.list.clear()
        for rel, path in zip(stored, files, strict=True):
            name = photo_name(rel)
            pixmap = _thumbnail(path) if path is not None else None
            if pixmap is None:
                exists = path is not None and path.is_file()
                pixmap = placeholder_pixmap("cannot read this image" if exists else
                                            "photo not found")
                tip = (f"cannot read {rel} as an image" if exists else
                       f"photo not found: {rel}" + (f"\nexpected at {path}" if path else ""))
            else:
                tip = f"{rel}\n{path}"
            item = QListWidgetItem(QIcon(pixmap), name)
            item.setToolTip(tip)
            item.setData(Qt.ItemDataRole.UserRole, rel)
            self.list.addItem(item)

    def _say(self, text: str, *, error: bool = False) -> None:
        self.message.setText(text)
        set_style(self.message, ERROR_STYLE if error else "color: #4d4d4d;")

    def _update_buttons(self) -> None:
        self.remove_button.setEnabled(self._opening_id is not None
                                      and bool(self.list.selectedItems()))

    # --- edits ------------------------------------------------------------------------------------

    def _prompts(self) -> Any:
        if self._host is not None:
            return self._host.prompts
        if self._own_prompts is None:
            from petfall_audit.gui.dialogs import Prompts

            self._own_prompts = Prompts()
        return self._own_prompts

    def _folder_for_adding(self) -> Path | None:
        """The building file's folder; an unsaved building is saved first (if the user agrees)."""
        if self._doc.path is None:
            if self._host is None or not self._prompts().ask_save_for_photos(self):
                return None
            if not self._host.save_as() or self._doc.path is None:
                return None
        return self._doc.path.parent

    def add_photos(self) -> str | None:
        """Ask for photo files and add them; ``None`` or the reason nothing was added."""
        if self._opening_id is None:
            return "select one opening first"
        folder = self._folder_for_adding()
        if folder is None:
            return self._refuse("Photos are kept beside the building file: save the building "
                                "first")
        paths = self._prompts().choose_photos(self, folder)
        return self.add_files(paths) if paths else None

    def add_files(self, paths: Sequence[str | Path]) -> str | None:
        """Add the photo files ``paths`` to the opening shown, as one undoable edit; photos
        from outside the building file's folder are copied into its ``photos/`` folder.
        ``None``, or the reason some or all were not added."""
        opening_id = self._opening_id
        if opening_id is None:
            return "select one opening first"
        folder = self._folder_for_adding()
        if folder is None:
            return self._refuse("Photos are kept beside the building file: save the building "
                                "first")
        problems: list[str] = []
        added: list[str] = []
        for source in paths:
            try:
                rel = import_photo(source, folder)
            except (OSError, ValueError) as exc:
                problems.append(str(exc) if str(exc).startswith(Path(source).name)
                                else f"{Path(source).name}: {exc}")
                continue
            if rel not in self._stored and rel not in added:
                added.append(rel)
        if added:
            n = len(added)
            cmd = SetOpeningFields([opening_id], {"photos": (*self._stored, *added)},
                                   label=f"Add {n} photo{'s' if n != 1 else ''} to {opening_id}")
            reason = push_command(self._history, cmd)
            if reason is not None:
                problems.append(reason)
        elif not problems:
            problems.append("already in this opening's photos")
        if problems:
            return self._refuse("! Not added: " + "; ".join(problems))
        return None

    def remove_selected(self) -> str | None:
        """Remove the selected photos from the opening (their files stay)."""
        rows = sorted({self.list.row(item) for item in self.list.selectedItems()})
        return self.remove_rows(rows)

    def remove_rows(self, rows: Sequence[int]) -> str | None:
        """Remove the photos at ``rows`` from the opening as one undoable edit."""
        opening_id = self._opening_id
        drop = {r for r in rows if 0 <= r < len(self._stored)}
        if opening_id is None or not drop:
            return "select a photo first"
        keep = tuple(p for i, p in enumerate(self._stored) if i not in drop)
        n = len(drop)
        cmd = SetOpeningFields([opening_id], {"photos": keep},
                               label=f"Remove {n} photo{'s' if n != 1 else ''} from {opening_id}")
        reason = push_command(self._history, cmd)
        return self._refuse(f"! {reason}") if reason is not None else None

    def view(self, row: int) -> None:
        """Show the photo at ``row`` larger (or say that its file is missing)."""
        if not 0 <= row < len(self._stored):
            return
        rel = self._stored[row]
        path = photo_file(self.root(), rel)
        if path is None or not path.is_file():
            where = f" (expected at {path})" if path is not None else \
                " (save the building: photo paths are relative to its file)"
            self._prompts().show_error(self, "Photo not found", f"photo not found: {rel}{where}")
            return
        self._prompts().show_photo(self, path, photo_name(rel))

    def _refuse(self, message: str) -> str:
        self._say(message, error=True)
        return message


def _stamp(path: Path | None) -> tuple[int, int] | None:
    """Modification time and size of ``path``, ``None`` if it is missing."""
    if path is None:
        return None
    try:
        stat = path.stat()
    except OSError:
        return None
    return stat.st_mtime_ns, stat.st_size
