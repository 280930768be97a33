"""Assumption classes: stated, conservative stand-ins for numbers nothing in the design gives.

The classes live in ``data/assumptions/classes.toml`` (its header documents the syntax);
every number there names its source, its status and why it stands in. Numbers taken from
a class carry the origin :attr:`~pullproof.provenance.Origin.ASSUMED` and a
:class:`~pullproof.provenance.Stands` record, so a limit resting on one is soft
(:mod:`pullproof.assumed`) and every report lists it as a value to confirm.

* an **input class** (``cmos``, ``lvttl``) becomes an :class:`InputModel` evaluated at
  the part's own supply, like a logic family;
* the **driver class** (``open-drain``) gives V_OL, I_OL and off-state leakage;
* the **rail class** (``usb-bus``) gives the voltage of a rail named for USB bus power;
* the **resistor class** (``array-element``) rates an array element nothing rates.
"""

from __future__ import annotations

import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, replace
from functools import cache
from importlib import resources
from types import MappingProxyType
from typing import Any

from ..errors import ValueParseError
from ..provenance import Origin, Provenance, Sourced, Stands, Status
from ..units import parse_current, parse_power, parse_voltage
from .loader import QUANTITY, Family, InputModel, family_from_table

__all__ = [
    "INPUT_KEYS",
    "AssumptionClasses",
    "ClassNumber",
    "InputClass",
    "load_classes",
]

CLASS_FILE = "classes.toml"
#: The keys of an input class, as the family files name them, with how reports name them.
INPUT_KEYS: Mapping[str, str] = MappingProxyType(
    {
        k: QUANTITY[k]
        for k in ("supply", "vih_min", "vil_max", "i_high", "i_low", "v_in_max", "c_in")
    }
)
_STATUS: Mapping[str, Status] = MappingProxyType(
    {
        "confirmed": Status.CONFIRMED,
        "confirmed (secondary)": Status.CONFIRMED,
        "from memory": Status.FROM_MEMORY,
        "common practice": Status.COMMON_PRACTICE,
    }
)
_KEYS = MappingProxyType(
    {
        "input": frozenset(INPUT_KEYS),
        "driver": frozenset({"v_ol", "i_ol", "i_off"}),
        "rail": frozenset({"nominal", "min", "max"}),
        "resistor": frozenset({"power", "working_voltage"}),
    }
)
_READERS: Mapping[str, Callable[..., Any]] = MappingProxyType(
    {
        "v_ol": parse_voltage,
        "i_ol": parse_current,
        "i_off": parse_current,
        "nominal": parse_voltage,
        "min": parse_voltage,
        "max": parse_voltage,
        "power": parse_power,
        "working_voltage": parse_voltage,
    }
)


@dataclass(frozen=True)
class ClassNumber:
    """One number of a class as written: its text, source, status words and why."""

    key: str
    text: str
    source: str
    status: str  # the words as written ("confirmed (secondary)")
    why: str

    def provenance(self, kind: str, name: str, quantity: str) -> Provenance:
        """The provenance of this number: assumed, with what it stands for (the part and
        pin are filled in by detection, which knows them)."""
        reason = f"{self.why} ({self.source}; {self.status})"
        fix = _FIX.get(kind, "")
        return Provenance(
            Origin.ASSUMED,
            f"assumed {quantity}: {kind} class {name}",
            _STATUS[self.status],
            reason,
            stands=Stands("", "", quantity, self.text, name, fix),
        )


_FIX = MappingProxyType(
    {
        "input": "a part-library entry for the part (pullproof parts --write), or the fields "
        "pullproof.vih, pullproof.vil, pullproof.i_high, pullproof.i_low on it",
        "driver": "a part-library entry for the driving part (i_ol, v_ol, i_off), or the fields "
        "pullproof.i_ol, pullproof.v_ol, pullproof.i_off on it",
        "rail": "a [rails] entry in the rules file",
        "resistor": "the field 'Power' or 'pullproof.working_voltage' on the array, or "
        'resistor.power / resistor.working_voltage = { "array" = … } in the rules',
    }
)


@dataclass(frozen=True)
class InputClass:
    """An input class: its numbers as written and the input model built from them."""

    name: str
    title: str
    numbers: Mapping[str, ClassNumber]
    family: Family

    def model(self) -> InputModel:
        return InputModel(self.family)


@dataclass(frozen=True)
class ValueClass:
    """A driver, rail or resistor class: each number read, with its provenance."""

    name: str
    title: str
    numbers: Mapping[str, ClassNumber]
    values: Mapping[str, Sourced]


@dataclass(frozen=True)
class AssumptionClasses:
    inputs: Mapping[str, InputClass]
    drivers: Mapping[str, ValueClass]
    rails: Mapping[str, ValueClass]
    resistors: Mapping[str, ValueClass]


def _number(kind: str, name: str, key: str, raw: Any) -> ClassNumber:
    where = f"{CLASS_FILE} [{kind}.{name}] {key}"
    if not isinstance(raw, dict) or set(raw) != {"value", "source", "status", "why"}:
        raise ValueParseError(str(raw), expected="{ value, source, status, why }", part=where)
    status = raw["status"]
    if status not in _STATUS:
        raise ValueParseError(str(status), expected=f"one of {', '.join(_STATUS)}", part=where)
    value = raw["value"]
    text = " … ".join(value) if isinstance(value, list) else str(value)
    return ClassNumber(key, text, str(raw["source"]), status, str(raw["why"]))


def _input_class(name: str, table: Mapping[str, Any]) -> InputClass:
    numbers = {k: _number("input", name, k, table[k]) for k in INPUT_KEYS if k in table}
    raw = {k: table[k]["value"] for k in INPUT_KEYS if k in table}
    supply = raw["supply"]
    family_table: dict[str, Any] = {
        "title": table.get("title", name),
        "standard": f"assumption class {name}",
        "supply": supply,
        **{k: raw[k] for k in ("v_in_max", "i_high", "i_low", "c_in") if k in raw},
        "levels": [{"vdd": supply, **{k: raw[k] for k in ("vih_min", "vil_max") if k in raw}}],
    }
    family = family_from_table(name, family_table, CLASS_FILE, origin=Origin.ASSUMED)
    provenance = {k: n.provenance("input", name, INPUT_KEYS[k]) for k, n in numbers.items()}
    return InputClass(
        name, str(table.get("title", name)), MappingProxyType(numbers),
        replace(family, provenance_of=MappingProxyType(provenance), note=""),
    )  # fmt: skip


def _value_class(kind: str, name: str, table: Mapping[str, Any]) -> ValueClass:
    numbers = {k: _number(kind, name, k, table[k]) for k in sorted(_KEYS[kind]) if k in table}
    values = {
        k: Sourced(
            _READERS[k](n.text, field=k, part=f"{CLASS_FILE} [{kind}.{name}]"),
            n.provenance(kind, name, _QUANTITY.get(k, k)),
        )
        for k, n in numbers.items()
    }
    return ValueClass(name, str(table.get("title", name)), MappingProxyType(numbers),
                      MappingProxyType(values))  # fmt: skip


_QUANTITY = MappingProxyType(
    {
        "v_ol": "V_OL",
        "i_ol": "I_OL",
        "i_off": "I_off",
        "nominal": "nominal voltage",
        "min": "lowest voltage",
        "max": "highest voltage",
        "power": "power rating",
        "working_voltage": "working voltage",
    }
)


@cache
def load_classes() -> AssumptionClasses:
    """Every shipped assumption class, by kind and name."""
    data = resources.files("pullproof.families") / "data" / "assumptions" / CLASS_FILE
    doc = tomllib.loads(data.read_text(encoding="utf-8"))
    for kind, tables in doc.items():
        for name, table in tables.items():
            extra = set(table) - _KEYS[kind] - {"title"}
            if extra:
                raise ValueParseError(
                    ", ".join(sorted(extra)), expected="a key the header documents",
                    part=f"{CLASS_FILE} [{kind}.{name}]",
                )  # fmt: skip
    return AssumptionClasses(
        inputs=MappingProxyType({n: _input_class(n, t) for n, t in doc.get("input", {}).items()}),
        drivers=MappingProxyType(
            {n: _value_class("driver", n, t) for n, t in doc.get("driver", {}).items()}
        ),
        rails=MappingProxyType(
            {n: _value_class("rail", n, t) for n, t in doc.get("rail", {}).items()}
        ),
        resistors=MappingProxyType(
            {n: _value_class("resistor", n, t) for n, t in doc.get("resistor", {}).items()}
        ),
    )
