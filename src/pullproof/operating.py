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
from .results import Figure, OperatingPoint, PointValues, Term
from .units import Q_

__all__ = ["analyse", "operating_point", "operating_points"]

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
    return Figure(symbol, Sourced(Q_(value, unit), src), formula, substituted, terms, note,
                  unit=unit)  # fmt: skip


def _none(symbol: str, formula: str, note: str, missing: Iterable[Missing] = ()) -> Figure:
    return Figure(symbol, None, formula, "", (), note, tuple(missing))


class _Context:
    """What every resistance of one network shares: spans, leakage, levels, capacitance, and
    the same as plain floats for the many candidates (pint quantities are slow)."""

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
        self.i2c = bool(network.rules.i2c_mode and self.up)
        self.scale = band(network.resistor, network.rules, 1.0)  # R_lo, R_hi of a 1 Ω part
        self.v_max = self.span_max.volts if isinstance(self.span_max, Span) else None
        self.v_low = self.span_min.volts if isinstance(self.span_min, Span) else None
        self.idle_known = not self.leak_missing and bool(network.inputs or network.drivers)
        self.v_rail = network.rail.v_min.magnitude("V") if self.up else 0.0
        factor = I2C_RISE_CONSTANT if self.i2c else (self.edge.ln if self.edge else None)
        self.factor = factor
        timed = factor is not None and not math.isinf(factor) and not self.cap.missing
        self.rc = factor * self.cap.farads if timed and factor and self.cap.farads > 0 else None

    def values(self, ohms: float) -> PointValues:
        """The figures at ``ohms`` as floats in base units, without text or provenance."""
        return self.many((ohms,))[0]

    def many(self, values: Iterable[float]) -> tuple[PointValues, ...]:
        """:meth:`values` at each of ``values``: one loop over the many E-series candidates,
        the network's numbers read once."""
        lo_scale, hi_scale = self.scale
        v, v_low, rc, v_rail = self.v_max, self.v_low, self.rc, self.v_rail
        leak = (-1.0 if self.up else 1.0) * self.leak
        idle_known = self.idle_known
        out = []
        for ohms in values:
            r_lo, r_hi = ohms * lo_scale, ohms * hi_scale
            out.append(
                PointValues(
                    ohms,
                    (r_lo, r_hi),
                    None if v is None else v / r_lo,
                    None if v_low is None else v_low / r_hi,
                    None if v is None else v * v / r_lo,
                    v_rail + leak * r_hi if idle_known else None,
                    None if rc is None else r_hi * rc,
                )
            )
        return tuple(out)


def _point(ctx: _Context, ohms: float, label: str) -> OperatingPoint:
    """The full operating point at ``ohms``: the floats of :meth:`_Context.values` with their
    formulas, substitutions and sources."""
    vals = ctx.values(ohms)
    r_lo, r_hi = vals.band
    lo = Term("R_lo", _band_value(r_lo, label, "lowest"))
    hi = Term("R_hi", _band_value(r_hi, label, "highest"))
    return OperatingPoint(
        ohms=ohms,
        band=vals.band,
        current_max=_current("I_max", ctx.span_max, lo, vals.current_max,
                             "Nothing on the net holds the line the other way.", ""),
        current_min=_current("I_min", ctx.span_min, hi, vals.current_min,
                             "No contact on the net closes against the pull.",
                             "The least current through a closed contact (its wetting current)."),
        power=_power(ctx, lo, vals.power),
        idle=_idle(ctx, hi, vals.idle),
        edge=_edge(ctx, hi, vals.edge),
    )  # fmt: skip


def _current(
    symbol: str, span: Span | Missing | None, r: Term, amps: float | None, absent: str, note: str
) -> Figure:
    formula = f"{symbol} = {'V_max / R_lo' if symbol == 'I_max' else 'V_min / R_hi'}"
    if span is None:
        return _none(symbol, formula, absent)
    if isinstance(span, Missing) or amps is None:
        return _none(symbol, formula, "", (span,) if isinstance(span, Missing) else ())
    sub = f"({span.text}) / {eng(r.value.magnitude('ohm'), 'Ω')}"
    return _figure(symbol, amps, "A", formula, sub, (*span.terms, r), note)


def _power(ctx: _Context, lo: Term, watts: float | None) -> Figure:
    formula = "P = V_max² / R_lo"
    span = ctx.span_max
    if span is None:
        return _none("P", formula, "Only leakage flows: the resistor stays cold.")
    if isinstance(span, Missing) or watts is None:
        return _none("P", formula, "", (span,) if isinstance(span, Missing) else ())
    sub = f"({span.text})² / {eng(lo.value.magnitude('ohm'), 'Ω')}"
    res, rules = ctx.network.resistor, ctx.network.rules
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


def _idle(ctx: _Context, hi: Term, volts: float | None) -> Figure:
    cur = "ΣI_high" if ctx.up else "ΣI_low"
    formula = f"V_idle = V_min − {cur} · R_hi" if ctx.up else f"V_idle = {cur} · R_hi"
    if ctx.leak_missing:
        return _none("V_idle", formula, "", ctx.leak_missing)
    if volts is None:
        return _none("V_idle", formula, "No input on the net.")
    r_hi = hi.value.magnitude("ohm")
    drop = ctx.leak * r_hi
    product = f"{eng(ctx.leak, 'A')} · {eng(r_hi, 'Ω')}"
    terms: tuple[Term, ...] = (*ctx.leak_terms, hi)
    if ctx.up:
        v_min = ctx.network.rail.v_min
        sub = f"{eng(ctx.v_rail, 'V')} − {product}"
        terms = (Term("V_min", v_min), *terms)
    else:
        sub = product
    note = ""
    if ctx.threshold is not None:
        thr, room = ctx.threshold
        gap = room - drop  # pull-up: V − ΣI·R_hi − V_IH; pull-down: V_IL − ΣI·R_hi
        side = "above" if ctx.up else "below"
        level = f"{thr.symbol} = {fmt(thr.value, 'V')}"
        if gap >= 0:
            note = f"{eng(gap, 'V')} {side} {level}."
        else:
            note = f"Not {side} {level}: the level does not hold."
        terms = (*terms, thr)
    return _figure("V_idle", volts, "V", formula, sub, terms, note)


def _edge(ctx: _Context, hi: Term, seconds: float | None) -> Figure:
    extra: tuple[Term, ...] = ()
    if ctx.i2c:
        symbol, formula = "t_r", f"t_r = {I2C_RISE_CONSTANT} · R_hi · C_b"
        note = "The I2C rise time, 30 % to 70 % of VDD (UM10204 §7.1)."
        factor_text = f"{I2C_RISE_CONSTANT}"
    elif ctx.edge is None:
        return _none("t_edge", "t = R_hi · C · ln(…)", ctx.edge_note, ctx.edge_missing)
    else:
        e = ctx.edge
        symbol, formula = "t_edge", f"t = R_hi · C · {e.formula}"
        way = "Rising" if ctx.up else "Falling"
        note = f"{way} edge {e.start}, to the far end of the undefined band."
        factor_text, extra = e.substituted, e.terms
    cap = ctx.cap
    if cap.missing:
        return _none(symbol, formula, "", cap.missing)
    if cap.farads <= 0:
        return _none(symbol, formula, "No capacitance is known on the net.")
    if seconds is None:
        return _none(symbol, formula, "The edge never reaches the input's high level.")
    sub = f"{eng(hi.value.magnitude('ohm'), 'Ω')} · {eng(cap.farads, 'F')} · {factor_text}"
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


def operating_point(network: PullNetwork) -> OperatingPoint:
    """The operating point at the fitted value over its whole band, every figure sourced."""
    res = network.resistor
    return _point(_Context(network), res.ohms.magnitude("ohm"), "/".join(res.refs))


def analyse(
    network: PullNetwork, values: Iterable[float]
) -> tuple[OperatingPoint, tuple[PointValues, ...]]:
    """The full operating point at the fitted value and the numbers at each of ``values``,
    sharing the work that does not depend on the resistance."""
    ctx = _Context(network)
    res = network.resistor
    point = _point(ctx, res.ohms.magnitude("ohm"), "/".join(res.refs))
    return point, ctx.many(values)


def operating_points(network: PullNetwork, values: Iterable[float]) -> tuple[PointValues, ...]:
    """The operating point's numbers at each of ``values`` (ohms, e.g. the E-series candidates);
    the bands use the fitted part's tolerance and TCR."""
    return _Context(network).many(values)
