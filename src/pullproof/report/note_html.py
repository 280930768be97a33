"""The note's most repeated HTML fragments, built in Python instead of the template.

An operating-point table, a candidate list or a provenance list has dozens of rows per
network; as template loops every value would pass through one autoescaped ``{{ }}``
each. Here each distinct text is escaped once (markupsafe's escape, the same the
template applies) and a row is one f-string. The output is byte for byte what the
template loops wrote; the template places each fragment with ``{{- … }}``.
"""

from __future__ import annotations

from collections.abc import Callable, Iterable, Sequence
from functools import lru_cache, partial
from typing import TYPE_CHECKING, Any

from markupsafe import Markup, escape

from ..eseries import format_rkm as _format_rkm
from ..results import PointValues
from .format import format_ohms, format_value

if TYPE_CHECKING:
    from .note import ProvEntry, TermRef

__all__ = [
    "candidates",
    "cell",
    "esc",
    "format_rkm",
    "point_row",
    "provenance",
    "term_items",
    "terms",
]

# E-series values recur across networks; the code is the same each time.
format_rkm = lru_cache(maxsize=4096)(_format_rkm)


class _Memo(dict[Any, str]):
    """The text of each key, made on first use: a dict lookup is the cheapest cache hit,
    and the table loops make hundreds per network. Emptied when it reaches ``cap``."""

    def __init__(self, make: Callable[[Any], str], cap: int = 1 << 14) -> None:
        super().__init__()
        self.make, self.cap = make, cap

    def __missing__(self, key: Any) -> str:
        if len(self) >= self.cap:
            self.clear()
        text = self[key] = self.make(key)
        return text


#: ``text`` escaped as the template's autoescape would (names and numbers recur)
esc: Callable[[str], str] = _Memo(lambda text: str(escape(text)), 1 << 16).__getitem__


@lru_cache(maxsize=16384)
def cell(x: float | None, unit: str) -> str:
    """One operating-point figure as its table cell; "—" where it does not apply."""
    text = "—" if x is None else esc(format_value(x, unit))
    return f'<td class="num">{text}</td>'


_ohms = _Memo(lambda x: esc(format_ohms(x)))
_value = _Memo(lambda x: f"{_ohms[x]} <code>{esc(format_rkm(x))}</code>")
# one memo per operating-point column, in the order of PointValues.figures
_CELLS = tuple(_Memo(partial(cell, unit=u)) for u in PointValues.UNITS)


def point_row(
    label: str, ohms: float, band: tuple[float, float], cells: str, *, fitted: bool, pick: bool
) -> str:
    """One ``<tr>`` of the operating-point table, led by the newline and indentation the
    template loop wrote; ``cells`` are the figures' :func:`cell` texts, joined."""
    klass = ("op-row fitted" if fitted else "op-row") + (" pick" if pick else "")
    mark = '<span aria-hidden="true">▲ </span>' if pick else ""
    note = f'<div class="small muted">{esc(label)}</div>' if label else ""
    return (
        f'\n      <tr class="{klass}"><td>{mark}{_value[ohms]}{note}</td>'
        f'<td class="small">{_ohms[band[0]]} … {_ohms[band[1]]}</td>{cells}</tr>'
    )


def candidate_rows(points: Iterable[PointValues], pick: float | None, series: str) -> str:
    """The rows of every recommended candidate after the fitted one (the hot loop of the
    note: about 45 per network), the pick labelled "E24 pick" and marked."""
    value, ohms = _value, _ohms
    c0, c1, c2, c3, c4 = _CELLS
    out = []
    for p in points:
        f = p.figures
        cells = f"{c0[f[0]]}{c1[f[1]]}{c2[f[2]]}{c3[f[3]]}{c4[f[4]]}"
        if pick is not None and p.ohms == pick:
            out.append(point_row(f"{series} pick", p.ohms, p.band, cells, fitted=False, pick=True))
        else:
            lo, hi = p.band
            out.append(
                f'\n      <tr class="op-row"><td>{value[p.ohms]}</td>'
                f'<td class="small">{ohms[lo]} … {ohms[hi]}</td>{cells}</tr>'
            )
    return "".join(out)


def candidates(values: Sequence[float]) -> Markup:
    """The recommendation's candidate list: "620 Ω (<code>620R</code>), …"."""
    return Markup(", ".join([_candidate(c) for c in values]))


def _candidate(c: float) -> str:
    return f"{_ohms[c]} (<code>{esc(format_rkm(c))}</code>)"


def _ref(t: TermRef, anchor: str) -> str:
    n = t.ref
    return (
        f'{esc(t.symbol)} = {esc(t.value)}<a class="ref" href="#{anchor}_p{n}" '
        f'data-ref="{n}">[{n}]</a>'
    )


def terms(values: Iterable[TermRef], anchor: str) -> Markup:
    """Terms with their provenance links, separated by " · " (circuit and figure lines)."""
    a = esc(anchor)
    return Markup(" · ".join([_ref(t, a) for t in values]))


def term_items(values: Iterable[TermRef], anchor: str) -> Markup:
    """Terms as the ``<li>`` items of a limit row's list."""
    a = esc(anchor)
    return Markup("".join([f"<li>{_ref(t, a)}</li>" for t in values]))


def provenance(entries: Iterable[ProvEntry], anchor: str) -> Markup:
    """The numbered provenance list's ``<li>`` lines, each led by its newline and indent."""
    a = esc(anchor)
    out = []
    for p in entries:
        n = p.number
        status = esc(p.status)
        reason = f' <span class="muted">{esc(p.reason)}</span>' if p.reason else ""
        out.append(
            f'\n    <li id="{a}_p{n}" value="{n}"><strong>{esc(p.symbol)}</strong> = '
            f'{esc(p.value)} — {esc(p.where)} <span class="status '
            f'status-{esc(p.status.replace(" ", "-"))}">{status}</span>{reason}</li>'
        )
    return Markup("".join(out))
