"""Drivers pulling against the pull: the sink must absorb the pull current plus the inputs'.

driver-sink: R_lo ≥ (V_max − V_OL) / (I_OL − ΣI_low), per open-drain/collector or
transistor output; on an I2C line also the bus form of UM10204 §7.1 eq. (2),
Rp(min) = (VDD − VOL(max)) / IOL.
opto-output: R_lo ≥ (V_max − V_CE(sat)) / (CTR_min · ageing · I_F,min − ΣI_low).
"""

from __future__ import annotations

from ..network import DriverOnNet, Missing, PullNetwork
from ..provenance import Sourced, Status
from ..results import Bound, BoundKind, Check, Term
from ._common import LEVEL_HINT, Span, across, default, eng, fmt, input_missing, unevaluated
from ._common import worst_input_value as _worst

__all__ = ["driver_sink", "opto_output"]

_SINK_FORMULA = "R_lo ≥ (V_max − V_OL) / (I_OL − ΣI_low)"
_I2C_FORMULA = "Rp(min) = (VDD − VOL(max)) / IOL"
_OPTO_FORMULA = "R_lo ≥ (V_max − V_CE(sat)) / (CTR_min · ageing · I_F,min − ΣI_low)"
_SOURCE = "Ohm's law at the driver's guaranteed output-low point"
_I2C_SOURCE = "I2C-bus specification UM10204 §7.1 eq. (2)"

# UM10204 I/O-stage table: VOL 0.4 V at 3 mA (Sm, Fm) or 20 mA (Fm+) for VDD > 2 V;
# VOL2 = 0.2·VDD at 2 mA for VDD ≤ 2 V.
_I2C_IOL = {"standard": 3e-3, "fast": 3e-3, "fast-plus": 20e-3}


def _inputs_low(network: PullNetwork) -> tuple[float, list[Term], list[Missing]]:
    """ΣI_low: the worst current all inputs push into a driver holding the line low."""
    total = 0.0
    terms: list[Term] = []
    missing: list[Missing] = []
    for inp in network.inputs:
        w = _worst(inp, "i_low")
        if w is None:
            missing.extend(input_missing(inp, "I_low", LEVEL_HINT))
        else:
            total += w.magnitude("A")
            terms.append(Term(f"I_low({inp.ref} pin {inp.pin})", w))
    return total, terms, missing


def driver_sink(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """One MIN bound per sinking driver; plus the bus form when the net is an I2C line."""
    out: list[Bound | Check] = []
    mode = network.rules.i2c_mode
    for d in network.drivers:
        if d.kind == "optocoupler":
            continue
        if mode and (d.i_ol is None or d.v_ol is None):
            continue  # the bus form below stands for devices without their own data
        out.append(_sink(network, d))
    if mode:
        out.append(_i2c_sink(network, mode))
    return tuple(out)


def _sink(network: PullNetwork, d: DriverOnNet) -> Bound | Check:
    why = (
        f"When {d.ref} pin {d.pin} pulls low it must sink the pull current plus the inputs' "
        f"current and still reach its guaranteed V_OL."
    )
    span = across(network, largest=True)
    i_in, terms, missing = _inputs_low(network)
    if isinstance(span, Missing):
        missing.append(span)
    for name, val in (("I_OL", d.i_ol), ("V_OL", d.v_ol)):
        if val is None:
            missing.append(
                Missing(
                    f"{name} of {d.ref} pin {d.pin}",
                    d.ref,
                    "add fields 'pullproof.i_ol' (e.g. 4mA) and 'pullproof.v_ol' (e.g. 0.4V) "
                    "on the driving part",
                )
            )
    if missing:
        return unevaluated(
            "driver-sink",
            "Driver sink current",
            BoundKind.MIN,
            _SINK_FORMULA,
            missing,
            source=_SOURCE,
            explanation=why,
        )
    assert isinstance(span, Span) and d.i_ol is not None and d.v_ol is not None
    spare = d.i_ol.magnitude("A") - i_in
    all_terms = (
        *span.terms,
        Term(f"V_OL({d.ref})", d.v_ol),
        Term(f"I_OL({d.ref})", d.i_ol),
        *terms,
    )
    if spare <= 0:
        return Check(
            "driver-sink",
            "Driver sink current",
            False,
            True,
            "I_OL > ΣI_low",
            f"{fmt(d.i_ol, 'A')} > {eng(i_in, 'A')}",
            all_terms,
            _SOURCE,
            why + " Here the inputs alone need more than the driver sinks.",
            sentence=(
                f"{d.ref} pin {d.pin} sinks at most {fmt(d.i_ol, 'A')}, no more than the "
                f"{eng(i_in, 'A')} the inputs alone push into it"
            ),
        )
    return Bound(
        constraint="driver-sink",
        title="Driver sink current",
        kind=BoundKind.MIN,
        ohms=(span.volts - d.v_ol.magnitude("V")) / spare,
        hard=True,
        formula=_SINK_FORMULA,
        substituted=f"({span.text} − {fmt(d.v_ol, 'V')}) / ({fmt(d.i_ol, 'A')} − {eng(i_in, 'A')})",
        terms=all_terms,
        source=_SOURCE,
        explanation=why,
        relax="a driver with a stronger guaranteed sink current or a lower rail voltage",
        corner=f"{d.ref} pin {d.pin} on",
        says=(
            f"at which {d.ref} pin {d.pin} still sinks the pull and input current within its "
            f"{fmt(d.i_ol, 'A')} at {fmt(d.v_ol, 'V')}"
        ),
    )


def _i2c_sink(network: PullNetwork, mode: str) -> Bound:
    why = "On an I2C line every device must pull the bus below VOL(max) against the pull-up."
    vdd = network.rail.v_max
    v = vdd.magnitude("V")
    if v <= 2.0:
        vol: Sourced = default(
            0.2 * v, "V", "I2C VOL2 = 0.2·VDD (VDD ≤ 2 V), UM10204 I/O stages", "", Status.CONFIRMED
        )
        iol = default(
            2e-3, "A", "I2C IOL at VOL2 (VDD ≤ 2 V), UM10204 I/O stages", "", Status.CONFIRMED
        )
    else:
        vol = default(0.4, "V", "I2C VOL(max), UM10204 §7.1", "", Status.CONFIRMED)
        iol = default(
            _I2C_IOL.get(mode, 3e-3),
            "A",
            f"I2C IOL ({mode}-mode), UM10204 §7.1",
            "",
            Status.CONFIRMED,
        )
    return Bound(
        constraint="driver-sink",
        title="I2C bus sink current",
        kind=BoundKind.MIN,
        ohms=(v - vol.magnitude("V")) / iol.magnitude("A"),
        hard=True,
        formula=_I2C_FORMULA,
        substituted=f"({fmt(vdd, 'V')} − {fmt(vol, 'V')}) / {fmt(iol, 'A')}",
        terms=(Term("VDD", vdd), Term("VOL(max)", vol), Term("IOL", iol)),
        source=_I2C_SOURCE,
        explanation=why,
        relax="Fast-mode Plus devices (20 mA sink) or a lower bus voltage",
        corner=f"{mode}-mode, VDD = {fmt(vdd, 'V')}",
        says=f"at which every bus device pulls the line below {fmt(vol, 'V')} with {fmt(iol, 'A')}",
    )


def opto_output(network: PullNetwork) -> tuple[Bound | Check, ...]:
    """One MIN bound per optocoupler output pulling against the pull."""
    return tuple(_opto(network, d) for d in network.drivers if d.kind == "optocoupler")


def _opto(network: PullNetwork, d: DriverOnNet) -> Bound | Check:
    why = (
        f"{d.ref}'s transistor can only sink CTR · I_F; at end of life (aged CTR) that must "
        "still carry the pull current plus the inputs' current at saturation."
    )
    span = across(network, largest=True)
    i_in, terms, missing = _inputs_low(network)
    if isinstance(span, Missing):
        missing.append(span)
    named = (
        ("CTR_min", d.ctr_min, "pullproof.ctr_min", "50%"),
        ("CTR ageing factor", d.ageing, "pullproof.ageing", "50%"),
        ("I_F,min", d.i_f_min, "pullproof.i_f", "5mA"),
        ("V_CE(sat)", d.vce_sat, "pullproof.vce_sat", "0.4V"),
    )
    for name, val, field, example in named:
        if val is None:
            missing.append(
                Missing(
                    f"{name} of {d.ref}",
                    d.ref,
                    f"add field '{field}' (e.g. {example}) or a part-library entry",
                )
            )
    if missing:
        return unevaluated(
            "opto-output",
            "Optocoupler output",
            BoundKind.MIN,
            _OPTO_FORMULA,
            missing,
            source=_SOURCE,
            explanation=why,
        )
    assert isinstance(span, Span)
    assert d.ctr_min and d.ageing and d.i_f_min and d.vce_sat
    sink = d.ctr_min.magnitude("") * d.ageing.magnitude("") * d.i_f_min.magnitude("A")
    all_terms = (
        *span.terms,
        Term("V_CE(sat)", d.vce_sat),
        Term("CTR_min", d.ctr_min),
        Term("ageing", d.ageing),
        Term("I_F,min", d.i_f_min),
        *terms,
    )
    sub_i = (
        f"{d.ctr_min.magnitude(''):.4g} · {d.ageing.magnitude(''):.4g} · "
        f"{fmt(d.i_f_min, 'A')} − {eng(i_in, 'A')}"
    )
    if sink - i_in <= 0:
        return Check(
            "opto-output",
            "Optocoupler output",
            False,
            True,
            "CTR_min · ageing · I_F,min > ΣI_low",
            f"{sub_i} > 0",
            all_terms,
            _SOURCE,
            why + " Here the aged transistor cannot even sink the inputs' current.",
            sentence=(
                f"the aged {d.ref} sinks only {eng(sink, 'A')}, no more than the "
                f"{eng(i_in, 'A')} the inputs alone push into it"
            ),
        )
    return Bound(
        constraint="opto-output",
        title="Optocoupler output",
        kind=BoundKind.MIN,
        ohms=(span.volts - d.vce_sat.magnitude("V")) / (sink - i_in),
        hard=True,
        formula=_OPTO_FORMULA,
        substituted=f"({span.text} − {fmt(d.vce_sat, 'V')}) / ({sub_i})",
        terms=all_terms,
        source=_SOURCE + "; CTR ageing, common practice",
        explanation=why,
        relax="more LED current, an optocoupler with a higher minimum CTR, or a lower rail",
        corner=f"{d.ref} on at end of life",
        says=f"at which the aged {d.ref} still sinks the pull and input current in saturation",
    )
