"""Read logic-family and part-library input data (TOML) into input models.

The syntax is documented in the header of every file in ``families/data``; a
user part library uses the same keys (see :mod:`pullproof.families.library`).
An :class:`InputModel` turns a family's tables into
:class:`~pullproof.network.InputLevels` at any supply voltage: rows that hold
over a supply range apply as written, and between rows values are linearly
interpolated (the worst of two rows is taken where rows meet).
"""

from __future__ import annotations

import re
import tomllib
from collections.abc import Mapping
from dataclasses import dataclass, field, replace
from functools import cache
from importlib import resources
from pathlib import Path
from types import MappingProxyType
from typing import Any

from ..errors import ValueParseError
from ..network import InputLevels
from ..provenance import Origin, Provenance, Sourced, Stands, Status
from ..units import Q_, parse_capacitance, parse_current, parse_time, parse_voltage

__all__ = [
    "ASSUMED_WORD",
    "QUANTITY",
    "STATUS_WORDS",
    "Family",
    "InputModel",
    "LevelRow",
    "VoltageExpr",
    "family_from_table",
    "load_families",
]

CHECK = "check the datasheet of the part you fit"
STATUS_WORDS: Mapping[str, Status] = MappingProxyType(
    {
        "confirmed": Status.CONFIRMED,
        "from memory": Status.FROM_MEMORY,
        "common practice": Status.COMMON_PRACTICE,
        "user": Status.USER,
        "example": Status.USER,
    }
)
# A status that makes a number an assumption (origin "assumed"): a stand-in the family's
# standard does not state, or a part-library value copied from an assumption class and not
# yet confirmed. A limit resting on it is soft, and `assume = "none"` leaves it out.
ASSUMED_WORD = "assumed"
_STATUS_KEYS = frozenset(
    {"supply", "levels", "schmitt", "i_high", "i_low", "c_in", "v_in_max", "transition"}
)
_LEVEL_KEYS = ("vih_min", "vil_max")
_SCHMITT_KEYS = ("vt_plus_min", "vt_plus_max", "vt_minus_min", "vt_minus_max")
# Which way is "worse" for each tabulated key where two rows meet.
_WORST_IS_MAX = frozenset({"vih_min", "vt_plus_max", "vt_minus_max"})

_VEXPR = re.compile(
    r"""
    \s*(?:
        (?P<k> \d+(?:\.\d+)? ) \s* \*? \s* VDD          # 0.65 VDD : fraction of the supply
      | VDD \s* (?: (?P<sign> [+-] ) \s* (?P<off> [^\s].* ) )?   # VDD, VDD+0.5V
      | (?P<abs> .+ )                                  # 1.5V
    )\s*$
    """,
    re.VERBOSE,
)


@dataclass(frozen=True)
class VoltageExpr:
    """A voltage that may depend on the supply: ``k × VDD + offset`` volts."""

    k: float
    offset: float  # V
    text: str

    @classmethod
    def parse(cls, text: str, *, field: str, part: str) -> VoltageExpr:
        m = _VEXPR.match(text)
        if m is None:  # pragma: no cover - the last branch matches anything non-blank
            raise ValueParseError(text, expected="a voltage, 'k VDD' or 'VDD±x V'", field=field)
        if m.group("k") is not None:
            k = float(m.group("k"))
            if not 0 <= k <= 1:  # a level is a fraction of the supply it is powered from
                raise ValueParseError(
                    text, expected="a fraction of the supply from 0 to 1, such as 0.7 VDD",
                    field=field, part=part,
                )  # fmt: skip
            return cls(k, 0.0, text)
        if m.group("abs") is None:
            offset = 0.0
            if m.group("off") is not None:
                offset = parse_voltage(m.group("off"), field=field, part=part).to("V").magnitude
                offset = -offset if m.group("sign") == "-" else offset
            return cls(1.0, float(offset), text)
        return cls(0.0, float(parse_voltage(text, field=field, part=part).to("V").magnitude), text)

    def at(self, vdd: float) -> float:
        return self.k * vdd + self.offset


@dataclass(frozen=True)
class LevelRow:
    """One table row: the supply span where it holds and its values (volts or seconds)."""

    vdd_lo: float
    vdd_hi: float
    values: Mapping[str, VoltageExpr | float]  # float = seconds, or seconds per volt
    per_volt: frozenset[str] = frozenset()  # keys given per volt of supply ("10ns/V")

    def value(self, key: str, vdd: float) -> float | None:
        v = self.values.get(key)
        if v is None:
            return None
        if isinstance(v, VoltageExpr):
            return v.at(vdd)
        return v * vdd if key in self.per_volt else v


@dataclass(frozen=True)
class Family:
    """A logic family's input data and where every number came from."""

    name: str
    title: str
    standard: str
    file: str
    status: Mapping[str, Status]  # per key group, see _STATUS_KEYS
    note: str
    supply: tuple[float, float]  # V
    v_in_max: VoltageExpr | None
    i_high: Any = None  # A, over temperature
    i_low: Any = None
    i_high_25c: Any = None
    i_low_25c: Any = None
    c_in: Any = None
    levels: tuple[LevelRow, ...] = ()
    schmitt: tuple[LevelRow, ...] = ()
    origin: Origin = Origin.FAMILY
    extra: Mapping[str, Any] = field(default_factory=lambda: MappingProxyType({}))
    # status keys whose numbers are assumptions (status "assumed"), and why
    assumed: frozenset[str] = frozenset()
    assumption: str = ""
    # exact provenance per number (an assumption class names a source for each one)
    provenance_of: Mapping[str, Provenance] = field(default_factory=lambda: MappingProxyType({}))

    def source(self, key: str, detail: str = "", group: str = "") -> Provenance:
        """The provenance of one number of this family (``group``: its status key, when
        the number shares one, e.g. ``levels`` for ``vih_min``)."""
        exact = self.provenance_of.get(key)
        if exact is not None:
            return replace(exact, reason=_join(detail, exact.reason))
        group = group or key
        where = f"family {self.name}, {self.standard}"
        if self.origin is Origin.PART_LIBRARY:
            where = f"part library entry {self.name} ({self.file})"
        if group in self.assumed:
            return self._assumed(key, group, where, detail)
        reason = "; ".join(p for p in (detail, self.note) if p)
        return Provenance(self.origin, where, self.status.get(group, Status.USER), reason)

    def _assumed(self, key: str, group: str, where: str, detail: str) -> Provenance:
        library = self.origin is Origin.PART_LIBRARY
        fix = (
            f"the datasheet figure in part library entry {self.name} ({self.file}), then "
            f'status_of.{group} = "user"'
            if library
            else "a part-library entry or field for the part you fit"
        )
        basis = f"part library entry {self.name} (assumed)" if library else f"family {self.name}"
        stands = Stands("", "", QUANTITY.get(key, key), "", basis, fix)
        reason = _join(detail, self.assumption or "a stand-in value nothing states")
        return Provenance(
            Origin.ASSUMED, f"assumed {key} ({where})", Status.DEFAULT, reason, stands=stands
        )

    def breakpoints(self) -> tuple[float, ...]:
        """Every supply voltage where a table row starts or ends, inside the supply range."""
        lo, hi = self.supply
        points = {lo, hi}
        for row in (*self.levels, *self.schmitt):
            points.update(p for p in (row.vdd_lo, row.vdd_hi) if lo <= p <= hi)
        return tuple(sorted(points))

    def model(self, *, schmitt: bool = False) -> InputModel:
        return InputModel(self, schmitt=schmitt)


def _lookup(rows: tuple[LevelRow, ...], key: str, vdd: float) -> tuple[float, str] | None:
    """The value of ``key`` at ``vdd`` and how it was found (row, worst of rows, interpolated)."""
    rows = tuple(r for r in rows if key in r.values)
    if not rows:
        return None
    pick = max if key in _WORST_IS_MAX else min
    inside = [r for r in rows if r.vdd_lo - 1e-9 <= vdd <= r.vdd_hi + 1e-9]
    if inside:
        values = [v for r in inside if (v := r.value(key, vdd)) is not None]
        return pick(values), ""
    below = [r for r in rows if r.vdd_hi < vdd]
    above = [r for r in rows if r.vdd_lo > vdd]
    if not below or not above:
        return None  # outside the table: no extrapolation
    lo = max(below, key=lambda r: r.vdd_hi)
    hi = min(above, key=lambda r: r.vdd_lo)
    v_lo, v_hi = lo.value(key, lo.vdd_hi), hi.value(key, hi.vdd_lo)
    if v_lo is None or v_hi is None:  # pragma: no cover - rows were filtered on key
        return None
    t = (vdd - lo.vdd_hi) / (hi.vdd_lo - lo.vdd_hi)
    how = f"interpolated between {lo.vdd_hi:g} V and {hi.vdd_lo:g} V"
    return v_lo + t * (v_hi - v_lo), how


@dataclass(frozen=True)
class InputModel:
    """A logic input's data, ready to be evaluated at any supply voltage of its own.

    ``overrides`` holds values written on the part itself (fields), which replace the
    family's at every supply; ``internal_pull`` an internal pull range (min, max) in ohms.
    ``room_temperature_only`` selects a family's 25 °C input currents (set when the rules'
    temperature span stays at 25 °C).
    """

    family: Family
    schmitt: bool = False
    overrides: Mapping[str, Sourced] = field(default_factory=lambda: MappingProxyType({}))
    internal_pull: tuple[Sourced, Sourced] | None = None
    room_temperature_only: bool = False

    @property
    def supply_range(self) -> tuple[Sourced, Sourced]:
        lo, hi = self.family.supply
        src = self.family.source("supply")
        return Sourced(Q_(lo, "V"), src), Sourced(Q_(hi, "V"), src)

    @property
    def breakpoints(self) -> tuple[float, ...]:
        """Supply voltages (V) where the tables change: evaluate there and at the corners."""
        return self.family.breakpoints()

    @property
    def five_volt_tolerant(self) -> bool:
        """True when the input accepts 5.5 V even at the family's lowest supply."""
        v = self.family.v_in_max
        return v is not None and v.at(self.family.supply[0]) >= 5.5 - 1e-9

    def with_overrides(self, overrides: Mapping[str, Sourced]) -> InputModel:
        merged = dict(self.overrides)
        merged.update(overrides)
        return replace(self, overrides=MappingProxyType(merged))

    def at_key(self, vdd: Sourced) -> tuple[Any, ...]:
        """Everything :meth:`at` reads, hashable: two calls with equal keys give equal levels
        but for their ``vdd``, which is the argument itself. The family counts by identity (its
        tables are not hashable; a holder of the key keeps the model, and so the family,
        alive); values by their exact text (and an override by its source), so that ``5`` and
        ``5.0`` V, or 1 V and 1000 mV, stay apart."""
        overrides = tuple((k, repr(v.value), v.source) for k, v in self.overrides.items())
        return (id(self.family), self.schmitt, self.room_temperature_only, overrides,
                repr(vdd.value))  # fmt: skip

    def at(self, vdd: Any) -> InputLevels:
        """The guaranteed levels and currents at supply ``vdd`` (a Sourced, quantity or volts)."""
        if isinstance(vdd, Sourced):
            vdd_s = vdd
        else:
            q = vdd if hasattr(vdd, "to") else Q_(float(vdd), "V")
            vdd_s = Sourced(q, Provenance(Origin.DERIVED, "supply corner", Status.USER))
        v = float(vdd_s.value.to("V").magnitude)
        fam = self.family
        out: dict[str, Sourced | None] = {}
        lo, hi = fam.supply
        outside = "" if lo - 1e-9 <= v <= hi + 1e-9 else f"supply {v:g} V outside {lo:g}–{hi:g} V"
        for key in _LEVEL_KEYS:
            out[key] = self._volts(fam.levels, key, v, "levels", outside)
        for key in _SCHMITT_KEYS:
            out[key] = (
                self._volts(fam.schmitt, key, v, "schmitt", outside) if self.schmitt else None
            )
        if self.schmitt:
            # A Schmitt input is only guaranteed high above VT+max and low below VT-min.
            if out["vt_plus_max"] is not None:
                out["vih_min"] = out["vt_plus_max"]
            if out["vt_minus_min"] is not None:
                out["vil_max"] = out["vt_minus_min"]
        found = _lookup(fam.levels, "transition", v)
        out["max_transition"] = None
        if found is not None and not self.schmitt:
            out["max_transition"] = Sourced(
                Q_(found[0], "s"), fam.source("transition", _join(found[1], outside))
            )
        for key in ("i_high", "i_low"):
            value, which = self._current(key)
            out[key] = (
                None if value is None else Sourced(value, fam.source(key, _join(which, outside)))
            )
        out["c_in"] = None if fam.c_in is None else Sourced(fam.c_in, fam.source("c_in"))
        out["v_in_max"] = None
        if fam.v_in_max is not None:
            out["v_in_max"] = Sourced(
                Q_(fam.v_in_max.at(v), "V"), fam.source("v_in_max", fam.v_in_max.text)
            )
        for key, value in self.overrides.items():
            if key in out:
                out[key] = value
        return InputLevels(vdd=vdd_s, **out)

    def _current(self, key: str) -> tuple[Any, str]:
        """The input current to use and which figure it is: the 25 °C figure only when the
        rules' temperature span stays at 25 °C, else the figure over temperature."""
        fam = self.family
        cold = getattr(fam, f"{key}_25c")
        if cold is None:
            return getattr(fam, key), ""
        if self.room_temperature_only:
            return cold, "the 25 °C figure: the rules' temperature span stays at 25 °C"
        return getattr(fam, key), "the figure over temperature: the rules' span leaves 25 °C"

    def _volts(
        self, rows: tuple[LevelRow, ...], key: str, v: float, group: str, outside: str
    ) -> Sourced | None:
        found = _lookup(rows, key, v)
        if found is None:
            return None
        src = self.family.source(key, _join(found[1], outside), group)
        return Sourced(Q_(found[0], "V"), src)


def _join(*parts: str) -> str:
    return "; ".join(p for p in parts if p)


#: How reports name each number of an input model.
QUANTITY: Mapping[str, str] = MappingProxyType(
    {
        "vih_min": "V_IH,min",
        "vil_max": "V_IL,max",
        "i_high": "I_high",
        "i_low": "I_low",
        "v_in_max": "V_in,max",
        "c_in": "C_in",
        "supply": "supply range",
        "vt_plus_min": "V_T+,min",
        "vt_plus_max": "V_T+,max",
        "vt_minus_min": "V_T-,min",
        "vt_minus_max": "V_T-,max",
        "transition": "t_transition,max",
    }
)


# ---------------------------------------------------------------- reading TOML tables


def _status(word: Any, field: str, part: str) -> Status:
    if not isinstance(word, str) or word not in STATUS_WORDS:
        words = ", ".join((*STATUS_WORDS, ASSUMED_WORD))
        raise ValueParseError(str(word), expected=f"a status: {words}", field=field, part=part)
    return STATUS_WORDS[word]


def _span(text: Any, field: str, part: str) -> tuple[float, float]:
    if isinstance(text, str):
        v = float(parse_voltage(text, field=field, part=part).to("V").magnitude)
        return v, v
    if isinstance(text, list) and len(text) == 2 and all(isinstance(t, str) for t in text):
        lo = float(parse_voltage(text[0], field=field, part=part).to("V").magnitude)
        hi = float(parse_voltage(text[1], field=field, part=part).to("V").magnitude)
        if lo <= hi:
            return lo, hi
    raise ValueParseError(
        str(text), expected='a voltage or a range ["2.3V", "2.7V"]', field=field, part=part
    )


def _row(table: Any, keys: tuple[str, ...], field: str, part: str) -> LevelRow:
    if not isinstance(table, dict) or "vdd" not in table:
        raise ValueParseError(str(table), expected="a table with vdd = …", field=field, part=part)
    lo, hi = _span(table["vdd"], f"{field}.vdd", part)
    values: dict[str, VoltageExpr | float] = {}
    per_volt: set[str] = set()
    for key, text in table.items():
        if key == "vdd":
            continue
        name = f"{field}.{key}"
        if not isinstance(text, str):
            raise ValueParseError(str(text), expected="a quoted value", field=name, part=part)
        if key in keys:
            values[key] = VoltageExpr.parse(text, field=name, part=part)
        elif key == "transition":
            body = text.strip()
            if body.endswith("/V"):
                per_volt.add(key)
                body = body[:-2]
            values[key] = float(parse_time(body, field=name, part=part).to("s").magnitude)
        else:
            raise ValueParseError(key, expected=f"one of vdd, {', '.join(keys)}", field=name)
    _check_order(values, lo, hi, field, part)
    return LevelRow(lo, hi, MappingProxyType(values), frozenset(per_volt))


# Pairs of one row that cannot be the other way round at any supply of the row.
_ORDER = (("vil_max", "vih_min"), ("vt_minus_min", "vt_minus_max"), ("vt_plus_min", "vt_plus_max"))


def _check_order(
    values: Mapping[str, VoltageExpr | float], lo: float, hi: float, field: str, part: str
) -> None:
    for low, high in _ORDER:
        a, b = values.get(low), values.get(high)
        if not (isinstance(a, VoltageExpr) and isinstance(b, VoltageExpr)):
            continue
        if any(a.at(v) > b.at(v) for v in (lo, hi)):
            raise ValueParseError(
                b.text, expected=f"{high} at or above {low} ({a.text}) across the row's vdd",
                field=f"{field}.{high}", part=part,
            )  # fmt: skip


def _rows(table: Mapping[str, Any], key: str, part: str) -> list[Any]:
    rows = table.get(key, [])
    if not isinstance(rows, list):
        raise ValueParseError(str(rows), expected=f"[[{key}]] rows", field=key, part=part)
    return rows


_FAMILY_KEYS = frozenset(
    {
        "title", "standard", "status", "status_of", "note", "assumption", "supply", "v_in_max",
        "i_high", "i_low", "i_high_25c", "i_low_25c", "c_in", "levels", "schmitt",
    }
)  # fmt: skip


def family_from_table(
    name: str,
    table: Mapping[str, Any],
    file: str,
    *,
    origin: Origin = Origin.FAMILY,
    extra_keys: frozenset[str] = frozenset(),
) -> Family:
    """Build a :class:`Family` from one TOML table; ``extra_keys`` are kept in ``extra``.

    Raises:
        ValueParseError: a value cannot be read, or a key is unknown.
    """
    part = f"{file} [{name}]"
    for key in table:
        if key not in _FAMILY_KEYS and key not in extra_keys:
            raise ValueParseError(key, expected="a known key (see the file header)", part=part)
    word = table.get("status", "user")
    assumed: set[str] = set(_STATUS_KEYS) if word == ASSUMED_WORD else set()
    default = Status.DEFAULT if assumed else _status(word, "status", part)
    statuses = dict.fromkeys(_STATUS_KEYS, default)
    status_of = table.get("status_of", {})
    if not isinstance(status_of, dict):
        raise ValueParseError(str(status_of), expected="a table", field="status_of", part=part)
    for key, word in status_of.items():
        if key not in _STATUS_KEYS:
            raise ValueParseError(
                key, expected=f"one of {', '.join(sorted(_STATUS_KEYS))}", field="status_of",
                part=part,
            )  # fmt: skip
        if word == ASSUMED_WORD:
            assumed.add(key)
            continue
        assumed.discard(key)
        statuses[key] = _status(word, f"status_of.{key}", part)
    if "supply" not in table:
        raise ValueParseError("", expected='supply = ["min V", "max V"]', field="supply", part=part)
    lo, hi = _span(table["supply"], "supply", part)

    def current(key: str) -> Any:
        text = table.get(key)
        if text is None:
            return None
        q = parse_current(str(text), field=key, part=part)
        if q.magnitude < 0:
            raise ValueParseError(
                str(text), expected="a non-negative magnitude", field=key, part=part
            )
        return q

    note = str(table.get("note", ""))
    if origin is Origin.FAMILY and CHECK not in note:
        note = _join(note, CHECK)
    v_in_max = table.get("v_in_max")
    return Family(
        name=name,
        title=str(table.get("title", name)),
        standard=str(table.get("standard", "")),
        file=file,
        status=MappingProxyType(statuses),
        note=note,
        supply=(lo, hi),
        v_in_max=None
        if v_in_max is None
        else VoltageExpr.parse(str(v_in_max), field="v_in_max", part=part),
        i_high=current("i_high"),
        i_low=current("i_low"),
        i_high_25c=current("i_high_25c"),
        i_low_25c=current("i_low_25c"),
        c_in=None
        if table.get("c_in") is None
        else parse_capacitance(str(table["c_in"]), field="c_in", part=part),
        levels=tuple(_row(r, _LEVEL_KEYS, "levels", part) for r in _rows(table, "levels", part)),
        schmitt=tuple(
            _row(r, _SCHMITT_KEYS, "schmitt", part) for r in _rows(table, "schmitt", part)
        ),
        origin=origin,
        extra=MappingProxyType({k: v for k, v in table.items() if k in extra_keys}),
        assumed=frozenset(assumed),
        assumption=str(table.get("assumption", "")),
    )


@cache
def load_families() -> Mapping[str, Family]:
    """Every built-in family, keyed by name (e.g. "HC", "LS", "4000B", "LVCMOS33")."""
    out: dict[str, Family] = {}
    data = resources.files("pullproof.families") / "data"
    for entry in sorted(data.iterdir(), key=lambda e: e.name):
        if not entry.name.endswith(".toml"):
            continue
        doc = tomllib.loads(entry.read_text(encoding="utf-8"))
        for name, table in doc.get("family", {}).items():
            out[name] = family_from_table(name, table, Path(entry.name).name)
    return MappingProxyType(out)
