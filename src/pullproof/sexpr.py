"""S-expression text → :class:`Node` tree, with positions and one-line errors.

One pass of one regular expression reads the text: every token is validated (balanced
lists, terminated strings, finite numbers, a sane depth, the token budget) and the tree
is built as the lists close, each :class:`Node` carrying the offsets of its brackets.
Values follow sexpdata's reading of the same text, so the two agree on every file this
accepts (the test suite checks it on every fixture and shared design): numbers by
``int()`` then ``float()``, everything else a bare symbol, ASCII whitespace between; a
quoted string with a backslash in it is decoded by sexpdata itself. Reading the whole
file through sexpdata as well, as before, cost a second tokenisation and a third tree.
"""

from __future__ import annotations

import math
import re
from collections.abc import Iterator
from dataclasses import dataclass
from typing import Any

import sexpdata

from .errors import SchematicSyntaxError, SourceText, excerpt
from .limits import MAX_TOKENS_PER_FILE, MAX_TOKENS_TOTAL, TokenBudget

__all__ = ["MAX_DEPTH", "Atom", "Node", "Sym", "parse"]

MAX_DEPTH = 100  # real schematics nest about 10 deep; deeper text is hostile or broken


class Sym(str):
    """A bare (unquoted) symbol such as ``yes`` or ``passive``; compares as its text."""

    __slots__ = ()


Atom = str | int | float


@dataclass(frozen=True, slots=True)
class Node:
    """One list ``(head item …)``; ``span`` is the offsets of its ``(`` and after its ``)``."""

    head: str
    items: tuple[Node | Atom, ...]
    span: tuple[int, int]

    def nodes(self, head: str | None = None) -> Iterator[Node]:
        """Child lists, optionally only those with this head."""
        for it in self.items:
            if isinstance(it, Node) and (head is None or it.head == head):
                yield it

    def first(self, head: str) -> Node | None:
        """The first child list with this head, or None."""
        return next(self.nodes(head), None)

    def atoms(self) -> tuple[Atom, ...]:
        """The non-list items, in order."""
        return tuple(it for it in self.items if not isinstance(it, Node))

    def atom(self, index: int = 0, default: Any = None) -> Any:
        """The ``index``-th non-list item, or ``default``."""
        a = self.atoms()
        return a[index] if index < len(a) else default

    def has_flag(self, word: str) -> bool:
        """True when a bare ``word`` is an item, or a child ``(word yes)``/``(word)`` says so."""
        if any(type(it) is Sym and it == word for it in self.items):
            return True
        sub = self.first(word)
        return sub is not None and sub.atom(0, "yes") != "no"


# Tokens: ( ) "string" lone-quote bare-word; ASCII whitespace between them, as in sexpdata
# (a non-ASCII space is part of a word there, so it is here). NUL is caught on its own:
# sexpdata would read it as a comment start, which no schematic contains.
# finditer steps over the whitespace between matches (no whitespace group: a pattern that
# consumed it would rescan a long blank tail once per character).
_TOKEN = re.compile(
    r"""(\()|(\))|("(?:[^"\\]|\\.)*")|(")|(\x00)|([^()"\x00 \t\n\r\x0b\x0c]+)""", re.DOTALL
)
_NUMBERISH = frozenset("0123456789+-.nNiI")


def _unescape(token: str) -> str:
    """A quoted string with escapes, decoded as sexpdata decodes it (``\\n`` is a newline…)."""
    value = sexpdata.loads(token, nil=None, true=None, false=None, line_comment="\x00")
    return str(value)


def _number(tok: str) -> int | float | None:
    """The number a bare word spells (by ``int()`` then ``float()``), or None."""
    try:
        return int(tok)
    except ValueError:
        try:
            return float(tok)
        except ValueError:
            return None


def _as_float(value: int | float) -> float:
    """``value`` as a float, infinite where it is beyond a float's range (a 400-digit int)."""
    try:
        return float(value)
    except OverflowError:
        return math.inf


def parse(text: str, name: str, budget: TokenBudget | None = None) -> Node:
    """Parse one S-expression document.

    :param text: the whole file text.
    :param name: the file name used in error locations.
    :param budget: the lists and words still allowed (default: the per-file limit only).
    :raises SchematicSyntaxError: malformed text, as ``NAME:LINE:COL: what is wrong``.
    """
    src = SourceText(name, text)

    def fail(offset: int, message: str) -> SchematicSyntaxError:
        return SchematicSyntaxError(message, src.locate(offset))

    limit = MAX_TOKENS_PER_FILE if budget is None else budget.for_file()
    open_items: list[list[Node | Atom]] = []  # the items of each open list, outermost first
    open_at: list[int] = []  # the offset of each open list's "("
    items: list[Node | Atom] | None = None  # the innermost open list's items
    top: Node | None = None
    count = 0
    isfinite, Sym_, Node_ = math.isfinite, Sym, Node
    for m in _TOKEN.finditer(text):
        kind = m.lastindex
        count += 1
        pos = m.start()
        if count > limit:
            if limit < MAX_TOKENS_PER_FILE:
                total = budget.total if budget is not None else MAX_TOKENS_TOTAL
                raise fail(pos, f"the files read so far and this one hold more than "
                                f"{total:,} lists and words")  # fmt: skip
            raise fail(pos, f"more than {MAX_TOKENS_PER_FILE:,} lists and words in one file")
        if top is not None:
            raise fail(pos, "unexpected text after the end of the top-level list")
        if kind == 1:  # (
            if len(open_at) >= MAX_DEPTH:
                raise fail(pos, f"lists nested deeper than {MAX_DEPTH} levels")
            items = []
            open_items.append(items)
            open_at.append(pos)
        elif kind == 2:  # )
            if items is None:
                raise fail(pos, "unexpected ')' with no open '('")
            open_items.pop()
            first = items[0] if items else None
            if first and isinstance(first, str):  # a list headed by "" keeps it as an item
                node = Node_(str(first), tuple(items[1:]), (open_at.pop(), pos + 1))
            else:
                node = Node_("", tuple(items), (open_at.pop(), pos + 1))
            if open_items:
                items = open_items[-1]
                items.append(node)
            else:
                items, top = None, node
        elif kind == 4:
            raise fail(pos, "unterminated string: missing closing '\"'")
        elif kind == 5:
            raise fail(pos, "NUL character in the text")
        elif items is None:
            raise fail(pos, f"expected '(' but found {excerpt(m.group())}")
        elif kind == 3:  # "string"
            tok = m.group(3)
            items.append(_unescape(tok) if "\\" in tok else tok[1:-1])
        else:  # bare word
            tok = m.group(6)
            c = tok[0]
            # A backslash escapes the next character in sexpdata's bare words, so `\"` would
            # start no string there but one here: refuse rather than guess which was meant.
            if c in "'`" or "[" in tok or "]" in tok or "\\" in tok:
                raise fail(pos, f"unexpected character in bare word {excerpt(tok)}; quote it")
            if c in _NUMBERISH or not c.isascii():  # int() reads non-ASCII digits too
                value = _number(tok)
                if value is not None:
                    if not isfinite(value if type(value) is float else _as_float(value)):
                        raise fail(pos, f"number {excerpt(tok)} is not finite")
                    items.append(value)
                    continue
            items.append(Sym_(tok))
    if budget is not None:
        budget.spend(count)
    if items is not None:
        raise fail(open_at[-1], "unclosed '(': missing ')' before the end of the file")
    if top is None:
        raise fail(0, "empty file: expected a '(' list")
    return top
