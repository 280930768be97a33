"""Edges made by the pull must cross the undefined band quickly enough.

An RC step response from V_0 toward V reaches V_1 after t = RC·ln((V − V_0)/(V − V_1))
(first-order RC step response). A pull-up's rising edge ends at V_IH,min and starts where
the driver that held the line low leaves it (its V_OL or V_CE(sat)), else at V_IL,max; a
pull-down's falling edge runs from V_IH,min to V_IL,max (see :mod:`._rc`). So
R_hi ≤ t_max / (C · ln(…)). t_max is the rules' edge time or, for inputs that are not
Schmitt triggers, the family's longest allowed transition; Schmitt inputs are exempt
from the family limit. On an I2C line the bus form of UM10204 §7.1 eq. (1) applies:
Rp(max) = t_r / (0.8473 · C_b).

Capacitance: on an I2C line the bus capacitance (it stands for the pins and the
wiring), else the rules' wiring capacitance plus the inputs' C_in; capacitors fitted
on the net always add. Every term keeps its source.
Leakage is ignored here (it only shifts the final level; see high-level-holds).
"""

from __future__ import annotations

import math

from ..network import Direction, Missing, PullNetwork
from ..provenance import Sourced, Status
from ..results import Bound, BoundKind, Check, Term
from ._common import (
    LEVEL_HINT,
    capacitance,
    default,
    eng,
    fmt,
    input_missing,
    pulled_against,
    supply_cases,
    unevaluated,
    worst_input_value,
)
from ._rc import edge, edge_start

__all__ = ["I2C_RISE_CONSTANT", "edge_rate"]

# UM10204 §7.1 eq. (1) prints the 30 %→70 % constant rounded: ln(0.7/0.3) ≈ 0.8473.
I2C_RISE_CONSTANT = 0.8473
# UM10204 bus timing table, maximum rise time t_r (from memory).
_I2C_TR = {"standard": 1000e-9, "fast": 300e-9, "fast-plus": 120e-9}
_FORMULA_UP = "R_hi ≤ t_max / (C · ln((V − V_start)/(V − V_IH,min)))"
_FORMULA_DOWN = "R_hi ≤ t_max / (C · ln(V_IH,min / V_IL,max))"
_I2C_FORMULA = "Rp(max) = t_r / (0.8473 · C_b)"
_SOURCE = "first-order RC step response (circuit theory)"
_RELAX = "less capacitance on the net, a Schmitt-trigger input, or a longer allowed edge time"


def edge_rate(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """MAX bounds from the slowest allowed edge (generic and I2C forms)."""
    out: list[Bound | Check] = []
    rules = network.rules
    if rules.i2c_mode and network.direction is Direction.UP:
        out.append(_i2c(network, rules.i2c_mode))
    if not (pulled_against(network) or rules.edge_time_max is not None):
        return tuple(out)  # nothing ever moves the line: the pull makes no edges
    best: Bound | None = None
    up = network.direction is Direction.UP
    start = edge_start(network)
    for inp in network.inputs:
        t_max: Sourced | None = rules.edge_time_max
        if t_max is None and not inp.schmitt and not rules.i2c_mode:
            t_max = worst_input_value(inp, "max_transition", largest=False)
        if t_max is None:
            continue  # no limit known for this input
        why = (
            f"{inp.ref} pin {inp.pin} must see the {'rising' if up else 'falling'} edge cross "
            f"its undefined band within {fmt(t_max, 's')}."
        )
        cap = capacitance(network)
        missing = list(cap.missing)
        if not inp.corners or any(c.vih_min is None or c.vil_max is None for c in inp.corners):
            missing.extend(input_missing(inp, "V_IH,min and V_IL,max", LEVEL_HINT))
        if missing:
            formula = _FORMULA_UP if up else _FORMULA_DOWN
            return (
                *out,
                unevaluated(
                    "edge-rate",
                    "Edge through the undefined band",
                    BoundKind.MAX,
                    formula,
                    missing,
                    source=_SOURCE,
                    explanation=why,
                ),
            )
        for v, lv, corner in supply_cases(network, inp, rail_low=True):
            e = edge(network, v if up else None, lv, inp.ref, start)
            ohms = 0.0 if math.isinf(e.ln) else t_max.magnitude("s") / (cap.farads * e.ln)
            if best is not None and best.ohms is not None and ohms >= best.ohms:
                continue
            best = Bound(
                constraint="edge-rate",
                title="Edge through the undefined band",
                kind=BoundKind.MAX,
                ohms=ohms,
                hard=True,
                formula=f"R_hi ≤ t_max / (C · {e.formula})",
                substituted=f"{fmt(t_max, 's')} / ({eng(cap.farads, 'F')} · {e.substituted})",
                terms=(Term("t_max", t_max), *cap.terms, *e.terms),
                source=_SOURCE,
                explanation=f"{why} {start.why}" if up else why,
                relax=_RELAX,
                corner=f"{inp.ref} pin {inp.pin}: {corner}; edge {e.start}",
                says=f"at which the edge crosses the band of {inp.ref} pin {inp.pin} within "
                f"{fmt(t_max, 's')}",
            )
    return tuple(out) if best is None else (*out, best)


def _i2c(network: PullNetwork, mode: str) -> Bound:
    why = f"An I2C {mode}-mode line must rise from 0.3·VDD to 0.7·VDD within the bus's t_r."
    tr = default(
        _I2C_TR.get(mode, 1000e-9),
        "s",
        f"I2C t_r(max), {mode}-mode, UM10204",
        "bus timing table value, from memory",
        Status.FROM_MEMORY,
    )
    found = capacitance(network)
    cap, cterms, missing = found.farads, found.terms, list(found.missing)
    if missing or cap <= 0:
        if cap <= 0 and not missing:
            missing.append(
                Missing(
                    f"bus capacitance of net {network.net}",
                    "",
                    "set the bus capacitance in the project rules",
                )
            )
        return unevaluated(
            "edge-rate",
            "I2C rise time",
            BoundKind.MAX,
            _I2C_FORMULA,
            missing,
            source="I2C-bus specification UM10204 §7.1 eq. (1)",
            explanation=why,
        )
    return Bound(
        constraint="edge-rate",
        title="I2C rise time",
        kind=BoundKind.MAX,
        ohms=tr.magnitude("s") / (I2C_RISE_CONSTANT * cap),
        hard=True,
        formula=_I2C_FORMULA,
        substituted=f"{fmt(tr, 's')} / ({I2C_RISE_CONSTANT} · {eng(cap, 'F')})",
        terms=(Term("t_r", tr), *cterms),
        source="I2C-bus specification UM10204 §7.1 eq. (1)",
        explanation=why,
        relax="less bus capacitance (shorter wiring, fewer devices) or a slower bus mode",
        corner=f"{mode}-mode",
        says=f"at which the bus rises from 0.3·VDD to 0.7·VDD within its {fmt(tr, 's')} t_r",
    )
