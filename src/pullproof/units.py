"""Quantities, the one pint unit registry, and parsers for values as designers write them.

Every parser returns a quantity (never a bare float: a :class:`~pullproof.quantity.Qty`
in the base unit it was read in, which pint checks and prints at the edges) and raises
:class:`~pullproof.errors.ValueParseError` naming the text, the field and the
part when the text cannot be read. Nothing is guessed: a lowercase ``m`` on a
bare resistance (milli or mega?), a stray trailing letter, a sign where none
belongs, or an infinite number are all errors.

Accepted forms (see the README "Value syntax" section):

* resistance: ``47k 4k7 4K7 47kΩ "47 kohm" 47000 1M 2M2 R47 0R 470R 6L8 1R8J 27KK``,
  ``49,9R`` (a decimal comma before the unit letter), ``30mR`` (milliohm),
  optionally followed by tolerance ``1%``, power ``0.1W``/``1/10W``/``100mW``,
  size ``0603``/``R0603`` and TCR ``100ppm/K``, separated by spaces, ``/``, ``_``,
  ``,`` or ``;``;
* a resistor array's Value: one element's resistance, ``4x10k``, or a longer part
  string holding exactly one resistance (:func:`parse_element_value`);
* a capacitor's Value: ``470pF/50V``, ``100n/16V/X7R``, ``10u 0805``
  (:func:`parse_capacitor_text`);
* current ``1uA 1µA 1μA 0.4mA "-0.4 mA"``; voltage ``3V3 +5V 1V8 "12 V" 230VAC``;
  capacitance ``100n 4n7 "100 nF"``; time ``10ms``; percentage ``5% ±1%``;
  temperature coefficient ``100ppm/K 50ppm/°C``; power ``0.25W 1/4W``.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation
from typing import Any

from .errors import ValueParseError
from .quantity import Qty, canonical_unit, pint_registry

__all__ = [
    "Q_",
    "CapacitorText",
    "ResistorText",
    "format_si",
    "parse_capacitance",
    "parse_capacitor_text",
    "parse_current",
    "parse_element_value",
    "parse_percent",
    "parse_power",
    "parse_resistance",
    "parse_resistor_text",
    "parse_tcr",
    "parse_temperature",
    "parse_time",
    "parse_voltage",
    "parse_voltage_ac",
]


def Q_(value: Any, unit: Any = "") -> Any:
    """A quantity: a :class:`Qty` in a natively held unit (V, A, ohm, F, s, W, 1/K, "",
    degC, K), else a pint quantity. Unit strings are read once, never per value."""
    key = canonical_unit(unit)
    if key is not None:
        return Qty(value, key)
    return pint_registry().Quantity(value, unit)


def __getattr__(name: str) -> Any:
    # ``units.ureg`` is the pint registry, created on first use: loading pint costs most
    # of a second, and a review that stays within the natively held units never needs it.
    if name == "ureg":
        return pint_registry()
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


Quantity = Any  # pint ships no type stubs

# SI prefixes as designers type them. "K" is accepted for kilo (IEC 60062 writes
# it uppercase); both micro signs (U+00B5, U+03BC) and "u" mean micro.
_PREFIX: dict[str, int] = {
    "p": -12,
    "n": -9,
    "u": -6,
    "µ": -6,
    "μ": -6,
    "m": -3,
    "": 0,
    "k": 3,
    "K": 3,
    "M": 6,
    "G": 9,
    "T": 12,
}
# IEC 60062 resistance code letters: the letter is the decimal marker and multiplier.
_RKM_OHM: dict[str, int] = {"L": -3, "R": 0, "r": 0, "K": 3, "k": 3, "M": 6, "G": 9, "T": 12}
# IEC 60062 tolerance letters (B, C, D, M from memory; F, G, J, K confirmed).
TOLERANCE_LETTERS: dict[str, Decimal] = {
    "B": Decimal("0.001"),
    "C": Decimal("0.0025"),
    "D": Decimal("0.005"),
    "F": Decimal("0.01"),
    "G": Decimal("0.02"),
    "J": Decimal("0.05"),
    "K": Decimal("0.10"),
    "M": Decimal("0.20"),
}

_EXPECT_R = "a resistance such as 4k7, 47k, 4.7 kΩ, 470R, R47 or 47000"
_EXPECT_I = "a current with its unit, such as 1µA, 0.4mA or -0.4 mA"
_EXPECT_V = "a voltage with its unit, such as 3V3, +5V, 1.8 V or 230VAC"
_EXPECT_C = "a capacitance such as 100n, 4n7 or 100 nF"
_EXPECT_T = "a time with its unit, such as 10ms or 1.5 s"
_EXPECT_PCT = "a percentage such as 5% or ±1%"
_EXPECT_TCR = "a temperature coefficient such as 100ppm/K or 50 ppm/°C"
_EXPECT_P = "a power such as 0.1W, 1/4W or 100mW"
_EXPECT_TEMP = "a temperature such as 25°C, -40 °C or 85degC"

_NUM = r"(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
# Between a value and its extras: spaces, "/", "_", "," or ";" ("10k/R0603", "10k_0402").
_SEP = re.compile(r"[\s,;/_]+")
_TOKEN_END = " \t,;/_"
# A comma between digits just before a multiplier or unit letter is a decimal sign
# ("49,9R", "4,7k"; ISO 80000-1 allows comma or point); elsewhere it separates extras.
_DECIMAL_COMMA = re.compile(r"^(\d+),(\d+)(?=[LRrKkMGTmΩΩ]|\s*[oO]hm)")

# A resistance in the IEC 60062 letter-and-digit form, with an optional tolerance letter.
_RKM_R = re.compile(
    r"""
    (?P<int> \d+ )                 # digits before the marker ("" is not allowed: R47 below)
    (?P<mult> [LRrKkMGT] )         # marker letter = decimal point and multiplier
    (?P<frac> \d* )                # digits after the marker
    (?P<tol> (?<=[LRKMGT]) [BCDFGJKM] | (?<=[LRKMGT]\d) [BCDFGJKM] | (?<=[LRKMGT]\d\d) [BCDFGJKM] )?
                                   # IEC 60062 tolerance letter (1R8J, 27KK), only after an
                                   # uppercase marker: "47kF" is a unit mix-up, not ±1 %
    (?: \s* (?: Ω | Ω | [oO]hms? ) )?
    |
    (?P<lead> [Rr] ) (?P<lfrac> \d+ )   # R47 = 0.47 Ω
    (?P<ltol> [BCDFGJKM] )?
    """,
    re.VERBOSE,
)
# A resistance as a decimal number with an optional SI prefix and unit.
_DEC_R = re.compile(
    rf"""
    (?P<num> {_NUM} )
    \s*
    (?P<prefix> [mkKMGT] )?        # no micro or nano: nobody writes µΩ on a pull-up
    \s*
    (?P<unit> Ω | Ω | [oO]hms? | R )?   # R as the ohm sign after a decimal ("49.9R", "30mR")
    """,
    re.VERBOSE,
)
# Extras after a resistance: tolerance, power, size, TCR (order free).
_EXTRA = re.compile(
    rf"""
    (?P<tol> ±? \s* (?P<tolnum> {_NUM} ) \s* % )
    | (?P<pfrac> (?P<pn> \d+ ) / (?P<pd> \d+ ) \s* W )
    | (?P<pow> (?P<pnum> {_NUM} ) \s* (?P<pprefix> [mk] )? W )
    | (?P<tcr> ±? \s* (?P<tcrnum> {_NUM} ) \s* ppm (?: \s* / \s* (?: K | °C | ℃ | degC ) )? )
    | [RC]? (?P<size> 01005 | 0201 | 0402 | 0603 | 0805 | 1206 | 1210 | 1812 | 2010 | 2512 )
                                   # a chip size, with or without its R/C prefix ("R0603")
    """,
    re.VERBOSE,
)
# A signed quantity in decimal or letter-and-digit form ("3V3", "4n7"). UNIT and PFX are
# filled in per kind (see _QTY_UNITS), so "47kF" or "3V3V" never match.
_QTY_TEMPLATE = r"""
    (?P<sign> [+-] )?
    \s*
    (?:
        (?P<int> \d+ ) (?P<mark> [PFX] | UNIT ) (?P<frac> \d+ )   # 3V3, 4n7, 2u2
        (?P<tail> UNIT )?                                         # 4n7F
      |
        (?P<num> NUM ) \s* (?P<prefix> [PFX] )? \s* (?P<unit> UNIT )?
    )
"""
_QTY_UNITS: dict[str, tuple[str, str]] = {
    "A": ("A", "pnuµμm"),
    "V": ("V", "µμmkK"),
    "F": ("F", "pnuµμm"),
    "s": ("s", "pnuµμm"),
}
_QTY: dict[str, re.Pattern[str]] = {
    key: re.compile(
        _QTY_TEMPLATE.replace("UNIT", unit).replace("PFX", pfx).replace("NUM", _NUM), re.VERBOSE
    )
    for key, (unit, pfx) in _QTY_UNITS.items()
}


@dataclass(frozen=True)
class ResistorText:
    """What a resistor's Value text says: resistance plus any tolerance, power, size, TCR."""

    ohms: Quantity
    tolerance: Quantity | None = None  # dimensionless fraction
    power: Quantity | None = None  # W
    size: str = ""  # imperial chip size code, e.g. "0603"
    tcr: Quantity | None = None  # 1/K


def _fail(text: str, expected: str, field: str | None, part: str | None) -> ValueParseError:
    return ValueParseError(text, expected=expected, field=field, part=part)


def _decimal(text: str, exp: int) -> Decimal:
    """An exact decimal for ``text`` × 10**exp (avoids 4.7 * 1000 rounding surprises)."""
    try:
        value = Decimal(text).scaleb(exp)
    except InvalidOperation:  # pragma: no cover - regexes only pass numerals
        raise ValueError(text) from None
    return value


# The magnitudes a value may have in its base unit (V, A, Ω, F, s, W, 1/K, fraction):
# 1e-18 to 1e15 hold every real part and keep every product, square and quotient the
# constraints form far inside the range of a float (a rail of 1e308 V would overflow).
_SMALLEST = Decimal("1e-18")
_LARGEST = Decimal("1e15")


def _finite(value: Decimal, text: str, expected: str, field: str | None, part: str | None) -> float:
    if value != 0 and not _SMALLEST <= abs(value) <= _LARGEST:
        raise _fail(text, f"{expected} (the number is out of range)", field, part)
    return float(value)


def _resistance_head(
    text: str, field: str | None, part: str | None, shown: str | None = None
) -> tuple[float, Decimal | None, int]:
    """Read the resistance at the start of ``text``: (ohms, tolerance letter value, end).

    ``shown`` is the text as the user wrote it, for error messages (default ``text``).
    """
    seen = text if shown is None else shown
    m = _RKM_R.match(text)
    if m is not None and _ends_token(text, m.end()):
        if m.group("lead"):
            value = _decimal("0." + m.group("lfrac"), 0)
            tol = TOLERANCE_LETTERS[m.group("ltol")] if m.group("ltol") else None
        else:
            mult = m.group("mult")
            value = _decimal(f"{m.group('int')}.{m.group('frac') or '0'}", _RKM_OHM[mult])
            tol = TOLERANCE_LETTERS[m.group("tol")] if m.group("tol") else None
        return _finite(value, seen, _EXPECT_R, field, part), tol, m.end()
    m = _DEC_R.match(text)
    if m is None or (not _ends_token(text, m.end()) and not text[m.end() - 1].isspace()):
        raise _fail(seen, _EXPECT_R, field, part)
    prefix = m.group("prefix") or ""
    if prefix == "m" and not m.group("unit"):
        raise _fail(
            seen, f"{_EXPECT_R} (lowercase m is milli: write M for megohm or mΩ)", field, part
        )
    value = _decimal(m.group("num"), _PREFIX[prefix])
    end = m.end()
    while end > 0 and text[end - 1] in " \t":  # "680 1206": the space belongs to the separator
        end -= 1
    return _finite(value, seen, _EXPECT_R, field, part), None, end


def _ends_token(text: str, end: int) -> bool:
    return end == len(text) or text[end] in _TOKEN_END


def parse_resistor_text(
    text: str, *, field: str | None = "Value", part: str | None = None
) -> ResistorText:
    """Read a resistor Value such as ``"10k 1% 0603"`` or ``"1R8J"``.

    Raises:
        ValueParseError: the text is not a non-negative resistance with optional extras,
            or an extra (tolerance, power, size, TCR) is repeated or unreadable.
    """
    body = _DECIMAL_COMMA.sub(r"\1.\2", text.strip())
    if not body:
        raise _fail(text, _EXPECT_R, field, part)
    ohms, tol_letter, pos = _resistance_head(body, field, part, text)
    found: dict[str, Any] = {}
    if tol_letter is not None:
        found["tolerance"] = Q_(float(tol_letter), "")
    expected_extra = "after the resistance: a tolerance (1%), power (0.1W), size (0603) or TCR"
    while pos < len(body):
        sep = _SEP.match(body, pos)
        if sep is None:
            raise _fail(text, f"{_EXPECT_R}, then {expected_extra}", field, part)
        pos = sep.end()
        if pos == len(body):
            break
        m = _EXTRA.match(body, pos)
        if m is None or not _ends_token(body, m.end()):
            raise _fail(text, f"{_EXPECT_R}, then {expected_extra}", field, part)
        key, quantity = _extra_value(m, text, field, part)
        if key in found:
            raise _fail(text, f"{_EXPECT_R} with at most one {key}", field, part)
        found[key] = quantity
        pos = m.end()
    return ResistorText(
        ohms=Q_(ohms, "ohm"),
        tolerance=found.get("tolerance"),
        power=found.get("power"),
        size=str(found.get("size", "")),
        tcr=found.get("tcr"),
    )


def _extra_value(
    m: re.Match[str], text: str, field: str | None, part: str | None
) -> tuple[str, Any]:
    if m.group("tol"):
        frac = _finite(_decimal(m.group("tolnum"), -2), text, _EXPECT_PCT, field, part)
        if frac >= 1.0:
            raise _fail(text, f"{_EXPECT_PCT} below 100 %", field, part)
        return "tolerance", Q_(frac, "")
    if m.group("pfrac"):
        den = Decimal(m.group("pd"))  # Decimal: any number of digits (int() stops at 4300)
        if den == 0:
            raise _fail(text, _EXPECT_P, field, part)
        if Decimal(m.group("pn")) == 0:
            raise _fail(text, f"{_EXPECT_P} above zero", field, part)
        watts = _finite(Decimal(m.group("pn")) / den, text, _EXPECT_P, field, part)
        return "power", Q_(watts, "W")
    if m.group("pow"):
        exp = {"": 0, "m": -3, "k": 3}[m.group("pprefix") or ""]
        watts = _finite(_decimal(m.group("pnum"), exp), text, _EXPECT_P, field, part)
        if watts <= 0:
            raise _fail(text, f"{_EXPECT_P} above zero", field, part)
        return "power", Q_(watts, "W")
    if m.group("tcr"):
        per_k = _finite(_decimal(m.group("tcrnum"), -6), text, _EXPECT_TCR, field, part)
        return "tcr", Q_(per_k, "1/K")
    return "size", m.group("size")


def parse_resistance(text: str, *, field: str | None = "Value", part: str | None = None) -> Any:
    """Read a resistance (extras allowed and ignored); returns a quantity in ohms."""
    return parse_resistor_text(text, field=field, part=part).ohms


# "4x10k", "8 × 4k7": a count of elements, then one element's value.
_ELEMENT_COUNT = re.compile(r"^\s*\d+\s*[x×*]\s*(?P<rest>\S.*)$")
# Words of a longer part string ("CAT16 4x10K 5%"): split at spaces and punctuation.
_WORDS = re.compile(r"[\s,;/()\[\]]+")
# A word that names a resistance carries a multiplier letter or an ohm sign (not "0402").
_HAS_MARKER = re.compile(r"[LRrKkMGTΩΩ]|[oO]hm")
_EXPECT_ELEMENT = f"{_EXPECT_R}, or a resistor array's value such as 4x10k"


def parse_element_value(
    text: str, *, field: str | None = "Value", part: str | None = None
) -> ResistorText:
    """One element's resistance from a resistor array's Value.

    Read in order: the Value as a resistor's (``10k``, ``4k7 5%``); a count then the
    element value (``4x10k``, ``8 × 4K7``); else a longer part string holding exactly
    one resistance (``CAT16 4x10K 5%``). Two different resistances, or none, are an error:
    nothing is guessed.

    Raises:
        ValueParseError: no single resistance can be read.
    """
    try:
        return parse_resistor_text(text, field=field, part=part)
    except ValueParseError:
        pass
    m = _ELEMENT_COUNT.match(text)
    if m is not None:
        try:
            return parse_resistor_text(m.group("rest"), field=field, part=part)
        except ValueParseError:
            pass
    found: dict[float, ResistorText] = {}
    for word in _WORDS.split(text):
        counted = _ELEMENT_COUNT.match(word)
        word = counted.group("rest") if counted else word
        if not word or not _HAS_MARKER.search(word):
            continue
        try:
            got = parse_resistor_text(word, field=field, part=part)
        except ValueParseError:
            continue
        found.setdefault(got.ohms.to("ohm").magnitude, got)
    if len(found) != 1:
        raise _fail(text, _EXPECT_ELEMENT, field, part)
    return next(iter(found.values()))


@dataclass(frozen=True)
class CapacitorText:
    """What a capacitor's Value text says: capacitance plus any rated voltage, dielectric,
    tolerance and size."""

    farads: Quantity
    voltage: Quantity | None = None  # rated voltage, V
    dielectric: str = ""  # "X7R", "C0G" …
    tolerance: Quantity | None = None  # dimensionless fraction
    size: str = ""


# Extras after a capacitance: rated voltage, dielectric class, tolerance, size (order free).
_CAP_EXTRA = re.compile(
    rf"""
    (?P<volt> (?P<vint> \d+ ) V (?P<vfrac> \d+ ) | (?P<vnum> {_NUM} ) \s* V ) (?: DC )?
                                   # rated voltage: 50V, 6V3, 6.3 V
    | (?P<diel> X[5-8][PRSTUV] | Y5V | Z5U | C0G | COG | NP0 | NPO )
                                   # ceramic dielectric class (EIA RS-198 codes)
    | (?P<tol> ±? \s* (?P<tolnum> {_NUM} ) \s* % )
    | [RC]? (?P<size> 01005 | 0201 | 0402 | 0603 | 0805 | 1206 | 1210 | 1812 | 2010 | 2512 )
    """,
    re.VERBOSE,
)
_EXPECT_C_EXTRA = (
    f"{_EXPECT_C}, then a rated voltage (50V), dielectric (X7R), tolerance (10%) or size (0603)"
)


def parse_capacitor_text(
    text: str, *, field: str | None = "Value", part: str | None = None
) -> CapacitorText:
    """Read a capacitor Value such as ``"470pF/50V"`` or ``"100n/16V/X7R"``.

    Raises:
        ValueParseError: the text is not a capacitance with optional extras, or an extra
            is repeated or unreadable.
    """
    body = text.strip()
    head = _QTY["F"].match(body)
    end = head.end() if head is not None else len(body)
    while end > 0 and body[end - 1] in " \t":  # "10u 0805": the space belongs to the separator
        end -= 1
    try:
        farads, _ = _quantity(body[:end], "F", _EXPECT_C, signed=False, field=field, part=part)
    except ValueParseError as exc:
        raise _fail(text, exc.expected, field, part) from None
    rest = body[end:]
    found: dict[str, Any] = {}
    pos = 0
    while pos < len(rest):
        sep = _SEP.match(rest, pos)
        if sep is None:
            raise _fail(text, _EXPECT_C_EXTRA, field, part)
        pos = sep.end()
        if pos == len(rest):
            break
        m = _CAP_EXTRA.match(rest, pos)
        if m is None or not _ends_token(rest, m.end()):
            raise _fail(text, _EXPECT_C_EXTRA, field, part)
        if m.group("volt"):
            key, value = "voltage", Q_(_cap_volts(m, text, field, part), "V")
        elif m.group("diel"):
            key, value = "dielectric", m.group("diel").upper().replace("COG", "C0G")
        elif m.group("tol"):
            frac = _finite(_decimal(m.group("tolnum"), -2), text, _EXPECT_PCT, field, part)
            key, value = "tolerance", Q_(frac, "")
        else:
            key, value = "size", m.group("size")
        if key in found:
            raise _fail(text, f"{_EXPECT_C} with at most one {key}", field, part)
        found[key] = value
        pos = m.end()
    return CapacitorText(
        farads=Q_(farads, "F"),
        voltage=found.get("voltage"),
        dielectric=str(found.get("dielectric", "")),
        tolerance=found.get("tolerance"),
        size=str(found.get("size", "")),
    )


def _cap_volts(m: re.Match[str], text: str, field: str | None, part: str | None) -> float:
    number = f"{m.group('vint')}.{m.group('vfrac')}" if m.group("vint") else m.group("vnum")
    return _finite(_decimal(number, 0), text, _EXPECT_V, field, part)


def _quantity(
    text: str,
    unit: str,
    expected: str,
    *,
    signed: bool,
    field: str | None,
    part: str | None,
    need_unit: bool = True,
) -> tuple[float, str]:
    """Read a number with prefix and unit; returns (value in ``unit``, text after it)."""
    body = text.strip()
    m = _QTY[unit].match(body)
    if m is None or not body:
        raise _fail(text, expected, field, part)
    rest = body[m.end() :]
    if m.group("int") is not None:
        mark = m.group("mark")
        exp = _PREFIX.get(mark, 0)  # a unit letter as marker means ×1 ("3V3")
        value = _decimal(f"{m.group('int')}.{m.group('frac')}", exp)
        if mark not in _PREFIX and m.group("tail"):
            raise _fail(text, expected, field, part)  # "3V3V": the unit twice
    else:
        prefix = m.group("prefix") or ""
        if need_unit and not m.group("unit") and not prefix:
            raise _fail(text, expected, field, part)
        value = _decimal(m.group("num"), _PREFIX[prefix])
    if m.group("sign") == "-":
        if not signed:
            raise _fail(text, f"{expected} (not negative)", field, part)
        value = -value
    return _finite(value, text, expected, field, part), rest


def _whole(rest: str, text: str, expected: str, field: str | None, part: str | None) -> None:
    if rest.strip():
        raise _fail(text, expected, field, part)


def parse_current(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a current such as ``1µA`` or ``-0.4 mA`` (signed); returns amperes."""
    value, rest = _quantity(
        text, "A", _EXPECT_I, signed=True, field=field, part=part, need_unit=True
    )
    _whole(rest, text, _EXPECT_I, field, part)
    if not re.search("A", text):
        raise _fail(text, _EXPECT_I, field, part)  # "1u" could be anything
    return Q_(value, "A")


def parse_voltage_ac(
    text: str, *, field: str | None = None, part: str | None = None
) -> tuple[Any, bool]:
    """Read a voltage such as ``3V3``, ``+5V`` or ``230VAC``; returns (volts, is_ac)."""
    value, rest = _quantity(text, "V", _EXPECT_V, signed=True, field=field, part=part)
    m = re.fullmatch(r"\s*(?P<kind>AC|DC|ac|dc|rms)?\s*", rest)
    if m is None or "V" not in text:
        raise _fail(text, _EXPECT_V, field, part)
    return Q_(value, "V"), (m.group("kind") or "").upper() in ("AC", "RMS")


def parse_voltage(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a voltage such as ``3V3``, ``+5V``, ``1V8`` or ``12 V``; returns volts."""
    return parse_voltage_ac(text, field=field, part=part)[0]


def parse_capacitance(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a capacitance such as ``100n``, ``4n7`` or ``100 nF``; returns farads."""
    value, rest = _quantity(text, "F", _EXPECT_C, signed=False, field=field, part=part)
    _whole(rest, text, _EXPECT_C, field, part)
    return Q_(value, "F")


def parse_time(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a time such as ``10ms`` or ``1.5 s``; returns seconds."""
    value, rest = _quantity(text, "s", _EXPECT_T, signed=False, field=field, part=part)
    _whole(rest, text, _EXPECT_T, field, part)
    if "s" not in text:
        raise _fail(text, _EXPECT_T, field, part)
    return Q_(value, "s")


_PCT = re.compile(rf"\s*±?\s*(?P<num>{_NUM})\s*%\s*")
_TCR = re.compile(rf"\s*±?\s*(?P<num>{_NUM})\s*ppm(?:\s*/\s*(?:K|°C|℃|degC))?\s*")
_POWER = re.compile(rf"\s*(?:(?P<n>\d+)/(?P<d>\d+)|(?P<num>{_NUM})\s*(?P<prefix>[mk])?)\s*W\s*")
_TEMP = re.compile(rf"\s*(?P<sign>[+-])?\s*(?P<num>{_NUM})\s*(?:°C|℃|degC|C)\s*")


def parse_percent(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a percentage such as ``5%`` or ``±1 %``; returns a dimensionless fraction."""
    m = _PCT.fullmatch(text)
    if m is None:
        raise _fail(text, _EXPECT_PCT, field, part)
    return Q_(_finite(_decimal(m.group("num"), -2), text, _EXPECT_PCT, field, part), "")


def parse_tcr(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a temperature coefficient such as ``100ppm/K``; returns a quantity in 1/K."""
    m = _TCR.fullmatch(text)
    if m is None:
        raise _fail(text, _EXPECT_TCR, field, part)
    return Q_(_finite(_decimal(m.group("num"), -6), text, _EXPECT_TCR, field, part), "1/K")


def parse_power(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a power such as ``0.1W``, ``1/4W`` or ``100mW``; returns watts."""
    m = _POWER.fullmatch(text)
    if m is None:
        raise _fail(text, _EXPECT_P, field, part)
    if m.group("n") is not None:
        den = Decimal(m.group("d"))  # Decimal: any number of digits (int() stops at 4300)
        if den == 0:
            raise _fail(text, _EXPECT_P, field, part)
        return Q_(_finite(Decimal(m.group("n")) / den, text, _EXPECT_P, field, part), "W")
    exp = {"": 0, "m": -3, "k": 3}[m.group("prefix") or ""]
    return Q_(_finite(_decimal(m.group("num"), exp), text, _EXPECT_P, field, part), "W")


def parse_temperature(text: str, *, field: str | None = None, part: str | None = None) -> Any:
    """Read a temperature in degrees Celsius such as ``-40°C``; returns a degC quantity."""
    m = _TEMP.fullmatch(text)
    if m is None:
        raise _fail(text, _EXPECT_TEMP, field, part)
    value = _finite(_decimal(m.group("num"), 0), text, _EXPECT_TEMP, field, part)
    return Q_(-value if m.group("sign") == "-" else value, "degC")


# ---------------------------------------------------------------- formatting

# SI prefixes by power of a thousand; "µ" is U+00B5 as typographers and IEC 60027 print it.
_SI_PREFIXES = {
    -15: "f",
    -12: "p",
    -9: "n",
    -6: "µ",
    -3: "m",
    0: "",
    3: "k",
    6: "M",
    9: "G",
    12: "T",
}


def format_si(value: float, unit: str, *, sig: int = 3, sep: str = " ", minus: str = "−") -> str:
    """``value`` (in the base ``unit``) with an SI prefix and ``sig`` significant digits,
    trailing zeros dropped: (4700, "Ω") → "4.7 kΩ"; NaN → "unknown"; ±inf → "∞"/"−∞".

    The one formatter behind every number pullproof prints (reasons, substituted
    formulas, tables, the note); ``sep`` is the space between number and unit.
    """
    if math.isnan(value):
        return "unknown"
    if math.isinf(value):
        return "∞" if value > 0 else f"{minus}∞"
    if value == 0:
        return f"0{sep}{unit}"
    power = int(math.floor(math.log10(abs(value)) / 3) * 3)
    power = max(min(power, 12), -15)
    scaled = value / 10.0**power
    # Rounding can carry into the next prefix (999.97 → "1e+03"): step up instead.
    if abs(float(f"{scaled:.{sig}g}")) >= 1000 and power < 12:
        power += 3
        scaled = value / 10.0**power
    text = f"{scaled:.{sig}g}"
    if "e" in text:  # only at the ends of the prefix range
        text = f"{scaled:.0f}"
    return f"{text.replace('-', minus)}{sep}{_SI_PREFIXES[power]}{unit}"
