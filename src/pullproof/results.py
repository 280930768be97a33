"""What a review produces: bounds, verdicts, findings and skipped resistors.

These records are the contract between the engine (:mod:`pullproof.constraints`,
:mod:`pullproof.evaluate`, :mod:`pullproof.detect`) and every report (console,
JSON, HTML note). Reports read them; they never recompute a number.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from enum import StrEnum

from .network import Missing, PullNetwork
from .provenance import Sourced

__all__ = [
    "FINDING_KINDS",
    "Acceptance",
    "AcceptanceMark",
    "Bound",
    "BoundKind",
    "Changes",
    "Check",
    "Figure",
    "Finding",
    "HazardousNet",
    "NetworkChange",
    "NetworkResult",
    "OperatingPoint",
    "PointValues",
    "Recommendation",
    "ResistorVoltage",
    "ReviewResult",
    "Severity",
    "Skipped",
    "Term",
    "Verdict",
]


class BoundKind(StrEnum):
    MIN = "min"  # R_lo (lowest resistance in the band) must be ≥ ohms
    MAX = "max"  # R_hi (highest resistance in the band) must be ≤ ohms


class Verdict(StrEnum):
    """Plain-word verdicts, ordered from best to worst by :attr:`rank`."""

    PASS = "pass"
    MARGINAL = "marginal"  # hard limits met; a margin or soft limit missed
    INCOMPLETE = "incomplete"  # a needed value is missing
    FAIL = "fail"

    @property
    def rank(self) -> int:
        return {"pass": 0, "marginal": 1, "incomplete": 2, "fail": 3}[self.value]


Severity = Verdict  # findings use the same scale


# Every kind of finding a review can report (an acceptance may name one).
FINDING_KINDS = frozenset(
    {
        "floating-input",
        "rail-above-input-tolerance",
        "up-and-down",
        "pull-without-input",
        "unreadable-value",
        "resistor-working-voltage",
    }
)


@dataclass(frozen=True)
class Acceptance:
    """A reviewer's recorded decision that a verdict or finding stands.

    ``kind``, ``value_ohms`` and ``tolerance`` record what was accepted (a verdict word or a
    finding kind, and the resistor as it was); an empty ``kind`` or a None value records
    nothing, so that part cannot lapse. ``ref`` and ``net`` are globs ("" matches any).
    """

    origin: str  # "field" (pullproof.accept on a part) or "rules" ([[accept]] in the rules)
    where: str  # "field 'pullproof.accept' of R17" or "pullproof.toml:12"
    ref: str
    net: str
    kind: str
    value_ohms: float | None
    tolerance: float | None
    reason: str
    by: str = ""
    date: str = ""

    @property
    def pinned(self) -> bool:
        """True when it records the kind it accepts (and, for a verdict, the resistor)."""
        if not self.kind:
            return False
        return self.kind in FINDING_KINDS or (
            self.value_ohms is not None and self.tolerance is not None
        )


@dataclass(frozen=True)
class AcceptanceMark:
    """An acceptance applied to one network or finding; ``lapsed`` says why it no longer holds."""

    acceptance: Acceptance
    lapsed: str = ""

    @property
    def holds(self) -> bool:
        return not self.lapsed


@dataclass(frozen=True)
class Term:
    """One named input of a formula: its symbol, value and provenance."""

    symbol: str  # "V_min", "V_IH,min", "ΣI_high"
    value: Sourced


@dataclass(frozen=True)
class Bound:
    """One constraint's limit on the pull resistance.

    ``ohms`` is None when the constraint could not be evaluated (then ``missing``
    says why). ``applies_to`` is which end of the fitted band is compared: a MAX
    bound limits the band's top (R_hi), a MIN bound its bottom (R_lo).
    """

    constraint: str  # registry id, e.g. "high-level-holds"
    title: str  # "High level holds"
    kind: BoundKind
    ohms: float | None
    hard: bool
    formula: str  # "R_hi ≤ (V_min − V_IH,min − m) / ΣI_high"
    substituted: str  # "(4.5 V − 3.15 V − 0.1 V) / 1 µA"
    terms: tuple[Term, ...]
    source: str = ""  # the formula's own source (standard, handbook, circuit theory)
    explanation: str = ""  # one sentence: why this bound exists here
    relax: str = ""  # what would relax this bound, for empty-window advice
    corner: str = ""  # which corner was worst, e.g. "VCC = 4.5 V, 85 °C"
    missing: tuple[Missing, ...] = ()
    # A clause naming the parts, completing "the 3.2 kΩ …": "at which SW3 still gets its 1 mA
    # wetting current". Reasons are built from it; "" falls back to the title.
    says: str = ""
    assumed: tuple[str, ...] = ()  # assumed values it rests on (then it is soft)

    @property
    def evaluated(self) -> bool:
        return self.ohms is not None


@dataclass(frozen=True)
class Check:
    """A pass/fail condition that does not depend on the resistance value
    (input tolerance of the pull rail, resistor working voltage)."""

    constraint: str  # registry id, e.g. "input-tolerance"
    title: str
    ok: bool | None  # None: could not be evaluated (see missing)
    hard: bool
    formula: str  # "V_max ≤ V_in,max"
    substituted: str
    terms: tuple[Term, ...]
    source: str = ""
    explanation: str = ""
    missing: tuple[Missing, ...] = ()
    # The outcome as a plain sentence naming the parts, without the final full stop: "the pull
    # rail reaches 5.25 V but U2 pin 3 tolerates at most 3.5 V". "" falls back to the formula.
    sentence: str = ""
    assumed: tuple[str, ...] = ()  # assumed values it rests on (then it is soft)


@dataclass(frozen=True)
class Figure:
    """One number of an operating point, how it was computed, and from what.

    ``value`` is None when it cannot be computed: ``note`` then says why, or ``missing``
    names the values to add. Otherwise ``note`` adds what a reader needs to use it.
    """

    symbol: str  # "I_max", "P", "V_idle", "t_edge", "t_r"
    value: Sourced | None
    formula: str  # "I_max = V_max / R_lo"
    substituted: str  # "(5.25 V − 0 V) / 9.5 kΩ"
    terms: tuple[Term, ...]
    note: str = ""
    missing: tuple[Missing, ...] = ()
    unit: str = ""  # the base unit ``value`` is in: "A", "W", "V" or "s"

    @property
    def number(self) -> float | None:
        """The value as a float in ``unit`` (None when there is none)."""
        return None if self.value is None else float(self.value.value.magnitude)


@dataclass(frozen=True)
class OperatingPoint:
    """What the line does at one resistance over its whole band (see :mod:`pullproof.operating`)."""

    ohms: float  # the nominal value
    band: tuple[float, float]  # (R_lo, R_hi) with the fitted part's tolerance and TCR
    current_max: Figure  # while a switch or driver holds the line the other way
    current_min: Figure  # the least current through a closed contact
    power: Figure  # the resistor's dissipation meanwhile
    idle: Figure  # the idle level at the net with the worst leakage
    edge: Figure  # the slowest edge the pull makes, where the capacitance is known

    @property
    def figures(self) -> tuple[Figure, ...]:
        return (self.current_max, self.current_min, self.power, self.idle, self.edge)

    def values(self) -> PointValues:
        """The same numbers as plain floats, like a candidate's."""

        return PointValues(self.ohms, self.band, *(f.number for f in self.figures))


@dataclass(frozen=True)
class PointValues:
    """An operating point's numbers at one resistance, in base units; None where a figure
    does not apply or is unknown. Candidates carry only these: their formulas, terms and
    provenance are those of the network's :class:`OperatingPoint`, with their own band."""

    ohms: float
    band: tuple[float, float]
    current_max: float | None  # A
    current_min: float | None  # A
    power: float | None  # W
    idle: float | None  # V
    edge: float | None  # s

    #: Units of the five figures, in order.
    UNITS = ("A", "A", "W", "V", "s")

    @property
    def figures(self) -> tuple[float | None, ...]:
        return (self.current_max, self.current_min, self.power, self.idle, self.edge)


@dataclass(frozen=True)
class Recommendation:
    """E-series values whose whole band fits the window, and the pick."""

    series: str
    tolerance: float  # fraction assumed for the candidates' band
    candidates: tuple[float, ...]  # ohms, ascending
    pick: float | None
    policy: str  # "centre" or "low-current"
    reason: str  # one sentence on why the pick
    points: tuple[PointValues, ...] = ()  # each candidate's operating-point numbers, in order


@dataclass(frozen=True)
class NetworkResult:
    """The judgement of one pull network."""

    network: PullNetwork
    bounds: tuple[Bound, ...]
    window: tuple[float | None, float | None]  # (max of hard mins, min of hard maxes), ohms
    band: tuple[float, float]  # fitted (R_lo, R_hi) over tolerance and TCR, ohms
    verdict: Verdict
    reason: str  # the deciding reason in one sentence
    margins: tuple[float | None, float | None]  # (R_lo / min − 1, max / R_hi − 1)
    binding: tuple[str, ...]  # constraint ids of the binding bounds
    recommendation: Recommendation | None
    checks: tuple[Check, ...] = ()
    advice: tuple[str, ...] = ()  # for an empty window: what would relax each binding bound
    missing: tuple[Missing, ...] = ()
    operating: OperatingPoint | None = None  # at the fitted value; None when not computed
    accepted: AcceptanceMark | None = None

    @property
    def counts(self) -> bool:
        """False while an acceptance holds: the verdict then does not count toward --fail-on."""
        return self.accepted is None or not self.accepted.holds


@dataclass(frozen=True)
class Finding:
    """Something wrong that is not a window check (floating input, rail mismatch, …)."""

    kind: str  # one of FINDING_KINDS
    severity: Verdict
    net: str
    refs: tuple[str, ...]
    message: str
    accepted: AcceptanceMark | None = None

    @property
    def counts(self) -> bool:
        """False while an acceptance holds: the finding then does not count toward --fail-on."""
        return self.accepted is None or not self.accepted.holds


@dataclass(frozen=True)
class HazardousNet:
    """A net at mains or other hazardous voltage (see :mod:`pullproof.hazard`)."""

    net: str
    volts: float  # nominal; rms when ``ac``
    ac: bool
    reason: str


@dataclass(frozen=True)
class ResistorVoltage:
    """A resistor tied (alone or in a series chain) to a hazardous net, and its working-voltage
    check."""

    ref: str
    net: str  # the hazardous net the chain starts on
    chain: tuple[str, ...]  # the series chain, starting at the hazardous net
    volts: float | None  # worst-case voltage across this resistor (rms for AC)
    ac: bool
    working: float | None  # its working voltage, V
    ok: bool | None  # None: a value is unknown
    text: str  # one sentence naming the parts
    assumed: tuple[str, ...] = ()  # values nothing states that the result rests on


@dataclass(frozen=True)
class Skipped:
    """A resistor that is deliberately not judged as a logic pull (tied to a rail, between
    supplies, or not fitted), with the reason."""

    ref: str  # the part's reference
    net: str
    reason: str
    element: str = ""  # "1-8" for an element of a resistor array

    @property
    def label(self) -> str:
        """How reports name it: ``R9``, or ``RN1 (1–8)``."""
        a, _, b = self.element.partition("-")
        return f"{self.ref} ({a}–{b})" if self.element else self.ref


@dataclass(frozen=True)
class NetworkChange:
    """One network paired across two revisions, with what changed in words."""

    key: str  # "R17 on /BOOT"
    new: NetworkResult | None  # None: removed
    old: NetworkResult | None  # None: added
    what: tuple[str, ...] = ()  # empty for an unchanged pair


@dataclass(frozen=True)
class Changes:
    """What changed between an older revision of the design and this one."""

    old_root: str
    old_files: tuple[tuple[str, str], ...]  # (sheet file, absolute path) read for the old review
    old_rules_file: str | None
    networks: tuple[NetworkChange, ...]  # added, removed and changed pairs (not unchanged ones)
    unchanged: int
    new_findings: tuple[Finding, ...]
    resolved_findings: tuple[Finding, ...]

    @property
    def added(self) -> tuple[NetworkChange, ...]:
        return tuple(c for c in self.networks if c.old is None)

    @property
    def removed(self) -> tuple[NetworkChange, ...]:
        return tuple(c for c in self.networks if c.new is None)

    @property
    def changed(self) -> tuple[NetworkChange, ...]:
        return tuple(c for c in self.networks if c.old is not None and c.new is not None)


@dataclass(frozen=True)
class ReviewResult:
    """Everything one review of one root schematic produced."""

    root: str
    networks: tuple[NetworkResult, ...]
    findings: tuple[Finding, ...]
    skipped: tuple[Skipped, ...]
    files: tuple[tuple[str, str], ...] = ()  # (sheet file, absolute path) of every file read
    rules_file: str | None = None
    notes: tuple[str, ...] = field(default_factory=tuple)
    warnings: tuple[str, ...] = ()  # stale or unrecorded acceptances
    changes: Changes | None = None  # set by a review against an older revision
    hazardous_nets: tuple[HazardousNet, ...] = ()  # nets at mains or other hazardous voltage
    resistor_voltages: tuple[ResistorVoltage, ...] = ()  # resistors tied to them, checked

    @property
    def worst(self) -> Verdict:
        """The worst verdict or finding severity, accepted ones included."""
        ranks = [n.verdict for n in self.networks] + [f.severity for f in self.findings]
        return max(ranks, key=lambda v: v.rank, default=Verdict.PASS)

    @property
    def inputs(self) -> tuple[str, ...]:
        """Every file the review read (schematics, rules), the older revision's too."""
        inputs = [p for _, p in self.files]
        if self.rules_file is not None:
            inputs.append(self.rules_file)
        if self.changes is not None:
            inputs += [p for _, p in self.changes.old_files]
            if self.changes.old_rules_file is not None:
                inputs.append(self.changes.old_rules_file)
        return tuple(inputs)

    @property
    def gate(self) -> Verdict:
        """The worst verdict or severity that counts: what ``--fail-on`` compares."""
        ranks = [n.verdict for n in self.networks if n.counts]
        ranks += [f.severity for f in self.findings if f.counts]
        return max(ranks, key=lambda v: v.rank, default=Verdict.PASS)
