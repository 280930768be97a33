"""The ``pullproof.review/1`` JSON document (see README, "JSON output")."""

from __future__ import annotations

import math
from typing import Any

from ..network import Missing
from ..provenance import Sourced
from ..results import (
    AcceptanceMark,
    Bound,
    Changes,
    Check,
    Finding,
    NetworkResult,
    ReviewResult,
    Skipped,
    Term,
)

__all__ = ["SCHEMA", "review_json"]

SCHEMA = "pullproof.review/1"


def _num(s: Sourced | None, unit: str) -> float | None:
    if s is None:
        return None
    x = s.magnitude(unit)
    return x if math.isfinite(x) else None  # an unknown value is null, never NaN


def _term(t: Term) -> dict[str, Any]:
    q = t.value.value
    return {
        "symbol": t.symbol,
        "value": float(q.magnitude) if hasattr(q, "magnitude") else float(q),
        "unit": f"{q.units:~P}" if hasattr(q, "units") else "",
        "source": {
            "origin": t.value.source.origin.value,
            "where": t.value.source.where,
            "status": t.value.source.status.value,
            "reason": t.value.source.reason,
        },
    }


def _acceptance(mark: AcceptanceMark | None) -> dict[str, Any] | None:
    if mark is None:
        return None
    a = mark.acceptance
    return {
        "status": "accepted" if mark.holds else "lapsed",
        "lapsed": mark.lapsed or None,
        "reason": a.reason,
        "by": a.by or None,
        "date": a.date or None,
        "where": a.where,
        "origin": a.origin,
        "recorded": {"kind": a.kind or None, "value_ohms": a.value_ohms, "tolerance": a.tolerance},
    }


def _missing(m: Missing) -> dict[str, str]:
    return {"what": m.what, "ref": m.ref, "hint": m.hint}


def _limit(item: Bound | Check, **own: Any) -> dict[str, Any]:
    """The keys bounds and checks share, with each one's own keys after the title."""
    return {
        "constraint": item.constraint,
        "title": item.title,
        **own,
        "hard": item.hard,
        "formula": item.formula,
        "substituted": item.substituted,
        "source": item.source,
        "terms": [_term(t) for t in item.terms],
        "missing": [_missing(m) for m in item.missing],
        "assumed": list(item.assumed),
    }


def _bound(b: Bound) -> dict[str, Any]:
    return {**_limit(b, kind=b.kind.value, ohms=b.ohms), "corner": b.corner}


def _check(c: Check) -> dict[str, Any]:
    return _limit(c, ok=c.ok)


def _network(r: NetworkResult) -> dict[str, Any]:
    n = r.network
    rec = r.recommendation
    return {
        "net": n.net,
        "sheet": n.sheet,
        "direction": n.direction.value,
        "rail": n.rail.name,
        "rail_volts": [_num(n.rail.v_min, "V"), _num(n.rail.v_max, "V")],
        "resistors": [
            {
                "ref": el.ref,
                "element": el.element or None,
                "value_ohms": _num(n.resistor.ohms, "ohm"),
                "tolerance": _num(n.resistor.tolerance, ""),
            }
            for el in n.resistor.members
        ],
        "band_ohms": list(r.band),
        "inputs": [
            {"ref": i.ref, "pin": i.pin, "family": i.family or None, "via": i.series_ref or None}
            for i in n.inputs
        ],
        "switches": [
            {"ref": s.ref, "other_side": s.other_side, "pulls_against": s.pulls_against}
            for s in n.switches
        ],
        "drivers": [{"ref": d.ref, "pin": d.pin, "kind": d.kind} for d in n.drivers],
        "capacitors": [
            {"ref": c.ref, "farads": _num(c.farads, "F"), "to": c.to} for c in n.capacitors
        ],
        "mains_adjacent": n.mains_adjacent,
        "window_ohms": list(r.window),
        "margins": list(r.margins),
        "verdict": r.verdict.value,
        "reason": r.reason,
        "binding": list(r.binding),
        "advice": list(r.advice),
        "recommended_ohms": rec.pick if rec else None,
        "recommendation": None
        if rec is None
        else {
            "series": rec.series,
            "tolerance": rec.tolerance,
            "candidates_ohms": list(rec.candidates),
            "pick_ohms": rec.pick,
            "policy": rec.policy,
            "reason": rec.reason,
        },
        "bounds": [_bound(b) for b in r.bounds],
        "checks": [_check(c) for c in r.checks],
        "missing": [_missing(m) for m in r.missing],
        "acceptance": _acceptance(r.accepted),
    }


def _finding(f: Finding) -> dict[str, Any]:
    return {
        "kind": f.kind,
        "severity": f.severity.value,
        "net": f.net,
        "refs": list(f.refs),
        "message": f.message,
        "acceptance": _acceptance(f.accepted),
    }


def _skipped(s: Skipped) -> dict[str, str | None]:
    return {"ref": s.ref, "element": s.element or None, "net": s.net, "reason": s.reason}


def _changes(c: Changes | None) -> dict[str, Any] | None:
    if c is None:
        return None

    def pair(ch: Any) -> dict[str, Any]:
        return {
            "network": ch.key,
            "net": (ch.new or ch.old).network.net,
            "refs": list((ch.new or ch.old).network.resistor.refs),
            "what": list(ch.what),
            "verdict": None if ch.new is None else ch.new.verdict.value,
            "old_verdict": None if ch.old is None else ch.old.verdict.value,
        }

    return {
        "against": c.old_root,
        "old_files": [{"file": label, "path": path} for label, path in c.old_files],
        "old_rules_file": c.old_rules_file,
        "added": [pair(ch) for ch in c.added],
        "removed": [pair(ch) for ch in c.removed],
        "changed": [pair(ch) for ch in c.changed],
        "unchanged": c.unchanged,
        "new_findings": [_finding(f) for f in c.new_findings],
        "resolved_findings": [_finding(f) for f in c.resolved_findings],
    }


def review_json(result: ReviewResult) -> dict[str, Any]:
    """The review as a JSON-ready dict following schema ``pullproof.review/1``."""
    return {
        "schema": SCHEMA,
        "root": result.root,
        "worst": result.worst.value,
        "gate": result.gate.value,
        "warnings": list(result.warnings),
        "networks": [_network(r) for r in result.networks],
        "findings": [_finding(f) for f in result.findings],
        "skipped": [_skipped(s) for s in result.skipped],
        "changes": _changes(result.changes),
    }
