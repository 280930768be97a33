"""S-expression text → :class:`Node` tree, with positions and one-line errors.

sexpdata does the parsing of values (strings, numbers, symbols), but it keeps no
positions and fails with assorted builtin exceptions on malformed text. So a small
regex scanner runs first: it validates the text (balanced lists, terminated
strings, finite numbers, a sane depth) and records the (start, end) offsets of
every list in pre-order. sexpdata then parses the validated text and the spans
are zipped onto its lists in the same pre-order.
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


# Tokens: ( ) "string" bare-atom, plus a lone quote (an unterminated string).
_TOKEN = re.compile(
    r"""
    (?P<open>\() | (?P<close>\)) |
    (?P<string>"(?:[^"\\]|\\.)*") |
    (?P<unterminated>") |
    (?P<atom>[^\s()"]+)
    """,
    re.VERBOSE | re.DOTALL,
)
_NUMBERISH = frozenset("0123456789+-.nNiI")


def _scan(src: SourceText, budget: TokenBudget | None = None) -> list[tuple[int, int]]:
    """Validate ``src`` and return the spans of all lists in pre-order."""
    text = src.text

    def fail(offset: int, message: str) -> SchematicSyntaxError:
        return SchematicSyntaxError(message, src.locate(offset))

    spans: list[tuple[int, int]] = []
    stack: list[int] = []  # indexes into spans of the open lists
    closed_top = -1
    limit = MAX_TOKENS_PER_FILE if budget is None else budget.for_file()
    count = 0
    for count, m in enumerate(_TOKEN.finditer(text), 1):
        kind = m.lastgroup
        pos = m.start()
        if count > limit:
            if limit < MAX_TOKENS_PER_FILE:
                total = budget.total if budget is not None else MAX_TOKENS_TOTAL
                raise fail(pos, f"the files read so far and this one hold more than "
                                f"{total:,} lists and words")  # fmt: skip
            raise fail(pos, f"more than {MAX_TOKENS_PER_FILE:,} lists and words in one file")
        if closed_top >= 0:
            raise fail(pos, "unexpected text after the end of the top-level list")
        if kind == "open":
            if len(stack) >= MAX_DEPTH:
                raise fail(pos, f"lists nested deeper than {MAX_DEPTH} levels")
            stack.append(len(spans))
            spans.append((pos, -1))
        elif kind == "close":
            if not stack:
                raise fail(pos, "unexpected ')' with no open '('")
            i = stack.pop()
            spans[i] = (spans[i][0], pos + 1)
            if not stack:
                closed_top = pos
        elif kind == "unterminated":
            raise fail(pos, "unterminated string: missing closing '\"'")
        elif not stack:
            raise fail(pos, f"expected '(' but found {excerpt(m.group())}")
        elif kind == "atom":
            tok = m.group()
            # A backslash escapes the next character in sexpdata's bare words, so `\"` would
            # start no string there but one here: the two would disagree on the lists.
            if tok[0] in "'`" or "[" in tok or "]" in tok or "\\" in tok:
                raise fail(pos, f"unexpected character in bare word {excerpt(tok)}; quote it")
            if tok[0] in _NUMBERISH:
                try:
                    value = float(tok)
                except ValueError:
                    continue
                if not math.isfinite(value):
                    raise fail(pos, f"number {excerpt(tok)} is not finite")
    if budget is not None:
        budget.spend(count)
    if stack:
        raise fail(spans[stack[-1]][0], "unclosed '(': missing ')' before the end of the file")
    if not spans:
        raise fail(0, "empty file: expected a '(' list")
    return spans


def _build(value: list[Any], spans: Iterator[tuple[int, int]], src: SourceText) -> Node:
    span = next(spans)
    items: list[Node | Atom] = []
    for v in value:
        if isinstance(v, list):
            items.append(_build(v, spans, src))
        elif isinstance(v, sexpdata.Symbol):
            items.append(Sym(v.value()))
        elif isinstance(v, str | int | float):
            items.append(v)
        else:  # the scanner rejects every other construct; keep it loud if that changes
            raise SchematicSyntaxError(
                f"unsupported element {excerpt(repr(v))}", src.locate(span[0])
            )
    head = items[0] if items and isinstance(items[0], str) else ""
    return Node(str(head), tuple(items[1:] if head else items), span)


def parse(text: str, name: str, budget: TokenBudget | None = None) -> Node:
    """Parse one S-expression document.

    :param text: the whole file text.
    :param name: the file name used in error locations.
    :param budget: the lists and words still allowed (default: the per-file limit only).
    :raises SchematicSyntaxError: malformed text, as ``NAME:LINE:COL: what is wrong``.
    """
    src = SourceText(name, text)
    spans = _scan(src, budget)
    try:
        value = sexpdata.loads(text, nil=None, true=None, false=None, line_comment="\x00")
    except Exception as exc:  # sexpdata raises builtins of many kinds
        raise SchematicSyntaxError(
            f"cannot parse: {excerpt(str(exc), 60)}", src.locate(0)
        ) from None
    if not isinstance(value, list):
        raise SchematicSyntaxError("expected a '(' list", src.locate(0))
    it = iter(spans)
    node = _build(value, it, src)
    if next(it, None) is not None:
        raise SchematicSyntaxError("list structure could not be matched", src.locate(0))
    return node
