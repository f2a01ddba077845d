"""Page template: A4 with a header (building and date) and a footer (short caution and
"Page x of y"), drawn by a canvas that knows the page count once the story is laid out."""

from __future__ import annotations

import io
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any, BinaryIO

from reportlab.lib.pagesizes import A4, landscape
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import BaseDocTemplate, Flowable, Frame, PageTemplate, Paragraph

from petfall_audit.errors import ReportError
from petfall_audit.io.atomic import atomic_write_bytes
from petfall_audit.report.fonts import fonts
from petfall_audit.report.styles import MUTED, RULE

__all__ = ["AuditDocTemplate", "NumberedCanvas", "MARGIN", "build_pdf", "write_pdf_atomic"]

MARGIN = 16 * mm
HEADER_H = 10 * mm
FOOTER_H = 12 * mm


class NumberedCanvas(Canvas):  # type: ignore[misc]
    """Keeps every page until ``save`` so the footer can say "Page x of y"."""

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        super().__init__(*args, **kwargs)
        self._saved_pages: list[dict[str, Any]] = []

    def showPage(self) -> None:  # noqa: N802 (reportlab API)
        self._saved_pages.append(dict(self.__dict__))
        self._startPage()

    def save(self) -> None:
        total = len(self._saved_pages)
        for state in self._saved_pages:
            self.__dict__.update(state)
            self._draw_page_number(total)
            super().showPage()
        super().save()

    def _draw_page_number(self, total: int) -> None:
        width, _ = self._pagesize
        self.setFont(fonts().regular, 8)
        self.setFillColor(MUTED)
        self.drawRightString(width - MARGIN, MARGIN - 8 * mm, f"Page {self._pageNumber} of {total}")


class AuditDocTemplate(BaseDocTemplate):  # type: ignore[misc]
    """A4 portrait; ``header`` and ``footer`` are Paragraph markup (already escaped)."""

    def __init__(self, path: str | Path | BinaryIO, *, header: str, footer: str, title: str,
                 author: str = "", subject: str = "", first_page_header: bool = True,
                 **kw: Any) -> None:
        target = str(path) if isinstance(path, str | Path) else path
        super().__init__(target, pagesize=A4, leftMargin=MARGIN, rightMargin=MARGIN,
                         topMargin=MARGIN + HEADER_H, bottomMargin=MARGIN + FOOTER_H * 0.5,
                         title=title, author=author, subject=subject, creator="petfall_audit",
                         **kw)
        self._header = header
        self._footer = footer
        self._first_page_header = first_page_header
        f = fonts()
        self._hstyle = ParagraphStyle("Header", fontName=f.regular, fontSize=8, leading=10,
                                      textColor=MUTED)
        frame = Frame(self.leftMargin, self.bottomMargin, self.width, self.height, id="body",
                      leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)
        wide = landscape(A4)
        #: Frame width and height (pt) of the landscape pages used for wide tables.
        self.landscape_width = wide[0] - self.leftMargin - self.rightMargin
        self.landscape_height = wide[1] - self.topMargin - self.bottomMargin
        wide_frame = Frame(self.leftMargin, self.bottomMargin, self.landscape_width,
                           self.landscape_height, id="wide", leftPadding=0, rightPadding=0,
                           topPadding=0, bottomPadding=0)
        self.addPageTemplates([
            PageTemplate(id="page", frames=[frame], onPage=self._decorate, pagesize=A4),
            PageTemplate(id="landscape", frames=[wide_frame], onPage=self._decorate,
                         pagesize=wide),
        ])

    def _decorate(self, canvas: Canvas, doc: BaseDocTemplate) -> None:
        width, height = canvas._pagesize
        body_w = width - 2 * MARGIN
        canvas.saveState()
        canvas.setStrokeColor(RULE)
        canvas.setLineWidth(0.5)
        if self._first_page_header or canvas.getPageNumber() > 1:
            para = Paragraph(self._header, self._hstyle)
            _, h = para.wrap(body_w, HEADER_H)
            para.drawOn(canvas, MARGIN, height - MARGIN - h + 2 * mm)
            canvas.line(MARGIN, height - MARGIN - HEADER_H + 6 * mm, width - MARGIN,
                        height - MARGIN - HEADER_H + 6 * mm)
        canvas.line(MARGIN, MARGIN - 3 * mm, width - MARGIN, MARGIN - 3 * mm)
        foot = Paragraph(self._footer, self._hstyle)
        foot.wrap(body_w - 30 * mm, FOOTER_H)
        foot.drawOn(canvas, MARGIN, MARGIN - 3 * mm - foot.height - 1 * mm)
        canvas.restoreState()


def build_pdf(doc: AuditDocTemplate, story: Sequence[Flowable]) -> None:
    """Lay out ``story`` into ``doc`` with "page x of y" footers."""
    doc.build(list(story), canvasmaker=NumberedCanvas)


def write_pdf_atomic(path: str | Path, make_doc: Callable[[BinaryIO], AuditDocTemplate],
                     make_story: Callable[[AuditDocTemplate], Sequence[Flowable]]) -> Path:
    """Lay out a document in memory, then write it to ``path`` atomically (no half-written
    PDF if layout fails). Layout failures raise :class:`ReportError`."""
    buf = io.BytesIO()
    doc = make_doc(buf)
    try:
        build_pdf(doc, make_story(doc))
    except (ReportError, OSError):
        raise
    except Exception as exc:  # reportlab raises plain exceptions for layout failures
        raise ReportError(f"could not lay out {Path(path).name}: {exc}") from exc
    atomic_write_bytes(path, buf.getvalue())
    return Path(path)
