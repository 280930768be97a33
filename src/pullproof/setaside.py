"""Why a rail-tied resistor is not a logic pull: one general rule per class, in order.

Each rule reads what sits on the pulled net (:class:`Neighbours`, gathered by
:mod:`pullproof.topology`) and returns the reason in plain words, or "" when the
resistor may be a logic pull. The first rule that speaks decides. The classes and
their electrical reasons are listed in the README ("What is set aside, and why").
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass, field

__all__ = ["Neighbours", "Pin", "is_analog_name", "is_emitter_name", "reason_not_a_pull"]


@dataclass(frozen=True)
class Pin:
    """A pin of interest on (or one series resistor away from) a pulled net."""

    ref: str
    pin: str
    name: str
    via: str = ""  # the series resistor (element label) between the net and this pin
    far_net: str = ""  # for a two-terminal part or element: the net on its other side

    @property
    def text(self) -> str:
        """``U1 pin FB``; ``U2 pin 3 (-)`` when the name is only a sign; ``U2 pin 3`` unnamed."""
        if not self.name:
            return f"{self.ref} pin {self.pin}"
        if not any(c.isalnum() for c in self.name):
            return f"{self.ref} pin {self.pin} ({self.name})"
        return f"{self.ref} pin {self.name}"


@dataclass
class Neighbours:
    """What sits on one pulled net, sorted by what it is (filled by topology)."""

    net: str
    pulls: tuple[str, ...]  # element labels of the pulls (fitted, not skipped)
    has_both: bool  # an up and a down pull
    groups: dict[str, list[Pin]] = field(default_factory=dict)
    far_is_rail: Callable[[str], bool] = lambda name: False

    def __getitem__(self, key: str) -> list[Pin]:
        return self.groups.setdefault(key, [])

    @property
    def logic(self) -> bool:
        """Something on the net (or one resistor away) that reads or drives a logic level."""
        return bool(self["inputs"] or self["via_inputs"] or self["switches"] or self["drivers"])


# Names that mark a shield or chassis conductor (common practice).
SHIELD_NAME = re.compile(r"(?i)(SHIELD|SHLD|^SH\d*$|CHASSIS|SH\d$)")
_WORD_SPLIT = re.compile(r"[_/\s,|.()]+")
# Whole words of a pin name that mean an analog function (common practice): converter and
# amplifier inputs, feedback and adjust pins, references, current sense, timing and
# thermistor pins of regulators and chargers.
_ANALOG_WORD = re.compile(
    r"""(?ix)^(
        ADC\d* | AIN\d*[PN]? | AN\d+ | VSENSE | ISENSE | SENSE[PN]? | [VI]?SNS[PN]? | FB\d* | VFB
      | ADJ | VREF[PN]? | REF | REFIN | COMP | ISET | IREF | PROG | ILIM | RT | CT | TS | NTC
      | THERM | BIAS | VBIAS | VCM | VOCM | INP | INN | IN[+\-\u2212] | [+\-\u2212]IN | [+\-\u2212]
    )$"""
)
# A word that makes a pin a general-purpose logic pin even when it doubles as an ADC input.
_PORT_WORD = re.compile(r"(?i)^(GPIO\d*|P[A-Z]?\d+|IO\d+)$")
ADC_WORD = re.compile(r"(?i)^(ADC\w*|AIN\d*|AN\d+)$")
# Pins of an emitter inside a part (optocoupler input, LED bar, display): anode, cathode.
_EMITTER_NAME = re.compile(
    r"(?i)^(A|K|AN|CA|CAT|ANODE|CATHODE|A\d|K\d|LED_?[AK]\d*|LED[+\-]|BL_?[AK]|BL[+\-])$"
)


def name_words(name: str) -> list[str]:
    return [w for w in _WORD_SPLIT.split(name) if w] or [name]


def is_analog_name(name: str) -> bool:
    """A pin named for an analog function and not as a general-purpose logic pin."""
    words = name_words(name)
    return any(_ANALOG_WORD.match(w) for w in words) and not any(_PORT_WORD.match(w) for w in words)


def is_emitter_name(name: str) -> bool:
    return bool(_EMITTER_NAME.match(name.strip()))


def _names(pins: list[Pin]) -> str:
    return ", ".join(p.text for p in pins[:3]) + (" …" if len(pins) > 3 else "")


# ---------------------------------------------------------------- the rules, in order


def _usb_cc(n: Neighbours) -> str:
    if n["usb_cc"]:
        p = n["usb_cc"][0]
        return f"USB-C configuration resistor: the net reaches {p.ref} pin {p.name}"
    return ""


def _shield_name(n: Neighbours) -> str:
    if SHIELD_NAME.search(n.net.rsplit("/", 1)[-1]):
        return "shield or chassis bleed resistor: the net is a shield net"
    return ""


def _switch_series(n: Neighbours) -> str:
    """The node holds only this resistor and switch contacts that lead to a signal: the
    resistor is in series in front of the switch, and any pull sits on the far side."""
    others = [p for k, pins in n.groups.items() if k != "switches" for p in pins]
    sw = n["switches"]
    if len(n.pulls) != 1 or others or not sw:
        return ""
    if any(not p.far_net or n.far_is_rail(p.far_net) for p in sw):
        return ""
    p = sw[0]
    return (
        f"series resistor in front of a switch: the net holds only {n.pulls[0]} and "
        f"{p.text}, whose other side {p.far_net} is the switched line; a pull, if any, "
        "belongs there"
    )


def _analog(n: Neighbours) -> str:
    """An amplifier or comparator input, or a pin named for an analog function, is no logic
    input: a pull there biases it, and with another resistor it divides."""
    amps, named = n["opamps"], n["analog"]
    no_logic_input = not (n["inputs"] or n["via_inputs"])
    if not amps and not (named and (n.has_both or no_logic_input)):
        if n.has_both and n["adc"]:
            # An up and a down pull into a pin that can read an ADC divide a voltage to measure it.
            return f"divider into an analog or feedback node: the net reaches {_names(n['adc'])}"
        return ""
    pins = amps or named
    what = _names(pins) + (", an amplifier or comparator input" if amps else "")
    if n.has_both:
        return f"divider into an analog or feedback node: the net reaches {what}"
    if n["series"]:
        # the pull and a resistor to another node meet at an analog input: they divide
        return f"divider or gain network into an analog input: the net reaches {what}"
    return f"analog or feedback bias: the net reaches {what}"


def _sensor(n: Neighbours) -> str:
    if n["sensors"]:
        return (
            f"sensor bias: the net reaches {_names(n['sensors'])}, a thermistor or other "
            "sensing resistor, so the node is a measurement"
        )
    return ""


def _divider_without_input(n: Neighbours) -> str:
    if n.has_both and not n.logic:
        return "divider into an analog or feedback node: no logic input on the net"
    return ""


def _emitter(n: Neighbours) -> str:
    if n.logic or not (n["leds"] or n["emitters"]):
        return ""
    if n["leds"]:
        return f"LED series resistor: the net reaches only a diode ({n['leds'][0].ref})"
    return (
        f"LED series resistor: the net reaches only {_names(n['emitters'])}, the anode or "
        "cathode of an emitter inside the part (optocoupler input, LED bar or display)"
    )


def _resistor_chain(n: Neighbours) -> str:
    """Nothing but other resistors (and capacitors) on the net, no logic input on it or one
    resistor away: the pull is one leg of a divider or a resistor chain."""
    chain = n["series"] + n["resistive"]
    on_net = ("series", "resistive", "capacitors", "via_inputs", "via_controls")
    rest = [p for k, pins in n.groups.items() if k not in on_net for p in pins]
    if not chain or rest or n["via_inputs"]:
        return ""
    refs = ", ".join(sorted({p.ref for p in chain}))
    return f"divider or resistor chain: the net reaches only {refs}, and no logic input"


def _transistor(n: Neighbours) -> str:
    """A base or gate on the net (or through one resistor) and no logic input on the net
    itself: the resistor biases the transistor (a base clamps the node near V_BE)."""
    if n["inputs"] or n["switches"] or n["drivers"]:
        return ""
    controls = n["controls"] + n["via_controls"]
    if controls:
        p = controls[0]
        through = f" through {p.via}" if p.via else ""
        return (
            f"transistor base or gate bias: the net drives {p.ref} pin {p.name}{through}, "
            "and holds no logic input itself"
        )
    if n["transistors"] and not n["via_inputs"]:
        p = n["transistors"][0]
        return f"transistor base or gate bias: the net reaches {p.ref} pin {p.name}, no logic input"
    return ""


def _passive_ic(n: Neighbours) -> str:
    if n.logic or not n["passive_ic"]:
        return ""
    return (
        f"analog or pass-through pin: the net reaches {_names(n['passive_ic'])}, typed passive "
        "on a part whose logic pins are typed, so it is no logic input (an analog switch "
        "channel, a measurement or a series path)"
    )


def _ends_only(n: Neighbours) -> str:
    if n.logic or n["series"]:
        return ""
    ends = n["connectors"] + n["other"]
    if not ends:
        return ""
    if all(SHIELD_NAME.search(p.name) for p in ends):
        return "shield or chassis bleed resistor: the net reaches only shield pins"
    if len({p.ref for p in ends}) == 1 and len(ends) >= 2:
        # Several pins of one part joined only to a rail resistor: a connector's shield tabs.
        pins = ", ".join(p.pin for p in ends)
        return (
            f"shield or chassis bleed resistor: the net joins only pins {pins} of "
            f"{ends[0].ref}, as a connector's shield tabs do"
        )
    refs = ", ".join(sorted({p.ref for p in ends}))
    return (
        f"the net reaches only connector or unclassified pins ({refs}): a shield bleed or an "
        "input off this schematic; set field 'pullproof.role' = pull to judge it"
    )


def _unused(n: Neighbours) -> str:
    if n.has_both or any(n.groups.values()):
        return ""
    return "unused: the resistor's other end connects to nothing"


_RULES: tuple[Callable[[Neighbours], str], ...] = (
    _unused,
    _usb_cc,
    _shield_name,
    _switch_series,
    _analog,
    _sensor,
    _divider_without_input,
    _emitter,
    _resistor_chain,
    _transistor,
    _passive_ic,
    _ends_only,
)


def reason_not_a_pull(n: Neighbours) -> str:
    """Why the pulls on this net are not logic pulls, or "" when they may be."""
    for rule in _RULES:
        reason = rule(n)
        if reason:
            return reason
    return ""
