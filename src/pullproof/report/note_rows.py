"""The note's per-network tables as Python-built HTML: limit rows, operating-point figures,
missing values, assumed values and the links from an assumed value to its networks.

Like :mod:`.note_html`, each function writes byte for byte what the template lines it
replaced wrote (autoescape on, ``trim_blocks`` and ``lstrip_blocks``), escaping every
text once; a fragment that stood on its own lines is led by its newline, for ``{{- … }}``.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING

from markupsafe import Markup

from ..network import Missing
from ..results import Assumption
from .format import format_sourced
from .note_html import esc, term_items, terms

if TYPE_CHECKING:
    from .note import CircuitRow, FigureView, LimitRow

__all__ = [
    "assumption_items",
    "circuit_list",
    "figure_list",
    "limit_rows",
    "missing_list",
    "network_links",
]

_MARK = {
    None: '<span class="mark unknown">unknown</span>',
    True: '<span class="mark met">met</span>',
    False: '<span class="mark unmet">not met</span>',
}


def limit_rows(rows: Iterable[LimitRow], anchor: str) -> Markup:
    """The ``<tr>`` of every limit and check of one network."""
    return Markup("".join([_limit_row(r, anchor) for r in rows]))


def _limit_row(r: LimitRow, anchor: str) -> str:
    if r.assumed:
        head = f'limit assumed" data-constraint="{esc(r.constraint)}" data-assumed="yes"'
        tags = '<span class="tag assumed">assumed</span>'
        rests = f'<div class="small">rests on {esc(", ".join(r.assumed))}</div>'
    else:
        head, tags, rests = f'limit" data-constraint="{esc(r.constraint)}"', "", ""
    if r.binding:
        tags += '<span class="tag binding">binding</span>'
    hard = '<span class="tag">hard</span>' if r.hard else '<span class="tag soft">soft</span>'
    corner = f'<div class="small muted">worst at {esc(r.corner)}</div>' if r.corner else ""
    why = f'<div class="small muted">{esc(r.explanation)}</div>' if r.explanation else ""
    return (
        f'\n      <tr class="{head}>\n'
        f"        <td><strong>{esc(r.title)}</strong><br>\n"
        f"          {hard}{tags}{rests}{corner}</td>\n"
        f'        <td><div class="formula">{esc(r.formula)}</div>'
        f'<div class="formula muted">= {esc(r.substituted)}</div>\n'
        f"{why}</td>\n"
        f'        <td><ul class="terms">{term_items(r.terms, anchor)}</ul></td>\n'
        f"        <td>{esc(r.limit)}<br>{_MARK[r.met]}"
        f'<div class="small muted">{esc(r.outcome)}</div></td>\n'
        f"      </tr>"
    )


def circuit_list(rows: Iterable[CircuitRow], anchor: str) -> Markup:
    """The circuit in words (a ``<dl>``), each line with its numbers' provenance links."""
    out = []
    for r in rows:
        vals = f'<br><span class="vals">{terms(r.values, anchor)}</span>' if r.values else ""
        out.append(f"\n    <dt>{esc(r.label)}</dt>\n    <dd>{esc(r.text)}{vals}</dd>")
    return Markup("".join(out))


def missing_list(items: Iterable[Missing]) -> Markup:
    """The missing values and where to add each, as an ``<ul>``."""
    lines = [
        f"  <li><strong>{esc(m.what)}</strong>"
        f"{f' (part {esc(m.ref)})' if m.ref else ''}: {esc(m.hint)}</li>\n"
        for m in items
    ]
    return Markup("<ul>\n" + "".join(lines) + "</ul>")


def figure_list(columns: Iterable[FigureView], anchor: str) -> Markup:
    """Each operating-point column's formula, substitution, terms and note (a ``<dl>``)."""
    out = []
    for c in columns:
        text = f'<span class="formula">{esc(c.formula)}</span>'
        if c.substituted:
            text += f' <span class="formula muted">= {esc(c.substituted)} = {esc(c.value)}</span>'
        if c.terms:
            text += f'<br><span class="vals">{terms(c.terms, anchor)}</span>'
        if c.note:
            text += f"<br>{esc(c.note)}"
        if c.missing:
            text += str(missing_list(c.missing))  # a Markup on the right would escape text
        out.append(f"\n    <dt>{esc(c.title)}</dt>\n    <dd>{text}</dd>")
    return Markup("".join(out))


def assumption_items(items: Iterable[Assumption]) -> Markup:
    """The ``<li>`` of each assumed value one verdict rests on."""
    out = []
    for a in items:
        part = ""
        if a.part:
            part = f"{esc(a.part)}{f' pin {esc(a.pin)}' if a.pin else ''}: "
        value = esc(a.text or format_sourced(a.value))
        out.append(
            f"<li>{part}{esc(a.quantity)} = {value} ({esc(a.basis)}); "
            f"the real value goes in {esc(a.fix)}</li>"
        )
    return Markup("".join(out))


def network_links(networks: Iterable[tuple[str, str]]) -> Markup:
    """Links to the networks resting on one assumed value, separated by commas."""
    return Markup(", ".join([f'<a href="#{esc(a)}">{esc(net)}</a>' for a, net in networks]))
