"""Text from user files made safe to show: cut to a readable length, and stripped of what a
terminal would obey. No Qt.

- :func:`cut` shortens a value quoted in a message (a 50 MB id is never echoed back whole).
- :func:`terminal_safe` shows control characters as visible escapes (``\\x1b``), so a building
  name holding an ANSI escape sequence cannot recolour, retitle or rewrite the user's terminal
  (ECMA-48 control functions start with ESC or a C1 control), nor can bidirectional overrides
  (Unicode Standard Annex #9) reorder what is printed. Tab and newline are kept.
"""

from __future__ import annotations

import re

__all__ = ["MAX_MESSAGE_CHARS", "MAX_QUOTE_CHARS", "cut", "terminal_safe"]

#: Longest message of a located problem (characters).
MAX_MESSAGE_CHARS = 500
#: Longest user value quoted inside a message (characters).
MAX_QUOTE_CHARS = 60

# C0 controls but tab and newline, DEL, C1 controls, and the bidirectional embeddings,
# overrides and isolates.
_UNSAFE = re.compile("[\\x00-\\x08\\x0b-\\x1f\\x7f-\\x9f\\u202a-\\u202e\\u2066-\\u2069]")


def cut(text: str, limit: int = MAX_QUOTE_CHARS) -> str:
    """``text`` if it has at most ``limit`` characters, else its start, an ellipsis and how
    long it was."""
    if len(text) <= limit:
        return text
    head = max(limit - 25, 10)
    return f"{text[:head]}… ({len(text):,} characters)"


def _escape(m: re.Match[str]) -> str:
    code = ord(m.group())
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def terminal_safe(text: str) -> str:
    """``text`` with every control character (but tab and newline) and bidirectional control
    shown as a visible escape such as ``\\x1b``; a carriage return before a newline is kept."""
    if not _UNSAFE.search(text):
        return text
    return _UNSAFE.sub(_escape, text.replace("\r\n", "\n"))
