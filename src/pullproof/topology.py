"""Pull networks found by topology, before any number is attached.

A resistor with one pin on a rail (a supply or ground) and the other on a signal
net is a *pull* on that net. For each pulled net this module gathers what a
designer would look at: the pulls, the logic inputs (also those reached through
one series resistor), switches and where their far side goes, open-drain and
optocoupler drivers, and capacitors. Resistors tied to a rail that are not logic
pulls (LED series, dividers into analog or feedback nodes, USB-C configuration,
op-amp bias, shield bleed) are set aside with the reason.

The classification of a part (resistor, switch, LED …) is passed in, so this
module knows only the circuit.
"""

from __future__ import annotations

import re
from collections.abc import Callable
from dataclasses import dataclass

from .circuit import Circuit, Net, NetMember, Part
from .supplies import RailTie

__all__ = ["PinOnNet", "PullSite", "SetAside", "Topology", "find_pulls"]

# Pin electrical types that can receive a logic level.
_INPUT_TYPES = frozenset({"input", "bidirectional", "tri_state"})
# Types a library may give any pin when its author did not say; judged by name.
_VAGUE_TYPES = frozenset({"unspecified", "passive", "free"})
_DRIVER_TYPES = frozenset({"open_collector", "open_emitter"})
# Names of pins that are never logic inputs on a logic part.
_POWER_NAME = re.compile(
    r"(?i)^(~?\{?)?(V(CC|DD|EE|SS|IO|DDIO|BAT|IN|REF)\w*|GND\w*|AGND|DGND|EP|PAD)$"
)
_OUTPUT_NAME = re.compile(r"(?i)^(~?\{?)?(Q\d*|Q\d*#|~Q|Y\d*|O\d*|OUT\w*|DO\w*|TX\w*|MISO)\}?$")
_ANALOG_NAME = re.compile(r"(?i)(ADC|AIN|VSENSE|SENSE|FB|ADJ|VREF|COMP|ISET|PROG|RT|CT)")
# One part of a pin's name ("GPIO26_ADC0" → "ADC0") that says the pin can be an ADC input.
_ADC_PART = re.compile(r"(?i)^(ADC\w*|AIN\d*|AN\d+)$")
_NAME_SPLIT = re.compile(r"[_/\s,|]+")
_USB_CC_NAME = re.compile(r"(?i)^(CC\d?|VCONN)$")
_CONTROL_NAME = re.compile(r"(?i)^(G|B|GATE|BASE)\d*$")  # transistor pins that do not drive
_SHIELD_NAME = re.compile(r"(?i)(SHIELD|SHLD|^SH\d*$|CHASSIS|SH\d$)")

Classify = Callable[[Part], str]
RailOf = Callable[[Net], "RailTie | None"]


@dataclass(frozen=True)
class PinOnNet:
    """A pin of interest on (or one series resistor away from) a pulled net."""

    ref: str
    pin: str
    name: str
    via: str = ""  # reference of the series resistor between the net and this pin
    far_net: str = ""  # for two-terminal parts: the net on the other side


@dataclass(frozen=True)
class PullSite:
    """One pulled net as drawn: who pulls it where, and what else sits on it."""

    net: Net
    ups: tuple[tuple[str, str], ...]  # (resistor ref, rail name)
    downs: tuple[tuple[str, str], ...]
    inputs: tuple[PinOnNet, ...]
    switches: tuple[PinOnNet, ...]
    drivers: tuple[PinOnNet, ...]
    capacitors: tuple[PinOnNet, ...]
    connectors: tuple[PinOnNet, ...]
    sheet: str = "/"


@dataclass(frozen=True)
class SetAside:
    """A rail-tied resistor not judged as a logic pull, with the reason in plain words."""

    ref: str
    net: str
    reason: str


@dataclass(frozen=True)
class Topology:
    sites: tuple[PullSite, ...]
    set_aside: tuple[SetAside, ...]
    unpulled_switch_inputs: tuple[tuple[Net, tuple[PinOnNet, ...], tuple[PinOnNet, ...]], ...]


def _two_nets(circuit: Circuit, part: Part) -> tuple[Net, Net] | None:
    if len(part.pins) != 2:
        return None
    a = circuit.net_of(part.ref, part.pins[0].number)
    b = circuit.net_of(part.ref, part.pins[1].number)
    if a is None or b is None:
        return None
    return a, b


def _other_net(circuit: Circuit, part: Part, net: Net) -> Net | None:
    nets = _two_nets(circuit, part)
    if nets is None:
        return None
    a, b = nets
    return b if a.name == net.name else a


def _is_input_pin(member: NetMember, kind: str) -> bool:
    """A pin that receives a logic level: typed as an input, or vaguely typed on a logic part."""
    if kind not in ("logic", "mcu", "ic", "other"):
        return False
    if member.type in _INPUT_TYPES:
        return not _POWER_NAME.match(member.name)
    if member.type in _VAGUE_TYPES and kind != "other":
        return not (_POWER_NAME.match(member.name) or _OUTPUT_NAME.match(member.name))
    return False


class _Scanner:
    def __init__(self, circuit: Circuit, classify: Classify, rail_of: RailOf) -> None:
        self.circuit = circuit
        self.classify = classify
        self.rail_of = rail_of
        self.kinds = {p.ref: classify(p) for p in circuit.parts}
        self.nets = {n.name: n for n in circuit.nets}

    def kind(self, ref: str) -> str:
        return self.kinds.get(ref, "other")

    def part(self, ref: str) -> Part:
        part = self.circuit.part(ref)
        assert part is not None  # every member comes from a part
        return part

    def pulls(self) -> dict[str, tuple[list[tuple[str, str]], list[tuple[str, str]]]]:
        """Map each pulled signal net name to its (ups, downs)."""
        found: dict[str, tuple[list[tuple[str, str]], list[tuple[str, str]]]] = {}
        for part in self.circuit.parts:
            if self.kind(part.ref) != "resistor" or part.dnp:
                continue
            nets = _two_nets(self.circuit, part)
            if nets is None:
                continue
            ra, rb = (self.rail_of(n) for n in nets)
            if (ra is None) == (rb is None):
                continue  # series resistor, or rail to rail
            rail, signal = (ra, nets[1]) if ra is not None else (rb, nets[0])
            assert rail is not None
            ups, downs = found.setdefault(signal.name, ([], []))
            (downs if rail.ground else ups).append((part.ref, rail.name))
        return found

    def gather(self, net: Net, exclude: set[str]) -> dict[str, list[PinOnNet]]:
        """Sort the members of a net into inputs, switches, drivers, capacitors, connectors."""
        out: dict[str, list[PinOnNet]] = {
            k: [] for k in ("inputs", "switches", "drivers", "capacitors", "connectors", "series")
        }
        out.update(leds=[], opamps=[], analog=[], adc=[], transistors=[], usb_cc=[], other=[])
        for m in net.members:
            if m.ref in exclude:
                continue
            kind = self.kind(m.ref)
            part = self.part(m.ref)
            far = _other_net(self.circuit, part, net) if len(part.pins) == 2 else None
            pin = PinOnNet(m.ref, m.pin, m.name, far_net=far.name if far else "")
            if _USB_CC_NAME.match(m.name) and kind in ("connector", "ic", "other", "logic"):
                out["usb_cc"].append(pin)
            elif kind == "resistor":
                out["series"].append(pin)
            elif kind == "capacitor":
                out["capacitors"].append(pin)
            elif kind in ("switch", "relay"):
                out["switches"].append(pin)
            elif kind in ("led", "diode"):
                out["leds"].append(pin)
            elif kind == "opamp":
                out["opamps"].append(pin)
            elif kind == "optocoupler" or m.type in _DRIVER_TYPES:
                out["drivers"].append(pin)
            elif kind == "transistor":
                out["transistors"].append(pin)
            elif kind == "connector":
                out["connectors"].append(pin)
            elif _is_input_pin(m, kind):
                if _ANALOG_NAME.search(m.name) and not re.search(r"(?i)GPIO|^P[A-Z]?\d", m.name):
                    out["analog"].append(pin)
                else:
                    out["inputs"].append(pin)
                    # A GPIO that doubles as an ADC input: a divider into it is a measurement.
                    if any(_ADC_PART.match(word) for word in _NAME_SPLIT.split(m.name)):
                        out["adc"].append(pin)
            else:
                out["other"].append(pin)
        return out

    def through_series(self, series: list[PinOnNet], exclude: set[str]) -> list[PinOnNet]:
        """Logic inputs one series resistor away (e.g. an RC filter in front of a Schmitt input)."""
        found: list[PinOnNet] = []
        for s in series:
            far = self.nets.get(s.far_net)
            if far is None or self.rail_of(far) is not None:
                continue
            groups = self.gather(far, exclude | {s.ref})
            found.extend(PinOnNet(p.ref, p.pin, p.name, via=s.ref) for p in groups["inputs"])
        return found


def _set_aside_reason(net: Net, groups: dict[str, list[PinOnNet]], has_both: bool) -> str:
    """Why the resistors on this net are not logic pulls, or "" when they are."""
    inputs = groups["inputs"]
    if groups["usb_cc"]:
        p = groups["usb_cc"][0]
        return f"USB-C configuration resistor: the net reaches {p.ref} pin {p.name}"
    if _SHIELD_NAME.search(net.name.rsplit("/", 1)[-1]):
        return "shield or chassis bleed resistor: the net is a shield net"
    if groups["opamps"]:
        p = groups["opamps"][0]
        return f"op-amp bias or gain resistor: the net reaches {p.ref} pin {p.pin} ({p.name})"
    if has_both and (groups["analog"] or groups["adc"]):
        # An up and a down pull into a pin that can read an ADC divide a voltage to measure it.
        p = (groups["analog"] or groups["adc"])[0]
        return f"divider into an analog or feedback node: the net reaches {p.ref} pin {p.name}"
    if groups["analog"] and not inputs:
        p = groups["analog"][0]
        what = "divider into an analog or feedback node" if has_both else "analog or feedback bias"
        return f"{what}: the net reaches {p.ref} pin {p.name}"
    if has_both and not inputs and not groups["switches"] and not groups["drivers"]:
        return "divider into an analog or feedback node: no logic input on the net"
    if groups["leds"] and not (inputs or groups["switches"] or groups["drivers"]):
        p = groups["leds"][0]
        return f"LED series resistor: the net reaches only a diode ({p.ref})"
    if groups["transistors"] and not (inputs or groups["switches"] or groups["drivers"]):
        p = groups["transistors"][0]
        return f"transistor base or gate bias: the net reaches {p.ref} pin {p.name}, no logic input"
    passive_only = not (inputs or groups["switches"] or groups["drivers"] or groups["series"])
    ends = groups["connectors"] + groups["other"]
    if passive_only and ends:
        if all(_SHIELD_NAME.search(p.name) for p in ends):
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
    return ""


def find_pulls(circuit: Circuit, classify: Classify, rail_of: RailOf) -> Topology:
    """Find every pulled signal net, set aside rail-tied resistors that are not logic pulls,
    and list switch-driven inputs that have no pull at all."""
    scan = _Scanner(circuit, classify, rail_of)
    sites: list[PullSite] = []
    aside: list[SetAside] = []
    for name, (ups, downs) in sorted(scan.pulls().items()):
        net = scan.nets[name]
        pulls = {ref for ref, _ in ups} | {ref for ref, _ in downs}
        # The designer's word comes first: a 'skip' resistor is set aside for that reason
        # alone, and neither counts toward a divider nor hides the other pulls.
        forced = {ref: (scan.part(ref).field("pullproof.role") or "").lower() for ref in pulls}
        skipped = {ref for ref, v in forced.items() if v == "skip"}
        aside.extend(
            SetAside(ref, name, "marked not a pull by its 'pullproof.role' field")
            for ref in sorted(skipped)
        )
        ups_kept = tuple(u for u in ups if u[0] not in skipped)
        downs_kept = tuple(d for d in downs if d[0] not in skipped)
        if not ups_kept and not downs_kept:
            continue
        groups = scan.gather(net, pulls)
        groups["inputs"].extend(scan.through_series(groups["series"], pulls))
        reason = _set_aside_reason(net, groups, bool(ups_kept and downs_kept))
        if reason and not any(forced[r] == "pull" for r in pulls - skipped):
            aside.extend(SetAside(ref, name, reason) for ref in sorted(pulls - skipped))
            continue
        sheet = name.rsplit("/", 1)[0] + "/" if name.startswith("/") else "/"
        sites.append(
            PullSite(
                net=net,
                ups=ups_kept,
                downs=downs_kept,
                inputs=tuple(groups["inputs"]),
                switches=tuple(groups["switches"]),
                # a gate or base on the net is a load, not a driver: only C/D/E/S pins drive
                drivers=tuple(
                    groups["drivers"]
                    + [t for t in groups["transistors"] if not _CONTROL_NAME.match(t.name)]
                ),
                capacitors=tuple(groups["capacitors"]),
                connectors=tuple(groups["connectors"]),
                sheet=sheet,
            )
        )
    pulled = {s.net.name for s in sites} | {a.net for a in aside}
    floating = []
    for net in circuit.nets:
        if net.name in pulled or rail_of(net) is not None:
            continue
        groups = scan.gather(net, set())
        if groups["switches"] and groups["inputs"] and not groups["drivers"]:
            floating.append((net, tuple(groups["switches"]), tuple(groups["inputs"])))
    return Topology(tuple(sites), tuple(aside), tuple(floating))
