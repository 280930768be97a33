"""Helpers shared by the constraint modules: formatting, bands, corners, sums."""

from __future__ import annotations

import math
from collections.abc import Callable, Iterable
from dataclasses import dataclass
from functools import lru_cache
from typing import Protocol

from ..network import Direction, InputLevels, InputOnNet, Missing, PullNetwork, PullResistor
from ..network import NetworkRules as Rules
from ..provenance import Origin, Provenance, Sourced, Status
from ..quantity import Qty
from ..results import Bound, BoundKind, Check, Term
from ..units import Q_, format_si

__all__ = [
    "LEVEL_HINT",
    "Builtin",
    "Constraint",
    "Item",
    "across",
    "band",
    "capacitance",
    "dedupe",
    "delta_t",
    "eng",
    "fmt",
    "input_missing",
    "pct",
    "pulled_against",
    "supply_cases",
    "unevaluated",
]

Item = Bound | Check

# Relative slack when matching a corner's supply to a rail voltage (float noise only).
_EPS = 1e-9


class Constraint(Protocol):
    """What the registry holds: an id, a title, and a call returning bounds and checks."""

    @property
    def id(self) -> str: ...

    @property
    def title(self) -> str: ...

    def __call__(self, network: PullNetwork) -> tuple[Bound | Check, ...]: ...


@dataclass(frozen=True)
class Builtin:
    """A constraint implemented by a plain function of the network."""

    id: str
    title: str
    fn: Callable[[PullNetwork], tuple[Bound | Check, ...]]

    def __call__(self, network: PullNetwork) -> tuple[Bound | Check, ...]:
        return self.fn(network)


# ---------------------------------------------------------------- formatting


# A review formats the same few values (rails, levels, fitted parts) many times over.
@lru_cache(maxsize=4096)
def eng(x: float, symbol: str) -> str:
    """Format ``x`` (in base units) with an SI prefix and four significant digits."""
    return format_si(x, symbol, sig=4, minus="-")


_BASE = {"V": "V", "A": "A", "ohm": "Ω", "F": "F", "s": "s", "W": "W"}


def fmt(value: Sourced, unit: str) -> str:
    """A sourced quantity as text in ``unit`` ("V", "A", "ohm", "F", "s", "W")."""
    q = value.value  # most are native and held in the unit asked: Sourced.magnitude's first case
    x = float(q.magnitude) if type(q) is Qty and q.unit == unit else value.magnitude(unit)
    return eng(x, _BASE[unit])


def pct(x: float) -> str:
    """A fraction as a percentage: 0.05 → "5 %"."""
    return f"{x * 100:.4g} %"


def default(value: float, unit: str, where: str, reason: str, status: Status) -> Sourced:
    """A named default or a standard's constant, with its provenance."""
    return Sourced(Q_(value, unit), Provenance(Origin.DEFAULT, where, status, reason))


LEVEL_HINT = "give the part a logic family (field 'pullproof.family') or a part-library entry"
C_IN_HINT = (
    "add field 'pullproof.c_in' (e.g. 10pF) on the part, a logic family or a part-library entry"
)

GROUND = default(0.0, "V", "ground (0 V)", "the far side of the switch or driver", Status.DEFAULT)


# ---------------------------------------------------------------- resistor band


def delta_t(rules: Rules) -> float:
    """The largest temperature excursion from the reference, in kelvin."""
    ref = rules.temp_ref.magnitude("degC")
    lo, hi = rules.temp_min.magnitude("degC"), rules.temp_max.magnitude("degC")
    return max(abs(lo - ref), abs(hi - ref))


def band(resistor: PullResistor, rules: Rules, ohms: float | None = None) -> tuple[float, float]:
    """(R_lo, R_hi) of a resistor over tolerance and TCR across the rules' temperature span.

    ``ohms`` overrides the nominal value (used for E-series candidates).
    """
    r = resistor.ohms.magnitude("ohm") if ohms is None else ohms
    tol = resistor.tolerance.magnitude("")
    drift = resistor.tcr.magnitude("1/K") * delta_t(rules)
    return r * (1 - tol) * (1 - drift), r * (1 + tol) * (1 + drift)


# ---------------------------------------------------------------- topology facts


def pulled_against(network: PullNetwork) -> bool:
    """True when a switch or driver can hold the line at the opposite level."""
    return bool(network.drivers) or any(s.pulls_against for s in network.switches)


@dataclass(frozen=True)
class Span:
    """The voltage across the pull resistor while the line is held at the opposite level."""

    volts: float
    text: str  # "24 V − 0 V"
    terms: tuple[Term, ...]


def across(network: PullNetwork, *, largest: bool) -> Span | Missing:
    """The voltage across the resistor while a switch/driver holds the line opposite.

    ``largest`` picks the worst case for a minimum bound (power, current); otherwise
    the smallest (for a wetting current that must still flow). The opposite side of
    a pull-up defaults to ground; a pull-down needs to know the rail it is pulled to.
    """
    rail, opp = network.rail, network.opposite_rail
    if network.direction is Direction.UP:
        far = rail.v_max if largest else rail.v_min
        near = GROUND if opp is None else (opp.v_min if largest else opp.v_max)
        far_sym, near_sym = "V_rail", "V_opp"
    else:
        if opp is None:
            return Missing(
                f"the rail the switch/driver drives net {network.net} to",
                "",
                "connect the switch or driver to a named supply rail that the rules define",
            )
        far = opp.v_max if largest else opp.v_min
        near = rail.v_min if largest else rail.v_max
        far_sym, near_sym = "V_opp", "V_rail"
    suffix = ",max" if largest else ",min"
    other = ",min" if largest else ",max"
    volts = far.magnitude("V") - near.magnitude("V")
    return Span(
        volts,
        f"{fmt(far, 'V')} − {fmt(near, 'V')}",
        (Term(far_sym + suffix, far), Term(near_sym + other, near)),
    )


def supply_cases(
    network: PullNetwork, inp: InputOnNet, *, rail_low: bool
) -> list[tuple[Sourced, InputLevels, str]]:
    """(rail voltage, the input's levels, corner label) cases to take the worst over.

    An input powered from the pull rail moves with it: each of its corners whose
    supply lies within the rail's range is paired with that same voltage. Otherwise
    (another supply, or no corner inside the rail range) the rail's worst voltage
    (``rail_low``: its minimum, else its maximum) meets every corner's levels, so the
    worst threshold over the input's supply range is used.
    """
    rail = network.rail
    lo, hi = rail.v_min.magnitude("V"), rail.v_max.magnitude("V")
    if inp.same_supply_as_pull:
        cases = []
        for c in inp.corners:
            v = c.vdd.magnitude("V")
            if lo * (1 - _EPS) <= v <= hi * (1 + _EPS):
                named = rail.v_min if math.isclose(v, lo) else rail.v_max
                src = named if math.isclose(v, named.magnitude("V")) else c.vdd
                cases.append((src, c, f"{inp.ref} powered from {rail.name} at {fmt(src, 'V')}"))
        if cases:
            return cases
    v_rail = rail.v_min if rail_low else rail.v_max
    at = f"{rail.name} at {fmt(v_rail, 'V')}"
    return [(v_rail, c, f"{at}, {inp.ref} levels at VDD = {fmt(c.vdd, 'V')}") for c in inp.corners]


@dataclass(frozen=True)
class Capacitance:
    """The capacitance an edge on the net charges: its total and every term with its source."""

    farads: float
    terms: tuple[Term, ...]
    missing: tuple[Missing, ...]


def capacitance(network: PullNetwork) -> Capacitance:
    """C on the net: an I2C bus figure (pins and wiring together) when the net is a bus line,
    else the rules' wiring capacitance plus every input's C_in; fitted capacitors always add.
    """
    terms: list[Term] = []
    missing: list[Missing] = []
    bus = network.rules.bus_capacitance
    if bus is not None:
        terms.append(Term("C_bus", bus))
    else:
        wiring = network.rules.wiring_capacitance
        if wiring is not None:
            terms.append(Term("C_wiring", wiring))
        for inp in network.inputs:
            c = worst_input_value(inp, "c_in")
            if c is None:
                missing.extend(input_missing(inp, "C_in", C_IN_HINT))
            else:
                terms.append(Term(f"C_in({inp.ref} pin {inp.pin})", c))
    terms.extend(Term(f"C({cap.ref})", cap.farads) for cap in network.capacitors)
    total = sum(t.value.magnitude("F") for t in terms)
    return Capacitance(total, tuple(terms), dedupe(missing))


def input_missing(inp: InputOnNet, what: str, hint: str) -> tuple[Missing, ...]:
    """Detection's own records for this input when it left any, else a generic one."""
    if inp.missing:
        return inp.missing
    return (Missing(f"{what} of {inp.ref} pin {inp.pin}", inp.ref, hint),)


def worst_input_value(inp: InputOnNet, attr: str, *, largest: bool = True) -> Sourced | None:
    """The largest (or smallest) value of one level/current over an input's corners.

    None when any corner lacks it (or the input has no corners).
    """
    values = [getattr(c, attr) for c in inp.corners]
    if not values or any(v is None for v in values):
        return None
    pick = max if largest else min
    return pick(values, key=lambda s: float(s.value.to_base_units().magnitude))  # type: ignore[no-any-return]


def unevaluated(
    cid: str,
    title: str,
    kind: BoundKind,
    formula: str,
    missing: Iterable[Missing],
    *,
    source: str,
    explanation: str,
    hard: bool = True,
) -> Bound:
    """A bound that could not be evaluated because ``missing`` values are unknown."""
    return Bound(
        constraint=cid,
        title=title,
        kind=kind,
        ohms=None,
        hard=hard,
        formula=formula,
        substituted="",
        terms=(),
        source=source,
        explanation=explanation,
        missing=dedupe(missing),
    )


def dedupe(missing: Iterable[Missing]) -> tuple[Missing, ...]:
    """Missing records in order, each (what, part) once."""
    seen: dict[tuple[str, str], Missing] = {}
    for m in missing:
        seen.setdefault((m.what, m.ref), m)
    return tuple(seen.values())
