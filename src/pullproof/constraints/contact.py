"""Switch contacts: the current a closed contact carries must suit it.

contact-rating: R_lo ≥ V_max / I_contact,max (the contact's rated current).
wetting-current: R_hi ≤ V_min / I_wet,min (enough current to break through
oxide and sulphide films; only for contacts that state a wetting minimum).
"""

from __future__ import annotations

from ..network import Missing, PullNetwork, SwitchOnNet
from ..results import Bound, BoundKind, Check, Term
from ._common import Span, across, eng, fmt, unevaluated

__all__ = ["contact_rating", "wetting_current"]

_RATING_FORMULA = "R_lo ≥ V_max / I_contact,max"
_WET_FORMULA = "R_hi ≤ V_min / I_wet,min"
_SOURCE = "Ohm's law: a closed contact carries the rail span over the pull resistance"


def contact_rating(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """One MIN bound per switch that pulls against the pull."""
    out: list[Bound | Check] = []
    for sw in network.switches:
        if not sw.pulls_against:
            continue
        why = f"When {sw.ref} closes it carries V/R, which must stay within its contact rating."
        span = across(network, largest=True)
        missing: list[Missing] = [span] if isinstance(span, Missing) else []
        if sw.contact_max is None:
            missing.append(
                Missing(
                    f"contact current rating of {sw.ref}",
                    sw.ref,
                    "add a field 'pullproof.contact_max' (e.g. 50mA) or a part-library entry",
                )
            )
        if missing:
            out.append(
                unevaluated(
                    "contact-rating",
                    "Switch contact rating",
                    BoundKind.MIN,
                    _RATING_FORMULA,
                    missing,
                    source=_SOURCE,
                    explanation=why,
                )
            )
            continue
        assert isinstance(span, Span) and sw.contact_max is not None
        out.append(
            Bound(
                constraint="contact-rating",
                title="Switch contact rating",
                kind=BoundKind.MIN,
                ohms=span.volts / sw.contact_max.magnitude("A"),
                hard=True,
                formula=_RATING_FORMULA,
                substituted=f"({span.text}) / {fmt(sw.contact_max, 'A')}",
                terms=(*span.terms, Term(f"I_contact,max({sw.ref})", sw.contact_max)),
                source=_SOURCE,
                explanation=why,
                relax=f"a switch rated for more current than {fmt(sw.contact_max, 'A')}",
                corner=f"{sw.ref} closed, V = {eng(span.volts, 'V')}",
                says=f"at which {sw.ref} carries no more than its rated {fmt(sw.contact_max, 'A')}",
            )
        )
    return tuple(out)


def wetting_current(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """One MAX bound per pulling-against switch with a stated wetting minimum."""
    return tuple(
        _wetting(network, sw)
        for sw in network.switches
        if sw.pulls_against and sw.wetting_min is not None
    )


def _wetting(network: PullNetwork, sw: SwitchOnNet) -> Bound:
    assert sw.wetting_min is not None
    why = (
        f"{sw.ref} needs at least {fmt(sw.wetting_min, 'A')} when closed to keep its contacts "
        "clean (wetting current)."
    )
    span = across(network, largest=False)
    if isinstance(span, Missing):
        return unevaluated(
            "wetting-current",
            "Contact wetting current",
            BoundKind.MAX,
            _WET_FORMULA,
            (span,),
            source=_SOURCE,
            explanation=why,
        )
    return Bound(
        constraint="wetting-current",
        title="Contact wetting current",
        kind=BoundKind.MAX,
        ohms=max(span.volts, 0.0) / sw.wetting_min.magnitude("A"),
        hard=True,
        formula=_WET_FORMULA,
        substituted=f"({span.text}) / {fmt(sw.wetting_min, 'A')}",
        terms=(*span.terms, Term(f"I_wet,min({sw.ref})", sw.wetting_min)),
        source=_SOURCE + "; wetting current, common practice",
        explanation=why,
        relax="a switch with a lower wetting current (gold-plated, low-level contacts)",
        corner=f"{sw.ref} closed, V = {eng(span.volts, 'V')}",
        says=f"at which {sw.ref} still gets its {fmt(sw.wetting_min, 'A')} wetting current",
    )
