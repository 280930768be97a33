"""Text from a schematic made safe to show: control characters and bidi marks escaped.

A schematic written by someone else can carry terminal control sequences (ESC, BEL, CR,
BS, the C1 controls including CSI) and bidirectional marks (U+202E …) in any field or
name. Printed raw they could recolour a terminal, rewrite a line already shown or make
text read backwards. Every console report and error passes through :func:`for_terminal`;
every JSON document through :func:`json_text`, which also escapes C1 and bidi characters
(``json.dumps`` escapes only C0 controls).
"""

from __future__ import annotations

import json
import re
import unicodedata
from collections.abc import Iterator
from typing import Any

__all__ = ["UNSAFE_CATEGORIES", "for_terminal", "is_unsafe", "json_chunks", "json_text"]

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


def _json_escape(m: re.Match[str]) -> str:
    ch = m.group()
    if ch == "\n" or not is_unsafe(ch):  # json.dumps escapes newlines in strings: this is layout
        return ch
    cp = ord(ch)
    if cp < 0x10000:
        return f"\\u{cp:04x}"
    cp -= 0x10000  # a UTF-16 surrogate pair, as JSON writes characters above the BMP
    return f"\\u{0xD800 + (cp >> 10):04x}\\u{0xDC00 + (cp & 0x3FF):04x}"


def json_chunks(doc: Any) -> Iterator[str]:
    """:func:`json_text` piece by piece, for streaming a large document (each JSON string
    is one piece of ``iterencode``, so no character is split between pieces)."""
    encoder = json.JSONEncoder(indent=1, ensure_ascii=False)
    for chunk in encoder.iterencode(doc):
        yield _NOT_PLAIN.sub(_json_escape, chunk)


def json_text(doc: Any) -> str:
    """``doc`` as indented JSON text in which every unsafe character is a ``\\uXXXX`` escape.

    ``json.dumps`` escapes C0 controls inside strings, so the only raw controls left are
    the layout's newlines; every other unsafe character is inside a string, where an
    escape changes no value: ``json.loads(json_text(d)) == d``.
    """
    return "".join(json_chunks(doc))
