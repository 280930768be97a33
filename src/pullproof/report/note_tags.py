"""The note's small inline tags (verdict, "assumed", "accepted") as Python functions.

They were template macros called several times per network; a jinja macro call costs
more than the text it writes. Each function writes what its macro wrote, byte for byte.
"""

from __future__ import annotations

from typing import Any

from markupsafe import Markup

from ..results import AcceptanceMark, NetworkResult
from .note_html import esc

__all__ = ["accepted", "assumed", "verdict"]

_GLYPHS = {"pass": "✓", "marginal": "!", "incomplete": "?", "fail": "✕"}
_VERDICTS = {
    word: Markup(
        f'<span class="verdict v-{word}" data-verdict="{word}"><span class="glyph" '
        f'aria-hidden="true">{glyph}</span>{word}</span>'
    )
    for word, glyph in _GLYPHS.items()
}


def verdict(v: Any) -> Markup:
    """A verdict (or finding severity) word with its glyph; ``v`` is an enum or its word."""
    return _VERDICTS[getattr(v, "value", v)]


def assumed(result: NetworkResult) -> Markup:
    """The "assumed" tag of a verdict that rests on assumed values, led by a space."""
    if result.basis.value != "assumed":
        return Markup("")
    n = len(result.assumptions)
    return Markup(
        f' <span class="tag assumed" data-basis="assumed" title="rests on {n} assumed '
        f'value{"" if n == 1 else "s"}">assumed</span>'
    )


def accepted(mark: AcceptanceMark | None) -> Markup:
    """The "accepted" (or "acceptance lapsed") tag of a reviewer's acceptance."""
    if mark is None:
        return Markup("")
    if mark.holds:
        return Markup(
            f'<span class="tag accepted" data-accepted="yes" '
            f'title="{esc(mark.acceptance.reason)}">accepted</span>'
        )
    return Markup(
        f'<span class="tag lapsed" data-accepted="lapsed" title="{esc(mark.lapsed)}">'
        "acceptance lapsed</span>"
    )
