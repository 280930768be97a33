"""The RC step response of a pulled line: where an edge starts, where it ends, and its ln factor.

V(t) = V_f + (V_0 − V_f)·e^(−t/RC), so crossing from V_0 to V_1 takes
t = RC · ln((V_f − V_0)/(V_f − V_1)) (first-order RC step response).

A pull-up's rising edge ends at V_IH,min. It starts where the part that held the line low
leaves it: an open-drain or open-collector driver's V_OL, a transistor's V_OL (its
saturation voltage) or an optocoupler's V_CE(sat); with several, the lowest, which makes
the longest edge. A contact's edge is timed from V_IL,max, through the undefined band only:
a contact bounces, so below the band there is no clean edge to time. A driver level that is
only a default or an assumption, or that lies above V_IL,max, is not used either (a default
may not tighten a hard limit); the text then says why. A pull-down's falling edge runs from
V_IH,min to V_IL,max.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from ..network import Direction, InputLevels, PullNetwork
from ..provenance import Origin, Sourced
from ..results import Term
from ._common import fmt

__all__ = ["Edge", "EdgeStart", "edge", "edge_start"]


@dataclass(frozen=True)
class EdgeStart:
    """Where a rising edge starts: a driver's low level, or None for the band's own edge."""

    level: Sourced | None
    name: str  # "V_OL" or "V_CE(sat)"
    ref: str  # the driver
    why: str  # one sentence: which level and why

    @property
    def symbol(self) -> str:
        return f"{self.name}({self.ref})"


def edge_start(network: PullNetwork) -> EdgeStart:
    """The level a rising edge starts from (see the module text)."""
    if network.direction is not Direction.UP or not network.drivers:
        return EdgeStart(
            None, "", "", "The edge is timed through the undefined band, from V_IL,max."
        )
    levels: list[tuple[Sourced, str, str]] = []
    for d in network.drivers:
        low = d.vce_sat if d.kind == "optocoupler" else d.v_ol
        if low is not None:
            levels.append((low, "V_CE(sat)" if d.kind == "optocoupler" else "V_OL", d.ref))
    if not levels:
        return EdgeStart(
            None, "", "", "The drivers' low levels are unknown: the edge is timed from V_IL,max."
        )
    low, name, ref = min(levels, key=lambda x: x[0].magnitude("V"))
    if low.source.origin in (Origin.DEFAULT, Origin.ASSUMED):
        return EdgeStart(
            None,
            name,
            ref,
            f"{name}({ref}) = {fmt(low, 'V')} is only a default, so the edge is timed from "
            f"V_IL,max; state {ref}'s low level to time the edge from where {ref} leaves the line.",
        )
    why = f"The edge starts at {name}({ref}) = {fmt(low, 'V')}, where {ref} leaves the line."
    return EdgeStart(low, name, ref, why)


@dataclass(frozen=True)
class Edge:
    """One edge at one supply case: its ln factor and how it was written."""

    ln: float  # math.inf when the edge never reaches its end level
    formula: str  # "ln((V − V_OL)/(V − V_IH,min))"
    substituted: str
    terms: tuple[Term, ...]
    start: str  # which level the edge starts from, in words


def edge(
    network: PullNetwork, v: Sourced | None, lv: InputLevels, ref: str, start: EdgeStart
) -> Edge:
    """The edge a pull makes on an input with levels ``lv``, the pull rail at ``v`` (pull-up)."""
    assert lv.vih_min is not None and lv.vil_max is not None
    vih, vil = lv.vih_min, lv.vil_max
    ends = (Term(f"V_IH,min({ref})", vih), Term(f"V_IL,max({ref})", vil))
    if network.direction is Direction.DOWN:
        ratio = vih.magnitude("V") / vil.magnitude("V") if vil.magnitude("V") > 0 else math.inf
        return Edge(
            math.log(ratio),
            "ln(V_IH,min / V_IL,max)",
            f"ln({fmt(vih, 'V')} / {fmt(vil, 'V')})",
            ends,
            "from V_IH,min",
        )
    assert v is not None
    use_driver = start.level is not None and start.level.magnitude("V") < vil.magnitude("V")
    low = start.level if use_driver else vil
    sym, short = (start.symbol, start.name) if use_driver else ("V_IL,max", "V_IL,max")
    assert low is not None
    vv, top = v.magnitude("V"), vih.magnitude("V")
    ratio = (vv - low.magnitude("V")) / (vv - top) if vv > top else math.inf
    vs = fmt(v, "V")
    terms = (Term("V", v), *((Term(sym, low),) if use_driver else ()), *ends)
    return Edge(
        math.log(ratio),
        f"ln((V − {short})/(V − V_IH,min))",
        f"ln(({vs} − {fmt(low, 'V')}) / ({vs} − {fmt(vih, 'V')}))",
        terms,
        f"from {sym} = {fmt(low, 'V')}"
        + ("" if use_driver or start.level is None else f" ({start.symbol} lies above it)"),
    )
