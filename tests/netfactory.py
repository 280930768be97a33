"""Small factories that build resolved pull networks by hand, for engine tests.

Numbers are given as plain floats in base units (V, A, Ω, F, s, W) and come back
as :class:`~pullproof.provenance.Sourced` quantities whose provenance names the test.
"""

from __future__ import annotations

from typing import Any

from pullproof.network import (
    CapacitorOnNet,
    Direction,
    DriverOnNet,
    InputLevels,
    InputOnNet,
    NetworkRules,
    PullNetwork,
    PullResistor,
    Rail,
    SwitchOnNet,
)
from pullproof.provenance import Origin, Provenance, Sourced
from pullproof.units import Q_

__all__ = [
    "cap",
    "driver",
    "inp",
    "levels",
    "network",
    "rail",
    "resistor",
    "rules",
    "src",
    "switch",
]


def src(value: float, unit: str, where: str = "test value") -> Sourced:
    """A quantity with a test provenance."""
    return Sourced(Q_(value, unit), Provenance(Origin.FIELD, where))


def _opt(value: float | None, unit: str) -> Sourced | None:
    return None if value is None else src(value, unit)


def rail(name: str = "+5V", v_min: float = 5.0, v_max: float | None = None) -> Rail:
    v_max = v_min if v_max is None else v_max
    ground = v_min == 0 and v_max == 0
    return Rail(name, src(v_min, "V"), src(v_max, "V"), src((v_min + v_max) / 2, "V"), ground)


GND = rail("GND", 0.0)


def levels(
    vdd: float,
    vih: float | None,
    vil: float | None,
    i_high: float | None = 1e-6,
    i_low: float | None = 1e-6,
    **extra: float | None,
) -> InputLevels:
    """Input levels at one supply; ``extra`` takes InputLevels' optional fields as floats."""
    units = {"v_in_max": "V", "c_in": "F", "max_transition": "s"}
    kw = {k: _opt(v, units.get(k, "V")) for k, v in extra.items()}
    return InputLevels(
        src(vdd, "V"),
        _opt(vih, "V"),
        _opt(vil, "V"),
        _opt(i_high, "A"),
        _opt(i_low, "A"),
        **kw,  # type: ignore[arg-type]
    )


def inp(*corners: InputLevels, ref: str = "U1", pin: str = "1", **kw: Any) -> InputOnNet:
    if "series_ohms" in kw and kw["series_ohms"] is not None:
        kw["series_ohms"] = src(kw["series_ohms"], "ohm")
    return InputOnNet(ref, pin, kw.pop("family", "test"), tuple(corners), **kw)


def resistor(
    ohms: float,
    tol: float = 0.0,
    tcr: float = 0.0,
    power: float | None = None,
    wv: float | None = None,
    ref: str = "R1",
) -> PullResistor:
    return PullResistor(
        (ref,), src(ohms, "ohm"), src(tol, ""), src(tcr, "1/K"), _opt(power, "W"), _opt(wv, "V")
    )


def rules(**kw: Any) -> NetworkRules:
    """Rules with a zero margin, no derating and no temperature drift unless given."""
    units = {
        "margin": "V",
        "derating": "",
        "temp_min": "degC",
        "temp_max": "degC",
        "temp_ref": "degC",
        "preferred_min": "ohm",
        "preferred_max": "ohm",
        "current_budget": "A",
        "bounce_time": "s",
        "edge_time_max": "s",
        "bus_capacitance": "F",
        "wiring_capacitance": "F",
        "margin_ratio": "",
    }
    base: dict[str, Any] = {
        "margin": 0.0,
        "derating": 1.0,
        "temp_min": 25.0,
        "temp_max": 25.0,
        "temp_ref": 25.0,
        "series": "E24",
        "policy": "centre",
    }
    base.update(kw)
    for k, unit in units.items():
        if base.get(k) is not None:
            base[k] = src(base[k], unit)
    return NetworkRules(**base)


def switch(
    ref: str = "SW1",
    contact_max: float | None = 0.05,
    wetting_min: float | None = None,
    bounce: float | None = None,
    against: bool = True,
) -> SwitchOnNet:
    return SwitchOnNet(
        ref, "GND", against, _opt(contact_max, "A"), _opt(wetting_min, "A"), _opt(bounce, "s")
    )


def driver(
    ref: str = "U9",
    kind: str = "open-drain",
    i_ol: float | None = 3e-3,
    v_ol: float | None = 0.4,
    i_off: float | None = 0.0,
    **kw: float | None,
) -> DriverOnNet:
    units = {"ctr_min": "", "ageing": "", "i_f_min": "A", "vce_sat": "V"}
    extra = {k: _opt(v, units[k]) for k, v in kw.items()}
    return DriverOnNet(
        ref,
        "1",
        kind,
        _opt(i_ol, "A"),
        _opt(v_ol, "V"),
        _opt(i_off, "A"),
        **extra,  # type: ignore[arg-type]
    )


def cap(farads: float, ref: str = "C1") -> CapacitorOnNet:
    return CapacitorOnNet(ref, src(farads, "F"), "GND")


def network(
    *inputs: InputOnNet,
    direction: str = "up",
    pull_rail: Rail | None = None,
    res: PullResistor | None = None,
    net_rules: NetworkRules | None = None,
    **kw: Any,
) -> PullNetwork:
    """A pull network on net /SENSE (a greenhouse vent sensor unless told otherwise)."""
    up = direction == "up"
    return PullNetwork(
        net=kw.pop("net", "/SENSE"),
        sheet="/",
        direction=Direction.UP if up else Direction.DOWN,
        rail=pull_rail or (rail() if up else GND),
        resistor=res or resistor(10e3),
        inputs=tuple(inputs),
        rules=net_rules or rules(),
        **kw,
    )
