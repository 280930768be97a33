"""A default never makes a hard fail: limits that rest on an assumed value are soft.

Some numbers stand in for a property nothing in the schematic states: a switch's wetting
current or contact rating, a resistor's power rating read from its size, an
optocoupler's ageing, a transistor's sink current, the resistor tolerance and TCR the
rules assume, the I2C bus capacitance. They carry the origin
:attr:`~pullproof.provenance.Origin.ASSUMED`. A bound or check whose terms include one is
made soft here, titled "(assumed)" and told what would make it hard; a stated value
(a field, a part-library entry, a rules key) makes it hard again.

The resistor's own band works the same way: when its tolerance or TCR is assumed, a hard
limit the band crosses but the nominal value meets cannot fail the network on its own.
"""

from __future__ import annotations

from dataclasses import replace

from .network import PullResistor
from .provenance import Origin, Sourced
from .results import Bound, BoundKind, Check

__all__ = ["assumed_band", "nominal_meets", "soften"]


def _assumed(values: list[Sourced]) -> tuple[str, ...]:
    return tuple(dict.fromkeys(v.source.where for v in values if v.source.origin is Origin.ASSUMED))


def soften(item: Bound | Check) -> Bound | Check:
    """``item`` made soft when it rests on an assumed value; unchanged otherwise."""
    rests_on = _assumed([t.value for t in item.terms])
    if not rests_on:
        return item
    note = (
        f"It rests on {', '.join(rests_on)}, which no field, part library or rules key "
        "states, so it is a soft limit; state the value to make it hard."
    )
    explanation = f"{item.explanation} {note}".strip()
    if not item.hard:
        return replace(item, assumed=rests_on, explanation=explanation)
    return replace(
        item, hard=False, title=f"{item.title} (assumed)", explanation=explanation,
        assumed=rests_on,
    )  # fmt: skip


def assumed_band(resistor: PullResistor) -> tuple[str, ...]:
    """The assumed values (tolerance, TCR) the fitted band rests on, if any."""
    return _assumed([resistor.tolerance, resistor.tcr])


def nominal_meets(bound: Bound, ohms: float) -> bool:
    """Whether the nominal resistance itself meets ``bound`` (tolerance and TCR aside)."""
    if bound.ohms is None:
        return True
    return ohms >= bound.ohms if bound.kind is BoundKind.MIN else ohms <= bound.ohms
