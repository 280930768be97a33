"""Turn pulled nets found by :mod:`pullproof.topology` into resolved pull networks.

Every number the constraint engine will read is attached here, with its source:
resistor values and ratings from part fields, input levels from family data or the
part library at each corner of the input's own supply, rail voltages from the
rules file or the rail's name, and the project rules for the net.
"""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass, replace

from .assume import Assumer, stand
from .circuit import Circuit, Net, Part
from .elements import Element
from .families.match import PartInfo, PartKind, ResistorInfo
from .hazard import Hazard, hazard_of
from .inputs import Inputs, enabled_internal_pull
from .network import (
    CapacitorOnNet,
    Direction,
    DriverOnNet,
    Missing,
    NetworkRules,
    PullNetwork,
    PullResistor,
    Rail,
    SwitchOnNet,
)
from .provenance import Origin, Provenance, Sourced, Stands, Status
from .rules import RailSpec, Rules
from .supplies import RailTie, supply_nets
from .topology import PinOnNet, PullSite
from .units import Q_

__all__ = ["Resolver", "UnknownRail", "enabled_internal_pull"]  # (re-exported from inputs)

# A small-signal transistor or MOSFET sinks far more than any pull draws; used only when the
# part says nothing (common practice: small-signal devices are rated for 100 mA and more).
_TRANSISTOR_SINK = (Q_(10e-3, "A"), Q_(0.4, "V"))
_TRANSISTOR_LEAK = Q_(1e-6, "A")


@dataclass(frozen=True)
class UnknownRail:
    """A pull whose rail voltage is unknown: it cannot be judged until the rail is described."""

    site: PullSite
    rail: str
    refs: tuple[str, ...]


def _assumed(
    value: object, name: str, reason: str, status: Status, quantity: str, ref: str
) -> Sourced:
    """A driver rating the part does not state: a limit resting on it is soft."""
    fix = f"field 'pullproof.{quantity.lower()}' on {ref}, or a part-library entry"
    stands = Stands(ref, "", quantity, "", "default", fix)
    return Sourced(value, Provenance(Origin.ASSUMED, name, status, reason, stands))


def _derived(value: object, where: str) -> Sourced:
    return Sourced(value, Provenance(Origin.DERIVED, where, Status.USER))


def _pin_label(pin: PinOnNet) -> str:
    """How assumption lists name a pin: its number, and its name when it has one."""
    return pin.pin if not pin.name or pin.name == pin.pin else f"{pin.pin} ({pin.name})"


def _magnitude(value: Sourced | None) -> Sourced | None:
    return None if value is None else Sourced(abs(value.value), value.source)


class _RuleRails:
    """What the rules say of a rail name, once per name in a review: every net, pull and
    input supply asks, and the rules do not change while a review runs."""

    def __init__(self, rules: Rules) -> None:
        self.rules = rules
        self._specs: dict[str, RailSpec | None] = {}
        self._hazards: dict[str, Hazard | None] = {}

    def spec(self, name: str) -> RailSpec | None:
        """``rules.rail(name)``."""
        if name not in self._specs:
            self._specs[name] = self.rules.rail(name)
        return self._specs[name]

    def hazard(self, name: str) -> Hazard | None:
        """The hazard of a pull rail called ``name``, judged by its rules spec alone."""
        if name not in self._hazards:
            self._hazards[name] = hazard_of(self.rules, name, self.spec(name))
        return self._hazards[name]


class Resolver:
    """Resolve pull sites of one circuit with one set of rules and part data."""

    def __init__(
        self,
        circuit: Circuit,
        infos: Mapping[str, PartInfo],
        rules: Rules,
        elements: Mapping[str, Element] | None = None,
    ) -> None:
        self.circuit = circuit
        self.infos = infos
        self.rules = rules
        self.nets = {n.name: n for n in circuit.nets}
        self._hazards: dict[str, Hazard | None] = {}
        self.supplies = supply_nets(circuit)
        self.elements: Mapping[str, Element] = elements or {}
        self.assumer = Assumer(circuit, infos, rules, self.rail_of)
        self.inputs = Inputs(self)
        self._rail_cache: dict[str, Rail | None] = {}
        self.rule_rails = _RuleRails(rules)

    def element(self, label: str) -> Element:
        """The resistor a label names (``R3``, ``RN1 (1–8)``) as part and pins."""
        return self.elements.get(label) or Element(label, ("1", "2"))

    def resistor_info(self, label: str) -> ResistorInfo | None:
        return self.infos[self.element(label).ref].resistor

    # ------------------------------------------------------------------ rails
    def rail_of(self, net: Net) -> RailSpec | None:
        """The rail a net stands for (None: a signal): a rules entry, a power symbol, a whole
        name that is a supply name, or a supply function (it feeds power pins)."""
        for name in (net.name, *net.labels) if net.power or net.labels else ():
            spec = self.rule_rails.spec(name)
            if spec is not None:
                return spec
        name = net.name.rsplit("/", 1)[-1]
        if net.power:
            # A power symbol names a supply even when its name states no voltage (VLOGIC):
            # a rail of unknown voltage, which the rules file can describe.
            return RailSpec(name, None, None, None)
        why = self.supplies.get(net.name, "")
        if why:
            # Named like a signal or not at all, but it powers something: a supply of
            # unknown voltage, never a logic level.
            return RailSpec(name, None, None, None, inferred=why)
        return None

    def rail_key(self, net: Net) -> RailTie | None:
        spec = self.rail_of(net)
        return None if spec is None else RailTie(spec.name, spec.ground, not spec.inferred)

    def rail(self, name: str) -> Rail | None:
        """The rail's voltage range: from the rules or its name; for a rail named for USB bus
        power the USB figures, and for one whose voltage nothing states the range every part
        it powers accepts (both assumed; see :mod:`pullproof.assume`). None: unknown."""
        if name not in self._rail_cache:  # asked once per input's supply: worth keeping
            self._rail_cache[name] = self._find_rail(name)
        return self._rail_cache[name]

    def _find_rail(self, name: str) -> Rail | None:
        if self.assumer.rails.usb(name):
            usb = self.assumer.rails.usb_rail(name)
            if usb is not None:
                return usb
        spec = self.rule_rails.spec(name)
        if spec is not None and spec.follows and spec.v_min is None:
            base = self.rail(spec.follows) if spec.follows != name else None
            return None if base is None else replace(base, name=name, follows=spec.follows)
        if spec is None or spec.v_min is None or spec.v_max is None or spec.nominal is None:
            return self.assumer.rails.ranged_rail(name)
        return Rail(spec.name, spec.v_min, spec.v_max, spec.nominal, ground=spec.ground,
                    ac=spec.ac, follows=spec.follows)  # fmt: skip

    def _ground(self) -> Rail:
        zero = Sourced(Q_(0.0, "V"), Provenance(Origin.SCHEMATIC, "ground net", Status.USER))
        return Rail("GND", zero, zero, zero, ground=True)

    # ------------------------------------------------------------------ resistors
    def _resistor(self, refs: tuple[str, ...], missing: list[Missing]) -> PullResistor | None:
        """Combine parallel pulls into one record (worst tolerance, TCR and rating)."""
        infos = [self.resistor_info(r) for r in refs]
        if any(i is None or i.ohms is None for i in infos):
            for r, i in zip(refs, infos, strict=True):
                if i is None or i.ohms is None:
                    missing.append(Missing(f"resistance of {r}", r, "write the Value, e.g. 4k7"))
            return None
        known = [i for i in infos if i is not None and i.ohms is not None]
        first = known[0]
        if len(known) == 1:
            assert first.ohms is not None
            ohms = first.ohms
        else:
            total = sum(1.0 / i.ohms.magnitude("ohm") for i in known if i.ohms is not None)
            ohms = _derived(Q_(1.0 / total, "ohm"), f"{' ∥ '.join(refs)} in parallel")
        tol = max((i.tolerance for i in known), key=lambda s: s.magnitude(""))
        tcr = max((i.tcr for i in known), key=lambda s: s.magnitude("1/K"))
        powers = [i.power for i in known]
        power = (
            None
            if any(p is None for p in powers)
            else min((p for p in powers if p is not None), key=lambda s: s.magnitude("W"))
        )
        volts = [i.working_voltage for i in known]
        wv = (
            None
            if any(v is None for v in volts)
            else min((v for v in volts if v is not None), key=lambda s: s.magnitude("V"))
        )
        elements = tuple(self.element(r) for r in refs)
        arrays = elements if any(e.array for e in elements) else ()
        label = "/".join(refs)
        if arrays:  # an array element nothing rates: the array-element class (assumed)
            power = power or self.assumer.array_rating("power", label)
            wv = wv or self.assumer.array_rating("working_voltage", label)
        tol, tcr = stand(tol, label, ""), stand(tcr, label, "")
        power = None if power is None else stand(power, label, "")
        wv = None if wv is None else stand(wv, label, "")
        return PullResistor(refs, ohms, tol, tcr, power, wv, size=first.size, elements=arrays)

    # ------------------------------------------------------------------ switches, drivers
    def _far_rail(self, far_net: str) -> RailSpec | None:
        net = self.nets.get(far_net)
        return self.rail_of(net) if net is not None else None

    def _switch(self, pin: PinOnNet, direction: Direction) -> SwitchOnNet:
        ratings = self.infos[pin.ref].ratings
        far = self._far_rail(pin.far_net)
        against = far is not None and (far.ground if direction is Direction.UP else not far.ground)
        other = far.name if far is not None else (pin.far_net or "another pin of the part")
        return SwitchOnNet(
            pin.ref,
            other,
            against,
            ratings.get("contact_max"),
            ratings.get("wetting"),
            ratings.get("bounce"),
        )

    def _driver(self, pin: PinOnNet) -> DriverOnNet:
        info = self.infos[pin.ref]
        r = info.ratings
        # Driver numbers come from the part's ratings (fields or part library), as magnitudes.
        fields = {k: _magnitude(r.get(k)) for k in ("i_ol", "v_ol", "i_off")}
        if info.kind is PartKind.OPTOCOUPLER:
            return DriverOnNet(
                pin.ref, pin.pin, "optocoupler", None, r.get("vce_sat"),
                fields["i_off"] or r.get("dark_current"),
                ctr_min=r.get("ctr_min"), ageing=r.get("ageing"), i_f_min=r.get("i_f"),
                vce_sat=r.get("vce_sat"),
            )  # fmt: skip
        if info.kind is PartKind.TRANSISTOR:
            cp = Status.COMMON_PRACTICE
            i_ol = fields["i_ol"] or _assumed(
                _TRANSISTOR_SINK[0], "assumed transistor sink current", "small-signal "
                "transistors sink far more than a pull draws", cp, "I_OL", pin.ref,
            )  # fmt: skip
            v_ol = fields["v_ol"] or _assumed(
                _TRANSISTOR_SINK[1], "assumed transistor saturation voltage",
                "small-signal saturation is below 0.4 V at these currents", cp, "V_OL", pin.ref,
            )  # fmt: skip
            i_off = fields["i_off"] or _assumed(
                _TRANSISTOR_LEAK, "assumed transistor off-state leakage",
                "small-signal transistors leak well under 1 µA when off", cp, "I_off", pin.ref,
            )  # fmt: skip
            label = _pin_label(pin)
            i_ol, v_ol, i_off = (stand(v, pin.ref, label) for v in (i_ol, v_ol, i_off))
            return DriverOnNet(pin.ref, pin.pin, "transistor", i_ol, v_ol, i_off)
        kind = "open-collector" if "collector" in pin.name.lower() else "open-drain"
        # An output without ratings gets the driver class (assumed) while assumptions are on.
        got = self.assumer.driver(fields, pin.ref, _pin_label(pin))
        return DriverOnNet(pin.ref, pin.pin, kind, got["i_ol"], got["v_ol"], got["i_off"])

    def _capacitor(self, pin: PinOnNet, missing: list[Missing]) -> CapacitorOnNet | None:
        farads = self.infos[pin.ref].ratings.get("capacitance")
        if farads is None:
            part = self.circuit.part(pin.ref)
            text = part.value if part is not None else ""
            hint = f"its Value {text!r} is not a capacitance; write e.g. 100n or 470pF/50V"
            missing.append(Missing(f"capacitance of {pin.ref}", pin.ref, hint))
            return None
        far = self._far_rail(pin.far_net)
        return CapacitorOnNet(pin.ref, farads, far.name if far else pin.far_net)

    # ------------------------------------------------------------------ mains
    def mains_reason(self, site: PullSite, rails: tuple[str, ...] = ()) -> str:
        """Why this network sits next to mains or other hazardous voltage ("" when it does
        not): its net is at it, its pull rail is, a two-terminal part ties it to such a net,
        or a driver or switch part also connects to one (an optocoupler, a relay)."""
        own = self.hazard(site.net.name)
        if own is not None:
            return own.reason
        for name in rails:
            h = self.rule_rails.hazard(name)
            if h is not None:
                return f"the pull rail {name} {h.what}"
        for m in site.net.members:  # a two-terminal part (capacitor, resistor) to such a net
            part = self.circuit.part(m.ref)
            if part is None or len(part.pins) != 2:
                continue
            for p in part.pins:
                far = self.circuit.net_of(part.ref, p.number)
                h = None if far is None or far.name == site.net.name else self.hazard(far.name)
                if far is not None and h is not None:
                    return f"{part.ref} ties it to {far.name}, which {h.what}"
        for pin in (*site.drivers, *site.switches):
            part = self.circuit.part(pin.ref)
            if part is None:
                continue
            for other in self._nets_near(part, site.net.name):
                h = self.hazard(other)
                if h is not None:
                    return f"{pin.ref} also connects to {other}, which {h.what}"
        return ""

    def hazard(self, name: str) -> Hazard | None:
        """The hazard of the net called ``name`` (mains pattern or rail voltage), or None."""
        if name not in self._hazards:
            net = self.nets.get(name)
            spec = self.rail_of(net) if net is not None else None
            self._hazards[name] = hazard_of(self.rules, name, spec)
        return self._hazards[name]

    def _nets_near(self, part: Part, exclude: str) -> list[str]:
        """Nets on the part's other pins, then those one two-terminal part beyond them."""
        first = {
            n.name
            for p in part.pins
            if (n := self.circuit.net_of(part.ref, p.number)) is not None and n.name != exclude
        }
        found = set(first)
        for name in first:
            net = self.nets[name]
            spec = self.rail_of(net)
            if spec is not None and self.hazard(name) is None:
                continue  # a supply or ground reaches everything; a hazard is never beyond it
            for m in net.members:
                other = self.circuit.part(m.ref)
                if other is None or other.ref == part.ref or len(other.pins) != 2:
                    continue
                for p in other.pins:
                    far = self.circuit.net_of(other.ref, p.number)
                    if far is not None:
                        found.add(far.name)
        return sorted(first) + sorted(found - first)

    # ------------------------------------------------------------------ rules
    def net_rules(self, net: str, rail: Rail | None) -> NetworkRules:
        """The project rules for one net; a margin given as a fraction scales with the rail."""
        nr = self.rules.for_net(net)
        margin = nr.margin
        if margin.value.dimensionless and rail is not None:
            volts = margin.magnitude("") * rail.v_nom.magnitude("V")
            margin = _derived(Q_(volts, "V"), f"{margin.source.where} × {rail.name} nominal")
        get = self.rules.get
        return NetworkRules(
            margin=margin,
            derating=get("derating"),
            temp_min=get("temperature.min"),
            temp_max=get("temperature.max"),
            temp_ref=get("temperature.ref"),
            series=self.rules.series,
            policy=self.rules.policy,
            preferred_min=get("preferred.min"),
            preferred_max=get("preferred.max"),
            current_budget=nr.current_budget,
            bounce_time=nr.bounce,
            edge_time_max=nr.edge_time,
            i2c_mode=nr.i2c_mode,
            bus_capacitance=nr.bus_capacitance,
            wiring_capacitance=nr.capacitance,
        )

    # ------------------------------------------------------------------ the network
    def resolve(
        self, site: PullSite, direction: Direction, pulls: tuple[tuple[str, str], ...]
    ) -> PullNetwork | UnknownRail:
        """The resolved network for the pulls of one direction on a site."""
        refs = tuple(r for r, _ in pulls)
        rail_name = pulls[0][1]
        rail = self._ground() if direction is Direction.DOWN else self.rail(rail_name)
        if rail is None:
            return UnknownRail(site, rail_name, refs)
        missing: list[Missing] = []
        resistor = self._resistor(refs, missing)
        if resistor is None:
            return UnknownRail(site, rail_name, refs)  # no value: nothing can be judged
        inputs = tuple(self.inputs.input(p, rail) for p in site.inputs)
        far = self.inputs.offboard(site, rail)
        inputs = (*inputs, far) if far is not None else inputs
        switches = tuple(self._switch(p, direction) for p in site.switches)
        drivers = tuple(self._driver(p) for p in site.drivers)
        caps = tuple(c for p in site.capacitors if (c := self._capacitor(p, missing)) is not None)
        if not inputs and not drivers:
            missing.append(
                Missing(
                    f"a logic input on {site.net.name}",
                    "",
                    "the net reaches no logic input pin; check the symbol's pin types or add "
                    "a part-library entry for the receiving part",
                )
            )
        opposite = self._opposite(direction, switches, drivers)
        net_rules = self.net_rules(site.net.name, opposite if rail.ground and opposite else rail)
        mains = self.mains_reason(site, tuple(sorted({r for _, r in pulls})))
        return PullNetwork(
            net=site.net.name,
            sheet=site.sheet,
            direction=direction,
            rail=rail,
            resistor=resistor,
            inputs=inputs,
            rules=net_rules,
            switches=switches,
            drivers=drivers,
            capacitors=caps,
            opposite_rail=opposite,
            mains_adjacent=bool(mains),
            mains_reason=mains,
            missing=tuple(missing),
            assumed=tuple(i.supply_assumed for i in inputs if i.supply_assumed is not None),
            notes=_capacitance_notes(net_rules),
        )

    def _opposite(
        self,
        direction: Direction,
        switches: tuple[SwitchOnNet, ...],
        drivers: tuple[DriverOnNet, ...],
    ) -> Rail | None:
        """The rail a switch pulls toward (ground for a pull-up's drivers)."""
        if direction is Direction.UP:
            return self._ground() if (drivers or any(s.pulls_against for s in switches)) else None
        for s in switches:
            if s.pulls_against:
                return self.rail(s.other_side)
        return None


def _capacitance_notes(rules: NetworkRules) -> tuple[str, ...]:
    """Say so when a stated wiring capacitance is not added (an I2C bus figure covers it)."""
    if rules.wiring_capacitance is not None and rules.bus_capacitance is not None:
        return (
            f"the wiring capacitance from {rules.wiring_capacitance.source.where} is not added: "
            "on an I2C line the bus capacitance stands for the pins and the wiring together",
        )
    return ()
