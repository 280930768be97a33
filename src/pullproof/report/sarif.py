"""A SARIF 2.1.0 log of a review (OASIS Static Analysis Results Interchange Format).

One result per verdict that is not ``pass`` and one per finding. ``level`` follows the
severity (fail → error, marginal → warning, incomplete → note); the message is the
console's; the location is the resistor's ``(symbol …`` node in its schematic file (line
and column in Unicode code points), so code-review tools show it beside the changed lines.
An accepted result carries a suppression with the reviewer's reason (``inSource`` for a
field on the part, ``external`` for an entry in the rules file).

Artifact URIs are relative to the enclosing git work tree when there is one (what CI
systems resolve them against), else to the root schematic's folder; ``SRCROOT`` records
that folder as a file URI.
"""

from __future__ import annotations

import os
from pathlib import Path
from typing import Any

from .. import __version__
from ..circuit import Circuit
from ..errors import SourceText
from ..results import AcceptanceMark, Finding, NetworkResult, ReviewResult, Verdict
from .console import finding_line, network_line

__all__ = ["SARIF_SCHEMA", "SARIF_VERSION", "sarif_log"]

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = "https://json.schemastore.org/sarif-2.1.0.json"
_LEVEL = {Verdict.FAIL: "error", Verdict.MARGINAL: "warning", Verdict.INCOMPLETE: "note"}
_VERDICT_RULES = {
    "verdict/fail": "A pull resistor's band crosses a hard limit, or its window is empty.",
    "verdict/marginal": "A pull resistor meets every hard limit, not the margin or a soft limit.",
    "verdict/incomplete": "A value needed to judge a pull resistor is missing.",
}
_FINDING_TEXT = {
    "floating-input": "An input driven only by a switch has no pull and floats while it is open.",
    "rail-above-input-tolerance": "A pull goes to a rail above what an input on the net tolerates.",
    "up-and-down": "A net is pulled both up and down: the pulls form a divider.",
    "pull-without-input": "A pulled net reaches no logic input.",
    "unreadable-value": "A pull resistor's Value cannot be read as a resistance.",
    "resistor-working-voltage": "A resistor on a hazardous net exceeds its working voltage.",
}


def _base(root: Path) -> Path:
    """The git work tree holding ``root``, else its folder."""
    folder = root.resolve().parent
    for candidate in (folder, *folder.parents):
        if (candidate / ".git").exists():
            return candidate
    return folder


class _Locator:
    """(reference → region) from the placements of the circuit, reading each file once."""

    def __init__(self, circuit: Circuit, base: Path) -> None:
        self.circuit = circuit
        self.base = base
        self.texts: dict[str, SourceText | None] = {}

    def text(self, file: str) -> SourceText | None:
        if file not in self.texts:
            path = self.circuit.files.get(file)
            try:
                data = Path(path).read_bytes() if path else None
            except OSError:
                data = None
            self.texts[file] = (
                None if data is None else SourceText(file, data.decode("utf-8", "replace"))
            )
        return self.texts[file]

    def location(self, refs: tuple[str, ...]) -> dict[str, Any] | None:
        for ref in refs:
            part = self.circuit.part(ref)
            if part is None or not part.placements:
                continue
            placed = part.placements[0]
            src = self.text(placed.file)
            path = self.circuit.files.get(placed.file)
            if src is None or path is None:
                continue
            at = src.locate(placed.span[0])
            uri = Path(os.path.relpath(path, self.base)).as_posix()
            return {
                "physicalLocation": {
                    "artifactLocation": {"uri": uri, "uriBaseId": "SRCROOT"},
                    "region": {"startLine": at.line, "startColumn": at.col},
                },
                "logicalLocations": [{"name": ref, "kind": "element"}],
            }
        return None


def _suppressions(mark: AcceptanceMark | None) -> list[dict[str, Any]] | None:
    if mark is None or not mark.holds:
        return None
    a = mark.acceptance
    who = ", ".join(x for x in (a.by, a.date) if x)
    justification = f"{a.reason} ({who})" if who else a.reason
    kind = "inSource" if a.origin == "field" else "external"
    return [{"kind": kind, "status": "accepted", "justification": justification}]


def _result(
    rule: str,
    level: str,
    message: str,
    location: dict[str, Any] | None,
    fingerprint: str,
    mark: AcceptanceMark | None,
) -> dict[str, Any]:
    out: dict[str, Any] = {
        "ruleId": rule,
        "level": level,
        "message": {"text": message},
        "partialFingerprints": {"pullproofItem/v1": fingerprint},
    }
    if location is not None:
        out["locations"] = [location]
    suppressions = _suppressions(mark)
    if suppressions is not None:
        out["suppressions"] = suppressions
    if mark is not None and not mark.holds:
        out["properties"] = {"acceptanceLapsed": mark.lapsed}
    return out


def _network(r: NetworkResult, where: _Locator) -> dict[str, Any]:
    n = r.network
    return _result(
        f"verdict/{r.verdict.value}",
        _LEVEL[r.verdict],
        network_line(r),
        where.location(tuple(e.ref for e in n.resistor.members)),  # the part, for arrays too
        f"{','.join(n.resistor.refs)}|{n.net}",
        r.accepted,
    )


def _finding(f: Finding, where: _Locator) -> dict[str, Any]:
    return _result(
        f"finding/{f.kind}",
        _LEVEL.get(f.severity, "note"),
        finding_line(f),
        where.location(f.refs),
        f"{f.kind}|{f.net}|{','.join(sorted(f.refs))}",
        f.accepted,
    )


def sarif_log(result: ReviewResult, circuit: Circuit) -> dict[str, Any]:
    """The SARIF 2.1.0 log of ``result``; ``circuit`` gives each part's place in its file."""
    base = _base(Path(circuit.root))
    where = _Locator(circuit, base)
    results = [_network(r, where) for r in result.networks if r.verdict is not Verdict.PASS]
    results += [_finding(f, where) for f in result.findings if f.severity is not Verdict.PASS]
    rules = [
        {"id": rid, "shortDescription": {"text": text}} for rid, text in _VERDICT_RULES.items()
    ] + [{"id": f"finding/{k}", "shortDescription": {"text": t}} for k, t in _FINDING_TEXT.items()]
    return {
        "$schema": SARIF_SCHEMA,
        "version": SARIF_VERSION,
        "runs": [
            {
                "tool": {
                    "driver": {
                        "name": "pullproof",
                        "version": __version__,
                        "rules": rules,
                    }
                },
                "originalUriBaseIds": {"SRCROOT": {"uri": base.as_uri() + "/"}},
                "columnKind": "unicodeCodePoints",
                "results": results,
            }
        ],
    }
