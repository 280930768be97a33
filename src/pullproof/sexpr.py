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

    # The readers call these hundreds of thousands of times on a large board: plain loops
    # and `type(...) is Node` (items are never subclasses) rather than generators.
    def nodes(self, head: str | None = None) -> Iterator[Node]:
        """Child lists, optionally only those with this head."""
        if head is None:
            return iter([it for it in self.items if type(it) is Node])
        return iter([it for it in self.items if type(it) is Node and it.head == head])

    def first(self, head: str) -> Node | None:
        """The first child list with this head, or None."""
        for it in self.items:
            if type(it) is Node and it.head == head:
                return it
        return None

    def atoms(self) -> tuple[Atom, ...]:
        """The non-list items, in order."""
        return tuple([it for it in self.items if not isinstance(it, Node)])

    def atom(self, index: int = 0, default: Any = None) -> Any:
        """The ``index``-th non-list item, or ``default``."""
        for it in self.items:
            if type(it) is not Node:
                if not index:
                    return it
                index -= 1
        return default

    def has_flag(self, word: str) -> bool:
        """True when a bare ``word`` is an item, or a child ``(word yes)``/``(word)`` says so."""
        for it in self.items:
            if type(it) is Sym and it == word:
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
    if "." not in tok:  # int() refuses every word with a point: try float() alone there
        try:
            return int(tok)
        except ValueError:
            pass
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

    per_file = MAX_TOKENS_PER_FILE if budget is None else budget.per_file
    limit = per_file if budget is None else budget.for_file()
    open_items: list[list[Node | Atom]] = []  # the items of each open list, outermost first
    open_at: list[int] = []  # the offset of each open list's "("
    items: list[Node | Atom] | None = None  # the innermost open list's items
    top: Node | None = None
    count = 0
    isfinite, Sym_, Node_ = math.isfinite, Sym, Node
    for m in _TOKEN.finditer(text):
        kind = m.lastindex
        count += 1
        if count > limit:
            pos = m.start()
            if limit < per_file:
                total = budget.total if budget is not None else MAX_TOKENS_TOTAL
                raise fail(pos, f"the files read so far and this one hold more than "
                                f"{total:,} lists and words")  # fmt: skip
            raise fail(pos, f"more than {per_file:,} lists and words in one file")
        # the kinds in order of how often they occur: words, then brackets, then strings
        if kind == 6:  # bare word
            tok = m.group()
            c = tok[0]
            # A backslash escapes the next character in sexpdata's bare words, so `\"` would
            # start no string there but one here: refuse rather than guess which was meant.
            if items is None or c in "'`" or "[" in tok or "]" in tok or "\\" in tok:
                if items is None:
                    raise fail(m.start(), f"expected '(' but found {excerpt(tok)}")
                raise fail(m.start(), f"unexpected character in bare word {excerpt(tok)}; quote it")
            if c in _NUMBERISH or not c.isascii():  # int() reads non-ASCII digits too
                value = _number(tok)
                if value is not None:
                    if not isfinite(value if type(value) is float else _as_float(value)):
                        raise fail(m.start(), f"number {excerpt(tok)} is not finite")
                    items.append(value)
                    continue
            items.append(Sym_(tok))
        elif kind == 1:  # (
            if len(open_at) >= MAX_DEPTH:
                raise fail(m.start(), f"lists nested deeper than {MAX_DEPTH} levels")
            items = []
            open_items.append(items)
            open_at.append(m.start())
        elif kind == 2:  # )
            pos = m.start()
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
                top = node
                break
        elif kind == 3:  # "string"
            tok = m.group()
            if items is None:
                raise fail(m.start(), f"expected '(' but found {excerpt(tok)}")
            items.append(_unescape(tok) if "\\" in tok else tok[1:-1])
        elif kind == 4:
            raise fail(m.start(), "unterminated string: missing closing '\"'")
        else:
            raise fail(m.start(), "NUL character in the text")
    if top is not None:
        after = _TOKEN.search(text, top.span[1])
        if after is not None:
            raise fail(after.start(), "unexpected text after the end of the top-level list")
    if budget is not None:
        budget.spend(count)
    if top is None and items is not None:
        raise fail(open_at[-1], "unclosed '(': missing ')' before the end of the file")
    if top is None:
        raise fail(0, "empty file: expected a '(' list")
    return top
