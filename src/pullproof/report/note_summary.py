"""The summary table's rows and, for each network, its section's head, number table row and
recommendation, as Python-built HTML.

Like :mod:`.note_rows`: byte for byte what the template lines they replaced wrote, every
text escaped once, so the summary (one row per network) costs no template expressions.
"""

from __future__ import annotations

from collections.abc import Iterable
from typing import TYPE_CHECKING

from markupsafe import Markup

from ..results import NetworkResult
from .format import format_margin, format_ohms, format_percent, format_window
from .note_html import candidates, esc
from .note_rows import network_links
from .note_tags import accepted, assumed, verdict

if TYPE_CHECKING:
    from .note import AssumedRow, NetworkView

__all__ = ["assumed_value_rows", "network_head", "numbers_row", "recommendation", "summary_rows"]


def summary_rows(views: Iterable[NetworkView]) -> Markup:
    """One ``<tr>`` per network: net, resistor, value, pull, window and verdict."""
    out = []
    for nv in views:
        nr = nv.result
        net = nr.network
        tag = ' <span class="tag">hazardous voltage</span>' if net.mains_adjacent else ""
        out.append(
            f'\n      <tr><td><a href="#{esc(nv.anchor)}">{esc(net.net)}</a>{tag}</td>\n'
            f"        <td>{esc(nv.refs_text)}</td><td>{esc(nv.value_text)}</td>\n"
            f"        <td>{esc(net.direction.value)} to {esc(net.rail.name)}</td>\n"
            f"        <td>{esc(format_window(nr.window))}</td><td>{verdict(nr.verdict)}"
            f"{assumed(nr)}{accepted(nr.accepted)}</td></tr>"
        )
    return Markup("".join(out))


def assumed_value_rows(rows: Iterable[AssumedRow]) -> Markup:
    """The "Assumed values to confirm" table: one ``<tr>`` per assumed number (a board's
    networks share them, but each part's pins have their own)."""
    out = []
    for a in rows:
        status = (
            f'<span class="status status-{esc(a.status.replace(" ", "-"))}">{esc(a.status)}</span>'
        )
        out.append(
            f'\n      <tr class="assumed-value"><td>{esc(a.part or "—")}</td>'
            f"<td>{esc(a.pin or '—')}</td><td>{esc(a.quantity)}</td><td>{esc(a.value)}</td>"
            f'<td>{esc(a.basis)} {status}</td><td class="small">{esc(a.fix)}</td>\n'
            f'        <td class="small">{network_links(a.networks)}</td></tr>'
        )
    return Markup("".join(out))


def recommendation(nr: NetworkResult) -> Markup:
    """The recommendation paragraphs: the pick and every fitting value, or why none."""
    rec = nr.recommendation
    if rec is None:
        why = (
            "the window is not known on both sides"
            if nr.verdict.value == "incomplete"
            else "the window is not closed on both sides"
        )
        return Markup(f'<p class="muted">No recommendation: {why}.</p>')
    series, tol = esc(rec.series), esc(format_percent(rec.tolerance))
    if rec.pick is None:
        return Markup(f"<p>No {series} value fits the window at ±{tol}.</p>")
    n = len(rec.candidates)
    return Markup(
        f"<p><strong>{series} {esc(format_ohms(rec.pick))}</strong> at ±{tol} — "
        f"{esc(rec.reason)} (policy: {esc(rec.policy)}).</p>\n"
        f'  <p class="cands">{n} {series} value{"" if n == 1 else "s"} whose whole band '
        f"fits: {candidates(rec.candidates)}.</p>"
    )


def network_head(nv: NetworkView) -> Markup:
    """A network section's opening tag, header (net, verdict) and verdict sentence."""
    nr = nv.result
    net = nr.network
    a = esc(nv.anchor)
    word = esc(nr.verdict.value) + (" (assumed)" if nr.basis.value == "assumed" else "")
    return Markup(
        f'<section class="network" id="{a}" aria-labelledby="{a}_h">\n'
        f"  <header>\n"
        f'    <div><div class="kicker">Pull-{esc(net.direction.value)} network</div>'
        f'<h2 id="{a}_h">{esc(net.net)}</h2></div>\n'
        f"    <div>{verdict(nr.verdict)}{assumed(nr)}</div>\n"
        f"  </header>\n"
        f'  <p class="reason"><strong>Verdict: {word}.</strong> {esc(nr.reason)}</p>'
    )


def numbers_row(nr: NetworkResult) -> Markup:
    """The window, fitted band and the room at each edge, as one table row."""
    lo, hi = nr.band
    return Markup(
        f"<tr><td>{esc(format_window(nr.window))}</td>"
        f"<td>{esc(format_ohms(lo))} … {esc(format_ohms(hi))}</td>"
        f"<td>{esc(format_margin(nr.margins[0], 'below'))}</td>"
        f"<td>{esc(format_margin(nr.margins[1], 'above'))}</td></tr>"
    )
