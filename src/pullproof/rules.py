"""The project rules file (``pullproof.toml`` beside the root schematic) with documented defaults.

Every value carries its provenance: the rules key with file and line, or a named
default with its reason. Values are written with their units as text ("5%",
"3V3", "10ms", "100pF", "-40°C"); see :data:`KEYS` for every key, its default and
why. Rails named like ``+5V``, ``3V3``, ``VCC_1V8``, ``-12V`` or ``VBUS`` need
no entry: their voltage is read from the whole name (see :mod:`pullproof.supplies`).
"""

from __future__ import annotations

import difflib
import fnmatch
import re
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field, replace
from functools import lru_cache
from pathlib import Path
from types import MappingProxyType
from typing import Any

from .errors import Location, RulesError, ValueParseError
from .eseries import SERIES
from .provenance import Origin, Provenance, Sourced, Stands, Status
from .supplies import read_supply_name
from .textfile import read_utf8
from .units import (
    Q_,
    parse_capacitance,
    parse_current,
    parse_percent,
    parse_power,
    parse_resistance,
    parse_tcr,
    parse_temperature,
    parse_time,
    parse_voltage,
    parse_voltage_ac,
)

__all__ = ["KEYS", "RULES_FILE", "NetRules", "RailSpec", "RawEntry", "Rules", "load_rules"]

RULES_FILE = "pullproof.toml"


@dataclass(frozen=True)
class Key:
    """One rules key: how to read it, its default text (or None) and why that default.

    ``assumed`` marks a default that stands in for a property of the fitted parts or the
    wiring (a resistor's tolerance, the bus capacitance) rather than a project choice: a
    limit resting on it is soft (see :mod:`pullproof.assumed`).
    """

    kind: str
    default: str | None
    reason: str
    assumed: bool = False


# Every key of the rules file. The README table is generated from this mapping.
KEYS: Mapping[str, Key] = MappingProxyType(
    {
        "rail_tolerance": Key("percent", "5%", "common regulator accuracy; set rails you know"),
        "margin": Key("margin", "0.1V", "noise kept clear of each threshold, common practice"),
        "derating": Key("percent", "50%", "resistors run at half rated power, common practice"),
        "series": Key("series", "E24", "the series most stocked at 1 % and 5 %"),
        "policy": Key("policy", "centre", "geometric centre of the window leaves most room"),
        "current_budget": Key("current", None, "no budget unless the design is battery-powered"),
        "bounce": Key("time", None, "only needed when a capacitor debounces a contact"),
        "edge_time": Key("time", None, "the family transition limit applies when unset"),
        "mains_voltage": Key(
            "voltage",
            "230VAC",
            "the most common mains supply; set yours: mains-pattern nets carry it, and resistors "
            "on them are checked against it",
        ),
        "mains_patterns": Key(
            "patterns",
            "MAINS,MAINS_L*,MAINS_N*,*_MAINS_L,*_MAINS_N,AC_L*,AC_N*,*_AC_L,*_AC_N,LINE_L,LINE_N,"
            "*230VAC*,*120VAC*",
            "names designers give mains conductors (not logic nets such as MAINS_OK)",
        ),
        "ground": Key("patterns", "", "extra ground net names beyond the built-in ones"),
        "resistor.tolerance": Key(
            "percent", "5%", "E24 customary tolerance (IEC 60063)", assumed=True
        ),
        "resistor.tcr": Key(
            "tcr", "200ppm/K", "thick-film chip resistors, common practice", assumed=True
        ),
        "resistor.power": Key(
            "power", None, "assumed from the footprint size when known; a value or a table by size"
        ),
        "resistor.working_voltage": Key(
            "voltage",
            None,
            "assumed from the footprint size when known; a value or a table by size",
        ),
        "resistor.size": Key("size", None, "taken from the footprint when known"),
        "temperature.min": Key("temperature", "0°C", "commercial range, common practice"),
        "temperature.max": Key("temperature", "70°C", "commercial range, common practice"),
        "temperature.ref": Key("temperature", "25°C", "tolerances are specified at 25 °C"),
        "preferred.min": Key("resistance", "1k", "below 1 kΩ a pull wastes current"),
        "preferred.max": Key("resistance", "1M", "above 1 MΩ leakage and noise dominate"),
        "i2c.mode": Key("i2c", "", "no I2C unless a [[net]] entry or a net name says so"),
        "i2c.bus_capacitance": Key(
            "capacitance",
            "100pF",
            "a short bus on one board: a few 10 pF pins plus traces",
            assumed=True,
        ),
        "assume": Key(
            "assume",
            "cmos",
            "judge an input without data as CMOS at its own supply, shown as assumed; "
            '"none" never assumes',
        ),
    }
)


@dataclass(frozen=True)
class Range:
    """Where a rules value must lie, in ``unit``; ``text`` says it in words for the error."""

    unit: str
    low: float | None
    high: float | None = None
    low_open: bool = False  # the low end itself is not allowed (a divisor, say)
    high_open: bool = False
    text: str = ""

    def holds(self, x: float) -> bool:
        if self.low is not None and (x < self.low or (self.low_open and x == self.low)):
            return False
        return self.high is None or (x < self.high or (not self.high_open and x == self.high))


_FRACTION = Range("", 0.0, 1.0, high_open=True, text="a value from 0% to below 100%")
_POSITIVE = "a value above zero (it is a divisor)"
_KELVIN = "a temperature from -273.15 °C (absolute zero) to 1000 °C"
# What each numeric key may be; a value outside would divide by zero, flip a sign or
# describe no real part. The README lists the same ranges beside the keys.
RANGES: Mapping[str, Range] = MappingProxyType(
    {
        "rail_tolerance": _FRACTION,
        "resistor.tolerance": _FRACTION,
        "derating": Range("", 0.0, 1.0, low_open=True, text="a value above 0% and at most 100%"),
        "margin": Range("V", 0.0, text="a value that is not negative"),  # or _MARGIN_FRACTION
        "current_budget": Range("A", 0.0, low_open=True, text=_POSITIVE),
        "bounce": Range("s", 0.0, low_open=True, text=_POSITIVE),
        "edge_time": Range("s", 0.0, low_open=True, text=_POSITIVE),
        "mains_voltage": Range("V", 0.0, low_open=True, text="a value above zero"),
        "resistor.power": Range("W", 0.0, low_open=True, text=_POSITIVE),
        "resistor.tcr": Range("1/K", 0.0, 0.01, text="a value from 0 to 10000 ppm/K"),
        "temperature.min": Range("degC", -273.15, 1000.0, text=_KELVIN),
        "temperature.max": Range("degC", -273.15, 1000.0, text=_KELVIN),
        "temperature.ref": Range("degC", -273.15, 1000.0, text=_KELVIN),
        "preferred.min": Range("ohm", 0.0, text="a value that is not negative"),
        "preferred.max": Range("ohm", 0.0, low_open=True, text="a value above zero"),
        "i2c.bus_capacitance": Range("F", 0.0, low_open=True, text=_POSITIVE),
    }
)
_MARGIN_FRACTION = _FRACTION
_NET_RANGES = MappingProxyType(
    {
        "margin": RANGES["margin"],
        "bus_capacitance": RANGES["i2c.bus_capacitance"],
        "bounce": RANGES["bounce"],
        "edge_time": RANGES["edge_time"],
        "current_budget": RANGES["current_budget"],
    }
)
# Pairs whose first value may not exceed the second.
_ORDERED = (("temperature.min", "temperature.max"), ("preferred.min", "preferred.max"))
_NET_KEYS = frozenset(
    {
        "match", "margin", "i2c", "bus_capacitance", "capacitance", "bounce", "edge_time",
        "current_budget", "input", "input_supply",
    }
)  # fmt: skip
_SECTIONS = frozenset({"resistor", "temperature", "preferred", "i2c"})
_GROUNDS = ("GND", "GNDA", "GNDD", "GNDPWR", "GNDREF", "AGND", "DGND", "PGND", "VSS", "0V", "EARTH")
_GROUND_PATTERNS = ("GND*", "*_GND", "VSS*", "EARTH*", "0V", "CHASSIS*")


@dataclass(frozen=True)
class RailSpec:
    """A supply rail or ground: name, nominal and limits (None when the name gives no voltage)."""

    name: str
    nominal: Sourced | None
    v_min: Sourced | None
    v_max: Sourced | None
    ground: bool = False
    inferred: str = ""  # why a net is a supply by its function ("" when named or listed)
    ac: bool = False  # an AC rail: the voltages are rms
    follows: str = ""  # the rail it follows ([rails] X = { follows = "VCC" }): one supply


@dataclass(frozen=True)
class NetRules:
    """Rules that apply to one net after ``[[net]]`` overrides."""

    margin: Sourced  # V, or a fraction of the supply (dimensionless)
    i2c_mode: str
    bus_capacitance: Sourced | None
    bounce: Sourced | None
    edge_time: Sourced | None
    current_budget: Sourced | None
    capacitance: Sourced | None = None  # F, wiring or cable on any net ([[net]] capacitance)
    # an input off this schematic (a connector net): an assumption class or family name, and
    # its supply (a rail name or a voltage such as "3V3"; "" = the pull rail)
    input: str = ""
    input_supply: str = ""


@dataclass(frozen=True)
class RawEntry:
    """One array-of-tables entry (``[[accept]]``) as written, with where it starts, for the
    module that reads it (:mod:`pullproof.acceptance`)."""

    file: str  # the rules file as given
    line: int  # the line of its ``[[…]]`` header
    table: Mapping[str, Any]


@dataclass(frozen=True)
class Rules:
    """The project rules, each value Sourced."""

    file: str  # "" when no rules file was found
    values: Mapping[str, Sourced | str | None]
    rails: Mapping[str, RailSpec] = field(default_factory=lambda: MappingProxyType({}))
    nets: tuple[tuple[str, Mapping[str, Sourced | str]], ...] = ()
    accepts: tuple[RawEntry, ...] = ()  # [[accept]] entries, read by pullproof.acceptance
    mains_dc: bool = False  # mains_voltage written with "DC"; mains is AC otherwise
    # resistor ratings given as a table by chip size: {"resistor.power": {"0603": 0.1 W}}
    by_size: Mapping[str, Mapping[str, Sourced]] = field(
        default_factory=lambda: MappingProxyType({})
    )

    def for_size(self, key: str, size: str) -> Sourced | None:
        """A resistor rating the rules state for ``size`` (a table by size, or one value)."""
        table = self.by_size.get(key)
        if table is not None:
            return table.get(size)
        value = self.values.get(key)
        return value if isinstance(value, Sourced) else None

    def get(self, key: str) -> Any:
        """The value of a rules key (Sourced, a word, or None when unset and no default)."""
        return self.values[key]

    @property
    def series(self) -> str:
        return str(self.values["series"]).upper()

    @property
    def policy(self) -> str:
        return str(self.values["policy"])

    @property
    def assume(self) -> str:
        """The input class for inputs without data ("cmos", "lvttl"), or "none"."""
        return str(self.values["assume"])

    def with_assume(self, word: str) -> Rules:
        """These rules with ``assume`` set to ``word`` (``--strict`` passes "none")."""
        values = dict(self.values)
        values["assume"] = word
        return replace(self, values=MappingProxyType(values))

    def is_ground(self, net_name: str) -> bool:
        name = _bare(net_name).upper()
        return name in _GROUNDS or _ground_globs(str(self.values["ground"] or ""))(name)

    def rail(self, net_name: str) -> RailSpec | None:
        """The rail a net name stands for: rules entry, ground name, or a voltage in the name."""
        bare = _bare(net_name)
        if bare in self.rails:
            return self.rails[bare]
        if self.is_ground(net_name):
            zero = Sourced(Q_(0.0, "V"), _schematic(f"ground net {bare}"))
            return RailSpec(bare, zero, zero, zero, ground=True)
        supply = read_supply_name(bare)  # the whole name must read as a supply name
        if supply is None:
            return None
        if supply.volts is None:
            return RailSpec(bare, None, None, None)
        volts = supply.volts
        tol = self.values["rail_tolerance"]
        assert isinstance(tol, Sourced)
        frac = tol.magnitude("")
        src = _schematic(f"voltage read from the net name {bare}")
        nominal = Sourced(Q_(volts, "V"), src)
        lo, hi = sorted((volts * (1 - frac), volts * (1 + frac)))
        derived = Provenance(Origin.DERIVED, f"{bare} ± {tol.source.where}", tol.source.status)
        return RailSpec(bare, nominal, Sourced(Q_(lo, "V"), derived), Sourced(Q_(hi, "V"), derived))

    def mains(self, net_name: str) -> RailSpec:
        """The voltage of a mains-pattern net: rules key ``mains_voltage`` (AC unless "DC")."""
        volts = self.values["mains_voltage"]
        assert isinstance(volts, Sourced)
        ac = not self.mains_dc
        return RailSpec(_bare(net_name), volts, volts, volts, ac=ac)

    def is_mains(self, net_name: str) -> bool:
        """True when the net name matches a mains pattern (case-insensitive glob)."""
        return _globs(str(self.values["mains_patterns"] or ""))(_bare(net_name).upper())

    def for_net(self, net_name: str) -> NetRules:
        """The rules for one net: defaults, then every matching ``[[net]]`` entry in order."""
        merged: dict[str, Any] = {
            "margin": self.values["margin"],
            "i2c": self.values["i2c.mode"],
            "bus_capacitance": self.values["i2c.bus_capacitance"],
            "bounce": self.values["bounce"],
            "edge_time": self.values["edge_time"],
            "current_budget": self.values["current_budget"],
            "capacitance": None,  # only a [[net]] entry states a net's wiring capacitance
            "input": "",
            "input_supply": "",
        }
        name = _bare(net_name).upper()
        if not merged["i2c"] and re.search(r"(^|[^A-Z])(I2C|SDA|SCL)", name):
            merged["i2c"] = "standard"  # named like an I2C line: check as Standard-mode
        for pattern, entry in self.nets:
            if fnmatch.fnmatchcase(name, pattern.upper()):
                merged.update(entry)
        return NetRules(
            margin=merged["margin"],
            i2c_mode=str(merged["i2c"] or ""),
            bus_capacitance=merged["bus_capacitance"] if merged["i2c"] else None,
            bounce=merged["bounce"],
            edge_time=merged["edge_time"],
            current_budget=merged["current_budget"],
            capacitance=merged["capacitance"],
            input=str(merged["input"] or ""),
            input_supply=str(merged["input_supply"] or ""),
        )

    def names_input(self, net_name: str) -> bool:
        """True when a ``[[net]]`` entry names an input off this schematic for the net."""
        return bool(self.for_net(net_name).input)


def _bare(net_name: str) -> str:
    return net_name.rsplit("/", 1)[-1]


def glob_any(patterns: tuple[str, ...]) -> Callable[[str], bool]:
    """Whether a name matches any of the case-sensitive glob ``patterns`` (as
    :func:`fnmatch.fnmatchcase` does), tried as one compiled expression: rails, grounds and
    mains names are tested for every net of a review."""
    if not patterns:
        return lambda name: False
    match = re.compile("|".join(fnmatch.translate(p) for p in patterns)).match
    return lambda name: match(name) is not None


@lru_cache(maxsize=64)
def _globs(text: str) -> Callable[[str], bool]:
    """The matcher of a rules value of comma-separated patterns (compared in upper case)."""
    return glob_any(tuple(p.strip().upper() for p in text.split(",") if p.strip()))


@lru_cache(maxsize=64)
def _ground_globs(extra: str) -> Callable[[str], bool]:
    """The built-in ground patterns and the rules' ``ground`` ones."""
    extras = tuple(p.strip().upper() for p in extra.split(",") if p.strip())
    return glob_any((*_GROUND_PATTERNS, *extras))


def _schematic(where: str) -> Provenance:
    return Provenance(Origin.SCHEMATIC, where, Status.USER)


# ------------------------------------------------------------------ reading the file


def _margin(text: str, field: str) -> Any:
    return parse_percent(text, field=field) if "%" in text else parse_voltage(text, field=field)


def _word(allowed: tuple[str, ...]) -> Callable[[str, str], str]:
    def read(text: str, field: str) -> str:
        if text.lower() not in allowed:
            raise ValueParseError(text, expected=f"one of {', '.join(allowed)}", field=field)
        return text.lower()

    return read


def _assume(text: str, field: str) -> str:
    """An input class of the shipped assumption classes, or "none"."""
    from .families.classes import load_classes  # late: families imports this module

    allowed = (*load_classes().inputs, "none")
    if text.strip().lower() not in allowed:
        raise ValueParseError(text, expected=f"one of {', '.join(allowed)}", field=field)
    return text.strip().lower()


def _input(text: str, field: str) -> str:
    """What is on the far side of a connector net: an input class or a logic family."""
    from .families.classes import load_classes  # late: families imports this module
    from .families.loader import load_families

    classes, families = tuple(load_classes().inputs), tuple(load_families())
    word = text.strip()
    by_upper = {n.upper(): n for n in (*classes, *families)}
    if word.upper() not in by_upper:
        choices = ", ".join((*classes, *families))
        raise ValueParseError(text, expected=f"an input class or family: {choices}", field=field)
    return by_upper[word.upper()]


def _size(text: str, field: str) -> str:
    if not re.fullmatch(r"0201|0402|0603|0805|1206|1210|2010|2512", text):
        raise ValueParseError(text, expected="a chip size such as 0603", field=field)
    return text


_READERS: Mapping[str, Callable[[str, str], Any]] = MappingProxyType(
    {
        "percent": lambda t, f: parse_percent(t, field=f),
        "margin": _margin,
        "current": lambda t, f: parse_current(t, field=f),
        "time": lambda t, f: parse_time(t, field=f),
        "voltage": lambda t, f: parse_voltage_ac(t, field=f)[0],
        "tcr": lambda t, f: parse_tcr(t, field=f),
        "power": lambda t, f: parse_power(t, field=f),
        "temperature": lambda t, f: parse_temperature(t, field=f),
        "resistance": lambda t, f: parse_resistance(t, field=f),
        "capacitance": lambda t, f: parse_capacitance(t, field=f),
        "series": _word(tuple(s.lower() for s in SERIES)),
        "policy": _word(("centre", "low-current")),
        "i2c": _word(("", "standard", "fast", "fast-plus")),
        "assume": lambda t, f: _assume(t, f),
        "input": lambda t, f: _input(t, f),
        "size": _size,
        "patterns": lambda t, f: t,
    }
)
_WORDS = frozenset({"series", "policy", "i2c", "size", "patterns", "assume", "input"})


def _line_of(text: str, dotted: str) -> int:
    """The line where a key is written (tomllib gives no positions): scan for it."""
    parts = dotted.split(".")
    last = re.escape(parts[-1])
    section_line = 0
    if len(parts) > 1:
        head = re.escape(parts[0])
        for i, line in enumerate(text.splitlines(), 1):
            if re.match(rf"\s*\[\[?\s*{head}\s*\]", line):
                section_line = i
                break
    for i, line in enumerate(text.splitlines(), 1):
        if i >= section_line and re.match(rf"""\s*(?:[\w."']*\.)?["']?{last}["']?\s*=""", line):
            return i
    return max(section_line, 1)


class _Reader:
    def __init__(self, path: Path, text: str) -> None:
        self.path = path
        self.text = text

    def error(self, dotted: str, message: str) -> RulesError:
        return RulesError(message, Location(str(self.path), _line_of(self.text, dotted), 1))

    def unknown(self, dotted: str, valid: list[str]) -> RulesError:
        close = difflib.get_close_matches(dotted, valid, n=1)
        hint = f"; did you mean {close[0]!r}?" if close else ""
        return self.error(dotted, f"unknown rules key {dotted!r}{hint}")

    def value(self, dotted: str, kind: str, raw: Any, limits: Range | None = None) -> Sourced | str:
        if isinstance(raw, bool) or not isinstance(raw, str | int | float | list):
            raise self.error(dotted, f'rules key {dotted!r}: write the value as text, e.g. "5%"')
        if isinstance(raw, list):
            if kind != "patterns" or not all(isinstance(x, str) for x in raw):
                example = KEYS[dotted].default if dotted in KEYS else None
                raise self.error(dotted, f"rules key {dotted!r}: write one value as text, e.g. "
                                 f'"{example or "5%"}", not a list')  # fmt: skip
            raw = ",".join(raw)
        text = str(raw)
        try:
            parsed = _READERS[kind](text, dotted)
        except ValueParseError as exc:
            message = f"rules key {dotted!r}: cannot read {text!r}; expected {exc.expected}"
            raise self.error(dotted, message) from None
        if kind in _WORDS:
            return str(parsed)
        if kind == "margin" and limits is not None and str(parsed.units) == "dimensionless":
            limits = _MARGIN_FRACTION
        if limits is not None and not limits.holds(float(parsed.to(limits.unit).magnitude)):
            raise self.error(dotted, f"rules key {dotted!r}: {text!r} is impossible; "
                             f"expected {limits.text}")  # fmt: skip
        where = f"rules key {dotted} ({self.path.name}:{_line_of(self.text, dotted)})"
        return Sourced(parsed, Provenance(Origin.RULES, where, Status.USER))


def _flatten(doc: Mapping[str, Any]) -> dict[str, Any]:
    flat: dict[str, Any] = {}
    for key, value in doc.items():
        if key in _SECTIONS and isinstance(value, dict):
            for sub, inner in value.items():
                flat[f"{key}.{sub}"] = inner
        else:
            flat[key] = value
    return flat


def load_rules(root: Path, explicit: Path | None = None) -> Rules:
    """Read the rules for a root schematic: ``explicit``, else ``pullproof.toml`` beside ``root``.

    No file means all defaults. Raises:
        RulesError: malformed TOML (with tomllib's line and column), an unknown key (with the
            closest valid key) or an unreadable value, each naming the file and line.
    """
    path = explicit if explicit is not None else Path(root).parent / RULES_FILE
    if explicit is None and not path.is_file():
        return _build(None, {})
    text = read_utf8(path, RulesError, "rules file")
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"\(at line (\d+), column (\d+)\)", str(exc))
        line, col = (int(m.group(1)), int(m.group(2))) if m else (1, 1)
        message = re.sub(r"\s*\(at line.*\)$", "", str(exc))
        raise RulesError(f"malformed TOML: {message}", Location(str(path), line, col)) from None
    return _build(_Reader(path, text), doc)


def _build(reader: _Reader | None, doc: Mapping[str, Any]) -> Rules:
    flat = _flatten(doc)
    values: dict[str, Sourced | str | None] = {}
    valid = [*KEYS, "rails", "net", "accept"]
    for dotted in flat:
        if dotted in _SECTIONS:  # a section name given a plain value, e.g. temperature = 5
            assert reader is not None
            raise reader.error(dotted, f"rules key {dotted!r}: write a table, e.g. [{dotted}]")
        if dotted not in KEYS and dotted not in ("rails", "net", "accept"):
            assert reader is not None
            raise reader.unknown(dotted, valid)
    default_reader = _Reader(Path(RULES_FILE), "")
    by_size: dict[str, Mapping[str, Sourced]] = {}
    for dotted, key in KEYS.items():
        if dotted in _BY_SIZE and isinstance(flat.get(dotted), dict):
            assert reader is not None
            by_size[dotted] = _size_table(reader, dotted, key.kind, flat[dotted])
            values[dotted] = None
        elif dotted in flat:
            assert reader is not None
            values[dotted] = reader.value(dotted, key.kind, flat[dotted], RANGES.get(dotted))
        elif key.default is None:
            values[dotted] = None
        else:
            parsed = default_reader.value(dotted, key.kind, key.default)
            if isinstance(parsed, Sourced):
                origin = Origin.ASSUMED if key.assumed else Origin.DEFAULT
                stands = None
                if key.assumed:
                    quantity, fix = _ASSUMED_KEYS[dotted]
                    stands = Stands("", "", quantity, key.default, "default", fix)
                src = Provenance(origin, f"default {dotted}", Status.DEFAULT, key.reason, stands)
                parsed = Sourced(parsed.value, src)
            values[dotted] = parsed
    if reader is not None:
        _check_together(reader, flat, values)
    rails = _rails(reader, flat.get("rails", {}), values)
    nets = _nets(reader, flat.get("net", []))
    for _, entry in nets:
        supply = str(entry.get("input_supply", ""))
        if supply and _bare(supply) not in rails and read_supply_name(supply) is None:
            assert reader is not None
            raise reader.error(
                "net.input_supply",
                f"rules key 'net.input_supply': {supply!r} is neither a rail listed in [rails] "
                'nor a supply name such as "3V3" or "+5V"',
            )
    accepts = _raw_entries(reader, flat.get("accept", []), "accept")
    name = reader.path.name if reader else ""
    mains_text = str(flat.get("mains_voltage", KEYS["mains_voltage"].default))
    mains_dc = re.search(r"DC\s*$", mains_text, re.I) is not None
    return Rules(
        name,
        MappingProxyType(values),
        rails,
        nets,
        accepts,
        mains_dc=mains_dc,
        by_size=MappingProxyType(by_size),
    )


_BY_SIZE = frozenset({"resistor.power", "resistor.working_voltage"})
# What each assumed default stands for, and where the real value goes.
_ASSUMED_KEYS: Mapping[str, tuple[str, str]] = MappingProxyType(
    {
        "resistor.tolerance": (
            "tolerance", "the field 'Tolerance' (or the Value, 10k 1%), or resistor.tolerance "
            "in the rules",
        ),
        "resistor.tcr": ("TCR", "the field 'TCR', or resistor.tcr in the rules"),
        "i2c.bus_capacitance": (
            "bus capacitance", "i2c.bus_capacitance in the rules, or bus_capacitance in a "
            "[[net]] entry",
        ),
    }
)  # fmt: skip


def _size_table(
    reader: _Reader, dotted: str, kind: str, table: Mapping[str, Any]
) -> Mapping[str, Sourced]:
    """``power = { "0402" = "1/16W", "0603" = "0.1W", "array" = "1/32W" }``: a rating per
    chip size; ``array`` rates each element of a resistor array."""
    out: dict[str, Sourced] = {}
    for size, raw in table.items():
        try:
            if size != "array":
                _size(str(size), f"{dotted}.{size}")
        except ValueParseError:
            raise reader.error(
                dotted,
                f"rules key {dotted!r}: {size!r} is not a chip size such as 0603, nor array",
            ) from None
        got = reader.value(dotted, kind, raw)
        assert isinstance(got, Sourced)
        out[str(size)] = got
    return MappingProxyType(out)


def _raw_entries(reader: _Reader | None, entries: Any, name: str) -> tuple[RawEntry, ...]:
    """``[[name]]`` tables as written, each with the line of its header."""
    if not entries:
        return ()
    assert reader is not None
    if not isinstance(entries, list) or not all(isinstance(e, dict) for e in entries):
        raise reader.error(name, f"rules key {name!r}: write [[{name}]] tables")
    header = re.compile(rf"^\s*\[\[\s*{re.escape(name)}\s*\]\]")
    lines = [i for i, text in enumerate(reader.text.splitlines(), 1) if header.match(text)]
    lines += [_line_of(reader.text, name)] * (len(entries) - len(lines))  # inline-table arrays
    return tuple(
        RawEntry(str(reader.path), line, MappingProxyType(dict(e)))
        for line, e in zip(lines, entries, strict=False)
    )


def _check_together(reader: _Reader, flat: Mapping[str, Any], values: Mapping[str, Any]) -> None:
    """Keys that are each possible but impossible together: a span upside down, and a TCR
    that over the temperature span would take the resistance to zero."""
    for low, high in _ORDERED:
        if values[low].value > values[high].value:
            a, b = (str(flat.get(k, KEYS[k].default)) for k in (low, high))
            key = high if high in flat else low
            raise reader.error(key, f"rules key {low!r} = {a!r} is above {high!r} = {b!r}; "
                               f"expected {low} ≤ {high}")  # fmt: skip
    span = max_temperature_span(values)
    tcr = values["resistor.tcr"].magnitude("1/K")
    if tcr * span >= 1:
        key = "resistor.tcr" if "resistor.tcr" in flat else "temperature.max"
        raise reader.error(key, f"rules key 'resistor.tcr' ({tcr * 1e6:g} ppm/K) over the "
                           f"temperature span ({span:g} K from the reference) would take a "
                           "resistor to zero; expected a smaller TCR or span")  # fmt: skip


def max_temperature_span(values: Mapping[str, Any]) -> float:
    """ΔT in kelvin: the largest distance from the reference temperature to either end."""
    ref, lo, hi = (values[k].magnitude("degC") for k in ("temperature.ref", "temperature.min",
                                                         "temperature.max"))  # fmt: skip
    return float(max(abs(ref - lo), abs(hi - ref)))


def _rails(reader: _Reader | None, table: Any, values: Mapping[str, Any]) -> Mapping[str, RailSpec]:
    out: dict[str, RailSpec] = {}
    if not table:
        return MappingProxyType(out)
    assert reader is not None
    if not isinstance(table, dict):
        raise reader.error("rails", "rules key 'rails': write a table, e.g. [rails] VCC = \"5V\"")
    follows: dict[str, str] = {}
    for name, spec in table.items():
        dotted = f"rails.{name}"
        entry = spec if isinstance(spec, dict) else {"nominal": spec}
        for key in entry:
            if key not in _RAIL_KEYS:
                raise reader.unknown(f"{dotted}.{key}", [f"{dotted}.{k}" for k in _RAIL_KEYS])
        if "follows" in entry:
            other = entry["follows"]
            if set(entry) != {"follows"} or not isinstance(other, str) or not other:
                raise reader.error(
                    dotted, f'rules key {dotted!r}: write {{ follows = "RAIL" }} on its own'
                )
            follows[name] = other
            continue
        nominal = reader.value(dotted, "voltage", entry.get("nominal", ""))
        ac = _rail_is_ac(reader, dotted, entry)
        tol = (
            reader.value(f"{dotted}.tolerance", "percent", entry["tolerance"], _FRACTION)
            if "tolerance" in entry
            else values["rail_tolerance"]
        )
        assert isinstance(nominal, Sourced) and isinstance(tol, Sourced)
        volts = nominal.magnitude("V")
        frac = tol.magnitude("")
        lo, hi = sorted((volts * (1 - frac), volts * (1 + frac)))
        derived = Provenance(Origin.DERIVED, f"{nominal.source.where} ± {tol.source.where}")
        v_lo, v_hi = Sourced(Q_(lo, "V"), derived), Sourced(Q_(hi, "V"), derived)
        # min and max state an asymmetric range (a USB port, a battery) instead of ±tolerance
        for key in ("min", "max"):
            if key in entry:
                got = reader.value(f"{dotted}.{key}", "voltage", entry[key])
                assert isinstance(got, Sourced)
                v_lo, v_hi = (got, v_hi) if key == "min" else (v_lo, got)
        if not v_lo.magnitude("V") <= volts <= v_hi.magnitude("V"):
            raise reader.error(
                dotted, f"rules key {dotted!r}: min and max must enclose the nominal voltage"
            )
        out[name] = RailSpec(name, nominal, v_lo, v_hi, volts == 0, ac=ac)
    for name, other in follows.items():
        # a rail that follows another (a switched, filtered or backed-up copy of it) has its
        # voltage and is judged as the same supply; "" voltages when the other states none
        if other in follows:
            raise reader.error(f"rails.{name}", f"rules key 'rails.{name}': {other!r} follows "
                               "another rail itself; name the rail it follows")  # fmt: skip
        base = out.get(other)
        if base is None:
            out[name] = RailSpec(name, None, None, None, follows=other)
        else:
            out[name] = replace(base, name=name, follows=other)
    return MappingProxyType(out)


_RAIL_KEYS = ("nominal", "tolerance", "min", "max", "ac", "follows")


def _rail_is_ac(reader: _Reader, dotted: str, entry: Mapping[str, Any]) -> bool:
    """A rail is AC when its nominal says so ("230VAC") or the entry has ``ac = true``."""
    flag = entry.get("ac", False)
    if not isinstance(flag, bool):
        raise reader.error(f"{dotted}.ac", f"rules key '{dotted}.ac': write true or false")
    text = str(entry.get("nominal", ""))
    return flag or parse_voltage_ac(text, field=dotted)[1]


_NET_KINDS = MappingProxyType(
    {
        "margin": "margin",
        "i2c": "i2c",
        "bus_capacitance": "capacitance",
        "capacitance": "capacitance",
        "bounce": "time",
        "edge_time": "time",
        "current_budget": "current",
        "input": "input",
        "input_supply": "patterns",
    }
)


def _nets(reader: _Reader | None, entries: Any) -> tuple[tuple[str, Mapping[str, Any]], ...]:
    if not entries:
        return ()
    assert reader is not None
    if not isinstance(entries, list):
        raise reader.error("net", "rules key 'net': write [[net]] entries with match = \"…\"")
    out = []
    for entry in entries:
        if not isinstance(entry, dict):
            raise reader.error("net", "rules key 'net': write [[net]] entries with match = \"…\"")
        for key in entry:
            if key not in _NET_KEYS:
                raise reader.unknown(f"net.{key}", [f"net.{k}" for k in sorted(_NET_KEYS)])
        pattern = entry.get("match")
        if not isinstance(pattern, str) or not pattern:
            where = "net.match" if "match" in entry else "net"
            raise reader.error(where, 'a [[net]] entry needs match = "NET-PATTERN"')
        parsed = {
            k: reader.value(f"net.{k}", _NET_KINDS[k], v, _NET_RANGES.get(k))
            for k, v in entry.items()
            if k != "match"
        }
        out.append((pattern, MappingProxyType(parsed)))
    return tuple(out)
