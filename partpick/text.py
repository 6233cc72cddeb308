"""Text rules shared by every entry path (SPEC §5): what a text field may hold, and what a terminal may see.

- Text fields are NFC-normalised (`normalise_text`), so that "é" typed two
  ways is one part number.
- Refused in every text field (`text_problem`): C0 and C1 control characters
  (``notes`` may hold line breaks), the bidirectional controls U+202A–U+202E and
  U+2066–U+2069 (a right-to-left override reverses what a reader sees), and
  zero-width characters (U+200B–U+200D, U+2060, U+FEFF), which make two
  different strings look the same. Part numbers (``printable_only``) take
  printable characters only (`str.isprintable`: no separators but the space).
- Terminal output (`terminal_safe`) never carries a raw control character: an
  escape sequence stored in a damaged library cannot retitle the user's
  terminal; such characters are shown as ``\\x1b``-style escapes.

No Qt, no database: the checker, the store and the CLI all use it.
"""

from __future__ import annotations

import unicodedata

__all__ = ["BIDI_CONTROLS", "ZERO_WIDTH", "normalise_text", "text_problem", "terminal_safe"]

BIDI_CONTROLS = frozenset(chr(c) for c in (*range(0x202A, 0x202F), *range(0x2066, 0x206A)))
ZERO_WIDTH = frozenset("\u200b\u200c\u200d\u2060\ufeff")
_LINE_BREAKS = frozenset("\n\r")


def _is_control(char: str) -> bool:
    code = ord(char)
    return code < 0x20 or 0x7F <= code <= 0x9F


def normalise_text(text: str) -> str:
    """The NFC form of ``text`` (the one stored and compared)."""
    return unicodedata.normalize("NFC", text)


def _describe(char: str) -> str:
    name = unicodedata.name(char, "")
    code = f"U+{ord(char):04X}"
    return f"{code} {name}" if name else code


def text_problem(text: str, *, line_breaks: bool = False, printable_only: bool = False) -> str | None:
    """Why ``text`` may not be stored in a text field, or None when it may.

    Parameters
    ----------
    text : str
    line_breaks : bool
        Allow CR and LF (free-text notes).
    printable_only : bool
        Allow only printable characters (part numbers): no tab, no other separators.
    """
    for index, char in enumerate(text, start=1):
        if char in _LINE_BREAKS and line_breaks:
            continue
        if _is_control(char):
            return f"holds a control character ({_describe(char)}) at character {index}"
        if char in BIDI_CONTROLS:
            return f"holds a bidirectional control ({_describe(char)}) at character {index}"
        if char in ZERO_WIDTH:
            return f"holds a zero-width character ({_describe(char)}) at character {index}"
        if printable_only and not char.isprintable():
            return f"holds a character that is not printable ({_describe(char)}) at character {index}"
    return None


def terminal_safe(text: str, *, keep: str = "\n\t") -> str:
    """``text`` with every control, bidirectional control and zero-width character escaped.

    Characters in ``keep`` (by default line feed and tab) pass unchanged.
    """
    if text.isprintable() and not any(c in BIDI_CONTROLS or c in ZERO_WIDTH for c in text):
        return text
    out = []
    for char in text:
        if char in keep:
            out.append(char)
        elif _is_control(char) or char in BIDI_CONTROLS or char in ZERO_WIDTH:
            code = ord(char)
            out.append(f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}")
        else:
            out.append(char)
    return "".join(out)
