"""The idle level must hold: leakage through the pull must not drag the line past a threshold.

Pull-up: R_hi ≤ (V_min − V_IH,min − m − I_k·R_s) / ΣI_high.
Pull-down: R_hi ≤ (V_IL,max − m − I_k·R_s) / ΣI_low.
ΣI sums every input's worst current (TTL inputs source I_IL out of the pin, so
pull-downs on them get small) and the off-state leakage of drivers (opto dark
current). An input reached through a series resistor R_s loses its own drop I_k·R_s.
"""

from __future__ import annotations

from ..network import Direction, InputOnNet, Missing, PullNetwork
from ..provenance import Sourced
from ..results import Bound, BoundKind, Check, Term
from ._common import (
    LEVEL_HINT,
    eng,
    fmt,
    input_missing,
    supply_cases,
    unevaluated,
    worst_input_value,
)

__all__ = ["high_level_holds", "low_level_holds"]

_SOURCE = "Ohm's law with the inputs' guaranteed levels and currents, worst supply corner"


def high_level_holds(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """Pull-up: the line must stay above V_IH,min + m while leakage flows through R."""
    if network.direction is not Direction.UP or not network.inputs:
        return ()
    return _hold(network, up=True)


def low_level_holds(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """Pull-down: the line must stay below V_IL,max − m while input current flows through R."""
    if network.direction is not Direction.DOWN or not network.inputs:
        return ()
    return _hold(network, up=False)


def _hold(network: PullNetwork, *, up: bool) -> tuple[Bound | Check, ...]:
    cid, title = (
        ("high-level-holds", "High level holds")
        if up
        else (
            "low-level-holds",
            "Low level holds",
        )
    )
    cur, lvl = ("i_high", "vih_min") if up else ("i_low", "vil_max")
    cur_sym, lvl_sym = ("I_high", "V_IH,min") if up else ("I_low", "V_IL,max")
    formula = (
        "R_hi ≤ (V_min − V_IH,min − m − I_k·R_s) / ΣI_high"
        if up
        else "R_hi ≤ (V_IL,max − m − I_k·R_s) / ΣI_low"
    )
    explanation = (
        "While the line idles high, the inputs' and drivers' leakage flows through the pull-up; "
        "its drop must leave every input above V_IH,min by the margin."
        if up
        else "While the line idles low, the current the inputs push out flows through the "
        "pull-down; its drop must leave every input below V_IL,max by the margin."
    )
    missing: list[Missing] = []
    leak: list[Term] = []
    for d in network.drivers:
        if d.i_off is None:
            missing.append(
                Missing(
                    f"off-state leakage of {d.ref} pin {d.pin}",
                    d.ref,
                    "add field 'pullproof.i_off' (off-state leakage, e.g. 1uA) on the driving part",
                )
            )
        else:
            leak.append(Term(f"I_off({d.ref})", d.i_off))
    worst: dict[int, Sourced] = {}
    for k, inp in enumerate(network.inputs):
        w = worst_input_value(inp, cur)
        if w is None:
            missing.extend(input_missing(inp, cur_sym, LEVEL_HINT))
        else:
            worst[k] = w
        if any(getattr(c, lvl) is None for c in inp.corners) or not inp.corners:
            missing.extend(input_missing(inp, lvl_sym, LEVEL_HINT))
    if missing:
        return (
            unevaluated(
                cid, title, BoundKind.MAX, formula, missing, source=_SOURCE, explanation=explanation
            ),
        )
    leak_amps = sum(t.value.magnitude("A") for t in leak)
    m = network.rules.margin
    best: Bound | None = None
    for k, inp in enumerate(network.inputs):
        others = sum(w.magnitude("A") for j, w in worst.items() if j != k) + leak_amps
        cases = (
            supply_cases(network, inp, rail_low=True)
            if up
            else [(None, c, f"{inp.ref} levels at VDD = {fmt(c.vdd, 'V')}") for c in inp.corners]
        )
        for v_rail, levels, corner in cases:
            i_k: Sourced = getattr(levels, cur)
            thr: Sourced = getattr(levels, lvl)
            total = i_k.magnitude("A") + others
            if total <= 0:
                continue  # no current: this level holds for any resistance
            r_s = inp.series_ohms.magnitude("ohm") if inp.series_ohms else 0.0
            drop = i_k.magnitude("A") * r_s
            if up:
                assert v_rail is not None
                head = v_rail.magnitude("V") - thr.magnitude("V") - m.magnitude("V") - drop
                text = f"{fmt(v_rail, 'V')} − {fmt(thr, 'V')} − {fmt(m, 'V')}"
            else:
                head = thr.magnitude("V") - m.magnitude("V") - drop
                text = f"{fmt(thr, 'V')} − {fmt(m, 'V')}"
            if drop:
                text += f" − {eng(drop, 'V')}"
            ohms = max(head, 0.0) / total
            if best is not None and best.ohms is not None and ohms >= best.ohms:
                continue
            terms = _terms(network, inp, k, worst, leak, v_rail, thr, i_k, lvl_sym, cur_sym)
            best = Bound(
                constraint=cid,
                title=title,
                kind=BoundKind.MAX,
                ohms=ohms,
                hard=True,
                formula=formula,
                substituted=f"({text}) / {eng(total, 'A')}",
                terms=terms,
                source=_SOURCE,
                explanation=explanation
                + (
                    ""
                    if head > 0
                    else " Here no resistance can do it: the threshold and margin"
                    " leave no headroom."
                ),
                relax=(
                    "lower-leakage inputs or drivers, fewer inputs on the net, a smaller noise "
                    "margin" + (", or a higher minimum rail voltage" if up else "")
                ),
                corner=f"worst at {inp.ref} pin {inp.pin}: {corner}",
                says=(
                    f"at which the leakage still leaves {inp.ref} pin {inp.pin} above its "
                    f"{fmt(thr, 'V')} V_IH,min{_with(m)}"
                    if up
                    else f"at which the current out of the inputs still leaves {inp.ref} pin "
                    f"{inp.pin} below its {fmt(thr, 'V')} V_IL,max{_with(m)}"
                ),
            )
    return () if best is None else (best,)


def _with(margin: Sourced) -> str:
    volts = margin.magnitude("V")
    return f" with the {fmt(margin, 'V')} margin" if volts > 0 else ""


def _terms(
    network: PullNetwork,
    inp: InputOnNet,
    k: int,
    worst: dict[int, Sourced],
    leak: list[Term],
    v_rail: Sourced | None,
    thr: Sourced,
    i_k: Sourced,
    lvl_sym: str,
    cur_sym: str,
) -> tuple[Term, ...]:
    terms: list[Term] = []
    if v_rail is not None:
        terms.append(Term("V_min", v_rail))
    terms.append(Term(f"{lvl_sym}({inp.ref})", thr))
    terms.append(Term("m", network.rules.margin))
    terms.append(Term(f"{cur_sym}({inp.ref})", i_k))
    if inp.series_ohms is not None:
        terms.append(Term(f"R_s({inp.series_ref or inp.ref})", inp.series_ohms))
    for j, w in worst.items():
        if j != k:
            other = network.inputs[j]
            terms.append(Term(f"{cur_sym}({other.ref} pin {other.pin})", w))
    terms.extend(leak)
    return tuple(terms)
