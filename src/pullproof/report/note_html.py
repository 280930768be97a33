"""The note's most repeated HTML fragments, built in Python instead of the template.

An operating-point table, a candidate list or a provenance list has dozens of rows per
network; as template loops every value would pass through one autoescaped ``{{ }}``
each. Here each distinct text is escaped once (markupsafe's escape, the same the
template applies) and a row is one f-string. The output is byte for byte what the
template loops wrote; the template places each fragment with ``{{- … }}``.
"""

from __future__ import annotations

from collections.abc import Iterable, Sequence
from functools import lru_cache
from typing import TYPE_CHECKING

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


@lru_cache(maxsize=65536)
def esc(text: str) -> str:
    """``text`` escaped as the template's autoescape would (names and numbers recur)."""
    return str(escape(text))


@lru_cache(maxsize=16384)
def cell(x: float | None, unit: str) -> str:
    """One operating-point figure as its table cell; "—" where it does not apply."""
    text = "—" if x is None else esc(format_value(x, unit))
    return f'<td class="num">{text}</td>'


@lru_cache(maxsize=16384, typed=True)
def _ohms(x: float) -> str:
    return esc(format_ohms(x))


@lru_cache(maxsize=16384, typed=True)
def _value(x: float) -> str:
    return f"{_ohms(x)} <code>{esc(format_rkm(x))}</code>"


def point_row(
    label: str, ohms: float, band: tuple[float, float], cells: str, *, fitted: bool, pick: bool
) -> str:
    """One ``<tr>`` of the operating-point table, led by the newline and indentation the
    template loop wrote; ``cells`` are the figures' :func:`cell` texts, joined."""
    klass = ("op-row fitted" if fitted else "op-row") + (" pick" if pick else "")
    mark = '<span aria-hidden="true">▲ </span>' if pick else ""
    note = f'<div class="small muted">{esc(label)}</div>' if label else ""
    return (
        f'\n      <tr class="{klass}"><td>{mark}{_value(ohms)}{note}</td>'
        f'<td class="small">{_ohms(band[0])} … {_ohms(band[1])}</td>{cells}</tr>'
    )


def candidate_rows(points: Iterable[PointValues], pick: float | None, series: str) -> str:
    """The rows of every recommended candidate after the fitted one (the hot loop of the
    note: about 45 per network), the pick labelled "E24 pick" and marked."""
    value, ohms, cell_, units = _value, _ohms, cell, PointValues.UNITS
    out = []
    for p in points:
        cells = "".join(map(cell_, p.figures, units))
        if pick is not None and p.ohms == pick:
            out.append(point_row(f"{series} pick", p.ohms, p.band, cells, fitted=False, pick=True))
        else:
            band = f"{ohms(p.band[0])} … {ohms(p.band[1])}"
            out.append(
                f'\n      <tr class="op-row"><td>{value(p.ohms)}</td>'
                f'<td class="small">{band}</td>{cells}</tr>'
            )
    return "".join(out)


def candidates(values: Sequence[float]) -> Markup:
    """The recommendation's candidate list: "620 Ω (<code>620R</code>), …"."""
    return Markup(", ".join([_candidate(c) for c in values]))


def _candidate(c: float) -> str:
    return f"{esc(format_ohms(c))} (<code>{esc(format_rkm(c))}</code>)"


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
