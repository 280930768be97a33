"""Current budget: a battery design caps the static current through a held pull.

R_lo ≥ V_max / I_budget. Applies only when the rules set a budget (then it is a
hard limit: the designer stated it) and a switch or driver can hold the line
opposite (otherwise only leakage flows).
"""

from __future__ import annotations

from ..network import Missing, PullNetwork
from ..results import Bound, BoundKind, Check, Term
from ._common import Span, across, fmt, pulled_against, unevaluated

__all__ = ["current_budget"]

_FORMULA = "R_lo ≥ V_max / I_budget"
_SOURCE = "Ohm's law against the rules' current budget"


def current_budget(network: PullNetwork) -> tuple[Bound | Check, ...]:
    budget = network.rules.current_budget
    if budget is None or not pulled_against(network):
        return ()
    why = (
        f"While the line is held opposite, the pull draws V/R continuously; the rules allow "
        f"at most {fmt(budget, 'A')}."
    )
    span = across(network, largest=True)
    if isinstance(span, Missing):
        return (
            unevaluated(
                "current-budget",
                "Current budget",
                BoundKind.MIN,
                _FORMULA,
                (span,),
                source=_SOURCE,
                explanation=why,
            ),
        )
    assert isinstance(span, Span)
    return (
        Bound(
            constraint="current-budget",
            title="Current budget",
            kind=BoundKind.MIN,
            ohms=span.volts / budget.magnitude("A"),
            hard=True,
            formula=_FORMULA,
            substituted=f"({span.text}) / {fmt(budget, 'A')}",
            terms=(*span.terms, Term("I_budget", budget)),
            source=_SOURCE,
            explanation=why,
            relax="a larger current budget in the rules",
            says=f"at which the pull draws no more than the {fmt(budget, 'A')} budget while held",
        ),
    )
