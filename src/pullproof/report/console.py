"""The terminal report of a review: one row per network, then findings and skipped."""

from __future__ import annotations

from ..eseries import format_ohms
from ..hazard import safety_caution
from ..results import Figure, NetworkResult, OperatingPoint, ReviewResult
from .format import format_quantity

__all__ = ["review_table"]


def _window(r: NetworkResult) -> str:
    lo, hi = r.window
    left = format_ohms(lo) if lo is not None else "0"
    right = format_ohms(hi) if hi is not None else "∞"
    return f"{left} … {right}"


def _value(r: NetworkResult) -> str:
    res = r.network.resistor
    tol = res.tolerance.magnitude("")
    return f"{format_ohms(res.ohms.magnitude('ohm'))} ±{tol * 100:g}%"


def _table(rows: list[list[str]]) -> str:
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


def review_table(result: ReviewResult) -> str:
    """Render the review for a terminal (plain text, no colour codes)."""
    out: list[str] = [f"pullproof review of {result.root}\n\n"]
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
                    r.verdict.value.upper(),
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
            refs = ",".join(f.refs)
            out.append(
                f"  {f.severity.value.upper():10} {f.kind:28} {f.net} [{refs}]: {f.message}\n"
            )
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
        for s in sorted(result.skipped, key=lambda s: s.ref):
            out.append(f"  {s.ref:6} {s.net}: {s.reason}\n")
    counts: dict[str, int] = {}
    for r in result.networks:
        counts[r.verdict.value] = counts.get(r.verdict.value, 0) + 1
    summary = ", ".join(f"{k} {v}" for k, v in sorted(counts.items())) or "none"
    out.append(f"\n{len(result.networks)} networks ({summary}); {len(result.findings)} findings\n")
    return "".join(out)
