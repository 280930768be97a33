"""Indented JSON text, written the way ``json.dumps(doc, indent=1, ensure_ascii=False)``
writes it, at the speed of the C encoder for the leaves.

The standard library's C encoder is used only without ``indent``; with it, every token
passes through a chain of pure-Python generators, which for a large board's review (tens
of megabytes) costs more than the review itself. Here the structure is walked by one
recursive function that joins its children's texts, and every leaf is encoded by the
standard library's own C functions (``encode_basestring``, ``float.__repr__``), so the
text is the same byte for byte — the test suite checks it against ``json.dumps`` on random
documents. The top two levels are handed to ``write`` item by item (a review's networks one
at a time), so the whole text never sits in memory.
"""

from __future__ import annotations

import json.encoder
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from typing import Any

__all__ = ["Streamed", "write_json"]

_STRING: Callable[[str], str] = json.encoder.encode_basestring  # the C version where built


@dataclass(frozen=True)
class Streamed:
    """A JSON array whose items are made one at a time, as they are written."""

    items: Callable[[], Iterable[Any]]
    length: int  # how many ``items`` yields (only whether it is 0 changes the text)


_SPECIAL = {"nan": "NaN", "inf": "Infinity", "-inf": "-Infinity"}  # as json writes them


def _float(x: float) -> str:
    r = float.__repr__(x)
    return _SPECIAL.get(r, r)


def _scalar(v: Any) -> str | None:
    """A bool, None or number as json writes it (subclasses as their base), else None."""
    if v is True:
        return "true"
    if v is False:
        return "false"
    if v is None:
        return "null"
    if isinstance(v, int):
        return int.__repr__(v)
    if isinstance(v, float):
        return _float(v)
    return None


def _key(k: Any) -> str:
    """A mapping key as json writes it (str, or a number/bool/None made text)."""
    if isinstance(k, str):
        return _STRING(k)
    text = _scalar(k)
    if text is None:
        raise TypeError(f"keys must be str, int, float, bool or None, not {type(k).__name__}")
    return _STRING(text)


class _Encoder:
    """The text of one value at one depth, built by joining its children's texts."""

    def __init__(self, indent: int) -> None:
        self.indent = indent
        self.pads = ["\n"]  # pads[level]: a newline and the indent of that level
        self.keys: dict[str, str] = {}  # each key's text with its ": "

    def pad(self, level: int) -> str:
        pads = self.pads
        while len(pads) <= level:
            pads.append("\n" + " " * (self.indent * len(pads)))
        return pads[level]

    def text(self, v: Any, level: int) -> str:
        if type(v) is str or isinstance(v, str):  # the exact type first: most leaves
            return _STRING(v)
        leaf = _scalar(v)
        if leaf is not None:
            return leaf
        if isinstance(v, dict):
            if not v:
                return "{}"
            inner = self.pad(level + 1)
            text, keys, deeper = self.text, self.keys, level + 1
            parts: list[str] = []
            add = parts.append
            for k, x in v.items():
                if type(k) is str:
                    head = keys.get(k)
                    if head is None:  # keys recur in every network: each made once
                        head = keys[k] = _STRING(k) + ": "
                else:
                    head = _key(k) + ": "
                tx = type(x)  # leaves inline: a call per leaf was most of the cost
                if tx is str:
                    add(head + _STRING(x))
                elif tx is float:
                    r = float.__repr__(x)
                    add(head + (_SPECIAL[r] if r[-1] > "9" else r))  # nan, inf end in a letter
                else:
                    add(head + text(x, deeper))
            return "{" + inner + ("," + inner).join(parts) + self.pad(level) + "}"
        if isinstance(v, Streamed):
            v = list(v.items())
        if isinstance(v, list | tuple):
            if not v:
                return "[]"
            inner = self.pad(level + 1)
            text = self.text
            return (
                "["
                + inner
                + ("," + inner).join([text(x, level + 1) for x in v])
                + self.pad(level)
                + "]"
            )
        raise TypeError(f"Object of type {type(v).__name__} is not JSON serializable")


_STREAM_DEPTH = 2  # containers above this depth are handed on item by item


def write_json(doc: Any, write: Callable[[str], object], indent: int = 1) -> None:
    """Write ``doc`` as ``json.dumps(doc, indent=indent, ensure_ascii=False)`` would."""
    enc = _Encoder(indent)

    def stream(v: Any, level: int) -> None:
        is_dict = isinstance(v, dict)
        if level >= _STREAM_DEPTH or not isinstance(v, dict | list | tuple | Streamed):
            write(enc.text(v, level))
            return
        if not (v.length if isinstance(v, Streamed) else v):
            write("{}" if is_dict else "[]")
            return
        inner = enc.pad(level + 1)
        write(("{" if is_dict else "[") + inner)
        entries: Iterable[Any] = v.items() if isinstance(v, dict | Streamed) else v
        for i, entry in enumerate(entries):
            if i:
                write("," + inner)
            if is_dict:
                write(_key(entry[0]) + ": ")
                stream(entry[1], level + 1)
            else:
                stream(entry, level + 1)
        write(enc.pad(level) + ("}" if is_dict else "]"))

    stream(doc, 0)
