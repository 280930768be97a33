"""The datasheet numbers a review still lacks or assumes, grouped by part (``pullproof parts``).

A review's networks list every assumed number they rest on (:class:`~pullproof.results.
Assumption`) and every value they miss (:class:`~pullproof.network.Missing`). This module
sorts them by where the real value belongs: a part (grouped by Value and symbol, with the
pins on pulled nets, its supply rail and the networks that wait for it), a rail of unknown
voltage, the rules' resistor and bus defaults, or a net whose input is off the schematic.
:mod:`pullproof.report.parts_out` prints the list and writes the part-library skeleton.
"""

from __future__ import annotations

import re
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field

from .assumed import assumptions_of
from .circuit import Circuit, Part
from .families.classes import INPUT_KEYS, load_classes
from .families.match import RATING_QUANTITY, PartKind, PartLibrary, classify
from .network import Missing
from .results import Assumption, NetworkResult, ReviewResult

__all__ = [
    "DATASHEET", "Need", "Needs", "PartNeeds", "RailNeeds", "RulesNeed", "natural", "needs_of",
    "refs_text",
]  # fmt: skip

# Where each number is found in a datasheet (common practice in how datasheets present them).
DATASHEET: Mapping[str, str] = {
    "supply": "the supply range its numbers hold for: recommended operating conditions, "
    "V_DD or V_CC (the I/O supply of the pin's bank)",
    "vih_min": "high-level input voltage V_IH (min), DC characteristics, at your supply",
    "vil_max": "low-level input voltage V_IL (max), DC characteristics, at your supply",
    "i_high": "input leakage current I_IH (or I_I, I_LKG) with the pin held high, over "
    "temperature; the current INTO the pin",
    "i_low": "input leakage current I_IL with the pin held low, over temperature; the current "
    "OUT of the pin",
    "v_in_max": "absolute maximum ratings: input voltage V_I (max), often V_DD + 0.3 V; "
    "higher when the pin is 5 V tolerant",
    "c_in": "input (pin) capacitance C_I or C_IN",
    "v_ol": "output low voltage V_OL (max), DC characteristics",
    "i_ol": "the sink current I_OL at which V_OL (max) is specified",
    "i_off": "off-state output leakage I_OZ or I_OFF (output high-impedance or off)",
    "contact_max": "contact rating: the largest switching current",
    "wetting": "the least switching current (wetting or dry-circuit current) of the contacts",
    "bounce": "contact bounce time",
    "ctr_min": "current transfer ratio CTR (min) at your LED current",
    "ageing": "CTR left at end of life (CTR degradation over operating life)",
    "i_f": "the least LED forward current your circuit gives",
    "dark_current": "collector dark current I_CEO over temperature",
    "vce_sat": "collector-emitter saturation voltage V_CE(sat) at your currents",
}
_BY_QUANTITY: Mapping[str, str] = {
    **{q: k for k, q in INPUT_KEYS.items()},
    **{q: k for k, q in RATING_QUANTITY.items()},
}
_MISSING_KEY = (
    (re.compile(r"^input data of "), tuple(INPUT_KEYS)),
    (re.compile(r"^(V_IH,min|V_IH,min and V_IL,max) "), ("vih_min", "vil_max")),
    (re.compile(r"^V_IL,max "), ("vil_max",)),
    (re.compile(r"^I_high "), ("i_high",)),
    (re.compile(r"^I_low "), ("i_low",)),
    (re.compile(r"^C_in "), ("c_in",)),
    (re.compile(r"^V_in,max "), ("v_in_max",)),
    (re.compile(r"^(I_OL|V_OL) "), ("i_ol", "v_ol")),
    (re.compile(r"^off-state leakage "), ("i_off",)),
    (re.compile(r"^CTR min "), ("ctr_min",)),
)
_RAIL = re.compile(r"^(?:the )?voltage of rail (?P<name>.+)$")
_INPUT_ON = re.compile(r"^a logic input on (?P<net>.+)$")
_RESISTOR_QUANTITIES = frozenset({"tolerance", "TCR", "power rating", "working voltage"})


@dataclass(frozen=True)
class Need:
    """One number a part's networks lack (``text`` None) or assume (the value used)."""

    key: str  # the part-library key ("vih_min", "i_ol", "wetting"), or "" when none holds it
    quantity: str  # how reports name it ("V_IH,min")
    text: str | None  # the value used, as written ("0.7 VDD"); None: missing
    basis: str  # the assumption ("cmos", "open-drain", "default"); "" when missing
    fix: str  # where the real one goes
    used: bool = True  # False: no network used it (the skeleton still holds the key)


@dataclass
class PartNeeds:
    """Every number one distinct part (Value and symbol) lacks or assumes."""

    name: str  # the Value (or symbol name) that identifies it
    value: str
    symbols: list[str]
    kind: PartKind
    refs: list[str] = field(default_factory=list)
    pins: dict[str, str] = field(default_factory=dict)  # pin name → the net it is on
    supplies: list[str] = field(default_factory=list)
    needs: dict[str, Need] = field(default_factory=dict)  # by key, or quantity when no key
    networks: list[str] = field(default_factory=list)
    family: str = ""  # a family the part's name or field gives (its inputs need no entry)
    entry: str = ""  # the part-library entry that already describes it

    @property
    def inputs(self) -> bool:
        return any(k in INPUT_KEYS for k in self.needs)

    @property
    def used(self) -> list[Need]:
        """The numbers some network lacks or assumes."""
        return [n for n in self.needs.values() if n.used]

    @property
    def library_keys(self) -> list[Need]:
        """The numbers a new part-library entry for it would hold: its input data unless a
        family gives them (a family comes before a part library), and its ratings."""
        return [
            n for n in self.needs.values() if n.key and (n.key not in INPUT_KEYS or not self.family)
        ]


@dataclass
class RailNeeds:
    name: str
    text: str | None  # the range judged ("2–6 V"), or None when unknown
    basis: str
    snippet: str  # the [rails] line
    networks: list[str] = field(default_factory=list)


@dataclass
class RulesNeed:
    """An assumed default the rules file can state (resistor tolerance, TCR, ratings, bus)."""

    quantity: str
    text: str
    fix: str
    refs: list[str] = field(default_factory=list)
    networks: list[str] = field(default_factory=list)


@dataclass
class Needs:
    parts: list[PartNeeds]
    rails: list[RailNeeds]
    rules: list[RulesNeed]
    nets: list[str]  # nets whose input is off this schematic (a [[net]] entry can name it)
    other: list[tuple[str, str, str]]  # (net, what, hint) that fit none of the above
    assume: str = "cmos"

    @property
    def entries(self) -> list[PartNeeds]:
        """The parts a part-library skeleton describes: those without an entry of their own
        that need a number an entry can hold."""
        return [p for p in self.parts if not p.entry and p.library_keys]


def natural(text: str) -> list[object]:
    """A sort key that orders R2 before R10."""
    return [int(t) if t.isdigit() else t for t in re.split(r"(\d+)", text)]


def _group_key(part: Part) -> str:
    value = part.value.strip()
    return value.upper() if value and value != "~" else part.lib_id.upper()


class _Collector:
    def __init__(self, circuit: Circuit, library: PartLibrary) -> None:
        self.circuit = circuit
        self.library = library
        self.parts: dict[str, PartNeeds] = {}
        self.rails: dict[str, RailNeeds] = {}
        self.rules: dict[tuple[str, str], RulesNeed] = {}
        self.nets: list[str] = []
        self.other: list[tuple[str, str, str]] = []

    def part(self, ref: str) -> PartNeeds | None:
        part = self.circuit.part(ref)
        if part is None:
            return None
        key = _group_key(part)
        found = self.parts.get(key)
        if found is None:
            value = part.value.strip() if part.value.strip() not in ("", "~") else ""
            entry = self.library.find(part)
            kind = entry.kind if entry is not None else classify(part)
            found = PartNeeds(value or part.lib_id, value, [], kind)
            found.entry = entry.name if entry is not None else ""
            self.parts[key] = found
        if part.lib_id not in found.symbols:
            found.symbols.append(part.lib_id)
        if ref not in found.refs:
            found.refs.append(ref)
        return found

    def network(self, r: NetworkResult) -> None:
        n = r.network
        label = f"{'/'.join(n.resistor.refs)} on {n.net}"
        # an incomplete or failing verdict rests on no assumption, but its other limits use
        # assumed values all the same: they are numbers to collect too
        used = r.assumptions or assumptions_of((*r.bounds, *r.checks), n.resistor, n.assumed)
        for a in used:
            self.assumption(a, label)
        for m in r.missing:
            self.missing(m, n.net, label)
        for inp in n.inputs:
            p = self.part(inp.ref)
            if p is None:
                continue  # an input off this schematic ([[net]] entry)
            if any(a.part == inp.ref for a in used) or any(m.ref == inp.ref for m in r.missing):
                p.pins.setdefault(inp.name or inp.pin, n.net)
                if inp.supply and inp.supply not in p.supplies:
                    p.supplies.append(inp.supply)
                if inp.family and not inp.family.endswith("(assumed)") and not p.entry:
                    p.family = inp.family
        for d in n.drivers:
            p = self.part(d.ref)
            if p is not None and any(a.part == d.ref for a in used):
                part = self.circuit.part(d.ref)
                pin = part.pin(d.pin) if part is not None else None
                p.pins.setdefault(pin.name if pin is not None and pin.name else d.pin, n.net)

    def assumption(self, a: Assumption, label: str) -> None:
        rail = _RAIL.match(a.quantity)
        if rail is not None:
            name = rail.group("name")
            need = self.rails.setdefault(name, RailNeeds(name, a.text, a.basis, a.fix))
            _add(need.networks, label)
            return
        if a.quantity in _RESISTOR_QUANTITIES or a.quantity == "bus capacitance":
            self.rule(a, label)
            return
        for ref in a.part.split("/"):
            p = self.part(ref)
            if p is None:
                continue
            key = _BY_QUANTITY.get(a.quantity, "")
            p.needs.setdefault(key or a.quantity, Need(key, a.quantity, a.text, a.basis, a.fix))
            _add(p.networks, label)

    def rule(self, a: Assumption, label: str) -> None:
        text = a.text
        if a.quantity in ("power rating", "working voltage") and a.basis != "default":
            # an array element's rating: only a field on the array states it
            text = f"{a.text} ({a.basis})"
        need = self.rules.setdefault((a.quantity, text), RulesNeed(a.quantity, text, a.fix))
        for ref in a.part.split("/"):
            if ref:
                _add(need.refs, ref)
        _add(need.networks, label)

    def missing(self, m: Missing, net: str, label: str) -> None:
        rail = _RAIL.match(m.what)
        if rail is not None:
            name = rail.group("name")
            snippet = f'# {name} = "3V3"   # state its nominal voltage (and tolerance)'
            need = self.rails.setdefault(name, RailNeeds(name, None, "", snippet))
            _add(need.networks, label)
            return
        if _INPUT_ON.match(m.what):
            _add(self.nets, net)
            return
        p = self.part(m.ref) if m.ref else None
        keys = next((k for rx, k in _MISSING_KEY if rx.match(m.what)), None)
        if p is None or keys is None:
            self.other.append((net, m.what, m.hint))
            return
        for key in keys:
            quantity = INPUT_KEYS.get(key) or RATING_QUANTITY.get(key, key)
            p.needs.setdefault(key, Need(key, quantity, None, "", m.hint))
        _add(p.networks, label)


def _add(items: list[str], item: str) -> None:
    if item not in items:
        items.append(item)


def needs_of(result: ReviewResult, circuit: Circuit, library: PartLibrary) -> Needs:
    """Everything the networks of ``result`` lack or assume, by where the real value goes."""
    c = _Collector(circuit, library)
    for r in result.networks:
        c.network(r)
    parts = sorted((p for p in c.parts.values() if p.needs), key=lambda p: natural(p.name))
    for p in parts:
        p.refs.sort(key=natural)
        if p.inputs and not p.family:  # the skeleton holds the whole input description
            _fill_inputs(p, result.assume)
    return Needs(
        parts,
        sorted(c.rails.values(), key=lambda r: natural(r.name)),
        list(c.rules.values()),
        c.nets,
        c.other,
        result.assume,
    )


def _fill_inputs(p: PartNeeds, word: str) -> None:
    """Every input key present, with the input class's value where the networks used none."""
    cls = load_classes().inputs.get(word) or load_classes().inputs.get("cmos")
    if cls is None:  # pragma: no cover - the shipped file has the cmos class
        return
    for key, quantity in INPUT_KEYS.items():
        number = cls.numbers.get(key)
        if key not in p.needs and number is not None:
            p.needs[key] = Need(key, quantity, number.text, cls.name, "", used=False)


def refs_text(refs: Iterable[str]) -> str:
    return ", ".join(sorted(refs, key=natural))
