"""Which data applies to a placed part: fields first, then name patterns, then a part library.

Order of precedence for a logic input: the field ``pullproof.family`` (and the
individual fields ``pullproof.vih`` … which override single numbers), then a
family recognised in the Value or library id (``74HC14``, ``SN74LS00N``,
``CD4093B``, ``74LVC1G17``, ``MC14093``), then a user part-library entry, then
"unknown part" reported as a :class:`~pullproof.network.Missing` (never a crash).
Bad text in an explicit ``pullproof.*``/``Tolerance``/``Power``/``TCR`` field raises
:class:`~pullproof.errors.ValueParseError`; an unreadable resistor Value is
reported as missing data, because schematics often carry placeholder values.
"""

from __future__ import annotations

import contextlib
import fnmatch
import re
import tomllib
from collections.abc import Callable, Mapping
from dataclasses import dataclass, field
from pathlib import Path
from types import MappingProxyType
from typing import Any

from ..circuit import Part
from ..errors import Location, PullproofError, ValueParseError, excerpt
from ..network import Missing
from ..provenance import Origin, Provenance, Sourced, Stands, Status
from ..rules import Rules, max_temperature_span
from ..textfile import read_utf8
from ..units import (
    Q_,
    ResistorText,
    format_si,
    parse_capacitance,
    parse_capacitor_text,
    parse_current,
    parse_element_value,
    parse_percent,
    parse_power,
    parse_resistance,
    parse_resistor_text,
    parse_tcr,
    parse_time,
    parse_voltage,
)
from .kinds import PartKind
from .kinds import classify as classify_kind
from .loader import ASSUMED_WORD, Family, InputModel, family_from_table, load_families

__all__ = [
    "FIELDS",
    "SIZES",
    "FieldDoc",
    "PartInfo",
    "PartKind",
    "PartLibrary",
    "Ratings",
    "ResistorInfo",
    "classify",
    "family_from_name",
    "load_part_library",
    "resolve_part",
]


@dataclass(frozen=True)
class FieldDoc:
    where: str
    meaning: str
    example: str


# Every part field pullproof reads. The README table "Fields pullproof reads" is built from this.
FIELDS: Mapping[str, FieldDoc] = MappingProxyType(
    {
        "Value": FieldDoc("any part", "resistance / capacitance / part number", "4k7 1% 0603"),
        "Tolerance": FieldDoc("resistor", "resistance tolerance", "1%"),
        "Power": FieldDoc("resistor", "rated power at 70 °C", "0.1W"),
        "TCR": FieldDoc("resistor", "temperature coefficient", "100ppm/K"),
        "Footprint": FieldDoc(
            "resistor", "chip size read from the footprint name", "R_0603_1608Metric"
        ),
        "pullproof.role": FieldDoc("resistor", "force (pull) or skip (skip) judging", "skip"),
        "pullproof.elements": FieldDoc(
            "resistor array",
            "which pins form each element: pin pairs, or common=PIN",
            "1-8,2-7,3-6,4-5",
        ),
        "pullproof.working_voltage": FieldDoc("resistor", "limiting element voltage", "50V"),
        "pullproof.family": FieldDoc("logic IC", "logic family by name", "HC"),
        "pullproof.schmitt": FieldDoc("logic IC", "inputs are Schmitt triggers", "yes"),
        "pullproof.vih": FieldDoc("logic input", "V_IH,min (overrides family)", "2.0V"),
        "pullproof.vil": FieldDoc("logic input", "V_IL,max (overrides family)", "0.8V"),
        "pullproof.i_high": FieldDoc("logic input", "current into a pin held high", "1uA"),
        "pullproof.i_low": FieldDoc("logic input", "current out of a pin held low", "0.4mA"),
        "pullproof.v_in_max": FieldDoc("logic input", "highest voltage the pin tolerates", "5.5V"),
        "pullproof.c_in": FieldDoc("logic input", "input capacitance (overrides family)", "10pF"),
        "pullproof.internal_pull": FieldDoc(
            "MCU", "internal pull firmware enables: [up|down] min..max, or none", "up 30k..50k"
        ),
        "pullproof.contact_max": FieldDoc("switch, relay", "largest contact current", "50mA"),
        "pullproof.wetting": FieldDoc("switch, relay", "least contact (wetting) current", "1mA"),
        "pullproof.bounce": FieldDoc("switch", "contact bounce time", "5ms"),
        "pullproof.ctr_min": FieldDoc("optocoupler", "least current transfer ratio", "50%"),
        "pullproof.ageing": FieldDoc("optocoupler", "CTR left at end of life", "50%"),
        "pullproof.i_f": FieldDoc("optocoupler", "least LED forward current when on", "5mA"),
        "pullproof.dark_current": FieldDoc("optocoupler", "output leakage when off", "100nA"),
        "pullproof.vce_sat": FieldDoc("optocoupler", "output saturation voltage", "0.4V"),
        "pullproof.i_ol": FieldDoc("open-drain driver", "guaranteed sink current at V_OL", "4mA"),
        "pullproof.v_ol": FieldDoc("open-drain driver", "output low voltage at I_OL", "0.4V"),
        "pullproof.i_off": FieldDoc("driver", "off-state leakage into the pin", "1uA"),
        "pullproof.accept": FieldDoc(
            "resistor (or a finding's part)",
            "accept its verdict or finding: [what is accepted] reason",
            "[marginal 100k 5%] strapped at power-up only",
        ),
        "pullproof.accept_by": FieldDoc("with pullproof.accept", "who accepted it", "A. Designer"),
        "pullproof.accept_date": FieldDoc("with pullproof.accept", "when", "2031-05-04"),
    }
)


def classify(part: Part) -> PartKind:
    """The kind of a part from its symbol name, Value, reference prefix and pins
    (never from the library nickname; see :mod:`pullproof.families.kinds`)."""
    return classify_kind(part, family_from_name)


# ---------------------------------------------------------------- family patterns

_74 = re.compile(
    r"""
    (?<![A-Z0-9])
    (?: SN | MC | MM | DM | M | NC7S | TC | HD )?   # maker prefixes
    (?: 54 | 74 )
    (?P<fam> AHCT | AHC | ACT | AC | HCT | HC | LVC | LV | LS | ALS | AS | ABT | F | S )?
    (?P<gates> [123] G )?
    (?P<num> \d{1,5} )
    """,
    re.VERBOSE,
)
_4000 = re.compile(
    r"""
    (?<![A-Z0-9])
    (?: CD | HEF | MC1 | TC | HCF )?     # MC14093 = 4093
    (?P<num> 4[05]\d{2,3} )
    (?P<suffix> UB | B )?
    (?![0-9])
    """,
    re.VERBOSE,
)
_FAMILY_OF: Mapping[str, str] = MappingProxyType(
    {"": "74", "LS": "LS", "HC": "HC", "HCT": "HCT", "AC": "AC", "ACT": "ACT", "AHC": "AHC",
     "AHCT": "AHCT", "LVC": "LVC", "LV": "LV"}
)  # fmt: skip
# Device numbers with Schmitt-trigger inputs, common practice.
_SCHMITT_74 = frozenset(
    {"13", "14", "18", "19", "132", "7014", "1G14", "1G17", "1G132", "2G14", "2G17", "3G14", "3G17"}
)
_SCHMITT_4000 = frozenset({"4093", "40106", "4584", "4583"})


@dataclass(frozen=True)
class NameMatch:
    family: str  # "" when the series is recognised but we hold no data (e.g. 74ALS)
    schmitt: bool
    series: str  # what was recognised, e.g. "74ALS"


def family_from_name(text: str) -> NameMatch | None:
    """Recognise a logic part number: ``74HC14`` → HC Schmitt; ``MC14093`` → 4000B Schmitt."""
    upper = text.upper()
    m = _74.search(upper)
    if m is not None:
        fam = m.group("fam") or ""
        number = f"{m.group('gates') or ''}{m.group('num')}"
        return NameMatch(_FAMILY_OF.get(fam, ""), number in _SCHMITT_74, f"74{fam}")
    m = _4000.search(upper)
    if m is not None:
        family = "" if m.group("suffix") == "UB" else "4000B"
        return NameMatch(family, m.group("num") in _SCHMITT_4000, f"4000{m.group('suffix') or ''}")
    return None


# ---------------------------------------------------------------- resistor sizes


_CP = Status.COMMON_PRACTICE
_FM = Status.FROM_MEMORY


@dataclass(frozen=True)
class SizeRating:
    power: float  # W at 70 °C
    working_voltage: float | None  # V
    status: Status
    note: str


# Generic thick-film chip ratings by size (REFERENCES §6: common practice; the power-enhanced
# series figure where two exist). Through-hole DIN 0207 is from memory.
SIZES: Mapping[str, SizeRating] = MappingProxyType(
    {
        "0201": SizeRating(0.05, 25.0, _CP, "generic 0201 chip"),
        "0402": SizeRating(0.0625, 50.0, _CP, "generic 0402 chip"),
        "0603": SizeRating(0.1, 50.0, _CP, "0603 enhanced series; standard is 1/16 W"),
        "0805": SizeRating(0.125, 150.0, _CP, "0805 enhanced series; standard is 1/10 W"),
        "1206": SizeRating(0.25, 200.0, _CP, "1206 enhanced series; standard is 1/8 W"),
        "1210": SizeRating(1 / 3, 200.0, _CP, "1210 enhanced series; standard is 1/4 W"),
        "2010": SizeRating(0.75, 200.0, _CP, "2010 enhanced series; standard is 1/2 W"),
        "2512": SizeRating(1.0, 200.0, _CP, "generic 2512 chip"),
        "DIN0207": SizeRating(0.25, None, Status.FROM_MEMORY, "axial DIN 0207 film resistor"),
    }
)  # fmt: skip
_FOOTPRINT_SIZE = re.compile(
    r"(?:^|[:_])R_(?P<size>0201|0402|0603|0805|1206|1210|2010|2512)_|(?P<din>DIN0207)"
)


def size_from_footprint(footprint: str) -> str:
    m = _FOOTPRINT_SIZE.search(footprint)
    if m is None:
        return ""
    return m.group("size") or m.group("din") or ""


# ---------------------------------------------------------------- part library


@dataclass(frozen=True)
class LibraryEntry:
    name: str
    match: tuple[str, ...]  # globs on Value or lib_id (case-insensitive)
    kind: PartKind
    family: Family | None  # input data, when the entry describes logic inputs
    pins: tuple[str, ...]  # pin-name globs the input data applies to ("*" = all)
    schmitt: bool
    internal_pull: tuple[Sourced, Sourced] | None
    ratings: Mapping[str, Sourced]
    no_internal_pull: bool = False  # the entry says internal_pull = "none"


@dataclass(frozen=True)
class PartLibrary:
    """User part descriptions, searched in file order."""

    entries: tuple[LibraryEntry, ...] = ()

    def find(self, part: Part) -> LibraryEntry | None:
        for entry in self.entries:
            for pattern in entry.match:
                p = pattern.upper()
                if fnmatch.fnmatchcase(part.value.upper(), p) or fnmatch.fnmatchcase(
                    part.lib_id.upper(), p
                ):
                    return entry
        return None


_RATING_READERS: Mapping[str, Callable[..., Any]] = MappingProxyType(
    {
        "contact_max": parse_current,
        "wetting": parse_current,
        "bounce": parse_time,
        "ctr_min": parse_percent,
        "ageing": parse_percent,
        "i_f": parse_current,
        "dark_current": parse_current,
        "vce_sat": parse_voltage,
        "capacitance": parse_capacitance,
        "i_ol": parse_current,
        "v_ol": parse_voltage,
        "i_off": parse_current,
    }
)
_ENTRY_KEYS = frozenset(
    {"match", "kind", "pins", "schmitt_inputs", "internal_pull", *_RATING_READERS}
)


class PartLibraryError(PullproofError, ValueError):
    """A part-library file that cannot be opened or is not UTF-8 text."""


def _globs(table: Mapping[str, Any], key: str, default: str, part: str) -> tuple[str, ...]:
    # A bare string would iterate as single characters: insist on a list of strings.
    value = table.get(key, [default])
    if not (isinstance(value, list) and value and all(isinstance(v, str) for v in value)):
        raise ValueParseError(str(value), expected='a list of globs such as ["*MCU*"]',
                              field=key, part=part)  # fmt: skip
    return tuple(value)


def _assumed_entry(src: Provenance, key: str, text: str, name: str, file: str) -> Provenance:
    """A rating of an entry marked ``status = "assumed"`` (a skeleton not yet filled in)."""
    fix = f'the datasheet figure in part library entry {name} ({file}), then status = "user"'
    stands = Stands("", "", RATING_QUANTITY.get(key, key), text,
                    f"part library entry {name} (assumed)", fix)  # fmt: skip
    return Provenance(
        Origin.ASSUMED, f"assumed {key} ({src.where})", Status.DEFAULT,
        "a value the entry marks as assumed, not yet confirmed", stands,
    )  # fmt: skip


_HEADER = re.compile(r"""^\s*\[\[?\s*(?P<path>[^\]]*?)\s*\]""")
_PATH_PART = re.compile(r"""\s*(?:"((?:[^"\\]|\\.)*)"|'([^']*)'|([\w-]+))\s*(?:\.|$)""")


def _header_path(inside: str) -> tuple[str, ...]:
    return tuple(a or b or c for a, b, c in _PATH_PART.findall(inside))


def _key_line(text: str, entry: str | None, key: str) -> int:
    """The line of ``key`` in the ``[part.ENTRY]`` table (or its sub-tables); with ``entry``
    None, a top-level key. tomllib keeps no positions, so the text is scanned: the header
    line when the key is not found, else 1."""
    key_re = re.compile(rf"""^\s*(?:["']?{re.escape(key)}["']?|{re.escape(key)}\s*\.)\s*[=.]""")
    fallback = 1
    inside = entry is None
    for i, line in enumerate(text.splitlines(), 1):
        head = _HEADER.match(line)
        if head is not None:
            path = _header_path(head.group("path"))
            inside = entry is not None and path[:2] == ("part", entry)
            if inside and fallback == 1:
                fallback = i
            if entry is None and path and path[0] == key:
                return i
            continue
        if inside and key_re.match(line):
            return i
    return fallback


def load_part_library(path: Path) -> PartLibrary:
    """Read a part library (TOML, ``[part.NAME]`` tables; syntax in the example file header).

    Raises:
        ValueParseError: malformed TOML, an unknown key or an unreadable value, naming the file.
    """
    text = read_utf8(Path(path), PartLibraryError, "part library")
    try:
        doc = tomllib.loads(text)
    except tomllib.TOMLDecodeError as exc:
        m = re.search(r"\(at line (\d+), column (\d+)\)", str(exc))
        loc = Location(str(path), int(m.group(1)), int(m.group(2))) if m else None
        message = re.sub(r"\s*\(at line.*\)$", "", str(exc))
        raise ValueParseError(
            str(path), expected=f"a TOML part library ({message})", location=loc
        ) from None
    for key in doc:
        if key != "part":
            loc = Location(str(path), _key_line(text, None, key), 1)
            raise ValueParseError(key, expected="only [part.NAME] tables", location=loc)
    parts = doc.get("part", {})
    if not isinstance(parts, dict):
        loc = Location(str(path), _key_line(text, None, "part"), 1)
        raise ValueParseError(str(parts), expected="[part.NAME] tables", location=loc)
    entries = []
    for name, table in parts.items():
        try:
            entries.append(_entry(name, table, Path(path)))
        except ValueParseError as exc:
            if exc.location is not None:
                raise
            key = (exc.field or exc.text).split(".")[-1]
            raise ValueParseError(
                exc.text,
                expected=exc.expected,
                field=exc.field,
                part=f"[part.{name}]",
                location=Location(str(path), _key_line(text, name, key), 1),
            ) from None
    return PartLibrary(tuple(entries))


def _entry(name: str, table: Any, path: Path) -> LibraryEntry:
    """One ``[part.NAME]`` table (errors are placed by the caller)."""
    part = f"{path.name} [part.{name}]"
    if not isinstance(table, dict):
        raise ValueParseError(str(table), expected="a table of keys", part=part)
    kind_word = str(table.get("kind", "microcontroller"))
    kinds = {k.value: k for k in PartKind}
    if kind_word not in kinds:
        raise ValueParseError(
            kind_word, expected=f"one of {', '.join(kinds)}", field="kind", part=part
        )
    family = None
    if "supply" in table:
        family = family_from_table(
            name, table, str(path), origin=Origin.PART_LIBRARY, extra_keys=_ENTRY_KEYS
        )
    src = Provenance(Origin.PART_LIBRARY, f"part library entry {name} ({path.name})",
                     Status.USER, str(table.get("note", "")))  # fmt: skip
    assumed = table.get("status") == ASSUMED_WORD  # a skeleton not yet filled in
    ratings = {
        key: Sourced(
            reader(str(table[key]), field=key, part=part),
            _assumed_entry(src, key, str(table[key]), name, path.name) if assumed else src,
        )
        for key, reader in _RATING_READERS.items()
        if key in table
    }
    pull = None
    no_pull = str(table.get("internal_pull", "")).strip().lower() == "none"
    if "internal_pull" in table and not no_pull:
        span = table["internal_pull"]
        if not (isinstance(span, list) and len(span) == 2):
            raise ValueParseError(
                str(span),
                expected='a range ["30k", "50k"] or "none"',
                field="internal_pull",
                part=part,
            )
        lo, hi = (parse_resistance(str(t), field="internal_pull", part=part) for t in span)
        if lo > hi:
            raise ValueParseError(
                str(span), expected="the smaller value first", field="internal_pull", part=part
            )
        pull = (Sourced(lo, src), Sourced(hi, src))
    schmitt = table.get("schmitt_inputs", False)
    if not isinstance(schmitt, bool):
        raise ValueParseError(
            str(schmitt), expected="true or false", field="schmitt_inputs", part=part
        )
    return LibraryEntry(
        name=name,
        match=_globs(table, "match", name, part),
        kind=kinds[kind_word],
        family=family,
        pins=_globs(table, "pins", "*", part),
        schmitt=schmitt,
        internal_pull=pull,
        ratings=MappingProxyType(ratings),
        no_internal_pull=no_pull,
    )


# ---------------------------------------------------------------- resolved part


@dataclass(frozen=True)
class ResistorInfo:
    ohms: Sourced | None
    tolerance: Sourced
    tcr: Sourced
    power: Sourced | None
    working_voltage: Sourced | None
    size: str = ""
    role: str = ""  # "", "pull" (force) or "skip"


@dataclass(frozen=True)
class Ratings:
    """Contact, optocoupler and capacitor numbers (None when unknown)."""

    values: Mapping[str, Sourced] = field(default_factory=lambda: MappingProxyType({}))

    def get(self, key: str) -> Sourced | None:
        return self.values.get(key)


@dataclass(frozen=True)
class PartInfo:
    """What pullproof knows about one part."""

    ref: str
    kind: PartKind
    family: str = ""  # family or part-library name; "" when unknown
    inputs: InputModel | None = None  # the data for its logic input pins
    input_pins: tuple[str, ...] = ("*",)  # pin-name globs the input model applies to
    resistor: ResistorInfo | None = None
    ratings: Ratings = Ratings()
    missing: tuple[Missing, ...] = ()
    # why the part's data say its inputs have no internal pull ("" when they do not say)
    no_internal_pull: str = ""
    stated_kind: bool = False  # the kind comes from a part-library entry, not from the symbol


def _field_source(part: Part, name: str) -> Provenance:
    return Provenance(Origin.FIELD, f"field '{name}' on {part.ref}", Status.USER)


def _own_fields(part: Part) -> bool:
    """Whether any field is named ``pullproof.…``: most parts carry none, and looking each of
    those names up walks every field (the names compare case-insensitively)."""
    return any(k.casefold().startswith("pullproof.") for k in part.fields)


def _read_field(part: Part, name: str, reader: Callable[..., Any]) -> Sourced | None:
    text = part.field(name)
    if text is None:
        return None
    return Sourced(reader(text, field=name, part=part.ref), _field_source(part, name))


def _default(
    value: Any, name: str, reason: str, status: Status, stands: Stands | None = None
) -> Sourced:
    """A rating the part does not state, assumed from its kind or size: a limit resting on it
    is soft (see :mod:`pullproof.assumed`); ``stands`` says what it stands for."""
    return Sourced(value, Provenance(Origin.ASSUMED, f"assumed {name}", status, reason, stands))


# How assumption lists name a rating, by its part-library key.
RATING_QUANTITY: Mapping[str, str] = MappingProxyType(
    {
        "contact_max": "I_contact,max",
        "wetting": "I_wet,min",
        "bounce": "t_bounce",
        "ctr_min": "CTR_min",
        "ageing": "CTR ageing",
        "i_f": "I_F,min",
        "dark_current": "dark current",
        "vce_sat": "V_CE(sat)",
        "i_ol": "I_OL",
        "v_ol": "V_OL",
        "i_off": "I_off",
    }
)


def _rating_stands(ref: str, key: str, text: str) -> Stands:
    fix = f"field 'pullproof.{key}' on {ref}, or {key} in a part-library entry for it"
    return Stands(ref, "", RATING_QUANTITY.get(key, key), text, "default", fix)


def _text(q: Any) -> str:
    """A default as text: "50 mA", "0.4 V", "50 %" for a ratio."""
    unit = f"{q.units:~P}"
    if not unit:
        return f"{float(q.magnitude) * 100:g} %"
    return format_si(float(q.to_base_units().magnitude), unit, sig=3)


def _resistor(part: Part, rules: Rules) -> tuple[ResistorInfo, tuple[Missing, ...]]:
    missing: list[Missing] = []
    text: ResistorText | None = None
    value_src = Provenance(Origin.VALUE, f"Value of {part.ref}", Status.USER)
    # A resistor array's Value names one element ("10k", "4x10k", or a part string with one
    # resistance in it); a two-pin resistor's Value is read as written.
    read = parse_element_value if len(part.pins) > 2 else parse_resistor_text
    try:
        text = read(part.value, field="Value", part=part.ref)
    except ValueParseError as exc:
        missing.append(Missing(f"resistance of {part.ref}", part.ref, f"{exc}; write e.g. 4k7"))
    ohms = Sourced(text.ohms, value_src) if text else None
    tol = _read_field(part, "Tolerance", parse_percent)
    if tol is None and text and text.tolerance is not None:
        tol = Sourced(text.tolerance, value_src)
    tcr = _read_field(part, "TCR", parse_tcr)
    if tcr is None and text and text.tcr is not None:
        tcr = Sourced(text.tcr, value_src)
    size = (text.size if text else "") or size_from_footprint(part.field("Footprint") or "")
    rule_size = rules.get("resistor.size")
    if not size and rule_size:
        size = str(rule_size)
    power = _read_field(part, "Power", parse_power)
    if power is None and text and text.power is not None:
        power = Sourced(text.power, value_src)
    rating = SIZES.get(size)
    # a stated rating beats one assumed from the size; "array" rates an array's elements
    rated_as = size or ("array" if len(part.pins) > 2 else "")
    if power is None:
        power = rules.for_size("resistor.power", rated_as)
    if power is None and rating is not None:
        fix = f"field 'Power' on {part.ref}, or resistor.power in the rules"
        shown = f"{format_si(rating.power, 'W', sig=3)} ({size} size)"
        power = _default(
            Q_(rating.power, "W"), f"rating of size {size}", rating.note, rating.status,
            Stands(part.ref, "", "power rating", shown, "default", fix),
        )  # fmt: skip
    if power is None:
        hint = "add field 'Power' (e.g. 0.1W), a chip footprint, or resistor.power in the rules"
        missing.append(Missing(f"power rating of {part.ref}", part.ref, hint))
    wv = _read_field(part, "pullproof.working_voltage", parse_voltage)
    if wv is None:
        wv = rules.for_size("resistor.working_voltage", rated_as)
    if wv is None and rating is not None and rating.working_voltage is not None:
        fix = (
            f"field 'pullproof.working_voltage' on {part.ref}, or resistor.working_voltage "
            "in the rules"
        )
        shown = f"{rating.working_voltage:g} V ({size} size)"
        wv = _default(Q_(rating.working_voltage, "V"), f"working voltage of size {size}",
                      rating.note, rating.status,
                      Stands(part.ref, "", "working voltage", shown, "default", fix))  # fmt: skip
    role = (part.field("pullproof.role") or "").strip().lower()
    if role not in ("", "pull", "skip"):
        raise ValueParseError(role, expected="pull or skip", field="pullproof.role", part=part.ref)
    impossible = _impossible_band(part, rules, tol, tcr, power)
    if impossible:  # in the Value text: as unreadable as a placeholder
        missing.append(Missing(f"resistance of {part.ref}", part.ref, impossible))
        ohms = None
    info = ResistorInfo(
        ohms=ohms,
        tolerance=tol or rules.get("resistor.tolerance"),
        tcr=tcr or rules.get("resistor.tcr"),
        power=power,
        working_voltage=wv,
        size=size,
        role=role,
    )
    return info, tuple(missing)


def _impossible_band(
    part: Part, rules: Rules, tol: Sourced | None, tcr: Sourced | None, power: Sourced | None
) -> str:
    """Refuse a tolerance, TCR or power rating no real resistor has: a band that reaches
    zero or below (tolerance ≥ 100 %, TCR × temperature span ≥ 1) or a zero rating would
    divide by zero or turn a limit around. A bad field is an error naming it; the same in
    the Value text makes the Value unreadable: the returned hint says why ("" when fine).

    Raises:
        ValueParseError: the Tolerance, TCR or Power field is impossible.
    """
    span = max_temperature_span(rules.values)
    checks: tuple[tuple[str, Sourced | None, str, Callable[[float], bool], str], ...] = (
        ("Tolerance", tol, "", lambda x: 0 <= x < 1, "a tolerance below 100%"),
        ("TCR", tcr, "1/K", lambda x: 0 <= x * span < 1,
         f"a TCR whose drift over the rules' {span:g} K span stays below 100%"),
        ("Power", power, "W", lambda x: x > 0, "a power rating above zero"),
    )  # fmt: skip
    for name, value, unit, ok, expected in checks:
        if value is None or ok(value.magnitude(unit)):
            continue
        if value.source.origin is Origin.FIELD:
            text = part.field(name) or ""
            raise ValueParseError(text, expected=expected, field=name, part=part.ref)
        if value.source.origin is Origin.VALUE:
            return (
                f"the Value {excerpt(part.value)} states an impossible {name}; expected {expected}"
            )
    return ""


_INPUT_FIELDS: Mapping[str, tuple[str, Callable[..., Any]]] = MappingProxyType(
    {
        "pullproof.vih": ("vih_min", parse_voltage),
        "pullproof.vil": ("vil_max", parse_voltage),
        "pullproof.i_high": ("i_high", parse_current),
        "pullproof.i_low": ("i_low", parse_current),
        "pullproof.v_in_max": ("v_in_max", parse_voltage),
        "pullproof.c_in": ("c_in", parse_capacitance),
    }
)
#: The name of the input model of a part whose inputs carry only single-number fields.
FIELDS_ONLY = "part fields"
# Its family holds no number: every level and current comes from the part's own fields, and
# its empty supply span (0 V) marks levels that need no supply to be evaluated.
_FIELDS_ONLY = Family(
    name=FIELDS_ONLY,
    title="the part's own fields",
    standard="fields on the part",
    file="",
    status=MappingProxyType({}),
    note="",
    supply=(0.0, 0.0),
    v_in_max=None,
    origin=Origin.FIELD,
)
_YES = frozenset({"yes", "true", "1", "y"})
_NO = frozenset({"no", "false", "0", "n"})
_HINT = "add field 'pullproof.family' (e.g. HC) or a part-library entry"


def _overrides(part: Part) -> dict[str, Sourced]:
    out: dict[str, Sourced] = {}
    if not _own_fields(part):  # every name read here is a pullproof.… field
        return out
    for name, (key, reader) in _INPUT_FIELDS.items():
        value = _read_field(part, name, reader)
        if value is not None:
            if key.startswith("i_"):  # currents are stored as magnitudes (sign convention)
                value = Sourced(abs(value.value), value.source)
            out[key] = value
    return out


def _schmitt_field(part: Part) -> bool | None:
    text = part.field("pullproof.schmitt")
    if text is None:
        return None
    word = text.strip().lower()
    if word in _YES | _NO:
        return word in _YES
    raise ValueParseError(text, expected="yes or no", field="pullproof.schmitt", part=part.ref)


def _ratings(part: Part, entry: LibraryEntry | None, kind: PartKind) -> Ratings:
    values: dict[str, Sourced] = dict(entry.ratings) if entry else {}
    for key, reader in _RATING_READERS.items() if _own_fields(part) else ():
        got = _read_field(part, f"pullproof.{key}", reader)
        if got is not None:
            values[key] = got
    if kind is PartKind.CAPACITOR and "capacitance" not in values and part.value.strip():
        # an unreadable capacitor Value is reported by the check that needs it, as missing data
        with contextlib.suppress(ValueParseError):
            values["capacitance"] = Sourced(
                # "100nF 0603", "470pF/50V", "100n/16V/X7R": the capacitance comes first
                parse_capacitor_text(part.value, field="Value", part=part.ref).farads,
                Provenance(Origin.VALUE, f"Value of {part.ref}", Status.USER),
            )
    for key, (value, reason, status) in _DEFAULTS.get(kind, {}).items():
        stands = _rating_stands(part.ref, key, _text(value))
        values.setdefault(key, _default(value, f"{kind.value} {key}", reason, status, stands))
    return Ratings(MappingProxyType(values))


# Documented defaults for parts that rarely carry ratings (Provenance origin DEFAULT).
_SWITCH_DEFAULTS: Mapping[str, tuple[Any, str, Status]] = MappingProxyType(
    {
        "contact_max": (Q_(50e-3, "A"), "small signal switch rating (50 mA)", _FM),
        "wetting": (Q_(0.1e-3, "A"), "gold-plated signal contacts need about 0.1–1 mA", _CP),
    }
)  # fmt: skip
_DEFAULTS: Mapping[PartKind, Mapping[str, tuple[Any, str, Status]]] = MappingProxyType(
    {
        PartKind.SWITCH: _SWITCH_DEFAULTS,
        PartKind.RELAY: MappingProxyType(
            {"wetting": (Q_(10e-3, "A"), "silver power contacts need about 10 mA", _FM)}
        ),
        PartKind.OPTOCOUPLER: MappingProxyType(
            {
                "ageing": (Q_(0.5, ""), "end-of-life CTR = 0.5 × initial CTR", _CP),
                "vce_sat": (Q_(0.4, "V"), "typical phototransistor saturation", _FM),
                "dark_current": (Q_(100e-9, "A"), "typical phototransistor dark current", _FM),
            }
        ),
    }
)  # fmt: skip


def resolve_part(part: Part, library: PartLibrary, rules: Rules) -> PartInfo:
    """Everything pullproof can say about ``part``: kind, input model, resistor, ratings.

    Raises:
        ValueParseError: an explicit field (``pullproof.*``, Tolerance, Power, TCR) is unreadable.
    """
    entry = library.find(part)
    kind = entry.kind if entry else classify(part)
    missing: list[Missing] = []
    if kind is PartKind.RESISTOR:
        info, res_missing = _resistor(part, rules)
        return PartInfo(part.ref, kind, resistor=info, missing=res_missing)
    ratings = _ratings(part, entry, kind)
    if kind in (PartKind.SWITCH, PartKind.RELAY, PartKind.OPTOCOUPLER, PartKind.CAPACITOR):
        if kind is PartKind.OPTOCOUPLER and ratings.get("ctr_min") is None:
            missing.append(
                Missing(
                    f"CTR min of {part.ref}", part.ref, "add field 'pullproof.ctr_min' (e.g. 50%)"
                )
            )
        return PartInfo(part.ref, kind, ratings=ratings, missing=tuple(missing))
    if kind not in (PartKind.LOGIC, PartKind.MCU, PartKind.OTHER):
        return PartInfo(part.ref, kind, ratings=ratings)
    model, name, pins = _input_model(part, entry, missing)
    if model is not None:
        overrides = _overrides(part)
        if overrides:
            model = model.with_overrides(overrides)
    none = _no_internal_pull(part, entry, name if model is not None else "")
    return PartInfo(
        part.ref, kind, name, model, pins, None, ratings, tuple(missing), none, entry is not None
    )


def _no_internal_pull(part: Part, entry: LibraryEntry | None, model_name: str) -> str:
    """Why the data say the part's inputs have no internal pull, or "" when they do not say:
    the field or a part-library entry says ``none``, or the inputs follow a built-in logic
    family (standard logic inputs have no pull; their family tables list none)."""
    text = part.field("pullproof.internal_pull")
    if text is not None and text.strip().lower() == "none":
        return f"field 'pullproof.internal_pull' on {part.ref} says the pin has none"
    if entry is not None and entry.no_internal_pull:
        return f"part library entry {entry.name} says the pin has none (internal_pull = none)"
    if model_name in load_families() and (entry is None or entry.internal_pull is None):
        return f"{model_name} logic inputs have no internal pull (its family data)"
    return ""


def _input_model(
    part: Part, entry: LibraryEntry | None, missing: list[Missing]
) -> tuple[InputModel | None, str, tuple[str, ...]]:
    families = load_families()
    schmitt = _schmitt_field(part)
    named = part.field("pullproof.family")
    if named is not None:
        key = {k.upper(): k for k in families}.get(named.strip().upper().removeprefix("74"))
        key = key or {k.upper(): k for k in families}.get(named.strip().upper())
        if key is None:
            raise ValueParseError(named, expected=f"a family: {', '.join(families)}",
                                  field="pullproof.family", part=part.ref)  # fmt: skip
        return families[key].model(schmitt=bool(schmitt)), key, ("*",)
    found = family_from_name(part.value) or family_from_name(part.lib_id.split(":")[-1])
    if found is not None and found.family:
        flag = found.schmitt if schmitt is None else schmitt
        return families[found.family].model(schmitt=flag), found.family, ("*",)
    if entry is not None and entry.family is not None:
        model = InputModel(entry.family, schmitt=entry.schmitt if schmitt is None else schmitt,
                           internal_pull=entry.internal_pull)  # fmt: skip
        return model, entry.name, entry.pins
    if _overrides(part):
        # Single-number fields suffice: a model of the fields alone, whatever the part is.
        return InputModel(_FIELDS_ONLY, schmitt=bool(schmitt)), FIELDS_ONLY, ("*",)
    series = f" ({found.series}: no built-in data)" if found is not None else ""
    missing.append(Missing(f"input data of {part.ref}{series}", part.ref, _HINT))
    return None, "", ("*",)
