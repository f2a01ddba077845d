"""Fonts for the PDFs and safe markup of user text.

Reportlab's built-in Helvetica covers Latin-1 only, so a TrueType font that covers Latin, Greek
and Cyrillic (DejaVu Sans) is looked up in the usual font folders at run time and embedded. If it
is missing the report still builds with Helvetica and :attr:`FontSet.note` says that some
characters may not show. Chinese, Japanese and Korean runs in user text are set in a CJK font:
an installed TrueType fallback font if one is found, otherwise reportlab's standard CID fonts
(not embedded; the PDF viewer supplies the glyphs).
"""

from __future__ import annotations

import os
import re
import sys
from dataclasses import dataclass
from functools import lru_cache
from pathlib import Path
from xml.sax.saxutils import escape

from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.cidfonts import UnicodeCIDFont
from reportlab.pdfbase.ttfonts import TTFError, TTFont

__all__ = ["FontSet", "fonts", "markup", "plain"]

#: Environment variable naming an extra folder to search for fonts first.
FONT_DIR_ENV = "PETFALL_AUDIT_FONT_DIR"

_REGULAR = ("DejaVuSans.ttf",)
_BOLD = ("DejaVuSans-Bold.ttf",)
# TrueType CJK fonts reportlab can embed (CFF-based OpenType such as Noto CJK cannot be used).
_CJK_TTF = (("DroidSansFallbackFull.ttf", 0), ("DroidSansFallback.ttf", 0), ("wqy-microhei.ttc", 0),
            ("wqy-zenhei.ttc", 0))
# Standard CID fonts: Japanese (kana and kanji), simplified Chinese, Korean.
_CID_JA, _CID_ZH, _CID_KO = "HeiseiKakuGo-W5", "STSong-Light", "HYSMyeongJo-Medium"


def _font_dirs() -> list[Path]:
    dirs: list[Path] = []
    extra = os.environ.get(FONT_DIR_ENV)
    if extra:
        dirs.append(Path(extra))
    home = Path.home()
    dirs += [home / ".fonts", home / ".local" / "share" / "fonts"]
    if sys.platform == "darwin":
        dirs += [home / "Library" / "Fonts", Path("/Library/Fonts"), Path("/System/Library/Fonts")]
    elif sys.platform == "win32":
        windir = os.environ.get("WINDIR", "C:\\Windows")
        dirs.append(Path(windir) / "Fonts")
    else:
        dirs += [Path("/usr/share/fonts"), Path("/usr/local/share/fonts")]
    return [d for d in dirs if d.is_dir()]


def _find(names: tuple[str, ...]) -> Path | None:
    for folder in _font_dirs():
        for name in names:
            direct = folder / name
            if direct.is_file():
                return direct
        for name in names:
            for hit in folder.rglob(name):
                return hit
    return None


@dataclass(frozen=True, slots=True)
class FontSet:
    """Registered font names. ``note`` is empty when the full Unicode font was found."""

    regular: str
    bold: str
    cjk_ttf: str | None
    note: str


@lru_cache(maxsize=1)
def fonts() -> FontSet:
    """Register the report fonts once and return their names."""
    regular_path, bold_path = _find(_REGULAR), _find(_BOLD)
    regular, bold, note = "Helvetica", "Helvetica-Bold", ""
    try:
        if regular_path is None:
            raise TTFError("DejaVuSans.ttf not found")
        pdfmetrics.registerFont(TTFont("PetfallSans", str(regular_path)))
        regular = "PetfallSans"
        bold = regular
        if bold_path is not None:
            pdfmetrics.registerFont(TTFont("PetfallSans-Bold", str(bold_path)))
            bold = "PetfallSans-Bold"
        pdfmetrics.registerFontFamily(regular, normal=regular, bold=bold, italic=regular,
                                      boldItalic=bold)
    except TTFError:
        note = ("The DejaVu Sans font was not found on this computer, so the report uses "
                "Helvetica: letters outside Western European scripts may not show.")
    cjk_ttf = None
    for name, index in _CJK_TTF:
        path = _find((name,))
        if path is None:
            continue
        try:
            pdfmetrics.registerFont(TTFont("PetfallCJK", str(path), subfontIndex=index))
        except TTFError:
            continue
        cjk_ttf = "PetfallCJK"
        break
    if cjk_ttf is None:
        for cid in (_CID_JA, _CID_ZH, _CID_KO):
            pdfmetrics.registerFont(UnicodeCIDFont(cid))
    return FontSet(regular=regular, bold=bold, cjk_ttf=cjk_ttf, note=note)


# Han, kana, Hangul, CJK punctuation and full-width forms.
_CJK_RUN = re.compile(
    "[\u2e80-\u2fdf\u3000-\u303f\u3040-\u30ff\u3100-\u312f\u3130-\u318f\u31f0-\u31ff"
    "\u3400-\u4dbf\u4e00-\u9fff\uac00-\ud7af\uf900-\ufaff\uff00-\uffef\U00020000-\U0002fa1f]+"
)
_KANA = re.compile("[\u3040-\u30ff\u31f0-\u31ff]")
_HANGUL = re.compile("[\u3130-\u318f\uac00-\ud7af]")


def _cjk_font(run: str) -> str:
    f = fonts()
    if f.cjk_ttf:
        return f.cjk_ttf
    if _HANGUL.search(run):
        return _CID_KO
    if _KANA.search(run):
        return _CID_JA
    return _CID_ZH


def markup(text: str) -> str:
    """User text as literal Paragraph markup: escaped, CJK runs in a CJK font, newlines kept."""
    out: list[str] = []
    pos = 0
    for m in _CJK_RUN.finditer(text):
        out.append(escape(text[pos : m.start()]))
        out.append(f'<font name="{_cjk_font(m.group())}">{escape(m.group())}</font>')
        pos = m.end()
    out.append(escape(text[pos:]))
    return "".join(out).replace("\r\n", "\n").replace("\n", "<br/>")


def plain(text: str) -> str:
    """User text for canvas drawing (header and footer): one line, control characters removed."""
    return " ".join("".join(ch if ch.isprintable() else " " for ch in text).split())
