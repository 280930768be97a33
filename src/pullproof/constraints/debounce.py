"""Debounce hold-off: with a capacitor on a switched net, RC must outlast the bounce.

After the contact opens (or bounces open) the pull charges the capacitor from the
held level; it must not reach the level the input could read as the released
state within t_bounce. Pull-up (charging from 0 toward V_max): the lowest voltage
an input may read as high is V_T+,min for a Schmitt input and V_IL,max otherwise,
so R_lo ≥ t_bounce / (C · ln(V_max / (V_max − V_th))). Pull-down (discharging from
the switched rail V toward 0): the highest voltage read as low is V_T−,max (Schmitt)
or V_IH,min, so R_lo ≥ t_bounce / (C · ln(V / V_th)) at the rail's minimum.
Only fitted capacitors count (input capacitance would flatter the result).
"""

from __future__ import annotations

import math

from ..network import Direction, Missing, PullNetwork
from ..provenance import Sourced
from ..results import Bound, BoundKind, Check, Term
from ._common import LEVEL_HINT, Span, across, eng, fmt, input_missing, unevaluated

__all__ = ["debounce_holdoff"]

_UP = "R_lo ≥ t_bounce / (C · ln(V_max / (V_max − V_th)))"
_DOWN = "R_lo ≥ t_bounce / (C · ln(V_min / V_th))"
_SOURCE = "first-order RC step response (circuit theory)"


def debounce_holdoff(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """One MIN bound per switch that pulls against, when a capacitor sits on the net."""
    if not network.capacitors or not network.inputs:
        return ()
    out: list[Bound | Check] = []
    up = network.direction is Direction.UP
    cap = sum(c.farads.magnitude("F") for c in network.capacitors)
    cterms = tuple(Term(f"C({c.ref})", c.farads) for c in network.capacitors)
    for sw in network.switches:
        if not sw.pulls_against:
            continue
        t_b = sw.bounce_time or network.rules.bounce_time
        if t_b is None:
            continue  # no bounce time stated: nothing to hold off
        why = (
            f"After {sw.ref} opens (or bounces open), the pull recharges {cap * 1e9:.4g} nF; "
            f"it must not reach the input's switching level within {fmt(t_b, 's')}."
        )
        span = across(network, largest=up)
        missing: list[Missing] = [span] if isinstance(span, Missing) else []
        thr: tuple[Sourced, str] | None = None
        for inp in network.inputs:
            for lv in inp.corners:
                if inp.schmitt and up:
                    cand, sym = lv.vt_plus_min, "V_T+,min"
                elif inp.schmitt:
                    cand, sym = lv.vt_minus_max, "V_T−,max"
                else:
                    cand, sym = (lv.vil_max, "V_IL,max") if up else (lv.vih_min, "V_IH,min")
                if cand is None:
                    missing.extend(input_missing(inp, sym, LEVEL_HINT))
                    continue
                worse = thr is None or (
                    cand.magnitude("V") < thr[0].magnitude("V")
                    if up
                    else cand.magnitude("V") > thr[0].magnitude("V")
                )
                if worse:
                    thr = (cand, f"{sym}({inp.ref})")
            if not inp.corners:
                missing.extend(input_missing(inp, "switching thresholds", LEVEL_HINT))
        formula = _UP if up else _DOWN
        if missing or thr is None:
            out.append(
                unevaluated(
                    "debounce-holdoff",
                    "Debounce hold-off",
                    BoundKind.MIN,
                    formula,
                    missing,
                    source=_SOURCE,
                    explanation=why,
                )
            )
            continue
        assert isinstance(span, Span)
        v, vth = span.volts, thr[0].magnitude("V")
        if up:
            ln = math.log(v / (v - vth)) if 0 < vth < v else math.inf
            sub = f"ln({eng(v, 'V')} / ({eng(v, 'V')} − {fmt(thr[0], 'V')}))"
        else:
            ln = math.log(v / vth) if 0 < vth < v else math.inf
            sub = f"ln({eng(v, 'V')} / {fmt(thr[0], 'V')})"
        ohms = 0.0 if math.isinf(ln) else t_b.magnitude("s") / (cap * ln)
        out.append(
            Bound(
                constraint="debounce-holdoff",
                title="Debounce hold-off",
                kind=BoundKind.MIN,
                ohms=ohms,
                hard=True,
                formula=formula,
                substituted=f"{fmt(t_b, 's')} / ({eng(cap, 'F')} · {sub})",
                terms=(Term("t_bounce", t_b), *cterms, *span.terms, Term(thr[1], thr[0])),
                source=_SOURCE,
                explanation=why,
                relax="a larger debounce capacitor, a switch that bounces for less time, or a "
                "shorter hold-off in the rules",
                corner=f"{sw.ref} released, V = {eng(v, 'V')}",
                says=f"at which the RC holds the input through {sw.ref}'s "
                f"{fmt(t_b, 's')} of bounce",
            )
        )
    return tuple(out)
