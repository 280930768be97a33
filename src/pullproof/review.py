"""Review a schematic: the library entry point behind ``pullproof review`` and ``note``.

``review(root)`` reads the schematic, resolves every part against family data,
the part library and the rules, finds the pull networks, judges each one and
collects findings. It returns plain records (:class:`~pullproof.results.ReviewResult`)
that every report renders without recomputing anything.
"""

from __future__ import annotations

import fnmatch
import math
import os
import re
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import TYPE_CHECKING

from .acceptance import apply_acceptances, read_acceptances
from .circuit import Circuit, Part
from .detect import Resolver, UnknownRail, enabled_internal_pull
from .elements import library_pins
from .errors import PullproofError, SourceText, ValueParseError
from .families.match import (
    LibraryEntry,
    PartInfo,
    PartKind,
    PartLibrary,
    load_part_library,
    resolve_part,
)
from .hazard import hazards_of, voltage_findings
from .limits import InputPolicy
from .nets import circuit_from_hierarchy
from .network import Direction, Missing, PullNetwork, PullResistor, Rail
from .provenance import Origin, Provenance, Sourced, Status
from .results import (
    Finding,
    HazardousNet,
    NetworkResult,
    ResistorVoltage,
    ReviewResult,
    Skipped,
    Verdict,
)
from .rules import RULES_FILE, Rules, load_rules
from .schematic.hierarchy import Hierarchy, load_hierarchy
from .schematic.model import LibPin
from .textfile import Unreadable, read_regular
from .topology import PinOnNet, PullSite, find_pulls
from .units import Q_

if TYPE_CHECKING:
    from .constraints import Constraint

__all__ = ["PARTS_FILE", "Selection", "parse_ref_list", "review"]

PARTS_FILE = "pullproof-parts.toml"  # a part library beside the root is read automatically


class SelectionError(PullproofError, ValueError):
    """A --ref or --where option that cannot be read."""


@dataclass(frozen=True)
class Selection:
    """Which pull resistors to judge: by reference (``R3,R7-R12``) and/or field value."""

    refs: frozenset[str] | None = None
    where: tuple[tuple[str, str], ...] = ()

    def wants(self, part: Part) -> bool:
        if self.refs is not None and part.ref not in self.refs:
            return False
        for name, pattern in self.where:
            text = part.value if name.casefold() == "value" else part.field(name)
            if text is None or not fnmatch.fnmatchcase(text.casefold(), pattern.casefold()):
                return False
        return True

    @property
    def active(self) -> bool:
        return self.refs is not None or bool(self.where)


_MAX_REF_RANGE = 100_000  # more references than any schematic holds
_RANGE = re.compile(r"^([A-Za-z#_]+)(\d+)-(?:\1)?(\d+)$")
_REF = re.compile(r"^[A-Za-z#_][\w#.]*$")  # R3, SW_A2, #PWR01: what a reference looks like


def parse_ref_list(text: str) -> frozenset[str]:
    """``"R3,R7-R12"`` → {R3, R7, R8, …, R12}.

    Raises:
        SelectionError: a range that runs backwards, an empty item or one that is not a
            reference.
    """
    refs: set[str] = set()
    for item in (t.strip() for t in text.split(",")):
        if not item:
            raise SelectionError(f"--ref: empty item in {text!r}; expected e.g. R3,R7-R12")
        m = _RANGE.match(item)
        if m is None:
            if not _REF.match(item):
                raise SelectionError(
                    f"--ref: {item!r} is not a reference or range; expected e.g. R3,R7-R12"
                )
            refs.add(item)
            continue
        if max(len(m.group(2)), len(m.group(3))) > 9:
            raise SelectionError(f"--ref: range {item!r} is too large; expected e.g. R7-R12")
        prefix, a, b = m.group(1), int(m.group(2)), int(m.group(3))
        if b < a:
            raise SelectionError(f"--ref: range {item!r} runs backwards; expected e.g. R7-R12")
        if b - a >= _MAX_REF_RANGE:
            raise SelectionError(
                f"--ref: range {item!r} names more than {_MAX_REF_RANGE:,} references"
            )
        refs.update(f"{prefix}{n}" for n in range(a, b + 1))
    return frozenset(refs)


def parse_where(items: Iterable[str]) -> tuple[tuple[str, str], ...]:
    """``["Tolerance=1%"]`` → (("Tolerance", "1%"),); the value may be a glob."""
    out = []
    for item in items:
        name, sep, value = item.partition("=")
        if not sep or not name.strip():
            raise SelectionError(f"--where: cannot read {item!r}; expected FIELD=VALUE")
        out.append((name.strip(), value.strip()))
    return tuple(out)


def load_library(root: Path, parts: Sequence[Path]) -> PartLibrary:
    """The part library a review of ``root`` reads: ``parts``, else the file beside it."""
    return _library(root, parts)


def _library(root: Path, parts: Sequence[Path]) -> PartLibrary:
    paths = list(parts)
    beside = root.parent / PARTS_FILE
    if not paths and beside.is_file():
        paths.append(beside)
    entries: list[LibraryEntry] = []
    for p in paths:
        entries.extend(load_part_library(p).entries)
    return PartLibrary(tuple(entries))


def _parts(resolver: Resolver, labels: Iterable[str]) -> tuple[str, ...]:
    """The part references behind resistor labels (``RN1 (1–8)`` → ``RN1``), once each."""
    return tuple(dict.fromkeys(resolver.element(label).ref for label in labels))


def _findings_for_site(resolver: Resolver, site: PullSite) -> list[Finding]:
    out: list[Finding] = []
    if site.ups and site.downs:
        up = ", ".join(r for r, _ in site.ups)
        down = ", ".join(r for r, _ in site.downs)
        out.append(
            Finding(
                "up-and-down",
                Verdict.FAIL if site.inputs else Verdict.MARGINAL,
                site.net.name,
                _parts(resolver, (r for r, _ in (*site.ups, *site.downs))),
                f"{up} pulls up and {down} pulls down: together they form a divider that sets "
                f"{_divider_text(resolver, site)}; a logic input needs one pull, not a level "
                "between the thresholds",
            )
        )
    if (
        not site.inputs
        and not site.drivers
        and resolver.inputs.offboard_input(site.net.name) is None
    ):
        labels = [r for r, _ in (*site.ups, *site.downs)]
        out.append(
            Finding(
                "pull-without-input",
                Verdict.INCOMPLETE,
                site.net.name,
                _parts(resolver, labels),
                f"{', '.join(labels)} pulls {site.net.name}, which reaches no logic input; "
                "nothing on the schematic says what level it must hold",
            )
        )
    return out


def _divider_text(resolver: Resolver, site: PullSite) -> str:
    """The divider's node voltage range from nominal values, when the values and rail are known."""
    spec = resolver.rules.rail(site.ups[0][1])
    ups = [resolver.resistor_info(r) for r, _ in site.ups]
    downs = [resolver.resistor_info(r) for r, _ in site.downs]
    values = [[i.ohms.magnitude("ohm") for i in group if i is not None and i.ohms is not None]
              for group in (ups, downs)]  # fmt: skip
    if spec is None or spec.v_min is None or spec.v_max is None:
        return "a level between the rails"
    if len(values[0]) != len(ups) or len(values[1]) != len(downs):
        return "a level between the rails"
    ru, rd = (1.0 / sum(1.0 / r for r in group) for group in values)
    lo = spec.v_min.magnitude("V") * rd / (ru + rd)
    hi = spec.v_max.magnitude("V") * rd / (ru + rd)
    return f"the node at {lo:.3g}–{hi:.3g} V (nominal resistances)"


def _unknown_rail_result(u: UnknownRail, resolver: Resolver) -> NetworkResult | Finding:
    """A pull that cannot be judged yet: an incomplete network when only the rail voltage
    is unknown, a finding when the resistor's own value is unreadable."""
    infos = [resolver.resistor_info(r) for r in u.refs]
    if any(i is None or i.ohms is None for i in infos):
        bad = [r for r, i in zip(u.refs, infos, strict=True) if i is None or i.ohms is None]
        texts = ", ".join(f"{r} Value {_value_text(resolver, r)!r}" for r in bad)
        return Finding(
            "unreadable-value",
            Verdict.INCOMPLETE,
            u.site.net.name,
            _parts(resolver, u.refs),
            f"{', '.join(u.refs)} pulls {u.site.net.name} but {texts} cannot be read as a "
            "resistance; write it like 4k7 or 10k",
        )
    hint = f'add [rails] {u.rail} = "3V3" (its nominal voltage) to {RULES_FILE}'
    missing = Missing(f"the voltage of rail {u.rail}", "", hint)
    unknown = Sourced(
        Q_(math.nan, "V"),
        Provenance(Origin.SCHEMATIC, f"rail {u.rail}: voltage unknown", Status.USER, hint),
    )
    rail = Rail(u.rail, unknown, unknown, unknown)
    first = infos[0]
    assert first is not None and first.ohms is not None
    elements = tuple(resolver.element(r) for r in u.refs)
    resistor = PullResistor(
        u.refs, first.ohms, first.tolerance, first.tcr, first.power, first.working_voltage,
        size=first.size, elements=elements if any(e.array for e in elements) else (),
    )  # fmt: skip
    network = PullNetwork(
        net=u.site.net.name,
        sheet=u.site.sheet,
        direction=Direction.UP,
        rail=rail,
        resistor=resistor,
        inputs=(),
        rules=resolver.net_rules(u.site.net.name, None),
        missing=(missing,),
    )
    r = first.ohms.magnitude("ohm")
    tol = first.tolerance.magnitude("")
    return NetworkResult(
        network=network,
        bounds=(),
        window=(None, None),
        band=(r * (1 - tol), r * (1 + tol)),
        verdict=Verdict.INCOMPLETE,
        reason=f"Cannot judge yet: the voltage of rail {u.rail} is unknown; {hint}.",
        margins=(None, None),
        binding=(),
        recommendation=None,
        missing=(missing,),
    )


def _value_text(resolver: Resolver, label: str) -> str:
    part = resolver.circuit.part(resolver.element(label).ref)
    return part.value if part is not None else ""


def _check_findings(result: NetworkResult) -> list[Finding]:
    """Failed input-tolerance checks are also findings: the rail is wrong, not the value."""
    out = []
    for c in result.checks:
        if c.constraint == "input-tolerance" and c.ok is False:
            n = result.network
            # A limit resting on an assumed value never makes a hard fail: marginal, saying so.
            rests = (
                f"; it rests on {', '.join(c.assumed)}, which nothing states" if c.assumed else ""
            )
            out.append(
                Finding(
                    "rail-above-input-tolerance",
                    Verdict.FAIL if c.hard else Verdict.MARGINAL,
                    n.net,
                    (*(e.ref for e in n.resistor.members), *(i.ref for i in n.inputs)),
                    f"{', '.join(n.resistor.refs)} pulls {n.net} to {n.rail.name}: "
                    + (c.sentence or f"above what an input on it tolerates ({c.substituted})")
                    + rests,
                    assumed=c.assumed,
                )
            )
    return out


def review(
    root: str | os.PathLike[str],
    *,
    rules: str | os.PathLike[str] | None = None,
    parts: Sequence[str | os.PathLike[str]] = (),
    select: Selection | None = None,
    circuit: Circuit | None = None,
    hierarchy: Hierarchy | None = None,
    policy: InputPolicy | None = None,
    assume: str | None = None,
) -> ReviewResult:
    """Review every pull resistor of the schematic rooted at ``root``.

    Args:
        root: the root schematic file.
        rules: an explicit rules file; by default ``pullproof.toml`` beside the root.
        parts: part-library files; by default ``pullproof-parts.toml`` beside the root.
        select: restrict the judged resistors (``--ref``, ``--where``).
        circuit: ``root`` already read and connected (saves reading it again).
        hierarchy: ``root`` already read (the files behind ``circuit``).
        policy: size limits and whether sheets may lie outside the root's folder.
        assume: overrides the rules' ``assume`` ("none" for ``--strict``: no assumption).

    Raises:
        PullproofError: unreadable or malformed schematic, rules, part library or field.
    """
    root_path = Path(root)
    # The symbols' own pins (which units, which geometry) tell a resistor array's elements.
    hier = hierarchy if hierarchy is not None else load_hierarchy(root_path, policy)
    circuit = circuit if circuit is not None else circuit_from_hierarchy(hier, os.fspath(root))
    rules_obj = load_rules(root_path, Path(rules) if rules is not None else None)
    if assume is not None:
        rules_obj = rules_obj.with_assume(assume)
    library = _library(root_path, [Path(p) for p in parts])
    try:
        result = review_circuit(
            circuit, rules_obj, library, select or Selection(), library_pins(hier, circuit)
        )
    except ValueParseError as exc:
        raise _placed(exc, circuit) from None
    if rules_obj.file:  # Rules keeps only the file name; the note reads and digests the file
        used = Path(rules) if rules is not None else root_path.parent / RULES_FILE
        result = replace(result, rules_file=os.path.abspath(used))
    return result


_FIELD_READ_LIMIT = 1 << 30  # the file was read within its limit already; this only finds a line


def _placed(exc: ValueParseError, circuit: Circuit) -> ValueParseError:
    """A part-field error placed at the field in its schematic file (``FILE:LINE:COL``)."""
    part = circuit.part(exc.part) if exc.part else None
    if exc.location is not None or part is None or exc.field is None or not part.placements:
        return exc
    prop = re.compile(r'\(property\s+"' + re.escape(exc.field) + '"', re.IGNORECASE)
    for pl in part.placements:
        display = os.path.join(os.path.dirname(circuit.root), pl.file)
        try:
            text = read_regular(circuit.files[pl.file], _FIELD_READ_LIMIT).decode(
                "utf-8", "replace"
            )
        except (Unreadable, KeyError):
            continue
        m = prop.search(text, pl.span[0], pl.span[1])
        if m is not None or pl is part.placements[-1]:
            where = SourceText(display, text).locate(m.start() if m else pl.span[0])
            return ValueParseError(exc.text, expected=exc.expected, field=exc.field,
                                   part=exc.part, location=where)  # fmt: skip
    return exc


def evaluate(network: PullNetwork, constraints: Mapping[str, Constraint]) -> NetworkResult:
    """Judge one network by ``constraints``. The engine is imported on first use, so that
    a design without pull networks does not pay for loading the constraints."""
    from .evaluate import evaluate as judge

    return judge(network, registry=constraints)


def review_circuit(
    circuit: Circuit,
    rules: Rules,
    library: PartLibrary,
    select: Selection,
    pins: Mapping[str, tuple[LibPin, ...]] | None = None,
) -> ReviewResult:
    """Review an already-built circuit (the rest of :func:`review`).

    Raises:
        SelectionError: ``--ref`` names no part of the schematic (a typo would otherwise
            report an empty, passing review).
    """
    if select.refs is not None and all(circuit.part(r) is None for r in select.refs):
        named = ", ".join(sorted(select.refs)[:5]) + (", …" if len(select.refs) > 5 else "")
        raise SelectionError(f"--ref: no part {named} in the schematic")
    infos = {p.ref: resolve_part(p, library, rules) for p in circuit.parts}
    resolver = Resolver(circuit, infos, rules)
    topo = find_pulls(
        circuit,
        lambda p: _kind_word(infos[p.ref]),
        resolver.rail_key,
        library_pins=pins,
        ohms=lambda ref: _nominal_ohms(infos[ref]),
        offboard=lambda net: resolver.inputs.offboard_input(net) is not None,
    )
    resolver.elements = topo.elements  # topology names the array elements it found
    constraints: Mapping[str, Constraint] | None = None

    def chosen(refs: Iterable[str]) -> bool:
        if not select.active:
            return True
        return any((p := circuit.part(r)) is not None and select.wants(p) for r in refs)

    def skip(label: str, net: str, reason: str) -> Skipped:
        el = resolver.element(label)
        return Skipped(el.ref, net, reason, el.element)

    results: list[NetworkResult] = []
    findings: list[Finding] = []
    skipped = [
        Skipped(a.ref, a.net, a.reason, a.element) for a in topo.set_aside if chosen([a.ref])
    ]
    for site in topo.sites:
        all_refs = [r for r, _ in (*site.ups, *site.downs)]
        if not chosen(_parts(resolver, all_refs)):
            continue
        findings.extend(_findings_for_site(resolver, site))
        if site.ups and site.downs and site.inputs:
            reason = "part of an up/down divider on a logic input (see the finding)"
            skipped.extend(skip(r, site.net.name, reason) for r in all_refs)
            continue
        if site.ups and site.downs:
            reason = "divider into an analog or feedback node: both an up and a down pull"
            skipped.extend(skip(r, site.net.name, reason) for r in all_refs)
            continue
        direction = Direction.UP if site.ups else Direction.DOWN
        pulls = site.ups or site.downs
        rails = {rail for _, rail in pulls}
        resolved = resolver.resolve(site, direction, pulls)
        if isinstance(resolved, UnknownRail):
            unjudged = _unknown_rail_result(resolved, resolver)
            if isinstance(unjudged, Finding):
                findings.append(unjudged)
            else:
                results.append(unjudged)
            continue
        if len(rails) > 1:
            resolved = replace(
                resolved,
                notes=(*resolved.notes, f"parallel pulls go to different rails: {sorted(rails)}"),
            )
        if constraints is None:  # built-ins and installed plug-ins, looked up once a review
            from .constraints import registry

            constraints = registry()
        result = evaluate(resolved, constraints)
        results.append(result)
        findings.extend(_check_findings(result))
    for net, switches, inputs in topo.unpulled_switch_inputs:
        refs = tuple(sorted({p.ref for p in (*switches, *inputs)}))
        if not chosen(refs) or any(_has_internal_pull(circuit, p.ref) for p in inputs):
            continue
        findings.append(_floating(net.name, refs, switches, inputs, infos))
    hazardous, voltages = _hazards(circuit, infos, resolver, chosen)
    findings.extend(voltage_findings(voltages))
    files = tuple(sorted(circuit.files.items()))
    review_result = ReviewResult(
        root=circuit.root,
        networks=tuple(sorted(results, key=lambda r: r.network.net)),
        findings=tuple(findings),
        skipped=tuple(sorted(skipped, key=lambda s: (s.net, s.ref, s.element))),
        files=files,
        rules_file=rules.file or None,
        hazardous_nets=hazardous,
        resistor_voltages=voltages,
        assume=rules.assume,
    )
    acceptances = read_acceptances(circuit, rules)
    return apply_acceptances(review_result, acceptances, whole=not select.active)


def _hazards(
    circuit: Circuit,
    infos: dict[str, PartInfo],
    resolver: Resolver,
    chosen: Callable[[Iterable[str]], bool],
) -> tuple[tuple[HazardousNet, ...], tuple[ResistorVoltage, ...]]:
    """Nets at hazardous voltage, and the working-voltage check of the chosen resistors on them."""
    found, checks = hazards_of(circuit, infos, resolver.hazard)
    nets = tuple(h.result() for _, h in sorted(found.items()))
    return nets, tuple(c for c in checks if chosen([c.ref]))


def _floating(
    net: str,
    refs: tuple[str, ...],
    switches: Sequence[PinOnNet],
    inputs: Sequence[PinOnNet],
    infos: Mapping[str, PartInfo],
) -> Finding:
    """A switch-driven input with no pull. It fails only when the part data say the pin
    has no internal pull; otherwise many such pins have one (a microcontroller's, which
    firmware enables), so it is marginal until the designer confirms it."""
    sw = ", ".join(sorted({p.ref for p in switches}))
    ins = ", ".join(f"{p.ref} pin {p.name or p.pin}" for p in inputs)
    text = f"{ins} is driven only by {sw} and has no pull: it floats while the contact is open"
    says_none = [infos[p.ref].no_internal_pull for p in inputs]
    if all(says_none):
        return Finding("floating-input", Verdict.FAIL, net, refs, f"{text}, and {says_none[0]}")
    hint = (
        "; many such pins have an internal pull: confirm it and record field "
        "'pullproof.internal_pull' (e.g. up 30k..50k, or none) on the part, or internal_pull "
        "in its part-library entry"
    )
    return Finding("floating-input", Verdict.MARGINAL, net, refs, text + hint)


def _nominal_ohms(info: PartInfo) -> float | None:
    res = info.resistor
    return None if res is None or res.ohms is None else res.ohms.magnitude("ohm")


def _has_internal_pull(circuit: Circuit, ref: str) -> bool:
    """An input whose part declares an enabled internal pull does not float."""
    part = circuit.part(ref)
    return part is not None and enabled_internal_pull(part) is not None


def _kind_word(info: PartInfo) -> str:
    """Map the data module's part kinds onto the words topology uses."""
    return {
        PartKind.RESISTOR: "resistor",
        PartKind.POTENTIOMETER: "potentiometer",
        PartKind.SENSOR: "sensor",
        PartKind.CAPACITOR: "capacitor",
        PartKind.SWITCH: "switch",
        PartKind.RELAY: "relay",
        PartKind.OPTOCOUPLER: "optocoupler",
        PartKind.LED: "led",
        PartKind.DIODE: "diode",
        PartKind.TRANSISTOR: "transistor",
        PartKind.LOGIC: "logic",
        PartKind.MCU: "mcu",
        PartKind.CONNECTOR: "connector",
        PartKind.OPAMP: "opamp",
    }.get(info.kind, "ic" if info.inputs is not None and not info.stated_kind else "other")
