"""The ``pullproof.review/2`` JSON document (see README, "JSON output")."""

from __future__ import annotations

import math
from functools import lru_cache
from typing import Any

from ..eseries import format_rkm as _format_rkm
from ..hazard import safety_caution
from ..network import Missing
from ..provenance import Sourced
from ..results import (
    AcceptanceMark,
    Assumption,
    Basis,
    Bound,
    Changes,
    Check,
    Figure,
    Finding,
    NetworkResult,
    OperatingPoint,
    PointValues,
    Recommendation,
    ReviewResult,
    Skipped,
    Term,
)
from .json_writer import Streamed

# E-series values recur across networks; the code is the same each time.
format_rkm = lru_cache(maxsize=4096)(_format_rkm)

__all__ = ["SCHEMA", "review_json"]

SCHEMA = "pullproof.review/2"


def _num(s: Sourced | None, unit: str) -> float | None:
    if s is None:
        return None
    x = s.magnitude(unit)
    return x if math.isfinite(x) else None  # an unknown value is null, never NaN


@lru_cache(maxsize=256)
def _unit_text(units: Any) -> str:
    return f"{units:~P}"  # pint's unit formatting is slow, and a review has few units


def _quantity(s: Sourced) -> tuple[float, str]:
    q = s.value
    value = float(q.magnitude) if hasattr(q, "magnitude") else float(q)
    return value, _unit_text(q.units) if hasattr(q, "units") else ""


def _source(s: Sourced) -> dict[str, str]:
    return {
        "origin": s.source.origin.value,
        "where": s.source.where,
        "status": s.source.status.value,
        "reason": s.source.reason,
    }


def _term(t: Term) -> dict[str, Any]:
    value, unit = _quantity(t.value)
    return {"symbol": t.symbol, "value": value, "unit": unit, "source": _source(t.value)}


def _assumption(a: Assumption) -> dict[str, Any]:
    value, unit = _quantity(a.value)
    return {
        "part": a.part,
        "pin": a.pin,
        "quantity": a.quantity,
        "value": value,
        "unit": unit,
        "text": a.text,
        "class": a.basis,
        "fix": a.fix,
        "source": _source(a.value),
    }


def _figure(f: Figure) -> dict[str, Any]:
    value, unit = _quantity(f.value) if f.value is not None else (None, "")
    return {
        "symbol": f.symbol,
        "value": value if value is None or math.isfinite(value) else None,
        "unit": unit,
        "formula": f.formula,
        "substituted": f.substituted,
        "status": f.value.source.status.value if f.value is not None else None,
        "note": f.note,
        "terms": [_term(t) for t in f.terms],
        "missing": [_missing(m) for m in f.missing],
    }


def _operating(op: OperatingPoint | None) -> dict[str, Any] | None:
    if op is None:
        return None
    return {
        "ohms": op.ohms,
        "rkm": format_rkm(op.ohms),
        "band_ohms": list(op.band),
        "current_max": _figure(op.current_max),
        "current_min": _figure(op.current_min),
        "power": _figure(op.power),
        "idle_level": _figure(op.idle),
        "edge_time": _figure(op.edge),
    }


def _brief(p: PointValues | None) -> dict[str, Any] | None:
    """A candidate's operating point as numbers in base units (its value and code are the
    candidate's; formulas and terms are those of the network's own operating point, with the
    candidate's band)."""
    if p is None:
        return None

    def num(x: float | None) -> float | None:
        return x if x is None or math.isfinite(x) else None

    return {
        "band_ohms": list(p.band),
        "current_max_amps": num(p.current_max),
        "current_min_amps": num(p.current_min),
        "power_watts": num(p.power),
        "idle_volts": num(p.idle),
        "edge_seconds": num(p.edge),
    }


def _recommendation(rec: Recommendation | None) -> dict[str, Any] | None:
    if rec is None:
        return None
    points = dict(zip(rec.candidates, rec.points, strict=False))
    return {
        "series": rec.series,
        "tolerance": rec.tolerance,
        "candidates_ohms": list(rec.candidates),
        "pick_ohms": rec.pick,
        "policy": rec.policy,
        "reason": rec.reason,
        "pick_rkm": None if rec.pick is None else format_rkm(rec.pick),
        "candidates": [
            {"ohms": c, "rkm": format_rkm(c), "operating_point": _brief(points.get(c))}
            for c in rec.candidates
        ],
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
    return {**_limit(b, kind=b.kind.value, ohms=b.ohms), "corner": b.corner, "says": b.says}


def _check(c: Check) -> dict[str, Any]:
    return {**_limit(c, ok=c.ok), "sentence": c.sentence}


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
        "hazard_reason": n.mains_reason if n.mains_adjacent else "",
        "rail_ac": n.rail.ac,
        "window_ohms": list(r.window),
        "margins": list(r.margins),
        "verdict": r.verdict.value,
        "reason": r.reason,
        "binding": list(r.binding),
        "advice": list(r.advice),
        "recommended_ohms": rec.pick if rec else None,
        "recommendation": _recommendation(rec),
        "bounds": [_bound(b) for b in r.bounds],
        "checks": [_check(c) for c in r.checks],
        "missing": [_missing(m) for m in r.missing],
        "operating_point": _operating(r.operating),
        "acceptance": _acceptance(r.accepted),
        "basis": r.basis.value,
        "assumptions": [_assumption(a) for a in r.assumptions],
    }


def _finding(f: Finding) -> dict[str, Any]:
    return {
        "kind": f.kind,
        "severity": f.severity.value,
        "net": f.net,
        "refs": list(f.refs),
        "message": f.message,
        "acceptance": _acceptance(f.accepted),
        "basis": (Basis.ASSUMED if f.assumed else Basis.DATA).value,
        "assumed": list(f.assumed),
    }


def _skipped(s: Skipped) -> dict[str, str | None]:
    return {"ref": s.ref, "element": s.element or None, "net": s.net, "reason": s.reason}


def _hazardous(result: ReviewResult) -> dict[str, Any]:
    return {
        "nets": [
            {"net": h.net, "volts": h.volts, "ac": h.ac, "reason": h.reason}
            for h in result.hazardous_nets
        ],
        "resistors": [
            {
                "ref": c.ref,
                "net": c.net,
                "chain": list(c.chain),
                "volts": c.volts,
                "ac": c.ac,
                "working_volts": c.working,
                "ok": c.ok,
                "text": c.text,
            }
            for c in result.resistor_voltages
        ],
        "caution": safety_caution(result),
    }


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


def review_json(result: ReviewResult, *, streamed: bool = False) -> dict[str, Any]:
    """The review as a JSON-ready dict following schema ``pullproof.review/2``.

    ``streamed``: the networks are a :class:`Streamed` array, each made as it is written
    (for :func:`write_json`; a large board's networks are most of the document, and held
    all at once they were as big again as the review itself)."""
    networks: list[dict[str, Any]] | Streamed
    if streamed:
        networks = Streamed(lambda: map(_network, result.networks), len(result.networks))
    else:
        networks = [_network(r) for r in result.networks]
    return {
        "schema": SCHEMA,
        "root": result.root,
        "assume": result.assume,
        "worst": result.worst.value,
        "gate": result.gate.value,
        "assumed": result.assumed,
        "warnings": list(result.warnings),
        "networks": networks,
        "findings": [_finding(f) for f in result.findings],
        "skipped": [_skipped(s) for s in result.skipped],
        "hazardous": _hazardous(result),
        "changes": _changes(result.changes),
    }
