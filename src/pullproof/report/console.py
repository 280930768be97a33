"""The terminal report of a review: one row per network, then findings and skipped."""

from __future__ import annotations

from ..eseries import format_ohms
from ..hazard import safety_caution
from ..results import (
    AcceptanceMark,
    Basis,
    Changes,
    Figure,
    Finding,
    NetworkResult,
    OperatingPoint,
    ReviewResult,
    Verdict,
)
from .format import format_quantity
from .safe_text import for_terminal

__all__ = ["changes_table", "finding_line", "network_line", "review_table"]


def _window(r: NetworkResult) -> str:
    lo, hi = r.window
    left = format_ohms(lo) if lo is not None else "0"
    right = format_ohms(hi) if hi is not None else "∞"
    return f"{left} … {right}"


def _value(r: NetworkResult) -> str:
    res = r.network.resistor
    tol = res.tolerance.magnitude("")
    return f"{format_ohms(res.ohms.magnitude('ohm'))} ±{tol * 100:g}%"


def _verdict(verdict: Verdict, mark: AcceptanceMark | None, assumed: bool = False) -> str:
    """``PASS``, ``PASS (assumed)``, ``MARGINAL (assumed, accepted)`` …"""
    tags = ["assumed"] if assumed else []
    if mark is not None:
        tags.append("accepted" if mark.holds else "acceptance lapsed")
    word = verdict.value.upper()
    return f"{word} ({', '.join(tags)})" if tags else word


def _accepted_line(what: str, mark: AcceptanceMark) -> str:
    a = mark.acceptance
    who = ", ".join(x for x in (a.by, a.date) if x)
    tail = f" ({who}; {a.where})" if who else f" ({a.where})"
    if mark.holds:
        return f"  {what}: {a.reason}{tail}\n"
    return f"  {what}: acceptance lapsed, {mark.lapsed}{tail}\n"


def _table(rows: list[list[str]]) -> str:
    # Cells are escaped before they are measured, so a control character in a name can
    # neither drive the terminal nor break the columns.
    rows = [[for_terminal(cell, keep="") for cell in row] for row in rows]
    widths = [max(len(row[i]) for row in rows) for i in range(len(rows[0]))]
    lines = []
    for n, row in enumerate(rows):
        cells = [cell.ljust(w) for cell, w in zip(row, widths, strict=True)]
        lines.append("  ".join(cells).rstrip())
        if n == 0:
            lines.append("  ".join("-" * w for w in widths))
    return "\n".join(lines) + "\n"


def _fig(f: Figure) -> str:
    if f.value is not None:
        return format_quantity(f.value.value).replace("\u00a0", " ")
    return "unknown" if f.missing else ""


def operating_line(op: OperatingPoint) -> str:
    """The operating point at one resistance in one short line."""
    parts = []
    if op.current_max.value is not None:
        parts.append(f"{_fig(op.current_max)} and {_fig(op.power)} while held the other way")
    elif op.current_max.missing:
        parts.append("current while held unknown")
    idle = _fig(op.idle)
    if idle:
        parts.append("idle level unknown" if idle == "unknown" else f"idles at {idle}")
    edge = _fig(op.edge)
    if edge:
        parts.append(f"{'rise time' if op.edge.symbol == 't_r' else 'edge'} {edge}")
    return "; ".join(parts) or "nothing to show"


def network_line(r: NetworkResult) -> str:
    """One network as one line: parts, value, pull, verdict and reason."""
    n = r.network
    return (
        f"{','.join(n.resistor.refs)} ({_value(r)}) on {n.net}, {n.direction.value} to "
        f"{n.rail.name}: {_verdict(r.verdict, r.accepted, r.basis is Basis.ASSUMED)}, {r.reason}"
    )


def finding_line(f: Finding) -> str:
    """One finding as the console prints it (without the severity column)."""
    return f"{f.kind} {f.net} [{','.join(f.refs)}]: {f.message}"


def _plural(n: int, word: str) -> str:
    return f"{n} {word}{'' if n == 1 else 's'}"


def changes_table(c: Changes) -> str:
    """What changed since the older revision: one row per added, removed or changed network."""
    out = [
        f"changes since {c.old_root}: {len(c.added)} added, {len(c.removed)} removed, "
        f"{len(c.changed)} changed, {c.unchanged} unchanged; "
        f"{_plural(len(c.new_findings), 'new finding')}, {len(c.resolved_findings)} resolved\n"
    ]
    rows = [["change", "network", "verdict now", "what changed"]]
    for ch in c.networks:
        tag = "added" if ch.old is None else "removed" if ch.new is None else "changed"
        now = ch.new.verdict.value.upper() if ch.new is not None else "-"
        rows.append([tag, ch.key, now, "; ".join(ch.what)])
    for f in c.new_findings:
        rows.append(["new finding", f"{f.kind} on {f.net}", f.severity.value.upper(), f.message])
    for f in c.resolved_findings:
        rows.append(["resolved", f"{f.kind} on {f.net}", "-", f.message])
    if len(rows) > 1:
        out.append(_table(rows))
    return "".join(out) + "\n"


def review_table(result: ReviewResult) -> str:
    """Render the review for a terminal (plain text, no colour codes)."""
    out: list[str] = [f"pullproof review of {result.root}\n\n"]
    if result.changes is not None:
        out.append(changes_table(result.changes))
    order = sorted(result.networks, key=lambda r: (-r.verdict.rank, r.network.net))
    if order:
        rows = [["net", "resistor", "value", "pull", "window", "verdict", "reason"]]
        for r in order:
            n = r.network
            rows.append(
                [
                    n.net,
                    ",".join(n.resistor.refs),
                    _value(r),
                    f"{n.direction.value} {n.rail.name}",
                    _window(r),
                    _verdict(r.verdict, r.accepted, r.basis is Basis.ASSUMED),
                    r.reason,
                ]
            )
        out.append(_table(rows))
        out.append("\noperating point at the fitted value (worst case over its band):\n")
        for r in order:
            if r.operating is not None:
                out.append(f"  {r.network.net}: {operating_line(r.operating)}\n")
    else:
        out.append("no pull networks found\n")
    if result.findings:
        out.append("\nfindings:\n")
        for f in sorted(result.findings, key=lambda f: (-f.severity.rank, f.net)):
            word = _verdict(f.severity, f.accepted, bool(f.assumed))
            out.append(f"  {word:10} {finding_line(f)}\n")
    caution = safety_caution(result)
    if caution:
        out.append("\nsafety:\n")
        for near in (r.network for r in order if r.network.mains_adjacent):
            out.append(f"  {near.net} is next to hazardous voltage: {near.mains_reason}\n")
        for c in result.resistor_voltages:
            mark = {True: "ok", False: "FAIL", None: "unknown"}[c.ok]
            out.append(f"  {c.ref:6} {mark:7} {c.text}\n")
        out.append(f"  {caution}\n")
    if result.skipped:
        out.append("\nnot judged as logic pulls:\n")
        for s in sorted(result.skipped, key=lambda s: (s.ref, s.element)):
            out.append(f"  {s.label:6} {s.net}: {s.reason}\n")
    marks = [
        (f"{','.join(r.network.resistor.refs)} on {r.network.net} ({r.verdict.value})", r.accepted)
        for r in order
    ]
    marks += [(f"{f.kind} on {f.net}", f.accepted) for f in result.findings]
    accepted = [_accepted_line(what, m) for what, m in marks if m is not None]
    if accepted:
        out.append("\naccepted by a reviewer:\n")
        out.extend(accepted)
    if result.warnings:
        out.append("\n")
        out.extend(f"warning: {w}\n" for w in result.warnings)
    counts: dict[str, int] = {}
    for r in result.networks:
        counts[r.verdict.value] = counts.get(r.verdict.value, 0) + 1
    summary = ", ".join(f"{k} {v}" for k, v in sorted(counts.items())) or "none"
    held = sum(1 for _, m in marks if m is not None and m.holds)
    tail = f"; {held} accepted" if held else ""
    assumed = sum(1 for r in result.networks if r.basis is Basis.ASSUMED)
    if assumed:
        tail += (
            f"; {assumed} rest on assumed values ('pullproof parts {result.root}' lists the "
            "numbers to confirm)"
        )
    out.append(
        f"\n{len(result.networks)} networks ({summary}); {len(result.findings)} findings{tail}\n"
    )
    return "".join(out)
