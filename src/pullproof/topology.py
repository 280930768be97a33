"""Pull networks found by topology, before any number is attached.

A resistor (or one element of a resistor array) with one pin on a rail and the other on
a signal net is a *pull* on that net. For each pulled net this module gathers what a
designer would look at: the pulls, the logic inputs (also those reached through one
series resistor), switches and where their far side goes, open-drain and optocoupler
drivers, and capacitors. Resistors tied to a rail that are not logic pulls are set
aside with the reason (:mod:`pullproof.setaside` holds the rules); so are resistors
between two supplies, resistors below 10 Ω and parts that are not fitted.

The classification of a part (resistor, switch, LED …), the rail a net stands for and
each resistor's nominal value are passed in, so this module knows only the circuit.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field, replace
from types import MappingProxyType

from .circuit import Circuit, Net, NetMember, Part
from .elements import Element, Layout, layout_of, not_fitted
from .schematic.model import LibPin
from .setaside import (
    ADC_WORD,
    Neighbours,
    Pin,
    is_analog_name,
    is_emitter_name,
    name_words,
    reason_not_a_pull,
)
from .supplies import RailTie

__all__ = ["PinOnNet", "PullSite", "SetAside", "Topology", "find_pulls"]

PinOnNet = Pin  # a pin of interest on a pulled net (the name topology's users know)

# Pin electrical types that can receive a logic level.
_INPUT_TYPES = frozenset({"input", "bidirectional", "tri_state"})
# Types a library may give any pin when its author did not say; judged by name.
_VAGUE_TYPES = frozenset({"unspecified", "passive", "free"})
_DRIVER_TYPES = frozenset({"open_collector", "open_emitter"})
# A part whose library types some pins as logic pins: its vaguely typed pins are not inputs.
_LOGIC_TYPES = _INPUT_TYPES | _DRIVER_TYPES | {"output"}
# Names of pins that are never logic inputs on a logic part.
_POWER_NAME = re.compile(
    r"(?i)^(~?\{?)?(V(CC|DD|EE|SS|IO|DDIO|BAT|IN|REF)\w*|GND\w*|AGND|DGND|EP|PAD)$"
)
_OUTPUT_NAME = re.compile(r"(?i)^(~?\{?)?(Q\d*|Q\d*#|~Q|Y\d*|O\d*|OUT\w*|DO\w*|TX\w*|MISO)\}?$")
_USB_CC_NAME = re.compile(r"(?i)^(CC\d?|VCONN)$")
_CONTROL_NAME = re.compile(r"(?i)^(G|B|GATE|BASE)\d*$")  # transistor pins that do not drive
#: Below this a resistor is a link, shunt or filter element, never a logic pull (common
#: practice: no logic input needs a pull this strong).
LOW_OHMS = 10.0

Classify = Callable[[Part], str]
# pulls by signal net: (ups, downs), each a list of (element, the rail it ties to)
Pulls = dict[str, tuple[list[tuple[Element, RailTie]], list[tuple[Element, RailTie]]]]
RailOf = Callable[[Net], "RailTie | None"]
Ohms = Callable[[str], "float | None"]  # a resistor part's nominal resistance, None if unknown


@dataclass(frozen=True)
class PullSite:
    """One pulled net as drawn: who pulls it where, and what else sits on it.

    ``ups``/``downs`` hold (resistor, rail) pairs; the resistor is named by its label
    (``R3``, or ``RN1 (1–8)`` for an array element: see ``Topology.elements``).
    """

    net: Net
    ups: tuple[tuple[str, str], ...]
    downs: tuple[tuple[str, str], ...]
    inputs: tuple[PinOnNet, ...]
    switches: tuple[PinOnNet, ...]
    drivers: tuple[PinOnNet, ...]
    capacitors: tuple[PinOnNet, ...]
    connectors: tuple[PinOnNet, ...]
    sheet: str = "/"


@dataclass(frozen=True)
class SetAside:
    """A resistor not judged as a logic pull, with the reason in plain words."""

    ref: str  # the part's reference
    net: str
    reason: str
    element: str = ""  # "1-8" for an element of a resistor array


@dataclass(frozen=True)
class Topology:
    sites: tuple[PullSite, ...]
    set_aside: tuple[SetAside, ...]
    unpulled_switch_inputs: tuple[tuple[Net, tuple[PinOnNet, ...], tuple[PinOnNet, ...]], ...]
    # every resistor element of the circuit by its label ("R3", "RN1 (1–8)")
    elements: Mapping[str, Element] = field(default_factory=lambda: MappingProxyType({}))


def _aside(el: Element, net: str, reason: str) -> SetAside:
    return SetAside(el.ref, net, reason, el.element)


class _Scanner:
    def __init__(
        self,
        circuit: Circuit,
        classify: Classify,
        rail_of: RailOf,
        pins: Mapping[str, tuple[LibPin, ...]],
        ohms: Ohms,
    ) -> None:
        self.circuit = circuit
        self.rail_of = rail_of
        self.ohms = ohms
        self.kinds = {p.ref: classify(p) for p in circuit.parts}
        self.nets = {n.name: n for n in circuit.nets}
        self.unfitted = {p.ref: why for p in circuit.parts if (why := not_fitted(p))}
        self.typed = {p.ref for p in circuit.parts if any(q.type in _LOGIC_TYPES for q in p.pins)}
        self._rails: dict[str, RailTie | None] = {}
        self.layouts: dict[str, Layout] = {}
        for part in circuit.parts:
            kind = self.kind(part.ref)
            if kind == "resistor" or (kind in ("switch", "relay") and len(part.pins) > 2):
                self.layouts[part.ref] = layout_of(part, pins.get(part.ref))
        self.elements = {
            el.label: el
            for ref, lay in self.layouts.items()
            if self.kind(ref) == "resistor"
            for el in lay.elements
        }
        self.element_at: dict[tuple[str, str], Element] = {}
        self.far: dict[tuple[str, str], str] = {}
        for part in circuit.parts:
            self._far_sides(part)

    def _far_sides(self, part: Part) -> None:
        """For each pin of a two-terminal part or element: the net on its other side."""
        lay = self.layouts.get(part.ref)
        if lay is not None:
            pairs = [e.pins for e in lay.elements]
            for el in lay.elements:
                for pin in el.pins:
                    self.element_at.setdefault((part.ref, pin), el)
        elif len(part.pins) == 2:
            pairs = [(part.pins[0].number, part.pins[1].number)]
        else:
            return
        uses: dict[str, int] = {}
        for a, b in pairs:
            uses[a] = uses.get(a, 0) + 1
            uses[b] = uses.get(b, 0) + 1
        for a, b in pairs:
            na, nb = self.circuit.net_of(part.ref, a), self.circuit.net_of(part.ref, b)
            if na is None or nb is None:
                continue
            if uses[a] == 1:  # a common pin belongs to every element: it has no one far side
                self.far[(part.ref, a)] = nb.name
            if uses[b] == 1:
                self.far[(part.ref, b)] = na.name

    def kind(self, ref: str) -> str:
        return self.kinds.get(ref, "other")

    def rail(self, net: Net) -> RailTie | None:
        if net.name not in self._rails:
            self._rails[net.name] = self.rail_of(net)
        return self._rails[net.name]

    def far_is_rail(self, name: str) -> bool:
        net = self.nets.get(name)
        return net is not None and self.rail(net) is not None

    # ------------------------------------------------------------------ the neighbours
    def neighbours(
        self, net: Net, exclude: set[tuple[str, str]], pulls: tuple[str, ...], has_both: bool
    ) -> Neighbours:
        """Sort what sits on ``net`` (and one series resistor beyond it) by what it is."""
        n = self._sorted(net, exclude, pulls, has_both)
        for s in list(n["series"]):
            el = self.elements.get(s.ref)
            far = self.nets.get(s.far_net)
            if el is None or far is None or self.rail(far) is not None:
                continue
            beyond = self._sorted(far, {(el.ref, p) for p in el.pins}, (), False)
            n["via_inputs"].extend(replace(p, via=s.ref) for p in beyond["inputs"])
            n["via_controls"].extend(replace(p, via=s.ref) for p in beyond["controls"])
        return n

    def _sorted(
        self, net: Net, exclude: set[tuple[str, str]], pulls: tuple[str, ...], has_both: bool
    ) -> Neighbours:
        n = Neighbours(net.name, pulls, has_both, far_is_rail=self.far_is_rail)
        for m in net.members:
            if (m.ref, m.pin) in exclude or m.ref in self.unfitted:
                continue  # a part that is not fitted is not on the board
            group, pin = self._group(m)
            n[group].append(pin)
            if group == "inputs" and any(ADC_WORD.match(w) for w in name_words(m.name)):
                n["adc"].append(pin)  # a GPIO that doubles as an ADC input
        return n

    def _group(self, m: NetMember) -> tuple[str, Pin]:
        """Which group a member belongs to, and the pin record for it."""
        kind = self.kind(m.ref)
        pin = Pin(m.ref, m.pin, m.name, far_net=self.far.get((m.ref, m.pin), ""))
        name = m.name
        if _USB_CC_NAME.match(name) and kind in ("connector", "ic", "other", "logic"):
            return "usb_cc", pin
        if kind == "resistor":
            el = self.element_at.get((m.ref, m.pin))
            return "series", replace(pin, ref=el.label) if el is not None else pin
        simple = {
            "potentiometer": "resistive",
            "sensor": "sensors",
            "capacitor": "capacitors",
            "switch": "switches",
            "relay": "switches",
            "led": "leds",
            "diode": "leds",
        }
        if kind in simple:  # fmt: skip
            return simple[kind], pin
        if kind == "opamp":
            return ("other" if _POWER_NAME.match(name) else "opamps"), pin
        if kind == "optocoupler":
            return ("emitters" if is_emitter_name(name) else "drivers"), pin
        if m.type in _DRIVER_TYPES:
            return "drivers", pin
        if kind == "transistor":
            return ("controls" if _CONTROL_NAME.match(name) else "transistors"), pin
        if kind == "connector":
            # a breakout or module connector names its pins for the far chip's functions
            return ("analog" if is_analog_name(name) else "connectors"), pin
        if kind not in ("logic", "mcu", "ic", "other") or _POWER_NAME.match(name):
            return "other", pin
        if is_analog_name(name):
            return "analog", pin
        if m.type in _INPUT_TYPES:
            return "inputs", pin
        if m.type in _VAGUE_TYPES:
            if kind in ("other", "ic") and is_emitter_name(name):
                return "emitters", pin
            if m.ref in self.typed:
                return "passive_ic", pin  # the library typed the logic pins; this one it did not
            if kind != "other" and not _OUTPUT_NAME.match(name):
                return "inputs", pin
        return "other", pin


def _scan_resistors(self: _Scanner) -> tuple[Pulls, list[SetAside], list[tuple[Element, str]]]:
    """Pulls by signal net; resistors set aside on sight; elements not fitted."""
    found: Pulls = {}
    aside: list[SetAside] = []
    unfitted: list[tuple[Element, str]] = []
    for ref, lay in self.layouts.items():
        if self.kind(ref) != "resistor":
            continue
        if lay.problem:
            part = self.circuit.part(ref)
            pins = part.pins if part is not None else ()
            nets = [n for p in pins if (n := self.circuit.net_of(ref, p.number)) is not None]
            if any(self.rail(n) is not None for n in nets):
                aside.append(SetAside(ref, nets[0].name, f"resistor array: {lay.problem}"))
            continue
        for el in lay.elements:
            na = self.circuit.net_of(ref, el.pins[0])
            nb = self.circuit.net_of(ref, el.pins[1])
            if na is None or nb is None:
                continue
            if ref in self.unfitted:
                unfitted.append((el, self.unfitted[ref]))
                continue
            if na.name == nb.name:
                continue  # both ends on one net: it carries nothing
            ta, tb = self.rail(na), self.rail(nb)
            if ta is not None and tb is not None:
                aside.append(_between_rails(self, el, (na, ta), (nb, tb)))
                continue
            if ta is None and tb is None:
                continue  # a series resistor
            rail, signal = (ta, nb) if ta is not None else (tb, na)
            assert rail is not None
            low = _low(self, el)
            if low:
                aside.append(_aside(el, signal.name, low))
                continue
            ups, downs = found.setdefault(signal.name, ([], []))
            (downs if rail.ground else ups).append((el, rail))
    return found, aside, unfitted


def _low(self: _Scanner, el: Element) -> str:
    ohms = self.ohms(el.ref)
    if ohms is None or ohms >= LOW_OHMS:
        return ""
    return (
        f"below 10 Ω ({ohms:g} Ω): a link, shunt, current-sense or filter resistor in a "
        "supply or sense path, not a logic pull"
    )


def _between_rails(
    self: _Scanner, el: Element, a: tuple[Net, RailTie], b: tuple[Net, RailTie]
) -> SetAside:
    """A resistor joining two supply nets: a link, shunt, filter, load or bleed."""
    (na, ta), (_, tb) = sorted((a, b), key=lambda x: (x[1].ground, x[1].certain))
    low = _low(self, el)
    if low:
        return _aside(el, na.name, f"{low} (between {ta.name} and {tb.name})")
    if tb.ground:
        return _aside(el, na.name, f"load or bleed resistor: it joins supply {ta.name} to "
                                   f"ground ({tb.name}), not a signal")  # fmt: skip
    return _aside(el, na.name, f"link, shunt or filter between supply nets {ta.name} and "
                               f"{tb.name}, not a signal")  # fmt: skip


def _role(part: Part | None) -> str:
    return ((part.field("pullproof.role") if part is not None else None) or "").lower()


def find_pulls(
    circuit: Circuit,
    classify: Classify,
    rail_of: RailOf,
    *,
    library_pins: Mapping[str, tuple[LibPin, ...]] | None = None,
    ohms: Ohms | None = None,
) -> Topology:
    """Find every pulled signal net, set aside rail-tied resistors that are not logic pulls,
    and list switch-driven inputs that have no pull at all.

    ``library_pins`` (the symbols' pins, by reference) lets resistor arrays be split into
    elements; ``ohms`` gives each resistor's nominal value (for the 10 Ω rule).

    Raises:
        ValueParseError: a field ``pullproof.elements`` cannot be read.
    """
    scan = _Scanner(circuit, classify, rail_of, library_pins or {}, ohms or (lambda ref: None))
    found, aside, unfitted = _scan_resistors(scan)
    sites: list[PullSite] = []
    for name, (ups, downs) in sorted(found.items()):
        net = scan.nets[name]
        pulls = [el for el, _ in (*ups, *downs)]
        # The designer's word comes first: a 'skip' resistor is set aside for that reason
        # alone, and neither counts toward a divider nor hides the other pulls.
        forced = {el.label: _role(circuit.part(el.ref)) for el in pulls}
        aside.extend(
            _aside(el, name, "marked not a pull by its 'pullproof.role' field")
            for el in sorted(pulls, key=lambda e: e.label)
            if forced[el.label] == "skip"
        )
        ups_kept = [(el, t) for el, t in ups if forced[el.label] != "skip"]
        downs_kept = [(el, t) for el, t in downs if forced[el.label] != "skip"]
        kept = [el for el, _ in (*ups_kept, *downs_kept)]
        if not kept:
            continue
        exclude = {(el.ref, p) for el in pulls for p in el.pins}
        both = bool(ups_kept and downs_kept)
        n = scan.neighbours(net, exclude, tuple(el.label for el in kept), both)
        reason = reason_not_a_pull(n)
        if not reason and both:
            # A divider finding needs certainty: both ends on true rails, not on a net known
            # to be a supply only by what it feeds.
            inferred = [t.name for _, t in (*ups_kept, *downs_kept) if not t.certain]
            if inferred:
                reason = (
                    f"divider: an up and a down pull, and {', '.join(sorted(set(inferred)))} "
                    "is a supply known only from its pins (a power input or output on it)"
                )
        if reason and not any(forced[el.label] == "pull" for el in kept):
            aside.extend(_aside(el, name, reason) for el in sorted(kept, key=lambda e: e.label))
            continue
        sheet = name.rsplit("/", 1)[0] + "/" if name.startswith("/") else "/"
        sites.append(
            PullSite(
                net=net,
                ups=tuple((el.label, t.name) for el, t in ups_kept),
                downs=tuple((el.label, t.name) for el, t in downs_kept),
                inputs=tuple(n["inputs"] + n["via_inputs"]),
                switches=tuple(n["switches"]),
                # a gate or base on the net is a load, not a driver: only C/D/E/S pins drive
                drivers=tuple(n["drivers"] + n["transistors"]),
                capacitors=tuple(n["capacitors"]),
                connectors=tuple(n["connectors"]),
                sheet=sheet,
            )
        )
    aside.extend(_not_fitted(scan, unfitted, found))
    pulled = {s.net.name for s in sites} | {a.net for a in aside}
    floating = []
    for net in circuit.nets:
        if net.name in pulled or scan.rail(net) is not None:
            continue
        groups = scan.neighbours(net, set(), (), False)
        if groups["switches"] and groups["inputs"] and not groups["drivers"]:
            floating.append((net, tuple(groups["switches"]), tuple(groups["inputs"])))
    return Topology(tuple(sites), tuple(aside), tuple(floating), MappingProxyType(scan.elements))


def _not_fitted(
    scan: _Scanner,
    unfitted: list[tuple[Element, str]],
    found: Pulls,
) -> list[SetAside]:
    """Every element of a part that is not fitted, with what it would be if it were."""
    out = []
    for el, why in unfitted:
        na = scan.circuit.net_of(el.ref, el.pins[0])
        nb = scan.circuit.net_of(el.ref, el.pins[1])
        assert na is not None and nb is not None
        ta, tb = scan.rail(na), scan.rail(nb)
        head = f"not fitted ({why})"
        if ta is not None and tb is not None:
            out.append(_aside(el, na.name, f"{head}; it would join {ta.name} and {tb.name}"))
            continue
        if ta is None and tb is None:
            out.append(_aside(el, na.name, head))
            continue
        rail, signal = (ta, nb) if ta is not None else (tb, na)
        assert rail is not None
        ups, downs = found.get(signal.name, ([], []))
        exclude = {(e.ref, p) for e, _ in (*ups, *downs) for p in e.pins}
        exclude |= {(el.ref, p) for p in el.pins}
        n = scan.neighbours(signal, exclude, (el.label,), False)
        would = reason_not_a_pull(n)
        way = "down" if rail.ground else f"up to {rail.name}"
        tail = f"if fitted: {would}" if would else f"if fitted it would pull the net {way}"
        out.append(_aside(el, signal.name, f"{head}; {tail}"))
    return out
