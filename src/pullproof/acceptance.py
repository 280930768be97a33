"""Accepted results: a reviewer's recorded decision that a verdict or finding stands.

Two places hold acceptances:

* a field ``pullproof.accept`` on a part, whose text is the reason, optionally preceded by
  a bracketed record of what is accepted — ``[marginal 100k 5%] strapped at power-up only``
  (fields ``pullproof.accept_by`` and ``pullproof.accept_date`` say who and when);
* an ``[[accept]]`` entry in the rules file: ``ref`` and/or ``net`` globs, ``kind`` (a
  verdict word or a finding kind), ``value`` and ``tolerance`` (the resistor as accepted),
  ``reason`` (required), ``by`` and ``date``.

An accepted item stays in every report, marked accepted, and does not count toward
``--fail-on``. When what it recorded changes (the verdict, the finding kind, the resistor's
value or tolerance) the acceptance *lapses*: the item counts again, with a line saying why.
An acceptance that records nothing cannot lapse; each review says so and shows how to record
it. An ``[[accept]]`` entry that matches nothing is reported as stale.
"""

from __future__ import annotations

import difflib
import fnmatch
import math
import re
from collections.abc import Iterable, Sequence
from dataclasses import replace
from typing import Any

from .circuit import Circuit
from .errors import Location, RulesError, ValueParseError
from .eseries import format_rkm
from .results import (
    FINDING_KINDS,
    Acceptance,
    AcceptanceMark,
    Finding,
    NetworkResult,
    ReviewResult,
    Verdict,
)
from .rules import RawEntry, Rules
from .units import parse_percent, parse_resistance

__all__ = ["ACCEPT_FIELDS", "apply_acceptances", "read_acceptances"]

ACCEPT_FIELDS = ("pullproof.accept", "pullproof.accept_by", "pullproof.accept_date")
_VERDICT_WORDS = frozenset({"marginal", "incomplete", "fail"})
_KINDS = _VERDICT_WORDS | FINDING_KINDS
_ENTRY_KEYS = ("ref", "net", "kind", "value", "tolerance", "reason", "by", "date")
_RECORD = re.compile(r"^\s*\[(?P<record>[^\]]*)\]\s*(?P<reason>.*)$", re.DOTALL)
_SPLIT = re.compile(r"[\s,;]+")
_REL = 1e-9  # values are compared as parsed numbers, not as text


def _record(
    words: Iterable[str], *, field: str | None, part: str | None, location: Location | None = None
) -> tuple[str, float | None, float | None]:
    """A record ``marginal 100k 5%`` → (kind, ohms, tolerance); any part may be left out."""
    kind, ohms, tol = "", None, None
    for word in words:
        if word.lower() in _KINDS:
            kind = word.lower()
        elif word.endswith("%"):
            tol = float(parse_percent(word, field=field, part=part).to("").magnitude)
        else:
            try:
                ohms = float(parse_resistance(word, field=field, part=part).to("ohm").magnitude)
            except ValueParseError as exc:
                kinds = ", ".join(sorted(_KINDS))
                expected = f"a verdict or finding kind ({kinds}), a resistance or a tolerance"
                raise ValueParseError(
                    word, expected=expected, field=exc.field, part=exc.part, location=location
                ) from None
    return kind, ohms, tol


def _from_fields(circuit: Circuit) -> list[Acceptance]:
    out = []
    for part in circuit.parts:
        text = part.field("pullproof.accept")
        if text is None:
            continue
        m = _RECORD.match(text)
        record, reason = (m["record"], m["reason"]) if m else ("", text)
        words = [w for w in _SPLIT.split(record) if w]
        kind, ohms, tol = _record(words, field="pullproof.accept", part=part.ref)
        if not reason.strip():
            raise ValueParseError(
                text,
                expected="the reason after the record",
                field="pullproof.accept",
                part=part.ref,
            )
        out.append(
            Acceptance(
                origin="field",
                where=f"field 'pullproof.accept' of {part.ref}",
                ref=part.ref,
                net="",
                kind=kind,
                value_ohms=ohms,
                tolerance=tol,
                reason=reason.strip(),
                by=part.field("pullproof.accept_by") or "",
                date=part.field("pullproof.accept_date") or "",
            )
        )
    return out


def _from_rules(entries: Sequence[RawEntry]) -> list[Acceptance]:
    out = []
    for entry in entries:
        where = Location(entry.file, entry.line, 1)
        table = entry.table
        for key in table:
            if key not in _ENTRY_KEYS:
                close = difflib.get_close_matches(key, _ENTRY_KEYS, n=1)
                hint = f"; did you mean {close[0]!r}?" if close else ""
                raise RulesError(f"[[accept]] entry: unknown key {key!r}{hint}", where)
        text = {k: _text(table, k, where) for k in table}
        if not text.get("ref") and not text.get("net"):
            raise RulesError('an [[accept]] entry needs ref = "R17" or net = "GLOB"', where)
        if not text.get("reason", "").strip():
            raise RulesError('an [[accept]] entry needs reason = "why it stands"', where)
        kind = text.get("kind", "").lower()
        if kind and kind not in _KINDS:
            close = difflib.get_close_matches(kind, sorted(_KINDS), n=1)
            hint = f"; did you mean {close[0]!r}?" if close else ""
            raise RulesError(
                f"[[accept]] entry: kind {kind!r} is no verdict or finding{hint}", where
            )
        words = [text[k] for k in ("value", "tolerance") if text.get(k)]
        try:
            _, ohms, tol = _record(words, field=None, part=None, location=where)
        except ValueParseError as exc:
            raise RulesError(f"[[accept]] entry: {exc.message}", where) from None
        out.append(
            Acceptance(
                origin="rules",
                where=f"{entry.file}:{entry.line}",
                ref=text.get("ref", ""),
                net=text.get("net", ""),
                kind=kind,
                value_ohms=ohms,
                tolerance=tol,
                reason=text["reason"].strip(),
                by=text.get("by", ""),
                date=text.get("date", ""),
            )
        )
    return out


def _text(table: Any, key: str, where: Location) -> str:
    value = table[key]
    if key == "date" and hasattr(value, "isoformat"):
        return str(value.isoformat())  # a TOML date written bare: date = 2031-05-04
    if not isinstance(value, str):
        raise RulesError(f'[[accept]] entry: write {key} as text, e.g. {key} = "…"', where)
    return value


def read_acceptances(circuit: Circuit, rules: Rules) -> tuple[Acceptance, ...]:
    """Every acceptance: ``pullproof.accept`` fields, then ``[[accept]]`` entries in order.

    Raises:
        ValueParseError: a field's record cannot be read (names field and part).
        RulesError: an ``[[accept]]`` entry is malformed (names file and line).
    """
    return (*_from_fields(circuit), *_from_rules(rules.accepts))


# ------------------------------------------------------------------ applying them


def _glob(pattern: str, *names: str) -> bool:
    return any(fnmatch.fnmatchcase(n.upper(), pattern.upper()) for n in names)


def _net_names(net: str) -> tuple[str, str]:
    return net, net.rsplit("/", 1)[-1]


def _matches(a: Acceptance, refs: Iterable[str], net: str) -> bool:
    if a.ref and not any(fnmatch.fnmatchcase(r, a.ref) for r in refs):
        return False
    return not a.net or _glob(a.net, *_net_names(net))


def _close(x: float, y: float) -> bool:
    return math.isclose(x, y, rel_tol=_REL, abs_tol=1e-12)


def _resistor_text(ohms: float | None, tol: float | None) -> str:
    value = "?" if ohms is None else format_rkm(ohms)
    return value if tol is None else f"{value} {tol * 100:g}%"


def _network_lapse(a: Acceptance, r: NetworkResult) -> str:
    """Why ``a`` no longer holds for ``r``, or "" while it does."""
    res = r.network.resistor
    ohms = res.ohms.magnitude("ohm")
    tol = res.tolerance.magnitude("")
    refs = ", ".join(res.refs)
    if a.kind and a.kind != r.verdict.value:
        return f"accepted as {a.kind}, the verdict is now {r.verdict.value}"
    changed = (a.value_ohms is not None and not _close(a.value_ohms, ohms)) or (
        a.tolerance is not None and not _close(a.tolerance, tol)
    )
    if changed:
        was = _resistor_text(a.value_ohms, a.tolerance)
        return f"accepted at {was}, {refs} is now {_resistor_text(ohms, tol)}"
    return ""


def _pick(candidates: list[AcceptanceMark]) -> AcceptanceMark | None:
    """The acceptance that applies: the first that holds, else the first that lapsed."""
    return next((c for c in candidates if c.holds), candidates[0] if candidates else None)


def _suggestion(a: Acceptance, record: str) -> str:
    if a.origin == "field":
        return f'write pullproof.accept = "[{record}] {a.reason}"'
    kind, *rest = record.split(" ")
    keys = [f'kind = "{kind}"']
    if rest:
        keys += [f'value = "{rest[0]}"', f'tolerance = "{rest[1]}"'] if len(rest) > 1 else []
    return "add " + ", ".join(keys)


def apply_acceptances(
    result: ReviewResult, acceptances: Sequence[Acceptance], *, whole: bool = True
) -> ReviewResult:
    """Mark the networks and findings that ``acceptances`` accept, and say which acceptances
    lapsed, record nothing or are stale (``ReviewResult.warnings``). ``whole`` is False when
    only some resistors were judged (``--ref``/``--where``): staleness cannot be told then."""
    if not acceptances:
        return result
    used: dict[int, str] = {}  # acceptance index → "applied" or "pass" (matched a passing net)
    networks = []
    for r in result.networks:
        n = r.network
        marks = []
        for i, a in enumerate(acceptances):
            # an array element is named "RN1 (1–8)"; an acceptance may name it or just "RN1"
            refs = (*n.resistor.refs, *(e.ref for e in n.resistor.members))
            if a.kind in FINDING_KINDS or not _matches(a, refs, n.net):
                continue
            if r.verdict is Verdict.PASS:
                used.setdefault(i, "pass")
                continue
            used[i] = "applied"
            marks.append(AcceptanceMark(a, _network_lapse(a, r)))
        mark = _pick(marks)
        networks.append(replace(r, accepted=mark) if mark else r)
    findings = []
    for f in result.findings:
        marks = []
        for i, a in enumerate(acceptances):
            if (a.kind and a.kind != f.kind) or not _matches(a, f.refs, f.net):
                continue
            if f.severity is Verdict.PASS:
                used.setdefault(i, "pass")
                continue
            used[i] = "applied"
            marks.append(AcceptanceMark(a))
        mark = _pick(marks)
        findings.append(replace(f, accepted=mark) if mark else f)
    warnings = list(result.warnings)
    warnings += _lapsed_lines(networks, findings)
    warnings += _unrecorded_lines(networks, findings)
    for i, a in enumerate(acceptances if whole else ()):
        state = used.get(i)
        what = a.ref or a.net
        if state is None:
            warnings.append(
                f"stale acceptance ({a.where}, {what}): it matches no network or finding"
            )
        elif state == "pass":
            warnings.append(f"acceptance no longer needed ({a.where}, {what}): it now passes")
    return replace(
        result, networks=tuple(networks), findings=tuple(findings), warnings=tuple(warnings)
    )


def _lapsed_lines(networks: Sequence[NetworkResult], findings: Sequence[Finding]) -> list[str]:
    out = []
    for r in networks:
        if r.accepted is not None and not r.accepted.holds:
            refs = ", ".join(r.network.resistor.refs)
            a = r.accepted.acceptance
            out.append(
                f"acceptance lapsed ({a.where}, {refs} on {r.network.net}): {r.accepted.lapsed}"
            )
    del findings  # a finding's acceptance records only its kind, which it is matched by
    return out


def _unrecorded_lines(networks: Sequence[NetworkResult], findings: Sequence[Finding]) -> list[str]:
    out = []
    seen: set[str] = set()
    for r in networks:
        m = r.accepted
        if m is None or not m.holds or m.acceptance.pinned or m.acceptance.where in seen:
            continue
        seen.add(m.acceptance.where)
        res = r.network.resistor
        record = (
            f"{r.verdict.value} "
            f"{_resistor_text(res.ohms.magnitude('ohm'), res.tolerance.magnitude(''))}"
        )
        out.append(
            f"acceptance records nothing ({m.acceptance.where}), so it cannot lapse: "
            f"{_suggestion(m.acceptance, record)}"
        )
    for f in findings:
        m = f.accepted
        if m is None or m.acceptance.pinned or m.acceptance.where in seen:
            continue
        seen.add(m.acceptance.where)
        out.append(
            f"acceptance records nothing ({m.acceptance.where}), so it cannot lapse: "
            f"{_suggestion(m.acceptance, f.kind)}"
        )
    return out
