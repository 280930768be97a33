"""Preferred range: the rules' soft window (a house habit, not physics)."""

from __future__ import annotations

from ..network import PullNetwork
from ..results import Bound, BoundKind, Check, Term
from ._common import fmt

__all__ = ["preferred_range"]

_SOURCE = "project rules (preferred range)"


def preferred_range(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """Soft MIN and MAX bounds from the rules' preferred_min / preferred_max."""
    out: list[Bound | Check] = []
    rules = network.rules
    for value, kind, sym in (
        (rules.preferred_min, BoundKind.MIN, "R_pref,min"),
        (rules.preferred_max, BoundKind.MAX, "R_pref,max"),
    ):
        if value is None:
            continue
        op = "≥" if kind is BoundKind.MIN else "≤"
        side = "R_lo" if kind is BoundKind.MIN else "R_hi"
        out.append(
            Bound(
                constraint="preferred-range",
                title="Preferred range",
                kind=kind,
                ohms=value.magnitude("ohm"),
                hard=False,
                formula=f"{side} {op} {sym}",
                substituted=f"{side} {op} {fmt(value, 'ohm')}",
                terms=(Term(sym, value),),
                source=_SOURCE,
                explanation="The project prefers pull resistors in this range.",
                relax="widen the preferred range in the rules",
                says=f"where the preferred range {'starts' if kind is BoundKind.MIN else 'ends'}",
            )
        )
    return tuple(out)
