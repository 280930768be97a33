"""The operating point of a pull at one resistance: what a designer asks once the window is known.

For a resistance R and its band [R_lo, R_hi] (the fitted part's tolerance and TCR over the
rules' temperature span):

- the current while a switch or driver (on an I2C line, any bus device) holds the line the
  other way: I_max = V_max / R_lo (Ohm's law, worst case), and, through a closed contact,
  I_min = V_min / R_hi;
- the resistor's dissipation meanwhile: P = V_max² / R_lo (Joule heating);
- the idle level at the net with the worst leakage: pull-up V_min − ΣI_high·R_hi,
  pull-down ΣI_low·R_hi (Ohm's law);
- where the capacitance is known, the edge time at R_hi: a rising edge
  t = R_hi·C·ln((V − V_start)/(V − V_IH,min)), V_start as in :mod:`.constraints._rc`; a
  falling one R_hi·C·ln(V_IH,min / V_IL,max) (RC step response); on an I2C line the rise time
  t_r = 0.8473·R_hi·C_b (UM10204 §7.1).

Every figure is a :class:`~pullproof.provenance.Sourced` number whose provenance gives the
formula with its substitution and the weakest status of its inputs; a figure that cannot
be computed says why, and names what is missing.
"""

from __future__ import annotations

import math
from collections.abc import Iterable

from .constraints._common import (
    LEVEL_HINT,
    Span,
    across,
    band,
    capacitance,
    eng,
    fmt,
    input_missing,
    pulled_against,
    supply_cases,
    worst_input_value,
)
from .constraints._rc import Edge, edge, edge_start
from .constraints.edges import I2C_RISE_CONSTANT
from .network import Direction, Missing, PullNetwork
from .provenance import Origin, Provenance, Sourced, Status
from .results import Figure, OperatingPoint, Term
from .units import Q_

__all__ = ["operating_point", "operating_points"]

# A derived number is only as sure as its least sure input.
_SURENESS = {
    Status.DEFAULT: 0,
    Status.FROM_MEMORY: 1,
    Status.COMMON_PRACTICE: 2,
    Status.CONFIRMED: 3,
    Status.USER: 4,
}


def _weakest(terms: Iterable[Term]) -> Status:
    return min(
        (t.value.source.status for t in terms), key=_SURENESS.__getitem__, default=Status.USER
    )


def _figure(
    symbol: str, value: float, unit: str, formula: str, substituted: str, terms: tuple[Term, ...],
    note: str = "",
) -> Figure:  # fmt: skip
    where = f"{formula} = {substituted}"
    src = Provenance(Origin.DERIVED, where, _weakest(terms))
    return Figure(symbol, Sourced(Q_(value, unit), src), formula, substituted, terms, note)


def _none(symbol: str, formula: str, note: str, missing: Iterable[Missing] = ()) -> Figure:
    return Figure(symbol, None, formula, "", (), note, tuple(missing))


class _Context:
    """What every resistance of one network shares: spans, leakage, levels, capacitance."""

    def __init__(self, network: PullNetwork) -> None:
        self.network = network
        self.up = network.direction is Direction.UP
        # on an I2C line the bus devices themselves pull the line low
        held = pulled_against(network) or bool(network.rules.i2c_mode and self.up)
        self.span_max: Span | Missing | None = across(network, largest=True) if held else None
        contacts = any(s.pulls_against for s in network.switches)
        self.span_min: Span | Missing | None = across(network, largest=False) if contacts else None
        self.leak, self.leak_terms, self.leak_missing = _leakage(network)
        self.threshold = _threshold(network)
        self.cap = capacitance(network)
        self.edge, self.edge_note, self.edge_missing = _worst_edge(network)

    def point(self, ohms: float, label: str) -> OperatingPoint:
        r_lo, r_hi = band(self.network.resistor, self.network.rules, ohms)
        lo = Term("R_lo", _band_value(r_lo, label, "lowest"))
        hi = Term("R_hi", _band_value(r_hi, label, "highest"))
        return OperatingPoint(
            ohms=ohms,
            band=(r_lo, r_hi),
            current_max=self._current_max(lo),
            current_min=self._current_min(hi),
            power=self._power(lo),
            idle=self._idle(hi),
            edge=self._edge(hi),
        )

    def _current_max(self, lo: Term) -> Figure:
        formula = "I_max = V_max / R_lo"
        span = self.span_max
        if span is None:
            return _none("I_max", formula, "Nothing on the net holds the line the other way.")
        if isinstance(span, Missing):
            return _none("I_max", formula, "", (span,))
        r = lo.value.magnitude("ohm")
        sub = f"({span.text}) / {fmt(lo.value, 'ohm')}"
        return _figure("I_max", span.volts / r, "A", formula, sub, (*span.terms, lo))

    def _current_min(self, hi: Term) -> Figure:
        formula = "I_min = V_min / R_hi"
        span = self.span_min
        if span is None:
            return _none("I_min", formula, "No contact on the net closes against the pull.")
        if isinstance(span, Missing):
            return _none("I_min", formula, "", (span,))
        r = hi.value.magnitude("ohm")
        sub = f"({span.text}) / {fmt(hi.value, 'ohm')}"
        note = "The least current through a closed contact (its wetting current)."
        return _figure("I_min", span.volts / r, "A", formula, sub, (*span.terms, hi), note)

    def _power(self, lo: Term) -> Figure:
        formula = "P = V_max² / R_lo"
        span = self.span_max
        if span is None:
            return _none("P", formula, "Only leakage flows: the resistor stays cold.")
        if isinstance(span, Missing):
            return _none("P", formula, "", (span,))
        watts = span.volts**2 / lo.value.magnitude("ohm")
        sub = f"({span.text})² / {fmt(lo.value, 'ohm')}"
        res, rules = self.network.resistor, self.network.rules
        terms: tuple[Term, ...] = (*span.terms, lo)
        note = ""
        if res.power_rating is not None:
            allowed = res.power_rating.magnitude("W") * rules.derating.magnitude("")
            share = watts / allowed if allowed > 0 else math.inf
            derated = rules.derating.magnitude("") * 100
            note = (
                f"{share * 100:.3g} % of the {eng(allowed, 'W')} the rules allow "
                f"({fmt(res.power_rating, 'W')} rated, derated to {derated:.3g} %)."
            )
            terms = (*terms, Term("P_rated", res.power_rating), Term("derating", rules.derating))
        return _figure("P", watts, "W", formula, sub, terms, note)

    def _idle(self, hi: Term) -> Figure:
        cur = "ΣI_high" if self.up else "ΣI_low"
        formula = f"V_idle = V_min − {cur} · R_hi" if self.up else f"V_idle = {cur} · R_hi"
        if self.leak_missing:
            return _none("V_idle", formula, "", self.leak_missing)
        if not self.network.inputs and not self.network.drivers:
            return _none("V_idle", formula, "No input on the net.")
        drop = self.leak * hi.value.magnitude("ohm")
        leak_text = eng(self.leak, "A")
        terms: tuple[Term, ...] = (*self.leak_terms, hi)
        if self.up:
            v_min = self.network.rail.v_min
            volts = v_min.magnitude("V") - drop
            sub = f"{fmt(v_min, 'V')} − {leak_text} · {fmt(hi.value, 'ohm')}"
            terms = (Term("V_min", v_min), *terms)
        else:
            volts = drop
            sub = f"{leak_text} · {fmt(hi.value, 'ohm')}"
        note = ""
        if self.threshold is not None:
            thr, room = self.threshold
            gap = room - drop  # pull-up: V − ΣI·R_hi − V_IH; pull-down: V_IL − ΣI·R_hi
            side = "above" if self.up else "below"
            if gap >= 0:
                note = f"{eng(gap, 'V')} {side} {thr.symbol} = {fmt(thr.value, 'V')}."
            else:
                note = f"Not {side} {thr.symbol} = {fmt(thr.value, 'V')}: the level does not hold."
            terms = (*terms, thr)
        return _figure("V_idle", volts, "V", formula, sub, terms, note)

    def _edge(self, hi: Term) -> Figure:
        network = self.network
        if network.rules.i2c_mode and self.up:
            formula = f"t_r = {I2C_RISE_CONSTANT} · R_hi · C_b"
            note = "The I2C rise time, 30 % to 70 % of VDD (UM10204 §7.1)."
            k = I2C_RISE_CONSTANT
            return self._timed("t_r", formula, hi, k, f"{k}", note, ())
        if self.edge is None:
            formula = "t = R_hi · C · ln(…)"
            return _none("t_edge", formula, self.edge_note, self.edge_missing)
        e = self.edge
        formula = f"t = R_hi · C · {e.formula}"
        way = "Rising" if self.up else "Falling"
        note = f"{way} edge {e.start}, to the far end of the undefined band."
        return self._timed("t_edge", formula, hi, e.ln, e.substituted, note, e.terms)

    def _timed(
        self, symbol: str, formula: str, hi: Term, factor: float, factor_text: str, note: str,
        extra: tuple[Term, ...],
    ) -> Figure:  # fmt: skip
        cap = self.cap
        if cap.missing:
            return _none(symbol, formula, "", cap.missing)
        if cap.farads <= 0:
            return _none(symbol, formula, "No capacitance is known on the net.")
        if math.isinf(factor):
            return _none(symbol, formula, "The edge never reaches the input's high level.")
        seconds = hi.value.magnitude("ohm") * cap.farads * factor
        sub = f"{fmt(hi.value, 'ohm')} · {eng(cap.farads, 'F')} · {factor_text}"
        return _figure(symbol, seconds, "s", formula, sub, (hi, *cap.terms, *extra), note)


def _band_value(ohms: float, label: str, end: str) -> Sourced:
    where = f"{end} resistance of {label} over tolerance and TCR"
    return Sourced(Q_(ohms, "ohm"), Provenance(Origin.DERIVED, where, Status.USER))


def _leakage(network: PullNetwork) -> tuple[float, tuple[Term, ...], tuple[Missing, ...]]:
    """ΣI through the pull while the line idles: each input's worst current, drivers' leakage."""
    up = network.direction is Direction.UP
    key, sym = ("i_high", "I_high") if up else ("i_low", "I_low")
    terms: list[Term] = []
    missing: list[Missing] = []
    for inp in network.inputs:
        w = worst_input_value(inp, key)
        if w is None:
            missing.extend(input_missing(inp, sym, LEVEL_HINT))
        else:
            terms.append(Term(f"{sym}({inp.ref} pin {inp.pin})", w))
    for d in network.drivers:
        if d.i_off is None:
            missing.append(
                Missing(f"off-state leakage of {d.ref} pin {d.pin}", d.ref,
                        "add field 'pullproof.i_off' (e.g. 1uA) on the driving part")
            )  # fmt: skip
        else:
            terms.append(Term(f"I_off({d.ref})", d.i_off))
    total = sum(t.value.magnitude("A") for t in terms)
    return total, tuple(terms), tuple(missing)


def _threshold(network: PullNetwork) -> tuple[Term, float] | None:
    """The level the idle line must stay beyond, and the room the rail leaves above it.

    Pull-up: the input level V_IH,min of the supply case where the rail leaves the least
    room (V − V_IH,min); pull-down: the lowest V_IL,max. None when a level is unknown.
    """
    up = network.direction is Direction.UP
    found: list[tuple[Term, float]] = []
    for inp in network.inputs:
        for v, lv, _ in supply_cases(network, inp, rail_low=True):
            level = lv.vih_min if up else lv.vil_max
            if level is None:
                return None
            term = Term(f"{'V_IH,min' if up else 'V_IL,max'}({inp.ref})", level)
            room = v.magnitude("V") - level.magnitude("V") if up else level.magnitude("V")
            found.append((term, room))
    return min(found, key=lambda f: f[1], default=None)


def _worst_edge(network: PullNetwork) -> tuple[Edge | None, str, tuple[Missing, ...]]:
    """The slowest edge over every input and supply case (largest ln factor)."""
    if not pulled_against(network) and network.rules.edge_time_max is None:
        return None, "Nothing on the net moves the line, so the pull makes no edge.", ()
    if not network.inputs:
        return None, "No input on the net.", ()
    up = network.direction is Direction.UP
    start = edge_start(network)
    worst: Edge | None = None
    missing: list[Missing] = []
    for inp in network.inputs:
        if not inp.corners or any(c.vih_min is None or c.vil_max is None for c in inp.corners):
            missing.extend(input_missing(inp, "V_IH,min and V_IL,max", LEVEL_HINT))
            continue
        for v, lv, _ in supply_cases(network, inp, rail_low=True):
            e = edge(network, v if up else None, lv, inp.ref, start)
            if worst is None or e.ln > worst.ln:
                worst = e
    if missing:
        return None, "", tuple(missing)
    return worst, "", ()


def operating_point(network: PullNetwork, ohms: float | None = None) -> OperatingPoint:
    """The operating point at ``ohms`` (default: the fitted value) over its whole band."""
    return operating_points(network, () if ohms is None else (ohms,), fitted=ohms is None)[0]


def operating_points(
    network: PullNetwork, values: Iterable[float], *, fitted: bool = False
) -> tuple[OperatingPoint, ...]:
    """Operating points at each of ``values`` (ohms), and first at the fitted value when
    ``fitted``; the candidates' bands use the fitted part's tolerance and TCR."""
    ctx = _Context(network)
    res = network.resistor
    out = []
    if fitted:
        out.append(ctx.point(res.ohms.magnitude("ohm"), "/".join(res.refs)))
    tol = res.tolerance.magnitude("")
    for v in values:
        out.append(ctx.point(v, f"{eng(v, 'Ω')} at ±{tol * 100:.3g} %"))
    return tuple(out)
