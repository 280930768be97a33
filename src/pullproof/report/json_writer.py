"""Indented JSON text, written the way ``json.dumps(doc, indent=1, ensure_ascii=False)``
writes it, at the speed of the C encoder for the leaves.

The standard library's C encoder is used only without ``indent``; with it, every token
passes through a chain of pure-Python generators, which for a large board's review (tens
of megabytes) costs more than the review itself. Here the structure is walked by one
recursive function that appends to a list, and every leaf is encoded by the standard
library's own C functions (``encode_basestring``, ``float.__repr__``), so the text is the
same byte for byte — the test suite checks it against ``json.dumps`` on random documents.
Pieces are handed to ``write`` as the list grows, so the whole text never sits in memory.
"""

from __future__ import annotations

import json.encoder
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from typing import Any

__all__ = ["Streamed", "write_json"]

_STRING: Callable[[str], str] = json.encoder.encode_basestring  # the C version where built
_FLUSH_AT = 4096  # pieces held before they are handed on


@dataclass(frozen=True)
class Streamed:
    """A JSON array whose items are made one at a time, as they are written."""

    items: Callable[[], Iterable[Any]]
    length: int  # how many ``items`` yields (only whether it is 0 changes the text)


def _float(x: float) -> str:
    if x != x:
        return "NaN"
    if x == float("inf"):
        return "Infinity"
    if x == -float("inf"):
        return "-Infinity"
    return float.__repr__(x)


def _key(k: Any) -> str:
    """A mapping key as json writes it (str, or a number/bool/None made text)."""
    if isinstance(k, str):
        return _STRING(k)
    if k is True:
        return '"true"'
    if k is False:
        return '"false"'
    if k is None:
        return '"null"'
    if isinstance(k, float):
        return _STRING(_float(k))
    if isinstance(k, int):
        return _STRING(int.__repr__(k))
    raise TypeError(f"keys must be str, int, float, bool or None, not {type(k).__name__}")


def write_json(doc: Any, write: Callable[[str], object], indent: int = 1) -> None:
    """Write ``doc`` as ``json.dumps(doc, indent=indent, ensure_ascii=False)`` would."""
    out: list[str] = []
    append = out.append
    pads = ["\n"]  # pads[level]: newline and the indent of that level

    def pad(level: int) -> str:
        while len(pads) <= level:
            pads.append("\n" + " " * (indent * len(pads)))
        return pads[level]

    def value(v: Any, level: int) -> None:
        if isinstance(v, str):
            append(_STRING(v))
        elif v is None:
            append("null")
        elif v is True:
            append("true")
        elif v is False:
            append("false")
        elif isinstance(v, int):
            append(int.__repr__(v))
        elif isinstance(v, float):
            append(_float(v))
        elif isinstance(v, dict | list | tuple | Streamed):
            is_dict = isinstance(v, dict)
            if not (v.length if isinstance(v, Streamed) else v):
                append("{}" if is_dict else "[]")
                return
            inner = pad(level + 1)
            sep = "," + inner
            append(("{" if is_dict else "[") + inner)
            first = True
            entries: Iterable[Any] = (
                v.items() if isinstance(v, dict) else v.items() if isinstance(v, Streamed) else v
            )
            for entry in entries:
                if not first:
                    append(sep)
                first = False
                if is_dict:
                    append(_key(entry[0]) + ": ")
                    value(entry[1], level + 1)
                else:
                    value(entry, level + 1)
                    if len(out) > _FLUSH_AT:  # hand on a long list as it goes
                        write("".join(out))
                        out.clear()
            append(pad(level) + ("}" if is_dict else "]"))
        else:
            raise TypeError(f"Object of type {type(v).__name__} is not JSON serializable")

    value(doc, 0)
    if out:
        write("".join(out))
