"""Stated stand-ins for what nothing in the design says: which assumption applies, and where.

The rules key ``assume`` names the input class (``cmos`` by default, ``lvttl``) or
``none`` (``--strict``). While it is on, detection stands in, each time as an assumption
(origin ``assumed`` with a :class:`~pullproof.provenance.Stands` naming part, pin and
quantity):

* a logic input whose part has no data is judged with the input class at the part's own
  supply, and the class fills any number a family, part library or fields leave out;
* an open-drain or open-collector output without ratings gets the driver class;
* a rail named for USB bus power gets the USB figures; another rail whose name states no
  voltage (and that the rules do not list) is judged over the supply range every part it
  powers with known data accepts, at both ends;
* an element of a resistor array without a rating gets the array-element rating.

With ``assume = "none"`` none of this happens, and numbers other sources mark ``assumed``
(a family's stand-in leakage, a part-library value not yet confirmed) are left out, so a
review is exactly as strict as one without any stand-in.
"""

from __future__ import annotations

import re
from collections.abc import Callable, Mapping
from dataclasses import fields, replace
from typing import Any

from .circuit import Circuit, Net, Part, PartPin
from .families.classes import AssumptionClasses, load_classes
from .families.loader import InputModel
from .families.match import PartInfo, PartKind, family_from_name
from .network import InputLevels
from .provenance import Origin, Provenance, Sourced, Stands
from .rail_range import RailStandIns
from .rules import RailSpec, Rules, glob_any
from .units import format_si

__all__ = ["POWER_PIN_NAMES", "Assumer", "io_supply", "is_power", "stand", "value_text"]


POWER_PIN_NAMES = ("VCC*", "VDD*", "IOVDD*", "DVDD*", "VIO*", "V+", "VDDIO*", "VCCIO*", "VL")
# Supply pins that feed a part's I/O pins, and those that feed something else (core, analog,
# USB, a regulator's input): common practice in how parts name their supply pins.
_IO_SUPPLY = re.compile(r"(?i)(IO|VCCO|VDDQ|OVDD|^VL$|^V_?LOGIC)")
_OTHER_SUPPLY = re.compile(
    r"(?i)(CORE|INT|DVDD|AVDD|AVCC|VDDA|ANA|ADC|VREF|USB|VREG|VIN|PLL|RTC|BAT)"
)
_POWER_NAME = glob_any(POWER_PIN_NAMES)  # every pin of every part is asked
_BANK = re.compile(r"(?i)(?:VCCO|VCCIO|VDDIO|IOVDD|VIO)_?(\d+)$")
_LEVEL_KEYS = ("vih_min", "vil_max", "i_high", "i_low", "c_in")
# every number of one corner of an input (all InputLevels fields but its supply)
_NUMBER_KEYS = tuple(f.name for f in fields(InputLevels) if f.name != "vdd")


def stand(value: Sourced, part: str, pin: str) -> Sourced:
    """``value`` with the part and pin it stands for (an assumed value only); its written
    text is filled in from the value when the source gave none."""
    src = value.source
    if src.origin is not Origin.ASSUMED:
        return value
    old = src.stands or Stands("", "", src.where, "", "default", src.reason)
    text = old.text or value_text(value)
    # built field by field: a review stands in for several numbers of every network, and
    # dataclasses.replace is several times slower than the constructor
    new = Stands(old.part or part, old.pin or pin, old.quantity, text, old.basis, old.fix)
    return Sourced(value.value, Provenance(src.origin, src.where, src.status, src.reason, new))


def value_text(value: Sourced) -> str:
    """An assumed value as text when its source wrote none: "10 µA", "0.4 V"."""
    q = value.value
    if not hasattr(q, "units"):
        return f"{q:g}"
    unit = f"{q.units:~P}"
    return format_si(float(q.to_base_units().magnitude), _SYMBOL.get(unit, unit), sig=3)


_SYMBOL = {"V": "V", "A": "A", "F": "F", "W": "W", "Ω": "Ω", "s": "s"}


def is_power(pin: PartPin) -> bool:
    """A power-input pin: typed so, or named like one (VCC, VDD, IOVDD …)."""
    name = pin.name.upper()
    return pin.type == "power_in" or _POWER_NAME(name)


def _number(text: str) -> int | None:
    return int(text) if text.isdigit() else None


def io_supply(
    circuit: Circuit, part: Part, pin: str, spec_of: Callable[[Net], RailSpec | None]
) -> list[RailSpec]:
    """The rails on a part's power-input pins, the likeliest supply of ``pin`` first.

    One rail: it. Several: a supply numbered for the pin's bank (``VCCO_34`` for
    ``IO_L1P_34``), then a supply named for I/O (``IOVDD``, ``VDDIO``, ``VCCO``), then the
    others except core, analog, USB and regulator-input supplies, each group nearest the pin
    by pin number (a package's bank sits beside its supply pins)."""
    me = part.pin(pin)
    name = me.name.upper() if me is not None else ""
    where = _number(pin)
    found: dict[str, tuple[int, int, RailSpec]] = {}
    for p in part.pins:
        if not is_power(p):
            continue
        net = circuit.net_of(part.ref, p.number)
        spec = spec_of(net) if net is not None else None
        if spec is None or spec.ground:
            continue
        bank = _BANK.search(p.name)
        if bank is not None and name.endswith(f"_{bank.group(1)}"):
            rank = 0
        elif _IO_SUPPLY.search(p.name):
            rank = 1
        elif _OTHER_SUPPLY.search(p.name):
            rank = 3
        else:
            rank = 2
        n = _number(p.number)
        distance = abs(n - where) if n is not None and where is not None else 1 << 30
        best = found.get(spec.name)
        if best is None or (rank, distance) < best[:2]:
            found[spec.name] = (rank, distance, spec)
    return [spec for _, _, spec in sorted(found.values(), key=lambda t: t[:2])]


class Assumer:
    """Decides, for one review, which assumption stands in for each unknown number."""

    def __init__(
        self,
        circuit: Circuit,
        infos: Mapping[str, PartInfo],
        rules: Rules,
        spec_of: Callable[[Net], RailSpec | None],
        classes: AssumptionClasses | None = None,
    ) -> None:
        self.circuit = circuit
        self.infos = infos
        self.rules = rules
        self.classes = classes or load_classes()
        self.word = rules.assume
        self.enabled = self.word != "none"
        self.spec_of = spec_of
        self.rails = RailStandIns(self)

    # ------------------------------------------------------------------ inputs
    def input_class(self, word: str = "") -> InputModel | None:
        """The input model of class ``word`` (default: the rules' ``assume``)."""
        cls = self.classes.inputs.get(word or self.word)
        return None if cls is None or not self.enabled else cls.model()

    def class_model(self, part: Part) -> InputModel | None:
        """The class model for an input whose part has no data, or None: assumptions are
        off, or the part is a logic series the name identifies but we hold no data for (a
        CMOS stand-in would contradict what its name says, e.g. a bipolar 74ALS)."""
        found = family_from_name(part.value) or family_from_name(part.lib_id.split(":")[-1])
        if found is not None and self.infos[part.ref].kind is PartKind.LOGIC:
            return None
        return self.input_class()

    def complete(
        self,
        levels: InputLevels,
        ref: str,
        pin: str,
        other_supply: bool,
        has: frozenset[str] = frozenset(),
    ) -> InputLevels:
        """One corner of an input with every assumed value tagged with its part and pin:
        gaps filled from the input class when assumptions are on, assumed values left out
        when they are off. A gap is a number the input's data never give (``has`` lists
        those they give at some corner: outside its table a family stays silent, it is not
        filled); V_in,max is filled only for an input on another supply, which needs it."""
        changes: dict[str, Any] = {}
        wanted = (*_LEVEL_KEYS, "v_in_max") if other_supply else _LEVEL_KEYS
        gaps = [k for k in wanted if k not in has and getattr(levels, k) is None]
        stand_in = self.input_class() if gaps else None
        if stand_in is not None:  # evaluated only where a gap needs it (a review has many)
            fill = stand_in.at(levels.vdd)
            changes.update((k, getattr(fill, k)) for k in gaps)
        for name in _NUMBER_KEYS:
            value = changes.get(name, getattr(levels, name))
            if isinstance(value, Sourced) and value.source.origin is Origin.ASSUMED:
                changes[name] = stand(value, ref, pin) if self.enabled else None
        return replace(levels, **changes) if changes else levels

    # ------------------------------------------------------------------ drivers, arrays
    def driver(self, values: Mapping[str, Sourced | None], ref: str, pin: str) -> dict[str, Any]:
        """An open-drain output's V_OL, I_OL and off-state leakage, gaps from the driver class."""
        cls = self.classes.drivers.get("open-drain")
        out: dict[str, Any] = {}
        for key, value in values.items():
            if value is not None and value.source.origin is Origin.ASSUMED and not self.enabled:
                value = None  # a part-library value not yet confirmed: left out when strict
            if value is None and self.enabled and cls is not None:
                value = cls.values.get(key)
            out[key] = None if value is None else stand(value, ref, pin)
        return out

    def array_rating(self, key: str, ref: str) -> Sourced | None:
        """The assumed rating (power, working_voltage) of an element of array ``ref``."""
        cls = self.classes.resistors.get("array-element")
        if not self.enabled or cls is None or key not in cls.values:
            return None
        return stand(cls.values[key], ref, "")
