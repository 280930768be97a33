"""Text from a schematic made safe to show: control characters and bidi marks escaped.

A schematic written by someone else can carry terminal control sequences (ESC, BEL, CR,
BS, the C1 controls including CSI) and bidirectional marks (U+202E …) in any field or
name. Printed raw they could recolour a terminal, rewrite a line already shown or make
text read backwards. Every console report and error passes through :func:`for_terminal`;
every JSON document through :func:`json_text`, which also escapes C1 and bidi characters
(``json.dumps`` escapes only C0 controls).
"""

from __future__ import annotations

import functools
import re
import unicodedata
from collections.abc import Callable
from typing import Any

from .json_writer import write_json

__all__ = ["UNSAFE_CATEGORIES", "for_terminal", "is_unsafe", "json_text", "write_json_safely"]

# Unicode general categories never shown raw: controls (C0, DEL, C1), format characters
# (bidi marks and isolates, zero-width characters, the BOM), lone surrogates, and the line
# and paragraph separators.
UNSAFE_CATEGORIES = frozenset({"Cc", "Cf", "Cs", "Zl", "Zp"})
_NOT_PLAIN = re.compile(r"[^\x20-\x7e]")


def is_unsafe(ch: str) -> bool:
    """True for a character that must be escaped before it reaches a terminal."""
    return unicodedata.category(ch) in UNSAFE_CATEGORIES


def _escape(ch: str) -> str:
    cp = ord(ch)
    if cp < 0x100:
        return f"\\x{cp:02x}"
    if cp < 0x10000:
        return f"\\u{cp:04x}"
    return f"\\U{cp:08x}"


def for_terminal(text: str, *, keep: str = "\n") -> str:
    """``text`` with every unsafe character written as an escape (``\\x1b``, ``\\u202e``).

    ``keep`` lists characters left as they are: by default the newlines that separate a
    report's own lines. Error lines pass ``keep=""`` so they stay one line.
    """

    def repl(m: re.Match[str]) -> str:
        ch = m.group()
        return ch if ch in keep or not is_unsafe(ch) else _escape(ch)

    return _NOT_PLAIN.sub(repl, text)


@functools.lru_cache(maxsize=4096)
def _json_char(ch: str) -> str:
    if not is_unsafe(ch):
        return ch
    cp = ord(ch)
    if cp < 0x10000:
        return f"\\u{cp:04x}"
    cp -= 0x10000  # a UTF-16 surrogate pair, as JSON writes characters above the BMP
    return f"\\u{0xD800 + (cp >> 10):04x}\\u{0xDC00 + (cp & 0x3FF):04x}"


def _json_escape(m: re.Match[str]) -> str:
    return _json_char(m.group())


# The characters that may be unsafe, as one class the regex engine tests without calling back:
# every code point of the unsafe categories in the Basic Multilingual Plane (Unicode 14/15, as
# a test checks against the running Python's tables) and everything beyond it. Only these
# reach _json_escape, which decides by category; "Ω", "µ", "±", "°" never do. A raw newline
# is the layout's own: json.dumps escapes C0 controls inside strings.
_MAYBE_UNSAFE_JSON = re.compile(
    "[\x00-\x09\x0b-\x1f\x7f-\x9f\xad\u0600-\u0605\u061c\u06dd\u070f\u0890\u0891\u08e2"
    "\u180e\u200b-\u200f\u2028-\u202e\u2060-\u206f\ud800-\udfff\ufeff\ufff9-\ufffb"
    "\U00010000-\U0010ffff]"
)


def write_json_safely(doc: Any, write: Callable[[str], object]) -> None:
    """Write ``doc`` as :func:`json_text` does, piece by piece, for a large document."""
    write_json(doc, lambda piece: write(_MAYBE_UNSAFE_JSON.sub(_json_escape, piece)))


def json_text(doc: Any) -> str:
    """``doc`` as indented JSON text in which every unsafe character is a ``\\uXXXX`` escape.

    ``json.dumps`` escapes C0 controls inside strings, so the only raw controls left are
    the layout's newlines; every other unsafe character is inside a string, where an
    escape changes no value: ``json.loads(json_text(d)) == d``.
    """
    pieces: list[str] = []
    write_json_safely(doc, pieces.append)
    return "".join(pieces)
