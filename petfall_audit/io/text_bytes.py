"""Which Unicode encoding a file's bytes announce with a byte-order mark. No Qt.

A building file is UTF-8; a schedule may be anything a spreadsheet writes. Both read a file that
starts with a byte-order mark in the encoding the mark names (Windows Notepad's "Unicode" is
UTF-16 with a mark): the mark is unambiguous, so nothing is guessed.
"""

from __future__ import annotations

import codecs

__all__ = ["bom_encoding", "decode_text"]

#: Byte-order marks and the codec that reads the text after them (longest marks first: the
#: UTF-32 little-endian mark begins with the UTF-16 one).
_BOMS: tuple[tuple[bytes, str], ...] = (
    (codecs.BOM_UTF32_LE, "utf-32"), (codecs.BOM_UTF32_BE, "utf-32"),
    (codecs.BOM_UTF8, "utf-8-sig"), (codecs.BOM_UTF16_LE, "utf-16"),
    (codecs.BOM_UTF16_BE, "utf-16"),
)


def bom_encoding(data: bytes) -> str | None:
    """The codec for ``data`` that starts with a byte-order mark (``"utf-8-sig"``,
    ``"utf-16"``, ``"utf-32"``: each drops the mark), or ``None`` when it has none."""
    return next((enc for bom, enc in _BOMS if data.startswith(bom)), None)


def decode_text(data: bytes) -> str:
    """The text of a file a person may have saved by hand (a building file, a control
    catalogue, a leaflet's text): in the encoding its byte-order mark names, else UTF-8, the
    mark dropped. ``UnicodeDecodeError`` when it is not such text."""
    return data.decode(bom_encoding(data) or "utf-8")
