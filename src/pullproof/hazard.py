"""Hazardous voltage by value: which nets carry it, and the resistors tied to them.

A net carries hazardous voltage when its name matches a mains pattern (its voltage is the
rules' ``mains_voltage``) or when it is a rail whose nominal voltage exceeds the
extra-low-voltage band of IEC 61140: more than 50 V AC rms or 120 V ripple-free DC. The
limits are inclusive: 50 V AC and 120 V DC are still extra-low voltage.

Every resistor with a pin on such a net is checked against its working voltage. A chain of
resistors in series (joined by nets with nothing else on them) shares the voltage in
proportion to the resistances, the worst-case share of one being
V · R_i,max / (R_i,max + Σ R_j,min); the whole hazardous voltage is taken across the chain,
since its far end sits at a low-voltage part (an optocoupler's LED, a diode) or the other
conductor. Ratings are compared as written: a resistor's working voltage is a DC or AC rms
figure (IEC 60115 convention, from memory).
"""

from __future__ import annotations

from collections.abc import Callable, Mapping
from dataclasses import dataclass

from .circuit import Circuit, Part
from .families.match import PartInfo, PartKind, ResistorInfo
from .provenance import Origin, Sourced
from .results import Finding, HazardousNet, ResistorVoltage, ReviewResult, Verdict
from .rules import RailSpec, Rules
from .units import format_si

__all__ = [
    "ELV_AC_RMS",
    "ELV_DC",
    "Hazard",
    "exceeds_elv",
    "hazard_of",
    "hazards_of",
    "safety_caution",
    "voltage_findings",
]

#: IEC 61140 extra-low-voltage band limits: above these a voltage is hazardous.
ELV_AC_RMS = 50.0  # V rms
ELV_DC = 120.0  # V, ripple-free

_CAUTION = (
    "pullproof checks logic pull values only: keep the isolation barrier, creepage and "
    "clearance (IEC 60664-1, the product standard such as IEC 62368-1), resistor working "
    "voltage and surge; extra-low voltage ends at 50 V AC rms or 120 V ripple-free DC "
    "(IEC 61140); never work on live circuits; local codes and licensed practice take "
    "precedence over this review"
)


def exceeds_elv(volts: float, *, ac: bool) -> bool:
    """True when ``volts`` (rms for AC) is above the IEC 61140 extra-low-voltage band."""
    return abs(volts) > (ELV_AC_RMS if ac else ELV_DC)


def _volts(v: float, ac: bool) -> str:
    return format_si(abs(v), "V", sig=4, minus="-") + (" AC" if ac else " DC")


@dataclass(frozen=True)
class Hazard:
    """A net at hazardous voltage: its voltage and why it counts."""

    net: str
    spec: RailSpec  # the voltage (nominal) and whether it is AC
    what: str  # "matches a mains pattern (230 V AC, …)", "is at 150 V DC, above …"

    @property
    def reason(self) -> str:
        return f"the net {self.net} {self.what}"

    def result(self) -> HazardousNet:
        return HazardousNet(self.net, self.volts, self.spec.ac, self.reason)

    @property
    def volts(self) -> float:
        assert self.spec.nominal is not None
        return self.spec.nominal.magnitude("V")


def hazard_of(rules: Rules, net: str, spec: RailSpec | None) -> Hazard | None:
    """The hazard of one net (``spec``: the rail it stands for, if any), or None."""
    if rules.is_mains(net):
        mains = rules.mains(net)
        assert mains.nominal is not None
        text = _volts(mains.nominal.magnitude("V"), mains.ac)
        where = mains.nominal.source.where
        return Hazard(net, mains, f"matches a mains pattern ({text}, {where})")
    if spec is None or spec.ground or spec.nominal is None:
        return None
    v = spec.nominal.magnitude("V")
    if not exceeds_elv(v, ac=spec.ac):
        return None
    limit = "50 V AC rms" if spec.ac else "120 V ripple-free DC"
    what = f"is at {_volts(v, spec.ac)}, above the extra-low-voltage limit of {limit} (IEC 61140)"
    return Hazard(net, spec, what)


def hazards_of(
    circuit: Circuit,
    infos: Mapping[str, PartInfo],
    hazard: Callable[[str], Hazard | None],
) -> tuple[dict[str, Hazard], tuple[ResistorVoltage, ...]]:
    """Every net at hazardous voltage (``hazard`` judges one net by name), and the
    working-voltage check of every resistor on one."""
    nets = {n.name: n for n in circuit.nets}
    found: dict[str, Hazard] = {}
    for net in circuit.nets:
        h = hazard(net.name)
        if h is not None:
            found[net.name] = h
    checks: dict[str, ResistorVoltage] = {}
    for name, h in found.items():
        for m in nets[name].members:
            info = infos.get(m.ref)
            if info is None or info.kind is not PartKind.RESISTOR:
                continue
            chain = _chain(circuit, infos, found, m.ref, name)
            for ref in chain:
                check = _check(h, chain, ref, infos)
                old = checks.get(ref)
                if old is None or (check.volts or 0.0) > (old.volts or 0.0):
                    checks[ref] = check
    return found, tuple(sorted(checks.values(), key=lambda c: c.ref))


def _two_pin_resistor(circuit: Circuit, infos: Mapping[str, PartInfo], ref: str) -> Part | None:
    part = circuit.part(ref)
    info = infos.get(ref)
    if part is None or info is None or info.kind is not PartKind.RESISTOR:
        return None
    return part if len(part.pins) == 2 else None


def _chain(
    circuit: Circuit,
    infos: Mapping[str, PartInfo],
    hazardous: Mapping[str, Hazard],
    first: str,
    start: str,
) -> tuple[str, ...]:
    """The series chain of resistors from ``first`` (on net ``start``) away from it."""
    chain = [first]
    here = start
    while True:
        part = _two_pin_resistor(circuit, infos, chain[-1])
        if part is None:
            break
        far = [n for p in part.pins if (n := circuit.net_of(part.ref, p.number)) is not None]
        beyond = [n for n in far if n.name != here]
        if len(beyond) != 1:
            break
        net = beyond[0]
        if net.name in hazardous or net.power or len(net.members) != 2:
            break  # the chain ends: another conductor, a rail, or a node with more on it
        nxt = next(m.ref for m in net.members if m.ref != part.ref)
        if nxt in chain or _two_pin_resistor(circuit, infos, nxt) is None:
            break
        chain.append(nxt)
        here = net.name
    return tuple(chain)


def _check(
    h: Hazard, chain: tuple[str, ...], ref: str, infos: Mapping[str, PartInfo]
) -> ResistorVoltage:
    res = {r: infos[r].resistor for r in chain}
    mine = res[ref]
    v = h.volts
    kind = "AC rms" if h.spec.ac else "DC"
    along = "" if len(chain) == 1 else f" (its share of the chain {' + '.join(chain)})"
    if any(i is None or i.ohms is None for i in res.values()):
        unknown = next(r for r, i in res.items() if i is None or i.ohms is None)
        text = (
            f"the resistance of {unknown} is unknown, so the voltage across {ref} on {h.net} "
            "cannot be worked out"
        )
        return ResistorVoltage(ref, h.net, chain, None, h.spec.ac, None, None, text)
    assert mine is not None
    share = v * _top(mine) / (_top(mine) + sum(_bottom(i) for r, i in res.items() if r != ref))
    across = f"up to {_volts(share, h.spec.ac)} sits across {ref}{along}"
    if mine.working_voltage is None:
        text = (
            f"{across}, but its working voltage is unknown; add field "
            "'pullproof.working_voltage' (e.g. 200V) or a chip size"
        )
        return ResistorVoltage(ref, h.net, chain, share, h.spec.ac, None, None, text)
    wv = mine.working_voltage.magnitude("V")
    ok = abs(share) <= wv
    word = "within" if ok else "above"
    text = f"{across}, {word} its {format_si(wv, 'V', sig=4)} working voltage ({kind})"
    used: list[Sourced] = [h.spec.nominal, mine.working_voltage] if h.spec.nominal else []
    nominal = v * _nominal(mine) / sum(_nominal(i) for i in res.values())
    if abs(nominal) <= wv:  # only the tolerances make it fail: they count too
        used += [i.tolerance for i in res.values() if i is not None]
    rests_on = tuple(dict.fromkeys(u.source.where for u in used if u.source.origin in _UNSTATED))
    return ResistorVoltage(ref, h.net, chain, share, h.spec.ac, wv, ok, text, rests_on)


# Origins of values nothing in the design states: a failure resting on one is not certain.
_UNSTATED = frozenset({Origin.DEFAULT, Origin.ASSUMED})


def _nominal(info: ResistorInfo | None) -> float:
    assert info is not None and info.ohms is not None
    return info.ohms.magnitude("ohm")


def _top(info: ResistorInfo | None) -> float:
    assert info is not None and info.ohms is not None
    return info.ohms.magnitude("ohm") * (1 + info.tolerance.magnitude(""))


def _bottom(info: ResistorInfo | None) -> float:
    assert info is not None and info.ohms is not None
    return info.ohms.magnitude("ohm") * (1 - info.tolerance.magnitude(""))


def voltage_findings(checks: tuple[ResistorVoltage, ...]) -> list[Finding]:
    """Failed or unknown resistor working-voltage checks as findings. A failure that rests on
    a value nothing states (the default mains voltage, a working voltage taken from the chip
    size) is marginal and says so: a default never makes a hard fail."""
    out = []
    for c in checks:
        if c.ok is True:
            continue
        severity = Verdict.INCOMPLETE if c.ok is None else Verdict.FAIL
        text = c.text
        if c.ok is False and c.assumed:
            severity = Verdict.MARGINAL
            text += (
                f"; this rests on {', '.join(c.assumed)}, which no field, part library or rules "
                "key states: state them to make it certain"
            )
        out.append(Finding("resistor-working-voltage", severity, c.net, c.chain, text))
    return out


def safety_caution(result: ReviewResult) -> str:
    """The safety caution when the design touches mains or other hazardous voltage, else ""."""
    if not result.hazardous_nets and not any(n.network.mains_adjacent for n in result.networks):
        return ""
    return f"The design touches mains or other hazardous voltage: {_CAUTION}."
