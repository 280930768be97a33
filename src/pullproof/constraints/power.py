"""The resistor itself: power while the line is held opposite, and working voltage.

Both apply only when a switch or driver can hold the line at the opposite level:
then the whole rail span sits across the pull for as long as it is held (a
pressed button, an asserted open-drain line). Without one, only input leakage
flows and the resistor is neither heated nor stressed.
"""

from __future__ import annotations

from ..network import Missing, PullNetwork
from ..results import Bound, BoundKind, Check, Term
from ._common import Span, across, eng, fmt, pct, pulled_against, unevaluated

__all__ = ["resistor_power", "working_voltage"]

_POWER_FORMULA = "R_lo ≥ V_max² / (P_rated · derating)"
_POWER_SOURCE = "P = V²/R (Joule heating); chip-resistor ratings at 70 °C, IEC 60115-8 convention"
_POWER_WHY = (
    "While a switch or driver holds the line at the opposite level, the whole rail span sits "
    "across the pull resistor and it dissipates V²/R."
)


def resistor_power(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """R_lo ≥ V_max² / (P_rated · derating) while a switch/driver pulls against the pull."""
    if not pulled_against(network):
        return ()
    res = network.resistor
    span = across(network, largest=True)
    missing: list[Missing] = [span] if isinstance(span, Missing) else []
    if res.power_rating is None:
        missing.append(
            Missing(
                f"power rating of {'/'.join(res.refs)}",
                res.refs[0],
                "add field 'Power' (e.g. 0.1W), or a chip size in the Value or footprint",
            )
        )
    if missing:
        return (
            unevaluated(
                "resistor-power",
                "Resistor power while pulled",
                BoundKind.MIN,
                _POWER_FORMULA,
                missing,
                source=_POWER_SOURCE,
                explanation=_POWER_WHY,
            ),
        )
    assert isinstance(span, Span) and res.power_rating is not None
    der = network.rules.derating
    allowed = res.power_rating.magnitude("W") * der.magnitude("")
    ohms = span.volts**2 / allowed
    return (
        Bound(
            constraint="resistor-power",
            title="Resistor power while pulled",
            kind=BoundKind.MIN,
            ohms=ohms,
            hard=True,
            formula=_POWER_FORMULA,
            substituted=(
                f"({span.text})² / ({fmt(res.power_rating, 'W')} · {pct(der.magnitude(''))})"
            ),
            terms=(*span.terms, Term("P_rated", res.power_rating), Term("derating", der)),
            source=_POWER_SOURCE,
            explanation=_POWER_WHY,
            relax="a larger resistor package (higher power rating) or a lower rail voltage",
            corner=f"V = {eng(span.volts, 'V')} across the resistor",
            says=(
                f"at which {'/'.join(res.refs)} dissipates no more than its derated "
                f"{eng(allowed, 'W')} while the line is held the other way"
            ),
        ),
    )


_WV_FORMULA = "V_max ≤ V_working"
_WV_SOURCE = "resistor working-voltage limit, IEC 60115 convention"
_WV_WHY = (
    "While the line is held opposite, the whole rail span sits across the resistor; it must "
    "not exceed the package's limiting element voltage."
)


def working_voltage(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """Check: the largest voltage across the resistor ≤ its working voltage."""
    if not pulled_against(network):
        return ()
    res = network.resistor
    span = across(network, largest=True)
    missing: list[Missing] = [span] if isinstance(span, Missing) else []
    if res.working_voltage is None:
        missing.append(
            Missing(
                f"working voltage of {'/'.join(res.refs)}",
                res.refs[0],
                "add field 'pullproof.working_voltage' (e.g. 50V), or a chip size (10k 0603)",
            )
        )
    if missing:
        return (
            Check(
                "working-voltage",
                "Resistor working voltage",
                None,
                True,
                _WV_FORMULA,
                "",
                (),
                _WV_SOURCE,
                _WV_WHY,
                tuple(missing),
            ),
        )
    assert isinstance(span, Span) and res.working_voltage is not None
    limit = res.working_voltage.magnitude("V")
    ok = span.volts <= limit
    who, wv = "/".join(res.refs), fmt(res.working_voltage, "V")
    sentence = (
        f"at most {eng(span.volts, 'V')} sits across {who}, within its {wv} working voltage"
        if ok
        else f"up to {eng(span.volts, 'V')} sits across {who}, above its {wv} working voltage"
    )
    return (
        Check(
            constraint="working-voltage",
            title="Resistor working voltage",
            ok=ok,
            hard=True,
            formula=_WV_FORMULA,
            substituted=f"{span.text} ≤ {fmt(res.working_voltage, 'V')}",
            terms=(*span.terms, Term("V_working", res.working_voltage)),
            source=_WV_SOURCE,
            explanation=_WV_WHY,
            sentence=sentence,
        ),
    )
